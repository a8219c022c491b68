"""The Design: every derived number of one part, and its checks. Documents read this; nothing recomputes.

All values SI floats (temperatures degC). ``Design.to_dict()`` is the stable JSON of ``specgen design --json``.
"""

from __future__ import annotations

from dataclasses import asdict
from typing import Any

from ..records import record
from .acceptance import AcceptedWarning
from .cmc_result import CommonModeChokeResult, cmc_dict
from .vocab import CheckLevel
from .windings_result import ConnectionResult, LoadResult, ResetResult, TapResult, extend_dict


@record
class Check:
    level: CheckLevel   # pass | warn | fail
    code: str        # stable identifier, e.g. 'saturation', 'fit'
    message: str     # one plain sentence a shop engineer acts on


@record
class Layer:
    index: int                 # 1-based within its section
    turns: int
    build_to_centre_m: float   # from the tube (or the toroid's inner face) to the layer's centre line
    mlt_m: float               # mean length of one turn of this layer
    length_m: float            # turns x mlt
    turns_capacity: int        # how many turns this layer holds (the last may be partial)


@record
class Section:
    winding: str
    index: int                 # 1..sections of its winding
    order: int                 # 1-based place in the build
    turns: int
    turns_per_layer: int       # capacity of the first layer
    layers: tuple[Layer, ...]
    margin_m: float            # creepage margin each side
    usable_breadth_m: float
    start_build_m: float
    end_build_m: float         # after the last wire layer (before the tape that follows)
    tape_after: str | None     # tape id wrapped after this section
    tape_after_layers: int
    start_pin: str
    finish_pin: str
    fr: float                  # AC resistance factor of this section (Dowell, at its MMF position)
    layer_tape: str | None = None    # tape between the layers of this section
    layer_tape_layers: int = 0
    margin_tape: str | None = None   # built up in the margins each side
    wound_with: str | None = None    # bifilar: the winding laid turn by turn in the same layers
    chamber: int = 0                 # split bobbin: the chamber it is wound in, 1 at the start flange (0: one)


@record
class WindingResult:
    name: str
    role: str
    turns: int
    voltage_v: float | None          # at full load (secondary) or nominal (primary)
    voltage_max_v: float | None
    open_circuit_v: float | None     # secondary at nominal primary, no load
    current_a: float                 # rms at full load
    wire: str                        # catalogue id
    wire_label: str
    wire_kind: str
    strands: int                     # in hand
    copper_area_m2: float            # all strands
    overall_diameter_m: float
    layers: int
    turns_per_layer: int
    length_m: float                  # including leads
    mass_kg: float
    dcr_20c_ohm: float
    dcr_hot_ohm: float
    current_density_a_m2: float
    fr: float                        # Rac/Rdc of the whole winding
    copper_loss_w: float
    start: str
    finish: str
    direction: str
    sections: tuple[Section, ...]
    margin_m: float
    lead_sleeving: str | None
    thermal_class_c: int
    dot_pin: str                     # the terminal marked with the polarity dot
    # an output winding (secondary, auxiliary): the voltage asked, its tolerance (minus, plus fractions) and the
    # error of the full-load voltage (``voltage_v``) against it; None for other windings
    voltage_asked_v: float | None = None
    voltage_tolerance: tuple[float, float] | None = None
    voltage_error_pct: float | None = None


@record
class CoreResult:
    id: str
    shape: str
    material: str
    material_name: str
    ae_m2: float
    le_m: float
    ve_m3: float
    wa_m2: float
    amin_m2: float
    mass_kg: float
    stack_m: float | None
    count: int
    laminations: int | None          # EI: E+I pairs per unit
    bobbin: str | None
    b_sat_hot_t: float
    b_r_t: float
    h_c_a_m: float
    mu_initial: float
    effective_parameters_from: str              # 'IEC 60205 from dimensions' or 'measured (catalogue override)'
    window_breadth_m: float
    window_height_m: float
    surface_area_m2: float


