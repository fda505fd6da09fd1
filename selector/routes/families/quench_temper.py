"""Harden (austenitize and quench) then temper: the quenched-and-tempered route of
steels.

Chain of models, each in its own module:

1. as-quenched hardness across the real section (``selector.routes.quench_response``:
   Grossmann H of the medium → conduction cooling of the bar or plate → equivalent
   Jominy distance → ASTM A255 Jominy curve of the composition → martensite %);
2. tempering of that structure (``selector.models.structure_tempering``: the chain's
   martensite fraction, bainite and ferrite–pearlite by Maynier et al. 1978 at the local
   cooling rate, each tempered by its own law; the martensite on the Hollomon–Jaffe
   master surface of ``selector.models.tempering``);
3. tensile strength from hardness (``selector.models.conversions``: ASTM E140 /
   A370 Table 3) at the ASTM A370 test location, then yield strength, elongation and
   reduction of area from strength (``selector.models.correlations``).
"""
from __future__ import annotations


import numpy as np
import pandas as pd

from ...catalogue.grades import Grade
from ...models import (conversions, correlations, critical_temperatures, hardenability, structure_tempering, tempering,
                       validity)
from ...models.composition import el
from .. import quench_response
from ..model_inputs import uses
from .base import (Batch, RouteFamily, at_position, distinct_rows, harden_step, product_grid, temper_steps,
                   tension_test_position)

TME_RANGE_C = (260.0, 370.0)
CORRELATION_CLASS = {"carbon_steel": "carbon_steel", "alloy_steel": "alloy_steel",
                     "carburizing_steel": "alloy_steel", "nitriding_steel": "alloy_steel",
                     "stainless_martensitic": "stainless_martensitic"}


def correlation_class(families: np.ndarray) -> np.ndarray:
    fam = np.asarray(families, dtype=object).astype(str)
    uniq, inv = np.unique(fam, return_inverse=True)      # looked up once per distinct family
    return np.array([CORRELATION_CLASS.get(f, "alloy_steel") for f in uniq.tolist()], dtype=object)[inv.reshape(-1)]


def batch_class(batch: Batch) -> np.ndarray:
    """:func:`correlation_class` of the batch's states, looked up once per grade (the same
    object array as ``correlation_class(batch.attr("family"))``)."""
    per = np.array([CORRELATION_CLASS.get(str(g.family), "alloy_steel") for g in batch.grades] + [""],
                   dtype=object)[:-1]
    return per[np.asarray(batch.gidx, np.int64)]


#: per-state outputs of quench_response.as_quenched_profile that are not per state
_PROFILE_SHARED = ("positions", "warnings")


def _value_codes(values: np.ndarray) -> np.ndarray:
    """Codes of values (equal values, equal codes; in order of first appearance), as floats:
    the states are hashed, not written as text and sorted."""
    codes, _ = pd.factorize(np.asarray(values, dtype=object), use_na_sentinel=False)
    return np.asarray(codes, float)


