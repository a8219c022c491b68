"""The catalogue side of the search: core choices, their insulation plan, wire options, the area-product screen.

A core choice is one way to take a core from stock (core x stack x bobbin), resolved by the design engine
from a real ``Spec`` (the requirement written as a spec, the core swapped in). A wire option is one stocked
wire with a number of strands in hand whose copper carries a winding's current within a window around the
shop's current density.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

import numpy as np

from ..catalog.models import Bobbin, Catalog, Core, Sleeving, Tape, Wire
from ..design import kernel as K
from ..errors import SpecError
from ..physics import faraday, geometry, sizing
from ..physics import wire as wiremod
from .records import FloatArray, OptionRows
from .requirement import Requirement

if TYPE_CHECKING:
    from ..design.kinds.inductor import Currents
    from ..design.spec import Spec
    from ..design.state import Parts

# wire options: total copper area within [I / (J_HIGH J), I / (J_LOW J)], J the shop's current density
J_LOW = 1.0 / 3.0
J_HIGH = 1.5
SINGLE_WIRE_MAX_M = 1.2e-3  # above this a single wire winds badly; strands in hand then (shop labor's
                            # heavy_wire_above when it gives one; 1.2 mm common practice)
AP_KU = 0.5                # generous window utilisation for the area-product screen (common practice
                           # reaches 0.3-0.4 on a bobbin): the screen only drops cores clearly too small
WRAP_BREAKDOWN_V = 5000.0  # a wrap between windings should hold 5 kV, so two or three wraps pass a 3 kV
                           # reinforced test with margin (common practice, from memory)


@dataclass(frozen=True, slots=True)
class InsulationPlan:
    """The draft spec's insulation construction for one core choice (tape ids and their build) [m]."""
    layer_tape: str
    layer_tape_m: float
    winding_tape: str
    winding_tape_layers: int
    winding_tape_m: float
    outer_wrap: str
    outer_wrap_layers: int
    outer_wrap_m: float
    margin_m: float
    margin_tape: str | None
    varnish: str | None
    core_wrap: str | None = None      # toroid insulated from its core: one half-lapped wrap of this tape


@dataclass(frozen=True, slots=True)
class CoreChoice:
    """One way to take a core from stock: core x stack x bobbin (the engine's resolved parts)."""
    core: Core
    stack_m: float | None
    bobbin: Bobbin | None
    parts: Parts
    mass_kg: float                  # core mass per unit
    family: str
    plan: InsulationPlan

    @property
    def label(self) -> str:
        s = f"{self.core.id}"
        if self.stack_m:
            s += f" {self.stack_m * 1e3:g} mm"
        return s


@dataclass(frozen=True, slots=True)
class WireOption:
    wire: Wire
    strands: int

    @property
    def label(self) -> str:
        return self.wire.id + (f" x{self.strands}" if self.strands > 1 else "")


# ------------------------------------------------------------------------------------------------ insulation

def _is_margin_tape(t: Tape) -> bool:
    return "margin" in t.name.lower()


def _pick_tape(cat: Catalog, cls: int, breadth_m: float | None, prefer: str) -> Tape:
    """A tape of at least the insulation class, as wide as the bobbin breadth where one is stocked.

    'thin' (layer tape): the cheapest within 20 % of the thinnest. 'strong' (between windings and the outer
    wrap): the cheapest film tape (at least 50 kV/mm, at most 0.1 mm) holding ``WRAP_BREAKDOWN_V`` per wrap,
    else the one holding the most."""
    tapes: list[Tape] = [t for t in cat.tapes.values() if not _is_margin_tape(t)]
    ok = [t for t in tapes if t.thermal_class_c >= cls] or sorted(tapes, key=lambda t: -t.thermal_class_c)[:3]
    if prefer == "strong":
        films = [t for t in ok if t.thickness_m <= 0.1e-3 and t.dielectric_strength_v_m >= 50e6] or ok
        holds = [t for t in films if t.thickness_m * t.dielectric_strength_v_m >= WRAP_BREAKDOWN_V]
        ok = holds or [max(films, key=lambda t: (t.thickness_m * t.dielectric_strength_v_m, t.id))]
    else:
        thin = min(t.thickness_m for t in ok)
        ok = [t for t in ok if t.thickness_m <= 1.2 * thin]
    wide = [t for t in ok if breadth_m is None or t.width_m >= breadth_m - 1e-9]
    return min(wide or ok, key=lambda t: (t.price_per_m2, t.width_m, t.id))


