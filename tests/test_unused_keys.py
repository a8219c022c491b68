"""Nothing silently ignored: every key a kind does not use is a located one-line error naming the key and the kind.

Each case edits a valid fixture in one place and checks the error names the file, the line of the key (found in
the edited text), the key path, the key and the kind. The defects these guard: `core: {gap: 1 mm}` on a transformer
and `current:` on a primary were accepted and dropped.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from specgen import load_spec
from specgen.errors import SpecError

SPECS = Path(__file__).parent / "specs"
TRANSFORMER = SPECS / "build-ei50.yaml"
REACTOR = SPECS / "reactor-ei100.yaml"
CHOKE = Path(__file__).parent.parent / "specgen" / "demo" / "BH-3305.yaml"
POWDER = Path(__file__).parent.parent / "specgen" / "demo" / "BH-5018.yaml"


def _edit(base: Path, old: str, new: str) -> str:
    text = base.read_text(encoding="utf-8")
    assert old in text, old
    return text.replace(old, new, 1)


def _line_of(text: str, fragment: str) -> int:
    for i, line in enumerate(text.splitlines(), start=1):
        if fragment in line:
            return i
    raise AssertionError(fragment)


CASES = [
    ("transformer-gap", TRANSFORMER, "  bobbin: BOB-EI50-12.7\n", "  bobbin: BOB-EI50-12.7\n  gap: 1 mm\n",
     "gap: 1 mm", "core.gap", ("'gap' is not used by kind transformer", "kind: flyback")),
    ("transformer-gap-arrangement", TRANSFORMER, "  bobbin: BOB-EI50-12.7\n",
     "  bobbin: BOB-EI50-12.7\n  gap_arrangement: spacer\n", "gap_arrangement", "core.gap_arrangement",
     ("'gap_arrangement' is not used by kind transformer", "kind: flyback")),
    ("primary-current", TRANSFORMER, "    voltage: 18 V\n", "    voltage: 18 V\n    current: 1 A\n", "current: 1 A",
     "windings[0].current", ("'current' is not used by kind transformer on a primary winding", "loads")),
    ("primary-va", TRANSFORMER, "    voltage: 18 V\n", "    voltage: 18 V\n    va: 10 VA\n", "va: 10 VA",
     "windings[0].va", ("'va' is not used by kind transformer",)),
    # a primary's low line: the outputs are met at its nominal voltage, so voltage_min was accepted and dropped
    ("primary-voltage-min", TRANSFORMER, "    voltage: 18 V\n", "    voltage: 18 V\n    voltage_min: 16 V\n",
     "voltage_min: 16 V", "windings[0].voltage_min",
     ("'voltage_min' is not used by kind transformer on a primary winding", "nominal voltage", "low line")),
    ("secondary-voltage-max", TRANSFORMER, "    voltage: 9 V\n", "    voltage: 9 V\n    voltage_max: 10 V\n",
     "voltage_max: 10 V", "windings[1].voltage_max", ("'voltage_max' is not used by kind transformer",)),
    ("inductor-winding-current", CHOKE, "    strands: 2\n", "    strands: 2\n    current: 7.5 A\n", "current: 7.5 A",
     "windings[0].current", ("'current' is not used by kind inductor", "'inductor' section")),
    ("inductor-waveform", CHOKE, "  frequency: 100 kHz\n", "  frequency: 100 kHz\n  waveform: square\n",
     "waveform: square", "operating.waveform", ("'waveform' is not used by kind inductor",)),
    ("inductor-operating-duty", CHOKE, "  frequency: 100 kHz\n", "  frequency: 100 kHz\n  duty: 0.3\n",
     "duty: 0.3", "operating.duty", ("'duty' is not used by kind inductor", "'inductor' section")),
    ("reactor-ripple", REACTOR, "  current: 5 A\n", "  current: 5 A\n  ripple: 1 A\n", "ripple: 1 A",
     "inductor.ripple", ("'ripple' is not used by kind inductor as an AC reactor",)),
]


@pytest.mark.parametrize("case, base, old, new, fragment, path, words", CASES, ids=[c[0] for c in CASES])
def test_unused_key_is_a_located_error(tmp_path, case, base, old, new, fragment, path, words):
    text = _edit(base, old, new)
    spec = tmp_path / f"{case}.yaml"
    spec.write_text(text, encoding="utf-8")
    with pytest.raises(SpecError) as err:
        load_spec(spec)
    msg = str(err.value)
    assert f"{case}.yaml:{_line_of(text, fragment)}: {path}: " in msg, msg
    for w in words:
        assert w in msg, msg


def test_the_fixtures_themselves_load():
    for base in (TRANSFORMER, REACTOR, CHOKE):
        load_spec(base)


@pytest.mark.slow
def test_cli_refuses_a_gapped_transformer_in_one_line(tmp_path):
    text = _edit(TRANSFORMER, "  bobbin: BOB-EI50-12.7\n", "  bobbin: BOB-EI50-12.7\n  gap: 1 mm\n")
    (tmp_path / "gapped.yaml").write_text(text, encoding="utf-8")
    result = subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", "design", "gapped.yaml"],
                            cwd=tmp_path, capture_output=True, text=True, timeout=120)
    assert result.returncode == 2 and result.stdout == "" and "Traceback" not in result.stderr
    (line,) = result.stderr.splitlines()
    assert f"gapped.yaml:{_line_of(text, 'gap: 1 mm')}: core.gap: " in line and "kind: flyback" in line


@pytest.mark.parametrize("key, value", [("gap", "none"), ("gap", "0.5 mm"), ("gap_arrangement", "centre")])
def test_powder_core_refuses_a_gap_key(tmp_path, key, value):
    from specgen.api import design_file

    text = _edit(POWDER, "  id: T-IP75-40X24X14\n", f"  id: T-IP75-40X24X14\n  {key}: {value}\n")
    spec = tmp_path / "powder.yaml"
    spec.write_text(text, encoding="utf-8")
    with pytest.raises(SpecError) as err:
        design_file(spec)
    msg = str(err.value)
    assert f"powder.yaml:{_line_of(text, f'{key}: {value}')}: core.{key}: " in msg and "powder core" in msg, msg


@pytest.mark.parametrize("old, new, key", [
    ("voltage_max: 253 V}", "voltage_max: 253 V, voltage_min: 207 V}", "voltage_min"),
    ("voltage: 12 V, current: 2.5 A}", "voltage: 12 V, voltage_max: 13 V, current: 2.5 A}", "voltage_max")])
def test_search_requirement_refuses_what_the_design_does_not_use(tmp_path, old, new, key):
    """The search's requirement refuses the same keys with the same sentence (its draft would have dropped them)."""
    from specgen.search.requirement import load_requirement

    text = _edit(Path(__file__).parent.parent / "specgen" / "demo" / "REQ-1042.yaml", old, new)
    path = tmp_path / "req.yaml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(SpecError) as err:
        load_requirement(path)
    msg = str(err.value)
    assert f"req.yaml:{_line_of(text, new)}" in msg and f".{key}: '{key}' is not used" in msg, msg
