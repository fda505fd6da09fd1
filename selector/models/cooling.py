"""Transient heat conduction in a quenched round bar and plate (Fourier–Bessel series).

A long round bar of radius R (or a plate of half-thickness L) at a uniform
austenitizing temperature T0 is plunged at t = 0 into a bath at Tb and loses heat
through a constant surface heat-transfer coefficient h.  With constant properties
the exact solution is the classical eigenfunction series (Carslaw & Jaeger 1959):

    θ = (T − Tb)/(T0 − Tb) = Σ Cn · X(λn ξ) · exp(−λn² Fo),   Fo = α t / L²,  Bi = h L / k

* cylinder (ξ = r/R):  X = J0,  roots of  λ J1(λ) = Bi J0(λ),
  Cn = 2 J1(λn) / [λn (J0²(λn) + J1²(λn))]
* plate (ξ = x/L from the mid-plane):  X = cos,  roots of  λ tan λ = Bi,
  Cn = 4 sin λn / (2 λn + sin 2λn)

The cooling rate at a chosen temperature (700 °C, the Jominy reference) follows
from the time derivative of the same series.  For speed the route layer uses a
table of the dimensionless rate −dθ/dFo at θ* over (log Bi, θ*, position), built
once from the exact series and interpolated (log rate, bilinear); ``exact=True``
evaluates the series directly.

Properties (constant, austenite near 700 °C, from memory): k = 27 W m⁻¹ K⁻¹,
ρc = 4.6 MJ m⁻³ K⁻¹, hence α = 5.9 mm² s⁻¹.  Real steel has k and c varying with
temperature, latent heat of transformation and a boiling-regime h; the Grossmann H
absorbs these into one effective number, so the series is a consistent, not an
exact, description of a real quench.

The Jominy equivalence maps a cooling rate at 700 °C to the distance on the Jominy
bar that cools at the same rate (``data/jominy_cooling_rates.csv``, log–log
interpolation): the standard way of reading a round bar's hardness off a Jominy
curve (ASTM A255, cooling-rate correlation).

References
----------
H.S. Carslaw and J.C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford 1959,
§7.6 (cylinder) and §3.11 (plate), radiation (Robin) boundary condition.
M.P. Heisler, "Temperature charts for induction and constant-temperature heating",
Trans. ASME 69 (1947) 227–236 (one-term charts).
ASTM A255, Jominy cooling rates at 705 °C against distance (as printed on textbook
Jominy charts, e.g. Callister, *Materials Science and Engineering*, Fig. 14.9).
"""
from __future__ import annotations

import functools

import numpy as np
from scipy import special

from ..cache import disk_table
from ..catalogue.loader import Column, Schema, read_table
from ..errors import DataFileError, InputError
from . import validity

#: thermal conductivity of steel in the austenite range, W/m·K (from memory)
K_STEEL_W_MK = 27.0
#: volumetric heat capacity, J/m³·K (from memory: 7.8 Mg/m³ × 0.59 kJ/kg·K)
RHO_C_J_M3K = 4.6e6
#: default quench-bath temperature, °C (common practice for oil and water)
BATH_C = 40.0
#: number of series terms
N_TERMS = 800

_BI_GRID = np.logspace(-3.0, 2.0, 51)
_THETA_GRID = np.linspace(0.50, 0.98, 17)
_FO_GRID = np.logspace(-7.0, 4.0, 221)

GEOMETRIES = ("cylinder", "plate")

REFERENCE = "Carslaw & Jaeger (1959) series; constant k = 27 W/mK, rho c = 4.6 MJ/m3K (from memory)"
validity.register("quench_cooling", {"biot": (1e-3, 100.0, ""), "theta": (0.50, 0.98, "")}, REFERENCE)
validity.register("jominy_rate_factor", {"biot": (0.05, 100.0, "")},
                  "rate factor fitted on bar centres at Bi = H*D 0.6 to ideal (data/reference/"
                  "jominy_equivalence_charts.csv), checked on a 12.5 mm oil probe (Bi 0.14)")
validity.register("jominy_equivalence", {"cooling_rate_c_s": (1.9, 270.0, "C/s")},
                  "Jominy cooling rates at 705 C, data/jominy_cooling_rates.csv (J1-J32)")


