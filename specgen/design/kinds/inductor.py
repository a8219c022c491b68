"""Inductors and chokes: gapped cores (energy method + fringing), powder cores under DC bias, AC reactors.

Gapped core (McLyman's method): turns from N = L I_pk / (B_max A_e); the gap from
L = mu0 N^2 A_e F / (l_g + l_e/mu_r) solved with the fringing factor F; the gap rounded down to the shop's
0.01 mm so the built part meets L; a spacer in all legs is half the gap (the flux crosses it twice).
Powder core: no discrete gap; the permeability falls with the DC magnetizing force H = N I / l_e along the
catalogue's roll-off curve, so the turns are iterated until L is met at full DC current.
AC reactor: L = V_drop / (2 pi f I) at rated current, then as a gapped core at I_pk = sqrt(2) I.
"""

from __future__ import annotations

import math

from ...catalog.models import Catalog
from ...physics import gap as gapmod
from ...physics import permeability
from ...present import si, si_set, tesla
from ...records import record
from .. import kernel as K
from .. import test_setup as ts
from ..build import copper_lengths_m, lay_out, section_frs, winding_fr
from ..flux import b_sat_hot_t, flux_limit
from ..resolve import spec_error, too_many_turns
from ..result import Check, InductorResult, Limit
from ..spec import InductorReq, Spec
from ..state import (
    DesignState,
    ElectricalSummary,
    Evaluation,
    KindTests,
    Magnetics,
    Parts,
    ThermalState,
    WindingState,
    WireChoice,
)
from ..wires import choose_wire

BIAS_DROP_WARN_PCT = 50.0    # more than half the permeability gone at full current: a poor use of powder (common practice)


@record(slots=True)
class InductorPass:
    magnetics: Magnetics
    delta_b_t: float


@record(slots=True)
class Currents:
    """The currents an inductor is designed for, and the inductance it must have."""
    target_h: float
    i_dc: float           # DC (a choke); 0 for an AC reactor
    i_ac: float           # rms of the AC part
    i_rms: float
    i_pk: float           # over-current peak: must not saturate
    i_op_pk: float        # operating peak
    ripple: float         # peak to peak
    ac: bool              # an AC reactor


def currents(req: InductorReq, freq_hz: float) -> Currents:
    if req.voltage_drop_v is not None:
        i_rms = req.current_dc_a
        return Currents(target_h=req.voltage_drop_v / (2.0 * math.pi * freq_hz * i_rms), i_dc=0.0, i_ac=i_rms,
                        i_rms=i_rms, i_pk=req.current_peak_a or math.sqrt(2.0) * i_rms, i_op_pk=math.sqrt(2.0) * i_rms,
                        ripple=2.0 * math.sqrt(2.0) * i_rms, ac=True)
    i_dc, ripple = req.current_dc_a, req.ripple_a
    i_ac = ripple / math.sqrt(12.0)           # rms of a triangular ripple
    i_op_pk = i_dc + ripple / 2.0
    return Currents(target_h=float(req.inductance_h or 0.0), i_dc=i_dc, i_ac=i_ac, i_rms=math.hypot(i_dc, i_ac),
                    i_pk=max(req.current_peak_a or 0.0, i_op_pk), i_op_pk=i_op_pk, ripple=ripple, ac=False)


