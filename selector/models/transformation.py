"""Austenite decomposition on continuous cooling (Li et al. 1998 kinetics, Scheil additivity, Koistinen–Marburger).

Isothermal kinetics of the Kirkaldy type as refitted by Li, Niebuhr, Meekisho &
Atteridge (1998), T in K, R = 1.987 cal mol⁻¹ K⁻¹, τ in s:

    τ_F = FC / [2^(0.41G) (Ae3 − T)³ exp(−27500/RT)] · S(X),
          FC = exp(1.00 + 6.31C + 1.78Mn + 0.31Si + 1.12Ni + 2.70Cr + 4.06Mo)
    τ_P = PC / [2^(0.32G) (Ae1 − T)³ exp(−27500/RT)] · S(X),
          PC = exp(−4.25 + 4.12C + 4.36Mn + 0.44Si + 1.71Ni + 3.33Cr + 5.19√Mo)
    τ_B = BC / [2^(0.29G) (Bs − T)² exp(−27500/RT)] · S(X),
          BC = exp(−10.23 + 10.18C + 0.85Mn + 0.55Ni + 0.90Cr + 0.36Mo)
    S(X) = ∫₀ˣ dX / [X^(0.4(1−X)) (1−X)^(0.4X)]

Continuous cooling by Scheil additivity applied to S: for each reaction
S ← S + Δt / τ_1(T) (τ_1 the time per unit S), X = S⁻¹(S).  Reactions run in
their ranges (ferrite below Ae3, capped at the lever-rule fraction
(0.77 − C)/0.77; pearlite below Ae1; bainite below Bs) and each converts the
austenite still present in proportion to its normalised progress.  The austenite
left at Ms becomes martensite by Koistinen–Marburger (1959),
f_M = 1 − exp[−0.011 (Ms − 25 °C)] of it; the rest is retained austenite.
Andrews Ac3/Ac1 stand in for Ae3/Ae1; Bs and Ms are the Li et al. forms.

The cooling path is Newtonian, T = Tb + (T0 − Tb) exp(−t/τc), with τc set so that
the rate at 700 °C equals the given rate: a simplification of the real Jominy or
bar cooling curves.  This path is a comparison model only; route evaluation uses
the ASTM A255 path (:mod:`selector.models.hardenability`).

References
----------
M.V. Li, D.V. Niebuhr, L.L. Meekisho, D.G. Atteridge, "A computational model for the
prediction of steel hardenability", Metall. Mater. Trans. B 29B (1998) 661–672
(equations as recalled: from memory).
J.S. Kirkaldy, D. Venugopalan, in *Phase Transformations in Ferrous Alloys*, TMS-AIME
1984, 125–148.
E. Scheil, Arch. Eisenhüttenwes. 8 (1935) 565.
D.P. Koistinen, R.E. Marburger, Acta Metall. 7 (1959) 59.
"""
from __future__ import annotations

import functools

import numpy as np

from ..errors import InputError
from .composition import el
from .critical_temperatures import ac1_c, ac3_c
from . import validity

R_CAL = 1.987
Q_CAL = 27500.0
KM_ALPHA = 0.011
ROOM_C = 25.0
EUTECTOID_C = 0.77

validity.register("li_1998", {"C": (0.1, 0.6, "wt%"), "Mn": (0.2, 1.8, "wt%"), "Ni": (0.0, 3.5, "wt%"),
                              "Cr": (0.0, 1.5, "wt%"), "Mo": (0.0, 0.6, "wt%")},
                  "Li et al., Metall. Mater. Trans. B 29B (1998) 661 (ranges from memory)")


def bs_li_c(comp):
    """Bainite start, °C (Li et al. 1998): 637 − 58C − 35Mn − 15Ni − 34Cr − 41Mo.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.40, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
    >>> round(float(bs_li_c(s)))
    543
    """
    return (637.0 - 58 * el(comp, "C") - 35 * el(comp, "Mn") - 15 * el(comp, "Ni")
            - 34 * el(comp, "Cr") - 41 * el(comp, "Mo"))


def ms_li_c(comp):
    """Martensite start, °C (Li et al. 1998): Andrews linear Ms + 10Co − 7.5Si.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.40, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
    >>> round(float(ms_li_c(s)))
    328
    """
    return (539.0 - 423 * el(comp, "C") - 30.4 * el(comp, "Mn") - 17.7 * el(comp, "Ni")
            - 12.1 * el(comp, "Cr") - 7.5 * el(comp, "Mo") + 10 * el(comp, "Co") - 7.5 * el(comp, "Si"))


