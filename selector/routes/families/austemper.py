"""Austempering and martempering: quench into a hot bath, hold, cool (the salt-bath routes).

Steps::

    [{"op": "austemper", "bath_c": 315, "hours": 1}]                  # optional "austenitize_c"
    [{"op": "martemper", "bath_c": 230}, {"op": "temper", "temp_c": 200, "hours": 2}]

Chain of models (published models of the package; nothing is fitted here):

1. **Cooling into the bath.** The bar (or plate) is quenched into a salt bath taken as
   strongly agitated oil (Grossmann H from ``data/quench_severity.csv``; agitated
   nitrate-nitrite salt quenches about like agitated oil: ASM Handbook Vol. 4 (1991),
   austempering of steel, from memory).  The centre's temperature path comes from the
   conduction series (:mod:`selector.models.bath_quench`, Carslaw & Jaeger 1959).
2. **Products on the way to the bath.** Along the centre's path, until it is within
   :data:`AT_BATH_C` of the bath, the ferrite and pearlite reactions progress by Scheil
   (1935) additivity of the Li et al. (1998) kinetics
   (:func:`selector.models.transformation.path_progress`): ferrite up to its lever-rule
   share (hypoeutectoid steels), pearlite from the austenite left.  Their sum is
   ``non_bainitic_pct`` (ferrite + pearlite at the centre).
3. **Section limit** (``section_limit_mm``, every state): the largest round diameter (or
   plate thickness) whose centre reaches the bath before ferrite or pearlite *starts*
   (Scheil sum of the 1 % start times < 1), by the same model on :data:`LIMIT_SIZES_MM`,
   interpolated in log–log.  A section above it gets a caution (the centre forms some
   ferrite/pearlite; the amount is in ``non_bainitic_pct``).
4. **Austempering hold.** Bainite progress at the bath temperature in the hold time (Li et
   al. 1998 bainite kinetics, normalised progress X from S(X) = t/τ₁, the carbon of the
   rate constant held at the fit's 0.6 % for high-carbon steels: see
   :func:`selector.models.transformation.isothermal_time_s`); the austenite left
   transforms to fresh martensite on cooling by Koistinen–Marburger (1959) from the Li
   Ms; what is left of it is retained austenite (``retained_austenite_pct``).
5. **Martempering.** The bath lies just above Ms; the hold equalises the temperature (no
   transformation is taken) and the part becomes martensite on air cooling
   (Koistinen–Marburger), then the temper of the route uses the Q&T tempering model
   (:func:`selector.models.tempering.tempered_hv`).
6. **Hardness.** Rule of mixtures (Maynier et al. 1978, :func:`~selector.models.phase_hardness.mixture_hv`)
   of: the bainite formed at the bath temperature
   (:func:`selector.models.phase_hardness.isothermal_bainite_hv`, eutectoid isothermal
   hardness curve scaled by carbon, capped at the martensite of the steel tempered at the
   bath temperature for the hold); fresh martensite (ASTM A255 initial hardness);
   ferrite–pearlite (Maynier 1978 at the centre's cooling rate at 700 °C).  Then tensile
   strength by ASTM E140/A370 and yield/elongation by the Q&T correlations (yield taken
   at the bath temperature as its "tempering" temperature, an approximation).

Selection expands both routes over the grade's window: austemper over the bath
temperature (10 °C steps) at the default hold, martemper over the temper temperature
(25 °C steps) at the default bath.  Windows: ``data/bath_route_windows.csv`` (grade,
then family rows) before ``data/route_windows.csv``.

References
----------
M.V. Li, D.V. Niebuhr, L.L. Meekisho, D.G. Atteridge, Metall. Mater. Trans. B 29B (1998) 661.
E. Scheil, Arch. Eisenhüttenwes. 8 (1935) 565.
D.P. Koistinen, R.E. Marburger, Acta Metall. 7 (1959) 59.
Ph. Maynier, B. Jungmann, J. Dollet, in Hardenability Concepts with Applications to Steel,
TMS-AIME (1978) 518.
US Steel, Atlas of Isothermal Transformation Diagrams (1951) (isothermal bainite hardness).
ASM Handbook Vol. 4, Heat Treating (1991): austempering of steel; martempering of steel
(process windows, from memory).
"""
from __future__ import annotations

import functools

import numpy as np

