"""The work-order register: numbers that are unique and gapless, traceable to a spec revision.

One small interface, :class:`Register`, is all callers see. It is backed by an embedded SQLite file
(stdlib :mod:`sqlite3`, WAL mode); the SQL in the queries is plain standard SQL (no ``INSERT OR``,
``RETURNING``, ``ON CONFLICT``), and everything SQLite-specific (``PRAGMA``s, ``BEGIN IMMEDIATE``,
recognising the file) lives in the few private methods that open, migrate and begin transactions,
so a server database can replace SQLite later without touching callers.

Numbering
---------
A number comes from the shop's format, e.g. ``WO-{year}-{seq:05d}`` (fields ``{year}`` and
``{seq}``; ``{seq}`` is required). The sequence counts per year (a format without ``{year}`` counts
forever). Allocation is one write transaction (``BEGIN IMMEDIATE``): read the counter, step it, insert
the order, commit. Concurrent processes queue on the database's write lock; ``SQLITE_BUSY`` is retried
with a bounded, jittered backoff and, if the register stays locked, ends in a one-line
:class:`~specgen.errors.SpecError`, never a traceback. A transaction that dies (exception, SIGKILL,
power loss) rolls back whole, so it takes no number. If a number in the sequence is already taken
(an ERP-assigned number that happens to fit the format, a row from an older schema), allocation
steps past it.

Failed renders: the number is allocated *before* rendering (so the number can be printed on the
document) and a failed render voids it with the reason -- :meth:`Register.issuing` does both. The
numbering is therefore gapless except for void numbers, which stay listed with their reason. A
process killed between allocation and :meth:`Register.attach_files` leaves an ``issued`` order with
no files; :meth:`Register.void_unfinished` voids such orders once they are old enough.

States
------
``issued`` -> ``floor`` (on the shop floor) -> ``complete``; ``issued`` may go straight to
``complete``; ``issued`` and ``floor`` may be voided (a reason is required). ``complete`` and ``void``
are final. Every change is kept in ``order_events`` (see :meth:`Register.history`).

Durability: ``synchronous=FULL`` so a committed number survives a power cut (a number lost after it
was printed would be handed out twice). WAL needs a local filesystem; do not put the register on a
network share.

Recognising the file: a register carries ``PRAGMA application_id`` = :data:`APPLICATION_ID` and a
``meta`` row ``app = specgen-register``. A file that is not SQLite, is damaged, belongs to another
application or to a newer specgen is refused with a clear message and is not modified.
"""

from __future__ import annotations

import contextlib
import dataclasses
import datetime as _dt
import getpass
import os
import random
import sqlite3
import time
from collections.abc import Callable, Iterable, Iterator
from pathlib import Path

from specgen.errors import SpecError

REGISTER_FILENAME = "specgen-register.sqlite"
ENV_VAR = "SPECGEN_REGISTER"
DEFAULT_NUMBER_FORMAT = "WO-{year}-{seq:05d}"
#: ``PRAGMA application_id`` of a register ("SPGR" in ASCII).
APPLICATION_ID = 0x53504752
APP_NAME = "specgen-register"

STATES = ("issued", "floor", "complete", "void")
#: Allowed state changes (from -> set of to).
TRANSITIONS = {
    "issued": {"floor", "complete", "void"},
    "floor": {"complete", "void"},
    "complete": set(),
    "void": set(),
}

_SQLITE_MAGIC = b"SQLite format 3\x00"

# Test-only hook: called with a stage name ("allocate:in-transaction", "allocate:committed", "retry")
# so the crash tests can stop a child at an exact point and SIGKILL it, and the concurrency test can
# count busy retries. Production code never sets it.
_hook: Callable[[str], None] | None = None


def _call_hook(stage: str) -> None:
    if _hook is not None:
        _hook(stage)


