"""What load a given clevis pin can carry: the inverse of :func:`selector.design.pins.pin_targets`.

The stresses of :func:`selector.design.pins.pin_stresses` are linear in the load, so
the allowable load of each mode is the allowable stress divided by the stress per
kilonewton (same equations, same load model, nothing copied)::

    shear    F_s = k_shear * Sut       / (SF * tau_per_kN)      (ultimate shear, n planes)
    bending  F_b = Sy                  / (SF * sigma_b_per_kN)  (outer fibre at mid-span)
    bearing  F_p = k_bearing * Sy      / (SF * p_per_kN)        (larger of lug and clevis)
    governing = the mode with the lowest F;  load = min(F_s, F_b, F_p)

Strength:

* with a route: the **lower edge of the 90 % prediction band** of ``evaluate()``
  (``uts_mpa_lo``, ``yield_mpa_lo``; :mod:`selector.routes.bands`) at the pin's
  diameter;
* with ``route=None`` and ``hardness_hrc`` (a drawing that specifies a hardness): the
  tensile strength of that hardness on ASTM E140 Table 1 / ASTM A370 Table 3
  (non-austenitic steels, HRC 20–59), and the yield strength from the project's Q&T
  correlation (:func:`selector.models.correlations.yield_from_uts`) taken at its lowest
  over the usual tempering range 400–650 °C (the tempering temperature is not known).

Check (a public requirement for a clevis pin, as quoted on a public forum; see
tests/test_capacity.py): a 1 in. 4130 pin at 26.5 HRC in double shear, SF 1, shear /
tensile 0.6, carries at least 116 260 lbf in shear; at 24 HRC it does not.

Results are estimates for preliminary selection.  The final choice needs certified
material test reports, the applicable design code and review by a qualified engineer.

References
----------
As :mod:`selector.design.pins` (Budynas & Nisbett 2015, ch. 3); ASTM E140-12b Table 1
and ASTM A370 Table 3 (hardness to tensile strength); NIST SP 811 App. B.9 (lbf).
"""
from __future__ import annotations

import numpy as np

from .. import inputs
from ..catalogue.grades import default_catalogue
from ..errors import InputError
from ..models import conversions
from ..models.correlations import FAMILIES as QT_FAMILIES, yield_from_uts
from ..routes.evaluate import evaluate
from .pins import LBF_TO_N, NOTICE, SHEAR_TO_TENSILE, _FAMILY_CLASS, pin_stresses

_CONTEXT = "pin capacity"
#: tempering range over which the hardness-only yield is taken at its lowest, °C (common practice)
TEMPER_RANGE_C = (400.0, 650.0)
#: the Rockwell C span of the tensile-strength column of ASTM A370 Table 3
HRC_RANGE = (20.0, 59.0)
MODES = ("shear", "bending", "bearing")


def _strength_from_hardness(g, hardness_hrc) -> dict:
    if isinstance(hardness_hrc, bool) or not isinstance(hardness_hrc, (int, float, np.integer, np.floating)) \
            or not np.isfinite(float(hardness_hrc)) or not (HRC_RANGE[0] <= float(hardness_hrc) <= HRC_RANGE[1]):
        raise InputError("hardness_hrc", hardness_hrc,
                         f"a number in [{HRC_RANGE[0]:g}, {HRC_RANGE[1]:g}] HRC (the span of the tensile-strength "
                         "column of ASTM A370 Table 3)", _CONTEXT)
    if g.family not in QT_FAMILIES:
        raise InputError("hardness_hrc", hardness_hrc,
                         f"a hardness only for a hardenable non-austenitic steel ({', '.join(QT_FAMILIES)}); "
                         f"{g.id} is {g.family}: give a route instead", _CONTEXT)
    hv = conversions.hrc_to_hv(float(hardness_hrc))
    uts = float(conversions.hv_to_uts_mpa(hv))
    temps = np.linspace(*TEMPER_RANGE_C, 11)
    ys = float(np.min(yield_from_uts(np.full(temps.shape, uts), temps, g.family)))
    return {"uts_mpa": uts, "yield_mpa": ys,
            "strength_basis": (f"{float(hardness_hrc):g} HRC -> {uts:.0f} MPa tensile (ASTM E140 Table 1 / A370 "
                               f"Table 3); yield {ys:.0f} MPa from the Q&T correlation, lowest over tempering "
                               f"{TEMPER_RANGE_C[0]:g}-{TEMPER_RANGE_C[1]:g} °C")}


def _strength_from_route(g, route, diameter_mm) -> dict:
    r = evaluate(g.id, route, diameter_mm=float(diameter_mm))
    uts, ys = r.get("uts_mpa_lo"), r.get("yield_mpa_lo")
    if uts is None or ys is None:
        raise InputError("route", r["route_text"], "a route whose tensile and yield strength are estimated "
                         f"at this section (here: {'; '.join(r['warnings']) or 'no estimate'})", _CONTEXT)
    return {"uts_mpa": float(uts), "yield_mpa": float(ys), "route_text": r["route_text"],
            "warnings": r["warnings"],
            "strength_basis": (f"{r['route_text']} at {float(diameter_mm):g} mm: lower edge of the 90 % "
                               f"prediction band, tensile {uts:.0f} MPa, yield {ys:.0f} MPa")}


