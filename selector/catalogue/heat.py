"""A heat's own analysis (from its mill certificate) in place of the grade's nominal
composition.

``heat_composition(grade, {"C": 0.41, "Mn": 0.86, ...})`` returns the composition a
route is evaluated at: the elements given take the heat's values, every other
element of the grade keeps the nominal (mid-range) value of the specification.
Elements are the ones the catalogue knows (any element of ``data/compositions.csv``).

Checks, in order, before anything is computed:

* the analysis is a mapping of element symbol to a number (wt %); an unknown
  symbol, a value that is not a finite number, a negative value, a value above
  100 wt % or a total above 100 wt % is an :class:`~selector.errors.InputError`
  naming the element, its value and what is allowed;
* an element outside the grade's specification range, or not specified for the
  grade at all, is used as given with a warning naming it (a heat outside its
  specification is not that grade: its certificate and the purchase order decide).
"""
from __future__ import annotations

import math
from numbers import Real

from ..errors import InputError

#: largest analysis accepted (a certificate lists a few tens of elements at most)
MAX_ELEMENTS = 40
#: rounding allowance of certificate values against specification limits, wt %
SPEC_TOL_PCT = 1e-9


def known_elements(catalogue) -> tuple:
    """Element symbols of every grade's composition in the catalogue."""
    out = set()
    for g in catalogue.grades.values():
        out.update(g.comp_min)
    return tuple(sorted(out))


def heat_composition(grade, analysis, known: tuple) -> tuple[dict, list]:
    """Composition (wt %) of one heat of ``grade`` and the warnings it raises.

    Parameters
    ----------
    grade : Grade
        The catalogue grade (its specification limits and nominal composition).
    analysis : mapping
        Element symbol → wt % from the heat's certificate (case of the symbol is
        ignored: ``"cr"`` is ``Cr``).
    known : tuple of str
        Element symbols the catalogue knows (:func:`known_elements`).

    Returns
    -------
    (dict, list)
        The composition used, and the warnings (one per element outside or absent
        from the specification).

    Raises
    ------
    InputError
        Not a mapping, an unknown element, a value that is not a finite number in
        [0, 100] wt %, or a total above 100 wt %.

    Example
    -------
    A 4140 heat at C 0.41, Mn 0.86, Cr 0.95, Mo 0.18 lies inside ASTM A29's limits
    and gives no warning.
    """
    if not hasattr(analysis, "items") or not callable(analysis.items):
        raise InputError("heat_composition", type(analysis).__name__,
                         "a mapping of element symbol to wt %, e.g. {'C': 0.41, 'Mn': 0.86}")
    items = list(analysis.items())
    if len(items) > MAX_ELEMENTS:
        raise InputError("heat_composition", f"{len(items)} elements", f"at most {MAX_ELEMENTS} elements")
    by_upper = {e.upper(): e for e in known}
    comp = dict(grade.composition("nominal"))
    given = {}
    for key, value in items:
        sym = by_upper.get(str(key).strip().upper()) if isinstance(key, str) else None
        if sym is None:
            raise InputError("heat_composition", key if isinstance(key, str) else type(key).__name__,
                             "an element symbol the catalogue knows: " + ", ".join(known))
        if sym in given:
            raise InputError(f"heat_composition[{sym!r}]", value, "each element once")
        field = f"heat_composition[{sym!r}]"
        if isinstance(value, bool) or not isinstance(value, Real):
            raise InputError(field, value, "a number of wt % in [0, 100]")
        try:
            v = float(value)
        except OverflowError:            # an integer too large for a float
            v = math.inf
        if not math.isfinite(v) or v < 0.0 or v > 100.0:
            raise InputError(field, value, "a finite number of wt % in [0, 100]")
        given[sym] = v
    comp.update(given)
    total = sum(comp.values())
    if total > 100.0 + 1e-9:
        worst = max(given, key=given.get) if given else max(comp, key=comp.get)
        raise InputError(f"heat_composition[{worst!r}]", given.get(worst, comp[worst]),
                         f"values whose total with the grade's nominal elements stays at or below 100 wt % "
                         f"(total {total:.4g} wt %)")
    warnings = []
    for sym, v in given.items():
        if sym not in grade.comp_min:
            warnings.append(f"heat analysis: {sym} = {v:g} wt% is not specified for {grade.id} "
                            f"({grade.standard}); used as given")
            continue
        lo, hi = grade.comp_min[sym], grade.comp_max[sym]
        if v < lo - SPEC_TOL_PCT or v > hi + SPEC_TOL_PCT:
            warnings.append(f"heat analysis: {sym} = {v:g} wt% outside the {grade.id} specification "
                            f"{lo:g}-{hi:g} wt% ({grade.standard}); the heat is not within the grade")
    return comp, warnings


def parse_heat_text(text: str, field: str = "heat") -> dict:
    """``"C=0.41 Mn=0.86, Cr=0.95"`` → ``{"C": 0.41, "Mn": 0.86, "Cr": 0.95}`` (wt %): the
    form the command line and the page take; :func:`heat_composition` checks the
    elements and values."""
    text = str(text)
    if len(text) > 2000:
        raise InputError(field, text[:40] + "...", "at most 2000 characters")
    out = {}
    for p in text.replace(",", " ").replace(";", " ").split():
        k, sep, v = p.partition("=")
        if not sep or not k:
            raise InputError(field, text, "'C=0.41 Mn=0.86 ...': each element as symbol=wt%")
        try:
            out[k] = float(v)
        except ValueError:
            raise InputError(f"{field} {k}", v, "a number of wt %") from None
    if not out:
        raise InputError(field, text, "'C=0.41 Mn=0.86 ...': at least one element")
    return out
