"""``evaluate(grade, route, diameter_mm)``: the properties one route gives one grade
at one section.  The CLI, the page, the selection engine's reproducibility check and
the tests all go through this function."""
from __future__ import annotations

import math

import numpy as np

from .. import inputs
from ..catalogue import heat
from ..catalogue.grades import Grade, default_catalogue
from ..errors import InputError, RouteError, check_choice
from ..models import conversions, validity
from . import bands, families, fatigue, model_inputs, steps as steps_mod
from .families.base import Batch, tension_test_position

STEEL_SCALE_FAMILIES = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel",
                        "stainless_martensitic", "stainless_ph", "tool_steel", "maraging_steel")

E140_SOURCE = "ASTM E140-12b Table 1 / ASTM A370 Table 3 (hardness conversions, non-austenitic steels)"


def section_args(diameter_mm, thickness_mm) -> tuple:
    """Validate the section: a round's diameter or a plate's thickness (mm)."""
    if thickness_mm is not None:
        t = _positive("thickness_mm", thickness_mm)
        return None, t
    if diameter_mm is None:
        raise InputError("diameter_mm", None, "a diameter (mm) or thickness_mm for a plate")
    return _positive("diameter_mm", diameter_mm), None


def _positive(name, v, lo=0.5, hi=500.0):
    if not inputs.is_number(v) or not (lo <= inputs.as_float(v) <= hi):
        raise InputError(name, v, f"a number of mm in [{lo}, {hi}]")
    return inputs.as_float(v)


def resolve(grade, route) -> tuple[Grade, list, object]:
    """Grade record, parsed steps and the route family for ``route``."""
    g = default_catalogue().lookup(grade)
    steps = steps_mod.parse_steps(route)
    name = families.match(steps_mod.signature(steps))
    if name not in g.routes:
        raise RouteError("route", steps_mod.describe(steps),
                         f"a route of a family that {g.id} admits ({', '.join(g.routes)}); "
                         f"this one is {name}")
    fam = families.get(name)
    return g, steps, fam


def scale_hardness(hv: np.ndarray, families_: np.ndarray, steel: np.ndarray | None = None) -> dict:
    """HRC and HB from HV on the ASTM E140 steel table; NaN for non-steels and off-scale
    (``steel``: the mask of the states on the steel table, when the caller has it)."""
    if steel is None:
        steel = np.isin(families_.astype(str), STEEL_SCALE_FAMILIES)
    hv = np.asarray(hv, float)
    return {"hrc": np.where(steel, conversions.hv_to_hrc(hv), np.nan),
            "hb": np.where(steel, conversions.hv_to_hb(hv), np.nan)}


OFF_TABLE_NOTE = ("hardness above the tensile-strength column of ASTM A370 Table 3 / E140 (about HRC 59): "
                  "tensile strength, yield and elongation are not estimated")


BELOW_TABLE_NOTE = ("tensile strength below the lowest row of the tensile-strength column of ASTM A370 "
                    "Table 3 / E140 (about 386 MPa, HB 116): the hardness is not estimated from it")


