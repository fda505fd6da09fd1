"""Where the Brinell error of the quench-and-temper route comes from, on INDEPENDENT rows.

For every independent typical-value row of carbon and alloy steels (the headline set of
``docs/validation.md``, selected by ``scripts/qt_accuracy.py``: key join against
``data/fits/*_rows.csv``) that prints both a tensile strength and a Brinell hardness, the
log error of HB is split into

* the **structure / tempering** part: the log error of the tensile strength (the route derives
  both from one Vickers hardness, so an error of that hardness moves both alike), and
* the **conversion** part: the log error of the ratio UTS/HB, i.e. how far the source's own pair
  (its measured UTS and HB) lies from the pair ASTM A370 Table 3 / ASTM E140 Tables 1-2 give for
  one hardness (``selector.models.conversions.hv_to_uts_mpa`` and ``hv_to_hb``).

    ln(HB_pred / HB_pub) = ln(UTS_pred / UTS_pub) + ln((UTS_pub / HB_pub) / (UTS_pred / HB_pred))

Then the HB error of every row with a published HB is broken down by family, carbon, tempering
temperature, section and source (median signed and median absolute %, n).

Usage: ``PYTHONPATH=. python scripts/hb_error_split.py``
"""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "scripts"))

import qt_accuracy as qa  # noqa: E402


def split(pred: pd.DataFrame) -> pd.DataFrame:
    """Rows of the headline set with a published HB, with ``hb_err`` and ``uts_err`` (signed %,
    prediction / published − 1) and, where a UTS is published too, ``conv_err`` (signed %, the
    ratio part of the HB error)."""
    d = pred[(pred["kind"] == "typical") & pred["family"].isin(qa.HEADLINE_FAMILIES)].copy()
    for c in ("uts_mpa_pub", "hardness_hb_pub", "uts_mpa_pred", "hardness_hb_pred"):
        d[c] = pd.to_numeric(d[c], errors="coerce")
    d = d[d["hardness_hb_pub"].notna() & d["hardness_hb_pred"].notna()].copy()
    d["hb_err"] = 100.0 * (d["hardness_hb_pred"] / d["hardness_hb_pub"] - 1.0)
    d["uts_err"] = 100.0 * (d["uts_mpa_pred"] / d["uts_mpa_pub"] - 1.0)
    ratio_pub = d["uts_mpa_pub"] / d["hardness_hb_pub"]
    ratio_pred = d["uts_mpa_pred"] / d["hardness_hb_pred"]
    d["conv_err"] = 100.0 * (ratio_pub / ratio_pred - 1.0)
    return d


def _table(d: pd.DataFrame, by) -> pd.DataFrame:
    return d.groupby(by, observed=True).agg(
        n=("hb_err", "size"), hb_bias=("hb_err", "median"),
        hb_abs=("hb_err", lambda x: float(np.median(np.abs(x)))),
        uts_bias=("uts_err", "median"), conv_bias=("conv_err", "median")).round(1)


def main() -> int:
    d = split(qa.predict(qa.independent_rows()))
    both = d[d["conv_err"].notna()]
    print(f"independent headline rows with a published HB: {len(d)}; with UTS as well: {len(both)}")
    print(f"  HB   median |error| {np.median(np.abs(d['hb_err'])):.1f} %, bias {np.median(d['hb_err']):+.1f} %")
    print(f"  rows with both: HB |error| {np.median(np.abs(both['hb_err'])):.1f} %, "
          f"UTS |error| {np.median(np.abs(both['uts_err'])):.1f} %, "
          f"conversion part |error| {np.median(np.abs(both['conv_err'])):.1f} % "
          f"(bias {np.median(both['conv_err']):+.1f} %)")
    d["hb_band"] = pd.cut(d["hardness_hb_pub"], [0, 230, 280, 350, 800])
    d["temp_band"] = pd.cut(d["temp_c"], [0, 300, 450, 560, 640, 800])
    d["section_band"] = pd.cut(d["section_mm"], [0, 16, 30, 60, 200])
    d["src"] = d["source"].str[:32]
    for by in ("family", "carbon", "hb_band", "temp_band", "section_band", "src"):
        print(f"\nby {by} (signed and absolute median %, conv = ratio part of the HB error)")
        print(_table(d, by).to_string())
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
