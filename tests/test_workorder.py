"""`specgen workorder` (issue 5): the printed work order and the rules around issuing it.

Independent references used here:
- pypdf (a separate PDF parser) reads the text back out of the PDF;
- ``qpdf --check`` and poppler's ``pdftoppm`` (separate programs) must accept and render every page;
- pint (an independent units library) parses every printed quantity back, so the SI prefixes of the
  formatting helpers are checked against the BIPM SI Brochure's prefixes as pint implements them;
- IEC 60028 (from memory): annealed copper's temperature coefficient alpha_20 = 0.00393 /K, the
  coefficient of the printed correction R20 = Rt / (1 + alpha (t - 20));
- the invented demo shop: a 3 % scrap allowance on wire;
- plain arithmetic: a turns ratio is Np / Ns of the printed turns.
Expected strings are formatted from the Design with the same helpers the template uses; integer
quantities (turns) are read back as integers from the PDF text.
"""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import pint
import pypdf
import pytest
from conftest import blank_recorded_fingerprint
from typer.testing import CliRunner

from specgen import api, present
from specgen.catalog.loader import load_catalog
from specgen.cli import app
from specgen.demo import run as demo_run
from specgen.design.spec import load_spec
from specgen.documents import render
from specgen.documents import workorder as wo
from specgen.register import Register

DEMOS = {p.stem: p for p in api.demo_specs()}
EVIL = '<img src="file:///etc/passwd">'


def _norm(text: str) -> str:
    return " ".join(text.replace("\xa0", " ").split())


_PAGES: dict = {}


def _pdf_pages(path: Path) -> list[str]:
    key = (str(path), path.stat().st_mtime_ns)
    if key not in _PAGES:
        _PAGES[key] = [_norm(p.extract_text() or "") for p in pypdf.PdfReader(str(path)).pages]
    return _PAGES[key]


def _copy(tmp: Path, part: str, edit=None) -> Path:
    target = tmp / f"{part}.yaml"
    text = DEMOS[part].read_text(encoding="utf-8")     # the shipped release records its fingerprint
    if edit:
        text = edit(text)
    target.write_text(text, encoding="utf-8")
    return target


def _cli(*args):
    return CliRunner().invoke(app, [str(a) for a in args], catch_exceptions=False)


def _orders(reg: Path) -> list:
    if not reg.exists():
        return []
    with Register.open(reg, create=False) as r:
        return r.list()


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def issued(tmp_path_factory, cat):
    """Three work orders through the CLI: two released parts and one draft with a hostile customer."""
    tmp = tmp_path_factory.mktemp("wo")
    out = tmp / "out"
    reg = tmp / "reg.sqlite"
    runs = {}
    for part in ("BH-1042", "BH-3305"):
        spec = _copy(tmp, part)
        res = _cli("workorder", spec, "--qty", 50, "--due", "2027-03-31", "--lot", f"L-{part}", "--out", out,
                   "--register", reg, "--by", "T. Tester")
        assert res.exit_code == 0, res.output
        pdf, html = [Path(line) for line in res.stdout.split()]
        runs[part] = {"spec": spec, "pdf": pdf, "html": html, "res": res,
                      "design": api.design_file(spec, cat=cat)}
    # a draft whose customer field is an HTML tag that would fetch a local file if it were not escaped
    spec = _copy(tmp, "BH-2210", lambda t: t.replace("status: released", "status: draft")
                 .replace("customer: Larkspur Charging", f"customer: '{EVIL}'"))
    asked = []
    original = render._allowed_path

    def spy(url):
        asked.append(url)
        return original(url)

    render._allowed_path = spy
    try:
        res = _cli("workorder", spec, "--qty", 3, "--out", out, "--register", reg, "--draft")
    finally:
        render._allowed_path = original
    assert res.exit_code == 0, res.output
    pdf, html = [Path(line) for line in res.stdout.split()]
    runs["draft"] = {"spec": spec, "pdf": pdf, "html": html, "res": res, "asked": asked,
                     "design": api.design_file(spec, cat=cat)}
    runs["reg"] = reg
    runs["out"] = out
    return runs


