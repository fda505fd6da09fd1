"""Metallurgical cautions attached to candidates and their routes.

Each caution is a short rule with its reason, its trigger and its source.  The
words live in ``data/cautions.csv`` (one row per rule); the trigger of each rule is
a vectorised function in :data:`TRIGGERS` under the same code, evaluated on a
states or candidates table (one row per grade x route x parameter point)::

    mask = trigger(frame, context)    # numpy bool array, one value per row

The columns read are those of the states table: ``grade``, ``family``, ``route``
(the route family; a candidates table from ``select`` carries it as
``route_family``), ``quench``, ``temper_temp_c``, ``age_temp_c``, ``peak_ratio``,
``designation``, ``c_pct``, ``hardness_hrc``, ``surface_hardness_hrc``,
``uts_mpa``, and for two-stage routes ``prior`` (the route of the prior
hardening), ``prior_quench``, ``prior_temper_temp_c`` and ``temp_c`` (the
nitriding temperature of a nitride route; on an ``age`` route it stands in for a
missing ``age_temp_c``), and optionally ``c_max_pct`` (the highest carbon the part can
have where it is known, e.g. a certified heat's own C; otherwise the grade's
specification maximum is read).  :data:`COLUMNS_READ` lists them all.  ``grade`` and ``family`` are required; a missing optional column
counts as "not applicable" (NaN or empty), since a table that joins several route
families leaves the columns of the others empty.

The rules (thresholds and sources in ``data/cautions.csv``):

=======================  =====================================================
tme                      hardened steel tempered at 260-370 °C (final temper of
                         Q&T, martemper, induction or carburize, or the prior
                         temper of an induction-hardened core)
hydrogen_embrittlement   plated steel (not austenitic) at >= 320 HV core or
                         surface (32.2 HRC, ASTM E140) or >= 1000 MPa
                         (ISO 4042:1999 §6)
quench_cracking          water/brine quench (the route's or the prior one) of
                         alloy steel with C >= 0.35 % or of carbon steel with
                         C >= 0.60 %
quench_cracking_range    the same quench of a grade whose nominal C is below
                         those limits but whose specification maximum reaches
                         them (severity caution)
decarburization          steel with C >= 0.30 % austenitized in a furnace:
                         quench_temper, normalize, anneal, the Q&T before
                         nitriding, or the prior hardening of induction
over_aging               peak_ratio > 1, except standard over-aged tempers
scc_7xxx_t6              7xxx aluminium in a T6-type temper
galvanic                 anodic-index difference to the named mating material
                         above 0.15 / 0.25 / 0.50 V (harsh / normal /
                         controlled), MIL-DTL-14072 Table VI groups
service_temperature      service temperature >= tempering, aging or nitriding
                         temperature - 50 °C
shallow_hardening        through-hardening route (Q&T, martemper, the Q&T core
                         of nitride or induction, a bar bought quenched and
                         tempered: its mill quench) with centre martensite
                         < 50 %, when a minimum strength or hardness is a target
=======================  =====================================================

Severity
--------
Every rule has a severity (``data/cautions.csv``, column ``severity``, with its
reason and source in ``severity_reason``):

* ``note``: for information (decarburization);
* ``caution``: needs attention in the process or the design (hydrogen
  embrittlement, over-aging, SCC of 7xxx-T6, galvanic couple);
* ``avoid``: the selection ranks a route with it after every route without one,
  and keeps process windows clear of it (tempered-martensite embrittlement range,
  water/brine quench cracking, service near the tempering temperature, centre below
  50 % martensite under a strength target).

A user can switch a rule off by its code, ``allow=["quench_cracking"]``
(:func:`check_allow`; ``water_quench_alloy`` is accepted as another name of
``quench_cracking``).  The severities and their reasons are listed in
``docs/methods/selection.md``.

Results are estimates for preliminary selection.  The final choice needs
certified material test reports, the applicable design code and review by a
qualified engineer.

References
----------
Grossmann, M. A. (1952) *Elements of Hardenability*, ASM (the 50 % martensite
criterion; from memory).  Krauss, G. (2005) *Steels: Processing, Structure and
Performance*, ASM International (tempered-martensite embrittlement; from memory).
ISO 4042:1999, Fasteners — Electroplated coatings, §6 and Annex A (hydrogen
embrittlement relief).  MIL-DTL-14072F, Finishes for ground based electronic
equipment, §3.13 and Table VI (intermetallic couples).  ASTM G64, Classification
of resistance to stress-corrosion cracking of heat-treatable aluminum alloys.
ASTM E140-12b Table 1 (HV to HRC).  ASM Handbook Vol. 1 (1990) and Vol. 4 (1991)
(from memory; see the rows of ``data/cautions.csv``).
"""
from __future__ import annotations

