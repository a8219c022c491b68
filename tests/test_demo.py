"""`specgen demo` (the README's first command) runs the whole job into a folder.

The numbers themselves are checked against their sources in the engine's and the documents' tests;
here: it runs, exits 0, and writes every document it promises, each one readable (pypdf opens every
PDF; json reads every JSON).
"""

from __future__ import annotations

import json
import shutil

import pypdf
import pytest
from typer.testing import CliRunner

from specgen.api import demo_specs
from specgen.cli import app


@pytest.mark.skipif(shutil.which("git") is None, reason="the change summary needs git")
def test_specgen_demo_writes_every_document(tmp_path):
    out = tmp_path / "demo"
    r = CliRunner().invoke(app, ["demo", "--out", str(out)])
    assert r.exit_code == 0, r.stdout + r.stderr
    parts = [p.stem for p in demo_specs()]
    for part in parts:
        assert json.loads((out / "designs" / f"{part}.json").read_text())["part"] == part
        assert (out / "designs" / f"{part}.txt").read_text().startswith(part)
    pdfs = sorted((out / "workorders").glob("*.pdf"))
    assert len(pdfs) == len(parts) + 1                  # and a second lot of one part for the station
    from specgen.register import Register
    from specgen.station.store import StationStore

    with Register.open(out / "workorders" / "specgen-register.sqlite", read_only=True) as reg:
        store = StationStore(reg)
        lots = {o.part: o for o in reg.list() if store.entries(o.number, "reading")}
        assert set(parts) <= set(lots)                  # every demo part has a tested lot
        assert store.where_used("R-2291")
    assert (out / "station-users.yaml").is_file()
    quotes = sorted(p for p in (out / "quotes").glob("*.pdf") if not p.stem.endswith("-internal"))
    assert len(quotes) == len(parts)
    changes = sorted((out / "changes").glob("*.pdf"))
    assert len(changes) == 1
    for pdf in pdfs[:1] + quotes[:1] + changes:
        assert len(pypdf.PdfReader(str(pdf)).pages) >= 1
    assert sorted(p.name for p in (out / "search").glob("*.json"))
    assert "all of it in" in r.stdout


def _tour_commands() -> str:
    """The README's tour: the shell block under '## A short tour', as it stands."""
    from pathlib import Path

    text = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    tour = text.split("## A short tour", 1)[1]
    return tour.split("```sh\n", 1)[1].split("```", 1)[0]


@pytest.mark.skipif(shutil.which("git") is None, reason="the demo shop is a git repository")
def test_readme_tour_runs_verbatim_after_the_demo(tmp_path):
    """Every line of the README's tour, run as written by bash -e from a project folder whose .venv is
    this interpreter's and whose out/demo is a fresh `specgen demo`: each command must exit 0."""
    import os
    import subprocess
    import sys
    from pathlib import Path

    project = tmp_path / "project"
    out = project / "out" / "demo"
    r = CliRunner().invoke(app, ["demo", "--out", str(out)])
    assert r.exit_code == 0, r.stdout + r.stderr
    assert (out / "shop" / "orders.csv").read_text().startswith("spec,qty,due,lot\n")
    venv = Path(sys.prefix)
    (project / ".venv").symlink_to(venv, target_is_directory=True)
    assert (venv / "bin" / "activate").exists() and (venv / "bin" / "specgen").exists()
    env = {k: v for k, v in os.environ.items() if k not in ("SPECGEN_CATALOG", "SPECGEN_REGISTER")}
    script = "set -euo pipefail\n" + _tour_commands()
    run = subprocess.run(["bash", "-c", script], cwd=project, env=env, capture_output=True, text=True,
                         timeout=600)
    assert run.returncode == 0, run.stdout[-2000:] + run.stderr[-2000:]
    shop = out / "shop"
    assert (shop / "specgen-register.sqlite").exists()           # the shop's one register, at its root
    assert not list((shop / "parts").glob("*.sqlite"))           # never one beside the specs
    batch_rows = len((shop / "orders.csv").read_text().splitlines()) - 1
    assert len(list((shop / "orders").glob("WO-*.pdf"))) == 1 + batch_rows   # the single one and the batch
