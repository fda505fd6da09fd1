"""Parts-list validation (selector.design.parts_list): every bad cell listed, nothing computed."""

import pandas as pd
import pytest

import selector
from selector.design import batch as batch_mod
from selector.design import parts_list
from selector.design.parts_list import PartsListError, read_parts
from selector.errors import DataFileError, InputError

GOOD = """# invented test parts
part_id,diameter_mm,thickness_mm,length_mm,quantity_per_year,min_yield_mpa,families,load_kn,lug_thickness_mm,clevis_thickness_mm,plated,plating,environment
A-1,25,,120,500,600,,,,,,,
A-2,25,,80,100,,,60,38,16,true,zinc plated,harsh
A-3,,12,300,50,400,carbon_steel;alloy_steel,,,,,,
"""


def _csv(text):
    return text.encode()


def test_good_file_parses_with_pin_targets_merged():
    t = read_parts(_csv(GOOD), "parts.csv")
    assert list(t["part_id"]) == ["A-1", "A-2", "A-3"]
    assert list(t["line"]) == [3, 4, 5]                 # comment and header lines counted
    pin = selector.pin_targets(load_kn=60, diameter_mm=25, lug_thickness_mm=38, clevis_thickness_mm=16)
    assert t.loc[1, "targets"] == pytest.approx(pin)
    assert t.loc[1, "service"] == {"plated": True, "plating": "zinc plated", "environment": "harsh"}
    assert t.loc[2, "targets"]["families"] == ["carbon_steel", "alloy_steel"]
    assert t.loc[2, "thickness_mm"] == 12 and pd.isna(t.loc[2, "diameter_mm"])


def test_stricter_of_pin_and_explicit_target_holds():
    pin = selector.pin_targets(load_kn=60, diameter_mm=25, lug_thickness_mm=38, clevis_thickness_mm=16)
    df = pd.DataFrame([{"part_id": "x", "diameter_mm": 25, "length_mm": 100, "quantity_per_year": 1,
                        "load_kn": 60, "lug_thickness_mm": 38, "clevis_thickness_mm": 16,
                        "min_yield_mpa": pin["min_yield_mpa"] + 100}])
    t = read_parts(df)
    assert t.loc[0, "targets"]["min_yield_mpa"] == pytest.approx(pin["min_yield_mpa"] + 100)
    assert t.loc[0, "targets"]["min_uts_mpa"] == pytest.approx(pin["min_uts_mpa"])


def _problems(text):
    with pytest.raises(PartsListError) as ei:
        read_parts(_csv(text), "parts.csv")
    return ei.value


def test_every_bad_cell_is_listed_with_line_column_and_allowed():
    text = ("part_id,diameter_mm,length_mm,quantity_per_year,min_yield_mpa\n"
            "B-1,25,100,-5,600\n"          # negative quantity
            "B-2,900,100,10,600\n"         # section out of range
            "B-1,25,100,10,abc\n"          # duplicated id and a non-number target
            "B-4,25,0,10,600\n")           # length out of range
    err = _problems(text)
    got = {(p["line"], p["column"]) for p in err.problems}
    assert got == {(2, "quantity_per_year"), (3, "diameter_mm"), (4, "part_id"), (4, "min_yield_mpa"),
                   (5, "length_mm")}
    msg = str(err)
    assert "parts.csv" in msg and "line 2, column 'quantity_per_year': '-5'" in msg
    assert "[0.5, 500] mm" in msg and "a part id not already used (line 2)" in msg
    assert isinstance(err, DataFileError) and isinstance(err, ValueError)


def test_unknown_target_key_names_the_column_and_the_nearest():
    err = _problems("part_id,diameter_mm,length_mm,quantity_per_year,min_yeild_mpa\nC-1,25,100,-1,600\n")
    p, q = err.problems
    assert p["line"] == 1 and p["column"] == "min_yeild_mpa"
    assert "did you mean min_yield_mpa" in p["allowed"]
    assert (q["line"], q["column"]) == (2, "quantity_per_year")       # the rows are still checked


def test_missing_required_column():
    err = _problems("part_id,diameter_mm,quantity_per_year\nC-1,25,1\n")
    assert [(p["line"], p["column"]) for p in err.problems] == [(1, "length_mm")]


