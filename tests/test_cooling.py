"""Tests of the Fourier-Bessel quench-cooling series and the Jominy equivalence."""
import numpy as np
import pytest
from scipy.linalg import solve_banded
import regression_guards as guards

from selector.errors import InputError
from selector.models import cooling


def test_eigenvalues_and_one_term_coefficients_against_textbook_table():
    # One-term coefficients for transient conduction (Incropera & DeWitt, Fundamentals of Heat and
    # Mass Transfer, Table 5.1; from memory, 4 significant figures):
    # cylinder Bi=1: zeta1 = 1.2558, C1 = 1.2071; Bi=inf: 2.4050, 1.6018; plate Bi=1: 0.8603, 1.1191.
    lam = cooling.eigenvalues("cylinder", np.array([1.0, np.inf]), 4)
    c = cooling._coefficients("cylinder", lam)
    assert lam[0, 0] == pytest.approx(1.2558, abs=2e-4)
    assert c[0, 0] == pytest.approx(1.2071, abs=2e-4)
    assert lam[1, 0] == pytest.approx(2.4050, abs=3e-4)
    assert c[1, 0] == pytest.approx(1.6018, abs=3e-4)
    lp = cooling.eigenvalues("plate", 1.0, 4)
    assert lp[0] == pytest.approx(0.8603, abs=2e-4)
    assert cooling._coefficients("plate", lp)[0] == pytest.approx(1.1191, abs=2e-4)
    # the roots satisfy their equations
    lam = cooling.eigenvalues("cylinder", 3.7, 50)
    from scipy import special
    assert np.max(np.abs(lam * special.j1(lam) - 3.7 * special.j0(lam))) < 1e-9


def test_centre_temperature_matches_one_term_solution_at_large_fo():
    # At Fo = 0.3 the higher terms are below 1e-4, so the series equals the one-term (Heisler)
    # solution theta0 = C1 exp(-zeta1^2 Fo) (Incropera Table 5.1, Bi = inf: 1.6018, 2.4050).
    th = cooling.theta("cylinder", np.inf, 0.0, 0.3)
    assert th == pytest.approx(1.6018 * np.exp(-2.4050 ** 2 * 0.3), rel=2e-3)
    # initial condition is reproduced in the interior at tiny Fo
    assert cooling.theta("cylinder", 5.0, 0.5, 1e-5) == pytest.approx(1.0, abs=2e-3)


def _fd_cylinder(bi, fo_end, n=200, steps=1500):
    """Crank-Nicolson finite-volume solution of the cylinder problem (reference)."""
    r = (np.arange(n) + 0.5) / n
    dr = 1.0 / n
    rf = np.arange(n + 1) / n               # faces
    theta = np.ones(n)
    dt = fo_end / steps
    # conductances between cells, Robin condition at r = 1 via a half-cell resistance
    g = rf[1:-1] / dr
    gs = 1.0 / (0.5 * dr / rf[-1] + 1.0 / (bi * rf[-1]))
    vol = r * dr
    a = np.zeros((3, n))
    diag = np.zeros(n)
    diag[:-1] += g
    diag[1:] += g
    diag[-1] += gs
    a[0, 1:] = -0.5 * dt * g / vol[:-1]
    a[2, :-1] = -0.5 * dt * g / vol[1:]
    a[1] = 1 + 0.5 * dt * diag / vol
    for _ in range(steps):
        flux = np.zeros(n)
        flux[:-1] += g * (theta[1:] - theta[:-1])
        flux[1:] -= g * (theta[1:] - theta[:-1])
        flux[-1] -= gs * theta[-1]
        theta = solve_banded((1, 1), a, theta + 0.5 * dt * flux / vol)
    return r, theta


def test_series_matches_finite_difference_cylinder():
    # Independent reference: a Crank-Nicolson finite-volume solution of the same problem.
    bi, fo = 2.5, 0.08
    r, th_fd = _fd_cylinder(bi, fo)
    th_series = cooling.theta("cylinder", bi, r, fo)
    assert np.max(np.abs(th_series - th_fd)) < 0.01      # within 1 % of the initial difference
    # and the time derivative (the cooling rate) agrees within 2 % at the centre
    _, th_fd2 = _fd_cylinder(bi, fo * 1.02)
    rate_fd = (th_fd[0] - th_fd2[0]) / (0.02 * fo)
    rate_series = -(cooling.theta("cylinder", bi, r[0], fo * 1.001) - cooling.theta("cylinder", bi, r[0], fo * 0.999)) / (0.002 * fo)
    assert rate_fd == pytest.approx(rate_series, rel=0.02)


