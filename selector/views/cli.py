"""Command-line interface: ``selector <command> ...`` (also ``python -m selector``).

No physics or selection logic lives here: every command calls the library and
formats what it returns.
"""
from __future__ import annotations

import argparse
import json
import math
import sys

from .. import CAUTION
from ..errors import InputError, SelectorError

BANNER = f"CAUTION: {CAUTION}"


def parse_step_text(text: str) -> dict:
    """``"temper temp_c=540 hours=2"`` → ``{"op": "temper", "temp_c": 540.0, "hours": 2.0}``."""
    from .. import inputs

    inputs.check_text("step", text, max_chars=1000)
    parts = text.replace(",", " ").split()
    if not parts:
        raise InputError("step", text, "'op key=value ...', e.g. 'temper temp_c=540 hours=2'")
    step = {"op": parts[0]}
    for p in parts[1:]:
        if "=" not in p:
            raise InputError("step", text, "'op key=value ...'; each parameter as key=value")
        k, v = p.split("=", 1)
        try:
            step[k] = float(v)
        except ValueError:
            step[k] = v
    return step


def _route_from_args(args) -> list:
    if args.route_json:
        from .. import inputs

        return inputs.parse_json(args.route_json, "", field="--route-json")
    if not args.steps:
        raise InputError("steps", None, "at least one step, e.g. \"harden quench=oil\" \"temper temp_c=540\"")
    return [parse_step_text(s) for s in args.steps]


def parse_heat_text(text: str) -> dict:
    """``"C=0.41 Mn=0.86 Cr=0.95"`` → ``{"C": 0.41, "Mn": 0.86, "Cr": 0.95}`` (wt %)."""
    from ..catalogue.heat import parse_heat_text as parse

    return parse(text, "--heat")


def _fmt(v, nd=0):
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return "—"
    if isinstance(v, float):
        return f"{v:.{nd}f}"
    return str(v)


def _banded(r: dict, key: str, unit: str, nd: int = 0) -> str:
    """``969 MPa (905–1030, 90 %)``: the estimate with its prediction band."""
    v, lo, hi = r.get(key), r.get(key + "_lo"), r.get(key + "_hi")
    text = f"{_fmt(v, nd)} {unit}"
    if v is not None and lo is not None and hi is not None:
        text += f" ({_fmt(lo, nd)}–{_fmt(hi, nd)}, 90 %)"
    return text


def format_evaluation(r: dict) -> str:
    sec = (f"Ø{r['diameter_mm']:g} mm round" if r.get("diameter_mm") else f"{r['thickness_mm']:g} mm plate")
    lines = [f"{r['grade']} ({r['family']}), {sec}", f"route: {r['route_text']}"]
    if r.get("heat_composition"):
        lines.append("heat analysis (wt %): " + " ".join(f"{e}={v:g}" for e, v in r["heat_composition"].items()))
    lines += ["", "(90 %: the range that held 90 % of independent published values for similar states)",
             f"at the tension-test location ({r['test_location']}, ASTM A370):",
             f"  tensile strength   {_banded(r, 'uts_mpa', 'MPa')}",
             f"  yield strength     {_banded(r, 'yield_mpa', 'MPa')}",
             f"  elongation         {_banded(r, 'elongation_pct', '%', 1)}",
             f"  hardness           {_banded(r, 'hardness_hv', 'HV')}  {_fmt(r.get('hardness_hb'))} HB  "
             f"{_banded(r, 'hardness_hrc', 'HRC', 1)}",
             f"surface hardness     {_fmt(r.get('surface_hardness_hv'))} HV ({_fmt(r.get('surface_hardness_hrc'), 1)} HRC)",
             f"centre hardness      {_fmt(r.get('center_hardness_hv'))} HV",
             f"case depth           {_fmt(r.get('case_depth_mm'), 2)} mm"]
    if r.get("center_martensite_pct") is not None:
        lines.append(f"centre martensite    {_fmt(r['center_martensite_pct'])} %")
    if r.get("fatigue_limit_mpa") is not None:
        f = r["fatigue"]
        at = "endurance limit" if f["cycles"] is None else f"at {f['cycles']:.0e} cycles (no endurance limit)"
        lines.append(f"fatigue limit        {_banded(r, 'fatigue_limit_mpa', 'MPa')} {at}; {f['finish']}, "
                     f"{f['load_type']}, reliability {f['reliability']:g}; governing: {f['governing']} "
                     f"({_fmt(f['governing_depth_mm'], 2)} mm)")
    if r.get("profile"):
        lines += ["", "hardness across the section (depth from surface):"]
        for p in r["profile"]:
            lines.append(f"  {p['depth_mm']:7.2f} mm  {_fmt(p['hardness_hv']):>5} HV  {_fmt(p['hardness_hrc'], 1):>5} HRC")
    if r.get("warnings"):
        lines += ["", "warnings:"] + [f"  ! {w}" for w in r["warnings"]]
    lines += ["", "sources:"] + [f"  - {s}" for s in r["sources"]]
    return "\n".join(lines)


