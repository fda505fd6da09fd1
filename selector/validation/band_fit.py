"""Offline fit of the prediction bands (:mod:`selector.routes.bands`) from the
independent residuals of the validation report.  Run by ``scripts/fit_bands.py``;
the package only reads the table it writes (``data/fits/bands.csv``).

Which residuals: comparisons with status ``compared``, not calibration (key join,
:mod:`selector.validation.calibration`), of kind ``typical`` (typical values of
tested material; specification minimums say nothing of scatter around a typical
estimate), for tensile and yield strength, elongation and hardness (HB and HRC
converted to HV on ASTM E140 so every scale pools into one relative residual).
"""
from __future__ import annotations

import numpy as np
import pandas as pd

from ..models import conversions
from ..routes import bands
from . import report

SOURCE = ("independent typical rows of data/reference/ (validation report residuals), "
          "5th/95th percentiles; scripts/fit_bands.py")
KINDS = ("typical",)
#: compared property -> banded property
TO_BAND = {"uts_mpa": "uts_mpa", "yield_mpa": "yield_mpa", "elongation_pct": "elongation_pct",
           "hardness_hb": "hardness_hv", "hardness_hrc": "hardness_hv", "hardness_hv": "hardness_hv"}


def _to_hv(prop: str, x: np.ndarray) -> np.ndarray:
    if prop == "hardness_hb":
        return conversions.hb_to_hv(x)
    if prop == "hardness_hrc":
        return conversions.hrc_to_hv(x)
    return x


def residuals(comparisons: pd.DataFrame) -> pd.DataFrame:
    """One residual per independent typical comparison: ``case, grade, family, route,
    section_band, property`` (the banded key), ``r`` (log ratio or difference)."""
    c = comparisons[(comparisons["status"] == "compared") & (comparisons["calibration"] == "")
                    & comparisons["kind"].isin(KINDS) & comparisons["property"].isin(list(TO_BAND))]
    rows = []
    for prop, g in c.groupby("property"):
        band_prop = TO_BAND[prop]
        pub = _to_hv(prop, g["published"].to_numpy(float))
        pred = _to_hv(prop, g["predicted"].to_numpy(float))
        ok = np.isfinite(pub) & np.isfinite(pred) & (pred > 0) & (pub > 0)
        if bands.PROPERTIES[band_prop] == "relative":
            r = np.log(pub / np.where(pred > 0, pred, np.nan))
        else:
            r = pub - pred
        rows.append(pd.DataFrame({"case": g["case"].to_numpy()[ok], "grade": g["grade"].to_numpy()[ok],
                                  "family": g["family"].to_numpy()[ok], "route": g["route"].to_numpy()[ok],
                                  "section_band": bands.section_band(g["section_mm"].to_numpy(float))[ok],
                                  "property": band_prop, "published": g["published"].to_numpy(float)[ok],
                                  "predicted": g["predicted"].to_numpy(float)[ok], "compared": prop,
                                  "r": r[ok]}))
    if not rows:
        return pd.DataFrame(columns=["case", "grade", "family", "route", "section_band", "property", "r"])
    return pd.concat(rows, ignore_index=True)


def _q(r: np.ndarray) -> tuple[float, float]:
    """5th and 95th percentiles at the plotting position p·(n+1) (``method="weibull"``):
    the interpolated form of the distribution-free prediction interval between order
    statistics (Hahn & Meeker 1991, ch. 5), which holds a new value with probability
    0.90 without assuming a distribution."""
    a = (1.0 - bands.LEVEL) / 2.0
    return (float(np.quantile(r, a, method="weibull")), float(np.quantile(r, 1.0 - a, method="weibull")))


#: the widest group (every family and route) is fitted from this many residuals, so that every
#: property has a band; its ``n`` column says how thin it is
MIN_ROWS_POOLED = 5


