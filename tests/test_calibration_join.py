"""The calibration key join (selector/validation/calibration.py): a reference row is
calibration exactly when a fit's row list names the same grade and condition."""
import math

from selector.validation import calibration, report
from selector.validation.calibration import FitRow

ROWS = (FitRow("tempering", "data/x.csv", "4140", "oil", 25.4, 540.0, ""),
        FitRow("aging", "data/y.csv", "17-4PH", "", math.nan, math.nan, "H1025"),
        FitRow("designation", "data/z.csv", "", "", math.nan, math.nan, "H02", family="copper_alloy"))


def test_qt_join_on_grade_quench_section_and_temperature():
    hit = calibration.match(ROWS, grade="4140", route="quench_temper", quench="oil", section_mm=25.0, temp_c=538.0)
    assert hit is ROWS[0]
    # blank quench in the reference row joins any quench
    assert calibration.match(ROWS, grade="4140", route="quench_temper", quench="", section_mm=25.4, temp_c=540)
    # each key that differs breaks the join
    assert calibration.match(ROWS, grade="4340", route="quench_temper", quench="oil", section_mm=25.4,
                             temp_c=540) is None
    assert calibration.match(ROWS, grade="4140", route="quench_temper", quench="water", section_mm=25.4,
                             temp_c=540) is None
    assert calibration.match(ROWS, grade="4140", route="quench_temper", quench="oil", section_mm=50.8,
                             temp_c=540) is None
    assert calibration.match(ROWS, grade="4140", route="quench_temper", quench="oil", section_mm=25.4,
                             temp_c=550) is None


def test_condition_join_by_grade_or_family():
    assert calibration.match(ROWS, grade="17-4PH", route="age", condition="h 1025") is ROWS[1]
    assert calibration.match(ROWS, grade="15-5PH", route="age", condition="H1025") is None
    assert calibration.match(ROWS, grade="C51000", family="copper_alloy", route="cold_work",
                             condition="H02") is ROWS[2]
    assert calibration.match(ROWS, grade="C51000", family="copper_alloy", route="cold_work",
                             condition="H04") is None


def test_every_fit_row_list_is_read_and_joins_reference_rows():
    rows = calibration.fit_rows(str(report.data_dir()))
    fits = {r.fit for r in rows}
    assert "tempering_hv" in fits and "aging_ph" in fits and "jominy_equivalence" in fits
    cases = report.load_cases((report.QT_FILE,))
    cal = [c for c in cases if c.calibration]
    ind = [c for c in cases if not c.calibration]
    assert cal and ind
    # every calibration Q&T row really has a fit row with its keys, every independent one has none
    for c in cal + ind:
        hit = calibration.match(rows, grade=c.grade, route="quench_temper", quench=c.keys["quench"],
                                section_mm=c.keys["section_mm"], temp_c=c.keys["temp_c"])
        assert (hit is not None) == bool(c.calibration), c.id
