"""The documents as a reader sees them: paper, page fill, type size, the work order's steps.

Sources named beside each check:
- paper sizes: ISO 216 (A4 210 x 297 mm) and ANSI/ASME Y14.1 US Letter (8.5 x 11 in = 215.9 x 279.4 mm);
- type size: 8.5 pt as the smallest text on a shop document read at arm's length (common practice);
- the PDFs are read back by pypdf and by poppler (pdftotext, pdftoppm): programs apart from WeasyPrint,
  which wrote them (tests/pdf_measure.py and tools/pagecheck.py say how each figure is taken). Page fill
  of every demo PDF: tests/test_demo_pages.py.
All parts are the invented demo scenario (Brindle Hollow Coil Works).
"""

from __future__ import annotations

import dataclasses
import re
import sys
from pathlib import Path

import pytest
from pdf_measure import page_sizes_mm

from specgen.api import demo_specs, run_design
from specgen.catalog.loader import load_catalog
from specgen.design.spec import load_spec
from specgen.documents import workorder as wo
from specgen.documents.render import html_to_pdf
from specgen.documents.settings import DocumentSettings

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tools"))
import pagecheck

PAPERS = {"A4": (210.0, 297.0), "Letter": (215.9, 279.4)}


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def designs(cat):
    return {d.part: d for d in (run_design(load_spec(p), cat) for p in demo_specs())}


def _on(cat, paper):
    docs = dataclasses.replace(cat.shop.documents, paper=paper)
    return dataclasses.replace(cat, shop=dataclasses.replace(cat.shop, documents=docs))


def _work_order_pdf(d, cat, tmp_path, name="wo"):
    html = wo.render_work_order_html(d, DocumentSettings.from_shop(cat.shop), number="WO-T-1", qty=50, lot="L1",
                                     issued="2026-12-02")
    pdf = tmp_path / f"{name}.pdf"
    pdf.write_bytes(html_to_pdf(html))
    return pdf


@pytest.mark.parametrize("paper", sorted(PAPERS))
def test_drawings_fit_the_text_width_so_they_print_to_scale(cat, designs, paper):
    # a figure wider than the text is shrunk by the renderer and its stated scale is then wrong
    # (BH-1042's window section was 192 mm on a 184 mm A4 text width: 4 % off its 2:1)
    c = _on(cat, paper)
    text_width = PAPERS[paper][0] - 2 * wo.SIDE_MARGIN_MM
    for d in designs.values():
        drawings = wo._drawings(d, DocumentSettings.from_shop(c.shop))
        for key in ("pin_svg", "window_svg"):
            assert wo._svg_width_mm(drawings[key]) <= text_width + 1e-6, (d.part, key)


@pytest.mark.parametrize("paper", sorted(PAPERS))
def test_work_order_paper_and_type_size(cat, designs, tmp_path, paper):
    pdf = _work_order_pdf(designs["BH-1042"], _on(cat, paper), tmp_path)
    # portrait, but for the test record's pages at the end, which turn the paper (landscape)
    sizes = page_sizes_mm(pdf)
    turned = [i for i, size in enumerate(sizes) if size == pytest.approx(PAPERS[paper][::-1], abs=0.2)]
    assert turned and turned == list(range(turned[0], len(sizes)))
    assert all(size == pytest.approx(PAPERS[paper], abs=0.2) for size in sizes[:turned[0]])
    # 8.5 pt or more everywhere, drawings included (the header labels were 7 pt)
    assert min(pagecheck.font_sizes(pdf)) >= pagecheck.MIN_PT - pagecheck.PT_TOLERANCE


@pytest.mark.parametrize("part", ["BH-1042", "BH-2210", "BH-3305", "BH-4120", "BH-5018"])
def test_every_work_order_terminates_the_leads_and_marks_the_part(cat, designs, part):
    d = designs[part]
    ctx = wo.build_context(d, DocumentSettings.from_shop(cat.shop), number="WO-T-1", qty=10)
    steps = ctx["steps"] + ([{"heading": "varnish", "n": ctx["varnish"]["n"]}] if ctx["varnish"] else []) \
        + ctx["after_varnish"]
    headings = [s["heading"] for s in steps]
    assert [s["n"] for s in steps] == list(range(1, len(steps) + 1))          # numbered in order
    term = next(i for i, h in enumerate(headings) if h in ("Terminate the leads on the pins",
                                                            "Prepare and tag the leads"))
    assert headings[-1] == "Mark and label"
    if d.core.shape != "toroid" and "Assemble the core" in headings:
        assert term < headings.index("Assemble the core")       # onto the pins before the core closes
    term_text = " ".join(steps[term]["lines"])
    for w in d.windings:                                        # every winding's ends, from the Design
        assert f"{w.name}: start on" in term_text and f"finish on {'lead' if d.core.shape == 'toroid' else 'pin'} " \
            f"{w.finish}" in term_text
    mark_text = " ".join(steps[-1]["lines"])
    assert f"{d.part} rev {d.revision}" in mark_text and "WO-T-1" in mark_text


def test_counts_on_the_work_order_read_in_the_right_number(cat, designs):
    html = wo.render_work_order_html(designs["BH-3305"], DocumentSettings.from_shop(cat.shop), number="WO-T-1", qty=10)
    assert "2 halves to a set" in html and not re.search(r"\w\(s\)", html)
    assert wo.in_number("1 set(s) of 2 piece(s)") == "1 set of 2 pieces"
