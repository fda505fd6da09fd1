"""Gas carburizing: carbon diffusion in austenite, case depth and case hardness.

The pipeline, one published model per step:

1. carbon diffusivity in austenite, Tibbetts (1980) (composition dependent), or a
   constant D0/Q textbook value;
2. carbon profile, the error-function solution of Fick's second law for a constant
   surface carbon on a semi-infinite body (Crank, *The Mathematics of Diffusion*);
3. total case depth, Harris (1943), and the depth where the erf profile comes
   within 0.07 %C of the core (the point Harris's depth corresponds to);
4. local hardness: each depth with its OWN carbon and hardenability, the ASTM A255
   Jominy hardness of the core alloy at the local carbon at the depth's equivalent
   Jominy distance (:func:`case_as_quenched_hrc`), tempered by the quench-and-temper
   rule at the local carbon (:func:`selector.models.tempering.tempered_hv`), retained
   austenite by Koistinen–Marburger (1959) with the Andrews (1965) Ms of the local
   composition, mixed by volume in Vickers hardness (:func:`case_hardness_hv`);
5. effective case depth to 50 HRC (SAE J423 / ISO 2639 convention).

Every function broadcasts over numpy arrays.  Nothing here warns: out-of-range
values are registered with :mod:`selector.models.validity`, and metallurgical
cautions are returned by :func:`carburizing_cautions`.
"""
from __future__ import annotations

import numpy as np
from scipy.special import erf, erfinv

from ..errors import InputError, check_choice
from . import validity
from .composition import Composition, el
from .conversions import MM_PER_IN, hrc_to_hv, hv_to_hrc
from .critical_temperatures import ms_c as _ms_andrews_linear
from .hardenability import J1_MM, jominy_hardness_hrc
from .martensite import martensite_hardness_hrc
from .tempering import tempered_hv, tempered_martensite_hv

#: gas constant, cal mol^-1 K^-1 (Tibbetts expresses Q in cal/mol)
R_CAL = 1.987
#: gas constant, J mol^-1 K^-1
R_J = 8.314

REF_TIBBETTS = "G.G. Tibbetts, J. Appl. Phys. 51 (1980) 4813 (constants from memory)"
REF_CONSTANT_D = "W.D. Callister, Materials Science and Engineering, diffusion data table (from memory)"
REF_CRANK = "J. Crank, The Mathematics of Diffusion, 2nd ed. (1975), erf solution §3.3"
REF_HARRIS = "F.E. Harris, Metal Progress 44 (1943) 265 (formula from memory)"
REF_ANDREWS = "K.W. Andrews, JISI 203 (1965) 721 (linear Ms)"
REF_KM = "D.P. Koistinen & R.E. Marburger, Acta Metall. 7 (1959) 59"
REF_ECD = "SAE J423 / ISO 2639: effective case depth to 50 HRC (550 HV)"

validity.register("carbon_diffusivity", {"temp_c": (850.0, 1000.0, "°C"),
                                         "carbon_pct": (0.0, 1.2, "wt%")}, REF_TIBBETTS)
validity.register("carbon_profile", {"temp_c": (850.0, 1000.0, "°C"),
                                     "surface_carbon_pct": (0.6, 1.2, "wt%"),
                                     "core_carbon_pct": (0.05, 0.30, "wt%")}, REF_CRANK)
#: Harris's table covers 1550–1800 °F (843–982 °C).  Not registered with validity: no route
#: uses the Harris formula (the case depth is the diffusion model's); it is a cross-check only
#: (scripts/check_case_depth.py, tests/test_carburizing.py).
HARRIS_RANGE_C = (843.0, 982.0)
# Andrews's data set covers C below about 0.6 % (the linear form is registered as
# "andrews_ms" by critical_temperatures); a carburized case extrapolates both forms.
validity.register("andrews_ms_product", {"C": (0.1, 0.6, "wt%")},
                  "K.W. Andrews, JISI 203 (1965) 721 (product form, from memory)")
validity.register("carburized_case_hardness", {"temp_c": (850.0, 1000.0, "°C"),
                                               "surface_carbon_pct": (0.6, 1.0, "wt%"),
                                               "temper_temp_c": (120.0, 230.0, "°C")},
                  "martensite hardness (ASTM A255 IH), Koistinen–Marburger, Andrews Ms")

#: surface carbon above which retained austenite and carbide networks are a concern
#: (common practice: carburizing specifications keep surface carbon near 0.7–0.9 %).
HIGH_SURFACE_CARBON_PCT = 0.9

#: Koistinen–Marburger rate constant, 1/K, plain-carbon and low-alloy steels (KM 1959)
KM_ALPHA_PER_K = 0.011

#: hardness of retained austenite in a carburized case, HV (from memory; high-carbon
#: austenite is usually quoted at about 250–350 HV)
RETAINED_AUSTENITE_HV = 300.0

