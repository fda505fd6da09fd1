"""Fit the bar-to-Jominy cooling-rate factor on published bar-centre chart readings (offline).

The conduction model (``selector.models.cooling``: constant k = 27 W/mK, rho c = 4.6 MJ/m3K, h = 2kH)
gives the cooling rate at 700 C of each point of a quenched bar; the Jominy equivalence reads the
distance with the same rate off the measured Jominy cooling-rate table.  Read that way, bar centres
come out 20-28 % farther along the Jominy bar than the published bar-diameter / Jominy-position
charts show, by the same ratio for H = 0.3, 1.0 and the ideal quench.  A constant-property series
cannot carry what a real bar does (conductivity rising as the outer shell cools and transforms), so
one effective factor F multiplies the conduction rate before the Jominy table is read:

    J(bar point) = J_table(F * rate_conduction(H, D, r/R))

(rate_conduction with each point at its boiling-stage Biot number, ``cooling.boiling_biot``; at the bar
centres of the fit rows the boiling stage changes the rate by under 1 %).
(equivalently an effective diffusivity F * alpha at fixed Biot number).  F is the least-squares fit,
in log distance, to the readings of ``data/reference/jominy_equivalence_charts.csv`` with role ``fit``;
rows with role ``check`` are never used.

Writes (fit convention, /work/fit_convention.md):
  data/fits/jominy_equivalence_coefficients.csv   the coefficient
  data/fits/jominy_equivalence_rows.csv           the chart rows used
  data/fits/jominy_equivalence_cv.csv             leave-one-reading-out cross-validation (there is no
                                                  grade here: the `grade` column holds the chart id)
The rows and cv files carry `source` and `confidence` after the convention's columns (every table
under data/ has them, tests/test_data_sources.py).
Usage: PYTHONPATH=$PWD python scripts/fit_jominy_equivalence.py
"""
from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

FIT = "jominy_equivalence"
CHART_FILE = "reference/jominy_equivalence_charts.csv"
#: austenitizing and bath temperatures of the chart quenches (A255 Table 1 for C >= 0.37 %; 40 C bath).
#: The centre passes 700 C in the regular regime, where the rate does not depend on them.
AUSTENITIZE_C = 845.0
BATH_C = 40.0
#: bounds of the factor searched
BOUNDS = (0.5, 3.0)


def load_charts():
    from selector.catalogue.loader import Column, Schema, read_table

    schema = Schema((
        Column("chart"), Column("h_per_in", "float", allow_blank=True, lo=0.01, hi=10.0),
        Column("quench", allow_blank=True),
        Column("diameter_mm", "float", lo=1.0, hi=500.0), Column("position_r_r", "float", lo=0.0, hi=1.0),
        Column("jominy_mm", "float", lo=1.0, hi=100.0), Column("tolerance_mm", "float", lo=0.0, hi=20.0),
        Column("role", "choice", choices=("fit", "check")), Column("kind"), Column("table"), Column("source"),
        Column("confidence", "choice", choices=("verified", "partial", "from memory"))))
    return read_table(CHART_FILE, schema=schema)


def conduction_rates_c_s(table) -> np.ndarray:
    """Conduction-model cooling rate at 700 C of each chart point (F = 1), each point at its
    boiling-stage Biot number (``cooling.boiling_biot`` with the chart quench's ``quench_severity.boiling_peak``;
    ratio 1 for the ideal quench)."""
    from selector.models import cooling, quench_severity

    h_in = table["h_per_in"].to_numpy(float)
    peak = []
    for q in table["quench"].fillna("").astype(str):
        peak.append(quench_severity.boiling_peak(*q.split("/")) if q else (1.0, 4.0))
    d = table["diameter_mm"].to_numpy(float)
    pos = table["position_r_r"].to_numpy(float)
    ideal = ~np.isfinite(h_in)
    # ideal quench: h = inf (the exact series takes Bi = inf)
    h_w = np.where(ideal, np.inf, 2.0 * cooling.K_STEEL_W_MK * np.nan_to_num(h_in) / 0.0254)
    out = np.empty(len(d))
    for i in range(len(d)):         # a handful of rows: one exact series evaluation each
        out[i] = float(np.asarray(cooling.cooling_rate_at_c_s(
            h_w[i], diameter_mm=d[i], positions=(float(pos[i]),), austenitize_c=AUSTENITIZE_C,
            bath_c=BATH_C, exact=True, peak_ratio=peak[i][0], peak_depth_mm=peak[i][1])).ravel()[0])
    return out


def predict_mm(factor: float, rates_c_s: np.ndarray) -> np.ndarray:
    from selector.models import cooling

    return np.asarray(cooling.jominy_equivalent_mm(factor * rates_c_s), float)


