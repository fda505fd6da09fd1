"""Hardness of a quenched (and tempered) structure of martensite, bainite and
ferrite–pearlite: the linear mixture rule of Maynier, Jungmann & Dollet (1978).

    HV = X_M·HV_M' + X_B·HV_B' + X_FP·HV_FP'

with, at each position of the section:

* X_M = martensite fraction of the hardenability chain
  (``as_quenched_profile``'s ``martensite_pct`` / 100: the one martensite figure the
  tool reports and uses);
* X_B = (1 − X_M)·s_B and X_FP = (1 − X_M)·(1 − s_B), s_B the bainite share of the
  non-martensitic products at the local cooling rate
  (:func:`selector.models.transformation.bainite_share`, Li et al. 1998 kinetics);
* as quenched: HV_B and HV_FP from composition and the local cooling rate at 700 °C
  (:func:`selector.models.phase_hardness.phase_hardness_hv`, Maynier et al. 1978);
  HV_M the fresh-martensite hardness of the carbon (ASTM A255 IH, via E140);
* tempered, each constituent by its own behaviour:

  - martensite along the Hollomon–Jaffe master surface,
    HV_M' = HV_TM(P) (:func:`selector.models.tempering.tempered_martensite_hv`);
  - bainite softens much less: HV_B' = min(HV_B, HV_TM, max(HV_TB(Pa), HV_B − (HV_M − HV_TM), HV_FP'))
    with HV_TB Maynier's tempered-bainite equation (:func:`phase_hardness.tempered_bainite_hv`):
    it never loses more hardness than the martensite of the same steel at the same
    temper, nor end softer than the ferrite–pearlite of the same steel (the recalled
    equation alone would soften the bainite of lean C–Mn steels by 40 % at 150 °C, and
    below ferrite–pearlite at 626 °C for 4320; bounds: common practice, from memory);
  - ferrite–pearlite barely softens at tempering temperatures:
    HV_FP' = min(HV_FP, HV_TM) (it keeps its as-quenched hardness until the tempered
    martensite of the same steel falls to it; common practice, from memory).

No constituent ends harder than it was quenched or than the tempered martensite of
the same steel at the same temper, so tempering never hardens the mixture.

References
----------
Ph. Maynier, B. Jungmann, J. Dollet, "Creusot-Loire system for the prediction of the
mechanical properties of low alloy steels", in *Hardenability Concepts with
Applications to Steel*, TMS-AIME 1978, pp. 518–545 (mixture rule, phase and tempered
hardness equations; coefficients from memory).
J.H. Hollomon, L.D. Jaffe, Trans. AIME 162 (1945) 223.
M.V. Li et al., Metall. Mater. Trans. B 29B (1998) 661.
"""
from __future__ import annotations

import numpy as np

from ..errors import InputError
from . import conversions, phase_hardness, tempering, transformation
from .composition import el
from .martensite import martensite_hardness_hrc

#: elements the constituent models use (Maynier 1978; Li et al. 1998)
ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo", "V")


