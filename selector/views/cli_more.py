"""CLI commands for selection, alternatives, pins and the diameter sweep.  Each
only calls the library and formats its answer."""
from __future__ import annotations

import json
import sys
from pathlib import Path

import pandas as pd

from .. import CAUTION
from ..errors import InputError

TARGET_FLAGS = (
    ("min_yield_mpa", float), ("max_yield_mpa", float), ("min_uts_mpa", float), ("max_uts_mpa", float),
    ("min_elongation_pct", float), ("min_hardness_hrc", float), ("max_hardness_hrc", float),
    ("min_surface_hardness_hrc", float), ("min_case_depth_mm", float), ("max_relative_cost", float),
)
TABLE_COLUMNS = ["grade", "route_text", "yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc",
                 "surface_hardness_hrc", "case_depth_mm", "relative_cost", "robust", "pareto", "window"]


def _targets_from_args(args) -> dict:
    from ..studies import load_targets

    t = dict(load_targets(Path(args.targets), args.targets)) if getattr(args, "targets", None) else {}
    for key, _ in TARGET_FLAGS:
        v = getattr(args, key, None)
        if v is not None:
            t[key] = v
    if getattr(args, "family", None):
        t["families"] = list(args.family)
    if getattr(args, "exclude_family", None):
        t["exclude_families"] = list(args.exclude_family)
    if getattr(args, "corrosion_resistant", False):
        t["corrosion_resistant"] = True
    return t


def _price_sheet(args):
    if not getattr(args, "prices", None):
        return None
    from ..studies import load_price_sheet

    return load_price_sheet(Path(args.prices), args.prices)


def _json_ready(df: pd.DataFrame) -> list:
    return json.loads(df.to_json(orient="records", force_ascii=False))


def emit(df: pd.DataFrame, fmt: str, columns=TABLE_COLUMNS, title: str = "") -> None:
    if fmt == "json":
        print(json.dumps({"caution": CAUTION, "rows": _json_ready(df)}, indent=2, ensure_ascii=False))
        return
    if fmt == "csv":
        out = df.copy()
        if "route" in out:
            out["route"] = out["route"].apply(json.dumps)
        from .export import to_csv_text

        sys.stdout.write(to_csv_text(out))
        return
    if title:
        print(title)
    cols = [c for c in columns if c in df.columns]
    with pd.option_context("display.max_colwidth", 60, "display.width", 200):
        print(df[cols].to_string(index=False, float_format=lambda x: f"{x:.3g}" if abs(x) < 10 else f"{x:.0f}"))
    print(f"\nCAUTION: {CAUTION}")


def cmd_select(args) -> int:
    from .. import nearest_misses, select

    t = _targets_from_args(args)
    kw = dict(thickness_mm=args.thickness, length_mm=args.length, price_sheet=_price_sheet(args))
    res = select(t, args.diameter, robust_only=args.robust_only, **kw)
    if res.empty:
        miss = nearest_misses(t, args.diameter, **kw)
        moves = [c for c in miss.columns if c.startswith("move_")]
        emit(miss, args.format, ["grade", "route_text", "miss_score"] + moves,
             "No candidate meets every target. Nearest misses (how far each target would have to move):")
        return 1
    if args.top is not None:
        res = res.head(args.top)
    emit(res, args.format, TABLE_COLUMNS + [c for c in res.columns if c.startswith("margin_")],
         f"{len(res)} candidates (Pareto first; robust = holds at every composition corner):")
    return 0


def cmd_alternatives(args) -> int:
    from .. import alternatives
    from .cli import _route_from_args

    res = alternatives(args.grade, _route_from_args(args), args.diameter, thickness_mm=args.thickness,
                       length_mm=args.length, price_sheet=_price_sheet(args))
    from .cli import _fmt

    ref = res.attrs["reference"]
    basis = ("" if ref.get("basis", "strength") == "strength" else
             f" (strength not estimated above the ASTM A370 tensile column; matched on hardness "
             f"{_fmt(ref.get('hardness_hrc'), 1)} HRC)")
    title = (f"Reference: {ref['grade']} {ref['route_text']}: yield {_fmt(ref.get('yield_mpa'))} MPa, "
             f"UTS {_fmt(ref.get('uts_mpa'))} MPa, elongation {_fmt(ref.get('elongation_pct'), 1)} %, "
             f"relative cost {ref['relative_cost']:.2f}/kg{basis}.\nCheaper candidates that reach at least that:")
    if res.empty:
        print(title + "\n  (none in the catalogue)\n\nCAUTION: " + CAUTION)
        return 1
    emit(res, args.format, TABLE_COLUMNS + ["saving_per_kg"], title)
    return 0


def _common(p, section=True):
    if section:
        p.add_argument("--diameter", type=float, default=25.0, help="round section diameter, mm (default 25)")
        p.add_argument("--thickness", type=float, default=None, help="plate thickness, mm (instead of a diameter)")
    p.add_argument("--length", type=float, default=100.0, help="part length, mm, for mass and part cost")
    p.add_argument("--prices", help="price sheet CSV (columns grade, relative_price)")
    p.add_argument("--format", choices=("table", "csv", "json"), default="table")


def add_commands(sub) -> None:
    s = sub.add_parser("select", help="candidates that meet targets at a section")
    for key, typ in TARGET_FLAGS:
        s.add_argument("--" + key.replace("_", "-"), dest=key, type=typ)
    s.add_argument("--family", action="append", help="only this grade family (repeatable)")
    s.add_argument("--exclude-family", action="append", help="not this grade family (repeatable)")
    s.add_argument("--corrosion-resistant", action="store_true")
    s.add_argument("--targets", help="TOML file with a [targets] table (flags override it)")
    s.add_argument("--robust-only", action="store_true", help="only candidates that hold at every corner")
    from .cli import positive_int

    s.add_argument("--top", type=positive_int, default=None, help="show only the first N rows (N >= 1)")
    _common(s)
    s.set_defaults(func=cmd_select)

    a = sub.add_parser("alternatives", help="cheaper candidates reaching a given choice's properties")
    a.add_argument("grade")
    a.add_argument("steps", nargs="*")
    a.add_argument("--route-json")
    _common(a)
    a.set_defaults(func=cmd_alternatives)

    from . import cli_design, cli_validate

    cli_design.add_commands(sub)
    cli_validate.add_commands(sub)
