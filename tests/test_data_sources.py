"""Provenance checks on every table under data/, and consistency checks on data/reference/.

Rules checked (stated in data/README.md):
* every row of every CSV under data/ has a non-empty ``source`` and a ``confidence``
  from the allowed set (selector.catalogue.loader.CONFIDENCE);
* every cited source is listed in the Sources section of data/README.md -- the whole
  string verbatim, or else every ``;``-separated part of it;
* every row under data/reference/ has ``kind`` typical/minimum/band and a non-empty
  ``table``.
"""
from __future__ import annotations

import importlib.util
import math
import re
from collections import defaultdict
from pathlib import Path

import pytest

from selector.catalogue.loader import CONFIDENCE

ROOT = Path(__file__).resolve().parents[1]
DATA = ROOT / "data"
README = DATA / "README.md"
KINDS = ("typical", "minimum", "band", "band min/max")  # "band min/max": a row giving both limits of a hardenability band

_spec = importlib.util.spec_from_file_location("list_sources", ROOT / "scripts" / "list_sources.py")
LS = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(LS)

TABLES = LS.csv_files(DATA)
REFERENCE = [p for p in TABLES if p.parent == DATA / "reference"]


def _rel(p: Path) -> str:
    return p.relative_to(DATA).as_posix()


def _num(s: str) -> float:
    return float(s) if s not in ("", None) else math.nan


def _few(items, n=5):
    items = list(items)
    return f"{items[:n]}" + (f" ... ({len(items)} in all)" if len(items) > n else "")


def _rows(name: str) -> list[dict]:
    return [r for _, r in LS.read_rows(DATA / "reference" / name)[1]]


# ---------------------------------------------------------------- provenance, every table

def test_reference_tables_are_found():
    names = {_rel(p) for p in TABLES}
    assert {"reference/qt_steels.csv", "reference/tempers_nonferrous.csv"} <= names


@pytest.mark.parametrize("path", TABLES, ids=_rel)
def test_every_row_has_source_and_allowed_confidence(path):
    header, rows = LS.read_rows(path)
    assert rows, f"{_rel(path)} has no data rows"
    for col in ("source", "confidence"):
        assert col in header, f"{_rel(path)}: no '{col}' column (header: {', '.join(header)})"
    empty = [line for line, r in rows if not r["source"]]
    assert not empty, f"{_rel(path)}: empty source on lines {_few(empty)}"
    bad = [(line, r["confidence"]) for line, r in rows if r["confidence"] not in CONFIDENCE]
    assert not bad, f"{_rel(path)}: confidence not in {CONFIDENCE} on (line, value) {_few(bad)}"


@pytest.mark.parametrize("path", TABLES, ids=_rel)
def test_every_cited_source_is_listed_in_data_readme(path):
    section = LS.sources_section(README.read_text(encoding="utf-8"))
    assert section.strip(), "data/README.md has no '## Sources' section"
    _, rows = LS.read_rows(path)
    missing = sorted({r["source"] for _, r in rows if r.get("source") and not LS.is_listed(r["source"], section)})
    assert not missing, (f"{_rel(path)}: sources not listed in data/README.md (run "
                         f"'python scripts/list_sources.py --write'): {missing}")


@pytest.mark.parametrize("path", REFERENCE, ids=_rel)
def test_reference_rows_have_kind_and_table(path):
    header, rows = LS.read_rows(path)
    for col in ("kind", "table"):
        assert col in header, f"{_rel(path)}: no '{col}' column"
    bad_kind = [(line, r["kind"]) for line, r in rows if r["kind"] not in KINDS]
    assert not bad_kind, f"{_rel(path)}: kind not in {KINDS} on (line, value) {_few(bad_kind)}"
    no_table = [line for line, r in rows if not r["table"]]
    assert not no_table, f"{_rel(path)}: empty table on lines {_few(no_table)}"


# ---------------------------------------------------------------- the listing rule itself

