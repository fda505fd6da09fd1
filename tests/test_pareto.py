"""Tests of selector.selection.pareto (Pareto front and ranks).

The reference is the definition itself, evaluated by brute force in O(n²):
p dominates q  ⇔  p >= q in every (oriented) objective and p > q in one.
"""
import numpy as np
import pytest

from selector.errors import InputError
from selector.selection.pareto import pareto_mask


def brute_mask(values, maximize):
    x = np.asarray(values, dtype=float) * np.where(maximize, 1.0, -1.0)
    ok = ~np.isnan(x).any(axis=1)
    ge = (x[:, None, :] >= x[None, :, :]).all(axis=-1)
    gt = (x[:, None, :] > x[None, :, :]).any(axis=-1)
    dominated = (ge & gt & ok[:, None]).any(axis=0)
    return ok & ~dominated


def random_set(rng, n, k, kind):
    if kind == "continuous":
        return rng.random((n, k))
    if kind == "ties":          # few distinct levels: many ties and exact duplicates
        return rng.integers(0, 4, size=(n, k)).astype(float)
    if kind == "anticorrelated":  # most points near the front
        x = rng.random((n, k))
        x[:, -1] = 1.0 - x[:, :-1].sum(axis=1) / (k - 1) + 0.01 * rng.random(n)
        return x
    raise ValueError(kind)


SENSES = {2: [(True, True), (False, True), (False, False)],
          3: [(True, True, True), (True, False, True)],
          4: [(True, True, True, True), (False, True, False, True)]}


@pytest.mark.parametrize("k", [2, 3, 4])
@pytest.mark.parametrize("kind", ["continuous", "ties", "anticorrelated"])
@pytest.mark.parametrize("n", [1, 2, 7, 60, 700])   # 700 passes the 2-D pre-filter size
def test_matches_brute_force(k, kind, n):
    rng = np.random.default_rng(1000 * k + n + len(kind))
    for maximize in SENSES[k]:
        x = random_set(rng, n, k, kind)
        got = pareto_mask(x, list(maximize))
        assert got.dtype == bool and got.shape == (n,)
        np.testing.assert_array_equal(got, brute_mask(x, maximize))


@pytest.mark.parametrize("kind,maximize", [("continuous", (True, True)), ("ties", (False, True)),
                                           ("anticorrelated", (True, True))])
def test_large_two_objective_sets_match_brute_force(kind, maximize):
    rng = np.random.default_rng(len(kind))
    x = random_set(rng, 2100, 2, kind)           # above the pre-filter size
    x[rng.choice(2100, 20, replace=False), rng.integers(0, 2)] = np.nan
    np.testing.assert_array_equal(pareto_mask(x, list(maximize)), brute_mask(x, maximize))


@pytest.mark.parametrize("k", [2, 3, 4])
def test_prefilter_paths_on_small_sets(k, monkeypatch):
    # Force the pivot pre-filters (and their repeated passes) onto small inputs.
    from selector.selection import pareto
    monkeypatch.setattr(pareto, "_PREFILTER_MIN_POINTS", 4)
    monkeypatch.setattr(pareto, "_SCALE_SAMPLE", 8)
    monkeypatch.setattr(pareto, "_ND_PREFILTER_MIN_POINTS", 4)
    rng = np.random.default_rng(100 + k)
    for trial in range(60):
        n = int(rng.integers(1, 120))
        x = random_set(rng, n, k, ["continuous", "ties", "anticorrelated"][trial % 3])
        if trial % 4 == 0:
            x[rng.integers(0, n, 2), rng.integers(0, k)] = np.nan
        if trial % 5 == 0:
            x[rng.integers(0, n, 2), 0] = np.inf
        maximize = list(SENSES[k][trial % len(SENSES[k])])
        np.testing.assert_array_equal(pareto_mask(x, maximize), brute_mask(x, maximize))


@pytest.mark.parametrize("k", [2, 3, 4])
def test_nan_rows_never_on_front_and_dominate_nothing(k):
    rng = np.random.default_rng(k)
    x = random_set(rng, 800, k, "ties")
    x[rng.choice(800, 40, replace=False), rng.integers(0, k)] = np.nan
    x[0] = 99.0                       # would dominate everything ...
    x[0, -1] = np.nan                 # ... but has a NaN, so it is ignored
    got = pareto_mask(x, [True] * k)
    assert not got[np.isnan(x).any(axis=1)].any()
    np.testing.assert_array_equal(got, brute_mask(x, [True] * k))
    assert got.any()


