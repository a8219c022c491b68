"""Tests for the quote: cost model (specgen.quote), the quote document and ``specgen quote``.

Sources named beside each check:
- the hand-computed build-up re-does the arithmetic of the rules stated in specgen/quote.py's
  docstring with Python's decimal module, from the Design's lengths/masses/turns and the catalogue
  prices written out below (invented demo figures, catalog/*.yaml); it calls none of the cost code.
- overhead on direct labor and profit margin as a fraction of the selling price, price = cost / (1 - profit margin):
  common practice in custom-magnetics quoting (the convention specgen.quote chooses and states).
- rounding to the cent, half up: the commercial rounding rule, checked against decimal.ROUND_HALF_UP
  and against banker's rounding on a tie where the two differ.
- the PDF's text is read back with pypdf, an independent PDF reader.
All parts, prices and customers are the invented demo scenario (Brindle Hollow Coil Works).
"""

from __future__ import annotations

import csv
import dataclasses
import datetime as dt
import io
import json
import re
import subprocess
import sys
from decimal import ROUND_HALF_EVEN, ROUND_HALF_UP, Decimal
from pathlib import Path

import pypdf
import pytest
from conftest import blank_recorded_fingerprint
from typer.testing import CliRunner

from specgen import quote as qm
from specgen.api import demo_specs, run_design
from specgen.catalog.loader import load_catalog
from specgen.design.result import Check
from specgen.design.spec import load_spec
from specgen.errors import DesignFailed, SpecError
from specgen.prices import price_list

DEMO = Path(__file__).resolve().parent.parent / "specgen" / "demo"
ISSUED = dt.date(2026, 11, 2)


def D(x) -> Decimal:
    """A float from the Design as the decimal it prints as (the test's own conversion)."""
    return Decimal(repr(x)) if isinstance(x, float) else Decimal(x)


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def designs(cat):
    out = {}
    for path in demo_specs():
        spec = load_spec(path)
        out[spec.part] = (path, spec, run_design(spec, cat))
    return out


# ------------------------------------------------------------------------------------------------ by hand

# Shop figures (demo scenario, catalog/shop.yaml): written out here, checked against the catalogue.
LABOR_RATE = Decimal("38.00")        # per hour
OVERHEAD = Decimal("0.45")           # on direct labor
PROFIT_MARGIN = Decimal("0.22")             # of the selling price
SETUP_S = Decimal("2700")            # 0.75 h per lot
SCRAP = Decimal("0.03")              # on wire
# labor time model (catalog/shop.yaml labor:, invented demo figures)
BOBBIN_TPM = Decimal("600")
FINE_BELOW_M, FINE_FACTOR = 0.15e-3, Decimal("1.6")
HEAVY_ABOVE_M, HEAVY_FACTOR = 1.2e-3, Decimal("2.0")
PER_WINDING, PER_WRAP, PER_TERM = Decimal("90"), Decimal("20"), Decimal("30")
CORE_ASSEMBLY, PER_LAMINATION = Decimal("120"), Decimal("0.8")
IMPREGNATION, TEST = Decimal("60"), Decimal("150")
# lot-size terms (catalog/shop.yaml quote_terms:, invented demo figures)
LEARNING_FIRST, LEARNING_RATE = 1.8, 0.9
BREAKS_BY_MASS = ((10.0, Decimal("0.04")), (50.0, Decimal("0.08")))       # kg of one item in the lot
BREAKS_BY_COUNT = ((500, Decimal("0.05")), (2500, Decimal("0.10")))        # pieces of one item in the lot

# BH-1042's catalogue prices (catalog/cores.yaml, wires.yaml, bobbins.yaml, insulation.yaml)
LAMINATION_PER_KG = Decimal("3.00")                       # EI-125, price_unit kg
BOBBIN = Decimal("1.12")                                  # BOB-EI125-32
WIRE_PER_KG = {"AWG27-G2": Decimal("15.83"), "CU-1.12-G2": Decimal("15.08")}
TAPE = {"TAPE-PET25-44MM": (Decimal("0.044"), Decimal("1.80")),     # (width m, price per m2)
        "TAPE-PET50-44.5MM": (Decimal("0.0445"), Decimal("2.40")),
        "TAPE-MARGIN-2MM": (Decimal("0.002"), Decimal("3.20"))}
SLEEVING_PER_M = {"SLV-GLSIL-1.0": Decimal("0.35")}
VARNISH_PER_L = {"VAR-PEI-F": Decimal("9.50")}


