"""The quote as two documents: the customer's copy and the shop's internal copy, from one ``Quote``.

Customer's copy (``<part>-rev<R>-quote.pdf``): what a buyer needs to place an order. The shop's
letterhead and the customer's address block (``customers.yaml`` in the catalogue, matched to the
spec's ``customer``), the quote number and validity, the prices per quantity break with the copper
clause and any one-time tooling, the ratings the shop guarantees (read from the Design: voltages,
VA, inductance at current, DCR maximum, hipot, insulation class), lead time, payment and delivery
terms, and who signs. It carries no turn counts, no design fingerprint and no cost build-up: those
are how the shop makes the part, not what it promises.

Internal copy (``<part>-rev<R>-quote-internal.pdf``): the same identity and prices, marked
internal, plus the fingerprint, the construction, and the whole build-up (material lines, labor
operations, learning and suppliers' breaks per lot, overhead, profit margin).

Rendering goes through ``specgen.documents.render`` (one jinja2 environment, the locked-down
WeasyPrint fetcher); the four files (two PDFs, two HTML) are written together atomically.
WeasyPrint is imported only when a PDF is made.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from decimal import Decimal
from pathlib import Path

from ..present import frequency, rating
from ..quote import COPPER_HIGH, COPPER_LOW, Quote, count, money, plain

TEMPLATE = "quote.html"
INTERNAL_SUFFIX = "-internal"

SAFETY_NOTE = ("Test voltages are the shop's defaults; the applicable product safety standard, the "
               "customer's drawing, local codes and licensed practice decide.")

#: CSS page size of each paper the shop file may name (WeasyPrint's names).
CSS_PAPER = {"A4": "A4", "Letter": "letter"}


@dataclass(frozen=True, slots=True)
class Rating:
    """One guaranteed rating as the customer reads it."""

    what: str
    value: str
    condition: str = ""


def _pct_change(factor: Decimal) -> str:
    delta = (factor - 1) * 100
    return f"{'+' if delta > 0 else '−'}{plain(abs(delta))} %"


def _thermal_class(class_c) -> str:
    """'130 (B)': the IEC 60085 class with its letter."""
    from ..standards.thermal_classes import class_label

    return class_label(class_c)


def _weeks(seconds: float | None) -> str:
    if seconds is None:
        return ""
    weeks = seconds / (7 * 86400)
    if abs(weeks - round(weeks)) < 1e-9:
        return count(int(round(weeks)), "week")
    return f"{seconds / 86400:.0f} days"


def _ct_ratings(ct, freq: str) -> list[Rating]:
    """A current transformer's guaranteed figures: ratio, currents, burden, accuracy (from the Design)."""
    return [
        Rating("Ratio", f"{ct.primary_turns}:{ct.secondary_turns}",
               "single primary conductor through the core" if ct.primary_turns == 1 else "wound primary"),
        Rating("Rated primary current", f"{rating(ct.primary_current_a, 'A')}, up to {rating(ct.primary_current_max_a, 'A')}",
               f"{freq}, sine"),
        Rating("Rated burden", f"{rating(ct.burden_ohm, 'ohm')}, secondary {rating(ct.secondary_current_a, 'A')}",
               f"knee burden {rating(ct.knee_burden_ohm, 'ohm')}"),
        Rating("Accuracy", f"ratio error within {max(abs(ct.ratio_error_pct), abs(ct.ratio_error_max_pct)):.2g} %, "
                           f"phase within {max(abs(ct.phase_error_deg), abs(ct.phase_error_max_deg)) * 60:.2g} min",
               "calculated, at the rated burden over the current range"),
    ]


def _cmc_ratings(c, freq: str, limits) -> list[Rating]:
    """A common-mode choke's guaranteed figures: lines, current, voltage, L_CM and the leakage (from the Design)."""
    from .workorder import fmt_henry
    out = [Rating("Lines", f"{c.lines} x {rating(c.line_current_a, 'A')} rms, {rating(c.line_voltage_v, 'V')}", freq)]
    for lim in limits:
        out.append(Rating(lim.name[0].upper() + lim.name[1:], f"{fmt_henry(lim.low)} to {fmt_henry(lim.high)}",
                          lim.item if lim.item != "lines in parallel" else
                          f"lines in parallel, at {c.inductance_frequency_hz / 1e3:g} kHz"))
    return out


