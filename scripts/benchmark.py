"""Speed figures of selector on this machine, as ratios against a floor measured in
the same run (issue 13).  Prints measured value, target and PASS / MISS; asserts
nothing (speed is never a test).

Floor: ``python -c "import pandas, numpy, scipy.special"`` in a fresh process, the
median of several repeats.  Whole-process figures are CPU seconds of the child
(user + system, from ``resource.getrusage(RUSAGE_CHILDREN)``): on a machine shared
with other work the CPU time is steadier than the wall time, which is printed too.
In-process figures are CPU seconds of this process (``time.process_time``), wall beside.

1. ``python -c "import selector"``                                   target <= 1.2 x floor
2. cold ``selector select --min-yield-mpa 700 --min-elongation-pct 12 --diameter 30``
   (a new process; the table cache in its directory already written)  target <= 1.5 x floor
   The very first run on a machine (empty table cache) is printed beside it.
3. warm ``select`` over the whole catalogue at a section not seen before   target <= 0.3 s
4. re-rank of the prepared table for new targets                     target <= 30 ms
5. scale of the streamed expansion (``scripts/bench_scale.py``): the catalogue x10
   (synthetic copies), the window resolution x10, and x4 with x8 (about 10^6 states);
   time, peak memory, states per second; cost per state must not grow with size;
   10^6 states <= 300 MB and <= 5 s.
6. with ``--models``: vectorised model throughput and the Pareto step against
   paretoset (``scripts/bench_pareto.py``).

Usage: python scripts/benchmark.py [--quick] [--repeats N] [--models]
The table cache of the runs is a fresh temporary directory (SELECTOR_CACHE_DIR), so
the user's own cache is neither used nor touched.
"""
from __future__ import annotations

import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "scripts"))

FLOOR_CMD = ["-c", "import pandas, numpy, scipy.special"]
IMPORT_CMD = ["-c", "import selector"]
CLI_CMD = ["-m", "selector", "select", "--min-yield-mpa", "700", "--min-elongation-pct", "12", "--diameter", "30"]


