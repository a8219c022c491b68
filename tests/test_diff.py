"""`specgen diff` and the change summary (specgen.diff, specgen.documents.change_doc).

Sources named beside each check:
- DCR of a winding R = rho20 * L / A with annealed copper rho20 = 1/58 ohm mm^2/m (IEC 60028),
  L the winding's wire length and A the copper cross-section pi/4 * d^2 per strand; the DCR
  limits are a fixed shop tolerance around the nominal (catalog/shop.yaml: dcr 10 %), so a
  changed turn count must move the limits by the same factor as the nominal;
- unit conversions of the displayed values checked with pint (an independent units library);
- the PDF's text is read back with pypdf (independent of WeasyPrint which wrote it);
- git: repositories made with the git command itself.
Spec texts are the shipped demo parts (invented data: Brindle Hollow Coil Works).
"""

from __future__ import annotations

import json
import math
import re
import shutil
import subprocess
from decimal import Decimal
from pathlib import Path

import pytest
from conftest import git as _git
from typer.testing import CliRunner

from specgen import api, diff
from specgen.catalog.loader import load_catalog, resolve_catalog_dir
from specgen.cli import app
from specgen.design.spec import load_spec

DEMO = Path(api.__file__).resolve().parent / "demo"
runner = CliRunner()
git_only = pytest.mark.skipif(shutil.which("git") is None, reason="git not installed")
RHO20_OHM_MM2_PER_M = 1 / 58          # IEC 60028 annealed copper at 20 degC


def cli(*args):
    return runner.invoke(app, [str(a) for a in args])


def _add_turns(text: str, winding: str, turns: int) -> str:
    m = re.search(rf"^(\s*)- name: {winding}\s*\n", text, flags=re.M)
    assert m, winding
    return text[:m.end()] + f"{m.group(1)}  turns: {turns}\n" + text[m.end():]


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)




@pytest.fixture
def two_revisions(git_env, cat):
    """BH-2210 committed as shipped (rev B), then a commit with one more primary turn."""
    repo = git_env / "specs"
    repo.mkdir()
    _git(repo, "init", "-q", "-b", "main")
    spec = repo / "BH-2210.yaml"
    shutil.copyfile(DEMO / "BH-2210.yaml", spec)
    _git(repo, "add", ".")
    _git(repo, "commit", "-q", "-m", "rev B")
    old_turns = api.design_file(spec, cat=cat).winding("P").turns
    spec.write_text(_add_turns(spec.read_text(), "P", old_turns + 1))
    _git(repo, "commit", "-q", "-a", "-m", "one more primary turn")
    return spec, old_turns


def _copper_area_mm2(cat, wire_id: str, in_hand: int) -> float:
    """pi/4 d^2 per strand from the catalogue's own dimensions (not from the design)."""
    raw = cat.find(wire_id)[1].raw

    def mm(text):
        value, unit = str(text).split()
        assert unit == "mm"
        return float(value)

    if "strand_diameter" in raw:
        area = int(raw["strands"]) * math.pi / 4 * mm(raw["strand_diameter"]) ** 2
    else:
        area = math.pi / 4 * mm(raw["bare_diameter"]) ** 2
    return area * max(1, in_hand)


