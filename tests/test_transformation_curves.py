"""Curves of the one-candidate view (selector/routes/transformation_curves.py) and their charts
(selector/views/charts_beyond.py)."""
from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

import selector
from selector.errors import InputError
from selector.models import transformation
from selector.routes import transformation_curves as TC
from selector.views import charts_beyond as CB


@pytest.fixture(scope="module")
def aust():
    return selector.evaluate("4340", [{"op": "austemper", "bath_c": 340, "hours": 1}], 25.0)


@pytest.fixture(scope="module")
def carb():
    return selector.evaluate("8620", [{"op": "carburize", "temp_c": 925, "hours": 6}, {"op": "harden", "quench": "oil"},
                                      {"op": "temper", "temp_c": 180}], 25.0)


def test_curves_finish_after_start_and_inside_their_ranges(aust):
    d = TC.candidate_curves(aust)
    cur = d["curves"]
    for r in ("ferrite", "pearlite", "bainite"):
        s = cur[cur["curve"] == f"{r} start"].set_index("temp_c")["time_s"]
        f = cur[cur["curve"] == f"{r} finish"].set_index("temp_c")["time_s"]
        assert len(s) and (f.loc[s.index] > s).all()
    b = cur[cur["reaction"] == "bainite"]["temp_c"]
    assert b.max() < d["lines"]["bs_c"] and b.min() > d["lines"]["ms_c"]
    p = cur[cur["reaction"] == "pearlite"]["temp_c"]
    assert p.max() < d["lines"]["ac1_c"]


def test_bath_path_ends_at_the_bath_and_centre_lags_surface(aust):
    path = TC.candidate_curves(aust)["path"]
    surf = path[path["location"] == "surface"].reset_index(drop=True)
    cen = path[path["location"] == "centre"].reset_index(drop=True)
    assert abs(cen["temp_c"].iloc[-1] - 340.0) < 1.0
    assert (cen["temp_c"] >= surf["temp_c"] - 1e-6).all()      # the centre is never colder than the surface
    assert np.all(np.diff(cen["temp_c"]) <= 1e-9)               # cooling only


def test_quench_route_path_goes_to_the_quench_bath():
    qt = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}], 25.0)
    d = TC.candidate_curves(qt)
    assert "bath_c" not in d["lines"]
    assert d["path"]["temp_c"].min() < 60.0


def test_routes_without_a_quench_give_empty_tables():
    ev = selector.evaluate("6061", [{"op": "solution_treat"}, {"op": "age", "temp_c": 175, "hours": 8}], 25.0)
    d = TC.candidate_curves(ev)
    assert d["curves"].empty and d["path"].empty


def test_curves_hold_the_bainite_carbon_at_the_fit_limit():
    hi_c = {"C": 0.95, "Mn": 0.4, "Si": 0.25}
    tc = TC.transformation_curves(hi_c, temps_c=[315.0])
    capped = transformation.isothermal_time_s({**hi_c, "C": transformation.LI_MAX_C}, 315.0, 0.01, "bainite")
    # the rate constant holds C at 0.6 %; Bs keeps the real carbon, so compare with Bs of the real steel
    bs_real, bs_cap = transformation.bs_li_c(hi_c), transformation.bs_li_c({**hi_c, "C": 0.6})
    expected = capped * ((bs_cap - 315.0) / (bs_real - 315.0)) ** 2
    assert tc["bainite_start_s"][0] == pytest.approx(float(expected), rel=1e-6)


def test_bad_input_is_refused():
    with pytest.raises(InputError):
        TC.transformation_curves({"Mn": 1.0})
    with pytest.raises(InputError):
        TC.transformation_curves({"C": 0.4}, start=0.0)
    with pytest.raises(InputError):
        TC.candidate_curves({"grade": "4140"})
    with pytest.raises(InputError):
        CB.transformation_diagram({"curves": pd.DataFrame()})


def test_fatigue_depth_curves(carb):
    f = TC.fatigue_depth_curves(carb)
    t = f["table"]
    assert set(t["curve"]) == {"local fatigue strength", "bending stress"}
    # at the allowable surface stress the governing depth just reaches its strength: margin 1
    assert f["margin"] == pytest.approx(1.0, rel=1e-6)
    twice = TC.fatigue_depth_curves(carb, surface_stress_mpa=2 * f["allowable_surface_mpa"])
    # hand calculation: twice the stress halves the margin (strength / stress)
    assert twice["margin"] == pytest.approx(0.5, rel=1e-6)
    stress = t[t["curve"] == "bending stress"].sort_values("depth_mm")["stress_mpa"].to_numpy()
    assert np.all(np.diff(stress) <= 1e-9)                     # bending stress falls towards the axis
    with pytest.raises(InputError):
        TC.fatigue_depth_curves(carb, surface_stress_mpa=-5)
    assert TC.fatigue_depth_curves({"fatigue": {}})["table"].empty


def test_charts_build(aust, carb):
    spec = CB.transformation_diagram(TC.candidate_curves(aust), fahrenheit=True).to_dict()
    assert len(spec["layer"]) == 4
    dspec = CB.fatigue_depth_diagram(TC.fatigue_depth_curves(carb), mpa_per_unit=6.894757, unit="ksi").to_dict()
    assert len(dspec["layer"]) >= 3
    with pytest.raises(InputError):
        CB.fatigue_depth_diagram(TC.fatigue_depth_curves(carb), mpa_per_unit=0)
