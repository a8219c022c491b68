"""The register: work-order and quote numbers that are unique and gapless, traceable to a revision.

One interface, :class:`Register`, over two back ends (``sqlite.py``, the embedded default;
``postgres.py``, a server for a shop with many seats). The SQL here is plain standard SQL with ``?``
placeholders (no ``INSERT OR``, ``RETURNING``, ``ON CONFLICT``); what differs between the databases
(locking, recognising and migrating a register) lives in the back ends.

Numbering
---------
A number comes from a format, e.g. ``WO-{year}-{seq:05d}`` (``{seq}`` required). The sequence counts
per year (a format without ``{year}`` counts forever); work orders and quotes count separately.
Allocation is one serialised write transaction: read the counter, step it, insert the record and its
first event, commit. A transaction that dies (exception, SIGKILL, power loss) rolls back whole, so it
takes no number. A number already taken (an ERP number that fits the format, a row from an older
schema) is stepped past.

Unfinished numbers
------------------
The number is allocated before rendering, so it can be printed on the document. A failed render
voids it with the reason (:meth:`Register.issuing`). A process killed between allocation and
:meth:`Register.attach_files` leaves an ``issued`` number with no files; each allocation first voids
such numbers whose issuing process is known to be gone (same machine, same boot, process id no longer
running), and any older than :data:`~specgen.register.model.STALE_UNCHECKABLE_S` whose process cannot
be checked; :meth:`Register.stale` lists them for the planner. So every number is either recorded with
its files, voided with a reason, or still being issued.

States and corrections
----------------------
Work orders: ``issued`` -> ``in-work`` -> ``complete``; ``issued`` and ``in-work`` may be voided
(a reason is required). Quotes: ``issued`` -> ``accepted`` | ``declined`` | ``void``. Any other
move is a *correction*: it needs a reason and is recorded as one. Every change is a new event (who,
when, why, change or correction); nothing is edited in place, so the history is the record.
"""

from __future__ import annotations

import builtins
import contextlib
import datetime as _dt
import os
import time
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path
from typing import Any

import specgen.register.model as model
from specgen.errors import SpecError, escape_controls
from specgen.freetext import MAX_NAME_CHARS, MAX_NOTE_CHARS, check_free_text, check_name

from .model import Event, Order, QuoteEntry, StaleNumber, iso, now_utc, one_line
from .postgres import is_url

# Test-only hook: called with a stage name ("allocate:in-transaction", "allocate:committed", "retry",
# "write:before-commit") so the crash tests can stop a child at an exact point and SIGKILL it, and the
# concurrency test can count busy retries. Production code never sets it.
_hook: Callable[[str], None] | None = None


#: An open register sweeps for unfinished numbers before its first allocation and then at most this
#: often (a batch takes hundreds of numbers in a row; one sweep before them is enough).
SWEEP_INTERVAL_S = 60.0


def _call_hook(stage: str) -> None:
    if _hook is not None:
        _hook(stage)


class _Kind:
    """The tables and rules of one kind of numbered record (work orders or quotes)."""

    def __init__(self, name: str, table: str, files: str, events: str, columns: str, states: tuple[str, ...],
                 transitions: dict[str, frozenset[str]], scope_prefix: str, record: type):
        self.name, self.table, self.files, self.events = name, table, files, events
        self.columns, self.states, self.transitions = columns, states, transitions
        self.scope_prefix, self.record = scope_prefix, record


ORDERS = _Kind("work order", "orders", "order_files", "order_events",
               "number, part, revision, fingerprint, qty, lot, due, issued_at, issued_by, state, void_reason",
               model.STATES, model.TRANSITIONS, "", Order)
QUOTES = _Kind("quote", "quotes", "quote_files", "quote_events",
               "number, part, revision, fingerprint, customer, valid_until, issued_at, issued_by, state, "
               "void_reason", model.QUOTE_STATES, model.QUOTE_TRANSITIONS, "quote:", QuoteEntry)


