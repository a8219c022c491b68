"""Flybacks (coupled inductors): L_p, turns from the reflected voltage, the gap, currents by interval.

Order of work (standard flyback design procedures of the power-supply design handbooks, from memory):
 1. the input power P_in = P_out / eta (P_out includes each rectifier's drop);
 2. the reflected voltage V_R from the reflected_voltage given, else from duty_max at the lowest input,
    V_R = D_max V_min / (1 - D_max) (CCM volt-second balance);
 3. L_p: given; boundary L_b = (V_min D_b)^2 / (2 P_in f); DCM 0.8 L_b (a margin so it stays discontinuous at
    the lowest line, common practice); CCM from the ripple ratio K at the lowest input, dI = K I_pk;
 4. the primary turns from the flux limit at the worst peak current, N_p >= L_p I_pk / (B_limit A_e); the main
    secondary's turns from N_p / N_s = V_R / (V_out + V_f), rounded up to whole turns, the primary raised to
    keep the ratio; the other outputs rounded to the nearest whole turn and checked within the tolerance;
 5. the gap for L_p with McLyman's fringing (``kernel.gap_for_inductance_m``), rounded down to the shop's step;
 6. the operating point with the built L_p at the lowest and the highest input (``physics.flyback``): mode,
    duty, peak and swing; each winding's current by interval (the primary ramps up during the on-time, the
    secondaries ramp down during the reset in proportion to their load); rms and harmonics by FFT;
 7. B_pk = L_p I_pk / (N_p A_e) and the swing dB = L_p dI / (N_p A_e) at the worst line; core loss by iGSE on the
    piecewise-linear flux (rise over D, fall over the reset, flat in DCM's dead time);
 8. copper loss per winding with its own harmonics: a flyback's windings conduct in turn, so each winding's
    layers are taken with the MMF building from zero across its own layers while it conducts (Dowell, per
    harmonic); the eddy loss the idle windings pick up is left out (a first estimate, common practice);
 9. the leakage inductance referred to the primary with the secondaries shorted (energy method across the build,
    each secondary carrying its share of the load) and the clamp energy 1/2 L_lk I_pk^2 per cycle.
"""

from __future__ import annotations

import math

import numpy as np

from ...catalog.models import Catalog
from ...physics import coreloss
from ...physics import flyback as fb
from ...physics import gap as gapmod
from ...present import si
from ...records import record
from .. import kernel as K
from .. import test_setup as ts
from ..build import copper_lengths_m, lay_out, leakage_h
from ..flux import flux_limit, saturation_checks
from ..flyback_spec import FlybackReq
from ..resolve import spec_error, too_many_turns
from ..result import Check, FlybackResult, FlybackWinding, InductorResult, Limit
from ..spec import Spec, Winding
from ..state import (
    BuiltWindow,
    DesignState,
    ElectricalSummary,
    Evaluation,
    KindTests,
    Parts,
    ThermalState,
    WindingState,
    WireChoice,
)
from ..wires import choose_wire

DCM_MARGIN = 0.8             # DCM: L_p at 80 % of the boundary at the lowest line (common practice)
HARMONICS = 39               # harmonics of each winding's current for its AC factor (as kernel.SQUARE_HARMONICS)
TURNS_SEARCH = 8             # main-secondary turn counts tried for every output within tolerance


@record(slots=True)
class FlybackPass:
    turns: dict[str, int]
    l_h: float
    gap_m: float
    vr_v: float
    low: fb.OperatingPoint       # at the lowest input
    high: fb.OperatingPoint      # at the highest input
    currents: dict[str, tuple[float, float, float]]   # winding -> (peak, rms, dc) at the worst line for copper
    achieved_v: dict[str, float]
    b_peak_t: float
    b_peak_max_t: float
    delta_b_t: float
    leakage_h: float


