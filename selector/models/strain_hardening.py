"""Cold work: Hollomon strain hardening (Hollomon 1945) and its consequences.

The flow curve is the Hollomon power law ``sigma_true = K eps_true^n`` with the
annealed constants of a family or grade (``data/hollomon_constants.csv``).  A cold
reduction (area reduction, drawing or rolling) is a prestrain ``eps0 = -ln(1 - r)``;
a tensile test on the cold-worked section then continues the same flow curve, so
yield strength, tensile strength and the remaining uniform elongation follow from
``eps0`` (derived relations, after Dieter, *Mechanical
Metallurgy*, the Considère condition ``d sigma / d eps = sigma`` at necking).

Temper designations are aliases of reductions (``data/temper_aliases.csv``):
copper-alloy H01…H10 from Brown & Sharpe gauge numbers, aluminium H3x from the
ANSI H35.1 definitions, austenitic stainless quarter- to full-hard from the ASTM
A666 minimum tensile strength.  See ``docs/methods/strain_hardening.md``.

Nothing here warns: the validity range is registered with
:mod:`selector.models.validity`; impossible input raises
:class:`~selector.errors.InputError`.
"""
from __future__ import annotations

import functools
import math

import numpy as np

from ..catalogue.loader import CONFIDENCE, Column, Schema, read_table
from ..errors import InputError, check_array, check_choice
from . import validity

#: Brown & Sharpe (AWG) gauge ratio per gauge number, 92^(1/39) (ASTM B258 definition)
BS_GAUGE_RATIO = 92.0 ** (1.0 / 39.0)

#: largest reduction accepted as input (a reduction of 100 % is not a part)
MAX_REDUCTION_PCT = 99.0

REFERENCE = ("J.H. Hollomon, Trans. AIME 162 (1945) 268 (power-law flow curve); necking by the "
             "Considère condition; K, n from Kalpakjian & Schmid and Callister tables or fitted")

validity.register("strain_hardening", {"reduction_pct": (0.0, 80.0, "%"), "true_strain": (0.0, 1.6, "")},
                  "Hollomon law fitted up to true strains of about 1-1.5 (C26000 H08, 5052-H38 at 75 % "
                  "reduction); beyond that flow stress saturates and the power law over-predicts")


_check_array = check_array  # shared helper in selector.errors

def true_strain_from_reduction(reduction_pct):
    """True (logarithmic) strain of a cold reduction of area.

    ::

        eps = ln(A0 / A) = -ln(1 - r / 100)

    Parameters
    ----------
    reduction_pct : array_like
        Percent cold work, ``100 (A0 - A) / A0``, in [0, 99] %.

    Returns
    -------
    ndarray, true strain (dimensionless).

    Validity
    --------
    Definition; exact for drawing.  For flat rolling of strip (no spread) the area
    reduction equals the thickness reduction; the plane-strain equivalent strain,
    ``(2/sqrt(3)) ln(h0/h)``, is not used: the strip constants in
    ``hollomon_constants.csv`` are fitted on this uniaxial measure.

    References
    ----------
    Standard definitions; G.E. Dieter, *Mechanical Metallurgy*.

    Example (from the source: definition eps = ln(A0/A): a 75 % reduction is ln 4)

    >>> round(float(true_strain_from_reduction(75.0)), 4)
    1.3863
    """
    r = _check_array("reduction_pct", reduction_pct, 0.0, MAX_REDUCTION_PCT, "true_strain_from_reduction")
    return -np.log1p(-r / 100.0)


def reduction_from_true_strain(true_strain):
    """Inverse of :func:`true_strain_from_reduction`: ``r = 100 (1 - exp(-eps))`` in %.

    Example (from the source: definition eps = -ln(1 - r): a true strain of ln 2 is a 50 %
    reduction)

    >>> import math
    >>> round(float(reduction_from_true_strain(math.log(2.0))), 6)
    50.0
    """
    e = _check_array("true_strain", true_strain, 0.0, None, "reduction_from_true_strain")
    return 100.0 * -np.expm1(-e)


def reduction_from_gauge_numbers(numbers):
    """Percent reduction of ``numbers`` Brown & Sharpe gauge numbers.

    ::

        r = 100 (1 - 92^(-N/39))

    Copper-alloy rolled tempers H01, H02, H03, H04, H06, H08, H10 correspond to 1, 2,
    3, 4, 6, 8, 10 B&S numbers of reduction (common practice, from memory):
    10.9, 20.7, 29.4, 37.1, 50.1, 60.4, 68.6 %.

    Parameters
    ----------
    numbers : array_like
        Number of B&S gauge numbers, >= 0.

    Returns
    -------
    ndarray, %.

    References
    ----------
    ASTM B258 (American Wire Gauge: diameter ratio 92^(1/39) per gauge number).

    Example (from the source: ASTM B258 gauge ratio 92^(1/39): 4 B&S numbers (H04) is a 37.1 %
    reduction)

    >>> round(float(reduction_from_gauge_numbers(4)), 1)
    37.1
    """
    n = _check_array("numbers", numbers, 0.0, 40.0, "reduction_from_gauge_numbers")
    return 100.0 * (1.0 - BS_GAUGE_RATIO ** (-n))


