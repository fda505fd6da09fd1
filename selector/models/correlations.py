"""Strength–ductility correlations for quenched-and-tempered steels (fitted to handbook data).

Given the tensile strength of a quenched-and-tempered (tempered-martensite) steel,
estimate its yield strength, elongation and reduction of area.  The correlations are
fitted OFFLINE by ``scripts/fit_correlations.py`` (least squares, per family) to the
fully hardened rows of ``data/tempering_points.csv`` (ASM Metals Handbook Vol. 1 (1990) table of typical
properties of quenched and tempered 25 mm bars, plus a 4340 vendor sheet):

    yield ratio  YS/UTS = alloy_steel:  s0 + s1·u + s2·u²,  u = clip(UTS, fitted span)/1000
                          carbon_steel: clip(r0 + r1·T/100, 0.50, 0.98)            (T = tempering °C)
    elongation   EL  = exp(e0 + e1·UTS/1000)                           (% in 50 mm)
    red. of area RA  = alloy_steel:  clip(q0 + q1·UTS/1000, 2, 80)
                       carbon_steel: min(exp(q0 + q1·UTS/1000), RA_alloy(UTS))

The alloy-steel yield ratio is a function of the tensile strength, the form of the
classical yield-vs-tensile charts for hardened-and-tempered steels (SAE J413 (1990) gives
its TS → YS figure; Janitzky & Baeyertz, ASM Metals Handbook 1939, relate YS to TS for
fully hardened and tempered steels): the ratio peaks near 1500 MPa (mid tempers) and falls
both towards high strength (low tempers: low-temperature-tempered martensite yields
gradually with a high strain-hardening rate, Krauss, Mater. Sci. Eng. A 273–275 (1999)
40–57) and towards low strength (high tempers, softer structures).  The quadratic was
chosen over a line in T (the previous form), a line and a cubic in u by leave-one-grade-out
error on the fitted rows (docs/methods/correlations.md).  Outside the fitted UTS span the
ratio is held at its end value (no extrapolation of the quadratic) and the
``qt_correlations`` validity range warns.  The carbon-steel rows (two grades, water
quenched) are fitted best by the line in T; they keep it.

The exponential elongation form follows the proposal that total elongation is an
exponential function of UTS for C–Mn and Q&T steels (Mater. Sci. Technol. 2025,
doi 10.1177/02670836251331815; coefficients there not obtained, so fitted here).
SAE J413 (1990) states that at equal hardness alloy steels show a higher reduction
of area than plain-carbon steels; the carbon-steel RA is capped at the alloy-steel
line to respect that where the carbon data (586–1120 MPa) would cross it.

The package reads the coefficients from ``data/fits/correlations_coefficients.csv``; it
never fits at import or first call.

Families: ``carbon_steel``, ``alloy_steel``; ``carburizing_steel`` and
``nitriding_steel`` (their cores) use the alloy-steel coefficients, and so does
``stainless_martensitic`` (no martensitic-stainless rows were fitted: a documented
approximation).

References
----------
ASM Metals Handbook Vol. 1 (1990), typical mechanical properties of quenched and
tempered carbon and alloy steels (the fitted rows; see the CSV for confidence).
SAE J413, Mechanical properties of heat treated wrought steels (1990) (qualitative
statements and the existence of its TS → YS figure; curve values not obtained).
J. A. Janitzky and M. Baeyertz, ASM Metals Handbook (1939) (from memory: values not obtained).
G. Krauss, Martensite in steel: strength and structure, Mater. Sci. Eng. A 273–275 (1999)
40–57, doi 10.1016/S0921-5093(99)00288-9.
"""
from __future__ import annotations

import functools

import numpy as np

from ..errors import DataFileError, InputError, check_choice
from . import fitted, validity

FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_martensitic")
#: which fitted family each family uses
FIT_FAMILY = {"carbon_steel": "carbon_steel", "alloy_steel": "alloy_steel",
              "carburizing_steel": "alloy_steel", "nitriding_steel": "alloy_steel",
              "stainless_martensitic": "alloy_steel"}
