"""Write the frozen Design JSON of every demo part and test spec (tests/golden/*.json).

Run only in a commit that changes a model on purpose, and say in its message which model and why:
tests/test_golden.py compares every number the engine computes against these files to 1e-9 relative.
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests"))

from golden_parts import GOLDEN_DIR, golden_designs  # noqa: E402


def main() -> None:
    GOLDEN_DIR.mkdir(parents=True, exist_ok=True)
    for name, data in golden_designs():
        (GOLDEN_DIR / f"{name}.json").write_text(json.dumps(data, indent=1, sort_keys=True) + "\n")
        print(f"wrote {name}.json")


if __name__ == "__main__":
    main()