@git_only
def test_diff_of_two_git_revisions_lists_turns_and_the_dcr_limit(two_revisions, cat):
    spec, old_turns = two_revisions
    r = cli("diff", f"{spec}@HEAD~1", f"{spec}@HEAD", "--json")
    assert r.exit_code == 0, r.stderr
    out = json.loads(r.stdout)
    assert out["old"]["name"].endswith("@HEAD~1") and out["new"]["name"].endswith("@HEAD")
    assert out["old"]["fingerprint"] != out["new"]["fingerprint"]
    assert {"key": "windings[P].turns", "old": None, "new": old_turns + 1} in out["inputs"]
    res = {(x["group"], x["quantity"]): x for x in out["results"]}
    turns = res[("winding P", "turns")]
    assert (turns["old"], turns["new"]) == (old_turns, old_turns + 1)
    nominal = res[("winding P", "DCR 20 °C nominal")]
    high = res[("winding P", "DCR 20 °C high limit")]
    low = res[("winding P", "DCR 20 °C low limit")]
    assert high["new"] > high["old"] and nominal["new"] > nominal["old"]
    # the limits are a fixed tolerance around the nominal (shop.yaml dcr 10 %), rounded inward to a step of at
    # most a fifth of the tolerance (design/test_setup.py, common practice)
    for side in ("old", "new"):
        assert 1.08 - 1e-9 <= high[side] / nominal[side] <= 1.1 + 1e-9
        assert 0.9 - 1e-9 <= low[side] / nominal[side] <= 0.92 + 1e-9
    # IEC 60028: R20 = rho20 L / A, with L the reported wire length and A from the catalogue
    designs = {}
    for side in ("old", "new"):
        designs[side] = diff.load_ref(out[side]["name"], cat).design
        w = designs[side].winding("P")
        length = w.length_m
        area = _copper_area_mm2(cat, w.wire, w.strands)
        expect = RHO20_OHM_MM2_PER_M * length / area
        assert nominal[side] == pytest.approx(expect, rel=5e-3)
    # the text output shows the same rows, old -> new
    t = cli("diff", f"{spec}@HEAD~1", f"{spec}@HEAD")
    assert t.exit_code == 0
    row = next(l for l in t.stdout.splitlines() if "DCR 20 °C high limit" in l)
    assert "->" in row and high["old_text"] in row and high["new_text"] in row
    assert re.search(rf"windings\[P\]\.turns\s+\(not set\)\s+{old_turns + 1}\b", t.stdout)


@git_only
def test_diff_pdf_names_things_as_a_reader_does(two_revisions, tmp_path, cat):
    from pypdf import PdfReader

    spec, _ = two_revisions
    pdf = tmp_path / "change.pdf"
    r = cli("diff", f"{spec}@HEAD~1", spec, "--pdf", pdf)
    assert r.exit_code == 0, r.stderr
    reader = PdfReader(str(pdf))
    text = " ".join(p.extract_text() for p in reader.pages)
    flat = " ".join(text.split())
    assert "BH-2210" in text and "rev B" in text
    summary = diff.compare_refs(f"{spec}@HEAD~1", str(spec), cat)
    for side in (summary.old, summary.new):
        assert side.fingerprint[:12] in flat                     # short fingerprints, 12 hex digits
        # never the long form: the 12 digits are not followed by the 13th (whatever word follows them)
        assert not re.search(re.escape(side.fingerprint[:12]) + r"\s?" + re.escape(side.fingerprint[12:16]), flat)
    assert "Primary turns" in flat and "windings[P]" not in flat  # the input by its plain name
    assert "revision B as released 2026-11-02 by T. Vance" in flat     # not a git ref the reader lacks
    assert "HEAD" not in flat and "@" not in flat
    assert str(tmp_path) not in flat and not re.search(r"(^|\s)/[a-z]+/", flat)   # no local path


def test_change_pdf_of_a_released_revision_pair_and_a_long_summary(tmp_path, cat):
    """Rev B -> rev C made with the release command: the PDF holds both letters; a summary of
    two different parts (over a hundred changed rows) still fits one page, with a note."""
    from pypdf import PdfReader

    from specgen.documents.change_doc import write_change_pdf
    from specgen.revision import start_next_draft_file

    old = tmp_path / "BH-2210-B.yaml"
    new = tmp_path / "BH-2210.yaml"
    shutil.copyfile(DEMO / "BH-2210.yaml", old)
    shutil.copyfile(DEMO / "BH-2210.yaml", new)
    start_next_draft_file(new)
    turns = api.design_file(old, cat=cat).winding("P").turns
    # fix the primary at the count the engine chose (one more turn would take the output out of its band)
    new.write_text(_add_turns(new.read_text(), "P", turns))
    assert cli("release", new, "--by", "T. Vance", "--note", "primary turns fixed").exit_code == 0
    s = diff.compare_refs(str(old), str(new), cat)
    assert (s.old.revision, s.new.revision) == ("B", "C")
    assert s.new.release_ok is True and s.old.release_ok is True    # B ships with its fingerprint recorded
    pdf = tmp_path / "bc.pdf"
    write_change_pdf(s, pdf)
    text = PdfReader(str(pdf)).pages[0].extract_text()
    assert "rev B" in text and "rev C" in text

    big = diff.compare_refs(str(DEMO / "BH-2210.yaml"), str(DEMO / "BH-1042.yaml"), cat)
    assert len(big.results) > 90
    pdf2 = tmp_path / "big.pdf"
    write_change_pdf(big, pdf2)
    reader = PdfReader(str(pdf2))
    # one column that flows: every changed result is printed, over as many pages as it takes
    text = " ".join(" ".join(p.extract_text() for p in reader.pages).split())
    assert len(reader.pages) >= 2 and "not shown" not in text
    for r in big.results:
        assert " ".join(r.quantity.split()) in text, r.quantity


