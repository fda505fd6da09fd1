"""Cold work (drawing, rolling) of annealed stock: the strain-hardened route.

Accepted sequences: ``cold_work`` (from the supplied annealed condition) and
``anneal → cold_work`` (annealed first: the same annealed baseline).  The reduction
is given as ``reduction_pct`` (area reduction) or as a temper ``designation`` that
the standards define (copper alloys H01…H10, aluminium H32…H38, austenitic stainless
1/4…full hard; ``data/temper_aliases.csv``).

``→ stress_relieve`` may follow the cold work (``{"op": "stress_relieve", "temp_c": 400,
"hours": 1}``): the recovery of ductility with the small gain (low temperature) or the loss
(above about 480 °C) of yield of :mod:`selector.models.stress_relief` (ASM Handbook
cold-finished bar practice, from memory; Hollomon-Jaffe time-temperature parameter).

Model: Hollomon strain hardening from the grade's annealed constants
(:func:`selector.models.strain_hardening.cold_worked_properties`,
``data/hollomon_constants.csv``), starting from the catalogue's annealed yield and
elongation.  Properties are those along the working direction.
"""
from __future__ import annotations

import numpy as np

from ...errors import InputError, NotModelledError, RouteError
from ...models import conversions, strain_hardening as sh, stress_relief, validity
from ..model_inputs import uses
from .base import Batch, RouteFamily

ROUTE = "cold_work"
STEEL_SCALE = ("carbon_steel",)


def _reduction_from_step(step, grade) -> tuple[float, str]:
    red = step.get("reduction_pct")
    des = step.get("designation")
    if des is not None:
        if not sh.temper_designations(grade.family):
            raise RouteError("designation", des, f"reduction_pct only: {grade.family} has no cold-work temper "
                             "designations in data/temper_aliases.csv", "cold_work")
        try:
            r_des = sh.temper_reduction_pct(des, grade.family)
        except InputError as exc:
            raise RouteError("designation", des, exc.allowed, "cold_work") from None
        if red is not None and abs(float(red) - r_des) > 0.5:
            raise RouteError("reduction_pct", red, f"{r_des:g} % (the reduction of {des}) or leave it out",
                             "cold_work")
        return r_des, str(des)
    return (float(red) if red is not None else None), ""



def stress_relief_steps(params) -> list:
    """``[{"op": "stress_relieve", "temp_c", "hours"}]`` when ``params`` carry a stress
    relief (``stress_relieve_temp_c`` not NaN), else ``[]``; shared by every family that
    admits the step after cold work (cold_work, supply)."""
    t = params.get("stress_relieve_temp_c", float("nan"))
    if t is None or t != t:
        return []
    return [{"op": "stress_relieve", "temp_c": float(t), "hours": float(params.get("stress_relieve_hours", 1.0))}]


