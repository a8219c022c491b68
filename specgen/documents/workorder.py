"""The shop-floor work order: context builder and issue flow.

``build_context`` turns a Design (and the shop's ``DocumentSettings``: paper, lead length, scrap) into
plain dicts and strings for ``templates/workorder.html``; it reads no catalogue (tapes, pins, outline and
varnish cure are on the Design's ``floor``) and computes no physics: every
number is the Design's, formatted here once by the helpers below (the tests format their expected
strings with the same helpers). ``issue_work_order`` is the whole flow of ``specgen workorder``:
validate the options, run the design, refuse what must not reach the floor, take a number from the
register, render (a failed render voids the number), write the PDF and the HTML together atomically.

WeasyPrint is imported only when a PDF is rendered (through ``specgen.documents.render``).
"""

from __future__ import annotations

import datetime as _dt
import re
import sys
import time
from dataclasses import dataclass, field
from pathlib import Path

from .. import present
from ..errors import DesignFailed, SpecError
from .connections_doc import connections_context
from .insulation_words import (
    barrier_note,
    chamber_row,
    chambers_text,
    coating_step,
    laid_widths,
    lead_exit_lines,
    two_widths_line,
    two_widths_note,
)
from .settings import DocumentSettings
from .test_record import RECORD_BOTTOM_MM, RECORD_TOP_MM, build_record

UNCONTROLLED = "Printed copies are uncontrolled: check the revision before use"
WATERMARK = "DRAFT - NOT FOR PRODUCTION"
HIPOT_CAUTION = (
    "HAZARDOUS VOLTAGE during the hipot and insulation-resistance tests.",
    "Trained and authorised personnel only.",
    "Test only in the interlocked fixture; never bypass the interlock or touch the part while the test runs.",
    "Discharge the part after the test before handling it.",
)
STANDARDS_NOTE = ("The figures printed are defaults to be confirmed against the applicable product safety "
                  "standard, the customer's drawing, local codes and licensed practice.")
DCR_FORMULA = "R20 = Rt / (1 + α (t − 20))"
#: Side margins of every work-order page (the template's @page rule uses this one figure): the
#: drawings are sized to the text width left between them, so they print at their stated scale.
SIDE_MARGIN_MM = 13.0
CSS_PAPER = {"A4": "A4", "Letter": "letter"}
MAX_QTY = 1_000_000
MAX_LOT_CHARS = 40
_NUMBER_RE = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]{0,59}")


# One formatter for every screen and document (specgen.present); the names below are what the
# template context and the tests use.
fmt_eng = present.si
fmt_test_volt = present.test_volts
fmt_seconds = present.seconds
fmt_ma = present.milliamps
fmt_ratio = present.ratio
fmt_mm = present.mm
fmt_m = present.metres
fmt_mass = present.mass
fmt_litre = present.litres
fmt_count = present.count
fmt_temp = present.temp_c
sig = present.sig


def _insulation_rows(d: object) -> dict[str, object] | None:
    """The Design's insulation coordination as printed: one row per barrier, the basis in one line."""
    ins = getattr(d, "insulation", None)
    if ins is None:
        return None

    def mm(x: float | None) -> str:
        return "—" if x is None else f"{x:.2f} mm"

    rows = [{"between": f"{b.between[0]} – {b.between[1]}", "grade": b.grade,
             "working": f"{b.working_voltage_v:g} V rms, {b.peak_voltage_v:.0f} V peak",
             "clearance": f"{mm(b.clearance_required_mm)} / {mm(b.clearance_available_mm)}",
             "creepage": f"{mm(b.creepage_required_mm)} / {mm(b.creepage_available_mm)}",
             "solid": b.solid_provided, "ok": "pass" if b.ok else "FAIL", "path": b.path} for b in ins.barriers]
    basis = (f"{ins.standard}; mains {ins.mains_v:g} V, overvoltage category {ins.overvoltage_category} "
             f"({ins.impulse_v:.0f} V impulse), pollution degree {ins.pollution_degree}, material group "
             f"{ins.material_group}, up to {ins.altitude_m:g} m")
    return {"rows": rows, "basis": basis, "note": ins.note}


def fmt_ohm(value: float | None) -> str:
    return present.si(value, "Ω")


def fmt_henry(value: float | None) -> str:
    return present.si(value, "H")


def fmt_volt(value: float | None) -> str:
    return present.si(value, "V")


def direction_text(direction: str, toroid: bool) -> str:
    word = "CLOCKWISE (CW)" if direction == "cw" else "COUNTER-CLOCKWISE (CCW)"
    if toroid:
        return f"{word}, seen from above, the wire passing down through the hole"
    return f"{word}, seen from the start flange / pin side"


# ------------------------------------------------------------------------------------------------ context


def section_label(winding, section) -> str:
    return winding.name if len(winding.sections) == 1 else f"{winding.name}.{section.index}"


