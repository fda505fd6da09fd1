"""CSV export shared by the command line and the page.

A spreadsheet opening a CSV file treats a cell that begins with ``=``, ``+``,
``-`` or ``@`` (or a tab or carriage return) as a formula ("CSV injection", OWASP
*CSV Injection* page, common practice).  No user text reaches the exported tables
today (grade ids, route texts and notes come from the catalogue), but a custom
grade's name or a price sheet's source would: :func:`neutralise` prefixes every
such *text* cell, and header, with a single quote so that it is shown as text.
Numbers, including negative ones, are left as numbers.
"""
from __future__ import annotations

import pandas as pd

#: first characters a spreadsheet reads as the start of a formula
FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def _cell(v):
    if isinstance(v, str) and v.startswith(FORMULA_START):
        return "'" + v
    return v


def neutralise(df: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``df`` whose text cells and column names cannot start a formula."""
    out = df.copy()
    for col in out.columns:
        if out[col].dtype == object or pd.api.types.is_string_dtype(out[col].dtype):
            out[col] = out[col].map(_cell)
    out.columns = [_cell(c) if isinstance(c, str) else c for c in out.columns]
    return out


def to_csv_text(df: pd.DataFrame) -> str:
    """``df`` as CSV text (no index), neutralised."""
    return neutralise(df).to_csv(index=False)