def test_written_out_prices_are_the_catalogue_s(cat):
    # guards the hand computation below: if the demo catalogue changes, this says where
    shop = cat.shop
    assert (shop.labor_rate, shop.overhead, shop.profit_margin, shop.scrap_wire) == (LABOR_RATE, OVERHEAD, PROFIT_MARGIN, SCRAP)
    assert D(shop.setup_time_s) == SETUP_S
    assert cat.cores["EI-125"].price == LAMINATION_PER_KG and cat.cores["EI-125"].price_unit == "kg"
    assert cat.bobbins["BOB-EI125-32"].price == BOBBIN
    for wid, price in WIRE_PER_KG.items():
        assert cat.wires[wid].price_per_kg == price
    for tid, (width, price) in TAPE.items():
        assert D(cat.tapes[tid].width_m) == width and cat.tapes[tid].price_per_m2 == price
    assert cat.sleevings["SLV-GLSIL-1.0"].price_per_m == SLEEVING_PER_M["SLV-GLSIL-1.0"]
    assert cat.varnishes["VAR-PEI-F"].price_per_litre == VARNISH_PER_L["VAR-PEI-F"]
    terms = shop.documents.terms
    assert (terms.learning_first_unit, terms.learning_rate) == (LEARNING_FIRST, LEARNING_RATE)
    assert tuple((b.threshold, b.discount) for b in terms.breaks_by_mass) == BREAKS_BY_MASS
    assert tuple((b.threshold, b.discount) for b in terms.breaks_by_count) == BREAKS_BY_COUNT
    model = qm.time_model(shop)
    assert model.bobbin_turns_per_minute == BOBBIN_TPM and model.per_lamination_s == PER_LAMINATION
    assert model.fine_wire_below_m == pytest.approx(FINE_BELOW_M) and model.heavy_wire_above_m == pytest.approx(HEAVY_ABOVE_M)


def _off(amount, breaks) -> Decimal:
    """The supplier's discount for buying ``amount`` of one item (the highest break reached)."""
    reached = [d for threshold, d in breaks if amount >= threshold]
    return reached[-1] if reached else Decimal(0)


def _hand_learning(n_lot: int) -> Decimal:
    """Mean unit time of a lot / settled time, unit by unit: max(1, F1 n^log2(rate)) (Wright's learning
    curve, unit form, floored at the settled time), summed by brute force."""
    import math

    b = math.log2(LEARNING_RATE)
    mean = sum(max(1.0, LEARNING_FIRST * n ** b) for n in range(1, n_lot + 1)) / n_lot
    return Decimal(repr(round(mean, 6)))


def _hand_material(d, lot: int | None = None) -> tuple[Decimal, Decimal]:
    """BH-1042's material per unit and its copper share, line by line; at a lot size, with the
    suppliers' breaks on what the lot buys of each item (wire by kg with scrap, laminations by kg,
    the bobbin by count)."""
    total = Decimal(0)
    copper = Decimal(0)
    for m in d.materials:
        if m.kind == "laminations":            # priced per kg: mass x price
            off = _off(m.mass_kg * lot, BREAKS_BY_MASS) if lot else 0
            total += D(m.mass_kg) * LAMINATION_PER_KG * (1 - off)
        elif m.kind == "bobbin":               # one piece
            off = _off(m.quantity * lot, BREAKS_BY_COUNT) if lot else 0
            total += D(m.quantity) * BOBBIN * (1 - off)
        elif m.kind == "wire":                 # mass x price per kg x (1 + scrap)
            off = _off(m.mass_kg * lot * (1 + float(SCRAP)), BREAKS_BY_MASS) if lot else 0
            line = D(m.mass_kg) * WIRE_PER_KG[m.id] * (1 + SCRAP) * (1 - off)
            total += line
            copper += line
        elif m.kind == "tape":                 # length x width x price per m2
            width, per_m2 = TAPE[m.id]
            total += D(m.quantity) * width * per_m2
        elif m.kind == "sleeving":             # metres x price per metre
            total += D(m.quantity) * SLEEVING_PER_M[m.id]
        elif m.kind == "varnish":              # litres x price per litre
            total += D(m.quantity) * VARNISH_PER_L[m.id]
        else:
            raise AssertionError(f"BH-1042 has no {m.kind} line in the hand computation")
    return total, copper


def _hand_run_seconds(d, layer_tape_wraps: int) -> Decimal:
    """BH-1042's run time per unit (a bobbin part), operation by operation."""
    seconds = Decimal(0)
    for w in d.windings:
        factor = Decimal(1)
        if w.overall_diameter_m > HEAVY_ABOVE_M:
            factor = HEAVY_FACTOR
        elif w.overall_diameter_m < FINE_BELOW_M:
            factor = FINE_FACTOR
        seconds += Decimal(w.turns) * 60 / BOBBIN_TPM * factor          # winding
        for s in w.sections:
            seconds += PER_WINDING                                       # one pass per section
            seconds += (len(s.layers) - 1) * layer_tape_wraps * PER_WRAP  # tape between layers
            seconds += s.tape_after_layers * PER_WRAP                    # wraps after the section
        seconds += (len(w.sections) + 1) * PER_TERM                      # start, finish, tie pins
    seconds += d.core.count * CORE_ASSEMBLY + 2 * d.core.laminations * PER_LAMINATION   # E and I pieces
    seconds += IMPREGNATION + TEST                                       # varnished part, tested
    return seconds


