"""The local page with a warm start: ``streamlit run serve.py`` serves ``app.py`` (the
same page, the same options) and computes the example's answer while the server starts,
so that the first visit finds it ready.  ``streamlit run app.py`` serves the same page
and computes the answer on the first visit instead.

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
    from selector.views.page.warm import warm_up      # lazy: imported once the server starts

    seconds = await asyncio.to_thread(warm_up)
    print(f"selector page: the example's answer computed in {seconds:.1f} s; serving", file=sys.stderr)
    yield


app = st.App("app.py", lifespan=_warm_start)
