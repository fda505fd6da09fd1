"""Diameter sweep of a clevis pin: the cheapest robust candidate at each diameter.

For each diameter ``d`` of the sweep the pin's targets are recomputed
(:func:`selector.design.pins.pin_targets`: the stresses fall as ``1/d^2`` for
shear and ``1/d^3`` for bending) and the selection engine is run at that section
(``selector.select(targets, diameter_mm=d, robust_only=True)``), where the
hardenability of each grade is evaluated at the real bar diameter.  A larger pin
needs less strength but hardens less deeply, so the cheapest robust choice need
not change monotonically with diameter; the ``changed`` column marks each
diameter where the pick (grade or route family) differs from the one before.

Among the robust candidates, those without an ``avoid`` caution (e.g. a water quench of a
0.35 % C alloy steel; :mod:`selector.rules.cautions`) are preferred: one with an avoid
caution is picked only where every robust candidate has one.
"Cheapest" is the lowest ``part_cost`` (relative cost per kg x the pin's mass) by
default, or the lowest ``relative_cost`` (per kg) with ``cost_column``; ties go
to the higher yield strength, then the grade id, so the answer is deterministic.
"Robust" is the engine's definition: the probability that a heat within the
grade's specification meets the targets (``p_meet``) is at least ``min_p_meet``
(0.9 by default).

No physics and no selection logic live here: the module only loops over
diameters and picks a row of the engine's result.

Results are estimates for preliminary selection.  The final choice needs
certified material test reports, the applicable design code and review by a
qualified engineer.
"""
from __future__ import annotations

from typing import Callable

import numpy as np
import pandas as pd

from .. import inputs
from ..catalogue.grades import FAMILIES
from ..errors import InputError, check_choice
from ..rules.cautions import caution_column, check_context
from ..selection.cost import check_price_sheet
from ..selection.engine import select
from ..selection.targets import validate_targets
from . import pins

COST_COLUMNS = ("part_cost", "relative_cost")

#: columns of the sweep table, in order (target and stress columns first)
SWEEP_COLUMNS = ["diameter_mm", "min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc", "governing",
                 "shear_mpa", "bending_mpa", "bearing_mpa", "n_robust", "grade", "family", "route_family",
                 "route_text", "window", "yield_mpa", "uts_mpa", "hardness_hrc", "surface_hardness_hrc",
                 "relative_cost", "part_cost", "changed", "cautions"]


#: most diameters of one sweep (the same cap as a range, selector.inputs.MAX_RANGE_VALUES)
MAX_DIAMETERS = inputs.MAX_RANGE_VALUES


def _diameters(diameters_mm) -> np.ndarray:
    allowed = f"a non-empty list of at most {MAX_DIAMETERS} finite diameters in mm (> 0)"
    if isinstance(diameters_mm, (str, bytes, dict)) or diameters_mm is None:
        raise InputError("diameters_mm", diameters_mm, allowed)
    size = len(diameters_mm) if hasattr(diameters_mm, "__len__") else 1
    if size > MAX_DIAMETERS:            # checked before the list is converted
        raise InputError("diameters_mm", f"{size} values", f"at most {MAX_DIAMETERS} diameters")
    try:
        d = np.atleast_1d(np.asarray(diameters_mm, dtype=float))
    except (TypeError, ValueError, OverflowError, RecursionError):
        raise InputError("diameters_mm", diameters_mm, allowed) from None
    if d.ndim != 1 or d.size == 0 or not np.all(np.isfinite(d)) or np.any(d <= 0):
        raise InputError("diameters_mm", diameters_mm, allowed)
    if d.size > MAX_DIAMETERS:
        raise InputError("diameters_mm", f"{d.size} values", f"at most {MAX_DIAMETERS} diameters")
    return np.unique(d)


