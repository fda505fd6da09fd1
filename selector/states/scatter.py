"""Scatter of a state's properties: heat-to-heat composition within the grade's
specification, and the model's own error (the 90 % prediction band).

For every nominal state of the expansion this module gives ``N_DRAWS`` Monte Carlo
draws of each property a target can test, so that the selection can count, for any
targets, the share of heats that meet them (``p_meet``).

Composition (linearised Monte Carlo)
------------------------------------
A heat is a composition drawn inside the specification.  Each alloying element's
standardised position ``z_e = (x_e − mid_e) / half-range_e`` is drawn independently
from a **normal distribution centred on the mid-range with σ = half the half-range,
truncated at the specification limits** (z in [−1, 1]; the limits sit at ±2σ, so a
heat is most often near the aim and rarely at a limit; common practice for heats made
to an aim analysis, chosen here).  Residuals with only a maximum (P, S) stay at half
the maximum, as in the corners.

The property of a drawn heat is linearised about the nominal composition::

    y(z) = y_nom + Σ_e a_e · z_e,      a_e = y(e at its maximum, others nominal) − y_nom

and then anchored on the exact corners of the expansion: the linear predictor
``s = Σ_e a_e z_e`` is scaled on each side of 0 so that every element at its maximum gives
the rich corner and every element at its minimum the lean corner exactly
(:func:`anchor_factors`; issue 12: one-sided sensitivities summed past a hardenability
threshold, e.g. 36CrNiMo4 at 60 mm, where each element alone lifts the centre past 50 %
martensite)::

    y(z) = y_nom + f · s,   f = (y_rich − y_nom) / Σ a_e  (rich side),  (y_nom − y_lean) / Σ a_e  (lean side)

The sensitivities ``a_e`` come from one extra vectorised ``compute`` per route family
over the nominal states with one element moved to its maximum (one block per
element: the same family ``compute`` the expansion uses, so they follow any model
change), at every :data:`THIN`-th value of the route's main parameter (and its last),
interpolated linearly in between.  Full Monte Carlo through ``compute`` (200 compositions per state) costs about
200 expansions and is out of the speed budget; the linearisation costs one expansion
of the nominal block per element of the grade.  The selection computes them only for
the states it draws (those that meet the targets at nominal; :class:`Sensitivities`,
the same numbers as the pass over every state) and keeps them per section on disk as
they grow.  Its error is checked against the
rich corner (every element at its maximum at once, computed exactly by the
expansion): see ``docs/methods/selection.md``.

Model error
-----------
The 90 % band of :mod:`selector.routes.bands` holds 90 % of published values around
the estimate: its residual quantiles ``q05``, ``q95`` (from ``data/fits/bands.csv``)
define a normal residual with mean ``(q05 + q95)/2`` and ``σ = (q95 − q05)/(2·1.645)``
(1.645 = the 95 % point of the standard normal), i.e.

* strength and hardness: **lognormal** ``y = y_comp · exp(μ + σ·ε_s)``;
* elongation: **normal** in percentage points, ``y = max(0, y_comp + μ + σ·ε_e)``.

Tensile strength, yield strength and hardness share one score ``ε_s`` per draw (they
are estimated from the same hardness, so their errors move together); elongation has
its own score ``ε_e``, correlated with ``ε_s`` by :data:`ELONGATION_STRENGTH_RHO`
(a stronger-than-estimated heat is less ductile; value chosen, common practice, see the
docs).  Surface hardness and case depth have no band yet: composition scatter only.
Both scatters are counted, which double-counts part of the heat-to-heat scatter
already inside the band (published values come from real heats): p_meet errs on
the cautious side for states that meet the targets at their estimate.

Draws are shared by every state (common random numbers): the same standardised heat
and the same error scores for all states, so ``p_meet`` of a tighter target is never
higher, and a state better than another in every draw has the higher ``p_meet``.
Fixed seed :data:`SEED`: results are reproducible.

Monte Carlo error: ``p_meet`` is a proportion of ``N_DRAWS`` draws; its standard error
is ``sqrt(p (1 − p) / N_DRAWS)``, at most 0.035 at N_DRAWS = 200 (p = 0.5) and about
0.021 at p = 0.9 (:func:`standard_error`; tested in ``tests/test_scatter.py``).

References
----------
Monte Carlo propagation of input distributions through a model: JCGM 101:2008,
*Evaluation of measurement data — Supplement 1 to the GUM: propagation of
distributions using a Monte Carlo method*, §5–7 (linearised propagation vs Monte
Carlo; the standard error of a proportion).  Truncated normal: Johnson, Kotz &
Balakrishnan, *Continuous Univariate Distributions* vol. 1, 2nd ed. (Wiley 1994),
ch. 13 (from memory).
"""
from __future__ import annotations

import functools
import hashlib

import numpy as np
import pandas as pd
from scipy import special

