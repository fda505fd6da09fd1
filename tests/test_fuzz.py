"""Fuzz suite of the public boundary (issue 16), in the slow run.

Hypothesis draws from invalid and odd spaces (wrong types, NaN and infinities,
huge integers, deep nesting, control characters, numpy scalars and arrays, text
where numbers go and numbers where text goes) as well as valid ones, over
``evaluate``, ``select``, ``alternatives``, ``pin_targets``, ``diameter_sweep``,
the user-file readers and every CLI verb through ``main([...])`` (tests/cli_runner.py), and asserts:

* only :class:`~selector.errors.SelectorError` subclasses escape;
* no NaN, infinity or negative value where a physical quantity is expected
  (a NaN is allowed only where the library documents "not estimated");
* on the CLI: exit code 0, 1 or 2, and on 2 exactly one line ``error: ...`` on stderr;
* a failed load of any user file leaves the loaded state exactly as it was.

The number of examples per test is in :data:`EXAMPLES` (their sum is the suite's
total, at least 10 000).  Selection is the expensive call (a new section or part
length rebuilds the states table), so its valid draws keep to a small grid of
sections and one part length, whose tables stay in the engine's cache; the cheap
calls get many examples.  ``selector validate`` is fuzzed over bad command lines
only: a valid one recomputes the whole validation report (tests/test_validation.py).
"""
from __future__ import annotations

import copy
import json
import math
import os

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, event, given, settings, strategies as st

import selector
from selector import user_files as studies
from selector.catalogue.grades import FAMILIES, default_catalogue
from selector.errors import SelectorError
from cli_runner import run
from test_properties import valid_states   # valid points of every family's own process window

pytestmark = pytest.mark.slow

#: examples per test; the sum is the suite's total
EXAMPLES = {
    "evaluate": 2500, "pin_targets": 3000, "select": 150, "alternatives": 60, "diameter_sweep": 60,
    "price_sheet": 1200, "targets_file": 1200, "study_file": 600, "user_state": 300,
    "cli_evaluate": 700, "cli_grades": 300, "cli_select": 120, "cli_alternatives": 50, "cli_pin": 700,
    "cli_sweep": 60, "cli_validate": 48, "cli_any": 400,   # cli_validate: its whole space is 48 lines
    "heat_composition": 300, "pin_capacity": 300,
}
TOTAL_EXAMPLES = sum(EXAMPLES.values())


def cfg(name: str):
    # derandomized: CI draws the same examples on every run, so a pass or a failure is reproducible;
    # set SELECTOR_FUZZ_RANDOM=1 to explore new examples on a developer machine
    return settings(max_examples=EXAMPLES[name], deadline=None, database=None,
                    derandomize=os.environ.get("SELECTOR_FUZZ_RANDOM", "") != "1",
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much,
                                           HealthCheck.data_too_large, HealthCheck.function_scoped_fixture])


def test_the_suite_draws_at_least_10000_examples():
    assert TOTAL_EXAMPLES >= 10_000


CAT = default_catalogue()
GRADES = sorted(CAT.grades)


def _deep(n: int):
    root = x = []
    for _ in range(n):
        y = []
        x.append(y)
        x = y
    return root


# ----------------------------------------------------------------------------- odd values

ODD_NUMBERS = st.sampled_from([float("nan"), float("inf"), -float("inf"), -1.0, 0.0, -0.0, 1e-300, 1e308,
                               -1e308, 5e-324, 10 ** 400, -(10 ** 400), 2 ** 63, np.float32("nan"),
                               np.float64(1e308), np.int64(-1), np.int8(3), np.uint64(2 ** 64 - 1)])
ODD_THINGS = st.sampled_from([None, True, False, np.bool_(True), "", " ", "\x00", "nan", "1e999", "25",
                              "é" * 300, "x" * 5000, b"25", [], [25.0], [[25.0]], {}, {"a": 1}, (1, 2),
                              {1, 2}, np.array([]), np.array([25.0, 30.0]), np.array([[1.0]]),
                              np.array(["a"]), _deep(1200), object(), complex(1, 1), slice(1)])
JUNK = st.one_of(ODD_NUMBERS, ODD_THINGS, st.floats(allow_nan=True, allow_infinity=True), st.integers(),
                 st.text(max_size=12), st.binary(max_size=6))


def maybe(valid, junk=JUNK, p_valid: int = 3):
    """Mostly valid draws (weight ``p_valid``), else junk."""
    return st.one_of(*([valid] * p_valid), junk)


@st.composite
def some_bad(draw, valid: dict, odd: dict | None = None):
    """Keyword arguments: each from its valid strategy, except none (about half the
    draws), one or two chosen at random, drawn from its ``odd`` strategy (default
    :data:`JUNK`)."""
    names = sorted(valid)
    n_bad = draw(st.sampled_from([0, 0, 0, 1, 1, 2]))
    bad = set(draw(st.permutations(names))[:n_bad])
    odd = odd or {}
    return {k: draw(odd.get(k, JUNK) if k in bad else valid[k]) for k in names}


