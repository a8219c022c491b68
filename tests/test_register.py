"""Work-order register (issue 6) and the atomic writer it and the documents rely on.

Independent references used here:
- the ``sqlite3`` command-line shell (/usr/bin/sqlite3), a separate client of the same file;
- the SQLite file-format document (sqlite.org/fileformat2.html): the 16-byte header string
  "SQLite format 3\\0" at offset 0, the big-endian ``user_version`` at offset 60 and
  ``application_id`` at offset 68 -- read here straight from the bytes, not through our code;
- the SQLite PRAGMA documentation: ``PRAGMA integrity_check`` answers a single row "ok" for a sound file;
- POSIX rename(2): replacing a file by rename is atomic, readers see the old or the new file;
- RFC 4180 CSV as read back by Python's csv module; JSON as read back by Python's json module.
"""

from __future__ import annotations

import csv
import datetime as dt
import fnmatch
import json
import os
import random
import shutil
import signal
import sqlite3
import stat
import struct
import subprocess
import sys
import time
from pathlib import Path

import pytest
import typer
from typer.testing import CliRunner

from specgen import atomic
from specgen.atomic import TEMP_GLOB, atomic_paths, clean_stale_temps, write_atomic
from specgen.commands import orders as orders_cli
from specgen.errors import SpecError
from specgen.register import APPLICATION_ID, SCHEMA_VERSION, Order, Register

REPO = Path(__file__).resolve().parents[1]
WORKER = Path(__file__).resolve().parent / "register_helpers" / "worker.py"
SQLITE_SHELL = shutil.which("sqlite3") or "/usr/bin/sqlite3"
needs_shell = pytest.mark.skipif(not os.path.exists(SQLITE_SHELL), reason="sqlite3 shell not installed")
YEAR = dt.datetime.now(dt.timezone.utc).year


def child_env() -> dict:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(REPO) + os.pathsep + env.get("PYTHONPATH", "")
    return env


def start_worker(*args: str, **kwargs) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, str(WORKER), *args], cwd=REPO, env=child_env(),
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, **kwargs)


def shell(db: Path, sql: str) -> str:
    """Ask the independent sqlite3 shell (read-only) and return its output."""
    done = subprocess.run([SQLITE_SHELL, "-readonly", str(db), sql], capture_output=True,
                          text=True, timeout=30)
    assert done.returncode == 0, done.stderr
    return done.stdout.strip()


def header_ints(db: Path) -> tuple[int, int]:
    """(user_version, application_id) read from the raw header (SQLite file format, offsets 60, 68)."""
    head = db.read_bytes()[:100]
    assert head[:16] == b"SQLite format 3\x00"
    return struct.unpack(">I", head[60:64])[0], struct.unpack(">I", head[68:72])[0]


def issue(reg: Register, part="BH-1042", revision="B", qty=50, **kw) -> str:
    return reg.allocate(part, revision, kw.pop("fingerprint", "3f9a0c1d2e4b5a6f"), qty,
                        kw.pop("lot", "L-0001"), kw.pop("due", "2026-06-30"),
                        kw.pop("issued_by", "planner"), **kw)


def kind_of(target: str) -> str:
    return "postgresql" if target.startswith("postgresql://") else "sqlite"


@pytest.fixture
def db(tmp_path) -> Path:
    """An SQLite register file (for the tests of SQLite's own file handling)."""
    return tmp_path / "specgen-register.sqlite"


# --- numbering under concurrency --------------------------------------------------------------

@pytest.mark.parametrize("busy_timeout_s", ["2.0", "0.001"], ids=["busy-handler", "retry-loop"])
def test_eight_processes_allocate_200_distinct_consecutive_numbers(db, tmp_path, busy_timeout_s):
    """8 processes x 25 issues on one (not yet existing) register: 200 distinct numbers 1..200,
    no errors. The children race to create the file too. Counted by the sqlite3 shell as well.
    With a 1 ms busy timeout the waiting falls to our own jittered retry loop instead of SQLite's
    busy handler."""
    go = tmp_path / "go"
    workers = [start_worker("allocate", str(db), "25", str(go), busy_timeout_s) for _ in range(8)]
    time.sleep(0.3)  # let every interpreter start so they really contend
    started = time.monotonic()
    go.touch()
    outputs = [w.communicate(timeout=120) for w in workers]
    elapsed = time.monotonic() - started
    numbers, retries = [], 0
    for worker, (out, err) in zip(workers, outputs):
        assert worker.returncode == 0, err
        assert err == ""
        *mine, last = out.splitlines()
        retries += int(last.removeprefix("RETRIES "))
        assert len(mine) == 25
        assert mine == sorted(mine)  # each process sees its own numbers rise
        numbers += mine
    assert len(set(numbers)) == 200
    assert sorted(numbers) == [f"WO-{YEAR}-{seq:05d}" for seq in range(1, 201)]
    with Register.open(db) as reg:
        assert len(reg.list()) == 200
    if os.path.exists(SQLITE_SHELL):
        assert shell(db, "SELECT COUNT(DISTINCT number), MIN(seq), MAX(seq) FROM orders") == "200|1|200"
        assert shell(db, "PRAGMA integrity_check") == "ok"
    print(f"8x25 allocations in {elapsed:.2f} s, busy timeout {busy_timeout_s} s, {retries} retries")
    assert elapsed < 60


