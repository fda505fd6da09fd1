"""Offline fit of the Shercliff–Ashby aging constants of the precipitation-hardening
stainless steels UNS S17400 (17-4PH) and UNS S15500 (15-5PH) to TYPICAL published values.

Data: ``data/reference/ph_typical.csv`` (typical bar properties by condition).  The fit
uses the rows of :data:`FIT_CONDITIONS` (Condition A and H900, H1025, H1150, both
grades) and leaves H925, H1075 and H1100 as independent checks; the ASTM A564 minimum
rows of ``data/reference/tempers_nonferrous.csv`` are not used.

Model (:mod:`selector.models.aging`, Shercliff & Ashby 1990)::

    YS  = sigma_i + sigma_ss0 (1 - Xr (1 - ce/c0))^(2/3) + S0 (1 - ce/c0)^(1/2) g(P/P_p)
    UTS = YS + w_ppt + w_ss (1 - Xr)
    EL  = [EL_ss (1 - X) + EL_ppt X] (YS_ref / YS)^m

Fixed (not fitted), with their sources in the coefficient file: peak at H900
(482 °C, 1 h: maximum strength with the 900 °F age, Aerospace Structural Metals
Handbook 17-4PH §1.5.1), Cu solvus T_s = 900 °C and Q_s = 85 kJ/mol (from memory),
sigma_i + sigma_ss0 = Condition A yield.
Fitted: S0, Q_A and sigma_ss0 by least squares on the relative yield error of the aged
fit rows (scipy.optimize.least_squares); w_ppt = mean (UTS - YS) of the aged fit rows,
w_ss from Condition A; m and EL_ppt by linear least squares of ln EL on ln YS over the
aged fit rows, EL_ss from Condition A.

Writes ``data/fits/aging_ph_coefficients.csv``, ``aging_ph_rows.csv`` and
``aging_ph_cv.csv`` (leave-one-grade-out; the rows and cv files carry ``source`` and
``confidence`` after the convention's columns, as every table under data/ must) and prints the pooled LOGO median absolute
error.  The package reads the coefficients; it never fits.

    PYTHONPATH=. python scripts/fit_aging_ph.py
"""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd
from scipy.optimize import least_squares

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from selector.models import aging as ag  # noqa: E402

FIT = "aging_ph"
DATA_FILE = "reference/ph_typical.csv"
GRADES = ("17-4PH", "15-5PH")
FIT_CONDITIONS = ("A", "H900", "H1025", "H1150")
SOURCE = f"scripts/fit_aging_ph.py on data/{DATA_FILE}"

#: fixed constants: value, unit, source, confidence
FIXED = {
    "tp_ref_h": (1.0, "h", "H900 (482 C x 1 h) taken as peak strength: maximum strength with the 900 F age "
                 "(Aerospace Structural Metals Handbook 17-4PH section 1.5.1)", "partial"),
    "t_ref_c": (482.0, "°C", "temperature of tp_ref_h (ASTM A564 H900)", "partial"),
    "ts_c": (900.0, "°C", "solvus of about 3.5 % Cu in martensite/ferrite, about 900 C", "from memory"),
    "qs_kj_mol": (85.0, "kJ/mol", "Cu solubility in alpha-iron, about 2 % at 850 C and 0.5 % at 700 C", "from memory"),
    "natural_stable_h": (0.0, "h", "Condition A is stable at room temperature", "common practice"),
}
UNITS = {"sigma_i_mpa": "MPa", "sigma_ss0_mpa": "MPa", "s0_mpa": "MPa", "q_kj_mol": "kJ/mol",
         "w_ss_mpa": "MPa", "w_ppt_mpa": "MPa", "el_ss_pct": "%", "el_ppt_pct": "%", "ys_ref_mpa": "MPa",
         "el_exp": "-"}


def load_rows(root: Path = ROOT) -> pd.DataFrame:
    """The typical-value rows the fit uses (grades :data:`GRADES`, conditions :data:`FIT_CONDITIONS`)."""
    t = pd.read_csv(root / "data" / DATA_FILE, comment="#")
    return t[t["grade"].isin(GRADES) & t["condition"].isin(FIT_CONDITIONS)].reset_index(drop=True)


def _constants(d: dict) -> ag.AgingConstants:
    return ag.AgingConstants(**{n: np.asarray(float(d[n])) for n in ag.CONSTANT_NAMES},
                             model=("shercliff_ashby_ph_stainless",))


def predict(d: dict, rows: pd.DataFrame) -> pd.DataFrame:
    """Yield, tensile strength and elongation of ``rows`` (condition A = as solution treated)."""
    c = _constants(d)
    out = []
    for r in rows.itertuples():
        if r.condition == "A" or not np.isfinite(r.age_temp_c):
            p = ag.natural_aged_properties(c, 1.0)
        else:
            p = ag.aged_properties(c, float(r.age_temp_c), float(r.age_hours))
        out.append({k: float(np.asarray(p[k]).ravel()[0]) for k in ("yield_mpa", "uts_mpa", "elongation_pct")})
    return pd.DataFrame(out, index=rows.index)


