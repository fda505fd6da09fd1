"""Selection: which grade-and-route candidates meet the targets, how robustly, at
what process window and cost, and which of them form the Pareto set.

Definitions (documented in docs/methods/selection.md):

* A *state* is one grade × route family × parameter point × composition corner (a
  row of :func:`selector.states.expand.expand`).
* A *variant* groups the states of one grade and route that differ only in the
  route's main parameter (e.g. the tempering temperature of an oil-quenched 4140).
* A variant is a *candidate* when some value of its main parameter meets every
  target at the nominal composition; it is *robust* when some value meets every
  target at every composition corner (lean, nominal and rich).
* The candidate's *window* is the contiguous range of the main parameter around
  the chosen point over which the targets hold (at every corner for a robust
  candidate, at the nominal composition otherwise); the chosen point is the middle
  of the widest such range (the value most tolerant of furnace scatter), moved to
  the nearest state with the fewest model notes where the middle carries one (for
  example a temper inside the tempered-martensite-embrittlement range).
* The Pareto set is taken over the candidates on the chosen objectives (default:
  maximise yield strength, maximise elongation, minimise relative cost).
"""
from __future__ import annotations

import functools

import numpy as np
import pandas as pd

from ..catalogue.grades import FAMILIES, default_catalogue
from ..errors import InputError
from ..routes import families as fam_registry
from ..routes import fatigue as fatigue_mod
from ..routes.evaluate import section_args
from ..routes.steps import describe
from ..states.expand import expand
from . import cost as cost_mod
from ..design.cautions import caution_column
from .pareto import pareto_mask
from .targets import margins, meets, shortfalls, validate_targets

DEFAULT_OBJECTIVES = (("yield_mpa", "max"), ("elongation_pct", "max"), ("relative_cost", "min"))
OBJECTIVE_COLUMNS = ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc",
                     "case_depth_mm", "relative_cost", "part_cost")

OUTPUT_COLUMNS = ["grade", "family", "route_family", "route_text", "route", "uts_mpa", "yield_mpa",
                  "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
                  "surface_hardness_hrc", "center_hardness_hv", "case_depth_mm", "relative_cost",
                  "part_cost", "mass_kg", "robust", "nominal", "pareto", "window", "window_parameter",
                  "window_min", "window_max", "robust_window_min", "robust_window_max", "main_value",
                  "cautions", "notes", "price_source"]


def _main_param(route: str):
    return fam_registry.get(route).main_parameter


def _variant_keys(states: pd.DataFrame) -> pd.Series:
    key = states["grade"] + "|" + states["route"]
    for route, sub in states.groupby("route", sort=False):
        fam = fam_registry.get(route)
        others = [p for p in fam.parameters if p != fam.main_parameter and p in sub]
        if others:
            extra = key.loc[sub.index].to_numpy().astype(str)
            for c in others:
                extra = np.char.add(np.char.add(extra, "|"), sub[c].to_numpy().astype(str))
            key.loc[sub.index] = extra
    return key


def costed(states: pd.DataFrame, length_mm: float = 100.0, price_sheet: dict | None = None,
           diameter_mm=None, thickness_mm=None) -> pd.DataFrame:
    """Add ``relative_cost`` (per kg: grade price + route adder), ``mass_kg`` and
    ``part_cost`` to a states table (returns a new frame)."""
    df = states.copy()
    price = df["relative_price"].to_numpy(float).copy()
    src = np.full(len(df), "catalogue (indicative)", dtype=object)
    if price_sheet:
        for gid, p in price_sheet.items():
            m = (df["grade"] == gid).to_numpy()
            price[m] = p
            src[m] = "price sheet"
    df["relative_cost"] = cost_mod.relative_cost_per_kg(price, df["route"].to_numpy())
    mass = cost_mod.part_mass_kg(df["density_g_cm3"].to_numpy(float), diameter_mm, thickness_mm, length_mm)
    df["mass_kg"] = mass
    df["part_cost"] = df["relative_cost"] * mass
    df["price_source"] = src
    return df


