"""Fatigue strength of a real part: the rotating-beam estimate and the Marin (1962) factors.

Steels have an endurance limit; the unnotched, polished rotating-beam value is
estimated from the tensile strength (Budynas & Nisbett 2015, eq. 6-8)::

    Se' = 0.5 Sut            Sut <= 1400 MPa
    Se' = 700 MPa            Sut >  1400 MPa   (the cap)

or, for defect-free steels, from the Vickers hardness (Murakami 2002)::

    sigma_w = 1.6 HV         (MPa, HV in kgf/mm^2; within about +-10 % up to about 400 HV)

Above about 400 HV the fatigue limit of real steels is governed by inclusions and
other small defects and no longer rises with hardness; :func:`murakami_fatigue_limit_mpa`
returns NaN there rather than extrapolate.

The part's limit applies the Marin factors (Marin 1962, as tabulated by Budynas &
Nisbett 2015, section 6-9)::

    Se = ka kb kc kd ke Se'

* ``ka = a Sut^b``: surface finish (``data/fatigue_surface.csv``, Table 6-2);
* ``kb``: size, round bar in rotating bending or torsion
  ``1.24 d^-0.107`` (2.79 <= d <= 51 mm), ``1.51 d^-0.157`` (51 < d <= 254 mm),
  1 below 2.79 mm and for axial load (eq. 6-20);
* ``kc``: load type, bending 1, axial 0.85, torsion 0.59 (eq. 6-26);
* ``kd``: temperature, ``0.975 + 0.432e-3 T - 0.115e-5 T^2 + 0.104e-8 T^3 - 0.595e-12 T^4``
  with T in °F, 70 <= T <= 1000 °F (eq. 6-27); 1 below 70 °F;
* ``ke = 1 - 0.08 z_a``: reliability, ``z_a`` the standard normal variate of the
  reliability (Table 6-5; 50 % gives 1.000, 99 % 0.814, 99.99 % 0.702).

Aluminium and copper alloys have **no endurance limit**: their fatigue strength is
stated at a cycle count (``data/fatigue_nonferrous.csv``: aluminium 0.4 Sut at 5e8,
capped at 130 MPa; copper alloys 0.35 Sut at 1e8; titanium 0.5 Sut at 1e7) and keeps
falling beyond it.  The Marin factors, fitted to steel data, are applied to them too
for want of better general data (common practice).

Compressive residual stress in a hardened case raises the local fatigue strength as a
compressive mean stress does; the credit uses the mean-stress sensitivity of the FKM
guideline (Rennert et al. 2012, section 4.4; after Schütz 1967)::

    M = 0.35e-3 Rm - 0.1                (steel, Rm in MPa)
    sigma_a = sigma_w - M sigma_res     (sigma_res < 0, range II of the FKM diagram)
    sigma_a <= sigma_w / (1 - M)        (range I: mean stress below -amplitude)

References
----------
J. Marin, *Mechanical Behavior of Engineering Materials*, Prentice-Hall (1962).
R.G. Budynas, J.K. Nisbett, *Shigley's Mechanical Engineering Design*, 10th ed.,
McGraw-Hill (2015), section 6-7 (eq. 6-8), 6-9 (Table 6-2, eqs. 6-20, 6-26, 6-27,
Table 6-5) (values from memory).
Y. Murakami, *Metal Fatigue: Effects of Small Defects and Nonmetallic Inclusions*,
Elsevier (2002), ch. 1-2 (sigma_w = 1.6 HV up to about 400 HV; from memory).
R. Rennert et al., *FKM Guideline: Analytical Strength Assessment of Components*, 6th ed.,
VDMA (2012), section 4.4 (mean-stress sensitivity; from memory); W. Schütz,
Z. Werkstofftech. (1967).
R.C. Juvinall, K.M. Marshek, *Fundamentals of Machine Component Design*, 5th ed. (2012),
section 8.3 (non-ferrous fatigue strength ratios; from memory).
"""
from __future__ import annotations

import functools
import math

import numpy as np
from scipy.special import ndtri

from ..catalogue.loader import Column, Schema, read_table
from ..errors import InputError, check_choice
from . import validity

