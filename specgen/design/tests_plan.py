"""The test station's limits and the materials per unit, both derived once here from the design.

Test voltages are shop defaults (shop.yaml, figures from memory of IEC 62368-1 / IEC 61558-1 practice);
every document that prints them says that the applicable product safety standard, the customer's
drawing, local codes and licensed practice decide.
"""

from __future__ import annotations

import math

from ..physics import wire as wiremod
from .result import HipotTest, Limit, MaterialLine, TestPlan

TAPE_OVERLAP_M = 0.015          # each wrap of tape overlaps its start by ~15 mm (common practice)
TOROID_TAPE_OVERLAP = 0.5       # toroid tape laid half-lapped (common practice)
MAGNETIZING_L_LOW = 0.7         # open-circuit inductance floor: material permeability varies widely (common practice)
LEAKAGE_BAND = (0.7, 1.3)       # leakage limits: the build's geometry varies less, but a missed interleave or an
                                # extra tape shows as a large change (common practice, from memory)


def hipot_voltage_v(rating: str, working_v: float, hipot: dict) -> tuple[float, str]:
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


def _barriers(spec, windings) -> list:
    """The spec's barriers, or the default set: primary to the other windings, all windings to the core."""
    from .spec import Barrier

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


def test_plan(spec, cat, windings, lm, inductor, voltages, open_circuit, leakage=None) -> TestPlan:
    shop = cat.shop
    tol = shop.tolerances
    alpha = wiremod.ALPHA20_CU_PER_K
    dcr = tuple(Limit(name="DCR", item=w.name, nominal=w.dcr_20c_ohm, low=w.dcr_20c_ohm * (1 - tol["dcr"]),
                      high=w.dcr_20c_ohm * (1 + tol["dcr"]), unit="ohm",
                      condition=f"pins {w.start}-{w.finish}, at 20 °C")
                for w in windings if w.finish)
    ratio, ocv, pol, ind = [], [], [], []
    prim = next((w for w in windings if w.role == "primary"), None)
    if prim is not None:
        for w in windings:
            if w.role in ("secondary", "auxiliary"):
                r = prim.turns / w.turns
                ratio.append(Limit(name="turns ratio", item=f"{prim.name}:{w.name}", nominal=r,
                                   low=r * (1 - tol["ratio"]), high=r * (1 + tol["ratio"]), unit=":1",
                                   condition=f"{prim.turns} : {w.turns} turns"))
                v = open_circuit.get(w.name)
                if v:
                    ocv.append(Limit(name="open-circuit voltage", item=w.name, nominal=v,
                                     low=v * (1 - tol["open_circuit_voltage"]),
                                     high=v * (1 + tol["open_circuit_voltage"]), unit="V",
                                     condition=f"{prim.name} at {voltages[prim.name]:.4g} V, "
                                               f"{_f(spec.frequency_hz)}, no load"))
        for w in windings:
            if w is prim or not w.finish:
                continue
            pol.append(f"Apply a positive step to {prim.name} pin {prim.dot_pin} (dot) with respect to pin "
                       f"{prim.finish if prim.dot_pin == prim.start else prim.start}: {w.name} pin {w.dot_pin} (dot) "
                       f"reads positive.")
        if lm:
            ind.append(Limit(name="open-circuit inductance", item=prim.name, nominal=lm, low=lm * MAGNETIZING_L_LOW,
                             high=None, unit="H", condition=f"pins {prim.start}-{prim.finish}, others open"))
        if leakage:
            lo, hi = LEAKAGE_BAND
            ind.append(Limit(name="leakage inductance", item=prim.name, nominal=leakage, low=leakage * lo,
                             high=leakage * hi, unit="H",
                             condition=f"pins {prim.start}-{prim.finish}, every other winding shorted"))
    if inductor is not None:
        w = windings[0]
        t = tol["inductance"]
        ind.append(Limit(name="inductance, no bias", item=w.name, nominal=inductor.inductance_zero_bias_h,
                         low=inductor.inductance_zero_bias_h * (1 - t), high=inductor.inductance_zero_bias_h * (1 + t),
                         unit="H", condition=f"pins {w.start}-{w.finish}, small signal, {_f(spec.frequency_hz)}"))
        if inductor.rolloff_pct > 0.5:
            ind.append(Limit(name=f"inductance at {inductor.current_dc_a:g} A DC", item=w.name,
                             nominal=inductor.inductance_at_full_bias_h,
                             low=inductor.inductance_at_full_bias_h * (1 - t), high=None, unit="H",
                             condition="with DC bias source, if the station has one"))
        if inductor.gap_m:
            ind.append(Limit(name="AL of the gapped set", item=w.name, nominal=inductor.al_nh * 1e-9,
                             low=inductor.al_nh * 1e-9 * (1 - t), high=inductor.al_nh * 1e-9 * (1 + t),
                             unit="H", condition="per turn squared; check the set before winding with a 10-turn coil"))
    hp = shop.hipot
    hipot = []
    for b in _barriers(spec, windings):
        v, basis = hipot_voltage_v(b.rating, b.working_voltage_v, hp)
        hipot.append(HipotTest(between=f"{b.a} - {b.b}", a=b.a, b=b.b, rating=b.rating,
                               working_voltage_v=b.working_voltage_v, type_voltage_v=v,
                               type_duration_s=hp["type_duration_s"], routine_voltage_v=v * hp["routine_factor"],
                               routine_duration_s=hp["routine_duration_s"], trip_current_a=hp["trip_current_a"],
                               basis=basis))
    ir = shop.insulation_resistance
    return TestPlan(dcr=dcr, ratio=tuple(ratio), open_circuit=tuple(ocv), inductance=tuple(ind),
                    polarity=tuple(pol), hipot=tuple(hipot), insulation_resistance_v=ir["voltage_v"],
                    insulation_resistance_min_ohm=ir["minimum_ohm"], alpha_per_k=alpha)


