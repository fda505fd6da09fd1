"""Benchmark of selector.batch on a generated parts list (default 10 000 parts).

Prints, for the same list: wall time with Dask's local (threaded, in-process)
scheduler and on a dask.distributed LocalCluster of 2 worker processes, parts per
second, peak memory (resident set, from getrusage) of each process, and the ratio
of each wall time to a *floor* measured in the same run: the serial cost of the
engine's own work (one ``prepare`` per distinct section + one ``select`` per
distinct (section, targets, service) group, timed on a sample), with no Dask.
Target of issue 14: <= 60 s locally on the 2-core machine.  Each mode runs in a
fresh process so that no cache is shared between them.

The list is generated (seeded) for an invented maker: parts cut from a set of
stock sections, half with targets from a set of invented specification classes,
the rest pins with a load case (load and geometry scaled to the diameter).  It is
demo data only.

    python scripts/benchmark_batch.py                # 10 000 parts, local and cluster
    python scripts/benchmark_batch.py --parts 2000 --modes local
"""
from __future__ import annotations

import argparse
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

ROUNDS_MM = (12.0, 16.0, 20.0, 25.0, 30.0, 40.0, 50.0, 60.0)
PLATES_MM = (10.0, 16.0, 20.0)
#: invented specification classes (demo only): targets a drawing might carry
SPEC_CLASSES = (
    {"min_yield_mpa": 250.0, "min_elongation_pct": 20.0},
    {"min_yield_mpa": 350.0, "min_elongation_pct": 15.0},
    {"min_yield_mpa": 420.0, "min_uts_mpa": 600.0, "min_elongation_pct": 16.0},
    {"min_yield_mpa": 550.0, "min_uts_mpa": 750.0, "min_elongation_pct": 14.0},
    {"min_yield_mpa": 640.0, "min_uts_mpa": 800.0, "min_hardness_hrc": 22.0, "max_hardness_hrc": 32.0},
    {"min_yield_mpa": 700.0, "min_uts_mpa": 900.0, "min_elongation_pct": 12.0},
    {"min_yield_mpa": 940.0, "min_uts_mpa": 1040.0, "min_hardness_hrc": 32.0, "max_hardness_hrc": 39.0},
    {"min_hardness_hrc": 45.0},
    {"min_surface_hardness_hrc": 55.0, "min_yield_mpa": 500.0},
    {"min_yield_mpa": 300.0, "corrosion_resistant": True},
    {"min_yield_mpa": 200.0, "families": "aluminium"},
    {"min_yield_mpa": 2100.0, "min_elongation_pct": 15.0},          # nothing meets it: nearest misses
)
PIN_LOAD_FACTORS = (0.03, 0.06, 0.1)          # load_kn = factor x d^2 (mm), invented
PIN_WEAR = (None, 45.0, 50.0)


def generate(n: int, seed: int = 14) -> pd.DataFrame:
    """A parts list of ``n`` parts (invented, seeded)."""
    rng = np.random.default_rng(seed)
    rows = []
    for i in range(n):
        row = {"part_id": f"GEN-{i:05d}", "length_mm": float(np.round(rng.uniform(40, 1500), 0)),
               "quantity_per_year": int(rng.integers(10, 20000))}
        if rng.random() < 0.5:
            spec = SPEC_CLASSES[int(rng.integers(len(SPEC_CLASSES)))]
            if rng.random() < 0.8:
                row["diameter_mm"] = float(rng.choice(ROUNDS_MM))
            else:
                row["thickness_mm"] = float(rng.choice(PLATES_MM))
            row.update(spec)
        else:
            d = float(rng.choice(ROUNDS_MM[1:7]))
            row.update(diameter_mm=d, load_kn=round(float(rng.choice(PIN_LOAD_FACTORS)) * d * d, 1),
                       shear_planes=2, safety_factor=2.0, gap_mm=1.5, lug_thickness_mm=round(1.5 * d),
                       clevis_thickness_mm=round(0.6 * d))
            w = PIN_WEAR[int(rng.integers(len(PIN_WEAR)))]
            if w is not None:
                row["wear_surface_hardness_hrc"] = w
        rows.append(row)
    df = pd.DataFrame(rows)
    if "families" in df:
        df["families"] = df["families"].fillna("")
    if "corrosion_resistant" in df:
        df["corrosion_resistant"] = df["corrosion_resistant"].map({True: "true"}).fillna("")
    return df


def _peak_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0   # Linux: KiB


def _cpu_s() -> float:
    r = resource.getrusage(resource.RUSAGE_SELF)
    return r.ru_utime + r.ru_stime


def _floor(parts_path: str) -> dict:
    """Serial engine cost: prepare per section and select per group, timed on a sample."""
    import selector
    from selector.design.batch import REFERENCE_LENGTH_MM, _key, _tasks
    from selector.selection.engine import prepare

    work = _tasks(selector.read_parts(parts_path))
    groups = [(sec, {_key({"t": p["targets"], "s": p["service"]}): p for p in recs}) for sec, recs in work]
    n_groups = sum(len(g) for _, g in groups)
    sample = groups[:2]
    t_prep, t_sel, c_prep, c_sel = [], [], [], []
    selector.select({}, 33.0)        # imports and tables built once (a section not in the list)
    for (d, t), g in sample:
        t0, c0 = time.perf_counter(), _cpu_s()
        prepare(d, t, REFERENCE_LENGTH_MM)
        t_prep.append(time.perf_counter() - t0)
        c_prep.append(_cpu_s() - c0)
        for p in list(g.values())[:6]:
            t0, c0 = time.perf_counter(), _cpu_s()
            selector.select(p["targets"], d, thickness_mm=t, length_mm=REFERENCE_LENGTH_MM, **p["service"])
            t_sel.append(time.perf_counter() - t0)
            c_sel.append(_cpu_s() - c0)
    med = lambda x: float(np.median(x))  # noqa: E731
    return {"sections": len(work), "groups": n_groups, "prepare_s": med(t_prep), "select_s": med(t_sel),
            "floor_s": len(work) * med(t_prep) + n_groups * med(t_sel),
            "floor_cpu_s": len(work) * med(c_prep) + n_groups * med(c_sel)}


