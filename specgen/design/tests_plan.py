"""The test station's limits and the materials per unit, both derived once here from the design.

Test voltages are shop defaults (shop.yaml, figures from memory of IEC 62368-1 / IEC 61558-1 practice);
every document that prints them says that the applicable product safety standard, the customer's
drawing, local codes and licensed practice decide.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from ..physics import wire as wiremod
from .result import CoreResult, HipotTest, Limit, MaterialLine, TestPlan
from .spec import Barrier, Spec
from .state import DesignState, KindTests

TAPE_OVERLAP_M = 0.015          # each wrap of tape overlaps its start by ~15 mm (common practice)
TOROID_TAPE_OVERLAP = 0.5       # toroid tape laid half-lapped (common practice)


def hipot_voltage_v(rating: str, working_v: float, hipot: Mapping[str, float]) -> tuple[float, str]:
    """Type-test voltage (a.c. rms, 60 s) for an insulation rating at a working voltage.

    The shop's table figures (1500 V basic, 3000 V reinforced up to 250 V working, from memory of IEC 62368-1)
    with the common-practice '2 U + 1000 V' for basic above that, doubled for reinforced.
    """
    two_u = 2.0 * working_v + 1000.0
    if rating == "functional":
        return hipot["functional_v"], "functional insulation: shop default"
    if rating in ("basic", "supplementary"):
        v = max(hipot["basic_v"] if rating == "basic" else hipot["supplementary_v"], two_u)
        return v, (f"{rating}: max(shop {hipot['basic_v']:.0f} V, 2 x {working_v:.0f} V + 1000 V) "
                   f"(common practice, from memory)")
    v = max(hipot["reinforced_v"], 2.0 * two_u)
    return v, (f"{rating}: max(shop {hipot['reinforced_v']:.0f} V, 2 x (2 x {working_v:.0f} V + 1000 V)) "
               f"(common practice, from memory)")


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


def test_plan(state: DesignState, kind: KindTests) -> TestPlan:
    """DCR of every winding at 20 degC and the hipot of every barrier (common), with the kind's own limits."""
    spec, windings, shop = state.spec, state.windings, state.cat.shop
    tol = shop.tolerances
    dcr = tuple(Limit(name="DCR", item=w.name, nominal=w.dcr_20c_ohm, low=w.dcr_20c_ohm * (1 - tol["dcr"]),
                      high=w.dcr_20c_ohm * (1 + tol["dcr"]), unit="ohm",
                      condition=f"pins {w.start}-{w.finish}, at 20 °C")
                for w in windings if w.finish)
    hp = shop.hipot
    hipot = []
    for b in _barriers(spec):
        v, basis = hipot_voltage_v(b.rating, b.working_voltage_v, hp)
        hipot.append(HipotTest(between=f"{b.a} - {b.b}", a=b.a, b=b.b, rating=b.rating,
                               working_voltage_v=b.working_voltage_v, type_voltage_v=v,
                               type_duration_s=hp["type_duration_s"], routine_voltage_v=v * hp["routine_factor"],
                               routine_duration_s=hp["routine_duration_s"], trip_current_a=hp["trip_current_a"],
                               basis=basis))
    ir = shop.insulation_resistance
    return TestPlan(dcr=dcr, ratio=kind.ratio, open_circuit=kind.open_circuit, inductance=kind.inductance,
                    polarity=kind.polarity, hipot=tuple(hipot), insulation_resistance_v=ir["voltage_v"],
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
                                core.mass_kg, note=f"{c.pieces} piece(s) per set"))
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
        if spec.layer_tape and len(sb.layers) > 1:
            for layer in sb.layers[:-1]:
                add_tape(spec.layer_tape.tape, wrap_length(spec.layer_tape.tape, layer.mlt_m, spec.layer_tape.layers))
        if tape_id and tape_layers:
            outer = parts.former.mlt_m(sb.end_build_m)
            add_tape(tape_id, wrap_length(tape_id, outer, tape_layers))
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
            for layer in sb.layers:
                volume += layer.turns_capacity * sb.pitch_m * sb.layer_height_m * layer.mlt_m
        out.append(MaterialLine("varnish", v.id, v.name, volume * v.usage_m3_per_m3 * 1e3, "l", None,
                                note=f"{v.usage_m3_per_m3:.0%} of the winding volume (common practice)"))
    return out