# --------------------------------------------------------------------------- eigenvalues
def _f(kind, lam, bi):
    if kind == "cylinder":
        return lam * special.j1(lam) - bi * special.j0(lam)
    return lam * np.sin(lam) - bi * np.cos(lam)


@functools.cache
def _brackets(kind: str, n_terms: int):
    if kind == "cylinder":
        lo = np.concatenate([[0.0], special.jn_zeros(1, n_terms - 1)])
        hi = special.jn_zeros(0, n_terms)
    else:
        lo = np.arange(n_terms) * np.pi
        hi = lo + 0.5 * np.pi
    return lo, hi


def eigenvalues(kind: str, bi, n_terms: int = N_TERMS) -> np.ndarray:
    """First ``n_terms`` roots λn for Biot number(s) ``bi`` (shape ``bi.shape + (n_terms,)``).

    Cylinder: λ J1(λ) = Bi J0(λ); plate: λ tan λ = Bi.  ``bi = inf`` gives the
    ideal-quench roots (zeros of J0, or (n − ½)π).  Vectorised bisection.

    Example (from the source: Carslaw & Jaeger (1959), cylinder: first root 2.4048 at Bi ->
    infinity (J0 zero))

    >>> round(float(eigenvalues("cylinder", 1e6, 2)[0]), 3)
    2.405
    """
    bi = np.asarray(bi, float)[..., None]
    lo, hi = _brackets(kind, n_terms)
    lo = np.broadcast_to(lo, bi.shape[:-1] + (n_terms,)).copy()
    hi = np.broadcast_to(hi, lo.shape).copy()
    inf = np.isinf(bi)[..., 0]
    b = np.where(np.isinf(bi), 0.0, bi)
    flo = np.sign(_f(kind, lo + 1e-300, b))
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        fm = np.sign(_f(kind, mid, b))
        same = fm == flo
        lo = np.where(same, mid, lo)
        hi = np.where(same, hi, mid)
    lam = 0.5 * (lo + hi)
    if np.any(inf):
        lam[inf] = _brackets(kind, n_terms)[1]
    return lam


def _coefficients(kind, lam):
    if kind == "cylinder":
        j0, j1 = special.j0(lam), special.j1(lam)
        return 2.0 * j1 / (lam * (j0 ** 2 + j1 ** 2))
    return 4.0 * np.sin(lam) / (2.0 * lam + np.sin(2.0 * lam))


def _shape(kind, lam, xi):
    return special.j0(lam * xi) if kind == "cylinder" else np.cos(lam * xi)


def series_terms(kind, lam, xi):
    """Terms C_n·X(λ_n ξ) of the exact conduction series at the position ξ = r/R (or x/L)
    (Carslaw & Jaeger 1959, §3.11 and §7.8): θ = Σ terms·exp(−λ_n² Fo).

    Parameters
    ----------
    kind : {"cylinder", "plate"}
    lam : ndarray
        Eigenvalues from :func:`eigenvalues`, shape (..., N).
    xi : float or ndarray
        Position, 0 (centre) to 1 (surface), broadcast against ``lam``.

    Returns
    -------
    ndarray
        The terms, shape of ``lam`` broadcast with ``xi``.

    Example (from the source: at Fo = 0 the series gives θ = 1 everywhere; 200 terms)

    >>> lam = eigenvalues("plate", np.array([1.0]), 200)
    >>> round(float(series_terms("plate", lam, 0.0).sum()), 4)
    1.0
    """
    return _coefficients(kind, lam) * _shape(kind, lam, xi)


def theta(kind: str, bi, xi, fo, n_terms: int = N_TERMS):
    """Dimensionless temperature θ = (T − Tb)/(T0 − Tb) of the exact series.

    Parameters
    ----------
    kind : {"cylinder", "plate"}
    bi : array_like
        Biot number h L / k (``inf`` for an ideal quench).
    xi : array_like
        Position r/R (cylinder) or x/L from the mid-plane (plate), 0–1.
    fo : array_like
        Fourier number α t / L², > 0.

    Returns
    -------
    ndarray, broadcast of ``bi``, ``xi`` and ``fo``.

    Example (from the source: Carslaw & Jaeger (1959), a solid cylinder at Fo = 0 is still at
    its initial temperature)

    >>> round(float(theta("cylinder", 1.0, 0.0, 1e-9)), 3)
    1.0
    """
    bi, xi, fo = np.broadcast_arrays(np.asarray(bi, float), np.asarray(xi, float), np.asarray(fo, float))
    lam = eigenvalues(kind, bi, n_terms)
    c = _coefficients(kind, lam)
    return np.sum(c * _shape(kind, lam, xi[..., None]) * np.exp(-np.minimum(lam ** 2 * fo[..., None], 700.0)),
                  axis=-1)