@functools.cache
def _s_table():
    x = np.linspace(0.0, 0.999, 4001)
    xm = 0.5 * (x[1:] + x[:-1])
    integrand = 1.0 / (xm ** (0.4 * (1 - xm)) * (1 - xm) ** (0.4 * xm))
    s = np.concatenate([[0.0], np.cumsum(integrand * np.diff(x))])
    return x, s


def s_integral(x):
    """S(X) = ∫₀ˣ dX / [X^(0.4(1−X)) (1−X)^(0.4X)] (numerical table, X ≤ 0.999).

    Example (from the source: the Li et al. (1998) S(X) integral, evaluated numerically: S(0.01)
    = 0.104 (this quadrature: 0.102))

    >>> round(float(s_integral(0.01)), 3)
    0.102
    """
    xs, s = _s_table()
    return np.interp(np.asarray(x, float), xs, s)


def _clip(x, lo, hi):
    """``numpy.clip`` as the two comparisons it is defined by (the same numbers, less call overhead)."""
    return np.minimum(np.maximum(x, lo), hi)


def _x_of_s(s):
    xs, st = _s_table()
    return np.interp(s, st, xs)


#: upper end of the carbon range of the Li et al. (1998) fit (the ``li_1998`` validity range)
LI_MAX_C = 0.6


def _rate_constants(comp, grain, bainite_carbon_cap_pct=None):
    c, mn, si, ni, cr, mo = (el(comp, e) for e in ("C", "Mn", "Si", "Ni", "Cr", "Mo"))
    fc = np.exp(1.00 + 6.31 * c + 1.78 * mn + 0.31 * si + 1.12 * ni + 2.70 * cr + 4.06 * mo)
    pc = np.exp(-4.25 + 4.12 * c + 4.36 * mn + 0.44 * si + 1.71 * ni + 3.33 * cr + 5.19 * np.sqrt(mo))
    cb = c if bainite_carbon_cap_pct is None else np.minimum(c, bainite_carbon_cap_pct)
    bc = np.exp(-10.23 + 10.18 * cb + 0.85 * mn + 0.55 * ni + 0.90 * cr + 0.36 * mo)
    g = np.asarray(grain, float)
    return fc / 2 ** (0.41 * g), pc / 2 ** (0.32 * g), bc / 2 ** (0.29 * g)


def isothermal_time_s(comp, temp_c, fraction, reaction="ferrite", grain_size_astm=8.0,
                      bainite_carbon_cap_pct=None):
    """Time (s) to reach normalised progress ``fraction`` of one reaction at constant ``temp_c``
    (Li et al. 1998; equations in the module docstring).

    Parameters
    ----------
    comp : mapping
        Element → wt %.
    temp_c : array_like
        Transformation temperature, °C.
    fraction : array_like
        Normalised progress X (0–0.999).
    reaction : {"ferrite", "pearlite", "bainite"}
    grain_size_astm : float
        ASTM austenite grain size.
    bainite_carbon_cap_pct : float or None
        When given, the carbon in the bainite rate constant BC is held at this value
        (the bath routes pass :data:`LI_MAX_C`): extrapolated above the fit's 0.6 % C,
        the term exp(10.18 C) makes the bainite of a 0.95 % C steel about 6 times
        slower than at 0.6 % C, with 1 % bainite at 315 °C after 1.6 h, where eutectoid
        and hypereutectoid isothermal diagrams complete the reaction at that temperature
        within about an hour (US Steel, *Atlas of Isothermal Transformation Diagrams*,
        1951, 1080 and 1095 diagrams; from memory).  Bs keeps the real carbon.  The
        route still warns that the composition is outside ``li_1998``.

    Returns
    -------
    ndarray
        Time, s.

    Example (from the source: hand evaluation of the Li et al. (1998) equations for 1045, G = 8:
    1 % pearlite at 650 °C in about 0.4 s (within a factor 1.3))

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(isothermal_time_s(s, 650.0, 0.01, "pearlite")), 1)
    0.4
    """
    if reaction not in ("ferrite", "pearlite", "bainite"):
        raise InputError("reaction", reaction, "ferrite, pearlite, bainite")
    fF, fP, fB = _rate_constants(comp, grain_size_astm, bainite_carbon_cap_pct)
    tk = np.asarray(temp_c, float) + 273.15
    arr = np.exp(-Q_CAL / (R_CAL * tk))
    if reaction == "ferrite":
        tau1 = fF / (np.maximum(ac3_c(comp) - temp_c, 1e-9) ** 3 * arr)
    elif reaction == "pearlite":
        tau1 = fP / (np.maximum(ac1_c(comp) - temp_c, 1e-9) ** 3 * arr)
    else:
        tau1 = fB / (np.maximum(bs_li_c(comp) - temp_c, 1e-9) ** 2 * arr)
    return tau1 * s_integral(fraction)


