"""selector.design.sweep_routes: the diameter sweep with the steps of each pick."""
from __future__ import annotations

import pytest

import selector
from selector.design.sweep import diameter_sweep
from selector.design.sweep_routes import diameter_sweep_routes
from selector.errors import InputError

CASE = dict(load_kn=60.0, shear_planes=2, safety_factor=2.0, gap_mm=1.5, lug_thickness_mm=38.0,
            clevis_thickness_mm=16.0)


def test_steps_are_the_pick_and_the_sweep_is_unchanged():
    d = [22.0, 30.0]
    sw = diameter_sweep_routes(d, **CASE)
    ref = diameter_sweep(d, **CASE)
    assert list(sw.columns[:-1]) == list(ref.columns) and sw.columns[-1] == "route"
    for col in ("grade", "route_text", "part_cost"):
        assert list(sw[col]) == list(ref[col])
    for _, row in sw.iterrows():
        assert row["grade"]
        ev = selector.evaluate(row["grade"], row["route"], diameter_mm=row["diameter_mm"])
        # the steps evaluate to the pick: same route family and the same route in words
        assert ev["route_family"] == row["route_family"] and ev["route_text"] == row["route_text"]


def test_a_selection_function_is_refused():
    with pytest.raises(InputError, match="select"):
        diameter_sweep_routes([25.0], select=lambda *a, **k: None, **CASE)
