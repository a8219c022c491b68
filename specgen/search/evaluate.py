"""The vectorised model over rows: the engine's order of work applied to arrays (see the package docstring
for where it follows the engine exactly and where it is simplified for screening and ranking)."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..design import kernel as K
from ..physics import faraday
from .candidates import outline_m
from .context import SearchContext, choke_magnetics, winding_margin
from .records import (
    BoolArray,
    BuildRows,
    ChokeMagnetics,
    Fail,
    FloatArray,
    IntArray,
    OptionRows,
    RowResult,
    SectionRows,
    flag,
)
from .steps import resistance_ohm, section_ac_factor_rows, skin_depth_m, wind_section_rows

FIT_SLACK = 0.03           # the vector stage keeps rows within 3 % of fitting / 3 K of a limit for the
TEMP_SLACK_K = 3.0         # engine to decide (its model is the finer one)
DROP_PASSES = 12           # passes of the secondary-turns compensation (the engine's own count, unnamed there)
SCAN_MAX_RATIO = 3.0       # the engine scans primary turns up to this multiple of the Faraday turns (unnamed there)
SATURATION_SLACK = 1.0005  # the engine's saturation check allows this much over the limit (unnamed there)


def option_rows_of(ctx: SearchContext, oi: list[IntArray]) -> list[OptionRows]:
    """Each winding's option arrays for the rows (``oi``: option index per group)."""
    return [ctx.option_tables[g].take(oi[g]) for g in ctx.groups]


def build_rows(ctx: SearchContext, ci: IntArray, opts: list[OptionRows], turns: list[FloatArray],
               first: SectionRows | None = None) -> BuildRows:
    """Lay out every winding in build order (one section each), as the engine's ``lay_out``. ``first``: the
    first winding's section when it is already laid (it starts on the former whatever follows it)."""
    c = ctx.cores
    fm = c.former.take(ci)
    avail = c.available_m[ci]
    limit = (avail * (1.0 + FIT_SLACK) + 1e-12) / ctx.bulge
    lt, wt, wrap, margin = c.layer_tape_m[ci], c.winding_tape_m[ci], c.outer_wrap_m[ci], c.margin_m[ci]
    h = np.zeros(len(ci))
    ok = np.ones(len(ci), dtype=bool)
    secs = []
    last = len(opts) - 1
    for j, (opt, n) in enumerate(zip(opts, turns)):
        if j == 0 and first is not None:
            sec = first
        else:
            sec = wind_section_rows(fm, n, opt, h, winding_margin(ctx, j, opt, margin), lt, limit)
        ok &= sec.ok
        h = sec.end_build_m + (wrap if j == last else wt)
        secs.append(sec)
    bulged = h * ctx.bulge
    return BuildRows(sections=tuple(secs), height_m=h, ok=ok, fits=ok & (bulged <= avail + 1e-12),
                     fits_slack=ok & (bulged <= avail * (1.0 + FIT_SLACK) + 1e-12),
                     fill=bulged / np.maximum(avail, 1e-12))


@dataclass(frozen=True, slots=True)
class Tally:
    """Flags (strict and with the slack), mass, cost and outline volume of evaluated rows."""
    flags: IntArray
    flags_slack: IntArray
    mass_kg: FloatArray
    cost: FloatArray
    size_m3: FloatArray


def _outline_flags(ctx: SearchContext, ci: IntArray, build: BuildRows) -> tuple[IntArray, FloatArray]:
    req, c = ctx.req, ctx.cores
    a, b, h = c.length_m[ci].copy(), c.width_m[ci].copy(), c.height_m[ci].copy()
    tor = np.flatnonzero(~c.fixed_outline[ci])
    for i in np.unique(ci[tor]):          # a toroid's outline grows with its own build
        sel = tor[ci[tor] == i]
        a[sel], b[sel], h[sel] = outline_m(ctx.choices[int(i)].core, None, build.height_m[sel] * ctx.bulge)
    out = np.zeros(ci.size, dtype=np.int64)
    lim = req.limits
    for top, dim in ((lim.max_length_m, a), (lim.max_width_m, b), (lim.max_height_m, h)):
        if top is not None:
            out |= flag(dim > top + 1e-12, Fail.SIZE)
    return out, a * b * h


