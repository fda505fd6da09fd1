"""A parts list: one row per part, read from CSV or Parquet and validated whole.

Columns (a blank cell means "not given"):

=========================  ==========================================================
``part_id``                required, unique, non-empty text
``diameter_mm``            round section diameter, mm, 0.5 to 500 (or ``thickness_mm``)
``thickness_mm``           plate thickness, mm, 0.5 to 500 (exactly one of the two)
``length_mm``              part length, mm, 1 to 20 000 (its mass and cost)
``quantity_per_year``      parts made a year, a whole number >= 0
target keys of ``select``  ``min_yield_mpa`` ... ``max_relative_cost`` (numbers >= 0),
                           ``families`` / ``exclude_families`` (``;``-separated family
                           names), ``corrosion_resistant`` (true/false)
pin load case              the arguments of :func:`selector.pin_targets`: ``load_kn`` or
                           ``load_lbf``, ``shear_planes``, ``safety_factor``, ``gap_mm``,
                           ``lug_thickness_mm``, ``clevis_thickness_mm``,
                           ``wear_surface_hardness_hrc``, ``material_class``,
                           ``load_model``, ``bearing_factor``; the pin's diameter is
                           the row's ``diameter_mm``
service conditions         ``plated`` (true/false), ``plating``, ``mating_material``,
                           ``service_temp_c``, ``environment`` (the context of the
                           cautions, :mod:`selector.rules.cautions`)
``description``            free text, carried to the result
=========================  ==========================================================

Where a row gives both a load case and a target of the same key, the stricter of
the two holds (the larger minimum): the part must satisfy both.

The whole file is checked before anything is computed.  Every bad cell is
collected and one :class:`PartsListError` lists them all (line, column, value and
what is allowed); nothing of a bad file is used.  A file over
:data:`MAX_PARTS_FILE_BYTES` (50 MB) is refused before it is read.

Line numbers are those of the CSV file (1-based, comment and header lines
counted); for a Parquet file or a DataFrame they are row numbers (1 = first row).
"""
from __future__ import annotations

import csv
import io
import math
import os
from pathlib import Path

import numpy as np
import pandas as pd

from ..catalogue.grades import FAMILIES
from ..errors import DataFileError, InputError, nearest
from ..rules.cautions import GALVANIC_LIMITS_V, anodic_index
from ..selection.targets import HARD_FILTERS, NUMERIC_TARGETS, validate_targets
from . import pins

#: largest parts file accepted, bytes (50 MB)
MAX_PARTS_FILE_BYTES = 50 * 1024 * 1024

REQUIRED = ("part_id", "length_mm", "quantity_per_year")
SECTION = ("diameter_mm", "thickness_mm")
TARGET_COLUMNS = tuple(NUMERIC_TARGETS) + tuple(HARD_FILTERS)
PIN_COLUMNS = ("load_kn", "load_lbf", "shear_planes", "safety_factor", "gap_mm", "lug_thickness_mm",
               "clevis_thickness_mm", "wear_surface_hardness_hrc", "material_class", "load_model",
               "bearing_factor")
SERVICE_COLUMNS = ("plated", "plating", "mating_material", "service_temp_c", "environment")
FREE_COLUMNS = ("description",)
ALLOWED_COLUMNS = REQUIRED + SECTION + TARGET_COLUMNS + PIN_COLUMNS + SERVICE_COLUMNS + FREE_COLUMNS

#: columns of the validated parts frame
PARTS_COLUMNS = ["part_id", "line", "diameter_mm", "thickness_mm", "length_mm", "quantity_per_year",
                 "targets", "service", "load_case", "description"]

_TEXT_PIN = ("material_class", "load_model")
_TRUE, _FALSE = {"true", "yes", "1", "y"}, {"false", "no", "0", "n"}
_MAX_LISTED = 200


