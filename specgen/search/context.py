"""What the row evaluation reads: the core choices and wire options as arrays, and the requirement's
constants at the engine's first-guess temperature (primary turns of a transformer, a choke's magnetics)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import cast

import numpy as np

from ..catalog.models import Catalog
from ..physics import faraday, permeability, thermal
from ..physics import gap as gapmod
from ..physics import wire as wiremod
from .candidates import CoreChoice, WireOption, first_guess_hot_c, option_rows, outline_m, replace_core
from .records import (
    BoolArray,
    ChokeMagnetics,
    Fail,
    FloatArray,
    FormerKind,
    FormerRows,
    IntArray,
    OptionRows,
    RowArrays,
    WireKind,
    flag,
)
from .requirement import ChokeDuty, Requirement
from .steps import MaterialRows, ThermalModel, gap_vec, harmonics, turns_for_l_vec


@dataclass(frozen=True, slots=True)
class CoreRows(RowArrays):
    """Every core choice's numbers as arrays (index = core choice), or per row after ``take``."""
    former: FormerRows
    material: IntArray           # index into the context's MaterialRows
    ae_m2: FloatArray
    le_m: FloatArray
    ve_m3: FloatArray
    surface_m2: FloatArray
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
    fm = FormerRows(kind=z(n, dtype=np.int16), tube_width_m=z(n), tube_depth_m=z(n), breadth_m=z(n), od_m=z(n),
                    id_m=z(n), core_height_m=z(n))
    ct = CoreRows(former=fm, material=z(n, dtype=np.int64), ae_m2=z(n), le_m=z(n), ve_m3=z(n), surface_m2=z(n),
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
        tf = 2.0 if toroid else 1.0     # the engine's tape factor: half-lapped tape on a toroid
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


class SearchContext:
    """Everything the row evaluation reads: requirement constants, core table, wire option tables."""

    def __init__(self, req: Requirement, cat: Catalog, choices: list[CoreChoice], groups: list[int],
                 options: list[list[WireOption]]):
        from ..design.engine import MAX_HOT_C, thermal_state

        self.req, self.cat, self.choices = req, cat, choices
        self.groups = groups                  # per winding (build order): its option group index
        self.options = options                # per group: the WireOptions
        self.option_tables = [option_rows(o, cat) for o in options]
        shop = cat.shop
        self.t0_hot_c = first_guess_hot_c(req, cat)
        self.spec = replace_core(req, choices[0])
        # the engine's cooling factor: its rise over McLyman's natural-convection rise for the same loss
        ref = thermal_state(1.0, choices[0].parts, self.spec, cat)
        factor = ref.rise_k / thermal.temperature_rise_k(1.0, choices[0].parts.surface_m2)
        self.thermal = ThermalModel(req.ambient_c, factor, shop.hotspot_margin_k, MAX_HOT_C)
        names = sorted({c.core.material for c in choices})
        self.materials = MaterialRows.of([cat.materials[m] for m in names])
        self.cores = core_rows(choices, cat, {m: i for i, m in enumerate(names)})
        self.bulge = shop.bulge_factor
        self.lead_m = shop.lead_length_m
        self.harmonics = harmonics(req.core_waveform)
        self.core_flags = np.zeros(len(choices), dtype=np.int64)
        self.blocks = self._blocks()
        n = len(choices)
        self.np0: FloatArray = np.zeros(n)
        self.choke: ChokeSetup | None = None
        if req.kind == "transformer":
            p = req.primary
            self.vp, self.vp_max = p.voltage_v, p.voltage_max_v or p.voltage_v
            self.p_out = req.output_va
            mi = self.cores.material
            limit = self.flux_limit_t(mi, self.t0_hot_c)
            turns = faraday.turns_for_voltage(self.vp_max, req.frequency_hz, self.swing_t(limit, mi), self.cores.ae_m2,
                                              req.waveform, req.duty)
            self.np0 = np.maximum(1.0, np.ceil(np.asarray(turns) - 1e-9))
            self.core_flags |= flag(self.cores.pins < 2 * len(req.windings), Fail.PINS)
        else:
            self.choke = ChokeSetup(self, req.duty_of_choke)

    def _blocks(self) -> list[RowBlock]:
        tor = self.cores.former.toroid
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
        return self.materials.flux_limit_t(mi, temp_c, self.cat.shop.flux_limit_fraction, self.req.flux_limit_t)

    def swing_t(self, limit: FloatArray, mi: IntArray) -> FloatArray:
        """A unipolar pulse starts from the residual flux: only B_limit - B_r is usable (the engine)."""
        if self.req.waveform == "unipolar":
            return np.maximum(limit - self.materials.b_r_t[mi], 0.05 * limit)
        return limit

    def magnetizing_a(self, lm_h: FloatArray) -> FloatArray:
        """RMS magnetizing current at the nominal primary voltage (the engine's ``_magnetizing``, which
        broadcasts over an array of inductances)."""
        from ..design.transformer import _magnetizing

        return np.asarray(_magnetizing(self.spec, self.vp, cast(float, lm_h))[0], dtype=float)


class ChokeSetup:
    """A choke's currents, the powder cores' roll-off turns, and every core's magnetics at the first guess."""

    def __init__(self, ctx: SearchContext, duty: ChokeDuty):
        cat, cores = ctx.cat, ctx.cores
        self.duty = duty
        self.i_dc, self.ripple, self.i_ac = duty.current_dc_a, duty.ripple_a, duty.ripple_rms_a
        self.i_op_pk, self.i_pk, self.i_rms = duty.operating_peak_a, duty.peak_a, duty.rms_a
        self.powder = np.array([cat.materials[c.core.material].is_powder for c in ctx.choices], dtype=bool)
        self.gappable = np.array([c.core.gappable for c in ctx.choices], dtype=bool)
        n = len(ctx.choices)
        self.pow = PowderTable(np.zeros(n), np.zeros(n), np.zeros(n), np.zeros(n))
        ae, le, mu = cores.ae_m2, cores.le_m, cores.mu_initial
        for i in np.flatnonzero(self.powder):
            m = cat.materials[ctx.choices[i].core.material]
            a, b, c = m.rolloff_a, m.rolloff_b, m.rolloff_c
            nn = permeability.turns_for_biased_inductance(duty.inductance_h, self.i_dc, ae[i], le[i], mu[i], a, b, c)
            if nn is None:
                ctx.core_flags[i] |= Fail.GAP
                nn = 1
            self.pow.turns[i] = nn
            self.pow.inductance_h[i] = permeability.powder_inductance_h(nn, ae[i], le[i], mu[i], self.i_dc, a, b, c)
            h_pk = nn * self.i_pk / le[i]
            self.pow.b_max_t[i] = wiremod.MU0_H_M * mu[i] * permeability.rolloff_fraction(h_pk, a, b, c) * h_pk
            h_op = nn * self.i_op_pk / le[i]
            self.pow.b_pk_t[i] = wiremod.MU0_H_M * mu[i] * permeability.rolloff_fraction(h_op, a, b, c) * h_op
        self.mag0 = choke_magnetics(ctx, self, np.arange(n), np.full(n, ctx.t0_hot_c))
        tol = cat.shop.tolerances["inductance"]
        ctx.core_flags |= flag(self.mag0.inductance_h < duty.inductance_h * (1 - tol), Fail.INDUCTANCE)
        ctx.core_flags |= flag(cores.pins < 2, Fail.PINS)


def _gapped_turns(ctx: SearchContext, ch: ChokeSetup, ci: IntArray, temp_c: FloatArray
                  ) -> tuple[FloatArray, FloatArray]:
    """Gappable cores: McLyman's energy method (N = L I_pk / (B_limit Ae)), the gap for L with fringing,
    rounded down to the shop's step, and a turn added while the rounded gap pushes B_pk over the limit."""
    from ..design.inductor import GAP_STEP_M

    c = ctx.cores
    target = ch.duty.inductance_h
    ae, le, mu, g = c.ae_m2[ci], c.le_m[ci], c.mu_initial[ci], c.fringe_window_m[ci]
    limit = ctx.flux_limit_t(c.material[ci], temp_c)
    nn = np.maximum(1.0, np.ceil(np.asarray(gapmod.turns_for_peak_b(target, ch.i_pk, limit, ae)) - 1e-9))
    gp = gap_vec(target, nn, ae, le, mu, g)
    none = np.isnan(gp)
    if none.any():
        nn[none] = turns_for_l_vec(target, ae[none], le[none], mu[none], np.zeros(int(none.sum())), g[none])
        gp[none] = np.nan_to_num(gap_vec(target, nn[none], ae[none], le[none], mu[none], g[none]), nan=0.0)
    gp = np.floor(gp / GAP_STEP_M + 1e-6) * GAP_STEP_M
    for _ in range(20):
        l_try = np.asarray(gapmod.inductance_gapped_h(nn, ae, le, mu, gp, g))
        over = np.asarray(gapmod.b_peak_from_inductance_t(l_try, ch.i_pk, nn, ae)) > limit
        if not over.any():
            break
        nn = np.where(over, nn + 1.0, nn)
        re = gap_vec(target, nn[over], ae[over], le[over], mu[over], g[over])
        gp[over] = np.floor(np.nan_to_num(re, nan=0.0) / GAP_STEP_M + 1e-6) * GAP_STEP_M
    return nn, gp


def choke_magnetics(ctx: SearchContext, ch: ChokeSetup, ci: IntArray, temp_c: FloatArray) -> ChokeMagnetics:
    """Turns, gap, inductance, flux and ripple core loss for rows (core ``ci`` at hot spot ``temp_c``), as the
    engine's inductor magnetics: powder by roll-off; an ungappable core without a gap (turns for L); a
    gappable one by the energy method (``_gapped_turns``)."""
    c = ctx.cores
    ci = np.asarray(ci, dtype=np.int64)
    target = ch.duty.inductance_h
    ae, le, mu, g = c.ae_m2[ci], c.le_m[ci], c.mu_initial[ci], c.fringe_window_m[ci]
    turns, lg = np.ones(ci.size), np.zeros(ci.size)
    powder = ch.powder[ci]
    s = np.flatnonzero(~powder & ~ch.gappable[ci])
    if s.size:
        turns[s] = turns_for_l_vec(target, ae[s], le[s], mu[s], np.zeros(s.size), g[s])
    gi = np.flatnonzero(~powder & ch.gappable[ci])
    if gi.size:
        turns[gi], lg[gi] = _gapped_turns(ctx, ch, ci[gi], np.asarray(temp_c)[gi])
    l_built = np.asarray(gapmod.inductance_gapped_h(turns, ae, le, mu, lg, g))
    b_pk = np.asarray(gapmod.b_peak_from_inductance_t(l_built, ch.i_op_pk, turns, ae))
    b_max = np.asarray(gapmod.b_peak_from_inductance_t(l_built, ch.i_pk, turns, ae))
    p = np.flatnonzero(powder)
    if p.size:
        pc = ci[p]
        turns[p], l_built[p] = ch.pow.turns[pc], ch.pow.inductance_h[pc]
        b_pk[p], b_max[p] = ch.pow.b_pk_t[pc], ch.pow.b_max_t[pc]
    delta_b = l_built * ch.ripple / (turns * ae)
    pv = ctx.materials.core_loss_w_m3(c.material[ci], delta_b, ctx.req.frequency_hz, "ripple", ctx.req.duty)
    return ChokeMagnetics(turns=turns, gap_m=lg, inductance_h=l_built, b_pk_t=b_pk, b_max_t=b_max,
                          delta_b_t=delta_b, core_loss_w_m3=pv)


def winding_margin(ctx: SearchContext, j: int, opt: OptionRows, margin: FloatArray) -> FloatArray:
    """The creepage margin of winding ``j``: none for triple-insulated load windings of a reinforced
    transformer (the wire carries the insulation)."""
    if ctx.req.kind == "transformer" and ctx.req.rating == "reinforced" and j > 0:
        return np.where(opt.kind == WireKind.TIW, 0.0, margin)
    return margin

