"""The local page (app.py) through Streamlit's AppTest, and the pure helpers of
selector.views.page (units, hull band, chart data).

The first AppTest run expands the catalogue (several seconds); the cached
expansion is reused by the later runs of the same process, as on the page.
"""
from __future__ import annotations

import json
import os
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from streamlit.testing.v1 import AppTest

import selector
from selector.catalogue.grades import FAMILIES
from selector.design.pins import pin_report
from selector.selection.engine import alternatives, prepare, rank
from selector.views import page as pg

APP = str(Path(__file__).resolve().parents[1] / "app.py")
#: MPa per ksi: 1000 lbf / in^2, both exact (NIST SP 811 (2008), Appendix B.8 and B.9)
KSI = 4448.2216152605 / 25.4 ** 2
TIMEOUT = 120


def _run(at: AppTest) -> AppTest:
    at.run(timeout=TIMEOUT)
    assert not at.exception, [e.value for e in at.exception]
    return at


def _every_view() -> AppTest:
    """The page with every view computed in each run (the browser computes only the open one)."""
    at = AppTest.from_file(APP, default_timeout=TIMEOUT)
    at.session_state["_all_views"] = True
    return at


@pytest.fixture
def at():
    return _run(_every_view())


def _readable(at) -> pd.DataFrame | None:
    """The candidate table as shown by default (readable columns)."""
    for df in at.dataframe:
        if "process route" in df.value.columns and "p_meet (%)" in df.value.columns:
            return df.value
    return None


def _table(at) -> pd.DataFrame | None:
    """The candidate table with every column of the library (the page's "All columns" switch on)."""
    if _readable(at) is None:
        return None
    if not at.toggle(key="all_columns").value:
        at.toggle(key="all_columns").set_value(True)
        _run(at)
    for df in at.dataframe:
        v = df.value
        if "route_text" in v.columns and "pareto" in v.columns:
            return v
    return None


def _misses(at) -> pd.DataFrame | None:
    for df in at.dataframe:
        if "miss_score" in df.value.columns:
            return df.value
    return None


def _demo_service() -> dict:
    """The caution context the page passes to the ranking for the demo's service conditions."""
    sv = pg.DEMO["service"]
    return pg.service_context(sv.get("plated", False), sv.get("plating"), sv.get("mating_material"),
                              sv.get("environment", "normal"), sv.get("service_temp_c"))


def _errors(at) -> list[str]:
    return [e.value for e in at.error]


# --------------------------------------------------------------------------- page interactions

def test_default_page_shows_table_chart_and_cautions(at):
    table = _table(at)
    assert table is not None and len(table) > 0
    assert not _errors(at)
    d = pg.DEMO["targets"]
    assert d                                   # the demo scenario sets targets
    # every row meets the demo targets (the page passed them to the library)
    for key, limit in d.items():
        col = key.split("_", 1)[1].rsplit("_", 1)[0]
        col = {"yield": "yield_mpa", "uts": "uts_mpa", "elongation": "elongation_pct",
               "surface_hardness": "surface_hardness_hrc", "hardness": "hardness_hrc",
               "case_depth": "case_depth_mm"}[col]
        vals = table[col].astype(float)
        assert ((vals >= limit - 1e-6) if key.startswith("min_") else (vals <= limit + 1e-6)).all(), key
    # the columns of select() are all in the table
    from selector.selection.engine import OUTPUT_COLUMNS
    missing = [c for c in OUTPUT_COLUMNS if c not in table.columns]
    assert not missing
    assert table["pareto"].any()
    charts = at.get("vega_lite_chart")
    assert len(charts) >= 3       # map, parameter curves, profile
    # the caution and the notice to defer: at the top and in the footer
    notices = [w.value for w in at.warning if selector.CAUTION in w.value]
    assert len(notices) >= 2 and all("qualified, licensed engineer" in n for n in notices)


def test_table_is_the_library_ranking(at):
    table = _table(at)
    d = pg.DEMO
    ref = rank(prepare(d["diameter_mm"], None, d["length_mm"]), d["targets"], robust_only=d["robust_only"],
               service=_demo_service())
    assert len(table) == len(ref)
    assert list(table["grade"] + table["route_text"]) == list(ref["grade"] + ref["route_text"])


def test_targets_change_the_table(at):
    before = _table(at)
    at.number_input(key="min_yield").set_value(1000.0)
    _run(at)
    after = _table(at)
    assert after is not None and 0 < len(after) < len(before)
    assert (after["yield_mpa"] >= 1000 - 1e-6).all()
    assert (before["yield_mpa"] < 1000).any()
    # an upper limit cuts the other side (a two-sided window at the 90 % band leaves no candidate with
    # p_meet >= 0.9 at the median, so the probability filter is switched off for this check)
    at.checkbox(key="robust_only").uncheck()
    _run(at)
    after = _table(at)
    cap = float(after["uts_mpa"].median())
    at.number_input(key="max_uts").set_value(cap)
    _run(at)
    capped = _table(at)
    assert capped is not None and (capped["uts_mpa"] <= cap + 1e-6).all() and len(capped) < len(after)


def test_no_candidate_gives_the_nearest_miss_report(at):
    at.number_input(key="min_yield").set_value(3000.0)
    at.number_input(key="min_elong").set_value(40.0)
    at.checkbox(key="robust_only").uncheck()
    _run(at)
    assert _table(at) is None
    assert any("No candidate meets every target" in s.value for s in at.subheader)
    misses = _misses(at)
    assert misses is not None and len(misses) > 0
    assert (misses["move_min_yield_mpa"] > 0).all()
    assert misses["miss_score"].is_monotonic_increasing
    # what can be reached: the table of best values and the frontier chart of the two binding targets
    assert any("best reachable" in df.value.columns for df in at.dataframe)
    assert any("What can be reached" in c.proto.spec for c in at.get("vega_lite_chart"))
    # a near miss opens like a candidate, with its probability of meeting the targets in %
    assert at.selectbox(key="miss_pick") is not None
    assert any(m.label == "Meets the targets" and m.value.endswith("%") for m in at.metric)
    # the cautions stay visible on this view too
    assert sum(selector.CAUTION in w.value for w in at.warning) >= 2


BAD_INPUTS = [  # widget key, bad value, words the message must hold (field, value, what is allowed)
    ("diameter", -5.0, ("Diameter", "diameter_mm", "-5", "allowed")),
    ("diameter", 900.0, ("Diameter", "diameter_mm", "900", "allowed")),
    ("length", 0.0, ("Part length", "length_mm", "allowed")),
    ("min_yield", -10.0, ("Minimum yield strength", "min_yield_mpa", "-10", "allowed")),
    ("min_elong", -1.0, ("min_elongation_pct", "-1", "allowed")),
]


def test_bad_inputs_give_messages_naming_field_value_and_allowed(at):
    good = {k: at.number_input(key=k).value for k, _, _ in BAD_INPUTS}
    previous = None
    for key, value, words in BAD_INPUTS:
        if previous is not None:
            at.number_input(key=previous).set_value(good[previous])
        at.number_input(key=key).set_value(value)
        _run(at)
        errs = " ".join(_errors(at))
        for w in words:
            assert w in errs, (key, w, errs)
        assert _table(at) is None, key
        previous = key


def test_contradictory_and_missing_inputs_give_messages(at):
    at.number_input(key="min_yield").set_value(900.0)
    at.number_input(key="max_yield").set_value(800.0)
    _run(at)
    errs = " ".join(_errors(at))
    assert "min_yield_mpa" in errs and "max_yield_mpa" in errs and _table(at) is None
    at.number_input(key="max_yield").set_value(None)
    at.number_input(key="length").set_value(None)
    at.multiselect(key="families").set_value([])
    _run(at)
    errs = _errors(at)
    assert any(e.startswith("Part length: blank") for e in errs)
    assert any(e.startswith("Families: none chosen") and "carbon_steel" in e for e in errs)


def test_bad_price_sheet_shows_line_and_column_and_changes_nothing(at):
    before = _table(at)
    at.text_area(key="price_text").set_value("grade,relative_price\n4140,1.9\n1045,cheap\n")
    _run(at)
    errs = " ".join(_errors(at))
    assert "rejected" in errs and "line 3" in errs and "relative_price" in errs
    # no sheet was accepted before: the page says the catalogue's prices are used
    assert any("Prices in use" in w.value and "catalogue prices" in w.value for w in at.warning)
    after = _table(at)
    pd.testing.assert_frame_equal(before, after)


