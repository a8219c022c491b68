"""design(spec, catalog) -> Design: the whole calculation of one part, written once for every kind.

Order of work:
 1. resolve the catalogue entries (core, material, bobbin, wires, tapes) and check the pins (``resolve``);
 2. effective core parameters (IEC 60205 from dimensions, or the catalogue's measured override);
 3. the kind (``kinds``) finds turns, gap and wires at a first-guess temperature: a transformer from
    Faraday's law at the flux limit (raised above 1 kHz while the loss falls), its secondaries compensated
    for the load drop; an inductor by the energy method with fringing, or the powder roll-off;
 4. the layer-by-layer build, DCR from each layer's own MLT, the AC factor per layer (Dowell, by the
    current's harmonics), the leakage inductance, the core loss by waveform (``build``, ``kernel``);
 5. temperature rise (McLyman by cooling, or the core's measured R_th) iterated with copper resistance and the
    ferrite's core loss at the core's temperature until the hot spot settles, then the runaway margin
    (``temperature``); copper loss is taken at the hot spot, a few percent above the mean winding's (conservative);
 6. the Design: windings, build, losses; the kind's flux checks, then the common checks (``checks``), the
    test plan and the materials per unit (``tests_plan``).
"""

from __future__ import annotations

from typing import Any

from ..catalog.models import Catalog
from ..physics import wire as wiremod
from . import kernel as K
from .bounds import refuse_out_of_range
from .build import copper_lengths_m, winding_fr
from .checks import run_checks
from .floor import floor_data, history_entries
from .flux import b_sat_hot_t
from .insulation import barrier_interfaces, coordinate
from .kinds import PartKind, kind_for
from .resolve import catalog_ids, check_pins, check_references, core_result, resolve_core, spec_error
from .result import Build, Design, Losses, Section, WindingResult
from .spec import Spec, Winding
from .state import (
    BuiltWindow,
    DesignState,
    ElectricalSummary,
    Evaluation,
    Parts,
    ThermalState,
    WindingState,
)
from .taps import section_notes, tap_checks, tap_results, with_tap_tests
from .temperature import settle, temperature_checks
from .tests_plan import materials_per_unit, test_plan

_LEVEL_ORDER = {"fail": 0, "warn": 1, "pass": 2}


def design(spec: Spec, cat: Catalog) -> Design:
    """The whole calculation for one spec (see the module docstring for the order of work)."""
    parts = resolve_core(spec, cat)
    check_pins(spec, parts)
    check_references(spec, cat)
    try:
        kind = kind_for(spec.kind)
    except KeyError:
        raise spec_error(spec, f"unknown kind '{spec.kind}'", "kind") from None
    run = kind.start(spec, cat, parts)
    shop = cat.shop
    temp = K.first_guess_thermal(spec.ambient_c, shop.hotspot_margin_k)
    ev, iterations = run.first(temp)
    # temperature loop: resistance and core loss with temperature, rise, until the hot spot settles
    cooling = K.cooling_model(spec.cooling, spec.air_speed_m_s, shop.cooling)
    ev, temp, passes = settle(spec, parts, run, ev, temp, shop.hotspot_margin_k, cooling)
    iterations += passes
    d = finish(spec, cat, parts, kind, ev, temp, run.summary(ev, temp), iterations)
    refuse_out_of_range(spec, d)     # every result finite and inside its plausible range (bounds.RANGE)
    return d


def _section_pins(w: Winding, k: int) -> tuple[str, str]:
    pins = [w.start or ""] + list(w.section_pins) + [w.finish or ""]
    return pins[k - 1], pins[k]


def _sections(spec: Spec, built: BuiltWindow, ev: Evaluation[Any], w: Winding) -> tuple[Section, ...]:
    out = []
    for s in built.of(w.name):
        sb = s.build
        sp, fp = _section_pins(w, s.index)
        layered = spec.layer_tape is not None and len(sb.layers) > 1
        out.append(Section(winding=w.name, index=s.index, order=s.order, turns=sum(l.turns for l in sb.layers),
                           turns_per_layer=sb.turns_per_layer, layers=sb.layers, margin_m=s.margin_m,
                           usable_breadth_m=sb.usable_breadth_m,
                           start_build_m=sb.layers[0].build_to_centre_m - sb.layer_height_m / 2,
                           end_build_m=sb.end_build_m, tape_after=s.tape_after, tape_after_layers=s.tape_after_layers,
                           start_pin=sp, finish_pin=fp, fr=ev.frs.get((w.name, s.index), 1.0),
                           layer_tape=spec.layer_tape.tape if layered and spec.layer_tape else None,
                           layer_tape_layers=spec.layer_tape.layers if layered and spec.layer_tape else 0,
                           margin_tape=spec.margin_tape if s.margin_m > 0 else None, wound_with=s.wound_with,
                           chamber=s.chamber))
    return tuple(out)