#: Se' cap and the strength above which it applies (Budynas & Nisbett 2015, eq. 6-8)
SE_CAP_MPA = 700.0
SE_CAP_UTS_MPA = 1400.0
#: Murakami: sigma_w = 1.6 HV up to about 400 HV
MURAKAMI_FACTOR = 1.6
MURAKAMI_MAX_HV = 400.0

FINISHES = ("ground", "machined", "hot_rolled", "as_forged")
LOAD_TYPES = ("bending", "axial", "torsion")
#: load factor kc (Budynas & Nisbett 2015, eq. 6-26)
LOAD_FACTOR = {"bending": 1.0, "axial": 0.85, "torsion": 0.59}
#: accepted reliability (Table 6-5 spans 50 % to 99.99 %; closed range)
RELIABILITY_RANGE = (0.5, 0.9999)

CONFIDENCE = ("verified", "partial", "from memory", "common practice", "demo")

validity.register("marin_size", {"diameter_mm": (None, 254.0, "mm")},
                  "Budynas & Nisbett (2015) eq. 6-20: rounds up to 254 mm")
validity.register("marin_temperature", {"temp_c": (None, 538.0, "°C")},
                  "Budynas & Nisbett (2015) eq. 6-27: 70–1000 °F")
validity.register("murakami_2002", {"hardness_hv": (None, MURAKAMI_MAX_HV, "HV")},
                  "Murakami (2002): sigma_w = 1.6 HV for defect-free steels up to about 400 HV",
                  beyond="no estimate is given above it")

_SURF = Schema((Column("finish", "choice", choices=FINISHES), Column("a_mpa", "float", lo=0.1, hi=1000),
                Column("b", "float", lo=-2, hi=0), Column("source"),
                Column("confidence", "choice", choices=CONFIDENCE)))
_NONFE = Schema((Column("family"), Column("ratio", "float", lo=0.1, hi=1.0),
                 Column("cap_mpa", "float", allow_blank=True, lo=10, hi=2000),
                 Column("cycles", "float", lo=1e5, hi=1e10), Column("source"),
                 Column("confidence", "choice", choices=CONFIDENCE)))


@functools.cache
def surface_table() -> dict:
    """finish -> (a_mpa, b, source, confidence) from ``data/fatigue_surface.csv``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted(surface_table())
    ['as_forged', 'ground', 'hot_rolled', 'machined']
    """
    t = read_table("fatigue_surface.csv", _SURF)
    return {r.finish: (float(r.a_mpa), float(r.b), r.source, r.confidence) for r in t.itertuples()}


@functools.cache
def nonferrous_table() -> dict:
    """family -> (ratio, cap_mpa, cycles, source, confidence) from ``data/fatigue_nonferrous.csv``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted(nonferrous_table())
    ['aluminium', 'copper_alloy', 'titanium']
    """
    t = read_table("fatigue_nonferrous.csv", _NONFE)
    return {r.family: (float(r.ratio), float(r.cap_mpa), float(r.cycles), r.source, r.confidence)
            for r in t.itertuples()}


def check_finish(finish) -> str:
    """``finish`` if it is one of :data:`FINISHES`, else :class:`InputError`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> check_finish("ground")
    'ground'
    """
    return check_choice("finish", finish, FINISHES, "fatigue")


def check_load_type(load_type) -> str:
    """``load_type`` if it is one of :data:`LOAD_TYPES`, else :class:`InputError`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> check_load_type("axial")
    'axial'
    """
    return check_choice("load_type", load_type, LOAD_TYPES, "fatigue")


def check_reliability(reliability) -> float:
    """``reliability`` as float if it is a number in [0.5, 0.9999], else :class:`InputError`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> check_reliability(0.99)
    0.99
    """
    lo, hi = RELIABILITY_RANGE
    allowed = f"a number in [{lo}, {hi}] (the range of Budynas & Nisbett Table 6-5)"
    if isinstance(reliability, bool) or not isinstance(reliability, (int, float, np.floating, np.integer)):
        raise InputError("reliability", reliability, allowed, "fatigue")
    r = float(reliability)
    if not math.isfinite(r) or r < lo or r > hi:
        raise InputError("reliability", reliability, allowed, "fatigue")
    return r