def quench_profile_distinct(comp, quench, agitation, austenitize_c, diameter_mm=None, thickness_mm=None,
                            positions=None) -> tuple:
    """``(profile, inverse)``: :func:`quench_response.as_quenched_profile` evaluated once per
    distinct (composition, medium, agitation, austenitizing temperature, section) of ``n``
    states given as arrays (n,) (arrays over the distinct quenches, with their
    ``composition``) and the distinct quench of each state (``profile[k][inverse]`` is the
    per-state value; the chain is row-wise, so the numbers are those of the per-state call).
    The batch-level ``warnings`` name distinct quenches, not states."""
    size = np.asarray(diameter_mm if diameter_mm is not None else thickness_mm, float)
    n = size.shape[0]
    q = np.broadcast_to(np.asarray(quench, dtype=object), (n,))
    a = np.broadcast_to(np.asarray(agitation, dtype=object), (n,))
    nan = np.full(n, np.nan)
    cols = [np.broadcast_to(np.asarray(v, float), (n,)) for _, v in sorted(comp.items())]
    cols += [_value_codes(q), _value_codes(a),
             np.broadcast_to(np.asarray(np.nan if austenitize_c is None else austenitize_c, float), (n,)),
             nan if diameter_mm is None else np.asarray(diameter_mm, float),
             nan if thickness_mm is None else np.asarray(thickness_mm, float)]
    table = np.ascontiguousarray(np.column_stack(cols))
    # equal rows are equal bits (as np.unique of the rows' bytes); each distinct row in order of
    # first appearance (the chain is row-wise: the order does not change a number)
    first, inverse = distinct_rows(table.view(np.int64))
    sub = {k: np.broadcast_to(np.asarray(v, float), (n,))[first] for k, v in comp.items()}
    extra = {} if positions is None else {"positions": positions}
    prof = quench_response.as_quenched_profile(
        sub, q[first], a[first], diameter_mm=None if diameter_mm is None else np.asarray(diameter_mm, float)[first],
        thickness_mm=None if thickness_mm is None else np.asarray(thickness_mm, float)[first],
        austenitize_c=None if austenitize_c is None else np.broadcast_to(np.asarray(austenitize_c, float),
                                                                          (n,))[first], **extra)
    prof["composition"] = sub
    return prof, inverse


def distinct_quenches(batch: Batch, quench, agitation, austenitize_c) -> tuple:
    """``(profile, inverse)`` of :func:`quench_profile_distinct` over the batch's states (the
    states of a grade differ by their temper only, so the catalogue's ~24 000 Q&T states
    share a few hundred quenches).  A batch of one is not reduced (``inverse`` None: the
    profile is the state's, with its batch-level ``warnings``)."""
    dia = None if np.all(np.isnan(batch.diameter_mm)) else batch.diameter_mm
    thk = None if dia is not None else batch.thickness_mm
    if batch.n <= 1:
        return quench_response.as_quenched_profile(batch.comp, quench, agitation, diameter_mm=dia,
                                                   thickness_mm=thk, austenitize_c=austenitize_c), None
    return quench_profile_distinct(batch.comp, quench, agitation, austenitize_c, dia, thk)


def as_quenched_distinct(batch: Batch, quench, agitation, austenitize_c) -> dict:
    """:func:`quench_response.as_quenched_profile` of the batch, evaluated once per distinct
    (composition, medium, agitation, austenitizing temperature, section) and taken back per
    state: the states of a grade differ by their temper only, so the catalogue's ~24 000
    Q&T states share a few hundred quenches (the chain is row-wise: the same numbers).  The
    batch-level ``warnings`` are only used for a batch of one, which is never reduced."""
    prof, inverse = distinct_quenches(batch, quench, agitation, austenitize_c)
    if inverse is None:
        return prof
    prof.pop("composition")
    return {k: v if k in _PROFILE_SHARED else np.asarray(v)[inverse] for k, v in prof.items()}


