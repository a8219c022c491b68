"""Transformer design: Faraday turns, load-compensated secondaries, loss-limited turns, thermal loop."""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..catalog.models import Catalog
from ..physics import faraday
from .engine import (
    _Built,
    _core_loss_w_m3,
    _dcr,
    _flux_limit,
    _lay_out,
    _lengths,
    _Parts,
    _section_frs,
    _spec_error,
    _Thermal,
    _WState,
    choose_wire,
    finish,
    leakage_h,
    thermal_state,
    too_many_turns,
)
from .result import Check, Design
from .spec import MAX_TURNS, Spec

WIRE_CHOICE_TEMP_C = 100.0   # skin depth for the strand limit taken at a typical hot copper temperature
MAGNETIZING_WARN = 0.35     # magnetizing current above this share of the primary current (common practice)
MAX_SCAN = 60                # loss-limited search: at most this many primary-turn candidates


@dataclass
class _Eval:
    np: int
    states: dict
    built: _Built
    frs: dict
    copper_w: float
    core_w: float
    core_w_m3: float
    b_peak: float
    b_peak_max: float
    lm: float
    imag: float
    imag_pk: float
    loaded_v: dict
    open_v: dict
    leakage_h: float

    @property
    def total_w(self) -> float:
        return self.copper_w + self.core_w


def _magnetizing(spec: Spec, v: float, lm: float) -> tuple[float, float]:
    """(rms, peak) magnetizing current for the waveform: V/(w L) sine; triangle for a square wave."""
    f = spec.frequency_hz
    if spec.waveform == "sine":
        rms = faraday.magnetizing_current_a(v, f, lm)
        return rms, rms * math.sqrt(2.0)
    if spec.waveform == "square":
        pk = v / (4.0 * f * lm)
        return pk / math.sqrt(3.0), pk
    pk = v * spec.duty / f / lm
    return pk * math.sqrt(spec.duty / 3.0), pk


