"""Units of measure: the one table of selector.models.conversions that turns SI values
(MPa, mm, °C, kN) into US customary units (ksi, in, °F, lbf) and back."""
from __future__ import annotations

import numpy as np
import pytest

from selector.design import pins
from selector.errors import InputError
from selector.models import conversions as cv


@pytest.mark.parametrize("quantity, si, us", [
    ("stress", 6.894757, 1.0),          # NIST SP 811 (2008) App. B.8: 1 ksi = 6.894 757 MPa
    ("stress", 689.4757, 100.0),
    ("length", 25.4, 1.0),              # NIST SP 811 App. B.8: 1 in = 2.54 E-02 m, exact
    ("temperature", 100.0, 212.0),      # NIST SP 811 App. B.8 (t/°F = 1.8 t/°C + 32): boiling water
    ("temperature", -40.0, -40.0),      # the two scales cross at -40
    ("force", 4.4482216152605, 1000.0),  # NIST SP 811 App. B.9: 1 lbf = 4.448 221 615 260 5 N, exact
])
def test_published_equivalents(quantity, si, us):
    # NIST SP 811 prints 7 significant digits for the ksi; the others are exact
    assert cv.to_us_customary(si, quantity) == pytest.approx(us, rel=1e-7)
    assert cv.from_us_customary(us, quantity) == pytest.approx(si, rel=1e-7)


def test_arrays_and_scalars():
    a = cv.to_us_customary(np.array([0.0, 100.0]), "temperature")
    assert isinstance(a, np.ndarray) and a.tolist() == pytest.approx([32.0, 212.0])
    assert isinstance(cv.from_us_customary(1, "length"), float)


def test_every_quantity_goes_there_and_back():
    x = np.array([0.5, 20.0, 655.0, 1200.0])
    for q in cv.UNITS:
        np.testing.assert_allclose(cv.from_us_customary(cv.to_us_customary(x, q), q), x, rtol=1e-13)


def test_an_unknown_quantity_names_what_is_allowed():
    with pytest.raises(InputError) as exc:
        cv.to_us_customary(1.0, "pressure")
    assert exc.value.field == "quantity" and "stress" in exc.value.allowed


def test_the_design_layer_uses_the_same_pound_force():
    assert pins.LBF_TO_N is cv.N_PER_LBF or pins.LBF_TO_N == cv.N_PER_LBF
    assert cv.KSI_TO_MPA == cv.MPA_PER_KSI
