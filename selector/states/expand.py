"""Expansion of the catalogue into a table of states: every grade × every route
family it admits × the family's process-window grid × the composition corners
(lean, nominal, rich).  This table is each grade's reachable region in
strength–elongation–hardness space.

The expansion runs one vectorised ``compute`` per route family over all grades at
once (no loop over ``evaluate``); ``evaluate`` runs the same ``compute`` on a batch of
one, so a row of this table and ``evaluate`` of its ``route`` agree exactly.
"""
from __future__ import annotations

import functools
import hashlib
import weakref

import numpy as np
import pandas as pd

from ..cache import evict_oldest
from ..catalogue.grades import default_catalogue
from ..errors import NotModelledError
from ..routes import families as fam_registry
from ..routes.evaluate import BAND_KEYS, finish, section_args
from ..routes.families.base import Batch, distinct_rows
from ..routes.model_inputs import NoteRows

CORNERS = ("lean", "nominal", "rich")

#: result arrays copied into the table
RESULT_COLUMNS = ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hv", "hardness_hrc", "hardness_hb",
                  "surface_hardness_hv", "surface_hardness_hrc", "center_hardness_hv", "center_hardness_hrc",
                  "case_depth_mm", "reduction_area_pct", "center_uts_mpa", "center_yield_mpa",
                  "center_martensite_pct", "peak_ratio", "di_mm", "band_free",
                  "section_limit_mm", "bainite_pct") + BAND_KEYS


def _family_blocks(fam, grades, corners):
    """The section-independent part of a family's batch: grades, composition and
    parameter arrays, state numbers and corners, built per block (a grade at a corner)
    with ``np.repeat``, not per state (at 10^6 states per-element ``np.full`` calls were
    a third of the expansion's time)."""
    glist, grids, comps, sizes, block_grade, block_corner = [], [], [], [], [], []
    for g in grades:
        try:
            grid = fam.grid(g)
        except NotModelledError:
            continue
        m = len(next(iter(grid.values())))
        if m == 0:
            continue
        k = len(glist)
        glist.append(g)
        grids.append(grid)
        for ci, corner in enumerate(corners):
            comps.append(g.composition(corner))
            sizes.append(m)
            block_grade.append(k)
            block_corner.append(ci)
    if not glist:
        return None
    sizes = np.asarray(sizes, np.int64)
    n = int(sizes.sum())
    starts = np.cumsum(sizes) - sizes
    gidx = np.repeat(np.asarray(block_grade, np.int64), sizes)
    elements = sorted({e for comp in comps for e in comp})
    comp_arr = {e: np.repeat(np.array([float(comp.get(e, 0.0)) for comp in comps], float), sizes)
                for e in elements}
    par = {}
    for name in grids[0]:
        parts = [np.asarray(grids[block_grade[b]][name]) for b in range(len(sizes))]
        obj = any(p.dtype == object or p.dtype.kind in "US" for p in parts)
        par[name] = np.concatenate([p.astype(object) if obj else p.astype(float) for p in parts])
    for grid in grids[1:]:          # grids of one family share their parameter names
        for name in grid:
            if name not in par:
                raise KeyError(f"{fam.name}: grid parameter {name!r} missing for some grades")
    state_no = np.arange(n, dtype=np.int64) - np.repeat(starts, sizes)
    corner_col = np.repeat(np.asarray(corners, dtype=object)[np.asarray(block_corner)], sizes)
    return tuple(glist), gidx, comp_arr, par, state_no, corner_col


@functools.lru_cache(maxsize=32)
def _catalogue_blocks(family_name: str, corners: tuple):
    """:func:`_family_blocks` over the whole catalogue, kept per family: the grid and the
    compositions do not depend on the section, so a new section reuses them."""
    fam = fam_registry.get(family_name)
    cat = default_catalogue()
    grades = [g for g in cat.grades.values()
              if fam.name in g.routes and (not fam.families or g.family in fam.families)]
    return _family_blocks(fam, grades, corners)


