"""The options every command shares, defined once: ``--catalog``, ``--json``, ``--csv``."""

from __future__ import annotations

import typer

CatalogOpt = typer.Option(None, "--catalog", envvar="SPECGEN_CATALOG", metavar="DIR",
                          help="Catalogue folder (default: the one shipped with specgen).")
JsonOpt = typer.Option(False, "--json", help="Print the result as JSON.")
CsvOpt = typer.Option(False, "--csv", help="Print the result as CSV.")


def print_csv(rows: list[dict]) -> None:
    """Rows of one shape as CSV on stdout (a list value joined with '; '), cells safe for spreadsheets."""
    import sys

    from ..csvsafe import csv_text

    if not rows:
        return
    header = list(rows[0].keys())
    sys.stdout.write(csv_text(header, [{k: "; ".join(map(str, v)) if isinstance(v, list) else v
                                        for k, v in row.items()} for row in rows]))
