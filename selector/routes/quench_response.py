"""As-quenched hardness across a real section: the seam between the quench models and the route layer.

Chain (each step its own published model):

1. Grossmann severity H of the medium and agitation (:mod:`selector.models.quench_severity`)
   → surface heat-transfer coefficient h = 2kH, and for a boiling liquid the ratio of its
   nucleate-boiling coefficient to 2kH;
2. transient conduction in the round bar or plate from the austenitizing temperature
   into a 40 °C bath (:mod:`selector.models.cooling`, Fourier–Bessel series) → cooling
   rate at 700 °C at each position r/R, each position at its own Biot number
   (:func:`selector.models.cooling.boiling_biot`: the outer millimetres pass 700 °C while
   the surface boils, the interior under the effective H), so surface, 3/4 radius,
   mid-radius and centre each get their own Jominy-equivalent distance;
3. the Jominy distance that cools at the same rate (Jominy cooling-rate table);
4. the ASTM A255 Jominy curve of the composition at that distance
   (:mod:`selector.models.hardenability`: IH(C) / DF(DI, d)) → as-quenched HRC;
5. percent martensite from that hardness relative to the 99.9 / 90 / 50 %-martensite
   hardness of the carbon content (:mod:`selector.models.martensite`).

Air cooling (H ≈ 0.03–0.1 in⁻¹) runs through the same chain: its Jominy-equivalent
distance lies beyond the 50 mm of the dividing factors, where the 50 mm hardness is
held; those states carry a warning that the value is an upper estimate (a
normalized structure of ferrite–pearlite or bainite is expected).

Everything is vectorised over states; the only loop is over a handful of warning
checks.  Results are estimates for preliminary selection.
"""
from __future__ import annotations

import hashlib
import threading

import numpy as np

from ..cache import evict_oldest
from ..errors import InputError
from ..models import (conversions, cooling, critical_temperatures, hardenability, quench_severity,
                      structure_tempering, validity)
from ..models.composition import el
from ..models.martensite import ih_hrc, martensite_hardness_hrc

POSITIONS = (1.0, 0.75, 0.5, 0.25, 0.0)   # r/R, surface to centre

#: lowest austenitizing temperature accepted, °C (the rate is taken at 700 °C)
MIN_AUSTENITIZE_C = 720.0
#: distance up to which the dividing factors are tabulated, mm
DF_MAX_MM = 50.0


def _as_1d(name, value, n=None):
    a = np.asarray(value)
    if a.ndim > 1:
        raise InputError(name, f"array of shape {a.shape}", "a scalar or a 1-D array of one value per state")
    return a


def di_consistency_scale(c_pct, di_mm):
    """Distance scale of the A255 fallback curve that enforces the definition of DI
    (:func:`selector.models.hardenability.di_distance_scale`; kept here for callers of the
    earlier route-layer version).  The chain no longer scales the cooling distances: the
    Jominy curve itself is read at the scaled distance."""
    return hardenability.di_distance_scale(np.asarray(c_pct, float).reshape(-1),
                                           np.asarray(di_mm, float).reshape(-1))


def _first(mask):
    return int(np.flatnonzero(mask)[0])


def martensite_pct_from_hardness(c_pct, hardness_hrc, rest_hardness_hv=None):
    """Percent martensite that gives ``hardness_hrc`` at carbon ``c_pct``.

    Closed-form inverse of :func:`selector.models.martensite.martensite_hardness_hrc`
    (piecewise linear between its 50, 90 and 99.9 % curves), clipped to 0–99.9 %.
    Below 50 %: with ``rest_hardness_hv`` (the hardness of the non-martensitic products,
    HV; :func:`as_quenched_profile` takes their Maynier et al. (1978) hardness at the slow
    end of the A255 curve), linear in HV between that hardness (0 %) and the 50 % curve,
    so that the linear mixture rule of Maynier et al. stays close to the chain's hardness
    with this fraction; without it (or where the products would be as hard as the 50 %
    structure), linear extrapolation of the 50–90 % slope.
    """
    c = np.asarray(c_pct, float)
    h = np.asarray(hardness_hrc, float)
    h100 = martensite_hardness_hrc(c, 99.9)
    h90 = martensite_hardness_hrc(c, 90.0)
    h50 = martensite_hardness_hrc(c, 50.0)
    d_hi = np.maximum(h100 - h90, 1e-9)
    d_lo = np.maximum(h90 - h50, 1e-9)
    below = 50.0 - 40.0 * (h50 - h) / d_lo
    if rest_hardness_hv is not None:
        hv50 = _hrc_to_hv(np.broadcast_to(h50, np.broadcast_shapes(np.shape(h50), h.shape)))
        hv_rest = np.asarray(rest_hardness_hv, float)
        span = hv50 - hv_rest
        ok = span > 1.0
        mixed = 50.0 * (_hrc_to_hv(h) - hv_rest) / np.where(ok, span, 1.0)
        below = np.where(ok, mixed, below)
    m = np.where(h >= h90, 90.0 + 9.9 * (h - h90) / d_hi,
                 np.where(h >= h50, 50.0 + 40.0 * (h - h50) / d_lo, below))
    return np.clip(m, 0.0, 99.9)