def tally(ctx: SearchContext, ci: IntArray, opts: list[OptionRows], build: BuildRows, hot_c: FloatArray,
          rise_k: FloatArray, sat_flags: IntArray) -> Tally:
    req, c = ctx.req, ctx.cores
    base = ctx.core_flags[ci] | sat_flags
    cls = c.bobbin_class_c[ci].copy()
    for opt in opts:
        cls = np.minimum(cls, opt.class_c)
    copper_mass = np.zeros(len(ci))
    wire_cost = np.zeros(len(ci))
    for opt, sec in zip(opts, build.sections):
        m = opt.mass_per_m_kg * (sec.length_m + 2.0 * ctx.lead_m)
        copper_mass += m
        wire_cost += m * opt.price_per_kg
    mass = c.mass_kg[ci] + copper_mass
    if req.limits.max_mass_kg is not None:
        base = base | flag(mass > req.limits.max_mass_kg, Fail.MASS)
    size_flags, size = _outline_flags(ctx, ci, build)
    base = base | size_flags
    out = []
    for slack, fits in ((0.0, build.fits), (TEMP_SLACK_K, build.fits_slack)):
        fl = base | flag(~fits, Fail.FIT)
        fl |= flag(hot_c > req.insulation_class_c + slack, Fail.HOT)
        if req.max_rise_k is not None:
            fl |= flag(rise_k > req.max_rise_k + slack, Fail.RISE)
        fl |= flag(cls + slack < hot_c, Fail.CLASS)
        out.append(fl)
    return Tally(out[0], out[1], mass, c.price[ci] + wire_cost, size)


def core_alone_ok(ctx: SearchContext, core_w: FloatArray, surface: FloatArray, r_th: FloatArray) -> BoolArray:
    """Rows whose core loss alone leaves the hot spot and the rise within the limits (with the slack):
    copper only adds to it, so the others are too hot whatever the winding."""
    hot, rise = ctx.thermal.state(core_w, surface, r_th)
    ok = hot <= ctx.req.insulation_class_c + TEMP_SLACK_K
    if ctx.req.max_rise_k is not None:
        ok &= rise <= ctx.req.max_rise_k + TEMP_SLACK_K
    return np.asarray(ok)


@dataclass(frozen=True, slots=True)
class Settled:
    copper_w: FloatArray
    core_w: FloatArray
    hot_c: FloatArray
    rise_k: FloatArray


def thermal_loop(ctx: SearchContext, copper: Callable[[FloatArray], FloatArray], core_w: FloatArray,
                 surface: FloatArray, r_th: FloatArray, hot: FloatArray, mi: IntArray,
                 extra: Callable[[FloatArray, BoolArray], None] | None = None) -> Settled:
    """The engine's thermal loop, row by row: the hot spot from the loss, the loss again at that hot spot,
    until a row's hot spot moves less than ``THERMAL_SETTLED_K`` (that row then stops, as the engine stops a design).
    ``copper(hot)`` gives every row's copper loss; ``core_w`` is the core loss at the fit's minimum, taken at
    the core's temperature (the hot spot less the shop's margin) by the material's factor, as the engine
    (``design.temperature``); ``extra(total_w, active)`` updates state between steps."""
    hot = np.array(hot, dtype=float)
    rows = hot.size
    margin = ctx.thermal.hotspot_margin_k

    def core(h: FloatArray) -> FloatArray:
        return core_w * ctx.materials.core_loss_factor(mi, h - margin)

    cu = copper(hot)
    co = core(hot)
    rise = np.zeros(rows)
    active = np.ones(rows, dtype=bool)
    for _ in range(K.THERMAL_MAX_PASSES):
        new, new_rise = ctx.thermal.state(cu + co, surface, r_th)
        if extra is not None:
            extra(cu + co, active)
        settled = np.abs(new - hot) < K.THERMAL_SETTLED_K
        hot = np.where(active, new, hot)
        rise = np.where(active, new_rise, rise)
        cu = np.where(active, copper(hot), cu)
        co = np.where(active, core(hot), co)
        active &= ~settled
        if not active.any():
            break
    return Settled(cu, co, hot, rise)


