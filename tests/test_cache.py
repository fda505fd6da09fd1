"""The on-disk table cache (selector/cache.py): cached runs equal from-scratch runs bit
for bit, and a corrupt, stale or foreign cache file is detected and rebuilt."""
from __future__ import annotations

import os
import subprocess
import sys
import textwrap
import time
import threading
import zipfile

import numpy as np
import pandas as pd
import pytest

from selector import cache
from selector.models import aging, cooling
from selector.routes import quench_response as qr
from selector.selection import engine


@pytest.fixture
def cache_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("SELECTOR_CACHE_DIR", str(tmp_path))
    monkeypatch.delenv("SELECTOR_DISK_CACHE", raising=False)
    cooling._rate_table.cache_clear()
    yield tmp_path
    cooling._rate_table.cache_clear()


def _counting(monkeypatch):
    """Count calls of the cooling table's builder (the function behind the cache)."""
    calls = []
    real = cooling._rate_table.build

    def counted(*args):
        calls.append(args)
        return real(*args)

    monkeypatch.setattr(cooling._rate_table, "build", counted)
    return calls


def test_cache_dir_follows_the_environment(tmp_path, monkeypatch):
    monkeypatch.setenv("SELECTOR_CACHE_DIR", str(tmp_path / "a"))
    assert cache.cache_dir() == tmp_path / "a"
    monkeypatch.delenv("SELECTOR_CACHE_DIR")
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "xdg"))
    assert cache.cache_dir() == tmp_path / "xdg" / "selector"


def test_rate_table_from_disk_is_bit_identical_to_a_fresh_build(cache_dir):
    fresh = cooling._rate_table.build("cylinder", qr.POSITIONS)          # no cache of any kind
    first = cooling._rate_table("cylinder", qr.POSITIONS)                # builds and writes
    assert cache.wait_for_writes(60)                                     # the write goes behind the answer
    path = cooling._rate_table.cache_path("cylinder", qr.POSITIONS)
    assert path.exists() and path.parent == cache_dir
    cooling._rate_table.cache_clear()
    loaded = cooling._rate_table("cylinder", qr.POSITIONS)               # read from disk
    assert loaded is not first
    assert loaded.dtype == fresh.dtype and loaded.shape == fresh.shape
    assert loaded.tobytes() == fresh.tobytes() and first.tobytes() == fresh.tobytes()
    assert not loaded.flags.writeable


def test_cooling_rates_through_the_cache_equal_the_uncached_chain(cache_dir, monkeypatch):
    h = np.array([300.0, 1500.0, 6000.0])
    d = np.array([12.0, 40.0, 95.0])
    with_disk = cooling.cooling_rate_at_c_s(h, diameter_mm=d)
    assert cache.wait_for_writes(60)
    cooling._rate_table.cache_clear()
    with_disk_again = cooling.cooling_rate_at_c_s(h, diameter_mm=d)      # second process: from the file
    monkeypatch.setenv("SELECTOR_DISK_CACHE", "0")
    cooling._rate_table.cache_clear()
    no_disk = cooling.cooling_rate_at_c_s(h, diameter_mm=d)
    assert with_disk.tobytes() == no_disk.tobytes() == with_disk_again.tobytes()


