"""`specgen release` and `specgen verify` through the command line (typer's CliRunner).

Sources named beside each check:
- byte-for-byte preservation: the released file is compared line by line with the original
  (Python's own string comparison, no YAML involved);
- what the file says after a release is read back with ruamel.yaml (YAML 1.2), a second parser
  independent of the PyYAML reader the program uses;
- git: repositories made and inspected with the git command itself.
Spec texts are the shipped demo parts (invented data: Brindle Hollow Coil Works).
"""

from __future__ import annotations

import json
import re
import shutil
from pathlib import Path

import pytest
from conftest import blank_recorded_fingerprint
from conftest import git as _git
from typer.testing import CliRunner

from specgen import api
from specgen.catalog.loader import load_catalog, resolve_catalog_dir
from specgen.cli import app
from specgen.design.spec import load_spec
from specgen.lifecycle import release_gate

DEMO = Path(api.__file__).resolve().parent / "demo"
runner = CliRunner()      # this typer's runner keeps stdout and stderr apart (no mix_stderr)


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


def design(path, catalog_dir=None):
    """The design of a spec file, read with the one spec loader (it accepts history 'parts')."""
    cat = load_catalog(catalog_dir)
    return api.run_design(load_spec(path), cat)


def ruamel_load(path: Path):
    from ruamel.yaml import YAML

    return YAML(typ="safe", pure=True).load(path.read_text(encoding="utf-8"))


@pytest.fixture
def demo_copy(tmp_path):
    def copy(name: str) -> Path:
        dst = tmp_path / name
        dst.write_text(blank_recorded_fingerprint((DEMO / name).read_text(encoding="utf-8")), encoding="utf-8")
        return dst
    return copy


def _add_turns(text: str, winding: str, turns: int) -> str:
    """Insert a fixed turn count under one winding, as an engineer would type it."""
    m = re.search(rf"^(\s*)- name: {winding}\s*\n", text, flags=re.M)
    assert m, winding
    return text[:m.end()] + f"{m.group(1)}  turns: {turns}\n" + text[m.end():]


# the demo parts BH-3305 and BH-4120 carry a design warning: a release accepts it by name
ACCEPT_ALL = ("--accept-all", "--reason", "accepted for the test")
RELEASE_KEYS = re.compile(r"^(revision|status|history)\s*:")


# ----------------------------------------------------------------------------------------------
# release keeps the author's file


@pytest.mark.parametrize("name", ["BH-1042.yaml", "BH-2210.yaml", "BH-5018.yaml"])
def test_release_keeps_every_other_line(demo_copy, name):
    spec = demo_copy(name)
    before = spec.read_text(encoding="utf-8").splitlines(keepends=True)
    r = cli("release", spec, "--by", "R. Okafor", "--note", "re-released for the test",
            "--date", "2026-12-01")
    assert r.exit_code == 0, r.stderr
    m = re.match(r"released (\S+) rev ([A-Z]+), fingerprint ([0-9a-f]{12})\n", r.stdout)
    assert m, r.stdout
    # the release supersedes the last one: said on the next line (the test's own register holds no order)
    assert re.fullmatch(r"  supersedes rev [A-Z]+, effective from the next work order; no open work orders .*\n",
                        r.stdout[m.end():]), r.stdout
    after = spec.read_text(encoding="utf-8").splitlines(keepends=True)
    # the old file is a prefix of the new one except the release lines; the new history entry
    # is appended after the old last line
    assert len(after) > len(before)
    for i, (old, new) in enumerate(zip(before, after)):
        if old != new:
            assert RELEASE_KEYS.match(old) and RELEASE_KEYS.match(new), (i, old, new)
            if old.startswith("revision"):
                # only the value changed: a comment after it would still be there
                assert old.split("#")[1:] == new.split("#")[1:]
    added = after[len(before):]
    assert added[0].lstrip().startswith("- revision: ")
    data = ruamel_load(spec)                         # a second, independent YAML parser
    last = data["history"][-1]
    assert data["status"] == "released"
    assert data["revision"] == last["revision"] == m.group(2)
    assert str(last["date"]) == "2026-12-01" and last["by"] == "R. Okafor"
    assert last["fingerprint"].startswith(m.group(3))


