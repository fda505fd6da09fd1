"""The user's files: price sheets, custom catalogue rows, saved targets and saved
studies.

Every reader here follows the same rules:

* the file is read as bytes, at most :data:`MAX_FILE_BYTES`, and must be UTF-8 text
  (a byte-order mark is allowed); anything else — Latin-1, UTF-16, NUL bytes, a
  binary file — is a :class:`~selector.errors.DataFileError` naming the line and
  column of the first offending byte;
* every value is validated (the catalogue's own schemas for grades and
  compositions, :func:`selector.selection.targets.validate_targets` for targets);
  a problem is a ``DataFileError`` naming the file, the line and the column (CSV) or
  key (TOML, JSON);
* nothing of a bad file is used: :class:`UserFiles` replaces its loaded state only
  after the whole file has validated, and the built-in catalogue is never touched;
* files are only parsed as data (CSV, TOML, JSON).  Nothing is executed or
  unpickled.

Saved studies are JSON in a layout of this project (``"format": "selector study"``):
written atomically (a temporary file in the same folder, flushed to disk, then
``os.replace``), and :func:`load_study` returns exactly what :func:`save_study`
returned.
"""
from __future__ import annotations

import json
import math
import os
import re
import tempfile
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Mapping

from . import inputs
from .catalogue import loader
from .catalogue.grades import (COMPOSITION_SCHEMA, FAMILIES, GRADES_SCHEMA, WINDOW_SCHEMA, Catalogue,
                               build_catalogue, default_catalogue)
from .errors import DataFileError, InputError, UnknownGradeError, safe_repr
from .selection.cost import parse_price_sheet
from .selection.targets import validate_targets

#: largest user file accepted, bytes (selector.inputs.MAX_FILE_BYTES, the catalogue loader's cap)
MAX_FILE_BYTES = inputs.MAX_FILE_BYTES

STUDY_FORMAT = "selector study"
STUDY_VERSION = 1
SECTION_KEYS = {"diameter_mm": (0.5, 500.0), "thickness_mm": (0.5, 500.0),
                "length_mm": (0.5, 100000.0), "width_mm": (0.5, 100000.0)}

def decode_user_bytes(data: bytes, name: str) -> str:
    """Decode a user's file as UTF-8 (optional byte-order mark); see
    :func:`selector.inputs.decode_text`."""
    return inputs.decode_text(data, name)


def _too_large(name: str, head: bytes, size: int) -> DataFileError:
    line, col = inputs.byte_position(head, MAX_FILE_BYTES)
    return DataFileError(name, line, str(col), f"is {size} bytes; the largest file accepted is "
                         f"{MAX_FILE_BYTES} bytes (the limit is reached at line {line}, column {col})")


def _read(src, what: str) -> tuple[str, str]:
    """(text, display name) of a user's file given as a path or as bytes.  At most
    ``MAX_FILE_BYTES + 1`` bytes are read from disk, and only from a regular file
    (:func:`selector.inputs.read_file_bytes`: a named pipe or a device is refused
    without blocking)."""
    if isinstance(src, (bytes, bytearray)):
        name = what
        data = bytes(src)
        if len(data) > MAX_FILE_BYTES:
            raise _too_large(name, data[:MAX_FILE_BYTES + 1], len(data))
    elif isinstance(src, (str, os.PathLike)):
        data, name = inputs.read_file_bytes(src)
    else:
        raise InputError(what, type(src).__name__, "a path or the file's bytes")
    return decode_user_bytes(data, name), name


_FIELDS = re.compile(r"has (\d+) fields, the header has (\d+)")


def _csv_header(text: str) -> list[str]:
    import csv
    import io

    for ln in text.splitlines():
        if ln.strip() and not ln.lstrip().startswith("#"):
            return [h.strip() for h in next(csv.reader(io.StringIO(ln)))]
    return []