def _convert_in_proportion(on, s, x, f, avail, ds):
    """One step of a reaction (pearlite or bainite) that converts the austenite present in
    proportion to its normalised progress: the Scheil sum ``s`` grows by ``ds`` where ``on``;
    returns the new sum, progress, fraction formed and austenite left."""
    s = np.where(on, s + ds, s)
    xn = _x_of_s(s)
    d = np.where(on, avail * _clip((xn - x) / np.maximum(1 - x, 1e-9), 0, 1), 0.0)
    return s, xn, f + d, avail - d


def continuous_cooling_fractions(comp, cooling_rate_c_s, austenitize_c=845.0, bath_c=25.0,
                                 grain_size_astm=8.0, step_c=2.0):
    """Phase fractions after continuous cooling at a given rate at 700 °C (Li 1998 + Scheil + KM).

    Parameters
    ----------
    comp : mapping
        Element → wt % (arrays broadcast with ``cooling_rate_c_s``).
    cooling_rate_c_s : array_like
        Cooling rate at 700 °C, °C/s (> 0), fixing the Newtonian path.
    austenitize_c, bath_c : float
        Start and bath temperatures, °C.
    grain_size_astm : float
        ASTM austenite grain size.
    step_c : float
        Temperature step of the integration, °C.

    Returns
    -------
    dict of ndarray
        ``ferrite``, ``pearlite``, ``bainite``, ``martensite``, ``retained_austenite`` (fractions 0–1).

    Validity
    --------
    ``li_1998`` (low-alloy steels).  Equations from memory; comparison model only.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> sorted(continuous_cooling_fractions(s, 1.0))
    ['bainite', 'ferrite', 'martensite', 'pearlite', 'retained_austenite']
    """
    rate = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(rate)) or np.any(rate <= 0):
        raise InputError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    shape = np.broadcast_shapes(rate.shape, *[np.shape(v) for v in comp.values()])
    rate = np.broadcast_to(rate, shape)
    tau_c = (700.0 - bath_c) / rate
    kF, kP, kB = (np.broadcast_to(k, shape) for k in _rate_constants(comp, grain_size_astm))
    ae3 = np.broadcast_to(ac3_c(comp), shape)
    ae1 = np.broadcast_to(ac1_c(comp), shape)
    bs = np.broadcast_to(bs_li_c(comp), shape)
    ms = np.broadcast_to(ms_li_c(comp), shape)
    c = np.broadcast_to(el(comp, "C"), shape)
    xeq = np.clip((EUTECTOID_C - c) / EUTECTOID_C, 0.0, 1.0)
    sF = np.zeros(shape); sP = np.zeros(shape); sB = np.zeros(shape)
    xF = np.zeros(shape); xP = np.zeros(shape); xB = np.zeros(shape)
    fF = np.zeros(shape); fP = np.zeros(shape); fB = np.zeros(shape)
    aust_at_ms = np.full(shape, np.nan)
    temps = np.arange(austenitize_c, ROOM_C, -step_c)
    # a reaction that runs in no row at a step changes nothing (its S, X and fraction stay, the
    # austenite loses 0), so its block is skipped; once every row is below Ms and its austenite
    # at Ms is kept, the later steps change nothing and the loop ends: the numbers of every step
    ms_top = float(np.max(ms)) if ms.size else -np.inf
    for t_hi, t_lo in zip(temps[:-1], temps[1:]):
        tm = 0.5 * (t_hi + t_lo)
        dt = tau_c * np.log((t_hi - bath_c) / max(t_lo - bath_c, 1e-6))
        arr = np.exp(-Q_CAL / (R_CAL * (tm + 273.15)))
        above_ms = tm > ms
        avail = 1.0 - fF - fP - fB
        # ferrite, capped at the lever-rule fraction
        on = (tm < ae3) & above_ms
        if on.any():
            sF = np.where(on, sF + dt * np.maximum(ae3 - tm, 0) ** 3 * arr / kF, sF)
            xF = _x_of_s(sF)
            dF = np.where(on, _clip(xeq * xF - fF, 0.0, avail), 0.0)
            fF = fF + dF
            avail = avail - dF
        # pearlite and bainite convert the austenite present in proportion to normalised progress
        onP = (tm < ae1) & above_ms
        if onP.any():
            sP, xP, fP, avail = _convert_in_proportion(onP, sP, xP, fP, avail,
                                                       dt * np.maximum(ae1 - tm, 0) ** 3 * arr / kP)
        onB = (tm < bs) & above_ms
        if onB.any():
            sB, xB, fB, avail = _convert_in_proportion(onB, sB, xB, fB, avail,
                                                       dt * np.maximum(bs - tm, 0) ** 2 * arr / kB)
        if tm <= ms_top or np.isnan(ms_top):
            aust_at_ms = np.where(np.isnan(aust_at_ms) & ~above_ms, avail, aust_at_ms)
            if tm <= ms_top and not np.isnan(aust_at_ms).any():
                break
    aust_at_ms = np.where(np.isnan(aust_at_ms), 1.0 - fF - fP - fB, aust_at_ms)
    km = 1.0 - np.exp(-KM_ALPHA * np.maximum(ms - ROOM_C, 0.0))
    fM = aust_at_ms * km
    return {"ferrite": fF, "pearlite": fP, "bainite": fB, "martensite": fM,
            "retained_austenite": aust_at_ms - fM}