import functools
import re
from dataclasses import dataclass
from types import MappingProxyType
from typing import Callable, Mapping

import numpy as np
import pandas as pd

from .. import inputs
from ..catalogue.grades import default_catalogue
from ..catalogue.loader import CONFIDENCE, Column, Schema, read_table
from ..errors import DataFileError, InputError, UnknownGradeError, check_choice, nearest
from ..models import conversions

CAUTIONS_FILE = "cautions.csv"
GALVANIC_FILE = "galvanic_series.csv"

NOTICE = ("Results are estimates for preliminary selection. The final choice needs certified "
          "material test reports, the applicable design code and review by a qualified engineer.")

# --- thresholds (each with its source; the words are in data/cautions.csv) -------------------

#: tempered-martensite embrittlement range, °C (ASM Handbook Vol. 1, from memory; partial)
TME_RANGE_C = (260.0, 370.0)
#: hardness above which ISO 4042:1999 §6 asks for hydrogen-embrittlement process control, HV
HE_HARDNESS_HV = 320.0
#: the same limit on the Rockwell C scale (ASTM E140-12b Table 1 interpolation: 32.2 HRC)
HE_HARDNESS_HRC = float(conversions.hv_to_hrc(HE_HARDNESS_HV))
#: tensile strength from which ISO 15330 / ISO 9587 treat steel as susceptible, MPa
HE_UTS_MPA = 1000.0
#: carbon from which a water or brine quench is a cracking risk, wt % (common practice)
QUENCH_CRACK_C_PCT = {"alloy_steel": 0.35, "nitriding_steel": 0.35, "carbon_steel": 0.60}
SEVERE_QUENCHES = ("water", "brine")
#: carbon from which decarburization matters, wt % (common practice)
DECARB_C_PCT = 0.30
#: centre martensite below which a through-hardened part is slack-quenched, % (Grossmann's 50 %
#: martensite criterion of the critical diameter, ASTM A255; common practice)
CENTRE_MARTENSITE_MIN_PCT = 50.0
#: route families that through-harden the section (the centre of a nitride route is its Q&T core;
#: an induction route's core is its prior quench-and-temper; a martemper hardens the whole section
#: to martensite after the bath)
THROUGH_HARDENING_ROUTES = ("quench_temper", "nitride", "martemper")
#: route families of a bought bar: through-hardened by the mill where the bar was bought quenched and
#: tempered (then its ``center_martensite_pct`` is the mill quench's, routes/families/supply.py; NaN
#: for every other supply condition, which the rule reads as "not through-hardened")
BOUGHT_ROUTES = ("supply", "supply_nitride", "supply_induction")
#: severities, mildest first
SEVERITIES = ("note", "caution", "avoid")
#: other accepted names of a rule in ``allow=[...]``
ALLOW_ALIASES = MappingProxyType({"water_quench_alloy": "quench_cracking"})
#: margin between service and tempering/aging temperature, °C (common practice)
SERVICE_MARGIN_C = 50.0
#: largest anodic-index difference by environment, V (common practice, see data/cautions.csv)
GALVANIC_LIMITS_V = MappingProxyType({"harsh": 0.15, "normal": 0.25, "controlled": 0.50})

HARDENED_STEELS = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel")
#: routes whose final temper follows a hardening to martensite (a martemper's temper too: the bath only
#: delays the martensite, its temper embrittles in the same range)
HARDENING_ROUTES = ("quench_temper", "induction", "carburize", "martemper")
HE_FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
               "stainless_martensitic", "stainless_ph", "tool_steel", "maraging_steel")
DECARB_FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
                   "stainless_martensitic", "tool_steel")
DECARB_ROUTES = ("quench_temper", "normalize", "anneal")

_OVERAGED_AL = re.compile(r"^T7\d*", re.I)           # T73, T7351, T76, T74 ...
_PH_H = re.compile(r"^H(\d{3,4})", re.I)               # H900 ... H1150
_T6 = re.compile(r"^T6\d*$", re.I)                     # T6, T651, T6511
_SERIES_7XXX = re.compile(r"^7\d{3}")


# --- the frame, read once -------------------------------------------------------------------