def _sections_in_order(design) -> list:
    out = []
    for w in design.windings:
        for s in w.sections:
            out.append((s.order, w, s))
    out.sort(key=lambda t: t[0])
    return [(w, s) for _o, w, s in out]


def _bifilar_slot(design, w, s) -> tuple[int, int]:
    """(place, of) of a winding's wire among those wound together in a layer: (0, 1) alone; a bifilar pair's
    first (the one in the build order) (0, 2), its partner (1, 2)."""
    if s.wound_with is None:
        return 0, 1
    names = [x.name for x in design.windings]
    first = min(w.name, s.wound_with, key=lambda n: (min(x.order for x in next(
        y for y in design.windings if y.name == n).sections), names.index(n)))
    return (0, 2) if w.name == first else (1, 2)


def _pins_of(condition: str) -> str:
    m = re.match(r"pins\s+(\S+)", condition or "")
    return m.group(1).rstrip(",") if m else ""


def in_number(text: str) -> str:
    """'2 piece(s) per set' -> '2 pieces per set', '1 set(s)' -> '1 set': the Design's notes write a
    count with '(s)'; the floor reads it in the right number."""
    text = re.sub(r"\b1 (\w+)\(s\)", r"1 \1", text)
    return re.sub(r"\b(\d[\d,]*) (\w+)\(s\)", r"\1 \2s", text)


def _materials(design, qty: int, scrap: float) -> list:
    rows = []
    for m in design.materials:
        row = {"kind": m.kind, "id": m.id, "description": m.description, "note": in_number(m.note),
               "per_unit": "", "lot": "", "mass_unit": "", "mass_lot": ""}
        if m.unit == "m":
            factor = 1.0 + scrap if m.kind == "wire" else 1.0
            row["per_unit"] = fmt_m(m.quantity)
            row["lot"] = fmt_m(m.quantity * qty * factor)
            if m.mass_kg is not None:
                row["mass_unit"] = fmt_mass(m.mass_kg)
                row["mass_lot"] = fmt_mass(m.mass_kg * qty * factor)
            if m.kind == "wire":
                row["note"] = (m.note + "; " if m.note else "") + f"lot includes {scrap:.0%} scrap allowance"
        elif m.unit == "l":
            row["per_unit"] = fmt_litre(m.quantity)
            row["lot"] = fmt_litre(m.quantity * qty)
        else:
            row["per_unit"] = fmt_count(m.quantity, m.unit)
            row["lot"] = fmt_count(m.quantity * qty, m.unit)
            if m.mass_kg is not None:
                row["mass_unit"] = fmt_mass(m.mass_kg)
                row["mass_lot"] = fmt_mass(m.mass_kg * qty)
        rows.append(row)
    return rows


def _limit_row(lim, fmt) -> dict:
    """``fmt``: a unit (the nominal and its limits then share one prefix, ``present.si_set``) or a formatter."""
    if isinstance(fmt, str):         # the limits at the figures they were rounded to (design/test_setup.py)
        nominal = present.si_set([lim.nominal, lim.low, lim.high], fmt)[0]
        low, high = present.si_set([lim.nominal, lim.low, lim.high], fmt, keep_zeros=False)[1:]
    else:
        nominal = fmt(lim.nominal)
        limit = (lambda v: f"{present.sig_trimmed(v)} : 1") if fmt is fmt_ratio else fmt     # rounded limits
        low, high = (limit(v) if v is not None else "—" for v in (lim.low, lim.high))
    return {"name": lim.name, "item": lim.item, "condition": lim.condition, "pins": lim.pins or _pins_of(lim.condition),
            "nominal": nominal, "low": low, "high": high}


def _inductance_fmt(lim):
    if lim.name.startswith("AL"):
        return lambda v: f"{sig(v * 1e9, 4)} nH/turn²"
    return "H"


def _svg_width_mm(svg) -> float:
    m = re.search(r'width="([0-9.]+)mm"', str(svg))
    return float(m.group(1)) if m else 0.0


def _fit_to_text_width(draw, text_width_mm: float, max_w_mm: float):
    """Draw at the largest scale whose whole figure (drawing and its label column) fits the text
    width: a figure wider than the page would be shrunk by the renderer and no longer be to scale."""
    svg, scale = draw(max_w_mm)
    for _ in range(20):             # the scales are steps: narrow the box until the next one down is taken
        excess = _svg_width_mm(svg) - text_width_mm
        if excess <= 0 or max_w_mm <= 10.0:
            break
        max_w_mm = max(max_w_mm - max(excess, 0.05 * max_w_mm), 10.0)
        svg, scale = draw(max_w_mm)
    return svg, scale


