"""Validation at the public boundary: the checks that the API functions, the command
line, the page and the readers of the user's files share.

Every check here turns a bad value into a :class:`~selector.errors.InputError` (or,
for a file, a :class:`~selector.errors.DataFileError`) that names the field, the
value (shown by :func:`selector.errors.safe_repr`, truncated and never recursive) and
what is allowed.  The caps are checked *before* any work is done:

=========================  ======================================================
:data:`MAX_FILE_BYTES`     largest user file (price sheet, custom grades, targets,
                           study): 5 000 000 bytes (the page's upload cap is 5 MB too)
:data:`MAX_TEXT_CHARS`     largest inline JSON/TOML text (``--route-json``, page
                           fields): 100 000 characters
:data:`MAX_NESTING`        deepest nesting of lists/tables in a user's TOML or JSON:
                           32 levels (a study or a route needs 4)
:data:`MAX_RANGE_VALUES`   most values a ``from:to:step`` range may hold: 200
:data:`MAX_NAME_CHARS`     longest grade name or option text: 200 characters
=========================  ======================================================

Readers refuse anything that is not a regular file (a named pipe, a device such as
``/dev/zero``, a folder) after an ``os.stat`` and without blocking, and accept UTF-8
with or without a byte-order mark, the same way for CSV, TOML and JSON.
"""
from __future__ import annotations

import math
import os
import stat
from numbers import Integral, Real
from pathlib import Path
from typing import Mapping

from .errors import DataFileError, InputError, safe_repr

MAX_FILE_BYTES = 5_000_000
MAX_TEXT_CHARS = 100_000
MAX_NESTING = 32
MAX_RANGE_VALUES = 200
MAX_NAME_CHARS = 200

__all__ = ["MAX_FILE_BYTES", "MAX_TEXT_CHARS", "MAX_NESTING", "MAX_RANGE_VALUES", "MAX_NAME_CHARS",
           "is_number", "as_float", "number", "integer", "flag", "name", "mapping", "nesting_depth",
           "text_nesting", "check_text", "read_file_bytes", "strip_bom", "decode_text", "byte_position",
           "parse_json", "parse_toml",
           "range_count", "range_values", "diameter_list", "safe_repr"]


# ----------------------------------------------------------------------------- scalars

def is_number(v) -> bool:
    """True for a real number (Python or numpy int/float), False for bool and the rest."""
    if isinstance(v, bool) or type(v).__name__ == "bool_":
        return False
    return isinstance(v, (Real, Integral)) and not isinstance(v, complex)


def as_float(v) -> float:
    """``float(v)`` for a number; ``inf`` for an integer too large for a float, NaN
    when it cannot be converted at all (the callers then refuse it as not finite)."""
    try:
        return float(v)
    except OverflowError:
        return math.inf
    except (TypeError, ValueError):
        return math.nan


def number(field: str, value, lo: float | None = None, hi: float | None = None, context: str = "",
           unit: str = "", lo_open: bool = False, error: type = InputError) -> float:
    """``value`` as a finite float in [lo, hi] (or (lo, hi] with ``lo_open``); a
    Python or numpy int or float is accepted, bool and text are not."""
    parts = []
    if lo is not None:
        parts.append(f"> {lo:g}" if lo_open else f">= {lo:g}")
    if hi is not None:
        parts.append(f"<= {hi:g}")
    allowed = "a finite number" + (" " + " and ".join(parts) if parts else "") + (f" ({unit})" if unit else "")
    if not is_number(value):
        raise error(field, value, allowed, context)
    v = as_float(value)
    if not math.isfinite(v) or (lo is not None and (v <= lo if lo_open else v < lo)) or \
            (hi is not None and v > hi):
        raise error(field, value, allowed, context)
    return v


