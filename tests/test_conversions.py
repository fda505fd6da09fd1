"""Tests of selector.models.conversions (ASTM E140 / A370 hardness conversions)."""
import numpy as np
import pytest

from selector.models import conversions as cv
from selector.models import validity


# --- external checks: rows of ASTM E140-12b Table 1 (with A370 Table 3 tensile strength),
# read in two reproductions (encoremetals.com hardness-conversions; nhatvietindustry.com.vn
# hardness-conversion-table).  Hardness values are integers, so those checks are exact
# (tolerance 1e-9) at the tabulated points; the MPa column is ksi x 6.895 rounded to
# 1 MPa by those reproductions (the table gives 1 ksi = 6.9 MPa steps), so 1 MPa.
E140_ROWS = [
    # (HRC, HV, HB, TS MPa)                       source
    (58, 653, 615, 2330),  # ASTM E140-12b Table 1, HRC 58 row; A370 Table 3 TS 338 ksi
    (57, 633, 595, 2241),  # ASTM E140-12b Table 1, HRC 57 row; A370 Table 3 TS 325 ksi
    (55, 595, 560, 2075),  # ASTM E140-12b Table 1, HRC 55 row; A370 Table 3 TS 301 ksi
    (52, 544, 512, 1882),  # ASTM E140-12b Table 1, HRC 52 row; A370 Table 3 TS 273 ksi
    (50, 513, 481, 1758),  # ASTM E140-12b Table 1, HRC 50 row; A370 Table 3 TS 255 ksi
    (45, 446, 421, 1482),  # ASTM E140-12b Table 1, HRC 45 row; A370 Table 3 TS 215 ksi
    (40, 392, 371, 1255),  # ASTM E140-12b Table 1, HRC 40 row; A370 Table 3 TS 182 ksi
    (36, 354, 336, 1110),  # ASTM E140-12b Table 1, HRC 36 row; A370 Table 3 TS 161 ksi
    (30, 302, 286, 951),   # ASTM E140-12b Table 1, HRC 30 row; A370 Table 3 TS 138 ksi
    (24, 260, 247, 820),   # ASTM E140-12b Table 1, HRC 24 row; A370 Table 3 TS 119 ksi
    (20, 238, 226, 758),   # ASTM E140-12b Table 1, HRC 20 row; A370 Table 3 TS 110 ksi
]


@pytest.mark.parametrize("hrc,hv,hb,uts", E140_ROWS)
def test_e140_rows_exact(hrc, hv, hb, uts):
    # Source: ASTM E140-12b Table 1 / ASTM A370 Table 3 (row given in E140_ROWS)
    assert cv.hrc_to_hv(hrc) == pytest.approx(hv, abs=1e-9)
    assert cv.hv_to_hrc(hv) == pytest.approx(hrc, abs=1e-9)
    assert cv.hv_to_hb(hv) == pytest.approx(hb, abs=1e-9)
    assert cv.hb_to_hv(hb) == pytest.approx(hv, abs=1e-9)
    assert cv.hv_to_uts_mpa(hv) == pytest.approx(uts, abs=1.0)
    assert cv.hb_to_uts_mpa(hb) == pytest.approx(uts, abs=1.0)
    assert cv.uts_to_hv(uts) == pytest.approx(hv, abs=0.3)


def test_top_of_hrc_scale():
    # ASTM E140-12b Table 1: HRC 68 = 940 HV, HRC 60 = 697 HV (encoremetals reproduction)
    assert cv.hrc_to_hv(68) == pytest.approx(940)
    assert cv.hrc_to_hv(60) == pytest.approx(697)


def test_interpolation_between_rows_is_linear():
    # midway between the HRC 50 (513 HV) and HRC 52 (544 HV) rows via HRC 51 (528 HV)
    assert cv.hv_to_hrc(520.5) == pytest.approx(50.5, abs=1e-9)


def test_nan_below_hrc_scale_and_outside_table():
    # HRC 20 is the lower limit of the Rockwell C scale (E140 Table 1 starts there)
    out = cv.hv_to_hrc(np.array([150.0, 237.9, 238.0, 940.0, 941.0]))
    assert np.isnan(out[0]) and np.isnan(out[1]) and np.isnan(out[4])
    assert out[2] == pytest.approx(20.0) and out[3] == pytest.approx(68.0)
    assert np.isnan(cv.hrc_to_hv(19.5)) and np.isnan(cv.hrc_to_hv(69))
    assert np.isnan(cv.hv_to_hb(720.0))      # E140 gives no Brinell value above HRC 60
    assert np.isnan(cv.hv_to_uts_mpa(697.0))  # A370 gives no tensile strength above HRC 59
    assert np.isnan(cv.hv_to_uts_mpa(90.0))
    assert np.isnan(cv.hv_to_hrc(np.nan))


