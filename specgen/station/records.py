"""A lot's record out of the register and readings into it: CSV export and import, the PDF test report.

The CSV goes through the project's one CSV writer (:func:`specgen.csvsafe.csv_text`), which writes a
cell a spreadsheet would run as a formula as plain text. An import is checked whole before anything is
stored, and then stored in one transaction: a file with one bad cell stores nothing.
"""

from __future__ import annotations

import csv
import io
from typing import Any

from specgen.errors import SpecError

from . import plan
from .lots import Lot
from .model import Column, Entry
from .store import StationStore

CSV_HEADER = ("work_order", "part", "revision", "serial", "entry", "kind", "test", "reading", "unit", "winding_temp_c",
              "at_20c", "low", "high", "verdict", "action", "lot", "reason", "replaces", "by", "at")
MAX_IMPORT_BYTES = 2_000_000
#: A piece's status as the report prints it (short enough for its column).
REPORT_STATUS = {"needs-disposition": "FAIL", "untested": "—"}
_SERIAL_NAMES = ("serial", "s/n", "sn", "serial number")
_TEMP_NAMES = ("temp_c", "temperature", "winding_temp_c", "winding temperature", "temp")


def _row(lot: Lot, e: Entry) -> list[Any]:
    o = lot.order
    base = [o.number, o.part, o.revision, e.serial or "", e.entry_id, e.kind]
    col = next((c for c in lot.columns if c.key == e.item), None) if e.kind == "reading" else None
    if col is None:
        return base + [e.label or e.item, "", "", "", "", "", "", e.verdict or "", e.action or "", e.lot or "",
                       e.reason or "", e.replaces or "", e.by, e.at]

    def shown(v: float | None, column: Column = col) -> str:
        return "" if v is None else plan.show_value(column, v).rsplit(" ", 1)[0]

    return base + [e.label, shown(e.value_si), col.shown_unit, "" if e.temp_c is None else e.temp_c,
                   shown(e.judged_si) if col.kind == "dcr" else "", shown(e.low_si), shown(e.high_si),
                   e.verdict, "", "", e.reason or "", e.replaces or "", e.by, e.at]


def lot_csv(store: StationStore, lot: Lot) -> str:
    """Every entry of the lot (corrected ones too, with what replaced them), in the typing units."""
    from specgen.csvsafe import csv_text

    return csv_text(CSV_HEADER, [_row(lot, e) for e in store.entries(lot.order.number)])


def _column_for(lot: Lot, name: str) -> str | None:
    wanted = " ".join(name.split()).casefold()
    for c in lot.columns:
        if wanted in (c.key.casefold(), c.label.casefold()):
            return c.key
    return None


def import_readings(store: StationStore, lot: Lot, raw: bytes, name: str, by: str) -> int:
    """Readings from a tester's CSV: a header row naming ``serial``, the winding temperature
    (``temp_c``) and tests by their station label ("DCR P") or key; one row per serial. Returns the
    number of readings stored."""
    if len(raw) > MAX_IMPORT_BYTES:
        raise SpecError(f"larger than {MAX_IMPORT_BYTES // 1_000_000} MB; is this a readings file?", file=name)
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise SpecError("not UTF-8 text; export the readings as CSV (UTF-8)", file=name) from None
    rows = list(csv.reader(io.StringIO(text)))
    if not rows:
        raise SpecError("empty file", file=name)
    header = [" ".join(h.split()).casefold() for h in rows[0]]
    serial_at = next((i for i, h in enumerate(header) if h in _SERIAL_NAMES), None)
    if serial_at is None:
        raise SpecError("no 'serial' column in the header row", file=name, line=1)
    temp_at = next((i for i, h in enumerate(header) if h in _TEMP_NAMES), None)
    keys: dict[int, str] = {}
    for i, h in enumerate(rows[0]):
        if i in (serial_at, temp_at) or not h.strip():
            continue
        key = _column_for(lot, h)
        if key is None:
            known = ", ".join(c.label for c in lot.columns)
            raise SpecError(f"column {h!r} is not a test of {lot.order.part} (tests: {known})", file=name, line=1)
        keys[i] = key
    pieces, where = [], []
    for line_no, row in enumerate(rows[1:], start=2):
        if not any(c.strip() for c in row):
            continue
        def cell(i: int | None, row: list[str] = row) -> str:
            return row[i].strip() if i is not None and i < len(row) else ""

        serial = cell(serial_at)
        if serial not in lot.serials:
            raise SpecError(f"serial {serial!r}: {lot.order.number} has serials 1 to {lot.order.qty}", file=name,
                            line=line_no)
        typed = {key: cell(i) for i, key in keys.items()}
        verdicts, errors = plan.judge_form(lot.columns, typed, cell(temp_at) if temp_at is not None else None)
        if errors:
            key, message = next(iter(errors.items()))
            raise SpecError(message, file=name, line=line_no, path=f"serial {serial}")
        pieces.append((serial, verdicts))
        where.append(f"{name}:{line_no}")
    if not pieces:
        raise SpecError("no readings below the header row", file=name)
    stored = store.record_many(lot.order.number, pieces, by, source=f"csv:{name[:80]}", where=where)
    return len(stored)


def lot_pdf(store: StationStore, lot: Lot) -> bytes:
    """The lot's test report: one row per piece with its current readings, status and disposition."""
    from specgen.documents.render import html_to_pdf, render_html

    pieces = store.pieces(lot.order.number, lot.serials, lot.keys)
    rows = []
    for p in pieces:
        cells = []
        for col in lot.columns:
            e = p.readings.get(col.key)
            cells.append({"text": plan.show_value(col, e.judged_si).rsplit(" ", 1)[0] if e and col.kind != "check"
                          else (plan.show_value(col, e.judged_si) if e else ""), "verdict": e.verdict if e else ""})
        temps = [e.temp_c for e in p.readings.values() if e.temp_c is not None]
        rows.append({"serial": p.serial, "status": REPORT_STATUS.get(p.status, p.status), "cells": cells,
                     "temp": f"{temps[-1]:g}" if temps else "",
                     "disposition": f"{p.disposition.action}: {p.disposition.reason}" if p.disposition else ""})
    materials = store.materials(lot.order.number)
    html = render_html("station/report.html", lot=lot, order=lot.order, rows=rows,
                       limits=[plan.limits_bare(c) for c in lot.columns], materials=materials,
                       alpha=f"{lot.design.tests.alpha_per_k:g}", signoffs=store.signoffs(lot.order.number))
    return html_to_pdf(html)
