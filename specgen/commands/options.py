"""The options every command shares, defined once: ``--catalog``, ``--json``, ``--csv``."""

from __future__ import annotations

import typer

CatalogOpt = typer.Option(None, "--catalog", envvar="SPECGEN_CATALOG", metavar="DIR",
                          help="Catalogue folder (default: the one shipped with specgen).")
JsonOpt = typer.Option(False, "--json", help="Print the result as JSON.")
CsvOpt = typer.Option(False, "--csv", help="Print the result as CSV.")


def print_csv(rows: list[dict]) -> None:
    """Rows of one shape as CSV on stdout (a list value joined with '; ')."""
    import csv
    import sys

    if not rows:
        return
    writer = csv.DictWriter(sys.stdout, fieldnames=list(rows[0].keys()), lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: "; ".join(map(str, v)) if isinstance(v, list) else ("" if v is None else v)
                         for k, v in row.items()})
