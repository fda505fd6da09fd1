"""Build-once tables kept on disk between processes.

Some tables depend only on constants of the code (the quench-cooling rate table of
:mod:`selector.models.cooling` takes about 2 s to build from the exact series).  The
:func:`disk_table` decorator builds such a table once, saves it as an ``.npz`` file
under the user's cache directory and loads it in later processes.  :func:`disk_frame`
does the same for a DataFrame that depends on all the code and data (the prepared
states table of one section, :mod:`selector.selection.engine`), keyed by a hash of
every source and data file.

A cache file is never trusted:

* its name and its stored key are a SHA-256 of the builder's qualified name, its
  arguments, the package version, the numpy and scipy versions and the **source
  text of the builder's module** (a change of the model code gives a new key, so a
  stale table is never read);
* it carries a SHA-256 checksum of every stored array (dtype, shape and bytes),
  verified on load; a file that fails to load, has the wrong key or the wrong
  checksum is rebuilt from scratch and rewritten;
* it is written atomically (a temporary file in the same directory, then
  ``os.replace``), so a reader never sees half a file.

Writes happen **behind the answer**: the value is returned at once and one writer
thread of the process (not a daemon: the interpreter waits for it before it exits)
checksums and writes the file, in the order the writes were asked for.  The arrays
handed to it are read-only or private copies, so nothing the caller does later can
change a file being written.  :func:`wait_for_writes` waits for the pending writes
(the tests and the benchmark call it); ``SELECTOR_WRITE_BEHIND=0`` writes in the
caller's thread instead.

The result is bit-identical to a fresh build (``.npz`` stores float64 exactly;
``tests/test_cache.py`` checks it).  Within one process the table is also kept in
memory.  Returned arrays are read-only.

Cache directory: ``$SELECTOR_CACHE_DIR`` if set, else ``$XDG_CACHE_HOME/selector``,
else ``~/.cache/selector`` (the XDG base-directory convention).  Its table files are kept
within :data:`MAX_CACHE_MB` (``$SELECTOR_CACHE_MAX_MB``), the oldest removed first.  Set
``SELECTOR_DISK_CACHE=0`` to build in every process without touching the disk.
An unwritable directory only costs the rebuild; it is never an error.
"""
from __future__ import annotations

import collections
import functools
import hashlib
import inspect
import os
import sys
import tempfile
import threading
import zipfile
from pathlib import Path

import numpy as np

#: bump to invalidate every cache file written by an older layout of this module
FORMAT = 3
_KEY_NAME = "__key__"
_SUM_NAME = "__checksum__"
_TUPLE_NAME = "__tuple__"


def cache_dir() -> Path:
    """Directory of the table cache (resolved at each call, so the environment can change it)."""
    env = os.environ.get("SELECTOR_CACHE_DIR")
    if env:
        return Path(env).expanduser()
    xdg = os.environ.get("XDG_CACHE_HOME")
    base = Path(xdg).expanduser() if xdg else Path.home() / ".cache"
    return base / "selector"


def disk_enabled() -> bool:
    return os.environ.get("SELECTOR_DISK_CACHE", "1").strip().lower() not in ("0", "off", "false", "no")


@functools.cache
def _package_version() -> str:
    """The version in the checkout's pyproject.toml, else the installed metadata
    (``importlib.metadata`` costs ~0.1 s, so it is the fallback)."""
    import re
    pyproject = Path(__file__).resolve().parents[1] / "pyproject.toml"
    try:
        m = re.search(r'^version\s*=\s*"([^"]+)"', pyproject.read_text(encoding="utf-8"), re.M)
        if m:
            return m.group(1)
    except OSError:
        pass
    try:
        from importlib.metadata import version
        return version("selector")
    except Exception:                      # not installed: the source hash still keys the file
        return "unknown"


@functools.cache
def _source_hash(module_name: str) -> str:
    mod = sys.modules[module_name]
    try:
        text = Path(inspect.getsourcefile(mod)).read_bytes()
    except (TypeError, OSError):
        text = repr(module_name).encode()
    return hashlib.sha256(text).hexdigest()