def finish(res: dict, batch: Batch, route: str = bands.ANY, note_rows: bool = False) -> dict:
    """Add what every family shares (in place) and return ``res``: the validity notes of
    every model input the route family ``route`` declares (``RouteFamily.model_inputs``,
    :mod:`selector.routes.model_inputs`: a visible warning, per state, naming the model,
    the variable, its value and the registered range), the scale conversions, the note
    for states whose strength is undefined because their hardness is off the conversion
    table, and the 90 % prediction band (``<key>_lo``/``<key>_hi``,
    :mod:`selector.routes.bands`) of tensile and yield strength, elongation and hardness
    (HV, with its HRC/HB conversions) for the route family ``route``.  ``note_rows``: the
    validity notes carry their states as :class:`selector.routes.model_inputs.NoteRows`
    (for the expansion, which only joins and counts them) instead of bool masks."""
    if route in families.MODULES:
        declared = families.get(route).model_inputs
        res.setdefault("notes", []).extend(model_inputs.validity_notes(declared, res, batch, rows=note_rows))
    res.pop("model_inputs", None)
    # the steel-table mask looked up once per grade, not per state
    steel = np.isin(np.array([str(g.family) for g in batch.grades] + [""], dtype=str)[:-1],
                    STEEL_SCALE_FAMILIES)[np.asarray(batch.gidx, np.int64)]
    hv_test = np.asarray(res.get("hardness_hv", np.full(batch.n, np.nan)), float)
    uts = np.asarray(res.get("uts_mpa", np.full(batch.n, np.nan)), float)
    off = np.isfinite(hv_test) & ~np.isfinite(uts)
    if off.any():
        res.setdefault("notes", []).append((OFF_TABLE_NOTE, off))
    for key in ("hardness", "surface_hardness", "center_hardness"):
        hv = np.asarray(res.get(key + "_hv", np.full(batch.n, np.nan)), float)
        res[key + "_hv"] = hv
        sc = scale_hardness(hv, None, steel)
        res[key + "_hrc"] = sc["hrc"]
        res[key + "_hb"] = sc["hb"]
    section = np.where(np.isfinite(batch.diameter_mm), batch.diameter_mm, batch.thickness_mm)
    res.update(_band_columns(res, batch, route, section))
    for edge in ("lo", "hi"):
        if f"hardness_hv_{edge}" in res:
            sc = scale_hardness(res[f"hardness_hv_{edge}"], None, steel)
            res[f"hardness_hrc_{edge}"], res[f"hardness_hb_{edge}"] = sc["hrc"], sc["hb"]
    return res


def _band_columns(res: dict, batch: Batch, route: str, section) -> dict:
    """:func:`bands.band_columns` of ``res``, with the band table looked up once per distinct
    (grade family, section) of the batch and spread to its states: the same values (the
    lookup is per family and section band), without sorting a per-state object array of
    family names four times (a third of the expansion's time at 24 000 Q&T states)."""
    gfam = np.array([g.family for g in batch.grades], dtype=object)
    ufam, finv = np.unique(gfam, return_inverse=True)
    usec, sinv = np.unique(np.asarray(section, float), return_inverse=True)
    code = finv.reshape(-1)[batch.gidx] * len(usec) + sinv.reshape(-1)
    ucode, inv = np.unique(code, return_inverse=True)
    inv = inv.reshape(-1)
    fam_u, sec_u = ufam[ucode // len(usec)], usec[ucode % len(usec)]
    free = np.asarray(res.get(bands.BAND_FREE, 0.0), float) > 0.5
    out = {}
    for prop in bands.PROPERTIES:
        if prop not in res:
            continue
        q_lo, q_hi, mode = bands.quantiles(fam_u, route, sec_u, prop)
        q_lo, q_hi = np.where(free, 0.0, q_lo[inv]), np.where(free, 0.0, q_hi[inv])
        out[prop + "_lo"], out[prop + "_hi"] = bands.apply(res[prop], q_lo, q_hi, mode)
    return out


#: alias of :func:`finish` (``evaluate`` has an argument of that name: the surface finish)
_finish_states = finish


def _scalar(v):
    if isinstance(v, np.ndarray):
        v = v.item() if v.size == 1 else v.tolist()
    if isinstance(v, (float, np.floating)):
        v = float(v)
        return None if math.isnan(v) else round(v, 6)
    return v


CORNERS = ("lean", "nominal", "rich")
#: the prediction-band keys of the result (``<key>_lo``, ``<key>_hi``)
BAND_KEYS = tuple(f"{k}_{e}" for k in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hrc",
                                        "hardness_hb") for e in ("lo", "hi"))


