"""Tests of selector.selection.targets (validation, TOML, meets, margins, shortfalls)."""
import math

import numpy as np
import pandas as pd
import pytest

from selector.errors import DataFileError, InputError
from selector.selection.targets import (NUMERIC_TARGETS, TARGET_KEYS, margins, meets, shortfalls,
                                        targets_from_toml, validate_targets)

FAMS = ("carbon_steel", "alloy_steel", "carburizing_steel", "stainless_ph", "aluminium", "titanium")


# ----------------------------------------------------------------------------- validate

def test_empty_and_none():
    assert validate_targets(None, FAMS) == {}
    assert validate_targets({}, FAMS) == {}


def test_clean_types_and_order():
    t = validate_targets({"corrosion_resistant": True, "families": ("alloy_steel", "alloy_steel"),
                          "min_yield_mpa": 600, "max_relative_cost": np.float64(2.5),
                          "min_case_depth_mm": np.int64(1)}, FAMS)
    assert list(t) == ["min_yield_mpa", "min_case_depth_mm", "max_relative_cost", "families",
                       "corrosion_resistant"]
    assert t["min_yield_mpa"] == 600.0 and type(t["min_yield_mpa"]) is float
    assert type(t["min_case_depth_mm"]) is float and type(t["max_relative_cost"]) is float
    assert t["families"] == ["alloy_steel"]           # de-duplicated list
    assert t["corrosion_resistant"] is True
    assert validate_targets({"families": "titanium"}, FAMS) == {"families": ["titanium"]}


def test_unknown_key_suggests_nearest():
    with pytest.raises(InputError) as exc:
        validate_targets({"min_yeild_mpa": 500}, FAMS)
    assert exc.value.value == "min_yeild_mpa"
    assert "did you mean min_yield_mpa" in str(exc.value)


@pytest.mark.parametrize("bad", ["500", None, True, -1.0, math.inf, math.nan, [500]])
def test_bad_numbers_name_the_key(bad):
    with pytest.raises(InputError) as exc:
        validate_targets({"min_uts_mpa": bad}, FAMS)
    assert exc.value.field == "min_uts_mpa"
    assert "min_uts_mpa" in str(exc.value)


def test_negative_message_gives_unit():
    with pytest.raises(InputError, match=r"min_case_depth_mm=-0.5 .*>= 0 \(mm\)"):
        validate_targets({"min_case_depth_mm": -0.5}, FAMS)


@pytest.mark.parametrize("lo,hi", [("min_yield_mpa", "max_yield_mpa"), ("min_uts_mpa", "max_uts_mpa"),
                                   ("min_hardness_hrc", "max_hardness_hrc"),
                                   ("min_yield_mpa", "max_uts_mpa")])
def test_min_above_max_is_contradictory(lo, hi):
    with pytest.raises(InputError) as exc:
        validate_targets({lo: 50.0, hi: 40.0}, FAMS)
    assert exc.value.field == lo and hi in str(exc.value)
    assert validate_targets({lo: 40.0, hi: 40.0}, FAMS) == {lo: 40.0, hi: 40.0}   # equal is fine


def test_family_required_and_excluded():
    with pytest.raises(InputError) as exc:
        validate_targets({"families": ["alloy_steel", "titanium"], "exclude_families": ["titanium"]}, FAMS)
    assert exc.value.field == "exclude_families" and exc.value.value == ["titanium"]


def test_unknown_family_suggests_nearest():
    with pytest.raises(InputError) as exc:
        validate_targets({"exclude_families": ["aluminum"]}, FAMS)
    assert exc.value.field == "exclude_families" and "did you mean aluminium" in str(exc.value)


@pytest.mark.parametrize("targets,field", [
    ({"families": []}, "families"),
    ({"families": [3]}, "families"),
    ({"corrosion_resistant": "yes"}, "corrosion_resistant"),
    ({"corrosion_resistant": 1}, "corrosion_resistant"),
    (["min_yield_mpa"], "targets"),
])
def test_other_type_errors(targets, field):
    with pytest.raises(InputError) as exc:
        validate_targets(targets, FAMS)
    assert exc.value.field == field


def test_every_key_accepted():
    t = {k: 1.0 for k in NUMERIC_TARGETS}
    t.update(families=["alloy_steel"], exclude_families=["titanium"], corrosion_resistant=False)
    assert set(validate_targets(t, FAMS)) == set(TARGET_KEYS)