def _library_versions() -> str:
    import numpy
    import scipy          # the tables are built with scipy.special; its version is part of the key
    return f"numpy={numpy.__version__};scipy={scipy.__version__}"


def _key(func, args: tuple, kwargs: dict, *extra: str) -> str:
    """SHA-256 of the builder, its arguments, the versions and ``extra`` lines."""
    text = "\n".join([
        f"format={FORMAT}",
        f"builder={func.__module__}.{func.__qualname__}",
        f"args={args!r}",
        f"kwargs={sorted(kwargs.items())!r}",
        f"package={_package_version()}",
        _library_versions(),
        *extra,
    ])
    return hashlib.sha256(text.encode()).hexdigest()


def table_key(func, args: tuple, kwargs: dict) -> str:
    """SHA-256 key of one table: builder, arguments, versions and the module's source text."""
    return _key(func, args, kwargs, f"source={_source_hash(func.__module__)}")


def _as_dict(value) -> dict:
    if isinstance(value, np.ndarray):
        return {"arr_0": value}
    if isinstance(value, tuple) and all(isinstance(v, np.ndarray) for v in value):
        return {f"arr_{i}": v for i, v in enumerate(value)}
    raise TypeError(f"disk_table builders return an ndarray or a tuple of ndarrays, not {type(value).__name__}")


def _from_dict(arrays: dict, was_tuple: bool):
    vals = [arrays[f"arr_{i}"] for i in range(len(arrays))]
    for v in vals:
        v.setflags(write=False)
    return tuple(vals) if was_tuple else vals[0]


def checksum(arrays: dict) -> str:
    """SHA-256 over the names, dtypes, shapes and bytes of ``arrays``."""
    h = hashlib.sha256()
    for name in sorted(arrays):
        a = np.ascontiguousarray(arrays[name])
        h.update(f"{name}|{a.dtype.str}|{a.shape}|".encode())
        try:
            h.update(memoryview(a).cast("B"))        # the same bytes, without a copy
        except (TypeError, ValueError):
            h.update(a.tobytes())
    return h.hexdigest()


def _stem(func) -> str:
    """The start of the names of ``func``'s cache files: ``module.qualname-``."""
    return f"{func.__module__}.{func.__qualname__}-"


def table_path(func, key: str) -> Path:
    return cache_dir() / f"{_stem(func)}{key[:32]}.npz"


def _load(path: Path, key: str):
    """The arrays stored at ``path`` if the file is whole, has ``key`` and its checksum; else None."""
    try:
        with open(path, "rb") as f, np.load(f, allow_pickle=False) as z:
            data = {n: z[n] for n in z.files}
    except (OSError, ValueError, EOFError, zipfile.BadZipFile, KeyError):
        return None
    stored_key = data.pop(_KEY_NAME, None)
    stored_sum = data.pop(_SUM_NAME, None)
    was_tuple = data.pop(_TUPLE_NAME, None)
    if stored_key is None or stored_sum is None or was_tuple is None or str(stored_key) != key:
        return None
    if not data or set(data) != {f"arr_{i}" for i in range(len(data))} or str(stored_sum) != checksum(data):
        return None
    return data, bool(was_tuple)


def _save(path: Path, key: str, arrays: dict, was_tuple: bool) -> bool:
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        total = checksum(arrays)
        fd, tmp = tempfile.mkstemp(prefix=path.name + ".", suffix=".tmp", dir=path.parent)
        try:
            with os.fdopen(fd, "wb") as f:
                # straight into the file (no in-memory copy of the whole archive first)
                np.savez(f, **arrays, **{_KEY_NAME: np.array(key), _SUM_NAME: np.array(total),
                                         _TUPLE_NAME: np.array(was_tuple)})
                f.flush()
                os.fsync(f.fileno())
            os.replace(tmp, path)
        except BaseException:
            try:
                os.unlink(tmp)
            except OSError:
                pass
            raise
        return True
    except OSError:
        return False


# --------------------------------------------------------------------------- writes behind the answer
_PENDING: collections.deque = collections.deque()
_WRITER_LOCK = threading.Lock()
_WRITER: threading.Thread | None = None
_WRITER_IDLE = threading.Condition(_WRITER_LOCK)


