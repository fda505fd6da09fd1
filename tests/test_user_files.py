"""The user's files (selector.user_files): price sheets, custom catalogue rows, saved
targets and saved studies.  Every bad file gives a DataFileError naming the line and
the column (CSV) or key (TOML/JSON), and leaves the loaded state as it was.

The custom grade used here is demo data of an invented company (Harrow Pin Works);
it is not a real material.
"""
from __future__ import annotations

import json
import math
import os

import pytest
from hypothesis import given, settings, strategies as st

from selector import evaluate
from selector import user_files as studies
from selector.catalogue.grades import default_catalogue
from selector.errors import DataFileError, InputError, UnknownGradeError

# ----------------------------------------------------------------------------- price sheets

GOOD_PRICES = b"# demo price sheet of Harrow Pin Works\ngrade,relative_price\n4140,1.5\n1045,1.1\n"


def test_good_price_sheet():
    assert studies.load_price_sheet(GOOD_PRICES) == {"4140": 1.5, "1045": 1.1}


def test_price_sheet_accepts_designations_and_bom():
    assert studies.load_price_sheet(b"\xef\xbb\xbfgrade,relative_price\n42CrMo4,1.5\n") == {"4140": 1.5}


BAD_PRICES = [
    # (id, bytes, line, column, phrase in the message)
    ("unit in header", b"grade,relative_price_usd\n4140,1.5\n", 1, "relative_price_usd", "no currency"),
    ("missing column", b"grade\n4140\n", 1, "relative_price", "required column is missing"),
    ("negative", b"grade,relative_price\n4140,1.5\n1045,-2\n", 3, "relative_price", "outside the allowed range"),
    ("zero", b"grade,relative_price\n4140,0\n", 2, "relative_price", "outside the allowed range"),
    ("unit in value", b"grade,relative_price\n4140,1.5 USD\n", 2, "relative_price", "is not a number"),
    ("not finite", b"grade,relative_price\n4140,inf\n", 2, "relative_price", "not a finite number"),
    ("blank value", b"grade,relative_price\n4140,\n", 2, "relative_price", "is empty"),
    ("short row", b"grade,relative_price\n4140,1.5\n1045\n", 3, "relative_price", "no value for relative_price"),
    ("extra field", b"grade,relative_price\n4140,1,5\n", 2, "field 3", "comma inside a value"),
    ("unclosed quote", b'grade,relative_price\n"4140,1.5\n', 2, "relative_price", "unclosed quote"),
    ("unknown grade", b"grade,relative_price\n4140,1.5\nno-such-steel,2\n", 3, "grade", "not in the catalogue"),
    ("priced twice", b"grade,relative_price\n4140,1.5\n42CrMo4,2\n", 3, "grade", "priced twice"),
    ("duplicate column", b"grade,relative_price,grade\n4140,1.5,4140\n", 1, "grade", "appears twice"),
    ("empty", b"", 1, None, "no header line"),
    ("latin-1", "grade,relative_price\n4140,1.5\n1045,1.1\n# Prix en \xe9tude\n".encode("latin-1"),
     4, "11", "not UTF-8"),
    ("windows-1252", "grade,relative_price\n4140,1.5 \u20ac\n".encode("cp1252"), 2, "10", "not UTF-8"),
    ("utf-16 with BOM", "grade,relative_price\n4140,1.5\n".encode("utf-16"), 1, "1", "UTF-16"),
    ("utf-16 no BOM", "grade,relative_price\n4140,1.5\n".encode("utf-16-le"), 1, "2", "NUL byte"),
    ("NUL byte", b"grade,relative_price\n4140,1\x005\n", 2, "7", "NUL byte"),
    ("binary", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", 1, "1", "not UTF-8"),
]


@pytest.mark.parametrize("data,line,column,phrase", [b[1:] for b in BAD_PRICES], ids=[b[0] for b in BAD_PRICES])
def test_bad_price_sheet_names_line_and_column(data, line, column, phrase):
    with pytest.raises(DataFileError) as ei:
        studies.load_price_sheet(data, "prices.csv")
    e = ei.value
    assert (e.line, e.column) == (line, column), str(e)
    assert phrase in str(e)
    assert str(e).startswith("prices.csv, line ")


def test_huge_price_sheet_is_refused_with_position(tmp_path):
    row = b"4140,1.5\n"
    n = studies.MAX_FILE_BYTES // len(row) + 10
    p = tmp_path / "huge.csv"
    p.write_bytes(b"grade,relative_price\n" + row * n)
    with pytest.raises(DataFileError) as ei:
        studies.load_price_sheet(p)
    e = ei.value
    assert "largest file accepted" in str(e) and str(studies.MAX_FILE_BYTES) in str(e)
    # the limit falls inside the data rows: header (21 bytes) + full rows of 9 bytes
    full_rows = (studies.MAX_FILE_BYTES - 21) // len(row)
    assert e.line == full_rows + 2
    assert e.column == str((studies.MAX_FILE_BYTES - 21) % len(row) + 1)


def test_unreadable_path_is_a_data_file_error(tmp_path):
    with pytest.raises(DataFileError, match="cannot be read"):
        studies.load_price_sheet(tmp_path / "absent.csv")
    with pytest.raises(DataFileError, match="cannot be read"):
        studies.load_price_sheet(tmp_path)           # a folder


# ----------------------------------------------------------------------------- custom grades

HEADER = ("id,name,family,uns,en_name,en_number,jis,aliases,standard,density_g_cm3,modulus_gpa,"
          "base_condition,base_uts_mpa,base_yield_mpa,base_elongation_pct,base_hardness_hb,relative_price,"
          "corrosion_resistant,austenitize_c,routes,source,confidence")
ROW = ("HPW-41M,Harrow 41M,alloy_steel,,,,,HPW 41M,Harrow Pin Works house spec HPW-7 (demo),7.85,205,annealed,"
       "660,420,25,197,1.6,false,845,anneal;quench_temper,demo data of an invented company,demo")
COMP = ("grade,element,min_pct,max_pct,source,confidence\n"
        "HPW-41M,C,0.38,0.43,demo,demo\nHPW-41M,Mn,0.75,1.0,demo,demo\nHPW-41M,Si,0.15,0.35,demo,demo\n"
        "HPW-41M,Cr,0.8,1.1,demo,demo\nHPW-41M,Mo,0.15,0.25,demo,demo\n")


def grades_bytes(row=ROW, header=HEADER):
    return (header + "\n" + row + "\n").encode()


def test_custom_grades_load_and_evaluate():
    cat = studies.load_custom_grades(grades_bytes(), COMP.encode())
    assert list(cat.grades) == ["HPW-41M"]
    g = cat.lookup("HPW 41M")
    assert g.family == "alloy_steel" and g.comp_max["Cr"] == 1.1
    r = evaluate(g, [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}], 25.0)
    assert math.isfinite(r["uts_mpa"]) and 0 < r["yield_mpa"] <= r["uts_mpa"]
    # the built-in catalogue does not know it
    with pytest.raises(UnknownGradeError):
        default_catalogue().lookup("HPW-41M")


