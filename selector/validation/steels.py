"""Compositions of published steels entered under a catalogue grade they do not match.

A reference row of ``data/reference/qt_steels.csv`` whose source prints another
designation than the catalogue grade it is entered under (EN 10083-3 25CrMo4 under
4130, 41Cr4 under 5140) names that steel in its ``steel`` column.  Such a row is
recomputed on the steel's own composition: the mid-range of the limits in
``data/reference/steel_compositions.csv`` (an element with only a maximum: half the
maximum, the catalogue's convention), passed to ``evaluate(..., heat_composition=...)``.
Predicting it on the catalogue grade's composition would score the difference
between two steels as a model error.

Reference: EN 10083-3:2006, chemical composition (cast analysis), as printed by the
Lucefin Group technical cards of each steel (see the file's ``source`` column).
"""
from __future__ import annotations

import functools
from pathlib import Path

from ..catalogue.loader import CONFIDENCE, Column, Schema, data_dir, read_file
from ..errors import InputError

STEELS_FILE = "reference/steel_compositions.csv"

STEELS_SCHEMA = Schema((Column("steel"), Column("element"),
                        Column("min_pct", "float", lo=0.0, hi=100.0),
                        Column("max_pct", "float", lo=0.0, hi=100.0),
                        Column("kind", "choice", choices=("band min/max",)), Column("table"),
                        Column("source"), Column("confidence", "choice", choices=CONFIDENCE)))


@functools.cache
def _table(root: str) -> dict:
    frame = read_file(Path(root) / STEELS_FILE, STEELS_SCHEMA)
    out: dict = {}
    for r in frame.to_dict("records"):
        out.setdefault(str(r["steel"]).strip(), {})[str(r["element"]).strip()] = (
            float(r["min_pct"]), float(r["max_pct"]))
    return out


def steels(root: Path | str | None = None) -> tuple:
    """The designations listed in ``steel_compositions.csv``."""
    return tuple(_table(str(root if root is not None else data_dir())))


def mid_composition(steel: str, root: Path | str | None = None) -> dict:
    """Mid-range composition (element → wt %) of a listed steel.

    Parameters
    ----------
    steel : str
        The designation as written in ``steel_compositions.csv`` (``"25CrMo4 (1.7218)"``).

    Returns
    -------
    dict
        Element symbol → (min + max) / 2, wt %.

    Raises
    ------
    InputError
        The steel is not listed (the message names the listed ones).

    Example
    -------
    EN 10083-3 25CrMo4: C 0.22–0.29 → 0.255; Mo 0.15–0.30 → 0.225.
    """
    table = _table(str(root if root is not None else data_dir()))
    key = str(steel).strip()
    if key not in table:
        raise InputError("steel", steel, f"a steel of {STEELS_FILE}: {', '.join(sorted(table))}")
    return {e: round((lo + hi) / 2.0, 6) for e, (lo, hi) in table[key].items()}
