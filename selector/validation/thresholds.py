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
    ('alloy_steel', 'jominy', 'band', 'jominy_max_hrc'): Threshold(3, 10.5),  # n=72, measured 2.38 / 8.37 HRC
    ('alloy_steel', 'jominy', 'band', 'jominy_mid_hrc'): Threshold(2, 6),  # n=72, measured 1.36 / 4.73 HRC
    ('alloy_steel', 'jominy', 'band', 'jominy_min_hrc'): Threshold(7, 12),  # n=72, measured 5.33 / 9.31 HRC
    ('alloy_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(9, 11.5),  # n=29, measured 7.18 / 8.99 %
    ('alloy_steel', 'quench_temper', 'minimum', 'hardness_hb'): Threshold(35, 40),  # n=2, measured 25.9 / 28.5 HB
    ('alloy_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(55, 140),  # n=29, measured 41.9 / 110 MPa
    ('alloy_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(145, 250),  # n=29, measured 115 / 199 MPa
    ('alloy_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(4.5, 7),  # n=34, measured 3.52 / 5.36 %
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(60, 95),  # n=41, measured 45.8 / 73.6 HB
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hrc'): Threshold(6, 10.5),  # n=38, measured 4.73 / 8.08 HRC
    ('alloy_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(215, 425),  # n=45, measured 170 / 338 MPa
    ('alloy_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(195, 320),  # n=36, measured 152 / 253 MPa
    ('carbon_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(9.5, 12),  # n=18, measured 7.4 / 9.21 %
    ('carbon_steel', 'quench_temper', 'minimum', 'hardness_hb'): Threshold(50, 60),  # n=4, measured 36.1 / 44.2 HB
    ('carbon_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(115, 140),  # n=18, measured 91 / 110 MPa
    ('carbon_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(125, 175),  # n=18, measured 97.3 / 139 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(4, 7.5),  # n=8, measured 3.19 / 5.75 %
    ('carbon_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(20, 35),  # n=8, measured 12.2 / 24.3 HB
    ('carbon_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(50, 130),  # n=22, measured 37.9 / 104 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(45, 85),  # n=8, measured 32.4 / 67.2 MPa
    ('carburizing_steel', 'jominy', 'band', 'jominy_max_hrc'): Threshold(2.5, 3.5),  # n=20, measured 1.82 / 2.71 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_mid_hrc'): Threshold(2, 3.5),  # n=7, measured 1.22 / 2.73 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_min_hrc'): Threshold(4.5, 5),  # n=7, measured 3.36 / 3.95 HRC
    ('copper_alloy', 'age', 'band', 'elongation_pct'): Threshold(3.5, 3.5),  # n=1, measured 2.49 / 2.49 %
    ('copper_alloy', 'age', 'band', 'uts_mpa'): Threshold(200, 200),  # n=1, measured 156 / 156 MPa
    ('copper_alloy', 'age', 'band', 'yield_mpa'): Threshold(25, 25),  # n=1, measured 16.7 / 16.7 MPa
    ('copper_alloy', 'cold_work', 'band', 'uts_mpa'): Threshold(60, 125),  # n=6, measured 47 / 98.3 MPa
    ('nitriding_steel', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(11, 11),  # n=3, measured 8.66 / 8.75 %
    ('nitriding_steel', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(55, 60),  # n=3, measured 42.7 / 47.8 MPa
    ('nitriding_steel', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(70, 130),  # n=3, measured 53 / 101 MPa
    ('stainless_martensitic', 'quench_temper', 'minimum', 'elongation_pct'): Threshold(14, 14.5),  # n=2, measured 11 / 11.4 %
    ('stainless_martensitic', 'quench_temper', 'minimum', 'uts_mpa'): Threshold(90, 155),  # n=2, measured 68.5 / 121 MPa
    ('stainless_martensitic', 'quench_temper', 'minimum', 'yield_mpa'): Threshold(65, 90),  # n=2, measured 51.5 / 68.2 MPa
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