def physical(value, name: str, nan_ok: bool = True, positive: bool = False):
    """A physical quantity is finite and >= 0 (> 0 with ``positive``); NaN/None only
    where the library documents "not estimated" (``nan_ok``)."""
    if value is None or (isinstance(value, float) and math.isnan(value)):
        assert nan_ok, f"{name} is {value!r}"
        return
    v = float(value)
    assert math.isfinite(v), f"{name} = {v}"
    assert v > 0 if positive else v >= 0, f"{name} = {v}"


def frame_physical(df: pd.DataFrame, nan_ok=(), positive=()):
    for col in df.columns:
        if col in ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
                   "surface_hardness_hrc", "center_hardness_hv", "case_depth_mm", "relative_cost", "part_cost",
                   "mass_kg", "diameter_mm", "min_yield_mpa", "min_uts_mpa", "shear_mpa", "bending_mpa",
                   "bearing_mpa", "saving_per_kg"):
            v = pd.to_numeric(df[col], errors="coerce").to_numpy(float)
            if col not in nan_ok:
                assert not np.isnan(v).any(), f"{col} has NaN"
            v = v[~np.isnan(v)]
            assert np.isfinite(v).all(), f"{col} has inf"
            assert (v > 0).all() if col in positive else (v >= 0).all(), f"{col} has a negative value"


# ----------------------------------------------------------------------------- evaluate

STEP_KEYS = st.sampled_from(["quench", "temp_c", "hours", "agitation", "austenitize_c", "reduction_pct",
                             "designation", "surface_carbon_pct", "case_depth_mm", "frequency_hz", "x", 3])
STEP_VALUES = st.one_of(st.sampled_from(["oil", "water", "air", "brine", "polymer", "mild", "T6", "H900",
                                         "1/2 hard"]),
                        st.floats(0, 2000), st.integers(-10, 2000), JUNK)
OPS = st.sampled_from(["harden", "temper", "anneal", "normalize", "cold_work", "solution_treat", "age",
                       "carburize", "nitride", "induction_harden", "quench", ""])
STEP = st.builds(lambda op, kv: {"op": op, **kv}, OPS, st.dictionaries(STEP_KEYS, STEP_VALUES, max_size=3))
#: a fresh copy per draw (a test may change a step of its copy)
VALID_ROUTES = st.sampled_from([
    [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}],
    [{"op": "harden", "quench": "water"}], [{"op": "anneal"}], [{"op": "normalize"}],
    [{"op": "cold_work", "reduction_pct": 20}], [{"op": "solution_treat"}, {"op": "age", "designation": "T6"}],
    [{"op": "carburize", "temp_c": 925, "hours": 6}, {"op": "harden", "quench": "oil"},
     {"op": "temper", "temp_c": 180}],
    [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 600}, {"op": "nitride", "temp_c": 520,
                                                                          "hours": 30}]]).map(copy.deepcopy)
ROUTES = st.one_of(VALID_ROUTES, VALID_ROUTES, st.lists(st.one_of(STEP, JUNK), max_size=4), STEP, JUNK)


def evaluate_ok(r: dict) -> None:
    for k in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hb", "hardness_hrc",
              "surface_hardness_hv", "center_hardness_hv"):
        if k in r:
            physical(r[k], k)
    physical(r["case_depth_mm"], "case_depth_mm", nan_ok=False)
    if r["uts_mpa"] is not None and r["yield_mpa"] is not None:
        assert r["yield_mpa"] <= r["uts_mpa"] * (1 + 1e-9)
    for p in r.get("profile", []):
        physical(p["hardness_hv"], "profile hardness_hv")
        physical(p["depth_mm"], "profile depth_mm", nan_ok=False)


@st.composite
def evaluate_args(draw):
    """A valid (grade, route, section, corner) point of some family's own process
    window (tests/test_properties.valid_states), then none, one or two arguments
    (or one step's parameter) replaced by odd values."""
    gid, _, steps, d, t = draw(valid_states())
    kw = {"grade": gid, "route": [dict(x) for x in steps], "diameter_mm": d if d is not None else 25.0,
          "thickness_mm": t, "composition": draw(st.sampled_from(["nominal", "lean", "rich"]))}
    odd = {"grade": st.one_of(st.sampled_from(["steel", "AISI 4140", "42CrMo4", " 4140 ", "g41400"]), JUNK),
           "route": ROUTES, "diameter_mm": st.one_of(st.floats(), JUNK), "thickness_mm": JUNK,
           "composition": JUNK, "step": STEP_VALUES}
    for name in draw(st.permutations(sorted(odd)))[:draw(st.sampled_from([0, 0, 0, 1, 1, 2]))]:
        if name == "step":
            if isinstance(kw["route"], list):   # change a copy, never a drawn object
                kw["route"] = [dict(x) if isinstance(x, dict) else x for x in kw["route"]]
            i = draw(st.integers(0, len(kw["route"]) - 1)) if isinstance(kw["route"], list) and kw["route"] else None
            if i is not None and isinstance(kw["route"][i], dict):
                kw["route"][i][draw(STEP_KEYS)] = draw(STEP_VALUES)
        else:
            kw[name] = draw(odd[name])
    return kw


