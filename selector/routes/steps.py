"""Parsing and validating a process route given as a list of steps.

A route is a list of dicts, each with the key ``"op"`` and that operation's
parameters, e.g.::

    [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]

:data:`OPS` lists every operation with its parameters, their kinds and physically
possible ranges.  A parameter outside those ranges, an unknown operation or an
unknown parameter is a :class:`~selector.errors.RouteError`.  Whether the *grade*
admits the route, and whether a value lies inside the grade's usual process window,
is decided by the route family (:mod:`selector.routes.families`).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

from .. import inputs
from ..catalogue.supply import CONDITIONS
from ..errors import RouteError, check_choice, nearest

#: most steps a route may hold (the longest route of any family has 5)
MAX_STEPS = 12

QUENCH_MEDIA = ("water", "brine", "oil", "polymer", "air")
#: supply conditions of bar as ordered (selector.catalogue.supply.CONDITIONS gives them in words)
SUPPLY_CONDITIONS = ("hot_rolled", "cold_drawn", "cold_drawn_stress_relieved", "quenched_tempered",
                     "annealed", "normalized", "peeled", "aged")
AGITATION = ("none", "mild", "moderate", "strong")


@dataclass(frozen=True)
class Param:
    kind: str                 # "float" or "choice" or "str"
    lo: float | None = None
    hi: float | None = None
    choices: tuple = ()
    required: bool = False
    unit: str = ""


#: every operation and its parameters: physical limits, not process windows
OPS: Mapping[str, Mapping[str, Param]] = {
    "anneal": {"temp_c": Param("float", 300, 1150, unit="°C"), "hours": Param("float", 0.05, 200, unit="h")},
    "normalize": {"temp_c": Param("float", 750, 1150, unit="°C"), "hours": Param("float", 0.05, 50, unit="h")},
    "harden": {"quench": Param("choice", choices=QUENCH_MEDIA, required=True),
               "agitation": Param("choice", choices=AGITATION),
               "austenitize_c": Param("float", 700, 1250, unit="°C"),
               "hours": Param("float", 0.1, 20, unit="h")},
    "temper": {"temp_c": Param("float", 100, 760, required=True, unit="°C"),
               "hours": Param("float", 0.05, 200, unit="h")},
    "cold_work": {"reduction_pct": Param("float", 0, 95, unit="%"),
                  "designation": Param("str")},
    "solution_treat": {"temp_c": Param("float", 400, 1150, unit="°C"), "hours": Param("float", 0.05, 50, unit="h")},
    "age": {"temp_c": Param("float", 15, 900, unit="°C"), "hours": Param("float", 0.01, 20000, unit="h"),
            "designation": Param("str")},
    "carburize": {"temp_c": Param("float", 800, 1100, required=True, unit="°C"),
                  "hours": Param("float", 0.1, 200, required=True, unit="h"),
                  "surface_carbon_pct": Param("float", 0.3, 1.4, unit="wt%")},
    "nitride": {"temp_c": Param("float", 400, 650, required=True, unit="°C"),
                "hours": Param("float", 0.5, 500, required=True, unit="h")},
    "austemper": {"bath_c": Param("float", 150, 600, required=True, unit="°C"),
                  "hours": Param("float", 0.05, 48, unit="h"),
                  "austenitize_c": Param("float", 700, 1250, unit="°C")},
    "martemper": {"bath_c": Param("float", 100, 450, required=True, unit="°C"),
                  "austenitize_c": Param("float", 700, 1250, unit="°C")},
    "induction_harden": {"case_depth_mm": Param("float", 0.1, 25, required=True, unit="mm"),
                         "frequency_hz": Param("float", 50, 2e6, unit="Hz"),
                         "quench": Param("choice", choices=QUENCH_MEDIA)},
    "supply": {"condition": Param("choice", choices=SUPPLY_CONDITIONS, required=True),
               "designation": Param("str")},
    "stress_relieve": {"temp_c": Param("float", 150, 720, required=True, unit="°C"),
                       "hours": Param("float", 0.05, 50, unit="h")},
}


def parse_steps(route) -> list[dict]:
    """Validate the shape, operations and parameter values of ``route``.

    Returns a list of new dicts (floats converted) in the same order.
    Raises :class:`RouteError` naming the step, the field, the value and what is
    allowed.
    """
    if isinstance(route, Mapping):
        route = [route]
    if isinstance(route, str) or not isinstance(route, Sequence) or len(route) == 0:
        raise RouteError("route", route, "a non-empty list of steps such as "
                         "[{'op': 'harden', 'quench': 'oil'}, {'op': 'temper', 'temp_c': 540}]")
    if len(route) > MAX_STEPS:
        raise RouteError("route", f"{len(route)} steps", f"at most {MAX_STEPS} steps")
    out = []
    for i, step in enumerate(route):
        where = f"step {i + 1}"
        if not isinstance(step, Mapping) or "op" not in step:
            raise RouteError("op", step, "a dict with key 'op' (one of: " + ", ".join(OPS) + ")", where)
        op = step["op"]
        if not isinstance(op, str) or op not in OPS:
            check_choice("op", op, list(OPS), where, RouteError)
        spec = OPS[op]
        clean = {"op": op}
        for key, val in step.items():
            if key == "op":
                continue
            if key not in spec:
                near = nearest(key, list(spec), 2) if isinstance(key, str) and len(key) <= 200 else []
                allowed = ", ".join(spec) or "(no parameters)"
                raise RouteError(key, val, f"parameters of '{op}': {allowed}"
                                 + (f" (did you mean {', '.join(near)}?)" if near else ""), where)
            p = spec[key]
            if p.kind == "choice":
                clean[key] = check_choice(key, val, p.choices, f"{where} ({op})", RouteError)
            elif p.kind == "str":
                if not isinstance(val, str) or not val.strip() or len(val) > inputs.MAX_NAME_CHARS:
                    raise RouteError(key, val, f"a non-empty text of at most {inputs.MAX_NAME_CHARS} characters",
                                     f"{where} ({op})")
                clean[key] = val.strip()
            else:
                allowed = f"a number in [{p.lo:g}, {p.hi:g}] {p.unit}".strip()
                v = inputs.as_float(val) if inputs.is_number(val) else float("nan")
                if not (p.lo <= v <= p.hi):      # NaN fails too
                    raise RouteError(key, val, allowed, f"{where} ({op})")
                clean[key] = v
        for key, p in spec.items():
            if p.required and key not in clean:
                raise RouteError(key, None, f"'{op}' needs {key!r} ({p.unit or p.kind})", where)
        out.append(clean)
    return out


def signature(steps: Sequence[Mapping]) -> tuple:
    """The sequence of operation names of a parsed route."""
    return tuple(s["op"] for s in steps)


def describe(steps: Sequence[Mapping]) -> str:
    """A readable one-line text of a route: ``harden (oil quench) → temper 540 °C 2 h``."""
    parts = []
    for s in steps:
        op = s["op"].replace("_", " ")
        bits = []
        for k, v in s.items():
            if k == "op":
                continue
            unit = OPS[s["op"]][k].unit
            if isinstance(v, float):
                txt = f"{v:g}{' ' + unit if unit else ''}"
            else:
                txt = str(v)
            label = {"quench": "", "temp_c": "", "hours": "", "reduction_pct": "reduction ",
                     "designation": "", "austenitize_c": "from ", "agitation": "agitation ",
                     "surface_carbon_pct": "surface C ", "case_depth_mm": "depth ",
                     "frequency_hz": "", "condition": ""}.get(k, f"{k} ")
            if k == "quench":
                txt = f"{v} quench"
            if k == "condition":
                txt = CONDITIONS.get(str(v), str(v))
            if k == "designation" and s["op"] == "supply":
                txt = f"({v})"
            bits.append(label + txt)
        if s["op"] == "supply":
            parts.append("bar bought " + " ".join(bits))
            continue
        parts.append(op + (" " + ", ".join(bits) if bits else ""))
    return " → ".join(parts)
