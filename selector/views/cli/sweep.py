"""``selector sweep``: the cheapest robust candidate at each pin diameter."""
from __future__ import annotations

from .args import add_load_case, load_case, parse_diameters, price_sheet, service_context
from .output import emit

NAME = "sweep"

#: the columns particular to a sweep: before the readable ones (the diameter and its targets) and after
LEAD = ("diameter_mm", "min_yield_mpa", "min_uts_mpa", "governing")
EXTRA = ("changed", "cautions")


def run(args) -> int:
    from ...design.sweep_picks import sweep_with_picks     # the library, at run time (selector.views.cli)

    extra = {"min_elongation_pct": args.min_elongation_pct} if args.min_elongation_pct is not None else None
    res = sweep_with_picks(parse_diameters(args.diameters), extra_targets=extra, price_sheet=price_sheet(args),
                         caution_context=service_context(args), length_mm=args.length, **load_case(args))
    emit(res, args, "Cheapest robust candidate per diameter (changed = the pick differs from the previous "
         "diameter):", lead=LEAD, extra=EXTRA)
    return 0


def add_command(sub) -> None:
    s = sub.add_parser(NAME, help="cheapest robust candidate at each pin diameter")
    add_load_case(s)
    s.add_argument("--diameters", required=True, help="'20,25,30' or 'from:to:step' (mm)")
    s.add_argument("--length", type=float, default=None, help="pin length, mm (default: the grip length)")
    s.set_defaults(func=run)
