"""Strength of ferrite–pearlite steels from composition and microstructure
(Gladman, McIvor & Pickering 1972; Pickering & Gladman 1963), and the
microstructure of an anneal or a normalize.

Chain used for a full anneal (furnace cool) and a normalize (still-air cool):

1. austenite grain size from temperature and time (:mod:`selector.models.grain_size`);
2. ferrite grain size from the austenite grain size, the cooling rate and the carbon
   equivalent (Hodgson & Gibbs 1992);
3. transformation undercooling below the eutectoid from the cooling rate
   (``75 K · rate^0.24``: about 25 K for a furnace cool at 0.01 K/s, 75 K for still
   air at 1 K/s; a fit to common practice), and the pearlite interlamellar spacing
   ``S0 = 8.02 / ΔT`` µm (spacing inversely proportional to undercooling, Zener 1946;
   constant from memory);
4. pearlite fraction by the lever rule between 0.02 and 0.77 % C;
5. yield and tensile strength by Gladman, McIvor & Pickering (1972), whose ferrite
   terms carry Hall–Petch ``17.4 d^(-1/2)`` (d in mm).

A furnace-cooled anneal thus gives coarser ferrite and coarser pearlite, and lower
strength, than a normalize.  Nothing here warns; ranges are registered in
:mod:`selector.models.validity`.
"""
from __future__ import annotations

import numpy as np

from ..errors import check_array
from . import validity
from .composition import Composition, el
from .grain_size import austenite_grain_size_um

#: lever rule ends (Fe-Fe3C diagram; common practice): ferrite 0.02 % C, eutectoid 0.77 % C
FERRITE_C_PCT = 0.02
EUTECTOID_C_PCT = 0.77

#: still-air undercooling law  dT = A * rate^B  (fit to common practice, see module docstring)
UNDERCOOLING_A_K = 75.0
UNDERCOOLING_B = 0.24

#: pearlite spacing constant, S0 [um] = SPACING_UM_K / dT [K] (from memory)
SPACING_UM_K = 8.02

#: cooling rate of a furnace cool, K/s (about 35 °C/h; common practice 20-50 °C/h)
FURNACE_COOL_K_S = 0.01

#: heat loss coefficient of a hot bar in still air near 700 °C, W/(m² K) (radiation +
#: natural convection; common practice 60-100)
STILL_AIR_H_W_M2K = 80.0
#: volumetric heat capacity of steel near 700 °C, J/(m³ K) (7.85 g/cm³ x about 750 J/(kg K))
STEEL_RHO_C_J_M3K = 5.9e6

GMP_REF = ("T. Gladman, I.D. McIvor & F.B. Pickering, JISI 210 (1972) 916 (ferrite-pearlite yield and "
           "tensile strength; from memory)")

validity.register("gladman_mcivor_pickering", {"C": (0.0, 0.8, "wt%"), "Mn": (0.0, 1.6, "wt%"),
                                               "Si": (0.0, 0.6, "wt%"),
                                               "ferrite_grain_um": (3.0, 100.0, "µm"),
                                               "pearlite_spacing_um": (0.08, 0.6, "µm")},
                  "Gladman, McIvor & Pickering (1972): C-Mn ferrite-pearlite steels (ranges from memory)")
validity.register("hodgson_gibbs_ferrite_grain", {"ceq": (0.05, 0.6, "wt%"), "cooling_rate_k_s": (0.01, 20.0, "K/s"),
                                                  "austenite_grain_um": (10.0, 300.0, "µm")},
                  "Hodgson & Gibbs (1992), C-Mn steels, Ceq = C + Mn/6 (ranges from memory)")


_check = check_array  # shared helper in selector.errors

