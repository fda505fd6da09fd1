"""Speed figures of the selection engine on this machine (prints them).

1. The whole catalogue at one section, every modelled route and composition corner:
   expansion + ranking from a cold cache (target: under 1 s on 2 cores).
2. Re-ranking the already expanded table for new targets (target: under 0.1 s).
2b. The whole-catalogue select with p_meet, warm (budget 0.3 s), printed as a ratio to
   a floor (a fixed numpy workload) measured in the same run.
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


def _bench_models() -> None:
    """Vectorised model throughput: the quench chain on 10^5 states, target checks on 10^6 rows."""
    import numpy as np
    import pandas as pd
    from selector.routes import quench_response as qr
    from selector.selection.targets import meets, validate_targets
    from selector.catalogue.grades import FAMILIES

    n = 100_000
    rng = np.random.default_rng(0)
    comp = {"C": rng.uniform(0.15, 0.6, n), "Mn": rng.uniform(0.5, 1.2, n), "Si": np.full(n, 0.25),
            "Cr": rng.uniform(0, 1.2, n), "Mo": rng.uniform(0, 0.3, n), "Ni": rng.uniform(0, 2, n)}
    q = rng.choice(["oil", "water", "air", "polymer", "brine"], n)
    a = rng.choice(["none", "mild", "moderate", "strong"], n)
    d = rng.uniform(5, 200, n)
    qr.as_quenched_profile({k: v[:5] for k, v in comp.items()}, q[:5], a[:5], diameter_mm=d[:5])
    best, med = _best(lambda: qr.as_quenched_profile(comp, q, a, diameter_mm=d))
    print(f"as_quenched_profile, 10^5 states x 5 positions: best {best:.3f} s, median {med:.3f} s (target 1 s)")
    m = 10**6
    frame = pd.DataFrame({"yield_mpa": rng.uniform(100, 2000, m), "uts_mpa": rng.uniform(200, 2300, m),
                          "elongation_pct": rng.uniform(1, 60, m), "hardness_hrc": rng.uniform(20, 65, m),
                          "surface_hardness_hrc": rng.uniform(20, 65, m), "case_depth_mm": rng.uniform(0, 3, m),
                          "relative_cost": rng.uniform(1, 40, m),
                          "family": rng.choice(list(FAMILIES), m), "corrosion_resistant": rng.random(m) < 0.4})
    t = validate_targets({"min_yield_mpa": 600, "max_yield_mpa": 1400, "min_uts_mpa": 800, "max_uts_mpa": 1700,
                          "min_elongation_pct": 8, "min_hardness_hrc": 25, "max_hardness_hrc": 60,
                          "min_surface_hardness_hrc": 45, "min_case_depth_mm": 0.2, "max_relative_cost": 8,
                          "families": ["alloy_steel", "carbon_steel"], "corrosion_resistant": True}, FAMILIES)
    best, med = _best(lambda: meets(frame, t))
    print(f"meets, 10^6 rows x 12 targets: best {best:.3f} s, median {med:.3f} s (target 0.1 s)")


def _floor() -> float:
    """A fixed reference workload, timed in the same run: sorting 10^6 random doubles
    (numpy).  Ratios to it compare runs on machines of different speed or load."""
    import numpy as np
    x = np.random.default_rng(0).random(10**6)
    best, _ = _best(lambda: np.sort(x), repeat=5)
    return best


def _bench_p_meet() -> None:
    """Whole-catalogue select with p_meet (Monte Carlo over composition and the model
    band), warm (expansion, sensitivities and draws cached), as a ratio to the floor."""
    import selector
    from selector.selection.engine import p_meet, prepare
    from selector.states.scatter import N_DRAWS

    targets = {"min_yield_mpa": 800, "min_elongation_pct": 12}
    d = 60.0
    t0 = time.perf_counter()
    selector.select(targets, diameter_mm=d)
    first = time.perf_counter() - t0
    floor = _floor()
    best, med = _best(lambda: selector.select(targets, diameter_mm=d), repeat=5)
    p = prepare(d)
    pb, _ = _best(lambda: p_meet(p, targets), repeat=5)
    budget = 0.3
    print(f"floor (np.sort of 10^6 doubles): {floor:.4f} s")
    print(f"select with p_meet, Ø{d:g} mm, {len(p) // 3} states x {N_DRAWS} draws, warm: best {best:.3f} s, "
          f"median {med:.3f} s = {best / floor:.1f} x floor (budget {budget} s = {budget / floor:.1f} x floor) "
          f"{'ok' if best < budget else 'SLOW'}")
    print(f"  of which p_meet over every state: {pb:.3f} s = {pb / floor:.1f} x floor; "
          f"first call in the process (expansion + sensitivities + draws): {first:.1f} s")


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
    _bench_p_meet()
    _bench_models()
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
