"""`specgen new`: the commented starter specs (specgen.starter).

Sources named beside each check:
- the starter is read back with ruamel.yaml (YAML 1.2), a parser independent of the PyYAML
  reader the program uses, for its revision, status and history;
- "designs cleanly": `specgen design` on it exits 0 (no failed check), the program's own
  contract; the numbers themselves are checked by the engine's tests against their sources.
Part numbers are invented demo data (Brindle Hollow Coil Works).
"""

from __future__ import annotations

import json
import re

import pytest
from typer.testing import CliRunner

from specgen.cli import app
from specgen.errors import SpecError
from specgen.starter import KINDS, starter_text, write_starter

runner = CliRunner()


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


@pytest.mark.parametrize("kind", KINDS)
def test_starter_designs_cleanly_and_is_a_draft_of_a(tmp_path, kind):
    from ruamel.yaml import YAML

    out = tmp_path / f"BH-7{len(kind)}.yaml"
    r = cli("new", out.stem, "--kind", kind, "--out", out)
    assert r.exit_code == 0, r.stderr
    assert str(out) in r.stdout
    d = cli("design", out)
    assert d.exit_code == 0, d.stdout + d.stderr
    assert "Traceback" not in d.stdout + d.stderr
    assert f"{out.stem} rev A (draft)" in d.stdout
    data = YAML(typ="safe", pure=True).load(out.read_text())
    assert (data["revision"], data["status"], data["history"]) == ("A", "draft", [])
    assert data["kind"] == kind and data["part"] == out.stem


KEY_LINE = re.compile(r"^\s*(?:# )?\s*(?:- )?([a-z_]+):(?:\s|$)")


def _key_lines(text: str):
    """(key, text after the key) of every line that sets a key or shows one commented out."""
    for line in text.splitlines():
        m = KEY_LINE.match(line)
        if m:
            yield m.group(1), line[m.end():]


@pytest.mark.parametrize("kind", KINDS)
def test_every_key_is_explained_somewhere(kind):
    """Each key the starter shows (set or commented out) carries a comment on at least one of
    its lines, so the file explains itself."""
    text = starter_text("BH-7000", kind)
    keys = {k for k, _ in _key_lines(text)}
    explained = {k for k, rest in _key_lines(text) if "#" in rest}
    assert {"part", "revision", "status", "kind", "core", "windings", "history"} <= keys
    assert keys - explained == set()


@pytest.mark.parametrize("kind", KINDS)
def test_commented_out_keys_are_real_keys(tmp_path, kind):
    """Uncommenting any one optional key gives a spec the schema knows (no 'unknown key')."""
    from specgen.design.spec import load_spec_text

    text = starter_text("BH-7001", kind)
    lines = text.splitlines(keepends=True)
    tried = 0
    for i, line in enumerate(lines):
        m = re.match(r"^(\s*)# ([a-z_]+: .*)$", line.rstrip("\n"))
        if not m:
            continue
        candidate = "".join(lines[:i]) + m.group(1) + m.group(2) + "\n" + "".join(lines[i + 1:])
        tried += 1
        try:
            load_spec_text(candidate, "starter.yaml")
        except SpecError as err:
            assert "unknown key" not in err.message, (line, err)
    assert tried >= 4


def test_new_refuses_to_overwrite(tmp_path):
    out = tmp_path / "BH-7100.yaml"
    out.write_text("keep me\n")
    r = cli("new", "BH-7100", "--kind", "transformer", "--out", out)
    assert r.exit_code == 2 and "already exists" in r.stderr
    assert len(r.stderr.splitlines()) == 1
    assert out.read_text() == "keep me\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["BH-7100.yaml"]   # no temp litter


def test_new_default_path_and_bad_input(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert cli("new", "BH-7200", "--kind", "inductor").exit_code == 0
    assert (tmp_path / "BH-7200.yaml").is_file()
    r = cli("new", "BH-7201", "--kind", "reactor")
    assert r.exit_code == 2 and "--kind" in r.stderr
    r = cli("new", "BH 72/02", "--kind", "inductor")
    assert r.exit_code == 2 and "letters, digits" in r.stderr
    r = cli("new", "BH-7203", "--kind", "inductor", "--out", tmp_path / "no" / "such" / "x.yaml")
    assert r.exit_code == 2 and "no such folder" in r.stderr


@pytest.mark.parametrize("part", ["BH 6001", "BH+6001", "BH/6001", "-BH6001", "x" * 61, "two\nlines"])
def test_new_refuses_what_design_refuses(tmp_path, part):
    """One part-number rule: `new` refuses with the very message `design` gives for the same part."""
    from specgen.design.spec import load_spec_text

    with pytest.raises(SpecError) as new_err:
        write_starter(part, "transformer", tmp_path / "x.yaml")
    good = write_starter("BH-6001", "transformer", tmp_path / "ok.yaml").read_text()
    text = good.replace("part: BH-6001", "part: " + json.dumps(part), 1)
    with pytest.raises(SpecError) as design_err:
        load_spec_text(text, "x.yaml")
    assert design_err.value.path == "part" and new_err.value.path == "PART"
    assert new_err.value.message == design_err.value.message
    assert not (tmp_path / "x.yaml").exists()
