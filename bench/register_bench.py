"""Register allocation speed: numbers per second with 16 concurrent issuers, against a bare INSERT loop.

For each back end (SQLite file; PostgreSQL in a throwaway cluster, when the server is installed):

- issuers: 16 processes, each with the register open, wait for a start signal, then allocate
  ``PER_ISSUER`` work-order numbers; the rate is all numbers / the time from the signal to the last;
- baseline: one process, one connection, the same database and durability settings (SQLite: WAL,
  synchronous=FULL; PostgreSQL: its durable defaults), a loop of single-row INSERTs each committed on
  its own, into a scratch table: what one durable write costs there, with no numbering logic.

An allocation is one serialised write transaction (counter, row, first event) plus the sweep for
unfinished numbers, so it is a few times the bare INSERT; the ratio shows what the numbering
guarantees cost on the same machine in the same run.

    python bench/register_bench.py            # both back ends, prints the figures
    python bench/register_bench.py child ...  # (internal) one issuer
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tools"))

ISSUERS = 16
PER_ISSUER = 50
BARE_INSERTS = 400


def child(target: str, count: int, go: str) -> None:
    from specgen.register import Register

    with Register.open(target, retries=200) as reg:
        while not Path(go).exists():
            time.sleep(0.001)
        for i in range(count):
            reg.allocate("BH-3305", "C", "f" * 16, 1 + i, issued_by="bench")


def issuers(target: str, folder: Path) -> float:
    """Numbers per second for ISSUERS processes allocating PER_ISSUER numbers each."""
    from specgen.register import Register

    Register.open(target).close()  # create and migrate once, outside the timing
    go = folder / "go"
    procs = [subprocess.Popen([sys.executable, __file__, "child", target, str(PER_ISSUER), str(go)])
             for _ in range(ISSUERS)]
    time.sleep(1.5)  # every interpreter up and waiting
    start = time.perf_counter()
    go.touch()
    for proc in procs:
        if proc.wait() != 0:
            raise RuntimeError("an issuer failed")
    elapsed = time.perf_counter() - start
    with Register.open(target, read_only=True) as reg:
        numbers = [o.number for o in reg.list()]
    if len(set(numbers)) != ISSUERS * PER_ISSUER:
        raise RuntimeError(f"expected {ISSUERS * PER_ISSUER} distinct numbers, got {len(set(numbers))}")
    go.unlink()
    return ISSUERS * PER_ISSUER / elapsed


def bare_sqlite(path: Path) -> float:
    import sqlite3

    db = sqlite3.connect(str(path), isolation_level=None)
    db.execute("PRAGMA journal_mode = WAL")
    db.execute("PRAGMA synchronous = FULL")
    db.execute("CREATE TABLE bench_bare (n INTEGER PRIMARY KEY, note TEXT NOT NULL)")
    start = time.perf_counter()
    for n in range(BARE_INSERTS):
        db.execute("BEGIN IMMEDIATE")
        db.execute("INSERT INTO bench_bare (n, note) VALUES (?, ?)", (n, "bench"))
        db.execute("COMMIT")
    elapsed = time.perf_counter() - start
    db.execute("DROP TABLE bench_bare")
    db.close()
    return BARE_INSERTS / elapsed


def bare_postgres(url: str) -> float:
    import psycopg

    with psycopg.connect(url, autocommit=True) as db:
        db.execute("CREATE TABLE bench_bare (n INTEGER PRIMARY KEY, note TEXT NOT NULL)")
        start = time.perf_counter()
        for n in range(BARE_INSERTS):
            with db.transaction():
                db.execute("INSERT INTO bench_bare (n, note) VALUES (%s, %s)", (n, "bench"))
        elapsed = time.perf_counter() - start
        db.execute("DROP TABLE bench_bare")
    return BARE_INSERTS / elapsed


def bench() -> dict:
    """{back end: (numbers per second, bare inserts per second)}; PostgreSQL left out if not installed."""
    out = {}
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        register = folder / "specgen-register.sqlite"
        rate = issuers(str(register), folder)
        out["SQLite"] = (rate, bare_sqlite(register))
        from pg_throwaway import ThrowawayCluster, server_bin

        if server_bin() is not None:
            with ThrowawayCluster(durable=True, port=55433) as cluster:
                url = cluster.new_database("bench")
                rate = issuers(url, folder)
                out["PostgreSQL"] = (rate, bare_postgres(url))
    return out


if __name__ == "__main__":
    if len(sys.argv) > 1 and sys.argv[1] == "child":
        child(sys.argv[2], int(sys.argv[3]), sys.argv[4])
    else:
        for name, (rate, bare) in bench().items():
            print(f"{name}: {rate:,.0f} numbers/s with {ISSUERS} issuers; bare INSERT {bare:,.0f}/s; "
                  f"ratio {rate / bare:.2f}")
