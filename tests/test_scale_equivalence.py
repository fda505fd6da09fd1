"""The shortcuts of the bath routes' section limit (issue 13, scale) give the numbers of the
direct computation, bit for bit: the Scheil sums evaluated only on the intervals that can
count, the sizes searched in increasing order on the rows still under 1, and the centre's
path kept per size.  The direct computation is written out here as it reads in the model
(every interval, every size, one path per state) and patched in for the reference run.
Speed is measured by scripts/bench_scale.py, never asserted here."""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from selector.catalogue.grades import default_catalogue
from selector.models import bath_quench, transformation as tr
from selector.models.critical_temperatures import ac1_c, ac3_c
from selector.routes import families as fam_registry
from selector.routes.families import austemper as A
from selector.states import expand as X

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "scripts"))
import bench_scale  # noqa: E402


# --------------------------------------------------------------- the direct computation
def direct_path_progress(comp, times_s, temps_c, reaction, grain_size_astm=8.0, active=None,
                         bainite_carbon_cap_pct=None):
    """Scheil sum over every interval of the path: τ₁ from isothermal_time_s on the whole table."""
    temps = np.asarray(temps_c, float)
    t = np.broadcast_to(np.asarray(times_s, float), temps.shape)
    dt = np.diff(t, axis=1)
    mid = 0.5 * (temps[:, 1:] + temps[:, :-1])
    col = {k: np.asarray(v, float)[..., None] if np.ndim(v) else v for k, v in comp.items()}
    with np.errstate(over="ignore", divide="ignore", invalid="ignore"):
        tau1 = tr.isothermal_time_s(col, mid, 0.5, reaction, grain_size_astm, bainite_carbon_cap_pct) / tr.s_integral(0.5)
    top = {"ferrite": ac3_c, "pearlite": ac1_c, "bainite": tr.bs_li_c}[reaction](col)
    on = (mid < top) & np.isfinite(tau1) & (tau1 > 0)
    if active is not None:
        on &= np.asarray(active, bool)
    s = np.sum(np.where(on, dt / np.where(on, tau1, 1.0), 0.0), axis=1)
    return tr._x_of_s(s), s / tr.s_integral(0.01)


def direct_centre_paths(aust, bath, diameter_mm, thickness_mm, n):
    """One conduction-series path per state."""
    return bath_quench.path_temperature_c(A._h_w_m2k(), A.TIMES_S, diameter_mm, thickness_mm, 0.0, aust, bath)


def direct_section_limit_mm(comp, austenitize_c, bath_c, plate=False):
    """Scheil start sum at every size of LIMIT_SIZES_MM for every row, crossing through 1 in log-log."""
    scalar = np.ndim(bath_c) == 0 and np.ndim(austenitize_c) == 0
    aust = np.atleast_1d(np.asarray(austenitize_c, float))
    bath = np.atleast_1d(np.asarray(bath_c, float))
    n = max(len(aust), len(bath), *[np.size(v) for v in comp.values()])
    sizes = A.LIMIT_SIZES_MM
    k = len(sizes)
    rep = {e: np.repeat(np.broadcast_to(np.asarray(v, float), (n,)), k) for e, v in comp.items()}
    dd = np.tile(sizes, n)
    args = (None, dd) if plate else (dd, None)
    s = A.scheil_to_bath(rep, np.repeat(np.broadcast_to(aust, (n,)), k), np.repeat(np.broadcast_to(bath, (n,)), k),
                         *args).reshape(n, k)
    ls = np.log(np.maximum(s, 1e-12))
    over = s >= 1.0
    j = np.argmax(over, axis=1)
    jm = np.maximum(j - 1, 0)
    rows = np.arange(n)
    l0, l1 = ls[rows, jm], ls[rows, j]
    f = np.where(l1 != l0, (0.0 - l0) / np.where(l1 != l0, l1 - l0, 1.0), 0.0)
    lsz = np.log(sizes)
    out = np.exp(lsz[jm] + np.clip(f, 0.0, 1.0) * (lsz[j] - lsz[jm]))
    out = np.where(~over.any(axis=1), sizes[-1], np.where(over[:, 0], 0.0, out))
    return float(out[0]) if scalar else out


