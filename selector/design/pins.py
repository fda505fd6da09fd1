"""From a clevis-pin load case to strength targets for the selection engine.

A clevis pin joins a lug (the eye of a rod or link) to a clevis (the fork).  In
**double shear** (``shear_planes=2``) the lug of thickness ``t_l`` sits between
the two arms of the clevis, each of thickness ``t_c``, with a gap ``g`` on each
side; the pin crosses two shear planes.  In **single shear** (``shear_planes=1``)
the pin joins two members, one of thickness ``t_l`` and one of thickness
``t_c``, across one shear plane with a gap ``g`` between them.

Stresses (elementary strength of materials; Budynas & Nisbett 2015, ch. 3)::

    A  = pi d^2 / 4                 shear area of one plane, mm^2
    Z  = pi d^3 / 32                elastic section modulus of the round pin, mm^3
    tau     = F / (n A)             mean shear stress over n shear planes
    sigma_b = M / Z = 32 M / (pi d^3)
    p       = F_member / (d t)      bearing stress on the projected area

Bending moment, by load model (``load_model``):

* ``"uniform"`` (default) — the usual clevis-pin model: the pin is a beam loaded
  by bearing pressures **uniformly distributed over each member's thickness**.
  Double shear: the lug pushes ``F`` spread over ``t_l``; each clevis arm reacts
  ``F/2`` spread over ``t_c``.  The largest moment is at mid-span::

      M = F/2 (t_l/2 + g + t_c/2) - F/2 (t_l/4) = F (t_l + 4 g + 2 t_c) / 8

* ``"concentrated"`` — the loads act at the centres of the bearing lengths; the
  pin is a simply supported beam of span ``s = t_l + 2 g + t_c`` with a central
  load: ``M = F s / 4``.  It exceeds the uniform model by ``F t_l / 8`` and is the
  more conservative first-pass check.

* Single shear (either model): the pin is taken as **clamped in the lug member**
  (press-fit, or a headed pin drawn tight) and loaded as a cantilever by the
  other member, with the load at the centre of its bearing length:
  ``M = F (g + t_c / 2)``.  A loose single-shear pin tilts and its bearing
  pressures redistribute; the cantilever value is an upper bound for it.

Targets (:func:`pin_targets`) multiply each stress by the safety factor ``SF``::

    min_yield_mpa = SF * max(sigma_b, sqrt(3) tau, p / k_bearing)
    min_uts_mpa   = SF * tau / k_shear

* ``sqrt(3) tau`` is the von Mises equivalent of pure shear (shear yield
  = yield / sqrt(3)); bending and shear peak at different points of the section
  (outer fibre at mid-span; neutral axis at the shear planes), so they are
  checked separately, which is the usual convention.
* ``k_bearing`` (default 1.0) lets the bearing stress reach the tensile yield
  strength; 1.0 is the conservative convention for a pin (common practice).
* ``k_shear`` is the ratio of ultimate shear to ultimate tensile strength:
  0.60 for steels (common practice), with documented values for the other
  material classes in :data:`SHEAR_TO_TENSILE`.

Not checked here (the lug and clevis are not the pin): net-section tension,
shear tear-out and hoop stress of the lug, dishing, fatigue, impact, fretting,
cotter-pin holes and retaining hardware, clearance and misfit.  Elementary
beam theory overstates the bending of a very short pin (span below about one
diameter), which errs on the safe side.

Results are estimates for preliminary selection.  The final choice needs
certified material test reports, the applicable design code and review by a
qualified engineer.

References
----------
R.G. Budynas and J.K. Nisbett, *Shigley's Mechanical Engineering Design*, 10th ed.,
McGraw-Hill, 2015, ch. 3 (direct shear, bending of beams, bearing); the
distributed-load clevis-pin model appears there among the worked problems
(chapter and problem number from memory).
E.F. Bruhn, *Analysis and Design of Flight Vehicle Structures*, Jacobs, 1973, §D1
(lug and pin analysis: pin bending with distributed bearing loads; from memory).
machinecalcs.com/clevis-pin-calculator (read 2025): the concentrated model
``M = F s / 4`` with a worked example used in tests/test_pins.py.
NIST SP 811 (2008), Appendix B.9: 1 lbf = 4.448 221 615 260 5 N (exact).
"""
from __future__ import annotations

