"""Code-size limits for specgen/ (the contributor guide's rule): no module over 800 lines, and no
function over 80 lines unless a ``# long:`` comment on its def line, or on the line just above its
decorators and def, says why it is written in one piece."""

from __future__ import annotations

import ast
from pathlib import Path

PACKAGE = Path(__file__).resolve().parent.parent / "specgen"
MAX_FILE_LINES = 800
MAX_FUNCTION_LINES = 80
REASON = "# long:"
# modules over the limit today, each with the work that brings it under; the test fails once one is
# under the limit, so the entry goes with the fix (the list only shrinks; a deleted module may stay listed)
OVER_THE_LIMIT = {
}


def long_functions(source: str, max_lines: int = MAX_FUNCTION_LINES) -> list[tuple[str, int, int]]:
    """(name, first line, length) of every function longer than ``max_lines`` without a written reason."""
    lines = source.splitlines()
    out = []
    for node in ast.walk(ast.parse(source)):
        if not isinstance(node, (ast.FunctionDef, ast.AsyncFunctionDef)):
            continue
        first = min([node.lineno] + [d.lineno for d in node.decorator_list])
        length = (node.end_lineno or node.lineno) - first + 1
        if length <= max_lines:
            continue
        marks = [lines[node.lineno - 1]] + ([lines[first - 2]] if first >= 2 else [])
        if not any(REASON in m for m in marks):
            out.append((node.name, node.lineno, length))
    return out


def modules() -> list[Path]:
    return sorted(PACKAGE.rglob("*.py"))


def test_no_module_over_the_limit():
    sizes = {p.relative_to(PACKAGE.parent).as_posix(): len(p.read_text(encoding="utf-8").splitlines())
             for p in modules()}
    big = [f"{name}: {n} lines" for name, n in sizes.items() if n > MAX_FILE_LINES and name not in OVER_THE_LIMIT]
    assert not big, f"modules over {MAX_FILE_LINES} lines (split them):\n" + "\n".join(big)
    fixed = [name for name in OVER_THE_LIMIT if name in sizes and sizes[name] <= MAX_FILE_LINES]
    assert not fixed, f"now within the limit: take them off OVER_THE_LIMIT: {fixed}"


def test_no_long_function_without_a_reason():
    replaced = {name for name, why in OVER_THE_LIMIT.items() if why.startswith("being replaced")}
    found = [f"{p.relative_to(PACKAGE.parent)}:{line} {name} ({n} lines)"
             for p in modules() if p.relative_to(PACKAGE.parent).as_posix() not in replaced
             for name, line, n in long_functions(p.read_text(encoding="utf-8"))]
    assert not found, (f"functions over {MAX_FUNCTION_LINES} lines without a '{REASON} why' comment on the def "
                       "line or the line above:\n" + "\n".join(found))


def test_the_checker_finds_a_long_function_and_accepts_a_reason():
    body = "\n".join(f"    x{i} = {i}" for i in range(90))
    assert [n for n, _, _ in long_functions(f"def f():\n{body}\n")] == ["f"]
    assert long_functions(f"# long: one table, row by row\ndef f():\n{body}\n") == []
    assert long_functions(f"def f():  # long: one table, row by row\n{body}\n") == []
    assert long_functions(f"def f():\n{body[:200]}\n") == []


# private names still read across modules, each with where it should go; the list only shrinks
PRIVATE_READS = {
    ("specgen/loading.py", "_units._describe"): "a public unit description in units",
}


def private_reads(source: str) -> set[str]:
    """``module._name`` reads and ``from module import _name`` imports of specgen modules in ``source``."""
    tree = ast.parse(source)
    modules_bound: set[str] = set()
    found: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and (node.level > 0 or (node.module or "").startswith("specgen")):
            for a in node.names:
                if a.name.startswith("_") and not a.name.startswith("__"):
                    found.add(f"{node.module}.{a.name}")
                else:
                    modules_bound.add(a.asname or a.name)
        elif isinstance(node, ast.Import):
            modules_bound.update(a.asname or a.name for a in node.names if a.name.startswith("specgen"))
    for node in ast.walk(tree):
        if (isinstance(node, ast.Attribute) and isinstance(node.value, ast.Name) and node.value.id in modules_bound
                and node.attr.startswith("_") and not node.attr.startswith("__")):
            found.add(f"{node.value.id}.{node.attr}")
    return found


def test_no_private_name_is_read_across_modules():
    reads = {(p.relative_to(PACKAGE.parent).as_posix(), name) for p in modules()
             for name in private_reads(p.read_text(encoding="utf-8"))}
    new = sorted(reads - set(PRIVATE_READS))
    assert not new, "private names read from another module (make them public or move the code):\n" + "\n".join(
        f"{f}: {n}" for f, n in new)
    gone = sorted(set(PRIVATE_READS) - reads)
    assert not gone, f"no longer read: take them off PRIVATE_READS: {gone}"


def test_the_private_read_check_sees_both_forms():
    assert private_reads("from . import kernel as K\nK._x(1)\nK.y(2)\n") == {"K._x"}
    assert private_reads("from .spec import _parse, load\n") == {"spec._parse"}
    assert private_reads("import os\nos._exit(0)\nx._y\n") == set()
