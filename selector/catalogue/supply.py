"""Supply conditions: bar as a buyer orders it (hot rolled, cold drawn, cold drawn and
stress relieved, quenched and tempered, annealed, normalized), with its properties by
size from the product standards (``data/supply_conditions.csv``).

Each row gives, for one grade, one condition and one ``designation`` inside it (the
standard's class or strength level: ``A311 class B``, ``A434 class BD``, ``+QT``), a
range of sizes (diameter or thickness, mm) and the tensile properties, with their
``basis``: ``minimum`` (the standard's guaranteed minimum) or ``typical``.  A hardness
band (``hardness_hrc_min``/``max``) is given where the source publishes one (pre-hardened
bar); otherwise the hardness follows from the tensile strength (ASTM A370 Table 3).

The ``annealed`` condition needs no row: it is the catalogue's baseline of every grade
whose ``base_condition`` is an annealed one (:func:`conditions_for`).

A ``quenched_tempered`` row also names the medium the bar maker is taken to quench in
(``mill_quench``, with its ``mill_quench_basis``: the product standards, e.g. ASTM A434
and EN 10083, leave the medium to the producer, so the basis is common practice or a
recalled table).  The route family runs the grade's hardenability chain at the part's
section with it (:func:`mill_quench`), so a bought quenched-and-tempered bar reports its
quench and its centre martensite like a bar hardened in-house.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from ..errors import DataFileError
from .loader import CONFIDENCE, Column, Schema, data_dir, read_file

#: condition name -> words shown by the page and the CLI
CONDITIONS = {
    "hot_rolled": "hot rolled",
    "cold_drawn": "cold drawn",
    "cold_drawn_stress_relieved": "cold drawn and stress relieved",
    "quenched_tempered": "quenched and tempered",
    "annealed": "annealed",
    "normalized": "normalized",
    "peeled": "peeled or turned (bright, not cold worked)",
    "aged": "solution treated and aged (temper as bought)",
}
BASES = ("minimum", "typical")
#: media a mill quench may name (quench_severity names; data/supply_conditions.csv, mill_quench)
MILL_QUENCHES = ("oil", "water", "polymer")
#: conditions a bar leaves with residual cold work (stress relieving applies to them)
COLD_WORKED = ("cold_drawn",)


def _check_row(r):
    if r["size_min_mm"] > r["size_max_mm"]:
        return ("size_min_mm", f"{r['size_min_mm']} is above size_max_mm {r['size_max_mm']}")
    if r["yield_mpa"] > r["uts_mpa"]:
        return ("yield_mpa", f"{r['yield_mpa']} is above uts_mpa {r['uts_mpa']}")
    lo, hi = r["hardness_hrc_min"], r["hardness_hrc_max"]
    if (lo == lo) != (hi == hi):
        return ("hardness_hrc_max", "give both hardness_hrc_min and hardness_hrc_max, or neither")
    if lo == lo and lo > hi:
        return ("hardness_hrc_min", f"{lo} is above hardness_hrc_max {hi}")
    if r["condition"] == "annealed":
        return ("condition", "'annealed' is the catalogue baseline (data/grades.csv); give no row for it")
    if r["condition"] == "quenched_tempered":
        if not r["mill_quench"]:
            return ("mill_quench", f"is empty; a quenched_tempered row names the mill's medium "
                    f"({', '.join(MILL_QUENCHES)})")
        if not str(r["mill_quench_basis"]).strip():
            return ("mill_quench_basis", "is empty; say why that medium (common practice or a source)")
    elif r["mill_quench"]:
        return ("mill_quench", f"{r['mill_quench']!r} on a {r['condition']} row; only quenched_tempered rows "
                "name a mill quench (leave it blank)")
    return None


SUPPLY_SCHEMA = Schema((
    Column("grade"), Column("condition", "choice", choices=tuple(CONDITIONS)), Column("designation"),
    Column("size_min_mm", "float", lo=0, hi=1000), Column("size_max_mm", "float", lo=0, hi=1000),
    Column("uts_mpa", "float", lo=50, hi=3000), Column("yield_mpa", "float", lo=20, hi=3000),
    Column("elongation_pct", "float", lo=0, hi=80),
    Column("hardness_hrc_min", "float", lo=0, hi=70, allow_blank=True),
    Column("hardness_hrc_max", "float", lo=0, hi=70, allow_blank=True),
    Column("basis", "choice", choices=BASES),
    Column("mill_quench", "choice", choices=MILL_QUENCHES, allow_blank=True),
    Column("mill_quench_basis", allow_blank=True), Column("standard"),
    Column("source"), Column("confidence", "choice", choices=CONFIDENCE),
), row_check=_check_row)


@dataclass(frozen=True)
class SupplyRow:
    grade: str
    condition: str
    designation: str
    size_min_mm: float
    size_max_mm: float
    uts_mpa: float
    yield_mpa: float
    elongation_pct: float
    hardness_hrc_min: float
    hardness_hrc_max: float
    basis: str
    standard: str
    source: str
    confidence: str
    mill_quench: str = ""
    mill_quench_basis: str = ""


def read_supply(path=None, grade_ids=None) -> dict:
    """``{grade id: [SupplyRow, ...]}`` from ``path`` (default ``data/supply_conditions.csv``),
    validated; a row naming a grade not in ``grade_ids`` is a :class:`DataFileError`."""
    p = path or data_dir() / "supply_conditions.csv"
    df = read_file(p, SUPPLY_SCHEMA)
    out: dict = {}
    seen = {}
    quench_of: dict = {}
    for r in df.itertuples(index=False):
        if grade_ids is not None and r.grade not in grade_ids:
            raise DataFileError(str(p), r.line, "grade", f"{r.grade!r} is not an id in grades.csv")
        key = (r.grade, r.condition, r.designation, r.size_min_mm)
        if key in seen:
            raise DataFileError(str(p), r.line, "size_min_mm",
                                f"{r.grade} {r.condition} {r.designation} from {r.size_min_mm:g} mm "
                                f"already on line {seen[key]}")
        seen[key] = r.line
        first = quench_of.setdefault((r.grade, r.condition, r.designation), (r.mill_quench, r.line))
        if first[0] != r.mill_quench:
            raise DataFileError(str(p), r.line, "mill_quench",
                                f"{r.mill_quench!r} differs from {first[0]!r} on line {first[1]}: one mill quench "
                                f"per grade, condition and designation ({r.grade} {r.designation})")
        out.setdefault(r.grade, []).append(SupplyRow(
            r.grade, r.condition, r.designation, float(r.size_min_mm), float(r.size_max_mm), float(r.uts_mpa),
            float(r.yield_mpa), float(r.elongation_pct), float(r.hardness_hrc_min), float(r.hardness_hrc_max),
            r.basis, r.standard, r.source, r.confidence, r.mill_quench, r.mill_quench_basis))
    return out


@functools.cache
def default_supply() -> dict:
    """The built-in supply rows, ``{grade id: [SupplyRow, ...]}``.  That every row names a
    built-in grade is checked where the catalogue joins this file
    (:func:`selector.catalogue.grades.build_catalogue`), so this module needs no grade table."""
    return read_supply()


def is_annealed_baseline(grade) -> bool:
    """True where the grade's catalogue baseline is an annealed bar (then ``annealed`` is
    a supply condition of it)."""
    return grade.is_steel and str(grade.base_condition).strip().lower().startswith("annealed")


def conditions_for(grade) -> list[tuple[str, str]]:
    """The ``(condition, designation)`` pairs a grade can be bought in, in file order
    (the annealed baseline first where it applies)."""
    out = [("annealed", "catalogue baseline")] if is_annealed_baseline(grade) else []
    for r in default_supply().get(grade.id, []):
        if (r.condition, r.designation) not in out:
            out.append((r.condition, r.designation))
    return out


def pick_row(grade, condition: str, designation: str, size_mm: float):
    """The supply row for ``grade`` in ``condition``/``designation`` covering ``size_mm``,
    or the nearest size row, with ``True`` when the size lies outside every row.
    Returns ``(row, outside)``; ``row`` is None for the annealed baseline."""
    if condition == "annealed":
        return None, False
    rows = [r for r in default_supply().get(grade.id, [])
            if r.condition == condition and r.designation == designation]
    if not rows:
        return None, True
    for r in rows:
        if r.size_min_mm - 1e-9 <= size_mm <= r.size_max_mm + 1e-9:
            return r, False
    dist = [min(abs(size_mm - r.size_min_mm), abs(size_mm - r.size_max_mm)) for r in rows]
    return rows[int(np.argmin(dist))], True


def designations(grade, condition: str) -> list[str]:
    return [d for c, d in conditions_for(grade) if c == condition]


def mill_quench(grade, condition: str, designation: str) -> str:
    """The medium the bar maker is taken to quench ``grade`` in for ``condition`` /
    ``designation`` (``data/supply_conditions.csv``, column ``mill_quench``), or ``""``
    where the bar is not quenched (any condition but ``quenched_tempered``).

    >>> from selector.catalogue.grades import default_catalogue
    >>> g = default_catalogue().lookup("4140")
    >>> mill_quench(g, "quenched_tempered", "ASTM A434 class BD"), mill_quench(g, "normalized", "ASM typical 25 mm")
    ('oil', '')
    """
    for r in default_supply().get(grade.id, []):
        if r.condition == condition and r.designation == designation:
            return r.mill_quench
    return ""