class _Frame:
    """Column arrays of a states/candidates table, with defaults for absent columns."""

    def __init__(self, frame: pd.DataFrame):
        if not isinstance(frame, pd.DataFrame):
            raise InputError("frame", type(frame).__name__, "a pandas DataFrame (states or candidates table)")
        missing = [c for c in ("grade", "family") if c not in frame.columns]
        if missing:
            raise InputError("frame", f"columns {list(frame.columns)}",
                             f"a table with the columns grade and family (missing: {', '.join(missing)})")
        self.n = len(frame)
        self.grade = self._str(frame, "grade")
        self.family = self._str(frame, "family")
        route_col = "route_family" if "route_family" in frame.columns else "route"
        self.route = self._str(frame, route_col)
        self.quench = self._str(frame, "quench", lower=True)
        self.prior_quench = self._str(frame, "prior_quench", lower=True)
        self.prior = self._str(frame, "prior")
        self.designation = self._str(frame, "designation")
        for col in ("temper_temp_c", "age_temp_c", "peak_ratio", "c_pct", "hardness_hrc",
                    "surface_hardness_hrc", "uts_mpa", "prior_temper_temp_c", "temp_c",
                    "center_martensite_pct", "case_depth_mm", "c_max_pct"):
            setattr(self, col, self._num(frame, col))
        # an aging route may carry its temperature as temp_c (the step's parameter name)
        self.age_temp_c = np.where(np.isnan(self.age_temp_c) & (self.route == "age"), self.temp_c,
                                   self.age_temp_c)

    def _str(self, frame, col, lower: bool = False) -> np.ndarray:
        """The column as stripped text ("" where missing), an object array; ``lower``: lower
        case, a str array.  Written once per distinct value and taken per row."""
        if col not in frame.columns:
            out = np.full(self.n, "", dtype=object)
            return np.char.lower(out.astype(str)) if lower else out
        s = frame[col]
        codes, uniq = pd.factorize(s, use_na_sentinel=True)
        text = pd.Series(uniq, dtype=s.dtype).astype(str).str.strip().to_numpy(dtype=object)
        text = np.append(text, np.array([""], dtype=object))           # code -1: missing
        if lower:
            text = np.char.lower(text.astype(str))
        return text[codes]

    def _num(self, frame, col) -> np.ndarray:
        if col not in frame.columns:
            return np.full(self.n, np.nan)
        return pd.to_numeric(frame[col], errors="coerce").to_numpy(float)

    def isin(self, attr: str, values) -> np.ndarray:
        return np.isin(getattr(self, attr).astype(str), list(values))


def _ge(x: np.ndarray, lim) -> np.ndarray:
    """x >= lim with NaN counted False (no comparison warning)."""
    with np.errstate(invalid="ignore"):
        return np.nan_to_num(x, nan=-np.inf) >= lim


# --- triggers: (frame, context) -> bool mask ------------------------------------------------

def _in_tme(t: np.ndarray) -> np.ndarray:
    lo, hi = TME_RANGE_C
    with np.errstate(invalid="ignore"):
        return (t >= lo) & (t <= hi)


def _tme(f: _Frame, ctx: dict) -> np.ndarray:
    # the final temper of a hardening route, or the prior quench-and-temper of the core
    # of an induction-hardened part (induction re-hardens only the surface)
    final = f.isin("route", HARDENING_ROUTES) & _in_tme(f.temper_temp_c)
    core = (f.route == "induction") & _in_tme(f.prior_temper_temp_c)
    return f.isin("family", HARDENED_STEELS) & (final | core)


def _hydrogen(f: _Frame, ctx: dict) -> np.ndarray:
    if not ctx["plated"]:
        return np.zeros(f.n, bool)
    strong = (_ge(f.hardness_hrc, HE_HARDNESS_HRC) | _ge(f.surface_hardness_hrc, HE_HARDNESS_HRC)
              | _ge(f.uts_mpa, HE_UTS_MPA))
    return f.isin("family", HE_FAMILIES) & strong


def _severe(quench: np.ndarray) -> np.ndarray:
    u, inv = np.unique(np.asarray(quench).astype(str), return_inverse=True)
    sev = np.array([q.split("_")[0].split(" ")[0] in SEVERE_QUENCHES for q in u], bool)
    return sev[inv].reshape(np.shape(quench))


def _severe_quench_and_limit(f: _Frame) -> tuple[np.ndarray, np.ndarray]:
    """Rows quenched in water or brine (the route's own quench, or the prior through-hardening
    quench of an induction route), and each row's cracking carbon limit (inf: none)."""
    severe = _severe(f.quench) | _severe(f.prior_quench)
    u, inv = np.unique(f.family.astype(str), return_inverse=True)
    limit = np.array([QUENCH_CRACK_C_PCT.get(fam, np.inf) for fam in u], float)[inv]
    return severe, limit


