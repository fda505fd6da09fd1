"""Tests of selector.models.structure_tempering (mixture rule of Maynier et al. 1978 on the
hardenability chain's martensite fraction) and of its use by the harden + temper route."""
import numpy as np
import pytest

import selector
from selector.errors import InputError
from selector.models import conversions as cv
from selector.models import phase_hardness as ph
from selector.models import structure_tempering as st
from selector.models import tempering as tp
from selector.models.martensite import martensite_hardness_hrc
from selector.routes import quench_response

C4140 = {"C": 0.40, "Si": 0.25, "Mn": 0.85, "Cr": 1.0, "Mo": 0.20}


def parts_for(comp, martensite_pct, rate_c_s):
    c2 = {k: np.atleast_1d(np.asarray(v, float))[:, None] for k, v in comp.items()}
    return st.constituents(c2, np.atleast_2d(martensite_pct), np.atleast_2d(rate_c_s)), c2


def test_fractions_sum_to_one_and_martensite_is_the_given_one():
    parts, _ = parts_for(C4140, [[100.0, 95.0, 50.0, 0.0]], [[30.0, 16.0, 3.0, 1.0]])
    total = parts["x_m"] + parts["x_b"] + parts["x_fp"]
    assert np.allclose(total, 1.0)
    assert np.allclose(parts["x_m"], [[1.0, 0.95, 0.5, 0.0]])


def test_as_quenched_constituents_are_maynier_check_values():
    # hand evaluation of the published equations for 0.40C-0.25Si-0.85Mn-1.0Cr-0.20Mo
    # (Maynier, Jungmann & Dollet 1978): HV_B 299/350/402 and HV_FP 220/234/247 at
    # 1e3/1e4/1e5 C/h.  The constituent hardnesses of the mixture are those values.
    rates = np.array([[1e3, 1e4, 1e5]]) / 3600.0
    parts, _ = parts_for(C4140, [[0.0, 0.0, 0.0]], rates)
    assert np.allclose(parts["hv_b"], [[299, 350, 402]], atol=1.5)
    assert np.allclose(parts["hv_fp"], [[220, 234, 247]], atol=1.5)


def test_fully_martensitic_structure_tempers_on_the_master_surface():
    parts, c2 = parts_for(C4140, [[100.0]], [[50.0]])
    for t in (205.0, 425.0, 650.0):
        hv = st.mixture_hv(parts, np.array([[t]]), np.array([[2.0]]), c2)
        assert float(hv[0, 0]) == pytest.approx(float(tp.tempered_martensite_hv(C4140, t, 2.0)), rel=1e-12)


def test_bainite_softens_less_than_martensite_and_ferrite_pearlite_barely():
    # Maynier et al. (1978): tempered bainite softens much less than tempered martensite;
    # ferrite-pearlite keeps its hardness at tempering temperatures (common practice)
    rate = [[3.0]]
    m, c2 = parts_for(C4140, [[100.0]], rate)
    b = dict(m, x_m=np.zeros((1, 1)), x_b=np.ones((1, 1)), x_fp=np.zeros((1, 1)))
    fp = dict(m, x_m=np.zeros((1, 1)), x_b=np.zeros((1, 1)), x_fp=np.ones((1, 1)))
    temps = np.array([[205.0, 315.0, 425.0, 540.0, 650.0]])
    h = np.full(temps.shape, 2.0)
    drop = {k: st.mixture_hv(p, None) - st.mixture_hv(p, temps, h, c2) for k, p in
            (("m", m), ("b", b), ("fp", fp))}
    assert np.all(drop["m"] >= drop["b"]) and np.any(drop["m"] > drop["b"] + 50.0)
    assert np.all(drop["b"] >= drop["fp"] - 1e-9)
    assert np.allclose(drop["fp"][0, :4], 0.0)          # unchanged up to 540 C
    for d in drop.values():                              # softer as the temper rises
        assert np.all(np.diff(d[0]) >= -1e-9)


def test_lean_carbon_manganese_bainite_does_not_collapse_or_harden():
    # 1144-like C-Mn steel without Si/Cr/Mo: the recalled Maynier tempered-bainite equation has a
    # negative temperature slope there; the model must still soften monotonically and never lose
    # more than the martensite (Maynier et al. 1978 behaviour; bound from memory)
    comp = {"C": 0.44, "Mn": 1.5}
    parts, c2 = parts_for(comp, [[0.0]], [[3.0]])
    b = dict(parts, x_m=np.zeros((1, 1)), x_b=np.ones((1, 1)), x_fp=np.zeros((1, 1)))
    temps = np.linspace(150.0, 650.0, 51)[None, :]
    hv = st.mixture_hv(b, temps, np.ones_like(temps), c2)
    assert np.all(np.diff(hv[0]) <= 1e-9)
    m = dict(parts, x_m=np.ones((1, 1)), x_b=np.zeros((1, 1)), x_fp=np.zeros((1, 1)))
    hv_m = st.mixture_hv(m, temps, np.ones_like(temps), c2)
    assert np.all(float(parts["hv_b"][0, 0]) - hv[0] <= float(parts["hv_m"][0, 0]) - hv_m[0] + 1e-9)


