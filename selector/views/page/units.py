"""Display units of the page: the SI and US customary labels, conversion of a value
for display and of a typed value back to SI, and the conversion of the unit-bearing
inputs when the unit system changes.  The library computes in SI throughout; these
functions touch only what is shown and typed."""
from __future__ import annotations

from typing import Mapping

import numpy as np

# --------------------------------------------------------------------------- units

SI, US = "SI", "US customary"
UNIT_SYSTEMS = (SI, US)

MPA_PER_KSI = 6.894757   # 1 ksi = 6.894757 MPa (NIST SP 811, Appendix B.8, 'kip per square inch')
MM_PER_IN = 25.4         # exact by definition (NIST SP 811, Appendix B.8, 'inch')

N_PER_LBF = 4.4482216152605  # 1 lbf = 4.448 221 615 260 5 N, exact (NIST SP 811, Appendix B.9)

UNITS = {  # quantity -> (SI label, US label)
    "stress": ("MPa", "ksi"),
    "length": ("mm", "in"),
    "temperature": ("°C", "°F"),
    "force": ("kN", "lbf"),
}


def unit(quantity: str, system: str) -> str:
    """Display unit label of ``quantity`` (``stress``, ``length``, ``temperature``)."""
    si, us = UNITS[quantity]
    return us if system == US else si


def to_display(value, quantity: str, system: str):
    """An SI value (MPa, mm, °C, kN; scalar or array) in the display units of ``system``."""
    if value is None:
        return None
    v = np.asarray(value, float)
    if system == US:
        if quantity == "stress":
            v = v / MPA_PER_KSI
        elif quantity == "length":
            v = v / MM_PER_IN
        elif quantity == "temperature":
            v = v * 9.0 / 5.0 + 32.0
        elif quantity == "force":
            v = v * 1000.0 / N_PER_LBF
    return float(v) if v.ndim == 0 else v


def to_si(value, quantity: str, system: str):
    """A value typed in the display units of ``system`` back to SI (MPa, mm, °C, kN)."""
    if value is None:
        return None
    v = np.asarray(value, float)
    if system == US:
        if quantity == "stress":
            v = v * MPA_PER_KSI
        elif quantity == "length":
            v = v * MM_PER_IN
        elif quantity == "temperature":
            v = (v - 32.0) * 5.0 / 9.0
        elif quantity == "force":
            v = v * N_PER_LBF / 1000.0
    return float(v) if v.ndim == 0 else v


def quantity_of(name: str) -> str | None:
    """The quantity of an SI-suffixed column or parameter name, or None."""
    if name.endswith("_mpa"):
        return "stress"
    if name.endswith("_mm"):
        return "length"
    if name.endswith("_c") or name == "temp_c":
        return "temperature"
    return None


def display_name(name: str, system: str) -> str:
    """``yield_mpa`` -> ``yield_ksi`` in US units (column headers of the table)."""
    q = quantity_of(name)
    if q is None or system == SI:
        return name
    suffix = {"stress": "_ksi", "length": "_in", "temperature": "_f"}[q]
    return name[: name.rfind("_")] + suffix


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