def test_price_sheet_reader_names_line_and_column_of_a_bad_byte():
    # a Latin-1 upload: byte 0xe9 ('é') at line 3, column 5 is not UTF-8
    prices, msg = pg.read_price_sheet(b"grade,relative_price\n4140,1.9\nAISI\xe9,2\n", "prices.csv")
    assert prices is None and "line 3" in msg and "column 5" in msg and "UTF-8" in msg
    # pasted text is read as text, not taken for a path
    assert pg.read_price_sheet("grade,relative_price\n4140,0.5\n", "pasted") == ({"4140": 0.5}, None)
    assert pg.read_price_sheet("  \n", "pasted") == (None, None)


def test_good_price_sheet_reprices_the_grade(at):
    before = _table(at)
    assert (before["grade"] == "4140").any()
    at.text_area(key="price_text").set_value("grade,relative_price\nAISI 4140,0.25\n")
    _run(at)
    assert not _errors(at)
    after = _table(at)
    rows = after[after["grade"] == "4140"]
    assert len(rows) and (rows["price_source"] == "price sheet").all()
    old = before[before["grade"] == "4140"].set_index("route_text")["relative_cost"]
    new = rows.set_index("route_text")["relative_cost"]
    common = old.index.intersection(new.index)
    assert len(common) and (new[common] < old[common]).all()


def test_us_units_convert_inputs_and_table(at):
    at.radio(key="units").set_value(pg.US)
    _run(at)
    # the inputs follow the unit switch (MPa -> ksi, mm -> in, °C -> °F)
    d = pg.DEMO
    assert at.number_input(key="min_yield").value == pytest.approx(d["targets"]["min_yield_mpa"] / KSI,
                                                                   abs=0.001)
    assert at.number_input(key="diameter").value == pytest.approx(d["diameter_mm"] / 25.4, abs=0.0001)
    if d["service"].get("service_temp_c") is not None:
        assert at.number_input(key="service_temp").value == pytest.approx(
            d["service"]["service_temp_c"] * 9 / 5 + 32, abs=0.1)
    us = _table(at)
    assert "yield_ksi" in us.columns and "yield_mpa" not in us.columns and "yield (ksi)" in us.columns
    assert "case_depth_in" in us.columns and "uts_ksi" in us.columns
    # the library got the inputs back in SI, and the table shows its result in US units
    keys = ["diameter", "length"] + [w for w, _, _ in pg.TARGET_FIELDS.values()]
    vals = {k: at.number_input(key=k).value for k in keys}
    t = pg.si_targets(pg.targets_from_inputs(vals, pg.US))
    ref = rank(prepare(pg.si_key(pg.to_si(vals["diameter"], "length", pg.US), "length"), None,
                       pg.si_key(pg.to_si(vals["length"], "length", pg.US), "length")),
               t, robust_only=pg.DEMO["robust_only"], service=_demo_service())
    assert list(us["route"]) == [pg.route_json(r) for r in ref["route"]]
    # the route text in °F: 540 °C reads 1004 °F
    # (routes with a temperature: a bar bought as supplied has none)
    with_temp = ref["route_text"].str.contains("°C").to_numpy()
    assert with_temp.any()
    words = us["process route"]
    assert words[with_temp].str.contains("°F").all() and not words.str.contains("°C").any()
    # 540 °C = 1004 °F, written to the 10 °F step of a furnace set point
    assert "1000 °F" in pg.route_line([{"op": "temper", "temp_c": 540.0, "hours": 2.0}], pg.US)
    np.testing.assert_allclose(us["yield_ksi"], ref["yield_mpa"] / (4448.2216152605 / 25.4 ** 2), rtol=1e-12)
    np.testing.assert_allclose(us["case_depth_in"], ref["case_depth_mm"] / 25.4, rtol=1e-12)
    # rows with a window (a candidate with an avoid caution has none)
    qt = ((ref["window_parameter"] == "temper_temp_c") & ref["window_min"].notna()).to_numpy()
    assert qt.any()
    np.testing.assert_allclose(us.loc[qt, "window_min"], ref.loc[qt, "window_min"] * 9 / 5 + 32, rtol=1e-12)
    shown = us.loc[qt, "process window"]
    assert shown.str.contains("°F").all() and not shown.str.contains("°C").any()
    # and back
    at.radio(key="units").set_value(pg.SI)
    _run(at)
    assert at.number_input(key="min_yield").value == pytest.approx(d["targets"]["min_yield_mpa"], abs=0.1)


def test_unit_switch_recomputes_nothing(at, monkeypatch):
    """Units are display only: switching to US units and back calls no library function
    (every result comes from the page's cache), while a target change does re-rank."""
    import selector.selection.engine as engine

    calls = []
    for mod, name in ((engine, "prepare"), (engine, "rank"), (engine, "nearest_misses"), (selector, "evaluate")):
        real = getattr(mod, name)

        def counted(*a, _real=real, _name=name, **k):
            calls.append(_name)
            return _real(*a, **k)

        monkeypatch.setattr(mod, name, counted)
    at.radio(key="units").set_value(pg.US)
    _run(at)
    at.radio(key="units").set_value(pg.SI)
    _run(at)
    at.radio(key="units").set_value(pg.US)
    _run(at)
    assert calls == []
    at.number_input(key="min_yield").set_value(at.number_input(key="min_yield").value + 1.0)
    _run(at)
    assert "rank" in calls and "prepare" not in calls


def _library_calls(at) -> int:
    """The footer's count of library computations of the server process."""
    line = next(c.value for c in at.caption if "Library computations" in c.value)
    return int(line.split("Library computations of this server: ")[1].split()[0])


def _run_library_seconds(at) -> float:
    """The footer's seconds of library computation in this run ("This run: … library x s")."""
    line = next(c.value for c in at.caption if "This run:" in c.value)
    return float(line.split(" library ")[1].split(" s")[0])


def test_only_the_open_view_is_computed_and_closed_views_keep_their_inputs():
    at = _run(AppTest.from_file(APP, default_timeout=TIMEOUT))
    assert [t.label for t in at.tabs] == ["Map and list", "One candidate", "Side by side", "Alternatives",
                                          "Clevis pin", "Parts list"]
    keys = {w.key for w in at.selectbox} | {b.key for b in at.button}
    assert _readable(at) is not None                       # the answer: the candidate table
    assert "pick" not in keys and "pin_apply" not in keys and "parts_run" not in keys
    assert len(at.get("vega_lite_chart")) == 1              # the map only
    calls = _library_calls(at)
    # a unit switch and back: display only, no library computation (the footer's count)
    at.radio(key="units").set_value(pg.US)
    _run(at)
    assert _run_library_seconds(at) == 0.0           # the run's library time (the footer's "library x s")
    at.radio(key="units").set_value(pg.SI)
    _run(at)
    assert _library_calls(at) == calls
    # a new minimum yield re-ranks: one library computation, timed in the run's line
    first_yield = at.number_input(key="min_yield").value
    at.number_input(key="min_yield").set_value(first_yield + 50.0)
    _run(at)
    assert _library_calls(at) == calls + 1 and _run_library_seconds(at) > 0.0
    at.number_input(key="min_yield").set_value(first_yield)      # back: the cached ranking, nothing computed
    _run(at)
    assert _library_calls(at) == calls + 1 and _run_library_seconds(at) == 0.0
    # the candidate view: computed when opened
    at.session_state["view"] = "One candidate"
    _run(at)
    assert at.selectbox(key="pick").value is not None and len(at.get("vega_lite_chart")) >= 2
    at.text_input(key="heat_text").input("C=0.41")
    _run(at)
    # the pin view: an input changed there survives a visit to another view
    at.session_state["view"] = "Clevis pin"
    _run(at)
    at.number_input(key="pin_load").set_value(51.0)
    _run(at)
    at.session_state["view"] = "Map and list"
    _run(at)
    assert "pin_apply" not in {b.key for b in at.button}
    at.session_state["view"] = "Clevis pin"
    _run(at)
    assert at.number_input(key="pin_load").value == 51.0
    at.session_state["view"] = "One candidate"
    _run(at)
    assert at.text_input(key="heat_text").value == "C=0.41"
    assert not at.exception and not any("Session State" in w.value for w in at.warning)