# ------------------------------------------------------------------------------------------------ contents

@pytest.mark.parametrize("part", ["BH-1042", "BH-3305"])
def test_pdf_carries_the_designs_numbers(issued, part):
    run = issued[part]
    d = run["design"]
    pages = _pdf_pages(run["pdf"])
    text = " ".join(pages)
    number = run["pdf"].stem
    assert re.fullmatch(r"WO-\d{4}-\d{5}", number)
    for page in pages:           # the header is on every page
        assert number in page and f"{d.part} rev {d.revision}" in page
        assert wo.UNCONTROLLED in page
        assert d.fingerprint[:12] in page
    assert d.customer in text
    # every winding's wire id, and its turns read back as integers from the step headings
    step_turns = [int(n) for n in re.findall(r"Wind \S+(?: \(section \d+ of \d+\))? (\d+) turns", text)]
    expected = [s.turns for w in d.windings for s in w.sections]
    assert sorted(step_turns) == sorted(expected)
    for w in d.windings:
        assert w.wire in text
        assert sum(s.turns for s in w.sections) == w.turns
    for lim in d.tests.dcr:
        assert wo.fmt_ohm(lim.nominal) in text, (lim.item, wo.fmt_ohm(lim.nominal))
        # the limits at the figures they were rounded to (design/test_setup.py), beside the nominal's prefix
        for shown in present.si_set([lim.nominal, lim.low, lim.high], "Ω", keep_zeros=False)[1:]:
            assert shown in text, (lim.item, shown)
    for h in d.tests.hipot:
        assert f"{wo.fmt_test_volt(h.routine_voltage_v)} a.c. for {wo.fmt_seconds(h.routine_duration_s)}" in text
        assert f"{wo.fmt_test_volt(h.type_voltage_v)} a.c. for {wo.fmt_seconds(h.type_duration_s)}" in text
    for line in wo.HIPOT_CAUTION:
        assert _norm(line) in text
    assert _norm(wo.STANDARDS_NOTE) in text
    assert wo.WATERMARK not in text.replace(" ", "") and "DRAFT" not in text


def test_dcr_correction_uses_copper_alpha(issued):
    """IEC 60028 (from memory): alpha_20 of annealed copper is 0.00393 /K."""
    text = " ".join(_pdf_pages(issued["BH-1042"]["pdf"]))
    assert "R20 = Rt / (1 + α (t − 20))" in text
    assert "α = 0.00393 /K" in text


def test_turns_ratio_is_the_ratio_of_the_printed_turns(issued):
    """Plain arithmetic on what the winder sees: ratio = Np / Ns of the step headings."""
    text = " ".join(_pdf_pages(issued["BH-1042"]["pdf"]))
    turns = {m.group(1): int(m.group(2)) for m in re.finditer(r"Wind (\S+) (\d+) turns", text)}
    for sec in ("S1", "S2"):
        assert wo.fmt_ratio(turns["P"] / turns[sec]) in text


def test_wire_for_the_lot_includes_the_scrap_allowance(issued):
    """Scenario figures: 3 % scrap allowance on wire; the lot is per unit x quantity."""
    d = issued["BH-1042"]["design"]
    text = " ".join(_pdf_pages(issued["BH-1042"]["pdf"]))
    assert "3% scrap" in text
    for m in d.materials:
        if m.kind == "wire":
            assert wo.fmt_m(m.quantity * 50 * 1.03) in text
        if m.kind == "laminations":
            assert f"{int(m.quantity) * 50:,} pairs" in text


def test_inductor_order_has_the_gap_and_al_check(issued):
    d = issued["BH-3305"]["design"]
    text = " ".join(_pdf_pages(issued["BH-3305"]["pdf"]))
    assert f"Grind the centre leg of ONE core half by {wo.fmt_mm(d.inductor.grind_m)}" in text
    assert "AL CHECK BEFORE WINDING" in text
    # the AL limits printed read back (pint) as the Design's AL within rounding
    al = pint.UnitRegistry().Quantity(re.search(r"nominal ([\d.]+) nH", text).group(1) + " nH")
    assert al.to("H").magnitude == pytest.approx(d.inductor.al_nh * 1e-9, rel=5e-4)