import math

import numpy as np

from .. import inputs
from ..errors import InputError, check_choice
from ..models.conversions import N_PER_LBF

#: newtons per pound-force (:data:`selector.models.conversions.N_PER_LBF`)
LBF_TO_N = N_PER_LBF

#: ultimate shear / ultimate tensile strength by material class: (ratio, source, confidence)
SHEAR_TO_TENSILE = {
    "steel": (0.60, "shear strength about 0.6 x tensile strength for steels", "common practice"),
    "aluminium": (0.60, "MMPDS Fsu/Ftu for 2024-T3, 6061-T6, 7075-T6 lie about 0.60-0.65; "
                        "the low end is used", "from memory"),
    "copper_alloy": (0.60, "handbook shear/tensile ratios of wrought brasses and bronzes "
                           "about 0.6-0.7; the low end is used", "from memory"),
    "titanium": (0.60, "MMPDS Fsu/Ftu for annealed Ti-6Al-4V about 0.6-0.65; the low end "
                       "is used", "from memory"),
    "nickel_alloy": (0.60, "handbook shear/tensile ratios of wrought nickel alloys about 0.6-0.65; "
                           "the low end is used", "from memory"),
}

#: material classes accepted by :func:`pin_targets`; a catalogue family maps to its class
MATERIAL_CLASSES = tuple(SHEAR_TO_TENSILE)
_FAMILY_CLASS = {
    "carbon_steel": "steel", "alloy_steel": "steel", "carburizing_steel": "steel",
    "nitriding_steel": "steel", "stainless_austenitic": "steel",
    "stainless_martensitic": "steel", "stainless_ph": "steel",
    "aluminium": "aluminium", "copper_alloy": "copper_alloy", "titanium": "titanium",
    "tool_steel": "steel", "maraging_steel": "steel", "stainless_duplex": "steel",
    "nickel_alloy": "nickel_alloy",
}

LOAD_MODELS = ("uniform", "concentrated")

#: shown by every view that reports results
NOTICE = ("Results are estimates for preliminary selection. The final choice needs "
          "certified material test reports, the applicable design code and review "
          "by a qualified engineer.")

#: the worked demo of docs/demo.md (an INVENTED company and part; demo data only).
#: The page uses it as its default; tests/test_pins.py checks it against docs/demo.md.
DEMO_CASE = {
    "company": "Fenwick Moor Implements Ltd (invented)",
    "part": "FM-31 top-link hitch pin (invented)",
    "load_kn": 60.0,
    "diameter_mm": 25.0,
    "shear_planes": 2,
    "safety_factor": 2.0,
    "gap_mm": 1.5,
    "lug_thickness_mm": 38.0,
    "clevis_thickness_mm": 16.0,
    "wear_surface_hardness_hrc": 50.0,
    "plated": True,
    "plating": "zinc plated",
    "mating_material": "structural steel",
    "environment": "harsh",
    "service_temp_c": 60.0,
    "sweep_diameters_mm": [20.0, 22.0, 25.0, 28.0, 30.0, 32.0, 36.0, 40.0],
}

#: the keys of DEMO_CASE that :func:`pin_targets` takes
DEMO_PIN_KEYS = ("load_kn", "diameter_mm", "shear_planes", "safety_factor", "gap_mm", "lug_thickness_mm",
                 "clevis_thickness_mm", "wear_surface_hardness_hrc")

_CONTEXT = "clevis pin"