def _with(col, value, row=ROW):
    cells = HEADER.split(",")
    vals = row.split(",")
    vals[cells.index(col)] = value
    return ",".join(vals)


BAD_GRADES = [
    ("negative density", grades_bytes(_with("density_g_cm3", "-7.85")), 2, "density_g_cm3", "outside the allowed"),
    ("unit in value", grades_bytes(_with("base_uts_mpa", "660 MPa")), 2, "base_uts_mpa", "is not a number"),
    ("unit header", grades_bytes(header=HEADER.replace("base_uts_mpa", "base_uts_ksi")), 1, "base_uts_mpa",
     "required column is missing"),
    ("unknown family", grades_bytes(_with("family", "steel")), 2, "family", "is not one of"),
    ("yield above uts", grades_bytes(_with("base_yield_mpa", "700")), 2, "base_yield_mpa", "above base_uts_mpa"),
    ("unknown route", grades_bytes(_with("routes", "quench;temper")), 2, "routes", "must list route families"),
    ("built-in id", grades_bytes(_with("id", "4140")), 2, "id", "already the built-in grade 4140"),
    ("built-in designation", grades_bytes(_with("en_name", "42CrMo4")), 2, "en_name", "already the built-in"),
    ("latin-1 name", (HEADER + "\n" + _with("name", "Harrow Sp\xe9cial") + "\n").encode("latin-1"), 2, "18",
     "not UTF-8"),
]


@pytest.mark.parametrize("data,line,column,phrase", [b[1:] for b in BAD_GRADES], ids=[b[0] for b in BAD_GRADES])
def test_bad_custom_grades(data, line, column, phrase):
    with pytest.raises(DataFileError) as ei:
        studies.load_custom_grades(data, COMP.encode(), "mine")
    e = ei.value
    assert (e.line, e.column) == (line, column), str(e)
    assert phrase in str(e) and str(e).startswith("mine (grades), line")


