"""The command-line package (selector.views.cli): the parser, the exit codes, the entry
points, and the layout (one module per verb, no private imports between them, no circle)."""
import ast
import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from selector.views import cli
from cli_runner import run

PACKAGE = Path(cli.__file__).parent
OLD_MODULES = ("cli.py", "cli_more.py", "cli_design.py", "cli_batch.py", "cli_validate.py")


def test_one_module_per_verb_and_every_verb_registered():
    names = [v.NAME for v in cli.VERBS]
    assert names == ["evaluate", "grades", "select", "alternatives", "pin", "sweep", "validate", "batch"]
    for v in cli.VERBS:
        assert Path(v.__file__).stem == v.NAME and callable(v.run) and callable(v.add_command)
    sub = next(a for a in cli.build_parser()._actions if a.dest == "command")
    assert list(sub.choices) == names
    for old in OLD_MODULES:
        assert not (PACKAGE.parent / old).exists(), old


def _imports(path):
    """(module, names) of every ``from .x import a, b`` in a module of the package."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    return [(n.module or "", [a.name for a in n.names], n.level) for n in ast.walk(tree)
            if isinstance(n, ast.ImportFrom)]


def test_no_private_names_imported_and_no_circle():
    graph = {}
    for path in PACKAGE.glob("*.py"):
        deps = set()
        for module, names, level in _imports(path):
            assert not any(n.startswith("_") and n != "__future__" for n in names), (path.name, names)
            if level == 1:                      # a sibling in the package
                deps.update([module] if module else names)
        graph[path.stem] = deps - {""}
    # nothing imports the package's __init__, so every edge is between verb/helper modules: a
    # depth-first walk finds any circle
    state = {}

    def visit(node, trail):
        assert state.get(node) != "open", " -> ".join(trail + [node])
        if state.get(node) == "done":
            return
        state[node] = "open"
        for nxt in graph.get(node, ()):
            if nxt in graph and nxt != "__init__":
                visit(nxt, trail + [node])
        state[node] = "done"

    for node in graph:
        visit(node, [])
    assert "__init__" not in set().union(*[d for k, d in graph.items() if k != "__init__"])


def test_help_and_usage_errors_exit_2_in_one_line():
    code, out, _ = run("--help")
    assert code == 0 and "usage" in out
    for argv in (["nosuchverb"], ["select", "--units", "metric"], ["select", "--hardness", "HRB"], []):
        code, out, err = run(*argv)
        assert code == 2 and len(err.strip().splitlines()) == 1 and err.startswith("error: "), argv
    code, _, err = run("evaluate", "nosuchgrade", "anneal")
    assert code == 2 and "nearest" in err


def test_bad_step_names_field_and_allowed():
    code, _, err = run("evaluate", "4140", "harden quench=honey")
    assert code == 2 and "quench" in err and "allowed" in err


def test_module_entry_point_and_console_script():
    text = (Path(__file__).resolve().parents[1] / "pyproject.toml").read_text(encoding="utf-8")
    assert 'selector = "selector.views.cli:main"' in text           # [project.scripts]: the package's main
    r = subprocess.run([sys.executable, "-m", "selector", "grades", "4140", "--json"], capture_output=True,
                       text=True, timeout=120)
    assert r.returncode == 0 and json.loads(r.stdout)["id"] == "4140"
    exe = shutil.which("selector")
    if exe is None:
        pytest.skip("console script not installed (run pip install -e .)")
    r = subprocess.run([exe, "grades", "G41400", "--json"], capture_output=True, text=True, timeout=120)
    assert r.returncode == 0 and json.loads(r.stdout)["id"] == "4140"


def test_grades_lists_the_catalogue():
    code, out, _ = run("grades")
    assert code == 0 and "4140" in out and "alloy_steel" in out