def _quench_cracking(f: _Frame, ctx: dict) -> np.ndarray:
    severe, limit = _severe_quench_and_limit(f)
    return severe & _ge(f.c_pct - limit, -1e-9)


@functools.lru_cache(maxsize=512)
def _c_max_pct(grade: str) -> float:
    """The specification maximum of carbon of a catalogue grade, wt % (NaN if not catalogued)."""
    try:
        g = default_catalogue().lookup(grade)
    except (UnknownGradeError, DataFileError):
        return float("nan")
    return float(g.comp_max.get("C", np.nan))


def _quench_cracking_range(f: _Frame, ctx: dict) -> np.ndarray:
    # the same severe quench of a steel whose nominal carbon is below the limit of quench_cracking
    # but whose specification range reaches it: a heat bought to the grade can be at the limit
    severe, limit = _severe_quench_and_limit(f)
    g, ginv = np.unique(f.grade.astype(str), return_inverse=True)
    c_max = np.array([_c_max_pct(x) for x in g], float)[ginv]
    # a row whose highest possible carbon is known (a certified heat analysis: its own C) reads that
    c_max = np.where(np.isfinite(f.c_max_pct), f.c_max_pct, c_max)
    below = ~_ge(f.c_pct - limit, -1e-9)
    return severe & below & _ge(c_max - limit, -1e-9)


def _decarb(f: _Frame, ctx: dict) -> np.ndarray:
    # furnace austenitizing: the route itself, the quench-and-temper before nitriding,
    # or the prior through-hardening of an induction route
    furnace = (f.isin("route", DECARB_ROUTES) | (f.route == "nitride")
               | ((f.route == "induction") & f.isin("prior", DECARB_ROUTES)))
    return f.isin("family", DECARB_FAMILIES) & furnace & _ge(f.c_pct, DECARB_C_PCT - 1e-9)


def _deliberately_overaged(designation: str, family: str) -> bool:
    if family == "aluminium":
        return bool(_OVERAGED_AL.match(designation))
    m = _PH_H.match(designation)
    return family == "stainless_ph" and bool(m) and int(m.group(1)) >= 1025


def _over_aging(f: _Frame, ctx: dict) -> np.ndarray:
    with np.errstate(invalid="ignore"):
        past = np.nan_to_num(f.peak_ratio, nan=0.0) > 1.0
    if not past.any():
        return past
    exempt = np.array([_deliberately_overaged(d, fam) for d, fam in zip(f.designation, f.family)], bool)
    return past & ~exempt


def _scc_7xxx(f: _Frame, ctx: dict) -> np.ndarray:
    series = np.array([bool(_SERIES_7XXX.match(g)) for g in f.grade], bool)
    t6 = np.array([bool(_T6.match(d)) for d in f.designation], bool)
    return (f.family == "aluminium") & series & t6


def _galvanic(f: _Frame, ctx: dict) -> np.ndarray:
    mate = ctx.get("mating")
    if mate is None:
        return np.zeros(f.n, bool)
    own = ctx["own_index"]
    with np.errstate(invalid="ignore"):
        return np.nan_to_num(np.abs(own - mate["anodic_index_v"]), nan=0.0) > ctx["galvanic_limit_v"] + 1e-9


#: impact caution: surface hardness of a case, and hardness of a through-hardened part, above which
#: shock loading needs care (HRC; common practice, data/cautions.csv row "impact")
IMPACT_CASE_HRC = 55.0
IMPACT_THROUGH_HRC = 50.0
IMPACT_CASE_ROUTES = ("carburize", "nitride", "induction")


def _impact(f: _Frame, ctx: dict) -> np.ndarray:
    if not ctx.get("impact"):
        return np.zeros(f.n, bool)
    steel = f.isin("family", HE_FAMILIES)
    case = f.isin("route", IMPACT_CASE_ROUTES) & _ge(f.case_depth_mm, 1e-9)
    return steel & ((case & _ge(f.surface_hardness_hrc, IMPACT_CASE_HRC))
                    | (~case & (_ge(f.hardness_hrc, IMPACT_THROUGH_HRC)
                                | _ge(f.surface_hardness_hrc, IMPACT_THROUGH_HRC))))


def _service_temperature(f: _Frame, ctx: dict) -> np.ndarray:
    ts = ctx.get("service_temp_c")
    if ts is None:
        return np.zeros(f.n, bool)
    nitriding = np.where(f.route == "nitride", f.temp_c, np.nan)
    near = [_ge(ts - t, -SERVICE_MARGIN_C - 1e-9) for t in (f.temper_temp_c, f.age_temp_c, nitriding)]
    return near[0] | near[1] | near[2]


