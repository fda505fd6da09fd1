"""Curves of the one-candidate view: the transformation start and finish curves of a
candidate's composition with its route's cooling path through them, and the local fatigue
strength against the bending stress through the depth (library functions: no chart, no
page; :mod:`selector.views.charts_beyond` draws them).

* :func:`transformation_curves`: isothermal start (1 %) and finish (99 %) times of ferrite,
  pearlite and bainite against temperature (Li et al. 1998 kinetics,
  :func:`selector.models.transformation.isothermal_time_s`), with Ms and Bs (Li) and the
  Andrews (1965) Ac1/Ac3 that bound the reactions.
* :func:`bath_cooling_path` / :func:`quench_cooling_path`: temperature against time at the
  surface and centre of the section, for a bath route (quench into the salt bath, hold) or a
  through-hardening quench (the quench medium of the route), from the conduction series
  (:mod:`selector.models.bath_quench`, Carslaw & Jaeger 1959).
* :func:`candidate_curves`: both for one ``evaluate()`` result, as long tables.
* :func:`fatigue_depth_curves`: the local fatigue strength and the bending stress through
  the depth of an ``evaluate()`` result (``fatigue.through_depth``, issue point 2), as a
  long table, with the governing depth.

The isothermal curves are drawn with a continuous cooling path over them, the usual way of
reading a bath route: a path that crosses the pearlite start before reaching the bath
starts pearlite in the real (continuous) cooling only after the Scheil sum reaches 1, so
the crossing is a conservative sign, and the route's own ``non_bainitic_pct`` is the
quantitative answer.

References
----------
Li, Niebuhr, Meekisho & Atteridge, Metall. Mater. Trans. B 29B (1998) 661; Scheil,
Arch. Eisenhüttenwes. 8 (1935) 565; Andrews, JISI 203 (1965) 721; Carslaw & Jaeger,
*Conduction of Heat in Solids* (1959).
"""
from __future__ import annotations

from typing import Mapping

import numpy as np
import pandas as pd

from .. import inputs
from ..catalogue.grades import default_catalogue
from ..errors import InputError
from ..models import bath_quench, quench_severity, transformation
from ..models.composition import el
from .families.quench_temper import default_austenitize_c

REACTIONS = ("ferrite", "pearlite", "bainite")
#: routes whose cooling path is a quench into a hot bath
BATH_ROUTES = ("austemper", "martemper")
#: routes whose cooling path is a through-hardening quench (the core of case routes included)
QUENCH_ROUTES = ("quench_temper", "carburize", "nitride", "induction")


def _composition(comp: Mapping) -> dict:
    if not isinstance(comp, Mapping) or "C" not in comp:
        raise InputError("comp", comp, "a mapping of element to wt % with at least C")
    return {k: float(np.asarray(v, float).ravel()[0]) for k, v in comp.items()}


def transformation_curves(comp, temps_c=None, start=0.01, finish=0.99, grain_size_astm=8.0) -> dict:
    """Isothermal start and finish times of ferrite, pearlite and bainite for one composition.

    Parameters
    ----------
    comp : mapping
        Element → wt %.
    temps_c : array_like, optional
        Temperatures, °C (default: every 10 °C from just above Ms to Ac3).
    start, finish : float
        Normalised progress of the start and finish curves (0.01 and 0.99).
    grain_size_astm : float
        ASTM austenite grain size.

    Returns
    -------
    dict
        ``temp_c`` (array), ``<reaction>_start_s`` / ``<reaction>_finish_s`` (s; NaN where
        the reaction does not run: above Ac3 / Ac1 / Bs, below Ms, and ferrite in steels of
        eutectoid carbon and above), ``ms_c``, ``bs_c``, ``ac1_c``, ``ac3_c``.

    Validity
    --------
    ``li_1998``; the bath routes hold the bainite rate's carbon at 0.6 % above it
    (:func:`selector.models.transformation.isothermal_time_s`), and so do these curves.
    """
    c = _composition(comp)
    for name, v in (("start", start), ("finish", finish)):
        if not (0.0 < float(v) < 1.0):
            raise InputError(name, v, "a progress between 0 and 1 (exclusive)")
    ms, bs = float(transformation.ms_li_c(c)), float(transformation.bs_li_c(c))
    ac1, ac3 = float(transformation.ac1_c(c)), float(transformation.ac3_c(c))
    temps = (np.arange(np.floor(ms / 10) * 10 + 10, ac3, 10.0) if temps_c is None
             else np.atleast_1d(np.asarray(temps_c, float)))
    out = {"temp_c": temps, "ms_c": ms, "bs_c": bs, "ac1_c": ac1, "ac3_c": ac3}
    tops = {"ferrite": ac3, "pearlite": ac1, "bainite": bs}
    for r, top in tops.items():
        ok = (temps < top - 1.0) & (temps > ms)
        if r == "ferrite" and c.get("C", 0.0) >= transformation.EUTECTOID_C:
            ok &= False
        for key, frac in (("start", start), ("finish", finish)):
            with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
                t = transformation.isothermal_time_s(c, temps, frac, r, grain_size_astm,
                                                     bainite_carbon_cap_pct=transformation.LI_MAX_C)
            out[f"{r}_{key}_s"] = np.where(ok & np.isfinite(t), t, np.nan)
    return out


