"""The shipped catalogue and the catalogue check (planted errors are found with file and line)."""

import shutil
import subprocess
import sys

import pytest

from specgen.catalog.loader import check_catalog, load_catalog, shipped_catalog_dir
from specgen.physics import wire

DEMO = shipped_catalog_dir().parent.parent / "demo"


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
    start = text.index("  - id: BOB-ETD39-PIN20\n")
    i = text.index("    breadth:", start)
    j = text.index("\n", i)
    (d / "bobbins.yaml").write_text(text[:i] + "    breadth: 60 mm" + text[j:])
    problems = [str(p) for p in check_catalog(d)]
    assert any("BOB-ETD39-PIN20.breadth" in p and "does not fit" in p and "bobbins.yaml:" in p for p in problems), problems


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


# Each planted value below is a slip a shop could make; the check must name file, line and key path.
# (Ranges are this program's own plausibility guards: common practice, not a standard.)
@pytest.mark.parametrize("file, old, new, where", [
    ("shop.yaml", "bobbin_turns_per_minute: 600", "bobbin_turns_per_minute: fast", "shop.labor.bobbin_turns_per_minute"),
    ("shop.yaml", "per_winding: 90 s", "per_winding: 90 kg", "shop.labor.per_winding"),
    ("shop.yaml", "per_layer_tape: 20 s", "per_windnig: 90 s\n    per_layer_tape: 20 s", "shop.labor.per_windnig"),
    ("shop.yaml", "test: 150 s", "test: 150 d", "shop.labor.test"),
    ("shop.yaml", "profit_margin: 22 %", "profit_margin: 100 %", "shop.profit_margin"),
    ("shop.yaml", "trip_current: 5 mA", "trip_current: 5 kA", "shop.hipot.trip_current"),
    ("shop.yaml", "ratio: 0.5 %", "ratio: 50 %x", "shop.tolerances.ratio"),
    ("shop.yaml", "minimum: 100 Mohm", "minimum: 100 V", "shop.insulation_resistance.minimum"),
    ("shop.yaml", "forced: 5.0 A/mm^2", "forced: 5.0 A", "shop.current_density.forced"),
    ("shop.yaml", "forced: 5.0 A/mm^2", "frosted: 5.0 A/mm^2", "shop.current_density.frosted"),
    ("shop.yaml", 'work_order_format: "WO-{year}-{seq:05d}"', 'work_order_format: "WO-{year}"',
     "shop.work_order_format"),
    ("shop.yaml", 'work_order_format: "WO-{year}-{seq:05d}"', 'work_order_format: "../WO-{seq:05d}"',
     "shop.work_order_format"),
    ("cores.yaml", "dims: {tongue: 19.05 mm}", "dims: {tongue: 1e300 mm}", "cores[2].dims.tongue"),
    ("bobbins.yaml", "    pins: 8\n", "    pins: 0\n", ".pins"),
    ("materials.yaml", "curie: 215 degC", "curie: 21.5 degC", ".curie"),
])
def test_check_catches_bad_shop_and_stock_values(tmp_path, file, old, new, where):
    d = _copy(tmp_path)
    line = _plant(d / file, old, new)
    problems = [str(p) for p in check_catalog(d)]
    assert any(f"{file}:{line}:" in p and where in p for p in problems), problems


def test_check_catches_two_bobbins_for_one_core_and_stack(tmp_path):
    d = _copy(tmp_path)
    text = (d / "bobbins.yaml").read_text()
    start = text.index("  - id: BOB-EI75-19-SPLIT\n")
    end = text.index("\n\n", start)
    twin = text[start:end].replace("BOB-EI75-19-SPLIT", "BOB-EI75-19-SPLIT-B")
    (d / "bobbins.yaml").write_text(text[:end] + "\n\n" + twin + text[end:])
    problems = [str(p) for p in check_catalog(d)]
    assert any("BOB-EI75-19-SPLIT-B.cores" in p and "second 2-section bobbin" in p for p in problems), problems


def test_cli_catalog_check_fails_on_a_bad_labour_figure(tmp_path):
    d = _copy(tmp_path)
    _plant(d / "shop.yaml", "bobbin_turns_per_minute: 600", "bobbin_turns_per_minute: fast")
    r = subprocess.run([sys.executable, "-m", "specgen.cli", "catalog", "check", str(d)], capture_output=True, text=True)
    assert r.returncode == 2 and "bobbin_turns_per_minute" in r.stderr and "Traceback" not in r.stderr
    r = subprocess.run([sys.executable, "-m", "specgen.cli", "design", str(DEMO / "BH-5018.yaml"), "--catalog", str(d)],
                       capture_output=True, text=True)
    assert r.returncode == 2 and "bobbin_turns_per_minute" in r.stderr
