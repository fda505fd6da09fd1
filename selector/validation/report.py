"""Validation of the route models against published property sets (``data/reference/``).

Every row of the three reference tables is recomputed through the same public entry
points the tool uses, and compared with the published value:

* ``qt_steels.csv`` — quenched-and-tempered steels, through
  :func:`selector.routes.evaluate.evaluate` with the route
  ``harden (quench) → temper (temp_c, hours)`` at the row's section;
* ``tempers_nonferrous.csv`` — cold-worked, annealed and age-hardened conditions,
  through ``evaluate`` with the route family's aliases (a temper designation such as
  ``H14`` or ``1/2 hard``, a solution treatment and ageing step);
* ``hardenability_bands.csv`` — Jominy H-band limits, against
  :func:`selector.models.hardenability.jominy_curve_hrc` of the base grade
  (nominal composition against the band's mid-point; the lean corner against the
  band's minimum and the rich corner against its maximum).

A row whose route is not modelled yet (``NotModelledError``), whose grade is not in
the catalogue, or whose published property has no predicted counterpart, is
counted and listed with the reason — never silently dropped.

Errors are ``predicted − published`` in the property's unit.  Statistics per grade
family, route and kind of published value (typical / minimum / band mid-point): the
number of comparisons, the median and the 90th percentile (linear interpolation
between order statistics, ``numpy.percentile`` default) of the absolute error, and
the median signed error (bias).  Thresholds are in
:mod:`selector.validation.thresholds`.

Assumptions made to recompute a row (a blank tempering time taken as 2 h, a blank
section as a 25.4 mm round, a blank quench medium as the grade's usual one) are
recorded per row and printed in the report.

The published sets are typical values, specification minimums or ranges of real
material; they check trends and magnitudes, they are not design allowables.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterable, Sequence

import numpy as np
import pandas as pd

from ..catalogue.grades import default_catalogue
from ..catalogue.loader import CONFIDENCE, Column, Schema, data_dir, read_file
from ..errors import NotModelledError, SelectorError, UnknownGradeError
from ..models.hardenability import jominy_curve_hrc
from ..routes.evaluate import evaluate
from ..routes.families.base import RouteFamily
from . import calibration, location, steels
from .thresholds import HEADROOM_NOTE, THRESHOLDS

#: defaults used where a reference row leaves a treatment condition blank
DEFAULT_TEMPER_HOURS = 2.0     # common practice: 1 h per inch of section, 2 h as a usual shop minimum
DEFAULT_SECTION_MM = 25.4      # the handbook tables' standard 1-in round (common practice)

#: property key -> (label, unit, key in evaluate()'s result)
PROPERTIES = {
    "uts_mpa": ("tensile strength", "MPa", "uts_mpa"),
    "yield_mpa": ("yield strength", "MPa", "yield_mpa"),
    "elongation_pct": ("elongation", "%", "elongation_pct"),
    "hardness_hb": ("hardness", "HB", "hardness_hb"),
    "hardness_hrc": ("hardness", "HRC", "hardness_hrc"),
    "hardness_hv": ("hardness", "HV", "hardness_hv"),
    "jominy_mid_hrc": ("Jominy hardness, nominal vs band mid-point", "HRC", None),
    "jominy_min_hrc": ("Jominy hardness, lean corner vs band minimum", "HRC", None),
    "jominy_max_hrc": ("Jominy hardness, rich corner vs band maximum", "HRC", None),
}

#: parity plots: file stem -> (title, properties plotted together)
PLOTS = {
    "parity_uts": ("Tensile strength", ("uts_mpa",)),
    "parity_yield": ("Yield strength", ("yield_mpa",)),
    "parity_elongation": ("Elongation", ("elongation_pct",)),
    "parity_hardness_hb": ("Hardness (HB)", ("hardness_hb",)),
    "parity_hardness_hrc": ("Hardness (HRC)", ("hardness_hrc",)),
    "parity_jominy": ("Jominy H-band (HRC)", ("jominy_mid_hrc", "jominy_min_hrc", "jominy_max_hrc")),
}

QT_FILE = "reference/qt_steels.csv"
TEMPERS_FILE = "reference/tempers_nonferrous.csv"
BANDS_FILE = "reference/hardenability_bands.csv"
PH_FILE = "reference/ph_typical.csv"
#: conditions whose treatment the route families do not model (listed as not modelled, never recomputed
#: as a neighbouring condition)
NOT_MODELLED_CONDITIONS = {"H1150M": "double aging (760 °C, then 621 °C) is not modelled"}
KINDS = ("typical", "minimum", "band")
#: families whose anneal route gives the catalogue's annealed baseline properties
BASELINE_FAMILIES = ("stainless_austenitic", "aluminium", "copper_alloy", "titanium")


def _num(*names):
    return tuple(Column(n, "float", allow_blank=True) for n in names)


_COMMON = (Column("kind", "choice", choices=KINDS), Column("source"), Column("table"),
           Column("confidence", "choice", choices=CONFIDENCE), Column("note", allow_blank=True))

QT_SCHEMA = Schema((Column("grade"), Column("quench", allow_blank=True))
                   + _num("austenitize_c", "section_mm", "temper_temp_c", "temper_hours")
                   + (Column("temper_hours_basis", allow_blank=True),)
                   + _num("uts_mpa", "yield_mpa", "elongation_pct", "reduction_area_pct",
                          "hardness_hb", "hardness_hrc") + _COMMON
                   + (Column("steel", required=False, allow_blank=True),
                      Column("hb_location", "choice", choices=tuple(location.LOCATIONS), required=False,
                             allow_blank=True)))

TEMPERS_SCHEMA = Schema((Column("grade"), Column("condition"),
                         Column("route", "choice", choices=("anneal", "cold_work", "age")),
                         Column("product", allow_blank=True))
                        + _num("reduction_pct") + (Column("reduction_basis", allow_blank=True),)
                        + _num("solution_temp_c", "age_temp_c", "age_hours")
                        + (Column("schedule_basis", allow_blank=True),)
                        + _num("uts_mpa", "uts_max_mpa", "yield_mpa", "elongation_pct",
                               "reduction_area_pct", "hardness_hb", "hardness_hrc", "hardness_hv")
                        + _COMMON)

PH_SCHEMA = Schema((Column("grade"), Column("condition"))
                   + _num("solution_temp_c", "age_temp_c", "age_hours", "uts_mpa", "yield_mpa",
                          "elongation_pct", "hardness_hrc") + _COMMON)

BANDS_SCHEMA = Schema((Column("grade"),) + _num("j_sixteenths", "distance_mm", "hrc_min", "hrc_max")
                      + (Column("kind"), Column("source"), Column("table"),
                         Column("confidence", "choice", choices=CONFIDENCE)))


@dataclass
class Case:
    """One reference row, mapped to a route."""

    file: str
    line: int
    grade: str                    # as written in the row
    family: str                   # catalogue family ("" if the grade is unknown)
    route: str                    # quench_temper / cold_work / age / anneal / jominy
    condition: str                # human-readable condition of the row
    kind: str                     # typical / minimum / band
    published: dict               # property -> value (NaN dropped)
    steps: list | None = None     # route for evaluate(); None for Jominy rows
    diameter_mm: float = DEFAULT_SECTION_MM
    assumptions: list = field(default_factory=list)
    confidence: str = ""
    source: str = ""
    table: str = ""
    skip_reason: str = ""         # set when the row cannot be recomputed (grade unknown ...)
    #: further routes tried in order when ``steps`` is refused (e.g. a designation the family
    #: does not list, then the reduction or schedule the row records)
    alternatives: list = field(default_factory=list)
    #: why the row is not independent of a fit ("" if it is): the fit row it joins
    calibration: str = ""
    #: the row's own join keys (published quench, section, tempering temperature)
    keys: dict = field(default_factory=dict)
    #: the published steel's own composition (wt %) where the source prints another steel than
    #: the catalogue grade (``steel`` column of qt_steels.csv); None: the grade's nominal
    heat: dict | None = None
    #: that steel's designation ("" when the row is the catalogue grade itself)
    steel: str = ""
    #: where the source took its hardness (``hb_location`` of qt_steels.csv: centre, mid-radius,
    #: surface); "" = not stated, compared at the ASTM A370 tension-test location
    hb_location: str = ""

    @property
    def id(self) -> str:
        return f"{self.file}:{self.line}"


def _f(v) -> float:
    try:
        return float(v)
    except (TypeError, ValueError):
        return math.nan


def _published(rec, names) -> dict:
    out = {}
    for n in names:
        v = _f(rec.get(n))
        if v == v:
            out[n] = v
    return out


def _lookup_family(name: str) -> tuple[str, str]:
    """(catalogue id, family), or ("", "") if the grade is not catalogued."""
    try:
        g = default_catalogue().lookup(name)
    except UnknownGradeError:
        return "", ""
    return g.id, g.family


# ----------------------------------------------------------------------------- row -> route

def qt_case(rec: dict, file: str = QT_FILE) -> Case:
    """Map a ``qt_steels.csv`` row to ``harden → temper`` at its section."""
    gid, fam = _lookup_family(rec["grade"])
    assumptions = []
    quench = str(rec.get("quench") or "").strip()
    if not quench and gid:
        quench = RouteFamily.choices(default_catalogue().lookup(gid), "quench_temper", "quench", ("oil",))[0]
        assumptions.append(f"quench not stated: {quench} (the grade's usual medium, data/route_windows.csv)")
    harden = {"op": "harden", "quench": quench or "oil"}
    aust = _f(rec.get("austenitize_c"))
    if aust == aust:
        harden["austenitize_c"] = aust
    hours = _f(rec.get("temper_hours"))
    if hours != hours:
        hours = DEFAULT_TEMPER_HOURS
        assumptions.append(f"tempering time not stated: {hours:g} h")
    section = _f(rec.get("section_mm"))
    if section != section:
        section = DEFAULT_SECTION_MM
        assumptions.append(f"section not stated: {section:g} mm round")
    steps = [harden, {"op": "temper", "temp_c": _f(rec["temper_temp_c"]), "hours": hours}]
    cond = f"{quench or 'oil'} quench, temper {_f(rec['temper_temp_c']):g} °C, Ø{section:g} mm"
    c = Case(file, int(rec["line"]), rec["grade"], fam, "quench_temper", cond, rec["kind"],
             _published(rec, ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hb", "hardness_hrc")),
             steps, section, assumptions, rec["confidence"], rec["source"], rec["table"],
             "" if gid else "grade not in the catalogue")
    c.keys = {"quench": str(rec.get("quench") or "").strip(), "section_mm": _f(rec.get("section_mm")),
              "temp_c": _f(rec["temper_temp_c"])}
    c.hb_location = location.check_location(rec.get("hb_location"))
    if c.hb_location and "hardness_hb" in c.published:
        c.assumptions.append(f"hardness compared at the {c.hb_location} of the section, where the "
                             "source took it")
    steel = str(rec.get("steel") or "").strip()
    if steel and gid:
        c.steel, c.heat = steel, steels.mid_composition(steel)
        c.assumptions.append(f"published steel {steel}: recomputed on its own mid-range composition "
                             f"({steels.STEELS_FILE}), not on {gid}'s")
    return c


def temper_case(rec: dict, file: str = TEMPERS_FILE) -> Case:
    """Map a ``tempers_nonferrous.csv`` row to the route family's aliases.

    anneal → ``[anneal]``; cold_work → ``[cold_work designation=<condition>]`` (or
    ``reduction_pct`` where the row records one and the condition is not a
    designation); age → ``[solution_treat temp_c, age designation=<condition>]``, else
    ``[solution_treat temp_c, age temp_c hours]`` with the schedule the row records.
    A band row's tensile strength is compared with the mid-point of the range.
    """
    gid, fam = _lookup_family(rec["grade"])
    route, cond = rec["route"], rec["condition"].strip()
    assumptions: list = []
    alternatives: list = []
    if route == "anneal":
        steps = [{"op": "anneal"}]
    elif route == "cold_work":
        red = _f(rec.get("reduction_pct"))
        steps = [{"op": "cold_work", "designation": cond}]
        if red == red:
            steps[0]["reduction_pct"] = red
            alternatives.append([{"op": "cold_work", "reduction_pct": red}])
    else:
        sol = {"op": "solution_treat"}
        st = _f(rec.get("solution_temp_c"))
        if st == st:
            sol["temp_c"] = st
        steps = [sol, {"op": "age", "designation": cond}]
        at, ah = _f(rec.get("age_temp_c")), _f(rec.get("age_hours"))
        if at == at:
            age = {"op": "age", "temp_c": at}
            if ah == ah:
                age["hours"] = ah
            alternatives.append([dict(sol), age])
    pub = _published(rec, ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hb", "hardness_hrc",
                           "hardness_hv"))
    umax = _f(rec.get("uts_max_mpa"))
    if "uts_mpa" in pub and umax == umax:
        pub["uts_mpa"] = 0.5 * (pub["uts_mpa"] + umax)
        assumptions.append("tensile strength compared with the mid-point of the published range")
    c = Case(file, int(rec["line"]), rec["grade"], fam, route, cond, rec["kind"], pub, steps,
             DEFAULT_SECTION_MM, assumptions, rec["confidence"], rec["source"], rec["table"],
             "" if gid else "grade not in the catalogue")
    c.alternatives = alternatives
    return c


def band_cases(frame: pd.DataFrame, file: str = BANDS_FILE) -> list[Case]:
    """One case per H-band row; the grade is the band's base grade (``4140H`` → ``4140``)."""
    out = []
    for rec in frame.to_dict("records"):
        name = str(rec["grade"]).strip()
        base = name[:-1] if name.upper().endswith("H") else name
        gid, fam = _lookup_family(base)
        lo, hi = _f(rec["hrc_min"]), _f(rec["hrc_max"])
        pub = {}
        if lo == lo and hi == hi:
            pub["jominy_mid_hrc"] = 0.5 * (lo + hi)
        if lo == lo:
            pub["jominy_min_hrc"] = lo
        if hi == hi:
            pub["jominy_max_hrc"] = hi
        assumptions = [f"band of {name} compared with the composition range of catalogue grade {gid or base}"
                       " (H-steel ranges are slightly wider)"]
        if lo != lo:
            assumptions.append("band minimum below 20 HRC (not given): mid-point not compared")
        c = Case(file, int(rec["line"]), name, fam, "jominy", f"J{_f(rec['j_sixteenths']):g} "
                 f"({_f(rec['distance_mm']):.1f} mm)", "band", pub, None, _f(rec["distance_mm"]),
                 assumptions, rec["confidence"], rec["source"], rec["table"],
                 "" if gid else "grade not in the catalogue")
        c.grade_id = gid  # type: ignore[attr-defined]
        out.append(c)
    return out


