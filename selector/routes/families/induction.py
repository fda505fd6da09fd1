"""Induction hardening: a hard surface layer of given depth on a core left as it was.

Accepted sequences: ``harden → temper → induction_harden [→ temper]`` (core
quenched and tempered first), ``normalize → induction_harden [→ temper]`` and
``induction_harden [→ temper]`` (core in the supplied condition).

Chain of models:

1. core: for a prior harden and temper, the through-hardening model at the real
   section (:func:`selector.routes.families.quench_temper.through_harden`); the low
   temper after induction hardening is below the prior temper and leaves the core
   unchanged.  For a normalized or supplied core, the grade's annealed baseline is
   used (conservative for a normalized core: no normalizing model yet);
2. case: the user's hardened depth; surface hardness from carbon (99.9 % martensite,
   ASTM A255 initial hardness, low temper by Hollomon–Jaffe,
   :mod:`selector.models.induction`); the profile is a step at the hardened depth;
3. frequency: if given, checked against the practice table; the reference depth
   delta = 503 sqrt(rho / (mu_r f)) is reported;
4. tensile properties: the core's at the ASTM A370 location.
"""
from __future__ import annotations

import numpy as np

from ...models import conversions, induction
from ...models.composition import el
from . import anneal
from .base import Batch, RouteFamily, harden_step, product_grid, temper_steps
from ..model_inputs import uses
from .core import core_profile, no_prior_cycle_params, prior_cycle_params
from .quench_temper import CORE_INPUTS, default_austenitize_c

ROUTE = "induction"
PRIORS = ("quench_temper", "normalize", "none")
#: lowest prior temper spanned by the grid, °C (common practice for induction-hardened Q&T cores)
PRIOR_TEMPER_MIN_C = 450.0


#: the normalize family's chain on the states whose prior condition is a normalize (their core)
NORMALIZED_CORE_INPUTS = (
    uses("andrews_ac", "C", "Mn", "Si", "Ni", "Cr", "Mo", where="norm_family")
    + uses("austenite_grain_growth", temp_c="norm_temp_c", hours="norm_hours", where="norm_modelled")
    + uses("hodgson_gibbs_ferrite_grain", ceq="norm_ceq", cooling_rate_k_s="norm_cooling_rate_k_s",
           austenite_grain_um="norm_austenite_grain_um", where="norm_modelled")
    + uses("gladman_mcivor_pickering", "C", "Mn", "Si", ferrite_grain_um="norm_ferrite_grain_um",
           pearlite_spacing_um="norm_pearlite_spacing_um", where="norm_modelled")
    + uses("astm_e140", uts_mpa="norm_uts_mpa", where="norm_modelled")
)


def _normalized_core_inputs(nres: dict, sub: Batch, idx: np.ndarray, n: int) -> dict:
    """The normalize family's model inputs of the sub-batch ``sub`` (rows ``idx`` of ``n``),
    spread over the whole batch under ``norm_*`` names (masks False elsewhere)."""
    def full(values, fill):
        out = np.full(n, fill, dtype=bool if isinstance(fill, bool) else float)
        out[idx] = values
        return out
    mi = nres["model_inputs"]
    out = {"norm_family": full(mi["ferrite_pearlite_family"], False), "norm_modelled": full(mi["modelled"], False),
           "norm_temp_c": full(sub.params["temp_c"], np.nan), "norm_hours": full(sub.params["hours"], np.nan),
           "norm_ceq": full(mi["ceq"], np.nan), "norm_cooling_rate_k_s": full(mi["cooling_rate_k_s"], np.nan),
           "norm_uts_mpa": full(nres["uts_mpa"], np.nan)}
    for k in ("austenite_grain_um", "ferrite_grain_um", "pearlite_spacing_um"):
        out["norm_" + k] = full(nres[k], np.nan) if k in nres else np.full(n, np.nan)
    return out


