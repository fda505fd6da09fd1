"""Prediction bands (selector/routes/bands.py, fitted offline by scripts/fit_bands.py
from the independent residuals of the validation report)."""
import numpy as np
import pandas as pd
import pytest

import selector
from selector.routes import bands
from selector.validation import band_fit, report

QT = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]
KEYS = ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hrc", "hardness_hb")


def test_every_estimated_property_carries_its_band_in_evaluate():
    r = selector.evaluate("4140", QT, diameter_mm=40)
    for k in KEYS:
        assert r[k + "_lo"] is not None and r[k + "_hi"] is not None, k
        assert r[k + "_lo"] < r[k + "_hi"], k
    # the HRC band is the E140 conversion of the HV band, so it brackets the same fraction
    assert r["hardness_hrc_lo"] < r["hardness_hrc"] < r["hardness_hrc_hi"]
    assert any("prediction band" in s for s in r["sources"])


def test_select_has_the_band_columns():
    c = selector.select({"min_yield_mpa": 700, "min_elongation_pct": 12}, diameter_mm=30)
    for k in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv"):
        assert {k + "_lo", k + "_hi"} <= set(c.columns)
    ok = c["yield_mpa"].notna()
    assert (c.loc[ok, "yield_mpa_lo"] <= c.loc[ok, "yield_mpa_hi"]).all()
    # only a bar bought to a standard's guaranteed minimum has a zero-width band
    model = ok & (c["route_family"] != "supply")
    assert model.any() and (c.loc[model, "yield_mpa_lo"] < c.loc[model, "yield_mpa_hi"]).all()


def test_band_edges_from_residual_quantiles():
    # relative mode: ln(published/predicted) quantiles -0.1 and +0.2 around 1000 MPa
    lo, hi = bands.apply(np.array([1000.0]), -0.1, 0.2, "relative")
    assert lo[0] == pytest.approx(1000 * np.exp(-0.1)) and hi[0] == pytest.approx(1000 * np.exp(0.2))
    # absolute mode (elongation, percentage points), never below 0 %
    lo, hi = bands.apply(np.array([3.0]), -5.0, 4.0, "absolute")
    assert lo[0] == 0.0 and hi[0] == 7.0


def test_section_bands_follow_the_ruling_section_steps():
    assert list(bands.section_band([10, 16, 16.5, 40, 60, 100, 150])) == [
        "<=16", "<=16", "16-40", "16-40", "40-100", "40-100", ">100"]


def test_lookup_takes_the_most_specific_group(monkeypatch):
    table = {("alloy_steel", "quench_temper", "16-40", "uts_mpa"): ("relative", -0.01, 0.01),
             ("alloy_steel", "quench_temper", "*", "uts_mpa"): ("relative", -0.02, 0.02),
             ("*", "quench_temper", "*", "uts_mpa"): ("relative", -0.03, 0.03),
             ("*", "*", "*", "uts_mpa"): ("relative", -0.04, 0.04)}
    monkeypatch.setattr(bands, "_table", lambda: table)
    lo, hi, _ = bands.quantiles(np.array(["alloy_steel", "alloy_steel", "carbon_steel", "aluminium"], object),
                                "quench_temper", np.array([25.0, 80.0, 25.0, 25.0]), "uts_mpa")
    assert list(lo) == [-0.01, -0.02, -0.03, -0.03]
    lo, _, _ = bands.quantiles(np.array(["aluminium"], object), "age", np.array([25.0]), "uts_mpa")
    assert list(lo) == [-0.04]


def test_fit_uses_independent_typical_rows_only():
    comp = pd.DataFrame({
        "case": ["a", "b", "c", "d"], "grade": ["4140"] * 4, "family": ["alloy_steel"] * 4,
        "route": ["quench_temper"] * 4, "section_mm": [25.4] * 4, "kind": ["typical", "typical", "minimum",
                                                                            "typical"],
        "property": ["uts_mpa"] * 4, "published": [1100.0, 900.0, 800.0, 1000.0],
        "predicted": [1000.0] * 4, "status": ["compared"] * 4, "calibration": ["", "", "", "a fit row"]})
    res = band_fit.residuals(comp)
    assert list(res["case"]) == ["a", "b"]
    assert res["r"].to_numpy() == pytest.approx(np.log([1.1, 0.9]))


@pytest.mark.slow
def test_shipped_band_table_is_what_the_fit_script_writes():
    table, _ = band_fit.run()
    shipped = pd.read_csv(report.data_dir() / "fits" / "bands.csv", comment="#", keep_default_na=False)
    assert len(shipped) == len(table)
    for col in ("q_lo", "q_hi"):
        np.testing.assert_allclose(shipped[col].astype(float), table[col].astype(float), rtol=1e-6, atol=1e-6)
@pytest.mark.slow
def test_band_covers_85_to_95_percent_of_independent_published_values():
    # the check: per family with at least 20 independent rows, the 90 % band holds 85-95 %
    # of the published values (typical rows of data/reference/, not used by any fit)
    table, res = band_fit.run()
    cov = band_fit.coverage(res, table)
    checked = cov[cov["n"] >= 20]
    assert len(checked) >= 1, f"no family has 20 independent rows of a property:\n{cov}"
    bad = checked[(checked["coverage"] < 0.85) | (checked["coverage"] > 0.95)]
    assert bad.empty, bad


def test_bought_bar_values_are_data_rows_without_a_model_band():
    # a bar bought to ASTM A311 class B is delivered to the standard's minimum for its size: the value
    # comes from data/supply_conditions.csv, not a model, so its band has zero width
    r = selector.evaluate("1144", [{"op": "supply", "condition": "cold_drawn_stress_relieved"}], diameter_mm=25)
    assert r["yield_mpa_lo"] == r["yield_mpa"] == r["yield_mpa_hi"]
    q = selector.evaluate("1144", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}],
                          diameter_mm=25)
    assert q["yield_mpa_lo"] < q["yield_mpa"] < q["yield_mpa_hi"]
