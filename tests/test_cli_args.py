"""Argument helpers of the command line (selector.views.cli.args)."""
import pytest

from selector.errors import InputError
from selector.views.cli import args


def test_parse_step_text():
    assert args.parse_step_text("temper temp_c=540 hours=2") == {"op": "temper", "temp_c": 540.0, "hours": 2.0}
    assert args.parse_step_text("harden quench=oil") == {"op": "harden", "quench": "oil"}
    assert args.parse_step_text("harden quench=oil,agitation=mild") == {"op": "harden", "quench": "oil",
                                                                         "agitation": "mild"}
    with pytest.raises(InputError, match="key=value"):
        args.parse_step_text("temper 540")


def test_allow_list():
    assert args.allow_list(["a,b", "c"]) == ["a", "b", "c"] and args.allow_list(None) is None


def test_parse_diameters():
    assert args.parse_diameters("20,25,30") == [20.0, 25.0, 30.0]
    assert args.parse_diameters("20:30:5") == [20.0, 25.0, 30.0]
    for bad in ("a", "20:10", "1:1e9:1"):
        with pytest.raises(InputError, match="--diameters"):
            args.parse_diameters(bad)


def test_positive_int():
    assert args.positive_int("3") == 3
    for bad in ("0", "-1", "1.5", "x"):
        with pytest.raises(Exception, match="whole number"):
            args.positive_int(bad)
