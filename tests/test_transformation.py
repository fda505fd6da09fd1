"""Tests of the Li et al. (1998) kinetics with Scheil additivity and Koistinen-Marburger."""
import numpy as np
import pandas as pd
import pytest

from selector.catalogue.loader import read_table
from selector.errors import InputError
from selector.models import conversions, cooling, phase_hardness as ph, transformation as tr

S1045 = {"C": 0.45, "Mn": 0.75, "Si": 0.25}


def test_s_integral_values():
    # Li, Niebuhr, Meekisho & Atteridge, Metall. Mater. Trans. B 29B (1998) 661, S(X) integral evaluated numerically: S(0.01) = 0.104, S(0.99) = 1.95
    assert tr.s_integral(0.01) == pytest.approx(0.104, abs=0.003)
    assert tr.s_integral(0.99) == pytest.approx(1.95, abs=0.03)


def test_isothermal_start_times_1045():
    # hand evaluation of the Li et al. (1998) equations for 1045, G = 8 (with a
    # thermodynamic Ae3; here Andrews Ac3 stands in): 1 % pearlite at 650 C ~ 0.4 s, 1 % bainite at
    # 450 C ~ 1.6 s, 1 % ferrite at 650 C ~ 2.7 s. Tolerance: factor 1.3 (pearlite, bainite), 2 (ferrite).
    assert tr.isothermal_time_s(S1045, 650, 0.01, "pearlite") == pytest.approx(0.4, rel=0.3)
    assert tr.isothermal_time_s(S1045, 450, 0.01, "bainite") == pytest.approx(1.6, rel=0.3)
    assert 2.7 / 2 < tr.isothermal_time_s(S1045, 650, 0.01, "ferrite") < 2.7 * 2


def test_fast_and_slow_cooling_limits():
    rates = np.array([1000.0, 100.0, 10.0, 1.0, 0.1])
    f = tr.continuous_cooling_fractions(S1045, rates)
    total = sum(f.values())
    assert np.allclose(total, 1.0, atol=1e-9)
    assert np.all(np.diff(f["martensite"]) <= 1e-9)
    # Koistinen-Marburger: of the austenite left at Ms, 1 - exp(-0.011 (Ms - 25)) becomes martensite
    # (Koistinen & Marburger 1959); at 1000 C/s almost all austenite reaches Ms
    km = 1 - np.exp(-0.011 * (tr.ms_li_c(S1045) - 25))
    assert f["martensite"][0] / (f["martensite"][0] + f["retained_austenite"][0]) == pytest.approx(km, abs=1e-6)
    assert f["martensite"][0] + f["retained_austenite"][0] > 0.95
    # slow cooling of 1045: ferrite + pearlite, ferrite near the lever-rule fraction (0.77-0.45)/0.77
    assert f["ferrite"][-1] + f["pearlite"][-1] > 0.98
    assert f["ferrite"][-1] == pytest.approx((0.77 - 0.45) / 0.77, abs=0.05)


def test_comparison_with_h_bands_is_measured():
    # Comparison path only (evaluate uses ASTM A255): mid-range 4140H and 4340H chemistries, Jominy
    # cooling rates, Maynier hardness; SAE J1268 bands (values from memory). Recorded result: 46 of 48
    # points inside +-1 HRC; the check keeps it above 85 %. The same path does worse on 8620H (19/20)
    # and badly on 5160H (5/24, far too hardenable): see docs/methods/hardenability.md.
    from test_hardenability import H_STEELS, _mid
    t = read_table("reference/hardenability_bands.csv")
    ld, lr = cooling._jominy_table()
    ok = n = 0
    for g in ("4140H", "4340H"):
        r = t[t.grade == g]
        d = r.distance_mm.astype(float).to_numpy()
        lo, hi = pd.to_numeric(r.hrc_min).to_numpy(), pd.to_numeric(r.hrc_max).to_numpy()
        rate = np.exp(np.interp(np.log(d), ld, lr))
        comp = _mid(g)
        f = tr.continuous_cooling_fractions(comp, rate)
        hm, hb, hfp = ph.phase_hardness_hv(comp, rate)
        hv = ph.mixture_hv([f["martensite"] + f["retained_austenite"], f["bainite"], f["ferrite"] + f["pearlite"]],
                           [hm, hb, hfp])
        hrc = conversions.hv_to_hrc(hv)
        ok += int(((hrc <= hi + 1) & (hrc >= lo - 1)).sum())
        n += len(d)
    assert ok / n >= 0.85