def integer(field: str, value, lo: int | None = None, hi: int | None = None, context: str = "") -> int:
    """``value`` as an int in [lo, hi]: a Python or numpy integer, or a float with no
    fractional part; bool is refused."""
    rng = f"a whole number in [{lo}, {hi}]" if lo is not None and hi is not None else "a whole number"
    if not is_number(value):
        raise InputError(field, value, rng, context)
    v = as_float(value)
    if not math.isfinite(v) or v != math.floor(v):
        raise InputError(field, value, rng, context)
    i = int(v)
    if (lo is not None and i < lo) or (hi is not None and i > hi):
        raise InputError(field, value, rng, context)
    return i


def flag(field: str, value, context: str = "") -> bool:
    """``value`` as bool: True/False (numpy bools too); nothing else."""
    if isinstance(value, bool) or type(value).__name__ == "bool_":
        return bool(value)
    raise InputError(field, value, "True or False", context)


def name(field: str, value, context: str = "", allowed: str = "a non-empty text") -> str:
    """``value`` as a stripped, non-empty text of at most :data:`MAX_NAME_CHARS`
    characters, with no control characters."""
    if not isinstance(value, str) or not value.strip():
        raise InputError(field, value, allowed, context)
    v = value.strip()
    if len(v) > MAX_NAME_CHARS or any(ord(c) < 32 for c in v):
        raise InputError(field, value, f"{allowed} of at most {MAX_NAME_CHARS} printable characters", context)
    return v


def mapping(field: str, value, allowed: str, context: str = "", none_ok: bool = True) -> dict:
    """``value`` as a dict copy if it is a mapping (``{}`` for None when ``none_ok``)."""
    if value is None and none_ok:
        return {}
    if not isinstance(value, Mapping):
        raise InputError(field, value, allowed, context)
    return dict(value)


# ----------------------------------------------------------------------------- nesting

def nesting_depth(value, limit: int = MAX_NESTING) -> int:
    """Depth of nested lists/tuples/dicts in ``value`` (0 for a scalar), found
    without recursion; stops counting at ``limit + 1``."""
    deepest = 0
    stack = [(value, 0)]
    seen = 0
    while stack:
        v, d = stack.pop()
        if isinstance(v, Mapping):
            items = list(v.values())
        elif isinstance(v, (list, tuple)):
            items = list(v)
        else:
            continue
        d += 1
        deepest = max(deepest, d)
        if deepest > limit:
            return deepest
        seen += len(items)
        if seen > 1_000_000:
            return deepest
        stack.extend((x, d) for x in items)
    return deepest


def check_nesting(field: str, value, context: str = "") -> None:
    """:class:`InputError` if ``value`` nests deeper than :data:`MAX_NESTING`."""
    if nesting_depth(value) > MAX_NESTING:
        raise InputError(field, value, f"at most {MAX_NESTING} levels of nested lists/mappings", context)


def text_nesting(text: str) -> int:
    """Deepest ``[``/``{`` nesting of a JSON or TOML text, outside strings and
    comments: a linear scan done before the parser (whose recursion a deeply nested
    text would exhaust) sees the text."""
    depth = deepest = 0
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if c in "\"'":
            triple = text.startswith(c * 3, i)
            end_tok = c * 3 if triple else c
            j = i + len(end_tok)
            while j < n:
                if c == '"' and text[j] == "\\":
                    j += 2
                    continue
                if text.startswith(end_tok, j):
                    break
                if not triple and text[j] == "\n":
                    break
                j += 1
            i = j + len(end_tok)
            continue
        if c == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j + 1
            continue
        if c in "[{":
            depth += 1
            deepest = max(deepest, depth)
        elif c in "]}":
            depth = max(depth - 1, 0)
        i += 1
    return deepest


def check_text(field: str, text, context: str = "", max_chars: int = MAX_TEXT_CHARS) -> str:
    """``text`` if it is a str of at most ``max_chars`` characters."""
    if not isinstance(text, str):
        raise InputError(field, text, "text", context)
    if len(text) > max_chars:
        raise InputError(field, f"{len(text)} characters", f"at most {max_chars} characters", context)
    return text


