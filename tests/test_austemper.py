"""Checks of the austemper and martemper route families (selector/routes/families/austemper.py)."""
from __future__ import annotations

import numpy as np
import pytest

import selector
from selector.catalogue.grades import default_catalogue
from selector.errors import RouteError
from selector.routes.families import austemper as A

AUST = [{"op": "austemper", "bath_c": 340, "hours": 1}]


@pytest.fixture(scope="module")
def r4340():
    return selector.evaluate("4340", AUST, 25.0)


def test_route_recognised_and_round_trips(r4340):
    assert r4340["route_family"] == "austemper"
    again = selector.evaluate("4340", r4340["route"], 25.0)
    assert again["hardness_hv"] == pytest.approx(r4340["hardness_hv"])


def test_low_carbon_grade_does_not_admit_the_bath_routes():
    # grades.BATH_ROUTE_MIN_C: medium- and high-carbon steels only (ASM Handbook Vol. 4, from memory)
    assert "austemper" not in default_catalogue().lookup("1018").routes
    with pytest.raises(RouteError):
        selector.evaluate("1018", AUST, 10.0)


def test_section_limit_is_reported_and_scheil_rises_with_diameter(r4340):
    assert any("section limit" in w for w in r4340["warnings"])
    comp = default_catalogue().lookup("4340").composition()
    d = np.array([5.0, 20.0, 80.0])
    s = A.scheil_to_bath({k: np.full(3, v) for k, v in comp.items()}, np.full(3, 815.0), np.full(3, 340.0),
                         diameter_mm=d)
    assert np.all(np.diff(s) > 0)          # a larger section cools more slowly: more time for pearlite


def test_bath_below_ms_is_flagged():
    r = selector.evaluate("4140", [{"op": "austemper", "bath_c": 280, "hours": 1}], 10.0)
    assert any("below Ms" in w for w in r["warnings"])


def test_longer_hold_more_bainite():
    comp = default_catalogue().lookup("4340").composition()
    c = {k: np.array([v]) for k, v in comp.items()}
    x = [float(A.bainite_progress(c, np.array([340.0]), np.array([h]))[0]) for h in (0.1, 1.0, 4.0)]
    assert x == sorted(x) and x[0] < x[-1]


def test_martemper_temper_softens():
    hard = selector.evaluate("4140", [{"op": "martemper", "bath_c": 340}], 25.0)
    tempered = selector.evaluate("4140", [{"op": "martemper", "bath_c": 340}, {"op": "temper", "temp_c": 540}], 25.0)
    assert tempered["hardness_hv"] < hard["hardness_hv"]
    assert any("temper promptly" in w for w in hard["warnings"])


def test_bath_routes_not_in_selection_yet():
    cand = selector.select({"min_yield_mpa": 600.0}, 25.0)
    assert not cand["route_family"].isin(["austemper", "martemper"]).any()


@pytest.mark.xfail(strict=True, reason="known gap: Li et al. (1998) kinetics and Maynier (1978) bainite hardness "
                   "are outside their validity for 0.95 % C; the model predicts about 31 HRC and pearlite at the "
                   "centre, against about 52 HRC published")
def test_austempered_1095_hardness_against_published_data():
    # ASM Handbook Vol. 4 (1991), austempering of steel: 1095 rounds of 4.6 mm (0.180 in), austempered,
    # about 52 HRC (table comparing austempering with quench and temper; values from memory)
    r = selector.evaluate("1095", [{"op": "austemper", "bath_c": 315, "hours": 1}], 4.6)
    assert r["hardness_hrc"] == pytest.approx(52.0, abs=4.0)


def test_transformation_chart_frame():
    from selector.views import page as pg

    ev = selector.evaluate("4340", AUST, 25.0)
    fr = pg.transformation_frame(ev, pg.SI)
    curves = set(fr["curve"])
    assert {"bainite start", "bainite finish", "centre cooling path", "surface cooling path"} <= curves
    b = fr[fr["curve"] == "bainite start"].set_index("temp")["time_s"]
    f = fr[fr["curve"] == "bainite finish"].set_index("temp")["time_s"]
    assert (f.loc[b.index] > b).all()              # finish after start at every temperature
    centre = fr[fr["curve"] == "centre cooling path"]["temp"].to_numpy()
    assert centre[0] > centre[-1] and abs(centre[-1] - 340.0) < 1.0   # ends at the bath
    qt = selector.evaluate("4340", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}], 25.0)
    assert pg.transformation_frame(qt, pg.SI).empty
