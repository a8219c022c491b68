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


# --- files that are not regular files, hostile catalogue figures, closed pipes, spreadsheets, folders ----

@pytest.mark.parametrize("kind", ["device", "fifo"])
def test_a_device_or_a_pipe_named_as_the_spec_is_refused_without_reading(tmp_path, kind):
    """/dev/zero would be read forever (3 GB in 4 s before); a FIFO with no writer would block forever."""
    import os
    import subprocess
    import sys

    if kind == "device":
        spec = Path("/dev/zero")
    else:
        spec = tmp_path / "spec.yaml"
        os.mkfifo(spec)
    r = subprocess.run([sys.executable, "-m", "specgen.cli", "design", str(spec)], capture_output=True,
                       text=True, timeout=60)
    assert r.returncode == 2
    assert r.stderr.splitlines() == [f"{spec}: is {'a device' if kind == 'device' else 'a pipe'}, "
                                     f"not a regular file; expected a spec file"]


def test_a_spec_over_the_size_limit_is_refused(tmp_path, capsys):
    spec = tmp_path / "big.yaml"
    spec.write_text((DEMO / "BH-1042.yaml").read_text())
    with open(spec, "a") as fh:
        fh.write("#" * (1024 * 1024 - spec.stat().st_size + 1))     # one byte over 1 MiB
    code, lines = run(["design", str(spec)], capsys)
    assert code == 2 and lines == [f"{spec}: is 1,048,577 bytes (1.05 MB); a spec file is at most 1,048,576 bytes"]
    with open(spec, "r+") as fh:
        fh.truncate(1024 * 1024)                                       # exactly the limit: read
    code, lines = run(["design", str(spec)], capsys)
    assert code in (0, 1), lines


@pytest.mark.parametrize("figure, fragment", [
    ('lead_length: "9**9**9 mm"', "shop.lead_length: expected a length like '0.5 mm', could not read the number"),
    ('lead_length: "2,5 mm"', "shop.lead_length: a comma in a number is not read"),
    ('lead_length: 1e308 mm', "shop.lead_length: '1e308 mm' is outside the range of a length"),
    ('setup_time: "2**2**2**2**2 h"', "shop.setup_time: expected a time like '5 us', could not read the number"),
])
def test_hostile_shop_figures_are_one_located_line(tmp_path, capsys, figure, fragment):
    cat = tmp_path / "catalog"
    shutil.copytree(shipped_catalog_dir(), cat)
    shop = cat / "shop.yaml"
    key = figure.split(":")[0]
    lines = shop.read_text().splitlines()
    line_no = next(i for i, line in enumerate(lines) if line.strip().startswith(f"{key}:"))
    lines[line_no] = f"  {figure}"
    shop.write_text("\n".join(lines) + "\n")
    code, out = run(["design", str(DEMO / "BH-1042.yaml"), "--catalog", str(cat)], capsys)
    assert code == 2 and len(out) == 1, out
    assert out[0].startswith(f"{shop}:{line_no + 1}: ") and fragment in out[0], out[0]


