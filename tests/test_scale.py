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


def test_narrow_streamed_expansion_equals_the_full_table_in_float32():
    """expand_narrow keeps, per state, the full table's values rounded to float32 (and the
    number of model notes), whatever the chunk size (small chunks split every family)."""
    full = X.expand_states(36.0)
    nar = X.expand_narrow(36.0, chunk_states=700)
    assert len(nar["grade"]) == len(full)
    key = lambda g, r, c, s: pd.Series(g) + "|" + pd.Series(r) + "|" + pd.Series(c) + "|" + pd.Series(s).astype(str)  # noqa: E731
    k_full = key(full["grade"].to_numpy(object), full["route"].to_numpy(object), full["corner"].to_numpy(object),
                 full["state"].to_numpy())
    k_nar = key(np.array(nar["grades"], object)[nar["grade"]], np.array(nar["routes"], object)[nar["route"]],
                np.array(nar["corners"], object)[nar["corner"]], nar["state"])
    at = pd.Index(k_full).get_indexer(k_nar)
    assert (at >= 0).all() and len(np.unique(at)) == len(at)
    for col in X.NARROW_COLUMNS:
        assert nar[col].dtype == np.float32
        assert np.array_equal(full[col].to_numpy(float)[at].astype(np.float32), nar[col], equal_nan=True), col
    n_notes = np.array([0 if not x else x.count(" | ") + 1 for x in full["notes"]])[at]
    assert np.array_equal(n_notes, nar["n_notes"]) and n_notes.max() > 1
    qt = np.array(nar["routes"], object)[nar["route"]] == "quench_temper"
    assert np.array_equal(full["temper_temp_c"].to_numpy(float)[at][qt].astype(np.float32), nar["main_value"][qt])


def test_chunk_sizes_of_the_heavy_families_are_smaller():
    fam = fam_registry.get("austemper")
    assert X.chunk_states(fam) == X.FAMILY_CHUNK_STATES["austemper"] < X.CHUNK_STATES
    assert X.chunk_states(fam_registry.get("quench_temper"), 5000) == 5000
