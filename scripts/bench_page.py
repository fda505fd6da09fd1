"""Speed of the local page in a real browser (issue 13), each figure beside the floor of the
same step measured by the same harness in the same run: prints, asserts nothing.

Three apps are served by ``streamlit run`` on free local ports and opened in Debian's
headless Chromium through Playwright (no browser is downloaded):

* **bare**: a title, one number input, the example's candidate table (read from a file)
  and a caption: Streamlit's own cost of drawing a page that shows a candidate row, and
  of re-running a script (the floor under any Streamlit page with the answer, here);
* **same widgets**: the page's sidebar widgets, header, notices, tabs, summary line,
  map and candidate table with the page's own labels, showing the example's table and
  map spec as read from files (computed once by this script through the page's own
  functions), computing nothing: the floor of the page's front end, transport and
  Streamlit, with its amount of content;
* **page**: ``serve.py`` (the README's page command: ``app.py`` with the warm start).

Steps, each timed from the browser's action to the page's script having finished its
run with the new content on screen:

* first answer: from navigation start to the first candidate row (``C1``) in the
  table, a fresh browser profile (nothing in the browser's cache); the map drawn and
  the run's end are printed beside it; a second visit in the same browser too;
* target change (Min yield; the first change on the page), diameter change, unit switch (US
  customary), a re-run with every result cached (the table's "All columns" switched back off), and
  three later target changes, each after a pause of 0.6 s (the median; a designer tries several
  targets, and the pause lets the cache write of the step before, half a second behind the answer,
  finish).

For the page, the server's own timings of each run are read from its footer ("This
run: … page x s, library y s"): the script's time and the library's part of it (the
cached wrappers' cache misses); browser − script is the front end and transport.

Usage: ``python scripts/bench_page.py [--rounds N] [--compare REV]`` (median of N rounds,
default 3; ``--compare``: the page of an earlier git revision measured in the same rounds,
printed in a second table).  The table cache is a fresh temporary directory
(``SELECTOR_CACHE_DIR``); each round changes the diameter to a section not computed before.
"""
from __future__ import annotations

import argparse
import contextlib
import json
import os
import re
import shutil
import socket
import statistics
import subprocess
import sys
import tempfile
import textwrap
import time
import urllib.request
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CHROMIUM = "/usr/bin/chromium"
WIDTH = 1024
LAUNCH_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
               "--disable-component-update", "--disable-sync", "--no-first-run"]
#: the targets of issue 13 (seconds); None: no figure, shown for reference
TARGETS = {"first answer": 2.0, "target change": 0.3, "later target changes": 0.3, "diameter change": 0.6,
           "unit switch": None, "cached re-run": None}

#: the script has finished its run (the attribute Streamlit sets on its root element)
IDLE = """() => document.querySelector("[data-testid='stApp']")?.dataset.testScriptState === 'notRunning'"""
#: the footer's "This run:" line (captions' textContent: innerText would lay the page out at every poll)
RUN_LINE = """() => ([...document.querySelectorAll("[data-testid='stCaption'], [data-testid='stCaptionContainer']")]
                     .map(e => (e.textContent.match(/This run:[^\\n]*/) || [""])[0]).find(t => t) || "")"""
#: the first candidate row is in the table (the grid's accessible rows carry the cell text)
FIRST_ROW = """() => [...document.querySelectorAll("[data-testid='stDataFrame'] [role='row'] td")]
                     .some(td => td.textContent === 'C1')"""
MAP_DRAWN = """() => !!document.querySelector("[data-testid='stVegaLiteChart'] svg .mark-symbol path")"""
#: "n candidates meet" in the summary line
N_CAND = """() => { for (const e of document.querySelectorAll("[data-testid='stMarkdownContainer']")) {
                       const m = e.textContent.match(/(\\d+) candidates meet/); if (m) return +m[1]; }
                     return -1; }"""


# ----------------------------------------------------------------------------- the floor apps

