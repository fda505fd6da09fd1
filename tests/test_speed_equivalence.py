"""The shortcuts of the speed work (issue 13) give the numbers of the direct computation,
bit for bit: the band lookup per distinct (family, section), the as-quenched profile per
distinct quench, and the sensitivities read back from the disk cache."""
import numpy as np

from selector.routes import bands, families as fam_registry, quench_response
from selector.routes.evaluate import _band_columns
from selector.routes.families.quench_temper import as_quenched_distinct
from selector.states import scatter
from selector.states.expand import CORNERS, _family_batch


def _qt_batch(diameter_mm=44.5):
    fam = fam_registry.get("quench_temper")
    return fam, _family_batch(fam, None, diameter_mm, None, CORNERS)[0]


def test_band_columns_per_distinct_family_equal_the_per_state_lookup():
    fam, batch = _qt_batch()
    res = fam.compute(batch)
    section = np.where(np.isfinite(batch.diameter_mm), batch.diameter_mm, batch.thickness_mm)
    fast = _band_columns(res, batch, fam.name, section)
    slow = bands.band_columns(res, batch.attr("family"), fam.name, section)
    assert set(fast) == set(slow) and len(fast) >= 8
    for k in slow:
        assert np.array_equal(fast[k], slow[k], equal_nan=True), k


def test_quench_profile_per_distinct_quench_equals_the_per_state_chain():
    fam, batch = _qt_batch(60.0)
    sub = batch.subset(np.arange(batch.n) % 7 == 0)          # a mix of grades, corners, media, tempers
    p = sub.params
    fast = as_quenched_distinct(sub, p["quench"], p["agitation"], np.asarray(p["austenitize_c"], float))
    slow = quench_response.as_quenched_profile(sub.comp, p["quench"], p["agitation"], diameter_mm=sub.diameter_mm,
                                               austenitize_c=np.asarray(p["austenitize_c"], float))
    for k in slow:
        if k == "warnings":
            continue
        assert np.array_equal(np.asarray(fast[k]), np.asarray(slow[k]), equal_nan=True), k


def test_sensitivities_from_the_disk_cache_equal_a_fresh_build():
    d = 37.5
    first = scatter._effect_blocks(d, None)          # builds and writes (the suite's own cache directory)
    again = scatter._effect_blocks(d, None)          # read back from the file
    fresh = scatter._effect_blocks.build(d, None)
    assert set(first) == set(again) == set(fresh)
    for k in fresh:
        assert again[k].dtype == fresh[k].dtype, k
        assert np.array_equal(again[k], fresh[k], equal_nan=fresh[k].dtype.kind == "f"), k


def test_draws_of_a_subset_of_states_equal_their_rows_of_drawing_all():
    """p_meet is drawn only where the targets are met at nominal: a state's draws must not
    depend on which other states are drawn with it (fixed-shape blocks, scatter.SAMPLE_BLOCK_ROWS)."""
    from selector.selection import engine

    prepared = engine.prepare(41.3)
    m = len(prepared) // 3
    nom = prepared.iloc[:m]
    full = scatter.sample(nom, 41.3, 41.3, None, columns=["yield_mpa", "elongation_pct"])
    rows = np.flatnonzero(np.arange(m) % 5 == 3)[::-1]       # scattered, in reverse order
    part = scatter.sample(nom.iloc[rows], 41.3, 41.3, None, columns=["yield_mpa", "elongation_pct"])
    assert len(rows) > 2 * scatter.SAMPLE_BLOCK_ROWS > 2 * scatter.block_rows(len(scatter.effects(41.3, None)["elements"]), 200)
    for k in ("yield_mpa", "elongation_pct"):
        assert part[k].dtype == full[k].dtype
        assert np.array_equal(part[k], full[k][rows], equal_nan=True), k


