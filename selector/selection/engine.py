"""Selection: which grade-and-route candidates meet the targets, how robustly, at
what process window and cost, and which of them form the Pareto set.

Definitions (documented in docs/methods/selection.md):

* A *state* is one grade × route family × parameter point × composition corner (a
  row of :func:`selector.states.expand.expand`).
* A *variant* groups the states of one grade and route that differ only in the
  route's main parameter (e.g. the tempering temperature of an oil-quenched 4140).
* ``p_meet`` of a state is the probability that a heat drawn within the grade's
  specification, processed by this route at this section, meets every target,
  counting composition scatter and the model's 90 % band (Monte Carlo over
  :data:`selector.states.scatter.N_DRAWS` draws, :mod:`selector.states.scatter`).
* A state is *clean* when no ``avoid`` caution fires on it (tempered-martensite
  embrittlement range, water/brine quench cracking, centre below 50 % martensite
  under a strength target, service near the tempering temperature), except the
  rules the user allows (``allow=[...]``).
* A variant is a *candidate* when some value of its main parameter meets every
  target at the nominal composition; it is *robust* when its chosen state also
  reaches ``p_meet >= min_p_meet``.  The chosen run
  is, in this order of preference: the widest run of clean states with
  ``p_meet >= min_p_meet``; of clean states meeting at the nominal composition; of
  any states with ``p_meet >= min_p_meet``; of any states meeting at the nominal
  composition (the last two carry an ``avoid`` caution and rank after the others).
* The candidate's *window* is that run (the largest continuous range of the main
  parameter where every target is met at the required probability, or at the
  nominal composition, and no avoid caution fires); a feasible range split by a
  warned range gives the usable sub-windows (``sub_windows``), never one that
  straddles it.  A candidate with an avoid caution has no window.  The chosen
  point is the middle of the run, moved to the nearest state with the fewest model
  notes where the middle carries one.
* ``corners_meet``: the chosen state meets every target at every composition
  corner (lean, nominal and rich together: the worst case, kept for those who want
  it; no heat has every element at a limit at once).
* The Pareto set is taken over the candidates without an avoid caution (over all
  when every one has one) on the chosen objectives (default: minimise part cost,
  maximise ``p_meet``, maximise elongation).
* Order (``rank``, 1 = first), risk-aware:

  1. clean (no avoid caution) and robust (``p_meet >= min_p_meet``): by part cost,
     lowest first;
  2. clean and not robust: by ``p_meet``, highest first, compared in steps of
     :data:`P_MEET_STEP` (0.05, about 1.4 Monte Carlo standard errors at 200 draws),
     then by part cost within a step;
  3. then the candidates with an avoid caution, in the same two tiers.

  Ties: ``p_meet`` (higher first), then elongation and yield (higher first).  With the
  default objectives (cost, p_meet, elongation) a candidate never ranks after one it
  dominates inside a tier.  The Pareto mark is shown, not used to order.
"""
from __future__ import annotations

import functools
import hashlib

import numpy as np
import pandas as pd

from .. import inputs
from ..cache import disk_frame, evict_oldest
from ..catalogue.grades import FAMILIES, default_catalogue
from ..errors import InputError, NotModelledError
from ..routes import bands
from ..routes import families as fam_registry
from ..routes import fatigue as fatigue_mod
from ..routes.evaluate import evaluate, section_args
from ..routes.steps import describe
from ..rules import cautions as cautions_mod
from ..rules.cautions import check_context
from ..states import scatter
from ..states.expand import RESULT_COLUMNS, StatesColumns, Text, column_series, expand_columns, notes_in
from ..states.expand import structure_of as expand_structure
from . import cost as cost_mod
from .pareto import pareto_mask
from .targets import NUMERIC_TARGETS, _NAN_PASSES_MAX, margins, meets, shortfalls, validate_targets

DEFAULT_OBJECTIVES = (("part_cost", "min"), ("p_meet", "max"), ("elongation_pct", "max"))
OBJECTIVE_COLUMNS = ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc",
                     "case_depth_mm", "relative_cost", "part_cost", "p_meet", "margin_bands")
#: default required probability of meeting every target
MIN_P_MEET = 0.9
#: targets that make the centre-martensite rule apply (a strength or hardness minimum)
STRENGTH_TARGETS = ("min_yield_mpa", "min_uts_mpa", "min_hardness_hrc")

OUTPUT_COLUMNS = ["grade", "family", "route_family", "route_text", "route", "uts_mpa", "yield_mpa",
                  "elongation_pct", "hardness_hv", "hardness_hrc", "surface_hardness_hv",
                  "surface_hardness_hrc", "center_hardness_hv", "case_depth_mm", "relative_cost",
                  "part_cost", "mass_kg", "robust", "nominal", "pareto", "window", "window_parameter",
                  "window_min", "window_max", "robust_window_min", "robust_window_max", "main_value",
                  "cautions", "notes", "price_source", "p_meet", "min_p_meet", "rank", "corners_meet",
                  "severity", "avoid", "sub_windows", "margin_bands", "center_martensite_pct"]


def _main_param(route: str):
    return fam_registry.get(route).main_parameter


def _follows_main(grade: np.ndarray, main: np.ndarray | None, param: np.ndarray) -> bool:
    """True where ``param`` is set by the grade and the main parameter on the states of one
    route (arrays over those states; e.g. the hold of an austemper grid, chosen per bath
    temperature): it then does not split a variant, whose main parameter already tells
    its states apart."""
    if main is None:
        return False
    g = pd.factorize(grade)[0].astype(np.int64)
    m, n_m = pd.factorize(main, use_na_sentinel=False)
    v, n_v = pd.factorize(param, use_na_sentinel=False)
    gm = g * len(n_m) + m
    # as many distinct (grade, main, param) as distinct (grade, main): one param value per pair
    return len(np.unique(gm * len(n_v) + v)) == len(np.unique(gm))


def _variant_keys(states: pd.DataFrame, memo: dict | None = None) -> tuple[np.ndarray, np.ndarray]:
    """``(keys, codes)``: ``grade|route[|other parameter values]`` per state (object array of
    str) and the code of each state's key in order of first appearance (as ``pd.factorize``).

    Each column is read and factorized once over the whole table (not once per route
    family), each distinct combination's text written once; a value's text is
    ``str`` of the value as numpy writes it, the same whichever rows it is read with.
    ``memo`` (a dict kept per structure digest of the table) keeps the codes of the columns
    that are not model results and the keys of the route families none of whose columns is a
    model result: those are the same at every section."""
    memo = {} if memo is None else memo
    coded = memo.setdefault("codes", {})
    per_route = memo.setdefault("routes", {})
    results = set(_result_parameters())
    route_rows = memo.get("route_rows")
    if route_rows is None:
        route = states["route"].to_numpy(dtype=object)
        # one assignment of a whole value: a memo shared by threads is never read half made
        route_rows = memo["route_rows"] = {r: np.flatnonzero(route == r) for r in pd.unique(route)}
    grade = memo.get("grade")
    if grade is None:
        grade = memo["grade"] = states["grade"].to_numpy(dtype=object)
    fresh: dict = {}

    def codes_of(name, values=None):
        store = fresh if name in results else coded
        if name not in store:
            vals = states[name].to_numpy() if values is None else values
            codes, uniq = pd.factorize(vals, use_na_sentinel=False)
            store[name] = (np.asarray(codes, np.int64), np.asarray(uniq).astype(str).astype(object))
        return store[name]

    codes_of("grade", grade)
    out = np.empty(len(states), dtype=object)
    firsts, locals_ = [], []
    for r, idx in route_rows.items():
        fam = fam_registry.get(r)
        cols = [fam.main_parameter] + list(fam.parameters)
        hit = per_route.get(r)
        if hit is None:
            mp = fam.main_parameter if fam.main_parameter in states else None
            main = codes_of(mp)[0][idx] if mp else None
            # a parameter the grid sets from the main one (e.g. the austemper hold) does not split
            others = [p for p in fam.parameters if p != fam.main_parameter and p in states
                      and not _follows_main(grade[idx], main, codes_of(p)[0][idx])]
            parts = [codes_of(c) for c in ["grade"] + others]
            table = np.ascontiguousarray(np.column_stack([c[idx] for c, _ in parts]))
            rows = table.view(np.dtype((np.void, table.dtype.itemsize * table.shape[1]))).ravel()
            _, first, inv = np.unique(rows, return_index=True, return_inverse=True)
            # order of the parts: grade, route, the other parameters
            keys = np.array(["|".join([parts[0][1][row[0]], str(r)] + [parts[j][1][row[j]]
                                                                        for j in range(1, len(parts))])
                             for row in table[first].tolist()], dtype=object)
            hit = (keys, first, inv.reshape(-1))
            if not any(c in results for c in cols if c):
                per_route[r] = hit
        keys, first, inv = hit
        out[idx] = keys[inv]
        firsts.append(idx[first])
        locals_.append((idx, inv))
    # codes in order of first appearance over the whole table: a key names its route, so the
    # keys of two routes never coincide
    rank = np.empty(sum(len(f) for f in firsts), np.int64)
    rank[np.argsort(np.concatenate(firsts), kind="stable")] = np.arange(len(rank))
    vcode = np.empty(len(states), np.int64)
    at = 0
    for f, (idx, inv) in zip(firsts, locals_):
        vcode[idx] = rank[at:at + len(f)][inv]
        at += len(f)
    return out, vcode


