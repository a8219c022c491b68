"""Spec text from a requirement: the draft spec ``--write`` writes for a candidate, and the requirement as
a spec (no core chosen yet) that the engine's helpers read while the search resolves its core choices.

Both go through the spec parser: the search never stands in for a Spec with anything else.
"""

from __future__ import annotations

import json
from typing import TYPE_CHECKING

from ..catalog.models import Catalog
from ..design import kernel as K
from ..design.spec_keys import winding_key_used
from .candidates import CoreChoice, WireOption, sleeving_for
from .requirement import Requirement

if TYPE_CHECKING:
    from ..design.spec import Spec

PROBE_PART = "SEARCH-DRAFT"     # part number of the requirement-as-spec (never written to a file)
WOUND_KINDS = ("transformer", "flyback")      # the requirement names its windings (a primary and its loads)


def _y(value: object, flow: bool = False) -> str:
    """A YAML scalar: plain where YAML reads it back as the same text, else quoted."""
    import yaml

    text = str(value)
    plain = bool(text) and text == text.strip() and not any(ch in text for ch in "#:'\"\n\t&*!|>%@`") \
        and text[0] not in "-?[]{},"
    if plain and flow and any(ch in text for ch in ",[]{}"):
        plain = False
    if plain:
        try:
            plain = yaml.safe_load(text) == text
        except yaml.YAMLError:
            plain = False
    return text if plain else json.dumps(text, ensure_ascii=False)


def _mm(x: float) -> str:
    return f"{x * 1e3:.10g} mm"


def _pins(req: Requirement, choice: CoreChoice) -> list[tuple[str, str]]:
    """(start, finish) per winding: the primary on the first row of pins, the loads on the other row."""
    count = len(req.windings) if req.kind in WOUND_KINDS else 1
    if req.kind == "common_mode_choke":       # a toroid's free leads, one pair per line
        return [(f"{c}1", f"{c}2") for c in "ABC"[:req.lines]]
    if choice.bobbin is None:
        if req.kind == "inductor":
            return [("A", "B")]
        letters = ["H"] + list("XYZUVW")
        return [(f"{letters[i]}1", f"{letters[i]}2") for i in range(count)]
    pins = [str(p) for p in choice.bobbin.pins]
    if choice.bobbin.pin_rows == 2 and len(pins) >= 4:
        half = len(pins) // 2
        side_a, side_b = pins[:half], pins[half:]
    else:
        side_a, side_b = pins, []
    rest = side_b + side_a[2:]
    out = [(side_a[0], side_a[1])]
    for i in range(1, count):
        out.append((rest[2 * i - 2], rest[2 * i - 1]))
    return out


def _operating_lines(req: Requirement) -> list[str]:
    t = req.text
    freq = (f"[{', '.join(_y(f, True) for f in req.frequencies_text)}]" if req.frequencies_text
            else _y(t['frequency']))
    lines = ["operating:", f"  frequency: {freq}"]
    if req.kind == "transformer":
        lines.append(f"  waveform: {req.waveform}")
        if req.waveform == "unipolar":
            lines.append(f"  duty: {req.duty!r}")
    if t.get("ambient"):
        lines.append(f"  ambient: {_y(t['ambient'])}")
    lines.append(f"  cooling: {req.cooling}")
    if req.air_speed_m_s is not None:
        lines.append(f"  air_speed: {req.air_speed_m_s!r} m/s")
    lines.append(f"  insulation_class: {req.insulation_class_c}")
    if t.get("flux_limit"):
        lines.append(f"  flux_limit: {_y(t['flux_limit'])}")
    if req.efficiency is not None and req.kind == "transformer":     # an inductor's spec has no efficiency
        lines.append(f"  efficiency: {req.efficiency!r}")
    if req.kind == "inductor":
        lines += ["", "inductor:", f"  inductance: {_y(t['inductor.inductance'])}",
                  f"  current: {_y(t['inductor.current'])}"]
        if t.get("inductor.ripple"):
            lines.append(f"  ripple: {_y(t['inductor.ripple'])}")
        if t.get("inductor.current_peak"):
            lines.append(f"  current_peak: {_y(t['inductor.current_peak'])}")
        if t.get("inductor.inductance_min"):
            lines.append(f"  inductance_min: {_y(t['inductor.inductance_min'])}")
        lines.append(f"  duty: {req.duty!r}")
    if req.kind == "flyback":
        lines += ["", "flyback:"] + [f"  {k[3:]}: {_y(v)}" for k, v in t.items() if k.startswith("fb.") and v is not None]
    if req.kind == "common_mode_choke":
        lines += ["", "common_mode_choke:"] + [f"  {k[4:]}: {_y(v)}" for k, v in t.items()
                                                if k.startswith("cmc.") and v is not None]
    return lines


def _winding_lines(req: Requirement, options: list[WireOption | None], pins: list[tuple[str, str]],
                   choice: CoreChoice | None) -> list[str]:
    lines = ["windings:"]
    wl: tuple = req.windings if req.kind in WOUND_KINDS else (None,) * max(1, req.lines)
    for i, (w, opt, (p1, p2)) in enumerate(zip(wl, options, pins)):
        if w is None and req.kind == "common_mode_choke":
            lines += [f"  - name: L{i + 1}", "    role: line"]
        elif w is None:
            lines += ["  - name: L", "    role: main"]
        else:
            lines += [f"  - name: {_y(w.name)}", f"    role: {w.role}"]
            for key in ("voltage", "voltage_min", "voltage_max", "current", "va"):
                if w.text.get(key) and winding_key_used(req.kind, w.role, key):
                    lines.append(f"    {key}: {_y(w.text[key])}")
            if w.same_turns_as:
                lines.append(f"    same_turns_as: {_y(w.same_turns_as)}")
        if opt is None:
            lines.append("    wire: auto")
        else:
            lines += [f"    wire: {_y(opt.wire.id)}", f"    strands: {opt.strands}"]
        lines += [f"    start: {json.dumps(p1)}", f"    finish: {json.dumps(p2)}", "    direction: cw"]
        if (req.kind in WOUND_KINDS and req.rating == "reinforced" and w is not None and w.role != "primary"
                and opt is not None and opt.wire.kind == "tiw" and choice is not None and choice.bobbin is not None):
            lines.append("    margin: 0 mm   # triple-insulated wire carries the reinforced insulation")
    return lines


