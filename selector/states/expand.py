"""Expansion of the catalogue into a table of states: every grade × every route
family it admits × the family's process-window grid × the composition corners
(lean, nominal, rich).  This table is each grade's reachable region in
strength–elongation–hardness space.

The expansion runs one vectorised ``compute`` per route family over all grades at
once (no loop over ``evaluate``); ``evaluate`` runs the same ``compute`` on a batch of
one, so a row of this table and ``evaluate`` of its ``route`` agree exactly.
"""
from __future__ import annotations

import functools

import numpy as np
import pandas as pd

from ..catalogue.grades import default_catalogue
from ..errors import NotModelledError
from ..routes import families as fam_registry
from ..routes.evaluate import BAND_KEYS, finish, section_args
from ..routes.families.base import Batch

CORNERS = ("lean", "nominal", "rich")

#: result arrays copied into the table
RESULT_COLUMNS = ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hrc", "hardness_hb",
                  "surface_hardness_hv", "surface_hardness_hrc", "center_hardness_hv", "center_hardness_hrc",
                  "case_depth_mm", "reduction_area_pct", "center_uts_mpa", "center_yield_mpa",
                  "center_martensite_pct", "peak_ratio", "di_mm") + BAND_KEYS


def _family_batch(fam, grades, diameter_mm, thickness_mm, corners):
    gidx, comps, params, state_no, corner_col = [], [], {}, [], []
    glist = []
    for g in grades:
        try:
            grid = fam.grid(g)
        except NotModelledError:
            continue
        m = len(next(iter(grid.values())))
        if m == 0:
            continue
        k = len(glist)
        glist.append(g)
        for corner in corners:
            comp = g.composition(corner)
            gidx.append(np.full(m, k))
            comps.append((comp, m))
            for name, arr in grid.items():
                params.setdefault(name, []).append(np.asarray(arr))
            state_no.append(np.arange(m))
            corner_col.append(np.full(m, corner, dtype=object))
    if not glist:
        return None
    n = int(sum(len(a) for a in gidx))
    elements = sorted({e for comp, _ in comps for e in comp})
    comp_arr = {e: np.concatenate([np.full(m, comp.get(e, 0.0)) for comp, m in comps]) for e in elements}
    par = {}
    for name, parts in params.items():
        obj = any(p.dtype == object or p.dtype.kind in "US" for p in parts)
        par[name] = np.concatenate([p.astype(object) if obj else p.astype(float) for p in parts])
    d = np.full(n, np.nan if diameter_mm is None else diameter_mm)
    t = np.full(n, np.nan if thickness_mm is None else thickness_mm)
    batch = Batch(glist, np.concatenate(gidx), comp_arr, par, d, t)
    return batch, np.concatenate(state_no), np.concatenate(corner_col)


def expand_family(fam, diameter_mm=25.0, thickness_mm=None, grades=None, corners=CORNERS) -> pd.DataFrame:
    """States table of one route family over ``grades`` (default: the catalogue)."""
    cat = default_catalogue()
    grades = [g for g in (grades or cat.grades.values())
              if fam.name in g.routes and (not fam.families or g.family in fam.families)]
    built = _family_batch(fam, grades, diameter_mm, thickness_mm, corners)
    if built is None:
        return pd.DataFrame()
    batch, state_no, corner = built
    res = finish(fam.compute(batch), batch, fam.name)
    df = pd.DataFrame({"grade": batch.attr("id"), "family": batch.attr("family"), "route": fam.name,
                       "corner": corner, "state": state_no})
    for name in fam.parameters:
        if name in batch.params:
            df[name] = batch.params[name]
    for col in RESULT_COLUMNS:
        if col in res:
            df[col] = np.asarray(res[col], float)
    cautions = np.full(batch.n, "", dtype=object)
    for msg, mask in res.get("notes", []):
        m = np.broadcast_to(np.asarray(mask, bool), (batch.n,))
        if m.any():
            cautions[m] = np.where(cautions[m] == "", msg, cautions[m] + " | " + msg)
    df["notes"] = cautions
    df["c_pct"] = batch.comp.get("C", np.zeros(batch.n))
    df["corrosion_resistant"] = batch.attr("corrosion_resistant").astype(bool)
    df["relative_price"] = batch.attr("relative_price")
    df["density_g_cm3"] = batch.attr("density_g_cm3")
    return df


@functools.lru_cache(maxsize=16)
def expand(diameter_mm: float | None = 25.0, thickness_mm: float | None = None) -> pd.DataFrame:
    """States table of every modelled route family over the whole catalogue at one
    section (cached per section; treat the result as read-only)."""
    d, t = section_args(diameter_mm, thickness_mm)
    parts = [expand_family(f, d, t) for f in fam_registry.available()]
    parts = [p for p in parts if len(p)]
    df = pd.concat(parts, ignore_index=True, sort=False)
    for col in RESULT_COLUMNS:
        if col not in df:
            df[col] = np.nan
    df["case_depth_mm"] = df["case_depth_mm"].fillna(0.0)
    # a key per state (grade, route, parameter point), shared by its corners
    df["state_key"] = df["grade"] + "|" + df["route"] + "|" + df["state"].astype(str)
    return df
