"""As-quenched hardness of steel martensite against carbon content.

The hardness of fresh martensite depends on carbon alone (Grange, Hribal & Porter,
Metall. Trans. A 8A (1977) 1775, who found the as-quenched hardness a function of
carbon only).  Full (99.9 %) martensite uses the "initial hardness" polynomial of
ASTM A255 (the Jominy J1 hardness); 90 % and 50 % martensite use the Hodge &
Orehoski (1946) table reproduced in ASTM A255.  Intermediate percentages are
interpolated linearly in hardness between those three curves; below 50 % the
hardness is extrapolated linearly towards the 50 % curve minus the 90→50 drop per
40 points, and never below a ferrite–pearlite floor of 15 HRC-equivalent.

Values are tagged ``from memory`` in ``data/martensite_hardness.csv``: check them
against ASTM A255 before release.
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import read_table
from . import validity

REFERENCE = ("ASTM A255 (initial hardness polynomial); J.M. Hodge & M.A. Orehoski, "
             "Trans. AIME 167 (1946) 627")

validity.register("martensite_hardness", {"C": (0.10, 0.70, "wt%"),
                                          "pct_martensite": (50.0, 99.9, "%")}, REFERENCE)


def ih_hrc(c_pct):
    """ASTM A255 initial (J1) hardness of 99.9 % martensite, HRC.

    IH = 35.395 + 6.990 C + 312.330 C^2 - 821.744 C^3 + 1015.479 C^4 - 538.346 C^5

    Parameters
    ----------
    c_pct : array_like
        Carbon, wt %.  Validity 0.10–0.70 %; above 0.70 % the value is held at the
        0.70 % value (fresh martensite hardness saturates, plus retained austenite).

    Returns
    -------
    ndarray, HRC.

    References
    ----------
    ASTM A255-10, calculation of hardenability (initial hardness).  Coefficients
    from memory: confidence ``from memory``.

    Example (from the source: ASTM A255 initial hardness (99.9 % martensite) at 0.40 % C: 56.1
    HRC (from memory))

    >>> round(float(ih_hrc(0.40)), 1)
    56.1
    """
    c = np.clip(np.asarray(c_pct, float), 0.0, 0.70)
    return (35.395 + 6.990 * c + 312.330 * c**2 - 821.744 * c**3
            + 1015.479 * c**4 - 538.346 * c**5)


@functools.cache
def _table():
    t = read_table("martensite_hardness.csv", numeric=["carbon_pct", "hrc_99_9", "hrc_90", "hrc_50"])
    return (t["carbon_pct"].to_numpy(), t["hrc_90"].to_numpy(), t["hrc_50"].to_numpy())


def martensite_hardness_hrc(c_pct, pct_martensite=99.9):
    """As-quenched hardness (HRC) of a steel with ``pct_martensite`` % martensite.

    Parameters
    ----------
    c_pct : array_like
        Carbon, wt % (validity 0.10–0.70).
    pct_martensite : array_like
        Martensite percentage, 0–100 (the published curves cover 50, 90, 99.9).

    Returns
    -------
    ndarray, HRC (broadcast of the inputs).

    References
    ----------
    ASTM A255 IH polynomial; Hodge & Orehoski, Trans. AIME 167 (1946) 627.

    Example (from the source: ASTM A255 / Hodge & Orehoski (1946), 0.40 % C: 99.9 % martensite
    56.1 HRC (from memory))

    >>> round(float(martensite_hardness_hrc(0.40, 99.9)), 1)
    56.1
    """
    c = np.asarray(c_pct, float)
    m = np.clip(np.asarray(pct_martensite, float), 0.0, 100.0)
    cc, h90, h50 = _table()
    c_cl = np.clip(c, cc[0], cc[-1])
    h100 = ih_hrc(c)
    h90v = np.interp(c_cl, cc, h90)
    h50v = np.interp(c_cl, cc, h50)
    above = h90v + (h100 - h90v) * (m - 90.0) / 9.9
    mid = h50v + (h90v - h50v) * (m - 50.0) / 40.0
    below = h50v - (h90v - h50v) * (50.0 - m) / 40.0
    out = np.where(m >= 90.0, above, np.where(m >= 50.0, mid, below))
    out = np.minimum(out, h100)
    return np.maximum(out, 15.0)


def martensite_pct_from_hrc(c_pct, hardness_hrc):
    """Inverse of :func:`martensite_hardness_hrc`: the martensite percentage that
    gives ``hardness_hrc`` at carbon ``c_pct`` (clipped to 0–99.9 %).

    Vectorised by bisection on the monotone forward relation.

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(martensite_pct_from_hrc(0.40, 50.0)), 1)
    91.6
    """
    c = np.asarray(c_pct, float)
    h = np.asarray(hardness_hrc, float)
    c, h = np.broadcast_arrays(c, h)
    lo = np.zeros(c.shape)
    hi = np.full(c.shape, 99.9)
    for _ in range(40):
        mid = 0.5 * (lo + hi)
        f = martensite_hardness_hrc(c, mid)
        lo = np.where(f < h, mid, lo)
        hi = np.where(f < h, hi, mid)
    return 0.5 * (lo + hi)
