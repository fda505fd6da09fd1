"""Temperature path of a bar or plate quenched into a hot bath (Carslaw & Jaeger series, one
eigenvalue set per distinct Biot number).

The same exact conduction series as :mod:`selector.models.cooling` (Carslaw & Jaeger 1959,
radiation boundary condition), written for many states and many times at once:

    θ(ξ, t) = (T − Tb)/(T0 − Tb) = Σ Cn · X(λn ξ) · exp(−λn² α t / L²)

    cylinder: X = J0, λ J1(λ) = Bi J0(λ), Cn = 2 J1(λn) / [λn (J0²(λn) + J1²(λn))]
    plate:    X = cos, λ tan λ = Bi,      Cn = 4 sin λn / (2 λn + sin 2λn)

The series is summed once per distinct size (h is one number, so θ depends on the size only;
a selection over the whole catalogue at one section has one) with :func:`selector.models.cooling.eigenvalues`, and the series
is truncated at :data:`N_TERMS` terms, enough from the first time of the bath paths
(:data:`TIMES_S`, 0.05 s) up: at Fo = α t / L² the dropped terms are below exp(−λ²Fo).
``cooling.temperature_c`` solves the roots for every (state, time) pair, which cost seconds
per state on the bath routes' 120-point paths.

References
----------
H.S. Carslaw and J.C. Jaeger, *Conduction of Heat in Solids*, 2nd ed., Oxford 1959, §7.6
(cylinder) and §3.11 (plate).
"""
from __future__ import annotations

import numpy as np

from ..errors import InputError
from . import cooling, quench_severity

#: series terms (the first time of a path, 0.05 s, at 200 mm gives λ² Fo > 40 for the last term)
N_TERMS = 200
#: the bath's quench severity: a molten-salt bath taken as strongly agitated oil (Grossmann H
#: table, :mod:`selector.models.quench_severity`; common practice for nitrate-nitrite baths)
BATH_MEDIUM = ("oil", "strong")


def bath_h_w_m2k() -> float:
    """Heat-transfer coefficient of the bath (W/m²K), from the Grossmann H of
    :data:`BATH_MEDIUM`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(bath_h_w_m2k())
    1382
    """
    return float(quench_severity.heat_transfer_coefficient_w_m2k(quench_severity.grossmann_h_per_in(*BATH_MEDIUM)))


#: times of the quench paths into the bath, s (log-spaced, to one hour)
TIMES_S = np.geomspace(0.05, 3600.0, 120)


def path_temperature_c(h_w_m2k, times_s, diameter_mm=None, thickness_mm=None, position=0.0,
                       austenitize_c=850.0, bath_c=300.0, n_terms=N_TERMS):
    """Temperature (°C) at one position of each state's section at each time of a bath quench.

    Parameters
    ----------
    h_w_m2k : float
        Surface heat-transfer coefficient of the bath, W m⁻² K⁻¹ (> 0).
    times_s : array_like
        Times since immersion, s (> 0), shape (m,).
    diameter_mm, thickness_mm : array_like
        Round diameters (mm) or plate thicknesses (mm), shape (n,); NaN in ``diameter_mm``
        where the state is a plate (its thickness is then taken from ``thickness_mm``).
    position : float
        r/R (round) or x/L from the mid-plane (plate): 0 = centre, 1 = surface.
    austenitize_c, bath_c : array_like
        Start and bath temperatures, °C, broadcast to (n,).
    n_terms : int
        Series terms.

    Returns
    -------
    ndarray, shape (n, m), °C.

    Validity
    --------
    As :mod:`selector.models.cooling` (``quench_cooling``): constant properties, no latent heat.

    References
    ----------
    Carslaw & Jaeger (1959) §7.6 and §3.11.

    Examples
    --------
    At long times the path ends at the bath temperature; at the surface of an ideal-quench
    limit (very large h) it drops to the bath at once.
    
    Example (illustrative: a value of this implementation, not a published one; centre of a
    25 mm round from 850 °C into the 300 °C bath, 1 s, 60 s and 1 h after immersion)

    >>> path_temperature_c(bath_h_w_m2k(), [1.0, 60.0, 3600.0], diameter_mm=[25.0]).round().tolist()
    [[850.0, 353.0, 300.0]]
    """
    h = float(h_w_m2k)
    if not np.isfinite(h) or h <= 0:
        raise InputError("h_w_m2k", h_w_m2k, "a finite heat-transfer coefficient > 0 W/m2K")
    t = np.asarray(times_s, float)
    if t.ndim != 1 or np.any(~np.isfinite(t)) or np.any(t <= 0):
        raise InputError("times_s", times_s, "a 1-D array of finite times > 0 s")
    d = None if diameter_mm is None else np.atleast_1d(np.asarray(diameter_mm, float))
    th = None if thickness_mm is None else np.atleast_1d(np.asarray(thickness_mm, float))
    if d is None and th is None:
        raise InputError("diameter_mm/thickness_mm", None, "diameters (rounds) or thicknesses (plates)")
    n = len(d) if d is not None else len(th)
    d = np.full(n, np.nan) if d is None else d
    th = np.full(n, np.nan) if th is None else np.broadcast_to(th, (n,))
    round_ = np.isfinite(d)
    size = np.where(round_, d, th)
    if np.any(~np.isfinite(size)) or np.any(size <= 0):
        raise InputError("diameter_mm/thickness_mm", size, "finite sizes > 0 mm")
    half = 0.5 * size * 1e-3
    alpha = cooling.K_STEEL_W_MK / cooling.RHO_C_J_M3K
    theta = np.empty((n, len(t)))
    for kind, mask in (("cylinder", round_), ("plate", ~round_)):
        if not mask.any():
            continue
        # θ depends on the size only (h is one number): one series per distinct size
        uh, inv = np.unique(half[mask], return_inverse=True)
        lam = cooling.eigenvalues(kind, h * uh / cooling.K_STEEL_W_MK, n_terms)   # (u, N)
        a = cooling.series_terms(kind, lam, float(position))                     # (u, N)
        fo = alpha * t[None, :] / uh[:, None] ** 2                                 # (u, m)
        e = np.exp(-np.minimum(lam[:, None, :] ** 2 * fo[..., None], 700.0))      # (u, m, N)
        theta[mask] = np.einsum("un,umn->um", a, e)[inv]
    t0 = np.broadcast_to(np.asarray(austenitize_c, float), (n,))[:, None]
    tb = np.broadcast_to(np.asarray(bath_c, float), (n,))[:, None]
    return tb + (t0 - tb) * np.clip(theta, 0.0, 1.0)
