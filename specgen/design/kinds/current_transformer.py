"""Current transformers: driven by the primary current, not by a voltage.

The turns follow from the ratio; nothing is solved for flux. The secondary develops only the voltage its
burden and its own winding need, V_s = I_s (R_b + R_w); the flux follows from Faraday's law,
B_pk = V_s / (4.44 f N_s A_e). The magnetising inductance L_m = mu0 mu_i N_s^2 A_e / l_e (the material's
small-signal permeability: a current transformer works at low flux) and the core-loss resistance
R_c = V_s^2 / P_core (Steinmetz at B_pk) form the magnetising branch; the primary current referred to the
secondary divides between it and the secondary loop, which gives the ratio error and the phase displacement
(``physics.current_transformer``). The knee burden is the largest burden before the core reaches B_sat at the
hot spot at the top of the primary range.

References: the magnetising-branch phasor analysis of the instrument current transformer (standard
instrument-transformer texts; IEC 61869-2 for the definitions of ratio error and phase displacement; from
memory).
"""

from __future__ import annotations

import math

from ...catalog.models import Catalog
from ...physics import current_transformer as ctp
from ...physics import gap as gapmod
from ...present import frequency
from ...records import record
from .. import kernel as K
from .. import test_setup as ts
from ..build import copper_lengths_m, lay_out, section_frs, winding_fr
from ..flux import b_sat_hot_t, flux_limit, saturation_checks
from ..result import Check, CurrentTransformerResult, Limit
from ..spec import THROUGH_CONDUCTOR, CurrentTransformerReq, Spec, Winding
from ..state import DesignState, ElectricalSummary, Evaluation, KindTests, Parts, ThermalState, WindingState, WireChoice
from ..wires import choose_wire

# The open-secondary hazard, on the work order and the test sheet (every instrument-transformer text warns of
# it; the applicable standard, e.g. IEC 61869-2 and the installation's safety rules, decides the practice).
OPEN_SECONDARY_CAUTION = (
    "Never open-circuit the secondary of a current transformer while primary current flows: with no burden the "
    "whole primary current magnetises the core and the secondary can develop a dangerous voltage and overheat.",
    "Short the secondary leads (or connect the burden) before passing primary current, and keep them shorted "
    "until the primary current is off.",
    "Follow the applicable standard (e.g. IEC 61869-2), the customer's drawing, local codes and licensed practice.",
)
KNEE_MARGIN = 2.0      # knee burden at least twice the rated burden: room for leads and meters (common practice)


@record(slots=True)
class CtPass:
    """A current transformer's figures at one pass."""
    r_winding_ohm: float
    v_secondary_v: float
    b_peak_t: float
    b_peak_max_t: float
    lm_h: float
    r_core_ohm: float