@functools.lru_cache(maxsize=8)
def _prepare_cached(diameter_mm, thickness_mm, length_mm, prices: tuple) -> pd.DataFrame:
    st = expand(diameter_mm, thickness_mm)
    d = None if thickness_mm is not None else float(diameter_mm)
    df = costed(st, float(length_mm), dict(prices) or None, d, thickness_mm)
    df["variant"] = _variant_keys(df)
    df["main_value"] = np.nan
    for route, sub in df.groupby("route", sort=False):
        mp = _main_param(route)
        if mp and mp in sub:
            df.loc[sub.index, "main_value"] = sub[mp].astype(float)
    # layout used by rank(): the nominal block sorted by variant and main value, then the
    # lean and the rich blocks in the same state order
    df["variant_code"] = pd.factorize(df["variant"])[0]
    nom = df[df["corner"] == "nominal"].sort_values(["variant_code", "main_value", "state_key"], kind="stable")
    order = nom["state_key"].to_numpy()
    blocks = [nom]
    for corner in ("lean", "rich"):
        blk = df[df["corner"] == corner].set_index("state_key", drop=False).loc[order]
        blocks.append(blk)
    out = pd.concat(blocks, ignore_index=True)
    m = len(nom)
    keys = out["state_key"].to_numpy()
    if len(out) != 3 * m or not (np.array_equal(keys[:m], keys[m:2 * m]) and np.array_equal(keys[:m], keys[2 * m:])):
        raise RuntimeError("states table is not aligned by composition corner")
    out["n_notes"] = [0 if not x else x.count(" | ") + 1 for x in out["notes"]]
    out.attrs["section"] = {"diameter_mm": d, "thickness_mm": thickness_mm, "length_mm": float(length_mm)}
    return out


def prepare(diameter_mm=25.0, thickness_mm=None, length_mm=100.0, price_sheet=None) -> pd.DataFrame:
    """The expanded, costed states table with variant keys: everything that does
    not depend on the targets (cached; the page caches it too).  Rows are laid out
    as three aligned blocks (nominal, lean, rich), the nominal block sorted by
    variant and main parameter; treat the frame as read-only."""
    if isinstance(length_mm, bool) or not isinstance(length_mm, (int, float)) or \
            not (1.0 <= float(length_mm) <= 20000.0):
        raise InputError("length_mm", length_mm, "a part length in [1, 20000] mm")
    d, t = section_args(diameter_mm, thickness_mm)
    prices = tuple(sorted((price_sheet or {}).items()))
    return _prepare_cached(d, t, float(length_mm), prices)


def _true_runs(ok: np.ndarray, brk: np.ndarray) -> tuple:
    """Start and end positions of maximal runs of True in ``ok`` that do not cross a
    segment break (``brk[i]`` True where a new variant or a gap in the grid starts)."""
    prev = np.r_[False, ok[:-1]]
    nxt = np.r_[ok[1:], False]
    brk_next = np.r_[brk[1:], True]
    start = np.flatnonzero(ok & (brk | ~prev))
    end = np.flatnonzero(ok & (brk_next | ~nxt))
    return start, end


def _best_runs(start, end, vcode, main):
    """Per variant, the widest run (ties: the lowest main value)."""
    if len(start) == 0:
        return start, end
    count = end - start
    order = np.lexsort((main[start], -count, vcode[start]))
    v_sorted = vcode[start][order]
    first = np.r_[True, v_sorted[1:] != v_sorted[:-1]]
    pick = order[first]
    return start[pick], end[pick]


def _representative(starts: np.ndarray, ends: np.ndarray, n_notes: np.ndarray) -> np.ndarray:
    """The chosen point of each run: among the run's states with the fewest model
    notes (e.g. outside the tempered-martensite-embrittlement range), the one
    nearest the middle of the run, the value most tolerant of furnace scatter."""
    out = np.empty(len(starts), int)
    for i, (a, b) in enumerate(zip(starts, ends)):
        seg = n_notes[a:b + 1]
        mid = (a + b) / 2.0
        cost = (seg - seg.min()) * 10_000 + np.abs(np.arange(a, b + 1) - mid)
        out[i] = a + int(np.argmin(cost))
    return out