def strip_bom(text: str) -> str:
    """``text`` without a leading UTF-8 byte-order mark (accepted by every reader)."""
    return text[1:] if text.startswith("\ufeff") else text


# ----------------------------------------------------------------------------- bytes -> text

_BOMS = ((b"\xff\xfe\x00\x00", "UTF-32"), (b"\x00\x00\xfe\xff", "UTF-32"),
         (b"\xff\xfe", "UTF-16"), (b"\xfe\xff", "UTF-16"))


def byte_position(data: bytes, offset: int) -> tuple[int, int]:
    """1-based (line, column) of byte ``offset``; the column counts characters."""
    start = data.rfind(b"\n", 0, offset) + 1
    line = data.count(b"\n", 0, offset) + 1
    col = len(data[start:offset].decode("utf-8", errors="replace")) + 1
    return line, col


def decode_text(data: bytes, name: str, max_bytes: int = MAX_FILE_BYTES) -> str:
    """Decode a user's file as UTF-8, with or without a byte-order mark (the same
    rule for CSV, TOML and JSON).

    Raises :class:`DataFileError` with the line and column of the first problem:
    file too large, a UTF-16/UTF-32 byte-order mark, a NUL byte, or a byte sequence
    that is not UTF-8 (a Latin-1 / Windows-1252 file, a binary file).
    """
    if not isinstance(data, (bytes, bytearray)):
        raise InputError("data", type(data).__name__, "the file's bytes")
    data = bytes(data)
    if len(data) > max_bytes:
        raise DataFileError(name, None, None, f"is {len(data)} bytes; the largest file accepted is "
                            f"{max_bytes} bytes")
    for bom, enc in _BOMS:
        if data.startswith(bom):
            raise DataFileError(name, 1, "1", f"is {enc} text (byte-order mark at line 1, column 1); "
                                "save it as UTF-8")
    nul = data.find(b"\x00")
    try:
        text = data.decode("utf-8-sig")
        bad = -1
    except UnicodeDecodeError as exc:
        bad = exc.start
    if bad >= 0 and (nul < 0 or bad < nul):
        line, col = byte_position(data, bad)
        raise DataFileError(name, line, str(col), f"byte 0x{data[bad]:02x} at line {line}, column "
                            f"{col} is not UTF-8 (a Latin-1 or Windows-1252 file?); save it as UTF-8")
    if nul >= 0:
        line, col = byte_position(data, nul)
        raise DataFileError(name, line, str(col), f"contains a NUL byte at line {line}, column {col}: "
                            "not a UTF-8 text file (a UTF-16 or binary file?); save it as UTF-8")
    return text


# ----------------------------------------------------------------------------- parsers

def parse_json(text: str, where: str, field: str | None = None, **kw):
    """Parse JSON ``text`` after the size and nesting caps.

    With ``field`` (an inline value such as ``--route-json``) a problem is an
    :class:`InputError` naming that field; otherwise a :class:`DataFileError`
    naming ``where`` (a file) with the line and column of a syntax error.  Huge
    integers (over Python's digit limit), NaN and infinity are refused.
    """
    import json

    def fail(line, col, problem, value=None):
        if field is not None:
            raise InputError(field, value if value is not None else text, problem, where) from None
        raise DataFileError(where, line, None if col is None else str(col), problem) from None

    if field is not None:
        check_text(field, text, where)
    text = strip_bom(text)
    if text_nesting(text) > MAX_NESTING:
        fail(None, None, f"JSON nested at most {MAX_NESTING} levels deep")

    def no_constant(name_):
        raise ValueError(f"{name_} is not allowed (JSON has no NaN or infinity)")

    kw.setdefault("parse_constant", no_constant)
    try:
        return json.loads(text, **kw)
    except json.JSONDecodeError as exc:
        fail(exc.lineno, exc.colno, f"valid JSON ({exc.msg} at line {exc.lineno}, column {exc.colno})"
             if field is not None else f"not valid JSON: {exc.msg}")
    except RecursionError:
        fail(None, None, f"JSON nested at most {MAX_NESTING} levels deep")
    except ValueError as exc:
        if type(exc) is not ValueError:      # a caller's own error from a hook
            raise
        fail(None, None, f"valid JSON ({str(exc)[:120]})" if field is not None else
             f"not valid JSON: {str(exc)[:160]}")