@pytest.mark.parametrize("damage", ["truncate", "flip", "garbage", "foreign_key"])
def test_corrupt_cache_file_is_detected_and_rebuilt(cache_dir, monkeypatch, damage):
    good = cooling._rate_table("cylinder", (0.0,)).copy()
    assert cache.wait_for_writes(60)
    path = cooling._rate_table.cache_path("cylinder", (0.0,))
    raw = path.read_bytes()
    if damage == "truncate":
        path.write_bytes(raw[: len(raw) // 2])
    elif damage == "flip":
        # change one float of the table inside the archive, keep the archive itself valid
        with np.load(path) as z:
            data = {k: z[k] for k in z.files}
        arr = data["arr_0"].copy()
        arr.flat[7] = arr.flat[7] + 1.0
        data["arr_0"] = arr
        np.savez(path, **data)
    elif damage == "garbage":
        path.write_bytes(b"not a cache file" * 10)
    else:
        # a whole, self-consistent file written for other arguments
        other = cooling._rate_table.cache_path("cylinder", (0.5,))
        cooling._rate_table("cylinder", (0.5,))
        assert cache.wait_for_writes(60)
        path.write_bytes(other.read_bytes())
    if damage != "garbage":
        assert zipfile.is_zipfile(path) or damage == "truncate"
    calls = _counting(monkeypatch)
    cooling._rate_table.cache_clear()
    again = cooling._rate_table("cylinder", (0.0,))
    assert calls == [("cylinder", (0.0,))]                    # rebuilt, not read
    assert again.tobytes() == good.tobytes()
    assert cache.wait_for_writes(60)
    # and the file is whole again: the next process reads it without building
    calls.clear()
    cooling._rate_table.cache_clear()
    cooling._rate_table("cylinder", (0.0,))
    assert calls == []


def test_changed_builder_source_gives_a_new_key(cache_dir, monkeypatch):
    key = cache.table_key(cooling._rate_table.build, ("cylinder", (0.0,)), {})
    monkeypatch.setattr(cache, "_source_hash", lambda module: "edited source")
    assert cache.table_key(cooling._rate_table.build, ("cylinder", (0.0,)), {}) != key


def test_unwritable_cache_directory_only_costs_the_rebuild(tmp_path, monkeypatch):
    blocker = tmp_path / "file"
    blocker.write_text("a file where the cache directory should be")
    monkeypatch.setenv("SELECTOR_CACHE_DIR", str(blocker / "sub"))
    cooling._rate_table.cache_clear()
    try:
        tab = cooling._rate_table("cylinder", (0.0,))
    finally:
        cooling._rate_table.cache_clear()
    assert tab.tobytes() == cooling._rate_table.build("cylinder", (0.0,)).tobytes()


def test_aging_constant_from_the_cache_equals_the_solved_value(cache_dir):
    solved = aging._shape_peak_table.build()
    aging._shape_peak_table.cache_clear()
    aging._shape_peak_table()
    assert cache.wait_for_writes(60)
    aging._shape_peak_table.cache_clear()
    loaded = aging._shape_peak_table()
    assert loaded.tobytes() == solved.tobytes()
    aging._shape_peak_table.cache_clear()


def test_prepared_table_from_disk_equals_a_fresh_computation(cache_dir):
    args = (47.0, None, 120.0, (("4140", 2.5),))
    fresh = engine._prepare_table.build(*args)
    engine._prepare_table(*args)                                # builds and writes
    assert cache.wait_for_writes(60)
    files = list(cache_dir.glob("selector.selection.engine._prepare_table-*.npz"))
    assert len(files) == 1
    loaded = engine._prepare_table(*args)                       # read from disk
    pd.testing.assert_frame_equal(loaded, fresh, check_exact=True)
    assert list(loaded.dtypes) == list(fresh.dtypes)
    assert loaded.attrs == fresh.attrs
    # the selection on the loaded table is the same as on the fresh one
    t = {"min_yield_mpa": 700, "min_elongation_pct": 12}
    pd.testing.assert_frame_equal(engine.rank(loaded, t), engine.rank(fresh, t), check_exact=True)


def test_corrupt_prepared_table_is_rebuilt(cache_dir, monkeypatch):
    args = (52.0, None, 100.0, ())
    first = engine._prepare_table(*args)
    assert cache.wait_for_writes(60)
    (path,) = cache_dir.glob("selector.selection.engine._prepare_table-*.npz")
    with np.load(path) as z:
        data = {k: z[k] for k in z.files}
    # damage one float of the stored table (the stacked float64 columns), keep the archive valid
    names = [str(n) for n in data["arr_0"]]
    i = next(i for i, n in enumerate(names) if n.startswith("g") and data[f"arr_{i + 1}"].dtype == np.float64)
    arr = data[f"arr_{i + 1}"].copy()
    arr[0, 0] = -1.0 if arr[0, 0] != -1.0 else -2.0
    data[f"arr_{i + 1}"] = arr
    np.savez(path, **data)
    calls = []
    real = engine._prepare_table.build

    def counted(*a):
        calls.append(a)
        return real(*a)

    monkeypatch.setattr(engine._prepare_table, "build", counted)
    again = engine._prepare_table(*args)
    assert calls == [args]                                      # checksum failed: rebuilt, not read
    pd.testing.assert_frame_equal(again, first, check_exact=True)
    assert cache.wait_for_writes(60)
    calls.clear()
    pd.testing.assert_frame_equal(engine._prepare_table(*args), first, check_exact=True)
    assert calls == []                                          # the rewritten file is whole


def test_frame_layout_round_trip_keeps_text_missing_values_and_dtypes():
    df = pd.DataFrame({"a": [1.5, np.nan, -0.0], "b": ["x", None, "x"], "c": [1, 2, 3],
                       "d": [True, False, True]})
    df.attrs["section"] = {"diameter_mm": 30.0, "thickness_mm": None}
    back = cache.arrays_to_frame(cache.frame_to_arrays(df))
    pd.testing.assert_frame_equal(back, df, check_exact=True)
    assert np.signbit(back["a"].to_numpy()[2])
    assert back.attrs == df.attrs


def test_frame_layout_refuses_what_it_cannot_hold():
    assert cache.frame_to_arrays(pd.DataFrame({"a": [1.0]}, index=[5])) is None
    assert cache.frame_to_arrays(pd.DataFrame({"a": [[1, 2]]})) is None


def test_object_text_column_coded_by_its_values_objects_round_trips_exactly():
    """An object text column is coded by the identity of its values (rows that share one str
    object share a code): equal texts held as distinct objects, missing values (None, NaN)
    and shared objects all read back equal; a non-text or unhashable value is refused."""
    long = "note " * 300
    twin = "".join(["note "] * 300)                          # equal text, another object
    assert long == twin and long is not twin
    df = pd.DataFrame({"n": pd.Series([long, None, twin, long, np.nan, "a"], dtype=object)})
    arrays = cache.frame_to_arrays(df)
    back = cache.arrays_to_frame(arrays)
    pd.testing.assert_frame_equal(back, df, check_exact=True)
    assert back["n"].dtype == object and back["n"].isna().tolist() == [False, True, False, False, True, False]
    assert cache.frame_to_arrays(pd.DataFrame({"n": pd.Series(["a", 1.5], dtype=object)})) is None
    assert cache.frame_to_arrays(pd.DataFrame({"n": pd.Series(["a", ["b"]], dtype=object)})) is None


def test_frame_file_holds_a_few_stacked_arrays_not_several_per_column():
    df = pd.DataFrame({f"x{i}": np.arange(4, dtype=float) + i for i in range(30)}
                      | {f"t{i}": ["a", "b", None, "a"] for i in range(10)} | {"n": [1, 2, 3, 4]})
    arrays = cache.frame_to_arrays(df)
    assert len(arrays) < 15                                  # 41 columns
    back = cache.arrays_to_frame(arrays)
    pd.testing.assert_frame_equal(back, df, check_exact=True)
    assert list(back.dtypes) == list(df.dtypes)


def test_texts_pack_and_unpack_exactly():
    texts = ["", "ä | µm", "x" * 5000, "line\nbreak", "\x00inner"]
    blob, off = cache.pack_texts(texts)
    assert blob.dtype == np.uint8 and len(off) == len(texts) + 1
    assert cache.unpack_texts(blob, off) == texts
    with pytest.raises(ValueError):
        cache.unpack_texts(blob, off[:-1])


def test_code_and_data_hash_leaves_the_views_out(monkeypatch):
    # an edit of the page or the CLI must not throw the cached tables away; every model,
    # route, state, rule and selection module and every data file still counts
    from pathlib import Path
    from selector import cache as cache_mod
    read = []
    real = Path.read_bytes
    monkeypatch.setattr(Path, "read_bytes", lambda self: read.append(self) or real(self))
    cache_mod.code_and_data_hash.cache_clear()
    try:
        cache_mod.code_and_data_hash()
    finally:
        cache_mod.code_and_data_hash.cache_clear()
    parts = [p.parts for p in read]
    assert not any("views" in ps and "selector" in ps for ps in parts)
    for layer in ("models", "routes", "states", "rules", "selection", "catalogue"):
        assert any(layer in ps for ps in parts), layer
    assert any(p.suffix == ".csv" for p in read)


# --------------------------------------------------------------------------- writes behind the answer
@cache.disk_table
def _small_table(n):
    """A tiny constant table for the write-behind tests."""
    return np.arange(float(n))


def _gated_save(monkeypatch):
    """Replace the file writer by one that waits for ``gate`` and records what it writes."""
    gate, started, written = threading.Event(), threading.Event(), []
    real = cache._save

    def save(path, key, arrays, was_tuple):
        started.set()
        assert gate.wait(60)
        written.append({k: np.array(v, copy=True) for k, v in arrays.items()})
        return real(path, key, arrays, was_tuple)

    monkeypatch.setattr(cache, "_save", save)
    return gate, started, written


def test_cache_file_is_written_behind_the_answer(cache_dir, monkeypatch):
    """The value comes back while its file is still being written; the file is whole once
    the writer is done, and a later process reads it without building."""
    monkeypatch.delenv("SELECTOR_WRITE_BEHIND", raising=False)
    gate, started, _ = _gated_save(monkeypatch)
    _small_table.cache_clear()
    value = _small_table(5)                                  # returns: the write waits for the gate
    assert value.tolist() == [0.0, 1.0, 2.0, 3.0, 4.0]
    assert started.wait(60)
    path = _small_table.cache_path(5)
    assert not path.exists()
    assert not cache.wait_for_writes(0.05)                   # still pending
    gate.set()
    assert cache.wait_for_writes(60) and path.exists()
    _small_table.cache_clear()
    monkeypatch.setattr(_small_table, "build", lambda n: pytest.fail("read from the file, not built"))
    assert _small_table(5).tobytes() == value.tobytes()
    _small_table.cache_clear()


def test_writes_behind_keep_their_order_and_what_was_asked(cache_dir, monkeypatch):
    """Two writes of one store: the file ends with the later one; a caller that changes its
    array after asking does not change what is written (a private copy)."""
    monkeypatch.delenv("SELECTOR_WRITE_BEHIND", raising=False)
    gate, started, written = _gated_save(monkeypatch)
    first = {"x": np.arange(3.0)}
    assert cache.save_arrays(_small_table, (7,), first)
    first["x"][:] = -1.0                                     # the caller reuses its array at once
    assert cache.save_arrays(_small_table, (7,), {"x": np.arange(4.0)})
    assert started.wait(60)
    gate.set()
    assert cache.wait_for_writes(60)
    assert len(written) == 2
    assert written[0]["arr_1"].tolist() == [0.0, 1.0, 2.0]     # arr_0: the names, arr_1: "x"
    assert cache.load_arrays(_small_table, (7,))["x"].tolist() == [0.0, 1.0, 2.0, 3.0]


def test_write_behind_off_writes_in_the_callers_thread(cache_dir, monkeypatch):
    monkeypatch.setenv("SELECTOR_WRITE_BEHIND", "0")
    _small_table.cache_clear()
    _small_table(6)
    assert _small_table.cache_path(6).exists()               # no wait: written before the return
    _small_table.cache_clear()


def test_process_exit_waits_for_a_pending_write(tmp_path):
    """A process that ends right after its answer still leaves a whole file (the writer is
    not a daemon thread): here the write is held back for 1 s after the last statement."""
    code = textwrap.dedent("""
        import time
        import numpy as np
        from selector import cache
        real = cache._save
        def slow(*a, **k):
            time.sleep(1.0)
            return real(*a, **k)
        cache._save = slow
        @cache.disk_table
        def table(n):
            return np.arange(float(n))
        print(table(4).tolist())
    """)
    env = {**os.environ, "SELECTOR_CACHE_DIR": str(tmp_path), "SELECTOR_DISK_CACHE": "1"}
    env.pop("SELECTOR_WRITE_BEHIND", None)
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, env=env, timeout=120)
    assert r.returncode == 0, r.stderr
    assert r.stdout.strip() == "[0.0, 1.0, 2.0, 3.0]"
    (path,) = tmp_path.glob("__main__.table-*.npz")
    with np.load(path) as z:
        assert z["arr_0"].tolist() == [0.0, 1.0, 2.0, 3.0]


@cache.disk_frame
def _small_frame(n):
    """A tiny states-like table for the write-behind test of frames."""
    return pd.DataFrame({"a": np.arange(float(n)), "t": ["x", "y"] * (n // 2)})


def test_frame_changed_after_the_answer_is_written_as_returned(cache_dir, monkeypatch):
    """The frame is turned into arrays on the writer thread (pandas >= 3) or before the return:
    either way a caller that changes its frame at once (a value, a new column) does not change
    the file, which holds the frame as built."""
    monkeypatch.delenv("SELECTOR_WRITE_BEHIND", raising=False)
    gate, started, _ = _gated_save(monkeypatch)
    df = _small_frame(4)
    df.loc[0, "a"] = 99.0
    df["b"] = 1.0
    gate.set()
    assert cache.wait_for_writes(60)
    monkeypatch.setattr(_small_frame, "build", lambda n: pytest.fail("read from the file, not built"))
    pd.testing.assert_frame_equal(_small_frame(4), _small_frame.__wrapped__(4), check_exact=True)


def _fake_table_file(directory, name, megabytes, age_s):
    """A file named like the package's table files, of ``megabytes``, last written ``age_s`` ago."""
    p = directory / f"selector.selection.engine._prepare_table-{name}.npz"
    p.write_bytes(b"\0" * int(megabytes * 1e6))
    t = time.time() - age_s
    os.utime(p, (t, t))
    return p


def test_cache_directory_kept_within_its_byte_budget(tmp_path):
    """Oldest files go first until the rest fit the budget; the file just written always stays;
    files that are not the package's table files are not touched."""
    old = _fake_table_file(tmp_path, "a" * 32, 3.0, 300)
    mid = _fake_table_file(tmp_path, "b" * 32, 3.0, 200)
    new = _fake_table_file(tmp_path, "c" * 32, 3.0, 100)
    just = _fake_table_file(tmp_path, "d" * 32, 3.0, 0)
    other = tmp_path / "notes.npz"
    other.write_bytes(b"\0" * 4_000_000)
    # a constant table (the oldest file): counted, never removed (it costs seconds to rebuild)
    constant = tmp_path / f"selector.models.cooling._rate_table-{'f' * 32}.npz"
    constant.write_bytes(b"\0" * 1_000_000)
    os.utime(constant, (time.time() - 1000, time.time() - 1000))
    cache._prune_bytes(tmp_path, just, 8.0e6)                 # room for two files of 3 MB and the 1 MB table
    assert just.exists() and new.exists() and constant.exists()
    assert not mid.exists() and not old.exists()
    assert other.exists()
    cache._prune_bytes(tmp_path, just, 0.0)                   # even a zero budget keeps the file just written
    assert just.exists() and not new.exists() and constant.exists()


def test_cache_budget_from_the_environment(monkeypatch):
    monkeypatch.delenv("SELECTOR_CACHE_MAX_MB", raising=False)
    assert cache.cache_budget_bytes() == cache.MAX_CACHE_MB * 1e6
    monkeypatch.setenv("SELECTOR_CACHE_MAX_MB", "64")
    assert cache.cache_budget_bytes() == 64e6
    for bad in ("-1", "lots", "inf", "nan"):
        monkeypatch.setenv("SELECTOR_CACHE_MAX_MB", bad)
        with pytest.warns(RuntimeWarning, match=r"SELECTOR_CACHE_MAX_MB=.*megabytes >= 0"):
            assert cache.cache_budget_bytes() == cache.MAX_CACHE_MB * 1e6


def test_a_written_table_keeps_the_directory_within_budget(cache_dir, monkeypatch):
    """Through the real write path: with a budget of 1 MB, older table files are removed when a
    new table file is written."""
    monkeypatch.setenv("SELECTOR_CACHE_MAX_MB", "1")
    stale = _fake_table_file(cache_dir, "e" * 32, 2.0, 100)
    assert cache.save_arrays(_small_table, (11,), {"x": np.arange(5.0)})
    assert cache.wait_for_writes(60)
    assert not stale.exists()
    assert cache.load_arrays(_small_table, (11,))["x"].tolist() == [0.0, 1.0, 2.0, 3.0, 4.0]