def ratings(design) -> list[Rating]:
    """What the shop guarantees, read from the Design: voltages, VA, inductance, DCR, hipot, class."""
    from .workorder import fmt_henry, fmt_ohm, fmt_test_volt

    d = design
    out: list[Rating] = []
    freq = frequency(d.frequency_hz)
    prim = next((w for w in d.windings if w.role == "primary"), None)
    if prim is not None and prim.voltage_v:
        top = f", up to {rating(prim.voltage_max_v, 'V')}" if prim.voltage_max_v and \
            prim.voltage_max_v > prim.voltage_v * 1.0005 else ""
        out.append(Rating(f"Input ({prim.name})", f"{rating(prim.voltage_v, 'V')}{top}", f"{freq}, {d.waveform}"))
    ct = getattr(d, "current_transformer", None)
    if ct is not None:
        out += _ct_ratings(ct, freq)
    ocv = {lim.item: lim for lim in d.tests.open_circuit}
    for w in d.windings:
        if ct is not None or d.flyback is not None or w.role not in ("secondary", "auxiliary") or not w.voltage_v:
            continue
        value = f"{rating(w.voltage_v, 'V')} at {rating(w.current_a, 'A')} (full load)"
        lim = ocv.get(w.name)
        if lim is not None and lim.low is not None and lim.high is not None:
            value += f"; {rating(lim.low, 'V')} to {rating(lim.high, 'V')} (no load)"
        out.append(Rating(f"Output {w.name}", value, "at rated input"))
    if d.output_power_w and d.kind not in ("inductor", "current_transformer", "flyback"):
        out.append(Rating("Rated output", rating(d.output_power_w, "VA"), f"continuous, ambient up to {d.ambient_c:g} °C"))
    if d.flyback is not None:
        fb = d.flyback
        for fw in fb.windings:
            if fw.output_voltage_v is not None:
                out.append(Rating(f"Output {fw.name}", f"{rating(fw.output_voltage_v, 'V')} at {rating(fw.dc_current_a, 'A')} "
                                                       f"DC", "rectified, from the turns ratio, full load"))
        out.append(Rating("Primary inductance", f"{fmt_henry(fb.inductance_h)}", f"{freq} switching, "
                                                                            f"{fb.mode.upper()} at the lowest input"))
    cmc = getattr(d, "common_mode_choke", None)
    if cmc is not None:
        out += _cmc_ratings(cmc, freq, d.tests.inductance)
    if d.inductor is not None and d.flyback is None:
        ind = d.inductor
        if ind.carries_dc:
            out.append(Rating("Rated current", f"{rating(ind.current_dc_a, 'A')} DC",
                              f"{rating(ind.ripple_a, 'A')} peak-to-peak ripple at {freq}" if ind.ripple_a else ""))
        else:                                    # an AC reactor: the whole sine, no DC and no ripple
            out.append(Rating("Rated current", f"{rating(ind.current_dc_a, 'A')} rms",
                              f"{freq}, {d.waveform}; no saturation up to {rating(ind.current_peak_a, 'A')} peak"))
        for lim in d.tests.inductance:
            if lim.name.startswith("AL"):
                continue                         # a bench check of the core set, not a rating
            value = f"at least {fmt_henry(lim.low)}" if lim.high is None else \
                f"{fmt_henry(lim.low)} to {fmt_henry(lim.high)}"
            out.append(Rating(lim.name[0].upper() + lim.name[1:], value, f"winding {lim.item}"))
    dcr = [f"{lim.item} at most {fmt_ohm(lim.high)}" for lim in d.tests.dcr if lim.high is not None]
    if dcr:
        out.append(Rating("DC resistance", "; ".join(dcr), "at 20 °C"))
    hipot = [f"{h.between}: {fmt_test_volt(h.routine_voltage_v)} a.c. for {h.routine_duration_s:g} s"
             for h in d.tests.hipot]
    if hipot:
        out.append(Rating("Dielectric strength", "; ".join(hipot), "every piece, no breakdown"))
    out.append(Rating("Insulation class", f"{_thermal_class(d.insulation_class_c)}, IEC 60085",
                      "varnish impregnated" if any(m.kind == "varnish" for m in d.materials) else ""))
    return out


def _party(p) -> dict | None:
    if p is None:
        return None
    return {"name": p.name, "attention": p.attention, "lines": list(p.lines), "phone": p.phone, "email": p.email}


