"""Rationalised stock list (selector.design.stock): the MILP against brute force."""
import itertools

import numpy as np
import pandas as pd
import pytest

from selector.design.stock import rationalise
from selector.errors import InputError


def _instance(seed, n_parts=7, n_grades=5):
    rng = np.random.default_rng(seed)
    grades = [f"G{i}" for i in range(n_grades)]
    parts = pd.DataFrame({"part_id": [f"P{i}" for i in range(n_parts)], "diameter_mm": 20.0, "length_mm": 100.0,
                          "quantity_per_year": rng.integers(0, 500, n_parts), "min_yield_mpa": 300.0})
    rows = []
    for p in parts["part_id"]:
        feas = rng.choice(grades, size=rng.integers(1, n_grades + 1), replace=False)
        for r, g in enumerate(feas, 1):
            for route in range(rng.integers(1, 3)):   # several routes of one grade
                rows.append({"part_id": p, "rank": r, "status": "candidate", "grade": g,
                             "route_text": f"route {route}", "part_cost": float(rng.uniform(0.2, 3.0)),
                             "robust": True})
    return parts, pd.DataFrame(rows)


def _brute(parts, res, holding, k=None):
    qty = dict(zip(parts["part_id"], parts["quantity_per_year"]))
    grades = sorted(res["grade"].unique())
    best = np.inf
    for n in range(1, len(grades) + 1):
        if k is not None and n > k:
            break
        for subset in itertools.combinations(grades, n):
            sub = res[res["grade"].isin(subset)]
            per = sub.groupby("part_id")["part_cost"].min()
            if len(per) < len(parts):
                continue
            total = sum(qty[p] * c for p, c in per.items()) + holding * n
            best = min(best, total)
    return best


@pytest.mark.parametrize("seed", range(4))
@pytest.mark.parametrize("holding", [0.0, 150.0, 2000.0])
def test_milp_matches_brute_force(seed, holding):
    parts, res = _instance(seed)
    out = rationalise(res, parts, holding_cost_per_grade=holding)
    assert out["total_cost"] == pytest.approx(_brute(parts, res, holding), rel=1e-9, abs=1e-9)
    assert out["gap"] <= 1e-9
    a = out["assignment"]
    assert list(a["part_id"]) == list(parts["part_id"])
    assert set(a["grade"]) <= set(out["grades"])
    # every assignment is one of the part's own candidates
    pairs = set(zip(res["part_id"], res["grade"], res["route_text"], res["part_cost"]))
    assert all(t in pairs for t in zip(a["part_id"], a["grade"], a["route_text"], a["part_cost"]))
    qty = dict(zip(parts["part_id"], parts["quantity_per_year"]))
    assert a["annual_cost"].to_numpy() == pytest.approx([qty[p] * c for p, c in zip(a["part_id"], a["part_cost"])])
    assert out["total_cost"] == pytest.approx(a["annual_cost"].sum() + holding * len(out["grades"]))


@pytest.mark.parametrize("seed", range(4))
def test_cost_by_count_matches_brute_force(seed):
    parts, res = _instance(seed, n_parts=8, n_grades=5)
    out = rationalise(res, parts, holding_cost_per_grade=50.0)
    cbc = out["cost_by_count"]
    assert list(cbc["max_grades"]) == list(range(1, len(out["grades"]) + 1))
    for row in cbc.itertuples():
        expect = _brute(parts, res, 50.0, k=row.max_grades)
        if np.isfinite(expect):
            assert row.feasible and row.total_cost == pytest.approx(expect, rel=1e-9)
        else:
            assert not row.feasible and np.isnan(row.total_cost)
    feas = cbc[cbc["feasible"]]["total_cost"].to_numpy()
    assert np.all(np.diff(feas) <= 1e-9)          # more grades allowed never costs more


def test_max_grades_limit_and_infeasible_limit():
    parts, res = _instance(3, n_parts=8, n_grades=5)
    free = rationalise(res, parts, holding_cost_per_grade=0.0)
    cbc = free["cost_by_count"]
    fewest = int(cbc[cbc["feasible"]]["max_grades"].min())
    lim = rationalise(res, parts, holding_cost_per_grade=0.0, max_grades=fewest)
    assert len(lim["grades"]) <= fewest
    assert lim["total_cost"] == pytest.approx(_brute(parts, res, 0.0, k=fewest))
    if fewest > 1:
        with pytest.raises(InputError, match=f"at least {fewest}"):
            rationalise(res, parts, holding_cost_per_grade=0.0, max_grades=fewest - 1)


def test_part_without_candidate_is_listed_unassigned():
    parts, res = _instance(1, n_parts=4)
    res = res[res["part_id"] != "P2"]
    miss = pd.DataFrame([{"part_id": "P2", "rank": 1, "status": "nearest miss", "grade": "G0",
                          "route_text": "x", "part_cost": 0.01, "robust": False}])
    out = rationalise(pd.concat([res, miss]), parts, holding_cost_per_grade=10.0)
    a = out["assignment"].set_index("part_id")
    assert out["unassigned"] == ["P2"]
    assert a.loc["P2", "status"] == "unassigned" and a.loc["P2", "grade"] == ""
    assert len(a) == 4


@pytest.mark.parametrize("kw,field", [({"holding_cost_per_grade": -1.0}, "holding_cost_per_grade"),
                                      ({"holding_cost_per_grade": 1.0, "max_grades": 0}, "max_grades"),
                                      ({"holding_cost_per_grade": float("nan")}, "holding_cost_per_grade")])
def test_bad_arguments(kw, field):
    parts, res = _instance(0)
    with pytest.raises(InputError, match=field):
        rationalise(res, parts, **kw)


def test_batch_result_from_other_parts_is_refused():
    parts, res = _instance(0)
    other = res.assign(part_id="ZZ-9")
    with pytest.raises(InputError, match="ZZ-9"):
        rationalise(other, parts, holding_cost_per_grade=1.0)


def test_parts_with_proportional_costs_are_merged_without_changing_the_optimum():
    parts, res = _instance(2, n_parts=5, n_grades=5)
    # copies of P0 and P1 at other lengths and quantities: costs scaled by a factor per part
    extra_parts, extra_rows = [], []
    for i, (src, f) in enumerate([("P0", 1.7), ("P0", 0.4), ("P1", 2.5)]):
        pid = f"C{i}"
        extra_parts.append({"part_id": pid, "diameter_mm": 20.0, "length_mm": 100.0 * f,
                            "quantity_per_year": 50 + 100 * i, "min_yield_mpa": 300.0})
        rows = res[res["part_id"] == src].assign(part_id=pid)
        extra_rows.append(rows.assign(part_cost=rows["part_cost"] * f))
    parts2 = pd.concat([parts, pd.DataFrame(extra_parts)], ignore_index=True)
    res2 = pd.concat([res] + extra_rows, ignore_index=True)
    from selector.design.stock import _problem, _units
    qty = dict(zip(parts2["part_id"], parts2["quantity_per_year"].astype(float)))
    unit, merged = _units(_problem(res2, qty, False))
    assert merged["unit"].nunique() < parts2["part_id"].nunique()
    for holding in (0.0, 300.0):
        out = rationalise(res2, parts2, holding_cost_per_grade=holding)
        assert out["total_cost"] == pytest.approx(_brute(parts2, res2, holding), rel=1e-9)
        a = out["assignment"].set_index("part_id")
        assert a.loc["C0", "grade"] == a.loc["P0", "grade"] == a.loc["C1", "grade"]