# --------------------------------------------------------------------------- exact crossing
def _crossing(kind, bi, xi, theta_star, n_terms=N_TERMS):
    """Fo at which θ(ξ) falls to θ*, and −dθ/dFo there (exact series; scalar-free arrays)."""
    bi, xi, ts = np.broadcast_arrays(np.asarray(bi, float), np.asarray(xi, float), np.asarray(theta_star, float))
    lam = eigenvalues(kind, bi, n_terms)
    a = series_terms(kind, lam, xi[..., None])
    lam2 = lam ** 2
    # bracket on the log-Fo grid (θ falls with Fo), then bisection in log Fo
    lo = np.full(bi.shape, np.log(_FO_GRID[0]))
    hi = np.full(bi.shape, np.log(_FO_GRID[-1]))
    for _ in range(56):
        mid = 0.5 * (lo + hi)
        th = np.sum(a * np.exp(-np.minimum(lam2 * np.exp(mid)[..., None], 700.0)), axis=-1)
        above = th > ts
        lo = np.where(above, mid, lo)
        hi = np.where(above, hi, mid)
    fo = np.exp(0.5 * (lo + hi))
    rate = np.sum(a * lam2 * np.exp(-np.minimum(lam2 * fo[..., None], 700.0)), axis=-1)
    # ideal quench (Bi = inf): the surface jumps to the bath temperature, its rate is unbounded
    rate = np.where(np.isinf(bi) & (xi >= 1.0), np.inf, rate)
    return fo, rate


@disk_table      # built once, then read from the user's cache directory (selector/cache.py)
def _rate_table(kind: str, positions: tuple):
    """Dimensionless −dθ/dFo at θ* on the (Bi, θ*, position) grid, from the exact series."""
    xi = np.asarray(positions, float)
    lam = eigenvalues(kind, _BI_GRID, N_TERMS)            # (nb, N)
    c = _coefficients(kind, lam)
    lam2 = lam ** 2
    ts = _THETA_GRID
    nb, nt, npos = len(_BI_GRID), len(ts), len(xi)
    out = np.empty((nb, nt, npos))
    logfo = np.log(_FO_GRID)
    for i in range(nb):
        e = np.exp(-np.minimum(lam2[i][:, None] * _FO_GRID[None, :], 700.0))   # (N, G); no denormals
        a = c[i][None, :] * _shape(kind, lam[i][None, :], xi[:, None])  # (P, N)
        th = np.einsum("pn,ng->pg", a, e)                    # (P, G); einsum avoids BLAS threading
        th = np.minimum.accumulate(th, axis=1)               # monotone guard against round-off
        # first grid index where θ <= θ* (per position), linear interpolation in log Fo as a start
        idx = np.stack([np.searchsorted(-th[p], -ts, side="left") for p in range(npos)])
        idx = idx.clip(1, len(_FO_GRID) - 1)                     # (P, T)
        rows = np.arange(npos)[:, None]
        t0, t1 = th[rows, idx - 1], th[rows, idx]
        w = np.where(t0 > t1, (t0 - ts[None, :]) / np.where(t0 > t1, t0 - t1, 1.0), 0.0)
        lf = logfo[idx - 1] + w * (logfo[idx] - logfo[idx - 1])
        l2 = lam2[i][None, None, :]
        # Newton refinement in log Fo with the exact series
        for _ in range(4):
            f = np.exp(lf)[..., None]
            ex = np.exp(-np.minimum(l2 * f, 700.0)) * a[:, None, :]     # (P, T, N)
            thv = ex.sum(-1)
            dth = -(ex * l2).sum(-1) * f[..., 0]                        # dθ/dlnFo
            lf = lf - (thv - ts[None, :]) / np.where(dth < 0, dth, -1e-300)
        f = np.exp(lf)[..., None]
        out[i] = (np.exp(-np.minimum(l2 * f, 700.0)) * a[:, None, :] * l2).sum(-1).T
    return np.log(np.maximum(out, 1e-300))


