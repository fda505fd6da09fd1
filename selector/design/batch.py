"""A parts list in, the best candidates of every part out, computed with Dask.

:func:`batch` validates the whole parts list (:func:`selector.design.parts_list.read_parts`)
before anything is computed, then splits the work **by section**: the expanded and
costed states table (every grade x route x window x composition corner at one
diameter or thickness, :func:`selector.selection.engine.prepare`) is shared by every
part of that section, so one Dask task per section builds it once and ranks all the
parts cut from that section.  Within a section, parts with the same targets and
service conditions are ranked once.

Each part's candidates are the selection engine's own answer
(:func:`selector.select`, in its order, at most ``top`` of them); a part that
nothing satisfies gets its nearest misses (:func:`selector.nearest_misses`) with
``status = "nearest miss"``, and a part for which even those are empty (its hard
filters exclude every grade) gets one row with ``status = "no candidate"``: no part
is dropped.

Cost.  ``part_cost`` is the engine's relative cost per kg (grade price + route
adder, :mod:`selector.selection.cost`) times the part's mass, so it is linear in
the part's length; the engine is run at the reference length
:data:`REFERENCE_LENGTH_MM` and ``mass_kg`` and ``part_cost`` are scaled to each
part's ``length_mm``.  ``annual_cost = quantity_per_year x part_cost``.

Schedulers.  With ``scheduler=None`` (and no ``SELECTOR_DASK_SCHEDULER`` in the
environment) Dask's local threaded scheduler runs in this process: nothing to
start.  With an address (``"tcp://host:8786"``) the tasks go to a running
``dask.distributed`` cluster (``dask scheduler`` on one machine, ``dask worker
tcp://host:8786`` on each worker; README).  The result does not depend on the
scheduler.

Results are estimates for preliminary selection.  The final choice needs
certified material test reports, the applicable design code and review by a
qualified engineer.
"""
from __future__ import annotations

import json
import os
from typing import Callable

import numpy as np
import pandas as pd

from ..errors import InputError
from ..selection.engine import nearest_misses, select
from .parts_list import read_parts
from .pins import NOTICE

#: environment variable naming a dask.distributed scheduler address
SCHEDULER_ENV = "SELECTOR_DASK_SCHEDULER"
#: seconds to wait for a scheduler to answer before giving up
CONNECT_TIMEOUT_S = 8.0
#: length at which the engine is run; mass and cost are scaled to each part's length
REFERENCE_LENGTH_MM = 1000.0

#: columns of the batch result, in order (``p_meet`` and the engine's own rank
#: columns follow when the engine provides them)
RESULT_COLUMNS = ["part_id", "rank", "status", "grade", "family", "route_family", "route_text", "window",
                  "robust", "yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc",
                  "case_depth_mm", "relative_cost", "mass_kg", "part_cost", "quantity_per_year", "annual_cost",
                  "miss_score", "misses", "cautions", "price_source", "diameter_mm", "thickness_mm",
                  "length_mm", "description"]
#: columns of the engine's output passed through when present
PASS_THROUGH = ("p_meet",)
STATUSES = ("candidate", "nearest miss", "no candidate")
_FLOAT_COLS = ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc", "case_depth_mm",
               "relative_cost", "mass_kg", "part_cost", "annual_cost", "miss_score")


def _key(d: dict) -> str:
    return json.dumps(d, sort_keys=True, default=str)


def _misses_text(row: dict) -> str:
    out = []
    for k, v in row.items():
        if k.startswith("move_") and isinstance(v, (int, float)) and v > 0:
            out.append(f"{k[5:]} by {v:.4g}")
        elif k.startswith("fails_") and v is True:
            out.append(f"{k[6:]} (not relaxable)")
    return "; ".join(out)


