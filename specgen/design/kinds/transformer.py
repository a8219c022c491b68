"""Transformers: Faraday turns, load-compensated secondaries, loss-limited primary turns.

Primary turns from Faraday's law at the top of the primary range and the flux limit at the hot spot (a
unipolar pulse may swing only B_limit - B_r); where the core loss is a significant share of the total (at any
frequency) the turns are scanned over the range that fits for the least total loss, `auto` wires sized per
candidate. Secondary turns are raised until the loaded voltage is met: the
resistive drops referred through the ratio, and for a sine drive the leakage reactance in quadrature.
"""

from __future__ import annotations

import math
from dataclasses import replace

from ...catalog.models import Catalog
from ...physics import faraday
from ...present import frequency, tesla
from ...records import record
from .. import forward as FW
from .. import kernel as K
from .. import loads as LD
from ..build import copper_lengths_m, lay_out, leakage_h, section_frs, winding_fr
from ..connections import connection_results
from ..flux import b_sat_hot_t, flux_limit
from ..resolve import spec_error, too_many_turns
from ..result import Check
from ..spec import Spec, Winding
from ..state import (
    BuiltWindow,
    DesignState,
    ElectricalSummary,
    Evaluation,
    FluxLimit,
    KindTests,
    Parts,
    ThermalState,
    WindingState,
    WireChoice,
)
from ..windings_result import ConnectionResult, LoadResult
from ..wires import choose_wire
from .transformer_tests import transformer_tests

MAGNETIZING_WARN = 0.35      # magnetizing current above this share of the primary current (common practice)
MAX_SCAN = 60                # loss-limited search: at most this many primary-turn candidates
VPT_SCAN_SPAN = 120          # volts-per-turn search: primary turns up to n0 + this (or 3 x n0) for a turn pair
                             # that meets every output's tolerance (a 3 % band needs about 33 turns to hold
                             # a whole count; the fit ends it sooner on a small core)
SCAN_MISSES = 4              # loss scan: this many candidates in a row that do not fit end the range


@record(slots=True)
class TransformerPass:
    """A transformer's own figures at one pass."""
    primary_turns: int
    eta: float                       # the efficiency the primary current was sized with
    lm_h: float
    imag_a: float
    imag_pk_a: float
    b_peak_t: float
    b_peak_max_t: float
    loaded_v: dict[str, float]
    open_v: dict[str, float]
    leakage_h: float
    loads: dict[str, LoadResult]
    connections: tuple[ConnectionResult, ...] = ()
    core_w_m3_by_hz: dict[float, float] | None = None   # core loss density at each frequency served


def _balanced(spec: Spec, states: dict[str, WindingState], np_turns: int,
              currents: dict[str, float] | None = None) -> dict[str, float]:
    """Load currents with their MMF sign, balanced in ampere-turns: the k primaries each carry
    sum(N_s I_s)/(k N_p). ``currents``: the loads' currents in one conduction interval (default: rms)."""
    loads = [w for w in spec.windings if w.role in ("secondary", "auxiliary")]
    amps = currents or {w.name: states[w.name].current_a for w in loads}
    out = {w.name: -amps[w.name] for w in loads}
    prims = [w for w in spec.windings if w.role == "primary"]
    for prim in prims:
        out[prim.name] = sum(amps[w.name] * states[w.name].turns for w in loads) / np_turns / len(prims)
    return out


def _signs(spec: Spec) -> dict[str, float]:
    """MMF direction of each winding's current: primary +1; loads -1 (ampere-turn balance)."""
    return {w.name: (1.0 if w.role == "primary" else -1.0) for w in spec.windings}


def _dcr(st: WindingState, length_m: float, temp_c: float) -> float:
    return float(K.dc_resistance_ohm(st.wire.copper_area_m2 * st.strands, length_m, temp_c, st.wire.conductor))


