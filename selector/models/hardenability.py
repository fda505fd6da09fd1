"""Hardenability from chemical composition: Grossmann ideal critical diameter and Jominy curve (ASTM A255).

Two steps, after the calculation method of ASTM A255 (based on Grossmann 1942):

1. **Ideal critical diameter** DI: the diameter of a round bar that is 50 %
   martensite at its centre after an ideal (H = ∞) quench,

       DI = DI_C(C, G) × f_Mn × f_Si × f_Ni × f_Cr × f_Mo × f_Cu × f_V × f_Zr × BF

   with the A255 multiplying factors in their fitted (piecewise polynomial) form,
   a grain-size correction of the carbon base and a boron factor BF for
   boron-treated steels (B ≥ 0.0005 %).

2. **Jominy curve**: the hardness at J1 is the initial hardness IH, a function of
   carbon only (:func:`selector.models.martensite.ih_hrc`, the A255 IH
   polynomial); farther along the bar

       HRC(d) = IH(C) / DF(DI, d)

   with the A255 distance-hardness dividing factors DF.

Sources and confidence (see ``docs/methods/hardenability.md``):

* composition limits (A255 §1.3): verified in two copies of the standard;
* carbon-base and alloy multiplying-factor fits: recalled (from memory) and confirmed by an independent secondary reproduction of the A255
  method that also reproduces A255's worked example (SAE 4118 modified, DI = 1.95 in):
  partial;
* grain-size correction DI_C(G) = DI_C(7)·1.08^(7−G): a fit of ratios read from the
  Grossmann chart in coursework (partial);
* boron factor: the A255 table (BF against carbon and alloy factor) was **not
  obtained**; fallback BF = 1 + 1.5 (0.9 − C) for fully protected boron after
  Kramer, Siegel & Brooks (1946), capped at ≥ 1 (from memory, low confidence);
* dividing factors: the A255 table was **not obtained**; the fallback is a published
  polynomial form of the A255 (metric) dividing factors in DI (mm) for d = 3–50 mm
  (secondary reproduction, ``data/hardenability_factors.csv``, confidence partial),
  made monotone and held within DI 10–160 mm where the polynomials are well behaved.
  Beyond 50 mm the 50 mm factor is held (an upper estimate of hardness).

References
----------
ASTM A255-10 (2014), *Standard Test Methods for Determining Hardenability of Steel*,
§1.3 and the calculation section (multiplying factors, IH, dividing factors).
M.A. Grossmann, "Hardenability calculated from chemical composition", Trans. AIME
150 (1942) 227–259.
I.R. Kramer, S. Siegel and J.G. Brooks, "Factors for the calculation of
hardenability", Trans. AIME 167 (1946) 670–697 (boron factor fallback).
mxteen, *Metallurgical engineer's handbook*, "Hardenability calculation" (GitHub,
2024): a reproduction of the A255 factors, worked example and dividing-factor
polynomials (secondary source).
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table
from ..errors import DataFileError, InputError
from . import cooling, validity
from .composition import el
from .conversions import MM_PER_IN
from .martensite import ih_hrc, martensite_hardness_hrc

A255 = "ASTM A255-10 §1.3 (calculation method composition limits)"

validity.register("astm_a255", {
    "C": (0.10, 0.70, "wt%"), "Mn": (0.50, 1.65, "wt%"), "Si": (0.15, 0.60, "wt%"),
    "Ni": (0.0, 1.50, "wt%"), "Cr": (0.0, 1.35, "wt%"), "Mo": (0.0, 0.55, "wt%"),
    "Cu": (0.0, 0.35, "wt%"), "V": (0.0, 0.20, "wt%"),
}, A255)
validity.register("a255_dividing_factors", {"di_mm": (10.0, 160.0, "mm"), "distance_mm": (1.5, 50.0, "mm")},
                  "ASTM A255 dividing factors, polynomial form (secondary reproduction), data/hardenability_factors.csv")
validity.register("a255_grain_size", {"grain_size_astm": (5.0, 9.0, "")},
                  "Grossmann chart ratios (grain size 4-8), fit 1.08^(7-G)")

validity.register("high_carbon_fallback", {"C": (0.70, 1.10, "wt%")},
                  "fallback above the A255 range: carbon in austenite from the Fe-Fe3C Acm line, "
                  "A255 carbon-factor fit to 0.90 % C, IH held at its 0.70 % C value (docs/methods/hardenability.md)")

#: Fe–Fe3C diagram: eutectoid (0.77 % C, 727 °C) and austenite at the eutectic (2.11 % C, 1148 °C)
EUTECTOID_PCT, EUTECTOID_C = 0.77, 727.0
AUSTENITE_MAX_PCT, EUTECTIC_C = 2.11, 1148.0
#: carbon in solution of the 1 % C – 1.5 % Cr bearing steel (52100 / 100Cr6) hardened from 845 °C:
#: about 0.60 %, the rest held in undissolved Cr-enriched cementite (from memory: R.A. Stickels,
#: Metall. Trans. 5 (1974) 865; H.K.D.H. Bhadeshia, Prog. Mater. Sci. 57 (2012) 268)
CR_ANCHOR_C, CR_ANCHOR_PCT, CR_ANCHOR_CR = 845.0, 0.60, 1.45
#: chromium above which the low-alloy carbide correction is not applied (tool and stainless steels keep the
#: binary line: their carbides are not the bearing steel's)
CR_CARBIDE_MAX = 2.0


def _acm_binary_pct(t):
    return EUTECTOID_PCT + (np.maximum(t, EUTECTOID_C) - EUTECTOID_C) * (
        (AUSTENITE_MAX_PCT - EUTECTOID_PCT) / (EUTECTIC_C - EUTECTOID_C))


#: lowering of the carbon the austenite holds, wt % C per wt % Cr, so that the anchor above holds
CR_CARBIDE_SHIFT = (float(_acm_binary_pct(np.asarray(CR_ANCHOR_C))) - CR_ANCHOR_PCT) / CR_ANCHOR_CR
#: upper end of the A255 composition range for carbon, wt %
A255_C_MAX = 0.70

#: Jominy distance of the first reading (J1 = 1/16 in), mm
J1_MM = 1.5875
#: boron content above which a steel counts as boron-treated, wt % (A255)
BORON_MIN_PCT = 0.0005

#: DI range over which the dividing-factor polynomials are used, mm
_DI_LO_MM, _DI_HI_MM = 10.0, 160.0
_DI_GRID = np.arange(_DI_LO_MM, _DI_HI_MM + 0.5, 1.0)


# ----------------------------------------------------------------------------- DI
def austenite_carbon_pct(c_pct, austenitize_c, cr_pct=0.0):
    """Carbon dissolved in austenite at the austenitizing temperature (fallback for C > 0.70 %).

    A hypereutectoid steel hardened from between Ac1 and Acm keeps proeutectoid carbide; only
    the carbon the austenite can hold hardens and sets the hardenability.  Straight-line Acm of
    the Fe–Fe3C diagram between (0.77 %, 727 °C) and (2.11 %, 1148 °C):

        C_γ = min(C, 0.77 + (T − 727)·(2.11 − 0.77)/(1148 − 727))   (T ≥ 727 °C)

    Hypoeutectoid steels are returned unchanged.  Chromium-enriched cementite (52100 class)
    dissolves less than the binary line says: for low-alloy steels (Cr ≤ 2 %) the line is lowered
    in proportion to the chromium,

        C_γ = min(C, Acm(T) − k_Cr·Cr),   k_Cr = (Acm(845 °C) − 0.60) / 1.45 = 0.376 %C per %Cr

    anchored on the about 0.60 % C in solution of 1 % C – 1.45 % Cr bearing steel hardened from
    845 °C (from memory: Stickels 1974; Bhadeshia 2012).  A steel whose carbon lies below the
    lowered line is unchanged (4140, 5160 at their hardening temperatures); above 2 % Cr the
    binary line is kept (outside: tool and stainless steels).

    Parameters
    ----------
    c_pct : array_like
        Carbon of the steel, wt %.
    austenitize_c : array_like
        Austenitizing temperature, °C.
    cr_pct : array_like, optional
        Chromium, wt % (0: the binary line).

    Returns
    -------
    ndarray, wt %.

    Validity
    --------
    ``high_carbon_fallback``: C 0.70–1.10 % (plain carbon and low-alloy bearing steels).

    References
    ----------
    Fe–Fe3C phase diagram, eutectoid 0.77 % C / 727 °C and 2.11 % C / 1148 °C (e.g. Callister,
    Materials Science and Engineering, Fig. 9.24; common practice).  Carbon in solution of
    52100: R.A. Stickels, "Carbide refining heat treatments for 52100 bearing steel",
    Metall. Trans. 5 (1974) 865; H.K.D.H. Bhadeshia, "Steels for bearings", Prog. Mater. Sci. 57
    (2012) 268 (both from memory).

    Examples
    --------
    1095 (0.95 % C) at 780 °C: C_γ = 0.77 + 53 × 0.00318 = 0.94 %.

    Example (from the source: the Fe-Fe3C Acm line through 0.77 % at 727 °C and 2.11 % at 1148
    °C: 0.939 % at 780 °C (hand evaluation))

    >>> round(float(austenite_carbon_pct(0.965, 780.0)), 3)
    0.939

    Example (from the source: the 52100 anchor, 1.04 % C and 1.45 % Cr hardened from 845 °C hold
    about 0.60 % C in solution (from memory; the anchor itself, hand evaluation))

    >>> round(float(austenite_carbon_pct(1.04, 845.0, 1.45)), 2)
    0.6
    """
    c = np.asarray(c_pct, float)
    t = np.asarray(austenitize_c, float)
    cr = np.asarray(cr_pct, float)
    acm = _acm_binary_pct(t)
    acm_cr = acm - CR_CARBIDE_SHIFT * np.where(cr <= CR_CARBIDE_MAX, np.maximum(cr, 0.0), 0.0)
    out = np.where(c > EUTECTOID_PCT, np.minimum(c, acm), c)
    return np.where(c > acm_cr, np.minimum(out, acm_cr), out)


def carbon_factor_in(c_pct, grain_size_astm=7.0):
    """Carbon base DI (inches) for ASTM grain size G (A255 carbon factor, fitted form).

    DI_C(7) = 0.54 C (C ≤ 0.39); 0.171 + 0.001 C + 0.265 C² (≤ 0.55);
    0.115 + 0.268 C − 0.038 C² (≤ 0.65); 0.143 + 0.200 C (≤ 0.75);
    0.062 + 0.409 C − 0.135 C² (≤ 0.90); DI_C(G) = DI_C(7) · 1.08^(7 − G).

    Example (from the source: ASTM A255 carbon multiplying factor at 0.45 % C, grain size 7:
    0.225 in (from memory))

    >>> round(float(carbon_factor_in(0.45)), 3)
    0.225
    """
    c = np.clip(np.asarray(c_pct, float), 0.0, 0.90)
    base = np.select(
        [c <= 0.39, c <= 0.55, c <= 0.65, c <= 0.75],
        [0.54 * c, 0.171 + 0.001 * c + 0.265 * c ** 2, 0.115 + 0.268 * c - 0.038 * c ** 2, 0.143 + 0.200 * c],
        0.062 + 0.409 * c - 0.135 * c ** 2)
    g = np.asarray(grain_size_astm, float)
    return base * 1.08 ** (7.0 - g)


def alloy_factors(comp) -> dict:
    """A255 multiplying factors of the non-carbon elements (fitted forms), as a dict of arrays.

    Mn: 1 + 3.3333 Mn (≤ 1.20), 5.10 Mn − 1.12 (above); Si: 1 + 0.70 Si;
    Ni: 1 + 0.363 Ni (≤ 1.50), 0.3211 + 1.4501 Ni − 0.6119 Ni² + 0.1253 Ni³ (above);
    Cr: 1 + 2.16 Cr; Mo: 1 + 3.00 Mo; Cu: 1 + 0.365 Cu; V: 1 + 1.73 V; Zr: 1 + 2.5 Zr.

    Example (from the source: ASTM A255 worked example (SAE 4118 modified, as reproduced in a
    secondary source): Mn factor 3.667, Cr 1.929)

    >>> s = {"C": 0.22, "Mn": 0.80, "Si": 0.18, "Ni": 0.10, "Cr": 0.43, "Mo": 0.25, "Cu": 0.10, "V": 0.05}
    >>> [round(float(alloy_factors(s)[e]), 3) for e in ("Mn", "Cr")]
    [3.667, 1.929]
    """
    mn, ni = el(comp, "Mn"), el(comp, "Ni")
    return {
        "Mn": np.where(mn <= 1.20, 1.0 + 3.3333 * mn, 5.10 * mn - 1.12),
        "Si": 1.0 + 0.70 * el(comp, "Si"),
        "Ni": np.where(ni <= 1.50, 1.0 + 0.363 * ni, 0.3211 + 1.4501 * ni - 0.6119 * ni ** 2 + 0.1253 * ni ** 3),
        "Cr": 1.0 + 2.16 * el(comp, "Cr"),
        "Mo": 1.0 + 3.00 * el(comp, "Mo"),
        "Cu": 1.0 + 0.365 * el(comp, "Cu"),
        "V": 1.0 + 1.73 * el(comp, "V"),
        "Zr": 1.0 + 2.5 * el(comp, "Zr"),
    }


def boron_factor(comp):
    """Boron multiplying factor (fallback: Kramer, Siegel & Brooks 1946; from memory, low confidence).

    BF = max(1, 1 + 1.5 (0.9 − C)) where B ≥ 0.0005 %, else 1.  The A255 table
    (BF against carbon and alloy factor) was not obtained; the real effect also
    falls as the alloy factor rises and needs protected (Ti/Al-bound N) boron.

    Example (illustrative: a value of this implementation, not a published one)

    >>> float(boron_factor({"C": 0.4}))
    1.0
    """
    c = el(comp, "C")
    b = el(comp, "B")
    return np.where(b >= BORON_MIN_PCT, np.maximum(1.0, 1.0 + 1.5 * (0.9 - c)), 1.0)


def ideal_critical_diameter_in(comp, grain_size_astm=7):
    """Grossmann ideal critical diameter DI (inches) from composition (ASTM A255).

    DI = DI_C(C, G) · f_Mn · f_Si · f_Ni · f_Cr · f_Mo · f_Cu · f_V · f_Zr · BF

    Parameters
    ----------
    comp : mapping
        Element → wt % (arrays broadcast; absent elements count as 0).
    grain_size_astm : array_like
        ASTM E112 austenite grain size number (default 7, the A255 basis).

    Returns
    -------
    ndarray
        DI in inches.

    Raises
    ------
    InputError
        Negative contents or a grain size outside 1–12.

    Validity
    --------
    ``astm_a255`` composition limits (A255 §1.3); ``a255_grain_size`` 5–9.

    References
    ----------
    ASTM A255-10 calculation method; Grossmann, Trans. AIME 150 (1942) 227.

    Examples
    --------
    A255's worked example (SAE 4118 modified: 0.22 C, 0.80 Mn, 0.18 Si, 0.10 Ni,
    0.43 Cr, 0.25 Mo, 0.10 Cu, 0.05 V) gives DI = 1.95 in.

    Example (from the source: ASTM A255 worked example (SAE 4118 modified): DI = 1.95 in with
    rounded factors, 1.93 in unrounded)

    >>> s = {"C": 0.22, "Mn": 0.80, "Si": 0.18, "Ni": 0.10, "Cr": 0.43, "Mo": 0.25, "Cu": 0.10, "V": 0.05}
    >>> round(float(ideal_critical_diameter_in(s)), 2)
    1.93
    """
    for e in ("C", "Mn", "Si", "Ni", "Cr", "Mo", "Cu", "V", "B", "Zr"):
        v = el(comp, e)
        if np.any(np.isnan(v)) or np.any(v < 0):
            raise InputError(e, comp.get(e), "wt % >= 0")
    g = np.asarray(grain_size_astm, float)
    if np.any(~np.isfinite(g)) or np.any(g < 1) or np.any(g > 12):
        raise InputError("grain_size_astm", grain_size_astm, "ASTM grain size numbers 1-12")
    di = carbon_factor_in(el(comp, "C"), g)
    for f in alloy_factors(comp).values():
        di = di * f
    return di * boron_factor(comp)


def di_mm(comp, grain_size_astm=7):
    """Ideal critical diameter in mm (25.4 × :func:`ideal_critical_diameter_in`).

    Example (from the source: ASTM A255 worked example (SAE 4118 modified): DI = 1.95 in; the
    example rounds each factor, unrounded 1.93 in (49.1 mm))

    >>> s = {"C": 0.22, "Mn": 0.80, "Si": 0.18, "Ni": 0.10, "Cr": 0.43, "Mo": 0.25, "Cu": 0.10, "V": 0.05}
    >>> round(float(di_mm(s)), 1)
    49.1
    """
    return MM_PER_IN * ideal_critical_diameter_in(comp, grain_size_astm)


# ----------------------------------------------------------------------------- Jominy
_DF_SCHEMA = Schema(tuple([Column("distance_mm", "float", lo=1.5, hi=100.0)]
                          + [Column(f"c{i}", "float") for i in range(6)]
                          + [Column("source"), Column("confidence", "choice",
                                                      choices=("verified", "partial", "from memory"))]))


@functools.cache
def _df_grid():
    """Dividing factors on (DI grid, distance nodes), made monotone; distances include J1 (DF = 1)."""
    t = read_table("hardenability_factors.csv", schema=_DF_SCHEMA)
    d = t["distance_mm"].to_numpy(float)
    if np.any(np.diff(d) <= 0):
        raise DataFileError("hardenability_factors.csv", None, "distance_mm", "distances must increase down the file")
    coef = t[[f"c{i}" for i in range(6)]].to_numpy(float)            # (nd, 6)
    powers = _DI_GRID[:, None] ** np.arange(6)[None, :]               # (ng, 6)
    df = powers @ coef.T                                              # (ng, nd)
    df = np.maximum(df, 1.0)
    df = np.minimum.accumulate(df, axis=0)        # non-increasing as DI grows
    df = np.hstack([np.ones((len(_DI_GRID), 1)), df])
    df = np.maximum.accumulate(df, axis=1)        # non-decreasing along the bar
    return np.concatenate([[J1_MM], d]), df


def dividing_factor(di_mm_value, distance_mm):
    """A255 distance-hardness dividing factor DF(DI, d) (≥ 1), broadcast over both inputs.

    Bilinear interpolation of the monotone grid; DI held within 10–160 mm, d within
    J1 (1.59 mm, DF = 1) to 50 mm.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(dividing_factor(100.0, 10.0)), 3)
    1.118
    """
    dn, df = _df_grid()
    di = np.clip(np.asarray(di_mm_value, float), _DI_LO_MM, _DI_HI_MM)
    d = np.clip(np.asarray(distance_mm, float), dn[0], dn[-1])
    di, d = np.broadcast_arrays(di, d)
    fi = di - _DI_LO_MM
    i = np.clip(np.floor(fi).astype(int), 0, len(_DI_GRID) - 2)
    wi = fi - i
    j = np.clip(np.searchsorted(dn, d, side="right") - 1, 0, len(dn) - 2)
    wj = (d - dn[j]) / (dn[j + 1] - dn[j])
    return ((1 - wi) * (1 - wj) * df[i, j] + wi * (1 - wj) * df[i + 1, j]
            + (1 - wi) * wj * df[i, j + 1] + wi * wj * df[i + 1, j + 1])


#: limits of the DI-consistency distance scale
DI_SCALE_LIMITS = (0.5, 1.5)


#: grid of the ratio IH / H50 of the J50 table (IH(C)/H50(C) lies 1.25-1.45 over C 0.1-0.7 %)
_R_GRID = np.linspace(1.0, 3.0, 201)
_J_FINE_MM = np.geomspace(J1_MM, 50.0, 400)


def j50_table():
    """J50 (mm) on the (DI grid, R grid): the distance at which DF(DI, d) first reaches R.

    The raw fallback curve IH(C)/DF(DI, d) falls to the 50 %-martensite hardness H50(C) where
    DF = R = IH(C)/H50(C), so J50 depends on (DI, R) only.  A pure function of the data file
    (a disk cache may wrap it); NaN where DF stays below R out to 50 mm.

    Returns
    -------
    (di_grid_mm, r_grid, j50_mm) with shapes (151,), (201,), (151, 201).

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(j50_table()) > 0
    True
    """
    df = dividing_factor(_DI_GRID[:, None], _J_FINE_MM[None, :])            # (nDI, nd), non-decreasing in d
    out = np.full((len(_DI_GRID), len(_R_GRID)), np.nan)
    ramp = np.arange(len(_J_FINE_MM)) * 1e-12                                 # strictly increasing for interp
    for i in range(len(_DI_GRID)):                                            # 151 rows, once per process
        row = df[i] + ramp
        j = np.interp(_R_GRID, row, _J_FINE_MM)
        out[i] = np.where(_R_GRID <= row[-1], j, np.nan)
    return _DI_GRID, _R_GRID, out


@functools.cache
def _j50_cached():
    return j50_table()


def j50_mm(c_pct, di_mm_value):
    """Distance (mm) at which the raw fallback curve IH(C)/DF(DI, d) falls to the 50 %-martensite
    hardness of the carbon (Hodge & Orehoski); NaN where it stays above it out to 50 mm.

    Bilinear interpolation of :func:`j50_table` in (DI, R = IH/H50); DI held within 10–160 mm.

    Parameters
    ----------
    c_pct, di_mm_value : array_like (broadcast together)
        Carbon (wt %) and ideal critical diameter (mm).

    Returns
    -------
    ndarray, mm, the broadcast shape.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(j50_mm(0.40, 100.0)), 1)
    17.0
    """
    gd, gr, tab = _j50_cached()
    c, di = np.broadcast_arrays(np.asarray(c_pct, float), np.asarray(di_mm_value, float))
    r = np.clip(ih_hrc(c) / martensite_hardness_hrc(c, 50.0), gr[0], gr[-1])
    fd = (np.clip(di, gd[0], gd[-1]) - gd[0]) / (gd[1] - gd[0])
    i = np.clip(np.floor(fd).astype(int), 0, len(gd) - 2)
    wi = fd - i
    fr = (r - gr[0]) / (gr[1] - gr[0])
    k = np.clip(np.floor(fr).astype(int), 0, len(gr) - 2)
    wk = fr - k
    return ((1 - wi) * (1 - wk) * tab[i, k] + wi * (1 - wk) * tab[i + 1, k]
            + (1 - wi) * wk * tab[i, k + 1] + wi * wk * tab[i + 1, k + 1])


def di_distance_scale(c_pct, di_mm_value):
    """Distance scale s that makes the fallback Jominy curve honour the definition of DI.

    Definition (Grossmann 1952; ASTM A255): the centre of a round of diameter DI quenched
    ideally (H → ∞) is 50 % martensite.  That centre cools like the Jominy distance
    J_ideal(DI) (:func:`selector.models.cooling.ideal_centre_jominy_mm`, the chart-anchored
    cooling), so the steel's Jominy curve must reach the 50 %-martensite hardness of its carbon
    there.  The polynomial dividing-factor fallback does not (its 50 % point J50 lies 0.8–1.3 ×
    J_ideal(DI) for catalogue steels), so the curve is read at a scaled distance:

        HRC(d) = IH(C) / DF(DI, s·d),   s = J50 / J_ideal(DI)

    which puts its 50 % point at J_ideal(DI) and leaves J1 (DF = 1) unchanged.  s is clipped to
    :data:`DI_SCALE_LIMITS` and is 1 where the raw curve never falls to the 50 % hardness by 50 mm.
    Vectorised: table look-ups only (:func:`j50_table`, :func:`cooling.ideal_centre_rate_table`).

    Parameters
    ----------
    c_pct, di_mm_value : array_like (broadcast together)
        Carbon (wt %) and ideal critical diameter (mm).

    Returns
    -------
    ndarray, dimensionless, the broadcast shape.

    References
    ----------
    Grossmann, Elements of Hardenability (ASM 1952); ASTM A255-10 (definition of DI);
    Hodge & Orehoski, Trans. AIME 167 (1946) 627 (50 % martensite hardness).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(di_distance_scale(0.40, 100.0)), 3)
    0.975
    """
    c, di = np.broadcast_arrays(np.asarray(c_pct, float), np.asarray(di_mm_value, float))
    j50 = j50_mm(c, di)
    ji = cooling.ideal_centre_jominy_mm(di)
    with np.errstate(divide="ignore", invalid="ignore"):
        s = (j50 - J1_MM) / (ji - J1_MM)
    return np.clip(np.where(np.isfinite(s) & (ji > J1_MM + 1e-6), s, 1.0), *DI_SCALE_LIMITS)


def jominy_hardness_hrc(comp, distance_mm, grain_size_astm=7):
    """Jominy hardness (HRC) at ``distance_mm``, broadcast elementwise with ``comp`` (ASTM A255).

    HRC = IH(C) / DF(DI, J1 + s·(d − J1)), s = :func:`di_distance_scale` (the DI definition).  See
    :func:`jominy_curve_hrc` for the curve form.

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.40, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
    >>> round(float(jominy_hardness_hrc(s, 1.5)), 1)
    56.1
    """
    d = np.asarray(distance_mm, float)
    if np.any(np.isnan(d)) or np.any(d < 0):
        raise InputError("distances_mm", distance_mm, "distances >= 0 mm from the quenched end")
    di = np.asarray(di_mm(comp, grain_size_astm), float)
    c = el(comp, "C") * np.ones(di.shape)
    return ih_hrc(c) / dividing_factor(di, scaled_distance_mm(d, di_distance_scale(c, di)))


def scaled_distance_mm(distance_mm, scale):
    """J1 + s·(d − J1), never below 0: the distance at which the fallback dividing factors are read.

    Example (illustrative: a value of this implementation, not a published one)

    >>> float(scaled_distance_mm(10.0, 1.2))
    11.6825
    """
    d = np.asarray(distance_mm, float)
    return np.maximum(J1_MM + np.asarray(scale, float) * (d - J1_MM), 0.0)


def jominy_curve_hrc(comp, distances_mm, grain_size_astm=7):
    """Jominy end-quench curve (HRC) calculated from composition (ASTM A255 procedure).

    HRC(d) = IH(C) / DF(DI, d),   IH = A255 initial-hardness polynomial in C,
    DF = A255 distance-hardness dividing factor (polynomial fallback, see module notes).

    Parameters
    ----------
    comp : mapping
        Element → wt %, values of shape S (scalars or arrays).
    distances_mm : array_like, shape (n_distances,)
        Distances from the quenched end, mm (J1 = 1.5875 mm).
    grain_size_astm : array_like
        ASTM austenite grain size (default 7), broadcast with S.

    Returns
    -------
    ndarray, shape S + (n_distances,), HRC.

    Validity
    --------
    ``astm_a255`` composition limits; ``a255_dividing_factors`` DI 10–160 mm and d ≤ 50 mm
    (held constant outside).  Confidence of the dividing factors: partial (secondary
    reproduction); the A255 table itself was not obtained.

    References
    ----------
    ASTM A255-10, calculation of the end-quench curve from DI (IH and dividing factors).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.40, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
    >>> [round(float(x), 1) for x in jominy_curve_hrc(s, [1.5, 25.0])]
    [56.1, 41.1]
    """
    dist = np.atleast_1d(np.asarray(distances_mm, float))
    if dist.ndim != 1:
        raise InputError("distances_mm", distances_mm, "a 1-D sequence of distances (mm)")
    c2 = {k: np.asarray(v, float)[..., None] for k, v in comp.items()}
    g = np.asarray(grain_size_astm, float)[..., None]
    return jominy_hardness_hrc(c2, dist, g)
