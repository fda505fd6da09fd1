"""``selector validate``: recompute every reference row and write the
validation report (``docs/validation.md`` and its PNG parity plots).  Only calls
:func:`selector.validation.report.run` and prints its summary."""
from __future__ import annotations

import sys
from pathlib import Path

from ...errors import DataFileError, InputError
from .output import print_caution

NAME = "validate"


def writable_target(field: str, path: str | None, folder: bool = False) -> None:
    """A clear error before any work when ``path`` cannot be written: its parent
    (or, for a folder, an existing ancestor) must be a folder."""
    if path is None:
        return
    if "\x00" in path:
        raise InputError(field, path, "a path without NUL characters")
    p = Path(path)
    if not folder and p.is_dir():
        raise InputError(field, path, "a file path (this is a folder)")
    if folder and p.exists() and not p.is_dir():
        raise InputError(field, path, "a folder (this is a file)")
    anc = p.parent
    while not anc.exists() and anc != anc.parent:
        anc = anc.parent
    if not anc.is_dir():
        raise InputError(field, path, f"a path inside a folder ({anc} is a file, not a folder)")


def run(args) -> int:
    from ...validation import report     # the library (and matplotlib), at run time (selector.views.cli)

    writable_target("--out", args.out)
    writable_target("--figures", args.figures, folder=True)
    try:
        res = report.run(args.out, args.figures)
    except OSError as exc:
        raise DataFileError(getattr(exc, "filename", None) or args.out, None, None,
                            f"cannot be written ({exc.strerror or exc})") from None
    comp = res["comparisons"]
    n_cmp = int((comp["status"] == "compared").sum())
    n_not = int(comp.loc[comp["status"] != "compared", "case"].nunique())
    print(f"wrote {res['report']} and {len(res['plots'])} parity plots; "
          f"{n_cmp} comparisons, {n_not} reference rows not compared (listed in the report)")
    for msg in res["undocumented"]:
        print(f"no threshold documented for: {msg}", file=sys.stderr)
    for msg in res["violations"]:
        print(f"threshold exceeded: {msg}", file=sys.stderr)
    print_caution()
    return 1 if res["violations"] or (args.strict and res["undocumented"]) else 0


def add_command(sub) -> None:
    v = sub.add_parser(NAME, help="recompute the published reference rows and write the validation report")
    v.add_argument("--out", default="docs/validation.md", help="report file (default docs/validation.md)")
    v.add_argument("--figures", default=None,
                   help="folder for the PNG parity plots (default: the report path without .md)")
    v.add_argument("--strict", action="store_true",
                   help="also fail when a compared group has no documented threshold")
    v.set_defaults(func=run)
