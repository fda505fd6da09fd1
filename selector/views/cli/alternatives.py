"""``selector alternatives``: cheaper candidates that reach a given grade and route's properties."""
from __future__ import annotations

from ..notice import CAUTION_LINES
from ..units import route_words, to_display, unit
from .args import add_section_cost, price_sheet, route_from_args
from .output import emit, fmt, view_of

NAME = "alternatives"


def reference_text(ref: dict, system: str) -> str:
    """The first line: the reference choice, its properties and relative cost, in ``system``'s units."""
    su = unit("stress", system)

    def stress(key):
        v = ref.get(key)
        return fmt(None if v is None else to_display(v, "stress", system))

    basis = ("" if ref.get("basis", "strength") == "strength" else
             f" (strength not estimated above the ASTM A370 tensile column; matched on hardness "
             f"{fmt(ref.get('hardness_hrc'), 1)} HRC)")
    route = route_words(ref["route"], system) if isinstance(ref.get("route"), (list, tuple)) else ref["route_text"]
    cost = to_display(ref["relative_cost"], "cost_per_mass", system)
    return (f"Reference: {ref['grade']} {route}: yield {stress('yield_mpa')} {su}, tensile {stress('uts_mpa')} {su}, "
            f"elongation {fmt(ref.get('elongation_pct'), 1)} %, relative cost {cost:.2f} "
            f"{unit('cost_per_mass', system)}{basis}.\nCheaper candidates that reach at least that:")


def run(args) -> int:
    from ... import alternatives     # the library, at run time (selector.views.cli)

    res = alternatives(args.grade, route_from_args(args), args.diameter, thickness_mm=args.thickness,
                       length_mm=args.length, price_sheet=price_sheet(args))
    system, _ = view_of(args)
    title = reference_text(res.attrs["reference"], system)
    if res.empty:
        print(title + "\n  (none in the catalogue)\n\n" + CAUTION_LINES)
        return 1
    emit(res, args, title, extra=["saving_per_kg"])
    return 0


def add_command(sub) -> None:
    a = sub.add_parser(NAME, help="cheaper candidates reaching a given choice's properties")
    a.add_argument("grade")
    a.add_argument("steps", nargs="*")
    a.add_argument("--route-json")
    add_section_cost(a)
    a.set_defaults(func=run)
