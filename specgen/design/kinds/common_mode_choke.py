"""Common-mode chokes: every line of a supply on one ungapped high-permeability toroid, each on its own sector.

Turns from A_L: A_L = mu0 mu(f) A_e / l_e (the magnetic circuit of an ungapped ring, IEC 60205 A_e and l_e),
mu(f) the material's small-signal permeability at the frequency the common-mode inductance is stated at (its
``permeability_vs_frequency`` table, else mu_initial: a common-mode choke works at small flux). The turns are
the fewest whole turns whose inductance less the shop's inductance tolerance still reaches the minimum asked,
so a part at the low test limit meets it. The lines are wound in the same sense on sectors a stated clear
distance apart (``design.sectors``), so the line currents' ampere-turns cancel in the core and only the
current common to all lines (to ground) sees N^2 A_L.

Flux, both against the hot saturation limit:
- common mode: the line-to-ground voltage drives a current to ground through the capacitance after the choke
  (I = 2 pi f C V at the line frequency, or the leakage current given, or the protective-conductor current
  ceiling of class I equipment); B_cm = L_CM(f_line) I_pk / (N A_e);
- differential mode: each line's leakage inductance (``physics.common_mode.sector_leakage_inductance_h``: the
  sector as an open rod after Nave's model, Osborn's demagnetising factor) at the peak line current,
  B_dm = L_leak I_pk / (N A_e), all of the leakage flux taken through the core section (conservative).

Copper loss from the line current in each line (Dowell per sector at the line frequency), core loss by
Steinmetz at the line frequency and the summed flux, the temperature by the pipeline's loop. No gap on a
toroid, ever: the spec refuses one.
"""

from __future__ import annotations

import math

from ...catalog.models import Catalog, Material
from ...physics import common_mode as cm
from ...physics import faraday
from ...physics import gap as gapmod
from ...present import frequency as _freq
from ...present import si, tesla
from ...records import record
from .. import kernel as K
from .. import test_setup as ts
from ..build import copper_lengths_m, section_frs, winding_fr
from ..cmc_result import CommonModeChokeResult
from ..cmc_spec import DEFAULT_LEAKAGE_CURRENT_A, CommonModeChokeReq
from ..flux import flux_limit, saturation_checks
from ..resolve import spec_error
from ..result import Check, Limit, TestSetting
from ..sectors import lay_out_sectors
from ..spec import Spec
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

LEAKAGE_METHOD = ("sector as an open rod core (Nave 1991), demagnetising factor of a prolate spheroid (Osborn "
                  "1945): an estimate, measure the first piece")
LEAKAGE_BAND = (0.5, 2.0)     # the estimate is good to about a factor of two: the L_DM test band (common practice)


def mu_at(material: Material, freq_hz: float) -> tuple[float, str]:
    """(mu, where it came from): the material's small-signal permeability at a frequency (table, else mu_i)."""
    if material.permeability_table:
        fs, mus = zip(*material.permeability_table)
        return cm.permeability_at_frequency(freq_hz, fs, mus), "table"
    return material.mu_initial, "mu_initial"


def al_at_h(material: Material, freq_hz: float, ae_m2: float, le_m: float) -> tuple[float, float, str]:
    """(A_L [H], mu, where mu came from) of the ungapped ring at a frequency: A_L = mu0 mu A_e / l_e."""
    mu, source = mu_at(material, freq_hz)
    return float(faraday.magnetizing_inductance_h(1, ae_m2, le_m, mu)), mu, source


def turns_for_inductance(l_min_h: float, al_h: float, tolerance: float) -> int:
    """The fewest whole turns whose N^2 A_L, less the tolerance, still reaches ``l_min_h``."""
    n = max(1, math.ceil(math.sqrt(l_min_h / (al_h * (1.0 - tolerance))) - 1e-9))
    return n


@record(slots=True)
class CmcPass:
    """A common-mode choke's figures at one pass."""
    leakage_h: float
    l_cm_line_h: float          # at the line frequency (the common-mode flux's inductance)
    i_cm_a: float
    b_cm_t: float
    b_dm_rated_t: float
    b_dm_peak_t: float


