"""Validity checks are structural: every registered range is declared by a route family
(``RouteFamily.model_inputs``) or by the fatigue stage, ``routes.evaluate.finish`` checks every
declaration, and an input outside its range gives a visible warning naming the model, the
variable, the value and the range (selector/models/validity.py, selector/routes/model_inputs.py)."""

import numpy as np
import pytest

import selector
from selector.catalogue.grades import default_catalogue
from selector.models import aging, validity
from selector.routes import families, fatigue
from selector.states import expand as X


def _declared():
    out = {}
    for fam in families.available():
        for inp in fam.model_inputs:
            out.setdefault((inp.model, inp.variable), []).append(fam.name)
    for inp in fatigue.MODEL_INPUTS:
        out.setdefault((inp.model, inp.variable), []).append("fatigue")
    return out


def test_every_registered_range_is_checked_by_a_family():
    registry = validity.load_all()
    declared = _declared()
    unchecked = sorted((m, v) for m, reg in registry.items() for v in reg.ranges if (m, v) not in declared)
    assert unchecked == [], f"registered ranges no route family declares: {unchecked}"


def test_every_declared_input_is_a_registered_range():
    registry = validity.load_all()
    unknown = sorted(k for k in _declared() if k[0] not in registry or k[1] not in registry[k[0]].ranges)
    assert unknown == [], f"declared model inputs with no registered range: {unknown}"


def test_every_calibrated_aging_alloy_has_a_declared_model():
    from selector.routes.families.age import AGING_MODELS

    models = set(aging.aging_constants(list(aging.alloys())).model)
    assert models <= set(AGING_MODELS)


#: families that the selection does not expand yet (tests/test_austemper.py): one evaluate() each
NOT_EXPANDED = {"austemper": ("4340", [{"op": "austemper", "bath_c": 315}]),
                "martemper": ("4340", [{"op": "martemper", "bath_c": 230}, {"op": "temper", "temp_c": 200}])}


def test_every_family_resolves_its_declared_inputs_on_real_states():
    # finish() raises KeyError for a declared value or mask that the family's compute does not
    # provide: expand every family over the first catalogue grade it gives states for
    cat = default_catalogue()
    for fam in families.available():
        if fam.name in NOT_EXPANDED:
            grade, route = NOT_EXPANDED[fam.name]
            assert selector.evaluate(grade, route, diameter_mm=25.0)["route_family"] == fam.name
            continue
        for g in cat.grades.values():
            table = X.expand_family(fam, 25.0, grades=[g])
            if len(table):
                break
        assert len(table), f"no catalogue grade gives states for {fam.name}"


QT = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]


def _warning(grade, route, start, **kw):
    r = selector.evaluate(grade, route, **kw)
    hits = [w for w in r["warnings"] if w.startswith(start)]
    assert hits, f"no warning starting {start!r} in {r['warnings']}"
    return hits[0]


def test_high_carbon_steel_tempered_warns_the_tempering_fit():
    # 0.95 % C, inside the 1095 specification (SAE J403: 0.90-1.03 % C), beyond the 0.30-0.60 % C
    # of the tempering master surface's fit rows
    w = _warning("1095", QT, "tempering_hv: C", diameter_mm=10.0, heat_composition={"C": 0.95})
    assert "C = 0.95 wt% is outside 0.3–0.6 wt%" in w and "extrapolated" in w


def test_in_range_steel_gets_no_tempering_warning():
    r = selector.evaluate("4140", QT, diameter_mm=10.0)
    assert not any(w.startswith(("tempering_hv", "hollomon_jaffe")) for w in r["warnings"])


@pytest.mark.parametrize("grade, route, kw, start, text", [
    ("6061", [{"op": "solution_treat"}, {"op": "age", "temp_c": 300, "hours": 1}], {},
     "shercliff_ashby_aluminium: temp_c", "temp_c = 300 °C is outside 100–250 °C"),
    ("1045", [{"op": "cold_work", "reduction_pct": 90}], {},
     "strain_hardening: reduction_pct", "reduction_pct = 90 % is outside 0–80 %"),
    ("8620", [{"op": "carburize", "temp_c": 1050, "hours": 4}, {"op": "temper", "temp_c": 180}], {},
     "carbon_diffusivity: temp_c", "temp_c = 1050 °C is outside 850–1000 °C"),
    ("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 620},
              {"op": "nitride", "temp_c": 590, "hours": 20}], {},
     "nitrided_case_depth: temp_c", "temp_c = 590 °C is outside 495–565 °C"),
    ("1045", [{"op": "induction_harden", "case_depth_mm": 12}, {"op": "temper", "temp_c": 180}],
     {"diameter_mm": 60.0}, "induction_frequency_table: hardened_depth_mm", "hardened_depth_mm = 12 mm"),
    ("1045", [{"op": "anneal", "temp_c": 840}], {},
     "austenite_grain_growth: temp_c", "temp_c = 840 °C is outside 850–1250 °C"),
    ("4140", QT, {"diameter_mm": 300.0}, "marin_size: diameter_mm", "diameter_mm = 300 mm is outside –254 mm"),
])
def test_out_of_range_input_gives_a_named_warning(grade, route, kw, start, text):
    assert text in _warning(grade, route, start, **kw)


def test_state_table_carries_the_warning_on_the_offending_states_only():
    g = default_catalogue().grades["1095"]
    qt = families.get("quench_temper")
    table = X.expand_states(25.0, grades=[g], families=[qt])
    flagged = table["notes"].str.contains("tempering_hv: C = ", regex=False)
    tempered = np.isfinite(table["temper_temp_c"].to_numpy(float))
    assert flagged.to_numpy().any()
    assert not (flagged.to_numpy() & ~tempered).any()


def test_notes_group_states_by_value_and_keep_each_state_local():
    v = validity.notes("tempering_hv", "C", np.array([0.4, 0.95, 0.95, 0.97, np.nan]))
    assert [m.split(" is ")[0] for m, _ in v] == ["tempering_hv: C = 0.95 wt%", "tempering_hv: C = 0.97 wt%"]
    assert v[0][1].tolist() == [False, True, True, False, False]
    # the message of one state does not depend on the other states of the batch
    alone = validity.notes("tempering_hv", "C", np.array([0.97]))
    assert alone[0][0] == v[1][0]


def test_induction_on_a_normalized_core_checks_the_normalize_chain():
    # the prior normalize runs the normalize family's models on the core (not in the grid:
    # evaluate only); its inputs resolve and are checked like the anneal family's
    from selector.routes.families.induction import NORMALIZED_CORE_INPUTS

    assert {i.model for i in NORMALIZED_CORE_INPUTS} >= {"austenite_grain_growth", "gladman_mcivor_pickering"}
    r = selector.evaluate("1045", [{"op": "normalize"}, {"op": "induction_harden", "case_depth_mm": 2.0},
                                   {"op": "temper", "temp_c": 180}], diameter_mm=25.0)
    assert r["params"]["prior"] == "normalize"