#: increase of carbon over the core that marks the total case depth.  Harris's
#: depths in the 0.040–0.070 in range fall at about core + 0.07 %C (Harris 1943, as
#: summarised by flamemet.com/tech/feharris.html: partial)
TOTAL_CASE_DELTA_C_PCT = 0.07


# --------------------------------------------------------------------------- checks
def _nonneg(field: str, x, context: str) -> np.ndarray:
    a = np.asarray(x, float)
    bad = ~np.isfinite(a) | (a < 0)
    if np.any(bad):
        raise InputError(field, float(np.atleast_1d(a)[np.atleast_1d(bad)][0]),
                         "a finite number >= 0", context)
    return a


def _positive(field: str, x, context: str) -> np.ndarray:
    a = np.asarray(x, float)
    bad = ~np.isfinite(a) | (a <= 0)
    if np.any(bad):
        raise InputError(field, float(np.atleast_1d(a)[np.atleast_1d(bad)][0]),
                         "a finite number > 0", context)
    return a


def _kelvin(temp_c, context: str) -> np.ndarray:
    t = np.asarray(temp_c, float)
    bad = ~np.isfinite(t) | (t <= -273.15)
    if np.any(bad):
        raise InputError("temp_c", float(np.atleast_1d(t)[np.atleast_1d(bad)][0]),
                         "a finite temperature above -273.15 °C", context)
    return t + 273.15


# ------------------------------------------------------------------ 1. diffusivity
def _d_tibbetts(t_k, c):
    return 0.47e-4 * np.exp(-1.6 * c) * np.exp(-(37000.0 - 6600.0 * c) / (R_CAL * t_k))


def _d_constant(t_k, c):
    return 2.3e-5 * np.exp(-148000.0 / (R_J * t_k)) + 0.0 * c


_DIFFUSIVITY = {"tibbetts": _d_tibbetts, "constant": _d_constant}


def carbon_diffusivity_m2_s(temp_c, carbon_pct, method: str = "tibbetts"):
    """Diffusivity of carbon in austenite, Tibbetts (1980).

    ``method="tibbetts"`` (default)::

        D = 0.47 exp(-1.6 C) exp[-(37 000 - 6600 C) / (R T)]   cm^2/s

    with C in wt %, R = 1.987 cal mol^-1 K^-1, T in K (returned in m^2/s).
    ``method="constant"``: D = 2.3e-5 exp(-148 000 / (R T)) m^2/s, R = 8.314
    J mol^-1 K^-1 (a textbook constant D0/Q for carbon in fcc iron).

    Parameters
    ----------
    temp_c : array_like
        Temperature, °C.
    carbon_pct : array_like
        Local carbon, wt %.
    method : {"tibbetts", "constant"}

    Returns
    -------
    ndarray, m^2/s.

    Validity
    --------
    850–1000 °C, 0–1.2 %C (registered as ``carbon_diffusivity``).

    References
    ----------
    G.G. Tibbetts, "Diffusivity of carbon in iron and steels at high
    temperatures", J. Appl. Phys. 51 (1980) 4813, doi:10.1063/1.328314 (constants
    from memory; check values at 900 °C: 7.7e-12 m^2/s at 0.2 %C, 1.6e-11 at
    0.8 %C).  Callister, Materials Science and Engineering, diffusion table
    (D0 = 2.3e-5 m^2/s, Q = 148 kJ/mol, from memory).

    Example (from the source: Tibbetts (1980), D(925 °C, 0.2 % C) about 1.06e-11 m^2/s (hand
    evaluation, from memory))

    >>> f"{float(carbon_diffusivity_m2_s(925.0, 0.2)):.2e}"
    '1.06e-11'
    """
    check_choice("method", method, _DIFFUSIVITY, "carbon_diffusivity_m2_s")
    t_k = _kelvin(temp_c, "carbon_diffusivity_m2_s")
    c = _nonneg("carbon_pct", carbon_pct, "carbon_diffusivity_m2_s")
    return _DIFFUSIVITY[method](t_k, c)


# ---------------------------------------------------------------- 2. carbon profile
def _check_carbon(surface_carbon_pct, core_carbon_pct, context):
    cs = _nonneg("surface_carbon_pct", surface_carbon_pct, context)
    c0 = _nonneg("core_carbon_pct", core_carbon_pct, context)
    bad = cs < c0
    if np.any(bad):
        raise InputError("surface_carbon_pct", float(np.atleast_1d(np.broadcast_to(cs, bad.shape))[np.atleast_1d(bad)][0]),
                         "a surface carbon >= the core carbon (carburizing adds carbon)", context)
    return cs, c0


def representative_diffusivity_m2_s(temp_c, surface_carbon_pct, core_carbon_pct,
                                    method: str = "tibbetts"):
    """Carbon diffusivity used for the whole profile: D at the mean of the surface
    and core carbon, (Cs + C0)/2 (a single D makes the erf solution exact; the
    mean carbon is the usual representative choice).  m^2/s.

    Example (illustrative: a value of this implementation, not a published one)

    >>> f"{float(representative_diffusivity_m2_s(925.0, 0.9, 0.2)):.2e}"
    '1.59e-11'
    """
    cs, c0 = _check_carbon(surface_carbon_pct, core_carbon_pct, "representative_diffusivity_m2_s")
    return carbon_diffusivity_m2_s(temp_c, 0.5 * (cs + c0), method)