def requirement_spec(req: Requirement) -> Spec:
    """The requirement written as a spec, parsed by the spec parser: operating point, windings (wire auto),
    no core chosen yet (swap one in with ``dataclasses.replace``)."""
    from ..design.spec import load_spec_text

    count = len(req.windings) if req.kind in WOUND_KINDS else max(1, req.lines)
    pins = [(f"P{2 * i + 1}", f"P{2 * i + 2}") for i in range(count)]
    lines = [f"part: {PROBE_PART}", f"kind: {req.kind}", "core: {id: none}", ""] + _operating_lines(req)
    lines += [""] + _winding_lines(req, [None] * count, pins, None)
    return load_spec_text("\n".join(lines) + "\n", req.file)


def _insulation_lines(req: Requirement, cat: Catalog, choice: CoreChoice, options: list[WireOption]) -> list[str]:
    plan = choice.plan
    lines = ["insulation:", f"  layer_tape: {{tape: {plan.layer_tape}, layers: 1}}"]
    if plan.core_wrap and choice.bobbin is None:
        lines.append(f"  core_wrap: {{tape: {plan.core_wrap}, layers: 1}}   # half-lapped on the core")
    if req.kind in WOUND_KINDS:         # a choke's lines lie side by side on sectors: no tape between them
        lines.append(f"  winding_tape: {{tape: {plan.winding_tape}, layers: {plan.winding_tape_layers}}}")
    lines.append(f"  outer_wrap: {{tape: {plan.outer_wrap}, layers: {plan.outer_wrap_layers}}}")
    if plan.margin_m > 0 and choice.bobbin is not None:
        lines.append(f"  margin: {_mm(plan.margin_m)}")
        if plan.margin_tape:
            lines.append(f"  margin_tape: {plan.margin_tape}")
    diam = max((o.wire.overall_diameter_m or o.wire.overall_thickness_m or 0.0 for o in options), default=0.0)
    test_v = 0.0
    if req.kind != "inductor" and req.rating != "functional" and req.working_voltage_v:
        from ..design.tests_plan import hipot_voltage_v

        test_v = hipot_voltage_v(req.rating, req.working_voltage_v, cat.shop.hipot)[0]
    slv = sleeving_for(cat, req.insulation_class_c, diam, test_v)
    if slv:
        lines.append(f"  sleeving: {slv}")
    if plan.varnish:
        lines.append(f"  varnish: {plan.varnish}")
    wv = f"{req.working_voltage_v:.10g} V"
    barriers = []
    if req.kind in WOUND_KINDS:
        others = "+".join(w.name for w in req.loads)
        barriers.append((f"[{_y(req.primary.name, True)}, {_y(others, True)}]", req.rating))
        barriers.append(("[all, core]", req.to_core))
    elif req.kind == "common_mode_choke":
        names = [f"L{i + 1}" for i in range(req.lines)]
        barriers += [(f"[{a}, {b}]", req.rating) for i, a in enumerate(names) for b in names[i + 1:]]
        if req.to_core != "functional":
            barriers.append(("[all, core]", req.to_core))
    elif req.to_core != "functional":
        barriers.append(("[all, core]", req.to_core))
    if barriers:
        lines.append("  barriers:")
        for between, rating in barriers:
            lines.append(f"    - {{between: {between}, rating: {rating}, working_voltage: {wv}}}")
    return lines


def draft_spec_text(req: Requirement, cat: Catalog, choice: CoreChoice, options: list[WireOption], part: str,
                    note: str = "") -> str:
    """The draft spec (status draft, revision A) for one candidate: explicit core, stack, bobbin, wires and
    strands; turns, layers and gap left to the design engine, which ``specgen design`` runs the same way."""
    lines = [f"# {line}" for line in note.splitlines()] if note else []
    lines += [f"part: {_y(part)}", f"title: {_y(req.title or req.summary())}", "revision: A", "status: draft"]
    if req.customer:
        lines.append(f"customer: {_y(req.customer)}")
    lines += [f"kind: {req.kind}", "", "core:", f"  id: {_y(choice.core.id)}"]
    if choice.stack_m:
        lines.append(f"  stack: {_mm(choice.stack_m)}")
    if choice.bobbin is not None:
        lines.append(f"  bobbin: {_y(choice.bobbin.id)}")
    mat = cat.materials[choice.core.material]
    if req.kind == "inductor" and not mat.is_powder:
        if choice.core.gappable:
            lines += ["  gap: auto", f"  gap_arrangement: {K.gap_arrangement_on('centre', choice.core.shape)}"]
        else:
            lines += ["  gap: none", "  gap_arrangement: none"]
    lines += [""] + _operating_lines(req)
    count = len(req.windings) if req.kind in WOUND_KINDS else max(1, req.lines)
    opts: list[WireOption | None] = list(options) if options else [None] * count
    lines += [""] + _winding_lines(req, opts, _pins(req, choice), choice)
    lines += [""] + _insulation_lines(req, cat, choice, options)
    if req.notes:
        lines += ["", f"notes: {json.dumps(req.notes, ensure_ascii=False)}"]
    return "\n".join(lines) + "\n"