def rank(prepared: pd.DataFrame, targets: dict | None = None, objectives=DEFAULT_OBJECTIVES,
         robust_only: bool = False, service: dict | None = None) -> pd.DataFrame:
    """Candidates of ``prepared`` (from :func:`prepare`) for ``targets``: the fast
    step that the page re-runs when only the targets change.  ``service`` holds the
    context of the cautions (``plated``, ``plating``, ``mating_material``,
    ``service_temp_c``, ``environment``; see :func:`selector.design.cautions.cautions_for`)."""
    t = validate_targets(targets, FAMILIES)
    objectives = _check_objectives(objectives)
    m = len(prepared) // 3
    ok = np.asarray(meets(prepared, t), bool)
    nominal = ok[:m]
    robust = ok.reshape(3, m).all(axis=0)
    nom = prepared.iloc[:m]
    vcode = nom["variant_code"].to_numpy()
    main = nom["main_value"].to_numpy(float)
    same = np.r_[False, vcode[1:] == vcode[:-1]]
    diff = np.r_[np.nan, main[1:] - main[:-1]]
    diff = np.where(same, diff, np.nan)
    step = pd.Series(np.where(diff > 0, diff, np.nan)).groupby(vcode).transform("min").to_numpy()
    gap = np.nan_to_num(diff > 1.5 * step, nan=False).astype(bool)
    brk = ~same | gap
    rs, re_ = _best_runs(*_true_runs(robust, brk), vcode, main)
    ns_all, ne_all = _true_runs(nominal, brk)
    ns, ne = _best_runs(ns_all, ne_all, vcode, main)
    robust_v = set(vcode[rs].tolist())
    keep_n = np.array([v not in robust_v for v in vcode[ns]], bool) if len(ns) else np.zeros(0, bool)
    if robust_only:
        starts, ends = rs, re_
    else:
        starts, ends = np.r_[rs, ns[keep_n]], np.r_[re_, ne[keep_n]]
    if len(starts) == 0:
        return _empty(t)
    pick = _representative(starts, ends, nom["n_notes"].to_numpy())
    cand = nom.iloc[pick].copy()
    cand["nominal"] = True
    cand["robust"] = robust[pick]
    run_lo, run_hi = main[starts], main[ends]
    # the nominal window that contains the chosen point
    j = np.searchsorted(ns_all, pick, side="right") - 1
    cand["window_min"] = main[ns_all[j]]
    cand["window_max"] = main[ne_all[j]]
    cand["robust_window_min"] = np.where(cand["robust"], run_lo, np.nan)
    cand["robust_window_max"] = np.where(cand["robust"], run_hi, np.nan)
    return _finish(cand, t, objectives, service)


def _check_objectives(objectives):
    out = []
    for item in objectives:
        if not isinstance(item, (tuple, list)) or len(item) != 2:
            raise InputError("objectives", item, "pairs (column, 'max' | 'min')")
        col, sense = item
        if col not in OBJECTIVE_COLUMNS:
            raise InputError("objectives", col, ", ".join(OBJECTIVE_COLUMNS))
        if sense not in ("max", "min"):
            raise InputError("objectives", sense, "'max' or 'min'")
        out.append((col, sense))
    if not out:
        raise InputError("objectives", objectives, "at least one (column, sense) pair")
    return tuple(out)


