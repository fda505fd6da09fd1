"""Helpers of the local page (``app.py``): display units, input checks that belong
to the page's widgets, the cached wrappers around the library, and chart builders
that turn DataFrames into Altair charts.

No physics and no selection logic live here: every number comes from
:func:`selector.selection.engine.prepare`, :func:`~selector.selection.engine.rank`,
:func:`~selector.selection.engine.nearest_misses` and :func:`selector.evaluate`.
The page only converts units for display (the library works in SI throughout),
draws, and keeps the expensive target-independent expansion in ``st.cache_data``
so that a change of targets only re-ranks.

The clevis-pin tab takes its stresses and targets from
:func:`selector.design.pins.pin_report` and its diameter sweep from
:func:`selector.design.sweep.diameter_sweep` (cached, run on a button press).

Results are estimates for preliminary selection; see :data:`selector.CAUTION`.
"""
from __future__ import annotations

import json
import math
from typing import Mapping, Sequence

import altair as alt
import numpy as np
import pandas as pd
import streamlit as st

import selector
from selector.catalogue.grades import FAMILIES
from selector.errors import DataFileError, InputError, SelectorError, safe_repr

# --------------------------------------------------------------------------- demo

def _demo() -> dict:
    """The page's default part, targets and service conditions: the invented
    scenario of ``docs/demo.md`` (``selector.design.pins.DEMO_CASE``), its targets
    from :func:`selector.design.pins.pin_targets`.  Falls back to a neutral round
    pin when that module is absent."""
    try:
        from selector.design.pins import DEMO_CASE, DEMO_PIN_KEYS, pin_targets
    except ImportError:
        return {"title": "Demo part: a plain round pin, Ø30 mm × 100 mm (neutral defaults)", "shape": "round",
                "diameter_mm": 30.0, "thickness_mm": 20.0, "length_mm": 100.0, "robust_only": False,
                "targets": {"min_yield_mpa": 700.0, "min_uts_mpa": 850.0, "min_elongation_pct": 12.0},
                "service": {}, "pin": None}
    c = DEMO_CASE
    # grip length of the double-shear pin: lug + two clevis arms + two gaps (docs/demo.md, step 2)
    grip_mm = c["lug_thickness_mm"] + 2 * c["clevis_thickness_mm"] + 2 * c["gap_mm"]
    return {"title": (f"Demo (invented scenario, demo data): {c['company']}, {c['part']}: "
                      f"Ø{c['diameter_mm']:g} mm pin, {c['load_kn']:g} kN design load in double shear, "
                      f"safety factor {c['safety_factor']:g}; see docs/demo.md"),
            "shape": "round", "diameter_mm": float(c["diameter_mm"]), "thickness_mm": 20.0,
            "length_mm": float(grip_mm), "robust_only": True,
            "targets": pin_targets(**{k: c[k] for k in DEMO_PIN_KEYS}),
            "service": {"plated": bool(c["plated"]), "plating": c["plating"],
                        "mating_material": c["mating_material"], "environment": c["environment"],
                        "service_temp_c": float(c["service_temp_c"])},
            "pin": {**{k: c[k] for k in DEMO_PIN_KEYS},
                    "sweep_diameters_mm": [float(v) for v in c["sweep_diameters_mm"]]}}


#: The page's default part and targets (see :func:`_demo`).
DEMO = _demo()

#: The notice shown on every view, after :data:`selector.CAUTION`.
DEFER_NOTICE = ("Parts chosen here can hurt people when they fail. Defer to the applicable design "
                "code and local regulations, certified material test reports for the actual heat, "
                "and review by a qualified, licensed engineer.")

# --------------------------------------------------------------------------- units

SI, US = "SI", "US customary"
UNIT_SYSTEMS = (SI, US)

MPA_PER_KSI = 6.894757   # 1 ksi = 6.894757 MPa (NIST SP 811, Appendix B.8, 'kip per square inch')
MM_PER_IN = 25.4         # exact by definition (NIST SP 811, Appendix B.8, 'inch')

N_PER_LBF = 4.4482216152605  # 1 lbf = 4.448 221 615 260 5 N, exact (NIST SP 811, Appendix B.9)

UNITS = {  # quantity -> (SI label, US label)
    "stress": ("MPa", "ksi"),
    "length": ("mm", "in"),
    "temperature": ("°C", "°F"),
    "force": ("kN", "lbf"),
}


def unit(quantity: str, system: str) -> str:
    """Display unit label of ``quantity`` (``stress``, ``length``, ``temperature``)."""
    si, us = UNITS[quantity]
    return us if system == US else si


def to_display(value, quantity: str, system: str):
    """An SI value (MPa, mm, °C, kN; scalar or array) in the display units of ``system``."""
    if value is None:
        return None
    v = np.asarray(value, float)
    if system == US:
        if quantity == "stress":
            v = v / MPA_PER_KSI
        elif quantity == "length":
            v = v / MM_PER_IN
        elif quantity == "temperature":
            v = v * 9.0 / 5.0 + 32.0
        elif quantity == "force":
            v = v * 1000.0 / N_PER_LBF
    return float(v) if v.ndim == 0 else v


def to_si(value, quantity: str, system: str):
    """A value typed in the display units of ``system`` back to SI (MPa, mm, °C, kN)."""
    if value is None:
        return None
    v = np.asarray(value, float)
    if system == US:
        if quantity == "stress":
            v = v * MPA_PER_KSI
        elif quantity == "length":
            v = v * MM_PER_IN
        elif quantity == "temperature":
            v = (v - 32.0) * 5.0 / 9.0
        elif quantity == "force":
            v = v * N_PER_LBF / 1000.0
    return float(v) if v.ndim == 0 else v


def quantity_of(name: str) -> str | None:
    """The quantity of an SI-suffixed column or parameter name, or None."""
    if name.endswith("_mpa"):
        return "stress"
    if name.endswith("_mm"):
        return "length"
    if name.endswith("_c") or name == "temp_c":
        return "temperature"
    return None


def display_name(name: str, system: str) -> str:
    """``yield_mpa`` -> ``yield_ksi`` in US units (column headers of the table)."""
    q = quantity_of(name)
    if q is None or system == SI:
        return name
    suffix = {"stress": "_ksi", "length": "_in", "temperature": "_f"}[q]
    return name[: name.rfind("_")] + suffix


#: page inputs that carry a unit: widget key -> quantity
UNIT_INPUTS = {"diameter": "length", "thickness": "length", "length": "length",
               "min_yield": "stress", "max_yield": "stress", "min_uts": "stress", "max_uts": "stress",
               "min_case_depth": "length", "service_temp": "temperature",
               # the clevis-pin section and its diameter sweep
               "pin_load": "force", "pin_diameter": "length", "pin_gap": "length", "pin_lug": "length",
               "pin_clevis": "length", "sweep_from": "length", "sweep_to": "length", "sweep_step": "length"}

#: digits kept when a unit switch converts an input
_DIGITS = {("stress", SI): 1, ("stress", US): 3, ("length", SI): 2, ("length", US): 4,
           ("temperature", SI): 1, ("temperature", US): 1, ("force", SI): 3, ("force", US): 1}


def convert_inputs(state: Mapping, old: str, new: str) -> dict:
    """New values of the unit-bearing inputs when the unit system changes from
    ``old`` to ``new`` (blank inputs stay blank)."""
    out = {}
    if old == new:
        return out
    for key, q in UNIT_INPUTS.items():
        v = state.get(key)
        if v is None:
            continue
        si = to_si(v, q, old)
        out[key] = round(float(to_display(si, q, new)), _DIGITS[(q, new)])
    return out


#: decimals of the SI values the page passes to the library (and so of its cache keys): the
#: precision of the SI inputs (0.01 mm, 0.1 MPa, 0.1 °C), coarser than the US inputs' (0.0001 in,
#: 0.001 ksi, 0.1 °F).  A unit switch converts the inputs to the other system and back with
#: rounding (30 mm -> 1.1811 in -> 29.99994 mm); keyed on the rounded SI value, the switch finds
#: every result in the cache and recomputes nothing (units are display only).
SI_KEY_DIGITS = {"length": 2, "stress": 1, "temperature": 1, "force": 3}


def si_key(value, quantity: str):
    """An SI input rounded to :data:`SI_KEY_DIGITS` (None stays None)."""
    if value is None:
        return None
    return round(float(value), SI_KEY_DIGITS[quantity])


def si_targets(targets: Mapping) -> dict:
    """SI targets with the unit-bearing values rounded by :func:`si_key` (the others unchanged)."""
    out = dict(targets)
    for key, (_w, q, _label) in TARGET_FIELDS.items():
        if q and out.get(key) is not None:
            out[key] = si_key(out[key], q)
    return out


#: target key -> (page widget key, quantity or None, label)
TARGET_FIELDS = {
    "min_yield_mpa": ("min_yield", "stress", "Minimum yield strength"),
    "max_yield_mpa": ("max_yield", "stress", "Maximum yield strength"),
    "min_uts_mpa": ("min_uts", "stress", "Minimum tensile strength"),
    "max_uts_mpa": ("max_uts", "stress", "Maximum tensile strength"),
    "min_elongation_pct": ("min_elong", None, "Minimum elongation (%)"),
    "min_hardness_hrc": ("min_hrc", None, "Minimum hardness (HRC)"),
    "max_hardness_hrc": ("max_hrc", None, "Maximum hardness (HRC)"),
    "min_surface_hardness_hrc": ("min_surface_hrc", None, "Minimum surface hardness (HRC)"),
    "min_case_depth_mm": ("min_case_depth", "length", "Minimum case depth"),
    "max_relative_cost": ("max_cost", None, "Maximum relative cost per kg"),
}

#: library field -> (page label, quantity) for error messages
FIELD_LABELS = {k: (lab, q) for k, (_, q, lab) in TARGET_FIELDS.items()}
FIELD_LABELS.update({"diameter_mm": ("Diameter", "length"), "thickness_mm": ("Plate thickness", "length"),
                     "length_mm": ("Part length", "length"), "families": ("Families", None)})