# --- schema, one entry per version; applied in order inside one transaction -------------------
# Version 1: orders and their files. Version 2: per-year sequence counters, the sequence number
# on each order, and the state-change history (back-filled with one "issued" event per order).
_MIGRATIONS: dict[int, list[str]] = {
    1: [
        f"PRAGMA application_id = {APPLICATION_ID}",
        "CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL)",
        f"INSERT INTO meta (key, value) VALUES ('app', '{APP_NAME}')",
        """CREATE TABLE orders (
            number TEXT PRIMARY KEY,
            part TEXT NOT NULL,
            revision TEXT NOT NULL,
            fingerprint TEXT NOT NULL,
            qty INTEGER NOT NULL CHECK (qty > 0),
            lot TEXT,
            due TEXT,
            issued_at TEXT NOT NULL,
            issued_by TEXT NOT NULL,
            state TEXT NOT NULL CHECK (state IN ('issued', 'floor', 'complete', 'void')),
            void_reason TEXT
        )""",
        """CREATE TABLE order_files (
            number TEXT NOT NULL REFERENCES orders (number),
            position INTEGER NOT NULL,
            path TEXT NOT NULL,
            PRIMARY KEY (number, path)
        )""",
        "CREATE INDEX orders_part_revision ON orders (part, revision)",
    ],
    2: [
        """CREATE TABLE sequences (
            scope TEXT PRIMARY KEY,
            last_seq INTEGER NOT NULL
        )""",
        "ALTER TABLE orders ADD COLUMN seq_scope TEXT",
        "ALTER TABLE orders ADD COLUMN seq INTEGER",
        """CREATE TABLE order_events (
            number TEXT NOT NULL REFERENCES orders (number),
            event_no INTEGER NOT NULL,
            at TEXT NOT NULL,
            from_state TEXT,
            to_state TEXT NOT NULL,
            why TEXT,
            PRIMARY KEY (number, event_no)
        )""",
        # an order of the old schema gets its "issued" event; a later state cannot be dated
        """INSERT INTO order_events (number, event_no, at, from_state, to_state, why)
           SELECT number, 1, issued_at, NULL, 'issued', NULL FROM orders""",
    ],
}
SCHEMA_VERSION = max(_MIGRATIONS)

_ORDER_COLUMNS = ("number, part, revision, fingerprint, qty, lot, due, issued_at, issued_by, "
                  "state, void_reason")


@dataclasses.dataclass(frozen=True)
class Order:
    """One work order as the register holds it. ``files`` keeps the order they were attached in."""

    number: str
    part: str
    revision: str
    fingerprint: str
    qty: int
    lot: str | None
    due: str | None           # ISO date, YYYY-MM-DD
    issued_at: str            # ISO 8601, UTC, seconds
    issued_by: str
    state: str
    void_reason: str | None
    files: tuple[str, ...] = ()

    def to_dict(self) -> dict:
        data = dataclasses.asdict(self)
        data["files"] = list(self.files)
        return data


@dataclasses.dataclass(frozen=True)
class Event:
    """One state change of an order (the first is always ``None -> issued``)."""

    number: str
    at: str
    from_state: str | None
    to_state: str
    why: str | None


CSV_COLUMNS = ("number", "part", "revision", "fingerprint", "qty", "lot", "due", "issued_at",
               "issued_by", "state", "void_reason", "files")


def default_register_path(spec_path: str | os.PathLike | None = None,
                          explicit: str | os.PathLike | None = None, *,
                          shop_setting: str | os.PathLike | None = None,
                          environ: dict | None = None) -> Path:
    """Where the register lives: ``explicit`` (``--register``) > ``$SPECGEN_REGISTER`` >
    ``shop_setting`` (the shop file's setting) > ``specgen-register.sqlite`` in the spec's folder >
    the same name in the current folder."""
    env = os.environ if environ is None else environ
    if explicit:
        return Path(explicit)
    if env.get(ENV_VAR):
        return Path(env[ENV_VAR])
    if shop_setting:
        return Path(shop_setting)
    if spec_path is not None:
        spec = Path(spec_path)
        folder = spec if spec.is_dir() else spec.parent
        return folder / REGISTER_FILENAME
    return Path(REGISTER_FILENAME)


def _now_utc() -> _dt.datetime:
    return _dt.datetime.now(_dt.timezone.utc)


def _iso(moment: _dt.datetime) -> str:
    if moment.tzinfo is None:
        raise ValueError("issue time must be timezone-aware")
    return moment.astimezone(_dt.timezone.utc).isoformat(timespec="seconds")


