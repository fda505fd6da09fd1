"""Indicative cost: grade price per kg plus route adders, the part's mass, and the
user's price sheet.

Prices are *relative* (1018 cold-drawn bar = 1.0 per kg) and indicative only; a
price sheet loaded by the user overrides the catalogue's values.  A route's adder
may depend on the grade's family (``families`` column of ``data/route_costs.csv``:
the in-house cold work of steel bar is costed as a small-lot drawing operation, the
cold tempers of copper and aluminium as a mill temper premium); see docs/cost.md.
"""
from __future__ import annotations

import functools
import math

import numpy as np
import pandas as pd

from .. import inputs
from ..catalogue.grades import FAMILIES, default_catalogue
from ..catalogue.loader import CONFIDENCE, Column, Schema, parse_text, decode_bytes, read_table
from ..errors import DataFileError, InputError


def _check_cost_families(row):
    bad = [f for f in str(row.get("families") or "").split(";") if f.strip() and f.strip() not in FAMILIES]
    if bad:
        return ("families", f"{bad[0]!r} is not a grade family; allowed: {', '.join(FAMILIES)}")
    return None


ROUTE_COST_SCHEMA = Schema((Column("route"), Column("families", required=False, allow_blank=True),
                            Column("adder_per_kg", "float", lo=0, hi=1000),
                            Column("source"), Column("confidence", "choice", choices=CONFIDENCE)),
                           row_check=_check_cost_families)

#: a user's price sheet: grade (any designation) and relative price per kg
PRICE_SHEET_SCHEMA = Schema((Column("grade"), Column("relative_price", "float", lo=0.001, hi=1e5),
                             Column("source", required=False, allow_blank=True)))


@functools.cache
def _route_cost_rows() -> tuple:
    t = read_table("route_costs.csv", ROUTE_COST_SCHEMA)
    fams = t["families"].fillna("") if "families" in t else [""] * len(t)
    return tuple((r, tuple(f.strip() for f in str(fs).split(";") if f.strip()), float(a))
                 for r, fs, a in zip(t["route"], fams, t["adder_per_kg"]))


@functools.cache
def route_adders() -> dict:
    """``{route: adder per kg}``: the adder of each route for a family not named on a row of its own."""
    return {r: a for r, fams, a in _route_cost_rows() if not fams}


@functools.cache
def family_adders() -> dict:
    """``{(route, family): adder per kg}`` of the rows that name grade families."""
    return {(r, f): a for r, fams, a in _route_cost_rows() for f in fams}


def parse_price_sheet(data: bytes | str, name: str = "price sheet") -> dict:
    """Validate a user's price sheet and return ``{grade id: relative price}``.

    The CSV needs the columns ``grade`` and ``relative_price`` (per kg, on the same
    relative scale as the catalogue or any consistent currency: only ratios matter
    for ranking).  A bad file raises :class:`DataFileError` naming the line and
    column; nothing is applied.
    """
    text = decode_bytes(data, name) if isinstance(data, (bytes, bytearray)) else data
    df = parse_text(text, name, PRICE_SHEET_SCHEMA)
    cat = default_catalogue()
    out = {}
    for r in df.itertuples(index=False):
        try:
            g = cat.lookup(r.grade)
        except LookupError as exc:
            raise DataFileError(name, r.line, "grade", str(exc)) from None
        if g.id in out:
            raise DataFileError(name, r.line, "grade", f"{g.id} is priced twice")
        out[g.id] = float(r.relative_price)
    if not out:
        raise DataFileError(name, None, None, "has no price rows")
    return out


#: the range of a relative price per kg, in a price sheet file or dict (the schema's range)
PRICE_RANGE = (0.001, 1e5)
#: most rows a price sheet may hold
MAX_PRICE_ROWS = 10_000


