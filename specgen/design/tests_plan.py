"""The test station's limits and the materials per unit, both derived once here from the design.

Test voltages are shop defaults (shop.yaml, figures from memory of IEC 62368-1 / IEC 61558-1 practice);
every document that prints them says that the applicable product safety standard, the customer's
drawing, local codes and licensed practice decide.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from ..physics import wire as wiremod
from ..standards import insulation as ins
from .insulation import hipot_connection, side_names
from .resolve import spec_error
from .result import CoreResult, HipotTest, InsulationResult, Limit, MaterialLine, TestPlan
from .spec import Barrier, Spec
from .state import DesignState, KindTests
from .test_setup import dcr_setting, finish

TAPE_OVERLAP_M = 0.015          # each wrap of tape overlaps its start by ~15 mm (common practice)
TOROID_TAPE_OVERLAP = 0.5       # toroid tape laid half-lapped (common practice)


def hipot_voltage_v(rating: str, working_v: float, hipot: Mapping[str, float], *, mains_connected: bool = True,
                    step_v: float = 50.0) -> tuple[float, float, str]:
    """Type-test and routine voltages (a.c. rms) for an insulation grade at a working voltage, with the rule.

    The grade's rule is ``standards.insulation.hipot_test_voltage_v`` (2 U + 1000 V, at least 1500 V on mains;
    reinforced and double twice that, at least 3000 V; routine 120 % for 1 s; rounded up to the test set's
    step). Functional insulation has no safety test: the shop's functional voltage.
    """
    if rating == "functional":
        v = ins.round_up_to_step_v(hipot["functional_v"], step_v)
        return v, ins.round_up_to_step_v(v * hipot["routine_factor"], step_v), "functional insulation: shop default"
    grade = ins.Grade.REINFORCED if rating == "double" else ins.Grade(rating)
    h = ins.hipot_test_voltage_v(grade, working_v, mains_connected=mains_connected, step_v=step_v)
    return h.type_test_v, h.routine_v, f"{rating}: {h.rule} ({h.source})"


def _barriers(spec: Spec) -> list[Barrier]:
    """The spec's barriers, or the default set: primary to the other windings, all windings to the core."""
    if spec.barriers:
        return list(spec.barriers)
    wv = 0.0
    prim = [w for w in spec.windings if w.role == "primary"]
    if prim:
        wv = prim[0].voltage_max_v or prim[0].voltage_v or 0.0
    else:
        wv = max((w.voltage_v or 0.0) for w in spec.windings) or 50.0
    out = []
    others = [w.name for w in spec.windings if w.role in ("secondary", "auxiliary")]
    if prim and others:
        out.append(Barrier(a=prim[0].name, b="+".join(others), rating="basic", working_voltage_v=wv))
    out.append(Barrier(a="all windings", b="core", rating="basic", working_voltage_v=wv))
    return out


def test_plan(state: DesignState, kind: KindTests, insulation: InsulationResult | None = None) -> TestPlan:
    """DCR of every winding at 20 degC and the hipot of every barrier (common), with the kind's own limits;
    every limit rounded and its instruction written by ``test_setup.finish``."""
    spec, windings, shop = state.spec, state.windings, state.cat.shop
    tol = shop.tolerances
    dcr = tuple(finish(Limit(name="DCR", item=w.name, nominal=w.dcr_20c_ohm, low=w.dcr_20c_ohm * (1 - tol["dcr"]),
                             high=w.dcr_20c_ohm * (1 + tol["dcr"]), unit="ohm", pins=f"pins {w.start}-{w.finish}",
                             setting=dcr_setting(w.dcr_20c_ohm),
                             condition="read at the winding's temperature, referred to 20 °C"))
                for w in windings if w.finish)
    hp = shop.hipot
    step = shop.insulation.hipot_step_v if shop.insulation else 50.0
    coordinated = {r.between: r for r in insulation.barriers} if insulation else {}
    hipot = []
    for b in _barriers(spec):
        r = coordinated.get((b.a, b.b))
        if r is not None:
            rule = r.hipot_rule if r.hipot_rule.startswith(("reinforced", "functional")) else f"{b.rating}: {r.hipot_rule}"
            type_v, routine_v, basis = r.type_test_v, r.routine_test_v, rule
        else:
            names = side_names(spec, b.a) + side_names(spec, b.b)
            mains = any(w.role in ("primary", "reset") for w in spec.windings if w.name in names)
            try:
                type_v, routine_v, basis = hipot_voltage_v(b.rating, b.working_voltage_v, hp, mains_connected=mains,
                                                           step_v=step)
            except ValueError as err:
                raise spec_error(spec, f"{err}: the default barrier {b.a} - {b.b} takes the windings' "
                                       f"{b.working_voltage_v:g} V; check the voltages or declare the barriers",
                                 "windings") from None
        hipot.append(HipotTest(between=f"{b.a} - {b.b}", a=b.a, b=b.b, rating=b.rating,
                               working_voltage_v=b.working_voltage_v, type_voltage_v=type_v,
                               type_duration_s=hp["type_duration_s"], routine_voltage_v=routine_v,
                               routine_duration_s=hp["routine_duration_s"], trip_current_a=hp["trip_current_a"],
                               basis=basis, connection=hipot_connection(spec, b.a, b.b)))
    ir = shop.insulation_resistance
    def done(limits: tuple[Limit, ...]) -> tuple[Limit, ...]:
        return tuple(finish(lim) for lim in limits)

    return TestPlan(dcr=dcr, ratio=done(kind.ratio), open_circuit=done(kind.open_circuit),
                    inductance=done(kind.inductance), no_load=done(kind.no_load), polarity=kind.polarity,
                    hipot=tuple(hipot), insulation_resistance_v=ir["voltage_v"],
                    insulation_resistance_min_ohm=ir["minimum_ohm"], alpha_per_k=wiremod.ALPHA20_CU_PER_K,
                    cautions=kind.cautions)