class CommonModeChokeRun:
    def __init__(self, spec: Spec, cat: Catalog, parts: Parts) -> None:
        assert spec.common_mode_choke is not None
        if parts.former.kind != "toroid":
            raise spec_error(spec, f"{parts.core.id} is not a toroid: a common-mode choke is wound on an ungapped "
                                   f"toroid here", "core", "id")
        self.spec, self.cat, self.parts = spec, cat, parts
        self.req: CommonModeChokeReq = spec.common_mode_choke
        mat = parts.material
        self.al_h, self.mu, self.mu_source = al_at_h(mat, self.req.inductance_frequency_hz, parts.ae_m2, parts.le_m)
        self.tolerance = cat.shop.tolerances["inductance"]
        self.turns = turns_for_inductance(self.req.inductance_cm_h, self.al_h, self.tolerance)
        density = K.current_density_a_m2(cat.shop.current_density_a_m2, spec.cooling)
        first = spec.windings[0]
        if first.wire.startswith("auto"):
            choice = choose_wire(cat, self.req.line_current_a, density, spec.frequency_hz, K.WIRE_CHOICE_TEMP_C,
                                 first.wire, first.strands, spec.insulation_class_c)
        else:
            choice = WireChoice(cat.wires[first.wire], first.strands or 1, "given")
        self.wire = choice

    def states(self) -> dict[str, WindingState]:
        c = self.wire
        return {w.name: WindingState(w, i, c.wire, c.strands, self.turns, self.req.line_current_a, c.reason)
                for i, w in enumerate(self.spec.windings)}

    def _frs(self, built: BuiltWindow, states: dict[str, WindingState], hot_c: float) -> dict[tuple[str, int], float]:
        """Dowell per sector: each sector's MMF starts at zero on the core (a window of its own)."""
        out: dict[tuple[str, int], float] = {}
        for s in built.sections:
            one = BuiltWindow((s,), built.height_m, True, "")
            out.update(section_frs(one, states, self.spec.frequency_hz, hot_c, "sine", {}))
        return out

    def evaluate(self, temp: ThermalState) -> Evaluation[CmcPass]:
        spec, parts, req, mat = self.spec, self.parts, self.req, self.parts.material
        states = self.states()
        built = lay_out_sectors(spec, parts, states, self.cat, req.sector_gap_m)
        frs = self._frs(built, states, temp.hot_c) if built.ok else {}
        lengths = copper_lengths_m(built, self.cat.shop.lead_length_m)
        copper = 0.0
        for name, st in states.items():
            r_hot = float(K.dc_resistance_ohm(st.wire.copper_area_m2 * st.strands, lengths.get(name, 0.0),
                                              temp.hot_c, st.wire.conductor))
            copper += float(K.copper_loss_w(r_hot, winding_fr(built, frs, name), st.current_a))
        angle = built.sectors.winding_angle_rad if built.sectors else 2.0 * math.pi / req.lines
        f_line = spec.frequency_hz
        al_line, mu_line, _ = al_at_h(mat, f_line, parts.ae_m2, parts.le_m)
        leak = float(cm.sector_leakage_inductance_h(self.turns, mu_line, parts.ae_m2, parts.le_m, angle))
        l_cm_line = al_line * self.turns ** 2
        i_cm = self.common_mode_current_a()
        b_cm = float(gapmod.b_peak_from_inductance_t(l_cm_line, math.sqrt(2.0) * i_cm, self.turns, parts.ae_m2))
        b_dm = float(gapmod.b_peak_from_inductance_t(leak, math.sqrt(2.0) * req.line_current_a, self.turns,
                                                     parts.ae_m2))
        b_dm_pk = float(gapmod.b_peak_from_inductance_t(leak, req.current_dm_peak_a, self.turns, parts.ae_m2))
        pv = float(K.core_loss_w_m3("sine", f_line, b_cm + b_dm, 0.5, mat.steinmetz_k, mat.steinmetz_alpha,
                                    mat.steinmetz_beta)) * temp.core_factor
        return Evaluation(states, built, frs, copper, pv * parts.ve_m3, pv, CmcPass(leak, l_cm_line, i_cm, b_cm, b_dm,
                                                                                   b_dm_pk))

    def common_mode_current_a(self) -> float:
        """The rms current to ground at the line frequency: given, from the capacitance, or the default ceiling."""
        req = self.req
        if req.leakage_current_a is not None:
            return req.leakage_current_a
        if req.ground_capacitance_f is not None:
            return float(cm.common_mode_current_a(req.line_to_ground_v, self.spec.frequencies_hz[-1]
                                                  if self.spec.frequencies_hz else self.spec.frequency_hz,
                                                  req.ground_capacitance_f))
        return DEFAULT_LEAKAGE_CURRENT_A

    def _current_basis(self) -> str:
        req = self.req
        if req.leakage_current_a is not None:
            return "the leakage current given"
        if req.ground_capacitance_f is not None:
            return (f"{req.line_to_ground_v:g} V line to ground through {req.ground_capacitance_f * 1e9:.3g} nF "
                    f"at the highest line frequency")
        return (f"{DEFAULT_LEAKAGE_CURRENT_A * 1e3:g} mA, the protective-conductor current ceiling of class I "
                f"equipment (no ground capacitance given)")

    # -- the KindRun protocol
    def first(self, temp: ThermalState) -> tuple[Evaluation[CmcPass], int]:
        return self.evaluate(temp), 0

    def again(self, previous: Evaluation[CmcPass], temp: ThermalState) -> Evaluation[CmcPass]:
        return self.evaluate(temp)

    def summary(self, ev: Evaluation[CmcPass], temp: ThermalState) -> ElectricalSummary:
        req, d, parts = self.req, ev.detail, self.parts
        sectors = ev.built.sectors
        result = CommonModeChokeResult(
            lines=req.lines, turns=self.turns, line_current_a=req.line_current_a,
            line_frequency_hz=self.spec.frequency_hz, line_voltage_v=req.line_voltage_v,
            line_to_ground_v=req.line_to_ground_v, inductance_frequency_hz=req.inductance_frequency_hz,
            mu_at_frequency=self.mu, mu_source=self.mu_source,
            mu_at_line_frequency=mu_at(parts.material, self.spec.frequency_hz)[0], al_h=self.al_h,
            inductance_cm_h=self.al_h * self.turns ** 2, inductance_cm_min_h=req.inductance_cm_h,
            leakage_inductance_h=d.leakage_h, inductance_dm_min_h=req.inductance_dm_min_h,
            leakage_method=LEAKAGE_METHOD, common_mode_current_a=d.i_cm_a,
            common_mode_current_basis=self._current_basis(), b_cm_peak_t=d.b_cm_t, b_dm_peak_t=d.b_dm_peak_t,
            current_dm_peak_a=req.current_dm_peak_a,
            winding_angle_deg=math.degrees(sectors.winding_angle_rad) if sectors else 0.0,
            gap_angle_deg=math.degrees(sectors.gap_angle_rad) if sectors else 0.0,
            sector_gap_m=sectors.gap_m if sectors else 0.0, sector_gap_asked_m=req.sector_gap_m)
        return ElectricalSummary(
            b_peak_t=d.b_cm_t + d.b_dm_rated_t, b_peak_max_t=d.b_cm_t + d.b_dm_peak_t,
            flux_limit=flux_limit(self.spec, self.cat, parts.material, temp.hot_c),
            h_peak_a_m=float(faraday.h_field_a_m(self.turns, math.sqrt(2.0) * d.i_cm_a, parts.le_m)),
            magnetizing_inductance_h=result.inductance_cm_h, leakage_inductance_h=d.leakage_h,
            checks=tuple(_own_checks(result)), common_mode_choke=result)


