"""Tests of selector.rules.cautions: every caution fires where it should and
nowhere else (both sides of every threshold), the registry matches the data file,
and bad input names the field."""
import numpy as np
import pandas as pd
import pytest

from selector.rules import cautions as ca
from selector.errors import InputError
from selector.models import conversions

# a neutral row: annealed low-carbon steel, nothing to caution about
NEUTRAL = dict(grade="1018", family="carbon_steel", route="anneal", quench="", temper_temp_c=np.nan,
               age_temp_c=np.nan, peak_ratio=np.nan, designation="", c_pct=0.18, hardness_hrc=np.nan,
               surface_hardness_hrc=np.nan, uts_mpa=440.0, corrosion_resistant=False)


def frame(*rows):
    return pd.DataFrame([{**NEUTRAL, **r} for r in rows])


def fired(df, **ctx):
    return [[d["code"] for d in row] for row in ca.cautions_for(df, **ctx)]


def only(code, df, **ctx):
    """Per row: does ``code`` fire, and is it the only caution?"""
    out = []
    for codes in fired(df, **ctx):
        out.append(code in codes)
        assert set(codes) <= {code}, codes
    return out


def test_registry_matches_data_file():
    assert set(ca.CAUTIONS) == set(ca.TRIGGERS)
    for c in ca.CAUTIONS.values():
        assert c.title and c.rule and c.reason and c.trigger_text and c.source
        assert c.confidence in ("verified", "partial", "from memory", "common practice")


def test_neutral_row_has_no_caution():
    df = frame({}, dict(grade="304", family="stainless_austenitic", c_pct=0.05))
    assert fired(df, plated=True, service_temp_c=400.0) == [[], []]
    assert ca.caution_column(df).tolist() == ["", ""]


# --- tempered-martensite embrittlement: 260 <= T <= 370 °C (data/cautions.csv, tme row) ---
def test_tme_both_sides_of_the_range():
    qt = dict(grade="4140", family="alloy_steel", route="quench_temper", quench="oil", c_pct=0.25)
    temps = [250.0, 259.9, 260.0, 300.0, 370.0, 370.1, 450.0, np.nan]
    df = frame(*[dict(qt, temper_temp_c=t) for t in temps])
    assert only("tme", df) == [False, False, True, True, True, False, False, False]


def test_tme_only_for_hardened_plain_and_low_alloy_steels():
    base = dict(route="quench_temper", quench="oil", temper_temp_c=300.0, c_pct=0.25)
    df = frame(dict(base, grade="4140", family="alloy_steel"),
               dict(base, grade="8620", family="carburizing_steel", route="carburize"),
               dict(base, grade="1045", family="carbon_steel", route="induction"),
               dict(base, grade="420", family="stainless_martensitic"),     # own embrittlement range
               dict(base, grade="6061", family="aluminium", route="age"),
               dict(base, grade="4140", family="alloy_steel", route="nitride"),
               dict(base, grade="4140", family="alloy_steel", route="martemper"),
               dict(base, grade="4140", family="alloy_steel", route="martemper", temper_temp_c=400.0),
               dict(base, grade="4140", family="alloy_steel", route="austemper", temper_temp_c=np.nan))
    assert only("tme", df) == [True, True, True, False, False, False, True, False, False]


# --- hydrogen embrittlement when plated: >= 320 HV (32.2 HRC), or >= 1000 MPa (ISO 4042 §6) ---
def test_he_threshold_is_320_hv_on_the_hrc_scale():
    # ASTM E140-12b Table 1: HRC 32 = 318 HV, HRC 34 = 336 HV; 320 HV lies at 32.22 HRC
    assert ca.HE_HARDNESS_HRC == pytest.approx(32.22, abs=0.01)
    assert conversions.hrc_to_hv(ca.HE_HARDNESS_HRC) == pytest.approx(320.0, abs=1e-6)


