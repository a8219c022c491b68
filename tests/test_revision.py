"""Tests for specgen.revision: letters, fingerprints, release edits, git reading and tagging.

Sources named beside each check:
- revision letters: ASME Y14.35 (from memory): I, O, Q, S, X, Z are not used; after Y comes AA.
- canonical JSON: RFC 8259 through Python's json module (an independent serialiser);
  SHA-256: FIPS 180-4 through hashlib, with the FIPS 180-2 "abc" test vector (from memory).
- YAML reading: the edited files are read back with two independent parsers, PyYAML (YAML 1.1)
  and ruamel.yaml (YAML 1.2).
- git: the repositories are made and inspected with the git command itself.
All spec texts are invented demo data (Brindle Hollow Coil Works).
"""

from __future__ import annotations

import datetime as dt
import difflib
import hashlib
import itertools
import json
import os
import shutil
import stat
import string
from decimal import Decimal

import pytest
import yaml
from conftest import git as _git

from specgen import revision as rv
from specgen.errors import SpecError

# ----------------------------------------------------------------------------------------------
# Revision letters -- ASME Y14.35, from memory: letters I, O, Q, S, X, Z are never used, and
# after Y the sequence continues AA, AB ... AY, BA ...

SKIPPED = "IOQSXZ"                                            # ASME Y14.35, from memory
ALLOWED = [c for c in string.ascii_uppercase if c not in SKIPPED]


def _reference_sequence(max_len: int):
    """All revisions in order, built by enumeration (a different method from the code's)."""
    for n in range(1, max_len + 1):
        for combo in itertools.product(ALLOWED, repeat=n):
            yield "".join(combo)


def test_alphabet_is_the_26_capitals_without_the_skipped_six():
    # ASME Y14.35, from memory
    assert rv.REVISION_ALPHABET == "".join(ALLOWED)
    assert len(rv.REVISION_ALPHABET) == 20


def test_letter_sequence_matches_enumeration_with_skips_and_rollover():
    # ASME Y14.35, from memory: A..Y without I O Q S X Z, then AA..AY, BA.., then AAA
    expected = list(_reference_sequence(3))[:1000]
    got, letter = [], None
    for _ in range(1000):
        letter = rv.next_revision(letter)
        got.append(letter)
    assert got == expected
    assert not any(c in SKIPPED for rev in got for c in rev)


@pytest.mark.parametrize("before, after", [
    (None, "A"), ("", "A"), ("A", "B"),
    ("H", "J"), ("N", "P"), ("P", "R"), ("R", "T"), ("W", "Y"),   # I, O, Q, S, X skipped
    ("Y", "AA"),                                                   # rollover (no Z)
    ("AH", "AJ"), ("AW", "AY"), ("AY", "BA"), ("BY", "CA"),        # same skips per position
    ("YY", "AAA"),
])
def test_next_revision_examples(before, after):
    # ASME Y14.35, from memory
    assert rv.next_revision(before) == after


def test_draft_carries_the_next_letter():
    assert rv.draft_revision(None) == "A"
    assert rv.draft_revision("A") == "B"
    assert rv.draft_revision("Y") == "AA"


@pytest.mark.parametrize("text", ["A", "B", "Y", "AA", "AY", "BA", "YYY"])
def test_valid_revisions(text):
    assert rv.is_valid_revision(text)


@pytest.mark.parametrize("text", ["I", "O", "Q", "S", "X", "Z", "AI", "ZA", "a", "", " A",
                                  "A ", "A1", "1", "-", None, 3, ["A"], "AAAAA"])
def test_invalid_revisions(text):
    assert not rv.is_valid_revision(text)


def test_revision_index_orders_like_the_sequence_and_inverts():
    seq = list(_reference_sequence(2))
    assert [rv.revision_index(r) for r in seq] == list(range(len(seq)))
    assert rv.revision_index(None) == -1 == rv.revision_index("")
    assert sorted(reversed(seq), key=rv.revision_index) == seq
    assert all(rv.revision_letter(rv.revision_index(r)) == r for r in seq)
    assert rv.revision_index("Y") < rv.revision_index("AA")      # length first, then letters


def test_the_sequence_ends_after_four_letters():
    assert rv.next_revision("YYYW") == "YYYY"
    with pytest.raises(SpecError, match="no revision letter after YYYY"):
        rv.next_revision("YYYY")


