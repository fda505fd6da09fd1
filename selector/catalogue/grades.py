"""The grade catalogue: ``data/grades.csv``, ``data/compositions.csv`` and
``data/route_windows.csv``, validated and joined into :class:`Grade` records.
"""
from __future__ import annotations

import functools
import re
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping

import numpy as np
import pandas as pd

from ..errors import DataFileError, UnknownGradeError, nearest
from .loader import CONFIDENCE, Column, Schema, data_dir, read_file, read_table
from .supply import read_supply

FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
            "stainless_austenitic", "stainless_martensitic", "stainless_ph",
            "aluminium", "copper_alloy", "titanium",
            "tool_steel", "maraging_steel", "stainless_duplex", "nickel_alloy")
STEEL_FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
                  "stainless_martensitic", "stainless_ph", "stainless_austenitic",
                  "tool_steel", "maraging_steel", "stainless_duplex")
ROUTES = ("anneal", "normalize", "quench_temper", "carburize", "nitride", "induction",
          "cold_work", "age", "austemper", "martemper")
#: route families of bar bought in a supply condition (data/supply_conditions.csv); a grade
#: admits them from its supply rows (and its annealed baseline), not from its ``routes`` cell
SUPPLY_ROUTES = ("supply", "supply_induction", "supply_nitride")
#: routes a grade admits without listing them in grades.csv: the salt-bath (bainite) routes of a
#: hardenable carbon or low-alloy steel with at least this nominal carbon (wt %); austempering and
#: martempering apply to medium- and high-carbon steels (ASM Handbook Vol. 4 (1991), austempering and
#: martempering of steel; from memory)
BATH_ROUTES = ("austemper", "martemper")
BATH_ROUTE_FAMILIES = ("carbon_steel", "alloy_steel")
BATH_ROUTE_MIN_C = 0.30
BALANCE = {"aluminium": "Al", "copper_alloy": "Cu", "titanium": "Ti", "nickel_alloy": "Ni"}  # else Fe


def _check_grade_row(r):
    routes = [x.strip() for x in r["routes"].split(";") if x.strip()]
    bad = [x for x in routes if x not in ROUTES]
    if not routes or bad:
        return ("routes", f"{r['routes']!r} must list route families out of: {', '.join(ROUTES)}")
    if r["base_yield_mpa"] > r["base_uts_mpa"]:
        return ("base_yield_mpa", f"{r['base_yield_mpa']} is above base_uts_mpa {r['base_uts_mpa']}")
    return None


GRADES_SCHEMA = Schema((
    Column("id"), Column("name"), Column("family", "choice", choices=FAMILIES),
    Column("uns", allow_blank=True), Column("en_name", allow_blank=True),
    Column("en_number", allow_blank=True), Column("jis", allow_blank=True),
    Column("aliases", allow_blank=True), Column("standard"),
    Column("density_g_cm3", "float", lo=1.0, hi=20.0), Column("modulus_gpa", "float", lo=10, hi=450),
    Column("base_condition"),
    Column("base_uts_mpa", "float", lo=20, hi=3000), Column("base_yield_mpa", "float", lo=5, hi=3000),
    Column("base_elongation_pct", "float", lo=0, hi=90), Column("base_hardness_hb", "float", lo=5, hi=800,
                                                                allow_blank=True),
    Column("relative_price", "float", lo=0.01, hi=1000), Column("corrosion_resistant", "bool"),
    Column("austenitize_c", "float", lo=700, hi=1250, allow_blank=True), Column("routes"),
    Column("source"), Column("confidence", "choice", choices=CONFIDENCE),
    # where the baseline (base_*) properties were read and their own confidence; optional so that a user's
    # custom grade file without them stays valid (the built-in file carries them on every row)
    Column("base_source", required=False, allow_blank=True),
    Column("base_confidence", "choice", choices=CONFIDENCE, required=False, allow_blank=True),
), row_check=_check_grade_row)


def _check_comp_row(r):
    if r["min_pct"] > r["max_pct"]:
        return ("min_pct", f"{r['min_pct']} is above max_pct {r['max_pct']}")
    return None


COMPOSITION_SCHEMA = Schema((
    Column("grade"), Column("element"), Column("min_pct", "float", lo=0, hi=100),
    Column("max_pct", "float", lo=0, hi=100), Column("source"),
    Column("confidence", "choice", choices=CONFIDENCE),
), row_check=_check_comp_row)


