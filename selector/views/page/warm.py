"""The page's warm start: compute the example's answer once in the server process,
before the first browser connects (``streamlit run serve.py``; ``streamlit run app.py``
computes it on the first visit instead).

:func:`warm_up` imports what the page imports, then calls the page's own cached
wrappers with the arguments of the example's first run (:func:`example_args`), so that
the first visit finds the expansion, the ranking and the map in the caches of the
process.  The numbers
are the library's, exactly as on the page.
"""
from __future__ import annotations

import contextlib
import importlib
import os
import sys
import time

from selector.catalogue.grades import FAMILIES
from selector.selection.targets import validate_targets
from selector.views.units import SI, to_si

from . import cache, charts, text
from .inputs import example_inputs, page_service, page_targets, rank_args_of, targets_key
from .tables import display_table
from .units import si_key


def example_args() -> tuple:
    """``(prepare_args, rank_args, targets)`` of the page's first run on the example (SI
    units, every family, the catalogue's prices), computed from the inputs as the page
    computes them."""
    v = example_inputs(SI)
    d = si_key(to_si(v["diameter"], "length", SI), "length")
    length = si_key(to_si(v["length"], "length", SI), "length")
    targets = validate_targets(page_targets(v, SI), FAMILIES)
    prep = (d, None, length, ())
    rank = rank_args_of(prep, targets, page_service(v, SI), v)
    return prep, rank, targets


#: modules that the page's script imports on its first run besides those above (its views and
#: Streamlit's own helpers of the first answer): imported here so that the first visit does not
PAGE_MODULES = ("selector.design.sweep", "selector.routes.transformation_curves", "selector.views.charts_beyond",
                "selector.views.page_parts", "streamlit.emojis", "streamlit.dataframe_util",
                "streamlit.delta_generator")


#: the section of :func:`build_process_tables`: the example's diameter times the step of the
#: R20 series of preferred numbers (ISO 3: 10^(1/20) = 1.122; 25 -> 28.05 mm), about the next size up
NEXT_SIZE_RATIO = 10 ** (1 / 20)


@contextlib.contextmanager
def _disk_cache_off():
    """The library's table cache on disk off for the calls inside (``SELECTOR_DISK_CACHE=0``,
    :mod:`selector.cache`), the variable restored after.  Only for the warm start, which
    runs before the server takes its first visit (no other thread calls the library)."""
    old = os.environ.get("SELECTOR_DISK_CACHE")
    os.environ["SELECTOR_DISK_CACHE"] = "0"
    try:
        yield
    finally:
        if old is None:
            os.environ.pop("SELECTOR_DISK_CACHE", None)
        else:
            os.environ["SELECTOR_DISK_CACHE"] = old


def build_process_tables() -> float:
    """Rank the example at the next preferred size up (:data:`NEXT_SIZE_RATIO`) through the
    page's caches with the disk cache off, so that the library builds in this process the
    tables that its first new section builds (composition sensitivity, Monte Carlo draws):
    when the example's table is read from the disk cache they are not built, and the
    user's first change of section paid them (measured 1.32 + 0.71 s prepare + rank at
    the first new section, 0.84 + 0.34 s at the next, 3 December 2026, load 4.4); the
    seconds it took."""
    t0 = time.perf_counter()
    prep, rank, _ = example_args()
    if prep[0] is not None:
        with _disk_cache_off():
            cache.cached_rank(si_key(prep[0] * NEXT_SIZE_RATIO, "length"), *rank[1:])
    return time.perf_counter() - t0


def warm_up() -> float:
    """Compute the example's answer through the page's caches, and do once what the
    first run of the page's script would do first (import its modules, shape the
    candidate table and its CSV, convert the table and the map's data as Streamlit
    sends them); the seconds it took."""
    t0 = time.perf_counter()
    for name in PAGE_MODULES:
        importlib.import_module(name)
    prep, rank, targets = example_args()
    cand = cache.cached_rank(*rank)
    if len(cand):
        spec = cache.cached_map(prep, rank, targets_key(targets), min(15, len(cand)), "yield_mpa", SI,
                                cand["variant"].iloc[0])
        # the hull of every candidate's scatter (remembered per input by the map's geometry), so that
        # a first change of targets, which draws other candidates of the same section, finds them
        charts.remember_hulls(cache.cached_variant_states(*prep, tuple(sorted(set(cand["variant"])))))
        text.ranking_summary(cand)
        table = display_table(cand, SI, "HRC")
        text.to_csv(table)
        to_arrow = sys.modules["streamlit.dataframe_util"].convert_anything_to_arrow_bytes
        for data in (table, *spec.get("datasets", {}).values()):
            to_arrow(data)
    # Streamlit checks once per process, on the first element a script draws, whether it runs in
    # an interactive interpreter, by walking the call stack and the source file of every frame
    # (a quarter of a second here): done now, the first visit does not pay it
    check = getattr(sys.modules["streamlit.delta_generator"], "_maybe_print_use_warning", None)
    if check is not None:
        check()
    return time.perf_counter() - t0