def test_the_warm_start_computes_the_example_page_answer():
    """serve.py computes the answer of the page's first run before the first visit: the
    same cache keys as the page's own first run, and the answer the page then shows."""
    from selector.views.page import warm

    at = _run(AppTest.from_file(APP, default_timeout=TIMEOUT))
    prep, rank_args, targets = warm.example_args()
    assert at.session_state["_rank_args"] == rank_args and rank_args[:4] == prep
    assert json.loads(rank_args[4]) == targets and targets["min_yield_mpa"] == pytest.approx(
        pg.DEMO["targets"]["min_yield_mpa"], abs=0.05)
    pg.cached_rank.clear()
    before = pg.library_calls()
    assert warm.warm_up() > 0
    assert pg.library_calls() > before                 # it did compute (the ranking was cleared)
    shown = _readable(at)
    assert len(pg.cached_rank(*rank_args)) == len(shown) > 0


def test_the_warm_start_builds_a_new_section_in_the_process_and_writes_nothing(tmp_path, monkeypatch):
    """serve.py also ranks the example about one preferred size up (25 -> 28.05 mm) with the
    library's disk cache off: computed in the process (a library call of the page's
    wrappers, then a cache hit for that key), no file written to the cache directory, and
    the switch of the disk cache restored after (set or not set before)."""
    from selector.views.page import warm

    monkeypatch.setenv("SELECTOR_CACHE_DIR", str(tmp_path))
    monkeypatch.setenv("SELECTOR_DISK_CACHE", "1")
    prep, rank_args, _ = warm.example_args()
    key = (round(prep[0] * 10 ** (1 / 20), 3),) + rank_args[1:]
    assert key[0] == pytest.approx(28.05, abs=0.01)
    before = pg.library_calls()
    assert warm.build_process_tables() > 0
    assert pg.library_calls() > before
    from selector import cache
    assert cache.wait_for_writes(60)             # nothing pending that could still write a file
    assert os.environ["SELECTOR_DISK_CACHE"] == "1" and not any(tmp_path.iterdir())
    again = pg.library_calls()
    assert len(pg.cached_rank(*key)) > 0 and pg.library_calls() == again      # the page's cache holds it
    monkeypatch.delenv("SELECTOR_DISK_CACHE")
    with warm._disk_cache_off():
        assert os.environ["SELECTOR_DISK_CACHE"] == "0"
    assert "SELECTOR_DISK_CACHE" not in os.environ


def test_every_chart_of_the_page_is_a_valid_vega_lite_spec(at):
    """The page sends its charts without Altair's schema check (speed): the specs it sends
    are checked here against the Vega-Lite schema that Altair ships."""
    import altair as alt
    from altair.utils.schemapi import validate_jsonschema
    from altair.vegalite.v6.schema.core import load_schema

    schema = load_schema()
    charts = at.get("vega_lite_chart")
    assert len(charts) >= 5          # map, parameter curve, profile, comparison bars
    for c in charts:
        validate_jsonschema(json.loads(c.proto.spec), schema)
    # the check can fail: a mark the schema does not know
    with pytest.raises(Exception):
        validate_jsonschema({**json.loads(charts[0].proto.spec), "mark": "no-such-mark"}, schema)
    assert alt.utils.schemapi.DEBUG_MODE is False


def test_si_keys_survive_a_round_trip_through_us_units():
    for v in (30.0, 12.5, 47.63, 101.6):
        us = pg.convert_inputs({"diameter": v}, pg.SI, pg.US)["diameter"]
        assert pg.si_key(pg.to_si(us, "length", pg.US), "length") == pg.si_key(v, "length")
    for v in (700.0, 612.3, 1034.2):
        us = pg.convert_inputs({"min_yield": v}, pg.SI, pg.US)["min_yield"]
        assert pg.si_targets({"min_yield_mpa": pg.to_si(us, "stress", pg.US)}) == {"min_yield_mpa": v}
    assert pg.si_targets({"min_elongation_pct": 12.345, "families": ["alloy_steel"]}) == \
        {"min_elongation_pct": 12.345, "families": ["alloy_steel"]}


def test_candidate_view_shows_route_window_profile_sources(at):
    table = _table(at)
    variants = at.selectbox(key="pick").options
    assert len(variants) == len(table)
    pick = at.selectbox(key="pick")
    pick.select_index(1)
    _run(at)
    row = table.iloc[1]
    heads = [s.value for s in at.subheader]
    assert any(h.startswith("C2 · ") and row["process route"] in h for h in heads)
    md = " ".join(m.value for m in at.markdown)
    assert "**Process window**" in md and "**Sources**" in md
    assert any(m.value.startswith("1. ") for m in at.markdown)      # numbered route steps


def test_candidate_view_band_and_heat_analysis(at):
    # the band caption is the library's band of the candidate, and a heat analysis is evaluated by the library
    captions = " ".join(c.value for c in at.caption)
    assert "90 % band" in captions
    table = _table(at)
    row = table.iloc[0]
    steel = selector.grade(row["grade"]).is_steel
    at.text_input(key="heat_text").input("C=0.41 Mn=0.86 Cr=0.95 Mo=0.18" if steel else "Cu=0.3")
    _run(at)
    labels = [m.label for m in at.metric]
    assert "Heat: yield (MPa)" in labels
    at.text_input(key="heat_text").input("C=-1")
    _run(at)
    assert any("heat_composition['C']" in e and "[0, 100]" in e for e in _errors(at))
    at.text_input(key="heat_text").input("C=abc")
    _run(at)
    assert any("heat analysis C" in e and "'abc'" in e for e in _errors(at))


def test_band_text_converts_units():
    ev = {"yield_mpa_lo": 689.476, "yield_mpa_hi": 827.371, "hardness_hrc_lo": 30.0, "hardness_hrc_hi": 36.0}
    si, us = pg.band_text(ev, pg.SI), pg.band_text(ev, pg.US)
    assert "yield 689–827 MPa" in si and "hardness 30.0–36.0 HRC" in si
    assert "yield 100–120 ksi" in us            # 689.476 MPa = 100 ksi (1 ksi = 6.894757 MPa, NIST SP 811)


def test_comparison_defaults_to_through_and_case_hardened(at):
    table = _table(at)
    chosen = at.multiselect(key="compare").value
    assert 2 <= len(chosen) <= 3
    kinds = {v.split("|")[1] for v in chosen}
    if {"quench_temper"} < set(table["route_family"]):
        assert "quench_temper" in kinds and kinds & {"carburize", "nitride", "induction"}


# --------------------------------------------------------------------------- pure helpers

def test_unit_conversions():
    # 1 ksi = 4448.2216152605 / 25.4^2 MPa exactly (NIST SP 811 (2008), Appendix B.8, B.9)
    ksi = 4448.2216152605 / 25.4 ** 2     # 1 ksi = 1000 lbf / in^2, both exact (NIST SP 811 (2008), B.8, B.9)
    assert pg.to_display(ksi, "stress", pg.US) == pytest.approx(1.0, rel=1e-12)
    assert pg.to_display(25.4, "length", pg.US) == pytest.approx(1.0, rel=1e-12)      # exact by definition
    assert pg.to_display(100.0, "temperature", pg.US) == pytest.approx(212.0, abs=1e-9)
    assert pg.to_display(-40.0, "temperature", pg.US) == pytest.approx(-40.0, abs=1e-9)
    for q in ("stress", "length", "temperature"):
        v = np.array([-10.0, 0.0, 123.4])
        np.testing.assert_allclose(pg.to_si(pg.to_display(v, q, pg.US), q, pg.US), v, atol=1e-9)
        np.testing.assert_array_equal(pg.to_display(v, q, pg.SI), v)


def test_targets_from_inputs_converts_to_si():
    t = pg.targets_from_inputs({"min_yield": 100.0, "min_case_depth": 0.04, "min_elong": 12.0}, pg.US,
                               families=["alloy_steel"])
    # exact unit definitions (NIST SP 811): 1 ksi = 6.894757 MPa, 1 in = 25.4 mm; 0.04 in = 1.016 mm
    assert t["min_yield_mpa"] == pytest.approx(689.4757)
    assert t["min_case_depth_mm"] == pytest.approx(1.016)
    assert t["min_elongation_pct"] == 12.0 and t["families"] == ["alloy_steel"]
    assert "families" not in pg.targets_from_inputs({}, pg.SI, families=list(FAMILIES))


