"""Accuracy of the quench-and-temper route on INDEPENDENT reference rows.

A row of ``data/reference/qt_steels.csv`` is *calibration* when it joins any row a fit
used (every ``data/fits/*_rows.csv``), on the keys of the fit convention: same grade;
same quench or one of them blank; |section difference| <= 2 mm; |temper temperature
difference| <= 6 C.  A blank section on either side is taken as joining (the
conservative reading: an unknown section cannot prove the row independent).  The join is the
package's own (``selector.validation.calibration.match``, route ``quench_temper``), the one the
validation report and the prediction bands use, so the three agree on which rows are
calibration.  Only the
other rows (independent) are measured here, through ``selector.evaluate`` with the
row's grade, quench (blank: the grade's usual medium, first in
data/route_windows.csv), section (blank: 25.4 mm round), tempering
temperature and time (blank: 2 h) -- the same defaults as the validation report.  HB is compared
where the row's ``hb_location`` says the source took it (centre, mid-radius, surface; blank: the
ASTM A370 tension-test location, like the tensile strength; ``selector.validation.location``).  A row whose
``steel`` column names a published steel other than the catalogue grade (EN 42CrMo4 entered
under 4140) is recomputed on that steel's mid-range composition
(``selector.validation.steels.mid_composition``, passed as ``heat_composition``), as the
validation report does.

Prints, over the typical-value rows of carbon and alloy steels (the headline set of
``docs/validation.md``), per family and carbon class, and over the specification-minimum rows
apart (where the model, which estimates typical values, is expected to lie above): n, median
absolute % error, 90th percentile of the absolute % error and median signed % error (bias) of
tensile and yield strength and of HB; for HRC the same in HRC points.

Usage: ``PYTHONPATH=. python scripts/qt_accuracy.py [--rows] [--also-independent-of DIR ...]``
(``--rows`` lists every independent row with its prediction; ``--also-independent-of`` keeps only
the rows that are independent of the fits listed in ``DIR`` too, a ``data/fits`` directory of
another tree: a model variant that fits more rows measured against the shipped one on the rows
that neither has seen, so that the comparison is not a change of the row set).
"""
from __future__ import annotations

import argparse
import glob
import math
import sys
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import selector  # noqa: E402
from selector.errors import SelectorError, UnknownGradeError  # noqa: E402
from selector.routes.families.base import RouteFamily  # noqa: E402
from selector.validation import calibration, location, steels  # noqa: E402

DEFAULT_HOURS = 2.0
DEFAULT_SECTION_MM = 25.4
PROPS = (("uts_mpa", "%"), ("yield_mpa", "%"), ("hardness_hb", "%"), ("hardness_hrc", "HRC"))
TARGETS = {"uts_mpa": "median <= 5 %, p90 <= 12 %, |bias| <= 2 %", "yield_mpa": "median <= 6 %",
           "hardness_hb": "median <= 5 %", "hardness_hrc": "median <= 2 HRC"}


def _read(path) -> pd.DataFrame:
    return pd.read_csv(path, comment="#", dtype={"grade": str, "quench": str})


def fit_rows(fits_dir: Path = ROOT / "data" / "fits") -> pd.DataFrame:
    """Every row any fit used (the union of ``data/fits/*_rows.csv``)."""
    frames = [_read(p) for p in sorted(glob.glob(str(fits_dir / "*_rows.csv")))]
    if not frames:
        return pd.DataFrame(columns=["fit", "grade", "quench", "section_mm", "temp_c"])
    return pd.concat(frames, ignore_index=True)


def _blank(x) -> bool:
    return x is None or (isinstance(x, float) and math.isnan(x)) or str(x).strip() in ("", "nan")


def _num(v) -> float:
    return math.nan if _blank(v) else float(v)


def _fit_tuple(fit: pd.DataFrame) -> tuple:
    """The rows of a fits frame as the package's :class:`~selector.validation.calibration.FitRow`."""
    return tuple(calibration.FitRow(str(r.get("fit", "")), str(r.get("source_file", "") or ""),
                                    str(r.get("grade", "")).strip(),
                                    "" if _blank(r.get("quench")) else str(r["quench"]).strip().lower(),
                                    _num(r.get("section_mm")), _num(r.get("temp_c")),
                                    "" if _blank(r.get("condition")) else str(r["condition"]).strip())
                 for r in fit.to_dict("records"))


def joins(ref: dict, fit) -> bool:
    """True when the reference row joins a fit row (fit convention keys), decided by the
    package's own join (:func:`selector.validation.calibration.match`, route
    ``quench_temper``), the one the validation report and the bands use.  ``fit``: a
    frame of ``*_rows.csv`` rows or a tuple of ``FitRow``."""
    rows = fit if isinstance(fit, tuple) else _fit_tuple(fit)
    return calibration.match(rows, grade=str(ref["grade"]).strip(), route="quench_temper",
                             quench="" if _blank(ref.get("quench")) else str(ref["quench"]),
                             section_mm=_num(ref.get("section_mm")),
                             temp_c=_num(ref.get("temper_temp_c"))) is not None


def independent_rows(ref_path: Path = ROOT / "data" / "reference" / "qt_steels.csv",
                     fits_dir: Path = ROOT / "data" / "fits", also=()) -> pd.DataFrame:
    """The rows of ``ref_path`` that join no row of the fits in ``fits_dir`` nor in any
    directory of ``also``."""
    ref = _read(ref_path)
    fit = _fit_tuple(pd.concat([fit_rows(fits_dir)] + [fit_rows(Path(d)) for d in also], ignore_index=True))
    mask = np.array([not joins(r, fit) for r in ref.to_dict("records")], bool)
    return ref[mask].reset_index(drop=True)