def test_hydrogen_embrittlement_both_sides():
    hi = dict(grade="4140", family="alloy_steel", route="quench_temper", quench="oil",
              temper_temp_c=540.0, c_pct=0.25)
    lim = ca.HE_HARDNESS_HRC
    df = frame(dict(hi, hardness_hrc=lim - 0.1, uts_mpa=990.0),         # below both
               dict(hi, hardness_hrc=lim + 0.1, uts_mpa=990.0),         # core hardness
               dict(hi, hardness_hrc=np.nan, uts_mpa=1000.0),           # strength
               dict(hi, hardness_hrc=25.0, surface_hardness_hrc=58.0, uts_mpa=900.0),  # case
               dict(hi, hardness_hrc=45.0, uts_mpa=1480.0, grade="304",
                    family="stainless_austenitic"),                     # austenitic: not susceptible
               dict(hi, hardness_hrc=40.0, uts_mpa=1300.0, grade="17-4PH", family="stainless_ph"))
    assert only("hydrogen_embrittlement", df, plated=True) == [False, True, True, True, False, True]
    assert only("hydrogen_embrittlement", df, plated=False) == [False] * 6


# --- quench cracking: water/brine, alloy steel C >= 0.35 %, carbon steel C >= 0.60 % ---
def test_quench_cracking_both_sides():
    q = dict(route="quench_temper", temper_temp_c=550.0)
    df = frame(dict(q, grade="4140", family="alloy_steel", quench="water", c_pct=0.35),
               dict(q, grade="4130", family="alloy_steel", quench="water", c_pct=0.34),
               dict(q, grade="4140", family="alloy_steel", quench="brine", c_pct=0.40),
               dict(q, grade="4140", family="alloy_steel", quench="oil", c_pct=0.40),
               dict(q, grade="4140", family="alloy_steel", quench="polymer", c_pct=0.40),
               dict(q, grade="1080", family="carbon_steel", quench="water", c_pct=0.60),
               dict(q, grade="1050", family="carbon_steel", quench="water", c_pct=0.59),
               dict(q, grade="41CrAlMo7-10", family="nitriding_steel", quench="Water", c_pct=0.41),
               dict(q, grade="8620", family="carburizing_steel", quench="water", c_pct=0.20))
    got = [("quench_cracking" in c) for c in fired(df)]
    assert got == [True, False, True, False, False, True, False, True, False]


# --- quench cracking at the top of the carbon range: nominal below the limit, maximum at it ---
def test_quench_cracking_range_fires_only_below_the_limit_when_the_range_reaches_it():
    # carbon ranges of the grades (data/compositions.csv): 34CrMo4 0.30-0.37 (EN 10083-3),
    # 4130 0.28-0.33 (SAE J404), 4140 0.38-0.43 (SAE J404)
    from selector.catalogue.grades import grade
    assert grade("34CrMo4").comp_max["C"] >= 0.35 > grade("34CrMo4").composition()["C"]
    assert grade("4130").comp_max["C"] < 0.35
    q = dict(route="quench_temper", temper_temp_c=550.0, family="alloy_steel")
    df = frame(dict(q, grade="34CrMo4", quench="water", c_pct=grade("34CrMo4").composition()["C"]),
               dict(q, grade="34CrMo4", quench="oil", c_pct=grade("34CrMo4").composition()["C"]),
               dict(q, grade="4130", quench="water", c_pct=grade("4130").composition()["C"]),
               dict(q, grade="4140", quench="water", c_pct=grade("4140").composition()["C"]),
               dict(q, grade="NOT-A-GRADE", quench="water", c_pct=0.30))
    codes = fired(df)
    assert [("quench_cracking_range" in c) for c in codes] == [True, False, False, False, False]
    # the nominal-carbon rule keeps firing on 4140 (above the limit) and not on 34CrMo4
    assert [("quench_cracking" in c) for c in codes] == [False, False, False, True, False]
    sev = {d["code"]: d["severity"] for row in ca.cautions_for(df) for d in row}
    assert sev["quench_cracking_range"] == "caution" and sev["quench_cracking"] == "avoid"


# --- decarburization: steels, C >= 0.30 %, quench_temper / normalize / anneal ---
def test_decarburization_both_sides():
    df = frame(dict(grade="1030", c_pct=0.30, route="normalize"),
               dict(grade="1029", c_pct=0.29, route="normalize"),
               dict(grade="1045", c_pct=0.45, route="anneal"),
               dict(grade="1045", c_pct=0.45, route="cold_work"),
               dict(grade="1045", c_pct=0.45, route="induction", quench="polymer", temper_temp_c=180.0),
               dict(grade="420", family="stainless_martensitic", c_pct=0.35, route="quench_temper",
                    quench="oil", temper_temp_c=600.0),
               dict(grade="C26000", family="copper_alloy", c_pct=0.30, route="anneal"))
    assert only("decarburization", df) == [True, False, True, False, False, True, False]


