"""Bar bought in a supply condition, alone or followed by a surface treatment.

Families and accepted sequences:

* ``supply``: ``supply`` (buy as supplied: no processing adder) and
  ``supply → stress_relieve`` (a cold-drawn bar stress relieved by the buyer);
* ``supply_induction``: ``supply → induction_harden [→ temper]`` (for example a cold-drawn
  or pre-hardened bar induction hardened);
* ``supply_nitride``: ``supply → nitride`` (a pre-hardened, quenched-and-tempered bar nitrided).

What is modelled:

* the supply condition's properties are those of ``data/supply_conditions.csv`` for the
  grade, condition, designation and size (the standard's minimum or a typical value, as
  the row's ``basis`` says); the ``annealed`` condition is the catalogue baseline;
* hardness: the row's published HRC band (its middle) where it gives one, else from the
  tensile strength on ASTM A370 Table 3 / E140;
* stress relieving of a cold-drawn bar: :mod:`selector.models.stress_relief` between the
  cold-drawn row and the annealed baseline;
* induction hardening and nitriding after supply: the induction and nitride families'
  own case models, on a core equal to the supply condition (the core is left as it
  was: induction heats only the case; nitriding below the prior temper leaves a
  quenched-and-tempered core unchanged, common practice);
* the structure of a bar bought quenched and tempered (:func:`mill_structure`): the
  mill made it by harden and temper, so its ``quench`` is the medium of the row's
  ``mill_quench`` (oil for the alloy grades, water for plain carbon C45; ASTM A434 and
  EN 10083 leave the medium to the producer, so this is common practice, stated per
  row in ``mill_quench_basis``) and its ``center_martensite_pct`` is what the
  hardenability chain of :func:`selector.routes.families.quench_temper.through_harden`
  (Grossmann H → conduction cooling → ASTM A255 Jominy curve → martensite %) gives
  for the grade's composition at the part's section with that medium, moderate
  agitation and the grade's default austenitizing temperature.  The tensile
  properties stay those of the row (the standard's guarantee at its test location);
  the centre martensite lets the caution rules treat the bar like a bar hardened
  in-house (``shallow_hardening``: centre below 50 % martensite under a strength
  target).  The tempering temperature of a bought bar is not known: the rules that
  read it (tempered-martensite embrittlement, service temperature) do not fire on it.

What is not modelled (``NotModelledError``): stress relieving anything but a cold-drawn
bar (``cold_drawn_stress_relieved`` is already relieved; a quenched-and-tempered bar is
tempered), nitriding a bar that is not quenched and tempered (a cold-drawn bar would
recover and distort during a nitriding cycle of tens of hours, and the handbook practice is
to harden and temper first), and through-hardening a supplied bar (that is the
``quench_temper`` route from the annealed bar: the supply condition is then irrelevant).
"""
from __future__ import annotations

import dataclasses

import numpy as np

from ...catalogue import supply as sup
from ...catalogue.grades import FAMILIES as FAMILIES_ALL
from ...errors import NotModelledError, RouteError
from ...models import conversions, stress_relief
from ..model_inputs import restrict, uses
from .. import bands
from . import get
from .base import Batch, RouteFamily, at_position, tension_test_position
from .cold_work import stress_relief_steps
from .quench_temper import (HARDENING_INPUTS, as_quenched_distinct, batch_class, core_model_inputs,
                            default_austenitize_c)

STEEL_SCALE = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_martensitic",
               "stainless_ph", "tool_steel", "maraging_steel")

REFERENCES = (
    "data/supply_conditions.csv (properties by size: ASTM A108 / SAE J1397 estimated values, ASTM A311, "
    "ASTM A434, EN 10083 +QT, EN 10277; each row names its table and confidence)",
    "ASTM E140-12b Table 1 / ASTM A370 Table 3 (hardness from tensile strength)",
)


#: grade families whose bar bought quenched and tempered is given the mill's structure
#: (the hardenability chain; other families are not through-hardened by a quench)
MILL_HARDENED = ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel")
#: agitation of the mill quench (the chain's default; common practice)
MILL_AGITATION = "moderate"
MILL_NOTE = ("bought quenched and tempered: centre martensite from the hardenability chain of the grade at this "
             "section with the mill quench of data/supply_conditions.csv (mill_quench; the product standard leaves "
             "the medium to the producer: common practice); ask the mill for its quench and the test report")


