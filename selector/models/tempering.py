"""Tempering of quenched steel: the Hollomon–Jaffe parameter and a master surface
for tempered martensite fitted offline.

Hollomon & Jaffe (1945) showed that the hardness of tempered martensite depends on
time and temperature only through

    P = T · (C + log10 t)            (T in K, t in h)

so that two tempers with the same P give the same hardness.  On that basis a
hardness master surface for fully martensitic steel, HV_TM(P, composition), is fitted
OFFLINE by ``scripts/fit_tempering.py`` to the fully hardened rows of
``data/tempering_points.csv`` (and the 41Cr4 table of the reference file), in two stages: every
row read as tempered martensite (linear least squares), then the rows the route's hardening
chain makes at least 50 % martensite refitted so that the route's mixture rule
(:mod:`selector.models.structure_tempering`, with this surface for the martensite) matches
them (docs/methods/tempering.md, section 2a); the package reads its coefficients from
``data/fits/tempering_coefficients.csv`` (never fits at import or first call).  It is
capped at the as-quenched martensite hardness of :mod:`selector.models.martensite`.

The form (chosen by leave-one-grade-out error among richer linear forms; see
docs/methods/tempering.md):

    s   = P/1000 − 16
    a   = max(P/1000 − 12, 0)
    HV_TM = a0 + a1·C + (b0 + b1·C)·s + (k_Mo·Mo + k_V·V)·a + k_Cr·Cr
    HV_TM = clip(HV_TM, HV_FLOOR, HV_martensite(C))

The carbon effect weakens as P rises (b1 < 0: Grange, Hribal & Porter 1977 found the
effect of carbon on tempered hardness decreasing markedly with tempering
temperature), while the Mo and V terms grow there: the resistance to softening that
the carbide formers give (the same authors found the alloy effects growing with
tempering temperature), and chromium raises the tempered hardness at every temper
(k_Cr > 0, the same authors' finding; fitted with the 41Cr4 tempering table of
``data/reference/qt_steels.csv`` in the data).  Mn, Si, Ni and quadratic terms in s or C
were tried by the same criterion and did not lower the leave-one-grade-out error, so
those elements act through carbon and hardenability only; a carbon term in max(P/1000 − 12, 0)
instead of C·s scored slightly better (1.91 against 2.07 HRC) but extrapolates to
60.5 HRC for 0.85 % C tempered at 175 °C, below the 62–64 HRC of high-carbon martensite
after such a temper (from memory), so C·s is kept.  Mo, V and Cr are
held at the top of the fitted range (0.25 % Mo, 0.15 % V, 1.05 % Cr) so the curve always softens
with P; tool steels with secondary hardening are outside the model.

The hardness of a partly martensitic structure after tempering is the mixture rule
of :mod:`selector.models.structure_tempering`.

References
----------
J.H. Hollomon and L.D. Jaffe, "Time-temperature relations in tempering steel",
Trans. AIME 162 (1945) 223-249.
L.C.F. Canale et al., "A historical overview of steel tempering parameters", Int. J.
Microstructure and Materials Properties 3 (2008) 474 (carbon dependence of C; from memory).
R.A. Grange, C.R. Hribal and L.F. Porter, "Hardness of tempered martensite in carbon
and low-alloy steels", Metall. Trans. A 8A (1977) 1775 (alloy effects grow with
tempering temperature).
ASM Metals Handbook Vol. 1 (1990), typical mechanical properties of quenched and
tempered steels (most of the data fitted).
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table
from ..errors import DataFileError, InputError
from . import conversions, fitted, validity
from .composition import el
from .martensite import martensite_hardness_hrc

FILE = "tempering_points.csv"
#: name of the fitted surface in data/fits/ (tempering_coefficients.csv, _rows.csv, _cv.csv)
FIT_NAME = "tempering"
#: elements whose fitted span is checked by :func:`check_validity`
ALLOY_CHECKED = ("C", "Mn", "Si", "Ni", "Cr", "Mo", "V")

#: Hollomon–Jaffe constant against carbon: C = C_INTERCEPT − C_SLOPE·%C, clipped to C_RANGE
C_INTERCEPT, C_SLOPE, C_RANGE = 21.3, 5.8, (15.0, 21.3)
#: P/1000 from which the Mo and V terms act (chosen by leave-one-grade-out error)
P_ALLOY_ONSET = 12.0
#: elements of the surface's alloy terms; each is held at the top of the fitted data (``<El>_max`` of
#: the fitted range, :func:`fitted_range`)
CAPPED = ("Mo", "V", "Cr", "Mn", "Si", "Ni")
#: lowest hardness returned for tempered martensite, HV (spheroidized low-carbon
#: steel is about 120-150 HV: common practice)
HV_FLOOR = 120.0

FEATURES = ("1", "C", "s", "C*s", "Mo*a", "V*a", "Cr", "Cr*a", "Mn*a", "Si", "Ni")

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

    Example (from the source: the definition of Hollomon & Jaffe 1945, 538 °C for 1 h with
    C = 20: 811.15 K × 20 = 16 223 K (hand evaluation))

    >>> float(hollomon_jaffe_parameter(538.0, 1.0, 20.0))
    16223.0
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

    Example (from the source: the linear form above, 21.3 − 5.8 × 0.40 = 18.98 at 0.40 % C
    (hand evaluation; coefficients from memory))

    >>> round(float(hollomon_jaffe_constant(0.40)), 2)
    18.98
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

    Example (from the source: equal P (Hollomon & Jaffe 1945), 1 h at 538 °C with C = 20
    equals 10 ** (16 223 / 839.15 − 20) = 0.215 h at 566 °C (hand evaluation))

    >>> round(float(equivalent_hours(538.0, 1.0, 566.0, 20.0)), 3)
    0.215
    """
    p = hollomon_jaffe_parameter(temp_c, hours, c_const)
    return 10.0 ** (p / _kelvin(to_temp_c) - np.asarray(c_const, float))


