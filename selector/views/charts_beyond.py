"""Charts of the one-candidate view for issue 19: the transformation diagram of a candidate
with its route's cooling path, and the local fatigue strength against the bending stress
through the depth.  Builders only (Altair specifications from the tables of
:mod:`selector.routes.transformation_curves`): no physics, no selection; the page wires them.

Look: a light, quiet diagram.  Each reaction is a translucent band from its start to its
finish time (so the reading "transformation under way" is an area, not two lines), the
cooling paths are dark lines over it, and the characteristic temperatures (Ms, Bs, Ac1,
the bath) are thin labelled rules.  The depth chart shades the margin between the local
strength and the stress and marks the governing depth.
"""
from __future__ import annotations

from typing import Mapping

import altair as alt
import numpy as np
import pandas as pd

from ..errors import InputError

#: band colours of the reactions (muted, colour-blind-distinguishable)
REACTION_COLOURS = {"ferrite": "#6fa8a0", "pearlite": "#d8a25e", "bainite": "#8f86c4"}
PATH_COLOURS = {"surface": "#5a5a5a", "centre": "#1d1d1d"}
LINE_COLOURS = {"ms_c": "#b0413e", "bs_c": "#6a5fa8", "ac1_c": "#8a8a8a", "ac3_c": "#b5b5b5", "bath_c": "#2e6f95"}
LINE_LABELS = {"ms_c": "Ms", "bs_c": "Bs", "ac1_c": "Ac1", "ac3_c": "Ac3", "bath_c": "bath"}


def _temp(values, fahrenheit: bool):
    v = np.asarray(values, float)
    return v * 9.0 / 5.0 + 32.0 if fahrenheit else v


def _bands(curves: pd.DataFrame) -> pd.DataFrame:
    """One row per reaction and temperature: ``t_start, t_finish`` (wide form for the areas)."""
    if curves.empty:
        return pd.DataFrame(columns=["reaction", "temp_c", "t_start", "t_finish"])
    wide = curves.pivot_table(index=["reaction", "temp_c"], columns="edge", values="time_s").reset_index()
    wide = wide.rename(columns={"start": "t_start", "finish": "t_finish"})
    return wide.dropna(subset=["t_start", "t_finish"])


def transformation_diagram(data: Mapping, fahrenheit: bool = False, height: int = 340, width: int | str = "container",
                           title: str | None = None) -> alt.LayerChart:
    """Transformation diagram of one candidate: reaction bands (start to finish), the
    surface and centre cooling paths, and the Ms/Bs/Ac1/bath rules.

    Parameters
    ----------
    data : mapping
        The result of :func:`selector.routes.transformation_curves.candidate_curves`.
    fahrenheit : bool
        Temperatures in °F instead of °C.
    height, width : int
        Chart size in pixels (``width="container"``: the page's column).
    title : str, optional
        Chart title.

    Returns
    -------
    altair.LayerChart
    """
    if not isinstance(data, Mapping) or "curves" not in data or "path" not in data:
        raise InputError("data", type(data).__name__, "the dict of routes.transformation_curves.candidate_curves()")
    unit = "°F" if fahrenheit else "°C"
    bands = _bands(data["curves"])
    bands = bands.assign(temp=_temp(bands["temp_c"], fahrenheit))
    path = data["path"].assign(temp=_temp(data["path"]["temp_c"], fahrenheit))
    x = alt.X("t_start:Q", scale=alt.Scale(type="log"), title="time (s, log)")
    area = alt.Chart(bands).mark_area(opacity=0.35, orient="horizontal", interpolate="monotone").encode(
        y=alt.Y("temp:Q", title=f"temperature ({unit})"),
        x=x, x2="t_finish:Q",
        color=alt.Color("reaction:N", title="transforming",
                        scale=alt.Scale(domain=list(REACTION_COLOURS), range=list(REACTION_COLOURS.values())),
                        legend=alt.Legend(orient="right")),
        detail="reaction:N",
        tooltip=[alt.Tooltip("reaction:N"), alt.Tooltip("temp:Q", format=".0f", title=unit),
                 alt.Tooltip("t_start:Q", format=".3g", title="start (s)"),
                 alt.Tooltip("t_finish:Q", format=".3g", title="finish (s)")])
    paths = alt.Chart(path).mark_line(strokeWidth=2.2).encode(
        x=alt.X("time_s:Q", scale=alt.Scale(type="log")), y="temp:Q",
        strokeDash=alt.StrokeDash("location:N", title="cooling path",
                                  scale=alt.Scale(domain=["surface", "centre"], range=[[6, 3], [1, 0]])),
        color=alt.value(PATH_COLOURS["centre"]),
        tooltip=[alt.Tooltip("location:N"), alt.Tooltip("time_s:Q", format=".3g", title="s"),
                 alt.Tooltip("temp:Q", format=".0f", title=unit)])
    lines = pd.DataFrame([{"name": LINE_LABELS[k], "temp": float(_temp(v, fahrenheit)), "key": k}
                          for k, v in (data.get("lines") or {}).items() if k in LINE_LABELS and np.isfinite(v)])
    layers = [area, paths]
    if not lines.empty:
        rules = alt.Chart(lines).mark_rule(strokeWidth=1, opacity=0.8).encode(
            y="temp:Q", color=alt.Color("key:N", scale=alt.Scale(domain=list(LINE_COLOURS),
                                                                  range=list(LINE_COLOURS.values())), legend=None))
        labels = alt.Chart(lines).mark_text(align="left", dx=4, dy=-6, fontSize=11).encode(
            y="temp:Q", x=alt.value(4), text="name:N",
            color=alt.Color("key:N", scale=alt.Scale(domain=list(LINE_COLOURS), range=list(LINE_COLOURS.values())),
                            legend=None))
        layers += [rules, labels]
    chart = alt.layer(*layers).resolve_scale(color="independent").properties(height=height, width=width)
    return chart.properties(title=title) if title else chart


