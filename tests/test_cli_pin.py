"""``selector pin`` (selector.views.cli.pin)."""
import json

import pytest

import selector
from cli_runner import run

CASE = ("--load-kn", "60", "--diameter", "25", "--gap", "1.5", "--lug", "38", "--clevis", "16")


def test_pin_targets_match_library():
    code, out, _ = run("pin", *CASE, "--format", "json")
    data = json.loads(out)
    t = selector.pin_targets(load_kn=60, diameter_mm=25, gap_mm=1.5, lug_thickness_mm=38, clevis_thickness_mm=16)
    assert code == 0 and data["targets"]["min_yield_mpa"] == pytest.approx(t["min_yield_mpa"])


def test_pin_report_in_us_units():
    code, out, _ = run("pin", *CASE, "--units", "US")
    t = selector.pin_targets(load_kn=60, diameter_mm=25, gap_mm=1.5, lug_thickness_mm=38, clevis_thickness_mm=16)
    # 25 mm = 0.9843 in; the yield target in ksi = MPa / 6.894757 (NIST SP 811 B.8)
    assert code == 0 and "Ø0.9843 in" in out and f"min_yield_ksi = {t['min_yield_mpa'] / 6.894757:.1f}" in out
    assert "CAUTION" in out


def test_pin_select_lists_readable_candidates():
    code, out, _ = run("pin", *CASE, "--select", "--top", "3", "--format", "json")
    rows = json.loads(out)["rows"]
    assert code == 0 and len(rows) == 3 and "process route" in rows[0] and "cautions" in rows[0]
