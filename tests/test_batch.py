"""Batch issue: numbers in row order, a failed row does not stop the others, a failed render voids its number."""

import shutil
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from specgen.documents.batch import issue_batch, read_orders
from specgen.errors import SpecError

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"


def _orders(tmp_path, lines):
    p = tmp_path / "orders.csv"
    p.write_text("spec,qty,due,lot\n" + "\n".join(lines) + "\n")
    return p


def test_rows_in_order_and_failures_isolated(tmp_path):
    for name in ("BH-1042.yaml", "BH-5018.yaml", "BH-3305.yaml"):
        shutil.copyfile(DEMO / name, tmp_path / name)
    csv = _orders(tmp_path, ["BH-1042.yaml,10,2027-01-15,A1", "BH-9999.yaml,5,,A2", "BH-5018.yaml,abc,,A3",
                             "BH-5018.yaml,20,,A4", "BH-3305.yaml,30,,A5"])
    lines = []
    r = issue_batch(csv, out_dir=tmp_path / "out", register_path=tmp_path / "reg.sqlite", workers=2,
                    progress=False, echo=lines.append)
    assert [row.number is not None for row in r.rows] == [True, False, False, True, True]
    issued = [row for row in r.rows if row.number]
    seqs = [int(row.number.rsplit("-", 1)[1]) for row in issued]
    assert seqs == list(range(seqs[0], seqs[0] + 3))          # consecutive, in row order
    assert [row.lot for row in issued] == ["A1", "A4", "A5"]
    assert all((tmp_path / "out" / f"{row.number}.pdf").stat().st_size > 1000 for row in issued)
    assert "orders.csv:3: " in r.rows[1].error and "no such spec file" in r.rows[1].error
    assert "orders.csv:4: qty:" in r.rows[2].error
    assert lines[-1].startswith("3 issued, 2 failed")
    con = sqlite3.connect(tmp_path / "reg.sqlite")         # an independent reader of the register
    assert con.execute("select count(*) from orders").fetchone()[0] == 3


def test_a_failed_render_voids_its_number_and_the_rest_go_on(tmp_path):
    shutil.copyfile(DEMO / "BH-5018.yaml", tmp_path / "BH-5018.yaml")
    csv = _orders(tmp_path, ["BH-5018.yaml,1,,X1", "BH-5018.yaml,2,,X2", "BH-5018.yaml,3,,X3"])
    out = tmp_path / "out"
    out.mkdir()
    (out / "WO-2026-00002.pdf").mkdir()     # a folder where the second PDF must go: its rename fails
    r = issue_batch(csv, out_dir=out, register_path=tmp_path / "reg.sqlite", workers=2, progress=False,
                    echo=lambda *_: None)
    states = {row.number: row.error for row in r.rows}
    assert states["WO-2026-00001"] is None and states["WO-2026-00003"] is None
    assert "voided" in states["WO-2026-00002"]
    con = sqlite3.connect(tmp_path / "reg.sqlite")
    rows = dict(con.execute("select number, state from orders").fetchall())
    assert rows == {"WO-2026-00001": "issued", "WO-2026-00002": "void", "WO-2026-00003": "issued"}
    assert not (out / "WO-2026-00002.html").exists()         # both files or neither


@pytest.mark.parametrize("text, fragment", [
    ("", "is empty"),
    ("part,qty\nx,1\n", "lacks spec and qty"),
    ("spec,qty,colour\nx,1,red\n", "unknown column 'colour'"),
    ("spec,qty,due,lot\n", "holds no orders"),
])
def test_bad_orders_files(tmp_path, text, fragment):
    p = tmp_path / "o.csv"
    p.write_text(text)
    with pytest.raises(SpecError, match=fragment):
        read_orders(p)


def test_cli_batch_exit_codes(tmp_path):
    shutil.copyfile(DEMO / "BH-5018.yaml", tmp_path / "BH-5018.yaml")
    ok = _orders(tmp_path, ["BH-5018.yaml,5,,L1"])
    run = lambda *a: subprocess.run([sys.executable, "-m", "specgen.cli", "workorder", *map(str, a)],
                                    capture_output=True, text=True, cwd=tmp_path)
    r = run("--batch", ok, "--out", "o", "--register", "r.sqlite", "--workers", "1")
    assert r.returncode == 0, r.stderr
    assert "1 issued, 0 failed" in r.stdout
    r = run("--batch", ok, "BH-5018.yaml")
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    r = run("--batch", tmp_path / "missing.csv")
    assert r.returncode == 2 and "no such orders CSV file" in r.stderr


# --- robustness: quoted newlines, refused batches, dying workers, a killed batch -------------------------


def test_a_row_with_a_quoted_newline_is_reported_at_its_first_line(tmp_path):
    """csv.reader's line_num is the line a record ends on; the planner looks for the line it starts on
    (the CSV format of RFC 4180 lets a quoted field hold a line break)."""
    p = tmp_path / "o.csv"
    p.write_text('spec,qty,due,lot\nA.yaml,1,,"two\nline lot"\nB.yaml,2,,L2\n,3,,L3\n')
    rows = read_orders(p)
    assert [r.line for r in rows] == [2, 4, 5]
    assert rows[2].error.startswith(f"{p}:5: ")