class ColdWork(RouteFamily):
    name = "cold_work"
    label = "cold work"
    patterns = (("cold_work",), ("anneal", "cold_work"), ("cold_work", "stress_relieve"),
                ("anneal", "cold_work", "stress_relieve"))
    main_parameter = "reduction_pct"
    parameters = ("reduction_pct", "designation", "prior_anneal", "stress_relieve_temp_c", "stress_relieve_hours")
    families = ("carbon_steel", "stainless_austenitic", "aluminium", "copper_alloy")
    model_inputs = (uses("strain_hardening", "reduction_pct", "true_strain")
                    + uses("stress_relief", temp_c="stress_relieve_temp_c", hours="stress_relieve_hours"))
    references = (
        stress_relief.REFERENCE,
        "J.H. Hollomon, Trans. AIME 162 (1945) 268 (power-law strain hardening)",
        "G.E. Dieter, Mechanical Metallurgy (Considère necking; properties after prestrain)",
        "Kalpakjian & Schmid and Callister tables of K and n; fits to ASTM B36 (C26000) and AA 5052 tempers",
        "ASTM B601 / B36 (copper-alloy tempers), ANSI H35.1 (aluminium H tempers), ASTM A666 (stainless tempers)",
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        cw = next(s for s in steps if s["op"] == ROUTE)
        red, des = _reduction_from_step(cw, grade)
        if red is None:
            red = float(self.window_value(grade, ROUTE, "reduction_pct", None, 20.0))
        params = {"reduction_pct": float(red), "designation": des,
                  "prior_anneal": "anneal" if steps[0]["op"] == "anneal" else "none"}
        warns = self.window_warnings(grade, ROUTE, {"reduction_pct": params["reduction_pct"]})
        sr = next((s for s in steps if s["op"] == "stress_relieve"), None)
        params["stress_relieve_temp_c"] = float(sr["temp_c"]) if sr else float("nan")
        params["stress_relieve_hours"] = float(sr.get("hours", 1.0)) if sr else float("nan")
        if sr:
            if grade.family not in STEEL_SCALE:
                raise NotModelledError(f"stress relieving after cold work is modelled for carbon steels only "
                                       f"(ASM Handbook cold-finished bar practice); {grade.id} is {grade.family}")
            warns += self.window_warnings(grade, ROUTE, {"stress_relieve_temp_c": params["stress_relieve_temp_c"]})
        return params, warns

    def to_steps(self, params):
        steps = [{"op": "anneal"}] if str(params.get("prior_anneal", "none")) == "anneal" else []
        step = {"op": ROUTE, "reduction_pct": round(float(params["reduction_pct"]), 4)}
        if params.get("designation"):
            step["designation"] = str(params["designation"])
        return steps + [step] + stress_relief_steps(params)

    def grid(self, grade):
        r = self.span(grade, ROUTE, "reduction_pct", 7, (0.0, 40.0))
        # 0 % is the annealed stock, which the anneal route already covers; a cold-worked
        # condition starts at the first grid step (values rounded to 0.5 %)
        r = np.unique(np.round(r[r > 0] * 2.0) / 2.0)
        if r.size == 0:
            r = np.array([self.span(grade, ROUTE, "reduction_pct", 2, (0.0, 40.0)).max()])
        n = len(r)
        return {"reduction_pct": r, "designation": np.array([""] * n, dtype=object),
                "prior_anneal": np.array(["none"] * n, dtype=object),
                "stress_relieve_temp_c": np.full(n, np.nan), "stress_relieve_hours": np.full(n, np.nan)}

    def compute(self, batch: Batch):
        n = batch.n
        red = np.asarray(batch.params["reduction_pct"], float)
        consts = [sh.hollomon_constants(g.id, g.family, g.base_uts_mpa) for g in batch.grades]
        pick = lambda key: np.array([c[key] for c in consts], float)[batch.gidx]  # noqa: E731
        res = sh.cold_worked_properties(red, pick("k_mpa"), pick("n"), batch.attr("base_yield_mpa"),
                                        batch.attr("base_elongation_pct"), pick("post_uniform_pct"),
                                        pick("yield_ratio"))
        sr_t = np.asarray(batch.params.get("stress_relieve_temp_c", np.full(n, np.nan)), float)
        sr_h = np.asarray(batch.params.get("stress_relieve_hours", np.full(n, np.nan)), float)
        relieved = np.isfinite(sr_t)
        if relieved.any():
            r = stress_relief.stress_relieved_properties(
                np.where(relieved, sr_t, 400.0), np.where(relieved, sr_h, 1.0), res["uts_mpa"], res["yield_mpa"],
                res["elongation_pct"], batch.attr("base_uts_mpa"), batch.attr("base_yield_mpa"),
                batch.attr("base_elongation_pct"))
            res = dict(res)
            for k in ("uts_mpa", "yield_mpa", "elongation_pct"):
                res[k] = np.where(relieved, r[k], res[k])
        fam = batch.attr("family").astype(str)
        steel = np.isin(fam, STEEL_SCALE)
        hv = np.where(steel, conversions.uts_to_hv(np.where(steel, res["uts_mpa"], 500.0)), np.nan)
        out = {"uts_mpa": res["uts_mpa"], "yield_mpa": res["yield_mpa"], "elongation_pct": res["elongation_pct"],
               "center_uts_mpa": res["uts_mpa"], "center_yield_mpa": res["yield_mpa"],
               "center_elongation_pct": res["elongation_pct"],
               "hardness_hv": hv, "surface_hardness_hv": hv, "center_hardness_hv": hv,
               "case_depth_mm": np.zeros(n), "true_strain": res["true_strain"]}
        notes = [
            ("heavy cold reduction: intermediate anneals are needed and ductility is low (common practice)",
             red > 60.0),
            ("cold-worked properties are along the working direction; transverse ductility is lower "
             "(common practice)", red > 0.0),
            ("cold-worked austenitic stainless forms strain-induced martensite and becomes partly magnetic "
             "(common practice)", (fam == "stainless_austenitic") & (red > 10.0)),
            ("no grade-specific Hollomon constants: family exponent with K from the annealed strength "
             "(Considère fallback, data/hollomon_constants.csv)",
             np.array([c["key"].endswith("_family") for c in consts], bool)[batch.gidx]),
        ]
        notes.append(("stress relieved after cold work: ASM Handbook cold-finished bar practice (from memory) on "
                      "the Hollomon-Jaffe time-temperature parameter", relieved))
        out["notes"] = notes
        return out


FAMILIES = [ColdWork()]
