"""What the row evaluation reads: the core choices and wire options as arrays, and the requirement's
constants at the engine's first-guess temperature (primary turns of a transformer, a choke's magnetics).
Every formula is the kernel's (``specgen.design.kernel``) or a physics function's."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..catalog.models import Catalog
from ..design import kernel as K
from ..design.build import tape_factor
from ..physics import gap as gapmod
from ..physics import permeability
from .candidates import CoreChoice, WireOption, first_guess_hot_c, option_rows, outline_m, replace_core
from .records import (
    BoolArray,
    ChokeMagnetics,
    Fail,
    FloatArray,
    FormerKind,
    IntArray,
    OptionRows,
    RowArrays,
    WireKind,
    flag,
)
from .requirement import Requirement
from .steps import FormerRows, MaterialRows, ThermalModel


@dataclass(frozen=True, slots=True)
class CoreRows(RowArrays):
    """Every core choice's numbers as arrays (index = core choice), or per row after ``take``."""
    former: FormerRows
    material: IntArray           # index into the context's MaterialRows
    ae_m2: FloatArray
    le_m: FloatArray
    ve_m3: FloatArray
    surface_m2: FloatArray
    r_th_k_w: FloatArray         # the core's measured still-air thermal resistance; NaN: McLyman's surface rule
    available_m: FloatArray      # build height available
    mu_working: FloatArray
    mu_initial: FloatArray
    fringe_window_m: FloatArray  # window breadth along the leg (McLyman's fringing G)
    price: FloatArray            # core + bobbin per unit
    mass_kg: FloatArray
    bobbin_class_c: FloatArray   # inf-like for a toroid
    layer_tape_m: FloatArray     # x the tape factor (2 on a toroid: half-lapped)
    winding_tape_m: FloatArray
    outer_wrap_m: FloatArray
    margin_m: FloatArray
    pins: FloatArray
    length_m: FloatArray         # fixed outline (not a toroid), sorted largest first
    width_m: FloatArray
    height_m: FloatArray
    fixed_outline: BoolArray


def core_rows(choices: list[CoreChoice], cat: Catalog, mindex: dict[str, int]) -> CoreRows:
    """The core table: one entry per core choice."""
    n = len(choices)
    z = np.zeros
    fm = FormerRows(kind=z(n, dtype=np.int8), tube_width_m=z(n), tube_depth_m=z(n), breadth_m=z(n), od_m=z(n),
                    id_m=z(n), core_height_m=z(n))
    ct = CoreRows(former=fm, material=z(n, dtype=np.int64), ae_m2=z(n), le_m=z(n), ve_m3=z(n), surface_m2=z(n),
                  r_th_k_w=np.array([np.nan if c.core.thermal_resistance_k_w is None else c.core.thermal_resistance_k_w
                                     for c in choices], dtype=np.float64),
                  available_m=z(n), mu_working=z(n), mu_initial=z(n), fringe_window_m=z(n), price=z(n),
                  mass_kg=z(n), bobbin_class_c=z(n), layer_tape_m=z(n), winding_tape_m=z(n), outer_wrap_m=z(n),
                  margin_m=z(n), pins=z(n), length_m=z(n), width_m=z(n), height_m=z(n),
                  fixed_outline=np.ones(n, dtype=bool))
    for i, c in enumerate(choices):
        p, f = c.parts, c.parts.former
        fm.kind[i] = FormerKind.of(f.kind)
        fm.tube_width_m[i], fm.tube_depth_m[i], fm.breadth_m[i] = f.tube_width_m, f.tube_depth_m, f.breadth_m
        fm.od_m[i], fm.id_m[i], fm.core_height_m[i] = f.od_m, f.id_m, f.core_height_m
        ct.ae_m2[i], ct.le_m[i], ct.ve_m3[i], ct.surface_m2[i] = p.ae_m2, p.le_m, p.ve_m3, p.surface_m2
        ct.available_m[i] = f.height_m
        m = cat.materials[c.core.material]
        ct.material[i] = mindex[c.core.material]
        ct.mu_working[i], ct.mu_initial[i] = m.mu_working, m.mu_initial
        ct.fringe_window_m[i] = p.window_breadth_m
        price = float(c.core.price) * (c.mass_kg if c.core.price_unit == "kg" else 1.0)
        ct.price[i] = price + (float(c.bobbin.price) if c.bobbin is not None else 0.0)
        ct.mass_kg[i] = c.mass_kg
        ct.bobbin_class_c[i] = c.bobbin.thermal_class_c if c.bobbin is not None else 1e9
        toroid = f.kind == "toroid"
        tf = tape_factor(f)             # the engine's: tape half-lapped on a toroid
        ct.layer_tape_m[i] = c.plan.layer_tape_m * tf
        ct.winding_tape_m[i] = c.plan.winding_tape_m * tf
        ct.outer_wrap_m[i] = c.plan.outer_wrap_m * tf
        ct.margin_m[i] = 0.0 if toroid else c.plan.margin_m
        ct.pins[i] = len(c.bobbin.pins) if c.bobbin is not None else 1e9
        if c.core.is_toroid:
            ct.fixed_outline[i] = False
        else:
            a, b, h = outline_m(c.core, c.stack_m, 0.0)
            ct.length_m[i], ct.width_m[i], ct.height_m[i] = float(a), float(b), float(h)
    return ct