def costed(states: pd.DataFrame, length_mm: float = 100.0, price_sheet: dict | None = None,
           diameter_mm=None, thickness_mm=None) -> pd.DataFrame:
    """Add ``relative_cost`` (per kg: grade price + route adder), ``mass_kg`` and
    ``part_cost`` to a states table (returns a new frame)."""
    df = states.copy(deep=False)     # only new columns are added: the caller's frame is never changed
    price = df["relative_price"].to_numpy(float).copy()
    src = np.full(len(df), "catalogue (indicative)", dtype=object)
    price_sheet = cost_mod.check_price_sheet(price_sheet)
    if price_sheet:
        for gid, p in price_sheet.items():
            m = (df["grade"] == gid).to_numpy()
            price[m] = p
            src[m] = "price sheet"
    df["relative_cost"] = cost_mod.relative_cost_per_kg(price, df["route"].to_numpy(), df["family"].to_numpy())
    mass = cost_mod.part_mass_kg(df["density_g_cm3"].to_numpy(float), diameter_mm, thickness_mm, length_mm)
    df["mass_kg"] = mass
    df["part_cost"] = df["relative_cost"] * mass
    df["price_source"] = src
    return df


@functools.lru_cache(maxsize=8)
def _prepare_cached(diameter_mm, thickness_mm, length_mm, prices: tuple) -> pd.DataFrame:
    return _prepare_table(diameter_mm, thickness_mm, length_mm, prices)


@disk_frame      # kept in the user's cache directory, keyed by the arguments and all code and data
def _prepare_table(diameter_mm, thickness_mm, length_mm, prices: tuple) -> pd.DataFrame:
    st = expand_columns(diameter_mm, thickness_mm)
    d = None if thickness_mm is not None else float(diameter_mm)
    if isinstance(st, StatesColumns):
        return _prepared_from_columns(st, d, thickness_mm, float(length_mm), dict(prices) or None)
    df = costed(st, float(length_mm), dict(prices) or None, d, thickness_mm)
    variant, main, vcode, order = _kept_layout(df, expand_structure(st))
    df["variant"] = variant.copy()
    df["main_value"] = main.copy()
    df["variant_code"] = vcode.copy()
    out = df.take(order).reset_index(drop=True)
    codes, uniq = pd.factorize(out["notes"])
    if len(uniq) and not np.any(codes < 0):
        per = np.array([notes_in(x) for x in uniq], dtype=np.int64)
        out["n_notes"] = per[codes]
    else:
        out["n_notes"] = [notes_in(x) for x in out["notes"]]
    return _with_section(out, d, thickness_mm, length_mm)


#: the columns :func:`costed` adds, in order
COST_COLUMNS = ("relative_cost", "mass_kg", "part_cost", "price_source")


def _kept_layout(df, digest) -> tuple:
    """:func:`_layout` of a costed states table (or of :class:`StatesColumns`), kept per
    structure digest and the values of the result parameters."""
    # the variant keys, main values and row order depend only on the states (grade, route,
    # window parameters, corner), the same at every section: kept per structure digest
    key = None
    if digest is not None:
        # a window parameter that is also a model result (the induction case depth: the depth
        # reached) depends on the section: its values join the key
        h = hashlib.blake2b(digest_size=20)
        for c in _result_parameters():
            if c in df:
                h.update(c.encode() + np.ascontiguousarray(df[c].to_numpy(float)).tobytes())
        cols = tuple(df.columns)
        if isinstance(df, StatesColumns):
            cols += COST_COLUMNS
        key = (digest, cols, h.hexdigest())
    hit = _LAYOUTS.get(key) if key is not None else None
    if hit is None:
        hit = _layout(df, digest)
        if key is not None:
            evict_oldest(_LAYOUTS, 4)
            _LAYOUTS[key] = hit
    return hit


def _prepared_from_columns(st: StatesColumns, d, thickness_mm, length_mm: float, price_sheet) -> pd.DataFrame:
    """The prepared table from the expansion's columns: each column taken in the layout's
    order once (numeric columns by numpy, text columns as codes), the cost columns computed
    on the ordered arrays; the same frame as costing, laying out and taking the states table
    (tests/test_speed_equivalence.py).  The text columns that are the same at every section
    (grade, route, the window parameters ...) are taken once per layout and shared by the
    prepared tables of later sections (:func:`_taken_text`; pandas copies on write)."""
    variant, main, vcode, order = _kept_layout(st, st.digest)
    data = {}
    for k, v in st.cols.items():
        data[k] = _taken_text(k, v, order) if isinstance(v, Text) else np.asarray(v)[order]
    data["state_key"] = _taken(("state_key",), order, st.state_key, lambda: pd.Series(st.state_key.take(order)))
    cost = _cost_columns(data["relative_price"], st.cols["grade"], order, st.cols["route"], st.cols["family"],
                         data["density_g_cm3"], length_mm, price_sheet, d, thickness_mm)
    data.update(cost)
    data["variant"] = _taken(("variant",), order, variant, lambda: pd.Series(variant[order]), _same_array)
    data["main_value"] = main[order]
    data["variant_code"] = vcode[order]
    notes = st.cols["notes"]
    per = (np.asarray(notes.counts, np.int64) if notes.counts is not None
           else np.array([notes_in(x) for x in notes.uniques], dtype=np.int64))
    codes = notes.codes[order]
    data["n_notes"] = (per[codes] if len(per) and not np.any(codes < 0)
                       else [notes_in(x) for x in data["notes"]])
    return _with_section(pd.DataFrame(data, copy=False), d, thickness_mm, length_mm)


#: (column, rows) -> (row order, source, the column taken in that order): the columns of
#: :func:`_prepared_from_columns` that are the same at every section (a few recent)
_TAKEN: dict = {}


def _taken(key: tuple, order: np.ndarray, source, build, check=None):
    """``build()`` (a column of ``source`` taken in ``order``), kept while ``order`` has the same
    values (a section whose window parameters hold a model result lays its rows out anew, most
    often in the same order) and ``source`` is the same object or, given ``check`` (a function
    of two sources), has the same values."""
    k = key + (len(order),)
    hit = _TAKEN.get(k)
    if hit is not None and (hit[0] is order or np.array_equal(hit[0], order)) \
            and (hit[1] is source or (check is not None and check(hit[1], source))):
        return hit[2]
    out = build()
    evict_oldest(_TAKEN, 64)
    _TAKEN[k] = (order, source, out)
    return out


def _same_array(a: np.ndarray, b: np.ndarray) -> bool:
    return a.dtype == b.dtype and np.array_equal(a, b)


def _same_text(a: Text, b: Text) -> bool:
    return a.uniques == b.uniques and np.array_equal(a.codes, b.codes)


def _taken_text(name: str, v: Text, order: np.ndarray) -> pd.Series:
    """The text column ``v`` taken in ``order`` (as :func:`column_series`), kept per column and
    order while its codes and texts are equal (the notes, new at every section, are not kept)."""
    build = lambda: column_series(name, Text(v.codes[order], v.uniques))  # noqa: E731
    if name == "notes":
        return build()
    return _taken((name,), order, v, build, _same_text)


