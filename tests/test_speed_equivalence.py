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


def test_compact_draws_grown_in_steps_equal_the_draws_of_every_state():
    """The draws kept with a prepared table hold only the states drawn (compact rows and the
    row of each state): drawn in two steps (scattered rows, then the rest) they equal the draws
    of every state at once, and the states not yet drawn read as NaN."""
    from selector.selection import engine

    engine._SAMPLES.clear()
    prepared = engine.prepare(41.3)
    m = len(prepared) // 3
    nom = prepared.iloc[:m]
    cols = ["yield_mpa", "elongation_pct", "hardness_hrc"]
    whole = scatter.sample(nom, 41.3, 41.3, None, columns=cols)
    some = np.flatnonzero(np.arange(m) % 9 == 4)
    first = engine.samples(prepared, cols, rows=some)
    rest = np.setdiff1d(np.arange(m), some)
    for c in cols:
        assert np.array_equal(first[c][some], whole[c][some], equal_nan=True), c
        assert np.isnan(first[c][rest]).all(), c
    store = engine._sample_store(prepared)
    assert len(store["draws"]["yield_mpa"]) == len(some)          # only the drawn rows are kept
    again = engine.samples(prepared, cols)                         # draws the rest
    assert len(store["draws"]["yield_mpa"]) == m
    for c in cols:
        assert np.array_equal(again[c], whole[c], equal_nan=True), c
    assert np.isfinite(again["yield_mpa"]).mean() > 0.9             # not a comparison of NaN


def test_note_counts_kept_by_the_expansion_equal_the_counts_read_from_the_texts():
    """The number of notes of each distinct notes text, counted from its messages as the text
    is joined (expand.note_codes), equals the count read from the text (" | "-separated)."""
    from selector.states import expand as X

    for d in (12.0, 41.3):
        st = X._expand_built(d, None)
        notes = st.cols["notes"]
        read = [0 if not x else x.count(" | ") + 1 for x in notes.uniques]
        assert notes.counts is not None and notes.counts.tolist() == read
        assert max(read) >= 3                                          # several notes joined
    texts, kept = {}, {}
    msgs = [("a | b", np.array([True, True, False])), ("c", np.array([True, False, True])), ("", np.ones(3, bool))]
    X.note_codes(msgs, 3, texts, kept)
    assert X.note_counts(texts, kept).tolist() == [0 if not x else x.count(" | ") + 1 for x in texts]
    assert set(kept) == set()                                      # a "|" or an empty message: read from the text


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


def _fresh_memos(monkeypatch):
    """Empty every memo kept across sections (the next computation is from scratch)."""
    from selector.routes import quench_response as QR
    from selector.selection import engine
    from selector.states import expand as X

    for mod, name in ((engine, "_LAYOUTS"), (engine, "_LAYOUT_PARTS"), (engine, "_SAMPLES"), (engine, "_VIEWS"),
                      (engine, "_AVOID"), (X, "_STATE_KEYS"), (X, "_STRUCTURES"), (X, "_DIGESTS"),
                      (scatter, "_PLANS"), (scatter, "_ROW_PLANS"), (QR, "_SECTION_FREE"), (engine, "_TAKEN")):
        monkeypatch.setattr(mod, name, {})
    engine._prepare_cached.cache_clear()
    X.expand.cache_clear()
    scatter.effects.cache_clear()


def test_select_at_a_section_after_others_equals_a_fresh_select(monkeypatch):
    """Everything kept from earlier sections (layout parts, structure digest, state keys, the
    composition-only parts of the quench chain, sensitivity plans) gives, at a new section,
    the selection, prepared table and sensitivities of a process that saw no other section."""
    import pandas as pd

    import selector
    from selector.selection import engine

    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    t = {"min_yield_mpa": 700, "min_elongation_pct": 12}
    for d in (21.0, 47.5):                                     # section A (centre test location), then B
        selector.select(t, diameter_mm=d)
    after = selector.select(t, diameter_mm=63.1)
    after_prep = engine.prepare(63.1)
    after_eff = scatter.effects(63.1, None)
    _fresh_memos(monkeypatch)
    fresh = selector.select(t, diameter_mm=63.1)
    fresh_prep = engine.prepare(63.1)
    fresh_eff = scatter.effects(63.1, None)
    assert len(fresh) > 10
    pd.testing.assert_frame_equal(after, fresh, check_exact=True)
    pd.testing.assert_frame_equal(after_prep, fresh_prep, check_exact=True)
    assert list(after_prep.dtypes) == list(fresh_prep.dtypes) and after_prep.attrs == fresh_prep.attrs
    for p_ in fresh_eff["a"]:
        assert np.array_equal(after_eff["a"][p_], fresh_eff["a"][p_], equal_nan=True), p_


