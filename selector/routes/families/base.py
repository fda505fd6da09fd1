"""The interface every route family implements, and the state batch it computes on.

A *route family* (quench_temper, carburize, cold_work, age, …) turns a list of
steps into named parameters (:meth:`RouteFamily.parse`), turns parameters back
into steps (:meth:`RouteFamily.to_steps`), spans the grade's process window with a
grid of parameters (:meth:`RouteFamily.grid`), and computes properties for a whole
:class:`Batch` of states at once (:meth:`RouteFamily.compute`).  ``evaluate`` runs a
batch of one; the selection engine runs one batch per family over the whole
catalogue, so the numbers agree by construction.

``compute`` returns a dict of arrays of shape ``(n,)`` with at least
``uts_mpa, yield_mpa, elongation_pct, hardness_hv`` (at the tensile-test location),
``surface_hardness_hv, center_hardness_hv, case_depth_mm``, optionally
``profile_hv`` of shape ``(n, len(profile_positions))`` with ``profile_positions``
(r/R from surface 1.0 to centre 0.0), ``center_martensite_pct``, ``peak_ratio``,
``reduction_area_pct``; and ``"notes"``: a list of ``(message, mask)`` pairs, the
mask True where the message applies; optionally ``"model_inputs"``: the intermediate
values and masks that the family's :attr:`RouteFamily.model_inputs` read
(:mod:`selector.routes.model_inputs`).  NaN means "not defined" (e.g. the hardness of
an aluminium alloy on a steel scale).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ...catalogue.grades import Grade
from ...errors import RouteError

#: ASTM A370 tension-test location: centre of rounds up to 1.5 in (38 mm), midway
#: between centre and surface above that (A370, Annex A1 on bar products).
A370_CENTRE_LIMIT_MM = 38.0


@dataclass
class Batch:
    """``n`` states of one route family, as parallel arrays."""

    grades: Sequence[Grade]            # distinct grades
    gidx: np.ndarray                   # (n,) index into grades
    comp: Mapping[str, np.ndarray]     # element -> (n,) wt %
    params: Mapping[str, np.ndarray]   # parameter -> (n,)
    diameter_mm: np.ndarray            # (n,) NaN for plates
    thickness_mm: np.ndarray           # (n,) NaN for rounds

    @property
    def n(self) -> int:
        return int(self.gidx.shape[0])

    def attr(self, name: str) -> np.ndarray:
        """A grade attribute broadcast to the states (e.g. ``"base_uts_mpa"``)."""
        vals = [getattr(g, name) for g in self.grades]
        arr = np.array(vals, dtype=object if isinstance(vals[0], str) else float)
        return arr[self.gidx]

    @property
    def section_mm(self) -> np.ndarray:
        """Diameter of a round, or thickness of a plate."""
        return np.where(np.isnan(self.diameter_mm), self.thickness_mm, self.diameter_mm)

    def subset(self, mask: np.ndarray) -> "Batch":
        idx = np.flatnonzero(mask)
        return Batch(self.grades, self.gidx[idx], {k: np.asarray(v)[idx] for k, v in self.comp.items()},
                     {k: np.asarray(v)[idx] for k, v in self.params.items()},
                     self.diameter_mm[idx], self.thickness_mm[idx])

    @classmethod
    def single(cls, grade: Grade, comp: Mapping[str, float], params: Mapping,
               diameter_mm: float | None, thickness_mm: float | None) -> "Batch":
        return cls([grade], np.zeros(1, int), {k: np.array([v], float) for k, v in comp.items()},
                   {k: np.array([v], dtype=object if isinstance(v, str) else float) for k, v in params.items()},
                   np.array([np.nan if diameter_mm is None else diameter_mm], float),
                   np.array([np.nan if thickness_mm is None else thickness_mm], float))


def tension_test_position(section_mm: np.ndarray) -> np.ndarray:
    """r/R of the tension-test location per ASTM A370: 0 (centre) up to 38 mm,
    0.5 (mid-radius) above."""
    return np.where(np.asarray(section_mm) <= A370_CENTRE_LIMIT_MM, 0.0, 0.5)


def at_position(profile: np.ndarray, positions: Sequence[float], where: np.ndarray) -> np.ndarray:
    """Interpolate a profile (n, npos) given at ``positions`` (r/R, decreasing
    from 1 to 0) at r/R = ``where`` (n,)."""
    pos = np.asarray(positions, float)
    order = np.argsort(pos)
    pos = pos[order]
    prof = np.asarray(profile)
    w = np.asarray(where, float)
    j = np.clip(np.searchsorted(pos, w) - 1, 0, len(pos) - 2)
    t = (w - pos[j]) / (pos[j + 1] - pos[j])
    rows = np.arange(prof.shape[0])
    # the two neighbouring columns read in place (no reordered copy of the profile)
    return prof[rows, order[j]] * (1 - t) + prof[rows, order[j + 1]] * t


#: fixed odd multipliers of the row hash of :func:`distinct_rows` (any fixed values do: every
#: grouping is checked against the rows themselves)
_ROW_HASH = np.random.default_rng(20261203).integers(1, 2**63, size=64, dtype=np.uint64) | np.uint64(1)


def distinct_rows(rows: np.ndarray) -> tuple:
    """``(first, inverse)`` of the distinct rows of a 2-D int64 array: the row number of each
    distinct row's first appearance, and each row's distinct row (``rows[first][inverse]``
    equals ``rows``).  Rows are grouped by a 64-bit hash of their values (hashing, not sorting
    the rows) and the grouping is checked against the rows; on a hash collision, by sorting.

    >>> distinct_rows(np.array([[1, 2], [3, 4], [1, 2]]))[1].tolist()
    [0, 1, 0]
    """
    rows = np.ascontiguousarray(rows, np.int64)
    k = rows.shape[1]
    if 0 < k <= len(_ROW_HASH):
        with np.errstate(over="ignore"):
            h = (rows.view(np.uint64) * _ROW_HASH[:k]).sum(axis=1, dtype=np.uint64)
        inv, _ = pd.factorize(h)
        inv = np.asarray(inv, np.int64)
        first = np.unique(inv, return_index=True)[1]
        if np.array_equal(rows[first][inv], rows):
            return first, inv
    _, first, inv = np.unique(rows.view(np.dtype((np.void, rows.dtype.itemsize * k))).ravel(),
                              return_index=True, return_inverse=True)
    order = np.argsort(first, kind="stable")          # in order of first appearance
    rank = np.empty(len(order), np.int64)
    rank[order] = np.arange(len(order))
    return first[order], rank[inv.reshape(-1)]


class RouteFamily:
    """Base class; subclasses set the class attributes and implement the methods."""

    name: str = ""
    label: str = ""
    #: accepted sequences of ops
    patterns: tuple = ()
    #: the parameter reported as the process window in selection (or None)
    main_parameter: str | None = None
    #: names of all parameters (columns of the states table)
    parameters: tuple = ()
    #: citations of the models this family uses
    references: tuple = ()
    #: grade families this route is modelled for (others raise NotModelledError)
    families: tuple = ()
    #: every input of every model the family calls (:class:`selector.routes.model_inputs.ModelInput`,
    #: built with ``model_inputs.uses``); ``routes.evaluate.finish`` checks each against the
    #: range registered in :mod:`selector.models.validity` and adds a visible warning
    model_inputs: tuple = ()

    def parse(self, steps: Sequence[Mapping], grade: Grade) -> tuple[dict, list[str]]:
        raise NotImplementedError

    def to_steps(self, params: Mapping) -> list[dict]:
        raise NotImplementedError

    def grid(self, grade: Grade) -> dict[str, np.ndarray]:
        raise NotImplementedError

    def compute(self, batch: Batch) -> dict:
        raise NotImplementedError

    # helpers shared by families -------------------------------------------------
    def require_family(self, grade: Grade) -> None:
        """:class:`RouteError` unless the route is modelled for the grade's family."""
        if self.families and grade.family not in self.families:
            raise RouteError("route", self.label, f"grade families {', '.join(self.families)} "
                             f"({grade.id} is {grade.family})")

    @staticmethod
    def window_value(grade: Grade, route: str, parameter: str, given, fallback=None):
        """``given`` if not None, else the window default, else ``fallback``."""
        if given is not None:
            return given
        w = grade.window(route, parameter)
        if w is not None and w.default == w.default:
            return w.default
        if w is not None and w.values:
            return w.values[0]
        if fallback is None:
            raise RouteError(parameter, None, f"a value (grade {grade.id} has no default for {route})")
        return fallback

    @staticmethod
    def window_float(grade: Grade, route: str, parameter: str, fallback: float) -> float:
        """The window default of a numeric parameter as a float, else ``fallback``."""
        return float(RouteFamily.window_value(grade, route, parameter, None, fallback))

    @staticmethod
    def window_warnings(grade: Grade, route: str, params: Mapping) -> list[str]:
        """Warnings for parameters outside the grade's usual process window."""
        out = []
        for name, v in params.items():
            w = grade.window(route, name)
            if w is None:
                continue
            if isinstance(v, str):
                if w.values and v not in w.values:
                    out.append(f"{name} = {v!r} is not a usual choice for {grade.id} "
                               f"(usual: {', '.join(w.values)}; {w.source})")
            elif v is not None and v == v:
                lo, hi = w.min, w.max
                bands = RouteFamily.bands(grade, route, name)
                if bands and not any(a - 1e-9 <= v <= b + 1e-9 for a, b in bands):
                    txt = ", ".join(f"{a:g}–{b:g}" for a, b in bands)
                    out.append(f"{name} = {v:g} {w.unit} is outside the usual window {txt} {w.unit} "
                               f"for {grade.id} ({w.source}); the estimate is extrapolated")
                elif not bands and ((lo == lo and v < lo) or (hi == hi and v > hi)):
                    out.append(f"{name} = {v:g} {w.unit} is outside the usual window {lo:g}–{hi:g} {w.unit} "
                               f"for {grade.id} ({w.source}); the estimate is extrapolated")
        return out

    @staticmethod
    def span(grade: Grade, route: str, parameter: str, n: int, fallback: tuple | None = None) -> np.ndarray:
        """``n`` evenly spaced values across the window of ``parameter``."""
        w = grade.window(route, parameter)
        if w is None or not (w.min == w.min and w.max == w.max):
            if fallback is None:
                return np.array([RouteFamily.window_value(grade, route, parameter, None)], float)
            lo, hi = fallback
        else:
            lo, hi = w.min, w.max
        return np.linspace(lo, hi, n) if hi > lo else np.array([lo], float)

    @staticmethod
    def bands(grade: Grade, route: str, parameter: str, fallback: tuple | None = None) -> list:
        """Allowed ``(lo, hi)`` bands of a numeric parameter: the window's ``values``
        when they are written as ranges (``"150-370;540-650"``) or numbers, else
        ``[(min, max)]``."""
        w = grade.window(route, parameter)
        if w is not None and w.values:
            out = []
            for v in w.values:
                a, sep, b = v.partition("-")
                try:
                    lo = float(a)
                    hi = float(b) if sep else lo
                except ValueError:
                    out = []
                    break
                out.append((lo, hi))
            if out:
                return out
        if w is not None and w.min == w.min and w.max == w.max:
            return [(w.min, w.max)]
        return [fallback] if fallback else []

    @staticmethod
    def choices(grade: Grade, route: str, parameter: str, fallback: Sequence[str]) -> tuple:
        w = grade.window(route, parameter)
        return tuple(w.values) if w is not None and w.values else tuple(fallback)


def harden_step(quench, agitation, austenitize_c) -> dict:
    """A ``harden`` step as every family writes it back (:meth:`RouteFamily.to_steps`):
    the agitation only where it is not the default ``moderate``."""
    step = {"op": "harden", "quench": str(quench)}
    if str(agitation) != "moderate":
        step["agitation"] = str(agitation)
    step["austenitize_c"] = float(austenitize_c)
    return step


def temper_steps(temp_c, hours) -> list[dict]:
    """``[{"op": "temper", ...}]``, or ``[]`` where ``temp_c`` is NaN (no temper)."""
    if not np.isfinite(float(temp_c)):
        return []
    return [{"op": "temper", "temp_c": float(temp_c), "hours": float(hours)}]


def product_grid(**axes) -> dict[str, np.ndarray]:
    """Cartesian product of 1-D axes as flat arrays (object dtype kept for text)."""
    names = list(axes)
    arrays = [np.asarray(a) for a in axes.values()]
    idx = np.meshgrid(*[np.arange(len(a)) for a in arrays], indexing="ij")
    return {n: a[i.ravel()] for n, a, i in zip(names, arrays, idx)}
