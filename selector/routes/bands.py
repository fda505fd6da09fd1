"""Prediction bands: the 90 % range of published values around an estimate.

Every estimated property (tensile and yield strength, elongation, hardness) carries
a band ``<key>_lo``–``<key>_hi`` that should hold 90 % of published values for a
state like it.  The band is empirical: the 5th and 95th percentiles of the residuals
of the *independent* reference rows (those no fit has used; see
:mod:`selector.validation.calibration`), grouped by grade family, route family and
section band, computed offline by ``scripts/fit_bands.py`` and read here from
``data/fits/bands.csv``.

Residuals (published against predicted):

* strength and hardness: ``r = ln(published / predicted)``; the band is
  ``predicted · exp(q05) … predicted · exp(q95)`` (relative, so it scales with the
  estimate);
* elongation: ``r = published − predicted`` in percentage points; the band is
  ``max(0, predicted + q05) … predicted + q95``.

Groups with fewer than ``MIN_ROWS`` residuals borrow the next wider group: (family,
route, section band) → (family, route) → (route) → (every route); the level used is
in the table's ``level`` column.  Section bands follow the ruling-section steps of
EN 10083-3 Table 5 (16, 40, 100 mm), a usual way to group heat-treated bar by size.

Validity: the band describes the spread of handbook typical values around the
model for states like the reference rows (Q&T steels 10–150 mm, aged and cold-worked
non-ferrous tempers).  It is not a design allowable and it does not cover
specification minimums.

Reference: the empirical (distribution-free) prediction interval from residual
quantiles — e.g. Hahn & Meeker, *Statistical Intervals* (Wiley, 1991), ch. 5.
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table

FILE = "fits/bands.csv"
LEVEL = 0.90
MIN_ROWS = 20
#: ruling-section steps (EN 10083-3 Table 5): upper edges of the section bands, mm
SECTION_EDGES_MM = (16.0, 40.0, 100.0)
SECTION_BANDS = ("<=16", "16-40", "40-100", ">100")
#: property key -> residual mode
PROPERTIES = {"uts_mpa": "relative", "yield_mpa": "relative", "elongation_pct": "absolute",
              "hardness_hv": "relative"}
ANY = "*"

_SCHEMA = Schema((Column("family"), Column("route"), Column("section_band"), Column("property"),
                  Column("mode", "choice", choices=("relative", "absolute")),
                  Column("q_lo", "float"), Column("q_hi", "float"), Column("n", "int"), Column("level"),
                  Column("source"), Column("confidence")))


#: result key (1.0 / 0.0 per state) set by a family whose values are a standard's guaranteed minimum read
#: from a sourced row (a bar bought to ASTM A311 class B, A434, EN 10083 +QT at its size), not a model
#: estimate: such a state has no model band (zero width) -- the mill certificate of the bar governs
BAND_FREE = "band_free"


def section_band(section_mm) -> np.ndarray:
    """Section band label of each section (mm)."""
    s = np.asarray(section_mm, float)
    idx = np.searchsorted(np.asarray(SECTION_EDGES_MM), s, side="left")
    return np.asarray(SECTION_BANDS, dtype=object)[np.clip(idx, 0, len(SECTION_BANDS) - 1)]


@functools.cache
def _table() -> dict:
    t = read_table(FILE, _SCHEMA)
    return {(r.family, r.route, r.section_band, r.property): (r.mode, float(r.q_lo), float(r.q_hi))
            for r in t.itertuples(index=False)}


#: (families, route, section bands, property) -> (band table, q_lo, q_hi, mode) of :func:`quantiles`
#: for short arrays (the selection looks the band up once per distinct family and section)
_KEPT: dict = {}
#: longest arrays whose quantiles are kept
KEPT_MAX_ROWS = 64


def quantiles(families, route: str, section_mm, prop: str) -> tuple[np.ndarray, np.ndarray, str]:
    """(q_lo, q_hi, mode) per state for ``prop``: the most specific group of the band
    table that exists (family, route, section band → family, route → route → any)."""
    table = _table()
    fam = np.asarray(families, dtype=object)
    sb = section_band(section_mm)
    n = fam.shape[0]
    key = None
    if fam.ndim == 1 and n <= KEPT_MAX_ROWS and sb.shape == fam.shape:
        key = (tuple(fam.tolist()), route, tuple(sb.tolist()), prop)
        hit = _KEPT.get(key)
        if hit is not None and hit[0] is table:
            return hit[1].copy(), hit[2].copy(), hit[3]
    lo, hi, mode = _quantiles(table, fam, sb, route, prop)
    if key is not None:
        if len(_KEPT) >= 4096:
            _KEPT.clear()
        _KEPT[key] = (table, lo.copy(), hi.copy(), mode)
    return lo, hi, mode


def _quantiles(table, fam, sb, route, prop):
    n = fam.shape[0]
    mode = PROPERTIES[prop]
    lo, hi = np.full(n, np.nan), np.full(n, np.nan)
    for f in np.unique(fam):
        for b in np.unique(sb):
            m = (fam == f) & (sb == b)
            if not m.any():
                continue
            for key in ((f, route, b, prop), (f, route, ANY, prop), (ANY, route, ANY, prop), (ANY, ANY, ANY, prop)):
                if key in table:
                    mode, lo[m], hi[m] = table[key]
                    break
    return lo, hi, mode


def apply(value, q_lo, q_hi, mode: str) -> tuple[np.ndarray, np.ndarray]:
    """Band edges around ``value`` for residual quantiles ``q_lo``, ``q_hi``."""
    v = np.asarray(value, float)
    if mode == "relative":
        return v * np.exp(q_lo), v * np.exp(q_hi)
    return np.maximum(v + q_lo, 0.0), v + q_hi


def band_columns(res: dict, families, route: str, section_mm) -> dict:
    """``<key>_lo`` and ``<key>_hi`` for every banded property present in ``res``.

    Where ``res[BAND_FREE]`` is set (a standard's guaranteed minimum read from a
    sourced row, e.g. ``data/supply_conditions.csv``) the band has zero width: the mill
    certificate of the bar, not a model, governs what is delivered.  Typical values
    of a supply row keep the model band."""
    out = {}
    free = np.asarray(res.get(BAND_FREE, 0.0), float) > 0.5
    for prop in PROPERTIES:
        if prop not in res:
            continue
        q_lo, q_hi, mode = quantiles(families, route, section_mm, prop)
        q_lo, q_hi = np.where(free, 0.0, q_lo), np.where(free, 0.0, q_hi)
        out[prop + "_lo"], out[prop + "_hi"] = apply(res[prop], q_lo, q_hi, mode)
    return out


def source_note() -> str:
    return (f"prediction band: {LEVEL:.0%} range of independent published values around the estimate "
            "(data/fits/bands.csv, scripts/fit_bands.py; empirical residual quantiles, Hahn & Meeker 1991)")