def test_hull_band_contains_every_point():
    rng = np.random.default_rng(7)
    x, y = rng.uniform(5, 25, 200), rng.uniform(400, 1600, 200)
    band = pg.hull_band(x, y)
    lo = np.interp(x, band["x"], band["lo"])
    hi = np.interp(x, band["x"], band["hi"])
    assert (lo <= y + 1e-9).all() and (y <= hi + 1e-9).all()
    assert band["x"].min() == pytest.approx(x.min()) and band["x"].max() == pytest.approx(x.max())
    # a triangle is its own hull: the band's edges are the triangle's sides
    tri = pg.hull_band([0, 2, 1], [0, 0, 2])
    assert np.interp(1.0, tri["x"], tri["hi"]) == pytest.approx(2.0)
    assert np.interp(0.5, tri["x"], tri["hi"]) == pytest.approx(1.0)
    assert np.interp(0.5, tri["x"], tri["lo"]) == pytest.approx(0.0)


def test_thinned_map_lines_hold_the_exact_ones_within_the_tolerance():
    """The map draws fewer points (speed in the browser): a thinned band holds the exact
    band and each edge moves by at most the tolerance; a thinned line passes within the
    tolerance of every dropped vertex; on the example the map sends far fewer rows."""
    rng = np.random.default_rng(11)
    for trial in range(20):
        t = np.sort(rng.uniform(0, 1, 300))
        x = 5 + 20 * t + rng.normal(0, 0.3, 300)
        y = 400 + 1200 * t ** (0.5 + trial / 10) + rng.normal(0, 30, 300)
        band = pg.hull_band(x, y)
        tol = 0.001 * np.ptp(y)
        thin = pg.thin_band(band, tol)
        assert len(thin["x"]) <= len(band)
        assert thin["x"][0] == band["x"].iloc[0] and thin["x"][-1] == band["x"].iloc[-1]
        lo, hi = np.interp(band["x"], thin["x"], thin["lo"]), np.interp(band["x"], thin["x"], thin["hi"])
        assert (lo <= band["lo"] + 1e-9).all() and (band["hi"] <= hi + 1e-9).all()
        assert (band["lo"] - lo).max() <= 2 * tol + 1e-9 and (hi - band["hi"]).max() <= 2 * tol + 1e-9
        inside = (np.interp(x, thin["x"], thin["lo"]) <= y + 1e-9) & (y <= np.interp(x, thin["x"], thin["hi"]) + 1e-9)
        assert inside.all()
    # a polyline: every dropped vertex within the tolerance of the kept ones' line
    s = np.linspace(0, 3, 200)
    px, py = np.cos(s), np.sin(2 * s)
    keep = pg.keep_vertices(px, py, 0.01)
    assert keep[0] and keep[-1] and 3 < keep.sum() < 100
    kx, ky = px[keep], py[keep]
    for xi, yi in zip(px[~keep], py[~keep]):
        d = min(_segment_distance(xi, yi, kx[j], ky[j], kx[j + 1], ky[j + 1]) for j in range(len(kx) - 1))
        assert d <= 0.01 + 1e-12
    # the example's map: thinned to a fraction of the exact rows
    d = pg.DEMO
    prep = prepare(d["diameter_mm"], None, d["length_mm"])
    cand = pg.label_candidates(rank(prep, d["targets"])).head(15)
    states = prep[prep["variant"].isin(cand["variant"])]
    f = pg.chart_frames(states, cand, "yield_mpa", pg.SI, picked="C1")
    exact = sum(len(pg.hull_band(g["elongation_pct"], g["yield_mpa"])) for _, g in states.groupby("variant"))
    assert len(f["regions"]) < exact / 2


def test_map_geometry_remembered_per_input_equals_a_fresh_computation():
    """The hull and line thinning of the map are remembered per input (a change of targets
    redraws the same candidates): a second call returns what the first computed, read-only, a
    caller's change of its own result does not reach the memo, and another input (one value
    moved, another tolerance) is computed afresh."""
    from selector.views.page import charts
    rng = np.random.default_rng(5)
    x, y = rng.uniform(0, 20, 150), rng.uniform(300, 1500, 150)
    first = charts.hull_edges(x, y)
    again = charts.hull_edges(x.copy(), y.copy())
    fresh = charts._hull_edges(x, y)
    for k in ("x", "lo", "hi"):
        assert np.array_equal(again[k], fresh[k]) and not again[k].flags.writeable
    with pytest.raises(ValueError):
        again["lo"][0] = 0.0
    y2 = y.copy()
    y2[int(np.argmax(y))] += 400.0                         # the top vertex moves up: another hull
    moved = charts.hull_edges(x, y2)
    assert moved["hi"].max() == pytest.approx(y.max() + 400.0) and first["hi"].max() == pytest.approx(y.max())
    s = np.linspace(0, 3, 120)
    px, py = np.cos(s), np.sin(2 * s)
    k1 = pg.keep_vertices(px, py, 0.01)
    k1[:] = False                                          # the caller's copy, not the memo's
    assert np.array_equal(pg.keep_vertices(px, py, 0.01), charts._keep_vertices(px, py, 0.01, False))
    assert pg.keep_vertices(px, py, 0.2).sum() < pg.keep_vertices(px, py, 0.01).sum()
    # the spreads the map thins by: never above the true spread (never coarser than the tolerance),
    # within one step of 2^(1/4) below it, and one value for spreads close together
    for v in np.exp(rng.uniform(-5, 8, 200)):
        q = charts._step_down(float(v))
        assert v / 2 ** 0.25 < q <= v * (1 + 1e-12)
    assert charts._step_down(1000.0) == charts._step_down(1010.0) and charts._step_down(0.0) == 0.0


def _segment_distance(x, y, x0, y0, x1, y1) -> float:
    """Distance from the point (x, y) to the segment (x0, y0)-(x1, y1)."""
    dx, dy = x1 - x0, y1 - y0
    t = 0.0 if dx == dy == 0 else min(1.0, max(0.0, ((x - x0) * dx + (y - y0) * dy) / (dx * dx + dy * dy)))
    return float(np.hypot(x - (x0 + t * dx), y - (y0 + t * dy)))


def test_chart_frames_hold_each_candidate_region_and_path():
    d = pg.DEMO
    prep = prepare(d["diameter_mm"], None, d["length_mm"])
    cand = pg.label_candidates(rank(prep, d["targets"]))
    cand = cand[cand["window_parameter"] == "temper_temp_c"].head(5)
    cand["id"] = [f"C{i + 1}" for i in range(len(cand))]
    assert len(cand) == 5
    states = prep[prep["variant"].isin(cand["variant"])]
    f = pg.chart_frames(states, cand, "yield_mpa", pg.SI, picked="C1")
    assert set(f["regions"]["id"]) == set(cand["id"])
    assert set(f["paths"]["id"]) == set(cand["id"])
    # a path long enough to read is labelled with its parameter value at both ends, the focus path along
    # its length too
    labelled = f["paths"][f["paths"]["text"] != ""]
    assert "C1" in set(labelled["id"]) and labelled["text"].str.endswith("°").all()
    counts = labelled.groupby("id").size()
    assert (counts.drop("C1") == 2).all() and counts["C1"] > 2
    # colour by route family: the library's family label on every frame
    from selector.routes import families
    assert list(f["points"]["family"]) == [families.get(r).label for r in cand["route_family"]]
    # direct labels: the focus always; no two written labels on top of each other
    pts = f["points"]
    assert pts.loc[pts["id"] == "C1", "tag"].iloc[0].startswith("C1")
    shown = pts[pts["tag"] != ""]
    sx, sy = np.ptp(states["elongation_pct"]), np.ptp(states["yield_mpa"])
    for i in range(len(shown)):
        for j in range(i):
            a, b = shown.iloc[i], shown.iloc[j]
            assert abs(a["x"] - b["x"]) / sx >= 0.1 or abs(a["y"] - b["y"]) / sy >= 0.05
    # each chosen point lies inside its own region band
    for _, p in f["points"].iterrows():
        b = f["regions"][f["regions"]["id"] == p["id"]]
        assert np.interp(p["x"], b["x"], b["lo"]) - 1e-6 <= p["y"] <= np.interp(p["x"], b["x"], b["hi"]) + 1e-6
    spec = pg.strength_elongation_chart(f, d["targets"], "yield_mpa", pg.SI, picked="C1")
    assert len(spec["layer"]) >= 6