def _tag_calibration(cases: list, root: Path) -> None:
    """Set ``case.calibration`` by the key join of :mod:`selector.validation.calibration`."""
    rows = calibration.fit_rows(str(root))
    for c in cases:
        why = ""
        if c.route == "anneal" and c.family in BASELINE_FAMILIES:
            why = "the anneal route returns the catalogue's annealed baseline (data/grades.csv)"
        elif c.route == "quench_temper":
            hit = calibration.match(rows, grade=c.grade, route=c.route, quench=c.keys.get("quench", ""),
                                    section_mm=c.keys.get("section_mm", math.nan),
                                    temp_c=c.keys.get("temp_c", math.nan))
            why = hit.describe() if hit else ""
        elif c.route != "jominy":
            hit = calibration.match(rows, grade=c.grade, family=c.family, route=c.route, condition=c.condition)
            why = hit.describe() if hit else ""
        c.calibration = why


def load_cases(files: Iterable[str] = (QT_FILE, TEMPERS_FILE, PH_FILE, BANDS_FILE),
               root: Path | None = None) -> list[Case]:
    """Every reference row of ``files`` (paths under ``data/``), mapped to a case."""
    root = Path(root) if root is not None else data_dir()
    out: list[Case] = []
    for name in files:
        if name == QT_FILE:
            recs = read_file(root / name, QT_SCHEMA).to_dict("records")
            out += [qt_case(r, name) for r in recs]
        elif name == TEMPERS_FILE:
            recs = read_file(root / name, TEMPERS_SCHEMA).to_dict("records")
            out += [temper_case(r, name) for r in recs]
        elif name == PH_FILE:
            recs = read_file(root / name, PH_SCHEMA).to_dict("records")
            for r in recs:
                c = temper_case({**r, "route": "age"}, name)
                if str(r["condition"]).strip().upper() in NOT_MODELLED_CONDITIONS:
                    c.skip_reason = NOT_MODELLED_CONDITIONS[str(r["condition"]).strip().upper()]
                out.append(c)
        elif name == BANDS_FILE:
            recs = []
            out += band_cases(read_file(root / name, BANDS_SCHEMA), name)
        else:
            raise ValueError(f"no case mapping for {name}")
    _tag_calibration(out, root)
    return out


