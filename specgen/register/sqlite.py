"""The embedded back end: one SQLite file (stdlib :mod:`sqlite3`), the default that needs nothing.

Write transactions are ``BEGIN IMMEDIATE`` (the write lock is taken up front, so a transaction never
has to upgrade a read lock and deadlock); concurrent processes queue on it. ``SQLITE_BUSY`` is
retried with a bounded, jittered backoff and, if the register stays locked, ends in a one-line
:class:`~specgen.errors.SpecError`. WAL mode; ``synchronous=FULL`` so a committed number survives a
power cut (a number lost after it was printed would be handed out twice). WAL needs a local
filesystem: do not put the register on a network share (use PostgreSQL for many seats).

Recognising the file: a register carries ``PRAGMA application_id`` = ``APPLICATION_ID`` and a
``meta`` row ``app = specgen-register``; the schema version is ``PRAGMA user_version``. A file that
is not SQLite, is damaged, belongs to another application or to a newer specgen is refused with a
clear message and is not modified. Opened for reading (``read_only``), the file is opened with
``mode=ro``: nothing is created, converted or migrated.
"""

from __future__ import annotations

import contextlib
import random
import sqlite3
import time
import urllib.parse
from collections.abc import Callable
from pathlib import Path
from typing import Any, TypeVar

import specgen.register.schema as schema
from specgen.errors import SpecError

from .model import one_line

T = TypeVar("T")
_SQLITE_MAGIC = b"SQLite format 3\x00"
_SQLITE_BUSY, _SQLITE_LOCKED = 5, 6  # SQLite result codes (sqlite.org/rescode.html)


def _is_busy(err: sqlite3.Error) -> bool:
    code = getattr(err, "sqlite_errorcode", None)
    if code is not None:
        return code & 0xFF in (_SQLITE_BUSY, _SQLITE_LOCKED)
    text = str(err).lower()
    return "locked" in text or "busy" in text


