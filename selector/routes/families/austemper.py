"""Austempering and martempering: quench into a hot bath, hold, cool (bainite routes).

Steps::

    [{"op": "austemper", "bath_c": 315, "hours": 1}]                  # optional "austenitize_c"
    [{"op": "martemper", "bath_c": 230}, {"op": "temper", "temp_c": 200, "hours": 2}]

Chain of models (all already in the package; nothing is fitted here):

1. **Cooling into the bath.** The bar (or plate) is quenched into a salt bath taken as
   strongly agitated oil (Grossmann H from ``data/quench_severity.csv``; agitated
   nitrate-nitrite salt quenches about like agitated oil: ASM Handbook Vol. 4 (1991),
   austempering of steel, from memory).  The centre's temperature history comes
   from the conduction series of :mod:`selector.models.cooling`.
2. **Section limit.** Along the centre's path to the bath, the Scheil (1935) sum
   ``Σ Δt / τ_start(T)`` of the ferrite and pearlite reactions (Li et al. 1998
   kinetics, :func:`selector.models.transformation.isothermal_time_s`, 1 % progress) is
   taken; when it reaches 1 before the centre is within 10 °C of the bath, ferrite or
   pearlite forms at the centre: the section is beyond the route's limit.  The limit
   itself (``section_limit_mm``, single evaluations only) is the largest diameter
   whose sum stays below 1 (the same model on a few diameters).
3. **Austempering hold.** Bainite progress at the bath temperature in the hold time
   (Li et al. 1998 bainite kinetics, normalised progress X from S(X) = t/τ₁); the
   austenite left transforms to martensite on cooling by Koistinen–Marburger (1959)
   from the Li Ms (fresh, untempered martensite: a note).
4. **Martempering.** The bath lies just above Ms; the hold equalises the temperature
   (a short hold, taken as no transformation) and the part becomes martensite on
   air cooling (Koistinen–Marburger), then the temper of the route uses the Q&T
   tempering model (:func:`selector.models.tempering.tempered_hv`).
5. **Hardness.** Maynier et al. (1978) phase hardness (:mod:`selector.models.phase_hardness`)
   at the cooling rate at 700 °C of the centre, mixed by phase fractions; then tensile
   strength by ASTM E140/A370 and yield/elongation by the Q&T correlations (yield
   taken at the bath temperature as its "tempering" temperature, an approximation).

Selection: the bath routes are not expanded over the catalogue yet (``grid`` raises
:class:`~selector.errors.NotModelledError`, which the expansion skips): the conduction
and kinetics chain costs about a second per state.  ``evaluate()`` gives them.

Limitation: Maynier's bainite hardness depends on the cooling rate, not on the
transformation temperature, so the model does not capture the harder lower bainite
of a cooler bath; published austempered hardness for 1080/1095-class steels (about
50-55 HRC) is checked in tests/test_austemper.py.  Maynier's equations hold for C up
to 0.5 %; higher-carbon grades get the validity warning.

References
----------
M.V. Li, D.V. Niebuhr, L.L. Meekisho, D.G. Atteridge, Metall. Mater. Trans. B 29B (1998) 661.
E. Scheil, Arch. Eisenhüttenwes. 8 (1935) 565.
D.P. Koistinen, R.E. Marburger, Acta Metall. 7 (1959) 59.
Ph. Maynier, B. Jungmann, J. Dollet, in Hardenability Concepts with Applications to Steel,
TMS-AIME (1978) 518.
ASM Handbook Vol. 4, Heat Treating (1991): austempering of steel; martempering of steel
(process windows, from memory).
"""
from __future__ import annotations

import numpy as np

from ...models import conversions, cooling, phase_hardness, quench_severity, tempering, transformation
from ...models.composition import el
from ...models.martensite import martensite_hardness_hrc
from ...errors import NotModelledError
from ..model_inputs import uses
from .base import Batch, RouteFamily, product_grid
from .quench_temper import _by_class, _yield, correlation_class, default_austenitize_c
from ...models import correlations

STEEL = ("carbon_steel", "alloy_steel")
#: the salt bath is taken as strongly agitated oil (see the module docstring)
BATH_MEDIUM = ("oil", "strong")
#: the centre counts as "at the bath" within this many °C
AT_BATH_C = 10.0
TIMES_S = np.geomspace(0.05, 3600.0, 120)
ROOM_C = 25.0


def _h_w_m2k():
    return float(quench_severity.heat_transfer_coefficient_w_m2k(quench_severity.grossmann_h_per_in(*BATH_MEDIUM)))


