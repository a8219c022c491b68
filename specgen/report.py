"""Plain-text tables of a Design for the terminal (no colour codes: it is piped and printed too)."""

from __future__ import annotations

from typing import Any

from . import present
from .design.result import Design
from .standards.thermal_classes import class_label


def _table(headers: list, rows: list, align: str | None = None) -> str:
    return present.table(headers, rows, align or ("l" + "r" * (len(headers) - 1)))


def freq(hz: float) -> str:
    """'50 Hz', '100 kHz' (``specgen.present.frequency``)."""
    return present.frequency(hz)


def waveform_text(d: Design) -> str:
    """How the core is driven: a DC choke carries DC with a triangular ripple, not the spec's waveform."""
    if d.flyback is not None:
        return f"flyback, {d.flyback.mode.upper()} at the lowest input, duty {d.flyback.duty_max:.2f} to {d.flyback.duty_min:.2f}"
    if d.inductor is not None and d.inductor.carries_dc:
        return "DC with triangular ripple"
    if d.waveform == "unipolar":
        return f"unipolar pulse, duty {d.duty:g}"
    return d.waveform


# long: the terminal report, section by section in print order
def design_report(d: Design) -> str:
    c = d.core
    out = []
    head = f"{d.part} rev {d.revision or '-'} ({d.status})  {d.title}"
    out.append(head)
    out.append("=" * len(head))
    if d.customer:
        out.append(f"customer {d.customer}")
    if d.fingerprint:
        out.append(f"fingerprint {d.fingerprint[:12]}")
    out.append("")
    out.append("Core and operating point")
    core_rows = [
        ["core", f"{c.id} ({c.shape}, {c.material_name})"],
        ["stack / count", (f"{c.stack_m * 1e3:g} mm" if c.stack_m else "-") + f", {c.count} set(s)"
         + (f", {c.laminations} lamination pairs" if c.laminations else "")],
        ["bobbin", c.bobbin or "none (toroid)"],
        ["Ae / le / Ve", f"{c.ae_m2 * 1e6:.1f} mm² / {c.le_m * 1e3:.1f} mm / {c.ve_m3 * 1e9:,.0f} mm³  "
                         f"({c.effective_parameters_from})"],
        ["window Wa", f"{c.wa_m2 * 1e6:.1f} mm²"],
        ["frequency, waveform", f"{freq(d.frequency_hz)}, {waveform_text(d)}"],
        ["B_pk nominal / max", f"{d.b_peak_t:.3f} T / {d.b_peak_max_t:.3f} T  (limit {d.b_limit_t:.3f} T: "
                               f"{d.b_limit_basis})"],
        ["B_sat at hot spot", f"{d.b_sat_hot_t:.3f} T"],
        ["H_pk = N I / le", f"{d.h_peak_a_m:.4g} A/m"],
    ]
    if d.magnetizing_current_a is not None:
        core_rows.append(["magnetizing", f"{present.si(d.magnetizing_current_a, 'A')} rms, "
                                         f"L_m {present.si(d.magnetizing_inductance_h, 'H')}"])
    if d.leakage_inductance_h and d.common_mode_choke is None:
        lk = d.leakage_inductance_h
        core_rows.append(["leakage", f"{present.si(lk, 'H')} referred to the primary, secondaries shorted"])
    if d.inductor is not None and d.flyback is None:
        i = d.inductor
        core_rows += [
            ["inductance", f"{present.si(i.inductance_h, 'H')} built (target {present.si(i.target_h, 'H')}); "
                           f"{present.si(i.inductance_zero_bias_h, 'H')} at no bias"],
            ["gap", "none" if not i.gap_m else
             f"{i.gap_m * 1e3:.2f} mm, {i.gap_arrangement}"
             + (f" (spacer {i.spacer_m * 1e3:.2f} mm in every leg)" if i.spacer_m else "")
             + (f" (grind centre leg {i.grind_m * 1e3:.2f} mm)" if i.grind_m else "")
             + f", fringing F {i.fringing_factor:.3f}"],
            ["AL, energy", f"{present.si(i.al_nh * 1e-9, 'H')}/turn², {present.si(i.energy_j, 'J')}"],
            ["DC bias", f"H_dc {i.h_dc_a_m:.4g} A/m, roll-off {i.bias_drop_pct:.1f} %"
                        + (f"; {present.si(i.inductance_at_peak_h, 'H')} at the peak current"
                           if i.inductance_at_peak_h is not None and i.gap_m is None else "")
                        + (f" (at least {present.si(i.inductance_min_h, 'H')})" if i.inductance_min_h else "")],
            _current_row(i),
        ]
    if d.reset is not None:
        r = d.reset
        core_rows += [
            ["reset winding", f"{r.winding}, {r.turns} turns ({r.turns_ratio:.3g}:1): D_max {r.duty_max:.3f} "
                              f"(duty {r.duty:g}), resets in {r.reset_fraction:.3g} of the period"],
            ["reset current", f"{present.si(r.current_peak_a, 'A')} peak, {present.si(r.current_rms_a, 'A')} rms "
                              f"at {r.input_max_v:.4g} V in"],
            ["switch voltage", f"{r.switch_voltage_v:.4g} V = V_in (1 + N_p / N_r) at {r.input_max_v:.4g} V in, "
                               f"plus the leakage spike"],
            ["flux from B_r", f"B_r {r.b_r_t:.3f} T + ΔB {r.b_end_t - r.b_r_t:.3f} T = {r.b_end_t:.3f} T "
                              f"(B_sat {r.b_sat_hot_t:.3f} T hot)"],
        ]
    if d.current_transformer is not None:
        core_rows += _ct_rows(d.current_transformer)
    if d.flyback is not None:
        core_rows += _flyback_rows(d)
    if d.common_mode_choke is not None:
        core_rows += _cmc_rows(d.common_mode_choke)
    out.append(_table(["", ""], core_rows, "ll"))
    out.append("")
    out.append("Windings (build order by section, see the work order)")
    rows = []
    for w in d.windings:
        rows.append([w.name, w.role, w.turns, f"{w.wire}" + (f" x{w.strands}" if w.strands > 1 else ""),
                     w.layers, w.turns_per_layer, f"{w.length_m:.2f}", f"{w.dcr_20c_ohm:.4g}",
                     f"{w.dcr_hot_ohm:.4g}", f"{w.current_a:.3g}", f"{w.current_density_a_m2 / 1e6:.2f}",
                     f"{w.fr:.2f}", f"{w.start}-{w.finish}", w.dot_pin])
    out.append(_table(["name", "role", "turns", "wire", "layers", "t/layer", "length m", "DCR 20°C Ω",
                       f"DCR {d.hot_spot_c:.0f}°C Ω", "I A", "J A/mm²", "Fr", "pins", "dot"], rows,
                      "llrlrrrrrrrrll"))
    volts = [w for w in d.windings if w.open_circuit_v and w.voltage_v is not None]
    if volts:
        out.append("")
        out.append("  " + "; ".join(f"{w.name}: {w.voltage_v:.3f} V at full load, {w.open_circuit_v:.3f} V open "
                                    f"circuit" + (f" ({w.voltage_asked_v:g} V asked, {w.voltage_error_pct:+.1f} %)"
                                                  if w.voltage_asked_v and w.voltage_error_pct is not None else "")
                                    for w in volts))
    if d.taps:
        out.append("")
        out.append("Taps (the voltage over the input range, at full load)")
        out.append(_table(["winding", "tap", "turn", "pin", "nominal", "over the input range"],
                          [[t.winding, f"{t.voltage_v:g} V", t.turn, t.pin, f"{t.actual_v:.4g} V",
                            f"{t.range_v[0]:.4g} to {t.range_v[1]:.4g} V" if t.range_v else "-"] for t in d.taps],
                          "llrlrl"))
    out.append("")
    b = d.build
    out.append("Build and fill")
    out.append(_table(["", ""], [
        ["build height", f"{b.height_m * 1e3:.2f} mm, x bulge = {b.bulged_height_m * 1e3:.2f} mm"],
        ["available", f"{b.available_m * 1e3:.2f} mm ({b.fill_fraction:.0%} used)" + ("" if b.fits else "  DOES NOT FIT")],
        ["window utilisation Ku", f"{b.ku:.3f}"],
    ] + ([["hole left", f"{b.hole_m * 1e3:.1f} mm"]] if b.hole_m is not None else []), "ll"))
    out.append("")
    out.append("Losses and temperature")
    l = d.losses
    rows = [["copper", f"{l.copper_w:.3f} W"], ["core", f"{l.core_w:.3f} W ({l.core_loss_density_w_m3 / 1e3:.1f} kW/m³)"],
            ["total", f"{l.total_w:.3f} W"],
            ["rise / hot spot", f"{d.temperature_rise_k:.1f} K / {d.hot_spot_c:.1f} °C "
                                f"(class {class_label(d.insulation_class_c)})"]]
    if d.rise_basis:
        rows.append(["rise from", d.rise_basis])
    if d.efficiency is not None:
        rows.append(["efficiency", f"{d.efficiency * 100:.2f} %"])
    if d.regulation_pct is not None:
        rows.append(["regulation", f"{d.regulation_pct:.2f} %"])
    out.append(_table(["", ""], rows, "ll"))
    out.append("")
    out.append("Checks")
    mark = {"pass": "pass", "warn": "WARN", "fail": "FAIL"}
    for ch in d.checks:
        out.append(f"  {mark[ch.level]:4}  {ch.code:16} {ch.message}")
    return "\n".join(out)


