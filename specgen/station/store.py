"""The station's entries in the shop's register: append, read, and where a lot stands.

Everything goes through :meth:`Register.write_work` / :meth:`Register.read_work`, so both back ends
(SQLite, PostgreSQL) keep the entries the same way: one serialised write transaction per action, an
entry number one above the last, nothing ever updated or deleted.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from typing import Any

from specgen.errors import SpecError
from specgen.register import Order, Register
from specgen.register.model import iso, now_utc, one_line

from .model import COLUMNS, DISPOSITIONS, ENTRY_KINDS, Entry, PieceState, Verdict

_SELECT = "SELECT " + ", ".join(COLUMNS) + " FROM station_entries"
MAX_TEXT = 200


def _text(value: object, what: str, *, required: bool = True, limit: int = MAX_TEXT) -> str | None:
    text = one_line(value, limit) if value is not None else ""
    if not text.strip():
        if required:
            raise SpecError(f"{what} is required")
        return None
    return text


class StationStore:
    """The station's view of one open register. Thin: every rule a screen or a command needs is here."""

    def __init__(self, register: Register):
        self.register = register

    # --- writing ------------------------------------------------------------------------------

    def _insert(self, db: Any, number: str, kind: str, values: dict[str, Any], by: str, at: str) -> int:
        if kind not in ENTRY_KINDS:
            raise SpecError(f"unknown station entry kind {kind!r}")
        entry_id = int(db.execute("SELECT COALESCE(MAX(entry_id), 0) + 1 FROM station_entries").fetchone()[0])
        row = {"entry_id": entry_id, "number": number, "kind": kind, **values, "by_whom": by, "at": at}
        names = ", ".join(row)
        marks = ", ".join("?" for _ in row)
        db.execute(f"INSERT INTO station_entries ({names}) VALUES ({marks})", tuple(row.values()))
        return entry_id

    def _check_order(self, db: Any, number: str) -> None:
        row = db.execute("SELECT state FROM orders WHERE number = ?", (number,)).fetchone()
        if row is None:
            raise SpecError(f"no work order {number} in the register", file=self.register.shown)
        if row[0] == "void":
            raise SpecError(f"work order {number} is void: nothing can be recorded against it", file=self.register.shown)

    def _check_replaces(self, db: Any, number: str, kind: str, replaces: int) -> None:
        row = db.execute("SELECT number, kind FROM station_entries WHERE entry_id = ?", (replaces,)).fetchone()
        if row is None or row[0] != number or row[1] != kind:
            raise SpecError(f"entry {replaces} is not a {kind} of work order {number}")
        later = db.execute("SELECT entry_id FROM station_entries WHERE replaces = ?", (replaces,)).fetchone()
        if later is not None:
            raise SpecError(f"entry {replaces} was already replaced by entry {later[0]}; correct that one")

    def append(self, number: str, kind: str, *, item: str, by: str, replaces: int | None = None,
               reason: str | None = None, source: str = "station", **values: Any) -> Entry:
        """Append one entry (a correction when ``replaces`` is given, which needs ``reason``)."""
        by_ = _text(by, "who")
        assert by_ is not None
        reason_ = _text(reason, "the reason for a correction", required=replaces is not None)
        at = iso(now_utc())

        def work(db: Any) -> int:
            self._check_order(db, number)
            if replaces is not None:
                self._check_replaces(db, number, kind, replaces)
            return self._insert(db, number, kind, {"item": item, "replaces": replaces, "reason": reason_,
                                                   "source": source, **values}, by_, at)

        entry_id = self.register.write_work(work)
        return self.entry(entry_id)

    def sign_off(self, number: str, step: int, heading: str, by: str) -> Entry:
        """The winder signs step ``step`` off (once; a mistaken sign-off is withdrawn, never edited)."""
        current = self.signoffs(number)
        if str(step) in current:
            raise SpecError(f"step {step} of {number} is already signed off by {current[str(step)].by}")
        entry = self.append(number, "signoff", item=str(step), label=_text(heading, "step heading"), action="signed",
                            by=by)
        if self.register.state_of(number) == "issued":      # the first sign-off puts the order in work
            self.register.set_state(number, "in-work", by=by)
        return entry

    def withdraw_sign_off(self, number: str, step: int, by: str, reason: str) -> Entry:
        current = self.signoffs(number)
        if str(step) not in current:
            raise SpecError(f"step {step} of {number} is not signed off")
        old = current[str(step)]
        return self.append(number, "signoff", item=str(step), label=old.label, action="withdrawn", by=by,
                           replaces=old.entry_id, reason=reason)

    def record_readings(self, number: str, serial: str, verdicts: Sequence[Verdict], by: str, *,
                        reason: str | None = None, source: str = "station") -> list[Entry]:
        """Store one serial's readings in one transaction. A test that already has a reading is
        replaced by the new one: after a retest or rework disposition that is the retest itself,
        otherwise it is a correction and needs ``reason``."""
        return self.record_many(number, [(serial, verdicts)], by, reason=reason, source=source)

    def record_many(self, number: str, pieces: Sequence[tuple[str, Sequence[Verdict]]], by: str, *,
                    reason: str | None = None, source: str = "station", where: Sequence[str] = ()) -> list[Entry]:
        """Several serials' readings in one transaction: all stored or none (a CSV import).
        ``where``: for each piece, how to name it in an error (``file:line``)."""
        by_ = _text(by, "who")
        assert by_ is not None
        reason_ = _text(reason, "reason", required=False)
        at = iso(now_utc())

        def work(db: Any) -> list[int]:
            self._check_order(db, number)
            ids: list[int] = []
            for i, (serial, verdicts) in enumerate(pieces):
                try:
                    ids += self._record(db, number, serial, verdicts, by_, at, reason_, source)
                except SpecError as err:
                    if i < len(where):
                        raise SpecError(f"{where[i]}: {err}") from None
                    raise
            return ids

        ids = self.register.write_work(work)
        return [self.entry(i) for i in ids]

    def record_batch(self, items: Sequence[tuple[str, str, Sequence[Verdict], str, str | None]]
                     ) -> list[list[int] | SpecError]:
        """Several tablets' posts (number, serial, verdicts, who, reason) in one transaction, each in a
        savepoint of its own: one post's refusal (its SpecError, in its place in the answer) leaves the
        others stored. One commit for the lot is what lets 20 tablets post at once (group commit)."""
        at = iso(now_utc())

        def work(db: Any) -> list[list[int] | SpecError]:
            out: list[list[int] | SpecError] = []
            for number, serial, verdicts, by, reason in items:
                db.execute("SAVEPOINT station_post")
                try:
                    by_ = _text(by, "who")
                    assert by_ is not None
                    self._check_order(db, number)
                    out.append(self._record(db, number, serial, verdicts, by_, at,
                                            _text(reason, "reason", required=False), "station"))
                    db.execute("RELEASE SAVEPOINT station_post")
                except SpecError as err:
                    db.execute("ROLLBACK TO SAVEPOINT station_post")
                    db.execute("RELEASE SAVEPOINT station_post")
                    out.append(err)
            return out

        result: list[list[int] | SpecError] = self.register.write_work(work)
        return result

    def _record(self, db: Any, number: str, serial: str, verdicts: Sequence[Verdict], by: str, at: str,
                reason: str | None, source: str) -> list[int]:
        serial_ = _text(serial, "serial")
        assert serial_ is not None
        state = self._piece(self._rows(db, number, serial_), serial_)
        if state.status == "scrap":
            raise SpecError(f"serial {serial_} of {number} was scrapped; it takes no more readings")
        again = state.disposition.action if state.disposition is not None else None
        ids = []
        for v in verdicts:
            old = state.readings.get(v.column.key)
            why = reason
            if old is not None and why is None:
                if again in ("retest", "rework") and state.disposition is not None \
                        and state.disposition.entry_id > old.entry_id:
                    why = f"{again} after disposition {state.disposition.entry_id}"
                else:
                    raise SpecError(f"serial {serial_} already has {v.column.label}; a changed reading "
                                    "needs a reason (or a retest disposition first)")
            ids.append(self._insert(db, number, "reading", {
                "serial": serial_, "item": v.column.key, "label": v.column.label, "value_si": v.value_si,
                "temp_c": v.temp_c, "judged_si": v.judged_si, "nominal_si": v.column.nominal,
                "low_si": v.column.low, "high_si": v.column.high, "unit": v.column.unit, "verdict": v.verdict,
                "replaces": old.entry_id if old is not None else None, "reason": why if old is not None else None,
                "source": source}, by, at))
        return ids

    def dispose(self, number: str, serial: str, action: str, reason: str, by: str) -> Entry:
        """A failing piece's disposition: retest, rework or scrap, always with a reason."""
        action = str(action).strip().lower()
        if action not in DISPOSITIONS:
            raise SpecError(f"disposition must be one of {', '.join(DISPOSITIONS)}, got {action!r}")
        reason_ = _text(reason, "the reason for a disposition")
        piece = self.piece(number, serial)
        if piece.status not in ("needs-disposition", "fail") and action != "scrap":
            raise SpecError(f"serial {serial} of {number} has no failing reading to dispose of")
        return self.append(number, "disposition", item=",".join(piece.failed_keys) or "piece", serial=serial,
                           action=action, reason=reason_, by=by)

    def record_material(self, number: str, item: str, material_kind: str, lot: str, by: str,
                        replaces: int | None = None, reason: str | None = None) -> Entry:
        """The picker records the lot (wire reel, core batch, tape roll) a pull-list line was taken from."""
        lot_ = _text(lot, "lot", limit=60)
        return self.append(number, "material", item=_text(item, "material") or "", label=material_kind, lot=lot_,
                           by=by, replaces=replaces, reason=reason)

    # --- reading ------------------------------------------------------------------------------

    @staticmethod
    def _rows(db: Any, number: str, serial: str | None = None, kind: str | None = None) -> list[Entry]:
        where, params = ["number = ?"], [number]
        if serial is not None:
            where.append("serial = ?")
            params.append(serial)
        if kind is not None:
            where.append("kind = ?")
            params.append(kind)
        rows = db.execute(f"{_SELECT} WHERE {' AND '.join(where)} ORDER BY entry_id", tuple(params)).fetchall()
        return [Entry(*row) for row in rows]

    def entry(self, entry_id: int) -> Entry:
        row = self.register.read_work(lambda db: db.execute(f"{_SELECT} WHERE entry_id = ?", (entry_id,)).fetchone())
        if row is None:
            raise SpecError(f"no station entry {entry_id}")
        return Entry(*row)

    def entries(self, number: str, kind: str | None = None, serial: str | None = None) -> list[Entry]:
        """Every entry of a work order (replaced ones too), oldest first."""
        rows: list[Entry] = self.register.read_work(lambda db: self._rows(db, number, serial, kind))
        return rows

    @staticmethod
    def current(entries: Iterable[Entry]) -> list[Entry]:
        """The entries no later entry replaces."""
        items = list(entries)
        replaced = {e.replaces for e in items if e.replaces is not None}
        return [e for e in items if e.entry_id not in replaced]

    def signoffs(self, number: str) -> dict[str, Entry]:
        """Step (as text) -> its standing sign-off."""
        return {e.item: e for e in self.current(self.entries(number, "signoff")) if e.action == "signed"}

    def materials(self, number: str) -> list[Entry]:
        return self.current(self.entries(number, "material"))

    @classmethod
    def _piece(cls, rows: list[Entry], serial: str, expected: Sequence[str] = ()) -> PieceState:
        current = cls.current(rows)
        readings = {e.item: e for e in current if e.kind == "reading"}
        disposals = [e for e in current if e.kind == "disposition"]
        last = disposals[-1] if disposals else None
        failing = [e for e in readings.values() if e.verdict == "fail"]
        if any(d.action == "scrap" for d in disposals):
            status = "scrap"
        elif not readings:
            status = "untested"
        elif failing:
            newest_fail = max(e.entry_id for e in failing)
            disposed = last is not None and last.entry_id > newest_fail
            status = (last.action or "retest") if disposed and last is not None else "needs-disposition"
        elif any(key not in readings for key in expected):
            status = "partial"
        else:
            status = "pass"
        return PieceState(serial, readings, last, status)

    def piece(self, number: str, serial: str, expected: Sequence[str] = ()) -> PieceState:
        """Where one serial stands; ``expected``: the keys of every test of the lot (a piece with some
        of them unread is ``partial``, not ``pass``)."""
        return self._piece(self.entries(number, serial=serial), serial, expected)

    def pieces(self, number: str, serials: Sequence[str], expected: Sequence[str] = ()) -> list[PieceState]:
        """Every serial of the lot, in order, from one read of the register."""
        rows = [e for e in self.entries(number) if e.serial is not None]
        by_serial: dict[str, list[Entry]] = {}
        for e in rows:
            by_serial.setdefault(e.serial or "", []).append(e)
        return [self._piece(by_serial.get(s, []), s, expected) for s in serials]

    def where_used(self, lot: str) -> list[tuple[Order, list[Entry], list[str]]]:
        """Recall: every work order that took material from ``lot`` (a reel, batch or roll), the
        material entries naming it, and the serials of that order that have station records."""
        lot = str(lot).strip()

        def work(db: Any) -> list[tuple[str, list[Entry], list[str]]]:
            rows = [Entry(*r) for r in db.execute(f"{_SELECT} WHERE kind = 'material' ORDER BY entry_id").fetchall()]
            hits: dict[str, list[Entry]] = {}
            for e in self.current(rows):
                if e.lot is not None and e.lot.casefold() == lot.casefold():
                    hits.setdefault(e.number, []).append(e)
            out = []
            for number, used in hits.items():
                serials = [r[0] for r in db.execute(
                    "SELECT DISTINCT serial FROM station_entries WHERE number = ? AND serial IS NOT NULL",
                    (number,)).fetchall()]
                out.append((number, used, sorted(serials, key=_serial_key)))
            return out

        found = self.register.read_work(work)
        return [(self.register.get(number), used, serials) for number, used, serials in found]

    def readings_of_part(self, part: str) -> list[tuple[Order, Entry]]:
        """The current readings of every lot of ``part`` (void orders left out), oldest lot first."""
        out = []
        for order in self.register.where_used(part):
            for e in self.current(self.entries(order.number, "reading")):
                out.append((order, e))
        return out


def _serial_key(serial: str) -> tuple[int, str]:
    return (int(serial), serial) if serial.isdigit() else (1 << 30, serial)


def serials_of(order: Order) -> list[str]:
    """The serials of a lot: 1 .. quantity, as the printed test record numbers them."""
    return [str(i) for i in range(1, order.qty + 1)]