def mill_quench_of(grade, condition: str, designation: str) -> str:
    """The mill's quench medium of a supply state (``""`` where the bar was not quenched
    by the mill, or its family is not through-hardened by a quench)."""
    if grade.family not in MILL_HARDENED:
        return ""
    return sup.mill_quench(grade, condition, designation)


def mill_structure(batch: Batch, quench) -> dict:
    """The structure of the bar as the mill made it, for the states whose ``quench``
    (the mill's medium, ``""`` for none) is given.

    Parameters
    ----------
    batch : Batch
        Supply states (any family of this module).
    quench : array of str, shape (n,)
        The mill quench of each state (:func:`mill_quench_of`), ``""`` where none.

    Returns
    -------
    dict
        ``center_martensite_pct`` (n,), NaN where the bar was not quenched by the mill;
        ``model_inputs``: the inputs of the hardenability chain
        (:data:`~selector.routes.families.quench_temper.HARDENING_INPUTS`) on the mill-quenched
        states (mask ``core``), for ``routes.evaluate.finish`` to check.

    Method: the as-quenched chain of :func:`selector.routes.families.quench_temper.through_harden`
    (Grossmann H, conduction cooling, ASTM A255, martensite %) with the mill's medium,
    :data:`MILL_AGITATION` agitation and the grade's default austenitizing temperature.
    Validity: that of the chain (declared through ``HARDENING_INPUTS``).

    Example (illustrative: a 4140 bar bought to ASTM A434 class BD, Ø60 mm; the chain's
    centre martensite with an oil quench)

    >>> from selector.catalogue.grades import default_catalogue
    >>> g = default_catalogue().lookup("4140")
    >>> b = Batch.single(g, g.composition(), {}, 60.0, None)
    >>> bool(mill_structure(b, ["oil"])["center_martensite_pct"][0] > 50.0)
    True
    """
    n = batch.n
    q = np.asarray(quench, dtype=object).astype(str)
    on = q != ""
    cm = np.full(n, np.nan)
    mi: dict = {"core": on.copy()}
    if on.any():
        sub = batch.subset(on)
        aust = np.array([_austenitize_c(g) for g in sub.grades], float)[sub.gidx]
        # the as-quenched part of through_harden (no temper: the strength is the row's)
        prof = as_quenched_distinct(sub, q[on], np.full(sub.n, MILL_AGITATION, dtype=object), aust)
        pos = np.asarray(prof["positions"], float)
        mart = np.asarray(prof["martensite_pct"], float)
        cm[on] = at_position(mart, pos, np.zeros(sub.n))
        where = tension_test_position(sub.section_mm)
        nan = np.full(sub.n, np.nan)
        sub_mi = core_model_inputs(prof, sub.comp, pos, where, nan, nan, 100.0 - at_position(mart, pos, where),
                                   batch_class(sub))
        for k, v in sub_mi.items():
            v = np.asarray(v)
            if v.shape != (sub.n,):
                continue
            full = np.zeros(n, bool) if v.dtype == bool else np.full(n, np.nan)
            full[on] = v
            mi[k] = full
        restrict({"model_inputs": mi}, "core", on)
    # the bar's strength is the supply row's, not computed here: no tempering or strength model runs
    for k in ("core_tempered", "core_mixed_tempered", "alloy_class", "carbon_class"):
        mi[k] = np.zeros(n, bool)
    return {"center_martensite_pct": cm, "model_inputs": mi}


_AUSTENITIZE: dict = {}


def _austenitize_c(grade) -> float:
    """:func:`~selector.routes.families.quench_temper.default_austenitize_c`, kept per grade id."""
    key = (grade.id, grade.family)
    if key not in _AUSTENITIZE:
        _AUSTENITIZE[key] = default_austenitize_c(grade)
    return _AUSTENITIZE[key]


