"""The expansion at scale (selector/states/expand.py): the chunked computation of a large
family gives the same table as one vectorised call (each state's row depends on that state
only), and the scale benchmark's synthetic catalogue and refined grids are what they say.
Speed and memory are measured by scripts/benchmark.py, never asserted here."""
from __future__ import annotations

import sys
from pathlib import Path

import numpy as np
import pandas as pd

from selector.routes import families as fam_registry
from selector.states import expand as X

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "scripts"))
import bench_scale  # noqa: E402


def test_chunked_expansion_equals_one_call(monkeypatch):
    whole = X.expand_states(36.0)
    monkeypatch.setattr(X, "CHUNK_STATES", 997)      # every family above 997 states is split
    chunked = X.expand_states(36.0)
    assert len(whole) > 10 * 997
    pd.testing.assert_frame_equal(chunked, whole, check_exact=True)


def test_expand_states_on_given_grades_equals_the_catalogue_rows():
    qt = fam_registry.get("quench_temper")
    from selector.catalogue.grades import default_catalogue
    g = default_catalogue().grades["4140"]
    own = X.expand_states(30.0, grades=[g], families=[qt]).drop(columns="state_key")
    full = X.expand(30.0)
    ref = full[(full["grade"] == "4140") & (full["route"] == "quench_temper")].reset_index(drop=True)
    ref = ref[own.columns]
    pd.testing.assert_frame_equal(own, ref.astype(own.dtypes.to_dict()), check_exact=True)


def test_synthetic_catalogue_copies_and_refined_grid():
    from selector.catalogue.grades import default_catalogue
    base = list(default_catalogue().grades.values())
    syn = bench_scale.synthetic_grades(3)
    assert len(syn) == 3 * len(base)
    ids = [g.id for g in syn]
    assert len(set(ids)) == len(ids)
    copy = next(g for g in syn if g.id == "4140~2")
    assert copy.comp_max["C"] == default_catalogue().grades["4140"].comp_max["C"] * 1.004
    grid = {"t": np.array([400.0, 500.0, 600.0, 400.0, 500.0, 600.0]),
            "q": np.array(["oil"] * 3 + ["water"] * 3, dtype=object)}
    fine = bench_scale.refine_grid(grid, "t", 10)
    assert len(fine["t"]) == 2 * 21
    assert fine["t"].min() == 400.0 and fine["t"].max() == 600.0
    assert sorted(set(fine["q"])) == ["oil", "water"]