def pin_capacity(grade, route, diameter_mm, gap_mm, lug_thickness_mm, clevis_thickness_mm,
                 shear_planes: int = 2, safety_factor=2.0, hardness_hrc=None, *,
                 load_model: str = "uniform", bearing_factor=1.0) -> dict:
    """Allowable load of a clevis pin in shear, bending and bearing, and the governing mode.

    Parameters
    ----------
    grade : str
        Catalogue id or designation (``"4130"``, ``"G41300"``).
    route : list of dict or None
        Process route (as :func:`selector.evaluate`); ``None`` with ``hardness_hrc``.
    diameter_mm, gap_mm, lug_thickness_mm, clevis_thickness_mm, shear_planes, load_model
        As :func:`selector.design.pins.pin_stresses` (mm).
    safety_factor : float
        Divides every allowable stress, 1 to 10.
    hardness_hrc : float, optional
        The hardness the drawing specifies (use the bottom of a range), HRC 20–59; only
        with ``route=None``.
    bearing_factor : float
        Allowed bearing stress / yield, 0.5 to 3 (default 1.0, as :func:`pin_targets`).

    Returns
    -------
    dict
        ``shear_kn``, ``shear_lbf``, ``bending_kn``, ``bending_lbf``, ``bearing_kn``,
        ``bearing_lbf``, ``governing`` (``"shear"``, ``"bending"`` or ``"bearing"``),
        ``load_kn``, ``load_lbf`` (the governing, allowable load); also ``uts_mpa``,
        ``yield_mpa`` (the strengths used), ``strength_basis``, ``shear_to_tensile``,
        ``safety_factor``, ``stresses_per_kn`` and ``notice``.

    Raises
    ------
    InputError
        Neither or both of ``route`` and ``hardness_hrc``; a hardness outside HRC 20–59
        or on a grade the conversion does not cover; bad geometry (as ``pin_stresses``).

    Example
    -------
    1 in. 4130 at 26.5 HRC, double shear, SF 1: ``shear_lbf`` about 119 000 (>= 116 260).
    """
    g = default_catalogue().lookup(grade)
    if (route is None) == (hardness_hrc is None):
        raise InputError("route/hardness_hrc", {"route": route, "hardness_hrc": hardness_hrc},
                         "exactly one of a route or a specified hardness_hrc (with route=None)", _CONTEXT)
    sf = inputs.number("safety_factor", safety_factor, 1.0, 10.0, _CONTEXT)     # one number, not an array
    kb = inputs.number("bearing_factor", bearing_factor, 0.5, 3.0, _CONTEXT)
    unit = pin_stresses(load_kn=1.0, diameter_mm=diameter_mm, shear_planes=shear_planes, gap_mm=gap_mm,
                        lug_thickness_mm=lug_thickness_mm, clevis_thickness_mm=clevis_thickness_mm,
                        load_model=load_model)
    strength = (_strength_from_hardness(g, hardness_hrc) if route is None
                else _strength_from_route(g, route, diameter_mm))
    k_shear, k_src, k_conf = SHEAR_TO_TENSILE[_FAMILY_CLASS[g.family]]
    kn = {"shear": k_shear * strength["uts_mpa"] / (sf * unit["shear_mpa"]),
          "bending": strength["yield_mpa"] / (sf * unit["bending_mpa"]),
          "bearing": kb * strength["yield_mpa"] / (sf * unit["bearing_mpa"])}
    governing = min(MODES, key=kn.get)
    out = {}
    for mode in MODES:
        out[f"{mode}_kn"] = kn[mode]
        out[f"{mode}_lbf"] = kn[mode] * 1000.0 / LBF_TO_N
    out.update({"governing": governing, "load_kn": kn[governing], "load_lbf": kn[governing] * 1000.0 / LBF_TO_N,
                "grade": g.id, "uts_mpa": strength["uts_mpa"], "yield_mpa": strength["yield_mpa"],
                "strength_basis": strength["strength_basis"], "warnings": strength.get("warnings", []),
                "shear_to_tensile": {"ratio": k_shear, "source": k_src, "confidence": k_conf},
                "safety_factor": sf, "bearing_factor": kb, "shear_planes": unit["shear_planes"],
                "load_model": unit["load_model"],
                "stresses_per_kn": {"shear_mpa": unit["shear_mpa"], "bending_mpa": unit["bending_mpa"],
                                    "bearing_mpa": unit["bearing_mpa"]},
                "formulas": unit["formulas"], "notice": NOTICE})
    return out