#: log-spaced cooling rates (at 700 °C, °C/s) on which the share is tabulated per composition
SHARE_GRID_C_S = np.geomspace(0.05, 2000.0, 25)
#: non-martensitic fraction below which the split at a rate is taken as undefined
SHARE_MIN_FRACTION = 0.02
SHARE_ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo")
#: temperature step of the kinetics integration for the split, °C (the share changes by less
#: than 0.02 from a 2 °C step over the catalogue's steels: tests/test_transformation.py)
SHARE_STEP_C = 10.0


def unique_rows(table):
    """Distinct rows of a 2-D float array and the index of each row's distinct row:
    ``(unique_rows, inverse)`` with ``unique_rows[inverse] == table`` (bytewise
    comparison of the rows: much faster than ``numpy.unique(axis=0)``).

    Example (illustrative: a value of this implementation, not a published one)

    >>> import numpy as np
    >>> unique_rows(np.array([[1.0, 2.0], [1.0, 2.0]]))[0].shape
    (1, 2)
    """
    t = np.ascontiguousarray(np.asarray(table, float))
    if t.shape[0] == 0:
        return t, np.zeros(0, int)
    v = t.view(np.dtype((np.void, t.dtype.itemsize * t.shape[1]))).ravel()
    _, first, inverse = np.unique(v, return_index=True, return_inverse=True)
    return t[first], inverse.reshape(-1)


#: share tables already computed, keyed by (composition row bytes, grain size, step): the
#: table depends on the composition only, so every section and route reuses it
_SHARE_CACHE: dict = {}
_SHARE_CACHE_MAX = 20_000