def _path(h_w_m2k, austenitize_c, bath_c, diameter_mm, thickness_mm, end_s, positions):
    t = np.geomspace(0.05, max(float(end_s), 10.0), 160)
    d = None if diameter_mm is None else np.array([float(diameter_mm)])
    th = None if thickness_mm is None else np.array([float(thickness_mm)])
    out = {"time_s": t}
    for pos in positions:
        out[pos] = bath_quench.path_temperature_c(h_w_m2k, t, d, th, float(pos), float(austenitize_c),
                                                  float(bath_c))[0]
    return out


def bath_cooling_path(austenitize_c, bath_c, diameter_mm=None, hold_hours=None, positions=(1.0, 0.0),
                      thickness_mm=None) -> dict:
    """Temperature against time at the surface and centre of a round (or plate) quenched into
    the salt bath of the bath routes (strongly agitated oil severity), to the end of the hold.

    Returns
    -------
    dict
        ``time_s`` and ``surface_c``, ``centre_c`` (arrays, °C).
    """
    end = 3600.0 * float(hold_hours) if hold_hours else 3600.0
    p = _path(bath_quench.bath_h_w_m2k(), austenitize_c, bath_c, diameter_mm, thickness_mm, end, positions)
    return {"time_s": p["time_s"], "surface_c": p[positions[0]], "centre_c": p[positions[-1]]}


def quench_cooling_path(austenitize_c, quench="oil", agitation="moderate", diameter_mm=None, thickness_mm=None,
                        bath_c=40.0, positions=(1.0, 0.0)) -> dict:
    """Temperature against time at the surface and centre of a through-hardening quench
    (Grossmann H of the medium, ``data/quench_severity.csv``), to 1 h.

    Returns
    -------
    dict
        ``time_s`` and ``surface_c``, ``centre_c`` (arrays, °C).
    """
    h = float(quench_severity.heat_transfer_coefficient_w_m2k(quench_severity.grossmann_h_per_in(quench, agitation)))
    p = _path(h, austenitize_c, bath_c, diameter_mm, thickness_mm, 3600.0, positions)
    return {"time_s": p["time_s"], "surface_c": p[positions[0]], "centre_c": p[positions[-1]]}


def _ev_composition(ev: Mapping) -> dict:
    if ev.get("heat_composition"):
        return dict(ev["heat_composition"])
    corner = ev.get("composition") or "nominal"
    return default_catalogue().lookup(ev["grade"]).composition(corner if corner != "heat" else "nominal")


