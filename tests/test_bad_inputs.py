"""The bad-input corpus (tests/bad_inputs/): each case exits 2 with one located line, no traceback,
and leaves every file in its folder untouched.

Each spec case carries its expected message in a header comment (`# expect: ...`); catalogue cases are
folders whose files replace (or join) those of a copy of the shipped catalogue.
"""

import hashlib
import shutil
from pathlib import Path

import pytest

from specgen.catalog.loader import shipped_catalog_dir
from specgen.cli import main

CORPUS = Path(__file__).parent / "bad_inputs"
SPEC_CASES = sorted(CORPUS.glob("spec-*.yaml"))
REQ_CASES = sorted(CORPUS.glob("req-*.yaml"))
CATALOG_CASES = sorted(p for p in CORPUS.iterdir() if p.is_dir() and p.name.startswith("catalog-"))
DEMO = Path(__file__).parent.parent / "specgen" / "demo"


def expected(path: Path) -> str:
    for line in path.read_bytes().decode("latin-1").splitlines()[:3]:
        if line.startswith("# expect:"):
            return line.split(":", 1)[1].strip()
    return {"spec-empty-file.yaml": "is empty"}[path.name]


def snapshot(folder: Path) -> dict:
    return {p: hashlib.sha256(p.read_bytes()).hexdigest() for p in folder.rglob("*") if p.is_file()}


def run(argv, capsys) -> tuple[int, list]:
    with pytest.raises(SystemExit) as ex:
        main(argv)
    err = capsys.readouterr().err
    return ex.value.code, [l for l in err.splitlines() if l.strip()]


def test_corpus_is_large_enough():
    assert len(SPEC_CASES) + len(CATALOG_CASES) + len(REQ_CASES) >= 40


@pytest.mark.parametrize("case", REQ_CASES, ids=lambda p: p.stem)
def test_bad_requirement_is_one_located_line(case, tmp_path, capsys):
    req = tmp_path / case.name
    shutil.copyfile(case, req)
    before = snapshot(tmp_path)
    code, lines = run(["search", str(req)], capsys)
    assert code == 2 and len(lines) == 1, lines
    assert lines[0].startswith(f"{req}:") and expected(case) in lines[0], lines[0]
    assert snapshot(tmp_path) == before


@pytest.mark.parametrize("case", SPEC_CASES, ids=lambda p: p.stem)
def test_bad_spec_is_one_located_line(case, tmp_path, capsys):
    spec = tmp_path / case.name
    shutil.copyfile(case, spec)
    before = snapshot(tmp_path)
    code, lines = run(["design", str(spec)], capsys)
    assert code == 2, lines
    assert len(lines) == 1, lines
    assert lines[0].startswith(f"{spec}"), lines[0]
    assert expected(case) in lines[0], lines[0]
    assert "Traceback" not in lines[0]
    assert snapshot(tmp_path) == before


def test_a_line_number_is_given_where_the_file_has_one(tmp_path, capsys):
    """Most cases point at a line: the message reads 'file:LINE: key.path: ...'."""
    located = 0
    for case in SPEC_CASES:
        spec = tmp_path / case.name
        shutil.copyfile(case, spec)
        _, lines = run(["design", str(spec)], capsys)
        rest = lines[0][len(f"{spec}"):]
        if rest.startswith(":") and rest[1:].split(":", 1)[0].isdigit():
            located += 1
    assert located >= len(SPEC_CASES) - 3      # the empty file, a top-level list and a NUL-byte file


@pytest.mark.parametrize("case", CATALOG_CASES, ids=lambda p: p.name)
def test_bad_catalogue(case, tmp_path, capsys):
    cat = tmp_path / "catalog"
    shutil.copytree(shipped_catalog_dir(), cat)
    for f in case.iterdir():
        shutil.copyfile(f, cat / f.name)
    before = snapshot(tmp_path)
    want = next(l for l in next(case.iterdir()).read_text().splitlines() if l.startswith("# expect:"))
    want = want.split(":", 1)[1].strip()
    code, lines = run(["catalog", "check", str(cat)], capsys)
    assert code == 2 and any(want in l for l in lines), lines
    code, lines = run(["design", str(DEMO / "BH-1042.yaml"), "--catalog", str(cat)], capsys)
    assert code == 2 and len(lines) == 1 and want in lines[0] and str(cat) in lines[0], lines
    assert snapshot(tmp_path) == before


def test_five_megabyte_string(tmp_path, capsys):
    spec = tmp_path / "huge.yaml"
    spec.write_text((DEMO / "BH-1042.yaml").read_text().replace("title: ", "title: " + "x" * 5_000_000, 1))
    code, lines = run(["design", str(spec)], capsys)
    assert code == 2 and len(lines) == 1 and "MB" in lines[0]


def test_long_but_allowed_file_with_an_overlong_title(tmp_path, capsys):
    spec = tmp_path / "long.yaml"
    spec.write_text((DEMO / "BH-1042.yaml").read_text().replace("title: ", "title: " + "x" * 300_000, 1))
    code, lines = run(["design", str(spec)], capsys)
    assert code == 2 and len(lines) == 1 and "title" in lines[0] and "characters" in lines[0]


def test_folder_as_spec(tmp_path, capsys):
    code, lines = run(["design", str(tmp_path)], capsys)
    assert code == 2 and lines == [f"{tmp_path}: is a folder, expected a spec file"]


@pytest.mark.parametrize("argv, fragment", [
    (["design"], "Missing argument"),
    (["design", "a.yaml", "b.yaml"], "unexpected extra argument"),
    (["design", "--frobnicate"], "No such option"),
    (["catalog", "list", "cheese"], "unknown kind"),
    (["catalog", "show", "NO-SUCH-ID"], "no catalogue item"),
    (["catalog", "check", "/nonexistent/catalogue"], "no such catalogue folder"),
    (["nonsense"], "No such command"),
])
def test_bad_command_lines(argv, fragment, capsys):
    code, lines = run(argv, capsys)
    assert code == 2
    assert len(lines) == 1 and fragment in lines[0], lines