def _share_tables(uniq, grain_size_astm, step_c):
    """Non-decreasing share tables (rows of ``uniq`` × :data:`SHARE_GRID_C_S`), cached."""
    keys = [(row.tobytes(), grain_size_astm, step_c) for row in uniq]
    todo = [i for i, k in enumerate(keys) if k not in _SHARE_CACHE]
    if todo:
        if len(_SHARE_CACHE) + len(todo) > _SHARE_CACHE_MAX:
            _SHARE_CACHE.clear()                # everything this call needs is rebuilt below
            todo = list(range(len(keys)))
        new = uniq[todo]
        grid = SHARE_GRID_C_S
        k, g = len(new), len(grid)
        fr = continuous_cooling_fractions({e: np.repeat(new[:, i], g) for i, e in enumerate(SHARE_ELEMENTS)},
                                          np.tile(grid, k), grain_size_astm=grain_size_astm, step_c=step_c)
        non_m = (fr["bainite"] + fr["ferrite"] + fr["pearlite"]).reshape(k, g)
        raw = np.where(non_m > SHARE_MIN_FRACTION, fr["bainite"].reshape(k, g) / np.maximum(non_m, 1e-12),
                       np.nan)
        table = np.empty((k, g))
        last = np.full(k, np.nan)
        for j in range(g):                      # carry the last defined (slower) share up
            last = np.where(np.isfinite(raw[:, j]), raw[:, j], last)
            table[:, j] = last
        table = np.where(np.isfinite(table), table, 1.0)
        table = np.maximum.accumulate(np.clip(table, 0.0, 1.0), axis=1)
        for i, row in zip(todo, table):
            _SHARE_CACHE[keys[i]] = row
    return np.stack([_SHARE_CACHE[k] for k in keys]) if keys else np.zeros((0, len(SHARE_GRID_C_S)))


def bainite_share(comp, cooling_rate_c_s, grain_size_astm=8.0, step_c=SHARE_STEP_C):
    """Share of bainite in the non-martensitic products of a quench,
    B / (B + F + P), from the Li et al. (1998) kinetics, as a function of the cooling rate.

    Only the *split* of the non-martensitic part is taken from these kinetics; the
    martensite fraction itself comes from the hardenability chain
    (:func:`selector.routes.quench_response.as_quenched_profile`).

    For each distinct composition the kinetics run on a fixed log-spaced grid of rates
    (:data:`SHARE_GRID_C_S`, 0.05–2000 °C/s).  Where they form less than 2 % of
    non-martensitic products at a grid rate (they then say nothing about their nature),
    the share at the next slower rate that forms some is carried up; where none forms
    even at the slowest rate, the share is 1.  The share is then made non-decreasing in
    the rate (a running maximum from slow to fast: faster cooling suppresses the
    ferrite and pearlite reactions before the bainite one, common practice; it also
    keeps a faster quench from giving a softer product) and interpolated linearly in
    log rate.

    Parameters
    ----------
    comp : mapping
        Element → wt %, arrays broadcasting with ``cooling_rate_c_s``.
    cooling_rate_c_s : array_like
        Cooling rate at 700 °C, °C/s (> 0; held inside the grid).
    grain_size_astm : float
        ASTM austenite grain size.
    step_c : float
        Temperature step of the kinetics integration, °C.

    Returns
    -------
    ndarray
        Bainite share 0–1 (broadcast of the inputs).

    Validity
    --------
    ``li_1998`` (low-alloy steels, 0.1–0.6 % C).

    References
    ----------
    Li, Niebuhr, Meekisho & Atteridge, Metall. Mater. Trans. B 29B (1998) 661
    (equations from memory); Scheil (1935) additivity.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.40, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
    >>> round(float(bainite_share(s, 5.0)), 2)
    0.96
    """
    rate = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(rate)) or np.any(rate <= 0):
        raise InputError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    shape = np.broadcast_shapes(rate.shape, *[np.shape(comp[e]) for e in SHARE_ELEMENTS if e in comp])
    cols = np.stack([np.broadcast_to(np.asarray(el(comp, e), float), shape).ravel() for e in SHARE_ELEMENTS],
                    axis=1)
    uniq, inverse = unique_rows(cols)
    grid = SHARE_GRID_C_S
    g = len(grid)
    table = _share_tables(uniq, float(grain_size_astm), float(step_c))
    x = (np.log(np.clip(rate, grid[0], grid[-1])) - np.log(grid[0])) / (np.log(grid[-1]) - np.log(grid[0])) * (g - 1)
    x = np.broadcast_to(x, shape).ravel()
    j0 = np.clip(np.floor(x).astype(int), 0, g - 2)
    w = x - j0
    rows = inverse.reshape(-1)
    out = table[rows, j0] * (1.0 - w) + table[rows, j0 + 1] * w
    return out.reshape(shape)