def _blocks_of(fam, grades, corners):
    """``(blocks, kept)``: :func:`_family_blocks` of ``fam`` over ``grades`` (None: the
    catalogue, the blocks kept by :func:`_catalogue_blocks`, ``kept`` True)."""
    if grades is None and fam_registry.get(fam.name) is fam:
        return _catalogue_blocks(fam.name, tuple(corners)), True
    cat_grades = default_catalogue().grades.values() if grades is None else grades
    return _family_blocks(fam, [g for g in cat_grades if fam.name in g.routes and
                                (not fam.families or g.family in fam.families)], corners), False


def _family_batch(fam, grades, diameter_mm, thickness_mm, corners, blocks=None):
    """One :class:`Batch` of every grade × grid point × corner of ``fam`` (``grades``
    None: the catalogue, from :func:`_catalogue_blocks`; ``blocks``: those of
    :func:`_blocks_of`, when the caller has them)."""
    if blocks is None:
        blocks = _blocks_of(fam, grades, corners)[0]
    if blocks is None:
        return None
    glist, gidx, comp_arr, par, state_no, corner_col = blocks
    n = len(gidx)
    d = np.full(n, np.nan if diameter_mm is None else diameter_mm)
    t = np.full(n, np.nan if thickness_mm is None else thickness_mm)
    # copies: a family's compute gets arrays of its own, the kept blocks stay as built
    batch = Batch(list(glist), gidx.copy(), {e: a.copy() for e, a in comp_arr.items()},
                  {k: a.copy() for k, a in par.items()}, d, t)
    return batch, state_no.copy(), corner_col.copy()


#: most states of one family computed in one vectorised call; a larger family is computed in
#: chunks of this many states, so the models' intermediate arrays (profiles over 5-11 positions,
#: several per state) stay bounded while the table grows (each state's row depends on that state
#: only: tests/test_scale.py checks a chunked expansion against an unchunked one)
CHUNK_STATES = 65_536


#: states per chunk of the families whose models hold large per-state intermediates (peak traced
#: memory measured with tracemalloc in chunks of 4096 states, grids refined x10: austemper about
#: 71 kB per state (the transformation path in the bath), carburize about 18 kB (the case
#: profile), quench_temper about 6 kB); the others use :data:`CHUNK_STATES`
FAMILY_CHUNK_STATES = {"austemper": 1024, "carburize": 2048}
#: states per chunk of :func:`expand_narrow` (about 100 MB of quench_temper intermediates)
NARROW_CHUNK_STATES = 16_384


def chunk_states(fam, default: int | None = None) -> int:
    """States per chunk for ``fam``: :data:`FAMILY_CHUNK_STATES`, at most ``default``
    (:data:`CHUNK_STATES` when None)."""
    top = CHUNK_STATES if default is None else int(default)
    return max(1, min(top, FAMILY_CHUNK_STATES.get(fam.name, top)))


def _computed(fam, batch):
    """``(rows, result)`` of ``fam.compute`` + :func:`finish` over ``batch``, in chunks."""
    n = batch.n
    size = chunk_states(fam)
    if n <= size:
        yield slice(0, n), finish(fam.compute(batch), batch, fam.name, note_rows=True)
        return
    for a in range(0, n, size):
        b = min(n, a + size)
        mask = np.zeros(n, bool)
        mask[a:b] = True
        sub = batch.subset(mask)
        yield slice(a, b), finish(fam.compute(sub), sub, fam.name, note_rows=True)