@record
class Build:
    height_m: float                  # sum of layers, tapes and wraps
    bulged_height_m: float           # x the shop's bulge factor
    available_m: float               # bobbin build height (toroid: the inner radius less the minimum hole)
    ku: float                        # sum(N * A_cu) / W_a
    fits: bool
    fill_fraction: float             # bulged height / available
    hole_m: float | None             # toroid: hole left for the shuttle


@record
class Losses:
    copper_w: float
    core_w: float
    total_w: float
    core_loss_density_w_m3: float


@record
class HipotTest:
    between: str                     # "P - S1+S2", "all windings - core"
    a: str
    b: str
    rating: str
    working_voltage_v: float
    type_voltage_v: float            # a.c. rms for type_duration
    type_duration_s: float
    routine_voltage_v: float         # production: routine_factor x type voltage for routine_duration
    routine_duration_s: float
    trip_current_a: float
    basis: str
    connection: str = ""             # the pins to short together and where to apply the voltage


@record
class BarrierResult:
    """One insulation barrier coordinated (IEC 60664-1) and compared with what the build provides.

    Required figures are None for functional insulation (no safety requirement); available figures are None
    where the barrier has no such path (a toroid's core wrap has laps, not margins) or the catalogue lacks it.
    """
    between: tuple[str, str]
    grade: str
    working_voltage_v: float         # rms
    peak_voltage_v: float
    mains_connected: bool
    clearance_required_mm: float | None
    clearance_available_mm: float | None
    creepage_required_mm: float | None
    creepage_available_mm: float | None
    solid_required: str
    solid_provided: str
    ok: bool
    path: str                        # where the available distances were measured
    message: str                     # the one sentence the check carries
    type_test_v: float               # hipot for this grade, rounded up to the test set's step
    routine_test_v: float
    hipot_rule: str
    rows: str                        # the table rows the requirements came from
    checked: bool = True             # False: the catalogue lacks a figure the check needs (a warning)
    lead_exit_mm: float | None = None  # toroid: the leads of the two sides leave this far apart round the core
    lead_exit_opposite: bool = False   # toroid: ... on opposite sides of the ring (no spacing in the spec)


@record
class InsulationResult:
    standard: str
    overvoltage_category: str        # I..IV
    pollution_degree: int
    material_group: str
    altitude_m: float
    mains_v: float
    impulse_v: float                 # rated impulse voltage from the mains and the category
    barriers: tuple[BarrierResult, ...]
    note: str                        # verify against the standard; the applicable standard decides

    def to_dict(self) -> dict[str, Any]:
        return {
            "basis": {"standard": self.standard, "overvoltage_category": self.overvoltage_category,
                      "pollution_degree": self.pollution_degree, "material_group": self.material_group,
                      "altitude_m": self.altitude_m},
            "barriers": [{
                "between": list(b.between), "grade": b.grade, "working_voltage_v": b.working_voltage_v,
                "peak_voltage_v": b.peak_voltage_v, "clearance_required_mm": b.clearance_required_mm,
                "clearance_available_mm": b.clearance_available_mm, "creepage_required_mm": b.creepage_required_mm,
                "creepage_available_mm": b.creepage_available_mm, "solid_required": b.solid_required,
                "solid_provided": b.solid_provided, "ok": b.ok,
            } for b in self.barriers],
        }


@record
class TestSetting:
    """How the station's instrument is set for one test (``design/test_setup.py`` chooses it)."""
    instrument: str                  # "DC resistance bridge", "LCR meter", "turns-ratio tester", ...
    frequency_hz: float | None = None
    level_v: float | None = None     # a.c. drive, rms
    level_a: float | None = None     # a.c. current drive, rms (a reactor, a current transformer)
    bias_a: float | None = None      # DC bias current through the winding
    four_wire: bool = False          # Kelvin leads (a resistance below 1 ohm)


@record
class Limit:
    name: str                        # what is measured
    item: str                        # winding or pair
    nominal: float
    low: float | None
    high: float | None
    unit: str                        # SI unit of nominal/low/high ('ohm', 'V', 'H', ':1', 'A', 'W')
    condition: str                   # the whole instruction: pins, instrument setting, then the kind's note
    pins: str = ""                   # which pins: "pins 1-2", "P 1-2 driven, S1 7-8 read"
    setting: TestSetting | None = None
    heading: str = ""                # the record's column heading where "name item" reads badly (blank: those)