def _mill_quenches(batch: Batch) -> np.ndarray:
    """:func:`mill_quench_of` of every state of ``batch`` (looked up once per distinct grade,
    condition and designation)."""
    cond = np.asarray(batch.params["condition"]).astype(str).tolist()
    des = np.asarray(batch.params["designation"]).astype(str).tolist()
    seen: dict = {}
    out = np.empty(batch.n, dtype=object)
    for i, key in enumerate(zip(batch.gidx.tolist(), cond, des)):
        q = seen.get(key)
        if q is None:
            q = seen[key] = mill_quench_of(batch.grades[key[0]], key[1], key[2])
        out[i] = q
    return out


def _designation(grade, condition: str, given):
    names = sup.designations(grade, condition)
    if not names:
        offered = ", ".join(sorted({c for c, _ in sup.conditions_for(grade)})) or "none"
        raise RouteError("condition", condition, f"a supply condition listed for {grade.id} "
                         f"(data/supply_conditions.csv: {offered})", "supply")
    if given is None:
        return names[0]
    if given not in names:
        raise RouteError("designation", given, f"one of: {', '.join(names)} ({grade.id}, {condition})", "supply")
    return given


def supply_properties(batch: Batch) -> dict:
    """Properties of the supplied bar of each state of ``batch`` (parameters
    ``condition`` and ``designation``) at its section: arrays ``uts_mpa``,
    ``yield_mpa``, ``elongation_pct``, ``hardness_hv`` and the masks ``outside``
    (section outside every row's sizes), ``minimum`` (row basis is the standard's
    minimum) and ``confidence`` (object array)."""
    n = batch.n
    cond = np.asarray(batch.params["condition"]).astype(str)
    des = np.asarray(batch.params["designation"]).astype(str)
    section = batch.section_mm
    uts, ys, el, hv = (np.full(n, np.nan) for _ in range(4))
    outside, minimum = np.zeros(n, bool), np.zeros(n, bool)
    conf = np.full(n, "", dtype=object)
    cache = {}
    for i in range(n):
        g = batch.grades[batch.gidx[i]]
        key = (g.id, cond[i], des[i], float(section[i]))
        if key not in cache:
            cache[key] = sup.pick_row(g, cond[i], des[i], float(section[i]))
        row, out = cache[key]
        if row is None:
            uts[i], ys[i], el[i] = g.base_uts_mpa, g.base_yield_mpa, g.base_elongation_pct
            hb = g.base_hardness_hb
            hv[i] = conversions.hb_to_hv(hb) if hb == hb else np.nan
            conf[i] = g.confidence
            outside[i] = out
            continue
        uts[i], ys[i], el[i] = row.uts_mpa, row.yield_mpa, row.elongation_pct
        if row.hardness_hrc_min == row.hardness_hrc_min:
            hv[i] = conversions.hrc_to_hv(0.5 * (row.hardness_hrc_min + row.hardness_hrc_max))
        else:
            hv[i] = np.nan
        outside[i], minimum[i], conf[i] = out, row.basis == "minimum", row.confidence
    need = ~np.isfinite(hv) & np.isfinite(uts)
    if need.any():
        hv[need] = conversions.uts_to_hv(uts[need])
    return {"uts_mpa": uts, "yield_mpa": ys, "elongation_pct": el, "hardness_hv": hv, "outside": outside,
            "minimum": minimum, "confidence": conf}


def _supply_notes(props: dict, batch: Batch) -> list:
    cond = np.asarray(batch.params["condition"]).astype(str)
    return [
        ("section outside the sizes of the supply-condition source row: the nearest size's values are "
         "given (data/supply_conditions.csv)", props["outside"]),
        ("supply condition values are the standard's guaranteed minimums (the bar as delivered is usually "
         "stronger; certified test reports govern)", props["minimum"]),
        ("supply condition values are recalled, not verified (from memory): check the product standard",
         props["confidence"] == "from memory"),
        ("annealed bar: the catalogue's annealed baseline (data/grades.csv)", cond == "annealed"),
    ]


