"""Benchmark of the Pareto step: ``selector.selection.pareto.pareto_mask`` against the
``paretoset`` package (PyPI), on the same random points in the same run.

Cases: uniform random points in [0, 1)^k, all objectives maximised; two objectives
at each size given, three objectives at the sizes up to 10^5.  For each case the two
masks are compared element by element (``paretoset`` is called with
``distinct=False`` so that, like ours, it keeps every copy of a duplicated front
point), then each function is timed: best of 3 repeats, each repeat a loop long
enough to last about 0.2 s (``timeit`` auto-range), reported as seconds per call.
The repeats of the two functions are interleaved so that both see the same machine
load.  ``paretoset`` compiles its numba kernels on the first call; that call is
made (and its time reported) before any timing.

Run:  python scripts/bench_pareto.py [--quick] [--adversarial]
"""
from __future__ import annotations

import sys
import time
import timeit
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))   # this checkout first, as the other scripts

from selector.selection.pareto import pareto_mask  # noqa: E402

SEED = 20240611


def _points(rng, n: int, k: int, kind: str) -> np.ndarray:
    if kind == "uniform":
        return rng.random((n, k))
    # every point on the front: objective 2 falls as objective 1 rises (distinct values)
    a = rng.permutation(n).astype(float)
    return np.column_stack([a, n - a] + [rng.random(n) for _ in range(k - 2)])


def run(sizes=(10**4, 10**5, 10**6), repeat: int = 3, adversarial: bool = False) -> list[dict]:
    """Time ``pareto_mask`` and ``paretoset.paretoset`` on the same points.

    Parameters
    ----------
    sizes : sequence of int
        Point counts for two objectives; three objectives are run at the sizes
        <= 10^5.
    repeat : int
        Timing repeats; the best is reported.
    adversarial : bool
        Also run 10^4 points in two objectives that are all on the front (the worst
        case of a nested-loops filter).

    Returns
    -------
    list of dict
        One per case: ``objectives, n, points, front, agree, ours_s, paretoset_s,
        ratio`` (``paretoset_s / ours_s``; > 1 means ours is faster).  ``paretoset_s``,
        ``agree`` and ``ratio`` are None when the package is not installed.
    """
    try:
        import paretoset as ps
    except ImportError:
        ps = None
        print("paretoset is not installed (pip install paretoset): timing pareto_mask alone")
    rng = np.random.default_rng(SEED)
    cases = [(2, n, "uniform") for n in sizes] + [(3, n, "uniform") for n in sizes if n <= 10**5]
    if adversarial:
        cases.append((2, 10**4, "all on front"))
    if ps is not None:
        t0 = time.perf_counter()
        for k in (2, 3):
            ps.paretoset(rng.random((64, k)), sense=["max"] * k, distinct=False)
        print(f"paretoset first calls (numba compilation): {time.perf_counter() - t0:.2f} s")
    rows = []
    for k, n, kind in cases:
        x = _points(rng, n, k, kind)
        sense = [True] * k
        ours_fn = lambda: pareto_mask(x, sense)                      # noqa: E731
        mine = ours_fn()
        row = {"objectives": k, "n": n, "points": kind, "front": int(mine.sum()),
               "agree": None, "ours_s": None, "paretoset_s": None, "ratio": None}
        timers = [("ours_s", ours_fn)]
        if ps is not None:
            theirs_fn = lambda: ps.paretoset(x, sense=["max"] * k, distinct=False)  # noqa: E731
            row["agree"] = bool(np.array_equal(mine, theirs_fn()))
            timers.append(("paretoset_s", theirs_fn))
        setup = {name: timeit.Timer(fn) for name, fn in timers}
        number = {name: t.autorange()[0] for name, t in setup.items()}
        best = {name: float("inf") for name in setup}
        for _ in range(repeat):
            for name, t in setup.items():
                best[name] = min(best[name], t.timeit(number[name]) / number[name])
        row.update(best)
        if ps is not None:
            row["ratio"] = row["paretoset_s"] / row["ours_s"]
        rows.append(row)
    _print(rows, repeat)
    return rows


def _print(rows, repeat):
    print(f"Pareto front, seconds per call (best of {repeat}); ratio = paretoset / ours")
    print(f"{'k':>2s} {'points':>9s} {'kind':>13s} {'front':>6s} {'agree':>6s} "
          f"{'ours s':>10s} {'paretoset s':>12s} {'ratio':>7s}")
    for r in rows:
        theirs = f"{r['paretoset_s']:12.6f}" if r["paretoset_s"] is not None else f"{'-':>12s}"
        ratio = f"{r['ratio']:7.2f}" if r["ratio"] is not None else f"{'-':>7s}"
        agree = {True: "yes", False: "NO", None: "-"}[r["agree"]]
        print(f"{r['objectives']:2d} {r['n']:9d} {r['points']:>13s} {r['front']:6d} {agree:>6s} "
              f"{r['ours_s']:10.6f} {theirs} {ratio}")


if __name__ == "__main__":
    argv = sys.argv[1:]
    run(sizes=(10**4, 10**5) if "--quick" in argv else (10**4, 10**5, 10**6),
        adversarial="--adversarial" in argv)