class PartsListError(DataFileError):
    """A parts list failed validation.

    Attributes
    ----------
    problems : list of dict
        Every bad cell: ``line`` (int or None), ``column`` (str or None), ``value``
        and ``allowed``.
    """

    def __init__(self, path: str, problems: list[dict]):
        self.problems = list(problems)
        first = self.problems[0]
        n = len(self.problems)
        lines = [f"{n} problem{'s' if n > 1 else ''}; nothing was computed:"]
        for p in self.problems[:_MAX_LISTED]:
            lines.append("  " + format_problem(p))
        if n > _MAX_LISTED:
            lines.append(f"  ... and {n - _MAX_LISTED} more")
        super().__init__(path, first["line"], first["column"], "\n".join(lines))


def format_problem(p: dict) -> str:
    """``line 4, column 'quantity_per_year': -5 is not valid; allowed: ...``."""
    loc = []
    if p.get("line") is not None:
        loc.append(f"{p.get('unit', 'line')} {p['line']}")
    if p.get("column") is not None:
        loc.append(f"column {p['column']!r}")
    where = ", ".join(loc) or "file"
    return f"{where}: {p['value']!r} is not valid; allowed: {p['allowed']}"


class _Collector:
    def __init__(self, unit: str):
        self.unit, self.items = unit, []

    def add(self, line, column, value, allowed):
        self.items.append({"line": line, "column": column, "value": value, "allowed": allowed,
                           "unit": self.unit})


def _blank(v) -> bool:
    if v is None or v is pd.NA or v is pd.NaT:
        return True
    if isinstance(v, float) and math.isnan(v):
        return True
    return isinstance(v, str) and v.strip() == ""


def _number(v):
    """A float from a cell, or None when it is not a finite number."""
    if isinstance(v, (bool, np.bool_)):
        return None
    if isinstance(v, (int, float, np.integer, np.floating)):
        f = float(v)
    else:
        try:
            f = float(str(v).strip())
        except ValueError:
            return None
    return f if math.isfinite(f) else None


def _bool(v):
    if isinstance(v, (bool, np.bool_)):
        return bool(v)
    s = str(v).strip().lower()
    return True if s in _TRUE else False if s in _FALSE else None


def _text(v) -> str:
    return v.strip() if isinstance(v, str) else str(v)


# ------------------------------------------------------------------------------ reading

def _read_csv_text(text: str, path: str, bad: _Collector):
    lines = text.splitlines()
    first = 0
    while first < len(lines) and (lines[first].lstrip().startswith("#") or not lines[first].strip()):
        first += 1
    if first >= len(lines):
        raise PartsListError(path, [{"line": None, "column": None, "value": "(empty)",
                                     "allowed": "a header line naming the columns, then one row per part"}])
    reader = csv.reader(io.StringIO("\n".join(lines[first:])))
    try:
        header = [h.strip() for h in next(reader)]
        rows, nums = [], []
        prev = reader.line_num
        for raw in reader:
            line = first + prev + 1
            prev = reader.line_num
            if not raw or all(not x.strip() for x in raw) or raw[0].lstrip().startswith("#"):
                continue
            if len(raw) != len(header):
                bad.add(line, None, f"{len(raw)} fields", f"{len(header)} fields, as in the header")
                continue
            rows.append(raw)
            nums.append(line)
    except csv.Error as exc:
        raise PartsListError(path, [{"line": None, "column": None, "value": str(exc),
                                     "allowed": "valid CSV"}]) from None
    return header, first + 1, rows, nums


def _check_size(n_bytes: int, path: str):
    if n_bytes > MAX_PARTS_FILE_BYTES:
        raise PartsListError(path, [{"line": None, "column": None, "value": f"{n_bytes} bytes",
                                     "allowed": f"a parts file of at most {MAX_PARTS_FILE_BYTES} bytes "
                                                "(50 MB)"}])