def test_bainite_share_alloy_against_plain_carbon():
    # common practice: in oil-quenched alloy steels (4140, 4340) the non-martensitic product
    # at bar-centre rates is bainite; in plain-carbon steels (1045) it is ferrite-pearlite
    import selector
    share = {g: tr.bainite_share(selector.grade(g).composition(), np.array([16.0, 3.0]))
             for g in ("4140", "4340", "1045")}
    assert np.all(share["4140"] > 0.8) and np.all(share["4340"] > 0.8)
    assert np.all(share["1045"] < 0.1)


def test_bainite_share_step_is_fine_enough():
    # SHARE_STEP_C (10 C) against a 2 C integration, over the quench-and-temper steels
    import selector
    rates = np.geomspace(0.3, 200.0, 15)
    for g in ("4140", "4340", "5140", "4130", "8640", "1045", "1144", "8620", "4320"):
        comp = selector.grade(g).composition()
        a = tr.bainite_share(comp, rates, step_c=2.0)
        b = tr.bainite_share(comp, rates)
        assert np.max(np.abs(a - b)) < 0.03, g


def test_unique_rows_round_trip():
    t = np.array([[1.0, 2.0], [3.0, 4.0], [1.0, 2.0]])
    u, inv = tr.unique_rows(t)
    assert len(u) == 2 and np.array_equal(u[inv], t)


def test_bainite_share_never_falls_as_the_rate_rises():
    # faster cooling suppresses ferrite and pearlite before bainite (common practice): the share
    # is non-decreasing in the rate, so a faster quench never gives a softer product
    import selector
    rates = np.geomspace(0.01, 5000.0, 300)
    for g in ("4140", "5140", "4130", "1045", "1144", "41CrAlMo7-10"):
        s = tr.bainite_share(selector.grade(g).composition(), rates)
        assert np.all(np.diff(s) >= -1e-12), g
        assert np.all((s >= 0) & (s <= 1))


def test_path_progress_constant_temperature_matches_isothermal_time():
    c = {"C": np.array([0.45]), "Mn": np.array([0.75]), "Si": np.array([0.25])}
    tau = float(tr.isothermal_time_s(S1045, 600.0, 0.01, "pearlite"))
    times = np.linspace(0.0, tau, 50)
    x, start = tr.path_progress(c, times, np.full((1, 50), 600.0), "pearlite")
    # Scheil (1935) additivity: a hold for the isothermal start time sums to 1 (hand calculation)
    assert start[0] == pytest.approx(1.0, rel=1e-3)
    assert x[0] == pytest.approx(0.01, rel=0.05)
    # above Ae1 (Andrews Ac1) nothing happens
    x_hot, s_hot = tr.path_progress(c, times, np.full((1, 50), 760.0), "pearlite")
    assert x_hot[0] == 0.0 and s_hot[0] == 0.0


def test_bainite_carbon_cap_only_acts_above_the_cap():
    lo = {"C": 0.4, "Mn": 0.8}
    hi = {"C": 0.95, "Mn": 0.8}
    assert tr.isothermal_time_s(lo, 350.0, 0.5, "bainite", bainite_carbon_cap_pct=tr.LI_MAX_C) == \
        pytest.approx(float(tr.isothermal_time_s(lo, 350.0, 0.5, "bainite")))
    assert tr.isothermal_time_s(hi, 350.0, 0.5, "bainite", bainite_carbon_cap_pct=tr.LI_MAX_C) < \
        tr.isothermal_time_s(hi, 350.0, 0.5, "bainite")


def test_path_progress_bad_input():
    with pytest.raises(InputError):
        tr.path_progress(S1045, [0.0, 1.0], np.array([600.0, 590.0]), "pearlite")
    with pytest.raises(InputError):
        tr.path_progress(S1045, [0.0, 1.0], np.array([[600.0, 590.0]]), "martensite")


def test_share_cache_overflow_keeps_the_rows_of_the_current_call(monkeypatch):
    # regression: when a call overflowed the cache it was cleared after the call had found
    # some of its rows already cached, and those rows then raised KeyError
    monkeypatch.setattr(tr, "_SHARE_CACHE", {})
    monkeypatch.setattr(tr, "_SHARE_CACHE_MAX", 3)
    base = {"C": 0.40, "Mn": 0.80, "Si": 0.25, "Ni": 0.0, "Cr": 1.0, "Mo": 0.2}
    first = {k: np.full(2, v) for k, v in base.items()}
    first["C"] = np.array([0.38, 0.40])
    a = tr.bainite_share(first, np.full(2, 10.0))
    second = {k: np.full(3, v) for k, v in base.items()}
    second["C"] = np.array([0.40, 0.42, 0.44])      # one cached row, two new: 2 + 2 > 3
    b = tr.bainite_share(second, np.full(3, 10.0))
    assert b[0] == a[1]                             # the same composition, the same share
    assert len(tr._SHARE_CACHE) <= 3