def _f(hz: float) -> str:
    return f"{hz / 1e3:g} kHz" if hz >= 1e3 else f"{hz:g} Hz"


def materials_per_unit(spec, cat, parts, built, windings, core) -> list:
    """What one unit pulls from stock: core, bobbin, clips, each wire, tapes, sleeving, varnish."""
    out = []
    c = parts.core
    m = parts.material
    if core.laminations:
        out.append(MaterialLine("laminations", c.id, f"{c.id} laminations, {m.name}", core.laminations, "pairs",
                                core.mass_kg, note=f"stack {core.stack_m * 1e3:g} mm, E and I pieces"))
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
    tape_len: dict = {}

    def add_tape(tape_id: str, length: float) -> None:
        tape_len[tape_id] = tape_len.get(tape_id, 0.0) + length

    def wrap_length(tape_id: str, mlt: float, wraps: int) -> float:
        if wraps <= 0:
            return 0.0
        if tf_toroid:
            # half-lapped around the ring: the tape advances width/2 per turn around the mean circumference
            width = cat.tapes[tape_id].width_m
            mean_c = math.pi * (parts.former.od_m + parts.former.id_m) / 2.0
            return wraps * mean_c / (width * TOROID_TAPE_OVERLAP) * mlt
        return wraps * (mlt + TAPE_OVERLAP_M)

    for _st, _k, _order, sb, margin, tape_id, tape_layers in built.sections:
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
    sleeve: dict = {}
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
        for _st, _k, _order, sb, *_ in built.sections:
            for layer in sb.layers:
                volume += layer.turns_capacity * sb.pitch_m * sb.layer_height_m * layer.mlt_m
        out.append(MaterialLine("varnish", v.id, v.name, volume * v.usage_m3_per_m3 * 1e3, "l", None,
                                note=f"{v.usage_m3_per_m3:.0%} of the winding volume (common practice)"))
    return out