from ...catalogue.loader import CONFIDENCE, Column, Schema, read_table
from ...errors import NotModelledError
from ...models import (bath_quench, conversions, cooling, correlations, phase_hardness, quench_severity,
                       tempering, transformation, validity)
from ...models.composition import el
from ...models.martensite import ih_hrc, martensite_hardness_hrc
from ..model_inputs import uses
from .base import Batch, RouteFamily, distinct_rows, product_grid
from .quench_temper import _by_class, _yield, batch_class, default_austenitize_c

STEEL = ("carbon_steel", "alloy_steel")
#: the salt bath is taken as strongly agitated oil (see the module docstring)
BATH_MEDIUM = bath_quench.BATH_MEDIUM
#: the centre counts as "at the bath" within this many °C
AT_BATH_C = 10.0
TIMES_S = bath_quench.TIMES_S
ROOM_C = 25.0
#: sizes (mm) on which the section limit is searched (log-spaced, 1-200 mm, ratio 1.7; the Scheil
#: sum is close to a power of the size, so log-log interpolation between them is enough)
LIMIT_SIZES_MM = np.geomspace(1.0, 200.0, 11)
#: bainite progress below which the hold is reported incomplete
COMPLETE_X = 0.95
#: the martempering bath of the selection grid sits this far above the Li Ms, °C; the austempering grid
#: keeps baths at least this far above it
MARTEMPER_ABOVE_MS_C = 10.0
#: the selection grid holds this many times the 95 % bainite time (see Austemper.hold_for)
HOLD_MARGIN = 1.25
#: step of the austemper bath grid and of the martemper temper grid, °C
BATH_STEP_C = 10.0
TEMPER_STEP_C = 25.0

_WINDOW_SCHEMA = Schema((Column("scope"), Column("route", "choice", choices=("austemper", "martemper")),
                         Column("parameter", "choice", choices=("bath_c", "hold_hours", "temper_temp_c")),
                         Column("min", "float", lo=0, hi=1000), Column("max", "float", lo=0, hi=1000),
                         Column("default", "float", lo=0, hi=1000), Column("unit"), Column("source"),
                         Column("confidence", "choice", choices=CONFIDENCE)))


@functools.cache
def _window_rows() -> dict:
    t = read_table("bath_route_windows.csv", _WINDOW_SCHEMA)
    return {(r.scope, r.route, r.parameter): (float(r.min), float(r.max), float(r.default), r.unit, r.source)
            for r in t.itertuples(index=False)}


def window(grade, route: str, parameter: str):
    """``(min, max, default, unit, source)`` of a bath-route parameter for ``grade``: its grade
    row in ``data/bath_route_windows.csv``, else its family row there, else
    ``data/route_windows.csv``; None when none."""
    rows = _window_rows()
    for scope in (grade.id, grade.family):
        if (scope, route, parameter) in rows:
            return rows[(scope, route, parameter)]
    w = grade.window(route, parameter)
    if w is not None and w.min == w.min and w.max == w.max:
        return (w.min, w.max, w.default, w.unit, w.source)
    return None


def _h_w_m2k():
    return bath_quench.bath_h_w_m2k()


def _states_comp(comp, n):
    return {k: np.broadcast_to(np.asarray(v, float), (n,)) for k, v in comp.items()}


#: the centre's relative temperature (T − bath)/(austenitize − bath), clipped to 0–1, on TIMES_S, keyed
#: by (heat-transfer coefficient, round, size mm): it depends on the size only, so every bath, austenitizing
#: temperature, composition and selection reuses it
_THETA_CACHE: dict = {}
_THETA_CACHE_MAX = 20_000


def _centre_theta(size_mm: np.ndarray, round_: np.ndarray) -> np.ndarray:
    """Relative centre temperatures (u, len(TIMES_S)) of distinct sizes (rounds where ``round_``,
    else plates), from :func:`bath_quench.path_temperature_c` with austenitize 1 and bath 0
    (which returns 0 + (1 − 0)·clip(θ), that is clip(θ) itself), cached."""
    h = _h_w_m2k()
    keys = [(h, bool(r), float(v)) for v, r in zip(size_mm, round_)]
    todo = [i for i, k in enumerate(keys) if k not in _THETA_CACHE]
    if todo:
        if len(_THETA_CACHE) + len(todo) > _THETA_CACHE_MAX:
            _THETA_CACHE.clear()
            todo = list(range(len(keys)))
        sz, rd = size_mm[todo], round_[todo]
        theta = bath_quench.path_temperature_c(h, TIMES_S, np.where(rd, sz, np.nan), np.where(rd, np.nan, sz),
                                               0.0, 1.0, 0.0)
        for i, row in zip(todo, theta):
            _THETA_CACHE[keys[i]] = row
    return np.stack([_THETA_CACHE[k] for k in keys]) if keys else np.zeros((0, len(TIMES_S)))


