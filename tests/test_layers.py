"""The import graph of the package: layers import downwards only, and no module
imports another that imports it back (directly or through others).

Every module of ``selector/`` is read as a syntax tree (nothing is imported), and every
project import in it, at module level *and* inside functions, becomes an edge of the
graph.  The layers are those of the contributor guide (DEVELOPERS.md, "Layers"):

    base -> data -> models -> routes -> states -> rules -> selection -> design -> api -> views

A module may import from its own layer or any layer below; nothing may import upwards,
and no set of modules may import each other in a circle.  Outside ``selector/views/`` a
project import inside a function is allowed only where it avoids a real cost, and then
its line says so with a ``# lazy:`` comment.
"""
from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
PACKAGE = ROOT / "selector"

#: layer name -> module prefixes, lowest layer first (the most specific prefix wins)
LAYERS = (
    ("base", ("selector.errors", "selector.inputs")),
    ("data", ("selector.catalogue", "selector.cache")),
    ("models", ("selector.models",)),
    ("routes", ("selector.routes",)),
    ("states", ("selector.states",)),
    ("rules", ("selector.rules",)),
    ("selection", ("selector.selection",)),
    ("design", ("selector.design", "selector.validation", "selector.user_files")),
    ("api", ("selector",)),                        # selector/__init__.py: the lazy public names
    ("views", ("selector.views", "selector.__main__")),
)

# ---------------------------------------------------------------------------------------------
# Views allow-list: empty since the views rewrite (CLI package selector/views/cli/, one module
# per verb; page package selector/views/page/).  Each entry would be (importing module, imported
# module); nothing may be added here without a reason written beside it.
VIEWS_IN_FUNCTION_ALLOWED = frozenset()
#: circles allowed among views modules (each a set of module names): none
VIEWS_CIRCLES_ALLOWED = ()
# ---------------------------------------------------------------------------------------------


def layer_of(module: str, layers=LAYERS) -> int | None:
    """Index of the layer of ``module`` (longest matching prefix), or None."""
    best, best_len = None, -1
    for i, (_, prefixes) in enumerate(layers):
        for p in prefixes:
            if (module == p or module.startswith(p + ".")) and len(p) > best_len:
                best, best_len = i, len(p)
    return best


def modules(package_dir: Path) -> dict[str, tuple[Path, bool]]:
    """``{dotted name: (path, is_package)}`` of every module under ``package_dir``."""
    out = {}
    for path in sorted(package_dir.rglob("*.py")):
        parts = list(path.relative_to(package_dir.parent).with_suffix("").parts)
        is_pkg = parts[-1] == "__init__"
        if is_pkg:
            parts = parts[:-1]
        out[".".join(parts)] = (path, is_pkg)
    return out


class Edge:
    __slots__ = ("source", "target", "line", "in_function", "lazy_comment")

    def __init__(self, source, target, line, in_function, lazy_comment):
        self.source, self.target, self.line = source, target, line
        self.in_function, self.lazy_comment = in_function, lazy_comment

    def __repr__(self):
        where = "in a function" if self.in_function else "at module level"
        return f"{self.source} (line {self.line}, {where}) imports {self.target}"


def _resolve(current: str, is_pkg: bool, level: int, module: str | None) -> str:
    if not level:
        return module or ""
    base = current.split(".") if is_pkg else current.split(".")[:-1]
    base = base[: len(base) - (level - 1)]
    return ".".join(base + ([module] if module else []))


def import_edges(package_dir: Path) -> list[Edge]:
    """Every import of one module of the package by another, from the syntax trees."""
    mods = modules(package_dir)
    root = package_dir.name
    edges = []
    for name, (path, is_pkg) in mods.items():
        text = path.read_text(encoding="utf-8")
        lines = text.splitlines()
        tree = ast.parse(text, str(path))

        def visit(node, in_function):
            for child in ast.iter_child_nodes(node):
                inner = in_function or isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef, ast.Lambda))
                targets = []
                if isinstance(child, ast.Import):
                    targets = [a.name for a in child.names]
                elif isinstance(child, ast.ImportFrom):
                    base = _resolve(name, is_pkg, child.level, child.module)
                    # ``from pkg import sub`` imports the submodule; ``from mod import name`` the module
                    targets = [f"{base}.{a.name}" if f"{base}.{a.name}" in mods else base for a in child.names]
                for t in dict.fromkeys(targets):
                    if (t == root or t.startswith(root + ".")) and t != name:
                        src_line = lines[child.lineno - 1]
                        edges.append(Edge(name, t, child.lineno, in_function, "# lazy:" in src_line))
                visit(child, inner)

        visit(tree, False)
    return edges