@record
class TestPlan:
    dcr: tuple[Limit, ...]           # at 20 degC
    ratio: tuple[Limit, ...]         # Np/Ns
    open_circuit: tuple[Limit, ...]  # V at nominal primary
    inductance: tuple[Limit, ...]
    polarity: tuple[str, ...]        # sentences
    hipot: tuple[HipotTest, ...]
    insulation_resistance_v: float
    insulation_resistance_min_ohm: float
    alpha_per_k: float               # for correcting a DCR reading to 20 degC
    cautions: tuple[str, ...] = ()   # the kind's own safety cautions (an open CT secondary), on order and sheet
    no_load: tuple[Limit, ...] = ()  # a mains transformer at rated voltage: no-load current and loss


@record
class MaterialLine:
    kind: str                        # core | laminations | bobbin | clip | wire | tape | sleeving | varnish
    id: str
    description: str
    quantity: float                  # per unit, in `unit`
    unit: str                        # 'pcs' | 'm' | 'kg' | 'm2' | 'l'
    mass_kg: float | None            # per unit where it matters (wire, laminations)
    note: str = ""


@record
class InductorResult:
    inductance_h: float              # as built, at the rated current (powder: at full bias)
    inductance_zero_bias_h: float
    inductance_at_full_bias_h: float
    target_h: float
    gap_m: float | None
    gap_arrangement: str             # centre | spacer | none
    spacer_m: float | None           # spacer thickness (each of the outer and centre legs)
    grind_m: float | None            # centre-leg grind depth (one half ground)
    fringing_factor: float
    al_nh: float
    energy_j: float
    h_dc_a_m: float
    bias_drop_pct: float               # % of initial permeability lost at full DC current
    current_dc_a: float
    current_peak_a: float
    ripple_a: float
    delta_b_t: float
    b_dc_t: float
    inductance_at_peak_h: float | None = None   # small-signal (incremental) L at the peak current
    inductance_min_h: float | None = None       # the spec's minimum at the peak current, if it states one

    @property
    def carries_dc(self) -> bool:
        """A DC choke (a DC bias with a ripple on it), not an AC reactor. An AC reactor carries the whole sine:
        its ``current_dc_a`` is then the rms, ``ripple_a`` the sine's peak-to-peak current and ``delta_b_t``
        the peak-to-peak flux over a cycle (twice the peak), none of them a ripple."""
        return self.b_dc_t > 0.0


@record(slots=True)
class TapeWrap:
    """One tape as wound on a section: the catalogue's tape and the radial build it adds."""
    id: str
    name: str
    thickness_m: float
    width_m: float
    layers: int                      # wraps laid
    lap_factor: float                # radial build of one wrap / thickness (2 on a toroid: half-lapped)
    build_m: float                   # thickness x layers x lap_factor, as the build counted it
    widths: int = 1                  # 2: each layer two widths side by side, one against each flange
    overlap_m: float | None = None   # two widths: how far the second overlaps the first (2 w - breadth)


@record(slots=True)
class SectionTapes:
    """The tapes of one section and the height of its layers, in build order (for drawings and steps)."""
    winding: str
    index: int                       # section index within its winding
    order: int                       # 1-based place in the build
    layer_height_m: float            # radial height of one wire layer
    between_layers: TapeWrap | None  # tape between this section's layers (None with one layer)
    after: TapeWrap | None           # tape wrapped after the section (the outer wrap after the last)
    barrier: str = ""                # the tape after is a safety barrier of this grade (flange to flange)


