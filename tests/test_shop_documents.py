"""The shop file's document keys (paper, address, quote_terms) and customers.yaml, as the loader reads them.

Checks: each mistake is one located line (file, line, key path), exit 2 from the command line, as for
every other catalogue key; the keys stay out of the release fingerprint (a new address or payment term
must not void a release). Paper names: ISO 216 A4 and US Letter. All data is the invented demo scenario.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from specgen.api import demo_specs, run_design
from specgen.catalog.loader import load_catalog, resolve_catalog_dir
from specgen.design.spec import load_spec
from specgen.errors import SpecError


@pytest.fixture
def cat_dir(tmp_path, monkeypatch):
    monkeypatch.setenv("SPECGEN_CACHE", "0")
    d = tmp_path / "catalog"
    shutil.copytree(resolve_catalog_dir(None), d)
    return d


def _edit(cat_dir: Path, old: str, new: str) -> None:
    shop = cat_dir / "shop.yaml"
    text = shop.read_text()
    assert old in text, old
    shop.write_text(text.replace(old, new, 1))


def test_shipped_shop_reads_its_documents_and_customers():
    cat = load_catalog(None)
    docs = cat.shop.documents
    assert docs.paper == "A4" and docs.paper_m == (0.210, 0.297)             # ISO 216 A4
    assert docs.address.name == cat.shop.name and docs.address.email.endswith(".invalid")
    assert docs.terms.lead_time_s == 5 * 7 * 86400
    assert [c.name for c in cat.customers.values()] == ["Quillfeather Irrigation", "Larkspur Charging",
                                                        "Morrow Stage Lighting"]
    assert cat.customer("  larkspur   CHARGING ") is cat.customers["LARKSPUR"]
    assert cat.customer("Nobody") is None


@pytest.mark.parametrize("old,new,path", [
    ("paper: A4 ", "paper: A5 ", "shop.paper"),
    ("{from: 10 kg, discount: 4 %}", "{from: 10 kg, discount: 100 %}", "shop.quote_terms.price_breaks.by_mass[0].discount"),
    ("{from: 50 kg, discount: 8 %}", "{from: 5 kg, discount: 8 %}", "shop.quote_terms.price_breaks.by_mass[1].from"),
    ("      rate: 90 %", "      rate: 40 %", "shop.quote_terms.learning.rate"),
    ("    lead_time: 5 weeks", "    lead_time: 5 kg", "shop.quote_terms.lead_time"),
    ("    payment: 30 days", "    paymnet: 30 days", "shop.quote_terms.paymnet"),
])
def test_a_mistake_in_the_document_keys_is_one_located_line(cat_dir, old, new, path):
    _edit(cat_dir, old, new)
    with pytest.raises(SpecError) as err:
        load_catalog(cat_dir)
    e = err.value
    assert e.path == path and e.file.endswith("shop.yaml") and e.line and "\n" not in str(e)


def test_letter_paper_is_read(cat_dir):
    _edit(cat_dir, "paper: A4 ", "paper: letter ")
    docs = load_catalog(cat_dir).shop.documents
    assert docs.paper == "Letter" and docs.paper_m == pytest.approx((0.2159, 0.2794))   # 8.5 x 11 in


def test_document_keys_do_not_touch_a_release_fingerprint(cat_dir):
    # a new address, payment term or paper changes no design: every demo part keeps its fingerprint
    before = {p.name: run_design(load_spec(p), load_catalog(cat_dir)).fingerprint for p in demo_specs()}
    _edit(cat_dir, "paper: A4 ", "paper: Letter ")
    _edit(cat_dir, "payment: 30 days net", "payment: 60 days net")
    _edit(cat_dir, "Unit 4, Tanyard Row", "Unit 9, Tanyard Row")
    after = {p.name: run_design(load_spec(p), load_catalog(cat_dir)).fingerprint for p in demo_specs()}
    assert before == after
    _edit(cat_dir, 'labor_rate: "38.00"', 'labor_rate: "39.00"')      # a price figure changes no part either
    assert {p.name: run_design(load_spec(p), load_catalog(cat_dir)).fingerprint for p in demo_specs()} == before
    _edit(cat_dir, "dcr: 10 %", "dcr: 8 %")                             # a figure the design reads counts
    changed = {p.name: run_design(load_spec(p), load_catalog(cat_dir)).fingerprint for p in demo_specs()}
    assert changed != before


def test_a_customer_without_an_id_is_located(cat_dir):
    path = cat_dir / "customers.yaml"
    path.write_text(path.read_text().replace("  - id: MORROW\n    name:", "  - name:", 1))
    with pytest.raises(SpecError) as err:
        load_catalog(cat_dir)
    assert err.value.path == "customers[2].id" and err.value.file.endswith("customers.yaml")
