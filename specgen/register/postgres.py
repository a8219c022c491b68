"""The server back end: the same register on PostgreSQL, for a shop with many seats.

Chosen by a URL where a file path goes (``postgresql://user@host/dbname``; any libpq connection URL,
including ``?host=/run/postgresql`` for a local socket). Reached through psycopg 3, imported only when
such a URL is used, so SQLite users need nothing.

Same schema and migrations as SQLite (``schema.MIGRATIONS``, with the few dialect words it needs);
the schema version is the ``meta`` row ``schema_version``. Every write transaction first takes one
transaction-scoped advisory lock (``pg_advisory_xact_lock``) that belongs to the register: writers are
serialised exactly as SQLite's ``BEGIN IMMEDIATE`` serialises them, so reading the counter, stepping
past taken numbers and inserting the order behave the same on both back ends: no duplicate, no gap.
Readers never wait (MVCC). A lock wait longer than ``lock_timeout`` ends in a one-line SpecError.
Opened for reading, the session is read-only (``default_transaction_read_only``) and nothing is
created or migrated.

References
----------
PostgreSQL documentation, "Advisory Locks" (explicit locking) and "Transaction Isolation" (Read
Committed: each statement sees what was committed before it began).
"""

from __future__ import annotations

import re
from collections.abc import Callable, Iterator
from typing import Any, TypeVar

import specgen.register.schema as schema
from specgen.errors import SpecError

T = TypeVar("T")

#: The advisory lock key of a register ("SPGR" as a number, the same tag SQLite files carry).
LOCK_KEY = schema.APPLICATION_ID
URL_PREFIXES = ("postgresql://", "postgres://")


def is_url(target: object) -> bool:
    return isinstance(target, str) and target.lower().startswith(URL_PREFIXES)


def shown(url: str) -> str:
    """The URL without a password, for messages and ``--json``."""
    return re.sub(r"(://[^:/@?]*):[^@/?]*@", r"\1:***@", url)


def _psycopg() -> Any:
    try:
        import psycopg
    except ImportError:
        raise SpecError("a PostgreSQL register needs psycopg 3: pip install 'psycopg[binary]'") from None
    return psycopg


