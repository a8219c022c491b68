"""``specgen serve`` (the bench and test-station web app) and ``specgen station ...`` (its records
from the command line: measured against predicted, where a material lot went, CSV import/export,
the PDF test report). Thin: everything is in :mod:`specgen.station`.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import typer

from specgen.errors import SpecError

from .orders import catalog_opt as _catalog_opt
from .orders import locate as _locate
from .orders import register_opt as _register_opt
from .orders import run_guarded as _run

app = typer.Typer(name="station", no_args_is_help=True,
                  help="The bench and test station's records: measured against predicted, material lots, CSV, PDF.")


def _parts_opt() -> Any:
    return typer.Option(None, "--parts", metavar="DIR",
                        help="Folder of the parts' specs (repeatable; default: parts/ at the shop's root, "
                             "else the current folder).")


def _parts_dirs(parts: list[Path] | None) -> tuple[Path, ...]:
    if parts:
        for p in parts:
            if not p.is_dir():
                raise SpecError("parts folder does not exist", file=str(p), path="--parts")
        return tuple(parts)
    from specgen.register import shop_root

    found = shop_root()
    for candidate in ((found[0] / "parts") if found else None, Path.cwd() / "parts"):
        if candidate is not None and candidate.is_dir():
            return (candidate,)
    return (Path.cwd(),)


def serve(
    host: str = typer.Option("127.0.0.1", "--host", help="Address to listen on (beyond 127.0.0.1 needs --users)."),
    port: int = typer.Option(8019, "--port", help="Port to listen on."),
    users: Path | None = typer.Option(None, "--users", metavar="FILE",
                                      help="The station's users file (names, roles, scrypt hashes); without it "
                                           "the station is read-only."),
    add_user: str | None = typer.Option(None, "--add-user", metavar="NAME",
                                        help="Add (or reset) a user in --users and stop; asks for the password."),
    role: str = typer.Option("tester", "--role", help="Role of --add-user: winder, tester or engineer."),
    parts: list[Path] | None = _parts_opt(),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(),
) -> None:
    """Start the bench and test-station web app on the shop's register (127.0.0.1:8019 by default)."""
    def action() -> None:
        from specgen.station.app import StationConfig, check_listening, create_app
        from specgen.station.users import add_user as add
        from specgen.station.users import load_users

        if add_user:
            if users is None:
                raise SpecError("--add-user needs --users FILE")
            password = typer.prompt(f"password for {add_user}", hide_input=True, confirmation_prompt=True)
            add(users, add_user, role, password)
            typer.echo(f"{add_user} ({role}) written to {users}")
            return
        where = _locate(register, catalog)
        config = StationConfig(register=where.target, parts_dirs=_parts_dirs(parts), users_file=users,
                               catalog=catalog, host=host)
        check_listening(config, load_users(users) if users else {})
        import uvicorn

        application = create_app(config)
        typer.echo(f"station on http://{host}:{port}/  register {where.shown}  parts "
                   + ", ".join(str(p) for p in config.parts_dirs))
        uvicorn.run(application, host=host, port=port, log_level="warning")
    _run(action)