def _shallow_hardening(f: _Frame, ctx: dict) -> np.ndarray:
    if not ctx.get("strength_target"):
        return np.zeros(f.n, bool)
    through = (f.isin("route", THROUGH_HARDENING_ROUTES) | ((f.route == "induction") & (f.prior == "quench_temper"))
               | f.isin("route", BOUGHT_ROUTES))
    with np.errstate(invalid="ignore"):
        slack = np.nan_to_num(f.center_martensite_pct, nan=np.inf) < CENTRE_MARTENSITE_MIN_PCT - 1e-9
    return f.isin("family", HARDENED_STEELS) & through & slack


# --- per-row detail appended to a reason (optional) ----------------------------------------

def _galvanic_detail(f: _Frame, ctx: dict, i: int) -> str:
    mate, own = ctx["mating"], float(ctx["own_index"][i])
    anode = "this part" if own > mate["anodic_index_v"] else f"the mating {mate['name']}"
    return (f" Anodic index {own:.2f} V ({ctx['own_category'][i]}) against {mate['anodic_index_v']:.2f} V "
            f"({mate['category']}): difference {abs(own - mate['anodic_index_v']):.2f} V > "
            f"{ctx['galvanic_limit_v']:.2f} V ({ctx['environment']} environment); {anode} is the anode.")


def _shallow_detail(f: _Frame, ctx: dict, i: int) -> str:
    return f" Centre martensite {f.center_martensite_pct[i]:.0f} % (at least {CENTRE_MARTENSITE_MIN_PCT:g} % wanted)."


def _service_detail(f: _Frame, ctx: dict, i: int) -> str:
    nit = f.temp_c[i] if f.route[i] == "nitride" else np.nan
    temps = [f"{name} {t:g} °C" for name, t in (("tempered at", f.temper_temp_c[i]), ("aged at", f.age_temp_c[i]),
                                                 ("nitrided at", nit)) if t == t]
    return f" Service {ctx['service_temp_c']:g} °C; {' and '.join(temps)}."


TRIGGERS: Mapping[str, Callable] = MappingProxyType({
    "tme": _tme,
    "hydrogen_embrittlement": _hydrogen,
    "quench_cracking": _quench_cracking,
    "quench_cracking_range": _quench_cracking_range,
    "decarburization": _decarb,
    "over_aging": _over_aging,
    "scc_7xxx_t6": _scc_7xxx,
    "galvanic": _galvanic,
    "service_temperature": _service_temperature,
    "shallow_hardening": _shallow_hardening,
    "impact": _impact,
})
_DETAILS: Mapping[str, Callable] = MappingProxyType({
    "galvanic": _galvanic_detail,
    "service_temperature": _service_detail,
    "shallow_hardening": _shallow_detail,
})


# --- the registry ----------------------------------------------------------------------------

@dataclass(frozen=True)
class Caution:
    """One rule: its words (from ``data/cautions.csv``) and its trigger."""

    code: str
    title: str
    rule: str
    reason: str
    trigger_text: str
    source: str
    confidence: str
    trigger: Callable
    severity: str = "caution"
    severity_reason: str = ""

    def mask(self, frame: pd.DataFrame, **context) -> np.ndarray:
        """Boolean mask of the rows of ``frame`` where this caution fires."""
        f = _Frame(frame)
        return self.trigger(f, _context(f, **context))


_CAUTION_SCHEMA = Schema((
    Column("code"), Column("title"), Column("rule"), Column("reason"), Column("trigger"),
    Column("source"), Column("severity", "choice", choices=SEVERITIES), Column("severity_reason"),
    Column("confidence", "choice", choices=CONFIDENCE),
))

_GALVANIC_SCHEMA = Schema((
    Column("category"), Column("description"), Column("anodic_index_v", "float", lo=0.0, hi=3.0),
    Column("members"), Column("source"), Column("confidence", "choice", choices=CONFIDENCE),
))


def _load_cautions() -> Mapping[str, Caution]:
    df = read_table(CAUTIONS_FILE, _CAUTION_SCHEMA)
    out = {}
    for r in df.itertuples(index=False):
        if r.code in out:
            raise DataFileError(CAUTIONS_FILE, r.line, "code", f"{r.code!r} appears twice")
        if r.code not in TRIGGERS:
            raise DataFileError(CAUTIONS_FILE, r.line, "code",
                                f"{r.code!r} has no trigger; triggers exist for: {', '.join(TRIGGERS)}")
        out[r.code] = Caution(r.code, r.title, r.rule, r.reason, r.trigger, r.source, r.confidence,
                              TRIGGERS[r.code], r.severity, r.severity_reason)
    lacking = [c for c in TRIGGERS if c not in out]
    if lacking:
        raise DataFileError(CAUTIONS_FILE, None, "code", f"no row for the trigger(s): {', '.join(lacking)}")
    return MappingProxyType(out)


