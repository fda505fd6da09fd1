"""Fatigue limit of a computed state at its section and surface (used by ``evaluate`` and ``select``).

Through-hardened steels (every steel route without a case)::

    Se = ka(Sut) kb kc kd ke Se'(Sut)

with Sut the tensile strength at the A370 test location (centre up to 38 mm,
mid-radius above), which for a partly hardened bar errs on the safe side.

Case-hardened steels (carburize, nitride, induction routes with a case) are checked
at two depths, the surface and the case-core transition, and the lower of the two
allowable *surface* stresses is the part's limit:

* surface: the surface hardness gives Sut_s (ASTM E140/A370; above the table's top
  row, HRC 59, the top row's 2420 MPa is used, which only matters for ka and M since
  Se' is capped), ``S_s = ka kb kc kd ke Se'(Sut_s)`` raised by the compressive
  residual stress of the case (``data/residual_stress.csv``, FKM mean-stress
  sensitivity: :func:`selector.models.fatigue.residual_stress_credit`);
* transition, at the case depth z_c: the core hardness gives
  ``S_t = kb kc kd ke Se'(Sut_core)`` (no surface factor below the surface, no
  residual-stress credit); bending and torsion stresses fall linearly to zero at the
  axis, so the allowable surface stress there is ``S_t / (1 - 2 z_c / D)``; axial
  stress is uniform (divisor 1).

Non-ferrous alloys: fatigue strength at the stated cycle count
(:func:`selector.models.fatigue.nonferrous_fatigue_strength_mpa`) times the Marin
factors; ``fatigue_cycles`` says which count.  They have no endurance limit.

The band (``_lo``/``_hi``) follows the tensile-strength band of the state
(:mod:`selector.routes.bands`): through-hardened states recompute the limit at the
band's edges; case-hardened states scale by ``uts_mpa_lo / uts_mpa``.

References: as :mod:`selector.models.fatigue`; the depth check is the usual practice
for case-hardened parts (common practice).
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table
from ..models import conversions
from ..models import fatigue as fm
from .model_inputs import uses

#: the model inputs of the fatigue stage, every route alike (checked by ``routes.evaluate``: the
#: section and service temperature against the Marin factors, the hardness against Murakami's
#: estimate of a polished steel, which is not given above its range)
MODEL_INPUTS = (uses("marin_size", diameter_mm="section_mm") + uses("marin_temperature", "temp_c")
                + uses("murakami_2002", "hardness_hv"))

CASE_ROUTES = ("carburize", "nitride", "induction")
STEEL_FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
                  "stainless_austenitic", "stainless_martensitic", "stainless_ph")
#: tensile strength at the top row of ASTM A370 Table 3 (HRC 59), MPa
TABLE_TOP_UTS_MPA = 2420.1
DEFAULTS = {"finish": "machined", "load_type": "bending", "reliability": 0.5, "temp_c": 20.0}

_RS = Schema((Column("route", "choice", choices=CASE_ROUTES), Column("surface_mpa", "float", lo=-2000, hi=0),
              Column("extent", "float", lo=0.0, hi=1.0), Column("source"),
              Column("confidence", "choice", choices=fm.CONFIDENCE)))


@functools.cache
def residual_stress_table() -> dict:
    """route family -> (surface_mpa, extent, source, confidence) from ``data/residual_stress.csv``."""
    t = read_table("residual_stress.csv", _RS)
    return {r.route: (float(r.surface_mpa), float(r.extent), r.source, r.confidence) for r in t.itertuples()}


def check_options(finish="machined", load_type="bending", reliability=0.5) -> dict:
    """Validated fatigue options (:class:`~selector.errors.InputError` naming field, value and allowed)."""
    return {"finish": fm.check_finish(finish), "load_type": fm.check_load_type(load_type),
            "reliability": fm.check_reliability(reliability)}


def _arr(cols, key, n):
    v = cols.get(key) if hasattr(cols, "get") else None
    if v is None:
        return np.full(n, np.nan)
    return np.asarray(v, float).reshape(-1) if np.ndim(v) else np.full(n, float(v))


def _surface_uts(hv):
    s = conversions.hv_to_uts_mpa(hv)
    return np.where(np.isnan(s) & (np.asarray(hv, float) > 600.0), TABLE_TOP_UTS_MPA, s)


def _steel_through(uts, k_rest, finish):
    return fm.surface_factor(uts, finish) * k_rest * fm.endurance_limit_from_uts_mpa(uts)


def fatigue_columns(cols, family, route, section_mm, finish="machined", load_type="bending",
                    reliability=0.5, temp_c=20.0) -> dict:
    """Fatigue limit of every state, vectorised.

    Parameters
    ----------
    cols : mapping
        Arrays (or a DataFrame) with ``uts_mpa`` and, where present, ``uts_mpa_lo``,
        ``uts_mpa_hi``, ``surface_hardness_hv``, ``center_hardness_hv``,
        ``case_depth_mm`` (mm).
    family, route : array_like of str
        Grade family and route family of each state.
    section_mm : array_like
        Diameter (or plate thickness, used as the diameter in kb), mm.
    finish, load_type, reliability, temp_c
        As :func:`selector.models.fatigue.marin_factors`; ``temp_c`` None means 20 °C.

    Returns
    -------
    dict of ndarray
        ``fatigue_limit_mpa``, ``fatigue_limit_mpa_lo``, ``fatigue_limit_mpa_hi`` (MPa,
        fully reversed, as a surface stress amplitude), ``fatigue_cycles`` (NaN: an
        endurance limit; else the cycle count of the stated strength),
        ``fatigue_governing`` (``"surface"``, ``"case-core transition"`` or ``""``),
        ``fatigue_governing_depth_mm``, and the factors ``fatigue_ka`` … ``fatigue_ke``.
    """
    opts = check_options(finish, load_type, reliability)
    finish, load_type, rel = opts["finish"], opts["load_type"], opts["reliability"]
    temp_c = 20.0 if temp_c is None else temp_c
    fam = np.asarray(family, dtype=object).reshape(-1)
    rte = np.asarray(route, dtype=object).reshape(-1)
    n = fam.shape[0]
    d = np.broadcast_to(np.asarray(section_mm, float), (n,))
    uts = _arr(cols, "uts_mpa", n)
    lo = _arr(cols, "uts_mpa_lo", n)
    hi = _arr(cols, "uts_mpa_hi", n)
    kb = fm.size_factor(d, load_type)
    kc = fm.load_factor(load_type)
    kd = np.broadcast_to(fm.temperature_factor(temp_c), (n,))
    ke = fm.reliability_factor(rel)
    rest = kb * kc * kd * ke
    ka = fm.surface_factor(uts, finish)

    steel = np.isin(fam.astype(str), STEEL_FAMILIES)
    limit = np.where(steel, _steel_through(uts, rest, finish), np.nan)
    lim_lo = np.where(steel, _steel_through(lo, rest, finish), np.nan)
    lim_hi = np.where(steel, _steel_through(hi, rest, finish), np.nan)
    cycles = np.full(n, np.nan)
    governing = np.where(steel, "surface", "").astype(object)
    gdepth = np.where(steel, 0.0, np.nan)

    # case-hardened: surface and case-core transition
    cd = np.nan_to_num(_arr(cols, "case_depth_mm", n), nan=0.0)
    case = steel & np.isin(rte.astype(str), CASE_ROUTES) & (cd > 0)
    if case.any():
        s_hv = _arr(cols, "surface_hardness_hv", n)
        c_hv = _arr(cols, "center_hardness_hv", n)
        sut_s = _surface_uts(s_hv)
        sut_c = np.where(np.isfinite(conversions.hv_to_uts_mpa(c_hv)), conversions.hv_to_uts_mpa(c_hv), uts)
        rs = np.zeros(n)
        for r, (smpa, _ext, _src, _conf) in residual_stress_table().items():
            rs[rte.astype(str) == r] = smpa
        s_surf = fm.residual_stress_credit(_steel_through(sut_s, rest, finish), rs, sut_s)
        g = np.ones(n) if load_type == "axial" else np.clip(1.0 - 2.0 * cd / d, 1e-3, 1.0)
        s_tr = rest * fm.endurance_limit_from_uts_mpa(sut_c) / g
        both = np.fmin(s_surf, s_tr)
        ratio_lo = np.where(uts > 0, lo / uts, np.nan)
        ratio_hi = np.where(uts > 0, hi / uts, np.nan)
        limit = np.where(case, both, limit)
        lim_lo = np.where(case, both * ratio_lo, lim_lo)
        lim_hi = np.where(case, both * ratio_hi, lim_hi)
        trans = case & (s_tr < s_surf)
        governing = np.where(trans, "case-core transition", governing).astype(object)
        gdepth = np.where(trans, cd, gdepth)
        ka = np.where(case, fm.surface_factor(sut_s, finish), ka)

    # non-ferrous: strength at a stated cycle count
    for f, (_ratio, _cap, n_cyc, _src, _conf) in fm.nonferrous_table().items():
        m = fam.astype(str) == f
        if m.any():
            ka_f = fm.surface_factor(uts[m], finish)
            k = ka_f * rest[m]
            limit[m] = fm.nonferrous_fatigue_strength_mpa(uts[m], f)[0] * k
            lim_lo[m] = fm.nonferrous_fatigue_strength_mpa(lo[m], f)[0] * fm.surface_factor(lo[m], finish) * rest[m]
            lim_hi[m] = fm.nonferrous_fatigue_strength_mpa(hi[m], f)[0] * fm.surface_factor(hi[m], finish) * rest[m]
            cycles[m] = n_cyc
            governing[m] = "surface"
            gdepth[m] = 0.0
    return {"fatigue_limit_mpa": limit, "fatigue_limit_mpa_lo": lim_lo, "fatigue_limit_mpa_hi": lim_hi,
            "fatigue_cycles": cycles, "fatigue_governing": governing, "fatigue_governing_depth_mm": gdepth,
            "fatigue_ka": ka, "fatigue_kb": kb, "fatigue_kc": np.full(n, kc), "fatigue_kd": kd,
            "fatigue_ke": np.full(n, ke)}


def through_depth(profile: list, section_mm: float, route_family: str, finish="machined",
                  load_type="bending", reliability=0.5, temp_c=20.0, case_depth_mm: float = 0.0) -> dict:
    """Local fatigue strength against the applied stress through the section (one state).

    Parameters
    ----------
    profile : list of dict
        ``evaluate()``'s ``profile`` rows (``depth_mm``, ``hardness_hv``), surface first.
    section_mm : float
        Diameter, mm.
    route_family : str
        The route family (its residual stress applies inside the case).
    case_depth_mm : float
        Case depth, mm (0: none); the residual stress is full over ``extent`` of it and
        falls linearly to zero at it (``data/residual_stress.csv``).

    Returns
    -------
    dict
        ``depth_mm``, ``strength_mpa`` (local fatigue strength), ``stress_per_surface``
        (applied stress / surface stress: ``1 - 2 z / D`` for bending and torsion, 1 for
        axial), ``allowable_surface_mpa`` (``min_z strength / stress``), ``governing_depth_mm``,
        ``residual_mpa`` (the residual stress used at each depth).
    """
    opts = check_options(finish, load_type, reliability)
    z = np.array([p["depth_mm"] for p in profile], float)
    hv = np.array([np.nan if p["hardness_hv"] is None else p["hardness_hv"] for p in profile], float)
    temp_c = 20.0 if temp_c is None else temp_c
    rest = (fm.size_factor(section_mm, opts["load_type"]) * fm.load_factor(opts["load_type"])
            * fm.temperature_factor(temp_c) * fm.reliability_factor(opts["reliability"]))
    sut = _surface_uts(hv)
    se = rest * fm.endurance_limit_from_uts_mpa(sut)
    ka = np.where(z <= 1e-9, fm.surface_factor(sut, opts["finish"]), 1.0)
    rs = np.zeros_like(z)
    if route_family in residual_stress_table() and case_depth_mm > 0:
        smpa, ext, _src, _conf = residual_stress_table()[route_family]
        full = ext * case_depth_mm
        frac = np.clip((case_depth_mm - z) / max(case_depth_mm - full, 1e-9), 0.0, 1.0)
        rs = smpa * np.where(z <= full, 1.0, frac)
    strength = fm.residual_stress_credit(ka * se, rs, sut)
    if opts["load_type"] == "axial":
        stress = np.ones_like(z)
    else:
        stress = np.clip(1.0 - 2.0 * z / float(section_mm), 0.0, 1.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        allow = np.where(stress > 1e-6, strength / stress, np.inf)
    i = int(np.nanargmin(allow)) if np.isfinite(allow).any() else 0
    return {"depth_mm": z, "strength_mpa": strength, "stress_per_surface": stress, "residual_mpa": rs,
            "allowable_surface_mpa": float(allow[i]), "governing_depth_mm": float(z[i])}
