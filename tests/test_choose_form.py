"""scripts/choose_tempering_form.py: the greedy backward elimination keeps the carbon terms, drops
the alloy term whose removal lowers the leave-one-grade-out median most, and stops when no drop
lowers it.  The LOGO error is replaced by a made-up score here (the algorithm is under test, not
the fit), so the expected sequence follows from the score by hand."""
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT / "scripts"))

import choose_tempering_form as ctf  # noqa: E402
from selector.models import tempering as tp  # noqa: E402


def test_elimination_drops_the_harmful_terms_in_order_and_stops(monkeypatch):
    # score: 1.0 + 0.3 per harmful term present (Ni, V*a; Ni worse) - 0.2 per useful term present
    harm = {"Ni": 0.3, "V*a": 0.2}
    useful = {"Mo*a", "Cr", "Cr*a", "Mn*a", "Si"}

    def fake(terms):
        s = 1.0 + sum(harm.get(t, 0.0) for t in terms) - 0.2 * sum(t in useful for t in terms)
        return (s, s, s, s)

    monkeypatch.setattr(ctf, "logo", fake)
    seen = []
    terms, best = ctf.eliminate(report=seen.append)
    assert set(terms) == set(tp.FEATURES) - {"Ni", "V*a"}
    assert set(ctf.CARBON_TERMS) <= set(terms)
    assert best[0] == pytest.approx(1.0 - 0.2 * 5)            # by hand: only the five useful terms left
    drops = [line for line in seen if line.startswith("drop")]
    assert [d.split()[1].rstrip(":") for d in drops] == ["Ni", "V*a"]   # the larger harm first


def test_elimination_never_drops_a_carbon_term(monkeypatch):
    # a score that would reward dropping everything: only alloy terms may go
    monkeypatch.setattr(ctf, "logo", lambda terms: (float(len(terms)),) * 4)
    terms, best = ctf.eliminate(report=lambda _: None)
    assert terms == list(ctf.CARBON_TERMS) and best[0] == 4.0


def test_the_recorded_choice_is_a_form_the_fit_script_knows():
    import fit_tempering as ft
    assert set(ft.FORMS["series_chosen"]) <= set(tp.FEATURES)
    assert set(ctf.CARBON_TERMS) <= set(ft.FORMS["series_chosen"])