def test_surface_cools_faster_than_centre_and_rates_fall_with_size():
    pos = (1.0, 0.75, 0.5, 0.25, 0.0)
    h = np.array([800.0, 2700.0, 8000.0])
    for kw in ({"diameter_mm": 50.0}, {"thickness_mm": 50.0}):
        rate = cooling.cooling_rate_at_c_s(h, positions=pos, austenitize_c=850.0, **kw)
        assert rate.shape == (3, 5)
        assert np.all(np.diff(rate, axis=1) <= 1e-9)           # surface -> centre: slower
        assert np.all(np.diff(rate, axis=0) > 0)               # more severe quench: faster
    d = np.array([10.0, 25.0, 50.0, 100.0, 200.0])
    rc = cooling.cooling_rate_at_c_s(2700.0, diameter_mm=d, austenitize_c=850.0)[:, -1]
    assert np.all(np.diff(rc) < 0)
    # a plate of thickness t cools its mid-plane slower than a bar of diameter t
    bar = cooling.cooling_rate_at_c_s(2700.0, diameter_mm=50.0)[..., -1]
    plate = cooling.cooling_rate_at_c_s(2700.0, thickness_mm=50.0)[..., -1]
    assert plate < bar


def test_table_agrees_with_exact_series():
    rng = np.random.default_rng(1)
    h = 10 ** rng.uniform(1.5, 4.3, 40)
    d = rng.uniform(5, 250, 40)
    t0 = rng.uniform(780, 950, 40)
    a = cooling.cooling_rate_at_c_s(h, diameter_mm=d, austenitize_c=t0)
    b = cooling.cooling_rate_at_c_s(h, diameter_mm=d, austenitize_c=t0, exact=True)
    assert np.max(np.abs(a / b - 1)) < guards.COOLING_TABLE_VS_SERIES_REL_MAX   # regression guard


def test_lumped_limit_for_air_cooling():
    # Bi << 1: the bar cools as a lump, dT/dt = 2h (T - Tb) / (rho c R) (exact limit of the series)
    h, d = 70.0, 20.0
    rate = cooling.cooling_rate_at_c_s(h, diameter_mm=d, austenitize_c=850.0, exact=True)
    lumped = 2 * h * (700 - cooling.BATH_C) / (cooling.RHO_C_J_M3K * d / 2e3)
    assert rate[..., -1] == pytest.approx(lumped, rel=0.01)


def test_jominy_equivalence_interpolates_the_table_and_inverts():
    # Jominy cooling rates at 705 C (Callister Fig. 14.9 axis): 70 C/s at J4 (6.35 mm), 9 C/s at J12.
    assert cooling.jominy_equivalent_mm(70.0) == pytest.approx(6.35, rel=1e-6)
    assert cooling.jominy_equivalent_mm(9.0) == pytest.approx(19.05, rel=1e-6)
    r = np.array([500.0, 100.0, 20.0, 5.0, 1.0, 0.1])
    d = cooling.jominy_equivalent_mm(r)
    assert np.all(np.diff(d) > 0)
    assert d[0] == pytest.approx(1.5875) and d[-1] == cooling.JOMINY_MAX_MM
    with pytest.raises(InputError):
        cooling.jominy_equivalent_mm(-1.0)


def test_bad_input():
    with pytest.raises(InputError):
        cooling.cooling_rate_at_c_s(1000.0)
    with pytest.raises(InputError):
        cooling.cooling_rate_at_c_s(1000.0, diameter_mm=10.0, thickness_mm=10.0)
    with pytest.raises(InputError):
        cooling.cooling_rate_at_c_s(1000.0, diameter_mm=-5.0)
    with pytest.raises(InputError):
        cooling.cooling_rate_at_c_s(1000.0, diameter_mm=5.0, austenitize_c=650.0)


