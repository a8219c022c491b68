"""The printed test record: one row per piece of the whole lot, a column for every test the station runs, wide
enough to write in, and the DCR correction to 20 degC worked through.

Outside references: the HTML is read back with the standard library's ``html.parser``; the PDF with poppler
(``pdftotext``) and pypdf through ``tools/pagecheck.py``, programs apart from WeasyPrint, which wrote it; the
correction R20 = Rt / (1 + alpha20 (t - 20)) with alpha20 = 0.00393 /K is the published figure for annealed
copper (IEC 60028). Row and column sizes are common practice for ruled forms. Demo parts only (invented).
"""

from __future__ import annotations

import dataclasses
import re
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

from specgen.api import demo_specs
from specgen.catalog.loader import load_catalog
from specgen.demo.run import DEMO_LOT_QTY
from specgen.documents import test_record as tr
from specgen.documents.settings import DocumentSettings
from specgen.documents.workorder import SIDE_MARGIN_MM, render_work_order_html
from specgen.station.plan import station_columns

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tools"))
import pagecheck

ALPHA20_IEC_60028 = 0.00393


@pytest.fixture(scope="module")
def settings():
    return DocumentSettings.from_shop(load_catalog(None).shop)


class _Record(HTMLParser):
    """Each record table as (column keys, [(serial, cells in the row)])."""

    def __init__(self) -> None:
        super().__init__()
        self.tables: list[tuple[list[str], list[tuple[str, int]]]] = []
        self._in = False
        self._cell: str | None = None
        self._row: list[str] | None = None

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        if tag == "table" and "wo-record-grid" in (a.get("class") or ""):
            self._in = True
            self.tables.append(([], []))
        elif self._in and tag == "th":
            self.tables[-1][0].append(a.get("data-key", ""))
        elif self._in and tag == "tr":
            self._row = []
        elif self._in and tag == "td":
            self._cell = ""

    def handle_data(self, data):
        if self._cell is not None:
            self._cell += data

    def handle_endtag(self, tag):
        if tag == "table" and self._in:
            self._in = False
        elif tag == "td" and self._cell is not None and self._row is not None:
            self._row.append(self._cell.strip())
            self._cell = None
        elif tag == "tr" and self._row:
            self.tables[-1][1].append((self._row[0], len(self._row)))
            self._row = None


def _record_tables(html: str):
    p = _Record()
    p.feed(html)
    return p.tables


@pytest.mark.parametrize("part", [p.stem for p in demo_specs()])
def test_every_piece_of_the_lot_has_a_row_and_every_test_a_column(part, demo_designs, settings):
    d = demo_designs[part]
    html = render_work_order_html(d, settings, number="WO-TEST-1", qty=DEMO_LOT_QTY, lot=f"DEMO-{part}")
    tables = _record_tables(html)
    assert tables
    tests = [c.key for c in station_columns(d)]
    own = ["temp"] * any(c.kind == "dcr" for c in station_columns(d)) + ["verdict", "initials"]
    by_group: dict[tuple[str, ...], list[str]] = {}
    for keys, rows in tables:
        assert keys[0] == "sn"
        for sn, cells in rows:
            assert cells == len(keys), f"{part}: serial {sn} has {cells} cells for {len(keys)} columns"
        by_group.setdefault(tuple(keys), []).extend(sn for sn, _ in rows)
    # every test of the station in exactly one column group, in the station's order, and the record's own
    shown = [k for keys in by_group for k in keys if k != "sn"]
    assert sorted(shown) == sorted(tests + own) and len(shown) == len(set(shown))
    assert [k for k in shown if k in tests] == tests
    # each column group lists every serial of the lot once, in order: a row per piece, no "..."
    for keys, serials in by_group.items():
        assert serials == [str(i) for i in range(1, DEMO_LOT_QTY + 1)], f"{part} {keys[1:3]}"
    assert "…" not in "".join(sn for _, rows in tables for sn, _ in rows)


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_columns_are_wide_enough_to_write_in_and_pages_are_evenly_filled(paper, demo_designs, settings):
    portrait = {"A4": (0.210, 0.297), "Letter": (0.2159, 0.2794)}[paper]
    s = dataclasses.replace(settings, paper=paper, paper_width_m=portrait[0], paper_height_m=portrait[1])
    for part, d in demo_designs.items():
        for qty in (1, 7, DEMO_LOT_QTY, 233):
            rec = tr.build_record(d, qty, s, SIDE_MARGIN_MM)
            across = portrait[1] * 1e3 - 2 * SIDE_MARGIN_MM
            for p in rec.pages:
                assert sum(c.width_mm for c in p.columns) <= across + 1e-9
                assert min(c.width_mm for c in p.columns) >= 12.0       # a handwritten reading
                assert len(p.serials) <= rec.rows_per_page
            sizes = [len(p.serials) for p in rec.pages]
            assert max(sizes) - min(sizes) <= 1, f"{part} {qty}: pages of {sizes} rows"
            assert sum(sizes) == qty * rec.pages[0].groups
            # landscape body height / 8 mm rows under the heads, never more rows than fit
            body = portrait[0] * 1e3 - 39 - 15 - tr.RECORD_HEAD_MM
            assert rec.rows_per_page * tr.ROW_MM <= body and max(sizes) * rec.row_mm <= body + 0.05
            assert tr.ROW_MM <= rec.row_mm <= tr.ROW_MAX_MM


