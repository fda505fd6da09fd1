"""Which reference rows a fit has seen: the calibration key join.

A published reference row (``data/reference/*.csv``) is *calibration* when its
values were used by a fit, and *independent* otherwise.  The decision is a join on
keys, never a match on note text:

* every offline fit writes the rows it used to ``data/fits/<fit>_rows.csv`` with the
  key columns ``fit, source_file, grade, quench, section_mm, temp_c, hours,
  condition`` (blank where a key does not apply);
* the older calibration tables that still fit constants inside the package are
  read the same way: the fit points of ``data/aging_calibration.csv`` (``kind =
  point``, ``role = fit``) and the published tempers that define the temper
  designations of ``data/temper_aliases.csv``.

Join rules (:func:`match`):

* quench-and-temper rows: same grade, same quench medium (or either blank), bar
  section within ``SECTION_TOL_MM`` and tempering temperature within
  ``TEMP_TOL_C`` (the published tables convert °F to °C and in. to mm with
  different rounding);
* temper / condition rows (cold work, ageing, anneal): same grade and same
  condition designation (case and spaces ignored), or same family and designation
  for a temper designation whose reduction was derived from a published temper.

The report's headline figures, the prediction bands and every accuracy claim use
the independent rows only.
"""
from __future__ import annotations

import csv
import functools
import math
from dataclasses import dataclass
from pathlib import Path

SECTION_TOL_MM = 2.0
TEMP_TOL_C = 6.0
#: files under data/fits/ that list a fit's rows (``<fit>_rows.csv``)
ROWS_GLOB = "*_rows.csv"
KEY_COLUMNS = ("fit", "source_file", "grade", "quench", "section_mm", "temp_c", "hours", "condition")


def _plain_rows(path: Path) -> list[dict]:
    text = Path(path).read_text(encoding="utf-8-sig")
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    return list(csv.DictReader(lines))


def _f(v) -> float:
    try:
        return float(v)
    except (TypeError, ValueError):
        return math.nan


def norm_condition(s) -> str:
    return str(s or "").upper().replace(" ", "").replace("-", "")


@dataclass(frozen=True)
class FitRow:
    """One data row a fit used."""

    fit: str
    source_file: str
    grade: str
    quench: str
    section_mm: float
    temp_c: float
    condition: str
    family: str = ""   # set for designation rows that apply to every grade of a family

    def describe(self) -> str:
        where = self.condition or f"{self.quench or 'any quench'}, Ø{self.section_mm:g} mm, {self.temp_c:g} °C"
        return f"used by the fit '{self.fit}' ({self.source_file}: {self.grade or self.family} {where})"


@functools.lru_cache(maxsize=4)
def fit_rows(root: str) -> tuple:
    """Every row a fit used, from ``<root>/fits/*_rows.csv`` and the in-package
    calibration tables (``aging_calibration.csv``, ``temper_aliases.csv``)."""
    root_p = Path(root)
    out: list[FitRow] = []
    for path in sorted((root_p / "fits").glob(ROWS_GLOB)):
        for r in _plain_rows(path):
            out.append(FitRow(r.get("fit", path.stem), r.get("source_file", ""), str(r.get("grade", "")).strip(),
                              str(r.get("quench", "") or "").strip().lower(), _f(r.get("section_mm")),
                              _f(r.get("temp_c")), str(r.get("condition", "") or "").strip()))
    aging = root_p / "aging_calibration.csv"
    if aging.exists():
        for r in _plain_rows(aging):
            if r.get("kind") == "point" and r.get("role") == "fit":
                out.append(FitRow("aging constants", "data/aging_calibration.csv", r["alloy"], "", math.nan,
                                  math.nan, r["condition"]))
    aliases = root_p / "temper_aliases.csv"
    if aliases.exists():
        for r in _plain_rows(aliases):
            out.append(FitRow("temper designation", "data/temper_aliases.csv", r["ref_grade"], "", math.nan,
                              math.nan, r["designation"]))
            if r.get("basis", "").startswith("derived"):
                out.append(FitRow("temper designation (derived reduction)", "data/temper_aliases.csv", "", "",
                                  math.nan, math.nan, r["designation"], family=r["family"]))
    return tuple(out)


def _qt_match(row: FitRow, grade: str, quench: str, section_mm: float, temp_c: float) -> bool:
    if row.grade != grade or row.condition:
        return False
    if row.quench and quench and row.quench != quench:
        return False
    if not (math.isfinite(row.temp_c) and math.isfinite(temp_c)) or abs(row.temp_c - temp_c) > TEMP_TOL_C:
        return False
    if math.isfinite(row.section_mm) and math.isfinite(section_mm):
        return abs(row.section_mm - section_mm) <= SECTION_TOL_MM
    return True


def match(rows, *, grade: str, family: str = "", route: str = "", quench: str = "",
          section_mm: float = math.nan, temp_c: float = math.nan, condition: str = "") -> FitRow | None:
    """The first fit row that the reference row with these keys joins, or None.

    ``route == "quench_temper"`` joins on grade, quench, section and tempering
    temperature; any other route joins on grade (or family) and condition.
    """
    quench = str(quench or "").strip().lower()
    for r in rows:
        if route == "quench_temper":
            if _qt_match(r, grade, quench, section_mm, temp_c):
                return r
        elif r.condition and norm_condition(r.condition) == norm_condition(condition):
            if (r.grade and r.grade == grade) or (r.family and r.family == family):
                return r
    return None
