"""The candidate set: the area-product screen, the wire options per winding, the rows (core choice x one
option per winding) after dropping dominated options, and the vector stage over all of them."""

from __future__ import annotations

import time
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field

import numpy as np

from ..catalog.models import Catalog
from ..design import kernel as K
from ..physics import faraday
from .candidates import (
    CoreChoice,
    WireOption,
    area_product_needed_m4,
    choke_currents,
    core_choices,
    current_density_a_m2,
    heavy_wire_m,
    option_groups,
    wire_options,
)
from .context import SearchContext, winding_margin
from .evaluate import FIT_SLACK, evaluate_rows
from .records import BoolArray, FloatArray, IntArray, RowResult, VectorStage
from .requirement import Requirement
from .steps import resistance_ohm, section_ac_factor_rows, skin_depth_m, wind_section_rows

CHUNK_ROWS = 65536
ROWS_PER_CORE_MAX = 2000
Progress = Callable[[str, int, int], None]


@dataclass(frozen=True, slots=True)
class Screened:
    """A core choice the area-product screen set aside: its Wa Ae against the area product needed [m^4]."""
    choice: CoreChoice
    area_product_m4: float
    needed_m4: float


@dataclass(frozen=True, slots=True)
class RowSet:
    """Every row's core choice index and option index per group (materialised int arrays)."""
    core_index: IntArray
    option_index: tuple[IntArray, ...]
    thinned_cores: int = 0       # core choices whose options were thinned to fronts (see ``_thin``)

    @property
    def size(self) -> int:
        return int(self.core_index.size)


@dataclass
class SearchStats:
    """How much the search looked at and how long each stage took (the ``stats`` of its JSON)."""
    core_choices: int = 0
    screened_out: int = 0
    kept: int = 0
    wire_options: list[int] = field(default_factory=list)
    full_product: int = 0
    prune_s: float = 0.0
    thinned_cores: int = 0
    rows: int = 0
    prepare_s: float = 0.0
    vector_s: float = 0.0
    vector_feasible: int = 0
    scalar_evaluated: int = 0
    scalar_feasible: int = 0
    scalar_s: float = 0.0
    total_s: float = 0.0

    def to_dict(self) -> dict[str, object]:
        from dataclasses import asdict

        return {k: (round(v, 4) if isinstance(v, float) else v) for k, v in asdict(self).items()}


@dataclass(frozen=True, slots=True)
class Prepared:
    """The screen's verdicts, every core choice, and (if anything is left) the context and the rows."""
    context: SearchContext | None
    rows: RowSet
    screened: list[Screened]
    choices: list[CoreChoice]
    stats: SearchStats


def _options(req: Requirement, cat: Catalog, groups: list[int]) -> list[list[WireOption]]:
    density = current_density_a_m2(req, cat)
    heavy = heavy_wire_m(cat)
    if req.choke is not None:
        c = choke_currents(req)
        opts = wire_options(cat, c.i_rms, density, req.frequency_hz, skin_limited=True, allow_tiw=False, heavy_m=heavy)
        if c.i_dc > 0 and c.i_ac / c.i_dc <= K.RIPPLE_SKIN_FRACTION:    # as the engine: the DC-set wires too
            have = {(o.wire.id, o.strands) for o in opts}
            opts += [o for o in wire_options(cat, c.i_rms, density, req.frequency_hz, skin_limited=False,
                                             allow_tiw=False, heavy_m=heavy) if (o.wire.id, o.strands) not in have]
        return [opts]
    options = []
    done: set[int] = set()
    for w, g in zip(req.windings, groups):
        if g in done:
            continue
        done.add(g)
        current = (req.output_va / req.efficiency_guess / req.primary.voltage_v if w.role == "primary"
                   else w.load_current_a)
        options.append(wire_options(cat, current, density, req.frequency_hz, skin_limited=True,
                                    allow_tiw=req.rating == "reinforced" and w.role != "primary", heavy_m=heavy))
    return options


def _no_rows(groups: int) -> RowSet:
    return RowSet(np.zeros(0, dtype=np.int64), tuple(np.zeros(0, dtype=np.int64) for _ in range(groups)))


def prepare(req: Requirement, cat: Catalog, screen: bool = True, prune: bool = True) -> Prepared:
    """Core choices, the area-product screen, the wire options and the rows to evaluate."""
    choices = core_choices(req, cat)
    ap_core = np.array([c.parts.wa_m2 * c.parts.ae_m2 for c in choices])
    need = area_product_needed_m4(req, cat, choices) if choices else np.zeros(0)
    small = (ap_core < need) if screen else np.zeros(len(choices), dtype=bool)
    screened = [Screened(choices[i], float(ap_core[i]), float(need[i])) for i in np.flatnonzero(small)]
    kept = [choices[i] for i in np.flatnonzero(~small)]
    groups = option_groups(req)
    options = _options(req, cat, groups)
    stats = SearchStats(core_choices=len(choices), screened_out=len(screened), kept=len(kept),
                        wire_options=[len(o) for o in options])
    ngroups = len(options)
    if not kept or any(not o for o in options):
        return Prepared(None, _no_rows(ngroups), screened, choices, stats)
    ctx = SearchContext(req, cat, kept, groups, options)
    if not ctx.blocks:
        return Prepared(None, _no_rows(ngroups), screened, choices, stats)
    t = time.perf_counter()
    rows = _enumerate_rows(ctx, prune and req.kind == "transformer")
    stats.full_product = int(sum(b.cores.size * int(np.prod([o.size for o in b.options])) for b in ctx.blocks))
    stats.prune_s = time.perf_counter() - t
    stats.thinned_cores = rows.thinned_cores
    return Prepared(ctx, rows, screened, choices, stats)