class Text:
    """A text column as integer codes into its distinct values (``codes`` -1: missing): the
    expansion builds every text column this way and writes each distinct text once."""

    __slots__ = ("codes", "uniques", "counts")

    def __init__(self, codes: np.ndarray, uniques, counts=None):
        self.codes = np.asarray(codes, np.int64)
        self.uniques = list(uniques)
        #: of the notes column: the number of notes of each distinct text (None: not known)
        self.counts = counts

    @classmethod
    def of(cls, values) -> "Text | None":
        """Codes of an object array whose values are all text or missing; None otherwise."""
        values = np.asarray(values, dtype=object)
        codes, uniq = pd.factorize(values, use_na_sentinel=True)
        if not all(isinstance(u, str) for u in uniq):
            return None
        return cls(codes, uniq)

    def series(self, dtype: str = "str") -> pd.Series:
        """The column as pandas builds it from the object array of its values (str dtype), or
        with ``dtype="object"`` as an object column whose rows share one str per distinct text."""
        if dtype == "object":
            return pd.Series(self.values(), dtype=object)
        if not self.uniques:
            return pd.Series(np.full(len(self.codes), np.nan, dtype=object))
        arr = pd.array(np.asarray(self.uniques, dtype=object), dtype="str")
        return pd.Series(arr.take(self.codes, allow_fill=True))

    def values(self) -> np.ndarray:
        """The column as an object array of its texts (NaN where missing)."""
        uniq = np.asarray(self.uniques + [np.nan], dtype=object)
        return uniq[self.codes]


def notes_in(text: str) -> int:
    """The number of notes in a joined notes text (``" | "``-separated; 0 for the empty text).

    >>> notes_in(""), notes_in("a"), notes_in("a | b")
    (0, 1, 2)
    """
    return text.count(" | ") + 1 if text else 0


def note_counts(texts: dict, counts: dict) -> np.ndarray:
    """The number of notes of each text of ``texts`` (text -> code) in code order: its count
    from :func:`note_codes` (``counts``, code -> count) where kept, else as the text reads
    (``" | "``-separated; 0 for the empty text)."""
    out = np.zeros(len(texts), np.int64)
    for text, code in texts.items():
        c = counts.get(code)
        out[code] = c if c is not None else notes_in(text)
    return out


def note_codes(notes, n: int, texts: dict, n_notes: dict | None = None) -> np.ndarray:
    """Codes (n,) of the joined notes of each state into ``texts`` (text -> code, extended in
    place; code 0 is the empty text): every ``(message, mask)`` pair that applies to a state, in
    the order of ``notes``, joined by " | ".  The messages of a state are gathered as a padded
    row of message numbers, and the text is written once per distinct row (a family's
    thousands of validity messages made the per-message string concatenation over every state
    the largest cost of the expansion).  ``n_notes`` (code -> number of notes, extended in place
    for each new text): a text joined from messages that hold no ``"|"`` and are not empty
    counts its messages (what :func:`notes_in` reads); the others are left out (read
    from the text by :func:`note_counts`).

    Example (illustrative)

    >>> import numpy as np
    >>> texts = {}
    >>> note_codes([("a", np.array([True, False, True])), ("b", np.array([True, False, False]))], 3, texts).tolist()
    [1, 0, 2]
    >>> list(texts)
    ['', 'a | b', 'a']
    """
    texts.setdefault("", 0)
    states, msg_no, sizes, msgs = [], [], [], []
    for j, (msg, mask) in enumerate(notes):
        idx = (mask.rows if isinstance(mask, NoteRows) and mask.n == n
               else np.flatnonzero(np.broadcast_to(np.asarray(mask, bool), (n,))))
        msgs.append(msg)
        if len(idx):
            states.append(idx)
            msg_no.append(j)
            sizes.append(len(idx))
    out = np.zeros(n, np.int64)
    if not states:
        return out
    st, mj = np.concatenate(states), np.repeat(np.asarray(msg_no, np.int64), sizes)
    order = np.lexsort((mj, st))
    st, mj = st[order], mj[order]
    counts = np.bincount(st, minlength=n)
    start = np.cumsum(counts) - counts
    rows = np.full((n, int(counts.max())), -1, np.int64)
    rows[st, np.arange(len(st)) - start[st]] = mj
    has = counts > 0
    sub = np.ascontiguousarray(rows[has])
    first, inv = distinct_rows(sub)
    code_of = np.empty(len(first), np.int64)
    rows_u = sub[first]
    if n_notes is not None:
        plain = np.array([bool(m_) and "|" not in m_ for m_ in msgs] + [True], bool)
        n_msg = (rows_u >= 0).sum(axis=1)
        exact = plain[rows_u].all(axis=1).tolist()        # -1 (padding) reads the last: True
        n_msg = n_msg.tolist()
    # in blocks of rows: a few hundred row lists alive at a time, not thousands (each burst of
    # live containers runs the cyclic garbage collector, and survivors push it to full passes)
    joined = []
    for a in range(0, len(rows_u), 256):
        joined += [" | ".join([msgs[j] for j in row if j >= 0]) for row in rows_u[a:a + 256].tolist()]
    get = texts.get
    for u, text in enumerate(joined):
        code = get(text)
        if code is None:
            code = texts[text] = len(texts)
            if n_notes is not None and exact[u]:
                n_notes[code] = n_msg[u]
        code_of[u] = code
    out[has] = code_of[inv]
    return out