class Register:
    """The shop's register. Open with :meth:`open`; use as a context manager or :meth:`close`."""

    def __init__(self, backend: Any, location: str):
        self._backend = backend
        self.location = location
        self._last_sweep = float("-inf")  # monotonic time of the last sweep for unfinished numbers
        self.path = Path(location) if not is_url(location) else None

    # --- opening ------------------------------------------------------------------------------

    @classmethod
    def open(cls, target: str | os.PathLike[str], *, create: bool = True, read_only: bool = False,
             retries: int = 12, busy_timeout_s: float = 2.0, lock_timeout_s: float = 60.0) -> Register:
        """Open the register at ``target``: an SQLite file path or a ``postgresql://`` URL.

        ``create``: start a new register if there is none (writers); ``read_only``: never create,
        convert or migrate anything (every reading command). SQLite: ``busy_timeout_s`` is how long one
        attempt waits for another process's lock, ``retries`` bounds the attempts. PostgreSQL: a
        writer waits up to ``lock_timeout_s`` for the register's lock.
        """
        text = os.fspath(target)
        if is_url(text):
            from .postgres import PostgresBackend

            backend: Any = PostgresBackend.open(text, create=create, read_only=read_only,
                                                lock_timeout_s=lock_timeout_s, hook=_call_hook)
        else:
            from .sqlite import SqliteBackend

            backend = SqliteBackend.open(Path(text), create=create, read_only=read_only, retries=retries,
                                         busy_timeout_s=busy_timeout_s, hook=_call_hook)
        return cls(backend, text)

    @property
    def kind(self) -> str:
        """``sqlite`` or ``postgresql``."""
        return str(self._backend.kind)

    @property
    def shown(self) -> str:
        """The register's address as printed (a URL without its password)."""
        return str(self._backend.where)

    def close(self) -> None:
        self._backend.close()

    def __enter__(self) -> Register:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    def _error(self, message: str) -> SpecError:
        return SpecError(message, file=self.shown)

    # --- other record-keepers on the same database (the test station) -------------------------

    def write_work(self, work: Callable[[Any], Any]) -> Any:
        """Run ``work(cursor)`` in one serialised write transaction (``?`` placeholders, standard SQL);
        for the modules that keep their own tables in the register (``specgen.station``)."""
        return self._backend.write(work)

    def read_work(self, work: Callable[[Any], Any]) -> Any:
        """Run ``work(cursor)`` on one consistent snapshot (see :meth:`write_work`)."""
        return self._backend.read(work)

    def state_of(self, number: str) -> str:
        """The state of work order ``number`` (a clear error for an unknown number)."""
        return str(self._backend.read(lambda db: self._state_of(db, ORDERS, number)))

    # --- issuing ------------------------------------------------------------------------------

    def allocate(self, part: str, revision: str, fingerprint: str, qty: int, lot: str | None = None,
                 due: object = None, issued_by: str | None = None, fmt: str = model.DEFAULT_NUMBER_FORMAT,
                 number: str | None = None, *, now: _dt.datetime | None = None, quote: str | None = None,
                 draft: bool = False) -> str:
        """Record a new work order in state ``issued`` and return its number.

        Without ``number`` the next number of ``fmt`` is allocated (per-year sequence, one
        transaction). With ``number`` (the shop's ERP assigns numbers) that number is used as is and
        a number already in the register, void or not, is refused. ``quote``: the quote this order
        fulfils (must be in the register, for the same part, not void). ``issued_by`` defaults to the
        login name; ``now`` (timezone-aware) is for imports and tests.
        """
        for name, value in (("part", part), ("revision", revision), ("fingerprint", fingerprint)):
            model.check_text(f"work order: {name}", value)
        if isinstance(qty, bool) or not isinstance(qty, int) or qty <= 0:
            raise SpecError(f"work order: quantity must be a whole number above zero, got {qty!r}")
        values = {"part": part, "revision": revision, "fingerprint": fingerprint, "qty": qty,
                  "lot": check_free_text(lot, "--lot", MAX_NOTE_CHARS, required=False),   # --lot itself: at most 40
                  "due": model.parse_date(due, "due date"), "draft": 1 if draft else 0,
                  "quote": str(quote).strip() if quote else None}
        return self._allocate(ORDERS, values, issued_by, fmt, number, now)

    def allocate_quote(self, part: str, revision: str, fingerprint: str, *, customer: str | None = None,
                       valid_until: object = None, issued_by: str | None = None,
                       fmt: str = model.DEFAULT_QUOTE_FORMAT, now: _dt.datetime | None = None) -> str:
        """Record a new quote in state ``issued`` and return its number (numbered like work orders,
        on a sequence of its own; never reused)."""
        for name, value in (("part", part), ("revision", revision), ("fingerprint", fingerprint)):
            model.check_text(f"quote: {name}", value)
        values = {"part": part, "revision": revision, "fingerprint": fingerprint,
                  "customer": check_free_text(customer, "customer", MAX_NAME_CHARS, required=False),
                  "valid_until": model.parse_date(valid_until, "valid until")}
        return self._allocate(QUOTES, values, issued_by, fmt, None, now)

    def _allocate(self, kind: _Kind, values: dict[str, Any], issued_by: str | None, fmt: str,
                  number: str | None, now: _dt.datetime | None) -> str:
        if number is not None:
            number = str(number).strip()
            if not number:
                raise SpecError(f"{kind.name}: --number is empty")
        else:
            model.check_format(fmt)
        by = check_name(issued_by) or model.login_name()
        moment = now or now_utc()
        issued_at = iso(moment)
        year = moment.astimezone(_dt.timezone.utc).year
        scope = kind.scope_prefix + (str(year) if "{year" in fmt else "all")
        if time.monotonic() - self._last_sweep > SWEEP_INTERVAL_S:
            self.void_stale(by=by)

        def work(db: Any) -> str:
            if values.get("quote"):
                self._check_cited_quote(db, values["quote"], values["part"])
            if number is not None:
                taken = db.execute(f"SELECT state, void_reason FROM {kind.table} WHERE number = ?",
                                   (number,)).fetchone()
                if taken is not None:
                    note = f"{taken[0]}: {taken[1]}" if taken[1] else taken[0]
                    raise self._error(f"{kind.name} number {number} is already in the register ({note}); "
                                      "an ERP number must be new")
                chosen, seq, seq_scope = number, None, None
            else:
                row = db.execute("SELECT last_seq FROM sequences WHERE scope = ?", (scope,)).fetchone()
                seq = (row[0] if row else 0) + 1
                chosen = fmt.format(year=year, seq=seq)
                # step past numbers already taken (ERP numbers fitting the format, old rows)
                while db.execute(f"SELECT 1 FROM {kind.table} WHERE number = ?", (chosen,)).fetchone():
                    seq += 1
                    chosen = fmt.format(year=year, seq=seq)
                if row is None:
                    db.execute("INSERT INTO sequences (scope, last_seq) VALUES (?, ?)", (scope, seq))
                else:
                    db.execute("UPDATE sequences SET last_seq = ? WHERE scope = ?", (seq, scope))
                seq_scope = scope
            columns = {"number": chosen, **values, "issued_at": issued_at, "issued_by": by, "state": "issued",
                       "seq_scope": seq_scope, "seq": seq, "issuer_host": model.this_host(),
                       "issuer_pid": os.getpid()}
            names = ", ".join(columns)
            marks = ", ".join("?" for _ in columns)
            db.execute(f"INSERT INTO {kind.table} ({names}) VALUES ({marks})", tuple(columns.values()))
            db.execute(f"INSERT INTO {kind.events} (number, event_no, at, from_state, to_state, why, by_whom, kind) "
                       "VALUES (?, 1, ?, NULL, 'issued', NULL, ?, 'change')", (chosen, issued_at, by))
            _call_hook("allocate:in-transaction")
            return str(chosen)

        try:
            chosen = str(self._backend.write(work))
        except self._backend.IntegrityError:
            # only reachable for an ERP number inserted by another process at the same moment
            raise self._error(f"{kind.name} number {number} is already in the register; an ERP number "
                              "must be new") from None
        _call_hook("allocate:committed")
        return chosen

    def _check_cited_quote(self, db: Any, quote: str, part: str) -> None:
        row = db.execute("SELECT part, state FROM quotes WHERE number = ?", (quote,)).fetchone()
        if row is None:
            raise self._error(f"no quote {quote} in the register (--quote)")
        if row[1] == "void":
            raise self._error(f"quote {quote} is void; a work order cannot fulfil it (--quote)")
        if row[0] != part:
            raise self._error(f"quote {quote} is for part {row[0]}, not {part} (--quote)")

    @contextlib.contextmanager
    def issuing(self, *args: Any, **kwargs: Any) -> Iterator[str]:
        """Allocate a number (same arguments as :meth:`allocate`) for a render that may fail.

        If the block raises, the number is voided with the reason (the error's first line) and the
        error re-raised, so the number stays listed as void instead of leaving a gap::

            with register.issuing(part, rev, fp, qty, lot, due) as number:
                with atomic_paths(pdf, html) as (tmp_pdf, tmp_html):
                    render(number, tmp_pdf, tmp_html)
                register.attach_files(number, [pdf, html])
        """
        number = self.allocate(*args, **kwargs)
        with self._voided_on_error(ORDERS, number):
            yield number

    @contextlib.contextmanager
    def issuing_quote(self, *args: Any, **kwargs: Any) -> Iterator[str]:
        """:meth:`allocate_quote` for a render that may fail (as :meth:`issuing`)."""
        number = self.allocate_quote(*args, **kwargs)
        with self._voided_on_error(QUOTES, number):
            yield number

    @contextlib.contextmanager
    def _voided_on_error(self, kind: _Kind, number: str) -> Iterator[None]:
        try:
            yield
        except BaseException as err:
            detail = one_line(str(err), 200) or type(err).__name__
            with contextlib.suppress(SpecError):
                self._set_state(kind, number, "void", f"render failed: {detail}", by=None, correction=False)
            raise

    def attach_files(self, number: str, paths: Iterable[str | os.PathLike[str]]) -> None:
        """Record the output files of an order (kept in order; a path given twice is kept once)."""
        self._attach(ORDERS, number, paths)

    def attach_quote_files(self, number: str, paths: Iterable[str | os.PathLike[str]]) -> None:
        self._attach(QUOTES, number, paths)

    def _attach(self, kind: _Kind, number: str, paths: Iterable[str | os.PathLike[str]]) -> None:
        wanted = [os.fspath(p) for p in paths]

        def work(db: Any) -> None:
            if self._state_of(db, kind, number) == "void":
                raise self._error(f"{kind.name} {number} is void; files cannot be attached")
            known = {row[0] for row in db.execute(f"SELECT path FROM {kind.files} WHERE number = ?",
                                                  (number,)).fetchall()}
            position = db.execute(f"SELECT COUNT(*) FROM {kind.files} WHERE number = ?", (number,)).fetchone()[0]
            for path in wanted:
                if path in known:
                    continue
                known.add(path)
                db.execute(f"INSERT INTO {kind.files} (number, position, path) VALUES (?, ?, ?)",
                           (number, position, path))
                position += 1

        self._backend.write(work)

    # --- state --------------------------------------------------------------------------------

    def _state_of(self, db: Any, kind: _Kind, number: str) -> str:
        row = db.execute(f"SELECT state FROM {kind.table} WHERE number = ?", (number,)).fetchone()
        if row is None:
            raise self._error(f"no {kind.name} {number} in the register")
        return str(row[0])

    def set_state(self, number: str, state: str, why: str | None = None, *, by: str | None = None,
                  correction: bool = False) -> Order:
        """Move a work order to ``state`` (see :data:`model.TRANSITIONS`); ``void`` needs ``why``.

        A move outside the ordinary ones (``complete`` back to ``in-work``, a void that was a
        mistake) is refused unless ``correction`` is set, and a correction needs ``why``: it is
        recorded as a new event of kind ``correction``, never by editing the old ones.
        """
        self._set_state(ORDERS, number, state, check_free_text(why, "--why", required=False), by=check_name(by),
                        correction=correction)
        return self.get(number)

    def set_quote_state(self, number: str, state: str, why: str | None = None, *, by: str | None = None,
                        correction: bool = False) -> QuoteEntry:
        self._set_state(QUOTES, number, state, check_free_text(why, "--why", required=False), by=check_name(by),
                        correction=correction)
        return self.get_quote(number)

    def _set_state(self, kind: _Kind, number: str, state: str, why: str | None, *, by: str | None,
                   correction: bool, unfinished_only: bool = False) -> None:
        state = model.check_state(state, kind.states)
        # reasons the program composes (a render error) are made one safe line; what a person typed was
        # checked by set_state (specgen.freetext)
        why = escape_controls(one_line(why)) if why and str(why).strip() else None
        if state == "void" and not why:
            raise SpecError(f"voiding {number} needs a reason (--why)")
        if correction and not why:
            raise SpecError(f"a correction of {number} needs a reason (--why)")
        who = by or model.login_name()

        def work(db: Any) -> None:
            current = self._state_of(db, kind, number)
            ordinary = state in kind.transitions[current]
            if unfinished_only and (current != "issued" or db.execute(
                    f"SELECT COUNT(*) FROM {kind.files} WHERE number = ?", (number,)).fetchone()[0]):
                raise self._error(f"{number} was finished meanwhile")
            if current == state:
                raise self._error(f"{kind.name} {number} is already {state}")
            if not ordinary and not correction:
                allowed = ", ".join(sorted(kind.transitions[current])) or "none, it is final"
                raise self._error(f"{kind.name} {number} cannot go from {current} to {state} (allowed: {allowed}); "
                                  "a mistake is put right with a correction (--correct --why REASON)")
            if kind is ORDERS and current == "void" and state != "void":
                draft = db.execute("SELECT draft FROM orders WHERE number = ?", (number,)).fetchone()[0]
                if draft:
                    raise self._error(f"work order {number} is a draft copy; it can never be made valid")
            db.execute(f"UPDATE {kind.table} SET state = ?, void_reason = ? WHERE number = ?",
                       (state, why if state == "void" else None, number))
            event_no = db.execute(f"SELECT COUNT(*) FROM {kind.events} WHERE number = ?", (number,)).fetchone()[0] + 1
            db.execute(f"INSERT INTO {kind.events} (number, event_no, at, from_state, to_state, why, by_whom, kind) "
                       "VALUES (?, ?, ?, ?, ?, ?, ?, ?)",
                       (number, event_no, iso(now_utc()), current, state, why, who,
                        "change" if ordinary else "correction"))

        self._backend.write(work)

    def void(self, number: str, reason: str, *, by: str | None = None) -> Order:
        """Void an order; the number stays listed with the reason and is never reused."""
        return self.set_state(number, "void", why=reason, by=by)

    # --- unfinished numbers -------------------------------------------------------------------

    def stale(self, *, uncheckable_after_s: float = model.STALE_UNCHECKABLE_S,
              voidable_only: bool = False) -> builtins.list[StaleNumber]:
        """Every ``issued`` work order and quote with no files, with its issuing process's state.

        ``voidable`` is true when that process is gone, or cannot be checked and the number is older
        than ``uncheckable_after_s``. ``voidable_only`` leaves out, in the query, numbers that cannot
        be voidable (taken on another machine within the bound): the sweep before each issue."""
        now = now_utc()
        host = model.this_host()
        cutoff = iso(now - _dt.timedelta(seconds=uncheckable_after_s))
        narrow = " AND (issuer_host = ? OR issuer_host IS NULL OR issued_at <= ?)" if voidable_only else ""
        params = (host, cutoff) if voidable_only else ()

        def work(db: Any) -> builtins.list[tuple[Any, ...]]:
            found = []
            for kind, label in ((ORDERS, "order"), (QUOTES, "quote")):
                for row in db.execute(
                        f"SELECT number, part, issued_at, issued_by, issuer_host, issuer_pid FROM {kind.table} t "
                        f"WHERE state = 'issued'{narrow} AND NOT EXISTS "
                        f"(SELECT 1 FROM {kind.files} f WHERE f.number = t.number) ORDER BY issued_at, number",
                        params).fetchall():
                    found.append((label, *row))
            return found

        out = []
        processes: dict[tuple[str | None, int | None], str] = {}  # many numbers share one process
        for label, number, part, issued_at, issued_by, issuer_host, pid in self._backend.read(work):
            age = (now - _dt.datetime.fromisoformat(issued_at)).total_seconds()
            key = (issuer_host, pid)
            if key not in processes:
                processes[key] = model.process_state(issuer_host, pid)
            process = processes[key]
            voidable = process == "gone" or (process == "unknown" and age > uncheckable_after_s)
            if voidable or not voidable_only:
                out.append(StaleNumber(label, number, part, issued_at, issued_by, max(age, 0.0), process, voidable))
        return out

    def void_stale(self, *, uncheckable_after_s: float = model.STALE_UNCHECKABLE_S, by: str | None = None,
                   reason: str | None = None) -> builtins.list[str]:
        """Void every voidable stale number (see :meth:`stale`) with a reason; returns the numbers.

        Checked per issuing process, not per number: one grouped query, one liveness check for each
        process that left unfinished numbers, then the numbers of the processes found gone."""
        self._last_sweep = time.monotonic()
        now = now_utc()
        cutoff = iso(now - _dt.timedelta(seconds=uncheckable_after_s))

        def groups(db: Any) -> builtins.list[tuple[Any, ...]]:
            found = []
            for kind in (ORDERS, QUOTES):
                found += [(kind, *row) for row in db.execute(
                    f"SELECT issuer_host, issuer_pid, MIN(issued_at) FROM {kind.table} t WHERE state = 'issued' "
                    f"AND NOT EXISTS (SELECT 1 FROM {kind.files} f WHERE f.number = t.number) "
                    "GROUP BY issuer_host, issuer_pid").fetchall()]
            return found

        voided = []
        for kind, host, pid, oldest in self._backend.read(groups):
            process = model.process_state(host, pid)
            if process == "running" or (process == "unknown" and oldest > cutoff):
                continue
            same = "issuer_host = ?" if host is not None else "issuer_host IS NULL"
            who = "issuer_pid = ?" if pid is not None else "issuer_pid IS NULL"
            params = tuple(v for v in (host, pid) if v is not None)
            if process == "unknown":
                who += " AND issued_at <= ?"
                params += (cutoff,)
            numbers = self._backend.read(lambda db, k=kind, s=same, w=who, p=params: db.execute(
                f"SELECT number, issued_at FROM {k.table} t WHERE state = 'issued' AND {s} AND {w} AND NOT EXISTS "
                f"(SELECT 1 FROM {k.files} f WHERE f.number = t.number) ORDER BY number", p).fetchall())
            for number, issued_at in numbers:
                why = reason or (f"issue never finished: no files recorded and its process ({process}) "
                                 f"took the number at {issued_at}")
                try:
                    self._void_if_still_unfinished(kind, number, why, by)
                except SpecError:  # someone attached files or moved it meanwhile
                    continue
                voided.append(number)
        return voided

    def _void_if_still_unfinished(self, kind: _Kind, number: str, why: str, by: str | None) -> None:
        self._set_state(kind, number, "void", why, by=by or "specgen", correction=False, unfinished_only=True)

    def void_unfinished(self, older_than_s: float = 3600.0,
                        reason: str = "issue never finished (no output files recorded)") -> builtins.list[str]:
        """Void ``issued`` work orders with no files older than ``older_than_s``, whatever their
        process (the planner's explicit clean-up; :meth:`void_stale` is the automatic one)."""
        cutoff = iso(now_utc() - _dt.timedelta(seconds=older_than_s))
        rows = self._backend.read(lambda db: db.execute(
            "SELECT number FROM orders WHERE state = 'issued' AND issued_at <= ? AND NOT EXISTS "
            "(SELECT 1 FROM order_files f WHERE f.number = orders.number) ORDER BY number", (cutoff,)).fetchall())
        voided = []
        for (number,) in rows:
            try:
                self._void_if_still_unfinished(ORDERS, number, reason, None)
            except SpecError:
                continue
            voided.append(number)
        return voided

    # --- reading ------------------------------------------------------------------------------

    def _records(self, kind: _Kind, where: str, params: tuple[Any, ...]) -> builtins.list[Any]:
        extra = ", t.quote" if kind is ORDERS else ""
        columns = ", ".join(f"t.{c.strip()}" for c in kind.columns.split(","))

        def work(db: Any) -> tuple[builtins.list[Any], dict[str, builtins.list[str]]]:
            rows = db.execute(f"SELECT {columns}{extra} FROM {kind.table} t {where} ORDER BY t.issued_at, t.number",
                              params).fetchall()
            files: dict[str, builtins.list[str]] = {}
            if rows:
                for number, path in db.execute(
                        f"SELECT f.number, f.path FROM {kind.files} f JOIN {kind.table} t ON t.number = f.number "
                        f"{where} ORDER BY f.number, f.position", params).fetchall():
                    files.setdefault(number, []).append(path)
            return rows, files

        rows, files = self._backend.read(work)
        out: builtins.list[Any] = []
        for row in rows:
            found = tuple(files.get(row[0], ()))
            if kind is ORDERS:
                out.append(Order(*row[:11], files=found, quote=row[11]))  # type: ignore[misc]
            else:
                out.append(QuoteEntry(*row, files=found))  # type: ignore[misc]  # the query's columns, in order
        return out

    def get(self, number: str) -> Order:
        found = self._records(ORDERS, "WHERE t.number = ?", (number,))
        if not found:
            raise self._error(f"no work order {number} in the register")
        order: Order = found[0]
        return order

    def get_quote(self, number: str) -> QuoteEntry:
        found = self._records(QUOTES, "WHERE t.number = ?", (number,))
        if not found:
            raise self._error(f"no quote {number} in the register")
        entry: QuoteEntry = found[0]
        return entry

    @staticmethod
    def _filters(kind: _Kind, part: str | None, revision: str | None, state: str | None,
                 since: object) -> tuple[str, tuple[Any, ...]]:
        clauses, params = [], []
        if part is not None:
            clauses.append("t.part = ?")
            params.append(part)
        if revision is not None:
            clauses.append("t.revision = ?")
            params.append(revision)
        if state is not None:
            clauses.append("t.state = ?")
            params.append(model.check_state(state, kind.states))
        since_iso = model.parse_since(since)
        if since_iso is not None:
            clauses.append("t.issued_at >= ?")
            params.append(since_iso)
        return ("WHERE " + " AND ".join(clauses)) if clauses else "", tuple(params)

    def list(self, part: str | None = None, revision: str | None = None, state: str | None = None,
             since: object = None) -> builtins.list[Order]:
        """Work orders matching every filter given, oldest first. ``since``: a date or ISO timestamp."""
        return self._records(ORDERS, *self._filters(ORDERS, part, revision, state, since))

    def list_quotes(self, part: str | None = None, revision: str | None = None, state: str | None = None,
                    since: object = None) -> builtins.list[QuoteEntry]:
        """Quotes matching every filter given, oldest first."""
        return self._records(QUOTES, *self._filters(QUOTES, part, revision, state, since))

    def where_used(self, part: str, revision: str | None = None, *, include_void: bool = False) -> builtins.list[Order]:
        """Traceability: the work orders (and so the lots) built from ``part`` (one revision or
        all), oldest first. Void orders were never built and are left out unless asked for."""
        orders = self.list(part=part, revision=revision)
        return orders if include_void else [o for o in orders if o.state != "void"]

    def history(self, number: str) -> builtins.list[Event]:
        """Every state change of a work order, oldest first."""
        return self._history(ORDERS, number)

    def quote_history(self, number: str) -> builtins.list[Event]:
        return self._history(QUOTES, number)

    def _history(self, kind: _Kind, number: str) -> builtins.list[Event]:
        def work(db: Any) -> builtins.list[tuple[Any, ...]]:
            self._state_of(db, kind, number)  # a clear error for an unknown number
            return builtins.list(db.execute(f"SELECT number, at, from_state, to_state, why, by_whom, kind FROM "
                                            f"{kind.events} WHERE number = ? ORDER BY event_no", (number,)).fetchall())

        return [Event(*row) for row in self._backend.read(work)]

    def export_csv(self, path: str | os.PathLike[str]) -> int:
        """Write every work order to a CSV file (atomically); returns the number of rows."""
        from specgen.atomic import write_atomic

        orders = self.list()
        write_atomic(path, orders_csv(orders))
        return len(orders)


def orders_csv(orders: Iterable[Order]) -> str:
    """Orders as CSV text (header row, files joined with '; '), cells safe for spreadsheets."""
    from ..csvsafe import csv_text

    rows = []
    for order in orders:
        row = order.to_dict()
        row["files"] = "; ".join(order.files)
        rows.append([row[c] for c in model.CSV_COLUMNS])
    return csv_text(model.CSV_COLUMNS, rows)
