"""Tables of the page in display units: candidates, comparison, nearest misses,
what can be reached, pin stresses, pin capacity and the diameter sweep."""
from __future__ import annotations

import json
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from .inputs import FIELD_LABELS, route_json
from .text import param_label, param_unit, route_line
from .units import SI, US, display_name, quantity_of, to_display, unit

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
            df["window"] = [fmt_window(lo, hi, p, system) for lo, hi, p in zip(df["window_min"], df["window_max"],
                                                                                   params)]
            if "feasible_min" in df:
                none = (df["window_min"].isna() & df["feasible_min"].notna()).to_numpy()
                for i in np.flatnonzero(none):
                    feas = fmt_window(df["feasible_min"].iloc[i], df["feasible_max"].iloc[i], params[i], system)
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
    df = df[keep]
    rename = {}
    for c in df.columns:
        q = quantity_of(c)
        if q and system == US:
            df[c] = to_display(df[c].to_numpy(float), q, system)
            rename[c] = display_name(c, system)
    return df.rename(columns=rename)


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
        df["route_text"] = [route_line(json.loads(r) if isinstance(r, str) else r, system) if len(r) else t
                            for r, t in zip(df["route"], df["route_text"])]
    df = df[[c for c in SWEEP_SHOWN if c in df]]
    rename = {}
    for col in df.columns:
        q = quantity_of(col)
        if q and system == US:
            df[col] = to_display(df[col].to_numpy(float), q, system)
            rename[col] = display_name(col, system)
    return df.rename(columns=rename)


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
    names in display units: the material and the processing cost shown apart."""
    su = unit("stress", system)
    out = pd.DataFrame({
        "grade": alt["grade"],
        "route": [route_line(r, system, t) for r, t in zip(alt["route"], alt["route_text"])],
        f"yield ({su})": np.round(to_display(alt["yield_mpa"].to_numpy(float), "stress", system), 0 if system == SI else 1),
        f"tensile ({su})": np.round(to_display(alt["uts_mpa"].to_numpy(float), "stress", system), 0 if system == SI else 1),
        "elongation (%)": alt["elongation_pct"].astype(float).round(1),
        "material / kg": alt["material_cost_per_kg"].astype(float).round(3),
        "processing / kg": alt["processing_cost_per_kg"].astype(float).round(3),
        "total / kg": alt["relative_cost"].astype(float).round(3),
        "saving / kg": alt["saving_per_kg"].astype(float).round(3),
        "material per part": alt["material_part_cost"].astype(float).round(4),
        "processing per part": alt["processing_part_cost"].astype(float).round(4),
        "meets the targets (%)": (100.0 * alt["p_meet"].astype(float)).round(1),
        "price": alt["price_source"],
    })
    return out.reset_index(drop=True)
