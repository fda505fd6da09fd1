"""Charts of the page: the strength-elongation map, the process-parameter
curves, hardness profiles, the side-by-side bars, the diameter sweep, the
trade-off frontier of a near miss and the fatigue strength through the depth.
Each builder takes DataFrames in SI and the unit system, and draws; no physics.
The map, redrawn at every change of targets, section or units, is written directly
as a Vega-Lite spec (a dict); the other charts are Altair charts."""
from __future__ import annotations

import math
import threading
from collections import OrderedDict
from typing import Mapping, Sequence

import altair as alt
import numpy as np
import pandas as pd

from selector.catalogue.grades import default_catalogue
from selector.selection.targets import NUMERIC_TARGETS
from selector.routes.evaluate import scale_hardness
from selector.views.units import US, display_name, quantity_of, to_display, unit

from .text import family_label, param_label, param_unit, percent, pick_label, route_line


# the page builds its charts without Altair's check of every object against the
# Vega-Lite schema at creation (a few tenths of a second per chart on each run);
# ``chart_spec`` skips the check at export too; the tests export with the check
try:
    alt.utils.schemapi.disable_debug_mode()
except AttributeError:             # pragma: no cover - an Altair without the switch checks as before
    pass


def chart_spec(chart) -> dict:
    """The Vega-Lite spec of an Altair chart, without the schema check (see above); a
    spec already written as a dict (the map, :func:`strength_elongation_chart`) as is."""
    return chart if isinstance(chart, dict) else chart.to_dict(validate=False)


#: the Vega-Lite schema the page's specs follow (the one of the installed Altair)
VEGA_LITE_SCHEMA = alt.SCHEMA_URL


PALETTE = ["#1b6f8a", "#c2571a", "#5b8c2a", "#8e3b74", "#b3922b", "#3f4fa3", "#a8323e", "#2f8f7b",
           "#6b5a3e", "#d07fa8", "#4d7ea8", "#7c8a1f", "#9b5fc0", "#c0873f", "#355c4a"]
TARGET_FILL = "#f1e6c8"
TARGET_STROKE = "#8a6d1e"


# --------------------------------------------------------------------------- region geometry (display)

def hull_band(x: np.ndarray, y: np.ndarray) -> pd.DataFrame:
    """The convex hull of points (x, y) as a band: at each hull vertex abscissa,
    the lower and upper edge (``x, lo, hi``) — a form an area mark can fill.

    Andrew's monotone chain (A.M. Andrew, Inf. Process. Lett. 9 (1979) 216) gives the
    lower and upper chains of the hull, both ordered by x, so the band is exact for
    the convex region.  A purely geometric display helper.
    """
    edges = hull_edges(x, y)
    if edges is None:
        return pd.DataFrame(columns=["x", "lo", "hi"])
    return pd.DataFrame(edges)


class _GeometryMemo:
    """The last results of a pure geometry helper keyed by the bytes of its array arguments
    and its other arguments (least recently used dropped beyond ``size``; one lock: the page's
    sessions run in threads).  The map redraws the same candidates' hulls and lines at every
    change of targets; a hit returns read-only arrays equal to the first computation's."""

    def __init__(self, size: int = 4096):
        self.size, self.items, self.lock = size, OrderedDict(), threading.Lock()

    @staticmethod
    def key(*args):
        return tuple((a.dtype.str, a.shape, a.tobytes()) if isinstance(a, np.ndarray) else a for a in args)

    def get(self, key):
        with self.lock:
            hit = self.items.get(key)
            if hit is not None:
                self.items.move_to_end(key)
            return hit

    def put(self, key, value):
        if isinstance(value, np.ndarray):
            value.flags.writeable = False
        elif isinstance(value, dict):
            for v in value.values():
                v.flags.writeable = False
        with self.lock:
            self.items[key] = value
            while len(self.items) > self.size:
                self.items.popitem(last=False)
        return value


_HULLS = _GeometryMemo()
_KEPT = _GeometryMemo()


def hull_edges(x: np.ndarray, y: np.ndarray) -> dict | None:
    """:func:`hull_band` as a dict of arrays ``x, lo, hi`` (None for no finite point): the
    map builds its bands from these without a frame per candidate.  Remembered per input
    (:class:`_GeometryMemo`): the arrays returned are read-only."""
    x, y = np.asarray(x, float), np.asarray(y, float)
    key = _HULLS.key(x, y)
    hit = _HULLS.get(key)
    if hit is not None:
        return hit
    edges = _hull_edges(x, y)
    return None if edges is None else _HULLS.put(key, edges)


def remember_hulls(states: pd.DataFrame, y: str = "yield_mpa") -> None:
    """Compute, and so remember (:func:`hull_edges`), the scatter hull of every variant of
    ``states`` as :func:`chart_frames` asks for it (the variant's rows in table order): the
    page's warm start, so that a first change of targets finds the candidates it draws."""
    ex, ey = states["elongation_pct"].to_numpy(float), states[y].to_numpy(float)
    for pos in states.groupby("variant", sort=False).indices.values():
        hull_edges(ex[pos], ey[pos])


def _hull_edges(x: np.ndarray, y: np.ndarray) -> dict | None:
    pts = np.column_stack([x, y])
    pts = pts[np.isfinite(pts).all(axis=1)]
    if len(pts) == 0:
        return None
    pts = np.unique(pts, axis=0)          # sorted by x then y
    if len(pts) == 1 or np.ptp(pts[:, 0]) == 0:
        xs = float(pts[0, 0])
        return {"x": np.array([xs, xs]), "lo": np.array([pts[:, 1].min()] * 2),
                "hi": np.array([pts[:, 1].max()] * 2)}

    def turn(o, a, b):   # z of the cross product (a - o) x (b - o)
        return (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0])

    def chain(points):
        out = []
        for p in points:
            while len(out) >= 2 and turn(out[-2], out[-1], p) <= 0:
                out.pop()
            out.append(p)
        return np.array(out)

    plist = pts.tolist()                  # Python floats: the chain's arithmetic without numpy scalars
    lower = chain(plist)
    upper = chain(plist[::-1])[::-1]
    xs = np.unique(np.concatenate([lower[:, 0], upper[:, 0]]))
    lo = np.interp(xs, lower[:, 0], lower[:, 1])
    hi = np.interp(xs, upper[:, 0], upper[:, 1])
    return {"x": xs, "lo": np.minimum(lo, hi), "hi": np.maximum(lo, hi)}


#: the largest distance, as a share of the drawn spread, by which a thinned line of the map
#: departs from the exact one (0.1 %: half a pixel of the 500-pixel map)
MAP_TOLERANCE = 0.001