#: largest load accepted, kN (1 GN: far beyond any pin; keeps every stress finite)
MAX_LOAD_KN = 1e6
#: smallest pin diameter and member thickness accepted, mm (keeps every stress finite)
MIN_DIAMETER_MM = 0.1
MIN_THICKNESS_MM = 0.1


def _positive(field: str, value, allow_zero: bool = False, hi: float | None = None,
              lo: float | None = None) -> np.ndarray:
    """``value`` as a float array if every element is finite and > 0 (>= 0 with
    ``allow_zero``; >= ``lo`` when given) and <= ``hi``; else :class:`InputError`."""
    lo_txt = f">= {lo:g}" if lo is not None else ">= 0" if allow_zero else "> 0"
    allowed = f"a finite number {lo_txt}" + (f" and <= {hi:g}" if hi is not None else "")
    if value is None or isinstance(value, (bool, np.bool_, str, bytes)):
        raise InputError(field, value, allowed, _CONTEXT)
    try:
        arr = np.asarray(value, dtype=float)
    except (TypeError, ValueError, OverflowError, RecursionError):
        raise InputError(field, value, allowed, _CONTEXT) from None
    if arr.size == 0 or arr.ndim > 1:
        raise InputError(field, value, allowed + " (a number, or a flat list of numbers)", _CONTEXT)
    ok = np.isfinite(arr) & ((arr >= 0) if allow_zero else (arr > 0))
    if lo is not None:
        ok &= arr >= lo
    if hi is not None:
        ok &= arr <= hi
    if not np.all(ok):
        bad = arr[~ok] if arr.ndim else arr
        shown = float(np.ravel(bad)[0]) if np.size(bad) else value
        raise InputError(field, shown, allowed, _CONTEXT)
    return arr


def _load_n(load_kn, load_lbf) -> np.ndarray:
    if (load_kn is None) == (load_lbf is None):
        raise InputError("load_kn/load_lbf", {"load_kn": load_kn, "load_lbf": load_lbf},
                         "exactly one of load_kn or load_lbf", _CONTEXT)
    if load_kn is not None:
        return _positive("load_kn", load_kn, hi=MAX_LOAD_KN) * 1000.0
    return _positive("load_lbf", load_lbf, hi=MAX_LOAD_KN * 1000.0 / LBF_TO_N) * LBF_TO_N


def _shear_planes(n) -> int:
    if not inputs.is_number(n) or inputs.as_float(n) not in (1.0, 2.0):
        raise InputError("shear_planes", n, "1 (single shear) or 2 (double shear)", _CONTEXT)
    return int(inputs.as_float(n))


