"""The diameter sweep of a clevis pin with the route steps of each pick.

:func:`selector.design.sweep.diameter_sweep` reports each diameter's pick by its
grade, route family and route text; a view that shows the route in other units
(°F, in) or hands it on to ``evaluate`` needs the steps themselves.
:func:`diameter_sweep_routes` runs the same sweep and adds a ``route`` column: the
pick's steps (a list of step dicts, the engine's ``route`` cell), or ``[]`` where
no robust candidate exists.

The steps are taken from the candidates table the sweep's own selection produced
at that diameter (no second selection run): the row of the pick's grade and route
text.  When ``selector.design.sweep`` reports the steps itself, this module can go.

Results are estimates for preliminary selection.  The final choice needs certified
material test reports, the applicable design code and review by a qualified engineer.
"""
from __future__ import annotations

import pandas as pd

from ..errors import InputError
from ..selection import engine
from .sweep import diameter_sweep


def diameter_sweep_routes(diameters_mm, **case) -> pd.DataFrame:
    """:func:`~selector.design.sweep.diameter_sweep` with a ``route`` column.

    Parameters
    ----------
    diameters_mm : sequence of float
        Pin diameters, mm (as in ``diameter_sweep``).
    **case
        Every other keyword of ``diameter_sweep`` (load case, ``extra_targets``,
        ``price_sheet``, ``caution_context`` ...) except ``select``.

    Returns
    -------
    pandas.DataFrame
        The sweep table (its columns and ``attrs`` unchanged) and ``route``: the
        steps of the pick at each diameter (``[]`` where ``grade`` is empty).

    Example
    -------
    >>> sw = diameter_sweep_routes([25.0], load_kn=60.0, lug_thickness_mm=38.0,
    ...                            clevis_thickness_mm=16.0, gap_mm=1.5)   # doctest: +SKIP
    >>> sw.loc[0, "route"][0]["op"]                                       # doctest: +SKIP
    'harden'
    """
    if "select" in case:
        raise InputError("select", case["select"], "no selection function: this sweep uses the engine's")
    tables: dict[float, pd.DataFrame] = {}

    def select_and_keep(targets, diameter_mm, **kw):
        cand = engine.select(targets, diameter_mm, **kw)
        tables[float(diameter_mm)] = cand
        return cand

    sw = diameter_sweep(diameters_mm, select=select_and_keep, **case)
    routes = []
    for d, grade, text in zip(sw["diameter_mm"], sw["grade"], sw["route_text"]):
        cand = tables.get(float(d))
        hit = None if cand is None or not grade else cand[(cand["grade"] == grade) & (cand["route_text"] == text)]
        routes.append([dict(s) for s in hit["route"].iloc[0]] if hit is not None and len(hit) else [])
    sw["route"] = routes
    return sw