def _step_down(value: float) -> float:
    """``value`` rounded down to the series 2^(k/4) (steps of 19 %; 0 and non-finite as is):
    the spreads by which the map thins its lines, so that a change of targets that moves the
    drawn spread a little thins with the same numbers (the thinning remembered per input is
    found again) and never more coarsely than :data:`MAP_TOLERANCE` of the true spread."""
    if not (value > 0 and math.isfinite(value)):
        return value
    return 2.0 ** (math.floor(4.0 * math.log2(value) + 1e-9) / 4.0)


def keep_vertices(x, y, tol: float, vertical: bool = False) -> np.ndarray:
    """The vertices of the polyline ``(x, y)`` to keep so that the polyline through them
    departs from every dropped vertex by at most ``tol`` (a bool mask; both ends kept):
    the Douglas–Peucker reduction (D.H. Douglas, T.K. Peucker, The Canadian Cartographer
    10 (1973) 112).  Distances perpendicular to the chord, or along y when ``vertical``
    (then ``x`` must increase).  A display helper: the map draws fewer points, the same
    lines to within ``tol``.

    >>> keep_vertices([0, 1, 2, 3], [0, 0.001, 0, 1], 0.01).tolist()
    [True, False, True, True]
    """
    x, y = np.asarray(x, float), np.asarray(y, float)
    key = _KEPT.key(x, y, float(tol), bool(vertical))
    hit = _KEPT.get(key)
    if hit is None:
        hit = _KEPT.put(key, _keep_vertices(x, y, tol, vertical))
    return hit.copy()


def _keep_vertices(x: np.ndarray, y: np.ndarray, tol: float, vertical: bool) -> np.ndarray:
    n = len(x)
    keep = np.zeros(n, bool)
    if n == 0:
        return keep
    keep[[0, n - 1]] = True
    stack = [(0, n - 1)]
    while stack:
        i, j = stack.pop()
        if j - i < 2:
            continue
        dx, dy = x[j] - x[i], y[j] - y[i]
        if vertical:
            d = np.abs(y[i + 1:j] - (y[i] + (x[i + 1:j] - x[i]) / dx * dy)) if dx else np.full(j - i - 1, np.inf)
        else:
            norm = math.hypot(dx, dy)
            d = (np.abs(dx * (y[i + 1:j] - y[i]) - dy * (x[i + 1:j] - x[i])) / norm if norm
                 else np.hypot(x[i + 1:j] - x[i], y[i + 1:j] - y[i]))
        k = int(np.argmax(d))
        if d[k] > tol:
            m = i + 1 + k
            keep[m] = True
            stack += [(i, m), (m, j)]
    return keep


def thin_band(band: Mapping, tol_y: float) -> dict:
    """The band ``x, lo, hi`` (of :func:`hull_band`) on fewer abscissae: the vertices of
    either edge that :func:`keep_vertices` keeps at ``tol_y`` (vertical distance), then the
    lower edge lowered and the upper edge raised by the most the thinned edge cut inside the
    exact one, so that the thinned band holds the exact band (every point inside the exact
    band is inside the thinned one; each edge moves by at most ``tol_y``).

    >>> b = thin_band({"x": [0.0, 1, 2, 3, 4], "lo": [0.0, -1, -1.5, -1, 0], "hi": [0.0, 0.25, 0.5, 0.25, 0]}, 0.3)
    >>> b["x"].tolist(), b["lo"].tolist(), b["hi"].tolist()
    ([0.0, 2.0, 4.0], [-0.25, -1.75, -0.25], [0.0, 0.5, 0.0])
    """
    x, lo, hi = (np.asarray(band[k], float) for k in ("x", "lo", "hi"))
    if len(x) < 3:
        return {"x": x, "lo": lo, "hi": hi}
    keep = keep_vertices(x, lo, tol_y, vertical=True) | keep_vertices(x, hi, tol_y, vertical=True)
    xs, tlo, thi = x[keep], lo[keep], hi[keep]
    tlo = tlo - max(0.0, float(np.max(np.interp(x, xs, tlo) - lo)))
    thi = thi + max(0.0, float(np.max(hi - np.interp(x, xs, thi))))
    return {"x": xs, "lo": tlo, "hi": thi}