def annealed_uts_mpa(k_mpa, n):
    """Engineering tensile strength of the annealed material on the Hollomon law.

    ::

        UTS0 = K n^n exp(-n)

    Check (Kalpakjian & Schmid K, n table): 70-30 brass, K = 900 MPa, n = 0.49 → 389 MPa.

    Example (from the source: 70-30 brass K = 900 MPa, n = 0.49 (Kalpakjian & Schmid table): K
    n^n e^-n = 389 MPa)

    >>> round(float(annealed_uts_mpa(900.0, 0.49)))
    389
    """
    k = _check_array("k_mpa", k_mpa, 0.0, None, "annealed_uts_mpa", lo_open=True)
    nn = _check_array("n", n, 0.0, 1.0, "annealed_uts_mpa", lo_open=True)
    return k * nn ** nn * np.exp(-nn)


def k_from_uts_mpa(uts_mpa, n):
    """Hollomon K that reproduces an annealed tensile strength for a given n
    (Considère fallback fit): ``K = UTS (e / n)^n``.

    Example (from the source: inverse of the 70-30 brass check (Kalpakjian & Schmid): 389 MPa at
    n = 0.49 is K = 900 MPa (the check rounds to 1 MPa))

    >>> round(float(k_from_uts_mpa(389.0, 0.49)))
    901
    """
    u = _check_array("uts_mpa", uts_mpa, 0.0, None, "k_from_uts_mpa", lo_open=True)
    nn = _check_array("n", n, 0.0, 1.0, "k_from_uts_mpa", lo_open=True)
    return u * (math.e / nn) ** nn


