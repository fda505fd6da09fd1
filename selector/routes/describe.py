"""A process route in words: ``austenitize 845 °C, quench in oil, temper 540 °C 2 h``.

One describer for the page, the command line and the reports.  The words come from a
table keyed by the step operation (:data:`STEP_WORDS`: op -> a function of the step);
an operation without an entry is read from :data:`selector.routes.steps.OPS` (its name,
then each parameter with its unit), so a new route family, which is a new sequence of
operations, needs no edit here nor in the views.  The parameters of a process window
(``temper_temp_c``, ``hours``, ``case_depth_mm``) read through :func:`parameter_words`.

Numbers are written by a *formatter* ``fmt(value, si_unit) -> str``, ``si_unit`` being
the unit of the parameter in ``OPS`` (``°C``, ``mm``, ``h``, ``%``, ``wt%``, ``Hz``).
The default writes SI; :func:`selector.views.units.value_formatter` writes the chosen
unit system (this layer knows nothing of display units).

Words follow the trade's usage (common practice; ASM Handbook Vol. 4, *Heat Treating*,
glossary, from memory): *austenitize*, *quench in oil*, *temper*, *normalize*,
*carburize*, *nitride*, *induction harden*, *solution treat*, *age*, *austemper*,
*martemper*, *stress relieve*, *cold work*; a bar bought in a supply condition names
the condition and the standard (``bought cold drawn and stress relieved (ASTM A311
class B)``).

Example
-------
>>> describe_route([{"op": "harden", "quench": "oil", "austenitize_c": 845.0},
...                 {"op": "temper", "temp_c": 540.0, "hours": 2.0}])
'austenitize 845 °C, quench in oil, temper 540 °C 2 h'
"""
from __future__ import annotations

from math import floor, log10
from typing import Callable, Mapping, Sequence

from ..catalogue.supply import CONDITIONS
from .steps import OPS

Formatter = Callable[[float, str], str]


def si_value(value: float, si_unit: str) -> str:
    """The default formatter: SI, furnace temperatures to 5 °C, other values to 2
    significant figures (``845 °C``, ``2 h``, ``0.51 mm``, ``50 %``)."""
    v = float(value)
    if si_unit == "°C":
        txt = f"{round(v / 5.0) * 5.0:.0f}"
    elif si_unit == "Hz" and v >= 1000:
        return f"{significant_text(v / 1000.0)} kHz"
    else:
        txt = significant_text(v)
    if not si_unit:
        return txt
    return f"{txt} {si_unit}"


def significant_text(v: float, digits: int = 2) -> str:
    """``v`` to ``digits`` significant figures, without an exponent (``9.2``, ``120``)."""
    v = float(v)
    if v == 0 or v != v or v in (float("inf"), float("-inf")):
        return f"{v:g}"
    r = round(v, digits - 1 - int(floor(log10(abs(v)))))
    return f"{r:.6g}" if abs(r) < 1e6 else f"{r:.0f}"


def _param(step: Mapping, key: str, fmt: Formatter) -> str | None:
    """A numeric parameter of ``step`` written by ``fmt`` with its OPS unit (None if absent)."""
    v = step.get(key)
    if v is None or isinstance(v, str):
        return v
    spec = OPS.get(step.get("op"), {})
    return fmt(float(v), spec[key].unit if key in spec else "")


def _timed(verb: str, step: Mapping, fmt: Formatter, temp_key: str = "temp_c") -> str:
    """``temper 540 °C 2 h``: a verb, the temperature, the time (each when given)."""
    bits = [verb] + [b for b in (_param(step, temp_key, fmt), _param(step, "hours", fmt)) if b]
    return " ".join(bits)


def _quench(step: Mapping) -> str:
    medium = step.get("quench")
    if not medium:
        return ""
    text = "cool in still air" if medium == "air" else f"quench in {medium}"
    agitation = step.get("agitation")
    if agitation and agitation != "none":
        text += f" ({agitation} agitation)"
    return text