def pearlite_fraction(comp: Composition):
    """Pearlite volume fraction by the lever rule: ``(C - 0.02) / (0.77 - 0.02)``, in
    [0, 1].  Alloying shifts the eutectoid (Mn lowers its carbon); not modelled.

    References
    ----------
    Fe–Fe3C phase diagram (eutectoid 0.76–0.77 % C; W.D. Callister, *Materials Science
    and Engineering*, common practice).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(pearlite_fraction(s)), 3)
    0.573
    """
    c = el(comp, "C")
    return np.clip((c - FERRITE_C_PCT) / (EUTECTOID_C_PCT - FERRITE_C_PCT), 0.0, 1.0)


def still_air_cooling_rate_k_s(diameter_mm):
    """Cooling rate near 700 °C of a round bar in still air (lumped capacitance).

    ::

        rate = 4 h (T - T_air) / (rho c D),  T - T_air = 680 K

    h = 80 W/(m² K), rho c = 5.9 MJ/(m³ K): about 1.5 K/s at 25 mm, 0.37 K/s at 100 mm.
    Newton cooling (Biot number h D / 4k below 0.1 up to about 150 mm).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(still_air_cooling_rate_k_s(25.0)), 2)
    1.48
    """
    d = _check("diameter_mm", diameter_mm, 0.0, None, "still_air_cooling_rate_k_s", lo_open=True)
    return 4.0 * STILL_AIR_H_W_M2K * 680.0 / (STEEL_RHO_C_J_M3K * d * 1e-3)


def transformation_undercooling_k(cooling_rate_k_s):
    """Undercooling below the eutectoid at which ferrite–pearlite forms on continuous
    cooling: ``75 K · rate^0.24`` (rate in K/s), fitted to common practice: about 25 K
    (transformation near 700 °C) for a furnace cool at 0.01 K/s and about 75 K (near
    650 °C) for a still-air cool at 1 K/s.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(transformation_undercooling_k(1.0)), 1)
    75.0
    """
    r = _check("cooling_rate_k_s", cooling_rate_k_s, 0.0, None, "transformation_undercooling_k", lo_open=True)
    return UNDERCOOLING_A_K * r ** UNDERCOOLING_B


def pearlite_spacing_um(undercooling_k):
    """Pearlite interlamellar spacing ``S0 = 8.02 / ΔT`` µm (ΔT in K).

    The spacing is inversely proportional to the undercooling below the eutectoid
    (C. Zener, Trans. AIME 167 (1946) 550; M. Hillert, 1962); the constant 8.02 µm·K is
    the Fe–C eutectoid value (from memory): 0.32 µm at 25 K, 0.11 µm at 75 K.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(pearlite_spacing_um(25.0)), 4)
    0.3208
    """
    dt = _check("undercooling_k", undercooling_k, 0.0, None, "pearlite_spacing_um", lo_open=True)
    return SPACING_UM_K / dt


def ferrite_grain_size_um(comp: Composition, austenite_grain_um, cooling_rate_k_s):
    """Ferrite grain size after continuous cooling from austenite (Hodgson & Gibbs 1992).

    ::

        Ceq = C + Mn/6
        Ceq < 0.35:  d = (-0.4 + 6.37 Ceq) + (24.2 - 59 Ceq) r^-1/2 + 22 (1 - exp(-0.015 D))
        Ceq >= 0.35: d = (22.6 - 57 Ceq)   + 3 r^-1/2              + 22 (1 - exp(-0.015 D))

    d ferrite grain (µm), D austenite grain (µm), r cooling rate (K/s); floored at 2 µm.

    References
    ----------
    P.D. Hodgson & R.K. Gibbs, "A mathematical model to predict the mechanical
    properties of hot rolled C-Mn and microalloyed steels", ISIJ Int. 32 (1992) 1329
    (from memory).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(ferrite_grain_size_um(s, 60.0, 1.0)), 1)
    5.9
    """
    dg = _check("austenite_grain_um", austenite_grain_um, 0.0, None, "ferrite_grain_size_um", lo_open=True)
    r = _check("cooling_rate_k_s", cooling_rate_k_s, 0.0, None, "ferrite_grain_size_um", lo_open=True)
    ceq = el(comp, "C") + el(comp, "Mn") / 6.0
    grow = 22.0 * (1.0 - np.exp(-0.015 * dg))
    low = (-0.4 + 6.37 * ceq) + (24.2 - 59.0 * ceq) / np.sqrt(r) + grow
    high = (22.6 - 57.0 * ceq) + 3.0 / np.sqrt(r) + grow
    return np.maximum(np.where(ceq < 0.35, low, high), 2.0)


