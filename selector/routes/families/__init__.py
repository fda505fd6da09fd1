"""Registry of route families.

Each family declares the op sequences it accepts (``patterns``); :func:`match` finds
the family of a route from them.  A family module defines ``FAMILIES``: a list of
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
    """The family whose ``patterns`` (the accepted op sequences, declared by each family)
    include the op sequence ``signature``."""
    for fam in available():
        if signature in fam.patterns:
            return fam.name
    accepted = "; ".join(" → ".join(p) for fam in available() for p in fam.patterns)
    raise RouteError("route", " → ".join(signature), f"one of these op sequences: {accepted}")
