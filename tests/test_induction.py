"""Tests of selector.models.induction."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import induction as ind
from selector.models import validity


def test_reference_depth_hot_10khz():
    # reference depth delta = 503 sqrt(rho/(mu_r f)), worked example data on holooly.com (verified): hot steel rho = 114.6 µΩ·cm,
    # mu_r = 1: delta(10 kHz) ~ 5.4 mm (table to 2 significant figures -> 1 %)
    assert float(ind.reference_depth_mm(10e3, 114.6, 1.0)) == pytest.approx(5.4, rel=0.01)


def test_reference_depth_table():
    # delta_hot from the same formula and data (hand evaluation): 1, 3, 10, 30, 100, 450 kHz ->
    # 17.0, 9.8, 5.4, 3.1, 1.7, 0.80 mm (2-3 significant figures -> 1.5 %)
    f = np.array([1e3, 3e3, 10e3, 30e3, 100e3, 450e3])
    np.testing.assert_allclose(ind.reference_depth_mm(f), [17.0, 9.8, 5.4, 3.1, 1.7, 0.80], rtol=0.015)


def test_reference_depth_cold_1khz():
    # holooly.com worked example (verified): 0.4 %C steel at 30 °C, rho = 16 µΩ·cm, mu_r 40: delta(1 kHz) = 1.0 mm
    d = float(ind.reference_depth_mm(1e3, ind.COLD_RESISTIVITY_UOHM_CM, ind.COLD_RELATIVE_PERMEABILITY))
    assert d == pytest.approx(1.0, rel=0.02)


def test_reference_depth_inverse_root_frequency():
    d = ind.reference_depth_mm(np.array([1e3, 4e3]))
    # hand calculation: reference depth ∝ 1 / sqrt(f) (skin-depth formula), sqrt(4e3 / 1e3) = 2
    assert d[0] / d[1] == pytest.approx(2.0, rel=1e-12)


def test_reference_depth_bad_input():
    with pytest.raises(InputError, match="frequency_hz"):
        ind.reference_depth_mm(0.0)
    with pytest.raises(InputError, match="relative_permeability"):
        ind.reference_depth_mm(1e4, 114.6, -1.0)


@pytest.mark.parametrize("depth,dia,lo,hi", [
    # practice table, ASM Handbook Vol. 4 / Semiatin & Stutz 1986 (from memory, low confidence)
    (0.8, 50.0, 100e3, 500e3),
    (2.0, 50.0, 10e3, 500e3),
    (2.0, 20.0, 30e3, 500e3),   # 10 kHz only above 25 mm diameter
    (3.0, 50.0, 3e3, 10e3),
    (8.0, 80.0, 1e3, 3e3),
])
def test_suggested_frequency(depth, dia, lo, hi):
    f_lo, f_hi = ind.suggested_frequency_range_hz(depth, dia)
    assert (float(f_lo), float(f_hi)) == (lo, hi)


def test_suggested_frequency_outside_table_is_nan():
    f_lo, f_hi = ind.suggested_frequency_range_hz(np.array([0.2, 12.0, 1.0]))
    assert np.isnan(f_lo[:2]).all() and np.isnan(f_hi[:2]).all()
    assert f_lo[2] == 100e3
    assert validity.check("induction_frequency_table", hardened_depth_mm=12.0)


def test_suggested_band_consistent_with_reference_depth():
    # physics check: the hot reference depth at the band's frequencies is of the order of
    # the hardened depth (within x0.3–x6; depth also depends on power and time, Rudnev 2014)
    for depth in (1.0, 2.0, 4.0, 7.0):
        f_lo, f_hi = ind.suggested_frequency_range_hz(depth, 60.0)
        d_mid = float(ind.reference_depth_mm(np.sqrt(f_lo * f_hi)))
        assert 0.3 * depth <= d_mid <= 6.0 * depth


def test_surface_hardness_1045():
    # 99.9 % martensite at 0.45 %C (ASTM A255 initial-hardness polynomial, from memory: 56.1 at 0.40,
    # 60.9 at 0.50) -> ~58.6 HRC.  After a 180 °C temper: induction-hardened 1045
    # surfaces are usually specified in 50–60 HRC (from memory; wide band)
    aq = float(ind.surface_hardness_hrc(0.45))
    assert aq == pytest.approx(58.6, abs=0.6)
    t = float(ind.surface_hardness_hrc(0.45, temper_temp_c=180.0, temper_hours=1.0,
                                       comp={"Mn": 0.75}))
    assert 50.0 <= t < aq


def test_surface_hardness_rises_with_carbon():
    h = ind.surface_hardness_hrc(np.array([0.3, 0.4, 0.5, 0.6]))
    assert np.all(np.diff(h) > 0)
