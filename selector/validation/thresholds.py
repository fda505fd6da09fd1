"""Documented accuracy thresholds of the validation report (placeholder; set below)."""
from __future__ import annotations
from typing import NamedTuple


class Threshold(NamedTuple):
    median_abs: float
    p90_abs: float


THRESHOLDS: dict = {}
HEADROOM_NOTE = ""