@pytest.mark.parametrize("bad", ["I", "b", "A-"])
def test_bad_letters_are_spec_errors(bad):
    with pytest.raises(SpecError):
        rv.next_revision(bad)
    with pytest.raises(SpecError):
        rv.revision_index(bad)


def test_release_revision_rules():
    hist = [{"revision": "A"}, {"revision": "B"}]
    assert rv.release_revision("draft", "C", hist) == "C"         # the draft's own letter
    assert rv.release_revision(None, None, None) == "A"           # a new part
    assert rv.release_revision("draft", None, hist) == "C"
    assert rv.release_revision("released", "B", hist) == "C"      # edited without a draft
    assert rv.release_revision("draft", "D", None) == "D"         # paper revisions before
    with pytest.raises(SpecError):
        rv.release_revision("draft", "D", hist)                   # skips C
    with pytest.raises(SpecError):
        rv.release_revision("draft", "B", hist)                   # already released
    with pytest.raises(SpecError):
        rv.release_revision("obsolete", "B", hist)
    with pytest.raises(SpecError):
        rv.release_revision("frozen", "B", hist)


# ----------------------------------------------------------------------------------------------
# Canonical form and fingerprints

CATALOG = {
    "ei-66-si": {"kind": "lamination", "material": "silicon steel M-grade", "ae": "5.6 cm^2",
                 "le": "12.7 cm", "window": [33.0, 11.0]},
    "awg-27": {"kind": "wire", "awg": 27, "diameter": "0.361 mm", "grade": 2},
    "awg-19": {"kind": "wire", "awg": 19, "diameter": "0.912 mm", "grade": 2},
}


def _spec():
    return {
        "part": "BH-1042", "kind": "transformer", "revision": "B", "status": "draft",
        "electrical": {"frequency": "50 Hz", "power": "60 VA"},
        "core": {"id": "ei-66-si", "stack": "28 mm"},
        "windings": [
            {"name": "primary", "voltage": "230 V", "turns": 620, "wire": "awg-27"},
            {"name": "sec-a", "voltage": "12 V", "turns": 38, "wire": "awg-19"},
        ],
        "history": [{"revision": "A", "date": dt.date(2024, 11, 4), "by": "M. Ferrant",
                     "note": "first", "fingerprint": "0" * 64}],
    }


def _reordered(obj):
    if isinstance(obj, dict):
        return {k: _reordered(obj[k]) for k in reversed(list(obj))}
    if isinstance(obj, list):
        return [_reordered(v) for v in obj]
    return obj