def diameter_range(start_mm: float, stop_mm: float, step_mm: float) -> np.ndarray:
    """Diameters from ``start_mm`` to ``stop_mm`` inclusive in steps of ``step_mm``.

    Each must be a finite number > 0 (mm), ``stop_mm >= start_mm``, and the range
    may hold at most :data:`MAX_DIAMETERS` values; this is checked before the range
    is built (:func:`selector.inputs.range_values`; the text form ``"from:to:step"`` is
    read by :func:`selector.inputs.diameter_list`)."""
    return np.array(inputs.range_values(start_mm, stop_mm, step_mm, ("start_mm", "stop_mm", "step_mm"),
                                        max_values=MAX_DIAMETERS), float)


def pin_length_mm(shear_planes: int, lug_thickness_mm: float, clevis_thickness_mm: float,
                  gap_mm: float = 0.0) -> float:
    """Grip length of the pin (the length used for its mass when none is given):
    ``t_l + 2 t_c + 2 g`` in double shear, ``t_l + t_c + g`` in single shear."""
    if shear_planes == 2:
        return float(lug_thickness_mm + 2 * clevis_thickness_mm + 2 * gap_mm)
    return float(lug_thickness_mm + clevis_thickness_mm + gap_mm)


def _default_select() -> Callable:
    return select


def _pick(cand: pd.DataFrame, cost_column: str) -> pd.Series | None:
    if cand is None or len(cand) == 0:
        return None
    c = cand
    if "robust" in c.columns:
        c = c[c["robust"].astype(bool)]
        if len(c) == 0:
            return None
    if "avoid" in c.columns:     # a route with an 'avoid' caution only when every robust one has one
        clean = c[c["avoid"].fillna("").astype(str) == ""]
        if len(clean):
            c = clean
    order = [cost_column, "relative_cost", "yield_mpa", "grade"]
    asc = [True, True, False, True]
    keep = [(k, a) for k, a in zip(order, asc) if k in c.columns]
    c = c.sort_values([k for k, _ in keep], ascending=[a for _, a in keep], kind="stable")
    return c.iloc[0]


