"""Safe rendering: text from a spec is escaped in every document, and the renderer fetches nothing but the
project's own templates (no other file://, no http(s)://, no data: URL), whichever text field carries it."""

import re
from pathlib import Path

import pytest

from specgen.api import run_design
from specgen.catalog.loader import load_catalog
from specgen.design.spec import load_spec_text
from specgen.documents import render
from specgen.documents.settings import DocumentSettings

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"
PAYLOADS = {
    "file": '<img src="file:///etc/passwd">',
    "http": '<link rel="stylesheet" href="http://127.0.0.1:9/evil.css">',
    "data": '<img src="data:image/png;base64,iVBORw0KGgo=">',
    "css": '<p style="background: url(file:///etc/shadow)">x</p>',
}
FIELDS = ["title", "customer", "notes"]


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _spec_with(field: str, payload: str):
    text = (DEMO / "BH-5018.yaml").read_text()
    line = re.search(rf"^{field}: .*$", text, re.M)
    value = payload.replace('"', '\\"')
    new = f'{field}: "{value}"'
    text = text[: line.start()] + new + text[line.end():] if line else text.replace("history:", f"{new}\nhistory:", 1)
    return load_spec_text(text, "payload.yaml")


def test_the_fetcher_refuses_each_payload_when_it_is_not_escaped():
    """The last line of defence on its own: raw payloads rendered straight through the fetcher."""
    for name, payload in PAYLOADS.items():
        blocked: list = []
        pdf = render.html_to_pdf(f"<html><body>{payload}</body></html>", blocked)
        assert pdf.startswith(b"%PDF")
        assert blocked, name
        assert all(not u.startswith("file:///work") for u in blocked)


@pytest.mark.parametrize("field", FIELDS)
@pytest.mark.parametrize("kind", sorted(PAYLOADS))
def test_work_order_and_quote_escape_every_text_field(cat, field, kind):
    from specgen.documents.quote_doc import render_quote_html as quote_html
    from specgen.documents.workorder import render_work_order_html
    from specgen.quote import build_quote

    spec = _spec_with(field, PAYLOADS[kind])
    d = run_design(spec, cat)
    html = render_work_order_html(d, DocumentSettings.from_shop(cat.shop), number="WO-T-1", qty=5, due=None, lot=PAYLOADS[kind],
                                  issued="2026-12-01", issued_by=PAYLOADS["file"], draft=True)
    q_html = quote_html(build_quote(spec, d, cat, (10,), allow_failed=True))
    assert PAYLOADS[kind] not in html and "&lt;" in html    # never raw; the escaped text is there instead
    assert PAYLOADS[kind] not in q_html
    if field != "notes":                                    # the customer's quote does not print shop notes
        assert "&lt;" in q_html
    blocked: list = []
    render.html_to_pdf(html, blocked)
    assert blocked == []        # escaped text fetches nothing; the templates' own assets need no fetch
