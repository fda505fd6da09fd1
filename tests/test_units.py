"""The display units table (selector.views.units): conversions, round trips, one ksi constant."""
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from selector.errors import InputError
from selector.models import conversions
from selector.views import units as u
from selector.views.units import SI, US

ROOT = Path(__file__).resolve().parents[1]


# Hand values from the exact definitions (NIST SP 811 (2008) Appendix B.8/B.9):
# 1 ksi = 4448.2216152605 N / (25.4 mm)^2 = 6.894757 MPa; 1 in = 25.4 mm; 1 lbf = 4.4482216152605 N;
# 1 lb = 0.45359237 kg; °F = °C x 9/5 + 32.
@pytest.mark.parametrize("si,quantity,us,tol", [
    (1000.0, "stress", 145.0377, 1e-4),       # 1000 / 6.894757 = 145.0377 ksi (NIST SP 811 B.8 lists 6.894757 MPa)
    (6.894757, "stress", 1.0, 1e-6),
    (25.4, "length", 1.0, 1e-12),             # exact
    (1.0, "length", 0.0393701, 1e-7),         # 1 / 25.4
    (845.0, "temperature", 1553.0, 1e-9),     # 845 x 1.8 + 32
    (-40.0, "temperature", -40.0, 1e-9),      # the scales cross at -40
    (100.0, "temperature", 212.0, 1e-9),      # boiling water at 1 atm
    (1.0, "force", 224.8089, 1e-4),           # 1000 N / 4.4482216 N/lbf
    (1.0, "mass", 2.2046226, 1e-7),           # 1 / 0.45359237
    (1.0, "cost_per_mass", 0.45359237, 1e-12),  # a price per kg x kg per lb = price per lb
])
def test_to_display_hand_values(si, quantity, us, tol):
    assert u.to_display(si, quantity, US) == pytest.approx(us, abs=tol)
    assert u.to_display(si, quantity, SI) == si


@pytest.mark.parametrize("quantity", list(u.QUANTITIES))
def test_round_trip_every_quantity(quantity):
    x = np.array([-50.0, 0.0, 0.1, 1.0, 37.5, 845.0, 2500.0])
    for system in u.UNIT_SYSTEMS:
        back = u.to_si(u.to_display(x, quantity, system), quantity, system)
        np.testing.assert_allclose(back, x, rtol=1e-12, atol=1e-9)
    assert u.to_display(None, quantity, US) is None and u.to_si(None, quantity, US) is None


def test_labels_and_bad_names():
    assert [u.unit(q, US) for q in ("stress", "length", "temperature", "force", "mass")] == \
        ["ksi", "in", "°F", "lbf", "lb"]
    assert u.unit("stress", SI) == "MPa" and u.unit("cost_per_mass", US) == "per lb"
    with pytest.raises(InputError, match="units.*'SI' or 'US customary'"):
        u.unit("stress", "imperial")
    with pytest.raises(InputError, match="quantity"):
        u.to_display(1.0, "speed", SI)


def test_the_one_ksi_constant():
    # the units table takes its constant from conversions: the same object, one definition
    assert u.MPA_PER_KSI is conversions.MPA_PER_KSI
    assert conversions.KSI_TO_MPA == conversions.MPA_PER_KSI
    assert conversions.MPA_PER_KSI == pytest.approx(6.894757, abs=5e-7)  # NIST SP 811 (2008) B.8
    # no other ksi factor written in the package or its scripts; views/page.py still holds its own
    # until the page branch moves onto this module (remove it from PENDING then)
    pending = set()       # the page package uses views/units.py
    found = []
    for path in list((ROOT / "selector").rglob("*.py")) + list((ROOT / "scripts").rglob("*.py")):
        rel = path.relative_to(ROOT).as_posix()
        if rel == "selector/models/conversions.py" or rel in pending:
            continue
        # a percentage (a measured figure in a generated comment, "6.89 %") is not the factor
        if re.search(r"\b6\.89\d*(?!\d|\s*%)", path.read_text(encoding="utf-8")):
            found.append(rel)
    assert found == []