def test_listing_rule_whole_string_or_every_part():
    section = "- `ASTM X1 Table 2`\n- `Handbook Y, Table 3 (reproduction: site.example)`\n"
    assert LS.is_listed("ASTM X1 Table 2", section)
    assert LS.is_listed("ASTM X1 Table 2; Handbook Y, Table 3 (reproduction: site.example)", section)
    assert LS.is_listed(" ASTM X1 Table 2 ;Handbook Y, Table 3 (reproduction: site.example) ", section)
    assert not LS.is_listed("ASTM X1 Table 2; Paper Z (1999)", section)
    assert not LS.is_listed("ASTM X1 Table 4", section)
    assert not LS.is_listed("", section)


def test_sources_section_ends_at_next_heading():
    text = "# t\nSee ASTM X1.\n## Sources\n- `ASTM X2`\n## Other\n- `ASTM X3`\n"
    section = LS.sources_section(text)
    assert "ASTM X2" in section
    assert "ASTM X3" not in section and "ASTM X1" not in section
    assert LS.sources_section("# no such section\n") == ""


def test_missing_sources_and_refresh(tmp_path):
    (tmp_path / "sub").mkdir()
    (tmp_path / "a.csv").write_text("# comment line\nv,source,confidence\n1,Listed A,verified\n2,Unlisted B,verified\n")
    (tmp_path / "sub" / "b.csv").write_text("v,source,confidence\n1,C; D,partial\n")
    (tmp_path / "README.md").write_text(f"## Sources\n- `Listed A`\n- `C`\n{LS.BEGIN}\n{LS.END}\n")
    assert LS.missing_sources(tmp_path) == {"a.csv": ["Unlisted B"], "sub/b.csv": ["C; D"]}
    LS.write_readme(tmp_path)
    assert LS.missing_sources(tmp_path) == {}
    assert LS.sources_by_file(tmp_path) == {"a.csv": ["Listed A", "Unlisted B"], "sub/b.csv": ["C; D"]}


def test_read_rows_gives_file_line_numbers(tmp_path):
    p = tmp_path / "t.csv"
    p.write_text("# c1\n# c2\nx,source\n1,\"two\nlines\"\n2,s\n")
    header, rows = LS.read_rows(p)
    assert header == ["x", "source"]
    assert [line for line, _ in rows] == [4, 6]


# ---------------------------------------------------------------- consistency of the reference values

@pytest.mark.parametrize("name", ["qt_steels.csv", "tempers_nonferrous.csv"])
def test_reference_values_are_physically_possible(name):
    for r in _rows(name):
        uts, ys = _num(r["uts_mpa"]), _num(r["yield_mpa"])
        top = _num(r.get("uts_max_mpa", "")) if r["kind"] == "band" else uts
        where = f"{name}: {r['grade']} {r.get('condition') or r.get('temper_temp_c')}"
        if not math.isnan(ys) and not math.isnan(top):
            assert ys <= top, f"{where}: yield {ys} above tensile {top}"
        if r["kind"] == "band" and "uts_max_mpa" in r:
            assert top > uts, f"{where}: band upper limit {top} not above lower {uts}"
        for col in ("elongation_pct", "reduction_area_pct"):
            v = _num(r.get(col, ""))
            assert math.isnan(v) or 0 < v <= 100, f"{where}: {col} = {v}"


def test_qt_strength_falls_and_ductility_rises_with_tempering_temperature():
    # Within one source, grade, quench and section, tempering softens martensite: UTS and HB fall,
    # reduction of area rises (ASM Handbook Vol. 4, tempering of steel; no secondary-hardening grades here).
    # a source that gives several heats of one grade (the NIMS data sheets) is one series per heat:
    # the heat analysis its note records keeps the heats apart
    groups = defaultdict(list)
    for r in _rows("qt_steels.csv"):
        heat = re.search(r"heat analysis (.*?) \(wt %\)", r["note"] or "")
        groups[(r["source"], r["grade"], r["quench"], r["section_mm"], heat.group(1) if heat else "")].append(r)
    checked = 0
    for key, rows in groups.items():
        rows.sort(key=lambda r: _num(r["temper_temp_c"]))
        for col, sign in (("uts_mpa", -1), ("hardness_hb", -1), ("reduction_area_pct", +1)):
            vals = [(_num(r["temper_temp_c"]), _num(r[col])) for r in rows if r[col]]
            for (t0, v0), (t1, v1) in zip(vals, vals[1:]):
                checked += 1
                ok = v1 < v0 if sign < 0 else v1 >= v0
                assert ok, f"{key}: {col} goes {v0} -> {v1} between {t0} and {t1} C"
    assert checked >= 40


