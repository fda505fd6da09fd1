"""Speed figures of the selection engine on this machine (prints them).

1. The whole catalogue at one section, every modelled route and composition corner:
   expansion + ranking from a cold cache (target: under 1 s on 2 cores).
2. Re-ranking the already expanded table for new targets (target: under 0.1 s).
3. The Pareto step against paretoset (PyPI) on the same 10^4–10^6 points
   (scripts/bench_pareto.py).

Usage: python scripts/benchmark.py [--quick]
"""
from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))


def _best(fn, repeat=3):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times), statistics.median(times)


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    import selector
    from selector.selection.engine import _prepare_cached, prepare, rank
    from selector.states.expand import expand

    selector.grade("4140")   # load the catalogue and models once (import cost is not selection cost)
    targets = {"min_yield_mpa": 700, "min_uts_mpa": 850, "min_elongation_pct": 12}
    rows = []
    t0 = time.perf_counter()
    selector.select(targets, diameter_mm=40.0)
    first = time.perf_counter() - t0
    rows.append(("select, first call in the process (builds cooling tables)", "Ø40 mm", len(expand(40.0)),
                 first, first, float("nan")))
    for d in (25.0, 60.0):
        def cold():
            expand.cache_clear()
            _prepare_cached.cache_clear()
            return selector.select(targets, diameter_mm=d)
        best, med = _best(cold)
        n_states = len(expand(d))
        rows.append(("select, cold (expand + rank)", f"Ø{d:g} mm", n_states, best, med, 1.0))
        p = prepare(d)
        for t in ({"min_yield_mpa": 900}, {"min_uts_mpa": 600, "min_elongation_pct": 20},
                  {"min_surface_hardness_hrc": 55, "min_yield_mpa": 500}):
            best, med = _best(lambda: rank(p, t), repeat=5)
            rows.append((f"re-rank {sorted(t)}", f"Ø{d:g} mm", len(p), best, med, 0.1))
    print(f"{'step':60s} {'section':>9s} {'states':>8s} {'best s':>8s} {'median s':>9s} {'target s':>8s}")
    for name, sec, n, b, m, target in rows:
        flag = "" if target != target else "ok" if b < target else "SLOW"
        print(f"{name:60s} {sec:>9s} {n:8d} {b:8.3f} {m:9.3f} {target:8.2f} {flag}")
    sizes = (10**4, 10**5) if "--quick" in argv else (10**4, 10**5, 10**6)
    try:
        import bench_pareto
    except ImportError:
        sys.path.insert(0, str(Path(__file__).resolve().parent))
        import bench_pareto
    bench_pareto.run(sizes=sizes)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
