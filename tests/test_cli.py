"""The command line: each command calls the library and formats its answer."""
import io
import json
from contextlib import redirect_stderr, redirect_stdout

import pandas as pd
import pytest

import selector
from selector.views.cli import main, parse_step_text


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    with redirect_stdout(out), redirect_stderr(err):
        code = main(list(argv))
    return code, out.getvalue(), err.getvalue()


def test_parse_step_text():
    assert parse_step_text("temper temp_c=540 hours=2") == {"op": "temper", "temp_c": 540.0, "hours": 2.0}
    assert parse_step_text("harden quench=oil") == {"op": "harden", "quench": "oil"}


def test_evaluate_readable_and_json_match_library():
    code, out, _ = run("evaluate", "42CrMo4", "harden quench=oil", "temper temp_c=540 hours=2", "--diameter", "40")
    assert code == 0 and "tensile strength" in out and "CAUTION" in out and "mid-radius" in out
    code, out, _ = run("evaluate", "4140", "--route-json",
                       '[{"op":"harden","quench":"oil"},{"op":"temper","temp_c":540,"hours":2}]',
                       "--diameter", "40", "--json")
    data = json.loads(out)
    ref = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}],
                            diameter_mm=40)
    assert data["uts_mpa"] == pytest.approx(ref["uts_mpa"]) and "caution" in data


def test_bad_input_exits_2_with_message():
    code, _, err = run("evaluate", "4140", "harden quench=honey")
    assert code == 2 and "quench" in err and "allowed" in err
    code, _, err = run("evaluate", "nosuchgrade", "anneal")
    assert code == 2 and "nearest" in err


def test_select_formats_and_toml(tmp_path):
    code, out, _ = run("select", "--min-yield-mpa", "700", "--min-elongation-pct", "12", "--diameter", "30",
                       "--format", "json")
    rows = json.loads(out)["rows"]
    assert code == 0 and rows and all(r["yield_mpa"] >= 700 for r in rows)
    code, out, _ = run("select", "--min-yield-mpa", "700", "--diameter", "30", "--format", "csv")
    df = pd.read_csv(io.StringIO(out))
    assert (df["yield_mpa"] >= 700).all() and "route" in df
    toml = tmp_path / "t.toml"
    toml.write_text("[targets]\nmin_yield_mpa = 700\nmin_elongation_pct = 12\n", encoding="utf-8")
    code, out2, _ = run("select", "--targets", str(toml), "--diameter", "30", "--format", "json")
    assert code == 0 and len(json.loads(out2)["rows"]) == len(rows)
    code, out, _ = run("select", "--min-yield-mpa", "700", "--diameter", "30", "--top", "3")
    assert code == 0 and "candidates" in out and "CAUTION" in out


def test_select_nothing_meets_prints_nearest_misses():
    code, out, _ = run("select", "--min-yield-mpa", "2600", "--min-elongation-pct", "30")
    assert code == 1 and "Nearest misses" in out and "move_min_yield_mpa" in out


def test_alternatives_command():
    code, out, _ = run("alternatives", "4340", "harden quench=oil", "temper temp_c=600", "--format", "json")
    rows = json.loads(out)["rows"]
    assert code == 0 and rows
    assert all(r["relative_cost"] <= rows[-1]["relative_cost"] for r in rows)


def test_pin_command_targets_match_library():
    code, out, _ = run("pin", "--load-kn", "60", "--diameter", "25", "--gap", "1.5", "--lug", "38", "--clevis", "16",
                       "--format", "json")
    data = json.loads(out)
    t = selector.pin_targets(load_kn=60, diameter_mm=25, gap_mm=1.5, lug_thickness_mm=38, clevis_thickness_mm=16)
    assert data["targets"]["min_yield_mpa"] == pytest.approx(t["min_yield_mpa"])


def test_module_entry_point_and_console_script():
    import shutil
    import subprocess
    import sys

    r = subprocess.run([sys.executable, "-m", "selector", "grades", "4140", "--json"], capture_output=True,
                       text=True, timeout=120)
    assert r.returncode == 0 and json.loads(r.stdout)["id"] == "4140"
    exe = shutil.which("selector")
    if exe is None:
        pytest.skip("console script not installed (run pip install -e .)")
    r = subprocess.run([exe, "grades", "G41400", "--json"], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0 and json.loads(r.stdout)["id"] == "4140"


def test_select_min_p_meet_and_allow_flags():
    code, out, _ = run("select", "--min-yield-mpa", "800", "--min-elongation-pct", "12", "--diameter", "60",
                       "--min-p-meet", "0.8", "--allow", "quench_cracking,shallow_hardening", "--format", "json")
    assert code == 0
    rows = json.loads(out)["rows"]
    ref = selector.select({"min_yield_mpa": 800, "min_elongation_pct": 12}, diameter_mm=60, min_p_meet=0.8,
                          allow=["quench_cracking", "shallow_hardening"])
    assert [r["grade"] for r in rows] == ref["grade"].tolist()
    assert all(r["min_p_meet"] == 0.8 for r in rows)
    code, out, _ = run("select", "--min-yield-mpa", "800", "--diameter", "60", "--top", "3")
    assert code == 0 and "p_meet_pct" in out and "CAUTION" in out
    code, _, err = run("select", "--min-yield-mpa", "800", "--min-p-meet", "0")
    assert code == 2 and "min_p_meet" in err and "(0, 1]" in err
    code, _, err = run("select", "--min-yield-mpa", "800", "--allow", "nosuchrule")
    assert code == 2 and "allow" in err and "quench_cracking" in err
