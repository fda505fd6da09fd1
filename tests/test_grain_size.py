"""Tests of selector.models.grain_size (ASTM E112, austenite grain growth, Hall–Petch)."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import grain_size as gs
from selector.models import validity


@pytest.mark.parametrize("g,d_um,l_um", [(4, 89.8, 80.0), (5, 63.5, 56.6), (6, 44.9, 40.0), (7, 31.8, 28.3),
                                         (8, 22.5, 20.0), (9, 15.9, 14.1), (10, 11.2, 10.0), (11, 7.9, 7.1),
                                         (12, 5.6, 5.0)])
def test_e112_table(g, d_um, l_um):
    # ASTM E112 mean diameter and mean lineal intercept (ASTM E112 planimetric definition N_AE = 2^(G-1), tabulated by hand;
    # G = 12 -> 5.6 um checked against a worked example, V); table rounded to 0.1 um
    assert float(gs.astm_e112_mean_diameter_um(g)) == pytest.approx(d_um, abs=0.06)
    assert float(gs.astm_e112_mean_intercept_um(g)) == pytest.approx(l_um, abs=0.06)


def test_e112_inverses():
    g = np.linspace(-2, 13, 16)
    np.testing.assert_allclose(gs.grain_size_number_from_diameter_um(gs.astm_e112_mean_diameter_um(g)), g, atol=1e-9)
    np.testing.assert_allclose(gs.grain_size_number_from_intercept_um(gs.astm_e112_mean_intercept_um(g)), g,
                               atol=1e-9)
    # a larger G is a finer grain
    assert np.all(np.diff(gs.astm_e112_mean_diameter_um(g)) < 0)


def test_grain_growth_law_value():
    # d^10 - d0^10 = 3.87e32 t exp(-400 kJ/RT) (Sellars & Whiteman 1979): hand value
    tk = 1000 + 273.15
    expect = (20.0 ** 10 + 3.87e32 * 3600 * np.exp(-400e3 / (8.314 * tk))) ** 0.1
    assert float(gs.austenite_grain_size_um(1000.0, 1.0)) == pytest.approx(expect, rel=1e-12)
    assert float(gs.austenite_grain_size_um(1000.0, 0.0, initial_um=30.0)) == pytest.approx(30.0)


def test_higher_temperature_and_longer_time_give_larger_grains():
    # common practice: a hotter or longer austenitize coarsens the grain
    d_t = gs.austenite_grain_size_um(np.array([850.0, 900.0, 950.0, 1050.0, 1150.0]), 1.0)
    d_h = gs.austenite_grain_size_um(900.0, np.array([0.5, 1.0, 2.0, 8.0]))
    assert np.all(np.diff(d_t) > 0) and np.all(np.diff(d_h) > 0)
    # and a usual normalize (870-925 °C, 1 h) lands in ASTM 4-6 for a C-Mn steel
    g = gs.grain_size_number_from_intercept_um(gs.austenite_grain_size_um(np.array([870.0, 925.0]), 1.0))
    assert np.all((g > 3.5) & (g < 6.5))


def test_hall_petch():
    # sigma0 + k d^-1/2: mild steel k 0.74 MPa m^1/2 (Meyers & Chawla, Mechanical Behavior of Materials, Hall-Petch table; from memory), d = 25 um
    assert float(gs.hall_petch_yield_mpa(70.0, 0.74, 25.0)) == pytest.approx(70 + 0.74 / 0.005, rel=1e-12)
    d = np.array([5.0, 10.0, 50.0, 100.0])
    assert np.all(np.diff(gs.hall_petch_yield_mpa(70.0, 0.74, d)) < 0)


def test_bad_input():
    with pytest.raises(InputError) as exc:
        gs.austenite_grain_size_um(900.0, -1.0)
    assert exc.value.field == "hours"
    with pytest.raises(InputError):
        gs.grain_size_number_from_intercept_um(0.0)


def test_validity_registered():
    assert validity.check("austenite_grain_growth", temp_c=900.0, hours=1.0) == []
    assert validity.check("austenite_grain_growth", temp_c=700.0)