def fit(res: pd.DataFrame, min_rows: int = bands.MIN_ROWS) -> pd.DataFrame:
    """The band table, from the most specific group to the widest.

    Levels: (family, route, section band), (family, route, *), (*, route, *),
    (*, *, *).  At each level the residuals not yet described by a more specific
    group are grouped, and every group with at least ``min_rows`` of them gets its
    5th/95th percentile; its rows are then described.  So a wider group is fitted on
    the rows its narrower groups leave (the states that will fall back to it), and
    each row is described by exactly one group — the one :mod:`selector.routes.bands`
    looks up for it.  The widest group pools every residual of the property
    (it serves routes and families with no group of their own), so every property
    has a band; its ``n`` column says how thin it is."""
    A = bands.ANY
    out = []
    levels = (("family", "route", "section_band"), ("family", "route"), ("route",), ())
    names = {3: "family, route, section band", 2: "family, route", 1: "route", 0: "every route"}
    for prop, gp in res.groupby("property"):
        left = np.ones(len(gp), bool)
        for cols in levels:
            sub = gp[left]
            if not cols:
                # the widest group serves the routes and families that have no group of their own:
                # it pools every residual of the property, not only the rows the others left
                groups = [((), gp)] if len(gp) >= 1 else []
            else:
                groups = list(sub.groupby(list(cols)))
            for key, g in groups:
                key = key if isinstance(key, tuple) else (key,)
                if cols and len(g) < min_rows:
                    continue
                d = dict(zip(cols, key))
                lo, hi = _q(g["r"].to_numpy(float))
                out.append({"family": d.get("family", A), "route": d.get("route", A),
                            "section_band": d.get("section_band", A), "property": prop,
                            "mode": bands.PROPERTIES[prop], "q_lo": round(lo, 6), "q_hi": round(hi, 6),
                            "n": len(g), "level": names[len(cols)], "source": SOURCE,
                            "confidence": "fitted"})
                left &= ~gp.index.isin(g.index)
    return pd.DataFrame(out, columns=["family", "route", "section_band", "property", "mode", "q_lo", "q_hi",
                                      "n", "level", "source", "confidence"])


def coverage(res: pd.DataFrame, table: pd.DataFrame) -> pd.DataFrame:
    """Share of residuals inside the band of the most specific group in ``table``,
    per family and property."""
    lookup = {(r.family, r.route, r.section_band, r.property): (r.q_lo, r.q_hi) for r in table.itertuples()}
    A = bands.ANY
    inside = []
    for r in res.itertuples():
        for key in ((r.family, r.route, r.section_band, r.property), (r.family, r.route, A, r.property),
                    (A, r.route, A, r.property), (A, A, A, r.property)):
            if key in lookup:
                lo, hi = lookup[key]
                inside.append(lo <= r.r <= hi)
                break
        else:
            inside.append(np.nan)
    d = res.assign(inside=inside)
    return d.groupby(["family", "property"]).agg(n=("r", "size"), coverage=("inside", "mean")).reset_index()


def held_out_coverage(res: pd.DataFrame, min_rows: int = bands.MIN_ROWS) -> pd.DataFrame:
    """Coverage when each grade's band is fitted without that grade's rows
    (leave-one-grade-out): the honest estimate of how often a new grade's published
    value falls inside its band."""
    parts = []
    for grade in res["grade"].unique():
        table = fit(res[res["grade"] != grade], min_rows)
        parts.append(coverage(res[res["grade"] == grade], table).assign(grade=grade))
    if not parts:
        return pd.DataFrame(columns=["family", "property", "n", "coverage"])
    d = pd.concat(parts, ignore_index=True)
    d["hits"] = d["coverage"] * d["n"]
    g = d.groupby(["family", "property"]).agg(n=("n", "sum"), hits=("hits", "sum")).reset_index()
    g["coverage"] = g["hits"] / g["n"]
    return g.drop(columns=["hits"])


def run() -> tuple[pd.DataFrame, pd.DataFrame]:
    """Recompute the reference rows and fit the band table; returns (table, residuals)."""
    comp = report.recompute(report.load_cases())
    res = residuals(comp)
    return fit(res), res
