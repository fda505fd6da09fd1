"""The cost of a candidate split into material and processing.

The engine's ``relative_cost`` (per kg) is the grade's price per kg (the catalogue's
indicative price, or the user's price sheet) plus the route family's processing
adder (``data/route_costs.csv``); ``part_cost`` multiplies it by the part's mass
(:mod:`selector.selection.cost`).  A buyer compares the two parts separately: the
bar is bought from a mill or stockist, the heat treatment from a treater.

:func:`split_cost` adds the two parts as columns, so that views show them apart
without knowing the adders.  Prices are relative (1018 cold-drawn bar = 1.0 per kg)
and indicative only.
"""
from __future__ import annotations

import numpy as np
import pandas as pd

from ..errors import InputError
from .cost import relative_cost_per_kg, route_adders

#: columns added by :func:`split_cost`
SPLIT_COLUMNS = ("material_cost_per_kg", "processing_cost_per_kg", "material_part_cost", "processing_part_cost")


def processing_cost_per_kg(route_family, family=None) -> np.ndarray:
    """The processing adder per kg of each route family (``data/route_costs.csv``).

    Parameters
    ----------
    route_family : sequence of str
        Route family names (``quench_temper``, ``carburize`` ...).
    family : sequence of str, optional
        The grades' families, for adders that depend on them (the ``families`` column
        of ``data/route_costs.csv``: in-house cold work of steel bar, for example).

    Returns
    -------
    numpy.ndarray
        Relative cost per kg (1018 cold-drawn bar = 1.0); an unknown family is an
        :class:`~selector.errors.InputError` naming it and the families with an adder.
    """
    adders = route_adders()
    fams = np.asarray(route_family, dtype=object).ravel()
    unknown = [f for f in fams if f not in adders]
    if unknown:
        raise InputError("route_family", unknown[0], f"a route with a cost adder in data/route_costs.csv "
                                                     f"({', '.join(adders)})")
    fam = None if family is None else np.asarray(family, dtype=object).ravel()
    return relative_cost_per_kg(np.zeros(len(fams)), fams, fam)


def split_cost(candidates: pd.DataFrame) -> pd.DataFrame:
    """A copy of a candidates table with the material and processing parts of its cost.

    ``material_cost_per_kg = relative_cost - processing_cost_per_kg`` (the price per
    kg the engine used: the price sheet's where it priced the grade), and each
    multiplied by ``mass_kg`` for the part (``material_part_cost``,
    ``processing_part_cost``; NaN where the table has no mass).

    Parameters
    ----------
    candidates : pandas.DataFrame
        Rows of ``select``/``rank``/``alternatives``: at least ``route_family`` and
        ``relative_cost``; ``mass_kg`` when present.

    Returns
    -------
    pandas.DataFrame
        The table with :data:`SPLIT_COLUMNS` added.

    Example
    -------
    >>> t = pd.DataFrame({"route_family": ["quench_temper"], "relative_cost": [2.3], "mass_kg": [0.5]})
    >>> split_cost(t)[["material_cost_per_kg", "processing_cost_per_kg"]].round(2).values.tolist()
    [[1.9, 0.4]]
    """
    for col in ("route_family", "relative_cost"):
        if col not in candidates.columns:
            raise InputError("candidates", f"columns {list(candidates.columns)[:8]}",
                             f"a candidates table with a {col!r} column")
    out = candidates.copy()
    fam = out["family"].to_numpy(dtype=object) if "family" in out.columns else None
    proc = processing_cost_per_kg(out["route_family"].to_numpy(dtype=object), fam) if len(out) else np.zeros(0)
    total = out["relative_cost"].to_numpy(float)
    mass = out["mass_kg"].to_numpy(float) if "mass_kg" in out.columns else np.full(len(out), np.nan)
    out["material_cost_per_kg"] = total - proc
    out["processing_cost_per_kg"] = proc
    out["material_part_cost"] = (total - proc) * mass
    out["processing_part_cost"] = proc * mass
    return out