def _margin_for(rating: str, working_v: float) -> float:
    """Creepage margin each side of a winding on a bobbin (common practice, from memory: about 2 mm for
    basic insulation at mains voltages up to 300 V, 3 mm to 600 V; reinforced twice that). The applicable
    product safety standard decides; these are starting points for a draft."""
    if rating == "functional":
        return 0.0
    basic = 2e-3 if working_v <= 300.0 else 3e-3 if working_v <= 600.0 else 4e-3
    return basic if rating == "basic" else 2.0 * basic


def insulation_plan(req: Requirement, cat: Catalog, bobbin: Bobbin | None) -> InsulationPlan:
    """The draft spec's insulation construction for one core choice: tapes, margins, varnish.

    Layer tape: one wrap of the thinnest tape of the class. Between windings: 1 wrap (functional),
    2 (basic) or 3 (reinforced: thin-sheet insulation, any two of three pass the test - common practice,
    from memory of IEC 61558-1 / IEC 62368-1) of the tape with the most breakdown per wrap; the outer wrap
    two of those. Tapes as wide as the bobbin breadth where stocked."""
    cls = req.insulation_class_c
    breadth = bobbin.breadth_m if bobbin is not None else None
    layer = _pick_tape(cat, cls, breadth, "thin")
    strong = _pick_tape(cat, cls, breadth, "strong")
    rating = req.rating if req.kind in ("transformer", "flyback") else "functional"
    layers = {"functional": 1, "basic": 2, "reinforced": 3}[rating]
    margin = 0.0 if bobbin is None else _margin_for(req.rating if req.kind in ("transformer", "flyback") else req.to_core,
                                                    req.working_voltage_v)
    margin_tape = None
    if margin > 0:
        mts = [t for t in cat.tapes.values() if _is_margin_tape(t) and t.width_m >= margin - 1e-9]
        if mts:
            best_w = min(t.width_m for t in mts)
            mts = [t for t in mts if t.width_m == best_w]
            margin_tape = max(mts, key=lambda t: (t.thermal_class_c, -t.price_per_m2)).id
            margin = best_w
    varn = sorted((v for v in cat.varnishes.values() if v.thermal_class_c >= cls),
                  key=lambda v: (v.price_per_litre, v.id))
    # a toroid insulated from its core: one half-lapped wrap of the strong tape on the core (the engine
    # fails a barrier to the core with nothing under the first winding)
    core_wrap = strong.id if bobbin is None and req.to_core not in (None, "functional") else None
    return InsulationPlan(core_wrap=core_wrap, layer_tape=layer.id, layer_tape_m=layer.thickness_m, winding_tape=strong.id,
                          winding_tape_layers=layers, winding_tape_m=strong.thickness_m * layers,
                          outer_wrap=strong.id, outer_wrap_layers=2, outer_wrap_m=strong.thickness_m * 2,
                          margin_m=margin, margin_tape=margin_tape, varnish=varn[0].id if varn else None)


def sleeving_for(cat: Catalog, cls: int, diameter_m: float, test_v: float = 0.0) -> str | None:
    """The narrowest sleeving of the class whose bore takes the wire with 10 % to spare (else the widest),
    among those whose breakdown holds the barrier's type-test voltage ``test_v`` where any does."""
    ok: list[Sleeving] = [s for s in cat.sleevings.values() if s.thermal_class_c >= cls]
    ok = [s for s in ok if s.breakdown_v >= test_v] or ok
    if not ok:
        return None
    fit = [s for s in ok if s.bore_m >= 1.1 * diameter_m]
    if fit:
        return min(fit, key=lambda s: (s.bore_m, s.price_per_m, s.id)).id
    return max(ok, key=lambda s: (s.bore_m, s.id)).id


# ------------------------------------------------------------------------------------------------ cores

def _bobbins(cat: Catalog, core: Core, stack: float | None) -> list[Bobbin | None]:
    if core.is_toroid:
        return [None]
    fits = [b for b in cat.bobbins_for(core.id)
            if b.stack_m is None or stack is None or abs(b.stack_m - stack) < 1e-6]
    single = [b for b in fits if b.sections == 1]
    return list(sorted(single or fits, key=lambda b: b.id))