def test_release_of_a_draft_keeps_its_letter_and_the_status_comment(tmp_path):
    spec = tmp_path / "BH-6001.yaml"
    assert cli("new", "BH-6001", "--kind", "inductor", "--out", spec).exit_code == 0
    before = spec.read_text().splitlines()
    r = cli("release", spec, "--by", "T. Vance", "--note", "first release", "--date", "2026-12-02")
    assert r.exit_code == 0, r.stderr
    assert r.stdout.startswith("released BH-6001 rev A, fingerprint ")   # a draft keeps its letter
    after = spec.read_text().splitlines()
    status_old = next(l for l in before if l.startswith("status:"))
    status_new = next(l for l in after if l.startswith("status:"))
    assert status_old.split("#", 1)[1] == status_new.split("#", 1)[1]  # the comment is kept
    assert status_new.startswith("status: released")
    changed = [(o, n) for o, n in zip(before, after) if o != n]
    assert all(RELEASE_KEYS.match(o) for o, _ in changed), changed


def test_release_refuses_a_failing_design_and_leaves_the_file_alone(tmp_path):
    from specgen.starter import starter_text

    # the starter's 24 VA transformer on the next smaller lamination does not fit its bobbin
    spec = tmp_path / "BH-6009.yaml"
    spec.write_text(starter_text("BH-6009", "transformer").replace("id: EI-100 ", "id: EI-75  "))
    assert design(spec).failed                       # precondition: a check fails
    original = spec.read_bytes()
    r = cli("release", spec, "--by", "T. Vance", "--note", "should not release")
    assert r.exit_code == 1
    assert "not released" in r.stderr and "FAIL" in r.stderr
    assert "Traceback" not in r.stderr + r.stdout
    assert spec.read_bytes() == original


def test_release_refuses_when_nothing_changed(demo_copy):
    spec = demo_copy("BH-3305.yaml")
    assert cli("release", spec, "--by", "T. Vance", "--note", "one", *ACCEPT_ALL).exit_code == 0
    released = spec.read_bytes()
    r = cli("release", spec, "--by", "T. Vance", "--note", "two", *ACCEPT_ALL)
    assert r.exit_code == 2 and "nothing changed" in r.stderr
    assert spec.read_bytes() == released


@pytest.mark.parametrize("args, message", [
    (["--date", "2026-13-40"], "not a date"),
    (["--note", "  "], "needs a note"),
])
def test_release_bad_input_is_one_line(demo_copy, args, message):
    spec = demo_copy("BH-3305.yaml")
    original = spec.read_bytes()
    base = {"--by": "T. Vance", "--note": "n"}
    for flag, value in zip(args[::2], args[1::2]):
        base[flag] = value
    r = cli("release", spec, *[x for kv in base.items() for x in kv])
    assert r.exit_code == 2 and message in r.stderr and len(r.stderr.splitlines()) == 1
    assert spec.read_bytes() == original


# ----------------------------------------------------------------------------------------------
# verify: tampering with a released spec or with the catalogue under it


def test_verify_names_a_turns_edit_after_release(demo_copy):
    spec = demo_copy("BH-2210.yaml")
    assert cli("release", spec, "--by", "T. Vance", "--note", "n").exit_code == 0
    ok = cli("verify", spec)
    assert ok.exit_code == 0 and ": ok (fingerprint" in ok.stdout
    turns = design(spec).winding("P").turns
    spec.write_text(_add_turns(spec.read_text(), "P", turns + 1))
    r = cli("verify", spec)
    assert r.exit_code == 1
    assert "MISMATCH" in r.stdout and "windings changed" in r.stdout
    # no catalogue entry's content changed (the design may pick another wire for the new turns)
    assert not re.search(r"catalogue entry \S+ changed", r.stdout)


def test_verify_names_a_changed_catalogue_wire(demo_copy, tmp_path):
    cat_dir = tmp_path / "catalog"
    shutil.copytree(resolve_catalog_dir(None), cat_dir)
    spec = demo_copy("BH-2210.yaml")
    assert cli("release", spec, "--by", "T. Vance", "--note", "n", "--catalog", cat_dir).exit_code == 0
    wire = design(spec, cat_dir).winding("P").wire
    wires = cat_dir / "wires.yaml"
    text = wires.read_text()
    block = re.search(rf"^  - id: {re.escape(wire)}\n(?:    .*\n)+", text, flags=re.M)
    assert block, wire
    edited = re.sub(r"overall_diameter: ([0-9.]+) mm",
                    lambda m: f"overall_diameter: {float(m.group(1)) * 1.05:.3f} mm", block.group(0))
    assert edited != block.group(0)
    wires.write_text(text[:block.start()] + edited + text[block.end():])
    r = cli("verify", spec, "--catalog", cat_dir)
    assert r.exit_code == 1
    assert "MISMATCH" in r.stdout and wire in r.stdout
    # the shipped catalogue is untouched, so the release still verifies against a fresh copy
    assert cli("verify", spec, "--catalog", resolve_catalog_dir(None)).exit_code == 0