# ---------------------------------------------------------------------------------
# the fitted master surface (coefficients fitted offline by scripts/fit_tempering.py)

def tempering_features(c, mo, v, p, cr=0.0, mn=0.0, si=0.0, ni=0.0, caps=None):
    """Design matrix of the master surface, columns :data:`FEATURES` (last axis).

    ``s = P/1000 − 16``, ``a = max(P/1000 − 12, 0)``; each element of :data:`CAPPED` is held
    at ``caps[el]`` (None: the top of the shipped fit's data, :func:`fitted_range`).  The element
    terms follow the shapes of Grange, Hribal & Porter (1977): Ni and Si acting alike at every
    temper, Mn, Mo and V growing from P/1000 = 12, Cr a constant plus a part growing with the
    temper.  The shipped form holds the coefficients of the terms it does not use at 0
    (``scripts/fit_tempering.py``, ``FORMS``).  Shared by the package and the fit script so
    that the two can never use different forms.

    Example (illustrative: a value of this implementation, not a published one; 0.40 % C,
    0.20 % Mo at P = 16 000, so s = 0 and a = 4)

    >>> tempering_features(0.40, 0.20, 0.0, 16000.0).round(3).tolist()
    [1.0, 0.4, 0.0, 0.0, 0.8, 0.0, 0.0, 0.0, 0.0, 0.0, 0.0]
    """
    if caps is None:
        rng = fitted_range()
        caps = {e: rng[e][1] for e in CAPPED}
    c, mo, v, p, cr, mn, si, ni = (np.asarray(x, float) for x in (c, mo, v, p, cr, mn, si, ni))
    s = p / 1000.0 - 16.0
    a = np.maximum(p / 1000.0 - P_ALLOY_ONSET, 0.0)
    mo, v, cr, mn, si, ni = (np.minimum(x, caps[e]) for x, e in zip((mo, v, cr, mn, si, ni), CAPPED))
    one = np.ones(np.broadcast(c, mo, v, p, cr, mn, si, ni).shape)
    return np.stack(np.broadcast_arrays(one, c, s, c * s, mo * a, v * a, cr, cr * a, mn * a, si, ni), axis=-1)