class Induction(RouteFamily):
    name = "induction"
    label = "induction harden + temper"
    patterns = (("induction_harden",), ("induction_harden", "temper"),
                ("normalize", "induction_harden"), ("normalize", "induction_harden", "temper"),
                ("harden", "temper", "induction_harden"),
                ("harden", "temper", "induction_harden", "temper"))
    main_parameter = "case_depth_mm"
    parameters = ("case_depth_mm", "frequency_hz", "quench", "temper_temp_c", "temper_hours", "prior",
                  "prior_quench", "prior_agitation", "prior_austenitize_c", "prior_temper_temp_c",
                  "prior_temper_hours")
    families = ("carbon_steel", "alloy_steel")
    #: the prior harden-and-temper core (where the prior is quench_temper) and the hardened layer
    model_inputs = (CORE_INPUTS + NORMALIZED_CORE_INPUTS
                    + uses("induction_surface_hardness", "temper_temp_c", c_pct="C")
                    + uses("induction_frequency_table", hardened_depth_mm="case_depth_mm")
                    + uses("astm_e140", hardness_hrc="surface_hrc")
                    + uses("astm_e140", hardness_hb="base_hardness_hb", where="annealed_core"))
    references = (
        "electromagnetic reference depth delta = 503 sqrt(rho/(mu_r f)) (V. Rudnev et al., ASM Handbook "
        "Vol. 4C (2014), principles of induction hardening)",
        "ASM Handbook Vol. 4 and S.L. Semiatin & D.E. Stutz, Induction Heat Treatment of Steel, ASM (1986) "
        "(frequency for hardened depth; from memory)",
        "ASTM A255 (martensite hardness; hardenability of the core)",
        "J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223 (tempering)",
        "ASTM E140-12b Table 1 and ASTM A370 Table 3 (hardness conversions, tensile strength)",
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        ops = [s["op"] for s in steps]
        i = ops.index("induction_harden")
        ih = steps[i]
        after = steps[i + 1] if i + 1 < len(steps) else None
        params = {"case_depth_mm": float(ih["case_depth_mm"]),
                  "frequency_hz": float(ih.get("frequency_hz", float("nan"))),
                  "quench": str(self.window_value(grade, ROUTE, "quench", ih.get("quench"), "water")),
                  "temper_temp_c": float(after["temp_c"]) if after else float("nan"),
                  "temper_hours": float(after.get("hours", 1.0)) if after else float("nan")}
        if "harden" in ops:
            params.update(prior="quench_temper", **prior_cycle_params(steps[ops.index("harden")],
                                                                      steps[ops.index("temper")], grade, "prior_"))
        else:
            params.update(prior="normalize" if "normalize" in ops else "none", **no_prior_cycle_params("prior_"))
        warns = self.window_warnings(grade, ROUTE, {k: params[k] for k in ("case_depth_mm", "temper_temp_c",
                                                                            "quench")})
        return params, warns

    def to_steps(self, params):
        steps = []
        prior = str(params.get("prior", "none"))
        if prior == "quench_temper":
            steps += [harden_step(params["prior_quench"], params.get("prior_agitation", "moderate"),
                                  params["prior_austenitize_c"]),
                      *temper_steps(params["prior_temper_temp_c"], params["prior_temper_hours"])]
        elif prior == "normalize":
            steps.append({"op": "normalize"})
        ih = {"op": "induction_harden", "case_depth_mm": float(params["case_depth_mm"])}
        if np.isfinite(float(params.get("frequency_hz", float("nan")))):
            ih["frequency_hz"] = float(params["frequency_hz"])
        ih["quench"] = str(params["quench"])
        steps.append(ih)
        return steps + temper_steps(params["temper_temp_c"], params["temper_hours"])

    def grid(self, grade):
        depth = np.unique(np.round(self.span(grade, ROUTE, "case_depth_mm", 5, (0.5, 6.0)) * 2.0) / 2.0)
        # a core for induction hardening is tempered well above the 150–230 °C temper that
        # follows (common practice: quench and temper to 450–650 °C first)
        w = grade.window("quench_temper", "temper_temp_c")
        hi = w.max if w is not None and w.max == w.max else 650.0
        wlo = w.min if w is not None and w.min == w.min else PRIOR_TEMPER_MIN_C
        lo = max(PRIOR_TEMPER_MIN_C, wlo) if hi >= PRIOR_TEMPER_MIN_C else wlo
        prior_t = np.unique(np.round(np.linspace(lo, max(lo, hi), 3) / 5.0) * 5.0)
        g = product_grid(case_depth_mm=depth, prior_temper_temp_c=prior_t)
        n = len(g["case_depth_mm"])
        g["frequency_hz"] = np.full(n, np.nan)
        g["quench"] = np.array([self.window_value(grade, ROUTE, "quench", None, "water")] * n, dtype=object)
        g["temper_temp_c"] = np.full(n, float(self.window_value(grade, ROUTE, "temper_temp_c", None, 180.0)))
        g["temper_hours"] = np.full(n, 1.0)
        g["prior"] = np.array(["quench_temper"] * n, dtype=object)
        g["prior_quench"] = np.array([self.choices(grade, "quench_temper", "quench", ("oil",))[0]] * n,
                                     dtype=object)
        g["prior_agitation"] = np.array(["moderate"] * n, dtype=object)
        g["prior_austenitize_c"] = np.full(n, default_austenitize_c(grade))
        g["prior_temper_hours"] = np.full(n, 2.0)
        return g

    def compute(self, batch: Batch):
        p = batch.params
        n = batch.n
        comp = batch.comp
        depth_case = np.asarray(p["case_depth_mm"], float)
        freq = np.asarray(p["frequency_hz"], float)
        t_t = np.asarray(p["temper_temp_c"], float)
        t_h = np.asarray(p["temper_hours"], float)
        tempered = np.isfinite(t_t)
        prior_qt = np.asarray(p["prior"]).astype(str) == "quench_temper"
        pt_t = np.asarray(p["prior_temper_temp_c"], float)
        res, pos, core_hv = core_profile(
            batch, prior_qt, p["prior_quench"], p["prior_agitation"],
            np.where(prior_qt, np.asarray(p["prior_austenitize_c"], float), 850.0),
            np.where(prior_qt, pt_t, 600.0), np.where(prior_qt, np.asarray(p["prior_temper_hours"], float), 2.0))

        prior_norm = np.asarray(p["prior"]).astype(str) == "normalize"
        if prior_norm.any():
            # the core keeps the normalized condition: the normalize family's model at the section
            norm = next(f for f in anneal.FAMILIES if f.name == "normalize")
            idx = np.flatnonzero(prior_norm)
            sub = batch.subset(prior_norm)
            sub = Batch(sub.grades, sub.gidx, sub.comp,
                        {"temp_c": np.array([self.window_float(sub.grades[i], "normalize", "temp_c", 870.0)
                                             for i in sub.gidx]),
                         "hours": np.array([self.window_float(sub.grades[i], "normalize", "hours", 1.0)
                                            for i in sub.gidx])},
                        sub.diameter_mm, sub.thickness_mm)
            nres = norm.compute(sub)
            for k in ("uts_mpa", "yield_mpa", "elongation_pct"):
                res[k] = np.asarray(res[k], float).copy()
                res[k][idx] = nres[k]
                ck = "center_" + k
                res[ck] = np.asarray(res[ck], float).copy()
                res[ck][idx] = nres.get(ck, nres[k])
            for k in ("hardness_hv", "center_hardness_hv"):
                res[k] = np.asarray(res[k], float).copy()
                res[k][idx] = nres["hardness_hv"]
            core_hv = core_hv.copy()
            core_hv[idx, :] = np.asarray(nres["hardness_hv"], float)[:, None]
            res["model_inputs"].update(_normalized_core_inputs(nres, sub, idx, n))
        else:
            res["model_inputs"].update(norm_family=np.zeros(n, bool), norm_modelled=np.zeros(n, bool))

        c = el(comp, "C")
        hrc_q = induction.surface_hardness_hrc(c)
        hrc_t = induction.surface_hardness_hrc(c, np.where(tempered, t_t, 150.0), np.where(tempered, t_h, 1.0),
                                               comp)
        surf_hrc = np.where(tempered, hrc_t, hrc_q)
        surf_hv = conversions.hrc_to_hv(surf_hrc)
        res["model_inputs"].update(surface_hrc=surf_hrc, annealed_core=~prior_qt & ~prior_norm,
                                   base_hardness_hb=batch.attr("base_hardness_hb"))
        section = batch.section_mm
        depth = (1.0 - pos)[None, :] * section[:, None] / 2.0
        in_case = depth <= depth_case[:, None] + 1e-9
        prof = np.where(in_case, np.maximum(surf_hv[:, None], core_hv), core_hv)
        res["profile_hv"] = prof
        res["profile_positions"] = pos
        res["surface_hardness_hv"] = np.maximum(surf_hv, core_hv[:, 0])
        res["case_depth_mm"] = np.minimum(depth_case, section / 2.0)
        f_ok = np.isfinite(freq)
        res["reference_depth_hot_mm"] = np.where(f_ok, induction.reference_depth_mm(np.where(f_ok, freq, 1e4)),
                                                 np.nan)
        res.pop("profile_as_quenched_hv", None)

        lo, hi = induction.suggested_frequency_range_hz(np.clip(depth_case, 0.4, 10.0),
                                                        np.where(np.isfinite(section), section, 1e3))
        notes = [("tensile properties are those of the core at the ASTM A370 location; the hardened layer "
                  "is not included", np.ones(n, bool))]
        notes.append(("the hardened depth is the user's: it depends on frequency, power density and heating "
                      "time together, so the model does not predict it (Rudnev et al., ASM Handbook Vol. 4C)",
                      np.ones(n, bool)))
        notes.append(("frequency outside the range usually chosen for this hardened depth (ASM Handbook "
                      "Vol. 4; Semiatin & Stutz 1986; from memory)", f_ok & ((freq < lo) | (freq > hi))))
        # hardened depth outside the frequency practice table: model_inputs, checked by finish()
        notes.append(("hardened depth over a quarter of the section: close to through-hardening; residual "
                      "stresses and cracking risk differ from a surface layer (common practice)",
                      depth_case > section / 4.0))
        notes.append(("prior temper below the temper after induction hardening: the core is tempered again; "
                      "the model keeps the prior core", prior_qt & tempered & (pt_t < t_t)))
        notes.append(("untempered induction-hardened surface: brittle; temper at 150–230 °C (common practice)",
                      ~tempered))
        notes.append(("carbon below 0.30 %: the surface hardness reached by induction hardening is low "
                      "(common practice: 0.35–0.55 %C grades)", c < 0.30))
        qw = res.pop("quench_warnings", [])
        if n == 1:
            notes += [(w, np.ones(1, bool)) for w in qw]
        res["notes"] = notes
        return res


FAMILIES = [Induction()]