def carbon_profile_pct(depth_mm, temp_c, hours, surface_carbon_pct, core_carbon_pct,
                       method: str = "tibbetts"):
    """Carbon against depth after carburizing at constant surface carbon (Crank, erf solution).

    ::

        C(x, t) = Cs - (Cs - C0) erf[x / (2 sqrt(D t))]

    with D = :func:`carbon_diffusivity_m2_s` evaluated at (Cs + C0)/2.

    Parameters
    ----------
    depth_mm : array_like
        Depth below the surface, mm (>= 0).
    temp_c : array_like
        Carburizing temperature, °C.
    hours : array_like
        Time at temperature, h (>= 0; boost and diffuse cycles are not separated).
    surface_carbon_pct : array_like
        Surface carbon held by the atmosphere (carbon potential), wt %.
    core_carbon_pct : array_like
        Carbon of the steel, wt % (<= surface carbon).
    method : {"tibbetts", "constant"}
        Diffusivity expression.

    Returns
    -------
    ndarray, wt % C (broadcast of the inputs).

    Validity
    --------
    850–1000 °C; surface 0.6–1.2 %C; core 0.05–0.30 %C (``carbon_profile``).  The
    surface is assumed to reach the atmosphere's carbon at once (no surface
    reaction resistance), which overestimates the carbon in short cycles.

    References
    ----------
    J. Crank, The Mathematics of Diffusion, 2nd ed., Oxford (1975), §3.3;
    Tibbetts (1980) for D.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(carbon_profile_pct(0.5, 925.0, 6.0, 0.9, 0.2)), 2)
    0.58
    """
    ctx = "carbon_profile_pct"
    x_m = _nonneg("depth_mm", depth_mm, ctx) * 1e-3
    t_s = _nonneg("hours", hours, ctx) * 3600.0
    cs, c0 = _check_carbon(surface_carbon_pct, core_carbon_pct, ctx)
    d = carbon_diffusivity_m2_s(temp_c, 0.5 * (cs + c0), method)
    root = 2.0 * np.sqrt(d * t_s)
    with np.errstate(divide="ignore", invalid="ignore"):
        arg = np.where(root > 0, x_m / np.where(root > 0, root, 1.0), np.where(x_m > 0, np.inf, 0.0))
    return cs - (cs - c0) * erf(arg)


def depth_at_carbon_mm(carbon_pct, temp_c, hours, surface_carbon_pct, core_carbon_pct,
                       method: str = "tibbetts"):
    """Depth (mm) where the erf profile of :func:`carbon_profile_pct` equals ``carbon_pct``.

    x = 2 sqrt(D t) erfinv[(Cs - C) / (Cs - C0)]; NaN where ``carbon_pct`` is not
    between C0 (exclusive) and Cs (inclusive).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(depth_at_carbon_mm(0.55, 925.0, 6.0, 0.9, 0.2)), 2)
    0.56
    """
    ctx = "depth_at_carbon_mm"
    t_s = _nonneg("hours", hours, ctx) * 3600.0
    cs, c0 = _check_carbon(surface_carbon_pct, core_carbon_pct, ctx)
    c = np.asarray(carbon_pct, float)
    d = carbon_diffusivity_m2_s(temp_c, 0.5 * (cs + c0), method)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = (cs - c) / (cs - c0)
        ok = (frac >= 0) & (frac < 1)
        x = 2.0 * np.sqrt(d * t_s) * erfinv(np.where(ok, frac, 0.0))
    return np.where(ok, x * 1e3, np.nan)


def total_case_depth_mm(temp_c, hours, surface_carbon_pct, core_carbon_pct,
                        delta_carbon_pct: float = TOTAL_CASE_DELTA_C_PCT, method: str = "tibbetts"):
    """Total case depth from the erf profile: depth where C = C0 + ``delta_carbon_pct``.

    The default 0.07 %C over the core is where Harris's total case depths fall for
    0.040–0.070 in cases (flamemet.com summary of Harris 1943, partial).  mm.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(total_case_depth_mm(927.0, 8.0, 0.8, 0.2)), 2)
    1.48
    """
    cs, c0 = _check_carbon(surface_carbon_pct, core_carbon_pct, "total_case_depth_mm")
    return depth_at_carbon_mm(c0 + delta_carbon_pct, temp_c, hours, cs, c0, method)