#: the columns the triggers read (a view that builds a frame for cautions_for should keep them)
COLUMNS_READ = ("grade", "family", "route", "route_family", "quench", "prior", "prior_quench",
                "prior_temper_temp_c", "temper_temp_c", "age_temp_c", "temp_c", "peak_ratio",
                "designation", "c_pct", "hardness_hrc", "surface_hardness_hrc", "uts_mpa",
                "center_martensite_pct", "case_depth_mm", "c_max_pct")

#: every caution, by code (loaded once from data/cautions.csv)
CAUTIONS: Mapping[str, Caution] = _load_cautions()


def _norm(name: str) -> str:
    return re.sub(r"[\s\-_./]", "", str(name).lower())


@functools.cache
def galvanic_series() -> pd.DataFrame:
    """``data/galvanic_series.csv`` validated: one row per group with ``anodic_index_v``."""
    df = read_table(GALVANIC_FILE, _GALVANIC_SCHEMA)
    seen = {}
    for r in df.itertuples(index=False):
        for m in str(r.members).split(";"):
            k = _norm(m)
            if not k:
                continue
            if k in seen:
                raise DataFileError(GALVANIC_FILE, r.line, "members",
                                    f"{m.strip()!r} is already a member of {seen[k]!r}")
            seen[k] = r.category
    return df


@functools.cache
def _member_index() -> Mapping[str, dict]:
    out = {}
    for r in galvanic_series().itertuples(index=False):
        rec = {"category": r.category, "description": r.description,
               "anodic_index_v": float(r.anodic_index_v), "source": r.source, "confidence": r.confidence}
        for m in str(r.members).split(";"):
            if _norm(m):
                out[_norm(m)] = rec
    return MappingProxyType(out)


def _grade_keys(grade: str, family: str):
    """Keys tried in order for a catalogue grade: its id, its aluminium series, its family."""
    g = _norm(grade)
    keys = [g]
    if family == "aluminium" and g[:1].isdigit():
        keys.append(g[0] + "xxx")
    keys.append(_norm(family))
    return keys


def _lookup_grade(grade: str, family: str) -> dict | None:
    idx = _member_index()
    for k in _grade_keys(grade, family):
        if k in idx:
            return idx[k]
    return None


_TEMPER_SUFFIX = re.compile(r"(t\d+|h\d+|o|f)$")


def anodic_index(material: str) -> dict:
    """The galvanic group of a material name: a catalogue grade (``"6061"``,
    ``"AISI 4140"``, ``"C26000"``) or a plain name (``"brass"``, ``"zinc plated"``,
    ``"cast iron"``).  Returns ``category``, ``description``, ``anodic_index_v``,
    ``source``, ``confidence`` and ``name``.  An unknown name raises
    :class:`InputError` listing the nearest accepted names.

    Reference: MIL-DTL-14072F §3.13 and Table VI (see ``data/galvanic_series.csv``).
    """
    if not isinstance(material, str) or not material.strip():
        raise InputError("mating_material", material, "a material name, e.g. 'brass', '6061', 'steel'")
    idx = _member_index()
    k = _norm(material)
    tries = [k]
    stripped = _TEMPER_SUFFIX.sub("", k)
    if stripped and stripped != k:
        tries.append(stripped)
    for t in tries:
        if t in idx:
            return {**idx[t], "name": material.strip()}
    for t in dict.fromkeys([material.strip(), re.sub(r"[-\s]?(T\d+|H\d+|O)$", "", material.strip(), flags=re.I)]):
        try:
            g = default_catalogue().lookup(t)
        except (UnknownGradeError, DataFileError):
            continue
        rec = _lookup_grade(g.id, g.family)
        if rec is not None:
            return {**rec, "name": material.strip()}
    names = sorted({m.strip() for ms in galvanic_series()["members"] for m in ms.split(";")
                    if m.strip() and "_" not in m})
    near = nearest(material, names, n=4)
    hint = "a catalogue grade or one of: " + ", ".join(names)
    if near:
        hint += f" (did you mean {', '.join(near)}?)"
    raise InputError("mating_material", material, hint)


#: the keywords of the service context (:func:`cautions_for`, ``select``, ``diameter_sweep``)
CONTEXT_KEYS = ("plated", "plating", "mating_material", "service_temp_c", "environment", "impact")


