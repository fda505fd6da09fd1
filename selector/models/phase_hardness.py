"""Hardness of martensite, bainite and ferrite–pearlite from composition and cooling rate (Maynier et al. 1978).

    HV_M  = 127 + 949C + 27Si + 11Mn + 8Ni + 16Cr + 21 log Vr
    HV_B  = −323 + 185C + 330Si + 153Mn + 65Ni + 144Cr + 191Mo
            + (89 + 53C − 55Si − 22Mn − 10Ni − 20Cr − 33Mo) log Vr
    HV_FP = 42 + 223C + 53Si + 30Mn + 12.6Ni + 7Cr + 19Mo + (10 − 19Si + 4Ni + 8Cr + 130V) log Vr
    HV    = X_M HV_M + X_B HV_B + X_FP HV_FP

Vr is the cooling rate at 700 °C in °C/h, log base 10.  The mixture rule is
confirmed in a quoted excerpt; the coefficients are recalled (models reference
sheet §4, confidence from memory) and were sanity-checked on a 4140-like steel.

References
----------
Ph. Maynier, B. Jungmann, J. Dollet, "Creusot-Loire system for the prediction of the
mechanical properties of low alloy steels", in *Hardenability Concepts with
Applications to Steel*, eds. D.V. Doane and J.S. Kirkaldy, TMS-AIME 1978, pp. 518–545.
"""
from __future__ import annotations

import numpy as np

from ..errors import InputError
from .composition import el
from . import validity

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
    """
    r = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(r)) or np.any(r <= 0):
        raise InputError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    lv = np.log10(3600.0 * r)
    c, si, mn, ni, cr, mo, v = (el(comp, e) for e in ("C", "Si", "Mn", "Ni", "Cr", "Mo", "V"))
    hv_m = 127 + 949 * c + 27 * si + 11 * mn + 8 * ni + 16 * cr + 21 * lv
    hv_b = (-323 + 185 * c + 330 * si + 153 * mn + 65 * ni + 144 * cr + 191 * mo
            + (89 + 53 * c - 55 * si - 22 * mn - 10 * ni - 20 * cr - 33 * mo) * lv)
    hv_fp = (42 + 223 * c + 53 * si + 30 * mn + 12.6 * ni + 7 * cr + 19 * mo
             + (10 - 19 * si + 4 * ni + 8 * cr + 130 * v) * lv)
    return hv_m, hv_b, hv_fp


def mixture_hv(fractions, hardnesses):
    """Rule of mixtures HV = Σ X_i HV_i over the phases (fractions normalised to their sum)."""
    f = [np.asarray(x, float) for x in fractions]
    tot = sum(f)
    return sum(x * h for x, h in zip(f, hardnesses)) / np.where(tot > 0, tot, 1.0)
