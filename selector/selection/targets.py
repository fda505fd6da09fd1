"""Design targets: validation, the pass/fail test, margins and shortfalls.

A *target* dict holds any of :data:`TARGET_KEYS`.  Numeric targets are one-sided
limits on a column of the states frame (``min_<x>``: value >= limit, ``max_<x>``:
value <= limit, both inclusive).  ``families``, ``exclude_families`` and
``corrosion_resistant`` are *hard filters*: they cannot be relaxed by moving a
number, so :func:`shortfalls` reports them as pass/fail (``fails_<key>``), never as a
distance.

Missing values (NaN) in the states frame
----------------------------------------
* ``hardness_hrc`` NaN means the hardness is below the Rockwell C scale (softer than
  about 20 HRC, where the C scale is not used; ASTM E18 scope, common practice): it
  **fails** a ``min_hardness_hrc`` and **passes** a ``max_hardness_hrc``.
* ``surface_hardness_hrc`` NaN (no hardened case, or below the scale) fails a
  ``min_surface_hardness_hrc``.
* any other NaN (unknown value) fails every target on that column.

Margins and shortfalls keep the same rule with infinities: a failing NaN gives a
margin of ``-inf`` (shortfall ``+inf``), a passing NaN a margin of ``+inf``
(shortfall 0).  So for every numeric target, ``margin >= 0`` exactly when
:func:`meets` passes it, and no NaN appears in either frame.

Ranking of near misses (``miss_score``)
---------------------------------------
``miss_score = Σ_i move_i / |target_i|``, the sum over the numeric targets of the
distance each limit would have to move, relative to the limit (a limit of 0 that
must move gives ``+inf``); ``+inf`` too when a hard filter fails.  ``miss_score == 0``
exactly when the row meets every target.  A simple relative (scale-free) L1
distance, chosen here; see ``docs/methods/selection.md``.
"""
from __future__ import annotations

import os
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from .. import inputs
from ..catalogue.grades import FAMILIES
from ..errors import DataFileError, InputError, check_choice, check_number

__all__ = ["TARGET_KEYS", "NUMERIC_TARGETS", "HARD_FILTERS", "validate_targets", "targets_from_toml",
           "meets", "margins", "shortfalls"]

#: numeric target -> (frame column, "min" | "max")
NUMERIC_TARGETS: Mapping[str, tuple[str, str]] = {
    "min_yield_mpa": ("yield_mpa", "min"),
    "max_yield_mpa": ("yield_mpa", "max"),
    "min_uts_mpa": ("uts_mpa", "min"),
    "max_uts_mpa": ("uts_mpa", "max"),
    "min_elongation_pct": ("elongation_pct", "min"),
    "min_hardness_hrc": ("hardness_hrc", "min"),
    "max_hardness_hrc": ("hardness_hrc", "max"),
    "min_surface_hardness_hrc": ("surface_hardness_hrc", "min"),
    "min_case_depth_mm": ("case_depth_mm", "min"),
    "max_relative_cost": ("relative_cost", "max"),
    # fully reversed fatigue limit at the section (selector.routes.fatigue); select() adds the column
    "min_fatigue_mpa": ("fatigue_limit_mpa", "min"),
}
#: hard (not relaxable) filters -> frame column
HARD_FILTERS: Mapping[str, str] = {
    "families": "family",
    "exclude_families": "family",
    "corrosion_resistant": "corrosion_resistant",
}
TARGET_KEYS: tuple[str, ...] = tuple(NUMERIC_TARGETS) + tuple(HARD_FILTERS)

# (min key, max key): a min above its max can never be met.  Yield above tensile
# strength is impossible by definition (UTS is the highest engineering stress of
# the test, ASTM E8/E8M terminology), so min_yield > max_uts is a contradiction too.
_PAIRS = (("min_yield_mpa", "max_yield_mpa"), ("min_uts_mpa", "max_uts_mpa"),
          ("min_hardness_hrc", "max_hardness_hrc"), ("min_yield_mpa", "max_uts_mpa"))
