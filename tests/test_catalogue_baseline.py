"""Baseline (annealed or supplied) properties of catalogue grades: their own source and confidence
(``base_source`` / ``base_confidence`` of data/grades.csv) and a check against the tables read.

Each expected value below is typed from the named reproduction, not from data/grades.csv.
"""
import math

import pytest

from selector.catalogue.grades import GRADES_SCHEMA, grade
from selector.catalogue.loader import data_dir, read_file

KSI = 6.894757

# (tensile MPa, yield MPa, elongation %, HB) as printed in the source; tolerance: the sources print MPa
# to 1 MPa or ksi to 1 ksi (0.5 ksi = 3.4 MPa), elongation to 0.1 %, HB to 1
READ = {
    # azom.com ArticleID 6743 and theworldmaterial.com: AISI 5160 annealed at 815 degC
    "5160": ((724, 275, 17.2, 197), 1.0),
    # azom.com ArticleID 6733: AISI E9310 annealed
    "9310": ((820, 450, 17.3, 241), 1.0),
    # azom.com ArticleID 6744: AISI 6150 (annealed)
    "6150": ((670, 415, 23.0, 197), 1.0),
    # theworldmaterial.com: AISI 1095 annealed at 790 degC
    "1095": ((655, 380, 13.0, 192), 1.0),
    # efunda.com: AISI 1340 annealed at 800 degC 703.3 / 436.4 MPa, 25.5 %; HB 207 in the Shigley appendix copy
    "1340": ((703.3, 436.4, 25.5, 207), 1.0),
    # efunda.com: AISI 4140 annealed at 815 degC 655.0 / 417.1 MPa, 25.7 %; HB 197 in the Shigley appendix copy
    "4140": ((655.0, 417.1, 25.7, 197), 1.0),
    # asm.matweb.com M434AA: AISI 4340 annealed, 25 mm round
    "4340": ((745, 470, 22.0, 217), 1.0),
    # Shigley appendix table (scribd 403205949): AISI 4130 annealed 558 MPa / 359 MPa / 28 % / 156 HB
    "4130": ((558, 359, 28.0, 156), 1.0),
    # azom.com ArticleID 6766 (and sheetsplates.com): AISI 8740 annealed
    "8740": ((695, 415, 22.2, 201), 1.0),
    # simplycommodities.com copy of the azom.com AISI 4320 article: annealed; efunda copy at searchsteel.info 579.2 MPa
    "4320": ((580, 425, 29.0, 163), 1.0),
    # azom.com ArticleID 6764: AISI 4620 annealed
    "4620": ((510, 370, 31.3, 149), 1.0),
    # scribd.com/document/501088711: "AISI 5140 Steel, annealed 830 degC"
    "5140": ((570, 295, 28.6, 167), 1.0),
    # Aluminum Association typical values, ksi, as reproduced at btimetals.com (5052, 6063 alloy data pages)
    "5052": ((28 * KSI, 13 * KSI, 25, 47), 3.5),
    "6063": ((13 * KSI, 7 * KSI, 18, 25), 3.5),
    # AA typical values in MPa at aerodynamicmetals.com: 7050-T7451 (no HB in the table)
    "7050": ((525, 470, 11, None), 1.0),
    # AA typical values ('AA; Typical') at asm.matweb.com MA7075O / MA5083O and the 6061-O copy at tauruspiping.com
    "7075": ((228, 103, 17, 60), 1.0),
    "5083": ((290, 145, 22, None), 1.0),
    "6061": ((124, 55.2, 25, 30), 1.0),
    # ASM Material Data Sheets (asm.matweb.com): MTP641 Ti-6Al-4V annealed (copy at scribd 492878761), MQ316J 316 annealed
    # bar, 'AISI Type 303 Stainless Steel, annealed bar' (copy at elginfasteners.com), 'AISI Type 304 Stainless Steel'
    # (copy at scribd 416534641)
    "Ti-6Al-4V": ((950, 880, 14, 334), 1.0),
    "316": ((550, 240, 60, 149), 1.0),
    "303": ((620, 240, 50, 160), 1.0),
    "304": ((505, 215, 70, 123), 1.0),
    # ASM Material Data Sheets: MTP643 Ti-6Al-4V ELI annealed; MTU021 Titanium Grade 2 annealed (98 HRB, no Brinell value)
    "Ti-6Al-4V-ELI": ((860, 790, 15, 326), 1.0),
    "Ti-Gr2": ((430, 340, 28, None), 1.0),
    # btimetals.com C51000 table, OS035 row: 49 ksi / 340 MPa, 20 ksi / 140 MPa, 58 %, 28 HRB (no Brinell value)
    "C51000": ((340, 140, 58, None), 1.0),
    # aircraftmaterials.com grade 431 data sheet, annealed
    "431": ((862, 655, 20, 260), 1.0),
    # ASM Material Data Sheet 'AISI Type 304L Stainless Steel' (MQ304L): 82 HRB, no Brinell value
    "304L": ((564, 210, 58, None), 1.0),
    # metalmartusa.com grade T416 data sheet, annealed: 75 / 40 ksi, 30 %, 155 HB
    "416": ((75 * KSI, 40 * KSI, 30, 155), 1.0),
    # ASTM B505 continuous castings, specified minimums (ksi) as reproduced at bronzebearingsinc.com (C95400, 170 HB
    # typical) and dura-barms.com (C93200, no Brinell requirement)
    "C95400": ((85 * KSI, 32 * KSI, 12, 170), 1.0),
    "C93200": ((35 * KSI, 20 * KSI, 10, None), 1.0),
    # Aluminum Association typical properties (Kutz, Handbook of Materials Selection, Table 5), ksi
    "1100": ((13 * KSI, 5 * KSI, 35, 23), 3.5),
    "2011": ((55 * KSI, 43 * KSI, 15, 95), 3.5),
    "2014": ((27 * KSI, 14 * KSI, 18, 45), 3.5),
    "2024": ((27 * KSI, 11 * KSI, 20, 47), 3.5),
    "3003": ((16 * KSI, 6 * KSI, 30, 28), 3.5),
    # textbook appendix table of carbon and alloy steel properties (from the ASM Metals Handbook), scribd 403205949:
    # AISI 1020 annealed 60 ksi / 414 MPa, 43 ksi / 296 MPa, 38 %, 121 HB
    "1020": ((414, 296, 38.0, 121), 1.0),
    # kmac-distribution.com 316L data sheet: 81 200 psi, 34 100 psi, 55 %, 146 HB
    "316L": ((81.2 * KSI, 34.1 * KSI, 55, 146), 1.0),
    # rolledmetalproducts.com martensitic table, annealed bar: 420 95 / 50 ksi, 25 %, B92; 440C 110 / 65 ksi, 14 %, B97
    # (no Brinell value); 440C 758 / 448 MPa also at nickelalloys.in
    "420": ((655, 345, 25, None), 1.0),
    "440C": ((758, 448, 14, None), 1.0),
    # ASTM B16/B16M O60 rod 1 in. and under, specified minimums as reproduced at boltport.com: 48 / 20 ksi, 15 %
    "C36000": ((48 * KSI, 20 * KSI, 15, None), 1.0),
    # distributor reproductions of the copper-alloy typical property tables (no Brinell value in them): C17200 TB00 at
    # jsktraders.com (221 MPa yield, 483 MPa tensile, 45 %, HRB 60); C17510 TB00 flat products at australwright.com.au
    # and laymore-copper.com (310 MPa, 172 MPa at 0.5 % extension, 28 %, HRB 32)
    "C17200": ((483, 221, 45, None), 1.0),
    "C17510": ((310, 172, 28, None), 1.0),
    # Copper Development Association typical values at alloys.copper.org/alloy/C54400, OS035: 44 ksi, 19 ksi, 50 %,
    # HRF 65; 303 MPa / 131 MPa / 50 % at substech.com
    "C54400": ((303, 131, 50, None), 1.0),
}


