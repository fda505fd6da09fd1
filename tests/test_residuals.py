"""The residual breakdown of the Q&T headline (selector/validation/residuals.py)."""
import numpy as np
import pandas as pd

from selector.validation import residuals


def _row(grade, prop, pub, pred, calibration="", kind="typical", temp=540, section=25.4):
    return {"grade": grade, "family": "alloy_steel", "route": "quench_temper", "kind": kind,
            "status": "compared", "calibration": calibration, "property": prop,
            "condition": f"oil quench, temper {temp} °C, Ø{section:g} mm", "section_mm": section,
            "published": pub, "predicted": pred, "error": pred - pub}


def test_headline_rows_keep_independent_typical_rows_and_relative_errors():
    comp = pd.DataFrame([_row("4140", "uts_mpa", 1000.0, 900.0),
                         _row("4140", "uts_mpa", 1000.0, 1200.0, calibration="used by the fit 'x'"),
                         _row("4140", "uts_mpa", 1000.0, 1200.0, kind="minimum"),
                         _row("4140", "hardness_hrc", 40.0, 38.0, temp=425)])
    rows = residuals.headline_rows(comp)
    assert len(rows) == 2                       # calibration and minimum rows left out
    uts = rows[rows["property"] == "uts_mpa"].iloc[0]
    assert uts["err"] == -10.0                  # % of the published value
    hrc = rows[rows["property"] == "hardness_hrc"].iloc[0]
    assert hrc["err"] == -2.0 and hrc["temp_c"] == 425.0   # HRC in points
    assert uts["carbon_pct"] > 0.3


def test_breakdown_groups_by_temper_and_section():
    comp = pd.DataFrame([_row("4140", "uts_mpa", 1000.0, 900.0, temp=250),
                         _row("4140", "uts_mpa", 1000.0, 1100.0, temp=650, section=10.0),
                         _row("4140", "uts_mpa", 1000.0, 1050.0, temp=660, section=10.0)])
    out = residuals.breakdown(residuals.headline_rows(comp))["uts_mpa"]
    by_t = out["temp_c"]
    assert list(by_t["n"]) == [1, 2]
    # hand calculation: the 650/660 °C rows err by +10 % and +5 %, mean 7.5 %
    assert np.isclose(by_t["bias"].iloc[1], 7.5)
    assert list(out["section_mm"]["n"]) == [2, 1]


def test_yield_correlation_rows_use_the_published_tensile_strength():
    # the chain's tensile error (predicted 900 vs published 1000) must not enter the check
    comp = pd.DataFrame([{**_row("4140", "uts_mpa", 1000.0, 900.0), "case": "a"},
                         {**_row("4140", "yield_mpa", 880.0, 700.0), "case": "a"},
                         {**_row("4340", "uts_mpa", 1100.0, 1100.0), "case": "b"}])  # no yield: left out
    rows = residuals.headline_rows(comp)
    yc = residuals.yield_correlation_rows(rows)
    assert list(yc["case"]) == ["a"]
    # YS = UTS * (s0 + s1 u + s2 u^2), u = 1.0, with the shipped alloy-steel coefficients
    # (data/fits/correlations_coefficients.csv)
    from selector.models.correlations import coefficients
    s0, s1, s2 = coefficients("alloy_steel")["ratio"]
    expected = 1000.0 * min(max(s0 + s1 + s2, 0.50), 0.98)
    assert np.isclose(yc["yield_corr"].iloc[0], expected)
    assert np.isclose(yc["err"].iloc[0], 100.0 * (expected - 880.0) / 880.0)
    assert np.isclose(yc["ratio_pub"].iloc[0], 0.88)
