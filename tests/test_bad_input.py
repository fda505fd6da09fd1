"""Regression tests of issue 16: every bad input gets a clear error (field, value,
what is allowed) at the public boundary, the command line and the page helpers.
One test per numbered defect; the boundary helpers of selector/inputs.py below."""
import io
import json
import math
import os
import sys
import threading

import numpy as np
import pandas as pd
import pytest

import selector
from selector import inputs
from selector import user_files as studies
from selector.design import pins
from selector.design.sweep import MAX_DIAMETERS, diameter_range
from selector.errors import (DataFileError, InputError, NotModelledError, SelectorError, UnknownGradeError,
                             check_choice, safe_repr)
from selector.selection.engine import prepare
from selector.selection.targets import targets_from_toml
from cli_runner import run

PIN = dict(load_kn=20.0, lug_thickness_mm=30.0, clevis_thickness_mm=12.0, gap_mm=2.0)
QT = [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}]


def assert_usage_error(code, err, *words):
    """Exit code 2, one line on stderr starting with 'error:', naming ``words``."""
    assert code == 2, err
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), err
    assert "Traceback" not in err
    for w in words:
        assert w in err, (w, err)


def deep_list(n):
    root = x = []
    for _ in range(n):
        y = []
        x.append(y)
        x = y
    return root


# ----------------------------------------------------------------------------- defect 1

def test_defect_01_alternatives_unestimated_base():
    ref = selector.evaluate("52100", [{"op": "harden", "quench": "water"}], 10)
    assert ref["uts_mpa"] is None and ref["hardness_hrc"] is not None      # off the A370 strength column
    res = selector.alternatives("52100", [{"op": "harden", "quench": "water"}], 10)
    r = res.attrs["reference"]
    assert r["basis"] == "hardness" and r["targets"]["min_hardness_hrc"] == ref["hardness_hrc"]
    assert "min_yield_mpa" not in r["targets"]
    # every alternative listed reaches that hardness and costs less
    assert (res["hardness_hrc"] >= ref["hardness_hrc"]).all() and (res["relative_cost"] < r["relative_cost"]).all()


def test_defect_01_alternatives_unestimated_base_cli():
    code, out, err = run("alternatives", "440C", "harden quench=oil", "temper temp_c=150", "--diameter", "10")
    assert code in (0, 1) and "Traceback" not in err and err == ""
    assert "Reference: 440C" in out and "matched on hardness" in out and "CAUTION" in out


def test_defect_01_strength_basis_unchanged():
    res = selector.alternatives("4140", QT, 25)
    assert res.attrs["reference"]["basis"] == "strength"
    assert {"min_yield_mpa", "min_uts_mpa"} <= set(res.attrs["reference"]["targets"])


# ----------------------------------------------------------------------------- defect 2

@pytest.mark.parametrize("start, stop, step, field", [
    (1, 1e9, 1, "step_mm"), (20, 40, 1e-9, "step_mm"), (20, math.inf, 1, "stop_mm"), (20, 40, 1e-300, "step_mm"),
    (20, 40, 0, "step_mm"), (20, 10, 1, "stop_mm"), (math.nan, 40, 1, "start_mm")])
def test_defect_02_sweep_range_is_capped_before_it_is_built(start, stop, step, field):
    with pytest.raises(InputError) as ei:
        diameter_range(start, stop, step)
    assert ei.value.field == field and "allowed" in str(ei.value)
    assert len(diameter_range(20, 20 + MAX_DIAMETERS - 1, 1)) == MAX_DIAMETERS
    with pytest.raises(InputError):
        diameter_range(20, 20 + MAX_DIAMETERS, 1)


@pytest.mark.parametrize("spec", ["20:40:1e-9", "20:inf:1", "20:nan:1", "1:1e9:1", "20:40", "a,b",
                                  ",".join(["20"] * (MAX_DIAMETERS + 1))])
def test_defect_02_sweep_range_cli(spec):
    code, _, err = run("sweep", "--load-kn", 10, "--lug", 10, "--clevis", 5, "--diameters", spec)
    assert_usage_error(code, err, "--diameters")