def section_candidates(diameter_mm, thickness_mm, parts: list[dict], top: int | None,
                       price_sheet: dict | None = None, robust_only: bool = False,
                       per_grade: bool = False) -> pd.DataFrame:
    """The candidates of every part cut from one section (one Dask task).

    Parameters
    ----------
    diameter_mm, thickness_mm : float or None
        The section, mm (one of the two).
    parts : list of dict
        ``order`` (position in the parts list), ``part_id``, ``length_mm``,
        ``quantity_per_year``, ``targets``, ``service``, ``description``.
    top : int or None
        Candidates kept per part (None: all).
    price_sheet : dict, optional
        ``{grade id: relative price per kg}``.
    robust_only : bool
        Keep only candidates that meet the targets at every composition corner.
    per_grade : bool
        One candidate per grade (its cheapest route for the part, robust first),
        cheapest grade first, instead of the engine's order.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`RESULT_COLUMNS` plus ``order``.
    """
    d = None if thickness_mm is not None else diameter_mm
    groups: dict[str, list[dict]] = {}
    for p in parts:
        groups.setdefault(_key({"t": p["targets"], "s": p["service"]}), []).append(p)
    frames = []
    for members in groups.values():
        first = members[0]
        cand = select(first["targets"], d, thickness_mm=thickness_mm, length_mm=REFERENCE_LENGTH_MM,
                      price_sheet=price_sheet, robust_only=robust_only, **first["service"])
        if len(cand):
            if "rank" in cand.columns:          # the engine's own rank, when it provides one
                cand = cand.sort_values("rank", kind="stable")
            if per_grade:
                cand = cand.assign(_r=~cand["robust"].astype(bool)).sort_values(
                    ["part_cost", "_r", "grade"], kind="stable").drop_duplicates("grade").drop(columns="_r")
            rows = cand if top is None else cand.head(top)
            rows = rows.assign(status="candidate", miss_score=0.0, misses="")
        else:
            rows = nearest_misses(first["targets"], d, thickness_mm=thickness_mm, length_mm=REFERENCE_LENGTH_MM,
                                  price_sheet=price_sheet, n=top or 10)
            if len(rows):
                rows = rows.assign(status="nearest miss",
                                   misses=[_misses_text(r) for r in rows.to_dict("records")])
            else:
                rows = pd.DataFrame({"status": ["no candidate"], "misses": [
                    "no grade passes the part's hard filters (families, exclude_families, corrosion_resistant)"]})
        keep = [c for c in rows.columns if c in RESULT_COLUMNS or c.startswith(PASS_THROUGH)]
        base = rows[keep].reset_index(drop=True)
        base["rank"] = np.arange(1, len(base) + 1)
        k, m = len(base), len(members)
        f = base.iloc[np.tile(np.arange(k), m)].reset_index(drop=True)
        length = np.repeat(np.array([p["length_mm"] for p in members], float), k)
        qty = np.repeat(np.array([p["quantity_per_year"] for p in members], np.int64), k)
        for c in ("mass_kg", "part_cost"):
            if c in f:
                f[c] = f[c].astype(float).to_numpy() * (length / REFERENCE_LENGTH_MM)
        f["part_id"] = np.repeat(np.array([p["part_id"] for p in members], dtype=object), k)
        f["order"] = np.repeat(np.array([p["order"] for p in members], np.int64), k)
        f["quantity_per_year"] = qty
        f["annual_cost"] = f["part_cost"].astype(float).to_numpy() * qty if "part_cost" in f else np.nan
        f["diameter_mm"] = np.nan if d is None else float(d)
        f["thickness_mm"] = np.nan if thickness_mm is None else float(thickness_mm)
        f["length_mm"] = length
        f["description"] = np.repeat(np.array([p.get("description", "") for p in members], dtype=object), k)
        frames.append(f)
    return _tidy(pd.concat(frames, ignore_index=True))


def _tidy(df: pd.DataFrame) -> pd.DataFrame:
    for c in RESULT_COLUMNS:
        if c not in df:
            df[c] = np.nan if c in _FLOAT_COLS else ""
    for c in _FLOAT_COLS:
        df[c] = df[c].astype(float)
    for c in ("grade", "family", "route_family", "route_text", "window", "misses", "cautions", "price_source",
              "description", "status"):
        df[c] = df[c].fillna("").astype(str)
    df["robust"] = df["robust"].map(lambda v: bool(v) if isinstance(v, (bool, np.bool_)) else False)
    df["rank"] = df["rank"].astype(int)
    df["quantity_per_year"] = df["quantity_per_year"].astype(int)
    extra = [c for c in df.columns if c.startswith(PASS_THROUGH) and c not in RESULT_COLUMNS]
    return df[RESULT_COLUMNS + extra + ["order"]]


def resolve_scheduler(scheduler: str | None) -> str | None:
    """The scheduler address to use: ``scheduler``, else the environment variable
    :data:`SCHEDULER_ENV`, else None (the local scheduler)."""
    addr = scheduler if scheduler is not None else os.environ.get(SCHEDULER_ENV) or None
    if addr is None:
        return None
    if not isinstance(addr, str) or not addr.strip() or any(c.isspace() for c in addr.strip()):
        raise InputError("scheduler", addr, "a dask scheduler address such as tcp://host:8786")
    return addr.strip()


def connect(address: str, timeout_s: float | None = None):
    """A ``dask.distributed.Client`` on ``address``, or :class:`InputError` naming the
    address when nothing answers within ``timeout_s`` seconds."""
    from distributed import Client

    timeout_s = CONNECT_TIMEOUT_S if timeout_s is None else float(timeout_s)
    try:
        return Client(address, timeout=f"{timeout_s}s", set_as_default=False)
    except (OSError, TimeoutError, ValueError) as exc:
        raise InputError("scheduler", address,
                         f"the address of a running dask scheduler (nothing answered within {timeout_s:g} s: "
                         f"{type(exc).__name__}); start one with `dask scheduler` and `dask worker {address}`, "
                         "or leave the scheduler unset to run locally") from None


