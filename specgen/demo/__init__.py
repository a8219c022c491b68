"""The shipped demo shop (Brindle Hollow Coil Works): its part specs, requirements and the demo run
(``specgen.demo.run``)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

from ..api import demo_specs

__all__ = ["demo_specs", "run_demo"]


def run_demo(out: Path, catalog: Any = None, echo: Any = print) -> dict:
    """Run the whole job on the demo shop into ``out`` (see ``specgen.demo.run``)."""
    from .run import run_demo as _run

    return _run(out, catalog, echo)