def family_columns(fam, batch, state_no, corner, notes_texts: dict, n_notes: dict | None = None) -> dict:
    """The columns of one family's states: name -> numeric ndarray or :class:`Text`
    (``notes``: codes into ``notes_texts``, see :func:`note_codes`, with ``n_notes``),
    computed in chunks of :data:`CHUNK_STATES`."""
    n = batch.n
    results: dict = {}
    notes = np.zeros(n, np.int64)
    for rows, res in _computed(fam, batch):
        whole = rows.start == 0 and rows.stop == n
        for col in RESULT_COLUMNS:
            if col in res:
                v = np.asarray(res[col], float)
                if whole and v.shape == (n,):
                    results[col] = v          # one chunk: the result itself (the table copies it)
                    continue
                if col not in results:
                    results[col] = np.full(n, np.nan)
                results[col][rows] = v
        notes[rows] = note_codes(res.get("notes", []), rows.stop - rows.start, notes_texts, n_notes)
        del res
    gcodes = np.asarray(batch.gidx, np.int64)
    cols = {"grade": Text(gcodes, [g.id for g in batch.grades]),
            "family": Text.of(batch.attr("family")),
            "route": Text(np.zeros(n, np.int64), [fam.name]), "corner": corner, "state": state_no}
    for name in fam.parameters:
        if name in batch.params:
            v = np.asarray(batch.params[name])
            cols[name] = (Text.of(v) or v) if v.dtype == object else v
    for col in RESULT_COLUMNS:
        if col in results:
            cols[col] = results[col]
    cols["notes"] = notes
    cols["c_pct"] = batch.comp.get("C", np.zeros(n))
    cols["corrosion_resistant"] = batch.attr("corrosion_resistant").astype(bool)
    cols["relative_price"] = batch.attr("relative_price")
    cols["density_g_cm3"] = batch.attr("density_g_cm3")
    return cols


def _series(name: str, v):
    """A column of the states table: text as str columns, except ``notes``: an object column
    whose states share one str per distinct text (the joined notes run to thousands of
    characters; a str column copies them for every state and on every reordering)."""
    if not isinstance(v, Text):
        return v
    return v.series("object" if name == "notes" else "str")


#: public name of :func:`_series` (the selection builds its prepared table from the columns)
column_series = _series


def _frame(cols: dict, notes_texts: dict) -> pd.DataFrame:
    texts = list(notes_texts)
    data = {}
    for k, v in cols.items():
        if k == "notes":
            v = Text(v, texts)
        data[k] = _series(k, v)
    return pd.DataFrame(data)


def expand_family(fam, diameter_mm=25.0, thickness_mm=None, grades=None, corners=CORNERS) -> pd.DataFrame:
    """States table of one route family over ``grades`` (default: the catalogue)."""
    built = _family_batch(fam, grades or None, diameter_mm, thickness_mm, corners)
    if built is None:
        return pd.DataFrame()
    batch, state_no, corner = built
    texts: dict = {}
    return _frame(family_columns(fam, batch, state_no, Text.of(corner), texts), texts)