def parse_toml(text: str, where: str) -> dict:
    """Parse TOML ``text`` (a file ``where``) after the nesting cap; a syntax error,
    a too-deep nesting or an integer over Python's digit limit is a
    :class:`DataFileError` with the line and column when known."""
    import re

    try:
        import tomllib
    except ModuleNotFoundError:  # Python 3.10
        import tomli as tomllib

    text = strip_bom(text)
    if text_nesting(text) > MAX_NESTING:
        raise DataFileError(where, None, None, f"is nested more than {MAX_NESTING} levels deep (arrays or "
                            "inline tables); a targets file needs 2")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"line (\d+), column (\d+)", str(exc))
        raise DataFileError(where, int(m.group(1)) if m else None, m.group(2) if m else None,
                            f"not valid TOML: {exc}") from None
    except RecursionError:
        raise DataFileError(where, None, None, f"is nested more than {MAX_NESTING} levels deep") from None
    except ValueError as exc:     # e.g. an integer with more digits than Python converts
        raise DataFileError(where, None, None, f"not valid TOML: {str(exc)[:160]}") from None


# ----------------------------------------------------------------------------- files

def read_file_bytes(path, name: str | None = None, max_bytes: int = MAX_FILE_BYTES) -> tuple[bytes, str]:
    """(bytes, display name) of a user's file on disk, at most ``max_bytes``.

    The path is checked with ``os.stat`` first: anything but a regular file (a
    named pipe, a device such as ``/dev/zero``, a socket, a folder) is refused
    without opening it, and the file is then opened non-blocking and checked again
    on its descriptor, so a file swapped for a pipe in between cannot block either.
    Errors are :class:`DataFileError` naming the file.
    """
    if isinstance(path, (bytes, bytearray)) or not isinstance(path, (str, os.PathLike)):
        raise InputError("path", path, "a file path (text)")
    shown = name or str(path)
    if "\x00" in str(path):
        raise InputError("path", path, "a file path without NUL characters")
    p = Path(path)

    def refuse(mode: int):
        if not stat.S_ISREG(mode):
            kind = ("a named pipe" if stat.S_ISFIFO(mode) else "a device" if stat.S_ISCHR(mode) or
                    stat.S_ISBLK(mode) else "a folder" if stat.S_ISDIR(mode) else
                    "a socket" if stat.S_ISSOCK(mode) else "not a regular file")
            raise DataFileError(shown, None, None, f"cannot be read: it is {kind}; a regular file is required")

    try:
        st = os.stat(p)
        refuse(st.st_mode)
        fd = os.open(p, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except OSError as exc:
        raise DataFileError(shown, None, None, f"cannot be read ({exc.strerror or exc})") from None
    try:
        st = os.fstat(fd)
        refuse(st.st_mode)
        with os.fdopen(fd, "rb", closefd=True) as f:
            fd = None
            data = f.read(max_bytes + 1)
    except OSError as exc:
        raise DataFileError(shown, None, None, f"cannot be read ({exc.strerror or exc})") from None
    finally:
        if fd is not None:
            os.close(fd)
    if len(data) > max_bytes:       # at most max_bytes + 1 bytes were read
        line, col = byte_position(data, max_bytes)
        raise DataFileError(shown, line, str(col), f"is {max(st.st_size, len(data))} bytes; the largest file "
                            f"accepted is {max_bytes} bytes (the limit is reached at line {line}, column {col})")
    return data, shown


# ----------------------------------------------------------------------------- ranges

def range_count(start: float, stop: float, step: float, names=("start", "stop", "step"),
                max_values: int = MAX_RANGE_VALUES, unit: str = "mm") -> int:
    """Number of values of ``start:stop:step`` (inclusive), checked against
    ``max_values`` *before* any range is built.  Each bound must be finite and > 0
    and ``stop >= start``; ``names`` are the fields named in an error."""
    for fld, v in zip(names, (start, stop, step)):
        number(fld, v, 0.0, None, unit=unit, lo_open=True)
    start, stop, step = float(start), float(stop), float(step)
    if stop < start:
        raise InputError(names[1], stop, f"a value >= {names[0]} ({start:g} {unit})")
    span = (stop - start) / step
    if not math.isfinite(span) or span + 1 > max_values:
        raise InputError(names[2], step, f"a step giving at most {max_values} values from "
                         f"{start:g} to {stop:g} {unit} (this one gives about {safe_repr(span + 1)})")
    return int(math.floor(span + 1e-9)) + 1


def range_values(start: float, stop: float, step: float, names=("start", "stop", "step"),
                 max_values: int = MAX_RANGE_VALUES, unit: str = "mm") -> list[float]:
    """The values of ``start:stop:step``, both ends included, each rounded to 6 decimals
    (as ``numpy.round``: half to even), after :func:`range_count` has checked them.

    >>> range_values(20, 30, 2.5)
    [20.0, 22.5, 25.0, 27.5, 30.0]
    """
    n = range_count(start, stop, step, names, max_values=max_values, unit=unit)
    start, step = float(start), float(step)
    return [round((start + step * i) * 1e6) / 1e6 for i in range(n)]


def diameter_list(text, field: str = "diameters", max_values: int = MAX_RANGE_VALUES, unit: str = "mm",
                  max_chars: int = 10_000) -> list[float]:
    """Diameters typed as text, the one parser of the command line and the page:
    a list ``"20, 25, 30"`` (commas or semicolons) or a range ``"from:to:step"``
    (both ends included, :func:`range_values`).

    Parameters
    ----------
    text : str
        What the user typed, in ``unit`` (the caller converts display units).
    field : str
        The name of the input in an error (``"--diameters"``, ``"Sweep diameters"``).
    max_values : int
        Most values, checked before a range is built.
    unit : str
        The unit named in an error.
    max_chars : int
        Longest text accepted.

    Returns
    -------
    list of float
        In the order typed, each finite and > 0.

    Raises
    ------
    InputError
        Naming ``field``, the value and what is allowed.

    >>> diameter_list("20, 25;30")
    [20.0, 25.0, 30.0]
    >>> diameter_list("10:20:5")
    [10.0, 15.0, 20.0]
    """
    allowed = (f"a list '20, 25, 30' or a range 'from:to:step' in {unit} (finite, > 0, at most "
               f"{max_values} values)")
    text = check_text(field, text, max_chars=max_chars)
    if ":" in text:
        bounds = text.split(":")
        if len(bounds) != 3:
            raise InputError(field, text, allowed)
        try:
            a, b, step = (float(x) for x in bounds)
        except ValueError:
            raise InputError(field, text, allowed) from None
        try:
            return range_values(a, b, step, ("from", "to", "step"), max_values=max_values, unit=unit)
        except InputError as exc:
            raise InputError(field, text, f"{exc.field}={exc.value!s}: {exc.allowed}") from None
    parts = [p.strip() for p in text.replace(";", ",").split(",") if p.strip()]
    if not parts:
        raise InputError(field, text, allowed)
    if len(parts) > max_values:
        raise InputError(field, f"{len(parts)} values", allowed)
    out = []
    for p in parts:
        try:
            v = float(p)
        except ValueError:
            raise InputError(field, p, allowed) from None
        if not math.isfinite(v) or v <= 0:
            raise InputError(field, p, allowed)
        out.append(v)
    return out
