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
#: the select table: rank, the probability of meeting the targets, and the avoid rules first
SELECT_COLUMNS = ["rank", "grade", "route_text", "yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc",
                  "surface_hardness_hrc", "case_depth_mm", "relative_cost", "p_meet_pct", "robust", "pareto",
                  "avoid", "window"]


def _allow_list(values) -> list | None:
    """``--allow a,b --allow c`` -> ``["a", "b", "c"]`` (None when not given)."""
    if not values:
        return None
    return [v.strip() for item in values for v in str(item).split(",") if v.strip()]


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
    res = select(t, args.diameter, robust_only=args.robust_only, min_p_meet=args.min_p_meet,
                 allow=_allow_list(args.allow), **kw)
    if res.empty:
        miss = nearest_misses(t, args.diameter, **kw)
        moves = [c for c in miss.columns if c.startswith("move_")]
        emit(miss, args.format, ["grade", "route_text", "miss_score"] + moves,
             "No candidate meets every target. Nearest misses (how far each target would have to move):")
        return 1
    if args.top is not None:
        res = res.head(args.top)
    if args.format == "table":
        res = res.assign(p_meet_pct=(100.0 * res["p_meet"]).round(1))
    emit(res, args.format, SELECT_COLUMNS + [c for c in res.columns if c.startswith("margin_")],
         f"{len(res)} candidates in rank order (p_meet_pct = % of heats within the specification that meet "
         f"every target, counting the model's 90 % band; robust = p_meet >= {args.min_p_meet:g}; "
         "candidates with an 'avoid' caution come last):")
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
    s.add_argument("--robust-only", action="store_true",
                   help="only candidates whose probability of meeting the targets is at least --min-p-meet")
    s.add_argument("--min-p-meet", type=float, default=0.9,
                   help="required probability (0-1] that a heat within the specification meets every target "
                        "(default 0.9)")
    s.add_argument("--allow", action="append", metavar="RULE[,RULE]",
                   help="caution rule(s) not to rank as 'avoid', e.g. quench_cracking (repeatable)")
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
