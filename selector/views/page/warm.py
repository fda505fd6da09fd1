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

import time

from selector.catalogue.grades import FAMILIES
from selector.selection.targets import validate_targets
from selector.views.units import SI, to_si

from . import cache, text
from .inputs import example_inputs, page_service, page_targets, rank_args_of, targets_key
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


def warm_up() -> float:
    """Compute the example's answer through the page's caches; the seconds it took."""
    t0 = time.perf_counter()
    prep, rank, targets = example_args()
    cand = cache.cached_rank(*rank)
    if len(cand):
        cache.cached_map(prep, rank, targets_key(targets), min(15, len(cand)), "yield_mpa", SI,
                         cand["variant"].iloc[0])
        text.ranking_summary(cand)
    return time.perf_counter() - t0