def _interp_table(kind, bi, theta_star, positions, log10_bi=None):
    """Table rate at each position; ``bi`` is per state (...) or per state and position (..., n_pos);
    or give ``log10_bi`` (..., n_pos) directly."""
    tab = _rate_table(kind, tuple(float(p) for p in positions))   # (nb, nt, npos)
    npos = len(positions)
    tt = np.clip(np.asarray(theta_star, float), _THETA_GRID[0], _THETA_GRID[-1])
    if log10_bi is None:
        bi = np.asarray(bi, float)
        if bi.ndim == tt.ndim:
            bi = bi[..., None]
        with np.errstate(divide="ignore"):
            log10_bi = np.log10(bi)
    gb = np.log10(_BI_GRID)
    lb = np.clip(np.broadcast_to(log10_bi, tt.shape + (npos,)), gb[0], gb[-1])
    fb = (lb - gb[0]) / (gb[1] - gb[0])
    ib = np.clip(np.floor(fb).astype(int), 0, len(gb) - 2)
    wb = fb - ib
    ft = (tt - _THETA_GRID[0]) / (_THETA_GRID[1] - _THETA_GRID[0])
    it0 = np.clip(np.floor(ft).astype(int), 0, len(_THETA_GRID) - 2)
    wt = (ft - it0)[..., None]
    # flat indices into the C-ordered table: one np.take per corner
    nt = len(_THETA_GRID)
    k00 = (ib * nt + it0[..., None]) * npos + np.arange(npos)
    flat = tab.reshape(-1)
    step_b, step_t = nt * npos, npos
    v00, v10 = np.take(flat, k00), np.take(flat, k00 + step_b)
    v01, v11 = np.take(flat, k00 + step_t), np.take(flat, k00 + step_b + step_t)
    lo = v00 + wb * (v10 - v00)
    return np.exp(lo + wt * (v01 + wb * (v11 - v01) - lo))


# --------------------------------------------------------------------------- public API
def _geometry(diameter_mm, thickness_mm):
    if (diameter_mm is None) == (thickness_mm is None):
        raise InputError("diameter_mm/thickness_mm", (diameter_mm, thickness_mm),
                         "exactly one of diameter_mm (round bar) or thickness_mm (plate)")
    if diameter_mm is not None:
        size, name, kind = diameter_mm, "diameter_mm", "cylinder"
    else:
        size, name, kind = thickness_mm, "thickness_mm", "plate"
    s = np.asarray(size, float)
    if np.any(~np.isfinite(s)) or np.any(s <= 0):
        raise InputError(name, size, "finite sizes > 0 mm")
    return kind, 0.5 * s * 1e-3          # half-size L in m


def biot_number(h_w_m2k, diameter_mm=None, thickness_mm=None, conductivity_w_mk=K_STEEL_W_MK):
    """Biot number Bi = h L / k with L = radius (bar) or half-thickness (plate).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(biot_number(2126.0, diameter_mm=25.0)), 3)
    0.984
    """
    kind, half_m = _geometry(diameter_mm, thickness_mm)
    h = np.asarray(h_w_m2k, float)
    if np.any(np.isnan(h)) or np.any(h < 0):
        raise InputError("h_w_m2k", h_w_m2k, "numbers >= 0 W/m2K (inf for an ideal quench)")
    return h * half_m / conductivity_w_mk


