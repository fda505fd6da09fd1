"""Tests of the Maynier (1978) phase hardness equations."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import phase_hardness as ph

S = {"C": 0.40, "Si": 0.25, "Mn": 0.85, "Cr": 1.0, "Mo": 0.20}


def test_check_values_4140_like():
    # models reference sheet §4, derived check values for 0.40C-0.25Si-0.85Mn-1.0Cr-0.20Mo at
    # Vr = 1e3, 1e4, 1e5 C/h (rounded to 1 HV): HV_M 602/623/644, HV_B 299/350/402, HV_FP 220/234/247.
    rate_c_s = np.array([1e3, 1e4, 1e5]) / 3600.0
    hm, hb, hfp = ph.phase_hardness_hv(S, rate_c_s)
    assert np.allclose(hm, [602, 623, 644], atol=1.5)
    assert np.allclose(hb, [299, 350, 402], atol=1.5)
    assert np.allclose(hfp, [220, 234, 247], atol=1.5)


def test_order_and_mixture():
    hm, hb, hfp = ph.phase_hardness_hv(S, 10.0)
    assert hm > hb > hfp
    assert ph.mixture_hv([0.5, 0.5, 0.0], [hm, hb, hfp]) == pytest.approx(0.5 * (hm + hb))
    with pytest.raises(InputError):
        ph.phase_hardness_hv(S, 0.0)