def _winding_result(spec: Spec, st: WindingState, ev: Evaluation[Any], temp: ThermalState, length: float,
                    summary: ElectricalSummary, ref: Winding) -> WindingResult:
    w, wire = st.spec, st.wire
    asked, tol, err = _output_voltage(w, summary)
    area = wire.copper_area_m2 * st.strands
    dcr_hot = float(K.dc_resistance_ohm(area, length, temp.hot_c, wire.conductor))
    sections = _sections(spec, ev.built, ev, w)
    fr_w = winding_fr(ev.built, ev.frs, w.name)
    if summary.ripple_rms is not None:
        idc, iac = summary.ripple_rms[w.name]
        p_cu = float(K.copper_loss_w(dcr_hot, fr_w, iac, idc))
    else:
        p_cu = float(K.copper_loss_w(dcr_hot, fr_w, st.current_a))
    return WindingResult(
        name=w.name, role=w.role, turns=st.turns, voltage_v=summary.voltages.get(w.name),
        voltage_max_v=w.voltage_max_v, open_circuit_v=summary.open_circuit.get(w.name),
        current_a=st.current_a, wire=wire.id, wire_label=wire.label, wire_kind=wire.kind,
        strands=st.strands, copper_area_m2=area, overall_diameter_m=K.pitch_and_height(wire, 1)[1],
        layers=sum(len(s.layers) for s in sections), turns_per_layer=sections[0].turns_per_layer if sections else 0,
        length_m=length, mass_kg=float(wiremod.mass_per_m_kg(area, wire.conductor)) * length,
        dcr_20c_ohm=float(K.dc_resistance_ohm(area, length, 20.0, wire.conductor)), dcr_hot_ohm=dcr_hot,
        current_density_a_m2=st.current_a / area if area else 0.0,
        fr=fr_w, copper_loss_w=p_cu, start=w.start or "", finish=w.finish or "",
        direction=w.direction, sections=sections,
        margin_m=sections[0].margin_m if sections else 0.0, lead_sleeving=w.lead_sleeving or spec.sleeving,
        thermal_class_c=wire.thermal_class_c,
        # dot convention: terminals of the same instantaneous polarity. Wound the same way as the
        # reference winding, the start carries the dot; wound the other way, the finish does.
        dot_pin=(w.start if w.direction == ref.direction or not w.finish else w.finish) or "",
        voltage_asked_v=asked, voltage_tolerance=tol, voltage_error_pct=err,
    )


def _output_voltage(w: Winding, summary: ElectricalSummary
                    ) -> tuple[float | None, tuple[float, float] | None, float | None]:
    """An output winding's voltage asked, its tolerance and the full-load voltage's error against it [%]."""
    tol = summary.voltage_tolerance.get(w.name)
    got = summary.voltages.get(w.name)
    if tol is None or not w.voltage_v or got is None:
        return None, None, None
    return w.voltage_v, tol, (got - w.voltage_v) / w.voltage_v * 100.0


def _build_result(parts: Parts, built: BuiltWindow, ku_num: float, bulge: float) -> Build:
    former = parts.former
    bulged = built.height_m * bulge
    available = former.height_m
    hole = max(0.0, former.id_m - 2.0 * bulged) if former.kind == "toroid" else None
    return Build(height_m=built.height_m, bulged_height_m=bulged, available_m=available,
                 ku=ku_num / parts.wa_m2 if parts.wa_m2 else 0.0, fits=built.ok and bulged <= available + 1e-12,
                 fill_fraction=bulged / available if available > 0 else 1e3, hole_m=hole)