def test_defect_02_sweep_range_page():
    from selector.views import page as pg

    for start, stop, step in ((1, 1e9, 1), (20, 40, 1e-6), (20, 1e300, 1e-300)):
        values, msg = pg.sweep_diameters(pg.SWEEP_MODES[1], None, start, stop, step, pg.SI)
        assert values == () and "allowed" in msg
    values, msg = pg.sweep_diameters(pg.SWEEP_MODES[0], ",".join(["20"] * 100_000), None, None, None, pg.SI)
    assert values == () and "allowed" in msg


# ----------------------------------------------------------------------------- defect 3

@pytest.mark.parametrize("sheet, field", [
    ({"1018": -5.0}, "price_sheet[1018]"), ({"1018": float("nan")}, "price_sheet[1018]"),
    ({"1018": float("inf")}, "price_sheet[1018]"), ({"1018": 0.0}, "price_sheet[1018]"),
    ({"1018": "cheap"}, "price_sheet[1018]"), ({"1018": True}, "price_sheet[1018]"),
    ({"unobtainium": 1.0}, "price_sheet grade"), ({"4140": 1.0, "AISI 4140": 2.0}, "price_sheet grade"),
    ("x", "price_sheet"), ([1], "price_sheet"), (1.0, "price_sheet")])
def test_defect_03_price_sheet_dicts_are_validated(sheet, field):
    for call in (lambda: selector.select({"min_yield_mpa": 500}, 25, price_sheet=sheet),
                 lambda: selector.alternatives("4140", QT, 25, price_sheet=sheet),
                 lambda: selector.diameter_sweep([20], price_sheet=sheet, select=_no_select, **PIN)):
        with pytest.raises(InputError) as ei:
            call()
        assert ei.value.field == field, str(ei.value)
        assert "allowed" in str(ei.value)


def test_defect_03_price_sheet_alias_is_applied():
    prep = prepare(25.0, price_sheet={"AISI 4140": 0.5})
    rows = prep[prep["grade"] == "4140"]
    assert len(rows) and (rows["price_source"] == "price sheet").all()
    assert (prep[prep["grade"] != "4140"]["price_source"] != "price sheet").all()
    base = prepare(25.0)
    b = base[base["grade"] == "4140"]
    # relative cost = price + route adder: the sheet's price replaces the catalogue's
    assert np.allclose(rows["relative_cost"].to_numpy() - b["relative_cost"].to_numpy(),
                       0.5 - float(b["relative_price"].iloc[0]))


# ----------------------------------------------------------------------------- defect 4

def _no_select(*a, **k):
    raise AssertionError("select was called before the inputs were validated")


@pytest.mark.parametrize("kw, field", [
    (dict(load_kn=10.0), "lug_thickness_mm"),
    (dict(PIN, length_mm="x"), "length_mm"), (dict(PIN, length_mm=-1.0), "length_mm"),
    (dict(PIN, caution_context=[1]), "caution_context"),
    (dict(PIN, caution_context={"environment": "martian"}), "environment"),
    (dict(PIN, caution_context={"colour": "red"}), "caution_context key"),
    (dict(PIN, extra_targets={"min_yield": 3}), "target"),
    (dict(PIN, shear_planes=3), "shear_planes"), (dict(PIN, select=42), "select"),
    (dict(PIN, lug_thickness_mm=1e308, clevis_thickness_mm=1e308), "lug_thickness_mm")])
def test_defect_04_sweep_validates_before_use(kw, field):
    with pytest.raises(InputError) as ei:
        selector.diameter_sweep([20.0, 25.0], select=kw.pop("select", _no_select), **kw)
    assert ei.value.field == field, str(ei.value)


# ----------------------------------------------------------------------------- defect 5

DEEP_TOML = "[targets]\nmin_yield_mpa = " + "[" * 3000 + "]" * 3000 + "\n"
HUGE_INT_TOML = "[targets]\nmin_yield_mpa = " + "9" * 5000 + "\n"


@pytest.mark.parametrize("text", [DEEP_TOML, HUGE_INT_TOML, "x = " + "{a = " * 500 + "1" + "}" * 500])
def test_defect_05_deep_or_huge_toml(text, tmp_path):
    with pytest.raises(DataFileError) as ei:
        studies.load_targets(text.encode(), "t.toml")
    assert str(ei.value).startswith("t.toml")
    with pytest.raises(DataFileError):
        targets_from_toml(text)
    p = tmp_path / "t.toml"
    p.write_text(text, encoding="utf-8")
    code, _, err = run("select", "--targets", p)
    assert_usage_error(code, err, str(p))


