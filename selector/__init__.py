"""selector: choose a metal grade and process route that reach strength, ductility
and hardness targets at the part's real section, at the lowest cost.

Results are estimates for preliminary selection.  The final choice needs certified
material test reports, the applicable design code and review by a qualified
engineer.
"""
from .catalogue.grades import catalogue, grade
from .errors import (DataFileError, InputError, NotModelledError, RouteError, SelectorError,
                     SelectorWarning, UnknownGradeError)
from .routes.evaluate import evaluate

CAUTION = ("Estimates for preliminary selection only. The final choice needs certified material "
           "test reports, the applicable design code and review by a qualified engineer.")

from .selection.engine import alternatives, nearest_misses, select
from .design.pins import pin_targets
from .design.capacity import pin_capacity
from .design.sweep import diameter_sweep

__all__ = ["catalogue", "grade", "evaluate", "select", "nearest_misses", "alternatives", "pin_targets", "pin_capacity",
           "diameter_sweep", "CAUTION",
           "SelectorError", "InputError", "RouteError", "NotModelledError", "UnknownGradeError",
           "DataFileError", "SelectorWarning"]