class CurrentTransformerRun:
    def __init__(self, spec: Spec, cat: Catalog, parts: Parts) -> None:
        assert spec.current_transformer is not None
        self.spec, self.cat, self.parts = spec, cat, parts
        self.req: CurrentTransformerReq = spec.current_transformer
        self.sec: Winding = next(w for w in spec.windings if w.role == "secondary")
        self.prim: Winding | None = next((w for w in spec.windings if w.role == "primary"), None)
        self.ns = round(self.req.turns_ratio * self.req.primary_turns)
        self.i_s = self.req.primary_current_a / self.req.turns_ratio
        density = K.current_density_a_m2(cat.shop.current_density_a_m2, spec.cooling)
        self.wires: dict[str, WireChoice] = {}
        for w in spec.windings:
            current = self.i_s if w is self.sec else self.req.primary_current_a
            if not w.wire.startswith("auto"):
                self.wires[w.name] = WireChoice(cat.wires[w.wire], w.strands or 1, "given")
            else:
                self.wires[w.name] = choose_wire(cat, current, density, spec.frequency_hz, K.WIRE_CHOICE_TEMP_C,
                                                 w.wire, w.strands, spec.insulation_class_c)

    def states(self) -> dict[str, WindingState]:
        out: dict[str, WindingState] = {}
        for i, w in enumerate(self.spec.windings):
            c = self.wires[w.name]
            turns, current = (self.ns, self.i_s) if w is self.sec else (self.req.primary_turns, self.req.primary_current_a)
            out[w.name] = WindingState(w, i, c.wire, c.strands, turns, current, c.reason)
        return out

    def evaluate(self, temp: ThermalState) -> Evaluation[CtPass]:
        spec, parts, req, mat = self.spec, self.parts, self.req, self.parts.material
        f = spec.frequency_hz
        states = self.states()
        built = lay_out(spec, parts, states, self.cat)
        signs = {w.name: (-1.0 if w is self.sec else 1.0) for w in spec.windings}
        frs = section_frs(built, states, f, temp.hot_c, "sine", signs) if built.ok else {}
        lengths = copper_lengths_m(built, self.cat.shop.lead_length_m)
        copper = 0.0
        r_sec = 0.0
        for name, st in states.items():
            r_hot = float(K.dc_resistance_ohm(st.wire.copper_area_m2 * st.strands, lengths.get(name, 0.0), temp.hot_c,
                                              st.wire.conductor))
            if st.spec is self.sec:
                r_sec = r_hot * winding_fr(built, frs, name)     # the AC resistance the secondary current meets
            copper += float(K.copper_loss_w(r_hot, winding_fr(built, frs, name), st.current_a))
        v_s = float(ctp.secondary_voltage_v(self.i_s, req.burden_ohm, r_sec))
        b_pk = float(ctp.peak_flux_t(v_s, f, self.ns, parts.ae_m2))
        v_max = v_s * req.primary_current_max_a / req.primary_current_a
        b_max = float(ctp.peak_flux_t(v_max, f, self.ns, parts.ae_m2))
        pv = float(K.core_loss_w_m3("sine", f, b_pk, 0.5, mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta))
        core_w = pv * parts.ve_m3
        lm = float(gapmod.inductance_gapped_h(self.ns, parts.ae_m2, parts.le_m, mat.mu_working, 0.0, None))
        r_core = v_s * v_s / core_w if core_w > 0 else math.inf
        return Evaluation(states, built, frs, copper, core_w, pv, CtPass(r_sec, v_s, b_pk, b_max, lm, r_core))

    # -- the KindRun protocol
    def first(self, temp: ThermalState) -> tuple[Evaluation[CtPass], int]:
        return self.evaluate(temp), 0

    def again(self, previous: Evaluation[CtPass], temp: ThermalState) -> Evaluation[CtPass]:
        return self.evaluate(temp)

    def summary(self, ev: Evaluation[CtPass], temp: ThermalState) -> ElectricalSummary:
        req, d, f, parts = self.req, ev.detail, self.spec.frequency_hz, self.parts
        xm = 2.0 * math.pi * f * d.lm_h
        loop = req.burden_ohm + d.r_winding_ohm
        n = req.turns_ratio
        # the core-loss resistance scales with the flux: Steinmetz P ~ B^beta, so R_c = V^2/P ~ V^(2 - beta)
        beta = parts.material.steinmetz_beta
        scale = req.primary_current_max_a / req.primary_current_a
        rc_max = d.r_core_ohm * scale ** (2.0 - beta) if math.isfinite(d.r_core_ohm) else math.inf
        b_sat = b_sat_hot_t(parts.material, temp.hot_c)
        i_s_max = req.primary_current_max_a / n
        ct = CurrentTransformerResult(
            primary_current_a=req.primary_current_a, primary_current_max_a=req.primary_current_max_a,
            primary_turns=req.primary_turns, secondary_turns=self.ns, turns_ratio=n, secondary_current_a=self.i_s,
            burden_ohm=req.burden_ohm, winding_resistance_ohm=d.r_winding_ohm, secondary_voltage_v=d.v_secondary_v,
            magnetizing_inductance_h=d.lm_h, magnetizing_current_a=d.v_secondary_v / xm,
            core_loss_current_a=d.v_secondary_v / d.r_core_ohm if math.isfinite(d.r_core_ohm) else 0.0,
            ratio_error_pct=float(ctp.ratio_error_pct(req.primary_current_a, n, loop, xm, d.r_core_ohm)),
            phase_error_deg=float(ctp.phase_error_deg(req.primary_current_a, n, loop, xm, d.r_core_ohm)),
            ratio_error_max_pct=float(ctp.ratio_error_pct(req.primary_current_max_a, n, loop, xm, rc_max)),
            phase_error_max_deg=float(ctp.phase_error_deg(req.primary_current_max_a, n, loop, xm, rc_max)),
            knee_burden_ohm=float(ctp.knee_burden_ohm(b_sat, f, self.ns, parts.ae_m2, i_s_max, d.r_winding_ohm)),
            current_shape=req.current_shape,
        )
        return ElectricalSummary(
            b_peak_t=d.b_peak_t, b_peak_max_t=d.b_peak_max_t,
            flux_limit=flux_limit(self.spec, self.cat, parts.material, temp.hot_c),
            h_peak_a_m=math.sqrt(2.0) * ct.magnetizing_current_a * self.ns / parts.le_m,
            magnetizing_inductance_h=d.lm_h, magnetizing_current_a=ct.magnetizing_current_a,
            voltages={self.sec.name: d.v_secondary_v}, output_power_w=self.i_s ** 2 * req.burden_ohm,
            checks=tuple(_accuracy_checks(ct, req) + _shape_checks(ct) + _through_check(self.spec, req)),
            current_transformer=ct)


