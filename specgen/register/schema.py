"""The register's schema, one list of steps per version, shared by every back end.

A step is either plain SQL both databases accept, or a :class:`Dialects` pair where SQLite and
PostgreSQL need different words for the same change (SQLite cannot alter a CHECK constraint, so
version 3 rebuilds the ``orders`` table there; PostgreSQL drops and re-adds the constraint). A step
that is ``None`` for a dialect is skipped there (the SQLite ``PRAGMA application_id``).

Versions
--------
1. orders and their files.
2. per-year sequence counters, each order's sequence number, the state-change history.
3. clearer state names (``floor`` becomes ``in-work``), who made each change and whether it was a
   correction, the issuing process (host and id) so a killed issue can be recognised, drafts marked,
   the quote an order fulfils; quotes with their own numbers, files and history.
4. the bench and test station's entries (``station_entries``): step sign-offs, readings with the winding
   temperature and their verdict against the Design's limits, dispositions, material lots used. Append-only:
   a trigger refuses any UPDATE or DELETE, and a correction is a new entry naming the one it replaces.
"""

from __future__ import annotations

import dataclasses

APPLICATION_ID = 0x53504752   # "SPGR": PRAGMA application_id of an SQLite register
APP_NAME = "specgen-register"


@dataclasses.dataclass(frozen=True)
class Dialects:
    sqlite: str | None
    postgresql: str | None

    def for_(self, kind: str) -> str | None:
        return self.sqlite if kind == "sqlite" else self.postgresql


_V3_ORDERS = """CREATE TABLE {name} (
    number TEXT PRIMARY KEY,
    part TEXT NOT NULL,
    revision TEXT NOT NULL,
    fingerprint TEXT NOT NULL,
    qty INTEGER NOT NULL CHECK (qty > 0),
    lot TEXT,
    due TEXT,
    issued_at TEXT NOT NULL,
    issued_by TEXT NOT NULL,
    state TEXT NOT NULL CHECK (state IN ('issued', 'in-work', 'complete', 'void')),
    void_reason TEXT,
    seq_scope TEXT,
    seq INTEGER,
    issuer_host TEXT,
    issuer_pid INTEGER,
    draft INTEGER NOT NULL DEFAULT 0,
    quote TEXT
)"""

_COPY_V2_ORDERS = """INSERT INTO orders_v3 (number, part, revision, fingerprint, qty, lot, due, issued_at,
    issued_by, state, void_reason, seq_scope, seq, draft)
  SELECT number, part, revision, fingerprint, qty, lot, due, issued_at, issued_by,
    CASE state WHEN 'floor' THEN 'in-work' ELSE state END, void_reason, seq_scope, seq,
    CASE WHEN state = 'void' AND void_reason LIKE 'draft copy%' THEN 1 ELSE 0 END
  FROM orders"""