@pytest.mark.parametrize("k", [2, 3])
def test_infinities_are_ordinary_values(k):
    rng = np.random.default_rng(7 + k)
    x = random_set(rng, 900, k, "continuous")
    x[rng.choice(900, 30, replace=False), 0] = np.inf
    x[rng.choice(900, 30, replace=False), 1] = -np.inf   # some rows mix +inf and -inf
    for maximize in SENSES[k]:
        np.testing.assert_array_equal(pareto_mask(x, list(maximize)), brute_mask(x, maximize))


def test_exact_duplicates_are_all_kept():
    x = np.array([[1.0, 5.0], [2.0, 4.0], [1.0, 4.0], [2.0, 4.0], [2.0, 4.0], [0.0, 0.0]])
    assert pareto_mask(x, [True, True]).tolist() == [True, True, False, True, True, False]
    x3 = np.vstack([np.tile([3.0, 3.0, 3.0], (5, 1)), [[3.0, 3.0, 2.0], [1.0, 1.0, 4.0]]])
    assert pareto_mask(x3, [True] * 3).tolist() == [True] * 5 + [False, True]


def test_docstring_example():
    assert pareto_mask([[1, 5], [2, 4], [1, 4], [2, 4]], [True, True]).tolist() == [True, True, False, True]


@pytest.mark.parametrize("k,n", [(2, 20000), (3, 5000), (4, 3000)])
def test_front_is_not_dominated_and_everything_else_is(k, n):
    rng = np.random.default_rng(n)
    x = random_set(rng, n, k, "continuous")
    x[: n // 10] = np.round(x[: n // 10], 1)          # some ties
    front = pareto_mask(x, [True] * k)
    f = x[front]
    # no front point is dominated by any point
    ge = (x[:, None, :] >= f[None, :, :]).all(-1) & (x[:, None, :] > f[None, :, :]).any(-1)
    assert not ge.any()
    # every other point is dominated by some front point
    rest = x[~front]
    dom = np.zeros(len(rest), dtype=bool)
    for p in f:
        dom |= (p >= rest).all(axis=1) & (p > rest).any(axis=1)
    assert dom.all()


@pytest.mark.parametrize("k", [2, 3, 4])
def test_invariant_to_row_order(k):
    rng = np.random.default_rng(11 * k)
    x = random_set(rng, 3000, k, "ties")
    x = np.vstack([x, random_set(rng, 3000, k, "continuous")])
    base = pareto_mask(x, [True] * k)
    for _ in range(3):
        perm = rng.permutation(len(x))
        np.testing.assert_array_equal(pareto_mask(x[perm], [True] * k), base[perm])


def test_one_objective_keeps_every_copy_of_the_best():
    assert pareto_mask([[3.0], [1.0], [3.0], [np.nan]], [True]).tolist() == [True, False, True, False]
    assert pareto_mask([[3.0], [1.0], [1.0]], [False]).tolist() == [False, True, True]


def test_empty_and_all_nan():
    assert pareto_mask(np.empty((0, 2)), [True, True]).shape == (0,)
    assert not pareto_mask(np.full((5, 3), np.nan), [True] * 3).any()


@pytest.mark.parametrize("values,maximize,field", [
    ([1.0, 2.0, 3.0], [True], "values"),               # 1-D
    ([["a", "b"]], [True, True], "values"),
    ([[1.0, 2.0]], [True], "maximize"),                 # wrong length
    ([[1.0, 2.0]], ["max", "max"], "maximize"),         # not bools
    ([[1.0, 2.0]], "max", "maximize"),
])
def test_bad_input_names_the_field(values, maximize, field):
    with pytest.raises(InputError) as exc:
        pareto_mask(values, maximize)
    assert exc.value.field == field


@pytest.mark.slow                 # numba compiles paretoset's kernel on first call (~5 s)
def test_agrees_with_paretoset_package():
    # Independent implementation (paretoset on PyPI, block-nested-loops); distinct=False
    # keeps every duplicate, as we do.
    paretoset = pytest.importorskip("paretoset")
    rng = np.random.default_rng(42)
    for k in (2, 3):
        x = np.vstack([rng.random((5000, k)), rng.integers(0, 5, (2000, k)).astype(float)])
        theirs = paretoset.paretoset(x, sense=["max"] * k, distinct=False)
        np.testing.assert_array_equal(pareto_mask(x, [True] * k), theirs)