EMPTY_APP = textwrap.dedent('''\
    """Floor: a bare Streamlit page with the candidate table: a title, one number input,
    the example's table read from a file (no computation) and a caption."""
    import os, pickle
    import streamlit as st

    st.session_state["_runs"] = st.session_state.get("_runs", 0) + 1

    @st.cache_resource
    def load():
        with open(os.path.join(os.environ["SELECTOR_BENCH_FLOOR"], "tables.pkl"), "rb") as f:
            return pickle.load(f)["table"]

    table = load()
    st.title("floor: a bare page with the table")
    y = st.number_input("Min yield (MPa)", key="min_yield", value=None) or 0
    st.dataframe(table.head(max(1, len(table) - int(y) // 10)), hide_index=True)
    st.caption(f"This run: #{st.session_state['_runs']}")
''')

WIDGETS_APP = textwrap.dedent('''\
    """Floor: the page's widgets, notices, tabs, map and table with the example's data read
    from files; nothing is computed.  Labels as on the page, so one harness drives both."""
    import json, os, pickle
    import streamlit as st

    st.set_page_config(page_title="floor", layout="wide")
    ss = st.session_state
    ss["_runs"] = ss.get("_runs", 0) + 1
    data = os.environ["SELECTOR_BENCH_FLOOR"]

    @st.cache_resource
    def load():
        with open(os.path.join(data, "tables.pkl"), "rb") as f:
            tables = pickle.load(f)
        with open(os.path.join(data, "page.json")) as f:
            page = json.load(f)
        return tables, page

    tables, page = load()
    us = ss.get("units") == "US customary"
    su, lu = ("ksi", "in") if us else ("MPa", "mm")
    with st.sidebar:
        st.button("New part (clear everything)", width="stretch")
        st.button("Load the example", width="stretch")
        st.markdown("### Part")
        st.radio("Units", ("SI", "US customary"), key="units", horizontal=True)
        st.radio("Hardness scale", ("HRC", "HB", "HV"), horizontal=True)
        st.radio("Section", ("round bar", "plate"), horizontal=True)
        st.number_input(f"Diameter ({lu})", key="diameter", value=30.0)
        st.number_input(f"Plate thickness ({lu})", value=None, disabled=True)
        st.number_input(f"Part length ({lu})", value=120.0)
        st.markdown("### Targets")
        st.caption("Blank means no limit.")
        c1, c2 = st.columns(2)
        c1.number_input(f"Min yield ({su})", key="min_yield", value=None)
        c2.number_input(f"Max yield ({su})", value=None)
        c1.number_input(f"Min tensile ({su})", value=None)
        c2.number_input(f"Max tensile ({su})", value=None)
        c1.number_input("Min elongation (%)", value=12.0)
        c2.number_input("Max rel. cost / kg", value=None)
        with st.expander("Hardness and case"):
            h1, h2 = st.columns(2)
            for i, label in enumerate(("Min hardness", "Max hardness", "Min surface", "Min case depth")):
                (h1 if i % 2 == 0 else h2).number_input(label, value=None)
        st.markdown("### Scope")
        st.multiselect("Families", page["families"], default=page["families"])
        st.checkbox("Corrosion-resistant grades only")
        st.checkbox("Only candidates that meet the targets with the required probability")
        st.number_input("Required probability of meeting the targets (%)", value=90.0)
        st.multiselect("Do not rank these cautions last", page["rules"])
        with st.expander("Service conditions (for the cautions)"):
            st.checkbox("Electroplated")
            st.text_input("Plating")
            st.text_input("Mating material")
            st.selectbox("Environment", ("normal", "marine"))
            st.number_input("Highest service temperature", value=None)
        st.markdown("### Prices")
        st.file_uploader("Price sheet (CSV)", type=["csv"])
        with st.expander("…or paste one"):
            st.text_area("Price sheet text", height=90)
        st.markdown("### Chart")
        st.radio("Strength axis", ("yield", "tensile"), horizontal=True)
        st.slider("Candidates drawn", 3, 30, 15)

    st.title("floor: the page's elements")
    st.info(page["example"])
    st.warning(page["notice"])
    st.markdown(page["settings"])
    y = ss.get("min_yield") or 0
    table = tables["all" if ss.get("all_columns") else "table"]
    n = max(1, len(table) - int(y) // 10)          # a target change: fewer rows, like the page
    st.markdown(page["summary"].replace(str(len(table)), str(n), 1))
    labels = ["Map and list", "One candidate", "Side by side", "Alternatives", "Clevis pin", "Parts list"]
    tabs = st.tabs(labels, key="view", on_change="rerun")
    with tabs[0]:
        # new data at a change of target or diameter (the chart keeps its form, as the page's does),
        # a new form at a unit switch (the page's axis titles change)
        k = (int(y) // 100 + int(ss.get("diameter") or 0)) % 5
        spec = dict(page["map"], usermeta={"units": us})
        spec["datasets"] = {name: rows[k:] if name == "points" else rows for name, rows in spec["datasets"].items()}
        st.vega_lite_chart(spec, width="stretch")
        st.caption(page["map_caption"])
        st.toggle("All columns", key="all_columns")
        st.dataframe(table.head(n), width="stretch", hide_index=True)
        st.download_button("Download the table (CSV)", b"", file_name="candidates.csv")
    st.divider()
    st.warning(page["notice"])
    st.caption(f"This run: #{ss['_runs']}")
''')