@cfg("evaluate")
@given(evaluate_args())
def test_fuzz_evaluate(kw):
    try:
        r = selector.evaluate(kw.pop("grade"), kw.pop("route"), **kw)
    except SelectorError as exc:
        assert str(exc)
        event(f"refused: {type(exc).__name__}")
        return
    event("accepted")
    evaluate_ok(r)


PIN_VALID = {"load_kn": st.floats(0.01, 2000.0), "diameter_mm": st.floats(1.0, 200.0),
             "shear_planes": st.sampled_from([1, 2, np.int64(2), 2.0]), "safety_factor": st.floats(1.0, 10.0),
             "gap_mm": st.floats(0.0, 50.0), "lug_thickness_mm": st.floats(1.0, 300.0),
             "clevis_thickness_mm": st.floats(1.0, 300.0),
             "wear_surface_hardness_hrc": st.one_of(st.none(), st.floats(20.0, 70.0)),
             "material_class": st.sampled_from(["steel", "aluminium", "titanium", "alloy_steel", "copper_alloy"]),
             "load_model": st.sampled_from(["uniform", "concentrated"]), "bearing_factor": st.floats(0.5, 3.0)}
PIN_ODD = {"load_kn": st.one_of(st.floats(), ODD_NUMBERS, ODD_THINGS),
           "diameter_mm": st.one_of(st.floats(), ODD_NUMBERS, ODD_THINGS)}


@cfg("pin_targets")
@given(some_bad(PIN_VALID, PIN_ODD), st.sampled_from(["kn", "lbf", "both", "none"]))
def test_fuzz_pin_targets(kw, load_as):
    if load_as in ("lbf", "both"):
        kw["load_lbf"] = kw["load_kn"] if load_as == "lbf" else 10.0
    if load_as in ("lbf", "none"):
        kw.pop("load_kn")
    try:
        t = selector.pin_targets(**kw)
    except SelectorError as exc:
        assert str(exc)
        event(f"refused: {type(exc).__name__}")
        return
    event("accepted")
    assert set(t) <= {"min_yield_mpa", "min_uts_mpa", "min_surface_hardness_hrc"}
    for k, v in t.items():      # >= 0: a subnormal load's stress underflows to 0 MPa
        physical(v, k, nan_ok=False)


# ----------------------------------------------------------------------------- select, alternatives, sweep

GRID_D = st.sampled_from([20.0, 25.0])          # sections whose states tables stay cached
FAMILY_LISTS = st.lists(st.sampled_from(list(FAMILIES)), min_size=1, max_size=3)
VALID_TARGETS = st.fixed_dictionaries({}, optional={
    "min_yield_mpa": st.floats(0, 1800), "max_uts_mpa": st.floats(300, 2500), "min_uts_mpa": st.floats(0, 1500),
    "min_elongation_pct": st.floats(0, 30), "min_hardness_hrc": st.floats(0, 65), "max_hardness_hrc": st.floats(20, 70),
    "min_surface_hardness_hrc": st.floats(0, 65), "min_case_depth_mm": st.floats(0, 2),
    "max_relative_cost": st.floats(0.5, 20), "families": FAMILY_LISTS, "exclude_families": FAMILY_LISTS,
    "corrosion_resistant": st.booleans()})
ODD_TARGETS = st.one_of(
    st.dictionaries(st.sampled_from(["min_yield_mpa", "max_uts_mpa", "min_hardness_hrc", "families",
                                     "corrosion_resistant", "min_yield", "", "MIN_YIELD_MPA"]),
                    st.one_of(JUNK, st.lists(st.sampled_from(["steel", "alloy_steels", ""]), max_size=2)),
                    min_size=1, max_size=3),
    JUNK)
#: price sheets: the valid ones resolve to two cache keys (None and {"4140": 1.2})
VALID_PRICES = st.sampled_from([None, {"4140": 1.2}, {"AISI 4140": 1.2}, {"G41400": 1.2}])
ODD_PRICES = st.one_of(st.dictionaries(st.sampled_from(["4140", "AISI 4140", "nosuch", "", 4140, None]),
                                       st.one_of(ODD_NUMBERS, ODD_THINGS), min_size=1, max_size=2),
                       st.just({"4140": 1.2, "AISI 4140": 1.3}), JUNK)
