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
    assert len(pdfs) == len(parts)
    quotes = sorted(p for p in (out / "quotes").glob("*.pdf") if not p.stem.endswith("-internal"))
    assert len(quotes) == len(parts)
    changes = sorted((out / "changes").glob("*.pdf"))
    assert len(changes) == 1
    for pdf in pdfs[:1] + quotes[:1] + changes:
        assert len(pypdf.PdfReader(str(pdf)).pages) >= 1
    assert sorted(p.name for p in (out / "search").glob("*.json"))
    assert "all of it in" in r.stdout