def _cost_columns(price, grade: Text, order, route, family, density, length_mm, price_sheet, d, thickness_mm
                  ) -> dict:
    """The columns of :func:`costed` over arrays in the prepared order (``grade``, ``route``
    and ``family`` the expansion's :class:`Text` columns, taken by ``order``)."""
    price = np.asarray(price, float).copy()
    price_sheet = cost_mod.check_price_sheet(price_sheet)
    if price_sheet:
        src = np.full(len(price), "catalogue (indicative)", dtype=object)
        gcodes = grade.codes[order]
        where = {g: i for i, g in enumerate(grade.uniques)}
        for gid, p in price_sheet.items():
            m = gcodes == where.get(gid, -2)
            price[m] = p
            src[m] = "price sheet"
        src = pd.Series(src)
    else:
        n = len(price)
        src = _taken(("price_source", n), _NO_ORDER, None,
                     lambda: pd.Series(np.full(n, "catalogue (indicative)", dtype=object)))
    rc, fc = route.codes[order], family.codes[order]
    if (len(rc) and rc.min() < 0) or (len(fc) and fc.min() < 0):
        rel = cost_mod.relative_cost_per_kg(price, column_series("route", Text(rc, route.uniques)).to_numpy(object),
                                            column_series("family", Text(fc, family.uniques)).to_numpy(object))
    else:
        rel = cost_mod.relative_cost_from_codes(price, rc, route.uniques, fc, family.uniques)
    mass = cost_mod.part_mass_kg(np.asarray(density, float), d, thickness_mm, length_mm)
    return {"relative_cost": rel, "mass_kg": mass, "part_cost": rel * mass, "price_source": src}


#: the order under which a column that depends on the row count only is kept (:func:`_taken`)
_NO_ORDER = np.zeros(0, np.int64)
_NO_ORDER.setflags(write=False)


def _with_section(out: pd.DataFrame, d, thickness_mm, length_mm) -> pd.DataFrame:
    out.attrs["section"] = {"diameter_mm": d, "thickness_mm": thickness_mm, "length_mm": float(length_mm)}
    return out


#: (structure digest, columns, digest of the result parameters) -> the layout of
#: :func:`_layout` (a few recent ones)
_LAYOUTS: dict = {}


def _result_parameters() -> list:
    """Window parameters of the route families that the states table holds as a model
    result (the column is overwritten by the result, so it depends on the section)."""
    return sorted({p for f in fam_registry.available() for p in f.parameters if p in RESULT_COLUMNS})


#: structure digest -> the section-independent parts of :func:`_layout` (a few recent ones)
_LAYOUT_PARTS: dict = {}


def _layout(df: pd.DataFrame, digest: str | None = None) -> tuple:
    """``(variant keys, main values, variant codes, row order)`` of a costed states table:
    the order used by rank(), the nominal block sorted by variant and main value, then the
    lean and the rich blocks in the same state order (numpy index arithmetic on codes).
    ``digest``: the table's structure digest (:func:`selector.states.expand.structure_of`),
    under which the parts that do not depend on the section are kept (the column codes, the
    keys of the route families with no model result among their columns, the rank of the
    state keys and the rows of each corner)."""
    memo = _LAYOUT_PARTS.get(digest) if digest is not None else None
    if memo is None:
        memo = {}
        if digest is not None:
            evict_oldest(_LAYOUT_PARTS, 4)
            _LAYOUT_PARTS[digest] = memo
    variant, vcode = _variant_keys(df, memo)
    main = np.full(len(df), np.nan)
    for r, idx in memo["route_rows"].items():
        mp = _main_param(r)
        if mp and mp in df:
            main[idx] = df[mp].to_numpy()[idx].astype(float)
    ranks = memo.get("key_rank")
    if ranks is None:
        corner = df["corner"].to_numpy(dtype=object)
        ranks = memo["key_rank"] = (pd.factorize(df["state_key"], sort=True)[0],    # lexicographic rank
                                    {c: np.flatnonzero(corner == c) for c in ("nominal", "lean", "rich")})
    key_rank, rows = ranks
    nom_idx = rows["nominal"]
    nom_order = nom_idx[np.lexsort((key_rank[nom_idx], main[nom_idx], vcode[nom_idx]))]
    take = [nom_order]
    for c in ("lean", "rich"):
        idx = rows[c]
        pos = np.full(int(key_rank.max()) + 1, -1, dtype=np.int64)
        pos[key_rank[idx]] = idx
        blk = pos[key_rank[nom_order]]
        if len(idx) != len(nom_order) or np.any(blk < 0):
            raise RuntimeError("states table is not aligned by composition corner")
        take.append(blk)
    order = np.concatenate(take)
    m = len(nom_order)
    keys = key_rank[order]            # equal ranks are equal state keys
    if len(order) != 3 * m or not (np.array_equal(keys[:m], keys[m:2 * m]) and np.array_equal(keys[:m], keys[2 * m:])):
        raise RuntimeError("states table is not aligned by composition corner")
    return variant, main, vcode, order


_SAMPLES: dict = {}


#: the columns of the nominal block that :func:`selector.states.scatter.sample` reads
_SAMPLE_INPUTS = ("state_key", "family", "route", bands.BAND_FREE) + tuple(scatter.SAMPLED)


def _sample_store(prepared: pd.DataFrame) -> dict:
    """The draws kept with ``prepared`` (a few recent tables): the narrow nominal block that
    :func:`selector.states.scatter.sample` reads, each state's row of the sensitivities, and
    per column the draws of the rows drawn so far, compact: ``draws[c]`` (k, N_DRAWS) holds
    the drawn rows in the order they were drawn and ``pos[c]`` (m,) the row of each nominal
    state in it (-1: not drawn), so that no (m, N_DRAWS) array is allocated for the few
    states a selection draws."""
    key = id(prepared)
    hit = _SAMPLES.get(key)
    if hit is not None and hit[0] is prepared:
        return hit[1]
    sec = prepared.attrs.get("section") or {}
    d, t = sec.get("diameter_mm"), sec.get("thickness_mm")
    m = len(prepared) // 3
    nom = prepared.iloc[:m]
    nom = nom[[c for c in _SAMPLE_INPUTS if c in nom.columns]]
    # the sensitivities are computed only for the states drawn (scatter.Sensitivities): the
    # corners are the lean and rich blocks of the prepared table, row-aligned with the nominal one
    blocks = [{p: prepared[p].to_numpy(float)[k * m:(k + 1) * m] for p in scatter.SAMPLED} for k in range(3)]
    sens = scatter.Sensitivities(nom["state_key"].to_numpy(), *blocks, d, t)
    store = {"nominal": nom, "section": (float(d if t is None else t), d, t), "sens": sens,
             "effect_rows": np.arange(m), "draws": {}, "pos": {}}
    evict_oldest(_SAMPLES, 8)
    _SAMPLES[key] = (prepared, store)
    return store


def _drawn(prepared: pd.DataFrame, columns, rows=None) -> tuple[dict, dict]:
    """``(draws, pos)`` of ``columns``: the compact draws of :func:`_sample_store` after
    drawing the states of ``rows`` (a boolean mask or indices of the nominal block; None:
    every state) not drawn yet.  A state's draws do not depend on which others are drawn
    with it (:data:`selector.states.scatter.SAMPLE_BLOCK_ROWS`)."""
    cols = list(columns)
    store = _sample_store(prepared)
    nom = store["nominal"]
    m = len(nom)
    if rows is None:
        want = np.ones(m, bool)
    else:
        rows = np.asarray(rows)
        want = rows.astype(bool) if rows.dtype == bool else np.isin(np.arange(m), rows)
    for c in cols:
        if c not in store["pos"]:
            store["pos"][c] = np.full(m, -1, np.int64)
            store["draws"][c] = np.zeros((0, scatter.N_DRAWS), np.float32)
    todo = {c: want & (store["pos"][c] < 0) for c in cols}
    for c in cols:
        need = np.flatnonzero(todo[c])
        if not len(need):
            continue
        # the other columns that need the same rows are drawn in the same call
        same = [k for k in cols if np.array_equal(todo[k], todo[c]) and len(np.flatnonzero(todo[k]))]
        section, d, t = store["section"]
        sub = nom if len(need) == m else nom.iloc[need]
        drawn = scatter.sample(sub, section, d, t, columns=same, effect_rows=store["effect_rows"][need],
                               sens=store["sens"])
        for k in same:
            old = store["draws"][k]
            store["draws"][k] = drawn[k] if not len(old) else np.concatenate([old, drawn[k]])
            store["pos"][k][need] = len(old) + np.arange(len(need))
            todo[k] = np.zeros(m, bool)
    return {c: store["draws"][c] for c in cols}, {c: store["pos"][c] for c in cols}