def targets_from_inputs(values: Mapping, system: str, families: Sequence[str] | None = None,
                        corrosion_resistant: bool = False) -> dict:
    """SI targets for the library from the page's inputs (widget key -> value in the
    display units; blank = no target).  ``families`` is passed only when it narrows
    the catalogue."""
    t = {}
    for key, (wkey, q, _) in TARGET_FIELDS.items():
        v = values.get(wkey)
        if v is None:
            continue
        t[key] = float(to_si(v, q, system)) if q else float(v)
    if families is not None and set(families) != set(FAMILIES):
        t["families"] = list(families)
    if corrosion_resistant:
        t["corrosion_resistant"] = True
    return t


def explain(exc: Exception, system: str, labels: Mapping | None = None) -> str:
    """The library's message, led by the page's name of the field and the value in
    the units the user typed (``Diameter = 0.01 in (0.254 mm): diameter_mm=0.254 …``).
    ``labels``: library field -> (page label, quantity); default the main inputs'."""
    msg = str(exc)
    labels = FIELD_LABELS if labels is None else labels
    if isinstance(exc, InputError) and exc.field in labels:
        label, q = labels[exc.field]
        v = exc.value
        if q and isinstance(v, (int, float)) and not isinstance(v, bool) and system == US:
            shown = f"{to_display(v, q, system):.4g} {unit(q, system)} ({v:.4g} {unit(q, SI)})"
        elif q and isinstance(v, (int, float)) and not isinstance(v, bool):
            shown = f"{v:.4g} {unit(q, SI)}"
        else:
            shown = safe_repr(v)
        return f"{label} = {shown}: {msg}"
    return msg


def check_families(families: Sequence[str]) -> str | None:
    """A message when no family is chosen (the page's own multiselect), else None."""
    if not families:
        return ("Families: none chosen; allowed: one or more of " + ", ".join(FAMILIES))
    return None


def read_price_sheet(data: bytes | str | None, name: str = "price sheet") -> tuple[dict | None, str | None]:
    """Read an uploaded or pasted price sheet with the library's user-file reader
    (:func:`selector.user_files.load_price_sheet`: UTF-8 check with the line and column
    of a bad byte, then the price-sheet schema).  Pasted text is passed as its UTF-8
    bytes (a ``str`` would be taken for a path).

    Returns ``(prices, None)``, or ``(None, message)`` with the
    :class:`~selector.errors.DataFileError` text (file, line, column) when it is
    bad, so that nothing of a bad sheet is applied.  Empty input gives ``(None, None)``.
    """
    if data is None or (isinstance(data, (bytes, str)) and not data.strip()):
        return None, None
    from selector import user_files as studies

    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    try:
        return studies.load_price_sheet(raw, name), None
    except (DataFileError, SelectorError) as exc:
        return None, str(exc)


# --------------------------------------------------------------------------- cached library calls

def _prices(price_items) -> dict | None:
    return dict(price_items) if price_items else None


@st.cache_data(show_spinner="Expanding the catalogue over every process window…", max_entries=8)
def cached_prepare(diameter_mm, thickness_mm, length_mm, price_items=()) -> pd.DataFrame:
    """:func:`~selector.selection.engine.prepare`, cached per section, length and
    price sheet (``price_items``: sorted ``(grade, price)`` pairs)."""
    from selector.selection.engine import prepare
    return prepare(diameter_mm, thickness_mm, length_mm, _prices(price_items))


@st.cache_data(show_spinner="Ranking…", max_entries=64)
def cached_rank(diameter_mm, thickness_mm, length_mm, price_items, targets_json, robust_only=False,
                min_p_meet=0.9, allow=(), service_json="{}"):
    """:func:`~selector.selection.engine.rank` on the cached prepared table
    (``targets_json``: the SI targets as sorted JSON, so the cache key is stable;
    ``allow``: a tuple of caution codes; ``service_json``: the caution context as
    JSON, see :func:`service_context`)."""
    from selector.selection.engine import rank
    prepared = cached_prepare(diameter_mm, thickness_mm, length_mm, price_items)
    return rank(prepared, json.loads(targets_json), robust_only=robust_only, min_p_meet=min_p_meet,
                allow=list(allow), service=json.loads(service_json) or None)


@st.cache_data(show_spinner="Looking for what can be reached…", max_entries=16)
def cached_miss_analysis(diameter_mm, thickness_mm, length_mm, price_items, targets_json, n=10) -> dict:
    """:func:`~selector.selection.engine.miss_analysis`, cached."""
    from selector.selection.engine import miss_analysis
    return miss_analysis(json.loads(targets_json), diameter_mm, thickness_mm=thickness_mm,
                         length_mm=length_mm, price_sheet=_prices(price_items), n=n)


@st.cache_data(show_spinner="Looking for the nearest misses…", max_entries=16)
def cached_nearest_misses(diameter_mm, thickness_mm, length_mm, price_items, targets_json, n=10):
    """:func:`~selector.selection.engine.nearest_misses`, cached."""
    from selector.selection.engine import nearest_misses
    return nearest_misses(json.loads(targets_json), diameter_mm, thickness_mm=thickness_mm,
                          length_mm=length_mm, price_sheet=_prices(price_items), n=n)


@st.cache_data(show_spinner=False, max_entries=64)
def cached_variant_states(diameter_mm, thickness_mm, length_mm, price_items, variants: tuple) -> pd.DataFrame:
    """The rows of the prepared table that belong to ``variants`` (every corner and
    every value of the main parameter): the reachable region of each candidate."""
    prepared = cached_prepare(diameter_mm, thickness_mm, length_mm, price_items)
    cols = [c for c in ("variant", "grade", "route", "corner", "main_value", "yield_mpa", "uts_mpa",
                        "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
                        "case_depth_mm") if c in prepared.columns]
    sub = prepared.loc[prepared["variant"].isin(list(variants)), cols]
    return sub.reset_index(drop=True)


@st.cache_data(show_spinner=False, max_entries=128)
def cached_evaluate(grade: str, route_json: str, diameter_mm, thickness_mm, composition="nominal",
                    heat_json: str | None = None) -> dict:
    """:func:`selector.evaluate` of one candidate (``route_json``: its steps as JSON;
    ``heat_json``: a heat analysis as JSON, element → wt %)."""
    return selector.evaluate(grade, json.loads(route_json), diameter_mm=diameter_mm,
                             thickness_mm=thickness_mm, composition=composition,
                             heat_composition=None if heat_json is None else json.loads(heat_json))


def read_heat(text: str | None) -> tuple[str | None, str | None]:
    """The heat-analysis field: ``(heat_json, None)``, ``(None, None)`` when blank, or
    ``(None, message)`` naming the element, its value and what is allowed."""
    if text is None or not str(text).strip():
        return None, None
    from ..catalogue.heat import parse_heat_text

    try:
        return json.dumps(parse_heat_text(text, "heat analysis"), sort_keys=True), None
    except SelectorError as exc:
        return None, str(exc)


def band_text(ev: Mapping, system: str) -> str:
    """One line with the 90 % prediction band of each estimate, in display units."""
    parts = []
    for key, label, q in (("yield_mpa", "yield", "stress"), ("uts_mpa", "tensile", "stress"),
                          ("elongation_pct", "elongation", None), ("hardness_hrc", "hardness", None)):
        lo, hi = ev.get(key + "_lo"), ev.get(key + "_hi")
        if lo is None or hi is None:
            continue
        if q:
            lo, hi, u = to_display(lo, q, system), to_display(hi, q, system), unit(q, system)
        else:
            u = "%" if key == "elongation_pct" else "HRC"
        nd = 1 if key in ("elongation_pct", "hardness_hrc") else 0
        parts.append(f"{label} {lo:.{nd}f}–{hi:.{nd}f} {u}")
    return ("90 % band (the range that held 90 % of independent published values for similar states): "
            + "; ".join(parts)) if parts else ""


#: columns the caution rules read (selector.rules.cautions), when present
CAUTION_COLUMNS = ("grade", "family", "route_family", "quench", "temper_temp_c", "age_temp_c", "peak_ratio",
                   "designation", "c_pct", "hardness_hrc", "surface_hardness_hrc", "uts_mpa")


ENVIRONMENTS = ("harsh", "normal", "controlled")


def service_context(plated: bool, plating: str | None, mating_material: str | None, environment: str,
                    service_temp_c: float | None) -> dict:
    """The service conditions the caution rules read, blanks dropped."""
    ctx = {"plated": bool(plated), "environment": environment}
    if plated and plating and plating.strip():
        ctx["plating"] = plating.strip()
    if mating_material and mating_material.strip():
        ctx["mating_material"] = mating_material.strip()
    if service_temp_c is not None:
        ctx["service_temp_c"] = float(service_temp_c)
    return ctx


def check_service(context: Mapping) -> str | None:
    """The library's message when the service conditions are not valid (an unknown
    mating material, say), else None."""
    from selector.rules.cautions import check_context

    try:
        check_context(context, "service")
    except SelectorError as exc:
        return f"Service conditions: {exc}"
    return None


def candidate_cautions(row: Mapping, warnings: Sequence[str] = (), context: Mapping | None = None) -> list[str]:
    """Every caution of one candidate, without repeats: the route model's notes and
    ``evaluate`` warnings, then the rules of :mod:`selector.rules.cautions` (when
    that module is present) under the service ``context``, as ``title: reason``."""
    out = [w for w in warnings if w]
    notes = row.get("notes")
    if isinstance(notes, str) and notes:
        out += [n.strip() for n in notes.split(" | ") if n.strip()]
    try:
        from selector.rules.cautions import cautions_for
    except ImportError:
        cautions_for = None
    if cautions_for is not None:
        frame = pd.DataFrame([{c: row.get(c) for c in CAUTION_COLUMNS if c in row}])
        try:
            found = cautions_for(frame, **dict(context or {}))[0]
        except SelectorError:
            found = []
        out += [f"{c['title']}: {c['reason']}" for c in found]
    return list(dict.fromkeys(out))


def targets_key(targets: Mapping) -> str:
    return json.dumps(dict(targets), sort_keys=True)


def route_json(route) -> str:
    return json.dumps(list(route), sort_keys=True)


# --------------------------------------------------------------------------- candidate labels

