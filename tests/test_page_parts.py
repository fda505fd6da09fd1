"""The page's Parts list view (app.py) and its helpers (selector.views.page_parts)."""
from pathlib import Path

import pandas as pd
import pytest
from streamlit.testing.v1 import AppTest

from selector.design.stock import rationalise
from selector.views import page_parts as pp

APP = str(Path(__file__).resolve().parents[1] / "app.py")


def _stock():
    parts = pd.DataFrame({"part_id": ["a", "b", "c"], "diameter_mm": 20.0, "length_mm": 100.0,
                          "quantity_per_year": [10, 20, 30], "min_yield_mpa": 300.0})
    res = pd.DataFrame([
        {"part_id": "a", "rank": 1, "status": "candidate", "grade": "1045", "route_text": "r", "part_cost": 1.0},
        {"part_id": "a", "rank": 2, "status": "candidate", "grade": "4140", "route_text": "r", "part_cost": 2.0},
        {"part_id": "b", "rank": 1, "status": "candidate", "grade": "4140", "route_text": "r", "part_cost": 1.5},
        {"part_id": "c", "rank": 1, "status": "candidate", "grade": "1045", "route_text": "r", "part_cost": 0.5},
        {"part_id": "c", "rank": 2, "status": "candidate", "grade": "4140", "route_text": "r", "part_cost": 0.6},
    ])
    return rationalise(res, parts, holding_cost_per_grade=100.0)


def test_stock_table_sums_the_assignment():
    st_ = _stock()
    t = pp.stock_table(st_)
    a = st_["assignment"]
    assert set(t["grade"]) == set(st_["grades"])
    assert t["parts"].sum() == len(a)
    assert t["annual_part_cost"].sum() == pytest.approx(a["annual_cost"].sum())


def test_cost_chart_draws_the_feasible_counts():
    st_ = _stock()
    spec = pp.cost_by_count_chart(st_["cost_by_count"], len(st_["grades"])).to_dict()
    rows = next(iter(spec["datasets"].values()))
    assert [r["max_grades"] for r in rows] == list(st_["cost_by_count"].query("feasible")["max_grades"])


def test_bad_upload_lists_every_problem():
    parts, msgs = pp.load_parts(b"part_id,diameter_mm,length_mm,quantity_per_year\nx,25,100,-1\nx,0,100,1\n",
                                "up.csv")
    assert parts is None and len(msgs) == 3
    assert all(m.startswith("up.csv: line") for m in msgs)


def _parts_view(timeout: int) -> AppTest:
    """The page with its parts-list view open (only the open view is computed)."""
    at = AppTest.from_file(APP, default_timeout=timeout)
    at.session_state["view"] = "Parts list"
    return at.run(timeout=timeout)


def test_page_has_the_parts_list_view_with_the_demo():
    at = _parts_view(180)
    assert not at.exception, [e.value for e in at.exception]
    labels = [t.label for t in at.tabs]
    assert "Parts list" in labels
    assert any("40 parts" in c.value for c in at.caption)
    assert any(b.key == "parts_run" for b in at.button)


@pytest.mark.slow
def test_page_runs_the_demo_parts_list():
    at = _parts_view(600)
    at.number_input(key="parts_top").set_value(3)
    at.button(key="parts_run").click().run(timeout=600)
    assert not at.exception, [e.value for e in at.exception]
    summary = [m.value for m in at.markdown if "optimality gap" in m.value]
    assert len(summary) == 1 and "40 parts in" in summary[0]
    assert len(at.dataframe) >= 3