def _drawings(design, settings) -> dict:
    """The pin diagram and the window (or ring) section, from the Design alone, sized to the text width."""
    from . import drawings as dr
    from .sector_drawing import sector_context

    floor = design.floor
    toroid = design.core.shape == "toroid"
    index = {w.name: i for i, w in enumerate(design.windings)}
    coils = [dr.Coil(winding=w.name, label=section_label(w, s), start=s.start_pin, finish=s.finish_pin,
                     turns=s.turns, colour_index=index[w.name]) for w, s in _sections_in_order(design)]
    dots = {w.name: w.dot_pin for w in design.windings}
    pins = floor.pins
    pin_svg = dr.pin_diagram(list(pins.pins), pins.rows, coils, dots, leads=pins.free_leads)

    text_width_mm = settings.paper_width_m * 1e3 - 2 * SIDE_MARGIN_MM
    secs = []
    outline = floor.outline
    starts = [sum(outline.chambers[:i]) + i * outline.divider_m for i in range(len(outline.chambers))]
    for w, s in _sections_in_order(design):
        tapes = floor.section(w.name, s.index)
        x0, breadth = (starts[s.chamber - 1], outline.chambers[s.chamber - 1]) if s.chamber else (0.0, 0.0)
        secs.append(dr.SectionDraw(
            order=s.order, label=section_label(w, s), winding=w.name, turns=s.turns, start_m=s.start_build_m,
            end_m=s.end_build_m, layer_height_m=tapes.layer_height_m,
            layers=tuple(dr.LayerBand(l.turns, l.turns_capacity, l.build_to_centre_m) for l in s.layers),
            margin_m=s.margin_m, wire_diameter_m=w.overall_diameter_m, strands=w.strands,
            round_wire=w.wire_kind in ("round", "litz", "tiw"), tape_after=s.tape_after,
            tape_after_m=tapes.after.build_m if tapes.after else 0.0,
            layer_tape_m=tapes.between_layers.build_m if tapes.between_layers else 0.0,
            colour_index=index[w.name], slot=_bifilar_slot(design, w, s), x0_m=x0, breadth_m=breadth,
            tape_widths_m=laid_widths(tapes.after, breadth or outline.winding_breadth_m),
            layer_tape_widths_m=laid_widths(tapes.between_layers, breadth or outline.winding_breadth_m)))
    dividers = tuple((x - outline.divider_m, outline.divider_m, outline.divider_height_m)
                     for x in starts[1:])
    sectors = sector_context(design, text_width_mm)
    if sectors is not None:      # sector winding: every sector builds alike; the bore shows the first
        secs = secs[:1]
    if toroid:
        window_svg, scale = _fit_to_text_width(
            lambda w: dr.toroid_sector(outline.inner_diameter_m or 0.0, outline.outer_diameter_m or 0.0,
                                       outline.coating_m, design.build.available_m,
                                       design.build.bulged_height_m, secs, max_w_mm=w), text_width_mm, 105.0)
    else:
        window_svg, scale = _fit_to_text_width(
            lambda w: dr.window_section(outline.winding_breadth_m, design.build.available_m,
                                        design.build.bulged_height_m, secs, max_w_mm=w, dividers=dividers),
            text_width_mm, 112.0)
    if sectors is not None:
        sectors["scale"] = dr.scale_text(sectors["scale"])
    return {"pin_svg": pin_svg, "window_svg": window_svg, "window_scale": dr.scale_text(scale),
            "dot_legend": dr.DOT_LEGEND, "sectors": sectors}


_LEAD_PREP = {
    "round": "Strip the enamel over the length to be soldered (solder pot or stripping tool).",
    "litz": "Strip and tin the whole Litz bundle in the solder pot until every strand is wetted; no loose strand.",
    "tiw": "Strip triple-insulated wire only over the length to be soldered; keep its insulation right up to "
           "the joint.",
    "foil": "Solder the lead strap to the foil across its full width before the first turn is covered.",
    "strip": "Strip the strip's ends and form them before soldering.",
}


def bifilar_rows(rows: list, w, mate, pin_word: str) -> tuple[list, str, list]:
    """A step that winds two windings together (bifilar): both starts and finishes, two wires in hand."""
    out = []
    for label, value, style in rows:
        if label == f"Start {pin_word}":
            value = f"{w.start} ({w.name}) and {mate.start} ({mate.name})   ● DOT at {w.dot_pin} and {mate.dot_pin}"
        elif label == f"Finish {pin_word}":
            value = f"{w.finish} ({w.name}) and {mate.finish} ({mate.name})"
        elif label == "Layers":
            value = f"{value}, of each wire"
        elif label == "Wire":
            value = f"{w.wire}: {w.wire_label}, two wires in hand ({w.name} and {mate.name}) side by side"
        out.append((label, value, style))
    heading = f"Wind {w.name} and {mate.name} together (bifilar)"
    lines = [f"Wind {w.name} and {mate.name} together, two wires in hand, side by side in every layer; keep "
             f"them flat and never let them cross. Mark the {mate.name} wire at its start (a sleeve or a pen "
             f"mark) so the ends can be told apart; {mate.name}'s dot is at {pin_word} {mate.dot_pin}."]
    return out, heading, lines