def constituents(comp, martensite_pct, cooling_rate_c_s) -> dict:
    """Fractions and as-quenched hardness of the constituents at each position.

    Parameters
    ----------
    comp : mapping
        Element → wt %, arrays broadcasting with the other inputs (e.g. shape (n, 1)).
    martensite_pct : array_like
        Martensite of the hardenability chain, % (e.g. shape (n, n_pos)).
    cooling_rate_c_s : array_like
        Cooling rate at 700 °C at the same positions, °C/s (> 0).

    Returns
    -------
    dict of ndarray
        ``x_m``, ``x_b``, ``x_fp`` (fractions, sum 1); ``hv_m``, ``hv_b``, ``hv_fp`` (HV).

    References
    ----------
    Maynier, Jungmann & Dollet (1978); Li et al. (1998) for the bainite share.

    Example (illustrative: a value of this implementation, not a published one; a 0.40 % C
    Cr-Mo steel, half martensite, cooled at 20 °C/s: the rest is mostly bainite)

    >>> s = {"C": 0.40, "Mn": 0.80, "Si": 0.25, "Cr": 1.0, "Mo": 0.20}
    >>> p = constituents(s, 50.0, 20.0)
    >>> [round(float(p[k]), 3) for k in ("x_m", "x_b", "x_fp")]
    [0.5, 0.475, 0.025]
    >>> round(float(p["hv_m"]))
    614
    """
    m = np.asarray(martensite_pct, float)
    if np.any(m < -1e-9) or np.any(m > 100 + 1e-9):
        raise InputError("martensite_pct", martensite_pct, "percentages 0-100")
    rate = np.asarray(cooling_rate_c_s, float)
    shape = np.broadcast_shapes(m.shape, rate.shape, *[np.shape(comp[e]) for e in ELEMENTS if e in comp])
    shape2 = (int(np.prod(shape[:-1])) if len(shape) > 1 else 1, shape[-1] if shape else 1)
    # the structure does not depend on the temper: evaluate each distinct state (composition,
    # rates and martensite across the section) once -- the catalogue's tempers share a few hundred
    cols = [np.broadcast_to(np.asarray(el(comp, e), float), shape).reshape(shape2) for e in ELEMENTS]
    m2 = np.broadcast_to(m, shape).reshape(shape2)
    r2 = np.broadcast_to(rate, shape).reshape(shape2)
    uniq, inverse = transformation.unique_rows(np.concatenate(cols + [r2, m2], axis=1))
    npos = shape2[1]
    k = len(ELEMENTS) * npos
    u_comp = {e: uniq[:, i * npos:(i + 1) * npos] for i, e in enumerate(ELEMENTS)}
    u_rate = uniq[:, k:k + npos]
    u_m = uniq[:, k + npos:]
    share = transformation.bainite_share(u_comp, u_rate)
    _, hv_b, hv_fp = phase_hardness.phase_hardness_hv(u_comp, u_rate)
    hv_m = np.broadcast_to(conversions.hrc_to_hv(martensite_hardness_hrc(u_comp["C"], 99.9)), u_rate.shape)
    x_m = np.clip(u_m / 100.0, 0.0, 1.0)
    rest = 1.0 - x_m
    out = {"x_m": x_m, "x_b": rest * share, "x_fp": rest * (1.0 - share),
           "hv_m": hv_m, "hv_b": np.minimum(hv_b, hv_m), "hv_fp": np.minimum(hv_fp, hv_m)}
    return {key: np.asarray(v)[inverse].reshape(shape) for key, v in out.items()}


def mixture_hv(parts: dict, temp_c=None, hours=None, comp=None, coef=None, caps=None) -> np.ndarray:
    """Hardness of the structure ``parts`` (from :func:`constituents`), as quenched
    (``temp_c`` None) or after tempering ``temp_c`` °C for ``hours`` h.

    HV = X_M·HV_M' + X_B·HV_B' + X_FP·HV_FP'  (Maynier et al. 1978), the tempered
    constituent hardnesses as in the module docstring.

    Parameters
    ----------
    parts : dict
        Output of :func:`constituents`.
    temp_c : array_like, optional
        Tempering temperature, °C (NaN: not tempered at that state).
    hours : array_like, optional
        Time at temperature, h (> 0; ignored where ``temp_c`` is NaN).
    comp : mapping, optional
        Composition (required when tempering).
    coef : sequence of float, optional
        Coefficients of the tempered-martensite surface
        (:func:`selector.models.tempering.tempered_martensite_hv`); None reads the shipped
        ones.  The fit script passes trial coefficients to fit the surface through this rule.
    caps : mapping, optional
        Element caps of the surface's alloy terms (``tempering.tempered_martensite_hv``);
        None: the shipped fit's.

    Returns
    -------
    ndarray
        HV, shape of the fractions.

    References
    ----------
    Maynier, Jungmann & Dollet (1978); Hollomon & Jaffe (1945).

    Example (illustrative: a value of this implementation, not a published one; the same
    steel fully martensitic, as quenched and after 540 °C for 2 h)

    >>> s = {"C": 0.40, "Mn": 0.80, "Si": 0.25, "Cr": 1.0, "Mo": 0.20}
    >>> p = constituents(s, 100.0, 50.0)
    >>> round(float(mixture_hv(p))), round(float(mixture_hv(p, 540.0, 2.0, s)))
    (614, 366)
    """
    x_m, x_b, x_fp = parts["x_m"], parts["x_b"], parts["x_fp"]
    hv_m, hv_b, hv_fp = parts["hv_m"], parts["hv_b"], parts["hv_fp"]
    aq = x_m * hv_m + x_b * hv_b + x_fp * hv_fp
    if temp_c is None:
        return aq
    if comp is None:
        raise InputError("comp", None, "a composition when tempering")
    t = np.asarray(temp_c, float)
    h = np.asarray(hours, float)
    ok = np.isfinite(t)
    t1 = np.where(ok, t, 200.0)
    h1 = np.where(ok & np.isfinite(h), h, 1.0)
    hv_tm = np.minimum(tempering.tempered_martensite_hv(comp, t1, h1, coef, caps), hv_m)
    hv_tfp = np.minimum(hv_fp, hv_tm)
    # bainite never loses more than the martensite of the same steel at the same temper, and
    # never ends softer than its ferrite-pearlite at the same temper
    hv_tb = np.maximum(np.maximum(phase_hardness.tempered_bainite_hv(comp, t1, h1), hv_b - (hv_m - hv_tm)),
                       hv_tfp)
    hv_tb = np.minimum(np.minimum(hv_b, hv_tb), hv_tm)
    tempered = x_m * hv_tm + x_b * hv_tb + x_fp * hv_tfp
    return np.where(ok, np.minimum(tempered, aq), aq)