def _concat(parts: list, n: int) -> dict | None:
    """One column set from the families' column sets (rows in family order, a column absent
    from a family NaN / missing there, columns in order of first appearance, as ``pd.concat``);
    None where a column would change kind across families (then pandas concatenates)."""
    names: dict = {}
    for cols in parts:
        for k in cols:
            names.setdefault(k, None)
    sizes = [len(c["state"]) for c in parts]
    starts = np.cumsum(sizes) - sizes
    out = {}
    for k in names:
        have = [(i, c[k]) for i, c in enumerate(parts) if k in c]
        text = [isinstance(v, Text) for _, v in have]
        if any(text):
            if not all(text):
                return None
            uniq: dict = {}
            codes = np.full(n, -1, np.int64)
            for i, v in have:
                remap = np.array([uniq.setdefault(u, len(uniq)) for u in v.uniques] + [-1], np.int64)
                codes[starts[i]:starts[i] + sizes[i]] = remap[v.codes]
            out[k] = Text(codes, list(uniq))
            continue
        kinds = {np.asarray(v).dtype.kind for _, v in have}
        if len(have) < len(parts) and not kinds <= {"f"}:
            return None
        if len(kinds) > 1 or kinds & {"O", "U", "S"}:
            return None
        arr = np.full(n, np.nan) if len(have) < len(parts) else np.empty(n, np.asarray(have[0][1]).dtype)
        for i, v in have:
            arr[starts[i]:starts[i] + sizes[i]] = v
        out[k] = arr
    return out


class StatesColumns:
    """The states table of one section as columns (name -> numeric ndarray or :class:`Text`,
    ``notes`` a :class:`Text`, every column of :data:`RESULT_COLUMNS`), its structure digest
    (:func:`structure_of`) and its ``state_key`` column: the form the selection reads, without
    building the DataFrame (:meth:`frame` builds the table of :func:`expand_states`).
    ``view[name]`` is the column as that table holds it (a Series); treat as read-only."""

    __slots__ = ("cols", "digest", "state_key", "n")

    def __init__(self, cols: dict, digest: str, state_key):
        self.cols = cols
        self.digest = digest
        self.state_key = state_key
        self.n = len(cols["state"])

    def __len__(self) -> int:
        return self.n

    def __contains__(self, name) -> bool:
        return name in self.cols or name == "state_key"

    @property
    def columns(self) -> list:
        return list(self.cols) + ["state_key"]

    def __getitem__(self, name) -> pd.Series:
        if name == "state_key":
            return pd.Series(self.state_key)
        return pd.Series(_series(name, self.cols[name]))

    def frame(self) -> pd.DataFrame:
        """The states table (as :func:`expand_states` returns it)."""
        df = pd.DataFrame({k: _series(k, v) for k, v in self.cols.items()})
        df["state_key"] = pd.Series(self.state_key.copy())
        evict_oldest(_STRUCTURES, 64)
        # never keeps a table alive; the notes as codes into their distinct texts beside it
        _STRUCTURES[id(df)] = (weakref.ref(df), self.digest, self.cols["notes"])
        return df


def _expand_built(d, t, grades=None, families=None):
    """:class:`StatesColumns` of ``families`` over ``grades`` at one section; a DataFrame
    (the states table) where a column changes kind across families."""
    fams = fam_registry.available() if families is None else families
    texts: dict = {}
    counts: dict = {}
    parts, kept = [], []
    for f in fams:
        blocks, is_kept = _blocks_of(f, grades or None, CORNERS)
        kept.append(blocks if is_kept else _FRESH)
        built = _family_batch(f, grades or None, d, t, CORNERS, blocks)
        if built is None:
            continue
        batch, state_no, corner = built
        parts.append(family_columns(f, batch, state_no, Text.of(corner), texts, counts))
    n = sum(len(c["state"]) for c in parts)
    cols = _concat(parts, n)
    if cols is None:
        df = pd.concat([_frame(c, texts) for c in parts], ignore_index=True, sort=False)
        for col in RESULT_COLUMNS:
            if col not in df:
                df[col] = np.nan
        df["case_depth_mm"] = df["case_depth_mm"].fillna(0.0)
        df["state_key"] = pd.Series((df["grade"] + "|" + df["route"] + "|" + df["state"].astype(str)).array)
        return df
    digest = _kept_digest(cols, kept)
    cols["notes"] = Text(cols["notes"], list(texts), note_counts(texts, counts))
    for col in RESULT_COLUMNS:
        if col not in cols:
            cols[col] = np.full(n, np.nan)
    cd = cols["case_depth_mm"]
    if not isinstance(cd, Text) and np.asarray(cd).dtype.kind == "f":
        cols["case_depth_mm"] = np.where(np.isnan(cd), 0.0, cd)          # as fillna(0.0)
    else:
        cols["case_depth_mm"] = _series("case_depth_mm", cd).fillna(0.0).to_numpy()
    # a key per state (grade, route, parameter point), shared by its corners; the same at
    # every section (written once per structure, the kept column after that)
    kept = _STATE_KEYS.get(digest)
    if kept is None:
        g, r = _series("grade", cols["grade"]), _series("route", cols["route"])
        kept = (g + "|" + r + "|" + pd.Series(cols["state"]).astype(str)).array
        evict_oldest(_STATE_KEYS, 8)
        _STATE_KEYS[digest] = kept
    return StatesColumns(cols, digest, kept)