ROUTE_SHORT = {"quench_temper": "harden+temper", "carburize": "carburize", "nitride": "nitride",
               "induction": "induction", "cold_work": "cold work", "age": "solution+age",
               "anneal": "anneal", "normalize": "normalize", "supply": "bar as supplied",
               "supply_induction": "bought bar + induction", "supply_nitride": "bought bar + nitride"}

PARAM_LABELS = {"temper_temp_c": "tempering temperature", "hours": "time at temperature",
                "reduction_pct": "cold reduction", "age_temp_c": "aging temperature",
                "age_hours": "aging time", "case_depth_mm": "case depth", "temp_c": "temperature"}

#: the page's own palette for candidates (ink-like hues, light enough to overlap)
PALETTE = ["#1b6f8a", "#c2571a", "#5b8c2a", "#8e3b74", "#b3922b", "#3f4fa3", "#a8323e", "#2f8f7b",
           "#6b5a3e", "#d07fa8", "#4d7ea8", "#7c8a1f", "#9b5fc0", "#c0873f", "#355c4a"]
TARGET_FILL = "#f1e6c8"
TARGET_STROKE = "#8a6d1e"


def param_label(name: str) -> str:
    return PARAM_LABELS.get(name, name.replace("_", " "))


def param_unit(name: str, system: str) -> str:
    q = quantity_of(name)
    if q:
        return unit(q, system)
    if name.endswith("hours"):
        return "h"
    if name.endswith("_pct"):
        return "%"
    return ""


def _variant_extra(row) -> str:
    q = row.get("quench") if hasattr(row, "get") else None
    if isinstance(q, str) and q:
        return f" ({q})"
    return ""


def label_candidates(cand: pd.DataFrame) -> pd.DataFrame:
    """Add ``id`` (C1, C2 … in the engine's order) and ``label`` (id, grade and a
    short route name) to a candidates table."""
    out = cand.reset_index(drop=True).copy()
    out.insert(0, "id", [f"C{i + 1}" for i in range(len(out))])
    out["label"] = [f"{i} {g} · {ROUTE_SHORT.get(r, r)}{_variant_extra(row)}"
                    for i, g, r, (_, row) in zip(out["id"], out["grade"], out["route_family"], out.iterrows())]
    return out


# --------------------------------------------------------------------------- table for display

def _fmt_window(lo, hi, param, system) -> str:
    if lo is None or hi is None or lo != lo or hi != hi or not param:
        return ""
    q = quantity_of(param)
    if q:
        lo, hi = to_display(lo, q, system), to_display(hi, q, system)
    u = param_unit(param, system)
    if hi > lo:
        return f"{param_label(param)} {lo:.4g}–{hi:.4g} {u}".strip()
    return f"{param_label(param)} {lo:.4g} {u} only".strip()


def _convert_ranges(text, param, system) -> str:
    """``"200–250; 380–560"`` of a parameter in SI -> the same ranges in display units."""
    q = quantity_of(param) if param else None
    if not isinstance(text, str) or not text or not q:
        return text if isinstance(text, str) else ""
    out = []
    for part in text.split("; "):
        nums = [f"{float(to_display(float(v), q, system)):.4g}" for v in part.split("–")]
        out.append("–".join(nums))
    return "; ".join(out) + f" {param_unit(param, system)}"


def display_table(cand: pd.DataFrame, system: str) -> pd.DataFrame:
    """The candidates with the columns of ``select`` in the display units (headers
    renamed, e.g. ``yield_ksi``); the route as JSON text; the window columns
    converted row by row according to their parameter."""
    df = cand.copy()
    if system == US and "route" in df:
        df["route_text"] = [route_line(r, system) if isinstance(r, (list, tuple)) else t
                            for r, t in zip(df["route"], df["route_text"])]
    if "route" in df:
        df["route"] = [route_json(r) if isinstance(r, (list, tuple)) else str(r) for r in df["route"]]
    if system == US and "window_parameter" in df:
        params = df["window_parameter"].astype(str).tolist()
        if "window_min" in df and "window_max" in df:
            df["window"] = [_fmt_window(lo, hi, p, system) for lo, hi, p in zip(df["window_min"], df["window_max"],
                                                                                   params)]
            if "feasible_min" in df:
                none = (df["window_min"].isna() & df["feasible_min"].notna()).to_numpy()
                for i in np.flatnonzero(none):
                    feas = _fmt_window(df["feasible_min"].iloc[i], df["feasible_max"].iloc[i], params[i], system)
                    df.iloc[i, df.columns.get_loc("window")] = (
                        f"none clear of avoid cautions (targets met at {feas})")
        df["window_unit"] = [param_unit(p, system) for p in params]
        if "sub_windows" in df:
            df["sub_windows"] = [_convert_ranges(txt, p, system) for txt, p in zip(df["sub_windows"], params)]
        for col in ("main_value", "window_min", "window_max", "robust_window_min", "robust_window_max",
                    "feasible_min", "feasible_max"):
            if col not in df:
                continue
            vals = df[col].to_numpy(float).copy()
            for i, p in enumerate(params):
                q = quantity_of(p)
                if q and vals[i] == vals[i]:
                    vals[i] = to_display(vals[i], q, system)
            df[col] = vals
    if "p_meet" in df:
        pos = list(df.columns).index("p_meet")
        df.insert(pos + 1, "p_meet_pct", (100.0 * df["p_meet"].to_numpy(float)).round(1))
    rename = {}
    for col in df.columns:
        q = quantity_of(col)
        if q and system == US and pd.api.types.is_numeric_dtype(df[col]):
            df[col] = to_display(df[col].to_numpy(float), q, system)
            rename[col] = display_name(col, system)
    return df.rename(columns=rename)


def avoid_rules() -> list[str]:
    """Codes of the caution rules of severity ``avoid`` (for the page's allow list)."""
    from selector.rules.cautions import AVOID_CODES
    return list(AVOID_CODES)


def avoid_rule_label(code: str) -> str:
    """The title of a caution rule (its code when unknown)."""
    from selector.rules.cautions import CAUTIONS
    c = CAUTIONS.get(code)
    return c.title if c is not None else code


def percent(p) -> str:
    """A probability as a percentage for display (``0.905`` -> ``"90.5 %"``, NaN -> ``"—"``)."""
    try:
        v = float(p)
    except (TypeError, ValueError):
        return "—"
    return "—" if v != v else f"{100.0 * v:.1f} %"


def ranking_summary(cand: pd.DataFrame) -> str:
    """One line on the candidates table: how many, the Pareto set and its objectives,
    how many reach the required probability, how many carry an avoid caution."""
    n = len(cand)
    p_req = float(cand["min_p_meet"].iloc[0]) if n and "min_p_meet" in cand else 0.9
    n_avoid = int((cand["avoid"] != "").sum()) if "avoid" in cand else 0
    return (f"**{n}** candidates meet the targets: **{int(cand['pareto'].sum())}** in the Pareto set "
            f"(min part cost, max probability of meeting the targets, max elongation), "
            f"**{int(cand['robust'].sum())}** meet them with a probability of at least {percent(p_req)} "
            f"(heats within the specification and the model's 90 % band), **{n_avoid}** carry an avoid "
            f"caution and are listed last.")


def to_csv(df: pd.DataFrame) -> bytes:
    """The table as UTF-8 CSV, text cells that could start a spreadsheet formula
    neutralised (:func:`selector.views.export.neutralise`)."""
    from selector.views.export import to_csv_text

    return to_csv_text(df).encode("utf-8")


# --------------------------------------------------------------------------- region geometry (display)

def hull_band(x: np.ndarray, y: np.ndarray) -> pd.DataFrame:
    """The convex hull of points (x, y) as a band: at each hull vertex abscissa,
    the lower and upper edge (``x, lo, hi``) — a form an area mark can fill.

    Andrew's monotone chain (A.M. Andrew, Inf. Process. Lett. 9 (1979) 216) gives the
    lower and upper chains of the hull, both ordered by x, so the band is exact for
    the convex region.  A purely geometric display helper.
    """
    pts = np.column_stack([np.asarray(x, float), np.asarray(y, float)])
    pts = pts[np.isfinite(pts).all(axis=1)]
    if len(pts) == 0:
        return pd.DataFrame(columns=["x", "lo", "hi"])
    pts = np.unique(pts, axis=0)          # sorted by x then y
    if len(pts) == 1 or np.ptp(pts[:, 0]) == 0:
        xs = float(pts[0, 0])
        return pd.DataFrame({"x": [xs, xs], "lo": [pts[:, 1].min()] * 2, "hi": [pts[:, 1].max()] * 2})

    def turn(o, a, b):   # z of the cross product (a - o) x (b - o)
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    def chain(points):
        out = []
        for p in points:
            while len(out) >= 2 and turn(out[-2], out[-1], p) <= 0:
                out.pop()
            out.append(p)
        return np.array(out)

    lower = chain(pts)
    upper = chain(pts[::-1])[::-1]
    xs = np.unique(np.concatenate([lower[:, 0], upper[:, 0]]))
    lo = np.interp(xs, lower[:, 0], lower[:, 1])
    hi = np.interp(xs, upper[:, 0], upper[:, 1])
    return pd.DataFrame({"x": xs, "lo": np.minimum(lo, hi), "hi": np.maximum(lo, hi)})