def _window_text(row) -> str:
    fam = fam_registry.get(row["route"])
    mp = fam.main_parameter
    if not mp or row["window_min"] != row["window_min"]:
        return ""
    unit = "°C" if mp.endswith("_c") else "%" if mp.endswith("_pct") else "h" if mp.endswith("hours") \
        else "mm" if mp.endswith("_mm") else ""
    lo, hi = row["window_min"], row["window_max"]
    txt = f"{mp} {lo:g}–{hi:g} {unit}".strip() if hi > lo else f"{mp} {lo:g} {unit} only".strip()
    if row["robust"] and row["robust_window_min"] == row["robust_window_min"] and \
            (row["robust_window_min"], row["robust_window_max"]) != (lo, hi):
        txt += f" (all corners: {row['robust_window_min']:g}–{row['robust_window_max']:g} {unit})"
    return txt


def _finish(cand: pd.DataFrame, t: dict, objectives, service: dict | None = None) -> pd.DataFrame:
    cand = cand.reset_index(drop=True)
    cand["cautions"] = caution_column(cand, **(service or {})).to_numpy()
    routes, texts, wparam, wtext = [], [], [], []
    need = {"route", "window_min", "window_max", "robust", "robust_window_min", "robust_window_max"}
    for f in fam_registry.available():
        need.update(f.parameters)
    for r in cand[[c for c in cand.columns if c in need]].to_dict("records"):
        fam = fam_registry.get(r["route"])
        steps = fam.to_steps({p: r[p] for p in fam.parameters if p in r})
        routes.append(steps)
        texts.append(describe(steps))
        wparam.append(fam.main_parameter or "")
        wtext.append(_window_text(r))
    cand["route_family"] = cand["route"]
    cand["route"] = routes
    cand["route_text"] = texts
    cand["window_parameter"] = wparam
    cand["window"] = wtext
    vals = np.column_stack([cand[c].to_numpy(float) for c, _ in objectives])
    cand["pareto"] = pareto_mask(vals, [s == "max" for _, s in objectives])
    m = margins(cand, t)
    for c in m.columns:
        cand[c] = m[c].to_numpy()
    cand = cand.sort_values(["pareto", "robust", "relative_cost", "yield_mpa"],
                            ascending=[False, False, True, False], kind="stable").reset_index(drop=True)
    cols = OUTPUT_COLUMNS + list(m.columns) + [c for c in cand.columns
                                               if c not in OUTPUT_COLUMNS and c not in m.columns]
    return cand[[c for c in cols if c in cand.columns]]


def _empty(t) -> pd.DataFrame:
    cols = OUTPUT_COLUMNS + [f"margin_{k}" for k in t if k not in ("families", "exclude_families",
                                                                   "corrosion_resistant")]
    return pd.DataFrame(columns=cols)


