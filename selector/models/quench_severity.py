"""Grossmann quench severity H by quench medium and agitation.

Grossmann (1952) characterised a quench by one number, the severity

    H = h / (2 k)            [in^-1]

where h is the surface heat-transfer coefficient (taken near 705 °C) and k the
thermal conductivity of the steel.  The historical values were found by quenching
series of bars and locating the 50 %-martensite boundary, so they are effective,
averaged values: boiling regimes, bath temperature, part loading and racking change
the real severity, and the agitation words ("mild", "strong") are not quantitative
(Totten, Webster, Bates et al., "Limitations of the use of Grossman quench severity
factors").  Characterise the actual process before relying on a value.

The values live in ``data/quench_severity.csv`` with source and confidence; the
classic table was recalled, not read (``from memory``).  Still and forced air are
derived from h ≈ 70–210 W m⁻² K⁻¹ (radiation plus convection at 700 °C).

References
----------
M.A. Grossmann, *Elements of Hardenability*, ASM, Cleveland, 1952 (H table, as
reproduced in ASM Handbook Vol. 4, Heat Treating).
G.E. Totten, H. Webster, C.E. Bates et al., "Limitations of the use of Grossmann
quench severity factors", Proc. 17th ASM Heat Treating Society Conference, 1997.
"""
from __future__ import annotations

import functools

import numpy as np

from ..catalogue.loader import Column, Schema, read_table
from ..errors import DataFileError, InputError, check_choice
from . import validity

MEDIA = ("water", "brine", "oil", "polymer", "air")
AGITATIONS = ("none", "mild", "moderate", "strong")

#: thermal conductivity of steel used with H (austenite range near 700 °C), W/m·K (from memory)
K_STEEL_W_MK = 27.0

#: 1 in^-1 expressed in m^-1
PER_IN_TO_PER_M = 1.0 / 0.0254

REFERENCE = "Grossmann, Elements of Hardenability (ASM 1952), H table via ASM Handbook Vol. 4"

validity.register("grossmann_h", {"h_per_in": (0.01, 5.0, "in^-1")}, REFERENCE)

_SCHEMA = Schema((
    Column("medium", "choice", choices=MEDIA),
    Column("agitation", "choice", choices=AGITATIONS),
    Column("h_min_per_in", "float", lo=0.0, hi=10.0),
    Column("h_max_per_in", "float", lo=0.0, hi=10.0),
    Column("h_per_in", "float", lo=0.001, hi=10.0),
    Column("peak_ratio", "float", lo=1.0, hi=10.0),
    Column("peak_depth_mm", "float", lo=0.1, hi=50.0),
    Column("note", allow_blank=True),
    Column("source"),
    Column("confidence", "choice", choices=("verified", "partial", "from memory", "common practice", "demo")),
), row_check=lambda r: ("h_per_in", "must lie within h_min_per_in..h_max_per_in")
    if not (r["h_min_per_in"] - 1e-9 <= r["h_per_in"] <= r["h_max_per_in"] + 1e-9) else None)


@functools.cache
def _table(column: str = "h_per_in") -> dict:
    t = read_table("quench_severity.csv", schema=_SCHEMA)
    out = {(m, a): float(h) for m, a, h in zip(t["medium"], t["agitation"], t[column])}
    missing = [(m, a) for m in MEDIA for a in AGITATIONS if (m, a) not in out]
    if missing:
        raise DataFileError("quench_severity.csv", None, "medium",
                            f"no row for {missing[0][0]!r} with agitation {missing[0][1]!r}")
    return out


def _column(column: str, quench, agitation):
    """One column of the table for a medium and agitation (scalars or broadcast arrays)."""
    tab = _table(column)
    if isinstance(quench, str) and isinstance(agitation, str):
        check_choice("quench", quench, MEDIA)
        check_choice("agitation", agitation, AGITATIONS)
        return tab[(quench, agitation)]
    q = np.asarray(quench, dtype=object)
    a = np.asarray(agitation, dtype=object)
    q, a = np.broadcast_arrays(q, a)
    # one sorted look-up per array (no np.unique over the states): index, then check the match
    qi = _lookup_index("quench", q, MEDIA)
    ai = _lookup_index("agitation", a, AGITATIONS)
    grid = np.array([[tab[(m, g)] for g in sorted(AGITATIONS)] for m in sorted(MEDIA)])
    return grid[qi, ai]


def table_rows():
    """The quench-severity rows as a DataFrame (medium, agitation, range, value, source, confidence).

    Example (illustrative: a value of this implementation, not a published one)

    >>> len(table_rows()) > 0
    True
    """
    return read_table("quench_severity.csv", schema=_SCHEMA)


def _lookup_index(field: str, values: np.ndarray, allowed) -> np.ndarray:
    """Index of each value in ``sorted(allowed)``; InputError naming the first value not allowed."""
    keys = np.array(sorted(allowed))
    v = values.astype(str)
    idx = np.clip(np.searchsorted(keys, v), 0, len(keys) - 1)
    bad = keys[idx] != v
    if bad.any():
        check_choice(field, str(v[np.argmax(bad)]), allowed)
    return idx