def nondominated(x: FloatArray) -> BoolArray:
    """Mask over x[..., points, criteria] (lower is better) of the points no other point dominates (no
    worse in every criterion and not equal in all). Batched over leading axes; one criterion at a time,
    so the work is points^2 booleans per criterion."""
    x = np.asarray(x, dtype=float)
    m = x.shape[-2]
    le = np.ones(x.shape[:-2] + (m, m), dtype=bool)     # le[..., j, i]: j no worse than i everywhere
    eq = np.ones_like(le)
    for k in range(x.shape[-1]):
        xj = x[..., :, None, k]
        xi = x[..., None, :, k]
        le &= xj <= xi
        eq &= xj == xi
    return np.asarray(~(le & ~eq).any(axis=-2))


@dataclass(frozen=True, slots=True)
class _Alone:
    """Each (core, option) of one option group wound alone from the tube (the pre-pass of pruning)."""
    height_m: FloatArray
    loss_w: FloatArray
    cost: FloatArray
    class_c: FloatArray
    fits: BoolArray


def _winding_alone(ctx: SearchContext, g: int, cores: IntArray, opt_idx: IntArray) -> _Alone:
    """Height, copper loss and cost of option group g wound alone on each core at the first-guess
    temperature (turns before the drop compensation)."""
    req, c = ctx.req, ctx.cores
    ci = np.repeat(cores, opt_idx.size)
    opt = ctx.option_tables[g].take(np.tile(opt_idx, cores.size))
    j = ctx.groups.index(g)
    count = ctx.groups.count(g)
    t0 = ctx.t0_hot_c
    if ctx.choke is not None:
        cur = np.full(ci.size, ctx.choke.currents.i_rms)
        turns = ctx.choke.mag0.turns[ci]
    else:
        np_ = ctx.np0[ci]
        w = req.windings[j]
        if w.role == "primary":
            lm = np.asarray(faraday.magnetizing_inductance_h(np_, c.ae_m2[ci], c.le_m[ci], c.mu_working[ci]))
            cur = np.asarray(K.primary_current_a(ctx.p_out, req.efficiency_guess, ctx.vp, ctx.magnetizing_a(lm)))
            turns = np_
        else:
            cur = np.full(ci.size, w.load_current_a)
            turns = np.asarray(K.secondary_turns_for_voltage(np_, ctx.vp, w.voltage_v))
    avail = c.available_m[ci]
    limit = (avail * (1.0 + FIT_SLACK) + 1e-12) / ctx.bulge
    fm = c.former.take(ci)
    sec = wind_section_rows(fm, turns, opt, np.zeros(ci.size), winding_margin(ctx, j, opt, c.margin_m[ci]),
                            c.layer_tape_m[ci], limit)
    length = sec.length_m + 2.0 * ctx.lead_m
    fr = section_ac_factor_rows(opt, fm, sec, turns, c.layer_tape_m[ci], skin_depth_m(req.frequency_hz, t0),
                                np.zeros(ci.size), cur, ctx.harmonics)
    r = resistance_ohm(opt, length, t0)
    if ctx.choke is not None:
        loss = np.asarray(K.copper_loss_w(r, fr, ctx.choke.currents.i_ac, ctx.choke.currents.i_dc), dtype=np.float64)
    else:
        loss = np.asarray(K.copper_loss_w(r, fr, cur), dtype=np.float64)
    fits = sec.ok & (sec.end_build_m <= limit) & (turns <= K.MAX_TURNS)
    return _Alone(np.where(sec.ok, sec.end_build_m, np.inf), loss * count,
                  opt.mass_per_m_kg * length * opt.price_per_kg * count, opt.class_c, fits)


Kept = list[list[IntArray | None]]
Criteria = list[list[FloatArray | None]]