def chart_frames(states: pd.DataFrame, cand: pd.DataFrame, y: str, system: str,
                 picked: str | None = None) -> dict:
    """Frames for :func:`strength_elongation_chart`: ``regions`` (hull band of each
    candidate's states, every corner and main-parameter value), ``paths`` (nominal
    corner along the main parameter, with text labels of the parameter value) and
    ``points`` (each candidate's chosen state).  ``y`` is ``yield_mpa`` or ``uts_mpa``."""
    regions, paths = [], []
    for _, c in cand.iterrows():
        s = states[states["variant"] == c["variant"]]
        band = hull_band(s["elongation_pct"], s[y])
        if len(band):
            band = band.assign(label=c["label"], id=c["id"], focus=c["id"] == picked)
            regions.append(band)
        nom = s[s["corner"] == "nominal"].dropna(subset=["elongation_pct", y])
        nom = nom.sort_values("main_value") if nom["main_value"].notna().any() else nom
        if len(nom):
            param = c.get("window_parameter") or ""
            q = quantity_of(param) if param else None
            mv = nom["main_value"].to_numpy(float)
            shown = to_display(mv, q, system) if q else mv
            u = param_unit(param, system)
            n = len(nom)
            focus = c["id"] == picked
            step = max(1, int(math.ceil(n / 14)))     # at most about 14 labels on the focus path
            keep = np.zeros(n, bool)
            if focus:
                keep[::step] = True
                keep[-1] = True
            text = [_param_text(v, q, u) if (k and v == v) else "" for v, k in zip(np.atleast_1d(shown), keep)]
            paths.append(pd.DataFrame({"x": nom["elongation_pct"].to_numpy(float),
                                       "y": nom[y].to_numpy(float), "order": np.arange(n),
                                       "text": text, "param": np.atleast_1d(shown),
                                       "label": c["label"], "id": c["id"], "focus": focus}))
    reg = pd.concat(regions, ignore_index=True) if regions else pd.DataFrame(columns=["x", "lo", "hi", "label", "id", "focus"])
    pth = pd.concat(paths, ignore_index=True) if paths else pd.DataFrame(
        columns=["x", "y", "order", "text", "param", "label", "id", "focus"])
    pts = pd.DataFrame({"x": cand["elongation_pct"].to_numpy(float), "y": cand[y].to_numpy(float),
                        "label": cand["label"], "id": cand["id"], "grade": cand["grade"],
                        "route": cand["route_text"], "window": cand.get("window", ""),
                        "set": np.where(cand["pareto"].astype(bool), "Pareto set", "meets targets"),
                        "cost": cand["relative_cost"].to_numpy(float)})
    for frame in (reg, pth, pts):
        for col in ("y", "lo", "hi"):
            if col in frame:
                frame[col] = to_display(frame[col].to_numpy(float), "stress", system)
    return {"regions": reg, "paths": pth, "points": pts}


def _param_text(v: float, q: str | None, u: str) -> str:
    if q == "temperature":
        return f"{v:.0f}°"
    if q == "length":
        return f"{v:.3g} {u}"
    return f"{v:.3g} {u}".strip()


def _domain(values, pad=0.06, floor=None):
    v = np.asarray([x for x in values if x is not None and x == x], float)
    if len(v) == 0:
        return [0.0, 1.0]
    lo, hi = float(v.min()), float(v.max())
    span = (hi - lo) or max(abs(hi), 1.0) * 0.1
    lo, hi = lo - pad * span, hi + pad * span
    if floor is not None:
        lo = max(lo, floor)
    return [lo, hi]


def strength_elongation_chart(frames: dict, targets: Mapping, y: str, system: str,
                              picked: str | None = None, height: int = 500) -> alt.Chart:
    """Strength (yield or tensile) against elongation: each candidate's reachable
    region (hull over corners and main-parameter values), its process path with the
    parameter values, the target region, and the chosen points (Pareto set filled)."""
    reg, pth, pts = frames["regions"], frames["paths"], frames["points"]
    su = unit("stress", system)
    ytitle = ("Yield strength" if y == "yield_mpa" else "Tensile strength") + f" ({su})"
    tmin = targets.get("min_" + y.replace("_mpa", "") + "_mpa")
    tmax = targets.get("max_" + y.replace("_mpa", "") + "_mpa")
    emin = targets.get("min_elongation_pct")
    ys = list(reg.get("lo", [])) + list(reg.get("hi", [])) + list(pts["y"])
    xs = list(reg.get("x", [])) + list(pts["x"])
    ys += [to_display(v, "stress", system) for v in (tmin, tmax) if v is not None]
    xs += [emin] if emin is not None else []
    xdom, ydom = _domain(xs, floor=0.0), _domain(ys, floor=0.0)
    labels = list(dict.fromkeys(list(pts["label"])))
    colour = alt.Color("label:N", title="candidate", scale=alt.Scale(domain=labels, range=PALETTE[:len(labels)]
                                                                     if len(labels) <= len(PALETTE) else None),
                       legend=alt.Legend(orient="right", symbolType="square", labelLimit=260, labelFontSize=11,
                                         symbolLimit=0))
    x = alt.X("x:Q", title="Elongation (%)", scale=alt.Scale(domain=xdom, nice=False))
    yy = alt.Y("y:Q", title=ytitle, scale=alt.Scale(domain=ydom, nice=False))

    box = pd.DataFrame({"x": [emin if emin is not None else xdom[0]], "x2": [xdom[1]],
                        "y": [to_display(tmin, "stress", system) if tmin is not None else ydom[0]],
                        "y2": [to_display(tmax, "stress", system) if tmax is not None else ydom[1]]})
    target = alt.Chart(box).mark_rect(fill=TARGET_FILL, opacity=0.55, stroke=TARGET_STROKE,
                                      strokeDash=[6, 3], strokeWidth=1.2).encode(
        x=alt.X("x:Q", scale=alt.Scale(domain=xdom, nice=False)), x2="x2:Q",
        y=alt.Y("y:Q", scale=alt.Scale(domain=ydom, nice=False)), y2="y2:Q")
    target_txt = alt.Chart(box).mark_text(align="right", baseline="bottom", dx=-6, dy=-4, color=TARGET_STROKE,
                                          fontStyle="italic").encode(
        x="x2:Q", y="y2:Q", text=alt.value("target region"))
    layers = [target, target_txt]
    if len(reg):
        layers.append(alt.Chart(reg).mark_area(line={"strokeWidth": 0.6}).encode(
            opacity=alt.condition("datum.focus", alt.value(0.32), alt.value(0.06)),
            x=alt.X("x:Q", scale=alt.Scale(domain=xdom, nice=False)), y=alt.Y("lo:Q", title=ytitle,
                                                                              scale=alt.Scale(domain=ydom,
                                                                                              nice=False)),
            y2="hi:Q", color=colour, detail="label:N",
            tooltip=[alt.Tooltip("label:N", title="candidate")]))
    if len(pth):
        layers.append(alt.Chart(pth).mark_line(point=alt.OverlayMarkDef(size=14, filled=True))
                      .encode(x=x, y=yy, order="order:Q", color=colour, detail="label:N",
                              strokeWidth=alt.condition("datum.focus", alt.value(2.6), alt.value(0.9)),
                              opacity=alt.condition("datum.focus", alt.value(1.0), alt.value(0.45)),
                              tooltip=[alt.Tooltip("label:N", title="candidate"),
                                       alt.Tooltip("param:Q", title="process value", format=".4g"),
                                       alt.Tooltip("x:Q", title="elongation %", format=".1f"),
                                       alt.Tooltip("y:Q", title=su, format=".4g")]))
        layers.append(alt.Chart(pth[pth["text"] != ""]).mark_text(dx=8, dy=-6, fontSize=11, align="left",
                                                                  fontWeight="bold")
                      .encode(x=x, y=yy, text="text:N", color=colour))
    shape = alt.Shape("set:N", title="", scale=alt.Scale(domain=["Pareto set", "meets targets"],
                                                        range=["diamond", "triangle-down"]))
    layers.append(alt.Chart(pts).mark_point(size=150, filled=True, stroke="#222222", strokeWidth=1.0)
                  .encode(x=x, y=yy, shape=shape, color=colour,
                          fillOpacity=alt.condition("datum.set == 'Pareto set'", alt.value(1.0), alt.value(0.25)),
                          tooltip=[alt.Tooltip("label:N", title="candidate"), alt.Tooltip("route:N"),
                                   alt.Tooltip("window:N"), alt.Tooltip("set:N", title="status"),
                                   alt.Tooltip("x:Q", title="elongation %", format=".1f"),
                                   alt.Tooltip("y:Q", title=su, format=".4g"),
                                   alt.Tooltip("cost:Q", title="relative cost/kg", format=".2f")]))
    layers.append(alt.Chart(pts).mark_text(dx=0, dy=-13, fontWeight="bold", fontSize=11)
                  .encode(x=x, y=yy, text="id:N", color=colour))
    if picked is not None and (pts["id"] == picked).any():
        layers.append(alt.Chart(pts[pts["id"] == picked]).mark_point(size=600, shape="circle", filled=False,
                                                                     strokeWidth=2.2, color="#111111")
                      .encode(x=x, y=yy))
    return alt.layer(*layers).properties(height=height).resolve_scale(color="shared")


def profile_frame(profiles: Mapping[str, list], system: str) -> pd.DataFrame:
    """Long frame of hardness profiles: ``label -> evaluate()["profile"]`` to columns
    ``label, depth, r_over_R, hardness_hv, hardness_hrc`` (depth in display units)."""
    rows = []
    for label, prof in profiles.items():
        for p in prof or []:
            rows.append({"label": label, "depth": to_display(p["depth_mm"], "length", system),
                         "r_over_R": p["r_over_R"], "hardness_hv": p["hardness_hv"],
                         "hardness_hrc": p.get("hardness_hrc")})
    return pd.DataFrame(rows, columns=["label", "depth", "r_over_R", "hardness_hv", "hardness_hrc"])


def profile_chart(frame: pd.DataFrame, system: str, labels: Sequence[str] | None = None,
                  height: int = 320, title: str = "Hardness across the section",
                  colours: Sequence[str] | None = None) -> alt.Chart:
    """Hardness (HV) against depth from the surface; one line per label on shared
    axes (colours: by candidate id unless given)."""
    labels = list(labels or dict.fromkeys(frame["label"]))
    colour = alt.Color("label:N", title="candidate",
                       scale=alt.Scale(domain=labels, range=list(colours or _colours_for(labels))),
                       legend=alt.Legend(orient="top", labelLimit=300, direction="horizontal", title=None))
    lu = unit("length", system)
    return alt.Chart(frame).mark_line(point=alt.OverlayMarkDef(size=22), strokeWidth=2).encode(
        x=alt.X("depth:Q", title=f"Depth below the surface ({lu}); centre at the right"),
        y=alt.Y("hardness_hv:Q", title="Hardness (HV)", scale=alt.Scale(zero=False)),
        color=colour,
        tooltip=[alt.Tooltip("label:N", title="candidate"), alt.Tooltip("depth:Q", format=".3g", title=lu),
                 alt.Tooltip("r_over_R:Q", format=".2f", title="r/R"),
                 alt.Tooltip("hardness_hv:Q", format=".0f", title="HV"),
                 alt.Tooltip("hardness_hrc:Q", format=".1f", title="HRC")],
    ).properties(height=height, title=title)


