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
from .commands.options import CatalogOpt, JsonOpt
from .errors import SpecError

# rich_markup_mode=None: plain help, so the quick commands do not import rich (~50 ms)
app = typer.Typer(name="specgen", no_args_is_help=True, add_completion=False, pretty_exceptions_enable=False,
                  rich_markup_mode=None,
                  help="Specs, calculations, work orders and quotes for custom wound magnetics.")


def _version(value: bool):
    if value:
        typer.echo(f"specgen {__version__}")
        raise typer.Exit()


@app.callback()
def _root(version: bool = typer.Option(False, "--version", callback=_version, is_eager=True,
                                       help="Print the version and exit.")):
    """specgen: one YAML spec per part + the shop's catalogue -> design, work orders, quotes, change summaries."""


# ------------------------------------------------------------------------------------------------ design

@app.command("design")
@guarded
def design_cmd(spec: Path = typer.Argument(..., metavar="SPEC.yaml"), catalog: Path | None = CatalogOpt,
               as_json: bool = JsonOpt):
    """Run the whole calculation for one part and print it (exit 1 if a check fails)."""
    from . import run_design
    from .report import design_report

    d = run_design(spec, catalog)
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


# commands that live in their own modules (catalogue, work orders, register, quotes, revisions, search)
for _name in ("catalog", "orders", "workorder", "quote", "revision_cmds", "search"):
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