def test_the_dcr_correction_is_printed_worked_through(demo_designs, settings):
    d = demo_designs["BH-1042"]
    rec = tr.build_record(d, 10, settings, SIDE_MARGIN_MM)
    # the factor table: R20 = Rt / (1 + alpha (t - 20)), IEC 60028's alpha for annealed copper
    for t_text, k in rec.factors:
        t = float(t_text.split()[0])
        assert float(k) == pytest.approx(1 / (1 + ALPHA20_IEC_60028 * (t - 20)), abs=5e-5)
    # the worked example: read at 24 degC, referred back to the nominal at 20 degC
    m = re.search(r"read ([0-9.]+) Ω at a winding temperature of 24 °C; R20 = [0-9.]+ Ω / \(1 \+ 0\.00393 × "
                  r"\(24 − 20\)\) = ([0-9.]+) Ω", rec.worked)
    assert m, rec.worked
    rt, r20 = float(m.group(1)), float(m.group(2))
    assert r20 == pytest.approx(d.tests.dcr[0].nominal, rel=5e-4)
    assert rt / (1 + ALPHA20_IEC_60028 * 4) == pytest.approx(r20, rel=5e-4)
    html = render_work_order_html(d, settings, number="WO-TEST-1", qty=10)
    assert "IEC 60028" in html and "0.00393" in html and rec.worked.split(":")[0] in html


@pytest.mark.slow                       # one PDF rendered and read back
def test_the_printed_record_reads_well(demo_designs, settings, tmp_path):
    """BH-1240 (the most tests): the record's pages are landscape, hold every serial as printed text, no text
    under 8.5 pt, and no page of the work order is under half full without a reason (tools/pagecheck.py)."""
    from specgen.documents.render import html_to_pdf

    d = demo_designs["BH-1240"]
    html = render_work_order_html(d, settings, number="WO-TEST-1", qty=DEMO_LOT_QTY, lot="DEMO-BH-1240")
    pdf = tmp_path / "WO-TEST-1.pdf"
    pdf.write_bytes(html_to_pdf(html))
    pages = pagecheck.check(pdf)
    assert pagecheck.problems(pdf, pages) == []
    record = [p for p in pages if re.search(r"Test record BH-1240 rev \S+, lot", p.text)]
    rec = tr.build_record(d, DEMO_LOT_QTY, settings, SIDE_MARGIN_MM)
    assert len(record) == len(rec.pages)
    for page, model in zip(record, rec.pages):
        assert page.paper_mm[0] > page.paper_mm[1]                        # landscape
        words = subprocess.run(["pdftotext", "-f", str(page.page), "-l", str(page.page), str(pdf), "-"],
                               capture_output=True, text=True, check=True).stdout.split()
        assert set(model.serials) <= set(words)