def test_bh1042_build_up_reproduced_to_the_cent(cat, designs):
    _path, spec, d = designs["BH-1042"]
    assert d.core.shape == "EI" and spec.varnish and not any(w.wire_kind == "litz" for w in d.windings)
    material, copper = _hand_material(d)
    run_s = _hand_run_seconds(d, spec.layer_tape.layers)
    q = qm.build_quote(spec, d, cat, (100, 500, 2500), issued=ISSUED)
    assert q.material_per_unit == material
    assert q.copper_per_unit == copper
    assert q.run_time_s == run_s
    for b in q.breaks:
        material, copper = _hand_material(d, b.quantity)               # suppliers' breaks on the lot
        learning = _hand_learning(b.quantity)
        assert b.learning == learning
        labor = (run_s * learning + SETUP_S / b.quantity) / 3600 * LABOR_RATE   # setup amortised over the lot
        overhead = labor * OVERHEAD                                    # overhead on labor only
        cost = material + labor + overhead
        price = (cost / (1 - PROFIT_MARGIN)).quantize(Decimal("0.01"), rounding=ROUND_HALF_UP)
        assert b.cost == cost
        assert b.unit_price == price, b.quantity
        assert b.extended == price * b.quantity
        # copper sensitivity: only the copper wire lines move, by 20 % of themselves
        high = ((cost + copper * Decimal("0.2")) / (1 - PROFIT_MARGIN)).quantize(Decimal("0.01"), rounding=ROUND_HALF_UP)
        low = ((cost - copper * Decimal("0.2")) / (1 - PROFIT_MARGIN)).quantize(Decimal("0.01"), rounding=ROUND_HALF_UP)
        assert (b.unit_price_copper_low, b.unit_price_copper_high) == (low, high)


def test_profit_margin_is_on_price_and_overhead_on_labor_only(cat, designs):
    # common practice (the convention chosen): profit margin / price == 22 %; material carries no overhead
    _path, spec, d = designs["BH-5018"]
    q = qm.build_quote(spec, d, cat, (1000,), issued=ISSUED)
    b = q.breaks[0]
    exact_price = b.cost / (1 - PROFIT_MARGIN)
    assert abs((exact_price - b.cost) / exact_price - PROFIT_MARGIN) < Decimal("1e-20")   # 28-digit context
    assert b.overhead == b.labor * OVERHEAD
    assert b.cost == b.material + b.labor + b.overhead


# ------------------------------------------------------------------------------------------------ behaviour

@pytest.mark.parametrize("part", ["BH-1042", "BH-2210", "BH-3305", "BH-4120", "BH-5018"])
def test_unit_price_falls_as_quantity_rises(cat, designs, part):
    # setup per lot amortised over the quantity (the issue's rule); prices never rise with quantity
    _path, spec, d = designs[part]
    q = qm.build_quote(spec, d, cat, (1, 10, 100, 1000, 10000), issued=ISSUED)
    prices = [b.unit_price for b in q.breaks]
    assert prices == sorted(prices, reverse=True) and len(set(prices)) == len(prices)
    setups = [b.setup for b in q.breaks]
    assert all(a == 10 * b for a, b in zip(setups, setups[1:]))   # 1/N exactly


@pytest.mark.parametrize("part", ["BH-1042", "BH-2210", "BH-3305", "BH-4120", "BH-5018"])
def test_copper_plus_and_minus_20_percent_move_only_the_copper_share(cat, designs, part):
    _path, _spec, d = designs[part]
    prices = price_list(cat, d)
    base = qm.material_lines(d, prices)
    for factor in (Decimal("0.8"), Decimal("1.2")):
        moved = qm.material_lines(d, prices, factor)
        for a, b in zip(base, moved):
            if a.copper:
                assert b.amount == a.amount * factor           # exactly, in Decimal
            else:
                assert b.amount == a.amount
        delta = qm.material_total(moved) - qm.material_total(base)
        assert delta == (factor - 1) * qm.copper_total(base)
    assert qm.copper_total(base) > 0   # every demo part has copper wire


def test_cent_rounding_is_half_up_not_bankers():
    # 2.665 is a tie: half up gives 2.67, half even 2.66
    tie = Decimal("2.665")
    assert qm.cents(tie) == Decimal("2.67") == tie.quantize(Decimal("0.01"), rounding=ROUND_HALF_UP)
    assert tie.quantize(Decimal("0.01"), rounding=ROUND_HALF_EVEN) != qm.cents(tie)
    assert qm.cents(Decimal("2.66499999")) == Decimal("2.66")


def _floats_in(obj, where="quote"):
    """Every float inside a value (dataclasses, tuples, dicts), with its path."""
    if isinstance(obj, float):
        yield where
    elif dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        for f in dataclasses.fields(obj):
            yield from _floats_in(getattr(obj, f.name), f"{where}.{f.name}")
    elif isinstance(obj, dict):
        for k, v in obj.items():
            yield from _floats_in(v, f"{where}[{k!r}]")
    elif isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            yield from _floats_in(v, f"{where}[{i}]")