def chart_frames(states: pd.DataFrame, cand: pd.DataFrame, y: str, system: str,
                 picked: str | None = None) -> dict:
    """Frames for :func:`strength_elongation_chart`.

    ``regions``: the edges of each candidate's scatter (lower and upper edge of the
    hull over every composition corner and main-parameter value: ``x, lo, hi``);
    ``paths``: the nominal composition along the main parameter, with the parameter
    value as text at both ends of a path longer than 15 % of the drawn spread, and
    along the focus path; ``points``:
    each candidate's chosen state.  Every frame carries ``family`` (the route
    family's name from the library) for the colour.  ``y``: ``yield_mpa`` or ``uts_mpa``."""
    regions, paths = [], []
    fam_of = dict(zip(cand["id"], [family_label(f) for f in cand["route_family"]]))
    wanted = set(cand["variant"])
    # one pass over the states: the row positions of each drawn candidate, and the columns
    # as arrays (a mask or a frame per candidate costs more)
    sub = states[states["variant"].isin(wanted)]
    rows_of = sub.groupby("variant", sort=False).indices if len(sub) else {}
    ex_col, ey_col = sub["elongation_pct"].to_numpy(float), sub[y].to_numpy(float)
    mv_col, nominal = sub["main_value"].to_numpy(float), (sub["corner"] == "nominal").to_numpy()
    none = np.zeros(0, int)
    # a path shorter than this share of the drawn spread carries no end labels (they would overlap)
    span_x = float(np.nanmax(ex_col) - np.nanmin(ex_col)) if len(ex_col) else 0.0
    span_y = float(np.nanmax(ey_col) - np.nanmin(ey_col)) if len(ey_col) else 0.0
    # the spreads the lines are thinned by (never above the true ones: never coarser)
    thin_x, thin_y = _step_down(span_x), _step_down(span_y)
    for c in cand[["variant", "id", "label"] + (["window_parameter"] if "window_parameter" in cand else [])
                  ].to_dict("records"):
        pos = rows_of.get(c["variant"], none)
        focus = c["id"] == picked
        band = hull_edges(ex_col[pos], ey_col[pos])
        if band is not None:
            band = thin_band(band, MAP_TOLERANCE * thin_y)
            regions.append({**band, "label": c["label"], "id": c["id"], "family": fam_of[c["id"]], "focus": focus,
                            "n": len(band["x"])})
        # the nominal composition along the main parameter (NaN values last, as a sort of the frame)
        pos = pos[nominal[pos] & ~np.isnan(ex_col[pos]) & ~np.isnan(ey_col[pos])]
        mv = mv_col[pos]
        if (~np.isnan(mv)).any():
            ok = np.flatnonzero(~np.isnan(mv))
            pos = pos[np.concatenate([ok[mv[ok].argsort(kind="quicksort")], np.flatnonzero(np.isnan(mv))])]
        nom = pos
        if len(nom):
            param = c.get("window_parameter") or ""
            q = quantity_of(param) if param else None
            mv = mv_col[nom]
            shown = np.atleast_1d(to_display(mv, q, system) if q else mv)
            u = param_unit(param, system)
            n = len(nom)
            keep = np.zeros(n, bool)
            ex, ey = ex_col[nom], ey_col[nom]
            if focus or np.ptp(ex) > 0.15 * span_x or np.ptp(ey) > 0.15 * span_y:
                keep[[0, -1]] = True                   # both ends of a path long enough to read
            if focus:
                keep[::max(1, int(math.ceil(n / 8)))] = True    # and along the focus path
            text = np.array([_param_text(v, q, u) if (k and v == v) else "" for v, k in zip(shown, keep)], object)
            # the points of the line that show at the map's scale (within MAP_TOLERANCE of the spread),
            # and every labelled one
            drawn = keep | keep_vertices(ex / (thin_x or 1.0), ey / (thin_y or 1.0), MAP_TOLERANCE)
            paths.append({"x": ex[drawn], "y": ey[drawn], "order": np.arange(n)[drawn], "text": text[drawn],
                          "param": shown[drawn], "label": c["label"], "id": c["id"], "family": fam_of[c["id"]],
                          "focus": focus, "n": int(drawn.sum())})

    def stacked(parts, arrays, scalars):
        """One frame of the per-candidate pieces: array columns joined, scalar columns repeated."""
        out = {k: np.concatenate([np.asarray(pc[k]) for pc in parts]) for k in arrays}
        for k in scalars:
            out[k] = np.repeat(np.array([pc[k] for pc in parts], dtype=object if k != "focus" else bool),
                               [pc["n"] for pc in parts])
        return pd.DataFrame(out)

    reg = stacked(regions, ("x", "lo", "hi"), ("label", "id", "family", "focus")) if regions else pd.DataFrame(
        columns=["x", "lo", "hi", "label", "id", "family", "focus"])
    pth = stacked(paths, ("x", "y", "order", "text", "param"), ("label", "id", "family", "focus")) if paths \
        else pd.DataFrame(columns=["x", "y", "order", "text", "param", "label", "id", "family", "focus"])
    pts = pd.DataFrame({"x": cand["elongation_pct"].to_numpy(float), "y": cand[y].to_numpy(float),
                        "label": cand["label"], "id": cand["id"], "grade": cand["grade"],
                        "tag": [f"{i} {g}" if (p or i == picked) else i
                                for i, g, p in zip(cand["id"], cand["grade"], cand["pareto"].astype(bool))],
                        "family": [fam_of[i] for i in cand["id"]],
                        "route": cand["route_text"], "window": cand.get("window", ""),
                        "set": np.where(cand["pareto"].astype(bool), "Pareto set", "meets targets"),
                        "focus": (cand["id"] == picked).to_numpy(),
                        "cost": cand["relative_cost"].to_numpy(float)})
    pts["tag"] = _declutter(pts["x"].to_numpy(float), pts["y"].to_numpy(float), list(pts["tag"]),
                            pts["focus"].to_numpy(bool), span_x, span_y)
    for frame in (reg, pth, pts):
        for col in ("y", "lo", "hi"):
            if col in frame:
                frame[col] = to_display(frame[col].to_numpy(float), "stress", system)
    return {"regions": reg, "paths": pth, "points": pts}


#: nearest distance between two direct labels on the map, as a share of the drawn spread
LABEL_GAP = 0.05


def _declutter(x: np.ndarray, y: np.ndarray, tags: list, focus: np.ndarray, span_x: float, span_y: float) -> list:
    """The direct labels of the chosen states with those too close to a label already
    placed left blank (the focus first, then in rank order): a crowded corner keeps one
    readable label; every state stays in the tooltip and the table."""
    sx, sy = (span_x or 1.0), (span_y or 1.0)
    order = list(np.flatnonzero(focus)) + [i for i in range(len(tags)) if not focus[i]]
    placed, out = [], list(tags)
    for i in order:
        if any(abs(x[i] - x[j]) / sx < LABEL_GAP * 2 and abs(y[i] - y[j]) / sy < LABEL_GAP for j in placed):
            out[i] = ""
        else:
            placed.append(i)
    return out


def _param_text(v: float, q: str | None, u: str) -> str:
    if q == "temperature":
        return f"{v:.0f}°"
    if q == "length":
        return f"{v:.3g} {u}"
    return f"{v:.3g} {u}".strip()


def _domain(values, pad=0.06, floor=None):
    v = np.asarray([x for x in values if x is not None and x == x], float)
    if len(v) == 0:
        return [0.0, 1.0]
    lo, hi = float(v.min()), float(v.max())
    span = (hi - lo) or max(abs(hi), 1.0) * 0.1
    lo, hi = lo - pad * span, hi + pad * span
    if floor is not None:
        lo = max(lo, floor)
    return [lo, hi]


#: colours of the route families on the map, given to the families drawn in alphabetical order
#: (so a new family needs no entry here); dark enough for thin lines and text on white
FAMILY_COLOURS = ["#0f5e7a", "#b24a12", "#4a7a1c", "#7b2f66", "#8f6f10", "#34449a", "#9a2a35", "#1f7a68",
                  "#5c4b30", "#5a5a5a"]
#: colour of the target limits on the map
LIMIT_COLOUR = "#6d5a12"


#: decimals of the map's data in the spec (display units): elongation in %, stress in MPa or ksi
MAP_DECIMALS = {"x": 2, "stress": {"SI": 1, "US": 2}, "cost": 3}


def _rounded(values, decimals: int | None) -> list:
    """Floats of ``values`` rounded to ``decimals`` (``None``: 4 significant digits), NaN as null."""
    v = np.asarray(values, float)
    if decimals is None:
        with np.errstate(divide="ignore", invalid="ignore"):
            mag = np.where(np.isfinite(v) & (v != 0), np.floor(np.log10(np.abs(np.where(v == 0, 1, v)))), 0)
        scale = 10.0 ** (3 - mag)
        v = np.round(v * scale) / scale
    else:
        v = np.round(v, decimals)
    return [None if x != x else x for x in v.tolist()]