# --- crashes ----------------------------------------------------------------------------------

def kill_at(db: Path, mode: str, marker: str) -> None:
    child = start_worker(mode, str(db))
    try:
        line = child.stdout.readline().strip()
    finally:
        os.kill(child.pid, signal.SIGKILL)  # stopped at the marker (or failed): kill it either way
        _, err = child.communicate(timeout=30)
    assert line == marker, err
    assert child.returncode == -signal.SIGKILL


@needs_shell
def test_kill_inside_transaction_takes_no_number(db):
    """SIGKILL while the allocation transaction is open: the file passes the integrity check (read by
    the sqlite3 shell, which also recovers the WAL), the number is absent and is handed out next."""
    with Register.open(db) as reg:
        first = issue(reg)
    kill_at(db, "hang-in-txn", "IN_TXN")
    assert shell(db, "PRAGMA integrity_check") == "ok"
    assert shell(db, "SELECT number FROM orders") == first
    with Register.open(db) as reg:
        assert [o.number for o in reg.list()] == [first]
        assert issue(reg) == f"WO-{YEAR}-00002"  # no gap left by the killed process


@needs_shell
def test_kill_after_commit_leaves_an_order_that_is_voided(db):
    """SIGKILL after the number was committed but before any file was attached: the file is
    consistent, and void_unfinished turns the orphan into a listed void."""
    kill_at(db, "hang-after-commit", "COMMITTED")
    assert shell(db, "PRAGMA integrity_check") == "ok"
    with Register.open(db) as reg:
        (orphan,) = reg.list()
        assert orphan.state == "issued" and orphan.files == ()
        assert reg.void_unfinished(older_than_s=3600) == []  # too young: may still be rendering
        assert reg.void_unfinished(older_than_s=0) == [orphan.number]
        again = reg.get(orphan.number)
        assert again.state == "void" and "never finished" in again.void_reason
        assert issue(reg) == f"WO-{YEAR}-00002"


# --- schema versions, foreign and damaged files ----------------------------------------------

# Version 1 of the schema, written out by hand (not taken from specgen) as an old file would hold it.
V1_SCHEMA = f"""
PRAGMA application_id = {APPLICATION_ID};
CREATE TABLE meta (key TEXT PRIMARY KEY, value TEXT NOT NULL);
INSERT INTO meta VALUES ('app', 'specgen-register');
CREATE TABLE orders (
  number TEXT PRIMARY KEY, part TEXT NOT NULL, revision TEXT NOT NULL, fingerprint TEXT NOT NULL,
  qty INTEGER NOT NULL CHECK (qty > 0), lot TEXT, due TEXT, issued_at TEXT NOT NULL,
  issued_by TEXT NOT NULL,
  state TEXT NOT NULL CHECK (state IN ('issued', 'floor', 'complete', 'void')), void_reason TEXT);
CREATE TABLE order_files (number TEXT NOT NULL REFERENCES orders (number), position INTEGER NOT NULL,
  path TEXT NOT NULL, PRIMARY KEY (number, path));
CREATE INDEX orders_part_revision ON orders (part, revision);
INSERT INTO orders VALUES ('WO-{YEAR}-00001', 'BH-4120', 'A', 'aa11', 12, 'L-7', '2026-03-01',
  '{YEAR}-01-05T08:00:00+00:00', 'old', 'complete', NULL);
INSERT INTO orders VALUES ('WO-{YEAR}-00002', 'BH-4120', 'B', 'bb22', 30, 'L-8', '2026-04-01',
  '{YEAR}-01-06T08:00:00+00:00', 'old', 'void', 'wrong core');
INSERT INTO orders VALUES ('WO-{YEAR}-00003', 'BH-4120', 'B', 'bb22', 40, 'L-9', '2026-04-01',
  '{YEAR}-01-07T08:00:00+00:00', 'old', 'floor', NULL);
INSERT INTO order_files VALUES ('WO-{YEAR}-00001', 0, 'out/WO-{YEAR}-00001.pdf');
PRAGMA user_version = 1;
"""