def endurance_limit_from_uts_mpa(uts_mpa):
    """Rotating-beam endurance limit of a polished steel specimen, Se' (MPa).

    ``Se' = 0.5 Sut`` for Sut <= 1400 MPa, 700 MPa above (Budynas & Nisbett 2015, eq. 6-8).

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.

    Returns
    -------
    ndarray
        Se', MPa (NaN where ``uts_mpa`` is NaN).

    Validity
    --------
    Wrought steels; the scatter of the data behind it is about +-20 % (Fig. 6-17 of the source).

    Example
    -------
    >>> float(endurance_limit_from_uts_mpa(520.0))   # Budynas & Nisbett Example 6-3 material
    260.0
    """
    s = np.asarray(uts_mpa, float)
    return np.where(s > SE_CAP_UTS_MPA, SE_CAP_MPA, 0.5 * s)


def murakami_fatigue_limit_mpa(hardness_hv):
    """Fatigue limit of a defect-free steel from its Vickers hardness (Murakami 2002).

    ``sigma_w = 1.6 HV`` (MPa; HV in kgf/mm^2), rotating bending or tension-compression,
    fully reversed.

    Parameters
    ----------
    hardness_hv : array_like
        Vickers hardness, HV.

    Returns
    -------
    ndarray
        sigma_w, MPa; NaN above 400 HV, where small defects and inclusions govern and
        the relation no longer holds (``murakami_2002`` validity).

    Example
    -------
    >>> float(murakami_fatigue_limit_mpa(250.0))
    400.0
    """
    hv = np.asarray(hardness_hv, float)
    return np.where(hv <= MURAKAMI_MAX_HV, MURAKAMI_FACTOR * hv, np.nan)


def surface_factor(uts_mpa, finish: str = "machined"):
    """Marin surface factor ``ka = a Sut^b`` (Budynas & Nisbett 2015, Table 6-2), at most 1.

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.
    finish : {"ground", "machined", "hot_rolled", "as_forged"}
        ``machined`` covers machined and cold-drawn surfaces.

    Returns
    -------
    ndarray
        ka (dimensionless).

    Example
    -------
    >>> round(float(surface_factor(520.0, "machined")), 3)   # Example 6-3 of the source: 0.860
    0.86
    """
    a, b, _s, _c = surface_table()[check_finish(finish)]
    s = np.asarray(uts_mpa, float)
    return np.minimum(a * np.power(np.maximum(s, 1.0), b), 1.0)


def size_factor(diameter_mm, load_type: str = "bending"):
    """Marin size factor kb of a round (Budynas & Nisbett 2015, eq. 6-20).

    ``kb = (d/7.62)^-0.107 = 1.24 d^-0.107`` for 2.79 <= d <= 51 mm,
    ``1.51 d^-0.157`` for 51 < d <= 254 mm, 1 below 2.79 mm and for axial load.

    Parameters
    ----------
    diameter_mm : array_like
        Diameter of the round (rotating), mm; for a non-rotating round pass the
        equivalent diameter 0.370 d (eq. 6-23).
    load_type : {"bending", "axial", "torsion"}

    Returns
    -------
    ndarray
        kb.  Above 254 mm the second form is extrapolated (``marin_size`` validity).

    Example
    -------
    >>> round(float(size_factor(32.0)), 3)   # Example 6-4 (a) of the source: 0.858
    0.858
    """
    lt = check_load_type(load_type)
    d = np.asarray(diameter_mm, float)
    if lt == "axial":
        return np.ones_like(d)
    small = np.power(np.maximum(d, 1e-9) / 7.62, -0.107)
    large = 1.51 * np.power(np.maximum(d, 1e-9), -0.157)
    return np.where(d < 2.79, 1.0, np.where(d <= 51.0, small, large))


def load_factor(load_type: str = "bending") -> float:
    """Marin load factor kc: bending 1, axial 0.85, torsion 0.59 (Budynas & Nisbett 2015, eq. 6-26).

    Example (from the source: Budynas & Nisbett (2015) eq. 6-26: kc = 0.85 axial)

    >>> load_factor("axial")
    0.85
    """
    return LOAD_FACTOR[check_load_type(load_type)]


