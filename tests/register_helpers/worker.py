"""Child process for the register's multi-process and crash tests (not a test module itself).

    worker.py allocate DB COUNT GOFILE [BUSY_TIMEOUT_S]
                                         wait until GOFILE exists, then issue COUNT work orders,
                                         opening the register afresh each time (as separate CLI
                                         runs would); prints one number per line, then
                                         "RETRIES n" (busy retries taken by our backoff loop)
    worker.py hang-in-txn DB             allocate, stop inside the open transaction, print IN_TXN
    worker.py hang-after-commit DB       allocate, stop after the commit, print COMMITTED
    worker.py slow-write PATH MIB        write_atomic PATH with MIB MiB, stop after the first MiB
                                         has reached the temporary file, print WRITING
    worker.py slow-paths A B             atomic_paths(A, B): write both temporaries, print WRITING
                                         and stop before the renames
    worker.py allocate-located COUNT GOFILE
                                         as allocate, but the register is found from the current
                                         folder the way the orders commands find it (shop file or
                                         shop root); prints "REGISTER <target>" first
    worker.py issue DB OUTDIR STOP       issue a real work order for the demo part BH-5018 into
                                         OUTDIR; STOP is where to stop and print STOPPED: committed
                                         (number taken, nothing rendered), rendering (inside the
                                         PDF writer), written (files in place, not yet recorded) or
                                         none (finish and print the number)
DB may be an SQLite path or a postgresql:// URL.
The parent SIGKILLs the stopped children.
"""

import os
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from specgen import atomic
from specgen.register import Register
from specgen.register import core as register


def stop(message: str) -> None:
    print(message, flush=True)
    time.sleep(120)


def main(argv: list[str]) -> int:
    mode = argv[0]
    if mode == "allocate":
        db, count, go = argv[1], int(argv[2]), Path(argv[3])
        busy_timeout_s = float(argv[4]) if len(argv) > 4 else 2.0
        retries = [0]
        register._hook = lambda stage: retries.__setitem__(0, retries[0] + 1) \
            if stage == "retry" else None
        while not go.exists():
            time.sleep(0.002)
        for i in range(count):
            with Register.open(db, busy_timeout_s=busy_timeout_s, retries=60) as reg:
                number = reg.allocate("BH-3305", "C", "f" * 16, 10 + i, lot=f"P{os.getpid()}-{i}",
                                      due="2026-07-15", issued_by=f"worker{os.getpid()}")
            print(number, flush=True)
        print(f"RETRIES {retries[0]}", flush=True)
        return 0
    if mode == "allocate-located":
        from specgen.register import locate_register, shop_register_setting

        count, go = int(argv[1]), Path(argv[2])
        setting, folder = shop_register_setting(None)
        where = locate_register(None, None, shop_setting=setting, catalog_dir=folder)
        print(f"REGISTER {where.target}", flush=True)
        while not go.exists():
            time.sleep(0.002)
        for i in range(count):
            with Register.open(where.target, retries=60) as reg:
                print(reg.allocate("BH-3305", "C", "f" * 16, 1 + i, issued_by=f"w{os.getpid()}"), flush=True)
        print("RETRIES 0", flush=True)
        return 0
    if mode == "issue":
        return issue(*argv[1:])
    if mode in ("hang-in-txn", "hang-after-commit"):
        wanted = "allocate:in-transaction" if mode == "hang-in-txn" else "allocate:committed"
        register._hook = lambda stage: stop("IN_TXN" if "in-" in stage else "COMMITTED") \
            if stage == wanted else None
        with Register.open(argv[1]) as reg:
            reg.allocate("BH-1042", "B", "a" * 16, 25, lot="L-kill", due="2026-08-01",
                         issued_by="killed")
        return 0
    if mode == "slow-write":
        path, mib = argv[1], int(argv[2])
        atomic._chunk_hook = lambda written: stop("WRITING") if written >= (1 << 20) else None
        atomic.write_atomic(path, b"N" * (mib << 20))
        return 0
    if mode == "slow-paths":
        with atomic.atomic_paths(argv[1], argv[2]) as temps:
            for temp in temps:
                Path(temp).write_bytes(b"new content " * 1000)
            stop("WRITING")
        return 0
    print(f"unknown mode {mode}", file=sys.stderr)
    return 2


def issue(db: str, out: str, where_to_stop: str) -> int:
    """A real work-order issue (load, design, number, render, record), stopped at one point."""
    from specgen.documents import render
    from specgen.documents.workorder import issue_work_order

    demo = Path(__file__).resolve().parents[2] / "specgen" / "demo" / "BH-5018.yaml"
    if where_to_stop == "committed":
        register._hook = lambda stage: stop("STOPPED") if stage == "allocate:committed" else None
    elif where_to_stop == "rendering":
        real = render.write_pdf_and_html

        def slow(html, pdf, htm, blocked=None, **options):
            stop("STOPPED")  # the number is taken, the HTML made, no file written yet
            return real(html, pdf, htm, blocked, **options)

        render.write_pdf_and_html = slow
    elif where_to_stop == "written":
        Register.attach_files = lambda self, number, paths: stop("STOPPED")  # type: ignore[method-assign]
    issued = issue_work_order(demo, qty=5, out_dir=out, register_path=db, warn=lambda m: None)
    print(f"ISSUED {issued.number}", flush=True)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