class FlybackRun:
    def __init__(self, spec: Spec, cat: Catalog, parts: Parts) -> None:
        assert spec.flyback is not None
        self.spec, self.cat, self.parts, self.req = spec, cat, parts, spec.flyback
        req: FlybackReq = spec.flyback
        self.prim: Winding = next(w for w in spec.windings if w.role == "primary")
        self.loads = [w for w in spec.windings if w.role in ("secondary", "auxiliary")]
        self.main = next(w for w in self.loads if w.role == "secondary")
        self.vf = req.diode_drop_v
        self.p_out = sum((float(w.voltage_v or 0.0) + self.vf) * float(w.current_a or 0.0) for w in self.loads)
        if self.p_out <= 0:
            raise spec_error(spec, "the outputs draw no power; give their currents", "windings")
        self.p_in = self.p_out / req.efficiency
        self.f = spec.frequency_hz
        d_max = req.duty_max or 0.45
        self.vr_target = req.reflected_voltage_v or d_max * req.v_in_min_v / (1.0 - d_max)
        self.l_target = self.target_inductance()
        self.wires: dict[str, WireChoice] = {}

    def target_inductance(self) -> float:
        req, v = self.req, self.req.v_in_min_v
        if req.inductance_h is not None:
            return req.inductance_h
        lb = fb.boundary_inductance_h(v, self.vr_target, self.p_in, self.f)
        if req.mode == "dcm":
            return DCM_MARGIN * lb
        if req.mode == "boundary":
            return lb
        d = self.vr_target / (self.vr_target + v)
        i_pk = self.p_in / (v * d) / (1.0 - req.ripple_ratio / 2.0)
        return v * d / (req.ripple_ratio * i_pk * self.f)

    def turns(self, temp: ThermalState) -> tuple[dict[str, int], float, float]:
        """Whole turns from the flux limit and the reflected voltage; the gap for L_p; the built L_p."""
        spec, parts, req = self.spec, self.parts, self.req
        limit = flux_limit(spec, self.cat, parts.material, temp.hot_c).value_t
        worst = max(fb.operating_point(self.l_target, v, self.vr_target, self.p_in, self.f).i_peak_a
                    for v in (req.v_in_min_v, req.v_in_max_v))
        np_min = self.l_target * worst / (limit * parts.ae_m2)
        if not np_min < K.MAX_TURNS:
            raise too_many_turns(spec, np_min, "the primary", "flyback")
        main_v = float(self.main.voltage_v or 0.0) + self.vf
        ratio = self.vr_target / main_v
        ns0 = max(1, math.ceil(np_min / ratio - 1e-9))
        out = self.whole_turns(ns0, np_min, ratio)
        for ns in range(ns0, ns0 + TURNS_SEARCH):      # more turns on the main secondary give finer steps
            trial = self.whole_turns(ns, np_min, ratio)
            if all(abs(err) <= req.output_tolerance_pct for err in self.output_errors_pct(trial).values()):
                out = trial
                break
        n_p = out[self.prim.name]
        ae, le, mu, g = parts.ae_m2, parts.le_m, parts.material.mu_working, parts.window_breadth_m
        gaps = K.gaps_in_series(K.gap_arrangement_on(self.req.gap_arrangement, parts.core.shape))
        lg = float(K.gap_for_inductance_m(self.l_target, n_p, ae, le, mu, g, gaps))
        if math.isnan(lg):
            raise spec_error(spec, f"{parts.core.id} cannot reach L_p {si(self.l_target, 'H', keep_zeros=False)} with "
                                   f"{n_p} primary turns even ungapped: a core with a higher AL", "core", "id")
        lg = float(K.round_gap_down_m(lg))
        l_built = float(gapmod.inductance_gapped_h(n_p, ae, le, mu, lg, g if lg > 0 else None, gaps))
        return out, lg, l_built

    def whole_turns(self, ns: int, np_min: float, ratio: float) -> dict[str, int]:
        """The primary and every output's whole turns for ``ns`` turns on the main secondary."""
        main_v = float(self.main.voltage_v or 0.0) + self.vf
        out = {self.prim.name: max(math.ceil(np_min - 1e-9), round(ratio * ns))}
        for w in self.loads:
            out[w.name] = ns if w is self.main else max(1, round(ns * (float(w.voltage_v or 0.0) + self.vf) / main_v))
        return out

    def achieved_v(self, turns: dict[str, int]) -> dict[str, float]:
        """Each output's voltage from whole turns: the main output's (V + V_f) scaled by turns, less V_f."""
        main_v = float(self.main.voltage_v or 0.0) + self.vf
        return {w.name: main_v * turns[w.name] / turns[self.main.name] - self.vf for w in self.loads}

    def output_errors_pct(self, turns: dict[str, int]) -> dict[str, float]:
        got = self.achieved_v(turns)
        return {w.name: (got[w.name] - float(w.voltage_v or 0.0)) / float(w.voltage_v or 1.0) * 100.0 for w in self.loads}

    def currents(self, op: fb.OperatingPoint, turns: dict[str, int]) -> dict[str, tuple[float, float, float, float]]:
        """Each winding's (peak, rms, dc, ac rms) at one operating point.

        At turn-off the primary's ampere-turns pass to the secondaries, shared by their load (output power):
        I_pk,i = I_pk,p (N_p / N_i) share_i, ramping down over the reset with the primary's ripple ratio.
        Conservative by about 1 / efficiency: the stored energy includes the losses elsewhere in the converter."""
        out = {}
        k = op.i_ripple_a / op.i_peak_a
        n_p = turns[self.prim.name]
        rms = fb.trapezoid_rms_a(op.i_peak_a, op.i_ripple_a, op.duty)
        dc = op.i_peak_a * op.duty * (1.0 - k / 2.0)
        out[self.prim.name] = (op.i_peak_a, rms, dc, math.sqrt(max(rms * rms - dc * dc, 0.0)))
        for w in self.loads:
            share = (float(w.voltage_v or 0.0) + self.vf) * float(w.current_a or 0.0) / self.p_out
            peak = op.i_peak_a * n_p / turns[w.name] * share
            rms_s = fb.trapezoid_rms_a(peak, k * peak, op.reset_duty)
            dc_s = peak * op.reset_duty * (1.0 - k / 2.0)
            out[w.name] = (peak, rms_s, dc_s, math.sqrt(max(rms_s * rms_s - dc_s * dc_s, 0.0)))
        return out

    def pick_wires(self, cur: dict[str, tuple[float, float, float, float]]) -> None:
        density = K.current_density_a_m2(self.cat.shop.current_density_a_m2, self.spec.cooling)
        for w in self.spec.windings:
            if not w.wire.startswith("auto"):
                self.wires[w.name] = WireChoice(self.cat.wires[w.wire], w.strands or 1, "given")
            else:
                self.wires[w.name] = choose_wire(self.cat, cur[w.name][1], density, self.f, K.WIRE_CHOICE_TEMP_C,
                                                 w.wire, w.strands, self.spec.insulation_class_c)

    def frs(self, built: BuiltWindow, states: dict[str, WindingState], ops: dict[str, fb.OperatingPoint],
            temp: ThermalState) -> dict[tuple[str, int], float]:
        """Each section's Fr over its own winding's harmonics, MMF from zero across that winding's layers."""
        skin = float(K.skin_depth_m(self.f, temp.hot_c))
        out: dict[tuple[str, int], float] = {}
        mmf: dict[str, float] = {}
        for s in built.sections:
            st = states[s.winding]
            op = ops[s.winding]
            rising = st.spec is self.prim
            duty = op.duty if rising else op.reset_duty
            _, harm = fb.trapezoid_harmonics(1.0, op.i_ripple_a / op.i_peak_a, duty, rising, HARMONICS)
            power = harm ** 2
            harmonics = K.Harmonics(np.arange(1, HARMONICS + 1, dtype=float), power / power.sum())
            turns = [layer.turns for layer in s.build.layers]
            faces = [mmf.get(s.winding, 0.0)]
            for t in turns:
                faces.append(faces[-1] + float(t))
            mmf[s.winding] = faces[-1]
            frs = K.layer_ac_factor(K.wire_geometry(st.wire, st.strands), np.array(turns, dtype=float),
                                    s.build.usable_breadth_m, skin, np.array(faces[:-1]), np.array(faces[1:]),
                                    harmonics)
            lengths = [layer.length_m for layer in s.build.layers]
            out[(s.winding, s.index)] = float(np.dot(np.atleast_1d(frs), lengths) / sum(lengths))
        return out

    def evaluate(self, temp: ThermalState) -> Evaluation[FlybackPass]:
        spec, parts, req, mat = self.spec, self.parts, self.req, self.parts.material
        turns, lg, l_h = self.turns(temp)
        main_v = float(self.main.voltage_v or 0.0) + self.vf
        vr = main_v * turns[self.prim.name] / turns[self.main.name]
        low = fb.operating_point(l_h, req.v_in_min_v, vr, self.p_in, self.f)
        high = fb.operating_point(l_h, req.v_in_max_v, vr, self.p_in, self.f)
        cur = self.currents(low, turns)           # the lowest line carries the largest rms currents
        if not self.wires:
            self.pick_wires(cur)
        states = {w.name: WindingState(w, i, self.wires[w.name].wire, self.wires[w.name].strands, turns[w.name],
                                       cur[w.name][1], self.wires[w.name].reason)
                  for i, w in enumerate(spec.windings)}
        built = lay_out(spec, parts, states, self.cat)
        ops = {w.name: low for w in spec.windings}
        frs = self.frs(built, states, ops, temp) if built.ok else {}
        lengths = copper_lengths_m(built, self.cat.shop.lead_length_m)
        copper = 0.0
        for name, st in states.items():
            r_hot = float(K.dc_resistance_ohm(st.wire.copper_area_m2 * st.strands, lengths.get(name, 0.0), temp.hot_c,
                                              st.wire.conductor))
            fr = _winding_fr(built, frs, name)
            copper += float(K.copper_loss_w(r_hot, fr, cur[name][3], cur[name][2]))
        n_p, ae = turns[self.prim.name], parts.ae_m2
        worst = max((low, high), key=lambda o: o.i_peak_a)
        b_pk = l_h * low.i_peak_a / (n_p * ae)
        b_max = l_h * worst.i_peak_a / (n_p * ae)
        pv = max(_core_loss_w_m3(l_h * o.i_ripple_a / (n_p * ae), o, self.f, mat.steinmetz_k, mat.steinmetz_alpha,
                                 mat.steinmetz_beta) for o in (low, high))
        delta_b = max(l_h * o.i_ripple_a / (n_p * ae) for o in (low, high))
        shares = {w.name: (float(w.voltage_v or 0.0) + self.vf) * float(w.current_a or 0.0) / self.p_out
                  for w in self.loads}
        signed = {self.prim.name: 1.0}
        signed.update({w.name: -shares[w.name] * n_p / turns[w.name] for w in self.loads})
        lk = leakage_h(built, parts.former, signed, self.prim.name) if built.ok else 0.0
        achieved = self.achieved_v(turns)
        detail = FlybackPass(turns, l_h, lg, vr, low, high, {k: v[:3] for k, v in cur.items()}, achieved,
                             b_pk, b_max, delta_b, lk)
        return Evaluation(states, built, frs, copper, pv * parts.ve_m3, pv, detail)

    # -- the KindRun protocol
    def first(self, temp: ThermalState) -> tuple[Evaluation[FlybackPass], int]:
        return self.evaluate(temp), 0

    def again(self, previous: Evaluation[FlybackPass], temp: ThermalState) -> Evaluation[FlybackPass]:
        return self.evaluate(temp)

    def summary(self, ev: Evaluation[FlybackPass], temp: ThermalState) -> ElectricalSummary:
        d, parts, req = ev.detail, self.parts, self.req
        n_p = d.turns[self.prim.name]
        worst = max((d.low, d.high), key=lambda o: o.i_peak_a)
        arrangement = K.gap_arrangement_on(req.gap_arrangement, parts.core.shape) if d.gap_m > 0 else "none"
        notes: list[Check] = []
        if d.gap_m > 0 and arrangement != req.gap_arrangement:
            notes.append(Check("warn", "gap", "laminations cannot be ground in the centre leg only: the gap "
                                              "is made with a spacer (butt gap) in every leg"))
        g = parts.window_breadth_m
        i_avg = worst.i_peak_a - worst.i_ripple_a / 2.0
        ind = InductorResult(
            inductance_h=d.l_h, inductance_zero_bias_h=d.l_h, inductance_at_full_bias_h=d.l_h, target_h=self.l_target,
            gap_m=d.gap_m, gap_arrangement=arrangement, spacer_m=d.gap_m / 2.0 if arrangement == "spacer" else None,
            grind_m=d.gap_m if arrangement == "centre" else None,
            fringing_factor=float(gapmod.fringing_factor(d.gap_m / K.gaps_in_series(arrangement), parts.ae_m2, g))
            if d.gap_m > 0 else 1.0,
            al_nh=float(gapmod.al_nh(d.l_h, n_p)), energy_j=0.5 * d.l_h * worst.i_peak_a ** 2,
            h_dc_a_m=n_p * i_avg / parts.le_m, bias_drop_pct=0.0, current_dc_a=self.p_in / req.v_in_min_v,
            current_peak_a=worst.i_peak_a, ripple_a=worst.i_ripple_a, delta_b_t=d.delta_b_t,
            b_dc_t=d.l_h * i_avg / (n_p * parts.ae_m2))
        windings = tuple(FlybackWinding(name=w.name, turns=d.turns[w.name], peak_current_a=d.currents[w.name][0],
                                        rms_current_a=d.currents[w.name][1],
                                        dc_current_a=d.currents[w.name][2] if w is self.prim else float(w.current_a or 0.0),
                                        output_voltage_v=d.achieved_v.get(w.name))
                         for w in self.spec.windings)
        result = FlybackResult(
            mode=d.low.mode, mode_at_high_line=d.high.mode, inductance_h=d.l_h, gap_m=d.gap_m,
            duty_max=d.low.duty, duty_min=d.high.duty, reflected_voltage_v=d.vr_v, input_power_w=self.p_in,
            output_power_w=self.p_out, efficiency_estimate=req.efficiency, b_peak_t=d.b_peak_max_t,
            delta_b_t=d.delta_b_t, leakage_inductance_h=d.leakage_h,
            clamp_energy_j=fb.clamp_energy_j(d.leakage_h, worst.i_peak_a),
            clamp_power_w=fb.clamp_energy_j(d.leakage_h, worst.i_peak_a) * self.f,
            switch_voltage_v=req.v_in_max_v + d.vr_v, windings=windings)
        ripple = {name: (c[2], math.sqrt(max(c[1] ** 2 - c[2] ** 2, 0.0))) for name, c in d.currents.items()}
        return ElectricalSummary(
            b_peak_t=d.b_peak_t, b_peak_max_t=d.b_peak_max_t,
            flux_limit=flux_limit(self.spec, self.cat, parts.material, temp.hot_c),
            h_peak_a_m=n_p * worst.i_peak_a / parts.le_m, magnetizing_inductance_h=d.l_h,
            leakage_inductance_h=d.leakage_h, voltages=dict(d.achieved_v), output_power_w=self.p_out, inductor=ind,
            ripple_rms=ripple, checks=tuple(notes + _output_checks(self, d)), flyback=result)


