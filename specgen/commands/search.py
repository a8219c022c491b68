"""`specgen search REQ.yaml`: the buildable designs in the shop's catalogue for a requirement, ranked.

A thin face over ``specgen.search``: load, search, print (text or JSON), optionally write the chosen
candidate as a draft spec. Exit 0 when at least one candidate passes every check, 1 when none does (the
reasons per family are printed), 2 for a mistake in the requirement file or the options.
"""

from __future__ import annotations

import sys
from pathlib import Path

import typer

from ._common import guarded, print_json


def register(app) -> None:
    """Add ``search`` to the root Typer app."""

    @app.command("search")
    @guarded
    def search_cmd(
        requirement: Path = typer.Argument(..., metavar="REQ.yaml", help="The requirement file (see the demo REQ-*.yaml)."),
        top: int = typer.Option(5, "--top", metavar="N", help="How many candidates to list."),
        sort: str = typer.Option("cost", "--sort", metavar="KEY", help="cost, loss, size or rise."),
        as_json: bool = typer.Option(False, "--json", help="Print the result as JSON."),
        write: Path | None = typer.Option(None, "--write", metavar="PART.yaml",
                                             help="Write the chosen candidate as a draft spec (never overwrites)."),
        pick: int = typer.Option(1, "--pick", metavar="N", help="Which listed candidate --write takes (1 = best)."),
        part: str | None = typer.Option(None, "--part", help="Part number of the written spec (default: the "
                                                               "requirement's part:, else the file name)."),
        per_core: int = typer.Option(2, "--per-core", metavar="N",
                                     help="At most this many listed candidates per core/stack/bobbin."),
        progress: bool = typer.Option(False, "--progress", help="Show the progress bar even when stderr is not a "
                                                               "terminal."),
        catalog: Path | None = typer.Option(None, "--catalog", envvar="SPECGEN_CATALOG", metavar="DIR",
                                               help="Catalogue folder (default: the one shipped with specgen)."),
    ):
        """Search every core x stack x wire choice in the catalogue for a requirement (exit 1 if none fits)."""
        from .. import search as lib
        from ..catalog.loader import load_catalog
        from ..errors import SpecError

        if sort not in lib.SORTS:
            raise SpecError(f"unknown sort '{sort}'; one of {', '.join(lib.SORTS)}", path="--sort")
        if top < 1:
            raise SpecError(f"--top must be at least 1, got {top}", path="--top")
        if per_core < 1:
            raise SpecError(f"--per-core must be at least 1, got {per_core}", path="--per-core")
        if pick < 1:
            raise SpecError(f"--pick must be at least 1, got {pick}", path="--pick")
        if pick != 1 and write is None:
            raise SpecError("--pick chooses the candidate --write writes; give --write PART.yaml", path="--pick")
        if part is not None:
            _check_part(part)
        if write is not None:
            _refuse_existing(write)
        req = lib.load_requirement(requirement)
        cat = load_catalog(catalog)
        part_no = part or req.part or (write.stem if write is not None else None)
        bar = lib.Progress(enabled=progress or sys.stderr.isatty())
        try:
            result = lib.search(req, cat, top=top, sort=sort, per_core=per_core, part=part_no, progress=bar)
        finally:
            bar.close()
        written = None
        if write is not None and result.top:
            if pick > len(result.top):
                raise SpecError(f"--pick {pick}: the search lists {len(result.top)} candidate(s)", path="--pick")
            written = _write(write, result.top[pick - 1].spec_text)
        if as_json:
            out = lib.result_json(result, cat.shop.currency)
            out["written"] = str(written) if written else None
            print_json(out)
        else:
            typer.echo(lib.result_text(result, cat.shop.currency))
        if written is not None:
            c = result.top[pick - 1]
            typer.echo(f"wrote {written}: candidate {pick}, {c.choice.label}, part {part_no}, draft revision A "
                       f"(`specgen design {written}` reproduces these numbers)", err=as_json)
        elif write is not None:
            typer.echo(f"nothing written to {write}: no candidate passes every check", err=True)
        if not result.top:
            raise typer.Exit(1)


def _check_part(part: str) -> None:
    """--part names the draft's files: the one part-number rule, checked before the search runs."""
    from ..part_numbers import check_part_number

    check_part_number(part, path="--part")


def _refuse_existing(path: Path) -> None:
    from ..errors import SpecError

    if path.exists():
        raise SpecError("exists; --write never overwrites a file (remove it or choose another name)",
                        file=str(path))


def _write(path: Path, text: str) -> Path:
    from ..atomic import write_atomic

    _refuse_existing(path)       # again, just before writing: the search took a moment
    return write_atomic(path, text)
