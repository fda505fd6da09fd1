"""``selector evaluate`` (selector.views.cli.evaluate)."""
import json

import pytest

import selector
from cli_runner import run

QT = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]


def test_evaluate_readable_with_cautions():
    code, out, _ = run("evaluate", "42CrMo4", "harden quench=oil", "temper temp_c=540 hours=2", "--diameter", "40")
    assert code == 0 and "tensile strength" in out and "mid-radius" in out
    # the safety notice: design code and local regulations, test reports, licensed engineer
    assert "CAUTION" in out and "local regulations" in out and "certified material test reports" in out
    assert "licensed engineer" in out


def test_evaluate_json_matches_library():
    code, out, _ = run("evaluate", "4140", "--route-json", json.dumps(QT), "--diameter", "40", "--json")
    data = json.loads(out)
    ref = selector.evaluate("4140", QT, diameter_mm=40)
    assert code == 0 and data["uts_mpa"] == pytest.approx(ref["uts_mpa"]) and "caution" in data


def test_evaluate_prints_the_rules_that_apply():
    # 4140 (0.38-0.43 % C) quenched in water: the quench-cracking rule (limit 0.35 % C for alloy
    # steels, data/cautions.csv; common practice) is printed with its severity; an oil quench has none
    code, out, _ = run("evaluate", "4140", "harden quench=water", "temper temp_c=600", "--diameter", "25")
    assert code == 0 and "[avoid] Quench-cracking risk (water or brine)" in out
    code, out, _ = run("evaluate", "4140", "harden quench=oil", "temper temp_c=600", "--diameter", "25")
    assert code == 0 and "Quench-cracking" not in out
    # the heat's own carbon decides: a 34CrMo4 heat certified at 0.32 % C has no cracking caution
    code, out, _ = run("evaluate", "34CrMo4", "harden quench=water", "temper temp_c=600", "--heat", "C=0.32")
    assert code == 0 and "Quench-cracking" not in out
    code, out, _ = run("evaluate", "34CrMo4", "harden quench=water", "temper temp_c=600", "--heat", "C=0.36")
    assert code == 0 and "[avoid] Quench-cracking risk (water or brine)" in out