def write_behind_enabled() -> bool:
    return os.environ.get("SELECTOR_WRITE_BEHIND", "1").strip().lower() not in ("0", "off", "false", "no")


#: seconds the writer leaves the process alone after a write is asked for: the answer is
#: shown (the page's rerun, the CLI's table) before the file is written, instead of both
#: sharing the interpreter at once; a process that ends, or :func:`wait_for_writes`, cuts it short
WRITE_DELAY_S = 0.5
_HURRY = threading.Event()


def _writer_loop() -> None:
    global _WRITER
    _HURRY.wait(WRITE_DELAY_S)
    while True:
        with _WRITER_LOCK:
            if not _PENDING:
                _WRITER = None
                _WRITER_IDLE.notify_all()
                return
            job = _PENDING.popleft()
        try:
            job()
        except Exception:          # a cache write never fails the caller; the next reader rebuilds
            pass


def _submit(job) -> None:
    """Run ``job`` (a cache write) on the writer thread, after the writes asked for before
    it; in the caller's thread when write-behind is off."""
    global _WRITER
    if not write_behind_enabled():
        job()
        return
    with _WRITER_LOCK:
        _PENDING.append(job)
        if _WRITER is None:
            _WRITER = threading.Thread(target=_writer_loop, name="selector-cache-writer", daemon=False)
            _WRITER.start()


def wait_for_writes(timeout: float | None = None) -> bool:
    """Wait until every cache write asked for so far is on disk (or given up on).
    Returns False if ``timeout`` seconds passed first."""
    _HURRY.set()
    try:
        with _WRITER_LOCK:
            return _WRITER_IDLE.wait_for(lambda: _WRITER is None and not _PENDING, timeout)
    finally:
        _HURRY.clear()


def _after_fork_in_child() -> None:
    """A forked worker has no writer thread: its own writes start a new one."""
    global _WRITER, _WRITER_LOCK, _WRITER_IDLE, _HURRY
    _HURRY = threading.Event()
    _WRITER_LOCK = threading.Lock()
    _WRITER_IDLE = threading.Condition(_WRITER_LOCK)
    _WRITER = None
    _PENDING.clear()


if hasattr(os, "register_at_fork"):
    os.register_at_fork(after_in_child=_after_fork_in_child)


def _hurry() -> None:
    _HURRY.set()


# when the main thread ends, the writer starts at once (called before the interpreter joins
# its threads; the hook concurrent.futures uses, Python >= 3.9)
getattr(threading, "_register_atexit", lambda f: None)(_hurry)


def _private(arrays: dict) -> dict:
    """``arrays`` safe to write later: read-only arrays as they are, writable ones copied."""
    out = {}
    for k, v in arrays.items():
        a = np.asarray(v)
        out[k] = a if not a.flags.writeable and a.base is None else a.copy()
    return out


def disk_table(func):
    """Decorator for a pure builder of a constant numeric table (an ndarray or a tuple
    of ndarrays) whose arguments are plain hashable values (str, float, int, tuples).

    The first call in a process loads the table from the cache directory if a valid
    file exists, otherwise builds it and writes the file; later calls return the same
    (read-only) arrays from memory.  ``wrapper.build(*args)`` always builds from
    scratch (no cache of any kind); ``wrapper.cache_clear()`` empties the in-memory
    copy; ``wrapper.cache_path(*args)`` is the file it uses.
    """
    memo: dict = {}
    lock = threading.Lock()

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        mkey = (args, tuple(sorted(kwargs.items())))
        hit = memo.get(mkey)
        if hit is not None:
            return hit
        with lock:
            hit = memo.get(mkey)
            if hit is not None:
                return hit
            value = _cached_build(func, wrapper.build, args, kwargs)
            memo[mkey] = value
            return value

    def cache_path(*args, **kwargs) -> Path:
        return table_path(func, table_key(func, args, kwargs))

    wrapper.build = func
    wrapper.cache_clear = memo.clear
    wrapper.cache_path = cache_path
    return wrapper


