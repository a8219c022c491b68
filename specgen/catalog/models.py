"""The shop's stock as small frozen value objects, every dimension an SI float (temperatures in degC).

Each object keeps ``source`` (where its figures come from) and ``raw`` (its canonical YAML content),
so a fingerprint can cover exactly the catalogue entries a design used.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Mapping
from dataclasses import field
from decimal import Decimal
from typing import Any

from ..records import record

WIRE_KINDS = ("round", "litz", "foil", "strip", "tiw")
CORE_SHAPES = ("EI", "toroid", "E", "ETD", "EFD", "PQ", "RM", "POT")
MATERIAL_FAMILIES = ("silicon_steel_no", "silicon_steel_go", "ferrite", "iron_powder",
                     "alloy_powder", "amorphous", "nanocrystalline")


@record
class Wire:
    id: str
    kind: str                      # round | litz | foil | strip | tiw
    label: str                     # how the shop says it: "AWG 24 grade 2", "100 x 0.08 mm Litz"
    conductor: str                 # copper | aluminium
    thermal_class_c: int           # IEC 60085 class of the enamel/insulation
    price_per_kg: Decimal
    source: str
    strands: int = 1
    strand_diameter_m: float = 0.0     # bare conductor of one strand (round, litz, tiw)
    strand_overall_m: float = 0.0      # insulated strand
    overall_diameter_m: float = 0.0    # the finished wire or bundle (round, litz, tiw)
    thickness_m: float = 0.0           # foil / strip bare
    width_m: float = 0.0               # foil / strip bare
    overall_thickness_m: float = 0.0   # foil / strip with insulation (foil: the tape is separate)
    overall_width_m: float = 0.0
    grade: str = ""                    # insulation build: grade 1/2/3, single/heavy/triple
    awg: int | None = None
    insulation_rating: str = "functional"   # tiw: 'reinforced' (its own insulation counts)
    raw: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def is_round(self) -> bool:
        return self.kind in ("round", "litz", "tiw")

    @property
    def strand_area_m2(self) -> float:
        if self.is_round:
            return math.pi / 4.0 * self.strand_diameter_m ** 2
        # rectangular strip: corner radii ignored (a few percent, conservative for DCR)
        return self.thickness_m * self.width_m

    @property
    def copper_area_m2(self) -> float:
        """Conductor cross-section of the whole wire (all strands of a Litz bundle)."""
        return self.strand_area_m2 * self.strands


@record
class Material:
    id: str
    name: str
    family: str
    b_sat_25c_t: float
    b_sat_100c_t: float
    b_r_t: float                   # remanence (residual flux density)
    h_c_a_m: float                 # coercive force
    mu_initial: float              # relative, small-signal
    density_kg_m3: float
    steinmetz_k: float             # P_v [W/m^3] = k * f[Hz]^alpha * B_pk[T]^beta
    steinmetz_alpha: float
    steinmetz_beta: float
    steinmetz_f_min_hz: float
    steinmetz_f_max_hz: float
    steinmetz_b_max_t: float
    curie_c: float
    price_per_kg: Decimal
    source: str
    b_design_t: float | None = None          # a preferred working flux density, if the shop has one
    # core loss against temperature, the quadratic F(T) = (ct0 - ct1 T + ct2 T^2) normalised to 1 at its minimum
    # (physics.core_temperature); the Steinmetz k is then the loss at that minimum. None: no temperature factor
    loss_temperature: tuple[float, float, float] | None = None
    loss_temperature_source: str = ""
    mu_amplitude: float | None = None        # relative permeability at the working flux (steels: far above mu_i)
    lamination_thickness_m: float = 0.0
    stacking_factor: float = 1.0
    dc_bias_half_field_a_m: float | None = None   # powders: mu/mu_i = 1 / (1 + (H / half_field)^steepness)
    dc_bias_steepness: float | None = None
    # small-signal mu against frequency, ((f_hz, mu), ...) rising in f (optional; a common-mode choke reads it)
    permeability_table: tuple[tuple[float, float], ...] = ()
    raw: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def mu_working(self) -> float:
        """The material's one design permeability, used for every inductance the design computes (a transformer's
        magnetizing inductance, a gapped or ungapped inductor, a flyback's primary, a current transformer):
        the amplitude permeability at the working flux density where the catalogue gives one (steels and ribbons,
        whose small-signal mu_initial is several times lower and does not describe a core at working flux), else
        the initial permeability (ferrites, close to it at their working flux; powders, whose DC-bias curve is
        relative to it). A small-signal test of a steel core reads low against it; the inductance checks warn
        where the core, not the gap, sets the inductance."""
        return self.mu_amplitude or self.mu_initial

    @property
    def is_powder(self) -> bool:
        return self.family in ("iron_powder", "alloy_powder")

    def bias_fit(self) -> tuple[float, float, float]:
        """The DC-bias curve as the coefficients (a, b, c) of mu/mu_i = 1 / (a + b H^c), H in A/m, that the
        physics functions take: a = 1, b = half_field^-steepness, c = steepness; (0, 0, 0) without a curve."""
        if self.dc_bias_half_field_a_m is None or self.dc_bias_steepness is None:
            return 0.0, 0.0, 0.0
        from ..physics.powder_bias import fit_b_from_half_field

        b = float(fit_b_from_half_field(self.dc_bias_half_field_a_m, self.dc_bias_steepness))
        return 1.0, b, float(self.dc_bias_steepness)

    @property
    def is_lamination(self) -> bool:
        return self.family in ("silicon_steel_no", "silicon_steel_go", "amorphous", "nanocrystalline")


@record
class Core:
    id: str
    shape: str                     # EI | toroid | E | ETD | EFD | PQ | RM | POT
    material: str                  # Material id
    dims: dict                     # shape-specific dimensions in metres (see DEVELOPERS.md)
    price: Decimal                 # per set (a pair of halves, a toroid, or laminations per kg: see price_unit)
    price_unit: str                # 'set' | 'kg'
    source: str
    stacks_m: tuple = ()           # EI and stacked toroids: the stack heights stocked
    stacking_factor: float = 1.0   # laminations and tape-wound cores
    pieces: int = 1                # parts per set (2 halves; laminations counted in the design)
    gappable: bool = False         # the shop can grind the centre leg or shim this set
    coating_m: float = 0.0         # toroid: coating or core-box wall on each face
    coating_voltage_v: float | None = None   # toroid: the coating's rated electric strength (None: not insulation)
    override: dict = field(default_factory=dict)   # measured ae_m2, le_m, ve_m3 replacing the computed ones
    mass_kg: float | None = None
    thermal_resistance_k_w: float | None = None   # measured part-to-ambient R_th, overrides the surface-area rule
    raw: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def is_toroid(self) -> bool:
        return self.shape == "toroid"


@record
class Bobbin:
    id: str
    cores: tuple                   # ids of the cores it fits (one body, several grades)
    shape: str                     # rect | round (winding surface of the tube)
    tube_width_m: float            # rect: outer size of the tube across the centre leg width
    tube_depth_m: float            # rect: outer size along the stack/depth; round: = tube_width (the diameter)
    breadth_m: float               # winding breadth between the flanges
    height_m: float                # build height available from the tube to the window edge
    pins: tuple                    # pin names in order, e.g. ('1','2',...,'8')
    pin_pitch_m: float
    pin_rows: int                  # 1 or 2 (pins split between the two sides)
    sections: int                  # 1, or 2 for a split (two-chamber) bobbin
    thermal_class_c: int
    price: Decimal
    source: str
    stack_m: float | None = None   # EI: the stack it is moulded for
    clips: int = 0                 # clips or clamps per set (pulled with the bobbin)
    pin_row_spacing_m: float | None = None   # centre to centre of the two pin rows (None: not on file)
    pin_size_m: float | None = None          # a pin's width across, for the gap between pins
    core_creepage_m: float | None = None     # moulded path from the winding space over the flange to the core
    wall_voltage_v: float | None = None      # electric strength of the tube wall and flanges (a.c. rms)
    chamber_breadths_m: tuple = ()           # split bobbin: each chamber's winding breadth, start flange first
    divider_thickness_m: float | None = None  # split bobbin: the wall between chambers (None: not on file)
    divider_height_m: float | None = None    # split bobbin: the wall's height above the tube
    raw: dict = field(default_factory=dict, compare=False, repr=False)

    @property
    def chambers(self) -> tuple[float, ...]:
        """Each chamber's breadth: as the catalogue gives them, else the breadth shared equally."""
        if self.chamber_breadths_m:
            return tuple(self.chamber_breadths_m)
        return tuple(self.breadth_m / self.sections for _ in range(self.sections))