def expand_states(diameter_mm: float | None = 25.0, thickness_mm: float | None = None, grades=None,
                  families=None) -> pd.DataFrame:
    """States table of ``families`` (default: every modelled route family) over
    ``grades`` (default: the catalogue) at one section; not cached."""
    d, t = section_args(diameter_mm, thickness_mm)
    built = _expand_built(d, t, grades, families)
    return built.frame() if isinstance(built, StatesColumns) else built


@functools.lru_cache(maxsize=8)
def _columns_cached(diameter_mm, thickness_mm):
    return _expand_built(diameter_mm, thickness_mm)


def expand_columns(diameter_mm: float | None = 25.0, thickness_mm: float | None = None):
    """The states table of :func:`expand` as :class:`StatesColumns` (cached per section; the
    selection reads it without building the DataFrame), or the DataFrame itself where the
    table cannot be held as columns."""
    return _columns_cached(*section_args(diameter_mm, thickness_mm))


#: per structure digest: the state_key column (see :func:`structure_of`)
_STATE_KEYS: dict = {}
#: id(table) -> (weak reference to the table, structure digest, notes as :class:`Text`) of the
#: recent tables of :func:`expand_states`
_STRUCTURES: dict = {}


#: (ids of the kept blocks of every family, column names) -> (the blocks, the structure digest)
_DIGESTS: dict = {}
#: marks blocks built for the call (not kept): no digest is kept for them
_FRESH = object()


def _kept_digest(cols: dict, kept: list) -> str | None:
    """:func:`_structure_digest` of ``cols``, kept per the blocks of the catalogue the columns
    were built from (every column it reads comes from those blocks: the same digest at every
    section); computed where a family's blocks are not the kept ones.  The memo holds the
    blocks, so their ids cannot be reused by other objects while it names them."""
    if any(b is _FRESH for b in kept):
        return _structure_digest(cols)
    key = (tuple(id(b) for b in kept), tuple(cols))
    hit = _DIGESTS.get(key)
    if hit is not None and all(a is b for a, b in zip(hit[0], kept)):
        return hit[1]
    digest = _structure_digest(cols)
    evict_oldest(_DIGESTS, 8)
    _DIGESTS[key] = (tuple(kept), digest)
    return digest


def _structure_digest(cols: dict) -> str | None:
    """A digest of every column of a states table that is not a model result (grade,
    family, route, corner, state number, window parameters, composition and price
    columns, and the column names in order): two tables with the same digest have the same
    states in the same rows.  None where a column is neither numeric nor :class:`Text`."""
    h = hashlib.blake2b(digest_size=20)
    h.update("\x1f".join(cols).encode())
    for k, v in cols.items():
        if k == "notes" or k in RESULT_COLUMNS:
            continue
        h.update(b"\x1e" + k.encode())
        if isinstance(v, Text):
            h.update(b"T" + np.ascontiguousarray(v.codes).tobytes())
            h.update("\x1f".join(v.uniques).encode())
            continue
        a = np.asarray(v)
        if a.dtype.kind not in "biuf":
            return None
        h.update(a.dtype.str.encode() + str(a.shape).encode() + np.ascontiguousarray(a).tobytes())
    return h.hexdigest()


