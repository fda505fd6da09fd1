"""Carburize, harden, temper: the carburized (case-hardened) route of carburizing steels.

Accepted sequences: ``carburize`` (direct quench, untempered), ``carburize → temper``
(direct quench from the carburizing temperature, then temper), ``carburize →
harden`` and ``carburize → harden → temper`` (slow cool, reheat and quench).

Chain of models:

1. core: the through-hardening model of the core composition at the real section
   (:func:`selector.routes.families.quench_temper.through_harden`: Grossmann H,
   conduction cooling, ASTM A255 Jominy curve, Hollomon–Jaffe tempering), quenched
   from the carburizing temperature (direct) or the reheat temperature;
2. case: carbon profile (Tibbetts 1980 D, Crank erf solution); each depth hardens
   with its own carbon and hardenability at its own cooling: the quench chain
   (:func:`selector.routes.quench_response.as_quenched_profile`, ASTM A255 at the
   local composition) is run at every carbon level of :data:`CARBON_FRACTIONS` and
   read at the depth's r/R (:func:`case_table`, :func:`case_hv_at`); low temper and
   Koistinen–Marburger retained austenite (:mod:`selector.models.carburizing`);
3. effective case depth to 50 HRC (SAE J423 / ISO 2639);
4. tensile properties: those of the core at the ASTM A370 location (the case is not
   included).
"""
from __future__ import annotations

import numpy as np

from ...errors import RouteError
from ...models import carburizing, conversions
from ...models.composition import el
from .. import quench_response
from ..model_inputs import uses
from .base import Batch, RouteFamily, at_position, harden_step, product_grid, temper_steps
from .quench_temper import CORE_INPUTS, default_austenitize_c, quench_profile_distinct, through_harden

