"""Command-line interface: ``selector <verb> ...`` (also ``python -m selector``).

One module per verb (:data:`VERBS`), each with ``NAME``, ``add_command(sub)`` and
``run(args)``; the shared argument helpers are in :mod:`.args` and the printing of a
candidates table (readable columns, docs/columns.md) in :mod:`.output`.  Verbs import
``args`` and ``output`` only (``pin`` also the public :func:`.select.miss_columns`); nothing
imports this package's ``__init__``, so there is no import circle.

No physics or selection logic lives here: every verb calls the library and formats what
it returns.  Each verb imports the library inside ``run`` (and :func:`.output.emit` the
readable columns): building the parser, for every command line ``--help`` included, then
loads no model chain, no Dask and no matplotlib.  Measured on the shared 2-core machine:
``selector --help`` takes 0.9 s of CPU so, 2.2 s with the route chain imported at the top.

Exit codes: 0 done, 1 nothing found, 2 bad input (one line ``error: ...`` on stderr).
Every output ends with the safety notice (:data:`selector.views.notice.CAUTION_LINES`).
"""
from __future__ import annotations

import argparse
import os
import sys

# One BLAS thread for a command-line run (set before numpy is first imported, below; a value the
# user set is kept): the models' matrix products are small, and on the shared 2-core machine
# OpenBLAS's thread pool only burnt CPU (cold `select`: 1.44 s against 1.26 s of CPU with one
# thread, median of 5; the results are the same)
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

from ... import CAUTION
from ...errors import SelectorError
from . import alternatives, batch, evaluate, grades, pin, select, sweep, validate
from .args import Parser, UsageError, parse_heat_text, parse_step_text, positive_int
from .evaluate import format_evaluation
from .pin import format_capacity

#: the verbs, in the order of ``selector --help``
VERBS = (evaluate, grades, select, alternatives, pin, sweep, validate, batch)

BANNER = f"CAUTION: {CAUTION}"

__all__ = ["main", "build_parser", "one_line", "VERBS", "BANNER", "UsageError", "parse_step_text",
           "parse_heat_text", "positive_int", "format_evaluation", "format_capacity"]


def build_parser() -> argparse.ArgumentParser:
    """The parser of every verb."""
    ap = Parser(prog="selector", description="Grade and process-route selection for "
                "load-bearing metal parts. " + CAUTION)
    sub = ap.add_subparsers(dest="command", required=True, parser_class=Parser)
    for verb in VERBS:
        verb.add_command(sub)
    return ap


def one_line(exc: BaseException, limit: int = 2000) -> str:
    """The error's message on one line (newlines folded), at most ``limit`` characters."""
    text = " ".join(str(exc).split())
    return text if len(text) <= limit else text[:limit - 1] + "…"


def main(argv=None) -> int:
    """Run one command; return its exit code (0 done, 1 nothing found, 2 bad input:
    a one-line ``error: ...`` message on stderr)."""
    ap = build_parser()
    try:
        args = ap.parse_args(argv)
    except SelectorError as exc:
        print(f"error: {one_line(exc)}", file=sys.stderr)
        return 2
    except SystemExit as exc:         # --help / --version: argparse has printed it
        return int(exc.code or 0) if not isinstance(exc.code, str) else 2
    try:
        return args.func(args)
    except SelectorError as exc:
        print(f"error: {one_line(exc)}", file=sys.stderr)
        return 2
