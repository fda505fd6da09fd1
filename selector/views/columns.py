"""Readable columns of a candidates table: plain names with units, rounded to the
precision the models carry, the route in words.  Used by the command line (table,
``--format csv/json``) and the page; documented in ``docs/columns.md``.

:func:`default_view` gives the default columns (:func:`default_headers`);
:func:`all_columns_view` adds every other column of the library's table after them
(internal names, full precision, converted to the chosen units by
:func:`selector.views.units.convert_frame`).  Nothing is recomputed: each readable
column is one of the library's columns converted, rounded or put in words.

Precision shown (why these steps):

* strengths to **5 MPa / 1 ksi**: the steps to which mill test reports and ASTM A370
  round tensile and yield results (ASTM A370, rounding of test results, from memory);
  the models are further off than that (Q&T estimates about 7 % low on independent rows,
  docs/validation.md), so a finer figure would only be noise;
* elongation to **0.5 %** (ASTM E8/E8M reporting of elongation, from memory); the band of
  the model is several points wide;
* hardness to **1 HRC, 5 HB, 5 HV**: a Rockwell C number is read to whole points in
  acceptance tests (ASTM E18, from memory) and one HRC is 10–15 HV in the middle of the
  E140 table (E140 Table 1); HB and HV steps of 5 are about a third of an HRC point;
* case depth to **0.05 mm / 0.002 in**: the step of a depth read on a microhardness
  traverse (ISO 2639 / SAE J423 traverses at 0.05–0.1 mm spacing, from memory);
* part cost to **3 significant figures** (the catalogue's relative prices carry two);
* p_meet to **1 %**: a proportion of 200 Monte Carlo draws, standard error up to 3.5 %
  (:mod:`selector.states.scatter`);
* temperatures in routes and windows to **5 °C / 10 °F** (furnace set points, common
  practice), times and depths to 2 significant figures (:mod:`selector.routes.describe`).

A zero case depth reads ``through-hardened`` (a hardening route without a case) or
``no case`` (annealed, normalized, cold worked, bought as rolled), from
:func:`selector.routes.describe.case_words`.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np
import pandas as pd

from ..routes.describe import case_words, parameter_words
from ..routes.evaluate import scale_hardness
from ..rules.cautions import CAUTIONS
from .units import QUANTITIES, SI, US, check_system, convert_frame, hardness_scale, quantity_of, round_to, \
    route_words, significant, to_display, unit, value_text

#: the 90 % band of the estimate (selector.routes.bands)
BAND_LEVEL = "90 %"

#: rounding step of each shown quantity: (quantity or scale, system) -> step
STEPS = {("stress", SI): 5.0, ("stress", US): 1.0,
         ("length", SI): 0.05, ("length", US): 0.002,
         "elongation": 0.5, "HRC": 1.0, "HB": 5.0, "HV": 5.0, "p_meet": 1.0}

#: column of the library's table for each hardness scale: (at the test location, at the surface)
HARDNESS_SOURCE = {"HRC": ("hardness_hrc", "surface_hardness_hrc"), "HB": ("hardness_hb", None),
                   "HV": ("hardness_hv", "surface_hardness_hv")}


@dataclass(frozen=True)
class View:
    """The display settings of a table: unit system and hardness scale."""

    system: str = SI
    hardness: str = "HRC"

    @classmethod
    def of(cls, system: str = SI, hardness: str | None = None) -> "View":
        return cls(check_system(system), hardness_scale(system, hardness))

    def stress(self) -> str:
        return unit("stress", self.system)

    def length(self) -> str:
        return unit("length", self.system)


def _band_text(lo, hi, fmt: Callable[[float], str]) -> list[str]:
    """``"905–1030"``; blank where the band is unknown or has no width (a standard's minimum
    or a catalogue value carries no model band)."""
    return ["" if (a != a or b != b) else f"{fmt(a)}–{fmt(b)}" for a, b in zip(lo, hi)]


def _num_text(v: float) -> str:
    return f"{v:.6g}"


def _col(df: pd.DataFrame, name: str) -> np.ndarray | None:
    return df[name].to_numpy(float) if name in df else None


def _stress(df, name, view):
    v = _col(df, name)
    if v is None:
        return None
    return round_to(to_display(v, "stress", view.system), STEPS[("stress", view.system)])


def _band(df, name, convert, step):
    lo, hi = _col(df, name + "_lo"), _col(df, name + "_hi")
    if lo is None or hi is None:
        return None
    lo = np.where(lo == hi, np.nan, lo)
    return _band_text(round_to(convert(lo), step), round_to(convert(hi), step), _num_text)


def _hardness(df, view, surface=False):
    at, at_surface = HARDNESS_SOURCE[view.hardness]
    name = at_surface if surface else at
    if surface and name is None:          # surface HB: the E140 table from the surface HV
        if "surface_hardness_hv" not in df or "family" not in df:
            return None
        vals = scale_hardness(df["surface_hardness_hv"].to_numpy(float), df["family"].to_numpy())["hb"]
    else:
        vals = _col(df, name)
        if vals is None:
            return None
    return round_to(vals, STEPS[view.hardness])


def _routes(df) -> list | None:
    if "route" in df and len(df) and isinstance(df["route"].iloc[0], (list, tuple)):
        return list(df["route"])
    return None


def _route_text(df, view):
    routes = _routes(df)
    if routes is not None:
        return [route_words(r, view.system) if isinstance(r, (list, tuple)) else "" for r in routes]
    return list(df["route_text"]) if "route_text" in df else None


def _case_depth(df, view):
    v = _col(df, "case_depth_mm")
    if v is None:
        return None
    shown = round_to(to_display(v, "length", view.system), STEPS[("length", view.system)])
    routes = _routes(df)
    out = []
    for i, d in enumerate(shown):
        if d == d and d > 0:
            out.append(float(d))
            continue
        words = case_words(routes[i]) if routes is not None and isinstance(routes[i], (list, tuple)) else None
        out.append(words or ("no case" if d == 0 else ""))
    return out


def _window_one(param, family, lo, hi, subs, flo, fhi, system) -> str:
    if not param:
        return ""
    words, si_unit = parameter_words(param, family)

    def val(v):
        return value_text(v, si_unit, system)

    def rng(a, b):
        return val(a) if b <= a else f"{val(a).rsplit(' ', 1)[0]}–{val(b)}" if si_unit else f"{val(a)}–{val(b)}"

    if lo != lo:
        if flo != flo:
            return ""
        return f"none clear of avoid cautions (targets met at {words} {rng(flo, fhi)})"
    text = f"{words} {rng(lo, hi)}" + (" only" if hi <= lo else "")
    others = []
    for part in str(subs or "").split("; "):
        nums = part.split("–")
        try:
            a, b = float(nums[0]), float(nums[-1])
        except ValueError:
            continue
        if abs(a - lo) < 1e-9 and abs(b - hi) < 1e-9:
            continue
        others.append(rng(a, b))
    if others:
        text += f" (also {', '.join(others)})"
    return text


def _window(df, view):
    if "window_parameter" not in df or "window_min" not in df:
        return list(df["window"]) if "window" in df else None
    n = len(df)

    def get(c):
        return df[c].to_numpy(float) if c in df else np.full(n, np.nan)

    subs = df["sub_windows"].tolist() if "sub_windows" in df else [""] * n
    fams = df["route_family"].tolist() if "route_family" in df else [None] * n
    return [_window_one(p, f, a, b, s, fa, fb, view.system) for p, f, a, b, s, fa, fb in
            zip(df["window_parameter"].astype(str), fams, get("window_min"), get("window_max"), subs,
                get("feasible_min"), get("feasible_max"))]


def _avoid(df, view):
    if "avoid" not in df:
        return None
    return ["; ".join(CAUTIONS[c].title if c in CAUTIONS else c for c in str(v).split(";") if c)
            for v in df["avoid"].fillna("")]


@dataclass(frozen=True)
class Readable:
    """One readable column: its header in a view, what it shows, and how it is built."""

    header: Callable[[View], str]
    description: str
    build: Callable[[pd.DataFrame, View], object]


def _stress_col(name, label, what):
    return Readable(lambda v: f"{label} ({v.stress()})", f"{what}, rounded to 5 MPa / 1 ksi (``{name}``)",
                    lambda df, v: _stress(df, name, v))


def _stress_band(name, label):
    return Readable(lambda v: f"{label} {BAND_LEVEL} band ({v.stress()})",
                    f"the range that held 90 % of independent published values for similar states "
                    f"(``{name}_lo``–``{name}_hi``, selector.routes.bands)",
                    lambda df, v: _band(df, name, lambda x: to_display(x, "stress", v.system),
                                        STEPS[("stress", v.system)]))


#: the default readable columns, in order
READABLE: Sequence[Readable] = (
    Readable(lambda v: "rank", "rank order of ``select`` (avoid cautions last)",
             lambda df, v: df["rank"].tolist() if "rank" in df else None),
    Readable(lambda v: "grade", "catalogue grade id", lambda df, v: df["grade"].tolist() if "grade" in df else None),
    Readable(lambda v: "process route", "the route in words, temperatures and depths in the chosen units "
             "(selector.routes.describe)", _route_text),
    _stress_col("yield_mpa", "yield", "yield strength (0.2 % offset) at the ASTM A370 tension-test location"),
    _stress_band("yield_mpa", "yield"),
    _stress_col("uts_mpa", "tensile", "tensile strength at the ASTM A370 tension-test location"),
    _stress_band("uts_mpa", "tensile"),
    Readable(lambda v: "elongation (%)", "elongation at fracture, rounded to 0.5 % (``elongation_pct``)",
             lambda df, v: None if "elongation_pct" not in df
             else round_to(df["elongation_pct"].to_numpy(float), STEPS["elongation"])),
    Readable(lambda v: f"elongation {BAND_LEVEL} band (%)", "90 % band of the elongation",
             lambda df, v: _band(df, "elongation_pct", lambda x: x, STEPS["elongation"])),
    Readable(lambda v: f"hardness ({v.hardness})", "hardness at the tension-test location in the view's scale "
             "(HRC and HB from the ASTM E140 steel table, blank for other metals and off the scale)",
             lambda df, v: _hardness(df, v)),
    Readable(lambda v: f"hardness {BAND_LEVEL} band ({v.hardness})", "90 % band of the hardness",
             lambda df, v: _band(df, HARDNESS_SOURCE[v.hardness][0], lambda x: x, STEPS[v.hardness])),
    Readable(lambda v: f"surface hardness ({v.hardness})", "hardness at the surface (the case of a case-hardened "
             "part)", lambda df, v: _hardness(df, v, surface=True)),
    Readable(lambda v: f"case depth ({v.length()})", "effective case depth rounded to 0.05 mm / 0.002 in; "
             "'through-hardened' or 'no case' where the route makes no case", _case_depth),
    Readable(lambda v: "part cost (relative)", "cost of the part in the catalogue's relative money (1 = the "
             "price of 1 kg of 1018 bar; the same number in both unit systems), 3 significant figures "
             "(``part_cost``, after any price sheet)",
             lambda df, v: None if "part_cost" not in df
             else [significant(x, 3) for x in df["part_cost"].to_numpy(float)]),
    Readable(lambda v: "p_meet (%)", "probability that a heat within the specification meets every target, "
             "counting the model's 90 % band, in whole per cent (``p_meet``)",
             lambda df, v: None if "p_meet" not in df
             else round_to(100.0 * df["p_meet"].to_numpy(float), STEPS["p_meet"])),
    Readable(lambda v: "process window", "the range of the route's main parameter over which the targets are "
             "met (chosen units)", _window),
    Readable(lambda v: "avoid cautions", "caution rules of severity 'avoid' that apply (such candidates come "
             "last; the rule codes are in the ``avoid`` column of all columns)", _avoid),
)


def default_headers(system: str = SI, hardness: str | None = None) -> list[str]:
    """The headers of the default view, in order (``["rank", "grade", "process route",
    "yield (MPa)", ...]``)."""
    view = View.of(system, hardness)
    return [c.header(view) for c in READABLE]


def column_descriptions(system: str = SI, hardness: str | None = None) -> dict[str, str]:
    """Header -> what the column shows (for ``docs/columns.md`` and tooltips)."""
    view = View.of(system, hardness)
    return {c.header(view): c.description for c in READABLE}


#: words of an internal name's parts in a header (``uts`` reads "tensile")
NAME_WORDS = {"uts": "tensile", "hrc": "(HRC)", "hv": "(HV)", "hb": "(HB)", "pct": "(%)"}


def readable_name(name: str, system: str = SI) -> str:
    """A plain header for an internal column outside the default set: ``move_min_yield_mpa``
    -> ``"move min yield (MPa)"`` (``"(ksi)"`` in US units), ``diameter_mm`` -> ``"diameter (mm)"``,
    ``saving_per_kg`` -> ``"saving (per kg)"``, ``miss_score`` -> ``"miss score"``."""
    q = quantity_of(name)
    stem = name
    tail = ""
    if q is not None:
        suffix = QUANTITIES[q].si_suffix
        stem = name[: -len(suffix)] if name.endswith(suffix) else name.rsplit("_", 1)[0]
        tail = f" ({unit(q, system)})"
    words = [NAME_WORDS.get(w, w) for w in stem.split("_") if w]
    return " ".join(words) + tail


def _extra(df: pd.DataFrame, names: Sequence[str], view: View) -> dict:
    out = {}
    for name in names:
        if name not in df:
            continue
        col = df[name]
        q = quantity_of(name)
        if pd.api.types.is_numeric_dtype(col) and not pd.api.types.is_bool_dtype(col):
            vals = col.to_numpy(float)
            if q is not None:
                vals = to_display(vals, q, view.system)
            col = [significant(x, 4) for x in vals]
        else:
            col = col.tolist()
        out[readable_name(name, view.system)] = col
    return out


def default_view(df: pd.DataFrame, system: str = SI, hardness: str | None = None, lead: Sequence[str] = (),
                 extra: Sequence[str] = ()) -> pd.DataFrame:
    """The readable default columns of a candidates table (``select``, ``alternatives``,
    nearest misses, a sweep): plain headers with units, rounded, the route in words.
    A column whose source is absent from ``df`` is left out.

    Parameters
    ----------
    df : DataFrame
        A table of the library (SI, internal column names).
    system : str
        :data:`selector.views.units.SI` or ``US``.
    hardness : str, optional
        ``"HRC"``, ``"HB"`` or ``"HV"``; default the system's
        (:func:`selector.views.units.hardness_scale`).
    lead, extra : sequence of str
        Internal columns of a particular table to show before / after the default ones
        (a sweep's ``diameter_mm``, the nearest misses' ``move_*``), with headers from
        :func:`readable_name`, converted to ``system`` and rounded to 4 significant figures.

    Returns
    -------
    DataFrame
        Same rows and index, columns :func:`default_headers` present in ``df`` (with
        ``lead`` before and ``extra`` after).
    """
    view = View.of(system, hardness)
    cols = dict(_extra(df, lead, view))
    for c in READABLE:
        vals = c.build(df, view)
        if vals is not None:
            cols[c.header(view)] = list(vals)
    cols.update(_extra(df, [e for e in extra if e not in lead], view))
    out = pd.DataFrame(cols, index=df.index)
    return out


def all_columns_view(df: pd.DataFrame, system: str = SI, hardness: str | None = None, lead: Sequence[str] = (),
                     extra: Sequence[str] = ()) -> pd.DataFrame:
    """:func:`default_view` followed by every other column of ``df`` (internal names,
    full precision, in ``system``'s units and renamed there: ``yield_ksi``).  ``route``
    stays the list of steps in SI, as ``evaluate`` and ``--route-json`` take it."""
    head = default_view(df, system, hardness, lead, extra)
    rest = convert_frame(df.drop(columns=[c for c in df.columns if c in head.columns]), system)
    return pd.concat([head, rest], axis=1)
