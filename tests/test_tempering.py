"""Tests of selector.models.tempering (Hollomon–Jaffe parameter and fitted master surface)."""
import numpy as np
import pytest

from selector.errors import InputError
from selector.models import conversions as cv
from selector.models import tempering as tp
from selector.models import validity
from selector.models.martensite import martensite_hardness_hrc
import regression_guards as guards

C4140 = {"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
C4340 = {"C": 0.405, "Mn": 0.70, "Si": 0.25, "Ni": 1.825, "Cr": 0.80, "Mo": 0.25}
C1340 = {"C": 0.40, "Mn": 1.75, "Si": 0.25}
C1030 = {"C": 0.30, "Mn": 0.75}


def hrc(comp, temp_c, hours):
    return float(cv.hv_to_hrc(tp.tempered_martensite_hv(comp, temp_c, hours)))


# --- Hollomon-Jaffe parameter ------------------------------------------------------

def test_parameter_definition_and_typical_magnitude():
    # P = T_K (C + log10 t_h); Hollomon & Jaffe, Trans. AIME 162 (1945) 223: P/1000 about 15-21 for usual tempers (from memory)
    p = tp.hollomon_jaffe_parameter(550.0, 2.0, 20.0)
    assert p == pytest.approx(823.15 * (20.0 + np.log10(2.0)), rel=1e-12)
    assert 15.0 < p / 1000 < 21.0


def test_constant_against_carbon_and_clipping():
    # C = 21.3 - 5.8 %C (Canale et al. 2008 summary of Hollomon & Jaffe; from memory)
    assert tp.hollomon_jaffe_constant(0.4) == pytest.approx(18.98)
    assert tp.hollomon_jaffe_constant(0.0) == pytest.approx(21.3)
    assert tp.hollomon_jaffe_constant(1.5) == pytest.approx(15.0)


def test_equivalent_hours_gives_equal_parameter():
    c = 19.0
    t2 = tp.equivalent_hours(600.0, 1.0, 550.0, c)
    assert t2 > 1.0  # lower temperature needs longer
    assert tp.hollomon_jaffe_parameter(550.0, t2, c) == pytest.approx(
        tp.hollomon_jaffe_parameter(600.0, 1.0, c), rel=1e-12)
    # hand calculation: at its own temperature the equivalent time is the time itself (equal P, Hollomon & Jaffe 1945)
    assert tp.equivalent_hours(500.0, 3.0, 500.0, c) == pytest.approx(3.0)


def test_equal_parameter_gives_equal_hardness():
    c = tp.hollomon_jaffe_constant(C4140["C"])
    t2 = tp.equivalent_hours(540.0, 2.0, 500.0, c)
    a = tp.tempered_martensite_hv(C4140, 540.0, 2.0)
    b = tp.tempered_martensite_hv(C4140, 500.0, t2)
    assert a == pytest.approx(b, rel=1e-9)
    assert abs(float(tp.tempered_martensite_hv(C4140, 500.0, 2.0)) - float(a)) > 5  # and it matters


def test_bad_input_raises_input_error():
    with pytest.raises(InputError, match="hours"):
        tp.hollomon_jaffe_parameter(500.0, 0.0, 20.0)
    with pytest.raises(InputError, match="hours"):
        tp.tempered_martensite_hv(C4140, 500.0, np.array([1.0, -2.0]))
    with pytest.raises(InputError, match="temp_c"):
        tp.hollomon_jaffe_parameter(-300.0, 1.0, 20.0)
    with pytest.raises(InputError, match="C"):
        tp.tempered_martensite_hv({"C": -0.1}, 500.0, 1.0)


def test_nan_propagates():
    # NaN marks "no value" in the vectorised catalogue
    out = tp.tempered_martensite_hv({"C": np.array([0.4, np.nan])}, 500.0, 1.0)
    assert np.isfinite(out[0]) and np.isnan(out[1])


# --- physical behaviour ------------------------------------------------------------

@pytest.mark.parametrize("comp", [C1030, C1340, C4140, C4340, {"C": 0.6, "Mo": 0.3, "V": 0.3}])
def test_softens_monotonically_with_temperature_and_time(comp):
    temps = np.linspace(150, 705, 200)
    hv = tp.tempered_martensite_hv(comp, temps, 2.0)
    assert np.all(np.diff(hv) <= 1e-9) and hv[0] - hv[-1] > 100
    times = np.logspace(-1, 2, 100)
    hv_t = tp.tempered_martensite_hv(comp, 500.0, times)
    assert np.all(np.diff(hv_t) <= 1e-9) and hv_t[0] > hv_t[-1]


@pytest.mark.parametrize("c", [0.2, 0.3, 0.45, 0.6, 0.8])
def test_never_above_as_quenched_martensite(c):
    cap = cv.hrc_to_hv(martensite_hardness_hrc(c, 99.9))
    hv = tp.tempered_martensite_hv({"C": c}, np.linspace(100, 705, 50), 0.1)
    assert np.all(hv <= cap + 1e-9)


# --- checks against the data the surface was FITTED on (calibration, in-sample) -----
# These rows are in data/fits/tempering_rows.csv: they check the fit and the form, they are
# not validation (scripts/qt_accuracy.py measures accuracy on independent rows).

@pytest.mark.parametrize("temp_c,hrc_pub", [(427.0, 44.0), (538.0, 38.0), (649.0, 30.0)])
def test_calibration_4340_vendor_sheet(temp_c, hrc_pub):
    # 4340 oil quenched from 1550 F, 25 mm round, centre: vendor data sheet (metalmartusa.com,
    # catalog id 165): 800/1000/1200 F tempers give 44/38/30 HRC.  Time not stated: 1 h taken.
    # Tolerance 3 HRC (the scatter between heats in handbook tables is of that order).
    assert hrc(C4340, temp_c, 1.0) == pytest.approx(hrc_pub, abs=3.0)


@pytest.mark.parametrize("temp_c,hb_pub", [(205.0, 505), (315.0, 453), (425.0, 375), (540.0, 295)])
def test_calibration_1340_handbook_rows(temp_c, hb_pub):
    # ASM Metals Handbook Vol. 1 (1990), quenched-and-tempered property table, 1340 oil
    # quenched 25 mm bar (HB from memory; tensile columns seen in the efunda reproduction);
    # 2 h assumed.  Tolerance 3 HRC.
    assert hrc(C1340, temp_c, 2.0) == pytest.approx(float(cv.hv_to_hrc(cv.hb_to_hv(hb_pub))), abs=3.0)


@pytest.mark.parametrize("temp_c,hb_pub", [(205.0, 510), (315.0, 445)])
def test_calibration_4140_handbook_rows(temp_c, hb_pub):
    # ASM Metals Handbook Vol. 1 (1990), Q&T table, 4140 oil quenched 25 mm bar (HB from
    # memory), 2 h assumed.  Tolerance 3 HRC.  (From 425 C up the fit runs 3.5-8 HRC above
    # these 4140 rows, which sit below the other published 4140 tables; see the next test
    # and docs/methods/tempering.md.)
    assert hrc(C4140, temp_c, 2.0) == pytest.approx(float(cv.hv_to_hrc(cv.hb_to_hv(hb_pub))), abs=3.0)


def test_4140_at_425_c_between_the_two_published_tables():
    # The published 4140 tables disagree at mid tempers: ASM Metals Handbook Vol. 1 (1990) Q&T
    # table, 25 mm bar, 425 C: 370 HB (from memory; a calibration row) against the Lucefin
    # 42CrMo4 card, 10 mm round oil quenched, 47 HRC at 400 C and 45 HRC at 450 C (verified,
    # data/reference/qt_steels.csv; an independent row, never fitted).  The surface must lie
    # between them (0.5 HRC reading margin).
    lo = float(cv.hv_to_hrc(cv.hb_to_hv(370.0)))
    hi = 46.0    # 42CrMo4 card interpolated to 425 C
    assert lo - 0.5 <= hrc(C4140, 425.0, 2.0) <= hi + 0.5


@pytest.mark.parametrize("temp_c,hb_pub", [(205.0, 495), (315.0, 401), (425.0, 302), (540.0, 255)])
def test_calibration_1030_carbon_steel_rows(temp_c, hb_pub):
    # ASM Metals Handbook Vol. 1 (1990), Q&T table, 1030 water quenched 25 mm bar (from
    # memory), 2 h assumed.  Tolerance 5.5 HRC: the carbon-steel data combine two sources
    # that disagree by up to 8 HRC (see docs), and the 425 C row sits 5.0 HRC below the fit
    # (measured with the surface of scripts/fit_tempering.py; it was 4.3 with the earlier form).
    assert hrc(C1030, temp_c, 2.0) == pytest.approx(float(cv.hv_to_hrc(cv.hb_to_hv(hb_pub))), abs=5.5)


def test_52100_producer_table_outside_the_fit():
    # 52100 oil quenched from 815 C, tempered 205/315 C: 60-62 / 56-58 HRC (producer
    # heat-treatment table, reproduction bladeforums.com thread 323095; grade identification
    # partial).  NOT fitted (data/tempering_points.csv: austenitized below Acm, so the
    # martensite holds less than the nominal carbon), and outside the fitted carbon range:
    # the route warns.  The surface at the nominal 1.04 % C must not fall below these
    # values (its martensite would hold more carbon than the real one).
    c52100 = {"C": 1.04, "Mn": 0.35, "Si": 0.25, "Cr": 1.45}
    assert hrc(c52100, 205.0, 2.0) >= 60.0
    assert hrc(c52100, 315.0, 2.0) >= 56.0
    assert tp.check_validity(c52100, 205.0, 2.0)


# --- the shipped coefficients are what the offline fit script produces ---------------

def _script(name):
    import importlib.util
    from pathlib import Path
    path = Path(__file__).resolve().parents[1] / "scripts" / f"{name}.py"
    spec = importlib.util.spec_from_file_location(name, path)
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


def _read_fit(file):
    import pandas as pd
    from selector.catalogue.loader import data_dir
    return pd.read_csv(data_dir() / "fits" / file, comment="#", dtype={"grade": str})


#: how closely a refit on another machine or library build reproduces the shipped optimum: the
#: nonlinear least-squares optimum agrees to ~5e-9 relative between numpy/scipy builds (measured:
#: 88.0760418469 shipped vs 88.0760422624 refitted with numpy 2.4 / scipy 1.17), and a coefficient
#: held on its bound at 0 differs by ~1e-11 absolute; any change of data, form or script moves the
#: coefficients by far more (percent)
FIT_RTOL, FIT_ATOL = 1e-6, 1e-8


def test_shipped_coefficients_equal_the_fit_script():
    import pandas as pd
    res = _script("fit_tempering").fit()
    shipped = _read_fit("tempering_coefficients.csv")
    assert list(shipped["coefficient"]) == list(res["coefficients"]["coefficient"])
    np.testing.assert_allclose(shipped["value"].to_numpy(float), res["coefficients"]["value"].to_numpy(float),
                               rtol=FIT_RTOL, atol=FIT_ATOL)
    rows = _read_fit("tempering_rows.csv")
    assert len(rows) == len(res["rows"])
    pd.testing.assert_series_equal(rows["grade"], res["rows"]["grade"].reset_index(drop=True), check_names=False)
    np.testing.assert_allclose(rows["temp_c"], res["rows"]["temp_c"], rtol=1e-12)
    cv = _read_fit("tempering_cv.csv")
    # the leave-one-grade-out refits stop within ~3e-6 relative of each other between builds (measured
    # 0.967654 vs 0.967657 HRC); the figures are quoted to 0.01 HRC
    np.testing.assert_allclose(cv["median_abs_error"], res["cv"]["median_abs_error"], rtol=0, atol=1e-3)
    # and the package reads exactly those coefficients
    assert tp.coefficients() == pytest.approx(tuple(shipped["value"][:len(tp.FEATURES)]), rel=1e-12)


def test_cross_validation_figures_and_form():
    # leave-one-grade-out errors documented in docs/methods/tempering.md (measured with
    # scripts/fit_tempering.py): regression guards (tests/regression_guards.py)
    res = _script("fit_tempering").fit()
    assert res["pooled_logo_median_hrc"] < guards.TEMPERING_LOGO_MEDIAN_HRC_MAX
    assert res["pooled_logo_p90_hrc"] < guards.TEMPERING_LOGO_P90_HRC_MAX
    assert set(res["cv"]["grade"]) >= {"4140", "4340", "1030"}
    k = dict(zip(tp.FEATURES, tp.coefficients()))
    # the surface softens with P, carbon's effect weakens at high P, and Mo / V resist
    # softening (Grange, Hribal & Porter 1977: the effect of carbon decreases and the alloy
    # effects grow with tempering temperature).  V*a is bounded at >= 0 in the fit and the one
    # V steel of the data (6150) puts it at the bound since the fit through the mixture rule
    assert k["s"] < 0 and k["C*s"] < 0 and k["Mo*a"] > 0 and k["V*a"] >= 0
    # chromium raises the hardness of tempered martensite (Grange, Hribal & Porter 1977)
    assert k["Cr"] > 0
    # the 41Cr4 table (data/reference/qt_steels.csv) is fitted: its rows are listed for the join
    assert ((res["rows"]["source_file"] == "data/reference/qt_steels.csv") & (res["rows"]["grade"] == "5140")).sum() == 11


def test_package_does_not_fit_at_import():
    import inspect
    src = inspect.getsource(tp)
    assert "lstsq" not in src


def test_broadcasts_over_catalogue_arrays():
    comp = {"C": np.array([0.3, 0.4, 0.5]), "Mo": np.array([0.0, 0.2, 0.25])}
    out = tp.tempered_martensite_hv(comp, np.array([[400.0], [600.0]]), 2.0)
    assert out.shape == (2, 3)
    assert np.all(out[1] < out[0])


def test_validity_ranges_registered_from_the_fit():
    rng = tp.fitted_range()
    v = validity.get("tempering_hv")
    assert v.ranges["C"][:2] == (pytest.approx(rng["C"][0]), pytest.approx(rng["C"][1]))
    # the carbon span of the fully hardened rows of data/tempering_points.csv (0.30 to 0.60 % C, read from the file)
    assert rng["C"][0] == pytest.approx(0.30) and rng["C"][1] == pytest.approx(0.60)
    assert validity.check("tempering_hv", Mo=0.5)
    assert validity.check("tempering_hv", C=0.8)   # high-carbon martensite: extrapolated, warned
    assert not validity.check("tempering_hv", C=0.4, Mo=0.2, P_1000=15.0)
    assert validity.get("hollomon_jaffe").ranges["temp_c"][:2] == (150.0, 705.0)
    # the route's check: a 704 C temper of a 0.4 % C steel lies beyond the fitted P
    assert tp.check_validity({"C": 0.4}, 704.0, 2.0)
    assert not tp.check_validity({"C": 0.4, "Mo": 0.2}, 540.0, 2.0)


@pytest.mark.parametrize("fn", [tp.hollomon_jaffe_parameter, tp.hollomon_jaffe_constant, tp.equivalent_hours, tp.tempered_martensite_hv])
def test_docstring_documents_every_parameter(fn):
    import inspect
    doc = fn.__doc__
    assert "Parameters" in doc and "References" in doc
    params = doc.split("Parameters", 1)[1].split("Returns", 1)[0]
    for name in inspect.signature(fn).parameters:
        assert f"{name} :" in params, f"{fn.__name__}: parameter {name} not documented"


def test_martensite_series_read_and_censored_below_hrc_20():
    # data/tempering_martensite_series.csv (Grange & Baughman 1956, 1 h tempers): every row is read;
    # a value printed below HRC 20 (outside ASTM E140 Table 1) is never converted, it is censored
    ft = _script("fit_tempering")
    t = ft.series_points()
    assert len(t) == 235 and t["series"].all()
    low = (t["hardness_hrc"] < 20).to_numpy()
    assert low.sum() == 17 and t["hardness_hv"][low].isna().all() and t["hardness_hv"][~low].notna().all()
    # 1045 tempered 1 h at 204.4 C: HRC 56.3 as printed -> HV by E140 Table 1
    r = t[(t["grade"] == "1045") & (t["temp_c"] == 204.4)].iloc[0]
    assert r["hardness_hv"] == pytest.approx(float(cv.hrc_to_hv(56.3)))
    # censored residual: 0 while the prediction stays below 238 HV, the excess above it
    res = ft.residuals(np.array([200.0, 250.0, 300.0]), np.array([np.nan, np.nan, 290.0]))
    np.testing.assert_allclose(res, [0.0, 250.0 - ft.HV_CENSOR, 10.0])


def test_shipped_form_holds_the_element_shape_terms_at_zero():
    # the element-shape terms (Cr*a, Mn*a, Si, Ni) were tried with the series and not shipped
    # (docs/methods/tempering.md section 5a): the shipped coefficients hold them at exactly 0 and
    # the shipped fit does not use the series rows
    k = dict(zip(tp.FEATURES, tp.coefficients()))
    assert all(k[f] == 0.0 for f in ("Cr*a", "Mn*a", "Si", "Ni"))
    rows = _read_fit("tempering_rows.csv")
    assert not rows["source_file"].str.contains("tempering_martensite_series").any()


def test_shipped_surface_never_reverses_the_effect_of_carbon():
    # Grange, Hribal & Porter (Metall. Trans. A 8A (1977) 1775): carbon raises the hardness of tempered
    # martensite at every temper, its effect falling with the temper.  The shipped coefficients
    # (docs/methods/tempering.md sections 2 and 5c) hold the slope a1 + b1*s >= 0 up to the top of the
    # fitted P, with b1 <= 0; the free fit shipped before 4 December 2026 failed both checks below
    # (a1 88.1, b1 -48.5: slope -42 HV/% at the top, 0.25 % C harder than 0.40 % C at 600-700 C)
    k = dict(zip(tp.FEATURES, tp.coefficients()))
    s_top = tp.fitted_range()["P_1000"][1] - 16.0
    assert k["C*s"] <= 0.0 and k["C"] + k["C*s"] * s_top >= -1e-6
    for temp_c in (500.0, 600.0, 650.0, 700.0):
        lean, rich = (float(tp.tempered_martensite_hv({"C": c, "Cr": 0.9, "Mo": 0.2}, temp_c, 2.0))
                      for c in (0.25, 0.40))
        assert lean <= rich + 1e-9, temp_c


def test_carbon_slope_option_keeps_carbon_raising_tempered_hardness():
    # docs/methods/tempering.md section 5c.  Grange, Hribal & Porter (Metall. Trans. A 8A (1977) 1775):
    # carbon raises the hardness of tempered martensite at every temper, its effect falling markedly with
    # the temper; in the martensite series the fit uses (Grange & Baughman, Trans. ASM 48 (1956) 165,
    # data/tempering_martensite_series.csv) 4037 (0.35 % C) tempered 1 h at 593 C is 31.0 HRC against
    # 27.0 for 4027 (0.26 % C), same Mn and Mo.  Fitted with the series and the element shapes, the free
    # two-stage fit puts the carbon slope a1 + b1*s below 0 at the top of its data; the --carbon-slope
    # option holds it at >= 0 and the surface then ranks the two steels as published.
    ft = _script("fit_tempering")
    ft.FORM, ft.USE_SERIES = "element_shapes", True
    rows = ft.fit_points(tp.load_points())
    ft.CAPS = ft.caps(rows)
    struct = ft.chain_structures(rows)
    s_top = float(rows["P"].max()) / 1000.0 - 16.0
    i_c, i_cs = tp.FEATURES.index("C"), tp.FEATURES.index("C*s")
    series = rows[rows["series"]]
    pair = series[series["grade"].isin(["4027", "4037"]) & (series["temp_c"] == 593.3)].sort_values("grade")
    assert pair["hardness_hrc"].tolist() == [27.0, 31.0]
    out = {}
    for held in (False, True):
        ft.CARBON_SLOPE_NON_NEGATIVE = held
        coef = ft.solve(rows, struct)
        hv_4027, hv_4037 = ft.predict(coef, pair.reset_index(drop=True))
        out[held] = (coef[i_c] + coef[i_cs] * s_top, coef[i_cs], hv_4037 - hv_4027)
    assert out[False][0] < 0.0                   # the free fit reverses carbon at the top of its data
    assert out[True][0] >= -1e-6 and out[True][1] <= 0.0
    # 4037 minus 4027 at 593 C, HV: published about +40 (31.0 vs 27.0 HRC); free fit -1.3, held +11.2 (measured)
    assert out[False][2] < 0.0 < out[True][2]
