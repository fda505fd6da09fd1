"""Security of the local page and of user files.

* The Streamlit page listens on the loopback interface only and caps the upload size
  (``.streamlit/config.toml``: ``[server] address``, ``maxUploadSize`` in MB; option
  names as documented in Streamlit's configuration reference).
* No code path executes or unpickles anything: the package and the page are scanned
  (as syntax trees, so comments and strings do not count) for ``eval``/``exec``/
  ``compile``, ``pickle``-like modules, ``allow_pickle=True``, ``read_pickle``,
  ``yaml.load`` and ``shell=True``.
"""
from __future__ import annotations

import ast
import tomllib
from pathlib import Path

import pytest

from selector.catalogue.loader import MAX_FILE_BYTES

ROOT = Path(__file__).resolve().parents[1]
CONFIG = ROOT / ".streamlit" / "config.toml"
SOURCES = sorted((ROOT / "selector").rglob("*.py")) + [p for p in (ROOT / "app.py",) if p.exists()]

FORBIDDEN_CALLS = {"eval", "exec", "compile", "__import__"}
FORBIDDEN_MODULES = {"pickle", "cPickle", "_pickle", "dill", "cloudpickle", "shelve", "marshal", "joblib"}
FORBIDDEN_ATTRS = {"read_pickle", "to_pickle", "loads_pickle"}


def _config() -> dict:
    assert CONFIG.exists(), f"{CONFIG.relative_to(ROOT)} is missing: the page must bind to 127.0.0.1 by default"
    return tomllib.loads(CONFIG.read_text(encoding="utf-8"))


def test_page_binds_to_loopback_by_default():
    server = _config().get("server", {})
    assert server.get("address") == "127.0.0.1", f"server.address is {server.get('address')!r}"


def test_page_caps_the_upload_size():
    server = _config().get("server", {})
    cap = server.get("maxUploadSize")
    assert isinstance(cap, int) and not isinstance(cap, bool), f"server.maxUploadSize is {cap!r}"
    # Streamlit's default is 200 MB; a user file is refused above MAX_FILE_BYTES by the loader, so
    # the page needs no more than a few MB (1 MB at least, so that a legitimate file gets through
    # to the loader's clear message).
    assert 1 <= cap <= 50, f"server.maxUploadSize = {cap} MB"
    assert cap * 1_000_000 >= MAX_FILE_BYTES or cap * 2**20 >= MAX_FILE_BYTES


def _findings(path: Path) -> list[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"), filename=str(path))
    rel = path.relative_to(ROOT)
    out = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Call):
            f = node.func
            name = f.id if isinstance(f, ast.Name) else f.attr if isinstance(f, ast.Attribute) else ""
            if isinstance(f, ast.Name) and name in FORBIDDEN_CALLS:
                out.append(f"{rel}:{node.lineno}: call of {name}()")
            if name in FORBIDDEN_ATTRS:
                out.append(f"{rel}:{node.lineno}: call of {name}()")
            if name == "load" and isinstance(f, ast.Attribute) and getattr(f.value, "id", "") == "yaml":
                out.append(f"{rel}:{node.lineno}: yaml.load (use yaml.safe_load)")
            for kw in node.keywords:
                if kw.arg in ("allow_pickle", "shell") and isinstance(kw.value, ast.Constant) and kw.value.value:
                    out.append(f"{rel}:{node.lineno}: {kw.arg}=True")
        elif isinstance(node, ast.Import):
            out += [f"{rel}:{node.lineno}: import {a.name}" for a in node.names
                    if a.name.split(".")[0] in FORBIDDEN_MODULES]
        elif isinstance(node, ast.ImportFrom):
            if (node.module or "").split(".")[0] in FORBIDDEN_MODULES:
                out.append(f"{rel}:{node.lineno}: from {node.module} import ...")
    return out


def test_sources_are_found():
    names = {p.relative_to(ROOT).as_posix() for p in SOURCES}
    assert {"selector/user_files.py", "selector/catalogue/loader.py", "selector/selection/cost.py"} <= names


@pytest.mark.parametrize("path", SOURCES, ids=lambda p: p.relative_to(ROOT).as_posix())
def test_nothing_is_executed_or_unpickled(path):
    found = _findings(path)
    assert not found, "\n".join(found)


def test_the_scan_catches_what_it_looks_for(tmp_path):
    # the scanner itself can fail: every forbidden form is caught, strings and comments are not
    bad = tmp_path / "bad.py"
    bad.write_text("import pickle\nfrom marshal import loads\nimport numpy as np\n"
                   "x = eval('1')\nexec('y = 1')\nnp.load('f.npy', allow_pickle=True)\n"
                   "import pandas as pd\npd.read_pickle('f')\nimport subprocess\n"
                   "subprocess.run('ls', shell=True)\n", encoding="utf-8")
    ok = tmp_path / "ok.py"
    ok.write_text("# eval(x) and pickle are only mentioned here\ns = 'exec(1)'\n"
                  "import json\njson.loads('{}')\n", encoding="utf-8")
    global ROOT
    old, ROOT = ROOT, tmp_path
    try:
        assert len(_findings(bad)) == 7
        assert _findings(ok) == []
    finally:
        ROOT = old