def test_change_pdf_text_is_9_pt_or_more_on_either_paper(tmp_path, cat):
    # 9 pt body and nothing smaller (the old summary printed 6.6 to 8 pt); pypdf reads the sizes back
    from pdf_measure import page_sizes_mm, smallest_text

    from specgen.documents.change_doc import write_change_pdf

    s = diff.compare_refs(str(DEMO / "BH-2210.yaml"), str(DEMO / "BH-1042.yaml"), cat)
    for paper, size in (("A4", (210, 297)), ("Letter", (215.9, 279.4))):   # ISO 216 A4; US Letter 8.5 x 11 in
        pdf = tmp_path / f"{paper}.pdf"
        write_change_pdf(s, pdf, paper=paper)
        assert smallest_text(pdf)[0] >= 9.0, smallest_text(pdf)
        assert all(p == pytest.approx(size, abs=0.2) for p in page_sizes_mm(pdf))


def test_inputs_get_plain_names():
    from specgen.documents.change_doc import input_name

    roles = {"P": "primary", "S1": "secondary", "S2": "secondary"}
    assert input_name("windings[P].turns", roles) == "Primary turns"
    assert input_name("windings[S1].voltage", roles) == "Secondary S1 voltage"
    assert input_name("insulation.barriers[0].working_voltage", roles) == "Insulation barrier 1 working voltage"
    assert input_name("core.id", roles) == "Core"
    assert input_name("operating.ambient", roles) == "Ambient temperature"
    assert input_name("windings[X].turns", roles) == "Winding X turns"


def test_no_change_for_reordered_keys_comments_or_spacing(tmp_path, cat):
    """The diff follows the fingerprint's normalisation: mapping order, comments and repeated
    spaces are not changes (a reader would not call them one)."""
    src = (DEMO / "BH-3305.yaml").read_text()
    edited = (src.replace("  ambient: 50 degC\n  cooling: natural\n",
                          "  cooling: natural      # moved\n  ambient: 50  degC\n")
              .replace("# BH-3305: output choke", "# BH-3305 (edited comment): output choke"))
    assert edited != src
    a, b = tmp_path / "a.yaml", tmp_path / "b.yaml"
    a.write_text(src)
    b.write_text(edited)
    s = diff.compare_refs(str(a), str(b), cat)
    assert s.unchanged and s.old.fingerprint == s.new.fingerprint
    assert "no changes" in diff.summary_text(s)


def test_catalogue_change_shows_results_but_no_inputs(tmp_path):
    cat_dir = tmp_path / "catalog"
    shutil.copytree(resolve_catalog_dir(None), cat_dir)
    spec = DEMO / "BH-5018.yaml"
    base = load_catalog(cat_dir)
    old = diff.load_ref(str(spec), base)
    core = old.design.core.id
    cores = cat_dir / "cores.yaml"
    text = cores.read_text()
    block = re.search(rf"^  - id: {re.escape(core)}\n(?:    .*\n)+", text, flags=re.M)
    assert block
    edited = re.sub(r'price: "([0-9.]+)"', lambda m: f'price: "{Decimal(m.group(1)) * 2}"',
                    block.group(0))
    assert edited != block.group(0)
    cores.write_text(text[:block.start()] + edited + text[block.end():])
    changed = load_catalog(cat_dir)
    s = diff.compare(old, diff.load_ref(str(spec), changed))
    assert s.inputs == ()
    assert s.old.fingerprint == s.new.fingerprint            # a price does not change the part: not hashed
    # a price is not a shop-floor result: only the cost rows change (when quotes are available)
    assert all(r.group == "cost" for r in s.results)
    if s.results:
        mat = next(r for r in s.results if r.quantity == "material per unit")
        assert isinstance(mat.old, Decimal) and mat.new > mat.old


