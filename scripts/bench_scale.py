"""Scale of the state expansion: the catalogue replicated ×k (synthetic copies, for
this benchmark only) and every route family's process-window grid refined ×r along
its main parameter.  Prints states, time, peak memory and states per second.

The expansion measured is the streamed narrow one
(:func:`selector.states.expand.expand_narrow`: chunks of whole blocks, float32 properties
and integer codes kept, each chunk's batch dropped before the next), the form in which a
catalogue this large is expanded; the full-width table of :func:`expand_states` (80
columns, about 700 bytes per state before its text) is what the selection of one
catalogue uses.

Each case runs in a fresh process (``python scripts/bench_scale.py --case k r``) so
its peak resident memory is its own; the figure reported is the peak RSS during the
expansion (``VmHWM``, reset before it through ``/proc/self/clear_refs`` on Linux) less the
RSS after imports and the models' tables (a one-grade-per-family expansion), beside the
narrow table's own size.

Usage: python scripts/bench_scale.py [--quick]   (cases: catalogue x1, x10; window x10; and
x4 with window x8, about 10^6 states)
"""
from __future__ import annotations

import dataclasses
import json
import os
import subprocess
import sys
import time
from pathlib import Path
from types import MappingProxyType

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))


def synthetic_grades(copies: int):
    """The catalogue's grades ×``copies``: copy k > 0 has id ``<id>~k`` and every
    composition limit scaled by (1 + 0.002 k), so the copies are not identical
    (synthetic, benchmark only)."""
    from selector.catalogue.grades import default_catalogue

    out = []
    for g in default_catalogue().grades.values():
        out.append(g)
        for k in range(1, copies):
            f = 1.0 + 0.002 * k
            out.append(dataclasses.replace(
                g, id=f"{g.id}~{k}",
                comp_min=MappingProxyType({e: v * f for e, v in g.comp_min.items()}),
                comp_max=MappingProxyType({e: v * f for e, v in g.comp_max.items()})))
    return out


def refine_grid(grid: dict, main: str | None, factor: int) -> dict:
    """The grid with ``factor``× as many points along ``main`` between its extremes,
    for each combination of the other parameters (other parameters copied from the
    first point of that combination)."""
    import numpy as np

    if factor <= 1 or not main or main not in grid or len(grid[main]) == 0:
        return grid
    vals = np.asarray(grid[main], float)
    others = [k for k in grid if k != main]
    # one code per combination of the other parameters (vectorised: this runs inside the timed
    # expansion, once per grade and family), groups in order of first appearance; values compared
    # as their text, as numpy prints them (so NaN equals NaN)
    codes = np.zeros(len(vals), np.int64)
    for k in others:
        col = np.asarray(grid[k])
        if col.dtype.kind == "f" and len(col) and np.all(col == col[0]):
            continue                                    # one value (the usual case): one group
        u, inv = np.unique(col.astype(str), return_inverse=True)
        codes = codes * len(u) + inv.reshape(-1)
    if len(vals) and np.all(codes == codes[0]):
        groups = [np.arange(len(vals))]
    else:
        uniq, first = np.unique(codes, return_index=True)
        groups = [np.flatnonzero(codes == c) for c in uniq[np.argsort(first)]]
    parts = {k: [] for k in grid}
    for idx in groups:
        v = vals[idx]
        lo, hi = np.nanmin(v), np.nanmax(v)
        n = max(1, (len(idx) - 1) * factor + 1) if hi > lo else 1
        new = np.linspace(lo, hi, n) if n > 1 else v[:1]
        for k in grid:
            if k == main:
                parts[k].append(new)
            else:
                parts[k].append(np.repeat(np.asarray(grid[k])[idx[:1]], len(new)))
    return {k: np.concatenate(v) for k, v in parts.items()}


class RefinedFamily:
    """A route family whose grid is refined ×``factor`` (delegates everything else)."""

    def __init__(self, fam, factor: int):
        self._fam = fam
        self._factor = factor

    def __getattr__(self, name):
        return getattr(self._fam, name)

    def grid(self, grade):
        return refine_grid(self._fam.grid(grade), self._fam.main_parameter, self._factor)