# ----------------------------------------------------------------------------- TOML

def test_toml_targets_table_and_top_level():
    text = '[part]\nname = "pin"\n\n[targets]\nmin_yield_mpa = 650\nfamilies = ["alloy_steel"]\n'
    assert targets_from_toml(text) == {"min_yield_mpa": 650.0, "families": ["alloy_steel"]}
    assert targets_from_toml("min_uts_mpa = 900.5\ncorrosion_resistant = true\n") == \
        {"min_uts_mpa": 900.5, "corrosion_resistant": True}


def test_toml_file_str_and_path(tmp_path):
    p = tmp_path / "pin_targets.toml"
    p.write_text("[targets]\nmax_hardness_hrc = 40\n", encoding="utf-8")
    assert targets_from_toml(p) == {"max_hardness_hrc": 40.0}
    assert targets_from_toml(str(p)) == {"max_hardness_hrc": 40.0}


def test_toml_bad_key_names_key_and_file(tmp_path):
    p = tmp_path / "t.toml"
    p.write_text("[targets]\nmin_yield_mpa = -3\n", encoding="utf-8")
    with pytest.raises(InputError) as exc:
        targets_from_toml(p)
    assert exc.value.field == "min_yield_mpa" and str(p) in str(exc.value)
    p.write_text("[targets]\nfamilies = ['alloy_steels']\n", encoding="utf-8")
    with pytest.raises(InputError, match="did you mean alloy_steel"):
        targets_from_toml(p)


def test_toml_syntax_error_names_file_and_line(tmp_path):
    p = tmp_path / "broken.toml"
    p.write_text("[targets]\nmin_yield_mpa = 500\nmin_uts_mpa = \n", encoding="utf-8")
    with pytest.raises(DataFileError) as exc:
        targets_from_toml(p)
    assert exc.value.path == str(p) and exc.value.line == 3


def test_toml_missing_file():
    with pytest.raises(InputError) as exc:
        targets_from_toml("no_such_targets_file.toml")
    assert "no_such_targets_file.toml" in str(exc.value)


def test_toml_families_checked_against_catalogue_by_default():
    with pytest.raises(InputError):
        targets_from_toml('families = ["unobtainium"]')


# ----------------------------------------------------------------------------- frame tests

def small_frame():
    nan = np.nan
    return pd.DataFrame({
        "yield_mpa":            [700.0, 500.0, 700.0, nan,   900.0, 650.0],
        "uts_mpa":              [900.0, 700.0, 850.0, 900.0, 1100., 800.0],
        "elongation_pct":       [15.0,  25.0,  12.0,  15.0,  10.0,  16.0],
        "hardness_hrc":         [28.0,  nan,   26.0,  28.0,  36.0,  nan],
        "surface_hardness_hrc": [nan,   nan,   58.0,  nan,   nan,   nan],
        "case_depth_mm":        [0.0,   0.0,   1.0,   0.0,   0.0,   0.0],
        "relative_cost":        [1.5,   1.0,   1.3,   1.5,   2.5,   4.0],
        "family": ["alloy_steel", "carbon_steel", "carburizing_steel", "alloy_steel", "alloy_steel",
                   "stainless_ph"],
        "corrosion_resistant": [False, False, False, False, False, True],
    }, index=[10, 11, 12, 13, 14, 15])


def test_meets_by_hand():
    f = small_frame()
    t = validate_targets({"min_yield_mpa": 650, "max_hardness_hrc": 32}, FAMS)
    # row 11 yield 500 fails; 13 yield NaN fails; 14 HRC 36 > 32; 15 HRC NaN passes a max
    assert meets(f, t).tolist() == [True, False, True, False, False, True]
    t = validate_targets({"min_hardness_hrc": 26}, FAMS)       # inclusive; NaN fails a min
    assert meets(f, t).tolist() == [True, False, True, True, True, False]
    t = validate_targets({"min_surface_hardness_hrc": 55, "min_case_depth_mm": 0.8}, FAMS)
    assert meets(f, t).tolist() == [False, False, True, False, False, False]
    t = validate_targets({"max_relative_cost": 1.5, "exclude_families": ["carbon_steel"]}, FAMS)
    assert meets(f, t).tolist() == [True, False, True, True, False, False]
    t = validate_targets({"corrosion_resistant": True}, FAMS)
    assert meets(f, t).tolist() == [False] * 5 + [True]
    t = validate_targets({"corrosion_resistant": False, "families": ["alloy_steel", "stainless_ph"]}, FAMS)
    assert meets(f, t).tolist() == [True, False, False, True, True, True]
    assert meets(f, {}).all()