ROUTE = "carburize"
#: lowest HRC the ASTM E140 Rockwell C scale gives (soft cores are floored here in the
#: case calculation only; the reported core keeps its HV)
HRC_FLOOR = 20.0
#: extra r/R positions near the surface so the profile resolves the case
CASE_POSITIONS = (0.995, 0.99, 0.98, 0.97, 0.96, 0.95, 0.94, 0.92, 0.90)
HARDENING = ("direct", "reheat")
#: carbon levels of the case table, as fractions (C - C0)/(Cs - C0); denser at low
#: fractions, where the 50 HRC point of a carburized case falls
CARBON_FRACTIONS = (0.0, 0.05, 0.10, 0.15, 0.20, 0.25, 0.30, 0.40, 0.50, 0.70, 1.0)
#: r/R positions of the case table (dense near the surface, where the case lies).  With
#: these 11 x 12 nodes and :data:`ECD_GRID` the effective case depth is within about 1 %
#: of a 41 x 41-node table with 401 depths (8620/4320/9310/1018, 10-100 mm, oil/water)
TABLE_POSITIONS = (1.0, 0.995, 0.99, 0.98, 0.97, 0.95, 0.92, 0.88, 0.80, 0.60, 0.30, 0.0)
#: depths of the effective-case search, from the surface to 6 sqrt(D t)
ECD_GRID = 101
#: effective case criterion, HRC (SAE J423; ISO 2639 uses 550 HV)
ECD_THRESHOLD_HRC = 50.0


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
    model_inputs = (
        CORE_INPUTS
        + uses("carbon_diffusivity", "temp_c", carbon_pct="mean_carbon_pct")
        + uses("carbon_profile", "temp_c", "surface_carbon_pct", core_carbon_pct="C")
        # retained austenite of the case: Ms by Andrews' product form at the surface carbon
        + uses("andrews_ms_product", C="case_surface_carbon_pct")
        + uses("carburized_case_hardness", "temp_c", "surface_carbon_pct", "temper_temp_c")
    )
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
            steps.append(harden_step(params["quench"], params.get("agitation", "moderate"), params["austenitize_c"]))
        return steps + temper_steps(params["temper_temp_c"], params["temper_hours"])

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
        aust = np.asarray(p["austenitize_c"], float)
        res = through_harden(batch, p["quench"], p["agitation"], aust, t_t, t_h)
        core_pos = np.asarray(res["profile_positions"], float)
        pos = merged_positions(core_pos)
        core_hv = resample(res["profile_hv"], core_pos, pos)              # (n, m)
        section = batch.section_mm
        comp = batch.comp
        c0 = el(comp, "C")
        cs_eff = np.maximum(cs, c0 + 1e-6)

        table = case_table(batch, p["quench"], p["agitation"], aust, cs_eff, t_t, t_h)

        # hardness profile at the reported positions: each depth its own carbon and cooling
        depth = (1.0 - pos)[None, :] * section[:, None] / 2.0             # (n, m) mm
        case_hv = case_hv_at(table, depth, pos[None, :], temp, hours, cs_eff, c0)
        prof_hv = np.maximum(case_hv, core_hv)

        # effective case depth on a fine depth grid through the case
        d_rep = carburizing.representative_diffusivity_m2_s(temp, cs_eff, c0)
        x_max = np.minimum(6.0 * np.sqrt(d_rep * hours * 3600.0) * 1e3, section / 2.0)
        x = x_max[:, None] * np.linspace(0.0, 1.0, ECD_GRID)[None, :]
        r = 1.0 - 2.0 * x / section[:, None]
        hv_x = case_hv_at(table, x, r, temp, hours, cs_eff, c0)
        ecd = carburizing.depth_at_hardness_mm(x, hv_x, conversions.hrc_to_hv(ECD_THRESHOLD_HRC))
        ecd = np.minimum(ecd, section / 2.0)
        tcd = carburizing.total_case_depth_mm(temp, hours, cs_eff, c0)

        res["profile_hv"] = prof_hv
        res["profile_positions"] = pos
        res["surface_hardness_hv"] = np.maximum(table["hv"][:, -1, 0], core_hv[:, 0])
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
        notes.append(("plain-carbon grade quenched in oil/polymer: the case hardens only where its own "
                      "carbon and the local cooling allow (estimated here); common practice is water or brine "
                      "for plain-carbon cases", plain & slow))
        surface_soft = table["hv"][:, -1, 0] < conversions.hrc_to_hv(ECD_THRESHOLD_HRC)
        notes.append(("the carburized surface does not reach 50 HRC at this section and quench: no effective "
                      "case (SAE J423); a faster quench or a more hardenable grade is needed", surface_soft))
        direct = np.asarray(p["hardening"]).astype(str) == "direct"
        notes.append(("direct quench from above 930 °C: grain growth in coarse-grained heats; prefer "
                      "fine-grained steel or a reheat quench (common practice)", direct & (temp > 930.0)))
        res["model_inputs"].update(mean_carbon_pct=0.5 * (cs_eff + c0), case_surface_carbon_pct=cs_eff)
        qw = res.pop("quench_warnings", [])
        if batch.n == 1:
            notes += [(w, np.ones(1, bool)) for w in qw]
        res["notes"] = notes
        return res


