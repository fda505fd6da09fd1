"""Fit the prediction bands offline: recompute every reference row, take the
independent typical residuals, write ``data/fits/bands.csv`` (the table the package
reads) and ``data/fits/bands_residuals.csv`` (the residuals it was fitted on), and
print the coverage in-sample and leave-one-grade-out.

Usage:  python scripts/fit_bands.py
Run it again after every model change (the bands describe the current models).
"""
from __future__ import annotations

import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from selector.validation import band_fit  # noqa: E402


def main() -> None:
    table, res = band_fit.run()
    out = ROOT / "data" / "fits"
    out.mkdir(parents=True, exist_ok=True)
    with open(out / "bands.csv", "w", encoding="utf-8", newline="") as f:
        f.write("# Prediction bands (90 %) from independent residuals: written by scripts/fit_bands.py; "
                "do not edit by hand.\n# q_lo, q_hi: 5th/95th percentile of ln(published/predicted) "
                "(mode relative) or published - predicted (mode absolute, percentage points).\n")
        table.to_csv(f, index=False)
    with open(out / "bands_residuals.csv", "w", encoding="utf-8", newline="") as f:
        f.write("# Residuals the bands were fitted on (independent typical rows): scripts/fit_bands.py.\n")
        res.assign(source="recomputed residual of the reference row named in 'case' (selector validate)",
                   confidence="fitted").to_csv(f, index=False)
    print(f"{len(res)} residuals -> {len(table)} band groups")
    print(table[["family", "route", "section_band", "property", "n", "q_lo", "q_hi"]].to_string(index=False))
    print("\ncoverage in-sample:")
    print(band_fit.coverage(res, table).to_string(index=False))
    print("\ncoverage leave-one-grade-out:")
    print(band_fit.held_out_coverage(res).to_string(index=False))


if __name__ == "__main__":
    main()