def _csv_detail(exc: DataFileError, text: str) -> DataFileError:
    """Add the column to the loader's row-length and empty-file messages."""
    m = _FIELDS.search(exc.problem)
    if m and exc.column is None:
        n, h = int(m.group(1)), int(m.group(2))
        header = _csv_header(text)
        if n < h and n < len(header):
            missing = ", ".join(header[n:])
            return DataFileError(exc.path, exc.line, header[n], f"{exc.problem}: no value for {missing} "
                                 "(a missing comma, or an unclosed quote?)")
        if n > h:
            return DataFileError(exc.path, exc.line, f"field {h + 1}", f"{exc.problem}: unexpected extra "
                                 "field(s) after the last column (a comma inside a value must be quoted)")
    if exc.line is None and exc.problem.startswith("has no header line"):
        return DataFileError(exc.path, 1, None, exc.problem)
    return exc


# ----------------------------------------------------------------------------- price sheet

def _unit_hint(exc: DataFileError, text: str, expected: str, hint: str) -> DataFileError:
    """A missing required column whose header holds it with a unit suffix gets a hint."""
    if exc.column != expected or "required column is missing" not in exc.problem:
        return exc
    header = _csv_header(text)
    near = [h for h in header if h.lower().startswith(expected.lower()) or expected.lower() in h.lower()]
    if not near:
        return exc
    return DataFileError(exc.path, exc.line, near[0],
                         f"column {near[0]!r} is not accepted: the column must be named {expected!r} "
                         f"({hint}); header has: {', '.join(header)}")


def load_price_sheet(src, name: str = "price sheet") -> dict:
    """Validate a user's price sheet (path or bytes) and return ``{grade id: relative price}``.

    Columns ``grade`` and ``relative_price`` (per kg; a ratio, so no currency or
    unit in the column name); see :func:`selector.selection.cost.parse_price_sheet`.
    Raises :class:`DataFileError` naming the line and column.
    """
    text, where = _read(src, name)
    try:
        return parse_price_sheet(text, where)
    except DataFileError as exc:
        raise _unit_hint(_csv_detail(exc, text), text, "relative_price",
                         "price per kg relative to the others, e.g. 1018 bar = 1.0; no currency") from None


# ----------------------------------------------------------------------------- custom grades

def load_custom_grades(grades_src, compositions_src, name: str = "custom grades") -> Catalogue:
    """Custom catalogue rows: a grades CSV and a compositions CSV, in the layout of
    ``data/grades.csv`` and ``data/compositions.csv``, validated with the catalogue's
    own schemas (:data:`selector.catalogue.grades.GRADES_SCHEMA`,
    :data:`~selector.catalogue.grades.COMPOSITION_SCHEMA`).  Process windows come
    from the built-in ``data/route_windows.csv`` (by family).

    Returns a :class:`~selector.catalogue.grades.Catalogue` holding only the custom
    grades (each a :class:`~selector.catalogue.grades.Grade` that ``evaluate``
    accepts); the built-in catalogue is not changed.

    Raises :class:`DataFileError` (file, line, column) for any problem, including an
    id or designation already used by a built-in grade.
    """
    gtext, gname = _read(grades_src, f"{name} (grades)")
    ctext, cname = _read(compositions_src, f"{name} (compositions)")
    # validate first with the catalogue's schemas on the text (errors name the user's file) ...
    try:
        gdf = loader.parse_text(gtext, gname, _grades_schema())
    except DataFileError as exc:
        raise _csv_detail(exc, gtext) from None
    try:
        loader.parse_text(ctext, cname, _comp_schema())
    except DataFileError as exc:
        raise _csv_detail(exc, ctext) from None
    if gdf.empty:
        raise DataFileError(gname, None, None, "has no grade rows")
    builtin = default_catalogue()
    for r in gdf.itertuples(index=False):
        clash = _builtin_clash(builtin, r)
        if clash:
            raise DataFileError(gname, r.line, clash[0], clash[1])
    # ... then join with the catalogue's own builder on private copies of the text; the
    # process windows are the built-in family rows (grade-scoped rows belong to built-in grades)

    windows = loader.read_table("route_windows.csv", WINDOW_SCHEMA)
    windows = windows[windows["scope"].isin(FAMILIES)].drop(columns=["line"])
    with tempfile.TemporaryDirectory(prefix="selector-custom-") as tmp:
        gp, cp, wp = (Path(tmp) / n for n in ("grades.csv", "compositions.csv", "route_windows.csv"))
        gp.write_text(gtext, encoding="utf-8")
        cp.write_text(ctext, encoding="utf-8")
        windows.to_csv(wp, index=False)
        try:
            cat = build_catalogue(gp, cp, wp)
        except DataFileError as exc:
            names = {str(gp): gname, str(cp): cname, str(wp): "data/route_windows.csv"}
            problem = exc.problem
            for tmp_name, shown in names.items():
                problem = problem.replace(tmp_name, shown)
            raise DataFileError(names.get(exc.path, exc.path), exc.line, exc.column, problem) from None
    return cat