def _with_core(batch: Batch, props: dict) -> Batch:
    """A batch whose grade records carry the supplied bar's properties as their baseline, so
    that a downstream family's 'supplied core' is the bar's: one record per distinct grade and
    bar (the states of a grade and condition share it), the states pointing at theirs."""
    n = batch.n
    hv = np.asarray(props["hardness_hv"], float)
    fin = np.isfinite(hv)
    hb = np.array([g.base_hardness_hb for g in batch.grades] + [np.nan], float)[:-1][batch.gidx]
    if fin.any():
        hb[fin] = conversions.hv_to_hb(hv[fin])
    table = np.ascontiguousarray(np.column_stack([np.asarray(batch.gidx, float)] + [
        np.asarray(props[k], float) for k in ("uts_mpa", "yield_mpa", "elongation_pct")] + [hb]))
    _, first, inverse = np.unique(table.view(np.dtype((np.void, table.dtype.itemsize * table.shape[1]))).ravel(),
                                  return_index=True, return_inverse=True)
    grades = []
    for i in first.tolist():
        g = batch.grades[batch.gidx[i]]
        grades.append(dataclasses.replace(
            g, base_uts_mpa=float(props["uts_mpa"][i]), base_yield_mpa=float(props["yield_mpa"][i]),
            base_elongation_pct=float(props["elongation_pct"][i]), base_hardness_hb=float(hb[i])))
    return Batch(grades, inverse.reshape(-1).astype(np.int64) if n else np.zeros(0, np.int64), batch.comp,
                 batch.params, batch.diameter_mm, batch.thickness_mm)


