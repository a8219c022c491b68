"""``specgen quote``: price a part at quantity breaks from the same Design the shop floor uses.

Outputs:
- default: issue the quote: take the next quote number from the shop's register (numbered like work
  orders, never reused), write ``<number>-<part>-rev<R>.pdf`` and ``.html`` into ``--out`` (default:
  the current folder), record them, and print the cost build-up and price table;
- ``--json`` / ``--csv``: print only that to stdout (machine-readable, nothing else mixed in); the
  quote is issued (numbered, PDF written) only when ``--out`` is given, and its "wrote" line goes to
  stderr. Without ``--out`` it is a price look: no number is taken.
A design with a failed check is refused (exit 1), an obsolete revision or a bad option is one line
and exit 2. Drafts are quoted as budgetary (see ``specgen.quote``).
"""

from __future__ import annotations

from pathlib import Path

import typer

from ._common import guarded, print_json
from .options import CatalogOpt


def register(app) -> None:
    """Add ``quote`` to the root Typer app."""

    @app.command("quote")
    @guarded
    def quote_cmd(
        spec: Path = typer.Argument(..., metavar="SPEC.yaml", help="The part's spec file."),
        qty: str = typer.Option("100,500,2500", "--qty", metavar="N,N,...",
                                help="Quantity breaks, comma-separated whole numbers."),
        as_json: bool = typer.Option(False, "--json", help="Print the quote as JSON (no PDF unless --out)."),
        as_csv: bool = typer.Option(False, "--csv", help="Print one CSV row per quantity break (no PDF unless --out)."),
        out: Path | None = typer.Option(None, "--out", metavar="DIR",
                                           help="Folder for the PDF and HTML (default: current folder)."),
        nre: str | None = typer.Option(None, "--nre", metavar="AMOUNT", help="One-time tooling / NRE charge."),
        valid_days: str = typer.Option("30", "--valid-days", metavar="N", help="Days the quote is valid."),
        catalog: Path | None = CatalogOpt,
        register_path: str | None = typer.Option(
            None, "--register", metavar="PATH|URL",
            help="The register that numbers the quote (default: as for work orders: $SPECGEN_REGISTER, "
                 "register: in shop.yaml, else the shop's root)."),
        by: str | None = typer.Option(None, "--by", metavar="NAME", help="Who issues it (default: login name)."),
        verbose: bool = typer.Option(False, "--verbose", "-v", help="Say which register numbered the quote."),
    ):
        """Quote a part: unit and extended price per quantity break, copper sensitivity, a PDF."""
        from ..api import run_design
        from ..catalog.loader import load_catalog
        from ..design.spec import load_spec
        from ..errors import SpecError
        from ..freetext import check_name
        from ..quote import (
            CSV_FIELDS,
            build_quote,
            parse_amount,
            parse_days,
            parse_quantities,
            quote_csv_rows,
            quote_table,
        )

        if as_json and as_csv:
            raise SpecError("choose one of --json or --csv", path="--json")
        by = check_name(by)
        quantities = parse_quantities(qty)
        nre_amount = parse_amount(nre, "--nre")
        days = parse_days(valid_days)
        out_dir = _out_dir(out) if (out is not None or not (as_json or as_csv)) else None
        cat = load_catalog(catalog)
        spec_obj = load_spec(spec)
        design = run_design(spec_obj, cat)
        q = build_quote(spec_obj, design, cat, quantities, nre=nre_amount, valid_days=days)
        written: list = []
        register_info = None
        if out_dir is not None:
            from ..documents.quote_doc import issue_quote
            from ..register import locate_register

            where = locate_register(spec, register_path, shop_setting=cat.shop.register_path, catalog_dir=cat.root)
            # the folder is made by the writer once every file is rendered, and removed again if the write
            # fails: a refused or failed quote leaves no empty --out folder behind
            issued = issue_quote(q, out_dir, where, by=by)
            q, written = issued.quote, list(issued.files)
            register_info = {"location": issued.register, "found_by": issued.register_found_by}
            if verbose:
                typer.echo(f"quote {q.reference} from the register {issued.register} ({issued.register_found_by})",
                           err=True)
        if as_json:
            data = q.to_dict()
            data["number"] = q.reference if register_info else None
            data["register"] = register_info
            print_json(data)
        elif as_csv:
            from ..csvsafe import csv_text

            typer.echo(csv_text(CSV_FIELDS, quote_csv_rows(q)), nl=False)
        else:
            typer.echo(quote_table(q))
        for path in written:
            if path.suffix == ".pdf":
                typer.echo(f"wrote {path}", err=bool(as_json or as_csv))


def _out_dir(out: Path | None) -> Path:
    from ..errors import SpecError

    folder = Path(out) if out is not None else Path.cwd()
    if folder.suffix.lower() in (".pdf", ".html", ".htm") and not folder.is_dir():
        raise SpecError("names a folder for the quote, not a file; it is written there as <part>-rev<R>-quote.pdf",
                        file=str(folder), path="--out")
    if folder.exists() and not folder.is_dir():
        raise SpecError("is a file, expected a folder for the quote", file=str(folder), path="--out")
    return folder