def structure_of(states: pd.DataFrame) -> str | None:
    """The structure digest of a table returned by :func:`expand_states` (None when unknown,
    e.g. for a copy or a table built another way): tables with equal digests hold the same
    states (grade, route, window parameters, corner) in the same rows, whatever the section."""
    hit = _STRUCTURES.get(id(states))
    return hit[1] if hit is not None and hit[0]() is states else None


@functools.lru_cache(maxsize=16)
def _expand_cached(diameter_mm, thickness_mm) -> pd.DataFrame:
    built = _columns_cached(diameter_mm, thickness_mm)
    return built.frame() if isinstance(built, StatesColumns) else built


def expand(diameter_mm: float | None = 25.0, thickness_mm: float | None = None) -> pd.DataFrame:
    """States table of every modelled route family over the whole catalogue at one
    section (cached per section; treat the result as read-only)."""
    return _expand_cached(*section_args(diameter_mm, thickness_mm))


def _clear_expand_caches():
    _expand_cached.cache_clear()
    _columns_cached.cache_clear()


expand.cache_clear = _clear_expand_caches


# --------------------------------------------------------------------------- narrow, streamed
#: the properties kept per state by :func:`expand_narrow` (float32): those a target can test,
#: and the centre martensite of the through-hardening caution
NARROW_COLUMNS = ("uts_mpa", "yield_mpa", "elongation_pct", "hardness_hrc", "surface_hardness_hrc",
                  "case_depth_mm", "center_martensite_pct")


def _lean_blocks(fam, grades, corners):
    """The blocks (a grade at a corner) of ``fam`` over ``grades`` without any per-state array:
    ``(grades, blocks, elements, object_params)``, each block ``(grade no, corner no, grid,
    composition)``; ``elements`` and ``object_params`` over the whole family, as
    :func:`_family_blocks` decides them (so a batch of some blocks equals their rows of the
    batch of all)."""
    glist, blocks = [], []
    for g in grades:
        try:
            grid = fam.grid(g)
        except NotModelledError:
            continue
        if len(next(iter(grid.values()))) == 0:
            continue
        k = len(glist)
        glist.append(g)
        for ci, corner in enumerate(corners):
            blocks.append((k, ci, grid, g.composition(corner)))
    elements = sorted({e for b in blocks for e in b[3]})
    names = list(blocks[0][2]) if blocks else []
    obj = {n for n in names if any(np.asarray(b[2][n]).dtype == object or np.asarray(b[2][n]).dtype.kind in "US"
                                  for b in blocks)}
    return glist, blocks, elements, obj


def _blocks_batch(glist, blocks, elements, obj, diameter_mm, thickness_mm):
    """(Batch, state numbers, corner numbers) of some blocks of :func:`_lean_blocks`."""
    sizes = np.array([len(next(iter(b[2].values()))) for b in blocks], np.int64)
    n = int(sizes.sum())
    gidx = np.repeat(np.array([b[0] for b in blocks], np.int64), sizes)
    comp = {e: np.repeat(np.array([float(b[3].get(e, 0.0)) for b in blocks], float), sizes) for e in elements}
    par = {name: np.concatenate([np.asarray(b[2][name]).astype(object if name in obj else float) for b in blocks])
           for name in blocks[0][2]}
    state_no = np.arange(n, dtype=np.int64) - np.repeat(np.cumsum(sizes) - sizes, sizes)
    corner_no = np.repeat(np.array([b[1] for b in blocks], np.int8), sizes)
    d = np.full(n, np.nan if diameter_mm is None else diameter_mm)
    t = np.full(n, np.nan if thickness_mm is None else thickness_mm)
    return Batch(list(glist), gidx, comp, par, d, t), state_no, corner_no


_chunk_for = chunk_states