def check_context(context, field: str = "caution_context") -> dict:
    """Validate a service context (a mapping of :data:`CONTEXT_KEYS`) and return a
    clean dict with every key: ``plated`` (bool), ``plating`` and
    ``mating_material`` (names known to :func:`anodic_index`, or None),
    ``service_temp_c`` (°C in [-273.15, 1500], or None), ``environment`` (one of
    ``harsh``, ``normal``, ``controlled``).  Checked whether or not any row of a
    table will use it; an unknown key or a bad value is an :class:`InputError`."""
    ctx = inputs.mapping(field, context, "a mapping with keys out of: " + ", ".join(CONTEXT_KEYS))
    for k in ctx:
        check_choice(f"{field} key", k, CONTEXT_KEYS)
    plated = inputs.flag("plated", ctx.get("plated", False))
    env = check_choice("environment", ctx.get("environment", "normal"), tuple(GALVANIC_LIMITS_V))
    temp = ctx.get("service_temp_c")
    if temp is not None:
        temp = inputs.number("service_temp_c", temp, -273.15, 1500.0, unit="°C")
    plating, mating = ctx.get("plating"), ctx.get("mating_material")
    if plating is not None:
        if not plated:
            raise InputError("plating", plating, "a plating name only together with plated=True")
        plating = inputs.name("plating", plating, allowed="a plating name, e.g. 'zinc plated'")
        anodic_index(plating)
    if mating is not None:
        mating = inputs.name("mating_material", mating, allowed="a material name, e.g. 'brass', '6061'")
        anodic_index(mating)
    impact = inputs.flag("impact", ctx.get("impact", False))
    return {"plated": plated, "plating": plating, "mating_material": mating, "service_temp_c": temp,
            "impact": impact,
            "environment": env}


def _context(f: _Frame, plated=False, mating_material=None, service_temp_c=None,
             environment: str = "normal", plating: str | None = None, strength_target: bool = False,
             impact: bool = False) -> dict:
    c = check_context(dict(plated=plated, mating_material=mating_material, service_temp_c=service_temp_c,
                           environment=environment, plating=plating, impact=impact), "context")
    if not isinstance(strength_target, (bool, np.bool_)):
        raise InputError("strength_target", strength_target, "True or False")
    plated, mating_material, plating, env = c["plated"], c["mating_material"], c["plating"], c["environment"]
    ctx = {"plated": plated, "environment": env, "galvanic_limit_v": GALVANIC_LIMITS_V[env],
           "service_temp_c": c["service_temp_c"], "mating": None, "strength_target": bool(strength_target),
           "impact": c["impact"]}
    if mating_material is not None:
        ctx["mating"] = anodic_index(mating_material)
        if plated and plating is not None:
            p = anodic_index(plating)
            own = np.full(f.n, p["anodic_index_v"])
            cat = np.full(f.n, f"{p['category']} plating", dtype=object)
        else:
            recs = [_lookup_grade(g, fam) for g, fam in zip(f.grade, f.family)]
            own = np.array([np.nan if r is None else r["anodic_index_v"] for r in recs], float)
            cat = np.array(["unknown" if r is None else r["category"] for r in recs], dtype=object)
        ctx["own_index"], ctx["own_category"] = own, cat
    return ctx


def caution_masks(frame: pd.DataFrame, **context) -> pd.DataFrame:
    """One boolean column per caution code (same index as ``frame``)."""
    f = _Frame(frame)
    ctx = _context(f, **context)
    return pd.DataFrame({code: np.asarray(c.trigger(f, ctx), bool) for code, c in CAUTIONS.items()},
                        index=frame.index)


