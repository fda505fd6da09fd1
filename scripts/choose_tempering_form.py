"""Choose the terms of the tempered-martensite surface by the fit's own leave-one-grade-out error.

Greedy backward elimination: start from every term of ``selector.models.tempering.FEATURES``
(Grange, Hribal & Porter's element shapes), drop in turn each alloy term, keep the drop that
lowers the pooled leave-one-grade-out median |error| (HRC) the most, and stop when no drop
lowers it.  The carbon terms (1, C, s, C*s) are always kept.  Only the fit's own rows are used
(``scripts/fit_tempering.py``: handbook rows through the mixture rule, with ``--series`` the
martensite series of Grange & Baughman 1956 as well); the independent reference rows are never
read here, so the choice cannot be tuned to the validation.

Prints each trial (pooled LOGO median / p90, then the same on the rows other than the series)
and the chosen terms.  Nothing is written; ``fit_tempering.py --form NAME`` fits a form by name
(``FORMS``).  Measured 2026-12-04 with ``--series``: every term 1.180 / 3.59 HRC, without Ni
1.124, without Ni and V*a 1.094 (stop): ``FORMS["series_chosen"]`` (docs/methods/tempering.md 5f).

Usage: ``python scripts/choose_tempering_form.py [--series] [--no-carbon-slope]``  (about 4 s a trial)
"""
from __future__ import annotations

import argparse
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "scripts"))

import fit_tempering as ft  # noqa: E402
from selector.models import tempering as tp  # noqa: E402

CARBON_TERMS = ("1", "C", "s", "C*s")


def logo(terms) -> tuple:
    """(pooled median, pooled p90, other-rows median, other-rows p90) leave-one-grade-out, HRC."""
    ft.FORMS["_trial"] = tuple(f for f in tp.FEATURES if f in terms)
    ft.FORM = "_trial"
    r = ft.fit()
    return (r["pooled_logo_median_hrc"], r["pooled_logo_p90_hrc"],
            r["former_logo_median_hrc"], r["former_logo_p90_hrc"])


def eliminate(start=tp.FEATURES, report=print) -> tuple[list, tuple]:
    cur = list(start)
    best = logo(cur)
    report(f"all terms: {best[0]:.3f} / {best[1]:.2f} HRC (other rows {best[2]:.2f} / {best[3]:.2f})")
    while True:
        trials = []
        for term in [f for f in cur if f not in CARBON_TERMS]:
            r = logo([f for f in cur if f != term])
            report(f"  without {term:5s} {r[0]:.3f} / {r[1]:.2f} (other rows {r[2]:.2f} / {r[3]:.2f})")
            trials.append((r, term))
        if not trials:
            break
        r, term = min(trials)
        if r[0] >= best[0]:
            break
        cur.remove(term)
        best = r
        report(f"drop {term}: {best[0]:.3f} / {best[1]:.2f}")
    return cur, best


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--series", action="store_true", help="fit the martensite series too")
    ap.add_argument("--carbon-slope", action=argparse.BooleanOptionalAction, default=True,
                    help="hold the carbon slope at >= 0 (the shipped fit's rule)")
    a = ap.parse_args(argv)
    ft.USE_SERIES, ft.CARBON_SLOPE_NON_NEGATIVE = a.series, a.carbon_slope
    terms, best = eliminate()
    print(f"chosen: {', '.join(terms)}  (LOGO {best[0]:.3f} / {best[1]:.2f} HRC)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
