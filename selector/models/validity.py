"""One validity-range registry for every model.

A model module declares the range over which its equations were fitted or
published by calling :func:`register` at import time.  The route layer calls
:func:`check` with the values actually used and turns the messages into the
``warnings`` of a result; :func:`table` feeds the documentation.

Example
-------
>>> register("example_model", {"C": (0.1, 0.7, "wt%")}, "Some standard, Table 1")
>>> check("example_model", C=0.9)
['example_model: C = 0.9 wt% is outside 0.1–0.7 wt% (Some standard, Table 1); the result is extrapolated']
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


_REGISTRY: dict[str, Validity] = {}


def register(model: str, ranges: Mapping[str, tuple], reference: str) -> Validity:
    """Declare the validity ranges of ``model``; ``ranges`` maps a variable name to
    ``(lo, hi, unit)`` where ``lo`` or ``hi`` may be ``None`` for an open side."""
    v = Validity(model, dict(ranges), reference)
    _REGISTRY[model] = v
    return v


def get(model: str) -> Validity:
    return _REGISTRY[model]


def out_of_range_mask(model: str, **values) -> np.ndarray:
    """Boolean array (broadcast over the values) that is True where any value is
    outside the model's registered range."""
    v = _REGISTRY[model]
    mask = np.zeros(np.broadcast(*[np.asarray(x) for x in values.values()]).shape if values else (), bool)
    for name, x in values.items():
        if name not in v.ranges:
            continue
        lo, hi, _unit = v.ranges[name]
        x = np.asarray(x, float)
        if lo is not None:
            mask = mask | (x < lo - 1e-9)
        if hi is not None:
            mask = mask | (x > hi + 1e-9)
    return mask


def _fmt(x: float) -> str:
    return f"{x:.4g}"


def check(model: str, **values) -> list[str]:
    """Messages for every value (scalar or array: any element) outside ``model``'s range."""
    v = _REGISTRY[model]
    msgs = []
    for name, x in values.items():
        if name not in v.ranges:
            continue
        lo, hi, unit = v.ranges[name]
        arr = np.atleast_1d(np.asarray(x, float))
        bad = np.zeros(arr.shape, bool)
        if lo is not None:
            bad |= arr < lo - 1e-9
        if hi is not None:
            bad |= arr > hi + 1e-9
        if bad.any():
            val = _fmt(float(arr[bad][0]))
            rng = f"{'' if lo is None else _fmt(lo)}–{'' if hi is None else _fmt(hi)}"
            u = f" {unit}" if unit else ""
            msgs.append(f"{model}: {name} = {val}{u} is outside {rng}{u} ({v.reference}); "
                        "the result is extrapolated")
    return msgs


def table() -> list[dict]:
    """All registered ranges as rows (for docs/methods.md)."""
    rows = []
    for v in sorted(_REGISTRY.values(), key=lambda v: v.model):
        for name, (lo, hi, unit) in v.ranges.items():
            rows.append({"model": v.model, "variable": name, "min": lo, "max": hi,
                         "unit": unit, "reference": v.reference})
    return rows