def through_harden(batch: Batch, quench, agitation, austenitize_c, temper_temp_c, temper_hours) -> dict:
    """Hardness profile and test-location properties of a quenched (and, where
    ``temper_temp_c`` is not NaN, tempered) steel at the batch's sections.  Shared
    by the case-hardening families for the core."""
    comp = batch.comp
    per_quench, inverse = distinct_quenches(batch, quench, agitation, austenitize_c)
    if inverse is None:
        prof = per_quench
    else:
        u_comp = per_quench.pop("composition")
        prof = {k: v if k in _PROFILE_SHARED else np.asarray(v)[inverse] for k, v in per_quench.items()}
    pos = np.asarray(prof["positions"], float)
    hv_aq = np.asarray(prof["hardness_hv"], float)
    mart = np.asarray(prof["martensite_pct"], float)
    t = np.asarray(temper_temp_c, float)
    h = np.asarray(temper_hours, float)
    tempered = np.isfinite(t)
    hv_t = hv_aq.copy()
    if tempered.any():
        # structure-aware tempering (models/structure_tempering.py): the chain's martensite
        # fraction, Maynier bainite / ferrite-pearlite at the local cooling rate, each
        # constituent tempered by its own law; never above the as-quenched hardness reported
        # the martensite tempers with the carbon it holds: the carbon in austenite (below the steel's
        # where carbides stay undissolved, hypereutectoid steels; hardenability.austenite_carbon_pct)
        c2 = {k: np.asarray(v, float)[:, None] for k, v in comp.items()}
        c2["C"] = np.broadcast_to(np.asarray(prof["austenite_carbon_pct"], float), (batch.n,))[:, None]
        if inverse is None:
            parts = structure_tempering.constituents(c2, mart, np.asarray(prof["cooling_rate_c_s"], float))
        else:
            # the structure depends on the quench only: once per distinct quench, taken per state
            u_c2 = {k: np.asarray(v, float)[:, None] for k, v in u_comp.items()}
            u_mart = np.asarray(per_quench["martensite_pct"], float)
            u_c2["C"] = np.broadcast_to(np.asarray(per_quench["austenite_carbon_pct"], float),
                                        (u_mart.shape[0],))[:, None]
            u_parts = structure_tempering.constituents(u_c2, u_mart,
                                                       np.asarray(per_quench["cooling_rate_c_s"], float))
            parts = {k: np.asarray(v)[inverse] for k, v in u_parts.items()}
        tt = structure_tempering.mixture_hv(parts, t[:, None], np.where(np.isfinite(h), h, 1.0)[:, None], c2)
        # a hypereutectoid steel keeps undissolved cementite: linear mixture with its hardness
        f_carb = structure_tempering.undissolved_carbide_fraction(
            np.broadcast_to(el(comp, "C"), (batch.n,))[:, None], c2["C"])
        tt = structure_tempering.with_undissolved_carbide_hv(tt, f_carb)
        hv_t = np.where(tempered[:, None], np.minimum(tt, hv_aq), hv_aq)
    where = tension_test_position(batch.section_mm)
    non_m = 100.0 - at_position(mart, pos, where)
    cls = batch_class(batch)
    hv_test = at_position(hv_t, pos, where)
    hv_center = at_position(hv_t, pos, np.zeros(batch.n))
    out = {"profile_hv": hv_t, "profile_positions": pos, "profile_as_quenched_hv": hv_aq,
           "hardness_hv": hv_test, "surface_hardness_hv": at_position(hv_t, pos, np.ones(batch.n)),
           "center_hardness_hv": hv_center,
           "center_martensite_pct": at_position(mart, pos, np.zeros(batch.n)),
           "martensite_pct": at_position(mart, pos, where),
           "di_mm": np.asarray(prof["di_mm"], float), "ac1_c": np.asarray(prof["ac1_c"], float),
           "ac3_c": np.asarray(prof["ac3_c"], float), "ms_c": np.asarray(prof["ms_c"], float),
           "quench_warnings": list(prof.get("warnings", [])),
           "model_inputs": core_model_inputs(prof, comp, pos, where, t, h, non_m, cls)}
    t1 = np.asarray(temper_temp_c, float)
    for key, hv in (("", hv_test), ("center_", hv_center)):
        uts = conversions.hv_to_uts_mpa(hv)
        out[key + "uts_mpa"] = uts
        out[key + "yield_mpa"] = _yield(uts, t1, cls)
        out[key + "elongation_pct"] = _by_class(correlations.elongation_from_uts, uts, cls)
    out["reduction_area_pct"] = _by_class(correlations.reduction_of_area_from_uts, out["uts_mpa"], cls)
    return out


#: non-martensitic % at the test location above which the Maynier and Li models matter
NON_MARTENSITE_PCT = 5.0