def _centre_paths(aust, bath, diameter_mm, thickness_mm, n) -> np.ndarray:
    """:func:`bath_quench.path_temperature_c` at the centre of ``n`` states: the relative path
    :func:`_centre_theta` of each distinct size, then bath + (austenitize − bath)·θ per state
    (the numbers of the per-state call: the composition does not enter the path)."""
    d = np.broadcast_to(np.asarray(np.nan if diameter_mm is None else diameter_mm, float), (n,))
    t = np.broadcast_to(np.asarray(np.nan if thickness_mm is None else thickness_mm, float), (n,))
    round_ = np.isfinite(d)
    size = np.where(round_, d, t)
    first, inv = distinct_rows(np.ascontiguousarray(np.column_stack([size, round_.astype(float)])).view(np.int64))
    theta = _centre_theta(size[first], round_[first])
    tb = np.broadcast_to(np.asarray(bath, float), (n,))[:, None]
    t0 = np.broadcast_to(np.asarray(aust, float), (n,))[:, None]
    return tb + (t0 - tb) * theta[inv]


def products_to_bath(comp, austenitize_c, bath_c, diameter_mm=None, thickness_mm=None):
    """Ferrite + pearlite formed at the centre before it reaches the bath, and the Scheil
    start sum, for ``n`` states (Li et al. 1998 kinetics, Scheil additivity).

    Parameters
    ----------
    comp : mapping
        Element → wt %, arrays (n,) or scalars.
    austenitize_c, bath_c : array_like
        °C, (n,).
    diameter_mm, thickness_mm : array_like
        Round diameter (NaN for a plate) and plate thickness, mm, (n,).

    Returns
    -------
    dict of ndarray (n,)
        ``ferrite``, ``pearlite`` (fractions of the whole), ``start_sum`` (≥ 1: ferrite or
        pearlite has started at the centre before it reached the bath).
    """
    aust = np.atleast_1d(np.asarray(austenitize_c, float))
    bath = np.atleast_1d(np.asarray(bath_c, float))
    n = max(len(aust), len(bath))
    aust, bath = np.broadcast_to(aust, (n,)), np.broadcast_to(bath, (n,))
    c = _states_comp(comp, n)
    return _products_on_paths(c, bath, _centre_paths(aust, bath, diameter_mm, thickness_mm, n))


def _products_on_paths(c, bath, temp):
    """:func:`products_to_bath` of ``n`` states from their centre's paths ``temp`` (n, len(TIMES_S))."""
    mid = 0.5 * (temp[:, 1:] + temp[:, :-1])
    moving = mid > bath[:, None] + AT_BATH_C
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        xp, sp = transformation.path_progress(c, TIMES_S, temp, "pearlite", active=moving)
        xf, sf = transformation.path_progress(c, TIMES_S, temp, "ferrite", active=moving)
    carbon = np.asarray(el(c, "C"), float)
    hypo = carbon < transformation.EUTECTOID_C
    xeq = np.clip((transformation.EUTECTOID_C - carbon) / transformation.EUTECTOID_C, 0.0, 1.0)
    f_f = np.where(hypo, xeq * xf, 0.0)
    f_p = (1.0 - f_f) * xp
    start = np.where(hypo, np.maximum(sp, sf), sp)
    return {"ferrite": f_f, "pearlite": f_p, "start_sum": start}


def scheil_to_bath(comp, austenitize_c, bath_c, diameter_mm=None, thickness_mm=None):
    """Scheil sum of the ferrite/pearlite start along the centre's path into the bath (n,);
    >= 1 means the centre starts to transform before it reaches the bath."""
    return products_to_bath(comp, austenitize_c, bath_c, diameter_mm, thickness_mm)["start_sum"]


def bainite_progress(comp, bath_c, hours):
    """Normalised bainite progress X (0–1) after ``hours`` at ``bath_c`` (Li et al. 1998,
    the carbon of the rate constant held at the fit's upper end, :data:`transformation.LI_MAX_C`)."""
    tau1 = (transformation.isothermal_time_s(comp, bath_c, 0.5, "bainite",
                                             bainite_carbon_cap_pct=transformation.LI_MAX_C)
            / transformation.s_integral(0.5))
    xs = np.linspace(0.0, 0.999, 2001)
    s = transformation.s_integral(xs)
    return np.interp(np.asarray(hours, float) * 3600.0 / tau1, s, xs)