def _raw_table(source, name: str | None, bad_factory):
    """(header, header line, rows as lists, line numbers, collector, path label)."""
    if isinstance(source, pd.DataFrame):
        bad = bad_factory("row")
        df = source.reset_index(drop=True)
        header = [str(c).strip() for c in df.columns]
        rows = df.astype(object).to_numpy().tolist()
        return header, None, rows, list(range(1, len(rows) + 1)), bad, name or "parts list"
    data, path, is_parquet = None, name, False
    if isinstance(source, (bytes, bytearray)):
        data = bytes(source)
        path = name or "parts list"
        is_parquet = data[:4] == b"PAR1" or path.lower().endswith(".parquet")
    elif isinstance(source, (str, os.PathLike)):
        p = Path(source)
        path = name or str(p)
        try:
            size = p.stat().st_size
        except OSError as exc:
            raise InputError("parts file", str(p), f"a readable CSV or Parquet file ({exc.strerror})") from None
        _check_size(size, path)
        try:
            data = p.read_bytes()
        except OSError as exc:
            raise InputError("parts file", str(p), f"a readable CSV or Parquet file ({exc.strerror})") from None
        is_parquet = data[:4] == b"PAR1" or p.suffix.lower() == ".parquet"
    else:
        raise InputError("parts", type(source).__name__, "a path, the file's bytes or a pandas DataFrame")
    _check_size(len(data), path)
    if is_parquet:
        bad = bad_factory("row")
        try:
            df = pd.read_parquet(io.BytesIO(data))
        except Exception as exc:  # pyarrow raises several types for a damaged file
            raise PartsListError(path, [{"line": None, "column": None, "value": type(exc).__name__,
                                         "allowed": f"a readable Parquet file ({exc})"}]) from None
        header = [str(c).strip() for c in df.columns]
        rows = df.astype(object).to_numpy().tolist()
        return header, None, rows, list(range(1, len(rows) + 1)), bad, path
    bad = bad_factory("line")
    if b"\x00" in data:
        raise PartsListError(path, [{"line": None, "column": None, "value": "NUL bytes",
                                     "allowed": "a UTF-8 CSV text file or a Parquet file"}])
    try:
        text = data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        raise PartsListError(path, [{"line": line, "column": None, "value": f"byte 0x{data[exc.start]:02x}",
                                     "allowed": "UTF-8 text (save the file as UTF-8 CSV)"}]) from None
    header, hline, rows, nums = _read_csv_text(text, path, bad)
    return header, hline, rows, nums, bad, path


# ---------------------------------------------------------------------------- validation

def _check_header(header, hline, bad: _Collector):
    seen = set()
    for h in header:
        if h in seen:
            bad.add(hline, h, h, "each column once")
        seen.add(h)
        if h not in ALLOWED_COLUMNS:
            near = nearest(h, ALLOWED_COLUMNS, n=3)
            hint = f" (did you mean {', '.join(near)}?)" if near else ""
            bad.add(hline, h, h, "the columns " + ", ".join(ALLOWED_COLUMNS) + hint)
    for r in REQUIRED:
        if r not in header:
            bad.add(hline, r, "(missing)", f"a {r} column")
    if not any(s in header for s in SECTION):
        bad.add(hline, "diameter_mm", "(missing)", "a diameter_mm or a thickness_mm column")


def _num_cell(rec, col, line, bad, lo, hi, allowed, whole=False):
    v = rec.get(col)
    if _blank(v):
        return None
    f = _number(v)
    if f is None or f < lo or f > hi or (whole and f != int(f)):
        bad.add(line, col, v, allowed)
        return None
    return f


def _memo(memo: dict | None, key, fn):
    """``fn()`` once per key within one file (many rows share a load case or targets)."""
    if memo is None:
        return fn()
    if key not in memo:
        memo[key] = fn()
    return memo[key]


