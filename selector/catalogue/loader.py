"""Loading and validating CSV tables (built-in ``data/`` and the user's files).

Every table is read the same way: leading ``#`` lines are comments; the first
other line is the header; every later line is a row.  A :class:`Schema` says which
columns are required, their types and ranges.  Any problem raises
:class:`~selector.errors.DataFileError` naming the file, the 1-based line number in
the file and the column, and no part of the file is used.
"""
from __future__ import annotations

import csv
import functools
import io
import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Callable, Iterable, Mapping

import pandas as pd

from ..errors import DataFileError
from ..inputs import MAX_FILE_BYTES as _MAX_FILE_BYTES

#: confidence tags accepted on a data row (see DEVELOPERS.md)
CONFIDENCE = ("verified", "partial", "from memory", "common practice", "demo", "fitted")

#: largest user file accepted, bytes (one constant for every reader: selector.inputs.MAX_FILE_BYTES)
MAX_FILE_BYTES = _MAX_FILE_BYTES


def data_dir() -> Path:
    """The folder of the built-in tables (``SELECTOR_DATA`` overrides it)."""
    env = os.environ.get("SELECTOR_DATA")
    return Path(env) if env else Path(__file__).resolve().parents[2] / "data"


@dataclass(frozen=True)
class Column:
    """One column of a schema.

    kind: ``"str"``, ``"float"``, ``"int"``, ``"bool"``, ``"choice"``.
    """

    name: str
    kind: str = "str"
    required: bool = True          # the column must exist
    allow_blank: bool = False      # a cell may be empty (-> NaN / "")
    lo: float | None = None
    hi: float | None = None
    choices: tuple = ()


@dataclass(frozen=True)
class Schema:
    columns: tuple
    row_check: Callable | None = None   # (row dict, line) -> problem str | (column, problem) | None

    def names(self):
        return [c.name for c in self.columns]


_TRUE = {"true", "yes", "1", "y"}
_FALSE = {"false", "no", "0", "n"}


def _parse_cell(col: Column, raw: str, path, line):
    s = (raw or "").strip()
    if s == "":
        if col.allow_blank:
            return float("nan") if col.kind in ("float", "int") else ("" if col.kind != "bool" else False)
        raise DataFileError(path, line, col.name, "is empty; a value is required")
    if col.kind in ("float", "int"):
        try:
            v = float(s)
        except ValueError:
            raise DataFileError(path, line, col.name, f"{s!r} is not a number") from None
        if not math.isfinite(v):
            raise DataFileError(path, line, col.name, f"{s!r} is not a finite number")
        if col.kind == "int" and v != int(v):
            raise DataFileError(path, line, col.name, f"{s!r} is not a whole number")
        if (col.lo is not None and v < col.lo) or (col.hi is not None and v > col.hi):
            raise DataFileError(path, line, col.name, f"{s} is outside the allowed range [{col.lo}, {col.hi}]")
        return int(v) if col.kind == "int" else v
    if col.kind == "bool":
        if s.lower() in _TRUE:
            return True
        if s.lower() in _FALSE:
            return False
        raise DataFileError(path, line, col.name, f"{s!r} is not true/false")
    if col.kind == "choice":
        if s not in col.choices:
            raise DataFileError(path, line, col.name, f"{s!r} is not one of: {', '.join(col.choices)}")
        return s
    return s


def parse_text(text: str, path: str, schema: Schema | None = None,
               numeric: Iterable[str] = ()) -> pd.DataFrame:
    """Parse CSV ``text`` (already decoded) into a DataFrame, validating it against
    ``schema`` (or only the ``source``/``confidence`` rule and ``numeric`` columns).

    The frame carries a ``line`` column: the row's line number in the file.
    """
    lines = text.splitlines()
    first = 0
    while first < len(lines) and (lines[first].lstrip().startswith("#") or not lines[first].strip()):
        first += 1
    if first >= len(lines):
        raise DataFileError(path, None, None, "has no header line (the file is empty or only comments)")
    reader = csv.reader(io.StringIO("\n".join(lines[first:])))
    try:
        rows = list(reader)
    except csv.Error as exc:
        raise DataFileError(path, None, None, f"is not valid CSV ({exc})") from None
    header = [h.strip() for h in rows[0]]
    hline = first + 1
    if len(set(header)) != len(header):
        dup = sorted({h for h in header if header.count(h) > 1})
        raise DataFileError(path, hline, dup[0], "appears twice in the header")
    if schema is None:
        cols = [Column(n, "float") for n in numeric]
        for must in ("source", "confidence"):
            cols.append(Column(must, "choice" if must == "confidence" else "str",
                               choices=CONFIDENCE if must == "confidence" else ()))
        schema = Schema(tuple(cols))
    for c in schema.columns:
        if c.required and c.name not in header:
            raise DataFileError(path, hline, c.name, f"required column is missing (header has: {', '.join(header)})")
    by_name = {c.name: c for c in schema.columns}
    out = []
    # physical line numbers: csv rows may span lines when quoted; track via reader.line_num
    reader = csv.reader(io.StringIO("\n".join(lines[first:])))
    next(reader)
    prev = reader.line_num
    for raw in reader:
        line = first + prev + 1
        prev = reader.line_num
        if not raw or all(not x.strip() for x in raw):
            continue
        if raw[0].lstrip().startswith("#"):
            continue
        if len(raw) != len(header):
            raise DataFileError(path, line, None, f"has {len(raw)} fields, the header has {len(header)}")
        rec = {}
        for h, v in zip(header, raw):
            col = by_name.get(h)
            rec[h] = _parse_cell(col, v, path, line) if col else v.strip()
        if schema.row_check is not None:
            prob = schema.row_check(rec)
            if prob:
                colname, msg = prob if isinstance(prob, tuple) else (None, prob)
                raise DataFileError(path, line, colname, msg)
        rec["line"] = line
        out.append(rec)
    df = pd.DataFrame(out, columns=header + ["line"]) if out else pd.DataFrame(columns=header + ["line"])
    return df


def decode_bytes(data: bytes, path: str) -> str:
    """Decode a user's file: UTF-8 (with or without BOM), else a clear error."""
    if len(data) > MAX_FILE_BYTES:
        raise DataFileError(path, None, None,
                            f"is {len(data)} bytes; the largest file accepted is {MAX_FILE_BYTES} bytes")
    if b"\x00" in data:
        raise DataFileError(path, None, None, "contains NUL bytes; it is not a text CSV file (UTF-8 expected)")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise DataFileError(path, line, None,
                            f"is not UTF-8 text (byte 0x{data[exc.start]:02x}); save it as UTF-8 CSV") from None


def read_file(path, schema: Schema | None = None, numeric: Iterable[str] = ()) -> pd.DataFrame:
    """Read and validate a CSV file from disk (any path)."""
    p = Path(path)
    try:
        data = p.read_bytes()
    except OSError as exc:
        raise DataFileError(str(p), None, None, f"cannot be read ({exc.strerror})") from None
    return parse_text(decode_bytes(data, str(p)), str(p), schema, numeric)


@functools.cache
def _read_builtin(name: str, schema: Schema | None, numeric: tuple) -> pd.DataFrame:
    return read_file(data_dir() / name, schema, numeric)


def read_table(name: str, schema: Schema | None = None, numeric: Iterable[str] = ()) -> pd.DataFrame:
    """Read a built-in table under ``data/`` once (cached); returns a copy."""
    return _read_builtin(name, schema, tuple(numeric)).copy()