def write_floor_data(folder: Path) -> int:
    """The example's table (default and all columns), map spec and text lines, computed
    through the page's own functions, for the floor app; the number of candidates."""
    os.environ.setdefault("SELECTOR_CACHE_DIR", str(folder / "cache"))
    import pickle
    import warnings

    import selector
    from selector.catalogue.grades import FAMILIES
    from selector.views import page as pg
    from selector.views.page import warm
    from selector.views.page.inputs import targets_key

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")          # st.cache_* outside a server: in-memory caches
        prep, rank, targets = warm.example_args()
        cand = pg.cached_rank(*rank)
        spec = pg.cached_map(prep, rank, targets_key(targets), min(15, len(cand)), "yield_mpa", pg.SI,
                             cand["variant"].iloc[0])
    tables = {"table": pg.display_table(cand, pg.SI, "HRC"), "all": pg.display_table(cand, pg.SI, "HRC", True)}
    with open(folder / "tables.pkl", "wb") as f:
        pickle.dump(tables, f)
    page = {"map": spec, "summary": pg.ranking_summary(cand), "families": list(FAMILIES),
            "rules": list(pg.avoid_rules()), "example": "**Example loaded**: " + pg.demo_title(pg.SI),
            "notice": f"**{selector.CAUTION}** {pg.DEFER_NOTICE}",
            "settings": "In force: " + ", ".join(f"{k} {v}" for k, v in targets.items()),
            "map_caption": "Each line is a candidate's process path at the nominal composition. " * 4}
    (folder / "page.json").write_text(json.dumps(page, default=str))
    return len(cand)


# ----------------------------------------------------------------------------- serving and timing

def free_port() -> int:
    with socket.socket(socket.AF_INET, socket.SOCK_STREAM) as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


def wait_healthy(url: str, proc: subprocess.Popen, timeout_s: float = 180.0) -> None:
    end = time.monotonic() + timeout_s
    while time.monotonic() < end:
        if proc.poll() is not None:
            raise RuntimeError(f"streamlit exited with code {proc.returncode}")
        try:
            with urllib.request.urlopen(url + "/_stcore/health", timeout=2) as r:
                if r.status == 200 and r.read().strip() == b"ok":
                    return
        except OSError:
            pass
        time.sleep(0.2)
    raise TimeoutError(f"{url}/_stcore/health did not answer within {timeout_s} s")


