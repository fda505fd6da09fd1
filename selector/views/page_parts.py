"""Helpers of the page's "Parts list" view: read the upload, run the batch and the
stock rationalisation, and shape their results into tables and a chart.  No
selection logic: every number comes from :func:`selector.batch` and
:func:`selector.rationalise`."""
from __future__ import annotations

from pathlib import Path
from typing import Callable

import altair as alt
import pandas as pd

from ..design.parts_list import PartsListError, format_problem, read_parts

#: the page's example: an invented maker's parts list (docs/demo_parts_list.csv)
DEMO_PARTS_PATH = Path(__file__).resolve().parents[2] / "docs" / "demo_parts_list.csv"
#: the demo's holding cost of one stocked grade a year, relative cost units (invented, demo only)
DEMO_HOLDING_COST = 2000.0

PART_TABLE_COLUMNS = ["part_id", "description", "rank", "status", "grade", "route_text", "window", "robust",
                      "yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc",
                      "part_cost", "quantity_per_year", "annual_cost", "misses", "cautions"]


def demo_bytes() -> bytes:
    return DEMO_PARTS_PATH.read_bytes()


def load_parts(data: bytes, name: str) -> tuple[pd.DataFrame | None, list[str]]:
    """The validated parts list, or ``(None, messages)`` listing every bad cell."""
    try:
        return read_parts(data, name), []
    except PartsListError as exc:
        return None, [f"{exc.path}: " + format_problem(p) for p in exc.problems]


def run(data: bytes, name: str, top: int | None, holding_cost: float, max_grades: int | None,
        progress: Callable[[int, int], None] | None = None, price_sheet: dict | None = None) -> dict:
    """Batch (one row per grade: the cheapest route of each of the part's ``top``
    cheapest grades) and the rationalised stock list."""
    from .. import batch, rationalise  # lazy: the public batch API loads Dask; the page needs it only for a parts list

    parts = read_parts(data, name)
    res = batch(parts, top=top, per_grade=True, progress=progress, price_sheet=price_sheet)
    stock = rationalise(res, parts, holding_cost_per_grade=float(holding_cost), max_grades=max_grades)
    return {"batch": res, "stock": stock, "parts": parts}


def part_table(res: pd.DataFrame) -> pd.DataFrame:
    return res[[c for c in PART_TABLE_COLUMNS if c in res.columns]]


def stock_table(stock: dict) -> pd.DataFrame:
    """One row per stocked grade: parts made from it, parts a year, annual part cost."""
    a = stock["assignment"]
    a = a[a["status"] == "assigned"]
    out = a.groupby("grade", sort=True).agg(parts=("part_id", "count"), parts_per_year=("quantity_per_year", "sum"),
                                            annual_part_cost=("annual_cost", "sum")).reset_index()
    return out.sort_values("annual_part_cost", ascending=False, kind="stable").reset_index(drop=True)


def cost_by_count_chart(cbc: pd.DataFrame, chosen: int | None = None) -> alt.Chart:
    """Least total annual cost against the number of grades allowed (feasible
    counts only; the count chosen is drawn larger)."""
    df = cbc[cbc["feasible"]].copy()
    df["chosen"] = df["n_grades"] == (chosen if chosen is not None else -1)
    base = alt.Chart(df).encode(
        x=alt.X("max_grades:Q", title="grades allowed", axis=alt.Axis(tickMinStep=1, format="d")),
        y=alt.Y("total_cost:Q", title="least total annual cost (relative units)", scale=alt.Scale(zero=False)))
    line = base.mark_line(color="#1b6f8a")
    pts = base.mark_point(filled=True, color="#1b6f8a").encode(
        size=alt.condition("datum.chosen", alt.value(160), alt.value(50)),
        tooltip=["max_grades", "n_grades", alt.Tooltip("total_cost:Q", format=",.0f"), "grades"])
    return (line + pts).properties(height=280)
