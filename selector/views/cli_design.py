"""CLI commands from the part to the targets: ``pin`` (clevis-pin load case →
targets, optionally the candidates) and ``sweep`` (cheapest robust candidate per
diameter).  Each only calls the library."""
from __future__ import annotations

import json

from .. import CAUTION
from ..errors import InputError


def _load_case(args, diameter=None) -> dict:
    case = dict(load_kn=args.load_kn, load_lbf=args.load_lbf, shear_planes=args.shear_planes,
                safety_factor=args.safety_factor, gap_mm=args.gap, lug_thickness_mm=args.lug,
                clevis_thickness_mm=args.clevis, wear_surface_hardness_hrc=args.wear_hrc,
                material_class=args.material_class)
    if diameter is not None:
        case["diameter_mm"] = diameter
    return case


def _service(args) -> dict:
    return dict(plated=args.plated or bool(args.plating), plating=args.plating,
                mating_material=args.mating, service_temp_c=args.service_temp)


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


def _capacity(args) -> int:
    from ..design.capacity import pin_capacity
    from .cli import parse_step_text

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
        print(f"\nCAUTION: {CAUTION}")
    return 0


def cmd_pin(args) -> int:
    from ..design.pins import pin_report
    from .cli_more import TABLE_COLUMNS, _price_sheet, emit

    if getattr(args, "capacity", False):
        return _capacity(args)
    if args.load_kn is None and args.load_lbf is None:
        raise InputError("--load-kn/--load-lbf", None, "a pin load (or --capacity to compute the allowable load)")
    rep = pin_report(**_load_case(args, args.diameter))
    s = rep["stresses"]
    if args.format == "json" and not args.select:
        print(json.dumps({"caution": CAUTION, **rep}, indent=2, default=str, ensure_ascii=False))
        return 0
    if args.format == "table":
        print(f"clevis pin Ø{args.diameter:g} mm, {args.shear_planes} shear plane(s), safety factor "
              f"{args.safety_factor:g}")
        print(f"  shear {s['shear_mpa']:.1f} MPa, bending {s['bending_mpa']:.1f} MPa, bearing "
              f"{s['bearing_mpa']:.1f} MPa (governing: {rep['governing']})")
        print("  targets: " + ", ".join(f"{k} = {v:.1f}" for k, v in rep["targets"].items()))
    if not args.select:
        print(f"\nCAUTION: {CAUTION}")
        return 0
    from .. import nearest_misses, select

    t = dict(rep["targets"])
    if args.min_elongation_pct is not None:
        t["min_elongation_pct"] = args.min_elongation_pct
    res = select(t, args.diameter, length_mm=args.length, price_sheet=_price_sheet(args), **_service(args))
    if res.empty:
        miss = nearest_misses(t, args.diameter, length_mm=args.length)
        moves = [c for c in miss.columns if c.startswith("move_")]
        emit(miss, args.format, ["grade", "route_text", "miss_score"] + moves,
             "No candidate meets every target. Nearest misses:")
        return 1
    emit(res.head(args.top or len(res)), args.format, TABLE_COLUMNS + ["cautions"], "\ncandidates:")
    return 0


def _diameters(text: str) -> list:
    """``"20,25,30"`` or ``"from:to:step"`` (mm) as a list; the size of a range is
    checked before it is built (:func:`selector.design.sweep.diameter_range`)."""
    from .. import inputs
    from ..design.sweep import MAX_DIAMETERS, diameter_range

    allowed = (f"a list '20,25,30' or a range 'from:to:step' in mm (finite, > 0, at most "
               f"{MAX_DIAMETERS} values)")
    inputs.check_text("--diameters", text, max_chars=10_000)
    try:
        if ":" in text:
            a, b, step = (float(x) for x in text.split(":"))
            try:
                return [float(x) for x in diameter_range(a, b, step)]
            except InputError as exc:
                raise InputError("--diameters", text, f"{exc.field}={exc.value!s}: {exc.allowed}") from None
        parts = [x for x in text.split(",") if x.strip()]
        if len(parts) > MAX_DIAMETERS:
            raise InputError("--diameters", f"{len(parts)} values", allowed)
        return [float(x) for x in parts]
    except ValueError:
        raise InputError("--diameters", text, allowed) from None


def cmd_sweep(args) -> int:
    from ..design.sweep import diameter_sweep
    from .cli_more import _price_sheet, emit

    case = _load_case(args)
    extra = {"min_elongation_pct": args.min_elongation_pct} if args.min_elongation_pct is not None else None
    res = diameter_sweep(_diameters(args.diameters), extra_targets=extra, price_sheet=_price_sheet(args),
                         caution_context=_service(args), length_mm=args.length,
                         **case)
    emit(res, args.format, ["diameter_mm", "min_yield_mpa", "min_uts_mpa", "governing", "grade", "route_text",
                            "yield_mpa", "part_cost", "changed", "cautions"],
         "Cheapest robust candidate per diameter (changed = the pick differs from the previous diameter):")
    return 0


def _load_args(p, load_required: bool = True) -> None:
    g = p.add_mutually_exclusive_group(required=load_required)
    g.add_argument("--load-kn", type=float, help="pin load, kN")
    g.add_argument("--load-lbf", type=float, help="pin load, lbf")
    p.add_argument("--shear-planes", type=int, default=2, choices=(1, 2))
    p.add_argument("--safety-factor", type=float, default=2.0)
    p.add_argument("--gap", type=float, default=0.0, help="gap between lug and clevis, mm")
    p.add_argument("--lug", type=float, required=True, help="lug (middle member) thickness, mm")
    p.add_argument("--clevis", type=float, required=True, help="thickness of each clevis plate, mm")
    p.add_argument("--wear-hrc", type=float, default=None, help="minimum surface hardness for wear, HRC")
    p.add_argument("--material-class", default="steel")
    p.add_argument("--min-elongation-pct", type=float, default=None)
    p.add_argument("--plated", action="store_true", help="the pin will be electroplated")
    p.add_argument("--plating", default=None, help="plating metal, e.g. 'zinc plated'")
    p.add_argument("--mating", default=None, help="the mating material (galvanic caution)")
    p.add_argument("--service-temp", type=float, default=None, help="highest service temperature, °C")
    p.add_argument("--prices", help="price sheet CSV (columns grade, relative_price)")
    p.add_argument("--format", choices=("table", "csv", "json"), default="table")


def add_commands(sub) -> None:
    p = sub.add_parser("pin", help="clevis-pin load case → strength targets (and candidates with --select); "
                       "with --capacity: the load a given pin can carry")
    _load_args(p, load_required=False)
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
    from .cli import positive_int

    p.add_argument("--top", type=positive_int, default=15, help="show at most N candidates (N >= 1)")
    p.set_defaults(func=cmd_pin)

    s = sub.add_parser("sweep", help="cheapest robust candidate at each pin diameter")
    _load_args(s)
    s.add_argument("--diameters", required=True, help="'20,25,30' or 'from:to:step' (mm)")
    s.add_argument("--length", type=float, default=None, help="pin length, mm (default: the grip length)")
    s.set_defaults(func=cmd_sweep)