def test_round_trips():
    hv = np.linspace(238, 940, 301)
    np.testing.assert_allclose(cv.hrc_to_hv(cv.hv_to_hrc(hv)), hv, rtol=1e-12)
    hv = np.linspace(100, 697, 301)
    np.testing.assert_allclose(cv.hb_to_hv(cv.hv_to_hb(hv)), hv, rtol=1e-12)
    hv = np.linspace(116, 674, 301)
    np.testing.assert_allclose(cv.uts_to_hv(cv.hv_to_uts_mpa(hv)), hv, rtol=1e-12)


@pytest.mark.parametrize("f,lo,hi", [
    (cv.hv_to_hrc, 238, 940), (cv.hrc_to_hv, 20, 68), (cv.hv_to_hb, 100, 697),
    (cv.hb_to_hv, 100, 654), (cv.hv_to_uts_mpa, 116, 674), (cv.uts_to_hv, 387, 2420),
    (cv.hb_to_uts_mpa, 116, 634),
])
def test_monotone_increasing(f, lo, hi):
    x = np.linspace(lo, hi, 2001)
    y = f(x)
    assert np.all(np.isfinite(y))
    assert np.all(np.diff(y) > 0)


def test_broadcasts_over_arrays():
    x = np.array([[300.0, 400.0], [500.0, 600.0]])
    assert cv.hv_to_hrc(x).shape == (2, 2)
    assert np.ndim(cv.hv_to_hrc(300.0)) == 0


def test_tensile_per_brinell_close_to_textbook_rule():
    # Shigley's Mechanical Engineering Design (Budynas & Nisbett), Su = 3.4 HB MPa for
    # steel, a rule of thumb: within 5 % of it between HRC 20 and 45 (HB 226-421)
    hb = np.linspace(226, 421, 50)
    ratio = cv.hb_to_uts_mpa(hb) / hb
    assert np.all(np.abs(ratio / 3.4 - 1.0) < 0.05)


def test_b_range_used_below_hrc_20():
    # Table 2 rows carry the chain below HV 238: an annealed-steel hardness converts
    # (E140 Table 2 / A370 Table 3, from memory: HRB 80 = 150 HV = 150 HB, TS 72 ksi)
    assert cv.hv_to_hb(150.0) == pytest.approx(150.0, abs=1e-9)
    assert cv.hv_to_uts_mpa(150.0) == pytest.approx(72 * 6.895, abs=0.1)


def test_validity_registered():
    v = validity.get("astm_e140")
    assert v.ranges["hardness_hrc"][:2] == (20.0, 68.0)
    assert validity.check("astm_e140", hardness_hrc=18.0)
    assert not validity.check("astm_e140", hardness_hrc=40.0)


def test_every_row_sourced():
    from selector.catalogue.loader import read_table
    t = read_table(cv.FILE, cv._SCHEMA)
    assert (t["source"].str.len() > 0).all()
    assert set(t["confidence"]) <= {"verified", "partial", "from memory"}
    # tensile column is the ksi column times 6.895 (A370 conversion), to 0.1 MPa
    m = t["uts_ksi"].notna()
    np.testing.assert_allclose(t.loc[m, "uts_mpa"], t.loc[m, "uts_ksi"] * 6.895, atol=0.051)
    assert (t["uts_mpa"].notna() == m).all()


@pytest.mark.parametrize("fn", [cv.hv_to_hrc, cv.hrc_to_hv, cv.hv_to_hb, cv.hb_to_hv, cv.hv_to_uts_mpa, cv.uts_to_hv, cv.hb_to_uts_mpa])
def test_docstring_documents_every_parameter(fn):
    import inspect
    doc = fn.__doc__
    assert "Parameters" in doc and "References" in doc
    params = doc.split("Parameters", 1)[1].split("Returns", 1)[0]
    for name in inspect.signature(fn).parameters:
        assert f"{name} :" in params, f"{fn.__name__}: parameter {name} not documented"


def test_brinell_ball_column_matches_the_value():
    # the file's rule (data/hardness_conversions.csv header, docs/methods/conversions.md): every HB
    # above 450 is read from E140's tungsten-carbide ball column (phase2plus.com reproduction of E140
    # Table 1 at HRC 48: HBS 451, HBW 455, the file keeps 455), every HB up to 450 from a steel-ball
    # column or the Rockwell B table
    from selector.catalogue.loader import read_table
    t = read_table(cv.FILE, cv._SCHEMA)
    hb = t["hb"].astype(float)
    ball = t["hb_ball"].astype(str)
    assert (ball[hb > 450] == "carbide").all(), t.loc[(hb > 450) & (ball != "carbide"), ["hrc", "hb", "hb_ball"]]
    assert (ball[hb <= 450] != "carbide").all(), t.loc[(hb <= 450) & (ball == "carbide"), ["hrc", "hb", "hb_ball"]]
