"""``selector alternatives`` (selector.views.cli.alternatives)."""
import json

from cli_runner import run


def test_alternatives_cheaper_in_order():
    code, out, _ = run("alternatives", "4340", "harden quench=oil", "temper temp_c=600", "--format", "json",
                       "--all-columns")
    rows = json.loads(out)["rows"]
    assert code == 0 and rows
    costs = [r["relative_cost"] for r in rows]
    assert costs == sorted(costs)
    assert all(r["saving (per kg)"] > 0 for r in rows)


def test_alternatives_reference_in_us_units():
    code, out, _ = run("alternatives", "4340", "harden quench=oil", "temper temp_c=600", "--units", "US")
    head = out.splitlines()[0]
    # 600 °C = 1112 °F -> 1110 °F; strengths in ksi; cost per lb
    assert code == 0 and head.startswith("Reference: 4340") and "1110 °F" in head and "ksi" in head
    assert "per lb" in head and "°C" not in head and "saving (per lb)" in out and "CAUTION" in out