#: hardness of cementite, HV (about 1000-1100 HV measured on bulk Fe3C: K. Umemoto, Z.G. Liu, K.
#: Tsuchiya et al., Mater. Sci. Technol. 17 (2001) 505; from memory)
CEMENTITE_HV = 1050.0
#: carbon of cementite Fe3C, wt % (stoichiometry)
CEMENTITE_C_PCT = 6.67


def undissolved_carbide_fraction(c_steel_pct, c_austenite_pct):
    """Mass fraction of cementite left undissolved when a hypereutectoid steel is hardened from
    between Ac1 and Acm (lever rule between the carbon in austenite and Fe3C).

        f = (C_steel − C_γ) / (6.67 − C_γ),  0 where C_γ ≥ C_steel

    Parameters
    ----------
    c_steel_pct, c_austenite_pct : array_like
        Carbon of the steel and carbon in austenite at the hardening temperature, wt %
        (:func:`selector.models.hardenability.austenite_carbon_pct`).

    Returns
    -------
    ndarray, mass fraction (about the volume fraction: densities within 2 %).

    References
    ----------
    Lever rule on the Fe–Fe3C diagram (common practice).

    Example (from the source: the lever rule, 1.04 % C steel with 0.60 % C in austenite:
    (1.04 − 0.60) / (6.67 − 0.60) = 0.0725 (hand evaluation))

    >>> round(float(undissolved_carbide_fraction(1.04, 0.60)), 4)
    0.0725
    """
    c = np.asarray(c_steel_pct, float)
    ca = np.asarray(c_austenite_pct, float)
    if np.any(c < 0) or np.any(ca < 0):
        raise InputError("C", c_steel_pct, "carbon >= 0 wt %")
    return np.clip((c - ca) / (CEMENTITE_C_PCT - ca), 0.0, 1.0)


def with_undissolved_carbide_hv(hardness_hv, carbide_fraction):
    """Hardness of a matrix holding undissolved cementite, by the linear mixture rule of
    Maynier, Jungmann & Dollet (1978) extended to the carbide:

        HV = (1 − f)·HV_matrix + f·HV_Fe3C,   HV_Fe3C = 1050 (Umemoto et al. 2001, from memory)

    Parameters
    ----------
    hardness_hv : array_like
        Hardness of the matrix (quenched or tempered structure), HV.
    carbide_fraction : array_like
        Undissolved carbide fraction (:func:`undissolved_carbide_fraction`).

    Returns
    -------
    ndarray, HV (the matrix hardness where the fraction is 0).

    References
    ----------
    Maynier, Jungmann & Dollet (1978) (linear mixture rule); K. Umemoto et al., Mater. Sci.
    Technol. 17 (2001) 505 (hardness of cementite; from memory).

    Example (from the source: the linear mixture rule, 7 % carbide in a 600 HV matrix:
    0.93 × 600 + 0.07 × 1050 = 631.5 HV (hand evaluation; carbide hardness from memory))

    >>> round(float(with_undissolved_carbide_hv(600.0, 0.07)), 1)
    631.5
    """
    f = np.asarray(carbide_fraction, float)
    return (1.0 - f) * np.asarray(hardness_hv, float) + f * CEMENTITE_HV