def cmd_evaluate(args) -> int:
    from .. import evaluate

    heat = parse_heat_text(args.heat) if args.heat is not None else None
    r = evaluate(args.grade, _route_from_args(args), diameter_mm=args.diameter, thickness_mm=args.thickness,
                 heat_composition=heat, finish=args.finish, load_type=args.load_type,
                 reliability=args.reliability)
    if args.json:
        print(json.dumps({**r, "caution": CAUTION}, indent=2, ensure_ascii=False))
    else:
        print(format_evaluation(r))
        print("\n" + BANNER)
    return 0


def cmd_grades(args) -> int:
    from .. import catalogue, grade

    if args.name:
        g = grade(args.name)
        info = {"id": g.id, "name": g.name, "family": g.family, "designations": dict(g.designations),
                "aliases": list(g.aliases), "standard": g.standard, "routes": list(g.routes),
                "composition": {e: [g.comp_min[e], g.comp_max[e]] for e in g.comp_min},
                "relative_price": g.relative_price, "source": g.source, "confidence": g.confidence}
        print(json.dumps(info, indent=2, ensure_ascii=False) if args.json else
              "\n".join(f"{k:>15}: {v}" for k, v in info.items()))
        return 0
    cat = catalogue()
    cols = ["grade", "family", "designations", "routes", "relative_price", "confidence"]
    if args.json:
        print(cat[cols + ["source"]].to_json(orient="records", indent=2, force_ascii=False))
    else:
        print(cat[cols].to_string(index=False))
    return 0


class UsageError(SelectorError, ValueError):
    """A command line that argparse refuses (unknown option, missing or malformed value)."""


class _Parser(argparse.ArgumentParser):
    """argparse, but a usage error raises :class:`UsageError` (one line, exit 2 from
    :func:`main`) instead of printing the usage and exiting."""

    def error(self, message):
        raise UsageError(f"{self.prog}: {message} (see '{self.prog} --help')")


def positive_int(text: str) -> int:
    """argparse type: a whole number >= 1 (``--top``)."""
    try:
        v = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if v < 1:
        raise argparse.ArgumentTypeError(f"{v} is not allowed; give a whole number >= 1")
    return v


def build_parser() -> argparse.ArgumentParser:
    ap = _Parser(prog="selector", description="Grade and process-route selection for "
                 "load-bearing metal parts. " + CAUTION)
    sub = ap.add_subparsers(dest="command", required=True, parser_class=_Parser)

    ev = sub.add_parser("evaluate", help="properties of one grade and route at a section")
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
    ev.set_defaults(func=cmd_evaluate)

    gr = sub.add_parser("grades", help="list the catalogue, or show one grade")
    gr.add_argument("name", nargs="?")
    gr.add_argument("--json", action="store_true")
    gr.set_defaults(func=cmd_grades)

    from . import cli_more
    cli_more.add_commands(sub)
    from . import cli_batch
    cli_batch.add_commands(sub)
    return ap


def one_line(exc: BaseException, limit: int = 2000) -> str:
    """The error's message on one line (newlines folded), at most ``limit`` characters."""
    text = " ".join(str(exc).split())
    return text if len(text) <= limit else text[:limit - 1] + "…"


def main(argv=None) -> int:
    """Run one command; return its exit code (0 done, 1 nothing found, 2 bad input:
    a one-line ``error: ...`` message on stderr)."""
    ap = build_parser()
    try:
        args = ap.parse_args(argv)
    except SelectorError as exc:
        print(f"error: {one_line(exc)}", file=sys.stderr)
        return 2
    except SystemExit as exc:         # --help / --version: argparse has printed it
        return int(exc.code or 0) if not isinstance(exc.code, str) else 2
    try:
        return args.func(args)
    except SelectorError as exc:
        print(f"error: {one_line(exc)}", file=sys.stderr)
        return 2
