"""A throwaway PostgreSQL cluster for the register's tests and benchmark.

    with ThrowawayCluster() as cluster:
        url = cluster.new_database()          # postgresql://specgen@/reg_1?host=/tmp/...&port=...
        ...

Uses the distribution's server packages (``tools/sysdeps.sh`` installs them on Debian): ``initdb`` a
cluster into a temporary folder, ``pg_ctl start`` it listening on a Unix socket in that folder only (no
TCP port), trust authentication for its own superuser ``specgen``; ``stop`` shuts it down and removes
the folder. ``initdb`` refuses to run as root, so as root the server runs as the ``postgres`` system
user (created by the package), or a ``specgen-pg`` system user created here if that is missing.

``durable=False`` (the tests) turns off fsync and synchronous commit: a crash of the throwaway server
loses nothing anyone keeps. The benchmark keeps PostgreSQL's durable defaults, as SQLite keeps
``synchronous=FULL``.
"""

from __future__ import annotations

import glob
import itertools
import os
import pwd
import shutil
import subprocess
import tempfile
from pathlib import Path


def server_bin() -> Path | None:
    """The newest ``/usr/lib/postgresql/<version>/bin`` holding ``initdb`` and ``pg_ctl``, or None."""
    found = []
    for initdb in glob.glob("/usr/lib/postgresql/*/bin/initdb"):
        folder = Path(initdb).parent
        try:
            version = float(folder.parent.name)
        except ValueError:
            continue
        if (folder / "pg_ctl").exists():
            found.append((version, folder))
    return max(found)[1] if found else None


def _server_user() -> str | None:
    """The user the server runs as when we are root (None: run as ourselves)."""
    if os.geteuid() != 0:
        return None
    for name in ("postgres", "specgen-pg"):
        try:
            pwd.getpwnam(name)
            return name
        except KeyError:
            continue
    subprocess.run(["useradd", "--system", "--no-create-home", "--shell", "/usr/sbin/nologin", "specgen-pg"],
                   check=True, capture_output=True)
    return "specgen-pg"


class ThrowawayCluster:
    """See the module docstring."""

    def __init__(self, *, durable: bool = False, port: int = 55432):
        binary = server_bin()
        if binary is None:
            raise RuntimeError("PostgreSQL server binaries not found under /usr/lib/postgresql/*/bin "
                               "(install them with tools/sysdeps.sh)")
        self.bin = binary
        self.durable = durable
        self.port = port
        self.folder: Path | None = None
        self._user: str | None = None
        self._names = itertools.count(1)

    def _run(self, *args: str) -> subprocess.CompletedProcess:
        command = list(args)
        if self._user is not None:
            command = ["runuser", "-u", self._user, "--", *command]
        return subprocess.run(command, check=True, capture_output=True, text=True, timeout=120)

    def start(self) -> ThrowawayCluster:
        self._user = _server_user()
        self.folder = Path(tempfile.mkdtemp(prefix="specgen-pg-"))
        if self._user is not None:
            shutil.chown(self.folder, user=self._user)
        data = self.folder / "data"
        self._run(str(self.bin / "initdb"), "-D", str(data), "-A", "trust", "-U", "specgen", "-E", "UTF8",
                  "--no-instructions", *([] if self.durable else ["--no-sync"]))
        settings = [f"-k {self.folder}", "-c listen_addresses=''", f"-p {self.port}", "-c shared_buffers=16MB",
                    "-c max_connections=60"]
        if not self.durable:
            settings += ["-c fsync=off", "-c synchronous_commit=off", "-c full_page_writes=off"]
        self._run(str(self.bin / "pg_ctl"), "-D", str(data), "-l", str(self.folder / "server.log"), "-w",
                  "-o", " ".join(settings), "start")
        return self

    def url(self, database: str = "postgres") -> str:
        return f"postgresql://specgen@/{database}?host={self.folder}&port={self.port}"

    def new_database(self, prefix: str = "reg") -> str:
        """A fresh, empty database; returns its URL."""
        import psycopg

        name = f"{prefix}_{os.getpid()}_{next(self._names)}"
        with psycopg.connect(self.url(), autocommit=True) as connection:
            connection.execute(f'CREATE DATABASE "{name}" TEMPLATE template0')
        return self.url(name)

    def stop(self) -> None:
        if self.folder is None:
            return
        try:
            self._run(str(self.bin / "pg_ctl"), "-D", str(self.folder / "data"), "-m", "immediate", "-w", "stop")
        except (subprocess.CalledProcessError, subprocess.TimeoutExpired):
            pass
        shutil.rmtree(self.folder, ignore_errors=True)
        self.folder = None

    def __enter__(self) -> ThrowawayCluster:
        return self.start()

    def __exit__(self, *exc: object) -> None:
        self.stop()
