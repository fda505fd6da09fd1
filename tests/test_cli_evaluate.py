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