def tap_line(t, w, pin_word: str) -> str:
    """Where a tap comes out, in the winder's count: the layer and the turn in it."""
    sleeve = f", sleeved with {w.lead_sleeving}" if w.lead_sleeving else ""
    return (f"TAP {t.voltage_v:g} V: at turn {t.turn_in_layer} of layer {t.layer} (turn {t.turn} of {w.name}) "
            f"bring out a loop of the wire to {pin_word} {t.pin} without cutting it{sleeve}; then wind on.")


def termination_step(d, n: int) -> dict:
    """Lead termination: each winding's ends to their pins (or a toroid's free leads), from the Design."""
    toroid = d.core.shape == "toroid"
    word = "lead" if toroid else "pin"
    lines = []
    for w in d.windings:
        ties = [s.finish_pin for s in w.sections[:-1]]
        tie = f"; tie {word}{'s' if len(ties) > 1 else ''} {', '.join(ties)} between its sections" if ties else ""
        dot = f" (dot at {w.dot_pin})" if w.dot_pin else ""
        taps = "".join(f"; its {t.voltage_v:g} V tap on {word} {t.pin}" for t in d.taps if t.winding == w.name)
        lines.append(f"{w.name}: start on {word} {w.start}, finish on {word} {w.finish}{dot}{tie}{taps}.")
    for kind in dict.fromkeys(w.wire_kind for w in d.windings):
        lines.append(_LEAD_PREP.get(kind, _LEAD_PREP["round"]))
    sleeved = sorted({w.lead_sleeving for w in d.windings if w.lead_sleeving})
    if sleeved:
        lines.append(f"Sleeve each lead that crosses a margin or another winding with {', '.join(sleeved)}, "
                     "the sleeve reaching into the winding.")
    if toroid:
        lines.append("Strip and tin the free end of each lead; tag each lead with its winding and end "
                     "(for example P start) as the pin diagram names it.")
    else:
        lines.append("Wrap each lead two to three turns round its pin and solder it; no bridge to a neighbouring "
                     "pin, no strand standing proud; trim the tails.")
    lines.append("Check each winding for continuity from its start to its finish before going on.")
    heading = "Prepare and tag the leads" if toroid else "Terminate the leads on the pins"
    return {"n": n, "kind": "terminate", "heading": heading, "lines": lines, "rows": [], "layers": [], "dot": ""}


def marking_step(d, n: int, number: str) -> dict:
    """Marking and labelling of every part, from the Design: identity, revision, polarity dots."""
    word = "lead" if d.core.shape == "toroid" else "pin"
    dots = ", ".join(f"{w.name} at {word} {w.dot_pin}" for w in d.windings if w.dot_pin)
    lines = [f"Label each part: {d.part} rev {d.revision}, work order {number}, date code (year and week).",
             "Put the label where it stays readable once the part is fitted and does not bridge a creepage "
             "margin; add any customer marking the customer's drawing asks for."]
    if dots:
        lines.append(f"Polarity dots: {dots}. Check each one against the pin diagram.")
    lines.append("Check the label against this work order before the part goes to test.")
    return {"n": n, "kind": "mark", "heading": "Mark and label", "lines": lines, "rows": [], "layers": [],
            "dot": ""}


