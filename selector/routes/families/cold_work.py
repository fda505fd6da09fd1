"""Cold work (drawing, rolling) of annealed stock: the strain-hardened route.

Accepted sequences: ``cold_work`` (from the supplied annealed condition) and
``anneal → cold_work`` (annealed first: the same annealed baseline).  The reduction
is given as ``reduction_pct`` (area reduction) or as a temper ``designation`` that
the standards define (copper alloys H01…H10, aluminium H32…H38, austenitic stainless
1/4…full hard; ``data/temper_aliases.csv``).

Model: Hollomon strain hardening from the grade's annealed constants
(:func:`selector.models.strain_hardening.cold_worked_properties`,
``data/hollomon_constants.csv``), starting from the catalogue's annealed yield and
elongation.  Properties are those along the working direction.
"""
from __future__ import annotations

import numpy as np

from ...errors import InputError, RouteError
from ...models import conversions, strain_hardening as sh, validity
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


class ColdWork(RouteFamily):
    name = "cold_work"
    label = "cold work"
    patterns = (("cold_work",), ("anneal", "cold_work"))
    main_parameter = "reduction_pct"
    parameters = ("reduction_pct", "designation", "prior_anneal")
    families = ("carbon_steel", "stainless_austenitic", "aluminium", "copper_alloy")
    references = (
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
        warns += validity.check("strain_hardening", reduction_pct=params["reduction_pct"])
        return params, warns

    def to_steps(self, params):
        steps = [{"op": "anneal"}] if str(params.get("prior_anneal", "none")) == "anneal" else []
        step = {"op": ROUTE, "reduction_pct": round(float(params["reduction_pct"]), 4)}
        if params.get("designation"):
            step["designation"] = str(params["designation"])
        return steps + [step]

    def grid(self, grade):
        r = self.span(grade, ROUTE, "reduction_pct", 7, (0.0, 40.0))
        # 0 % is the annealed stock, which the anneal route already covers; a cold-worked
        # condition starts at the first grid step (values rounded to 0.5 %)
        r = np.unique(np.round(r[r > 0] * 2.0) / 2.0)
        if r.size == 0:
            r = np.array([self.span(grade, ROUTE, "reduction_pct", 2, (0.0, 40.0)).max()])
        n = len(r)
        return {"reduction_pct": r, "designation": np.array([""] * n, dtype=object),
                "prior_anneal": np.array(["none"] * n, dtype=object)}

    def compute(self, batch: Batch):
        n = batch.n
        red = np.asarray(batch.params["reduction_pct"], float)
        consts = [sh.hollomon_constants(g.id, g.family, g.base_uts_mpa) for g in batch.grades]
        pick = lambda key: np.array([c[key] for c in consts], float)[batch.gidx]  # noqa: E731
        res = sh.cold_worked_properties(red, pick("k_mpa"), pick("n"), batch.attr("base_yield_mpa"),
                                        batch.attr("base_elongation_pct"), pick("post_uniform_pct"),
                                        pick("yield_ratio"))
        fam = batch.attr("family").astype(str)
        steel = np.isin(fam, STEEL_SCALE)
        hv = np.where(steel, conversions.uts_to_hv(np.where(steel, res["uts_mpa"], 500.0)), np.nan)
        out = {"uts_mpa": res["uts_mpa"], "yield_mpa": res["yield_mpa"], "elongation_pct": res["elongation_pct"],
               "center_uts_mpa": res["uts_mpa"], "center_yield_mpa": res["yield_mpa"],
               "center_elongation_pct": res["elongation_pct"],
               "hardness_hv": hv, "surface_hardness_hv": hv, "center_hardness_hv": hv,
               "case_depth_mm": np.zeros(n), "true_strain": res["true_strain"]}
        notes = [
            ("reduction beyond the fitted range of the Hollomon law (80 %): strength extrapolated "
             "(validity strain_hardening)", validity.out_of_range_mask("strain_hardening", reduction_pct=red)),
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
        out["notes"] = notes
        return out


FAMILIES = [ColdWork()]