def test_p_meet_on_the_nominal_rows_equals_p_meet_of_all_rows():
    from selector.selection import engine
    from selector.selection.targets import meets

    t = {"min_yield_mpa": 650, "min_elongation_pct": 14}
    engine._SAMPLES.clear()
    prepared = engine.prepare(43.7)
    m = len(prepared) // 3
    nominal = np.asarray(meets(prepared, t), bool)[:m]
    part = engine.p_meet(prepared, t, rows=nominal)          # draws only the nominal rows
    assert np.isnan(part[~nominal]).all() and np.isfinite(part[nominal]).all()
    engine._SAMPLES.clear()
    whole = engine.p_meet(prepared, t)                       # draws every row
    assert np.array_equal(part[nominal], whole[nominal])
    assert 0.0 < whole[nominal].mean() < 1.0                 # the comparison is not between constants


def test_prepared_table_from_the_kept_layout_equals_a_fresh_layout(monkeypatch):
    """The variant keys, main values and row order kept per structure digest (from an
    earlier section) give the prepared table of a build with no kept layout, bit for bit;
    and the kept state_key column equals the one written from grade, route and state."""
    import pandas as pd

    from selector.selection import engine
    from selector.states import expand as X

    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    # sections where the induction case depth reached (a window parameter that is also a
    # result) differs: a layout kept from one must not serve another
    for d in (12.0, 41.3, 95.0):
        engine._prepare_table.build(d, None, 100.0, ())      # fills the memos at other sections
    engine._prepare_table.build(52.9, None, 250.0, ())         # the same section, another length
    st = X.expand_states(52.9)
    digest = X.structure_of(st)
    assert digest is not None and any(k[0] == digest for k in engine._LAYOUTS)
    real, calls = engine._layout, []
    monkeypatch.setattr(engine, "_layout", lambda *a: calls.append(1) or real(*a))
    kept = engine._prepare_table.build(52.9, None, 100.0, ())
    assert not calls                                            # the kept layout served it
    # the whole layout made again from the parts kept at the other sections (column codes,
    # keys of the families with no model result among their columns, state-key ranks)
    assert digest in engine._LAYOUT_PARTS and engine._LAYOUT_PARTS[digest]["routes"]
    monkeypatch.setattr(engine, "_LAYOUTS", {})
    from_parts = engine._prepare_table.build(52.9, None, 100.0, ())
    assert calls
    monkeypatch.setattr(engine, "_LAYOUTS", {})
    monkeypatch.setattr(engine, "_LAYOUT_PARTS", {})
    monkeypatch.setattr(X, "_STATE_KEYS", {})
    monkeypatch.setattr(X, "_STRUCTURES", {})                   # no notes codes: counted from the texts
    fresh = engine._prepare_table.build(52.9, None, 100.0, ())
    pd.testing.assert_frame_equal(kept, fresh, check_exact=True)
    pd.testing.assert_frame_equal(from_parts, fresh, check_exact=True)
    assert kept.attrs == fresh.attrs == from_parts.attrs
    written = st["grade"] + "|" + st["route"] + "|" + st["state"].astype(str)
    pd.testing.assert_series_equal(st["state_key"], written, check_names=False)


def test_structure_digest_changes_with_the_states_not_the_section():
    from selector.states import expand as X

    a, b = X.expand_states(33.0), X.expand_states(71.0)
    assert X.structure_of(a) == X.structure_of(b) is not None
    fam = fam_registry.get("quench_temper")
    one = X.expand_states(33.0, grades=[next(iter(_family_batch(fam, None, 33.0, None, CORNERS)[0].grades))])
    assert X.structure_of(one) not in (None, X.structure_of(a))
    assert X.structure_of(a.copy()) is None                   # a copy is not a known table


def test_sensitivities_from_a_kept_plan_equal_a_build_with_none(monkeypatch):
    """The section-independent plan of the sensitivity pass (thinned rows, moved
    compositions, key rows), kept from another section, gives the arrays of a build that
    makes its plan afresh, bit for bit."""
    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    scatter._effect_blocks.build(27.4, None)                     # keeps the plan
    assert scatter._PLANS
    kept = scatter._effect_blocks.build(63.5, None)
    monkeypatch.setattr(scatter, "_PLANS", {})
    fresh = scatter._effect_blocks.build(63.5, None)
    assert set(kept) == set(fresh) and any(k.endswith("_a_uts_mpa") for k in fresh)
    for k in fresh:
        assert kept[k].dtype == fresh[k].dtype, k
        assert np.array_equal(kept[k], fresh[k], equal_nan=fresh[k].dtype.kind == "f"), k