# ----------------------------------------------------------------------------- recompute

COLUMNS = ["case", "file", "line", "grade", "family", "route", "condition", "section_mm", "kind", "confidence",
           "calibration", "property", "unit", "published", "predicted", "error", "abs_error", "status", "reason",
           "assumptions"]


def _rows_for(case: Case, predicted: dict, status: str, reason: str = "") -> list[dict]:
    out = []
    for prop, pub in case.published.items():
        pred = predicted.get(prop)
        pred = math.nan if pred is None else float(pred)
        st, why = status, reason
        if st == "compared" and not math.isfinite(pred):
            st, why = "no prediction", f"the model gives no {PROPERTIES[prop][0]} on the {PROPERTIES[prop][1]} scale"
        err = pred - pub if st == "compared" else math.nan
        out.append({"case": case.id, "file": case.file, "line": case.line, "grade": case.grade,
                    "family": case.family or "(not catalogued)", "route": case.route,
                    "condition": case.condition, "section_mm": case.diameter_mm, "kind": case.kind,
                    "confidence": case.confidence, "calibration": case.calibration, "property": prop, "unit": PROPERTIES[prop][1],
                    "published": pub, "predicted": pred,
                    "error": err, "abs_error": abs(err), "status": st, "reason": why,
                    "assumptions": "; ".join(case.assumptions)})
    if not case.published:
        out.append({"case": case.id, "file": case.file, "line": case.line, "grade": case.grade,
                    "family": case.family or "(not catalogued)", "route": case.route,
                    "condition": case.condition, "section_mm": case.diameter_mm, "kind": case.kind,
                    "confidence": case.confidence, "calibration": case.calibration, "property": "", "unit": "",
                    "published": math.nan, "predicted": math.nan,
                    "error": math.nan, "abs_error": math.nan, "status": "no published value",
                    "reason": "the row gives none of the compared properties",
                    "assumptions": "; ".join(case.assumptions)})
    return out