# long: the template's context key by key (to split by page section)
def build_context(design, settings, *, number: str, qty: int, due: str | None = None, lot: str | None = None,
                  issued: str | None = None, issued_by: str | None = None, draft: bool = False) -> dict:
    """Everything the work-order template shows, as plain dicts and strings (SVG as Markup)."""
    from .. import revision
    from .sector_drawing import sector_row

    d = design
    toroid = d.core.shape == "toroid"
    scrap = settings.scrap_wire
    lead_m = settings.lead_length_m
    issued = issued or _dt.date.today().isoformat()
    fp12 = revision.short(d.fingerprint) if d.fingerprint else "not computed"
    head = {
        "number": number, "part": d.part, "title": d.title, "revision": d.revision, "status": d.status,
        "customer": d.customer, "qty": f"{qty:,}", "qty_int": qty, "due": due or "not set", "lot": lot or "—",
        "issued": issued, "issued_by": issued_by or "—", "fingerprint": fp12, "shop": settings.shop_name,
        "uncontrolled": UNCONTROLLED, "draft": bool(draft), "watermark": WATERMARK,
    }
    pin_word = "lead" if toroid else "pin"
    summary = [
        ("Part", f"{d.part} rev {d.revision} ({d.status})"), ("Kind", d.kind),
        ("Core", f"{d.core.id}, {d.core.material_name}"
                 + (f", stack {fmt_mm(d.core.stack_m)}" if d.core.stack_m and not toroid else "")),
        ("Bobbin", (d.core.bobbin + chambers_text(d.floor.outline)) if d.core.bobbin
         else "none (toroid, wound on the core)"),
        ("Windings", ", ".join(f"{w.name} {w.turns} t" for w in d.windings)),
        ("Operating", f"{present.frequency(d.frequency_hz)}, insulation class {d.insulation_class_c}"),
    ]

    # ---- floor steps: gap, windings in build order, core assembly, varnish
    steps = []
    n = 0
    ind = d.inductor
    al_limit = next((l for l in d.tests.inductance if l.name.startswith("AL")), None)
    if ind is not None and ind.gap_m:
        n += 1
        lines = []
        if ind.gap_arrangement == "spacer" and ind.spacer_m:
            lines.append(f"Put a spacer {fmt_mm(ind.spacer_m)} thick between the two halves on every leg "
                         f"(both outer legs and the centre leg).")
        elif ind.grind_m:
            lines.append(f"Grind the centre leg of ONE core half by {fmt_mm(ind.grind_m)}; leave the other half "
                         f"and the outer legs as they are. Gap {fmt_mm(ind.gap_m)}.")
        else:
            lines.append(f"Gap the set to {fmt_mm(ind.gap_m)}.")
        if al_limit is not None:
            f = _inductance_fmt(al_limit)
            lines.append(f"AL CHECK BEFORE WINDING: clamp the gapped halves with a 10-turn test coil, measure L "
                         f"and take AL = L / 100. Accept {f(al_limit.low)} to {f(al_limit.high)} "
                         f"(nominal {f(al_limit.nominal)}). Reject or re-grind a set outside this.")
        steps.append({"n": n, "kind": "gap", "heading": f"Prepare the core: air gap {fmt_mm(ind.gap_m)}",
                      "lines": lines, "rows": [], "layers": [], "dot": ""})

    wrap = d.floor.core_wrap
    if toroid and wrap is None and d.floor.outline.coating_voltage_v and d.insulation is not None:
        n += 1
        steps.append(coating_step(d, n))
    if toroid and wrap is not None:
        n += 1
        steps.append({"n": n, "kind": "core", "heading": "Insulate the core before winding",
                      "lines": [f"Wrap the bare core with {wrap.id} ({wrap.name}, {fmt_mm(wrap.width_m)} wide): "
                                f"{wrap.layers} layer{'s' if wrap.layers != 1 else ''}, each half-lapped "
                                f"(every turn covers half of the one before), over the inner and outer edges, "
                                f"no gaps at the bore.",
                                "This wrap is the insulation between every winding and the core: inspect it for "
                                "tears or bare spots before the first turn, and replace it if damaged."],
                      "rows": [], "layers": [], "dot": ""})

    order = _sections_in_order(d)
    last_in = {s.chamber: s.order for _, s in order}       # the outer wrap goes on the last in each chamber
    by_name = {w.name: w for w in d.windings}
    wound: set[tuple[str, int]] = set()
    for w, s in order:
        if s.wound_with is not None and (s.wound_with, s.index) in wound:
            continue                       # bifilar: wound in its partner's step
        wound.add((w.name, s.index))
        mate = by_name.get(s.wound_with) if s.wound_with else None
        n += 1
        label = section_label(w, s)
        first_sec = s.index == 1
        last_sec = s.index == len(w.sections)
        dot = ""
        if w.dot_pin == s.start_pin and first_sec:
            dot = f"Mark the polarity dot at {pin_word} {s.start_pin} (start of {w.name})."
        elif w.dot_pin == s.finish_pin and last_sec:
            dot = f"Mark the polarity dot at {pin_word} {s.finish_pin} (finish of {w.name})."
        last_layer = s.layers[-1] if s.layers else None
        nl = len(s.layers)
        layers_text = f"{nl} layer{'s' if nl != 1 else ''}, {s.turns_per_layer} turns per layer"
        if nl > 1 and last_layer is not None and last_layer.turns != s.turns_per_layer:
            layers_text += f" (last layer {last_layer.turns})"
        elif nl == 1 and s.turns < s.turns_per_layer:
            layers_text = f"1 layer of {s.turns} turns (it holds {s.turns_per_layer}): space them evenly"
        start_value = s.start_pin
        finish_value = s.finish_pin + ("" if last_sec else f"  (tie {pin_word}: {w.name}.{s.index + 1} starts here)")
        if dot and w.dot_pin == s.start_pin:
            start_value += f"   ● DOT: mark {pin_word} {s.start_pin} with the polarity dot"
        if dot and w.dot_pin == s.finish_pin:
            finish_value += f"   ● DOT: mark {pin_word} {s.finish_pin} with the polarity dot"
        rows = [chamber_row(d, s)] if s.chamber else []
        rows += [
            (f"Start {pin_word}", start_value, "dot" if dot and w.dot_pin == s.start_pin else "key"),
            ("Direction", direction_text(w.direction, toroid), "key"),
            ("Wire", f"{w.wire}: {w.wire_label}, {w.strands} in hand", "key"),
            ("Layers", layers_text, ""),
        ]
        if (place := sector_row(d, w.name)) is not None:
            rows.insert(1, place)
        if not toroid:
            rows.append(("Margins", (f"{fmt_mm(s.margin_m)} each side: {s.margin_tape} built up to the "
                                     f"height of each layer" if s.margin_tape else f"{fmt_mm(s.margin_m)} each side")
                         if s.margin_m > 0 else "none", ""))
        tapes = d.floor.section(w.name, s.index)
        if s.layer_tape:
            rows.append(("Between layers", f"{s.layer_tape} × {s.layer_tape_layers}"
                         + (", half-lapped" if toroid else "") + two_widths_note(tapes.between_layers), ""))
        else:
            rows.append(("Between layers", "— (one layer)" if len(s.layers) <= 1 else "no tape", ""))
        if s.tape_after:
            what = "outer wrap" if s.order == last_in[s.chamber] else "before the next section"
            rows.append(("After this section", f"{s.tape_after} × {s.tape_after_layers} ({what}"
                         + (", half-lapped)" if toroid else ")") + two_widths_note(tapes.after)
                         + barrier_note(tapes.barrier, toroid, bool(s.margin_tape)), "key"))
        else:
            rows.append(("After this section", "no tape", ""))
        rows.append((f"Finish {pin_word}", finish_value, "dot" if dot and w.dot_pin == s.finish_pin else "key"))
        ends = [x for x, yes in (("start", first_sec), ("finish", last_sec)) if yes]
        if ends:
            sleeve = f"; sleeve with {w.lead_sleeving}" if w.lead_sleeving else ""
            beyond = "beyond the pin" if not toroid else "free lead"
            rows.append(("Leads", f"{fmt_mm(lead_m)} {beyond} at the {' and '.join(ends)}{sleeve}", ""))
        heading = (f"Wind {label}" + (f" (section {s.index} of {len(w.sections)})" if len(w.sections) > 1 else "")
                   + (f" in chamber {s.chamber}" if s.chamber else ""))
        lines = [tap_line(t, w, pin_word) for t in d.taps if t.winding == w.name and t.section == s.index]
        lines += lead_exit_lines(d, w, s) if toroid else []
        lines += [two_widths_line(t, where) for t, where in ((tapes.between_layers, "between the layers"),
                                                             (tapes.after, "after this section"))
                  if t is not None and t.widths > 1]
        if mate is not None:
            rows, heading, more = bifilar_rows(rows, w, mate, pin_word)
            lines = more + lines
        steps.append({"n": n, "kind": "wind", "heading": heading, "turns": s.turns, "winding": w.name,
                      "wire": w.wire, "rows": rows, "dot": dot, "lines": lines,
                      "layers": [{"index": l.index, "turns": l.turns} for l in s.layers]})

    if not toroid:          # leads go onto the pins before the core closes the bobbin
        n += 1
        steps.append(termination_step(d, n))

    # core assembly
    core_lines = []
    lam = next((m for m in d.materials if m.kind == "laminations"), None)
    core_line = next((m for m in d.materials if m.kind == "core"), None)
    clips = next((m for m in d.materials if m.kind == "clip"), None)
    if lam is not None:
        if d.kind == "inductor":
            core_lines.append(f"Stack {fmt_count(lam.quantity, 'pairs')} of {lam.id}: E pieces together, I pieces "
                              f"together, with the gap spacer between them.")
        else:
            core_lines.append(f"Stack {fmt_count(lam.quantity, 'pairs')} of {lam.id} laminations (E and I) into the "
                              f"bobbin, interleaving the E pieces from alternate sides; press the stack tight.")
    elif core_line is not None and not toroid:
        core_lines.append(f"Fit the core {core_line.id} ({in_number(core_line.note)}) into the wound bobbin"
                          + (", the ground half with its gap inside the bobbin" if ind is not None and ind.grind_m
                             else "") + ".")
        if clips is not None:
            core_lines.append(f"Fit {fmt_count(clips.quantity, 'pcs')} {clips.id}.")
    if core_lines:
        n += 1
        steps.append({"n": n, "kind": "core", "heading": "Assemble the core", "lines": core_lines, "rows": [],
                      "layers": [], "dot": ""})

    varnish = None
    v = d.floor.varnish
    if v is not None:
        n += 1
        cure = f"{fmt_temp(v.cure_temperature_c)} for {fmt_seconds(v.cure_time_s)}"
        varnish = {"n": n, "id": v.id, "name": v.name, "cure": cure,
                   "lines": [f"Dip in {v.name} ({v.id}) until the bubbles stop; drain.",
                             f"Cure in the varnish oven: {cure} (catalogue figures)."],
                   "caution": [f"Hot varnish oven: parts, racks and oven walls at {cure.split(' for ')[0]}. "
                               f"Let parts cool before handling; wear heat-resistant gloves at the oven.",
                               "Solvent vapour: dip and drain under the extraction, keep the oven ventilation "
                               "running, no open flame or sparks nearby.",
                               "Wear solvent-resistant gloves and eye protection when handling wet varnish.",
                               f"Cure temperature and time from the catalogue: {cure}."]}

    after = []              # after the varnish: a toroid's free leads, then the marking of every part
    if toroid:
        n += 1
        after.append(termination_step(d, n))
    n += 1
    after.append(marking_step(d, n, number))

    # ---- tests
    t = d.tests
    dcr = [_limit_row(l, "Ω") for l in t.dcr]
    ratio = [_limit_row(l, fmt_ratio if l.unit == ":1" else lambda v: fmt_eng(v, "A")) for l in t.ratio]
    ocv = [_limit_row(l, "V") for l in t.open_circuit]
    no_load = [_limit_row(l, "A" if l.unit == "A" else "W") for l in t.no_load]
    inductance = [_limit_row(l, _inductance_fmt(l)) for l in t.inductance]
    hipot = [{"between": h.between, "rating": h.rating, "working": fmt_test_volt(h.working_voltage_v),
              "type_v": fmt_test_volt(h.type_voltage_v), "type_s": fmt_seconds(h.type_duration_s),
              "routine_v": fmt_test_volt(h.routine_voltage_v), "routine_s": fmt_seconds(h.routine_duration_s),
              "trip": fmt_ma(h.trip_current_a), "basis": h.basis, "connection": h.connection} for h in t.hipot]
    tests = {
        "dcr": dcr, "ratio": ratio, "ocv": ocv, "no_load": no_load, "inductance": inductance,
        "polarity": list(t.polarity),
        "hipot": hipot, "alpha": f"{t.alpha_per_k:g}", "formula": DCR_FORMULA,
        "ir_voltage": f"{t.insulation_resistance_v:.0f} V d.c.",
        "ir_min": fmt_eng(t.insulation_resistance_min_ohm, "Ω", 3),
        "cautions": list(t.cautions),
    }
    history = [{"revision": e.revision, "date": e.date, "by": e.by, "note": e.note,
                "fingerprint": revision.short(e.fingerprint) if e.fingerprint else "not recorded"}
               for e in d.history]
    ctx = {
        "head": head, "summary": summary, "materials": _materials(d, qty, scrap),
        "scrap": f"{scrap:.0%}", "steps": steps, "varnish": varnish, "after_varnish": after, "tests": tests,
        "caution": list(HIPOT_CAUTION), "standards_note": STANDARDS_NOTE, "notes": (d.notes or "").strip(),
        "history": history, "warnings": _warning_rows(d), "toroid": toroid,
        "pin_word": pin_word, "paper": CSS_PAPER[settings.paper], "side_margin_mm": SIDE_MARGIN_MM,
        "insulation": _insulation_rows(d),
        "record": build_record(d, qty, settings, SIDE_MARGIN_MM), "record_margins": (RECORD_TOP_MM, RECORD_BOTTOM_MM),
    }
    ctx["connections"] = connections_context(d)
    ctx.update(_drawings(d, settings))
    return ctx