def run_mode(mode: str, parts_path: str) -> dict:
    import selector

    out = {"mode": mode}
    if mode == "floor":
        out.update(_floor(parts_path))
    elif mode == "local":
        t0, c0 = time.perf_counter(), _cpu_s()
        res = selector.batch(parts_path, top=5)
        out["wall_s"] = time.perf_counter() - t0
        out["cpu_s"] = _cpu_s() - c0
        out["rows"] = len(res)
        t0 = time.perf_counter()
        st = selector.rationalise(res, parts_path, holding_cost_per_grade=2000.0)
        out["stock"] = {"wall_s": time.perf_counter() - t0, "grades": len(st["grades"]), "gap": st["gap"],
                        "counts": len(st["cost_by_count"]), "candidates": int((res["status"] == "candidate").sum())}
        out["peak_mb"] = {"this process": _peak_mb()}
    else:
        from distributed import LocalCluster

        with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cl:
            from distributed import Client

            with Client(cl) as c:
                c.wait_for_workers(2)
                c0 = sum(c.run(_cpu_s).values())
                t0 = time.perf_counter()
                res = selector.batch(parts_path, top=5, scheduler=cl.scheduler_address)
                out["wall_s"] = time.perf_counter() - t0
                out["cpu_s"] = sum(c.run(_cpu_s).values()) - c0
                peaks = c.run(_peak_mb)
        out["rows"] = len(res)
        out["peak_mb"] = {"client": _peak_mb(), **{f"worker {i}": v for i, v in enumerate(peaks.values())}}
    return out


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--parts", type=int, default=10_000)
    ap.add_argument("--modes", default="floor,local,cluster")
    ap.add_argument("--_run", default=None, help=argparse.SUPPRESS)
    ap.add_argument("--_file", default=None, help=argparse.SUPPRESS)
    args = ap.parse_args(argv)
    if args._run:
        print(json.dumps(run_mode(args._run, args._file)))
        return 0
    with tempfile.TemporaryDirectory() as tmp:
        path = str(Path(tmp) / "parts.parquet")
        generate(args.parts).to_parquet(path, index=False)
        print(f"generated parts list: {args.parts} parts ({os.path.getsize(path) / 1e6:.2f} MB Parquet); "
              f"machine: {os.cpu_count()} CPUs")
        env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
        env.pop("SELECTOR_DASK_SCHEDULER", None)
        results = {}
        for mode in args.modes.split(","):
            t0 = time.perf_counter()
            p = subprocess.run([sys.executable, __file__, "--_run", mode, "--_file", path], env=env,
                               capture_output=True, text=True)
            if p.returncode != 0:
                print(f"{mode}: failed\n{p.stderr[-3000:]}")
                return 1
            results[mode] = json.loads(p.stdout.strip().splitlines()[-1])
            results[mode]["process_s"] = time.perf_counter() - t0
    load = os.getloadavg()[0]
    print(f"load average (1 min) at the end: {load:.1f} on {os.cpu_count()} CPUs: wall times above a "
          "process's CPU time mean the machine was shared")
    fl = results.get("floor")
    if fl:
        print(f"sections {fl['sections']}, distinct (section, targets, service) groups {fl['groups']}")
        print(f"floor (serial engine work, no Dask): {fl['sections']} x prepare {fl['prepare_s']:.2f} s + "
              f"{fl['groups']} x select {fl['select_s']:.3f} s = {fl['floor_s']:.1f} s wall "
              f"({fl['floor_cpu_s']:.1f} s CPU)")
    for mode in ("local", "cluster"):
        r = results.get(mode)
        if not r:
            continue
        label = "local (threads, in-process)" if mode == "local" else "LocalCluster, 2 worker processes"
        ratio = (f", {r['wall_s'] / fl['floor_s']:.2f} x floor (wall), {r['cpu_s'] / fl['floor_cpu_s']:.2f} x floor "
                 "(CPU)") if fl else ""
        peaks = ", ".join(f"{k} {v:.0f} MB" for k, v in r["peak_mb"].items())
        print(f"{label}: {r['wall_s']:.1f} s wall ({r['cpu_s']:.1f} s CPU), {args.parts / r['wall_s']:.0f} parts/s"
              f"{ratio}; "
              f"{r['rows']} rows; peak RSS {peaks}")
    if "local" in results:
        sk = results["local"]["stock"]
        print(f"rationalise (MILP, HiGHS) on the local result: {sk['candidates']} candidate rows, "
              f"{sk['counts']} programs (cost against 1..{sk['counts']} grades) in {sk['wall_s']:.1f} s wall; "
              f"{sk['grades']} grades, gap {sk['gap']:.2g}")
        w = results["local"]["wall_s"]
        print(f"target <= 60 s locally: {'MET' if w <= 60 else 'MISSED'} ({w:.1f} s, {w / 60:.2f} x target)")
    if "local" in results and "cluster" in results:
        print(f"cluster / local wall time: {results['cluster']['wall_s'] / results['local']['wall_s']:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