def section_limit_mm(comp, austenitize_c, bath_c, plate=False):
    """Largest round diameter (``plate``: plate thickness), mm, whose centre reaches the bath
    before ferrite or pearlite starts, for ``n`` states: :func:`scheil_to_bath` on
    :data:`LIMIT_SIZES_MM`, the crossing of the sum through 1 interpolated in log–log; the
    largest size when every size passes, 0 when the smallest fails.

    The sizes are evaluated in increasing order, each on the rows whose sum is still below 1
    (the limit reads the sums only up to the first size at or over 1, so this gives the numbers
    of evaluating every size for every row), and the centre's path is taken once per distinct
    (austenitize_c, bath_c) pair and size (:func:`_centre_paths`).

    Returns
    -------
    ndarray (n,), mm (a float for scalar input).
    """
    scalar = np.ndim(bath_c) == 0 and np.ndim(austenitize_c) == 0
    aust = np.atleast_1d(np.asarray(austenitize_c, float))
    bath = np.atleast_1d(np.asarray(bath_c, float))
    n = max(len(aust), len(bath), *[np.size(v) for v in comp.values()])
    sizes = LIMIT_SIZES_MM
    comp_n = {e: np.broadcast_to(np.asarray(v, float), (n,)) for e, v in comp.items()}
    aust, bath = np.broadcast_to(aust, (n,)), np.broadcast_to(bath, (n,))
    # the sizes in increasing order, each on the rows whose sum has not yet reached 1: the limit
    # reads the sums up to the first size at or over 1 only (entries after it stay +inf, "over")
    # (the centre's paths depend on the temperatures and the size only: computed once per distinct
    # (austenitize_c, bath_c) pair and size, row p * k + i for pair p and size i)
    k = len(sizes)
    first, pair = distinct_rows(np.ascontiguousarray(np.column_stack([aust, bath])).view(np.int64))
    dd = np.tile(sizes, len(first))
    paths = _centre_paths(np.repeat(aust[first], k), np.repeat(bath[first], k), None if plate else dd,
                          dd if plate else None, len(dd))
    s = np.full((n, k), np.inf)
    alive = np.arange(n)
    for i in range(k):
        c = {e: v[alive] for e, v in comp_n.items()}
        s[alive, i] = _products_on_paths(c, bath[alive], paths[pair[alive] * k + i])["start_sum"]
        alive = alive[~(s[alive, i] >= 1.0)]
        if len(alive) == 0:
            break
    ls = np.log(np.maximum(s, 1e-12))
    over = s >= 1.0
    j = np.argmax(over, axis=1)
    jm = np.maximum(j - 1, 0)
    rows = np.arange(n)
    l0, l1 = ls[rows, jm], ls[rows, j]
    f = np.where(l1 != l0, (0.0 - l0) / np.where(l1 != l0, l1 - l0, 1.0), 0.0)
    lsz = np.log(sizes)
    out = np.exp(lsz[jm] + np.clip(f, 0.0, 1.0) * (lsz[j] - lsz[jm]))
    out = np.where(~over.any(axis=1), sizes[-1], np.where(over[:, 0], 0.0, out))
    return float(out[0]) if scalar else out


#: section limits already computed, keyed by (elements, composition + temperatures row, plate): the
#: limit does not depend on the section, so a selection at a new section reuses them
_LIMIT_CACHE: dict = {}
_LIMIT_CACHE_MAX = 50_000


def _cached_limits(elements: tuple, rows: np.ndarray, plate: bool) -> np.ndarray:
    """:func:`section_limit_mm` of each row of ``rows`` (columns: ``elements``, austenitize_c,
    bath_c), computed once per distinct row and kept."""
    keys = [(elements, r.tobytes(), plate) for r in rows]
    todo = [i for i, k in enumerate(keys) if k not in _LIMIT_CACHE]
    if todo:
        if len(_LIMIT_CACHE) + len(todo) > _LIMIT_CACHE_MAX:
            _LIMIT_CACHE.clear()
        new = rows[todo]
        vals = section_limit_mm({e: new[:, i] for i, e in enumerate(elements)}, new[:, -2], new[:, -1],
                                plate=plate)
        for i, v in zip(todo, np.atleast_1d(vals)):
            _LIMIT_CACHE[keys[i]] = float(v)
    return np.array([_LIMIT_CACHE[k] for k in keys], float)