def _austenitize(step: Mapping, fmt: Formatter) -> str:
    t = _param(step, "austenitize_c", fmt)
    h = _param(step, "hours", fmt) if step.get("op") == "harden" else None
    return " ".join(["austenitize", t or "at the grade's usual temperature"] + ([h] if h else []))


def _harden(step, fmt):
    return ", ".join(b for b in (_austenitize(step, fmt), _quench(step)) if b)


def _carburize(step, fmt):
    text = _timed("carburize", step, fmt)
    c = _param(step, "surface_carbon_pct", fmt)
    return text + (f" to {c} surface carbon" if c else "")


def _induction(step, fmt):
    text = "induction harden"
    d = _param(step, "case_depth_mm", fmt)
    if d:
        text += f" to a {d} case"
    f = _param(step, "frequency_hz", fmt)
    if f:
        text += f" at {f}"
    q = _quench(step)
    return text + (f", {q}" if q else "")


def _cold_work(step, fmt):
    if step.get("designation"):
        return f"cold work to temper {step['designation']}"
    r = _param(step, "reduction_pct", fmt)
    return f"cold work {r} reduction" if r else "cold work"


def _age(step, fmt):
    if step.get("designation") and step.get("temp_c") is None:
        return f"age to {step['designation']}"
    text = _timed("age", step, fmt)
    return text + (f" ({step['designation']})" if step.get("designation") else "")


def _bath(verb: str):
    def words(step, fmt):
        lead = _austenitize({"op": step.get("op"), "austenitize_c": step.get("austenitize_c")}, fmt)
        bath = _param(step, "bath_c", fmt)
        text = f"{lead}, {verb} in a {bath} bath" if bath else f"{lead}, {verb}"
        h = _param(step, "hours", fmt)
        return text + (f" {h}" if h else "")
    return words


def _supply(step, fmt):
    """``bought cold drawn and stress relieved (ASTM A311 class B)``; a designation that holds its
    own parentheses follows a comma (``bought solution treated and aged, H1050 (ASTM A564)``)."""
    cond = step.get("condition")
    words = CONDITIONS.get(str(cond), str(cond).replace("_", " "))
    des = step.get("designation")
    if not des:
        return f"bought {words}"
    words = words.split(" (")[0]
    return f"bought {words}, {des}" if "(" in des else f"bought {words} ({des})"


#: op -> words of one step (step mapping, formatter) -> str
STEP_WORDS: Mapping[str, Callable[[Mapping, Formatter], str]] = {
    "harden": _harden,
    "temper": lambda s, f: _timed("temper", s, f),
    "normalize": lambda s, f: _timed("normalize", s, f),
    "anneal": lambda s, f: _timed("anneal", s, f),
    "stress_relieve": lambda s, f: _timed("stress relieve", s, f),
    "solution_treat": lambda s, f: _timed("solution treat", s, f),
    "nitride": lambda s, f: _timed("nitride", s, f),
    "carburize": _carburize,
    "induction_harden": _induction,
    "cold_work": _cold_work,
    "age": _age,
    "austemper": _bath("austemper"),
    "martemper": _bath("martemper"),
    "supply": _supply,
}


def _generic(step: Mapping, fmt: Formatter) -> str:
    """An operation with no entry in :data:`STEP_WORDS`: its name and its parameters."""
    bits = [str(step.get("op", "?")).replace("_", " ")]
    for k, v in step.items():
        if k == "op" or v is None:
            continue
        bits.append(str(v) if isinstance(v, str) else _param(step, k, fmt))
    return " ".join(bits)


def describe_step(step: Mapping, fmt: Formatter = si_value) -> str:
    """One step in words (``temper 540 °C 2 h``); ``fmt`` writes the numbers."""
    words = STEP_WORDS.get(step.get("op"), _generic)
    return words(step, fmt)