def _records(frame: pd.DataFrame, columns: Mapping[str, int | None | str]) -> list:
    """Rows of ``frame`` as JSON records with only ``columns`` (name -> decimals for
    floats, ``None`` for 4 significant digits, ``"text"``, ``"int"`` or ``"bool"``)."""
    cols = {}
    for name, kind in columns.items():
        col = frame[name]
        if kind == "text":
            cols[name] = [str(v) for v in col]
        elif kind == "bool":
            cols[name] = [bool(v) for v in col]
        elif kind == "int":
            cols[name] = [int(v) for v in col]
        else:
            cols[name] = _rounded(col.to_numpy(float), kind)
    names = list(cols)
    return [dict(zip(names, row)) for row in zip(*cols.values())]


def strength_elongation_chart(frames: dict, targets: Mapping, y: str, system: str,
                              picked: str | None = None, height: int = 500) -> dict:
    """Strength (yield or tensile) against elongation, drawn as process paths: the
    map's Vega-Lite spec (a dict; see below for why no Altair objects).

    Encoding (the page's own): each candidate is its **process path** at the nominal
    composition, a line through the states of its main parameter with the parameter
    value written at its ends (when the path is long enough to read them) and along the
    focus path; the spread over composition
    corners and the window is two **thin dotted edges** (lower and upper), not a
    filled area; **colour is the route family** (one short legend of families);
    each chosen state is a **square** (filled: Pareto set; open: meets the targets)
    labelled directly with its id (and grade, for the Pareto set and the focus; in a
    crowded corner only the first label is written); the
    candidate in focus has a heavy path
    and a cross-hair on its chosen state; the **targets** are dashed limit lines, each
    named at its end, with a check-mark text in the corner that meets them all.

    The spec is written directly as a dict (Vega-Lite 6 grammar): building it through
    Altair objects cost several tenths of a second per draw on the page (the map is
    redrawn at every change of targets, section or units).  Its data carry only the
    columns the layers use, rounded for display (:data:`MAP_DECIMALS`), in named
    datasets that the layers share (``regions``, ``paths``, ``points``, ``targets``, and
    ``frame``: the two corners of the axes' extent, drawn as empty text);
    the rows of a region or path name their candidate by id and take its label, family
    and focus from its point (a lookup), not repeated on every row.  Every value that
    depends on the candidates is in the datasets, none in the rest of the spec, so that
    a change of targets or section that keeps the kinds of target only replaces the
    data of the chart in the browser.  The tests check the spec against the Vega-Lite
    schema.

    >>> f = {"regions": pd.DataFrame(columns=["x", "lo", "hi", "label", "id", "family", "focus"]),
    ...      "paths": pd.DataFrame(columns=["x", "y", "order", "text", "param", "label", "id", "family", "focus"]),
    ...      "points": pd.DataFrame({"x": [10.0], "y": [800.04], "label": ["C1 4140"], "id": ["C1"],
    ...                              "tag": ["C1 4140"], "family": ["harden + temper"], "route": ["r"],
    ...                              "window": ["w"], "set": ["Pareto set"], "focus": [True], "cost": [1.5]})}
    >>> spec = strength_elongation_chart(f, {"min_yield_mpa": 700.0}, "yield_mpa", "SI", picked="C1")
    >>> spec["datasets"]["points"][0]["y"], [l["mark"]["type"] for l in spec["layer"]]
    (800.0, ['text', 'rule', 'text', 'text', 'point', 'text', 'point'])
    """
    reg, pth, pts = frames["regions"], frames["paths"], frames["points"]
    su = unit("stress", system)
    sd = MAP_DECIMALS["stress"]["US" if system == US else "SI"]
    ytitle = ("Yield strength" if y == "yield_mpa" else "Tensile strength") + f" ({su})"
    which = "yield" if y == "yield_mpa" else "uts"
    tmin, tmax = targets.get(f"min_{which}_mpa"), targets.get(f"max_{which}_mpa")
    emin = targets.get("min_elongation_pct")
    ys = list(reg.get("lo", [])) + list(reg.get("hi", [])) + list(pts["y"])
    xs = list(reg.get("x", [])) + list(pts["x"])
    ys += [to_display(v, "stress", system) for v in (tmin, tmax) if v is not None]
    xs += [emin] if emin is not None else []
    xdom, ydom = _domain(xs, floor=0.0), _domain(ys, floor=0.0)
    xdom, ydom = [round(v, 3) for v in xdom], [round(v, 3) for v in ydom]
    # no value of the data in the spec itself (domains, the families present): after a change of
    # targets or section only the datasets differ, and the browser replaces the data of the chart
    # it has drawn instead of building a new one (Streamlit keeps the chart while its spec without
    # the datasets is unchanged); the axes' extent is the ``frame`` dataset (two invisible corners),
    # the colours follow the families present, in alphabetical order
    colour = {"field": "family", "type": "nominal", "title": "route family", "sort": "ascending",
              "scale": {"range": FAMILY_COLOURS},
              "legend": {"orient": "top", "direction": "horizontal", "labelLimit": 0, "title": None,
                         "symbolType": "stroke", "symbolStrokeWidth": 3, "columns": 2}}
    xscale, yscale = {"nice": False, "zero": False}, {"nice": False, "zero": False}
    x = {"field": "x", "type": "quantitative", "title": "Elongation (%)", "scale": xscale}
    yy = {"field": "y", "type": "quantitative", "title": ytitle, "scale": yscale}

    def when_focus(on, off):
        return {"condition": {"test": "datum.focus", "value": on}, "value": off}

    def only(test):
        return [{"filter": test}]

    # the rows of the regions and paths carry the candidate's id only; its label, family and
    # focus come from its point (every drawn candidate has one)
    from_points = [{"lookup": "id", "from": {"data": {"name": "points"}, "key": "id",
                                             "fields": ["label", "family", "focus"]}}]

    datasets, layers = {"frame": [{"x": xdom[0], "y": ydom[0]}, {"x": xdom[1], "y": ydom[1]}]}, []
    layers.append({"data": {"name": "frame"}, "mark": {"type": "text", "text": ""},
                   "encoding": {"x": {"field": "x", "type": "quantitative", "scale": xscale},
                                "y": {"field": "y", "type": "quantitative", "scale": yscale}}})
    # the targets: dashed limits named at their ends, a check mark in the corner that meets them all
    limits = []
    for v, name in ((tmin, f"min {which if which == 'yield' else 'tensile'}"),
                    (tmax, f"max {which if which == 'yield' else 'tensile'}")):
        if v is not None:
            shown = float(to_display(v, "stress", system))
            limits.append({"kind": "stress", "x": xdom[1], "y": round(shown, sd), "t": f"{name} {shown:.4g}"})
    if emin is not None:
        limits.append({"kind": "elongation", "x": round(float(emin), 3), "y": None,
                       "t": f"min elongation {emin:.3g} %"})
    if limits:
        top_y = round(float(to_display(tmax, "stress", system)), sd) if tmax is not None else ydom[1]
        limits.append({"kind": "corner", "x": xdom[1], "y": top_y, "t": "✓ meets the targets"})
        datasets["targets"] = limits
        rule = {"type": "rule", "color": LIMIT_COLOUR, "strokeDash": [8, 4], "strokeWidth": 1.4}
        if tmin is not None or tmax is not None:
            stress = only("datum.kind == 'stress'")
            layers.append({"data": {"name": "targets"}, "transform": stress, "mark": rule,
                           "encoding": {"y": {"field": "y", "type": "quantitative", "scale": yscale}}})
            layers.append({"data": {"name": "targets"}, "transform": stress,
                           "mark": {"type": "text", "align": "right", "dx": -4, "dy": -6, "color": LIMIT_COLOUR,
                                    "fontSize": 11},
                           "encoding": {"x": {"field": "x", "type": "quantitative", "scale": xscale},
                                        "y": {"field": "y", "type": "quantitative", "scale": yscale},
                                        "text": {"field": "t", "type": "nominal"}}})
        if emin is not None:
            elong = only("datum.kind == 'elongation'")
            layers.append({"data": {"name": "targets"}, "transform": elong, "mark": rule,
                           "encoding": {"x": {"field": "x", "type": "quantitative", "scale": xscale}}})
            layers.append({"data": {"name": "targets"}, "transform": elong,
                           "mark": {"type": "text", "align": "left", "dx": 4, "dy": 10, "color": LIMIT_COLOUR,
                                    "fontSize": 11, "angle": 0},
                           "encoding": {"x": {"field": "x", "type": "quantitative", "scale": xscale},
                                        "y": {"value": 0}, "text": {"field": "t", "type": "nominal"}}})
        layers.append({"data": {"name": "targets"}, "transform": only("datum.kind == 'corner'"),
                       "mark": {"type": "text", "align": "right", "baseline": "top", "dx": -6, "dy": 6,
                                "color": LIMIT_COLOUR, "fontStyle": "italic", "fontSize": 12},
                       "encoding": {"x": {"field": "x", "type": "quantitative", "scale": xscale},
                                    "y": {"field": "y", "type": "quantitative", "scale": yscale},
                                    "text": {"field": "t", "type": "nominal"}}})
    # the scatter over composition and window: two thin dotted edges per candidate
    if len(reg):
        datasets["regions"] = _records(reg, {"x": MAP_DECIMALS["x"], "lo": sd, "hi": sd, "id": "text"})
        for edge in ("lo", "hi"):
            layers.append({"data": {"name": "regions"}, "transform": from_points,
                           "mark": {"type": "line", "strokeDash": [1.5, 2.5], "interpolate": "linear"},
                           "encoding": {"x": x, "y": {**yy, "field": edge}, "color": colour,
                                        "detail": {"field": "id", "type": "nominal"},
                                        "strokeWidth": when_focus(1.4, 0.7), "opacity": when_focus(0.9, 0.45),
                                        "tooltip": [{"field": "label", "type": "nominal", "title": "candidate"}]}})
    # the process paths, labelled with the parameter value
    if len(pth):
        datasets["paths"] = _records(pth, {"x": MAP_DECIMALS["x"], "y": sd, "order": "int", "text": "text",
                                           "param": None, "id": "text"})
        layers.append({"data": {"name": "paths"}, "transform": from_points, "mark": {"type": "line"},
                       "encoding": {"x": x, "y": yy, "order": {"field": "order", "type": "quantitative"},
                                    "color": colour, "detail": {"field": "id", "type": "nominal"},
                                    "strokeWidth": when_focus(3.2, 1.3), "opacity": when_focus(1.0, 0.6),
                                    "tooltip": [{"field": "label", "type": "nominal", "title": "candidate"},
                                                {"field": "param", "type": "quantitative", "title": "process value",
                                                 "format": ".4g"},
                                                {"field": "x", "type": "quantitative", "title": "elongation %",
                                                 "format": ".1f"},
                                                {"field": "y", "type": "quantitative", "title": su,
                                                 "format": ".4g"}]}})
        layers.append({"data": {"name": "paths"}, "transform": only("datum.text != ''") + from_points,
                       "mark": {"type": "text", "dx": 6, "dy": 8, "fontSize": 10, "align": "left"},
                       "encoding": {"x": x, "y": yy, "text": {"field": "text", "type": "nominal"},
                                    "color": colour}})
    # the chosen states: squares, filled for the Pareto set, labelled directly
    datasets["points"] = _records(pts, {"x": MAP_DECIMALS["x"], "y": sd, "label": "text", "id": "text",
                                        "tag": "text", "family": "text", "route": "text", "window": "text",
                                        "set": "text", "focus": "bool", "cost": MAP_DECIMALS["cost"]})
    layers.append({"data": {"name": "points"}, "mark": {"type": "point", "shape": "square", "size": 110,
                                                        "strokeWidth": 1.8},
                   "encoding": {"x": x, "y": yy, "color": colour,
                                "fill": {"condition": {"test": "datum.set == 'Pareto set'", **colour},
                                         "value": "white"},
                                "tooltip": [{"field": "label", "type": "nominal", "title": "candidate"},
                                            {"field": "route", "type": "nominal"},
                                            {"field": "window", "type": "nominal"},
                                            {"field": "set", "type": "nominal", "title": "status"},
                                            {"field": "x", "type": "quantitative", "title": "elongation %",
                                             "format": ".1f"},
                                            {"field": "y", "type": "quantitative", "title": su, "format": ".4g"},
                                            {"field": "cost", "type": "quantitative", "title": "relative cost/kg",
                                             "format": ".2f"}]}})
    layers.append({"data": {"name": "points"}, "transform": only("datum.tag != ''"),
                   "mark": {"type": "text", "align": "left", "dx": 8, "dy": -8, "fontWeight": "bold",
                            "fontSize": 11},
                   "encoding": {"x": x, "y": yy, "text": {"field": "tag", "type": "nominal"}, "color": colour}})
    if picked is not None and (pts["id"] == picked).any():
        layers.append({"data": {"name": "points"}, "transform": only("datum.focus"),
                       "mark": {"type": "point", "shape": "cross", "size": 520, "filled": False,
                                "strokeWidth": 1.6, "color": "#111111"},
                       "encoding": {"x": x, "y": yy}})
    return {"$schema": VEGA_LITE_SCHEMA, "config": {"view": {"continuousWidth": 300, "continuousHeight": 300}},
            "height": height, "datasets": datasets, "layer": layers}