def grossmann_h_per_in(quench, agitation="moderate"):
    """Grossmann quench severity H (in⁻¹) of a medium at a level of agitation (Grossmann 1952).

    H = h / (2k), tabulated (not computed) from bar-series quenches.

    Parameters
    ----------
    quench : str or array_like of str
        Quench medium: ``water``, ``brine``, ``oil``, ``polymer`` or ``air``.
    agitation : str or array_like of str
        ``none``, ``mild``, ``moderate`` or ``strong`` (broadcast with ``quench``).

    Returns
    -------
    float or ndarray
        H in in⁻¹ (a float when both inputs are strings).

    Raises
    ------
    InputError
        Unknown medium or agitation (the message names the field, the value and the
        allowed choices).

    Validity
    --------
    ``grossmann_h``: 0.01–5 in⁻¹ (the range of the classic table plus air).

    References
    ----------
    Grossmann, *Elements of Hardenability*, ASM 1952, H table (via ASM Handbook Vol. 4),
    values from memory; air derived from h ≈ 70 W m⁻² K⁻¹ and k = 27 W m⁻¹ K⁻¹.

    Example (from the source: Grossmann (1952) H table as reproduced in ASM Handbook Vol. 4:
    oil, moderate agitation 0.35-0.40 in^-1 (from memory))

    >>> float(grossmann_h_per_in("oil", "moderate"))
    0.375
    """
    return _column("h_per_in", quench, agitation)


def boiling_peak(quench, agitation="moderate"):
    """Nucleate-boiling stage of a liquid quench: peak-to-effective ratio of the surface
    heat-transfer coefficient and the depth over which that stage governs the cooling at 700 °C.

    The Grossmann H of a liquid is an effective value, fitted to where 50 % martensite lies in
    quenched bar series, so to the cooling of the interior.  The surface of a part passes
    700 °C within the first seconds of the quench, in the nucleate-boiling stage, where the
    heat-transfer coefficient is several times the effective 2kH (boiling curves of quench
    oils and water: Totten, Bates & Clinton 1993, ch. 3); air has no boiling stage.  Values
    from ``data/quench_severity.csv`` (``peak_ratio``, ``peak_depth_mm``; from memory), used by
    :func:`selector.models.cooling.boiling_biot`.

    Parameters
    ----------
    quench, agitation : str or array_like of str
        As :func:`grossmann_h_per_in`.

    Returns
    -------
    (peak_ratio, peak_depth_mm) : floats or ndarrays
        Ratio (dimensionless, >= 1) and depth (mm).

    Raises
    ------
    InputError
        Unknown medium or agitation.

    References
    ----------
    G.E. Totten, C.E. Bates, N.A. Clinton, *Handbook of Quenchants and Quenching
    Technology*, ASM International 1993, ch. 3 (boiling stages and heat-transfer
    coefficients of quenchants), values from memory.

    Example (illustrative: the shipped from-memory values, oil and still air)

    >>> [float(x) for x in boiling_peak("oil", "moderate")], float(boiling_peak("air", "none")[0])
    ([3.0, 4.0], 1.0)
    """
    return _column("peak_ratio", quench, agitation), _column("peak_depth_mm", quench, agitation)


def heat_transfer_coefficient_w_m2k(h_per_in, conductivity_w_mk=K_STEEL_W_MK):
    """Surface heat-transfer coefficient from the Grossmann severity: h = 2 k H.

    Parameters
    ----------
    h_per_in : array_like
        Grossmann H, in⁻¹.
    conductivity_w_mk : array_like
        Thermal conductivity of the steel, W m⁻¹ K⁻¹ (default 27, austenite near
        700 °C, from memory).

    Returns
    -------
    ndarray
        h in W m⁻² K⁻¹ (H = 1 in⁻¹ gives about 2.1 kW m⁻² K⁻¹ with k = 27).

    Raises
    ------
    InputError
        Negative H or non-positive conductivity.

    References
    ----------
    Definition of H (Grossmann 1952); see thermalprocessing.com, "Determining Grossmann
    H value from cooling curve data".

    Example (illustrative: a value of this implementation, not a published one)

    >>> round(float(heat_transfer_coefficient_w_m2k(1.0)))
    2126
    """
    h = np.asarray(h_per_in, float)
    k = np.asarray(conductivity_w_mk, float)
    if np.any(~np.isfinite(h)) or np.any(h < 0):
        raise InputError("h_per_in", h_per_in, "finite numbers >= 0 (in^-1)")
    if np.any(~np.isfinite(k)) or np.any(k <= 0):
        raise InputError("conductivity_w_mk", conductivity_w_mk, "finite numbers > 0 (W/m·K)")
    return 2.0 * k * h * PER_IN_TO_PER_M