@contextlib.contextmanager
def serve(script: str | Path, env: dict | None = None, cwd: Path = ROOT, root: Path = ROOT):
    """``streamlit run <script>`` on a free local port, the package imported from ``root``
    (the project's ``.streamlit/config.toml`` applies: it is read from ``cwd``); yields
    (url, seconds from the process start to its health check answering)."""
    if not shutil.which("streamlit"):
        raise RuntimeError("the streamlit command is not on PATH")
    port = free_port()
    env = dict(os.environ if env is None else env)
    env["PYTHONPATH"] = str(root) + os.pathsep + env.get("PYTHONPATH", "")
    log = tempfile.TemporaryFile()
    t0 = time.monotonic()
    proc = subprocess.Popen([sys.executable, "-m", "streamlit", "run", str(script), "--server.port", str(port),
                             "--server.address", "127.0.0.1", "--server.headless", "true",
                             "--browser.gatherUsageStats", "false"],
                            cwd=cwd, env=env, stdout=log, stderr=subprocess.STDOUT)
    url = f"http://127.0.0.1:{port}"
    try:
        wait_healthy(url, proc)
        yield url, time.monotonic() - t0
    finally:
        proc.terminate()
        try:
            proc.wait(timeout=15)
        except subprocess.TimeoutExpired:
            proc.kill()
        log.close()


def launch(playwright, profile: Path):
    """A headless Chromium on a new, throw-away profile directory (an empty browser cache)."""
    return playwright.chromium.launch_persistent_context(str(profile), executable_path=CHROMIUM, headless=True,
                                                         args=LAUNCH_ARGS, viewport={"width": WIDTH, "height": 2600})


def first_answer(page, url: str, answer: str = FIRST_ROW, with_map: bool = True, timeout_ms: int = 180_000) -> dict:
    """Open ``url``; seconds from navigation start until Streamlit's own page is attached
    (``shell``), the ``answer`` condition holds (``answer``: the first candidate row in the
    table), the map is drawn (``map``, when there is one) and the run has ended (``idle``)."""
    t0 = time.monotonic()
    page.goto(url, wait_until="commit")
    page.locator("[data-testid='stApp']").first.wait_for(state="attached", timeout=timeout_ms)
    out = {"shell": time.monotonic() - t0}
    page.wait_for_function(answer, timeout=timeout_ms, polling="raf")
    out["answer"] = time.monotonic() - t0
    if with_map:
        page.wait_for_function(MAP_DRAWN, timeout=timeout_ms, polling="raf")
        out["map"] = time.monotonic() - t0
    page.get_by_text(re.compile("This run:")).first.wait_for(timeout=timeout_ms)
    page.wait_for_function(IDLE, timeout=timeout_ms)
    out["idle"] = time.monotonic() - t0
    out["run"] = page.evaluate(RUN_LINE)
    return out


def timed_rerun(page, action, timeout_ms: int = 120_000) -> tuple[float, str]:
    """Seconds from ``action`` until the page has run again and is idle (its "This run:"
    line has changed), and that line."""
    before = page.evaluate(RUN_LINE)
    t0 = time.monotonic()
    action()
    page.wait_for_function(f"(before) => ({RUN_LINE})() !== '' && ({RUN_LINE})() !== before",
                           arg=before, timeout=timeout_ms, polling="raf")
    page.wait_for_function(IDLE, timeout=timeout_ms, polling="raf")
    return time.monotonic() - t0, page.evaluate(RUN_LINE)


def type_value(page, label: str, value: str):
    field = page.get_by_label(re.compile("^" + re.escape(label)))
    return lambda: (field.fill(value), field.press("Enter"))


#: the later minimum yields typed (MPa) and the pause before each (s): see :func:`changes`
LATER_YIELDS, PAUSE_S = ("950", "1050", "900"), 0.6


