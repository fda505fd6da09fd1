"""The route describer (selector.routes.describe): every route family in words, SI and US."""
import re

import numpy as np
import pytest

from selector.catalogue.grades import default_catalogue
from selector.errors import NotModelledError, RouteError
from selector.routes import describe as d
from selector.routes import families
from selector.routes.steps import OPS, parse_steps
from selector.views.units import SI, US, route_words

DOUBLED = re.compile(r"\b(\w+)\s+\1\b", re.IGNORECASE)


def full_step(op):
    """A step of ``op`` with every parameter set (choices: the first; numbers: inside the limits)."""
    step = {"op": op}
    for k, p in OPS[op].items():
        if p.kind == "choice":
            step[k] = p.choices[0]
        elif p.kind == "str":
            step[k] = "X1"
        else:
            step[k] = float(np.sqrt(p.lo * p.hi)) if p.lo > 0 else (p.lo + p.hi) / 2
    return step


def routes_of(fam, n_grades=3, n_states=3):
    """Routes of ``fam``: each accepted op sequence with every parameter set, and the routes the
    selection builds (grid states of a few grades, for the families expanded over the catalogue)."""
    out = [[full_step(op) for op in pattern] for pattern in families.PATTERNS[fam.name]]
    for g in default_catalogue().grades.values():
        try:
            grid = fam.grid(g)
        except (NotModelledError, RouteError):
            continue
        m = len(next(iter(grid.values())))
        if m == 0:
            continue
        for i in sorted({0, m // 2, m - 1})[:n_states]:
            out.append(fam.to_steps({k: v[i] for k, v in grid.items()}))
        if len(out) >= len(families.PATTERNS[fam.name]) + n_grades * n_states:
            break
    return out


@pytest.mark.parametrize("fam", families.available(), ids=lambda f: f.name)
def test_every_family_reads_in_words_without_a_doubled_word(fam):
    routes = routes_of(fam)
    assert routes, f"no grade of the catalogue admits {fam.name}"
    for steps in routes:
        steps = parse_steps(steps)
        for system, other in ((SI, "°F"), (US, "°C")):
            text = route_words(steps, system)
            assert text and "_" not in text and "{" not in text, text
            assert not DOUBLED.search(text), text            # no "quench quench in water"
            assert other not in text, text                   # one unit system per text
            numbers = re.sub(r"\([^)]*\)", "", text)          # a standard's designation may name a size
            assert " mm" not in numbers if system == US else " in case" not in numbers, text
            assert text.count(",") >= len(steps) - 1        # one clause (at least) per step


def test_hand_written_texts():
    qt = [{"op": "harden", "quench": "oil", "austenitize_c": 845.0}, {"op": "temper", "temp_c": 540.0, "hours": 2.0}]
    assert d.describe_route(qt) == "austenitize 845 °C, quench in oil, temper 540 °C 2 h"
    # 845 °C = 1553 °F, 540 °C = 1004 °F; furnace set points to 10 °F
    assert route_words(qt, US) == "austenitize 1550 °F, quench in oil, temper 1000 °F 2 h"
    water = [{"op": "harden", "quench": "water"}]
    assert d.describe_route(water) == "austenitize at the grade's usual temperature, quench in water"
    bought = [{"op": "supply", "condition": "cold_drawn_stress_relieved", "designation": "ASTM A311 class B"}]
    assert d.describe_route(bought) == "bought cold drawn and stress relieved (ASTM A311 class B)"
    ind = [{"op": "induction_harden", "case_depth_mm": 2.54, "quench": "polymer"}]
    assert route_words(ind, US) == "induction harden to a 0.1 in case, quench in polymer"   # 2.54 mm = 0.1 in
    assert d.describe_route([{"op": "age", "designation": "H1025"}]) == "age to H1025"
    assert d.describe_route([{"op": "austemper", "bath_c": 300.0, "austenitize_c": 860.0}]) == \
        "austenitize 860 °C, austemper in a 300 °C bath"


@pytest.mark.parametrize("op", list(OPS))
def test_every_op_with_every_parameter(op):
    step = full_step(op)
    for system in (SI, US):
        text = route_words([step], system)
        assert not DOUBLED.search(text) and "_" not in text, text
        for k, p in OPS[op].items():        # every number given is written
            if p.kind == "float" and p.unit == "h":
                assert " h" in text, text


def test_an_op_without_words_reads_from_the_step_table(monkeypatch):
    monkeypatch.setitem(d.STEP_WORDS, "temper", None)
    monkeypatch.delitem(d.STEP_WORDS, "temper")
    assert d.describe_step({"op": "temper", "temp_c": 200.0, "hours": 1.0}) == "temper 200 °C 1 h"


def test_case_words():
    assert d.case_words([{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540.0}]) == "through-hardened"
    assert d.case_words([{"op": "supply", "condition": "quenched_tempered"}]) == "through-hardened"
    assert d.case_words([{"op": "anneal", "temp_c": 800.0}]) == "no case"
    assert d.case_words([{"op": "supply", "condition": "hot_rolled"}]) == "no case"
    assert d.case_words([{"op": "supply", "condition": "quenched_tempered"}, {"op": "nitride", "temp_c": 525.0,
                                                                              "hours": 40.0}]) is None


def test_parameter_words():
    assert d.parameter_words("temper_temp_c") == ("tempering temperature", "°C")
    assert d.parameter_words("hours", "nitride") == ("nitriding time", "h")
    assert d.parameter_words("hours") == ("time", "h")
    assert d.parameter_words("hold_hours") == ("hold hours", "h")
    assert d.parameter_words("gap_mm") == ("gap", "mm")