@app.command("compare")
def compare(
    part: str = typer.Argument(..., help="Part number."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    parts: list[Path] | None = _parts_opt(),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(),
) -> None:
    """Measured against predicted for a part across its lots: mean, spread, yield, consistent offsets."""
    def action() -> None:
        from specgen import present
        from specgen.catalog.loader import load_catalog
        from specgen.register import Register
        from specgen.station.compare import compare_part
        from specgen.station.lots import PartsLibrary
        from specgen.station.store import StationStore

        where = _locate(register, catalog)
        library = PartsLibrary(list(_parts_dirs(parts)), load_catalog(catalog))
        with Register.open(where.target, read_only=True) as reg:
            result = compare_part(StationStore(reg), part, library)
        if as_json:
            typer.echo(json.dumps(result.to_dict(), indent=2, allow_nan=False))
            return
        if not result.quantities:
            typer.echo(f"no readings of {part} in the register")
            return
        rows = [(q.label, str(q.n), q.predicted_text, q.mean_text, q.offset_text, q.spread_text, q.range_text,
                 q.limits_text, q.yield_text) for q in result.quantities]
        typer.echo(f"{part}: {len(result.lots)} lot(s) {', '.join(result.lots)}; DCR compared at 20 °C")
        typer.echo(present.table(("test", "n", "predicted", "mean", "offset", "spread", "range", "limits", "yield"),
                                 rows))
        for flag in result.flags:
            typer.echo(f"NOTE {flag}")
    _run(action)


def material_use(reg: Any, lot: str, as_json: bool) -> str:
    """The answer to "which work orders and serials used this lot?" as text or JSON."""
    from specgen.station.store import StationStore

    found = StationStore(reg).where_used(lot)
    if as_json:
        return json.dumps({"lot": lot, "orders": [
            {**o.to_dict(), "materials": [e.item for e in used], "serials_tested": serials}
            for o, used, serials in found]}, indent=2)
    if not found:
        return f"no work order recorded material lot {lot}"
    lines = []
    for o, used, serials in found:
        tested = f"; serials with records: {', '.join(serials)}" if serials else "; no serial tested yet"
        lines.append(f"{o.number}  {o.part} rev {o.revision}  lot {o.lot or '-'}  qty {o.qty} (serials 1-{o.qty})  "
                     f"{o.state}  used as {', '.join(e.item for e in used)}{tested}")
    return "\n".join(lines)


@app.command("where-used")
def where_used(
    lot: str = typer.Argument(..., help="A material lot: wire reel, core batch, tape roll (as on its label)."),
    as_json: bool = typer.Option(False, "--json", help="Print JSON."),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(),
) -> None:
    """Recall: which work orders and serials used a material lot (as `orders where-used LOT --material`)."""
    def action() -> None:
        from specgen.register import Register

        where = _locate(register, catalog)
        with Register.open(where.target, read_only=True) as reg:
            typer.echo(material_use(reg, lot, as_json))
    _run(action)


@app.command("export")
def export(
    number: str = typer.Argument(..., help="Work-order number."),
    csv_file: Path | None = typer.Option(None, "--csv", help="Write the lot's record as CSV here."),
    pdf_file: Path | None = typer.Option(None, "--pdf", help="Write the lot's test report as PDF here."),
    parts: list[Path] | None = _parts_opt(),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(),
) -> None:
    """Export one lot's record (CSV) or test report (PDF)."""
    def action() -> None:
        from specgen.atomic import write_atomic
        from specgen.catalog.loader import load_catalog
        from specgen.register import Register
        from specgen.station.lots import PartsLibrary
        from specgen.station.records import lot_csv, lot_pdf
        from specgen.station.store import StationStore

        if csv_file is None and pdf_file is None:
            raise SpecError("give --csv FILE, --pdf FILE or both")
        where = _locate(register, catalog)
        library = PartsLibrary(list(_parts_dirs(parts)), load_catalog(catalog))
        with Register.open(where.target, read_only=True) as reg:
            store = StationStore(reg)
            lot = library.lot(reg.get(number))
            if csv_file is not None:
                write_atomic(csv_file, lot_csv(store, lot))
                typer.echo(f"wrote {csv_file}")
            if pdf_file is not None:
                write_atomic(pdf_file, lot_pdf(store, lot))
                typer.echo(f"wrote {pdf_file}")
    _run(action)


@app.command("import")
def import_cmd(
    number: str = typer.Argument(..., help="Work-order number."),
    csv_file: Path = typer.Argument(..., help="Readings: serial, temp_c and one column per test."),
    by: str = typer.Option(..., "--by", metavar="NAME", help="Who took the readings."),
    parts: list[Path] | None = _parts_opt(),
    register: str | None = _register_opt(), catalog: Path | None = _catalog_opt(),
) -> None:
    """Import a tester's CSV of readings into a lot (all rows or none)."""
    def action() -> None:
        from specgen.catalog.loader import load_catalog
        from specgen.loading import read_text
        from specgen.register import Register
        from specgen.station.lots import PartsLibrary
        from specgen.station.records import import_readings
        from specgen.station.store import StationStore

        where = _locate(register, catalog)
        library = PartsLibrary(list(_parts_dirs(parts)), load_catalog(catalog))
        raw = read_text(csv_file, "readings file").encode("utf-8")
        with Register.open(where.target, create=False) as reg:
            count = import_readings(StationStore(reg), library.lot(reg.get(number)), raw, str(csv_file), by)
        typer.echo(f"{number}: {count} readings imported from {csv_file}")
    _run(action)


def register(root: typer.Typer) -> None:
    root.command("serve")(serve)
    root.add_typer(app)