def _row(rec: dict, line: int, bad: _Collector, memo: dict | None = None) -> dict | None:
    n0 = len(bad.items)
    pid = rec.get("part_id")
    pid = "" if _blank(pid) else _text(pid)
    if not pid:
        bad.add(line, "part_id", rec.get("part_id"), "a non-empty part id")
    d = _num_cell(rec, "diameter_mm", line, bad, 0.5, 500.0, "a section in [0.5, 500] mm")
    t = _num_cell(rec, "thickness_mm", line, bad, 0.5, 500.0, "a section in [0.5, 500] mm")
    given = [c for c in SECTION if not _blank(rec.get(c))]
    if len(given) != 1:
        bad.add(line, "diameter_mm" if not given else "thickness_mm",
                "(blank)" if not given else f"{rec.get('diameter_mm')} and {rec.get('thickness_mm')}",
                "exactly one of diameter_mm or thickness_mm")
    length = _num_cell(rec, "length_mm", line, bad, 1.0, 20000.0, "a part length in [1, 20000] mm")
    if _blank(rec.get("length_mm")):
        bad.add(line, "length_mm", "(blank)", "a part length in [1, 20000] mm")
    qty = _num_cell(rec, "quantity_per_year", line, bad, 0.0, 1e9,
                    "a whole number of parts a year, 0 to 1e9", whole=True)
    if _blank(rec.get("quantity_per_year")):
        bad.add(line, "quantity_per_year", "(blank)", "a whole number of parts a year, 0 to 1e9")

    # targets
    targets: dict = {}
    for key in NUMERIC_TARGETS:
        if not _blank(rec.get(key)):
            f = _number(rec[key])
            if f is None or f < 0:
                bad.add(line, key, rec[key], "a finite number >= 0")
            else:
                targets[key] = f
    for key in ("families", "exclude_families"):
        if not _blank(rec.get(key)):
            names = [x.strip() for x in _text(rec[key]).split(";") if x.strip()]
            unknown = [x for x in names if x not in FAMILIES]
            if unknown or not names:
                near = nearest(unknown[0], FAMILIES, n=3) if unknown else []
                bad.add(line, key, rec[key], "family names separated by ';' out of " + ", ".join(FAMILIES)
                        + (f" (did you mean {', '.join(near)}?)" if near else ""))
            else:
                targets[key] = names
    if not _blank(rec.get("corrosion_resistant")):
        b = _bool(rec["corrosion_resistant"])
        if b is None:
            bad.add(line, "corrosion_resistant", rec["corrosion_resistant"], "true or false")
        else:
            targets["corrosion_resistant"] = b

    # pin load case
    case = {}
    for col in PIN_COLUMNS:
        if not _blank(rec.get(col)):
            if col in _TEXT_PIN:
                case[col] = _text(rec[col])
            else:
                f = _number(rec[col])
                if f is None:
                    bad.add(line, col, rec[col], "a finite number")
                    continue
                case[col] = int(f) if col == "shear_planes" and f == int(f) else f
    if case:
        if t is not None:
            bad.add(line, "thickness_mm", rec.get("thickness_mm"), "a diameter_mm for a row with a pin load case")
        elif d is not None and len(bad.items) == n0:
            try:
                pt = dict(_memo(memo, ("pin", d, tuple(sorted(case.items()))),
                                lambda: pins.pin_targets(diameter_mm=d, **case)))
            except InputError as exc:
                col = exc.field if exc.field in PIN_COLUMNS else ("load_kn" if "load" in exc.field else exc.field)
                bad.add(line, col, exc.value, exc.allowed)
                pt = {}
            for k, v in pt.items():   # the stricter of the two minima holds
                targets[k] = max(v, targets.get(k, v))

    # service conditions
    service: dict = {}
    if not _blank(rec.get("plated")):
        b = _bool(rec["plated"])
        if b is None:
            bad.add(line, "plated", rec["plated"], "true or false")
        else:
            service["plated"] = b
    if not _blank(rec.get("plating")):
        if not service.get("plated"):
            bad.add(line, "plating", rec["plating"], "a plating name only on a row with plated = true")
        service["plating"] = _text(rec["plating"])
    for col in ("plating", "mating_material"):
        if col in service or not _blank(rec.get(col)):
            name = service.get(col) or _text(rec[col])
            try:
                anodic_index(name)
                service[col] = name
            except InputError as exc:
                bad.add(line, col, name, exc.allowed)
    st = _num_cell(rec, "service_temp_c", line, bad, -273.15, 1500.0, "a temperature in [-273.15, 1500] °C")
    if st is not None:
        service["service_temp_c"] = st
    if not _blank(rec.get("environment")):
        env = _text(rec["environment"])
        if env not in GALVANIC_LIMITS_V:
            bad.add(line, "environment", env, ", ".join(GALVANIC_LIMITS_V))
        else:
            service["environment"] = env

    if len(bad.items) == n0:
        try:
            tk = ("targets", repr(sorted((k, tuple(v) if isinstance(v, list) else v) for k, v in targets.items())))
            targets = dict(_memo(memo, tk, lambda: validate_targets(targets, FAMILIES)))
        except InputError as exc:
            bad.add(line, exc.field, exc.value, exc.allowed)
    if len(bad.items) != n0:
        return None
    desc = rec.get("description")
    return {"part_id": pid, "line": line, "diameter_mm": d if d is not None else np.nan,
            "thickness_mm": t if t is not None else np.nan, "length_mm": length,
            "quantity_per_year": int(qty), "targets": targets, "service": service,
            "load_case": case, "description": "" if _blank(desc) else _text(desc)}


