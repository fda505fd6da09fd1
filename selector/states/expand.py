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
                  "center_martensite_pct", "peak_ratio", "di_mm", "band_free",
                  "section_limit_mm", "bainite_pct") + BAND_KEYS


def _family_blocks(fam, grades, corners):
    """The section-independent part of a family's batch: grades, composition and
    parameter arrays, state numbers and corners, built per block (a grade at a corner)
    with ``np.repeat``, not per state (at 10^6 states per-element ``np.full`` calls were
    a third of the expansion's time)."""
    glist, grids, comps, sizes, block_grade, block_corner = [], [], [], [], [], []
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
        grids.append(grid)
        for ci, corner in enumerate(corners):
            comps.append(g.composition(corner))
            sizes.append(m)
            block_grade.append(k)
            block_corner.append(ci)
    if not glist:
        return None
    sizes = np.asarray(sizes, np.int64)
    n = int(sizes.sum())
    starts = np.cumsum(sizes) - sizes
    gidx = np.repeat(np.asarray(block_grade, np.int64), sizes)
    elements = sorted({e for comp in comps for e in comp})
    comp_arr = {e: np.repeat(np.array([float(comp.get(e, 0.0)) for comp in comps], float), sizes)
                for e in elements}
    par = {}
    for name in grids[0]:
        parts = [np.asarray(grids[block_grade[b]][name]) for b in range(len(sizes))]
        obj = any(p.dtype == object or p.dtype.kind in "US" for p in parts)
        par[name] = np.concatenate([p.astype(object) if obj else p.astype(float) for p in parts])
    for grid in grids[1:]:          # grids of one family share their parameter names
        for name in grid:
            if name not in par:
                raise KeyError(f"{fam.name}: grid parameter {name!r} missing for some grades")
    state_no = np.arange(n, dtype=np.int64) - np.repeat(starts, sizes)
    corner_col = np.repeat(np.asarray(corners, dtype=object)[np.asarray(block_corner)], sizes)
    return tuple(glist), gidx, comp_arr, par, state_no, corner_col


@functools.lru_cache(maxsize=32)
def _catalogue_blocks(family_name: str, corners: tuple):
    """:func:`_family_blocks` over the whole catalogue, kept per family: the grid and the
    compositions do not depend on the section, so a new section reuses them."""
    fam = fam_registry.get(family_name)
    cat = default_catalogue()
    grades = [g for g in cat.grades.values()
              if fam.name in g.routes and (not fam.families or g.family in fam.families)]
    return _family_blocks(fam, grades, corners)


def _family_batch(fam, grades, diameter_mm, thickness_mm, corners):
    """One :class:`Batch` of every grade × grid point × corner of ``fam`` (``grades``
    None: the catalogue, from :func:`_catalogue_blocks`)."""
    if grades is None and fam_registry.get(fam.name) is fam:
        blocks = _catalogue_blocks(fam.name, tuple(corners))
    else:
        cat_grades = default_catalogue().grades.values() if grades is None else grades
        blocks = _family_blocks(fam, [g for g in cat_grades if fam.name in g.routes and
                                      (not fam.families or g.family in fam.families)], corners)
    if blocks is None:
        return None
    glist, gidx, comp_arr, par, state_no, corner_col = blocks
    n = len(gidx)
    d = np.full(n, np.nan if diameter_mm is None else diameter_mm)
    t = np.full(n, np.nan if thickness_mm is None else thickness_mm)
    # copies: a family's compute gets arrays of its own, the kept blocks stay as built
    batch = Batch(list(glist), gidx.copy(), {e: a.copy() for e, a in comp_arr.items()},
                  {k: a.copy() for k, a in par.items()}, d, t)
    return batch, state_no.copy(), corner_col.copy()