def profile_frame(profiles: Mapping[str, list], system: str, families: Mapping[str, str] | None = None
                  ) -> pd.DataFrame:
    """Long frame of hardness profiles: ``label -> evaluate()["profile"]`` to columns
    ``label, depth, r_over_R, hardness_hv, hardness_hrc, hardness_hb`` (depth in display
    units; HB from the profile's HV on the ASTM E140 steel table of the library,
    :func:`selector.routes.evaluate.scale_hardness`, given each label's grade family)."""
    rows = []
    for label, prof in profiles.items():
        for p in prof or []:
            rows.append({"label": label, "depth": to_display(p["depth_mm"], "length", system),
                         "r_over_R": p["r_over_R"], "hardness_hv": p["hardness_hv"],
                         "hardness_hrc": p.get("hardness_hrc")})
    out = pd.DataFrame(rows, columns=["label", "depth", "r_over_R", "hardness_hv", "hardness_hrc"])
    fam = np.array([(families or {}).get(lab, "") for lab in out["label"]], dtype=object)
    out["hardness_hb"] = scale_hardness(out["hardness_hv"].to_numpy(float), fam)["hb"] if len(out) else []
    return out


def profile_chart(frame: pd.DataFrame, system: str, labels: Sequence[str] | None = None,
                  height: int = 320, title: str = "Hardness across the section",
                  colours: Sequence[str] | None = None, scale: str = "HRC") -> alt.Chart:
    """Hardness (``scale``: HRC or HV, the page's one scale) against depth from the
    surface; one line per label on shared axes (colours: by candidate id unless given).
    HRC is blank where the profile is below the Rockwell C range."""
    labels = list(labels or dict.fromkeys(frame["label"]))
    colour = alt.Color("label:N", title="candidate",
                       scale=alt.Scale(domain=labels, range=list(colours or _colours_for(labels))),
                       legend=alt.Legend(orient="top", labelLimit=0, columns=1, title=None))
    lu = unit("length", system)
    return alt.Chart(frame).mark_line(point=alt.OverlayMarkDef(size=22), strokeWidth=2).encode(
        x=alt.X("depth:Q", title=f"Depth below the surface ({lu}); centre at the right"),
        y=alt.Y(f"hardness_{scale.lower()}:Q", title=f"Hardness ({scale})", scale=alt.Scale(zero=False)),
        color=colour,
        tooltip=[alt.Tooltip("label:N", title="candidate"), alt.Tooltip("depth:Q", format=".3g", title=lu),
                 alt.Tooltip("r_over_R:Q", format=".2f", title="r/R"),
                 alt.Tooltip("hardness_hv:Q", format=".0f", title="HV"),
                 alt.Tooltip("hardness_hrc:Q", format=".1f", title="HRC")],
    ).properties(height=height, title=title)