def test_verify_folders_drafts_and_json(tmp_path):
    root = tmp_path / "specs"
    (root / "sub").mkdir(parents=True)
    (root / ".hidden").mkdir()
    (root / "sub" / "BH-5018.yaml").write_text(blank_recorded_fingerprint((DEMO / "BH-5018.yaml").read_text()))
    assert cli("release", root / "sub" / "BH-5018.yaml", "--by", "x", "--note", "y").exit_code == 0
    assert cli("new", "BH-6001", "--kind", "transformer", "--out", root / "BH-6001.yaml").exit_code == 0
    (root / "notes.yaml").write_text("wires: []\n")                  # not a spec: skipped
    shutil.copyfile(DEMO / "BH-1042.yaml", root / ".hidden" / "BH-1042.yaml")   # hidden: skipped
    r = cli("verify", root)
    assert r.exit_code == 0, r.stdout + r.stderr
    lines = r.stdout.splitlines()
    assert any("BH-6001" in l and "draft (not checked)" in l for l in lines)
    assert any("BH-5018" in l and ": ok" in l for l in lines)
    assert not any("notes.yaml" in l or ".hidden" in l for l in lines)
    j = cli("verify", root, "--json")
    assert j.exit_code == 0
    outcomes = {Path(x["file"]).name: x["outcome"] for x in json.loads(j.stdout)}
    assert outcomes == {"BH-6001.yaml": "draft", "BH-5018.yaml": "ok"}


def test_verify_never_passes_an_unrecorded_fingerprint(tmp_path):
    """A spec marked released whose history entry has an empty fingerprint is a mismatch."""
    for src in sorted(DEMO.glob("BH-*.yaml")):
        text = src.read_text()
        text, n = re.subn(r'(fingerprint: )"?[0-9a-f]*"?\s*$', r'\1""', text.rstrip())
        assert n == 1, src.name                 # the last history entry ends with its fingerprint
        text += "\n"
        (tmp_path / src.name).write_text(text)
    r = cli("verify", tmp_path)
    assert r.exit_code == 1
    assert r.stdout.count("MISMATCH") == len(list(DEMO.glob("BH-*.yaml"))) >= 5


def test_verify_bad_input_exits_2(tmp_path):
    assert cli("verify", tmp_path / "missing.yaml").exit_code == 2
    empty = tmp_path / "empty"
    empty.mkdir()
    r = cli("verify", empty)
    assert r.exit_code == 2 and "holds no spec" in r.stderr
    broken = tmp_path / "BH-9.yaml"
    broken.write_text("part: BH-9\nkind: transformer\ncore: {id: NO-SUCH-CORE}\n")
    r = cli("verify", broken)
    assert r.exit_code == 2 and "ERROR" in r.stderr and "Traceback" not in r.stderr
    assert f"{broken}:" in r.stderr                        # located: file and line


def test_release_gate(demo_copy):
    cat = load_catalog(None)
    spec_path = demo_copy("BH-3305.yaml")

    def gate():
        spec = load_spec(spec_path)
        return release_gate(spec, api.run_design(spec, cat), cat)

    # released with its fingerprint blanked: a release without a recorded fingerprint is refused
    assert gate().broken and "records no fingerprint" in gate().reason
    assert cli("release", spec_path, "--by", "x", "--note", "y", *ACCEPT_ALL).exit_code == 0
    assert gate().firm and gate().problems == ()
    spec_path.write_text(spec_path.read_text().replace("ripple: 2.4 A", "ripple: 2.0 A"))
    assert gate().broken and "inductor changed" in gate().reason
    from specgen.revision import start_next_draft_file
    start_next_draft_file(spec_path)
    v = gate()                                          # a draft is not a fingerprint question
    assert v.problems == () and not v.firm and not v.broken and v.status == "draft"