def _fresh_martensite_hv(comp):
    return np.asarray(conversions.hrc_to_hv(ih_hrc(el(comp, "C"))), float)


#: the models of both bath routes: the centre's cooling into the bath, Maynier phase hardness,
#: Li et al. kinetics, E140 strength and the strength correlations
BATH_INPUTS = (
    uses("grossmann_h", "h_per_in") + uses("quench_cooling", "biot", "theta")
    + uses("maynier_1978", "C", "Si", "Mn", "Ni", "Cr", "Mo", "V") + uses("li_1998", "C", "Mn", "Ni", "Cr", "Mo")
    + uses("astm_e140", "hardness_hv")
    + uses("qt_correlations", "uts_mpa", temper_temp_c="correlation_temper_c", where="alloy_class")
    + uses("qt_correlations_carbon", "uts_mpa", where="carbon_class")
)


class _BathRoute(RouteFamily):
    families = STEEL
    model_inputs = BATH_INPUTS
    references = (
        "Li, Niebuhr, Meekisho & Atteridge, Metall. Mater. Trans. B 29B (1998) 661 (transformation kinetics)",
        "Scheil, Arch. Eisenhüttenwes. 8 (1935) 565 (additivity); Koistinen & Marburger, Acta Metall. 7 (1959) 59",
        "Maynier, Jungmann & Dollet, TMS-AIME (1978) 518 (phase hardness, mixture rule)",
        "US Steel, Atlas of Isothermal Transformation Diagrams (1951): hardness of isothermal bainite (from memory)",
        "ASM Handbook Vol. 4 (1991): austempering and martempering of steel (process windows, from memory)",
    )
    op = ""
    #: keys of the result that evaluate() reports besides the common ones
    result_keys = ("section_limit_mm", "bainite_pct", "non_bainitic_pct", "retained_austenite_pct")
    #: validity of the route, as declared per family (models and ranges it relies on)

    def _parse_bath(self, steps, grade):
        self.require_family(grade)
        s = next(x for x in steps if x["op"] == self.op)
        aust = s.get("austenitize_c")
        if aust is None:
            aust = default_austenitize_c(grade)
        return s, float(aust)

    def _default(self, grade, parameter, fallback):
        w = window(grade, self.name, parameter)
        return fallback if w is None or w[2] != w[2] else float(w[2])

    def _warnings(self, grade, params):
        out = []
        for name, v in params.items():
            w = window(grade, self.name, name)
            if w is None or v is None or v != v or name == "austenitize_c":
                continue
            lo, hi, _, unit, src = w
            if not (lo - 1e-9 <= v <= hi + 1e-9):
                out.append(f"{name} = {v:g} {unit} is outside the usual window {lo:g}–{hi:g} {unit} for "
                           f"{grade.id} ({src}); the estimate is extrapolated")
        return out

    def _axis(self, grade, parameter, fallback, step):
        w = window(grade, self.name, parameter)
        lo, hi = (fallback if w is None else (w[0], w[1]))
        return np.arange(np.ceil(lo / step) * step, hi + 1e-9, step)

    def _common(self, batch, fractions_fn):
        p = batch.params
        comp = batch.comp
        aust = np.asarray(p["austenitize_c"], float)
        bath = np.asarray(p["bath_c"], float)
        round_ = np.isfinite(batch.diameter_mm)
        d = batch.diameter_mm if round_.any() else None
        t = None if round_.all() else batch.thickness_mm
        plate = not round_.any()
        # the products on the way and the limit depend on composition, temperatures and size only:
        # computed once per distinct row (a martemper grid repeats them over its temper axis)
        elements = sorted(comp)
        section = np.where(round_, batch.diameter_mm, batch.thickness_mm)
        key = np.stack([np.broadcast_to(np.asarray(comp[e], float), (batch.n,)) for e in elements]
                       + [aust, bath, section], axis=1)
        uniq, inv = transformation.unique_rows(key)
        ucomp = {e: uniq[:, i] for i, e in enumerate(elements)}
        ua, ub, us = uniq[:, -3], uniq[:, -2], uniq[:, -1]
        prod = {k: v[inv] for k, v in products_to_bath(ucomp, ua, ub, None if plate else us,
                                                        us if plate else None).items()}
        f_np = np.clip(prod["ferrite"] + prod["pearlite"], 0.0, 1.0)
        lk, linv = transformation.unique_rows(uniq[:, :-1])
        limit = _cached_limits(tuple(elements), lk, plate)[linv][inv]
        rate = cooling.cooling_rate_at_c_s(_h_w_m2k(), d if not plate else None, batch.thickness_mm if plate else None,
                                           positions=(0.0,), austenitize_c=np.maximum(aust, 720.0),
                                           bath_c=np.minimum(bath, 650.0))[..., 0]
        rate = np.maximum(np.asarray(rate, float), 1e-3)
        _, _, hv_fp = phase_hardness.phase_hardness_hv(comp, rate)
        ms = transformation.ms_li_c(comp)
        bs = transformation.bs_li_c(comp)
        x_b, hv_b, notes = fractions_fn(comp, bath, ms, bs)
        f_b = (1.0 - f_np) * x_b
        km = 1.0 - np.exp(-transformation.KM_ALPHA * np.maximum(ms - ROOM_C, 0.0))
        f_m = (1.0 - f_np - f_b) * km
        f_ra = np.clip(1.0 - f_np - f_b - f_m, 0.0, 1.0)
        hv_m = _fresh_martensite_hv(comp)
        hv = phase_hardness.mixture_hv([f_m, f_b, f_np], [hv_m, hv_b, hv_fp])
        return {"hv": hv, "hv_m": hv_m, "f_b": f_b, "f_m": f_m, "f_np": f_np, "f_ra": f_ra,
                "ms": ms, "bs": bs, "bath": bath, "start": prod["start_sum"], "limit": limit,
                "over": section > limit, "notes": notes}

    def _finish(self, batch, c, hv, temper_c):
        cls = batch_class(batch)
        uts = conversions.hv_to_uts_mpa(hv)
        res = {"hardness_hv": hv, "surface_hardness_hv": hv, "center_hardness_hv": hv,
               "uts_mpa": uts, "yield_mpa": _yield(uts, temper_c, cls),
               "elongation_pct": _by_class(correlations.elongation_from_uts, uts, cls),
               "reduction_area_pct": _by_class(correlations.reduction_of_area_from_uts, uts, cls),
               "case_depth_mm": np.zeros(batch.n), "center_martensite_pct": 100.0 * c["f_m"],
               "bainite_pct": 100.0 * c["f_b"], "non_bainitic_pct": 100.0 * c["f_np"],
               "retained_austenite_pct": 100.0 * c["f_ra"], "section_limit_mm": c["limit"],
               "ms_c": c["ms"], "bs_c": c["bs"]}
        notes = list(c["notes"])
        unit = "diameter" if np.isfinite(batch.diameter_mm).all() else "thickness"
        notes.append((f"section above this route's limit (the largest {unit} whose centre reaches the bath before "
                      "ferrite or pearlite starts, section_limit_mm; Li et al. 1998 kinetics, Scheil additivity): "
                      "the centre forms some ferrite/pearlite (non_bainitic_pct) and is softer; choose a more "
                      "hardenable grade or a smaller section", c["over"]))
        notes.append(("ferrite/pearlite is most of the centre: the bath route does not work at this section",
                      c["f_np"] > 0.5))
        notes.append(("retained austenite above 10 % at room temperature (Koistinen–Marburger from the Li Ms): "
                      "dimensional instability and softer than estimated; a sub-zero treatment or a temper is usual "
                      "(common practice)", c["f_ra"] > 0.10))
        d = None if np.all(np.isnan(batch.diameter_mm)) else batch.diameter_mm
        t = None if d is not None else batch.thickness_mm
        aust = np.asarray(batch.params["austenitize_c"], float)
        tc = np.asarray(temper_c, float)
        res["model_inputs"] = {
            "h_per_in": np.full(batch.n, float(quench_severity.grossmann_h_per_in(*BATH_MEDIUM))),
            "biot": np.broadcast_to(cooling.biot_number(_h_w_m2k(), d, t), (batch.n,)),
            # the centre's rate is taken at 700 C on the way into the bath (cooling_rate_at_c_s)
            "theta": (700.0 - c["bath"]) / (aust - c["bath"]),
            "alloy_class": cls != "carbon_steel", "carbon_class": cls == "carbon_steel",
            "correlation_temper_c": np.where(np.isfinite(tc), tc, 150.0),
            "bath_c": np.broadcast_to(np.asarray(c["bath"], float), (batch.n,))}
        res["notes"] = notes
        return res