# ------------------------------------------------------------------------------------------------ transformer

def eval_transformer(ctx: SearchContext, ci: IntArray, oi: list[IntArray], np_: FloatArray,
                     t_start: FloatArray | float, eta_start: FloatArray | float | None = None) -> RowResult:
    """One pass of the transformer model over rows at primary turns ``np_``; secondary turns and the AC
    factor at ``t_start`` and the efficiency ``eta_start`` (per row; default the requirement's guess), then
    the thermal loop. Rows whose primary alone cannot be wound, or already outgrows the window, are marked
    not fitting and skip the rest."""
    rows = len(ci)
    g0 = ctx.groups[0]
    first = build_rows(ctx, ci, [ctx.option_tables[g0].take(oi[g0])], [np_])
    sec = first.sections[0]
    avail = ctx.cores.available_m[ci]
    alive = sec.ok & (sec.end_build_m * ctx.bulge <= avail * (1.0 + FIT_SLACK) + 1e-12) & (np_ <= K.MAX_TURNS)
    t_start = np.broadcast_to(np.asarray(t_start, dtype=float), (rows,))
    eta = np.broadcast_to(np.asarray(ctx.req.efficiency_guess if eta_start is None else eta_start, dtype=float),
                          (rows,))
    if alive.all():
        return _transformer_rows(ctx, ci, oi, np_, t_start, eta, sec)
    fill = np.where(sec.ok, sec.end_build_m * ctx.bulge / np.maximum(avail, 1e-12), np.inf)
    out = RowResult.unevaluated(rows, len(ctx.req.windings), ctx.core_flags[ci] | Fail.FIT, fill,
                                np.asarray(np_, dtype=float).copy())
    a = np.flatnonzero(alive)
    if a.size:
        out.put(a, _transformer_rows(ctx, ci[a], [o[a] for o in oi], np_[a], t_start[a], eta[a], sec.take(a)))
    return out


def _secondary_turns(ctx: SearchContext, ci: IntArray, opts: list[OptionRows], np_: FloatArray,
                     t_start: FloatArray, primary: SectionRows) -> tuple[list[FloatArray], BuildRows]:
    """Secondary turns raised for the resistive drop at full load, as the engine (up to ``DROP_PASSES``
    passes; only the rows that changed are laid out again); matched windings take the larger count."""
    windings = ctx.req.windings
    loads = [j for j, w in enumerate(windings) if w.role != "primary"]
    turns = [np_.copy() if w.role == "primary" else np.asarray(K.secondary_turns_for_voltage(np_, ctx.vp, w.voltage_v))
             for w in windings]
    by_name = {w.name: j for j, w in enumerate(windings)}
    build = build_rows(ctx, ci, opts, turns, primary)
    todo = np.arange(len(ci))
    for _ in range(DROP_PASSES):
        ok_t = build.ok[todo]
        lengths = [s.length_m[todo] + 2.0 * ctx.lead_m for s in build.sections]
        tt = [t[todo] for t in turns]
        np_t, ts = np_[todo], t_start[todo]
        rp = resistance_ohm(opts[0], lengths[0], ts, todo)
        # the primary carries every load's current referred through its ratio: its drop is shared (engine)
        i_ref = sum(windings[j].load_current_a * tt[j] / np_t for j in loads)
        v_prim = ctx.vp - i_ref * rp
        changed = np.zeros(todo.size, dtype=bool)
        for j in loads:
            w = windings[j]
            rs = resistance_ohm(opts[j], lengths[j], ts, todo)
            v_loaded = K.loaded_output_v(tt[j] / np_t, v_prim, w.load_current_a, rs)
            need = ok_t & (v_loaded < w.voltage_v - 1e-9) & (tt[j] <= K.MAX_TURNS)
            add = K.secondary_turns_to_add(w.voltage_v, v_loaded, v_prim / np_t)
            tt[j] = np.where(need, tt[j] + add, tt[j])
            changed |= need
        for j in loads:
            if windings[j].same_turns_as:
                k = by_name[str(windings[j].same_turns_as)]
                mx = np.maximum(tt[j], tt[k])
                changed |= (tt[j] != mx) | (tt[k] != mx)
                tt[j], tt[k] = mx, mx.copy()
        for j in range(len(turns)):
            turns[j][todo] = tt[j]
        todo = todo[changed]
        if not todo.size:
            break
        build.put(todo, build_rows(ctx, ci[todo], [o.take(todo) for o in opts], [t[todo] for t in turns],
                                   build.sections[0].take(todo)))
    return turns, build