# ------------------------------------------------------------------------- 3. Harris
def harris_case_depth_mm(temp_c, hours):
    """Total case depth of normal gas carburizing, Harris (1943).

    ::

        x [in] = 31.6 sqrt(t) / 10^(6700 / T[°R])      (T[°R] = °F + 460)
        x [mm] = 802.6 sqrt(t) / 10^(3722 / T[K])      (the same, converted)

    Parameters
    ----------
    temp_c : array_like
        Carburizing temperature, °C.
    hours : array_like
        Time at temperature, h (>= 0), heat-up and diffuse steps excluded.

    Returns
    -------
    ndarray, mm.  At 927 °C (1700 °F) about 0.025 in per sqrt(h).

    Validity
    --------
    843–982 °C (:data:`HARRIS_RANGE_C`); the surface is assumed saturated in carbon
    (austenite at Acm).  A leaner carbon potential gives a shallower case.

    References
    ----------
    F.E. Harris, "Case depth — an attempt at a practical definition", Metal
    Progress 44 (1943) 265 (formula from memory; variable definitions seen in a
    secondary summary, flamemet.com/tech/feharris.html).

    Example (from the source: Harris (1943) table, 927 °C (1700 °F): k = 0.025 in/sqrt(h), so 8
    h gives 0.071 in (1.8 mm) (from memory))

    >>> round(float(harris_case_depth_mm(927.0, 8.0)), 1)
    1.8
    """
    t_k = _kelvin(temp_c, "harris_case_depth_mm")
    h = _nonneg("hours", hours, "harris_case_depth_mm")
    t_r = t_k * 1.8  # Rankine
    return MM_PER_IN * 31.6 * np.sqrt(h) / 10.0 ** (6700.0 / t_r)


# --------------------------------------------------- 4. Ms and retained austenite
def _local_comp(comp: Composition, carbon_pct) -> dict:
    out = {k: np.asarray(v, float) for k, v in comp.items()}
    out["C"] = np.asarray(carbon_pct, float)
    return out


def _ms_andrews_product(comp):
    c, mn, ni, cr, mo = (el(comp, s) for s in ("C", "Mn", "Ni", "Cr", "Mo"))
    return (512.0 - 453.0 * c - 16.9 * ni + 15.0 * cr - 9.5 * mo + 217.0 * c**2
            - 71.5 * c * mn - 67.6 * c * cr)


_MS = {"andrews_linear": _ms_andrews_linear, "andrews_product": _ms_andrews_product}

#: default Ms form for a carburized case.  The product form carries the C^2 term
#: that keeps Ms realistic above 0.6 %C; the linear form, extrapolated to 1 %C,
#: predicts about 68 % retained austenite in a 4320 case where 26 % was measured
#: (Advances in X-ray Analysis, "Substructure of austenite and martensite through a
#: carburized surface", abstract), the product form about 19 %.
CASE_MS_METHOD = "andrews_product"


def martensite_start_c(comp: Composition, method: str = "andrews_linear"):
    """Martensite start temperature, Andrews (1965), °C.

    ``method="andrews_linear"``::

        Ms = 539 - 423 C - 30.4 Mn - 17.7 Ni - 12.1 Cr - 7.5 Mo

    ``method="andrews_product"``::

        Ms = 512 - 453 C - 16.9 Ni + 15 Cr - 9.5 Mo + 217 C^2 - 71.5 C Mn - 67.6 C Cr

    (wt %).  The linear form is :func:`selector.models.critical_temperatures.ms_c`.
    Validity: Andrews's steels had C below about 0.6 % (``andrews_ms``,
    ``andrews_ms_product``); above it the product form's C^2 term keeps Ms from
    falling too fast.

    References
    ----------
    K.W. Andrews, "Empirical formulae for the calculation of some transformation
    temperatures", JISI 203 (1965) 721 (linear form verified via a secondary
    reproduction; product form from memory).

    Example (from the source: Andrews (1965) linear form, 8620 (0.20 C, 0.80 Mn, 0.55 Ni, 0.50
    Cr, 0.20 Mo): 539 - 84.6 - 24.32 - 9.735 - 6.05 - 1.5 = 412.8 °C (hand evaluation))

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(martensite_start_c(core)), 1)
    412.8
    """
    check_choice("method", method, _MS, "martensite_start_c")
    return _MS[method](comp)


