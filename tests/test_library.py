"""The library face: `import specgen` is cheap, offers what a script needs, and agrees with the CLI.

The design numbers are checked against their sources elsewhere; here the face must give the same
Design (fingerprint and all) as the CLI's --json, and `--json` must be on every command that reports.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from typer.testing import CliRunner

import specgen
from specgen.cli import app

DEMO = Path(specgen.__file__).resolve().parent / "demo"
runner = CliRunner()


def test_import_is_cheap():
    code = ("import sys, specgen\n"
            "heavy = [m for m in ('numpy', 'pint', 'yaml', 'weasyprint', 'typer', 'jinja2') if m in sys.modules]\n"
            "print(','.join(heavy))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert out == ""


def test_face_offers_typed_functions_and_py_typed():
    for name in specgen.__all__:
        obj = getattr(specgen, name)
        if callable(obj):
            assert obj.__doc__ and obj.__annotations__.get("return"), name
    assert (Path(specgen.__file__).parent / "py.typed").is_file()


def test_face_design_equals_cli_json():
    cat = specgen.load_catalog()
    d = specgen.run_design(DEMO / "BH-1042.yaml", cat)
    cli = json.loads(runner.invoke(app, ["design", str(DEMO / "BH-1042.yaml"), "--json"]).stdout)
    assert cli["fingerprint"] == d.fingerprint and cli == json.loads(json.dumps(d.to_dict(), default=str))
    verdict = specgen.release_gate(specgen.load_spec(DEMO / "BH-1042.yaml"), d, cat)
    assert verdict.firm and specgen.verify_spec(DEMO / "BH-1042.yaml", cat).outcome == "ok"
    q = specgen.build_quote(specgen.load_spec(DEMO / "BH-1042.yaml"), d, cat, [100])
    assert q.budgetary is None and q.breaks[0].quantity == 100


def test_workorder_and_release_print_json(tmp_path):
    spec = tmp_path / "BH-5018.yaml"
    spec.write_text((DEMO / "BH-5018.yaml").read_text())
    r = runner.invoke(app, ["workorder", str(spec), "--qty", "5", "--out", str(tmp_path / "wo"),
                            "--register", str(tmp_path / "reg.sqlite"), "--json"])
    assert r.exit_code == 0, r.stderr
    issued = json.loads(r.stdout)
    assert Path(issued["pdf"]).is_file() and issued["number"] in issued["pdf"]
    csv = tmp_path / "orders.csv"
    csv.write_text(f"spec,qty,due,lot\n{spec},3,2027-01-15,L1\n")
    r = runner.invoke(app, ["workorder", "--batch", str(csv), "--out", str(tmp_path / "wo2"), "--workers", "1",
                            "--register", str(tmp_path / "reg.sqlite"), "--json"])
    assert r.exit_code == 0, r.stderr
    batch = json.loads(r.stdout)
    assert batch["issued"] == 1 and batch["failed"] == 0 and batch["rows"][0]["number"]
    # release: an edit makes the next revision
    spec.write_text(spec.read_text().replace("customer: Quillfeather Irrigation", "customer: Quillfeather Irrigation Co-op"))
    r = runner.invoke(app, ["release", str(spec), "--by", "R. Okafor", "--note", "customer name", "--json",
                            "--date", "2027-01-04"])
    assert r.exit_code == 0, r.stderr
    rel = json.loads(r.stdout)
    assert rel["revision"] == "B" and rel["date"] == "2027-01-04" and len(rel["fingerprint"]) == 64