def pin_stresses(load_kn=None, diameter_mm=None, shear_planes: int = 2, gap_mm=0.0,
                 lug_thickness_mm=None, clevis_thickness_mm=None, load_lbf=None,
                 load_model: str = "uniform") -> dict:
    """Shear, bending and bearing stresses of a clevis pin (elementary beam model).

    Equations (see the module docstring for the load distribution)::

        tau     = F / (n pi d^2 / 4)
        sigma_b = 32 M / (pi d^3)
        double shear: M = F (t_l + 4 g + 2 t_c) / 8   (uniform)
                      M = F (t_l + 2 g + t_c) / 4     (concentrated)
        single shear: M = F (g + t_c / 2)             (pin clamped in the lug member)
        bearing: double  p_l = F / (d t_l), p_c = F / (2 d t_c)
                 single  p_l = F / (d t_l), p_c = F / (d t_c)

    Parameters
    ----------
    load_kn : float or array, optional
        Load carried by the joint, kN.  Exactly one of ``load_kn``/``load_lbf``.
    diameter_mm : float or array
        Pin diameter, mm (> 0).
    shear_planes : int
        1 (single shear) or 2 (double shear).
    gap_mm : float or array
        Gap between the lug and each clevis arm, mm (>= 0).
    lug_thickness_mm : float or array
        Thickness of the lug (the middle member in double shear; the member the pin
        is clamped in, in single shear), mm.
    clevis_thickness_mm : float or array
        Thickness of one clevis arm (double shear) or of the other member
        (single shear), mm.
    load_lbf : float or array, optional
        Load in pound-force (converted with 1 lbf = 4.4482216152605 N).
    load_model : str
        ``"uniform"`` (bearing pressure uniform over each thickness) or
        ``"concentrated"`` (loads at the bearing centres); double shear only.

    Returns
    -------
    dict
        ``load_n`` (N), ``shear_mpa``, ``bending_mpa``, ``bearing_mpa`` (the larger
        of ``bearing_lug_mpa`` and ``bearing_clevis_mpa``), ``moment_nmm`` (N mm),
        ``area_mm2``, ``section_modulus_mm3``, ``shear_planes``, ``load_model``,
        ``formulas`` (dict of str) and ``assumptions`` (list of str).  Arrays
        broadcast over the array arguments.

    Validity
    --------
    Elastic, elementary beam theory; static load; the pin fits the holes with
    small clearance.  Not a lug check (net section, tear-out, hoop stress).

    References
    ----------
    Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 10th ed. (2015),
    ch. 3; Bruhn (1973) §D1 (both from memory for the clevis-pin distribution).
    """
    f = _load_n(load_kn, load_lbf)
    d = _positive("diameter_mm", diameter_mm, hi=2000.0, lo=MIN_DIAMETER_MM)
    n = _shear_planes(shear_planes)
    g = _positive("gap_mm", gap_mm, allow_zero=True, hi=2000.0)
    tl = _positive("lug_thickness_mm", lug_thickness_mm, hi=2000.0, lo=MIN_THICKNESS_MM)
    tc = _positive("clevis_thickness_mm", clevis_thickness_mm, hi=2000.0, lo=MIN_THICKNESS_MM)
    model = check_choice("load_model", load_model, LOAD_MODELS, _CONTEXT)

    area = math.pi * d ** 2 / 4.0
    z = math.pi * d ** 3 / 32.0
    tau = f / (n * area)
    if n == 2:
        if model == "uniform":
            m = f * (tl + 4.0 * g + 2.0 * tc) / 8.0
            m_txt = "M = F (t_l + 4 g + 2 t_c) / 8"
            dist = ("double shear, bearing pressure uniform over the lug thickness (load F) "
                    "and over each clevis arm (reaction F/2); maximum moment at mid-span")
        else:
            m = f * (tl + 2.0 * g + tc) / 4.0
            m_txt = "M = F (t_l + 2 g + t_c) / 4"
            dist = ("double shear, loads concentrated at the bearing centres: simply supported "
                    "beam of span t_l + 2 g + t_c with a central load (conservative)")
        p_l = f / (d * tl)
        p_c = f / (2.0 * d * tc)
        p_txt = "p_l = F / (d t_l); p_c = F / (2 d t_c)"
    else:
        m = f * (g + tc / 2.0)
        m_txt = "M = F (g + t_c / 2)"
        dist = ("single shear, pin clamped in the lug member and loaded as a cantilever by "
                "the other member at the centre of its bearing length (upper bound)")
        p_l = f / (d * tl)
        p_c = f / (d * tc)
        p_txt = "p_l = F / (d t_l); p_c = F / (d t_c)"
    sigma_b = m / z
    bearing = np.maximum(p_l, p_c)

    def out(x):
        return float(x) if np.ndim(x) == 0 else x

    return {
        "load_n": out(f), "shear_mpa": out(tau), "bending_mpa": out(sigma_b),
        "bearing_mpa": out(bearing), "bearing_lug_mpa": out(p_l), "bearing_clevis_mpa": out(p_c),
        "moment_nmm": out(m), "area_mm2": out(area), "section_modulus_mm3": out(z),
        "shear_planes": n, "load_model": model,
        "formulas": {"shear": f"tau = F / ({n} pi d^2 / 4)",
                     "bending": "sigma_b = 32 M / (pi d^3); " + m_txt,
                     "bearing": p_txt},
        "assumptions": [dist,
                        "mean shear stress over the pin section (no shear-stress peak factor)",
                        "elastic elementary beam theory; static load",
                        "lug and clevis strength (net section, tear-out) not checked"],
    }