def _lot_rules(q: Quote) -> str:
    """The shop file's lot effects in words, for the internal copy."""
    terms = q.shop_documents.terms if q.shop_documents is not None else None
    if terms is None:
        return ""
    out = ""
    if terms.learning_first_unit > 1 and terms.learning_rate < 1:
        out += (f"; learning: the first piece takes {terms.learning_first_unit:g} x the settled time, "
                f"{terms.learning_rate * 100:g} % at each doubling")
    for name, unit, breaks in (("kg of one item", "kg", terms.breaks_by_mass),
                               ("pieces of one item", "", terms.breaks_by_count)):
        if breaks:
            steps = ", ".join(f"{b.threshold:g}{' ' + unit if unit else ''}: {plain(b.discount * 100)} % off"
                              for b in breaks)
            out += f"; suppliers' breaks on {name} in the lot: {steps}"
    return out


def _internal(q: Quote) -> dict:
    """The build-up for the shop's own copy: material and labor per unit, and the price per lot."""
    q4 = Decimal("0.0001")
    materials = [{"kind": m.kind, "id": m.id, "quantity": f"{m.quantity.quantize(q4)} {m.unit}",
                  "rate": f"{m.rate.quantize(q4)}", "amount": f"{m.amount.quantize(q4)}",
                  "note": m.note + ("; copper" if m.copper else "")} for m in q.materials]
    labor = [{"operation": t.operation, "item": t.item, "detail": t.detail,
              "seconds": f"{t.seconds.quantize(Decimal('0.1'))}"} for t in q.labor]
    lots = [{"quantity": f"{b.quantity:,}", "learning": f"{b.learning:.3f}",
             "material": money(b.material),
             "discount": f"−{money(b.material_discount)}" if money(b.material_discount) != "0.00" else "0.00",
             "labor": money(b.labor),
             "setup": money(b.setup), "overhead": money(b.overhead), "cost": money(b.cost),
             "profit": money(b.unit_price - b.cost), "unit_price": money(b.unit_price)} for b in q.breaks]
    s = q.design_summary
    windings = []
    for w in s.get("windings", []):
        wire = w["wire"] + (f", {w['strands']} in hand" if w["strands"] > 1 else "")
        windings.append(f"{w['name']}: {count(w['turns'], 'turn')}, {wire}")
    return {
        "fingerprint": q.fingerprint, "materials": materials, "material_total": f"{q.material_per_unit.quantize(q4)}",
        "copper_total": f"{q.copper_per_unit.quantize(q4)}", "labor": labor,
        "run_time": f"{q.run_time_s.quantize(Decimal('0.1'))}", "setup_min": plain(q.setup_time_s / 60),
        "lots": lots, "core": s.get("core", ""), "windings": windings,
        "rules": f"labor {money(q.labor_rate)} per hour; overhead {plain(q.overhead * 100)} % on labor; "
                 f"profit margin {plain(q.profit_margin * 100)} % of the price; wire scrap {plain(q.scrap_wire * 100)} %"
                 + _lot_rules(q),
        "budgetary_detail": q.budgetary_detail,
    }


def quote_context(q: Quote, internal: bool = False) -> dict:
    """Everything the template shows, as display strings (the template does no arithmetic)."""
    cur = q.currency
    breaks = [{"quantity": f"{b.quantity:,}", "unit_price": money(b.unit_price), "extended": money(b.extended),
               "copper_low": money(b.unit_price_copper_low), "copper_high": money(b.unit_price_copper_high)}
              for b in q.breaks]
    copper_kg = sum((m.quantity for m in q.materials if m.copper), Decimal(0))
    docs = q.shop_documents
    terms = docs.terms if docs is not None else None
    paper = docs.paper if docs is not None else "A4"
    shop_party = _party(docs.address) if docs is not None and docs.address is not None else \
        {"name": q.shop_name, "attention": "", "lines": [], "phone": "", "email": ""}
    customer = _party(q.customer_party) or {"name": q.customer, "attention": "", "lines": [], "phone": "",
                                            "email": ""}
    lead = _weeks(terms.lead_time_s) if terms is not None else ""
    repeat = _weeks(terms.repeat_lead_time_s) if terms is not None else ""
    hipot = bool(q.design is not None and q.design.tests.hipot)
    return {
        "internal": internal, "paper": CSS_PAPER[paper],
        "q": {
            "reference": q.reference, "part": q.part, "title": q.title, "revision": q.revision,
            "status": q.status, "shop": q.shop_name, "currency": cur, "issued": q.issued.isoformat(),
            "valid_until": q.valid_until.isoformat(), "valid_days": (q.valid_until - q.issued).days,
            "budgetary": q.budgetary,
        },
        "shop": shop_party, "customer": customer,
        "breaks": breaks,
        "nre": money(q.nre) if q.nre is not None else None,
        "copper": {"low": _pct_change(COPPER_LOW), "high": _pct_change(COPPER_HIGH),
                   "kg": f"{copper_kg:.3f}" if copper_kg else None},
        "ratings": ratings(q.design) if q.design is not None else [],
        "terms": {
            "lead_time": (f"{lead} from order to despatch" + (f"; repeat orders of this revision {repeat}"
                                                               if repeat else "")) if lead else "",
            "payment": terms.payment if terms is not None else "",
            "delivery": terms.delivery if terms is not None else "",
            "signatory": terms.signatory if terms is not None else "",
            "signatory_title": terms.signatory_title if terms is not None else "",
        },
        "safety_note": SAFETY_NOTE if hipot else "",
        "build": _internal(q) if internal else None,
        "notes": list(q.notes) if internal else [],
    }