def load_points():
    """The tempering data table ``data/tempering_points.csv``, validated, with
    ``hardness_hv`` (HRC by ASTM E140, else HB by E140) and ``P`` (Hollomon–Jaffe
    parameter with the carbon-dependent constant) added.  Read by the fit scripts
    and the tests only: the package itself reads fitted coefficients.

    Example (illustrative: a value of this implementation, not a published one)

    >>> t = load_points()
    >>> {"hardness_hv", "P"} <= set(t.columns), bool((t["hardness_hv"] > 0).all())
    (True, True)"""
    t = read_table(FILE, _SCHEMA)
    hv = np.where(t["hardness_hrc"].notna(), conversions.hrc_to_hv(t["hardness_hrc"].to_numpy(float)),
                  conversions.hb_to_hv(t["hardness_hb"].to_numpy(float)))
    t["hardness_hv"] = hv
    t["P"] = hollomon_jaffe_parameter(t["temp_c"].to_numpy(float), t["hours"].to_numpy(float),
                                      hollomon_jaffe_constant(t["c_pct"].to_numpy(float)))
    return t


def surface_hv(coef, c, mo, v, p, cr=0.0, mn=0.0, si=0.0, ni=0.0, caps=None):
    """The master surface with coefficients ``coef`` (in :data:`FEATURES` order),
    clipped to [HV_FLOOR, HV_M(C)].

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(surface_hv(coefficients(), 0.40, 0.20, 0.0, 16000.0)))
    307"""
    hv = tempering_features(c, mo, v, p, cr, mn, si, ni, caps) @ np.asarray(coef, float)
    cap = conversions.hrc_to_hv(martensite_hardness_hrc(c, 99.9))
    return np.clip(hv, HV_FLOOR, cap)


@functools.cache
def _fit() -> dict:
    return fitted.coefficients(FIT_NAME)


def coefficients() -> tuple:
    """The shipped coefficients (``data/fits/tempering_coefficients.csv``) in
    :data:`FEATURES` order.

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(coefficients()) == len(FEATURES)
    True"""
    k = _fit()
    return tuple(float(k[("tempering_hv", name)]) for name in FEATURES)


def fitted_range() -> dict:
    """Span of the data the surface was fitted on: ``{variable: (lo, hi)}`` for C, Mn,
    Si, Ni, Cr, Mo, V (wt %), temp_c (°C), hours (h) and P_1000 (P/1000), as written
    by the fit script.

    Example (illustrative: a value of this implementation, not a published one; the
    carbon span of the fitted rows)

    >>> fitted_range()["C"]
    (0.3, 0.6)"""
    k = _fit()
    out = {}
    for (fit, name), val in k.items():
        if fit == "tempering_hv_range":
            var, side = name.rsplit("_", 1)
            lo, hi = out.get(var, (np.nan, np.nan))
            out[var] = (val, hi) if side == "min" else (lo, val)
    return out


