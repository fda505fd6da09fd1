"""selector: choose a metal grade and process route that reach strength, ductility
and hardness targets at the part's real section, at the lowest cost.

Results are estimates for preliminary selection.  The final choice needs certified
material test reports, the applicable design code and review by a qualified
engineer.

The public functions are imported on first use (PEP 562), so ``import selector``
costs no pandas or scipy import until one of them is called.
"""
from __future__ import annotations

import importlib

from .errors import (DataFileError, InputError, NotModelledError, RouteError, SelectorError,
                     SelectorWarning, UnknownGradeError)

CAUTION = ("Estimates for preliminary selection only. The final choice needs certified material "
           "test reports, the applicable design code and review by a qualified engineer.")

#: public name -> module that defines it (imported on first access)
_LAZY = {
    "grade": ".catalogue.grades",
    "evaluate": ".selection.single",
    "select": ".selection.engine", "nearest_misses": ".selection.engine", "alternatives": ".selection.engine",
    "miss_analysis": ".selection.engine",
    "pin_targets": ".design.pins", "pin_capacity": ".design.capacity",
    "diameter_sweep": ".design.sweep",
    "batch": ".design.batch",
    "read_parts": ".design.parts_list", "PartsListError": ".design.parts_list",
    "rationalise": ".design.stock",
}

__all__ = ["catalogue", "grade", "evaluate", "select", "nearest_misses", "miss_analysis", "alternatives",
           "pin_targets", "pin_capacity",
           "diameter_sweep", "batch", "rationalise", "read_parts", "PartsListError", "CAUTION",
           "SelectorError", "InputError", "RouteError", "NotModelledError", "UnknownGradeError",
           "DataFileError", "SelectorWarning"]


# the subpackage ``selector.catalogue`` (its __init__ is empty) is loaded first, so that the
# name ``catalogue`` below stays the function when the subpackage's modules are imported later
from . import catalogue as _catalogue_package  # noqa: E402,F401


def catalogue():
    """The catalogue as a DataFrame, one row per grade
    (:func:`selector.catalogue.grades.catalogue`)."""
    from .catalogue.grades import catalogue as table   # lazy: keeps `import selector` free of pandas
    return table()


def __getattr__(name: str):
    mod = _LAZY.get(name)
    if mod is None:
        raise AttributeError(f"module 'selector' has no attribute {name!r}")
    value = getattr(importlib.import_module(mod, __name__), name)
    globals()[name] = value
    return value


def __dir__():
    return sorted(set(globals()) | set(__all__))