def render_quote_html(q: Quote, internal: bool = False) -> str:
    from .render import render_html

    return render_html(TEMPLATE, **quote_context(q, internal))


def quote_paths(q: Quote, out_dir: str | Path, stem: str | None = None) -> dict[str, Path]:
    out = Path(out_dir)
    stem = stem or q.filename_stem
    internal = stem + INTERNAL_SUFFIX
    return {"pdf": out / f"{stem}.pdf", "html": out / f"{stem}.html",
            "internal_pdf": out / f"{internal}.pdf", "internal_html": out / f"{internal}.html"}


def write_quote(q: Quote, out_dir: str | Path, blocked: list | None = None, *, stem: str | None = None) -> list[Path]:
    """Write the customer's copy and the internal copy (PDF and HTML each): all four or none.

    Returns the paths, the customer's PDF first. ``stem``: the file names' stem; the default
    ``<part>-rev<R>-quote`` is for an unregistered copy (:func:`issue_quote` names issued quotes).
    """
    from ..atomic import atomic_paths
    from .render import html_to_pdf

    paths = quote_paths(q, out_dir, stem)
    customer_html = render_quote_html(q, internal=False)
    internal_html = render_quote_html(q, internal=True)
    customer_pdf = html_to_pdf(customer_html, blocked)
    internal_pdf = html_to_pdf(internal_html, blocked)
    order = [paths["pdf"], paths["html"], paths["internal_pdf"], paths["internal_html"]]
    with atomic_paths(*order, make_folders=True) as temps:     # a missing folder only now (removed on failure)
        temps[0].write_bytes(customer_pdf)
        temps[1].write_text(customer_html, encoding="utf-8")
        temps[2].write_bytes(internal_pdf)
        temps[3].write_text(internal_html, encoding="utf-8")
    return order


@dataclass(frozen=True)
class IssuedQuote:
    quote: Quote                  # with ``reference`` = the register number
    files: tuple[Path, ...]
    register: str                 # the register's address, as shown
    register_found_by: str


def issue_quote(q: Quote, out_dir: str | Path, where, *, by: str | None = None,
                blocked: list | None = None) -> IssuedQuote:
    """Take the next quote number from the register ``where`` (a ``RegisterLocation``), write
    ``<number>-<part>-rev<R>.pdf`` and ``.html`` (and the ``-internal`` copy) and record them with the number.

    Quote numbers are unique and never reused, so an issued quote's files are never overwritten: a
    file already standing under the new number (left by another register) refuses the issue, and
    the number is voided with that reason. A failed render voids the number too."""
    from ..errors import SpecError
    from ..freetext import check_name
    from ..register import Register

    by = check_name(by)
    out = Path(out_dir)
    with Register.open(where.target) as reg:
        with reg.issuing_quote(q.part, q.revision, q.fingerprint or "-", customer=q.customer,
                               valid_until=q.valid_until, issued_by=by) as number:
            issued = replace(q, reference=number)
            stem = f"{number}-{q.part}-rev{q.revision}"
            taken = [p for p in quote_paths(issued, out, stem).values() if p.exists()]
            if taken:
                raise SpecError(f"a file of quote {number} already exists and an issued quote is never "
                                "overwritten (is another register numbering into this folder?)", file=str(taken[0]))
            paths = write_quote(issued, out, blocked, stem=stem)
        reg.attach_quote_files(number, [str(p.resolve()) for p in paths])
    return IssuedQuote(issued, tuple(paths), where.shown, where.found_by)