def test_money_is_decimal_everywhere(cat, designs):
    _path, spec, d = designs["BH-2210"]
    q = qm.build_quote(spec, d, cat, (100, 500), nre=Decimal("1250"), issued=ISSUED)
    # the summary holds test volts, the Design and the shop's terms SI floats and kg thresholds: not money
    money_view = dataclasses.replace(q, design_summary={}, design=None, shop_documents=None)
    assert list(_floats_in(money_view)) == []
    for b in q.breaks:
        for f in dataclasses.fields(b):
            value = getattr(b, f.name)
            assert isinstance(value, int if f.name == "quantity" else Decimal), f.name
        assert b.unit_price.as_tuple().exponent == -2
    assert isinstance(q.nre, Decimal) and q.nre == Decimal("1250.00")
    # the JSON carries amounts as exact decimal strings, never JSON numbers
    data = json.loads(json.dumps(q.to_dict()))
    for b in data["breaks"]:
        for key, value in b.items():
            if key != "quantity":
                assert isinstance(value, str) and Decimal(value).is_finite()


def test_clips_have_no_catalogue_price_and_are_not_charged(cat, designs):
    _path, spec, d = designs["BH-2210"]
    q = qm.build_quote(spec, d, cat, (100,), issued=ISSUED)
    clips = [m for m in q.materials if m.kind == "clip"]
    assert clips and all(m.amount == 0 for m in clips)
    assert any("clips" in n for n in q.notes)


def test_validity_nre_and_identity(cat, designs):
    _path, spec, d = designs["BH-3305"]
    q = qm.build_quote(spec, d, cat, (250,), nre=Decimal("499.995"), valid_days=45, issued=ISSUED)
    assert q.valid_until == ISSUED + dt.timedelta(days=45)
    assert q.nre == Decimal("500.00")                              # half up
    assert (q.part, q.revision, q.customer) == (d.part, d.revision, d.customer)
    assert q.fingerprint_short == d.fingerprint[:12] and len(q.fingerprint_short) == 12


def test_failed_design_is_refused(cat, designs):
    _path, spec, d = designs["BH-5018"]
    bad = dataclasses.replace(d, checks=d.checks + (Check("fail", "saturation", "core saturates"),))
    with pytest.raises(DesignFailed):
        qm.build_quote(spec, bad, cat, (100,), issued=ISSUED)


def test_obsolete_revision_is_a_user_error(cat, designs):
    _path, spec, d = designs["BH-5018"]
    with pytest.raises(SpecError, match="obsolete"):
        qm.build_quote(spec, dataclasses.replace(d, status="obsolete"), cat, (100,), issued=ISSUED)


def test_draft_is_budgetary_and_a_consistent_release_is_firm(cat, designs, tmp_path):
    path, spec, d = designs["BH-5018"]
    text = blank_recorded_fingerprint(Path(path).read_text(encoding="utf-8"))
    assert 'fingerprint: ""' in text
    released = tmp_path / "BH-5018.yaml"
    released.write_text(text.replace('fingerprint: ""', f'fingerprint: "{d.fingerprint}"'), encoding="utf-8")
    s2 = load_spec(released)
    q = qm.build_quote(s2, run_design(s2, cat), cat, (100,), issued=ISSUED)
    assert q.budgetary is None
    draft = tmp_path / "draft.yaml"
    draft.write_text(text.replace("status: released", "status: draft"), encoding="utf-8")
    s3 = load_spec(draft)
    q3 = qm.build_quote(s3, run_design(s3, cat), cat, (100,), issued=ISSUED)
    assert q3.budgetary and "draft" in q3.budgetary


def test_time_model_is_the_shop_figures_typed_at_load(cat):
    """The quote reads the labor figures the loader typed (bad ones are caught by `catalog check`)."""
    model = qm.time_model(cat.shop)
    assert model is cat.shop.labor
    assert model.bobbin_turns_per_minute == Decimal(600) and model.per_winding_s == Decimal(90)


@pytest.mark.parametrize("table,kind", [("bobbins", "bobbin"), ("wires", "wire")])
def test_a_stock_item_the_catalogue_does_not_price_is_refused_by_name(cat, designs, table, kind):
    # the price list carries only what the catalogue has; the quote names the missing item and its key
    _path, spec, d = designs["BH-1042"]
    item = next(m.id for m in d.materials if m.kind == kind)
    with pytest.raises(SpecError) as err:
        qm.build_quote(spec, d, dataclasses.replace(cat, **{table: {}}), (100,), issued=ISSUED)
    assert str(err.value).count(f"the catalogue has no {kind} '{item}' to price") == 1
    assert err.value.path == f"{table}.{item}"


def test_profit_margin_of_100_percent_is_refused(cat):
    shop = dataclasses.replace(cat.shop, profit_margin=Decimal(1))
    with pytest.raises(SpecError, match="profit margin"):
        qm.unit_price(Decimal(1), Decimal(1), Decimal(1), 10, shop)


