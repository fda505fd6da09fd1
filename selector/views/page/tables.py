"""Tables of the page in display units: candidates, comparison, nearest misses,
what can be reached, pin stresses, pin capacity and the diameter sweep."""
from __future__ import annotations

import json
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from selector.views.columns import all_columns_view, default_view
from selector.views.units import SI, US, convert_frame, quantity_of, significant, to_display, unit

from .inputs import FIELD_LABELS, route_json
from .text import mass_unit, case_text, hardness_text, param_label, param_unit, route_line


# --------------------------------------------------------------------------- table for display

def fmt_window(lo, hi, param, system) -> str:
    if lo is None or hi is None or lo != lo or hi != hi or not param:
        return ""
    q = quantity_of(param)
    if q:
        lo, hi = to_display(lo, q, system), to_display(hi, q, system)
    u = param_unit(param, system)
    if hi > lo:
        return f"{param_label(param)} {lo:.4g}–{hi:.4g} {u}".strip()
    return f"{param_label(param)} {lo:.4g} {u} only".strip()


def display_table(cand: pd.DataFrame, system: str, hardness: str | None = None,
                  all_columns: bool = False) -> pd.DataFrame:
    """The candidates as the page shows them, led by the page's ``id`` (C1, C2 … as on the map).

    By default the readable columns of :func:`selector.views.columns.default_view`
    (plain names with units, rounded to the models' precision, the route in words in
    ``system``'s units, ``through-hardened`` instead of a zero case depth, hardness in
    the view's scale), followed by the material and processing cost per kg
    (:mod:`selector.selection.cost_split`).  With ``all_columns`` every column of the
    library's table follows (:func:`~selector.views.columns.all_columns_view`: internal
    names and full precision, converted and renamed to ``system``'s units), the route
    steps as JSON text."""
    df = cand.drop(columns=[c for c in ("label",) if c in cand.columns])
    view = all_columns_view(df, system, hardness) if all_columns else default_view(df, system, hardness)
    view = view.drop(columns=[c for c in ("id",) if c in view.columns])
    view.insert(0, "id", list(cand["id"]) if "id" in cand else [f"C{i + 1}" for i in range(len(cand))])
    if not all_columns:
        per = mass_unit(system)
        for col, what in (("material_cost_per_kg", "material"), ("processing_cost_per_kg", "processing")):
            if col in cand:
                view[f"{what} / {per}"] = [significant(v, 3) for v in
                                           to_display(cand[col].to_numpy(float), "cost_per_mass", system)]
    if "route" in view:
        view["route"] = [route_json(r) if isinstance(r, (list, tuple)) else str(r) for r in view["route"]]
    for col in view.columns:       # a column of numbers and words (case depth or "through-hardened") as text
        vals = view[col].tolist()
        if view[col].dtype == object and any(isinstance(v, str) for v in vals) \
                and any(isinstance(v, (int, float)) and not isinstance(v, bool) for v in vals):
            view[col] = [v if isinstance(v, str) else ("" if v != v else f"{v:g}") for v in vals]
    return view.reset_index(drop=True)


