"""What a release records beside its fingerprint: design warnings accepted by name, and the revision it
supersedes with that revision's open work orders and the effectivity the engineer gave.

Sources named beside each check:
- what the released file says is read back with ruamel.yaml (YAML 1.2), a parser independent of the
  PyYAML reader the program uses;
- the register's open orders are made through the register's own API and counted by hand here;
- "a warning is shown as accepted only when someone accepted it" is the rule of traceable sign-off in
  common practice (a concession names who granted it, when and why).
Spec texts are the shipped demo parts (invented data: Brindle Hollow Coil Works).
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from conftest import blank_recorded_fingerprint
from typer.testing import CliRunner

from specgen import api
from specgen.catalog.loader import load_catalog
from specgen.cli import app
from specgen.design.spec import load_spec
from specgen.diff import compare_refs, summary_text
from specgen.documents.settings import DocumentSettings
from specgen.documents.workorder import render_work_order_html
from specgen.lifecycle import release_gate, warning_notes
from specgen.register import Register

DEMO = Path(api.__file__).resolve().parent / "demo"
runner = CliRunner()
REASON = "two strands fill the bobbin; the AC loss stays inside the loss budget"


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


def ruamel_load(path: Path):
    from ruamel.yaml import YAML

    return YAML(typ="safe", pure=True).load(path.read_text(encoding="utf-8"))


@pytest.fixture
def inductor(tmp_path):
    """BH-3305 (design warning skin-depth) as a draft of revision B after rev A, margin edited."""
    text = blank_recorded_fingerprint((DEMO / "BH-3305.yaml").read_text(encoding="utf-8"))
    text = re.sub(r"(?m)^(\s+)accepted:\n(?:\1  .*\n)+", "", text)          # rev A accepted nothing
    text = text.replace("revision: A", "revision: B", 1).replace("status: released", "status: draft", 1)
    text = text.replace("    margin: 1 mm", "    margin: 1.2 mm")
    path = tmp_path / "BH-3305.yaml"
    path.write_text(text, encoding="utf-8")
    return path


def _html(path: Path) -> str:
    cat = load_catalog(None)
    return render_work_order_html(api.run_design(load_spec(path), cat), DocumentSettings.from_shop(cat.shop),
                                  number="WO-T-1", qty=5)


# ----------------------------------------------------------------------------------------------
# accepting warnings


def test_release_refuses_until_each_warning_is_accepted_by_name(inductor):
    before = inductor.read_bytes()
    r = cli("release", inductor, "--by", "T. Vance", "--note", "wider margin", "--date", "2026-12-02")
    assert r.exit_code == 2
    lines = r.stderr.splitlines()
    assert lines[0].startswith("  WARN skin-depth: ")                  # the design's warnings are listed
    assert lines[-1].startswith(f"{inductor}: --accept: 1 design warning(s) not accepted: skin-depth")
    assert inductor.read_bytes() == before
    for bad, word in [(["--accept", "skin-depth"], "needs a reason"),
                      (["--accept", "fit", "--reason", "r"], "no warning fit"),
                      (["--accept-all"], "--accept-all needs a reason"),
                      (["--reason", "r"], "--reason goes with"),
                      (["--accept", "skin-depth", "--reason", "line\nbreak"], "control character")]:
        r = cli("release", inductor, "--by", "T. Vance", "--note", "n", *bad)
        assert r.exit_code == 2 and word in r.stderr and len(r.stderr.strip().splitlines()) == 1, (bad, r.stderr)
        assert inductor.read_bytes() == before


def test_accepted_warning_recorded_and_shown_on_the_work_order(inductor):
    assert "not accepted at release" in _html(inductor)      # a draft: nobody accepted anything
    r = cli("release", inductor, "--by", "T. Vance", "--note", "wider margin", "--date", "2026-12-02",
            "--accept", "skin-depth", "--reason", REASON)
    assert r.exit_code == 0, r.stderr
    assert f"warning skin-depth accepted by T. Vance on 2026-12-02: {REASON}" in r.stdout
    entry = ruamel_load(inductor)["history"][-1]
    assert entry["accepted"] == [{"code": "skin-depth", "by": "T. Vance", "date": "2026-12-02", "reason": REASON}]
    html = _html(inductor)
    assert f"accepted by T. Vance on 2026-12-02: {REASON.replace(';', ';')}" in html
    assert "not accepted at release" not in html and "engineering has accepted" not in html
    cat = load_catalog(None)
    spec = load_spec(inductor)
    verdict = release_gate(spec, api.run_design(spec, cat), cat)
    assert verdict.firm and verdict.unaccepted == () and [w.code for w in verdict.warnings] == ["skin-depth"]


def test_work_order_never_claims_an_acceptance_nobody_gave(tmp_path):
    """A revision released before acceptance was recorded: its warning is shown as not accepted."""
    text = (DEMO / "BH-3305.yaml").read_text(encoding="utf-8")
    text = re.sub(r"(?m)^(\s+)accepted:\n(?:\1  .*\n)+", "", text)
    path = tmp_path / "BH-3305.yaml"
    path.write_text(text, encoding="utf-8")
    html = _html(path)
    assert "not accepted at release" in html
    assert "accepted by" not in html and "engineering has accepted" not in html
    cat = load_catalog(None)
    notes = warning_notes(api.run_design(load_spec(path), cat))
    assert [(n.code, n.accepted) for n in notes] == [("skin-depth", None)]


def test_accept_all_records_each_warning_with_the_reason(inductor):
    r = cli("release", inductor, "--by", "R. Okafor", "--note", "n", "--date", "2026-12-03",
            "--accept-all", "--reason", REASON, "--json")
    assert r.exit_code == 0, r.stderr
    entry = ruamel_load(inductor)["history"][-1]
    assert [a["code"] for a in entry["accepted"]] == ["skin-depth"]
    assert entry["accepted"][0]["by"] == "R. Okafor" and entry["accepted"][0]["reason"] == REASON


# ----------------------------------------------------------------------------------------------
# supersession


def _issue(register: Path, revision: str, state: str | None = None) -> str:
    with Register.open(register) as reg:
        number = reg.allocate("BH-3305", revision, "f" * 64, 10)
        if state == "in-work":
            reg.set_state(number, "in-work")
        elif state == "void":
            reg.void(number, "customer cancelled")
        elif state == "complete":
            reg.set_state(number, "in-work")
            reg.set_state(number, "complete")
    return number


def test_release_lists_open_work_orders_and_needs_an_effectivity(inductor, own_register, tmp_path):
    open_a = [_issue(own_register, "A"), _issue(own_register, "A", "in-work")]
    _issue(own_register, "A", "void")
    _issue(own_register, "A", "complete")
    _issue(own_register, "C")                      # another revision: not superseded by B
    old = tmp_path / "rev-A.yaml"
    old.write_text((DEMO / "BH-3305.yaml").read_text(encoding="utf-8"), encoding="utf-8")
    before = inductor.read_bytes()
    args = ["release", inductor, "--by", "T. Vance", "--note", "wider margin", "--date", "2026-12-02",
            "--accept", f"skin-depth={REASON}"]
    r = cli(*args)
    assert r.exit_code == 2 and "--effective" in r.stderr and len(r.stderr.strip().splitlines()) == 1
    assert f"revision A has 2 open work order(s) ({', '.join(open_a)})" in r.stderr
    assert inductor.read_bytes() == before
    r = cli(*args, "--effective", "lot L-77")
    assert r.exit_code == 0, r.stderr
    assert f"supersedes rev A, effective from lot L-77; open work orders of rev A: {', '.join(open_a)}" in r.stdout
    entry = ruamel_load(inductor)["history"][-1]
    assert entry["supersedes"] == "A" and entry["effective"] == "lot L-77" and entry["open_orders"] == open_a
    text = summary_text(compare_refs(str(old), str(inductor), load_catalog(None), costs=None))
    assert "effective: From lot L-77" in text and ", ".join(open_a) in text


@pytest.mark.parametrize("value, word", [("later", "expected next-order"), ("lot", "lot reference"),
                                         ("lot \x07x", "control character"), ("lot " + "x" * 41, "at most 40")])
def test_bad_effectivity_is_refused_before_anything_is_read(inductor, value, word):
    before = inductor.read_bytes()
    r = cli("release", inductor, "--by", "T. Vance", "--note", "n", "--effective", value)
    assert r.exit_code == 2 and word in r.stderr and "--effective" in r.stderr
    assert inductor.read_bytes() == before


def test_effectivity_of_a_first_release_is_refused(tmp_path):
    text = (DEMO / "BH-1042.yaml").read_text(encoding="utf-8")
    text = re.sub(r"(?ms)^history:.*", "history: []\n", text).replace("status: released", "status: draft", 1)
    path = tmp_path / "BH-1042.yaml"
    path.write_text(text, encoding="utf-8")
    r = cli("release", path, "--by", "T. Vance", "--note", "first", "--effective", "now")
    assert r.exit_code == 2 and "supersedes no earlier release" in r.stderr
    r = cli("release", path, "--by", "T. Vance", "--note", "first")
    assert r.exit_code == 0 and "supersedes" not in r.stdout
    assert "supersedes" not in ruamel_load(path)["history"][-1]


# ----------------------------------------------------------------------------------------------
# dates in order, and messages that name the file


def test_release_dated_before_the_previous_one_is_refused(inductor):
    before = inductor.read_bytes()
    r = cli("release", inductor, "--by", "T. Vance", "--note", "n", "--date", "2026-08-02",
            "--accept", f"skin-depth={REASON}")
    assert r.exit_code == 2 and len(r.stderr.strip().splitlines()) == 1
    assert r.stderr.startswith(f"{inductor}: history: release date 2026-08-02 of revision B is before revision A")
    assert inductor.read_bytes() == before
    r = cli("release", inductor, "--by", "T. Vance", "--note", "n", "--date", "2026-08-03",
            "--accept", f"skin-depth={REASON}")
    assert r.exit_code == 0, r.stderr              # the same day is in order


def test_release_of_an_obsolete_spec_names_the_file(tmp_path):
    path = tmp_path / "BH-1042.yaml"
    path.write_text((DEMO / "BH-1042.yaml").read_text(encoding="utf-8").replace("status: released", "status: obsolete"))
    r = cli("release", path, "--by", "T. Vance", "--note", "n")
    assert r.exit_code == 2
    assert r.stderr.strip() == f"{path}: status: the spec is obsolete; an obsolete part is not released again"


def test_a_value_that_cannot_be_fingerprinted_names_file_line_and_key(tmp_path):
    path = tmp_path / "BH-1042.yaml"
    text = (DEMO / "BH-1042.yaml").read_text(encoding="utf-8")
    text = re.sub(r"(?m)^customer: .*$", "customer: !!binary aGVsbG8=", text)
    path.write_text(text, encoding="utf-8")
    line = next(i for i, ln in enumerate(text.splitlines(), 1) if ln.startswith("customer:"))
    r = cli("design", path)
    assert r.exit_code == 2
    assert r.stderr.strip() == (f"{path}:{line}: customer: cannot fingerprint binary data (a !!binary value); "
                                "write it as text")