def _child(args, env) -> tuple[float, float]:
    """(CPU s, wall s) of one fresh ``python`` process running ``args``."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    out = subprocess.run([sys.executable, *args], env=env, cwd=str(ROOT), stdout=subprocess.DEVNULL,
                         stderr=subprocess.PIPE, text=True)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if out.returncode != 0:
        raise SystemExit(f"{' '.join(args)} failed:\n{out.stderr[-2000:]}")
    return (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime), wall


def _median_child(args, env, repeats) -> tuple[float, float]:
    runs = [_child(args, env) for _ in range(repeats)]
    return statistics.median(r[0] for r in runs), statistics.median(r[1] for r in runs)


def machine() -> str:
    cpu = "unknown CPU"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                cpu = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    import numpy
    import pandas
    import scipy
    return (f"{cpu}, {os.cpu_count()} cores, {platform.system()} {platform.release()}, "
            f"Python {platform.python_version()}, numpy {numpy.__version__}, pandas {pandas.__version__}, "
            f"scipy {scipy.__version__}")


def _row(name, measured, target, unit, note=""):
    ok = "PASS" if measured <= target else "MISS"
    print(f"  {name:58s} {measured:9.3f} {unit:9s} target <= {target:<7g} {ok}  {note}")
    return ok


def whole_process(repeats: int) -> dict:
    env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    # bytecode cached as in any installed package (pip compiles it): where the environment sets
    # PYTHONDONTWRITEBYTECODE, every child would compile the package's ~100 modules (~0.4 s);
    # the .pyc files go to a temporary prefix, never into the source tree
    env.pop("PYTHONDONTWRITEBYTECODE", None)
    with tempfile.TemporaryDirectory(prefix="selector-bench-cache-") as cache, \
            tempfile.TemporaryDirectory(prefix="selector-bench-pyc-") as pyc:
        env["SELECTOR_CACHE_DIR"] = cache
        env["PYTHONPYCACHEPREFIX"] = pyc
        _child(CLI_CMD, {**env, "SELECTOR_DISK_CACHE": "0"})   # compiles the bytecode; writes no table
        _child(FLOOR_CMD, env)                        # warm the OS file cache (and the floor's bytecode) once
        floor_cpu, floor_wall = _median_child(FLOOR_CMD, env, repeats)
        imp_cpu, imp_wall = _median_child(IMPORT_CMD, env, repeats)
        first_cpu, first_wall = _child(CLI_CMD, env)  # empty table cache: builds and writes the tables
        cli_cpu, cli_wall = _median_child(CLI_CMD, env, repeats)
        news = [_child(CLI_CMD[:-1] + [f"{d:g}"], env) for d in (33.3, 47.1, 61.9)[:max(1, min(3, repeats))]]
        new_cpu = statistics.median(r[0] for r in news)
        new_wall = statistics.median(r[1] for r in news)
    print(f"floor: python -c \"import pandas, numpy, scipy.special\": {floor_cpu:.3f} s CPU "
          f"({floor_wall:.3f} s wall), median of {repeats}")
    res = {"floor_cpu": floor_cpu}
    res["import"] = _row("python -c 'import selector' (x floor, CPU)", imp_cpu / floor_cpu, 1.2, "x floor",
                         f"{imp_cpu:.3f} s CPU, {imp_wall:.3f} s wall")
    res["cli"] = _row("cold CLI select, table cache written (x floor, CPU)", cli_cpu / floor_cpu, 1.5, "x floor",
                      f"{cli_cpu:.3f} s CPU, {cli_wall:.3f} s wall")
    print(f"  {'cold CLI select at a new section (tables cached)':58s} {new_cpu / floor_cpu:9.3f} "
          f"x floor   (no target)         {new_cpu:.3f} s CPU, {new_wall:.3f} s wall")
    print(f"  {'cold CLI select, first run on the machine (empty cache)':58s} {first_cpu / floor_cpu:9.3f} "
          f"x floor   (no target)         {first_cpu:.3f} s CPU, {first_wall:.3f} s wall")
    return res


def in_process(repeats: int) -> dict:
    import selector
    from selector.selection.engine import prepare, rank

    targets = {"min_yield_mpa": 700, "min_elongation_pct": 12}
    # imports, catalogue, the constant tables of both tension-test locations (centre up to 38 mm,
    # mid-radius above: each its cooling-rate table, read from the disk cache in normal use):
    # not this step's cost
    selector.select(targets, diameter_mm=30.0)
    selector.select(targets, diameter_mm=50.0)
    from selector import cache
    cache.wait_for_writes()          # the warm-up's cache files written before the timing (not in its CPU)
    new_sections = [31.7, 44.5, 57.2, 69.9, 82.6][:max(3, repeats)]
    os.environ["SELECTOR_DISK_CACHE"] = "0"          # a section never seen: no prepared table from disk
    times, walls = [], []
    for d in new_sections:
        t0, c0 = time.perf_counter(), time.process_time()
        selector.select(targets, diameter_mm=d)
        times.append(time.process_time() - c0)
        walls.append(time.perf_counter() - t0)
    res = {"new_section": _row("warm select, whole catalogue, a new section (CPU s)", statistics.median(times),
                               0.3, "s", f"median of {len(times)} sections; wall {statistics.median(walls):.3f} s")}
    # as the page and the CLI run it: disk cache on, so each new section's tables are also
    # written for later processes; the writes in the caller's thread, then behind the answer
    # (selector/cache.py), each on sections never seen; wall seconds to the answer (the writer's
    # CPU would count in process_time), the pending writes finished outside the timing
    os.environ["SELECTOR_DISK_CACHE"] = "1"
    lat = {}
    for mode, offset in (("0", 0.3), ("1", 0.6)):
        os.environ["SELECTOR_WRITE_BEHIND"] = mode
        w = []
        for d in new_sections:
            t0 = time.perf_counter()
            selector.select(targets, diameter_mm=d + offset)
            w.append(time.perf_counter() - t0)
            cache.wait_for_writes()
        lat[mode] = statistics.median(w)
    os.environ.pop("SELECTOR_WRITE_BEHIND", None)
    os.environ["SELECTOR_DISK_CACHE"] = "0"
    print(f"  {'warm select, new section, disk cache on, writes in the path':58s} {lat['0']:9.3f} s wall    "
          f"(no target)       median of {len(new_sections)} sections")
    print(f"  {'warm select, new section, disk cache on, writes behind':58s} {lat['1']:9.3f} s wall    "
          f"(no target)       {lat['1'] / lat['0']:.2f} x the line above (the page's and the CLI's path)")
    p = prepare(30.0)
    tlist = [{"min_yield_mpa": 900}, {"min_uts_mpa": 600, "min_elongation_pct": 20},
             {"min_surface_hardness_hrc": 55, "min_yield_mpa": 500}, {"min_yield_mpa": 650, "max_relative_cost": 5},
             {"min_hardness_hrc": 30, "min_elongation_pct": 10}]
    rt, rw = [], []
    for t in tlist:
        rank(p, t)
        for _ in range(3):
            t0, c0 = time.perf_counter(), time.process_time()
            rank(p, t)
            rt.append(time.process_time() - c0)
            rw.append(time.perf_counter() - t0)
    res["rerank"] = _row("re-rank for new targets (CPU ms)", 1000 * statistics.median(rt), 30, "ms",
                         f"median of {len(rt)}, {len(p)} prepared states; wall {1000 * statistics.median(rw):.1f} ms")
    return res


def scale(quick: bool) -> dict:
    import bench_scale

    rows = bench_scale.run(bench_scale.CASES)
    small, big = rows[0], max(rows, key=lambda r: r["states"])
    per_small = small["cpu_s"] / small["states"]
    per_big = big["cpu_s"] / big["states"]
    growth = per_big / per_small
    res = {"linear": _row(f"CPU per state, {big['states']} vs {small['states']} states (ratio)", growth, 1.2, "x",
                          "<= 1.2: cost grows no faster than linearly")}
    # 10^6 states: the largest case (about 10^6 states), its CPU per state times 10^6; its peak
    # memory growth as measured (the streamed expansion's peak is one chunk plus the narrow table)
    t1e6 = per_big * 1e6
    res["time_1e6"] = _row("10^6 states, CPU time (s)", t1e6, 5.0, "s",
                           f"{big['cpu_s']:.2f} s CPU for {big['states']} states, {big['states'] / big['cpu_s']:.0f} states/s")
    m = big["rss_growth_mb"] * (1e6 / big["states"] if big["states"] < 1e6 else 1.0)
    res["mem_1e6"] = _row("10^6 states, peak memory growth (MB)", m, 300.0, "MB",
                          f"peak RSS growth at {big['states']} states"
                          + (" scaled to 10^6" if big["states"] < 1e6 else "")
                          + f"; narrow table {big['frame_mb']:.0f} MB")
    return res


def main(argv=None) -> int:
    argv = sys.argv[1:] if argv is None else argv
    quick = "--quick" in argv
    repeats = int(argv[argv.index("--repeats") + 1]) if "--repeats" in argv else (3 if quick else 5)
    own_cache = tempfile.TemporaryDirectory(prefix="selector-bench-")
    os.environ["SELECTOR_CACHE_DIR"] = own_cache.name     # the user's cache is neither read nor written
    print(f"machine: {machine()}")
    print(f"load average at start: {os.getloadavg()[0]:.2f} (other work on the machine inflates wall times)")
    print("\n== whole process ==")
    res = whole_process(repeats)
    print("\n== in process ==")
    res.update(in_process(repeats))
    print("\n== scale of the expansion ==")
    res.update(scale(quick))
    flags = {k: v for k, v in res.items() if v in ("PASS", "MISS")}
    missed = [k for k, v in flags.items() if v == "MISS"]
    print(f"\nsummary: {len(flags) - len(missed)} PASS, {len(missed)} MISS"
          + (f" ({', '.join(missed)})" if missed else ""))
    if "--models" in argv:
        from benchmark_models import bench_models
        bench_models()
        import bench_pareto
        bench_pareto.run(sizes=(10**4, 10**5) if quick else (10**4, 10**5, 10**6))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