def fatigue_depth_diagram(data: Mapping, mpa_per_unit: float = 1.0, unit: str = "MPa", height: int = 300,
                          width: int | str = "container", title: str | None = None) -> alt.LayerChart:
    """Local fatigue strength against the bending stress through the depth, the margin
    between them shaded and the governing depth marked.

    Parameters
    ----------
    data : mapping
        The result of :func:`selector.routes.transformation_curves.fatigue_depth_curves`.
    mpa_per_unit : float
        MPa per display unit of stress (``selector.models.conversions.MPA_PER_KSI`` for ksi).
    unit : str
        Display unit of stress.
    height, width : int
        Chart size in pixels.
    title : str, optional

    Returns
    -------
    altair.LayerChart
    """
    if not isinstance(data, Mapping) or "table" not in data:
        raise InputError("data", type(data).__name__, "the dict of routes.transformation_curves.fatigue_depth_curves()")
    if not (isinstance(mpa_per_unit, (int, float)) and mpa_per_unit > 0):
        raise InputError("mpa_per_unit", mpa_per_unit, "a number > 0 (MPa per display unit)")
    t = data["table"].assign(stress=lambda f: f["stress_mpa"] / mpa_per_unit)
    wide = t.pivot_table(index="depth_mm", columns="curve", values="stress").reset_index()
    wide.columns.name = None
    y = alt.Y("stress:Q", title=f"stress ({unit})")
    layers = []
    if {"local fatigue strength", "bending stress"} <= set(wide.columns):
        layers.append(alt.Chart(wide).mark_area(opacity=0.18, color="#6fa8a0").encode(
            x="depth_mm:Q", y=alt.Y("bending stress:Q", title=f"stress ({unit})"), y2="local fatigue strength:Q"))
    layers.append(alt.Chart(t).mark_line(strokeWidth=2.2, point=alt.OverlayMarkDef(size=18)).encode(
        x=alt.X("depth_mm:Q", title="depth below the surface (mm)"), y=y,
        color=alt.Color("curve:N", title=None, scale=alt.Scale(domain=["local fatigue strength", "bending stress"],
                                                                range=["#2e6f95", "#b0413e"])),
        tooltip=[alt.Tooltip("curve:N"), alt.Tooltip("depth_mm:Q", format=".3g", title="mm"),
                 alt.Tooltip("stress:Q", format=".4g", title=unit)]))
    gov = data.get("governing_depth_mm")
    if gov is not None and np.isfinite(gov):
        mark = pd.DataFrame({"depth_mm": [float(gov)], "label": [f"governs at {gov:.2g} mm"]})
        layers.append(alt.Chart(mark).mark_rule(strokeDash=[2, 2], color="#444").encode(x="depth_mm:Q"))
        layers.append(alt.Chart(mark).mark_text(align="left", dx=4, y=8, fontSize=11, color="#444").encode(
            x="depth_mm:Q", text="label:N"))
    chart = alt.layer(*layers).properties(height=height, width=width)
    return chart.properties(title=title) if title else chart