def case_table(batch: Batch, quench, agitation, austenitize_c, surface_carbon_pct, temper_temp_c,
               temper_hours) -> dict:
    """Tempered hardness of the section at each carbon level of the case, HV.

    For every carbon level C_k = C0 + f_k (Cs - C0) (:data:`CARBON_FRACTIONS`) the
    state's composition with that carbon runs through the quench chain of the
    quench-and-temper route (:func:`selector.routes.quench_response.as_quenched_profile`:
    Grossmann H → conduction cooling at each r/R of :data:`TABLE_POSITIONS` →
    Jominy-equivalent distance → ASTM A255 hardness of that composition), so each
    depth hardens with its own carbon and hardenability at its own cooling; the
    result is tempered and mixed with retained austenite by
    :func:`selector.models.carburizing.case_hardness_hv`.

    Returns dict ``hv`` (n, n_levels, n_positions), ``fractions`` and ``positions``.
    """
    comp = batch.comp
    c0 = el(comp, "C")
    cs = np.asarray(surface_carbon_pct, float)
    size = ({"diameter_mm": batch.diameter_mm} if not np.all(np.isnan(batch.diameter_mm))
            else {"thickness_mm": batch.thickness_mm})
    frac = np.asarray(CARBON_FRACTIONS, float)
    n, k = batch.n, len(frac)
    # one call of the chain for every (state, carbon level): states stacked level by level
    tile = lambda a: np.tile(np.broadcast_to(np.asarray(a), (n,)), k)  # noqa: E731
    local = {e: tile(v) for e, v in comp.items()}
    local["C"] = (c0[None, :] + frac[:, None] * (cs - c0)[None, :]).reshape(-1)
    if n * k > 1:
        # once per distinct (carbon level, quench): the carburizing time and temperature and the
        # temper do not enter the quench chain (row-wise: the numbers of the per-row call)
        prof, inverse = quench_profile_distinct(local, tile(quench), tile(agitation), tile(austenitize_c),
                                                positions=TABLE_POSITIONS,
                                                **{key: tile(v) for key, v in size.items()})
        aq = np.asarray(prof["hardness_hv"], float)[inverse]
    else:
        prof = quench_response.as_quenched_profile(local, tile(quench), tile(agitation),
                                                   austenitize_c=tile(austenitize_c), positions=TABLE_POSITIONS,
                                                   **{key: tile(v) for key, v in size.items()})
        aq = np.asarray(prof["hardness_hv"], float)
    aq_hv = aq.reshape(k, n, -1).transpose(1, 0, 2)   # (n, k, p)
    c_k = (c0[:, None] + frac[None, :] * (cs - c0)[:, None])[:, :, None]
    comp3 = {k: np.asarray(v, float)[:, None, None] for k, v in comp.items()}
    t = np.asarray(temper_temp_c, float)[:, None, None]
    h = np.asarray(temper_hours, float)[:, None, None]
    hv = carburizing.case_hardness_hv(aq_hv, c_k, comp3, t, np.where(np.isfinite(h), h, 1.0))
    return {"hv": hv, "fractions": frac, "positions": np.asarray(TABLE_POSITIONS, float)}


def case_hv_at(table: dict, depth_mm, positions, temp_c, hours, surface_carbon_pct, core_carbon_pct):
    """Hardness (HV) at ``depth_mm`` / r/R ``positions`` (arrays (n, k)) read from
    :func:`case_table`: the local carbon from the erf profile
    (:func:`selector.models.carburizing.carbon_profile_pct`), then bilinear
    interpolation in carbon fraction and position."""
    col = lambda a: np.asarray(a, float)[:, None]  # noqa: E731
    c = carburizing.carbon_profile_pct(depth_mm, col(temp_c), col(hours), col(surface_carbon_pct),
                                       col(core_carbon_pct))
    span = col(surface_carbon_pct) - col(core_carbon_pct)
    f = np.clip((c - col(core_carbon_pct)) / np.where(span > 0, span, 1.0), 0.0, 1.0)
    hv = table["hv"]
    fr = table["fractions"]
    s_nodes = 1.0 - table["positions"]                                    # depth fraction, increasing
    s = np.clip(1.0 - np.broadcast_to(np.asarray(positions, float), f.shape), 0.0, 1.0)
    jf = np.clip(np.searchsorted(fr, f, side="right") - 1, 0, len(fr) - 2)
    wf = np.clip((f - fr[jf]) / (fr[jf + 1] - fr[jf]), 0.0, 1.0)
    jp = np.clip(np.searchsorted(s_nodes, s, side="right") - 1, 0, len(s_nodes) - 2)
    wp = np.clip((s - s_nodes[jp]) / (s_nodes[jp + 1] - s_nodes[jp]), 0.0, 1.0)
    i = np.arange(hv.shape[0])[:, None]
    return ((1 - wf) * (1 - wp) * hv[i, jf, jp] + wf * (1 - wp) * hv[i, jf + 1, jp]
            + (1 - wf) * wp * hv[i, jf, jp + 1] + wf * wp * hv[i, jf + 1, jp + 1])


def _col(a):
    """(n,) -> (n, 1) so per-state values broadcast over profile positions."""
    a = np.asarray(a)
    return a[:, None] if a.ndim == 1 else a


FAMILIES = [Carburize()]
