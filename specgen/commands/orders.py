"""``specgen orders ...``: thin commands over :class:`specgen.register.Register`.

Mounted by the root CLI with ``app.add_typer(orders.app)``. Only light imports here: reading the
register never loads the document renderer. Every command finds the shop's one register the way the
issuing commands do (:func:`specgen.register.locate_register`); the reading ones (list, show,
where-used, export, stale without --void) open it read-only: they never create, convert or migrate it.
"""

from __future__ import annotations

import json
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

import typer

from specgen.commands._common import WholeHelpGroup
from specgen.errors import SpecError, escape_controls
from specgen.freetext import check_free_text, check_name
from specgen.register import (
    QUOTE_STATES,
    STATES,
    Order,
    QuoteEntry,
    Register,
    RegisterLocation,
    locate_register,
    orders_csv,
    shop_register_setting,
)

app = typer.Typer(
    name="orders",
    cls=WholeHelpGroup,
    help="The shop's register of work orders and quotes: list, show, change state, stale numbers, trace, export.",
    no_args_is_help=True,
)

_REGISTER_HELP = ("The register, a file or a postgresql:// URL (default: $SPECGEN_REGISTER, else register: in "
                  "shop.yaml, else specgen-register.sqlite at the shop's root above the current folder).")
_CATALOG_HELP = "Catalogue folder whose shop.yaml may name the register (default: $SPECGEN_CATALOG, else the shipped one)."


def _register_opt() -> Any:
    return typer.Option(None, "--register", metavar="PATH|URL", help=_REGISTER_HELP)


def _catalog_opt() -> Any:
    return typer.Option(None, "--catalog", envvar="SPECGEN_CATALOG", metavar="DIR", help=_CATALOG_HELP)


def _verbose_opt() -> Any:
    return typer.Option(False, "--verbose", "-v", help="Say which register was used and how it was found.")


def _locate(register: str | None, catalog: Path | None) -> RegisterLocation:
    setting, folder = (None, None) if register else shop_register_setting(catalog)
    return locate_register(None, register, shop_setting=setting, catalog_dir=folder)


def _open(where: RegisterLocation, verbose: bool, *, write: bool = False) -> Register:
    if verbose:
        typer.echo(f"register {where.shown} ({where.found_by})", err=True)
    if write:
        return Register.open(where.target, create=False)
    return Register.open(where.target, read_only=True)


def _run(action: Callable[[], None]) -> None:
    """Run a command body; a user's mistake is one line on stderr and exit status 2."""
    try:
        action()
    except SpecError as err:
        typer.echo(str(err), err=True)
        raise typer.Exit(2) from None


def _safe(value: object) -> str:
    """A value from the register as printed: every control character, line break and bidirectional
    control shown escaped (a register written by hand or by an older version may hold any of them)."""
    return escape_controls(str(value))


# the same options and error handling for the station's commands (commands/station.py)
register_opt, catalog_opt, locate, run_guarded = _register_opt, _catalog_opt, _locate, _run


