"""Stress relieving of cold-drawn bar: the change of yield strength, tensile strength
and elongation after a sub-critical soak (recovery), from the cold-worked state and
the annealed state it was drawn from.

Method (two published observations combined, with a time-temperature equivalence):

1. Low-temperature stress relief (strain ageing and recovery of residual stress):
   the yield strength of cold-drawn carbon steel bar *rises* by a few per cent and the
   elongation recovers part of what drawing removed, while the tensile strength barely
   changes.  ASTM A311/A311M (cold-drawn, stress-relieved bars) exists because the
   stress-relieved bar has at least the yield of the as-drawn bar with better ductility;
   ASM Handbook Vol. 1 (1990), "Cold-finished steel bars", describes the yield gain and
   the recovery of ductility after a low-temperature stress relief (values from memory):
   yield +5 %, tensile +0 %, elongation +25 % of the as-drawn value.
2. Above about 480 °C (1 h) recovery turns into recrystallisation and the cold-work
   increment is lost, completely by about 650 °C (1 h) (ASM Handbook Vol. 4 (1991),
   "Stress relieving", typical stress-relief range of carbon steel 550–650 °C; from memory).

Time and temperature are combined with the Hollomon–Jaffe parameter
P = T_K (20 + log10 t_h) (J.H. Hollomon & L.D. Jaffe, Trans. AIME 162 (1945) 223), so that
a longer soak counts as a higher temperature.  The fraction of the cold-work increment
lost is f = clip((P - P(480 °C, 1 h)) / (P(650 °C, 1 h) - P(480 °C, 1 h)), 0, 1); then

    yield = ys_ann + (ys_cw - ys_ann) (1 - f) + 0.05 ys_cw (1 - f)
    uts   = uts_ann + (uts_cw - uts_ann) (1 - f)
    el    = el_cw + (el_ann - el_cw) max(f, r),  r = 0.25 el_cw / (el_ann - el_cw) capped at 1

Validity: plain carbon and free-machining steels, cold-drawn 5–35 % reduction, 250–700 °C,
0.25–10 h (registered as ``stress_relief``).  Confidence: from memory (the percentages are
recalled handbook values; check before relying on them).

Example: a 1045 bar drawn to yield 620 MPa from an annealed 360 MPa, relieved at 400 °C
for 1 h (f = 0), gains 5 %: 651 MPa.
"""
from __future__ import annotations

import numpy as np

from . import validity

#: Hollomon-Jaffe constant for the time-temperature equivalence
HJ_C = 20.0
#: onset and end of the loss of the cold-work increment at 1 h, degC (ASM Handbook Vol. 4; from memory)
LOSS_START_C = 480.0
LOSS_END_C = 650.0
#: low-temperature gains (ASM Handbook Vol. 1, cold-finished bars; from memory)
YIELD_GAIN = 0.05
ELONGATION_RECOVERY = 0.25

REFERENCE = ("ASM Handbook Vol. 1 (1990) cold-finished steel bars and Vol. 4 (1991) stress relieving "
             "(from memory); Hollomon & Jaffe, Trans. AIME 162 (1945) 223 (time-temperature parameter)")

validity.register("stress_relief", {"temp_c": (250.0, 700.0, "°C"), "hours": (0.25, 10.0, "h")}, REFERENCE)


def hollomon_jaffe_parameter(temp_c, hours):
    """P = T_K (20 + log10 t_h), K (Hollomon & Jaffe 1945).

    Example (from the source: Hollomon & Jaffe (1945), P = T_K (C + log10 t): one hour at 480 °C
    with C = 20 is 753.15 x 20)

    >>> round(float(hollomon_jaffe_parameter(480.0, 1.0)), 1)
    15063.0
    """
    t = np.asarray(temp_c, float) + 273.15
    h = np.maximum(np.asarray(hours, float), 1e-3)
    return t * (HJ_C + np.log10(h))


def cold_work_loss_fraction(temp_c, hours):
    """Fraction (0..1) of the cold-work strength increment lost by a soak of
    ``hours`` h at ``temp_c`` °C (0 below 480 °C-1 h equivalent, 1 at 650 °C-1 h).

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(cold_work_loss_fraction(600.0, 1.0)), 3)
    0.706
    """
    p = hollomon_jaffe_parameter(temp_c, hours)
    lo = hollomon_jaffe_parameter(LOSS_START_C, 1.0)
    hi = hollomon_jaffe_parameter(LOSS_END_C, 1.0)
    return np.clip((p - lo) / (hi - lo), 0.0, 1.0)


def stress_relieved_properties(temp_c, hours, uts_cw_mpa, yield_cw_mpa, elongation_cw_pct,
                               uts_annealed_mpa, yield_annealed_mpa, elongation_annealed_pct) -> dict:
    """Properties after stress relieving a cold-worked bar.

    Parameters
    ----------
    temp_c : array, °C     soak temperature
    hours : array, h       soak time
    uts_cw_mpa, yield_cw_mpa, elongation_cw_pct : arrays   as cold worked
    uts_annealed_mpa, yield_annealed_mpa, elongation_annealed_pct : arrays   before cold work

    Returns
    -------
    dict of arrays ``uts_mpa``, ``yield_mpa``, ``elongation_pct``, ``loss_fraction``.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(stress_relieved_properties(600.0, 1.0, 700.0, 600.0, 10.0, 500.0, 300.0, 30.0)["uts_mpa"]))
    559
    """
    f = cold_work_loss_fraction(temp_c, hours)
    ys_cw, ys_a = np.asarray(yield_cw_mpa, float), np.asarray(yield_annealed_mpa, float)
    uts_cw, uts_a = np.asarray(uts_cw_mpa, float), np.asarray(uts_annealed_mpa, float)
    el_cw, el_a = np.asarray(elongation_cw_pct, float), np.asarray(elongation_annealed_pct, float)
    ys = ys_a + (ys_cw - ys_a) * (1.0 - f) + YIELD_GAIN * ys_cw * (1.0 - f)
    uts = uts_a + (uts_cw - uts_a) * (1.0 - f)
    ys = np.minimum(ys, 0.98 * uts)
    gap = np.maximum(el_a - el_cw, 1e-9)
    r = np.minimum(ELONGATION_RECOVERY * el_cw / gap, 1.0)
    el = el_cw + (el_a - el_cw) * np.maximum(f, r)
    return {"uts_mpa": uts, "yield_mpa": ys, "elongation_pct": el, "loss_fraction": f}