_UNITS = {"mpa": "MPa", "pct": "%", "hrc": "HRC", "mm": "mm", "cost": "relative cost, 1018 bar = 1"}
# NaN in these columns passes a max target (below the HRC scale is softer than any limit).
_NAN_PASSES_MAX = {"hardness_hrc"}


def _family_list(key: str, value, families_known: Sequence[str] | None, context: str) -> list[str]:
    if isinstance(value, str):
        value = [value]
    if not isinstance(value, (list, tuple)) or not all(isinstance(v, str) for v in value):
        raise InputError(key, value, "a list of family names", context)
    out = list(dict.fromkeys(v.strip() for v in value))
    if families_known is not None:
        known = list(families_known)
        for name in out:
            check_choice(key, name, known, context)
    return out


def _validate(targets, families_known: Sequence[str] | None, context: str = "") -> dict:
    if targets is None:
        return {}
    if not isinstance(targets, Mapping):
        raise InputError("targets", targets, "a mapping of target keys to values "
                         f"({', '.join(TARGET_KEYS)})", context)
    out: dict = {}
    for key, value in targets.items():
        check_choice("target", key, TARGET_KEYS, context)
        if isinstance(value, np.generic):
            value = value.item()
        if key in NUMERIC_TARGETS:
            unit = _UNITS[key.rsplit("_", 1)[-1]]
            v = check_number(key, value, context=context)
            if v < 0:
                raise InputError(key, value, f"a finite number >= 0 ({unit})", context)
            out[key] = v
        elif key in ("families", "exclude_families"):
            out[key] = _family_list(key, value, families_known, context)
        else:  # corrosion_resistant
            if not isinstance(value, bool):
                raise InputError(key, value, "true or false", context)
            out[key] = value
    if out.get("families") == []:
        raise InputError("families", [], "a non-empty list of family names (omit the key for any family)",
                         context)
    for lo_key, hi_key in _PAIRS:
        if lo_key in out and hi_key in out and out[lo_key] > out[hi_key]:
            raise InputError(lo_key, out[lo_key], f"at most {hi_key}={out[hi_key]:g}", context)
    both = [f for f in out.get("families", []) if f in out.get("exclude_families", [])]
    if both:
        raise InputError("exclude_families", both, "families not also listed in families", context)
    return {k: out[k] for k in TARGET_KEYS if k in out}


def validate_targets(targets: dict | None, families_known: Sequence[str]) -> dict:
    """Check a target dict and return a clean copy.

    Parameters
    ----------
    targets : dict or None
        Keys out of :data:`TARGET_KEYS`: numeric limits in the unit of their name
        (MPa, %, HRC, mm, relative cost), ``families`` / ``exclude_families`` (lists
        of family names; a single name is accepted), ``corrosion_resistant`` (bool:
        ``True`` keeps only corrosion-resistant grades, ``False`` sets no filter).
    families_known : sequence of str
        The family names of the catalogue.

    Returns
    -------
    dict
        Numeric limits as float, family lists as de-duplicated lists of str,
        ``corrosion_resistant`` as bool, in the order of :data:`TARGET_KEYS`.
        ``None`` or ``{}`` gives ``{}``.

    Raises
    ------
    InputError
        Naming the field, the value and what is allowed: an unknown key (with the
        nearest keys), a number that is not finite, negative or not a number, a
        minimum above its maximum (yield, tensile strength, hardness, and minimum
        yield above maximum tensile strength), a family both required and
        excluded, an unknown family name (with the nearest), an empty
        ``families`` list, a non-bool ``corrosion_resistant``.
    """
    return _validate(targets, families_known)