RATIO_RANGE = (0.50, 0.98)
RA_RANGE = (2.0, 80.0)
#: the yield-ratio form of each fitted family: a line in tempering temperature, or a
#: quadratic in tensile strength (docs/methods/correlations.md)
RATIO_FORM = {"carbon_steel": "temper_linear", "alloy_steel": "uts_quadratic"}
#: coefficient names of each ratio form in data/fits/correlations_coefficients.csv
RATIO_NAMES = {"temper_linear": ("r0", "r1"), "uts_quadratic": ("s0", "s1", "s2")}


FIT_NAME = "correlations"
FIT_FAMILIES = ("carbon_steel", "alloy_steel")


def fit_rows(points, fit_family: str):
    """The rows of the tempering table (``tempering.load_points()``) that the
    ``fit_family`` correlations are fitted on: fully hardened, that family, with UTS.

    Example (illustrative: a value of this implementation, not a published one)

    >>> from selector.models import tempering
    >>> bool(fit_rows(tempering.load_points(), "alloy_steel")["fully_hardened"].all())
    True
    """
    t = points
    return t[t["fully_hardened"] & (t["family"] == fit_family) & t["uts_mpa"].notna()]


def _lstsq(a, y):
    coef, *_ = np.linalg.lstsq(a, y, rcond=None)
    return tuple(float(c) for c in coef)


def solve(d, fit_family: str) -> dict:
    """Least-squares coefficients of the three correlations on the rows ``d`` (used by
    ``scripts/fit_correlations.py``; the package reads the shipped values).

    Example (illustrative: a value of this implementation, not a published one)

    >>> from selector.models import tempering
    >>> d = fit_rows(tempering.load_points(), "alloy_steel")
    >>> solve(d, "alloy_steel")["n_rows"] == len(d)
    True
    """
    u = d["uts_mpa"].to_numpy(float) / 1000.0
    ratio = _lstsq(ratio_design(d["uts_mpa"].to_numpy(float), d["temp_c"].to_numpy(float), RATIO_FORM[fit_family]),
                   d["yield_mpa"].to_numpy(float) / d["uts_mpa"].to_numpy(float))
    m = d["elongation_pct"].notna().to_numpy()
    el = _lstsq(np.c_[np.ones(m.sum()), u[m]], np.log(d["elongation_pct"].to_numpy(float)[m]))
    ra_y = d["reduction_area_pct"].to_numpy(float)[m]
    a = np.c_[np.ones(m.sum()), u[m]]
    ra = _lstsq(a, np.log(ra_y)) if fit_family == "carbon_steel" else _lstsq(a, ra_y)
    return {"ratio": ratio, "elongation": el, "reduction_area": ra, "n_rows": int(len(d)),
            "uts_mpa": (float(d["uts_mpa"].min()), float(d["uts_mpa"].max())),
            "temp_c": (float(d["temp_c"].min()), float(d["temp_c"].max()))}


def ratio_design(uts_mpa, temper_temp_c, form: str):
    """The columns of the least-squares design of a yield-ratio ``form`` (``RATIO_FORM``):
    ``[1, T/100]`` for ``temper_linear``, ``[1, u, u²]`` (u = UTS/1000) for
    ``uts_quadratic``.  Used by :func:`solve` and, with the shipped coefficients, by
    :func:`ratio_of`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> ratio_design([1000.0], [500.0], "uts_quadratic").tolist()
    [[1.0, 1.0, 1.0]]
    """
    check_choice("form", form, tuple(RATIO_NAMES))
    u = np.asarray(uts_mpa, float) / 1000.0
    t = np.asarray(temper_temp_c, float) / 100.0
    if form == "temper_linear":
        return np.stack(np.broadcast_arrays(np.ones_like(t), t), axis=-1)
    u = np.broadcast_to(u, np.broadcast(u, t).shape)
    return np.stack([np.ones_like(u), u, u * u], axis=-1)