# --- over-aging: peak_ratio > 1, unless a standard over-aged temper ---
def test_over_aging_both_sides():
    age = dict(grade="6061", family="aluminium", route="age", c_pct=0.0, age_temp_c=175.0)
    df = frame(dict(age, peak_ratio=1.0, designation="T6"),
               dict(age, peak_ratio=1.01, designation="T6"),
               dict(age, peak_ratio=2.0, designation=""),
               dict(age, peak_ratio=np.nan, designation="T6"),
               dict(age, peak_ratio=0.5, designation="T5"),
               dict(age, grade="2024", peak_ratio=3.0, designation="T73"),
               dict(age, grade="17-4PH", family="stainless_ph", peak_ratio=2.0, designation="H1150"),
               dict(age, grade="17-4PH", family="stainless_ph", peak_ratio=1.2, designation="H925"))
    assert only("over_aging", df) == [False, True, True, False, False, False, False, True]


# --- SCC: 7xxx in T6-type tempers, not T7x ---
def test_scc_7xxx_t6_both_sides():
    al = dict(family="aluminium", route="age", c_pct=0.0, age_temp_c=120.0, peak_ratio=1.0)
    df = frame(dict(al, grade="7075", designation="T6"),
               dict(al, grade="7075", designation="T651"),
               dict(al, grade="7075", designation="T73", peak_ratio=np.nan),
               dict(al, grade="7075", designation="T7351", peak_ratio=np.nan),
               dict(al, grade="6061", designation="T6"),
               dict(al, grade="2024", designation="T6"),
               dict(al, grade="7075", designation="O", route="anneal", age_temp_c=np.nan))
    assert only("scc_7xxx_t6", df) == [True, True, False, False, False, False, False]


# --- galvanic: anodic-index difference above the environment's limit (MIL-DTL-14072 Table VI) ---
def test_anodic_index_lookup():
    # MIL-DTL-14072 Table VI group "high brasses": 0.45 V (data/galvanic_series.csv)
    assert ca.anodic_index("brass")["anodic_index_v"] == pytest.approx(0.45)
    assert ca.anodic_index("Zinc-plated")["category"] == "zinc"
    assert ca.anodic_index("7075-T6")["category"] == "aluminium_wrought"
    assert ca.anodic_index("2024-T351")["category"] == "aluminium_2xxx"
    # MIL-DTL-14072 Table VI group "plain carbon and low alloy steels": 0.85 V (data/galvanic_series.csv)
    assert ca.anodic_index("Mild steel")["anodic_index_v"] == pytest.approx(0.85)
    with pytest.raises(InputError) as exc:
        ca.anodic_index("unobtainium")
    assert exc.value.field == "mating_material" and "brass" in exc.value.allowed


def test_galvanic_both_sides_of_the_limit():
    df = frame(dict(grade="1045", family="carbon_steel", c_pct=0.20),        # 0.85 V
               dict(grade="316", family="stainless_austenitic", c_pct=0.03),  # 0.50 V
               dict(grade="6061", family="aluminium", c_pct=0.0),             # 0.90 V
               dict(grade="2024", family="aluminium", c_pct=0.0),             # 0.75 V
               dict(grade="Ti-6Al-4V", family="titanium", c_pct=0.0))        # 0.30 V
    # against brass 0.45 V, normal limit 0.25 V: |0.40|, |0.05|, |0.45|, |0.30|, |0.15|
    assert only("galvanic", df, mating_material="brass") == [True, False, True, True, False]
    # harsh limit 0.15 V: 0.15 is not above it
    assert only("galvanic", df, mating_material="brass", environment="harsh") == [True, False, True, True, False]
    # controlled limit 0.50 V: nothing exceeds it
    assert only("galvanic", df, mating_material="brass", environment="controlled") == [False] * 5
    # against steel 0.85 V (normal): 0, 0.35, 0.05, 0.10, 0.55
    assert only("galvanic", df, mating_material="cast iron") == [False, True, False, False, True]
    assert only("galvanic", df) == [False] * 5


def test_galvanic_uses_the_plating_when_named():
    df = frame(dict(grade="4140", family="alloy_steel", route="quench_temper", quench="oil",
                    temper_temp_c=600.0, c_pct=0.29, hardness_hrc=28.0, uts_mpa=950.0))
    # bare steel 0.85 V vs 6061 0.90 V: compatible; zinc plating 1.25 V vs copper 0.35 V: not
    assert fired(df, mating_material="6061") == [[]]
    assert fired(df, mating_material="copper") == [["galvanic"]]
    assert fired(df, plated=True, plating="nickel plated", mating_material="6061") == [["galvanic"]]
    assert fired(df, plated=True, plating="zinc plated", mating_material="galvanized steel") == [[]]
    reason = ca.cautions_for(df, mating_material="copper")[0][0]["reason"]
    assert "0.50 V" in reason and "this part is the anode" in reason