def core_model_inputs(prof: dict, comp, pos, where, temper_temp_c, temper_hours, non_martensite_pct,
                      cls) -> dict:
    """The values at the test location of every model of the through-hardening chain
    (:data:`CORE_INPUTS`), and the masks of the states that use them: ``core`` (all: a
    family whose core is not always hardened narrows it with ``model_inputs.restrict``),
    ``core_tempered``, ``core_mixed_tempered`` (more than 5 % non-martensitic products at
    the test location), ``alloy_class`` and ``carbon_class`` (the strength correlations)."""
    t = np.asarray(temper_temp_c, float)
    n = t.shape[0]
    tempered = np.isfinite(t)
    h = np.where(np.isfinite(np.asarray(temper_hours, float)), temper_hours, 1.0)
    c_hj = np.broadcast_to(np.asarray(prof["austenite_carbon_pct"], float), (n,))
    t1 = np.where(tempered, t, 200.0)
    at = lambda key: at_position(np.asarray(prof[key], float), pos, where)  # noqa: E731
    one = lambda key: np.broadcast_to(np.asarray(prof[key], float), (n,))  # noqa: E731
    c_steel = one("steel_carbon_pct")
    mixed = np.asarray(non_martensite_pct, float) > NON_MARTENSITE_PCT
    return {
        "core": np.ones(n, bool), "core_tempered": tempered, "core_mixed_tempered": mixed & tempered,
        "alloy_class": cls != "carbon_steel", "carbon_class": cls == "carbon_steel",
        "h_per_in": one("h_per_in"), "biot": one("biot"), "theta": one("theta"),
        "cooling_rate_c_s": at("cooling_rate_c_s"), "jominy_mm": at("jominy_mm"), "di_mm": one("di_mm"),
        "grain_size_astm": one("grain_size_astm"),
        # A255 up to 0.70 % C; above, the high-carbon fallback (quench_response)
        "a255_carbon_pct": np.where(c_steel <= hardenability.A255_C_MAX + 1e-9, c_steel, np.nan),
        "fallback_carbon_pct": np.where(c_steel > hardenability.A255_C_MAX + 1e-9, c_steel, np.nan),
        "austenite_carbon_pct": one("austenite_carbon_pct"),
        "tempering_carbon_pct": c_hj,
        "martensite_pct": at("martensite_pct"),
        "core_temper_c": np.where(tempered, t, np.nan), "core_temper_hours": np.where(tempered, h, np.nan),
        "P_1000": np.where(tempered, tempering.hollomon_jaffe_parameter(
            t1, h, tempering.hollomon_jaffe_constant(c_hj)) / 1000.0, np.nan),
        # the yield correlation is evaluated at 150 °C for an untempered state (_yield)
        "correlation_temper_c": np.where(tempered, t, 150.0),
    }


#: the models of the through-hardening chain and their inputs (on the ``core`` states)
HARDENING_INPUTS = (
    uses("grossmann_h", "h_per_in", where="core")
    + uses("quench_cooling", "biot", "theta", where="core")
    + uses("jominy_rate_factor", "biot", where="core")
    + uses("jominy_equivalence", "cooling_rate_c_s", where="core")
    + uses("astm_a255", "Mn", "Si", "Ni", "Cr", "Mo", "Cu", "V", C="a255_carbon_pct", where="core")
    + uses("high_carbon_fallback", C="fallback_carbon_pct", where="core")
    + uses("a255_dividing_factors", "di_mm", distance_mm="jominy_mm", where="core")
    + uses("a255_grain_size", "grain_size_astm", where="core")
    + uses("astm_e112", grain_size_number="grain_size_astm", where="core")
    + uses("martensite_hardness", C="austenite_carbon_pct", pct_martensite="martensite_pct", where="core")
    + uses("andrews_ac", "C", "Mn", "Si", "Ni", "Cr", "Mo", where="core")
    + uses("andrews_ms", "C", "Mn", "Ni", "Cr", "Mo", where="core")
)

#: tempering of the core's structure (structure_tempering: Hollomon-Jaffe master surface for the
#: martensite; Maynier et al. and Li et al. for the non-martensitic products)
TEMPERING_INPUTS = (
    uses("hollomon_jaffe", C="tempering_carbon_pct", temp_c="core_temper_c", hours="core_temper_hours",
         where=("core", "core_tempered"))
    + uses("tempering_hv", *tempering.ALLOY_CHECKED[1:], "P_1000", C="tempering_carbon_pct",
           where=("core", "core_tempered"))
    + uses("maynier_1978", "C", "Si", "Mn", "Ni", "Cr", "Mo", "V", where=("core", "core_mixed_tempered"))
    + uses("li_1998", "C", "Mn", "Ni", "Cr", "Mo", where=("core", "core_mixed_tempered"))
)

