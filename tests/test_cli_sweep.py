"""``selector sweep`` (selector.views.cli.sweep) and the sweep with its picks
(selector.design.sweep_picks)."""
import json

import pytest

import selector
from selector.design.sweep_picks import sweep_with_picks
from cli_runner import run

CASE = dict(load_kn=60, gap_mm=1.5, lug_thickness_mm=38, clevis_thickness_mm=16)


@pytest.fixture(scope="module")
def sweep():
    return selector.diameter_sweep([20.0, 25.0], **CASE)


def test_sweep_with_picks_keeps_the_sweep_and_adds_the_route(sweep):
    sw = sweep_with_picks([20.0, 25.0], **CASE)
    assert sw[list(sweep.columns)].equals(sweep)
    for row in sw.itertuples():
        if row.grade:
            assert isinstance(row.route, list) and row.route[0]["op"]
            # the picked candidate of select at that diameter, identified by its grade, route and yield
            cand = selector.select({k: v for k, v in selector.pin_targets(diameter_mm=row.diameter_mm,
                                                                          **CASE).items()},
                                   row.diameter_mm, length_mm=sw.attrs["length_mm"], robust_only=True)
            hit = cand[(cand["grade"] == row.grade) & (cand["route_text"] == row.route_text)]
            assert len(hit) and hit["route"].iloc[0] == row.route


def test_sweep_cli_readable_json(sweep):
    code, out, _ = run("sweep", "--load-kn", 60, "--gap", 1.5, "--lug", 38, "--clevis", 16, "--diameters", "20,25",
                       "--format", "json")
    rows = json.loads(out)["rows"]
    assert code == 0 and [r["diameter (mm)"] for r in rows] == [20.0, 25.0]
    assert [r["grade"] for r in rows] == sweep["grade"].tolist()
    assert all("process route" in r and "changed" in r for r in rows)
    code, out, _ = run("sweep", "--load-kn", 60, "--gap", 1.5, "--lug", 38, "--clevis", 16, "--diameters", "20,25",
                       "--units", "US")
    assert code == 0 and "diameter (in)" in out and "°C" not in out and "CAUTION" in out