def _cached_build(func, build, args, kwargs):
    """The table of ``func`` (which names the file and the key) from disk, else from ``build``."""
    if not disk_enabled():
        value = build(*args, **kwargs)
        return _from_dict(_as_dict(value), isinstance(value, tuple))
    key = table_key(func, args, kwargs)
    path = table_path(func, key)
    loaded = _load(path, key)
    if loaded is not None:
        return _from_dict(*loaded)
    value = build(*args, **kwargs)
    arrays = _as_dict(value)
    was_tuple = isinstance(value, tuple)
    out = _from_dict(arrays, was_tuple)          # read-only from here on: safe to write behind
    _submit(functools.partial(_save, path, key, arrays, was_tuple))
    return out


# --------------------------------------------------------------------------- tables of states
#: most frame files kept in the cache directory (the oldest are removed beyond it)
MAX_FRAME_FILES = 48
#: most megabytes of the package's table files kept in the cache directory, the newest first
#: (a prepared states table is about 25 MB, the sensitivities of a section about 6 MB: 48 of
#: each would be 1.5 GB); ``$SELECTOR_CACHE_MAX_MB`` sets another budget
MAX_CACHE_MB = 512.0


def cache_budget_bytes() -> float:
    """The byte budget of the cache directory: ``$SELECTOR_CACHE_MAX_MB`` (megabytes, >= 0)
    if set, else :data:`MAX_CACHE_MB`.  A value that is not a number >= 0 is reported (a
    warning naming the variable, its value and what is allowed) and the default applies."""
    env = os.environ.get("SELECTOR_CACHE_MAX_MB", "").strip()
    if not env:
        return MAX_CACHE_MB * 1e6
    try:
        mb = float(env)
    except ValueError:
        mb = float("nan")
    if not (mb >= 0.0) or mb == float("inf"):
        import warnings
        warnings.warn(f"SELECTOR_CACHE_MAX_MB={env!r} is not allowed: a number of megabytes >= 0 is; "
                      f"the default {MAX_CACHE_MB:g} MB applies", RuntimeWarning, stacklevel=2)
        mb = MAX_CACHE_MB
    return mb * 1e6


@functools.cache
def code_and_data_hash() -> str:
    """SHA-256 over every source file of the package and every file under ``data/``
    (relative path and bytes): a key part for results that depend on all the models
    and the whole catalogue.  ``selector/views/`` is left out: the faces sit above every
    layer a cached table is computed in (tests/test_layers.py), so an edit of the page
    or the CLI keeps the tables."""
    pkg = Path(__file__).resolve().parent
    h = hashlib.sha256()
    roots = [pkg]
    try:
        from .catalogue.loader import data_dir   # lazy: the loader imports pandas, a numpy table needs none
        roots.append(Path(data_dir()).resolve())
    except Exception:                                  # pragma: no cover - data dir always present
        pass
    for root in roots:
        for p in sorted(root.rglob("*")):
            if p.is_file() and p.suffix in (".py", ".csv", ".json", ".toml", ".txt", ".md") \
                    and "__pycache__" not in p.parts and not (root == pkg and "views" in p.relative_to(root).parts[:1]):
                h.update(str(p.relative_to(root)).encode())
                h.update(b"\0")
                h.update(p.read_bytes())
    return h.hexdigest()


def frame_key(func, args: tuple, kwargs: dict) -> str:
    import pandas
    return _key(func, args, kwargs, f"pandas={pandas.__version__}", f"code_and_data={code_and_data_hash()}")


def pack_texts(texts) -> tuple[np.ndarray, np.ndarray]:
    """A list of str as (UTF-8 bytes of their concatenation, int64 character offsets (len + 1)).
    A fixed-width numpy text array pads every text to the longest one in UTF-32: the joined
    notes of a states table (up to ~3 000 characters) made such a file 70 MB for 20 MB of
    numbers.

    Example (illustrative)

    >>> blob, offsets = pack_texts(["ab", "", "µm"])
    >>> offsets.tolist(), unpack_texts(blob, offsets)
    ([0, 2, 2, 4], ['ab', '', 'µm'])
    """
    texts = [str(t) for t in texts]
    offsets = np.zeros(len(texts) + 1, np.int64)
    if texts:
        offsets[1:] = np.cumsum([len(t) for t in texts])
    return np.frombuffer("".join(texts).encode("utf-8"), np.uint8).copy(), offsets