def test_bad_custom_compositions():
    cases = [
        (COMP.replace("HPW-41M,Cr,0.8,1.1", "HPW-41M,Cr,1.2,1.1"), 5, "min_pct", "above max_pct"),
        (COMP.replace("HPW-41M,Cr,0.8,1.1", "HPW-41M,Cr,-0.8,1.1"), 5, "min_pct", "outside the allowed"),
        (COMP + "HPW-99,C,0.1,0.2,demo,demo\n", 7, "grade", "is not an id"),
        (COMP + "HPW-41M,C,0.1,0.2,demo,demo\n", 7, "element", "already on line 2"),
        (COMP.replace("max_pct", "max_pct_wt"), 1, "max_pct", "required column is missing"),
    ]
    for text, line, column, phrase in cases:
        with pytest.raises(DataFileError) as ei:
            studies.load_custom_grades(grades_bytes(), text.encode(), "mine")
        e = ei.value
        assert (e.line, e.column) == (line, column), str(e)
        assert phrase in str(e) and "mine (compositions)" in str(e) and "selector-custom-" not in str(e)


# ----------------------------------------------------------------------------- targets TOML

def test_targets_toml_good():
    t = studies.load_targets(b"[targets]\nmin_yield_mpa = 800\nfamilies = ['alloy_steel']\n")
    assert t == {"min_yield_mpa": 800.0, "families": ["alloy_steel"]}


BAD_TARGETS = [
    ("negative", b"[targets]\nmin_yield_mpa = 800\nmin_elongation_pct = -3\n", 3, "min_elongation_pct", ">= 0"),
    ("unknown key", b"[targets]\nmin_yield_mpa = 800\nmin_yeild = 3\n", 3, "min_yeild", "did you mean"),
    ("unit in value", b"[targets]\nmin_yield_mpa = '800 MPa'\n", 2, "min_yield_mpa", "a finite number"),
    ("wrong unit key", b"[targets]\nmin_yield_ksi = 116\n", 2, "min_yield_ksi", "min_yield_mpa"),
    ("min above max", b"[targets]\nmin_uts_mpa = 900\nmax_uts_mpa = 800\n", 2, "min_uts_mpa", "at most max_uts_mpa"),
    ("syntax", b"[targets]\nmin_yield_mpa = \n", 2, "17", "not valid TOML"),
    ("unknown family", b"[targets]\nfamilies = ['steel']\n", 2, "families", "did you mean"),
    ("utf-16", "[targets]\nmin_yield_mpa = 800\n".encode("utf-16"), 1, "1", "UTF-16"),
    ("latin-1", "# cible: r\xe9sistance\n[targets]\nmin_yield_mpa = 800\n".encode("latin-1"), 1, "11", "not UTF-8"),
]


@pytest.mark.parametrize("data,line,column,phrase", [b[1:] for b in BAD_TARGETS], ids=[b[0] for b in BAD_TARGETS])
def test_bad_targets_toml(data, line, column, phrase):
    with pytest.raises(DataFileError) as ei:
        studies.load_targets(data, "targets.toml")
    e = ei.value
    assert (e.line, e.column) == (line, column), str(e)
    assert phrase in str(e)


# ----------------------------------------------------------------------------- loaded state

def test_bad_files_leave_the_loaded_state_untouched():
    u = studies.UserFiles()
    u.load_prices(GOOD_PRICES)
    u.load_custom_grades(grades_bytes(), COMP.encode())
    u.load_targets(b"[targets]\nmin_yield_mpa = 800\n")
    before = u.snapshot()
    builtin_ids = tuple(default_catalogue().grades)
    bad = [
        lambda: u.load_prices(BAD_PRICES[2][1]),                 # a negative price on line 3, after a good row
        lambda: u.load_prices(b"grade,relative_price\n4140,2\n" + b"\x00"),
        lambda: u.load_custom_grades(grades_bytes(_with("density_g_cm3", "-1")), COMP.encode()),
        lambda: u.load_custom_grades(grades_bytes(), (COMP + "HPW-99,C,0.1,0.2,demo,demo\n").encode()),
        lambda: u.load_targets(b"[targets]\nmin_uts_mpa = 1000\nmin_elongation_pct = -1\n"),
    ]
    for f in bad:
        with pytest.raises(DataFileError):
            f()
        assert u.snapshot() == before
    assert tuple(default_catalogue().grades) == builtin_ids and "HPW-41M" not in builtin_ids
    assert u.prices == {"4140": 1.5, "1045": 1.1}
    with pytest.raises(TypeError):
        u.prices["4140"] = 0.1                 # read-only view: the state changes only through load_*


# ----------------------------------------------------------------------------- studies

TARGETS = {"min_yield_mpa": 655.0, "min_elongation_pct": 12.0, "families": ["alloy_steel", "carbon_steel"],
           "corrosion_resistant": False}
SECTION = {"diameter_mm": 25.4, "length_mm": 120.0}
OPTIONS = {"robust_only": True, "top": 5, "note": "clevis pin for the Harrow Pin Works demo — Ø1 in",
           "weights": [0.1, 1 / 3, 2e-300, -0.0], "nested": {"a": None, "b": [1, "x"]}}


