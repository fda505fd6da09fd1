"""selector.batch: per-part candidates are the engine's own, by section, on Dask."""
import time

import numpy as np
import pandas as pd
import pytest

import selector
from selector.design import batch as batch_mod
from selector.errors import InputError

PIN = dict(load_kn=60.0, lug_thickness_mm=38.0, clevis_thickness_mm=16.0, gap_mm=1.5,
           wear_surface_hardness_hrc=50.0)


def _parts():
    return pd.DataFrame([
        dict(part_id="T-1", diameter_mm=25, length_mm=120, quantity_per_year=500, min_yield_mpa=600,
             min_uts_mpa=800),
        dict(part_id="T-2", diameter_mm=25, length_mm=80, quantity_per_year=100, **PIN),
        dict(part_id="T-3", diameter_mm=25, length_mm=50, quantity_per_year=10, min_yield_mpa=3000,
             min_elongation_pct=30),                                     # nothing meets this
        dict(part_id="T-4", diameter_mm=25, length_mm=300, quantity_per_year=7, min_yield_mpa=600,
             min_uts_mpa=800),                                           # same targets as T-1
        dict(part_id="T-5", diameter_mm=25, length_mm=60, quantity_per_year=3, min_yield_mpa=200,
             families="titanium;aluminium", corrosion_resistant=True, max_relative_cost=0.01),
    ])


@pytest.fixture(scope="module")
def result():
    return selector.batch(_parts(), top=3)


def test_candidates_are_the_engines_own_at_each_parts_length(result):
    for pid, targets, length in (("T-1", {"min_yield_mpa": 600, "min_uts_mpa": 800}, 120.0),
                                 ("T-2", selector.pin_targets(diameter_mm=25, **PIN), 80.0),
                                 ("T-4", {"min_yield_mpa": 600, "min_uts_mpa": 800}, 300.0)):
        expect = selector.select(targets, 25.0, length_mm=length).head(3)
        got = result[result["part_id"] == pid]
        assert list(got["rank"]) == [1, 2, 3]
        assert (got["status"] == "candidate").all()
        assert list(got["grade"]) == list(expect["grade"])
        assert list(got["route_text"]) == list(expect["route_text"])
        np.testing.assert_allclose(got["part_cost"], expect["part_cost"], rtol=1e-12)
        np.testing.assert_allclose(got["mass_kg"], expect["mass_kg"], rtol=1e-12)
        np.testing.assert_allclose(got["yield_mpa"], expect["yield_mpa"], rtol=0)


def test_annual_cost_is_quantity_times_part_cost(result):
    np.testing.assert_allclose(result["annual_cost"], result["quantity_per_year"] * result["part_cost"])


def test_part_nothing_satisfies_is_kept_with_nearest_misses(result):
    t3 = result[result["part_id"] == "T-3"]
    miss = selector.nearest_misses({"min_yield_mpa": 3000, "min_elongation_pct": 30}, 25.0, n=3)
    assert len(t3) == 3 and (t3["status"] == "nearest miss").all()
    assert list(t3["grade"]) == list(miss["grade"])
    np.testing.assert_allclose(t3["miss_score"], miss["miss_score"])
    assert all("min_yield_mpa by" in m for m in t3["misses"])


def test_part_with_no_grade_in_its_filters_is_reported(result):
    t5 = result[result["part_id"] == "T-5"]
    assert len(t5) >= 1 and set(t5["status"]) <= {"nearest miss", "no candidate"}


def test_every_part_kept_in_file_order(result):
    assert list(dict.fromkeys(result["part_id"])) == ["T-1", "T-2", "T-3", "T-4", "T-5"]
    assert list(result.columns[:len(batch_mod.RESULT_COLUMNS)]) == batch_mod.RESULT_COLUMNS


def test_per_grade_keeps_the_cheapest_route_of_each_grade():
    res = selector.batch(_parts().iloc[:1], top=None, per_grade=True)
    cand = selector.select({"min_yield_mpa": 600, "min_uts_mpa": 800}, 25.0, length_mm=120)
    assert res["grade"].is_unique
    assert list(res["grade"]) == list(res.sort_values("part_cost", kind="stable")["grade"])
    cheapest = cand.groupby("grade")["part_cost"].min()
    np.testing.assert_allclose(res.set_index("grade")["part_cost"], cheapest.loc[res["grade"]], rtol=1e-12)
    assert set(res["grade"]) == set(cand["grade"])


def test_progress_reaches_the_total():
    seen = []
    selector.batch(_parts().iloc[:2], top=1, progress=lambda d, t: seen.append((d, t)))
    assert seen[-1] == (2, 2) and all(t == 2 for _, t in seen)


@pytest.mark.parametrize("top", [0, -1, 1.5, True, 1001])
def test_bad_top(top):
    with pytest.raises(InputError, match="top"):
        selector.batch(_parts(), top=top)


def test_unreachable_scheduler_names_the_address_quickly():
    t0 = time.monotonic()
    with pytest.raises(InputError, match="tcp://127.0.0.1:9") as ei:
        batch_mod.connect("tcp://127.0.0.1:9", timeout_s=1.0)
    assert time.monotonic() - t0 < 10
    assert "dask scheduler" in str(ei.value)


def test_scheduler_from_environment(monkeypatch):
    monkeypatch.setenv(batch_mod.SCHEDULER_ENV, "tcp://10.1.2.3:8786")
    assert batch_mod.resolve_scheduler(None) == "tcp://10.1.2.3:8786"
    assert batch_mod.resolve_scheduler("tcp://h:1") == "tcp://h:1"
    monkeypatch.delenv(batch_mod.SCHEDULER_ENV)
    assert batch_mod.resolve_scheduler(None) is None
    with pytest.raises(InputError, match="scheduler"):
        batch_mod.resolve_scheduler("tcp://a b")


@pytest.mark.slow
def test_unreachable_scheduler_through_batch_within_10_s(monkeypatch):
    monkeypatch.setenv(batch_mod.SCHEDULER_ENV, "tcp://127.0.0.1:9")
    t0 = time.monotonic()
    with pytest.raises(InputError, match="tcp://127.0.0.1:9"):
        selector.batch(_parts())
    assert time.monotonic() - t0 < 10


@pytest.mark.slow
def test_local_cluster_with_two_worker_processes_gives_the_same_result(result):
    from distributed import LocalCluster

    with LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None) as cluster:
        remote = selector.batch(_parts(), top=3, scheduler=cluster.scheduler_address)
    pd.testing.assert_frame_equal(remote, result, check_exact=True)


def test_engine_rank_and_p_meet_are_followed_when_present(monkeypatch):
    def fake_select(targets, d, **kw):
        return pd.DataFrame({"grade": ["A", "B", "C"], "route_text": ["a", "b", "c"], "robust": [True] * 3,
                             "part_cost": [1.0, 2.0, 3.0], "mass_kg": [1.0] * 3, "relative_cost": [1.0] * 3,
                             "rank": [3, 1, 2], "p_meet": [0.5, 0.99, 0.9]})

    monkeypatch.setattr(batch_mod, "select", fake_select)      # the name the batch module calls
    res = batch_mod.section_candidates(25.0, None, [{"order": 0, "part_id": "x", "length_mm": 500.0,
                                                     "quantity_per_year": 2, "targets": {}, "service": {}}], top=2)
    assert list(res["grade"]) == ["B", "C"] and list(res["rank"]) == [1, 2]
    assert list(res["p_meet"]) == [0.99, 0.9]
    np.testing.assert_allclose(res["part_cost"], [1.0, 1.5])        # scaled from the 1000 mm reference
