"""The model inputs a route family feeds, declared once, checked in one place.

Every route family lists, in its class attribute ``model_inputs``, each input of each
model it calls: the model's name in :mod:`selector.models.validity`, the registered
variable, and where the value is found.  ``routes.evaluate.finish`` calls
:func:`validity_notes` on every computed batch, so an input outside its model's
registered range always gives a visible warning naming the model, the variable, its
value and the range; a family cannot forget one check, and
``tests/test_validity_coverage.py`` fails when a registered range is declared by no family.

Where a value is found (:func:`value`), in this order:

1. ``res["model_inputs"][name]``: intermediate values the family's ``compute`` exposes
   (the Biot number, the tempering parameter, the value at the test location, ...);
   NaN where the state does not use the model;
2. ``batch.params[name]``: a process parameter of the route (``temp_c``, ``hours``);
3. an element symbol (``"C"``, ``"Mo"``): the state's composition, wt %;
4. ``res[name]``: a result column (``hardness_hv``, ``case_depth_mm``);
5. ``"section_mm"``: the batch's section.

``where`` names boolean arrays of ``res["model_inputs"]`` (ANDed): the states that use
the model (default: all).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..models import validity
from ..models.composition import el

ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo", "V", "Cu", "Al", "W", "Co", "Ti", "Nb", "N", "B", "P", "S")


@dataclass(frozen=True)
class ModelInput:
    """One input of one model: ``variable`` of the registered ``model``, read from ``source``
    (default: the variable's own name) on the states ``where`` (names of masks)."""

    model: str
    variable: str
    source: str = ""
    where: tuple = ()

    @property
    def name(self) -> str:
        return self.source or self.variable


def uses(model: str, *variables: str, where: str | tuple = (), **renamed: str) -> tuple:
    """``ModelInput``s of ``model``: each of ``variables`` read under its own name, each
    ``variable=source`` of ``renamed`` read from ``source``; ``where``: mask name(s)."""
    w = (where,) if isinstance(where, str) else tuple(where)
    return tuple(ModelInput(model, v, "", w) for v in variables) + \
        tuple(ModelInput(model, v, s, w) for v, s in renamed.items())


def restrict(res: dict, mask_name: str, mask) -> None:
    """AND ``mask`` into the mask ``mask_name`` of ``res["model_inputs"]`` (in place): a
    family that runs a shared chain on more states than use it (a core computed with
    placeholder values) says which states really do."""
    mi = res.setdefault("model_inputs", {})
    m = np.asarray(mask, bool)
    mi[mask_name] = np.asarray(mi.get(mask_name, np.ones(m.shape, bool)), bool) & m


def value(name: str, res: dict, batch) -> np.ndarray:
    """The (n,) float values of ``name`` for the batch (see the module docstring)."""
    n = batch.n
    mi = res.get("model_inputs", {})
    if name in mi:
        x = mi[name]
    elif name in batch.params and np.asarray(batch.params[name]).dtype != object:
        x = batch.params[name]
    elif name in ELEMENTS:
        x = el(batch.comp, name)
    elif name in res:
        x = res[name]
    elif name == "section_mm":
        x = batch.section_mm
    else:
        raise KeyError(f"model input {name!r}: not in the family's model_inputs, parameters, "
                       "composition or result")
    return np.broadcast_to(np.asarray(x, float), (n,))


def mask(names: tuple, res: dict, n: int) -> np.ndarray:
    """AND of the masks ``names`` of ``res["model_inputs"]`` (all True when empty)."""
    out = np.ones(n, bool)
    mi = res.get("model_inputs", {})
    for w in names:
        if not out.any():
            break               # no state uses the model: the later masks need not exist
        if w not in mi:
            raise KeyError(f"model-input mask {w!r} is not in the family's model_inputs")
        out &= np.broadcast_to(np.asarray(mi[w], bool), (n,))
    return out


class NoteRows:
    """The states a note applies to, kept as ascending row numbers of a batch of ``n``
    states: ``np.asarray(note_rows, bool)`` gives the (n,) mask, so every reader of
    ``(message, mask)`` notes works unchanged, and :func:`selector.states.expand.note_codes`
    reads ``rows`` without building the mask.

    >>> np.asarray(NoteRows(np.array([0, 2]), 4), bool).tolist()
    [True, False, True, False]
    """

    __slots__ = ("rows", "n")

    def __init__(self, rows, n: int):
        self.rows = np.asarray(rows, np.int64)
        self.n = int(n)

    def __array__(self, dtype=None, copy=None):
        m = np.zeros(self.n, bool)
        m[self.rows] = True
        return m if dtype is None else m.astype(dtype, copy=False)


def validity_notes(inputs, res: dict, batch, rows: bool = False) -> list[tuple[str, np.ndarray]]:
    """``(message, mask)`` notes for every declared input outside its model's registered
    range (:func:`selector.models.validity.notes`), vectorised over the batch; with ``rows``
    each mask is a :class:`NoteRows` (the states as row numbers; converts to the bool mask)."""
    out = []
    masks: dict = {}
    for inp in inputs:
        if inp.where not in masks:
            on = mask(inp.where, res, batch.n)
            masks[inp.where] = on if on.any() else None
        on = masks[inp.where]
        if on is not None:
            x = value(inp.name, res, batch)
            if rows:
                out += [(msg, NoteRows(at, batch.n)) for msg, at in
                        validity.notes(inp.model, inp.variable, x, on, rows=True)]
            else:
                out += validity.notes(inp.model, inp.variable, x, on)
    return out