def core_choices(req: Requirement, cat: Catalog) -> list[CoreChoice]:
    """Every core x stack x bobbin in stock, resolved by the engine (EI: each stocked stack with the
    single-section bobbin made for it; split bobbins only where no single-section one fits)."""
    from ..design.flux import b_sat_hot_t
    from ..design.resolve import core_result, resolve_core
    from ..design.spec import TapeUse
    from .draft import requirement_spec

    base = requirement_spec(req)
    out = []
    for core in sorted(cat.cores.values(), key=lambda c: c.id):
        stacks: list[float | None] = list(core.stacks_m) if core.shape == "EI" else [None]
        for stack in stacks:
            for bob in _bobbins(cat, core, stack):
                plan = insulation_plan(req, cat, bob)
                wrap = TapeUse(plan.core_wrap, 1) if plan.core_wrap and core.is_toroid else None
                spec = replace(base, core_id=core.id, stack_m=stack, bobbin_id=bob.id if bob else None,
                               core_wrap=wrap)
                try:
                    parts = resolve_core(spec, cat)
                except (SpecError, ValueError):
                    continue
                mass = core_result(spec, cat, parts, b_sat_hot_t(parts.material, req.ambient_c)).mass_kg
                out.append(CoreChoice(core=core, stack_m=stack, bobbin=bob, parts=parts, mass_kg=mass,
                                      family=f"{core.shape} / {core.material}", plan=plan))
    return out


def first_guess_hot_c(req: Requirement, cat: Catalog) -> float:
    """Where the engine's temperature loop starts (``kernel.first_guess_thermal``)."""
    return K.first_guess_thermal(req.ambient_c, cat.shop.hotspot_margin_k).hot_c


def current_density_a_m2(req: Requirement, cat: Catalog) -> float:
    """The shop's current density for the requirement's cooling (``kernel.current_density_a_m2``)."""
    return K.current_density_a_m2(cat.shop.current_density_a_m2, req.cooling)


def area_product_needed_m4(req: Requirement, cat: Catalog, choices: list[CoreChoice]) -> FloatArray:
    """The area product each core choice would need (McLyman), at the generous screen figures: window
    utilisation ``AP_KU``, current density ``J_HIGH`` x the shop's, and the material's flux limit at the
    first-guess hot spot. Transformer: Ap = Pt / (Kf Ku B f J). Choke: McLyman's energy form
    Ap = L I_pk I_rms / (B Ku J), i.e. area_product_m4 with Pt / (Kf f) = L I_pk I_rms."""
    mats = [cat.materials[c.core.material] for c in choices]
    b0 = np.asarray(K.flux_limit_t(np.array([m.b_sat_25c_t for m in mats]), np.array([m.b_sat_100c_t for m in mats]),
                                   first_guess_hot_c(req, cat), cat.shop.flux_limit_fraction,
                                   np.array([m.b_design_t if m.b_design_t is not None else np.nan for m in mats]),
                                   req.flux_limit_t), dtype=np.float64)
    j = J_HIGH * current_density_a_m2(req, cat)
    if req.choke is not None:
        c = choke_currents(req)
        return np.asarray(sizing.area_product_m4(c.target_h * c.i_pk * c.i_rms, 1.0, AP_KU, b0, 1.0, j))
    pt = sizing.transformer_apparent_power_w([w.voltage_v * w.load_current_a for w in req.loads],
                                             req.efficiency_guess)
    if req.waveform == "unipolar":
        # V t_on = N dB Ae: 1/duty takes the form factor's place, with B the usable swing B_limit - B_r
        br = np.array([cat.materials[c.core.material].b_r_t for c in choices])
        return np.asarray(sizing.area_product_m4(pt, 1.0 / req.duty, AP_KU, np.maximum(b0 - br, 0.05 * b0),
                                                 req.frequency_hz, j))
    return np.asarray(sizing.area_product_m4(pt, faraday.FORM_FACTORS[req.waveform], AP_KU, b0,
                                             req.frequency_hz, j))


def replace_core(req: Requirement, choice: CoreChoice) -> Spec:
    """The requirement as a real Spec with this core choice (what the engine's helpers read)."""
    from .draft import requirement_spec

    return replace(requirement_spec(req), core_id=choice.core.id, stack_m=choice.stack_m,
                   bobbin_id=choice.bobbin.id if choice.bobbin else None)


def choke_currents(req: Requirement) -> Currents:
    """A choke's currents as the engine takes them (``design.kinds.inductor.currents`` of the requirement's spec)."""
    from ..design.kinds.inductor import currents
    from .draft import requirement_spec

    spec = requirement_spec(req)
    assert spec.inductor is not None
    return currents(spec.inductor, req.frequency_hz)


def option_groups(req: Requirement) -> list[int]:
    """Option group per winding in build order: matched windings share their wire."""
    if req.kind == "inductor":
        return [0]
    group: dict[str, int] = {}
    out = []
    for w in req.windings:
        key = w.same_turns_as or w.name
        if key not in group:
            group[key] = len(group)
        out.append(group[key])
    return out


