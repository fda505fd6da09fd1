"""Carburize, harden, temper: the carburized (case-hardened) route of carburizing steels.

Accepted sequences: ``carburize`` (direct quench, untempered), ``carburize → temper``
(direct quench from the carburizing temperature, then temper), ``carburize →
harden`` and ``carburize → harden → temper`` (slow cool, reheat and quench).

Chain of models:

1. core: the through-hardening model of the core composition at the real section
   (:func:`selector.routes.families.quench_temper.through_harden`: Grossmann H,
   conduction cooling, ASTM A255 Jominy curve, Hollomon–Jaffe tempering), quenched
   from the carburizing temperature (direct) or the reheat temperature;
2. case: carbon profile (Tibbetts 1980 D, Crank erf solution), local martensite
   hardness, low temper, Koistinen–Marburger retained austenite
   (:mod:`selector.models.carburizing`), riding on the local core hardness;
3. effective case depth to 50 HRC (SAE J423 / ISO 2639);
4. tensile properties: those of the core at the ASTM A370 location (the case is not
   included).
"""
from __future__ import annotations

import numpy as np

from ...errors import RouteError
from ...models import carburizing, conversions, validity
from ...models.composition import el
from .base import Batch, RouteFamily, at_position, product_grid
from .quench_temper import default_austenitize_c, through_harden

ROUTE = "carburize"
#: lowest HRC the ASTM E140 Rockwell C scale gives (soft cores are floored here in the
#: case calculation only; the reported core keeps its HV)
HRC_FLOOR = 20.0
#: extra r/R positions near the surface so the profile resolves the case
CASE_POSITIONS = (0.995, 0.99, 0.98, 0.97, 0.96, 0.95, 0.94, 0.92, 0.90)
HARDENING = ("direct", "reheat")


def _hrc(hv):
    return conversions.hv_to_hrc(np.maximum(np.asarray(hv, float), conversions.hrc_to_hv(HRC_FLOOR)))


def merged_positions(core_positions) -> np.ndarray:
    """Core profile positions plus :data:`CASE_POSITIONS`, decreasing from 1 to 0."""
    pos = np.unique(np.concatenate([np.asarray(core_positions, float), CASE_POSITIONS]))
    return pos[::-1]


def resample(profile, positions, new_positions) -> np.ndarray:
    """Profile (n, len(positions)) interpolated at ``new_positions`` (r/R)."""
    n = np.asarray(profile).shape[0]
    return np.stack([at_position(profile, positions, np.full(n, p)) for p in new_positions], axis=1)


