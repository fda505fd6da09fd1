"""The project's error and warning types.

Every error raised on purpose by ``selector`` derives from :class:`SelectorError`
and from a builtin (``ValueError`` or ``LookupError``) so that callers can catch
either.  Messages name the field, the value given and what is allowed.
"""
from __future__ import annotations

import difflib
import reprlib
from typing import Iterable, Sequence

#: longest value shown in an error message, characters
MAX_SHOWN_CHARS = 120

_REPR = reprlib.Repr()
_REPR.maxlevel = 3
_REPR.maxstring = 60
_REPR.maxother = 60
_REPR.maxlong = 40


def safe_repr(value: object, limit: int = MAX_SHOWN_CHARS) -> str:
    """A short ``repr`` of ``value`` for an error message: nested containers are shown
    at most 3 levels deep (so a value nested 1 000 deep cannot exhaust the
    recursion limit), long texts and huge integers are cut, and a value whose own
    ``repr`` fails is shown by its type."""
    try:
        if isinstance(value, int) and not isinstance(value, bool) and value.bit_length() > 128:
            text = f"<int of about {int(value.bit_length() * 0.30103) + 1} digits>"
        else:
            text = _REPR.repr(value)
    except (RecursionError, ValueError, TypeError, AttributeError, OverflowError):
        text = f"<{type(value).__name__}>"
    except Exception:  # noqa: BLE001 - a caller's object with a broken __repr__
        text = f"<{type(value).__name__}>"
    if len(text) > limit:
        text = text[:limit - 1] + "…"
    return text


class SelectorError(Exception):
    """Base of every error that ``selector`` raises deliberately."""


class InputError(SelectorError, ValueError):
    """A parameter, target or option given by the caller is not valid.

    Attributes
    ----------
    field : str
        Name of the offending field (e.g. ``"temp_c"`` or ``"min_yield_mpa"``).
    value : object
        The value that was given.
    allowed : str
        What would have been accepted.
    """

    def __init__(self, field: str, value: object, allowed: str, context: str = ""):
        self.field, self.value, self.allowed, self.context = field, value, allowed, context
        where = f"{context}: " if context else ""
        super().__init__(f"{where}{field}={safe_repr(value)} is not valid; allowed: {allowed}")


class RouteError(InputError):
    """A process route (list of steps) is malformed or not admitted by the grade."""


class NotModelledError(SelectorError, ValueError):
    """The route is understood but its model is not implemented yet.

    Raised instead of returning an invented number.
    """


class UnknownGradeError(SelectorError, LookupError):
    """A grade name matches nothing, or more than one grade, in the catalogue.

    Attributes
    ----------
    name : str
        The name that was looked up.
    suggestions : list of str
        The nearest catalogue names.
    """

    def __init__(self, name: str, suggestions: Sequence[str], ambiguous: bool = False):
        self.name, self.suggestions, self.ambiguous = name, list(suggestions), ambiguous
        kind = "is ambiguous; it matches" if ambiguous else "is not in the catalogue; nearest"
        hint = ", ".join(self.suggestions) if self.suggestions else "(none)"
        super().__init__(f"grade {safe_repr(name)} {kind}: {hint}")


class DataFileError(SelectorError, ValueError):
    """A CSV/TOML file (built-in or the user's) failed validation.

    Attributes
    ----------
    path : str
        The file.
    line : int or None
        1-based line number in the file (comment lines counted).
    column : str or None
        Column name.
    """

    def __init__(self, path: str, line: int | None, column: str | None, problem: str):
        self.path, self.line, self.column, self.problem = str(path), line, column, problem
        loc = str(path)
        if line is not None:
            loc += f", line {line}"
        if column is not None:
            loc += f", column {column!r}"
        super().__init__(f"{loc}: {problem}")


class SelectorWarning(UserWarning):
    """A deliberate warning of the project (validity range, metallurgical caution)."""


def nearest(name: str, choices: Iterable[str], n: int = 5) -> list[str]:
    """Return up to ``n`` entries of ``choices`` closest to ``name`` (case-insensitive)."""
    choices = list(dict.fromkeys(choices))
    lower = {c.lower(): c for c in choices}
    hits = difflib.get_close_matches(name.lower(), list(lower), n=n, cutoff=0.4)
    return [lower[h] for h in hits]


def check_choice(field: str, value: object, allowed: Iterable[str], context: str = "",
                 error: type = InputError) -> str:
    """Return ``value`` if it is one of ``allowed``, else raise :class:`InputError`
    naming the nearest allowed choices."""
    allowed = list(allowed)
    if isinstance(value, str) and value in allowed:
        return value
    near = nearest(value, allowed, n=3) if isinstance(value, str) and len(value) <= 200 else []
    hint = ", ".join(allowed) + (f" (did you mean {', '.join(near)}?)" if near else "")
    raise error(field, value, hint, context)


def check_number(field: str, value: object, lo: float | None = None, hi: float | None = None,
                 context: str = "") -> float:
    """Return ``value`` as float if it is a finite number within [lo, hi], else raise
    :class:`InputError`."""
    import math
    from numbers import Real

    rng = f"a finite number in [{lo}, {hi}]" if lo is not None or hi is not None else "a finite number"
    if isinstance(value, bool) or type(value).__name__ == "bool_" or not isinstance(value, Real):
        raise InputError(field, value, rng, context)
    try:
        v = float(value)
    except (OverflowError, TypeError, ValueError):
        raise InputError(field, value, rng, context) from None
    if not math.isfinite(v):
        raise InputError(field, value, rng, context)
    if (lo is not None and v < lo) or (hi is not None and v > hi):
        raise InputError(field, value, f"a number in [{lo}, {hi}]", context)
    return v


def check_array(field: str, x, lo: float | None = None, hi: float | None = None, context: str = "",
                lo_open: bool = False):
    """``x`` as a float array if every element is finite and within [lo, hi] (or
    (lo, hi] with ``lo_open``), else :class:`InputError` naming the first bad value."""
    import numpy as np

    try:
        a = np.asarray(x, float)
    except (TypeError, ValueError, OverflowError, RecursionError):
        raise InputError(field, x, "a finite number or an array of finite numbers", context) from None
    bad = ~np.isfinite(a)
    if lo is not None:
        bad |= (a <= lo) if lo_open else (a < lo)
    if hi is not None:
        bad |= a > hi
    if np.any(bad):
        v = float(np.atleast_1d(a)[np.atleast_1d(bad)][0])
        lo_s = "" if lo is None else (f"> {lo:g}" if lo_open else f">= {lo:g}")
        hi_s = "" if hi is None else f"<= {hi:g}"
        raise InputError(field, v, "a finite number" + (" " + " and ".join(x for x in (lo_s, hi_s) if x)
                                                        if (lo_s or hi_s) else ""), context)
    return a
