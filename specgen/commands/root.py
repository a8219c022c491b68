"""The root Typer app: every command registered here, each a thin call into the library.

``specgen.cli`` imports this only when the typer-free quick path (``commands.quick``) does not
answer, so `specgen design SPEC` never pays for typer and click.
"""

from __future__ import annotations

import importlib
from pathlib import Path

import typer

from .. import __version__
from ._common import WholeHelpGroup, guarded
from .options import CatalogOpt, JsonOpt

# rich_markup_mode=None: plain help, so the quick commands do not import rich (~50 ms)
app = typer.Typer(name="specgen", cls=WholeHelpGroup, no_args_is_help=True, add_completion=False, pretty_exceptions_enable=False,
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
    from .quick import design_output

    text, failed = design_output(spec, catalog, as_json)
    typer.echo(text)
    if failed:
        raise typer.Exit(1)


@app.command("demo")
@guarded
def demo_cmd(out: Path = typer.Option(Path("specgen-demo"), "--out", metavar="DIR",
                                      help="Where to write the demo's documents."),
             catalog: Path | None = CatalogOpt):
    """Run the main job on the shipped demo shop: designs, work orders, quotes, a change summary."""
    from ..demo import run_demo

    run_demo(out, catalog, echo=typer.echo)


@app.command("schema")
@guarded
def schema_cmd(kind: str = typer.Argument("spec", metavar="[spec|catalog|requirement]",
                                          help="Which file: a part spec (default), a catalogue file or a requirement.")):
    """Print the JSON Schema of a spec, a catalogue file or a requirement file, for an editor's completion."""
    import json

    from ..errors import SpecError
    from ..schema import KINDS, schema

    if kind not in KINDS:
        raise SpecError(f"unknown kind '{kind}'; one of {', '.join(KINDS)}", path="KIND")
    typer.echo(json.dumps(schema(kind), indent=2, ensure_ascii=False))


# commands that live in their own modules (catalogue, work orders, register, quotes, revisions, search)
for _name in ("catalog", "orders", "workorder", "quote", "revision_cmds", "search", "station"):
    _mod = importlib.import_module(f"specgen.commands.{_name}")
    if hasattr(_mod, "register"):
        _mod.register(app)
    elif hasattr(_mod, "app"):
        app.add_typer(_mod.app)