def _colours_for(labels: Sequence[str]) -> list:
    """Palette colours by candidate id (``C3 …`` -> the third colour), so a candidate
    keeps its colour in every chart."""
    out = []
    for lab in labels:
        try:
            i = int(str(lab).split()[0][1:]) - 1
        except ValueError:
            i = len(out)
        out.append(PALETTE[i % len(PALETTE)])
    return out


def parameter_frame(states: pd.DataFrame, variant: str, system: str) -> pd.DataFrame:
    """Properties of one variant along its main parameter, per corner, long form:
    ``param, corner, quantity, value`` (strengths in display units)."""
    s = states[states["variant"] == variant].dropna(subset=["main_value"])
    rows = []
    for q, col in (("yield", "yield_mpa"), ("tensile", "uts_mpa"), ("elongation", "elongation_pct")):
        if col not in s:
            continue
        v = s[col].to_numpy(float)
        if col.endswith("_mpa"):
            v = to_display(v, "stress", system)
        rows.append(pd.DataFrame({"main_value": s["main_value"].to_numpy(float), "corner": s["corner"].to_numpy(),
                                  "quantity": q, "value": v}))
    return pd.concat(rows, ignore_index=True) if rows else pd.DataFrame(
        columns=["main_value", "corner", "quantity", "value"])


def parameter_charts(frame: pd.DataFrame, param: str, window: tuple, robust_window: tuple,
                     targets: Mapping, system: str, chosen: float | None = None) -> list:
    """Two charts on the same x axis (strength, then elongation) against the main
    process parameter: the nominal
    composition as a line, the lean–rich spread as a band, the window that meets the
    targets shaded (darker where it holds at every composition corner), the targets
    as rules and the chosen value as a vertical mark."""
    q = quantity_of(param)
    f = frame.copy()
    if q:
        f["main_value"] = to_display(f["main_value"].to_numpy(float), q, system)

    def conv(v):
        return to_display(v, q, system) if (q and v is not None and v == v) else v
    pu = param_unit(param, system)
    xt = f"{param_label(param).capitalize()} ({pu})" if pu else param_label(param).capitalize()
    xdom = _domain(f["main_value"], pad=0.02)
    x = alt.X("main_value:Q", title=xt, scale=alt.Scale(domain=xdom, nice=False))
    spread = f.pivot_table(index=["main_value", "quantity"], values="value", aggfunc=["min", "max"]).reset_index()
    spread.columns = ["main_value", "quantity", "lo", "hi"]
    nominal = f[f["corner"] == "nominal"]
    su = unit("stress", system)
    panels = []
    for qty, title, tkeys, qcol in ((("yield", "tensile"), f"Strength ({su})",
                                     ("min_yield_mpa", "max_yield_mpa", "min_uts_mpa", "max_uts_mpa"), "stress"),
                                    (("elongation",), "Elongation (%)", ("min_elongation_pct",), None)):
        sp = spread[spread["quantity"].isin(qty)]
        nm = nominal[nominal["quantity"].isin(qty)]
        layers = []
        if window and window[0] == window[0] and window[0] is not None:
            layers.append(alt.Chart(pd.DataFrame({"a": [conv(window[0])], "b": [conv(window[1])]}))
                          .mark_rect(color="#cfe3d6", opacity=0.7).encode(
                x=alt.X("a:Q", scale=alt.Scale(domain=xdom, nice=False)), x2="b:Q"))
        if robust_window and robust_window[0] == robust_window[0] and robust_window[0] is not None:
            layers.append(alt.Chart(pd.DataFrame({"a": [conv(robust_window[0])], "b": [conv(robust_window[1])]}))
                          .mark_rect(color="#8fbf9f", opacity=0.6).encode(
                x=alt.X("a:Q", scale=alt.Scale(domain=xdom, nice=False)), x2="b:Q"))
        qrange = {"yield": "#1b6f8a", "tensile": "#c2571a", "elongation": "#5b8c2a"}
        qcolour = alt.Color("quantity:N", title=None,
                            scale=alt.Scale(domain=list(qty), range=[qrange[k] for k in qty]),
                            legend=alt.Legend(orient="top", direction="horizontal"))
        ytitle = title
        layers.append(alt.Chart(sp).mark_area(opacity=0.22).encode(
            x=x, y=alt.Y("lo:Q", title=ytitle, scale=alt.Scale(zero=False)), y2="hi:Q", color=qcolour))
        layers.append(alt.Chart(nm).mark_line(strokeWidth=2, point=alt.OverlayMarkDef(size=16)).encode(
            x=x, y=alt.Y("value:Q", title=ytitle, scale=alt.Scale(zero=False)), color=qcolour,
            tooltip=[alt.Tooltip("main_value:Q", title=xt, format=".4g"), alt.Tooltip("quantity:N"),
                     alt.Tooltip("value:Q", format=".4g")]))
        rules = []
        for k in tkeys:
            v = targets.get(k)
            if v is not None:
                rules.append({"v": to_display(v, qcol, system) if qcol else v,
                              "t": k.replace("_mpa", "").replace("_pct", "").replace("_", " ")})
        if rules:
            rf = pd.DataFrame(rules)
            layers.append(alt.Chart(rf).mark_rule(color=TARGET_STROKE, strokeDash=[5, 3]).encode(y="v:Q"))
            layers.append(alt.Chart(rf).mark_text(align="left", dx=4, dy=-5, color=TARGET_STROKE, fontSize=10)
                          .encode(y="v:Q", x=alt.value(2), text="t:N"))
        if chosen is not None and chosen == chosen:
            layers.append(alt.Chart(pd.DataFrame({"c": [conv(chosen)]})).mark_rule(color="#111111", strokeWidth=1.5)
                          .encode(x=alt.X("c:Q", scale=alt.Scale(domain=xdom, nice=False))))
        panels.append(alt.layer(*layers).properties(height=210 if qcol else 170))
    return panels


def comparison_frame(cand: pd.DataFrame, ids: Sequence[str], system: str) -> pd.DataFrame:
    """Properties of the chosen candidates in long form for the shared-axis bars:
    ``label, group, quantity, value`` (strengths in display units)."""
    sub = cand[cand["id"].isin(list(ids))]
    rows = []
    su = unit("stress", system)
    for _, r in sub.iterrows():
        for col, qty, group in (("yield_mpa", "yield", f"strength ({su})"), ("uts_mpa", "tensile", f"strength ({su})"),
                                ("elongation_pct", "elongation", "elongation (%)"),
                                ("hardness_hrc", "hardness", "hardness (HRC)"),
                                ("surface_hardness_hrc", "surface hardness", "hardness (HRC)"),
                                ("relative_cost", "per kg", "relative cost"),
                                ("part_cost", "per part", "relative cost")):
            v = r.get(col)
            if v is None or v != v:
                continue
            v = float(v)
            if col.endswith("_mpa"):
                v = float(to_display(v, "stress", system))
            rows.append({"label": r["label"], "id": r["id"], "group": group, "quantity": qty, "value": v})
    return pd.DataFrame(rows, columns=["label", "id", "group", "quantity", "value"])


#: colours of the compared candidates, by their place in the comparison
COMPARE_COLOURS = ["#1b6f8a", "#c2571a", "#5b8c2a"]


def comparison_bars(frame: pd.DataFrame, group: str, labels: Sequence[str], height: int = 240,
                    legend: bool = False) -> alt.Chart:
    """Grouped bars of one property group (e.g. strength) for the compared
    candidates, on one shared value axis."""
    f = frame[frame["group"] == group]
    labels = list(labels)
    return alt.Chart(f).mark_bar(cornerRadiusTopLeft=2, cornerRadiusTopRight=2).encode(
        x=alt.X("quantity:N", title=None, axis=alt.Axis(labelAngle=0)),
        xOffset=alt.XOffset("label:N", sort=labels),
        y=alt.Y("value:Q", title=group),
        color=alt.Color("label:N", title="candidate", sort=labels,
                        scale=alt.Scale(domain=labels, range=COMPARE_COLOURS[:len(labels)]),
                        legend=alt.Legend(orient="top", labelLimit=300, direction="horizontal", title=None)
                        if legend else None),
        tooltip=[alt.Tooltip("label:N", title="candidate"), "quantity:N", alt.Tooltip("value:Q", format=".4g")],
    ).properties(height=height)


def comparison_table(cand: pd.DataFrame, ids: Sequence[str], system: str) -> pd.DataFrame:
    """One column per chosen candidate, one row per property, in display units."""
    sub = cand.set_index("id").loc[list(ids)]
    su, lu = unit("stress", system), unit("length", system)
    rows = {
        "grade": sub["grade"], "family": sub["family"],
        "route": [route_line(r, system, t) for r, t in zip(sub["route"], sub["route_text"])],
        f"yield ({su})": to_display(sub["yield_mpa"].to_numpy(float), "stress", system),
        f"tensile ({su})": to_display(sub["uts_mpa"].to_numpy(float), "stress", system),
        "elongation (%)": sub["elongation_pct"], "hardness (HRC)": sub["hardness_hrc"],
        "surface hardness (HRC)": sub["surface_hardness_hrc"],
        f"case depth ({lu})": to_display(sub["case_depth_mm"].to_numpy(float), "length", system),
        "relative cost per kg": sub["relative_cost"], "relative cost per part": sub["part_cost"],
        "robust over composition": sub["robust"], "Pareto set": sub["pareto"],
        "process window": [_fmt_window(a, b, p, system) for a, b, p in
                           zip(sub["window_min"], sub["window_max"], sub["window_parameter"].astype(str))],
    }
    out = pd.DataFrame({k: list(v) for k, v in rows.items()}, index=sub.index).T
    out.columns = list(sub["label"])
    return out.astype(object).map(_cell)


def _cell(v):
    if isinstance(v, (bool, np.bool_)):
        return "yes" if v else "no"
    if isinstance(v, (float, np.floating)):
        return "—" if v != v else f"{v:.4g}"
    return v


# --------------------------------------------------------------------------- readable route