PRICES = st.one_of(VALID_PRICES, ODD_PRICES)
VALID_SERVICE = st.fixed_dictionaries({}, optional={
    "plated": st.booleans(), "environment": st.sampled_from(["harsh", "normal", "controlled"]),
    "mating_material": st.sampled_from(["brass", "6061", "structural steel", "stainless steel"]),
    "service_temp_c": st.floats(-50, 600)})
ODD_SERVICE = st.fixed_dictionaries({}, optional={
    "plated": JUNK, "environment": st.one_of(st.just("martian"), JUNK),
    "mating_material": st.one_of(st.just("kryptonite"), JUNK), "service_temp_c": JUNK,
    "plating": st.sampled_from(["zinc plated", "unobtainium", None])})
SERVICE = st.one_of(VALID_SERVICE, ODD_SERVICE)
NAN_OK = ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
          "surface_hardness_hrc", "center_hardness_hv")


@cfg("select")
@given(some_bad({"targets": VALID_TARGETS, "diameter_mm": GRID_D, "length_mm": st.just(100.0),
                 "price_sheet": VALID_PRICES,
                 "objectives": st.sampled_from([None, [("yield_mpa", "max"), ("relative_cost", "min")]]),
                 "robust_only": st.booleans(), "service": VALID_SERVICE},
                {"targets": ODD_TARGETS, "price_sheet": ODD_PRICES, "service": ODD_SERVICE}))
def test_fuzz_select(kw):
    service = kw.pop("service")
    try:
        res = selector.select(kw.pop("targets"), kw.pop("diameter_mm"), **kw,
                              **(service if isinstance(service, dict) else {"environment": service}))
    except SelectorError as exc:
        assert str(exc)
        event(f"refused: {type(exc).__name__}")
        return
    event("accepted")
    frame_physical(res, nan_ok=NAN_OK, positive=("relative_cost", "part_cost", "mass_kg"))


@cfg("alternatives")
@given(some_bad({"state": valid_states(), "diameter_mm": GRID_D, "price_sheet": VALID_PRICES,
                 "elongation_tolerance_pct": st.floats(0, 5)},
                {"state": st.tuples(st.one_of(st.sampled_from(["4140", "52100", "440C"]), JUNK), st.none(),
                                    ROUTES), "price_sheet": ODD_PRICES}))
def test_fuzz_alternatives(kw):
    state = kw.pop("state")
    kw["grade"], kw["route"] = (state[0], state[2]) if isinstance(state, tuple) else (state, state)
    try:
        res = selector.alternatives(kw.pop("grade"), kw.pop("route"), kw.pop("diameter_mm"), **kw)
    except SelectorError as exc:
        assert str(exc)
        event(f"refused: {type(exc).__name__}")
        return
    event("accepted")
    frame_physical(res, nan_ok=NAN_OK, positive=("relative_cost", "part_cost", "mass_kg", "saving_per_kg"))


@cfg("diameter_sweep")
@given(some_bad({"diameters_mm": st.lists(GRID_D, min_size=1, max_size=2), "load_kn": st.floats(1.0, 80.0),
                 "lug_thickness_mm": st.sampled_from([10.0, 30.0]), "clevis_thickness_mm": st.sampled_from([5.0, 12.0]),
                 "length_mm": st.just(100.0),
                 "extra_targets": st.one_of(st.none(), st.just({"min_elongation_pct": 10.0}), VALID_TARGETS),
                 "caution_context": st.one_of(st.none(), VALID_SERVICE),
                 "cost_column": st.sampled_from(["part_cost", "relative_cost"]), "price_sheet": VALID_PRICES},
                {"extra_targets": ODD_TARGETS, "caution_context": st.one_of(ODD_SERVICE, JUNK),
                 "price_sheet": ODD_PRICES}))
def test_fuzz_diameter_sweep(kw):
    try:
        res = selector.diameter_sweep(kw.pop("diameters_mm"), **kw)
    except SelectorError as exc:
        assert str(exc)
        event(f"refused: {type(exc).__name__}")
        return
    event("accepted")
    frame_physical(res, nan_ok=("yield_mpa", "uts_mpa", "hardness_hrc", "surface_hardness_hrc", "relative_cost",
                                "part_cost", "min_surface_hardness_hrc"),
                   positive=("diameter_mm",))


# ----------------------------------------------------------------------------- user files

CSV_CELLS = st.sampled_from(["grade", "relative_price", "source", "4140", "AISI 4140", "1045", "42CrMo4", "1.5",
                             "-2", "0", "nan", "inf", "1e400", "9" * 400, '"', "", " ", "#", "\x00", "é", "=1+1",
                             "relative_price_usd", "\ufeffgrade"])
