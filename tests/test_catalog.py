"""The shipped catalogue and the catalogue check (planted errors are found with file and line)."""

import shutil
import subprocess
import sys

import pytest

from specgen.catalog.loader import check_catalog, load_catalog, shipped_catalog_dir
from specgen.physics import wire


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def test_every_shipped_item_loads(cat):
    assert check_catalog(None) == []
    assert len(cat.cores) >= 40
    shapes = {c.shape for c in cat.cores.values()}
    assert shapes >= {"EI", "toroid", "E", "ETD", "EFD", "PQ", "RM", "POT"}
    assert {w.awg for w in cat.wires.values() if w.awg} >= set(range(8, 45))
    assert {w.kind for w in cat.wires.values()} == {"round", "litz", "foil", "strip", "tiw"}
    for kind in cat.KINDS:
        for obj in getattr(cat, kind).values():
            assert obj.source.strip(), f"{obj.id} has no source"


def test_awg_wires_follow_astm_b258(cat):
    """Bare diameters of the AWG entries: ASTM B258 formula d = 0.127 mm x 92^((36-n)/39), 4 digits."""
    for w in cat.wires.values():
        if w.awg is not None:
            assert w.strand_diameter_m == pytest.approx(wire.awg_diameter_m(w.awg), rel=6e-4), w.id
            assert w.overall_diameter_m > w.strand_diameter_m


def test_every_core_has_a_bobbin_or_is_a_toroid(cat):
    for c in cat.cores.values():
        if c.shape != "toroid":
            assert cat.bobbins_for(c.id), c.id


def _copy(tmp_path):
    dest = tmp_path / "cat"
    shutil.copytree(shipped_catalog_dir(), dest)
    return dest


def _plant(path, old, new):
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new, 1))
    return text[: text.index(old)].count("\n") + 1


def test_check_finds_planted_errors_with_file_and_line(tmp_path):
    d = _copy(tmp_path)
    line_dup = _plant(d / "cores.yaml", "    shape: EI\n", "    shape: EI\n    shape: EI\n") + 1
    line_unit = _plant(d / "insulation.yaml", "thickness: 0.055 mm", "thickness: 0.055")
    line_neg = _plant(d / "bobbins.yaml", "    breadth: ", "    breadth: -")
    problems = [str(p) for p in check_catalog(d)]
    assert any(f"cores.yaml:{line_dup}: cores[0].shape: duplicate key 'shape'" in p for p in problems), problems
    assert any(f"insulation.yaml:{line_unit}:" in p and "bare number" in p for p in problems), problems
    assert any(f"bobbins.yaml:{line_neg}:" in p and "greater than zero" in p for p in problems), problems


def test_check_finds_a_bobbin_bigger_than_its_window(tmp_path):
    d = _copy(tmp_path)
    text = (d / "bobbins.yaml").read_text()
    start = text.index("  - id: BOB-ETD39-20P\n")
    i = text.index("    breadth:", start)
    j = text.index("\n", i)
    (d / "bobbins.yaml").write_text(text[:i] + "    breadth: 60 mm" + text[j:])
    problems = [str(p) for p in check_catalog(d)]
    assert any("BOB-ETD39-20P.breadth" in p and "does not fit" in p and "bobbins.yaml:" in p for p in problems), problems


def test_cli_catalog_check_exit_codes(tmp_path):
    d = _copy(tmp_path)
    ok = subprocess.run([sys.executable, "-m", "specgen.cli", "catalog", "check", str(d)], capture_output=True, text=True)
    assert ok.returncode == 0, ok.stderr
    _plant(d / "materials.yaml", "b_sat_25c: ", "b_sat_25c: 12 #")
    bad = subprocess.run([sys.executable, "-m", "specgen.cli", "catalog", "check", str(d)], capture_output=True, text=True)
    assert bad.returncode == 2
    assert "materials.yaml:" in bad.stderr and "Traceback" not in bad.stderr


@pytest.mark.parametrize("args, fragment", [
    (["catalog", "list", "cheese"], "unknown kind"),
    (["catalog", "show", "ETD-39-F10"], "did you mean"),
    (["catalog", "list", "wires", "--catalog", "/nonexistent/folder"], "no such catalogue folder"),
    (["design", "/nonexistent.yaml"], "no such spec file"),
])
def test_cli_bad_input_is_one_line_exit_2(args, fragment):
    r = subprocess.run([sys.executable, "-m", "specgen.cli", *args], capture_output=True, text=True)
    assert r.returncode == 2
    lines = [l for l in r.stderr.splitlines() if l.strip()]
    assert len(lines) == 1 and fragment in lines[0], r.stderr
    assert "Traceback" not in r.stderr


def test_cli_catalog_list_json():
    import json

    r = subprocess.run([sys.executable, "-m", "specgen.cli", "catalog", "list", "cores", "--json"],
                       capture_output=True, text=True)
    assert r.returncode == 0
    rows = json.loads(r.stdout)
    assert any(row["id"] == "ETD-39-F100" for row in rows)
