"""Harden, temper, nitride: the gas-nitrided route.

Accepted sequences: ``harden → temper → nitride`` (the usual route: the core is
quenched and tempered first) and ``nitride`` alone (nitrided in the supplied,
annealed condition).

Chain of models:

1. core: the through-hardening model at the real section
   (:func:`selector.routes.families.quench_temper.through_harden`), tempered by the
   prior temper *and* the nitriding cycle added on the Hollomon–Jaffe parameter
   (equivalent time at the higher of the two temperatures, Hollomon & Jaffe 1945);
   for ``nitride`` alone the core keeps the grade's annealed baseline;
2. case: nitriding hardness depth x = K(T) sqrt(t) to core + 50 HV (DIN 50190-3),
   surface hardness from the nitride formers, erfc profile
   (:mod:`selector.models.nitriding`);
3. tensile properties: the core's at the ASTM A370 location.
"""
from __future__ import annotations

import numpy as np

from ...models import nitriding, tempering, validity
from ...models.composition import el
from .base import Batch, RouteFamily, harden_step, product_grid, temper_steps
from ..model_inputs import uses
from .core import core_profile, no_prior_cycle_params, prior_cycle_params
from .quench_temper import CORE_INPUTS, default_austenitize_c

ROUTE = "nitride"
PRIORS = ("quench_temper", "none")


def equivalent_temper(temper_temp_c, temper_hours, nitride_temp_c, nitride_hours, carbon_pct):
    """Prior temper and nitriding cycle as one temper (Hollomon–Jaffe additivity).

    Both steps are converted to the higher of the two temperatures, T_ref, with
    t_eq = 10^(T_i (C + log t_i) / T_ref - C) (Hollomon & Jaffe 1945; models
    reference §5, derived), and their times added.

    Returns
    -------
    (temp_c, hours) : tuple of ndarray
    """
    c = tempering.hollomon_jaffe_constant(carbon_pct)
    t_ref = np.maximum(temper_temp_c, nitride_temp_c)
    h = (tempering.equivalent_hours(temper_temp_c, temper_hours, t_ref, c)
         + tempering.equivalent_hours(nitride_temp_c, nitride_hours, t_ref, c))
    return t_ref, h