def finish(spec: Spec, cat: Catalog, parts: Parts, kind: PartKind, ev: Evaluation[Any], temp: ThermalState,
           summary: ElectricalSummary, iterations: int) -> Design:
    """Freeze the settled evaluation into the Design: windings, build, losses, checks, tests, materials."""
    lengths = copper_lengths_m(ev.built, cat.shop.lead_length_m)
    ref = next((w for w in spec.windings if w.role == "primary"), spec.windings[0])
    windings = []
    copper_total = 0.0
    ku_num = 0.0
    for st in ev.windings.values():
        wr = _winding_result(spec, st, ev, temp, lengths.get(st.name, 0.0), summary, ref)
        copper_total += wr.copper_loss_w
        ku_num += st.turns * wr.copper_area_m2
        windings.append(wr)
    order = [s.name for s in spec.windings]
    windings.sort(key=lambda w: order.index(w.name))
    build = _build_result(parts, ev.built, ku_num, cat.shop.bulge_factor)
    losses = Losses(copper_w=copper_total, core_w=ev.core_w, total_w=copper_total + ev.core_w,
                    core_loss_density_w_m3=ev.core_w_m3)
    b_sat = b_sat_hot_t(parts.material, temp.hot_c)
    core = core_result(spec, cat, parts, b_sat)
    state = DesignState(spec=spec, cat=cat, parts=parts, windings=tuple(windings), states=ev.windings, built=ev.built,
                        build=build, losses=losses, temp=temp, summary=summary)
    insulation, insulation_checks = coordinate(state)
    taps = tap_results(spec.windings, windings, summary.b_peak_max_t)
    checks = (kind.flux_checks(state) + run_checks(state) + temperature_checks(state) + insulation_checks
              + list(summary.checks) + tap_checks(taps, summary.flux_limit.value_t)
              + section_notes(windings, {w.name: w.section_shares for w in spec.windings if w.section_shares}))
    checks.sort(key=lambda c: _LEVEL_ORDER[c.level])
    tests = with_tap_tests(test_plan(state, kind.test_limits(state), insulation), taps, windings,
                           cat.shop.tolerances["ratio"], spec.frequency_hz)
    materials = materials_per_unit(state, core)
    s = summary
    return Design(
        part=spec.part, title=spec.title, revision=spec.revision, status=spec.status, customer=spec.customer,
        kind=spec.kind, frequency_hz=spec.frequency_hz, waveform=spec.waveform, duty=spec.duty,
        ambient_c=spec.ambient_c, cooling=spec.cooling, insulation_class_c=spec.insulation_class_c,
        b_peak_t=s.b_peak_t, b_peak_max_t=s.b_peak_max_t, b_limit_t=s.flux_limit.value_t,
        b_limit_basis=s.flux_limit.basis, b_sat_hot_t=b_sat, h_peak_a_m=s.h_peak_a_m,
        magnetizing_inductance_h=s.magnetizing_inductance_h, magnetizing_current_a=s.magnetizing_current_a,
        leakage_inductance_h=s.leakage_inductance_h, core=core, windings=tuple(windings),
        build=build, losses=losses, winding_temp_c=temp.winding_c, hot_spot_c=temp.hot_c,
        temperature_rise_k=temp.rise_k, efficiency=s.efficiency, regulation_pct=s.regulation_pct,
        output_power_w=s.output_power_w, checks=tuple(checks), tests=tests, materials=tuple(materials),
        inductor=s.inductor, catalog_ids=catalog_ids(spec, parts, windings), iterations=iterations,
        notes=spec.notes, history=history_entries(spec.history), insulation=insulation,
        current_transformer=s.current_transformer, flyback=s.flyback, connections=s.connections, loads=s.loads,
        frequencies_hz=spec.frequencies_hz, taps=taps, reset=s.reset, common_mode_choke=s.common_mode_choke,
        rise_basis=temp.r_th_basis,
        air_speed_m_s=K.cooling_model(spec.cooling, spec.air_speed_m_s, cat.shop.cooling).air_speed_m_s,
        floor=floor_data(cat, parts, ev.built, windings, spec.varnish, getattr(spec, "core_wrap", None),
                         spec.layer_tape.widths if spec.layer_tape else 1, barrier_interfaces(spec, ev.built.sections)),
    )