class TransformerRun:
    """One transformer in progress: the requirement read once, the wires chosen once."""

    def __init__(self, spec: Spec, cat: Catalog, parts: Parts) -> None:
        self.spec, self.cat, self.parts = spec, cat, parts
        self.prims = [w for w in spec.windings if w.role == "primary"]
        self.prim: Winding = self.prims[0]
        self.halves = len(self.prims)       # equal primaries sharing the load (several: see ``connections``)
        self.loads = [w for w in spec.windings if w.role in ("secondary", "auxiliary")]
        self.reset = next((w for w in spec.windings if w.role == "reset"), None)   # a forward's (``forward``)
        self.reset_rms = 0.0
        self.vp = float(self.prim.voltage_v or 0.0)
        self.vp_max = self.prim.voltage_max_v or self.vp
        self.density = K.current_density_a_m2(cat.shop.current_density_a_m2, spec.cooling)
        self.set_loads({})
        if self.p_out <= 0:
            raise spec_error(spec, "the secondaries draw no power; give their currents", "windings")
        self.wires: dict[str, WireChoice] = {}
        self.search_span: tuple[int, int] = (0, 0)   # primary turns the volts-per-turn search looked at

    def set_loads(self, rs_ratio: dict[str, float]) -> None:
        """Each load's currents (``design.loads``) with R_s / R_L from the last build."""
        self.load_result = LD.solve(self.loads, self.spec.frequency_hz, rs_ratio, self.spec.duty)
        self.load_current = {n: ld.rms_current_a for n, ld in self.load_result.items()}
        self.p_out = sum(ld.power_w for ld in self.load_result.values())
        volts = {w.name: w.voltage_v or 0.0 for w in self.loads}
        self.p_reflected = LD.reflected_w(self.load_result, volts)
        self.pulse_va = LD.pulse_va(self.load_result, volts)      # gate drives: referred, not power

    # -- turns
    def swing_limit(self, limit: FluxLimit) -> FluxLimit:
        """A unipolar pulse starts from the residual flux: only B_limit - B_r is usable (no reset winding)."""
        value = float(K.unipolar_swing_t(limit.value_t, self.parts.material.b_r_t, self.spec.waveform))
        suffix = " less B_r (unipolar)" if self.spec.waveform == "unipolar" else ""
        return FluxLimit(value, limit.basis + suffix)

    def min_turns(self, temp: ThermalState) -> int:
        spec = self.spec
        if self.prim.turns:
            return self.prim.turns
        limit = self.swing_limit(flux_limit(spec, self.cat, self.parts.material, temp.hot_c))
        n = float(K.turns_for_voltage(self.vp_max, spec.frequency_hz, limit.value_t, self.parts.ae_m2,
                                      spec.waveform, spec.duty))
        if not n < K.MAX_TURNS:
            raise too_many_turns(spec, n, f"the primary at {self.vp_max:g} V, {spec.frequency_hz:g} Hz", "windings",
                                 spec.windings.index(self.prim), "voltage")
        return int(K.whole_turns(n))

    def current_of(self, w: Winding, ip: float) -> float:
        """A winding's rms current at this pass: the primary's, a reset winding's, or its load's."""
        return ip if w.role == "primary" else self.reset_rms if w.role == "reset" else self.load_current.get(w.name, 0.0)

    def pick_wires(self, ip: float) -> None:
        spec, cat, f = self.spec, self.cat, self.spec.frequency_hz
        for w in spec.windings:
            current = self.current_of(w, ip)
            if not w.wire.startswith("auto"):
                self.wires[w.name] = WireChoice(cat.wires[w.wire], w.strands or 1, "given")
            elif w.role == "shield":
                self.wires[w.name] = choose_wire(cat, 0.05, self.density, 0.0, K.WIRE_CHOICE_TEMP_C, "auto",
                                                 min_class_c=spec.insulation_class_c)
            else:
                self.wires[w.name] = choose_wire(cat, current, self.density, f, K.WIRE_CHOICE_TEMP_C, w.wire, w.strands,
                                                 spec.insulation_class_c)
        for w in spec.windings:          # wound together: one wire, sized for the larger of the two currents
            if w.wound_with is not None:
                lead = next(x for x in spec.windings if x.name == w.wound_with)
                big = lead if self.current_of(lead, ip) >= self.current_of(w, ip) else w
                self.wires[w.name] = self.wires[lead.name] = self.wires[big.name]

    def initial_states(self, np_turns: int, ip: float) -> dict[str, WindingState]:
        states: dict[str, WindingState] = {}
        for i, w in enumerate(self.spec.windings):
            choice = self.wires[w.name]
            if w.role == "primary":
                turns, current = np_turns, ip
            elif w.role == "shield":
                turns, current = (w.turns or 1), 0.0
            elif w.role == "reset":
                turns, current = FW.reset_turns(w, np_turns), self.reset_rms
            else:
                turns = w.turns or int(K.secondary_turns_for_voltage(np_turns, self.vp, self.lowest_v(w)))
                if turns > K.MAX_TURNS:
                    raise too_many_turns(self.spec, turns, f"winding {w.name} at {w.voltage_v:g} V", "windings", i,
                                         "voltage")
                current = self.load_current[w.name]
            states[w.name] = WindingState(w, i, choice.wire, choice.strands, turns, current, choice.reason)
        return states

    def wind(self, states: dict[str, WindingState], np_turns: int,
             temp: ThermalState) -> tuple[BuiltWindow, dict[str, float]]:
        """Lay out the window, raising secondary turns until each loaded voltage is met (``states`` updated)."""
        spec, parts, lead = self.spec, self.parts, self.cat.shop.lead_length_m
        prim, vp = self.prim, self.vp
        built: BuiltWindow | None = None
        loaded: dict[str, float] = {}
        before: dict[str, float] = {}         # each output's loaded voltage before its last raise
        for _ in range(12):
            built = lay_out(spec, parts, states, self.cat)
            if not built.ok:
                break
            changed = False
            for name, st in list(states.items()):       # a shield fills exactly one layer
                if st.spec.role == "shield" and not st.spec.turns:
                    cap = built.of(name)[0].build.turns_per_layer
                    if cap != st.turns:
                        states[name], changed = replace(st, turns=cap), True
            lengths = copper_lengths_m(built, lead)
            rp = _dcr(states[prim.name], lengths[prim.name], temp.hot_c)
            # the primary carries every load's current referred through its ratio, so its drop is shared
            i_ref = sum(states[w.name].current_a * states[w.name].turns / np_turns for w in self.loads)
            i_half = i_ref / self.halves      # each of k equal primaries carries its share
            # leakage reactance referred to the primary (sine only: a square-wave drive loses volt-seconds
            # to the leakage instead, which the converter's duty absorbs)
            x_lk = (2.0 * math.pi * spec.frequency_hz * leakage_h(built, parts.former, _balanced(spec, states, np_turns),
                                                                  prim.name)) if spec.waveform == "sine" else 0.0
            volts_per_turn = (vp - i_half * rp) / np_turns
            if not volts_per_turn > 0.0:
                raise spec_error(spec, f"the primary's own resistance drop ({i_half * rp:.3g} V at {i_half:.3g} A) "
                                       f"reaches its {vp:g} V: the outputs cannot be delivered through "
                                       f"{np_turns} primary turns on core {spec.core_id}", "windings",
                                 spec.windings.index(prim), "voltage")
            for w in self.loads:
                st = states[w.name]
                rs = _dcr(st, lengths[w.name], temp.hot_c)
                ratio = st.turns / np_turns
                # resistive drops in phase with a resistive load, the leakage drop in quadrature
                x_drop = ratio * i_half * x_lk * (st.current_a * st.turns) / max(i_ref * np_turns, 1e-12)
                v_loaded = float(K.loaded_output_v(ratio, vp - i_half * rp, st.current_a, rs, x_drop))
                loaded[w.name] = v_loaded
                want = self.lowest_v(w)
                if w.turns is None and v_loaded < want - 1e-9:
                    if w.name in before and v_loaded <= before[w.name] + 1e-12:
                        # each added turn drops more in the winding's own resistance than it induces
                        raise spec_error(spec, f"winding {w.name} cannot reach {want:.4g} V at {st.current_a:g} A: "
                                               f"with {st.turns} turns it delivers {v_loaded:.4g} V and more turns "
                                               f"add more drop than voltage on core {spec.core_id}", "windings",
                                         st.index, "voltage")
                    before[w.name] = v_loaded
                    add = int(K.secondary_turns_to_add(want, v_loaded, volts_per_turn))
                    if st.turns + add > K.MAX_TURNS:
                        raise too_many_turns(spec, st.turns + add, f"winding {w.name} at {w.voltage_v:g} V",
                                             "windings", st.index, "voltage")
                    states[w.name], changed = replace(st, turns=st.turns + add), True
            for w in self.loads:      # matched and bifilar pairs wind the larger of their two turn counts
                mate = w.same_turns_as or w.wound_with
                if mate and states[mate].turns != states[w.name].turns:
                    n = max(states[mate].turns, states[w.name].turns)
                    states[mate] = replace(states[mate], turns=n)
                    states[w.name] = replace(states[w.name], turns=n)
                    changed = True
            if not changed:
                break
        assert built is not None
        return built, loaded

    def evaluate(self, np_turns: int, temp: ThermalState, eta: float) -> Evaluation[TransformerPass]:
        spec, parts, mat = self.spec, self.parts, self.parts.material
        f, wf = spec.frequency_hz, spec.waveform
        lm = float(faraday.magnetizing_inductance_h(np_turns, parts.ae_m2, parts.le_m, mat.mu_working))
        imag, imag_pk = (float(x) for x in K.magnetizing_current_a(self.vp, f, lm, wf, spec.duty))
        if self.reset is not None:     # the magnetising current referred, over the reset time
            self.reset_rms = FW.reset_current_a(self.vp, spec.duty, f, lm, np_turns,
                                                FW.reset_turns(self.reset, np_turns))[1]
        # the primary carries the loads referred (a rectifier's peaky current as its rms, ``design.loads``);
        # k equal primaries share it (in parallel each carries 1/k, in series all carry 1/k of a single winding's)
        ip = float(K.primary_current_a(self.p_reflected, eta, self.vp, imag,
                                       self.pulse_va / self.vp if self.vp else 0.0)) / self.halves
        if not self.wires:
            self.pick_wires(ip)
        states = self.initial_states(np_turns, ip)
        built, loaded = self.wind(states, np_turns, temp)
        frs = self.frs(built, states, np_turns, temp) if built.ok else {}
        lengths = copper_lengths_m(built, self.cat.shop.lead_length_m)
        copper = 0.0
        for name, st in states.items():
            if name in lengths:
                i_dc, i_ac = LD.dc_ac_parts(self.load_result.get(name), st.current_a)
                copper += float(K.copper_loss_w(_dcr(st, lengths[name], temp.hot_c), winding_fr(built, frs, name),
                                                i_ac, i_dc))
        b_pk = float(faraday.b_peak_t(self.vp, f, np_turns, parts.ae_m2, wf, spec.duty))
        b_pk_max = float(faraday.b_peak_t(self.vp_max, f, np_turns, parts.ae_m2, wf, spec.duty))
        # several frequencies: the flux is highest at the lowest (f); the core loss is taken at the worst one,
        # each frequency with its own flux
        by_f = {fx: float(K.core_loss_w_m3(wf, fx, float(faraday.b_peak_t(self.vp, fx, np_turns, parts.ae_m2, wf,
                                                                             spec.duty)),
                                           spec.duty, mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta))
                for fx in spec.frequencies_hz[1:]}
        pv = float(K.core_loss_w_m3(wf, f, b_pk, spec.duty, mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta))
        by_f[f] = pv
        pv = max(by_f.values())
        open_v = {w.name: self.vp * states[w.name].turns / np_turns for w in self.loads}
        first_half = next((n for n, ld in self.load_result.items() if ld.load == "centre_tapped"), None)
        amps = LD.interval_currents(self.load_result, first_half) if first_half else None
        l_lk = (leakage_h(built, parts.former, _balanced(spec, states, np_turns, amps), self.prim.name)
                if built.ok else 0.0)
        conns = connection_results(spec.connections, self.vp_max / self.vp if self.vp else 1.0, f, np_turns,
                                   parts.ae_m2, wf, spec.duty)
        detail = TransformerPass(np_turns, eta, lm, imag, imag_pk, b_pk, b_pk_max, loaded, open_v, l_lk,
                                 dict(self.load_result), conns, by_f)
        return Evaluation(states, built, frs, copper, pv * parts.ve_m3, pv, detail)

    def frs(self, built: BuiltWindow, states: dict[str, WindingState], np_turns: int,
            temp: ThermalState) -> dict[tuple[str, int], float]:
        """Fr of every section. Halves of a centre-tapped secondary conduct alternately: each interval's MMF
        profile has one half carrying the DC current and the other none, and each half takes its Fr from
        the interval it conducts in; every other winding the mean over the intervals."""
        spec, f, wf = self.spec, self.spec.frequency_hz, self.spec.waveform
        hb = LD.winding_harmonics(self.load_result, {n: states[n].current_a * states[n].turns / np_turns
                                                     for n in self.load_result}, [w.name for w in self.prims],
                                  K.current_harmonics(wf))
        if self.reset is not None:     # it conducts alone, while the switch is off
            return FW.interval_frs(states, self.reset.name,
                                   lambda now: section_frs(built, now, f, temp.hot_c, wf, _signs(spec), hb))
        halves = [n for n, ld in self.load_result.items() if ld.load == "centre_tapped"]
        if not halves:
            return section_frs(built, states, f, temp.hot_c, wf, _signs(spec), hb)
        runs = {}
        for half in halves:
            amps = _balanced(spec, states, np_turns, LD.interval_currents(self.load_result, half))
            now = {n: replace(st, current_a=abs(amps.get(n, st.current_a))) for n, st in states.items()}
            runs[half] = section_frs(built, now, f, temp.hot_c, wf, _signs(spec), hb)
        out: dict[tuple[str, int], float] = {}
        for key in runs[halves[0]]:
            if key[0] in runs:
                out[key] = runs[key[0]][key]
            else:
                out[key] = sum(r[key] for r in runs.values()) / len(runs)
        return out

    def fits(self, ev: Evaluation[TransformerPass]) -> bool:
        return ev.built.ok and ev.built.height_m * self.cat.shop.bulge_factor <= self.parts.former.height_m

    # -- output voltages within their tolerance
    def tolerance(self, w: Winding) -> tuple[float, float]:
        """(minus, plus) fractions of the voltage asked: the winding's own, else the shop's."""
        return w.voltage_tolerance or self.cat.shop.voltage_tolerance

    def lowest_v(self, w: Winding) -> float:
        return (w.voltage_v or 0.0) * (1.0 - self.tolerance(w)[0])

    def within(self, ev: Evaluation[TransformerPass]) -> bool:
        """Every output delivers its voltage at full load within its tolerance (``kernel.output_voltage_ok``)."""
        loaded = ev.detail.loaded_v
        return all(K.output_voltage_ok(w.voltage_v or 0.0, loaded.get(w.name, 0.0), *self.tolerance(w))
                   for w in self.loads)

    def candidates(self, ev: Evaluation[TransformerPass], lo: int, hi: int) -> list[int]:
        """Primary turns in lo..hi for which every output has a whole turn count within its tolerance, by
        ``kernel.secondary_turns_within`` with each output's load drop as evaluated (fixed counts checked
        as they are)."""
        import numpy as np
        p = ev.detail
        n = np.arange(lo, hi + 1, dtype=float)
        ok = np.ones(n.shape, dtype=bool)
        for w in self.loads:
            open_v = p.open_v.get(w.name, 0.0)
            drop = 1.0 - p.loaded_v.get(w.name, 0.0) / open_v if open_v > 0 else 0.0
            minus, plus = self.tolerance(w)
            if w.turns:
                e = self.vp / n * (1.0 - min(max(drop, 0.0), 0.9))
                ok &= np.asarray(K.output_voltage_ok(w.voltage_v or 0.0, w.turns * e, minus, plus))
            else:
                ok &= np.asarray(K.secondary_turns_within(n, self.vp, w.voltage_v or 0.0, drop, minus, plus)) > 0
        return [int(x) for x in n[ok]]

    # -- the KindRun protocol
    def _auto(self) -> bool:
        return any(w.wire.startswith("auto") for w in self.spec.windings)

    def _at(self, n: int, temp: ThermalState, eta: float) -> Evaluation[TransformerPass]:
        """One candidate of the scan: `auto` wires sized afresh for this candidate's currents (the magnetizing
        current falls as turns rise, so the wire sized at n0 would be too heavy for the rest of the range)."""
        if self._auto():
            self.wires.clear()
        return self.evaluate(n, temp, eta)

    def _keep_wires(self, ev: Evaluation[TransformerPass]) -> None:
        """The wires of the evaluation kept become the run's wires for the temperature loop."""
        self.wires = {name: WireChoice(st.wire, st.strands, st.wire_reason) for name, st in ev.windings.items()}

    def first(self, temp: ThermalState) -> tuple[Evaluation[TransformerPass], int]:
        """Saturation-limited turns n0, then the primary turns that give every output its voltage within its
        tolerance (the volts-per-turn search), the lowest-loss such count over the whole range that fits where
        the core loss is a significant share of the total (``kernel.core_loss_significant``, any frequency);
        `auto` wires re-sized for every candidate."""
        eta = self.spec.efficiency_guess
        n0 = self.min_turns(temp)
        first = self.evaluate(n0, temp, eta)
        passes = 1
        self.search_span = (n0, n0)
        if self.prim.turns or not first.built.ok:
            return first, passes
        loss_scan = bool(K.core_loss_significant(first.core_w, first.copper_w, self.parts.material.steinmetz_beta))
        if self.within(first) and not loss_scan:
            return first, passes
        top = min(K.MAX_TURNS, max(3 * n0, n0 + VPT_SCAN_SPAN))
        cands = self.candidates(first, n0 + 1, top)
        if loss_scan and len(cands) > MAX_SCAN:       # integer secondaries make the loss curve ragged: spread
            cands = [cands[round(i * (len(cands) - 1) / (MAX_SCAN - 1))] for i in range(MAX_SCAN)]
        good = first if self.within(first) else None
        lowest = first                                # the lowest loss whatever the voltages (a failed search)
        misses = 0
        for n in cands[:MAX_SCAN]:
            cand = self._at(n, temp, eta)
            passes += 1
            if not self.fits(cand):
                # the build grows with the turns, but a thinner wire chosen for a smaller current can fit again
                # further on: the range ends only after SCAN_MISSES candidates in a row that do not fit
                misses += 1
                if misses >= SCAN_MISSES:
                    break
                continue
            misses = 0
            self.search_span = (n0, n)
            if cand.total_w < lowest.total_w - 1e-9:
                lowest = cand
            if self.within(cand):
                if good is None or cand.total_w < good.total_w - 1e-9:
                    good = cand
                if not loss_scan:
                    break
        best = good or lowest
        self._keep_wires(best)
        return best, passes

    def again(self, previous: Evaluation[TransformerPass], temp: ThermalState) -> Evaluation[TransformerPass]:
        """One pass of the temperature loop at the efficiency the previous pass's loss gives. An `auto` wire
        whose current has grown past the shop's density (the first guess of the efficiency was high) is
        re-sized upward, never down, so the loop cannot swing between two sizes; kept only if the build still
        fits and the outputs stay within their tolerance."""
        p = previous.detail
        if any(ld.load in ("bridge_capacitor", "centre_tapped") for ld in p.loads.values()):
            self.set_loads(self.source_ratios(previous, temp))
        eta = self.p_out / (self.p_out + previous.total_w) if previous.total_w > 0 else p.eta
        ev = self.evaluate(p.primary_turns, temp, eta)
        if not self._auto() or not self.fits(ev):
            return ev
        kept = dict(self.wires)
        grown = False
        for w in self.spec.windings:
            st = ev.windings[w.name]
            if not w.wire.startswith("auto") or w.role == "shield":
                continue
            area = st.wire.copper_area_m2 * st.strands
            if area > 0 and st.current_a / area > self.density * (1.0 + 1e-9):
                choice = choose_wire(self.cat, st.current_a, self.density, self.spec.frequency_hz,
                                     K.WIRE_CHOICE_TEMP_C, w.wire, w.strands, self.spec.insulation_class_c)
                if choice.wire.copper_area_m2 * choice.strands > area:
                    self.wires[w.name] = choice
                    grown = True
        if not grown:
            return ev
        bigger = self.evaluate(p.primary_turns, temp, eta)
        if self.fits(bigger) and (self.within(bigger) or not self.within(ev)):
            return bigger
        self.wires = kept
        return ev

    def source_ratios(self, ev: Evaluation[TransformerPass], temp: ThermalState) -> dict[str, float]:
        """R_s / R_L of each rectifier load: its winding's resistance plus the primaries' referred through the
        ratio (k halves: one half's over k), over R_L = V_dc / I_dc."""
        lengths = copper_lengths_m(ev.built, self.cat.shop.lead_length_m)
        np_turns = ev.detail.primary_turns
        rp = _dcr(ev.windings[self.prim.name], lengths.get(self.prim.name, 0.0), temp.hot_c) / self.halves
        out = {}
        for name, ld in ev.detail.loads.items():
            st = ev.windings[name]
            rs = _dcr(st, lengths.get(name, 0.0), temp.hot_c) + rp * (st.turns / np_turns) ** 2
            vdc = (ld.vdc_over_vpk or 0.9) * math.sqrt(2.0) * (st.spec.voltage_v or 0.0)
            if ld.dc_current_a > 0 and vdc > 0:
                out[name] = rs / (vdc / ld.dc_current_a)
        return out

    def voltage_check(self, w: Winding, p: TransformerPass) -> Check:
        """Output voltage: asked, delivered at full load and open circuit, against the winding's tolerance."""
        asked, tol = w.voltage_v or 0.0, self.tolerance(w)
        got, oc = p.loaded_v.get(w.name), p.open_v.get(w.name, 0.0)
        if got is None:
            return Check("fail", "output-voltage", f"winding {w.name}: the full-load voltage is not known because the "
                                                   f"build does not fit (see the fit check); {oc:.3f} V open circuit "
                                                   f"against {_band(asked, tol)}")
        said = f"winding {w.name}: {got:.3f} V at full load ({oc:.3f} V open circuit) against {_band(asked, tol)}"
        if K.output_voltage_ok(asked, got, *tol):
            return Check("pass", "output-voltage", said)
        err = (got - asked) / asked * 100.0 if asked else 0.0
        if w.turns is not None:
            why = f"its {w.turns} fixed turns miss the band by {err:+.1f} %: change or remove the fixed count"
        elif self.prim.turns:
            why = (f"with the primary fixed at {self.prim.turns} turns no whole secondary count lands in the band "
                   f"({err:+.1f} %): remove the fixed primary turns or widen voltage_tolerance")
        else:
            lo, hi = self.search_span
            why = (f"no primary turns from {lo} to {hi} that fit core {self.spec.core_id} give a whole secondary "
                   f"count in the band ({err:+.1f} %): widen voltage_tolerance or use a core with a larger window")
        return Check("fail", "output-voltage", f"{said}; {why}")

    def summary(self, ev: Evaluation[TransformerPass], temp: ThermalState) -> ElectricalSummary:
        p = ev.detail
        eff = self.p_out / (self.p_out + ev.total_w)
        regulation = None
        for w in self.loads:
            if w.name in p.loaded_v and p.loaded_v[w.name] > 0:
                reg = (p.open_v[w.name] - p.loaded_v[w.name]) / p.loaded_v[w.name] * 100.0
                regulation = reg if regulation is None else max(regulation, reg)
        extra = [self.voltage_check(w, p) for w in self.loads]
        if self.spec.frequencies_hz and p.core_w_m3_by_hz:
            worst = max(p.core_w_m3_by_hz, key=lambda x: p.core_w_m3_by_hz[x] if p.core_w_m3_by_hz else 0.0)
            served = " and ".join(frequency(x) for x in self.spec.frequencies_hz)
            extra.append(Check("pass", "frequencies",
                               f"serves {served}: flux checked at {frequency(self.spec.frequency_hz)} (the lowest, the "
                               f"highest flux), core loss and temperature at {frequency(worst)} (the worst: "
                               f"{p.core_w_m3_by_hz[worst] / 1e3:.3g} kW/m³)"))
        reset = None
        if self.reset is not None:
            st = ev.windings[self.reset.name]
            mat = self.parts.material
            wire = st.wire.label + (f" x{st.strands}" if st.strands > 1 else "")
            reset = FW.reset_result(st.name, wire, self.vp_max, self.spec.duty, self.spec.frequency_hz,
                                    p.lm_h, p.primary_turns, st.turns, p.b_peak_max_t, mat.b_r_t,
                                    b_sat_hot_t(mat, temp.hot_c))
            extra += FW.reset_checks(reset)
        primary = ev.windings[self.prim.name]
        share = p.imag_a / self.halves / primary.current_a if primary.current_a > 0 else 0.0   # per half
        if share > MAGNETIZING_WARN:
            extra.append(Check("warn", "magnetizing",
                               f"magnetizing current {p.imag_a:.3g} A is {share:.0%} of the "
                               f"primary current: more primary turns, or a core material of higher permeability"))
        return ElectricalSummary(
            b_peak_t=p.b_peak_t, b_peak_max_t=p.b_peak_max_t,
            flux_limit=self.swing_limit(flux_limit(self.spec, self.cat, self.parts.material, temp.hot_c)),
            h_peak_a_m=float(faraday.h_field_a_m(p.primary_turns, p.imag_pk_a, self.parts.le_m)),
            magnetizing_inductance_h=p.lm_h, magnetizing_current_a=p.imag_a, leakage_inductance_h=p.leakage_h,
            voltages={**{w.name: self.vp for w in self.prims}, **p.loaded_v}, open_circuit=dict(p.open_v),
            voltage_tolerance={w.name: self.tolerance(w) for w in self.loads}, efficiency=eff,
            regulation_pct=regulation, output_power_w=self.p_out, checks=tuple(extra),
            ripple_rms=({n: LD.dc_ac_parts(p.loads.get(n), st.current_a) for n, st in ev.windings.items()}
                        if LD.has_loads(self.loads) else None),
            loads=tuple(p.loads.values()) if LD.has_loads(self.loads) else (), connections=p.connections,
            reset=reset)