def retained_austenite_pct(carbon_pct, comp: Composition, quench_temp_c=25.0,
                           ms_method: str = CASE_MS_METHOD):
    """Retained austenite after quenching to ``quench_temp_c``, Koistinen–Marburger (1959).

    ::

        RA = 100 exp[-0.011 (Ms - Tq)]   for Tq < Ms, else 100

    with Ms from :func:`martensite_start_c` (``ms_method``, default the Andrews
    product form, see :data:`CASE_MS_METHOD`) of ``comp`` whose carbon is replaced
    by ``carbon_pct`` (the local carbon of a case).

    Parameters
    ----------
    carbon_pct : array_like
        Local carbon, wt %.
    comp : mapping
        Composition (wt %); its ``C`` is ignored.
    quench_temp_c : array_like
        Temperature the quench reaches, °C (25 = room temperature; a deep freeze
        lowers it).
    ms_method : {"andrews_product", "andrews_linear"}

    Returns
    -------
    ndarray, volume % retained austenite (of a fully austenitic start).

    Validity
    --------
    Andrews Ms (C below about 0.6 %, ``andrews_ms`` / ``andrews_ms_product``);
    KM's alpha = 0.011 /K for
    plain-carbon and low-alloy steels.

    References
    ----------
    D.P. Koistinen & R.E. Marburger, Acta Metall. 7 (1959) 59; Andrews (1965).

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(retained_austenite_pct(0.8, core)), 1)
    12.8
    """
    c = _nonneg("carbon_pct", carbon_pct, "retained_austenite_pct")
    tq = np.asarray(quench_temp_c, float)
    ms = martensite_start_c(_local_comp(comp, c), ms_method)
    under = np.maximum(ms - tq, 0.0)
    return 100.0 * np.exp(-KM_ALPHA_PER_K * under)


# --------------------------------------------------------------------- cautions
def high_surface_carbon_mask(surface_carbon_pct):
    """True where the surface carbon exceeds :data:`HIGH_SURFACE_CARBON_PCT` (0.9 %).

    Example (illustrative: a value of this implementation, not a published one)

    >>> high_surface_carbon_mask([0.8, 1.0]).tolist()
    [False, True]
    """
    return np.asarray(surface_carbon_pct, float) > HIGH_SURFACE_CARBON_PCT + 1e-12


def carburizing_cautions(surface_carbon_pct) -> list[str]:
    """Metallurgical cautions for a carburizing route (messages for the result's warnings).

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(carburizing_cautions([0.8, 1.05]))
    1
    """
    msgs = []
    if np.any(high_surface_carbon_mask(surface_carbon_pct)):
        cs = float(np.max(np.asarray(surface_carbon_pct, float)))
        msgs.append(f"carburizing: surface carbon {cs:.2f} % exceeds {HIGH_SURFACE_CARBON_PCT:.1f} %; "
                    "expect retained austenite and possible carbide networks at the surface "
                    "(common practice: keep surface carbon near 0.7–0.9 %, or sub-zero treat)")
    return msgs


# ------------------------------------------------------------ 5. case hardness
def low_temper_hrc(as_quenched_hrc, comp: Composition, temper_temp_c, temper_hours):
    """Hardness (HRC) of martensite after a low temper: the lower of the as-quenched
    hardness and the tempered-martensite hardness of
    :func:`selector.models.tempering.tempered_martensite_hv` at ``comp`` (whose
    ``C`` is the local carbon), converted by ASTM E140
    (:func:`selector.models.conversions.hv_to_hrc`).

    ``temper_temp_c=None`` returns the as-quenched hardness.

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(low_temper_hrc(62.0, core, 180.0, 2.0)), 1)
    44.2
    """
    aq = np.asarray(as_quenched_hrc, float)
    if temper_temp_c is None:
        return aq

    _nonneg("temper_hours", temper_hours, "low_temper_hrc")
    tempered = hv_to_hrc(tempered_martensite_hv(comp, temper_temp_c, temper_hours))
    return np.where(np.isfinite(tempered), np.minimum(aq, tempered), aq)


def fully_hardened_case_hrc(carbon_pct, comp_core: Composition, temper_temp_c=None, temper_hours=2.0,
                            quench_temp_c=25.0, ms_method: str = CASE_MS_METHOD):
    """Hardness (HRC) of a fully hardened case at local carbon ``carbon_pct``.

    ::

        HV = (1 - f_RA) HV_M,tempered(C) + f_RA * 300

    HV_M: 99.9 % martensite at C (:func:`selector.models.martensite.martensite_hardness_hrc`,
    ASTM A255 IH, held at its 0.70 %C value above 0.70 %C), tempered by
    :func:`low_temper_hrc`; f_RA: :func:`retained_austenite_pct` (KM with Andrews Ms
    of the core alloying at the local carbon); 300 HV: retained austenite
    (:data:`RETAINED_AUSTENITE_HV`, from memory), mixed by volume.  The A255 IH
    curve is taken as fresh martensite: by the same KM estimate it holds less than
    8 % austenite up to 0.6 %C.

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(fully_hardened_case_hrc(0.8, core, 180.0)), 1)
    61.5
    """
    c = _nonneg("carbon_pct", carbon_pct, "fully_hardened_case_hrc")
    local = _local_comp(comp_core, c)
    hrc_m = low_temper_hrc(martensite_hardness_hrc(c, 99.9), local, temper_temp_c, temper_hours)
    f_ra = retained_austenite_pct(c, comp_core, quench_temp_c, ms_method) / 100.0
    hv = (1.0 - f_ra) * hrc_to_hv(hrc_m) + f_ra * RETAINED_AUSTENITE_HV
    return hv_to_hrc(hv)