def fit(rows: pd.DataFrame) -> dict:
    """Fitted and fixed constants from ``rows`` (deterministic)."""
    d = {k: v[0] for k, v in FIXED.items()}
    a = rows[rows["condition"] == "A"]
    aged = rows[rows["condition"] != "A"]
    ys_a = float(a["yield_mpa"].mean())
    d.update(w_ss_mpa=0.0, w_ppt_mpa=0.0, el_ss_pct=10.0, el_ppt_pct=10.0, ys_ref_mpa=1000.0, el_exp=1.0)

    def resid(p):
        s0, q, ss0 = p
        dd = dict(d, s0_mpa=s0, q_kj_mol=q, sigma_ss0_mpa=ss0, sigma_i_mpa=ys_a - ss0)
        return predict(dd, aged)["yield_mpa"].to_numpy() / aged["yield_mpa"].to_numpy() - 1.0

    sol = least_squares(resid, x0=[800.0, 150.0, 300.0], bounds=([100.0, 40.0, 0.0], [3000.0, 400.0, ys_a - 100.0]),
                        xtol=1e-14, ftol=1e-14, gtol=1e-14)
    s0, q, ss0 = (float(v) for v in sol.x)
    d.update(s0_mpa=s0, q_kj_mol=q, sigma_ss0_mpa=ss0, sigma_i_mpa=ys_a - ss0)
    # tensile reserve: aged rows carry w_ppt; condition A adds w_ss (solute not yet precipitated)
    w_ppt = float((aged["uts_mpa"] - aged["yield_mpa"]).mean())
    d["w_ppt_mpa"] = w_ppt
    d["w_ss_mpa"] = float((a["uts_mpa"] - a["yield_mpa"]).mean()) - w_ppt
    # elongation: ln EL = ln EL_ppt + m ln(YS_ref / YS) over the aged rows (published YS)
    ys_ref = float(aged.loc[aged["condition"] == "H900", "yield_mpa"].mean())
    xcol = np.log(ys_ref / aged["yield_mpa"].to_numpy(float))
    ycol = np.log(aged["elongation_pct"].to_numpy(float))
    m, ln_el = np.polyfit(xcol, ycol, 1)
    d.update(ys_ref_mpa=ys_ref, el_exp=float(m), el_ppt_pct=float(np.exp(ln_el)))
    d["el_ss_pct"] = float(a["elongation_pct"].mean()) / (ys_ref / ys_a) ** float(m)
    return d


def coefficient_table(d: dict) -> pd.DataFrame:
    rows = []
    for name in ag.CONSTANT_NAMES:
        if name in FIXED:
            _, unit, src, conf = FIXED[name]
        else:
            unit, src, conf = UNITS[name], f"fitted by {SOURCE} (rows in data/fits/{FIT}_rows.csv)", "fitted"
        rows.append({"fit": FIT, "coefficient": name, "value": repr(float(d[name])), "unit": unit, "source": src,
                     "confidence": conf})
    return pd.DataFrame(rows)


def rows_table(rows: pd.DataFrame) -> pd.DataFrame:
    return pd.DataFrame({"fit": FIT, "source_file": DATA_FILE, "grade": rows["grade"], "quench": "",
                         "section_mm": "", "temp_c": rows["age_temp_c"], "hours": rows["age_hours"],
                         "condition": rows["condition"], "source": SOURCE, "confidence": "fitted"})


def cv_table(rows: pd.DataFrame) -> pd.DataFrame:
    """Leave-one-grade-out: refit without each grade, predict that grade's fit rows."""
    out = []
    for g in GRADES:
        train, test = rows[rows["grade"] != g], rows[rows["grade"] == g]
        if train.empty or test.empty:
            continue
        pred = predict(fit(train), test)
        for prop, unit in (("yield_mpa", "MPa"), ("uts_mpa", "MPa"), ("elongation_pct", "%")):
            err = pred[prop].to_numpy() - test[prop].to_numpy(float)
            out.append({"fit": FIT, "grade": g, "n": len(test), "property": prop,
                        "median_abs_error": float(np.median(np.abs(err))), "median_error": float(np.median(err)),
                        "unit": unit, "source": SOURCE, "confidence": "fitted"})
    return pd.DataFrame(out)


def _write(df: pd.DataFrame, path: Path, header: str) -> None:
    path.parent.mkdir(parents=True, exist_ok=True)
    with open(path, "w", encoding="utf-8", newline="") as f:
        f.write(f"# {header}\n")
        df.to_csv(f, index=False, lineterminator="\n")


def main() -> None:
    rows = load_rows()
    d = fit(rows)
    out = ROOT / "data" / "fits"
    head = f"written by scripts/fit_aging_ph.py from data/{DATA_FILE}"
    _write(coefficient_table(d), out / f"{FIT}_coefficients.csv", head)
    _write(rows_table(rows), out / f"{FIT}_rows.csv", head + "; every row the fit used")
    cv = cv_table(rows)
    _write(cv, out / f"{FIT}_cv.csv", head + "; leave-one-grade-out cross-validation")
    for k in ("s0_mpa", "q_kj_mol", "sigma_ss0_mpa", "sigma_i_mpa", "w_ppt_mpa", "w_ss_mpa", "el_ppt_pct",
              "el_exp", "el_ss_pct"):
        print(f"{k:15s} {d[k]:.4g}")
    for prop, g in cv.groupby("property"):
        print(f"LOGO pooled median |error| {prop}: {np.median(g['median_abs_error']):.3g} {g['unit'].iloc[0]}")


if __name__ == "__main__":
    main()