def samples(prepared: pd.DataFrame, columns=None, rows=None) -> dict:
    """Monte Carlo draws (:func:`selector.states.scatter.sample`) of the nominal block
    of ``prepared``, row-aligned with it: ``{column: (m, N_DRAWS) array}`` for
    ``columns`` (default every drawable column), each drawn on first use and kept with
    the prepared table (a few recent ones), so that a re-rank only re-thresholds them.
    ``rows`` (a boolean mask or indices of the nominal block) draws only those states
    (the others are NaN until drawn); a state's draws do not depend on which others are
    drawn with it (:data:`selector.states.scatter.SAMPLE_BLOCK_ROWS`)."""
    cols = list(scatter.DRAWABLE) if columns is None else list(columns)
    draws, pos = _drawn(prepared, cols, rows)
    out = {}
    for c in cols:
        at = np.flatnonzero(pos[c] >= 0)
        full = np.full((len(pos[c]), scatter.N_DRAWS), np.nan, np.float32)
        full[at] = draws[c][pos[c][at]]
        out[c] = full
    return out


def p_meet(prepared: pd.DataFrame, targets: dict | None, rows=None) -> np.ndarray:
    """Probability that each nominal state of ``prepared`` meets every target: the
    share of the Monte Carlo draws (composition scatter and model band) that meet
    every numeric target (NaN rules of :mod:`selector.selection.targets`), times the
    hard filters (family, corrosion resistance), shape (len(prepared) // 3,).
    ``rows`` (a boolean mask of the nominal block): only those states are drawn and
    counted, the others are NaN (the selection needs ``p_meet`` only where the targets
    are met at the nominal composition)."""
    t = validate_targets(targets, FAMILIES)
    m = len(prepared) // 3
    nom = prepared.iloc[:m]
    if rows is None:
        idx = None
    else:
        rows = np.asarray(rows, bool)
        if rows.shape != (m,):
            raise ValueError(f"rows: a mask of the {m} nominal states, not shape {rows.shape}")
        idx = np.flatnonzero(rows)
    sm, pos = _drawn(prepared, sorted({NUMERIC_TARGETS[k][0] for k in t if k in NUMERIC_TARGETS}
                                      & set(scatter.DRAWABLE)), rows=idx)
    ok = None
    for key in NUMERIC_TARGETS:
        if key not in t:
            continue
        col, side = NUMERIC_TARGETS[key]
        if col in sm:
            at = pos[col] if idx is None else pos[col][idx]
            # the compact draws as they are where they hold exactly these rows in this order
            v = sm[col] if len(at) == len(sm[col]) and np.array_equal(at, np.arange(len(at))) else sm[col][at]
        else:
            v = nom[col].to_numpy(float)[:, None]
            v = v if idx is None else v[idx]
        lim = t[key]
        with np.errstate(invalid="ignore"):
            if side == "min":
                r = v >= lim
            elif col in _NAN_PASSES_MAX:
                r = ~(v > lim)
            else:
                r = v <= lim
        ok = r if ok is None else ok & r
    k = m if idx is None else len(idx)
    p_k = np.ones(k) if ok is None else np.broadcast_to(ok, (k, ok.shape[1])).mean(axis=1)
    if idx is None:
        p = p_k
    else:
        p = np.full(m, np.nan)
        p[idx] = p_k
    hard = {k_: v_ for k_, v_ in t.items() if k_ not in NUMERIC_TARGETS}
    if hard:
        p = p * meets(nom, hard)
    return p


_VIEWS: dict = {}


