"""The parts whose whole Design is frozen in tests/golden (the demo parts and the test specs)."""

from __future__ import annotations

from pathlib import Path

from specgen.api import demo_specs, design_file

HERE = Path(__file__).resolve().parent
GOLDEN_DIR = HERE / "golden"
CATALOG = HERE.parent / "catalog"


def golden_paths() -> list[Path]:
    return list(demo_specs()) + sorted((HERE / "specs").glob("*.yaml"))


def golden_designs():
    """(name, Design.to_dict()) for each frozen part, fingerprint left out (it covers text, not physics)."""
    for path in golden_paths():
        data = design_file(path, CATALOG).to_dict()
        data.pop("fingerprint", None)
        yield path.stem, data
