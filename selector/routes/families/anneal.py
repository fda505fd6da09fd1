"""Full anneal and normalize: the softened routes.

* Carbon steels (ferrite–pearlite): austenite grain growth at the soak (Sellars &
  Whiteman 1979), ferrite grain on cooling (Hodgson & Gibbs 1992), pearlite spacing
  from the undercooling, and strength by Gladman, McIvor & Pickering (1972)
  (:mod:`selector.models.ferrite_pearlite`).  A full anneal cools in the furnace
  (0.01 K/s); a normalize in still air at the rate of the real section.
* Alloy and carburizing steels: the same chain gives the *change* from the catalogue's
  annealed baseline (the equations lack Cr, Mo, Ni), i.e. properties = baseline x
  model(route) / model(baseline anneal).
* Everything else (non-ferrous, stainless, nitriding and hypereutectoid steels, and an
  anneal below Ac3): the catalogue's annealed baseline, with a note.
"""
from __future__ import annotations

import numpy as np

from ...models import conversions, critical_temperatures, ferrite_pearlite as fp
from ...models.composition import el
from ..model_inputs import uses
from .base import Batch, RouteFamily

MODELLED = ("carbon_steel", "alloy_steel", "carburizing_steel")
ANCHORED = ("alloy_steel", "carburizing_steel")
STEEL_SCALE = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_martensitic",
               "tool_steel", "maraging_steel", "stainless_ph")

REFERENCES = (
    "C.M. Sellars & J.A. Whiteman, Metal Science 13 (1979) 187 (austenite grain growth)",
    "P.D. Hodgson & R.K. Gibbs, ISIJ Int. 32 (1992) 1329 (ferrite grain size after cooling)",
    "C. Zener, Trans. AIME 167 (1946) 550 (pearlite spacing inversely proportional to undercooling)",
    "T. Gladman, I.D. McIvor & F.B. Pickering, JISI 210 (1972) 916 (ferrite-pearlite strength, Hall-Petch)",
    "catalogue annealed baseline (data/grades.csv) where no process model applies",
)


def _ac3(comp):
    return np.asarray(critical_temperatures.ac3_c(comp), float)