def _hrc_to_hv(hrc):
    """E140 conversion; below HRC 20 extrapolated linearly along the HRC 20–22 rows (floor 100 HV)."""
    hv = conversions.hrc_to_hv(np.clip(hrc, 20.0, 68.0))
    hv20 = conversions.hrc_to_hv(20.0)
    slope = (conversions.hrc_to_hv(22.0) - hv20) / 2.0
    return np.where(hrc < 20.0, np.maximum(hv20 + slope * (hrc - 20.0), 100.0), hv)


#: content digest of the inputs -> the section-independent parts of :func:`as_quenched_profile`
#: (the recently used batches: the catalogue's compositions recur at every section; one new
#: section reads about 16 of them, the expansion's families and their cores)
_SECTION_FREE: dict = {}
#: most entries of :data:`_SECTION_FREE` (least recently used dropped first)
SECTION_FREE_ENTRIES = 128
_SECTION_FREE_LOCK = threading.Lock()


def _section_free(tag: str, comp: dict, arrays: tuple, build):
    """``build()`` (a tuple of arrays that depend on ``comp`` and ``arrays`` only, not on the
    section or the quench), kept under a digest of those inputs: a new section of the same
    states reuses them.  Copies are returned (the kept arrays are never handed out)."""
    h = hashlib.blake2b(digest_size=20)
    h.update(tag.encode())
    for k in sorted(comp):
        v = np.ascontiguousarray(comp[k], float)
        h.update(k.encode() + str(v.shape).encode() + v.tobytes())
    for v in arrays:
        v = np.ascontiguousarray(v, float)
        h.update(b"|" + str(v.shape).encode() + v.tobytes())
    key = h.hexdigest()
    with _SECTION_FREE_LOCK:
        hit = _SECTION_FREE.pop(key, None)
        if hit is not None:
            _SECTION_FREE[key] = hit                 # most recently used last
    if hit is None:
        hit = tuple(np.array(v, copy=True) for v in build())
        with _SECTION_FREE_LOCK:
            evict_oldest(_SECTION_FREE, SECTION_FREE_ENTRIES)
            _SECTION_FREE[key] = hit
    return tuple(v.copy() for v in hit)