def test_varnish_step_has_oven_caution_and_catalogue_cure(issued, cat):
    text = " ".join(_pdf_pages(issued["BH-1042"]["pdf"]))
    v = cat.varnishes["VAR-PEI-F"]
    cure = f"{wo.fmt_temp(v.cure_temperature_c)} for {wo.fmt_seconds(v.cure_time_s)}"
    assert cure in text
    for word in ("Hot varnish oven", "Solvent vapour", "ventilation", "gloves"):
        assert word in text


def test_fingerprint_not_recorded_is_refused(tmp_path):
    """A release without a recorded fingerprint is not a release: refused, nothing numbered."""
    spec = _copy(tmp_path, "BH-1042", blank_recorded_fingerprint)
    reg = tmp_path / "reg.sqlite"
    res = _cli("workorder", spec, "--qty", 10, "--out", tmp_path / "out", "--register", reg)
    assert res.exit_code == 2 and "records no fingerprint" in res.stderr
    assert len(res.stderr.strip().splitlines()) == 1
    assert _orders(reg) == []
    # a marked draft copy may still be printed, with the reason as a warning
    res = _cli("workorder", spec, "--qty", 10, "--out", tmp_path / "out", "--register", reg, "--draft")
    assert res.exit_code == 0 and "records no fingerprint" in res.stderr


# ------------------------------------------------------------------------------------------------ readers

def test_independent_readers_accept_every_pdf(issued, tmp_path):
    """qpdf --check must pass; pdftoppm must render as many pages as pypdf counts."""
    for key in ("BH-1042", "BH-3305", "draft"):
        pdf = issued[key]["pdf"]
        check = subprocess.run(["qpdf", "--check", str(pdf)], capture_output=True, text=True, timeout=60)
        assert check.returncode == 0, check.stdout + check.stderr
        n = len(pypdf.PdfReader(str(pdf)).pages)
        prefix = tmp_path / key
        subprocess.run(["pdftoppm", "-r", "20", "-png", str(pdf), str(prefix)], check=True, timeout=120)
        assert len(list(tmp_path.glob(f"{key}-*.png"))) == n


# ------------------------------------------------------------------------------------------------ draft, escaping

def test_draft_is_watermarked_on_every_page_and_recorded_void(issued):
    pages = _pdf_pages(issued["draft"]["pdf"])
    assert len(pages) > 1
    for page in pages:
        assert wo.WATERMARK.replace(" ", "") in page.replace(" ", "")
    number = issued["draft"]["pdf"].stem
    with Register.open(issued["reg"], create=False) as r:
        order = r.get(number)
    assert order.state == "void" and "draft" in order.void_reason
    assert set(order.files) == {str(issued["draft"]["pdf"]), str(issued["draft"]["html"])}


def test_hostile_customer_is_printed_as_text_and_nothing_is_fetched(issued):
    run = issued["draft"]
    text = " ".join(_pdf_pages(run["pdf"]))
    assert EVIL in text
    html = run["html"].read_text(encoding="utf-8")
    assert "&lt;img src=&#34;file:///etc/passwd&#34;&gt;" in html or "&lt;img src=&quot;file:///etc/passwd" in html
    assert "<img" not in html
    # the renderer was asked for nothing outside templates/ (our page inlines its CSS: nothing at all)
    root = render.templates_dir().resolve().as_uri()
    assert all(u.startswith(root) for u in run["asked"]), run["asked"]
    assert not any("passwd" in u for u in run["asked"])
    assert "refused" not in run["res"].stderr


# ------------------------------------------------------------------------------------------------ refusals

