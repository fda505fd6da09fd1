"""CLI verb `selector batch` (selector.views.cli.batch)."""
import pandas as pd
import pytest

import selector
from selector.design import batch as batch_mod
from selector.views.cli import main
from selector.views.cli.batch import ProgressBar

CSV = """part_id,diameter_mm,length_mm,quantity_per_year,min_yield_mpa,min_uts_mpa,min_elongation_pct
K-1,25,120,500,600,800,
K-2,25,80,100,400,,15
K-3,25,50,10,3000,,30
"""


@pytest.fixture
def parts(tmp_path):
    p = tmp_path / "parts.csv"
    p.write_text(CSV)
    return p


def test_batch_writes_parquet_and_the_stock_list(parts, tmp_path, capsys):
    out = tmp_path / "result.parquet"
    code = main(["batch", str(parts), "--out", str(out), "--rationalise", "--max-grades", "2", "--top", "4"])
    cap = capsys.readouterr()
    assert code == 0
    got = pd.read_parquet(out)
    expect = selector.batch(parts, top=4, per_grade=True)
    pd.testing.assert_frame_equal(got, expect, check_dtype=False)
    stock = pd.read_parquet(tmp_path / "result_stock.parquet")
    ref = selector.rationalise(expect, parts, holding_cost_per_grade=0.0, max_grades=2)
    assert list(stock["grade"]) == list(ref["assignment"]["grade"])
    assert "Rationalised stock list" in cap.out and "K-3: nothing meets its targets" in cap.out
    assert "CAUTION" in cap.out
    assert "parts 3/3" in cap.err and "remaining" in cap.err        # progress bar on stderr
    assert "parts 3/3" not in cap.out


def test_bad_file_lists_every_cell_and_exits_2(tmp_path, capsys):
    p = tmp_path / "bad.csv"
    p.write_text("part_id,diameter_mm,length_mm,quantity_per_year,min_yeild_mpa\nA,25,100,-1,5\n")
    code = main(["batch", str(p), "--out", str(tmp_path / "r.parquet")])
    err = capsys.readouterr().err
    assert code == 2 and "min_yeild_mpa" in err and "did you mean min_yield_mpa" in err
    assert not (tmp_path / "r.parquet").exists()


def test_unreachable_scheduler_exits_2_naming_it(parts, tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(batch_mod, "CONNECT_TIMEOUT_S", 1.0)
    code = main(["batch", str(parts), "--out", str(tmp_path / "r.csv"), "--scheduler", "tcp://127.0.0.1:9"])
    assert code == 2 and "tcp://127.0.0.1:9" in capsys.readouterr().err


@pytest.mark.parametrize("argv,field", [(["--out", "r.txt"], "--out"), (["--out", "r.csv", "--max-grades", "3"],
                                                                       "--max-grades"),
                                        (["--out", "r.csv", "--top", "-2"], "--top")])
def test_bad_options(parts, tmp_path, capsys, argv, field, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["batch", str(parts)] + argv) == 2
    assert field in capsys.readouterr().err


def test_progress_bar_text():
    bar = ProgressBar()
    t = bar.text(25, 100)
    assert t.startswith("parts 25/100 [") and "25 %" in t and "elapsed" in t and "remaining" in t
    assert "100 %" in bar.text(100, 100)
