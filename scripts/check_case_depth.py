"""Carburized case depth against the published rows of data/reference/case_depth.csv.

Prints, for every effective-depth row, the effective case depth (50 HRC, SAE J423)
predicted by ``selector.evaluate`` for the row's grade, cycle, quench, section and
temper, and by the model layer (``selector.models.carburizing.effective_case_depth_mm``)
at surface cooling equivalents J = 1.6 / 3 / 6 mm; and for every total-case row the
Harris (1943) depth.  Issue 11 target: effective depth within 20 % of published.

    PYTHONPATH=. python scripts/check_case_depth.py
"""
from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd

from selector import evaluate, grade
from selector.models import carburizing as cz

ROOT = Path(__file__).resolve().parents[1]


def main() -> None:
    t = pd.read_csv(ROOT / "data" / "reference" / "case_depth.csv", comment="#")
    print("total case (Harris 1943 formula) vs reference rows")
    for _, r in t[t["basis"] == "total"].iterrows():
        got = float(cz.harris_case_depth_mm(r["temp_c"], r["hours"]))
        print(f"  {r['grade']} {r['temp_c']:.0f} C {r['hours']:>4.0f} h  published {r['depth_mm']:.2f} mm  "
              f"model {got:.2f} mm  ({100 * (got / r['depth_mm'] - 1):+.1f} %)")
    print("effective case (50 HRC) vs reference rows [confidence]")
    errs = []
    for _, r in t[t["basis"] == "effective"].iterrows():
        route = [{"op": "carburize", "temp_c": float(r["temp_c"]), "hours": float(r["hours"]),
                  "surface_carbon_pct": float(r["surface_carbon_pct"])},
                 {"op": "temper", "temp_c": float(r["temper_temp_c"]), "hours": 2.0}]
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            res = evaluate(str(r["grade"]), route, diameter_mm=float(r["diameter_mm"]))
        comp = {k: float(v) for k, v in grade(str(r["grade"])).composition().items()}
        model = []
        for j in (1.59, 3.0, 6.0):
            model.append(float(cz.effective_case_depth_mm(r["temp_c"], r["hours"], r["surface_carbon_pct"], comp,
                                                          r["temper_temp_c"], 2.0, 20.0, jominy_mm=j)))
        e = res["case_depth_mm"] / r["depth_mm"] - 1
        errs.append(e)
        ms = " / ".join(f"{m:.2f}" for m in model)
        print(f"  {r['grade']} {r['temp_c']:.0f} C {r['hours']:>4.0f} h {r['quench']} {r['diameter_mm']:.0f} mm: "
              f"published {r['depth_mm']:.2f} mm ({r['depth_lo_mm']:.2f}-{r['depth_hi_mm']:.2f}) "
              f"[{r['confidence']}]  evaluate {res['case_depth_mm']:.2f} mm ({100 * e:+.0f} %)"
              + (f"  model J1.6/3/6 mm: {ms}" if ms else ""))
    errs = np.abs(np.array(errs))
    print(f"evaluate(): median |error| {100 * np.median(errs):.0f} %, max {100 * errs.max():.0f} %, "
          f"within 20 %: {int((errs <= 0.2).sum())} of {len(errs)}")


if __name__ == "__main__":
    main()
