"""``selector select`` (selector.views.cli.select): readable columns by default, every column
with --all-columns, the chosen units, the nearest misses."""
import io
import json

import pandas as pd
import pytest

import selector
from cli_runner import run

MPA_PER_KSI = 6.894757   # NIST SP 811 (2008) Appendix B.8


TARGET = ("--min-yield-mpa", "700", "--min-elongation-pct", "12", "--diameter", "30")


@pytest.fixture(scope="module")
def ref():
    return selector.select({"min_yield_mpa": 700, "min_elongation_pct": 12}, 30)


def test_json_default_is_readable(ref):
    code, out, _ = run("select", *TARGET, "--format", "json")
    data = json.loads(out)
    assert code == 0 and data["caution"] and data["units"] == "SI" and data["hardness"] == "HRC"
    rows = data["rows"]
    assert len(rows) == len(ref)
    first = rows[0]
    for key in ("grade", "process route", "yield (MPa)", "tensile (MPa)", "elongation (%)", "hardness (HRC)",
                "case depth (mm)", "part cost (relative)", "p_meet (%)", "process window"):
        assert key in first and key in data["columns"], key
    assert "route_family" not in first and "yield_mpa" not in first
    # yield to the nearest 5 MPa: within 2.5 MPa of the library's value, a multiple of 5
    for r, y in zip(rows, ref["yield_mpa"]):
        assert abs(r["yield (MPa)"] - y) <= 2.5 and r["yield (MPa)"] % 5 == 0
    assert [r["grade"] for r in rows] == ref["grade"].tolist()
    assert all("°F" not in r["process route"] for r in rows)


def test_json_in_us_units(ref):
    code, out, _ = run("select", *TARGET, "--format", "json", "--units", "US", "--top", "5")
    rows = json.loads(out)["rows"]
    assert code == 0 and len(rows) == 5
    for r, y in zip(rows, ref["yield_mpa"]):
        assert abs(r["yield (ksi)"] - y / MPA_PER_KSI) <= 0.5             # 1 ksi steps
    routes = " ".join(r["process route"] for r in rows)
    assert "°C" not in routes


def test_all_columns_keep_the_library_columns(ref):
    code, out, _ = run("select", *TARGET, "--format", "json", "--all-columns")
    rows = json.loads(out)["rows"]
    assert code == 0 and all(r["yield_mpa"] >= 700 for r in rows)
    assert rows[0]["route"] == ref["route"].iloc[0] and "yield (MPa)" in rows[0]     # steps in SI, and readable
    code, out, _ = run("select", *TARGET, "--format", "csv", "--all-columns")
    df = pd.read_csv(io.StringIO(out))
    assert (df["yield_mpa"] >= 700).all() and "route" in df and json.loads(df["route"].iloc[0])


def test_csv_default_and_hardness_scale():
    code, out, _ = run("select", *TARGET, "--format", "csv", "--hardness", "HB", "--top", "4")
    df = pd.read_csv(io.StringIO(out))
    assert code == 0 and len(df) == 4 and "hardness (HB)" in df and "hardness (HRC)" not in df
    assert "process route" in df and "route" not in df


def test_table_names_units_and_cautions():
    code, out, _ = run("select", *TARGET, "--top", "3")
    assert code == 0 and "candidates" in out and "yield (MPa)" in out and "process route" in out
    assert "CAUTION" in out and "licensed engineer" in out


def test_targets_file_matches_flags(tmp_path):
    toml = tmp_path / "t.toml"
    toml.write_text("[targets]\nmin_yield_mpa = 700\nmin_elongation_pct = 12\n", encoding="utf-8")
    _, a, _ = run("select", *TARGET, "--format", "json")
    code, b, _ = run("select", "--targets", toml, "--diameter", "30", "--format", "json")
    assert code == 0 and json.loads(a)["rows"] == json.loads(b)["rows"]


def test_nothing_meets_prints_nearest_misses():
    code, out, _ = run("select", "--min-yield-mpa", "2600", "--min-elongation-pct", "30")
    assert code == 1 and "Nearest misses" in out and "move min yield (MPa)" in out and "miss score" in out


def test_min_p_meet_and_allow_flags():
    code, out, _ = run("select", "--min-yield-mpa", "800", "--min-elongation-pct", "12", "--diameter", "60",
                       "--min-p-meet", "0.8", "--allow", "quench_cracking,shallow_hardening", "--format", "json",
                       "--all-columns")
    assert code == 0
    rows = json.loads(out)["rows"]
    ref = selector.select({"min_yield_mpa": 800, "min_elongation_pct": 12}, diameter_mm=60, min_p_meet=0.8,
                          allow=["quench_cracking", "shallow_hardening"])
    assert [r["grade"] for r in rows] == ref["grade"].tolist()
    assert all(r["min_p_meet"] == 0.8 for r in rows)
    code, out, _ = run("select", "--min-yield-mpa", "800", "--diameter", "60", "--top", "3")
    assert code == 0 and "p_meet (%)" in out and "CAUTION" in out
    code, _, err = run("select", "--min-yield-mpa", "800", "--min-p-meet", "0")
    assert code == 2 and "min_p_meet" in err and "(0, 1]" in err
    code, _, err = run("select", "--min-yield-mpa", "800", "--allow", "nosuchrule")
    assert code == 2 and "allow" in err and "quench_cracking" in err
