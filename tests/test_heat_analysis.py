"""One heat's analysis in place of the nominal composition (selector/catalogue/heat.py,
``evaluate(heat_composition=...)``, CLI ``--heat``)."""
import math

import pandas as pd
import pytest

import selector
from selector.errors import InputError
from selector.views.cli import main, parse_heat_text

QT = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]


def test_heat_at_the_nominal_composition_equals_the_nominal_evaluation():
    g = selector.grade("4140")
    nominal = g.composition("nominal")
    a = selector.evaluate("4140", QT, diameter_mm=40)
    b = selector.evaluate("4140", QT, diameter_mm=40, heat_composition=dict(nominal))
    for key in ("uts_mpa", "yield_mpa", "hardness_hv", "di_mm", "center_martensite_pct"):
        assert b[key] == a[key], key
    assert b["composition"] == "heat" and b["heat_composition"]["C"] == pytest.approx(nominal["C"])


def test_missing_elements_take_the_nominal_value():
    g = selector.grade("4140")
    b = selector.evaluate("4140", QT, diameter_mm=40, heat_composition={"C": 0.41})
    assert b["heat_composition"]["C"] == 0.41
    assert b["heat_composition"]["Cr"] == pytest.approx(g.composition("nominal")["Cr"])


def test_a_richer_heat_hardens_deeper():
    # ASTM A255 multiplying factors of Mn, Cr and Mo are all above 1 and rise with content:
    # a heat at the top of the 4140 ranges has the larger ideal critical diameter
    g = selector.grade("4140")
    lean = {e: g.comp_min[e] for e in ("C", "Mn", "Cr", "Mo")}
    rich = {e: g.comp_max[e] for e in ("C", "Mn", "Cr", "Mo")}
    a = selector.evaluate("4140", QT, diameter_mm=60, heat_composition=lean)
    b = selector.evaluate("4140", QT, diameter_mm=60, heat_composition=rich)
    assert b["di_mm"] > a["di_mm"]
    assert b["center_martensite_pct"] >= a["center_martensite_pct"]
    assert not any("outside the 4140 specification" in w for w in a["warnings"] + b["warnings"])


def test_an_element_outside_the_specification_is_named_in_a_warning():
    r = selector.evaluate("4140", QT, diameter_mm=40, heat_composition={"Cr": 1.40, "Cu": 0.20})
    w = " ".join(r["warnings"])
    assert "Cr = 1.4 wt% outside the 4140 specification" in w
    assert "Cu = 0.2 wt% is not specified for 4140" in w


@pytest.mark.parametrize("heat, field, allowed", [
    ({"C": -0.1}, "heat_composition['C']", "[0, 100]"),
    ({"Mn": math.nan}, "heat_composition['Mn']", "finite"),
    ({"Mn": math.inf}, "heat_composition['Mn']", "finite"),
    ({"Cr": "0.9"}, "heat_composition['Cr']", "a number"),
    ({"Cr": True}, "heat_composition['Cr']", "a number"),
    ({"C": 10 ** 400}, "heat_composition['C']", "finite"),      # found by the fuzz suite
    ({"Cr": 60.0, "Ni": 45.0}, "heat_composition['Cr']", "100 wt %"),
    ({"Unobtainium": 1.0}, "heat_composition", "element symbol"),
    ({"C": 0.4, "c": 0.41}, "heat_composition['C']", "each element once"),
    ([("C", 0.4)], "heat_composition", "mapping"),
])
def test_impossible_heat_values_are_input_errors_naming_the_element(heat, field, allowed):
    with pytest.raises(InputError) as exc:
        selector.evaluate("4140", QT, diameter_mm=40, heat_composition=heat)
    assert exc.value.field == field and allowed in str(exc.value)


def test_heat_with_a_composition_corner_is_refused():
    with pytest.raises(InputError, match="composition"):
        selector.evaluate("4140", QT, composition="lean", heat_composition={"C": 0.4})


def test_cli_heat(capsys):
    assert parse_heat_text("C=0.41 Mn=0.86, Cr=0.95") == {"C": 0.41, "Mn": 0.86, "Cr": 0.95}
    rc = main(["evaluate", "4140", "harden quench=oil", "temper temp_c=540", "--diameter", "40",
               "--heat", "C=0.41 Mn=0.86 Cr=0.95 Mo=0.18"])
    out = capsys.readouterr().out
    assert rc == 0 and "heat analysis (wt %): " in out and "C=0.41" in out
    assert main(["evaluate", "4140", "harden quench=oil", "--heat", "C=-1"]) == 2
    err = capsys.readouterr().err
    assert "heat_composition['C']" in err and len(err.strip().splitlines()) == 1
    assert main(["evaluate", "4140", "harden quench=oil", "--heat", "C0.4"]) == 2


# --- cautions of one evaluation (selector.evaluate -> selector/selection/single.py) --------------
# The cracking limit of a water or brine quench is 0.35 % C for alloy steels (data/cautions.csv,
# rule quench_cracking; common practice).  34CrMo4 is specified at C 0.30-0.37 % (EN 10083-3
# Table 2, data/compositions.csv): its nominal is below the limit, its maximum above it.
WATER = [{"op": "harden", "quench": "water"}, {"op": "temper", "temp_c": 600}]


def _codes(r):
    return [c["code"] for c in r["cautions"]]


def test_evaluate_reports_the_quench_cracking_caution_of_a_water_quenched_alloy_steel():
    r = selector.evaluate("4140", WATER, diameter_mm=25)
    crack = [c for c in r["cautions"] if c["code"] == "quench_cracking"]
    assert crack and crack[0]["severity"] == "avoid" and crack[0]["title"]
    assert "quench_cracking" not in _codes(selector.evaluate("4140", QT, diameter_mm=25))


def test_a_certified_heat_decides_the_quench_cracking_rules_by_its_own_carbon():
    g = selector.grade("34CrMo4")
    assert g.comp_min["C"] < 0.35 <= g.comp_max["C"]
    assert "quench_cracking_range" in _codes(selector.evaluate("34CrMo4", WATER, diameter_mm=25))
    low = _codes(selector.evaluate("34CrMo4", WATER, diameter_mm=25, heat_composition={"C": 0.32}))
    assert "quench_cracking" not in low and "quench_cracking_range" not in low
    high = _codes(selector.evaluate("34CrMo4", WATER, diameter_mm=25, heat_composition={"C": 0.36}))
    assert "quench_cracking" in high and "quench_cracking_range" not in high


def test_evaluate_cautions_equal_those_of_the_selection_row():
    # the same rules on the same state: a row of select() evaluated alone carries the same cautions
    t = selector.select({"min_yield_mpa": 700, "min_elongation_pct": 12}, diameter_mm=30)
    # one row of each distinct set of cautions, and rows without any
    rows = pd.concat([t.drop_duplicates("cautions"), t[t["cautions"] == ""].head(3)])
    assert (rows["cautions"] != "").sum() >= 3
    for _, row in rows.iterrows():
        r = selector.evaluate(row["grade"], row["route"], diameter_mm=30)
        assert "; ".join(c["title"] for c in r["cautions"]) == row["cautions"], (row["grade"], row["route_text"])


def test_evaluate_rejects_a_bad_caution_context_before_computing():
    with pytest.raises(InputError, match="environment"):
        selector.evaluate("4140", QT, diameter_mm=25, environment="wet")
