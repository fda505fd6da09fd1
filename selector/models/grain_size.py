"""Grain size: ASTM E112 numbers, austenite grain growth (Beck law, Sellars–Whiteman
constants), and the Hall–Petch relation.

* ASTM E112: ``N_A = 15.50 · 2^(G-1)`` grains per mm² at 1×, mean grain diameter
  ``d = N_A^(-1/2)``; mean lineal intercept ``G = -6.6439 log10(l [mm]) - 3.288``.
* Isothermal grain growth, Beck / Burke–Turnbull form
  ``d^n - d0^n = k t exp(-Q / R T)``, with the constants of Sellars & Whiteman (1979)
  for austenite of C–Mn steels: n = 10, k = 3.87e32 µm^10/s, Q = 400 kJ/mol.
* Hall–Petch ``sigma_y = sigma_0 + k d^(-1/2)`` (Hall 1951, Petch 1953).

Which length enters Hall–Petch matters: here ``d`` is the mean lineal intercept
unless a function says otherwise (the Pickering–Gladman k values assume it; models
reference §10).  Nothing here warns; ranges are registered in
:mod:`selector.models.validity`.
"""
from __future__ import annotations

import numpy as np

from ..errors import check_array
from . import validity

R_J = 8.314

#: Sellars & Whiteman (1979), static grain growth of austenite in C-Mn steel (from memory)
GROWTH_EXPONENT = 10.0
GROWTH_K_UM_N_PER_S = 3.87e32
GROWTH_Q_KJ_MOL = 400.0

GROWTH_REF = ("C.M. Sellars & J.A. Whiteman, Metal Science 13 (1979) 187 (d^10 - d0^10 = 3.87e32 t "
              "exp(-400 kJ/RT), C-Mn steel; from memory); form of P.A. Beck et al., Trans. AIME 175 (1948) 372 "
              "and J.E. Burke & D. Turnbull, Prog. Met. Phys. 3 (1952) 220")

validity.register("austenite_grain_growth", {"temp_c": (850.0, 1250.0, "°C"), "hours": (0.0, 10.0, "h")},
                  "Sellars & Whiteman (1979) fitted on C-Mn steels after recrystallisation, about 950-1250 °C "
                  "(from memory); Al-killed fine-grain steels grow far less below their coarsening temperature")
validity.register("astm_e112", {"grain_size_number": (-3.0, 14.0, "")}, "ASTM E112 tables cover G 00 to 14")


_check = check_array  # shared helper in selector.errors

def astm_e112_mean_diameter_um(grain_size_number):
    """Mean grain diameter (µm) of an ASTM E112 grain-size number G.

    ::

        N_A = 15.50 · 2^(G - 1)   grains/mm² at 1×
        d   = 1000 / sqrt(N_A)    µm

    Parameters
    ----------
    grain_size_number : array_like
        ASTM grain size number G (-3 to 14).

    Returns
    -------
    ndarray, µm.  G = 12 gives 5.6 µm, G = 8 gives 22.5 µm (ASTM E112 definition, hand evaluation).

    References
    ----------
    ASTM E112, planimetric relation N_AE = 2^(G-1) per in² at 100× (15.50 = 100² / 645.16).

    Example (from the source: ASTM E112, G = 12 is a mean grain diameter of 5.6 um)

    >>> round(float(astm_e112_mean_diameter_um(12)), 1)
    5.6
    """
    g = _check("grain_size_number", grain_size_number, -5.0, 20.0, "astm_e112_mean_diameter_um")
    return 1000.0 / np.sqrt(15.50 * 2.0 ** (g - 1.0))


def astm_e112_mean_intercept_um(grain_size_number):
    """Mean lineal intercept (µm) of an ASTM E112 grain-size number:
    ``l = 10^(-(G + 3.288) / 6.6439)`` mm (G = 8 → 20.0 µm).

    Example (from the source: ASTM E112, G = 12 is a mean lineal intercept of 5.0 um)

    >>> round(float(astm_e112_mean_intercept_um(12)), 1)
    5.0
    """
    g = _check("grain_size_number", grain_size_number, -5.0, 20.0, "astm_e112_mean_intercept_um")
    return 1000.0 * 10.0 ** (-(g + 3.288) / 6.6439)