def ratio_of(k: dict, fit_family: str, uts_mpa, temper_temp_c):
    """Yield ratio YS/UTS of coefficients ``k`` (a :func:`solve` or :func:`coefficients`
    result) for ``fit_family``; the strength is held inside the fitted UTS span of the
    ``uts_quadratic`` form (no extrapolation), the ratio clipped to 0.50–0.98, and a NaN
    tempering temperature gives NaN.

    Example (illustrative: a value of this implementation, not a published one)

    >>> k = {"ratio": (0.9, 0.0, 0.0), "uts_mpa": (700.0, 2000.0)}
    >>> float(ratio_of(k, "alloy_steel", 1000.0, 500.0))
    0.9
    """
    form = RATIO_FORM[fit_family]
    u = np.asarray(uts_mpa, float)
    t = np.asarray(temper_temp_c, float)
    if form == "uts_quadratic":
        u = np.clip(u, *k["uts_mpa"])
    r = ratio_design(u, t, form) @ np.asarray(k["ratio"], float)
    return np.where(np.isfinite(t), np.clip(r, *RATIO_RANGE), np.nan)


#: coefficient names in data/fits/correlations_coefficients.csv (the ratio's by family: RATIO_NAMES)
COEFFICIENT_NAMES = {"ratio": None, "elongation": ("e0", "e1"), "reduction_area": ("q0", "q1"),
                     "uts_mpa": ("uts_min", "uts_max"), "temp_c": ("temp_min", "temp_max")}


def coefficient_names(fit_family: str) -> dict:
    """``COEFFICIENT_NAMES`` with the ratio names of ``fit_family``'s form.

    Example (illustrative: a value of this implementation, not a published one)

    >>> coefficient_names("alloy_steel")["ratio"]
    ('s0', 's1', 's2')
    """
    return {**COEFFICIENT_NAMES, "ratio": RATIO_NAMES[RATIO_FORM[fit_family]]}


@functools.cache
def coefficients(fit_family: str) -> dict:
    """Shipped coefficients of ``fit_family`` (``carbon_steel`` or ``alloy_steel``), read
    from ``data/fits/correlations_coefficients.csv``: ``ratio`` (r0, r1 of the carbon
    steels' line in T; s0, s1, s2 of the alloy steels' quadratic in UTS),
    ``elongation`` (e0, e1), ``reduction_area`` (q0, q1), and the UTS and
    tempering-temperature spans of the rows fitted.

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted(coefficients("alloy_steel"))
    ['elongation', 'n_rows', 'ratio', 'reduction_area', 'temp_c', 'uts_mpa']
    """
    check_choice("fit_family", fit_family, FIT_FAMILIES)
    k = fitted.coefficients(FIT_NAME)
    out = {key: tuple(k[(fit_family, n)] for n in names) for key, names in coefficient_names(fit_family).items()}
    out["n_rows"] = int(k[(fit_family, "n_rows")])
    return out


def _family(family):
    fams = np.asarray(family)
    for f in np.unique(fams):
        check_choice("family", str(f), FAMILIES)
    return fams


def _by_family(family, uts_mpa, fn):
    """Evaluate ``fn(fit_family, mask)`` for a scalar or array family."""
    fams = _family(family)
    if fams.ndim == 0:
        return fn(FIT_FAMILY[str(fams)])
    shape = np.broadcast(fams, uts_mpa).shape
    out = np.full(shape, np.nan)
    fb = np.broadcast_to(fams, shape)
    for f in np.unique(fams):
        m = fb == f
        out[m] = np.broadcast_to(fn(FIT_FAMILY[str(f)]), shape)[m]
    return out


def _uts(uts_mpa):
    """NaN (no value) propagates; infinite or non-positive strengths raise."""
    u = np.asarray(uts_mpa, float)
    if np.any(np.isinf(u)) or np.any(u <= 0):
        raise InputError("uts_mpa", uts_mpa, "finite tensile strengths > 0 MPa (NaN for none)")
    return u