def test_qt_larger_section_is_softer():
    # Metal Mart USA 4340 sheet: half radius of a 4-in round vs centre of a 1-in round, same temper.
    rows = [r for r in _rows("qt_steels.csv") if r["source"].startswith("Metal Mart USA")]
    by_t = defaultdict(dict)
    for r in rows:
        by_t[r["temper_temp_c"]][_num(r["section_mm"])] = r
    assert len(by_t) == 3
    for t, secs in by_t.items():
        small, large = secs[25.4], secs[101.6]
        for col in ("uts_mpa", "yield_mpa", "hardness_hb"):
            assert _num(large[col]) < _num(small[col]), f"{t} C: {col}"


def test_unit_conversions_match_printed_values():
    qt = _rows("qt_steels.csv")
    nf = _rows("tempers_nonferrous.csv")
    # Metal Mart USA 4340 sheet prints 208,000 psi at 800 F, 1-in round centre: 208 ksi x 6.895 = 1434 MPa (+-1 rounding).
    r = next(r for r in qt if r["source"].startswith("Metal Mart") and r["temper_temp_c"] == "427" and r["section_mm"] == "25.4")
    assert abs(_num(r["uts_mpa"]) - 208 * 6.895) <= 1
    # ASTM A666 via meadmetals.com: 301 full hard 185 ksi tensile / 140 ksi yield minimum.
    r = next(r for r in nf if r["grade"] == "301" and r["condition"] == "full hard")
    assert abs(_num(r["uts_mpa"]) - 185 * 6.895) <= 1 and abs(_num(r["yield_mpa"]) - 140 * 6.895) <= 1
    # Interlloy 630 sheet (metric): H1075 tensile 1000 MPa minimum, H1150 930 MPa; our ksi-derived minimums agree to 2 MPa.
    for cond, mpa in (("H1075", 1000), ("H1150", 930)):
        r = next(r for r in nf if r["grade"] == "17-4PH" and r["condition"] == cond)
        assert abs(_num(r["uts_mpa"]) - mpa) <= 2, cond


def test_cold_work_and_ageing_orderings():
    nf = _rows("tempers_nonferrous.csv")

    def uts(grade, cond, kind):
        return _num(next(r for r in nf if r["grade"] == grade and r["condition"] == cond and r["kind"] == kind)["uts_mpa"])

    # harder rolled tempers have higher tensile limits (ASTM B36 C26000; ASTM A666 301)
    seq = [uts("C26000", c, "band") for c in ("O (annealed, soft)", "H01", "H02", "H03", "H04", "H06", "H08")]
    assert seq == sorted(seq) and len(set(seq)) == len(seq)
    seq = [uts("301", c, "minimum") for c in ("annealed", "1/4 hard", "1/2 hard", "3/4 hard", "full hard")]
    assert seq == sorted(seq) and len(set(seq)) == len(seq)
    # 17-4PH single-age conditions: the higher the ageing temperature, the lower the minimum tensile (over-ageing)
    ph = sorted((_num(r["age_temp_c"]), _num(r["uts_mpa"])) for r in nf
                if r["grade"] == "17-4PH" and r["condition"] != "H1150M")
    assert [u for _, u in ph] == sorted((u for _, u in ph), reverse=True)
    # peak-aged beats naturally aged and annealed (AA typical 6061, 7075)
    assert uts("6061", "T6", "typical") > uts("6061", "T4", "typical") > uts("6061", "O", "typical")
    assert uts("7075", "T6", "typical") > uts("7075", "T73", "typical") > uts("7075", "O", "typical")