def _section_frs(ctx: SearchContext, ci: IntArray, opts: list[OptionRows], build: BuildRows,
                 turns: list[FloatArray], ip: FloatArray, live: IntArray, delta: FloatArray) -> list[FloatArray]:
    """Each winding's AC factor from the MMF across the build (primary +, loads -), only on ``live`` rows."""
    rows = ip.size
    mmf = np.zeros(rows)
    frs = []
    fm = ctx.cores.former.take(ci[live])
    lt = ctx.cores.layer_tape_m[ci[live]]
    for j, (w, opt, sec) in enumerate(zip(ctx.req.windings, opts, build.sections)):
        cur = ip if w.role == "primary" else np.full(rows, -w.load_current_a)
        fr = np.ones(rows)
        if live.size:
            fr[live] = section_ac_factor_rows(opt.take(live), fm, sec.take(live), turns[j][live], lt, delta[live],
                                              mmf[live], cur[live], ctx.harmonics)
        frs.append(fr)
        mmf = mmf + turns[j] * cur
    return frs


def _transformer_rows(ctx: SearchContext, ci: IntArray, oi: list[IntArray], np_: FloatArray,
                      t_start: FloatArray, eta: FloatArray, primary: SectionRows) -> RowResult:
    req, c = ctx.req, ctx.cores
    f = req.frequency_hz
    rows = len(ci)
    opts = option_rows_of(ctx, oi)
    t_start = np.array(t_start, dtype=float)
    ae, mi, surface = c.ae_m2[ci], c.material[ci], c.surface_m2[ci]
    imag = ctx.magnetizing_a(np.asarray(faraday.magnetizing_inductance_h(np_, ae, c.le_m[ci], c.mu_working[ci])))
    turns, build = _secondary_turns(ctx, ci, opts, np_, t_start, primary)
    lengths = [s.length_m + 2.0 * ctx.lead_m for s in build.sections]
    ip = np.asarray(K.primary_current_a(ctx.p_out, eta, ctx.vp, imag))
    b_pk = np.asarray(faraday.b_peak_t(ctx.vp, f, np_, ae, req.waveform, req.duty))
    core_w = ctx.materials.core_loss_w_m3(mi, b_pk, f, req.waveform, req.duty) * c.ve_m3[ci]
    # the AC factor only where it can matter: rows that fit and that the core loss alone does not overheat
    live = np.flatnonzero(build.fits_slack & core_alone_ok(ctx, core_w, surface, c.r_th_k_w[ci]))
    frs = _section_frs(ctx, ci, opts, build, turns, ip, live, skin_depth_m(f, t_start))
    b_pk_max = np.asarray(faraday.b_peak_t(ctx.vp_max, f, np_, ae, req.waveform, req.duty))
    primary_a = [ip]

    def copper(hot: FloatArray) -> FloatArray:
        total = np.zeros(rows)
        for w, opt, length, fr in zip(req.windings, opts, lengths, frs):
            i = primary_a[0] if w.role == "primary" else w.load_current_a
            total += K.copper_loss_w(resistance_ohm(opt, length, hot), fr, i)
        return total

    def efficiency(total_w: FloatArray, active: BoolArray) -> None:
        eta = ctx.p_out / (ctx.p_out + total_w)
        primary_a[0] = np.where(active, K.primary_current_a(ctx.p_out, eta, ctx.vp, imag), primary_a[0])

    th = thermal_loop(ctx, copper, core_w, surface, c.r_th_k_w[ci], t_start.copy(), mi, efficiency)
    limit = ctx.swing_t(ctx.flux_limit_t(mi, th.hot_c), mi)
    sat = flag(b_pk_max > limit * SATURATION_SLACK, Fail.SAT)
    if req.waveform == "unipolar":
        bsat = ctx.materials.b_sat_t(mi, th.hot_c)
        sat |= flag(b_pk_max + ctx.materials.b_r_t[mi] > bsat, Fail.SAT)
    for t in turns:       # the engine refuses more turns than it winds
        sat |= flag(t > K.MAX_TURNS, Fail.FIT)
    tl = tally(ctx, ci, opts, build, th.hot_c, th.rise_k, sat)
    return RowResult(flags=tl.flags, flags_slack=tl.flags_slack, total_w=th.copper_w + th.core_w,
                     copper_w=th.copper_w, core_w=th.core_w, hot_c=th.hot_c, rise_k=th.rise_k, fill=build.fill,
                     mass_kg=tl.mass_kg, cost=tl.cost, size_m3=tl.size_m3, primary_turns=np.asarray(np_, dtype=float).copy(),
                     b_pk_max_t=b_pk_max, b_limit_t=limit, turns=np.stack(turns), length_m=np.stack(lengths),
                     fr=np.stack(frs), gap_m=np.zeros(rows))


