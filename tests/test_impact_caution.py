"""The impact/shock-loading caution (data/cautions.csv row "impact"; thresholds common practice)."""
from __future__ import annotations

import pandas as pd
import pytest

import selector
from selector.rules.cautions import CAUTIONS, cautions_for
from selector.errors import InputError


def _frame():
    return pd.DataFrame({
        "grade": ["8620", "8620", "4140", "4140", "6061"],
        "family": ["carburizing_steel", "carburizing_steel", "alloy_steel", "alloy_steel", "aluminium"],
        "route": ["carburize", "carburize", "quench_temper", "quench_temper", "age"],
        "case_depth_mm": [1.0, 1.0, 0.0, 0.0, 0.0],
        "surface_hardness_hrc": [60.0, 52.0, 52.0, 45.0, float("nan")],
        "hardness_hrc": [30.0, 30.0, 50.5, 45.0, float("nan")],
    })


def _codes(rows):
    return [[c["code"] for c in r] for r in rows]


def test_fires_only_with_impact_and_above_the_thresholds():
    off = _codes(cautions_for(_frame()))
    assert not any("impact" in r for r in off)
    on = _codes(cautions_for(_frame(), impact=True))
    assert ["impact" in r for r in on] == [True, False, True, False, False]


def test_row_has_reason_and_source():
    c = CAUTIONS["impact"]
    assert c.reason and c.source and c.confidence == "common practice"


def test_impact_must_be_bool():
    with pytest.raises(InputError) as e:
        cautions_for(_frame(), impact="yes")
    assert e.value.field == "impact"


def test_select_passes_impact_to_the_cautions():
    t = {"min_yield_mpa": 1200.0}
    plain = selector.select(t, 25.0)
    shock = selector.select(t, 25.0, impact=True)
    assert not plain["cautions"].str.contains("Impact").any()
    case = shock["route_family"].isin(["carburize", "nitride", "induction"]) & (shock["case_depth_mm"] > 0)
    hard = (case & (shock["surface_hardness_hrc"] >= 55)) | (
        ~case & ((shock["hardness_hrc"] >= 50) | (shock["surface_hardness_hrc"] >= 50)))
    assert hard.any()
    assert shock.loc[hard, "cautions"].str.contains("Impact").all()
