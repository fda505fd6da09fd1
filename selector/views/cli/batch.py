"""``selector batch``: a parts list in, candidates per part (and optionally a rationalised
stock list) out.  Only calls the library and formats its answer; the progress bar goes to
stderr so stdout stays clean.  The result files keep the library's columns
(``selector.design.batch.RESULT_COLUMNS``, docs/batch.md): they are data for other programs."""
from __future__ import annotations

import json
import sys
import time
from pathlib import Path

import pandas as pd

from ...errors import InputError
from .args import price_sheet
from .output import print_caution

NAME = "batch"

OUT_SUFFIXES = (".parquet", ".csv")


class ProgressBar:
    """``parts 1200/10000 [####------] 12 %  elapsed 0:05  remaining 0:37`` on a stream
    (redrawn in place on a terminal, one line per update otherwise)."""

    def __init__(self, stream=None, width: int = 30):
        self.stream = stream or sys.stderr
        self.width = width
        self.start = time.monotonic()
        self.tty = bool(getattr(self.stream, "isatty", lambda: False)())

    @staticmethod
    def _clock(s: float) -> str:
        s = int(round(s))
        return f"{s // 3600}:{s % 3600 // 60:02d}:{s % 60:02d}" if s >= 3600 else f"{s // 60}:{s % 60:02d}"

    def text(self, done: int, total: int) -> str:
        frac = done / total if total else 1.0
        elapsed = time.monotonic() - self.start
        remaining = elapsed * (1 - frac) / frac if frac > 0 else float("nan")
        bar = "#" * int(round(frac * self.width))
        rem = self._clock(remaining) if remaining == remaining else "?"
        return (f"parts {done}/{total} [{bar:<{self.width}}] {100 * frac:3.0f} %  elapsed {self._clock(elapsed)}"
                f"  remaining {rem}")

    def __call__(self, done: int, total: int) -> None:
        line = self.text(done, total)
        if self.tty:
            self.stream.write("\r" + line + ("\n" if done >= total else ""))
        else:
            self.stream.write(line + "\n")
        self.stream.flush()


def _write(df: pd.DataFrame, path: Path) -> None:
    if path.suffix.lower() == ".parquet":
        df.to_parquet(path, index=False)
    else:
        df.to_csv(path, index=False)


def _stock_path(out: Path) -> Path:
    return out.with_name(out.stem + "_stock" + out.suffix)


def run(args) -> int:
    from ... import batch, rationalise     # the library (and Dask), at run time (selector.views.cli)

    out = Path(args.out)
    if out.suffix.lower() not in OUT_SUFFIXES:
        raise InputError("--out", args.out, "a file name ending in .parquet or .csv")
    if args.max_grades is not None and not args.rationalise:
        raise InputError("--max-grades", args.max_grades, "only together with --rationalise")
    bar = None if args.quiet else ProgressBar(sys.stderr)
    if args.top < 0:
        raise InputError("--top", args.top, "a whole number >= 0 (0: every candidate)")
    res = batch(args.parts, top=args.top or None, scheduler=args.scheduler, price_sheet=price_sheet(args),
                robust_only=args.robust_only, per_grade=args.rationalise, progress=bar)
    _write(res, out)
    n_parts = res["part_id"].nunique()
    first = res[res["rank"] == 1]
    counts = first["status"].value_counts()
    print(f"{n_parts} parts: {counts.get('candidate', 0)} with candidates, "
          f"{counts.get('nearest miss', 0)} with nearest misses only, "
          f"{counts.get('no candidate', 0)} with none; {len(res)} rows written to {out}")
    misses = first[first["status"] != "candidate"]
    for r in misses.itertuples():
        what = f"nearest {r.grade} {r.route_text}: {r.misses}" if r.grade else r.misses
        print(f"  ! {r.part_id}: nothing meets its targets ({what})")
    if args.rationalise:
        st = rationalise(res, args.parts, holding_cost_per_grade=args.holding_cost, max_grades=args.max_grades)
        spath = _stock_path(out)
        _write(st["assignment"], spath)
        cbc = st["cost_by_count"]
        print(f"\nRationalised stock list ({len(st['grades'])} grades, least annual cost "
              f"{st['total_cost']:.6g} = parts {st['material_cost']:.6g} + holding {st['holding_cost']:.6g}; "
              f"optimality gap {st['gap']:.2g}):")
        for g in st["grades"]:
            a = st["assignment"]
            sub = a[a["grade"] == g]
            print(f"  {g}: {len(sub)} parts, annual part cost {sub['annual_cost'].sum():.6g}")
        if st["unassigned"]:
            print(f"  unassigned (no feasible candidate): {', '.join(st['unassigned'])}")
        print("\nLeast total cost against the number of grades allowed:")
        with pd.option_context("display.width", 200, "display.max_colwidth", 60):
            print(cbc[["max_grades", "n_grades", "total_cost", "grades"]].to_string(index=False))
        print(f"\nassignment written to {spath}")
        if args.json:
            print(json.dumps({"grades": st["grades"], "total_cost": st["total_cost"], "gap": st["gap"]}))
    print_caution()
    return 0


def add_command(sub) -> None:
    b = sub.add_parser(NAME, help="a parts list (CSV or Parquet): candidates per part, optional stock list")
    b.add_argument("parts", help="parts list, CSV or Parquet (columns: docs/batch.md)")
    b.add_argument("--out", required=True, help="result file, .parquet or .csv")
    b.add_argument("--top", type=int, default=5, help="candidates kept per part (default 5; 0: all); with "
                   "--rationalise, the cheapest route of each of the part's N cheapest grades")
    b.add_argument("--rationalise", action="store_true",
                   help="choose the stock grades of least annual cost (MILP); the assignment goes to "
                        "<out>_stock.<suffix>")
    b.add_argument("--max-grades", type=int, default=None, help="with --rationalise: at most this many grades")
    b.add_argument("--holding-cost", type=float, default=0.0,
                   help="with --rationalise: annual cost of holding one grade, unit of part_cost (default 0)")
    b.add_argument("--scheduler", default=None,
                   help="dask.distributed scheduler address, e.g. tcp://host:8786 (default: "
                        "$SELECTOR_DASK_SCHEDULER, else local)")
    b.add_argument("--prices", help="price sheet CSV (columns grade, relative_price)")
    b.add_argument("--robust-only", action="store_true", help="only candidates that hold at every corner")
    b.add_argument("--quiet", action="store_true", help="no progress bar")
    b.add_argument("--json", action="store_true", help="also print the stock summary as JSON")
    b.set_defaults(func=run)