def _own_checks(c: CommonModeChokeResult) -> list[Check]:
    out: list[Check] = []
    at = _freq(c.inductance_frequency_hz)
    mu_word = "its permeability table" if c.mu_source == "table" else "mu_initial (no permeability table on file)"
    out.append(Check("pass", "cm-inductance",
                     f"L_CM {si(c.inductance_cm_h, 'H', 3)} at {at} ({c.turns} turns x A_L {si(c.al_h, 'H', 3)}, mu "
                     f"{c.mu_at_frequency:.0f} from {mu_word}); the minimum {si(c.inductance_cm_min_h, 'H', 3)} "
                     f"holds at the low test limit"))
    said = (f"leakage (differential-mode) inductance {si(c.leakage_inductance_h, 'H', 3)} per line, "
            f"{c.leakage_inductance_h / c.inductance_cm_h * 100:.2g} % of L_CM ({LEAKAGE_METHOD})")
    if c.inductance_dm_min_h is not None and c.leakage_inductance_h < c.inductance_dm_min_h:
        out.append(Check("fail", "dm-inductance", f"{said}: below the {si(c.inductance_dm_min_h, 'H', 3)} asked; more "
                                                  f"turns, a smaller winding angle (a wider sector gap) or a separate "
                                                  f"differential-mode choke"))
    else:
        out.append(Check("pass", "dm-inductance", said))
    if c.sector_gap_m + 1e-9 < c.sector_gap_asked_m:
        out.append(Check("fail", "sector-gap", f"the sectors are {c.sector_gap_m * 1e3:.2f} mm apart at the bore, "
                                               f"less than the {c.sector_gap_asked_m * 1e3:g} mm asked"))
    return out


