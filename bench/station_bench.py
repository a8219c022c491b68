"""The station under 20 tablets: p95 of a step page and of a reading post, as ratios to a bare static
file from the same server in the same run.

The server is ``specgen serve`` in its own process on 127.0.0.1 (so the clients do not share its
interpreter); 20 client threads, each its own logged-in session on a keep-alive connection, run a
bounded number of rounds and stop by themselves. The three kinds of request are run as three phases
(all tablets on the static file, then all on step pages, then all posting readings), so each p95 is
that request's own under the same load of 20 concurrent clients, not its place in a mixed queue.
"""

from __future__ import annotations

import http.client
import re
import shutil
import socket
import statistics
import subprocess
import sys
import tempfile
import threading
import time
import urllib.parse
from pathlib import Path

TABLETS = 20
ROUNDS = 30
WARM_UP = 3
PASSWORD = "bench station password"


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


def _setup(folder: Path) -> tuple[str, Path, Path, str, list[tuple[str, str]]]:
    from specgen.api import demo_specs, run_design
    from specgen.catalog.loader import load_catalog
    from specgen.design.spec import load_spec
    from specgen.register import Register
    from specgen.station.plan import station_columns
    from specgen.station.users import add_user

    parts = folder / "parts"
    parts.mkdir()
    source = next(p for p in demo_specs() if p.stem == "BH-2210")
    shutil.copyfile(source, parts / source.name)
    design = run_design(load_spec(parts / source.name), load_catalog(None))
    register = str(folder / "bench-register.sqlite")
    with Register.open(register) as reg:
        number = reg.allocate(design.part, design.revision, design.fingerprint, TABLETS, lot="BENCH")
        reg.attach_files(number, [str(folder / "wo.pdf")])
    users = folder / "users.yaml"
    add_user(users, "bench", "engineer", PASSWORD)
    dcr = [c for c in station_columns(design) if c.kind == "dcr"]
    fields = [(f"t:{c.key}", f"{c.nominal * c.shown_factor:.5g}") for c in dcr]
    return register, parts, users, number, fields


class Tablet(threading.Thread):
    def __init__(self, port: int, number: str, serial: str, fields: list[tuple[str, str]], gates: list[threading.Barrier]):
        super().__init__(daemon=True)
        self.port, self.number, self.serial, self.fields, self.gates = port, number, serial, fields, gates
        self.times: dict[str, list[float]] = {"static": [], "step": [], "reading": []}
        self.cookie = ""
        self.error: str | None = None

    def _request(self, conn: http.client.HTTPConnection, method: str, path: str, body: dict[str, str] | None = None
                 ) -> tuple[int, str, float]:
        headers = {"Cookie": self.cookie} if self.cookie else {}
        data = None
        if body is not None:
            data = urllib.parse.urlencode(body)
            headers["Content-Type"] = "application/x-www-form-urlencoded"
        start = time.perf_counter()
        conn.request(method, path, body=data, headers=headers)
        response = conn.getresponse()
        text = response.read().decode("utf-8", "replace")
        elapsed = time.perf_counter() - start
        cookie = response.getheader("set-cookie")
        if cookie:
            self.cookie = cookie.split(";", 1)[0]
        return response.status, text, elapsed

    def _post(self, conn: http.client.HTTPConnection, csrf: str, *, first: bool) -> float:
        body = {"csrf": csrf, "temp": "23.0", **dict(self.fields)}
        if not first:
            body["reason"] = "bench: the same piece read again"
        status, text, t = self._request(conn, "POST", f"/wo/{self.number}/test/{self.serial}", body)
        if status != 303:
            raise RuntimeError(f"reading post answered {status}: {text[-300:]}")
        return t

    def run(self) -> None:
        try:
            conn = http.client.HTTPConnection("127.0.0.1", self.port, timeout=60)
            _, page, _ = self._request(conn, "GET", "/login")
            csrf = re.search(r'name="csrf" value="([^"]+)"', page).group(1)  # type: ignore[union-attr]
            status, _, _ = self._request(conn, "POST", "/login", {"csrf": csrf, "user": "bench", "password": PASSWORD})
            if status != 303:
                raise RuntimeError(f"login answered {status}")
            _, page, _ = self._request(conn, "GET", f"/wo/{self.number}/steps?n=1")
            csrf = re.search(r'name="csrf" value="([^"]+)"', page).group(1)  # type: ignore[union-attr]
            for i in range(WARM_UP):              # every route's first use (the lot, the templates) out of the figures
                self._request(conn, "GET", "/static/station.css")
                self._request(conn, "GET", f"/wo/{self.number}/steps?n={1 + i % 5}")
            self._post(conn, csrf, first=True)
            self.gates[0].wait()
            for _ in range(ROUNDS):
                status, _, t = self._request(conn, "GET", "/static/station.css")
                self.times["static"].append(t)
            self.gates[1].wait()
            for i in range(ROUNDS):
                status, _, t = self._request(conn, "GET", f"/wo/{self.number}/steps?n={1 + i % 5}")
                self.times["step"].append(t)
            self.gates[2].wait()
            for _ in range(ROUNDS):
                self.times["reading"].append(self._post(conn, csrf, first=False))
        except Exception as err:  # reported by the benchmark, which fails the figure
            self.error = f"{type(err).__name__}: {err}"
            for gate in self.gates:
                gate.abort()


def p95(values: list[float]) -> float:
    return statistics.quantiles(values, n=20, method="inclusive")[18]


def bench() -> dict[str, tuple[float, float]]:
    """{'step page': (p95 s, static p95 s), 'reading post': (...)} from one run."""
    with tempfile.TemporaryDirectory(prefix="station-bench-") as tmp:
        folder = Path(tmp)
        register, parts, users, number, fields = _setup(folder)
        port = _free_port()
        server = subprocess.Popen([sys.executable, "-m", "specgen.cli", "serve", "--register", register, "--users",
                                   str(users), "--parts", str(parts), "--port", str(port)],
                                  stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
        try:
            deadline = time.monotonic() + 60
            while True:
                try:
                    socket.create_connection(("127.0.0.1", port), timeout=1).close()
                    break
                except OSError:
                    if server.poll() is not None or time.monotonic() > deadline:
                        raise RuntimeError("the station did not start: "
                                           + (server.stderr.read().decode() if server.stderr else "")) from None
                    time.sleep(0.1)
            gates = [threading.Barrier(TABLETS) for _ in range(3)]
            tablets = [Tablet(port, number, str(i + 1), fields, gates) for i in range(TABLETS)]
            for t in tablets:
                t.start()
            for t in tablets:
                t.join(timeout=600)
            errors = [t.error for t in tablets if t.error]
            if errors:
                raise RuntimeError(errors[0])
        finally:
            server.terminate()
            server.wait(timeout=30)
    merged = {k: [x for t in tablets for x in t.times[k]] for k in ("static", "step", "reading")}
    base = p95(merged["static"])
    return {"step page": (p95(merged["step"]), base), "reading post": (p95(merged["reading"]), base)}


if __name__ == "__main__":
    for name, (value, base) in bench().items():
        print(f"{name}: p95 {value * 1e3:.1f} ms, static file p95 {base * 1e3:.1f} ms, ratio {value / base:.2f}")