@record
class Tape:
    id: str
    name: str
    thickness_m: float
    dielectric_strength_v_m: float
    thermal_class_c: int
    width_m: float
    price_per_m2: Decimal
    source: str
    raw: dict = field(default_factory=dict, compare=False, repr=False)


@record
class Sleeving:
    id: str
    name: str
    bore_m: float
    wall_m: float
    breakdown_v: float
    thermal_class_c: int
    price_per_m: Decimal
    source: str
    raw: dict = field(default_factory=dict, compare=False, repr=False)


@record
class Varnish:
    id: str
    name: str
    thermal_class_c: int
    cure_temperature_c: float
    cure_time_s: float
    winding_volume_share: float    # varnish taken up per volume of winding (common practice ~ 0.1-0.2)
    price_per_litre: Decimal
    source: str
    raw: dict = field(default_factory=dict, compare=False, repr=False)


# ----------------------------------------------------------------------------------------------
# The shop's figures, typed and range-checked when the catalogue loads (catalog.loader._shop)


class _ByKey(Mapping[str, Any]):
    """Read-only mapping access to the fields (those set), for callers written against the dict form
    (``shop.hipot["basic_v"]``, the kernel's ``current_density_a_m2(table, cooling)``); new code reads
    the attributes."""

    def __getitem__(self, key: str) -> Any:
        value = getattr(self, key) if key in self.__dataclass_fields__ else None  # type: ignore[attr-defined]
        if value is None:
            raise KeyError(key)
        return value

    def __iter__(self) -> Iterator[str]:
        return (k for k in self.__dataclass_fields__ if getattr(self, k) is not None)  # type: ignore[attr-defined]

    def __len__(self) -> int:
        return sum(1 for _ in self)


