"""``selector pin``: a clevis-pin load case -> strength targets (and, with ``--select``,
the candidates); with ``--capacity``, the load a given pin can carry."""
from __future__ import annotations

import json

from ... import CAUTION
from ...errors import InputError
from ..units import display_name, quantity_of, to_display, unit
from .args import add_load_case, load_case, parse_step_text, positive_int, price_sheet, service_context
from .output import emit, print_caution, view_of
from .select import miss_columns

NAME = "pin"


def format_capacity(cap: dict) -> str:
    """The text of ``selector pin --capacity``: the allowable load per mode and the governing one."""
    lines = [f"clevis pin capacity: {cap['grade']}, {cap['shear_planes']} shear plane(s), safety factor "
             f"{cap['safety_factor']:g}",
             f"  strength: {cap['strength_basis']}"]
    for mode in ("shear", "bending", "bearing"):
        mark = "  <- governing" if mode == cap["governing"] else ""
        lines.append(f"  {mode:8s} {cap[mode + '_kn']:10.1f} kN  {cap[mode + '_lbf']:12,.0f} lbf{mark}")
    lines.append(f"  allowable load {cap['load_kn']:.1f} kN ({cap['load_lbf']:,.0f} lbf), governed by "
                 f"{cap['governing']}")
    lines += [f"  ! {w}" for w in cap.get("warnings", [])]
    return "\n".join(lines)


def format_report(rep: dict, args, system: str) -> str:
    """The stresses and targets of a pin report, in ``system``'s units."""
    s, su = rep["stresses"], unit("stress", system)

    def stress(key):
        return f"{to_display(s[key], 'stress', system):.1f} {su}"

    def target(k, v):
        q = quantity_of(k)
        return f"{display_name(k, system)} = {(to_display(v, q, system) if q else v):.1f}"

    d = to_display(args.diameter, "length", system)
    return "\n".join([
        f"clevis pin Ø{d:.4g} {unit('length', system)}, {args.shear_planes} shear plane(s), safety factor "
        f"{args.safety_factor:g}",
        f"  shear {stress('shear_mpa')}, bending {stress('bending_mpa')}, bearing {stress('bearing_mpa')} "
        f"(governing: {rep['governing']})",
        "  targets: " + ", ".join(target(k, v) for k, v in rep["targets"].items())])


def capacity(args) -> int:
    from ...design.capacity import pin_capacity     # the library, at run time (selector.views.cli)

    if args.grade is None:
        raise InputError("--grade", None, "a grade with --capacity, e.g. --grade 4130")
    route = None
    if args.route_json:
        try:
            route = json.loads(args.route_json)
        except json.JSONDecodeError as exc:
            raise InputError("--route-json", args.route_json, f"valid JSON ({exc.msg})") from None
    elif args.step:
        route = [parse_step_text(s) for s in args.step]
    cap = pin_capacity(args.grade, route, args.diameter, args.gap, args.lug, args.clevis,
                       shear_planes=args.shear_planes, safety_factor=args.safety_factor,
                       hardness_hrc=args.hardness_hrc)
    if args.format == "json":
        print(json.dumps({"caution": CAUTION, **cap}, indent=2, default=str, ensure_ascii=False))
    else:
        print(format_capacity(cap))
        print_caution()
    return 0


def run(args) -> int:
    from ... import nearest_misses, select          # the library, at run time (selector.views.cli)
    from ...design.pins import pin_report

    if getattr(args, "capacity", False):
        return capacity(args)
    if args.load_kn is None and args.load_lbf is None:
        raise InputError("--load-kn/--load-lbf", None, "a pin load (or --capacity to compute the allowable load)")
    rep = pin_report(**load_case(args, args.diameter))
    if args.format == "json" and not args.select:
        print(json.dumps({"caution": CAUTION, **rep}, indent=2, default=str, ensure_ascii=False))
        return 0
    system, _ = view_of(args)
    if args.format == "table":
        print(format_report(rep, args, system))
    if not args.select:
        print_caution()
        return 0
    t = dict(rep["targets"])
    if args.min_elongation_pct is not None:
        t["min_elongation_pct"] = args.min_elongation_pct
    res = select(t, args.diameter, length_mm=args.length, price_sheet=price_sheet(args), **service_context(args))
    if res.empty:
        miss = nearest_misses(t, args.diameter, length_mm=args.length)
        emit(miss, args, "No candidate meets every target. Nearest misses:", extra=miss_columns(miss))
        return 1
    emit(res.head(args.top or len(res)), args, "\ncandidates:", extra=["cautions"])
    return 0


def add_command(sub) -> None:
    p = sub.add_parser(NAME, help="clevis-pin load case → strength targets (and candidates with --select); "
                       "with --capacity: the load a given pin can carry")
    add_load_case(p, load_required=False)
    p.add_argument("--capacity", action="store_true",
                   help="allowable load of a given pin (needs --grade and a route, or --hardness-hrc)")
    p.add_argument("--grade", default=None, help="pin grade for --capacity, e.g. 4130")
    p.add_argument("--step", action="append", default=None,
                   help="route step for --capacity as 'op key=value ...' (repeat the option per step)")
    p.add_argument("--route-json", default=None, help="route for --capacity as a JSON list of steps")
    p.add_argument("--hardness-hrc", type=float, default=None,
                   help="the hardness the drawing specifies (bottom of its range), instead of a route")
    p.add_argument("--diameter", type=float, required=True, help="pin diameter, mm")
    p.add_argument("--length", type=float, default=100.0, help="pin length, mm (mass and part cost)")
    p.add_argument("--select", action="store_true", help="also list the candidates for the targets")
    p.add_argument("--top", type=positive_int, default=15, help="show at most N candidates (N >= 1)")
    p.set_defaults(func=run)
