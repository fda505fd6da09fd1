"""Tests of selector.models.ferrite_pearlite (Gladman, McIvor & Pickering 1972 and the
anneal / normalize microstructure chain)."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import ferrite_pearlite as fp
from selector.models import validity

# nominal compositions, mid-range of SAE J403 (from memory)
STEELS = {"1018": {"C": 0.18, "Mn": 0.75, "Si": 0.20}, "1020": {"C": 0.20, "Mn": 0.45, "Si": 0.20},
          "1045": {"C": 0.46, "Mn": 0.75, "Si": 0.25}, "1060": {"C": 0.60, "Mn": 0.75, "Si": 0.25},
          "1080": {"C": 0.81, "Mn": 0.75, "Si": 0.25}, "4140": {"C": 0.40, "Mn": 0.88, "Si": 0.25}}


def anneal(comp, diameter_mm=25.0):
    a = fp.anneal_properties(comp, 845.0, 1.0, fp.FURNACE_COOL_K_S)
    n = fp.anneal_properties(comp, 870.0, 1.0, fp.still_air_cooling_rate_k_s(diameter_mm))
    return a, n


def test_lever_rule():
    # Fe-Fe3C lever rule between 0.02 and 0.77 % C (common practice)
    f = fp.pearlite_fraction({"C": np.array([0.0, 0.02, 0.395, 0.77, 1.0])})
    np.testing.assert_allclose(f, [0.0, 0.0, 0.5, 1.0, 1.0], atol=1e-12)


def test_gmp_equation_structure():
    # Gladman, McIvor & Pickering, JISI 210 (1972) 916: the ferrite term (Hall-Petch in the
    # ferrite grain) weighs f_alpha^(1/3) and the pearlite term (Hall-Petch in the spacing) the
    # rest.  Checked as properties, not by re-summing the coefficients: finer ferrite and finer
    # pearlite both strengthen; more carbon (more pearlite) makes the ferrite grain matter less;
    # silicon adds solid-solution strength to both yield and tensile strength.
    comp = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    s = lambda comp, d, s0: np.asarray(fp.ferrite_pearlite_strength(comp, d, s0, free_n_pct=0.0), float)  # noqa: E731
    base = s(comp, 6.0, 0.11)
    assert np.all(s(comp, 4.0, 0.11) > base) and np.all(s(comp, 6.0, 0.08) > base)
    lean, rich = dict(comp, C=0.20), dict(comp, C=0.60)
    gain = lambda c: s(c, 4.0, 0.11)[0] - s(c, 6.0, 0.11)[0]  # noqa: E731
    assert gain(rich) < gain(lean)
    assert np.all(s(dict(comp, Si=0.45), 6.0, 0.11) > base)


def test_pickering_gladman_1963_hand_value():
    # Pickering & Gladman, ISI Special Report 81 (1963), as published: 15.4 x [3.5 + 2.1 Mn + 5.4 Si
    # + 1.13 d^-1/2] and 15.4 x [19.1 + 1.8 Mn + 5.4 Si + 0.25 P + 0.5 d^-1/2] (tsi -> MPa, d in mm;
    # from memory).  The module keeps the coefficients multiplied out and rounded to 3 digits,
    # so the two forms agree to 0.2 %.
    ys, uts = fp.ferritic_strength_pickering_gladman({"C": 0.1, "Mn": 1.0, "Si": 0.2}, 10.0, free_n_pct=0.0)
    d = 0.01
    p = 100 * (0.1 - 0.02) / 0.75
    assert float(ys) == pytest.approx(15.4 * (3.5 + 2.1 * 1.0 + 5.4 * 0.2 + 1.13 / np.sqrt(d)), rel=2e-3)
    assert float(uts) == pytest.approx(15.4 * (19.1 + 1.8 * 1.0 + 5.4 * 0.2 + 0.25 * p + 0.5 / np.sqrt(d)), rel=2e-3)


def test_spacing_and_undercooling():
    # spacing inversely proportional to undercooling (Zener, Trans. AIME 167 (1946) 550): the
    # product is one constant; faster cooling transforms with more undercooling
    dts = np.array([10.0, 25.0, 50.0])
    s = fp.pearlite_spacing_um(dts)
    np.testing.assert_allclose(s * dts, s[0] * dts[0], rtol=1e-12)
    dt = fp.transformation_undercooling_k(np.array([0.01, 0.1, 1.0, 10.0]))
    assert np.all(np.diff(dt) > 0)
    # pearlite of a normalized bar (about 1 K/s): spacing about 0.1-0.3 um (common practice, from memory)
    assert 0.05 < float(fp.pearlite_spacing_um(dt[2])) < 0.5
    # still-air rate of a bar falls with diameter; a furnace cool is much slower
    r = fp.still_air_cooling_rate_k_s(np.array([12.0, 25.0, 100.0]))
    assert np.all(np.diff(r) < 0) and r[-1] > 10 * fp.FURNACE_COOL_K_S
    assert float(fp.still_air_cooling_rate_k_s(25.0)) == pytest.approx(1.5, rel=0.05)


@pytest.mark.parametrize("grade", list(STEELS))
def test_normalized_stronger_than_annealed(grade):
    # common practice (ASM Handbook Vol. 1 carbon steel tables): normalized strength
    # exceeds full-annealed strength; the anneal gives coarser ferrite and pearlite
    a, n = anneal(STEELS[grade])
    assert float(n["uts_mpa"]) > float(a["uts_mpa"]) and float(n["yield_mpa"]) > float(a["yield_mpa"])
    assert float(a["pearlite_spacing_um"]) > float(n["pearlite_spacing_um"])
    assert float(a["ferrite_grain_um"]) > float(n["ferrite_grain_um"])


def test_yield_falls_as_grain_grows():
    comp = STEELS["1045"]
    d = np.array([3.0, 6.0, 12.0, 25.0, 50.0, 100.0])
    ys, uts = fp.ferrite_pearlite_strength(comp, d, 0.2)
    assert np.all(np.diff(ys) < 0) and np.all(np.diff(uts) < 0)


def test_strength_rises_with_carbon():
    c = np.array([0.1, 0.2, 0.3, 0.45, 0.6])
    ys, uts = fp.ferrite_pearlite_strength({"C": c, "Mn": 0.75, "Si": 0.2}, 20.0, 0.2, free_n_pct=0.0)
    assert np.all(np.diff(uts) > 0) and np.all(np.diff(ys) > 0)


def test_1045_against_handbook():
    # ASM Handbook Vol. 1 / SAE typical for 1045 (from memory): annealed UTS about 585 MPa,
    # normalized about 650-750 MPa.  Measured: annealed 517 MPa (-12 %), normalized
    # 674 MPa; tensile within 15 %.  Yield is under-predicted (annealed 246 vs about
    # 310-450 MPa): documented limit.
    a, n = anneal(STEELS["1045"])
    assert float(a["uts_mpa"]) == pytest.approx(585.0, rel=0.15)
    assert 650.0 * 0.95 <= float(n["uts_mpa"]) <= 750.0 * 1.05


def test_ferrite_grain_relation():
    # Hodgson & Gibbs (1992): faster cooling and finer austenite give finer ferrite
    comp = STEELS["1018"]
    d_rate = fp.ferrite_grain_size_um(comp, 60.0, np.array([0.1, 1.0, 10.0]))
    d_aus = fp.ferrite_grain_size_um(comp, np.array([20.0, 60.0, 150.0]), 1.0)
    assert np.all(np.diff(d_rate) < 0) and np.all(np.diff(d_aus) > 0)
    # ferrite grains of a normalized low-carbon bar: about 5-30 um (ASTM E112 G 7-11; common practice)
    assert 5.0 < float(d_rate[1]) < 30.0


def test_broadcast_and_errors():
    comp = {"C": np.array([0.2, 0.45]), "Mn": np.array([0.45, 0.75])}
    r = fp.anneal_properties(comp, np.array([870.0, 900.0]), 1.0, np.array([1.0, 0.5]))
    assert r["yield_mpa"].shape == (2,)
    with pytest.raises(InputError) as exc:
        fp.ferrite_pearlite_strength(comp, -1.0, 0.2)
    assert exc.value.field == "ferrite_grain_um"
    with pytest.raises(InputError):
        fp.transformation_undercooling_k(0.0)


def test_validity_registered():
    assert validity.check("gladman_mcivor_pickering", C=0.45, Mn=0.75) == []
    assert validity.check("gladman_mcivor_pickering", C=1.0)
