"""The diameter sweep with each pick's whole candidate row: its route as steps, its
process window and its bands, so that a view can write the route in words and the
window in any units (``selector sweep``, the page) without running ``select`` again.

:func:`selector.design.sweep.diameter_sweep` keeps the library's sweep table
(:data:`~selector.design.sweep.SWEEP_COLUMNS`, with the route as SI text only); this
module runs the same sweep with a ``select`` that keeps each diameter's candidates, and
joins the picked row back on (grade, route family, route text, yield strength), which
identifies a candidate of one ``select`` call.
"""
from __future__ import annotations

import numpy as np
import pandas as pd

from ..selection.engine import select as engine_select
from .sweep import SWEEP_COLUMNS, diameter_sweep

#: columns of the picked candidate added after the sweep's own (when ``select`` gives them)
PICK_COLUMNS = ("route", "window_parameter", "window_min", "window_max", "sub_windows", "feasible_min",
                "feasible_max", "elongation_pct", "hardness_hv", "hardness_hb", "surface_hardness_hv",
                "case_depth_mm", "p_meet", "robust", "uts_mpa_lo", "uts_mpa_hi", "yield_mpa_lo", "yield_mpa_hi",
                "elongation_pct_lo", "elongation_pct_hi", "hardness_hrc_lo", "hardness_hrc_hi",
                "hardness_hb_lo", "hardness_hb_hi", "hardness_hv_lo", "hardness_hv_hi", "avoid")

#: the columns that identify a candidate within one select result
KEY = ("grade", "route_family", "route_text", "yield_mpa")


def sweep_with_picks(diameters_mm, **kwargs) -> pd.DataFrame:
    """:func:`selector.design.sweep.diameter_sweep` plus the picked candidate's
    :data:`PICK_COLUMNS` (NaN / None where a diameter has no pick).

    Parameters
    ----------
    diameters_mm : sequence of float
        Pin diameters, mm.
    **kwargs
        The keyword arguments of :func:`~selector.design.sweep.diameter_sweep` (checked
        there); ``select`` is wrapped, default :func:`selector.select`.

    Returns
    -------
    pandas.DataFrame
        The sweep's columns, then :data:`PICK_COLUMNS`; ``attrs`` as the sweep's.
    """
    base = kwargs.pop("select", None) or engine_select
    seen: dict[float, pd.DataFrame] = {}

    def keeping(targets, diameter_mm, **kw):
        cand = base(targets, diameter_mm, **kw)
        seen[float(diameter_mm)] = cand
        return cand

    if callable(base):
        kwargs["select"] = keeping
    else:                                  # let diameter_sweep refuse it with its own message
        kwargs["select"] = base
    sw = diameter_sweep(diameters_mm, **kwargs)
    extra = {c: [None] * len(sw) for c in PICK_COLUMNS}
    for i, row in enumerate(sw.itertuples(index=False)):
        cand = seen.get(float(row.diameter_mm))
        if not row.grade or cand is None or len(cand) == 0 or not set(KEY) <= set(cand.columns):
            continue
        m = np.ones(len(cand), bool)
        for k in KEY:
            v = getattr(row, k)
            if k == "yield_mpa":
                a = cand[k].to_numpy(float)
                m &= (a == v) | (np.isnan(a) & (v != v))
            else:
                m &= cand[k].astype(str).to_numpy() == v
        if not m.any():
            continue
        hit = cand[m].iloc[0]
        for c in PICK_COLUMNS:
            if c in cand.columns:
                extra[c][i] = hit[c]
    out = pd.concat([sw[SWEEP_COLUMNS].reset_index(drop=True), pd.DataFrame(extra)], axis=1)
    for c in PICK_COLUMNS:
        if c not in ("route", "window_parameter", "sub_windows", "avoid", "robust"):
            out[c] = pd.to_numeric(out[c], errors="coerce")
    out.attrs.update(sw.attrs)
    return out