def _ndim(v) -> int:
    try:
        return int(np.ndim(v))
    except (TypeError, ValueError, OverflowError, RecursionError):
        return -1


def _material_class(material_class) -> str:
    allowed = MATERIAL_CLASSES + tuple(f for f in _FAMILY_CLASS if f not in MATERIAL_CLASSES)
    name = check_choice("material_class", material_class, allowed, _CONTEXT)
    return _FAMILY_CLASS.get(name, name)


def pin_targets(load_kn=None, diameter_mm=None, shear_planes: int = 2, safety_factor=2.0,
                gap_mm=0.0, lug_thickness_mm=None, clevis_thickness_mm=None, load_lbf=None,
                wear_surface_hardness_hrc=None, material_class: str = "steel",
                load_model: str = "uniform", bearing_factor=1.0) -> dict:
    """Yield, tensile (and surface-hardness) targets for a clevis pin.

    Equations::

        min_yield_mpa = SF * max(sigma_b, sqrt(3) tau, p / k_bearing)
        min_uts_mpa   = SF * tau / k_shear       (k_shear = 0.60 for steels)

    with ``tau``, ``sigma_b`` and ``p`` from :func:`pin_stresses`.

    Parameters
    ----------
    load_kn, diameter_mm, shear_planes, gap_mm, lug_thickness_mm,
    clevis_thickness_mm, load_lbf, load_model
        As in :func:`pin_stresses` (scalars here: one load case).
    safety_factor : float
        Factor applied to every stress, 1 to 10 (default 2.0).
    wear_surface_hardness_hrc : float, optional
        If given, the minimum surface hardness for wear, HRC (20 to 70); it is
        passed through as ``min_surface_hardness_hrc``.
    material_class : str
        ``steel``, ``aluminium``, ``copper_alloy`` or ``titanium`` (or a catalogue
        family, which maps to its class); sets ``k_shear``.
    bearing_factor : float
        ``k_bearing``: allowed bearing stress / tensile yield, 0.5 to 3 (default 1.0,
        the conservative convention).

    Returns
    -------
    dict
        ``min_yield_mpa`` and ``min_uts_mpa`` (and ``min_surface_hardness_hrc`` when
        wear is asked): the keys the selection engine accepts.  Nothing else, so
        the dict can be passed straight to ``select``; the stresses and the
        governing mode come from :func:`pin_report`.

    References
    ----------
    Shear/tensile ratio 0.6 for steels: common practice.  Von Mises shear yield
    ``sigma_y / sqrt(3)``: von Mises (1913).  See :data:`SHEAR_TO_TENSILE` for the
    other classes.
    """
    return pin_report(load_kn=load_kn, diameter_mm=diameter_mm, shear_planes=shear_planes,
                      safety_factor=safety_factor, gap_mm=gap_mm,
                      lug_thickness_mm=lug_thickness_mm, clevis_thickness_mm=clevis_thickness_mm,
                      load_lbf=load_lbf, wear_surface_hardness_hrc=wear_surface_hardness_hrc,
                      material_class=material_class, load_model=load_model,
                      bearing_factor=bearing_factor)["targets"]