def test_map_spec_is_valid_lean_and_keeps_its_encoding():
    """The map's spec is written as a dict (speed): valid Vega-Lite with and without each
    kind of target, in both unit systems; its data only the rounded columns the layers
    use (a region or path row names its candidate by id and looks the rest up on its
    point); the page's own encoding kept (dotted edges, colour by route family,
    dashed named limits, squares filled for the Pareto set, a cross on the focus)."""
    from altair.utils.schemapi import validate_jsonschema
    from altair.vegalite.v6.schema.core import load_schema

    schema = load_schema()
    d = pg.DEMO
    prep = prepare(d["diameter_mm"], None, d["length_mm"])
    cand = pg.label_candidates(rank(prep, d["targets"])).head(8)
    states = prep[prep["variant"].isin(cand["variant"])]
    picked = cand["id"].iloc[1]
    full = {**d["targets"], "min_elongation_pct": 12.0, "max_yield_mpa": 1400.0, "max_uts_mpa": 1500.0}
    for system in pg.UNIT_SYSTEMS:
        for y in ("yield_mpa", "uts_mpa"):
            f = pg.chart_frames(states, cand, y, system, picked=picked)
            for targets in ({}, d["targets"], full):
                spec = pg.strength_elongation_chart(f, targets, y, system, picked=picked)
                validate_jsonschema(spec, schema)
                assert pg.chart_spec(spec) is spec
            ds = spec["datasets"]
            assert set(ds["regions"][0]) == {"x", "lo", "hi", "id"}
            assert set(ds["paths"][0]) == {"x", "y", "order", "text", "param", "id"}
            ids = {r["id"] for r in ds["points"]}
            assert {r["id"] for r in ds["regions"]} <= ids and {r["id"] for r in ds["paths"]} <= ids
            # rounded for display: stress to 0.1 MPa or 0.01 ksi, elongation to 0.01 %
            dec = 1 if system == pg.SI else 2
            assert all(round(r["lo"], dec) == r["lo"] and round(r["x"], 2) == r["x"] for r in ds["regions"])
            np.testing.assert_allclose([r["y"] for r in ds["points"]], f["points"]["y"], atol=0.5 * 10 ** -dec)
            marks = [(lay["mark"]["type"], lay["mark"].get("strokeDash")) for lay in spec["layer"]]
            # one dashed rule for the stress limits (a dataset row each), one for the elongation
            assert marks.count(("line", [1.5, 2.5])) == 2 and marks.count(("rule", [8, 4])) == 2
            named = [r["t"] for r in ds["targets"]]
            assert any(t.startswith("min elongation 12") for t in named)
            shown, other = ("max yield", "max tensile") if y == "yield_mpa" else ("max tensile", "max yield")
            assert any(t.startswith(shown) for t in named) and not any(t.startswith(other) for t in named)
            squares = [lay for lay in spec["layer"] if lay["mark"].get("shape") == "square"][0]
            assert squares["encoding"]["color"]["field"] == "family"
            assert squares["encoding"]["fill"]["condition"]["test"] == "datum.set == 'Pareto set'"
            cross = [lay for lay in spec["layer"] if lay["mark"].get("shape") == "cross"]
            assert len(cross) == 1 and [r["id"] for r in ds["points"] if r["focus"]] == [picked]
    # the check can fail: a lookup from a dataset the spec does not name is still valid
    # Vega-Lite, so the test of the data above is what guards the ids
    with pytest.raises(Exception):
        validate_jsonschema({**spec, "layer": [{**spec["layer"][0], "mark": "no-such-mark"}]}, schema)


def test_map_spec_keeps_its_form_when_targets_or_section_change():
    """Only the datasets of the map's spec depend on the candidates: at a new minimum yield
    or a new diameter the rest of the spec is the same (so the browser replaces the
    chart's data and keeps the chart), while the datasets, which draw the new answer and
    the axes' extent, differ; a unit switch changes the rest too (axis titles)."""
    d = pg.DEMO

    def spec(diameter_mm, min_yield_mpa, system=pg.SI):
        prep = prepare(diameter_mm, None, d["length_mm"])
        targets = {**d["targets"], "min_yield_mpa": min_yield_mpa}
        cand = pg.label_candidates(rank(prep, targets)).head(15)
        states = prep[prep["variant"].isin(cand["variant"])]
        f = pg.chart_frames(states, cand, "yield_mpa", system, picked="C1")
        return pg.strength_elongation_chart(f, targets, "yield_mpa", system, picked="C1")

    def form(s):
        return json.dumps({k: v for k, v in s.items() if k != "datasets"}, sort_keys=True)

    base = spec(d["diameter_mm"], d["targets"]["min_yield_mpa"])
    for other in (spec(d["diameter_mm"], 1000.0), spec(41.0, d["targets"]["min_yield_mpa"])):
        assert form(other) == form(base)
        assert other["datasets"] != base["datasets"]
        assert other["datasets"]["frame"] != base["datasets"]["frame"]
    # the extent holds every drawn value: the frame's corners bound the points and the regions
    ds = base["datasets"]
    (x0, y0), (x1, y1) = [(r["x"], r["y"]) for r in ds["frame"]]
    assert all(x0 <= r["x"] <= x1 and y0 <= r["y"] <= y1 for r in ds["points"])
    assert all(y0 <= r["lo"] and r["hi"] <= y1 for r in ds["regions"])
    assert form(spec(d["diameter_mm"], d["targets"]["min_yield_mpa"], pg.US)) != form(base)


def test_service_conditions_reach_the_cautions(at):
    warn = " ".join(w.value for w in at.warning)
    if pg.DEMO["service"].get("plated"):
        # the demo pin is plated and hard: the hydrogen-embrittlement rule shows (ISO 4042 in its reason)
        assert "ydrogen" in warn
    at.checkbox(key="plated").uncheck()
    at.text_input(key="mating").set_value("")
    _run(at)
    assert "ydrogen" not in " ".join(w.value for w in at.warning)
    at.text_input(key="mating").set_value("unobtainium")
    _run(at)
    errs = " ".join(_errors(at))
    assert "Service conditions" in errs and "mating_material" in errs and "unobtainium" in errs


def test_plate_section_ranks_at_the_plate_thickness(at):
    diameter = at.number_input(key="diameter").value
    at.radio(key="shape").set_value("plate")
    _run(at)
    at.number_input(key="thickness").set_value(20.0)
    _run(at)
    table = _table(at)
    d = pg.DEMO
    ref = rank(prepare(None, 20.0, d["length_mm"]), d["targets"], robust_only=d["robust_only"],
               service=_demo_service())
    assert table is not None and len(table) == len(ref) > 0
    np.testing.assert_allclose(table["yield_mpa"], ref["yield_mpa"], rtol=1e-12)
    # a 20 mm plate: the profile runs from the surface to the mid-plane at 10 mm
    charts = [c for c in at.get("vega_lite_chart") if "Hardness across the section" in c.proto.spec]
    assert charts
    import pyarrow as pa       # the chart data travel as Arrow tables beside the spec
    frames = [pa.ipc.open_stream(ds.data.data).read_all().to_pandas() for ds in charts[0].proto.datasets]
    depths = [v for f in frames if "depth" in f for v in f["depth"]]
    assert depths and min(depths) == pytest.approx(0.0) and max(depths) == pytest.approx(10.0)
    # back to the round bar: its diameter was kept
    at.radio(key="shape").set_value("round bar")
    _run(at)
    assert at.number_input(key="diameter").value == diameter and _table(at) is not None


# --------------------------------------------------------------------------- clevis pin and diameter sweep

from selector.design.pins import pin_stresses          # noqa: E402
from selector.design.sweep import diameter_sweep       # noqa: E402

#: a load case unlike the demo's: single shear, no wear target
PIN_CASE = {"pin_load": 45.0, "pin_diameter": 30.0, "pin_lug": 20.0, "pin_clevis": 12.0, "pin_gap": 2.0,
            "pin_sf": 2.5, "pin_wear_hrc": None}


def _set_pin(at, values: dict, planes: int | None = None):
    for k, v in values.items():
        at.number_input(key=k).set_value(v)
    if planes is not None:
        at.radio(key="pin_planes").set_value(planes)
    return _run(at)


