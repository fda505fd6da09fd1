"""Critical temperatures of low-alloy steels from composition (Andrews 1965).

Empirical linear regressions on wt %, in °C:

* Ac1 = 723 − 10.7 Mn − 16.9 Ni + 29.1 Si + 16.9 Cr + 290 As + 6.38 W          (Andrews 1965)
* Ac3 = 910 − 203 √C − 15.2 Ni + 44.7 Si + 104 V + 31.5 Mo + 13.1 W
        − (30 Mn + 11 Cr + 20 Cu − 700 P − 400 Al − 120 As − 400 Ti)         (Andrews 1965)
* Ms  = 539 − 423 C − 30.4 Mn − 17.7 Ni − 12.1 Cr − 7.5 Mo                     (Andrews 1965, linear)

Ac1 and Ac3 are the temperatures on slow heating; the regressions scatter by about
±15–25 °C against measured values.  Ac3 is fitted for C < 0.6 %.

The hardening temperature (:func:`default_austenitize_c`) follows common practice:
hypoeutectoid steels are austenitized about 30–50 °C above Ac3 (40 °C is used),
hypereutectoid steels about 50 °C above Ac1 (austenite + carbides, to limit grain
growth and retained austenite).

References
----------
K.W. Andrews, "Empirical formulae for the calculation of some transformation
temperatures", J. Iron Steel Inst. 203 (1965) 721–727 (as reproduced in G. Krauss,
*Steels: Heat Treatment and Processing Principles*, ASM 1990).
"""
from __future__ import annotations

import numpy as np

from .composition import el
from . import validity

ANDREWS = "Andrews, JISI 203 (1965) 721 (data ranges from memory)"

#: eutectoid carbon used to split hypo- from hypereutectoid steels, wt % (common practice)
EUTECTOID_C = 0.77
#: margin above Ac3 for hypoeutectoid steels, °C (common practice 30–50 °C)
MARGIN_AC3_C = 40.0
#: margin above Ac1 for hypereutectoid steels, °C (common practice)
MARGIN_AC1_C = 50.0

validity.register("andrews_ac", {"C": (0.0, 0.6, "wt%"), "Mn": (0.0, 4.9, "wt%"), "Si": (0.0, 1.8, "wt%"),
                                 "Ni": (0.0, 5.0, "wt%"), "Cr": (0.0, 4.6, "wt%"), "Mo": (0.0, 5.4, "wt%")},
                  ANDREWS)
validity.register("andrews_ms", {"C": (0.1, 0.6, "wt%"), "Mn": (0.0, 4.9, "wt%"), "Ni": (0.0, 5.0, "wt%"),
                                 "Cr": (0.0, 4.6, "wt%"), "Mo": (0.0, 5.4, "wt%")}, ANDREWS)


def ac1_c(comp):
    """Lower critical temperature Ac1 on heating, °C (Andrews 1965).

    Ac1 = 723 − 10.7 Mn − 16.9 Ni + 29.1 Si + 16.9 Cr + 290 As + 6.38 W

    Parameters
    ----------
    comp : mapping
        Element → wt % (arrays broadcast; absent elements count as 0).

    Returns
    -------
    ndarray, °C.

    Validity
    --------
    ``andrews_ac`` (low-alloy steels, C ≤ 0.6 %).

    References
    ----------
    Andrews, JISI 203 (1965) 721; equation verified against two reproductions
    (as reproduced in Krauss, Steels, ASM 1990).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(ac1_c(s)))
    722
    """
    return (723.0 - 10.7 * el(comp, "Mn") - 16.9 * el(comp, "Ni") + 29.1 * el(comp, "Si")
            + 16.9 * el(comp, "Cr") + 290.0 * el(comp, "As") + 6.38 * el(comp, "W"))


def ac3_c(comp):
    """Upper critical temperature Ac3 on heating, °C (Andrews 1965).

    Ac3 = 910 − 203 √C − 15.2 Ni + 44.7 Si + 104 V + 31.5 Mo + 13.1 W
          − (30 Mn + 11 Cr + 20 Cu − 700 P − 400 Al − 120 As − 400 Ti)

    Parameters
    ----------
    comp : mapping
        Element → wt %.

    Returns
    -------
    ndarray, °C.

    Validity
    --------
    ``andrews_ac``: fitted for C < 0.6 % (hypoeutectoid steels).

    References
    ----------
    Andrews, JISI 203 (1965) 721 (bracket form, as reproduced in Krauss, Steels, ASM 1990).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(ac3_c(s)))
    762
    """
    c = np.maximum(el(comp, "C"), 0.0)
    return (910.0 - 203.0 * np.sqrt(c) - 15.2 * el(comp, "Ni") + 44.7 * el(comp, "Si")
            + 104.0 * el(comp, "V") + 31.5 * el(comp, "Mo") + 13.1 * el(comp, "W")
            - (30.0 * el(comp, "Mn") + 11.0 * el(comp, "Cr") + 20.0 * el(comp, "Cu")
               - 700.0 * el(comp, "P") - 400.0 * el(comp, "Al") - 120.0 * el(comp, "As")
               - 400.0 * el(comp, "Ti")))


def ms_c(comp):
    """Martensite start temperature Ms, °C (Andrews 1965, linear form).

    Ms = 539 − 423 C − 30.4 Mn − 17.7 Ni − 12.1 Cr − 7.5 Mo

    Parameters
    ----------
    comp : mapping
        Element → wt %.

    Returns
    -------
    ndarray, °C.

    Validity
    --------
    ``andrews_ms`` (C 0.1–0.6 %).

    References
    ----------
    Andrews, JISI 203 (1965) 721.

    Example (from the source: Andrews (1965) linear form, hand evaluation for 0.45 C, 0.75 Mn:
    539 - 190.35 - 22.8 = 325.85 °C)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(ms_c(s)), 2)
    325.85
    """
    return (539.0 - 423.0 * el(comp, "C") - 30.4 * el(comp, "Mn") - 17.7 * el(comp, "Ni")
            - 12.1 * el(comp, "Cr") - 7.5 * el(comp, "Mo"))


def default_austenitize_c(comp):
    """Usual hardening (austenitizing) temperature, °C (common practice).

    T = Ac3 + 40 °C for hypoeutectoid steels (C < 0.77 %);
    T = Ac1 + 50 °C for hypereutectoid steels.

    Parameters
    ----------
    comp : mapping
        Element → wt %.

    Returns
    -------
    ndarray, °C.

    Validity
    --------
    As :func:`ac1_c` / :func:`ac3_c`.  For 0.6 < C < 0.77 % Ac3 is extrapolated.

    References
    ----------
    Common practice (austenitize 30–50 °C above Ac3; hypereutectoid steels about 50 °C
    above Ac1); Ac1 and Ac3 from Andrews (1965).

    Example (illustrative: a value of this implementation, not a published one)

    >>> s = {"C": 0.45, "Mn": 0.75, "Si": 0.25}
    >>> round(float(default_austenitize_c(s)))
    802
    """
    c = el(comp, "C")
    return np.where(c < EUTECTOID_C, ac3_c(comp) + MARGIN_AC3_C, ac1_c(comp) + MARGIN_AC1_C)