CSV_TEXT = st.lists(st.lists(CSV_CELLS, max_size=4).map(",".join), max_size=6).map("\n".join)
BOMS = st.sampled_from(["", "\ufeff"])
FILE_BYTES = st.one_of(
    st.binary(max_size=200),
    st.builds(lambda b, t: (b + t).encode("utf-8"), BOMS, CSV_TEXT),
    CSV_TEXT.map(lambda s: s.encode("utf-16")),
    CSV_TEXT.map(lambda s: s.encode("latin-1", errors="replace")))


@cfg("price_sheet")
@given(FILE_BYTES)
def test_fuzz_price_sheet_file(data):
    try:
        prices = studies.load_price_sheet(data, "prices.csv")
    except SelectorError as exc:
        assert str(exc).startswith("prices.csv")
        return
    assert prices and all(k in CAT.grades for k in prices)
    for k, v in prices.items():
        physical(v, k, nan_ok=False, positive=True)


TOML_LINES = st.sampled_from(["[targets]", "min_yield_mpa = 800", "min_uts_mpa = -1", "families = [",
                              "families = ['alloy_steel']", "max_uts_mpa = 500", "x = 1", "=", "[", "]",
                              "corrosion_resistant = 1", "min_elongation_pct = inf", "min_elongation_pct = nan",
                              "\x00", "é", "min_yield_mpa = " + "9" * 5000, "a = " + "[" * 200 + "]" * 200,
                              "b = " + "{c = " * 60 + "1" + "}" * 60, "min_yield_mpa = 1e400", "# [[[[",
                              's = "[[[["', "min_yield_mpa = 0x10", "[targets.x]", "[[targets]]"])
TOML_BYTES = st.one_of(st.builds(lambda b, t: (b + t).encode("utf-8"), BOMS,
                                 st.lists(TOML_LINES, max_size=6).map("\n".join)),
                       st.binary(max_size=80))


@cfg("targets_file")
@given(TOML_BYTES)
def test_fuzz_targets_file(data):
    try:
        t = studies.load_targets(data, "t.toml")
    except SelectorError as exc:
        assert str(exc).startswith("t.toml")
        return
    assert isinstance(t, dict)
    for k, v in t.items():
        if k.startswith(("min_", "max_")):
            physical(v, k, nan_ok=False)


JSON_SCALARS = st.one_of(st.none(), st.booleans(), st.integers(), st.floats(allow_nan=False, allow_infinity=False),
                         st.text(max_size=8))
JSON_VALUES = st.recursive(JSON_SCALARS, lambda c: st.one_of(st.lists(c, max_size=3),
                                                             st.dictionaries(st.text(max_size=6), c, max_size=3)),
                           max_leaves=8)
RAW_JSON = st.sampled_from(["[" * 3000 + "]" * 3000, "9" * 5000, "NaN", "-Infinity", '{"a": 1, "a": 2}', "{",
                            '"\\ud800"', "1e400", '{"a":' * 100 + "1" + "}" * 100])


@cfg("study_file")
@given(st.dictionaries(st.sampled_from(["format", "version", "targets", "section", "options", "x"]),
                       st.one_of(JSON_VALUES, st.sampled_from([{"diameter_mm": 25.0}, {"min_yield_mpa": 600},
                                                               {"thickness_mm": 1e400}])), max_size=5),
       st.booleans(), st.one_of(st.none(), RAW_JSON), BOMS)
def test_fuzz_study_file(doc, canonical, raw, bom):
    import tempfile
    from pathlib import Path

    if canonical:
        doc = {**doc, "format": studies.STUDY_FORMAT, "version": 1}
    text = json.dumps(doc)
    if raw is not None:
        text = text[:-1] + (", " if doc else "") + '"options": {"x": ' + raw + "}}"
    with tempfile.TemporaryDirectory() as tmp:
        p = Path(tmp) / "study.json"
        p.write_text(bom + text, encoding="utf-8")
        try:
            s = studies.load_study(p)
        except SelectorError as exc:
            assert str(exc).startswith(str(p))
            return
        for k, v in s.section.items():
            physical(v, k, nan_ok=False, positive=True)


@pytest.fixture(scope="module")
def loaded_state():
    from test_user_files import COMP, GOOD_PRICES, grades_bytes

    u = studies.UserFiles()
    u.load_prices(GOOD_PRICES)
    u.load_custom_grades(grades_bytes(), COMP.encode())
    u.load_targets(b"[targets]\nmin_yield_mpa = 800\n")
    return u


@cfg("user_state")
@given(st.sampled_from(["prices", "targets", "grades", "compositions"]),
       st.one_of(FILE_BYTES, TOML_BYTES, st.just(b"\xef\xbb\xbf"), st.just(b"")))
