"""``selector evaluate``: the properties of one grade and route at a section."""
from __future__ import annotations

import json

from ... import CAUTION
from .args import parse_heat_text, route_from_args
from .output import fmt, print_caution

NAME = "evaluate"


def banded(r: dict, key: str, unit: str, nd: int = 0) -> str:
    """``969 MPa (905–1030, 90 %)``: the estimate with its prediction band."""
    v, lo, hi = r.get(key), r.get(key + "_lo"), r.get(key + "_hi")
    text = f"{fmt(v, nd)} {unit}"
    if v is not None and lo is not None and hi is not None:
        text += f" ({fmt(lo, nd)}–{fmt(hi, nd)}, 90 %)"
    return text


def format_evaluation(r: dict) -> str:
    """The text of ``selector evaluate`` for a result of :func:`selector.evaluate`."""
    sec = (f"Ø{r['diameter_mm']:g} mm round" if r.get("diameter_mm") else f"{r['thickness_mm']:g} mm plate")
    lines = [f"{r['grade']} ({r['family']}), {sec}", f"route: {r['route_text']}"]
    if r.get("heat_composition"):
        lines.append("heat analysis (wt %): " + " ".join(f"{e}={v:g}" for e, v in r["heat_composition"].items()))
    lines += ["", "(90 %: the range that held 90 % of independent published values for similar states)",
              f"at the tension-test location ({r['test_location']}, ASTM A370):",
              f"  tensile strength   {banded(r, 'uts_mpa', 'MPa')}",
              f"  yield strength     {banded(r, 'yield_mpa', 'MPa')}",
              f"  elongation         {banded(r, 'elongation_pct', '%', 1)}",
              f"  hardness           {banded(r, 'hardness_hv', 'HV')}  {fmt(r.get('hardness_hb'))} HB  "
              f"{banded(r, 'hardness_hrc', 'HRC', 1)}",
              f"surface hardness     {fmt(r.get('surface_hardness_hv'))} HV ({fmt(r.get('surface_hardness_hrc'), 1)} HRC)",
              f"centre hardness      {fmt(r.get('center_hardness_hv'))} HV",
              f"case depth           {fmt(r.get('case_depth_mm'), 2)} mm"]
    if r.get("center_martensite_pct") is not None:
        lines.append(f"centre martensite    {fmt(r['center_martensite_pct'])} %")
    if r.get("fatigue_limit_mpa") is not None:
        f = r["fatigue"]
        at = "endurance limit" if f["cycles"] is None else f"at {f['cycles']:.0e} cycles (no endurance limit)"
        lines.append(f"fatigue limit        {banded(r, 'fatigue_limit_mpa', 'MPa')} {at}; {f['finish']}, "
                     f"{f['load_type']}, reliability {f['reliability']:g}; governing: {f['governing']} "
                     f"({fmt(f['governing_depth_mm'], 2)} mm)")
    if r.get("profile"):
        lines += ["", "hardness across the section (depth from surface):"]
        for p in r["profile"]:
            lines.append(f"  {p['depth_mm']:7.2f} mm  {fmt(p['hardness_hv']):>5} HV  {fmt(p['hardness_hrc'], 1):>5} HRC")
    if r.get("cautions"):
        lines += ["", "cautions (rules of data/cautions.csv; severity note < caution < avoid):"]
        lines += [f"  [{c['severity']}] {c['title']}: {c['reason']}" for c in r["cautions"]]
    if r.get("warnings"):
        lines += ["", "warnings:"] + [f"  ! {w}" for w in r["warnings"]]
    lines += ["", "sources:"] + [f"  - {s}" for s in r["sources"]]
    return "\n".join(lines)


def run(args) -> int:
    from ... import evaluate  # lazy: the parser and --help start without loading the models

    heat = parse_heat_text(args.heat) if args.heat is not None else None
    r = evaluate(args.grade, route_from_args(args), diameter_mm=args.diameter, thickness_mm=args.thickness,
                 heat_composition=heat, finish=args.finish, load_type=args.load_type,
                 reliability=args.reliability)
    if args.json:
        print(json.dumps({**r, "caution": CAUTION}, indent=2, ensure_ascii=False))
    else:
        print(format_evaluation(r))
        print_caution()
    return 0


def add_command(sub) -> None:
    ev = sub.add_parser(NAME, help="properties of one grade and route at a section")
    ev.add_argument("grade")
    ev.add_argument("steps", nargs="*", help="steps as 'op key=value ...', e.g. \"harden quench=oil\" "
                    "\"temper temp_c=540 hours=2\"")
    ev.add_argument("--route-json", help="the route as a JSON list of step objects")
    ev.add_argument("--diameter", type=float, default=25.0, help="round section diameter, mm (default 25)")
    ev.add_argument("--thickness", type=float, default=None, help="plate thickness, mm (instead of a diameter)")
    ev.add_argument("--heat", default=None, help="the heat's analysis from its mill certificate, wt %%, e.g. "
                    "\"C=0.41 Mn=0.86 Cr=0.95 Mo=0.18\" (other elements: the grade's nominal)")
    ev.add_argument("--finish", default="machined",
                    help="surface finish for the fatigue limit: ground, machined, hot_rolled, as_forged")
    ev.add_argument("--load-type", default="bending", help="fatigue load type: bending, axial, torsion")
    ev.add_argument("--reliability", type=float, default=0.5, help="fatigue reliability, 0.5 to 0.9999")
    ev.add_argument("--json", action="store_true", help="machine-readable output")
    ev.set_defaults(func=run)
