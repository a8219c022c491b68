"""Every PDF `specgen demo` writes, looked at as a reader does (``tools/pagecheck.py``): every work order
(each demo part's, and the second lot), both copies of every quote, the change summary.

The rules (``pagecheck.problems``):
- no page under half full unless it is the document's last or the next page must start fresh (a record
  of its own; ``pagecheck.FRESH_STARTS`` states each with its reason): a box that moved over leaves a page
  a reader takes for the end of the document (common practice);
- no text under 8.5 pt, the smallest a shop document is read at arm's length (common practice);
- no local path (``/work``, ``/home``, ``/tmp``...) in any text: the documents leave the machine.
The PDFs are read back by poppler (``pdftoppm``, ``pdftotext``) and pypdf, programs apart from
WeasyPrint, which wrote them. All parts are the invented demo scenario (Brindle Hollow Coil Works).
"""

from __future__ import annotations

import shutil
import sys
from pathlib import Path

import pytest
from typer.testing import CliRunner

from specgen.api import demo_specs
from specgen.cli import app

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tools"))
import pagecheck


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    if shutil.which("git") is None:
        pytest.skip("the demo's change summary needs git")
    out = tmp_path_factory.mktemp("pages") / "demo"
    r = CliRunner().invoke(app, ["demo", "--out", str(out)])
    assert r.exit_code == 0, r.stdout + r.stderr
    return {pdf: pagecheck.check(pdf) for pdf in sorted(out.rglob("*.pdf"))}


def _page(n: int, fill: float, text: str = "", min_pt: float = 10.0, paths: list | None = None):
    return pagecheck.PageReport(n, (210, 297), fill, fill, min_pt, paths or [], text)


def test_the_rules_catch_what_a_reader_objects_to():
    wo, quote = Path("WO-2026-00001.pdf"), Path("BH-1-revA-quote.pdf")
    record = "7. Test record\nTest record BH-1042 rev A, lot DEMO-BH-1042: serials 1-12 of 50"
    # a middle page filled to 40 % is flagged; the same page before the test record, or as the last, is not
    assert pagecheck.problems(wo, [_page(1, 0.9), _page(2, 0.4), _page(3, 0.9)])
    assert not pagecheck.problems(wo, [_page(1, 0.9), _page(2, 0.4), _page(3, 0.9, record)])
    assert not pagecheck.problems(wo, [_page(1, 0.9), _page(2, 0.4)])
    # the test sheet (limits) flows on after the steps: it is no reason for a loose page
    assert pagecheck.problems(wo, [_page(1, 0.9), _page(2, 0.4), _page(3, 0.9, "4. Test sheet\nDC")])
    # the fresh start is the work order's own: a quote page before a 'Test record' heading still counts
    assert pagecheck.problems(quote, [_page(1, 0.4), _page(2, 0.9, record)])
    assert pagecheck.problems(quote, [_page(1, 0.9, min_pt=8.0)])
    assert not pagecheck.problems(quote, [_page(1, 0.9, min_pt=8.47)])
    assert pagecheck.problems(quote, [_page(1, 0.9, paths=["/work/x/catalog"])])
    assert pagecheck.PATH_RE.search("catalogue /home/ann/shop/cores.yaml") and \
        not pagecheck.PATH_RE.search("1.5 mm/turn, 230 V/50 Hz")


def test_the_margins_come_from_each_documents_stylesheet():
    # the work order's running header and footer sit in a 39 mm top and 15 mm bottom band (specgen.css)
    assert pagecheck.margins_mm("workorder") == (39.0, 15.0 + pagecheck.FOOTER_SLACK_MM)
    assert {pagecheck.kind_of(Path(n)) for n in ("WO-2026-00001.pdf", "BH-2210.change-B-C.pdf",
                                                 "BH-1042-revA-quote-internal.pdf")} == \
        {"workorder", "change", "quote"}


@pytest.mark.slow                      # the demo, then ~100 pages rendered
def test_the_check_covers_every_document_of_the_demo(demo):
    parts = [p.stem for p in demo_specs()]
    names = [p.name for p in demo]
    assert sum(n.startswith("WO-") for n in names) == len(parts) + 1         # and the station's second lot
    for part in parts:
        assert sum(n.startswith(f"{part}-rev") and n.endswith("-quote.pdf") for n in names) == 1
        assert sum(n.startswith(f"{part}-rev") and n.endswith("-quote-internal.pdf") for n in names) == 1
    assert any(".change-" in n for n in names)
    assert all(pagecheck.kind_of(p) for p in demo)      # every PDF is of a kind whose margins are known
    assert max(len(pages) for pages in demo.values()) >= 9                      # the long work orders too


@pytest.mark.slow                      # the demo, then ~100 pages rendered
def test_no_demo_page_is_under_half_full_without_a_reason(demo):
    found = [line for pdf, pages in demo.items() for line in pagecheck.problems(pdf, pages) if "filled to" in line]
    assert not found, "\n".join(found)


@pytest.mark.slow                      # the demo, then ~100 pages rendered
def test_no_demo_text_is_under_8_5_pt(demo):
    found = [line for pdf, pages in demo.items() for line in pagecheck.problems(pdf, pages) if " pt, under " in line]
    assert not found, "\n".join(found)
    assert all(p.min_pt is not None for pages in demo.values() for p in pages)   # every page carries text


@pytest.mark.slow                      # the demo, then ~100 pages rendered
def test_no_demo_document_prints_a_local_path(demo):
    found = [line for pdf, pages in demo.items() for line in pagecheck.problems(pdf, pages) if "local path" in line]
    assert not found, "\n".join(found)
