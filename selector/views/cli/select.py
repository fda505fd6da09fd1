"""``selector select``: the candidates that meet targets at a section, in rank order;
the nearest misses when none does."""
from __future__ import annotations

from .args import TARGET_FLAGS, add_section_cost, allow_list, positive_int, price_sheet, targets_from_args
from .output import emit

NAME = "select"


def miss_columns(miss) -> list:
    """The columns particular to a nearest-miss table: its score and how far each target would move."""
    return ["miss_score"] + [c for c in miss.columns if c.startswith("move_")]


def run(args) -> int:
    from ... import nearest_misses, select     # the library, at run time (selector.views.cli)

    t = targets_from_args(args)
    kw = dict(thickness_mm=args.thickness, length_mm=args.length, price_sheet=price_sheet(args))
    res = select(t, args.diameter, robust_only=args.robust_only, min_p_meet=args.min_p_meet,
                 allow=allow_list(args.allow), **kw)
    if res.empty:
        miss = nearest_misses(t, args.diameter, **kw)
        emit(miss, args, "No candidate meets every target. Nearest misses (how far each target would have to "
             "move):", extra=miss_columns(miss))
        return 1
    if args.top is not None:
        res = res.head(args.top)
    emit(res, args, f"{len(res)} candidates in rank order (p_meet = % of heats within the specification that "
         f"meet every target, counting the model's 90 % band; robust = p_meet >= {args.min_p_meet:g}; "
         "candidates with an avoid caution come last; columns: docs/columns.md):")
    return 0


def add_command(sub) -> None:
    s = sub.add_parser(NAME, help="candidates that meet targets at a section")
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
    s.add_argument("--top", type=positive_int, default=None, help="show only the first N rows (N >= 1)")
    add_section_cost(s)
    s.set_defaults(func=run)