def cold_worked_properties(reduction_pct, k_mpa, n, base_yield_mpa, base_elongation_pct,
                           post_uniform_pct, yield_ratio=1.0):
    """Tensile properties after a cold reduction, from the Hollomon law (Hollomon 1945).

    ::

        eps_y  = (sigma_y0 / K)^(1/n)                  annealed yield as an offset strain
        eps_e  = eps0 + eps_y,   eps0 = -ln(1 - r)     effective prestrain
        YS     = max(sigma_y0, phi K eps_e^n)
        UTS    = K n^n exp(-(n - eps_e))               if eps_e < n   (necks later)
               = K eps_e^n                             if eps_e >= n  (necks at once)
        e_u    = exp(max(n - eps_e, 0)) - 1            remaining uniform elongation
        EL     = see below (uniform part + decaying necking part)

    UTS is on the cold-worked section (the load maximum ``K n^n A0 exp(-n)`` of the
    annealed bar divided by the drawn area ``A0 exp(-eps0)``).  ``phi`` (``yield_ratio``)
    is the ratio of the 0.2 % offset yield of a cold-worked temper to the flow stress
    at its prestrain (1 in the pure law; calibrated per family, see the CSV).

    Elongation (a documented rule of this project, not part of Hollomon's law): the
    annealed elongation ``EL0`` splits into a uniform part ``U0 = EL0 - P0`` and a
    necking part ``P0 = max(EL0 - 100 e_u(0), e_post)``.  After the reduction the
    uniform part scales with the remaining uniform strain and the necking part decays
    from ``P0`` towards the full-hard value ``e_post`` over a prestrain of about n::

        EL = U0 e_u / e_u(0) + e_post + (P0 - e_post) exp(-eps0 / n)

    so that zero reduction returns ``EL0`` and heavy reduction tends to ``e_post``.

    Parameters
    ----------
    reduction_pct : array_like
        Cold reduction of area, % (0–99).
    k_mpa : array_like
        Strength coefficient K of the annealed material, MPa (> 0).
    n : array_like
        Strain-hardening exponent n (0 < n <= 1).
    base_yield_mpa : array_like
        Annealed yield strength, MPa (> 0).
    base_elongation_pct : array_like
        Annealed elongation at fracture, % (>= 0).
    post_uniform_pct : array_like
        Post-uniform (necking) elongation, % (>= 0); values above
        ``base_elongation_pct`` are capped to it.
    yield_ratio : array_like, optional
        ``phi`` in (0, 1], default 1.

    Returns
    -------
    dict of ndarrays: ``yield_mpa``, ``uts_mpa``, ``uniform_elongation_pct``,
    ``elongation_pct``, ``true_strain`` (eps0), ``effective_strain`` (eps_e).

    Validity
    --------
    Reductions 0–80 %, true strain up to about 1.6 (``strain_hardening``).

    References
    ----------
    J.H. Hollomon, "Tensile deformation", Trans. AIME 162 (1945) 268;
    G.E. Dieter, *Mechanical Metallurgy*, 3rd ed. (1986), §8 (instability in tension);
    Derived relations; Kalpakjian & Schmid and Callister K, n tables.

    Example
    -------
    70-30 brass with the Kalpakjian & Schmid constants (K = 900 MPa, n = 0.49) and no
    reduction: UTS = 900 · 0.49^0.49 · e^-0.49 ≈ 389 MPa (hand evaluation).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(cold_worked_properties(20.0, 900.0, 0.49, 100.0, 60.0, 3.0)["uts_mpa"]))
    491
    """
    ctx = "cold_worked_properties"
    eps0 = true_strain_from_reduction(reduction_pct)
    k = _check_array("k_mpa", k_mpa, 0.0, None, ctx, lo_open=True)
    nn = _check_array("n", n, 0.0, 1.0, ctx, lo_open=True)
    y0 = _check_array("base_yield_mpa", base_yield_mpa, 0.0, None, ctx, lo_open=True)
    el0 = _check_array("base_elongation_pct", base_elongation_pct, 0.0, None, ctx)
    post = _check_array("post_uniform_pct", post_uniform_pct, 0.0, None, ctx)
    phi = _check_array("yield_ratio", yield_ratio, 0.0, 1.0, ctx, lo_open=True)

    eps_y = (np.minimum(y0, k) / k) ** (1.0 / nn)
    eps_e = eps0 + eps_y
    flow = k * eps_e ** nn
    necks_later = eps_e < nn
    uts = np.where(necks_later, k * nn ** nn * np.exp(-(nn - eps_e)), flow)
    ys = np.minimum(np.maximum(y0, phi * flow), uts)
    eu = np.expm1(np.maximum(nn - eps_e, 0.0))
    eu_annealed = np.expm1(np.maximum(nn - eps_y, 0.0))
    post = np.minimum(post, el0)
    post0 = np.maximum(el0 - 100.0 * eu_annealed, post)          # necking part when annealed
    uniform0 = el0 - post0                                       # uniform part when annealed
    frac = np.divide(eu, eu_annealed, out=np.zeros(np.broadcast(eu, eu_annealed).shape),
                     where=eu_annealed > 0)
    el = uniform0 * frac + post + (post0 - post) * np.exp(-eps0 / nn)
    shape = np.broadcast(eps0, k, nn, y0, el0, post, phi).shape
    b = lambda a: np.broadcast_to(a, shape).astype(float)  # noqa: E731
    return {"yield_mpa": b(ys), "uts_mpa": b(uts), "uniform_elongation_pct": b(100.0 * eu),
            "elongation_pct": b(el), "true_strain": b(eps0), "effective_strain": b(eps_e)}


def reduction_for_uts_mpa(target_uts_mpa, k_mpa, n, base_yield_mpa):
    """The cold reduction (%) at which :func:`cold_worked_properties` reaches a tensile
    strength (the inverse of the UTS relation; used to turn a temper defined by a
    minimum strength into a reduction).  NaN where the target is below the annealed
    strength.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(reduction_for_uts_mpa(500.0, 900.0, 0.49, 100.0)), 1)
    21.4
    """
    ctx = "reduction_for_uts_mpa"
    u = _check_array("target_uts_mpa", target_uts_mpa, 0.0, None, ctx, lo_open=True)
    k = _check_array("k_mpa", k_mpa, 0.0, None, ctx, lo_open=True)
    nn = _check_array("n", n, 0.0, 1.0, ctx, lo_open=True)
    y0 = _check_array("base_yield_mpa", base_yield_mpa, 0.0, None, ctx, lo_open=True)
    eps_y = (np.minimum(y0, k) / k) ** (1.0 / nn)
    at_n = k * nn ** nn
    eps_e = np.where(u < at_n, nn + np.log(np.maximum(u, 1e-9) / at_n), (u / k) ** (1.0 / nn))
    eps0 = eps_e - eps_y
    return np.where(eps0 >= 0, 100.0 * -np.expm1(-np.maximum(eps0, 0.0)), np.nan)


# data -------------------------------------------------------------------------

