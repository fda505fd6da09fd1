"""Pareto (non-dominated) filtering of candidate states.

Definitions (also in ``docs/methods/selection.md``)
---------------------------------------------------
Every objective is first turned into one to maximise (an objective to minimise is
negated).  Point ``p`` *dominates* point ``q`` when ``p_j >= q_j`` for every
objective ``j`` and ``p_j > q_j`` for at least one.  The Pareto front is the set of
points that no point dominates (Pareto 1906; the "maxima of a set of vectors" of
Kung, Luccio & Preparata 1975).

* Exact duplicates do not dominate one another, so all copies of a front point are
  kept.
* A row with a NaN in any objective is never on the front and takes no part in the
  comparison (it dominates nothing).  ``+inf``/``-inf`` are
  ordinary, comparable values.

Methods
-------
* two objectives: linear pre-filter passes, each by one pivot point taken from an
  evenly strided sample (a "certificate of exclusion", Bentley, Clarkson & Levine
  1993), then the sort-and-sweep of Kung,
  Luccio & Preparata (1975): sort by objective 1 descending (ties by objective 2
  descending) and keep a point when its objective 2 beats the running maximum of
  the points before its group.  O(n log n) worst case, about O(n) on typical data.
* three or more: sort-filter-skyline (Chomicki, Godfrey, Gryz & Liang 2003), the
  block-nested-loops filter of Börzsönyi, Kossmann & Stocker (2001) run over points
  presorted by a monotone score (the range-normalised sum of the objectives), with
  the pivots taken in numpy blocks.  Exact for any input order; fast when the
  front is small compared with n (the usual case), O(n · front) at worst.

References
----------
Pareto, V. (1906) *Manuale di economia politica*.  Società Editrice Libraria, Milan.
Kung, H. T., Luccio, F., Preparata, F. P. (1975) On finding the maxima of a set of
    vectors.  *J. ACM* 22(4), 469-476.  doi:10.1145/321906.321910 (pages and DOI from
    memory).
Bentley, J. L., Clarkson, K. L., Levine, D. B. (1993) Fast linear expected-time
    algorithms for computing maxima and convex hulls.  *Algorithmica* 9(2), 168-183.
Börzsönyi, S., Kossmann, D., Stocker, K. (2001) The Skyline operator.  *Proc. 17th
    ICDE*, 421-430.  doi:10.1109/ICDE.2001.914855.
Chomicki, J., Godfrey, P., Gryz, J., Liang, D. (2003) Skyline with presorting.
    *Proc. 19th ICDE*, 717-719.
"""
from __future__ import annotations

from typing import Sequence

import numpy as np

from ..errors import InputError

__all__ = ["pareto_mask"]

# Below this many points the 2-D pivot pre-filter is not worth its passes.
_PREFILTER_MIN_POINTS = 2048
# Below this many rows the k >= 3 single-pivot passes stop.
_ND_PREFILTER_MIN_POINTS = 256
# Points sampled (evenly strided) to estimate the objective ranges for the pivot score.
_SCALE_SAMPLE = 1024
# Upper bound on pivots × candidates compared in one numpy block (k >= 3).
_BLOCK_BUDGET = 1 << 18


def _prepare(values, maximize) -> np.ndarray:
    """Validate and return the values oriented so that every objective is maximised."""
    try:
        x = np.asarray(values, dtype=float)
    except (TypeError, ValueError):
        raise InputError("values", type(values).__name__,
                         "a 2-D array of numbers, shape (n points, k objectives)") from None
    if x.ndim != 2 or x.shape[1] < 1:
        raise InputError("values", f"array of shape {x.shape}",
                         "a 2-D array of numbers, shape (n points, k objectives), k >= 1")
    if isinstance(maximize, (str, bytes)) or not isinstance(maximize, (Sequence, np.ndarray)):
        raise InputError("maximize", maximize, f"a sequence of {x.shape[1]} bools")
    sense = list(maximize)
    if len(sense) != x.shape[1] or not all(isinstance(s, (bool, np.bool_)) for s in sense):
        raise InputError("maximize", maximize,
                         f"a sequence of {x.shape[1]} bools (one per objective column)")
    if all(sense):
        return x
    return x * np.where(sense, 1.0, -1.0)