@pytest.mark.parametrize("value", ["[" * 3000 + "]" * 3000, "9" * 5000, '{"a":' * 2000 + "1" + "}" * 2000])
def test_defect_05_deep_or_huge_json(value, tmp_path):
    p = tmp_path / "s.json"
    p.write_text('{"format": "selector study", "version": 1, "targets": {}, "section": {"diameter_mm": 20},'
                 ' "options": {"x": ' + value + "}}", encoding="utf-8")
    with pytest.raises(DataFileError) as ei:
        studies.load_study(p)
    assert str(ei.value).startswith(str(p))
    code, _, err = run("evaluate", "4140", "--route-json", value)
    assert_usage_error(code, err, "--route-json")


def test_defect_05_deep_options_on_save(tmp_path):
    with pytest.raises(InputError) as ei:
        studies.save_study(tmp_path / "s.json", {}, {"diameter_mm": 20.0}, {"x": deep_list(2000)})
    assert ei.value.field == "options" and not (tmp_path / "s.json").exists()
    with pytest.raises(InputError):
        studies.save_study(tmp_path / "s.json", {}, {"diameter_mm": 20.0}, {"x": 10 ** 400})


def test_defect_05_nesting_scan_ignores_strings_and_comments():
    assert inputs.text_nesting('a = "[[[[" # [[[[\nb = [[1], {c = \'{{\'}]') == 2
    assert inputs.text_nesting('{"a": "\\"[[[", "b": [[[]]]}') == 4


# ----------------------------------------------------------------------------- defect 6

@pytest.mark.parametrize("kw, field", [
    (dict(load_kn=1e308, diameter_mm=10.0), "load_kn"), (dict(load_lbf=1e308, diameter_mm=10.0), "load_lbf"),
    (dict(load_kn=10.0, diameter_mm=1e-300), "diameter_mm"), (dict(load_kn=10.0, diameter_mm=0.0), "diameter_mm"),
    (dict(load_kn=10.0, diameter_mm=10.0, lug_thickness_mm=5e-324), "lug_thickness_mm"),
    (dict(load_kn=10.0, diameter_mm=10.0, clevis_thickness_mm=5e-324), "clevis_thickness_mm")])
def test_defect_06_pin_targets_stay_finite(kw, field):
    with pytest.raises(InputError) as ei:
        selector.pin_targets(**{"lug_thickness_mm": 10.0, "clevis_thickness_mm": 5.0, **kw})
    assert ei.value.field == field
    # at the caps themselves every target is finite and positive
    for lug, clevis, gap in ((2000.0, 2000.0, 2000.0), (pins.MIN_THICKNESS_MM, pins.MIN_THICKNESS_MM, 0.0)):
        t = selector.pin_targets(load_kn=pins.MAX_LOAD_KN, diameter_mm=pins.MIN_DIAMETER_MM, lug_thickness_mm=lug,
                                 clevis_thickness_mm=clevis, gap_mm=gap, safety_factor=10.0)
        assert all(math.isfinite(v) and v > 0 for v in t.values())


def test_defect_06_pin_cli():
    code, out, err = run("pin", "--load-kn", "1e308", "--diameter", 10, "--lug", 10, "--clevis", 5)
    assert_usage_error(code, err, "load_kn")
    assert "Infinity" not in out and "inf" not in out


# ----------------------------------------------------------------------------- defect 7

@pytest.mark.parametrize("top", ["-1", "-140", "0", "1.5", "x"])
def test_defect_07_top_must_be_positive(top):
    code, out, err = run("select", "--min-yield-mpa", 500, "--top", top)
    assert_usage_error(code, err, "--top")
    assert out == ""


def test_defect_07_top_keeps_n_rows():
    code, out, _ = run("select", "--min-yield-mpa", 500, "--top", 3, "--format", "json")
    assert code == 0 and len(json.loads(out)["rows"]) == 3


# ----------------------------------------------------------------------------- defect 8

@pytest.mark.parametrize("gid", ["1018", "1020"])
@pytest.mark.parametrize("route", [[{"op": "anneal"}], [{"op": "cold_work", "reduction_pct": 0}],
                                   [{"op": "anneal"}, {"op": "cold_work", "reduction_pct": 5}]])