OP_TITLES = {"harden": "Austenitize and quench", "temper": "Temper", "normalize": "Normalize",
             "anneal": "Anneal", "carburize": "Carburize", "nitride": "Nitride (gas)",
             "induction_harden": "Induction harden", "cold_work": "Cold work",
             "solution_treat": "Solution treat", "age": "Age", "supply": "Buy bar",
             "stress_relieve": "Stress relieve"}


#: how a step parameter reads in a sentence: name -> (words before the value, kind)
STEP_WORDS = {"temp_c": ("at", "temperature"), "austenitize_c": ("from", "temperature"),
              "hours": ("for", "hours"), "quench": ("quench in", "text"), "agitation": ("agitation", "text"),
              "case_depth_mm": ("to a case depth of", "length"), "frequency_hz": ("at", "hz"),
              "surface_carbon_pct": ("to a surface carbon of", "wt%"), "reduction_pct": ("by", "%"),
              "designation": ("temper", "text")}


def route_steps(route: Sequence[Mapping], system: str) -> list[str]:
    """Readable numbered steps of a route, parameters in display units
    (``2. **Temper** at 1004 °F, for 2 h``)."""
    out = []
    for i, s in enumerate(route, 1):
        op = s.get("op", "?")
        bits = []
        for k, v in s.items():
            if k == "op":
                continue
            words, kind = STEP_WORDS.get(k, (k.replace("_", " "), "number"))
            if op == "supply":
                from selector.catalogue.supply import CONDITIONS
                bits.append(CONDITIONS.get(str(v), str(v)) if k == "condition" else f"({v})")
                continue
            if isinstance(v, bool) or not isinstance(v, (int, float)):
                bits.append(f"{words} {v}")
            elif kind == "temperature":
                bits.append(f"{words} {to_display(v, 'temperature', system):.0f} {unit('temperature', system)}")
            elif kind == "length":
                bits.append(f"{words} {to_display(v, 'length', system):.3g} {unit('length', system)}")
            elif kind == "hours":
                bits.append(f"{words} {v:.3g} h")
            elif kind == "hz":
                bits.append(f"{words} {v / 1000:.3g} kHz")
            else:
                bits.append(f"{words} {v:.3g} {kind if kind not in ('number', 'text') else ''}".strip())
        out.append(f"{i}. **{OP_TITLES.get(op, op)}**" + (" " + ", ".join(bits) if bits else ""))
    return out


def route_line(route: Sequence[Mapping], system: str, si_text: str | None = None) -> str:
    """One-line route text: the library's own text in SI, the same steps with
    temperatures and depths converted in US units."""
    if system == SI and si_text:
        return si_text
    parts = []
    for step in route_steps(route, system):
        parts.append(step.split(". ", 1)[1].replace("**", ""))
    return " → ".join(parts)


def miss_table(misses: pd.DataFrame, system: str) -> pd.DataFrame:
    """The nearest-miss report in display units (``move_*`` columns converted)."""
    df = misses.copy()
    if system == US and "route" in df:
        df["route_text"] = [route_line(r, system) for r in df["route"]]
    keep = [c for c in df.columns if c in ("grade", "family", "route_text", "miss_score") or c.startswith("move_")]
    keep += [c for c in ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "relative_cost") if c in df]
    if "p_meet" in df:
        df["p_meet_pct"] = (100.0 * df["p_meet"].to_numpy(float)).round(1)
        keep.append("p_meet_pct")
    df = df[keep]
    rename = {}
    for c in df.columns:
        q = quantity_of(c)
        if q and system == US:
            df[c] = to_display(df[c].to_numpy(float), q, system)
            rename[c] = display_name(c, system)
    return df.rename(columns=rename)


# --------------------------------------------------------------------------- clevis pin and diameter sweep

#: pin inputs of the page: widget key -> (argument of pin_report, quantity or None, page label)
PIN_FIELDS = {
    "pin_load": ("load", "force", "Pin load"),
    "pin_diameter": ("diameter_mm", "length", "Pin diameter"),
    "pin_lug": ("lug_thickness_mm", "length", "Lug thickness"),
    "pin_clevis": ("clevis_thickness_mm", "length", "Clevis arm thickness"),
    "pin_gap": ("gap_mm", "length", "Gap each side"),
    "pin_sf": ("safety_factor", None, "Safety factor"),
    "pin_wear_hrc": ("wear_surface_hardness_hrc", None, "Wear surface hardness (HRC)"),
}
#: every widget key of the pin inputs
PIN_INPUT_KEYS = tuple(PIN_FIELDS) + ("pin_planes", "pin_model")
#: the pin inputs that may not be blank (the wear hardness may)
PIN_REQUIRED = ("pin_load", "pin_diameter", "pin_lug", "pin_clevis", "pin_gap", "pin_sf")

#: targets the pin sets; "use these targets" replaces exactly these in the sidebar
PIN_TARGET_KEYS = ("min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc")

SHEAR_PLANE_LABELS = {2: "2 (double shear)", 1: "1 (single shear)"}
LOAD_MODEL_LABELS = {"uniform": "uniform bearing", "concentrated": "concentrated (conservative)"}

#: library field -> (page label, quantity) for the messages of the pin section
PIN_LABELS = {"load_kn": ("Pin load (kN)", None), "load_lbf": ("Pin load (lbf)", None),
              "diameter_mm": ("Pin diameter", "length"), "gap_mm": ("Gap each side", "length"),
              "lug_thickness_mm": ("Lug thickness", "length"),
              "clevis_thickness_mm": ("Clevis arm thickness", "length"),
              "shear_planes": ("Shear planes", None), "safety_factor": ("Safety factor", None),
              "wear_surface_hardness_hrc": ("Wear surface hardness (HRC)", None),
              "load_model": ("Bending model", None)}
#: ... and of the sweep (its select calls report the sidebar's targets by their labels)
SWEEP_LABELS = {**FIELD_LABELS, **PIN_LABELS, "diameter_mm": ("Sweep diameter", "length"),
                "diameters_mm": ("Sweep diameters", None), "start_mm": ("Sweep from", "length"),
                "stop_mm": ("Sweep to", "length"), "step_mm": ("Sweep step", "length")}

SWEEP_MODES = ("listed", "from / to / step")
#: most diameters one press of the page's button sweeps (the CLI ``selector sweep`` takes up to 200)
MAX_SWEEP_DIAMETERS = 25
#: seconds per diameter of the sweep on the demo case, measured here (0.6-0.8 s on 2 CPUs); the
#: button's estimate until a sweep of the session has measured its own
SWEEP_SECONDS_PER_DIAMETER = 0.8


def pin_case_from_inputs(values: Mapping, system: str) -> tuple[dict | None, list[str]]:
    """The load case for :func:`selector.design.pins.pin_report` from the pin inputs
    (widget key -> value in display units, plus ``pin_planes`` and ``pin_model``).

    Lengths go to mm; the load is passed as ``load_kn`` in SI and as ``load_lbf`` in
    US units (the library converts it).  Returns ``(case, [])``, or
    ``(None, messages)`` naming each blank required input and what is allowed.
    """
    msgs = []
    for key in PIN_REQUIRED:
        if values.get(key) is None:
            _, q, label = PIN_FIELDS[key]
            what = f"a value in {unit(q, system)}" if q else "a number in [1, 10]"
            msgs.append(f"{label}: blank; allowed: {what}")
    if msgs:
        return None, msgs
    case = {"shear_planes": values.get("pin_planes", 2), "load_model": values.get("pin_model", "uniform")}
    case["load_lbf" if system == US else "load_kn"] = float(values["pin_load"])
    for key in ("pin_diameter", "pin_lug", "pin_clevis", "pin_gap"):
        case[PIN_FIELDS[key][0]] = float(to_si(values[key], "length", system))
    case["safety_factor"] = float(values["pin_sf"])
    wear = values.get("pin_wear_hrc")
    case["wear_surface_hardness_hrc"] = None if wear is None else float(wear)
    return case, []


def pin_report_for(case: Mapping, system: str) -> tuple[dict | None, str | None]:
    """:func:`selector.design.pins.pin_report` of a load case: ``(report, None)``, or
    ``(None, message)`` led by the page's name of the field."""
    from selector.design.pins import pin_report
    try:
        return pin_report(**case), None
    except SelectorError as exc:
        return None, explain(exc, system, PIN_LABELS)


def pin_grip_mm(case: Mapping) -> float:
    """Grip length of the pin (lug + clevis arms + gaps), mm: the length the page
    uses for its mass (:func:`selector.design.sweep.pin_length_mm`)."""
    from selector.design.sweep import pin_length_mm
    return pin_length_mm(case["shear_planes"], case["lug_thickness_mm"], case["clevis_thickness_mm"],
                         case["gap_mm"])


def inputs_from_pin(report: Mapping, case: Mapping, system: str) -> dict:
    """Sidebar widget values that take over the pin's targets (the keys of
    :data:`PIN_TARGET_KEYS`; a target the pin does not set is cleared) and its
    section (round bar of the pin's diameter, the grip length), in display units."""
    t = report["targets"]
    out = {}
    for key in PIN_TARGET_KEYS:
        wkey, q, _ = TARGET_FIELDS[key]
        v = t.get(key)
        out[wkey] = None if v is None else (float(to_display(v, q, system)) if q else float(v))
    out["shape"] = "round bar"
    out["diameter"] = float(to_display(case["diameter_mm"], "length", system))
    out["length"] = float(to_display(pin_grip_mm(case), "length", system))
    return out


def pin_stress_table(report: Mapping, system: str) -> pd.DataFrame:
    """Stresses of the pin and the yield demand of each mode (x safety factor:
    bending, von Mises sqrt(3) x shear, bearing / k_bearing), in display units."""
    s, su = report["stresses"], unit("stress", system)
    rows = []
    for mode, col in (("shear", "shear_mpa"), ("bending", "bending_mpa"), ("bearing", "bearing_mpa")):
        rows.append({"mode": mode, f"stress ({su})": to_display(s[col], "stress", system),
                     f"yield demand ({su})": to_display(report["yield_candidates_mpa"][mode], "stress", system),
                     "governs": mode == report["governing"]})
    return pd.DataFrame(rows)