def _accuracy_checks(ct: CurrentTransformerResult, req: CurrentTransformerReq) -> list[Check]:
    out: list[Check] = []
    worst_ratio = max(abs(ct.ratio_error_pct), abs(ct.ratio_error_max_pct))
    worst_phase = max(abs(ct.phase_error_deg), abs(ct.phase_error_max_deg))
    said = (f"ratio error {ct.ratio_error_pct:+.3f} % and phase displacement {ct.phase_error_deg * 60:+.1f} min "
            f"at {ct.primary_current_a:g} A into {ct.burden_ohm:g} ohm")
    if req.ratio_error_pct is not None and worst_ratio > req.ratio_error_pct:
        out.append(Check("fail", "ct-ratio-error", f"{said}: the ratio error reaches {worst_ratio:.3f} %, above the "
                                                   f"{req.ratio_error_pct:g} % wanted: more secondary turns with "
                                                   f"a larger core, a higher-permeability core or a smaller burden"))
    if req.phase_error_deg is not None and worst_phase > req.phase_error_deg:
        out.append(Check("fail", "ct-phase-error", f"{said}: the phase displacement reaches {worst_phase:.3f}°, "
                                                   f"above the {req.phase_error_deg:g}° wanted: more magnetising "
                                                   f"inductance (core, permeability) or a smaller burden"))
    if not out:
        out.append(Check("pass", "ct-accuracy", said))
    if ct.knee_burden_ohm < KNEE_MARGIN * ct.burden_ohm:
        out.append(Check("warn", "ct-knee", f"the knee burden {ct.knee_burden_ohm:.3g} ohm at "
                                            f"{ct.primary_current_max_a:g} A is under {KNEE_MARGIN:g} x the rated "
                                            f"{ct.burden_ohm:g} ohm: little room for leads and meters (common "
                                            f"practice)"))
    return out


