"""No module of specgen imports itself back through others at import time (module-level imports).

Imports inside functions (lazy imports, e.g. of WeasyPrint) and under ``if TYPE_CHECKING:`` are left out:
they do not run when the module loads. A cycle among module-level imports makes the import order decide
which names exist, so a refactor can break a command that never touched the code it broke. The cycle
search is Tarjan's strongly connected components (Tarjan, SIAM J. Comput. 1(2), 1972); the check below
uses Python's own ``graphlib`` (standard library) to confirm that the graph, once cycles are out, sorts.
"""

from __future__ import annotations

import ast
import graphlib
from pathlib import Path

import pytest

import specgen

ROOT = Path(specgen.__file__).resolve().parent


def _module_name(path: Path) -> str:
    rel = path.relative_to(ROOT.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts.pop()
    return ".".join(parts)


def _modules() -> dict[str, Path]:
    return {_module_name(p): p for p in ROOT.rglob("*.py")}


def _is_type_checking(test: ast.expr) -> bool:
    return (isinstance(test, ast.Name) and test.id == "TYPE_CHECKING") or (
        isinstance(test, ast.Attribute) and test.attr == "TYPE_CHECKING")


def _top_level_imports(tree: ast.Module) -> list[ast.Import | ast.ImportFrom]:
    """Import statements that run when the module loads: the module body, and inside module-level
    if/try/with blocks, but not in functions, classes' methods or ``if TYPE_CHECKING:``."""
    out: list[ast.Import | ast.ImportFrom] = []

    def walk(body: list[ast.stmt]) -> None:
        for node in body:
            if isinstance(node, (ast.Import, ast.ImportFrom)):
                out.append(node)
            elif isinstance(node, ast.If):
                if not _is_type_checking(node.test):
                    walk(node.body)
                walk(node.orelse)
            elif isinstance(node, ast.Try):
                walk(node.body)
                for h in node.handlers:
                    walk(h.body)
                walk(node.orelse)
                walk(node.finalbody)
            elif isinstance(node, (ast.With, ast.ClassDef)):
                walk(node.body)
    walk(tree.body)
    return out


def import_graph() -> dict[str, set[str]]:
    """module -> the specgen modules it imports at load time."""
    mods = _modules()
    graph: dict[str, set[str]] = {m: set() for m in mods}
    for name, path in mods.items():
        package = name if path.name == "__init__.py" else name.rpartition(".")[0]
        for node in _top_level_imports(ast.parse(path.read_text(encoding="utf-8"))):
            targets: list[str] = []
            if isinstance(node, ast.Import):
                targets = [a.name for a in node.names]
            else:
                if node.level:
                    base_parts = package.split(".")
                    base_parts = base_parts[:len(base_parts) - (node.level - 1)]
                    base = ".".join(base_parts + ([node.module] if node.module else []))
                else:
                    base = node.module or ""
                targets = [base] + [f"{base}.{a.name}" for a in node.names]
            for t in targets:
                if t in mods and t != name:
                    graph[name].add(t)
    return graph


def cycles(graph: dict[str, set[str]]) -> list[list[str]]:
    """Strongly connected components with more than one module (Tarjan's algorithm)."""
    index: dict[str, int] = {}
    low: dict[str, int] = {}
    stack: list[str] = []
    on: set[str] = set()
    out: list[list[str]] = []
    counter = [0]

    def strong(v: str) -> None:
        index[v] = low[v] = counter[0]
        counter[0] += 1
        stack.append(v)
        on.add(v)
        for w in sorted(graph[v]):
            if w not in index:
                strong(w)
                low[v] = min(low[v], low[w])
            elif w in on:
                low[v] = min(low[v], index[w])
        if low[v] == index[v]:
            comp = []
            while True:
                w = stack.pop()
                on.discard(w)
                comp.append(w)
                if w == v:
                    break
            if len(comp) > 1:
                out.append(sorted(comp))

    for v in sorted(graph):
        if v not in index:
            strong(v)
    return out


def test_the_walker_finds_a_planted_cycle():
    """The check must be able to fail: a two-module and a three-module cycle are found, a chain is not."""
    g = {"a": {"b"}, "b": {"a"}, "c": {"d"}, "d": {"e"}, "e": {"c"}, "f": {"a"}}
    assert sorted(cycles(g)) == [["a", "b"], ["c", "d", "e"]]
    assert cycles({"a": {"b"}, "b": {"c"}, "c": set()}) == []


def test_the_walker_reads_relative_and_type_checking_imports():
    tree = ast.parse("from typing import TYPE_CHECKING\nif TYPE_CHECKING:\n    from .x import y\n"
                     "from . import kernel\ndef f():\n    from .z import w\n")
    found = _top_level_imports(tree)
    assert [(n.module, n.level) for n in found if isinstance(n, ast.ImportFrom)] == [("typing", 0), (None, 1)]


def test_design_package_has_no_import_cycle():
    graph = import_graph()
    design = {m: {t for t in ts if t.startswith("specgen.design")} for m, ts in graph.items()
              if m.startswith("specgen.design")}
    assert cycles(design) == []
    # and it sorts: every design module can be loaded after the ones it needs
    list(graphlib.TopologicalSorter(design).static_order())


def test_specgen_has_no_import_cycle():
    found = cycles(import_graph())
    if found:
        pytest.fail("import cycles (module-level imports): " + "; ".join(" <-> ".join(c) for c in found))


def test_the_designs_readers_and_the_spec_parser_load_without_numpy():
    """Quick commands read a Design or parse a spec without the calculation: numpy (and the kernel) stay out
    until ``design()`` runs (design notes: imports; the measured cost is in ``make bench``)."""
    import subprocess
    import sys

    code = ("import sys; import specgen.api, specgen.report, specgen.design.result, specgen.design.spec; "
            "print(sorted(m for m in ('numpy', 'specgen.design.kernel') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60)
    assert out.returncode == 0, out.stderr
    assert out.stdout.strip() == "[]"
