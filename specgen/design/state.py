"""Typed records that travel between the steps of one design calculation.

Small frozen value objects: what the catalogue resolved to (``Parts``), what the winding is laid on
(``Former``), each winding while the design iterates (``WindingState``), the built window
(``BuiltSection``, ``BuiltWindow``), the thermal state, the flux limit, an inductor's magnetics, and the one
record the checks and the test plan read (``DesignState``). Nothing here computes physics.
"""

from __future__ import annotations

from dataclasses import field
from typing import TYPE_CHECKING, Generic, TypeVar

from ..physics import geometry
from ..records import record
from .vocab import CheckLevel, Cooling, FormerKind, GapArrangement, Waveform, WireKind

if TYPE_CHECKING:
    from ..catalog.models import Bobbin, Catalog, Core, Material, Wire
    from .cmc_result import CommonModeChokeResult
    from .result import Build, Check, CurrentTransformerResult, FlybackResult, InductorResult, Layer, Limit, Losses, WindingResult
    from .spec import Spec, Winding
    from .windings_result import ConnectionResult, LoadResult, ResetResult

__all__ = ["CheckLevel", "Cooling", "FormerKind", "GapArrangement", "Waveform", "WireKind"]


@record(slots=True)
class Former:
    """What the winding is laid on: a bobbin's tube (rect or round) or a toroid's coated core."""
    kind: FormerKind
    tube_width_m: float = 0.0
    tube_depth_m: float = 0.0
    breadth_m: float = 0.0
    height_m: float = 0.0     # available build (toroid: the inner radius less the smallest hole)
    od_m: float = 0.0         # toroid, over its coating
    id_m: float = 0.0
    core_height_m: float = 0.0
    chambers: tuple[float, ...] = ()   # split bobbin: each chamber's breadth (breadth_m is chamber 1's)
    divider_m: float = 0.0             # split bobbin: the wall between chambers (0 where not on file)

    def mlt_m(self, build_to_centre_m: float) -> float:
        """Mean length of one turn whose centre line sits ``build_to_centre_m`` out from the former
        (the same geometry functions as ``kernel.mean_turn_length_m``)."""
        if self.kind == "rect":
            return float(geometry.mlt_rect_m(self.tube_width_m, self.tube_depth_m, build_to_centre_m))
        if self.kind == "round":
            return float(geometry.mlt_round_m(self.tube_width_m, build_to_centre_m))
        return float(geometry.toroid_turn_length_m(self.od_m, self.id_m, self.core_height_m, build_to_centre_m))


@record(slots=True)
class Parts:
    """The catalogue entries one spec resolved to, and the core's effective parameters."""
    core: Core
    material: Material
    bobbin: Bobbin | None
    stack_m: float | None
    former: Former
    ae_m2: float
    le_m: float
    ve_m3: float
    amin_m2: float
    wa_m2: float
    effective_parameters_from: str
    window_breadth_m: float      # along the leg (the fringing factor's G); toroid: core height
    surface_m2: float


@record(slots=True)
class FluxLimit:
    value_t: float
    basis: str                   # plain words: where the limit comes from


@record(slots=True)
class CoolingModel:
    """How the part sheds its heat (``kernel.cooling_model``): the cooling, the air speed over it (forced air),
    the potting factor and its source, and whether the speed was the spec's or the shop's default."""
    cooling: Cooling
    air_speed_m_s: float | None = None     # forced air only
    air_speed_from: str = ""               # "spec" or "shop default"
    potted_factor: float = 1.0             # potted only: the rise against still air
    potted_source: str = ""


@record(slots=True)
class ThermalState:
    winding_c: float             # mean winding temperature
    hot_c: float                 # hot spot: the winding plus the shop's margin
    rise_k: float
    r_th_basis: str = ""         # where the rise comes from (measured R_th or McLyman's surface rule)
    core_factor: float = 1.0     # the core loss's temperature factor at the winding temperature
    stability_margin: float | None = None   # 1 - R_th dP/dT at the balance (None: no loss-temperature fit)


@record(slots=True)
class WireChoice:
    wire: Wire
    strands: int                 # in hand
    reason: str


@record(slots=True)
class WindingState:
    """A winding at one step of the iteration (a new record, not an edit, when its turns change)."""
    spec: Winding
    index: int                   # position in the spec's list
    wire: Wire
    strands: int
    turns: int
    current_a: float             # rms
    wire_reason: str = ""

    @property
    def name(self) -> str:
        return self.spec.name


@record(slots=True)
class SectionBuild:
    """One section laid on the former: its layers and the build it reaches."""
    turns_per_layer: int          # capacity of the first layer
    layers: tuple[Layer, ...]
    end_build_m: float
    copper_length_m: float
    pitch_m: float                # along the layer, per turn (all strands in hand)
    layer_height_m: float
    usable_breadth_m: float       # bobbin: breadth less the margins; toroid: the first layer's circumference


