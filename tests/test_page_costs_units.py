"""The side-by-side view's cost figures follow the chosen units (issue 15: cost "per kg"
was printed in US units).  1 lb = 0.453 592 37 kg exactly (NIST SP 811 (2008) App. B.8),
so a relative price per lb is the price per kg times 0.453 592 37."""
from __future__ import annotations

import numpy as np
import pytest

from selector.selection.cost_split import split_cost
from selector.selection.engine import prepare, rank
from selector.views.page import charts, tables
from selector.views.units import SI, US

KG_PER_LB = 0.45359237


@pytest.fixture(scope="module")
def cand():
    c = split_cost(rank(prepare(25.0, None, 100.0), {"min_yield_mpa": 600.0})).head(2).copy()
    c["id"] = ["C1", "C2"]
    c["label"] = ["C1 " + g for g in c["grade"]]
    return c


def test_comparison_table_costs_per_lb_in_us_units(cand):
    si = tables.comparison_table(cand, ["C1", "C2"], SI)
    us = tables.comparison_table(cand, ["C1", "C2"], US)
    assert "relative cost per kg" in si.index and "relative cost per lb" in us.index
    assert not any("per kg" in str(i) for i in us.index)
    # the table prints a few significant figures: within 1 % of the engine's price per kg x kg/lb
    np.testing.assert_allclose(us.loc["relative cost per lb"].astype(float),
                               cand["relative_cost"].to_numpy(float) * KG_PER_LB, rtol=1e-2)


def test_comparison_bars_costs_per_lb_in_us_units(cand):
    si = charts.comparison_frame(cand, ["C1", "C2"], SI)
    us = charts.comparison_frame(cand, ["C1", "C2"], US)
    assert "per kg" not in set(us["quantity"]) and "per lb" in set(us["quantity"])
    a = si[si["quantity"] == "per kg"]["value"].to_numpy()
    b = us[us["quantity"] == "per lb"]["value"].to_numpy()
    np.testing.assert_allclose(b, a * KG_PER_LB, rtol=1e-12)
