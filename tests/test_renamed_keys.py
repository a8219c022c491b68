"""Keys spelt as they used to be: each gives one located line that names the new key, exit 2.

The old spellings are planted into copies of the shipped catalogue and of the demo files; the error must
carry the file, the line of the old key, its key path and the new key's name.
"""

import shutil
from pathlib import Path

import pytest

from specgen.api import design_file
from specgen.catalog.loader import check_catalog, load_catalog, shipped_catalog_dir
from specgen.errors import SpecError

DEMO = Path(__file__).parent.parent / "specgen" / "demo"


def _plant(path: Path, old: str, new: str) -> int:
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new, 1))
    return text[: text.index(old)].count("\n") + 1


@pytest.mark.parametrize("file, new, old, path, names", [
    ("materials.yaml", "dc_bias: {half_field: 3499.45841897 A/m, steepness: 1.95}",
     "rolloff: {a: 1.0, b: 1.228e-07, c: 1.95}", ".rolloff", "dc_bias: {half_field, steepness}"),
    ("shop.yaml", "profit_margin: 22 %", "margin: 22 %", "shop.margin", "profit_margin"),
    ("cores.yaml", "skirt_coverage: 0.6", "ring_fraction: 0.6", ".dims.ring_fraction", "skirt_coverage"),
    ("insulation.yaml", "winding_volume_share: 0.15", "usage: 0.15", ".usage", "winding_volume_share"),
    ("bobbins.yaml", "cores: [EI-50]", "core: EI-50", ".core", "cores:"),
])
def test_old_catalogue_key_names_the_new_one(tmp_path, file, new, old, path, names):
    root = tmp_path / "cat"
    shutil.copytree(shipped_catalog_dir(), root)
    line = _plant(root / file, new, old)
    problems = [str(p) for p in check_catalog(root)]
    hits = [p for p in problems if f"{file}:{line}:" in p and path in p]
    assert hits and "was renamed" in hits[0] and names in hits[0] and "\n" not in hits[0], problems
    with pytest.raises(SpecError):
        load_catalog(root)


@pytest.mark.parametrize("name", ["BH-1042.yaml", "REQ-1042.yaml"])
def test_old_same_turns_key_names_the_new_one(tmp_path, name):
    from specgen.search.requirement import load_requirement

    spec = tmp_path / name
    shutil.copyfile(DEMO / name, spec)
    line = _plant(spec, "same_turns_as: S1", "match: S1")
    with pytest.raises(SpecError) as err:
        (load_requirement if name.startswith("REQ") else design_file)(spec)
    text = str(err.value)
    assert text.startswith(f"{spec}:{line}:") and "match was renamed same_turns_as" in text, text


def test_one_bobbin_serves_every_core_it_lists():
    """A bobbin lists the cores it fits: one ETD39 body in two grades takes the same bobbin, so each grade
    finds it, and the design of either picks it."""
    cat = load_catalog()
    bob = cat.bobbins["BOB-ETD39-PIN20"]
    assert bob.cores == ("ETD-39-F100", "ETD-39-F300")
    for core in bob.cores:
        assert bob in cat.bobbins_for(core)


def test_a_listed_core_the_bobbin_does_not_fit_is_named(tmp_path):
    root = tmp_path / "cat"
    shutil.copytree(shipped_catalog_dir(), root)
    # the small EFD15 body in one grade moved to the EFD25 bobbin, whose breadth is far too long for it
    _plant(root / "bobbins.yaml", "cores: [EFD-15.8.5-F300, EFD-15.8.5-F1M]", "cores: [EFD-15.8.5-F300]")
    line = _plant(root / "bobbins.yaml", "cores: [EFD-25.13.9-F300]", "cores: [EFD-25.13.9-F300, EFD-15.8.5-F1M]")
    problems = [str(p) for p in check_catalog(root)]
    assert any("BOB-EFD25-PIN10.breadth" in p and "EFD-15.8.5-F1M" in p for p in problems), problems
    assert any(f"bobbins.yaml:{line - 1}:" in p for p in problems), problems
