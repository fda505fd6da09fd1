"""Readable columns of a candidates table (selector.views.columns)."""
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

import selector
from selector.views import columns as c
from selector.views.units import SI, US

ROOT = Path(__file__).resolve().parents[1]

QT = [{"op": "harden", "quench": "oil", "austenitize_c": 845.0}, {"op": "temper", "temp_c": 540.0, "hours": 2.0}]
ANNEAL = [{"op": "anneal", "temp_c": 750.0, "hours": 2.0}]
CARB = [{"op": "carburize", "temp_c": 925.0, "hours": 9.2}, {"op": "harden", "quench": "oil"},
        {"op": "temper", "temp_c": 175.0, "hours": 2.0}]


def table():
    """Three hand-made candidates in the library's columns (SI)."""
    return pd.DataFrame({
        "rank": [1, 2, 3], "grade": ["4140", "1018", "8620"], "family": ["alloy_steel", "carbon_steel",
                                                                         "carburizing_steel"],
        "route_family": ["quench_temper", "anneal", "carburize"], "route": [QT, ANNEAL, CARB],
        "route_text": ["harden oil quench → temper 540 °C, 2 h", "anneal 750 °C, 2 h", "carburize ..."],
        "yield_mpa": [971.3, 290.0, 836.0], "yield_mpa_lo": [905.2, 290.0, 700.0],
        "yield_mpa_hi": [1031.0, 290.0, 990.0],
        "uts_mpa": [1069.0, 440.0, 1000.0], "elongation_pct": [16.74, 36.2, 12.1],
        "hardness_hrc": [35.6, np.nan, 31.2], "hardness_hb": [331.0, 126.0, 290.0],
        "hardness_hv": [350.0, 132.0, 306.0], "surface_hardness_hrc": [35.6, np.nan, 60.4],
        "surface_hardness_hv": [350.0, 132.0, 705.0], "case_depth_mm": [0.0, 0.0, 1.187],
        "part_cost": [1.23456, 0.5, 2.0], "relative_cost": [1.1, 1.0, 1.6], "p_meet": [0.934, 0.5, 0.871],
        "robust": [True, False, False], "window_parameter": ["temper_temp_c", "temp_c", "hours"],
        "window_min": [500.0, 705.0, 6.0], "window_max": [600.0, 790.0, 12.0], "sub_windows": ["", "", ""],
        "avoid": ["", "", ""]})


def test_default_columns_present_with_units():
    si, us = c.default_view(table(), SI), c.default_view(table(), US)
    for h in ("grade", "process route", "yield (MPa)", "tensile (MPa)", "elongation (%)", "hardness (HRC)",
              "surface hardness (HRC)", "case depth (mm)", "part cost (relative)", "p_meet (%)", "process window"):
        assert h in si.columns, h
    for h in ("yield (ksi)", "tensile (ksi)", "case depth (in)", "yield 90 % band (ksi)"):
        assert h in us.columns, h
    assert list(si.columns) == [h for h in c.default_headers(SI) if h in si.columns]
    assert "route_family" not in si.columns and "yield_mpa" not in si.columns


def test_precision_hand_rounded():
    si, us = c.default_view(table(), SI), c.default_view(table(), US)
    assert si["yield (MPa)"].tolist() == [970.0, 290.0, 835.0]     # to 5 MPa
    # 971.3 / 6.894757 = 140.87 ksi -> 141; 290 -> 42.06 -> 42; 836 -> 121.25 -> 121
    assert us["yield (ksi)"].tolist() == [141.0, 42.0, 121.0]
    assert si["elongation (%)"].tolist() == [16.5, 36.0, 12.0]      # to 0.5 %
    assert si["p_meet (%)"].tolist() == [93.0, 50.0, 87.0]          # whole per cent
    assert si["part cost (relative)"].tolist() == [1.23, 0.5, 2.0]  # 3 significant figures
    assert si["yield 90 % band (MPa)"].tolist() == ["905–1030", "", "700–990"]   # no band where lo == hi
    assert si["process route"].iloc[0] == "austenitize 845 °C, quench in oil, temper 540 °C 2 h"
    assert us["process route"].iloc[0] == "austenitize 1550 °F, quench in oil, temper 1000 °F 2 h"
    # 500-600 °C = 932-1112 °F, to 10 °F
    assert si["process window"].tolist() == ["tempering temperature 500–600 °C", "annealing temperature 705–790 °C",
                                            "carburizing time 6–12 h"]
    assert us["process window"].iloc[0] == "tempering temperature 930–1110 °F"


def test_through_hardened_label_instead_of_zero_case():
    si, us = c.default_view(table(), SI), c.default_view(table(), US)
    assert si["case depth (mm)"].tolist() == ["through-hardened", "no case", 1.2]   # 1.187 mm to 0.05 mm
    assert us["case depth (in)"].iloc[2] == pytest.approx(0.046)                    # 1.187 / 25.4 = 0.0467, to 0.002


def test_hardness_in_one_scale():
    hb = c.default_view(table(), SI, "HB")
    assert "hardness (HB)" in hb and "hardness (HRC)" not in hb and "surface hardness (HB)" in hb
    assert hb["hardness (HB)"].tolist() == [330.0, 125.0, 290.0]     # to 5 HB
    # surface HB from the surface HV on ASTM E140 Table 1: 350 HV -> 331 HB (HRC 36 row: 354 HV / 336 HB,
    # HRC 35 row: 345 HV / 327 HB; interpolated 332) -> 330 to 5 HB
    assert hb["surface hardness (HB)"].iloc[0] == 330.0
    hv = c.default_view(table(), US, "HV")
    assert hv["hardness (HV)"].tolist() == [350.0, 130.0, 305.0]
    hrc = c.default_view(table(), SI)
    assert hrc["hardness (HRC)"].iloc[0] == 36.0 and np.isnan(hrc["hardness (HRC)"].iloc[1])


def test_all_columns_adds_the_rest():
    full = c.all_columns_view(table(), SI)
    assert list(full.columns[:len(c.default_view(table()).columns)]) == list(c.default_view(table()).columns)
    assert {"route_family", "yield_mpa", "robust", "route"} <= set(full.columns)
    assert full["yield_mpa"].iloc[0] == 971.3                         # full precision
    us = c.all_columns_view(table(), US)
    assert "yield_ksi" in us and "yield_mpa" not in us and us["route"].iloc[0] == QT   # steps kept for --route-json


def test_real_select_table():
    res = selector.select({"min_yield_mpa": 700, "min_elongation_pct": 12}, 30)
    view = c.default_view(res, US)
    assert list(view.columns) == c.default_headers(US)
    assert not view["process route"].str.contains("°C|_").any()
    assert (view["yield (ksi)"] >= 700 / 6.894757 - 1).all()           # targets met, shown in ksi


def test_docs_describe_every_default_column():
    text = (ROOT / "docs" / "columns.md").read_text(encoding="utf-8")
    for h in c.default_headers(SI):
        assert f"`{h}`" in text, h
    for other in ("`(ksi)`", "`(in)`", "`(HB)`", "`(HV)`"):          # the US and other-scale headers
        assert other in text, other
