"""Hardness-scale and hardness-to-tensile-strength conversions for steel (ASTM E140).

The conversions interpolate linearly between the rows of ASTM E140 Table 1
(Rockwell C range) and Table 2 (Rockwell B range) for **non-austenitic** steels
(carbon, alloy and tool steels, homogeneous, as-forged, annealed, normalized or
quenched and tempered), and the approximate tensile strengths that ASTM A370
Table 3 gives beside them.  They do not apply to austenitic stainless steels,
to cold-worked austenitic grades, nor to case-hardened surfaces with steep
gradients.  Converted values are approximate (E140 §1; ISO 18265 calls the
tensile-strength estimates the least reliable converted values).

The rows live in ``data/hardness_conversions.csv`` (one row per table entry, with
source and confidence).  Each conversion uses one monotone chain of rows, sorted
by Vickers hardness:

* Table 1 rows (HRC 20–68) as they are;
* below them, the Table 2 rows whose HV, HB and tensile strength are all lower than
  the lowest Table 1 row (the two tables overlap near HV 222–240 and disagree there
  by about 5 %; the B-range rows that would break monotonicity, HRB 98–100, are kept
  in the file but not used).

Out-of-table rule: no extrapolation.  A value outside the span of the rows that
define the conversion returns NaN (for example HRC below 20 or above 68, HB above
654 where E140 gives no Brinell value, tensile strength above HRC 59).  The spans
are registered in :mod:`selector.models.validity` as ``"astm_e140"`` so that the
route layer can warn.

References
----------
ASTM E140-12b, Standard Hardness Conversion Tables for Metals, Table 1 (non-austenitic
steels, Rockwell C range) and Table 2 (Rockwell B range).
ASTM A370, Test Methods and Definitions for Mechanical Testing of Steel Products,
Table 3 (approximate hardness conversions and tensile strength for non-austenitic steels).

Units of measure
----------------
This module is also the one place of the unit constants (ksi, inch, pound-force) and of
the table that turns an SI value (MPa, mm, °C, kN) into US customary units and back
(:data:`UNITS`, :func:`to_us_customary`, :func:`from_us_customary`); the page, the
command line and the design layer use it.  NIST SP 811 (2008), Appendix B.8 and B.9.
"""
from __future__ import annotations

import functools

import numpy as np
import pandas as pd

from ..catalogue.loader import Column, Schema, read_table
from ..errors import DataFileError, check_choice
from . import validity

REFERENCE = "ASTM E140-12b Table 1"
FILE = "hardness_conversions.csv"
#: 1 ksi in MPa: 1 lbf (4.448 221 615 260 5 N, exact) per square inch (25.4 mm, exact), NIST SP 811
#: (2008) Appendix B.8 and B.9.  The one ksi constant of the package: views and tests use it.
MPA_PER_KSI = 4.4482216152605e3 / 25.4**2
#: kept name of :data:`MPA_PER_KSI` (the same number)
KSI_TO_MPA = MPA_PER_KSI
#: 1 in = 25.4 mm, exact (NIST SP 811 (2008) Appendix B.8, 'inch')
MM_PER_IN = 25.4
#: 1 lbf = 4.448 221 615 260 5 N, exact (NIST SP 811 (2008) Appendix B.9, 'pound-force')
N_PER_LBF = 4.4482216152605
#: 1 lb = 0.453 592 37 kg, exact (NIST SP 811 (2008) Appendix B.8, 'pound (avoirdupois)')
KG_PER_LB = 0.45359237

_SCHEMA = Schema((
    Column("table", "choice", choices=("E140_T1", "E140_T2")),
    Column("hrc", "float", allow_blank=True, lo=20, hi=70),
    Column("hrb", "float", allow_blank=True, lo=0, hi=120),
    Column("hv", "float", lo=50, hi=1200),
    Column("hb", "float", allow_blank=True, lo=50, hi=800),
    Column("hb_ball", "choice", allow_blank=True, choices=("steel", "carbide")),
    Column("hb_bracketed", "bool"),
    Column("uts_ksi", "float", allow_blank=True, lo=20, hi=400),
    Column("uts_mpa", "float", allow_blank=True, lo=100, hi=2800),
    Column("source", "str"),
    Column("confidence", "choice", choices=("verified", "partial", "from memory", "common practice", "demo")),
))


def _strictly_increasing(path, name, x, lines):
    bad = np.nonzero(np.diff(x) <= 0)[0]
    if bad.size:
        i = bad[0] + 1
        raise DataFileError(path, int(lines[i]), name,
                            f"is not monotone with HV (value {x[i]:g} after {x[i - 1]:g})")