def yield_ratio(uts_mpa, temper_temp_c, family):
    """Yield-to-tensile ratio YS/UTS of a Q&T steel (fitted to the ASM Metals Handbook
    Vol. 1 (1990) Q&T table; forms after the SAE J413 (1990) TS → YS chart).

    alloy_steel (and the families that use its fit):
        YS/UTS = s0 + s1·u + s2·u²,  u = clip(UTS, fitted span) / 1000
    carbon_steel:
        YS/UTS = clip(r0 + r1·T/100, 0.50, 0.98)

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.
    temper_temp_c : array_like
        Tempering temperature, °C (NaN: no value, NaN out).
    family : str or array of str
        As in :func:`yield_from_uts`.

    Returns
    -------
    ndarray
        YS/UTS, 0.50–0.98.

    Validity
    --------
    ``qt_correlations`` (UTS and tempering spans of the fitted rows); outside the UTS span
    the alloy ratio is held at its end value.

    References
    ----------
    ASM Metals Handbook Vol. 1 (1990) Q&T table (fitted rows); SAE J413 (1990); Krauss,
    Mater. Sci. Eng. A 273–275 (1999) 40–57 (the fall at low tempers).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(yield_ratio(1500.0, 425.0, "alloy_steel")), 3)
    0.923
    """
    u = _uts(uts_mpa)
    tt = np.asarray(temper_temp_c, float)
    if np.any(np.isinf(tt)):
        raise InputError("temper_temp_c", temper_temp_c, "finite temperatures, °C (NaN for none)")
    return _by_family(family, np.empty(np.broadcast(u, tt).shape),
                      lambda fit: ratio_of(coefficients(fit), fit, u, tt))


def yield_from_uts(uts_mpa, temper_temp_c, family):
    """Yield (0.2 % offset) strength of a Q&T steel from its tensile strength
    (correlation fitted to the ASM Metals Handbook Vol. 1 (1990) Q&T table).

    YS = UTS · :func:`yield_ratio` (alloy steels: a quadratic in UTS; carbon steels:
    clip(r0 + r1·T/100, 0.50, 0.98))

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.
    temper_temp_c : array_like
        Tempering temperature, °C.
    family : str or array of str
        One of ``carbon_steel``, ``alloy_steel``, ``carburizing_steel``,
        ``nitriding_steel``, ``stainless_martensitic`` (the last three use the
        alloy-steel fit).

    Returns
    -------
    ndarray
        Yield strength, MPa; 0 < YS ≤ 0.98·UTS.

    Validity
    --------
    Registered as ``qt_correlations``: the fitted UTS and tempering spans
    (alloy steel 758–2220 MPa; carbon steel 586–1120 MPa; 205–650 °C).

    References
    ----------
    ASM Metals Handbook Vol. 1 (1990) Q&T property table (fitted rows in
    data/tempering_points.csv); SAE J413 (1990); Krauss (1999).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(yield_from_uts(1000.0, 540.0, "alloy_steel")))
    886
    """
    u = _uts(uts_mpa)
    return u * yield_ratio(u, temper_temp_c, family)


def elongation_from_uts(uts_mpa, family):
    """Tensile elongation (% in 50 mm) of a Q&T steel from its tensile strength
    (exponential correlation fitted to the ASM Metals Handbook Vol. 1 (1990) Q&T table).

    EL = exp(e0 + e1·UTS/1000)

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.
    family : str or array of str
        As in :func:`yield_from_uts`.

    Returns
    -------
    ndarray
        Elongation, %.

    Validity
    --------
    As :func:`yield_from_uts` (``qt_correlations``).

    References
    ----------
    ASM Metals Handbook Vol. 1 (1990) Q&T table; exponential form after Mater. Sci.
    Technol. (2025), doi 10.1177/02670836251331815.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(elongation_from_uts(1000.0, "alloy_steel")), 1)
    18.0
    """
    u = _uts(uts_mpa)

    def f(fit):
        e0, e1 = coefficients(fit)["elongation"]
        return np.exp(e0 + e1 * u / 1000.0)
    return _by_family(family, u, f)