def _current_row(i: Any) -> list[str]:
    """A DC choke: its DC current, the ripple on it and the flux swing the ripple makes. An AC reactor (no DC
    bias) carries the whole sine: its rms and peak current and the peak-to-peak flux swing of the sine, which
    is twice the peak flux (not a ripple: 2.7 T p-p on a 1.34 T peak is the sine going from -B_pk to +B_pk)."""
    if i.carries_dc:
        return ["current", f"{present.si(i.current_dc_a, 'A')} DC, ripple {present.si(i.ripple_a, 'A')} p-p, peak "
                           f"{present.si(i.current_peak_a, 'A')}; ripple flux swing ΔB {present.si(i.delta_b_t, 'T')} p-p"]
    return ["current", f"{present.si(i.current_dc_a, 'A')} rms AC, peak {present.si(i.current_peak_a, 'A')}; "
                       f"flux {present.si(i.delta_b_t / 2, 'T')} peak, {present.si(i.delta_b_t, 'T')} p-p over a cycle"]


def _ct_rows(ct: Any) -> list[list[str]]:
    """A current transformer's own figures (the Design's ``current_transformer``)."""
    return [
        ["ratio", f"{ct.primary_turns}:{ct.secondary_turns}, {ct.primary_current_a:g} A -> "
                  f"{ct.secondary_current_a:.4g} A (range to {ct.primary_current_max_a:g} A)"],
        ["burden", f"{ct.burden_ohm:g} ohm + winding {ct.winding_resistance_ohm:.3g} ohm: "
                   f"V_s {ct.secondary_voltage_v:.3g} V; knee burden {ct.knee_burden_ohm:.4g} ohm"],
        ["accuracy", f"ratio error {ct.ratio_error_pct:+.4f} %, phase {ct.phase_error_deg * 60:+.2f} min at rated; "
                     f"{ct.ratio_error_max_pct:+.4f} %, {ct.phase_error_max_deg * 60:+.2f} min at the top"],
    ]


