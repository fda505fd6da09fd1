"""Tests of selector.models.nitriding."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import nitriding as nt
from selector.models import validity

# nominal compositions, mid-range of SAE J404 / AMS 6470 (from memory)
C4140 = {"C": 0.40, "Mn": 0.88, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
C4340 = {"C": 0.40, "Mn": 0.70, "Si": 0.25, "Ni": 1.83, "Cr": 0.80, "Mo": 0.25}
C135M = {"C": 0.41, "Mn": 0.55, "Si": 0.30, "Cr": 1.60, "Mo": 0.38, "Al": 1.15}
CH13 = {"C": 0.40, "Mn": 0.35, "Si": 1.0, "Cr": 5.13, "Mo": 1.33, "V": 1.0}
C1045 = {"C": 0.45, "Mn": 0.75}


def test_depth_grows_as_root_time():
    # parabolic growth x = K sqrt(t) (parabolic diffusion growth; case-hardening course notes, vdocuments.mx, verified): 4x the time, 2x the depth
    x = nt.nitrided_case_depth_mm(525.0, np.array([12.0, 48.0, 192.0]))
    np.testing.assert_allclose(x[1:] / x[:-1], 2.0, rtol=1e-12)


def test_depth_48h_525c():
    # about 0.5 mm in 48 h at about 525 °C, Al-Cr-Mo nitriding steels (ASM Handbook
    # Vol. 4 (1991), gas nitriding; from memory, low confidence); the diffusion zone of 0.5–0.8 mm takes tens to hundreds of hours
    # (sarlin.se nitriding page, V)
    assert float(nt.nitrided_case_depth_mm(525.0, 48.0)) == pytest.approx(0.5, abs=0.05)
    assert 0.5 <= float(nt.nitrided_case_depth_mm(540.0, 100.0)) <= 0.9


def test_depth_rises_with_temperature():
    x = nt.nitrided_case_depth_mm(np.array([495.0, 525.0, 565.0]), 48.0)
    assert np.all(np.diff(x) > 0)
    # Arrhenius with Q/2 = 38.5 kJ/mol: 495 -> 565 °C raises K by exp(4631*(1/768-1/838)) = 1.65
    assert x[2] / x[0] == pytest.approx(1.65, rel=0.01)


@pytest.mark.parametrize("comp,lo,hi", [
    # ASM Handbook Vol. 4 "Gas nitriding", typical surface hardness (from memory);
    # 4140 and Nitralloy 135M are the fit's anchors, 4340 and H13 are not
    (C4140, 550.0, 650.0),
    (C4340, 550.0, 650.0),
    (C135M, 1000.0, 1100.0),
    (CH13, 1000.0, 1250.0),
])
def test_surface_hardness_typical(comp, lo, hi):
    assert lo <= float(nt.surface_hardness_hv(comp)) <= hi


def test_surface_hardness_monotone_in_formers():
    al = np.linspace(0, 1.5, 7)
    hv = nt.surface_hardness_hv({"C": 0.4, "Cr": 1.0, "Al": al})
    assert np.all(np.diff(hv) > 0)
    assert np.all(hv < 1200.0)
    # plain carbon steel gains little (common practice: nitriding needs nitride formers)
    assert float(nt.surface_hardness_hv(C1045)) < float(nt.surface_hardness_hv(C4140))


def test_profile_passes_core_plus_50_at_case_depth():
    # DIN 50190-3: nitriding hardness depth where H = core + 50 HV
    xn = float(nt.nitrided_case_depth_mm(525.0, 48.0))
    h = nt.hardness_profile_hv(np.array([0.0, xn, 5.0]), 525.0, 48.0, C4140, 300.0)
    assert h[0] == pytest.approx(float(nt.surface_hardness_hv(C4140)))
    assert h[1] == pytest.approx(350.0, abs=1e-6)
    assert h[2] == pytest.approx(300.0, abs=0.5)
    x = np.linspace(0, 1.5, 31)
    assert np.all(np.diff(nt.hardness_profile_hv(x, 525.0, 48.0, C4140, 300.0)) <= 0)


def test_profile_no_case_when_core_too_hard():
    h = nt.hardness_profile_hv(np.array([0.0, 0.2]), 525.0, 48.0, C1045, 280.0)
    # hand calculation: no case, so the profile is the core hardness given (280 HV)
    np.testing.assert_allclose(h, 280.0)


def test_bad_input():
    with pytest.raises(InputError, match="hours"):
        nt.nitrided_case_depth_mm(525.0, -4.0)
    with pytest.raises(InputError, match="core_hardness_hv"):
        nt.hardness_profile_hv(0.1, 525.0, 48.0, C4140, 0.0)


def test_cautions_and_validity():
    assert nt.nitriding_cautions(525.0, 600.0) == []
    (m,) = nt.nitriding_cautions(600.0)
    assert "495–565" in m
    (m,) = nt.nitriding_cautions(525.0, prior_temper_temp_c=540.0)
    assert "soften" in m
    assert validity.check("nitrided_case_depth", temp_c=480.0)
    assert not validity.check("nitrided_case_depth", temp_c=525.0, hours=48.0)
