"""The search package holds no physics formula: every formula it evaluates is the design kernel's or a physics
function's (``specgen.design.kernel``, ``specgen.physics``), so the engine and the search cannot drift apart.

The check reads the search's source: a call or read of a mathematical function or constant of ``math`` or
``numpy`` (sqrt, exp, log, hypot, pi, trigonometry, ...) or the power operator is a formula written in place.
A short allow-list names the uses that are not physics."""

from __future__ import annotations

import ast
from pathlib import Path

SEARCH = Path(__file__).resolve().parent.parent / "specgen" / "search"
MODULES = {"math", "np", "numpy"}
FORMULA_NAMES = {
    "sqrt", "cbrt", "exp", "exp2", "expm1", "log", "log2", "log10", "log1p", "hypot", "pi", "e", "power", "pow",
    "square", "sin", "cos", "tan", "arcsin", "arccos", "arctan", "arctan2", "asin", "acos", "atan", "atan2",
    "sinh", "cosh", "tanh", "radians", "degrees",
}
# (module, function): why its mathematics is not a physics formula
ALLOWED = {
    ("rows.py", "_thin"): "the n-th root of a row budget spreads options evenly over n windings (bookkeeping)",
}


def formulas(source: str, module: str = "x.py") -> list[str]:
    """'function:line what' of every mathematical function, constant or power operator in ``source`` outside
    the allow-list."""
    found: list[str] = []

    def visit(node: ast.AST, func: str) -> None:
        for child in ast.iter_child_nodes(node):
            name = child.name if isinstance(child, (ast.FunctionDef, ast.AsyncFunctionDef)) else func
            what = None
            if (isinstance(child, ast.Attribute) and isinstance(child.value, ast.Name)
                    and child.value.id in MODULES and child.attr in FORMULA_NAMES):
                what = f"{child.value.id}.{child.attr}"
            elif isinstance(child, ast.BinOp) and isinstance(child.op, ast.Pow):
                what = "** (power)"
            elif isinstance(child, ast.ImportFrom) and (child.module or "").split(".")[0] in ("math", "numpy"):
                names = [a.name for a in child.names if a.name in FORMULA_NAMES]
                what = f"from {child.module} import {', '.join(names)}" if names else None
            if what and (module, name) not in ALLOWED:
                found.append(f"{module}:{getattr(child, 'lineno', '?')} in {name}: {what}")
            visit(child, name)

    visit(ast.parse(source), "<module>")
    return found


def test_no_formula_in_the_search_package():
    found = [f for p in sorted(SEARCH.glob("*.py")) for f in formulas(p.read_text(encoding="utf-8"), p.name)]
    assert not found, ("formulas written in the search (move each into specgen.design.kernel or specgen.physics and "
                       "call it from the search and the engine alike):\n" + "\n".join(found))


def test_the_formula_check_sees_each_form_and_honours_the_allow_list():
    assert formulas("import numpy as np\ndef f(a):\n    return np.hypot(a, 1.0)\n")
    assert formulas("import math\ndef f(a):\n    return 2 * math.pi * a\n")
    assert formulas("def f(a, b):\n    return (a / b) ** 0.5\n")
    assert formulas("from math import sqrt\n")
    assert formulas("def f(a):\n    return a.sum() / len(a)\n") == []
    assert formulas("import numpy as np\ndef f(a):\n    return np.maximum(a, 0.0)\n") == []
    assert formulas("def _thin(c, n):\n    return c ** (1.0 / n)\n", "rows.py") == []
    assert formulas("def other(c, n):\n    return c ** (1.0 / n)\n", "rows.py")
