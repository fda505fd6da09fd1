"""The shortcuts of the speed work (issue 13) give the numbers of the direct computation,
bit for bit: the band lookup per distinct (family, section), the as-quenched profile per
distinct quench, and the sensitivities read back from the disk cache."""
import numpy as np

from selector.routes import bands, families as fam_registry, quench_response
from selector.routes.evaluate import _band_columns
from selector.routes.families.quench_temper import _as_quenched_distinct
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
    fast = _as_quenched_distinct(sub, p["quench"], p["agitation"], np.asarray(p["austenitize_c"], float))
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