def expand_narrow(diameter_mm: float | None = 25.0, thickness_mm: float | None = None, grades=None,
                  families=None, chunk_states: int | None = None) -> dict:
    """A narrow states table, streamed: every route family over ``grades`` (default: the
    catalogue) at one section, computed in chunks of whole blocks (a grade at a composition
    corner) of about ``chunk_states`` states (default :data:`NARROW_CHUNK_STATES`, fewer for
    the families of :data:`FAMILY_CHUNK_STATES`), keeping per state
    only the float32 properties of :data:`NARROW_COLUMNS`, the family's main parameter, the
    number of model notes and integer codes; each chunk's batch and results are dropped
    before the next is built, so the peak memory is the narrow table (about 45 bytes per
    state) and one chunk's intermediates, whatever the number of states.

    Returns
    -------
    dict
        ``grade`` (int32 codes into ``grades``), ``route`` (int16 codes into ``routes``),
        ``corner`` (int8 codes into ``corners``), ``state`` (int32, the state's number in its
        grade's grid, as :func:`expand_states`), ``main_value`` (float32), ``n_notes``
        (int16), and each of :data:`NARROW_COLUMNS` (float32, NaN where undefined; each
        value is its :func:`expand_states` value rounded to float32:
        ``tests/test_scale.py``), with ``grades``, ``routes``, ``corners`` (lists of str).
    """
    d, t = section_args(diameter_mm, thickness_mm)
    fams = fam_registry.available() if families is None else families
    top = NARROW_CHUNK_STATES if chunk_states is None else max(1, int(chunk_states))
    grade_ids: dict = {}
    routes: list = []
    parts: dict = {k: [] for k in ("grade", "route", "corner", "state", "main_value", "n_notes") + NARROW_COLUMNS}
    for fam in fams:
        pool = default_catalogue().grades.values() if grades is None else grades
        admitted = [g for g in pool if fam.name in g.routes and (not fam.families or g.family in fam.families)]
        glist, blocks, elements, obj = _lean_blocks(fam, admitted, CORNERS)
        if not blocks:
            continue
        ri = len(routes)
        routes.append(fam.name)
        gcode = np.array([grade_ids.setdefault(g.id, len(grade_ids)) for g in glist], np.int32)
        main = fam.main_parameter
        chunk = _chunk_for(fam, top)
        i = 0
        while i < len(blocks):
            j, rows = i, 0
            while j < len(blocks) and (rows == 0 or rows + len(next(iter(blocks[j][2].values()))) <= chunk):
                rows += len(next(iter(blocks[j][2].values())))
                j += 1
            batch, state_no, corner_no = _blocks_batch(glist, blocks[i:j], elements, obj, d, t)
            res = finish(fam.compute(batch), batch, fam.name, note_rows=True)
            n = batch.n
            count = np.zeros(n, np.int64)
            for _msg, mask in res.get("notes", []):
                if isinstance(mask, NoteRows) and mask.n == n:
                    count[mask.rows] += 1            # ascending, distinct rows
                else:
                    count += np.broadcast_to(np.asarray(mask, bool), (n,))
            parts["grade"].append(gcode[batch.gidx])
            parts["route"].append(np.full(n, ri, np.int16))
            parts["corner"].append(corner_no)
            parts["state"].append(state_no.astype(np.int32))
            mv = batch.params.get(main) if main else None
            parts["main_value"].append(np.full(n, np.nan, np.float32) if mv is None
                                       else np.asarray(mv, float).astype(np.float32))
            parts["n_notes"].append(count.astype(np.int16))
            for col in NARROW_COLUMNS:
                v = res.get(col)
                parts[col].append(np.full(n, np.nan, np.float32) if v is None
                                  else np.broadcast_to(np.asarray(v, float), (n,)).astype(np.float32))
            del batch, res
            i = j
    out = {k: (np.concatenate(v) if v else np.zeros(0)) for k, v in parts.items()}
    if "case_depth_mm" in out:
        out["case_depth_mm"] = np.where(np.isnan(out["case_depth_mm"]), np.float32(0.0), out["case_depth_mm"])
    out.update(grades=list(grade_ids), routes=routes, corners=list(CORNERS))
    return out