def test_older_schema_is_migrated(db):
    """A hand-built version-1 file is migrated on open: data kept, user_version raised (checked in
    the raw header), and new numbers continue after the old ones."""
    con = sqlite3.connect(db)
    con.executescript(V1_SCHEMA)
    con.close()
    assert header_ints(db) == (1, APPLICATION_ID)
    with Register.open(db) as reg:
        old = reg.get(f"WO-{YEAR}-00001")
        assert (old.part, old.revision, old.qty, old.state) == ("BH-4120", "A", 12, "complete")
        assert old.files == (f"out/WO-{YEAR}-00001.pdf",)
        assert reg.get(f"WO-{YEAR}-00002").void_reason == "wrong core"
        assert [e.to_state for e in reg.history(old.number)] == ["issued"]
        assert reg.get(f"WO-{YEAR}-00003").state == "in-work"  # the old name of the state, renamed
        assert issue(reg) == f"WO-{YEAR}-00004"  # steps past the numbers the old file holds
        assert reg.set_state(f"WO-{YEAR}-00003", "complete").state == "complete"
    assert header_ints(db) == (SCHEMA_VERSION, APPLICATION_ID)
    if os.path.exists(SQLITE_SHELL):
        assert shell(db, "PRAGMA integrity_check") == "ok"
        assert shell(db, "PRAGMA foreign_key_check") == ""
    with Register.open(db) as reg:  # opening again is a no-op
        assert len(reg.list()) == 4


def test_reading_an_older_register_never_converts_it(db):
    """A read (orders list) of a version-1 file says to upgrade and leaves every byte as it was."""
    con = sqlite3.connect(db)
    con.executescript(V1_SCHEMA)
    con.close()
    before = db.read_bytes()
    with pytest.raises(SpecError, match="older than this specgen.*orders upgrade"):
        Register.open(db, read_only=True)
    r = cli("list", "--register", str(db))
    assert r.exit_code == 2 and "orders upgrade" in r.stderr
    assert db.read_bytes() == before and folder_listing(db) == {db.name}
    r = cli("upgrade", "--register", str(db))
    assert r.exit_code == 0 and header_ints(db)[0] == SCHEMA_VERSION


def make_register_with_orders(db: Path, count: int = 40) -> None:
    with Register.open(db) as reg:
        for i in range(count):
            issue(reg, lot=f"L-{i:04d}" + "x" * 200)  # long lots: several pages of data


def folder_listing(db: Path) -> set[str]:
    return {p.name for p in db.parent.iterdir()}


def assert_refused_unchanged(db: Path, *needles: str) -> None:
    before = db.read_bytes()
    files_before = folder_listing(db)
    with pytest.raises(SpecError) as caught:
        Register.open(db)
    message = str(caught.value)
    assert "\n" not in message and message.startswith(str(db))
    for needle in needles:
        assert needle in message
    assert db.read_bytes() == before
    assert folder_listing(db) == files_before  # no journal, WAL or temp files left beside it


def test_non_sqlite_file_is_refused_and_untouched(db):
    db.write_text("part,qty\nBH-1042,50\n")
    assert_refused_unchanged(db, "not a specgen register", "not an SQLite database")


