"""Where a published Brinell hardness is compared: the location the source names.

A reference row of ``data/reference/qt_steels.csv`` may say where its hardness was taken on the
treated section (column ``hb_location``: ``centre``, ``mid-radius`` or ``surface``).  The route
reports its headline hardness at the ASTM A370 tension-test location (centre of a round up to
38 mm, mid-radius above; :func:`selector.routes.families.base.tension_test_position`), which is
where a row that does not say is compared, like its tensile strength.  A row that does say is
compared at its own location, read off the route's hardness profile across the section
(``profile``: r/R from 1 at the surface to 0 at the centre) and converted to HB on the ASTM E140
steel table (:func:`selector.models.conversions.hv_to_hb`).

References
----------
ASTM A370, *Test Methods and Definitions for Mechanical Testing of Steel Products*, §§ on the
location of test specimens in bars (centre up to 1.5 in, mid-radius above).
ASTM E140-12b, Tables 1 and 2 (HV to HB).
"""
from __future__ import annotations

import math

import numpy as np

from ..errors import InputError
from ..models import conversions

#: r/R of each location a source can name (1 = surface, 0 = centre)
LOCATIONS = {"centre": 0.0, "mid-radius": 0.5, "surface": 1.0}


def check_location(location) -> str:
    """The location as a key of :data:`LOCATIONS`, or "" (not stated); ``InputError`` otherwise."""
    loc = "" if location is None or (isinstance(location, float) and math.isnan(location)) \
        else str(location).strip()
    if loc and loc not in LOCATIONS:
        raise InputError("hb_location", location, f"one of {', '.join(LOCATIONS)} or blank (not stated)")
    return loc


def hardness_hb_at(result: dict, location=None) -> float:
    """Brinell hardness of an ``evaluate`` result at the location a source names.

    Parameters
    ----------
    result : dict
        A result of :func:`selector.routes.evaluate.evaluate` (``hardness_hb`` and, for a
        named location, ``profile``: list of ``{"r_over_R", "hardness_hv"}``).
    location : {"centre", "mid-radius", "surface"} or blank
        Where the source took its hardness; blank (None, "", NaN): not stated, the result's
        own ``hardness_hb`` (the ASTM A370 tension-test location).

    Returns
    -------
    float
        HB (10 mm ball, 3000 kgf; ASTM E140); NaN where the route gives none (no profile, or a
        hardness off the E140 Brinell column).

    Raises
    ------
    InputError
        ``location`` is not one of :data:`LOCATIONS` nor blank.

    Example (a flat profile: every location reads the same hardness; ASTM E140 Table 1 row
    HRC 30: 302 HV = 286 HB)

    >>> res = {"hardness_hb": 286.0, "profile": [{"r_over_R": 1.0, "hardness_hv": 302.0},
    ...                                          {"r_over_R": 0.0, "hardness_hv": 302.0}]}
    >>> round(hardness_hb_at(res, "surface")), round(hardness_hb_at(res, None))
    (286, 286)
    """
    loc = check_location(location)
    if not loc:
        v = result.get("hardness_hb")
        return math.nan if v is None else float(v)
    prof = result.get("profile") or []
    if not prof:
        return math.nan
    pos = np.array([p["r_over_R"] for p in prof], float)
    hv = np.array([math.nan if p["hardness_hv"] is None else p["hardness_hv"] for p in prof], float)
    order = np.argsort(pos)
    at = float(np.interp(LOCATIONS[loc], pos[order], hv[order]))
    return float(conversions.hv_to_hb(at))