def test_fuzz_failed_load_leaves_the_state_as_it_was(loaded_state, which, data):
    """Property: a failed load of any user file leaves the loaded state exactly as it was."""
    from test_user_files import COMP, grades_bytes

    u = loaded_state
    before = u.snapshot()
    load = {"prices": lambda: u.load_prices(data), "targets": lambda: u.load_targets(data),
            "grades": lambda: u.load_custom_grades(data, COMP.encode()),
            "compositions": lambda: u.load_custom_grades(grades_bytes(), data)}[which]
    try:
        load()
    except SelectorError:
        assert u.snapshot() == before
        return
    finally:
        # restore the module's state for the next example (a good file may have replaced it)
        from test_user_files import GOOD_PRICES
        u.load_prices(GOOD_PRICES)
        u.load_custom_grades(grades_bytes(), COMP.encode())
        u.load_targets(b"[targets]\nmin_yield_mpa = 800\n")


# ----------------------------------------------------------------------------- the command line

def run_cli(argv) -> tuple[int, str, str]:
    code, o, e = run(*argv)
    assert code in (0, 1, 2), (argv, code, e)
    event(f"exit {code}")
    assert "Traceback" not in o + e
    if code == 2:
        lines = e.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("error: "), (argv, e)
    return code, o, e


NUM_TEXT = st.one_of(st.floats(allow_nan=True, allow_infinity=True).map(repr), st.integers().map(str),
                     st.sampled_from(["nan", "inf", "-inf", "1e308", "1e-300", "-1", "0", "", "x", "1e999",
                                      "9" * 400, "0x10", "1_000", " 25"]))
ARG_TEXT = st.one_of(NUM_TEXT, st.text(max_size=10), st.sampled_from(["--json", "--format", "-h", "--", "-",
                                                                      "--top", "json", "csv"]))


def opt(flag, values):
    return st.one_of(st.just([]), values.map(lambda v: [flag, v]))


STEP_TEXT = st.one_of(st.sampled_from(["harden quench=oil", "temper temp_c=540 hours=2", "anneal", "normalize",
                                       "temper temp_c=nan", "temper temp_c=1e999", "harden quench=honey",
                                       "temper 540", "cold_work reduction_pct=20", "x=1", "", "temper temp_c=",
                                       "harden quench=oil,agitation=mild", "temper temp_c=" + "9" * 400]),
                      st.text(max_size=20))
ROUTE_JSON = st.one_of(VALID_ROUTES.map(json.dumps), RAW_JSON, st.text(max_size=20),
                       st.just("[" * 40 + "]" * 40))
GRADE_TEXT = st.one_of(st.sampled_from(["4140", "42CrMo4", "52100", "440C", "1018", "6061", "nosuch", "",
                                        "x" * 500]), st.text(max_size=10))


@st.composite
def cli_evaluate_argv(draw):
    """A valid command line (a point of some family's process window, as steps or as
    --route-json), then none, one or two of its parts replaced by odd text."""
    gid, _, steps, d, t = draw(valid_states())
    parts = {"grade": [gid], "route": ["--route-json", json.dumps(steps)] if draw(st.booleans()) else
             [" ".join([s["op"]] + [f"{k}={v}" for k, v in s.items() if k != "op"]) for s in steps],
             "section": ["--diameter", repr(d)] if d is not None else ["--thickness", repr(t)],
             "json": draw(st.sampled_from([[], ["--json"]])), "extra": []}
    odd = {"grade": GRADE_TEXT.map(lambda g: [g]), "route": st.one_of(
               st.lists(STEP_TEXT, max_size=3), ROUTE_JSON.map(lambda r: ["--route-json", r])),
           "section": st.tuples(st.sampled_from(["--diameter", "--thickness"]), NUM_TEXT).map(list),
           "extra": st.lists(ARG_TEXT, min_size=1, max_size=2)}
    for name in draw(st.permutations(sorted(odd)))[:draw(st.sampled_from([0, 0, 1, 1, 2]))]:
        parts[name] = draw(odd[name])
    return ["evaluate", *parts["grade"], *parts["route"], *parts["section"], *parts["json"], *parts["extra"]]


@cfg("cli_evaluate")
@given(cli_evaluate_argv())
def test_fuzz_cli_evaluate(argv):
    code, out, _ = run_cli(argv)
    if code == 0 and argv[-1] == "--json":
        evaluate_ok(json.loads(out))


@cfg("cli_grades")
@given(st.one_of(st.just([]), GRADE_TEXT.map(lambda g: [g])), st.sampled_from([[], ["--json"]]),
       st.lists(ARG_TEXT, max_size=1))
def test_fuzz_cli_grades(name, js, extra):
    run_cli(["grades", *name, *js, *extra])


TARGET_FLAGS = st.lists(st.tuples(st.sampled_from(["--min-yield-mpa", "--max-uts-mpa", "--min-elongation-pct",
                                                   "--min-hardness-hrc", "--max-relative-cost", "--family",
                                                   "--exclude-family", "--corrosion-resistant", "--robust-only"]),
                                  st.one_of(st.sampled_from(["600", "900", "12", "alloy_steel", "steel"]), NUM_TEXT)),
                        max_size=3).map(lambda ps: [x for f, v in ps for x in ((f,) if f in (
                            "--corrosion-resistant", "--robust-only") else (f, v))])