def as_quenched_profile(comp, quench, agitation="moderate", diameter_mm=None, thickness_mm=None,
                        austenitize_c=None, grain_size_astm=7.0, positions=POSITIONS) -> dict:
    """As-quenched hardness and martensite across a round bar or plate section.

    Method: cooling rate at 700 °C (Grossmann H → Fourier–Bessel conduction) →
    Jominy-equivalent distance → ASTM A255 Jominy hardness of the composition →
    percent martensite against the carbon's 99.9 / 90 / 50 % martensite hardness.

    Parameters
    ----------
    comp : mapping
        Element → wt %, arrays of shape (n,) (scalars broadcast).
    quench, agitation : str or array of str, shape (n,)
        Quench medium (water, brine, oil, polymer, air) and agitation (none, mild,
        moderate, strong).
    diameter_mm, thickness_mm : float or array (n,)
        Round-bar diameter or plate thickness, mm (exactly one of them).
    austenitize_c : float or array (n,), optional
        Austenitizing temperature, °C; None (or NaN entries) → Andrews Ac3 + 40 °C
        (hypereutectoid: Ac1 + 50 °C), :func:`critical_temperatures.default_austenitize_c`.
    grain_size_astm : float or array (n,)
        ASTM austenite grain size (default 7, the A255 basis).
    positions : sequence of float
        r/R (bar) or x/L (plate), 1 = surface, 0 = centre.

    Returns
    -------
    dict
        ``positions`` (n_pos,); ``hardness_hrc``, ``hardness_hv``, ``martensite_pct``,
        ``jominy_mm``, ``cooling_rate_c_s`` (n, n_pos: the effective rate at 700 °C, conduction
        rate × the chart-anchored factor of :func:`cooling.jominy_rate_factor`, the rate the Jominy
        table is read with), ``conduction_rate_c_s`` (n, n_pos: the constant-property series alone,
        each position at its boiling-stage Biot number, :func:`cooling.boiling_biot`);
        ``di_mm``, ``ms_c``, ``ac1_c``,
        ``ac3_c``, ``austenitize_c`` (n,); ``warnings`` (list of str naming the states).

    Raises
    ------
    InputError
        Unknown medium/agitation, both or neither size given, non-positive size,
        austenitize_c ≤ 720 °C, positions outside 0–1.

    References
    ----------
    Grossmann (1952); Carslaw & Jaeger (1959); ASTM A255-10; Hodge & Orehoski (1946).
    """
    pos = np.asarray(positions, float)
    if pos.ndim != 1 or pos.size == 0 or np.any(pos < 0) or np.any(pos > 1):
        raise InputError("positions", positions, "a 1-D sequence of r/R values in [0, 1]")
    if (diameter_mm is None) == (thickness_mm is None):
        raise InputError("diameter_mm/thickness_mm", (diameter_mm, thickness_mm),
                         "exactly one of diameter_mm (round bar) or thickness_mm (plate)")
    size_name = "diameter_mm" if diameter_mm is not None else "thickness_mm"
    size = _as_1d(size_name, diameter_mm if diameter_mm is not None else thickness_mm).astype(float)
    q = _as_1d("quench", quench)
    a = _as_1d("agitation", agitation)
    g = _as_1d("grain_size_astm", grain_size_astm).astype(float)
    comp1 = {k: _as_1d(k, v).astype(float) for k, v in comp.items()}
    shapes = [v.shape for v in comp1.values()] + [size.shape, q.shape, a.shape, g.shape]
    t0_in = None if austenitize_c is None else _as_1d("austenitize_c", austenitize_c).astype(float)
    if t0_in is not None:
        shapes.append(t0_in.shape)
    shape = np.broadcast_shapes(*shapes)
    n = shape[0] if shape else 1
    bc = lambda x: np.broadcast_to(x, (n,))  # noqa: E731
    comp1 = {k: bc(v) for k, v in comp1.items()}
    size, q, a, g = bc(size), bc(q), bc(a), bc(g)

    warnings: list[str] = []

    def warn(mask, text, detail):
        mask = np.asarray(mask, bool)
        if mask.any():
            i = _first(mask)
            warnings.append(f"{text} for {int(mask.sum())} of {n} states (first: state {i}, {detail(i)})")

    # temperatures (of the composition only: kept across sections, _section_free)
    def temperatures():
        return (np.asarray(critical_temperatures.ac1_c(comp1), float) * np.ones(n),
                np.asarray(critical_temperatures.ac3_c(comp1), float) * np.ones(n),
                np.asarray(critical_temperatures.ms_c(comp1), float) * np.ones(n),
                np.asarray(critical_temperatures.default_austenitize_c(comp1), float) * np.ones(n))

    ac1, ac3, ms, t_default = _section_free("temperatures", comp1, (), temperatures)
    if t0_in is None:
        t0 = t_default
    else:
        t0 = np.where(np.isnan(bc(t0_in)), t_default, bc(t0_in))
        given_low = ~np.isnan(bc(t0_in)) & (bc(t0_in) <= MIN_AUSTENITIZE_C)
        if given_low.any():
            i = _first(given_low)
            raise InputError("austenitize_c", float(bc(t0_in)[i]),
                             f"temperatures above {MIN_AUSTENITIZE_C:g} C (state {i})")
    low = t0 <= MIN_AUSTENITIZE_C + 30.0
    warn(low, f"default austenitizing temperature below {MIN_AUSTENITIZE_C + 30:.0f} C raised to that value",
         lambda i: f"{t0[i]:.0f} C")
    t0 = np.maximum(t0, MIN_AUSTENITIZE_C + 30.0)
    hypo = el(comp1, "C") * np.ones(n) < critical_temperatures.EUTECTOID_C
    warn(hypo & (t0 < ac3 - 1e-9), "austenitizing temperature below Andrews Ac3 (intercritical: ferrite remains)",
         lambda i: f"{t0[i]:.0f} C < Ac3 {ac3[i]:.0f} C")

    # quench severity -> cooling
    h_in = np.asarray(quench_severity.grossmann_h_per_in(q, a), float)
    h_w = quench_severity.heat_transfer_coefficient_w_m2k(h_in, cooling.K_STEEL_W_MK)
    # the boiling stage of a liquid quench governs the cooling of the outer millimetres
    # (quench_severity.boiling_peak, cooling.boiling_biot): each position its own Biot number
    peak_ratio, peak_depth = quench_severity.boiling_peak(q, a)
    kw = {size_name: size}
    rate_conduction = cooling.cooling_rate_at_c_s(h_w, positions=tuple(pos), austenitize_c=t0,
                                                  peak_ratio=peak_ratio, peak_depth_mm=peak_depth, **kw)
    bi = cooling.biot_number(h_w, **kw)
    # Bi outside the conduction table and the chart-anchored rate factor: the route's
    # model_inputs (quench_cooling, jominy_rate_factor), checked by routes.evaluate.finish

    # Jominy equivalence and A255 hardness
    # carbon in austenite: the steel's carbon, or for hypereutectoid steels what the Acm line lets
    # the austenite hold at t0 (hardenability.austenite_carbon_pct; the fallback above 0.70 % C)
    c_steel = el(comp1, "C") * np.ones(n)

    def hardenability_part():
        c_ = hardenability.austenite_carbon_pct(c_steel, t0, el(comp1, "Cr") * np.ones(n))
        comp_aus_ = dict(comp1, C=c_)
        di_ = np.asarray(hardenability.di_mm(comp_aus_, g), float) * np.ones(n)
        # below 50 % martensite the fraction is read against the Maynier (1978) hardness of the
        # non-martensitic products (structure_tempering.constituents with no martensite) at the
        # rate of the slow end of the A255 curve (J = 50 mm, where the chain holds its hardness):
        # one anchor per composition, so the fraction falls monotonically with the rate, as the hardness
        rate_slow = np.broadcast_to(cooling.jominy_rate_c_s(DF_MAX_MM), (n, 1))
        rest = structure_tempering.constituents({k: np.asarray(v, float)[:, None] for k, v in comp_aus_.items()},
                                                np.zeros((n, 1)), rate_slow)
        return (c_, di_, ih_hrc(c_)[:, None], hardenability.di_distance_scale(c_, di_)[:, None],
                rest["x_b"] * rest["hv_b"] + rest["x_fp"] * rest["hv_fp"])

    # of the composition, austenitizing temperature and grain size only: kept across sections
    c, di, ih_c, di_scale, slow_hv = _section_free("hardenability", comp1, (t0, g), hardenability_part)
    # bar-to-Jominy equivalence on the chart-anchored effective rate (cooling.jominy_rate_factor)
    rate = rate_conduction * cooling.jominy_rate_factor()
    jmm = cooling.jominy_equivalent_mm(rate)
    # A255 curve read at the DI-consistent distance (hardenability.di_distance_scale)
    hrc = ih_c / hardenability.dividing_factor(di[:, None], hardenability.scaled_distance_mm(jmm, di_scale))
    mart = martensite_pct_from_hardness(c[:, None], hrc, slow_hv)
    hv = _hrc_to_hv(hrc)

    # metallurgical warnings, each naming the states (the registered validity ranges: the
    # route's model_inputs, checked by routes.evaluate.finish)
    warn(np.any(jmm > DF_MAX_MM, axis=1),
         "Jominy-equivalent distance beyond 50 mm (slow cooling, e.g. air): hardness is the 50 mm value, "
         "an upper estimate", lambda i: f"{q[i]}/{a[i]}, {size[i]:g} mm, J = {jmm[i].max():.0f} mm")
    warn(c_steel > hardenability.A255_C_MAX + 1e-9,
         "C above 0.70 wt%, outside the ASTM A255 calculation: fallback (carbon in austenite from the "
         "Fe-Fe3C Acm line at the austenitizing temperature, A255 carbon factor fitted to 0.90 % C, "
         "initial hardness held at its 0.70 % C value; docs/methods/hardenability.md)",
         lambda i: f"C = {c_steel[i]:.2f} wt%, in austenite {c[i]:.2f} wt% at {t0[i]:.0f} C")
    centre = int(np.argmin(pos))
    warn(mart[:, centre] < 50.0, "as-quenched centre below 50 % martensite (not through-hardened)",
         lambda i: f"{q[i]}/{a[i]}, {size_name} = {size[i]:g}, centre {mart[i, centre]:.0f} % martensite")
    warn(np.any(hrc < 20.0, axis=1), "hardness below HRC 20: HV extrapolated below ASTM E140 Table 1",
         lambda i: f"{hrc[i].min():.1f} HRC")

    return {
        "positions": pos,
        "hardness_hrc": hrc,
        "hardness_hv": hv,
        "martensite_pct": mart,
        "jominy_mm": jmm,
        "cooling_rate_c_s": rate,
        "conduction_rate_c_s": rate_conduction,
        "di_mm": di,
        "ms_c": ms,
        "ac1_c": ac1,
        "ac3_c": ac3,
        "austenitize_c": t0,
        "warnings": warnings,
        # the inputs of the chain's models, for the route's validity checks
        "h_per_in": h_in,
        "biot": bi,
        "peak_ratio": np.asarray(peak_ratio, float) * np.ones(n),
        "theta": (700.0 - cooling.BATH_C) / (t0 - cooling.BATH_C),   # rate taken at 700 C (cooling_rate_at_c_s)
        "steel_carbon_pct": c_steel,
        "austenite_carbon_pct": c,
        "grain_size_astm": g,
    }