from ..cache import disk_arrays, disk_enabled, disk_table, evict_oldest, load_arrays, per_section_store, save_arrays
from ..catalogue.grades import default_catalogue
from ..models import conversions
from ..routes import bands
from ..routes import families as fam_registry
from ..routes.evaluate import STEEL_SCALE_FAMILIES
from ..routes.families.base import Batch
from .expand import StatesColumns, _family_batch, expand_columns, structure_of

#: draws per state (at least 200: standard error of p_meet <= 0.035)
N_DRAWS = 200
#: fixed seed of the draws (reproducible results)
SEED = 20261203
#: σ of the composition draw in units of the half-range (limits at ±2σ)
SIGMA_HALF_RANGES = 0.5
#: the 95 % point of the standard normal (a 90 % two-sided band spans ±1.645 σ)
Z95 = float(special.ndtri(0.95))
#: correlation of the elongation error score with the strength error score (chosen: a
#: heat stronger than estimated is usually less ductile; common practice)
ELONGATION_STRENGTH_RHO = -0.5
#: properties drawn from the linearised composition model
SAMPLED = ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "surface_hardness_hv", "case_depth_mm")
#: band mode of the properties that carry a band (the others: composition only)
BANDED = {"uts_mpa": "relative", "yield_mpa": "relative", "hardness_hv": "relative",
          "elongation_pct": "absolute"}
#: residual elements fixed at half their maximum in every heat (as the corners)
FIXED_RESIDUALS = ("P", "S")


def standard_error(p, n_draws: int = N_DRAWS):
    """Monte Carlo standard error of a proportion ``p`` estimated from ``n_draws``
    independent draws: ``sqrt(p (1 − p) / n_draws)`` (binomial; JCGM 101:2008 §7)."""
    p = np.asarray(p, float)
    return np.sqrt(p * (1.0 - p) / n_draws)


def draws(elements, n_draws: int = N_DRAWS, seed: int = SEED) -> dict:
    """The shared random numbers: ``z`` (n_draws, len(elements)) standardised element
    positions (truncated normal, σ = :data:`SIGMA_HALF_RANGES`, on [−1, 1]),
    ``eps_s`` and ``eps_e`` (n_draws,) standard normal error scores of strength and
    elongation (correlation :data:`ELONGATION_STRENGTH_RHO`)."""
    z, e1, e2 = _draw_table(tuple(elements), int(n_draws), int(seed))
    rho = ELONGATION_STRENGTH_RHO
    return {"z": np.atleast_2d(z).reshape(n_draws, len(elements)), "eps_s": e1,
            "eps_e": rho * e1 + np.sqrt(1.0 - rho * rho) * e2}


@disk_table      # constants of the seed: drawn once per machine (scipy.stats costs ~0.5 s to import)
def _draw_table(elements: tuple, n_draws: int, seed: int) -> tuple:
    """(z, e1, e2): the truncated-normal element positions and two standard normal score
    vectors of :func:`draws`, from one generator seeded with ``seed``."""
    from scipy import stats      # lazy: only when the table is built, not in every process

    rng = np.random.default_rng(seed)
    b = 1.0 / SIGMA_HALF_RANGES
    z = stats.truncnorm.rvs(-b, b, scale=SIGMA_HALF_RANGES, size=(n_draws, len(elements)), random_state=rng)
    e1 = rng.standard_normal(n_draws)
    e2 = rng.standard_normal(n_draws)
    return np.asarray(z, float), np.asarray(e1, float), np.asarray(e2, float)


def _half_ranges(batch: Batch, element: str) -> np.ndarray:
    out = np.zeros(len(batch.grades))
    if element in FIXED_RESIDUALS:
        return out[batch.gidx]
    for k, g in enumerate(batch.grades):
        if element in g.comp_min:
            out[k] = 0.5 * (g.comp_max[element] - g.comp_min[element])
    return out[batch.gidx]


#: sensitivities are computed at every THIN-th value of a route's main parameter (and its
#: last value) and interpolated linearly in between (they vary smoothly along it)
THIN = 3


def _thinned(batch: Batch, main: str | None) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """Rows at which to compute the sensitivities, and for every row its left and right
    computed neighbours along the main parameter (same grade and other parameters) with
    the weight of the left one."""
    n = batch.n
    idx = np.arange(n)
    if not main or main not in batch.params or THIN <= 1:
        return idx, idx, idx, np.ones(n)
    mv = np.asarray(batch.params[main], float)
    # group: the grade and every other parameter (codes of their distinct values, as text)
    cols = [np.asarray(batch.gidx, float)]
    for k, v in batch.params.items():
        if k != main:
            cols.append(np.unique(np.asarray(v).astype(str), return_inverse=True)[1].reshape(-1).astype(float))
    table = np.ascontiguousarray(np.column_stack(cols))
    group = np.unique(table.view(np.dtype((np.void, table.dtype.itemsize * table.shape[1]))).ravel(),
                      return_inverse=True)[1].reshape(-1)
    order = np.lexsort((mv, group))
    g_s, m_s = group[order], mv[order]
    first = np.r_[True, g_s[1:] != g_s[:-1]]
    last = np.r_[g_s[1:] != g_s[:-1], True]
    start = np.maximum.accumulate(np.where(first, np.arange(n), 0))
    pos = np.arange(n) - start
    keep_s = (pos % THIN == 0) | last
    at = np.where(keep_s, np.arange(n), -1)
    left_s = np.maximum.accumulate(at)                                   # last kept at or before
    right_s = np.minimum.accumulate(np.where(keep_s, np.arange(n), n)[::-1])[::-1]  # next kept
    span = m_s[right_s] - m_s[left_s]
    with np.errstate(invalid="ignore", divide="ignore"):
        w_s = np.where(span > 0, (m_s[right_s] - m_s) / span, 1.0)
    left, right, w = np.empty(n, int), np.empty(n, int), np.empty(n)
    left[order], right[order], w[order] = order[left_s], order[right_s], w_s
    return np.sort(order[keep_s]), left, right, w


