"""Checks of selector.design.capacity (pin_capacity: the inverse of the pin targets)."""
from __future__ import annotations

import math

import numpy as np

import pytest

import selector
from selector.design.pins import LBF_TO_N, pin_report
from selector.errors import InputError

IN_MM = 25.4  # exact (NIST SP 811 App. B.9)

# The clevis-pin requirement as quoted on a public forum (the check): 1 in. 4130 pin,
# hardness 26.5-32 HRC, double shear, safety factor 1, shear / tensile 0.6; required ultimate
# capacity 116 260 lbf.  Geometry other than the diameter does not enter the shear capacity.
REQUIRED_LBF = 116_260.0


def _clevis(hrc):
    return selector.pin_capacity("4130", None, IN_MM, 0.0, IN_MM, 0.5 * IN_MM, shear_planes=2,
                                 safety_factor=1.0, hardness_hrc=hrc)


def test_clevis_case_meets_requirement_at_bottom_of_hardness_range():
    r = _clevis(26.5)
    assert r["shear_lbf"] >= REQUIRED_LBF


def test_clevis_case_falls_short_at_24_hrc():
    r = _clevis(24.0)
    assert r["shear_lbf"] < REQUIRED_LBF


def test_capacity_keys_and_units():
    r = _clevis(26.5)
    for k in ("shear_kn", "shear_lbf", "bending_kn", "bending_lbf", "bearing_kn", "bearing_lbf", "governing",
              "load_kn", "load_lbf"):
        assert k in r
    for mode in ("shear", "bending", "bearing"):
        assert r[f"{mode}_lbf"] == pytest.approx(r[f"{mode}_kn"] * 1000.0 / LBF_TO_N)
    assert r["load_kn"] == min(r["shear_kn"], r["bending_kn"], r["bearing_kn"])
    assert r["load_kn"] == r[f"{r['governing']}_kn"]


def test_capacity_is_the_inverse_of_the_targets():
    """At the capacity load the targets of pin_targets equal the strengths used (same equations)."""
    route = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]
    geo = dict(diameter_mm=25.0, gap_mm=1.5, lug_thickness_mm=38.0, clevis_thickness_mm=16.0)
    cap = selector.pin_capacity("4140", route, shear_planes=2, safety_factor=2.0, **geo)
    ev = selector.evaluate("4140", route, 25.0)
    assert cap["uts_mpa"] == pytest.approx(ev["uts_mpa_lo"])       # band's lower edge
    assert cap["yield_mpa"] == pytest.approx(ev["yield_mpa_lo"])
    rep = pin_report(load_kn=cap["bending_kn"], shear_planes=2, safety_factor=2.0, **geo)
    assert rep["stresses"]["bending_mpa"] * 2.0 == pytest.approx(cap["yield_mpa"])
    rep = pin_report(load_kn=cap["shear_kn"], shear_planes=2, safety_factor=2.0, **geo)
    assert rep["targets"]["min_uts_mpa"] == pytest.approx(cap["uts_mpa"])


def test_safety_factor_divides_every_mode():
    a = _clevis(28.0)
    b = selector.pin_capacity("4130", None, IN_MM, 0.0, IN_MM, 0.5 * IN_MM, safety_factor=2.0, hardness_hrc=28.0)
    for mode in ("shear", "bending", "bearing"):
        assert b[f"{mode}_kn"] == pytest.approx(a[f"{mode}_kn"] / 2.0)


@pytest.mark.parametrize("kwargs, field", [
    (dict(route=None, hardness_hrc=None), "route/hardness_hrc"),
    (dict(route=[{"op": "anneal"}], hardness_hrc=30.0), "route/hardness_hrc"),
    (dict(route=None, hardness_hrc=65.0), "hardness_hrc"),
    (dict(route=None, hardness_hrc=float("nan")), "hardness_hrc"),
    (dict(route=None, hardness_hrc=30.0, safety_factor=0.5), "safety_factor"),
])
def test_bad_input_names_the_field(kwargs, field):
    with pytest.raises(InputError) as e:
        selector.pin_capacity("4130", diameter_mm=25.0, gap_mm=0.0, lug_thickness_mm=25.0,
                              clevis_thickness_mm=12.0, **kwargs)
    assert e.value.field == field


def test_hardness_on_a_non_steel_is_refused():
    with pytest.raises(InputError) as e:
        selector.pin_capacity("6061", None, 25.0, 0.0, 25.0, 12.0, hardness_hrc=30.0)
    assert e.value.field == "hardness_hrc" and "6061" in str(e.value)


def test_cli_pin_capacity(capsys):
    from selector.views.cli import main

    rc = main(["pin", "--capacity", "--grade", "4130", "--hardness-hrc", "26.5", "--diameter", "25.4",
               "--lug", "25.4", "--clevis", "12.7", "--safety-factor", "1", "--format", "json"])
    assert rc == 0
    import json
    out = json.loads(capsys.readouterr().out)
    assert out["shear_lbf"] >= REQUIRED_LBF and out["governing"] in ("shear", "bending", "bearing")
    assert "caution" in out


def test_cli_pin_without_load_or_capacity_is_an_input_error(capsys):
    from selector.views.cli import main

    assert main(["pin", "--diameter", "25", "--lug", "38", "--clevis", "16"]) == 2
    assert "--load-kn" in capsys.readouterr().err


def test_page_capacity_helpers():
    from selector.views import page as pg

    case = {"diameter_mm": 25.4, "gap_mm": 0.0, "lug_thickness_mm": 25.4, "clevis_thickness_mm": 12.7,
            "shear_planes": 2, "safety_factor": 1.0, "load_model": "uniform", "load_kn": 1.0}
    cap, msg = pg.capacity_for(case, "4130", "", 26.5, pg.US)
    assert msg is None
    t = pg.capacity_table(cap, pg.US)
    assert t.loc[t["mode"] == "shear", "allowable load (lbf)"].iloc[0] >= REQUIRED_LBF
    assert t["governing"].sum() == 1
    cap, msg = pg.capacity_for(case, "4130", "", 80.0, pg.SI)
    assert cap is None and "hardness_hrc" in msg


def test_page_fatigue_depth_frame():
    from selector.views import page as pg

    ev = selector.evaluate("8620", [{"op": "carburize", "temp_c": 925, "hours": 6}, {"op": "harden", "quench": "oil"},
                                    {"op": "temper", "temp_c": 180}], 25.0)
    fr = pg.fatigue_depth_frame(ev, pg.SI)
    assert set(fr["curve"]) == {"local fatigue strength", "applied stress at the allowable surface stress"}
    s = fr[fr["curve"] == "local fatigue strength"]["stress"].to_numpy()
    a = fr[fr["curve"] != "local fatigue strength"]["stress"].to_numpy()
    assert (a <= s + 1e-6).all() and np.isclose(a, s).any()     # the curves touch at the governing depth


def test_safety_factor_must_be_one_number():
    # found by the fuzz suite: a tuple reached float() of a 2-element array
    with pytest.raises(InputError) as e:
        selector.pin_capacity("4130", None, 25.4, 0.0, 25.4, 12.7, safety_factor=(1, 2), hardness_hrc=26.5)
    assert e.value.field == "safety_factor"
