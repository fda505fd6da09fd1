"""Precipitation aging: the Shercliff–Ashby process model (1990), calibrated per alloy.

Structure (Shercliff & Ashby 1990, Part I; mostly from memory):

* Temperature-compensated time ``P = (t / T) exp(-Q_A / R T)`` (t in s, T in K).
  Isothermal aging curves collapse onto one curve of ``P / P_p``; multi-step
  schedules add their P (additivity).
* Yield strength ``sigma_y = sigma_i + sigma_ss + sigma_ppt``:

  - intrinsic strength ``sigma_i`` (matrix, grain size, coarse dispersoids);
  - solid solution ``sigma_ss = sigma_ss0 (c / c0)^(2/3)``, the solute falling from
    c0 towards the equilibrium ``c_e(T)`` as precipitation proceeds;
  - precipitates ``sigma_ppt = S0 sqrt(f0(T)/f0max) sqrt(X) g(P/P_p)``, with the
    shearable (under-aged, ``(f r)^(1/2)``) and Orowan (over-aged, ``f^(1/2)/r``)
    branches combined harmonically, ``r^3 - r0^3 ∝ P``: ``g ∝ x^(1/6) / (1 + x^(1/2))``,
    rising as P^(1/6) and falling as P^(-1/3).

* Solvus: ``c_e / c0 = exp[-(Q_s/R)(1/T - 1/T_s)]`` below the solvus T_s, so the
  peak strength falls at high aging temperature as ``f0(T)^(1/2)``.

Choices made here (documented in ``docs/methods/aging.md``): the transformed
fraction ``X = 1 - exp(-4 P/P_p)``; ``g`` normalised so that the precipitate term
peaks at exactly ``P/P_p = 1``; the naturally aged (T4) state is
``sigma_i + sigma_ss0`` (solute plus room-temperature clusters, reached after the
alloy's stabilising time); tensile strength and elongation follow from yield by
rules calibrated per alloy.  The constants of each alloy are fitted to published
temper points kept beside them in ``data/aging_calibration.csv``.

Nothing here warns: validity is registered with :mod:`selector.models.validity`;
the over-aging ratio ``P/P_p`` is returned so the caller can warn.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass, fields

import numpy as np

from ..cache import disk_table
from ..catalogue.loader import CONFIDENCE, Column, Schema, read_table
from ..errors import DataFileError, InputError, check_choice
from . import validity

R_J = 8.314  # J mol^-1 K^-1

#: rate of the transformed fraction X = 1 - exp(-KAPPA P/P_p) (choice of this project)
KAPPA = 4.0

#: rate of the loss of the T4 solute/cluster strength, 1 - exp(-KAPPA_REVERSION P/P_p): clusters
#: and GP zones of natural aging revert early in artificial aging (choice of this project)
KAPPA_REVERSION = 20.0

#: P/P_p above which a state is reported as over-aged
OVERAGED_RATIO = 1.1

REFERENCE = ("H.R. Shercliff & M.F. Ashby, Acta Metall. Mater. 38 (1990) 1789-1802 and 1803-1812 "
             "(process model for age hardening); constants fitted per alloy to data/aging_calibration.csv")

validity.register("shercliff_ashby_aluminium", {"temp_c": (100.0, 250.0, "°C"), "hours": (0.1, 1000.0, "h")},
                  "artificial aging of 2xxx/6xxx/7xxx aluminium, 100-250 °C (ASM Handbook Vol. 4 aging "
                  "practice, common practice); calibrated 120-220 °C")
validity.register("shercliff_ashby_ph_stainless", {"temp_c": (470.0, 630.0, "°C"), "hours": (0.5, 8.0, "h")},
                  "17-4PH / 15-5PH conditions H900-H1150 (482-621 °C, 1-4 h; ASTM A564)")
validity.register("shercliff_ashby_c17200", {"temp_c": (260.0, 400.0, "°C"), "hours": (0.5, 8.0, "h")},
                  "C17200 precipitation hardening, 260-400 °C (ASTM B196 TF00 at 316 °C, common practice)")


@dataclass(frozen=True)
class AgingConstants:
    """Fitted constants of one or more alloys, each a float array (one entry per state).

    Units: MPa for strengths, kJ/mol for activation energies, h for times, °C for
    temperatures, % for elongation.
    """

    sigma_i_mpa: np.ndarray      # intrinsic strength
    sigma_ss0_mpa: np.ndarray    # solid solution (+ clusters) at full supersaturation: T4 - sigma_i
    s0_mpa: np.ndarray           # peak precipitate strength at f0 = f0max
    q_kj_mol: np.ndarray         # Q_A, effective activation energy of precipitate growth and coarsening
    tp_ref_h: np.ndarray         # peak time at t_ref_c
    t_ref_c: np.ndarray          # reference aging temperature of tp_ref_h
    ts_c: np.ndarray             # solvus temperature of the alloy's solute content
    qs_kj_mol: np.ndarray        # solvus enthalpy
    w_ss_mpa: np.ndarray         # UTS - YS reserve carried by the solute (vanishes with X)
    w_ppt_mpa: np.ndarray        # UTS - YS reserve of the precipitated state
    el_ss_pct: np.ndarray        # elongation of the solution-treated state, scaled to ys_ref_mpa
    el_ppt_pct: np.ndarray       # elongation of the precipitated state at ys_ref_mpa
    ys_ref_mpa: np.ndarray       # reference (peak) yield of the elongation rule
    el_exp: np.ndarray           # elongation ∝ yield^-el_exp
    natural_stable_h: np.ndarray  # time at room temperature to a stable T4 (NaN: no stable T4)
    model: tuple = ()            # validity model name per state

    def take(self, idx) -> "AgingConstants":
        idx = np.asarray(idx)
        kw = {f.name: np.asarray(getattr(self, f.name))[idx] for f in fields(self) if f.name != "model"}
        return AgingConstants(**kw, model=tuple(np.asarray(self.model, dtype=object)[idx]))


CONSTANT_NAMES = tuple(f.name for f in fields(AgingConstants) if f.name != "model")


def _arr(field, x, context, lo=None, hi=None):
    a = np.asarray(x, float)
    bad = ~np.isfinite(a)
    if lo is not None:
        bad |= a < lo
    if hi is not None:
        bad |= a > hi
    if np.any(bad):
        v = float(np.atleast_1d(a)[np.atleast_1d(bad)][0])
        raise InputError(field, v, f"a finite number in [{lo}, {hi}]", context)
    return a


def temperature_compensated_time(temp_c, hours, q_kj_mol):
    """Shercliff–Ashby temperature-compensated time P, s/K.

    ::

        P = (t / T) exp(-Q_A / R T)

    Parameters
    ----------
    temp_c : array_like
        Aging temperature, °C (> -273.15).
    hours : array_like
        Time at temperature, h (>= 0).
    q_kj_mol : array_like
        Effective activation energy Q_A, kJ/mol.

    Returns
    -------
    ndarray, s/K.

    References
    ----------
    H.R. Shercliff & M.F. Ashby, Acta Metall. Mater. 38 (1990) 1789 (Part I).

    Example (illustrative: a value of this implementation, not a published one)

    >>> f"{float(temperature_compensated_time(175.0, 8.0, 130.0)):.3e}"
    '4.520e-14'
    """
    t = _arr("temp_c", temp_c, "temperature_compensated_time", -273.0, 2000.0)
    h = _arr("hours", hours, "temperature_compensated_time", 0.0, 1e6)
    q = _arr("q_kj_mol", q_kj_mol, "temperature_compensated_time", 1.0, 1000.0)
    tk = t + 273.15
    return h * 3600.0 / tk * np.exp(-q * 1e3 / (R_J * tk))


def peak_p(c: AgingConstants):
    """P at peak strength, from the peak time at the reference temperature.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> bool(peak_p(c) > 0)
    True
    """
    return temperature_compensated_time(c.t_ref_c, c.tp_ref_h, c.q_kj_mol)


def peak_time_h(c: AgingConstants, temp_c):
    """Time to peak strength at ``temp_c``, h.

    ::

        t_p(T) = P_p T exp(Q_A / R T)

    Example (from the source: the 6061-T6 schedules 175 °C x 8 h and 160 °C x 18 h (common
    practice) are equivalent; the 6061 activation energy was set from them, so this is a
    calibration, not a check)

    >>> c = aging_constants("6061")
    >>> round(float(peak_time_h(c, 160.0)))
    18
    """
    tk = _arr("temp_c", temp_c, "peak_time_h", -273.0, 2000.0) + 273.15
    return peak_p(c) * tk * np.exp(c.q_kj_mol * 1e3 / (R_J * tk)) / 3600.0


def equilibrium_solute_ratio(c: AgingConstants, temp_c):
    """c_e / c0 at ``temp_c``: ``exp[-(Q_s/R)(1/T - 1/T_s)]`` below the solvus, 1 above.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> float(equilibrium_solute_ratio(c, 600.0))
    1.0
    """
    tk = np.asarray(temp_c, float) + 273.15
    tsk = c.ts_c + 273.15
    return np.minimum(1.0, np.exp(-(c.qs_kj_mol * 1e3 / R_J) * (1.0 / tk - 1.0 / tsk)))


def _shape(x):
    return np.sqrt(-np.expm1(-KAPPA * x)) * 2.0 * x ** (1.0 / 6.0) / (1.0 + np.sqrt(x))


@functools.cache
def _shape_peak() -> tuple[float, float]:
    x_star, peak = _shape_peak_table()
    return float(x_star), float(peak)


@disk_table       # a constant of the model: solved once, then read from the user's cache directory
def _shape_peak_table() -> np.ndarray:
    from scipy.optimize import minimize_scalar     # lazy: scipy.optimize costs ~0.3 s to import

    res = minimize_scalar(lambda lx: -_shape(np.exp(lx)), bounds=(-5.0, 5.0), method="bounded",
                          options={"xatol": 1e-10})
    x_star = float(np.exp(res.x))
    return np.array([x_star, float(_shape(x_star))])


def precipitate_shape(peak_ratio):
    """Normalised precipitate strength g(P/P_p) in [0, 1], 1 at P/P_p = 1.

    ::

        g(x) = h(x x*) / h(x*),   h(y) = sqrt(1 - exp(-4y)) · 2 y^(1/6) / (1 + y^(1/2))

    where x* is the maximum of h: under-aged the strength grows with the
    precipitated fraction and as P^(1/6); over-aged it falls as P^(-1/3)
    (Shercliff & Ashby 1990).

    Example (from the source: Shercliff & Ashby (1990), the shape function peaks at P/P_p = 1
    with value 1)

    >>> round(float(precipitate_shape(1.0)), 3)
    1.0
    """
    x = np.maximum(np.asarray(peak_ratio, float), 0.0)
    x_star, h_star = _shape_peak()
    return _shape(x * x_star) / h_star


def transformed_fraction(peak_ratio):
    """Fraction X of the solute excess precipitated: ``1 - exp(-4 x x*)`` (same x* as
    :func:`precipitate_shape`, so X ≈ 0.99 at peak).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(transformed_fraction(1.0)), 3)
    0.958
    """
    x = np.maximum(np.asarray(peak_ratio, float), 0.0)
    return -np.expm1(-KAPPA * x * _shape_peak()[0])


def reverted_fraction(peak_ratio):
    """Fraction of the T4 solute/cluster strength lost: ``1 - exp(-20 x x*)``.  The
    clusters and GP zones formed at room temperature revert early in artificial aging
    (common practice), faster than the precipitates grow; without this the sum
    ``sigma_ss + sigma_ppt`` would overshoot before the peak in alloys with a large
    natural-aging response (2024).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(reverted_fraction(1.0)), 3)
    1.0
    """
    x = np.maximum(np.asarray(peak_ratio, float), 0.0)
    return -np.expm1(-KAPPA_REVERSION * x * _shape_peak()[0])


def aged_yield_mpa(c: AgingConstants, temp_c, hours, prior_p=0.0):
    """Yield strength after artificial aging (Shercliff & Ashby 1990), MPa, and P/P_p.

    ::

        P     = P_prior + (t/T) exp(-Q_A/RT)          x = P / P_p
        X     = 1 - exp(-4 x x*)            precipitated fraction
        Xr    = 1 - exp(-20 x x*)           reverted fraction of the T4 solute/clusters
        ce/c0 = exp[-(Q_s/R)(1/T - 1/T_s)]
        YS    = sigma_i + sigma_ss0 (1 - Xr (1 - ce/c0))^(2/3) + S0 (1 - ce/c0)^(1/2) g(x)

    Parameters
    ----------
    c : AgingConstants
        Constants, arrays broadcasting with the states.
    temp_c : array_like
        Aging temperature, °C (of the last step where there are several).
    hours : array_like
        Time at ``temp_c``, h.
    prior_p : array_like, optional
        P of earlier steps of a multi-step schedule, s/K (see
        :func:`temperature_compensated_time`).

    Returns
    -------
    (yield_mpa, peak_ratio) : tuple of ndarrays; ``peak_ratio`` = P/P_p (> 1: past
    peak, over-aged).

    Validity
    --------
    The calibrated range of each alloy (``shercliff_ashby_aluminium``,
    ``shercliff_ashby_ph_stainless``, ``shercliff_ashby_c17200``).

    References
    ----------
    H.R. Shercliff & M.F. Ashby, "A process model for age hardening of aluminium
    alloys — I. The model", Acta Metall. Mater. 38 (1990) 1789–1802;
    "— II. Applications of the model", ibid. 1803–1812.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> round(float(aged_yield_mpa(c, 175.0, 8.0)[0]))
    276
    """
    p = temperature_compensated_time(temp_c, hours, c.q_kj_mol) + _arr("prior_p", prior_p, "aged_yield_mpa", 0.0)
    x = p / peak_p(c)
    ce = equilibrium_solute_ratio(c, temp_c)
    xr = reverted_fraction(x)
    ss = c.sigma_ss0_mpa * (1.0 - xr * (1.0 - ce)) ** (2.0 / 3.0)
    ppt = c.s0_mpa * np.sqrt(1.0 - ce) * precipitate_shape(x)
    return c.sigma_i_mpa + ss + ppt, x


def strength_rules(c: AgingConstants, yield_mpa, peak_ratio):
    """Tensile strength and elongation from yield (rules calibrated per alloy).

    ::

        UTS = YS + w_ppt + w_ss (1 - Xr)                         (work-hardening reserve)
        EL  = [EL_ss (1 - X) + EL_ppt X] (YS_ref / YS)^m           (strength–ductility trade-off)

    The solute carries extra work hardening and uniform strain that go as it
    precipitates; past the peak, elongation recovers as strength falls.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> [round(float(x)) for x in strength_rules(c, 276.0, 1.0)]
    [310, 12]
    """
    ys = np.asarray(yield_mpa, float)
    xf = transformed_fraction(peak_ratio)
    uts = ys + c.w_ppt_mpa + c.w_ss_mpa * (1.0 - reverted_fraction(peak_ratio))
    el = (c.el_ss_pct * (1.0 - xf) + c.el_ppt_pct * xf) * (c.ys_ref_mpa / ys) ** c.el_exp
    return uts, el


def aged_properties(c: AgingConstants, temp_c, hours, prior_p=0.0) -> dict:
    """Yield, tensile strength, elongation and over-aging ratio after artificial aging.

    Returns dict ``yield_mpa, uts_mpa, elongation_pct, peak_ratio, overaged`` (bool,
    ``peak_ratio > 1.1``), ``peak_time_h`` (at ``temp_c``).  See
    :func:`aged_yield_mpa` (Shercliff & Ashby 1990) and :func:`strength_rules`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> round(float(aged_properties(c, 175.0, 8.0)["yield_mpa"]))
    276
    """
    ys, x = aged_yield_mpa(c, temp_c, hours, prior_p)
    uts, el = strength_rules(c, ys, x)
    return {"yield_mpa": ys, "uts_mpa": uts, "elongation_pct": el, "peak_ratio": x,
            "overaged": x > OVERAGED_RATIO, "peak_time_h": peak_time_h(c, temp_c)}


def natural_aged_properties(c: AgingConstants, hours) -> dict:
    """The naturally aged (T4-type) state after solution treatment and quench.

    ``YS = sigma_i + sigma_ss0`` (solute and room-temperature clusters), reached after
    the alloy's stabilising time; ``stable`` is False before it, or for alloys with no
    stable naturally aged temper (7075: the W temper keeps hardening; NaN
    ``natural_stable_h``).  For 17-4PH / 15-5PH and C17200 the state is the solution
    treated condition (A, TB00).

    Returns dict ``yield_mpa, uts_mpa, elongation_pct, peak_ratio`` (0), ``stable``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> round(float(natural_aged_properties(c, 96.0)["yield_mpa"]))
    145
    """
    h = _arr("hours", hours, "natural_aged_properties", 0.0, 1e7)
    ys = np.broadcast_to(c.sigma_i_mpa + c.sigma_ss0_mpa, np.broadcast(h, c.sigma_i_mpa).shape).astype(float)
    uts, el = strength_rules(c, ys, np.zeros(ys.shape))
    stable = np.isfinite(c.natural_stable_h) & (h >= np.nan_to_num(c.natural_stable_h, nan=np.inf))
    return {"yield_mpa": ys, "uts_mpa": uts, "elongation_pct": el, "peak_ratio": np.zeros(ys.shape),
            "stable": np.broadcast_to(stable, ys.shape)}


# data -------------------------------------------------------------------------

@functools.cache
def calibration_table():
    """``data/aging_calibration.csv`` (constants and published temper points), validated.

    Example (illustrative: a value of this implementation, not a published one)

    >>> list(calibration_table().columns[:3])
    ['alloy', 'kind', 'name']
    """
    def check(r):
        if r["kind"] == "constant" and r["name"] not in CONSTANT_NAMES + ("model",):
            return ("name", f"{r['name']!r} is not a constant of the model ({', '.join(CONSTANT_NAMES)})")
        if r["kind"] == "point" and r["name"] not in ("yield_mpa", "uts_mpa", "elongation_pct"):
            return ("name", f"{r['name']!r} is not yield_mpa, uts_mpa or elongation_pct")
        if r["kind"] == "point" and r["role"] not in ("fit", "check"):
            return ("role", "a point's role is fit or check")
        return None

    num = lambda n: Column(n, "float", allow_blank=True)  # noqa: E731
    schema = Schema((Column("alloy"), Column("kind", "choice", choices=("constant", "point")), Column("name"),
                     Column("value"), Column("unit", allow_blank=True), Column("condition", allow_blank=True),
                     num("t1_c"), num("h1"), num("t2_c"), num("h2"), Column("basis", allow_blank=True),
                     Column("role", allow_blank=True), Column("source"),
                     Column("confidence", "choice", choices=CONFIDENCE)), row_check=check)
    return read_table("aging_calibration.csv", schema)


#: precipitation-hardening stainless steels whose constants come from the offline fit
#: ``scripts/fit_aging_ph.py`` (``data/fits/aging_ph_coefficients.csv``), fitted to typical
#: published values (``data/reference/ph_typical.csv``); one constant set for both
PH_ALLOYS = ("17-4PH", "15-5PH")
PH_FIT_FILE = "fits/aging_ph_coefficients.csv"


@functools.cache
def ph_coefficients() -> dict:
    """Constants of the PH stainless steels from ``data/fits/aging_ph_coefficients.csv``
    (written by ``scripts/fit_aging_ph.py``; the package never fits), validated.

    Example (illustrative: a value of this implementation, not a published one)

    >>> set(CONSTANT_NAMES) <= set(ph_coefficients())
    True
    """
    schema = Schema((Column("fit", "choice", choices=("aging_ph",)), Column("coefficient"),
                     Column("value", "float"), Column("unit", allow_blank=True), Column("source"),
                     Column("confidence", "choice", choices=CONFIDENCE)),
                    row_check=lambda r: None if r["coefficient"] in CONSTANT_NAMES else
                    ("coefficient", f"{r['coefficient']!r} is not a constant of the model"))
    t = read_table(PH_FIT_FILE, schema)
    d = {str(k): float(v) for k, v in zip(t["coefficient"], t["value"])}
    missing = [n for n in CONSTANT_NAMES if n not in d]
    if missing:
        raise DataFileError(PH_FIT_FILE, None, "coefficient", f"lacks constants {', '.join(missing)}")
    d["model"] = "shercliff_ashby_ph_stainless"
    return d


@functools.cache
def _alloy_constants() -> dict:
    t = calibration_table()
    out = {a: dict(ph_coefficients()) for a in PH_ALLOYS}
    for alloy, g in t[t["kind"] == "constant"].groupby("alloy"):
        if alloy in PH_ALLOYS:
            raise DataFileError("aging_calibration.csv", None, "alloy",
                                f"{alloy} constants come from {PH_FIT_FILE} (scripts/fit_aging_ph.py), not here")
        d = dict(zip(g["name"], g["value"]))
        missing = [n for n in CONSTANT_NAMES + ("model",) if n not in d]
        if missing:
            raise DataFileError("aging_calibration.csv", None, "name",
                                f"alloy {alloy} lacks constants {', '.join(missing)}")
        out[alloy] = d
    return out


def _num(v) -> float:
    s = str(v).strip().lower()
    return float("nan") if s in ("", "none") else float(s)


def alloys() -> list[str]:
    """Alloys with calibrated aging constants.

    Example (illustrative: a value of this implementation, not a published one)

    >>> "6061" in alloys()
    True
    """
    return sorted(_alloy_constants())


def aging_constants(alloy_ids) -> AgingConstants:
    """:class:`AgingConstants` for a sequence of alloy ids (one per state) or one id.

    Example (illustrative: a value of this implementation, not a published one)

    >>> aging_constants("6061").model
    ('shercliff_ashby_aluminium',)
    """
    ids = [alloy_ids] if isinstance(alloy_ids, str) else list(alloy_ids)
    table = _alloy_constants()
    for a in ids:
        if a not in table:
            check_choice("alloy", a, sorted(table), "aging constants")
    kw = {n: np.array([_num(table[a][n]) for a in ids]) for n in CONSTANT_NAMES}
    if isinstance(alloy_ids, str):
        kw = {n: v[0] for n, v in kw.items()}
    return AgingConstants(**kw, model=tuple(table[a]["model"] for a in ids))


def calibration_points(alloy: str | None = None):
    """Published temper points (``kind == point``) of one alloy or all.

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted(set(calibration_points("6061")["name"]))
    ['elongation_pct', 'uts_mpa', 'yield_mpa']
    """
    t = calibration_table()
    t = t[t["kind"] == "point"].copy()
    t["value"] = t["value"].astype(float)
    return t if alloy is None else t[t["alloy"] == alloy]


def point_prediction(c: AgingConstants, t1_c, h1, t2_c=np.nan, h2=np.nan) -> dict:
    """Predicted properties of a calibration point: natural aging when ``t1_c`` is
    below 60 °C (T4, condition A, TB00), else one or two artificial aging steps.

    Example (illustrative: a value of this implementation, not a published one)

    >>> c = aging_constants("6061")
    >>> round(float(point_prediction(c, 175.0, 8.0)["uts_mpa"]))
    310
    """
    t1, hh1 = float(t1_c), float(h1)
    if t1 < 60.0:
        return natural_aged_properties(c, hh1)
    if np.isfinite(t2_c):
        p1 = temperature_compensated_time(t1, hh1, c.q_kj_mol)
        return aged_properties(c, float(t2_c), float(h2), prior_p=p1)
    return aged_properties(c, t1, hh1)