def case_as_quenched_hrc(carbon_pct, comp_core: Composition, jominy_mm=None, grain_size_astm=7.0):
    """As-quenched hardness (HRC) at a depth of a carburized case, from that depth's
    OWN carbon and hardenability (ASTM A255 calculation at the local carbon).

    ::

        HRC(x) = IH(C_x) / DF(DI(C_x, alloy), J_x)

    where C_x is the local carbon, the alloy is the core's (carburizing adds only
    carbon), DI is the Grossmann ideal critical diameter of that local composition
    (:func:`selector.models.hardenability.di_mm`), IH the A255 initial hardness and DF
    the A255 dividing factor at the Jominy distance J_x that cools like the depth
    (:func:`selector.models.hardenability.jominy_hardness_hrc`).  The route layer
    uses the same A255 chain through
    :func:`selector.routes.quench_response.as_quenched_profile`, which also finds
    J_x from the quench and the section.

    Parameters
    ----------
    carbon_pct : array_like
        Local carbon, wt %.
    comp_core : mapping
        Core composition, wt % (its ``C`` is replaced by ``carbon_pct``).
    jominy_mm : array_like, optional
        Equivalent Jominy distance of the depth, mm; default J1 = 1.59 mm (the
        quenched end: a fully hardening quench).
    grain_size_astm : array_like
        ASTM austenite grain size (A255 basis 7).

    Returns
    -------
    ndarray, HRC.

    Validity
    --------
    ``astm_a255`` (C 0.10–0.70 %: a case above 0.70 %C keeps the 0.70 % initial
    hardness, as :func:`selector.models.martensite.ih_hrc`).

    References
    ----------
    ASTM A255-10 (calculation of hardenability from composition); M.A. Grossmann,
    Trans. AIME 150 (1942) 227.  The use of each depth's own carbon and
    hardenability for a carburized case follows the practice of case-hardenability
    (Jominy bars carburized before the end quench; ASTM A255 / SAE J406 appendix on
    case hardenability, from memory).

    Examples
    --------
    8620 alloy (0.80 Mn, 0.55 Ni, 0.50 Cr, 0.20 Mo) at 0.35 %C, J = 5 mm: about
    52 HRC (this code: IH(0.35) = 53.3 HRC, DI 83 mm, DF 1.02).

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(case_as_quenched_hrc(0.8, core)), 1)
    64.8
    """
    c = _nonneg("carbon_pct", carbon_pct, "case_as_quenched_hrc")
    j = J1_MM if jominy_mm is None else _nonneg("jominy_mm", jominy_mm, "case_as_quenched_hrc")
    return jominy_hardness_hrc(_local_comp(comp_core, c), j, grain_size_astm)


def case_hardness_hv(as_quenched_hv, carbon_pct, comp_core: Composition, temper_temp_c=None, temper_hours=2.0,
                     quench_temp_c=25.0, ms_method: str = CASE_MS_METHOD):
    """Hardness (HV) at a depth of a carburized case after tempering, from the local
    as-quenched hardness and the local carbon.

    ::

        HV_T  = tempered_hv(HV_AQ, HV_M(C_x), alloy at C_x, T, t)   (NaN temper: HV_AQ)
        HV    = min(HV_T, (1 - f_RA) HV_T + f_RA * 300)

    The tempering is the project's quench-and-temper rule
    (:func:`selector.models.tempering.tempered_hv`: Hollomon–Jaffe on the martensite,
    the non-martensitic part keeping its hardness) at the local carbon; f_RA is the
    Koistinen–Marburger retained austenite of the local carbon
    (:func:`retained_austenite_pct`, Andrews Ms) at 300 HV
    (:data:`RETAINED_AUSTENITE_HV`), mixed by volume; the mixture never raises the
    hardness (a soft, non-martensitic location holds no retained austenite).

    Parameters
    ----------
    as_quenched_hv : array_like
        As-quenched hardness at the depth (from the local carbon's A255 curve), HV.
    carbon_pct : array_like
        Local carbon, wt %.
    comp_core : mapping
        Core composition (its ``C`` is replaced by ``carbon_pct``).
    temper_temp_c : array_like or None
        Tempering temperature, °C (None, or NaN entries: as quenched).
    temper_hours : array_like
        Tempering time, h.
    quench_temp_c : array_like
        Temperature the quench reaches, °C.
    ms_method : str
        Ms form (:func:`martensite_start_c`).

    Returns
    -------
    ndarray, HV.

    Validity
    --------
    ``carburized_case_hardness`` (temper 120–230 °C); Andrews Ms above 0.6 %C is
    extrapolated (``andrews_ms_product``).

    References
    ----------
    J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223; D.P. Koistinen &
    R.E. Marburger, Acta Metall. 7 (1959) 59; K.W. Andrews, JISI 203 (1965) 721.

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(case_hardness_hv(800.0, 0.8, core, 180.0)))
    711
    """
    ctx = "case_hardness_hv"
    c = _nonneg("carbon_pct", carbon_pct, ctx)
    hv_aq = np.asarray(as_quenched_hv, float)
    local = _local_comp(comp_core, c)
    hv = hv_aq
    if temper_temp_c is not None:
        t = np.asarray(temper_temp_c, float)
        h = np.asarray(temper_hours, float)
        on = np.isfinite(t)
        if np.any(on):
            _nonneg("temper_hours", np.where(on, h, 1.0), ctx)
            hv_m = hrc_to_hv(martensite_hardness_hrc(c, 99.9))
            tt = tempered_hv(hv_aq, hv_m, local, np.where(on, t, 200.0), np.where(on, h, 1.0))
            hv = np.where(on, np.minimum(tt, hv_aq), hv_aq)
    f_ra = retained_austenite_pct(c, comp_core, quench_temp_c, ms_method) / 100.0
    return np.minimum(hv, (1.0 - f_ra) * hv + f_ra * RETAINED_AUSTENITE_HV)


