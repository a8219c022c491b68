"""A user's mistake in a spec is one line on stderr and exit 2, never a traceback (design notes: errors).

Each case edits the valid fixture tests/specs/build-ei50.yaml in one place, runs `specgen design` in a
subprocess (the real console entry point, specgen.cli:main) and checks: exit code 2, nothing on stdout,
exactly one line on stderr, that line names the file, the line of the mistake (found in the edited text,
not hard-coded) and the key path, and there is no "Traceback".
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

BASE = Path(__file__).parent / "specs" / "build-ei50.yaml"


def _specgen(*args, cwd):
    return subprocess.run([sys.executable, "-c", "from specgen.cli import main; main()", *args],
                          cwd=cwd, capture_output=True, text=True, timeout=120)


def _edit(old: str, new: str) -> str:
    text = BASE.read_text(encoding="utf-8")
    assert text.count(old) >= 1, old
    return text.replace(old, new, 1)


def _line_of(text: str, fragment: str) -> int:
    """1-based line of the first line containing ``fragment``."""
    for i, line in enumerate(text.splitlines(), start=1):
        if fragment in line:
            return i
    raise AssertionError(f"{fragment!r} not in the edited spec")


def _no_windings() -> str:
    text = BASE.read_text(encoding="utf-8")
    return text[:text.index("windings:")] + text[text.index("insulation:"):]


# (id, edited text, fragment on the line the error must name, key path, words the message must carry)
CASES = [
    ("unknown-core", _edit("  id: EI-50\n", "  id: EI-55\n"), "id: EI-55", "core.id", "unknown core 'EI-55'"),
    ("unknown-wire", _edit("wire: AWG24-G2", "wire: AWG24-G9"), "AWG24-G9", "windings[0].wire",
     "unknown wire 'AWG24-G9'"),
    ("pin-not-on-bobbin", _edit('start: "5"', 'start: "99"'), '"99"', "windings[1].start",
     "pin '99' is not on bobbin BOB-EI50-12.7"),
    ("bare-number-voltage", _edit("voltage: 18 V", "voltage: 18"), "voltage: 18", "windings[0].voltage",
     "bare number"),
    ("wrong-dimension", _edit("voltage: 18 V", "voltage: 50 Hz"), "voltage: 50 Hz", "windings[0].voltage",
     "expected a voltage, got '50 Hz'"),
    ("missing-windings", _no_windings(), "part: BH-T001", "windings", "is required"),
    ("zero-turns", _edit("turns: 60", "turns: 0"), "turns: 0", "windings[0].turns", "at least 1"),
    ("zero-frequency", _edit("frequency: 400 Hz", "frequency: 0 Hz"), "frequency: 0 Hz", "operating.frequency",
     "greater than zero"),
    ("a-billion-turns", _edit("turns: 60", "turns: 1000000000"), "turns: 1000000000", "windings[0].turns",
     "at most 20000"),
    ("typo-suggests-key", _edit("    voltage: 9 V", "    voltge: 9 V"), "voltge", "windings[1].voltge",
     "unknown key 'voltge'; did you mean 'voltage'?"),
    ("unknown-top-level-key", _edit("operating:", "operatng: {}\noperating:"), "operatng", "operatng",
     "did you mean 'operating'?"),
    ("duplicate-key", _edit("    voltage: 18 V\n", "    voltage: 18 V\n    voltage: 19 V\n"),
     "voltage: 19 V", "windings[0].voltage", "duplicate key 'voltage'"),
]


def _one_error_line(result) -> str:
    assert "Traceback" not in result.stderr and "Traceback" not in result.stdout
    assert result.returncode == 2, (result.returncode, result.stderr)
    assert result.stdout == ""
    lines = result.stderr.splitlines()
    assert len(lines) == 1, lines
    # the CLI prefixes "error: " today (see test_error_line_begins_with_the_file_name)
    return lines[0].removeprefix("error: ")


@pytest.mark.parametrize("case, text, fragment, path, words", [
    pytest.param(*c, id=c[0]) if type(c) is tuple else c for c in CASES])
def test_spec_mistake_is_one_located_line(tmp_path, case, text, fragment, path, words):
    name = f"{case}.yaml"
    (tmp_path / name).write_text(text, encoding="utf-8")
    line = _one_error_line(_specgen("design", name, cwd=tmp_path))
    where = f"{name}:{_line_of(text, fragment)}: {path}: "
    assert line.startswith(where), line
    assert words in line


def test_duplicate_key_names_both_lines_and_the_key(tmp_path):
    text = _edit("    voltage: 18 V\n", "    voltage: 18 V\n    voltage: 19 V\n")
    (tmp_path / "dup.yaml").write_text(text, encoding="utf-8")
    line = _one_error_line(_specgen("design", "dup.yaml", cwd=tmp_path))
    assert line.startswith(f"dup.yaml:{_line_of(text, 'voltage: 19 V')}: ")
    assert f"duplicate key 'voltage' (first on line {_line_of(text, 'voltage: 18 V')})" in line


def test_tab_is_located(tmp_path):
    # a YAML syntax mistake has no key path yet; file and line are what the user needs
    text = _edit("    turns: 60", "\tturns: 60")
    (tmp_path / "tab.yaml").write_text(text, encoding="utf-8")
    line = _one_error_line(_specgen("design", "tab.yaml", cwd=tmp_path))
    assert line.startswith(f"tab.yaml:{_line_of(text, 'turns: 60')}: ")
    assert "tab" in line


def test_non_utf8_bytes_are_located(tmp_path):
    raw = BASE.read_bytes().replace(b"title: 400 Hz", b"title: 400 \xff Hz", 1)
    (tmp_path / "latin.yaml").write_bytes(raw)
    line = _one_error_line(_specgen("design", "latin.yaml", cwd=tmp_path))
    expected_line = raw[: raw.index(b"\xff")].count(b"\n") + 1
    assert line.startswith(f"latin.yaml:{expected_line}: ")
    assert "UTF-8" in line and "0xff" in line


def test_a_folder_as_the_spec(tmp_path):
    (tmp_path / "parts.yaml").mkdir()
    line = _one_error_line(_specgen("design", "parts.yaml", cwd=tmp_path))
    assert line.startswith("parts.yaml: ") and "folder" in line


def test_a_missing_file(tmp_path):
    line = _one_error_line(_specgen("design", "nowhere.yaml", cwd=tmp_path))
    assert line.startswith("nowhere.yaml: ") and "no such" in line


def test_error_line_begins_with_the_file_name(tmp_path):
    text = _edit("voltage: 18 V", "voltage: 50 Hz")
    (tmp_path / "dim.yaml").write_text(text, encoding="utf-8")
    result = _specgen("design", "dim.yaml", cwd=tmp_path)
    assert result.returncode == 2
    assert result.stderr.startswith("dim.yaml:")
