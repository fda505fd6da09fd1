"""Words of the page: candidate labels, parameter names, the band line, the
cautions of a candidate, percentages and the ranking summary, and the route in
words in the chosen units."""
from __future__ import annotations

from typing import Mapping, Sequence

import pandas as pd
from selector.catalogue.supply import CONDITIONS
from selector.errors import SelectorError
from selector.rules.cautions import AVOID_CODES
from selector.rules.cautions import CAUTIONS
from selector.rules.cautions import cautions_for
from selector.views.export import to_csv_text

from .units import SI, quantity_of, to_display, unit

#: columns the caution rules read (selector.rules.cautions), when present
CAUTION_COLUMNS = ("grade", "family", "route_family", "quench", "temper_temp_c", "age_temp_c", "peak_ratio",
                   "designation", "c_pct", "hardness_hrc", "surface_hardness_hrc", "uts_mpa")

# --------------------------------------------------------------------------- candidate labels

ROUTE_SHORT = {"quench_temper": "harden+temper", "carburize": "carburize", "nitride": "nitride",
               "induction": "induction", "cold_work": "cold work", "age": "solution+age",
               "anneal": "anneal", "normalize": "normalize", "supply": "bar as supplied",
               "supply_induction": "bought bar + induction", "supply_nitride": "bought bar + nitride"}

PARAM_LABELS = {"temper_temp_c": "tempering temperature", "hours": "time at temperature",
                "reduction_pct": "cold reduction", "age_temp_c": "aging temperature",
                "age_hours": "aging time", "case_depth_mm": "case depth", "temp_c": "temperature"}

#: the page's own palette for candidates (ink-like hues, light enough to overlap)

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



def candidate_cautions(row: Mapping, warnings: Sequence[str] = (), context: Mapping | None = None) -> list[str]:
    """Every caution of one candidate, without repeats: the route model's notes and
    ``evaluate`` warnings, then the rules of :mod:`selector.rules.cautions` (when
    that module is present) under the service ``context``, as ``title: reason``."""
    out = [w for w in warnings if w]
    notes = row.get("notes")
    if isinstance(notes, str) and notes:
        out += [n.strip() for n in notes.split(" | ") if n.strip()]
    frame = pd.DataFrame([{c: row.get(c) for c in CAUTION_COLUMNS if c in row}])
    try:
        found = cautions_for(frame, **dict(context or {}))[0]
    except SelectorError:
        found = []
    out += [f"{c['title']}: {c['reason']}" for c in found]
    return list(dict.fromkeys(out))


def avoid_rules() -> list[str]:
    """Codes of the caution rules of severity ``avoid`` (for the page's allow list)."""
    return list(AVOID_CODES)


def avoid_rule_label(code: str) -> str:
    """The title of a caution rule (its code when unknown)."""
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

    return to_csv_text(df).encode("utf-8")


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


def pick_label(grade: str, route_family: str) -> str:
    """``4140 · harden+temper`` (or ``no robust candidate``)."""
    if not grade:
        return "no robust candidate"
    return f"{grade} · {ROUTE_SHORT.get(route_family, route_family)}"



