"""Where the quench-and-temper error comes from: residuals of the independent rows
broken down by grade, carbon, tempering temperature, section and the chain's
martensite fraction.

Reads the comparisons of :func:`selector.validation.report.recompute` (the same
rows, defaults and calibration key join as ``docs/validation.md``), keeps the
headline set (carbon and alloy steels, kind ``typical``, independent rows only) and
prints, per property, n, median signed error (bias) and median absolute error per
group.  Relative errors in % of the published value; HRC in points.

Usage: ``PYTHONPATH=. python -m selector.validation.residuals``
"""
from __future__ import annotations

import re

import numpy as np
import pandas as pd

from ..catalogue.grades import grade
from ..models.correlations import yield_from_uts
from ..routes.families.base import tension_test_position
from ..routes.quench_response import as_quenched_profile
from . import report

PROPS = (("uts_mpa", True), ("yield_mpa", True), ("hardness_hb", True), ("hardness_hrc", False))
TEMP_BINS = (0, 300, 400, 500, 600, 760)
CARBON_BINS = (0.0, 0.35, 0.45, 0.55, 2.1)
MARTENSITE_BINS = (-1.0, 50.0, 90.0, 101.0)


def headline_rows(comparisons: pd.DataFrame) -> pd.DataFrame:
    """The independent Q&T rows of the headline (carbon and alloy steels, typical values),
    with ``err`` (% of published, or HRC) and the grouping columns added."""

    c = comparisons[(comparisons["status"] == "compared") & (comparisons["route"] == "quench_temper")
                    & comparisons["family"].isin(("carbon_steel", "alloy_steel"))
                    & (comparisons["kind"] == "typical") & (comparisons["calibration"] == "")].copy()
    rel = c["property"] != "hardness_hrc"
    c["err"] = np.where(rel, 100.0 * c["error"] / c["published"], c["error"])
    carbon = {g: float(grade(g).composition()["C"]) for g in c["grade"].unique()}
    c["carbon_pct"] = c["grade"].map(carbon)
    c["temp_c"] = [float(re.search(r"temper ([\d.]+)", s).group(1)) for s in c["condition"]]
    c["quench"] = [s.split()[0] for s in c["condition"]]
    return c


def with_martensite(rows: pd.DataFrame) -> pd.DataFrame:
    """Add ``martensite_pct``: the chain's as-quenched martensite at the ASTM A370
    test location of each row (centre up to 38 mm, mid-radius above)."""

    def one(g, q, d):
        comp = {k: float(v) for k, v in grade(g).composition().items()}
        pos = float(tension_test_position(np.array([d]))[0])
        return float(as_quenched_profile(comp, q, diameter_mm=d, positions=(pos,))["martensite_pct"][0, 0])

    out = rows.copy()
    out["martensite_pct"] = [one(g, q, d) for g, q, d in zip(out["grade"], out["quench"], out["section_mm"])]
    return out


def breakdown(rows: pd.DataFrame) -> dict:
    """``{property: {grouping: DataFrame(n, bias, median_abs)}}`` for the groupings grade,
    carbon, temper temperature, section and martensite fraction."""
    out = {}
    for prop, _ in PROPS:
        d = rows[rows["property"] == prop]
        if d.empty:
            continue
        groups = {"grade": d["grade"], "section_mm": d["section_mm"],
                  "carbon_pct": pd.cut(d["carbon_pct"], CARBON_BINS),
                  "temp_c": pd.cut(d["temp_c"], TEMP_BINS)}
        if "martensite_pct" in d:
            groups["martensite_pct"] = pd.cut(d["martensite_pct"], MARTENSITE_BINS)
        out[prop] = {name: d.groupby(key, observed=True)["err"].agg(
            n="count", bias="median", median_abs=lambda x: float(np.median(np.abs(x)))) for name, key in groups.items()}
    return out


def yield_correlation_rows(rows: pd.DataFrame) -> pd.DataFrame:
    """The yield/tensile correlation alone, on the independent rows that publish both.

    For each case of ``rows`` (from :func:`headline_rows`) with a published tensile and
    yield strength, the shipped correlation
    (:func:`selector.models.correlations.yield_from_uts`) is applied to the *published*
    tensile strength at the row's tempering temperature; ``err`` is its error against the
    published yield, % of published.  The tensile-strength error of the chain does not
    enter, so this measures the correlation separately.  Columns: case, grade, family,
    temp_c, uts_pub, yield_pub, ratio_pub (yield / tensile as published), yield_corr,
    ratio_corr, err."""
    uts = rows[rows["property"] == "uts_mpa"].set_index("case")
    yld = rows[rows["property"] == "yield_mpa"].set_index("case")
    both = uts.index.intersection(yld.index)
    u, y = uts.loc[both], yld.loc[both]
    pred = np.asarray(yield_from_uts(u["published"].to_numpy(float), u["temp_c"].to_numpy(float),
                                     u["family"].to_numpy(str)), float)
    out = pd.DataFrame({"case": both, "grade": u["grade"].to_numpy(), "family": u["family"].to_numpy(),
                        "temp_c": u["temp_c"].to_numpy(float), "uts_pub": u["published"].to_numpy(float),
                        "yield_pub": y["published"].to_numpy(float)})
    out["ratio_pub"] = out["yield_pub"] / out["uts_pub"]
    out["yield_corr"] = pred
    out["ratio_corr"] = pred / out["uts_pub"]
    out["err"] = 100.0 * (pred - out["yield_pub"]) / out["yield_pub"]
    return out


def main() -> int:
    cases = report.load_cases(files=(report.QT_FILE,))
    rows = with_martensite(headline_rows(report.recompute(cases)))
    for prop, tables in breakdown(rows).items():
        e = rows.loc[rows["property"] == prop, "err"].to_numpy(float)
        print(f"== {prop}: n={len(e)} median abs {np.median(np.abs(e)):.1f}, "
              f"p90 {np.percentile(np.abs(e), 90):.1f}, bias {np.median(e):+.1f}")
        for name, t in tables.items():
            print(f"-- by {name}\n{t.round(1).T.to_string()}")
    yc = yield_correlation_rows(rows)
    e = yc["err"].to_numpy(float)
    print(f"== yield from the PUBLISHED tensile strength (correlation alone): n={len(e)} median abs "
          f"{np.median(np.abs(e)):.1f}, p90 {np.percentile(np.abs(e), 90):.1f}, bias {np.median(e):+.1f}")
    print(yc.groupby("grade")["err"].agg(n="count", bias="median",
                                          median_abs=lambda x: float(np.median(np.abs(x)))).round(1).T.to_string())
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
