"""``specgen workorder``: issue a shop-floor work order (PDF + HTML) from a released spec.

A thin wrapper over :func:`specgen.documents.workorder.issue_work_order`; WeasyPrint is imported only
inside the command, when a PDF is rendered.

With ``--batch ORDERS.csv`` every row is issued (see specgen.documents.batch): exit 1 if any row failed.

Exit codes: 0 issued; 1 a design check failed (the failed checks are listed, no number is taken);
2 a user's mistake, including a spec that is not released (without ``--draft``) or a released spec
that no longer matches its release record.
"""

from __future__ import annotations

from pathlib import Path

import typer

from ._common import guarded, print_json
from .options import CatalogOpt, JsonOpt


def register(app) -> None:
    """Add ``workorder`` to the root Typer app."""

    @app.command("workorder")
    @guarded
    def workorder_cmd(
        spec: Path | None = typer.Argument(None, metavar="SPEC.yaml", help="The part's spec file."),
        qty: str | None = typer.Option(None, "--qty", metavar="N", help="Pieces in the lot (1..1,000,000)."),
        batch: Path | None = typer.Option(None, "--batch", metavar="ORDERS.csv",
                                             help="Issue every row of a CSV (spec,qty,due,lot) in parallel."),
        workers: int | None = typer.Option(None, "--workers", metavar="N",
                                              help="With --batch: worker processes (default: one per CPU)."),
        progress: bool | None = typer.Option(None, "--progress/--no-progress",
                                                help="With --batch: show a progress bar (default: on a terminal)."),
        due: str | None = typer.Option(None, "--due", metavar="YYYY-MM-DD", help="Due date."),
        lot: str | None = typer.Option(None, "--lot", metavar="TEXT", help="Lot or batch reference."),
        out: Path = typer.Option(Path("."), "--out", metavar="DIR", help="Folder for the PDF and HTML."),
        draft: bool = typer.Option(False, "--draft",
                                   help="Allow a spec that is not released: every page is marked "
                                        "'DRAFT - NOT FOR PRODUCTION' and the number is recorded void."),
        register_path: str | None = typer.Option(
            None, "--register", metavar="PATH|URL",
            help="The register (default: $SPECGEN_REGISTER, else register: in shop.yaml, else "
                 "specgen-register.sqlite at the shop's root). A postgresql:// URL names a server."),
        quote: str | None = typer.Option(None, "--quote", metavar="NUMBER",
                                         help="The register number of the quote this work order fulfils."),
        verbose: bool = typer.Option(False, "--verbose", "-v", help="Say which register was used and how it was found."),
        number: str | None = typer.Option(None, "--number", metavar="NUM",
                                             help="Use this number (from the ERP) instead of the next one."),
        by: str | None = typer.Option(None, "--by", metavar="NAME", help="Who issues it (default: login name)."),
        catalog: Path | None = CatalogOpt,
        as_json: bool = JsonOpt,
    ):
        """Issue a work order: winding instructions, drawings and test sheet for the floor."""
        from ..errors import SpecError

        if batch is not None:
            if spec is not None or qty is not None or number is not None or draft or due or lot or quote:
                raise SpecError("--batch takes its parts, quantities, due dates and lots from the CSV; "
                                "give no SPEC, --qty, --due, --lot, --number, --quote or --draft with it", path="--batch")
            if workers is not None and not 1 <= workers <= 32:
                raise SpecError(f"expected 1 to 32 workers, got {workers}", path="--workers")
            from ..documents.batch import issue_batch

            quiet = (lambda *a, **k: None) if as_json else typer.echo
            result = issue_batch(batch, out_dir=out, register_path=register_path, workers=workers,
                                 catalog_dir=catalog, by=by, progress=False if as_json else progress, echo=quiet)
            if as_json:
                print_json({"seconds": round(result.seconds, 3), "workers": result.workers,
                            "issued": len(result.rows) - len(result.failed), "failed": len(result.failed),
                            "rows": [{"line": r.line, "spec": r.spec, "qty": r.qty, "due": r.due or None,
                                      "lot": r.lot or None, "number": r.number,
                                      "pdf": None if r.pdf is None else str(r.pdf), "error": r.error}
                                     for r in result.rows]})
            if result.failed:
                raise typer.Exit(1)
            return
        if workers is not None or progress is not None:     # never silently ignored
            raise SpecError("--workers and --progress go with --batch ORDERS.csv only",
                            path="--workers" if workers is not None else "--progress")
        if spec is None:
            raise SpecError("give the SPEC.yaml to issue (or --batch ORDERS.csv)", path="SPEC.yaml")
        if qty is None:
            raise SpecError("give the lot size with --qty N", path="--qty")
        from ..documents.workorder import issue_work_order

        issued = issue_work_order(spec, qty=qty, due=due, lot=lot, out_dir=out, draft=draft,
                                  register_path=register_path, number=number, by=by, catalog_dir=catalog,
                                  warn=lambda msg: typer.echo(f"warning: {msg}", err=True), quote=quote)
        if as_json:
            print_json({"number": issued.number, "pdf": str(issued.pdf), "html": str(issued.html),
                        "quote": quote, "warnings": list(issued.warnings),
                        "register": {"location": issued.register, "found_by": issued.register_found_by},
                        "seconds": round(issued.seconds, 3)})
            return
        typer.echo(str(issued.pdf))
        typer.echo(str(issued.html))
        if verbose:
            typer.echo(f"number {issued.number} from the register {issued.register} ({issued.register_found_by})",
                       err=True)