def test_prepared_table_from_the_columns_equals_costing_and_taking_the_states_frame(monkeypatch):
    """The prepared table built from the expansion's columns (one take per column) equals the
    one built from the states DataFrame (cost, layout, take), column by column and dtype."""
    import pandas as pd

    from selector.selection import engine
    from selector.states import expand as X

    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    prices = (("4140", 2.5), ("1045", 0.9))
    from_cols = engine._prepare_table.build(38.5, None, 150.0, prices)
    frame = X.expand_states(38.5)                             # the states DataFrame of the same section
    monkeypatch.setattr(engine, "expand_columns", lambda d, t: frame)
    from_frame = engine._prepare_table.build(38.5, None, 150.0, prices)
    pd.testing.assert_frame_equal(from_cols, from_frame, check_exact=True)
    assert list(from_cols.dtypes) == list(from_frame.dtypes) and from_cols.attrs == from_frame.attrs
    assert (from_cols["price_source"] == "price sheet").any()


def test_expand_frame_from_kept_columns_equals_expand_states():
    import pandas as pd

    from selector.states import expand as X

    X.expand.cache_clear()
    kept = X.expand(29.0)                                     # from the cached columns
    fresh = X.expand_states(29.0)
    pd.testing.assert_frame_equal(kept, fresh, check_exact=True)
    assert X.structure_of(kept) == X.structure_of(fresh) is not None


def test_quench_chain_with_kept_composition_parts_equals_a_fresh_chain(monkeypatch):
    from selector.routes import quench_response as QR

    fam, batch = _qt_batch(30.0)
    sub = batch.subset(np.arange(batch.n) % 11 == 0)
    p = sub.params
    args = (sub.comp, p["quench"], p["agitation"])
    kw = dict(austenitize_c=np.asarray(p["austenitize_c"], float))
    QR.as_quenched_profile(*args, diameter_mm=np.full(sub.n, 30.0), **kw)      # keeps the parts
    assert QR._SECTION_FREE
    kept = QR.as_quenched_profile(*args, diameter_mm=np.full(sub.n, 71.0), **kw)
    monkeypatch.setattr(QR, "_SECTION_FREE", {})
    fresh = QR.as_quenched_profile(*args, diameter_mm=np.full(sub.n, 71.0), **kw)
    assert set(kept) == set(fresh)
    for k in fresh:
        if k not in ("warnings", "positions"):
            assert np.array_equal(np.asarray(kept[k]), np.asarray(fresh[k]), equal_nan=True), k
    assert kept["warnings"] == fresh["warnings"]


def test_case_table_per_distinct_quench_equals_the_per_row_chain():
    """The carburized case table evaluates the quench chain once per distinct (carbon level,
    quench): the same numbers as the chain over every (state, carbon level)."""
    from selector.models import carburizing
    from selector.models.composition import el
    from selector.routes.families import carburize as C

    fam = fam_registry.get("carburize")
    batch = _family_batch(fam, None, 33.0, None, CORNERS)[0]
    p = batch.params
    cs = np.maximum(np.asarray(p["surface_carbon_pct"], float), el(batch.comp, "C") + 1e-6)
    fast = C.case_table(batch, p["quench"], p["agitation"], np.asarray(p["austenitize_c"], float), cs,
                        np.asarray(p["temper_temp_c"], float), np.asarray(p["temper_hours"], float))
    # the chain over every row, as the case table computed it before
    n, frac = batch.n, np.asarray(C.CARBON_FRACTIONS, float)
    k = len(frac)
    tile = lambda a: np.tile(np.broadcast_to(np.asarray(a), (n,)), k)  # noqa: E731
    c0 = el(batch.comp, "C")
    local = {e: tile(v) for e, v in batch.comp.items()}
    local["C"] = (c0[None, :] + frac[:, None] * (cs - c0)[None, :]).reshape(-1)
    prof = quench_response.as_quenched_profile(local, tile(p["quench"]), tile(p["agitation"]),
                                               austenitize_c=tile(np.asarray(p["austenitize_c"], float)),
                                               positions=C.TABLE_POSITIONS, diameter_mm=tile(batch.diameter_mm))
    aq = np.asarray(prof["hardness_hv"], float).reshape(k, n, -1).transpose(1, 0, 2)
    c_k = (c0[:, None] + frac[None, :] * (cs - c0)[:, None])[:, :, None]
    comp3 = {e: np.asarray(v, float)[:, None, None] for e, v in batch.comp.items()}
    h = np.asarray(p["temper_hours"], float)[:, None, None]
    slow = carburizing.case_hardness_hv(aq, c_k, comp3, np.asarray(p["temper_temp_c"], float)[:, None, None],
                                        np.where(np.isfinite(h), h, 1.0))
    assert batch.n > 100 and np.array_equal(fast["hv"], slow, equal_nan=True)