def unpack_texts(blob: np.ndarray, offsets: np.ndarray) -> list:
    """The list of str of :func:`pack_texts`."""
    whole = np.asarray(blob, np.uint8).tobytes().decode("utf-8")
    off = np.asarray(offsets, np.int64)
    if off.ndim != 1 or len(off) == 0 or off[0] != 0 or off[-1] != len(whole) or np.any(np.diff(off) < 0):
        raise ValueError("text offsets do not match the stored text")
    o = off.tolist()
    return [whole[a:b] for a, b in zip(o[:-1], o[1:])]


def frame_to_arrays(df) -> dict | None:
    """Arrays that rebuild ``df`` exactly (RangeIndex, numeric, bool and text columns),
    or None for a frame this layout cannot hold (it is then not cached).

    The columns of one dtype are stacked into one 2-D array (``g<k>``; text columns as
    int32 codes, -1 for missing), the distinct texts of every text column packed into one
    UTF-8 array (:func:`pack_texts`) with their counts: a dozen arrays to read and check
    instead of two or three per column."""
    import json

    import pandas as pd

    if not isinstance(df.index, pd.RangeIndex) or df.index.start != 0 or df.index.step != 1:
        return None
    if not all(isinstance(c, str) for c in df.columns) or df.columns.has_duplicates:
        return None
    try:
        attrs = json.dumps(df.attrs, sort_keys=True)
    except (TypeError, ValueError):
        return None
    out = {"__columns__": np.array(list(df.columns), dtype=str), "__attrs__": np.array(attrs),
           "__nrows__": np.array(len(df), np.int64)}
    dtypes, arrays, texts, counts = [], [], [], []
    for c in df.columns:
        s = df[c]
        dt = s.dtype
        if isinstance(dt, np.dtype) and dt.kind in "biuf":
            arrays.append(s.to_numpy())
            dtypes.append(dt.str)
        elif str(dt) in ("str", "object") or isinstance(dt, pd.StringDtype):
            try:
                codes, uniques = _text_codes(s)
            except TypeError:                # unhashable values (lists ...): not a text column
                return None
            if not all(isinstance(v, str) for v in uniques):
                return None
            arrays.append(codes.astype(np.int32))
            texts.extend(uniques)
            counts.append(len(uniques))
            dtypes.append("text:" + str(dt))
        else:
            return None
    groups: dict = {}
    where = np.zeros((len(dtypes), 2), np.int64)
    for i, dt in enumerate(dtypes):
        key = "text" if dt.startswith("text:") else dt
        members = groups.setdefault(key, [])
        where[i] = (list(groups).index(key), len(members))
        members.append(arrays[i])
    for k, members in enumerate(groups.values()):
        out[f"g{k}"] = np.stack(members)
    out["__where__"] = where
    out["__texts__"], out["__text_offsets__"] = pack_texts(texts)
    out["__text_counts__"] = np.array(counts, np.int64)
    out["__dtypes__"] = np.array(dtypes, dtype=str)
    return out


def _text_codes(s) -> tuple:
    """``(codes, uniques)`` of a text column (code -1: missing) for :func:`frame_to_arrays`: a
    str column factorized as it is stored; an object column by the identity of its values (its
    rows share one object per distinct text: each long text is neither hashed nor compared
    again per row; equal texts held as two objects are stored twice and read back equal)."""
    import pandas as pd

    if s.dtype != object:
        codes, uniques = pd.factorize(s, use_na_sentinel=True)
        return np.asarray(codes), uniques.tolist()
    vals = s.to_numpy(dtype=object)
    n = len(vals)
    ids = np.fromiter(map(id, vals), np.uint64, count=n)
    codes, _ = pd.factorize(ids)
    codes = np.asarray(codes, np.int64)
    k = int(codes.max()) + 1 if n else 0
    first = np.empty(k, np.int64)
    first[codes[::-1]] = np.arange(n - 1, -1, -1)            # each code's first row
    objs = vals[first]
    na = np.asarray(pd.isna(objs), bool) if k else np.zeros(0, bool)
    if na.any():
        remap = np.cumsum(~na) - 1
        remap[na] = -1
        codes, objs = remap[codes], objs[~na]
    for v in objs:
        hash(v)                      # an unhashable value (a list ...) is not text: TypeError
    return codes, list(objs)


