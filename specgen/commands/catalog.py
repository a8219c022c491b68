"""``specgen catalog list | show | check``: the shop's stock."""

from __future__ import annotations

from pathlib import Path

import typer

from ..errors import SpecError
from ._common import WholeHelpGroup, guarded, print_json
from .options import CatalogOpt, CsvOpt, JsonOpt, print_csv

app = typer.Typer(name="catalog", cls=WholeHelpGroup, no_args_is_help=True, rich_markup_mode=None,
                  help="The shop's stock: list, show, check.")

KINDS = ("wires", "cores", "bobbins", "materials", "tapes", "sleevings", "varnishes")
_ALIASES = {k: k for k in KINDS} | {k[:-1]: k for k in KINDS} | {"varnish": "varnishes"}


def kind_table(kind: str) -> str:
    """'core' or 'cores' -> 'cores'; an unknown kind is a one-line SpecError."""
    table = _ALIASES.get(kind.strip().lower())
    if table is None:
        raise SpecError(f"unknown kind '{kind}'; one of {', '.join(KINDS)}", path="KIND")
    return table


# the kinds in the help come from KINDS (typer leaves an argument's own help out of the plain help)
@app.command("list", help=f"List one kind of catalogue item. KIND is one of: {', '.join(KINDS)} (or the singular).")
@guarded
def catalog_list(kind: str = typer.Argument(..., metavar="KIND"), catalog: Path | None = CatalogOpt,
                 as_json: bool = JsonOpt, as_csv: bool = CsvOpt):
    from .. import load_catalog
    from ..catalog import views

    table = kind_table(kind)
    if as_json and as_csv:
        raise SpecError("give --json or --csv, not both", path="--csv")
    rows = views.rows(load_catalog(catalog), table)
    if as_json:
        print_json(rows)
    elif as_csv:
        print_csv(rows)
    else:
        typer.echo(views.text_table(rows))


@app.command("show")
@guarded
def catalog_show(item_id: str = typer.Argument(..., metavar="ID"), catalog: Path | None = CatalogOpt,
                 as_json: bool = JsonOpt):
    """Show one catalogue item: its entry, where it is written, and what specgen computes from it."""
    from .. import load_catalog
    from ..catalog import views

    info = views.show(load_catalog(catalog), item_id)
    if as_json:
        print_json(info)
    else:
        typer.echo(views.text_show(info))


@app.command("check")
@guarded
def catalog_check(folder: Path | None = typer.Argument(None, metavar="[DIR]"),
                  catalog: Path | None = CatalogOpt, as_json: bool = JsonOpt):
    """Validate a catalogue folder; every problem with its file and line (exit 2 if any)."""
    from ..catalog.loader import check_catalog, resolve_catalog_dir

    target = folder or catalog
    where = resolve_catalog_dir(target)        # a missing folder is one line, not a problem list
    problems = check_catalog(target)
    if as_json:
        print_json({"catalog": str(where), "ok": not problems,
                    "problems": [{"file": p.file, "line": p.line, "path": p.path, "message": p.message,
                                  "text": str(p)} for p in problems]})
        if problems:
            raise typer.Exit(2)
        return
    if problems:
        for p in problems:
            typer.echo(str(p), err=True)
        typer.echo(f"{len(problems)} problem(s) in {where}", err=True)
        raise typer.Exit(2)
    typer.echo(f"catalogue {where}: no problems")