def _sweep_2d(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """Kung-Luccio-Preparata sweep; ``a``, ``b`` maximised, no NaN.  Returns the mask."""
    n = a.size
    out = np.zeros(n, dtype=bool)
    if n == 0:
        return out
    order = np.lexsort((b, a))[::-1]      # a descending, ties by b descending
    sa, sb = a[order], b[order]
    runmax = np.maximum.accumulate(sb)
    new_a = sa[1:] != sa[:-1]
    if new_a.all():                       # no ties in a: beat every point before
        front = np.empty(n, dtype=bool)
        front[0] = True
        np.greater(sb[1:], runmax[:-1], out=front[1:])
    else:
        start = np.empty(n, dtype=bool)
        start[0] = True
        start[1:] = new_a
        starts = np.flatnonzero(start)
        gid = np.cumsum(start) - 1
        top_b = sb[starts][gid]           # best objective 2 within the same objective 1
        prev = np.empty(starts.size)
        prev[0] = -np.inf                 # unused: the first group has no predecessor
        prev[1:] = runmax[starts[1:] - 1]  # best objective 2 among strictly larger a
        front = (sb == top_b) & ((gid == 0) | (sb > prev[gid]))
    out[order[front]] = True
    return out


def _scale(x: np.ndarray) -> np.ndarray:
    """1 / range of each column, estimated on an evenly strided sample of rows
    (1 where the range is zero or not finite)."""
    n, k = x.shape
    st = np.ascontiguousarray(x[::max(1, n // _SCALE_SAMPLE)].T)   # (k, sample)
    r = st.max(axis=1) - st.min(axis=1)
    if not np.isfinite(r).all():              # NaN or inf in the sample: column by column
        r = np.zeros(k)
        for j in range(k):
            col = st[j][np.isfinite(st[j])]
            if col.size:
                r[j] = col.max() - col.min()
        r[~np.isfinite(r)] = 0.0
    scale = np.ones(k)
    np.divide(1.0, r, out=scale, where=r > 0)
    return scale


def _mask_2d(x: np.ndarray) -> np.ndarray:
    """Front of two maximised objectives; NaN rows are never on it.

    Large inputs are first cut down by a pivot (certificate of exclusion, Bentley,
    Clarkson & Levine 1993): the best point of an evenly strided sample by the
    range-normalised sum; every point strictly below it in both objectives is
    dominated and dropped (so are rows with NaN where the comparison fails).  The
    survivors are cut again the same way while that halves them, then swept."""
    n = x.shape[0]
    a, b = x[:, 0], x[:, 1]
    if n >= _PREFILTER_MIN_POINTS:
        sample = x[::max(1, n // _SCALE_SAMPLE)]
        with np.errstate(invalid="ignore"):   # inf - inf -> NaN: not a pivot
            ss = sample @ _scale(x)
        ss[np.isnan(ss)] = -np.inf
        pa, pb = sample[int(np.argmax(ss))]
        if pa == pa and pb == pb:             # a pivot without NaN
            keep = a >= pa
            keep |= b >= pb                   # the rest is strictly below the pivot
            idx = np.flatnonzero(keep)
            out = np.zeros(n, dtype=bool)
            if idx.size <= n // 2:
                out[idx[_mask_2d(x[idx])]] = True
            else:
                out[idx[_mask_sorted_2d(x[idx])]] = True
            return out
    return _mask_sorted_2d(x)


def _mask_sorted_2d(x: np.ndarray) -> np.ndarray:
    a, b = x[:, 0], x[:, 1]
    if not np.isnan(x).any():
        return _sweep_2d(a, b)
    idx = np.flatnonzero(~np.isnan(a) & ~np.isnan(b))
    out = np.zeros(x.shape[0], dtype=bool)
    out[idx[_sweep_2d(a[idx], b[idx])]] = True
    return out


def _score(x: np.ndarray) -> np.ndarray:
    """A monotone score (non-decreasing in every objective): the sum of the objectives
    each divided by its range (see :func:`_scale`).

    Only monotonicity matters for exactness; the scaling just makes the best-scored
    point a strong pivot.  If a row mixes +inf and -inf (NaN score), the values are
    clipped into the finite range first, which keeps the score monotone."""
    k = x.shape[1]
    scale = _scale(x)
    with np.errstate(invalid="ignore"):       # inf - inf -> NaN, handled below
        s = x @ scale
    if np.isnan(s[int(np.argmax(s))]):    # argmax returns the first NaN if there is one
        fin = np.isfinite(x)
        lo = np.array([x[fin[:, j], j].min() if fin[:, j].any() else 0.0 for j in range(k)])
        hi = np.array([x[fin[:, j], j].max() if fin[:, j].any() else 0.0 for j in range(k)])
        s = np.clip(x, lo, hi) @ scale
    return s


def _prefilter(x: np.ndarray, s: np.ndarray) -> np.ndarray:
    """Ids of the rows that survive a few single-pivot passes (certificates of
    exclusion, Bentley, Clarkson & Levine 1993).

    Each pass takes the best-scored row not yet used as a pivot and drops every row
    strictly below it in all objectives (such a row is dominated).  Passes stop when
    one removes less than a quarter of the rows left."""
    n, k = x.shape
    ids = vals = work = None                  # None: still the whole of x
    for _ in range(8):
        m = n if ids is None else ids.size
        if m < _ND_PREFILTER_MIN_POINTS:
            break
        v, w = (x, s) if ids is None else (vals, work)
        p = int(np.argmax(w))
        piv = v[p]
        keep = v[:, 0] >= piv[0]
        for j in range(1, k):
            keep |= v[:, j] >= piv[j]
        kept = int(np.count_nonzero(keep))
        if ids is None:
            ids = np.flatnonzero(keep)
            vals, work = x[ids], s[ids]
            work[np.searchsorted(ids, p)] = -np.inf   # do not pick the same pivot again
        else:
            w[p] = -np.inf
            if kept < m:
                ids, vals, work = ids[keep], vals[keep], work[keep]
        if kept > 0.75 * m:
            break
    return np.arange(n) if ids is None else ids


def _mask_nd(x: np.ndarray) -> np.ndarray:
    """Sort-filter-skyline over NaN-free rows after single-pivot pre-filter passes;
    the presorted pivots are taken in numpy blocks that grow while few rows fall."""
    n, k = x.shape
    out = np.zeros(n, dtype=bool)
    if n == 0:
        return out
    s = _score(x)
    idx = _prefilter(x, s)
    order = idx[np.argsort(-s[idx], kind="stable")]
    cand = order                          # candidate ids, score descending
    vals = x[order]
    neg_s = -s[order]                     # ascending, for searchsorted
    pos = 0                               # cand[:pos] have served as pivots
    nb = 1
    while pos < cand.size:
        m_tail = cand.size - pos
        nb = int(min(nb, m_tail, max(1, _BLOCK_BUDGET // m_tail)))
        piv = vals[pos:pos + nb]
        # A dominator never has a lower score; only candidates whose score is at most
        # the block's best can be dominated by the block (ties may sit before pos).
        lo = int(np.searchsorted(neg_s, neg_s[pos], side="left"))
        tail = vals[lo:]
        ge = piv[:, None, 0] >= tail[None, :, 0]
        eq = piv[:, None, 0] == tail[None, :, 0]
        for j in range(1, k):
            pj, tj = piv[:, None, j], tail[None, :, j]
            ge &= pj >= tj
            eq &= pj == tj
        dominated = (ge & ~eq).any(axis=0)
        n_dom = int(np.count_nonzero(dominated))
        if n_dom:
            keep = np.ones(cand.size, dtype=bool)
            keep[lo:] = ~dominated
            pos = int(np.count_nonzero(keep[:pos + nb]))
            cand, vals, neg_s = cand[keep], vals[keep], neg_s[keep]
        else:
            pos += nb
        # many rows fell: stay with small blocks; few fell: take more pivots at once
        nb = 1 if n_dom > 0.25 * m_tail else 2 * nb
    out[cand] = True
    return out


def _mask_oriented(x: np.ndarray) -> np.ndarray:
    n, k = x.shape
    if n == 0:
        return np.zeros(0, dtype=bool)
    if k == 2:
        return _mask_2d(x)
    if k == 1:
        col = x[:, 0]
        if np.isnan(col).all():
            return np.zeros(n, dtype=bool)
        return col == np.nanmax(col)
    if not np.isnan(x).any():
        return _mask_nd(x)
    idx = np.flatnonzero(~np.isnan(x).any(axis=1))
    out = np.zeros(n, dtype=bool)
    out[idx[_mask_nd(x[idx])]] = True
    return out


def pareto_mask(values, maximize: Sequence[bool]) -> np.ndarray:
    """Pareto front (non-dominated points) of ``n`` points in ``k`` objectives.

    Kung, Luccio & Preparata (1975) sort-and-sweep for k = 2; sort-filter-skyline
    (Chomicki et al. 2003) for k >= 3.

    ``p`` dominates ``q``  ⇔  ∀j: p_j ⪰ q_j  and  ∃j: p_j ≻ q_j,
    where ⪰ is ``>=`` for an objective to maximise and ``<=`` for one to minimise.

    Parameters
    ----------
    values : array_like, shape (n, k)
        Objective values, one row per point, in any units (each column its own).
    maximize : sequence of k bool
        ``True`` where larger is better, ``False`` where smaller is better.

    Returns
    -------
    numpy.ndarray of bool, shape (n,)
        ``True`` for points no other point dominates.  All exact duplicates of a
        front point are ``True``; rows with a NaN are always ``False``.

    Raises
    ------
    InputError
        ``values`` not a 2-D numeric array, or ``maximize`` not k bools.

    Validity
    --------
    Any finite or infinite values; time O(n log n) for k = 2, O(n · front) at worst
    for k >= 3 (10^5 random points in three objectives take milliseconds).

    References
    ----------
    Kung, Luccio & Preparata (1975) J. ACM 22(4) 469-476; Bentley, Clarkson & Levine
    (1993) Algorithmica 9(2) 168-183; Börzsönyi, Kossmann & Stocker (2001) ICDE
    421-430, doi:10.1109/ICDE.2001.914855; Chomicki, Godfrey, Gryz & Liang (2003)
    ICDE 717-719.

    Examples
    --------
    >>> pareto_mask([[1, 5], [2, 4], [1, 4], [2, 4]], [True, True]).tolist()
    [True, True, False, True]
    """
    return _mask_oriented(_prepare(values, maximize))