def _tasks(parts: pd.DataFrame):
    """(section, list of part dicts) per section, the largest sections first."""
    recs = parts.assign(order=np.arange(len(parts))).to_dict("records")
    by: dict = {}
    for r in recs:
        d = r["diameter_mm"]
        t = r["thickness_mm"]
        sec = (None, float(t)) if t == t else (float(d), None)
        by.setdefault(sec, []).append({k: r[k] for k in ("order", "part_id", "length_mm", "quantity_per_year",
                                                         "targets", "service", "description")})
    return sorted(by.items(), key=lambda kv: (-len(kv[1]), str(kv[0])))


def batch(parts, top: int | None = 5, scheduler: str | None = None, *, price_sheet: dict | None = None,
          robust_only: bool = False, per_grade: bool = False,
          progress: Callable[[int, int], None] | None = None) -> pd.DataFrame:
    """The best candidates of every part of a parts list.

    Parameters
    ----------
    parts : path, bytes or pandas.DataFrame
        The parts list (CSV or Parquet; columns in :mod:`selector.design.parts_list`).
        Validated whole before any computation.
    top : int or None
        Candidates kept per part, 1 to 1000 (None: every candidate).
    scheduler : str, optional
        Address of a ``dask.distributed`` scheduler (``"tcp://host:8786"``); default
        the ``SELECTOR_DASK_SCHEDULER`` environment variable, else Dask's local
        scheduler in this process.
    price_sheet : dict, optional
        ``{grade id: relative price per kg}`` (see :func:`selector.user_files.load_price_sheet`).
    robust_only : bool
        Keep only candidates that meet the targets at every composition corner.
    per_grade : bool
        Keep one candidate per grade (its cheapest route for the part), cheapest
        first: the candidate set :func:`selector.rationalise` needs to consolidate
        grades.  Default False: the engine's own order.
    progress : callable, optional
        Called as ``progress(parts_done, parts_total)`` as sections finish.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`RESULT_COLUMNS` (and ``p_meet`` when the engine provides it),
        sorted by the part's position in the list, then ``rank``.  ``status`` is
        ``candidate`` (meets every target), ``nearest miss`` (nothing meets the
        targets: the closest, with ``miss_score`` and ``misses``) or
        ``no candidate``.  ``attrs["notice"]`` carries the preliminary-selection notice.

    Raises
    ------
    PartsListError
        The parts list has bad cells (all of them listed); nothing is computed.
    InputError
        ``top`` out of range, or a scheduler that does not answer within
        :data:`CONNECT_TIMEOUT_S` seconds (the message names the address).
    """
    import dask

    if top is not None and (isinstance(top, bool) or not isinstance(top, (int, np.integer)) or
                            not 1 <= int(top) <= 1000):
        raise InputError("top", top, "a whole number of candidates per part in [1, 1000], or None for all")
    table = read_parts(parts)
    addr = resolve_scheduler(scheduler)
    if price_sheet is not None and not isinstance(price_sheet, dict):
        raise InputError("price_sheet", type(price_sheet).__name__, "a dict {grade id: relative price per kg}")
    client = connect(addr) if addr else None
    work = _tasks(table)
    total = len(table)
    names = [f"selector-section-{i}-{dask.base.tokenize(sec, recs, top, price_sheet, robust_only, per_grade)}"
             for i, (sec, recs) in enumerate(work)]
    sizes = {n: len(recs) for n, (_, recs) in zip(names, work)}
    delayed = [dask.delayed(section_candidates, pure=True)(sec[0], sec[1], recs, None if top is None else int(top),
                                                           price_sheet, robust_only, per_grade, dask_key_name=n)
               for n, (sec, recs) in zip(names, work)]
    done = [0]

    def tick(n_parts):
        done[0] += n_parts
        if progress is not None:
            progress(done[0], total)

    try:
        if client is None:
            from dask.callbacks import Callback

            class _Progress(Callback):
                def _posttask(self, key, result, dsk, state, worker_id):
                    if key in sizes:
                        tick(sizes[key])

            with _Progress():
                results = dask.compute(*delayed, scheduler="threads")
        else:
            from distributed import as_completed

            with client.as_current():
                futures = client.compute(delayed)
                for fut in as_completed(futures):
                    tick(sizes.get(fut.key, 0))
                results = client.gather(futures)
    finally:
        if client is not None:
            client.close()
    out = pd.concat(results, ignore_index=True)
    out = out.sort_values(["order", "rank"], kind="stable").drop(columns="order").reset_index(drop=True)
    out.attrs["notice"] = NOTICE
    return out