def evaluate(grade, route, diameter_mm: float | None = 25.0, thickness_mm: float | None = None,
             composition: str = "nominal", heat_composition=None, *, finish: str = "machined",
             load_type: str = "bending", reliability: float = 0.5, service_temp_c: float | None = None) -> dict:
    """Properties that ``route`` gives ``grade`` at a real section.

    Parameters
    ----------
    grade : str or Grade
        Catalogue id or any designation (``"4140"``, ``"42CrMo4"``, ``"G41400"``).
    route : list of dict
        Steps, e.g. ``[{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]``.
    diameter_mm : float
        Diameter of the round section, mm (ignored when ``thickness_mm`` is given).
    thickness_mm : float, optional
        Thickness of a plate section, mm.
    composition : {"nominal", "lean", "rich"}
        Where in the grade's composition specification to evaluate: the mid-points,
        or every alloying element at its minimum or maximum.
    heat_composition : mapping, optional
        One heat's analysis from its mill certificate, element → wt %
        (``{"C": 0.41, "Mn": 0.86, "Cr": 0.95, "Mo": 0.18}``); elements not given take
        the grade's nominal value (:mod:`selector.catalogue.heat`).  An element
        outside the grade's specification gives a warning naming it; a negative,
        non-finite or impossible value (total over 100 %) an ``InputError``.  Only
        with ``composition="nominal"``.
    finish, load_type, reliability, service_temp_c
        Surface finish (``ground``, ``machined`` (or cold drawn), ``hot_rolled``,
        ``as_forged``), load type (``bending``, ``axial``, ``torsion``), reliability
        (0.5 to 0.9999; 0.5 gives the typical value like the other properties) and
        service temperature (°C, default 20) of the fatigue limit
        (:mod:`selector.routes.fatigue`).

    Returns
    -------
    dict
        ``uts_mpa, yield_mpa, elongation_pct, hardness_hv, hardness_hb, hardness_hrc``
        (None below the HRC scale) at the ASTM A370 tension-test location (centre up to
        38 mm, mid-radius above); ``surface_hardness_hv``, ``center_hardness_hv``,
        ``case_depth_mm`` (0 when through-hardened); ``profile`` (r/R and hardness
        across the section) where the family computes one; ``warnings`` and
        ``sources`` (lists of str); ``route_family``, ``route_text``, ``params``;
        ``fatigue_limit_mpa`` (+ ``_lo``/``_hi``, fully reversed, MPa) and ``fatigue``
        (the Marin factors used, the governing depth and, where a hardness profile
        exists, ``through_depth``: local strength against the applied stress).

    Raises
    ------
    UnknownGradeError, RouteError, InputError, NotModelledError
    """
    d, t = section_args(diameter_mm, thickness_mm)
    check_choice("composition", composition, CORNERS)
    fat_opts = fatigue.check_options(finish, load_type, reliability)
    g, steps, fam = resolve(grade, route)
    comp, heat_warns = g.composition(composition), []
    if heat_composition is not None:
        if composition != "nominal":
            raise InputError("composition", composition,
                             "'nominal' when heat_composition is given (the heat replaces the corner)")
        comp, heat_warns = heat.heat_composition(g, heat_composition,
                                                 heat.known_elements(default_catalogue()))
    params, warns = fam.parse(steps, g)
    warns = heat_warns + list(warns)
    batch = Batch.single(g, comp, params, d, t)
    res = _finish_states(fam.compute(batch), batch, fam.name)
    out = {}
    for key in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hb", "hardness_hrc",
                "surface_hardness_hv", "surface_hardness_hrc", "center_hardness_hv", "center_hardness_hrc",
                "case_depth_mm", "reduction_area_pct", "center_uts_mpa", "center_yield_mpa",
                "center_elongation_pct", "center_martensite_pct", "di_mm", "peak_ratio") + BAND_KEYS:
        if key in res:
            out[key] = _scalar(res[key])
    for key in getattr(fam, "result_keys", ()):      # a family's own keys (e.g. section_limit_mm)
        if key in res:
            out[key] = _scalar(res[key])
    out["case_depth_mm"] = out.get("case_depth_mm") or 0.0
    if "profile_hv" in res:
        pos = np.asarray(res["profile_positions"], float)
        hv = np.asarray(res["profile_hv"], float)[0]
        sc = scale_hardness(hv, batch.attr("family").repeat(len(hv)))
        section = d if d is not None else t
        out["profile"] = [{"r_over_R": float(p), "depth_mm": round(float((1 - p) * section / 2), 3),
                           "hardness_hv": _scalar(h), "hardness_hrc": _scalar(c)}
                          for p, h, c in zip(pos, hv, sc["hrc"])]
    out["test_location"] = "centre" if float(tension_test_position(np.array([d or t]))[0]) == 0 else "mid-radius"
    out["grade"] = g.id
    out["family"] = g.family
    out["route_family"] = fam.name
    out["route"] = fam.to_steps(params)
    out["route_text"] = steps_mod.describe(out["route"])
    out["params"] = {k: _scalar(v) for k, v in params.items()}
    out["composition"] = composition if heat_composition is None else "heat"
    if heat_composition is not None:
        out["heat_composition"] = {e: round(float(v), 6) for e, v in comp.items()}
    out["diameter_mm"] = d
    out["thickness_mm"] = t
    notes = [m for m, mask in res.get("notes", []) if bool(np.asarray(mask).ravel()[0])]
    if g.family in STEEL_SCALE_FAMILIES and out.get("uts_mpa") is not None \
            and out["uts_mpa"] < 400.0 and out.get("hardness_hv") is None:
        notes.append(BELOW_TABLE_NOTE)      # say why a steel's hardness is missing
    out["warnings"] = list(dict.fromkeys(warns + notes))
    srcs = [f"{g.id}: {g.source}"] + [f"composition: {s}" for s in g.comp_sources] + list(fam.references)
    if g.family in STEEL_SCALE_FAMILIES:
        srcs.append(E140_SOURCE)
    srcs.append(bands.source_note())
    out["sources"] = list(dict.fromkeys(srcs))
    _add_fatigue(out, res, batch, fam.name, d if d is not None else t, fat_opts, service_temp_c)
    return out