#: a valid section is one of two cached ones; every other value drawn is refused before any work
BAD_NUM_TEXT = st.sampled_from(["nan", "inf", "-inf", "-1", "0", "1e999", "1e308", "1e-300", "600", "x", "",
                                "9" * 400, "0x10"])
SECTION_ARGS = st.one_of(st.just([]), st.sampled_from([["--diameter", "20"], ["--diameter", "25"]]),
                         BAD_NUM_TEXT.map(lambda v: ["--diameter", v]), BAD_NUM_TEXT.map(lambda v: ["--length", v]),
                         BAD_NUM_TEXT.map(lambda v: ["--thickness", v]))
FORMATS = st.sampled_from([[], ["--format", "json"], ["--format", "csv"], ["--format", "xml"]])


@cfg("cli_select")
@given(TARGET_FLAGS, SECTION_ARGS, opt("--top", st.one_of(st.sampled_from(["3", "1"]), NUM_TEXT)), FORMATS,
       st.lists(ARG_TEXT, max_size=1))
def test_fuzz_cli_select(targets, section, top, fmt, extra):
    every = ["--all-columns"] if fmt == ["--format", "json"] else []     # the library's columns, checked below
    code, out, _ = run_cli(["select", *targets, *section, *top, *fmt, *every, *extra])
    if code in (0, 1) and fmt == ["--format", "json"] and not extra:
        rows = pd.DataFrame(json.loads(out)["rows"])
        if code == 0:
            frame_physical(rows, nan_ok=tuple(rows.columns), positive=("relative_cost", "part_cost", "mass_kg"))


@cfg("cli_alternatives")
@given(valid_states(), st.sampled_from([[], ["--diameter", "20"], ["--diameter", "25"]]),
       st.one_of(st.just([]), st.just([]), SECTION_ARGS, st.lists(STEP_TEXT, min_size=1, max_size=2),
                 ROUTE_JSON.map(lambda r: ["--route-json", r])), FORMATS)
def test_fuzz_cli_alternatives(state, section, odd, fmt):
    gid, _, steps, _, _ = state
    route = ["--route-json", json.dumps(steps)] if not (odd and odd[0] == "--route-json") else []
    run_cli(["alternatives", gid, *route, *section, *odd, *fmt])


PIN_ARGS = st.tuples(
    st.sampled_from([["--load-kn"], ["--load-lbf"], []]).flatmap(
        lambda f: st.just([]) if not f else st.one_of(st.sampled_from(["20", "60"]), NUM_TEXT).map(lambda v: f + [v])),
    opt("--lug", st.one_of(st.just("30"), NUM_TEXT)), opt("--clevis", st.one_of(st.just("12"), NUM_TEXT)),
    opt("--gap", NUM_TEXT), opt("--safety-factor", st.one_of(st.just("2"), NUM_TEXT)),
    opt("--shear-planes", st.sampled_from(["1", "2", "3", "x"])), opt("--wear-hrc", NUM_TEXT),
    opt("--material-class", st.sampled_from(["steel", "aluminium", "wood", ""])),
    opt("--mating", st.sampled_from(["brass", "kryptonite"])), opt("--service-temp", NUM_TEXT),
).map(lambda parts: [x for p in parts for x in p])
VALID_PIN_ARGS = st.tuples(
    st.sampled_from(["--load-kn", "--load-lbf"]), st.floats(0.1, 500.0), st.floats(1.0, 100.0),
    st.floats(1.0, 100.0), st.floats(0.0, 5.0), st.floats(1.0, 5.0), st.sampled_from(["1", "2"]),
    st.one_of(st.none(), st.floats(20.0, 70.0))).map(
    lambda v: [v[0], repr(v[1]), "--lug", repr(v[2]), "--clevis", repr(v[3]), "--gap", repr(v[4]),
               "--safety-factor", repr(v[5]), "--shear-planes", v[6]] + ([] if v[7] is None else ["--wear-hrc",
                                                                                              repr(v[7])]))


@cfg("cli_pin")
@given(st.one_of(VALID_PIN_ARGS, VALID_PIN_ARGS, PIN_ARGS),
       st.one_of(st.floats(1.0, 100.0).map(repr), st.sampled_from(["25", "10"]), NUM_TEXT),
       st.sampled_from([[], ["--format", "json"], ["--format", "table"]]),
       st.one_of(st.just([]), st.just([]), st.lists(ARG_TEXT, max_size=1)))
def test_fuzz_cli_pin(args, d, fmt, extra):
    code, out, _ = run_cli(["pin", *args, "--diameter", d, *fmt, *extra])
    if code == 0:
        assert "Infinity" not in out and "NaN" not in out and " inf" not in out and " nan" not in out
        if fmt == ["--format", "json"] and not extra:
            rep = json.loads(out)
            for k, v in rep["targets"].items():
                physical(v, k, nan_ok=False)