class Austemper(_BathRoute):
    name = "austemper"
    label = "austemper"
    op = "austemper"
    patterns = (("austemper",),)
    main_parameter = "bath_c"
    parameters = ("austenitize_c", "bath_c", "hold_hours")
    #: the bath chain, and the bainite's hardness read at the bath temperature
    model_inputs = BATH_INPUTS + uses("isothermal_bainite", "C", temp_c="bath_c")

    def parse(self, steps, grade):
        s, aust = self._parse_bath(steps, grade)
        hours = s.get("hours")
        params = {"austenitize_c": aust, "bath_c": float(s["bath_c"]),
                  "hold_hours": float(hours) if hours is not None else self._default(grade, "hold_hours", 1.0)}
        return params, self._warnings(grade, params)

    def to_steps(self, params):
        return [{"op": "austemper", "bath_c": float(params["bath_c"]), "hours": float(params["hold_hours"]),
                 "austenitize_c": float(params["austenitize_c"])}]

    def grid(self, grade):
        self.require_family(grade)
        temps = self._axis(grade, "bath_c", (260.0, 400.0), BATH_STEP_C)
        # austempering needs a bath above Ms (below it the bath makes martensite): the grid keeps the
        # window's baths at least MARTEMPER_ABOVE_MS_C above the Li Ms of the nominal composition
        comp = grade.composition()
        temps = temps[(temps >= float(transformation.ms_li_c(comp)) + MARTEMPER_ABOVE_MS_C)
                      & (temps < float(transformation.bs_li_c(comp)))]
        n = len(temps)
        return {"austenitize_c": np.full(n, float(default_austenitize_c(grade))), "bath_c": temps,
                "hold_hours": self.hold_for(grade, temps)}

    def hold_for(self, grade, bath_c):
        """Hold (h) of the selection grid at each bath temperature: long enough for 95 % of the
        bainite of the nominal composition (Li et al. 1998, × :data:`HOLD_MARGIN`), rounded up to
        a quarter hour and kept inside the grade's hold window (practice holds until the
        transformation is complete: ASM Handbook Vol. 4 (1991), austempering of steel, from
        memory); the window's default where the bath is outside Ms–Bs."""
        w = window(grade, self.name, "hold_hours")
        lo, hi, dflt = (0.5, 4.0, 1.0) if w is None else (w[0], w[1], w[2])
        comp = grade.composition()
        bath = np.asarray(bath_c, float)
        with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
            t95 = transformation.isothermal_time_s(comp, bath, COMPLETE_X, "bainite",
                                                   bainite_carbon_cap_pct=transformation.LI_MAX_C) / 3600.0
        inside = (bath > transformation.ms_li_c(comp)) & (bath < transformation.bs_li_c(comp)) & np.isfinite(t95)
        hold = np.clip(np.ceil(HOLD_MARGIN * np.where(inside, t95, dflt) * 4.0) / 4.0, lo, hi)
        return np.where(inside, hold, dflt)

    def compute(self, batch):
        hours = np.asarray(batch.params["hold_hours"], float)

        def fractions(comp, bath, ms, bs):
            inside = (bath > ms) & (bath < bs)
            with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
                x = np.where(inside, bainite_progress(comp, np.where(inside, bath, 0.5 * (ms + bs)), hours), 0.0)
            hv_iso = phase_hardness.isothermal_bainite_hv(comp, bath)
            hv_tm = tempering.tempered_martensite_hv(comp, bath, hours)
            hv_b = np.minimum(hv_iso, hv_tm)
            notes = [("bath at or below Ms (Li et al. 1998): martensite forms on entering the bath; this is not an "
                      "austempering", bath <= ms),
                     ("bath at or above Bs (Li et al. 1998): no bainite forms at this bath temperature", bath >= bs),
                     ("bainite transformation incomplete in the hold: the rest becomes fresh, untempered martensite "
                      "on cooling", (x < COMPLETE_X) & inside)]
            # the validity of isothermal_bainite is declared in model_inputs and checked by finish()
            return x, hv_b, notes
        c = self._common(batch, fractions)
        return self._finish(batch, c, c["hv"], c["bath"])