def check_price_sheet(price_sheet, field: str = "price_sheet") -> dict | None:
    """Validate a price sheet given as a dict and return ``{catalogue id: price}``
    (``None`` for ``None`` or ``{}``).

    Keys are any designation of a catalogue grade (``"AISI 4140"``, ``"42CrMo4"``)
    and are resolved to the catalogue id; values are relative prices per kg in
    :data:`PRICE_RANGE` (finite, positive).  A key that is no grade, a grade priced
    twice under two names, or a bad price is an :class:`InputError` naming it.
    """
    if price_sheet is None:
        return None
    from collections.abc import Mapping

    if not isinstance(price_sheet, Mapping):
        raise InputError(field, price_sheet, "a mapping {grade: relative price per kg}, e.g. {'4140': 1.6}")
    items = list(price_sheet.items())
    if len(items) > MAX_PRICE_ROWS:
        raise InputError(field, f"{len(items)} entries", f"at most {MAX_PRICE_ROWS} grades")
    cat = default_catalogue()
    out: dict = {}
    lo, hi = PRICE_RANGE
    for key, value in items:
        try:
            g = cat.lookup(key)
        except LookupError as exc:
            raise InputError(f"{field} grade", key, f"a catalogue grade ({exc})") from None
        if g.id in out:
            raise InputError(f"{field} grade", key, f"each grade once ({g.id} is already priced)")
        out[g.id] = inputs.number(f"{field}[{g.id}]", value, lo, hi, unit="relative price per kg")
    return out or None


def part_mass_kg(density_g_cm3, diameter_mm=None, thickness_mm=None, length_mm=100.0, width_mm=None):
    """Mass of a round bar (diameter × length) or a plate (thickness × width × length), kg."""
    dens = np.asarray(density_g_cm3, float) * 1e-6  # kg/mm^3
    if thickness_mm is not None:
        w = width_mm if width_mm is not None else thickness_mm
        return dens * thickness_mm * w * length_mm
    return dens * math.pi / 4 * diameter_mm ** 2 * length_mm


def relative_cost_per_kg(price_per_kg: np.ndarray, routes: np.ndarray, families: np.ndarray | None = None
                         ) -> np.ndarray:
    """Relative cost per kg: the price per kg plus the adder of the route (of the route and the
    grade's family where ``data/route_costs.csv`` names it)."""
    rcodes, runiq = pd.factorize(np.asarray(routes, dtype=object))     # a few routes, many states
    if families is None:
        return _relative_cost(price_per_kg, rcodes, runiq, None, None, routes)
    fcodes, funiq = pd.factorize(np.asarray(families, dtype=object))
    return _relative_cost(price_per_kg, rcodes, runiq, fcodes, funiq, routes)


def relative_cost_from_codes(price_per_kg: np.ndarray, route_codes, routes, family_codes, families) -> np.ndarray:
    """:func:`relative_cost_per_kg` of states given as codes into their distinct routes and
    families (``routes[route_codes]``, ``families[family_codes]``; no code -1): the adder
    looked up once per distinct pair, the same numbers."""
    rcodes, fcodes = np.asarray(route_codes, np.int64), np.asarray(family_codes, np.int64)
    if (len(rcodes) and rcodes.min() < 0) or (len(fcodes) and fcodes.min() < 0):
        raise ValueError("route and family codes: no missing value (-1)")
    return _relative_cost(price_per_kg, rcodes, list(routes), fcodes, list(families),
                          lambda: np.asarray(list(routes), dtype=object)[rcodes])


def _relative_cost(price_per_kg, rcodes, runiq, fcodes, funiq, routes) -> np.ndarray:
    """The adders of :func:`relative_cost_per_kg` over codes (``routes``: the routes per state,
    or a function returning them, read only to name a route without an adder)."""
    add = route_adders()
    if fcodes is None:
        adders = np.array([add.get(r, np.nan) for r in runiq], float)[rcodes]
    else:
        fam = family_adders()
        table = np.array([[fam.get((r, f), add.get(r, np.nan)) for f in funiq] for r in runiq], float)
        adders = table.reshape(len(runiq), len(funiq))[rcodes, fcodes]
    if np.isnan(adders).any():
        routes = routes() if callable(routes) else routes
        missing = sorted({r for r, a in zip(np.asarray(routes, dtype=object), adders) if a != a})
        raise InputError("route", missing[0], f"a route with a cost adder in data/route_costs.csv ({', '.join(add)})")
    return np.asarray(price_per_kg, float) + adders
