"""The published Brinell hardness is compared where the source took it (``hb_location`` of
data/reference/qt_steels.csv; selector.validation.location)."""
import csv
import math

import pytest

import selector
from selector.catalogue.loader import data_dir
from selector.errors import InputError
from selector.models import conversions
from selector.validation import location, report
from selector.validation.report import QT_FILE, qt_case, recompute

ROUTE = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 538.0, "hours": 2.0}]


def _qt_rows():
    with open(data_dir() / QT_FILE, newline="") as f:
        return list(csv.DictReader(line for line in f if not line.startswith("#")))


def test_metal_mart_rows_carry_the_location_the_sheet_prints():
    # Metal Mart USA 4340 data sheet (metalmartusa.com catalog id 165): "tested at centre of 1-in
    # round" and "tested at half radius of 4-in round" (as recorded in the rows' notes)
    rows = [r for r in _qt_rows() if r["source"].startswith("Metal Mart USA")]
    assert len(rows) == 6
    for r in rows:
        want = "centre" if "centre of 1-in round" in r["note"] else "mid-radius"
        assert "half radius of 4-in round" in r["note"] or want == "centre"
        assert r["hb_location"] == want, (r["section_mm"], r["temper_temp_c"])


def test_every_location_is_allowed_or_blank():
    locs = {r["hb_location"] for r in _qt_rows()}
    assert locs <= set(location.LOCATIONS) | {""}


def test_locations_read_the_route_profile():
    res = selector.evaluate("4340", ROUTE, diameter_mm=152.4)
    centre = location.hardness_hb_at(res, "centre")
    surface = location.hardness_hb_at(res, "surface")
    # the profile read at r/R = 0 and 1 gives the route's own centre and surface hardness
    assert centre == pytest.approx(float(conversions.hv_to_hb(res["center_hardness_hv"])), rel=1e-9)
    assert surface == pytest.approx(float(conversions.hv_to_hb(res["surface_hardness_hv"])), rel=1e-9)
    assert surface > centre               # a 6-in oil-quenched round is softer inside
    # ASTM A370: a round over 38 mm is tested at mid-radius, so a blank location is the mid-radius
    assert res["test_location"] == "mid-radius"
    assert location.hardness_hb_at(res, "mid-radius") == pytest.approx(res["hardness_hb"], rel=1e-9)
    assert location.hardness_hb_at(res, None) == res["hardness_hb"]
    assert location.hardness_hb_at(res, float("nan")) == res["hardness_hb"]


def test_unknown_location_is_refused_by_name():
    with pytest.raises(InputError) as e:
        location.check_location("core")
    assert e.value.field == "hb_location" and "mid-radius" in str(e.value)


def test_report_compares_a_stated_location():
    rec = {"line": 1, "grade": "4340", "quench": "oil", "austenitize_c": 843.0, "section_mm": 152.4,
           "temper_temp_c": 538.0, "temper_hours": 2.0, "hardness_hb": 300.0, "kind": "typical",
           "source": "test", "table": "test", "confidence": "verified", "hb_location": "surface"}
    res = selector.evaluate("4340", [{"op": "harden", "quench": "oil", "austenitize_c": 843.0}, ROUTE[1]],
                            diameter_mm=152.4)
    got = recompute([qt_case(rec)]).set_index("property").loc["hardness_hb", "predicted"]
    assert got == pytest.approx(float(conversions.hv_to_hb(res["surface_hardness_hv"])), rel=1e-9)
    assert not math.isclose(got, res["hardness_hb"], rel_tol=1e-3)
    blank = recompute([qt_case({**rec, "hb_location": ""})]).set_index("property").loc["hardness_hb", "predicted"]
    assert blank == pytest.approx(res["hardness_hb"], rel=1e-9)


def test_metal_mart_rows_are_compared_where_the_sheet_tested():
    cases = [c for c in report.load_cases((QT_FILE,)) if c.source.startswith("Metal Mart USA")]
    comp = recompute(cases)
    hb = comp[comp["property"] == "hardness_hb"].set_index("line")["predicted"]
    for c in cases:
        res = selector.evaluate(c.grade, c.steps, diameter_mm=c.diameter_mm)
        assert hb[c.line] == pytest.approx(location.hardness_hb_at(res, c.hb_location), rel=1e-9)