def pin_report(load_kn=None, diameter_mm=None, shear_planes: int = 2, safety_factor=2.0,
               gap_mm=0.0, lug_thickness_mm=None, clevis_thickness_mm=None, load_lbf=None,
               wear_surface_hardness_hrc=None, material_class: str = "steel",
               load_model: str = "uniform", bearing_factor=1.0) -> dict:
    """The targets of :func:`pin_targets` with their working (same equations).

    Parameters
    ----------
    load_kn, diameter_mm, shear_planes, safety_factor, gap_mm, lug_thickness_mm,
    clevis_thickness_mm, load_lbf, wear_surface_hardness_hrc, material_class,
    load_model, bearing_factor
        As in :func:`pin_targets`.

    Returns
    -------
    dict
        ``targets`` (the dict of :func:`pin_targets`), ``stresses`` (from
        :func:`pin_stresses`), ``governing`` (``"bending"``, ``"shear"`` or
        ``"bearing"``: the mode that sets the yield target), ``yield_candidates_mpa``
        (SF x each mode's yield demand), ``material_class``, ``shear_to_tensile``
        (ratio, source, confidence), ``safety_factor``, ``bearing_factor`` and
        ``notice``.

    References
    ----------
    As :func:`pin_targets` and :func:`pin_stresses`.
    """
    for name, v in (("load_kn", load_kn), ("load_lbf", load_lbf), ("diameter_mm", diameter_mm),
                    ("gap_mm", gap_mm), ("lug_thickness_mm", lug_thickness_mm),
                    ("clevis_thickness_mm", clevis_thickness_mm), ("safety_factor", safety_factor),
                    ("bearing_factor", bearing_factor), ("wear_surface_hardness_hrc", wear_surface_hardness_hrc)):
        if v is not None and not isinstance(v, (str, bytes)) and _ndim(v) != 0:
            raise InputError(name, v, "a single number (one load case; use pin_stresses for arrays)",
                             _CONTEXT)
    sf = _positive("safety_factor", safety_factor, hi=10.0)
    if float(sf) < 1.0:
        raise InputError("safety_factor", safety_factor, "a number in [1, 10]", _CONTEXT)
    kb = _positive("bearing_factor", bearing_factor, hi=3.0)
    if float(kb) < 0.5:
        raise InputError("bearing_factor", bearing_factor, "a number in [0.5, 3]", _CONTEXT)
    cls = _material_class(material_class)
    k_shear, k_src, k_conf = SHEAR_TO_TENSILE[cls]
    s = pin_stresses(load_kn=load_kn, diameter_mm=diameter_mm, shear_planes=shear_planes,
                     gap_mm=gap_mm, lug_thickness_mm=lug_thickness_mm,
                     clevis_thickness_mm=clevis_thickness_mm, load_lbf=load_lbf,
                     load_model=load_model)
    sf = float(sf)
    demands = {"bending": sf * s["bending_mpa"],
               "shear": sf * math.sqrt(3.0) * s["shear_mpa"],
               "bearing": sf * s["bearing_mpa"] / float(kb)}
    governing = max(demands, key=demands.get)
    targets = {"min_yield_mpa": demands[governing],
               "min_uts_mpa": sf * s["shear_mpa"] / k_shear}
    if not all(math.isfinite(v) and v >= 0 for v in targets.values()):   # guarded by the caps above
        raise InputError("load_kn/diameter_mm", {"load_n": s["load_n"], "diameter_mm": diameter_mm},
                         "a load case whose stresses are finite", _CONTEXT)
    if wear_surface_hardness_hrc is not None:
        h = _positive("wear_surface_hardness_hrc", wear_surface_hardness_hrc, hi=70.0)
        if np.ndim(h) != 0 or float(h) < 20.0:
            raise InputError("wear_surface_hardness_hrc", wear_surface_hardness_hrc,
                             "a number in [20, 70] HRC (the Rockwell C scale)", _CONTEXT)
        targets["min_surface_hardness_hrc"] = float(h)
    return {"targets": targets, "stresses": s, "governing": governing,
            "yield_candidates_mpa": demands, "material_class": cls,
            "shear_to_tensile": {"ratio": k_shear, "source": k_src, "confidence": k_conf},
            "safety_factor": sf, "bearing_factor": float(kb), "notice": NOTICE}