def arrays_to_frame(arrays: dict):
    import json

    import pandas as pd

    cols = [str(c) for c in arrays["__columns__"]]
    dtypes = [str(d) for d in arrays["__dtypes__"]]
    n = int(arrays["__nrows__"])
    where = np.asarray(arrays["__where__"], np.int64)
    if where.shape != (len(cols), 2) or len(dtypes) != len(cols):
        raise ValueError("frame file: column map does not match the columns")
    texts = unpack_texts(arrays["__texts__"], arrays["__text_offsets__"])
    counts = np.asarray(arrays["__text_counts__"], np.int64)
    if counts.sum() != len(texts):
        raise ValueError("frame file: text counts do not match the texts")
    starts = np.cumsum(counts) - counts
    data = {}
    t = 0
    for i, (c, dt) in enumerate(zip(cols, dtypes)):
        g, r = int(where[i, 0]), int(where[i, 1])
        a = arrays[f"g{g}"][r]
        if len(a) != n:
            raise ValueError(f"column {c} has {len(a)} rows, expected {n}")
        if dt.startswith("text:"):
            uniq = np.asarray(texts[starts[t]:starts[t] + counts[t]] + [None], dtype=object)[:-1]
            t += 1
            if len(a) and (a.min() < -1 or a.max() >= len(uniq)):
                raise ValueError(f"column {c}: text codes out of range")
            kind = dt[5:]
            if kind == "object":
                vals = np.empty(n, dtype=object)
                ok = a >= 0
                vals[ok] = uniq[a[ok]]
                vals[~ok] = np.nan
                data[c] = pd.Series(vals, dtype=object)
            else:       # the distinct texts converted once, then taken by code (-1: missing)
                data[c] = pd.Series(pd.array(uniq, dtype=kind).take(np.asarray(a, np.int64), allow_fill=True))
        else:
            data[c] = pd.Series(np.asarray(a, dtype=np.dtype(dt)), copy=False)
    df = pd.DataFrame(data, columns=cols)
    df.attrs.update(json.loads(str(arrays["__attrs__"])))
    return df


def _prune(directory: Path, pattern: str, keep: int) -> None:
    try:
        files = sorted(directory.glob(pattern), key=lambda p: p.stat().st_mtime, reverse=True)
        for p in files[keep:]:
            p.unlink()
    except OSError:
        pass


#: name stems (``module.qualname-``) of the stores whose files :func:`_prune_bytes` may remove:
#: the per-section tables of :func:`disk_frame`, :func:`disk_arrays` and :func:`save_arrays`.
#: The constant tables of :func:`disk_table` (a few tens of kB, seconds to rebuild) are counted
#: in the budget but never removed.
_PRUNABLE_STEMS: set = set()


def per_section_store(func):
    """Mark ``func`` as naming a store of per-section files written by :func:`save_arrays`
    (removable to keep the cache within its budget, like :func:`disk_frame` files); returns it."""
    _PRUNABLE_STEMS.add(_stem(func))
    return func


def _prune_bytes(directory: Path, keep: Path, budget: float) -> None:
    """Remove the oldest per-section table files (:data:`_PRUNABLE_STEMS`) of ``directory``
    until the package's table files (``selector.*.npz``) fit in ``budget`` bytes; ``keep``
    (the file just written) and the constant tables always stay."""
    try:
        files = []
        for p in directory.glob("selector.*.npz"):
            st = p.stat()
            prunable = p != keep and any(p.name.startswith(stem) for stem in _PRUNABLE_STEMS)
            files.append((not prunable, st.st_mtime, st.st_size, p))
        # what stays in any case first, then the newest
        files.sort(key=lambda f: (f[0], f[1]), reverse=True)
        total = 0
        for stays, _, size, p in files:
            if stays or total + size <= budget:
                total += size
            else:
                p.unlink()
    except OSError:
        pass