def _table(headers: tuple[str, ...], rows: Sequence[tuple[str, ...]]) -> list[str]:
    rows = [tuple(_safe(c) for c in row) for row in rows]
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(headers, widths)).rstrip()]
    lines += ["  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip() for row in rows]
    return lines


def _orders_table(orders: list[Order]) -> str:
    rows = [(o.number, o.state, o.part, o.revision, str(o.qty), o.lot or "-", o.due or "-", o.issued_at[:10],
             o.issued_by, o.quote or "-") for o in orders]
    lines = _table(("number", "state", "part", "rev", "qty", "lot", "due", "issued", "by", "quote"), rows)
    lines += [_safe(f"{o.number} void: {o.void_reason}") for o in orders if o.state == "void"]
    return "\n".join(lines)


def _quotes_table(quotes: list[QuoteEntry]) -> str:
    rows = [(q.number, q.state, q.part, q.revision, q.customer or "-", q.valid_until or "-", q.issued_at[:10],
             q.issued_by) for q in quotes]
    lines = _table(("number", "state", "part", "rev", "customer", "valid until", "issued", "by"), rows)
    lines += [_safe(f"{q.number} void: {q.void_reason}") for q in quotes if q.state == "void"]
    return "\n".join(lines)


@app.command("list")
def list_orders(
    part: str | None = typer.Option(None, "--part", help="Only this part."),
    revision: str | None = typer.Option(None, "--revision", help="Only this revision."),
    state: str | None = typer.Option(None, "--state", help=f"Only this state: {', '.join(STATES)} "
                                                           f"(quotes: {', '.join(QUOTE_STATES)})."),
    since: str | None = typer.Option(None, "--since", help="Issued on or after this date (YYYY-MM-DD)."),
    quotes_only: bool = typer.Option(False, "--quotes", help="Only quotes."),
    orders_only: bool = typer.Option(False, "--orders", help="Only work orders."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON (with the register used)."),
    as_csv: bool = typer.Option(False, "--csv", help="Print work orders as CSV."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """List work orders and quotes, oldest first."""
    def action() -> None:
        if as_json and as_csv:
            raise SpecError("choose one of --json and --csv")
        if quotes_only and orders_only:
            raise SpecError("choose one of --quotes and --orders")
        if as_csv and quotes_only:
            raise SpecError("--csv exports work orders; use --json for quotes")
        where = _locate(register, catalog)
        want_orders, want_quotes = not quotes_only, not orders_only and not as_csv
        with _open(where, verbose) as reg:
            orders = reg.list(part=part, revision=revision, state=state, since=since) if want_orders else []
            quotes = reg.list_quotes(part=part, revision=revision, state=state, since=since) if want_quotes else []
        if as_json:
            typer.echo(json.dumps({"register": where.to_dict(), "orders": [o.to_dict() for o in orders],
                                   "quotes": [q.to_dict() for q in quotes]}, indent=2))
        elif as_csv:
            typer.echo(escape_controls(orders_csv(orders), keep_newlines=True), nl=False)   # CSV's own line breaks
        else:
            blocks = []
            if want_orders:
                blocks.append("work orders\n" + _orders_table(orders) if orders else "no work orders match")
            if want_quotes:
                blocks.append("quotes\n" + _quotes_table(quotes) if quotes else "no quotes match")
            typer.echo("\n\n".join(blocks))
    _run(action)


def _find(reg: Register, number: str) -> tuple[str, Order | QuoteEntry]:
    """A number is a work order's or a quote's; look in both (orders first)."""
    try:
        return "order", reg.get(number)
    except SpecError:
        pass
    try:
        return "quote", reg.get_quote(number)
    except SpecError:
        raise SpecError(f"no work order or quote {number} in the register", file=reg.shown) from None


@app.command("show")
def show(
    number: str = typer.Argument(..., help="Work-order or quote number."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Show one work order or quote with its files and its history of changes."""
    def action() -> None:
        where = _locate(register, catalog)
        with _open(where, verbose) as reg:
            record, item = _find(reg, number)
            events = reg.history(number) if record == "order" else reg.quote_history(number)
        if as_json:
            data = {"record": record, **item.to_dict(), "history": [e.to_dict() for e in events],
                    "register": where.to_dict()}
            typer.echo(json.dumps(data, indent=2))
            return
        fields = [("number", item.number), ("record", "work order" if record == "order" else "quote"),
                  ("state", item.state), ("part", item.part), ("revision", item.revision),
                  ("fingerprint", item.fingerprint)]
        if isinstance(item, Order):
            fields += [("quantity", str(item.qty)), ("lot", item.lot or "-"), ("due", item.due or "-"),
                       ("fulfils", item.quote or "-")]
        else:
            fields += [("customer", item.customer or "-"), ("valid until", item.valid_until or "-")]
        fields += [("issued at", item.issued_at), ("issued by", item.issued_by)]
        if item.state == "void":
            fields.append(("void reason", item.void_reason or "-"))
        for label, value in fields:
            typer.echo(f"{label + ':':13} {_safe(value)}")
        typer.echo("files:" + ("" if item.files else "        none recorded"))
        for path in item.files:
            typer.echo(f"  {_safe(path)}")
        typer.echo("history:")
        for e in events:
            change = f"{e.from_state} -> {e.to_state}" if e.from_state else e.to_state
            note = "  CORRECTION" if e.kind == "correction" else ""
            typer.echo(_safe(f"  {e.at}  {change}{note}  by {e.by or '-'}" + (f"  ({e.why})" if e.why else "")))
    _run(action)


@app.command("set")
def set_state(
    number: str = typer.Argument(..., help="Work-order or quote number."),
    state: str = typer.Argument(..., help=f"New state: {', '.join(STATES)}; quotes: {', '.join(QUOTE_STATES)}."),
    why: str | None = typer.Option(None, "--why", help="Reason (required for void and for a correction)."),
    correct: bool = typer.Option(False, "--correct",
                                 help="Put a mistake right: any other state, recorded as a correction with --why."),
    by: str | None = typer.Option(None, "--by", metavar="NAME", help="Who makes the change (default: login name)."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Move a work order (issued -> in-work -> complete, or void with --why) or a quote
    (issued -> accepted | declined | void); --correct --why REASON for anything else."""
    def action() -> None:
        checked_why = check_free_text(why, "--why", required=False)      # before the register is opened
        checked_by = check_name(by)
        where = _locate(register, catalog)
        with _open(where, verbose, write=True) as reg:
            record, item = _find(reg, number)
            if record == "order":
                after: Order | QuoteEntry = reg.set_state(number, state, why=checked_why, by=checked_by,
                                                         correction=correct)
            else:
                after = reg.set_quote_state(number, state, why=checked_why, by=checked_by, correction=correct)
        typer.echo(_safe(f"{after.number}: {item.state} -> {after.state}") + (" (correction)" if correct else ""))
    _run(action)


@app.command("stale")
def stale(
    void: bool = typer.Option(False, "--void", help="Void the numbers listed as voidable, with the reason."),
    older_than: float | None = typer.Option(
        None, "--older-than", metavar="HOURS",
        help="Count a number whose process cannot be checked (another machine) as voidable after this many hours."),
    why: str | None = typer.Option(None, "--why", help="Reason recorded with --void (default: says what was found)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Review numbers taken but never finished (issued, no files): whose process is gone, which may be voided."""
    from specgen.register import STALE_UNCHECKABLE_S

    def action() -> None:
        if older_than is not None and not older_than >= 0:
            raise SpecError(f"expected hours of 0 or more, got {older_than}", path="--older-than")
        reason = check_free_text(why, "--why", required=False)
        bound = STALE_UNCHECKABLE_S if older_than is None else older_than * 3600.0
        where = _locate(register, catalog)
        with _open(where, verbose, write=void) as reg:
            found = reg.stale(uncheckable_after_s=bound)
            voided = reg.void_stale(uncheckable_after_s=bound, reason=reason) if void else []
        if as_json:
            typer.echo(json.dumps({"register": where.to_dict(), "stale": [s.to_dict() for s in found],
                                   "voided": voided}, indent=2))
            return
        if not found:
            typer.echo("no unfinished numbers")
            return
        rows = [(s.number, s.record, s.part, s.issued_at, s.issued_by, f"{s.age_s / 3600:.1f} h", s.process,
                 "yes" if s.voidable else "no") for s in found]
        typer.echo("\n".join(_table(("number", "record", "part", "issued at", "by", "age", "process", "voidable"),
                                    rows)))
        if void:
            typer.echo(_safe(f"voided {len(voided)}: {', '.join(voided) or '-'}"))
    _run(action)


@app.command("where-used")
def where_used(
    part: str = typer.Argument(..., help="Part number (with --material: a material lot such as a wire reel)."),
    revision: str | None = typer.Option(None, "--revision", help="Only this revision."),
    material: bool = typer.Option(False, "--material",
                                  help="The argument is a material lot (wire reel, core batch, tape roll): list the "
                                       "work orders and serials the station recorded it against."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Traceability: the work orders and lots built from a part or one revision (voids left out); with
    --material, the work orders and serials that used a material lot."""
    def action() -> None:
        where = _locate(register, catalog)
        if material:
            from .station import material_use

            with _open(where, verbose) as reg:
                typer.echo(material_use(reg, part, as_json))
            return
        with _open(where, verbose) as reg:
            orders = reg.where_used(part, revision)
        if as_json:
            typer.echo(json.dumps({"register": where.to_dict(), "orders": [o.to_dict() for o in orders]}, indent=2))
            return
        if not orders:
            which = f"{part} revision {revision}" if revision else part
            typer.echo(_safe(f"no work orders used {which}"))
            return
        by_revision: dict[str, list[Order]] = {}
        for order in orders:
            by_revision.setdefault(order.revision, []).append(order)
        for rev, group in by_revision.items():
            total = sum(o.qty for o in group)
            plural = "" if len(group) == 1 else "s"
            typer.echo(_safe(f"{part} revision {rev}: {len(group)} work order{plural}, {total} pieces"))
            for o in group:
                typer.echo(_safe(f"  {o.number}  lot {o.lot or '-'}  qty {o.qty}  {o.state}  "
                                 f"issued {o.issued_at[:10]}  fingerprint {o.fingerprint}"))
    _run(action)


@app.command("export")
def export(
    csv_file: Path = typer.Option(..., "--csv", help="CSV file to write (replaced atomically)."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Export every work order to a CSV file."""
    def action() -> None:
        where = _locate(register, catalog)
        with _open(where, verbose) as reg:
            count = reg.export_csv(csv_file)
        typer.echo(f"wrote {count} work orders to {csv_file}")
    _run(action)


@app.command("upgrade")
def upgrade(
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(), verbose: bool = _verbose_opt(),
) -> None:
    """Bring a register written by an older specgen to this version's schema (reading never does)."""
    from specgen.register import SCHEMA_VERSION

    def action() -> None:
        where = _locate(register, catalog)
        with _open(where, verbose, write=True):
            pass
        typer.echo(f"register {where.shown} is at schema version {SCHEMA_VERSION}")
    _run(action)