def _one_line(text: str, limit: int = 300) -> str:
    line = " ".join(str(text).split())
    return line if len(line) <= limit else line[:limit - 1] + "…"


def _check_format(fmt: str) -> None:
    """A number format must be a str.format template with ``{seq}`` (and optionally ``{year}``)."""
    try:
        first = fmt.format(year=2000, seq=1)
        second = fmt.format(year=2000, seq=2)
    except KeyError as err:
        raise SpecError(f"number format {fmt!r}: unknown field {{{err.args[0]}}}; "
                        "use {year} and {seq}") from None
    except (ValueError, IndexError) as err:
        raise SpecError(f"number format {fmt!r}: {err}") from None
    if first == second:
        raise SpecError(f"number format {fmt!r} has no {{seq}} field, so every number would be the same")


def _parse_due(due) -> str | None:
    if due is None or due == "":
        return None
    if isinstance(due, _dt.datetime):
        return due.date().isoformat()
    if isinstance(due, _dt.date):
        return due.isoformat()
    try:
        return _dt.date.fromisoformat(str(due)).isoformat()
    except ValueError:
        raise SpecError(f"due date: expected a date like 2026-06-30, got {due!r}") from None


def _parse_since(since) -> str | None:
    """``since`` as a comparable ISO string: a date (start of that day, UTC) or a full timestamp."""
    if since is None or since == "":
        return None
    if isinstance(since, _dt.datetime):
        return _iso(since if since.tzinfo else since.replace(tzinfo=_dt.timezone.utc))
    if isinstance(since, _dt.date):
        return since.isoformat()
    text = str(since)
    try:
        return _dt.date.fromisoformat(text).isoformat()
    except ValueError:
        pass
    try:
        moment = _dt.datetime.fromisoformat(text)
    except ValueError:
        raise SpecError(f"since: expected a date like 2026-05-01, got {since!r}") from None
    return _iso(moment if moment.tzinfo else moment.replace(tzinfo=_dt.timezone.utc))


def _check_state(state: str) -> str:
    if state not in STATES:
        raise SpecError(f"unknown state {state!r}; expected one of {', '.join(STATES)}")
    return state


def _is_busy(err: sqlite3.Error) -> bool:
    code = getattr(err, "sqlite_errorcode", None)
    if code is not None:
        return code & 0xFF in (sqlite3.SQLITE_BUSY, sqlite3.SQLITE_LOCKED)
    text = str(err).lower()
    return "locked" in text or "busy" in text