MIGRATIONS: dict[int, list[str | Dialects]] = {
    1: [
        Dialects(f"PRAGMA application_id = {APPLICATION_ID}", None),
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
            state TEXT NOT NULL CONSTRAINT orders_state_check
                CHECK (state IN ('issued', 'floor', 'complete', 'void')),
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
        "CREATE TABLE sequences (scope TEXT PRIMARY KEY, last_seq INTEGER NOT NULL)",
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
    3: [
        # SQLite: rebuild orders with the new CHECK (foreign keys are off during migration);
        # PostgreSQL: change the constraint in place.
        Dialects(_V3_ORDERS.format(name="orders_v3"), None),
        Dialects(_COPY_V2_ORDERS, None),
        Dialects("DROP TABLE orders", None),
        Dialects("ALTER TABLE orders_v3 RENAME TO orders", None),
        Dialects("CREATE INDEX orders_part_revision ON orders (part, revision)", None),
        Dialects(None, "ALTER TABLE orders DROP CONSTRAINT orders_state_check"),
        Dialects(None, "UPDATE orders SET state = 'in-work' WHERE state = 'floor'"),
        Dialects(None, "ALTER TABLE orders ADD CONSTRAINT orders_state_check "
                       "CHECK (state IN ('issued', 'in-work', 'complete', 'void'))"),
        Dialects(None, "ALTER TABLE orders ADD COLUMN issuer_host TEXT"),
        Dialects(None, "ALTER TABLE orders ADD COLUMN issuer_pid INTEGER"),
        Dialects(None, "ALTER TABLE orders ADD COLUMN draft INTEGER NOT NULL DEFAULT 0"),
        Dialects(None, "ALTER TABLE orders ADD COLUMN quote TEXT"),
        "CREATE INDEX orders_state ON orders (state)",
        "UPDATE order_events SET to_state = 'in-work' WHERE to_state = 'floor'",
        "UPDATE order_events SET from_state = 'in-work' WHERE from_state = 'floor'",
        "ALTER TABLE order_events ADD COLUMN by_whom TEXT",
        "ALTER TABLE order_events ADD COLUMN kind TEXT NOT NULL DEFAULT 'change'",
        """CREATE TABLE quotes (
            number TEXT PRIMARY KEY,
            part TEXT NOT NULL,
            revision TEXT NOT NULL,
            fingerprint TEXT NOT NULL,
            customer TEXT,
            valid_until TEXT,
            issued_at TEXT NOT NULL,
            issued_by TEXT NOT NULL,
            state TEXT NOT NULL CHECK (state IN ('issued', 'accepted', 'declined', 'void')),
            void_reason TEXT,
            seq_scope TEXT,
            seq INTEGER,
            issuer_host TEXT,
            issuer_pid INTEGER
        )""",
        "CREATE INDEX quotes_part ON quotes (part, revision)",
        """CREATE TABLE quote_files (
            number TEXT NOT NULL REFERENCES quotes (number),
            position INTEGER NOT NULL,
            path TEXT NOT NULL,
            PRIMARY KEY (number, path)
        )""",
        """CREATE TABLE quote_events (
            number TEXT NOT NULL REFERENCES quotes (number),
            event_no INTEGER NOT NULL,
            at TEXT NOT NULL,
            from_state TEXT,
            to_state TEXT NOT NULL,
            why TEXT,
            by_whom TEXT,
            kind TEXT NOT NULL DEFAULT 'change',
            PRIMARY KEY (number, event_no)
        )""",
    ],
}
_STATION_ENTRIES = """CREATE TABLE station_entries (
    entry_id INTEGER PRIMARY KEY,
    number TEXT NOT NULL REFERENCES orders (number),
    kind TEXT NOT NULL CHECK (kind IN ('signoff', 'reading', 'disposition', 'material')),
    serial TEXT,
    item TEXT NOT NULL,
    label TEXT,
    value_si DOUBLE PRECISION,
    temp_c DOUBLE PRECISION,
    judged_si DOUBLE PRECISION,
    nominal_si DOUBLE PRECISION,
    low_si DOUBLE PRECISION,
    high_si DOUBLE PRECISION,
    unit TEXT,
    verdict TEXT CHECK (verdict IS NULL OR verdict IN ('pass', 'fail')),
    action TEXT,
    lot TEXT,
    reason TEXT,
    by_whom TEXT NOT NULL,
    at TEXT NOT NULL,
    replaces INTEGER REFERENCES station_entries (entry_id),
    source TEXT NOT NULL DEFAULT 'station'
)"""
_APPEND_ONLY_MESSAGE = "station entries are append-only: a correction is a new entry"

MIGRATIONS[4] = [
    _STATION_ENTRIES,
    "CREATE INDEX station_entries_order ON station_entries (number, kind)",
    "CREATE INDEX station_entries_lot ON station_entries (kind, lot)",
    Dialects(f"CREATE TRIGGER station_entries_no_update BEFORE UPDATE ON station_entries "
             f"BEGIN SELECT RAISE(ABORT, '{_APPEND_ONLY_MESSAGE}'); END", None),
    Dialects(f"CREATE TRIGGER station_entries_no_delete BEFORE DELETE ON station_entries "
             f"BEGIN SELECT RAISE(ABORT, '{_APPEND_ONLY_MESSAGE}'); END", None),
    Dialects(None, f"CREATE FUNCTION station_entries_append_only() RETURNS trigger LANGUAGE plpgsql AS "
                   f"$$ BEGIN RAISE EXCEPTION '{_APPEND_ONLY_MESSAGE}'; END $$"),
    Dialects(None, "CREATE TRIGGER station_entries_no_change BEFORE UPDATE OR DELETE ON station_entries "
                   "FOR EACH ROW EXECUTE FUNCTION station_entries_append_only()"),
]
SCHEMA_VERSION = max(MIGRATIONS)


def steps(version: int, kind: str) -> list[str]:
    """The SQL statements that bring a register of ``version - 1`` to ``version`` on ``kind``."""
    out = []
    for step in MIGRATIONS[version]:
        sql = step.for_(kind) if isinstance(step, Dialects) else step
        if sql:
            out.append(sql)
    return out