def describe_route(route: Sequence[Mapping], fmt: Formatter = si_value) -> str:
    """A route (list of step dicts, as ``evaluate`` and ``select`` return it) in words,
    the steps joined by commas.

    Parameters
    ----------
    route : sequence of mappings
        Steps ``{"op": ..., parameter: value}``, values in the SI units of
        :data:`selector.routes.steps.OPS`.
    fmt : callable, optional
        ``fmt(value, si_unit) -> str``; default :func:`si_value` (SI).

    Returns
    -------
    str
        ``"austenitize 845 °C, quench in oil, temper 540 °C 2 h"``.
    """
    if isinstance(route, Mapping):
        route = [route]
    return ", ".join(describe_step(s, fmt) for s in route)


#: ops that harden the whole section (a route holding one and no case op is through-hardened)
THROUGH_HARDENING_OPS = frozenset({"harden", "austemper", "martemper", "age"})
#: ops that make a case
CASE_OPS = frozenset({"carburize", "nitride", "induction_harden"})
#: supply conditions that are through-hardened as bought
THROUGH_HARDENED_SUPPLY = frozenset({"quenched_tempered", "aged"})


def case_words(route: Sequence[Mapping]) -> str | None:
    """What to print instead of a case depth of 0 for ``route``: ``"through-hardened"``
    (hardened across the section, no case), ``"no case"`` (annealed, normalized, cold
    worked, bought as rolled), or None when the route makes a case (its depth is shown)."""
    if isinstance(route, Mapping):
        route = [route]
    ops = {s.get("op") for s in route}
    if ops & CASE_OPS:
        return None
    if ops & THROUGH_HARDENING_OPS or any(s.get("op") == "supply" and s.get("condition") in THROUGH_HARDENED_SUPPLY
                                          for s in route):
        return "through-hardened"
    return "no case"


#: window parameter -> (words, SI unit); others read from their name (``prior_temper_hours``
#: -> "prior temper hours")
PARAMETER_WORDS = {
    "temp_c": ("temperature", "°C"), "hours": ("time", "h"), "temper_temp_c": ("tempering temperature", "°C"),
    "temper_hours": ("tempering time", "h"), "austenitize_c": ("austenitizing temperature", "°C"),
    "case_depth_mm": ("case depth", "mm"), "reduction_pct": ("cold reduction", "%"),
    "age_temp_c": ("ageing temperature", "°C"), "age_hours": ("ageing time", "h"),
    "solution_temp_c": ("solution temperature", "°C"), "bath_c": ("bath temperature", "°C"),
    "surface_carbon_pct": ("surface carbon", "wt%"),
    "stress_relieve_temp_c": ("stress-relief temperature", "°C"),
}

#: name ending -> SI unit (for a parameter not in PARAMETER_WORDS)
_ENDINGS = (("_c", "°C"), ("_mm", "mm"), ("_pct", "%"), ("hours", "h"), ("_hz", "Hz"))


#: route family -> the operation whose bare ``temp_c`` / ``hours`` is its window parameter, in
#: the words of that parameter (a family not listed reads "temperature" / "time")
FAMILY_PROCESS = {"anneal": "annealing", "normalize": "normalizing", "carburize": "carburizing",
                  "nitride": "nitriding", "supply_nitride": "nitriding"}


def parameter_words(name: str, family: str | None = None) -> tuple[str, str]:
    """A process parameter's words and SI unit: ``"temper_temp_c"`` -> ``("tempering
    temperature", "°C")``; ``("hours", "nitride")`` -> ``("nitriding time", "h")``; an unknown
    name reads from itself (``"x_mm"`` -> ``("x", "mm")``)."""
    if name in ("temp_c", "hours") and family in FAMILY_PROCESS:
        words, u = PARAMETER_WORDS[name]
        return f"{FAMILY_PROCESS[family]} {words}", u
    if name in PARAMETER_WORDS:
        return PARAMETER_WORDS[name]
    for ending, u in _ENDINGS:
        if name.endswith(ending):
            stem = name[: -len(ending)] if ending.startswith("_") else name
            return stem.replace("_", " ").strip(), u
    return name.replace("_", " "), ""