def candidate_curves(ev: Mapping) -> dict:
    """Transformation curves and the route's cooling path for one ``evaluate()`` result.

    Parameters
    ----------
    ev : mapping
        A result of :func:`selector.evaluate` for a steel.

    Returns
    -------
    dict
        ``curves``: long table ``time_s, temp_c, curve, reaction, edge`` (edge ``start`` /
        ``finish``); ``path``: long table ``time_s, temp_c, location`` (``surface``,
        ``centre``); ``lines``: {``ms_c``, ``bs_c``, ``ac1_c``, ``ac3_c``, and ``bath_c``
        for a bath route}; ``route_family``.  Empty tables for a route without a quench
        (anneal, cold work, supply, age) or a non-steel.
    """
    if not isinstance(ev, Mapping) or "route_family" not in ev:
        raise InputError("ev", type(ev).__name__, "a result of selector.evaluate()")
    fam = ev["route_family"]
    empty = {"curves": pd.DataFrame(columns=["time_s", "temp_c", "curve", "reaction", "edge"]),
             "path": pd.DataFrame(columns=["time_s", "temp_c", "location"]), "lines": {}, "route_family": fam}
    if fam not in BATH_ROUTES + QUENCH_ROUTES or ev.get("family") not in (
            "carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel"):
        return empty
    comp = _ev_composition(ev)
    tc = transformation_curves(comp)
    rows = []
    for r in REACTIONS:
        for edge in ("start", "finish"):
            t = tc[f"{r}_{edge}_s"]
            ok = np.isfinite(t)
            if ok.any():
                rows.append(pd.DataFrame({"time_s": t[ok], "temp_c": tc["temp_c"][ok], "curve": f"{r} {edge}",
                                          "reaction": r, "edge": edge}))
    curves = pd.concat(rows, ignore_index=True) if rows else empty["curves"]
    p = ev.get("params") or {}
    d, th = ev.get("diameter_mm"), ev.get("thickness_mm")
    lines = {k: tc[k] for k in ("ms_c", "bs_c", "ac1_c", "ac3_c")}
    aust = p.get("austenitize_c")
    if fam in BATH_ROUTES:
        path = bath_cooling_path(aust, p["bath_c"], d, p.get("hold_hours"), thickness_mm=th)
        lines["bath_c"] = float(p["bath_c"])
    else:
        if aust is None:

            aust = default_austenitize_c(default_catalogue().lookup(ev["grade"]))
        path = quench_cooling_path(aust, p.get("quench") or "oil", p.get("agitation") or "moderate", d, th)
    pf = pd.concat([pd.DataFrame({"time_s": path["time_s"], "temp_c": path[f"{w}_c"], "location": w})
                    for w in ("surface", "centre")], ignore_index=True)
    return {"curves": curves, "path": pf, "lines": lines, "route_family": fam}


def fatigue_depth_curves(ev: Mapping, surface_stress_mpa=None) -> dict:
    """Local fatigue strength and bending stress through the depth of one ``evaluate()``
    result (its ``fatigue.through_depth`` record, :func:`selector.routes.fatigue.through_depth`:
    local strength from the hardness profile with the cited residual-stress credit; bending
    stress linear from the surface to the axis).

    Parameters
    ----------
    ev : mapping
        A result of :func:`selector.evaluate`.
    surface_stress_mpa : float, optional
        Bending stress at the surface, MPa (> 0); default: the allowable surface stress, the
        one at which the governing depth just reaches its local strength.

    Returns
    -------
    dict
        ``table``: long table ``depth_mm, stress_mpa, curve`` (``local fatigue strength``,
        ``bending stress``); ``governing_depth_mm``, ``allowable_surface_mpa``; ``margin``
        (smallest strength / stress through the depth at ``surface_stress_mpa``; < 1: fails
        there); an empty table and None values when the result has no depth record
        (no hardness profile: bath routes, plates, non-steels).
    """

    if not isinstance(ev, Mapping):
        raise InputError("ev", type(ev).__name__, "a result of selector.evaluate()")
    td = (ev.get("fatigue") or {}).get("through_depth")
    cols = ["depth_mm", "stress_mpa", "curve"]
    none = {"table": pd.DataFrame(columns=cols), "governing_depth_mm": None, "allowable_surface_mpa": None,
            "margin": None}
    if not td or not td.get("depth_mm"):
        return none
    allow = float(td["allowable_surface_mpa"])
    s0 = allow if surface_stress_mpa is None else inputs.number("surface_stress_mpa", surface_stress_mpa, 1e-6, 1e5,
                                                                 unit="MPa")
    depth = np.asarray(td["depth_mm"], float)
    strength = np.asarray(td["strength_mpa"], float)
    stress = np.asarray(td["stress_per_surface"], float) * s0
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.where(stress > 1e-9, strength / stress, np.inf)
    table = pd.concat([pd.DataFrame({"depth_mm": depth, "stress_mpa": strength, "curve": "local fatigue strength"}),
                       pd.DataFrame({"depth_mm": depth, "stress_mpa": stress, "curve": "bending stress"})],
                      ignore_index=True)
    return {"table": table, "governing_depth_mm": float(td["governing_depth_mm"]),
            "allowable_surface_mpa": allow, "margin": float(np.nanmin(ratio))}
