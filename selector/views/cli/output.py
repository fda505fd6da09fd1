"""What the verbs print: a candidates table in readable columns (docs/columns.md) as an
aligned table, CSV or JSON, and the caution lines that end every output."""
from __future__ import annotations

import json
import math
import sys
from typing import Sequence

import pandas as pd

from ... import CAUTION
from ..export import to_csv_text
from ..notice import CAUTION_LINES
from ..units import hardness_scale
from .args import UNIT_CHOICES


def print_caution() -> None:
    """The caution lines, after a blank line."""
    print("\n" + CAUTION_LINES)


def fmt(v, nd=0) -> str:
    """A number with ``nd`` decimals, ``—`` for None or NaN, other values as text."""
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return "—"
    if isinstance(v, float):
        return f"{v:.{nd}f}"
    return str(v)


def _json_ready(df: pd.DataFrame) -> list:
    return json.loads(df.to_json(orient="records", force_ascii=False))


def write_frame(df: pd.DataFrame, fmt_: str, title: str = "", meta: dict | None = None) -> None:
    """Print ``df`` as it is: an aligned table (with ``title`` and the caution lines),
    CSV (text cells neutralised against spreadsheet formulas, lists as JSON) or JSON
    ``{"caution": ..., **meta, "rows": [...]}``."""
    if fmt_ == "json":
        print(json.dumps({"caution": CAUTION, **(meta or {}), "rows": _json_ready(df)}, indent=2,
                         ensure_ascii=False))
        return
    if fmt_ == "csv":
        out = df.copy()
        for col in out.columns:
            if out[col].map(lambda v: isinstance(v, (list, tuple, dict))).any():
                out[col] = out[col].apply(json.dumps)
        sys.stdout.write(to_csv_text(out))
        return
    if title:
        print(title)
    with pd.option_context("display.max_colwidth", None, "display.width", 100_000,
                           "display.max_columns", None):
        print(df.to_string(index=False, na_rep="—", float_format=lambda x: f"{x:g}"))
    print_caution()


def view_of(args) -> tuple[str, str]:
    """(unit system, hardness scale) of the ``--units`` / ``--hardness`` options."""
    system = UNIT_CHOICES[getattr(args, "units", "SI") or "SI"]
    return system, hardness_scale(system, getattr(args, "hardness", None))


def emit(df: pd.DataFrame, args, title: str = "", lead: Sequence[str] = (), extra: Sequence[str] = ()) -> None:
    """Print a candidates table of the library in readable columns
    (:func:`selector.views.columns.default_view`; with ``--all-columns``,
    :func:`~selector.views.columns.all_columns_view`) in ``args.format``.  ``lead`` /
    ``extra``: columns particular to the verb, shown before / after the default ones."""
    # imported here, not at the top: the columns bring the route chain (scipy.stats through the
    # fatigue model, about 1 s of CPU) that --help, grades and validate do not need
    from ..columns import all_columns_view, column_descriptions, default_view

    system, scale = view_of(args)
    view = (all_columns_view if getattr(args, "all_columns", False) else default_view)(
        df, system, scale, lead=lead, extra=extra)
    meta = {"units": system, "hardness": scale,
            "columns": {h: d for h, d in column_descriptions(system, scale).items() if h in view.columns}}
    write_frame(view, args.format, title, meta)