def test_failed_design_is_refused_with_exit_1_and_takes_no_number(tmp_path):
    """BH-1042 with 400 primary turns on 230 V: B_pk about 3 T, above the limit and saturation (Faraday's law)
    though short of the sanity range (fewer turns end the design before any check, also exit 1)."""
    spec = _copy(tmp_path, "BH-1042", lambda t: t.replace('    start: "1"', '    turns: 400\n    start: "1"', 1))
    reg = tmp_path / "reg.sqlite"
    out = tmp_path / "out"
    res = _cli("workorder", spec, "--qty", 10, "--out", out, "--register", reg)
    assert res.exit_code == 1
    assert "FAIL saturation" in res.stderr
    assert _orders(reg) == []
    assert not out.exists() or not any(out.iterdir())


def test_unreleased_spec_is_refused_with_exit_2(tmp_path):
    """Documented choice: a spec that is not released is the user's input problem (exit 2)."""
    spec = _copy(tmp_path, "BH-5018", lambda t: t.replace("status: released", "status: draft"))
    reg = tmp_path / "reg.sqlite"
    res = _cli("workorder", spec, "--qty", 10, "--out", tmp_path / "out", "--register", reg)
    assert res.exit_code == 2
    assert len(res.stderr.strip().splitlines()) == 1 and "released" in res.stderr
    assert _orders(reg) == []
    assert not (tmp_path / "out").exists()


def test_released_spec_changed_after_release_is_refused(tmp_path):
    spec = _copy(tmp_path, "BH-5018", lambda t: re.sub(r'fingerprint: "[0-9a-f]{64}"', 'fingerprint: "' + "0" * 64 + '"', t))
    reg = tmp_path / "reg.sqlite"
    res = _cli("workorder", spec, "--qty", 10, "--out", tmp_path / "out", "--register", reg)
    assert res.exit_code == 2
    assert "does not match its release record" in res.stderr
    assert _orders(reg) == []


@pytest.mark.parametrize("args, word", [
    (["--qty", "0"], "--qty"), (["--qty", "1000001"], "--qty"), (["--qty", "ten"], "--qty"),
    (["--qty", "5", "--due", "2027-02-30"], "--due"), (["--qty", "5", "--due", "next week"], "--due"),
    (["--qty", "5", "--lot", "L" * 41], "--lot"), (["--qty", "5", "--number", "../../etc/x"], "--number"),
])
def test_bad_options_are_one_line_exit_2(tmp_path, args, word):
    spec = _copy(tmp_path, "BH-5018")
    reg = tmp_path / "reg.sqlite"
    res = _cli("workorder", spec, *args, "--out", tmp_path / "out", "--register", reg)
    assert res.exit_code == 2
    lines = res.stderr.strip().splitlines()
    assert len(lines) == 1 and word in lines[0] and "Traceback" not in res.output
    assert _orders(reg) == []


# ------------------------------------------------------------------------------------------------ atomicity

def test_failed_render_leaves_no_files_and_voids_the_number(tmp_path, monkeypatch):
    spec = _copy(tmp_path, "BH-5018")
    reg = tmp_path / "reg.sqlite"
    out = tmp_path / "out"

    def boom(html, blocked=None):
        raise RuntimeError("renderer crashed")

    monkeypatch.setattr(render, "html_to_pdf", boom)
    with pytest.raises(RuntimeError):
        wo.issue_work_order(spec, qty=5, out_dir=out, register_path=reg, warn=lambda m: None)
    assert not out.exists()          # not even the folder: it is made only when written
    (order,) = _orders(reg)
    assert order.state == "void" and "renderer crashed" in order.void_reason


def test_write_failing_midway_leaves_neither_file(tmp_path, monkeypatch):
    """Both or neither: the PDF is written, the HTML write fails, no target and no temp file remain."""
    spec = _copy(tmp_path, "BH-5018")
    reg = tmp_path / "reg.sqlite"
    out = tmp_path / "out"
    monkeypatch.setattr(render, "html_to_pdf", lambda html, blocked=None: b"%PDF-1.7\n%%EOF\n")
    real_write_text = Path.write_text

    def failing_write_text(self, *a, **k):
        if self.name.endswith(".tmp"):
            raise OSError(28, "No space left on device")
        return real_write_text(self, *a, **k)

    monkeypatch.setattr(Path, "write_text", failing_write_text)
    with pytest.raises(OSError):
        wo.issue_work_order(spec, qty=5, out_dir=out, register_path=reg, warn=lambda m: None)
    assert not out.exists()          # not even the folder: it is made only when written
    (order,) = _orders(reg)
    assert order.state == "void"