def test_quantity_of_and_display_name():
    assert u.quantity_of("yield_mpa") == "stress" and u.quantity_of("uts_mpa_lo") == "stress"
    assert u.quantity_of("temper_temp_c") == "temperature" and u.quantity_of("mass_kg") == "mass"
    assert u.quantity_of("saving_per_kg") == "cost_per_mass" and u.quantity_of("relative_cost") == "cost_per_mass"
    assert u.quantity_of("elongation_pct") is None and u.quantity_of("hours") is None
    assert u.display_name("uts_mpa_hi", US) == "uts_ksi_hi"
    assert u.display_name("temper_temp_c", US) == "temper_temp_f"
    assert u.display_name("relative_cost", US) == "relative_cost_per_lb"
    assert u.display_name("saving_per_kg", US) == "saving_per_lb"
    assert u.display_name("yield_mpa", SI) == "yield_mpa"


def test_convert_frame_whole_table():
    df = pd.DataFrame({"grade": ["4140", "304"], "yield_mpa": [689.4757293168361, 200.0],
                       "uts_mpa_lo": [1000.0, np.nan], "temper_temp_c": [540.0, np.nan],
                       "case_depth_mm": [0.0, 2.54], "relative_cost": [1.0, 2.0], "robust": [True, False],
                       "elongation_pct": [12.0, 40.0], "window_parameter": ["temper_temp_c", "reduction_pct"],
                       "window_min": [500.0, 50.0], "window_max": [600.0, 60.0]})
    us = u.convert_frame(df, US)
    assert us["yield_ksi"].tolist()[0] == pytest.approx(100.0)            # 689.4757 MPa = 100 ksi
    assert us["uts_ksi_lo"].iloc[0] == pytest.approx(145.0377, abs=1e-4) and np.isnan(us["uts_ksi_lo"].iloc[1])
    assert us["temper_temp_f"].iloc[0] == pytest.approx(1004.0)           # 540 x 1.8 + 32
    assert us["case_depth_in"].tolist() == pytest.approx([0.0, 0.1])      # 2.54 mm = 0.1 in
    assert us["relative_cost_per_lb"].tolist() == pytest.approx([0.45359237, 0.90718474])
    # window values follow each row's parameter: °F for a temperature, % unchanged
    assert us["window_min"].tolist() == pytest.approx([932.0, 50.0]) and us["window_max"].iloc[0] == pytest.approx(1112.0)
    assert us["robust"].tolist() == [True, False] and us["elongation_pct"].tolist() == [12.0, 40.0]
    pd.testing.assert_frame_equal(u.convert_frame(df, SI), df)
    assert df["yield_mpa"].iloc[0] == 689.4757293168361          # the input is not changed


def test_hardness_scale_choice():
    assert u.hardness_scale(SI) == "HRC" and u.hardness_scale(US) == "HRC"
    assert u.hardness_scale(US, "hb") == "HB" and u.hardness_scale(SI, "HV") == "HV"
    with pytest.raises(InputError, match="hardness scale.*HRC, HB, HV"):
        u.hardness_scale(SI, "HRB")


@pytest.mark.parametrize("value,si_unit,system,text", [
    (845.0, "°C", SI, "845 °C"),
    (845.0, "°C", US, "1550 °F"),     # 1553 °F to the 10 °F step
    (747.5, "°C", SI, "750 °C"),      # to the 5 °C step
    (3.0, "mm", US, "0.12 in"),       # 3 / 25.4 = 0.118 in, 2 significant figures
    (0.509, "mm", SI, "0.51 mm"),
    (9.2, "h", US, "9.2 h"),          # no unit of time changes
    (50.0, "%", US, "50 %"),
    (10000.0, "Hz", SI, "10 kHz"),
])
def test_value_text(value, si_unit, system, text):
    assert u.value_text(value, si_unit, system) == text


def test_round_to():
    assert u.round_to(971.3, 5.0) == 970.0 and u.round_to(16.74, 0.5) == 16.5
    assert u.round_to(0.04673, 0.002) == pytest.approx(0.046)
    assert np.isnan(u.round_to(float("nan"), 5.0)) and u.round_to(None, 5.0) is None