def _colours_for(labels: Sequence[str]) -> list:
    """Palette colours by candidate id (``C3 …`` -> the third colour), so a candidate
    keeps its colour in every chart."""
    out = []
    for lab in labels:
        try:
            i = int(str(lab).split()[0][1:]) - 1
        except ValueError:
            i = len(out)
        out.append(PALETTE[i % len(PALETTE)])
    return out


def parameter_frame(states: pd.DataFrame, variant: str, system: str) -> pd.DataFrame:
    """Properties of one variant along its main parameter, per corner, long form:
    ``param, corner, quantity, value`` (strengths in display units)."""
    s = states[states["variant"] == variant].dropna(subset=["main_value"])
    rows = []
    for q, col in (("yield", "yield_mpa"), ("tensile", "uts_mpa"), ("elongation", "elongation_pct")):
        if col not in s:
            continue
        v = s[col].to_numpy(float)
        if col.endswith("_mpa"):
            v = to_display(v, "stress", system)
        rows.append(pd.DataFrame({"main_value": s["main_value"].to_numpy(float), "corner": s["corner"].to_numpy(),
                                  "quantity": q, "value": v}))
    return pd.concat(rows, ignore_index=True) if rows else pd.DataFrame(
        columns=["main_value", "corner", "quantity", "value"])


def parameter_charts(frame: pd.DataFrame, param: str, window: tuple, robust_window: tuple,
                     targets: Mapping, system: str, chosen: float | None = None) -> list:
    """Two charts on the same x axis (strength, then elongation) against the main
    process parameter: the nominal
    composition as a line, the lean–rich spread as a band, the window that meets the
    targets shaded (darker where it holds at every composition corner), the targets
    as rules and the chosen value as a vertical mark."""
    q = quantity_of(param)
    f = frame.copy()
    if q:
        f["main_value"] = to_display(f["main_value"].to_numpy(float), q, system)

    def conv(v):
        return to_display(v, q, system) if (q and v is not None and v == v) else v
    pu = param_unit(param, system)
    xt = f"{param_label(param).capitalize()} ({pu})" if pu else param_label(param).capitalize()
    xdom = _domain(f["main_value"], pad=0.02)
    x = alt.X("main_value:Q", title=xt, scale=alt.Scale(domain=xdom, nice=False))
    spread = f.pivot_table(index=["main_value", "quantity"], values="value", aggfunc=["min", "max"]).reset_index()
    spread.columns = ["main_value", "quantity", "lo", "hi"]
    nominal = f[f["corner"] == "nominal"]
    su = unit("stress", system)
    panels = []
    for qty, title, tkeys, qcol in ((("yield", "tensile"), f"Strength ({su})",
                                     ("min_yield_mpa", "max_yield_mpa", "min_uts_mpa", "max_uts_mpa"), "stress"),
                                    (("elongation",), "Elongation (%)", ("min_elongation_pct",), None)):
        sp = spread[spread["quantity"].isin(qty)]
        nm = nominal[nominal["quantity"].isin(qty)]
        layers = []
        if window and window[0] == window[0] and window[0] is not None:
            layers.append(alt.Chart(pd.DataFrame({"a": [conv(window[0])], "b": [conv(window[1])]}))
                          .mark_rect(color="#cfe3d6", opacity=0.7).encode(
                x=alt.X("a:Q", scale=alt.Scale(domain=xdom, nice=False)), x2="b:Q"))
        if robust_window and robust_window[0] == robust_window[0] and robust_window[0] is not None:
            layers.append(alt.Chart(pd.DataFrame({"a": [conv(robust_window[0])], "b": [conv(robust_window[1])]}))
                          .mark_rect(color="#8fbf9f", opacity=0.6).encode(
                x=alt.X("a:Q", scale=alt.Scale(domain=xdom, nice=False)), x2="b:Q"))
        qrange = {"yield": "#1b6f8a", "tensile": "#c2571a", "elongation": "#5b8c2a"}
        qcolour = alt.Color("quantity:N", title=None,
                            scale=alt.Scale(domain=list(qty), range=[qrange[k] for k in qty]),
                            legend=alt.Legend(orient="top", direction="horizontal"))
        ytitle = title
        layers.append(alt.Chart(sp).mark_area(opacity=0.22).encode(
            x=x, y=alt.Y("lo:Q", title=ytitle, scale=alt.Scale(zero=False)), y2="hi:Q", color=qcolour))
        layers.append(alt.Chart(nm).mark_line(strokeWidth=2, point=alt.OverlayMarkDef(size=16)).encode(
            x=x, y=alt.Y("value:Q", title=ytitle, scale=alt.Scale(zero=False)), color=qcolour,
            tooltip=[alt.Tooltip("main_value:Q", title=xt, format=".4g"), alt.Tooltip("quantity:N"),
                     alt.Tooltip("value:Q", format=".4g")]))
        rules = []
        for k in tkeys:
            v = targets.get(k)
            if v is not None:
                rules.append({"v": to_display(v, qcol, system) if qcol else v,
                              "t": k.replace("_mpa", "").replace("_pct", "").replace("_", " ")})
        if rules:
            rf = pd.DataFrame(rules)
            layers.append(alt.Chart(rf).mark_rule(color=TARGET_STROKE, strokeDash=[5, 3]).encode(y="v:Q"))
            layers.append(alt.Chart(rf).mark_text(align="left", dx=4, dy=-5, color=TARGET_STROKE, fontSize=10)
                          .encode(y="v:Q", x=alt.value(2), text="t:N"))
        if chosen is not None and chosen == chosen:
            layers.append(alt.Chart(pd.DataFrame({"c": [conv(chosen)]})).mark_rule(color="#111111", strokeWidth=1.5)
                          .encode(x=alt.X("c:Q", scale=alt.Scale(domain=xdom, nice=False))))
        panels.append(alt.layer(*layers).properties(height=210 if qcol else 170))
    return panels