def test_defect_08_missing_hardness_is_explained(gid, route):
    r = selector.evaluate(gid, route, 25)
    if r["hardness_hv"] is None:
        assert r["uts_mpa"] is not None
        assert any("ASTM A370" in w and "hardness is not estimated" in w for w in r["warnings"]), r["warnings"]
    else:
        assert not any("hardness is not estimated" in w for w in r["warnings"])


def test_defect_08_annealed_1018_has_the_note():
    r = selector.evaluate("1018", [{"op": "anneal"}], 25)
    # ASTM A370 Table 3's tensile column starts at about 386 MPa (HB 116); 1018 annealed is below it
    assert r["uts_mpa"] < 386 and r["hardness_hv"] is None
    assert any("hardness is not estimated" in w for w in r["warnings"])


# ----------------------------------------------------------------------------- defect 9

def test_defect_09_type_gaps():
    a = selector.select({"min_yield_mpa": 900}, 25, objectives=None)
    b = selector.select({"min_yield_mpa": 900}, 25)
    pd.testing.assert_frame_equal(a, b)
    for bad in ("yield_mpa", [("yield_mpa", "max"), ("yield_mpa", "min")], [("yield_mpa", "up")], 3):
        with pytest.raises(InputError) as ei:
            selector.select({"min_yield_mpa": 900}, 25, objectives=bad)
        assert ei.value.field == "objectives"
    base = dict(load_kn=10.0, diameter_mm=10.0, lug_thickness_mm=10.0, clevis_thickness_mm=5.0)
    for kw, field in ((dict(shear_planes=np.array([2])), "shear_planes"), (dict(shear_planes=[2]), "shear_planes"),
                      (dict(safety_factor=[]), "safety_factor"), (dict(safety_factor=[2.0]), "safety_factor"),
                      (dict(shear_planes=True), "shear_planes")):
        with pytest.raises(InputError) as ei:
            selector.pin_targets(**base, **kw)
        assert ei.value.field == field
    assert selector.pin_targets(**base, shear_planes=np.int64(1)) == selector.pin_targets(**base, shear_planes=1)
    # numpy numbers are accepted alike for a temper temperature and a diameter
    r1 = selector.evaluate("4140", [QT[0], {"op": "temper", "temp_c": np.int64(540), "hours": np.float32(2)}],
                           np.int64(25))
    r2 = selector.evaluate("4140", QT, 25)
    assert r1["uts_mpa"] == r2["uts_mpa"]
    for bad in (np.bool_(True), True, "540", 10 ** 400):
        with pytest.raises(InputError):
            selector.evaluate("4140", [QT[0], {"op": "temper", "temp_c": bad}], 25)


# ----------------------------------------------------------------------------- defect 10

def test_defect_10_messages_of_deep_values_do_not_recurse():
    deep = deep_list(1000)
    msg = str(InputError("route", deep, "a list of steps"))
    assert "route=" in msg and "allowed: a list of steps" in msg and len(msg) < 400
    with pytest.raises(InputError):
        check_choice("op", deep, ["harden"])
    with pytest.raises(UnknownGradeError):
        selector.evaluate(deep, QT, 25)
    with pytest.raises(SelectorError):
        selector.evaluate("4140", deep, 25)
    with pytest.raises(SelectorError):
        selector.evaluate("4140", [{"op": "temper", "temp_c": deep}], 25)
    assert safe_repr(10 ** 5000).startswith("<int of about")
    assert len(safe_repr("x" * 10 ** 6)) <= 120

    class Broken:
        def __repr__(self):
            raise RuntimeError("no")

    assert safe_repr(Broken()).startswith("<Broken")


# ----------------------------------------------------------------------------- defect 11

@pytest.mark.parametrize("kw, field", [
    (dict(environment="martian"), "environment"), (dict(plated="yes"), "plated"),
    (dict(plated=True, plating="unobtainium plated"), "mating_material"),
    (dict(plating="zinc plated"), "plating"), (dict(mating_material="kryptonite"), "mating_material"),
    (dict(service_temp_c=float("nan")), "service_temp_c"), (dict(service_temp_c=-300.0), "service_temp_c")])
def test_defect_11_service_options_checked_when_nothing_matches(kw, field):
    with pytest.raises(InputError) as ei:
        selector.select({"min_yield_mpa": 1e6}, 25, **kw)      # nothing can meet this
    assert ei.value.field == field, str(ei.value)


# ----------------------------------------------------------------------------- defect 12