def _grades():
    return read_file(data_dir() / "grades.csv", GRADES_SCHEMA)


@pytest.mark.parametrize("grade_id", sorted(READ))
def test_baseline_matches_the_table_read(grade_id):
    (uts, ys, el, hb), tol_mpa = READ[grade_id]
    g = grade(grade_id)
    assert g.base_uts_mpa == pytest.approx(uts, abs=tol_mpa)
    assert g.base_yield_mpa == pytest.approx(ys, abs=tol_mpa)
    assert g.base_elongation_pct == pytest.approx(el, abs=0.1)
    if hb is None:  # the source gives no Brinell value: the row leaves it blank
        assert g.base_hardness_hb is None or math.isnan(g.base_hardness_hb)
    else:
        assert g.base_hardness_hb == pytest.approx(hb, abs=1)


def test_every_builtin_row_tags_its_baseline():
    t = _grades()
    assert (t["base_source"].str.strip() != "").all()
    assert (t["base_confidence"].str.strip() != "").all()
    verified = t["base_confidence"] == "verified"
    # a verified baseline names what was read, and the table above checks it
    assert t.loc[verified, "base_source"].str.contains("reproduc|published|read|row of", case=False).all()
    assert set(t.loc[verified, "id"]) <= set(READ)


def test_a_row_without_the_baseline_columns_still_loads(tmp_path):
    # the columns are optional for a user's custom grade file (selector.studies.load_custom_grades)
    from selector.catalogue.loader import parse_text
    src = (data_dir() / "grades.csv").read_text(encoding="utf-8").splitlines()
    body = [ln for ln in src if not ln.startswith("#")]
    header = body[0].split(",")
    keep = [i for i, h in enumerate(header) if h not in ("base_source", "base_confidence")]
    assert len(keep) == len(header) - 2
    import csv
    import io
    rows = list(csv.reader(io.StringIO("\n".join(body[:2]))))
    text = "\n".join(",".join(f'"{r[i]}"' for i in keep) for r in rows)
    df = parse_text(text, "custom.csv", GRADES_SCHEMA)
    assert len(df) == 1


@pytest.mark.xfail(strict=True, reason=(
    "issue 18 target not met: 43 of 103 baseline rows (41.7 %) are verified; the rest are tagged honestly "
    "(from memory, or partial where some values were read).  Still open: 18 of 20 plain-carbon and 13 of 21 alloy "
    "steels (the stored public copies of the ASM annealed-bar table show only its first page), the EN grades (EN "
    "10083-3 / 10084 / 10085 give a +A hardness maximum only), tool steels (ASTM A681 gives an annealed hardness "
    "maximum only), maraging, PH stainless (ASTM A564 condition A: hardness maximum only), duplex, nickel alloys and "
    "three copper alloys (C11000, C26000, C63000).  It passes when >= 80 % are read in a handbook table or product "
    "standard reproduction"))
def test_at_least_80_percent_of_baseline_rows_are_verified():
    t = _grades()
    verified = t["base_confidence"] == "verified"
    assert verified.mean() >= 0.80, f"{verified.sum()} of {len(t)} baseline rows verified"