def reduction_of_area_from_uts(uts_mpa, family):
    """Reduction of area (%) of a Q&T steel from its tensile strength (correlation
    fitted to the ASM Metals Handbook Vol. 1 (1990) Q&T table).

    alloy steel:  RA = clip(q0 + q1·UTS/1000, 2, 80)
    carbon steel: RA = min(exp(q0 + q1·UTS/1000), RA_alloy(UTS))   (SAE J413: alloy ≥ carbon)

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.
    family : str or array of str
        As in :func:`yield_from_uts`.

    Returns
    -------
    ndarray
        Reduction of area, %.

    Validity
    --------
    As :func:`yield_from_uts` (``qt_correlations``).

    References
    ----------
    ASM Metals Handbook Vol. 1 (1990) Q&T table; SAE J413 (1990).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(reduction_of_area_from_uts(1000.0, "alloy_steel")), 1)
    56.9
    """
    u = _uts(uts_mpa)

    def alloy():
        q0, q1 = coefficients("alloy_steel")["reduction_area"]
        return np.clip(q0 + q1 * u / 1000.0, *RA_RANGE)

    def f(fit):
        if fit == "alloy_steel":
            return alloy()
        q0, q1 = coefficients("carbon_steel")["reduction_area"]
        return np.clip(np.minimum(np.exp(q0 + q1 * u / 1000.0), alloy()), *RA_RANGE)
    return _by_family(family, u, f)


def fit_report(points) -> dict:
    """Per-family errors of the three correlations (shipped coefficients) on their
    fitted rows of ``points`` (``tempering.load_points()``): yield (median and max
    relative error), elongation and RA (median and max absolute error, percentage
    points).  In-sample (calibration) figures.

    Example (illustrative: a value of this implementation, not a published one)

    >>> from selector.models import tempering
    >>> sorted(fit_report(tempering.load_points()))
    ['alloy_steel', 'carbon_steel']
    """
    out = {}
    for fit in FIT_FAMILIES:
        d = fit_rows(points, fit)
        u, tt = d["uts_mpa"].to_numpy(float), d["temp_c"].to_numpy(float)
        ys = d["yield_mpa"].to_numpy(float)
        e_ys = np.abs(yield_from_uts(u, tt, fit) - ys) / ys
        m = d["elongation_pct"].notna().to_numpy()
        e_el = np.abs(elongation_from_uts(u[m], fit) - d["elongation_pct"].to_numpy(float)[m])
        e_ra = np.abs(reduction_of_area_from_uts(u[m], fit) - d["reduction_area_pct"].to_numpy(float)[m])
        out[fit] = {"n_rows": int(len(d)),
                    "yield_rel": (float(np.median(e_ys)), float(np.max(e_ys))),
                    "elongation_pts": (float(np.median(e_el)), float(np.max(e_el))),
                    "reduction_area_pts": (float(np.median(e_ra)), float(np.max(e_ra)))}
    return out


def _register():
    try:
        c, a = coefficients("carbon_steel"), coefficients("alloy_steel")
    except (DataFileError, KeyError):
        return   # no coefficient file yet (or one of an older form): only scripts/fit_correlations.py may run
    ref = ("fitted to data/tempering_points.csv (ASM Metals Handbook Vol. 1 Q&T table); "
           "carbon steel UTS {:.0f}–{:.0f} MPa".format(*c["uts_mpa"]))
    validity.register("qt_correlations", {
        "uts_mpa": (a["uts_mpa"][0], a["uts_mpa"][1], "MPa"),
        "temper_temp_c": (min(a["temp_c"][0], c["temp_c"][0]), max(a["temp_c"][1], c["temp_c"][1]), "°C"),
    }, ref)
    validity.register("qt_correlations_carbon", {"uts_mpa": (c["uts_mpa"][0], c["uts_mpa"][1], "MPa")}, ref)


_register()