def _family_plan(fam, d, t, nominal_index):
    """The section-independent part of :func:`_family_effects` for one route family: the
    catalogue's states of the family (grid and compositions do not depend on the section),
    their keys, the moved elements and half-ranges, the thinned rows and their
    neighbours, the moved compositions, and the rows of the moved states in
    ``nominal_index``.  None when the family has no states."""
    # the catalogue's grid and compositions, kept per family (expand._catalogue_blocks)
    built = _family_batch(fam, None, d, t, ("nominal",))
    if built is None:
        return None
    batch, state_no, _ = built
    keys = (batch.attr("id").astype(str).astype(object) + "|" + fam.name + "|" + state_no.astype(str).astype(object))
    elements = sorted(e for e in batch.comp if e not in FIXED_RESIDUALS)
    h = {e: _half_ranges(batch, e) for e in elements}
    elements = [e for e in elements if (h[e] > 0).any()]
    plan = {"keys": keys, "elements": elements, "n": batch.n}
    if not elements:
        return plan
    sub, left, right, w = _thinned(batch, fam.main_parameter)
    on_sub = np.zeros(batch.n, bool)
    on_sub[sub] = True
    idx, col = [], []
    for j, e in enumerate(elements):
        rows = np.flatnonzero(on_sub & (h[e] > 0))
        idx.append(rows)
        col.append(np.full(len(rows), j))
    idx, col = np.concatenate(idx), np.concatenate(col)
    comp = {e: np.asarray(v, float)[idx].copy() for e, v in batch.comp.items()}
    for j, e in enumerate(elements):
        m = col == j
        comp[e][m] += h[e][idx[m]]
    plan.update(grades=batch.grades, gidx=batch.gidx[idx], comp=comp,
                params={p: np.asarray(v)[idx] for p, v in batch.params.items()},
                idx=idx, col=col, left=left, right=right, w=w,
                at=nominal_index.get_indexer(keys[idx]))      # rows of the moved states' nominal values
    return plan


def _family_effects(fam, d, t, nominal: dict, plan=None):
    """(state keys, elements, {prop: (n, K) change of prop when the element moves from
    mid-range to its maximum}) for the nominal states of one route family (``plan``: its
    :func:`_family_plan`, built here when not given)."""
    if plan is None:
        plan = _family_plan(fam, d, t, nominal["index"])
    if plan is None:
        return None
    keys, elements, n = plan["keys"], plan["elements"], plan["n"]
    k = len(elements)
    if not elements:
        return keys, elements, {}
    idx, col, left, right, w, at = (plan[x] for x in ("idx", "col", "left", "right", "w", "at"))
    m = len(idx)
    # arrays of its own for compute (a kept plan is never changed)
    pert = Batch(plan["grades"], plan["gidx"].copy(), {e: v.copy() for e, v in plan["comp"].items()},
                 {p: v.copy() for p, v in plan["params"].items()},
                 np.full(m, np.nan if d is None else d), np.full(m, np.nan if t is None else t))
    res = fam.compute(pert)       # the sampled properties come from compute itself (no band, no HRC)
    out = {}
    for p in SAMPLED:
        if p not in res:
            continue
        base = np.where(at >= 0, nominal[p][at], np.nan)
        delta = np.asarray(res[p], float) - base
        full = np.zeros((n, k))
        full[idx, col] = np.where(np.isfinite(delta), delta, 0.0)
        out[p] = w[:, None] * full[left] + (1.0 - w)[:, None] * full[right]
    return keys, elements, out


#: per structure digest of the states table (:func:`selector.states.expand.structure_of`):
#: the rows of each corner, the nominal state-key index, and per family its
#: :func:`_family_plan` with the rows of its keys in each corner block (the same at every section)
_PLANS: dict = {}