class InductorRun:
    def __init__(self, spec: Spec, cat: Catalog, parts: Parts) -> None:
        assert spec.inductor is not None
        self.spec, self.cat, self.parts, self.req = spec, cat, parts, spec.inductor
        self.w = spec.windings[0]
        self.c = c = currents(self.req, spec.frequency_hz)
        self.dc_choice: WireChoice | None = None
        w = self.w
        if not w.wire.startswith("auto"):
            self.wire, self.strands, self.reason = cat.wires[w.wire], (w.strands or 1), "given"
        else:
            density = K.current_density_a_m2(cat.shop.current_density_a_m2, spec.cooling)
            # the strand limit at the ripple's frequency even where the ripple is small (a thick wire's AC factor
            # grows about as fast as the ripple's share of the loss shrinks); there the wire the DC current
            # alone sets is tried too, and ``first`` keeps the lower copper loss that fits
            choice = choose_wire(cat, c.i_rms, density, spec.frequency_hz, K.WIRE_CHOICE_TEMP_C, w.wire, w.strands,
                                 spec.insulation_class_c)
            self.wire, self.strands, self.reason = choice.wire, choice.strands, choice.reason
            if not c.ac and c.i_dc > 0 and c.i_ac / c.i_dc <= K.RIPPLE_SKIN_FRACTION:
                dc = choose_wire(cat, c.i_rms, density, 0.0, K.WIRE_CHOICE_TEMP_C, w.wire, w.strands,
                                 spec.insulation_class_c)
                if (dc.wire.id, dc.strands) != (choice.wire.id, choice.strands):
                    self.dc_choice = dc
        core_keys = spec.data.get("core") if isinstance(spec.data, dict) else None
        for key in ("gap", "gap_arrangement"):
            if parts.material.is_powder and isinstance(core_keys, dict) and key in core_keys:
                raise spec_error(spec, f"{parts.core.id} is a powder core: its gap is distributed in the material, "
                                       f"so '{key}' is not used; remove core.{key}", "core", key)

    def powder(self, temp: ThermalState) -> Magnetics:
        """Turns from the DC-bias roll-off; L at zero bias, at full bias and at the peak current (incremental: what
        a small ripple sees); B from the curve's integral (``kernel.powder_flux_t``), monotonic in the current."""
        spec, parts, c, mat = self.spec, self.parts, self.c, self.parts.material
        ae, le, mu = parts.ae_m2, parts.le_m, mat.mu_initial
        a, b, cc = mat.bias_fit()
        sizing = K.powder_sizing_currents_a(c.i_dc, c.i_op_pk, c.ac)
        found = K.powder_turns_and_inductance(c.target_h, sizing, ae, le, mu, a, b, cc)
        n = self.w.turns or (found[0] if found is not None else None)
        if n is None:
            raise spec_error(spec, f"{parts.core.id} cannot reach {si(c.target_h, 'H', keep_zeros=False)} at "
                                   f"{sizing[0]:g} A: the permeability rolls off faster than turns add; use a "
                                   f"larger core or a lower-permeability powder", "core", "id")
        bias = sizing[1]
        l0 = float(permeability.powder_inductance_h(n, ae, le, mu, 0.0, a, b, cc))
        lfull = float(permeability.powder_inductance_h(n, ae, le, mu, bias, a, b, cc))
        lpeak = float(permeability.powder_inductance_h(n, ae, le, mu, c.i_pk, a, b, cc))
        frac = float(permeability.bias_fit_fraction(n * bias / le, a, b, cc))
        drop = (1.0 - frac / float(permeability.bias_fit_fraction(0.0, a, b, cc))) * 100.0
        return Magnetics(turns=int(n), flux_limit=flux_limit(spec, self.cat, mat, temp.hot_c), inductance_h=lfull,
                         inductance_zero_bias_h=l0, inductance_full_bias_h=lfull,
                         b_peak_t=float(K.powder_flux_t(n, c.i_op_pk, le, mu, a, b, cc)),
                         b_peak_max_t=float(K.powder_flux_t(n, c.i_pk, le, mu, a, b, cc)), bias_drop_pct=drop,
                         inductance_peak_h=lpeak, b_dc_t=float(K.powder_flux_t(n, bias, le, mu, a, b, cc)))

    def gapped(self, temp: ThermalState) -> Magnetics:
        """Turns and gap: fixed gap or none (turns for L), else the energy method (``kernel.gapped_turns_and_gap``).

        The core's permeability is the material's design permeability (``Material.mu_working``); a spacer puts
        the flux across two gaps in series, each with its own fringing (``kernel.gaps_in_series``)."""
        spec, parts, c, req, w = self.spec, self.parts, self.c, self.req, self.w
        ae, le, mu, G = parts.ae_m2, parts.le_m, parts.material.mu_working, parts.window_breadth_m
        limit = flux_limit(spec, self.cat, parts.material, temp.hot_c)
        what = f"{si(c.target_h, 'H', keep_zeros=False)} at {c.i_pk:g} A"
        notes: list[Check] = []
        arrangement = K.gap_arrangement_on(req.gap_arrangement, parts.core.shape)
        laminated_centre = arrangement != req.gap_arrangement
        gaps = K.gaps_in_series(arrangement)
        if req.gap in ("fixed", "none"):
            lg = float(req.gap_m or 0.0) if req.gap == "fixed" else 0.0
            n = w.turns or int(K.turns_for_inductance(c.target_h, ae, le, mu, lg, G, gaps))
        else:
            n_float = float(K.turns_for_peak_flux(c.target_h, c.i_pk, limit.value_t, ae))
            if not n_float < K.MAX_TURNS:
                raise too_many_turns(spec, n_float, what, "inductor")
            nf, lgf = K.gapped_turns_and_gap(c.target_h, c.i_pk, limit.value_t, ae, le, mu, G, fixed_turns=w.turns,
                                             gaps=gaps)
            n, lg = int(nf), float(lgf)
        l_built = float(gapmod.inductance_gapped_h(n, ae, le, mu, lg, G if lg > 0 else None, gaps))
        if lg <= 0:
            arrangement = "none"
        elif laminated_centre:
            notes.append(Check("warn", "gap", "laminations cannot be ground in the centre leg only: the gap "
                                              "is made with a spacer (butt gap) in every leg"))
        if lg > 0 and not parts.core.gappable and req.gap == "auto":
            notes.append(Check("warn", "gap", f"{parts.core.id} is not marked gappable in the catalogue: "
                                              f"confirm the shop can grind or shim it"))
        if n > K.MAX_TURNS:
            raise too_many_turns(spec, n, what, "inductor")
        return Magnetics(turns=n, flux_limit=limit, inductance_h=l_built, inductance_zero_bias_h=l_built,
                         inductance_full_bias_h=l_built, gap_m=lg if lg > 0 else 0.0,
                         arrangement="centre" if arrangement == "centre" else "spacer" if arrangement == "spacer"
                         else "none",
                         fringing_factor=float(gapmod.fringing_factor(lg / gaps, ae, G)) if lg > 0 else 1.0,
                         spacer_m=lg / 2.0 if arrangement == "spacer" else None,
                         grind_m=lg if arrangement == "centre" else None,
                         b_peak_t=float(gapmod.b_peak_from_inductance_t(l_built, c.i_op_pk, n, ae)),
                         b_peak_max_t=float(gapmod.b_peak_from_inductance_t(l_built, c.i_pk, n, ae)),
                         bias_drop_pct=0.0, notes=tuple(notes))

    def peak_inductance_checks(self, ind: InductorResult) -> list[Check]:
        """The spec's least inductance at the peak current (a PFC choke's line peak), against the small-signal
        inductance there (for a powder, rolled off along its DC-bias curve)."""
        need, got = ind.inductance_min_h, ind.inductance_at_peak_h
        if need is None or got is None:
            return []
        got_text, need_text = si_set([got, need], "H")
        what = f"L {got_text} at the peak current {si(ind.current_peak_a, 'A', 3)}"
        if got < need:
            return [Check("fail", "inductance-at-peak",
                          f"{what} is below the {need_text} required there: more turns on a larger core, "
                          f"or a powder that rolls off less")]
        return [Check("pass", "inductance-at-peak", f"{what} against {need_text} required there")]

    def iron_share_checks(self, mg: Magnetics) -> list[Check]:
        """A warning where the core, not the gap, holds most of the path's reluctance (``kernel.IRON_SHARE_WARN``)."""
        mat, le = self.parts.material, self.parts.le_m
        share = float(K.iron_reluctance_share(mg.gap_m or 0.0, le, mat.mu_working))
        if share <= K.IRON_SHARE_WARN:
            return []
        where = (f"the {mg.gap_m * 1e3:.3g} mm gap leaves {share * 100:.0f} % of the magnetic path's reluctance in "
                 f"the core" if mg.gap_m else "with no gap the core holds all of the magnetic path's reluctance")
        return [Check("warn", "permeability",
                      f"{where} (l_e / mu = {le / mat.mu_working * 1e3:.3g} mm at mu {mat.mu_working:g}): the inductance, "
                      f"and its tolerance, follow the {mat.name}'s permeability, not the gap; a larger gap with more "
                      f"turns makes it steady")]

    def evaluate(self, temp: ThermalState) -> Evaluation[InductorPass]:
        spec, parts, c, mat = self.spec, self.parts, self.c, self.parts.material
        mg = self.powder(temp) if mat.is_powder else self.gapped(temp)
        st = WindingState(self.w, 0, self.wire, self.strands, mg.turns, c.i_rms, self.reason)
        states = {self.w.name: st}
        built = lay_out(spec, parts, states, self.cat)
        f = spec.frequency_hz
        frs = section_frs(built, states, f, temp.hot_c, "sine", {self.w.name: 1.0}) if built.ok else {}
        delta_b = float(K.ripple_flux_t(mg.inductance_full_bias_h, c.ripple, mg.turns, parts.ae_m2))
        k, a, b = mat.steinmetz_k, mat.steinmetz_alpha, mat.steinmetz_beta
        if c.ac:
            pv = float(K.core_loss_w_m3("sine", f, mg.b_peak_t, 0.5, k, a, b))
        else:
            pv = float(K.core_loss_w_m3("ripple", f, delta_b, self.req.duty, k, a, b))
        length = copper_lengths_m(built, self.cat.shop.lead_length_m).get(self.w.name, 0.0)
        r_hot = float(K.dc_resistance_ohm(st.wire.copper_area_m2 * st.strands, length, temp.hot_c, st.wire.conductor))
        copper = float(K.copper_loss_w(r_hot, winding_fr(built, frs, self.w.name), c.i_ac, c.i_dc))
        return Evaluation(states, built, frs, copper, pv * parts.ve_m3, pv, InductorPass(mg, delta_b))

    # -- the KindRun protocol
    def first(self, temp: ThermalState) -> tuple[Evaluation[InductorPass], int]:
        """The evaluation at the first-guess temperature; with a small ripple, the skin-limited wire and the
        one the DC current alone sets are both tried and the one that fits with the lower copper loss kept."""
        ev = self.evaluate(temp)
        if self.dc_choice is None:
            return ev, 0
        kept = (self.wire, self.strands, self.reason)
        self.wire, self.strands, self.reason = self.dc_choice.wire, self.dc_choice.strands, self.dc_choice.reason
        other = self.evaluate(temp)
        fits = [e.built.ok and e.built.height_m * self.cat.shop.bulge_factor <= self.parts.former.height_m
                for e in (ev, other)]
        if (fits[1], -other.copper_w) > (fits[0], -ev.copper_w):
            return other, 1
        self.wire, self.strands, self.reason = kept
        return ev, 1

    def again(self, previous: Evaluation[InductorPass], temp: ThermalState) -> Evaluation[InductorPass]:
        return self.evaluate(temp)

    def summary(self, ev: Evaluation[InductorPass], temp: ThermalState) -> ElectricalSummary:
        mg, c, le, ae = ev.detail.magnetics, self.c, self.parts.le_m, self.parts.ae_m2
        n = mg.turns
        powder = self.parts.material.is_powder
        ind = InductorResult(
            inductance_h=mg.inductance_h, inductance_zero_bias_h=mg.inductance_zero_bias_h,
            inductance_at_full_bias_h=mg.inductance_full_bias_h, target_h=c.target_h,
            gap_m=None if powder else mg.gap_m, gap_arrangement=mg.arrangement, spacer_m=mg.spacer_m,
            grind_m=mg.grind_m, fringing_factor=mg.fringing_factor,
            al_nh=float(gapmod.al_nh(mg.inductance_zero_bias_h, n)),
            energy_j=float(gapmod.energy_j(mg.inductance_full_bias_h, c.i_op_pk if c.ac else c.i_dc)),
            h_dc_a_m=n * c.i_dc / le, bias_drop_pct=mg.bias_drop_pct, current_dc_a=c.i_dc if not c.ac else c.i_rms,
            current_peak_a=c.i_pk, ripple_a=c.ripple, delta_b_t=ev.detail.delta_b_t,
            b_dc_t=(mg.b_dc_t if mg.b_dc_t is not None
                    else mg.inductance_full_bias_h * c.i_dc / (n * ae) if c.i_dc else 0.0),
            inductance_at_peak_h=mg.inductance_peak_h if mg.inductance_peak_h is not None else mg.inductance_h,
            inductance_min_h=self.req.inductance_min_h,
        )
        extra = list(mg.notes)          # from the last pass only: each pass finds the magnetics again
        tol = self.cat.shop.tolerances["inductance"]
        lfull = mg.inductance_full_bias_h
        if lfull < c.target_h * (1 - tol):
            extra.append(Check("fail", "inductance",
                               f"built inductance {si(lfull, 'H')} is below the {si(c.target_h, 'H', keep_zeros=False)} "
                               f"required: add turns or reduce the gap"))
        else:
            target = si(c.target_h, "H", keep_zeros=False)
            extra.append(Check("pass", "inductance", f"L {si(lfull, 'H')} at {ind.current_dc_a:g} A against {target} required"))
        extra.extend(self.peak_inductance_checks(ind))
        if not powder:
            extra.extend(self.iron_share_checks(mg))
        if powder and mg.bias_drop_pct > BIAS_DROP_WARN_PCT:
            extra.append(Check("warn", "dc_bias", f"{mg.bias_drop_pct:.0f} % of the permeability is lost at "
                                                  f"{c.i_dc:g} A (H = {ind.h_dc_a_m:.0f} A/m): a larger core or a lower-"
                                                  f"permeability mix rolls off less (common practice: under 50 %)"))
        return ElectricalSummary(b_peak_t=mg.b_peak_t, b_peak_max_t=mg.b_peak_max_t, flux_limit=mg.flux_limit,
                                 h_peak_a_m=n * c.i_pk / le, inductor=ind, ripple_rms={self.w.name: (c.i_dc, c.i_ac)},
                                 dc_current_a=ind.current_dc_a if not c.ac else 0.0, checks=tuple(extra))