def reference_meets(frame, t):
    """Row-by-row reading of the rules, for comparison with the vectorised code."""
    out = []
    for _, r in frame.iterrows():
        ok = True
        for key, (col, side) in NUMERIC_TARGETS.items():
            if key not in t:
                continue
            v = r[col]
            if v != v:
                ok &= side == "max" and col == "hardness_hrc"
            else:
                ok &= v >= t[key] if side == "min" else v <= t[key]
        if "families" in t:
            ok &= r["family"] in t["families"]
        if "exclude_families" in t:
            ok &= r["family"] not in t["exclude_families"]
        if t.get("corrosion_resistant"):
            ok &= bool(r["corrosion_resistant"])
        out.append(ok)
    return np.array(out, dtype=bool)


def random_frame(rng, n):
    def holes(x, p):
        return np.where(rng.random(n) < p, np.nan, x)
    return pd.DataFrame({
        "yield_mpa": holes(rng.uniform(200, 1500, n), 0.05),
        "uts_mpa": holes(rng.uniform(300, 1800, n), 0.05),
        "elongation_pct": holes(rng.uniform(2, 40, n), 0.05),
        "hardness_hrc": holes(rng.uniform(20, 65, n), 0.3),
        "surface_hardness_hrc": holes(rng.uniform(40, 65, n), 0.5),
        "case_depth_mm": rng.uniform(0, 2, n),
        "relative_cost": rng.uniform(0.8, 10, n),
        "family": np.array(FAMS)[rng.integers(0, len(FAMS), n)],
        "corrosion_resistant": rng.random(n) < 0.3,
        "fatigue_limit_mpa": holes(rng.uniform(100, 800, n), 0.05),
    })


def random_targets(rng):
    t = {}
    for key, (col, side) in NUMERIC_TARGETS.items():
        if rng.random() < 0.5:
            lo, hi = {"yield_mpa": (200, 1500), "uts_mpa": (300, 1800), "elongation_pct": (2, 40),
                      "hardness_hrc": (20, 65), "surface_hardness_hrc": (40, 65),
                      "case_depth_mm": (0, 2), "relative_cost": (0.8, 10),
                      "fatigue_limit_mpa": (100, 800)}[col]
            t[key] = float(rng.uniform(lo, lo + 0.5 * (hi - lo)) if side == "min"
                           else rng.uniform(lo + 0.5 * (hi - lo), hi))
    if rng.random() < 0.4:
        t["families"] = list(rng.choice(FAMS[:4], 2, replace=False))
    elif rng.random() < 0.5:
        t["exclude_families"] = [FAMS[int(rng.integers(len(FAMS)))]]
    if rng.random() < 0.3:
        t["corrosion_resistant"] = True
    return validate_targets(t, FAMS)


def test_meets_matches_row_by_row_reading():
    rng = np.random.default_rng(3)
    f = random_frame(rng, 400)
    for _ in range(25):
        t = random_targets(rng)
        np.testing.assert_array_equal(meets(f, t), reference_meets(f, t))


def test_categorical_family_and_text_bool_columns_give_same_result():
    rng = np.random.default_rng(4)
    f = random_frame(rng, 500)
    g = f.assign(family=f["family"].astype("category"),
                 corrosion_resistant=np.where(f["corrosion_resistant"], "true", "false").astype(object))
    for _ in range(10):
        t = random_targets(rng)
        np.testing.assert_array_equal(meets(g, t), meets(f, t))


