"""The page's cached calls of the library (keyed by hashable arguments: SI values
rounded by :func:`~selector.views.page.units.si_key`, targets and contexts as
sorted JSON).  The expensive, target-independent expansion is cached per section,
length and price sheet as one shared object of the server process
(``st.cache_resource``: no copy per run, and the library's own memos of that table,
the Monte Carlo draws and the caution masks, stay valid), so that a change of
targets only re-ranks; the smaller results are ``st.cache_data``.  A unit switch
recomputes nothing: every wrapper counts its cache misses in :data:`CALLS`, which
the page shows in its footer and the tests read."""
from __future__ import annotations

import contextlib
import json
import threading
import time
from collections import Counter

import pandas as pd
import streamlit as st

import selector
from selector.design.sweep_picks import sweep_with_picks
from selector.selection import engine
from selector.selection.cost_split import split_cost

from . import charts
from .text import label_candidates

#: library computations of this server process, per cached wrapper (its cache misses)
CALLS: Counter = Counter()
#: seconds spent in them, per cached wrapper
SECONDS: Counter = Counter()
_CALLS_LOCK = threading.Lock()


@contextlib.contextmanager
def _count(name: str):
    """Count one cache miss of ``name`` and add the seconds of its body to :data:`SECONDS`."""
    with _CALLS_LOCK:
        CALLS[name] += 1
    t0 = time.perf_counter()
    try:
        yield
    finally:
        with _CALLS_LOCK:
            SECONDS[name] += time.perf_counter() - t0


def library_calls() -> int:
    """Library computations made by the page's cached wrappers in this process so far
    (a re-run that finds every result in the cache adds none)."""
    with _CALLS_LOCK:
        return sum(CALLS.values())


def library_seconds() -> float:
    """Seconds spent in the library computations of :func:`library_calls` so far (each
    wrapper times its own library call only, never another wrapper's)."""
    with _CALLS_LOCK:
        return sum(SECONDS.values())


# --------------------------------------------------------------------------- cached library calls

def _prices(price_items) -> dict | None:
    return dict(price_items) if price_items else None


@st.cache_resource(show_spinner="Expanding the catalogue over every process window…", max_entries=8)
def cached_prepare(diameter_mm, thickness_mm, length_mm, price_items=()) -> pd.DataFrame:
    """:func:`~selector.selection.engine.prepare`, cached per section, length and
    price sheet (``price_items``: sorted ``(grade, price)`` pairs).  One shared,
    read-only table per key (never copied, never modified by the page)."""
    with _count("prepare"):
        return engine.prepare(diameter_mm, thickness_mm, length_mm, _prices(price_items))


@st.cache_data(show_spinner="Ranking…", max_entries=64)
def cached_rank(diameter_mm, thickness_mm, length_mm, price_items, targets_json, robust_only=False,
                min_p_meet=0.9, allow=(), service_json="{}"):
    """:func:`~selector.selection.engine.rank` on the cached prepared table
    (``targets_json``: the SI targets as sorted JSON, so the cache key is stable;
    ``allow``: a tuple of caution codes; ``service_json``: the caution context as
    JSON, see :func:`service_context`), labelled (``id``, ``label``) and with the
    material and processing parts of the cost (:func:`~selector.selection.cost_split.split_cost`)
    when it has rows."""
    prepared = cached_prepare(diameter_mm, thickness_mm, length_mm, price_items)
    with _count("rank"):
        cand = engine.rank(prepared, json.loads(targets_json), robust_only=robust_only, min_p_meet=min_p_meet,
                           allow=list(allow), service=json.loads(service_json) or None)
        return split_cost(label_candidates(cand)) if len(cand) else cand


@st.cache_data(show_spinner="Looking for what can be reached…", max_entries=16)
def cached_miss_analysis(diameter_mm, thickness_mm, length_mm, price_items, targets_json, n=10) -> dict:
    """:func:`~selector.selection.engine.miss_analysis`, cached."""
    with _count("miss_analysis"):
        return engine.miss_analysis(json.loads(targets_json), diameter_mm, thickness_mm=thickness_mm,
                                    length_mm=length_mm, price_sheet=_prices(price_items), n=n)


@st.cache_data(show_spinner="Looking for the nearest misses…", max_entries=16)
def cached_nearest_misses(diameter_mm, thickness_mm, length_mm, price_items, targets_json, n=10):
    """:func:`~selector.selection.engine.nearest_misses`, cached."""
    with _count("nearest_misses"):
        return engine.nearest_misses(json.loads(targets_json), diameter_mm, thickness_mm=thickness_mm,
                                     length_mm=length_mm, price_sheet=_prices(price_items), n=n)