#: hardness to strength (ASTM E140) and strength to yield / elongation / reduction of area
STRENGTH_INPUTS = (
    uses("astm_e140", "hardness_hv", where="core")
    + uses("qt_correlations", "uts_mpa", temper_temp_c="correlation_temper_c", where=("core", "alloy_class"))
    + uses("qt_correlations_carbon", "uts_mpa", where=("core", "carbon_class"))
)

#: every model input of :func:`through_harden`: the families that harden a core declare these
CORE_INPUTS = HARDENING_INPUTS + TEMPERING_INPUTS + STRENGTH_INPUTS


#: the last (class array, its masks) of :func:`_class_masks` (one tuple, read and replaced whole)
_SPLIT: list = [(None, None)]


def _class_masks(cls) -> list:
    """``[(class, mask)]`` of the distinct classes of ``cls`` in sorted order, the last one
    kept (a family's correlations read the same class array several times)."""
    kept, masks = _SPLIT[0]
    if kept is cls:
        return masks
    codes, uniq = pd.factorize(np.asarray(cls, dtype=object), sort=True)
    out = [(c, codes == i) for i, c in enumerate(uniq.tolist())]
    _SPLIT[0] = (cls, out)
    return out


def _by_class(fn, uts, cls):
    res = np.full(uts.shape, np.nan)
    for c, m in _class_masks(cls):      # the distinct classes (no sort of a per-state object array)
        res[m] = fn(uts[m], c)
    return res


def _yield(uts, temper_c, cls):
    res = np.full(uts.shape, np.nan)
    t = np.where(np.isfinite(temper_c), temper_c, 150.0)
    for c, m in _class_masks(cls):
        res[m] = correlations.yield_from_uts(uts[m], t[m], c)
    return res


def default_austenitize_c(grade: Grade) -> float:
    """The grade's default hardening temperature, set by its critical temperatures.

    Andrews (1965) Ac3 + 40 °C for hypoeutectoid and Ac1 + 50 °C for hypereutectoid
    steels (``critical_temperatures.default_austenitize_c``, nominal composition),
    clipped into the grade's austenitizing window (``data/route_windows.csv``: the
    handbook practice range).  Where the composition lies outside the validity of
    Andrews' equations (stainless and high-Al nitriding steels, C > 0.6 % for Ac3)
    the window's handbook default is used instead.  Andrews' Ac3 runs 30–45 °C below
    handbook values for Cr–Mo steels (docs/methods/critical_temperatures.md), which
    the clipping to the practice window absorbs.
    """
    comp = grade.composition()
    w = grade.window("quench_temper", "austenitize_c")
    handbook = (float(w.default) if w is not None and w.default == w.default else
                float(grade.austenitize_c) if grade.austenitize_c == grade.austenitize_c else float("nan"))
    vals = {k: comp.get(k, 0.0) for k in ("C", "Mn", "Si", "Ni", "Cr", "Mo")}
    outside = bool(validity.out_of_range_mask("andrews_ac", **vals))
    if outside and handbook == handbook:
        return handbook
    # rounded to 5 °C, as a furnace is set
    t = 5.0 * round(float(np.asarray(critical_temperatures.default_austenitize_c(comp)).ravel()[0]) / 5.0)
    if w is not None and w.min == w.min and w.max == w.max:
        t = min(max(t, float(w.min)), float(w.max))
    return t