def temperature_c(h_w_m2k, time_s, diameter_mm=None, thickness_mm=None, positions=(1.0, 0.0),
                  austenitize_c=850.0, bath_c=BATH_C, conductivity_w_mk=K_STEEL_W_MK,
                  rho_c_j_m3k=RHO_C_J_M3K):
    """Temperature (°C) at ``positions`` after ``time_s`` of quenching (exact series).

    Parameters
    ----------
    h_w_m2k : array_like
        Surface heat-transfer coefficient, W m⁻² K⁻¹ (``inf``: ideal quench).
    time_s : array_like
        Time since immersion, s (> 0).
    diameter_mm, thickness_mm : array_like
        Bar diameter or plate thickness, mm (exactly one).
    positions : sequence of float
        r/R (bar) or x/L from the mid-plane (plate), 1 = surface, 0 = centre.
    austenitize_c, bath_c : array_like
        Initial and bath temperatures, °C.
    conductivity_w_mk, rho_c_j_m3k : float
        Thermal conductivity (W m⁻¹ K⁻¹) and volumetric heat capacity (J m⁻³ K⁻¹).

    Returns
    -------
    ndarray, shape ``broadcast(inputs) + (len(positions),)``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> [round(float(x)) for x in temperature_c(2126.0, 10.0, diameter_mm=25.0).ravel()]
    [392, 583]
    """
    kind, half_m = _geometry(diameter_mm, thickness_mm)
    t = np.asarray(time_s, float)
    if np.any(~np.isfinite(t)) or np.any(t <= 0):
        raise InputError("time_s", time_s, "finite times > 0 s")
    bi = biot_number(h_w_m2k, diameter_mm, thickness_mm, conductivity_w_mk)
    alpha = conductivity_w_mk / rho_c_j_m3k
    fo = alpha * t / half_m ** 2
    xi = np.asarray(positions, float)
    th = theta(kind, np.asarray(bi)[..., None], xi, np.asarray(fo)[..., None])
    t0 = np.asarray(austenitize_c, float)[..., None]
    tb = np.asarray(bath_c, float)[..., None]
    return tb + (t0 - tb) * th


def boiling_biot(biot, depth_mm, peak_ratio, peak_depth_mm):
    """Biot number that governs the cooling at 700 °C of a point ``depth_mm`` below the surface of a
    part quenched in a boiling liquid.

        Bi_local = Bi · M ** exp(−s / δ)

    Bi = hL/k with the effective Grossmann h = 2kH; M = ``peak_ratio``, the ratio of the
    nucleate-boiling heat-transfer coefficient to 2kH; s = depth; δ = ``peak_depth_mm``, the
    thermal penetration during the boiling stage.  A point near the surface passes 700 °C in the
    first seconds of the quench, while the surface boils, and cools as under M·h; a point deep
    inside passes 700 °C much later and cools as under the effective h alone, the value the
    Grossmann H was fitted to (bar centres).  Between the two the exponent falls as the
    penetration profile exp(−s/δ).  An empirical interpolation between two exact conduction
    solutions (this project's), not a published method; the boiling stages behind it are
    described in Totten, Bates & Clinton (1993), ch. 3.

    Parameters
    ----------
    biot : array_like
        Effective Biot number (``inf`` for an ideal quench, which stays ``inf``).
    depth_mm : array_like
        Depth of the point below the quenched surface, mm (>= 0).
    peak_ratio : array_like
        M >= 1 (1: no boiling stage, e.g. air).
    peak_depth_mm : array_like
        δ > 0, mm.

    Returns
    -------
    ndarray, broadcast of the inputs.

    Validity
    --------
    The rows of ``data/quench_severity.csv`` (M 1–3, δ 4 mm); checked against the fractional-radius
    readings of ``data/reference/jominy_equivalence_charts.csv`` (role ``check``).

    References
    ----------
    G.E. Totten, C.E. Bates, N.A. Clinton, *Handbook of Quenchants and Quenching Technology*,
    ASM International 1993, ch. 3 (from memory); Carslaw & Jaeger (1959) for the series.

    Example (illustrative: a value of this implementation, not a published one; at the surface
    the full ratio, far inside none)

    >>> [round(float(x), 2) for x in boiling_biot(0.4, [0.0, 40.0], 3.0, 4.0)]
    [1.2, 0.4]
    """
    bi = np.asarray(biot, float)
    s = np.asarray(depth_mm, float)
    m = np.asarray(peak_ratio, float)
    delta = np.asarray(peak_depth_mm, float)
    if np.any(np.isnan(s)) or np.any(s < 0):
        raise InputError("depth_mm", depth_mm, "depths >= 0 mm")
    if np.any(~np.isfinite(m)) or np.any(m < 1.0):
        raise InputError("peak_ratio", peak_ratio, "finite ratios >= 1")
    if np.any(~np.isfinite(delta)) or np.any(delta <= 0):
        raise InputError("peak_depth_mm", peak_depth_mm, "finite depths > 0 mm")
    return bi * m ** np.exp(-s / delta)