def _sweep(at) -> pd.DataFrame | None:
    for df in at.dataframe:
        if "n_robust" in df.value.columns:
            return df.value
    return None


def _metric(at, label: str) -> str:
    return next(m.value for m in at.metric if m.label == label)


def test_pin_section_targets_are_the_library_targets_and_apply_to_the_table(at):
    # the defaults are the demo load case: its targets are the sidebar's at start
    assert at.number_input(key="min_yield").value == pytest.approx(pg.DEMO["targets"]["min_yield_mpa"])
    before = _table(at)
    _set_pin(at, PIN_CASE, planes=1)
    ref = selector.pin_targets(load_kn=45.0, diameter_mm=30.0, shear_planes=1, safety_factor=2.5, gap_mm=2.0,
                               lug_thickness_mm=20.0, clevis_thickness_mm=12.0)
    assert set(ref) == {"min_yield_mpa", "min_uts_mpa"}
    # shown targets (4 significant digits) and the stress table are the library's
    assert float(_metric(at, "Min yield (MPa)")) == pytest.approx(ref["min_yield_mpa"], rel=5e-4)
    assert float(_metric(at, "Min tensile (MPa)")) == pytest.approx(ref["min_uts_mpa"], rel=5e-4)
    assert _metric(at, "Min surface (HRC)") == "—"
    s = pin_stresses(load_kn=45.0, diameter_mm=30.0, shear_planes=1, gap_mm=2.0, lug_thickness_mm=20.0,
                     clevis_thickness_mm=12.0)
    st_tab = next(df.value for df in at.dataframe if "yield demand (MPa)" in df.value.columns)
    np.testing.assert_allclose(st_tab["stress (MPa)"], [s["shear_mpa"], s["bending_mpa"], s["bearing_mpa"]],
                               rtol=1e-12)
    assert st_tab.loc[st_tab["governs"], "mode"].tolist() == ["bending"]
    # the sidebar is unchanged until the button is pressed
    assert at.number_input(key="min_yield").value == pytest.approx(pg.DEMO["targets"]["min_yield_mpa"])
    at.button(key="pin_apply").click()
    _run(at)
    assert at.number_input(key="min_yield").value == pytest.approx(ref["min_yield_mpa"], rel=1e-12)
    assert at.number_input(key="min_uts").value == pytest.approx(ref["min_uts_mpa"], rel=1e-12)
    assert at.number_input(key="min_surface_hrc").value is None       # no wear target: cleared
    assert at.number_input(key="diameter").value == 30.0
    assert at.number_input(key="length").value == pytest.approx(20.0 + 12.0 + 2.0)   # single-shear grip
    after = _table(at)
    assert after is not None and len(after) != len(before)
    assert (after["yield_mpa"] >= ref["min_yield_mpa"] - 1e-6).all()
    # the page ranks on its SI key (stress to 0.1 MPa, pg.si_targets): a draw between 339.5 and 339.53 MPa
    # would otherwise count differently
    ranked = rank(prepare(30.0, None, 34.0), pg.si_targets(ref), robust_only=pg.DEMO["robust_only"],
                  service=_demo_service())
    # the same ranking: every candidate in the same order, and the same route (chosen point) for the first
    # ten; further down, a window whose states differ only in model notes may pick a different point
    # (seen for an anneal route of 4142 at rank 80: 790 vs 870 °C, equal properties within 1 %)
    assert list(after["grade"] + after["route_family"]) == list(ranked["grade"] + ranked["route_family"])
    assert list(after["route_text"][:10]) == list(ranked["route_text"][:10])


def test_pin_section_in_us_units(at):
    at.radio(key="units").set_value(pg.US)
    _run(at)
    # 1 lbf = 4.4482216152605 N (NIST SP 811, App. B.9, exact); the page keeps 0.1 lbf
    assert at.number_input(key="pin_load").value == pytest.approx(60_000 / 4.4482216152605, abs=0.05)
    assert at.number_input(key="pin_diameter").value == pytest.approx(25 / 25.4, abs=1e-4)
    at.button(key="pin_apply").click()
    _run(at)
    d = pg.DEMO["pin"]
    ref = selector.pin_targets(load_lbf=at.number_input(key="pin_load").value,
                               diameter_mm=at.number_input(key="pin_diameter").value * 25.4,
                               **{k: d[k] * 1.0 for k in ("safety_factor",)},
                               shear_planes=2, gap_mm=at.number_input(key="pin_gap").value * 25.4,
                               lug_thickness_mm=at.number_input(key="pin_lug").value * 25.4,
                               clevis_thickness_mm=at.number_input(key="pin_clevis").value * 25.4,
                               wear_surface_hardness_hrc=d["wear_surface_hardness_hrc"])
    assert at.number_input(key="min_yield").value == pytest.approx(ref["min_yield_mpa"] / KSI, rel=1e-9)
    # the rounding of the unit switch moves the demo target by less than 0.1 %
    assert ref["min_yield_mpa"] == pytest.approx(pg.DEMO["targets"]["min_yield_mpa"], rel=1e-3)
    assert _metric(at, "Min yield (ksi)") == f"{ref['min_yield_mpa'] / KSI:.4g}"
    assert not _errors(at)
    # the listed sweep diameters follow the switch (inch, 4 significant digits)
    listed, msg = pg.parse_lengths(at.text_input(key="sweep_list").value, pg.US)
    assert msg is None
    np.testing.assert_allclose(listed, d["sweep_diameters_mm"], atol=0.01)


def test_sweep_table_and_chart_in_display_units():
    route = [{"op": "harden", "austenitize_c": 845.0, "quench": "oil"},
             {"op": "temper", "temp_c": 540.0, "hours": 2.0}]
    sw = pd.DataFrame({"diameter_mm": [25.4, 50.8, 76.2], "min_yield_mpa": [KSI * 100, KSI * 50, 200.0],
                       "min_uts_mpa": [300.0, 200.0, 100.0], "min_surface_hardness_hrc": np.nan,
                       "governing": "bending", "n_robust": [3, 5, 0], "grade": ["4140", "1045", ""],
                       "family": ["alloy_steel", "carbon_steel", ""], "route_family": ["quench_temper", "induction", ""],
                       "route_text": ["harden oil quench, from 845 °C → temper 540 °C, 2 h", "x", ""],
                       "yield_mpa": [900.0, 600.0, np.nan], "uts_mpa": [1000.0, 800.0, np.nan],
                       "hardness_hrc": [30.0, 20.0, np.nan], "surface_hardness_hrc": [30.0, 55.0, np.nan],
                       "relative_cost": [1.9, 1.4, np.nan], "part_cost": [0.4, 0.6, np.nan],
                       "changed": [False, True, True], "cautions": ["", "", ""],
                       "route": [json.dumps(route), "", ""]})
    us = pg.sweep_table(sw, pg.US)
    # 1 in = 25.4 mm, 1 ksi = 4448.2216152605 / 25.4^2 MPa exactly (NIST SP 811 (2008), Appendix B.8, B.9)
    np.testing.assert_allclose(us["diameter_in"], [1.0, 2.0, 3.0], rtol=1e-12)
    np.testing.assert_allclose(us["min_yield_ksi"][:2], [100.0, 50.0], rtol=1e-12)
    assert "diameter_mm" not in us and "yield_ksi" in us
    # 845 °C = 1553 °F and 540 °C = 1004 °F, written to the 10 °F step of a furnace set point
    assert "1550 °F" in us["route_text"][0] and "1000 °F" in us["route_text"][0] and "oil" in us["route_text"][0]
    assert "°C" not in us["route_text"][0]
    assert us["route_text"][1] == "x"                 # no steps kept: the library's text
    si = pg.sweep_table(sw, pg.SI)
    assert list(si.columns) == [c for c in pg.SWEEP_SHOWN]
    spec = pg.sweep_chart(sw, pg.US).to_dict()
    data = {k: pd.DataFrame(v) for k, v in spec["datasets"].items()}
    # the change at 2 in is marked; 3 in has no robust candidate (✕ at the foot, no cost point)
    marked = [f for f in data.values() if "changed" in f and len(f) and f["changed"].all() and f["cost"].notna().all()]
    assert marked and all(list(f["d"]) == pytest.approx([2.0]) for f in marked)
    nothing = [f for f in data.values() if "cost" in f and len(f) == 1 and f["cost"].isna().all()]
    assert nothing and nothing[0]["pick"][0] == "no robust candidate" and nothing[0]["d"][0] == pytest.approx(3.0)


