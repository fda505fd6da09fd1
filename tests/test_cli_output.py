"""Printing of a table by the command line (selector.views.cli.output)."""
import io

import pandas as pd

from selector.views.cli import output


def test_csv_cells_cannot_start_formulas(capsys):
    df = pd.DataFrame({"grade": ["=HYPERLINK(\"x\")", "+1", "4140"], "yield_mpa": [-1.0, 2.0, 3.0],
                       "route": [[{"op": "anneal"}], [], [{"op": "temper", "temp_c": 200.0}]]})
    output.write_frame(df, "csv")
    back = pd.read_csv(io.StringIO(capsys.readouterr().out), keep_default_na=False)
    assert list(back["grade"]) == ["'=HYPERLINK(\"x\")", "'+1", "4140"]
    assert list(back["yield_mpa"]) == [-1.0, 2.0, 3.0]
    assert back["route"].iloc[2] == '[{"op": "temper", "temp_c": 200.0}]'     # lists as JSON


def test_table_ends_with_the_cautions(capsys):
    output.write_frame(pd.DataFrame({"grade": ["4140"], "yield (MPa)": [970.0]}), "table", "title")
    out = capsys.readouterr().out
    assert out.startswith("title") and "970" in out and "CAUTION" in out and "licensed engineer" in out


def test_fmt():
    assert output.fmt(None) == "—" and output.fmt(float("nan")) == "—" and output.fmt(2.345, 1) == "2.3"