def _structure_plan(states, d, t) -> dict:
    digest = states.digest if isinstance(states, StatesColumns) else structure_of(states)
    hit = _PLANS.get(digest) if digest is not None else None
    if hit is not None:
        return hit
    corner = states["corner"].to_numpy(dtype=object)
    key = states["state_key"].to_numpy(object)
    rows = {c: np.flatnonzero(corner == c) for c in CORNER_NAMES}
    index = {c: pd.Index(key[rows[c]]) for c in CORNER_NAMES}
    fams = []
    for fam in fam_registry.available():
        plan = _family_plan(fam, d, t, index["nominal"])
        if plan is None:
            continue
        plan["in_corner"] = {c: index[c].get_indexer(plan["keys"]) for c in CORNER_NAMES}
        fams.append((fam, plan))
    out = {"rows": rows, "index": index["nominal"], "families": fams}
    if digest is not None:
        evict_oldest(_PLANS, 4)
        _PLANS[digest] = out
    return out


CORNER_NAMES = ("nominal", "lean", "rich")


@disk_arrays     # kept in the user's cache directory, keyed by the arguments and all code and data
def _effect_blocks(diameter_mm: float | None, thickness_mm: float | None) -> dict:
    """The sensitivities of :func:`effects` as plain arrays, one block per route family:
    ``f<i>_keys`` (m_i,) state keys, ``f<i>_elements`` (K_i,), ``f<i>_a_<prop>`` (m_i, K_i)."""
    states = expand_columns(diameter_mm, thickness_mm)      # columns: no DataFrame is built
    sp = _structure_plan(states, diameter_mm, thickness_mm)
    vals = {c: {p: states[p].to_numpy(float)[sp["rows"][c]] for p in SAMPLED} for c in CORNER_NAMES}
    nominal = dict(vals["nominal"])
    nominal["index"] = sp["index"]
    out = {}
    i = 0
    for fam, plan in sp["families"]:
        res = _family_effects(fam, diameter_mm, thickness_mm, nominal, plan)
        keys, els, deltas = res
        out[f"f{i}_keys"] = np.asarray(keys, dtype=str)
        out[f"f{i}_elements"] = np.asarray(list(els), dtype=str)
        for p, delta in deltas.items():
            out[f"f{i}_a_{p}"] = np.ascontiguousarray(delta, dtype=float)
        # the exact corners of the expansion, as changes from the nominal state (the anchors)
        at = plan["in_corner"]["nominal"]
        for c, sign in (("lean", -1.0), ("rich", 1.0)):
            ci = plan["in_corner"][c]
            for p in SAMPLED:
                y0 = np.where(at >= 0, nominal[p][at], np.nan)
                yc = np.where(ci >= 0, vals[c][p][ci], np.nan)
                out[f"f{i}_d{c}_{p}"] = sign * (yc - y0)
        i += 1
    return out


@functools.lru_cache(maxsize=8)
def effects(diameter_mm: float | None, thickness_mm: float | None) -> dict:
    """Sensitivities of the nominal states of :func:`expand` at one section.

    Returns ``{"state_key": (m,) keys, "elements": tuple, "a": {prop: (m, K) array}}``
    where ``a[prop][i, k]`` is the change of ``prop`` when element ``k`` moves from its
    mid-range to its maximum (0 where the grade does not specify it; 0 where the moved
    state's value is undefined, e.g. off the hardness table, so such a state keeps its
    nominal value).  Computed at every :data:`THIN`-th value of the route's main
    parameter and interpolated linearly in between.  Cached per section, in memory and
    in the user's cache directory (:func:`selector.cache.disk_arrays`; treat as
    read-only)."""
    blocks = _effect_blocks(diameter_mm, thickness_mm)
    parts = []
    i = 0
    while f"f{i}_keys" in blocks:
        els = [str(e) for e in blocks[f"f{i}_elements"]]
        res = {p: blocks[f"f{i}_a_{p}"] for p in SAMPLED if f"f{i}_a_{p}" in blocks}
        parts.append((blocks[f"f{i}_keys"].astype(object), els, res))
        i += 1
    anchors = {c: {p: np.concatenate([blocks[f"f{j}_d{c}_{p}"] for j in range(i)]) if i else np.zeros(0)
                   for p in SAMPLED} for c in ("lean", "rich")}
    elements = tuple(sorted({e for _, els, _ in parts for e in els}))
    kpos = {e: i for i, e in enumerate(elements)}
    keys = np.concatenate([k for k, _, _ in parts])
    a = {p: np.zeros((len(keys), len(elements))) for p in SAMPLED}
    start = 0
    for k, els, res in parts:
        cols = np.array([kpos[e] for e in els], int)
        for p, delta in res.items():
            a[p][start:start + len(k), cols] = delta
        start += len(k)
    return {"state_key": keys, "index": pd.Index(keys), "elements": elements, "a": a,
            "d_lean": anchors["lean"], "d_rich": anchors["rich"]}



#: hash of the nominal state keys (in a prepared table's order) -> the :func:`_family_plan` of
#: every route family against those rows (section-independent; a few recent ones)
_ROW_PLANS: dict = {}


