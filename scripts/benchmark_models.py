"""Vectorised model throughput (run by ``scripts/benchmark.py --models``): the quench
chain on 10^5 states and the target checks on 10^6 rows, best and median of 3."""
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


def bench_models() -> None:
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


if __name__ == "__main__":
    bench_models()