# ------------------------------------------------------------------------------------------------ numbers

def test_erp_number_is_used_and_cannot_be_used_twice(tmp_path, monkeypatch, cat):
    spec = _copy(tmp_path, "BH-5018")
    reg = tmp_path / "reg.sqlite"
    monkeypatch.setattr(render, "html_to_pdf", lambda html, blocked=None: b"%PDF-1.7\n%%EOF\n")
    done = wo.issue_work_order(spec, qty=5, out_dir=tmp_path, register_path=reg, number="ERP-7781",
                               warn=lambda m: None)
    assert done.pdf.name == "ERP-7781.pdf" and done.html.name == "ERP-7781.html"
    assert "ERP-7781" in done.html.read_text(encoding="utf-8")
    res = _cli("workorder", spec, "--qty", 5, "--out", tmp_path, "--register", reg, "--number", "ERP-7781")
    assert res.exit_code == 2 and "already in the register" in res.stderr


def test_demo_workorders_one_per_part(tmp_path, cat):
    spec_path = DEMOS["BH-5018"]
    spec = load_spec(spec_path)
    designs = {spec.part: (spec_path, spec, api.run_design(spec, cat))}
    lines = []
    done = demo_run.demo_workorders(designs, tmp_path, None, lines.append, cat=cat)
    assert len(done) == 1 and done[0].pdf.exists() and done[0].html.exists()
    (order,) = _orders(tmp_path / "specgen-register.sqlite")
    assert order.qty == 50 and order.lot == "DEMO-BH-5018" and order.state == "issued"
    assert any(done[0].number in line for line in lines)


# ------------------------------------------------------------------------------------------------ formatting

@pytest.mark.parametrize("value, unit, text", [
    (0.07017953761342048, "Ω", "70.18 mΩ"), (21.4234, "Ω", "21.42 Ω"), (4.7478e-05, "H", "47.48 µH"),
    (9.74656, "H", "9.747 H"), (1e8, "Ω", "100.0 MΩ"), (0.0031398, "Ω", "3.140 mΩ"), (999.96, "V", "1.000 kV"),
])
def test_engineering_format_reads_back_with_pint(value, unit, text):
    """SI prefixes (BIPM SI Brochure) as pint parses them: the printed text is the value to 4 figures."""
    assert wo.fmt_eng(value, unit) == text
    q = pint.UnitRegistry().Quantity(text.replace("Ω", "ohm"))
    assert q.to_base_units().magnitude == pytest.approx(value, rel=5e-4)



def test_the_shop_file_can_fix_the_register(tmp_path):
    """shop.yaml `register:` places one register for the whole shop (issue 6: --register > $SPECGEN_REGISTER >
    the shop file's setting > beside the spec)."""
    import os
    import shutil

    from specgen.catalog.loader import shipped_catalog_dir

    cat = tmp_path / "catalog"
    shutil.copytree(shipped_catalog_dir(), cat)
    shop = cat / "shop.yaml"
    shop.write_text(shop.read_text().replace('  work_order_format:', f'  register: {tmp_path / "shop-reg.sqlite"}\n'
                                                                     '  work_order_format:', 1))
    # the shop section is in every fingerprint, so the edited shop file breaks the shipped release
    # record: a marked draft copy is enough to show where the register goes
    spec = _copy(tmp_path, "BH-5018")
    env = {k: v for k, v in os.environ.items() if k != "SPECGEN_REGISTER"}
    r = subprocess.run([sys.executable, "-m", "specgen.cli", "workorder", str(spec), "--qty", "3", "--out",
                        str(tmp_path / "o"), "--catalog", str(cat), "--draft"], capture_output=True, text=True,
                       env=env)
    assert r.returncode == 0, r.stderr
    assert (tmp_path / "shop-reg.sqlite").exists() and not (tmp_path / "specgen-register.sqlite").exists()