class Register:
    """The work-order register. Open with :meth:`open`; use as a context manager or :meth:`close`."""

    def __init__(self, path: Path, connection: sqlite3.Connection, *, retries: int,
                 busy_timeout_s: float):
        self.path = path
        self._db = connection
        self._retries = retries
        self._busy_timeout_s = busy_timeout_s

    # --- opening and migrating (the SQLite-specific part) ------------------------------------

    @classmethod
    def open(cls, path: str | os.PathLike, *, create: bool = True, retries: int = 12,
             busy_timeout_s: float = 2.0) -> Register:
        """Open the register at ``path``, creating it (``create=True``) and migrating it as needed.

        ``busy_timeout_s`` is how long one attempt waits for another process's lock; ``retries``
        bounds the attempts (with jittered exponential backoff between them) before a SpecError.
        """
        path = Path(path)
        where = str(path)
        if path.is_dir():
            raise SpecError("register path is a folder; give a file such as "
                            f"{REGISTER_FILENAME}", file=where)
        if not path.parent.is_dir():
            raise SpecError(f"cannot open register: folder '{path.parent}' does not exist", file=where)
        exists = path.exists()
        if not exists and not create:
            raise SpecError("no register here (issue a work order first, or pass --register)",
                            file=where)
        if exists and path.stat().st_size > 0:
            try:
                with open(path, "rb") as handle:
                    head = handle.read(len(_SQLITE_MAGIC))
            except OSError as err:
                raise SpecError(f"cannot read register: {err.strerror or err}", file=where) from None
            if head != _SQLITE_MAGIC:
                raise SpecError("not a specgen register: the file is not an SQLite database "
                                "(damaged, or some other kind of file)", file=where)
        try:
            connection = sqlite3.connect(str(path), timeout=busy_timeout_s, isolation_level=None)
        except sqlite3.Error as err:
            raise SpecError(f"cannot open register: {err}", file=where) from None
        register = cls(path, connection, retries=retries, busy_timeout_s=busy_timeout_s)
        try:
            register._retrying(register._prepare)
        except BaseException:
            connection.close()
            raise
        return register

    def _inspect(self) -> tuple[int, int, list[str], str | None]:
        """Read-only look at the file: (application_id, user_version, tables, meta app name)."""
        db = self._db
        app_id = db.execute("PRAGMA application_id").fetchone()[0]
        version = db.execute("PRAGMA user_version").fetchone()[0]
        tables = [row[0] for row in db.execute(
            "SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name")]
        app_name = None
        if "meta" in tables:
            try:
                row = db.execute("SELECT value FROM meta WHERE key = 'app'").fetchone()
                app_name = row[0] if row else None
            except sqlite3.OperationalError:  # a foreign "meta" table with other columns
                app_name = None
        return app_id, version, tables, app_name

    def _refuse_unless_ours(self, app_id: int, version: int, tables: list[str],
                            app_name: str | None) -> bool:
        """Raise for a foreign or too-new file; return True if the file is still empty."""
        where = str(self.path)
        ours = app_id == APPLICATION_ID or app_name == APP_NAME
        if not ours:
            if not tables and app_id == 0 and version == 0:
                return True
            shown = ", ".join(tables[:6]) + (", …" if len(tables) > 6 else "")
            detail = f"it holds tables {shown}" if tables else f"application id {app_id:#x}"
            raise SpecError(f"not a specgen register: an SQLite database of another application "
                            f"({detail}); give another --register path", file=where)
        if version > SCHEMA_VERSION:
            raise SpecError(f"register schema version {version} is newer than this specgen "
                            f"understands ({SCHEMA_VERSION}); upgrade specgen", file=where)
        return False

    def _prepare(self) -> None:
        db = self._db
        try:
            state = self._inspect()
            empty = self._refuse_unless_ours(*state)
            if not empty:
                check = db.execute("PRAGMA quick_check").fetchall()
                if [tuple(r) for r in check] != [("ok",)]:
                    first = check[0][0] if check else "no answer"
                    raise SpecError(f"register file is damaged (integrity check: {_one_line(first, 120)}); "
                                    "restore it from a backup", file=str(self.path))
        except sqlite3.DatabaseError as err:
            if _is_busy(err):
                raise
            raise SpecError(f"register file is damaged or not a register ({err})",
                            file=str(self.path)) from None
        # From here on the file is ours (or empty): it may be written.
        try:
            db.execute(f"PRAGMA busy_timeout = {int(self._busy_timeout_s * 1000)}")
            mode = db.execute("PRAGMA journal_mode = WAL").fetchone()[0]
            db.execute("PRAGMA synchronous = FULL")
            db.execute("PRAGMA foreign_keys = ON")
            if str(mode).lower() != "wal":
                raise SpecError(f"cannot switch the register to WAL mode (got {mode!r}); "
                                "is it on a network share?", file=str(self.path))
            if state[1] < SCHEMA_VERSION:
                with self._transaction():
                    # another process may have migrated while we waited for the lock
                    again = self._inspect()
                    self._refuse_unless_ours(*again)
                    if again[1] == SCHEMA_VERSION:
                        return
                    for version in range(again[1] + 1, SCHEMA_VERSION + 1):
                        for statement in _MIGRATIONS[version]:
                            db.execute(statement)
                    db.execute(f"PRAGMA user_version = {SCHEMA_VERSION}")
        except sqlite3.DatabaseError as err:
            if _is_busy(err):
                raise
            raise SpecError(f"register error: {err}", file=str(self.path)) from None

    @contextlib.contextmanager
    def _transaction(self) -> Iterator[sqlite3.Connection]:
        """One write transaction; the write lock is taken up front so it never has to upgrade."""
        self._db.execute("BEGIN IMMEDIATE")
        try:
            yield self._db
        except BaseException:
            with contextlib.suppress(sqlite3.Error):
                self._db.execute("ROLLBACK")
            raise
        self._db.execute("COMMIT")

    def _retrying(self, work: Callable[[], object]):
        """Run ``work`` again after SQLITE_BUSY, with jittered exponential backoff, a bounded
        number of times; other database errors become a one-line SpecError."""
        delay = 0.02
        for attempt in range(self._retries + 1):
            try:
                return work()
            except sqlite3.DatabaseError as err:
                if self._db.in_transaction:
                    with contextlib.suppress(sqlite3.Error):
                        self._db.execute("ROLLBACK")
                if not _is_busy(err):
                    if isinstance(err, sqlite3.IntegrityError):
                        raise
                    raise SpecError(f"register error: {err}", file=str(self.path)) from None
                if attempt == self._retries:
                    break
                _call_hook("retry")
                time.sleep(random.uniform(0.5, 1.5) * delay)
                delay = min(delay * 2, 1.0)
        raise SpecError(f"register is busy: another process kept it locked through "
                        f"{self._retries + 1} attempts; try again", file=str(self.path))

    def close(self) -> None:
        self._db.close()

    def __enter__(self) -> Register:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    # --- issuing ------------------------------------------------------------------------------

    def allocate(self, part: str, revision: str, fingerprint: str, qty: int,
                 lot: str | None = None, due=None, issued_by: str | None = None,
                 fmt: str = DEFAULT_NUMBER_FORMAT, number: str | None = None, *,
                 now: _dt.datetime | None = None) -> str:
        """Record a new work order in state ``issued`` and return its number.

        Without ``number`` the next number of ``fmt`` is allocated (per-year sequence, one
        transaction). With ``number`` (the shop's ERP assigns numbers) that number is used as is and
        a number already in the register, void or not, is refused with a SpecError.
        ``issued_by`` defaults to the login name; ``now`` (timezone-aware) is for imports and tests.
        """
        for name, value in (("part", part), ("revision", revision), ("fingerprint", fingerprint)):
            if not isinstance(value, str) or not value.strip():
                raise SpecError(f"work order: {name} must be a non-empty text, got {value!r}")
        if isinstance(qty, bool) or not isinstance(qty, int) or qty <= 0:
            raise SpecError(f"work order: quantity must be a whole number above zero, got {qty!r}")
        if number is not None:
            number = str(number).strip()
            if not number:
                raise SpecError("work order: --number is empty")
        else:
            _check_format(fmt)
        due_iso = _parse_due(due)
        lot = (str(lot).strip() or None) if lot is not None else None
        if issued_by is None:
            try:
                issued_by = getpass.getuser()
            except Exception:  # no login name in some containers
                issued_by = "unknown"
        moment = now or _now_utc()
        issued_at = _iso(moment)
        year = moment.astimezone(_dt.timezone.utc).year
        scope = str(year) if "{year" in fmt else "all"

        def work() -> str:
            with self._transaction() as db:
                if number is not None:
                    taken = db.execute("SELECT state, void_reason FROM orders WHERE number = ?",
                                       (number,)).fetchone()
                    if taken is not None:
                        state, reason = taken
                        note = f"{state}: {reason}" if reason else state
                        raise SpecError(f"work order number {number} is already in the register "
                                        f"({note}); an ERP number must be new", file=str(self.path))
                    chosen, seq, seq_scope = number, None, None
                else:
                    row = db.execute("SELECT last_seq FROM sequences WHERE scope = ?",
                                     (scope,)).fetchone()
                    seq = (row[0] if row else 0) + 1
                    chosen = fmt.format(year=year, seq=seq)
                    # step past numbers already taken (ERP numbers fitting the format, old rows)
                    while db.execute("SELECT 1 FROM orders WHERE number = ?", (chosen,)).fetchone():
                        seq += 1
                        chosen = fmt.format(year=year, seq=seq)
                    if row is None:
                        db.execute("INSERT INTO sequences (scope, last_seq) VALUES (?, ?)", (scope, seq))
                    else:
                        db.execute("UPDATE sequences SET last_seq = ? WHERE scope = ?", (seq, scope))
                    seq_scope = scope
                db.execute(
                    f"INSERT INTO orders ({_ORDER_COLUMNS}, seq_scope, seq) "
                    "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, 'issued', NULL, ?, ?)",
                    (chosen, part, revision, fingerprint, qty, lot, due_iso, issued_at, issued_by,
                     seq_scope, seq))
                db.execute("INSERT INTO order_events (number, event_no, at, from_state, to_state, why) "
                           "VALUES (?, 1, ?, NULL, 'issued', NULL)", (chosen, issued_at))
                _call_hook("allocate:in-transaction")
            _call_hook("allocate:committed")
            return chosen

        try:
            return self._retrying(work)
        except sqlite3.IntegrityError:
            # only reachable for an ERP number inserted by another process at the same moment
            raise SpecError(f"work order number {number} is already in the register; an ERP number "
                            "must be new", file=str(self.path)) from None

    @contextlib.contextmanager
    def issuing(self, *args, **kwargs) -> Iterator[str]:
        """Allocate a number (same arguments as :meth:`allocate`) for a render that may fail.

        If the block raises, the number is voided with the reason (the error's first line) and the
        error re-raised, so the number stays listed as void instead of leaving a gap::

            with register.issuing(part, rev, fp, qty, lot, due) as number:
                with atomic_paths(pdf, html) as (tmp_pdf, tmp_html):
                    render(number, tmp_pdf, tmp_html)
                register.attach_files(number, [pdf, html])
        """
        number = self.allocate(*args, **kwargs)
        try:
            yield number
        except BaseException as err:
            detail = _one_line(str(err), 200) or type(err).__name__
            with contextlib.suppress(SpecError):
                self.void(number, f"render failed: {detail}")
            raise

    def attach_files(self, number: str, paths: Iterable[str | os.PathLike]) -> None:
        """Record the output files of an order (kept in order; a path given twice is kept once)."""
        paths = [str(p) for p in paths]

        def work() -> None:
            with self._transaction() as db:
                state = self._state_of(db, number)
                if state == "void":
                    raise SpecError(f"work order {number} is void; files cannot be attached",
                                    file=str(self.path))
                known = {row[0] for row in db.execute(
                    "SELECT path FROM order_files WHERE number = ?", (number,))}
                position = db.execute("SELECT COUNT(*) FROM order_files WHERE number = ?",
                                      (number,)).fetchone()[0]
                for path in paths:
                    if path in known:
                        continue
                    known.add(path)
                    db.execute("INSERT INTO order_files (number, position, path) VALUES (?, ?, ?)",
                               (number, position, path))
                    position += 1

        self._retrying(work)

    # --- state --------------------------------------------------------------------------------

    def _state_of(self, db: sqlite3.Connection, number: str) -> str:
        row = db.execute("SELECT state FROM orders WHERE number = ?", (number,)).fetchone()
        if row is None:
            raise SpecError(f"no work order {number} in the register", file=str(self.path))
        return row[0]

    def set_state(self, number: str, state: str, why: str | None = None) -> Order:
        """Move an order to ``state`` (see :data:`TRANSITIONS`); ``void`` needs ``why``."""
        _check_state(state)
        why = _one_line(why) if why and str(why).strip() else None
        if state == "void" and not why:
            raise SpecError(f"voiding {number} needs a reason (--why)")

        def work() -> None:
            with self._transaction() as db:
                current = self._state_of(db, number)
                if state not in TRANSITIONS[current]:
                    allowed = ", ".join(sorted(TRANSITIONS[current])) or "none, it is final"
                    raise SpecError(f"work order {number} cannot go from {current} to {state} "
                                    f"(allowed: {allowed})", file=str(self.path))
                db.execute("UPDATE orders SET state = ?, void_reason = ? WHERE number = ?",
                           (state, why if state == "void" else None, number))
                event_no = db.execute("SELECT COUNT(*) FROM order_events WHERE number = ?",
                                      (number,)).fetchone()[0] + 1
                db.execute("INSERT INTO order_events (number, event_no, at, from_state, to_state, why) "
                           "VALUES (?, ?, ?, ?, ?, ?)",
                           (number, event_no, _iso(_now_utc()), current, state, why))

        self._retrying(work)
        return self.get(number)

    def void(self, number: str, reason: str) -> Order:
        """Void an order; the number stays listed with the reason and is never reused."""
        return self.set_state(number, "void", why=reason)

    def void_unfinished(self, older_than_s: float = 3600.0,
                        reason: str = "issue never finished (no output files recorded)") -> list[str]:
        """Void ``issued`` orders that got no files and were issued more than ``older_than_s``
        seconds ago: what a process killed between allocation and rendering leaves behind."""
        cutoff = _iso(_now_utc() - _dt.timedelta(seconds=older_than_s))
        rows = self._retrying(lambda: self._db.execute(
            "SELECT number FROM orders WHERE state = 'issued' AND issued_at <= ? AND NOT EXISTS "
            "(SELECT 1 FROM order_files f WHERE f.number = orders.number) ORDER BY number",
            (cutoff,)).fetchall())
        voided = []
        for (number,) in rows:
            try:
                self.void(number, reason)
            except SpecError:  # someone attached files or moved it meanwhile
                continue
            voided.append(number)
        return voided

    # --- reading ------------------------------------------------------------------------------

    def _orders(self, where: str, params: tuple) -> list[Order]:
        def work() -> list[Order]:
            rows = self._db.execute(
                f"SELECT {_ORDER_COLUMNS} FROM orders {where} ORDER BY issued_at, number",
                params).fetchall()
            files: dict[str, list[str]] = {}
            if rows:
                for number, path in self._db.execute(
                        f"SELECT f.number, f.path FROM order_files f JOIN orders ON "
                        f"orders.number = f.number {where} ORDER BY f.number, f.position", params):
                    files.setdefault(number, []).append(path)
            return [Order(*row, files=tuple(files.get(row[0], ()))) for row in rows]

        return self._retrying(work)

    def get(self, number: str) -> Order:
        found = self._orders("WHERE orders.number = ?", (number,))
        if not found:
            raise SpecError(f"no work order {number} in the register", file=str(self.path))
        return found[0]

    def list(self, part: str | None = None, revision: str | None = None, state: str | None = None,
             since=None) -> list[Order]:
        """Orders matching every filter given, oldest first. ``since``: a date or ISO timestamp."""
        clauses, params = [], []
        if part is not None:
            clauses.append("orders.part = ?")
            params.append(part)
        if revision is not None:
            clauses.append("orders.revision = ?")
            params.append(revision)
        if state is not None:
            clauses.append("orders.state = ?")
            params.append(_check_state(state))
        since_iso = _parse_since(since)
        if since_iso is not None:
            clauses.append("orders.issued_at >= ?")
            params.append(since_iso)
        where = ("WHERE " + " AND ".join(clauses)) if clauses else ""
        return self._orders(where, tuple(params))

    def where_used(self, part: str, revision: str | None = None, *,
                   include_void: bool = False) -> list[Order]:
        """Traceability: the work orders (and so the lots) built from ``part`` (one revision or
        all), oldest first. Void orders were never built and are left out unless asked for."""
        orders = self.list(part=part, revision=revision)
        return orders if include_void else [o for o in orders if o.state != "void"]

    def history(self, number: str) -> list[Event]:
        """Every state change of an order, oldest first."""
        self.get(number)  # a clear error for an unknown number
        rows = self._retrying(lambda: self._db.execute(
            "SELECT number, at, from_state, to_state, why FROM order_events WHERE number = ? "
            "ORDER BY event_no", (number,)).fetchall())
        return [Event(*row) for row in rows]

    def export_csv(self, path: str | os.PathLike) -> int:
        """Write every order to a CSV file (atomically); returns the number of rows."""
        from specgen.atomic import write_atomic

        orders = self.list()
        write_atomic(path, orders_csv(orders))
        return len(orders)


def orders_csv(orders: Iterable[Order]) -> str:
    """Orders as CSV text (header row, files joined with '; '), cells safe for spreadsheets."""
    from specgen.csvsafe import csv_text

    rows = []
    for order in orders:
        row = order.to_dict()
        row["files"] = "; ".join(order.files)
        rows.append([row[c] for c in CSV_COLUMNS])
    return csv_text(CSV_COLUMNS, rows)