def _warning_rows(d) -> list[dict[str, str]]:
    """Each design warning with "accepted by NAME on DATE: REASON" when its release accepted it, '' when
    nobody did (the rule is ``specgen.lifecycle.warning_notes``: no acceptance is ever implied)."""
    from ..lifecycle import warning_notes

    return [{"message": w.message, "accepted": w.accepted_line} for w in warning_notes(d)]


def render_work_order_html(design, settings, **kwargs) -> str:
    from .render import render_html

    return render_html("workorder.html", **build_context(design, settings, **kwargs))


# ------------------------------------------------------------------------------------------------ issuing

def check_qty(qty) -> int:
    text = str(qty).strip().replace("_", "").replace(",", "")
    try:
        value = int(text)
    except ValueError:
        raise SpecError(f"expected a whole number of pieces, got {str(qty)!r}", path="--qty") from None
    if not 1 <= value <= MAX_QTY:
        raise SpecError(f"{value} is outside 1..{MAX_QTY:,}", path="--qty")
    return value


def check_due(due) -> str | None:
    if due is None or str(due).strip() == "":
        return None
    text = str(due).strip()
    try:
        if not re.fullmatch(r"\d{4}-\d{2}-\d{2}", text):
            raise ValueError
        return _dt.date.fromisoformat(text).isoformat()
    except ValueError:
        raise SpecError(f"expected a real date as YYYY-MM-DD, got {text!r}", path="--due") from None


