"""Hardness of martensite, bainite and ferrite–pearlite from composition and cooling rate (Maynier et al. 1978).

    HV_M  = 127 + 949C + 27Si + 11Mn + 8Ni + 16Cr + 21 log Vr
    HV_B  = −323 + 185C + 330Si + 153Mn + 65Ni + 144Cr + 191Mo
            + (89 + 53C − 55Si − 22Mn − 10Ni − 20Cr − 33Mo) log Vr
    HV_FP = 42 + 223C + 53Si + 30Mn + 12.6Ni + 7Cr + 19Mo + (10 − 19Si + 4Ni + 8Cr + 130V) log Vr
    HV    = X_M HV_M + X_B HV_B + X_FP HV_FP

Vr is the cooling rate at 700 °C in °C/h, log base 10.  The mixture rule is
confirmed in a quoted excerpt; the coefficients are recalled (confidence from memory) and were sanity-checked on a 4140-like steel.

References
----------
Ph. Maynier, B. Jungmann, J. Dollet, "Creusot-Loire system for the prediction of the
mechanical properties of low alloy steels", in *Hardenability Concepts with
Applications to Steel*, eds. D.V. Doane and J.S. Kirkaldy, TMS-AIME 1978, pp. 518–545.
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import CONFIDENCE, Column, Schema, read_table
from ..errors import DataFileError, InputError
from .composition import el
from . import conversions, validity
from .martensite import ih_hrc

validity.register("maynier_1978", {"C": (0.0, 0.5, "wt%"), "Si": (0.0, 1.0, "wt%"), "Mn": (0.0, 2.0, "wt%"),
                                   "Ni": (0.0, 4.0, "wt%"), "Cr": (0.0, 3.0, "wt%"), "Mo": (0.0, 1.0, "wt%"),
                                   "V": (0.0, 0.2, "wt%")},
                  "Maynier, Jungmann & Dollet (1978), stated ranges (from memory)")


def phase_hardness_hv(comp, cooling_rate_c_s):
    """Vickers hardness of martensite, bainite and ferrite–pearlite (Maynier et al. 1978).

    Parameters
    ----------
    comp : mapping
        Element → wt %.
    cooling_rate_c_s : array_like
        Cooling rate at 700 °C, °C/s (> 0); converted to °C/h.

    Returns
    -------
    tuple of ndarray
        (HV_M, HV_B, HV_FP), broadcast of the inputs.

    Validity
    --------
    ``maynier_1978``: low-alloy steels, C ≤ 0.5, Si ≤ 1, Mn ≤ 2, Ni ≤ 4, Cr ≤ 3, Mo ≤ 1, V ≤ 0.2 %.

    References
    ----------
    Maynier, Jungmann & Dollet, TMS-AIME 1978, pp. 518–545 (coefficients from memory).

    Example (from the source: hand evaluation of Maynier, Jungmann & Dollet (1978) (coefficients
    from memory) for 0.40C-0.25Si-0.85Mn-1.0Cr-0.20Mo at 1e4 °C/h: martensite 623, bainite 350,
    ferrite-pearlite 234 HV)

    >>> s = {"C": 0.40, "Si": 0.25, "Mn": 0.85, "Cr": 1.0, "Mo": 0.20}
    >>> [round(float(x)) for x in phase_hardness_hv(s, 1e4 / 3600.0)]
    [623, 350, 234]
    """
    r = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(r)) or np.any(r <= 0):
        raise InputError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    lv = np.log10(3600.0 * r)
    c, si, mn, ni, cr, mo, v = (el(comp, e) for e in ("C", "Si", "Mn", "Ni", "Cr", "Mo", "V"))
    hv_m = 127 + 949 * c + 27 * si + 11 * mn + 8 * ni + 16 * cr + 21 * lv
    # the cooling-rate coefficients are held at >= 0: outside the fitted range (e.g. Si ~2 % of 9255) they
    # turn negative and slower cooling would harden the constituent, which no steel does (common practice)
    hv_b = (-323 + 185 * c + 330 * si + 153 * mn + 65 * ni + 144 * cr + 191 * mo
            + np.maximum(89 + 53 * c - 55 * si - 22 * mn - 10 * ni - 20 * cr - 33 * mo, 0.0) * lv)
    hv_fp = (42 + 223 * c + 53 * si + 30 * mn + 12.6 * ni + 7 * cr + 19 * mo
             + np.maximum(10 - 19 * si + 4 * ni + 8 * cr + 130 * v, 0.0) * lv)
    return hv_m, hv_b, hv_fp


def mixture_hv(fractions, hardnesses):
    """Rule of mixtures HV = Σ X_i HV_i over the phases (fractions normalised to their sum).

    Example (illustrative: a value of this implementation, not a published one)

    >>> float(mixture_hv([0.5, 0.5], [600.0, 300.0]))
    450.0
    """
    f = [np.asarray(x, float) for x in fractions]
    tot = sum(f)
    return sum(x * h for x, h in zip(f, hardnesses)) / np.where(tot > 0, tot, 1.0)


#: activation enthalpy of Maynier's tempering parameter, J/mol (about 100 kcal/mol; from memory)
MAYNIER_DH_J_MOL = 418_000.0
R_J_MOLK = 8.314


def maynier_tempering_parameter_k(temp_c, hours):
    """Maynier et al. (1978) tempering parameter, K.

    Pa = [1/T − (R/ΔH)·ln(t/t0)]⁻¹,   T in K, t in h, t0 = 1 h, ΔH ≈ 418 kJ/mol

    so that Pa equals T for a 1 h temper.

    Parameters
    ----------
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h (> 0).

    Returns
    -------
    ndarray
        Pa, K.

    References
    ----------
    Maynier, Jungmann & Dollet, TMS-AIME 1978, pp. 518–545 (form and ΔH from memory,
    low confidence).

    Example (from the source: Maynier et al. (1978), Pa = [1/T - (R/dH) ln(t/t0)]^-1 with t0 = 1
    h: 1 h at 540 °C gives Pa = T = 813.15 K)

    >>> round(float(maynier_tempering_parameter_k(540.0, 1.0)), 2)
    813.15
    """
    t = np.asarray(temp_c, float) + 273.15
    h = np.asarray(hours, float)
    if np.any(h <= 0) or np.any(np.isinf(h)):
        raise InputError("hours", hours, "finite times > 0 h (NaN for none)")
    return 1.0 / (1.0 / t - (R_J_MOLK / MAYNIER_DH_J_MOL) * np.log(h))


def tempered_bainite_hv(comp, temp_c, hours):
    """Hardness of tempered bainite (Maynier et al. 1978).

    HV = 262 + 162C − 349Si − 64Mn − 6Ni − 186Cr − 458Mo − 857V
         + (1000/Pa)·(−149 + 43C + 336Si + 79Mn + 16Ni + 196Cr + 498Mo + 1094V)

    with Pa the tempering parameter of :func:`maynier_tempering_parameter_k`; where the
    bracket is negative (lean C–Mn steels) it is held at 0, so the hardness never rises
    with the tempering parameter.  Bainite
    softens much less than martensite: the route takes the smaller of this value and
    the as-quenched bainite hardness of :func:`phase_hardness_hv` (tempering never
    hardens a bainite of these steels), see :mod:`selector.models.structure_tempering`.

    Parameters
    ----------
    comp : mapping
        Element → wt % (uses C, Si, Mn, Ni, Cr, Mo, V).
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h (> 0).

    Returns
    -------
    ndarray
        HV.

    Validity
    --------
    ``maynier_1978`` (low-alloy steels, C ≤ 0.5 %).

    References
    ----------
    Maynier, Jungmann & Dollet, TMS-AIME 1978, pp. 518–545 (coefficients from memory,
    low confidence).

    Examples
    --------
    0.40C-0.25Si-0.85Mn-1.0Cr-0.20Mo, 1 h at 540 °C: about 290 HV (derived from the
    equation; the as-quenched bainite of the same steel at 10⁴ °C/h is about 350 HV).

    Example (from the source: hand evaluation of the Maynier et al. (1978) tempered-bainite
    equation (coefficients from memory), same steel, 1 h at 540 °C: 294.9 HV)

    >>> s = {"C": 0.40, "Si": 0.25, "Mn": 0.85, "Cr": 1.0, "Mo": 0.20}
    >>> round(float(tempered_bainite_hv(s, 540.0, 1.0)), 1)
    294.9
    """
    pa = maynier_tempering_parameter_k(temp_c, hours)
    c, si, mn, ni, cr, mo, v = (el(comp, e) for e in ("C", "Si", "Mn", "Ni", "Cr", "Mo", "V"))
    a = 262 + 162 * c - 349 * si - 64 * mn - 6 * ni - 186 * cr - 458 * mo - 857 * v
    b = -149 + 43 * c + 336 * si + 79 * mn + 16 * ni + 196 * cr + 498 * mo + 1094 * v
    # a negative slope (lean C-Mn steels without Si, Cr, Mo) would harden the bainite as the
    # temper rises: held at 0 there, so the result never rises with the tempering parameter
    return a + (1000.0 / pa) * np.maximum(b, 0.0)


# --------------------------------------------------------------------------- isothermal bainite
#: carbon of the eutectoid steel of the reference curve (data/isothermal_bainite_hardness.csv), wt %
ISO_REFERENCE_C = 0.79

_ISO_SCHEMA = Schema((Column("temp_c", "float", lo=100, hi=700), Column("hardness_hrc", "float", lo=10, hi=70),
                      Column("source"), Column("confidence", "choice", choices=CONFIDENCE)))

validity.register("isothermal_bainite", {"temp_c": (250.0, 550.0, "°C"), "C": (0.35, 1.05, "wt%")},
                  "eutectoid reference curve, US Steel Atlas of Isothermal Transformation Diagrams (1951), "
                  "from memory; carbon scaling by the martensite hardness (ASTM A255 IH)")


@functools.cache
def _iso_curve():
    t = read_table("isothermal_bainite_hardness.csv", _ISO_SCHEMA).sort_values("temp_c")
    temps = t["temp_c"].to_numpy(float)
    if np.any(np.diff(temps) <= 0):
        raise DataFileError("isothermal_bainite_hardness.csv", None, "temp_c", "temperatures must be distinct")
    return temps, np.asarray(conversions.hrc_to_hv(t["hardness_hrc"].to_numpy(float)), float)


def isothermal_bainite_hv(comp, temp_c):
    """Hardness of bainite formed isothermally at ``temp_c`` (upper and lower bainite of an
    austempering bath), HV.

        HV_B,iso(C, T) = HV_eut(T) · HV_M(C) / HV_M(0.79)

    HV_eut(T) is the hardness of a plain eutectoid steel after complete transformation at T
    (``data/isothermal_bainite_hardness.csv``: the hardness scale of the eutectoid diagram of
    the US Steel *Atlas of Isothermal Transformation Diagrams*, 1951, values recalled, from
    memory), interpolated linearly in HV; outside the tabulated 250–550 °C it is held at the
    end values.  HV_M(C) is the as-quenched martensite hardness of the steel's carbon (ASTM
    A255 initial hardness, :func:`selector.models.martensite.ih_hrc`, held above 0.70 % C),
    converted by ASTM E140: the carbon scaling assumes the bainite of another carbon content
    is harder or softer in the proportion of its martensite (this project's assumption, not a
    published relation; alloy elements act only through the carbon and the kinetics).

    Why not Maynier's HV_B: its bainite hardness is a function of the *continuous* cooling
    rate at 700 °C (a bainite formed while the part cools through the whole bainite range),
    so for a 0.95 % C steel in a salt bath it gives about 31 HRC; the bainite of an
    austempering bath forms at one temperature, and its hardness rises steadily as that
    temperature falls (Bain & Paxton, *Alloying Elements in Steel*, ASM 1961, ch. on
    isothermal transformation; lower bainite has hardness similar to tempered martensite:
    ASM Heat Treat 2013 proceedings, "austempering ... lower bainite", abstract at
    dl.asminternational.org/heat-treating/proceedings/HT2013/84116/26/34209).  The route
    also caps this value at the hardness of the steel's martensite tempered at the bath
    temperature for the hold (:func:`selector.models.tempering.tempered_martensite_hv`).

    Parameters
    ----------
    comp : mapping
        Element → wt % (uses C).
    temp_c : array_like
        Transformation (bath) temperature, °C.

    Returns
    -------
    ndarray
        HV, broadcast of the inputs.

    Validity
    --------
    ``isothermal_bainite``: 250–550 °C, 0.35–1.05 % C.

    References
    ----------
    US Steel, *Atlas of Isothermal Transformation Diagrams*, Pittsburgh 1951 (eutectoid
    diagram; values recalled); ASTM A255 (initial hardness); ASTM E140 (conversion).

    Example (from the source: US Steel Atlas (1951) eutectoid diagram, transformed at
    300 °C: 53 HRC (the table's row, from memory), 560 HV by ASTM E140)

    >>> hv = isothermal_bainite_hv({"C": 0.79}, 300.0)
    >>> round(float(hv)), round(float(conversions.hv_to_hrc(hv)))
    (560, 53)
    """

    t = np.asarray(temp_c, float)
    if np.any(~np.isfinite(t)) or np.any(t <= -273.15):
        raise InputError("temp_c", temp_c, "finite temperatures in °C")
    temps, hv = _iso_curve()
    base = np.interp(t, temps, hv)
    c = np.asarray(el(comp, "C"), float)
    ratio = (np.asarray(conversions.hrc_to_hv(ih_hrc(c)), float)
             / float(conversions.hrc_to_hv(ih_hrc(ISO_REFERENCE_C))))
    return base * ratio
