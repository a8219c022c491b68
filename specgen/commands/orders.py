"""``specgen orders ...``: thin commands over :class:`specgen.register.Register`.

Mounted by the root CLI with ``app.add_typer(orders.app)``. Only light imports here: reading the
register never loads the document renderer.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from pathlib import Path

import typer

from specgen.errors import SpecError
from specgen.register import STATES, Order, Register, default_register_path, orders_csv

app = typer.Typer(
    name="orders",
    help="The work-order register: list, show, change state, trace where a revision was used, export.",
    no_args_is_help=True,
)

_REGISTER_HELP = ("Register file (default: $SPECGEN_REGISTER, else specgen-register.sqlite "
                  "in the current folder).")


def _open(register: Path | None) -> Register:
    # reading commands never create a register: a mistyped path must not look like an empty one
    return Register.open(default_register_path(explicit=register), create=False)


def _run(action: Callable[[], None]) -> None:
    """Run a command body; a user's mistake is one line on stderr and exit status 2."""
    try:
        action()
    except SpecError as err:
        typer.echo(str(err), err=True)
        raise typer.Exit(2) from None


def _table(orders: list[Order]) -> str:
    headers = ("number", "state", "part", "rev", "qty", "lot", "due", "issued", "by")
    rows = [(o.number, o.state, o.part, o.revision, str(o.qty), o.lot or "-", o.due or "-",
             o.issued_at[:10], o.issued_by) for o in orders]
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h)
              for i, h in enumerate(headers)]
    lines = ["  ".join(h.ljust(w) for h, w in zip(headers, widths)).rstrip()]
    for row in rows:
        lines.append("  ".join(c.ljust(w) for c, w in zip(row, widths)).rstrip())
    for order in orders:
        if order.state == "void":
            lines.append(f"{order.number} void: {order.void_reason}")
    return "\n".join(lines)


@app.command("list")
def list_orders(
    part: str | None = typer.Option(None, "--part", help="Only this part."),
    revision: str | None = typer.Option(None, "--revision", help="Only this revision."),
    state: str | None = typer.Option(None, "--state", help=f"Only this state: {', '.join(STATES)}."),
    since: str | None = typer.Option(None, "--since", help="Issued on or after this date (YYYY-MM-DD)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    as_csv: bool = typer.Option(False, "--csv", help="Print CSV."),
    register: Path | None = typer.Option(None, "--register", help=_REGISTER_HELP),
) -> None:
    """List work orders, oldest first."""
    def action() -> None:
        if as_json and as_csv:
            raise SpecError("choose one of --json and --csv")
        with _open(register) as reg:
            orders = reg.list(part=part, revision=revision, state=state, since=since)
        if as_json:
            typer.echo(json.dumps([o.to_dict() for o in orders], indent=2))
        elif as_csv:
            typer.echo(orders_csv(orders), nl=False)
        elif not orders:
            typer.echo("no work orders match")
        else:
            typer.echo(_table(orders))
    _run(action)


@app.command("show")
def show(
    number: str = typer.Argument(..., help="Work-order number."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: Path | None = typer.Option(None, "--register", help=_REGISTER_HELP),
) -> None:
    """Show one work order with its files and state history."""
    def action() -> None:
        with _open(register) as reg:
            order = reg.get(number)
            events = reg.history(number)
        if as_json:
            data = order.to_dict()
            data["history"] = [{"at": e.at, "from": e.from_state, "to": e.to_state, "why": e.why}
                               for e in events]
            typer.echo(json.dumps(data, indent=2))
            return
        fields = [("number", order.number), ("state", order.state), ("part", order.part),
                  ("revision", order.revision), ("fingerprint", order.fingerprint),
                  ("quantity", str(order.qty)), ("lot", order.lot or "-"), ("due", order.due or "-"),
                  ("issued at", order.issued_at), ("issued by", order.issued_by)]
        if order.state == "void":
            fields.append(("void reason", order.void_reason or "-"))
        for label, value in fields:
            typer.echo(f"{label + ':':13} {value}")
        typer.echo("files:" + ("" if order.files else "        none recorded"))
        for path in order.files:
            typer.echo(f"  {path}")
        typer.echo("history:")
        for e in events:
            change = f"{e.from_state} -> {e.to_state}" if e.from_state else e.to_state
            typer.echo(f"  {e.at}  {change}" + (f"  ({e.why})" if e.why else ""))
    _run(action)


@app.command("set")
def set_state(
    number: str = typer.Argument(..., help="Work-order number."),
    state: str = typer.Argument(..., help=f"New state: {', '.join(STATES)}."),
    why: str | None = typer.Option(None, "--why", help="Reason (required for void)."),
    register: Path | None = typer.Option(None, "--register", help=_REGISTER_HELP),
) -> None:
    """Move a work order to another state (issued -> floor -> complete, or void with --why)."""
    def action() -> None:
        with _open(register) as reg:
            before = reg.get(number).state
            after = reg.set_state(number, state, why=why)
        typer.echo(f"{after.number}: {before} -> {after.state}")
    _run(action)


@app.command("where-used")
def where_used(
    part: str = typer.Argument(..., help="Part number."),
    revision: str | None = typer.Option(None, "--revision", help="Only this revision."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: Path | None = typer.Option(None, "--register", help=_REGISTER_HELP),
) -> None:
    """Traceability: the work orders and lots built from a part or one revision (voids left out)."""
    def action() -> None:
        with _open(register) as reg:
            orders = reg.where_used(part, revision)
        if as_json:
            typer.echo(json.dumps([o.to_dict() for o in orders], indent=2))
            return
        if not orders:
            which = f"{part} revision {revision}" if revision else part
            typer.echo(f"no work orders used {which}")
            return
        by_revision: dict[str, list[Order]] = {}
        for order in orders:
            by_revision.setdefault(order.revision, []).append(order)
        for rev, group in by_revision.items():
            total = sum(o.qty for o in group)
            plural = "" if len(group) == 1 else "s"
            typer.echo(f"{part} revision {rev}: {len(group)} work order{plural}, {total} pieces")
            for o in group:
                typer.echo(f"  {o.number}  lot {o.lot or '-'}  qty {o.qty}  {o.state}  "
                           f"issued {o.issued_at[:10]}  fingerprint {o.fingerprint}")
    _run(action)


@app.command("export")
def export(
    csv_file: Path = typer.Option(..., "--csv", help="CSV file to write (replaced atomically)."),
    register: Path | None = typer.Option(None, "--register", help=_REGISTER_HELP),
) -> None:
    """Export every work order to a CSV file."""
    def action() -> None:
        with _open(register) as reg:
            count = reg.export_csv(csv_file)
        typer.echo(f"wrote {count} work orders to {csv_file}")
    _run(action)