def test_a_batch_refused_as_a_whole_creates_no_output_folder(tmp_path):
    csv = _orders(tmp_path, ["BH-9999.yaml,5,,A1", "nope.yaml,1,,A2"])
    out = tmp_path / "out" / "deeper"
    r = issue_batch(csv, out_dir=out, register_path=tmp_path / "reg.sqlite", workers=1, progress=False,
                    echo=lambda *_: None)
    assert len(r.failed) == 2
    assert not (tmp_path / "out").exists() and not (tmp_path / "reg.sqlite").exists()


# The render workers are spawned (max_tasks_per_child needs it): they import these by name from this module.
def _die_on_second_row(html, pdf_path, html_path):
    """A render that kills its own worker (as the kernel's OOM killer would) for one row, every time."""
    import os
    import signal

    from specgen.documents import render

    if pdf_path.endswith("-00002.pdf"):
        os.kill(os.getpid(), signal.SIGKILL)
    render.write_pdf_and_html(html, pdf_path, html_path, [])
    return []


def _die_once(html, pdf_path, html_path):
    """A worker killed once while rendering the second row (a passing memory spike), then fine."""
    import os
    import signal
    from pathlib import Path as P

    from specgen.documents import render

    flag = P(pdf_path).parent / "died-once"
    if pdf_path.endswith("-00002.pdf") and not flag.exists():
        flag.write_text("x")
        os.kill(os.getpid(), signal.SIGKILL)
    render.write_pdf_and_html(html, pdf_path, html_path, [])
    return []


@pytest.mark.slow
def test_a_dead_worker_fails_only_its_own_row(tmp_path, monkeypatch):
    from specgen.documents import batch

    monkeypatch.setattr(batch, "_render_job", _die_on_second_row)
    shutil.copyfile(DEMO / "BH-5018.yaml", tmp_path / "BH-5018.yaml")
    csv = _orders(tmp_path, [f"BH-5018.yaml,{i},,K{i}" for i in range(1, 5)])
    lines = []
    r = issue_batch(csv, out_dir=tmp_path / "out", register_path=tmp_path / "reg.sqlite", workers=2,
                    progress=False, echo=lines.append)
    assert lines[-1].startswith("3 issued, 1 failed")                 # the summary is printed
    failed = [row for row in r.rows if row.error]
    assert [row.number for row in failed] == ["WO-2026-00002"] and "worker died" in failed[0].error
    con = sqlite3.connect(tmp_path / "reg.sqlite")
    states = dict(con.execute("select number, state from orders").fetchall())
    assert states == {"WO-2026-00001": "issued", "WO-2026-00002": "void", "WO-2026-00003": "issued",
                      "WO-2026-00004": "issued"}
    files = {n for (n,) in con.execute("select distinct number from order_files")}
    assert files == {"WO-2026-00001", "WO-2026-00003", "WO-2026-00004"}


@pytest.mark.slow
def test_a_worker_that_dies_once_costs_no_row(tmp_path, monkeypatch):
    from specgen.documents import batch

    monkeypatch.setattr(batch, "_render_job", _die_once)
    shutil.copyfile(DEMO / "BH-5018.yaml", tmp_path / "BH-5018.yaml")
    csv = _orders(tmp_path, [f"BH-5018.yaml,{i},,K{i}" for i in range(1, 4)])
    (tmp_path / "out").mkdir()
    r = issue_batch(csv, out_dir=tmp_path / "out", register_path=tmp_path / "reg.sqlite", workers=2,
                    progress=False, echo=lambda *_: None)
    assert (tmp_path / "out" / "died-once").exists()                  # the worker really died
    assert not r.failed and len(r.issued) == 3


_SLOW_BATCH = """
import os, sys, time
from pathlib import Path
from specgen.documents import batch

def hang(html, pdf_path, html_path):
    Path(sys.argv[2], f"worker-{os.getpid()}").write_text("")
    time.sleep(600)

if __name__ == "__main__":     # the workers are spawned: they import this file, and find hang() in it
    batch._render_job = hang
    batch.issue_batch(sys.argv[1], out_dir=Path(sys.argv[2]), register_path=Path(sys.argv[2]) / "reg.sqlite",
                      workers=2, progress=False)
"""


def _alive(pid: int) -> bool:
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state not in ("Z", "X")      # a zombie waits only for its reaper


@pytest.mark.slow
@pytest.mark.skipif(not Path("/proc").is_dir(), reason="reads process states from /proc")
def test_killing_the_batch_ends_its_workers(tmp_path):
    import os
    import signal
    import time

    shutil.copyfile(DEMO / "BH-5018.yaml", tmp_path / "BH-5018.yaml")
    csv = _orders(tmp_path, [f"BH-5018.yaml,{i},,K{i}" for i in range(1, 5)])
    out = tmp_path / "out"
    out.mkdir()
    script = tmp_path / "slow_batch.py"
    script.write_text(_SLOW_BATCH)
    main = subprocess.Popen([sys.executable, str(script), str(csv), str(out)],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)
    workers: list = []
    try:
        deadline = time.monotonic() + 60
        while len(workers) < 2 and time.monotonic() < deadline:
            workers = [int(p.name.split("-")[1]) for p in out.glob("worker-*")]
            time.sleep(0.1)
        assert len(workers) == 2, "the workers never started rendering"
        main.send_signal(signal.SIGKILL)
        main.wait()
        deadline = time.monotonic() + 10
        while any(_alive(p) for p in workers) and time.monotonic() < deadline:
            time.sleep(0.1)
        assert not any(_alive(p) for p in workers), "render workers outlived their batch"
    finally:
        for pid in workers:
            if _alive(pid):
                os.kill(pid, signal.SIGKILL)
        if main.poll() is None:
            main.kill()
