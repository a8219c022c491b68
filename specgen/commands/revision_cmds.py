"""Commands for revisions: release, verify, diff, new. Thin wrappers over ``specgen.diff``,
``specgen.revision``, ``specgen.starter`` and ``specgen.documents.change_doc``.

Exit codes: 0 success; 1 a design check fails (release) or a release record does not match
(verify); 2 bad input (one line on stderr).
"""

from __future__ import annotations

from pathlib import Path

import typer

from ..errors import SpecError
from ._common import guarded, print_json
from .options import CatalogOpt, JsonOpt


# long: the four commands are nested here so they are built only when the root app mounts them
def register(app) -> None:
    """Add ``release``, ``verify``, ``diff`` and ``new`` to the root Typer app."""

    @app.command("release")
    @guarded
    def release_cmd(
        spec: Path = typer.Argument(..., metavar="SPEC.yaml"),
        by: str = typer.Option(..., "--by", metavar="NAME", help="Who releases it."),
        note: str = typer.Option(..., "--note", metavar="TEXT", help="What changed in this revision."),
        date: str | None = typer.Option(None, "--date", metavar="YYYY-MM-DD",
                                           help="Release date (default: today)."),
        commit: bool = typer.Option(False, "--commit",
                                    help="Commit just this file and tag it PART-rev-X (never pushes)."),
        accept: list[str] = typer.Option([], "--accept", metavar="CODE[=REASON]",
                                         help="Accept the design warning with this check code (repeat for each)."),
        accept_all: bool = typer.Option(False, "--accept-all", help="Accept every design warning (needs --reason)."),
        reason: str | None = typer.Option(None, "--reason", metavar="TEXT",
                                          help="Why the accepted warnings are acceptable (recorded in the history)."),
        effective: str | None = typer.Option(
            None, "--effective", metavar="next-order|now|lot LOT",
            help="When this revision takes over from the one it supersedes (required when that one has open "
                 "work orders; default next-order)."),
        register_path: str | None = typer.Option(
            None, "--register", metavar="PATH|URL",
            help="The register asked for open work orders of the superseded revision (default: as for work orders)."),
        catalog: Path | None = CatalogOpt,
        as_json: bool = JsonOpt,
    ):
        """Release a spec: refuse if a design check fails or a warning is not accepted by name, set the
        next revision letter, record the fingerprint, the acceptances and the effectivity in its history
        (comments and formatting kept)."""
        from .. import load_catalog, release_spec
        from ..lifecycle import (
            MAX_BY_CHARS,
            MAX_NOTE_CHARS,
            WarningsNotAccepted,
            check_acceptance,
            check_effectivity,
            check_release_date,
            check_release_text,
        )
        from ._common import terminal_safe

        # every option checked before the catalogue is read or the file touched
        check_release_text(by, "--by", MAX_BY_CHARS)
        check_release_text(note, "--note", MAX_NOTE_CHARS)
        check_release_date(date)
        check_acceptance(accept, accept_all, reason)
        check_effectivity(effective)
        try:
            result = release_spec(spec, by=by, note=note, catalog=load_catalog(catalog), date=date, commit=commit,
                                  accept=accept, accept_all=accept_all, reason=reason, effective=effective,
                                  register_path=register_path)
        except WarningsNotAccepted as err:
            for w in err.warnings:          # the list first, then the one-line refusal
                typer.echo(f"  WARN {w.code}: {terminal_safe(w.message)}", err=True)
            raise
        if as_json:
            print_json(result.to_dict())
        else:
            typer.echo(result.message())

    @app.command("verify")
    @guarded
    def verify_cmd(
        paths: list[Path] = typer.Argument(..., metavar="PATH...",
                                           help="Spec files, or folders searched for specs."),
        catalog: Path | None = CatalogOpt,
        as_json: bool = JsonOpt,
    ):
        """Check every released spec against the fingerprint recorded at its release (for CI):
        exit 1 on a mismatch, 2 on a spec that cannot be read or designed."""
        from .. import load_catalog
        from ..lifecycle import spec_files, verify_file

        files = spec_files(paths)
        cat = load_catalog(catalog)
        results = [verify_file(f, cat) for f in files]
        if as_json:
            print_json([r.to_dict() for r in results])
        else:
            for r in results:
                typer.echo(r.line(), err=r.outcome == "error")
            counts: dict[str, int] = {}
            for r in results:
                counts[r.outcome] = counts.get(r.outcome, 0) + 1
            typer.echo(f"{len(results)} spec(s): " + ", ".join(f"{n} {k}" for k, n in sorted(counts.items())))
        if any(r.outcome == "error" for r in results):
            raise typer.Exit(2)
        if any(r.failed for r in results):
            raise typer.Exit(1)

    @app.command("diff")
    @guarded
    def diff_cmd(
        old: str = typer.Argument(..., metavar="OLD", help="A spec file or FILE@GITREV."),
        new: str = typer.Argument(..., metavar="NEW", help="A spec file or FILE@GITREV."),
        as_json: bool = JsonOpt,
        pdf: Path | None = typer.Option(None, "--pdf", metavar="FILE",
                                           help="Also write a one-page change summary PDF."),
        qty: int = typer.Option(100, "--qty", metavar="N", min=1, max=1_000_000,
                                help="Lot size for the unit price compared (default 100)."),
        catalog: Path | None = CatalogOpt,
    ):
        """Compare two revisions of a spec: the changed inputs and the changed shop-floor results
        (turns, wire, layers, lengths, DCR limits, hipot, materials, cost), each old -> new."""
        from ..catalog.loader import load_catalog
        from ..diff import compare_refs, summary_text

        cat = load_catalog(catalog)
        summary = compare_refs(old, new, cat, lot=qty)
        if pdf is not None:
            from ..documents.change_doc import write_change_pdf  # WeasyPrint only when asked

            write_change_pdf(summary, pdf, paper=cat.shop.documents.paper)
        if as_json:
            print_json(summary.to_dict())
        else:
            typer.echo(summary_text(summary))
            if pdf is not None:
                typer.echo(f"\nchange summary written to {pdf}")

    @app.command("new")
    @guarded
    def new_cmd(
        part: str = typer.Argument(..., metavar="PART", help="The part number, e.g. BH-6001."),
        kind: str = typer.Option(..., "--kind", metavar="transformer|inductor"),
        out: Path | None = typer.Option(None, "--out", metavar="FILE",
                                           help="Where to write it (default: PART.yaml here)."),
    ):
        """Write a commented starter spec (revision A, draft) that designs as it is."""
        from ..starter import KINDS, write_starter

        k = kind.strip().lower()
        if k not in KINDS:
            raise SpecError(f"--kind must be one of {', '.join(KINDS)}, got '{kind}'", path="--kind")
        path = write_starter(part, k, out)
        typer.echo(f"wrote {path}: {k} {part.strip()}, revision A, draft. "
                   f"Edit it, then: specgen design {path}")