def diameter_sweep(diameters_mm, *, load_kn=None, load_lbf=None, shear_planes: int = 2,
                   safety_factor=2.0, gap_mm=0.0, lug_thickness_mm=None, clevis_thickness_mm=None,
                   wear_surface_hardness_hrc=None, material_class: str = "steel",
                   load_model: str = "uniform", extra_targets: dict | None = None,
                   length_mm: float | None = None, price_sheet: dict | None = None,
                   cost_column: str = "part_cost", caution_context: dict | None = None,
                   select: Callable | None = None) -> pd.DataFrame:
    """The cheapest robust candidate at each diameter of a clevis pin.

    Parameters
    ----------
    diameters_mm : sequence of float
        Pin diameters, mm (sorted and de-duplicated; at most 200).
    load_kn, load_lbf, shear_planes, safety_factor, gap_mm, lug_thickness_mm,
    clevis_thickness_mm, wear_surface_hardness_hrc, material_class, load_model
        The load case, as in :func:`selector.design.pins.pin_targets`.
    extra_targets : dict, optional
        Further targets for ``select`` (``min_elongation_pct``, ``families``,
        ``corrosion_resistant`` ...); the pin's strength targets override keys of
        the same name.
    length_mm : float, optional
        Pin length for its mass; default the grip length (:func:`pin_length_mm`).
    price_sheet : dict, optional
        Passed to ``select``.
    cost_column : str
        ``part_cost`` (default) or ``relative_cost``: what "cheapest" means.
    caution_context : dict, optional
        If given, the ``cautions`` column lists the cautions of each pick
        (keywords of :func:`selector.rules.cautions.cautions_for`: ``plated``,
        ``mating_material``, ``service_temp_c``, ``environment``, ``plating``).
    select : callable, optional
        The selection function (default ``selector.select``); for tests.

    Returns
    -------
    pandas.DataFrame
        One row per diameter, columns :data:`SWEEP_COLUMNS`.  ``grade`` is empty
        where no robust candidate exists; ``changed`` is True where the pick (grade
        or route family) differs from the previous diameter's.  ``attrs["notice"]``
        carries the preliminary-selection notice.

    References
    ----------
    Pin stresses and targets: :mod:`selector.design.pins` (docs/methods/pins.md).
    Candidates, robustness and cost: :func:`selector.select` (docs/methods/selection.md).
    """
    # every input is checked before any selection is run
    d_all = _diameters(diameters_mm)
    cost_column = check_choice("cost_column", cost_column, COST_COLUMNS, "diameter sweep")
    if extra_targets is not None and not isinstance(extra_targets, dict):
        raise InputError("extra_targets", extra_targets, "a dict of targets or None", "diameter sweep")
    extra_targets = validate_targets(extra_targets, FAMILIES) or None
    price_sheet = check_price_sheet(price_sheet)
    if caution_context is not None:
        caution_context = check_context(caution_context, "caution_context")
    if select is not None and not callable(select):
        raise InputError("select", select, "a selection function or None", "diameter sweep")
    sel = select or _default_select()
    case = dict(load_kn=load_kn, load_lbf=load_lbf, shear_planes=shear_planes, safety_factor=safety_factor,
                gap_mm=gap_mm, lug_thickness_mm=lug_thickness_mm, clevis_thickness_mm=clevis_thickness_mm,
                wear_surface_hardness_hrc=wear_surface_hardness_hrc, material_class=material_class,
                load_model=load_model)
    first = pins.pin_report(diameter_mm=float(d_all[0]), **case)   # validates the load case
    if length_mm is None:
        length = pin_length_mm(first["stresses"]["shear_planes"], float(lug_thickness_mm),
                               float(clevis_thickness_mm), float(gap_mm))
        if not 1.0 <= length <= 20000.0:
            raise InputError("length_mm", length, "a grip length in [1, 20000] mm (give length_mm)",
                             "diameter sweep")
    else:
        length = inputs.number("length_mm", length_mm, 1.0, 20000.0, "diameter sweep", unit="pin length, mm")
    rows, picks = [], []
    for d in d_all:
        rep = pins.pin_report(diameter_mm=float(d), **case)   # validates the load case
        targets = {**(extra_targets or {}), **rep["targets"]}
        cand = sel(targets, float(d), length_mm=length, price_sheet=price_sheet, robust_only=True)
        pick = _pick(cand, cost_column)
        s = rep["stresses"]
        row = {"diameter_mm": float(d), **{k: rep["targets"].get(k, np.nan) for k in
                                           ("min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc")},
               "governing": rep["governing"], "shear_mpa": s["shear_mpa"], "bending_mpa": s["bending_mpa"],
               "bearing_mpa": s["bearing_mpa"],
               "n_robust": 0 if cand is None else int(cand["robust"].astype(bool).sum())
               if "robust" in cand.columns else len(cand)}
        for col in ("grade", "family", "route_family", "route_text", "window"):
            row[col] = "" if pick is None else str(pick.get(col, ""))
        for col in ("yield_mpa", "uts_mpa", "hardness_hrc", "surface_hardness_hrc", "relative_cost", "part_cost"):
            row[col] = np.nan if pick is None else float(pick.get(col, np.nan))
        rows.append(row)
        picks.append(pick)
    out = pd.DataFrame(rows)
    key = out["grade"] + "|" + out["route_family"]
    out["changed"] = key.ne(key.shift()).to_numpy() & (np.arange(len(out)) > 0)
    out["cautions"] = ""
    if caution_context is not None:
        have = [i for i, p in enumerate(picks) if p is not None]
        if have:
            frame = pd.DataFrame([picks[i] for i in have]).reset_index(drop=True)
            col = caution_column(frame, **caution_context)
            out.loc[have, "cautions"] = col.to_numpy()
    out.attrs["notice"] = pins.NOTICE
    out.attrs["length_mm"] = length
    return out[SWEEP_COLUMNS]


def changes(sweep: pd.DataFrame) -> pd.DataFrame:
    """The rows of a sweep where the pick changes (and the first row)."""
    if len(sweep) == 0:
        return sweep
    m = sweep["changed"].to_numpy(bool).copy()
    m[0] = True
    return sweep[m]