@record(slots=True)
class CoreOutline:
    """The few core dimensions a drawing needs, in metres (toroid: the bare ring and its coating)."""
    shape: str
    inner_diameter_m: float | None   # toroid
    outer_diameter_m: float | None   # toroid
    height_m: float | None           # toroid: the ring (or stack) height
    coating_m: float                 # toroid: coating or core-box wall on each face
    winding_breadth_m: float         # bobbin: between the flanges (split: chambers and dividers); toroid: ring height
    coating_voltage_v: float | None = None   # toroid: the coating's rated voltage (None: not rated on file)
    chambers: tuple[float, ...] = ()  # split bobbin: each chamber's breadth, start flange first
    divider_m: float = 0.0           # split bobbin: the divider wall's thickness (0: not on file)
    divider_height_m: float = 0.0    # split bobbin: the divider wall's height above the tube (as drawn)


@record(slots=True)
class PinLayout:
    """Where the windings end: a bobbin's pins as the catalogue lists them, or a toroid's free leads."""
    bobbin: str | None
    pins: tuple[str, ...]            # pin names in order (free leads: in the order the sections name them)
    rows: int                        # 1 or 2 (pins split between the two sides)
    pitch_m: float | None            # None for free leads
    free_leads: bool                 # True: no bobbin, the leads leave the winding


@record(slots=True)
class VarnishCure:
    """The impregnating varnish and its cure, as the catalogue gives them."""
    id: str
    name: str
    thermal_class_c: int
    cure_temperature_c: float
    cure_time_s: float


@record(slots=True)
class HistoryEntry:
    """One release line of the spec's history."""
    revision: str
    date: str
    by: str
    note: str
    fingerprint: str                 # '' when the entry records none
    accepted: tuple[AcceptedWarning, ...] = ()   # design warnings accepted by name at this release
    supersedes: str = ""             # the revision this release superseded ('' for a first release)
    effective: str = ""              # when it took over: next-order | now | lot <reference> ('' if not recorded)
    open_orders: tuple[str, ...] | None = None   # the superseded revision's open work orders (None: not looked)


@record(slots=True)
class FloorData:
    """What the documents show beyond the electrical figures: tapes, outline, pins, varnish."""
    sections: tuple[SectionTapes, ...]   # in build order
    outline: CoreOutline
    pins: PinLayout
    varnish: VarnishCure | None
    core_wrap: TapeWrap | None = None   # toroid: the tape wrapped on the bare core before the first winding

    def section(self, winding: str, index: int) -> SectionTapes:
        for s in self.sections:
            if s.winding == winding and s.index == index:
                return s
        raise KeyError((winding, index))


@record
class CurrentTransformerResult:
    """A current transformer's own figures (kind: current_transformer)."""
    primary_current_a: float         # rated, rms
    primary_current_max_a: float
    primary_turns: int
    secondary_turns: int
    turns_ratio: float               # N_s / N_p
    secondary_current_a: float       # at the rated primary current (ideal, I_p / n)
    burden_ohm: float
    winding_resistance_ohm: float    # secondary, hot
    secondary_voltage_v: float       # at the rated primary current
    magnetizing_inductance_h: float  # secondary side
    magnetizing_current_a: float     # at the rated primary current
    core_loss_current_a: float
    ratio_error_pct: float
    phase_error_deg: float
    ratio_error_max_pct: float       # at the top of the primary range
    phase_error_max_deg: float
    knee_burden_ohm: float           # largest burden before B_sat (hot) at the top of the range
    current_shape: str


@record
class FlybackWinding:
    """One flyback winding's currents at the lowest input and full load."""
    name: str
    turns: int
    peak_current_a: float
    rms_current_a: float
    dc_current_a: float              # the primary: its average input current; an output: its load current
    output_voltage_v: float | None   # an output's voltage from whole turns (None for the primary)


@record
class FlybackResult:
    """A flyback's own figures (kind: flyback)."""
    mode: str                        # dcm | ccm at the lowest input, full load
    mode_at_high_line: str
    inductance_h: float              # L_p as built
    gap_m: float
    duty_max: float                  # at the lowest input
    duty_min: float                  # at the highest input
    reflected_voltage_v: float       # from whole turns
    input_power_w: float
    output_power_w: float
    efficiency_estimate: float
    b_peak_t: float                  # worst line, full load
    delta_b_t: float
    leakage_inductance_h: float      # referred to the primary, secondaries shorted
    clamp_energy_j: float            # 1/2 L_lk I_pk^2 per cycle
    clamp_power_w: float             # that energy x f (an RCD clamp dissipates more: x V_c / (V_c - V_R))
    switch_voltage_v: float          # V_in max + V_R, before the leakage spike
    windings: tuple[FlybackWinding, ...]


