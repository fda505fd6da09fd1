"""Argument helpers shared by the verbs of the command line: the parser that turns a
usage error into one line, the option groups several verbs take (section, cost, view,
targets, pin load case), and the readers of step, heat and diameter texts.

Only reading and checking of the command line lives here; the verbs call the library.
The library is imported inside the readers that need it (price sheets, targets files,
the diameter range): building the parser for ``selector --help`` or ``selector grades``
then costs no model import (see :mod:`selector.views.cli`).
"""
from __future__ import annotations

import argparse
from pathlib import Path

from ... import inputs
from ...errors import InputError, SelectorError
from ..units import HARDNESS_SCALES, SI, US

#: the target options of ``select`` (name, type); ``--min-yield-mpa`` sets ``min_yield_mpa``
TARGET_FLAGS = (
    ("min_yield_mpa", float), ("max_yield_mpa", float), ("min_uts_mpa", float), ("max_uts_mpa", float),
    ("min_elongation_pct", float), ("min_hardness_hrc", float), ("max_hardness_hrc", float),
    ("min_surface_hardness_hrc", float), ("min_case_depth_mm", float), ("max_relative_cost", float),
)

#: ``--units`` value -> unit system of :mod:`selector.views.units`
UNIT_CHOICES = {"SI": SI, "US": US}


class UsageError(SelectorError, ValueError):
    """A command line that argparse refuses (unknown option, missing or malformed value)."""


class Parser(argparse.ArgumentParser):
    """argparse, but a usage error raises :class:`UsageError` (one line, exit 2 from
    :func:`selector.views.cli.main`) instead of printing the usage and exiting."""

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


def parse_step_text(text: str) -> dict:
    """``"temper temp_c=540 hours=2"`` → ``{"op": "temper", "temp_c": 540.0, "hours": 2.0}``."""
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


def route_from_args(args) -> list:
    """The route of ``evaluate`` / ``alternatives``: ``--route-json`` or the step texts."""
    if args.route_json:
        return inputs.parse_json(args.route_json, "", field="--route-json")
    if not args.steps:
        raise InputError("steps", None, "at least one step, e.g. \"harden quench=oil\" \"temper temp_c=540\"")
    return [parse_step_text(s) for s in args.steps]


def parse_heat_text(text: str) -> dict:
    """``"C=0.41 Mn=0.86 Cr=0.95"`` → ``{"C": 0.41, "Mn": 0.86, "Cr": 0.95}`` (wt %)."""
    from ...catalogue.heat import parse_heat_text as parse

    return parse(text, "--heat")


def allow_list(values) -> list | None:
    """``--allow a,b --allow c`` -> ``["a", "b", "c"]`` (None when not given)."""
    if not values:
        return None
    return [v.strip() for item in values for v in str(item).split(",") if v.strip()]


def targets_from_args(args) -> dict:
    """The targets of ``select``: the ``--targets`` TOML file, then the flags over it."""
    from ...studies import load_targets

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


def price_sheet(args):
    """The price sheet of ``--prices`` (None when not given)."""
    if not getattr(args, "prices", None):
        return None
    from ...studies import load_price_sheet

    return load_price_sheet(Path(args.prices), args.prices)


def add_format(p) -> None:
    p.add_argument("--format", choices=("table", "csv", "json"), default="table")


def add_view(p) -> None:
    """``--units``, ``--hardness`` and ``--all-columns``: how a candidates table is shown
    (docs/columns.md)."""
    p.add_argument("--units", choices=tuple(UNIT_CHOICES), default="SI",
                   help="units of the table: SI (MPa, mm, °C) or US (ksi, in, °F); default SI")
    p.add_argument("--hardness", choices=HARDNESS_SCALES, type=str.upper, default=None,
                   help="hardness scale of the table: HRC (default), HB or HV")
    p.add_argument("--all-columns", action="store_true",
                   help="every column of the library's table after the readable ones (docs/columns.md)")


def add_section_cost(p, section: bool = True) -> None:
    """Section (``--diameter``/``--thickness``), ``--length``, ``--prices``, ``--format`` and the view."""
    if section:
        p.add_argument("--diameter", type=float, default=25.0, help="round section diameter, mm (default 25)")
        p.add_argument("--thickness", type=float, default=None, help="plate thickness, mm (instead of a diameter)")
    p.add_argument("--length", type=float, default=100.0, help="part length, mm, for mass and part cost")
    p.add_argument("--prices", help="price sheet CSV (columns grade, relative_price)")
    add_format(p)
    add_view(p)


def add_load_case(p, load_required: bool = True) -> None:
    """The clevis-pin load case of ``pin`` and ``sweep``."""
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
    add_format(p)
    add_view(p)


def load_case(args, diameter=None) -> dict:
    """The keyword arguments of :func:`selector.design.pins.pin_report` from the load-case options."""
    case = dict(load_kn=args.load_kn, load_lbf=args.load_lbf, shear_planes=args.shear_planes,
                safety_factor=args.safety_factor, gap_mm=args.gap, lug_thickness_mm=args.lug,
                clevis_thickness_mm=args.clevis, wear_surface_hardness_hrc=args.wear_hrc,
                material_class=args.material_class)
    if diameter is not None:
        case["diameter_mm"] = diameter
    return case


def service_context(args) -> dict:
    """The service conditions of the cautions (plating, mating material, temperature)."""
    return dict(plated=args.plated or bool(args.plating), plating=args.plating,
                mating_material=args.mating, service_temp_c=args.service_temp)


def parse_diameters(text: str) -> list:
    """``"20,25,30"`` or ``"from:to:step"`` (mm) as a list; the size of a range is
    checked before it is built (:func:`selector.design.sweep.diameter_range`)."""
    from ...design.sweep import MAX_DIAMETERS, diameter_range

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