def _row_plans(keys: np.ndarray) -> list:
    """(family, plan, rows of the plan's states in ``keys``) per route family, kept per key order."""
    h = hashlib.blake2b("\x00".join(keys.tolist()).encode(), digest_size=20).hexdigest()
    hit = _ROW_PLANS.get(h)
    if hit is not None:
        return hit
    index = pd.Index(keys)
    out = []
    for fam in fam_registry.available():
        plan = _family_plan(fam, None, None, index)
        if plan is None:
            continue
        pos = index.get_indexer(plan["keys"])
        if (pos < 0).any():
            raise KeyError(f"states of {fam.name} missing from the prepared table")
        out.append((fam, plan, pos))
    evict_oldest(_ROW_PLANS, 4)
    _ROW_PLANS[h] = out
    return out


@per_section_store
def _disk_sensitivities(diameter_mm, thickness_mm):
    """Names the disk file of :class:`Sensitivities` (its qualified name and the section key the
    file, :func:`selector.cache.save_arrays`); never called."""
    raise NotImplementedError("a cache-file name only")


class Sensitivities:
    """The sensitivities of :func:`effects`, computed only for the states asked for.

    Row ``i`` is the ``i``-th of ``keys`` (the nominal block of a prepared table, in its
    order).  :meth:`ensure` computes the sensitivities of the asked rows that are not yet
    known: the moved-element ``compute`` runs only on the thinned rows (:data:`THIN`) that
    those states interpolate from, and each computed thinned row is kept, so a later call
    that needs more states computes only the missing ones.  ``a[p][rows]``, ``d_lean[p]``,
    ``d_rich[p]`` and ``elements`` are then the rows of :func:`effects` of those states,
    bit for bit (each state's value comes from the same element-wise operations on the same
    inputs; tests/test_speed_equivalence.py).  The anchors come from the table's exact
    corners.  The computed part is kept in the user's cache directory per section
    (:func:`selector.cache.save_arrays`), so a later process reads what any earlier one
    computed and computes only what is new.

    Parameters
    ----------
    keys : array of str (M,)
        State keys of the nominal states.
    nominal, lean, rich : dict of str -> (M,) arrays
        The :data:`SAMPLED` columns of the nominal, lean and rich corners, row-aligned.
    diameter_mm, thickness_mm : float or None
        The section as given to :func:`expand`.
    """

    def __init__(self, keys, nominal: dict, lean: dict, rich: dict, diameter_mm, thickness_mm):
        self.keys = np.asarray(keys).astype(str)
        self.section = (diameter_mm, thickness_mm)
        self.m = m = len(self.keys)
        self.nominal = {p: np.asarray(nominal[p], float) for p in SAMPLED}
        self.d_lean = {p: -1.0 * (np.asarray(lean[p], float) - self.nominal[p]) for p in SAMPLED}
        self.d_rich = {p: 1.0 * (np.asarray(rich[p], float) - self.nominal[p]) for p in SAMPLED}
        self.plans = None
        self.fam_done, self.fam_raw = {}, {}          # per family no: entries computed, their changes
        loaded = self._load()
        if loaded is None:
            self._plans()
            self.elements = tuple(sorted({e for _, pl, _ in self.plans for e in pl["elements"]}))
            self.a = {p: np.zeros((m, len(self.elements))) for p in SAMPLED}
            self.done = np.zeros(m, bool)

    # -- disk -------------------------------------------------------------------------
    def _load(self):
        arr = load_arrays(_disk_sensitivities, self.section)
        try:
            if arr is None or not np.array_equal(arr["keys"], self.keys):
                return None
            self.elements = tuple(str(e) for e in arr["elements"])
            self.done = np.array(arr["done"], bool)
            if self.done.shape != (self.m,):
                return None
            k = len(self.elements)
            self.a = {p: np.zeros((self.m, k)) for p in SAMPLED}
            i = 0
            while f"f{i}_pos" in arr:
                pos, cols = np.asarray(arr[f"f{i}_pos"], np.int64), np.asarray(arr[f"f{i}_cols"], np.int64)
                for p in SAMPLED:
                    if f"f{i}_a_{p}" in arr:
                        self.a[p][np.ix_(pos, cols)] = arr[f"f{i}_a_{p}"]
                if f"f{i}_done" in arr:
                    self.fam_done[i] = np.array(arr[f"f{i}_done"], bool)
                    self.fam_raw[i] = {p: np.array(arr[f"f{i}_r_{p}"], float) for p in SAMPLED
                                       if f"f{i}_r_{p}" in arr}
                i += 1
        except (KeyError, ValueError, TypeError, IndexError):
            self.fam_done, self.fam_raw = {}, {}
            return None
        return True

    def _save(self):
        """Write what is known (per family: its rows' sensitivities over its own elements, and
        the computed moved-element changes from which more states are interpolated); nothing
        to gather with the disk cache off."""
        if not disk_enabled():
            return
        arrays = {"keys": self.keys, "elements": np.asarray(self.elements, dtype=str), "done": self.done}
        kpos = {e: j for j, e in enumerate(self.elements)}
        for i, (_, plan, pos) in enumerate(self.plans):
            cols = np.array([kpos[e] for e in plan["elements"]], np.int64)
            arrays[f"f{i}_pos"], arrays[f"f{i}_cols"] = np.asarray(pos, np.int64), cols
            for p in self.fam_raw.get(i, {}):
                arrays[f"f{i}_a_{p}"] = np.ascontiguousarray(self.a[p][np.ix_(pos, cols)])
            if i in self.fam_done:
                arrays[f"f{i}_done"] = self.fam_done[i]
                arrays.update({f"f{i}_r_{p}": v for p, v in self.fam_raw[i].items()})
        save_arrays(_disk_sensitivities, self.section, arrays)

    # -- computing ----------------------------------------------------------------------
    def _plans(self):
        if self.plans is None:
            self.plans = _row_plans(self.keys)
            fam_of = np.full(self.m, -1, np.int64)
            local = np.full(self.m, -1, np.int64)
            for i, (_, plan, pos) in enumerate(self.plans):
                fam_of[pos] = i
                local[pos] = np.arange(len(pos))
            self.fam_of, self.local = fam_of, local
        return self.plans

    def ensure(self, rows) -> None:
        """Compute the sensitivities of ``rows`` (indices into ``keys``) not yet known."""
        rows = np.asarray(rows, np.int64)
        need = np.unique(rows[~self.done[rows]])
        if not len(need):
            return
        d, t = self.section
        kpos = {e: j for j, e in enumerate(self.elements)}
        for i, (fam, plan, pos) in enumerate(self._plans()):
            loc = self.local[need[self.fam_of[need] == i]]
            if not len(loc) or not plan["elements"]:
                continue
            idx, col, left, right, w, at = (plan[x] for x in ("idx", "col", "left", "right", "w", "at"))
            done = self.fam_done.setdefault(i, np.zeros(len(idx), bool))
            raw = self.fam_raw.setdefault(i, {})
            want = np.zeros(plan["n"], bool)
            want[left[loc]] = True
            want[right[loc]] = True
            ent = np.flatnonzero(want[idx] & ~done)
            if len(ent):
                q = len(ent)
                pert = Batch(plan["grades"], plan["gidx"][ent], {e: v[ent] for e, v in plan["comp"].items()},
                             {p: v[ent] for p, v in plan["params"].items()},
                             np.full(q, np.nan if d is None else d), np.full(q, np.nan if t is None else t))
                res = fam.compute(pert)
                for p in SAMPLED:
                    if p not in res:
                        continue
                    base = np.where(at[ent] >= 0, self.nominal[p][at[ent]], np.nan)
                    delta = np.asarray(res[p], float) - base
                    raw.setdefault(p, np.zeros(len(idx)))[ent] = np.where(np.isfinite(delta), delta, 0.0)
                done[ent] = True
            cols = np.array([kpos[e] for e in plan["elements"]], int)
            for p, r in raw.items():
                full = np.zeros((plan["n"], len(plan["elements"])))
                full[idx[done], col[done]] = r[done]
                vals = w[loc, None] * full[left[loc]] + (1.0 - w[loc])[:, None] * full[right[loc]]
                self.a[p][np.ix_(pos[loc], cols)] = vals
        self.done[need] = True
        self._save()