def test_flatten_inputs_names_windings_and_keeps_list_order(cat):
    spec = load_spec(DEMO / "BH-2210.yaml")
    flat = diff.flatten_inputs(spec.data)
    assert flat["windings[P].voltage"] == "200 V"
    assert flat["build_order"] == ["P.1", "S", "P.2"]
    assert flat["insulation.barriers[0].grade"] == "reinforced"
    assert not any(k.startswith(("history", "revision", "status")) for k in flat)


@pytest.mark.parametrize("value, unit, pint_unit, shown_unit", [
    (0.07018, "ohm", "ohm", "milliohm"),
    (12.5, "ohm", "ohm", "ohm"),
    (4.7e-5, "H", "henry", "microhenry"),
    (0.0036, "H", "henry", "millihenry"),
    (0.00073, "mm", "meter", "millimeter"),
    (0.000572, "l", "liter", "milliliter"),
])
def test_displayed_units_agree_with_pint(value, unit, pint_unit, shown_unit):
    import pint

    ureg = pint.UnitRegistry()
    text = diff.fmt(value, unit)
    number = float(text.split()[0])
    expect = ureg.Quantity(value, pint_unit).to(shown_unit).magnitude
    assert number == pytest.approx(expect, rel=1e-3), text


def test_diff_bad_input_is_one_line(tmp_path):
    r = cli("diff", tmp_path / "nope.yaml", DEMO / "BH-2210.yaml")
    assert r.exit_code == 2 and len(r.stderr.splitlines()) == 1 and "Traceback" not in r.stderr


@git_only
def test_diff_unknown_git_revision(two_revisions):
    spec, _ = two_revisions
    r = cli("diff", f"{spec}@no-such-rev", spec)
    assert r.exit_code == 2 and "unknown git revision" in r.stderr


@git_only
def test_demo_change_summary(tmp_path, git_env, cat, monkeypatch):
    import tempfile

    from pypdf import PdfReader

    from specgen.demo.run import demo_change_summary

    scratch = tmp_path / "scratch"
    scratch.mkdir()
    monkeypatch.setattr(tempfile, "tempdir", str(scratch))
    said = []
    pdf = demo_change_summary(tmp_path / "out", cat, said.append)
    assert pdf is not None and pdf.is_file() and said
    text = " ".join(" ".join(p.extract_text() for p in PdfReader(str(pdf)).pages).split())
    assert "rev B" in text and "rev C" in text and "HEAD" not in text
    assert "Primary turns" in text
    # the new revision's release: date, author, note and effectivity; the old one by its release
    assert "released 2026-12-07 by T. Vance" in text and re.search(r"\d+ primary turns: (lower flux|less copper)", text)
    assert "Effectivity Work orders issued from 2026-12-07 are built to revision C" in text
    assert "revision B as released 2026-11-02 by T. Vance" in text
    assert str(tmp_path) not in text and "data/catalog" not in text and not re.search(r"(^|\s)/[A-Za-z]", text)
    assert list(scratch.iterdir()) == []                  # the throwaway repository is gone


def test_demo_change_summary_without_git(tmp_path, monkeypatch, cat):
    from specgen.demo import run as demo_run

    monkeypatch.setattr(demo_run.shutil, "which", lambda name: None)
    said = []
    assert demo_run.demo_change_summary(tmp_path, cat, said.append) is None
    assert "git is not installed" in said[0]
    assert list(tmp_path.iterdir()) == []


def test_diff_text_and_json_do_not_load_weasyprint():
    """Speed rule of this project: commands that print numbers must not import WeasyPrint (about 1 s)."""
    import sys

    code = ("import sys\n"
            "from typer.testing import CliRunner\n"
            "from specgen.cli import app\n"
            f"spec = {str(DEMO / 'BH-3305.yaml')!r}\n"
            "for extra in ([], ['--json']):\n"
            "    r = CliRunner().invoke(app, ['diff', spec, spec, *extra])\n"
            "    assert r.exit_code == 0, r.output\n"
            "r = CliRunner().invoke(app, ['verify', spec])\n"
            "assert 'weasyprint' not in sys.modules\n")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, proc.stderr
