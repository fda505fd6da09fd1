"""Reading the coefficients of surfaces fitted offline (``data/fits/<name>_coefficients.csv``).

Every fitted surface of the package is fitted by ``scripts/fit_<name>.py``, which
writes ``data/fits/<name>_coefficients.csv`` (columns ``fit, coefficient, value, unit,
source, confidence``; a ``# `` header line names the script and the data it used),
``<name>_rows.csv`` (the data rows the fit used, for the calibration join of the
validation report) and ``<name>_cv.csv`` (leave-one-grade-out cross-validation).
The package only reads the coefficients: it never fits at import or first call.
"""
from __future__ import annotations

import functools

from ..catalogue.loader import CONFIDENCE, Column, Schema, read_table

FOLDER = "fits"

COEFFICIENT_SCHEMA = Schema((
    Column("fit"), Column("coefficient"), Column("value", "float"), Column("unit", allow_blank=True),
    Column("source"), Column("confidence", "choice", choices=CONFIDENCE),
))


@functools.cache
def coefficients(name: str) -> dict:
    """``{(fit, coefficient): value}`` from ``data/fits/<name>_coefficients.csv``
    (validated by :mod:`selector.catalogue.loader`; a bad file raises
    ``DataFileError`` naming its line and column).

    Example (illustrative: a value of this implementation, not a published one)

    >>> sorted({fit for fit, _ in coefficients("tempering")})
    ['tempering_hv', 'tempering_hv_range']
    """
    t = read_table(f"{FOLDER}/{name}_coefficients.csv", COEFFICIENT_SCHEMA)
    return {(str(f), str(c)): float(v) for f, c, v in zip(t["fit"], t["coefficient"], t["value"])}


def write_tables(name: str, result: dict, header: str, out) -> None:
    """Write ``<name>_coefficients.csv``, ``<name>_rows.csv`` and ``<name>_cv.csv`` of a fit
    script (``result[key]`` DataFrames) under ``out``, each led by the ``# `` line
    ``header``; the one writer the ``scripts/fit_*.py`` scripts share.

    Example (illustrative: a value of this implementation, not a published one)

    >>> import tempfile, pandas as pd
    >>> d = tempfile.mkdtemp()
    >>> df = pd.DataFrame({"fit": ["f"], "coefficient": ["a"], "value": [1.5]})
    >>> write_tables("demo", {"coefficients": df, "rows": df, "cv": df}, "# demo\\n", d)
    >>> from pathlib import Path
    >>> Path(d, "demo_coefficients.csv").read_text().splitlines()[:2]
    ['# demo', 'fit,coefficient,value']
    """
    from pathlib import Path

    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    for key in ("coefficients", "rows", "cv"):
        with open(out / f"{name}_{key}.csv", "w", encoding="utf-8", newline="") as fh:
            fh.write(header)
            result[key].to_csv(fh, index=False, float_format="%.12g", lineterminator="\n")