def changes(page, yield_value: str = "1000", diameter: str = "41") -> dict:
    """The timed changes on an open page that shows the example (SI units), in this order:
    target change (the first on the page), diameter change, a re-run with every result cached,
    three later target changes (their median), unit switch.
    Each value: (seconds, the "This run:" line after it)."""
    out = {"target change": timed_rerun(page, type_value(page, "Min yield (MPa)", yield_value)),
           "diameter change": timed_rerun(page, type_value(page, "Diameter (mm)", diameter))}
    switch = page.get_by_text("All columns", exact=True)
    timed_rerun(page, switch.click)
    out["cached re-run"] = timed_rerun(page, switch.click)
    # later changes of target (a designer tries several), each after a pause that lets the cache
    # write of the step before finish (written half a second behind the answer): the median of three
    later = []
    for value in LATER_YIELDS:
        time.sleep(PAUSE_S)
        later.append(timed_rerun(page, type_value(page, "Min yield (MPa)", value)))
    out["later target changes"] = sorted(later, key=lambda r: r[0])[len(later) // 2]
    out["unit switch"] = timed_rerun(page, lambda: page.get_by_text("US customary", exact=True).click())
    page.get_by_label(re.compile(r"^Diameter \(in\)")).wait_for(state="visible", timeout=60_000)
    return out


def run_seconds(line: str, what: str) -> float | None:
    """A figure of the page's "This run:" line (``page``: the script; ``library``: the
    library's part), seconds; None when absent (the floor apps)."""
    m = re.search(rf"\b{what} (\d+(?:\.\d+)?) s", line)
    return float(m.group(1)) if m else None


# ----------------------------------------------------------------------------- one round

def measure_floors(playwright, work: Path, tag: str = "") -> dict:
    """The bare app's and the same-widgets app's first answer and re-runs."""
    env = dict(os.environ, SELECTOR_BENCH_FLOOR=str(work))
    res = {}
    with serve(work / "empty_app.py", env, cwd=ROOT) as (url, _):
        browser = launch(playwright, work / f"profile_bare{tag}")
        try:
            page = browser.new_page()
            first = first_answer(page, url, answer=FIRST_ROW, with_map=False)
            res["bare"] = {"first answer": first["answer"], "shell": first["shell"],
                            "target change": timed_rerun(page, type_value(page, "Min yield (MPa)", "1000"))[0]}
            res["bare"]["second visit"] = first_answer(browser.new_page(), url, with_map=False)["answer"]
        finally:
            browser.close()
    with serve(work / "widgets_app.py", env, cwd=ROOT) as (url, _):
        browser = launch(playwright, work / f"profile_widgets{tag}")
        try:
            page = browser.new_page()
            first = first_answer(page, url)
            ch = changes(page)
            res["widgets"] = {"first answer": first["answer"], "shell": first["shell"], "map": first["map"],
                              **{k: v[0] for k, v in ch.items()}}
            res["widgets"]["second visit"] = first_answer(browser.new_page(), url)["answer"]
        finally:
            browser.close()
    return res


def measure_page(playwright, work: Path, env: dict, tag: str = "", root: Path = ROOT, diameter: str = "41") -> dict:
    """The page served by ``serve.py`` (warm start) from the tree at ``root``: first answer,
    second visit, changes (the diameter changed to ``diameter`` mm)."""
    with serve("serve.py", env, cwd=root, root=root) as (url, start_s):
        browser = launch(playwright, work / f"profile_page{tag}{root.name}")
        try:
            page = browser.new_page()
            first = first_answer(page, url)
            ch = changes(page, diameter=diameter)
            second = first_answer(browser.new_page(), url)
        finally:
            browser.close()
    out = {"first answer": (first["answer"], first["run"]), "second visit": (second["answer"], second["run"]),
           **ch}
    return {"start": start_s, "shell": first["shell"], "map": first["map"], "idle": first["idle"],
            **{k: {"browser": s, "script": run_seconds(line, "page"), "library": run_seconds(line, "library")}
               for k, (s, line) in out.items()}}


def prepare_work(work: Path) -> int:
    (work / "empty_app.py").write_text(EMPTY_APP)
    (work / "widgets_app.py").write_text(WIDGETS_APP)
    return write_floor_data(work)


# ----------------------------------------------------------------------------- the table

STEPS = ("first answer", "second visit", "target change", "later target changes", "diameter change", "unit switch",
         "cached re-run")


def _median(values):
    values = [v for v in values if v is not None]
    return statistics.median(values) if values else None


def table(pages: list[dict], floors: list[dict]) -> str:
    """The printed table: per step the page's browser time, the two floors, the ratio to
    the same-widgets floor, the script's and the library's seconds (medians over rounds)."""
    def f(v, fmt="{:.2f}"):
        return "—" if v is None else fmt.format(v)

    lines = [f"{'step':<20} {'page s':>7} {'widgets floor':>13} {'ratio':>6} {'bare floor':>10} "
             f"{'script s':>8} {'library s':>9} {'browser-script':>14} {'target':>7}"]
    for step in STEPS:
        b = _median([p[step]["browser"] for p in pages])
        s = _median([p[step]["script"] for p in pages])
        lib = _median([p[step]["library"] for p in pages])
        wf = _median([fl["widgets"].get(step) for fl in floors])
        ef = _median([fl["bare"].get(step if step in ("first answer", "second visit") else "target change")
                      for fl in floors])
        target = TARGETS.get(step)
        lines.append(f"{step:<20} {f(b):>7} {f(wf):>13} {f(b / wf if b and wf else None, '{:.2f}×'):>6} "
                     f"{f(ef):>10} {f(s):>8} {f(lib):>9} {f(b - s if b is not None and s is not None else None):>14} "
                     f"{'≤ ' + format(target, 'g') + ' s' if target else '—':>7}")
    lines.append(f"(first answer: navigation start to the first candidate row; map drawn at "
                 f"{_median([p['map'] for p in pages]):.2f} s (floor {_median([fl['widgets']['map'] for fl in floors]):.2f} s), "
                 f"Streamlit's own page at {_median([p['shell'] for p in pages]):.2f} s; bare floor of a change: "
                 f"its re-run after a number input; server start with the warm start "
                 f"{_median([p['start'] for p in pages]):.1f} s)")
    return "\n".join(lines)


def machine() -> str:
    return (f"{os.cpu_count()} cores, load average {os.getloadavg()[0]:.1f}, "
            f"{time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")


def checkout(rev: str, folder: Path) -> Path:
    """The project's files at git revision ``rev`` in ``folder`` (``git archive``)."""
    folder.mkdir()
    archive = subprocess.run(["git", "archive", rev], cwd=ROOT, check=True, capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(folder)], input=archive, check=True)
    return folder


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--rounds", type=int, default=3, help="rounds; medians are printed (default 3)")
    ap.add_argument("--compare", metavar="REV", help="also measure the page of git revision REV in each round "
                    "(a second table; the same floors)")
    args = ap.parse_args(argv)
    from playwright.sync_api import sync_playwright

    if not Path(CHROMIUM).exists():
        raise SystemExit(f"{CHROMIUM} not found: install Debian's chromium package")
    with tempfile.TemporaryDirectory(prefix="bench-page-") as tmp:
        work = Path(tmp)
        env = dict(os.environ, SELECTOR_CACHE_DIR=str(work / "cache"))
        os.environ["SELECTOR_CACHE_DIR"] = env["SELECTOR_CACHE_DIR"]
        n = prepare_work(work)
        other = checkout(args.compare, work / "compare") if args.compare else None
        print(f"page benchmark: {machine()}; the example has {n} candidates", flush=True)
        pages, floors, others = [], [], []
        with sync_playwright() as p:
            for i in range(args.rounds):
                floors.append(measure_floors(p, work, tag=str(i)))
                # a new section at every round: the table cache on disk holds the sections measured before
                pages.append(measure_page(p, work, env, tag=str(i), diameter=str(41 + 2 * i)))
                if other is not None:
                    others.append(measure_page(p, work, env, tag=str(i), root=other, diameter=str(42 + 2 * i)))
                print(f"round {i + 1}: page first answer {pages[-1]['first answer']['browser']:.2f} s, "
                      f"floor {floors[-1]['widgets']['first answer']:.2f} s", flush=True)
        print(f"\nmedians of {args.rounds} round(s); {machine()}")
        print(table(pages, floors))
        if others:
            print(f"\nthe page at {args.compare}, in the same rounds:")
            print(table(others, floors))
    return 0


if __name__ == "__main__":
    sys.exit(main())
