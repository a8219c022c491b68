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