def _in_thread(f, seconds=20.0):
    box = {}

    def target():
        try:
            box["value"] = f()
        except BaseException as exc:   # noqa: BLE001 - handed back to the test
            box["error"] = exc

    th = threading.Thread(target=target, daemon=True)
    th.start()
    th.join(seconds)
    assert not th.is_alive(), "the reader blocked"
    return box


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes need POSIX")
def test_defect_12_named_pipe_is_refused_without_blocking(tmp_path):
    fifo = tmp_path / "prices.csv"
    os.mkfifo(fifo)
    for f in (lambda: studies.load_price_sheet(fifo), lambda: studies.load_targets(fifo),
              lambda: studies.load_study(fifo)):
        box = _in_thread(f)
        assert isinstance(box.get("error"), DataFileError) and "named pipe" in str(box["error"])
    box = _in_thread(lambda: targets_from_toml(fifo))
    assert isinstance(box.get("error"), InputError) and "named pipe" in str(box["error"])
    box = _in_thread(lambda: run("select", "--min-yield-mpa", 500, "--prices", fifo))
    code, _, err = box["value"]
    assert_usage_error(code, err, "named pipe")
    box = _in_thread(lambda: run("select", "--targets", fifo))
    code, _, err = box["value"]
    assert_usage_error(code, err, "named pipe")


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="needs /dev/zero")
def test_defect_12_device_is_refused():
    box = _in_thread(lambda: studies.load_targets("/dev/zero"))
    assert isinstance(box.get("error"), DataFileError) and "device" in str(box["error"])
    box = _in_thread(lambda: studies.load_price_sheet("/dev/zero"))
    assert isinstance(box.get("error"), DataFileError)


def test_defect_12_bom_accepted_by_every_reader(tmp_path):
    bom = "\ufeff"
    toml = "[targets]\nmin_yield_mpa = 650\n"
    expected = {"min_yield_mpa": 650.0}
    assert targets_from_toml(bom + toml) == expected
    p = tmp_path / "t.toml"
    p.write_text(bom + toml, encoding="utf-8")
    assert targets_from_toml(p) == expected
    assert studies.load_targets(p) == expected
    assert studies.load_targets((bom + toml).encode()) == expected
    assert studies.load_price_sheet((bom + "grade,relative_price\n4140,1.7\n").encode()) == {"4140": 1.7}
    s = tmp_path / "s.json"
    saved = studies.save_study(s, expected, {"diameter_mm": 20.0})
    s.write_text(bom + s.read_text(encoding="utf-8"), encoding="utf-8")
    assert studies.load_study(s) == saved


def test_defect_12_size_cap_is_checked_on_disk(tmp_path):
    p = tmp_path / "big.toml"
    with open(p, "wb") as f:
        f.write(b"# " + b"x" * (inputs.MAX_FILE_BYTES + 10) + b"\n")
    with pytest.raises(DataFileError, match="largest file accepted"):
        studies.load_targets(p)
    with pytest.raises(InputError, match="largest file accepted"):
        targets_from_toml(p)


# ----------------------------------------------------------------------------- defect 13

def test_defect_13_validate_out_under_a_file(tmp_path):
    f = tmp_path / "a_file"
    f.write_text("x", encoding="utf-8")
    code, out, err = run("validate", "--out", f / "x.md")
    assert_usage_error(code, err, "--out")
    code, out, err = run("validate", "--out", tmp_path)
    assert_usage_error(code, err, "--out")
    code, out, err = run("validate", "--out", tmp_path / "r.md", "--figures", f)
    assert_usage_error(code, err, "--figures")


# ----------------------------------------------------------------------------- defect 14

def test_defect_14_custom_alias_clashing_with_a_builtin_is_refused():
    from test_user_files import COMP, ROW, grades_bytes

    for alias in ("42CrMo4", "AISI 4140", "HPW 41M;G41400"):
        row = ROW.replace(",HPW 41M,", f",{alias},")
        with pytest.raises(DataFileError) as ei:
            studies.load_custom_grades(grades_bytes(row), COMP.encode())
        assert ei.value.column == "aliases" and "built-in" in str(ei.value)
    assert list(studies.load_custom_grades(grades_bytes(), COMP.encode()).grades) == ["HPW-41M"]


# ----------------------------------------------------------------------------- defect 15

