"""Induction hardening: electromagnetic reference depth, frequency choice, surface hardness.

The hardened depth of an induction-hardened part depends on frequency, power
density and heating time together, so no fixed ratio of hardened depth to
reference depth exists (Rudnev et al., ASM Handbook Vol. 4C, 2014).  The model
therefore takes the hardened depth from the user, and offers:

* the reference (skin) depth delta = 503 sqrt(rho / (mu_r f)) m, hot (above the
  Curie point, mu_r = 1) or cold;
* the frequency range usually chosen for a hardened depth (practice table,
  ``data/induction_frequency.csv``, from memory);
* the surface hardness from carbon: as-quenched martensite, then a low temper.

The core keeps the condition it had before induction hardening.
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import read_table
from ..errors import InputError
from . import validity
from .carburizing import low_temper_hrc
from .martensite import martensite_hardness_hrc

#: resistivity of a 0.4 %C steel at 900 °C, µΩ·cm, with mu_r = 1 (holooly.com worked example, V)
HOT_RESISTIVITY_UOHM_CM = 114.6
#: resistivity of a 0.4 %C steel at 30 °C, µΩ·cm (same source, V); cold mu_r about 40
COLD_RESISTIVITY_UOHM_CM = 16.0
COLD_RELATIVE_PERMEABILITY = 40.0

REF_DELTA = ("delta = 503 sqrt(rho/(mu_r f)) m, rho in ohm m (standard electromagnetic skin depth; "
             "holooly.com worked example, verified)")
REF_PRACTICE = ("ASM Handbook Vol. 4 and S.L. Semiatin & D.E. Stutz, Induction Heat Treatment of Steel, "
                "ASM (1986): frequency for hardened depth (from memory)")

validity.register("induction_frequency_table", {"hardened_depth_mm": (0.4, 10.0, "mm")}, REF_PRACTICE)
# medium-carbon steels are the usual induction-hardening grades (common practice)
validity.register("induction_surface_hardness", {"c_pct": (0.30, 0.60, "wt%"),
                                                 "temper_temp_c": (120.0, 230.0, "°C")},
                  "as-quenched martensite (ASTM A255 IH) and low temper; 0.30–0.60 %C (common practice)")


def _positive(field, x, context):
    a = np.asarray(x, float)
    bad = ~np.isfinite(a) | (a <= 0)
    if np.any(bad):
        raise InputError(field, float(np.atleast_1d(np.broadcast_to(a, bad.shape))[np.atleast_1d(bad)][0]),
                         "a finite number > 0", context)
    return a


def reference_depth_mm(frequency_hz, resistivity_uohm_cm=HOT_RESISTIVITY_UOHM_CM,
                       relative_permeability=1.0):
    """Electromagnetic reference (skin) depth of induction heating.

    ::

        delta [m] = 503 sqrt(rho / (mu_r f)),   rho in ohm m, f in Hz

    The current density falls to 1/e of its surface value at delta; about 86 % of
    the power is generated within it.

    Parameters
    ----------
    frequency_hz : array_like
        Generator frequency, Hz (> 0).
    resistivity_uohm_cm : array_like
        Electrical resistivity, µΩ·cm (default 114.6, a 0.4 %C steel at 900 °C).
    relative_permeability : array_like
        mu_r (1 above the Curie point; tens below it).

    Returns
    -------
    ndarray, mm.  Hot steel: 5.4 mm at 10 kHz, 17 mm at 1 kHz.

    Validity
    --------
    Any frequency (an exact electromagnetic result for a flat or large-radius
    surface).

    References
    ----------
    Standard electromagnetic skin depth; worked example and resistivities at
    holooly.com (verified); V. Rudnev et al., ASM Handbook Vol. 4C
    (2014), "Principles of induction hardening and inspection".

    Example (from the source: reference depth 503 sqrt(rho/(mu_r f)); worked example data
    (holooly.com): hot steel, 114.6 uOhm cm, mu_r 1, 10 kHz: 5.4 mm)

    >>> round(float(reference_depth_mm(10e3)), 1)
    5.4
    """
    ctx = "reference_depth_mm"
    f = _positive("frequency_hz", frequency_hz, ctx)
    rho = _positive("resistivity_uohm_cm", resistivity_uohm_cm, ctx) * 1e-8  # ohm m
    mu = _positive("relative_permeability", relative_permeability, ctx)
    return 503.0 * np.sqrt(rho / (mu * f)) * 1e3


@functools.cache
def _practice():
    t = read_table("induction_frequency.csv",
                   numeric=["depth_min_mm", "depth_max_mm", "freq_min_hz", "freq_max_hz", "min_diameter_mm"])
    alt = [float(v) if str(v).strip() else np.nan for v in t["alt_freq_min_hz"]]
    return (t["depth_min_mm"].to_numpy(float), t["depth_max_mm"].to_numpy(float),
            t["freq_min_hz"].to_numpy(float), t["freq_max_hz"].to_numpy(float),
            t["min_diameter_mm"].to_numpy(float), np.asarray(alt, float))


def suggested_frequency_range_hz(hardened_depth_mm, diameter_mm=np.inf):
    """Frequency range usually chosen for a hardened depth (practice table).

    ==================  ===========================================
    hardened depth, mm  frequency
    ==================  ===========================================
    0.4–1.3             100–500 kHz
    1.3–2.5             10–500 kHz (10 kHz only for diameters > 25 mm)
    2.5–5               3–10 kHz
    5–10                1–3 kHz
    ==================  ===========================================

    Parameters
    ----------
    hardened_depth_mm : array_like
        Required hardened depth, mm.
    diameter_mm : array_like
        Part diameter, mm (default: large).

    Returns
    -------
    (lo_hz, hi_hz) : tuple of ndarray
        NaN where the depth is outside 0.4–10 mm (``induction_frequency_table``).

    References
    ----------
    ASM Handbook Vol. 4, induction hardening; Semiatin & Stutz, Induction Heat
    Treatment of Steel, ASM (1986).  Values from memory (M-low).

    Example (from the source: ASM Handbook Vol. 4 / Semiatin & Stutz (1986) practice table,
    2.5-5 mm hardened depth: 3-10 kHz (from memory))

    >>> [float(x) for x in suggested_frequency_range_hz(3.0, 50.0)]
    [3000.0, 10000.0]
    """
    d = _positive("hardened_depth_mm", hardened_depth_mm, "suggested_frequency_range_hz")
    dia = np.asarray(diameter_mm, float)
    if np.any(np.isnan(dia) | (dia <= 0)):
        raise InputError("diameter_mm", float(np.atleast_1d(dia)[0]), "a diameter > 0 mm",
                         "suggested_frequency_range_hz")
    d, dia = np.broadcast_arrays(d, dia)
    dmin, dmax, fmin, fmax, mind, alt = _practice()
    lo = np.full(d.shape, np.nan)
    hi = np.full(d.shape, np.nan)
    for i in range(len(dmin)):
        last = i == len(dmin) - 1
        sel = np.isnan(lo) & (d >= dmin[i] - 1e-12) & ((d <= dmax[i] + 1e-12) if last else (d < dmax[i]))
        f_lo = np.where((dia < mind[i]) & np.isfinite(alt[i]), alt[i], fmin[i])
        lo = np.where(sel, f_lo, lo)
        hi = np.where(sel, fmax[i], hi)
    return lo, hi


def surface_hardness_hrc(c_pct, temper_temp_c=None, temper_hours=1.0, comp=None):
    """Surface hardness of an induction-hardened steel, HRC.

    As-quenched hardness of 99.9 % martensite at the steel's carbon
    (:func:`selector.models.martensite.martensite_hardness_hrc`, ASTM A255 initial
    hardness), then, if ``temper_temp_c`` is given, the tempered hardness at the
    same carbon (:func:`selector.models.carburizing.low_temper_hrc`).

    Parameters
    ----------
    c_pct : array_like
        Carbon, wt %.
    temper_temp_c : array_like or None
        Tempering temperature, °C (None: as quenched).
    temper_hours : array_like
        Tempering time, h.
    comp : mapping or None
        Composition (wt %) for the tempering model; carbon taken from ``c_pct``.

    Returns
    -------
    ndarray, HRC.  The case depth is the user's; rapid heating can give 1–3 HRC
    more than a furnace hardening (common practice), not modelled.

    Validity
    --------
    0.30–0.60 %C, temper 120–230 °C (``induction_surface_hardness``).

    References
    ----------
    ASTM A255 (initial hardness); J.M. Hodge & M.A. Orehoski, Trans. AIME 167
    (1946) 627; tempering per :func:`selector.models.carburizing.low_temper_hrc`.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(surface_hardness_hrc(0.45)), 1)
    58.6
    """
    c = np.asarray(c_pct, float)
    if np.any(~np.isfinite(c) | (c < 0)):
        raise InputError("c_pct", float(np.atleast_1d(c)[0]), "a carbon content >= 0 wt%", "surface_hardness_hrc")
    hrc = martensite_hardness_hrc(c, 99.9)
    if temper_temp_c is None:
        return hrc

    local = dict(comp or {})
    local["C"] = c
    return low_temper_hrc(hrc, local, temper_temp_c, temper_hours)