def materials_per_unit(state: DesignState, core: CoreResult) -> list[MaterialLine]:
    """What one unit pulls from stock: core, bobbin, clips, each wire, tapes, sleeving, varnish."""
    spec, cat, parts, built, windings = state.spec, state.cat, state.parts, state.built, state.windings
    out = []
    c = parts.core
    m = parts.material
    if core.laminations:
        out.append(MaterialLine("laminations", c.id, f"{c.id} laminations, {m.name}", core.laminations, "pairs",
                                core.mass_kg, note=f"stack {(core.stack_m or 0.0) * 1e3:g} mm, E and I pieces"))
    else:
        out.append(MaterialLine("core", c.id, f"{c.shape} core {c.id}, {m.name}", spec.core_count, "sets",
                                core.mass_kg, note=_pieces_to_a_set(c.pieces)))
    if parts.bobbin is not None:
        b = parts.bobbin
        out.append(MaterialLine("bobbin", b.id, f"bobbin {b.id}, {len(b.pins)} pins", 1, "pcs", None))
        if b.clips:
            out.append(MaterialLine("clip", f"{b.id}-CLIP", f"clips for {b.id}", b.clips, "pcs", None))
    for w in windings:
        out.append(MaterialLine("wire", w.wire, f"{w.wire_label} for {w.name}"
                                + (f", {w.strands} in hand" if w.strands > 1 else ""),
                                w.length_m * w.strands, "m", w.mass_kg, note=f"winding {w.name}"))
    tf_toroid = parts.former.kind == "toroid"
    tape_len: dict[str, float] = {}

    def add_tape(tape_id: str, length: float) -> None:
        tape_len[tape_id] = tape_len.get(tape_id, 0.0) + length

    def wrap_length(tape_id: str, mlt: float, wraps: int) -> float:
        if wraps <= 0:
            return 0.0
        if tf_toroid:
            # half-lapped around the ring: the tape advances width/2 per turn around the mean circumference
            width: float = cat.tapes[tape_id].width_m
            mean_c = math.pi * (parts.former.od_m + parts.former.id_m) / 2.0
            return float(wraps * mean_c / (width * TOROID_TAPE_OVERLAP) * mlt)
        return float(wraps * (mlt + TAPE_OVERLAP_M))

    for sec in built.sections:
        sb, margin, tape_id, tape_layers = sec.build, sec.margin_m, sec.tape_after, sec.tape_after_layers
        if sec.wound_with is not None and spec.build_order and (sec.winding, sec.index) not in spec.build_order:
            continue                       # bifilar: its partner's layers, tapes and margins already counted
        if spec.layer_tape and len(sb.layers) > 1:
            for layer in sb.layers[:-1]:          # two widths a layer: twice the tape
                add_tape(spec.layer_tape.tape, spec.layer_tape.widths
                         * wrap_length(spec.layer_tape.tape, layer.mlt_m, spec.layer_tape.layers))
        if tape_id and tape_layers:
            outer = parts.former.mlt_m(sb.end_build_m)
            add_tape(tape_id, sec.tape_after_widths * wrap_length(tape_id, outer, tape_layers))
        if spec.margin_tape and margin > 0 and not tf_toroid:
            t = cat.tapes[spec.margin_tape].thickness_m
            wraps = math.ceil(sb.layer_height_m / t - 1e-9)
            add_tape(spec.margin_tape, 2 * sum(l.mlt_m * wraps for l in sb.layers))
    for tid, length in tape_len.items():
        t = cat.tapes[tid]
        width = f"{t.width_m * 1e3:g} mm"
        name = t.name if width in t.name else f"{t.name}, {width} wide"     # most catalogue names carry it
        out.append(MaterialLine("tape", tid, name, length, "m", None))
    sleeve: dict[str, float] = {}
    for w, ws in zip(windings, spec.windings):
        sid = w.lead_sleeving
        if sid:
            leads = 2 + len(ws.section_pins) * 2 if w.finish else 1
            sleeve[sid] = sleeve.get(sid, 0.0) + leads * cat.shop.lead_length_m
    for sid, length in sleeve.items():
        s = cat.sleevings[sid]
        out.append(MaterialLine("sleeving", sid, s.name, length, "m", None))
    if spec.varnish:
        v = cat.varnishes[spec.varnish]
        volume = 0.0
        for sec in built.sections:
            sb = sec.build
            if sec.wound_with is not None and (sec.winding, sec.index) not in spec.build_order:
                continue                   # bifilar: the partner's layers hold both wires
            for layer in sb.layers:
                volume += layer.turns_capacity * sb.pitch_m * sb.layer_height_m * layer.mlt_m
        out.append(MaterialLine("varnish", v.id, v.name, volume * v.winding_volume_share * 1e3, "l", None,
                                note=f"{v.winding_volume_share:.0%} of the winding volume (common practice)"))
    return out


def _pieces_to_a_set(pieces: int) -> str:
    """How the stores count a core: '2 halves to a set' (E, ETD, PQ, pot and RM cores come as mated halves),
    'one piece' (a toroid), 'n pieces to a set' otherwise."""
    if pieces == 2:
        return "2 halves to a set"
    if pieces == 1:
        return "one piece"
    return f"{pieces} pieces to a set"