def test_defect_15_save_study_is_confined(tmp_path, monkeypatch):
    folder = tmp_path / "studies"
    folder.mkdir()
    args = ({"min_yield_mpa": 600.0}, {"diameter_mm": 20.0})
    for bad in ("../../x.json", "../x.json", str(tmp_path / "x.json"), "sub/../../x.json"):
        with pytest.raises(InputError) as ei:
            studies.save_study(bad, *args, folder=folder)
        assert ei.value.field == "path"
    assert not (tmp_path / "x.json").exists()
    (folder / "out").symlink_to(tmp_path)
    with pytest.raises(InputError):
        studies.save_study("out/x.json", *args, folder=folder)
    assert studies.save_study("ok.json", *args, folder=folder) == studies.load_study(folder / "ok.json")
    # the default study folder of a relative path is the current folder
    monkeypatch.chdir(folder)
    with pytest.raises(InputError):
        studies.save_study("../../x.json", *args)
    for bad in ("a\x00b.json", "", b"x.json", 3):
        with pytest.raises(InputError):
            studies.save_study(bad, *args)
    with pytest.raises(InputError):
        studies.save_study(".", *args)


# ----------------------------------------------------------------------------- defect 16

def test_defect_16_csv_cells_cannot_start_formulas(capsys):
    from selector.views import page as pg
    from selector.views.cli.output import write_frame

    df = pd.DataFrame({"grade": ["=HYPERLINK(\"x\")", "+1", "-1+2", "@SUM(A1)", "4140", "\tx"],
                       "yield_mpa": [-1.0, 2.0, 3.0, 4.0, 5.0, 6.0], "=col": [""] * 6})
    for text in (pg.to_csv(df).decode("utf-8"), None):
        if text is None:
            write_frame(df, "csv")
            text = capsys.readouterr().out
        back = pd.read_csv(io.StringIO(text), keep_default_na=False)
        assert list(back["grade"]) == ["'=HYPERLINK(\"x\")", "'+1", "'-1+2", "'@SUM(A1)", "4140", "'\tx"]
        assert list(back["yield_mpa"]) == [-1.0, 2.0, 3.0, 4.0, 5.0, 6.0]     # numbers stay numbers
        assert "'=col" in back.columns


# ----------------------------------------------------------------------------- the shared helpers

def test_number_helper_names_field_value_and_range():
    assert inputs.number("x", np.float32(2.5), 0, 10) == 2.5
    for bad in (True, "1", None, float("nan"), 10 ** 400, -1, 11, [1]):
        with pytest.raises(InputError) as ei:
            inputs.number("x", bad, 0, 10, unit="mm")
        assert "x=" in str(ei.value) and ">= 0 and <= 10 (mm)" in str(ei.value)


def test_usage_errors_are_one_line():
    for argv in (["nosuchverb"], ["select", "--diameter", "abc"], ["evaluate"], ["pin", "--load-kn", "1"], []):
        code, _, err = run(*argv)
        assert_usage_error(code, err)
    code, out, _ = run("--help")
    assert code == 0 and "usage" in out


def test_usage_errors_through_the_console_entry(tmp_path):
    import subprocess

    env = dict(os.environ, PYTHONPATH=os.getcwd() + os.pathsep + os.environ.get("PYTHONPATH", ""))
    p = subprocess.run([sys.executable, "-m", "selector", "select", "--top", "-1"], capture_output=True, text=True,
                       env=env, timeout=120)
    assert p.returncode == 2 and len(p.stderr.strip().splitlines()) == 1


def test_not_modelled_error_is_documented():
    assert issubclass(NotModelledError, SelectorError)


def test_defect_06_page_pin_report_gives_a_message():
    from selector.views import page as pg

    case = dict(load_kn=1e308, diameter_mm=25.0, shear_planes=2, safety_factor=2.0, gap_mm=1.0,
                lug_thickness_mm=30.0, clevis_thickness_mm=12.0, wear_surface_hardness_hrc=None)
    rep, msg = pg.pin_report_for(case, pg.SI)
    assert rep is None and "load_kn" in msg and "allowed" in msg


def test_defect_11_page_service_check_names_the_option():
    from selector.views import page as pg

    assert "environment" in pg.check_service({"plated": False, "environment": "martian"})
    assert "mating_material" in pg.check_service(pg.service_context(False, None, "x" * 300, "normal", None))
    assert pg.check_service(pg.service_context(True, "zinc plated", "brass", "harsh", 60.0)) is None