def targets_from_toml(text_or_path, families_known: Sequence[str] | None = None) -> dict:
    """Read and validate targets from TOML: the ``[targets]`` table if there is one,
    else the top-level keys.

    Parameters
    ----------
    text_or_path : str or os.PathLike
        A path (``os.PathLike``, or a ``str`` with no ``=``, ``[`` or newline) or the
        TOML text itself.
    families_known : sequence of str, optional
        Family names to accept; default the catalogue's families
        (``selector.catalogue.grades.FAMILIES``).

    Returns
    -------
    dict
        As :func:`validate_targets`.

    Raises
    ------
    InputError
        A file that cannot be read, or a bad key or value; the message starts with
        the file name and names the key.
    DataFileError
        TOML syntax error, with the file and line.
    """
    if families_known is None:
        families_known = FAMILIES
    is_path = isinstance(text_or_path, os.PathLike) or (
        isinstance(text_or_path, str) and not any(c in text_or_path for c in "=[\n"))
    if is_path:
        where = str(text_or_path)
        try:
            data, _ = inputs.read_file_bytes(text_or_path)
            text = inputs.decode_text(data, where)
        except DataFileError as exc:
            raise InputError("targets file", where, f"a readable UTF-8 TOML file ({exc.problem})") from None
    elif isinstance(text_or_path, str):
        where = "<targets TOML text>"
        text = inputs.check_text("targets TOML text", text_or_path, max_chars=inputs.MAX_FILE_BYTES)
    else:
        raise InputError("text_or_path", text_or_path, "TOML text or a path to a TOML file")
    doc = inputs.parse_toml(text, where)     # a UTF-8 byte-order mark is accepted, as by every reader
    table = doc["targets"] if "targets" in doc else doc
    if not isinstance(table, dict):
        raise InputError("targets", table, "a [targets] table", where)
    return _validate(table, families_known, where)


# --------------------------------------------------------------------------- frame tests

def _check_keys(frame: pd.DataFrame, targets: Mapping) -> None:
    for key in targets:
        check_choice("target", key, TARGET_KEYS)
    need = {NUMERIC_TARGETS[k][0] if k in NUMERIC_TARGETS else HARD_FILTERS[k] for k in targets}
    if targets.get("corrosion_resistant") is False:
        need.discard("corrosion_resistant")
    missing = sorted(need - set(frame.columns))
    if missing:
        raise InputError("frame", ", ".join(missing),
                         "a states frame with the columns the targets use")


def _values(frame: pd.DataFrame, col: str) -> np.ndarray:
    return frame[col].to_numpy(dtype=float, na_value=np.nan)


def _margin(frame: pd.DataFrame, key: str, limit: float) -> np.ndarray:
    col, side = NUMERIC_TARGETS[key]
    v = _values(frame, col)
    m = v - limit if side == "min" else limit - v
    nan = np.isnan(v)
    if nan.any():
        m[nan] = np.inf if (side == "max" and col in _NAN_PASSES_MAX) else -np.inf
    return m


def _in_families(frame: pd.DataFrame, names: Sequence[str]) -> np.ndarray:
    fam = frame["family"]
    if isinstance(fam.dtype, pd.CategoricalDtype):   # test the few categories, not the rows
        cats = np.asarray(fam.cat.categories.isin(list(names)))
        codes = fam.cat.codes.to_numpy()
        return np.where(codes >= 0, cats[np.maximum(codes, 0)], False)
    return fam.isin(list(names)).to_numpy()


def _is_corrosion_resistant(frame: pd.DataFrame) -> np.ndarray:
    c = frame["corrosion_resistant"]
    if pd.api.types.is_bool_dtype(c.dtype):
        return c.to_numpy(dtype=bool)
    if pd.api.types.is_numeric_dtype(c.dtype):
        return c.fillna(0).to_numpy(dtype=float) != 0
    # text or mixed objects: True / "true" (any case) count as resistant
    return c.map(lambda v: v is True or v is np.True_ or str(v).strip().lower() == "true").to_numpy(bool)


def _hard(frame: pd.DataFrame, targets: Mapping, every: bool = True) -> dict[str, np.ndarray]:
    """Pass mask of each hard filter given.  With ``every=False`` an exclusion list
    disjoint from a given ``families`` list is skipped (it cannot exclude more)."""
    out = {}
    fam, excl = targets.get("families"), targets.get("exclude_families")
    if fam:
        out["families"] = _in_families(frame, fam)
    if excl and (every or not fam or not set(fam).isdisjoint(excl)):
        out["exclude_families"] = ~_in_families(frame, targets["exclude_families"])
    if targets.get("corrosion_resistant"):
        out["corrosion_resistant"] = _is_corrosion_resistant(frame)
    return out


