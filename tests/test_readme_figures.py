"""The accuracy figures the README quotes are the ones the validation report measured on
independent rows (docs/validation.md, written by ``selector validate``): a change of model or
data that moves them must be carried into the README, never left behind."""
import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _numbers(cell: str) -> float:
    m = re.search(r"[-−+]?\d+(?:\.\d+)?", cell)
    return float(m.group(0).replace("−", "-"))


def _table(text: str, prefixes=("Q&T steels", "Jominy H-bands")) -> dict:
    rows = {}
    for line in text.splitlines():
        cells = [c.strip() for c in line.strip().strip("|").split("|")]
        if len(cells) >= 5 and cells[0].startswith(prefixes):
            rows[cells[0]] = cells[1:]
    return rows


def test_readme_accuracy_table_equals_the_validation_report():
    report = (ROOT / "docs" / "validation.md").read_text(encoding="utf-8")
    headline = report.split("## Headline accuracy", 1)[1].split("\n## ", 1)[0]
    measured = _table(headline)          # n, calibration left out, unit, median, p90, bias
    quoted = _table((ROOT / "README.md").read_text(encoding="utf-8").split("## How far to trust it", 1)[1]
                    .split("\n## ", 1)[0])                        # n, median, p90, bias
    assert len(measured) >= 6 and set(quoted) == set(measured)
    for label, q in quoted.items():
        m = measured[label]
        assert int(q[0]) == int(m[0]), label
        assert [_numbers(c) for c in q[1:4]] == [_numbers(c) for c in m[3:6]], label