#: the corner anchoring is used where the linear predictor points one way:
#: |Σ a_e| >= ANCHOR_MIN_SHARE · Σ |a_e| (else the plain linearisation)
ANCHOR_MIN_SHARE = 0.5
#: largest factor applied to the linear predictor by the anchoring (a safety cap)
ANCHOR_MAX_FACTOR = 10.0


def anchor_factors(a_rows: np.ndarray, d_lean: np.ndarray, d_rich: np.ndarray) -> tuple:
    """(f_pos, f_neg) per state: the factors on the linear predictor ``s = Σ a_e z_e`` where
    s >= 0 and where s < 0 that make the drawn property exact at the rich corner (every z_e = +1:
    ``s = Σ a_e``) and at the lean corner (every z_e = −1), ``f_up = d_rich / Σ a_e``,
    ``f_down = d_lean / Σ a_e`` (``d_rich = y_rich − y_nom``, ``d_lean = y_nom − y_lean``,
    both exact, from the expansion).  1 (the plain linearisation) where a corner is
    undefined or the sensitivities do not point one way (:data:`ANCHOR_MIN_SHARE`);
    capped at ±:data:`ANCHOR_MAX_FACTOR`."""
    tot = a_rows.sum(axis=1)
    mag = np.abs(a_rows).sum(axis=1)
    one_way = (np.abs(tot) >= ANCHOR_MIN_SHARE * mag) & (mag > 0)
    with np.errstate(invalid="ignore", divide="ignore"):
        up = np.where(one_way, d_rich / np.where(one_way, tot, 1.0), np.nan)
        dn = np.where(one_way, d_lean / np.where(one_way, tot, 1.0), np.nan)
    up = np.where(np.isfinite(up), np.clip(up, -ANCHOR_MAX_FACTOR, ANCHOR_MAX_FACTOR), 1.0)
    dn = np.where(np.isfinite(dn), np.clip(dn, -ANCHOR_MAX_FACTOR, ANCHOR_MAX_FACTOR), 1.0)
    # the rich corner sits at s = Σ a_e: on the side s >= 0 when Σ a_e > 0, else on s < 0
    rich_up = tot >= 0.0
    return np.where(rich_up, up, dn), np.where(rich_up, dn, up)


