"""The display units of the page and the command line: one table, two systems.

The library computes in SI throughout (MPa, mm, °C, kN, kg, price per kg); units are
display only.  This module converts a value, an input or a whole results table to the
chosen system and back, and never recomputes a property.

=================  =============  ==================  ===========================================
quantity           SI             US customary        conversion (``selector.models.conversions``)
=================  =============  ==================  ===========================================
``stress``         MPa            ksi                 ksi = MPa / ``MPA_PER_KSI``
``length``         mm             in                  in = mm / ``MM_PER_IN``
``temperature``    °C             °F                  °F = °C × 9/5 + 32
``force``          kN             lbf                 lbf = 1000 kN / ``N_PER_LBF``
``mass``           kg             lb                  lb = kg / ``KG_PER_LB``
``cost_per_mass``  per kg         per lb              per lb = per kg × ``KG_PER_LB``
=================  =============  ==================  ===========================================

Every constant is exact by definition (NIST SP 811 (2008) Appendix B.8 and B.9; the
Celsius–Fahrenheit relation, same source, B.9 'degree Fahrenheit') and is defined once,
in :mod:`selector.models.conversions`.  A cost is in the catalogue's relative money (the
price of 1 kg of 1018 bar = 1): a part's cost is the same number in both systems, a price
per lb is the price per kg times 0.453 592 37.

Hardness is shown in one scale per view (:data:`HARDNESS_SCALES`), chosen with the units
(:func:`hardness_scale`): HRC by default in both systems, since the targets are given in
HRC; HB or HV on request.  The library reports HV for every state and HRC/HB from the
ASTM E140 steel table (blank where that table does not apply), so the choice only selects
a column.

Example
-------
>>> round(to_display(1000.0, "stress", US), 2)        # 1000 MPa = 145.04 ksi
145.04
>>> round(to_display(845.0, "temperature", US))       # 845 °C = 1553 °F
1553
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Mapping

import numpy as np
import pandas as pd

from ..errors import InputError
from ..routes.describe import describe_route, si_value, significant_text
from ..models.conversions import KG_PER_LB, MM_PER_IN, MPA_PER_KSI, N_PER_LBF

SI, US = "SI", "US customary"
#: the unit systems, SI first
UNIT_SYSTEMS = (SI, US)
#: hardness scales a view can show
HARDNESS_SCALES = ("HRC", "HB", "HV")


@dataclass(frozen=True)
class Quantity:
    """One displayed quantity: its SI and US labels and the affine map SI -> US
    (``us = si * scale + offset``)."""

    si: str
    us: str
    scale: float
    offset: float = 0.0
    #: the name ending of an SI column or parameter of this quantity, and its US ending
    si_suffix: str = ""
    us_suffix: str = ""


#: quantity -> its units and conversion (the one units table)
QUANTITIES: Mapping[str, Quantity] = {
    "stress": Quantity("MPa", "ksi", 1.0 / MPA_PER_KSI, 0.0, "_mpa", "_ksi"),
    "length": Quantity("mm", "in", 1.0 / MM_PER_IN, 0.0, "_mm", "_in"),
    "temperature": Quantity("°C", "°F", 9.0 / 5.0, 32.0, "_c", "_f"),
    "force": Quantity("kN", "lbf", 1000.0 / N_PER_LBF, 0.0, "_kn", "_lbf"),
    "mass": Quantity("kg", "lb", 1.0 / KG_PER_LB, 0.0, "_kg", "_lb"),
    "cost_per_mass": Quantity("per kg", "per lb", KG_PER_LB, 0.0, "_per_kg", "_per_lb"),
}

#: SI unit label (as written in ``selector.routes.steps.OPS``) -> quantity
UNIT_QUANTITY = {q.si: name for name, q in QUANTITIES.items()}

#: columns of the library's tables whose quantity is not told by the name's ending
#: (name -> (quantity, the name in US units))
NAMED_COLUMNS = {"relative_cost": ("cost_per_mass", "relative_cost_per_lb"),
                 "relative_price": ("cost_per_mass", "relative_price_per_lb")}


def check_system(system) -> str:
    """``system`` if it is one of :data:`UNIT_SYSTEMS`, else :class:`InputError`."""
    if not isinstance(system, str) or system not in UNIT_SYSTEMS:
        raise InputError("units", system, " or ".join(repr(s) for s in UNIT_SYSTEMS))
    return system


def _quantity(quantity: str) -> Quantity:
    if quantity not in QUANTITIES:
        raise InputError("quantity", quantity, ", ".join(QUANTITIES))
    return QUANTITIES[quantity]


def unit(quantity: str, system: str) -> str:
    """The unit label of ``quantity`` in ``system`` (``unit("stress", US)`` -> ``"ksi"``)."""
    q = _quantity(quantity)
    return q.us if check_system(system) == US else q.si


def to_display(value, quantity: str, system: str):
    """An SI value (scalar or array; None stays None) in the units of ``system``.

    Parameters
    ----------
    value : float or array_like
        In SI: MPa, mm, °C, kN, kg, price per kg.
    quantity : str
        A key of :data:`QUANTITIES`.
    system : str
        :data:`SI` or :data:`US`.

    Returns
    -------
    float or ndarray
    """
    q = _quantity(quantity)
    if value is None:
        return None
    v = np.asarray(value, float)
    if check_system(system) == US:
        v = v * q.scale + q.offset
    return float(v) if v.ndim == 0 else v


def to_si(value, quantity: str, system: str):
    """A value in the units of ``system`` back to SI (inverse of :func:`to_display`)."""
    q = _quantity(quantity)
    if value is None:
        return None
    v = np.asarray(value, float)
    if check_system(system) == US:
        v = (v - q.offset) / q.scale
    return float(v) if v.ndim == 0 else v


def _strip_band(name: str) -> tuple[str, str]:
    """``uts_mpa_lo`` -> (``uts_mpa``, ``_lo``); other names unchanged."""
    for tail in ("_lo", "_hi"):
        if name.endswith(tail):
            return name[: -len(tail)], tail
    return name, ""


def quantity_of(name: str) -> str | None:
    """The quantity of a column or parameter named in SI (``yield_mpa`` -> ``stress``,
    ``temper_temp_c`` -> ``temperature``, ``uts_mpa_lo`` -> ``stress``), or None."""
    if not isinstance(name, str):
        return None
    base, _ = _strip_band(name)
    if base in NAMED_COLUMNS:
        return NAMED_COLUMNS[base][0]
    # the longest ending first ("_per_kg" before "_kg")
    for qname, q in sorted(QUANTITIES.items(), key=lambda kv: -len(kv[1].si_suffix)):
        if base.endswith(q.si_suffix):
            return qname
    return None


def display_name(name: str, system: str) -> str:
    """The name of an SI column in ``system`` (``yield_mpa`` -> ``yield_ksi``,
    ``relative_cost`` -> ``relative_cost_per_lb``); unchanged in SI or without a unit."""
    q = quantity_of(name)
    if q is None or check_system(system) == SI:
        return name
    base, tail = _strip_band(name)
    if base in NAMED_COLUMNS:
        return NAMED_COLUMNS[base][1] + tail
    qq = QUANTITIES[q]
    return base[: -len(qq.si_suffix)] + qq.us_suffix + tail


def convert_frame(df: pd.DataFrame, system: str) -> pd.DataFrame:
    """A copy of a results table with every numeric SI column in ``system``'s units and
    renamed (``yield_mpa`` -> ``yield_ksi``, ``temper_temp_c`` -> ``temper_temp_f``).

    The process-window columns (``window_min``, ``window_max``, ``robust_window_*``,
    ``feasible_*``, ``main_value``) are in the unit of each row's ``window_parameter``
    and are converted row by row.  Text, flags and unit-free numbers are unchanged.
    Nothing is recomputed: ``convert_frame(df, SI)`` returns an equal copy.
    """
    check_system(system)
    out = df.copy()
    if system == SI:
        return out
    if "window_parameter" in out:
        params = out["window_parameter"].astype(str).tolist()
        quants = [quantity_of(p) for p in params]
        for col in WINDOW_VALUE_COLUMNS:
            if col not in out or not pd.api.types.is_numeric_dtype(out[col]):
                continue
            vals = out[col].to_numpy(float).copy()
            for i, q in enumerate(quants):
                if q is not None:
                    vals[i] = to_display(vals[i], q, system)
            out[col] = vals
    rename = {}
    for col in out.columns:
        q = quantity_of(col)
        if q is not None and pd.api.types.is_numeric_dtype(out[col]) and not pd.api.types.is_bool_dtype(out[col]):
            out[col] = to_display(out[col].to_numpy(float), q, system)
            rename[col] = display_name(col, system)
    return out.rename(columns=rename)


#: columns whose unit is that of the row's ``window_parameter``
WINDOW_VALUE_COLUMNS = ("main_value", "window_min", "window_max", "robust_window_min", "robust_window_max",
                        "feasible_min", "feasible_max")


def hardness_scale(system: str, scale: str | None = None) -> str:
    """The hardness scale of a view: ``scale`` when given (one of :data:`HARDNESS_SCALES`,
    case-insensitive), else the default of ``system`` (HRC in both: the targets are in HRC)."""
    check_system(system)
    if scale is None:
        return DEFAULT_HARDNESS[system]
    if not isinstance(scale, str) or scale.upper() not in HARDNESS_SCALES:
        raise InputError("hardness scale", scale, ", ".join(HARDNESS_SCALES))
    return scale.upper()


#: the default hardness scale of each unit system
DEFAULT_HARDNESS = {SI: "HRC", US: "HRC"}


# --------------------------------------------------------------------------- formatting

def round_to(value, step: float):
    """``value`` rounded to the nearest multiple of ``step`` (NaN and None kept)."""
    if value is None:
        return None
    v = np.asarray(value, float)
    r = np.round(v / step) * step
    # clean the binary fuzz of a decimal step (0.1 * 3 = 0.30000000000000004)
    digits = max(0, -int(np.floor(np.log10(step)))) if step < 1 else 0
    r = np.round(r, digits + 2)
    return float(r) if r.ndim == 0 else r


def significant(value: float, digits: int = 2) -> float:
    """``value`` rounded to ``digits`` significant figures (0 and NaN kept)."""
    v = float(value)
    if v == 0 or v != v or not np.isfinite(v):
        return v
    return round(v, digits - 1 - int(np.floor(np.log10(abs(v)))))


#: step of a temperature written in a route or a window, °F (the SI describer rounds to 5 °C;
#: furnace set points are not finer than that, common practice)
FAHRENHEIT_STEP = 10.0


def value_text(value: float, si_unit: str, system: str) -> str:
    """A step or window value given in ``si_unit`` (the unit of
    :data:`selector.routes.steps.OPS`: ``°C``, ``mm``, ``h``, ``%``, ``wt%``, ``Hz``) as text
    in ``system``: 845 °C -> ``"845 °C"`` or ``"1550 °F"``, 3 mm -> ``"3 mm"`` or ``"0.12 in"``."""
    q = UNIT_QUANTITY.get(si_unit)
    if check_system(system) == SI or q is None:
        return si_value(value, si_unit)
    v, u = to_display(float(value), q, system), unit(q, system)
    if q == "temperature":
        return f"{round_to(v, FAHRENHEIT_STEP):.0f} {u}"
    return f"{significant_text(v)} {u}"


def value_formatter(system: str) -> Callable[[float, str], str]:
    """The formatter that :func:`selector.routes.describe.describe_route` takes: ``(value,
    SI unit) -> text`` in ``system``."""
    check_system(system)

    def fmt(value: float, si_unit: str) -> str:
        return value_text(value, si_unit, system)

    return fmt


def route_words(route, system: str = SI) -> str:
    """A route (list of step dicts, SI values) in words in ``system``'s units:
    ``"austenitize 845 °C, quench in oil, temper 540 °C 2 h"`` or ``"... 1550 °F ..."``
    (:func:`selector.routes.describe.describe_route`)."""
    return describe_route(route, value_formatter(system))