def test_tempering_never_hardens_and_untempered_states_keep_their_hardness():
    parts, c2 = parts_for(C4140, [[100.0, 80.0, 40.0, 0.0]], [[40.0, 10.0, 3.0, 0.5]])
    aq = st.mixture_hv(parts)
    for t in (150.0, 300.0, 500.0, 700.0):
        assert np.all(st.mixture_hv(parts, np.full((1, 4), t), np.full((1, 4), 1.0), c2) <= aq + 1e-9)
    same = st.mixture_hv(parts, np.full((1, 4), np.nan), np.full((1, 4), 1.0), c2)
    assert np.allclose(same, aq)


def test_bad_input():
    with pytest.raises(InputError, match="martensite_pct"):
        parts_for(C4140, [[120.0]], [[10.0]])
    with pytest.raises(InputError, match="cooling_rate_c_s"):
        parts_for(C4140, [[50.0]], [[0.0]])
    parts, _ = parts_for(C4140, [[50.0]], [[10.0]])
    with pytest.raises(InputError, match="comp"):
        st.mixture_hv(parts, np.array([[500.0]]), np.array([[1.0]]))


def test_route_uses_the_chain_martensite_fraction():
    # the diagnosis of issue 11: 4140 at a 25 mm centre reports ~95 % martensite; the tempered
    # hardness must be the mixture with that same fraction (not a hardness-based 0.84)
    g = selector.grade("4140")
    comp = {k: np.array([v]) for k, v in g.composition().items()}
    from selector.routes.families.quench_temper import default_austenitize_c
    prof = quench_response.as_quenched_profile(comp, "oil", diameter_mm=25.4,
                                               austenitize_c=default_austenitize_c(g))
    m_centre = float(prof["martensite_pct"][0, -1])
    r = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}],
                          diameter_mm=25.4)
    assert r["center_martensite_pct"] == pytest.approx(m_centre, abs=1e-6)
    c2 = {k: v[:, None] for k, v in comp.items()}
    parts = st.constituents(c2, prof["martensite_pct"], prof["cooling_rate_c_s"])
    assert float(parts["x_m"][0, -1]) == pytest.approx(m_centre / 100.0)
    mix = st.mixture_hv(parts, np.array([[540.0]]), np.array([[2.0]]), c2)[0, -1]
    assert r["center_hardness_hv"] == pytest.approx(min(float(mix), float(prof["hardness_hv"][0, -1])), rel=1e-6)


# Independent published rows (data/reference/qt_steels.csv; no fit row joins them on the
# fit-convention keys): 4340 oil quenched from 843 C, 4-in (101.6 mm) round, half-radius,
# tempered 427/538/649 C: 1331/1172/938 MPa, 42/37/28 HRC (Metal Mart USA 4340 data sheet,
# metalmartusa.com catalog id 165).  Time not stated: 2 h.  Tolerance 8 % / 2.5 HRC: the
# issue's 90th-percentile target is 12 %, a single heat of a supplier sheet is not tighter.
@pytest.mark.parametrize("temp_c,uts_mpa,hrc", [(427, 1331, 42.0), (538, 1172, 37.0), (649, 938, 28.0)])
def test_partly_hardened_4340_round_against_supplier_sheet(temp_c, uts_mpa, hrc):
    r = selector.evaluate("4340", [{"op": "harden", "quench": "oil", "austenitize_c": 843.0},
                                   {"op": "temper", "temp_c": temp_c, "hours": 2.0}], diameter_mm=101.6)
    assert r["test_location"] == "mid-radius"
    assert r["uts_mpa"] == pytest.approx(uts_mpa, rel=0.08)
    assert r["hardness_hrc"] == pytest.approx(hrc, abs=2.5)


def test_outside_the_fitted_range_warns():
    # 704 C lies beyond the fitted tempering parameter of a 0.4 % C steel; 52100 beyond its carbon
    hot = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 704}],
                            diameter_mm=25.4)
    assert any(w.startswith("tempering_hv: P_1000") for w in hot["warnings"])
    # 1095's martensite holds 0.94 % C (the Acm line at its hardening temperature): beyond the fitted 0.3-0.6 %
    hc = selector.evaluate("1095", [{"op": "harden", "quench": "water"}, {"op": "temper", "temp_c": 200}],
                           diameter_mm=10)
    assert any(w.startswith("tempering_hv: C =") for w in hc["warnings"])
    # 52100's martensite holds about 0.6 % C (inside), but its 1.45 % Cr lies beyond the fitted 1.05 %
    cr = selector.evaluate("52100", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 200}],
                           diameter_mm=10)
    assert any(w.startswith("tempering_hv: Cr =") for w in cr["warnings"])
    assert not any(w.startswith("tempering_hv: C =") for w in cr["warnings"])
    ok = selector.evaluate("4140", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540}],
                           diameter_mm=25.4)
    assert not any(w.startswith(("tempering_hv", "hollomon_jaffe")) for w in ok["warnings"])