def _flyback_rows(d: Design) -> list[list[str]]:
    """A flyback's own figures (the Design's ``flyback`` and its gap)."""
    fb = d.flyback
    assert fb is not None
    gap = d.inductor.gap_arrangement if d.inductor is not None else ""
    return [
        ["L_p, gap", f"{present.si(fb.inductance_h, 'H')}, gap {fb.gap_m * 1e3:.2f} mm ({gap})"],
        ["reflected, switch", f"V_R {fb.reflected_voltage_v:.4g} V; V_in max + V_R = {fb.switch_voltage_v:.4g} V "
                              f"before the leakage spike"],
        ["power", f"{fb.output_power_w:.4g} W out (rectifier drops included), {fb.input_power_w:.4g} W in at "
                  f"efficiency {fb.efficiency_estimate:g}"],
        ["flux", f"B_pk {fb.b_peak_t:.3f} T, swing {fb.delta_b_t:.3f} T"],
        ["clamp", f"{present.si(fb.clamp_energy_j, 'J')} per cycle from the leakage, {fb.clamp_power_w:.3g} W at the "
                  f"switching frequency"],
        ["currents", "; ".join(f"{w.name} {w.peak_current_a:.3g} A peak, {w.rms_current_a:.3g} A rms"
                               for w in fb.windings)],
    ]


def _cmc_rows(c: Any) -> list[list[str]]:
    """A common-mode choke's own figures (the Design's ``common_mode_choke``)."""
    return [
        ["lines", f"{c.lines} x {c.turns} turns, {c.line_current_a:g} A rms each, {c.line_voltage_v:g} V; sectors "
                  f"{c.winding_angle_deg:.0f}°, gaps {c.gap_angle_deg:.0f}° ({c.sector_gap_m * 1e3:.2f} mm at the bore)"],
        ["common mode", f"L_CM {present.si(c.inductance_cm_h, 'H')} at {freq(c.inductance_frequency_hz)} (at least "
                        f"{present.si(c.inductance_cm_min_h, 'H')}), A_L {present.si(c.al_h, 'H')}/turn², mu "
                        f"{c.mu_at_frequency:.0f}"],
        ["differential", f"leakage {present.si(c.leakage_inductance_h, 'H')} per line (estimate: {c.leakage_method})"],
        ["flux", f"common mode {c.b_cm_peak_t * 1e3:.3g} mT from {present.si(c.common_mode_current_a, 'A')} to "
                 f"ground; differential {c.b_dm_peak_t * 1e3:.3g} mT at {c.current_dm_peak_a:.3g} A peak"],
    ]