@functools.cache
def _chains() -> dict:
    """Monotone (HV, other) pairs for each conversion, from the CSV."""
    t = read_table(FILE, _SCHEMA)
    t1 = t[t["table"] == "E140_T1"].sort_values("hv")
    t2 = t[t["table"] == "E140_T2"].sort_values("hv")
    if t1["hrc"].isna().any():
        raise DataFileError(FILE, int(t1.loc[t1["hrc"].isna(), "line"].iloc[0]), "hrc",
                            "is empty on a Table 1 row")
    floor = t1.iloc[0]
    below = t2[(t2["hv"] < floor["hv"]) & (t2["hb"] < floor["hb"])
               & ~(t2["uts_mpa"] >= floor["uts_mpa"])]
    chain = pd.concat([below, t1]).sort_values("hv")
    out = {}
    for name, rows in (("hrc", t1), ("hb", chain), ("uts_mpa", chain)):
        r = rows[rows[name].notna()]
        hv, y, lines = r["hv"].to_numpy(float), r[name].to_numpy(float), r["line"].to_numpy()
        _strictly_increasing(FILE, "hv", hv, lines)
        _strictly_increasing(FILE, name, y, lines)
        out[name] = (hv, y)
    return out


def _interp(x, xp, fp):
    """Linear interpolation, NaN outside [xp[0], xp[-1]] (no extrapolation)."""
    x = np.asarray(x, float)
    y = np.interp(x, xp, fp)
    outside = (x < xp[0] - 1e-9) | (x > xp[-1] + 1e-9) | np.isnan(x)
    return np.where(outside, np.nan, y)


def hv_to_hrc(hardness_hv):
    """Rockwell C hardness from Vickers hardness (ASTM E140-12b Table 1).

    HRC = linear interpolation of E140 Table 1 between the bracketing rows.

    Parameters
    ----------
    hardness_hv : array_like
        Vickers hardness, HV (10 kgf and over).

    Returns
    -------
    ndarray
        HRC; NaN below HV 238 (HRC 20, the lower limit of the Rockwell C scale;
        the API reports None there) and above HV 940 (HRC 68).

    Validity
    --------
    Non-austenitic steels only; HV 238–940 (registered as ``astm_e140``).

    References
    ----------
    ASTM E140-12b, Table 1.

    Example (from the source: ASTM E140-12b Table 1: 513 HV is 50 HRC)

    >>> round(float(hv_to_hrc(513.0)), 1)
    50.0
    """
    hv, hrc = _chains()["hrc"]
    return _interp(hardness_hv, hv, hrc)


def hrc_to_hv(hardness_hrc):
    """Vickers hardness from Rockwell C hardness (ASTM E140-12b Table 1).

    HV = linear interpolation of E140 Table 1 between the bracketing rows.

    Parameters
    ----------
    hardness_hrc : array_like
        Rockwell C hardness, HRC.

    Returns
    -------
    ndarray
        HV; NaN outside HRC 20–68.

    Validity
    --------
    Non-austenitic steels only; HRC 20–68.

    References
    ----------
    ASTM E140-12b, Table 1.

    Example (from the source: ASTM E140-12b Table 1: 50 HRC is 513 HV)

    >>> round(float(hrc_to_hv(50.0)))
    513
    """
    hv, hrc = _chains()["hrc"]
    return _interp(hardness_hrc, hrc, hv)


def hv_to_hb(hardness_hv):
    """Brinell hardness (10 mm ball, 3000 kgf) from Vickers hardness (ASTM E140 Tables 1–2).

    HB = linear interpolation between table rows.  Above 450 HB (HRC 48) the
    Brinell value is E140's tungsten-carbide ball column; E140 brackets the values above
    HRC 58 (outside the recommended Brinell range).

    Parameters
    ----------
    hardness_hv : array_like
        Vickers hardness, HV.

    Returns
    -------
    ndarray
        HB; NaN outside HV 100–697 (the span of the table's Brinell column).

    Validity
    --------
    Non-austenitic steels only; HV 100–697.

    References
    ----------
    ASTM E140-12b, Tables 1 and 2.

    Example (from the source: ASTM E140-12b Table 1 row HRC 30: 302 HV, 286 HB)

    >>> round(float(hv_to_hb(302.0)))
    286
    """
    hv, hb = _chains()["hb"]
    return _interp(hardness_hv, hv, hb)


def hb_to_hv(hardness_hb):
    """Vickers hardness from Brinell hardness (10 mm ball, 3000 kgf) (ASTM E140 Tables 1–2).

    HV = linear interpolation between table rows (inverse of :func:`hv_to_hb`).

    Parameters
    ----------
    hardness_hb : array_like
        Brinell hardness, HB (HBW above about 500).

    Returns
    -------
    ndarray
        HV; NaN outside HB 100–654.

    Validity
    --------
    Non-austenitic steels only; HB 100–654.

    References
    ----------
    ASTM E140-12b, Tables 1 and 2.

    Example (from the source: ASTM E140-12b Table 1 / A370 Table 3 row HRC 30: 286 HB, 302 HV)

    >>> round(float(hb_to_hv(286.0)))
    302
    """
    hv, hb = _chains()["hb"]
    return _interp(hardness_hb, hb, hv)


