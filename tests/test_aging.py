"""Tests of selector.models.aging (Shercliff & Ashby 1990 process model, calibrated)."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import aging as ag
from selector.models import validity


def predict(alloy, row):
    c = ag.aging_constants(alloy)
    return ag.point_prediction(c, row["t1_c"], row["h1"], row["t2_c"], row["h2"])


def points(role=None):
    t = ag.calibration_points()
    return t if role is None else t[t["role"] == role]


KEY = {"yield_mpa": "yield_mpa", "uts_mpa": "uts_mpa", "elongation_pct": "elongation_pct"}


def test_temperature_compensated_time_definition():
    # P = (t/T) exp(-Q/RT) (Shercliff & Ashby, Acta Metall. Mater. 38 (1990) 1789, Part I; from memory)
    p = ag.temperature_compensated_time(175.0, 8.0, 130.0)
    tk = 448.15
    assert float(p) == pytest.approx(8 * 3600 / tk * np.exp(-130e3 / (8.314 * tk)), rel=1e-12)
    # additivity: two 4 h steps make one 8 h step
    c = ag.aging_constants("6061")
    half = ag.temperature_compensated_time(175.0, 4.0, c.q_kj_mol)
    ys_two, x_two = ag.aged_yield_mpa(c, 175.0, 4.0, prior_p=half)
    ys_one, x_one = ag.aged_yield_mpa(c, 175.0, 8.0)
    assert float(ys_two) == pytest.approx(float(ys_one), rel=1e-12)


def test_peak_time_scaling():
    # t_p2 = t_p1 (T2/T1) exp[(Q/R)(1/T2 - 1/T1)] (derived from Shercliff & Ashby 1990, Part I: equal P at the peak)
    c = ag.aging_constants("6061")
    t1, t2 = 448.15, 433.15
    expect = float(ag.peak_time_h(c, 175.0)) * (t2 / t1) * np.exp(c.q_kj_mol * 1e3 / 8.314 * (1 / t2 - 1 / t1))
    assert float(ag.peak_time_h(c, 160.0)) == pytest.approx(expect, rel=1e-9)
    # a hotter age peaks sooner, by the Arrhenius factor
    assert np.all(np.diff(ag.peak_time_h(c, np.array([150.0, 175.0, 200.0]))) < 0)


def test_calibration_6061_activation_energy_makes_the_two_t6_schedules_equivalent():
    # the 6061 Q was set so that 160 °C x 18 h and 175 °C x 8 h (T6 schedules, common
    # practice) are equivalent (data/aging_calibration.csv, q_kj_mol: fitted)
    c = ag.aging_constants("6061")
    assert float(ag.peak_time_h(c, 160.0)) == pytest.approx(18.0, rel=0.02)


def test_precipitate_shape():
    x = np.logspace(-3, 3, 601)
    g = ag.precipitate_shape(x)
    i = int(np.argmax(g))
    # Shercliff & Ashby (1990): the normalised shape function peaks at P/P_p = 1 with value 1
    assert x[i] == pytest.approx(1.0, rel=0.03) and g[i] == pytest.approx(1.0, abs=1e-4)
    assert np.all(np.diff(g[: i]) > 0) and np.all(np.diff(g[i + 1:]) < 0)
    # over-aged tail falls as P^(-1/3) (Orowan bypass, r^3 ∝ P; Shercliff & Ashby 1990)
    slope = np.log(g[-1] / g[-101]) / np.log(x[-1] / x[-101])
    assert -1.0 / 3.0 < slope < -0.28   # d ln g / d ln x = 1/6 - sqrt(x)/(2(1 + sqrt(x)))


@pytest.mark.parametrize("alloy,temp_c", [("6061", 175.0), ("2024", 191.0), ("7075", 121.0),
                                          ("17-4PH", 482.0), ("C17200", 316.0)])
def test_aging_curve_rises_to_a_peak_and_falls(alloy, temp_c):
    c = ag.aging_constants(alloy)
    tp = float(ag.peak_time_h(c, temp_c))
    hours = tp * np.logspace(-2, 2, 401)
    res = ag.aged_properties(c, temp_c, hours)
    ys = res["yield_mpa"]
    i = int(np.argmax(ys))
    assert 0 < i < len(hours) - 1
    assert 0.4 <= hours[i] / tp <= 1.2          # the strength maximum is at or just before P_p
    # Shercliff & Ashby (1990): over-ageing (100 P_p) softens; 10 % is a loose bound, not a golden value
    assert ys[-1] < 0.9 * ys[i] and ys[0] < ys[i]
    assert np.all(np.diff(ys[i:]) < 0)
    # over-aging flag past the peak, and elongation recovers as strength falls
    assert not res["overaged"][i] and res["overaged"][-1]
    assert res["elongation_pct"][-1] > res["elongation_pct"][i]
    assert np.all(res["uts_mpa"] >= ys)


@pytest.mark.parametrize("row", [r for _, r in points("fit").iterrows()
                                 if r["alloy"] not in ("17-4PH",)], ids=lambda r: f"{r['alloy']}-{r['condition']}-{r['name']}")
def test_calibration_points_reproduced(row):
    # the published temper points the constants were fitted to (data/aging_calibration.csv,
    # each row names its source: Aluminum Association typical, ASTM B196, catalogue);
    # yield is fitted by least squares, tensile and elongation by the rules: within 3 %
    # (elongation of 2024-T6 within 12 %: one point for two rule constants)
    pred = float(predict(row["alloy"], row)[KEY[row["name"]]])
    tol = 0.12 if (row["alloy"], row["name"]) == ("2024", "elongation_pct") else 0.03
    assert pred == pytest.approx(row["value"], rel=tol)


CONDITIONS_17_4 = ["H900", "H925", "H1025", "H1075", "H1100", "H1150"]
ROOT = __import__("pathlib").Path(__file__).resolve().parents[1]


def _fit_script():
    import importlib.util
    spec = importlib.util.spec_from_file_location("fit_aging_ph", ROOT / "scripts" / "fit_aging_ph.py")
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def _csv(rel):
    import pandas as pd
    return pd.read_csv(ROOT / "data" / rel, comment="#")


def _ph_predict(alloy, temp_c, hours):
    return ag.aged_properties(ag.aging_constants(alloy), temp_c, hours)


def test_ph_coefficients_equal_what_the_fit_script_produces():
    # fit convention: the shipped file can never drift from its script.  The least-squares optimum
    # lies in a shallow valley (sigma_ss0 trades against s0 and Q): between numpy/scipy builds the
    # coefficients move by up to ~2e-6 relative (measured: sigma_ss0 115.197069 shipped vs 115.197328
    # refitted with numpy 2.4 / scipy 1.17) while the fitted yields move by ~1e-8; any change of data
    # or script moves the coefficients by percent and the predictions by far more than 1e-6
    fit = _fit_script()
    rows_in = fit.load_rows()
    d = fit.fit(rows_in)
    shipped = _csv("fits/aging_ph_coefficients.csv").set_index("coefficient")["value"]
    for name in ag.CONSTANT_NAMES:
        assert float(shipped[name]) == pytest.approx(d[name], rel=1e-5), name
    assert ag.ph_coefficients()["s0_mpa"] == pytest.approx(float(shipped["s0_mpa"]), rel=1e-12)
    aged = rows_in[rows_in["condition"] != "A"]
    as_shipped = fit.predict({**d, **{k: float(shipped[k]) for k in ag.CONSTANT_NAMES}}, aged)
    np.testing.assert_allclose(as_shipped["yield_mpa"], fit.predict(d, aged)["yield_mpa"], rtol=1e-6)
    rows = _csv("fits/aging_ph_rows.csv")
    assert set(zip(rows["grade"], rows["condition"])) == set(
        zip(fit.load_rows()["grade"], fit.load_rows()["condition"]))
    cv = _csv("fits/aging_ph_cv.csv")
    assert set(cv["grade"]) == {"17-4PH", "15-5PH"} and (cv["median_abs_error"] >= 0).all()


@pytest.mark.parametrize("alloy", ["17-4PH", "15-5PH"])
def test_ph_typical_values_on_rows_not_used_by_the_fit(alloy):
    # data/reference/ph_typical.csv: typical bar properties (Aerospace Structural Metals
    # Handbook 17-4PH / 15-5PH, values from memory).  Independent rows: the conditions the
    # fit did not use (join on grade + condition with data/fits/aging_ph_rows.csv).
    # Issue 11 target: tensile and yield within 6 % of typical.  Measured: H925 -2/-2 %,
    # H1075 -6/-5 %, H1100 +1/+2 %.
    t = _csv("reference/ph_typical.csv")
    used = set(zip(*[_csv("fits/aging_ph_rows.csv")[k] for k in ("grade", "condition")]))
    held = t[(t["grade"] == alloy) & t["condition"].isin(CONDITIONS_17_4)
             & np.array([(g, c) not in used for g, c in zip(t["grade"], t["condition"])])]
    assert len(held) >= 3
    res = _ph_predict(alloy, held["age_temp_c"].to_numpy(float), held["age_hours"].to_numpy(float))
    np.testing.assert_allclose(res["uts_mpa"], held["uts_mpa"], rtol=0.06)
    np.testing.assert_allclose(res["yield_mpa"], held["yield_mpa"], rtol=0.06)
    # elongation is not a target: within 15 %
    np.testing.assert_allclose(res["elongation_pct"], held["elongation_pct"], rtol=0.15)


def test_ph_calibration_rows_reproduced():
    # calibration (the rows the fit used, data/fits/aging_ph_rows.csv): yield within 10 %
    # (H1025 -9 %: the Shercliff-Ashby fall from the H900 peak is steeper than the
    # published plateau to H1025), tensile within 5 %, elongation within 10 %
    t = _csv("reference/ph_typical.csv")
    used = _csv("fits/aging_ph_rows.csv")
    aged = t.merge(used[["grade", "condition"]], on=["grade", "condition"])
    aged = aged[aged["condition"] != "A"]
    for alloy, g in aged.groupby("grade"):
        res = _ph_predict(alloy, g["age_temp_c"].to_numpy(float), g["age_hours"].to_numpy(float))
        np.testing.assert_allclose(res["yield_mpa"], g["yield_mpa"], rtol=0.10)
        np.testing.assert_allclose(res["uts_mpa"], g["uts_mpa"], rtol=0.05)
        np.testing.assert_allclose(res["elongation_pct"], g["elongation_pct"], rtol=0.10)


@pytest.mark.parametrize("alloy", ["17-4PH", "15-5PH"])
@pytest.mark.parametrize("condition", CONDITIONS_17_4)
def test_ph_stainless_at_or_above_a564_minimums(alloy, condition):
    # ASTM A564/A564M Table 3 minimums for Types 630 / XM-12, as recorded in
    # data/reference/tempers_nonferrous.csv (kind minimum; from memory, H1075/H1150 UTS
    # read on a data sheet).  Every standard condition must stay at or above its minimum
    # (tensile, yield, elongation); aging schedules as the route's designations.
    from selector.routes.families.age import designation_steps
    t = _csv("reference/tempers_nonferrous.csv")
    row = t[(t["grade"] == alloy) & (t["condition"] == condition) & (t["kind"] == "minimum")].iloc[0]
    (temp_c, hours), = designation_steps(alloy, condition)[0]
    res = _ph_predict(alloy, temp_c, hours)
    assert float(res["uts_mpa"]) >= row["uts_mpa"]
    assert float(res["yield_mpa"]) >= row["yield_mpa"]
    assert float(res["elongation_pct"]) >= row["elongation_pct"]


def test_ph_constants_not_in_the_calibration_table():
    # one source of PH constants: the offline fit, never data/aging_calibration.csv
    t = ag.calibration_table()
    assert not t["alloy"].isin(ag.PH_ALLOYS).any()
    c = ag.aging_constants(["17-4PH", "15-5PH"])
    assert c.s0_mpa[0] == c.s0_mpa[1] == ag.ph_coefficients()["s0_mpa"]


def test_ph_stainless_strength_falls_from_h900_to_h1150():
    # ASTM A564: minimum strength falls monotonically H900 -> H1150 (from memory)
    c = ag.aging_constants("17-4PH")
    temps = np.array([482.0, 496.0, 552.0, 579.0, 593.0, 621.0])
    hours = np.array([1.0, 4.0, 4.0, 4.0, 4.0, 4.0])
    res = ag.aged_properties(c, temps, hours)
    assert np.all(np.diff(res["yield_mpa"]) < 0) and np.all(np.diff(res["elongation_pct"]) > 0)
    assert np.all(res["overaged"][1:])


@pytest.mark.parametrize("condition", ["T6+16h@199", "T6+4h@218", "T6+64h@177"])
def test_6061_overaging_against_reheat_study(condition):
    # Donovan, Fortune & Trout, Cal Poly senior project (2015), abstract: 6061-T6 yield
    # fell to the 35 ksi (241 MPa) lower bound after 16 h at 199 °C and 4 h at 218 °C, not
    # within 64 h at 177 °C.  Held out.  Measured: -8 %, -3 %, -12 %: the model over-ages
    # somewhat fast at 177 °C (its T6 start, 276 MPa typical, is also below the study's
    # as-received extrusions).  Tolerance 15 %.
    t = ag.calibration_points("6061")
    row = t[t["condition"] == condition].iloc[0]
    assert float(predict("6061", row)["yield_mpa"]) == pytest.approx(241.0, rel=0.15)


def test_7075_t73_below_t6():
    # Aluminum Association typical: 7075-T73 (435 MPa) is over-aged below T6 (503 MPa)
    c = ag.aging_constants("7075")
    t6 = ag.aged_properties(c, 121.0, 24.0)
    p1 = ag.temperature_compensated_time(107.0, 7.0, c.q_kj_mol)
    t73 = ag.aged_properties(c, 163.0, 27.0, prior_p=p1)
    assert float(t73["yield_mpa"]) < float(t6["yield_mpa"]) and bool(t73["overaged"])


def test_calibration_c17200_tf00_within_b196():
    # ASTM B196 Table 3 TF00: tensile 150-190 ksi (1034-1310 MPa), yield >= 125 ksi (862 MPa);
    # C17200 TF00 is a fit point of its aging constants (data/aging_calibration.csv, role fit)
    cb = ag.aged_properties(ag.aging_constants("C17200"), 316.0, 3.0)
    assert 1034.0 <= float(cb["uts_mpa"]) <= 1310.0 and float(cb["yield_mpa"]) >= 862.0


def test_precipitate_peak_falls_with_aging_temperature():
    # the precipitate contribution at peak scales with f0(T)^(1/2), f0 ∝ 1 - ce/c0, so a
    # hotter age gives a lower precipitate peak (Shercliff & Ashby, Acta Metall. Mater. 38 (1990) 1789; from memory).
    # (The total peak yield does not fall within the calibrated ranges: the solute kept
    # in solution at the hotter age offsets it; documented in docs/methods/aging.md.)
    for alloy, temps in (("6061", [160.0, 200.0, 240.0]), ("17-4PH", [482.0, 552.0, 621.0])):
        c = ag.aging_constants(alloy)
        ce = ag.equilibrium_solute_ratio(c, np.array(temps))
        assert np.all(np.diff(ce) > 0) and np.all(ce < 1)
        assert np.all(np.diff(c.s0_mpa * np.sqrt(1 - ce)) < 0)
    # above the solvus nothing precipitates
    c = ag.aging_constants("6061")
    assert float(ag.equilibrium_solute_ratio(c, 600.0)) == 1.0


def test_natural_aging():
    c = ag.aging_constants(["6061", "2024", "7075"])
    res = ag.natural_aged_properties(c, 96.0)
    # the naturally aged state does not change once stable, and lies below the peak-aged yield
    later = ag.natural_aged_properties(c, 2000.0)
    np.testing.assert_allclose(later["yield_mpa"], res["yield_mpa"], rtol=1e-12)
    tp = ag.peak_time_h(c, np.array([175.0, 191.0, 121.0]))
    peak = ag.aged_properties(c, np.array([175.0, 191.0, 121.0]), tp)
    assert np.all(res["yield_mpa"] < peak["yield_mpa"])
    # 6xxx / 2xxx T4 stable after about 4 days; 7075-W never stabilises (common practice)
    assert list(res["stable"]) == [True, True, False]
    assert not ag.natural_aged_properties(ag.aging_constants("6061"), 10.0)["stable"]


def test_broadcast_over_alloys_and_times():
    c = ag.aging_constants(["6061", "7075", "17-4PH"])
    res = ag.aged_properties(c, np.array([175.0, 121.0, 482.0]), np.array([8.0, 24.0, 1.0]))
    # data/aging_calibration.csv and data/fits/aging_ph_coefficients.csv take these tempers as the peak (t_ref_c, tp_ref_h): 6061-T6 175 °C 8 h and 7075-T6 121 °C 24 h (common practice), 17-4PH H900 482 °C 1 h (ASTM A564); hand calculation P/P_p = 1
    np.testing.assert_allclose(res["peak_ratio"], 1.0, rtol=1e-6)
    one = ag.aged_properties(ag.aging_constants("7075"), 121.0, 24.0)
    assert float(res["yield_mpa"][1]) == pytest.approx(float(one["yield_mpa"]))
    sub = c.take([2])
    assert float(sub.q_kj_mol[0]) == float(c.q_kj_mol[2]) and sub.model == (c.model[2],)


def test_bad_input():
    c = ag.aging_constants("6061")
    with pytest.raises(InputError) as exc:
        ag.aged_yield_mpa(c, 175.0, -1.0)
    assert exc.value.field == "hours"
    with pytest.raises(InputError) as exc:
        ag.aging_constants("6063")
    assert "6061" in str(exc.value)


def test_validity_registered():
    for model in set(ag.aging_constants(ag.alloys()).model):
        validity.get(model)
    assert validity.check("shercliff_ashby_aluminium", temp_c=300.0)
    assert validity.check("shercliff_ashby_ph_stainless", temp_c=482.0, hours=1.0) == []