def tempered_martensite_hv(comp, temp_c, hours, coef=None, caps=None):
    """Hardness of fully martensitic steel after tempering (master surface on the
    Hollomon–Jaffe parameter, Hollomon & Jaffe 1945; alloy terms after Grange,
    Hribal & Porter 1977).

    HV = clip(a0 + a1·C + (b0 + b1·C)·(P/1000 − 16) + (k_Mo·Mo + k_V·V)·max(P/1000 − 12, 0)
              + k_Cr·Cr, 120, HV_M(C)),   P = T_K·(C_HJ(C) + log10 t_h)

    with HV_M(C) the as-quenched 99.9 % martensite hardness
    (:func:`selector.models.martensite.martensite_hardness_hrc`, converted by ASTM E140)
    and the coefficients fitted offline by ``scripts/fit_tempering.py`` to the fully
    hardened rows of ``data/tempering_points.csv`` (``data/fits/tempering_coefficients.csv``).
    The fit holds the carbon slope a1 + b1·(P/1000 − 16) at ≥ 0 up to the top of its data,
    with b1 ≤ 0: carbon raises the hardness of tempered martensite at every temper, its
    effect falling with the temper (Grange, Hribal & Porter 1977).

    Parameters
    ----------
    comp : mapping
        Composition, element symbol → wt % (float or array); uses C, Mo, V, Cr.
    temp_c : array_like
        Tempering temperature, °C.
    hours : array_like
        Time at temperature, h (> 0).
    coef : sequence of float, optional
        Coefficients in :data:`FEATURES` order; None (the package's use) reads the shipped
        ones (:func:`coefficients`).  The fit script passes trial coefficients here.
    caps : mapping, optional
        Element → wt % at which each alloy term is held (None: the top of the shipped fit's
        data, :func:`fitted_range`); the fit script passes the span of its own rows.

    Returns
    -------
    ndarray
        Vickers hardness HV (broadcast of the inputs).

    Validity
    --------
    Registered as ``tempering_hv``: the span of the fitted rows (C 0.30–0.60 %,
    P/1000 8.7–18.3, Mn 0.5–1.75, Si ≤ 2.0, Ni ≤ 1.83, Cr ≤ 1.05, Mo ≤ 0.25, V ≤ 0.15 %;
    :func:`fitted_range`), and ``hollomon_jaffe``.  The route checks both
    (:func:`check_validity`) and warns outside.

    References
    ----------
    Hollomon & Jaffe, Trans. AIME 162 (1945) 223; Grange, Hribal & Porter,
    Metall. Trans. A 8A (1977) 1775 (alloy effects growing with tempering
    temperature); data: ASM Metals Handbook Vol. 1 (1990) Q&T table and the other
    sources named in ``data/tempering_points.csv``.

    Example (calibration, not validation: ASM Metals Handbook Vol. 1 (1990) Q&T table, 4340
    oil quenched, 25 mm bar, tempered 540 °C: 360 HB (from memory; a row the fit used, 2 h
    assumed); this implementation gives 343 HB (by ASTM E140), about 2 HRC below it)

    >>> from selector.models import conversions
    >>> s = {"C": 0.405, "Mn": 0.70, "Si": 0.25, "Ni": 1.825, "Cr": 0.80, "Mo": 0.25}
    >>> round(float(conversions.hv_to_hb(tempered_martensite_hv(s, 540.0, 2.0))))
    343
    """
    c = _carbon(el(comp, "C"))
    p = hollomon_jaffe_parameter(temp_c, hours, hollomon_jaffe_constant(c))
    return surface_hv(coefficients() if coef is None else coef, c, el(comp, "Mo"), el(comp, "V"), p,
                      el(comp, "Cr"), el(comp, "Mn"), el(comp, "Si"), el(comp, "Ni"), caps)



#: hardness of non-martensitic products read in an as-quenched hardness, HV = A + B·%C (from memory)
NP_A, NP_B = 130.0, 230.0