def hv_to_uts_mpa(hardness_hv):
    """Approximate tensile strength (MPa) from Vickers hardness (ASTM A370 Table 3).

    UTS = linear interpolation of the tensile strengths tabulated beside E140
    hardness values (the table's own MPa column, rounded from ksi × 6.895).

    Parameters
    ----------
    hardness_hv : array_like
        Vickers hardness, HV.

    Returns
    -------
    ndarray
        Tensile strength, MPa; NaN outside HV 116–674 (HRB 65 to HRC 59, the span
        where the table gives a strength).

    Validity
    --------
    Carbon and alloy steels (non-austenitic), HV 116–674.  An approximation only:
    not a substitute for a tensile test.

    References
    ----------
    ASTM A370, Table 3; ASTM E140-12b, Tables 1 and 2.

    Example (from the source: ASTM A370 Table 3 row HRC 30: 302 HV, tensile 138 ksi (951.5 MPa))

    >>> round(float(hv_to_uts_mpa(302.0)))
    952
    """
    hv, uts = _chains()["uts_mpa"]
    return _interp(hardness_hv, hv, uts)


def uts_to_hv(uts_mpa):
    """Vickers hardness from tensile strength (MPa) (inverse of :func:`hv_to_uts_mpa`).

    Parameters
    ----------
    uts_mpa : array_like
        Tensile strength, MPa.

    Returns
    -------
    ndarray
        HV; NaN outside 386–2420 MPa.

    Validity
    --------
    Carbon and alloy steels (non-austenitic).

    References
    ----------
    ASTM A370, Table 3; ASTM E140-12b, Tables 1 and 2.

    Example (from the source: ASTM A370 Table 3 row HRC 30: tensile 138 ksi (951 MPa), 302 HV)

    >>> round(float(uts_to_hv(951.0)))
    302
    """
    hv, uts = _chains()["uts_mpa"]
    return _interp(uts_mpa, uts, hv)


def hb_to_uts_mpa(hardness_hb):
    """Approximate tensile strength (MPa) from Brinell hardness (ASTM A370 Table 3).

    UTS = hv_to_uts_mpa(hb_to_hv(HB)).

    Parameters
    ----------
    hardness_hb : array_like
        Brinell hardness, HB (10 mm ball, 3000 kgf).

    Returns
    -------
    ndarray
        Tensile strength, MPa; NaN outside HB 116–634.

    Validity
    --------
    Carbon and alloy steels (non-austenitic).

    References
    ----------
    ASTM A370, Table 3; ASTM E140-12b, Tables 1 and 2.

    Example (from the source: ASTM A370 Table 3 row HRC 30: 286 HB, tensile 138 ksi (951.5 MPa))

    >>> round(float(hb_to_uts_mpa(286.0)))
    952
    """
    return hv_to_uts_mpa(hb_to_hv(hardness_hb))


def _register() -> None:
    c = _chains()
    hv_hrc, hrc = c["hrc"]
    hv_hb, hb = c["hb"]
    hv_uts, uts = c["uts_mpa"]
    validity.register("astm_e140", {
        "hardness_hrc": (float(hrc[0]), float(hrc[-1]), "HRC"),
        "hardness_hv": (float(hv_hb[0]), float(hv_hrc[-1]), "HV"),
        "hardness_hb": (float(hb[0]), float(hb[-1]), "HB"),
        "uts_mpa": (float(uts[0]), float(uts[-1]), "MPa"),
    }, "ASTM E140-12b Table 1", beyond="no converted value is given outside the table")


_register()


# ----------------------------------------------------------------------------- units of measure
#: quantity -> (SI unit, US customary unit, SI value -> US, US value -> SI); SI values are
#: MPa, mm, °C and kN.  One table instead of a chain of tests on the quantity.
UNITS = {
    "stress": ("MPa", "ksi", lambda v: v / MPA_PER_KSI, lambda v: v * MPA_PER_KSI),
    "length": ("mm", "in", lambda v: v / MM_PER_IN, lambda v: v * MM_PER_IN),
    "temperature": ("°C", "°F", lambda v: v * 9.0 / 5.0 + 32.0, lambda v: (v - 32.0) * 5.0 / 9.0),
    "force": ("kN", "lbf", lambda v: v * 1000.0 / N_PER_LBF, lambda v: v * N_PER_LBF / 1000.0),
}


def _unit_row(quantity: str) -> tuple:
    check_choice("quantity", quantity, tuple(UNITS))
    return UNITS[quantity]


def to_us_customary(value, quantity: str):
    """An SI value (MPa, mm, °C or kN; scalar or array) in US customary units (ksi, in,
    °F, lbf).  A scalar gives a float, an array an ndarray.

    >>> round(to_us_customary(100.0, "temperature"), 6)
    212.0
    """
    v = np.asarray(value, float)
    out = _unit_row(quantity)[2](v)
    return float(out) if out.ndim == 0 else out


def from_us_customary(value, quantity: str):
    """A value in US customary units (ksi, in, °F or lbf) in SI (MPa, mm, °C, kN).

    >>> from_us_customary(1.0, "length")
    25.4
    """
    v = np.asarray(value, float)
    out = _unit_row(quantity)[3](v)
    return float(out) if out.ndim == 0 else out