PIN_BAD = [  # widget key, bad value, words the message must hold (field, value, what is allowed)
    ("pin_load", -5.0, ("Pin load (kN)", "load_kn", "-5", "allowed", "> 0")),
    ("pin_diameter", None, ("Pin diameter: blank", "allowed", "mm")),
    ("pin_sf", 0.5, ("Safety factor", "safety_factor", "0.5", "[1, 10]")),
]


def test_pin_bad_inputs_give_messages(at):
    good = {k: at.number_input(key=k).value for k, _, _ in PIN_BAD}
    for key, value, words in PIN_BAD:
        at.number_input(key=key).set_value(value)
        _run(at)
        errs = " ".join(_errors(at))
        for w in words:
            assert w in errs, (key, w, errs)
        # no targets to apply, no sweep to run; the main table is untouched
        assert not [b for b in at.button if b.key == "pin_apply"], key
        assert at.button(key="sweep_run").disabled, key
        assert _table(at) is not None
        at.number_input(key=key).set_value(good[key])
    # the sweep's own inputs (the pin inputs are good again: the only message is the sweep's)
    at.text_input(key="sweep_list").set_value("20, 2x5")
    _run(at)
    errs = _errors(at)
    assert len(errs) == 1 and "Sweep diameters" in errs[0] and "'2x5'" in errs[0] and "allowed" in errs[0]
    assert [b for b in at.button if b.key == "pin_apply"] and at.button(key="sweep_run").disabled
    at.radio(key="sweep_mode").set_value(pg.SWEEP_MODES[1])
    _run(at)
    at.number_input(key="sweep_to").set_value(10.0)
    _run(at)
    errs = " ".join(_errors(at))
    assert "Sweep to = 10 mm" in errs and "stop_mm" in errs and "allowed" in errs


def test_sweep_on_two_diameters_is_the_library_pick(at):
    at.radio(key="sweep_mode").set_value(pg.SWEEP_MODES[1])
    _run(at)
    at.number_input(key="sweep_from").set_value(22.0)
    at.number_input(key="sweep_to").set_value(28.0)
    at.number_input(key="sweep_step").set_value(6.0)
    _run(at)
    assert _sweep(at) is None                      # only on the button
    at.button(key="sweep_run").click()
    _run(at)
    table = _sweep(at)
    assert table is not None and list(table["diameter_mm"]) == [22.0, 28.0]
    d = pg.DEMO["pin"]
    case = {k: d[k] for k in ("load_kn", "shear_planes", "safety_factor", "gap_mm", "lug_thickness_mm",
                              "clevis_thickness_mm", "wear_surface_hardness_hrc")}
    sv = pg.DEMO["service"]
    ref = diameter_sweep([22.0, 28.0], **case, caution_context=dict(
        plated=sv["plated"], plating=sv["plating"], mating_material=sv["mating_material"],
        environment=sv["environment"], service_temp_c=sv["service_temp_c"]))
    for col in ("grade", "route_text", "cautions", "governing"):
        assert list(table[col]) == list(ref[col]), col
    np.testing.assert_allclose(table["part_cost"], ref["part_cost"], rtol=1e-12)
    np.testing.assert_allclose(table["min_yield_mpa"], ref["min_yield_mpa"], rtol=1e-12)
    # and each pick is the cheapest robust row of select() at that diameter (without an avoid caution)
    for _, row in table.iterrows():
        t = selector.pin_targets(diameter_mm=row["diameter_mm"], **case)
        cand = selector.select(t, row["diameter_mm"], robust_only=True, length_mm=73.0)
        if (cand["avoid"] == "").any():      # routes with an avoid caution only when nothing else is robust
            cand = cand[cand["avoid"] == ""]
        cheapest = cand[cand["part_cost"] == cand["part_cost"].min()]
        assert row["part_cost"] == pytest.approx(cand["part_cost"].min(), rel=1e-12)
        assert (row["grade"], row["route_text"]) in set(zip(cheapest["grade"], cheapest["route_text"]))
    assert list(table["changed"]) == [False, ref["grade"][0] + ref["route_family"][0]
                                      != ref["grade"][1] + ref["route_family"][1]]
    # the chart: cost and yield target against diameter, the changes marked
    charts = [c for c in at.get("vega_lite_chart") if "Cheapest robust pick per diameter" in c.proto.spec]
    assert len(charts) == 1
    import pyarrow as pa
    frames = [pa.ipc.open_stream(ds.data.data).read_all().to_pandas() for ds in charts[0].proto.datasets]
    costs = [f for f in frames if "cost" in f.columns and len(f) == 2]
    assert costs and np.allclose(costs[0]["cost"], ref["part_cost"])
    marked = [f for f in frames if "changed" in f.columns and len(f) and f["changed"].all()]
    assert bool(marked) == bool(ref["changed"].any())
    # the same diameters listed give the same (cached) result; a changed input flags the old one
    at.radio(key="sweep_mode").set_value(pg.SWEEP_MODES[0])
    _run(at)
    at.text_input(key="sweep_list").set_value("28, 22")
    _run(at)
    assert not any("have changed" in i.value for i in at.info)
    at.number_input(key="pin_load").set_value(70.0)
    _run(at)
    assert any("have changed since this sweep" in i.value for i in at.info)
    assert _sweep(at) is not None
    assert sum(selector.CAUTION in w.value for w in at.warning) >= 2


# --------------------------------------------------------------------------- issue 15: settings, reset, prices

def _in_force(at) -> str:
    lines = [m.value for m in at.markdown if m.value.startswith("**In force**")]
    assert len(lines) == 1
    return lines[0]


def test_settings_line_names_every_setting_in_force(at):
    line = _in_force(at)
    d = pg.DEMO
    assert f"Ø {d['diameter_mm']:.4g} mm" in line and f"× {d['length_mm']:.4g} mm long" in line
    # every target of the example, with its value, including the surface hardness of a collapsed panel
    for key, words in (("min_yield_mpa", "yield ≥"), ("min_uts_mpa", "tensile ≥"),
                       ("min_surface_hardness_hrc", "surface ≥")):
        assert f"{words} {d['targets'][key]:.4g}" in line, (key, line)
    sv = d["service"]
    assert sv["plating"] in line and sv["mating_material"] in line and f"{sv['environment']} environment" in line
    assert f"up to {sv['service_temp_c']:.4g} °C" in line
    assert "all families" in line and "probability ≥ 90 %" in line and "catalogue prices" in line and "SI" in line
    # a change of any setting shows in the line
    at.multiselect(key="families").set_value(["alloy_steel", "carbon_steel"])
    at.checkbox(key="corrosion").check()
    at.radio(key="units").set_value(pg.US)
    _run(at)
    line = _in_force(at)
    assert "families: alloy steel, carbon steel" in line and "corrosion-resistant only" in line
    assert f"yield ≥ {d['targets']['min_yield_mpa'] / KSI:.4g} ksi" in line and "°F" in line and "US customary" in line


def test_new_part_clears_everything_and_the_example_is_loaded_on_purpose(at):
    assert any("Example loaded" in i.value for i in at.info)
    at.button(key="new_part").click()
    _run(at)
    for wkey, _, _ in pg.TARGET_FIELDS.values():
        assert at.number_input(key=wkey).value is None, wkey
    for key in ("diameter", "length", "service_temp", "pin_load", "pin_diameter", "pin_lug", "pin_clevis"):
        assert at.number_input(key=key).value is None, key
    assert not at.checkbox(key="plated").value and at.text_input(key="mating").value == ""
    assert at.selectbox(key="environment").value == "normal"
    assert not at.checkbox(key="robust_only").value and at.text_area(key="price_text").value == ""
    assert set(at.multiselect(key="families").value) == set(FAMILIES)
    assert not any("Example loaded" in i.value for i in at.info)
    assert _table(at) is None and not _errors(at)          # blank inputs are the next step, not faults
    assert any(i.value.startswith("Diameter: blank") for i in at.info)
    line = _in_force(at)
    assert "targets: none" in line and "no section" in line and "normal environment" in line
    assert "plated" not in line and "mating" not in line
    # a section alone ranks every candidate with no target
    at.number_input(key="diameter").set_value(30.0)
    at.number_input(key="length").set_value(100.0)
    _run(at)
    table = _table(at)
    assert table is not None and len(table) == len(rank(prepare(30.0, None, 100.0), {}))
    # the example comes back on purpose, labelled, its targets visible in the sidebar
    at.button(key="load_example").click()
    _run(at)
    assert any("Example loaded" in i.value for i in at.info)
    assert at.number_input(key="min_yield").value == pytest.approx(pg.DEMO["targets"]["min_yield_mpa"])
    assert at.number_input(key="min_surface_hrc").value == pg.DEMO["targets"]["min_surface_hardness_hrc"]
    assert at.text_input(key="mating").value == pg.DEMO["service"]["mating_material"]


