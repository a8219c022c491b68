"""The shipped demo shop (Brindle Hollow Coil Works): its part specs and the demo run.

``run_demo`` runs the whole job on them, into one folder:
  designs/     every part's calculation as the terminal shows it, and as JSON
  workorders/  a work order per part (PDF + HTML), numbered by a register in that folder
  quotes/      a quote per part at 100 / 500 / 2500 pieces
  changes/     a change summary between two revisions of BH-2210 held in a scratch git repository
  search/      the design search on the demo requirements (ranked candidates)
"""

from __future__ import annotations

import json
from decimal import ROUND_HALF_UP, Decimal
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

    echo("== designs")
    (out / "designs").mkdir(exist_ok=True)
    designs = {}
    for path in demo_specs():
        spec = load_spec(path)
        d = run_design(spec, cat)
        designs[spec.part] = (path, spec, d)
        write_atomic(out / "designs" / f"{spec.part}.txt", design_report(d) + "\n")
        write_atomic(out / "designs" / f"{spec.part}.json", json.dumps(d.to_dict(), indent=2, ensure_ascii=False) + "\n")
        echo(f"{spec.part:8} {d.title[:56]:56} {'FAIL' if d.failed else 'ok':4} {len(d.warnings)} warning(s), "
             f"hot spot {d.hot_spot_c:.0f} °C")

    echo("== work orders")
    from ..documents.workorder import demo_workorders

    (out / "workorders").mkdir(exist_ok=True)
    demo_workorders(designs, out / "workorders", out / "workorders" / "specgen-register.sqlite", echo, cat=cat)

    echo("== quotes")
    from ..documents.quote_doc import demo_quotes

    (out / "quotes").mkdir(exist_ok=True)
    demo_quotes(designs, cat, out / "quotes", echo)

    echo("== change summary")
    from ..documents.change_doc import demo_change_summary

    (out / "changes").mkdir(exist_ok=True)
    demo_change_summary(out / "changes", cat, echo)

    echo("== design search")
    from .. import search as lib

    (out / "search").mkdir(exist_ok=True)
    for req_path in sorted(Path(__file__).resolve().parent.glob("REQ-*.yaml")):
        req = lib.load_requirement(req_path)
        result = lib.search(req, cat, top=5, sort="cost", per_core=2, part=req.part)
        write_atomic(out / "search" / f"{req_path.stem}.txt", lib.result_text(result, cat.shop.currency) + "\n")
        write_atomic(out / "search" / f"{req_path.stem}.json",
                     json.dumps(lib.result_json(result, cat.shop.currency), indent=2, ensure_ascii=False,
                                default=str) + "\n")
        if result.top:
            best = result.top[0].design
            echo(f"{req_path.stem:8} best of {len(result.top)}: {best.core.id}, {best.losses.total_w:.2f} W, "
                 f"hot spot {best.hot_spot_c:.0f} °C, material {cat.shop.currency} "
                 f"{result.top[0].cost.quantize(Decimal('0.01'), ROUND_HALF_UP)}")
        else:
            echo(f"{req_path.stem:8} nothing in the catalogue fits (reasons in search/{req_path.stem}.txt)")
    echo(f"all of it in {out}/")
    return designs