def meets(frame: pd.DataFrame, targets: dict) -> np.ndarray:
    """Which rows of a states frame meet every target (vectorised, no row loop).

    Parameters
    ----------
    frame : pandas.DataFrame
        States, with the columns the targets use: ``yield_mpa, uts_mpa`` [MPa],
        ``elongation_pct`` [%], ``hardness_hrc, surface_hardness_hrc`` [HRC],
        ``case_depth_mm`` [mm], ``relative_cost`` [-], ``family`` (str or
        categorical), ``corrosion_resistant`` (bool).
    targets : dict
        Validated targets (:func:`validate_targets`).

    Returns
    -------
    numpy.ndarray of bool, shape (len(frame),)
        Limits are inclusive.  NaN rules as in the module docstring (NaN
        ``hardness_hrc`` fails a minimum and passes a maximum; any other NaN fails).
    """
    _check_keys(frame, targets)
    ok = np.ones(len(frame), dtype=bool)
    for key in NUMERIC_TARGETS:
        if key in targets:
            col, side = NUMERIC_TARGETS[key]
            v = _values(frame, col)
            if side == "min":
                ok &= v >= targets[key]
            elif col in _NAN_PASSES_MAX:
                ok &= ~(v > targets[key])     # NaN passes
            else:
                ok &= v <= targets[key]
    for passed in _hard(frame, targets, every=False).values():
        ok &= passed
    return ok


def margins(frame: pd.DataFrame, targets: dict) -> pd.DataFrame:
    """By how much each row meets each numeric target, in the target's unit.

    ``margin_min_<x> = value − limit``;  ``margin_max_<x> = limit − value``.

    Parameters
    ----------
    frame, targets
        As :func:`meets`.

    Returns
    -------
    pandas.DataFrame
        One column ``margin_<key>`` per numeric target given (in the order of
        :data:`TARGET_KEYS`), index of ``frame``.  Positive or zero = met by that
        much; negative = missed by that much.  A NaN value gives ``-inf`` where it
        fails and ``+inf`` where it passes (NaN ``hardness_hrc`` under a
        ``max_hardness_hrc``), so ``margin >= 0`` exactly when the target is met.
    """
    _check_keys(frame, targets)
    return pd.DataFrame({f"margin_{k}": _margin(frame, k, targets[k])
                         for k in NUMERIC_TARGETS if k in targets}, index=frame.index)


def shortfalls(frame: pd.DataFrame, targets: dict) -> pd.DataFrame:
    """How far each target would have to move for each row to qualify.

    ``move_<key> = max(0, −margin_<key>)``  (a minimum lowered, a maximum raised);
    ``miss_score = Σ move_<key> / |limit_<key>|``  over the numeric targets.

    Parameters
    ----------
    frame, targets
        As :func:`meets`.

    Returns
    -------
    pandas.DataFrame
        ``move_<key>`` per numeric target given (0 when met, ``+inf`` when the value
        is a failing NaN), ``fails_<key>`` (bool) per hard filter given
        (``families``, ``exclude_families``, ``corrosion_resistant=True``: not
        relaxable), and ``miss_score`` (relative distance, 0 exactly when the row
        meets every target; ``+inf`` when a hard filter fails or a zero limit would
        have to move).  Index of ``frame``.
    """
    _check_keys(frame, targets)
    cols: dict[str, np.ndarray] = {}
    score = np.zeros(len(frame))
    for key in NUMERIC_TARGETS:
        if key in targets:
            move = np.maximum(0.0, -_margin(frame, key, targets[key]))
            cols[f"move_{key}"] = move
            limit = abs(targets[key])
            if limit > 0:
                score += move / limit
            else:
                score += np.where(move > 0, np.inf, 0.0)
    for key, passed in _hard(frame, targets).items():
        cols[f"fails_{key}"] = ~passed
        score[~passed] = np.inf
    cols["miss_score"] = score
    return pd.DataFrame(cols, index=frame.index)