def _output_checks(run: FlybackRun, d: FlybackPass) -> list[Check]:
    out = []
    tol = run.req.output_tolerance_pct
    for w in run.loads:
        want = float(w.voltage_v or 0.0)
        got = d.achieved_v[w.name]
        err = (got - want) / want * 100.0
        said = (f"{w.name}: {d.turns[w.name]} turns give {got:.3g} V for {want:g} V ({err:+.1f} %) with "
                f"{d.turns[run.prim.name]} primary turns")
        if abs(err) > tol:
            out.append(Check("fail", "flyback-output", f"{said}, outside ±{tol:g} %: whole turns cannot meet it at "
                                                       f"this ratio; more turns on the main secondary give finer steps"))
        else:
            out.append(Check("pass", "flyback-output", f"{said}, within ±{tol:g} %"))
    if d.low.duty > (run.req.duty_max or 1.0) * 1.02:
        out.append(Check("warn", "flyback-duty", f"duty {d.low.duty:.2f} at {run.req.v_in_min_v:g} V is above the "
                                                 f"{run.req.duty_max:g} wanted (whole turns raised V_R)"))
    return out


def _winding_fr(built: BuiltWindow, frs: dict[tuple[str, int], float], name: str) -> float:
    secs = built.of(name)
    clen = sum(s.build.copper_length_m for s in secs)
    return sum(frs.get((name, s.index), 1.0) * s.build.copper_length_m for s in secs) / clen if clen > 0 else 1.0