def cautions_for(frame: pd.DataFrame, plated: bool = False, mating_material: str | None = None,
                 service_temp_c: float | None = None, environment: str = "normal",
                 plating: str | None = None, strength_target: bool = False,
                 impact: bool = False) -> list[list[dict]]:
    """The cautions that apply to each row of ``frame``.

    Parameters
    ----------
    frame : pandas.DataFrame
        States or candidates table (see the module docstring for its columns).
    plated : bool
        The part will be electroplated (hydrogen-embrittlement rule; for the
        galvanic rule the plating, when named, replaces the base metal).
    mating_material : str, optional
        The material the part touches: a catalogue grade or a plain name (see
        :func:`anodic_index`).
    service_temp_c : float, optional
        Highest service temperature, °C.
    environment : str
        ``harsh``, ``normal`` (default) or ``controlled``: the galvanic limit.
    plating : str, optional
        The plating metal (``"zinc plated"``, ``"nickel plated"`` ...), with ``plated=True``.
    strength_target : bool
        The targets include a minimum strength or hardness (the centre-martensite
        rule ``shallow_hardening`` applies only then).
    impact : bool
        Impact or shock loading in service (the ``impact`` rule: a case of 55 HRC and
        above, or a through-hardened part of 50 HRC and above).

    Returns
    -------
    list of list of dict
        One list per row, each caution as ``{"code", "title", "reason", "severity"}``
        in the order of ``data/cautions.csv``.

    References
    ----------
    The source of each rule is its row of ``data/cautions.csv`` (``CAUTIONS[code].source``);
    see the module docstring.
    """
    f = _Frame(frame)
    ctx = _context(f, plated=plated, mating_material=mating_material, service_temp_c=service_temp_c,
                   environment=environment, plating=plating, strength_target=strength_target,
                   impact=impact)
    out: list[list[dict]] = [[] for _ in range(f.n)]
    for code, c in CAUTIONS.items():
        mask = np.asarray(c.trigger(f, ctx), bool)
        detail = _DETAILS.get(code)
        for i in np.flatnonzero(mask):
            reason = c.reason + (detail(f, ctx, int(i)) if detail else "")
            out[int(i)].append({"code": code, "title": c.title, "reason": reason, "severity": c.severity})
    return out


def caution_column(frame: pd.DataFrame, **context) -> pd.Series:
    """The titles of the cautions of each row joined with ``"; "`` ("" for none),
    indexed like ``frame``: a column for result tables."""
    lists = cautions_for(frame, **context)
    return pd.Series(["; ".join(d["title"] for d in row) for row in lists], index=frame.index,
                     name="cautions", dtype=object)


def check_allow(allow) -> tuple:
    """Validate ``allow`` (rule codes the user switches off) and return the codes.

    ``None`` or an empty sequence gives ``()``; a single code may be given as a
    string.  :data:`ALLOW_ALIASES` maps other accepted names to their code.  An
    unknown name raises :class:`InputError` naming the field ``allow``, the value and
    the accepted codes (with the nearest)."""
    if allow is None:
        return ()
    if isinstance(allow, str):
        allow = [allow]
    if not isinstance(allow, (list, tuple, set, frozenset)):
        raise InputError("allow", allow, "a list of caution codes: " + ", ".join(CAUTIONS))
    names = tuple(CAUTIONS) + tuple(ALLOW_ALIASES)
    out = []
    for name in allow:
        if not isinstance(name, str):
            raise InputError("allow", name, "a caution code: " + ", ".join(names))
        code = check_choice("allow", name.strip(), names)
        out.append(ALLOW_ALIASES.get(code, code))
    return tuple(dict.fromkeys(out))


AVOID_CODES = tuple(code for code, c in CAUTIONS.items() if c.severity == "avoid")


def read_frame(frame: pd.DataFrame) -> _Frame:
    """The column arrays the triggers read, from a states or candidates table: build
    it once and pass it to :func:`avoid_masks` to evaluate several contexts cheaply."""
    return _Frame(frame)


def avoid_masks(frame, allow=(), **context) -> dict:
    """``{code: bool mask}`` for every ``avoid`` rule not in ``allow``: only those
    triggers run.  ``frame`` is a states/candidates table or the result of
    :func:`read_frame` (reuse it over calls: reading the string columns is the
    costly part)."""
    allowed = set(check_allow(allow))
    f = frame if isinstance(frame, _Frame) else _Frame(frame)
    ctx = _context(f, **context)
    return {code: np.asarray(CAUTIONS[code].trigger(f, ctx), bool)
            for code in AVOID_CODES if code not in allowed}


def severity_columns(frame: pd.DataFrame, allow=(), **context) -> pd.DataFrame:
    """Per row: ``severity`` (the worst severity among the rules that fire and are not
    allowed: ``avoid``, ``caution``, ``note`` or ``""``) and ``avoid`` (the codes of
    the ``avoid`` rules that fire, ``;``-joined, ``""`` for none)."""
    allowed = set(check_allow(allow))
    lists = cautions_for(frame, **context)
    rank_of = {s: i for i, s in enumerate(SEVERITIES)}
    worst, avoid = [], []
    for row in lists:
        live = [d for d in row if d["code"] not in allowed]
        worst.append(max((d["severity"] for d in live), key=rank_of.get, default=""))
        avoid.append(";".join(d["code"] for d in live if d["severity"] == "avoid"))
    return pd.DataFrame({"severity": worst, "avoid": avoid}, index=frame.index)