def _known(grade) -> bool:
    try:
        selector.grade(str(grade))
    except UnknownGradeError:
        return False
    return True


def predict(rows: pd.DataFrame) -> pd.DataFrame:
    out = []
    for r in rows.to_dict("records"):
        if _blank(r.get("quench")):   # the grade's usual medium, as the validation report assumes
            quench = RouteFamily.choices(selector.grade(str(r["grade"])), "quench_temper", "quench", ("oil",))[0] \
                if _known(r["grade"]) else "oil"
        else:
            quench = str(r["quench"]).strip()
        hours = DEFAULT_HOURS if _blank(r.get("temper_hours")) else float(r["temper_hours"])
        d = DEFAULT_SECTION_MM if _blank(r.get("section_mm")) else float(r["section_mm"])
        harden = {"op": "harden", "quench": quench}
        if not _blank(r.get("austenitize_c")):
            harden["austenitize_c"] = float(r["austenitize_c"])
        steel = "" if _blank(r.get("steel")) else str(r["steel"]).strip()
        heat = steels.mid_composition(steel) if steel else None
        try:
            g = selector.grade(str(r["grade"]))
            res = selector.evaluate(g.id, [harden, {"op": "temper", "temp_c": float(r["temper_temp_c"]),
                                                    "hours": hours}], diameter_mm=d, heat_composition=heat)
        except SelectorError as exc:
            print(f"skipped {r['grade']} {r['temper_temp_c']} C: {exc}", file=sys.stderr)
            continue
        c = float(g.composition()["C"])
        rec = {"grade": g.id, "family": g.family, "carbon": "C < 0.55" if c < 0.55 else "C >= 0.55",
               "quench": quench, "section_mm": d, "temp_c": float(r["temper_temp_c"]), "hours": hours,
               "kind": str(r.get("kind", "typical")).strip(), "steel": steel,
               "source": str(r.get("source", ""))[:40]}
        for p, _ in PROPS:
            rec[p + "_pub"] = r.get(p)
            rec[p + "_pred"] = res.get(p)
        # the hardness where the source took it (hb_location), else at the tension-test location
        rec["hardness_hb_pred"] = location.hardness_hb_at(res, r.get("hb_location"))
        out.append(rec)
    return pd.DataFrame(out)


def stats(pred: pd.DataFrame, prop: str, unit: str) -> dict | None:
    pub = pd.to_numeric(pred[prop + "_pub"], errors="coerce").to_numpy(float)
    est = pd.to_numeric(pred[prop + "_pred"], errors="coerce").to_numpy(float)
    m = np.isfinite(pub) & np.isfinite(est)
    if not m.any():
        return None
    e = est[m] - pub[m] if unit == "HRC" else 100.0 * (est[m] - pub[m]) / pub[m]
    return {"n": int(m.sum()), "median_abs": float(np.median(np.abs(e))),
            "p90_abs": float(np.percentile(np.abs(e), 90)), "bias": float(np.median(e))}


#: families of the headline set of docs/validation.md
HEADLINE_FAMILIES = ("carbon_steel", "alloy_steel")


def report(pred: pd.DataFrame) -> list[str]:
    """Statistics per property: the typical-value rows of carbon and alloy steels (the headline set,
    then per family and carbon class) and the specification-minimum rows apart."""
    lines = []
    kind = pred["kind"] if "kind" in pred else pd.Series("typical", index=pred.index)
    typ = pred[(kind == "typical") & pred["family"].isin(HEADLINE_FAMILIES)]
    groups = [("all typical (headline set)", typ)]
    groups += [(f"{f}, {c}", g) for (f, c), g in pred[kind == "typical"].groupby(["family", "carbon"])]
    groups += [("minimum rows (expect > 0)", pred[kind == "minimum"])]
    for prop, unit in PROPS:
        lines.append(f"{prop} ({'abs % error' if unit == '%' else 'HRC points'}; target {TARGETS[prop]})")
        for name, g in groups:
            s = stats(g, prop, unit)
            if s:
                lines.append(f"  {name:30s} n={s['n']:3d}  median {s['median_abs']:5.1f}  "
                             f"p90 {s['p90_abs']:5.1f}  bias {s['bias']:+5.1f}")
    return lines


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rows", action="store_true", help="list every independent row with its prediction")
    ap.add_argument("--also-independent-of", metavar="DIR", nargs="+", default=(),
                    help="keep only rows independent of the fits in DIR too (another tree's data/fits)")
    a = ap.parse_args(argv)
    ref = _read(ROOT / "data" / "reference" / "qt_steels.csv")
    for d in a.also_independent_of:
        if not glob.glob(str(Path(d) / "*_rows.csv")):
            ap.error(f"--also-independent-of: {d!r} holds no *_rows.csv file (a data/fits directory is expected)")
    rows = independent_rows(also=a.also_independent_of)
    fits = sorted(Path(p).name for p in glob.glob(str(ROOT / "data" / "fits" / "*_rows.csv")))
    extra = "".join(f" and of the fits in {d}" for d in a.also_independent_of)
    print(f"reference rows {len(ref)}, independent of {', '.join(fits) or 'no fit files'}{extra}: {len(rows)}")
    pred = predict(rows)
    if a.rows:
        with pd.option_context("display.width", 220, "display.max_rows", 500):
            cols = ["grade", "quench", "section_mm", "temp_c"] + [p + s for p, _ in PROPS for s in ("_pub", "_pred")]
            print(pred[cols].round(1).to_string())
    print("\n".join(report(pred)))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