@dataclass(frozen=True, slots=True)
class RowBlock:
    """Core choices that take the same wire options: bobbin cores every option, toroids no foil or strip
    (one turn per layer is a bobbin build)."""
    cores: IntArray
    options: tuple[IntArray, ...]    # per option group


@dataclass(frozen=True, slots=True)
class PowderTable:
    """Powder cores' turns and flux from the DC-bias roll-off (independent of temperature), per core choice."""
    turns: FloatArray
    inductance_h: FloatArray
    b_pk_t: FloatArray
    b_max_t: FloatArray
    ceiling_t: FloatArray     # the B the DC-bias curve tends to (``kernel.powder_ceiling_t``); inf: not a powder
    inductance_peak_h: FloatArray   # the small-signal inductance at the peak current (the engine's inductance_at_peak)


class SearchContext:
    """Everything the row evaluation reads: requirement constants, core table, wire option tables."""

    def __init__(self, req: Requirement, cat: Catalog, choices: list[CoreChoice], groups: list[int],
                 options: list[list[WireOption]]):
        self.req, self.cat, self.choices = req, cat, choices
        self.groups = groups                  # per winding (build order): its option group index
        self.options = options                # per group: the WireOptions
        self.option_tables = [option_rows(o, cat) for o in options]
        shop = cat.shop
        self.t0_hot_c = first_guess_hot_c(req, cat)
        self.spec = replace_core(req, choices[0])     # the requirement as a real Spec (its operating point)
        self.thermal = ThermalModel(req.ambient_c, K.cooling_model(req.cooling, req.air_speed_m_s, shop.cooling),
                                    shop.hotspot_margin_k)
        names = sorted({c.core.material for c in choices})
        self.materials = MaterialRows.of([cat.materials[m] for m in names])
        self.cores = core_rows(choices, cat, {m: i for i, m in enumerate(names)})
        self.bulge = shop.bulge_factor
        self.lead_m = shop.lead_length_m
        self.harmonics = K.current_harmonics(req.core_waveform)
        self.core_flags = np.zeros(len(choices), dtype=np.int64)
        self.blocks = self._blocks()
        self.np0: FloatArray = np.zeros(len(choices))
        self.vp = self.vp_max = self.p_out = 0.0
        self.choke: ChokeSetup | None = None
        if req.kind == "transformer":
            p = req.primary
            self.vp, self.vp_max = p.voltage_v, p.voltage_max_v or p.voltage_v
            self.p_out = req.output_va
            mi = self.cores.material
            limit = self.flux_limit_t(mi, self.t0_hot_c)
            turns = K.turns_for_voltage(self.vp_max, req.frequency_hz, self.swing_t(limit, mi), self.cores.ae_m2,
                                        req.waveform, req.duty)
            self.np0 = np.asarray(K.whole_turns(turns), dtype=np.float64)
            self.core_flags |= flag(self.cores.pins < 2 * len(req.windings), Fail.PINS)
        else:
            self.choke = ChokeSetup(self)

    def _blocks(self) -> list[RowBlock]:
        tor = self.cores.former.kind == FormerKind.TOROID
        out = []
        for mask, no_flat in ((~tor, False), (tor, True)):
            cores = np.flatnonzero(mask)
            if not cores.size:
                continue
            opts = []
            for t in self.option_tables:
                flat = (t.kind == WireKind.FOIL) | (t.kind == WireKind.STRIP)
                opts.append(np.flatnonzero(~flat) if no_flat else np.arange(t.size))
            if all(o.size for o in opts):
                out.append(RowBlock(cores, tuple(opts)))
        return out

    def flux_limit_t(self, mi: IntArray, temp_c: FloatArray | float) -> FloatArray:
        return self.materials.flux_limit_t(mi, temp_c, self.cat.shop.flux_limit_fraction, self.req.flux_limit_t,
                                           self.cat.shop.powder_saturation_fraction)

    def swing_t(self, limit: FloatArray, mi: IntArray) -> FloatArray:
        """The usable flux swing (``kernel.unipolar_swing_t``: a unipolar pulse less B_r)."""
        return np.asarray(K.unipolar_swing_t(limit, self.materials.b_r_t[mi], self.req.waveform), dtype=np.float64)

    def magnetizing_a(self, lm_h: FloatArray) -> FloatArray:
        """RMS magnetizing current at the nominal primary voltage (``kernel.magnetizing_current_a``)."""
        rms, _pk = K.magnetizing_current_a(self.vp, self.req.frequency_hz, lm_h, self.req.waveform, self.req.duty)
        return np.asarray(rms, dtype=np.float64)