def format_lengths(values_mm: Sequence[float], system: str) -> str:
    """Diameters in mm as the comma-separated text of the sweep input (display units)."""
    return ", ".join(f"{to_display(float(v), 'length', system):.4g}" for v in values_mm)


def parse_lengths(text: str | None, system: str) -> tuple[list | None, str | None]:
    """The sweep's comma-separated diameters (display units) in mm: ``(values, None)``
    or ``(None, message)``."""
    allowed = f"diameters in {unit('length', system)} separated by commas, e.g. " + (
        "0.75, 1, 1.25" if system == US else "20, 25, 30")
    from selector.inputs import MAX_RANGE_VALUES

    if len(text or "") > 20 * MAX_RANGE_VALUES:
        return None, f"Sweep diameters: {len(text)} characters; allowed: {allowed} (at most {MAX_RANGE_VALUES})"
    parts = [p.strip() for p in (text or "").replace(";", ",").split(",") if p.strip()]
    if not parts:
        return None, f"Sweep diameters: blank; allowed: {allowed}"
    if len(parts) > MAX_RANGE_VALUES:
        return None, f"Sweep diameters: {len(parts)} values; allowed: {allowed} (at most {MAX_RANGE_VALUES})"
    out = []
    for p in parts:
        try:
            v = float(p)
        except ValueError:
            return None, f"Sweep diameters: {p!r} is not a number; allowed: {allowed}"
        if not math.isfinite(v) or v <= 0:
            return None, f"Sweep diameters: {p} is not a diameter; allowed: {allowed} (each > 0)"
        out.append(float(to_si(v, "length", system)))
    return out, None


def convert_length_text(text: str | None, old: str, new: str) -> str | None:
    """The sweep's diameter list converted on a unit switch; text that does not
    parse is left as typed."""
    values, msg = parse_lengths(text, old)
    if msg or old == new:
        return text
    return format_lengths(values, new)


def sweep_diameters(mode: str, text: str | None, start, stop, step, system: str) -> tuple[tuple, str | None]:
    """The sweep's diameters in mm from the listed text or from / to / step (display
    units): ``(diameters, None)`` or ``((), message)``; at most
    :data:`MAX_SWEEP_DIAMETERS`."""
    from selector.design.sweep import diameter_range
    if mode == SWEEP_MODES[0]:
        values, msg = parse_lengths(text, system)
        if msg:
            return (), msg
    else:
        blank = [lab for lab, v in (("Sweep from", start), ("Sweep to", stop), ("Sweep step", step)) if v is None]
        if blank:
            return (), f"{', '.join(blank)}: blank; allowed: a diameter in {unit('length', system)}"
        try:
            values = diameter_range(*(float(to_si(v, "length", system)) for v in (start, stop, step)))
        except SelectorError as exc:
            return (), explain(exc, system, SWEEP_LABELS)
    values = sorted({round(float(v), 6) for v in values})
    if len(values) > MAX_SWEEP_DIAMETERS:
        return (), (f"Sweep diameters: {len(values)} diameters; allowed: at most {MAX_SWEEP_DIAMETERS} on the "
                    f"page (about {SWEEP_SECONDS_PER_DIAMETER:g} s each); the command `selector sweep` "
                    "takes more")
    return tuple(values), None


def _route_of(cand: pd.DataFrame | None, grade: str, route_text: str) -> str:
    """The route steps (JSON, each step's keys in the library's order, so that the
    readable text keeps it) of the row of ``cand`` with this grade and route text."""
    if cand is None or not grade or len(cand) == 0:
        return ""
    hit = cand[(cand["grade"] == grade) & (cand["route_text"] == route_text)]
    return json.dumps(list(hit["route"].iloc[0])) if len(hit) else ""


@st.cache_data(show_spinner=False, max_entries=16)
def cached_sweep(diameters_mm: tuple, case_json: str, extra_json: str = "{}", price_items=(),
                 context_json: str = "{}") -> pd.DataFrame:
    """:func:`selector.design.sweep.diameter_sweep` of the load case (``case_json``:
    the keywords of ``pin_report`` but the diameter), with the sidebar's other
    targets (``extra_json``), the price sheet and the service conditions for the
    cautions.  Adds ``route`` (the pick's steps as JSON, for the route text in
    US units).  Cached per argument set: the sweep runs ``select`` once per diameter."""
    from selector.design.sweep import diameter_sweep
    from selector.selection.engine import select

    seen = {}

    def select_and_keep(targets, diameter_mm, **kw):
        cand = select(targets, diameter_mm, **kw)
        seen[float(diameter_mm)] = cand
        return cand

    extra = json.loads(extra_json) or None
    sw = diameter_sweep(list(diameters_mm), **json.loads(case_json), extra_targets=extra,
                        price_sheet=_prices(price_items), caution_context=json.loads(context_json),
                        select=select_and_keep)
    sw["route"] = [_route_of(seen.get(float(d)), g, t)
                   for d, g, t in zip(sw["diameter_mm"], sw["grade"], sw["route_text"])]
    return sw


def pick_label(grade: str, route_family: str) -> str:
    """``4140 · harden+temper`` (or ``no robust candidate``)."""
    if not grade:
        return "no robust candidate"
    return f"{grade} · {ROUTE_SHORT.get(route_family, route_family)}"


#: sweep columns shown on the page, in order
SWEEP_SHOWN = ["diameter_mm", "min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc", "governing",
               "n_robust", "grade", "family", "route_text", "yield_mpa", "uts_mpa", "surface_hardness_hrc",
               "hardness_hrc", "relative_cost", "part_cost", "changed", "cautions"]


def sweep_table(sw: pd.DataFrame, system: str) -> pd.DataFrame:
    """The sweep in display units: library column names (``diameter_in``,
    ``min_yield_ksi`` in US units), the route text in °F in US units."""
    df = sw.copy()
    if system == US and "route" in df:
        df["route_text"] = [route_line(json.loads(r), system) if r else t
                            for r, t in zip(df["route"], df["route_text"])]
    df = df[[c for c in SWEEP_SHOWN if c in df]]
    rename = {}
    for col in df.columns:
        q = quantity_of(col)
        if q and system == US:
            df[col] = to_display(df[col].to_numpy(float), q, system)
            rename[col] = display_name(col, system)
    return df.rename(columns=rename)


def sweep_chart(sw: pd.DataFrame, system: str, height: int = 340) -> alt.LayerChart:
    """Relative part cost of the cheapest robust pick (left axis) and the minimum
    yield target (right axis) against the pin diameter; each diameter where the pick
    changes grade or route is marked (◆, a dashed rule and the new pick's label),
    and the first pick is labelled.  Diameters with no robust candidate are marked
    ✕ at the foot of the chart."""
    lu, su = unit("length", system), unit("stress", system)
    f = pd.DataFrame({"d": to_display(sw["diameter_mm"].to_numpy(float), "length", system),
                      "cost": sw["part_cost"].to_numpy(float),
                      "target": to_display(sw["min_yield_mpa"].to_numpy(float), "stress", system),
                      "pick": [pick_label(g, r) for g, r in zip(sw["grade"], sw["route_family"])],
                      "route": sw["route_text"].astype(str), "changed": sw["changed"].to_numpy(bool)})
    f["starts"] = f["changed"] | (np.arange(len(f)) == 0)
    series = alt.Scale(domain=["part cost", "min yield target"], range=[PALETTE[0], TARGET_STROKE])
    colour = alt.Color("series:N", title=None, scale=series, legend=alt.Legend(orient="top", direction="horizontal"))
    x = alt.X("d:Q", title=f"Pin diameter ({lu})", scale=alt.Scale(domain=_domain(f["d"], pad=0.04), nice=False))
    have = f[f["cost"].notna()].assign(series="part cost")
    ycost = alt.Y("cost:Q", title="Relative part cost (cheapest robust pick)", scale=alt.Scale(zero=False))
    tips = [alt.Tooltip("d:Q", title=lu, format=".4g"), alt.Tooltip("pick:N"), alt.Tooltip("route:N"),
            alt.Tooltip("cost:Q", title="part cost", format=".3f"),
            alt.Tooltip("target:Q", title=f"min yield ({su})", format=".4g")]
    cost = alt.Chart(have).mark_line(strokeWidth=2.4, point=alt.OverlayMarkDef(size=40, filled=True)).encode(
        x=x, y=ycost, color=colour, tooltip=tips)
    starts = have[have["starts"]]
    marks = alt.Chart(starts[starts["changed"]]).mark_point(shape="diamond", size=260, filled=True,
                                                          stroke="#111111", strokeWidth=1.2).encode(
        x=x, y=ycost, color=colour, tooltip=tips)
    # labels alternate above and below the line, so that picks at close diameters do not overlap
    starts = starts.assign(above=np.arange(len(starts)) % 2 == 0)
    labels = [alt.Chart(starts[starts["above"] == up]).mark_text(
        align="left", dx=8, dy=-14 if up else 16, fontWeight="bold", fontSize=11, color="#222222").encode(
        x=x, y=ycost, text="pick:N") for up in (True, False)]
    rules = alt.Chart(f[f["changed"]]).mark_rule(strokeDash=[4, 3], color="#555555").encode(x=x)
    none = alt.Chart(f[f["cost"].isna()]).mark_point(shape="cross", size=120, color="#a8323e", filled=True).encode(
        x=x, y=alt.value(height - 8), tooltip=[alt.Tooltip("d:Q", title=lu, format=".4g"), alt.Tooltip("pick:N")])
    target = alt.Chart(f.assign(series="min yield target")).mark_line(strokeDash=[6, 3], strokeWidth=1.6,
                                                                      point=alt.OverlayMarkDef(size=18)).encode(
        x=x, y=alt.Y("target:Q", title=f"Min yield target ({su})", scale=alt.Scale(zero=False),
                     axis=alt.Axis(orient="right")),
        color=colour, tooltip=tips)
    left = alt.layer(rules, cost, marks, *labels, none)
    return alt.layer(left, target).resolve_scale(y="independent").properties(
        height=height, title="Cheapest robust pick per diameter (◆ where the grade or route changes)")


# --------------------------------------------------------------------------- nearest misses: what can be reached