@record
class CurrentDensities(_ByKey):
    """Design current density [A/m^2] per cooling case (``natural`` is required; the others fall back to it)."""

    natural: float
    forced: float | None = None
    potted: float | None = None

    def for_cooling(self, cooling: str) -> float:
        return float(self.get(cooling, self.natural))


@record
class CoolingFigures:
    """How the rise is found for forced air and potting when a spec does not say (shop.yaml ``cooling``)."""

    air_speed_m_s: float = 1.0          # forced air: the speed over the part when the spec states no air_speed
    potted_rise_factor: float = 0.85    # potted: the rise against still air (a stated factor)
    potted_source: str = "common practice (from memory): replace with the shop's measurement"


@record
class HipotFigures(_ByKey):
    """Dielectric (hipot) test figures: type-test voltages per insulation rating, durations, trip."""

    functional_v: float
    basic_v: float
    supplementary_v: float
    reinforced_v: float
    type_duration_s: float
    routine_factor: float             # routine test voltage = this x the type-test voltage
    routine_duration_s: float
    trip_current_a: float


@record
class InsulationResistanceFigures(_ByKey):
    voltage_v: float                  # d.c. test voltage
    minimum_ohm: float


@record
class Tolerances(_ByKey):
    """Test limits as fractions of the nominal (0.1 = +-10 %)."""

    dcr: float
    ratio: float
    inductance: float
    open_circuit_voltage: float


@record
class LaborFigures:
    """The quote's time model (shop.yaml ``labor``): winder speeds, factors, times in seconds.

    Decimal where the quote multiplies money by it, floats for the wire-size thresholds.
    """

    bobbin_turns_per_minute: Decimal
    toroid_turns_per_minute: Decimal
    fine_wire_below_m: float
    fine_wire_factor: Decimal
    heavy_wire_above_m: float
    heavy_wire_factor: Decimal
    litz_factor: Decimal
    per_winding_s: Decimal
    per_layer_tape_s: Decimal
    per_termination_s: Decimal
    core_assembly_s: Decimal
    per_lamination_s: Decimal
    impregnation_s: Decimal
    test_s: Decimal


@record
class Shop:
    name: str
    currency: str
    labor_rate: Decimal            # per hour
    overhead: Decimal              # fraction (0.45)
    profit_margin: Decimal         # fraction of the selling price
    setup_time_s: float            # per lot
    scrap_wire: Decimal            # fraction of wire
    current_density_a_m2: CurrentDensities   # cooling -> A/m^2
    bulge_factor: float
    lead_length_m: float           # each lead, beyond the pin
    flux_limit_fraction: float     # default B limit = fraction x B_sat at hot spot
    hotspot_margin_k: float        # hot spot above the average winding temperature (common practice)
    work_order_format: str
    hipot: HipotFigures            # see shop.yaml: basic/reinforced voltages, durations, trip current
    insulation_resistance: InsulationResistanceFigures   # test voltage, minimum resistance
    tolerances: Tolerances         # dcr, ratio, inductance (fractions)
    labor: LaborFigures            # the quote's time model
    source: str
    register_path: str | None = None   # the work-order register, if the shop keeps one fixed place
    # an output winding's voltage band at full load, fractions (minus, plus) of the voltage asked
    voltage_tolerance: tuple[float, float] = (0.0, 0.03)
    # a powder counts as saturated at this fraction of the lower of B_sat and its DC-bias curve's ceiling
    # (``kernel.powder_saturation_t``; shop.yaml says why)
    powder_saturation_fraction: float = 0.8
    cooling: CoolingFigures = field(default_factory=lambda: CoolingFigures())
    raw: dict = field(default_factory=dict, compare=False, repr=False)
    # documents and commercial terms (see ShopDocuments): printed, never part of a design or its fingerprint
    documents: ShopDocuments = field(default_factory=lambda: ShopDocuments())
    insulation: InsulationBasis | None = None   # defaults for insulation coordination (shop.yaml insulation:)


