"""Tests of scripts/qt_accuracy.py: the calibration join of the fit convention and the statistics."""
import importlib.util
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

_path = Path(__file__).resolve().parents[1] / "scripts" / "qt_accuracy.py"
_spec = importlib.util.spec_from_file_location("qt_accuracy", _path)
qa = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(qa)

FIT = pd.DataFrame({"fit": ["t", "t"], "grade": ["4340", "1050"], "quench": ["oil", ""],
                    "section_mm": [25.4, np.nan], "temp_c": [538.0, 316.0]})


@pytest.mark.parametrize("row,joined", [
    ({"grade": "4340", "quench": "oil", "section_mm": 25.4, "temper_temp_c": 538.0}, True),
    ({"grade": "4340", "quench": "", "section_mm": 27.0, "temper_temp_c": 543.0}, True),     # within 2 mm, 6 C
    ({"grade": "4340", "quench": "oil", "section_mm": 101.6, "temper_temp_c": 538.0}, False),  # other section
    ({"grade": "4340", "quench": "water", "section_mm": 25.4, "temper_temp_c": 538.0}, False),  # other quench
    ({"grade": "4340", "quench": "oil", "section_mm": 25.4, "temper_temp_c": 545.0}, False),   # 7 C away
    ({"grade": "1050", "quench": "water", "section_mm": 60.0, "temper_temp_c": 316.0}, True),  # blank section
    ({"grade": "4140", "quench": "oil", "section_mm": 25.4, "temper_temp_c": 538.0}, False),   # other grade
])
def test_join_on_the_fit_convention_keys(row, joined):
    # the calibration join of the fit convention (scripts/qt_accuracy.py docstring): same grade;
    # same quench or one blank;
    # |section diff| <= 2 mm (a blank section joins); |temper diff| <= 6 C
    assert qa.joins(row, FIT) is joined


def test_no_independent_row_joins_a_shipped_fit_row():
    rows = qa.independent_rows()
    fit = qa.fit_rows()
    assert len(rows) > 0 and len(fit) > 0
    assert not any(qa.joins(r, fit) for r in rows.to_dict("records"))


def test_statistics_in_percent_and_hrc_points():
    pred = pd.DataFrame({"uts_mpa_pub": [1000.0, 1000.0, 800.0], "uts_mpa_pred": [1100.0, 950.0, np.nan],
                         "hardness_hrc_pub": [40.0, np.nan, 30.0], "hardness_hrc_pred": [42.0, 50.0, 29.0]})
    s = qa.stats(pred, "uts_mpa", "%")
    # hand calculation: errors +10 % and -5 %: median |e| 7.5 %, bias 2.5 %
    assert s["n"] == 2 and s["median_abs"] == pytest.approx(7.5) and s["bias"] == pytest.approx(2.5)
    h = qa.stats(pred, "hardness_hrc", "HRC")
    assert h["n"] == 2 and h["median_abs"] == pytest.approx(1.5) and h["bias"] == pytest.approx(0.5)


def test_report_keeps_minimum_rows_apart_from_the_headline_set():
    # the headline set of docs/validation.md: typical values of carbon and alloy steels; specification
    # minimums are reported apart (the model estimates typical values, so it should lie above them)
    pred = pd.DataFrame({"family": ["alloy_steel", "carbon_steel", "alloy_steel", "stainless_martensitic"],
                         "carbon": ["C < 0.55"] * 4, "kind": ["typical", "typical", "minimum", "typical"],
                         "uts_mpa_pub": [1000.0, 800.0, 900.0, 700.0], "uts_mpa_pred": [1100.0, 760.0, 1000.0, 700.0]})
    for p, _ in qa.PROPS[1:]:
        pred[p + "_pub"], pred[p + "_pred"] = np.nan, np.nan
    lines = qa.report(pred)
    head = next(x for x in lines if "all typical" in x)
    # hand calculation: +10 % and -5 % -> n 2, median |e| 7.5 %, bias +2.5 %
    assert "n=  2" in head and "median   7.5" in head and "bias  +2.5" in head
    mins = next(x for x in lines if "minimum rows" in x)
    assert "n=  1" in mins and "bias +11.1" in mins     # (1000 - 900) / 900 = +11.1 % (hand calculation)


def test_rows_independent_of_another_trees_fits_too(tmp_path):
    """``--also-independent-of``: a variant's fits (here a rows file that takes two of today's
    independent rows) remove exactly the rows they join, so that two models are compared on
    the rows neither has seen."""
    base = qa.independent_rows()
    taken = base[base["grade"].astype(str) == "4140"].head(2)
    assert len(taken) == 2
    fits = tmp_path / "fits"
    fits.mkdir()
    pd.DataFrame({"fit": "variant", "source_file": "data/reference/qt_steels.csv",
                  "grade": taken["grade"].astype(str), "quench": taken["quench"],
                  "section_mm": taken["section_mm"], "temp_c": taken["temper_temp_c"]}
                 ).to_csv(fits / "variant_rows.csv", index=False)
    both = qa.independent_rows(also=[fits])
    gone = [r for r in base.to_dict("records") if qa.joins(r, qa.fit_rows(fits))]
    assert len(gone) >= 2 and len(both) == len(base) - len(gone)
    key = ["grade", "quench", "section_mm", "temper_temp_c", "source"]
    def keys(d):
        return d[key].apply(lambda r: "|".join(map(str, r)), axis=1)

    assert not keys(both).isin(keys(taken)).any()