def comparison_frame(cand: pd.DataFrame, ids: Sequence[str], system: str, hardness: str = "HRC") -> pd.DataFrame:
    """Properties of the chosen candidates in long form for the shared-axis bars:
    ``label, group, quantity, value`` (strengths in display units, hardness in the
    view's scale; the cost split into material and processing per kg where present)."""
    sub = cand[cand["id"].isin(list(ids))]
    rows = []
    su, hs, cu = unit("stress", system), hardness.lower(), unit("cost_per_mass", system)
    for _, r in sub.iterrows():
        for col, qty, group in (("yield_mpa", "yield", f"strength ({su})"), ("uts_mpa", "tensile", f"strength ({su})"),
                                ("elongation_pct", "elongation", "elongation (%)"),
                                (f"hardness_{hs}", "hardness", f"hardness ({hardness})"),
                                (f"surface_hardness_{hs}", "surface hardness", f"hardness ({hardness})"),
                                ("material_cost_per_kg", f"material {cu}", "relative cost"),
                                ("processing_cost_per_kg", f"processing {cu}", "relative cost"),
                                ("relative_cost", cu, "relative cost"),
                                ("part_cost", "per part", "relative cost")):
            v = r.get(col)
            if v is None or v != v:
                continue
            v = float(v)
            if col.endswith("_mpa"):
                v = float(to_display(v, "stress", system))
            elif col.endswith("_per_kg") or col == "relative_cost":
                v = float(to_display(v, "cost_per_mass", system))
            rows.append({"label": r["label"], "id": r["id"], "group": group, "quantity": qty, "value": v})
    return pd.DataFrame(rows, columns=["label", "id", "group", "quantity", "value"])


#: colours of the compared candidates, by their place in the comparison
COMPARE_COLOURS = ["#1b6f8a", "#c2571a", "#5b8c2a"]


def comparison_bars(frame: pd.DataFrame, group: str, labels: Sequence[str], height: int = 240,
                    legend: bool = False) -> alt.Chart:
    """Grouped bars of one property group (e.g. strength) for the compared
    candidates, on one shared value axis; the key names each candidate by its id
    (C1, C3 …: the comparison table above gives the full label), so that it fits a
    half-width column."""
    f = frame[frame["group"] == group]
    ids = [str(lab).split()[0] for lab in labels]
    return alt.Chart(f).mark_bar(cornerRadiusTopLeft=2, cornerRadiusTopRight=2).encode(
        x=alt.X("quantity:N", title=None, axis=alt.Axis(labelAngle=0, labelLimit=0)),
        xOffset=alt.XOffset("id:N", sort=ids),
        y=alt.Y("value:Q", title=group),
        color=alt.Color("id:N", title="candidate", sort=ids,
                        scale=alt.Scale(domain=ids, range=COMPARE_COLOURS[:len(ids)]),
                        legend=alt.Legend(orient="top", direction="horizontal", labelLimit=0, title=None)
                        if legend else None),
        tooltip=[alt.Tooltip("label:N", title="candidate"), "quantity:N", alt.Tooltip("value:Q", format=".4g")],
    ).properties(height=height)



