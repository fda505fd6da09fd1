"""Fit the yield / elongation / reduction-of-area correlations OFFLINE and write their files.

Per family (``carbon_steel``, ``alloy_steel``), least squares on the fully hardened
rows of ``data/tempering_points.csv`` that give a tensile strength
(:func:`selector.models.correlations.solve`; forms in that module):

    YS/UTS = s0 + s1·u + s2·u² (alloy, u = UTS/1000) or r0 + r1·T/100 (carbon);
    ln EL = e0 + e1·UTS/1000;
    RA = q0 + q1·UTS/1000 (alloy) or ln RA = q0 + q1·UTS/1000 (carbon)

Writes ``data/fits/correlations_coefficients.csv`` (fit = family), ``_rows.csv`` (the
rows used) and ``_cv.csv`` (leave-one-grade-out: yield in %, elongation and RA in
percentage points), and prints the pooled LOGO errors.

Usage: ``PYTHONPATH=. python scripts/fit_correlations.py``.
"""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from selector.models import fitted  # noqa: E402
from selector.models import correlations as cr, tempering as tp  # noqa: E402

NAME = "correlations"
SOURCE_FILE = "data/tempering_points.csv"
OUT = ROOT / "data" / "fits"
UNITS = {"r0": "1", "r1": "1/(100 degC)", "s0": "1", "s1": "1/(1000 MPa)", "s2": "1/(1000 MPa)^2", "e0": "ln %", "e1": "ln %/(1000 MPa)", "q0": "% or ln %",
         "q1": "%/(1000 MPa) or ln %/(1000 MPa)", "uts_min": "MPa", "uts_max": "MPa", "temp_min": "degC",
         "temp_max": "degC", "n_rows": "rows"}
CV_SOURCE = "leave-one-grade-out refit by scripts/fit_correlations.py"
SOURCE = "least squares on the fully hardened rows with UTS of data/tempering_points.csv (scripts/fit_correlations.py)"


def _predict(k: dict, fam: str, d: pd.DataFrame) -> dict:
    u = d["uts_mpa"].to_numpy(float)
    ys = u * cr.ratio_of(k, fam, u, d["temp_c"].to_numpy(float))
    e0, e1 = k["elongation"]
    el = np.exp(e0 + e1 * u / 1000.0)
    q0, q1 = k["reduction_area"]
    ra = np.exp(q0 + q1 * u / 1000.0) if fam == "carbon_steel" else q0 + q1 * u / 1000.0
    return {"yield_mpa": ys, "elongation_pct": el, "reduction_area_pct": np.clip(ra, *cr.RA_RANGE)}


def fit(points: pd.DataFrame | None = None) -> dict:
    pts = tp.load_points() if points is None else points
    recs, used, cv = [], [], []
    pooled = {"yield_mpa": [], "elongation_pct": [], "reduction_area_pct": []}
    for fam in cr.FIT_FAMILIES:
        d = cr.fit_rows(pts, fam).reset_index(drop=True)
        k = cr.solve(d, fam)
        for key, names in cr.coefficient_names(fam).items():
            for n, v in zip(names, k[key]):
                recs.append({"fit": fam, "coefficient": n, "value": float(v), "unit": UNITS[n],
                             "source": SOURCE if key not in ("uts_mpa", "temp_c") else "span of the fitted rows",
                             "confidence": "fitted"})
        recs.append({"fit": fam, "coefficient": "n_rows", "value": float(k["n_rows"]), "unit": "rows",
                     "source": "count of the fitted rows", "confidence": "fitted"})
        used.append(pd.DataFrame({"fit": fam, "source_file": SOURCE_FILE, "grade": d["grade"].astype(str),
                                  "quench": d["quench"], "section_mm": d["section_mm"], "temp_c": d["temp_c"],
                                  "hours": d["hours"], "condition": "", "source": d["source"],
                                  "confidence": d["confidence"]}))
        for g in d["grade"].unique():
            m = (d["grade"] == g).to_numpy()
            pred = _predict(cr.solve(d[~m], fam), fam, d[m])
            for prop, unit in (("yield_mpa", "%"), ("elongation_pct", "% points"), ("reduction_area_pct", "% points")):
                obs = d.loc[m, prop].to_numpy(float)
                ok = np.isfinite(obs)
                if not ok.any():
                    continue
                e = pred[prop][ok] - obs[ok]
                if unit == "%":
                    e = 100.0 * e / obs[ok]
                pooled[prop].extend(np.abs(e))
                cv.append({"fit": fam, "grade": str(g), "n": int(ok.sum()), "property": prop,
                           "median_abs_error": float(np.median(np.abs(e))), "median_error": float(np.median(e)),
                           "unit": unit, "source": CV_SOURCE, "confidence": "fitted"})
    return {"coefficients": pd.DataFrame(recs), "rows": pd.concat(used, ignore_index=True),
            "cv": pd.DataFrame(cv), "pooled": {k: float(np.median(v)) for k, v in pooled.items()}}


def write(result: dict, out: Path = OUT) -> None:
    fitted.write_tables(NAME, result, f"# written by scripts/fit_{NAME}.py from {SOURCE_FILE} (fully_hardened rows with UTS); "
                                      "do not edit by hand\n", out)


def main() -> int:
    r = fit()
    write(r)
    p = r["pooled"]
    print(f"pooled LOGO median abs error: yield {p['yield_mpa']:.1f} %, elongation {p['elongation_pct']:.1f} "
          f"points, RA {p['reduction_area_pct']:.1f} points")
    print(r["cv"].round(2).to_string(index=False))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
