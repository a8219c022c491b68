"""Shared test helpers."""

import os
import re
import subprocess

import pytest


def blank_recorded_fingerprint(text: str) -> str:
    """The shipped demo specs record their release fingerprints; tests that release or tamper with a
    copy start from a release that recorded none (as a spec released before specgen would be)."""
    return re.sub(r'^(\s+fingerprint:\s*)"[0-9a-f]{64}"', r'\1""', text, flags=re.M)


@pytest.fixture
def git_env(tmp_path, monkeypatch):
    """Isolate git from the user's configuration and from any repository above tmp_path."""
    monkeypatch.setenv("GIT_CONFIG_GLOBAL", os.devnull)
    monkeypatch.setenv("GIT_CONFIG_NOSYSTEM", "1")
    monkeypatch.setenv("GIT_CEILING_DIRECTORIES", str(tmp_path))
    for var in ("GIT_AUTHOR", "GIT_COMMITTER"):
        monkeypatch.setenv(f"{var}_NAME", "Brindle Hollow Test")
        monkeypatch.setenv(f"{var}_EMAIL", "eng@brindle-hollow.invalid")
    monkeypatch.delenv("GIT_DIR", raising=False)
    monkeypatch.delenv("GIT_WORK_TREE", raising=False)
    return tmp_path


def git(cwd, *args):
    """Run git in cwd and return its output (a failing git command fails the test)."""
    return subprocess.run(["git", *args], cwd=cwd, check=True, capture_output=True, text=True).stdout.strip()