def powder_flux_checks(state: DesignState) -> list[Check]:
    """A powder core at the over-current peak: B from its DC-bias curve's integral against where the core counts
    as saturated (``kernel.powder_saturation_t``: fail above it), and the spec's own flux limit (warn)."""
    s, temp, ind, mat = state.summary, state.temp, state.summary.inductor, state.parts.material
    assert ind is not None
    bsat = b_sat_hot_t(mat, temp.hot_c)
    sat = float(K.powder_saturation_t(bsat, state.cat.shop.powder_saturation_fraction,
                                      K.powder_ceiling_t(mat.mu_initial, *mat.bias_fit())))
    b, limit = s.b_peak_max_t, s.flux_limit.value_t
    left = ""
    if ind.inductance_at_peak_h is not None and ind.inductance_zero_bias_h > 0:
        left = f" ({ind.inductance_at_peak_h / ind.inductance_zero_bias_h:.0%} of the permeability left)"
    at = f"B_pk {tesla(b)} at the peak current {ind.current_peak_a:.3g} A{left}"
    if b > sat * 1.0005:
        return [Check("fail", "saturation",
                      f"{at} is past {tesla(sat)}, where {mat.id} counts as saturated ({s.flux_limit.basis}): "
                      f"a larger core, more turns on it, or a powder that rolls off less")]
    if b > limit * 1.0005:
        return [Check("warn", "saturation", f"{at} is above the {tesla(limit)} limit ({s.flux_limit.basis})")]
    return [Check("pass", "saturation", f"{at}, limit {tesla(min(limit, sat))}; B_sat at {temp.hot_c:.0f} °C "
                                        f"is {tesla(bsat)}")]