class Martemper(_BathRoute):
    name = "martemper"
    label = "martemper + temper"
    op = "martemper"
    patterns = (("martemper",), ("martemper", "temper"))
    main_parameter = "temper_temp_c"
    parameters = ("austenitize_c", "bath_c", "temper_temp_c", "temper_hours")
    #: the tempered martensite: fully hard reference (A255 / Hodge-Orehoski at 99.9 %) and the master surface
    model_inputs = BATH_INPUTS + (
        uses("martensite_hardness", "C", where="tempered")
        + uses("hollomon_jaffe", "C", temp_c="temper_temp_c", hours="temper_hours", where="tempered")
        + uses("tempering_hv", *tempering.ALLOY_CHECKED, "P_1000", where="tempered"))

    def parse(self, steps, grade):
        s, aust = self._parse_bath(steps, grade)
        t = next((x for x in steps if x["op"] == "temper"), None)
        params = {"austenitize_c": aust, "bath_c": float(s["bath_c"]),
                  "temper_temp_c": t["temp_c"] if t else float("nan"),
                  "temper_hours": t.get("hours", 2.0) if t else float("nan")}
        return params, self._warnings(grade, params)

    def to_steps(self, params):
        steps = [{"op": "martemper", "bath_c": float(params["bath_c"]),
                  "austenitize_c": float(params["austenitize_c"])}]
        if np.isfinite(float(params["temper_temp_c"])):
            steps.append({"op": "temper", "temp_c": float(params["temper_temp_c"]),
                          "hours": float(params["temper_hours"])})
        return steps

    def grid(self, grade):
        self.require_family(grade)
        temps = self._axis(grade, "temper_temp_c", (150.0, 650.0), TEMPER_STEP_C)
        n = len(temps)
        return {"austenitize_c": np.full(n, float(default_austenitize_c(grade))),
                "bath_c": np.full(n, self.bath_for(grade)),
                "temper_temp_c": temps, "temper_hours": np.full(n, 2.0)}

    def bath_for(self, grade) -> float:
        """Bath of the selection grid: just above Ms (Li Ms of the nominal composition +
        :data:`MARTEMPER_ABOVE_MS_C`, rounded up to 5 °C: a martempering bath sits at or slightly
        above Ms, ASM Handbook Vol. 4 (1991), martempering of steel, from memory), kept inside
        the grade's bath window; where Ms lies above the window the bath is the window's top
        (a bath below Ms, "modified martempering": the caution says so)."""
        w = window(grade, self.name, "bath_c")
        lo, hi = (200.0, 290.0) if w is None else (w[0], w[1])
        ms = float(transformation.ms_li_c(grade.composition()))
        return float(np.clip(np.ceil((ms + MARTEMPER_ABOVE_MS_C) / 5.0) * 5.0, lo, hi))

    def compute(self, batch):
        p = batch.params
        t = np.asarray(p["temper_temp_c"], float)
        h = np.asarray(p["temper_hours"], float)

        def fractions(comp, bath, ms, bs):
            notes = [("bath below Ms (Li et al. 1998): martensite starts in the bath (modified martempering); the "
                      "distortion benefit of a bath just above Ms is smaller", bath < ms),
                     ("bath far above Ms: bainite may form during the equalising hold (not modelled)",
                      bath > ms + 100.0),
                     ("untempered martensite is brittle: temper promptly after martempering (common practice)",
                      ~np.isfinite(t))]
            return np.zeros(np.shape(bath)), np.zeros(np.shape(bath)), notes
        c = self._common(batch, fractions)
        hv = c["hv"]
        tempered = np.isfinite(t)
        if tempered.any():
            hv_full = conversions.hrc_to_hv(martensite_hardness_hrc(el(batch.comp, "C"), 99.9))
            tt = tempering.tempered_hv(hv[:, None], np.asarray(hv_full, float)[:, None],
                                       {k: np.asarray(v, float)[:, None] for k, v in batch.comp.items()},
                                       np.where(tempered, t, 200.0)[:, None], np.where(tempered, h, 1.0)[:, None])[:, 0]
            hv = np.where(tempered, np.minimum(tt, hv), hv)
        res = self._finish(batch, c, hv, t)
        h1 = np.where(tempered, h, 1.0)
        res["model_inputs"].update(tempered=tempered, P_1000=np.where(tempered, tempering.hollomon_jaffe_parameter(
            np.where(tempered, t, 200.0), h1, tempering.hollomon_jaffe_constant(el(batch.comp, "C"))) / 1000.0, np.nan))
        return res


FAMILIES = [Austemper(), Martemper()]

