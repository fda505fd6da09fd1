"""Rewrite the regression thresholds of selector/validation/thresholds.py from the
current models: recompute every reference row, measure each group's statistics on the
independent rows, and set every threshold to ``propose(measured)`` (measured × 1.25,
rounded up to the unit's step, never below its floor).

Usage:  python scripts/set_thresholds.py
Run it only after a deliberate model change, and write the before/after validation
figures in the commit message.  The thresholds guard against regression; the
accuracy itself is read in docs/validation.md.
"""
from __future__ import annotations

import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from selector.validation import report, thresholds  # noqa: E402


def main() -> None:
    stats = report.statistics(report.recompute(report.load_cases()))
    lines = []
    for r in stats.sort_values(report.GROUP).itertuples(index=False):
        med = thresholds.propose(r.median_abs, r.unit)
        p90 = max(med, thresholds.propose(r.p90_abs, r.unit))
        lines.append(f"    {(r.family, r.route, r.kind, r.property)!r}: Threshold({med:g}, {p90:g}),  "
                     f"# n={r.n}, measured {r.median_abs:.3g} / {r.p90_abs:.3g} {r.unit}")
    path = ROOT / "selector" / "validation" / "thresholds.py"
    text = path.read_text(encoding="utf-8")
    new = re.sub(r"THRESHOLDS: dict = \{\n.*?\n\}\n", "THRESHOLDS: dict = {\n" + "\n".join(lines) + "\n}\n",
                 text, flags=re.S)
    path.write_text(new, encoding="utf-8")
    print(f"{len(lines)} thresholds written to {path.relative_to(ROOT)}")


if __name__ == "__main__":
    main()