@record(slots=True)
class BuiltSection:
    winding: str                  # winding name
    index: int                    # 1..sections of its winding
    order: int                    # 1-based place in the build
    build: SectionBuild
    margin_m: float
    tape_after: str | None
    tape_after_layers: int
    wound_with: str | None = None  # bifilar: the partner laid turn by turn in the same layers
    chamber: int = 0               # split bobbin: its chamber, 1 at the start flange (0: one chamber)
    tape_after_widths: int = 1     # the tape after it laid as this many widths side by side a layer


@record(slots=True)
class SectorLayout:
    """Windings side by side round a toroid, each on its own sector (a common-mode choke's lines)."""
    winding_angle_rad: float      # each sector's angle
    gap_angle_rad: float          # the unwound angle between neighbouring sectors
    gap_m: float                  # clear distance between sectors at the innermost copper (the chord)
    gap_asked_m: float            # the clear distance the spec asks


@record(slots=True)
class BuiltWindow:
    sections: tuple[BuiltSection, ...]
    height_m: float
    ok: bool
    fail_reason: str
    sectors: SectorLayout | None = None   # None: sections over one another (every kind but sector winding)

    def of(self, winding: str) -> tuple[BuiltSection, ...]:
        return tuple(s for s in self.sections if s.winding == winding)


@record(slots=True)
class Magnetics:
    """An inductor's turns, gap and flux at one temperature."""
    turns: int
    flux_limit: FluxLimit
    inductance_h: float               # as built (powder: at full bias)
    inductance_zero_bias_h: float
    inductance_full_bias_h: float
    b_peak_t: float                   # at the operating peak current
    b_peak_max_t: float               # at the over-current peak
    bias_drop_pct: float
    gap_m: float | None = None        # None: powder (distributed gap)
    arrangement: GapArrangement = "none"
    fringing_factor: float = 1.0
    spacer_m: float | None = None
    grind_m: float | None = None
    notes: tuple[Check, ...] = ()
    inductance_peak_h: float | None = None   # incremental L at the over-current peak (None: as built, linear)
    b_dc_t: float | None = None              # flux density at the DC current (None: L I / (N A_e), linear)


D = TypeVar("D")


@record(slots=True)
class Evaluation(Generic[D]):
    """One pass of a kind's calculation at a temperature: windings, build, AC factors and losses.

    ``detail`` is the kind's own record (a transformer's voltages, an inductor's magnetics)."""
    windings: dict[str, WindingState]
    built: BuiltWindow
    frs: dict[tuple[str, int], float]     # (winding, section index) -> Fr
    copper_w: float
    core_w: float
    core_w_m3: float
    detail: D

    @property
    def total_w(self) -> float:
        return self.copper_w + self.core_w


@record(slots=True)
class ElectricalSummary:
    """The kind's figures that the Design, the checks and the test plan read."""
    b_peak_t: float
    b_peak_max_t: float
    flux_limit: FluxLimit
    h_peak_a_m: float
    magnetizing_inductance_h: float | None = None
    magnetizing_current_a: float | None = None
    leakage_inductance_h: float | None = None
    voltages: dict[str, float] = field(default_factory=dict)        # loaded (primary: nominal)
    open_circuit: dict[str, float] = field(default_factory=dict)    # at nominal primary, no load
    voltage_tolerance: dict[str, tuple[float, float]] = field(default_factory=dict)  # output -> (minus, plus)
    efficiency: float | None = None
    regulation_pct: float | None = None
    output_power_w: float | None = None
    inductor: InductorResult | None = None
    ripple_rms: dict[str, tuple[float, float]] | None = None        # winding -> (DC, AC rms) currents
    dc_current_a: float = 0.0       # the DC part of the copper loss (a DC choke), for the skin-depth check
    checks: tuple[Check, ...] = ()  # the kind's own, after the common checks
    current_transformer: CurrentTransformerResult | None = None
    flyback: FlybackResult | None = None
    common_mode_choke: CommonModeChokeResult | None = None
    loads: tuple[LoadResult, ...] = ()               # a transformer's declared loads (``design.loads``)
    connections: tuple[ConnectionResult, ...] = ()   # several primaries: each connection's flux
    reset: ResetResult | None = None                 # a forward transformer's reset winding (``design.forward``)


@record(slots=True)
class DesignState:
    """Everything the checks, the test plan and the materials read: one typed record."""
    spec: Spec
    cat: Catalog
    parts: Parts
    windings: tuple[WindingResult, ...]
    states: dict[str, WindingState]
    built: BuiltWindow
    build: Build
    losses: Losses
    temp: ThermalState
    summary: ElectricalSummary


@record(slots=True)
class KindTests:
    """A kind's own test-station limits (the DCR and hipot tests are common)."""
    ratio: tuple[Limit, ...] = ()
    open_circuit: tuple[Limit, ...] = ()
    inductance: tuple[Limit, ...] = ()
    polarity: tuple[str, ...] = ()
    cautions: tuple[str, ...] = ()  # safety cautions the kind adds to the work order and the test sheet
    no_load: tuple[Limit, ...] = ()  # at rated voltage, the other windings open (a mains transformer)