# --- service temperature: >= temper or aging temperature - 50 °C ---
def test_service_temperature_both_sides():
    df = frame(dict(grade="8620", family="carburizing_steel", route="carburize", quench="oil",
                    temper_temp_c=180.0, c_pct=0.20),
               dict(grade="6061", family="aluminium", route="age", age_temp_c=175.0, peak_ratio=1.0,
                    c_pct=0.0, designation="T6"),
               dict())
    # aged at 175 °C: fires from 125 °C; tempered at 180 °C: fires from 130 °C
    assert only("service_temperature", df, service_temp_c=124.9) == [False, False, False]
    assert only("service_temperature", df, service_temp_c=125.0) == [False, True, False]
    assert only("service_temperature", df, service_temp_c=129.9) == [False, True, False]
    assert only("service_temperature", df, service_temp_c=130.0) == [True, True, False]
    assert only("service_temperature", df, service_temp_c=400.0) == [True, True, False]
    assert only("service_temperature", df) == [False, False, False]


def test_candidates_table_route_family_column_is_used():
    # select() returns the family as route_family and the steps list as route
    df = pd.DataFrame([dict(NEUTRAL, grade="4140", family="alloy_steel", route=[("quench", {})],
                            route_family="quench_temper", quench="oil", temper_temp_c=300.0, c_pct=0.25)])
    assert fired(df) == [["tme"]]


def test_missing_optional_columns_count_as_not_applicable():
    df = pd.DataFrame({"grade": ["7075", "4140"], "family": ["aluminium", "alloy_steel"]})
    assert fired(df, plated=True, service_temp_c=300.0) == [[], []]


def test_caution_column_joins_titles():
    df = frame(dict(grade="4140", family="alloy_steel", route="quench_temper", quench="water",
                    temper_temp_c=300.0, c_pct=0.40, hardness_hrc=48.0, uts_mpa=1600.0))
    col = ca.caution_column(df, plated=True)
    t = ca.CAUTIONS
    assert col.iloc[0] == "; ".join([t["tme"].title, t["hydrogen_embrittlement"].title,
                                     t["quench_cracking"].title, t["decarburization"].title])
    assert col.index.equals(df.index) and col.name == "cautions"


@pytest.mark.parametrize("kwargs,field", [
    (dict(plated="yes"), "plated"),
    (dict(service_temp_c="hot"), "service_temp_c"),
    (dict(service_temp_c=-300.0), "service_temp_c"),
    (dict(environment="marine"), "environment"),
    (dict(mating_material=""), "mating_material"),
    (dict(plating="zinc plated"), "plating"),
])
def test_bad_context_names_the_field(kwargs, field):
    with pytest.raises(InputError) as exc:
        ca.cautions_for(frame({}), **kwargs)
    assert exc.value.field == field


def test_frame_without_grade_or_family_is_refused():
    with pytest.raises(InputError) as exc:
        ca.cautions_for(pd.DataFrame({"grade": ["4140"]}))
    assert "family" in exc.value.allowed
    with pytest.raises(InputError):
        ca.cautions_for([{"grade": "4140"}])


def test_galvanic_members_are_unique_and_indices_ordered():
    g = ca.galvanic_series()
    assert g["anodic_index_v"].is_monotonic_increasing
    assert (g["anodic_index_v"].iloc[0], g["anodic_index_v"].iloc[-1]) == (0.0, 1.85)
    # every catalogue family maps to a group
    for fam in ("carbon_steel", "alloy_steel", "carburizing_steel", "nitriding_steel", "stainless_austenitic",
                "stainless_martensitic", "stainless_ph", "aluminium", "copper_alloy", "titanium"):
        assert ca._lookup_grade("x", fam) is not None, fam