def _through_check(spec: Spec, req: CurrentTransformerReq) -> list[Check]:
    """A primary passed through the core (the customer's bus bar or cable) needs its insulation to the secondary
    stated: a barrier naming 'conductor', coordinated in ``design.insulation`` against the outer wrap."""
    if req.primary_turns != 1 or any(THROUGH_CONDUCTOR in (b.a, b.b) for b in spec.barriers):
        return []
    return [Check("warn", "ct-primary-barrier", f"the primary is a conductor passed through the core, and no "
                                                f"barrier states its insulation to the secondary: add one with "
                                                f"between: [{THROUGH_CONDUCTOR}, {spec.windings[0].name}], its "
                                                f"grade and the conductor's working voltage")]


def _shape_checks(ct: CurrentTransformerResult) -> list[Check]:
    if ct.current_shape == "sine":
        return []
    what = "a DC offset" if ct.current_shape == "dc_offset" else "a unipolar primary current"
    return [Check("warn", "ct-dc", f"{what} is not transformed: its DC part walks the core towards saturation "
                                   f"and the ratio and phase errors above assume a sine. A unipolar current needs "
                                   f"a reset each cycle (a diode and a reset resistor or Zener across the "
                                   f"secondary); check the flux at the longest on-time")]


class CurrentTransformerKind:
    name = "current_transformer"

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> CurrentTransformerRun:
        return CurrentTransformerRun(spec, cat, parts)

    def flux_checks(self, state: DesignState) -> list[Check]:
        """Saturation at the top of the primary range into the rated burden, against the hot B_sat."""
        ct = state.summary.current_transformer
        assert ct is not None
        b = state.summary.b_peak_max_t
        return saturation_checks(state, f"B_pk {b * 1e3:.3g} mT at {ct.primary_current_max_a:g} A into "
                                        f"{ct.burden_ohm:g} ohm", b,
                                 f"the knee burden is {ct.knee_burden_ohm:.3g} ohm; more secondary turns, a core "
                                 f"with more Ae or a smaller burden", limit_in_pass=False)

    def test_limits(self, state: DesignState) -> KindTests:
        """Turns ratio at a low level (the ratio into the burden is a type test), polarity, and the open-secondary
        caution."""
        ct = state.summary.current_transformer
        assert ct is not None
        sec = next(w for w in state.windings if w.role == "secondary")
        tol = state.cat.shop.tolerances.get("ratio", 0.005)
        expected = ct.secondary_current_a * (1.0 + ct.ratio_error_pct / 100.0)
        primary = "a one-turn test loop through the core" if ct.primary_turns == 1 else f"{ct.primary_turns} primary turns"
        r = ct.secondary_turns / ct.primary_turns
        # the station has no source of the rated primary current at the working frequency: the turns ratio is read
        # at a low level (the secondary driven, the primary loop read); the ratio error into the burden is a type test
        ratio = Limit(name="turns ratio", item=f"{sec.name}:P", nominal=r, low=r * (1.0 - tol), high=r * (1.0 + tol),
                      unit=":1", setting=ts.ratio_setting(state.spec.frequency_hz),
                      pins=f"{sec.name} {sec.start}-{sec.finish} driven, {primary} read (P1 on the marked face)",
                      condition=f"{ct.secondary_turns} : {ct.primary_turns} turns; type test: {ct.primary_current_a:g} A "
                                f"at {frequency(state.spec.frequency_hz)} gives {expected * 1e3:.4g} mA into "
                                f"{ct.burden_ohm:g} ohm")
        arrow = "the marked face (P1)" if ct.primary_turns == 1 else "the primary's dotted lead (P1)"
        dot = sec.dot_pin or sec.start
        polarity = (f"Primary current entering {arrow} leaves the secondary at the dotted lead "
                    f"{dot} (positive against {sec.finish if dot == sec.start else sec.start}) into the burden "
                    f"(P1 and the dot have the same instantaneous "
                    f"polarity): check with a DC kick or a phase meter; reversed, the reading inverts.",)
        return KindTests(ratio=(ratio,), polarity=polarity, cautions=OPEN_SECONDARY_CAUTION)
