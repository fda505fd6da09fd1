"""Gas nitriding: case depth (parabolic growth), surface hardness and hardness profile.

* Case depth grows as x = K(T) sqrt(t) (diffusion-controlled growth of the
  diffusion zone), with an Arrhenius K(T) whose activation energy is that of
  nitrogen diffusion in ferrite.  The depth is the nitriding hardness depth of
  DIN 50190-3: where the hardness falls to core + 50 HV.
* Surface hardness rises with the nitride formers (Al, Cr, Mo, V, Ti) and
  saturates: a relation fitted here to handbook-typical values.
* The hardness profile is an erfc shape through the surface hardness and through
  core + 50 HV at the case depth.

Constants live in ``data/nitriding_constants.csv`` with source and confidence;
most are ``from memory`` or ``fitted``: check before release.  Nothing here warns:
ranges are registered with :mod:`selector.models.validity`, cautions are returned
by :func:`nitriding_cautions`.
"""
from __future__ import annotations

import functools

import numpy as np
from scipy.special import erfc, erfcinv

from ..catalogue.loader import read_table
from ..errors import InputError
from . import validity
from .composition import Composition, el

R_J = 8.314  # J mol^-1 K^-1

#: nitride-forming elements whose weights enter the surface-hardness sum
NITRIDE_FORMERS = ("Al", "Cr", "Mo", "V", "Ti")

#: DIN 50190-3: nitriding hardness depth at core + 50 HV (HV0.5)
DIN_50190_DELTA_HV = 50.0

#: common practice: temper at least this much above the nitriding temperature so the
#: core does not soften during the long nitriding cycle
TEMPER_MARGIN_C = 30.0

REF_DEPTH = ("x = K sqrt(t), parabolic diffusion-zone growth (case-hardening introduction, vdocuments.mx; "
             "K from memory); depth to core + 50 HV per DIN 50190-3")
REF_HV = "fitted to ASM Handbook Vol. 4 'Gas nitriding' typical surface hardness (from memory)"
GAS_NITRIDING_RANGE_C = (495.0, 565.0)

validity.register("nitrided_case_depth", {"temp_c": (*GAS_NITRIDING_RANGE_C, "°C"),
                                          "hours": (10.0, 130.0, "h")},
                  "gas nitriding 495–565 °C (sarlin.se nitriding process page); 10–130 h (common practice)")
validity.register("nitrided_surface_hardness", {"Al": (0.0, 1.5, "wt%"), "Cr": (0.0, 5.5, "wt%"),
                                                "Mo": (0.0, 1.5, "wt%"), "V": (0.0, 1.2, "wt%")},
                  REF_HV)


@functools.cache
def _constants() -> dict:
    t = read_table("nitriding_constants.csv", numeric=["value"])
    return dict(zip(t["name"], t["value"].astype(float)))


def _arr(field, x, context, positive=False):
    a = np.asarray(x, float)
    bad = ~np.isfinite(a) | ((a <= 0) if positive else (a < 0))
    if np.any(bad):
        raise InputError(field, float(np.atleast_1d(a)[np.atleast_1d(bad)][0]),
                         "a finite number > 0" if positive else "a finite number >= 0", context)
    return a


def nitriding_rate_mm_per_sqrt_h(temp_c):
    """Parabolic rate constant K of gas nitriding, mm per sqrt(h).

    ::

        K(T) = K_ref exp[-(Q / 2R) (1/T - 1/T_ref)]

    K_ref = 0.072 mm/sqrt(h) at T_ref = 525 °C (about 0.5 mm in 48 h for Al-Cr-Mo
    nitriding steels, from memory); Q = 77 kJ/mol, the activation energy of nitrogen
    diffusion in ferrite (Fast & Verrijp 1954, from memory).  The half of Q enters
    because x^2, not x, is proportional to D t.

    Parameters
    ----------
    temp_c : array_like
        Nitriding temperature, °C.

    Returns
    -------
    ndarray, mm/sqrt(h).

    Validity
    --------
    495–565 °C (``nitrided_case_depth``).

    References
    ----------
    J.D. Fast & M.B. Verrijp, JISI 176 (1954) 24 (N diffusion in alpha-iron);
    ASM Handbook Vol. 4, "Gas nitriding" (case depth against time, from memory).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(nitriding_rate_mm_per_sqrt_h(525.0)), 3)
    0.072
    """
    k = _constants()
    t = np.asarray(temp_c, float)
    if np.any(~np.isfinite(t) | (t <= -273.15)):
        raise InputError("temp_c", float(np.atleast_1d(t)[0]), "a finite temperature in °C", "nitriding")
    t_k = t + 273.15
    t_ref = k["t_ref_c"] + 273.15
    return k["k_ref_mm_per_sqrt_h"] * np.exp(-(k["q_kj_mol"] * 1e3 / (2 * R_J)) * (1 / t_k - 1 / t_ref))


def nitrided_case_depth_mm(temp_c, hours):
    """Nitriding hardness depth (core + 50 HV, DIN 50190-3) after gas nitriding.

    ::

        x = K(T) sqrt(t)

    Parameters
    ----------
    temp_c : array_like
        Nitriding temperature, °C.
    hours : array_like
        Time at temperature, h (>= 0).

    Returns
    -------
    ndarray, mm.  The compound (white) layer, 0–20 µm, is not part of the model.

    Validity
    --------
    495–565 °C, 10–130 h (``nitrided_case_depth``).  Alloy content shifts K (strong
    nitride formers hold nitrogen near the surface); one K for all nitriding grades.

    References
    ----------
    DIN 50190-3 (nitriding hardness depth); see :func:`nitriding_rate_mm_per_sqrt_h`.

    Example (from the source: about 0.5 mm in 48 h at about 525 °C for Al-Cr-Mo nitriding steels
    (ASM Handbook Vol. 4, gas nitriding; from memory))

    >>> round(float(nitrided_case_depth_mm(525.0, 48.0)), 2)
    0.5
    """
    h = _arr("hours", hours, "nitrided_case_depth_mm")
    return nitriding_rate_mm_per_sqrt_h(temp_c) * np.sqrt(h)