def check_lot(lot) -> str | None:
    if lot is None:
        return None
    from ..freetext import check_free_text

    return check_free_text(lot, "--lot", MAX_LOT_CHARS, required=False)


def check_number(number) -> str | None:
    if number is None:
        return None
    text = str(number).strip()
    if not _NUMBER_RE.fullmatch(text):
        raise SpecError(f"{text!r} is not usable as a file name; use letters, digits, '.', '_' and '-' "
                        "(starting with a letter or digit, at most 60)", path="--number")
    return text


@dataclass
class Issued:
    number: str
    pdf: Path
    html: Path
    register: str                 # the register's address (a file path or a postgresql:// URL, shown)
    warnings: list = field(default_factory=list)
    seconds: float = 0.0
    register_found_by: str = ""   # how that register was found (see specgen.register.location)


def preflight(spec_path, spec, design, cat, *, qty, due=None, lot=None, draft=False) -> tuple:
    """Everything that must hold before a number is taken: the options, the checks, the release.

    Returns (qty, due, lot, warnings); raises DesignFailed (failed checks) or SpecError.
    Shared by the single issue and the batch issue so both refuse exactly the same things.
    """
    qty = check_qty(qty)
    due = check_due(due)
    lot = check_lot(lot)
    if design.failed:
        raise DesignFailed(f"{design.part} rev {design.revision}: {len(design.failed)} design check(s) failed; "
                           "no work order issued", design.failed)
    from ..lifecycle import release_gate

    verdict = release_gate(spec, design, cat)
    warnings: list[str] = []
    if verdict.status != "released":
        if not draft:
            raise SpecError(f"is {verdict.status!r}; work orders are issued from released revisions only "
                            "(--draft prints a marked copy that is not for production)",
                            file=str(spec_path), path="status")
    elif not verdict.firm:
        if not draft:
            raise verdict.refusal("(or print a --draft)")
        warnings.append(verdict.reason)
    return qty, due, lot, warnings


