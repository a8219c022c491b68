"""SIGKILL in the middle of writing leaves the old file intact (atomic writes), for a work order PDF
and for a spec rewritten by `specgen release`."""

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

from conftest import blank_recorded_fingerprint

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"
ENV = {**os.environ, "SPECGEN_CACHE": "0"}


def _kill_after(cmd, seconds, cwd):
    p = subprocess.Popen(cmd, cwd=cwd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=ENV)
    time.sleep(seconds)
    p.send_signal(signal.SIGKILL)
    p.wait()
    return p.returncode


def test_killed_work_order_leaves_old_pdf_or_a_whole_new_one(tmp_path):
    spec = tmp_path / "BH-5018.yaml"
    spec.write_text((DEMO / "BH-5018.yaml").read_text())
    out = tmp_path / "out"
    out.mkdir()
    old = b"%PDF-old work order, must survive\n"
    for delay in (0.3, 0.6, 0.9, 1.2):
        number = f"ERP-{int(delay * 10)}"
        target = out / f"{number}.pdf"
        target.write_bytes(old)
        _kill_after([sys.executable, "-m", "specgen.cli", "workorder", str(spec), "--qty", "5", "--out", str(out),
                     "--number", number, "--register", str(tmp_path / "reg.sqlite")], delay, tmp_path)
        data = target.read_bytes()
        if data != old:      # it finished before the kill: then it must be a whole PDF
            assert data.startswith(b"%PDF") and b"%%EOF" in data[-1024:]
    # no half-written file under a real name; temp files follow the documented pattern only
    for p in out.iterdir():
        assert p.suffix in (".pdf", ".html") or (p.name.startswith(".") and p.name.endswith(".tmp")), p.name


def test_killed_release_leaves_the_spec_intact(tmp_path):
    spec = tmp_path / "BH-3305.yaml"
    original = blank_recorded_fingerprint((DEMO / "BH-3305.yaml").read_text())
    spec.write_text(original)
    for delay in (0.05, 0.15, 0.25):
        _kill_after([sys.executable, "-m", "specgen.cli", "release", str(spec), "--by", "x", "--note", "y"],
                    delay, tmp_path)
        text = spec.read_text()
        assert text == original or ("status: released" in text and text.count("- revision:") == 2)
        spec.write_text(original)