def direct_continuous_cooling_fractions(comp, cooling_rate_c_s, austenitize_c=845.0, bath_c=25.0,
                                        grain_size_astm=8.0, step_c=2.0):
    """Every temperature step, every reaction (the kinetics as the model states them)."""
    rate = np.asarray(cooling_rate_c_s, float)
    if np.any(np.isnan(rate)) or np.any(rate <= 0):
        raise ValueError("cooling_rate_c_s", cooling_rate_c_s, "rates > 0 C/s")
    shape = np.broadcast_shapes(rate.shape, *[np.shape(v) for v in comp.values()])
    rate = np.broadcast_to(rate, shape)
    tau_c = (700.0 - bath_c) / rate
    kF, kP, kB = (np.broadcast_to(k, shape) for k in tr._rate_constants(comp, grain_size_astm))
    ae3 = np.broadcast_to(ac3_c(comp), shape)
    ae1 = np.broadcast_to(ac1_c(comp), shape)
    bs = np.broadcast_to(tr.bs_li_c(comp), shape)
    ms = np.broadcast_to(tr.ms_li_c(comp), shape)
    c = np.broadcast_to(tr.el(comp, "C"), shape)
    xeq = np.clip((tr.EUTECTOID_C - c) / tr.EUTECTOID_C, 0.0, 1.0)
    sF = np.zeros(shape); sP = np.zeros(shape); sB = np.zeros(shape)
    xF = np.zeros(shape); xP = np.zeros(shape); xB = np.zeros(shape)
    fF = np.zeros(shape); fP = np.zeros(shape); fB = np.zeros(shape)
    aust_at_ms = np.full(shape, np.nan)
    temps = np.arange(austenitize_c, tr.ROOM_C, -step_c)
    for t_hi, t_lo in zip(temps[:-1], temps[1:]):
        tm = 0.5 * (t_hi + t_lo)
        dt = tau_c * np.log((t_hi - bath_c) / max(t_lo - bath_c, 1e-6))
        arr = np.exp(-tr.Q_CAL / (tr.R_CAL * (tm + 273.15)))
        above_ms = tm > ms
        avail = 1.0 - fF - fP - fB
        # ferrite, capped at the lever-rule fraction
        on = (tm < ae3) & above_ms
        sF = np.where(on, sF + dt * np.maximum(ae3 - tm, 0) ** 3 * arr / kF, sF)
        xF = tr._x_of_s(sF)
        dF = np.where(on, np.clip(xeq * xF - fF, 0.0, avail), 0.0)
        fF = fF + dF
        avail = avail - dF
        # pearlite and bainite convert the austenite present in proportion to normalised progress
        onP = (tm < ae1) & above_ms
        sP = np.where(onP, sP + dt * np.maximum(ae1 - tm, 0) ** 3 * arr / kP, sP)
        xPn = tr._x_of_s(sP)
        dP = np.where(onP, avail * np.clip((xPn - xP) / np.maximum(1 - xP, 1e-9), 0, 1), 0.0)
        xP = xPn
        fP = fP + dP
        avail = avail - dP
        onB = (tm < bs) & above_ms
        sB = np.where(onB, sB + dt * np.maximum(bs - tm, 0) ** 2 * arr / kB, sB)
        xBn = tr._x_of_s(sB)
        dB = np.where(onB, avail * np.clip((xBn - xB) / np.maximum(1 - xB, 1e-9), 0, 1), 0.0)
        xB = xBn
        fB = fB + dB
        avail = avail - dB
        aust_at_ms = np.where(np.isnan(aust_at_ms) & ~above_ms, avail, aust_at_ms)
    aust_at_ms = np.where(np.isnan(aust_at_ms), 1.0 - fF - fP - fB, aust_at_ms)
    km = 1.0 - np.exp(-tr.KM_ALPHA * np.maximum(ms - tr.ROOM_C, 0.0))
    fM = aust_at_ms * km
    return {"ferrite": fF, "pearlite": fP, "bainite": fB, "martensite": fM,
            "retained_austenite": aust_at_ms - fM}


def _direct(monkeypatch):
    monkeypatch.setattr(tr, "path_progress", direct_path_progress)
    monkeypatch.setattr(A, "_centre_paths", direct_centre_paths)
    monkeypatch.setattr(A, "section_limit_mm", direct_section_limit_mm)
    monkeypatch.setattr(A, "_LIMIT_CACHE", {})


def _fresh(monkeypatch):
    monkeypatch.setattr(A, "_LIMIT_CACHE", {})
    monkeypatch.setattr(A, "_THETA_CACHE", {})


def _bath_families(refine=1):
    fams = [fam_registry.get("austemper"), fam_registry.get("martemper")]
    return fams if refine == 1 else [bench_scale.RefinedFamily(f, refine) for f in fams]


def _both(monkeypatch, **kw):
    _fresh(monkeypatch)
    fast = X.expand_states(**kw)
    with monkeypatch.context() as m:
        _direct(m)
        slow = X.expand_states(**kw)
    return fast, slow


# --------------------------------------------------------------- the state tables
@pytest.mark.parametrize("section", [{"diameter_mm": 40.0}, {"diameter_mm": None, "thickness_mm": 18.0}])
def test_bath_route_states_of_the_catalogue_equal_the_direct_computation(monkeypatch, section):
    fast, slow = _both(monkeypatch, families=_bath_families(), **section)
    assert set(fast["route"]) == {"austemper", "martemper"} and len(fast) > 1000
    assert fast["section_limit_mm"].nunique() > 50           # limits of many grades and baths, not one value
    pd.testing.assert_frame_equal(fast, slow, check_exact=True)


