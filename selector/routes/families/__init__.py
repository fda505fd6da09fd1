"""Registry of route families.

The op sequences that identify each family live here, so that a route can be
recognised (and a clear "not modelled yet" error given) even before its family's
module exists.  A family module defines ``FAMILIES``: a list of
:class:`~selector.routes.families.base.RouteFamily` instances.  Selection, the CLI
and the page iterate over :func:`available`; a new module listed in ``MODULES``
shows up everywhere with no other change.
"""
from __future__ import annotations

import functools
import importlib

from ...errors import NotModelledError, RouteError

#: family name -> module (under selector.routes.families) that implements it
MODULES = {
    "anneal": "anneal", "normalize": "anneal", "quench_temper": "quench_temper",
    "carburize": "carburize", "nitride": "nitride", "induction": "induction",
    "cold_work": "cold_work", "age": "age",
    "supply": "supply", "supply_induction": "supply", "supply_nitride": "supply",
    "austemper": "austemper", "martemper": "austemper",
}

#: family name -> accepted op sequences
PATTERNS = {
    "anneal": (("anneal",),),
    "normalize": (("normalize",),),
    "quench_temper": (("harden",), ("harden", "temper"), ("normalize", "harden", "temper"),
                      ("anneal", "harden", "temper")),
    "carburize": (("carburize",), ("carburize", "temper"), ("carburize", "harden"),
                  ("carburize", "harden", "temper")),
    "nitride": (("nitride",), ("harden", "temper", "nitride")),
    "induction": (("induction_harden",), ("induction_harden", "temper"),
                  ("normalize", "induction_harden"), ("normalize", "induction_harden", "temper"),
                  ("harden", "temper", "induction_harden"),
                  ("harden", "temper", "induction_harden", "temper")),
    "cold_work": (("cold_work",), ("anneal", "cold_work"), ("cold_work", "stress_relieve"),
                  ("anneal", "cold_work", "stress_relieve")),
    "age": (("solution_treat",), ("age",), ("solution_treat", "age")),
    "supply": (("supply",), ("supply", "stress_relieve")),
    "supply_induction": (("supply", "induction_harden"), ("supply", "induction_harden", "temper")),
    "supply_nitride": (("supply", "nitride"),),
    "austemper": (("austemper",),),
    "martemper": (("martemper",), ("martemper", "temper")),
}


@functools.cache
def _load(module: str):
    try:
        mod = importlib.import_module(f"{__name__}.{module}")
    except ModuleNotFoundError as exc:
        if exc.name and exc.name.endswith(f".{module}"):
            return None
        raise
    return {f.name: f for f in getattr(mod, "FAMILIES", ())}


def get(name: str):
    """The family object, or :class:`NotModelledError` if its model is not built yet."""
    if name not in MODULES:
        raise RouteError("route family", name, ", ".join(MODULES))
    fams = _load(MODULES[name])
    if not fams or name not in fams:
        raise NotModelledError(f"the route family {name!r} is recognised but not modelled yet; "
                               "no estimate is given rather than an invented one")
    return fams[name]


def available() -> list:
    """Every family whose model exists, in a stable order."""
    out = []
    for name in MODULES:
        fams = _load(MODULES[name])
        if fams and name in fams:
            out.append(fams[name])
    return out


def match(signature: tuple) -> str:
    """The family whose patterns include the op sequence ``signature``."""
    for name, pats in PATTERNS.items():
        if signature in pats:
            return name
    accepted = "; ".join(" → ".join(p) for pats in PATTERNS.values() for p in pats)
    raise RouteError("route", " → ".join(signature), f"one of these op sequences: {accepted}")