class PostgresBackend:
    """One connection to one register database. See the module docstring."""

    kind = "postgresql"

    def __init__(self, url: str, connection: Any, *, read_only: bool, hook: Callable[[str], None]):
        psycopg = _psycopg()
        self.url = url
        self.where = shown(url)
        self._db = connection
        self.read_only = read_only
        self._hook = hook
        self.IntegrityError = psycopg.errors.UniqueViolation
        self._psycopg = psycopg

    @classmethod
    def open(cls, url: str, *, create: bool, read_only: bool, lock_timeout_s: float,
             hook: Callable[[str], None]) -> PostgresBackend:
        psycopg = _psycopg()
        where = shown(url)
        options = f"-c lock_timeout={int(lock_timeout_s * 1000)}"
        if read_only:
            options += " -c default_transaction_read_only=on"
        try:
            connection = psycopg.connect(url, autocommit=True, options=options, connect_timeout=10)
        except psycopg.Error as err:
            raise SpecError(f"cannot reach the register's database: {_first_line(err)}", file=where) from None
        backend = cls(url, connection, read_only=read_only, hook=hook)
        try:
            backend._prepare(create)
        except BaseException:
            connection.close()
            raise
        return backend

    def _version(self, cur: Any) -> tuple[int, bool]:
        """(schema version, any tables at all) of the current schema."""
        cur.execute("SELECT table_name FROM information_schema.tables WHERE table_schema = current_schema()")
        tables = {row[0] for row in cur.fetchall()}
        if "meta" not in tables:
            if tables & {"orders", "quotes", "sequences"}:
                raise SpecError("not a specgen register: the database holds tables of another application",
                                file=self.where)
            return 0, bool(tables)
        cur.execute("SELECT key, value FROM meta WHERE key IN ('app', 'schema_version')")
        meta = dict(cur.fetchall())
        if meta.get("app") != schema.APP_NAME:
            raise SpecError("not a specgen register: its meta table belongs to another application",
                            file=self.where)
        return int(meta.get("schema_version", "1")), True

    def _prepare(self, create: bool) -> None:
        try:
            with self._db.cursor() as cur:
                version, _ = self._version(cur)
            if version > schema.SCHEMA_VERSION:
                raise SpecError(f"register schema version {version} is newer than this specgen understands "
                                f"({schema.SCHEMA_VERSION}); upgrade specgen", file=self.where)
            if version == schema.SCHEMA_VERSION:
                return
            if version == 0 and (self.read_only or not create):
                raise SpecError("no register in this database (issue a work order first, or pass --register)",
                                file=self.where)
            if self.read_only:
                raise SpecError(f"register schema version {version} is older than this specgen "
                                f"({schema.SCHEMA_VERSION}); reading never converts it: run "
                                "`specgen orders upgrade` (or any issue) first", file=self.where)
            self.write(self._migrate)
        except self._psycopg.Error as err:
            raise SpecError(f"register error: {_first_line(err)}", file=self.where) from None

    def _migrate(self, cur: Any) -> None:
        version, _ = self._version(cur)  # another process may have migrated while we waited for the lock
        for step in range(version + 1, schema.SCHEMA_VERSION + 1):
            for statement in schema.steps(step, self.kind):
                cur.execute(statement)
        if version < schema.SCHEMA_VERSION:
            cur.execute("DELETE FROM meta WHERE key = 'schema_version'")
            cur.execute("INSERT INTO meta (key, value) VALUES ('schema_version', ?)", (str(schema.SCHEMA_VERSION),))

    # --- running work ---------------------------------------------------------------------------

    def write(self, work: Callable[[Any], T]) -> T:
        """Run ``work(cursor)`` in one transaction holding the register's advisory lock."""
        if self.read_only:
            raise SpecError("the register was opened for reading only", file=self.where)
        psycopg = self._psycopg
        try:
            with self._db.transaction(), self._db.cursor() as cur:
                cur.execute("SELECT pg_advisory_xact_lock(%s)", (LOCK_KEY,))
                result = work(_Cursor(cur))
                self._hook("write:before-commit")
            return result
        except psycopg.errors.LockNotAvailable:
            raise SpecError("register is busy: another process kept it locked past the lock timeout; try again",
                            file=self.where) from None
        except psycopg.errors.UniqueViolation:
            raise
        except psycopg.Error as err:
            raise SpecError(f"register error: {_first_line(err)}", file=self.where) from None

    def read(self, work: Callable[[Any], T]) -> T:
        psycopg = self._psycopg
        try:
            with self._db.transaction(), self._db.cursor() as cur:
                cur.execute("SET TRANSACTION ISOLATION LEVEL REPEATABLE READ")
                return work(_Cursor(cur))
        except psycopg.Error as err:
            raise SpecError(f"register error: {_first_line(err)}", file=self.where) from None

    def close(self) -> None:
        self._db.close()


class _Cursor:
    """The few calls the register makes, with SQLite's ``?`` placeholders turned into ``%s``."""

    __slots__ = ("_cur",)

    def __init__(self, cur: Any):
        self._cur = cur

    def execute(self, sql: str, params: tuple[Any, ...] = ()) -> _Cursor:
        self._cur.execute(sql.replace("%", "%%").replace("?", "%s"), params)
        return self

    def fetchone(self) -> Any:
        return self._cur.fetchone()

    def fetchall(self) -> list[Any]:
        return list(self._cur.fetchall())

    def __iter__(self) -> Iterator[Any]:
        return iter(self._cur.fetchall())


def _first_line(err: BaseException) -> str:
    text = str(err).strip().splitlines()
    return text[0] if text else type(err).__name__