# ------------------------------------------------------------------------------------------------ choke

def eval_choke(ctx: SearchContext, ci: IntArray, oi: list[IntArray], mag: ChokeMagnetics,
               t_start: FloatArray | float) -> RowResult:
    """One pass of the choke model over rows with magnetics ``mag`` (per row); AC factor at ``t_start``."""
    req, c = ctx.req, ctx.cores
    ch = ctx.choke
    assert ch is not None
    rows = len(ci)
    opts = [ctx.option_tables[0].take(oi[0])]
    n = mag.turns
    start = np.broadcast_to(np.asarray(t_start, dtype=float), (rows,)).copy()
    build = build_rows(ctx, ci, opts, [n])
    sec = build.sections[0]
    length = sec.length_m + 2.0 * ctx.lead_m
    core_w = mag.core_loss_w_m3 * c.ve_m3[ci]
    fr = np.ones(rows)
    live = np.flatnonzero(build.fits_slack & core_alone_ok(ctx, core_w, c.surface_m2[ci], c.r_th_k_w[ci]))
    cur = ch.currents
    if live.size:
        delta = skin_depth_m(req.frequency_hz, start)
        fr[live] = section_ac_factor_rows(opts[0].take(live), c.former.take(ci[live]), sec.take(live), n[live],
                                          c.layer_tape_m[ci[live]], delta[live], np.zeros(live.size), cur.i_rms,
                                          ctx.harmonics)

    def copper(hot: FloatArray) -> FloatArray:
        return np.asarray(K.copper_loss_w(resistance_ohm(opts[0], length, hot), fr, cur.i_ac, cur.i_dc),
                          dtype=np.float64)

    th = thermal_loop(ctx, copper, core_w, c.surface_m2[ci], c.r_th_k_w[ci], start, c.material[ci])
    bsat = ctx.materials.b_sat_t(c.material[ci], th.hot_c)
    # a powder saturates where the engine's check says (``kernel.powder_saturation_t``), short of B_sat
    bsat = np.where(ch.powder[ci], np.asarray(K.powder_saturation_t(bsat, ctx.cat.shop.powder_saturation_fraction,
                                                                      ch.pow.ceiling_t[ci]), dtype=np.float64), bsat)
    sat = flag(mag.b_max_t > bsat, Fail.SAT) | flag(n > K.MAX_TURNS, Fail.FIT)
    tl = tally(ctx, ci, opts, build, th.hot_c, th.rise_k, sat)
    return RowResult(flags=tl.flags, flags_slack=tl.flags_slack, total_w=th.copper_w + th.core_w,
                     copper_w=th.copper_w, core_w=th.core_w, hot_c=th.hot_c, rise_k=th.rise_k, fill=build.fill,
                     mass_kg=tl.mass_kg, cost=tl.cost, size_m3=tl.size_m3, primary_turns=n.astype(float).copy(),
                     b_pk_max_t=mag.b_max_t.copy(), b_limit_t=bsat, turns=n.astype(float)[None, :].copy(),
                     length_m=length[None, :], fr=fr[None, :], gap_m=mag.gap_m.copy())