def _memory_kb(field: str):
    """``VmRSS`` / ``VmHWM`` of this process in kB from /proc/self/status (Linux), else None."""
    try:
        for line in Path("/proc/self/status").read_text().splitlines():
            if line.startswith(field + ":"):
                return float(line.split()[1])
    except OSError:
        pass
    return None


def _peak_kb() -> float:
    """Peak resident memory of this process, kB: VmHWM of its own address space (getrusage's
    ru_maxrss keeps the parent's peak across fork and exec, so a child started by a large
    benchmark process would report the parent's peak)."""
    hwm = _memory_kb("VmHWM")
    if hwm is not None:
        return hwm
    import resource
    return float(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)


def _reset_peak() -> bool:
    """Reset the peak-RSS mark of this process (Linux: write 5 to /proc/self/clear_refs)."""
    try:
        with open("/proc/self/clear_refs", "w") as f:
            f.write("5")
        return _memory_kb("VmRSS") is not None
    except OSError:
        return False


def run_case(copies: int, factor: int, diameter_mm: float = 40.0) -> dict:
    """One case in this process: the streamed narrow expansion
    (:func:`selector.states.expand.expand_narrow`) of the catalogue ×``copies`` with every
    grid refined ×``factor``: states, CPU and wall time, peak RSS growth over the process
    after imports, tables and one expansion of the plain catalogue, and the narrow table's
    own size."""
    from selector.routes import families as fam_registry
    from selector.states.expand import expand_narrow

    from selector.catalogue.grades import default_catalogue

    # imports, catalogue and the models' tables: one grade per route family, so that the
    # baseline of the peak memory is not raised by an expansion of the whole catalogue
    cat = list(default_catalogue().grades.values())
    warm = {next(g.id for g in cat if f.name in g.routes and (not f.families or g.family in f.families)): None
            for f in fam_registry.available()}
    expand_narrow(diameter_mm, grades=[default_catalogue().grades[k] for k in warm])
    grades = synthetic_grades(copies)
    fams = [RefinedFamily(f, factor) for f in fam_registry.available()]
    reset = _reset_peak()
    rss0 = _memory_kb("VmRSS") if reset else _peak_kb()
    t0 = time.perf_counter()
    c0 = time.process_time()
    table = expand_narrow(diameter_mm, None, grades=grades, families=fams)
    cpu = time.process_time() - c0
    wall = time.perf_counter() - t0
    rss1 = _peak_kb()
    nbytes = sum(v.nbytes for v in table.values() if hasattr(v, "nbytes"))
    return {"copies": copies, "refine": factor, "states": int(len(table["grade"])), "wall_s": wall, "cpu_s": cpu,
            "rss_growth_mb": (rss1 - rss0) / 1024.0, "frame_mb": nbytes / 2**20}


#: (catalogue copies, window refinement) of the cases; the last gives about 10^6 states
CASES = ((1, 1), (10, 1), (1, 10), (4, 8))


def run(cases=CASES) -> list:
    rows = []
    for copies, factor in cases:
        out = subprocess.run([sys.executable, __file__, "--case", str(copies), str(factor)],
                             capture_output=True, text=True, env={**os.environ})
        if out.returncode != 0:
            print(out.stderr[-2000:])
            raise SystemExit(f"scale case {copies}x{factor} failed")
        rows.append(json.loads(out.stdout.strip().splitlines()[-1]))
    print(f"{'catalogue':>9s} {'window':>6s} {'states':>9s} {'wall s':>7s} {'cpu s':>7s} {'states/s':>10s} "
          f"{'RSS +MB':>8s} {'table MB':>8s} {'B/state':>8s}")
    for r in rows:
        print(f"{'x' + str(r['copies']):>9s} {'x' + str(r['refine']):>6s} {r['states']:9d} {r['wall_s']:7.2f} "
              f"{r['cpu_s']:7.2f} {r['states'] / r['cpu_s']:10.0f} {r['rss_growth_mb']:8.0f} "
              f"{r['frame_mb']:8.1f} {r['frame_mb'] * 2**20 / r['states']:8.0f}")
    return rows


if __name__ == "__main__":
    if "--case" in sys.argv:
        i = sys.argv.index("--case")
        print(json.dumps(run_case(int(sys.argv[i + 1]), int(sys.argv[i + 2]))))
    else:
        run(CASES)