def test_sha256_is_the_published_algorithm():
    # FIPS 180-2 appendix B.1 test vector for "abc" (from memory), through hashlib
    assert hashlib.sha256(b"abc").hexdigest() == (
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad")


def test_canonical_is_compact_sorted_json():
    # RFC 8259 via the json module as the reference serialiser
    obj = {"b": [3, 1, 2], "a": {"z": "x", "y": None, "w": True}, "c": 1.5}
    ref = json.dumps(obj, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
    assert rv.canonical(obj) == ref.encode("utf-8")
    assert json.loads(rv.canonical(obj)) == obj


def test_canonical_normalises_whitespace_numbers_and_unicode():
    assert rv.canonical({"v": "230  V"}) == rv.canonical({"v": " 230 V "})
    assert rv.canonical({"v": "230\u00a0V"}) == rv.canonical({"v": "230 V"})
    assert rv.canonical({"n": "wind primary,\n  then\tsecondaries"}) == \
        rv.canonical({"n": "wind primary, then secondaries"})
    assert rv.canonical({"t": 120.0}) == rv.canonical({"t": 120})
    assert rv.canonical({"t": Decimal("14.50")}) == rv.canonical({"t": 14.5})
    # NFC (Unicode normalisation): e + combining acute == precomposed e-acute
    assert rv.canonical({"by": "Ren\u0065\u0301"}) == rv.canonical({"by": "Ren\u00e9"})
    # not equal: different values, different order of a list, 230V without a space
    assert rv.canonical({"t": 120.5}) != rv.canonical({"t": 120})
    assert rv.canonical({"l": [1, 2]}) != rv.canonical({"l": [2, 1]})
    assert rv.canonical({"v": "230V"}) != rv.canonical({"v": "230 V"})
    assert rv.canonical({"b": True}) != rv.canonical({"b": 1})


def test_fingerprint_ignores_key_order():
    fp = rv.fingerprint(_spec(), CATALOG)
    assert len(fp) == 64 and all(c in "0123456789abcdef" for c in fp)
    assert rv.fingerprint(_reordered(_spec()), _reordered(CATALOG)) == fp
    assert rv.short(fp) == fp[:12]


def test_fingerprint_excludes_history_status_and_revision():
    fp = rv.fingerprint(_spec(), CATALOG)
    released = dict(_spec(), status="released", revision="C")
    released["history"] = released["history"] + [{"revision": "B", "note": "x"}]
    assert rv.fingerprint(released, CATALOG) == fp
    bare = {k: v for k, v in _spec().items() if k not in ("history", "status", "revision")}
    assert rv.fingerprint(bare, CATALOG) == fp


def test_fingerprint_changes_with_turns_catalog_entry_and_winding_order():
    fp = rv.fingerprint(_spec(), CATALOG)
    spec = _spec()
    spec["windings"][1]["turns"] = 39
    assert rv.fingerprint(spec, CATALOG) != fp
    cat = json.loads(json.dumps(CATALOG))
    cat["awg-19"]["diameter"] = "0.915 mm"
    assert rv.fingerprint(_spec(), cat) != fp
    assert rv.fingerprint(_spec(), {k: v for k, v in CATALOG.items() if k != "awg-19"}) != fp
    spec = _spec()
    spec["windings"].reverse()
    assert rv.fingerprint(spec, CATALOG) != fp


def test_fingerprint_same_from_pyyaml_ruamel_and_project_loader():
    from ruamel.yaml import YAML

    from specgen.loading import parse_yaml

    text = DEMO_INDENTED
    ry = YAML(typ="rt")
    ry.preserve_quotes = True
    fps = {rv.fingerprint(yaml.safe_load(text), CATALOG),
           rv.fingerprint(parse_yaml(text, "BH-1042.yaml"), CATALOG),
           rv.fingerprint(ry.load(text), CATALOG)}
    assert len(fps) == 1
    # the YAML types a spec might carry, as PyYAML and ruamel.yaml build them
    odd = ("d: 2024-11-04\nt: 2024-11-04 10:30:00\nb: &x true\nc: *x\nf: 1.50\ni: 0x1F\n"
           "s: !!str 12\nset: !!set {a, b}\n")
    assert rv.canonical(ry.load(odd)) == rv.canonical(yaml.safe_load(odd))


def test_check_release_names_what_changed():
    spec = dict(_spec(), status="released")
    fp = rv.fingerprint(spec, CATALOG)
    parts = rv.component_fingerprints(spec, CATALOG)
    spec["history"] = spec["history"] + [{"revision": "B", "fingerprint": fp, "parts": parts}]
    assert rv.check_release(spec, CATALOG).ok

    tampered = json.loads(json.dumps(spec, default=str))
    tampered["windings"][0]["turns"] = 630
    res = rv.check_release(tampered, CATALOG)
    assert not res.ok and "windings changed" in res.problems[0]

    cat = json.loads(json.dumps(CATALOG))
    cat["awg-27"]["diameter"] = "0.350 mm"
    res = rv.check_release(spec, cat)
    assert not res.ok and "catalogue entry awg-27 changed" in res.problems[0]
    assert "windings" not in res.problems[0]

    no_entry = dict(spec, revision="C")
    assert "no history entry" in rv.check_release(no_entry, CATALOG).problems[0]
    assert rv.check_release(dict(spec, status="draft"), cat).ok     # drafts are not checked


# ----------------------------------------------------------------------------------------------
# Release edits. Two invented specs in the two common list styles:
# DEMO_INDENTED: "  - item" (mapping 2, sequence 4, offset 2); DEMO_INDENTLESS: "- item" at the
# key's column, nested mappings at 4, `---`/`...` markers, no history yet.

DEMO_INDENTED = """\
# BH-1042 -- control transformer for Quillfeather Irrigation valve boxes.
# Brindle Hollow Coil Works, engineering. Release with `specgen release`.

part: BH-1042
title: "Control transformer 230 V / 2 x 12 V, 60 VA"
customer: 'Quillfeather Irrigation'
kind: transformer
revision: B          # the letter this draft will be released as
status: draft        # draft | released | obsolete

electrical:
  frequency: 50 Hz
  power: "60  VA"      # two spaces on purpose
  ambient:   40 degC

core:
  id: ei-66-si          # catalogue id
  stack: 28 mm
  insulation_class: 130   # IEC 60085 class B

windings:
  # primary first, next to the core
  - name: primary
    voltage: 230 V
    turns: 620
    wire: awg-27
    terminals: [1, 2]

  - name: sec-a
    voltage: 12 V
    turns: 38
    wire: awg-19
    terminals: [3,4]      # flow list without spaces, kept as written
  - name: sec-b
    voltage: 12 V
    turns: 38
    wire: awg-19
    terminals: [ 5, 6 ]

tests:
  hipot: {between: [primary, "sec-a+sec-b"], voltage: 3000 V, time: 60 s}
  dcr_max: {primary: "14.5 ohm", sec-a: '0.42 ohm'}

notes: >
  Interleave tape between primary and secondaries;
  varnish dip after final test.

history:
  - revision: A
    date: 2024-11-04
    by: M. Ferrant
    note: First release for the pilot lot.
    fingerprint: "0f1e2d3c4b5a69788796a5b4c3d2e1f00f1e2d3c4b5a69788796a5b4c3d2e1f0"
# end of BH-1042
"""

DEMO_INDENTLESS = """\
---
# BH-5018: 250 uH DC choke, 3 A, powder toroid (Quillfeather Irrigation)
part: BH-5018
kind: inductor
customer: "Quillfeather Irrigation"
revision: A
status: draft   # new part, never released

core:
    id: pt-27-14        # powder toroid, catalogue id
    count: 1

windings:
- name: main
  turns: 61
  wire: awg-20
  layers: [1]
- name: sense
  turns: 2
  wire: awg-30

inductance: {at_zero_bias: "260 uH", at_3a: ">= 250 uH"}
...
"""

FP_B = "3a" * 32
FP_C = "c4" * 32


def _release(text, **kw):
    args = dict(by="A. Pell", note="Secondary turns 38 -> 39 after first article",
                fingerprint=FP_B, date=dt.date(2025, 3, 14), new_revision="B")
    args.update(kw)
    return rv.release_text(text, **args)


def _ruamel_load(text):
    from ruamel.yaml import YAML

    return YAML(typ="safe", pure=True).load(text)


def test_release_changes_only_the_status_line_and_appends_history():
    new = _release(DEMO_INDENTED)
    old_lines = DEMO_INDENTED.splitlines(keepends=True)
    i_status = old_lines.index("status: draft        # draft | released | obsolete\n")
    i_end = old_lines.index("# end of BH-1042\n")
    entry = [
        "  - revision: B\n",
        "    date: 2025-03-14\n",
        "    by: A. Pell\n",
        "    note: Secondary turns 38 -> 39 after first article\n",
        f'    fingerprint: "{FP_B}"\n',
    ]
    expected = (old_lines[:i_status] + ["status: released        # draft | released | obsolete\n"]
                + old_lines[i_status + 1:i_end] + entry + old_lines[i_end:])
    assert new.splitlines(keepends=True) == expected


def test_released_text_reads_back_with_two_parsers():
    new = _release(DEMO_INDENTED)
    for data in (yaml.safe_load(new), _ruamel_load(new)):
        assert data["revision"] == "B" and data["status"] == "released"
        assert [h["revision"] for h in data["history"]] == ["A", "B"]
        last = data["history"][-1]
        assert last == {"revision": "B", "date": dt.date(2025, 3, 14), "by": "A. Pell",
                        "note": "Secondary turns 38 -> 39 after first article",
                        "fingerprint": FP_B}
        old = yaml.safe_load(DEMO_INDENTED)
        assert list(data) == list(old)                        # key order kept
        assert {k: v for k, v in data.items() if k not in ("status", "history")} == \
            {k: v for k, v in old.items() if k not in ("status", "history")}


def test_release_of_a_released_spec_sets_the_new_letter_keeping_the_comment():
    once = _release(DEMO_INDENTED)
    twice = _release(once, new_revision="C", fingerprint=FP_C, note="Wire awg-19 -> awg-18")
    assert "revision: C          # the letter this draft will be released as\n" in twice
    assert [h["revision"] for h in yaml.safe_load(twice)["history"]] == ["A", "B", "C"]
    # the second release changes one line of the first's text and inserts five
    ops = [op for op in difflib.SequenceMatcher(a=once.splitlines(), b=twice.splitlines(),
                                                autojunk=False).get_opcodes() if op[0] != "equal"]
    assert [(op[0], op[2] - op[1], op[4] - op[3]) for op in ops] == [("replace", 1, 1),
                                                                    ("insert", 0, 5)]
    assert once.splitlines()[ops[0][1]].startswith("revision: B ")


@pytest.mark.parametrize("text", [DEMO_INDENTED, DEMO_INDENTLESS])
def test_unchanged_status_round_trips_byte_for_byte(text):
    status = yaml.safe_load(text)["status"]
    assert rv.set_status_text(text, status) == text


def test_indentless_file_gets_history_in_its_own_style():
    parts = {"spec/windings": "0123456789ab", "catalog/awg-20": "ba9876543210"}
    new = _release(DEMO_INDENTLESS, new_revision="A", parts=parts)
    head, _, tail = new.partition("inductance: {at_zero_bias: \"260 uH\", at_3a: \">= 250 uH\"}\n")
    old_head = DEMO_INDENTLESS.partition("inductance:")[0]
    assert head == old_head.replace("status: draft   #", "status: released   #")
    assert tail == (
        "\n"
        "history:\n"
        "- revision: A\n"
        "  date: 2025-03-14\n"
        "  by: A. Pell\n"
        "  note: Secondary turns 38 -> 39 after first article\n"
        f'  fingerprint: "{FP_B}"\n'
        "  parts:\n"
        '      spec/windings: "0123456789ab"\n'
        '      catalog/awg-20: "ba9876543210"\n'
        "...\n")
    for data in (yaml.safe_load(new), _ruamel_load(new)):
        assert data["history"][0]["parts"] == parts


def test_missing_keys_and_empty_history_are_added():
    text = "part: BH-3305   # output choke\nkind: inductor\nhistory: []   # none yet\n"
    new = _release(text, new_revision="A")
    assert new.startswith("part: BH-3305   # output choke\nrevision: A\nstatus: released\n"
                          "kind: inductor\nhistory:   # none yet\n  - revision: A\n")
    data = yaml.safe_load(new)
    assert data["revision"] == "A" and len(data["history"]) == 1

    text = "part: BH-3305\nkind: inductor\nstatus: draft\n"
    new = _release(text, new_revision="A")
    assert new.startswith("part: BH-3305\nkind: inductor\nrevision: A\nstatus: released\n\n"
                          "history:\n  - revision: A\n")


def test_quotes_crlf_and_awkward_text_are_kept_or_escaped():
    text = ("part: BH-2210\r\nrevision: 'W'\r\nstatus: \"released\"\r\nturns: [12,12]\r\n"
            "history:\r\n- revision: W\r\n  fingerprint: x\r\n")
    new = rv.release_text(text, by="Zoë Quill", note='turns 12 -> 13: see "ECN 7" # urgent',
                          fingerprint=FP_B, date="2025-06-01", new_revision="Y")
    assert "\r\nrevision: 'Y'\r\n" in new                                # author's quote style
    assert "status: \"released\"\r\n" in new
    assert "\n" not in new.replace("\r\n", "")                           # CRLF throughout
    assert new.startswith(text[:text.index("history:")].replace("'W'", "'Y'"))
    for data in (yaml.safe_load(new), _ruamel_load(new)):
        last = data["history"][-1]
        assert last["revision"] == "Y" and last["by"] == "Zoë Quill"
        assert last["note"] == 'turns 12 -> 13: see "ECN 7" # urgent'
        assert data["turns"] == [12, 12]


def test_revision_y_is_quoted_when_written_plain():
    # a plain Y or N is a boolean to a YAML 1.1 reader (YAML 1.1 bool type, from memory)
    text = "part: BH-4120\nrevision: W\nstatus: released\n"
    new = _release(text, new_revision="Y")
    assert 'revision: "Y"\n' in new and '  - revision: "Y"\n' in new
    assert yaml.safe_load(new)["revision"] == "Y" == _ruamel_load(new)["revision"]


def test_release_refusals():
    with pytest.raises(SpecError, match="history already has revision A"):
        _release(DEMO_INDENTED, new_revision="A")
    with pytest.raises(SpecError, match="obsolete"):
        _release(DEMO_INDENTED.replace("status: draft", "status: obsolete"))
    once = _release(DEMO_INDENTED)
    with pytest.raises(SpecError, match="nothing changed"):
        _release(once, new_revision="C")                          # same fingerprint as B
    with pytest.raises(SpecError, match="--by"):
        _release(DEMO_INDENTED, by="  ")
    with pytest.raises(SpecError):
        _release(DEMO_INDENTED, new_revision="I")
    with pytest.raises(SpecError, match="one-line value"):
        _release("part: x\nrevision:\n  - A\nstatus: draft\n")
    with pytest.raises(SpecError, match="duplicate key"):
        _release("part: x\nstatus: draft\nstatus: draft\n")
    with pytest.raises(SpecError, match="history"):
        _release("part: x\nhistory: {a: 1}\n")


def test_start_next_draft_and_status():
    released = _release(DEMO_INDENTED)
    draft, letter = rv.start_next_draft_text(released)
    assert letter == "C"
    assert "revision: C          # the letter" in draft and "status: draft        #" in draft
    with pytest.raises(SpecError, match="already a draft"):
        rv.start_next_draft_text(draft)
    obsolete = rv.set_status_text(released, "obsolete")
    assert yaml.safe_load(obsolete)["status"] == "obsolete"
    assert obsolete.replace("status: obsolete", "status: released") == released
    with pytest.raises(SpecError):
        rv.set_status_text(released, "frozen")


def test_release_file_is_atomic_keeps_mode_and_bom(tmp_path):
    path = tmp_path / "BH-1042.yaml"
    path.write_bytes(b"\xef\xbb\xbf" + DEMO_INDENTED.encode("utf-8"))
    os.chmod(path, 0o640)
    rv.release_file(path, by="A. Pell", note="pilot lot passed", fingerprint=FP_B,
                    date=dt.date(2025, 3, 14), new_revision="B")
    raw = path.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf# BH-1042")
    assert stat.S_IMODE(os.stat(path).st_mode) == 0o640
    assert os.listdir(tmp_path) == ["BH-1042.yaml"]               # no temp file left
    assert yaml.safe_load(raw.decode("utf-8-sig"))["status"] == "released"
    assert rv.start_next_draft_file(path) == "C"
    rv.set_status_file(path, "draft")                              # already draft: untouched
    with pytest.raises(SpecError, match="no such spec"):
        rv.release_file(tmp_path / "missing.yaml", by="x", note="y", fingerprint=FP_B,
                        date="2025-01-01", new_revision="A")


# ----------------------------------------------------------------------------------------------
# Git: temporary repositories made with the git command

pytestmark_git = pytest.mark.skipif(shutil.which("git") is None, reason="git not installed")




@pytest.fixture
def repo(git_env):
    root = git_env / "specs"
    (root / "parts").mkdir(parents=True)
    _git(root, "init", "-q", "-b", "main")
    spec = root / "parts" / "BH-1042.yaml"
    spec.write_text(DEMO_INDENTED)
    _git(root, "add", ".")
    _git(root, "commit", "-q", "-m", "BH-1042 draft B")
    spec.write_text(DEMO_INDENTED.replace("turns: 620", "turns: 612"))
    (root / "parts" / "BH-5018.yaml").write_text(DEMO_INDENTLESS)
    _git(root, "add", ".")
    _git(root, "commit", "-q", "-m", "BH-1042 primary 612 turns; add BH-5018")
    return root


@pytestmark_git
def test_read_rev_returns_each_revisions_text(repo, monkeypatch):
    spec = repo / "parts" / "BH-1042.yaml"
    name, text = rv.read_rev(f"{spec}@HEAD~1")
    assert name == f"{spec}@HEAD~1" and text == DEMO_INDENTED
    _, text = rv.read_rev(f"{spec}@HEAD")
    assert "turns: 612" in text and "turns: 620" not in text
    first = _git(repo, "rev-list", "--max-parents=0", "HEAD")
    assert rv.read_rev(f"{spec}@{first[:9]}")[1] == DEMO_INDENTED
    # relative path from another folder of the work tree, and a file deleted since
    monkeypatch.chdir(repo / "parts")
    assert rv.read_rev("BH-1042.yaml@main~1")[1] == DEMO_INDENTED
    os.remove(spec)
    assert rv.read_rev("BH-1042.yaml@HEAD")[1].count("turns: 612") == 1
    # a plain path reads the work tree
    assert rv.read_rev("BH-5018.yaml") == ("BH-5018.yaml", DEMO_INDENTLESS)


@pytestmark_git
def test_read_rev_errors_are_one_line_spec_errors(repo, git_env):
    spec = repo / "parts" / "BH-1042.yaml"
    outside = git_env / "loose"
    outside.mkdir()
    (outside / "BH-9.yaml").write_text("part: BH-9\n")
    cases = [
        (f"{outside / 'BH-9.yaml'}@HEAD", "not inside a git work tree"),
        (f"{spec}@no-such-branch", "unknown git revision 'no-such-branch'"),
        (f"{repo / 'parts' / 'BH-5018.yaml'}@HEAD~1", "is not in git revision HEAD~1"),
        (f"{repo / 'parts'}@HEAD", "is a folder"),
        (f"{spec}@", "revision after '@' is missing"),
        (f"{spec}@--output=x", "not a git revision"),
        (f"{git_env / 'nowhere' / 'x.yaml'}@HEAD", "no such folder"),
        (str(git_env / "nothing.yaml"), "no such spec"),
    ]
    for ref, message in cases:
        with pytest.raises(SpecError) as info:
            rv.read_rev(ref)
        assert message in str(info.value), (ref, str(info.value))
        assert "\n" not in str(info.value)


@pytestmark_git
def test_read_rev_holds_a_spec_from_history_to_the_spec_size_limit(repo):
    """A spec read from git history has the limit of a spec in the work tree (1 MiB), not a catalogue
    file's 16 MiB: a 2 MB file committed as a spec is refused with the stated limit."""
    from specgen.loading import SPEC_MAX_BYTES

    big = repo / "parts" / "BH-BIG.yaml"
    big.write_text("part: BH-BIG\nnotes: |\n" + ("  " + "x" * 78 + "\n") * 25_000)   # about 2 MB
    assert SPEC_MAX_BYTES < big.stat().st_size < 16 * 1024 * 1024
    _git(repo, "add", ".")
    _git(repo, "commit", "-q", "-m", "an oversized spec")
    for ref in (f"{big}@HEAD", str(big)):         # from history and from the work tree: the same refusal
        with pytest.raises(SpecError) as info:
            rv.read_rev(ref)
        assert f"a spec is at most {SPEC_MAX_BYTES:,} bytes" in str(info.value), str(info.value)


@pytestmark_git
def test_a_file_named_with_at_is_read_as_a_file(repo):
    odd = repo / "parts" / "BH-1042@HEAD"
    odd.write_text("part: odd\n")
    assert rv.read_rev(str(odd)) == (str(odd), "part: odd\n")
    assert rv.split_ref("x.yaml@HEAD@{1}") == ("x.yaml", "HEAD@{1}")


@pytestmark_git
def test_commit_and_tag_commits_only_the_spec(repo):
    spec = repo / "parts" / "BH-1042.yaml"
    other = repo / "parts" / "BH-5018.yaml"
    other.write_text(DEMO_INDENTLESS.replace("turns: 61", "turns: 60"))   # unrelated edit
    rv.release_file(spec, by="A. Pell", note="pilot lot passed", fingerprint=FP_B,
                    date=dt.date(2025, 3, 14), new_revision="B")
    tag = rv.release_tag("BH-1042", "B")
    assert tag == "BH-1042-rev-B"
    commit = rv.git_commit_and_tag(spec, "BH-1042 rev B: pilot lot passed", tag)
    assert commit == _git(repo, "rev-parse", "HEAD")
    assert _git(repo, "cat-file", "-t", tag) == "tag"                    # annotated
    assert _git(repo, "rev-parse", f"{tag}^{{commit}}") == commit
    assert _git(repo, "show", "--name-only", "--format=", "HEAD") == "parts/BH-1042.yaml"
    assert _git(repo, "status", "--porcelain") == "M parts/BH-5018.yaml"
    assert rv.read_rev(f"{spec}@{tag}")[1] == spec.read_text()

    with pytest.raises(SpecError, match="already exists"):
        rv.git_commit_and_tag(spec, "again", tag)
    assert _git(repo, "rev-parse", "HEAD") == commit                     # nothing committed
    with pytest.raises(SpecError, match="not a valid git tag"):
        rv.git_commit_and_tag(spec, "msg", "bad tag..name")


@pytestmark_git
def test_commit_refused_outside_a_repository(git_env):
    spec = git_env / "BH-1042.yaml"
    spec.write_text(DEMO_INDENTED)
    with pytest.raises(SpecError, match="not inside a git work tree"):
        rv.git_commit_and_tag(spec, "msg", "BH-1042-rev-B")