def _grades_schema():
    return GRADES_SCHEMA


def _comp_schema():
    return COMPOSITION_SCHEMA


def _builtin_clash(builtin: Catalogue, r) -> tuple[str, str] | None:
    """(column, problem) when the row's id, name, a designation or an alias names a
    built-in grade (by any of its designations or aliases), else None."""
    for col in ("id", "name", "uns", "en_name", "en_number", "jis", "aliases"):
        raw = str(getattr(r, col, "") or "")
        values = raw.split(";") if col == "aliases" else [raw]
        for v in (x.strip() for x in values):
            if not v:
                continue
            try:
                g = builtin.lookup(v)
            except LookupError:      # unknown, or ambiguous between built-in grades
                if col == "aliases" and _names_builtin(builtin, v):
                    return col, (f"alias {v!r} is already a designation of built-in grades; give the "
                                 "custom grade its own aliases")
                continue
            what = "alias " if col == "aliases" else ""
            return col, (f"{what}{v!r} is already the built-in grade {g.id}; give the custom grade its own id, "
                         "designations and aliases")
    return None


def _names_builtin(builtin: Catalogue, v: str) -> bool:
    try:
        builtin.lookup(v)
    except UnknownGradeError as exc:
        return exc.ambiguous
    return True


# ----------------------------------------------------------------------------- targets

def _key_line(text: str, key: str) -> int | None:
    """Line of the first ``key = ...`` (TOML) or ``"key": ...`` (JSON) in ``text``."""
    pat = re.compile(r'^\s*"?' + re.escape(key) + r'"?\s*[=:]|"' + re.escape(key) + r'"\s*:')
    for i, ln in enumerate(text.splitlines(), 1):
        if pat.search(ln):
            return i
    return None


def _as_file_error(exc: InputError, where: str, text: str, prefix: str = "") -> DataFileError:
    key = exc.value if exc.field == "target" and isinstance(exc.value, str) else exc.field
    key = key if len(key) <= 200 else key[:199] + "…"
    line = _key_line(text, key)
    return DataFileError(where, line, prefix + key,
                         f"{exc.field}={safe_repr(exc.value)} is not valid; allowed: {exc.allowed}")


def load_targets(src, name: str = "targets") -> dict:
    """Targets from a TOML file (path or bytes): the ``[targets]`` table if there is
    one, else the top-level keys; validated by
    :func:`selector.selection.targets.validate_targets`.

    Raises :class:`DataFileError` with the line and column of a TOML syntax error, or
    the line and key of a bad value (unknown key, negative or non-numeric limit, a
    minimum above its maximum, an unknown family).
    """
    text, where = _read(src, name)
    doc = inputs.parse_toml(text, where)
    table = doc.get("targets", doc)
    if not isinstance(table, dict):
        raise DataFileError(where, _key_line(text, "targets"), "targets", "must be a [targets] table")
    try:
        return validate_targets(table, FAMILIES)
    except InputError as exc:
        raise _as_file_error(exc, where, text) from None


# ----------------------------------------------------------------------------- studies

@dataclass(frozen=True)
class Study:
    """A saved study: validated targets, the section and free options."""

    targets: dict
    section: dict
    options: dict = field(default_factory=dict)


def _check_section(section) -> dict:
    if not isinstance(section, Mapping):
        raise InputError("section", section, "a mapping such as {'diameter_mm': 25.0}")
    out = {}
    for k, v in section.items():
        if k not in SECTION_KEYS:
            raise InputError("section", k, f"keys out of: {', '.join(SECTION_KEYS)}")
        lo, hi = SECTION_KEYS[k]
        if not inputs.is_number(v) or not lo <= inputs.as_float(v) <= hi:
            raise InputError(k, v, f"a number of mm in [{lo:g}, {hi:g}]")
        out[k] = inputs.as_float(v)
    if ("diameter_mm" in out) == ("thickness_mm" in out):
        raise InputError("section", dict(section), "exactly one of diameter_mm (round) or thickness_mm (plate)")
    return out