class Supply(RouteFamily):
    name = "supply"
    label = "bar as supplied"
    patterns = (("supply",), ("supply", "stress_relieve"))
    main_parameter = None
    #: ``quench``: the mill's medium of a bar bought quenched and tempered (set by the supply row,
    #: not by the user; ``""`` for the other conditions): :func:`mill_structure`
    parameters = ("condition", "designation", "stress_relieve_temp_c", "stress_relieve_hours", "quench")
    #: every grade family: a grade admits the route from its supply rows (catalogue/supply.py)
    families = FAMILIES_ALL
    references = REFERENCES + (stress_relief.REFERENCE,
                               "hardenability chain of the mill-quenched bar: see selector.routes.families."
                               "quench_temper (Grossmann H, conduction cooling, ASTM A255)")
    model_inputs = uses("stress_relief", temp_c="stress_relieve_temp_c", hours="stress_relieve_hours") \
        + HARDENING_INPUTS

    def parse(self, steps, grade):
        s = steps[0]
        cond = str(s["condition"])
        if cond == "annealed" and not sup.is_annealed_baseline(grade):
            raise RouteError("condition", cond, f"a supply condition listed for {grade.id}: its baseline is "
                             f"{grade.base_condition!r}, not an annealed steel bar", "supply")
        des = "catalogue baseline" if cond == "annealed" else _designation(grade, cond, s.get("designation"))
        params = {"condition": cond, "designation": des, "stress_relieve_temp_c": float("nan"),
                  "stress_relieve_hours": float("nan"), "quench": mill_quench_of(grade, cond, des)}
        warns = []
        if len(steps) > 1:
            if cond not in sup.COLD_WORKED:
                raise NotModelledError(
                    f"stress relieving a bar supplied {sup.CONDITIONS[cond]!r} is not modelled: only a cold-drawn "
                    "bar carries the cold work that stress relieving recovers (cold_drawn_stress_relieved is "
                    "already relieved; a quenched-and-tempered bar is tempered)")
            sr = steps[1]
            params["stress_relieve_temp_c"] = float(sr["temp_c"])
            params["stress_relieve_hours"] = float(sr.get("hours", 1.0))
        return params, warns

    def to_steps(self, params):
        step = {"op": "supply", "condition": str(params["condition"])}
        if str(params.get("condition")) != "annealed":
            step["designation"] = str(params["designation"])
        return [step] + stress_relief_steps(params)

    def grid(self, grade):
        pairs = sup.conditions_for(grade)
        n = len(pairs)
        return {"condition": np.array([c for c, _ in pairs], dtype=object),
                "designation": np.array([d for _, d in pairs], dtype=object),
                "stress_relieve_temp_c": np.full(n, np.nan), "stress_relieve_hours": np.full(n, np.nan),
                "quench": np.array([mill_quench_of(grade, c, d) for c, d in pairs], dtype=object)}

    def compute(self, batch: Batch):
        n = batch.n
        props = supply_properties(batch)
        uts, ys, el, hv = (props[k].copy() for k in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv"))
        sr_t = np.asarray(batch.params.get("stress_relieve_temp_c", np.full(n, np.nan)), float)
        sr_h = np.asarray(batch.params.get("stress_relieve_hours", np.full(n, np.nan)), float)
        relieved = np.isfinite(sr_t)
        if relieved.any():
            r = stress_relief.stress_relieved_properties(
                np.where(relieved, sr_t, 400.0), np.where(relieved, sr_h, 1.0), uts, ys, el,
                batch.attr("base_uts_mpa"), batch.attr("base_yield_mpa"), batch.attr("base_elongation_pct"))
            uts = np.where(relieved, r["uts_mpa"], uts)
            ys = np.where(relieved, r["yield_mpa"], ys)
            el = np.where(relieved, r["elongation_pct"], el)
            hv = np.where(relieved, conversions.uts_to_hv(np.where(relieved, uts, 500.0)), hv)
        fam = batch.attr("family").astype(str)
        hv = np.where(np.isin(fam, STEEL_SCALE) | np.isin(fam, ("stainless_austenitic",)), hv, np.nan)
        out = {"uts_mpa": uts, "yield_mpa": ys, "elongation_pct": el, "center_uts_mpa": uts,
               "center_yield_mpa": ys, "center_elongation_pct": el, "hardness_hv": hv,
               "surface_hardness_hv": hv, "center_hardness_hv": hv, "case_depth_mm": np.zeros(n),
               # a standard's guaranteed minimum at a size the row covers, not relieved here: no model band
               bands.BAND_FREE: (np.asarray(props["minimum"], bool) & ~np.asarray(props["outside"], bool)
                                 & ~relieved).astype(float)}
        mill = mill_structure(batch, _mill_quenches(batch))
        out["center_martensite_pct"] = mill["center_martensite_pct"]
        out["model_inputs"] = mill["model_inputs"]
        notes = _supply_notes(props, batch)
        notes.append(("stress relieving model: ASM Handbook cold-finished bar practice (from memory) on the "
                      "Hollomon-Jaffe time-temperature parameter", relieved))
        notes.append((MILL_NOTE, np.isfinite(mill["center_martensite_pct"])))
        out["notes"] = notes
        return out


class _SupplyThen(RouteFamily):
    """A supply condition followed by a surface treatment of another family."""

    inner_name = ""
    conditions: tuple = ()

    def _inner(self):
        return get(self.inner_name)

    @property
    def families(self):  # noqa: D401 - the grade families of the inner route
        return self._inner().families

    @property
    def model_inputs(self):  # noqa: D401 - the inner route's models (its prior core is not run here)
        return self._inner().model_inputs

    def _split(self, steps, grade):
        self.require_family(grade)
        s = steps[0]
        cond = str(s["condition"])
        if cond not in self.conditions:
            raise NotModelledError(
                f"{self.label.replace('supply + ', '')} after a bar supplied {sup.CONDITIONS.get(cond, cond)!r} is "
                f"not modelled (modelled supply conditions: {', '.join(self.conditions)})")
        des = "catalogue baseline" if cond == "annealed" else _designation(grade, cond, s.get("designation"))
        inner_params, warns = self._inner().parse(steps[1:], grade)
        mq = mill_quench_of(grade, cond, des)
        if mq and self.mill_quench_param in inner_params:
            inner_params[self.mill_quench_param] = mq
        return {"condition": cond, "designation": des, **inner_params}, warns

    def parse(self, steps, grade):
        return self._split(steps, grade)

    def to_steps(self, params):
        step = {"op": "supply", "condition": str(params["condition"])}
        if str(params["condition"]) != "annealed":
            step["designation"] = str(params["designation"])
        return [step] + self._inner().to_steps(params)

    def _pairs(self, grade):
        return [(c, d) for c, d in sup.conditions_for(grade) if c in self.conditions]

    #: inner parameters that describe a prior cycle of ours (none: the bar is bought)
    prior_numeric: tuple = ()
    #: the inner parameter that names the prior hardening's medium: the mill's, for a bar bought
    #: quenched and tempered (:func:`mill_quench_of`)
    mill_quench_param: str = ""

    def grid(self, grade):
        pairs = self._pairs(grade)
        inner = dict(self._inner().grid(grade))
        m = len(next(iter(inner.values()))) if inner else 0
        inner["prior"] = np.array(["none"] * m, dtype=object)
        for k in self.prior_numeric:
            inner[k] = np.full(m, np.nan)
        # one state per remaining parameter point (the inner grid repeats them over prior cycles)
        names = list(inner)
        seen, keep = set(), []
        for i in range(m):
            key = tuple(str(inner[k][i]) for k in names)
            keep.append(key not in seen)
            seen.add(key)
        keep = np.array(keep, bool)
        inner = {k: np.asarray(v)[keep] for k, v in inner.items()}
        m = int(keep.sum())
        out = {"condition": np.array([c for c, _ in pairs for _ in range(m)], dtype=object),
               "designation": np.array([d for _, d in pairs for _ in range(m)], dtype=object)}
        for k, v in inner.items():
            out[k] = np.concatenate([v] * len(pairs)) if pairs else v[:0]
        # the prior cycle's quench of a bar bought quenched and tempered is the mill's
        mq = np.array([mill_quench_of(grade, c, d) for c, d in pairs for _ in range(m)], dtype=object)
        if self.mill_quench_param in out and len(mq):
            out[self.mill_quench_param] = np.where(mq != "", mq, out[self.mill_quench_param]).astype(object)
        return out

    def compute(self, batch: Batch):
        props = supply_properties(batch)
        res = self._inner().compute(_with_core(batch, props))
        # the core of a bar bought quenched and tempered has the mill's structure (the inner
        # family's own core chain did not run: the core is the bought bar)
        mill = mill_structure(batch, _mill_quenches(batch))
        res["center_martensite_pct"] = mill["center_martensite_pct"]
        res.setdefault("model_inputs", {}).update(mill["model_inputs"])
        res["notes"] = [(m, k) for m, k in res.get("notes", []) if not m.startswith(self.drop_note)]
        res["notes"] += _supply_notes(props, batch)
        res["notes"].append((MILL_NOTE, np.isfinite(mill["center_martensite_pct"])))
        res["notes"].append((f"core: the supplied bar ({self.core_note})", np.ones(batch.n, bool)))
        return res


class SupplyInduction(_SupplyThen):
    name = "supply_induction"
    label = "supply + induction harden"
    inner_name = "induction"
    patterns = (("supply", "induction_harden"), ("supply", "induction_harden", "temper"))
    conditions = ("hot_rolled", "cold_drawn", "cold_drawn_stress_relieved", "quenched_tempered", "normalized",
                  "annealed", "peeled")
    main_parameter = "case_depth_mm"
    parameters = ("condition", "designation", "case_depth_mm", "frequency_hz", "quench", "temper_temp_c",
                  "temper_hours", "prior", "prior_quench", "prior_agitation", "prior_austenitize_c",
                  "prior_temper_temp_c", "prior_temper_hours")
    references = REFERENCES + ("induction family references (selector.routes.families.induction)",)
    drop_note = "\u0000"   # no induction note refers to the annealed core
    mill_quench_param = "prior_quench"
    prior_numeric = ("prior_austenitize_c", "prior_temper_temp_c", "prior_temper_hours")
    core_note = "induction heats only the hardened layer; the core keeps the supply condition's properties"

    def _pairs(self, grade):
        # the annealed bar is the induction family's own 'supplied core' route
        return [(c, d) for c, d in sup.conditions_for(grade) if c in self.conditions and c != "annealed"]


class SupplyNitride(_SupplyThen):
    name = "supply_nitride"
    label = "supply + nitride"
    inner_name = "nitride"
    patterns = (("supply", "nitride"),)
    conditions = ("quenched_tempered",)
    main_parameter = "hours"
    parameters = ("condition", "designation", "temp_c", "hours", "prior", "quench", "agitation",
                  "austenitize_c", "temper_temp_c", "temper_hours")
    references = REFERENCES + ("nitride family references (selector.routes.families.nitride)",)
    drop_note = "nitrided without a prior harden and temper"
    mill_quench_param = "quench"
    prior_numeric = ("austenitize_c", "temper_temp_c", "temper_hours")
    core_note = ("quenched and tempered by the bar maker; nitriding below its tempering temperature leaves it "
                 "unchanged (common practice); the tempering temperature of a bought bar is not known, so check "
                 "it with the supplier")


FAMILIES = [Supply(), SupplyInduction(), SupplyNitride()]