def cooling_rate_at_c_s(h_w_m2k, diameter_mm=None, thickness_mm=None, positions=(1.0, 0.75, 0.5, 0.25, 0.0),
                        austenitize_c=850.0, bath_c=BATH_C, at_temp_c=700.0,
                        conductivity_w_mk=K_STEEL_W_MK, rho_c_j_m3k=RHO_C_J_M3K, exact=False,
                        peak_ratio=1.0, peak_depth_mm=4.0):
    """Cooling rate (°C/s) as each position passes ``at_temp_c`` during a quench.

    rate = (T0 − Tb) · (α / L²) · (−dθ/dFo) at the Fo where θ(ξ) = (T* − Tb)/(T0 − Tb)

    Parameters
    ----------
    h_w_m2k : array_like
        Surface heat-transfer coefficient, W m⁻² K⁻¹ (h = 2kH).
    diameter_mm, thickness_mm : array_like
        Round-bar diameter or plate thickness, mm (exactly one).
    positions : sequence of float
        r/R or x/L, 1 = surface, 0 = centre (default surface to centre in quarters).
    austenitize_c : array_like
        Initial uniform temperature, °C (> at_temp_c).
    bath_c : array_like
        Bath temperature, °C (< at_temp_c); default 40 °C.
    at_temp_c : float
        Temperature at which the rate is taken, °C (700, the Jominy reference).
    conductivity_w_mk, rho_c_j_m3k : float
        Thermal properties (defaults 27 W m⁻¹ K⁻¹ and 4.6 MJ m⁻³ K⁻¹, from memory).
    exact : bool
        Evaluate the series directly instead of the interpolated table.
    peak_ratio, peak_depth_mm : array_like
        Boiling stage of a liquid quench (:func:`boiling_biot`; broadcast with ``h_w_m2k``):
        each position is read on the series at its own Biot number.  The defaults
        (ratio 1) give the constant-h series.

    Returns
    -------
    ndarray, shape ``broadcast(h, size, austenitize_c, bath_c) + (len(positions),)``, °C/s.

    Raises
    ------
    InputError
        Non-positive size, negative h, or at_temp_c not between bath and austenitize.

    Validity
    --------
    ``quench_cooling``: Bi 1e-3–100 (table clipped outside), θ* 0.50–0.98.

    References
    ----------
    Carslaw & Jaeger (1959) §7.6 and §3.11.

    Example (illustrative: a value of this implementation, not a published one)

    >>> [round(float(x)) for x in cooling_rate_at_c_s(2126.0, diameter_mm=25.0, positions=(1.0, 0.0))]
    [82, 36]
    """
    kind, half_m = _geometry(diameter_mm, thickness_mm)
    bi = biot_number(h_w_m2k, diameter_mm, thickness_mm, conductivity_w_mk)
    t0 = np.asarray(austenitize_c, float)
    tb = np.asarray(bath_c, float)
    if np.any(t0 <= at_temp_c) or np.any(tb >= at_temp_c):
        raise InputError("austenitize_c/bath_c", (austenitize_c, bath_c),
                         f"austenitize_c above and bath_c below at_temp_c = {at_temp_c} C")
    ts = (at_temp_c - tb) / (t0 - tb)
    alpha = conductivity_w_mk / rho_c_j_m3k
    bi, ts, half, m, delta = np.broadcast_arrays(bi, ts, np.asarray(half_m, float), np.asarray(peak_ratio, float),
                                                 np.asarray(peak_depth_mm, float))
    xi = np.asarray(positions, float)
    depth = (1.0 - xi) * half[..., None] * 1e3                            # mm below the surface
    if exact:
        bi_pos = boiling_biot(bi[..., None], depth, m[..., None], delta[..., None])
        _f0, g = _crossing(kind, bi_pos, xi, ts[..., None])
    else:
        if np.any(~np.isfinite(m)) or np.any(m < 1.0):
            raise InputError("peak_ratio", peak_ratio, "finite ratios >= 1")
        if np.any(~np.isfinite(delta)) or np.any(delta <= 0):
            raise InputError("peak_depth_mm", peak_depth_mm, "finite depths > 0 mm")
        # the same Bi_local in log space (one exp instead of a power and a logarithm per position)
        with np.errstate(divide="ignore"):
            lg = np.log10(bi)[..., None] + np.exp(-depth / delta[..., None]) * np.log10(m)[..., None]
        g = _interp_table(kind, None, ts, positions, log10_bi=lg)
    return ((t0 - tb)[..., None] * alpha / half[..., None] ** 2) * g


