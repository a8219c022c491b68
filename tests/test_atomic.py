"""Atomic writes: no writing through a planted symbolic link, stale temporaries of dead writers cleared,
output folders created only when something is written (and removed again when the write fails)."""

import os
import subprocess
import sys
import time

import pytest

from specgen import atomic
from specgen.atomic import STALE_AFTER_S, TEMP_GLOB, atomic_paths, clean_stale_temps, write_atomic
from specgen.errors import SpecError


def _dead_pid() -> int:
    """The pid of a process that has ended (and been reaped)."""
    p = subprocess.Popen([sys.executable, "-c", "pass"])
    p.wait()
    return p.pid


def _leftover(folder, name, pid, age_s):
    temp = folder / f".{name}.{pid}.abc123.tmp"
    temp.write_text("half")
    past = time.time() - age_s
    os.utime(temp, (past, past))
    return temp


def test_symlink_at_the_target_is_refused_for_every_writer(tmp_path):
    outside = tmp_path / "outside.txt"
    outside.write_text("precious")
    out = tmp_path / "out"
    out.mkdir()
    for name in ("a.pdf", "b.html"):
        (out / name).symlink_to(outside)
    with pytest.raises(SpecError, match="a.pdf: cannot write: it is a symbolic link"):
        write_atomic(out / "a.pdf", "x")
    with pytest.raises(SpecError, match="a.pdf: cannot write: it is a symbolic link"):
        with atomic_paths(out / "a.pdf", out / "b.html"):
            pass
    assert outside.read_text() == "precious"
    assert list(out.glob(TEMP_GLOB)) == []


def test_a_dangling_symlink_is_refused_too(tmp_path):
    link = tmp_path / "wo.pdf"
    link.symlink_to(tmp_path / "does-not-exist-yet")
    with pytest.raises(SpecError, match="symbolic link"):
        write_atomic(link, "x")
    assert not (tmp_path / "does-not-exist-yet").exists()


def test_stale_temporaries_of_dead_writers_are_removed_by_the_next_write(tmp_path, monkeypatch):
    monkeypatch.setattr(atomic, "_cleaned_folders", set())
    dead = _dead_pid()
    stale = _leftover(tmp_path, "spec.yaml", dead, STALE_AFTER_S + 10)
    young = _leftover(tmp_path, "other.yaml", dead, 1)                    # a writer elsewhere may own it
    alive = _leftover(tmp_path, "third.yaml", os.getpid(), 3600)          # its writer is running
    legacy = _leftover(tmp_path, "x.pdf", "abc", 3600)                    # no pid in the name, an hour old
    write_atomic(tmp_path / "spec.yaml", "new")
    assert not stale.exists()
    assert young.exists() and alive.exists() and legacy.exists()
    assert (tmp_path / "spec.yaml").read_text() == "new"


def test_clean_stale_temps_spares_live_writers(tmp_path):
    dead = _leftover(tmp_path, "a.pdf", _dead_pid(), 3600)
    live = _leftover(tmp_path, "b.pdf", os.getpid(), 3600)
    day_old = _leftover(tmp_path, "c.pdf", "nopid", 25 * 3600)
    assert sorted(p.name for p in clean_stale_temps(tmp_path)) == sorted([dead.name, day_old.name])
    assert live.exists()


def test_temporary_names_carry_the_writer_pid(tmp_path):
    with atomic_paths(tmp_path / "wo.pdf") as (temp,):
        assert temp.name.startswith(f".wo.pdf.{os.getpid()}.") and temp.name.endswith(".tmp")
        temp.write_text("x")


def test_folders_are_made_only_when_written_and_removed_on_failure(tmp_path):
    target = tmp_path / "new" / "deeper" / "wo.pdf"
    with pytest.raises(ZeroDivisionError):
        with atomic_paths(target, make_folders=True) as (temp,):
            temp.write_text("x")
            raise ZeroDivisionError
    assert not (tmp_path / "new").exists()
    with atomic_paths(target, make_folders=True) as (temp,):
        temp.write_text("x")
    assert target.read_text() == "x"
    other = tmp_path / "more" / "a.txt"
    write_atomic(other, "y", make_folders=True)
    assert other.read_text() == "y"
    with pytest.raises(SpecError, match="does not exist"):
        write_atomic(tmp_path / "absent" / "a.txt", "y")                  # without make_folders: as before