def _save_and_prune(path: Path, key: str, flat: dict, pattern: str, touch: bool) -> bool:
    """Write one file of named arrays, mark it the newest (``touch``) and keep the newest
    :data:`MAX_FRAME_FILES` of ``pattern``."""
    if not _save(path, key, flat, True):
        return False
    if touch:
        try:
            os.utime(path)
        except OSError:
            pass
    _prune(path.parent, pattern, MAX_FRAME_FILES)
    _prune_bytes(path.parent, path, cache_budget_bytes())
    return True


def _frame_snapshot(value):
    """A frame that no later change of ``value`` can reach, to be converted to arrays on
    the writer thread: with pandas >= 3 (copy-on-write always on) a shallow copy, whose
    columns an in-place write of ``value`` copies before it writes; None for anything else
    (converted in the caller's thread, then written behind)."""
    pd = _pandas_with_copy_on_write()
    if pd is not None and isinstance(value, pd.DataFrame):
        return value.copy(deep=False)
    return None


@functools.cache
def _pandas_with_copy_on_write():
    """The pandas module when it is >= 3 (copy-on-write always on), else None."""
    import pandas as pd
    return pd if int(pd.__version__.split(".")[0]) >= 3 else None


def _convert_save_and_prune(to_arrays, snapshot, path: Path, key: str, pattern: str) -> bool:
    arrays = to_arrays(snapshot)
    if arrays is None:
        return False
    return _save_and_prune(path, key, _numbered(arrays), pattern, True)


def disk_frame(func):
    """Decorator for a pure builder of a pandas DataFrame that depends on its
    arguments, the package code and the data files only (the prepared states table
    of one section).  Like :func:`disk_table`, but keyed by a hash of **every** source
    and data file of the package (:func:`code_and_data_hash`), since such a table
    depends on all the models and the whole catalogue.  No in-memory copy is kept
    (the caller keeps its own); at most :data:`MAX_FRAME_FILES` files are kept.
    ``wrapper.build`` builds from scratch; a frame whose columns this layout cannot
    hold exactly is returned but not written."""
    return _disk_named(func, frame_to_arrays, arrays_to_frame)


def _numbered(arrays: dict) -> dict:
    """Named arrays in the ``arr_i`` layout of the cache files (:func:`_flatten`, numbered)."""
    return {f"arr_{i}": v for i, v in enumerate(_flatten(arrays))}


def _flatten(arrays: dict) -> list:
    """Named arrays as a list (names first, as one text array) for the arr_i layout of the cache files."""
    names = sorted(arrays)
    return [np.array(names, dtype=str)] + [arrays[n] for n in names]


def _unflatten(data: dict) -> dict:
    names = [str(n) for n in data["arr_0"]]
    if len(names) != len(data) - 1:
        raise ValueError("frame file: names and arrays differ in number")
    return {n: data[f"arr_{i + 1}"] for i, n in enumerate(names)}


def disk_arrays(func):
    """Decorator for a pure builder of a dict of named ndarrays (numeric, bool or text)
    that depends on its arguments, the package code and the data files only (the
    composition sensitivities of one section, :func:`selector.states.scatter.effects`).
    Keyed and written like :func:`disk_frame` (a hash of every source and data file);
    no in-memory copy is kept (the caller keeps its own); at most
    :data:`MAX_FRAME_FILES` files are kept.  ``wrapper.build`` builds from scratch."""

    return _disk_named(func, _checked_arrays, _text_arrays_back)


_TEXT_PREFIX = "__text__:"


def _checked_arrays(arrays) -> dict:
    """The named arrays to write: numeric ones as they are, a text array as its packed
    UTF-8 text (:func:`pack_texts`), its dtype and its shape."""
    if not isinstance(arrays, dict) or not all(isinstance(v, np.ndarray) and v.dtype != object
                                               for v in arrays.values()):
        raise TypeError("disk_arrays builders return a dict of numeric or text ndarrays")
    out = {}
    for k, v in arrays.items():
        if k.startswith(_TEXT_PREFIX):
            raise TypeError(f"disk_arrays: the name {k!r} is reserved")
        if v.dtype.kind == "U":
            blob, off = pack_texts(v.ravel().tolist())
            out.update({f"{_TEXT_PREFIX}{k}:blob": blob, f"{_TEXT_PREFIX}{k}:offsets": off,
                        f"{_TEXT_PREFIX}{k}:dtype": np.array(v.dtype.str),
                        f"{_TEXT_PREFIX}{k}:shape": np.array(v.shape, np.int64)})
        else:
            out[k] = v
    return out