@record
class InsulationBasis:
    """The shop's defaults for coordinating a part's insulation barriers (IEC 60664-1 terms)."""

    standard: str                  # the table set, as printed: "IEC 60664-1:2007 (IEC 62368-1, IEC 61558-1)"
    overvoltage_category: int      # 1..4
    pollution_degree: int          # 1..3
    material_group: str            # I | II | IIIa | IIIb (from the CTI of bobbins and tapes)
    altitude_m: float
    mains_v: float                 # nominal line-to-neutral mains voltage the parts are energised from
    hipot_step_v: float            # the test set's voltage step


@record
class Catalog:
    """The whole stock, by id. Built by ``catalog.loader.load_catalog``."""

    root: str
    wires: dict
    cores: dict
    bobbins: dict
    materials: dict
    tapes: dict
    sleevings: dict
    varnishes: dict
    shop: Shop
    locations: dict = field(default_factory=dict, compare=False, repr=False)   # id -> (file, line)
    customers: dict = field(default_factory=dict)   # id -> Party (customers.yaml: the quote's address blocks)

    KINDS = ("wires", "cores", "bobbins", "materials", "tapes", "sleevings", "varnishes")

    def get(self, kind: str, item_id: str) -> Any:
        table = getattr(self, kind)
        return table.get(item_id)

    def find(self, item_id: str) -> tuple[str, Any] | None:
        for kind in self.KINDS:
            obj = getattr(self, kind).get(item_id)
            if obj is not None:
                return kind, obj
        return None

    def customer(self, name: str) -> Party | None:
        """The customer a spec names, by id or by name (case and spacing ignored); None if not on file."""
        key = " ".join(str(name).split()).casefold()
        for c in self.customers.values():
            if key in (c.id.casefold(), " ".join(c.name.split()).casefold()):
                return c
        return None

    def bobbins_for(self, core_id: str) -> list:
        return [b for b in self.bobbins.values() if core_id in b.cores]


# ------------------------------------------------------------------------------------------------ documents
# What the shop prints on its documents and the commercial terms of its quotes. None of it shapes a
# design, so none of it enters a release fingerprint (the loader leaves these keys out of Shop.raw).

#: Paper the documents are laid out for: width and height in metres (ISO 216 A4; US Letter 8.5 x 11 in).
PAPER_SIZES_M = {"A4": (0.210, 0.297), "Letter": (0.2159, 0.2794)}


@record
class Party:
    """A postal address block: the shop's own, or a customer's (catalogue customers.yaml)."""

    id: str
    name: str
    lines: tuple = ()              # street, town, postcode, country: as printed
    attention: str = ""            # customers: the person or desk a quote goes to
    phone: str = ""
    email: str = ""
    raw: dict = field(default_factory=dict, compare=False, repr=False)


@record
class BuyBreak:
    """A supplier's price break on what one lot buys of one stock item: from ``threshold`` up, ``discount`` off."""

    threshold: float               # kg (by mass) or pieces/sets (by count)
    discount: Decimal              # fraction off the catalogue price


@record
class QuoteTerms:
    """shop.quote_terms: lead time, payment, delivery, who signs, and what makes a larger lot cheaper."""

    lead_time_s: float | None = None           # order to despatch of a first lot
    repeat_lead_time_s: float | None = None    # a repeat order of an unchanged revision
    payment: str = ""
    delivery: str = ""
    signatory: str = ""
    signatory_title: str = ""
    learning_first_unit: float = 1.0           # the first unit's run time as a multiple of the settled time
    learning_rate: float = 1.0                 # each doubling of the count multiplies the unit time by this
    breaks_by_mass: tuple = ()                 # BuyBreaks on kg of one wire (or per-kg core) in the lot
    breaks_by_count: tuple = ()                # BuyBreaks on pieces/sets of one core or bobbin in the lot


@record
class ShopDocuments:
    """shop.paper, shop.address and shop.quote_terms, typed."""

    paper: str = "A4"                          # a key of PAPER_SIZES_M
    address: Party | None = None
    terms: QuoteTerms = field(default_factory=QuoteTerms)

    @property
    def paper_m(self) -> tuple[float, float]:
        return PAPER_SIZES_M[self.paper]