def read_parts(source, name: str | None = None) -> pd.DataFrame:
    """Read and validate a parts list.

    Parameters
    ----------
    source : str, os.PathLike, bytes or pandas.DataFrame
        A CSV or Parquet file (path or its bytes; Parquet is recognised by its
        magic bytes or the ``.parquet`` suffix) or a frame with the same columns.
        An already validated frame (from this function) is returned as is.
    name : str, optional
        The file name used in messages (default the path).

    Returns
    -------
    pandas.DataFrame
        One row per part, columns :data:`PARTS_COLUMNS`: ``targets`` (the clean
        target dict for ``select``, the pin's targets merged in), ``service`` (the
        caution context), ``load_case`` (the pin arguments given, or ``{}``).

    Raises
    ------
    PartsListError
        Listing every bad cell (line or row, column, value, what is allowed).
        Among them: an unknown column (a misspelt target key), a negative
        quantity, a section out of range, a duplicated part id, a file over 50 MB.
    InputError
        The path cannot be read or ``source`` is not a path, bytes or frame.
    """
    if isinstance(source, pd.DataFrame) and list(source.columns) == PARTS_COLUMNS:
        return source
    header, hline, rows, nums, bad, path = _raw_table(source, name, _Collector)
    _check_header(header, hline, bad)
    if any(p["value"] == "(missing)" for p in bad.items):
        raise PartsListError(path, bad.items)     # rows cannot be read without these columns
    out = []
    seen: dict[str, int] = {}
    memo: dict = {}
    for raw, line in zip(rows, nums):
        rec = {h: v for h, v in zip(header, raw) if h in ALLOWED_COLUMNS}
        r = _row(rec, line, bad, memo)
        pid = rec.get("part_id")
        pid = None if _blank(pid) else _text(pid)
        if pid:
            if pid in seen:
                bad.add(line, "part_id", pid, f"a part id not already used ({bad.unit} {seen[pid]})")
            else:
                seen[pid] = line
        if r is not None:
            out.append(r)
    if not rows and not bad.items:
        bad.add(None, None, "(no rows)", "at least one part")
    if bad.items:
        bad.items.sort(key=lambda p: (p["line"] is None, p["line"] or 0))
        raise PartsListError(path, bad.items)
    return pd.DataFrame(out, columns=PARTS_COLUMNS)