@functools.cache
def _jominy_table():
    schema = Schema((Column("j_sixteenths", "float", lo=0.5, hi=64), Column("distance_mm", "float", lo=0, hi=200),
                     Column("rate_c_s", "float", lo=0.1, hi=1000), Column("rate_f_s", "float", lo=0.1, hi=2000),
                     Column("source"), Column("confidence", "choice",
                                              choices=("verified", "partial", "from memory", "common practice"))))
    t = read_table("jominy_cooling_rates.csv", schema=schema)
    d = t["distance_mm"].to_numpy(float)
    r = t["rate_c_s"].to_numpy(float)
    if np.any(np.diff(d) <= 0) or np.any(np.diff(r) >= 0):
        raise DataFileError("jominy_cooling_rates.csv", None, "rate_c_s",
                            "distances must increase and rates decrease down the file")
    return np.log(d), np.log(r)


#: the fitted bar-to-Jominy rate factor (scripts/fit_jominy_equivalence.py)
RATE_FACTOR_FILE = "fits/jominy_equivalence_coefficients.csv"


@functools.cache
def jominy_rate_factor() -> float:
    """Effective factor F on the conduction cooling rate before the Jominy table is read.

    The constant-property series (k = 27 W m⁻¹ K⁻¹, ρc = 4.6 MJ m⁻³ K⁻¹) puts bar centres
    20–28 % farther along the Jominy bar than the published bar-diameter / Jominy-position
    charts, by the same ratio for H = 0.3, 1 and ∞; a real bar's conductivity rises as its
    outer shell cools and transforms, which a constant-property series cannot carry.  One
    factor F (≈ 1.45, an effective diffusivity F·α at fixed Biot number) is fitted offline by
    ``scripts/fit_jominy_equivalence.py`` on the chart readings of
    ``data/reference/jominy_equivalence_charts.csv`` (role ``fit``) and read here from
    ``data/fits/jominy_equivalence_coefficients.csv``; the package never fits it.

    Returns
    -------
    float, dimensionless (> 0).

    References
    ----------
    Textbook chart of equivalent Jominy positions against bar diameter (bar centres, H = ∞,
    1.0, 0.3), see the chart file for the copies read; Lamont, Iron Age 152 (1943) for the
    method of equivalence.

    Example (illustrative: a value of this implementation, not a published one; the shipped
    fitted factor)

    >>> round(jominy_rate_factor(), 2)
    1.45
    """
    schema = Schema((Column("fit"), Column("coefficient"), Column("value", "float", lo=0.1, hi=10.0),
                     Column("unit", allow_blank=True), Column("source"),
                     Column("confidence", "choice", choices=("fitted",))))
    t = read_table(RATE_FACTOR_FILE, schema=schema)
    v = t.loc[t["coefficient"] == "rate_factor", "value"]
    if len(v) != 1:
        raise DataFileError(RATE_FACTOR_FILE, None, "coefficient", "needs exactly one row 'rate_factor'")
    return float(v.iloc[0])


#: diameters of the ideal-quench centre table, mm
_IDEAL_D_GRID_MM = np.geomspace(1.0, 1000.0, 121)


def ideal_centre_rate_table():
    """Conduction cooling rate at 700 °C (°C/s, F = 1) of the centre of an ideally quenched round
    (H → ∞, exact series, 850 °C into 40 °C) on the diameter grid ``_IDEAL_D_GRID_MM``.

    A pure function of module constants (no data file): the route layer and a disk cache may
    wrap it.  The centre passes 700 °C in the regular regime, so the austenitizing temperature
    does not matter.

    Returns
    -------
    (diameters_mm, rates_c_s) : two ndarrays of shape (121,).

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(ideal_centre_rate_table()) > 0
    True
    """
    d = _IDEAL_D_GRID_MM
    rate = cooling_rate_at_c_s(np.inf, diameter_mm=d, positions=(0.0,), exact=True)
    return d, np.asarray(rate, float).reshape(len(d))


@functools.cache
def _ideal_centre_cached():
    d, r = ideal_centre_rate_table()
    return np.log(d), np.log(r)