@record
class Design:
    part: str
    title: str
    revision: str
    status: str
    customer: str
    kind: str
    frequency_hz: float
    waveform: str
    duty: float
    ambient_c: float
    cooling: str
    insulation_class_c: int
    b_peak_t: float                  # at the primary's nominal voltage (inductor: at rated peak current)
    b_peak_max_t: float              # at the top of the primary range (inductor: at over-current)
    b_limit_t: float
    b_limit_basis: str
    b_sat_hot_t: float
    h_peak_a_m: float
    magnetizing_inductance_h: float | None
    magnetizing_current_a: float | None
    leakage_inductance_h: float | None   # referred to the primary, secondaries shorted (energy method)
    core: CoreResult
    windings: tuple[WindingResult, ...]
    build: Build
    losses: Losses
    winding_temp_c: float
    hot_spot_c: float
    temperature_rise_k: float
    efficiency: float | None
    regulation_pct: float | None
    output_power_w: float | None
    checks: tuple[Check, ...]
    tests: TestPlan
    materials: tuple[MaterialLine, ...]
    inductor: InductorResult | None
    catalog_ids: tuple[str, ...]     # every catalogue entry this design read
    iterations: int
    notes: str = ""
    history: tuple[HistoryEntry, ...] = ()
    fingerprint: str = ""
    insulation: InsulationResult | None = None
    floor: FloorData | None = None   # None only for a Design built outside the pipeline
    current_transformer: CurrentTransformerResult | None = None
    flyback: FlybackResult | None = None
    common_mode_choke: CommonModeChokeResult | None = None
    connections: tuple[ConnectionResult, ...] = ()   # several primaries: how they join, the flux of each
    loads: tuple[LoadResult, ...] = ()               # secondaries' declared loads and their rms currents
    frequencies_hz: tuple[float, ...] = ()           # several frequencies served (frequency_hz the lowest)
    taps: tuple[TapResult, ...] = ()                 # taps named by voltage, at their whole turns
    reset: ResetResult | None = None                 # a forward transformer's reset winding
    air_speed_m_s: float | None = None               # forced air: the speed the rise was found for
    rise_basis: str = ""                             # where the temperature rise comes from, in words

    @property
    def failed(self) -> list[Check]:
        return [c for c in self.checks if c.level == "fail"]

    @property
    def warnings(self) -> list[Check]:
        return [c for c in self.checks if c.level == "warn"]

    def winding(self, name: str) -> WindingResult:
        for w in self.windings:
            if w.name == name:
                return w
        raise KeyError(name)

    # long: the JSON document key by key, in the order it is read
    def to_dict(self) -> dict[str, Any]:
        """The stable JSON (``specgen design --json``); shop units appear only in key names."""
        c = self.core
        out: dict[str, Any] = {
            "part": self.part, "title": self.title, "revision": self.revision, "status": self.status,
            "customer": self.customer, "kind": self.kind, "fingerprint": self.fingerprint,
            "frequency_hz": self.frequency_hz, "waveform": self.waveform, "duty": self.duty,
            "ambient_c": self.ambient_c, "cooling": self.cooling, "insulation_class_c": self.insulation_class_c,
            "b_peak_t": self.b_peak_t, "b_peak_max_t": self.b_peak_max_t, "b_limit_t": self.b_limit_t,
            "b_limit_basis": self.b_limit_basis, "b_sat_hot_t": self.b_sat_hot_t, "h_peak_a_m": self.h_peak_a_m,
            "magnetizing_inductance_h": self.magnetizing_inductance_h,
            "magnetizing_current_a": self.magnetizing_current_a,
            "leakage_inductance_h": self.leakage_inductance_h,
            "core": {
                "id": c.id, "shape": c.shape, "material": c.material, "ae_mm2": c.ae_m2 * 1e6,
                "le_mm": c.le_m * 1e3, "ve_mm3": c.ve_m3 * 1e9, "wa_mm2": c.wa_m2 * 1e6,
                "mass_g": c.mass_kg * 1e3, "stack_mm": c.stack_m * 1e3 if c.stack_m else None,
                "count": c.count, "laminations": c.laminations, "bobbin": c.bobbin,
                "effective_parameters_from": c.effective_parameters_from, "surface_area_cm2": c.surface_area_m2 * 1e4,
            },
            "windings": [{
                "name": w.name, "role": w.role, "turns": w.turns, "voltage_v": w.voltage_v,
                "voltage_max_v": w.voltage_max_v, "open_circuit_v": w.open_circuit_v, "current_a": w.current_a,
                "wire": w.wire, "wire_label": w.wire_label, "strands": w.strands,
                "copper_area_mm2": w.copper_area_m2 * 1e6, "layers": w.layers,
                "turns_per_layer": w.turns_per_layer, "length_m": w.length_m, "mass_g": w.mass_kg * 1e3,
                "dcr_20c_ohm": w.dcr_20c_ohm, "dcr_hot_ohm": w.dcr_hot_ohm,
                "current_density_a_mm2": w.current_density_a_m2 / 1e6, "fr": w.fr,
                "copper_loss_w": w.copper_loss_w, "start": w.start, "finish": w.finish,
                "direction": w.direction, "dot_pin": w.dot_pin, "margin_mm": w.margin_m * 1e3,
                "voltage_asked_v": w.voltage_asked_v, "voltage_full_load_v": w.voltage_v if w.voltage_asked_v else None,
                "voltage_open_circuit_v": w.open_circuit_v if w.voltage_asked_v else None,
                "voltage_error_pct": w.voltage_error_pct,
                "voltage_tolerance_pct": ([-w.voltage_tolerance[0] * 100.0 or 0.0, w.voltage_tolerance[1] * 100.0]
                                          if w.voltage_tolerance else None),
                "sections": [{
                    "index": s.index, "order": s.order, "turns": s.turns, "turns_per_layer": s.turns_per_layer,
                    "layers": [{"turns": l.turns, "mlt_mm": l.mlt_m * 1e3,
                                "build_mm": l.build_to_centre_m * 1e3} for l in s.layers],
                    "start_pin": s.start_pin, "finish_pin": s.finish_pin, "fr": s.fr,
                    **({"wound_with": s.wound_with} if s.wound_with else {}),
                    **({"chamber": s.chamber} if s.chamber else {}),
                } for s in w.sections],
            } for w in self.windings],
            "build": {
                "height_mm": self.build.height_m * 1e3, "bulged_height_mm": self.build.bulged_height_m * 1e3,
                "available_mm": self.build.available_m * 1e3, "ku": self.build.ku, "fits": self.build.fits,
                "fill_fraction": self.build.fill_fraction,
                "hole_mm": self.build.hole_m * 1e3 if self.build.hole_m is not None else None,
            },
            "losses": {"copper_w": self.losses.copper_w, "core_w": self.losses.core_w,
                       "total_w": self.losses.total_w,
                       "core_loss_density_kw_m3": self.losses.core_loss_density_w_m3 / 1e3},
            "winding_temp_c": self.winding_temp_c, "hot_spot_c": self.hot_spot_c,
            "temperature_rise_k": self.temperature_rise_k, "air_speed_m_s": self.air_speed_m_s,
            "rise_basis": self.rise_basis, "efficiency": self.efficiency,
            "regulation_pct": self.regulation_pct, "output_power_w": self.output_power_w,
            "checks": [asdict(ch) for ch in self.checks],
            "tests": _tests_dict(self.tests),
            "materials": [asdict(m) for m in self.materials],
            "catalog_ids": list(self.catalog_ids),
        }
        if self.insulation is not None:
            out["insulation"] = self.insulation.to_dict()
        if self.inductor is not None:
            i = self.inductor
            out.update({
                "inductance_h": i.inductance_h, "inductance_zero_bias_h": i.inductance_zero_bias_h,
                "inductance_at_full_bias_h": i.inductance_at_full_bias_h, "target_inductance_h": i.target_h,
                "gap_mm": i.gap_m * 1e3 if i.gap_m is not None else None, "gap_arrangement": i.gap_arrangement,
                "spacer_mm": i.spacer_m * 1e3 if i.spacer_m is not None else None,
                "grind_mm": i.grind_m * 1e3 if i.grind_m is not None else None,
                "fringing_factor": i.fringing_factor, "al_nh": i.al_nh, "energy_j": i.energy_j,
                "h_dc_a_m": i.h_dc_a_m, "bias_drop_pct": i.bias_drop_pct, "current_dc_a": i.current_dc_a,
                "current_peak_a": i.current_peak_a, "ripple_a": i.ripple_a, "delta_b_t": i.delta_b_t,
                "b_dc_t": i.b_dc_t, "inductance_at_peak_h": i.inductance_at_peak_h,
                "inductance_min_h": i.inductance_min_h,
            })
        if self.current_transformer is not None:
            ct = self.current_transformer
            out.update({
                "ratio": f"{ct.primary_turns}:{ct.secondary_turns}", "turns_ratio": ct.turns_ratio,
                "primary_current_a": ct.primary_current_a, "primary_current_max_a": ct.primary_current_max_a,
                "primary_turns": ct.primary_turns, "secondary_turns": ct.secondary_turns,
                "secondary_current_a": ct.secondary_current_a, "burden_ohm": ct.burden_ohm,
                "secondary_voltage_v": ct.secondary_voltage_v, "ratio_error_pct": ct.ratio_error_pct,
                "phase_error_deg": ct.phase_error_deg, "ratio_error_max_pct": ct.ratio_error_max_pct,
                "phase_error_max_deg": ct.phase_error_max_deg, "knee_burden_ohm": ct.knee_burden_ohm,
                "core_loss_current_a": ct.core_loss_current_a, "current_shape": ct.current_shape,
            })
        extend_dict(out, self.connections, self.loads, self.frequencies_hz, self.taps, self.reset)
        if self.common_mode_choke is not None:
            out.update(cmc_dict(self.common_mode_choke))
        if self.flyback is not None:
            out.update(_flyback_dict(self.flyback))
            per = {w.name: w for w in self.flyback.windings}
            for w in out["windings"]:
                fw = per[w["name"]]
                w.update({"peak_current_a": fw.peak_current_a, "rms_current_a": fw.rms_current_a,
                          "dc_current_a": fw.dc_current_a, "output_voltage_v": fw.output_voltage_v})
        return out