def prune_options(ctx: SearchContext) -> tuple[Kept, Criteria]:
    """Per core choice, per option group: the options no other option of the same winding dominates.

    A winding option that is no taller, no lossier, no dearer and of no lower thermal class than another
    on the same core can only make every design it enters worse (the windings outside it start lower,
    so their turns are shorter): dropping the dominated ones leaves every sort key's best and the
    loss-cost front unchanged (up to the vector model's coupling between windings through efficiency and
    the drop compensation). Options that cannot be wound on the core even alone are dropped too, unless
    none can: then the shortest is kept so the core's failure is still evaluated and reported."""
    per_core: Kept = [[None] * len(ctx.option_tables) for _ in ctx.choices]
    crit: Criteria = [[None] * len(ctx.option_tables) for _ in ctx.choices]
    for block in ctx.blocks:
        cores = block.cores
        for g, idx in enumerate(block.options):
            a = _winding_alone(ctx, g, cores, idx)
            k = idx.size
            shape = (cores.size, k)
            fits = a.fits.reshape(shape)
            x = np.stack([a.height_m, a.loss_w, a.cost, -a.class_c], axis=1).reshape(shape + (4,))
            x = np.where(fits[..., None], x, np.inf)
            height = a.height_m.reshape(shape)
            step = max(1, int(2e7 // max(k * k, 1)))      # bounds the points^2 work per batch
            for c0 in range(0, cores.size, step):
                keep = nondominated(x[c0:c0 + step]) & fits[c0:c0 + step]
                for n in range(keep.shape[0]):
                    sel = np.flatnonzero(keep[n]) if keep[n].any() else np.array([int(np.argmin(height[c0 + n]))])
                    per_core[int(cores[c0 + n])][g] = idx[sel]
                    crit[int(cores[c0 + n])][g] = x[c0 + n][sel]
    return per_core, crit


def _thin(lists: list[IntArray], crit: list[FloatArray], cap: int) -> list[IntArray]:
    """Fewer options per winding when their product on one core exceeds ``cap`` (four or more windings):
    each winding keeps its (height, loss) and (height, cost) fronts; if that is still too many, an even
    spread of them by height. An approximation, used only where the full product would not be evaluated
    in seconds; the search's stats say when it was."""
    out = []
    for idx, x in zip(lists, crit):
        if idx.size > 1 and np.isfinite(x).all():
            keep = nondominated(x[:, [0, 1]]) | nondominated(x[:, [0, 2]])
            idx, x = idx[keep], x[keep]
        out.append((idx, x))
    total = int(np.prod([o[0].size for o in out]))
    if total <= cap:
        return [o[0] for o in out]
    per = max(2, int(cap ** (1.0 / len(out))))
    thinned = []
    for idx, x in out:
        if idx.size > per:
            order = np.argsort(x[:, 0], kind="stable")
            pick = np.unique(np.linspace(0, idx.size - 1, per).round().astype(int))
            idx = idx[order[pick]]
        thinned.append(idx)
    return thinned


def _enumerate_rows(ctx: SearchContext, prune: bool) -> RowSet:
    cis: list[IntArray] = []
    ois: list[list[IntArray]] = [[] for _ in ctx.option_tables]
    thinned = 0
    if prune:
        per_core, crit = prune_options(ctx)
        for c, kept in enumerate(per_core):
            if any(x is None for x in kept):
                continue
            lists = [x for x in kept if x is not None]
            if int(np.prod([x.size for x in lists])) > ROWS_PER_CORE_MAX:
                lists = _thin(lists, [x for x in crit[c] if x is not None], ROWS_PER_CORE_MAX)
                thinned += 1
            grids = np.meshgrid(*lists, indexing="ij")
            cis.append(np.full(grids[0].size, c, dtype=np.int64))
            for g, grid in enumerate(grids):
                ois[g].append(grid.ravel())
    else:
        for block in ctx.blocks:
            grids = np.meshgrid(block.cores, *block.options, indexing="ij")
            cis.append(grids[0].ravel())
            for g, grid in enumerate(grids[1:]):
                ois[g].append(grid.ravel())
    if not cis:
        return _no_rows(len(ois))
    return RowSet(np.concatenate(cis), tuple(np.concatenate(o) for o in ois), thinned)


def total_rows(prep: Prepared) -> int:
    return prep.rows.size


def iter_chunks(rows: RowSet, chunk: int = CHUNK_ROWS) -> Iterator[tuple[IntArray, list[IntArray]]]:
    """(core choice index, [option index per group]) arrays over every row, in chunks."""
    for start in range(0, rows.size, chunk):
        sl = slice(start, start + chunk)
        yield rows.core_index[sl], [o[sl] for o in rows.option_index]


def run_vector_stage(prep: Prepared, progress: Progress | None = None, chunk: int = CHUNK_ROWS) -> VectorStage:
    """Evaluate every row of the candidate set."""
    ctx, rows = prep.context, prep.rows
    parts: list[RowResult] = []
    done = 0
    if ctx is not None:
        for ci, oi in iter_chunks(rows, chunk):
            parts.append(evaluate_rows(ctx, ci, oi))
            done += ci.size
            if progress:
                progress("vector evaluation", done, rows.size)
    return VectorStage(rows.core_index, rows.option_index, _concat(parts))


def _concat(parts: list[RowResult]) -> RowResult:
    from dataclasses import fields

    if not parts:
        return RowResult.unevaluated(0, 1, np.zeros(0, dtype=np.int64), np.zeros(0), np.zeros(0))
    return RowResult(**{f.name: np.concatenate([getattr(p, f.name) for p in parts], axis=-1)
                        for f in fields(RowResult)})