@functools.cache
def hollomon_table():
    """``data/hollomon_constants.csv`` as a DataFrame (validated, cached).

    Example (illustrative: a value of this implementation, not a published one)

    >>> {"k_mpa", "n", "source", "confidence"} <= set(hollomon_table().columns)
    True
    """
    schema = Schema((Column("key"), Column("scope", allow_blank=True), Column("material"),
                     Column("k_mpa", "float", allow_blank=True, lo=1.0, hi=5000.0),
                     Column("n", "float", lo=0.001, hi=1.0),
                     Column("post_uniform_pct", "float", lo=0.0, hi=60.0),
                     Column("yield_ratio", "float", lo=0.3, hi=1.0),
                     Column("source"), Column("confidence", "choice", choices=CONFIDENCE)))
    return read_table("hollomon_constants.csv", schema)


@functools.cache
def temper_alias_table():
    """``data/temper_aliases.csv`` as a DataFrame (validated, cached).

    Example (illustrative: a value of this implementation, not a published one)

    >>> {"designation", "reduction_pct", "source"} <= set(temper_alias_table().columns)
    True
    """
    f = lambda name: Column(name, "float", allow_blank=True, lo=0.0, hi=5000.0)  # noqa: E731
    schema = Schema((Column("family"), Column("designation"),
                     Column("reduction_pct", "float", lo=0.0, hi=95.0), Column("basis"),
                     Column("ref_grade", allow_blank=True), f("ref_uts_lo_mpa"), f("ref_uts_hi_mpa"),
                     f("ref_yield_mpa"), f("ref_elongation_pct"), Column("ref_kind", allow_blank=True),
                     Column("source"), Column("confidence", "choice", choices=CONFIDENCE)))
    return read_table("temper_aliases.csv", schema)


def hollomon_constants(grade_id: str, family: str, base_uts_mpa: float) -> dict:
    """K, n, post-uniform elongation and yield ratio for a grade (a new dict per call,
    looked up once per argument set: the expansion asks once per grade and section).

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted(hollomon_constants("C26000", "copper_alloy", 325.0))[:3]
    ['confidence', 'k_mpa', 'key']
    """
    return dict(_hollomon_constants(grade_id, family, float(base_uts_mpa)))


@functools.lru_cache(maxsize=1024)
def _hollomon_constants(grade_id: str, family: str, base_uts_mpa: float) -> dict:
    """K, n, post-uniform elongation and yield ratio for a grade.

    A row whose ``scope`` is the grade id wins; else the row of its family.  Where
    the chosen row has no K, K is set from the grade's annealed tensile strength by
    the Considère fallback (:func:`k_from_uts_mpa`).

    Returns dict ``k_mpa, n, post_uniform_pct, yield_ratio, key, source, confidence``.
    Raises :class:`InputError` when neither the grade nor its family has a row.
    """
    t = hollomon_table()
    rows = t[t["scope"] == grade_id]
    if rows.empty:
        rows = t[t["scope"] == family]
    if rows.empty:
        scopes = sorted(s for s in set(t["scope"]) if s)
        raise InputError("grade", grade_id, f"a grade or family with Hollomon constants ({', '.join(scopes)})",
                         "hollomon_constants")
    r = rows.iloc[0]
    n = float(r["n"])
    k = float(r["k_mpa"])
    if not math.isfinite(k):
        k = float(k_from_uts_mpa(base_uts_mpa, n))
    return {"k_mpa": k, "n": n, "post_uniform_pct": float(r["post_uniform_pct"]),
            "yield_ratio": float(r["yield_ratio"]), "key": str(r["key"]),
            "source": str(r["source"]), "confidence": str(r["confidence"])}


def temper_reduction_pct(designation: str, family: str) -> float:
    """Cold reduction (%) that a temper designation stands for in a grade family.

    Raises :class:`InputError` naming the designations accepted for the family.

    Example (from the source: ASTM B258 gauge ratio: H04 (4 B&S numbers) is 37.11 %)

    >>> temper_reduction_pct("H04", "copper_alloy")
    37.11
    """
    t = temper_alias_table()
    fam = t[t["family"] == family]
    key = str(designation).strip().upper().replace(" ", "")
    hit = fam[fam["designation"].str.upper().str.replace(" ", "") == key]
    if hit.empty:
        allowed = ", ".join(fam["designation"]) or f"(none: family {family} has no cold-work tempers)"
        check_choice("designation", designation, list(fam["designation"]), f"cold-work tempers of {family}")
        raise InputError("designation", designation, allowed)  # pragma: no cover (check_choice raised)
    return float(hit.iloc[0]["reduction_pct"])


def temper_designations(family: str) -> list[str]:
    """The temper designations accepted as reduction aliases for ``family``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> "H04" in temper_designations("copper_alloy")
    True
    """
    t = temper_alias_table()
    return list(t[t["family"] == family]["designation"])