def test_supplied_core_records_per_distinct_bar_equal_one_record_per_state():
    """The supplied-bar families compute on one grade record per distinct (grade, bar): the
    same results as one record per state."""
    import dataclasses

    from selector.models import conversions
    from selector.routes.families import supply as S
    from selector.routes.families.base import Batch

    fam = fam_registry.get("supply_induction")
    batch = _family_batch(fam, None, 45.0, None, CORNERS)[0]
    props = S.supply_properties(batch)
    fast = fam._inner().compute(S._with_core(batch, props))
    grades = []
    for i in range(batch.n):                                  # the record of each state, as before
        g = batch.grades[batch.gidx[i]]
        hv = props["hardness_hv"][i]
        hb = float(conversions.hv_to_hb(hv)) if np.isfinite(hv) else g.base_hardness_hb
        grades.append(dataclasses.replace(g, base_uts_mpa=float(props["uts_mpa"][i]),
                                          base_yield_mpa=float(props["yield_mpa"][i]),
                                          base_elongation_pct=float(props["elongation_pct"][i]),
                                          base_hardness_hb=hb))
    slow = fam._inner().compute(Batch(grades, np.arange(batch.n), batch.comp, batch.params, batch.diameter_mm,
                                      batch.thickness_mm))
    assert len(S._with_core(batch, props).grades) < batch.n
    for k in ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "surface_hardness_hv", "case_depth_mm"):
        assert np.array_equal(np.asarray(fast[k], float), np.asarray(slow[k], float), equal_nan=True), k


def _sensitivities(prepared):
    from selector.selection import engine  # noqa: F401  (prepared comes from it)

    m = len(prepared) // 3
    sec = prepared.attrs["section"]
    blocks = [{p: prepared[p].to_numpy(float)[k * m:(k + 1) * m] for p in scatter.SAMPLED} for k in range(3)]
    return scatter.Sensitivities(prepared["state_key"].to_numpy()[:m], *blocks, sec["diameter_mm"],
                                 sec["thickness_mm"])


def _assert_rows_of_effects(sens, prepared, rows):
    sec = prepared.attrs["section"]
    eff = scatter.effects(sec["diameter_mm"], sec["thickness_mm"])
    at = eff["index"].get_indexer(sens.keys[rows])
    assert sens.elements == eff["elements"] and (at >= 0).all()
    for p in scatter.SAMPLED:
        assert np.array_equal(sens.a[p][rows], eff["a"][p][at]), p
        assert np.array_equal(sens.d_lean[p][rows], eff["d_lean"][p][at], equal_nan=True), p
        assert np.array_equal(sens.d_rich[p][rows], eff["d_rich"][p][at], equal_nan=True), p


def test_sensitivities_of_some_states_then_more_equal_their_rows_of_all_states(monkeypatch):
    """Sensitivities computed only for the states asked for (the moved-element compute on
    the thinned rows they interpolate from), then grown to more states, equal those states'
    rows of the pass over every state (effects), bit for bit."""
    from selector.selection import engine
    from selector.selection.targets import meets

    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    prepared = engine.prepare(52.3)
    m = len(prepared) // 3
    sens = _sensitivities(prepared)
    tight = np.flatnonzero(np.asarray(meets(prepared, {"min_yield_mpa": 900}), bool)[:m])
    assert 50 < len(tight) < m // 2
    sens.ensure(tight)
    assert sens.done.sum() == len(tight)
    _assert_rows_of_effects(sens, prepared, tight)
    loose = np.flatnonzero(np.asarray(meets(prepared, {"min_yield_mpa": 500}), bool)[:m])
    sens.ensure(loose)
    _assert_rows_of_effects(sens, prepared, np.union1d(tight, loose))
    sens.ensure(np.arange(m))
    _assert_rows_of_effects(sens, prepared, np.arange(m))