@pytest.mark.parametrize("text", ["0", "abc", "-5", "", "  ", "100,,500", "1.5", "100,100", "1e3"])
def test_bad_quantities_are_one_line_errors(text):
    with pytest.raises(SpecError) as err:
        qm.parse_quantities(text)
    assert err.value.path == "--qty" and "\n" not in str(err.value)


def test_quantities_are_sorted_whole_numbers():
    assert qm.parse_quantities(" 2500, 100 ,500") == (100, 500, 2500)


# ------------------------------------------------------------------------------------------------ CLI + PDF

runner = CliRunner()


def _app():
    from specgen.cli import app

    return app


def _pdf_text(path: Path) -> tuple[int, str]:
    reader = pypdf.PdfReader(str(path))
    return len(reader.pages), "\n".join(p.extract_text() for p in reader.pages)


def test_pdf_holds_every_break_and_its_json_unit_price(tmp_path):
    # one run: --json to stdout, the PDF into --out; pypdf reads the PDF back
    spec = DEMO / "BH-1042.yaml"
    result = runner.invoke(_app(), ["quote", str(spec), "--qty", "100,500,2500", "--json", "--out", str(tmp_path),
                                    "--nre", "1500"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.stdout)
    # an issued quote takes its register number and is filed under it
    assert data["reference"] == data["number"] and re.fullmatch(r"Q-\d{4}-\d{5}", data["number"])
    pdf = tmp_path / f"{data['number']}-{data['part']}-rev{data['revision']}.pdf"
    assert pdf.is_file() and pdf.with_suffix(".html").is_file()
    pages, text = _pdf_text(pdf)
    assert pages == 1
    assert [b["quantity"] for b in data["breaks"]] == [100, 500, 2500]
    for b in data["breaks"]:
        qty = f"{b['quantity']:,}"
        extended = f"{Decimal(b['extended']):,.2f}"
        # one table row: quantity, unit price, extended price, then the copper -20 % / +20 % unit prices
        cells = [qty, b["unit_price"], extended, b["unit_price_copper_minus_20"], b["unit_price_copper_plus_20"]]
        row = re.compile("^" + r"\s+".join(re.escape(c) for c in cells) + r"\s*$", re.M)
        assert row.search(text), (b, text)
    for item in (data["part"], data["customer"], data["valid_until"], "1,500.00"):
        assert item in text
    assert "revision " + data["revision"] in text
    # the fingerprint identifies the design for the shop: it is on the internal copy, not the customer's
    assert data["fingerprint_short"] not in text
    _pages, internal = _pdf_text(pdf.with_name(pdf.stem + "-internal.pdf"))
    assert data["fingerprint"] in internal.replace("\n", "")


def test_twelve_breaks_keep_the_price_table_on_the_first_page(cat, designs, tmp_path):
    from specgen.documents.quote_doc import write_quote

    _path, spec, d = designs["BH-4120"]
    qtys = (1, 5, 10, 25, 50, 100, 250, 500, 1000, 2500, 5000, 10000)
    assert len(qtys) == qm.MAX_BREAKS
    q = qm.build_quote(spec, d, cat, qtys, nre=Decimal("2400"), issued=ISSUED)
    pdf = write_quote(q, tmp_path)[0]
    reader = pypdf.PdfReader(str(pdf))
    first = reader.pages[0].extract_text()
    assert len(reader.pages) <= 2
    assert all(str(b.unit_price) in first for b in q.breaks)


def test_pdf_fetches_nothing_outside_templates(cat, designs, tmp_path):
    from specgen.documents.quote_doc import write_quote

    _path, spec, d = designs["BH-4120"]
    blocked: list = []
    write_quote(qm.build_quote(spec, d, cat, (100,), issued=ISSUED), tmp_path, blocked)
    assert blocked == []          # the quote's own stylesheet is inside templates/; nothing else is asked for


def _local_references(html: str) -> list[str]:
    """Every href/src/@import of an HTML page that names a file (not an anchor, a data: or a web URL)."""
    import re

    refs = re.findall(r"""(?:href|src)\s*=\s*["']([^"']+)["']|@import\s+(?:url\()?["']?([^"')\s;]+)""", html)
    return [a or b for a, b in refs if not (a or b).startswith(("#", "data:", "http:", "https:", "mailto:"))]


def test_saved_quote_and_change_html_stand_on_their_own(cat, designs, tmp_path):
    """The HTML written beside each PDF names no style sheet or other file that is not written with it
    (the quote's and the change summary's style sheets are inlined, as the work order's always was)."""
    from specgen.diff import compare
    from specgen.documents.change_doc import write_change_pdf
    from specgen.documents.quote_doc import write_quote
    from specgen.lifecycle import load_design

    path, spec, d = designs["BH-4120"]
    for written in write_quote(qm.build_quote(spec, d, cat, (100,), issued=ISSUED), tmp_path / "q"):
        if written.suffix == ".html":
            html = written.read_text(encoding="utf-8")
            assert _local_references(html) == [], written.name
            assert ".q-compact" in html or "q-" in html          # the quote's own rules are in the page
    loaded = load_design(spec, cat, str(path))
    out = tmp_path / "c"
    out.mkdir()
    write_change_pdf(compare(loaded, loaded, costs=None), out / "c.pdf", out / "c.html")
    assert _local_references((out / "c.html").read_text(encoding="utf-8")) == []


def test_csv_rows_match_json(tmp_path):
    spec = str(DEMO / "BH-3305.yaml")
    j = json.loads(runner.invoke(_app(), ["quote", spec, "--qty", "10,1000", "--json"]).stdout)
    r = runner.invoke(_app(), ["quote", spec, "--qty", "10,1000", "--csv"])
    assert r.exit_code == 0
    rows = list(csv.DictReader(io.StringIO(r.stdout)))
    assert [int(x["quantity"]) for x in rows] == [10, 1000]
    assert [x["unit_price"] for x in rows] == [b["unit_price"] for b in j["breaks"]]
    assert list(tmp_path.iterdir()) == []          # no --out: nothing written


def test_table_mode_writes_pdf_into_out(tmp_path):
    r = runner.invoke(_app(), ["quote", str(DEMO / "BH-5018.yaml"), "--out", str(tmp_path / "q")])
    assert r.exit_code == 0, r.output
    stem = f"Q-{dt.date.today().year}-00001-BH-5018-revA"
    assert sorted(p.name for p in (tmp_path / "q").glob("*.pdf")) == [f"{stem}-internal.pdf", f"{stem}.pdf"]
    assert "unit price" in r.stdout and "wrote" in r.stdout


@pytest.mark.parametrize("qty", ["0", "abc", "-5", ""])
def test_bad_qty_exits_2_with_one_line(qty):
    r = runner.invoke(_app(), ["quote", str(DEMO / "BH-5018.yaml"), f"--qty={qty}"])
    assert r.exit_code == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("--qty:"), r.stderr
    assert "Traceback" not in r.output


@pytest.mark.parametrize("args", [["--nre", "abc"], ["--valid-days", "0"], ["--json", "--csv"]])
def test_other_bad_options_exit_2(args):
    r = runner.invoke(_app(), ["quote", str(DEMO / "BH-5018.yaml"), *args])
    assert r.exit_code == 2 and len(r.stderr.strip().splitlines()) == 1


def test_failed_design_exits_1(monkeypatch, tmp_path):
    import specgen.api as api

    real = api.run_design

    def failing(spec, cat):
        d = real(spec, cat)
        return dataclasses.replace(d, checks=d.checks + (Check("fail", "fit", "the build does not fit"),))

    monkeypatch.setattr(api, "run_design", failing)
    r = runner.invoke(_app(), ["quote", str(DEMO / "BH-5018.yaml"), "--out", str(tmp_path)])
    assert r.exit_code == 1
    assert "FAIL fit" in r.stderr
    assert list(tmp_path.iterdir()) == []          # refused: no half-made quote


@pytest.mark.parametrize("stage", ["render", "register"])
def test_failed_quote_leaves_no_out_folder(monkeypatch, tmp_path, stage):
    """A render that fails, or a register that refuses, leaves no --out folder behind (made only once
    every file is rendered, removed again when the write fails)."""
    import specgen.documents.render as render

    def broken(*_a, **_k):
        raise OSError("the renderer ran out of memory")

    if stage == "render":
        monkeypatch.setattr(render, "html_to_pdf", broken)
    else:
        (tmp_path / "register.sqlite").mkdir()          # a folder where the register file should be
        monkeypatch.setenv("SPECGEN_REGISTER", str(tmp_path / "register.sqlite"))
    out = tmp_path / "quotes" / "today"
    r = runner.invoke(_app(), ["quote", str(DEMO / "BH-5018.yaml"), "--out", str(out)])
    assert r.exit_code != 0
    assert not (tmp_path / "quotes").exists()


def test_json_quote_does_not_import_weasyprint():
    code = ("import sys; from specgen.cli import app\n"
            "try:\n    app(['quote', sys.argv[1], '--json'])\nexcept SystemExit as e:\n    assert not e.code, e.code\n"
            "assert 'weasyprint' not in sys.modules")
    proc = subprocess.run([sys.executable, "-c", code, str(DEMO / "BH-5018.yaml")], capture_output=True, text=True)
    assert proc.returncode == 0, proc.stderr


def test_demo_quotes_writes_one_pdf_per_part(cat, designs, tmp_path):
    from specgen.demo.run import demo_quotes

    said: list = []
    quotes = demo_quotes(designs, cat, tmp_path, echo=said.append)
    assert set(quotes) == {p for p, (_x, _s, d) in designs.items() if not d.failed}
    for part, q in quotes.items():
        assert [b.quantity for b in q.breaks] == [100, 500, 2500]
        pages, text = _pdf_text(tmp_path / f"{part}-rev{q.revision}-quote.pdf")
        assert pages == 1 and str(q.breaks[-1].unit_price) in text
        assert (tmp_path / f"{part}-rev{q.revision}-quote-internal.pdf").is_file()
    assert len(said) == len(designs) + 1


# ------------------------------------------------------------------------------------------------ lot size

def test_learning_factor_matches_a_brute_force_sum_on_the_integral_tail():
    # Wright's learning curve in its unit form, T_n = F1 n^log2(rate), floored at the settled time;
    # 3 million units with rate 97 % run well past the term-by-term part (numpy sums every term here)
    import numpy as np

    first, rate, lot = 2.0, 0.97, 3_000_000
    n = np.arange(1, lot + 1, dtype=float)
    want = np.maximum(1.0, first * n ** np.log2(rate)).sum() / lot
    assert float(qm.learning_factor(lot, first, rate)) == pytest.approx(want, rel=2e-6)
    assert qm.learning_factor(1, first, rate) == Decimal("2.0")           # the first unit: F1 x
    assert qm.learning_factor(10**6, 1.0, 0.9) == Decimal(1)             # no learning stated


def test_a_larger_lot_is_cheaper_by_learning_and_breaks_not_a_flat_spread(cat, designs):
    # the old model's only lot effect was the setup (about 1 % between 500 and 2500): now the unit
    # time falls with the learning curve and the suppliers' breaks take material cost off
    _path, spec, d = designs["BH-1042"]
    q = qm.build_quote(spec, d, cat, (10, 100, 2500), issued=ISSUED)
    small, mid, big = q.breaks
    assert small.learning > mid.learning > big.learning >= 1
    assert small.material_discount < mid.material_discount < big.material_discount
    assert (small.unit_price - big.unit_price) / small.unit_price > Decimal("0.10")


# ------------------------------------------------------------------------------------------------ wording

def test_thin_foil_is_not_charged_as_heavy_wire_and_thick_strip_is(cat):
    model = qm.time_model(cat.shop)
    factor, why = qm.wire_factor("foil", 0.05e-3, model)                # a 0.05 mm foil screen
    assert factor == 1 and why == []
    factor, why = qm.wire_factor("strip", 2.0e-3, model)                 # 2 mm thick strip
    assert why == ["heavy"] and factor == model.heavy_wire_factor


@pytest.mark.parametrize("part", ["BH-4120", "BH-5018"])
def test_a_toroid_is_charged_no_core_assembly(cat, designs, part):
    _path, spec, d = designs[part]
    assert d.core.shape == "toroid"
    ops = [t.operation for t in qm.build_quote(spec, d, cat, (100,), issued=ISSUED).labor]
    assert "assembly" not in ops and "winding" in ops


@pytest.mark.parametrize("part", ["BH-1042", "BH-2210", "BH-3305", "BH-4120", "BH-5018"])
def test_counts_read_in_the_right_number(cat, designs, part):
    _path, spec, d = designs[part]
    q = qm.build_quote(spec, d, cat, (100,), issued=ISSUED)
    text = qm.quote_table(q)
    assert "(s)" not in text and "(es)" not in text
    assert not re.search(r"\b1 (core sets|terminations|tape wraps|winding passes)\b", text)


def test_powder_core_is_named_as_a_material_not_an_application(cat, designs):
    _path, spec, d = designs["BH-5018"]
    q = qm.build_quote(spec, d, cat, (100,), issued=ISSUED)
    assert d.frequency_hz >= 10e3
    core = q.design_summary["core"]
    assert "iron powder" in core and "50/60 Hz" not in core and "chokes" not in core


# ------------------------------------------------------------------------------------------------ two copies

def _copies(cat, designs, part, tmp_path, quantities=(100, 500, 2500)):
    from specgen.documents.quote_doc import write_quote

    _path, spec, d = designs[part]
    q = qm.build_quote(spec, d, cat, quantities, issued=ISSUED)
    customer_pdf, _html, internal_pdf, _ihtml = write_quote(q, tmp_path)
    return q, d, _pdf_text(customer_pdf)[1], _pdf_text(internal_pdf)[1]


@pytest.mark.parametrize("part", ["BH-1042", "BH-3305", "BH-5018"])
def test_customer_copy_holds_no_turns_fingerprint_or_cost_build_up(cat, designs, tmp_path, part):
    q, d, customer, internal = _copies(cat, designs, part, tmp_path)
    flat = " ".join(customer.split())
    # turn counts: no "turn" at all, and no "<N> t" of any winding
    assert "turn" not in flat.lower()
    for w in d.windings:
        assert not re.search(rf"\b{w.turns} (turns|t)\b", flat)
    # the fingerprint, whole or short
    assert d.fingerprint[:12] not in flat.replace(" ", "") and d.fingerprint[:8] not in flat
    # the internal build-up: its words and its figures
    for word in ("overhead", "margin", "labor", "labour", "learning", "material per", "setup", "scrap"):
        assert word not in flat.lower(), word
    for b in q.breaks:      # a whole figure, not the tail of another (39.62 holds 9.62)
        for figure in (qm.money(b.cost), qm.money(b.material)):
            assert not re.search(rf"(?<![\d.,]){re.escape(figure)}(?!\d)", flat), figure
    # ... all of which the internal copy does carry
    iflat = " ".join(internal.split())
    assert "Internal copy" in iflat and "overhead" in iflat.lower() and "margin" in iflat.lower()
    assert "90 % at each doubling" in iflat and "10 kg: 4 % off" in iflat      # the shop file's lot effects
    assert f"{d.windings[0].turns:,} turns" in iflat
    assert qm.money(q.breaks[0].cost) in iflat


def test_customer_copy_carries_what_a_buyer_needs(cat, designs, tmp_path):
    q, d, customer, _internal = _copies(cat, designs, "BH-1042", tmp_path)
    flat = " ".join(customer.split())
    shop = cat.shop.documents
    buyer = cat.customer(d.customer)
    assert buyer is not None and buyer.name == "Quillfeather Irrigation"
    for text in (cat.shop.name, *shop.address.lines, shop.address.email,            # the shop's letterhead
                 buyer.name, buyer.attention, *buyer.lines, buyer.email,            # the customer's block
                 q.reference, q.valid_until.isoformat(),                            # number and validity
                 "5 weeks", shop.terms.payment, shop.terms.delivery,                # lead time and terms
                 shop.terms.signatory, shop.terms.signatory_title, "Copper clause"):
        assert " ".join(text.split()) in flat, text
    # the ratings, from the Design: input, each output at load, VA, the DCR maxima and the hipot
    assert "230 V" in flat and "60 VA" in flat
    for w in d.windings[1:]:
        assert f"{w.voltage_v:.4g} V at {w.current_a:.4g} A" in flat
    from specgen.documents.workorder import fmt_ohm
    for lim in d.tests.dcr:
        assert f"{lim.item} at most {fmt_ohm(lim.high)}" in flat
    for h in d.tests.hipot:
        assert f"{h.routine_voltage_v:.0f} V a.c." in flat


def test_inductor_ratings_give_inductance_at_current(cat, designs, tmp_path):
    from specgen.documents.quote_doc import ratings
    from specgen.documents.workorder import fmt_henry

    _path, _spec, d = designs["BH-3305"]
    rows = {r.what: r for r in ratings(d)}
    assert "Rated current" in rows and f"{d.inductor.current_dc_a:.4g} A DC" in rows["Rated current"].value
    at_current = [r for r in rows.values() if r.what.startswith("Inductance at")] or \
        [r for r in rows.values() if r.what.startswith("Inductance")]
    assert at_current
    low = min(lim.low for lim in d.tests.inductance if not lim.name.startswith("AL"))
    assert any(fmt_henry(low) in r.value for r in at_current)
    assert not any(r.what.startswith("AL") for r in rows.values())


def test_customer_address_falls_back_to_the_spec_name(cat, designs, tmp_path):
    from specgen.documents.quote_doc import quote_context

    _path, spec, d = designs["BH-2210"]
    q = qm.build_quote(spec, dataclasses.replace(d, customer="Nobody On File Ltd"), cat, (100,), issued=ISSUED)
    ctx = quote_context(q)
    assert ctx["customer"]["name"] == "Nobody On File Ltd" and ctx["customer"]["lines"] == []


@pytest.mark.parametrize("paper,size_mm", [("A4", (210, 297)), ("Letter", (215.9, 279.4))])
def test_quote_paper_follows_the_shop_file(cat, designs, tmp_path, paper, size_mm):
    from specgen.documents.quote_doc import write_quote

    _path, spec, d = designs["BH-2210"]
    shop = dataclasses.replace(cat.shop, documents=dataclasses.replace(cat.shop.documents, paper=paper))
    q = qm.build_quote(spec, d, dataclasses.replace(cat, shop=shop), (100, 500), issued=ISSUED)
    for pdf in write_quote(q, tmp_path)[::2]:
        box = pypdf.PdfReader(str(pdf)).pages[0].mediabox
        # ISO 216 A4 is 210 x 297 mm; US Letter is 8.5 x 11 in
        assert (float(box.width) * 25.4 / 72, float(box.height) * 25.4 / 72) == pytest.approx(size_mm, abs=0.2)


def test_an_ac_reactor_is_quoted_by_its_sine_not_a_ripple(cat):
    # an AC reactor carries the whole sine: no DC and no ripple on it. Its rated current is an rms value and
    # the peak it must carry unsaturated is sqrt(2) x rms for a sine (IEC 60050-103, peak factor of a sine)
    from pathlib import Path

    from specgen.api import run_design
    from specgen.design.spec import load_spec
    from specgen.documents.quote_doc import ratings

    d = run_design(load_spec(Path(__file__).parent / "specs" / "reactor-ei100.yaml"), cat)
    assert not d.inductor.carries_dc
    rows = {r.what: r for r in ratings(d)}
    text = " ".join(f"{r.value} {r.condition}" for r in rows.values())
    assert "ripple" not in text and " DC" not in text
    assert rows["Rated current"].value == "5 A rms"
    assert "50 Hz, sine" in rows["Rated current"].condition
    assert f"{5 * 2 ** 0.5:.4g} A peak" in rows["Rated current"].condition