def _col(comp, n):
    return {k: np.broadcast_to(np.asarray(v, float), (n,))[:, None] for k, v in comp.items()}


def scheil_to_bath(comp, austenitize_c, bath_c, diameter_mm=None, thickness_mm=None):
    """Scheil sum of ferrite/pearlite start along the centre's path into the bath (n,);
    >= 1 means the centre transforms before it reaches the bath."""
    aust = np.asarray(austenitize_c, float)
    bath = np.asarray(bath_c, float)
    n = aust.shape[0]
    dm = None if diameter_mm is None else np.asarray(diameter_mm, float)[:, None]
    tm = None if thickness_mm is None else np.asarray(thickness_mm, float)[:, None]
    temp = cooling.temperature_c(_h_w_m2k(), TIMES_S[None, :], dm, tm, positions=(0.0,),
                                 austenitize_c=aust[:, None], bath_c=bath[:, None])[..., 0]
    mid = 0.5 * (temp[:, 1:] + temp[:, :-1])
    dt = np.diff(TIMES_S)[None, :]
    c2 = _col(comp, n)
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        tau_p = transformation.isothermal_time_s(c2, mid, 0.01, "pearlite")
        tau_f = transformation.isothermal_time_s(c2, mid, 0.01, "ferrite")
        hypo = (el(comp, "C") < transformation.EUTECTOID_C)
        tau = np.where(np.broadcast_to(np.asarray(hypo)[..., None] if np.ndim(hypo) else hypo, tau_p.shape),
                       np.minimum(tau_p, tau_f), tau_p)
        moving = mid > bath[:, None] + AT_BATH_C
        return np.sum(np.where(moving & np.isfinite(tau) & (tau > 0), dt / tau, 0.0), axis=1)


def bainite_progress(comp, bath_c, hours):
    """Normalised bainite progress X (0–1) after ``hours`` at ``bath_c`` (Li et al. 1998)."""
    x_ref = 0.5
    tau1 = transformation.isothermal_time_s(comp, bath_c, x_ref, "bainite") / transformation.s_integral(x_ref)
    xs = np.linspace(0.0, 0.999, 2001)
    s = transformation.s_integral(xs)
    return np.interp(np.asarray(hours, float) * 3600.0 / tau1, s, xs)