def circles(edges: list[Edge]) -> list[set[str]]:
    """The strongly connected components of more than one module (Tarjan's algorithm)."""
    graph: dict[str, set[str]] = {}
    for e in edges:
        graph.setdefault(e.source, set()).add(e.target)
        graph.setdefault(e.target, set())
    index, low, stack, on_stack, out = {}, {}, [], set(), []
    counter = [0]

    def strong(v):
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on_stack.add(v)
        for w in sorted(graph[v]):
            if w not in index:
                strong(w)
                low[v] = min(low[v], low[w])
            elif w in on_stack:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = set()
            while True:
                w = stack.pop()
                on_stack.discard(w)
                comp.add(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(comp)

    for v in sorted(graph):
        if v not in index:
            strong(v)
    return out


def upward(edges: list[Edge], layers=LAYERS) -> list[Edge]:
    """The edges from a lower layer into a higher one."""
    return [e for e in edges if layer_of(e.source, layers) < layer_of(e.target, layers)]


EDGES = import_edges(PACKAGE)


def test_every_module_has_a_layer():
    missing = [m for m in modules(PACKAGE) if layer_of(m) is None]
    assert not missing, f"place these modules in a layer (LAYERS here and DEVELOPERS.md): {missing}"


def test_the_graph_sees_the_package():
    # the walk reads the real package: a few imports every reader of the code can see
    seen = {(e.source, e.target) for e in EDGES}
    assert ("selector.selection.engine", "selector.rules.cautions") in seen
    assert ("selector.routes.evaluate", "selector.catalogue.grades") in seen
    assert len(modules(PACKAGE)) > 60


def test_no_import_goes_up_a_layer():
    bad = [f"{e} ({LAYERS[layer_of(e.source)][0]} -> {LAYERS[layer_of(e.target)][0]})" for e in upward(EDGES)]
    assert not bad, "imports from a lower layer into a higher one:\n" + "\n".join(bad)


def test_no_circle_of_modules():
    bad = [sorted(c) for c in circles(EDGES) if frozenset(c) not in VIEWS_CIRCLES_ALLOWED]
    assert not bad, f"modules that import each other in a circle: {bad}"


def test_no_project_import_inside_a_function_outside_views():
    bad = [repr(e) for e in EDGES if e.in_function and not e.lazy_comment
           and layer_of(e.source) != layer_of("selector.views")]
    assert not bad, ("move these imports to module level, or say on the line why they must wait "
                     "(`# lazy: <the cost avoided>`):\n" + "\n".join(bad))


def test_views_in_function_imports_are_only_the_listed_ones():
    views = layer_of("selector.views")
    new = sorted({(e.source, e.target) for e in EDGES
                  if e.in_function and not e.lazy_comment and layer_of(e.source) == views}
                 - VIEWS_IN_FUNCTION_ALLOWED)
    assert not new, f"new in-function imports in views (import at module level instead): {new}"


def test_the_allow_lists_hold_views_only():
    views = layer_of("selector.views")
    assert all(layer_of(src) == views for src, _ in VIEWS_IN_FUNCTION_ALLOWED)
    assert all(layer_of(m) == views for c in VIEWS_CIRCLES_ALLOWED for m in c)


# --------------------------------------------------------------------------- the checker can fail
def _write(root: Path, files: dict[str, str]) -> Path:
    for rel, text in files.items():
        p = root / rel
        p.parent.mkdir(parents=True, exist_ok=True)
        p.write_text(text, encoding="utf-8")
    return root / "pkg"


TOY_LAYERS = (("low", ("pkg.low",)), ("high", ("pkg.high",)), ("top", ("pkg",)))


def test_the_checker_finds_a_circle_through_a_function_import(tmp_path):
    pkg = _write(tmp_path, {
        "pkg/__init__.py": "",
        "pkg/low/__init__.py": "",
        "pkg/low/a.py": "from . import b\n",
        "pkg/low/b.py": "def f():\n    from .c import x\n    return x\n",
        "pkg/low/c.py": "import pkg.low.a\nx = 1\n",
    })
    edges = import_edges(pkg)
    assert circles(edges) == [{"pkg.low.a", "pkg.low.b", "pkg.low.c"}]
    assert [(e.source, e.target, e.in_function) for e in edges if e.source == "pkg.low.b"] == \
        [("pkg.low.b", "pkg.low.c", True)]


def test_the_checker_finds_an_upward_import(tmp_path):
    pkg = _write(tmp_path, {
        "pkg/__init__.py": "",
        "pkg/low/__init__.py": "",
        "pkg/low/m.py": "def f():\n    from ..high.n import g  # lazy: for the test\n    return g\n",
        "pkg/high/__init__.py": "",
        "pkg/high/n.py": "from ..low import m\ndef g():\n    return m\n",
    })
    edges = import_edges(pkg)
    up = upward(edges, TOY_LAYERS)
    assert [(e.source, e.target, e.lazy_comment) for e in up] == [("pkg.low.m", "pkg.high.n", True)]
    assert circles(edges) == [{"pkg.low.m", "pkg.high.n"}]


@pytest.mark.parametrize("module, layer", [
    ("selector.errors", "base"), ("selector.catalogue.supply", "data"), ("selector.rules.cautions", "rules"),
    ("selector.user_files", "design"), ("selector", "api"), ("selector.views.cli", "views"),
])
def test_layer_names(module, layer):
    assert LAYERS[layer_of(module)][0] == layer
