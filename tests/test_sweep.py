"""Tests of selector.design.sweep (diameter sweep of a clevis pin)."""
import numpy as np
import pandas as pd
import pytest

from selector.design import pins, sweep
from selector.errors import InputError

CASE = dict(load_kn=10.0, lug_thickness_mm=30.0, clevis_thickness_mm=15.0, gap_mm=2.0)


class FakeEngine:
    """A stand-in for select with a known answer: three grades whose reachable
    yield depends on the bar diameter (hardenability), with known costs.

    * "cheap"  : yield 1200 MPa up to 18 mm, 200 MPa above (shallow hardening)
    * "mid"    : yield 800 MPa at every diameter
    * "dear"   : yield 1500 MPa at every diameter
    robust iff yield >= target; part_cost = price x diameter^2 (mass grows as d^2).
    """

    PRICE = {"cheap": 1.0, "mid": 2.0, "dear": 5.0}

    def __init__(self):
        self.calls = []

    def yield_at(self, grade, d):
        if grade == "cheap":
            return 1200.0 if d <= 18 else 200.0
        return {"mid": 800.0, "dear": 1500.0}[grade]

    def __call__(self, targets, diameter_mm, *, length_mm=100.0, price_sheet=None, robust_only=False):
        self.calls.append((dict(targets), diameter_mm, length_mm, robust_only))
        rows = []
        for g, p in self.PRICE.items():
            y = self.yield_at(g, diameter_mm)
            ok = y >= targets["min_yield_mpa"] and 1.1 * y >= targets["min_uts_mpa"]
            if ok or not robust_only:
                rows.append(dict(grade=g, family="alloy_steel", route_family="quench_temper",
                                 route_text=f"{g} Q&T", window="", yield_mpa=y, uts_mpa=1.1 * y,
                                 hardness_hrc=np.nan, surface_hardness_hrc=np.nan, relative_cost=p,
                                 part_cost=p * diameter_mm ** 2 * length_mm / 1e4, robust=ok,
                                 quench="oil", temper_temp_c=300.0 if g == "dear" else 550.0, c_pct=0.4))
        return pd.DataFrame(rows)


def expected_pick(engine, d, length):
    t = pins.pin_targets(diameter_mm=d, **CASE)
    cand = engine(t, d, length_mm=length, robust_only=True)
    if cand.empty:
        return ""
    cand = cand[cand["robust"]]
    return cand.sort_values(["part_cost", "relative_cost"]).iloc[0]["grade"]


def test_sweep_picks_cheapest_robust_at_each_diameter():
    eng = FakeEngine()
    ds = [12, 14, 16, 18, 20, 25, 30, 40]
    sw = sweep.diameter_sweep(ds, select=eng, **CASE)
    length = sweep.pin_length_mm(2, 30.0, 15.0, 2.0)
    assert length == 64.0
    check = FakeEngine()
    assert sw["grade"].tolist() == [expected_pick(check, d, length) for d in ds]
    # each call got the pin targets of that diameter, robust only, and the grip length
    for (t, d, L, robust), row in zip(eng.calls, sw.itertuples()):
        assert t == pins.pin_targets(diameter_mm=d, **CASE)
        assert robust and L == length and row.diameter_mm == d


def test_sweep_is_not_monotonic_and_marks_changes():
    eng = FakeEngine()
    ds = [10, 11, 12, 14, 16, 18, 20, 25, 30]
    sw = sweep.diameter_sweep(ds, select=eng, **CASE)
    # yield targets (bending governs, ~ 1/d^3), MPa: 1731, 1301, 1002, 631, 423, 297, 216, 111, 64
    # 10 mm: nothing reaches 1731; 11 mm: only "dear" (1500); 12-18 mm: "cheap" hardens through
    # (1200); 20 mm: "cheap" drops to 200 < 216, "mid" (800) takes over; 25-30 mm: "cheap" again.
    assert sw["grade"].tolist() == ["", "dear", "cheap", "cheap", "cheap", "cheap", "mid", "cheap", "cheap"]
    assert sw["changed"].tolist() == [False, True, True, False, False, False, True, True, False]
    assert sweep.changes(sw)["grade"].tolist() == ["", "dear", "cheap", "mid", "cheap"]
    y = sw["min_yield_mpa"].to_numpy()
    assert np.all(np.diff(y) < 0)
    assert y[0] / y[-1] == pytest.approx((30 / 10) ** 3, rel=1e-9)
    assert set(sw["governing"]) == {"bending"}