def _caution_view(prepared: pd.DataFrame):
    """The caution rules' column arrays of the nominal block of ``prepared``, kept per
    prepared table (a few recent ones) so that re-ranking does not re-read them."""
    key = id(prepared)
    hit = _VIEWS.get(key)
    if hit is not None and hit[0] is prepared:
        return hit[1]
    view = cautions_mod.read_frame(prepared.iloc[:len(prepared) // 3])
    if len(_VIEWS) >= 8:
        _VIEWS.pop(next(iter(_VIEWS)))
    _VIEWS[key] = (prepared, view)
    return view


_AVOID: dict = {}


def _avoid_masks(prepared: pd.DataFrame, allowed, ctx: dict) -> dict:
    """:func:`selector.rules.cautions.avoid_masks` of the nominal block of ``prepared``,
    kept per prepared table, allowed rules and context (the masks depend on the targets
    only through ``ctx["strength_target"]``): a re-rank for new targets reuses them."""
    try:
        key = (id(prepared), tuple(sorted(allowed)), tuple(sorted(ctx.items())))
        hash(key)
    except TypeError:             # an unhashable context value: computed every time
        return cautions_mod.avoid_masks(_caution_view(prepared), allowed, **ctx)
    hit = _AVOID.get(key)
    if hit is not None and hit[0] is prepared:
        return hit[1]
    masks = cautions_mod.avoid_masks(_caution_view(prepared), allowed, **ctx)
    for v in masks.values():
        v.setflags(write=False)
    evict_oldest(_AVOID, 32)
    _AVOID[key] = (prepared, masks)
    return masks


def _check_min_p(min_p_meet) -> float:
    import math
    if isinstance(min_p_meet, bool) or not isinstance(min_p_meet, (int, float, np.integer, np.floating)) \
            or not math.isfinite(float(min_p_meet)) or not (0.0 < float(min_p_meet) <= 1.0):
        raise InputError("min_p_meet", min_p_meet, "a probability in (0, 1], e.g. 0.9")
    return float(min_p_meet)


def prepare(diameter_mm=25.0, thickness_mm=None, length_mm=100.0, price_sheet=None) -> pd.DataFrame:
    """The expanded, costed states table with variant keys: everything that does
    not depend on the targets (cached; the page caches it too).  Rows are laid out
    as three aligned blocks (nominal, lean, rich), the nominal block sorted by
    variant and main parameter; treat the frame as read-only."""
    length_mm = inputs.number("length_mm", length_mm, 1.0, 20000.0, unit="part length, mm")
    d, t = section_args(diameter_mm, thickness_mm)
    prices = tuple(sorted((cost_mod.check_price_sheet(price_sheet) or {}).items()))
    return _prepare_cached(d, t, float(length_mm), prices)


def _true_runs(ok: np.ndarray, brk: np.ndarray) -> tuple:
    """Start and end positions of maximal runs of True in ``ok`` that do not cross a
    segment break (``brk[i]`` True where a new variant or a gap in the grid starts)."""
    prev = np.r_[False, ok[:-1]]
    nxt = np.r_[ok[1:], False]
    brk_next = np.r_[brk[1:], True]
    start = np.flatnonzero(ok & (brk | ~prev))
    end = np.flatnonzero(ok & (brk_next | ~nxt))
    return start, end


def _best_runs(start, end, vcode, main):
    """Per variant, the widest run (ties: the lowest main value)."""
    if len(start) == 0:
        return start, end
    count = end - start
    order = np.lexsort((main[start], -count, vcode[start]))
    v_sorted = vcode[start][order]
    first = np.r_[True, v_sorted[1:] != v_sorted[:-1]]
    pick = order[first]
    return start[pick], end[pick]


def _representative(starts: np.ndarray, ends: np.ndarray, n_notes: np.ndarray) -> np.ndarray:
    """The chosen point of each run: among the run's states with the fewest model
    notes (e.g. outside the tempered-martensite-embrittlement range), the one
    nearest the middle of the run, the value most tolerant of furnace scatter
    (the first such state on a tie).  One pass over all runs at once.

    >>> _representative(np.array([0, 5]), np.array([4, 7]), np.array([1, 1, 1, 1, 1, 2, 0, 0])).tolist()
    [2, 6]
    """
    starts, ends = np.asarray(starts, int), np.asarray(ends, int)
    if len(starts) == 0:
        return np.zeros(0, int)
    lens = ends - starts + 1
    offsets = np.r_[0, np.cumsum(lens)[:-1]]
    run = np.repeat(np.arange(len(starts)), lens)
    idx = starts[run] + (np.arange(int(lens.sum())) - offsets[run])
    seg = np.asarray(n_notes)[idx]
    fewest = np.minimum.reduceat(seg, offsets)
    cost = (seg - fewest[run]) * 10_000 + np.abs(idx - (starts + ends)[run] / 2.0)
    order = np.lexsort((idx, cost, run))            # by run, then cost, then position
    return idx[order[offsets]]


def rank(prepared: pd.DataFrame, targets: dict | None = None, objectives=DEFAULT_OBJECTIVES,
         robust_only: bool = False, service: dict | None = None, min_p_meet: float = MIN_P_MEET,
         allow=None) -> pd.DataFrame:
    """Candidates of ``prepared`` (from :func:`prepare`) for ``targets``: the fast
    step that the page re-runs when only the targets change.  ``service`` holds the
    context of the cautions (``plated``, ``plating``, ``mating_material``,
    ``service_temp_c``, ``environment``; see :func:`selector.rules.cautions.cautions_for`);
    ``min_p_meet`` and ``allow`` as in :func:`select`."""
    t = validate_targets(targets, FAMILIES)
    objectives = _check_objectives(objectives)
    robust_only = inputs.flag("robust_only", robust_only)
    min_p = _check_min_p(min_p_meet)
    allowed = cautions_mod.check_allow(allow)
    ctx = check_context(service, "service")
    ctx["strength_target"] = any(k in t for k in STRENGTH_TARGETS)
    m = len(prepared) // 3
    ok = np.asarray(meets(prepared, t), bool)
    nominal = ok[:m]
    corners = ok.reshape(3, m).all(axis=0)
    p = p_meet(prepared, t, rows=nominal)     # needed only where the targets are met at nominal
    # a candidate state meets every target at its estimate; p_meet grades how surely
    likely = (p >= min_p - 1e-12) & nominal
    nom = prepared.iloc[:m]
    am = _avoid_masks(prepared, allowed, ctx)
    clean = ~np.any(list(am.values()), axis=0) if am else np.ones(m, bool)
    vcode = nom["variant_code"].to_numpy()
    main = nom["main_value"].to_numpy(float)
    same = np.r_[False, vcode[1:] == vcode[:-1]]
    diff = np.r_[np.nan, main[1:] - main[:-1]]
    diff = np.where(same, diff, np.nan)
    step = pd.Series(np.where(diff > 0, diff, np.nan)).groupby(vcode).transform("min").to_numpy()
    gap = np.nan_to_num(diff > 1.5 * step, nan=False).astype(bool)
    brk = ~same | gap
    tiers = [(likely & clean, True), (nominal & clean, True), (likely, False), (nominal, False)]
    if robust_only:
        tiers = [tiers[0], tiers[2]]
    taken = np.zeros(int(vcode.max()) + 1 if m else 1, bool)
    starts, ends, tier_no, all_runs = [], [], [], []
    for k, (mask, _) in enumerate(tiers):
        s_all, e_all = _true_runs(mask, brk)
        s_b, e_b = _best_runs(s_all, e_all, vcode, main)
        keep = ~taken[vcode[s_b]] if len(s_b) else np.zeros(0, bool)
        taken[vcode[s_b[keep]]] = True
        starts.append(s_b[keep])
        ends.append(e_b[keep])
        tier_no.append(np.full(int(keep.sum()), k))
        all_runs.append((s_all, e_all))
    starts, ends, tier_no = np.concatenate(starts), np.concatenate(ends), np.concatenate(tier_no)
    if len(starts) == 0:
        return _empty(t)
    pick = _representative(starts, ends, nom["n_notes"].to_numpy())
    cand = nom.iloc[pick]              # a new frame (copy-on-write): nom is never changed through it
    cand.attrs = {}      # pandas deep-copies attrs on every operation: ~30 % of a re-rank
    has_window = np.array([tiers[k][1] for k in tier_no], bool)
    add = {"nominal": nominal[pick], "p_meet": p[pick], "min_p_meet": min_p, "robust": likely[pick],
           "corners_meet": corners[pick], "window_min": np.where(has_window, main[starts], np.nan),
           "window_max": np.where(has_window, main[ends], np.nan),
           "robust_window_min": np.where(has_window & likely[pick], main[starts], np.nan),
           "robust_window_max": np.where(has_window & likely[pick], main[ends], np.nan),
           "feasible_min": main[starts], "feasible_max": main[ends]}
    subs = []
    for v, k, ok_w in zip(vcode[starts], tier_no, has_window):
        if not ok_w:
            subs.append("")
            continue
        s_all, e_all = all_runs[k]
        mine = vcode[s_all] == v
        subs.append("; ".join(_range_text(main[a], main[b]) for a, b in zip(s_all[mine], e_all[mine])))
    add["sub_windows"] = subs
    return _finish(cand, t, objectives, ctx, allowed, pre=add)


def _with_columns(frame: pd.DataFrame, columns: dict) -> pd.DataFrame:
    """``frame`` with ``columns`` set as by assigning them one by one (``frame[name] =
    value``: a column of that name replaced in place, the others added at the end in order,
    the same dtypes), with one concatenation instead of one insertion per column."""
    new = {k: v for k, v in columns.items() if k not in frame.columns}
    out = frame
    if new:
        add = pd.DataFrame({k: (np.full(len(frame), v) if np.ndim(v) == 0 and not isinstance(v, str) else v)
                            for k, v in new.items()}, index=frame.index)
        out = pd.concat([frame, add], axis=1)
        out.attrs = dict(frame.attrs)
    for k, v in columns.items():
        if k not in new:
            out[k] = v
    return out


def _range_text(lo, hi) -> str:
    if lo != lo:
        return ""
    return f"{lo:g}–{hi:g}" if hi > lo else f"{lo:g}"


def _check_objectives(objectives):
    """``None`` means the default objectives; otherwise a list or tuple of
    (column, "max" | "min") pairs, each column once."""
    if objectives is None:
        return DEFAULT_OBJECTIVES
    if isinstance(objectives, (str, bytes)) or not isinstance(objectives, (list, tuple)):
        raise InputError("objectives", objectives, "a list of (column, 'max' | 'min') pairs, e.g. "
                         "[('yield_mpa', 'max'), ('relative_cost', 'min')]")
    if len(objectives) > len(OBJECTIVE_COLUMNS):
        raise InputError("objectives", objectives, f"at most {len(OBJECTIVE_COLUMNS)} pairs (each column once)")
    out = []
    for item in objectives:
        if not isinstance(item, (tuple, list)) or len(item) != 2:
            raise InputError("objectives", item, "pairs (column, 'max' | 'min')")
        col, sense = item
        if not isinstance(col, str) or col not in OBJECTIVE_COLUMNS:
            raise InputError("objectives", col, ", ".join(OBJECTIVE_COLUMNS))
        if not isinstance(sense, str) or sense not in ("max", "min"):
            raise InputError("objectives", sense, "'max' or 'min'")
        if any(c == col for c, _ in out):
            raise InputError("objectives", col, "each column once")
        out.append((col, sense))
    if not out:
        raise InputError("objectives", objectives, "at least one (column, sense) pair")
    return tuple(out)


def _window_text(row) -> str:
    fam = fam_registry.get(row["route"])
    mp = fam.main_parameter
    if not mp:
        return ""
    unit = "°C" if mp.endswith("_c") else "%" if mp.endswith("_pct") else "h" if mp.endswith("hours") \
        else "mm" if mp.endswith("_mm") else ""
    lo, hi = row["window_min"], row["window_max"]
    if lo != lo:
        flo, fhi = row.get("feasible_min", np.nan), row.get("feasible_max", np.nan)
        if flo != flo:
            return ""
        return (f"none clear of avoid cautions (targets met at {mp} {_range_text(flo, fhi)} {unit})").strip()
    txt = f"{mp} {lo:g}–{hi:g} {unit}".strip() if hi > lo else f"{mp} {lo:g} {unit} only".strip()
    subs = [w for w in str(row.get("sub_windows") or "").split("; ") if w and w != _range_text(lo, hi)]
    if subs:
        txt += f" (also {', '.join(subs)} {unit})".replace("  ", " ")
    return txt


_ROUTES: dict = {}
_NAN_KEY = object()      # stands for NaN in the keys of _ROUTES


def _route_of(fam, params: tuple) -> tuple:
    """(steps, route text) of a route family at ``params`` ((name, value) pairs), kept
    (a re-rank lists mostly the same candidates again)."""
    try:
        # NaN is not equal to itself: a key holding a fresh NaN object would never be found again
        key = (fam.name, tuple((k, _NAN_KEY if v != v else v) for k, v in params))
        hit = _ROUTES.get(key)
    except (TypeError, ValueError):
        hit, key = None, None
    if hit is None:
        steps = fam.to_steps(dict(params))
        hit = (steps, describe(steps))
        if key is not None:
            if len(_ROUTES) >= 20_000:
                _ROUTES.clear()
            _ROUTES[key] = hit
    return hit


#: resolution at which ``p_meet`` orders candidates that are not robust: two candidates whose
#: ``p_meet`` fall in the same step of 0.05 are ordered by part cost.  A step is about 1.4
#: Monte Carlo standard errors at N_DRAWS = 200 and p = 0.5 (0.035,
#: :func:`selector.states.scatter.standard_error`), so that a difference the draws cannot
#: resolve does not put a dearer candidate first (chosen here; docs/methods/selection.md).
P_MEET_STEP = 0.05


def p_meet_step(p: np.ndarray, robust: np.ndarray) -> np.ndarray:
    """The ordering key of ``p_meet`` (higher first): ``floor(p / P_MEET_STEP)`` for the
    candidates that are not robust, one common value (above every step) for the robust
    ones, which are ordered by cost alone; NaN ``p_meet`` sorts last.

    >>> p_meet_step(np.array([0.54, 0.52, 0.31, 0.97]), np.array([False, False, False, True])).tolist()
    [10.0, 10.0, 6.0, 21.0]
    """
    p = np.asarray(p, float)
    with np.errstate(invalid="ignore"):
        step = np.floor(p / P_MEET_STEP + 1e-9)
    return np.where(np.asarray(robust, bool), np.floor(1.0 / P_MEET_STEP) + 1.0, step)


def _finish(cand: pd.DataFrame, t: dict, objectives, service: dict | None = None, allowed=(),
            pre: dict | None = None) -> pd.DataFrame:
    """The candidates table of ``cand`` (one row per candidate) with ``pre`` (columns
    to set on ``cand`` first, as by :func:`_with_columns`), cautions, routes, windows,
    margins, pareto and rank, in rank order."""
    pre = dict(pre or {})
    cand = cand.reset_index(drop=True)
    lists = cautions_mod.cautions_for(cand, **(service or {}))
    cautions = ["; ".join(d["title"] for d in row) for row in lists]
    order = {s_: i for i, s_ in enumerate(cautions_mod.SEVERITIES)}
    live = [[d for d in row if d["code"] not in allowed] for row in lists]
    severity = [max((d["severity"] for d in row), key=order.get, default="") for row in live]
    avoid = [";".join(d["code"] for d in row if d["severity"] == "avoid") for row in live]
    routes, texts, wparam, wtext = [], [], [], []
    need = {"route", "window_min", "window_max", "robust", "robust_window_min", "robust_window_max",
            "feasible_min", "feasible_max", "sub_windows"}
    for f in fam_registry.available():
        need.update(f.parameters)
    cols = [c for c in cand.columns if c in need and c not in pre] + [c for c in pre if c in need]
    # rows as dicts of Python values (Series.tolist boxes like to_dict("records"), at a fraction of its cost)
    lists_of = [np.asarray(pre[c]).tolist() if c in pre else cand[c].tolist() for c in cols]
    for r in (dict(zip(cols, vals)) for vals in zip(*lists_of)):
        fam = fam_registry.get(r["route"])
        steps, text = _route_of(fam, tuple((p, r[p]) for p in fam.parameters if p in r))
        routes.append([dict(st) for st in steps])        # the caller's own copy of the steps
        texts.append(text)
        wparam.append(fam.main_parameter or "")
        wtext.append(_window_text(r))
    add = {"cautions": cautions, "severity": severity, "avoid": avoid, "route_family": cand["route"],
           "route": routes, "route_text": texts, "window_parameter": wparam, "window": wtext}
    for col in ("p_meet", "corners_meet"):
        if col not in cand and col not in pre:
            add[col] = np.nan
    add = {**pre, **add}
    add["margin_bands"] = _margin_bands(cand, t)

    def col(c):
        return add[c] if c in add else cand[c]
    vals = np.column_stack([np.broadcast_to(np.asarray(col(c), float), (len(cand),)) for c, _ in objectives])
    clean = np.array([a == "" for a in avoid], bool)
    pool = clean if clean.any() else np.ones(len(cand), bool)
    par = np.zeros(len(cand), bool)
    if pool.any():
        par[pool] = pareto_mask(vals[pool], [s_ == "max" for _, s_ in objectives])
    m = margins(cand, t)
    add.update({"pareto": par, **{c: m[c].to_numpy() for c in m.columns}})
    # the order of sorting the table by these keys, read from the keys alone; at equal cost and
    # p_meet step, a candidate whose worst live caution is milder comes first
    p_col = np.broadcast_to(np.asarray(col("p_meet"), float), (len(cand),))
    robust = np.asarray(col("robust"))
    keys = pd.DataFrame({"_avoid": ~clean, "robust": robust,
                         "_step": p_meet_step(p_col, robust.astype(bool)),
                         "_sev": np.array([order.get(s_, -1) for s_ in severity], float),
                         "part_cost": cand["part_cost"].to_numpy(), "p_meet": p_col,
                         **{c: cand[c].to_numpy() for c in ("elongation_pct", "yield_mpa")}})
    ranked = keys.sort_values(["_avoid", "robust", "_step", "part_cost", "_sev", "p_meet", "elongation_pct",
                               "yield_mpa"],
                              ascending=[True, False, False, True, True, False, False, False],
                              kind="stable", na_position="last").index.to_numpy()
    # one assembly of the table in rank order (each new column put in that order too): the
    # same columns, values and dtypes as adding them one step at a time, at a fraction of the copies
    add = {k: _in_order(v, ranked) for k, v in add.items()}
    add["rank"] = np.arange(1, len(cand) + 1)
    cand = _with_columns(cand.take(ranked).reset_index(drop=True), add)
    cols = OUTPUT_COLUMNS + list(m.columns) + [c for c in cand.columns
                                               if c not in OUTPUT_COLUMNS and c not in m.columns]
    return cand[[c for c in cols if c in cand.columns]]


def _in_order(v, order: np.ndarray):
    """A column value of :func:`_finish` (scalar, list, array or Series) put in ``order``."""
    if isinstance(v, pd.Series):
        return v.take(order).reset_index(drop=True)
    if isinstance(v, list):
        return [v[i] for i in order]
    if np.ndim(v) == 0:
        return v
    return np.asarray(v)[order]


#: banded columns a target can test -> band columns (selector.routes.bands)
_BANDED_TARGET_COLUMNS = ("yield_mpa", "uts_mpa", "elongation_pct", "hardness_hrc")


def _margin_bands(cand: pd.DataFrame, t: dict) -> np.ndarray:
    """The smallest margin over the numeric targets on banded properties, in widths
    of the 90 % band (``margin / (hi − lo)``); NaN when no such target is given."""
    out = np.full(len(cand), np.inf)
    any_t = False
    for key, (col, side) in NUMERIC_TARGETS.items():
        if key not in t or col not in _BANDED_TARGET_COLUMNS or f"{col}_lo" not in cand:
            continue
        any_t = True
        v = cand[col].to_numpy(float)
        width = cand[f"{col}_hi"].to_numpy(float) - cand[f"{col}_lo"].to_numpy(float)
        mg = v - t[key] if side == "min" else t[key] - v
        with np.errstate(invalid="ignore", divide="ignore"):
            r = np.where(width > 0, mg / width, np.where(mg >= 0, np.inf, -np.inf))
        nan_r = np.inf if (side == "max" and col in _NAN_PASSES_MAX) else -np.inf
        out = np.minimum(out, np.where(np.isnan(v), nan_r, r))
    return out if any_t else np.full(len(cand), np.nan)


def _empty(t) -> pd.DataFrame:
    cols = OUTPUT_COLUMNS + [f"margin_{k}" for k in t if k not in ("families", "exclude_families",
                                                                   "corrosion_resistant")]
    return pd.DataFrame(columns=cols)


def select(targets: dict | None = None, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
           length_mm: float = 100.0, price_sheet: dict | None = None, objectives=DEFAULT_OBJECTIVES,
           robust_only: bool = False, plated: bool = False, plating: str | None = None,
           mating_material: str | None = None, service_temp_c: float | None = None,
           environment: str = "normal", min_p_meet: float = MIN_P_MEET, allow=None,
           finish: str = "machined", load_type: str = "bending", reliability: float = 0.5,
           impact: bool = False) -> pd.DataFrame:
    """Grade-and-route candidates that meet ``targets`` at the given section.

    Parameters
    ----------
    targets : dict
        Any of ``min_yield_mpa, max_yield_mpa, min_uts_mpa, max_uts_mpa,
        min_elongation_pct, min_hardness_hrc, max_hardness_hrc`` (at the tension-test
        location), ``min_surface_hardness_hrc, min_case_depth_mm, max_relative_cost,
        min_fatigue_mpa`` (fully reversed fatigue limit at the section, MPa),
        ``families, exclude_families, corrosion_resistant``.
    diameter_mm : float
        Round section diameter, mm (or give ``thickness_mm`` for a plate).
    length_mm : float
        Part length, mm (for the part's mass and ``part_cost``).
    price_sheet : dict, optional
        ``{grade id: relative price per kg}`` overriding the catalogue
        (see :func:`selector.selection.cost.parse_price_sheet`).
    objectives : sequence of (column, "max" | "min")
        Pareto objectives out of :data:`OBJECTIVE_COLUMNS`; default minimise part
        cost, maximise ``p_meet``, maximise elongation.  ``margin_bands`` (the
        smallest margin in widths of the 90 % band) is an alternative to ``p_meet``.
    robust_only : bool
        Keep only candidates with ``p_meet >= min_p_meet``.
    plated, plating, mating_material, service_temp_c, environment
        Service context for the ``cautions`` column (hydrogen embrittlement of
        plated high-strength steel, galvanic pairs, service temperature near the
        tempering or aging temperature); see :mod:`selector.rules.cautions`.
    min_p_meet : float
        Required probability, in (0, 1], that a heat within the specification meets
        every target (default 0.9); ``robust = p_meet >= min_p_meet``.
    allow : list of str, optional
        Caution codes whose ``avoid`` severity the user switches off (e.g.
        ``["quench_cracking"]``, also accepted as ``"water_quench_alloy"``); see
        :func:`selector.rules.cautions.check_allow`.
        ``service_temp_c`` also sets the fatigue temperature factor.
    impact : bool
        Impact or shock loading in service: a caution on hard cases (>= 55 HRC) and
        through-hardened parts (>= 50 HRC).
    finish, load_type, reliability
        Surface finish (``ground``, ``machined``, ``hot_rolled``, ``as_forged``), load
        type (``bending``, ``axial``, ``torsion``) and reliability (0.5 to 0.9999) of the
        ``fatigue_limit_mpa`` column and the ``min_fatigue_mpa`` target
        (:mod:`selector.routes.fatigue`).

    Returns
    -------
    pandas.DataFrame
        One row per candidate in ``rank`` order (see the module docstring), with
        ``p_meet``, ``min_p_meet``, ``robust``, ``corners_meet``, ``pareto``,
        ``rank``, ``severity``, ``avoid``, ``window``/``sub_windows``.  Empty when
        nothing qualifies (then see :func:`nearest_misses`).

    Raises
    ------
    InputError
        A bad target, section, ``min_p_meet`` outside (0, 1] or an unknown rule in
        ``allow`` (naming the field, the value and what is allowed).
    """
    # every argument is checked before the (expensive) expansion
    t = validate_targets(targets, FAMILIES)
    objectives = _check_objectives(objectives)
    robust_only = inputs.flag("robust_only", robust_only)
    _check_min_p(min_p_meet)
    cautions_mod.check_allow(allow)
    fat = dict(fatigue_mod.check_options(finish, load_type, reliability), temp_c=service_temp_c)
    service = check_context(dict(plated=plated, plating=plating, mating_material=mating_material,
                                 service_temp_c=service_temp_c, environment=environment, impact=impact),
                            "service")
    prepared = prepare(diameter_mm, thickness_mm, length_mm, price_sheet)
    if "min_fatigue_mpa" in t:
        prepared = with_fatigue(prepared, **fat)
    out = rank(prepared, t, objectives, robust_only, service, min_p_meet, allow)
    if "fatigue_limit_mpa" not in out.columns and len(out):
        d, th = section_args(diameter_mm, thickness_mm)
        out = with_fatigue(out, section_mm=d or th, **fat)
    return out


def with_fatigue(frame: pd.DataFrame, finish: str = "machined", load_type: str = "bending",
                 reliability: float = 0.5, temp_c=None, section_mm: float | None = None) -> pd.DataFrame:
    """A copy of a states or candidates frame with the fatigue columns of
    :func:`selector.routes.fatigue.fatigue_columns` (``fatigue_limit_mpa`` and its band,
    cycles, governing depth) at the frame's section (``attrs["section"]``)."""
    sec = frame.attrs.get("section", {})
    section = section_mm or sec.get("diameter_mm") or sec.get("thickness_mm")
    route = frame["route_family"] if "route_family" in frame.columns else frame["route"]
    cols = fatigue_mod.fatigue_columns(frame, frame["family"].astype(str).to_numpy(),
                                       route.astype(str).to_numpy(), float(section), finish=finish,
                                       load_type=load_type, reliability=reliability, temp_c=temp_c)
    keep = ("fatigue_limit_mpa", "fatigue_limit_mpa_lo", "fatigue_limit_mpa_hi", "fatigue_cycles",
            "fatigue_governing", "fatigue_governing_depth_mm")
    out = frame.assign(**{k: cols[k] for k in keep})
    out.attrs = dict(frame.attrs)
    return out


def nearest_misses(targets: dict, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
                   length_mm: float = 100.0, price_sheet: dict | None = None, n: int = 10,
                   finish: str = "machined", load_type: str = "bending", reliability: float = 0.5,
                   service_temp_c: float | None = None) -> pd.DataFrame:
    """The closest candidates when nothing meets ``targets``: for each target, how far
    it would have to move (``move_<key>``) for that candidate to qualify at the
    nominal composition.  One row per variant (its best parameter point), sorted by
    ``miss_score`` (the sum of the relative moves)."""
    t = validate_targets(targets, FAMILIES)
    n = inputs.integer("n", n, 1, 10_000)
    fat = dict(fatigue_mod.check_options(finish, load_type, reliability), temp_c=service_temp_c)
    prepared = prepare(diameter_mm, thickness_mm, length_mm, price_sheet)
    if "min_fatigue_mpa" in t:
        prepared = with_fatigue(prepared, **fat)
    m = len(prepared) // 3
    nom = prepared.iloc[:m].assign(p_meet=p_meet(prepared, t))
    hard = _hard_filters(nom, t)
    nom = nom[hard]
    if nom.empty:
        return pd.DataFrame(columns=["grade", "family", "route_text", "miss_score"])
    sf = shortfalls(nom, t)
    nom = nom.assign(**{c: sf[c].to_numpy() for c in sf.columns})
    best = nom.sort_values("miss_score", kind="stable").drop_duplicates("variant").head(int(n))
    out = _finish(best.assign(window_min=np.nan, window_max=np.nan, robust_window_min=np.nan,
                              robust_window_max=np.nan, robust=False, nominal=False), {}, DEFAULT_OBJECTIVES)
    out = out.sort_values("miss_score", kind="stable").reset_index(drop=True)
    lead = ["grade", "family", "route_text", "miss_score"] + list(sf.columns.drop("miss_score"))
    return out[lead + [c for c in out.columns if c not in lead]]


def _routes(frame: pd.DataFrame) -> tuple[list, list]:
    """The steps and the route text of each row of a states table."""
    routes, texts = [], []
    params = sorted({p_ for f in fam_registry.available() for p_ in f.parameters})
    cols = ["route"] + [c for c in params if c in frame.columns]
    for r in frame[cols].to_dict("records"):
        fam = fam_registry.get(r["route"])
        steps = fam.to_steps({p_: r[p_] for p_ in fam.parameters if p_ in r})
        routes.append(steps)
        texts.append(describe(steps))
    return routes, texts


_MISS_COLUMNS = ["grade", "family", "route_family", "route_text", "route", "variant", "yield_mpa", "uts_mpa",
                 "elongation_pct", "hardness_hrc", "surface_hardness_hrc", "case_depth_mm", "relative_cost",
                 "part_cost", "p_meet"]


def miss_analysis(targets: dict, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
                  length_mm: float = 100.0, price_sheet: dict | None = None, n: int = 10) -> dict:
    """What can be reached when nothing meets every target.

    Parameters
    ----------
    targets, diameter_mm, thickness_mm, length_mm, price_sheet, n
        As :func:`nearest_misses`.

    Returns
    -------
    dict
        ``misses``: the table of :func:`nearest_misses` (each row a state with its
        ``route``, which can be evaluated and opened like a candidate).
        ``reachable``: one row per numeric target: the best value of its property
        (``best``) over the states, at the nominal composition, that meet every
        *other* target (and the hard filters), the state that reaches it, and how far
        the limit would have to move (``move``, ``relative_move``; 0 when met, inf when
        no state meets the others).
        ``frontier``: the trade-off between the two most binding targets (the two
        whose limits the nearest misses need to move most, in total relative moves;
        ``axes`` names them): the non-dominated states
        (Pareto front of the two properties, each in its target's direction) among
        those that meet every other target, sorted along the first axis; e.g. the
        highest yield reachable at each elongation.  Empty with fewer than two
        numeric targets.
    """
    t = validate_targets(targets, FAMILIES)
    misses = nearest_misses(t, diameter_mm, thickness_mm=thickness_mm, length_mm=length_mm,
                            price_sheet=price_sheet, n=n)
    prepared = prepare(diameter_mm, thickness_mm, length_mm, price_sheet)
    m = len(prepared) // 3
    nom = prepared.iloc[:m].assign(p_meet=p_meet(prepared, t))
    nom = nom[_hard_filters(nom, t)]
    keys = [k for k in NUMERIC_TARGETS if k in t]
    mg = margins(nom, t)
    met = mg.to_numpy() >= 0 if keys else np.ones((len(nom), 0), bool)
    rows = []
    for j, k in enumerate(keys):
        col, side = NUMERIC_TARGETS[k]
        others = np.delete(met, j, axis=1).all(axis=1)
        v = nom[col].to_numpy(float)
        ok = others & np.isfinite(v)
        rec = {"target": k, "column": col, "limit": t[k], "best": np.nan, "move": np.inf,
               "relative_move": np.inf, "met": False, "grade": "", "route_text": "", "route": None,
               "variant": ""}
        if ok.any():
            idx = np.flatnonzero(ok)
            i = idx[np.argmax(v[idx])] if side == "min" else idx[np.argmin(v[idx])]
            best = float(v[i])
            move = max(0.0, t[k] - best) if side == "min" else max(0.0, best - t[k])
            steps, texts = _routes(nom.iloc[[i]])
            rec.update(best=best, move=move, met=move == 0.0,
                       relative_move=(move / abs(t[k]) if t[k] else (0.0 if move == 0 else np.inf)),
                       grade=nom["grade"].iloc[i], route_text=texts[0], route=steps[0],
                       variant=nom["variant"].iloc[i])
        rows.append(rec)
    reach = pd.DataFrame(rows, columns=["target", "column", "limit", "best", "move", "relative_move", "met",
                                        "grade", "route_text", "route", "variant"])
    frontier, axes = pd.DataFrame(columns=_MISS_COLUMNS), ()
    if len(keys) >= 2:
        # binding: the total relative move the nearest misses need on each target
        bind = []
        for k in keys:
            mv = misses.get(f"move_{k}")
            mv = np.zeros(1) if mv is None else np.nan_to_num(mv.to_numpy(float), posinf=1e9)
            bind.append(float(mv.sum()) / (abs(t[k]) or 1.0))
        order = np.argsort(-np.asarray(bind), kind="stable")
        a, b = keys[order[0]], keys[order[1]]
        axes = (a, b)
        ja, jb = keys.index(a), keys.index(b)
        others = np.delete(met, [ja, jb], axis=1).all(axis=1)
        (ca, sa), (cb, sb) = NUMERIC_TARGETS[a], NUMERIC_TARGETS[b]
        va, vb = nom[ca].to_numpy(float), nom[cb].to_numpy(float)
        pool = others & np.isfinite(va) & np.isfinite(vb)
        if pool.any():
            pts = np.column_stack([va[pool], vb[pool]])
            front = pareto_mask(pts, [sa == "min", sb == "min"])
            sel = nom[pool][front].drop_duplicates([ca, cb])
            steps, texts = _routes(sel)
            sel = sel.assign(route_family=sel["route"], route=steps, route_text=texts)
            frontier = sel[[c for c in _MISS_COLUMNS if c in sel.columns]].sort_values(ca, kind="stable")
            frontier = frontier.reset_index(drop=True)
    return {"misses": misses, "reachable": reach, "frontier": frontier, "axes": axes}


def _hard_filters(frame: pd.DataFrame, t: dict) -> np.ndarray:
    keep = np.ones(len(frame), bool)
    if t.get("families"):
        keep &= frame["family"].isin(t["families"]).to_numpy()
    if t.get("exclude_families"):
        keep &= ~frame["family"].isin(t["exclude_families"]).to_numpy()
    if t.get("corrosion_resistant"):
        keep &= frame["corrosion_resistant"].to_numpy(bool)
    return keep


ELONGATION_TOLERANCE_PCT = 1.0


def alternatives(grade, route, diameter_mm: float = 25.0, *, thickness_mm: float | None = None,
                 length_mm: float = 100.0, price_sheet: dict | None = None,
                 elongation_tolerance_pct: float = ELONGATION_TOLERANCE_PCT) -> pd.DataFrame:
    """Cheaper candidates that reach at least the properties of the given choice.

    The given grade and route are evaluated; its yield and tensile strength (and
    surface hardness and case depth when case-hardened, and corrosion resistance
    when the grade has it) become minimum targets, and its elongation less
    ``elongation_tolerance_pct`` (default 1 point: in quenched-and-tempered steels
    elongation follows strength closely, SAE J413, so an exact tie in both is only
    reached by the same steel; 1 point is below the elongation correlation's median
    error of 1.2 points, docs/methods/correlations.md).  The result lists the
    candidates whose relative cost per kg is lower, cheapest first, with
    ``saving_per_kg``; ``attrs["reference"]`` holds the given choice.

    When the given choice's strength is not estimated (its hardness is above the
    tensile-strength column of ASTM A370 Table 3, about HRC 59), its HRC hardness
    becomes the minimum target instead; ``attrs["reference"]["basis"]`` says which
    (``"strength"`` or ``"hardness"``).
    """
    tol = inputs.number("elongation_tolerance_pct", elongation_tolerance_pct, 0.0, 50.0, unit="percentage points")
    prices = cost_mod.check_price_sheet(price_sheet) or {}
    length_mm = inputs.number("length_mm", length_mm, 1.0, 20000.0, unit="part length, mm")
    ref = evaluate(grade, route, diameter_mm=diameter_mm, thickness_mm=thickness_mm)
    g = default_catalogue().lookup(grade)
    price = prices.get(g.id, g.relative_price)
    ref_cost = float(cost_mod.relative_cost_per_kg(np.array([price]), np.array([ref["route_family"]]),
                                                np.array([g.family]))[0])
    if ref.get("yield_mpa") is not None and ref.get("uts_mpa") is not None:
        basis = "strength"
        t = {"min_yield_mpa": ref["yield_mpa"], "min_uts_mpa": ref["uts_mpa"]}
        if ref.get("elongation_pct") is not None:
            t["min_elongation_pct"] = max(ref["elongation_pct"] - tol, 0.0)
    elif ref.get("hardness_hrc") is not None:
        # strength not estimated (hardness above the A370 tensile column): the
        # reference's hardness is the property to reach
        basis = "hardness"
        t = {"min_hardness_hrc": ref["hardness_hrc"]}
    else:
        raise NotModelledError(f"alternatives to {g.id} {ref['route_text']}: neither its strength nor its "
                               "HRC hardness is estimated, so there is no property to match")
    if ref.get("case_depth_mm"):
        t["min_case_depth_mm"] = ref["case_depth_mm"]
        if ref.get("surface_hardness_hrc") is not None:
            t["min_surface_hardness_hrc"] = ref["surface_hardness_hrc"]
    if g.corrosion_resistant:
        t["corrosion_resistant"] = True
    t = {k: v for k, v in t.items() if v is not None}
    cand = select(t, diameter_mm, thickness_mm=thickness_mm, length_mm=length_mm, price_sheet=prices or None)
    cand = cand[cand["relative_cost"] < ref_cost - 1e-9].copy()
    cand["saving_per_kg"] = ref_cost - cand["relative_cost"]
    cand = cand.sort_values(["relative_cost", "robust"], ascending=[True, False], kind="stable")
    cand.attrs["reference"] = {**ref, "relative_cost": ref_cost, "targets": t, "basis": basis}
    return cand.reset_index(drop=True)