class Carburize(RouteFamily):
    name = "carburize"
    label = "carburize + harden + temper"
    patterns = (("carburize",), ("carburize", "temper"), ("carburize", "harden"),
                ("carburize", "harden", "temper"))
    main_parameter = "hours"
    parameters = ("temp_c", "hours", "surface_carbon_pct", "hardening", "quench", "agitation",
                  "austenitize_c", "temper_temp_c", "temper_hours")
    families = ("carburizing_steel", "carbon_steel")
    references = (
        "G.G. Tibbetts, J. Appl. Phys. 51 (1980) 4813 (carbon diffusivity in austenite)",
        "J. Crank, The Mathematics of Diffusion, 2nd ed. (1975) (erf solution)",
        "F.E. Harris, Metal Progress 44 (1943) 265 (total case depth)",
        "D.P. Koistinen & R.E. Marburger, Acta Metall. 7 (1959) 59; K.W. Andrews, JISI 203 (1965) 721 "
        "(retained austenite)",
        "ASTM A255 (martensite hardness; hardenability of the core)",
        "J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223 (tempering)",
        "SAE J423 / ISO 2639 (effective case depth to 50 HRC)",
        "ASTM E140-12b Table 1 and ASTM A370 Table 3 (hardness conversions, tensile strength)",
    )

    # ------------------------------------------------------------------ parse
    def parse(self, steps, grade):
        self.require_family(grade)
        c = next(s for s in steps if s["op"] == "carburize")
        h = next((s for s in steps if s["op"] == "harden"), None)
        t = next((s for s in steps if s["op"] == "temper"), None)
        temp = float(c["temp_c"])
        cs = float(self.window_value(grade, ROUTE, "surface_carbon_pct", c.get("surface_carbon_pct"), 0.85))
        core_c = float(grade.composition()["C"]) if "C" in grade.comp_min else 0.2
        if cs <= core_c:
            raise RouteError("surface_carbon_pct", cs, f"a surface carbon above the core's {core_c:.2f} %",
                             "carburize")
        if h is not None:
            quench = h["quench"]
            agitation = h.get("agitation", "moderate")
            aust = float(h["austenitize_c"]) if "austenitize_c" in h else default_austenitize_c(grade)
            hardening = "reheat"
        else:
            quench = self.window_value(grade, ROUTE, "quench", None, "oil")
            agitation = "moderate"
            aust = temp
            hardening = "direct"
        params = {
            "temp_c": temp, "hours": float(c["hours"]), "surface_carbon_pct": cs,
            "hardening": hardening, "quench": str(quench), "agitation": str(agitation),
            "austenitize_c": float(aust),
            "temper_temp_c": float(t["temp_c"]) if t else float("nan"),
            "temper_hours": float(t.get("hours", 2.0)) if t else float("nan"),
        }
        warns = self.window_warnings(grade, ROUTE, {k: params[k] for k in
                                                    ("temp_c", "hours", "surface_carbon_pct", "quench",
                                                     "temper_temp_c")})
        warns += carburizing.carburizing_cautions(cs)
        return params, warns

    def to_steps(self, params):
        steps = [{"op": "carburize", "temp_c": float(params["temp_c"]), "hours": float(params["hours"]),
                  "surface_carbon_pct": float(params["surface_carbon_pct"])}]
        if str(params.get("hardening", "direct")) == "reheat":
            h = {"op": "harden", "quench": str(params["quench"])}
            if str(params.get("agitation", "moderate")) != "moderate":
                h["agitation"] = str(params["agitation"])
            h["austenitize_c"] = float(params["austenitize_c"])
            steps.append(h)
        if np.isfinite(float(params["temper_temp_c"])):
            steps.append({"op": "temper", "temp_c": float(params["temper_temp_c"]),
                          "hours": float(params["temper_hours"])})
        return steps

    # ------------------------------------------------------------------- grid
    def grid(self, grade):
        """Carburizing time across its window, hardened by a direct quench in the
        window's default medium (a carburize step names no quench) and by a reheat
        quench in every usual medium."""
        hours = self.span(grade, ROUTE, "hours", 6, (2.0, 20.0))
        quench = self.choices(grade, ROUTE, "quench", ("oil",))
        direct_q = str(self.window_value(grade, ROUTE, "quench", None, "oil"))
        temp = float(self.window_value(grade, ROUTE, "temp_c", None, 925.0))
        reheat_c = default_austenitize_c(grade)
        d = product_grid(quench=np.array([direct_q], dtype=object), hours=hours)
        r = product_grid(quench=np.array(quench, dtype=object), hours=hours)
        nd, nr = len(d["hours"]), len(r["hours"])
        g = {"quench": np.concatenate([d["quench"], r["quench"]]), "hours": np.concatenate([d["hours"], r["hours"]])}
        n = nd + nr
        g["hardening"] = np.array(["direct"] * nd + ["reheat"] * nr, dtype=object)
        g["austenitize_c"] = np.concatenate([np.full(nd, temp), np.full(nr, reheat_c)])
        g["temp_c"] = np.full(n, temp)
        g["surface_carbon_pct"] = np.full(n, float(self.window_value(grade, ROUTE, "surface_carbon_pct",
                                                                     None, 0.85)))
        g["agitation"] = np.array(["moderate"] * n, dtype=object)
        g["temper_temp_c"] = np.full(n, float(self.window_value(grade, ROUTE, "temper_temp_c", None, 175.0)))
        g["temper_hours"] = np.full(n, 2.0)
        return g

    # ---------------------------------------------------------------- compute
    def compute(self, batch: Batch):
        p = batch.params
        temp = np.asarray(p["temp_c"], float)
        hours = np.asarray(p["hours"], float)
        cs = np.asarray(p["surface_carbon_pct"], float)
        t_t = np.asarray(p["temper_temp_c"], float)
        t_h = np.asarray(p["temper_hours"], float)
        tempered = np.isfinite(t_t)
        res = through_harden(batch, p["quench"], p["agitation"], np.asarray(p["austenitize_c"], float),
                             t_t, t_h)
        core_pos = np.asarray(res["profile_positions"], float)
        pos = merged_positions(core_pos)
        core_hv = resample(res["profile_hv"], core_pos, pos)              # (n, m)
        section = batch.section_mm
        depth = (1.0 - pos)[None, :] * section[:, None] / 2.0             # (n, m) mm

        comp = batch.comp
        comp2 = {k: np.asarray(v, float)[:, None] for k, v in comp.items()}
        c0 = el(comp, "C")
        cs_eff = np.maximum(cs, c0 + 1e-6)
        # temper None-handling per state: untempered states use as-quenched hardness
        t_use = np.where(tempered, t_t, 150.0)
        h_use = np.where(tempered, t_h, 1.0)

        core_hrc = _hrc(core_hv)
        args = (depth, _col(temp), _col(hours), _col(cs_eff), comp2)
        case_hrc = np.where(_col(tempered),
                            carburizing.case_hardness_profile_hrc(*args, _col(t_use), _col(h_use), core_hrc),
                            carburizing.case_hardness_profile_hrc(*args, None, 1.0, core_hrc))
        case_hv = conversions.hrc_to_hv(case_hrc)
        at_floor = case_hrc <= HRC_FLOOR + 1e-9
        prof_hv = np.where(at_floor | ~np.isfinite(case_hv), core_hv, np.maximum(case_hv, core_hv))

        # effective case depth, with the core hardness just beneath the total case
        tcd = carburizing.total_case_depth_mm(temp, hours, cs_eff, c0)
        r_under = np.clip(1.0 - 2.0 * np.nan_to_num(tcd) / section, 0.0, 1.0)
        core_under_hrc = _hrc(at_position(core_hv, pos, r_under))
        ecd_t = carburizing.effective_case_depth_mm(temp, hours, cs_eff, comp, t_use, h_use, core_under_hrc)
        ecd_q = carburizing.effective_case_depth_mm(temp, hours, cs_eff, comp, None, 1.0, core_under_hrc)
        ecd = np.where(tempered, ecd_t, ecd_q)
        ecd = np.minimum(ecd, section / 2.0)

        surf_core_hrc = _hrc(core_hv[:, 0])
        surf_hq = carburizing.case_hardness_profile_hrc(0.0, temp, hours, cs_eff, comp, None, 1.0, surf_core_hrc)
        surf_ht = carburizing.case_hardness_profile_hrc(0.0, temp, hours, cs_eff, comp, t_use, h_use,
                                                        surf_core_hrc)
        surf_hv = conversions.hrc_to_hv(np.where(tempered, surf_ht, surf_hq))

        res["profile_hv"] = prof_hv
        res["profile_positions"] = pos
        res["surface_hardness_hv"] = np.maximum(surf_hv, core_hv[:, 0])
        res["case_depth_mm"] = ecd
        res["total_case_depth_mm"] = tcd
        res["surface_retained_austenite_pct"] = carburizing.retained_austenite_pct(cs_eff, comp)
        res.pop("profile_as_quenched_hv", None)

        notes = [("tensile properties are those of the core at the ASTM A370 location; the case is not "
                  "included (for small sections it adds strength and lowers ductility)", np.ones(batch.n, bool))]
        notes.append(("untempered carburized case: brittle; temper at 150–200 °C promptly (common practice)",
                      ~tempered))
        notes.append(("surface carbon above 0.9 %: expect retained austenite and possible carbide networks "
                      "(common practice: keep 0.7–0.9 %, or sub-zero treat)",
                      carburizing.high_surface_carbon_mask(cs)))
        plain = np.isin(batch.attr("family").astype(str), ("carbon_steel",))
        slow = np.isin(np.asarray(p["quench"]).astype(str), ("oil", "polymer", "air"))
        notes.append(("plain-carbon grade quenched in oil/polymer: the case may not harden fully; the model "
                      "assumes it does (common practice: water or brine for plain-carbon cases)", plain & slow))
        direct = np.asarray(p["hardening"]).astype(str) == "direct"
        notes.append(("direct quench from above 930 °C: grain growth in coarse-grained heats; prefer "
                      "fine-grained steel or a reheat quench (common practice)", direct & (temp > 930.0)))
        for model, vals in (("carbon_diffusivity", {"temp_c": temp}),
                            ("carbon_profile", {"temp_c": temp, "surface_carbon_pct": cs, "core_carbon_pct": c0}),
                            ("carburized_case_hardness", {"temp_c": temp, "surface_carbon_pct": cs,
                                                          "temper_temp_c": np.where(tempered, t_t, 175.0)})):
            mask = validity.out_of_range_mask(model, **vals)
            if mask.any():
                v = validity.get(model)
                notes.append((f"outside the validity range of {model} ({v.reference}): the case estimate is "
                              "extrapolated", mask))
        qw = res.pop("quench_warnings", [])
        if batch.n == 1:
            notes += [(w, np.ones(1, bool)) for w in qw]
        res["notes"] = notes
        return res


def _col(a):
    """(n,) -> (n, 1) so per-state values broadcast over profile positions."""
    a = np.asarray(a)
    return a[:, None] if a.ndim == 1 else a


FAMILIES = [Carburize()]
