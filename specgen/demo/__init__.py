"""The shipped demo shop (Brindle Hollow Coil Works): its part specs and the demo run.

``run_demo`` runs the whole job on them: every design (text + JSON), and the documents that the
later stages of the job produce (work orders, quotes, a change summary), into one folder.
"""

from __future__ import annotations

import json
from pathlib import Path

from ..api import demo_specs, run_design
from ..atomic import write_atomic
from ..catalog.loader import load_catalog
from ..design.spec import load_spec


def run_demo(out: Path, catalog=None, echo=print) -> dict:
    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    cat = load_catalog(catalog)
    from ..report import design_report

    designs = {}
    for path in demo_specs():
        spec = load_spec(path)
        d = run_design(spec, cat)
        designs[spec.part] = (path, spec, d)
        write_atomic(out / f"{spec.part}.design.txt", design_report(d) + "\n")
        write_atomic(out / f"{spec.part}.design.json", json.dumps(d.to_dict(), indent=2, ensure_ascii=False) + "\n")
        fails = len(d.failed)
        warns = len(d.warnings)
        echo(f"{spec.part:8} {d.title[:52]:52}  {'FAIL' if fails else 'ok':4}  "
             f"{warns} warning(s)  hot spot {d.hot_spot_c:.0f} °C")
    echo(f"designs written to {out}/")
    return designs