def section_limit_mm(comp, austenitize_c, bath_c, lo=1.0, hi=200.0, n=8):
    """Largest round diameter (mm) whose centre reaches the bath before ferrite/pearlite
    starts: :func:`scheil_to_bath` on ``n`` diameters spaced geometrically from ``lo`` to
    ``hi``, the crossing of the sum through 1 interpolated in log-log.  ``hi`` when every
    diameter passes, 0 when ``lo`` fails."""
    d = np.geomspace(lo, hi, n)
    s = scheil_to_bath({k: np.full(n, float(v)) for k, v in comp.items()}, np.full(n, float(austenitize_c)),
                       np.full(n, float(bath_c)), diameter_mm=d)
    if s[0] >= 1.0:
        return 0.0
    if s[-1] < 1.0:
        return hi
    j = int(np.argmax(s >= 1.0))
    ls0, ls1 = np.log(max(s[j - 1], 1e-12)), np.log(s[j])
    f = (0.0 - ls0) / (ls1 - ls0) if ls1 != ls0 else 0.0
    return float(np.exp(np.log(d[j - 1]) + f * (np.log(d[j]) - np.log(d[j - 1]))))


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
        "Maynier, Jungmann & Dollet, TMS-AIME (1978) 518 (phase hardness)",
        "ASM Handbook Vol. 4 (1991): austempering and martempering of steel (process windows)",
    )
    op = ""

    def _parse_bath(self, steps, grade):
        self.require_family(grade)
        s = next(x for x in steps if x["op"] == self.op)
        aust = s.get("austenitize_c")
        if aust is None:
            aust = default_austenitize_c(grade)
        return s, float(aust)

    def _grid(self, grade, extra):
        raise NotModelledError(f"the {self.name} route is evaluated one state at a time (evaluate()); it is not "
                               "expanded over the catalogue in selection yet (the conduction and kinetics chain "
                               "is too slow for the whole catalogue)")
        bands = self.bands(grade, self.name, "bath_c", (260.0, 400.0))
        temps = np.unique(np.concatenate([np.arange(np.ceil(lo / 10) * 10, hi + 0.1, 10.0) for lo, hi in bands]))
        g = product_grid(bath_c=temps)
        n = len(temps)
        g["austenitize_c"] = np.full(n, float(default_austenitize_c(grade)))
        for k, v in extra.items():
            g[k] = np.full(n, float(v))
        return g

    def _common(self, batch, fractions_fn):
        p = batch.params
        comp = batch.comp
        aust = np.asarray(p["austenitize_c"], float)
        bath = np.asarray(p["bath_c"], float)
        d = None if np.all(np.isnan(batch.diameter_mm)) else batch.diameter_mm
        t = None if d is not None else batch.thickness_mm
        scheil = scheil_to_bath(comp, aust, bath, d, t)
        rate = cooling.cooling_rate_at_c_s(_h_w_m2k(), d, t, positions=(0.0,), austenitize_c=aust,
                                           bath_c=bath)[..., 0]
        rate = np.maximum(np.asarray(rate, float), 1e-3)
        hv_m, hv_b, hv_fp = phase_hardness.phase_hardness_hv(comp, rate)
        ms = transformation.ms_li_c(comp)
        bs = transformation.bs_li_c(comp)
        f_b, f_m, notes = fractions_fn(comp, bath, ms, bs)
        missed = scheil >= 1.0
        f_fp = np.where(missed, 1.0, 0.0)
        f_b = np.where(missed, 0.0, f_b)
        f_m = np.where(missed, 0.0, f_m)
        f_ra = np.clip(1.0 - f_b - f_m - f_fp, 0.0, 1.0)
        hv = phase_hardness.mixture_hv([f_m, f_b, f_fp], [hv_m, hv_b, hv_fp])
        return {"hv": hv, "hv_m": hv_m, "f_b": f_b, "f_m": f_m, "f_fp": f_fp, "f_ra": f_ra, "missed": missed,
                "ms": ms, "bs": bs, "bath": bath, "scheil": scheil, "notes": notes}

    def _finish(self, batch, c, hv, temper_c):
        cls = correlation_class(batch.attr("family"))
        uts = conversions.hv_to_uts_mpa(hv)
        res = {"hardness_hv": hv, "surface_hardness_hv": hv, "center_hardness_hv": hv,
               "uts_mpa": uts, "yield_mpa": _yield(uts, temper_c, cls),
               "elongation_pct": _by_class(correlations.elongation_from_uts, uts, cls),
               "reduction_area_pct": _by_class(correlations.reduction_of_area_from_uts, uts, cls),
               "case_depth_mm": np.zeros(batch.n), "center_martensite_pct": 100.0 * c["f_m"],
               "bainite_pct": 100.0 * c["f_b"], "ms_c": c["ms"], "bs_c": c["bs"]}
        notes = list(c["notes"])
        notes.append(("the centre reaches the bath too slowly: ferrite or pearlite forms before it "
                      "(Scheil sum of Li et al. 1998 kinetics >= 1); the section exceeds this route's limit",
                      c["missed"]))
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
            "correlation_temper_c": np.where(np.isfinite(tc), tc, 150.0)}
        if batch.n == 1:
            d = batch.diameter_mm[0]
            if np.isfinite(d):
                lim = section_limit_mm({k: float(np.asarray(v)[0]) for k, v in batch.comp.items()},
                                       float(batch.params["austenitize_c"][0]), float(batch.params["bath_c"][0]))
                res["section_limit_mm"] = np.array([lim])
                notes.append((f"section limit of this route: about {lim:.0f} mm diameter (centre reaches the "
                              "bath before ferrite/pearlite starts; Li et al. 1998 kinetics, Scheil additivity)",
                              np.ones(1, bool)))
        res["notes"] = notes
        return res