def temperature_factor(temp_c):
    """Marin temperature factor kd (Budynas & Nisbett 2015, eq. 6-27), T converted to °F.

    ``kd = 0.975 + 0.432e-3 T - 0.115e-5 T^2 + 0.104e-8 T^3 - 0.595e-12 T^4``, 70 <= T <= 1000 °F;
    1 below 70 °F (21 °C).

    Example
    -------
    >>> round(float(temperature_factor((450 - 32) / 1.8)), 3)   # Example 6-5 (a) of the source: 1.007
    1.007
    """
    t = np.asarray(temp_c, float) * 1.8 + 32.0
    kd = 0.975 + 0.432e-3 * t - 0.115e-5 * t ** 2 + 0.104e-8 * t ** 3 - 0.595e-12 * t ** 4
    return np.where(t < 70.0, 1.0, kd)


def reliability_factor(reliability: float = 0.5) -> float:
    """Marin reliability factor ``ke = 1 - 0.08 z_a`` (Budynas & Nisbett 2015, Table 6-5).

    Parameters
    ----------
    reliability : float
        Probability of survival, 0.5 to 0.9999.

    Example
    -------
    >>> round(reliability_factor(0.99), 3)   # Table 6-5: 0.814
    0.814
    """
    r = check_reliability(reliability)
    return float(1.0 - 0.08 * ndtri(r))   # the standard normal quantile (scipy.stats.norm.ppf is ndtri)


def marin_factors(uts_mpa, diameter_mm, finish: str = "machined", load_type: str = "bending",
                  reliability: float = 0.5, temp_c=20.0) -> dict:
    """All five Marin factors and their product (arrays broadcast).

    Returns
    -------
    dict
        ``ka, kb, kc, kd, ke, product``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(marin_factors(520.0, 32.0)["kb"]), 3)
    0.858
    """
    ka = surface_factor(uts_mpa, finish)
    kb = size_factor(diameter_mm, load_type)
    kc = load_factor(load_type)
    kd = temperature_factor(temp_c)
    ke = reliability_factor(reliability)
    return {"ka": ka, "kb": kb, "kc": kc, "kd": kd, "ke": ke, "product": ka * kb * kc * kd * ke}


def nonferrous_fatigue_strength_mpa(uts_mpa, family: str):
    """Fatigue strength of a non-ferrous alloy at its stated cycle count (no endurance limit).

    ``Sf = min(ratio Sut, cap)`` with the ratio, cap and cycle count of
    ``data/fatigue_nonferrous.csv``.

    Returns
    -------
    tuple
        (strength in MPa as ndarray, cycles as float).

    Raises
    ------
    InputError
        For a family not in the table.

    Example (illustrative: a value of this implementation, not a published one)

    >>> [round(float(x)) for x in nonferrous_fatigue_strength_mpa(310.0, "aluminium")]
    [124, 500000000]
    """
    table = nonferrous_table()
    ratio, cap, cycles, _s, _c = table[check_choice("family", family, list(table), "fatigue")]
    s = ratio * np.asarray(uts_mpa, float)
    if cap == cap:
        s = np.minimum(s, cap)
    return s, cycles


def mean_stress_sensitivity(uts_mpa):
    """FKM mean-stress sensitivity of steel, ``M = 0.35e-3 Rm - 0.1`` (Rennert et al. 2012, section 4.4).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(mean_stress_sensitivity(1000.0)), 3)
    0.25
    """
    return np.clip(0.35e-3 * np.asarray(uts_mpa, float) - 0.1, 0.0, 0.95)


def residual_stress_credit(fatigue_mpa, residual_mpa, uts_mpa):
    """Fatigue strength raised by a compressive residual stress (treated as a mean stress).

    ``sigma_a = min(sigma_w - M sigma_res, sigma_w / (1 - M))`` for ``sigma_res < 0``;
    tensile residual stress gets no credit and no debit here (its region is outside the
    case; see :mod:`selector.routes.fatigue`).

    Parameters
    ----------
    fatigue_mpa : array_like
        Fully reversed fatigue strength without residual stress, MPa.
    residual_mpa : array_like
        Residual stress, MPa (negative = compression).
    uts_mpa : array_like
        Local tensile strength, MPa (for M).

    Returns
    -------
    ndarray
        Fatigue strength amplitude, MPa.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(residual_stress_credit(500.0, -300.0, 1500.0)))
    628
    """
    sw = np.asarray(fatigue_mpa, float)
    r = np.minimum(np.asarray(residual_mpa, float), 0.0)
    m = mean_stress_sensitivity(uts_mpa)
    return np.minimum(sw - m * r, sw / (1.0 - m))