# --- two-stage routes: the prior hardening of an induction route, the Q&T before nitriding ---
def test_two_stage_routes():
    ind = dict(grade="4140", family="alloy_steel", route="induction", prior="quench_temper", quench="polymer",
               temper_temp_c=180.0, c_pct=0.40, prior_quench="oil", prior_temper_temp_c=550.0)
    nit = dict(grade="41CrAlMo7-10", family="nitriding_steel", route="nitride", quench="oil",
               temper_temp_c=600.0, temp_c=525.0, c_pct=0.41)
    car = dict(grade="8620", family="carburizing_steel", route="carburize", quench="oil",
               temper_temp_c=175.0, temp_c=925.0, c_pct=0.35)
    df = frame(ind,
               dict(ind, prior_temper_temp_c=300.0),             # core in the TME range
               dict(ind, prior_quench="water"),                  # prior water quench, 0.40 % C
               dict(ind, prior="", c_pct=0.25),                  # bare induction, low C
               nit, car)
    got = fired(df)
    assert got[0] == ["decarburization"]
    assert got[1] == ["tme", "decarburization"]
    assert got[2] == ["quench_cracking", "decarburization"]
    assert got[3] == []
    assert got[4] == ["decarburization"]
    assert got[5] == []                                          # carburizing atmosphere: no decarb rule
    # service near the nitriding temperature (525 °C) fires from 475 °C; the carburizing
    # temperature (925 °C) is not a tempering temperature, its 175 °C temper is
    def svc(df, t):
        return [("service_temperature" in c) for c in fired(df, service_temp_c=t)]
    assert svc(frame(nit, car), 474.9) == [False, True]
    assert svc(frame(nit), 475.0) == [True]
    assert svc(frame(car), 124.9) == [False]
    reason = {d["code"]: d["reason"] for d in ca.cautions_for(frame(nit), service_temp_c=480.0)[0]}[
        "service_temperature"]
    assert "nitrided at 525 °C" in reason and "tempered at 600 °C" in reason


def test_docstring_documents_every_parameter():
    import inspect
    fn = ca.cautions_for
    doc = fn.__doc__
    assert "Parameters" in doc and "Returns" in doc and "References" in doc
    block = doc.split("Parameters", 1)[1].split("Returns", 1)[0]
    documented = {n.strip() for line in block.splitlines()
                  if line.startswith("    ") and not line.startswith("     ") and " : " in line
                  for n in line.split(" : ")[0].split(",")}
    assert documented == set(inspect.signature(fn).parameters)


def test_age_route_temperature_from_temp_c():
    # an aging route that names its temperature temp_c (the step's parameter) counts as aged there
    df = frame(dict(grade="6061", family="aluminium", route="age", temp_c=175.0, c_pct=0.0, peak_ratio=1.0))
    assert fired(df, service_temp_c=124.9) == [[]]
    assert fired(df, service_temp_c=125.0) == [["service_temperature"]]
    # temp_c of a carburize route is not an aging temperature
    df2 = frame(dict(grade="8620", family="carburizing_steel", route="carburize", temp_c=925.0, c_pct=0.2))
    assert fired(df2, service_temp_c=900.0) == [[]]


def test_columns_read_cover_every_frame_attribute():
    cols = set(ca.COLUMNS_READ)
    df = frame({})
    f = ca._Frame(df)
    attrs = {k for k in vars(f) if k != "n"}
    assert attrs <= cols | {"route"}


def test_shallow_hardening_on_martemper_and_bought_quenched_and_tempered_bar():
    # Grossmann's 50 % martensite criterion at the centre (Grossmann 1952, ASTM A255; from memory,
    # common practice): a martemper hardens to martensite like a quench, and a bar bought quenched
    # and tempered was hardened by the mill; both are judged on their centre martensite
    base = dict(grade="4140", family="alloy_steel", c_pct=0.40, uts_mpa=1000.0)
    rows = frame(dict(base, route="martemper", center_martensite_pct=44.0),
                 dict(base, route="martemper", center_martensite_pct=50.0),
                 dict(base, route="supply", quench="oil", center_martensite_pct=49.9),
                 dict(base, route="supply", quench="oil", center_martensite_pct=59.0),
                 dict(base, route="supply", quench="", center_martensite_pct=np.nan),    # not quenched
                 dict(base, route="supply_nitride", quench="oil", center_martensite_pct=30.0),
                 dict(base, route="austemper", center_martensite_pct=0.1))              # bainite by design
    got = [("shallow_hardening" in c) for c in fired(rows, strength_target=True)]
    assert got == [True, False, True, False, False, True, False]
    # no strength target: the rule does not apply
    assert not any("shallow_hardening" in c for c in fired(rows, strength_target=False))