# --------------------------------------------------------------------------- chart-anchored equivalence
def _fit_script():
    import importlib.util
    from pathlib import Path
    path = Path(__file__).resolve().parents[1] / "scripts" / "fit_jominy_equivalence.py"
    spec = importlib.util.spec_from_file_location("fit_jominy_equivalence", path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def test_shipped_rate_factor_equals_what_the_fit_script_produces():
    # fit convention: the coefficient file can never drift from its script (1e-9 relative)
    coef, rows, cv, _ = _fit_script().fit()
    assert float(coef[0]["value"]) == pytest.approx(cooling.jominy_rate_factor(), rel=1e-9)
    assert len(rows) == 4 and len(cv) == 4


def test_calibration_bar_centres_against_published_charts():
    # data/reference/jominy_equivalence_charts.csv: textbook chart of equivalent Jominy positions and
    # bar diameter (bar centres), as described in the text at herrytool.com/bearing/43928.html
    # (role fit: these rows calibrate the rate factor, so this is a calibration check), and the
    # independent rows (role check): Callister's water chart (75 mm and 50 mm centres) and the
    # surface readings of the Lamont-type fractional-radius charts (from memory).  Tolerance: each
    # row's reading precision.
    mod = _fit_script()
    t = mod.load_charts()
    pred = mod.predict_mm(cooling.jominy_rate_factor(), mod.conduction_rates_c_s(t))
    # Callister's 50 mm centre (9.5 mm) sits 2.5 mm below the herrytool chart's still-water 50 mm
    # centre (12 mm, a fit row): the two charts disagree by more than their resolution, and the
    # model lies between them (11.3 mm measured): a known miss, bounded here
    known_miss_mm = {"callister-water-50": 2.5}
    for (_, row), p in zip(t.iterrows(), pred):
        tol = known_miss_mm.get(row["chart"], row["tolerance_mm"])
        assert p == pytest.approx(row["jominy_mm"], abs=tol), row["chart"]
    # without the factor the constant-property series puts every centre 20-28 % too far
    raw = mod.predict_mm(1.0, mod.conduction_rates_c_s(t))
    centre = (t["position_r_r"] == 0).to_numpy()
    assert np.all(raw[centre] / t["jominy_mm"].to_numpy()[centre] > 1.15)


def test_ideal_centre_table_matches_the_exact_series():
    d = np.array([12.0, 40.0, 75.0, 200.0])
    exact = cooling.jominy_equivalent_mm(cooling.jominy_rate_factor() * np.asarray(
        cooling.cooling_rate_at_c_s(np.inf, diameter_mm=d, positions=(0.0,), exact=True)).reshape(-1))
    assert np.allclose(cooling.ideal_centre_jominy_mm(d), exact, rtol=0.01)


def test_calibration_ideal_quench_75mm_centre():
    # a 75 mm round quenched ideally: 12.5 mm along the Jominy bar (chart row centre-ideal-75 of
    # data/reference/jominy_equivalence_charts.csv, a row of data/fits/jominy_equivalence_rows.csv)
    assert cooling.ideal_centre_jominy_mm(75.0) == pytest.approx(12.5, abs=1.0)


def test_small_bar_in_still_oil_against_a_probe_measurement():
    # ASTM D6200 / ISO 9950 cooling-curve probe (12.5 mm diameter), medium-speed oil at 60 C without
    # agitation: 48.2 C/s at 705 C (thermalprocessing.com, "Predicting hardness by the Grossman
    # H-value", Fig. 1). The probe is Inconel 600 (rho c close to steel's, k a little lower) and oils
    # differ: a steel bar of the same size in still oil (Grossmann H 0.275) within 35 %.
    from selector.models import quench_severity as qs
    h = qs.heat_transfer_coefficient_w_m2k(qs.grossmann_h_per_in("oil", "none"))
    r = cooling.cooling_rate_at_c_s(h, diameter_mm=12.5, positions=(0.0,), austenitize_c=845.0, bath_c=60.0)
    assert float(np.ravel(r)[0]) * cooling.jominy_rate_factor() == pytest.approx(48.2, rel=0.35)


# ----------------------------------------------------------------------------- boiling stage
def test_boiling_biot_full_ratio_at_the_surface_none_deep_inside():
    # definition (cooling.boiling_biot): Bi * M ** exp(-s / delta); an ideal quench stays ideal
    b = cooling.boiling_biot(0.5, np.array([0.0, 4.0, 200.0]), 3.0, 4.0)
    assert b[0] == pytest.approx(1.5)
    assert b[1] == pytest.approx(0.5 * 3.0 ** np.exp(-1.0))
    assert b[2] == pytest.approx(0.5, rel=1e-9)
    assert np.isinf(cooling.boiling_biot(np.inf, 1.0, 3.0, 4.0))
    with pytest.raises(InputError, match="peak_ratio"):
        cooling.boiling_biot(0.5, 1.0, 0.5, 4.0)
    with pytest.raises(InputError, match="depth_mm"):
        cooling.boiling_biot(0.5, -1.0, 3.0, 4.0)


def test_each_radius_of_an_oil_quenched_25_mm_bar_has_its_own_jominy_distance():
    # surface, 3/4 radius, mid-radius, centre: distinct and ordered.  Surface against the
    # Lamont-type fractional-radius chart (r/R = 1): 25 mm bar, oil H about 0.35, J about 2-5 mm
    # (data/reference/jominy_equivalence_charts.csv surface-oil-25, from memory); centre against
    # the bar-centre chart region of 25 mm oil bars (the fit rows put a 51 mm still-oil centre at
    # 19 mm; a 25 mm one lies near 10 mm on the same chart family: 8-12 mm accepted, from memory)
    from selector.models import quench_severity as qs
    h = qs.heat_transfer_coefficient_w_m2k(0.35)
    m, delta = qs.boiling_peak("oil", "mild")
    rate = cooling.cooling_rate_at_c_s(h, diameter_mm=25.0, positions=(1.0, 0.75, 0.5, 0.0), austenitize_c=845.0,
                                       peak_ratio=m, peak_depth_mm=delta)
    j = np.asarray(cooling.jominy_equivalent_mm(rate * cooling.jominy_rate_factor()), float).ravel()
    assert np.all(np.diff(j) > 0.3)
    assert 2.0 <= j[0] <= 5.0
    assert 8.0 <= j[-1] <= 12.0
    # the constant-h series alone (no boiling stage) cooled that surface like J 10 mm (issue 11)
    plain = cooling.cooling_rate_at_c_s(h, diameter_mm=25.0, positions=(1.0,), austenitize_c=845.0)
    assert float(np.asarray(cooling.jominy_equivalent_mm(plain * cooling.jominy_rate_factor())).ravel()[0]) > 8.0


def test_thin_strip_cools_much_faster_than_jominy_3_5_mm():
    # a 1.5 mm strip quenched in oil: at least twice the cooling rate of Jominy 3.5 mm
    # (ASTM A255 Jominy cooling-rate axis, data/jominy_cooling_rates.csv)
    from selector.models import quench_severity as qs
    for agitation in qs.AGITATIONS:
        h = qs.heat_transfer_coefficient_w_m2k(qs.grossmann_h_per_in("oil", agitation))
        m, delta = qs.boiling_peak("oil", agitation)
        rate = cooling.cooling_rate_at_c_s(h, thickness_mm=1.5, positions=(1.0, 0.0), peak_ratio=m,
                                           peak_depth_mm=delta) * cooling.jominy_rate_factor()
        assert np.all(rate > 2.0 * cooling.jominy_rate_c_s(3.5))


def test_table_and_exact_series_agree_with_a_boiling_stage():
    # the interpolated table is read per position at its own Biot number: within 2 % of the series
    h = np.array([300.0, 800.0, 2700.0])
    kw = dict(diameter_mm=np.array([12.0, 40.0, 150.0])[:, None], positions=(1.0, 0.95, 0.75, 0.5, 0.0),
              peak_ratio=3.0, peak_depth_mm=4.0)
    fast = cooling.cooling_rate_at_c_s(h, **kw)
    exact = cooling.cooling_rate_at_c_s(h, exact=True, **kw)
    np.testing.assert_allclose(fast, exact, rtol=0.02)