def _jominy_predictions(case: Case) -> dict:
    g = default_catalogue().lookup(case.grade_id)  # type: ignore[attr-defined]
    d = np.array([case.diameter_mm])
    return {f"jominy_{k}_hrc": float(np.asarray(jominy_curve_hrc(g.composition(corner), d)).ravel()[0])
            for k, corner in (("mid", "nominal"), ("min", "lean"), ("max", "rich"))}


def recompute_case(case: Case) -> list[dict]:
    """Comparison rows (one per published property) of one case."""
    if case.skip_reason:
        return _rows_for(case, {}, "not modelled", case.skip_reason)
    if case.route == "jominy":
        return _rows_for(case, _jominy_predictions(case), "compared")

    first = None
    for steps in [case.steps] + list(case.alternatives):
        try:
            res = evaluate(case.grade, steps, diameter_mm=case.diameter_mm, heat_composition=case.heat)
        except NotModelledError as exc:
            return _rows_for(case, {}, "not modelled", str(exc))
        except SelectorError as exc:
            first = first or f"{type(exc).__name__}: {exc}"
            continue
        except Exception as exc:  # noqa: BLE001 - a library bug: listed as such, never hidden
            return _rows_for(case, {}, "error", f"undocumented {type(exc).__name__}: {exc}")
        if steps is not case.steps and not any(a.startswith("route as recomputed") for a in case.assumptions):
            case.assumptions.append(f"route as recomputed: {res['route_text']} (first form refused: {first})")
        pred = {p: res.get(spec[2]) for p, spec in PROPERTIES.items() if spec[2]}
        if case.hb_location:
            pred["hardness_hb"] = location.hardness_hb_at(res, case.hb_location)
        return _rows_for(case, pred, "compared")
    return _rows_for(case, {}, "not modelled", first)


def recompute(cases: Sequence[Case]) -> pd.DataFrame:
    """Recompute every case; one row per (case, published property)."""
    rows = [r for c in cases for r in recompute_case(c)]
    return pd.DataFrame(rows, columns=COLUMNS)


# ----------------------------------------------------------------------------- statistics

GROUP = ["family", "route", "kind", "property"]