def _band_quantiles(frame: pd.DataFrame, section_mm: float) -> dict:
    """(q05, q95) per row and banded property (0, 0 where the band table has none)."""
    out = {}
    # the band table is looked up once per distinct (family, route) and spread to the rows
    fcode, fams = pd.factorize(frame["family"].to_numpy(object))
    rcode, routes = pd.factorize(frame["route"].to_numpy(object))
    combo, inv = np.unique(rcode * len(fams) + fcode, return_inverse=True)
    inv = inv.reshape(-1)
    for prop in BANDED:
        lo_u, hi_u = np.zeros(len(combo)), np.zeros(len(combo))
        for ri in np.unique(combo // len(fams)):
            m = combo // len(fams) == ri
            ql, qh, _ = bands.quantiles(np.asarray(fams, object)[combo[m] % len(fams)], routes[ri],
                                        np.full(int(m.sum()), section_mm), prop)
            lo_u[m], hi_u[m] = ql, qh
        lo, hi = lo_u[inv], hi_u[inv]
        ok = np.isfinite(lo) & np.isfinite(hi)
        if bands.BAND_FREE in frame:      # a standard's guaranteed minimum: no model error
            ok &= ~(frame[bands.BAND_FREE].to_numpy(float) > 0.5)
        out[prop] = (np.where(ok, lo, 0.0), np.where(ok, hi, 0.0))
    return out


#: most rows of states drawn at once in :func:`sample` (bounds its (rows, N_DRAWS) intermediates).
#: Every block is a (rows, K) @ (K, N_DRAWS) product of one shape for a given K and N_DRAWS
#: (:func:`block_rows`), the last one padded with rows of zeros: a state's draws then come from
#: a product of the same shape whatever other states are drawn with it (a BLAS product's last
#: bits depend on its shape), so drawing a subset of the states gives exactly their rows of
#: drawing them all (tests/test_speed_equivalence.py)
SAMPLE_BLOCK_ROWS = 256
#: largest rows·K·N_DRAWS of one block product: OpenBLAS computes a product up to 65536 × 4
#: multiply-adds on one thread (interface/gemm.c, SMP_THRESHOLD_MIN × GEMM_MULTITHREAD_THRESHOLD);
#: above it wakes its thread pool, which on the shared 2-core machine cost about 100 times the
#: CPU per row (measured: 16 µs against 0.15 µs per row of 12 × 200)
BLOCK_PRODUCT_MAX = 65536 * 4


def block_rows(n_elements: int, n_draws: int) -> int:
    """Rows of one block product of :func:`sample`: a multiple of 16 (whole kernel tiles),
    at most :data:`SAMPLE_BLOCK_ROWS`, within :data:`BLOCK_PRODUCT_MAX` where it can be."""
    rows = BLOCK_PRODUCT_MAX // max(1, int(n_elements) * int(n_draws))
    return int(min(SAMPLE_BLOCK_ROWS, max(16, rows - rows % 16)))

#: columns :func:`sample` can draw, and the drawn property each needs
DRAWABLE = {**{p: p for p in SAMPLED}, "hardness_hrc": "hardness_hv", "surface_hardness_hrc": "surface_hardness_hv"}


def sample(nominal: pd.DataFrame, section_mm: float, diameter_mm, thickness_mm,
           n_draws: int = N_DRAWS, seed: int = SEED, dtype=np.float32, columns=None,
           effect_rows=None, sens: "Sensitivities | None" = None) -> dict:
    """Monte Carlo draws of every state of ``nominal`` (rows of the nominal corner of
    :func:`expand`, in any order).

    Parameters
    ----------
    nominal : pandas.DataFrame
        Nominal states with ``state_key``, ``family``, ``route`` and the columns of
        :data:`SAMPLED`.
    section_mm : float
        The section (diameter or thickness), mm, for the band lookup.
    diameter_mm, thickness_mm : float or None
        The section as given to :func:`expand` (for the sensitivities).
    n_draws : int
        Draws per state (default :data:`N_DRAWS`).
    seed : int
        Seed of the draws (default :data:`SEED`).
    dtype : numpy dtype
        Of the returned arrays (default float32: 200 draws of 5 000 states are 4 MB).
    columns : sequence of str, optional
        Only these columns (out of :data:`DRAWABLE`); default all.
    effect_rows : array of int, optional
        The row of each state of ``nominal`` in :func:`effects` (default: looked up by
        ``state_key``; a caller that draws subsets of one table looks them up once).
        With ``sens``: the rows of ``nominal`` in ``sens.keys``.
    sens : Sensitivities, optional
        The sensitivities computed only for the states drawn (:class:`Sensitivities`); the
        same draws as with :func:`effects` (default), bit for bit.

    Returns
    -------
    dict
        Column name → array (len(nominal), n_draws): ``uts_mpa``, ``yield_mpa``,
        ``elongation_pct``, ``hardness_hv``, ``hardness_hrc`` (ASTM E140 on steels, NaN
        below the scale and for non-steels), ``surface_hardness_hv``,
        ``surface_hardness_hrc``, ``case_depth_mm``.  NaN where the nominal value is NaN.

    Validity
    --------
    The linearisation holds while properties change smoothly over the specification
    range; the rich-corner check in ``docs/methods/selection.md`` measures it.

    Example
    -------
    >>> from selector.states.expand import expand                 # doctest: +SKIP
    >>> st = expand(60.0); nom = st[st.corner == "nominal"]
    >>> s = sample(nom, 60.0, 60.0, None); s["yield_mpa"].shape
    (5007, 200)
    """
    if sens is None:
        eff = effects(diameter_mm, thickness_mm)
        rows = (eff["index"].get_indexer(nominal["state_key"].to_numpy()) if effect_rows is None
                else np.asarray(effect_rows, np.int64))
    else:
        eff = {"elements": sens.elements, "a": sens.a, "d_lean": sens.d_lean, "d_rich": sens.d_rich}
        rows = (pd.Index(sens.keys).get_indexer(nominal["state_key"].to_numpy().astype(str))
                if effect_rows is None else np.asarray(effect_rows, np.int64))
    if (rows < 0).any():
        raise KeyError("states missing from the sensitivities: " + ", ".join(
            nominal["state_key"].to_numpy()[rows < 0][:3]))
    if sens is not None:
        sens.ensure(rows)
    dr = draws(eff["elements"], n_draws, seed)
    zt = dr["z"].T                                         # (K, D)
    q = _band_quantiles(nominal, section_mm)
    want = list(DRAWABLE) if columns is None else [c for c in columns if c in DRAWABLE]
    need = {DRAWABLE[c] for c in want}
    out = {}
    m, d = len(nominal), int(n_draws)
    for p in SAMPLED:
        if p not in need:
            continue
        base = nominal[p].to_numpy(float)[:, None]
        a_p = eff["a"][p]
        f_up, f_dn = anchor_factors(a_p[rows], eff["d_lean"][p][rows], eff["d_rich"][p][rows])
        if p in BANDED:
            lo, hi = q[p]
            mu, sig = 0.5 * (lo + hi), (hi - lo) / (2.0 * Z95)
            eps = dr["eps_e"] if p == "elongation_pct" else dr["eps_s"]
            # the band error per draw takes one row per distinct (mu, sig): a few dozen rows,
            # computed once and gathered (the same numbers as per state, at a fraction of the cost)
            ms, inv = np.unique(np.column_stack([mu, sig]), axis=0, return_inverse=True)
            inv = inv.reshape(-1)
            if BANDED[p] == "relative":
                err = np.exp(ms[:, :1] + ms[:, 1:] * eps[None, :])
            else:
                err = ms[:, 1:] * eps[None, :]
        res = np.empty((m, d), dtype)
        # in blocks of rows: the (rows, D) intermediates stay small and are reused, instead of
        # several fresh (m, D) float64 arrays per property (same operations, row by row)
        step = block_rows(a_p.shape[1], d)
        blk = np.zeros((step, a_p.shape[1]))
        for r0 in range(0, m, step):
            r1 = min(m, r0 + step)
            blk[:r1 - r0] = a_p[rows[r0:r1]]
            blk[r1 - r0:] = 0.0
            lin = (blk @ zt)[:r1 - r0]                     # s = Σ a_e z_e  (rows, D)
            y = lin * np.where(lin >= 0.0, f_up[r0:r1, None], f_dn[r0:r1, None])
            y += base[r0:r1]                               # y_nom + f(s) · s
            if p in BANDED:
                if BANDED[p] == "relative":
                    y *= err[inv[r0:r1]]
                else:
                    y += ms[inv[r0:r1], :1]
                    y += err[inv[r0:r1]]
                    np.maximum(y, 0.0, out=y)
            elif p == "case_depth_mm":
                np.maximum(y, 0.0, out=y)
            res[r0:r1] = y
        out[p] = res
    steel = np.isin(nominal["family"].to_numpy(object).astype(str), STEEL_SCALE_FAMILIES)[:, None]
    for key in ("hardness", "surface_hardness"):
        if key + "_hrc" not in want:
            continue
        hv = out[key + "_hv"]
        hrc = np.full(hv.shape, np.nan, dtype)
        if steel.any():
            rows_s = np.flatnonzero(steel[:, 0])
            hrc[rows_s] = conversions.hv_to_hrc(hv[rows_s].astype(float)).astype(dtype)
        out[key + "_hrc"] = hrc
    return {c: out[c] for c in want}