# ------------------------------------------------------------------------------------------------ wires

def heavy_wire_m(cat: Catalog) -> float:
    """Above this diameter a single wire winds badly (the shop's labor figure heavy_wire_above, if given)."""
    labor = cat.shop.labor if isinstance(cat.shop.labor, dict) else {}
    raw = (labor.get("data") or labor).get("heavy_wire_above")
    if raw is None:
        return SINGLE_WIRE_MAX_M
    try:
        from ..units import parse

        return parse(raw, "length")
    except Exception:   # a malformed shop figure is the quote's to report; the search keeps its default
        return SINGLE_WIRE_MAX_M


def wire_options(cat: Catalog, current_a: float, density_a_m2: float, freq_hz: float, *, skin_limited: bool,
                 allow_tiw: bool, heavy_m: float) -> list[WireOption]:
    """Every stocked (wire, strands) whose copper carries ``current_a`` within the density window.

    Round wire of every grade with strands no thicker than two skin depths (the engine's rule); strands
    in hand 2..8 only where needed (one wire at the shop's density would be thicker than two skin depths
    or than ``heavy_m``); Litz (strands at most half a skin depth, the engine's rule) in 1..6 bundles only
    where a single round wire would be thicker than two skin depths; triple-insulated wire when
    ``allow_tiw``; foil and strip no thicker than two skin depths.
    """
    i = max(current_a, 1e-6)
    lo, hi = i / (J_HIGH * density_a_m2), i / (J_LOW * density_a_m2)
    target = i / density_a_m2
    delta = float(K.skin_depth_m(freq_hz, K.WIRE_CHOICE_TEMP_C)) if skin_limited else math.inf
    limit = K.STRAND_MAX_SKIN_DEPTHS * delta
    single_d = float(wiremod.round_diameter_m(target))
    strands_needed = single_d > min(limit, heavy_m)
    out: list[WireOption] = []

    def add(w: Wire, n_max: int, needed: bool) -> None:
        for n in range(1, n_max + 1):
            if n > 1 and not needed:
                break
            if lo <= w.copper_area_m2 * n <= hi:
                out.append(WireOption(w, n))

    for w in sorted(cat.wires.values(), key=lambda w: (w.kind, w.copper_area_m2, w.id)):
        if w.kind == "round" and w.strand_diameter_m <= limit:
            add(w, K.MAX_STRANDS_ROUND, strands_needed)
        elif w.kind == "tiw" and allow_tiw and w.strand_diameter_m <= limit:
            add(w, K.MAX_STRANDS_TIW, strands_needed)
        elif (w.kind == "litz" and skin_limited and single_d > limit
              and w.strand_diameter_m <= K.LITZ_STRAND_MAX_SKIN_DEPTHS * delta):
            add(w, K.MAX_BUNDLES_LITZ, True)
        elif w.kind in ("foil", "strip") and w.thickness_m <= limit:
            add(w, 2 if w.kind == "strip" else 1, strands_needed)
    return out


def option_rows(options: list[WireOption], cat: Catalog) -> OptionRows:
    """Arrays over one winding's wire options (what the vectorised model reads): the kernel's wire geometry,
    and the class, price with the shop's wire scrap, and mass per metre."""
    scrap = 1.0 + float(cat.shop.scrap_wire)
    geos = [K.wire_geometry(o.wire, o.strands) for o in options]
    return OptionRows(
        geometry=K.stack_wires(geos),
        class_c=np.array([o.wire.thermal_class_c for o in options], dtype=np.float64),
        price_per_kg=np.array([float(o.wire.price_per_kg) * scrap for o in options], dtype=np.float64),
        mass_per_m_kg=np.array([wiremod.mass_per_m_kg(g.copper_area_m2, o.wire.conductor)
                                for g, o in zip(geos, options)], dtype=np.float64),
        copper=np.array([o.wire.conductor == "copper" for o in options], dtype=bool))


# ------------------------------------------------------------------------------------------------ outline

def outline_m(core: Core, stack_m: float | None, bulged_build_m: float | FloatArray
              ) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Bounding box of the assembled part, sorted largest first (length, width, height) [m]
    (``geometry.part_outline_m`` of the core's shape and dimensions). ``bulged_build_m`` may be an array
    (toroids)."""
    return geometry.part_outline_m(core.shape, core.dims, core.coating_m, stack_m, bulged_build_m)