def ideal_centre_jominy_mm(diameter_mm):
    """Jominy-equivalent distance (mm) of the centre of a round of ``diameter_mm`` quenched ideally
    (H → ∞): the conduction rate (log–log interpolation of :func:`ideal_centre_rate_table`) times
    :func:`jominy_rate_factor`, read on the Jominy cooling-rate table.

    This is the relation between the ideal critical diameter DI and the Jominy distance of
    50 % martensite that the definition of DI implies (Grossmann 1952; ASTM A255).

    Parameters
    ----------
    diameter_mm : array_like
        Round diameter, mm (1–1000; held at the ends).

    Returns
    -------
    ndarray, mm, shape of ``diameter_mm``.

    Examples
    --------
    A 75 mm round: about 12.5 mm (the chart reading the rate factor is fitted on).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(ideal_centre_jominy_mm(75.0)), 1)
    12.5
    """
    ld, lr = _ideal_centre_cached()
    x = np.log(np.clip(np.asarray(diameter_mm, float), _IDEAL_D_GRID_MM[0], _IDEAL_D_GRID_MM[-1]))
    rate = np.exp(np.interp(x, ld, lr))
    return np.asarray(jominy_equivalent_mm(rate * jominy_rate_factor()), float)


#: farthest Jominy-equivalent distance returned (log-log extrapolation beyond J32), mm
JOMINY_MAX_MM = 100.0


def jominy_rate_c_s(distance_mm):
    """Cooling rate at 700 °C of the Jominy bar at ``distance_mm`` from the quenched end, °C/s:
    the inverse of :func:`jominy_equivalent_mm` inside the table (log–log interpolation of
    ``data/jominy_cooling_rates.csv``; held at the end rows outside it).

    Parameters
    ----------
    distance_mm : array_like
        Distance from the quenched end, mm (> 0).

    Returns
    -------
    ndarray, °C/s.

    References
    ----------
    Jominy cooling rates at 705 °C (ASTM A255; textbook chart axis, Callister Fig. 14.9).

    Example (from the source: Callister Fig. 14.9 cooling-rate axis, 50.8 mm (J32) → 1.9 °C/s,
    the last row of ``data/jominy_cooling_rates.csv``)

    >>> round(float(jominy_rate_c_s(50.8)), 1)
    1.9
    """
    d = np.asarray(distance_mm, float)
    if np.any(np.isnan(d)) or np.any(d <= 0):
        raise InputError("distance_mm", distance_mm, "distances > 0 mm")
    ld, lr = _jominy_table()
    return np.exp(np.interp(np.log(d), ld, lr))


def jominy_equivalent_mm(cooling_rate_c_s):
    """Distance (mm) on the Jominy bar that cools at the same rate at 700 °C.

    Log–log interpolation of ``data/jominy_cooling_rates.csv`` (J1 = 1.59 mm,
    270 °C/s … J32 = 50.8 mm, 1.9 °C/s).  Faster than J1: 1.59 mm.  Slower than
    J32: log–log extrapolation of the last segment, capped at 100 mm
    (:data:`JOMINY_MAX_MM`); the route layer flags those states.

    Parameters
    ----------
    cooling_rate_c_s : array_like
        Cooling rate at 700 °C, °C/s (> 0).

    Returns
    -------
    ndarray, mm.

    Validity
    --------
    ``jominy_equivalence``: 1.9–270 °C/s.

    References
    ----------
    Jominy cooling rates at 705 °C (ASTM A255; textbook chart axis, Callister Fig. 14.9).

    Example (from the source: data/jominy_cooling_rates.csv, J1 (1.59 mm) cools at 270 °C/s at
    705 °C)

    >>> round(float(jominy_equivalent_mm(270.0)), 2)
    1.59
    """
    r = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(r)) or np.any(r <= 0):
        raise InputError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    ld, lr = _jominy_table()
    x = np.log(r)
    # np.interp needs increasing x: use the reversed (rate increasing) table
    out = np.interp(x, lr[::-1], ld[::-1])
    slope = (ld[-1] - ld[-2]) / (lr[-1] - lr[-2])
    slow = x < lr[-1]
    out = np.where(slow, ld[-1] + slope * (x - lr[-1]), out)
    return np.minimum(np.exp(out), JOMINY_MAX_MM)