class ChokeSetup:
    """A choke's currents (the engine's ``kinds.inductor.currents`` of the requirement's spec), the powder cores'
    roll-off turns, and every core's magnetics at the first-guess temperature."""

    def __init__(self, ctx: SearchContext):
        from ..design.kinds.inductor import currents

        cat, cores = ctx.cat, ctx.cores
        assert ctx.spec.inductor is not None
        self.currents = c = currents(ctx.spec.inductor, ctx.req.frequency_hz)
        self.powder = np.array([cat.materials[ch.core.material].is_powder for ch in ctx.choices], dtype=bool)
        self.gappable = np.array([ch.core.gappable for ch in ctx.choices], dtype=bool)
        # the draft spec asks a centre gap, which laminations make a spacer (``kernel.gap_arrangement_on``)
        self.gaps = np.array([K.gaps_in_series(K.gap_arrangement_on("centre", ch.core.shape)) for ch in ctx.choices],
                             dtype=float)
        n = len(ctx.choices)
        self.pow = PowderTable(np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n), np.full(n, np.inf), np.zeros(n))
        ae, le, mu = cores.ae_m2, cores.le_m, cores.mu_initial
        for i in np.flatnonzero(self.powder):
            m = cat.materials[ctx.choices[i].core.material]
            a, b, cc = m.bias_fit()
            sizing = K.powder_sizing_currents_a(c.i_dc, c.i_op_pk, c.ac)
            found = K.powder_turns_and_inductance(c.target_h, sizing, ae[i], le[i], mu[i], a, b, cc)
            if found is None:
                ctx.core_flags[i] |= Fail.GAP
                found = (1, float(permeability.powder_inductance_h(1, ae[i], le[i], mu[i], sizing[1], a, b, cc)))
            nn = found[0]
            self.pow.turns[i], self.pow.inductance_h[i] = found
            self.pow.inductance_peak_h[i] = permeability.powder_inductance_h(nn, ae[i], le[i], mu[i], c.i_pk, a, b, cc)
            self.pow.b_max_t[i] = K.powder_flux_t(nn, c.i_pk, le[i], mu[i], a, b, cc)
            self.pow.b_pk_t[i] = K.powder_flux_t(nn, c.i_op_pk, le[i], mu[i], a, b, cc)
            self.pow.ceiling_t[i] = K.powder_ceiling_t(mu[i], a, b, cc)
        self.mag0 = choke_magnetics(ctx, self, np.arange(n), np.full(n, ctx.t0_hot_c))
        tol = cat.shop.tolerances["inductance"]
        ctx.core_flags |= flag(self.mag0.inductance_h < c.target_h * (1 - tol), Fail.INDUCTANCE)
        # the spec's least inductance at the peak current (the engine's inductance-at-peak check): a powder's
        # rolled off along its curve, a gapped core's the built one
        need = ctx.spec.inductor.inductance_min_h
        if need is not None:
            at_peak = np.where(self.powder, self.pow.inductance_peak_h, self.mag0.inductance_h)
            ctx.core_flags |= flag(at_peak < need, Fail.INDUCTANCE)
        ctx.core_flags |= flag(cores.pins < 2, Fail.PINS)


