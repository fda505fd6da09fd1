"""Reference rows of a published steel entered under a catalogue grade it does not match
(``steel`` column of data/reference/qt_steels.csv) are recomputed on that steel's own
composition (data/reference/steel_compositions.csv), not on the catalogue grade's."""
from __future__ import annotations

import math

import pytest

from selector.errors import InputError
from selector.routes.evaluate import evaluate
from selector.validation import report, steels


def test_mid_composition_is_the_middle_of_the_standard_limits():
    # EN 10083-3:2006 cast analysis as printed by the Lucefin card 25CrMo4 (1.7218):
    # C 0.22-0.29, Si <= 0.40, Mn 0.60-0.90, Cr 0.90-1.20, Mo 0.15-0.30
    comp = steels.mid_composition("25CrMo4 (1.7218)")
    assert comp["C"] == pytest.approx((0.22 + 0.29) / 2)
    assert comp["Mn"] == pytest.approx((0.60 + 0.90) / 2)
    assert comp["Cr"] == pytest.approx((0.90 + 1.20) / 2)
    assert comp["Mo"] == pytest.approx((0.15 + 0.30) / 2)
    assert comp["Si"] == pytest.approx(0.40 / 2)          # maximum only: half the maximum (catalogue convention)
    # 41Cr4 (1.7035), same standard and card: Cr 0.90-1.20, no Mo listed
    comp = steels.mid_composition("41Cr4 (1.7035)")
    assert comp["C"] == pytest.approx((0.38 + 0.45) / 2) and comp["Cr"] == pytest.approx(1.05)
    assert "Mo" not in comp


def test_unknown_steel_is_an_input_error_naming_the_listed_ones():
    with pytest.raises(InputError, match="steel.*25CrMo4"):
        steels.mid_composition("34CrNiMo6 (1.6582)")


def test_every_steel_named_in_qt_steels_is_listed_and_on_its_own_grade():
    cases = [c for c in report.load_cases((report.QT_FILE,)) if c.steel]
    assert cases, "qt_steels.csv names no published steel"
    named = {c.steel for c in cases}
    assert named <= set(steels.steels())
    # the rows the notes describe as EN 25CrMo4 / 41Cr4 / 42CrMo4 entered under 4130 / 5140 / 4140
    assert {c.grade for c in cases if c.steel.startswith("25CrMo4")} == {"4130"}
    assert {c.grade for c in cases if c.steel.startswith("41Cr4")} == {"5140"}
    assert {c.grade for c in cases if c.steel.startswith("42CrMo4")} == {"4140"}
    for c in cases:
        assert c.heat == steels.mid_composition(c.steel)
        assert any(c.steel in a for a in c.assumptions)


def test_a_mapped_row_is_recomputed_on_the_steels_composition():
    (case,) = [c for c in report.load_cases((report.QT_FILE,))
               if c.steel.startswith("25CrMo4") and c.keys["temp_c"] == 550]
    (rows_uts,) = [r for r in report.recompute_case(case) if r["property"] == "uts_mpa"]
    own = evaluate("4130", case.steps, diameter_mm=case.diameter_mm, heat_composition=case.heat)
    catalogue = evaluate("4130", case.steps, diameter_mm=case.diameter_mm)
    assert rows_uts["predicted"] == pytest.approx(own["uts_mpa"])
    assert not math.isclose(own["uts_mpa"], catalogue["uts_mpa"], rel_tol=1e-6)
    # hand calculation: mid of EN 10083-3 25CrMo4 C 0.22-0.29 % (data/reference/steel_compositions.csv)
    assert own["heat_composition"]["C"] == pytest.approx(0.255)