def select(targets: dict | None = None, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
           length_mm: float = 100.0, price_sheet: dict | None = None, objectives=DEFAULT_OBJECTIVES,
           robust_only: bool = False, plated: bool = False, plating: str | None = None,
           mating_material: str | None = None, service_temp_c: float | None = None,
           environment: str = "normal", finish: str = "machined", load_type: str = "bending",
           reliability: float = 0.5, impact: bool = False) -> pd.DataFrame:
    """Grade-and-route candidates that meet ``targets`` at the given section.

    Parameters
    ----------
    targets : dict
        Any of ``min_yield_mpa, max_yield_mpa, min_uts_mpa, max_uts_mpa,
        min_elongation_pct, min_hardness_hrc, max_hardness_hrc`` (at the tension-test
        location), ``min_surface_hardness_hrc, min_case_depth_mm, max_relative_cost,
        min_fatigue_mpa`` (fully reversed fatigue limit at the section, MPa),
        ``families, exclude_families, corrosion_resistant``.
    diameter_mm : float
        Round section diameter, mm (or give ``thickness_mm`` for a plate).
    length_mm : float
        Part length, mm (for the part's mass and ``part_cost``).
    price_sheet : dict, optional
        ``{grade id: relative price per kg}`` overriding the catalogue
        (see :func:`selector.selection.cost.parse_price_sheet`).
    objectives : sequence of (column, "max" | "min")
        Pareto objectives; default maximise yield, maximise elongation, minimise cost.
    robust_only : bool
        Keep only candidates that meet the targets at every composition corner.
    plated, plating, mating_material, service_temp_c, environment
        Service context for the ``cautions`` column (hydrogen embrittlement of
        plated high-strength steel, galvanic pairs, service temperature near the
        tempering or aging temperature); see :mod:`selector.design.cautions`.
        ``service_temp_c`` also sets the fatigue temperature factor.
    impact : bool
        Impact or shock loading in service: a caution on hard cases (>= 55 HRC) and
        through-hardened parts (>= 50 HRC).
    finish, load_type, reliability
        Surface finish (``ground``, ``machined``, ``hot_rolled``, ``as_forged``), load
        type (``bending``, ``axial``, ``torsion``) and reliability (0.5 to 0.9999) of the
        ``fatigue_limit_mpa`` column and the ``min_fatigue_mpa`` target
        (:mod:`selector.routes.fatigue`).

    Returns
    -------
    pandas.DataFrame
        One row per candidate, Pareto rows first; see the module docstring.  Empty
        when nothing qualifies (then see :func:`nearest_misses`).
    """
    fat = dict(fatigue_mod.check_options(finish, load_type, reliability), temp_c=service_temp_c)
    prepared = prepare(diameter_mm, thickness_mm, length_mm, price_sheet)
    if targets and "min_fatigue_mpa" in targets:
        prepared = with_fatigue(prepared, **fat)
    service = dict(plated=plated, plating=plating, mating_material=mating_material,
                   service_temp_c=service_temp_c, environment=environment)
    if impact:
        service["impact"] = impact
    out = rank(prepared, targets, objectives, robust_only, service)
    if "fatigue_limit_mpa" not in out.columns and len(out):
        d, t = section_args(diameter_mm, thickness_mm)
        out = with_fatigue(out, section_mm=d or t, **fat)
    return out


def with_fatigue(frame: pd.DataFrame, finish: str = "machined", load_type: str = "bending",
                 reliability: float = 0.5, temp_c=None, section_mm: float | None = None) -> pd.DataFrame:
    """A copy of a states or candidates frame with the fatigue columns of
    :func:`selector.routes.fatigue.fatigue_columns` (``fatigue_limit_mpa`` and its band,
    cycles, governing depth) at the frame's section (``attrs["section"]``)."""
    sec = frame.attrs.get("section", {})
    section = section_mm or sec.get("diameter_mm") or sec.get("thickness_mm")
    route = frame["route_family"] if "route_family" in frame.columns else frame["route"]
    cols = fatigue_mod.fatigue_columns(frame, frame["family"].astype(str).to_numpy(),
                                       route.astype(str).to_numpy(), float(section), finish=finish,
                                       load_type=load_type, reliability=reliability, temp_c=temp_c)
    keep = ("fatigue_limit_mpa", "fatigue_limit_mpa_lo", "fatigue_limit_mpa_hi", "fatigue_cycles",
            "fatigue_governing", "fatigue_governing_depth_mm")
    out = frame.assign(**{k: cols[k] for k in keep})
    out.attrs = dict(frame.attrs)
    return out