def statistics(comparisons: pd.DataFrame, rows: str = "independent") -> pd.DataFrame:
    """Per (family, route, kind, property): ``n`` (comparisons measured), ``n_calibration``
    (comparisons of the group whose published value a fit has used, by the key join of
    :mod:`selector.validation.calibration`), ``median_abs``, ``p90_abs`` (90th
    percentile, linear interpolation) and ``median_error`` (signed, predicted −
    published), over the rows with status ``compared``.

    ``rows="independent"`` (default) measures the independent rows only — the figures
    that describe accuracy; ``rows="calibration"`` measures the calibration rows only
    (an implementation check, not accuracy); ``rows="all"`` both.  Groups with no row
    of the requested kind are left out."""
    if rows not in ("independent", "calibration", "all"):
        raise ValueError(f"rows: {rows!r}; allowed: independent, calibration, all")
    c = comparisons[comparisons["status"] == "compared"]
    cols = GROUP + ["unit", "n", "n_calibration", "median_abs", "p90_abs", "median_error"]
    if c.empty:
        return pd.DataFrame(columns=cols)
    out = []
    for key, g in c.groupby(GROUP, sort=True):
        is_cal = (g["calibration"] != "").to_numpy()
        sel = {"independent": ~is_cal, "calibration": is_cal, "all": np.ones(len(g), bool)}[rows]
        if not sel.any():
            continue
        a = g["abs_error"].to_numpy(float)[sel]
        out.append(dict(zip(GROUP, key), unit=g["unit"].iloc[0], n=len(a),
                        n_calibration=int(is_cal.sum()),
                        median_abs=float(np.median(a)), p90_abs=float(np.percentile(a, 90)),
                        median_error=float(np.median(g["error"].to_numpy(float)[sel]))))
    return pd.DataFrame(out, columns=cols)


#: the headline groups: label -> (families, route, kind, property, relative?)
HEADLINE = {
    "Q&T steels, tensile strength": (("carbon_steel", "alloy_steel"), "quench_temper", "typical", "uts_mpa", True),
    "Q&T steels, yield strength": (("carbon_steel", "alloy_steel"), "quench_temper", "typical", "yield_mpa", True),
    "Q&T steels, hardness HB": (("carbon_steel", "alloy_steel"), "quench_temper", "typical", "hardness_hb", True),
    "Q&T steels, hardness HRC": (("carbon_steel", "alloy_steel"), "quench_temper", "typical", "hardness_hrc",
                                 False),
    "Jominy H-bands, nominal vs band mid": (None, "jominy", "band", "jominy_mid_hrc", False),
    "Jominy H-bands, lean corner vs band minimum": (None, "jominy", "band", "jominy_min_hrc", False),
    "PH stainless aged, tensile strength vs typical": (("stainless_ph",), "age", "typical", "uts_mpa", True),
    "PH stainless aged, yield strength vs typical": (("stainless_ph",), "age", "typical", "yield_mpa", True),
}


def headline(comparisons: pd.DataFrame) -> pd.DataFrame:
    """The figures quoted in the README and notes, on independent rows only: per
    headline group, n, n_calibration (left out), median absolute error, p90 and
    median bias — relative (% of the published value) for strength and HB,
    absolute (HRC) for Rockwell C."""
    c = comparisons[comparisons["status"] == "compared"]
    out = []
    for label, (fams, route, kind, prop, rel) in HEADLINE.items():
        g = c[(c["route"] == route) & (c["property"] == prop)]
        if fams is not None:
            g = g[g["family"].isin(fams)]
        if kind is not None:
            g = g[g["kind"] == kind]
        ind = g[g["calibration"] == ""]
        if rel:
            e = (ind["error"] / ind["published"].abs().clip(lower=1e-9) * 100.0).to_numpy(float)
            unit = "%"
        else:
            e = ind["error"].to_numpy(float)
            unit = PROPERTIES[prop][1]
        out.append({"comparison": label, "n": len(e), "n_calibration": int((g["calibration"] != "").sum()),
                    "unit": unit,
                    "median_abs": float(np.median(np.abs(e))) if len(e) else math.nan,
                    "p90_abs": float(np.percentile(np.abs(e), 90)) if len(e) else math.nan,
                    "median_error": float(np.median(e)) if len(e) else math.nan})
    return pd.DataFrame(out)


def check(stats: pd.DataFrame, thresholds=None) -> tuple[list[str], list[str]]:
    """Compare statistics with the documented thresholds.

    Returns ``(violations, undocumented)``: messages for every statistic above its
    threshold, and the groups compared that have no threshold.
    """
    thresholds = THRESHOLDS if thresholds is None else thresholds
    bad, missing = [], []
    for r in stats.itertuples(index=False):
        key = (r.family, r.route, r.kind, r.property)
        t = thresholds.get(key)
        if t is None:
            missing.append(" / ".join(key) + f" (n={r.n})")
            continue
        for stat, limit in (("median_abs", t.median_abs), ("p90_abs", t.p90_abs)):
            v = getattr(r, stat)
            if v > limit:
                bad.append(f"{' / '.join(key)}: {stat} = {v:.3g} {r.unit} exceeds the threshold "
                           f"{limit:g} {r.unit} (n={r.n})")
    return bad, missing


# ----------------------------------------------------------------------------- report

