"""The command line: thin wrappers over the library (specgen.api and friends), nothing else.

Exit codes: 0 success, 1 a design check failed (or verify found a mismatch), 2 bad input.
A user's mistake is one line on stderr, never a traceback.
"""

from __future__ import annotations

import importlib
import sys
from pathlib import Path

import typer

from . import __version__
from .commands._common import guarded, print_json
from .errors import SpecError

# rich_markup_mode=None: plain help, so the quick commands do not import rich (~50 ms)
app = typer.Typer(name="specgen", no_args_is_help=True, add_completion=False, pretty_exceptions_enable=False,
                  rich_markup_mode=None,
                  help="Specs, calculations, work orders and quotes for custom wound magnetics.")
catalog_app = typer.Typer(name="catalog", no_args_is_help=True, rich_markup_mode=None,
                          help="The shop's stock: list, show, check.")
app.add_typer(catalog_app)

CatalogOpt = typer.Option(None, "--catalog", envvar="SPECGEN_CATALOG", metavar="DIR",
                          help="Catalogue folder (default: the one shipped with specgen).")
JsonOpt = typer.Option(False, "--json", help="Print the result as JSON.")


def _version(value: bool):
    if value:
        typer.echo(f"specgen {__version__}")
        raise typer.Exit()


@app.callback()
def _root(version: bool = typer.Option(False, "--version", callback=_version, is_eager=True,
                                       help="Print the version and exit.")):
    """specgen: one YAML spec per part + the shop's catalogue -> design, work orders, quotes, change summaries."""


# ------------------------------------------------------------------------------------------------ catalog

KINDS = {"wires": "wires", "wire": "wires", "cores": "cores", "core": "cores", "bobbins": "bobbins",
         "bobbin": "bobbins", "materials": "materials", "material": "materials", "tapes": "tapes",
         "tape": "tapes", "sleevings": "sleevings", "sleeving": "sleevings", "varnishes": "varnishes",
         "varnish": "varnishes"}


@catalog_app.command("list")
@guarded
def catalog_list(kind: str = typer.Argument(..., help="wires, cores, bobbins, materials, tapes, sleevings, varnishes"),
                 catalog: Path | None = CatalogOpt, as_json: bool = JsonOpt):
    """List one kind of catalogue item."""
    from .catalog import views
    from .catalog.loader import load_catalog

    table = KINDS.get(kind.lower())
    if table is None:
        raise SpecError(f"unknown kind '{kind}'; one of {', '.join(sorted(set(KINDS.values())))}", path="KIND")
    cat = load_catalog(catalog)
    rows = views.rows(cat, table)
    if as_json:
        print_json(rows)
    else:
        typer.echo(views.text_table(rows))


@catalog_app.command("show")
@guarded
def catalog_show(item_id: str = typer.Argument(..., metavar="ID"), catalog: Path | None = CatalogOpt,
                 as_json: bool = JsonOpt):
    """Show one catalogue item with its computed properties and source."""
    from .catalog import views
    from .catalog.loader import load_catalog

    cat = load_catalog(catalog)
    info = views.show(cat, item_id)
    if as_json:
        print_json(info)
    else:
        typer.echo(views.text_show(info))


@catalog_app.command("check")
@guarded
def catalog_check(folder: Path | None = typer.Argument(None, metavar="[DIR]"),
                  catalog: Path | None = CatalogOpt):
    """Validate a catalogue folder; every problem with its file and line (exit 2 if any)."""
    from .catalog.loader import check_catalog, resolve_catalog_dir

    target = folder or catalog
    resolve_catalog_dir(target)        # a missing folder is one line, not a problem list
    problems = check_catalog(target)
    if problems:
        for p in problems:
            typer.echo(str(p), err=True)
        typer.echo(f"{len(problems)} problem(s) in {resolve_catalog_dir(target) if target else 'the catalogue'}",
                   err=True)
        raise typer.Exit(2)
    typer.echo(f"catalogue {resolve_catalog_dir(target)}: no problems")


# ------------------------------------------------------------------------------------------------ design

@app.command("design")
@guarded
def design_cmd(spec: Path = typer.Argument(..., metavar="SPEC.yaml"), catalog: Path | None = CatalogOpt,
               as_json: bool = JsonOpt):
    """Run the whole calculation for one part and print it (exit 1 if a check fails)."""
    from .api import design_file
    from .report import design_report

    d = design_file(spec, catalog)
    if as_json:
        print_json(d.to_dict())
    else:
        typer.echo(design_report(d))
    if d.failed:
        raise typer.Exit(1)


@app.command("demo")
@guarded
def demo_cmd(out: Path = typer.Option(Path("specgen-demo"), "--out", metavar="DIR",
                                      help="Where to write the demo's documents."),
             catalog: Path | None = CatalogOpt):
    """Run the main job on the shipped demo shop: designs, work orders, quotes, a change summary."""
    from .demo import run_demo

    run_demo(out, catalog, echo=typer.echo)


# commands that live in their own modules (work orders, register, quotes, revisions, search)
for _name in ("orders", "workorder", "quote", "revision_cmds", "search"):
    _mod = importlib.import_module(f"specgen.commands.{_name}")
    if hasattr(_mod, "register"):
        _mod.register(app)
    elif hasattr(_mod, "app"):
        app.add_typer(_mod.app)


def main(argv: list | None = None) -> None:
    """Run the CLI; a usage mistake is one line too (click's own report spans three)."""
    import click

    try:
        code = app(args=argv, standalone_mode=False)
    except click.UsageError as err:
        where = err.ctx.command_path if err.ctx is not None else "specgen"
        typer.echo(f"{where}: {err.format_message()} (see `{where} --help`)", err=True)
        sys.exit(2)
    except click.Abort:
        typer.echo("interrupted", err=True)
        sys.exit(130)
    except click.exceptions.Exit as ex:
        sys.exit(ex.exit_code)
    except SpecError as err:      # raised while parsing options, before a command's guard
        typer.echo(str(err), err=True)
        sys.exit(2)
    sys.exit(code if isinstance(code, int) else 0)


if __name__ == "__main__":
    main()
