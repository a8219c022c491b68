"""Shared test helpers."""

import os
import re
import subprocess

import pytest


@pytest.fixture(autouse=True)
def own_register(tmp_path, monkeypatch):
    """Every test gets a register of its own in its tmp_path, so no test finds (and writes) the
    repository's shop-root register; tests of the register's location remove the variable."""
    monkeypatch.setenv("SPECGEN_REGISTER", str(tmp_path / "test-register.sqlite"))
    return tmp_path / "test-register.sqlite"


@pytest.fixture(scope="session")
def demo_designs():
    """Part -> Design of every shipped demo part, on the shipped catalogue (computed once per run)."""
    from specgen.api import demo_specs, design_file
    from specgen.catalog.loader import load_catalog

    cat = load_catalog(None)
    return {path.stem: design_file(path, cat=cat) for path in demo_specs()}


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


# --- the register's two back ends ---------------------------------------------------------------

PG_SKIP = "PostgreSQL server not installed (tools/sysdeps.sh installs it): PostgreSQL register tests skipped"


@pytest.fixture(scope="session")
def pg_cluster():
    """A throwaway PostgreSQL cluster for the whole session (tools/pg_throwaway.py): initdb into a
    temporary folder, served on a Unix socket there only, stopped and removed at the end."""
    import sys
    from pathlib import Path

    sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tools"))
    from pg_throwaway import ThrowawayCluster, server_bin

    if server_bin() is None:
        pytest.skip(PG_SKIP)
    try:
        import psycopg  # noqa: F401
    except ImportError:
        pytest.skip("psycopg not installed: PostgreSQL register tests skipped")
    cluster = ThrowawayCluster().start()
    yield cluster
    cluster.stop()


@pytest.fixture(params=["sqlite", "postgresql"])
def target(request, tmp_path) -> str:
    """A fresh, not yet created register on each back end: an SQLite path or a PostgreSQL URL."""
    if request.param == "sqlite":
        return str(tmp_path / "specgen-register.sqlite")
    return request.getfixturevalue("pg_cluster").new_database()


def pytest_terminal_summary(terminalreporter):
    skipped = terminalreporter.stats.get("skipped", [])
    count = sum(1 for report in skipped if "PostgreSQL" in str(getattr(report, "longrepr", "")))
    if count:
        terminalreporter.write_line(f"{count} PostgreSQL register tests skipped: no PostgreSQL server on this "
                                    "machine (tools/sysdeps.sh installs it)")
    if any("Chromium not installed" in str(getattr(r, "longrepr", "")) for r in skipped):
        terminalreporter.write_line("station browser test skipped: no Chromium at /usr/bin/chromium "
                                    "(tools/sysdeps.sh installs the chromium package)")


# Modules whose tests render PDFs, start processes, kill them or fuzz: all their tests are marked slow,
# so `pytest -m "not slow"` runs the physics, engine, units, loading and catalogue tests alone in seconds.
SLOW_MODULES = {
    "test_batch", "test_kill", "test_fuzz", "test_workorder", "test_quote", "test_register", "test_diff",
    "test_release", "test_revision", "test_safe_render", "test_drawings", "test_search", "test_new",
    "test_bad_inputs", "test_cli_design", "test_csvsafe", "test_spec_errors", "test_station_app",
    "test_station_browser", "test_station_store", "test_station_cli",
}


def pytest_collection_modifyitems(config, items):
    for item in items:
        if item.module is not None and item.module.__name__.rsplit(".", 1)[-1] in SLOW_MODULES:
            item.add_marker(pytest.mark.slow)