def design_transformer(spec: Spec, cat: Catalog, parts: _Parts) -> Design:
    shop = cat.shop
    prim = next(w for w in spec.windings if w.role == "primary")
    loads = [w for w in spec.windings if w.role in ("secondary", "auxiliary")]
    vp = prim.voltage_v
    vp_max = prim.voltage_max_v or vp
    f, wf = spec.frequency_hz, spec.waveform
    density = shop.current_density_a_m2.get(spec.cooling, shop.current_density_a_m2["natural"])
    load_current = {w.name: (w.current_a if w.current_a is not None else w.va / w.voltage_v) for w in loads}
    p_out = sum(w.voltage_v * load_current[w.name] for w in loads)
    if p_out <= 0:
        raise _spec_error(spec, "the secondaries draw no power; give their currents", "windings")
    mat = parts.material

    temp = _Thermal(spec.ambient_c + 40.0, spec.ambient_c + 40.0 + shop.hotspot_margin_k, 40.0)
    eta = spec.efficiency_guess
    b_limit = _flux_limit(spec, cat, mat, temp.hot_c)

    def swing_limit(limit: float) -> float:
        # a unipolar pulse starts from the residual flux, so only B_limit - B_r is usable (no reset winding)
        return max(limit - mat.b_r_t, 0.05 * limit) if wf == "unipolar" else limit

    def n_min() -> int:
        if prim.turns:
            return prim.turns
        n = faraday.turns_for_voltage(vp_max, f, swing_limit(b_limit[0]), parts.ae_m2, wf, spec.duty)
        if not n < MAX_TURNS:
            raise too_many_turns(spec, n, f"the primary at {vp_max:g} V, {f:g} Hz", "windings",
                                 spec.windings.index(prim), "voltage")
        return max(1, math.ceil(n - 1e-9))

    wires: dict = {}

    def pick_wires(ip: float) -> None:
        for _i, w in enumerate(spec.windings):
            current = ip if w.role == "primary" else load_current.get(w.name, 0.0)
            if not w.wire.startswith("auto"):
                wire = cat.wires[w.wire]
                strands = w.strands or 1
                reason = "given"
            elif w.role == "shield":
                wire, strands, reason = choose_wire(cat, 0.05, density, 0.0, WIRE_CHOICE_TEMP_C, "auto")
            else:
                wire, strands, reason = choose_wire(cat, current, density, f, WIRE_CHOICE_TEMP_C, w.wire,
                                                    w.strands)
            wires[w.name] = (wire, strands, reason)

    def evaluate(np_turns: int, temp: _Thermal, eta: float) -> _Eval:
        lm = faraday.magnetizing_inductance_h(np_turns, parts.ae_m2, parts.le_m, mat.mu_working)
        imag, imag_pk = _magnetizing(spec, vp, lm)
        ip_load = p_out / eta / vp
        ip = math.hypot(ip_load, imag)
        if not wires:
            pick_wires(ip)
        states = {}
        for i, w in enumerate(spec.windings):
            wire, strands, reason = wires[w.name]
            if w.role == "primary":
                turns, current = np_turns, ip
            elif w.role == "shield":
                turns, current = (w.turns or 1), 0.0
            else:
                turns = w.turns or max(1, math.ceil(np_turns * w.voltage_v / vp - 1e-9))
                if turns > MAX_TURNS:
                    raise too_many_turns(spec, turns, f"winding {w.name} at {w.voltage_v:g} V", "windings", i,
                                         "voltage")
                current = load_current[w.name]
            states[w.name] = _WState(w, i, wire, strands, turns, current, reason)
        built = None
        loaded: dict = {}
        for _ in range(12):
            built = _lay_out(spec, parts, states, cat)
            if not built.ok:
                break
            # a shield fills exactly one layer
            changed = False
            for st in states.values():
                if st.spec.role == "shield" and not st.spec.turns:
                    cap = next(s[3].turns_per_layer for s in built.sections if s[0] is st)
                    if cap != st.turns:
                        st.turns, changed = cap, True
            lengths = _lengths(built, cat.shop.lead_length_m)
            rp = _dcr(states[prim.name], lengths[prim.name], temp.hot_c)
            # the primary carries every load's current referred through its ratio, so its drop is shared
            i_ref = sum(states[w.name].current_a * states[w.name].turns / np_turns for w in loads)
            # leakage reactance referred to the primary (sine only: a square-wave drive loses volt-seconds
            # to the leakage instead, which the converter's duty absorbs)
            x_lk = (2.0 * math.pi * f * leakage_h(built, parts.former, _balanced(spec, states, np_turns),
                                                  prim.name)) if wf == "sine" else 0.0
            for w in loads:
                st = states[w.name]
                rs = _dcr(st, lengths[w.name], temp.hot_c)
                ratio = st.turns / np_turns
                # resistive drops in phase with a resistive load, the leakage drop in quadrature
                e = ratio * (vp - i_ref * rp)
                x_drop = ratio * i_ref * x_lk * (st.current_a * st.turns) / max(i_ref * np_turns, 1e-12)
                v_loaded = math.sqrt(max(e * e - x_drop * x_drop, 0.0)) - st.current_a * rs
                loaded[w.name] = v_loaded
                if w.turns is None and v_loaded < w.voltage_v - 1e-9 and st.turns <= MAX_TURNS:
                    volts_per_turn = (vp - i_ref * rp) / np_turns
                    st.turns += max(1, math.ceil((w.voltage_v - v_loaded) / volts_per_turn - 1e-9))
                    changed = True
            for w in loads:      # matched pairs wind the larger of their two turn counts
                if w.match and states[w.match].turns != states[w.name].turns:
                    n = max(states[w.match].turns, states[w.name].turns)
                    states[w.match].turns = states[w.name].turns = n
                    changed = True
            if not changed:
                break
        frs = _section_frs(built, f, temp.hot_c, wf, _signs(spec)) if built.ok else {}
        lengths = _lengths(built, cat.shop.lead_length_m)
        copper = 0.0
        for st in states.values():
            if st.spec.name not in lengths:
                continue
            secs = [s for s in built.sections if s[0] is st]
            clen = sum(s[3].copper_length_m for s in secs) or 1.0
            fr = sum(frs.get((st.spec.name, s[1]), 1.0) * s[3].copper_length_m for s in secs) / clen
            copper += st.current_a ** 2 * _dcr(st, lengths[st.spec.name], temp.hot_c) * fr
        b_pk = faraday.b_peak_t(vp, f, np_turns, parts.ae_m2, wf, spec.duty)
        b_pk_max = faraday.b_peak_t(vp_max, f, np_turns, parts.ae_m2, wf, spec.duty)
        pv = _core_loss_w_m3(mat, wf, f, b_pk, spec.duty)
        open_v = {w.name: vp * states[w.name].turns / np_turns for w in loads}
        l_lk = leakage_h(built, parts.former, _balanced(spec, states, np_turns), prim.name) if built.ok else 0.0
        return _Eval(np_turns, states, built, frs, copper, pv * parts.ve_m3, pv, b_pk, b_pk_max, lm, imag,
                     imag_pk, loaded, open_v, l_lk)

    # -- turns: saturation-limited minimum, raised while the total loss falls (above 1 kHz)
    n0 = n_min()
    best = evaluate(n0, temp, eta)
    iterations = 1
    if not prim.turns and f >= 1000.0 and best.built.ok:
        # integer secondary turns make the loss curve ragged: scan up to 3 x n0 (or until it no longer
        # fits) and keep the lowest total loss
        step = max(1, math.ceil(2 * n0 / MAX_SCAN))
        n = n0
        while n < 3 * n0:
            n += step
            cand = evaluate(n, temp, eta)
            iterations += 1
            fits = cand.built.ok and cand.built.height_m * cat.shop.bulge_factor <= parts.former.height_m
            if not fits:
                break
            if cand.total_w < best.total_w - 1e-9:
                best = cand

    # -- `auto` wire for the turns actually chosen (the scan sized it at its first candidate, where the
    #    magnetizing current is largest); keep the new choice only if the build still fits
    if any(w.wire.startswith("auto") for w in spec.windings) and best.np != n0:
        kept = dict(wires)
        wires.clear()
        again = evaluate(best.np, temp, eta)
        iterations += 1
        if again.built.ok and again.built.height_m * cat.shop.bulge_factor <= parts.former.height_m:
            best = again
        else:
            wires.clear()
            wires.update(kept)

    # -- thermal loop: resistance with temperature, losses, rise, until the hot spot settles
    ev = best
    for _ in range(60):
        iterations += 1
        new = thermal_state(ev.total_w, parts, spec, cat)
        eta = p_out / (p_out + ev.total_w) if ev.total_w > 0 else eta
        settled = abs(new.hot_c - temp.hot_c) < 0.02
        temp = new
        b_limit = _flux_limit(spec, cat, mat, temp.hot_c)
        ev = evaluate(ev.np, temp, eta)
        if settled:
            break

    eff = p_out / (p_out + ev.total_w)
    regulation = None
    for w in loads:
        if w.name in ev.loaded_v and ev.loaded_v[w.name] > 0:
            reg = (ev.open_v[w.name] - ev.loaded_v[w.name]) / ev.loaded_v[w.name] * 100.0
            regulation = reg if regulation is None else max(regulation, reg)
    voltages = {prim.name: vp, **{k: v for k, v in ev.loaded_v.items()}}
    h_peak = faraday.h_field_a_m(ev.np, ev.imag_pk, parts.le_m)
    extra = []
    for w in loads:
        got = ev.loaded_v.get(w.name)
        if w.turns is not None and got is not None and got < w.voltage_v * 0.995:
            extra.append(Check("warn", "output-voltage",
                               f"winding {w.name} has fixed turns ({w.turns}) and delivers {got:.3f} V at full load, "
                               f"below the {w.voltage_v:g} V asked: add turns or remove the fixed count"))
    p = ev.states[prim.name]
    if p.current_a > 0 and ev.imag / p.current_a > MAGNETIZING_WARN:
        extra.append(Check("warn", "magnetizing",
                           f"magnetizing current {ev.imag:.3g} A is {ev.imag / p.current_a:.0%} of the primary "
                           f"current: more primary turns, or a core material of higher permeability"))
    return finish(spec, cat, parts, ev.states, ev.built, ev.frs, temp, b_peak=ev.b_peak,
                  b_peak_max=ev.b_peak_max, b_limit=(swing_limit(b_limit[0]), b_limit[1]
                                                     + (" less B_r (unipolar)" if wf == "unipolar" else "")),
                  h_peak=h_peak, lm=ev.lm, imag=ev.imag, core_w=ev.core_w, core_w_m3=ev.core_w_m3,
                  voltages=voltages, open_circuit=ev.open_v, efficiency=eff, regulation=regulation, p_out=p_out,
                  inductor=None, extra_checks=extra, iterations=iterations, leakage=ev.leakage_h)


def _balanced(spec: Spec, states: dict, np_turns: int) -> dict:
    """Load currents with their MMF sign, balanced in ampere-turns: the primary carries sum(N_s I_s)/N_p."""
    loads = [w for w in spec.windings if w.role in ("secondary", "auxiliary")]
    out = {w.name: -states[w.name].current_a for w in loads}
    prim = next(w for w in spec.windings if w.role == "primary")
    out[prim.name] = sum(states[w.name].current_a * states[w.name].turns for w in loads) / np_turns
    return out


def _signs(spec: Spec) -> dict:
    """MMF direction of each winding's current: primary +1; loads -1 (ampere-turn balance)."""
    return {w.name: (1.0 if w.role == "primary" else -1.0) for w in spec.windings}