class Nitride(RouteFamily):
    name = "nitride"
    label = "harden + temper + nitride"
    patterns = (("nitride",), ("harden", "temper", "nitride"))
    main_parameter = "hours"
    parameters = ("temp_c", "hours", "prior", "quench", "agitation", "austenitize_c",
                  "temper_temp_c", "temper_hours")
    families = ("nitriding_steel", "alloy_steel")
    #: the core's chain (on prior-hardened states; the nitriding cycle counts as temper) and the case
    model_inputs = (CORE_INPUTS + uses("nitrided_case_depth", "temp_c", "hours")
                    + uses("nitrided_surface_hardness", "Al", "Cr", "Mo", "V")
                    + uses("astm_e140", hardness_hb="base_hardness_hb", where="annealed_core"))
    references = (
        "DIN 50190-3 (nitriding hardness depth, core + 50 HV)",
        "parabolic case growth x = K sqrt(t); K from memory (ASM Handbook Vol. 4, gas nitriding)",
        "J.D. Fast & M.B. Verrijp, JISI 176 (1954) 24 (N diffusion in ferrite, activation energy)",
        "ASM Handbook Vol. 4, gas nitriding (typical surface hardness; fitted relation)",
        "J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223 (tempering; nitriding cycle as temper)",
        "ASTM A255 (hardenability of the core); ASTM E140 / A370 (conversions)",
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        n = next(s for s in steps if s["op"] == "nitride")
        h = next((s for s in steps if s["op"] == "harden"), None)
        t = next((s for s in steps if s["op"] == "temper"), None)
        params = {"temp_c": float(n["temp_c"]), "hours": float(n["hours"])}
        if h is not None:
            params.update(prior="quench_temper", **prior_cycle_params(h, t, grade))
        else:
            params.update(prior="none", **no_prior_cycle_params())
        warns = self.window_warnings(grade, ROUTE, {k: params[k] for k in ("temp_c", "hours", "temper_temp_c")})
        warns += nitriding.nitriding_cautions(params["temp_c"],
                                              params["temper_temp_c"] if h is not None else None)
        return params, warns

    def to_steps(self, params):
        steps = []
        if str(params.get("prior", "none")) == "quench_temper":
            steps += [harden_step(params["quench"], params.get("agitation", "moderate"), params["austenitize_c"]),
                      *temper_steps(params["temper_temp_c"], params["temper_hours"])]
        steps.append({"op": "nitride", "temp_c": float(params["temp_c"]), "hours": float(params["hours"])})
        return steps

    def grid(self, grade):
        hours = self.span(grade, ROUTE, "hours", 5, (10.0, 90.0))
        quench = self.choices(grade, "quench_temper", "quench", ("oil",))[:1]
        temper = self.span(grade, ROUTE, "temper_temp_c", 3, (565.0, 705.0))
        g = product_grid(hours=hours, temper_temp_c=temper)
        n = len(g["hours"])
        g["temp_c"] = np.full(n, float(self.window_value(grade, ROUTE, "temp_c", None, 525.0)))
        g["prior"] = np.array(["quench_temper"] * n, dtype=object)
        g["quench"] = np.array([quench[0]] * n, dtype=object)
        g["agitation"] = np.array(["moderate"] * n, dtype=object)
        g["austenitize_c"] = np.full(n, default_austenitize_c(grade))
        g["temper_hours"] = np.full(n, float(self.window_value(grade, "quench_temper", "temper_hours", None, 2.0)))
        return g

    def compute(self, batch: Batch):
        p = batch.params
        temp = np.asarray(p["temp_c"], float)
        hours = np.asarray(p["hours"], float)
        prior_qt = np.asarray(p["prior"]).astype(str) == "quench_temper"
        comp = batch.comp
        n = batch.n
        t_t = np.asarray(p["temper_temp_c"], float)
        t_h = np.asarray(p["temper_hours"], float)
        tt, th = equivalent_temper(np.where(prior_qt, t_t, temp), np.where(prior_qt, t_h, 1.0),
                                   temp, hours, el(comp, "C"))
        aust = np.where(prior_qt, np.asarray(p["austenitize_c"], float), 850.0)
        res, pos, core_hv = core_profile(batch, prior_qt, p["quench"], p["agitation"], aust, tt, th)

        section = batch.section_mm
        depth = (1.0 - pos)[None, :] * section[:, None] / 2.0
        comp2 = {k: np.asarray(v, float)[:, None] for k, v in comp.items()}
        prof = nitriding.hardness_profile_hv(depth, temp[:, None], hours[:, None], comp2, core_hv)
        res["profile_hv"] = prof
        res["profile_positions"] = pos
        res["surface_hardness_hv"] = prof[:, 0]
        res["model_inputs"].update(annealed_core=~prior_qt, base_hardness_hb=batch.attr("base_hardness_hb"))
        res["case_depth_mm"] = np.minimum(nitriding.nitrided_case_depth_mm(temp, hours), section / 2.0)
        res.pop("profile_as_quenched_hv", None)

        notes = [("tensile properties are those of the core at the ASTM A370 location; the nitrided case "
                  "is not included", np.ones(n, bool))]
        notes.append(("nitrided without a prior harden and temper: the soft annealed core gives the case "
                      "little support (common practice: harden and temper first)", ~prior_qt))
        notes.append(("prior temper less than 30 °C above the nitriding temperature: the core softens during "
                      "nitriding (common practice)", prior_qt & (t_t < temp + nitriding.TEMPER_MARGIN_C)))
        # the gas-nitriding range and the case models' ranges: model_inputs, checked by finish()
        notes.append(("the compound (white) layer, 0–20 µm, is not modelled; it is brittle and is often "
                      "removed or limited on fatigue-loaded parts (common practice)", np.ones(n, bool)))
        qw = res.pop("quench_warnings", [])
        if n == 1:
            notes += [(w, np.ones(1, bool)) for w in qw]
        res["notes"] = notes
        return res


FAMILIES = [Nitride()]