class QuenchTemper(RouteFamily):
    name = "quench_temper"
    label = "harden + temper"
    patterns = (("harden",), ("harden", "temper"), ("normalize", "harden", "temper"),
                ("anneal", "harden", "temper"))
    main_parameter = "temper_temp_c"
    parameters = ("quench", "agitation", "austenitize_c", "temper_temp_c", "temper_hours")
    families = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_martensitic")
    model_inputs = CORE_INPUTS
    references = (
        "J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223 (tempering parameter)",
        "Ph. Maynier, B. Jungmann & J. Dollet, Hardenability Concepts with Applications to Steel, "
        "TMS-AIME (1978) 518 (constituent hardness and mixture rule)",
        "ASTM A255 (hardenability from composition; Jominy curve)",
        "M.A. Grossmann, Elements of Hardenability, ASM (1952) (quench severity H)",
        "ASTM A370 (tension-test location)",
    )

    def parse(self, steps, grade):
        self.require_family(grade)
        h = next(s for s in steps if s["op"] == "harden")
        t = next((s for s in steps if s["op"] == "temper"), None)
        aust = h.get("austenitize_c")
        if aust is None:
            aust = default_austenitize_c(grade)
        params = {
            "quench": h["quench"],
            "agitation": h.get("agitation", "moderate"),
            "austenitize_c": float(aust),
            "temper_temp_c": t["temp_c"] if t else float("nan"),
            "temper_hours": (t.get("hours", 2.0) if t else float("nan")),
        }
        warns = self.window_warnings(grade, "quench_temper", params)
        return params, warns

    def to_steps(self, params):
        return [harden_step(params["quench"], params.get("agitation", "moderate"), params["austenitize_c"]),
                *temper_steps(params["temper_temp_c"], params["temper_hours"])]

    def grid(self, grade):
        quench = self.choices(grade, "quench_temper", "quench", ("oil",))
        bands = self.bands(grade, "quench_temper", "temper_temp_c", (200.0, 650.0))
        temps = np.unique(np.concatenate([np.arange(np.ceil(lo / 10) * 10, hi + 0.1, 10.0)
                                          for lo, hi in bands]))
        hours = self.window_value(grade, "quench_temper", "temper_hours", None, 2.0)
        aust = default_austenitize_c(grade)
        g = product_grid(quench=np.array(quench, dtype=object), temper_temp_c=temps)
        n = len(g["temper_temp_c"])
        g["agitation"] = np.array(["moderate"] * n, dtype=object)
        g["austenitize_c"] = np.full(n, float(aust))
        g["temper_hours"] = np.full(n, float(hours))
        return g

    def compute(self, batch):
        p = batch.params
        t = np.asarray(p["temper_temp_c"], float)
        res = through_harden(batch, p["quench"], p["agitation"], np.asarray(p["austenitize_c"], float),
                             t, np.asarray(p["temper_hours"], float))
        res["case_depth_mm"] = np.zeros(batch.n)
        notes = []
        notes.append(("temper in the 260–370 °C tempered-martensite-embrittlement range: impact toughness "
                      "may be low (common practice; ASM Handbook Vol. 4, tempering of steel)",
                      (t >= TME_RANGE_C[0]) & (t <= TME_RANGE_C[1])))
        notes.append(("temper above Ac1 (Andrews 1965): partial re-austenitization, fresh martensite on "
                      "cooling; the tempering model does not apply", np.isfinite(t) & (t > res["ac1_c"])))
        hypo = el(batch.comp, "C") < 0.77
        notes.append(("austenitizing temperature below Ac3 (Andrews 1965) of a hypoeutectoid steel: "
                      "ferrite remains and the quenched hardness is low",
                      hypo & (np.asarray(p["austenitize_c"], float) < res["ac3_c"])))
        notes.append(("centre below 50 % martensite: the section does not through-harden "
                      "(ASTM A255 / Hodge & Orehoski)", res["center_martensite_pct"] < 50.0))
        notes.append(("untempered martensite is brittle: temper promptly after quenching (common practice)",
                      ~np.isfinite(t)))

        qw = res.pop("quench_warnings")
        if batch.n == 1:   # batch-level messages only make sense for a single state
            notes += [(w, np.ones(1, bool)) for w in qw]
        res["notes"] = notes
        return res


FAMILIES = [QuenchTemper()]
