"""Tempering of quenched steel: the Hollomon–Jaffe parameter and a fitted master surface.

Hollomon & Jaffe (1945) showed that the hardness of tempered martensite depends on
time and temperature only through

    P = T · (C + log10 t)            (T in K, t in h)

so that two tempers with the same P give the same hardness.  On that basis this
module fits one hardness master surface, HV(P, composition), to published
handbook quench-and-temper data (``data/tempering_points.csv``, the rows marked
``fully_hardened``) and caps it at the as-quenched martensite hardness of
:mod:`selector.models.martensite`.

The fitted form (chosen by leave-one-grade-out error among simpler and richer
linear forms; see docs/methods/tempering.md):

    s   = P/1000 − 16
    HV_TM = a0 + a1·C + (b0 + b1·C)·s + (k_Mo·Mo + k_V·V)·max(P/1000 − 12, 0)
    HV_TM = clip(HV_TM, HV_FLOOR, HV_martensite(C))

The Mo and V terms are the resistance to softening that the carbide formers give
at the higher tempering parameters (Grange, Hribal & Porter 1977 found the alloy
effects grow with tempering temperature).  A chromium term was tried and did not
improve the leave-one-grade-out error of these data (its coefficient came out
negative), so chromium acts only through carbon and hardenability here.  Mo and V
are held at the top of the fitted range (0.25 % Mo, 0.15 % V) so the curve
always softens with P; tool steels with secondary hardening are outside the model.

The fit is linear least squares (numpy.linalg.lstsq) run once at first use
(functools.cache): it is deterministic and reproducible from the CSV.

References
----------
J.H. Hollomon and L.D. Jaffe, "Time-temperature relations in tempering steel",
Trans. AIME 162 (1945) 223-249.
L.C.F. Canale et al., "A historical overview of steel tempering parameters", Int. J. Microstructure and Materials Properties 3 (2008)
474 (carbon dependence of C; from memory).
R.A. Grange, C.R. Hribal and L.F. Porter, "Hardness of tempered martensite in carbon
and low-alloy steels", Metall. Trans. A 8A (1977) 1775 (alloy effects grow with
tempering temperature).
ASM Metals Handbook Vol. 1 (1990), typical mechanical properties of quenched and
tempered steels (the data fitted).
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table
from ..errors import InputError
from . import conversions, validity
from .composition import el
from .martensite import martensite_hardness_hrc

FILE = "tempering_points.csv"

#: Hollomon–Jaffe constant against carbon: C = C_INTERCEPT − C_SLOPE·%C, clipped to C_RANGE
C_INTERCEPT, C_SLOPE, C_RANGE = 21.3, 5.8, (15.0, 21.3)
#: P/1000 from which the Mo and V terms act (chosen by leave-one-grade-out error)
P_ALLOY_ONSET = 12.0
#: Mo and V are held at these values (top of the fitted data) in the fit's alloy terms
MO_MAX, V_MAX = 0.25, 0.15
#: lowest hardness returned for tempered martensite, HV (spheroidized low-carbon
#: steel is about 120-150 HV: common practice)
HV_FLOOR = 120.0
#: hardness of the non-martensitic products of quenching (ferrite-pearlite/bainite)
#: in the mixture rule of :func:`tempered_hv`: HV = NP_A + NP_B·%C (common practice,
#: typical normalized-steel hardness against carbon; from memory)
NP_A, NP_B = 130.0, 230.0

FEATURES = ("1", "C", "s", "C*s", "Mo*a", "V*a")

_SCHEMA = Schema((
    Column("grade", "str"),
    Column("family", "choice", choices=("carbon_steel", "alloy_steel", "stainless_martensitic")),
    *(Column(f"{e}_pct", "float", lo=0.0, hi=20.0) for e in ("c", "mn", "si", "ni", "cr", "mo", "v")),
    Column("quench", "choice", choices=("water", "oil", "brine", "polymer", "air")),
    Column("section_mm", "float", allow_blank=True, lo=0.0, hi=1000.0),
    Column("austenitize_c", "float", allow_blank=True, lo=700.0, hi=1250.0),
    Column("temp_c", "float", lo=20.0, hi=760.0),
    Column("hours", "float", lo=1e-4, hi=1e4),
    Column("hardness_hb", "float", allow_blank=True, lo=80.0, hi=760.0),
    Column("hardness_hrc", "float", allow_blank=True, lo=10.0, hi=70.0),
    Column("uts_mpa", "float", allow_blank=True, lo=200.0, hi=3000.0),
    Column("yield_mpa", "float", allow_blank=True, lo=100.0, hi=3000.0),
    Column("elongation_pct", "float", allow_blank=True, lo=0.0, hi=80.0),
    Column("reduction_area_pct", "float", allow_blank=True, lo=0.0, hi=95.0),
    Column("fully_hardened", "bool"),
    Column("source", "str"),
    Column("confidence", "choice", choices=("verified", "partial", "from memory", "common practice", "demo")),
), row_check=lambda r: ("hardness_hb", "a row needs hardness_hb or hardness_hrc")
    if np.isnan(r["hardness_hb"]) and np.isnan(r["hardness_hrc"]) else None)


def hollomon_jaffe_parameter(temp_c, hours, c_const):
    """Hollomon–Jaffe tempering parameter (Hollomon & Jaffe 1945).

    P = (temp_c + 273.15) · (c_const + log10(hours))

    Parameters
    ----------
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h (> 0).
    c_const : array_like
        Hollomon–Jaffe constant for time in hours (about 15–21; see
        :func:`hollomon_jaffe_constant`).

    Returns
    -------
    ndarray
        P, K (often quoted as P/1000, about 10–20 for tempering).

    Validity
    --------
    Registered as ``hollomon_jaffe``: 150–705 °C, 0.1–100 h.

    References
    ----------
    J.H. Hollomon, L.D. Jaffe, Trans. AIME 162 (1945) 223.
    """
    t_k = _kelvin(temp_c)
    h = _positive_hours(hours)
    return t_k * (np.asarray(c_const, float) + np.log10(h))


def hollomon_jaffe_constant(carbon_pct):
    """Hollomon–Jaffe constant C against carbon content (time in hours).

    C = 21.3 − 5.8·%C, clipped to 15.0–21.3

    Parameters
    ----------
    carbon_pct : array_like
        Carbon, wt %.

    Returns
    -------
    ndarray
        C (dimensionless, for t in hours).  About 19 at 0.4 % C; the common
        single value C = 20 corresponds to about 0.22 % C.

    Validity
    --------
    Plain-carbon steels 0.3–1.0 % C in the original data (Hollomon & Jaffe 1945).

    References
    ----------
    Hollomon & Jaffe, Trans. AIME 162 (1945) 223; the linear form as summarised by
    Canale et al., Int. J. Microstructure and Materials Properties 3 (2008) 474 —
    coefficients ``from memory`` (reference sheet §5, tag M).
    """
    c = _carbon(carbon_pct)
    return np.clip(C_INTERCEPT - C_SLOPE * c, *C_RANGE)


def equivalent_hours(temp_c, hours, to_temp_c, c_const):
    """Time at ``to_temp_c`` that gives the same Hollomon–Jaffe parameter.

    t2 = 10 ** ( T1·(C + log10 t1) / T2 − C ),  T in K

    Parameters
    ----------
    temp_c : array_like
        Actual tempering temperature, °C.
    hours : array_like
        Actual time, h (> 0).
    to_temp_c : array_like
        Reference temperature, °C.
    c_const : array_like
        Hollomon–Jaffe constant.

    Returns
    -------
    ndarray
        Equivalent time at ``to_temp_c``, h.  Add the equivalent times of several
        steps at one reference temperature to treat a multi-step temper.

    References
    ----------
    Hollomon & Jaffe, Trans. AIME 162 (1945) 223 (equal P, equal hardness).
    """
    p = hollomon_jaffe_parameter(temp_c, hours, c_const)
    return 10.0 ** (p / _kelvin(to_temp_c) - np.asarray(c_const, float))


# ---------------------------------------------------------------------------------
# the fitted master surface

def _features(c, mo, v, p):
    s = p / 1000.0 - 16.0
    a = np.maximum(p / 1000.0 - P_ALLOY_ONSET, 0.0)
    mo = np.minimum(mo, MO_MAX)
    v = np.minimum(v, V_MAX)
    one = np.ones(np.broadcast(c, p).shape)
    return np.stack(np.broadcast_arrays(one, c, s, c * s, mo * a, v * a), axis=-1)


@functools.cache
def _points():
    t = read_table(FILE, _SCHEMA)
    hv = np.where(t["hardness_hrc"].notna(), conversions.hrc_to_hv(t["hardness_hrc"].to_numpy(float)),
                  conversions.hb_to_hv(t["hardness_hb"].to_numpy(float)))
    t["hardness_hv"] = hv
    t["P"] = hollomon_jaffe_parameter(t["temp_c"].to_numpy(float), t["hours"].to_numpy(float),
                                      hollomon_jaffe_constant(t["c_pct"].to_numpy(float)))
    return t


def _design(t):
    return _features(t["c_pct"].to_numpy(float), t["mo_pct"].to_numpy(float),
                     t["v_pct"].to_numpy(float), t["P"].to_numpy(float))


def _solve(t):
    coef, *_ = np.linalg.lstsq(_design(t), t["hardness_hv"].to_numpy(float), rcond=None)
    return coef


@functools.cache
def _coefficients() -> tuple:
    t = _points()
    return tuple(float(x) for x in _solve(t[t["fully_hardened"]]))


def _surface(coef, c, mo, v, p):
    hv = _features(c, mo, v, p) @ np.asarray(coef)
    cap = conversions.hrc_to_hv(martensite_hardness_hrc(c, 99.9))
    return np.clip(hv, HV_FLOOR, cap)


def tempered_martensite_hv(comp, temp_c, hours):
    """Hardness of fully martensitic steel after tempering (master surface fitted
    to handbook data on the Hollomon–Jaffe parameter, Hollomon & Jaffe 1945).

    HV = clip(a0 + a1·C + (b0 + b1·C)·(P/1000 − 16) + (k_Mo·Mo + k_V·V)·max(P/1000 − 12, 0),
              120, HV_M(C)),   P = T_K·(C_HJ(C) + log10 t_h)

    with HV_M(C) the as-quenched 99.9 % martensite hardness
    (:func:`selector.models.martensite.martensite_hardness_hrc`, converted by ASTM E140)
    and the coefficients fitted by least squares to ``data/tempering_points.csv``.

    Parameters
    ----------
    comp : mapping
        Composition, element symbol → wt % (float or array); uses C, Mo, V.
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h (> 0).

    Returns
    -------
    ndarray
        Vickers hardness HV (broadcast of the inputs).

    Validity
    --------
    Registered as ``tempering_hv``: 150–705 °C, 0.1–100 h, 0.3–0.6 % C (the fitted
    fully hardened grades), Mo ≤ 0.25 %,
    V ≤ 0.15 %, families carbon_steel and alloy_steel (low-alloy).  Fit residuals in
    docs/methods/tempering.md.

    References
    ----------
    Hollomon & Jaffe, Trans. AIME 162 (1945) 223; ASM Metals Handbook Vol. 1 (1990)
    quenched-and-tempered property table (fitted data); Grange, Hribal & Porter,
    Metall. Trans. A 8A (1977) 1775 (form of the alloy terms).
    """
    c = _carbon(el(comp, "C"))
    p = hollomon_jaffe_parameter(temp_c, hours, hollomon_jaffe_constant(c))
    return _surface(_coefficients(), c, el(comp, "Mo"), el(comp, "V"), p)


def tempered_hv(hardness_hv_as_quenched, hardness_hv_martensite, comp, temp_c, hours):
    """Hardness after tempering of a partly martensitic as-quenched structure
    (rule of mixtures on the Hollomon–Jaffe master surface).

    Rule (this project's; documented in docs/methods/tempering.md):
    the as-quenched hardness is read as a mixture of martensite (HV_M) and
    non-martensitic products (ferrite–pearlite/bainite, HV_NP = 130 + 230·%C,
    capped at HV_AQ):

        f    = (HV_AQ − HV_NP) / (HV_M − HV_NP), clipped to 0–1
        HV_T = f · HV_TM' + (1 − f) · min(HV_NP, HV_TM'),   HV_TM' = min(HV_TM(P), HV_M)

    so the martensite softens along the tempered-martensite curve while the
    non-martensitic products keep their hardness until the tempered martensite
    reaches it.  The result never exceeds the as-quenched hardness and equals
    :func:`tempered_martensite_hv` when HV_AQ = HV_M.  This follows the observation
    used by Crafts & Lamont (Trans. AIME, 1940s; from memory) for tempered Jominy
    bars: the less fully hardened a location, the less it softens.

    Parameters
    ----------
    hardness_hv_as_quenched : array_like
        As-quenched hardness at the location, HV.
    hardness_hv_martensite : array_like
        Hardness of fully martensitic steel of the same carbon, HV.
    comp : mapping
        Composition, element → wt %.
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h.

    Returns
    -------
    ndarray
        Tempered hardness, HV.

    Validity
    --------
    As :func:`tempered_martensite_hv` (``tempering_hv``).

    References
    ----------
    Hollomon & Jaffe (1945); the mixture rule is this project's (see docs).
    """
    hv_aq = _hardness("hardness_hv_as_quenched", hardness_hv_as_quenched)
    hv_m = _hardness("hardness_hv_martensite", hardness_hv_martensite)
    c = _carbon(el(comp, "C"))
    hv_tm = np.minimum(tempered_martensite_hv(comp, temp_c, hours), hv_m)
    hv_np = np.minimum(NP_A + NP_B * c, hv_aq)
    denom = np.maximum(hv_m - hv_np, 1e-9)
    f = np.clip((hv_aq - hv_np) / denom, 0.0, 1.0)
    out = f * hv_tm + (1.0 - f) * np.minimum(hv_np, hv_tm)
    return np.minimum(out, hv_aq)


# ---------------------------------------------------------------------------------
# fit statistics (reported in docs/methods/tempering.md and checked by the tests)

def _hrc_error(pred_hv, obs_hv):
    """|ΔHRC| with both values floored at HRC 20 (the scale's lower limit)."""
    a = conversions.hv_to_hrc(np.maximum(pred_hv, 238.0))
    b = conversions.hv_to_hrc(np.maximum(obs_hv, 238.0))
    return np.abs(a - b)


def fit_report() -> dict:
    """Fit statistics of the master surface on the fitted points.

    Returns a dict: ``n_points``, ``n_grades``, ``coefficients`` (named),
    ``in_sample`` and ``leave_one_grade_out`` (each ``median_hrc`` and ``p90_hrc``:
    absolute error in HRC, values below HRC 20 counted at 20), and the per-point
    residual table ``points`` (DataFrame).
    """
    t = _points()
    t = t[t["fully_hardened"]].copy()
    c = t["c_pct"].to_numpy(float)
    mo, v, p = (t[k].to_numpy(float) for k in ("mo_pct", "v_pct", "P"))
    obs = t["hardness_hv"].to_numpy(float)
    pred_in = _surface(_coefficients(), c, mo, v, p)
    pred_lo = np.empty_like(obs)
    for g in t["grade"].unique():
        m = (t["grade"] == g).to_numpy()
        coef = _solve(t[~m])
        pred_lo[m] = _surface(coef, c[m], mo[m], v[m], p[m])
    e_in, e_lo = _hrc_error(pred_in, obs), _hrc_error(pred_lo, obs)
    t["pred_hv"], t["pred_hv_logo"] = pred_in, pred_lo
    t["err_hrc"], t["err_hrc_logo"] = e_in, e_lo
    stats = lambda e: {"median_hrc": float(np.median(e)), "p90_hrc": float(np.percentile(e, 90))}
    return {"n_points": int(len(t)), "n_grades": int(t["grade"].nunique()),
            "coefficients": dict(zip(FEATURES, _coefficients())),
            "in_sample": stats(e_in), "leave_one_grade_out": stats(e_lo), "points": t}


# ---------------------------------------------------------------------------------
# input checks

# NaN marks "no value" in the vectorised catalogue and propagates to NaN; impossible
# values (infinite, negative time, below absolute zero) raise InputError.

def _kelvin(temp_c):
    t = np.asarray(temp_c, float)
    if np.any(np.isinf(t)) or np.any(t <= -273.15):
        raise InputError("temp_c", temp_c, "finite temperatures above -273.15 °C (NaN for none)")
    return t + 273.15


def _positive_hours(hours):
    h = np.asarray(hours, float)
    if np.any(np.isinf(h)) or np.any(h <= 0):
        raise InputError("hours", hours, "finite times > 0 h (NaN for none)")
    return h


def _carbon(c_pct):
    c = np.asarray(c_pct, float)
    if np.any(np.isinf(c)) or np.any(c < 0) or np.any(c > 2.1):
        raise InputError("C", c_pct, "carbon 0–2.1 wt % (steels; NaN for none)")
    return c


def _hardness(name, x):
    a = np.asarray(x, float)
    if np.any(np.isinf(a)) or np.any(a <= 0):
        raise InputError(name, x, "finite hardness values > 0 HV (NaN for none)")
    return a


validity.register("hollomon_jaffe", {"temp_c": (150.0, 705.0, "°C"), "hours": (0.1, 100.0, "h"),
                                     "C": (0.3, 1.0, "wt%")},
                  "Hollomon & Jaffe, Trans. AIME 162 (1945) 223")
validity.register("tempering_hv", {"temp_c": (150.0, 705.0, "°C"), "hours": (0.1, 100.0, "h"),
                                   "C": (0.3, 0.6, "wt%"), "Mo": (0.0, MO_MAX, "wt%"),
                                   "V": (0.0, V_MAX, "wt%"), "Ni": (0.0, 2.0, "wt%"),
                                   "Cr": (0.0, 1.1, "wt%"), "Si": (0.0, 2.2, "wt%")},
                  "fitted to data/tempering_points.csv (ASM Metals Handbook Vol. 1 Q&T table; "
                  "families carbon_steel, alloy_steel)")