def _flyback_dict(fb: FlybackResult) -> dict[str, Any]:
    return {"mode": fb.mode, "mode_at_high_line": fb.mode_at_high_line, "inductance_h": fb.inductance_h,
            "gap_mm": fb.gap_m * 1e3, "duty_max": fb.duty_max, "duty_min": fb.duty_min,
            "reflected_voltage_v": fb.reflected_voltage_v, "input_power_w": fb.input_power_w,
            "efficiency_estimate": fb.efficiency_estimate, "delta_b_t": fb.delta_b_t,
            "leakage_inductance_h": fb.leakage_inductance_h, "clamp_energy_j": fb.clamp_energy_j,
            "clamp_power_w": fb.clamp_power_w, "switch_voltage_v": fb.switch_voltage_v}


def _tests_dict(tests: TestPlan) -> dict[str, Any]:
    """The test plan as JSON; ``cautions`` only for the kinds that carry one (the other kinds' JSON unchanged)."""
    out: dict[str, Any] = _plain(asdict(tests))
    if not tests.cautions:
        del out["cautions"]
    for rows in out.values():        # a limit's heading is print wording: the JSON names it by name and item
        if isinstance(rows, list):
            for row in rows:
                if isinstance(row, dict):
                    row.pop("heading", None)
    return out


def _plain(obj: Any) -> Any:
    if isinstance(obj, dict):
        return {k: _plain(v) for k, v in obj.items()}
    if isinstance(obj, (list, tuple)):
        return [_plain(v) for v in obj]
    return obj