def test_sensitivities_grown_by_a_later_process_from_the_disk_file_equal_a_fresh_pass(monkeypatch, tmp_path):
    """The partial sensitivities are kept on disk: a later store reads what an earlier one
    computed (no rows computed again), grows it, and equals the full pass; a corrupt file is
    rebuilt, never trusted."""
    from selector import cache
    from selector.selection import engine
    from selector.selection.targets import meets

    monkeypatch.setenv("SELECTOR_CACHE_DIR", str(tmp_path))
    monkeypatch.setenv("SELECTOR_DISK_CACHE", "1")
    prepared = engine.prepare(38.9)
    m = len(prepared) // 3
    first = _sensitivities(prepared)
    some = np.flatnonzero(np.asarray(meets(prepared, {"min_yield_mpa": 850}), bool)[:m])
    first.ensure(some)
    assert cache.wait_for_writes(60)
    files = list(tmp_path.glob("*_disk_sensitivities*.npz"))
    assert len(files) == 1
    later = _sensitivities(prepared)                      # reads the file
    assert later.plans is None and np.array_equal(later.done, first.done)
    _assert_rows_of_effects(later, prepared, some)
    calls = []
    real = scatter.Batch
    monkeypatch.setattr(scatter, "Batch", lambda *a, **k: calls.append(len(a[1])) or real(*a, **k))
    later.ensure(some)                                     # nothing new: no compute
    assert calls == []
    more = np.flatnonzero(np.asarray(meets(prepared, {"min_yield_mpa": 600}), bool)[:m])
    later.ensure(more)
    assert calls and sum(calls) < sum(len(pl["idx"]) for _, pl, _ in later.plans)
    monkeypatch.setattr(scatter, "Batch", real)
    _assert_rows_of_effects(later, prepared, np.union1d(some, more))
    assert cache.wait_for_writes(60)                      # the grown store is on disk before it is damaged
    files[0].write_bytes(files[0].read_bytes()[:-200] + b"x" * 200)   # corrupt
    assert cache.load_arrays(scatter._disk_sensitivities, later.section) is None
    again = _sensitivities(prepared)
    assert not again.done.any() and again.plans is not None
    again.ensure(more)
    _assert_rows_of_effects(again, prepared, more)


def test_rerank_for_looser_targets_equals_a_fresh_select_with_them(monkeypatch):
    """Select at a section with tight targets (sensitivities and draws only for the states
    that meet them), then re-rank the same prepared table for looser targets (more states:
    only the missing ones computed): the result equals a fresh select with the looser targets."""
    import pandas as pd

    import selector
    from selector.selection import engine

    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    tight = {"min_yield_mpa": 950, "min_elongation_pct": 10}
    loose = {"min_yield_mpa": 600, "min_elongation_pct": 10}
    selector.select(tight, diameter_mm=36.2)
    prepared = engine.prepare(36.2)
    sens = engine._sample_store(prepared)["sens"]
    before = int(sens.done.sum())
    again = engine.rank(prepared, loose)
    assert sens.done.sum() > before > 0
    _fresh_memos(monkeypatch)
    fresh = engine.rank(engine.prepare(36.2), loose)            # select() = rank() + the fatigue columns
    assert len(fresh) > 10 and fresh["p_meet"].notna().all()
    pd.testing.assert_frame_equal(again.reset_index(drop=True), fresh.reset_index(drop=True), check_exact=True)


def test_notes_as_row_numbers_give_the_texts_and_counts_of_dense_masks():
    """The validity notes carry their states as row numbers (NoteRows): the joined note texts
    and note counts of a Q&T batch equal those built from the same notes as dense bool masks."""
    from selector.routes.evaluate import finish
    from selector.routes.model_inputs import NoteRows
    from selector.states.expand import note_codes

    fam, batch = _qt_batch(71.0)
    res = finish(fam.compute(batch), batch, fam.name, note_rows=True)
    notes = res["notes"]
    sparse = [m for _, m in notes if isinstance(m, NoteRows)]
    assert len(sparse) > 100 and any(len(m.rows) for m in sparse)
    dense = [(msg, np.asarray(m, bool).copy()) for msg, m in notes]
    for (_, m), (_, d) in zip(notes, dense):
        if isinstance(m, NoteRows):
            assert np.array_equal(np.flatnonzero(d), m.rows)
    ta, tb = {}, {}
    ca, cb = note_codes(notes, batch.n, ta), note_codes(dense, batch.n, tb)
    inv_a, inv_b = {v: k for k, v in ta.items()}, {v: k for k, v in tb.items()}
    assert [inv_a[c] for c in ca.tolist()] == [inv_b[c] for c in cb.tolist()]
    assert len(set(ca.tolist())) > 10
    plain = finish(fam.compute(batch), batch, fam.name)["notes"]          # the default: bool masks
    assert [m for m, _ in plain] == [m for m, _ in notes]
    assert all(isinstance(k, np.ndarray) and np.array_equal(k, d) for (_, k), (_, d) in zip(plain, dense))