def _band(asked: float, tol: tuple[float, float]) -> str:
    return f"{asked:g} V -{tol[0] * 100:g}/+{tol[1] * 100:g} % ({asked * (1 - tol[0]):.3f}-{asked * (1 + tol[1]):.3f} V)"


class TransformerKind:
    name = "transformer"

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> TransformerRun:
        return TransformerRun(spec, cat, parts)

    def flux_checks(self, state: DesignState) -> list[Check]:
        """Saturation at the top of the primary range; remanence of a unipolar drive; inrush of a toroid."""
        spec, mat, temp, s = state.spec, state.parts.material, state.temp, state.summary
        bsat = b_sat_hot_t(mat, temp.hot_c)
        limit = s.flux_limit.value_t
        out: list[Check] = []
        prim = next(w for w in state.windings if w.role == "primary")
        what = "ΔB" if spec.waveform == "unipolar" else "B_pk"
        if s.b_peak_max_t > limit * 1.0005:
            add = math.ceil(prim.turns * s.b_peak_max_t / limit) - prim.turns
            out.append(Check("fail", "saturation",
                             f"{what} {tesla(s.b_peak_max_t)} at the top of the primary range exceeds the "
                             f"{tesla(limit)} limit ({s.flux_limit.basis}): add {add} primary turns or use a core "
                             f"with more Ae (the next stack)"))
        else:
            out.append(Check("pass", "saturation",
                             f"{what} {tesla(s.b_peak_max_t)} at the top of the primary range, limit {tesla(limit)} "
                             f"({s.flux_limit.basis}); B_sat at {temp.hot_c:.0f} °C is {tesla(bsat)}"))
        if spec.waveform == "unipolar" and s.b_peak_max_t + mat.b_r_t > bsat:
            out.append(Check("fail", "remanence",
                             f"a unipolar pulse starts from the residual flux: B_r {tesla(mat.b_r_t)} + ΔB "
                             f"{tesla(s.b_peak_max_t)} exceeds B_sat {tesla(bsat)}: add turns"
                             + (" or a core with more Ae" if s.reset is not None else
                                ", gap the core or add a reset winding")))
        # inrush: switched on at a voltage zero, the flux swings 2 B_pk from wherever the residual flux left it
        # (the doubling effect, common practice); a gapless tape-wound toroid keeps a high B_r, so it goes far
        # into saturation and draws many times its rated current for a few cycles
        if spec.waveform == "sine" and state.parts.former.kind == "toroid":
            worst = mat.b_r_t + 2.0 * s.b_peak_max_t
            if worst > bsat:
                out.append(Check("warn", "inrush",
                                 f"switched on at a voltage zero with residual flux, the core can reach B_r + 2 B_pk = "
                                 f"{tesla(worst)} against B_sat {tesla(bsat)}: expect an inrush of many times the "
                                 f"rated current; specify a soft-start or a slow-blow fuse on the label and test the "
                                 f"first article"))
        return out

    def test_limits(self, state: DesignState) -> KindTests:
        """Turns ratio and polarity of every load, the inductances; a mains part's no-load test
        (``kinds/transformer_tests.py``)."""
        return transformer_tests(state)