def case_hardness_profile_hrc(depth_mm, temp_c, hours, surface_carbon_pct, comp_core: Composition,
                              temper_temp_c, temper_hours, core_hardness_hrc, quench_temp_c=25.0,
                              method: str = "tibbetts", ms_method: str = CASE_MS_METHOD, jominy_mm=None):
    """Hardness against depth of a carburized, quenched and low-tempered part, HRC,
    each depth with its own carbon and hardenability.

    ::

        C(x)  = carbon_profile_pct(x, ...)                       (Crank erf, Tibbetts D)
        HRC_AQ(x) = IH(C(x)) / DF(DI(C(x), alloy), J(x))          (ASTM A255 at the local carbon)
        HV(x) = case_hardness_hv(HV_AQ(x), C(x), ...)            (temper + retained austenite)
        H(x)  = max(HRC(HV(x)), H_core)

    Unlike a profile scaled between the surface and the core hardness, the 50 HRC
    point falls where the local carbon, at the local cooling, hardens to 50 HRC
    (about 0.30–0.35 %C for a fully hardening quench of 8620-class steels).

    Parameters
    ----------
    depth_mm : array_like
        Depth below the surface, mm.
    temp_c, hours : array_like
        Carburizing temperature (°C) and time at temperature (h).
    surface_carbon_pct : array_like
        Surface carbon (carbon potential), wt %.
    comp_core : mapping
        Core composition, wt % (its ``C`` is the core carbon C0).
    temper_temp_c : array_like or None
        Tempering temperature, °C (None: as quenched).
    temper_hours : array_like
        Tempering time, h.
    core_hardness_hrc : array_like
        Core hardness at the section after quench and temper, HRC (a floor).
    quench_temp_c : array_like
        Temperature the quench reaches, °C.
    method, ms_method : str
        Diffusivity (:func:`carbon_diffusivity_m2_s`) and Ms
        (:func:`martensite_start_c`) forms.
    jominy_mm : array_like, optional
        Equivalent Jominy distance at each depth, mm (default J1: fully hardening
        quench).  The route layer finds it from the quench and the section.

    Returns
    -------
    ndarray, HRC (broadcast of the inputs), never below ``core_hardness_hrc``.

    Validity
    --------
    850–1000 °C, surface carbon 0.6–1.0 %, temper 120–230 °C
    (``carburized_case_hardness``); see also the validity of each step.  Above
    0.9 % surface carbon see :func:`carburizing_cautions`.

    References
    ----------
    Crank (1975); Tibbetts (1980); ASTM A255 (IH, DI, DF); Hollomon & Jaffe (1945);
    Koistinen & Marburger (1959); Andrews (1965); ASTM E140 (HV-HRC).

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(case_hardness_profile_hrc(0.1, 925.0, 6.0, 0.8, core, 180.0, 2.0, 35.0)), 1)
    60.5
    """
    ctx = "case_hardness_profile_hrc"
    c0 = el(comp_core, "C")
    cs, c0 = _check_carbon(surface_carbon_pct, c0, ctx)
    core = np.asarray(core_hardness_hrc, float)
    if np.any(~np.isfinite(core)):
        raise InputError("core_hardness_hrc", float(np.atleast_1d(core)[0]), "a finite HRC value", ctx)
    c = carbon_profile_pct(depth_mm, temp_c, hours, cs, c0, method)
    aq = case_as_quenched_hrc(c, comp_core, jominy_mm)
    hv = case_hardness_hv(hrc_to_hv(np.clip(aq, 20.0, 68.0)), c, comp_core, temper_temp_c, temper_hours,
                          quench_temp_c, ms_method)
    return np.maximum(hv_to_hrc(hv), core)