#: most states of one family computed in one vectorised call; a larger family is computed in
#: chunks of this many states, so the models' intermediate arrays (profiles over 5-11 positions,
#: several per state) stay bounded while the table grows (each state's row depends on that state
#: only: tests/test_scale.py checks a chunked expansion against an unchunked one)
CHUNK_STATES = 65_536


def _computed(fam, batch):
    """``(rows, result)`` of ``fam.compute`` + :func:`finish` over ``batch``, in chunks."""
    n = batch.n
    if n <= CHUNK_STATES:
        yield slice(0, n), finish(fam.compute(batch), batch, fam.name)
        return
    for a in range(0, n, CHUNK_STATES):
        b = min(n, a + CHUNK_STATES)
        mask = np.zeros(n, bool)
        mask[a:b] = True
        sub = batch.subset(mask)
        yield slice(a, b), finish(fam.compute(sub), sub, fam.name)


def expand_family(fam, diameter_mm=25.0, thickness_mm=None, grades=None, corners=CORNERS) -> pd.DataFrame:
    """States table of one route family over ``grades`` (default: the catalogue)."""
    built = _family_batch(fam, grades or None, diameter_mm, thickness_mm, corners)
    if built is None:
        return pd.DataFrame()
    batch, state_no, corner = built
    n = batch.n
    results: dict = {}
    cautions = np.full(n, "", dtype=object)
    for rows, res in _computed(fam, batch):
        for col in RESULT_COLUMNS:
            if col in res:
                if col not in results:
                    results[col] = np.full(n, np.nan)
                results[col][rows] = np.asarray(res[col], float)
        part = cautions[rows]
        k = rows.stop - rows.start
        for msg, mask in res.get("notes", []):
            m = np.broadcast_to(np.asarray(mask, bool), (k,))
            if m.any():
                part[m] = np.where(part[m] == "", msg, part[m] + " | " + msg)
        del res
    cols = {"grade": batch.attr("id"), "family": batch.attr("family"),
            "route": np.full(n, fam.name, dtype=object), "corner": corner, "state": state_no}
    for name in fam.parameters:
        if name in batch.params:
            cols[name] = batch.params[name]
    for col in RESULT_COLUMNS:
        if col in results:
            cols[col] = results[col]
    cols["notes"] = cautions
    cols["c_pct"] = batch.comp.get("C", np.zeros(n))
    cols["corrosion_resistant"] = batch.attr("corrosion_resistant").astype(bool)
    cols["relative_price"] = batch.attr("relative_price")
    cols["density_g_cm3"] = batch.attr("density_g_cm3")
    return pd.DataFrame(cols)


def expand_states(diameter_mm: float | None = 25.0, thickness_mm: float | None = None, grades=None,
                  families=None) -> pd.DataFrame:
    """States table of ``families`` (default: every modelled route family) over
    ``grades`` (default: the catalogue) at one section; not cached."""
    d, t = section_args(diameter_mm, thickness_mm)
    fams = fam_registry.available() if families is None else families
    parts = [expand_family(f, d, t, grades=grades) for f in fams]
    parts = [p for p in parts if len(p)]
    df = pd.concat(parts, ignore_index=True, sort=False)
    for col in RESULT_COLUMNS:
        if col not in df:
            df[col] = np.nan
    df["case_depth_mm"] = df["case_depth_mm"].fillna(0.0)
    # a key per state (grade, route, parameter point), shared by its corners
    df["state_key"] = df["grade"] + "|" + df["route"] + "|" + df["state"].astype(str)
    return df


@functools.lru_cache(maxsize=16)
def _expand_cached(diameter_mm, thickness_mm) -> pd.DataFrame:
    return expand_states(diameter_mm, thickness_mm)


def expand(diameter_mm: float | None = 25.0, thickness_mm: float | None = None) -> pd.DataFrame:
    """States table of every modelled route family over the whole catalogue at one
    section (cached per section; treat the result as read-only)."""
    return _expand_cached(*section_args(diameter_mm, thickness_mm))


expand.cache_clear = _expand_cached.cache_clear