def tempered_hv(hardness_hv_as_quenched, hardness_hv_martensite, comp, temp_c, hours):
    """Tempered hardness of a structure known only by its as-quenched hardness
    (hardness-fraction reading on the Hollomon–Jaffe surface).

    Used where no martensite fraction is tracked for the location: the carburized
    case (near-martensitic, low tempers) and martempered parts.  Through-hardened
    Q&T uses the chain's own martensite fraction instead
    (:mod:`selector.models.structure_tempering`).

        f    = (HV_AQ − HV_NP) / (HV_M − HV_NP), clipped to 0–1,   HV_NP = 130 + 230·%C
        HV_T = f · min(HV_TM, HV_M) + (1 − f) · min(HV_NP, HV_TM),  never above HV_AQ

    Parameters
    ----------
    hardness_hv_as_quenched, hardness_hv_martensite : array_like
        As-quenched hardness at the location and that of full martensite, HV.
    comp : mapping
        Composition, element → wt %.
    temp_c, hours : array_like
        Tempering temperature (°C) and time (h).

    Returns
    -------
    ndarray, HV.

    References
    ----------
    Hollomon & Jaffe, Trans. AIME 162 (1945) 223; the reading of the as-quenched
    hardness as a mixture is this project's (docs/methods/tempering.md).

    Example (illustrative: a value of this implementation, not a published one; a 4340
    location quenched to 600 HV against 650 HV for full martensite, tempered 540 °C 2 h)

    >>> s = {"C": 0.405, "Mn": 0.70, "Si": 0.25, "Ni": 1.825, "Cr": 0.80, "Mo": 0.25}
    >>> round(float(tempered_hv(600.0, 650.0, s, 540.0, 2.0)))
    346
    """
    hv_aq = _hardness("hardness_hv_as_quenched", hardness_hv_as_quenched)
    hv_m = _hardness("hardness_hv_martensite", hardness_hv_martensite)
    c = _carbon(el(comp, "C"))
    hv_tm = np.minimum(tempered_martensite_hv(comp, temp_c, hours), hv_m)
    hv_np = np.minimum(NP_A + NP_B * c, hv_aq)
    f = np.clip((hv_aq - hv_np) / np.maximum(hv_m - hv_np, 1e-9), 0.0, 1.0)
    return np.minimum(f * hv_tm + (1.0 - f) * np.minimum(hv_np, hv_tm), hv_aq)


def check_validity(comp, temp_c, hours) -> list[str]:
    """Warnings (``selector.models.validity``) for the values outside the ranges of
    ``hollomon_jaffe`` and ``tempering_hv`` (NaN tempers are ignored).

    Example (illustrative: a value of this implementation, not a published one; 0.965 % C
    lies outside the fitted 0.30–0.60 % C)

    >>> [m.split(":")[0] for m in check_validity({"C": 0.965}, 200.0, 1.0)]
    ['tempering_hv', 'tempering_hv']"""
    t = np.asarray(temp_c, float)
    h = np.asarray(hours, float)
    ok = np.isfinite(t) & np.isfinite(h)
    if not ok.any():
        return []
    t, h = np.broadcast_arrays(t, h)
    shape = t.shape
    vals = {e: np.broadcast_to(np.asarray(el(comp, e), float), shape)[ok] for e in ALLOY_CHECKED}
    c = vals["C"]
    p = hollomon_jaffe_parameter(t[ok], h[ok], hollomon_jaffe_constant(c)) / 1000.0
    msgs = validity.check("hollomon_jaffe", temp_c=t[ok], hours=h[ok], C=c)
    msgs += validity.check("tempering_hv", temp_c=t[ok], hours=h[ok], P_1000=p, **vals)
    return msgs


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
                  "Hollomon & Jaffe, Trans. AIME 162 (1945) 223 (plain-carbon steels 0.31-0.98 % C; "
                  "constant against carbon after Canale et al. 2008, from memory)")


def _register_fitted_range():
    try:
        rng = fitted_range()
    except DataFileError:
        # no coefficient file yet: only scripts/fit_tempering.py may run (it writes it);
        # tempered_martensite_hv raises the same DataFileError when called
        return
    units = {"temp_c": "°C", "hours": "h", "P_1000": ""}
    # the surface is a function of P and composition: P's span is the range checked (the
    # temperatures and times fitted are informative only; time enters through P)
    ranges = {k: (lo, hi, units.get(k, "wt%")) for k, (lo, hi) in rng.items() if k not in ("temp_c", "hours")}
    for e in ALLOY_CHECKED[1:]:   # an alloy absent from the fit data is allowed from 0
        lo, hi, u = ranges[e]
        ranges[e] = (0.0, hi, u)
    validity.register("tempering_hv", ranges,
                      "master surface fitted by scripts/fit_tempering.py to data/tempering_points.csv "
                      "(fully hardened rows; ASM Metals Handbook Vol. 1 Q&T table and others)")


_register_fitted_range()
