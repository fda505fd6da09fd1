"""``selector.evaluate``: one grade and route at one section, with the cautions that apply.

:func:`selector.routes.evaluate.evaluate` computes the properties; this layer adds the
rules of :mod:`selector.rules.cautions` to the same result (key ``cautions``), so that a
designer who checks one candidate, from the API or ``selector evaluate``, sees the same
cautions as in a selection table — a water quench of 4140 reads "Quench-cracking risk"
whether it came from ``select`` or from ``evaluate``.

With a heat analysis the rules read the heat's own carbon: the quench-cracking rules compare
the certified C (not the grade's nominal or specification maximum) with the cracking limit.

Results are estimates for preliminary selection.  The final choice needs certified
material test reports, the applicable design code and review by a qualified engineer.
"""
from __future__ import annotations

import pandas as pd

from ..catalogue.grades import Grade, default_catalogue
from ..routes.evaluate import evaluate as _evaluate_properties
from ..rules import cautions as caution_rules

#: result keys the caution rules read (besides grade, family, route family and the route's params)
_RESULT_KEYS = ("hardness_hrc", "surface_hardness_hrc", "uts_mpa", "center_martensite_pct", "case_depth_mm",
                "peak_ratio")


def caution_frame(result: dict, c_pct: float | None, c_max_pct: float | None = None) -> pd.DataFrame:
    """The one-row table the caution rules read, from a result of the property evaluation.

    ``c_pct``: the carbon of the evaluated composition, wt %; ``c_max_pct``: the highest carbon
    the part can have, wt % (the heat's own C when a heat analysis is given, else the grade's
    specification maximum; None: the rules look the grade up in the built-in catalogue)."""
    row = {"grade": result["grade"], "family": result["family"], "route_family": result["route_family"]}
    row.update({k: v for k, v in result.get("params", {}).items() if v is not None})
    row.update({k: result.get(k) for k in _RESULT_KEYS})
    row["c_pct"] = c_pct
    if c_max_pct is not None:
        row["c_max_pct"] = c_max_pct
    return pd.DataFrame([row])


def evaluate(grade, route, diameter_mm: float | None = 25.0, thickness_mm: float | None = None,
             composition: str = "nominal", heat_composition=None, *, finish: str = "machined",
             load_type: str = "bending", reliability: float = 0.5, service_temp_c: float | None = None,
             plated: bool = False, plating: str | None = None, mating_material: str | None = None,
             environment: str = "normal", impact: bool = False) -> dict:
    """Properties that ``route`` gives ``grade`` at a real section, and the cautions that apply.

    Parameters and returned keys: those of :func:`selector.routes.evaluate.evaluate`, and

    plated, plating, mating_material, environment, impact
        The service context of the caution rules (:func:`selector.rules.cautions.cautions_for`):
        electroplating (hydrogen embrittlement), the plating metal, the material the part touches
        (galvanic couple), ``harsh`` / ``normal`` / ``controlled`` environment, impact loading.

    Returns
    -------
    dict
        The property result, plus ``cautions``: a list of ``{"code", "title", "reason",
        "severity"}`` in the order of ``data/cautions.csv`` (empty when none applies).  The
        centre-martensite rule (``shallow_hardening``) is read as under a strength target,
        since the result reports strengths.  With ``heat_composition`` the quench-cracking
        rules read the heat's C.

    Raises
    ------
    UnknownGradeError, RouteError, InputError, NotModelledError

    Example
    -------
    >>> r = evaluate("4140", [{"op": "harden", "quench": "water"}, {"op": "temper", "temp_c": 540}])
    >>> [c["code"] for c in r["cautions"]]        # 0.40 % C alloy steel in water   # doctest: +SKIP
    ['quench_cracking', ...]
    """
    # the context is checked before the properties are computed: bad input fails before any work
    caution_rules.check_context(dict(plated=plated, mating_material=mating_material, service_temp_c=service_temp_c,
                                     environment=environment, plating=plating, impact=impact), "context")
    out = _evaluate_properties(grade, route, diameter_mm=diameter_mm, thickness_mm=thickness_mm,
                               composition=composition, heat_composition=heat_composition, finish=finish,
                               load_type=load_type, reliability=reliability, service_temp_c=service_temp_c)
    g = grade if isinstance(grade, Grade) else default_catalogue().lookup(grade)
    if heat_composition is not None:
        c_pct = c_max = out["heat_composition"].get("C")      # the certified heat's own carbon
    else:
        c_pct, c_max = g.composition(composition).get("C"), g.comp_max.get("C")
    frame = caution_frame(out, c_pct, c_max)
    out["cautions"] = caution_rules.cautions_for(
        frame, plated=plated, mating_material=mating_material, service_temp_c=service_temp_c,
        environment=environment, plating=plating, strength_target=True, impact=impact)[0]
    return out