def ferrite_pearlite_strength(comp: Composition, ferrite_grain_um, pearlite_spacing_um, free_n_pct=None):
    """Yield and tensile strength of a ferrite–pearlite steel (Gladman, McIvor &
    Pickering 1972).

    ::

        f  = ferrite fraction (lever rule),  d ferrite grain (mm),  S0 spacing (mm)
        YS  = f^1/3 (35 + 58 Mn + 17.4 d^-1/2) + (1 - f^1/3)(178 + 3.8 S0^-1/2) + 63 Si + 425 N^1/2
        UTS = f^1/3 (246 + 1143 N^1/2 + 18.2 d^-1/2) + (1 - f^1/3)(719 + 3.5 S0^-1/2) + 97 Si

    MPa, wt %.  The ferrite terms carry the Hall–Petch contribution 17.4 d^-1/2
    (0.55 MPa·m^½, Pickering & Gladman 1963).

    Parameters
    ----------
    comp : mapping
        Composition, wt % (C, Mn, Si, N used).
    ferrite_grain_um : array_like
        Ferrite grain size (mean lineal intercept), µm.
    pearlite_spacing_um : array_like
        Pearlite interlamellar spacing, µm.
    free_n_pct : array_like, optional
        Free (uncombined) nitrogen, wt %; default the composition's N (none in an
        Al-killed steel, whose N is tied up as AlN: pass 0).

    Returns
    -------
    (yield_mpa, uts_mpa) : tuple of ndarrays.

    Validity
    --------
    ``gladman_mcivor_pickering`` (C up to 0.8, Mn up to 1.6, Si up to 0.6 wt %).

    References
    ----------
    T. Gladman, I.D. McIvor & F.B. Pickering, "Some aspects of the structure–property
    relationships in high-carbon ferrite–pearlite steels", JISI 210 (1972) 916–930;
    F.B. Pickering & T. Gladman, ISI Special Report 81 (1963) 10 (from memory).

    Example
    -------
    0.45 C, 0.75 Mn, 0.25 Si, 6 µm ferrite, 0.11 µm spacing (normalized 1045):
    about 380 / 690 MPa (handbook normalized 1045: 425 / 650-750 MPa).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> [round(float(x)) for x in ferrite_pearlite_strength(s, 6.0, 0.11, free_n_pct=0.0)]
    [378, 647]
    """
    d = _check("ferrite_grain_um", ferrite_grain_um, 0.0, None, "ferrite_pearlite_strength", lo_open=True) * 1e-3
    s = _check("pearlite_spacing_um", pearlite_spacing_um, 0.0, None, "ferrite_pearlite_strength",
               lo_open=True) * 1e-3
    n = el(comp, "N") if free_n_pct is None else np.asarray(free_n_pct, float)
    n = np.maximum(n, 0.0)
    f3 = (1.0 - pearlite_fraction(comp)) ** (1.0 / 3.0)
    mn, si = el(comp, "Mn"), el(comp, "Si")
    ys = f3 * (35.0 + 58.0 * mn + 17.4 / np.sqrt(d)) + (1.0 - f3) * (178.0 + 3.8 / np.sqrt(s)) \
        + 63.0 * si + 425.0 * np.sqrt(n)
    uts = f3 * (246.0 + 1143.0 * np.sqrt(n) + 18.2 / np.sqrt(d)) + (1.0 - f3) * (719.0 + 3.5 / np.sqrt(s)) \
        + 97.0 * si
    return ys, uts