def _check_json_value(key: str, v):
    """Options must be JSON values that come back identical: str, bool, int,
    finite float, None, lists and str-keyed dicts of those."""
    if v is None or isinstance(v, (str, bool)):
        return v
    if isinstance(v, int):
        if v.bit_length() > 996:          # about 300 digits; JSON readers refuse far less
            raise InputError(key, v, "an integer of at most 300 digits")
        return v
    if isinstance(v, float):
        if not math.isfinite(v):
            raise InputError(key, v, "a finite number (JSON has no NaN or infinity)")
        return float(v)
    if isinstance(v, list):
        return [_check_json_value(f"{key}[{i}]", x) for i, x in enumerate(v)]
    if isinstance(v, dict):
        out = {}
        for k, x in v.items():
            if not isinstance(k, str):
                raise InputError(f"{key} key", k, "text keys")
            out[k] = _check_json_value(f"{key}.{k}", x)
        return out
    raise InputError(key, v, "a JSON value: text, number, true/false, null, a list or a mapping "
                     "(a tuple or set would not come back identical)")


def _study(targets, section, options) -> Study:
    t = validate_targets(targets, FAMILIES)
    s = _check_section(section)
    if options is None:
        options = {}
    if not isinstance(options, dict):
        raise InputError("options", options, "a mapping of text keys to JSON values")
    inputs.check_nesting("options", options)      # before the recursive check below
    o = _check_json_value("options", options)
    return Study(t, s, o)


def study_path(path, folder=None) -> Path:
    """The file ``path`` confined to ``folder`` (default: the current folder).

    A relative ``path`` is taken inside ``folder``; the resolved file (symbolic
    links followed) must lie inside the resolved ``folder``, so ``../../x.json`` or a
    link out of the folder is refused.  An absolute ``path`` is accepted when no
    ``folder`` is given (the caller chose the place explicitly) and must lie inside
    ``folder`` when one is.  A NUL character, or a path that names a folder, is
    refused.  Errors are :class:`InputError` naming ``path``.
    """
    if isinstance(path, (bytes, bytearray)) or not isinstance(path, (str, os.PathLike)):
        raise InputError("path", path, "a file path (text)")
    text = os.fspath(path)
    if not isinstance(text, str) or not text.strip() or "\x00" in text or len(text) > 4096:
        raise InputError("path", path, "a file name of at most 4096 characters, without NUL characters")
    p = Path(text)
    if folder is None and p.is_absolute():
        base, target = None, p.resolve()
    else:
        if folder is not None and (isinstance(folder, (bytes, bytearray)) or
                                   not isinstance(folder, (str, os.PathLike)) or "\x00" in os.fspath(folder)):
            raise InputError("folder", folder, "a folder path (text) without NUL characters")
        base = Path(folder if folder is not None else os.getcwd()).resolve()
        target = (base / p).resolve()
        if target != base and base not in target.parents:
            raise InputError("path", path, f"a file inside the study folder {str(base)!r} (no '..' or links "
                             "leading out of it)")
    if target.is_dir() or target == base:
        raise InputError("path", path, "a file name (this is a folder)")
    return target


def save_study(path, targets, section, options=None, *, folder=None) -> Study:
    """Validate and save a study as JSON, atomically.

    Parameters
    ----------
    path : str or os.PathLike
        Destination file (its folder must exist).  A relative path must stay inside
        ``folder`` (see :func:`study_path`).
    folder : str or os.PathLike, optional
        The study folder the file must be in (default: the current folder for a
        relative ``path``).
    targets : dict
        Design targets (:func:`selector.selection.targets.validate_targets`).
    section : dict
        ``diameter_mm`` (round) or ``thickness_mm`` (plate), mm, optionally
        ``length_mm`` and ``width_mm``.
    options : dict, optional
        Free settings of the study (text keys; JSON values).

    Returns
    -------
    Study
        The validated study as written; :func:`load_study` returns an equal one.

    Raises
    ------
    InputError
        A bad target, section or option (nothing is written).
    DataFileError
        The file cannot be written (the previous file, if any, is left as it was).
    """
    p = study_path(path, folder)
    study = _study(targets, section, options)
    doc = {"format": STUDY_FORMAT, "version": STUDY_VERSION, "targets": study.targets,
           "section": study.section, "options": study.options}
    text = json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"
    tmp = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{p.name}.", suffix=".tmp", dir=p.parent)
        with os.fdopen(fd, "w", encoding="utf-8", newline="\n") as f:
            f.write(text)
            f.flush()
            os.fsync(f.fileno())
        os.replace(tmp, p)
        tmp = None
    except OSError as exc:
        raise DataFileError(str(p), None, None, f"cannot be written ({exc.strerror or exc})") from None
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except OSError:
                pass
    return study


