"""Route parsing and API errors of evaluate()."""
import pytest

import selector
from selector.errors import InputError, NotModelledError, RouteError, SelectorError
from selector.routes import families
from selector.routes.steps import describe, parse_steps, signature


def test_parse_and_describe():
    steps = parse_steps([{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 540, "hours": 2}])
    assert signature(steps) == ("harden", "temper")
    assert steps[1]["temp_c"] == 540.0 and isinstance(steps[1]["temp_c"], float)
    assert describe(steps) == "harden oil quench → temper 540 °C, 2 h"


@pytest.mark.parametrize("route,field", [
    ([{"op": "levitate"}], "op"),
    ([{"op": "temper"}], "temp_c"),
    ([{"op": "temper", "temp_c": 2000}], "temp_c"),
    ([{"op": "temper", "temp_c": "hot"}], "temp_c"),
    ([{"op": "harden", "quench": "honey"}], "quench"),
    ([{"op": "harden", "quench": "oil", "agitation": "wild"}], "agitation"),
    ([{"op": "harden", "quench": "oil", "tempr": 3}], "tempr"),
    ([{"nope": 1}], "op"),
    ([], "route"),
    ("harden", "route"),
])
def test_bad_steps_name_the_field(route, field):
    with pytest.raises(RouteError) as exc:
        parse_steps(route)
    assert exc.value.field == field
    assert isinstance(exc.value, ValueError) and isinstance(exc.value, SelectorError)
    assert "allowed" in str(exc.value)


def test_unknown_sequence():
    with pytest.raises(RouteError, match="op sequences"):
        families.match(("temper", "harden"))


def test_route_not_admitted_by_grade():
    with pytest.raises(RouteError, match="admits"):
        selector.evaluate("6061", [{"op": "harden", "quench": "oil"}, {"op": "temper", "temp_c": 500}])


def test_bad_section():
    with pytest.raises(InputError) as exc:
        selector.evaluate("4140", [{"op": "harden", "quench": "oil"}], diameter_mm=-3)
    assert exc.value.field == "diameter_mm"


def test_not_modelled_family_raises_clearly(monkeypatch):
    monkeypatch.setitem(families.MODULES, "age", "does_not_exist_yet")
    families._load.cache_clear()
    try:
        with pytest.raises(NotModelledError, match="not modelled yet"):
            families.get("age")
    finally:
        families._load.cache_clear()