class Austemper(_BathRoute):
    name = "austemper"
    label = "austemper"
    op = "austemper"
    patterns = (("austemper",),)
    main_parameter = "bath_c"
    parameters = ("austenitize_c", "bath_c", "hold_hours")

    def parse(self, steps, grade):
        s, aust = self._parse_bath(steps, grade)
        params = {"austenitize_c": aust, "bath_c": float(s["bath_c"]), "hold_hours": float(s.get("hours", 1.0))}
        return params, self.window_warnings(grade, self.name, params)

    def to_steps(self, params):
        return [{"op": "austemper", "bath_c": float(params["bath_c"]), "hours": float(params["hold_hours"]),
                 "austenitize_c": float(params["austenitize_c"])}]

    def grid(self, grade):
        self.require_family(grade)
        return self._grid(grade, {"hold_hours": self.window_value(grade, self.name, "hold_hours", None, 1.0)})

    def compute(self, batch):
        hours = np.asarray(batch.params["hold_hours"], float)

        def fractions(comp, bath, ms, bs):
            x = bainite_progress(comp, bath, hours)
            x = np.where((bath > ms) & (bath < bs), x, 0.0)
            km = 1.0 - np.exp(-transformation.KM_ALPHA * np.maximum(ms - ROOM_C, 0.0))
            f_m = (1.0 - x) * km
            notes = [("bath at or below Ms (Li et al. 1998): martensite forms on entering the bath; this is not an "
                      "austempering", bath <= ms),
                     ("bath at or above Bs (Li et al. 1998): no bainite forms at this bath temperature", bath >= bs),
                     ("bainite transformation incomplete in the hold: the rest becomes fresh, untempered martensite "
                      "on cooling", (x < 0.95) & (bath > ms) & (bath < bs))]
            return x, f_m, notes
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
        return params, self.window_warnings(grade, self.name, params)

    def to_steps(self, params):
        steps = [{"op": "martemper", "bath_c": float(params["bath_c"]),
                  "austenitize_c": float(params["austenitize_c"])}]
        if np.isfinite(float(params["temper_temp_c"])):
            steps.append({"op": "temper", "temp_c": float(params["temper_temp_c"]),
                          "hours": float(params["temper_hours"])})
        return steps

    def grid(self, grade):
        self.require_family(grade)
        return self._grid(grade, {})

    def compute(self, batch):
        p = batch.params
        t = np.asarray(p["temper_temp_c"], float)
        h = np.asarray(p["temper_hours"], float)

        def fractions(comp, bath, ms, bs):
            km = 1.0 - np.exp(-transformation.KM_ALPHA * np.maximum(ms - ROOM_C, 0.0))
            notes = [("bath below Ms (Li et al. 1998): martensite forms in the bath; martempering baths sit just "
                      "above Ms", bath < ms),
                     ("bath far above Ms: bainite may form during the equalising hold (not modelled)",
                      bath > ms + 100.0),
                     ("untempered martensite is brittle: temper promptly after martempering (common practice)",
                      ~np.isfinite(t))]
            return np.zeros_like(km), km, notes
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


def transformation_curves(comp, temps_c=None, start=0.01, finish=0.99) -> dict:
    """Isothermal transformation start and finish times of ferrite, pearlite and bainite
    (Li et al. 1998, :func:`selector.models.transformation.isothermal_time_s`) for one
    composition, for a time–temperature chart.

    Returns
    -------
    dict
        ``temp_c`` (array), ``<reaction>_start_s`` / ``<reaction>_finish_s`` (s; NaN where
        the reaction does not run: above Ae3 / Ae1 / Bs, or below Ms), ``ms_c``, ``bs_c``.
    """
    c = {k: float(np.asarray(v).ravel()[0]) for k, v in comp.items()}
    ms, bs = float(transformation.ms_li_c(c)), float(transformation.bs_li_c(c))
    ae1 = float(transformation.ac1_c(c))
    ae3 = float(transformation.ac3_c(c))
    temps = np.arange(np.floor(ms / 10) * 10 + 10, ae3, 10.0) if temps_c is None else np.asarray(temps_c, float)
    out = {"temp_c": temps, "ms_c": ms, "bs_c": bs}
    tops = {"ferrite": ae3, "pearlite": ae1, "bainite": bs}
    for r, top in tops.items():
        ok = (temps < top - 1.0) & (temps > ms)
        if r == "ferrite" and c.get("C", 0.0) >= transformation.EUTECTOID_C:
            ok &= False
        for key, frac in (("start", start), ("finish", finish)):
            with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
                t = transformation.isothermal_time_s(c, temps, frac, r)
            out[f"{r}_{key}_s"] = np.where(ok & np.isfinite(t), t, np.nan)
    return out


def cooling_path(comp, austenitize_c, bath_c, diameter_mm, hold_hours=None, positions=(1.0, 0.0)) -> dict:
    """Temperature against time at the surface and centre of a round quenched into the bath
    (the salt bath of this module, :mod:`selector.models.cooling`), to draw over
    :func:`transformation_curves`; the hold at the bath follows to ``hold_hours``.

    Returns
    -------
    dict
        ``time_s`` (array) and ``surface_c``, ``centre_c`` (arrays, °C).
    """
    end = max(3600.0 * float(hold_hours or 0.05), TIMES_S[-1])
    t = np.geomspace(0.05, end, 150)
    temp = cooling.temperature_c(_h_w_m2k(), t, np.array([float(diameter_mm)])[:, None], None,
                                 positions=positions, austenitize_c=float(austenitize_c),
                                 bath_c=float(bath_c))[0]
    return {"time_s": t, "surface_c": temp[:, 0], "centre_c": temp[:, -1]}