@pytest.mark.parametrize("damage", ["garbled pages", "garbled first page", "truncated"])
def test_damaged_register_is_refused_and_untouched(db, damage):
    make_register_with_orders(db)
    data = bytearray(db.read_bytes())
    assert len(data) > 3 * 4096
    rng = random.Random(6)
    if damage == "garbled pages":
        for offset in range(4096, len(data)):
            data[offset] = rng.randrange(256)
    elif damage == "garbled first page":
        for offset in range(100, 4096):  # keep the 100-byte header, spoil the schema page
            data[offset] = rng.randrange(256)
    else:
        data = data[:len(data) // 2 + 1000]
    db.write_bytes(bytes(data))
    assert_refused_unchanged(db, "damaged")
    with pytest.raises(SpecError):
        Register.open(db, create=False)
    assert not Path(str(db) + "-journal").exists()


@pytest.mark.parametrize("journal", ["delete", "wal"])
def test_foreign_sqlite_file_is_refused_and_untouched(db, journal):
    con = sqlite3.connect(db)
    con.execute(f"PRAGMA journal_mode = {journal}")
    con.executescript("""
        CREATE TABLE customers (id INTEGER PRIMARY KEY, name TEXT);
        CREATE TABLE invoices (id INTEGER PRIMARY KEY, customer INTEGER, total TEXT);
        INSERT INTO customers VALUES (1, 'Quillfeather Irrigation');
        PRAGMA user_version = 7;""")
    con.close()
    assert_refused_unchanged(db, "another application", "customers, invoices")


def test_foreign_application_id_is_refused(db):
    con = sqlite3.connect(db)
    con.executescript("PRAGMA application_id = 1234; CREATE TABLE meta (key TEXT, value TEXT);")
    con.close()
    assert_refused_unchanged(db, "another application")


def test_newer_schema_is_refused_and_untouched(db):
    make_register_with_orders(db, 2)
    con = sqlite3.connect(db)
    con.execute(f"PRAGMA user_version = {SCHEMA_VERSION + 1}")
    con.close()
    assert_refused_unchanged(db, "newer than this specgen")


def test_missing_folder_and_missing_register(tmp_path):
    with pytest.raises(SpecError, match="does not exist"):
        Register.open(tmp_path / "nowhere" / "r.sqlite")
    with pytest.raises(SpecError, match="no register here"):
        Register.open(tmp_path / "r.sqlite", create=False)
    with pytest.raises(SpecError, match="no register here"):
        Register.open(tmp_path / "r.sqlite", read_only=True)
    assert not (tmp_path / "r.sqlite").exists()


def test_reading_an_empty_file_leaves_it_empty(tmp_path):
    """`orders list --register empty.sqlite` is a read: the empty file is not turned into a register."""
    empty = tmp_path / "empty.sqlite"
    empty.write_bytes(b"")
    for args in (("list",), ("show", "WO-1"), ("where-used", "BH-1042"), ("stale",), ("set", "WO-1", "void")):
        r = cli(*args, "--register", str(empty))
        assert r.exit_code == 2 and "no register here" in r.stderr, (args, r.output)
        assert empty.read_bytes() == b"" and {p.name for p in tmp_path.iterdir()} == {"empty.sqlite"}


# --- an independent client --------------------------------------------------------------------

@needs_shell
def test_sqlite3_shell_reads_the_register(db):
    with Register.open(db) as reg:
        a = issue(reg, lot="L-A")
        b = issue(reg, revision="C", lot="L-B", qty=7)
        reg.attach_files(a, ["out/a.pdf", "out/a.html"])
        reg.void(b, "customer cancelled")
    assert shell(db, "PRAGMA integrity_check") == "ok"
    assert shell(db, "PRAGMA journal_mode") == "wal"
    assert shell(db, "PRAGMA user_version") == str(SCHEMA_VERSION)
    assert shell(db, "PRAGMA application_id") == str(APPLICATION_ID)
    rows = shell(db, "SELECT number, revision, qty, lot, state, void_reason FROM orders ORDER BY number")
    assert rows.splitlines() == [f"{a}|B|50|L-A|issued|", f"{b}|C|7|L-B|void|customer cancelled"]
    assert shell(db, f"SELECT path FROM order_files WHERE number = '{a}' ORDER BY position").splitlines() \
        == ["out/a.pdf", "out/a.html"]
    assert header_ints(db) == (SCHEMA_VERSION, APPLICATION_ID)


# --- numbering rules --------------------------------------------------------------------------

def test_erp_number_is_used_and_a_duplicate_refused(target):
    with Register.open(target) as reg:
        assert issue(reg, number="ERP-778812") == "ERP-778812"
        with pytest.raises(SpecError, match="already in the register"):
            issue(reg, number="ERP-778812")
        reg.void("ERP-778812", "entered twice")
        with pytest.raises(SpecError, match="void: entered twice"):
            issue(reg, number=" ERP-778812 ")  # a void number is never reused either
        # an ERP number that fits the shop's format is stepped past, never duplicated
        issue(reg, number=f"WO-{YEAR}-00002")
        assert [issue(reg), issue(reg)] == [f"WO-{YEAR}-00001", f"WO-{YEAR}-00003"]
        assert len({o.number for o in reg.list()}) == 4


def test_void_keeps_the_number_listed_and_the_sequence_gapless(target):
    with Register.open(target) as reg:
        first = issue(reg)
        with pytest.raises(RuntimeError):
            with reg.issuing("BH-2210", "A", "cc33", 5) as failed:
                raise RuntimeError("render failed:\nmissing font")
        third = issue(reg)
        listed = reg.list()
        assert [o.number for o in listed] == [first, failed, third]
        assert [int(n[-5:]) for n in (first, failed, third)] == [1, 2, 3]
        gone = reg.get(failed)
        assert gone.state == "void" and gone.void_reason == "render failed: render failed: missing font"
        assert reg.list(state="void") == [gone]
        assert [o.number for o in reg.where_used("BH-2210")] == []  # never built
        assert [o.number for o in reg.where_used("BH-2210", include_void=True)] == [failed]


def test_sequence_restarts_each_year(target):
    dec = dt.datetime(2026, 12, 31, 23, 59, tzinfo=dt.timezone.utc)
    jan = dt.datetime(2027, 1, 1, 0, 1, tzinfo=dt.timezone.utc)
    with Register.open(target) as reg:
        assert issue(reg, now=dec) == "WO-2026-00001"
        assert issue(reg, now=dec) == "WO-2026-00002"
        assert issue(reg, now=jan) == "WO-2027-00001"
        assert issue(reg, now=jan, fmt="J{seq:04d}") == "J0001"  # no {year}: one running count
        assert reg.get("WO-2027-00001").issued_at == "2027-01-01T00:01:00+00:00"


@pytest.mark.parametrize("fmt, needle", [("WO-{seq:05d}-{shift}", "unknown field {shift}"),
                                         ("WO-{year}", "no {seq}"), ("WO-{seq:q}", "number format")])
def test_bad_number_format_is_a_spec_error(target, fmt, needle):
    with Register.open(target) as reg:
        with pytest.raises(SpecError, match=needle.replace("{", r"\{").replace("}", r"\}")):
            issue(reg, fmt=fmt)
        assert reg.list() == []


@pytest.mark.parametrize("field, value", [("qty", 0), ("qty", 2.5), ("part", " "), ("due", "next week")])
def test_bad_order_fields_are_spec_errors(target, field, value):
    with Register.open(target) as reg:
        kwargs = {"part": "BH-1042", "qty": 5, "due": "2026-06-30"}
        kwargs[field] = value
        with pytest.raises(SpecError):
            issue(reg, **kwargs)
        assert reg.list() == []


# --- states, history, queries -----------------------------------------------------------------

def test_state_transitions(target):
    with Register.open(target) as reg:
        n = issue(reg)
        with pytest.raises(SpecError, match="cannot go from issued to complete"):
            reg.set_state(n, "complete")  # a lot is worked before it is complete
        assert reg.set_state(n, "in work", by="floor lead").state == "in-work"
        with pytest.raises(SpecError, match="cannot go from in-work to issued"):
            reg.set_state(n, "issued")
        with pytest.raises(SpecError, match="needs a reason"):
            reg.set_state(n, "void")
        with pytest.raises(SpecError, match="unknown state"):
            reg.set_state(n, "shipped")
        with pytest.raises(SpecError, match="no work order"):
            reg.set_state("WO-1999-00001", "in-work")
        assert reg.set_state(n, "complete", why="passed hipot").state == "complete"
        with pytest.raises(SpecError, match="final"):
            reg.void(n, "late")
        with pytest.raises(SpecError, match="a correction of .* needs a reason"):
            reg.set_state(n, "in-work", correction=True)
        # a correction is a new event; the earlier events stay as they were
        assert reg.set_state(n, "in-work", why="hipot log missing", by="QA", correction=True).state == "in-work"
        events = [(e.from_state, e.to_state, e.why, e.by, e.kind) for e in reg.history(n)]
        assert events[1:] == [("issued", "in-work", None, "floor lead", "change"),
                              ("in-work", "complete", "passed hipot", events[2][3], "change"),
                              ("complete", "in-work", "hipot log missing", "QA", "correction")]
        assert events[0][:2] == (None, "issued") and events[0][3] == "planner"
        with pytest.raises(SpecError, match="void"):
            m = issue(reg)
            reg.void(m, "duplicate")
            reg.attach_files(m, ["x.pdf"])


def test_a_draft_copy_can_never_be_made_valid(target):
    with Register.open(target) as reg:
        n = issue(reg, draft=True)
        reg.void(n, "draft copy: not for production")
        with pytest.raises(SpecError, match="draft copy"):
            reg.set_state(n, "issued", why="needed it after all", correction=True)
        m = issue(reg)
        reg.void(m, "entered twice by mistake")
        assert reg.set_state(m, "issued", why="the other one was the duplicate", correction=True).state == "issued"
        assert [e.kind for e in reg.history(m)] == ["change", "change", "correction"]


def test_list_filters_and_where_used(target):
    day = lambda d: dt.datetime(2026, 5, d, 9, 0, tzinfo=dt.timezone.utc)
    with Register.open(target) as reg:
        a = issue(reg, part="BH-1042", revision="A", lot="L-1", now=day(1))
        b = issue(reg, part="BH-1042", revision="B", lot="L-2", qty=80, now=day(3))
        c = issue(reg, part="BH-5018", revision="A", lot="L-3", now=day(5))
        d = issue(reg, part="BH-1042", revision="B", lot="L-4", now=day(7))
        reg.set_state(b, "in-work")
        reg.void(d, "wrong wire")
        assert [o.number for o in reg.list(part="BH-1042")] == [a, b, d]
        assert [o.number for o in reg.list(part="BH-1042", revision="B")] == [b, d]
        assert [o.number for o in reg.list(state="in work")] == [b]
        assert [o.number for o in reg.list(since="2026-05-03")] == [b, c, d]
        assert [o.number for o in reg.list(since="2026-05-05T09:00:01+00:00")] == [d]
        with pytest.raises(SpecError, match="since"):
            reg.list(since="last Tuesday")
        used = reg.where_used("BH-1042", "B")
        assert [(o.number, o.lot, o.qty) for o in used] == [(b, "L-2", 80)]
        assert [o.lot for o in reg.where_used("BH-1042")] == ["L-1", "L-2"]


def test_attach_files_keeps_order_and_skips_repeats(target):
    with Register.open(target) as reg:
        n = issue(reg)
        reg.attach_files(n, [Path("out") / "wo.pdf", "out/wo.html"])
        reg.attach_files(n, ["out/wo.pdf", "out/wo.svg"])
        assert reg.get(n).files == ("out/wo.pdf", "out/wo.html", "out/wo.svg")
        assert isinstance(reg.get(n), Order)


def test_export_csv_reads_back(target, tmp_path):
    """The export parses as RFC 4180 CSV (stdlib csv) with one row per order."""
    with Register.open(target) as reg:
        n = issue(reg, lot='L-"9", rework')
        reg.attach_files(n, ["a.pdf", "a.html"])
        issue(reg, qty=3)
        out = tmp_path / "orders.csv"
        assert reg.export_csv(out) == 2
    rows = list(csv.DictReader(out.read_text().splitlines()))
    assert [r["number"] for r in rows] == [n, f"WO-{YEAR}-00002"]
    assert rows[0]["lot"] == 'L-"9", rework' and rows[0]["files"] == "a.pdf; a.html"
    assert rows[1]["qty"] == "3" and rows[1]["due"] == "2026-06-30"


def test_busy_register_gives_a_spec_error_not_a_crash(db):
    """A writer holding the lock longer than all retries: a one-line SpecError, bounded in time."""
    make_register_with_orders(db, 1)
    holder = sqlite3.connect(db, isolation_level=None)
    holder.execute("BEGIN IMMEDIATE")
    try:
        reg = Register.open(db, retries=2, busy_timeout_s=0.05)
        started = time.monotonic()
        with pytest.raises(SpecError, match="busy"):
            issue(reg)
        assert time.monotonic() - started < 5
        assert len(reg.list()) == 1  # readers are not blocked by a writer in WAL mode
        reg.close()
    finally:
        holder.execute("ROLLBACK")
        holder.close()


# --- atomic writes ----------------------------------------------------------------------------

def current_umask() -> int:
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def test_write_atomic_replaces_and_keeps_mode(tmp_path):
    target = tmp_path / "quote.csv"
    target.write_text("old\n")
    os.chmod(target, 0o640)
    write_atomic(target, "new\n")
    assert target.read_text() == "new\n"
    assert stat.S_IMODE(target.stat().st_mode) == 0o640
    fresh = tmp_path / "fresh.bin"
    write_atomic(fresh, b"\x00\x01")
    assert fresh.read_bytes() == b"\x00\x01"
    assert stat.S_IMODE(fresh.stat().st_mode) == 0o666 & ~current_umask()
    write_atomic(tmp_path / "latin.txt", "Ω", encoding="utf-16")
    assert (tmp_path / "latin.txt").read_text(encoding="utf-16") == "Ω"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["fresh.bin", "latin.txt", "quote.csv"]


def test_write_atomic_refuses_a_symlink_at_the_target(tmp_path):
    """A link planted where an output goes (out/WO-1.pdf -> a file elsewhere) is never written through."""
    real = tmp_path / "elsewhere.txt"
    real.write_text("old")
    out = tmp_path / "out"
    out.mkdir()
    link = out / "WO-1.pdf"
    link.symlink_to(real)
    for write in (lambda: write_atomic(link, "new"), lambda: atomic_paths(link).__enter__()):
        with pytest.raises(SpecError, match="cannot write: it is a symbolic link"):
            write()
    assert link.is_symlink() and real.read_text() == "old"
    assert sorted(p.name for p in out.iterdir()) == ["WO-1.pdf"]


def test_write_atomic_errors_are_one_line_spec_errors(tmp_path):
    missing = tmp_path / "no-such-folder" / "wo.pdf"
    with pytest.raises(SpecError) as caught:
        write_atomic(missing, b"x")
    assert caught.value.file == str(missing)
    assert str(caught.value) == f"{missing}: cannot write: folder '{missing.parent}' does not exist"
    folder_target = tmp_path / "a-folder"
    folder_target.mkdir()
    with pytest.raises(SpecError, match="cannot write: it is a folder"):
        write_atomic(folder_target, b"x")
    assert list(folder_target.iterdir()) == [] and len(list(tmp_path.glob(TEMP_GLOB))) == 0


@pytest.mark.skipif(os.geteuid() == 0, reason="root ignores folder permissions")
def test_write_atomic_without_permission(tmp_path):
    locked = tmp_path / "locked"
    locked.mkdir()
    os.chmod(locked, 0o555)
    try:
        with pytest.raises(SpecError, match="cannot write: no permission"):
            write_atomic(locked / "wo.pdf", b"x")
    finally:
        os.chmod(locked, 0o755)


def test_write_atomic_permission_error_is_reported(tmp_path, monkeypatch):
    """Runs as root too: the refusal the OS would give (EACCES) is simulated at temp-file creation."""
    def refuse(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(atomic.tempfile, "NamedTemporaryFile", refuse)
    with pytest.raises(SpecError, match=r"cannot write: no permission to write in"):
        write_atomic(tmp_path / "wo.pdf", b"x")
    with pytest.raises(SpecError, match=r"cannot write: no permission to write in"):
        with atomic_paths(tmp_path / "wo.pdf", tmp_path / "wo.html"):
            pass
    assert list(tmp_path.iterdir()) == []


def test_write_atomic_failure_mid_write_keeps_old_file(tmp_path, monkeypatch):
    target = tmp_path / "wo.html"
    target.write_text("old")

    def fail(_written):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(atomic, "_chunk_hook", fail)
    with pytest.raises(SpecError, match="cannot write: no space left on device"):
        write_atomic(target, "x" * 100)
    assert target.read_text() == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["wo.html"]


def test_atomic_paths_all_or_nothing(tmp_path):
    pdf, html = tmp_path / "wo.pdf", tmp_path / "wo.html"
    pdf.write_text("old pdf")
    os.chmod(pdf, 0o600)
    with pytest.raises(ZeroDivisionError):
        with atomic_paths(pdf, html) as (tmp_pdf, tmp_html):
            tmp_pdf.write_text("new pdf")
            raise ZeroDivisionError
    assert pdf.read_text() == "old pdf" and not html.exists()
    assert [p.name for p in tmp_path.iterdir()] == ["wo.pdf"]
    with atomic_paths(pdf, html) as (tmp_pdf, tmp_html):
        assert tmp_pdf.parent == tmp_path and fnmatch.fnmatch(tmp_pdf.name, TEMP_GLOB)
        tmp_pdf.write_text("new pdf")
        tmp_html.write_text("new html")
        assert pdf.read_text() == "old pdf"  # nothing replaced before the block ends
    assert (pdf.read_text(), html.read_text()) == ("new pdf", "new html")
    assert stat.S_IMODE(pdf.stat().st_mode) == 0o600
    assert sorted(p.name for p in tmp_path.iterdir()) == ["wo.html", "wo.pdf"]


def assert_only_temp_litter(folder: Path, keep: set[str]) -> None:
    litter = [p.name for p in folder.iterdir() if p.name not in keep]
    assert litter, "a killed writer leaves its temporary file"
    assert all(fnmatch.fnmatch(name, TEMP_GLOB) for name in litter), litter
    assert clean_stale_temps(folder, older_than_s=3600) == []  # young: might still be writing
    assert {p.name for p in clean_stale_temps(folder, older_than_s=0)} == set(litter)
    assert {p.name for p in folder.iterdir()} == keep


def test_sigkill_mid_write_leaves_old_file_intact(tmp_path):
    target = tmp_path / "WO-2026-00001.pdf"
    target.write_bytes(b"%PDF old work order")
    child = start_worker("slow-write", str(target), "8")
    assert child.stdout.readline().strip() == "WRITING", child.stderr.read()
    temps = list(tmp_path.glob(TEMP_GLOB))
    assert len(temps) == 1 and temps[0].stat().st_size >= 1 << 20  # really mid-write
    os.kill(child.pid, signal.SIGKILL)
    child.communicate(timeout=30)
    assert child.returncode == -signal.SIGKILL
    assert target.read_bytes() == b"%PDF old work order"
    assert_only_temp_litter(tmp_path, {target.name})


def test_sigkill_between_outputs_replaces_neither(tmp_path):
    pdf, html = tmp_path / "wo.pdf", tmp_path / "wo.html"
    pdf.write_text("old pdf")
    html.write_text("old html")
    child = start_worker("slow-paths", str(pdf), str(html))
    assert child.stdout.readline().strip() == "WRITING", child.stderr.read()
    os.kill(child.pid, signal.SIGKILL)
    child.communicate(timeout=30)
    assert child.returncode == -signal.SIGKILL
    assert (pdf.read_text(), html.read_text()) == ("old pdf", "old html")
    assert_only_temp_litter(tmp_path, {"wo.pdf", "wo.html"})


# --- command line -----------------------------------------------------------------------------

runner = CliRunner()


def cli(*args: str):
    return runner.invoke(orders_cli.app, list(args))


def test_cli_commands(target, tmp_path):
    with Register.open(target) as reg:
        a = issue(reg, revision="A", lot="L-10")
        b = issue(reg, revision="B", lot="L-11", qty=20)
        reg.attach_files(b, ["out/b.pdf"])
    r = cli("list", "--register", target)
    assert r.exit_code == 0 and a in r.stdout and b in r.stdout
    r = cli("list", "--revision", "B", "--json", "--register", target)
    listed = json.loads(r.stdout)
    assert [o["number"] for o in listed["orders"]] == [b] and listed["quotes"] == []
    assert listed["register"]["found_by"] == "--register" and listed["register"]["kind"] == kind_of(target)
    r = cli("list", "--csv", "--register", target)
    assert [row["lot"] for row in csv.DictReader(r.stdout.splitlines())] == ["L-10", "L-11"]
    r = cli("show", b, "--json", "--register", target)
    shown = json.loads(r.stdout)
    assert shown["files"] == ["out/b.pdf"] and shown["history"][0]["to"] == "issued"
    r = cli("show", b, "--register", target)
    assert "out/b.pdf" in r.stdout and "revision:" in r.stdout
    r = cli("set", a, "in work", "--register", target)
    assert r.exit_code == 0 and r.stdout.strip() == f"{a}: issued -> in-work"
    r = cli("set", b, "void", "--why", "customer cancelled", "--register", target)
    assert r.exit_code == 0
    r = cli("list", "--state", "void", "--register", target)
    assert "customer cancelled" in r.stdout
    r = cli("where-used", "BH-1042", "--register", target)
    assert "revision A: 1 work order, 50 pieces" in r.stdout and b not in r.stdout
    r = cli("where-used", "BH-1042", "--revision", "A", "--json", "--register", target)
    assert [o["lot"] for o in json.loads(r.stdout)["orders"]] == ["L-10"]
    out = tmp_path / "export.csv"
    r = cli("export", "--csv", str(out), "--register", target)
    assert r.exit_code == 0 and len(list(csv.DictReader(out.read_text().splitlines()))) == 2


@pytest.mark.parametrize("args, needle", [
    (("set", "WO-1999-00001", "in-work"), "no work order or quote"),
    (("set", "{a}", "complete"), "cannot go from issued to complete"),
    (("set", "{a}", "in-work", "--correct"), "needs a reason"),
    (("set", "{a}", "void"), "needs a reason"),
    (("set", "{a}", "shipped"), "unknown state"),
    (("list", "--since", "yesterday"), "since"),
    (("list", "--json", "--csv"), "choose one"),
    (("show", "nope"), "no work order or quote"),
])
def test_cli_errors_are_one_line_exit_2(target, args, needle):
    with Register.open(target) as reg:
        a = issue(reg)
    r = cli(*[x.format(a=a) for x in args], "--register", target)
    assert r.exit_code == 2
    assert r.stderr.count("\n") == 1 and needle in r.stderr and "Traceback" not in r.output


def test_cli_refuses_a_missing_register_and_uses_the_env_var(tmp_path, monkeypatch):
    missing = tmp_path / "typo.sqlite"
    r = cli("list", "--register", str(missing))
    assert r.exit_code == 2 and "no register here" in r.stderr and not missing.exists()
    db = tmp_path / "env.sqlite"
    with Register.open(db) as reg:
        n = issue(reg)
    monkeypatch.setenv("SPECGEN_REGISTER", str(db))
    r = cli("show", n)
    assert r.exit_code == 0 and n in r.stdout


def test_cli_mounts_as_orders_subcommand(target):
    root = typer.Typer()

    @root.callback()
    def main() -> None:
        """root"""

    root.add_typer(orders_cli.app)
    with Register.open(target) as reg:
        n = issue(reg)
    r = runner.invoke(root, ["orders", "list", "--register", target])
    assert r.exit_code == 0 and n in r.stdout


def test_orders_commands_do_not_import_weasyprint():
    done = subprocess.run([sys.executable, "-c", "import sys, specgen.commands.orders, specgen.atomic; "
                           "print('weasyprint' in sys.modules)"], cwd=REPO, env=child_env(),
                          capture_output=True, text=True, timeout=60)
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "False"