def _add_fatigue(out: dict, res: dict, batch: Batch, route: str, section: float, opts: dict, temp_c) -> None:
    """``fatigue_limit_mpa`` (+ band) and the ``fatigue`` record of one state (in place)."""
    cols = fatigue.fatigue_columns(res, batch.attr("family"), np.array([route], dtype=object), [section],
                                   temp_c=temp_c, **opts)
    for key in ("fatigue_limit_mpa", "fatigue_limit_mpa_lo", "fatigue_limit_mpa_hi"):
        out[key] = _scalar(cols[key])
    cyc = _scalar(cols["fatigue_cycles"])
    rec = {**opts, "temp_c": 20.0 if temp_c is None else float(temp_c),
           **{k: _scalar(cols["fatigue_" + k]) for k in ("ka", "kb", "kc", "kd", "ke")},
           "cycles": cyc, "governing": _scalar(cols["fatigue_governing"]),
           "governing_depth_mm": _scalar(cols["fatigue_governing_depth_mm"]),
           "basis": ("endurance limit (steel): Se' = 0.5 Sut capped at 700 MPa, Marin factors" if cyc is None
                     else f"fatigue strength at {cyc:.0e} cycles (no endurance limit), Marin factors")}
    hv = out.get("hardness_hv")
    if out.get("family") in fatigue.STEEL_FAMILIES and hv is not None:
        rec["murakami_polished_mpa"] = _scalar(fatigue.fm.murakami_fatigue_limit_mpa(hv))
    if "profile" in out and out.get("family") in fatigue.STEEL_FAMILIES and out.get("diameter_mm"):
        td = fatigue.through_depth(out["profile"], out["diameter_mm"], route, temp_c=temp_c,
                                   case_depth_mm=float(out.get("case_depth_mm") or 0.0), **opts)
        rec["through_depth"] = {k: (v.round(4).tolist() if isinstance(v, np.ndarray) else round(v, 4))
                                for k, v in td.items()}
    out["fatigue"] = rec
    used = {"section_mm": section, "temp_c": temp_c,
            "hardness_hv": hv if out.get("family") in fatigue.STEEL_FAMILIES else None}
    msgs = [m for inp in fatigue.MODEL_INPUTS if used[inp.name] is not None
            for m in validity.check(inp.model, **{inp.variable: used[inp.name]})]
    out["warnings"] = list(dict.fromkeys(out["warnings"] + msgs))
    out["sources"].append("fatigue: Marin (1962) factors as tabulated in Budynas & Nisbett, Shigley's "
                          "Mechanical Engineering Design, 10th ed. (2015), sec. 6-7 to 6-9 (data/fatigue_surface.csv); "
                          "non-ferrous ratios data/fatigue_nonferrous.csv; case residual stress "
                          "data/residual_stress.csv with the FKM mean-stress sensitivity (Rennert et al. 2012)")
