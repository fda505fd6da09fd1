"""Composition mappings used by every steel model.

A composition is a mapping from element symbol (``"C"``, ``"Mn"``, ...) to wt %,
each value a float or a numpy array (one entry per state, so that a whole
catalogue is evaluated at once).  Elements that are absent count as 0.
"""
from __future__ import annotations

from typing import Mapping

import numpy as np

ELEMENTS = ("C", "Mn", "Si", "P", "S", "Ni", "Cr", "Mo", "V", "Cu", "Al", "B", "N", "W",
            "Co", "Ti", "Nb", "Zn", "Mg", "Fe", "Sn", "Pb", "Be", "Zr", "As", "Se", "O", "H")

Composition = Mapping[str, "np.ndarray | float"]


def el(comp: Composition, symbol: str) -> np.ndarray:
    """wt % of ``symbol`` in ``comp`` as a float array (0 where absent).

    Example (illustrative: a value of this implementation, not a published one)

    >>> [float(el({"C": 0.4}, "C")), float(el({"C": 0.4}, "Mo"))]
    [0.4, 0.0]
    """
    v = comp.get(symbol, 0.0)
    return np.asarray(v, dtype=float)


def broadcast_shape(comp: Composition) -> tuple:
    """The common numpy shape of the element arrays of ``comp`` (``()`` for scalars).

    Example (illustrative: a value of this implementation, not a published one)

    >>> import numpy as np
    >>> broadcast_shape({"C": np.array([0.2, 0.4]), "Mn": 0.8})
    (2,)
    """
    arrays = [np.asarray(v) for v in comp.values()]
    return np.broadcast(*arrays).shape if arrays else ()