def test_study_round_trip_is_exact(tmp_path):
    p = tmp_path / "study.json"
    saved = studies.save_study(p, TARGETS, SECTION, OPTIONS)
    loaded = studies.load_study(p)
    assert loaded == saved
    assert loaded.options["weights"][1] == 1 / 3 and math.copysign(1, loaded.options["weights"][3]) == -1
    assert type(loaded.options["top"]) is int
    text = p.read_text(encoding="utf-8")
    studies.save_study(p, loaded.targets, loaded.section, loaded.options)
    assert p.read_text(encoding="utf-8") == text          # saving what was loaded writes the same bytes
    assert json.loads(text)["format"] == studies.STUDY_FORMAT


@settings(max_examples=60, deadline=None)
@given(st.floats(allow_nan=False, allow_infinity=False), st.floats(min_value=0, max_value=5000),
       st.text(max_size=30))
def test_study_round_trip_any_float_and_text(x, limit, note):
    import tempfile

    with tempfile.TemporaryDirectory() as d:
        p = os.path.join(d, "s.json")
        saved = studies.save_study(p, {"min_uts_mpa": limit}, {"thickness_mm": 12.0}, {"x": x, "note": note})
        loaded = studies.load_study(p)
    assert loaded == saved and loaded.options["x"] == x and loaded.options["note"] == note


def test_study_save_is_atomic(tmp_path, monkeypatch):
    p = tmp_path / "study.json"
    studies.save_study(p, TARGETS, SECTION, OPTIONS)
    before = p.read_bytes()

    def fail(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(studies.os, "replace", fail)
    with pytest.raises(DataFileError, match="cannot be written"):
        studies.save_study(p, {"min_uts_mpa": 1.0}, {"diameter_mm": 10.0})
    assert p.read_bytes() == before                        # the old study is intact
    assert sorted(x.name for x in tmp_path.iterdir()) == ["study.json"]   # no temporary file left


def test_study_save_validates_before_writing(tmp_path):
    p = tmp_path / "study.json"
    for targets, section, options in [
        ({"min_yield_mpa": -1}, SECTION, {}),
        (TARGETS, {"diameter_mm": 25.0, "thickness_mm": 10.0}, {}),
        (TARGETS, {"diameter_mm": 0.0}, {}),
        (TARGETS, SECTION, {"t": (1, 2)}),                 # a tuple would come back as a list
        (TARGETS, SECTION, {"x": float("nan")}),
        (TARGETS, SECTION, {1: "a"}),
    ]:
        with pytest.raises(InputError):
            studies.save_study(p, targets, section, options)
    assert not p.exists()


def _study_text(**over):
    doc = {"format": studies.STUDY_FORMAT, "version": 1, "targets": {"min_yield_mpa": 655.0},
           "section": {"diameter_mm": 25.4}, "options": {}}
    doc.update(over)
    return json.dumps(doc, indent=2, ensure_ascii=False)


BAD_STUDIES = [
    ("syntax", _study_text()[:-3] + ",}", 10, "15", "not valid JSON"),   # '  "options": {,}'
    ("negative target", _study_text(targets={"min_yield_mpa": 655.0, "min_uts_mpa": -5}), 6, "min_uts_mpa", ">= 0"),
    ("wrong format", _study_text(format="something else"), 2, "format", "not a study file"),
    ("future version", _study_text(version=9), 3, "version", "not supported"),
    ("extra part", _study_text(macro="x"), 11, "macro", "not a part of a study"),
    ("section unit", _study_text(section={"diameter_in": 1.0}), 7, "section", "keys out of"),
    ("NaN", _study_text().replace("655.0", "NaN"), None, None, "NaN"),
    ("duplicate key", _study_text().replace('"version": 1,', '"version": 1,\n  "version": 1,'), 3, "version",
     "appears twice"),
]


@pytest.mark.parametrize("text,line,column,phrase", [b[1:] for b in BAD_STUDIES], ids=[b[0] for b in BAD_STUDIES])
def test_bad_study_files(tmp_path, text, line, column, phrase):
    p = tmp_path / "study.json"
    p.write_text(text, encoding="utf-8")
    with pytest.raises(DataFileError) as ei:
        studies.load_study(p)
    e = ei.value
    assert (e.line, e.column) == (line, column), str(e)
    assert phrase in str(e)


def test_study_encoding_errors(tmp_path):
    p = tmp_path / "study.json"
    p.write_bytes(_study_text(options={"note": "r\xe9sistance"}).encode("latin-1"))
    with pytest.raises(DataFileError, match="not UTF-8") as ei:
        studies.load_study(p)
    assert ei.value.line == 11
    p.write_bytes(_study_text().encode("utf-16"))
    with pytest.raises(DataFileError, match="UTF-16"):
        studies.load_study(p)
