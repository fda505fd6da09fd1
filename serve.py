"""The local page with a warm start: ``streamlit run serve.py`` serves ``app.py`` (the
same page, the same options) and computes the example's answer while the server starts,
so that the first visit finds it ready, and ranks it at the next preferred size up with the
library's disk cache off, so that the library's per-process tables of a new section are built
before the first change of section (:func:`selector.views.page.warm.build_process_tables`).
``streamlit run app.py`` serves the same page and computes the answer on the first visit
instead.

Results are estimates for preliminary selection: see the cautions on the page and in
the README; the final choice needs certified material test reports and review by a
qualified, licensed engineer under the codes that apply.
"""
from __future__ import annotations

import asyncio
import contextlib
import sys

import streamlit as st


@contextlib.asynccontextmanager
async def _warm_start(_app):
    from selector.views.page.warm import build_process_tables, warm_up      # lazy: imported once the server starts

    seconds = await asyncio.to_thread(warm_up)
    # before the first visit (no session calls the library meanwhile: the disk cache is switched off for it)
    built = await asyncio.to_thread(build_process_tables)
    print(f"selector page: the example's answer computed in {seconds:.1f} s, the library's tables of a new section "
          f"in {built:.1f} s; serving", file=sys.stderr)
    yield


app = st.App("app.py", lifespan=_warm_start)