def path_progress(comp, times_s, temps_c, reaction, grain_size_astm=8.0, active=None,
                  bainite_carbon_cap_pct=None):
    """Normalised progress X of one reaction along a temperature path (Li et al. 1998
    kinetics, Scheil 1935 additivity on S).

        S = Σ Δt_i / τ₁(T_i),   τ₁ = τ(X)/S(X),   X = S⁻¹(S)

    with T_i the mean temperature of each interval of the path; the reaction runs only
    below its upper temperature (Ae3, Ae1 or Bs; Andrews Ac3/Ac1 stand in for Ae3/Ae1)
    and where ``active`` is True.

    Parameters
    ----------
    comp : mapping
        Element → wt %, arrays of shape (n,) or scalars.
    times_s : array_like
        Times of the path, s, shape (m,) or (n, m), increasing.
    temps_c : array_like
        Temperatures at those times, °C, shape (n, m).
    reaction : {"ferrite", "pearlite", "bainite"}
    grain_size_astm : float
        ASTM austenite grain size.
    active : array_like of bool, optional
        Shape (n, m − 1): intervals that count (e.g. only before the bath is reached).
    bainite_carbon_cap_pct : float or None
        See :func:`isothermal_time_s`.

    Returns
    -------
    tuple of ndarray
        ``(x, start_sum)``, each (n,): the progress 0–0.999 and the Scheil sum of the
        1 % start, Σ Δt / τ(0.01) (≥ 1: the reaction has started).

    Validity
    --------
    ``li_1998``.

    References
    ----------
    Li, Niebuhr, Meekisho & Atteridge, Metall. Mater. Trans. B 29B (1998) 661;
    Scheil, Arch. Eisenhüttenwes. 8 (1935) 565.

    Example (from the source: Scheil's additivity (1935) gives a start sum of exactly 1 for a
    hold at constant temperature for the isothermal 1 % start time)

    >>> s = {"C": 0.40, "Mn": 0.80, "Si": 0.25, "Cr": 1.0, "Mo": 0.20}
    >>> t1 = float(isothermal_time_s(s, 650.0, 0.01, "pearlite"))
    >>> x, start = path_progress(s, [0.0, t1], np.full((1, 2), 650.0), "pearlite")
    >>> round(float(start[0]), 6)
    1.0
    """
    if reaction not in ("ferrite", "pearlite", "bainite"):
        raise InputError("reaction", reaction, "ferrite, pearlite, bainite")
    temps = np.asarray(temps_c, float)
    if temps.ndim != 2:
        raise InputError("temps_c", temps.shape, "a 2-D array (states, times)")
    t = np.broadcast_to(np.asarray(times_s, float), temps.shape)
    dt = np.diff(t, axis=1)
    if np.any(dt < 0):
        raise InputError("times_s", "decreasing", "increasing times")
    mid = 0.5 * (temps[:, 1:] + temps[:, :-1])
    col = {k: np.asarray(v, float)[..., None] if np.ndim(v) else v for k, v in comp.items()}
    top = {"ferrite": ac3_c, "pearlite": ac1_c, "bainite": bs_li_c}[reaction](col)
    # τ₁ only on the intervals that can count (below the reaction's upper temperature and active):
    # the same numbers, element by element, as isothermal_time_s(col, mid, 0.5, ...) / S(0.5) on
    # the whole (n, m) table, the others adding 0 to the sum
    cand = mid < top
    if active is not None:
        cand &= np.asarray(active, bool)
    # per-row constants taken to the row's candidate intervals (boolean indexing reads row by row)
    per_row = np.count_nonzero(cand, axis=1)
    k = {"ferrite": 0, "pearlite": 1, "bainite": 2}[reaction]
    rate_k = _rate_constants(col, grain_size_astm, bainite_carbon_cap_pct)[k]
    rate_r = np.repeat(np.broadcast_to(rate_k, (len(temps), 1))[:, 0], per_row)
    top_r = np.repeat(np.broadcast_to(top, (len(temps), 1))[:, 0], per_row)
    m = mid[cand]
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        arr = np.exp(-Q_CAL / (R_CAL * (m + 273.15)))
        tau1 = rate_r / (np.maximum(top_r - m, 1e-9) ** (2 if reaction == "bainite" else 3) * arr)
        tau1 = tau1 * s_integral(0.5) / s_integral(0.5)
        ok = np.isfinite(tau1) & (tau1 > 0)
        terms = np.zeros(mid.shape)
        terms[cand] = np.where(ok, dt[cand] / np.where(ok, tau1, 1.0), 0.0)
    s = np.sum(terms, axis=1)
    return _x_of_s(s), s / s_integral(0.01)