@pytest.mark.parametrize("cells,column,fragment", [
    ({"diameter_mm": "", "thickness_mm": ""}, "diameter_mm", "exactly one of"),
    ({"thickness_mm": "10"}, "thickness_mm", "exactly one of"),
    ({"families": "carbon_steal"}, "families", "did you mean carbon_steel"),
    ({"corrosion_resistant": "maybe"}, "corrosion_resistant", "true or false"),
    ({"quantity_per_year": "2.5"}, "quantity_per_year", "whole number"),
    ({"max_uts_mpa": "500"}, "min_yield_mpa", "at most max_uts_mpa"),
    ({"load_kn": "-3", "lug_thickness_mm": "20", "clevis_thickness_mm": "10"}, "load_kn", "> 0"),
    ({"load_kn": "30"}, "lug_thickness_mm", "finite number"),
    ({"environment": "marine"}, "environment", "harsh"),
    ({"plating": "zinc plated"}, "plating", "plated = true"),
    ({"mating_material": "unobtainium"}, "mating_material", ""),
    ({"service_temp_c": "9999"}, "service_temp_c", "1500"),
])
def test_bad_cells(cells, column, fragment):
    row = {"part_id": "D-1", "diameter_mm": "25", "thickness_mm": "", "length_mm": "100",
           "quantity_per_year": "10", "min_yield_mpa": "600", "max_uts_mpa": "", "families": "",
           "corrosion_resistant": "", "load_kn": "", "lug_thickness_mm": "", "clevis_thickness_mm": "",
           "environment": "", "plated": "", "plating": "", "mating_material": "", "service_temp_c": ""}
    row.update(cells)
    text = ",".join(row) + "\n" + ",".join(row.values()) + "\n"
    err = _problems(text)
    assert any(p["column"] == column and p["line"] == 2 and fragment in p["allowed"] for p in err.problems), \
        err.problems


def test_file_over_50_mb_is_refused_before_reading(tmp_path, monkeypatch):
    f = tmp_path / "big.csv"
    f.write_text("part_id,diameter_mm,length_mm,quantity_per_year\n")
    monkeypatch.setattr(parts_list, "MAX_PARTS_FILE_BYTES", 10)
    with pytest.raises(PartsListError, match="at most 10 bytes"):
        read_parts(f)


def test_real_limit_is_50_mb():
    assert parts_list.MAX_PARTS_FILE_BYTES == 50 * 1024 * 1024
    with pytest.raises(PartsListError, match="50 MB"):
        read_parts(b"x" * (parts_list.MAX_PARTS_FILE_BYTES + 1), "huge.csv")


def test_parquet_is_read_and_rows_numbered(tmp_path):
    df = pd.DataFrame({"part_id": ["E-1", "E-2"], "diameter_mm": [25.0, -1.0], "length_mm": [100.0, 100.0],
                       "quantity_per_year": [3, 4], "min_yield_mpa": [500.0, 500.0]})
    f = tmp_path / "parts.parquet"
    df.to_parquet(f)
    with pytest.raises(PartsListError) as ei:
        read_parts(f)
    assert [(p["line"], p["column"]) for p in ei.value.problems] == [(2, "diameter_mm")]
    assert "row 2" in str(ei.value)
    ok = read_parts(df.iloc[:1].to_parquet())
    assert list(ok["part_id"]) == ["E-1"]


def test_nothing_is_computed_from_a_bad_file(monkeypatch):
    calls = []
    monkeypatch.setattr(batch_mod, "section_candidates", lambda *a, **k: calls.append(a))
    bad = "part_id,diameter_mm,length_mm,quantity_per_year,min_yield_mpa\nF-1,25,100,1,600\nF-2,25,100,-1,600\n"
    with pytest.raises(PartsListError):
        selector.batch(_csv(bad))
    assert calls == []


def test_unreadable_path_and_wrong_type():
    with pytest.raises(InputError, match="parts file"):
        read_parts("/nonexistent/parts.csv")
    with pytest.raises(InputError, match="parts"):
        read_parts(42)


def test_demo_parts_list_is_valid_and_invented():
    from pathlib import Path
    path = Path(__file__).resolve().parents[1] / "docs" / "demo_parts_list.csv"
    head = path.read_text(encoding="utf-8").splitlines()[0]
    assert "invented" in head.lower()
    t = read_parts(path)
    assert 35 <= len(t) <= 45
    assert t["part_id"].is_unique


def test_parquet_nullable_missing_cells_are_blank(tmp_path):
    df = pd.DataFrame({"part_id": ["G-1", "G-2"], "diameter_mm": [25.0, 25.0], "length_mm": [100.0, 100.0],
                       "quantity_per_year": pd.array([3, 4], dtype="Int64"),
                       "min_uts_mpa": pd.array([None, 700.0], dtype="Float64"),
                       "description": pd.array([None, "x"], dtype="string")})
    t = read_parts(df.to_parquet())
    assert t.loc[0, "targets"] == {} and t.loc[1, "targets"] == {"min_uts_mpa": 700.0}
    assert list(t["description"]) == ["", "x"]
