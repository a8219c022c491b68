"""The customer's quote: template context from a ``Quote`` and the PDF (+ HTML) beside it.

The PDF is what the customer receives: price per quantity break, extended price, the one-time
tooling/NRE line, validity, the copper clause (unit price at copper -20 % / +20 %), what is built and
tested, and the spec's part, revision and fingerprint. The internal cost build-up (material, labor,
overhead, margin) is deliberately *not* on it; it is in ``specgen quote`` output and ``--json``.

Rendering goes through ``specgen.documents.render`` (one jinja2 environment, the locked-down
WeasyPrint fetcher, both files written atomically). WeasyPrint is imported only when a PDF is made.
"""

from __future__ import annotations

from decimal import Decimal
from pathlib import Path

from ..quote import COPPER_HIGH, COPPER_LOW, Quote, build_quote, money, plain

TEMPLATE = "quote.html"
DEMO_QUANTITIES = (100, 500, 2500)

SAFETY_NOTE = ("Test voltages are the shop's defaults; the applicable product safety standard, the "
               "customer's drawing, local codes and licensed practice decide.")


def _pct_change(factor: Decimal) -> str:
    delta = (factor - 1) * 100
    return f"{'+' if delta > 0 else '−'}{plain(abs(delta))} %"


def _thermal_class(class_c) -> str:
    """'130 (B)': the IEC 60085 class with its letter."""
    from ..standards.thermal_classes import class_label

    return class_label(class_c)


def quote_context(q: Quote) -> dict:
    """Everything the template shows, as display strings (the template does no arithmetic)."""
    cur = q.currency
    breaks = [{"quantity": f"{b.quantity:,}", "unit_price": money(b.unit_price), "extended": money(b.extended),
               "copper_low": money(b.unit_price_copper_low), "copper_high": money(b.unit_price_copper_high)}
              for b in q.breaks]
    copper_kg = sum((m.quantity for m in q.materials if m.copper), Decimal(0))
    s = q.design_summary
    windings = []
    for w in s.get("windings", []):
        wire = w["wire"] + (f", {w['strands']} in hand" if w["strands"] > 1 else "")
        windings.append({"name": w["name"], "turns": f"{w['turns']:,}", "wire": wire})
    hipot = [f"{h['between']}: {h['volts']:,.0f} V a.c. for {h['seconds']:g} s" for h in s.get("hipot", [])]
    return {
        "q": {
            "reference": q.reference, "part": q.part, "title": q.title, "revision": q.revision,
            "status": q.status, "customer": q.customer, "fingerprint": q.fingerprint_short,
            "shop": q.shop_name, "currency": cur, "issued": q.issued.isoformat(),
            "valid_until": q.valid_until.isoformat(), "valid_days": (q.valid_until - q.issued).days,
            "budgetary": q.budgetary,
        },
        "breaks": breaks,
        "nre": money(q.nre) if q.nre is not None else None,
        "copper": {"low": _pct_change(COPPER_LOW), "high": _pct_change(COPPER_HIGH),
                   "kg": f"{copper_kg:.3f}" if copper_kg else None},
        "construction": {"core": s.get("core", ""), "windings": windings,
                         "insulation_class": _thermal_class(s.get("insulation_class_c")),
                         "varnish": bool(s.get("varnish")), "hipot": hipot, "tests": s.get("tests", [])},
        "safety_note": SAFETY_NOTE,
    }


def render_quote_html(q: Quote) -> str:
    from .render import render_html

    return render_html(TEMPLATE, **quote_context(q))


def write_quote(q: Quote, out_dir: str | Path, blocked: list | None = None) -> list[Path]:
    """Write ``<part>-rev<R>-quote.pdf`` and ``.html`` into ``out_dir`` (both or neither)."""
    from .render import write_pdf_and_html

    out = Path(out_dir)
    html = render_quote_html(q)
    return write_pdf_and_html(html, out / f"{q.filename_stem}.pdf", out / f"{q.filename_stem}.html", blocked)


def demo_quotes(designs: dict, cat, out_dir, echo=print, quantities=DEMO_QUANTITIES) -> dict:
    """Quote every demo part at 100 / 500 / 2500 into ``out_dir``; failed designs are skipped (said so).

    designs: part -> (spec_path, Spec, Design), as ``specgen.demo.run_demo`` builds it.
    Returns part -> Quote for the parts quoted.
    """
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    quotes = {}
    for part, (_path, spec, d) in designs.items():
        if d.failed:
            echo(f"{part:8} quote skipped: the design has failed checks ({', '.join(c.code for c in d.failed)})")
            continue
        q = build_quote(spec, d, cat, quantities)
        write_quote(q, out)
        quotes[part] = q
        prices = "  ".join(f"{b.quantity:,} pcs {money(b.unit_price)}" for b in q.breaks)
        echo(f"{part:8} quote {q.currency} each: {prices}{'  (budgetary)' if q.budgetary else ''}")
    if quotes:
        echo(f"quotes written to {out}/")
    return quotes