def _check_window_row(r):
    lo, hi = r["min"], r["max"]
    if lo == lo and hi == hi and lo > hi:
        return ("min", f"{lo} is above max {hi}")
    d = r["default"]
    if d == d and ((lo == lo and d < lo) or (hi == hi and d > hi)):
        return ("default", f"{d} is outside [{lo}, {hi}]")
    if all(v != v for v in (lo, hi, d)) and not r["values"].strip():
        return ("values", "a window row needs min/max, a default or a list of values")
    if r["route"] not in ROUTES + SUPPLY_ROUTES:
        return ("route", f"{r['route']!r} is not one of: {', '.join(ROUTES + SUPPLY_ROUTES)}")
    return None


WINDOW_SCHEMA = Schema((
    Column("scope"), Column("route"), Column("parameter"),
    Column("min", "float", allow_blank=True), Column("max", "float", allow_blank=True),
    Column("default", "float", allow_blank=True), Column("values", allow_blank=True),
    Column("unit", allow_blank=True), Column("source"),
    Column("confidence", "choice", choices=CONFIDENCE),
), row_check=_check_window_row)


@dataclass(frozen=True)
class Window:
    """The process window of one route parameter for one grade."""

    parameter: str
    min: float
    max: float
    default: float
    values: tuple
    unit: str
    source: str
    confidence: str


@dataclass(frozen=True)
class Grade:
    """One catalogue grade (read-only)."""

    id: str
    name: str
    family: str
    designations: Mapping[str, str]
    aliases: tuple
    standard: str
    density_g_cm3: float
    modulus_gpa: float
    base_condition: str
    base_uts_mpa: float
    base_yield_mpa: float
    base_elongation_pct: float
    base_hardness_hb: float
    relative_price: float
    corrosion_resistant: bool
    austenitize_c: float
    routes: tuple
    comp_min: Mapping[str, float]
    comp_max: Mapping[str, float]
    windows: Mapping[str, Mapping[str, Window]]
    source: str
    confidence: str
    comp_sources: tuple = ()

    @property
    def is_steel(self) -> bool:
        return self.family in STEEL_FAMILIES

    def composition(self, corner: str = "nominal") -> dict:
        """Composition (wt %) at a corner of the specification: ``lean`` (every
        alloying element at its minimum), ``nominal`` (mid-points) or ``rich``
        (every element at its maximum).  Residuals specified by a maximum only
        (P, S) are at half the maximum in every corner, as they do not add
        strength in the models used."""
        out = {}
        for e, lo in self.comp_min.items():
            hi = self.comp_max[e]
            if lo == 0 and e in ("P", "S"):
                out[e] = 0.5 * hi
            elif corner == "lean":
                out[e] = lo
            elif corner == "rich":
                out[e] = hi
            else:
                out[e] = 0.5 * (lo + hi)
        return out

    def window(self, route: str, parameter: str) -> Window | None:
        return self.windows.get(route, {}).get(parameter)

    def __repr__(self):
        return f"Grade({self.id!r}, {self.family}, {self.name!r})"


def _norm(name: str) -> str:
    s = re.sub(r"[\s\-_./]", "", str(name).lower())
    return s


_PREFIXES = ("aisi", "sae", "uns", "astm", "type", "alloy", "grade", "aa", "en", "jis", "din")


def _keys(name: str) -> set:
    k = _norm(name)
    out = {k} if k else set()
    for p in _PREFIXES:
        if k.startswith(p) and len(k) > len(p):
            out.add(k[len(p):])
    return out


@dataclass(frozen=True)
class Catalogue:
    grades: Mapping[str, Grade]
    index: Mapping[str, tuple]

    def lookup(self, name) -> Grade:
        if isinstance(name, Grade):
            return name
        if not isinstance(name, str) or not name.strip() or len(name) > 200:
            # the value itself is shown by UnknownGradeError (truncated, never recursive)
            raise UnknownGradeError(name, list(self.grades)[:5])
        if name in self.grades:
            return self.grades[name]
        hits = set()
        for k in _keys(name):
            hits.update(self.index.get(k, ()))
        if len(hits) == 1:
            return self.grades[hits.pop()]
        if len(hits) > 1:
            raise UnknownGradeError(name, sorted(hits), ambiguous=True)
        names = []
        for g in self.grades.values():
            names += [g.id, g.name, *g.aliases, *[v for v in g.designations.values() if v]]
        raise UnknownGradeError(name, nearest(name, names, n=5))