class InductorKind:
    name = "inductor"

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> InductorRun:
        return InductorRun(spec, cat, parts)

    def flux_checks(self, state: DesignState) -> list[Check]:
        """Saturation at the over-current peak: fail above B_sat, warn above the working limit (a powder:
        ``powder_flux_checks``)."""
        s, temp, ind = state.summary, state.temp, state.summary.inductor
        assert ind is not None
        if state.parts.material.is_powder:
            return powder_flux_checks(state)
        bsat = b_sat_hot_t(state.parts.material, temp.hot_c)
        limit = s.flux_limit.value_t
        b = s.b_peak_max_t
        if b > bsat:
            # N = L I_pk / (B_limit Ae), plus one for the gap rounded down to the shop's step
            need = math.ceil(ind.inductance_h * ind.current_peak_a / (limit * state.parts.ae_m2) - 1e-9) + 1
            return [Check("fail", "saturation",
                          f"B_pk {tesla(b)} at the peak current {ind.current_peak_a:.3g} A exceeds "
                          f"B_sat {tesla(bsat)} at {temp.hot_c:.0f} °C: use more turns with a larger gap, about "
                          f"{need} turns (or let specgen choose them), or a core with more Ae")]
        if b > limit * 1.0005:
            return [Check("warn", "saturation",
                          f"B_pk {tesla(b)} at the peak current is above the {tesla(limit)} working "
                          f"limit ({s.flux_limit.basis}) though below B_sat {tesla(bsat)}")]
        return [Check("pass", "saturation",
                      f"B_pk {tesla(b)} at the peak current {ind.current_peak_a:.3g} A, limit "
                      f"{tesla(limit)}; B_sat at {temp.hot_c:.0f} °C is {tesla(bsat)}")]

    def test_limits(self, state: DesignState) -> KindTests:
        """A choke: inductance small-signal and at its rated DC current (the defining figure), at the peak
        current where the spec states a minimum, and the AL of the gapped set. An AC reactor: the voltage
        across it at its rated current and frequency (its steel's permeability at a low level does not check
        the design's figure)."""
        inductor, spec, ae = state.summary.inductor, state.spec, state.parts.ae_m2
        assert inductor is not None and spec.inductor is not None
        w = state.windings[0]
        t = state.cat.shop.tolerances["inductance"]
        pins = f"pins {w.start}-{w.finish}"
        ind: list[Limit] = []
        if spec.inductor.voltage_drop_v is not None:
            amps = spec.inductor.current_dc_a          # an AC reactor's rated current, rms
            v = 2.0 * math.pi * spec.frequency_hz * inductor.inductance_h * amps
            ind.append(Limit(name=f"voltage across at {amps:g} A", item=w.name, nominal=v, low=v * (1 - t),
                             high=v * (1 + t), unit="V", pins=pins,
                             setting=ts.supply_setting(spec.frequency_hz, amps=amps),
                             condition=f"L = V / (2π f I) = {si(inductor.inductance_h, 'H', 3)}"))
            return KindTests(inductance=tuple(ind))
        gapped = bool(inductor.gap_m)
        small = ts.lcr_setting(w.turns, ae, spec.frequency_hz, gapped=gapped)
        l0 = inductor.inductance_zero_bias_h
        ind.append(Limit(name="inductance, no bias", item=w.name, nominal=l0, low=l0 * (1 - t), high=l0 * (1 + t),
                         unit="H", pins=pins, setting=small, condition="no DC current"))
        if inductor.current_dc_a > 0:
            lb = inductor.inductance_at_full_bias_h
            ind.append(Limit(name=f"inductance at {inductor.current_dc_a:g} A DC", item=w.name, nominal=lb,
                             low=lb * (1 - t), high=None, unit="H", pins=pins,
                             setting=ts.lcr_setting(w.turns, ae, spec.frequency_hz, bias_a=inductor.current_dc_a,
                                                           gapped=gapped),
                             condition="the rated DC current from the bias source"))
        if inductor.inductance_min_h is not None and inductor.inductance_at_peak_h is not None:
            ind.append(Limit(name=f"inductance at {inductor.current_peak_a:.3g} A DC", item=w.name,
                             nominal=inductor.inductance_at_peak_h, low=inductor.inductance_min_h, high=None, unit="H",
                             pins=pins, condition="the peak current (the spec's minimum)",
                             setting=ts.lcr_setting(w.turns, ae, spec.frequency_hz, bias_a=inductor.current_peak_a,
                                                           gapped=gapped)))
        if inductor.gap_m:
            al = inductor.al_nh * 1e-9
            ind.append(Limit(name="AL of the gapped set", item=w.name, nominal=al, low=al * (1 - t),
                             high=al * (1 + t), unit="H", pins="a 10-turn test coil on the gapped set",
                             setting=ts.lcr_setting(10, ae, spec.frequency_hz, gapped=True),
                             condition="per turn squared (L / 100); check the set before winding"))
        return KindTests(inductance=tuple(ind))
