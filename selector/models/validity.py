"""One validity-range registry for every model.

A model module declares the range over which its equations were fitted or
published by calling :func:`register` at import time.  The route layer calls
:func:`check` with the values actually used and turns the messages into the
``warnings`` of a result; :func:`table` feeds the documentation.

Which model inputs each route family feeds is declared by the family
(``RouteFamily.model_inputs``, :mod:`selector.routes.model_inputs`), and
``routes.evaluate.finish`` checks every one of them with :func:`notes`, so a
registered range that no family declares is a defect (``tests/test_validity_coverage.py``).

Example (illustrative: an invented model, removed again so the registry stays as shipped)
-----------------------------------------------------------------------------------------
>>> _ = register("example_model", {"C": (0.1, 0.7, "wt%")}, "Some standard, Table 1")
>>> check("example_model", C=0.9)
['example_model: C = 0.9 wt% is outside 0.1–0.7 wt% (Some standard, Table 1); the result is extrapolated']
>>> [msg for msg, mask in notes("example_model", "C", [0.4, 0.9, 0.9])]
['example_model: C = 0.9 wt% is outside 0.1–0.7 wt% (Some standard, Table 1); the result is extrapolated']
>>> notes("example_model", "C", [0.4, 0.9, 0.9])[0][1]
array([False,  True,  True])
>>> del _REGISTRY["example_model"]
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

import numpy as np


@dataclass(frozen=True)
class Validity:
    model: str
    ranges: Mapping[str, tuple]  # name -> (lo, hi, unit)
    reference: str
    #: what happens outside the range (the end of every message)
    beyond: str = "the result is extrapolated"


_REGISTRY: dict[str, Validity] = {}


def register(model: str, ranges: Mapping[str, tuple], reference: str,
             beyond: str = "the result is extrapolated") -> Validity:
    """Declare the validity ranges of ``model``; ``ranges`` maps a variable name to
    ``(lo, hi, unit)`` where ``lo`` or ``hi`` may be ``None`` for an open side;
    ``beyond`` says what the model does outside (default: it extrapolates).

    Example (illustrative: a value of this implementation, not a published one)

    >>> register("example_model", {"temp_c": (100.0, 700.0, "°C")}, "a reference").model
    'example_model'
    >>> _ = _REGISTRY.pop("example_model")
    """
    v = Validity(model, dict(ranges), reference, beyond)
    _REGISTRY[model] = v
    return v


def load_all() -> dict[str, Validity]:
    """Import every module of :mod:`selector.models` (each registers its ranges at import)
    and return the whole registry.

    Example (illustrative: a value of this implementation, not a published one)

    >>> "astm_e140" in load_all()
    True
    """
    import importlib
    import pkgutil

    from .. import models  # lazy: the registry module is imported by every model; this is the package itself
    for info in pkgutil.iter_modules(models.__path__):
        importlib.import_module(f"{models.__name__}.{info.name}")
    return dict(_REGISTRY)


def get(model: str) -> Validity:
    """The registered ranges of ``model`` (its module is imported if it was not yet).

    Example (illustrative: a value of this implementation, not a published one)

    >>> get("marin_size").ranges["diameter_mm"]
    (None, 254.0, 'mm')
    """
    if model not in _REGISTRY:
        load_all()
    return _REGISTRY[model]


def out_of_range_mask(model: str, **values) -> np.ndarray:
    """Boolean array (broadcast over the values) that is True where any value is
    outside the model's registered range.

    Example (illustrative: a value of this implementation, not a published one)

    >>> out_of_range_mask("marin_size", diameter_mm=[100.0, 300.0]).tolist()
    [False, True]
    """
    v = _REGISTRY[model]
    mask = np.zeros(np.broadcast(*[np.asarray(x) for x in values.values()]).shape if values else (), bool)
    for name, x in values.items():
        if name not in v.ranges:
            continue
        mask = mask | _outside(np.asarray(x, float), v.ranges[name])
    return mask


def _outside(x: np.ndarray, limits) -> np.ndarray:
    """True where ``x`` lies outside the registered ``(lo, hi, unit)`` (None: open end),
    with a tolerance of 1e-9 for values written at the limit."""
    lo, hi, _unit = limits
    bad = np.zeros(x.shape, bool)
    if lo is not None:
        bad |= x < lo - 1e-9
    if hi is not None:
        bad |= x > hi + 1e-9
    return bad


def _fmt(x: float) -> str:
    return f"{x:.4g}"


def check(model: str, **values) -> list[str]:
    """Messages for every value (scalar or array: any element) outside ``model``'s range.

    Example (illustrative: a value of this implementation, not a published one)

    >>> check("marin_size", diameter_mm=300.0)[0].split(" is ")[0]
    'marin_size: diameter_mm = 300 mm'
    """
    v = get(model)
    msgs = []
    for name, x in values.items():
        if name not in v.ranges:
            continue
        arr = np.atleast_1d(np.asarray(x, float))
        bad = _outside(arr, v.ranges[name])
        if bad.any():
            msgs.append(_message(model, name, _fmt(float(arr[bad][0]))))
    return msgs


#: significant digits of the value named in a message of :func:`notes`: the message of a state
#: depends on that state alone (a chunked states table equals an unchunked one), and a table of
#: continuous values (strengths, cooling rates) still groups into a bounded number of messages
NOTE_DIGITS = 3


def _round_sig(x: np.ndarray, digits: int = NOTE_DIGITS) -> np.ndarray:
    """``x`` rounded to ``digits`` significant digits (0 stays 0)."""
    x = np.asarray(x, float)
    mag = np.floor(np.log10(np.where(x == 0.0, 1.0, np.abs(x))))
    scale = 10.0 ** (digits - 1 - mag)
    return np.round(x * scale) / scale


def _message(model: str, name: str, value_text: str) -> str:
    v = _REGISTRY[model]
    lo, hi, unit = v.ranges[name]
    rng = f"{'' if lo is None else _fmt(lo)}–{'' if hi is None else _fmt(hi)}"
    u = f" {unit}" if unit else ""
    return f"{model}: {name} = {value_text}{u} is outside {rng}{u} ({v.reference}); {v.beyond}"


def notes(model: str, name: str, values, on=None, rows: bool = False) -> list[tuple[str, np.ndarray]]:
    """Per-state warnings for one input of ``model``, vectorised.

    Parameters
    ----------
    model : str
        A registered model.
    name : str
        One of its registered variables.
    values : array_like, shape (n,)
        The values the states actually used; NaN means the model was not used there.
    on : array_like of bool, shape (n,), optional
        The states that used the model (default: all).
    rows : bool
        Give each message's states as ascending row numbers instead of a mask (the
        expansion joins thousands of messages per family; a mask per message costs the
        whole batch each time).

    Returns
    -------
    list of ``(message, mask)``
        ``mask`` (n,) is True on the states the message applies to.  Each message names
        the model, the variable, the value, the range and its reference; states with the
        same value to :data:`NOTE_DIGITS` significant digits share a message (so each
        state's message depends on that state alone).  Empty when every value is inside
        the range.

    Raises
    ------
    KeyError
        ``model`` or ``name`` is not registered (a family declaring an input that does not exist).

    Example (illustrative: a value of this implementation, not a published one)

    >>> from selector.models import tempering
    >>> [(m.split(":")[0], mask.tolist()) for m, mask in notes("tempering_hv", "C", [0.4, 0.965])]
    [('tempering_hv', [False, True])]
    """
    v = get(model)
    x = np.atleast_1d(np.asarray(values, float))
    bad = _outside(x, v.ranges[name])
    if on is not None:
        bad &= np.broadcast_to(np.asarray(on, bool), x.shape)
    if not bad.any():
        return []
    idx = np.flatnonzero(bad)
    uniq, inv = np.unique(_round_sig(x[idx]), return_inverse=True)
    # each value's states in ascending order: a stable sort by value keeps idx's order
    srt = idx[np.argsort(inv, kind="stable")] if len(uniq) > 1 else idx
    ends = np.cumsum(np.bincount(inv.reshape(-1), minlength=len(uniq))).tolist()
    texts = _messages(v, model, name, uniq.tolist())
    out = []
    a = 0
    for text, b in zip(texts, ends):
        at = srt[a:b]
        a = b
        if rows:
            out.append((text, at))
            continue
        m = np.zeros(x.shape, bool)
        m[at] = True
        out.append((text, m))
    return out


#: (model, variable) -> (its registry entry, {rounded value: message}) of :func:`notes` (the
#: same values recur from section to section: each message is written once)
_MESSAGES: dict = {}


def _messages(v, model: str, name: str, values: list) -> list:
    """:func:`_message` of each value (written as :func:`_fmt`), kept per registry entry."""
    hit = _MESSAGES.get((model, name))
    if hit is None or hit[0] is not v or hit[1] != v.ranges[name] or len(hit[2]) > 20_000:
        hit = _MESSAGES[(model, name)] = (v, v.ranges[name], {})
    kept = hit[2]
    out = []
    for u in values:
        text = kept.get(u)
        if text is None:
            text = kept[u] = _message(model, name, _fmt(float(u)))
        out.append(text)
    return out


def table() -> list[dict]:
    """All registered ranges as rows (for docs/methods.md).

    Example (illustrative: a value of this implementation, not a published one)

    >>> {"model", "variable", "min", "max", "unit", "reference"} <= set(table()[0])
    True
    """
    rows = []
    for v in sorted(_REGISTRY.values(), key=lambda v: v.model):
        for name, (lo, hi, unit) in v.ranges.items():
            rows.append({"model": v.model, "variable": name, "min": lo, "max": hi,
                         "unit": unit, "reference": v.reference})
    return rows
