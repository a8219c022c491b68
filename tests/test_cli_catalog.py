"""Every `specgen catalog` subcommand through the CLI, in each of its output forms.

Sources named beside each check:
- copper mass per metre: IEC 60028 (annealed copper, 8.89 g/cm³) times the ASTM B258 bare diameter of
  AWG 24 (0.5106 mm): 0.2048 mm² x 8.89 g/cm³ = 1.820 g/m;
- DC resistance: IEC 60028 (1/58 Ω mm²/m at 20 °C) over the same area: 84.2 Ω/km;
- CSV read back with Python's csv module (RFC 4180), JSON with json (RFC 8259).
"""

from __future__ import annotations

import csv
import io
import json
import math
import shutil

import pytest
from typer.testing import CliRunner

from specgen.catalog.loader import shipped_catalog_dir
from specgen.cli import app

runner = CliRunner()
KINDS = ("wires", "cores", "bobbins", "materials", "tapes", "sleevings", "varnishes")


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


@pytest.mark.parametrize("kind", KINDS)
def test_list_every_kind_as_text_json_and_csv(kind):
    text = cli("catalog", "list", kind)
    assert text.exit_code == 0, text.stderr
    rows = json.loads(cli("catalog", "list", kind, "--json").stdout)
    assert rows and text.stdout.strip().endswith(f"({len(rows)} items)")
    assert all(r["id"] in text.stdout for r in rows)
    parsed = list(csv.DictReader(io.StringIO(cli("catalog", "list", kind, "--csv").stdout)))
    assert [r["id"] for r in parsed] == [r["id"] for r in rows]
    # the singular names the same table
    assert cli("catalog", "list", kind[:-1] if kind != "varnishes" else "varnish", "--json").stdout == \
        cli("catalog", "list", kind, "--json").stdout


def test_list_help_names_every_kind():
    r = cli("catalog", "list", "--help")
    assert r.exit_code == 0
    for kind in KINDS:
        assert kind in r.stdout


def test_show_is_readable_text():
    r = cli("catalog", "show", "ETD-39-F100")
    assert r.exit_code == 0
    out = r.stdout
    assert "{" not in out and "None" not in out and "True" not in out, out
    assert "cores.yaml:" in out and "gappable    yes" in out and "Ae" in out and "mm²" in out
    assert "BOB-ETD39-PIN20" in out


def test_show_wire_figures_against_iec_60028():
    info = json.loads(cli("catalog", "show", "AWG24-G2", "--json").stdout)
    area_mm2 = math.pi / 4 * 0.5106 ** 2                  # ASTM B258 bare diameter of AWG 24
    assert info["computed"]["copper_mm2"] == pytest.approx(area_mm2, rel=1e-3)
    assert info["computed"]["g_per_m"] == pytest.approx(area_mm2 * 8.89, rel=1e-3)      # IEC 60028 density
    assert info["computed"]["ohm_per_km_20c"] == pytest.approx(1e3 / 58 / area_mm2, rel=2e-3)
    text = cli("catalog", "show", "AWG24-G2").stdout
    assert "1.820 g/m" in text and "84.2" in text


def test_show_unknown_is_one_line():
    r = cli("catalog", "show", "ETD-39-F10")
    assert r.exit_code == 2 and "did you mean" in r.stderr and len(r.stderr.strip().splitlines()) == 1


def test_check_text_and_json(tmp_path):
    r = cli("catalog", "check")
    assert r.exit_code == 0 and "no problems" in r.stdout
    ok = json.loads(cli("catalog", "check", "--json").stdout)
    assert ok["ok"] is True and ok["problems"] == []
    d = tmp_path / "cat"
    shutil.copytree(shipped_catalog_dir(), d)
    shop = d / "shop.yaml"
    shop.write_text(shop.read_text().replace("litz_factor: 1.5", "litz_factor: slow"))
    bad = cli("catalog", "check", d, "--json")
    assert bad.exit_code == 2
    report = json.loads(bad.stdout)
    assert report["ok"] is False
    assert any(p["path"] == "shop.labor.litz_factor" and p["file"].endswith("shop.yaml") and p["line"]
               for p in report["problems"])