def issue_from_design(spec_path, spec, design, cat, *, qty, due=None, lot=None, out_dir=".", draft=False,
                      register_path=None, number=None, by=None, warn=None, quote=None) -> Issued:
    """Issue one work order for an already computed design (the CLI and the demo come through here).

    ``quote``: the register number of the quote this order fulfils (checked: same part, not void)."""
    from ..register import Register, locate_register
    from .render import write_pdf_and_html

    t0 = time.perf_counter()
    warn = warn or (lambda msg: print(f"warning: {msg}", file=sys.stderr))
    qty, due, lot, warnings = preflight(spec_path, spec, design, cat, qty=qty, due=due, lot=lot, draft=draft)
    number = check_number(number)
    for w in warnings:
        warn(w)
    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise SpecError("is a file, expected the folder for the work order", file=str(out), path="--out")
    settings = DocumentSettings.from_shop(cat.shop)    # the document itself sees these figures only
    where = locate_register(spec_path, register_path, shop_setting=settings.register_path, catalog_dir=cat.root)
    fmt = settings.work_order_format.replace("{part}", design.part)
    with Register.open(where.target) as reg:
        with reg.issuing(design.part, design.revision, design.fingerprint or "-", qty, lot, due,
                         issued_by=by, fmt=fmt, number=number, quote=quote, draft=draft) as num:
            check_number(num)
            order = reg.get(num)
            html = render_work_order_html(design, settings, number=num, qty=qty, due=due, lot=lot,
                                          issued=order.issued_at[:10], issued_by=order.issued_by, draft=draft)
            pdf_path, html_path = out / f"{num}.pdf", out / f"{num}.html"
            blocked: list = []
            write_pdf_and_html(html, pdf_path, html_path, blocked, make_folders=True)   # the folder only now
        reg.attach_files(num, [str(pdf_path.resolve()), str(html_path.resolve())])  # the same from any folder
        if draft:
            # a draft copy is traceable but never built for production: listed as void with the reason
            reg.void(num, "draft copy: not for production")
    for url in blocked:
        warn(f"the renderer was refused {url[:80]}")
    return Issued(num, pdf_path, html_path, where.shown, warnings, time.perf_counter() - t0, where.found_by)


def issue_work_order(spec_path, *, qty, due=None, lot=None, out_dir=".", draft=False, register_path=None,
                     number=None, by=None, catalog_dir=None, warn=None, quote=None) -> Issued:
    """``specgen workorder``: options checked first, then load, design, refuse or issue."""
    from ..api import run_design
    from ..catalog.loader import load_catalog
    from ..design.spec import load_spec
    from ..freetext import check_name

    check_qty(qty)
    check_due(due)
    check_lot(lot)
    check_number(number)
    by = check_name(by)
    cat = load_catalog(catalog_dir)
    spec = load_spec(spec_path)
    design = run_design(spec, cat)
    return issue_from_design(spec_path, spec, design, cat, qty=qty, due=due, lot=lot, out_dir=out_dir,
                             draft=draft, register_path=register_path, number=number, by=by, warn=warn,
                             quote=quote)