class CommonModeChokeKind:
    name = "common_mode_choke"

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> CommonModeChokeRun:
        return CommonModeChokeRun(spec, cat, parts)

    def flux_checks(self, state: DesignState) -> list[Check]:
        """The summed common- and differential-mode flux at the peak line current against the hot B_sat."""
        s = state.summary
        c = s.common_mode_choke
        assert c is not None
        said = (f"B_pk {tesla(s.b_peak_max_t)} = common mode {tesla(c.b_cm_peak_t)} "
                f"({c.common_mode_current_a * 1e3:.3g} mA to ground: {c.common_mode_current_basis}) + differential "
                f"mode {tesla(c.b_dm_peak_t)} (the leakage at {c.current_dm_peak_a:.3g} A peak)")
        return saturation_checks(state, said, s.b_peak_max_t, "fewer turns on a larger core, or a separate "
                                                               "differential-mode choke", limit_in_pass=False)

    def test_limits(self, state: DesignState) -> KindTests:
        """L_CM with the lines in parallel, L_DM in series opposition, and the same-sense polarity check."""
        c = state.summary.common_mode_choke
        assert c is not None
        t_l = state.cat.shop.tolerances["inductance"]
        lines = [w for w in state.windings]
        starts = " + ".join(w.start for w in lines)
        finishes = " + ".join(w.finish for w in lines)
        at = _freq(c.inductance_frequency_hz)
        # L_CM is stated at its frequency (the ferrite's permeability falls with frequency): read there, small-signal
        setting = TestSetting(instrument=ts.LCR, frequency_hz=c.inductance_frequency_hz,
                              level_v=ts.small_signal_level_v(lines[0].turns, state.parts.ae_m2, c.inductance_frequency_hz))
        lcm = c.inductance_cm_h
        ind = [Limit(name="common-mode inductance L_CM", item="lines in parallel", nominal=lcm, low=lcm * (1 - t_l),
                     high=lcm * (1 + t_l), unit="H", setting=setting,
                     pins=f"starts {starts} joined, finishes {finishes} joined; between the two joints",
                     condition=f"the figure stated at {at}", heading="L_CM, lines in parallel")]
        a, b = lines[0], lines[1]
        ldm = 2.0 * c.leakage_inductance_h
        low = ldm * LEAKAGE_BAND[0]
        if c.inductance_dm_min_h is not None:
            low = max(low, 2.0 * c.inductance_dm_min_h)
        ind.append(Limit(name="differential-mode inductance (2 x L_DM)", item=f"{a.name} against {b.name}", nominal=ldm,
                         low=low, high=ldm * LEAKAGE_BAND[1], unit="H", setting=setting,
                         pins=f"finishes {a.finish} and {b.finish} joined; {a.start} to {b.start}",
                         condition=("the third line open; " if len(lines) > 2 else "")
                                   + "the line currents oppose, so only the leakage of the two lines is read",
                         heading=f"2 × L_DM, {a.name} and {b.name} opposed"))
        polarity = (f"SAME SENSE: every line is wound in the same direction, each start ({starts}) on the same side "
                    f"of its sector, all dotted. Check: join {a.finish} to {b.start} (lines in series, aiding) and "
                    f"measure {a.start} to {b.finish}: about 4 x L_CM ({si(4 * lcm, 'H', 3)}). A reading near "
                    f"2 x L_DM ({si(ldm, 'H', 3)}) means one line is wound backwards: reject the part.",)
        return KindTests(inductance=tuple(ind), polarity=polarity)
