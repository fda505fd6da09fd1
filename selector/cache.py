"""Build-once numeric tables kept on disk between processes.

Some tables depend only on constants of the code (the quench-cooling rate table of
:mod:`selector.models.cooling` takes about 2 s to build from the exact series).  The
:func:`disk_table` decorator builds such a table once, saves it as an ``.npz`` file
under the user's cache directory and loads it in later processes.

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

The result is bit-identical to a fresh build (``.npz`` stores float64 exactly;
``tests/test_cache.py`` checks it).  Within one process the table is also kept in
memory.  Returned arrays are read-only.

Cache directory: ``$SELECTOR_CACHE_DIR`` if set, else ``$XDG_CACHE_HOME/selector``,
else ``~/.cache/selector`` (the XDG base-directory convention).  Set
``SELECTOR_DISK_CACHE=0`` to build in every process without touching the disk.
An unwritable directory only costs the rebuild; it is never an error.
"""
from __future__ import annotations

import functools
import hashlib
import inspect
import io
import os
import sys
import tempfile
import threading
import zipfile
from pathlib import Path

import numpy as np

#: bump to invalidate every cache file written by an older layout of this module
FORMAT = 1
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
    parts = [f"numpy={numpy.__version__}"]
    scipy = sys.modules.get("scipy")
    if scipy is not None:
        parts.append(f"scipy={scipy.__version__}")
    return ";".join(parts)


def table_key(func, args: tuple, kwargs: dict) -> str:
    """SHA-256 key of one table: builder, arguments, versions and the module's source text."""
    text = "\n".join([
        f"format={FORMAT}",
        f"builder={func.__module__}.{func.__qualname__}",
        f"args={args!r}",
        f"kwargs={sorted(kwargs.items())!r}",
        f"package={_package_version()}",
        _library_versions(),
        f"source={_source_hash(func.__module__)}",
    ])
    return hashlib.sha256(text.encode()).hexdigest()


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
        h.update(a.tobytes())
    return h.hexdigest()


def table_path(func, key: str) -> Path:
    return cache_dir() / f"{func.__module__}.{func.__qualname__}-{key[:32]}.npz"


def _load(path: Path, key: str):
    """The arrays stored at ``path`` if the file is whole, has ``key`` and its checksum; else None."""
    try:
        with np.load(path, allow_pickle=False) as z:
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
        buf = io.BytesIO()
        np.savez(buf, **arrays, **{_KEY_NAME: np.array(key), _SUM_NAME: np.array(checksum(arrays)),
                                   _TUPLE_NAME: np.array(was_tuple)})
        fd, tmp = tempfile.mkstemp(prefix=path.name + ".", suffix=".tmp", dir=path.parent)
        try:
            with os.fdopen(fd, "wb") as f:
                f.write(buf.getvalue())
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
            value = _cached_build(func, args, kwargs)
            memo[mkey] = value
            return value

    def cache_path(*args, **kwargs) -> Path:
        return table_path(func, table_key(func, args, kwargs))

    wrapper.build = func
    wrapper.cache_clear = memo.clear
    wrapper.cache_path = cache_path
    return wrapper


def _cached_build(func, args, kwargs):
    if not disk_enabled():
        value = func(*args, **kwargs)
        return _from_dict(_as_dict(value), isinstance(value, tuple))
    key = table_key(func, args, kwargs)
    path = table_path(func, key)
    loaded = _load(path, key)
    if loaded is not None:
        return _from_dict(*loaded)
    value = func(*args, **kwargs)
    arrays = _as_dict(value)
    was_tuple = isinstance(value, tuple)
    _save(path, key, arrays, was_tuple)
    return _from_dict(arrays, was_tuple)