def _windows(rows_by_scope: Mapping[str, list], grade_id: str, family: str, routes) -> dict:
    out = {}
    for scope in (family, grade_id):          # grade rows override family rows
        for r in rows_by_scope.get(scope, ()):
            vals = tuple(v.strip() for v in str(r.values).split(";") if v.strip())
            out.setdefault(r.route, {})[r.parameter] = Window(
                r.parameter, float(r.min), float(r.max), float(r.default), vals, str(r.unit),
                r.source, r.confidence)
    return {k: MappingProxyType(v) for k, v in out.items() if k in routes}


def _rows_by(frame: pd.DataFrame, key: str) -> dict:
    """Rows (named tuples, file order) grouped by ``key``: one pass instead of a filter per grade."""
    out: dict = {}
    for r in frame.itertuples(index=False):
        out.setdefault(getattr(r, key), []).append(r)
    return out


def _supply_routes(r, routes: tuple, supply_rows: dict) -> tuple:
    """The supply route families a grade admits: ``supply`` where it has supply rows or
    an annealed steel baseline; ``supply_induction`` / ``supply_nitride`` where it also
    admits induction / nitride and can be bought hardened or cold drawn."""
    rows = supply_rows.get(r.id, [])
    annealed = r.family in STEEL_FAMILIES and str(r.base_condition).strip().lower().startswith("annealed")
    out = []
    if rows or annealed:
        out.append("supply")
    conds = {x.condition for x in rows}
    if "induction" in routes and conds & {"cold_drawn", "cold_drawn_stress_relieved", "quenched_tempered",
                                          "normalized", "hot_rolled"}:
        out.append("supply_induction")
    if "nitride" in routes and "quenched_tempered" in conds:
        out.append("supply_nitride")
    return tuple(out)


