"""Every number the engine computes for the demo parts and the test specs, frozen.

A refactor must leave each to 1e-9 relative. Only a commit that changes a model on purpose may
re-freeze them (`python tools/freeze_designs.py`), and its message says which model and why.
"""

from __future__ import annotations

import json
import math

import pytest
from golden_parts import GOLDEN_DIR, golden_designs

REL = 1e-9


def _compare(path: str, want, got, problems: list) -> None:
    if isinstance(want, dict) and isinstance(got, dict):
        for k in sorted(set(want) | set(got)):
            if k not in got:
                problems.append(f"{path}.{k}: missing now")
            elif k not in want:
                problems.append(f"{path}.{k}: new key (re-freeze in a commit that says why)")
            else:
                _compare(f"{path}.{k}", want[k], got[k], problems)
    elif isinstance(want, list) and isinstance(got, list):
        if len(want) != len(got):
            problems.append(f"{path}: {len(want)} items frozen, {len(got)} now")
        for i, (a, b) in enumerate(zip(want, got)):
            _compare(f"{path}[{i}]", a, b, problems)
    elif isinstance(want, float) or isinstance(got, float):
        if isinstance(want, bool) or isinstance(got, bool) or want is None or got is None:
            if want != got:
                problems.append(f"{path}: {want!r} frozen, {got!r} now")
        elif not math.isclose(float(want), float(got), rel_tol=REL, abs_tol=1e-15):
            problems.append(f"{path}: {want!r} frozen, {got!r} now")
    elif want != got:
        problems.append(f"{path}: {want!r} frozen, {got!r} now")


@pytest.mark.parametrize("name,data", list(golden_designs()), ids=lambda x: x if isinstance(x, str) else "")
def test_design_unchanged(name, data):
    want = json.loads((GOLDEN_DIR / f"{name}.json").read_text())
    got = json.loads(json.dumps(data))     # the same float round trip as the frozen file
    problems: list = []
    _compare(name, want, got, problems)
    assert not problems, f"{len(problems)} differences, first: " + "; ".join(problems[:8])