class SqliteBackend:
    """One connection to one register file. See the module docstring."""

    kind = "sqlite"
    IntegrityError = sqlite3.IntegrityError

    def __init__(self, path: Path, connection: sqlite3.Connection, *, retries: int, busy_timeout_s: float,
                 read_only: bool, hook: Callable[[str], None]):
        self.path = path
        self.where = str(path)
        self._db = connection
        self._retries = retries
        self._busy_timeout_s = busy_timeout_s
        self.read_only = read_only
        self._hook = hook
        self._create = True

    # --- opening --------------------------------------------------------------------------------

    @classmethod
    def open(cls, path: Path, *, create: bool, read_only: bool, retries: int, busy_timeout_s: float,
             hook: Callable[[str], None]) -> SqliteBackend:
        where = str(path)
        if path.is_dir():
            raise SpecError("register path is a folder; give a file such as specgen-register.sqlite", file=where)
        if not path.parent.is_dir():
            raise SpecError(f"cannot open register: folder '{path.parent}' does not exist", file=where)
        exists = path.exists()
        if not exists and (read_only or not create):
            raise SpecError("no register here (issue a work order first, or pass --register)", file=where)
        size = path.stat().st_size if exists else 0
        if exists and size == 0 and (read_only or not create):
            raise SpecError("no register here: the file is empty (issue a work order to start it)", file=where)
        if size > 0:
            try:
                with open(path, "rb") as handle:
                    head = handle.read(len(_SQLITE_MAGIC))
            except OSError as err:
                raise SpecError(f"cannot read register: {err.strerror or err}", file=where) from None
            if head != _SQLITE_MAGIC:
                raise SpecError("not a specgen register: the file is not an SQLite database "
                                "(damaged, or some other kind of file)", file=where)
        try:
            if read_only:
                uri = "file:" + urllib.parse.quote(str(path.resolve())) + "?mode=ro"
                connection = sqlite3.connect(uri, uri=True, timeout=busy_timeout_s, isolation_level=None)
            else:
                connection = sqlite3.connect(where, timeout=busy_timeout_s, isolation_level=None)
        except sqlite3.Error as err:
            raise SpecError(f"cannot open register: {err}", file=where) from None
        backend = cls(path, connection, retries=retries, busy_timeout_s=busy_timeout_s, read_only=read_only,
                      hook=hook)
        backend._create = create
        try:
            backend._retrying(backend._prepare)
        except BaseException:
            connection.close()
            raise
        return backend

    def _inspect(self) -> tuple[int, int, list[str], str | None]:
        """Read-only look at the file: (application_id, user_version, tables, meta app name)."""
        db = self._db
        app_id = db.execute("PRAGMA application_id").fetchone()[0]
        version = db.execute("PRAGMA user_version").fetchone()[0]
        tables = [row[0] for row in db.execute("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name")]
        app_name = None
        if "meta" in tables:
            try:
                row = db.execute("SELECT value FROM meta WHERE key = 'app'").fetchone()
                app_name = row[0] if row else None
            except sqlite3.OperationalError:  # a foreign "meta" table with other columns
                app_name = None
        return app_id, version, tables, app_name

    def _refuse_unless_ours(self, app_id: int, version: int, tables: list[str], app_name: str | None) -> bool:
        """Raise for a foreign or too-new file; return True if the file is still empty."""
        ours = app_id == schema.APPLICATION_ID or app_name == schema.APP_NAME
        if not ours:
            if not tables and app_id == 0 and version == 0:
                return True
            shown = ", ".join(tables[:6]) + (", …" if len(tables) > 6 else "")
            detail = f"it holds tables {shown}" if tables else f"application id {app_id:#x}"
            raise SpecError(f"not a specgen register: an SQLite database of another application "
                            f"({detail}); give another --register path", file=self.where)
        if version > schema.SCHEMA_VERSION:
            raise SpecError(f"register schema version {version} is newer than this specgen "
                            f"understands ({schema.SCHEMA_VERSION}); upgrade specgen", file=self.where)
        return False

    def _prepare(self) -> None:
        db = self._db
        try:
            state = self._inspect()
            empty = self._refuse_unless_ours(*state)
            if empty and (self.read_only or not self._create):
                raise SpecError("no register here: the file is an empty database", file=self.where)
            if not empty:
                check = db.execute("PRAGMA quick_check").fetchall()
                if [tuple(r) for r in check] != [("ok",)]:
                    first = check[0][0] if check else "no answer"
                    raise SpecError(f"register file is damaged (integrity check: {one_line(first, 120)}); "
                                    "restore it from a backup", file=self.where)
        except sqlite3.DatabaseError as err:
            if _is_busy(err):
                raise
            raise SpecError(f"register file is damaged or not a register ({err})", file=self.where) from None
        if self.read_only:
            db.execute(f"PRAGMA busy_timeout = {int(self._busy_timeout_s * 1000)}")
            if state[1] < schema.SCHEMA_VERSION:
                raise SpecError(f"register schema version {state[1]} is older than this specgen "
                                f"({schema.SCHEMA_VERSION}); reading never converts it: run "
                                "`specgen orders upgrade` (or any issue) first", file=self.where)
            return
        # From here on the file is ours (or empty): it may be written.
        try:
            db.execute(f"PRAGMA busy_timeout = {int(self._busy_timeout_s * 1000)}")
            mode = db.execute("PRAGMA journal_mode = WAL").fetchone()[0]
            db.execute("PRAGMA synchronous = FULL")
            if str(mode).lower() != "wal":
                raise SpecError(f"cannot switch the register to WAL mode (got {mode!r}); "
                                "is it on a network share?", file=self.where)
            if state[1] < schema.SCHEMA_VERSION:
                self._migrate()
            # after migrating: version 3 rebuilds a table that others refer to
            db.execute("PRAGMA foreign_keys = ON")
        except sqlite3.DatabaseError as err:
            if _is_busy(err):
                raise
            raise SpecError(f"register error: {err}", file=self.where) from None

    def _migrate(self) -> None:
        db = self._db
        db.execute("BEGIN IMMEDIATE")
        try:
            again = self._inspect()  # another process may have migrated while we waited for the lock
            self._refuse_unless_ours(*again)
            if again[1] < schema.SCHEMA_VERSION:
                for version in range(again[1] + 1, schema.SCHEMA_VERSION + 1):
                    for statement in schema.steps(version, self.kind):
                        db.execute(statement)
                db.execute(f"PRAGMA user_version = {schema.SCHEMA_VERSION}")
        except BaseException:
            with contextlib.suppress(sqlite3.Error):
                db.execute("ROLLBACK")
            raise
        db.execute("COMMIT")

    # --- running work ---------------------------------------------------------------------------

    def write(self, work: Callable[[Any], T]) -> T:
        """Run ``work(cursor)`` in one write transaction, again after SQLITE_BUSY."""
        if self.read_only:
            raise SpecError("the register was opened for reading only", file=self.where)

        def once() -> T:
            self._db.execute("BEGIN IMMEDIATE")
            try:
                result = work(self._db)
                self._hook("write:before-commit")
            except BaseException:
                with contextlib.suppress(sqlite3.Error):
                    self._db.execute("ROLLBACK")
                raise
            self._db.execute("COMMIT")
            return result

        return self._retrying(once)

    def read(self, work: Callable[[Any], T]) -> T:
        """Run ``work(cursor)`` on one consistent snapshot."""
        def once() -> T:
            self._db.execute("BEGIN")
            try:
                return work(self._db)
            finally:
                with contextlib.suppress(sqlite3.Error):
                    self._db.execute("COMMIT")

        return self._retrying(once)

    def _retrying(self, work: Callable[[], T]) -> T:
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
                    raise SpecError(f"register error: {err}", file=self.where) from None
                if attempt == self._retries:
                    break
                self._hook("retry")
                time.sleep(random.uniform(0.5, 1.5) * delay)
                delay = min(delay * 2, 1.0)
        raise SpecError(f"register is busy: another process kept it locked through "
                        f"{self._retries + 1} attempts; try again", file=self.where)

    @staticmethod
    def sql(text: str) -> str:
        return text

    def close(self) -> None:
        self._db.close()