def test_verify_keeps_its_failing_exit_code_when_its_reader_goes_away(tmp_path):
    """`specgen verify *.yaml | head -c1`: verify found a tampered spec, so it exits 1 whatever happened
    to its output (a broken pipe used to be mapped to 0, success)."""
    import subprocess
    import sys

    from conftest import blank_recorded_fingerprint

    spec = tmp_path / "BH-3305.yaml"
    spec.write_text(blank_recorded_fingerprint((DEMO / "BH-3305.yaml").read_text()))
    released = subprocess.run([sys.executable, "-m", "specgen.cli", "release", str(spec), "--by", "x",
                               "--note", "y", "--accept-all", "--reason", "accepted for the test"],
                              capture_output=True, text=True)
    assert released.returncode == 0, released.stderr
    spec.write_text(spec.read_text().replace("current: 4 A", "current: 5 A").replace(
        "title: ", "title: tampered ", 1))
    for extra in ([], ["--json"]):
        p = subprocess.Popen([sys.executable, "-m", "specgen.cli", "verify", str(spec), *extra],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
        p.stdout.close()                       # the reader is gone before verify prints a byte
        err = p.stderr.read().decode()
        p.wait(timeout=120)
        p.stderr.close()
        assert p.returncode == 1, (extra, p.returncode, err)
        assert "Traceback" not in err and "BrokenPipe" not in err, err


def test_refused_work_order_creates_no_output_folder(tmp_path, capsys):
    spec = tmp_path / "BH-5018.yaml"
    shutil.copyfile(DEMO / "BH-5018.yaml", spec)
    reg = str(tmp_path / "reg.sqlite")
    first = tmp_path / "first"
    code, _ = run(["workorder", str(spec), "--qty", "5", "--out", str(first), "--number", "ERP-7",
                   "--register", reg], capsys)
    assert code == 0 and (first / "ERP-7.pdf").exists()
    again = tmp_path / "again" / "deeper"
    code, lines = run(["workorder", str(spec), "--qty", "5", "--out", str(again), "--number", "ERP-7",
                       "--register", reg], capsys)
    assert code == 2 and len(lines) == 1, lines             # the number is taken: refused
    assert not (tmp_path / "again").exists()


@pytest.mark.parametrize("argv, fragment", [
    (["--workers", "0"], "--workers: --workers and --progress go with --batch ORDERS.csv only"),
    (["--workers", "4"], "--workers: --workers and --progress go with --batch"),
    (["--no-progress"], "--progress: --workers and --progress go with --batch"),
])
def test_batch_only_options_are_not_ignored_without_batch(tmp_path, capsys, argv, fragment):
    code, lines = run(["workorder", str(DEMO / "BH-5018.yaml"), "--qty", "5", "--out", str(tmp_path / "o"),
                       *argv], capsys)
    assert code == 2 and len(lines) == 1 and fragment in lines[0], lines
    assert not (tmp_path / "o").exists()


def test_terminal_control_characters_never_reach_the_terminal(tmp_path, capsys):
    """A file name carrying ESC ] ... BEL (a terminal title change) is printed escaped in the error."""
    spec = tmp_path / "evil\x1b]0;owned\x07.yaml"
    spec.write_text("part: [\n")
    code, lines = run(["design", str(spec)], capsys)
    assert code == 2 and len(lines) == 1
    assert "\x1b" not in lines[0] and "\x07" not in lines[0] and "\\x1b]0;owned\\x07" in lines[0]


def test_verify_of_a_folder_skips_a_fifo_named_like_a_spec(tmp_path):
    """A FIFO named x.yaml in a folder given to verify used to block the scan forever."""
    import os
    import subprocess
    import sys

    shutil.copyfile(DEMO / "BH-1042.yaml", tmp_path / "BH-1042.yaml")
    os.mkfifo(tmp_path / "x.yaml")
    r = subprocess.run([sys.executable, "-m", "specgen.cli", "verify", str(tmp_path)], capture_output=True,
                       text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    assert "1 spec(s)" in r.stdout


def test_design_keeps_its_failing_exit_code_when_its_reader_goes_away(tmp_path):
    """The quick path of `specgen design` (no typer) used to map a broken pipe to 0 too."""
    import subprocess
    import sys

    spec = tmp_path / "runaway.yaml"
    # a ripple far above the rating: the design fails its checks (a 100 A ripple would now be refused as input
    # leading to results beyond any part, exit 2)
    spec.write_text((DEMO / "BH-3305.yaml").read_text().replace("ripple: 2.4 A", "ripple: 20 A"))
    for extra in ([], ["--json"]):
        p = subprocess.Popen([sys.executable, "-m", "specgen.cli", "design", str(spec), *extra],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE)
        p.stdout.close()
        err = p.stderr.read().decode()
        p.wait(timeout=120)
        p.stderr.close()
        assert p.returncode == 1, (extra, p.returncode, err)
        assert "Traceback" not in err and "BrokenPipe" not in err, err