def _text_arrays_back(arrays: dict) -> dict:
    out = {k: v for k, v in arrays.items() if not k.startswith(_TEXT_PREFIX)}
    for k in arrays:
        if k.startswith(_TEXT_PREFIX) and k.endswith(":blob"):
            name = k[len(_TEXT_PREFIX):-len(":blob")]
            p = f"{_TEXT_PREFIX}{name}:"
            shape = tuple(int(x) for x in arrays[p + "shape"])
            vals = unpack_texts(arrays[k], arrays[p + "offsets"])
            out[name] = np.array(vals, dtype=np.dtype(str(arrays[p + "dtype"]))).reshape(shape)
    return out


def _disk_named(func, to_arrays, from_arrays):
    """The disk cache behind :func:`disk_frame` and :func:`disk_arrays`: keyed by
    :func:`frame_key`, stored as named arrays (``arr_i`` layout), pruned to
    :data:`MAX_FRAME_FILES`.  ``to_arrays(value)`` gives the named arrays to write (None:
    not written); ``from_arrays(arrays)`` rebuilds the value from a file."""

    per_section_store(func)
    stem = _stem(func)

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        if not disk_enabled():
            return wrapper.build(*args, **kwargs)
        key = frame_key(func, args, kwargs)
        path = table_path(func, key)
        loaded = _load(path, key)
        if loaded is not None:
            try:
                return from_arrays(_unflatten(loaded[0]))
            except (KeyError, ValueError, TypeError, IndexError):
                pass
        value = wrapper.build(*args, **kwargs)
        snapshot = _frame_snapshot(value) if write_behind_enabled() else None
        if snapshot is not None:           # converted on the writer thread too
            _submit(functools.partial(_convert_save_and_prune, to_arrays, snapshot, path, key, f"{stem}*.npz"))
            return value
        arrays = to_arrays(value)
        if arrays is not None:
            flat = _private(_numbered(arrays))
            _submit(functools.partial(_save_and_prune, path, key, flat, f"{stem}*.npz", True))
        return value

    wrapper.build = func
    return wrapper


def evict_oldest(store: dict, most: int) -> None:
    """Drop the oldest entries of a small per-process memo until it holds fewer than
    ``most`` (tolerant of another thread of the batch run doing the same at once).

    Example (illustrative)

    >>> memo = {1: "a", 2: "b", 3: "c"}
    >>> evict_oldest(memo, 2)
    >>> memo
    {3: 'c'}
    """
    while len(store) >= most:
        try:
            store.pop(next(iter(store)), None)
        except (RuntimeError, StopIteration):
            break


def load_arrays(func, args: tuple) -> dict | None:
    """The named arrays that :func:`save_arrays` stored for ``func`` and ``args`` (keyed like
    :func:`disk_arrays`: a hash of every source and data file), or None when the disk cache
    is off or the file is missing, stale or corrupt (never trusted: key and checksum)."""
    if not disk_enabled():
        return None
    key = frame_key(func, args, {})
    loaded = _load(table_path(func, key), key)
    if loaded is None:
        return None
    try:
        return _text_arrays_back(_unflatten(loaded[0]))
    except (KeyError, ValueError, TypeError, IndexError):
        return None


def save_arrays(func, args: tuple, arrays: dict) -> bool:
    """Write ``arrays`` (numeric or text ndarrays) for ``func`` and ``args`` atomically, replacing
    an earlier file of the same key (a store that grows: the partial sensitivities of
    :class:`selector.states.scatter.Sensitivities`); at most :data:`MAX_FRAME_FILES` kept.
    The write goes behind the answer (:func:`wait_for_writes`), on private copies of the
    writable arrays; returns True when it was asked for, False with the disk cache off."""
    if not disk_enabled():
        return False
    key = frame_key(func, args, {})
    stem = _stem(per_section_store(func))
    flat = _private(_numbered(_checked_arrays(arrays)))
    _submit(functools.partial(_save_and_prune, table_path(func, key), key, flat, f"{stem}*.npz", False))
    return True