def test_bath_route_states_of_the_replicated_refined_catalogue_equal_the_direct_computation(monkeypatch):
    grades = bench_scale.synthetic_grades(3)[::4]            # copies ×3 (every 4th grade), windows ×4
    fast, slow = _both(monkeypatch, diameter_mm=55.0, grades=grades, families=_bath_families(4))
    assert fast["grade"].str.contains("~").any() and len(fast) > 2000
    pd.testing.assert_frame_equal(fast, slow, check_exact=True)


def test_a_second_section_with_the_kept_paths_and_limits_equals_the_direct_computation(monkeypatch):
    _fresh(monkeypatch)
    X.expand_states(25.0, families=_bath_families())        # fills the caches of paths and limits
    again = X.expand_states(70.0, families=_bath_families())
    with monkeypatch.context() as m:
        _direct(m)
        slow = X.expand_states(70.0, families=_bath_families())
    pd.testing.assert_frame_equal(again, slow, check_exact=True)


# --------------------------------------------------------------- the functions themselves
def _comps(n, seed=3):
    rng = np.random.default_rng(seed)
    return {"C": rng.uniform(0.15, 1.0, n), "Mn": rng.uniform(0.3, 1.6, n), "Si": rng.uniform(0.1, 0.6, n),
            "Ni": rng.uniform(0.0, 3.0, n), "Cr": rng.uniform(0.0, 1.5, n), "Mo": rng.uniform(0.0, 0.5, n)}


@pytest.mark.parametrize("reaction,cap", [("ferrite", None), ("pearlite", None), ("bainite", tr.LI_MAX_C)])
def test_path_progress_equals_the_sum_over_every_interval(reaction, cap):
    n = 300
    comp = _comps(n)
    rng = np.random.default_rng(5)
    temps = 900.0 - np.cumsum(rng.uniform(0.0, 15.0, (n, 60)), axis=1)   # paths through every range
    active = rng.random((n, 59)) < 0.7
    for act in (None, active):
        got = tr.path_progress(comp, A.TIMES_S[:60], temps, reaction, active=act, bainite_carbon_cap_pct=cap)
        ref = direct_path_progress(comp, A.TIMES_S[:60], temps, reaction, active=act, bainite_carbon_cap_pct=cap)
        assert (ref[1] > 0).sum() > n // 2 and (ref[1] == 0).sum() < n
        for a, b in zip(got, ref):
            assert np.array_equal(a, b)


@pytest.mark.parametrize("plate", [False, True])
def test_section_limit_equals_every_size_for_every_row(monkeypatch, plate):
    n = 400
    comp = _comps(n, 11)
    rng = np.random.default_rng(7)
    aust = rng.choice([830.0, 845.0, 870.0], n)
    bath = rng.choice(np.arange(230.0, 420.0, 10.0), n)
    _fresh(monkeypatch)
    got = A.section_limit_mm(comp, aust, bath, plate=plate)
    one = {e: float(v[0]) for e, v in comp.items()}
    got_one = A.section_limit_mm(one, float(aust[0]), float(bath[0]), plate)
    _direct(monkeypatch)
    ref = direct_section_limit_mm(comp, aust, bath, plate=plate)
    # every branch: smallest size fails, crossing inside, every size passes
    assert (ref == 0).any() and (ref == A.LIMIT_SIZES_MM[-1]).any() and ((ref > 0) & (ref < 200)).sum() > 50
    assert np.array_equal(got, ref)
    assert isinstance(got_one, float) and got_one == direct_section_limit_mm(one, float(aust[0]), float(bath[0]), plate)


@pytest.mark.parametrize("step_c,bath_c", [(tr.SHARE_STEP_C, 25.0), (2.0, 25.0), (5.0, 25.0)])
def test_continuous_cooling_fractions_equal_every_step_of_every_reaction(step_c, bath_c):
    cat = [g.composition() for g in default_catalogue().grades.values() if g.family in A.STEEL]
    comp = {e: np.array([float(c.get(e, 0.0)) for c in cat]) for e in tr.SHARE_ELEMENTS}
    rnd = _comps(200, 17)
    comp = {e: np.concatenate([comp[e], rnd[e]]) for e in tr.SHARE_ELEMENTS}
    n = len(comp["C"])
    rate = np.geomspace(0.05, 2000.0, n)[np.random.default_rng(2).permutation(n)]
    got = tr.continuous_cooling_fractions(comp, rate, bath_c=bath_c, step_c=step_c)
    ref = direct_continuous_cooling_fractions(comp, rate, bath_c=bath_c, step_c=step_c)
    assert set(got) == set(ref)
    for k in ref:
        assert np.array_equal(got[k], ref[k]), k
    # every product forms somewhere: the skipped blocks and the early end are exercised on real rows
    for k in ("ferrite", "pearlite", "bainite", "martensite"):
        assert (ref[k] > 0.05).any() and (ref[k] < 0.01).any(), k