def comparison_table(cand: pd.DataFrame, ids: Sequence[str], system: str, hardness: str = "HRC") -> pd.DataFrame:
    """One column per chosen candidate, one row per property, in display units and the
    view's hardness scale; the case in words where there is none."""
    sub = cand.set_index("id").loc[list(ids)]
    su, cu = unit("stress", system), unit("cost_per_mass", system)
    rows = {
        "grade": sub["grade"], "family": sub["family"],
        "route": [route_line(r, system, t) for r, t in zip(sub["route"], sub["route_text"])],
        f"yield ({su})": to_display(sub["yield_mpa"].to_numpy(float), "stress", system),
        f"tensile ({su})": to_display(sub["uts_mpa"].to_numpy(float), "stress", system),
        "elongation (%)": sub["elongation_pct"],
        f"hardness ({hardness})": [hardness_text(r, "hardness", hardness) for _, r in sub.iterrows()],
        "surface and case": [case_text(r, system, hardness) for _, r in sub.iterrows()],
        f"material {cu}": (to_display(sub["material_cost_per_kg"].to_numpy(float), "cost_per_mass", system)
                           if "material_cost_per_kg" in sub else [np.nan] * len(sub)),
        f"processing {cu}": (to_display(sub["processing_cost_per_kg"].to_numpy(float), "cost_per_mass", system)
                             if "processing_cost_per_kg" in sub else [np.nan] * len(sub)),
        f"relative cost {cu}": to_display(sub["relative_cost"].to_numpy(float), "cost_per_mass", system),
        "relative cost per part": sub["part_cost"],
        "robust over composition": sub["robust"], "Pareto set": sub["pareto"],
        "process window": [fmt_window(a, b, p, system) for a, b, p in
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
    return convert_frame(df[keep], system)


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


#: sweep columns shown on the page, in order
SWEEP_SHOWN = ["diameter_mm", "min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc", "governing",
               "n_robust", "grade", "family", "route_text", "yield_mpa", "uts_mpa", "surface_hardness_hrc",
               "hardness_hrc", "relative_cost", "part_cost", "changed", "cautions"]


def sweep_table(sw: pd.DataFrame, system: str) -> pd.DataFrame:
    """The sweep in display units: library column names (``diameter_in``,
    ``min_yield_ksi`` in US units), the route text in °F in US units."""
    df = sw.copy()
    if system == US and "route" in df:
        df["route_text"] = [route_line(json.loads(r) if isinstance(r, str) else r, system)
                            if (r is not None and len(r)) else t
                            for r, t in zip(df["route"], df["route_text"])]
    return convert_frame(df[[c for c in SWEEP_SHOWN if c in df]], system)


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


def capacity_table(cap: Mapping, system: str) -> pd.DataFrame:
    """One row per mode: allowable load (display force unit) and whether it governs."""
    fu = unit("force", system)
    key = "lbf" if fu == "lbf" else "kn"
    return pd.DataFrame({"mode": ["shear", "bending", "bearing"],
                         f"allowable load ({fu})": [cap[f"{m}_{key}"] for m in ("shear", "bending", "bearing")],
                         "governing": [m == cap["governing"] for m in ("shear", "bending", "bearing")]})




def alternatives_table(alt: pd.DataFrame, system: str) -> pd.DataFrame:
    """Cheaper alternatives (:func:`~selector.selection.engine.alternatives` with the
    cost split of :func:`~selector.selection.cost_split.split_cost`) with plain column
    names in display units (cost per kg or per lb): the material and the processing
    cost shown apart."""
    su, per = unit("stress", system), mass_unit(system)
    out = pd.DataFrame({
        "grade": alt["grade"],
        "route": [route_line(r, system, t) for r, t in zip(alt["route"], alt["route_text"])],
        f"yield ({su})": np.round(to_display(alt["yield_mpa"].to_numpy(float), "stress", system), 0 if system == SI else 1),
        f"tensile ({su})": np.round(to_display(alt["uts_mpa"].to_numpy(float), "stress", system), 0 if system == SI else 1),
        "elongation (%)": alt["elongation_pct"].astype(float).round(1),
        f"material / {per}": np.round(to_display(alt["material_cost_per_kg"].to_numpy(float), "cost_per_mass", system), 3),
        f"processing / {per}": np.round(to_display(alt["processing_cost_per_kg"].to_numpy(float), "cost_per_mass",
                                                   system), 3),
        f"total / {per}": np.round(to_display(alt["relative_cost"].to_numpy(float), "cost_per_mass", system), 3),
        f"saving / {per}": np.round(to_display(alt["saving_per_kg"].to_numpy(float), "cost_per_mass", system), 3),
        "material per part": alt["material_part_cost"].astype(float).round(4),
        "processing per part": alt["processing_part_cost"].astype(float).round(4),
        "meets the targets (%)": (100.0 * alt["p_meet"].astype(float)).round(1),
        "price": alt["price_source"],
    })
    return out.reset_index(drop=True)
