"""Design and search messages print inductance and resistance through ``present.si`` / ``present.si_set`` (the one
formatter of SI prefixes), never a hand-scaled figure with its prefix written out ("{L * 1e6:.4g} µH").

Why: a hand-scaled figure keeps its prefix whatever the value (0.0004 µH, 12000 µH) and its own digits; the shop's
documents read figures the one way ``present`` writes them (SI prefixes in steps of 1000, BIPM SI Brochure, 9th
edition, section 3).
"""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent / "specgen"
PREFIXED = ("µH", "uH", "mH", "nH", "pH", "µΩ", "mΩ", "kΩ", "MΩ")


def _strings(path: Path) -> list[tuple[int, str]]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    docs = {id(n.body[0].value) for n in ast.walk(tree)
            if isinstance(n, (ast.Module, ast.FunctionDef, ast.AsyncFunctionDef, ast.ClassDef)) and n.body
            and isinstance(n.body[0], ast.Expr) and isinstance(n.body[0].value, ast.Constant)}
    return [(n.lineno, n.value) for n in ast.walk(tree)
            if isinstance(n, ast.Constant) and isinstance(n.value, str) and id(n) not in docs]


@pytest.mark.parametrize("package", ["design", "search"])
def test_no_prefixed_unit_written_out(package):
    bad = [f"{p.relative_to(ROOT)}:{line}: {text!r}" for p in sorted((ROOT / package).rglob("*.py"))
           for line, text in _strings(p) if any(u in text for u in PREFIXED)]
    assert not bad, "prefixed units written by hand (use present.si):\n" + "\n".join(bad)
