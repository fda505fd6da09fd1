"""selector.selection.cost_split: material and processing parts of a candidate's cost."""
from __future__ import annotations

import csv
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from selector.errors import InputError
from selector.selection.cost_split import processing_cost_per_kg, split_cost
from selector.selection.engine import prepare, rank

ROOT = Path(__file__).resolve().parents[1]


def _adders_from_file() -> dict:
    """The processing adders read straight from data/route_costs.csv (not through the library)."""
    with open(ROOT / "data" / "route_costs.csv", encoding="utf-8") as fh:
        rows = [line for line in fh if not line.startswith("#")]
    out = {}
    for r in csv.DictReader(rows):
        for fam in (r.get("families") or "").split(";"):
            out[(r["route"], fam.strip())] = float(r["adder_per_kg"])
    return out


def test_parts_add_up_and_the_material_part_is_the_price_sheet_price():
    cand = rank(prepare(25.0, None, 100.0, {"4140": 0.25}), {"min_yield_mpa": 600.0})
    out = split_cost(cand)
    np.testing.assert_allclose(out["material_cost_per_kg"] + out["processing_cost_per_kg"], cand["relative_cost"])
    rows = out[out["grade"] == "4140"]
    assert len(rows) and np.allclose(rows["material_cost_per_kg"], 0.25)      # the sheet's own price
    adders = _adders_from_file()
    expected = [adders.get((r, f), adders[(r, "")]) for r, f in zip(out["route_family"], out["family"])]
    np.testing.assert_allclose(out["processing_cost_per_kg"], expected)
    np.testing.assert_allclose(out["material_part_cost"] + out["processing_part_cost"], cand["part_cost"])


def test_unknown_family_and_missing_column_are_named():
    with pytest.raises(InputError, match="route_family.*warp_drive"):
        processing_cost_per_kg(["warp_drive"])
    with pytest.raises(InputError, match="relative_cost"):
        split_cost(pd.DataFrame({"route_family": ["anneal"]}))