@st.cache_data(show_spinner=False, max_entries=64)
def cached_variant_states(diameter_mm, thickness_mm, length_mm, price_items, variants: tuple) -> pd.DataFrame:
    """The rows of the prepared table that belong to ``variants`` (every corner and
    every value of the main parameter): the reachable region of each candidate."""
    prepared = cached_prepare(diameter_mm, thickness_mm, length_mm, price_items)
    with _count("variant_states"):
        cols = [c for c in ("variant", "grade", "route", "corner", "main_value", "yield_mpa", "uts_mpa",
                            "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
                            "case_depth_mm") if c in prepared.columns]
        sub = prepared.loc[prepared["variant"].isin(list(variants)), cols]
        return sub.reset_index(drop=True)


@st.cache_data(show_spinner=False, max_entries=128)
def cached_evaluate(grade: str, route_json: str, diameter_mm, thickness_mm, composition="nominal",
                    heat_json: str | None = None) -> dict:
    """:func:`selector.evaluate` of one candidate (``route_json``: its steps as JSON;
    ``heat_json``: a heat analysis as JSON, element → wt %)."""
    with _count("evaluate"):
        return selector.evaluate(grade, json.loads(route_json), diameter_mm=diameter_mm,
                                 thickness_mm=thickness_mm, composition=composition,
                                 heat_composition=None if heat_json is None else json.loads(heat_json))


@st.cache_data(show_spinner=False, max_entries=16)
def cached_sweep(diameters_mm: tuple, case_json: str, extra_json: str = "{}", price_items=(),
                 context_json: str = "{}") -> pd.DataFrame:
    """:func:`selector.design.sweep_picks.sweep_with_picks` of the load case
    (``case_json``: the keywords of ``pin_report`` but the diameter), with the
    sidebar's other targets (``extra_json``), the price sheet and the service
    conditions for the cautions; ``route`` holds the steps of each pick.  Cached per
    argument set: the sweep runs the selection once per diameter."""
    with _count("sweep"):
        return sweep_with_picks(list(diameters_mm), **json.loads(case_json),
                                extra_targets=json.loads(extra_json) or None,
                                price_sheet=_prices(price_items), caution_context=json.loads(context_json))


@st.cache_data(show_spinner="Looking for cheaper alternatives…", max_entries=32)
def cached_alternatives(grade: str, route_json: str, diameter_mm, thickness_mm, length_mm, price_items=()):
    """:func:`~selector.selection.engine.alternatives` of a grade and route at the
    section, length and price sheet in force, with the material and processing parts
    of each cost (:func:`selector.selection.cost_split.split_cost`); the reference's
    own split in ``attrs["reference"]``."""
    with _count("alternatives"):
        alt = engine.alternatives(grade, json.loads(route_json), diameter_mm,
                                  thickness_mm=thickness_mm, length_mm=length_mm, price_sheet=_prices(price_items))
    ref = dict(alt.attrs["reference"])
    ref_split = split_cost(pd.DataFrame({"route_family": [ref["route_family"]],
                                         "relative_cost": [ref["relative_cost"]]}))
    ref["material_cost_per_kg"] = float(ref_split["material_cost_per_kg"].iloc[0])
    ref["processing_cost_per_kg"] = float(ref_split["processing_cost_per_kg"].iloc[0])
    out = split_cost(alt)
    out.attrs["reference"] = ref
    return out


@st.cache_data(show_spinner=False, max_entries=32)
def cached_map(prepare_args: tuple, rank_args: tuple, targets_json: str, n_drawn: int, y: str, system: str,
               picked_variant: str) -> dict:
    """The Vega-Lite spec of the strength-elongation map (:func:`~selector.views.page.charts.strength_elongation_chart`)
    of the first ``n_drawn`` candidates of ``cached_rank(*rank_args)`` and the one in
    focus, in the display units of ``system``: a display, not a library computation
    (built from the cached ranking and states; kept so that a second visit or a
    return to earlier inputs draws it at once)."""
    cand = cached_rank(*rank_args)
    top = cand.head(n_drawn)
    states = cached_variant_states(*prepare_args, tuple(sorted(set(top["variant"]) | {picked_variant})))
    picked_id = cand.set_index("variant").loc[picked_variant, "id"]
    frames = charts.chart_frames(states, top, y, system, picked=picked_id)
    return charts.chart_spec(charts.strength_elongation_chart(frames, json.loads(targets_json), y, system,
                                                              picked=picked_id))