def nearest_misses(targets: dict, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
                   length_mm: float = 100.0, price_sheet: dict | None = None, n: int = 10,
                   finish: str = "machined", load_type: str = "bending", reliability: float = 0.5,
                   service_temp_c: float | None = None) -> pd.DataFrame:
    """The closest candidates when nothing meets ``targets``: for each target, how far
    it would have to move (``move_<key>``) for that candidate to qualify at the
    nominal composition.  One row per variant (its best parameter point), sorted by
    ``miss_score`` (the sum of the relative moves)."""
    t = validate_targets(targets, FAMILIES)
    fat = dict(fatigue_mod.check_options(finish, load_type, reliability), temp_c=service_temp_c)
    prepared = prepare(diameter_mm, thickness_mm, length_mm, price_sheet)
    if "min_fatigue_mpa" in t:
        prepared = with_fatigue(prepared, **fat)
    nom = prepared[prepared["corner"] == "nominal"]
    hard = _hard_filters(nom, t)
    nom = nom[hard]
    if nom.empty:
        return pd.DataFrame(columns=["grade", "family", "route_text", "miss_score"])
    sf = shortfalls(nom, t)
    nom = nom.assign(**{c: sf[c].to_numpy() for c in sf.columns})
    best = nom.sort_values("miss_score", kind="stable").drop_duplicates("variant").head(int(n))
    out = _finish(best.assign(window_min=np.nan, window_max=np.nan, robust_window_min=np.nan,
                              robust_window_max=np.nan, robust=False, nominal=False), {}, DEFAULT_OBJECTIVES)
    out = out.sort_values("miss_score", kind="stable").reset_index(drop=True)
    lead = ["grade", "family", "route_text", "miss_score"] + list(sf.columns.drop("miss_score"))
    return out[lead + [c for c in out.columns if c not in lead]]


def _hard_filters(frame: pd.DataFrame, t: dict) -> np.ndarray:
    keep = np.ones(len(frame), bool)
    if t.get("families"):
        keep &= frame["family"].isin(t["families"]).to_numpy()
    if t.get("exclude_families"):
        keep &= ~frame["family"].isin(t["exclude_families"]).to_numpy()
    if t.get("corrosion_resistant"):
        keep &= frame["corrosion_resistant"].to_numpy(bool)
    return keep


ELONGATION_TOLERANCE_PCT = 1.0


def alternatives(grade, route, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
                 length_mm: float = 100.0, price_sheet: dict | None = None,
                 elongation_tolerance_pct: float = ELONGATION_TOLERANCE_PCT) -> pd.DataFrame:
    """Cheaper candidates that reach at least the properties of the given choice.

    The given grade and route are evaluated; its yield and tensile strength (and
    surface hardness and case depth when case-hardened, and corrosion resistance
    when the grade has it) become minimum targets, and its elongation less
    ``elongation_tolerance_pct`` (default 1 point: in quenched-and-tempered steels
    elongation follows strength closely, SAE J413, so an exact tie in both is only
    reached by the same steel; 1 point is below the elongation correlation's median
    error of 1.2 points, docs/methods/correlations.md).  The result lists the
    candidates whose relative cost per kg is lower, cheapest first, with
    ``saving_per_kg``; ``attrs["reference"]`` holds the given choice.
    """
    from ..routes.evaluate import evaluate

    ref = evaluate(grade, route, diameter_mm=diameter_mm, thickness_mm=thickness_mm)
    g = default_catalogue().lookup(grade)
    price = (price_sheet or {}).get(g.id, g.relative_price)
    ref_cost = float(cost_mod.relative_cost_per_kg(np.array([price]), np.array([ref["route_family"]]))[0])
    t = {"min_yield_mpa": ref["yield_mpa"], "min_uts_mpa": ref["uts_mpa"],
         "min_elongation_pct": max(ref["elongation_pct"] - float(elongation_tolerance_pct), 0.0)}
    if ref.get("case_depth_mm"):
        t["min_case_depth_mm"] = ref["case_depth_mm"]
        if ref.get("surface_hardness_hrc") is not None:
            t["min_surface_hardness_hrc"] = ref["surface_hardness_hrc"]
    if g.corrosion_resistant:
        t["corrosion_resistant"] = True
    t = {k: v for k, v in t.items() if v is not None}
    cand = select(t, diameter_mm, thickness_mm=thickness_mm, length_mm=length_mm, price_sheet=price_sheet)
    cand = cand[cand["relative_cost"] < ref_cost - 1e-9].copy()
    cand["saving_per_kg"] = ref_cost - cand["relative_cost"]
    cand = cand.sort_values(["relative_cost", "robust"], ascending=[True, False], kind="stable")
    cand.attrs["reference"] = {**ref, "relative_cost": ref_cost, "targets": t}
    return cand.reset_index(drop=True)