def test_gate_refuses_a_deleted_fingerprint_everywhere(tmp_path):
    """The fingerprint line removed from the history entry: work order, quote and verify all refuse."""
    import re as _re

    spec = tmp_path / "BH-5018.yaml"
    spec.write_text(_re.sub(r"^\s+fingerprint:.*\n", "", (DEMO / "BH-5018.yaml").read_text(), count=1, flags=_re.M))
    r = cli("verify", spec)
    assert r.exit_code == 1 and "records no fingerprint" in r.stdout
    r = cli("quote", spec, "--qty", "100", "--out", tmp_path / "q")
    assert r.exit_code == 2 and "records no fingerprint" in r.stderr
    r = cli("workorder", spec, "--qty", "10", "--out", tmp_path / "wo", "--register", tmp_path / "reg.sqlite")
    assert r.exit_code == 2 and "records no fingerprint" in r.stderr
    assert not (tmp_path / "reg.sqlite").exists() or "WO-" not in r.stdout


@pytest.mark.parametrize("option, value, word", [
    ("--by", "x" * 2001, "--by"), ("--by", "R.\x07Okafor", "--by"), ("--by", "   ", "--by"),
    ("--note", "x" * 2001, "--note"), ("--note", "two\nlines", "--note"), ("--note", "", "--note"),
    ("--date", "2027-02-30", "--date"),
])
def test_release_inputs_checked_before_anything_is_written(demo_copy, option, value, word):
    spec_path = demo_copy("BH-4120.yaml")
    before = spec_path.read_bytes()
    args = {"--by": "R. Okafor", "--note": "thicker secondary", "--date": None}
    args[option] = value
    argv = ["release", spec_path] + [a for k, v in args.items() if v is not None for a in (k, v)]
    r = cli(*argv)
    assert r.exit_code == 2 and word in r.stderr and len(r.stderr.strip().splitlines()) == 1
    assert spec_path.read_bytes() == before


# ----------------------------------------------------------------------------------------------
# release --commit

git_only = pytest.mark.skipif(shutil.which("git") is None, reason="git not installed")




@git_only
def test_release_commit_and_tag(git_env):
    repo = git_env / "specs"
    repo.mkdir()
    _git(repo, "init", "-q", "-b", "main")
    spec = repo / "BH-4120.yaml"
    spec.write_text(blank_recorded_fingerprint((DEMO / "BH-4120.yaml").read_text()))
    _git(repo, "add", ".")
    _git(repo, "commit", "-q", "-m", "BH-4120 as shipped")
    r = cli("release", spec, "--by", "T. Vance", "--note", "new core supplier lot", "--commit", *ACCEPT_ALL)
    assert r.exit_code == 0, r.stderr
    assert "committed" in r.stdout and "BH-4120-rev-B" in r.stdout
    assert _git(repo, "cat-file", "-t", "BH-4120-rev-B") == "tag"
    assert _git(repo, "status", "--porcelain") == ""
    assert "new core supplier lot" in _git(repo, "log", "-1", "--format=%s")
    # the same tag again is refused before the file is touched
    before = spec.read_bytes()
    spec.write_text(_add_turns(spec.read_text(), "P", design(spec).winding("P").turns + 1))
    edited = spec.read_bytes()
    # re-releasing would give rev C, so force the clash by tagging C first
    _git(repo, "tag", "BH-4120-rev-C")
    r = cli("release", spec, "--by", "T. Vance", "--note", "again", "--commit", *ACCEPT_ALL)
    assert r.exit_code == 2 and "already exists" in r.stderr
    assert spec.read_bytes() == edited != before


@git_only
def test_release_commit_outside_git_changes_nothing(git_env):
    spec = git_env / "BH-4120.yaml"
    shutil.copyfile(DEMO / "BH-4120.yaml", spec)
    original = spec.read_bytes()
    r = cli("release", spec, "--by", "T. Vance", "--note", "n", "--commit")
    assert r.exit_code == 2 and "git work tree" in r.stderr
    assert spec.read_bytes() == original


def test_release_refuses_an_obsolete_spec(demo_copy):
    from specgen.revision import set_status_file

    spec = demo_copy("BH-5018.yaml")
    set_status_file(spec, "obsolete")
    original = spec.read_bytes()
    r = cli("release", spec, "--by", "x", "--note", "y")
    assert r.exit_code == 2 and "obsolete" in r.stderr
    assert spec.read_bytes() == original
    v = cli("verify", spec)
    assert v.exit_code == 0 and "obsolete (not checked)" in v.stdout