# ------------------------------------------------------------------------------------------------ both

def _least_loss_turns(ctx: SearchContext, ci: IntArray, res: RowResult) -> FloatArray:
    """The least-loss primary turns (``kernel.least_loss_turns``), at most ``SCAN_MAX_RATIO`` n0: the vector
    stage's stand-in for the engine's scan of primary turns."""
    beta = ctx.materials.beta[ctx.cores.material[ci]]
    return np.asarray(K.least_loss_turns(ctx.np0[ci], beta, res.core_w, res.copper_w, SCAN_MAX_RATIO), dtype=float)


def evaluate_rows(ctx: SearchContext, ci: IntArray, oi: list[IntArray], second_pass: bool = True) -> RowResult:
    """The vectorised model over rows (core choice index ``ci``, option index per group ``oi``).

    Pass 1 at the first-guess temperature; where the core loss is a significant share
    (``kernel.core_loss_significant``) a transformer row is also tried at the analytic least-loss primary
    turns; rows that pass (with the slack) are evaluated again with turns, gap and AC factor at the
    temperature pass 1 settled at, as the engine's thermal loop ends."""
    ci = np.asarray(ci, dtype=np.int64)
    oi = [np.asarray(o, dtype=np.int64) for o in oi]
    t0 = ctx.t0_hot_c
    if ctx.choke is None:
        res = eval_transformer(ctx, ci, oi, ctx.np0[ci], t0)
        beta = ctx.materials.beta[ctx.cores.material[ci]]
        scan = np.asarray(K.core_loss_significant(res.core_w, res.copper_w, beta), dtype=bool)
        if scan.any():
            n1 = _least_loss_turns(ctx, ci, res)
            again = np.flatnonzero(scan & ((res.flags_slack & Fail.FIT) == 0) & (n1 > res.primary_turns))
            if again.size:
                sub = eval_transformer(ctx, ci[again], [o[again] for o in oi], n1[again], t0)
                better = ((sub.flags_slack & Fail.FIT) == 0) & (sub.total_w < res.total_w[again])
                res.merge(again, sub, better)
        if second_pass:
            near = np.flatnonzero(res.flags_slack == 0)
            if near.size:
                # as the engine's last pass: the settled hot spot, and the efficiency of the loss before it
                eta = ctx.p_out / (ctx.p_out + res.total_w[near])
                sub = eval_transformer(ctx, ci[near], [o[near] for o in oi], res.primary_turns[near],
                                       res.hot_c[near], eta)
                res.merge(near, sub, np.ones(near.size, dtype=bool))
        return res
    res = eval_choke(ctx, ci, oi, ctx.choke.mag0.take(ci), t0)
    if second_pass:
        near = np.flatnonzero(res.flags_slack == 0)
        if near.size:
            hot = res.hot_c[near]
            sub = eval_choke(ctx, ci[near], [o[near] for o in oi], choke_magnetics(ctx, ctx.choke, ci[near], hot),
                             hot)
            res.merge(near, sub, np.ones(near.size, dtype=bool))
    return res