def _no_constant(name):
    raise ValueError(f"{name} is not allowed (JSON has no NaN or infinity)")


def load_study(path) -> Study:
    """Read a study written by :func:`save_study` (or edited by hand) and validate it.

    Raises :class:`DataFileError` with the line and column of a JSON syntax error,
    and the line and key of a bad value, a duplicated key, a missing part or an
    unknown format/version.
    """
    text, where = _read(path, "study")

    def pairs(items):
        d = {}
        for k, v in items:
            if k in d:
                raise _Dup(k)
            d[k] = v
        return d

    try:
        doc = inputs.parse_json(text, where, object_pairs_hook=pairs, parse_constant=_no_constant)
    except _Dup as exc:
        raise DataFileError(where, _key_line(text, exc.key), exc.key, "key appears twice") from None
    if not isinstance(doc, dict):
        raise DataFileError(where, 1, None, "must hold a JSON object (a study saved by selector)")
    if doc.get("format") != STUDY_FORMAT:
        raise DataFileError(where, _key_line(text, "format"), "format",
                            f"{doc.get('format')!r} is not a study file; expected \"format\": \"{STUDY_FORMAT}\"")
    if doc.get("version") != STUDY_VERSION:
        raise DataFileError(where, _key_line(text, "version"), "version",
                            f"{doc.get('version')!r} is not supported; this selector reads version {STUDY_VERSION}")
    extra = sorted(set(doc) - {"format", "version", "targets", "section", "options"})
    if extra:
        raise DataFileError(where, _key_line(text, extra[0]), extra[0],
                            "is not a part of a study (format, version, targets, section, options)")
    for part in ("targets", "section"):
        if part not in doc:
            raise DataFileError(where, None, part, "is missing")
    try:
        return _study(doc["targets"], doc["section"], doc.get("options", {}))
    except InputError as exc:
        raise _as_file_error(exc, where, text) from None


class _Dup(Exception):
    def __init__(self, key):
        self.key = key


# ----------------------------------------------------------------------------- loaded state

class UserFiles:
    """The user's loaded files (the page's session state).

    Each ``load_*`` validates the whole file first and replaces the corresponding
    state only when it is good; a bad file raises :class:`DataFileError` and leaves
    everything loaded before exactly as it was.
    """

    def __init__(self):
        self._prices: Mapping[str, float] = MappingProxyType({})
        self._custom: Catalogue | None = None
        self._targets: Mapping = MappingProxyType({})

    @property
    def prices(self) -> Mapping[str, float]:
        return self._prices

    @property
    def custom_grades(self) -> Catalogue | None:
        return self._custom

    @property
    def targets(self) -> Mapping:
        return self._targets

    def load_prices(self, src, name: str = "price sheet") -> Mapping[str, float]:
        new = load_price_sheet(src, name)
        self._prices = MappingProxyType(dict(new))
        return self._prices

    def load_custom_grades(self, grades_src, compositions_src, name: str = "custom grades") -> Catalogue:
        cat = load_custom_grades(grades_src, compositions_src, name)
        self._custom = cat
        return cat

    def load_targets(self, src, name: str = "targets") -> Mapping:
        new = load_targets(src, name)
        self._targets = MappingProxyType(dict(new))
        return self._targets

    def snapshot(self) -> tuple:
        """A comparable copy of the whole state (for tests and undo)."""
        cat = None if self._custom is None else tuple(sorted(self._custom.grades))
        return dict(self._prices), cat, dict(self._targets)