def reachable_table(reach: pd.DataFrame, system: str) -> pd.DataFrame:
    """The best value of each target's property with the other targets met
    (:func:`~selector.selection.engine.miss_analysis`), in display units."""
    rows = []
    for r in reach.to_dict("records"):
        q = quantity_of(r["column"])

        def conv(v, q=q):
            if v is None or v != v or v == float("inf"):
                return None
            return float(to_display(v, q, system)) if q else float(v)
        label = FIELD_LABELS.get(r["target"], (r["target"], None))[0]
        rows.append({"target": label, "limit": conv(r["limit"]), "best reachable": conv(r["best"]),
                     "met": bool(r["met"]), "move": conv(r["move"]),
                     "by": (f"{r['grade']}, {route_line(r['route'], system, r['route_text'])}" if r["grade"]
                            else "no state meets the other targets")})
    return pd.DataFrame(rows)


def frontier_chart(frontier: pd.DataFrame, axes: Sequence[str], targets: Mapping, system: str,
                   height: int = 340):
    """The trade-off between the two most binding targets: the non-dominated states
    (:func:`~selector.selection.engine.miss_analysis`) as a step line with points, and the
    two target limits as dashed rules.  None when there is no frontier."""
    from selector.selection.targets import NUMERIC_TARGETS
    if frontier is None or len(frontier) == 0 or len(axes) != 2:
        return None
    (cx, _), (cy, _) = NUMERIC_TARGETS[axes[0]], NUMERIC_TARGETS[axes[1]]
    qx, qy = quantity_of(cx), quantity_of(cy)

    def conv(v, q):
        return to_display(np.asarray(v, float), q, system) if q else np.asarray(v, float)
    nx, ny = display_name(cx, system), display_name(cy, system)
    pm = frontier["p_meet"].to_numpy(float) if "p_meet" in frontier else np.full(len(frontier), np.nan)
    df = pd.DataFrame({"x": conv(frontier[cx], qx), "y": conv(frontier[cy], qy),
                       "grade": frontier["grade"].to_numpy(),
                       "route": [route_line(r, system, t) for r, t in zip(frontier["route"], frontier["route_text"])],
                       "p_meet": [percent(p) for p in pm]})
    enc_x = alt.X("x:Q", title=nx, scale=alt.Scale(zero=False))
    enc_y = alt.Y("y:Q", title=ny, scale=alt.Scale(zero=False))
    tips = [alt.Tooltip("grade:N"), alt.Tooltip("route:N"), alt.Tooltip("x:Q", title=nx, format=".4g"),
            alt.Tooltip("y:Q", title=ny, format=".4g"), alt.Tooltip("p_meet:N", title="p_meet")]
    line = alt.Chart(df).mark_line(interpolate="step-after", strokeWidth=1.5).encode(x=enc_x, y=enc_y)
    pts = alt.Chart(df).mark_point(filled=True, size=30).encode(x=enc_x, y=enc_y, tooltip=tips)
    layers = [line, pts]
    lx, ly = targets.get(axes[0]), targets.get(axes[1])
    if lx is not None:
        layers.append(alt.Chart(pd.DataFrame({"x": [float(conv(lx, qx))]}))
                      .mark_rule(strokeDash=[6, 3], color="firebrick").encode(x="x:Q"))
    if ly is not None:
        layers.append(alt.Chart(pd.DataFrame({"y": [float(conv(ly, qy))]}))
                      .mark_rule(strokeDash=[6, 3], color="firebrick").encode(y="y:Q"))
    return alt.layer(*layers).properties(
        height=height, title=f"What can be reached: {ny} against {nx} with the other targets met "
                             "(dashed: the targets)")


# --------------------------------------------------------------------------- pin capacity, fatigue through the depth

#: page label of each field of :func:`selector.design.capacity.pin_capacity`
CAPACITY_LABELS = {"hardness_hrc": ("Specified hardness (HRC)", None), "route": ("Route steps", None),
                   "route/hardness_hrc": ("Route or hardness", None), "grade": ("Pin grade", None)}


def capacity_for(case: Mapping, grade: str, steps_text: str | None, hardness_hrc, system: str
                 ) -> tuple[dict | None, str | None]:
    """:func:`selector.pin_capacity` for the pin tab's geometry (``case`` as from
    :func:`pin_case_from_inputs`; its load is not used), a grade and either route
    steps (``"harden quench=oil; temper temp_c=540"``) or a specified hardness.
    Returns ``(capacity, None)`` or ``(None, message)``."""
    from selector.views.cli import parse_step_text

    try:
        route = None
        if steps_text and steps_text.strip():
            route = [parse_step_text(s) for s in steps_text.split(";") if s.strip()]
        cap = selector.pin_capacity(grade, route, case["diameter_mm"], case.get("gap_mm", 0.0),
                                    case["lug_thickness_mm"], case["clevis_thickness_mm"],
                                    shear_planes=case.get("shear_planes", 2),
                                    safety_factor=case.get("safety_factor", 2.0), hardness_hrc=hardness_hrc,
                                    load_model=case.get("load_model", "uniform"))
        return cap, None
    except SelectorError as exc:
        return None, explain(exc, system, {**PIN_LABELS, **CAPACITY_LABELS})


def capacity_table(cap: Mapping, system: str) -> pd.DataFrame:
    """One row per mode: allowable load (display force unit) and whether it governs."""
    fu = unit("force", system)
    key = "lbf" if fu == "lbf" else "kn"
    return pd.DataFrame({"mode": ["shear", "bending", "bearing"],
                         f"allowable load ({fu})": [cap[f"{m}_{key}"] for m in ("shear", "bending", "bearing")],
                         "governing": [m == cap["governing"] for m in ("shear", "bending", "bearing")]})


def fatigue_depth_frame(ev: Mapping, system: str) -> pd.DataFrame:
    """Long frame of ``evaluate()["fatigue"]["through_depth"]`` for the chart: columns
    ``depth, curve, stress`` (``curve``: local fatigue strength, or the applied stress
    scaled so that it touches the strength at the governing depth)."""
    td = (ev.get("fatigue") or {}).get("through_depth")
    if not td:
        return pd.DataFrame(columns=["depth", "curve", "stress"])
    depth = to_display(np.asarray(td["depth_mm"], float), "length", system)
    strength = to_display(np.asarray(td["strength_mpa"], float), "stress", system)
    applied = to_display(np.asarray(td["stress_per_surface"], float) * td["allowable_surface_mpa"], "stress", system)
    return pd.concat([pd.DataFrame({"depth": depth, "curve": "local fatigue strength", "stress": strength}),
                      pd.DataFrame({"depth": depth, "curve": "applied stress at the allowable surface stress",
                                    "stress": applied})], ignore_index=True)


def fatigue_depth_chart(frame: pd.DataFrame, system: str, height: int = 300) -> alt.Chart:
    """Local fatigue strength and the applied (bending) stress against depth; they touch
    at the governing depth."""
    su, lu = unit("stress", system), unit("length", system)
    return alt.Chart(frame).mark_line(point=alt.OverlayMarkDef(size=18), strokeWidth=2).encode(
        x=alt.X("depth:Q", title=f"Depth below the surface ({lu})"),
        y=alt.Y("stress:Q", title=f"Stress amplitude ({su})"),
        color=alt.Color("curve:N", title=None, legend=alt.Legend(orient="top", labelLimit=400)),
        tooltip=[alt.Tooltip("curve:N"), alt.Tooltip("depth:Q", format=".3g", title=lu),
                 alt.Tooltip("stress:Q", format=".4g", title=su)],
    ).properties(height=height, title="Fatigue strength against the applied stress through the section")


def transformation_frame(ev: Mapping, system: str) -> pd.DataFrame:
    """Long frame for the time–temperature chart of a bath route (austemper, martemper) of
    one ``evaluate()`` result: the transformation start and finish curves of its
    composition (Li et al. 1998) and the surface and centre cooling paths into the bath.
    Columns ``time_s, temp, curve, kind`` (temp in display units; kind ``reaction`` or
    ``path``).  Empty for other routes."""
    from selector.catalogue.grades import default_catalogue
    from selector.routes.families import austemper as bath

    if ev.get("route_family") not in ("austemper", "martemper") or not ev.get("diameter_mm"):
        return pd.DataFrame(columns=["time_s", "temp", "curve", "kind"])
    g = default_catalogue().lookup(ev["grade"])
    comp = ev.get("heat_composition") or g.composition(ev.get("composition", "nominal")
                                                       if ev.get("composition") != "heat" else "nominal")
    p = ev["params"]
    tc = bath.transformation_curves(comp)
    rows = []
    for r in ("ferrite", "pearlite", "bainite"):
        for key in ("start", "finish"):
            t = tc[f"{r}_{key}_s"]
            ok = np.isfinite(t)
            rows.append(pd.DataFrame({"time_s": t[ok], "temp": to_display(tc["temp_c"][ok], "temperature", system),
                                      "curve": f"{r} {key}", "kind": "reaction"}))
    path = bath.cooling_path(comp, p["austenitize_c"], p["bath_c"], ev["diameter_mm"], p.get("hold_hours"))
    for where in ("surface", "centre"):
        rows.append(pd.DataFrame({"time_s": path["time_s"], "temp": to_display(path[f"{where}_c"], "temperature",
                                                                               system),
                                  "curve": f"{where} cooling path", "kind": "path"}))
    return pd.concat(rows, ignore_index=True)


def transformation_chart(frame: pd.DataFrame, system: str, height: int = 320) -> alt.Chart:
    """Transformation start/finish curves (solid) and the cooling paths (dashed) on a
    logarithmic time axis."""
    tu = unit("temperature", system)
    return alt.Chart(frame).mark_line(strokeWidth=2).encode(
        x=alt.X("time_s:Q", title="Time (s, log scale)", scale=alt.Scale(type="log")),
        y=alt.Y("temp:Q", title=f"Temperature ({tu})"),
        color=alt.Color("curve:N", title=None, legend=alt.Legend(orient="top", labelLimit=300)),
        strokeDash=alt.StrokeDash("kind:N", title=None, legend=None),
        tooltip=[alt.Tooltip("curve:N"), alt.Tooltip("time_s:Q", format=".3g", title="s"),
                 alt.Tooltip("temp:Q", format=".0f", title=tu)],
    ).properties(height=height, title="Transformation start and finish (Li et al. 1998) with the cooling path")
