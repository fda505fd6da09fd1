"""Units of the page's inputs.  The units table itself (labels, conversions, column
names) is the one shared with the command line, :mod:`selector.views.units`; this
module adds what belongs to the page's widgets: which input carries which quantity,
the conversion of every input when the unit system changes, and the rounding of the
SI values that key the page's cache."""
from __future__ import annotations

from typing import Mapping

from selector.views.units import SI, US, to_display, to_si


#: page inputs that carry a unit: widget key -> quantity
UNIT_INPUTS = {"diameter": "length", "thickness": "length", "length": "length",
               "min_yield": "stress", "max_yield": "stress", "min_uts": "stress", "max_uts": "stress",
               "min_case_depth": "length", "service_temp": "temperature",
               # the clevis-pin section and its diameter sweep
               "pin_load": "force", "pin_diameter": "length", "pin_gap": "length", "pin_lug": "length",
               "pin_clevis": "length", "sweep_from": "length", "sweep_to": "length", "sweep_step": "length"}

#: digits kept when a unit switch converts an input
DIGITS = {("stress", SI): 1, ("stress", US): 3, ("length", SI): 2, ("length", US): 4,
           ("temperature", SI): 1, ("temperature", US): 1, ("force", SI): 3, ("force", US): 1}


def convert_inputs(state: Mapping, old: str, new: str) -> dict:
    """New values of the unit-bearing inputs when the unit system changes from
    ``old`` to ``new`` (blank inputs stay blank)."""
    out = {}
    if old == new:
        return out
    for key, q in UNIT_INPUTS.items():
        v = state.get(key)
        if v is None:
            continue
        si = to_si(v, q, old)
        out[key] = round(float(to_display(si, q, new)), DIGITS[(q, new)])
    return out


#: decimals of the SI values the page passes to the library (and so of its cache keys): the
#: precision of the SI inputs (0.01 mm, 0.1 MPa, 0.1 °C), coarser than the US inputs' (0.0001 in,
#: 0.001 ksi, 0.1 °F).  A unit switch converts the inputs to the other system and back with
#: rounding (30 mm -> 1.1811 in -> 29.99994 mm); keyed on the rounded SI value, the switch finds
#: every result in the cache and recomputes nothing (units are display only).
SI_KEYDIGITS = {"length": 2, "stress": 1, "temperature": 1, "force": 3}


def si_key(value, quantity: str):
    """An SI input rounded to :data:`SI_KEYDIGITS` (None stays None)."""
    if value is None:
        return None
    return round(float(value), SI_KEYDIGITS[quantity])

