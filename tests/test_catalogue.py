"""Catalogue loading, validation and grade lookup."""
import shutil
from pathlib import Path

import pytest

import selector
from selector.catalogue import grades as gr
from selector.catalogue.loader import data_dir, parse_text, read_file
from selector.errors import DataFileError, UnknownGradeError

DATA = data_dir()


def _copy(tmp_path):
    for name in ("grades.csv", "compositions.csv", "route_windows.csv"):
        shutil.copy(DATA / name, tmp_path / name)
    return tmp_path


def _build(tmp):
    return gr.build_catalogue(tmp / "grades.csv", tmp / "compositions.csv", tmp / "route_windows.csv")


def _edit(path: Path, line_no: int, column: str, value: str) -> None:
    """Set ``column`` of the data row on physical line ``line_no`` to ``value``."""
    import csv, io
    lines = path.read_text(encoding="utf-8").splitlines()
    first = next(i for i, l in enumerate(lines) if l.strip() and not l.startswith("#"))
    header = next(csv.reader([lines[first]]))
    row = next(csv.reader([lines[line_no - 1]]))
    row[header.index(column)] = value
    buf = io.StringIO()
    csv.writer(buf, lineterminator="").writerow(row)
    lines[line_no - 1] = buf.getvalue()
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")


def _first_data_line(path: Path) -> int:
    lines = path.read_text(encoding="utf-8").splitlines()
    first = next(i for i, l in enumerate(lines) if l.strip() and not l.startswith("#"))
    return first + 2  # 1-based line after the header


def test_catalogue_size_and_families():
    cat = selector.catalogue()
    assert len(cat) >= 40
    assert cat["family"].nunique() >= 7
    for col in ("grade", "family", "designations", "source"):
        assert col in cat.columns
    assert (cat["source"].str.strip() != "").all()
    for gid in ("1045", "4140", "4340", "8620", "304", "17-4PH", "6061", "7075", "2024", "C26000"):
        assert gid in set(cat["grade"]), gid


@pytest.mark.parametrize("name", ["AISI 4140", "4140", "42CrMo4", "1.7225", "G41400", "sae 4140", "UNS G41400"])
def test_lookup_aliases_resolve_to_4140(name):
    g = selector.grade(name)
    assert g.id == "4140"


def test_lookup_other_standards():
    assert selector.grade("S17400").id == "17-4PH"
    assert selector.grade("17-4 PH").id == "17-4PH"
    assert selector.grade("C26000").id == "C26000"


def test_unknown_grade_lists_nearest():
    with pytest.raises(UnknownGradeError) as exc:
        selector.grade("4142x")
    assert exc.value.suggestions, "nearest names expected"
    assert any("414" in s for s in exc.value.suggestions)
    assert isinstance(exc.value, LookupError)


def test_ambiguous_grade(tmp_path):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "grades.csv")
    # give the first grade an alias that is another grade's id
    other = selector.catalogue()["grade"].iloc[1]
    _edit(tmp / "grades.csv", line, "aliases", "ZZ-TEST")
    _edit(tmp / "grades.csv", line + 1, "aliases", "ZZ-TEST")
    cat = _build(tmp)
    with pytest.raises(UnknownGradeError) as exc:
        cat.lookup("ZZ-TEST")
    assert exc.value.ambiguous and len(exc.value.suggestions) == 2


def test_compositions_within_standard_limits():
    g = selector.grade("4140")
    assert g.comp_min["C"] <= g.composition("nominal")["C"] <= g.comp_max["C"]
    assert g.composition("lean")["Cr"] < g.composition("rich")["Cr"]


@pytest.mark.parametrize("column,value,fragment", [
    ("family", "unobtainium", "is not one of"),
    ("base_uts_mpa", "abc", "is not a number"),
    ("base_uts_mpa", "-5", "outside the allowed range"),
    ("source", "", "is empty"),
    ("confidence", "sure", "is not one of"),
    ("routes", "quench_temper;teleport", "route families"),
    ("corrosion_resistant", "maybe", "true/false"),
])
def test_loader_rejects_bad_grade_cells(tmp_path, column, value, fragment):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "grades.csv") + 3
    _edit(tmp / "grades.csv", line, column, value)
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert exc.value.line == line
    assert exc.value.column == column
    assert fragment in str(exc.value)
    assert "grades.csv" in str(exc.value)


def test_loader_rejects_min_above_max(tmp_path):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "compositions.csv") + 2
    _edit(tmp / "compositions.csv", line, "min_pct", "9.5")
    _edit(tmp / "compositions.csv", line, "max_pct", "1.0")
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert (exc.value.line, exc.value.column) == (line, "min_pct")


def test_loader_rejects_sum_above_100(tmp_path):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "compositions.csv")
    _edit(tmp / "compositions.csv", line, "min_pct", "99")
    _edit(tmp / "compositions.csv", line, "max_pct", "99.5")
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert "add up to" in str(exc.value)
    assert exc.value.column in ("min_pct", "max_pct")


def test_loader_rejects_unknown_grade_in_compositions(tmp_path):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "compositions.csv")
    _edit(tmp / "compositions.csv", line, "grade", "NOPE-1")
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert (exc.value.line, exc.value.column) == (line, "grade")


def test_loader_rejects_missing_column(tmp_path):
    tmp = _copy(tmp_path)
    text = (tmp / "grades.csv").read_text(encoding="utf-8").replace(",modulus_gpa,", ",modulus,", 1)
    (tmp / "grades.csv").write_text(text, encoding="utf-8")
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert exc.value.column == "modulus_gpa" and "missing" in str(exc.value)


def test_loader_rejects_duplicate_id(tmp_path):
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "grades.csv")
    first_id = selector.catalogue()["grade"].iloc[0]
    _edit(tmp / "grades.csv", line + 1, "id", first_id)
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert (exc.value.line, exc.value.column) == (line + 1, "id")


def test_loader_rejects_ragged_row_and_bad_window(tmp_path):
    with pytest.raises(DataFileError) as exc:
        parse_text("# c\na,source,confidence\n1,x,verified\n1,2\n", "t.csv")
    assert exc.value.line == 4
    tmp = _copy(tmp_path)
    line = _first_data_line(tmp / "route_windows.csv")
    _edit(tmp / "route_windows.csv", line, "route", "levitate")
    with pytest.raises(DataFileError) as exc:
        _build(tmp)
    assert exc.value.line == line and exc.value.column == "route"


def test_user_file_encoding_and_size(tmp_path):
    p = tmp_path / "latin.csv"
    p.write_bytes("a,source,confidence\n1,Stahlschlüssel,verified\n".encode("latin-1"))
    with pytest.raises(DataFileError) as exc:
        read_file(p)
    assert exc.value.line == 2 and "UTF-8" in str(exc.value)
    big = tmp_path / "big.csv"
    big.write_bytes(b"a,source,confidence\n" + b"1,x,verified\n" * 600_000)
    with pytest.raises(DataFileError, match="largest file"):
        read_file(big)
