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
    ('alloy_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(2, 5.5),  # n=4, measured 1.42 / 4.09 %
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(45, 95),  # n=11, measured 33.5 / 74.1 HB
    ('alloy_steel', 'quench_temper', 'typical', 'hardness_hrc'): Threshold(7.5, 8.5),  # n=3, measured 5.84 / 6.78 HRC
    ('alloy_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(245, 345),  # n=7, measured 194 / 276 MPa
    ('alloy_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(245, 380),  # n=6, measured 192 / 302 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'elongation_pct'): Threshold(4, 7.5),  # n=8, measured 3.19 / 5.75 %
    ('carbon_steel', 'quench_temper', 'typical', 'hardness_hb'): Threshold(20, 35),  # n=8, measured 12.2 / 24.3 HB
    ('carbon_steel', 'quench_temper', 'typical', 'uts_mpa'): Threshold(45, 70),  # n=8, measured 32.4 / 55.1 MPa
    ('carbon_steel', 'quench_temper', 'typical', 'yield_mpa'): Threshold(45, 85),  # n=8, measured 32.4 / 67.2 MPa
    ('carburizing_steel', 'jominy', 'band', 'jominy_max_hrc'): Threshold(2.5, 3.5),  # n=20, measured 1.82 / 2.71 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_mid_hrc'): Threshold(2, 3.5),  # n=7, measured 1.22 / 2.73 HRC
    ('carburizing_steel', 'jominy', 'band', 'jominy_min_hrc'): Threshold(4.5, 5),  # n=7, measured 3.36 / 3.95 HRC
    ('copper_alloy', 'age', 'band', 'elongation_pct'): Threshold(3.5, 3.5),  # n=1, measured 2.49 / 2.49 %
    ('copper_alloy', 'age', 'band', 'uts_mpa'): Threshold(200, 200),  # n=1, measured 156 / 156 MPa
    ('copper_alloy', 'age', 'band', 'yield_mpa'): Threshold(25, 25),  # n=1, measured 16.7 / 16.7 MPa
    ('copper_alloy', 'cold_work', 'band', 'uts_mpa'): Threshold(60, 125),  # n=6, measured 47 / 98.3 MPa
    ('stainless_ph', 'age', 'minimum', 'elongation_pct'): Threshold(2, 2.5),  # n=11, measured 1.34 / 2 %
    ('stainless_ph', 'age', 'minimum', 'hardness_hb'): Threshold(20, 25),  # n=11, measured 15.4 / 16.4 HB
    ('stainless_ph', 'age', 'minimum', 'hardness_hrc'): Threshold(1.5, 5),  # n=11, measured 1.06 / 3.8 HRC
    ('stainless_ph', 'age', 'minimum', 'uts_mpa'): Threshold(35, 135),  # n=11, measured 27 / 106 MPa
    ('stainless_ph', 'age', 'minimum', 'yield_mpa'): Threshold(35, 310),  # n=11, measured 24.6 / 244 MPa
}
