"""Documented accuracy thresholds of the validation report (``docs/validation.md``).

For every group of comparisons (grade family, route, kind of published value,
property) the report's median and 90th percentile of the absolute error must stay at
or below the values here; ``tests/test_validation.py`` (slow suite) fails otherwise,
so accuracy cannot slip unnoticed.  A group compared without an entry here fails the
same test: add its thresholds when a model or reference rows are added.

How the values were set: measured with ``selector validate`` on the reference tables
of ``data/reference/`` (the figures are in ``docs/validation.md``), then
:func:`propose` — the measured statistic × 1.25, rounded up to the property's step,
and never below the property's floor (so that groups fitted to their own data, with
errors near zero, do not fail on rounding).  They are limits against *regression*,
not claims of accuracy: several are wide because the model is far from the published
values there (see the report's bias column and worst rows).
"""
from __future__ import annotations

import math
from typing import NamedTuple


class Threshold(NamedTuple):
    median_abs: float
    p90_abs: float


HEADROOM = 1.25
#: unit -> (rounding step, floor)
STEPS = {"MPa": (5.0, 5.0), "%": (0.5, 1.0), "HB": (5.0, 5.0), "HRC": (0.5, 1.0), "HV": (5.0, 5.0)}

HEADROOM_NOTE = (f"Thresholds: the statistic measured when they were set × {HEADROOM:g}, rounded up to "
                 "5 MPa / 0.5 % / 5 HB / 0.5 HRC, with floors of 5 MPa / 1 % / 5 HB / 1 HRC "
                 "(selector/validation/thresholds.py).")


def propose(value: float, unit: str) -> float:
    """Threshold for a measured statistic: ``value × HEADROOM`` rounded up to the unit's
    step, at least the unit's floor."""
    step, floor = STEPS[unit]
    return max(floor, math.ceil(value * HEADROOM / step - 1e-9) * step)


#: (family, route, kind, property) -> Threshold(median_abs, p90_abs), in the property's unit
THRESHOLDS: dict = {
    ('alloy_steel', 'jominy', 'band', 'jominy_max_hrc'): Threshold(3, 9.5),  # n=72, measured 2.24 / 7.35 HRC
    ('alloy_steel', 'jominy', 'band', 'jominy_mid_hrc'): Threshold(1.5, 4.5),  # n=72, measured 1.12 / 3.25 HRC
    ('alloy_steel', 'jominy', 'band', 'jominy_min_hrc'): Threshold(3.5, 12),  # n=72, measured 2.76 / 9.52 HRC
    ('alloy_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(6.5, 9),  # n=38, measured 5.18 / 6.9 %
    ('alloy_steel', 'quench_temper', 'minimum', 'hardness_hb'): Threshold(55, 75),  # n=8, measured 43.5 / 59.3 HB
    ('alloy_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(170, 265),  # n=43, measured 133 / 209 MPa
    ('alloy_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(270, 380),  # n=38, measured 216 / 301 MPa
    ('alloy_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(2.5, 4.5),  # n=28, measured 1.6 / 3.58 %
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(20, 55),  # n=35, measured 14.7 / 42.4 HB
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hrc'): Threshold(2, 5),  # n=32, measured 1.5 / 3.77 HRC
    ('alloy_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(75, 160),  # n=54, measured 57.2 / 126 MPa
    ('alloy_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(85, 295),  # n=30, measured 65.1 / 234 MPa
    ('carbon_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(6, 9.5),  # n=22, measured 4.53 / 7.54 %
    ('carbon_steel', 'quench_temper', 'minimum', 'hardness_hb'): Threshold(55, 80),  # n=8, measured 43.6 / 61.1 HB
    ('carbon_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(165, 355),  # n=22, measured 128 / 280 MPa
    ('carbon_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(195, 280),  # n=22, measured 156 / 221 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(4.5, 12.5),  # n=14, measured 3.48 / 9.73 %
    ('carbon_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(30, 60),  # n=18, measured 20.3 / 45.6 HB
    ('carbon_steel', 'quench_temper', 'typical', 'hardness_hrc'): Threshold(4.5, 6),  # n=7, measured 3.27 / 4.55 HRC
    ('carbon_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(45, 175),  # n=52, measured 32.8 / 136 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(35, 180),  # n=13, measured 25.1 / 144 MPa
    ('carburizing_steel', 'jominy', 'band', 'jominy_max_hrc'): Threshold(3.5, 5),  # n=20, measured 2.48 / 3.92 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_mid_hrc'): Threshold(2.5, 2.5),  # n=7, measured 1.72 / 1.97 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_min_hrc'): Threshold(6.5, 7),  # n=7, measured 4.81 / 5.52 HRC
    ('copper_alloy', 'age', 'band', 'elongation_pct'): Threshold(3.5, 3.5),  # n=1, measured 2.49 / 2.49 %
    ('copper_alloy', 'age', 'band', 'uts_mpa'): Threshold(200, 200),  # n=1, measured 156 / 156 MPa
    ('copper_alloy', 'age', 'band', 'yield_mpa'): Threshold(25, 25),  # n=1, measured 16.7 / 16.7 MPa
    ('copper_alloy', 'cold_work', 'band', 'uts_mpa'): Threshold(60, 125),  # n=6, measured 46.5 / 98.3 MPa
    ('nitriding_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(9.5, 10.5),  # n=3, measured 7.5 / 8.3 %
    ('nitriding_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(95, 145),  # n=3, measured 74.7 / 115 MPa
    ('nitriding_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(145, 245),  # n=3, measured 112 / 192 MPa
    ('stainless_martensitic', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(7.5, 8),  # n=2, measured 5.62 / 6.02 %
    ('stainless_martensitic', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(195, 265),  # n=2, measured 154 / 208 MPa
    ('stainless_martensitic', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(240, 290),  # n=2, measured 190 / 231 MPa
    ('stainless_ph', 'age', 'minimum', 'elongation_pct'): Threshold(5, 6),  # n=8, measured 3.82 / 4.66 %
    ('stainless_ph', 'age', 'minimum', 'hardness_hb'): Threshold(20, 60),  # n=8, measured 15.3 / 44.3 HB
    ('stainless_ph', 'age', 'minimum', 'hardness_hrc'): Threshold(4, 10),  # n=8, measured 2.85 / 7.76 HRC
    ('stainless_ph', 'age', 'minimum', 'uts_mpa'): Threshold(120, 260),  # n=8, measured 94.2 / 205 MPa
    ('stainless_ph', 'age', 'minimum', 'yield_mpa'): Threshold(175, 485),  # n=8, measured 138 / 387 MPa
    ('stainless_ph', 'age', 'typical', 'elongation_pct'): Threshold(1, 1.5),  # n=6, measured 0.66 / 1.12 %
    ('stainless_ph', 'age', 'typical', 'hardness_hrc'): Threshold(1.5, 2),  # n=6, measured 1.17 / 1.38 HRC
    ('stainless_ph', 'age', 'typical', 'uts_mpa'): Threshold(40, 85),  # n=6, measured 29.3 / 66.4 MPa
    ('stainless_ph', 'age', 'typical', 'yield_mpa'): Threshold(30, 75),  # n=6, measured 20.3 / 56.4 MPa
}