def choke_magnetics(ctx: SearchContext, ch: ChokeSetup, ci: IntArray, temp_c: FloatArray) -> ChokeMagnetics:
    """Turns, gap, inductance, flux and ripple core loss for rows (core ``ci`` at hot spot ``temp_c``), as the
    engine's inductor: powder by roll-off; an ungappable core without a gap (``kernel.turns_for_inductance``);
    a gappable one by the energy method (``kernel.gapped_turns_and_gap``)."""
    cr, c = ctx.cores, ch.currents
    ci = np.asarray(ci, dtype=np.int64)
    ae, le, mu, g = cr.ae_m2[ci], cr.le_m[ci], cr.mu_working[ci], cr.fringe_window_m[ci]
    gaps = ch.gaps[ci]
    turns, lg = np.ones(ci.size), np.zeros(ci.size)
    powder = ch.powder[ci]
    s = np.flatnonzero(~powder & ~ch.gappable[ci])
    if s.size:
        turns[s] = K.turns_for_inductance(c.target_h, ae[s], le[s], mu[s], 0.0, g[s])
    gi = np.flatnonzero(~powder & ch.gappable[ci])
    if gi.size:
        limit = ctx.flux_limit_t(cr.material[ci[gi]], np.asarray(temp_c)[gi])
        nn, gp = K.gapped_turns_and_gap(c.target_h, c.i_pk, limit, ae[gi], le[gi], mu[gi], g[gi], gaps=gaps[gi])
        turns[gi], lg[gi] = nn, gp
    l_built = np.asarray(gapmod.inductance_gapped_h(turns, ae, le, mu, lg, g, gaps), dtype=np.float64)
    b_pk = np.asarray(gapmod.b_peak_from_inductance_t(l_built, c.i_op_pk, turns, ae), dtype=np.float64)
    b_max = np.asarray(gapmod.b_peak_from_inductance_t(l_built, c.i_pk, turns, ae), dtype=np.float64)
    p = np.flatnonzero(powder)
    if p.size:
        pc = ci[p]
        turns[p], l_built[p] = ch.pow.turns[pc], ch.pow.inductance_h[pc]
        b_pk[p], b_max[p] = ch.pow.b_pk_t[pc], ch.pow.b_max_t[pc]
    delta_b = np.asarray(K.ripple_flux_t(l_built, c.ripple, turns, ae), dtype=np.float64)
    pv = ctx.materials.core_loss_w_m3(cr.material[ci], delta_b, ctx.req.frequency_hz, "ripple", ctx.req.duty)
    return ChokeMagnetics(turns=turns, gap_m=lg, inductance_h=l_built, b_pk_t=b_pk, b_max_t=b_max,
                          delta_b_t=delta_b, core_loss_w_m3=pv)


def winding_margin(ctx: SearchContext, j: int, opt: OptionRows, margin: FloatArray) -> FloatArray:
    """The creepage margin of winding ``j``: none for triple-insulated load windings of a reinforced
    transformer (the wire carries the insulation)."""
    if ctx.req.kind == "transformer" and ctx.req.rating == "reinforced" and j > 0:
        return np.where(opt.kind == WireKind.TIW, 0.0, margin)
    return margin