def sweep_chart(sw: pd.DataFrame, system: str, height: int = 340) -> alt.LayerChart:
    """Relative part cost of the cheapest robust pick (left axis) and the minimum
    yield target (right axis) against the pin diameter; each diameter where the pick
    changes grade or route is marked (◆, a dashed rule and the new pick's label),
    and the first pick is labelled.  Diameters with no robust candidate are marked
    ✕ at the foot of the chart."""
    lu, su = unit("length", system), unit("stress", system)
    f = pd.DataFrame({"d": to_display(sw["diameter_mm"].to_numpy(float), "length", system),
                      "cost": sw["part_cost"].to_numpy(float),
                      "target": to_display(sw["min_yield_mpa"].to_numpy(float), "stress", system),
                      "pick": [pick_label(g, r) for g, r in zip(sw["grade"], sw["route_family"])],
                      "route": sw["route_text"].astype(str), "changed": sw["changed"].to_numpy(bool)})
    f["starts"] = f["changed"] | (np.arange(len(f)) == 0)
    series = alt.Scale(domain=["part cost", "min yield target"], range=[PALETTE[0], TARGET_STROKE])
    colour = alt.Color("series:N", title=None, scale=series, legend=alt.Legend(orient="top", direction="horizontal"))
    x = alt.X("d:Q", title=f"Pin diameter ({lu})", scale=alt.Scale(domain=_domain(f["d"], pad=0.04), nice=False))
    have = f[f["cost"].notna()].assign(series="part cost")
    ycost = alt.Y("cost:Q", title="Relative part cost (cheapest robust pick)", scale=alt.Scale(zero=False))
    tips = [alt.Tooltip("d:Q", title=lu, format=".4g"), alt.Tooltip("pick:N"), alt.Tooltip("route:N"),
            alt.Tooltip("cost:Q", title="part cost", format=".3f"),
            alt.Tooltip("target:Q", title=f"min yield ({su})", format=".4g")]
    cost = alt.Chart(have).mark_line(strokeWidth=2.4, point=alt.OverlayMarkDef(size=40, filled=True)).encode(
        x=x, y=ycost, color=colour, tooltip=tips)
    starts = have[have["starts"]]
    marks = alt.Chart(starts[starts["changed"]]).mark_point(shape="diamond", size=260, filled=True,
                                                          stroke="#111111", strokeWidth=1.2).encode(
        x=x, y=ycost, color=colour, tooltip=tips)
    # labels alternate above and below the line, so that picks at close diameters do not overlap
    starts = starts.assign(above=np.arange(len(starts)) % 2 == 0)
    labels = [alt.Chart(starts[starts["above"] == up]).mark_text(
        align="left", dx=8, dy=-14 if up else 16, fontWeight="bold", fontSize=11, color="#222222").encode(
        x=x, y=ycost, text="pick:N") for up in (True, False)]
    rules = alt.Chart(f[f["changed"]]).mark_rule(strokeDash=[4, 3], color="#555555").encode(x=x)
    none = alt.Chart(f[f["cost"].isna()]).mark_point(shape="cross", size=120, color="#a8323e", filled=True).encode(
        x=x, y=alt.value(height - 8), tooltip=[alt.Tooltip("d:Q", title=lu, format=".4g"), alt.Tooltip("pick:N")])
    target = alt.Chart(f.assign(series="min yield target")).mark_line(strokeDash=[6, 3], strokeWidth=1.6,
                                                                      point=alt.OverlayMarkDef(size=18)).encode(
        x=x, y=alt.Y("target:Q", title=f"Min yield target ({su})", scale=alt.Scale(zero=False),
                     axis=alt.Axis(orient="right")),
        color=colour, tooltip=tips)
    left = alt.layer(rules, cost, marks, *labels, none)
    return alt.layer(left, target).resolve_scale(y="independent").properties(
        height=height, title="Cheapest robust pick per diameter (◆ where the grade or route changes)")


def frontier_chart(frontier: pd.DataFrame, axes: Sequence[str], targets: Mapping, system: str,
                   height: int = 340):
    """The trade-off between the two most binding targets: the non-dominated states
    (:func:`~selector.selection.engine.miss_analysis`) as a step line with points, and the
    two target limits as dashed rules.  None when there is no frontier."""
    if frontier is None or len(frontier) == 0 or len(axes) != 2:
        return None
    (cx, _), (cy, _) = NUMERIC_TARGETS[axes[0]], NUMERIC_TARGETS[axes[1]]
    qx, qy = quantity_of(cx), quantity_of(cy)

    def conv(v, q):
        return to_display(np.asarray(v, float), q, system) if q else np.asarray(v, float)
    nx, ny = display_name(cx, system), display_name(cy, system)
    pm = frontier["p_meet"].to_numpy(float) if "p_meet" in frontier else np.full(len(frontier), np.nan)
    df = pd.DataFrame({"x": conv(frontier[cx], qx), "y": conv(frontier[cy], qy),
                       "grade": frontier["grade"].to_numpy(),
                       "route": [route_line(r, system, t) for r, t in zip(frontier["route"], frontier["route_text"])],
                       "p_meet": [percent(p) for p in pm]})
    enc_x = alt.X("x:Q", title=nx, scale=alt.Scale(zero=False))
    enc_y = alt.Y("y:Q", title=ny, scale=alt.Scale(zero=False))
    tips = [alt.Tooltip("grade:N"), alt.Tooltip("route:N"), alt.Tooltip("x:Q", title=nx, format=".4g"),
            alt.Tooltip("y:Q", title=ny, format=".4g"), alt.Tooltip("p_meet:N", title="p_meet")]
    line = alt.Chart(df).mark_line(interpolate="step-after", strokeWidth=1.5).encode(x=enc_x, y=enc_y)
    pts = alt.Chart(df).mark_point(filled=True, size=30).encode(x=enc_x, y=enc_y, tooltip=tips)
    layers = [line, pts]
    lx, ly = targets.get(axes[0]), targets.get(axes[1])
    if lx is not None:
        layers.append(alt.Chart(pd.DataFrame({"x": [float(conv(lx, qx))]}))
                      .mark_rule(strokeDash=[6, 3], color="firebrick").encode(x="x:Q"))
    if ly is not None:
        layers.append(alt.Chart(pd.DataFrame({"y": [float(conv(ly, qy))]}))
                      .mark_rule(strokeDash=[6, 3], color="firebrick").encode(y="y:Q"))
    return alt.layer(*layers).properties(
        height=height, title=alt.TitleParams([f"What can be reached: {ny} against {nx}",
                                              "with the other targets met (dashed: the targets)"]))


def fatigue_depth_frame(ev: Mapping, system: str) -> pd.DataFrame:
    """Long frame of ``evaluate()["fatigue"]["through_depth"]`` for the chart: columns
    ``depth, curve, stress`` (``curve``: local fatigue strength, or the applied stress
    scaled so that it touches the strength at the governing depth)."""
    td = (ev.get("fatigue") or {}).get("through_depth")
    if not td:
        return pd.DataFrame(columns=["depth", "curve", "stress"])
    depth = to_display(np.asarray(td["depth_mm"], float), "length", system)
    strength = to_display(np.asarray(td["strength_mpa"], float), "stress", system)
    applied = to_display(np.asarray(td["stress_per_surface"], float) * td["allowable_surface_mpa"], "stress", system)
    return pd.concat([pd.DataFrame({"depth": depth, "curve": "local fatigue strength", "stress": strength}),
                      pd.DataFrame({"depth": depth, "curve": "applied stress at the allowable surface stress",
                                    "stress": applied})], ignore_index=True)


def fatigue_depth_chart(frame: pd.DataFrame, system: str, height: int = 300) -> alt.Chart:
    """Local fatigue strength and the applied (bending) stress against depth; they touch
    at the governing depth."""
    su, lu = unit("stress", system), unit("length", system)
    return alt.Chart(frame).mark_line(point=alt.OverlayMarkDef(size=18), strokeWidth=2).encode(
        x=alt.X("depth:Q", title=f"Depth below the surface ({lu})"),
        y=alt.Y("stress:Q", title=f"Stress amplitude ({su})"),
        color=alt.Color("curve:N", title=None, legend=alt.Legend(orient="top", labelLimit=0, columns=1)),
        tooltip=[alt.Tooltip("curve:N"), alt.Tooltip("depth:Q", format=".3g", title=lu),
                 alt.Tooltip("stress:Q", format=".4g", title=su)],
    ).properties(height=height, title=alt.TitleParams(["Fatigue strength and applied stress", "through the section"]))