def test_sweep_reports_no_candidate_and_cautions():
    eng = FakeEngine()
    sw = sweep.diameter_sweep([5, 16], select=eng, caution_context={"plated": True}, **CASE)
    assert sw.loc[0, "grade"] == "" and np.isnan(sw.loc[0, "part_cost"]) and sw.loc[0, "n_robust"] == 0
    # "cheap" at 16 mm is tempered at 550 °C: yield 1200 MPa -> uts 1320 >= 1000 MPa, plated
    assert sw.loc[1, "grade"] == "cheap"
    assert "Hydrogen embrittlement" in sw.loc[1, "cautions"] and "Tempered-martensite" not in sw.loc[1, "cautions"]
    assert "qualified engineer" in sw.attrs["notice"]


def test_extra_targets_pass_through_but_do_not_override():
    eng = FakeEngine()
    sweep.diameter_sweep([16], select=eng, extra_targets={"min_elongation_pct": 12, "min_yield_mpa": 1.0},
                         **CASE)
    t = eng.calls[0][0]
    assert t["min_elongation_pct"] == 12
    assert t["min_yield_mpa"] == pins.pin_targets(diameter_mm=16, **CASE)["min_yield_mpa"]


def test_cost_column_relative_cost():
    class Eng(FakeEngine):
        def __call__(self, *a, **k):
            df = super().__call__(*a, **k)
            # make part_cost disagree with relative_cost
            df["part_cost"] = 10.0 - df["relative_cost"]
            return df
    sw_part = sweep.diameter_sweep([30], select=Eng(), **CASE)
    sw_rel = sweep.diameter_sweep([30], select=Eng(), cost_column="relative_cost", **CASE)
    assert sw_part.loc[0, "grade"] == "dear" and sw_rel.loc[0, "grade"] == "cheap"


@pytest.mark.parametrize("kwargs,field", [
    (dict(diameters_mm=[]), "diameters_mm"),
    (dict(diameters_mm=[10, -2]), "diameters_mm"),
    (dict(diameters_mm="ten"), "diameters_mm"),
    (dict(diameters_mm=[10], cost_column="price"), "cost_column"),
    (dict(diameters_mm=[10], extra_targets=[1]), "extra_targets"),
    (dict(diameters_mm=[10], load_kn=-5.0), "load_kn"),
])
def test_bad_input(kwargs, field):
    args = dict(CASE, select=FakeEngine(), **kwargs)
    with pytest.raises(InputError) as exc:
        sweep.diameter_sweep(**args)
    assert exc.value.field == field


def test_diameter_range():
    assert sweep.diameter_range(10, 20, 2.5).tolist() == [10, 12.5, 15, 17.5, 20]
    with pytest.raises(InputError):
        sweep.diameter_range(20, 10, 1)
    with pytest.raises(InputError):
        sweep.diameter_range(10, 20, 0)


@pytest.mark.slow
def test_sweep_agrees_with_select_at_each_diameter():
    # the real engine: at each diameter the sweep's pick is the cheapest robust row of
    # select(pin_targets(d), d, robust_only=True) run directly
    import selector

    case = {k: pins.DEMO_CASE[k] for k in pins.DEMO_PIN_KEYS if k != "diameter_mm"}
    ds = [20.0, 28.0, 36.0]
    sw = sweep.diameter_sweep(ds, **case)
    length = sweep.pin_length_mm(case["shear_planes"], case["lug_thickness_mm"],
                                 case["clevis_thickness_mm"], case["gap_mm"])
    for d, row in zip(ds, sw.itertuples()):
        t = pins.pin_targets(diameter_mm=d, **case)
        cand = selector.select(t, d, length_mm=length, robust_only=True)
        cand = cand[cand["robust"].astype(bool)]
        assert row.n_robust == len(cand)
        if (cand["avoid"] == "").any():      # routes with an avoid caution only when nothing else is robust
            cand = cand[cand["avoid"] == ""]
        best = cand.sort_values(["part_cost", "relative_cost", "yield_mpa", "grade"],
                                ascending=[True, True, False, True], kind="stable").iloc[0]
        assert (row.grade, row.route_family, row.route_text) == (best["grade"], best["route_family"],
                                                                  best["route_text"])
        assert row.part_cost == pytest.approx(best["part_cost"], rel=1e-12)
        assert row.part_cost == cand["part_cost"].min()
        assert best["yield_mpa"] >= t["min_yield_mpa"] and best["uts_mpa"] >= t["min_uts_mpa"]


def test_docstring_documents_every_parameter():
    import inspect
    fn = sweep.diameter_sweep
    doc = fn.__doc__
    assert "Parameters" in doc and "Returns" in doc and "References" in doc
    block = doc.split("Parameters", 1)[1].split("Returns", 1)[0]
    documented = set()
    for line in block.splitlines():
        if line.startswith("    ") and not line.startswith("     ") and line.strip() and set(line.strip()) != {"-"}:
            documented |= {n.strip() for n in line.split(" : ")[0].split(",") if n.strip()}
    assert documented == set(inspect.signature(fn).parameters)