def grain_size_number_from_intercept_um(intercept_um):
    """ASTM E112 G from a mean lineal intercept (µm): ``G = -6.6439 log10(l [mm]) - 3.288``.

    Example (from the source: ASTM E112, a mean lineal intercept of 5.0 um is G = 12)

    >>> round(float(grain_size_number_from_intercept_um(5.0)), 1)
    12.0
    """
    l_um = _check("intercept_um", intercept_um, 0.0, None, "grain_size_number_from_intercept_um", lo_open=True)
    return -6.6439 * np.log10(l_um / 1000.0) - 3.288


def grain_size_number_from_diameter_um(diameter_um):
    """ASTM E112 G from a mean grain diameter (µm), inverse of
    :func:`astm_e112_mean_diameter_um`.

    Example (from the source: ASTM E112, a mean grain diameter of 5.6 um is G = 12)

    >>> round(float(grain_size_number_from_diameter_um(5.6)), 1)
    12.0
    """
    d = _check("diameter_um", diameter_um, 0.0, None, "grain_size_number_from_diameter_um", lo_open=True)
    return 1.0 + np.log2((1000.0 / d) ** 2 / 15.50)


def austenite_grain_size_um(temp_c, hours, initial_um=20.0, exponent=GROWTH_EXPONENT,
                            k_um_n_per_s=GROWTH_K_UM_N_PER_S, q_kj_mol=GROWTH_Q_KJ_MOL):
    """Austenite grain size after holding at ``temp_c`` for ``hours`` (grain-growth law).

    ::

        d^n - d0^n = k t exp(-Q / R T)

    with the Sellars & Whiteman (1979) constants for C–Mn steel by default:
    n = 10, k = 3.87e32 µm^10 s^-1, Q = 400 kJ/mol.

    Parameters
    ----------
    temp_c : array_like
        Austenitizing temperature, °C.
    hours : array_like
        Time at temperature, h (>= 0).
    initial_um : array_like, optional
        Grain size just after austenite formation d0, µm (default 20 µm, from memory:
        fine austenite formed from a ferrite-pearlite bar stock).
    exponent, k_um_n_per_s, q_kj_mol : float, optional
        The law's constants.

    Returns
    -------
    ndarray, µm (mean lineal intercept).  About 57 µm after 1 h at 850 °C, 94 µm
    after 1 h at 1000 °C.

    Validity
    --------
    850–1250 °C, up to 10 h (``austenite_grain_growth``).  Fine-grain (Al- or
    Nb-treated) steels are pinned by AlN / Nb(C,N) below about 1000–1050 °C and stay
    much finer (ASTM 7–8 typical, common practice): the law over-predicts for them.

    References
    ----------
    C.M. Sellars & J.A. Whiteman, "Recrystallization and grain growth in hot rolling",
    Metal Science 13 (1979) 187–194; P.A. Beck, J.C. Kremer, L.J. Demer & M.L. Holzworth,
    Trans. AIME 175 (1948) 372; J.E. Burke & D. Turnbull, Prog. Met. Phys. 3 (1952) 220.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(austenite_grain_size_um(925.0, 1.0)), 1)
    74.2
    """
    t = _check("temp_c", temp_c, 0.0, 1600.0, "austenite_grain_size_um")
    h = _check("hours", hours, 0.0, 1e4, "austenite_grain_size_um")
    d0 = _check("initial_um", initial_um, 0.0, None, "austenite_grain_size_um", lo_open=True)
    tk = t + 273.15
    growth = k_um_n_per_s * h * 3600.0 * np.exp(-q_kj_mol * 1e3 / (R_J * tk))
    return (d0 ** exponent + growth) ** (1.0 / exponent)


def hall_petch_yield_mpa(sigma0_mpa, k_mpa_sqrt_m, grain_um):
    """Hall–Petch yield strength ``sigma_0 + k d^(-1/2)``, d in m from ``grain_um``.

    Parameters
    ----------
    sigma0_mpa : array_like
        Friction stress, MPa.
    k_mpa_sqrt_m : array_like
        Hall–Petch coefficient, MPa·m^½ (mild steel about 0.74, copper about 0.11,
        from memory).
    grain_um : array_like
        Grain size (mean lineal intercept), µm (> 0).

    References
    ----------
    E.O. Hall, Proc. Phys. Soc. B 64 (1951) 747; N.J. Petch, JISI 174 (1953) 25.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(hall_petch_yield_mpa(70.0, 0.74, 25.0)))
    218
    """
    d = _check("grain_um", grain_um, 0.0, None, "hall_petch_yield_mpa", lo_open=True)
    return np.asarray(sigma0_mpa, float) + np.asarray(k_mpa_sqrt_m, float) / np.sqrt(d * 1e-6)