def test_catalogue_arrays_in_one_pass():
    # vectorised: many states with repeated structures evaluate in one call and match one by one
    comp = {"C": np.array([0.4, 0.4, 0.3])[:, None], "Mn": np.array([0.85, 0.85, 0.5])[:, None],
            "Cr": np.array([1.0, 1.0, 0.9])[:, None], "Mo": np.array([0.2, 0.2, 0.2])[:, None]}
    mart = np.array([[95.0, 60.0], [95.0, 60.0], [80.0, 10.0]])
    rate = np.array([[16.0, 3.0], [16.0, 3.0], [20.0, 2.0]])
    parts = st.constituents(comp, mart, rate)
    for i in range(3):
        one = st.constituents({k: v[i:i + 1] for k, v in comp.items()}, mart[i:i + 1], rate[i:i + 1])
        for k in parts:
            assert np.allclose(parts[k][i], one[k][0])


# --------------------------------------------------------------------------- hypereutectoid steels
def test_undissolved_carbide_by_the_lever_rule():
    # lever rule between austenite and Fe3C (6.67 % C): (1.04 - 0.60) / (6.67 - 0.60) = 0.07249 (hand calculation)
    assert st.undissolved_carbide_fraction(1.04, 0.60) == pytest.approx(0.07249, abs=1e-5)
    # a steel whose carbon is all in solution keeps no carbide (hand calculation: 0)
    assert st.undissolved_carbide_fraction(np.array([0.40, 0.94]), np.array([0.40, 0.94])).tolist() == [0.0, 0.0]
    # linear mixture (Maynier et al. 1978) with cementite at 1050 HV (Umemoto et al. 2001, from memory):
    # 0.9 x 500 + 0.1 x 1050 = 555 HV (hand calculation); no carbide, the matrix unchanged
    assert st.with_undissolved_carbide_hv(500.0, 0.10) == pytest.approx(555.0)
    assert st.with_undissolved_carbide_hv(500.0, 0.0) == pytest.approx(500.0)
    with pytest.raises(InputError):
        st.undissolved_carbide_fraction(-0.1, 0.0)


def test_hypereutectoid_steel_tempers_with_the_carbon_it_holds():
    # the route tempers 52100's martensite at the carbon the austenite held at 845 C (0.60 %, the
    # anchor of hardenability.austenite_carbon_pct, from memory) plus the undissolved carbide; a
    # 10 mm round in oil is fully hardened, so the core follows the two models within the 2 % of
    # its few per cent of other products
    steps = [{"op": "harden", "quench": "oil", "austenitize_c": 845}, {"op": "temper", "temp_c": 400, "hours": 2}]
    r = selector.evaluate("52100", steps, diameter_mm=10)
    comp = {k: float(v) for k, v in selector.grade("52100").composition().items()}
    matrix = tp.tempered_martensite_hv(dict(comp, C=0.60), 400.0, 2.0)
    expected = st.with_undissolved_carbide_hv(matrix, st.undissolved_carbide_fraction(comp["C"], 0.60))
    assert r["hardness_hv"] == pytest.approx(float(expected), rel=0.02)
    # the nominal carbon (1.04 %) would temper far harder: the surface at 1.04 % C exceeds it by > 60 HV
    assert float(tp.tempered_martensite_hv(comp, 400.0, 2.0)) > r["hardness_hv"] + 60


def test_bearing_steel_after_a_low_temper_is_in_the_usual_range():
    # common practice: 52100 bearing parts hardened from 830-860 C in oil and tempered at 150-180 C
    # are used at 58-65 HRC
    steps = [{"op": "harden", "quench": "oil", "austenitize_c": 845}, {"op": "temper", "temp_c": 160, "hours": 2}]
    r = selector.evaluate("52100", steps, diameter_mm=10)
    assert 58.0 <= r["hardness_hrc"] <= 65.0


def test_martensitic_stainless_tempering_is_flagged_as_outside_the_surface():
    # 410 (12 % Cr, ASTM A276 Table 1) lies far outside the low-alloy tempering surface (Cr <= 1.05 %
    # fitted): every tempered state must say so (docs/methods/tempering.md section 5c, the documented
    # fallback).  The gap it warns of: ASM's 410 record (reproduced on matweb.com: 16 mm bar, 980 C,
    # oil, 540 C for 2 h) prints 35.5 HRC; the surface gives 28.4 HRC there (measured 2026-12-03).
    r = selector.evaluate("410", [{"op": "harden", "quench": "oil", "austenitize_c": 980},
                                  {"op": "temper", "temp_c": 540, "hours": 2}], diameter_mm=16)
    assert any(w.startswith("tempering_hv: Cr =") for w in r["warnings"])
    assert any(w.startswith("tempering_hv: C =") for w in r["warnings"])
