"""SIGKILL while writing leaves the old file intact (atomic writes), for a work order's PDF and HTML and
for a spec rewritten by `specgen release`; the next run clears what the killed one left.

Each command is killed at the one moment that tells an atomic writer from one that writes in place:
every new file fully written and fsync'ed, no rename done yet. atomic.HOLD_ENV makes the writer note
its targets and wait there, so the kill lands there every time (a kill at a guessed delay mostly lands
before the first byte is written and would pass for any writer). A writer that wrote in place would
leave the new content (or half of it) under the real name here, and fail these tests. Further kills at
moments spread over a whole run check that no other moment loses anything either.
"""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from conftest import blank_recorded_fingerprint

from specgen.atomic import HOLD_ENV, TEMP_GLOB

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"
ENV = {**os.environ, "SPECGEN_CACHE": "0"}


def _run_until_held(cmd, cwd, marker: Path, timeout_s: float = 120.0) -> list[str]:
    """Start ``cmd`` with the hold hook, wait until it is holding before its renames, SIGKILL it there.
    Returns the targets it was about to replace."""
    marker.unlink(missing_ok=True)
    p = subprocess.Popen(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE,
                         env={**ENV, HOLD_ENV: str(marker)})
    deadline = time.monotonic() + timeout_s
    try:
        while not (marker.exists() and marker.read_text().endswith("\n")):
            if p.poll() is not None:
                raise AssertionError(f"finished without reaching the hold: {p.stderr.read().decode()[-500:]}")
            if time.monotonic() > deadline:
                raise AssertionError("never reached the hold before the rename")
            time.sleep(0.02)
        p.send_signal(signal.SIGKILL)
        p.wait()
    finally:
        if p.poll() is None:
            p.kill()
            p.wait()
        p.stderr.close()
    assert p.returncode == -signal.SIGKILL
    return marker.read_text().split()


def _kill_after(cmd, seconds, cwd):
    p = subprocess.Popen(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=ENV)
    time.sleep(seconds)
    p.send_signal(signal.SIGKILL)
    p.wait()
    return p.returncode


def _age(paths, seconds=3600.0):
    """Make leftovers look as old as a crashed run from an hour ago (the cleanup spares young files)."""
    past = time.time() - seconds
    for p in paths:
        os.utime(p, (past, past))


def _whole_pdf(data: bytes) -> bool:
    return data.startswith(b"%PDF") and b"%%EOF" in data[-1024:]


def _workorder(spec, out, number, tmp_path):
    return [sys.executable, "-m", "specgen.cli", "workorder", str(spec), "--qty", "5", "--out", str(out),
            "--number", number, "--register", str(tmp_path / "reg.sqlite")]


@pytest.mark.slow
def test_work_order_killed_before_its_renames_leaves_the_old_files(tmp_path):
    spec = tmp_path / "BH-5018.yaml"
    spec.write_text((DEMO / "BH-5018.yaml").read_text())
    out = tmp_path / "out"
    out.mkdir()
    old_pdf, old_html = b"%PDF-old work order, must survive\n", b"<p>old work order</p>\n"
    for i in range(3):
        number = f"ERP-{i}"
        pdf, html = out / f"{number}.pdf", out / f"{number}.html"
        pdf.write_bytes(old_pdf)
        html.write_bytes(old_html)
        held = _run_until_held(_workorder(spec, out, number, tmp_path), tmp_path, tmp_path / "held")
        assert sorted(held) == sorted([str(pdf), str(html)])
        # the new files were complete on disk, the old ones untouched under their names
        assert pdf.read_bytes() == old_pdf and html.read_bytes() == old_html
        temps = sorted(out.glob(TEMP_GLOB))
        assert len(temps) == 2 and any(_whole_pdf(t.read_bytes()) for t in temps)
        _age(temps)
    # the next run into the folder removes the dead writers' leftovers, and writes whole files
    held = subprocess.run(_workorder(spec, out, "ERP-next", tmp_path), cwd=tmp_path, env=ENV, capture_output=True)
    assert held.returncode == 0, held.stderr.decode()
    assert _whole_pdf((out / "ERP-next.pdf").read_bytes())
    assert list(out.glob(TEMP_GLOB)) == []


@pytest.mark.slow
def test_killed_release_leaves_the_spec_intact_and_the_next_release_cleans_up(tmp_path):
    spec = tmp_path / "BH-3305.yaml"
    original = blank_recorded_fingerprint((DEMO / "BH-3305.yaml").read_text())
    spec.write_text(original)
    release = [sys.executable, "-m", "specgen.cli", "release", str(spec), "--by", "x", "--note", "y",
               "--accept-all", "--reason", "accepted for the test"]      # the part carries a design warning
    for _ in range(3):
        held = _run_until_held(release, tmp_path, tmp_path / "held")
        assert held == [str(spec)]
        assert spec.read_text() == original                      # not a byte of the new revision yet
        temps = list(tmp_path.glob(f".{spec.name}.*.tmp"))
        assert len(temps) == 1 and "status: released" in temps[0].read_text()
        _age(temps)
    done = subprocess.run(release, cwd=tmp_path, env=ENV, capture_output=True)
    assert done.returncode == 0, done.stderr.decode()
    assert "status: released" in spec.read_text()
    assert list(tmp_path.glob(TEMP_GLOB)) == []                  # the three dead writers' leftovers are gone


@pytest.mark.slow
def test_kills_spread_over_a_whole_run_lose_nothing(tmp_path):
    """Kills at 10 %..90 % of a measured run: every output is the old file or a whole new one."""
    spec = tmp_path / "BH-5018.yaml"
    spec.write_text((DEMO / "BH-5018.yaml").read_text())
    out = tmp_path / "out"
    out.mkdir()
    t0 = time.monotonic()
    first = subprocess.run(_workorder(spec, out, "ERP-measure", tmp_path), cwd=tmp_path, env=ENV, capture_output=True)
    whole_run_s = time.monotonic() - t0
    assert first.returncode == 0, first.stderr.decode()
    old = b"%PDF-old work order, must survive\n"
    for k, fraction in enumerate((0.1, 0.3, 0.5, 0.7, 0.8, 0.9)):
        number = f"ERP-t{k}"
        target = out / f"{number}.pdf"
        target.write_bytes(old)
        _kill_after(_workorder(spec, out, number, tmp_path), fraction * whole_run_s, tmp_path)
        data = target.read_bytes()
        assert data == old or _whole_pdf(data), f"kill at {fraction:.0%} of the run left a broken {target.name}"
        html = out / f"{number}.html"
        assert not html.exists() or html.read_text().rstrip().endswith("</html>")
    for p in out.iterdir():
        assert p.suffix in (".pdf", ".html") or (p.name.startswith(".") and p.name.endswith(".tmp")), p.name