def depth_at_hardness_mm(depth_mm, hardness, threshold):
    """Depth where a hardness profile first falls below ``threshold`` (last axis), mm.

    Linear interpolation between the grid points that bracket the first crossing;
    0 where the surface value is already below the threshold, ``inf`` where the
    profile never falls below it (the core itself is at or above the threshold).
    ``depth_mm`` and ``hardness`` broadcast; ``threshold`` broadcasts with their
    leading axes.  Units of ``hardness`` and ``threshold`` must agree (HRC or HV).

    Example (illustrative: a value of this implementation, not a published one)

    >>> import numpy as np
    >>> round(float(depth_at_hardness_mm(np.array([0.0, 1.0, 2.0]), np.array([700.0, 600.0, 400.0]), 550.0)), 2)
    1.25
    """
    prof = np.asarray(hardness, float)
    depth = np.broadcast_to(np.asarray(depth_mm, float), prof.shape)
    thr = np.broadcast_to(np.asarray(threshold, float), prof.shape[:-1])[..., None]
    n = prof.shape[-1]
    below = prof < thr
    first = np.argmax(below, axis=-1)
    any_below = below.any(axis=-1)
    idx = np.clip(first, 1, n - 1)
    take = lambda a, i: np.take_along_axis(a, i[..., None], axis=-1)[..., 0]  # noqa: E731
    h1, h0 = take(prof, idx), take(prof, idx - 1)
    x1, x0 = take(depth, idx), take(depth, idx - 1)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = np.where(h0 != h1, (h0 - thr[..., 0]) / (h0 - h1), 0.0)
    x = x0 + np.clip(frac, 0.0, 1.0) * (x1 - x0)
    surface_soft = prof[..., 0] < thr[..., 0]
    return np.where(surface_soft, 0.0, np.where(any_below, x, np.inf))


def effective_case_depth_mm(temp_c, hours, surface_carbon_pct, comp_core: Composition, temper_temp_c,
                            temper_hours, core_hardness_hrc, threshold_hrc=50.0, quench_temp_c=25.0,
                            method: str = "tibbetts", ms_method: str = CASE_MS_METHOD, n_grid: int = 241,
                            jominy_mm=None):
    """Effective case depth: depth where the hardness falls to 50 HRC (SAE J423 / ISO 2639).

    The profile of :func:`case_hardness_profile_hrc` (each depth with its own carbon
    and hardenability, at the Jominy distance ``jominy_mm``: default J1, a fully
    hardening quench) is evaluated on a grid of ``n_grid`` depths from 0 to
    6 sqrt(D t) (beyond which the carbon is within 0.01 % of the core's) for every
    element of the broadcast inputs, and the first crossing of ``threshold_hrc`` is
    interpolated linearly (:func:`depth_at_hardness_mm`).

    Returns
    -------
    ndarray, mm: 0 where the surface is below the threshold, ``inf`` where the core
    itself is at or above it (no case/core boundary by hardness).

    References
    ----------
    SAE J423 (methods of measuring case depth); ISO 2639 (case-hardened steels,
    determination of the effective case depth, 550 HV ~ 50 HRC criterion).

    Example (illustrative: a value of this implementation, not a published one)

    >>> core = {"C": 0.20, "Mn": 0.80, "Si": 0.25, "Ni": 0.55, "Cr": 0.50, "Mo": 0.20}
    >>> round(float(effective_case_depth_mm(925.0, 8.0, 0.8, core, 175.0, 2.0, 35.0)), 2)
    1.29
    """
    ctx = "effective_case_depth_mm"
    c0 = el(comp_core, "C")
    cs, c0 = _check_carbon(surface_carbon_pct, c0, ctx)
    h = _nonneg("hours", hours, ctx)
    d_s = carbon_diffusivity_m2_s(temp_c, 0.5 * (cs + c0), method)
    thr = np.asarray(threshold_hrc, float)
    core = np.asarray(core_hardness_hrc, float)
    jmm = None if jominy_mm is None else np.asarray(jominy_mm, float)
    shape = np.broadcast(np.asarray(temp_c, float), h, cs, c0, core, thr,
                         *(np.asarray(v, float) for v in comp_core.values()),
                         np.asarray(temper_temp_c if temper_temp_c is not None else 0.0, float),
                         np.asarray(temper_hours, float), np.asarray(quench_temp_c, float),
                         np.asarray(0.0 if jmm is None else jmm)).shape
    x_max = np.broadcast_to(6.0 * np.sqrt(d_s * h * 3600.0) * 1e3, shape)
    u = np.linspace(0.0, 1.0, n_grid)
    depth = x_max[..., None] * u                                     # shape + (n,)

    def ex(a):
        return np.asarray(a, float)[..., None] if np.ndim(a) else a

    comp_g = {k: ex(v) for k, v in comp_core.items()}
    prof = case_hardness_profile_hrc(depth, ex(temp_c), ex(h), ex(cs), comp_g,
                                     None if temper_temp_c is None else ex(temper_temp_c),
                                     ex(temper_hours), ex(core), ex(quench_temp_c), method, ms_method,
                                     None if jmm is None else ex(jmm))
    prof = np.broadcast_to(prof, shape + (n_grid,))
    return depth_at_hardness_mm(depth, prof, np.broadcast_to(thr, shape))