def test_rejected_price_sheet_after_a_good_one_names_the_prices_in_use(at):
    at.text_area(key="price_text").set_value("grade,relative_price\nAISI 4140,0.25\n")
    _run(at)
    good = _table(at)
    assert "price sheet 'pasted price sheet' (1 grade priced" in _in_force(at)
    at.text_area(key="price_text").set_value("grade,relative_price\n4140,cheap\n")
    _run(at)
    errs = " ".join(_errors(at))
    assert "rejected" in errs and "line 2" in errs
    # the sheet accepted before stays in use, and the page says so (warning and the settings line)
    warn = [w.value for w in at.warning if "Prices in use" in w.value]
    assert warn and "pasted price sheet" in warn[0] and "accepted before" in warn[0]
    assert "price sheet 'pasted price sheet'" in _in_force(at)
    after = _table(at)
    assert (after.loc[after["grade"] == "4140", "price_source"] == "price sheet").all()
    pd.testing.assert_frame_equal(good, after)
    # clearing the text goes back to the catalogue, said in the line
    at.text_area(key="price_text").set_value("")
    _run(at)
    assert "catalogue prices" in _in_force(at) and not _errors(at)


# --------------------------------------------------------------------------- issue 15: procurement

def _alternatives(at) -> pd.DataFrame | None:
    for df in at.dataframe:
        if "saving / kg" in df.value.columns:
            return df.value
    return None


def test_alternatives_view_lists_cheaper_candidates_with_material_and_processing_apart(at):
    table = _table(at)
    # the dearest candidate per kg has cheaper alternatives
    i = int(np.argmax(table["relative_cost"].to_numpy(float)))
    at.selectbox(key="alt_pick").select_index(i)
    _run(at)
    shown = _alternatives(at)
    row = table.iloc[i]
    d = pg.DEMO
    ref = alternatives(row["grade"], json.loads(row["route"]), d["diameter_mm"],
                                                 length_mm=d["length_mm"])
    assert shown is not None and len(shown) == len(ref) > 0
    assert list(shown["grade"]) == list(ref["grade"])
    np.testing.assert_allclose(shown["total / kg"], ref["relative_cost"], atol=5e-4)
    np.testing.assert_allclose(shown["material / kg"] + shown["processing / kg"], shown["total / kg"], atol=1.5e-3)
    # the material part is the grade's catalogue price (no sheet loaded), the processing part the route's adder
    for g, m in zip(shown["grade"], shown["material / kg"]):
        assert m == pytest.approx(selector.grade(g).relative_price, abs=5e-4)
    assert (shown["total / kg"] < row["relative_cost"]).all()
    labels = [m.label for m in at.metric]
    assert "Material / kg" in labels and "Processing / kg" in labels
    assert any("prices in use: catalogue prices" in c.value for c in at.caption)
    # a grade and route typed by the user; a bad step names the field
    at.radio(key="alt_mode").set_value("a grade and route I type")
    _run(at)
    assert _alternatives(at) is not None or any("No cheaper candidate" in i.value for i in at.info)
    at.text_input(key="alt_steps").set_value("harden quench=oil; temper temp_c")
    _run(at)
    assert any(e.startswith("Route steps") and "temp_c" in e and "allowed" in e for e in _errors(at))
    at.text_input(key="alt_steps").set_value("harden quench=oil; temper temp_c=hot")
    _run(at)
    assert any("temp_c" in e and "hot" in e for e in _errors(at))


# --------------------------------------------------------------------------- issue 15: pin explanation, comparison

def test_pin_view_explains_each_derived_target(at):
    md = " ".join(m.value for m in at.markdown)
    rep = pin_report(**{k: pg.DEMO["pin"][k] for k in
                                             ("load_kn", "diameter_mm", "shear_planes", "safety_factor", "gap_mm",
                                              "lug_thickness_mm", "clevis_thickness_mm",
                                              "wear_surface_hardness_hrc")})
    assert f"{rep['governing']} governs" in md
    assert f"Minimum yield {rep['targets']['min_yield_mpa']:.4g} MPa" in md
    assert f"Minimum tensile {rep['targets']['min_uts_mpa']:.4g} MPa: from shear only" in md
    assert "/ 0.6," in md and "common practice" in md           # the shear-to-tensile factor and its source
    assert "Minimum surface hardness 50 HRC" in md
    _set_pin(at, PIN_CASE, planes=1)
    md = " ".join(m.value for m in at.markdown)
    ref = pin_report(load_kn=45.0, diameter_mm=30.0, shear_planes=1, safety_factor=2.5,
                                          gap_mm=2.0, lug_thickness_mm=20.0, clevis_thickness_mm=12.0)
    assert f"{ref['governing']} governs" in md and "No surface-hardness target" in md


def test_use_these_targets_prefills_side_by_side_with_through_and_case_hardened(at):
    table = _table(at)
    at.multiselect(key="compare").set_value(list(at.multiselect(key="compare").options[-2:]))
    _run(at)
    at.button(key="pin_apply").click()
    _run(at)
    table = _table(at)
    depth = table["case_depth_mm"].astype(float).fillna(0.0).to_numpy()
    chosen = at.multiselect(key="compare").value
    assert len(chosen) == 2
    # the first row without a case and the first with one, in the table's order
    first_through = next(i for i in range(len(table)) if depth[i] <= 0)
    first_case = next(i for i in range(len(table)) if depth[i] > 0)
    assert chosen == [table["variant"].iloc[first_through], table["variant"].iloc[first_case]]


def test_default_columns_are_readable_and_all_columns_are_behind_a_switch(at):
    from selector.views.columns import default_headers

    shown = _readable(at)
    assert shown is not None and len(shown) > 0
    headers = [h for h in default_headers(pg.SI, "HRC") if h in shown.columns]
    assert list(shown.columns) == ["id"] + headers + ["material / kg", "processing / kg"]
    for h in ("grade", "process route", "yield (MPa)", "tensile (MPa)", "elongation (%)", "hardness (HRC)",
              "surface hardness (HRC)", "case depth (mm)", "part cost (relative)", "p_meet (%)", "process window"):
        assert h in shown.columns, h
    assert not {"route_family", "route", "route_text", "window_min", "variant"} & set(shown.columns)
    # rounded to the precision the models carry: strengths to 5 MPa, elongation to 0.5 %
    assert (shown["yield (MPa)"] % 5 == 0).all() and ((shown["elongation (%)"] * 2) % 1 == 0).all()
    # a zero case depth reads as words, never 0
    full = _table(at)
    assert list(full["id"]) == list(shown["id"])
    no_case = full["case_depth_mm"].astype(float).fillna(0.0).to_numpy() <= 0
    assert no_case.any() and (~no_case).any()
    assert shown.loc[no_case, "case depth (mm)"].isin(["through-hardened", "no case"]).all()
    hardened = full["route_family"].isin(["quench_temper"]).to_numpy() & no_case
    assert (shown.loc[hardened, "case depth (mm)"] == "through-hardened").all()
    # the switch adds every internal column after the readable ones
    assert {"route_family", "route", "route_text", "window_min", "relative_price"} <= set(full.columns)
    assert list(full.columns[:len(shown.columns) - 2]) == list(shown.columns[:-2])
    # in US units the headers carry US units
    at.toggle(key="all_columns").set_value(False)
    at.radio(key="units").set_value(pg.US)
    _run(at)
    us = _readable(at)
    assert "yield (ksi)" in us.columns and "case depth (in)" in us.columns and "yield (MPa)" not in us.columns
    # prices per lb: the per-kg price x 0.45359237 kg/lb (exact, NIST SP 811 (2008), B.8)
    assert "material / lb" in us.columns and "material / kg" not in us.columns
    np.testing.assert_allclose(us["material / lb"], shown["material / kg"] * 0.45359237, rtol=2e-2)
