"""The text of a diameter list, read by the one parser the command line and the page
share (:func:`selector.inputs.diameter_list`), and the ``from:to:step`` range behind it."""
from __future__ import annotations

import pytest

from selector import inputs
from selector.design.sweep import MAX_DIAMETERS, diameter_range
from selector.errors import InputError


@pytest.mark.parametrize("text, expected", [
    ("20,25,30", [20.0, 25.0, 30.0]),
    (" 20 ; 25, 30 ,", [20.0, 25.0, 30.0]),        # semicolons, spaces and a trailing comma
    ("30, 20", [30.0, 20.0]),                       # the order typed is kept
    ("0.75", [0.75]),
])
def test_a_list(text, expected):
    assert inputs.diameter_list(text) == expected


def test_a_range_includes_both_ends():
    assert inputs.diameter_list("20:30:2.5") == [20.0, 22.5, 25.0, 27.5, 30.0]
    assert inputs.diameter_list("10:11:0.3") == [10.0, 10.3, 10.6, 10.9]   # stop not on a step


def test_the_range_is_the_sweep_range():
    for a, b, step in ((20, 30, 2.5), (1, 7, 0.1), (12.7, 50.8, 3.175)):
        assert inputs.diameter_list(f"{a}:{b}:{step}") == diameter_range(a, b, step).tolist()


@pytest.mark.parametrize("text", ["", " , ;", "a,b", "20,-5", "20,0", "20,nan", "20,inf", "1:2", "1:2:3:4",
                                  "x:2:1", "30:20:1", "10:20:0", "10:20:-1"])
def test_bad_text_names_the_field_and_what_is_allowed(text):
    with pytest.raises(InputError) as exc:
        inputs.diameter_list(text, "--diameters")
    assert exc.value.field == "--diameters"
    assert "from:to:step" in str(exc.value) or "from" in exc.value.allowed or "step" in exc.value.allowed


def test_caps_are_checked_before_any_work():
    # a range of a billion values is refused from its bounds, not built
    with pytest.raises(InputError) as exc:
        inputs.diameter_list("1:1000000000:1")
    assert f"at most {MAX_DIAMETERS} values" in str(exc.value)
    with pytest.raises(InputError) as exc:
        inputs.diameter_list(",".join(["20"] * (MAX_DIAMETERS + 1)))
    assert exc.value.value == f"{MAX_DIAMETERS + 1} values"
    with pytest.raises(InputError):
        inputs.diameter_list("2" * 10_001)
    with pytest.raises(InputError):
        inputs.diameter_list(None)
    assert len(inputs.diameter_list(",".join(["20"] * MAX_DIAMETERS))) == MAX_DIAMETERS