def _core_loss_w_m3(delta_b_t: float, op: fb.OperatingPoint, freq_hz: float, k: float, alpha: float,
                    beta: float) -> float:
    """iGSE of the flyback's flux: rises dB over D, falls over the reset, flat for the rest (DCM)."""
    if delta_b_t <= 0:
        return 0.0
    period = 1.0 / freq_hz
    t_on, t_off = op.duty * period, min(op.reset_duty, 1.0 - op.duty) * period
    if t_on + t_off < period * (1.0 - 1e-9):
        times = [0.0, t_on, t_on + t_off, period]
        flux = [0.0, delta_b_t, 0.0, 0.0]
    else:
        times = [0.0, t_on, period]
        flux = [0.0, delta_b_t, 0.0]
    return float(coreloss.igse_piecewise_linear_w_m3(np.array(times), np.array(flux), k, alpha, beta))


class FlybackKind:
    name = "flyback"

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> FlybackRun:
        return FlybackRun(spec, cat, parts)

    def flux_checks(self, state: DesignState) -> list[Check]:
        """B_pk = L_p I_pk / (N_p A_e) at the worst line and full load against B_sat at the hot spot."""
        fr = state.summary.flyback
        assert fr is not None
        b = state.summary.b_peak_max_t
        return saturation_checks(state, f"B_pk {b:.3f} T (swing {fr.delta_b_t:.3f} T) at full load, worst line", b,
                                 "more primary turns (and gap) or a core with more Ae", slack=1.0005)

    def test_limits(self, state: DesignState) -> KindTests:
        """L_p, the AL of the gapped set, leakage with the secondaries shorted, turns ratios, polarity."""
        fr = state.summary.flyback
        assert fr is not None
        tol = state.cat.shop.tolerances
        prim = next(w for w in state.windings if w.role == "primary")
        t_l = tol["inductance"]
        lp = fr.inductance_h
        f, ae = state.spec.frequency_hz, state.parts.ae_m2
        pins = f"pins {prim.start}-{prim.finish}"
        ind = [Limit(name="primary inductance L_p", item=prim.name, nominal=lp, low=lp * (1 - t_l), high=lp * (1 + t_l),
                     unit="H", pins=pins, setting=ts.lcr_setting(prim.turns, ae, f, gapped=fr.gap_m > 0),
                     condition="every other winding open")]
        if fr.gap_m > 0:
            al = lp / prim.turns ** 2
            ind.append(Limit(name="AL of the gapped set", item=prim.name, nominal=al, low=al * (1 - t_l),
                             high=al * (1 + t_l), unit="H", pins="a 10-turn test coil on the gapped set",
                             setting=ts.lcr_setting(10, ae, f, gapped=True),
                             condition="per turn squared (L / 100); check the set before winding"))
        lk = fr.leakage_inductance_h
        ind.append(Limit(name="leakage inductance", item=prim.name, nominal=lk, low=lk * ts.LEAKAGE_BAND[0],
                         high=lk * ts.LEAKAGE_BAND[1], unit="H", pins=pins, setting=ts.leakage_setting(f),
                         condition="every secondary and auxiliary shorted"))
        ratios = []
        polarity = []
        back = prim.finish if prim.dot_pin == prim.start else prim.start
        for w in state.windings:
            if w.role == "primary":
                continue
            r = prim.turns / w.turns
            ratios.append(Limit(name="turns ratio", item=f"{prim.name}:{w.name}", nominal=r, low=r * (1 - tol["ratio"]),
                                high=r * (1 + tol["ratio"]), unit=":1", setting=ts.ratio_setting(f),
                                pins=f"{prim.name} {prim.start}-{prim.finish} driven, {w.name} {w.start}-{w.finish} read",
                                condition=f"{prim.turns} : {w.turns} turns"))
            w_back = w.finish if w.dot_pin == w.start else w.start
            polarity.append(f"FLYBACK, windings out of phase: positive step on {prim.name}, pin {prim.dot_pin} against "
                            f"pin {back}: {w.name} pin {w.dot_pin} reads positive against pin {w_back} (the dotted "
                            f"pins rise together), so {w.name}'s rectifier, on its undotted pin, conducts only while "
                            f"the switch is off.")
        return KindTests(ratio=tuple(ratios), inductance=tuple(ind), polarity=tuple(polarity))