def build_catalogue(grades_path=None, comp_path=None, windows_path=None, supply_path=None) -> Catalogue:
    """Load, validate and join the catalogue tables (paths default to ``data/``):
    grades, compositions, route windows and supply conditions.  Raises
    :class:`DataFileError` on the first problem.  With custom grade tables and no
    ``supply_path``, the built-in supply rows of the grades present are used."""
    d = data_dir()
    gp, cp, wp = (grades_path or d / "grades.csv", comp_path or d / "compositions.csv",
                  windows_path or d / "route_windows.csv")
    grades = read_file(gp, GRADES_SCHEMA)
    comps = read_file(cp, COMPOSITION_SCHEMA)
    windows = read_file(wp, WINDOW_SCHEMA)
    ids = {}
    for r in grades.itertuples(index=False):
        if r.id in ids:
            raise DataFileError(str(gp), r.line, "id", f"{r.id!r} already used on line {ids[r.id]}")
        ids[r.id] = r.line
    for r in comps.itertuples(index=False):
        if r.grade not in ids:
            raise DataFileError(str(cp), r.line, "grade", f"{r.grade!r} is not an id in {gp}")
    scopes = set(ids) | set(FAMILIES)
    for r in windows.itertuples(index=False):
        if r.scope not in scopes:
            raise DataFileError(str(wp), r.line, "scope", f"{r.scope!r} is neither a grade id nor a family")
    seen = {}
    for r in comps.itertuples(index=False):
        key = (r.grade, r.element)
        if key in seen:
            raise DataFileError(str(cp), r.line, "element", f"{r.element} for {r.grade} already on line {seen[key]}")
        seen[key] = r.line
    sums = comps.groupby("grade")["min_pct"].sum()
    for gid, s in sums.items():
        if s > 100:
            line = int(comps[comps["grade"] == gid]["line"].max())
            raise DataFileError(str(cp), line, "min_pct", f"minimums of {gid} add up to {s:.2f} % (> 100 %)")
    maxsum = comps.groupby("grade")["max_pct"].sum()
    for gid, s in maxsum.items():
        if s > 100:
            line = int(comps[comps["grade"] == gid]["line"].max())
            raise DataFileError(str(cp), line, "max_pct", f"maximums of {gid} add up to {s:.2f} % (> 100 %)")

    strict = supply_path is not None or (grades_path is None and comp_path is None)
    supply_rows = read_supply(supply_path, set(ids) if strict else None)
    if not strict:
        supply_rows = {k: v for k, v in supply_rows.items() if k in ids}

    out, index = {}, {}
    comps_by, windows_by = _rows_by(comps, "grade"), _rows_by(windows, "scope")
    for r in grades.itertuples(index=False):
        sub = comps_by.get(r.id, [])
        routes = tuple(x.strip() for x in r.routes.split(";") if x.strip())
        routes = routes + _supply_routes(r, routes, supply_rows)
        c_rows = [x for x in sub if x.element == "C"]
        c_nom = float(c_rows[0].min_pct + c_rows[0].max_pct) / 2 if c_rows else 0.0
        if "quench_temper" in routes and r.family in BATH_ROUTE_FAMILIES and c_nom >= BATH_ROUTE_MIN_C:
            routes = routes + tuple(x for x in BATH_ROUTES if x not in routes)
        des = {"uns": r.uns, "en_name": r.en_name, "en_number": r.en_number, "jis": r.jis}
        aliases = tuple(a.strip() for a in str(r.aliases).split(";") if a.strip())
        g = Grade(
            id=r.id, name=r.name, family=r.family, designations=MappingProxyType(des), aliases=aliases,
            standard=r.standard, density_g_cm3=r.density_g_cm3, modulus_gpa=r.modulus_gpa,
            base_condition=r.base_condition, base_uts_mpa=r.base_uts_mpa, base_yield_mpa=r.base_yield_mpa,
            base_elongation_pct=r.base_elongation_pct, base_hardness_hb=r.base_hardness_hb,
            relative_price=r.relative_price, corrosion_resistant=bool(r.corrosion_resistant),
            austenitize_c=r.austenitize_c, routes=routes,
            comp_min=MappingProxyType({c.element: c.min_pct for c in sub}),
            comp_max=MappingProxyType({c.element: c.max_pct for c in sub}),
            windows=MappingProxyType(_windows(windows_by, r.id, r.family, routes)),
            source=r.source, confidence=r.confidence,
            comp_sources=tuple(sorted({c.source for c in sub})),
        )
        out[r.id] = g
        for nm in (r.id, r.name, *aliases, *[v for v in des.values() if v]):
            for k in _keys(nm):
                index.setdefault(k, set()).add(r.id)
    return Catalogue(MappingProxyType(out), MappingProxyType({k: tuple(sorted(v)) for k, v in index.items()}))


@functools.cache
def default_catalogue() -> Catalogue:
    return build_catalogue()


def grade(name) -> Grade:
    """Look a grade up by catalogue id or any designation.

    ``grade("AISI 4140")``, ``grade("4140")``, ``grade("42CrMo4")``,
    ``grade("1.7225")`` and ``grade("G41400")`` return the same record.  Case,
    spaces, hyphens and dots are ignored, and a leading AISI/SAE/UNS/EN/JIS is
    optional.  An unknown or ambiguous name raises
    :class:`~selector.errors.UnknownGradeError` listing the nearest names.
    """
    return default_catalogue().lookup(name)


def catalogue() -> pd.DataFrame:
    """The catalogue as a DataFrame, one row per grade."""
    rows = []
    for g in default_catalogue().grades.values():
        des = "; ".join(f"{k.upper() if k != 'en_name' else 'EN'}: {v}" for k, v in g.designations.items() if v)
        rows.append({
            "grade": g.id, "name": g.name, "family": g.family, "designations": des,
            "uns": g.designations["uns"], "en_name": g.designations["en_name"],
            "en_number": g.designations["en_number"], "jis": g.designations["jis"],
            "standard": g.standard, "routes": ";".join(g.routes),
            "density_g_cm3": g.density_g_cm3, "modulus_gpa": g.modulus_gpa,
            "base_uts_mpa": g.base_uts_mpa, "base_yield_mpa": g.base_yield_mpa,
            "base_elongation_pct": g.base_elongation_pct, "relative_price": g.relative_price,
            "corrosion_resistant": g.corrosion_resistant,
            "composition": ", ".join(f"{e} {g.comp_min[e]:g}–{g.comp_max[e]:g}" for e in g.comp_min),
            "source": g.source, "confidence": g.confidence,
        })
    return pd.DataFrame(rows)