def fit_factor(rates_c_s: np.ndarray, jominy_mm: np.ndarray) -> float:
    """Least squares in log distance: minimise sum (ln J_model(F) - ln J_chart)^2 over F (golden section)."""
    def sse(f):
        return float(np.sum((np.log(predict_mm(f, rates_c_s)) - np.log(jominy_mm)) ** 2))

    lo, hi = math.log(BOUNDS[0]), math.log(BOUNDS[1])
    g = (math.sqrt(5.0) - 1.0) / 2.0
    a, b = hi - g * (hi - lo), lo + g * (hi - lo)
    fa, fb = sse(math.exp(a)), sse(math.exp(b))
    for _ in range(200):
        if fa < fb:
            hi, b, fb = b, a, fa
            a = hi - g * (hi - lo)
            fa = sse(math.exp(a))
        else:
            lo, a, fa = a, b, fb
            b = lo + g * (hi - lo)
            fb = sse(math.exp(b))
    return float(math.exp(0.5 * (lo + hi)))


def fit():
    """Everything the script writes, as (coefficients, rows, cv, checks) lists of dicts."""
    t = load_charts()
    rates = conduction_rates_c_s(t)
    j = t["jominy_mm"].to_numpy(float)
    is_fit = (t["role"] == "fit").to_numpy()
    f = fit_factor(rates[is_fit], j[is_fit])
    coef = [{"fit": FIT, "coefficient": "rate_factor", "value": repr(f), "unit": "",
             "source": "least squares (log distance) on data/reference/jominy_equivalence_charts.csv role=fit",
             "confidence": "fitted"}]
    rows = []
    for rec in t[is_fit].to_dict("records"):
        h = rec["h_per_in"]
        rows.append({"fit": FIT, "source_file": "data/" + CHART_FILE, "grade": "",
                     "quench": "H=inf" if not h == h else f"H={h:g}", "section_mm": f"{rec['diameter_mm']:g}",
                     "temp_c": "", "hours": "", "condition": rec["chart"],
                     "source": rec["source"], "confidence": rec["confidence"]})
    cv = []
    idx = np.flatnonzero(is_fit)
    for k in idx:
        keep = idx[idx != k]
        fk = fit_factor(rates[keep], j[keep])
        err = float(predict_mm(fk, rates[[k]])[0] - j[k])
        cv.append({"fit": FIT, "grade": t["chart"].iloc[k], "n": 1, "property": "jominy_mm",
                   "median_abs_error": repr(abs(err)), "median_error": repr(err), "unit": "mm",
                   "source": "leave-one-out refit by scripts/fit_jominy_equivalence.py", "confidence": "fitted"})
    checks = []
    pred = predict_mm(f, rates)
    for i in range(len(t)):
        checks.append((t["chart"].iloc[i], t["role"].iloc[i], float(j[i]), float(pred[i]),
                       float(predict_mm(1.0, rates[[i]])[0])))
    return coef, rows, cv, checks


def _write(path: Path, header: str, recs: list, cols: list) -> None:
    import csv

    with open(path, "w", newline="", encoding="utf-8") as fh:
        fh.write(f"# {header}\n")
        w = csv.DictWriter(fh, fieldnames=cols, lineterminator="\n")
        w.writeheader()
        for r in recs:
            w.writerow({c: r.get(c, "") for c in cols})


def main() -> int:
    coef, rows, cv, checks = fit()
    out = ROOT / "data" / "fits"
    out.mkdir(parents=True, exist_ok=True)
    hdr = f"written by scripts/fit_jominy_equivalence.py from data/{CHART_FILE}"
    _write(out / f"{FIT}_coefficients.csv", hdr, coef, ["fit", "coefficient", "value", "unit", "source", "confidence"])
    _write(out / f"{FIT}_rows.csv", hdr, rows,
           ["fit", "source_file", "grade", "quench", "section_mm", "temp_c", "hours", "condition",
            "source", "confidence"])
    _write(out / f"{FIT}_cv.csv", hdr + "; leave-one-chart-reading-out (grade column = chart id)", cv,
           ["fit", "grade", "n", "property", "median_abs_error", "median_error", "unit", "source", "confidence"])
    print(f"rate_factor = {float(coef[0]['value']):.4f}")
    print(f"pooled leave-one-out median |error| = {np.median([abs(float(c['median_error'])) for c in cv]):.2f} mm")
    print(f"{'chart':22s} {'role':6s} {'chart mm':>9s} {'fitted mm':>10s} {'F=1 mm':>8s}")
    for name, role, j, p, p1 in checks:
        print(f"{name:22s} {role:6s} {j:9.1f} {p:10.2f} {p1:8.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