@cfg("cli_sweep")
@given(st.one_of(VALID_PIN_ARGS, VALID_PIN_ARGS, PIN_ARGS),
       st.one_of(st.sampled_from(["20,25", "20", "20:25:5"]),
                 st.sampled_from(["20:40:1e-9", "20:inf:1", "1:1e9:1", ",", "a", "20:10:1", "0,20", "-5", "20:40"]),
                 st.text(max_size=8)),
       st.sampled_from([["--length", "100"], ["--length", "100"], ["--length", "nan"], ["--length", "-1"]]),
       FORMATS)
def test_fuzz_cli_sweep(args, ds, length, fmt):
    every = ["--all-columns"] if fmt == ["--format", "json"] else []     # the library's columns, checked below
    code, out, _ = run_cli(["sweep", *args, "--diameters", ds, *length, *fmt, *every])
    if code == 0 and fmt == ["--format", "json"]:
        frame_physical(pd.DataFrame(json.loads(out)["rows"]),
                       nan_ok=("yield_mpa", "uts_mpa", "hardness_hrc", "surface_hardness_hrc", "relative_cost",
                               "part_cost", "min_surface_hardness_hrc"),
                       positive=("diameter_mm",))


@cfg("cli_validate")
@given(st.data())
def test_fuzz_cli_validate_bad_command_lines(tmp_path_factory, data):
    """Only command lines that must fail before any work (a valid one recomputes the
    whole report, covered by tests/test_validation.py)."""
    tmp = tmp_path_factory.getbasetemp()
    afile = tmp / "fuzz_a_file"
    afile.write_text("x", encoding="utf-8")
    out = data.draw(st.sampled_from([str(afile / "x.md"), str(afile / "d" / "x.md"), str(tmp), "a\x00b.md"]))
    figures = data.draw(st.sampled_from([[], ["--figures", str(afile)], ["--figures", str(afile / "f")]]))
    extra = data.draw(st.sampled_from([[], ["--strict"], ["--bogus"], ["--out"]]))
    code, _, _ = run_cli(["validate", "--out", out, *figures, *extra])
    assert code == 2


@cfg("cli_any")
@given(st.sampled_from(["evaluate", "grades", "select", "alternatives", "pin", "sweep", "validate", "batch",
                        "nosuch", "", "-x", "--help"]), st.lists(ARG_TEXT, max_size=4))
def test_fuzz_cli_any_verb_with_odd_arguments(verb, args):
    argv = [verb, *args]
    if verb == "validate" and not any(a in ("-h", "--help") for a in args):
        argv.append("--bogus-option")          # never run the full report here
    if verb in ("select",) and not any(a in ("-h", "--help") for a in args):
        argv.append("--min-yield-mpa=1e9")     # nothing qualifies: fast nearest misses only
    run_cli(argv)


# ----------------------------------------------------------------------------- later entry points

HEAT_KEYS = st.sampled_from(["C", "Mn", "Cr", "Mo", "Ni", "Si", "cu", "V", "B", "Xx", "", "Fe", " C "])
HEAT_VALUES = st.one_of(st.floats(0.0, 2.0), st.floats(), ODD_NUMBERS, ODD_THINGS)


@cfg("heat_composition")
@given(st.one_of(st.dictionaries(HEAT_KEYS, HEAT_VALUES, max_size=6), ODD_THINGS))
def test_fuzz_heat_composition(heat):
    try:
        r = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}],
                              diameter_mm=30, heat_composition=heat)
    except SelectorError as exc:
        assert str(exc)
        event("refused")
        return
    event("accepted")
    evaluate_ok(r)


CAP_VALUES = st.one_of(st.floats(0.5, 100.0), st.floats(), ODD_NUMBERS, ODD_THINGS)


@cfg("pin_capacity")
@given(st.fixed_dictionaries({"diameter_mm": CAP_VALUES, "gap_mm": st.one_of(st.floats(0.0, 10.0), CAP_VALUES),
                              "lug_thickness_mm": CAP_VALUES, "clevis_thickness_mm": CAP_VALUES,
                              "safety_factor": st.one_of(st.floats(1.0, 5.0), CAP_VALUES),
                              "hardness_hrc": st.one_of(st.floats(15.0, 65.0), CAP_VALUES)}))
def test_fuzz_pin_capacity(kw):
    try:
        cap = selector.pin_capacity("4130", None, **kw)
    except SelectorError as exc:
        assert str(exc)
        event("refused")
        return
    event("accepted")
    for k in ("shear_kn", "bending_kn", "bearing_kn", "load_kn", "shear_lbf", "load_lbf"):
        assert math.isfinite(cap[k]) and cap[k] >= 0.0, (k, cap[k])
    assert cap["governing"] in ("shear", "bending", "bearing")