def _md_table(df: pd.DataFrame, fmt: dict | None = None) -> str:
    fmt = fmt or {}
    head = "| " + " | ".join(str(c).replace("|", "/") for c in df.columns) + " |"
    sep = "|" + "|".join("---" for _ in df.columns) + "|"
    lines = [head, sep]
    for r in df.itertuples(index=False):
        cells = []
        for c, v in zip(df.columns, r):
            if isinstance(v, float):
                cells.append("—" if v != v else fmt.get(c, "{:.3g}").format(v))
            else:
                cells.append(str(v).replace("|", "/"))
        lines.append("| " + " | ".join(cells) + " |")
    return "\n".join(lines)


def parity_plots(comparisons: pd.DataFrame, out_dir: Path) -> list[Path]:
    """PNG parity plots (predicted against published) under ``out_dir``."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    out_dir = Path(out_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    c = comparisons[comparisons["status"] == "compared"]
    written = []
    markers = {"typical": "o", "minimum": "v", "band": "s"}
    for stem, (title, props) in PLOTS.items():
        sub = c[c["property"].isin(props)]
        if sub.empty:
            continue
        fig, ax = plt.subplots(figsize=(5.2, 5.0), dpi=110)
        for (fam, kind), g in sub.groupby(["family", "kind"]):
            label = f"{fam} ({kind})" if len(props) == 1 else None
            ax.scatter(g["published"], g["predicted"], s=22, marker=markers.get(kind, "o"), label=label,
                       alpha=0.8)
        if len(props) > 1:
            ax.clear()
            for p, g in sub.groupby("property"):
                ax.scatter(g["published"], g["predicted"], s=22, label=PROPERTIES[p][0], alpha=0.8)
        lo = float(np.nanmin([sub["published"].min(), sub["predicted"].min()]))
        hi = float(np.nanmax([sub["published"].max(), sub["predicted"].max()]))
        pad = 0.05 * (hi - lo if hi > lo else 1.0)
        ax.plot([lo - pad, hi + pad], [lo - pad, hi + pad], color="0.3", lw=1, label="predicted = published")
        unit = PROPERTIES[props[0]][1]
        ax.set_xlabel(f"published ({unit})")
        ax.set_ylabel(f"predicted ({unit})")
        ax.set_title(f"{title}: predicted against published (n={len(sub)})", fontsize=9)
        ax.set_xlim(lo - pad, hi + pad)
        ax.set_ylim(lo - pad, hi + pad)
        ax.set_aspect("equal")
        ax.grid(alpha=0.3)
        ax.legend(fontsize=6.5, loc="upper left")
        fig.tight_layout()
        path = out_dir / f"{stem}.png"
        fig.savefig(path, metadata={"Software": None})
        plt.close(fig)
        written.append(path)
    return written


def worst(compared: pd.DataFrame, n: int = 20) -> pd.DataFrame:
    """The ``n`` comparisons with the largest error relative to the published value, largest first.

    Ties (two rows with the same published and predicted value, e.g. the H1150M minimums of
    17-4PH and 15-5PH) are broken by file, line and property with a stable sort, so the
    listing does not depend on the order the comparisons arrive in.

    Example (two tied rows given in either order come out in file/line order):

    >>> import pandas as pd
    >>> c = pd.DataFrame({"file": ["b.csv", "a.csv", "a.csv"], "line": [3, 9, 2], "property": ["uts_mpa"] * 3,
    ...                   "published": [500.0, 500.0, 400.0], "abs_error": [50.0, 50.0, 10.0]})
    >>> [f"{r.file}:{r.line}" for r in worst(c).itertuples()]
    ['a.csv:9', 'b.csv:3', 'a.csv:2']
    >>> [f"{r.file}:{r.line}" for r in worst(c.iloc[::-1]).itertuples()]
    ['a.csv:9', 'b.csv:3', 'a.csv:2']
    """
    w = compared.assign(rel=compared["abs_error"] / compared["published"].abs().clip(lower=1e-9))
    return w.sort_values(["rel", "file", "line", "property"], ascending=[False, True, True, True],
                         kind="mergesort").head(n)


def render(comparisons: pd.DataFrame, stats: pd.DataFrame, plots: Sequence[Path], out_path: Path,
           sources: Sequence[str] = (), n_worst: int = 20) -> str:
    """The Markdown text of ``docs/validation.md``."""
    out_path = Path(out_path)
    violations, missing = check(stats)
    cases = comparisons.drop_duplicates("case")
    compared = comparisons[comparisons["status"] == "compared"]
    nm = comparisons[comparisons["status"] != "compared"]
    L = ["# Validation against published data", "",
         "Generated by `selector validate` (selector/validation/report.py); do not edit by hand.", "",
         "Every row of `data/reference/qt_steels.csv`, `data/reference/tempers_nonferrous.csv` and "
         "`data/reference/hardenability_bands.csv` is recomputed through `evaluate()` (or, for the "
         "Jominy H-bands, `selector.models.hardenability.jominy_curve_hrc`) and compared with the "
         "published value.  Error = predicted − published, in the property's unit.  Per family, route "
         "and kind of published value: n, the median and the 90th percentile (p90, linear "
         "interpolation) of the absolute error, and the median signed error (bias).", "",
         "**Caution.** The published sets are typical values, specification minimums or ranges of "
         "real material, many recalled rather than read (see each row's `confidence`).  These "
         "figures describe how far estimates for preliminary selection can be from handbook values; "
         "they are not design allowables.  Final choices need certified material test reports, the "
         "applicable design code and review by a qualified engineer.", "",
         "## How rows are recomputed", "",
         "* Q&T rows: `harden (quench[, austenitize_c]) → temper (temp_c, hours)` at the row's section "
         f"(a round).  Blank tempering time: {DEFAULT_TEMPER_HOURS:g} h.  Blank section: "
         f"{DEFAULT_SECTION_MM:g} mm round.  Blank quench: the grade's usual medium (the first one in "
         "`data/route_windows.csv`).  Properties at the ASTM A370 test location (centre up to 38 mm, "
         "mid-radius above).  Nominal composition.",
         "* Cold-work / temper / age rows: `cold_work designation=<condition>` (plus `reduction_pct` "
         "where the row records one), `anneal`, or `solution_treat [temp_c] → age [temp_c, hours] "
         "designation=<condition>`, at a 25.4 mm round.  A band's tensile range is compared at its "
         "mid-point; yield and elongation of minimum/band rows are compared with the minimum as printed.",
         "* Jominy rows: the H-band of e.g. 4140H is compared with the composition range of catalogue "
         "grade 4140 — nominal composition against the band mid-point, the lean corner (every alloying "
         "element at its minimum) against the band minimum, the rich corner against the band maximum.",
         "* Kind `minimum`: the model estimates typical properties, so a positive error of a few "
         "percent is expected there; compare the bias column.",
         "* **Calibration is not validation.**  A comparison is *calibration* when a fit used its "
         "published value, decided by a key join (selector/validation/calibration.py) against the rows "
         "every fit lists in `data/fits/*_rows.csv`, the fit points of `data/aging_calibration.csv` and "
         "the tempers that define `data/temper_aliases.csv` (same grade, quench, section within "
         f"{calibration.SECTION_TOL_MM:g} mm and tempering temperature within {calibration.TEMP_TOL_C:g} °C; "
         "or same grade and condition).  Every accuracy figure below (headline, error statistics, "
         "thresholds) is measured on the independent rows only; the calibration rows are reported apart "
         "as a check of the implementation.", "",
         "## Headline accuracy (independent rows only)", "",
         "Relative errors in % of the published value (strength, HB); Rockwell C and Jominy in HRC.  "
         "These are the figures quoted in the README.", "",
         _md_table(headline(comparisons).rename(columns={
             "n_calibration": "calibration rows left out", "median_abs": "median abs. error",
             "p90_abs": "p90 abs. error", "median_error": "median bias"}), {
             "median abs. error": "{:.1f}", "p90 abs. error": "{:.1f}", "median bias": "{:+.1f}"}), "",
         "## Summary", "",
         f"* reference rows: {len(cases)} ("
         + ", ".join(f"`{k}` {v}" for k, v in cases["file"].value_counts(sort=False).items()) + ")",
         f"* comparisons made: {len(compared)} (of {len(comparisons)} published values)",
         f"* rows or values not compared: {len(nm)} — listed below with the reason",
         f"* rows that failed with an undocumented error (a bug): "
         f"{comparisons.loc[comparisons['status'] == 'error', 'case'].nunique()}",
         f"* thresholds exceeded: {len(violations)}" + ("" if not violations else
                                                       " — " + "; ".join(violations)),
         f"* groups compared without a documented threshold: {len(missing)}"
         + ("" if not missing else " — " + "; ".join(missing)), ""]
    if plots:
        L += ["## Parity plots", ""]
        for p in plots:
            rel = Path(p).resolve().relative_to(out_path.resolve().parent).as_posix() \
                if Path(p).resolve().is_relative_to(out_path.resolve().parent) else str(p)
            L.append(f"![{Path(p).stem}]({rel})")
        L.append("")
    L += ["## Error statistics and thresholds (independent rows)", "",
          "A test (`tests/test_validation.py`, slow suite) fails when a median or p90 exceeds its "
          "threshold.  " + HEADROOM_NOTE, ""]
    if not stats.empty:
        t = stats.copy()
        t["property"] = [f"{PROPERTIES[p][0]} ({PROPERTIES[p][1]})" for p in stats["property"]]
        lim_med, lim_p90 = [], []
        for r in stats.itertuples(index=False):
            th = THRESHOLDS.get((r.family, r.route, r.kind, r.property))
            lim_med.append(th.median_abs if th else math.nan)
            lim_p90.append(th.p90_abs if th else math.nan)
        t["median limit"] = lim_med
        t["p90 limit"] = lim_p90
        t = t.drop(columns=["unit"])
        t = t.rename(columns={"n": "n independent", "median_abs": "median abs. error",
                              "p90_abs": "p90 abs. error", "median_error": "bias",
                              "n_calibration": "calibration rows (left out)"})
        for route, g in t.groupby("route", sort=False):
            L += [f"### route: {route}", "", _md_table(g.drop(columns=["route"]),
                                                       {c: "{:.1f}" for c in g.columns
                                                        if c not in ("n independent",
                                                                     "calibration rows (left out)")}), ""]
    cal = statistics(comparisons, rows="calibration")
    if not cal.empty:
        t = cal.drop(columns=["unit", "n_calibration"]).copy()
        t["property"] = [f"{PROPERTIES[p][0]} ({PROPERTIES[p][1]})" for p in cal["property"]]
        t = t.rename(columns={"n": "n calibration", "median_abs": "median abs. error",
                              "p90_abs": "p90 abs. error", "median_error": "bias"})
        L += ["### Calibration rows (a check of the implementation, not accuracy)", "",
              "The same statistics on the comparisons a fit has used.  Small errors here are expected and "
              "say nothing of predictive power.", "",
              _md_table(t, {c: "{:.1f}" for c in t.columns if c != "n calibration"}), ""]
    cv = cross_validation_table()
    if not cv.empty:
        L += ["### Leave-one-grade-out cross-validation of the fitted surfaces", "",
              "Written by each fit script (`scripts/fit_*.py` → `data/fits/*_cv.csv`): the surface refitted "
              "without one grade predicts that grade.", "",
              _md_table(cv, {"median_abs_error": "{:.1f}", "median_error": "{:+.1f}"}), ""]
    measured = {tuple(k) for k in stats[GROUP].itertuples(index=False, name=None)} if not stats.empty else set()
    th_rows = [{"family": k[0], "route": k[1], "kind": k[2],
                "property": f"{PROPERTIES[k[3]][0]} ({PROPERTIES[k[3]][1]})",
                "median limit": t.median_abs, "p90 limit": t.p90_abs,
                "compared in this run": "yes" if k in measured else "no"}
               for k, t in sorted(THRESHOLDS.items())]
    if th_rows:
        L += ["### Every documented threshold", "",
              "Groups marked *no* were not compared in this run (their rows are listed below as not "
              "compared); their thresholds apply as soon as they are.", "",
              _md_table(pd.DataFrame(th_rows), {"median limit": "{:g}", "p90 limit": "{:g}"}), ""]
    if not compared.empty:
        w = worst(compared, n_worst)
        w = w[["case", "grade", "route", "condition", "kind", "property", "published", "predicted", "error",
               "confidence"]].copy()
        w["property"] = [f"{PROPERTIES[p][0]} ({PROPERTIES[p][1]})" for p in w["property"]]
        L += [f"## The {len(w)} worst comparisons (largest error relative to the published value)", "",
              _md_table(w, {"published": "{:.0f}", "predicted": "{:.0f}", "error": "{:+.0f}"}), ""]
    if not nm.empty:
        g = nm.groupby(["case", "grade", "route", "condition", "status", "reason"], sort=False)["property"] \
            .apply(lambda s: ", ".join(x for x in s if x)).reset_index()
        L += ["## Not compared (not modelled, not catalogued, no prediction on that scale)", "",
              f"{g['case'].nunique()} rows; none is dropped silently.", "",
              _md_table(g.rename(columns={"property": "properties"})), ""]
    ass = comparisons[comparisons["assumptions"] != ""].drop_duplicates("case")
    if not ass.empty:
        counts = ass["assumptions"].str.split("; ").explode().value_counts()
        L += ["## Assumptions made to recompute rows", ""]
        L += [f"* {k} — {v} rows" for k, v in counts.items()]
        L.append("")
    L += ["## Sources", "", "Each row's source and table are in the reference files; the distinct "
          "sources compared here:", ""]
    L += [f"* {s}" for s in sources]
    return "\n".join(L) + "\n"


def cross_validation_table(root: Path | None = None) -> pd.DataFrame:
    """Pooled leave-one-grade-out figures of every fit, from ``data/fits/*_cv.csv``:
    per fit and property, the number of grades, of rows, and the median over grades of
    the median absolute and signed errors."""
    root = Path(root) if root is not None else data_dir()
    frames = []
    for path in sorted((root / "fits").glob("*_cv.csv")):
        frames.append(pd.read_csv(path, comment="#"))
    if not frames:
        return pd.DataFrame()
    cv = pd.concat(frames, ignore_index=True)
    out = cv.groupby(["fit", "property", "unit"], sort=True).agg(
        grades=("grade", "nunique"), rows=("n", "sum"), median_abs_error=("median_abs_error", "median"),
        median_error=("median_error", "median")).reset_index()
    return out


def _sources(cases: Sequence[Case]) -> list[str]:
    return sorted({f"{c.source} — {c.table}" for c in cases})


def run(out: Path | str = "docs/validation.md", figures: Path | str | None = None,
        root: Path | None = None) -> dict:
    """Recompute every reference row, write the Markdown report and the parity plots.

    Parameters
    ----------
    out : path
        The report (``docs/validation.md``).
    figures : path, optional
        Folder for the PNG plots (default ``<out without suffix>/``, i.e. ``docs/validation/``).
    root : path, optional
        Data folder (default ``data/``).

    Returns
    -------
    dict with ``comparisons``, ``statistics`` (DataFrames), ``violations``, ``undocumented``
    (lists of str), ``plots`` (paths), ``report`` (path).
    """
    out = Path(out)
    figures = Path(figures) if figures is not None else out.with_suffix("")
    cases = load_cases(root=root)
    comp = recompute(cases)
    stats = statistics(comp)
    plots = parity_plots(comp, figures)
    text = render(comp, stats, plots, out, _sources(cases))
    out.parent.mkdir(parents=True, exist_ok=True)
    tmp = out.with_name(out.name + ".tmp")
    tmp.write_text(text, encoding="utf-8")
    tmp.replace(out)
    bad, missing = check(stats)
    return {"comparisons": comp, "statistics": stats, "violations": bad, "undocumented": missing,
            "plots": plots, "report": out}