def surface_hardness_hv(comp: Composition):
    """Surface hardness (HV) of the diffusion zone after gas nitriding, from nitride formers.

    ::

        S  = 0.955 Al + 0.386 Cr + 0.193 Mo + 0.955 V + 0.955 Ti     (wt %)
        HV = 300 + (1200 - 300) (1 - exp(-S))

    The weights of Cr and Al were fitted here to typical values of 4140 (~600 HV)
    and Nitralloy 135M (~1050 HV); Mo counts half of Cr, V and Ti as much as Al
    (assumed).  4340 then gives ~570 HV (typical 550–650).

    Parameters
    ----------
    comp : mapping
        Composition, wt %.

    Returns
    -------
    ndarray, HV.

    Validity
    --------
    Al <= 1.5, Cr <= 5.5, Mo <= 1.5, V <= 1.2 wt % (``nitrided_surface_hardness``).
    Confidence: fitted to values from memory.

    References
    ----------
    ASM Handbook Vol. 4, "Gas nitriding", typical surface hardness tables (values
    from memory); constants in ``data/nitriding_constants.csv``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(surface_hardness_hv({"C": 0.40, "Cr": 1.6, "Al": 1.1, "Mo": 0.35})))
    1041
    """
    k = _constants()
    s = sum(k[f"w_{x}"] * el(comp, x) for x in NITRIDE_FORMERS)
    return k["hv_base"] + (k["hv_max"] - k["hv_base"]) * (1.0 - np.exp(-s))


def hardness_profile_hv(depth_mm, temp_c, hours, comp: Composition, core_hardness_hv):
    """Hardness against depth after gas nitriding, HV.

    ::

        H(x) = H_core + (H_s - H_core) erfc(x / L),
        L    = x_N / erfcinv[50 / (H_s - H_core)]

    so that H(0) = H_s (:func:`surface_hardness_hv`) and H(x_N) = H_core + 50 at the
    nitriding hardness depth x_N (:func:`nitrided_case_depth_mm`).  Where H_s is not
    50 HV above the core, the profile is the core hardness.

    Parameters
    ----------
    depth_mm : array_like
        Depth below the surface, mm.
    temp_c, hours : array_like
        Nitriding temperature (°C) and time (h).
    comp : mapping
        Composition, wt %.
    core_hardness_hv : array_like
        Core hardness after the prior harden-and-temper (and after the nitriding
        cycle), HV.

    Returns
    -------
    ndarray, HV.  Never below the core hardness.

    References
    ----------
    DIN 50190-3 (core + 50 HV); shape assumed (erfc, the diffusion-zone form).

    Example (illustrative: a value of this implementation, not a published one)

    >>> import numpy as np
    >>> s = {"C": 0.40, "Cr": 1.6, "Al": 1.1, "Mo": 0.35}
    >>> [round(float(x)) for x in hardness_profile_hv(np.array([0.0, 1.0]), 525.0, 48.0, s, 300.0)]
    [1041, 300]
    """
    x = _arr("depth_mm", depth_mm, "hardness_profile_hv")
    core = _arr("core_hardness_hv", core_hardness_hv, "hardness_profile_hv", positive=True)
    hs = surface_hardness_hv(comp)
    xn = nitrided_case_depth_mm(temp_c, hours)
    rise = hs - core
    ok = (rise > DIN_50190_DELTA_HV) & (xn > 0)
    with np.errstate(divide="ignore", invalid="ignore"):
        length = xn / erfcinv(np.where(ok, DIN_50190_DELTA_HV / np.where(ok, rise, 1.0), 0.5))
        prof = core + rise * erfc(x / np.where(ok, length, 1.0))
    return np.where(ok, np.maximum(prof, core), np.broadcast_to(core, np.broadcast(prof, core).shape))


def nitriding_cautions(temp_c, prior_temper_temp_c=None) -> list[str]:
    """Cautions for a gas-nitriding step (messages for the result's warnings).

    * temperature outside 495–565 °C (gas nitriding practice);
    * prior tempering temperature less than 30 °C above the nitriding temperature:
      the core softens during nitriding (common practice).

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(nitriding_cautions(600.0))
    1
    """
    msgs = []
    t = np.atleast_1d(np.asarray(temp_c, float))
    lo, hi = GAS_NITRIDING_RANGE_C
    if np.any((t < lo) | (t > hi)):
        bad = t[(t < lo) | (t > hi)][0]
        msgs.append(f"nitriding: temperature {bad:.0f} °C is outside the gas-nitriding range "
                    f"{lo:.0f}–{hi:.0f} °C; case depth and hardness are extrapolated")
    if prior_temper_temp_c is not None:
        tt = np.asarray(prior_temper_temp_c, float)
        short = tt < np.asarray(temp_c, float) + TEMPER_MARGIN_C
        if np.any(short):
            msgs.append(f"nitriding: the prior temper ({float(np.min(tt)):.0f} °C) is less than "
                        f"{TEMPER_MARGIN_C:.0f} °C above the nitriding temperature; the core will "
                        "soften during nitriding (common practice: temper at least 30 °C higher)")
    return msgs