class _Soften(RouteFamily):
    route = ""
    cooling = ""
    main_parameter = "temp_c"
    parameters = ("temp_c", "hours")
    references = REFERENCES
    #: Andrews Ac3 decides whether the ferrite-pearlite chain applies; the chain on the modelled states
    model_inputs = (
        uses("andrews_ac", "C", "Mn", "Si", "Ni", "Cr", "Mo", where="ferrite_pearlite_family")
        + uses("austenite_grain_growth", "temp_c", "hours", where="modelled")
        + uses("hodgson_gibbs_ferrite_grain", "ceq", "cooling_rate_k_s", "austenite_grain_um", where="modelled")
        + uses("gladman_mcivor_pickering", "C", "Mn", "Si", "ferrite_grain_um", "pearlite_spacing_um",
               where="modelled")
        + uses("astm_e140", "uts_mpa", where="modelled")
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        s = steps[0]
        params = {"temp_c": float(s["temp_c"]) if "temp_c" in s
                  else self.window_float(grade, self.route, "temp_c", 870.0),
                  "hours": float(s["hours"]) if "hours" in s else self.window_float(grade, self.route, "hours", 1.0)}
        return params, self.window_warnings(grade, self.route, params)

    def to_steps(self, params):
        return [{"op": self.route, "temp_c": float(params["temp_c"]), "hours": float(params["hours"])}]

    def grid(self, grade):
        t = self.span(grade, self.route, "temp_c", 3, (845.0, 925.0))
        return {"temp_c": t, "hours": np.full(len(t), self.window_float(grade, self.route, "hours", 1.0))}

    def rate(self, batch: Batch) -> np.ndarray:
        if self.cooling == "furnace":
            return np.full(batch.n, fp.FURNACE_COOL_K_S)
        return fp.still_air_cooling_rate_k_s(np.clip(batch.section_mm, 1.0, None))

    def compute(self, batch: Batch):
        n = batch.n
        comp = batch.comp
        fam = batch.attr("family").astype(str)
        temp = np.asarray(batch.params["temp_c"], float)
        hours = np.asarray(batch.params["hours"], float)
        base = {"uts_mpa": batch.attr("base_uts_mpa"), "yield_mpa": batch.attr("base_yield_mpa"),
                "elongation_pct": batch.attr("base_elongation_pct")}
        carbon = el(comp, "C")
        ac3 = _ac3(comp)
        modelled = np.isin(fam, MODELLED) & (carbon <= fp.EUTECTOID_C_PCT) & (temp >= ac3)
        out = {k: v.astype(float).copy() for k, v in base.items()}
        micro = {}
        if modelled.any():
            sub = batch.subset(modelled)
            tm, hm = temp[modelled], hours[modelled]
            r = fp.anneal_properties(sub.comp, tm, hm, self.rate(sub))
            ys, uts = r["yield_mpa"], r["uts_mpa"]
            anch = np.isin(fam[modelled], ANCHORED)
            if anch.any():
                g = sub.grades
                t_ref = np.array([self.window_float(g[i], "anneal", "temp_c", 845.0) for i in sub.gidx])
                h_ref = np.array([self.window_float(g[i], "anneal", "hours", 2.0) for i in sub.gidx])
                ref = fp.anneal_properties(sub.comp, t_ref, h_ref, np.full(sub.n, fp.FURNACE_COOL_K_S))
                ys = np.where(anch, base["yield_mpa"][modelled] * ys / ref["yield_mpa"], ys)
                uts = np.where(anch, base["uts_mpa"][modelled] * uts / ref["uts_mpa"], uts)
            ys = np.minimum(ys, 0.95 * uts)
            out["yield_mpa"][modelled] = ys
            out["uts_mpa"][modelled] = uts
            # strength-ductility trade-off about the catalogue anneal (common practice)
            out["elongation_pct"][modelled] = base["elongation_pct"][modelled] * base["uts_mpa"][modelled] / uts
            for k in ("austenite_grain_um", "ferrite_grain_um", "pearlite_spacing_um"):
                v = np.full(n, np.nan)
                v[modelled] = r[k]
                micro[k] = v
        for k in ("uts_mpa", "yield_mpa", "elongation_pct"):
            out["center_" + k] = out[k]
        steel = np.isin(fam, STEEL_SCALE)
        base_hb = batch.attr("base_hardness_hb")
        # a baseline whose source prints no Brinell value (e.g. Rockwell B only): the steel's
        # hardness from its tensile strength by the ASTM A370 Table 3 conversion, as for modelled rows
        no_hb = ~np.isfinite(base_hb)
        hv_base = np.where(no_hb, conversions.uts_to_hv(np.where(no_hb, out["uts_mpa"], 500.0)),
                           conversions.hb_to_hv(np.nan_to_num(base_hb, nan=150.0)))
        hv = np.where(modelled, conversions.uts_to_hv(np.where(modelled, out["uts_mpa"], 500.0)), hv_base)
        hv = np.where(steel, hv, np.nan)
        out.update(hardness_hv=hv, surface_hardness_hv=hv, center_hardness_hv=hv, case_depth_mm=np.zeros(n), **micro)
        out["notes"] = [
            ("no process model for this grade or route: the catalogue's annealed baseline is given "
             "(data/grades.csv)", ~modelled),
            ("soak below Ac3 (Andrews 1965): not a full anneal / normalize; the catalogue baseline is given",
             np.isin(fam, MODELLED) & (temp < ac3)),
            ("hardness converted from the catalogue tensile strength (ASTM A370 Table 3): the baseline's "
             "source prints no Brinell value", ~modelled & no_hb & steel),
            ("alloy steel: strength scaled from the catalogue anneal by the ferrite-pearlite model "
             "(Gladman, McIvor & Pickering 1972 has no Cr, Mo, Ni terms)", modelled & np.isin(fam, ANCHORED)),
        ]
        out["model_inputs"] = {"modelled": modelled, "ferrite_pearlite_family": np.isin(fam, MODELLED),
                               "ceq": carbon + el(comp, "Mn") / 6.0, "cooling_rate_k_s": self.rate(batch)}
        return out


class Anneal(_Soften):
    name = "anneal"
    label = "full anneal"
    route = "anneal"
    cooling = "furnace"
    patterns = (("anneal",),)
    families = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_austenitic",
                "stainless_martensitic", "aluminium", "copper_alloy", "titanium", "tool_steel", "maraging_steel",
                "stainless_duplex", "nickel_alloy", "stainless_ph")


class Normalize(_Soften):
    name = "normalize"
    label = "normalize"
    route = "normalize"
    cooling = "air"
    patterns = (("normalize",),)
    families = MODELLED


FAMILIES = [Anneal(), Normalize()]