def ferritic_strength_pickering_gladman(comp: Composition, ferrite_grain_um, pearlite_pct=None, free_n_pct=None):
    """Yield and tensile strength of a mainly ferritic steel (Pickering & Gladman 1963).

    ::

        YS  = 53.9 + 32.3 Mn + 83.2 Si + 354 N^1/2 + 17.4 d^-1/2
        UTS = 294 + 27.7 Mn + 83.2 Si + 3.85 P + 7.7 d^-1/2

    MPa, wt %, d in mm, P the pearlite percentage (default from the lever rule).

    Example (from the source: Pickering & Gladman (1963), 15.4 x [3.5 + 2.1 Mn + 5.4 Si + 1.13
    d^-1/2] for 1.0 Mn, 0.2 Si, d = 0.01 mm: 276.9 MPa (hand evaluation, from memory))

    >>> round(float(ferritic_strength_pickering_gladman({"C": 0.1, "Mn": 1.0, "Si": 0.2}, 10.0, free_n_pct=0.0)[0]), 1)
    276.8
    """
    d = _check("ferrite_grain_um", ferrite_grain_um, 0.0, None, "ferritic_strength_pickering_gladman",
               lo_open=True) * 1e-3
    n = el(comp, "N") if free_n_pct is None else np.asarray(free_n_pct, float)
    p = 100.0 * pearlite_fraction(comp) if pearlite_pct is None else np.asarray(pearlite_pct, float)
    mn, si = el(comp, "Mn"), el(comp, "Si")
    ys = 53.9 + 32.3 * mn + 83.2 * si + 354.0 * np.sqrt(np.maximum(n, 0.0)) + 17.4 / np.sqrt(d)
    uts = 294.0 + 27.7 * mn + 83.2 * si + 3.85 * p + 7.7 / np.sqrt(d)
    return ys, uts


COOLING = {"furnace": "furnace cool (full anneal)", "air": "still-air cool (normalize)"}


def anneal_microstructure(comp: Composition, temp_c, hours, cooling_rate_k_s, initial_um=20.0) -> dict:
    """Microstructure of an anneal / normalize: austenite grain (Sellars–Whiteman growth
    law), ferrite grain (Hodgson & Gibbs), undercooling and pearlite spacing, pearlite
    fraction.  Returns dict ``austenite_grain_um, ferrite_grain_um, undercooling_k,
    pearlite_spacing_um, pearlite_fraction``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(anneal_microstructure(s, 845.0, 1.0, 0.01)["ferrite_grain_um"]), 1)
    32.3
    """
    dg = austenite_grain_size_um(temp_c, hours, initial_um)
    dt = transformation_undercooling_k(cooling_rate_k_s)
    return {"austenite_grain_um": dg, "ferrite_grain_um": ferrite_grain_size_um(comp, dg, cooling_rate_k_s),
            "undercooling_k": dt, "pearlite_spacing_um": pearlite_spacing_um(dt),
            "pearlite_fraction": pearlite_fraction(comp)}


def anneal_properties(comp: Composition, temp_c, hours, cooling_rate_k_s, free_n_pct=0.0) -> dict:
    """Yield and tensile strength after austenitizing at ``temp_c`` for ``hours`` and
    cooling at ``cooling_rate_k_s`` (furnace: :data:`FURNACE_COOL_K_S`; still air:
    :func:`still_air_cooling_rate_k_s`), with the microstructure of
    :func:`anneal_microstructure`.  Free N defaults to 0 (Al-killed).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(anneal_properties(s, 845.0, 1.0, 0.01)["uts_mpa"]))
    512
    """
    m = anneal_microstructure(comp, temp_c, hours, cooling_rate_k_s)
    ys, uts = ferrite_pearlite_strength(comp, m["ferrite_grain_um"], m["pearlite_spacing_um"], free_n_pct)
    return {**m, "yield_mpa": ys, "uts_mpa": uts}