def test_margins_by_hand():
    f = small_frame()
    t = validate_targets({"min_yield_mpa": 650, "max_uts_mpa": 1000, "min_hardness_hrc": 27,
                          "max_hardness_hrc": 30}, FAMS)
    m = margins(f, t)
    assert list(m.columns) == ["margin_min_yield_mpa", "margin_max_uts_mpa", "margin_min_hardness_hrc",
                               "margin_max_hardness_hrc"]
    assert list(m.index) == list(f.index)
    assert m["margin_min_yield_mpa"].tolist() == [50.0, -150.0, 50.0, -np.inf, 250.0, 0.0]
    assert m["margin_max_uts_mpa"].tolist() == [100.0, 300.0, 150.0, 100.0, -100.0, 200.0]
    assert m["margin_min_hardness_hrc"].tolist() == [1.0, -np.inf, -1.0, 1.0, 9.0, -np.inf]
    assert m["margin_max_hardness_hrc"].tolist() == [2.0, np.inf, 4.0, 2.0, -6.0, np.inf]


def test_margin_sign_is_meets_for_each_target():
    rng = np.random.default_rng(5)
    f = random_frame(rng, 600)
    for _ in range(10):
        t = random_targets(rng)
        m = margins(f, t)
        assert not m.isna().to_numpy().any()
        for key in m.columns:
            k = key.removeprefix("margin_")
            np.testing.assert_array_equal(m[key].to_numpy() >= 0, meets(f, {k: t[k]}))


def test_shortfalls_by_hand():
    f = small_frame()
    t = validate_targets({"min_yield_mpa": 650, "max_relative_cost": 2.0, "families": ["alloy_steel"]},
                         FAMS)
    s = shortfalls(f, t)
    assert list(s.columns) == ["move_min_yield_mpa", "move_max_relative_cost", "fails_families",
                               "miss_score"]
    assert s["move_min_yield_mpa"].tolist() == [0.0, 150.0, 0.0, np.inf, 0.0, 0.0]
    assert s["move_max_relative_cost"].tolist() == pytest.approx([0.0, 0.0, 0.0, 0.0, 0.5, 2.0])
    assert s["fails_families"].tolist() == [False, True, True, False, False, True]
    # row 14: 0.5 / 2.0 relative move of the cost limit; row 13: yield unknown
    assert s["miss_score"].tolist() == pytest.approx([0.0, np.inf, np.inf, np.inf, 0.25, np.inf])


def test_zero_limit_that_must_move_scores_inf():
    f = small_frame()
    s = shortfalls(f, {"max_relative_cost": 0.0})     # every cost > 0 must be allowed
    assert np.isinf(s["miss_score"]).all()
    s = shortfalls(f, {"min_case_depth_mm": 0.0})
    assert (s["miss_score"] == 0).all()


def test_moving_each_target_by_its_shortfall_makes_the_row_qualify():
    rng = np.random.default_rng(6)
    f = random_frame(rng, 300)
    for _ in range(10):
        t = random_targets(rng)
        s = shortfalls(f, t)
        np.testing.assert_array_equal(s["miss_score"].to_numpy() == 0, meets(f, t))
        finite = np.isfinite(s["miss_score"].to_numpy())
        for i in np.flatnonzero(finite & (s["miss_score"].to_numpy() > 0))[:20]:
            moved = dict(t)
            for key in NUMERIC_TARGETS:
                if key in t:
                    d = s[f"move_{key}"].iloc[i]
                    d += 1e-9 * abs(t[key]) if d > 0 else 0.0   # floating rounding of t - (t - v)
                    moved[key] = t[key] - d if key.startswith("min_") else t[key] + d
            assert meets(f.iloc[[i]], moved)[0]
            # and the shortfall is the least move: a little less still fails
            for key in NUMERIC_TARGETS:
                d = s[f"move_{key}"].iloc[i] if key in t else 0.0
                if d > 1e-6:
                    less = dict(moved)
                    less[key] = moved[key] + 1e-3 * d if key.startswith("min_") else moved[key] - 1e-3 * d
                    assert not meets(f.iloc[[i]], less)[0]


def test_frame_missing_a_column():
    f = small_frame().drop(columns=["case_depth_mm"])
    with pytest.raises(InputError) as exc:
        meets(f, {"min_case_depth_mm": 0.5})
    assert exc.value.field == "frame" and "case_depth_mm" in str(exc.value)
    assert meets(f, {"min_yield_mpa": 1.0}).shape == (6,)   # not needed, not asked for


def test_unvalidated_unknown_key_is_not_ignored():
    with pytest.raises(InputError):
        meets(small_frame(), {"min_yeild_mpa": 500.0})


