"""Ranking: which rows the design engine confirms, the sorted list with its per-core cap, the loss-cost
Pareto front, and why a family of cores has no feasible member."""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..catalog.models import Catalog
from ..errors import SpecError
from .candidates import AP_KU, J_HIGH, CoreChoice
from .confirm import SORT_KEYS, SORTS, Candidate, VectorNumbers, run_candidate
from .context import SearchContext
from .records import REASON_GROUPS, BoolArray, Fail, FloatArray, FormerKind, IntArray, RowResult, VectorStage
from .requirement import Requirement
from .rows import Prepared, Screened, SearchStats, prepare, run_vector_stage

SCALAR_BUDGET = 60         # most designs the engine runs per search
PARETO_MAX = 8


@dataclass(frozen=True, slots=True)
class FamilyFailure:
    family: str
    cores: int
    candidates: int
    reasons: dict[str, int]        # reason -> how many core choices fail for it (their closest candidate's)
    detail: str


@dataclass(frozen=True, slots=True)
class SearchResult:
    requirement: Requirement
    sort: str
    top: list[Candidate]           # best first (engine numbers)
    pareto: list[Candidate]        # on the loss-cost front, by cost
    families: list[FamilyFailure]  # families with no feasible member
    stats: SearchStats = field(default_factory=SearchStats)


def pareto_indices(cost: FloatArray | list[float], loss: FloatArray | list[float]) -> IntArray:
    """Indices of the non-dominated points (lower cost and lower loss are better), in order of cost."""
    c, lo = np.asarray(cost, dtype=float), np.asarray(loss, dtype=float)
    if c.size == 0:
        return np.zeros(0, dtype=np.int64)
    order = np.lexsort((lo, c))
    best = np.minimum.accumulate(lo[order])
    prev = np.concatenate([[np.inf], best[:-1]])
    return np.asarray(order[lo[order] < prev - 1e-12], dtype=np.int64)


def cap_per_core(cands: list[Candidate], per_core: int) -> list[Candidate]:
    """The candidates in order, at most ``per_core`` of each core choice."""
    out: list[Candidate] = []
    count: dict[int, int] = {}
    for c in cands:
        k = id(c.choice)
        if count.get(k, 0) < per_core:
            count[k] = count.get(k, 0) + 1
            out.append(c)
    return out


def _offsets(ctx: SearchContext, vs: VectorStage, evaluated: dict[int, Candidate], what: str) -> FloatArray:
    """Per core choice: engine value minus vector value of ``what`` (median over its engine runs); for a
    core not yet run, the median over the run cores of the same kind (bobbin or toroid), else 0."""
    toroid = ctx.cores.former.kind == FormerKind.TOROID
    off = np.zeros(len(ctx.choices))
    values = getattr(vs.result, what)
    per: dict[int, list[float]] = {}
    for r, c in evaluated.items():
        if c.design is not None:
            per.setdefault(int(vs.core_index[r]), []).append(c.value(what) - float(values[r]))
    if not per:
        return off
    meds = {i: float(np.median(v)) for i, v in per.items()}
    for kind in (False, True):
        vals = [m for i, m in meds.items() if toroid[i] == kind]
        if vals:
            off[toroid == kind] = float(np.median(vals))
    for i, m in meds.items():
        off[i] = m
    return off


class _Confirmer:
    """Runs rows through the design engine, once each, within the budget."""

    def __init__(self, req: Requirement, cat: Catalog, ctx: SearchContext, vs: VectorStage, part: str,
                 progress: Callable[[str, int, int], None] | None):
        self.req, self.cat, self.ctx, self.vs, self.part, self.progress = req, cat, ctx, vs, part, progress
        self.evaluated: dict[int, Candidate] = {}
        self.note = (f"Draft from `specgen search {Path(req.file).name}` ({req.summary()}).\n"
                     f"Core, stack, bobbin, wires and strands are fixed here; turns, layers and gap come from the "
                     f"design engine.")

    def run(self, r: int) -> Candidate:
        if r not in self.evaluated:
            ctx, vs, res = self.ctx, self.vs, self.vs.result
            opts = [ctx.options[g][int(vs.option_index[g][r])] for g in ctx.groups]
            vec = VectorNumbers(*(float(getattr(res, k)[r]) for k in (
                "total_w", "copper_w", "core_w", "hot_c", "rise_k", "fill", "mass_kg", "cost", "primary_turns")))
            self.evaluated[r] = run_candidate(self.req, self.cat, ctx.choices[int(vs.core_index[r])], opts, self.part,
                                              r, vec, self.note)
            if self.progress:
                self.progress("design engine", len(self.evaluated), SCALAR_BUDGET)
        return self.evaluated[r]

    def ranked(self, sort: str, per_core: int) -> list[Candidate]:
        return cap_per_core(sorted((c for c in self.evaluated.values() if c.feasible), key=lambda c: c.key(sort)),
                            per_core)


def _confirm_best(cf: _Confirmer, sort: str, top: int, per_core: int) -> None:
    """Run the rows the vector stage ranks best, the ranking corrected core by core as engine results come
    in: strict rows first, rows that pass only with the slack behind them; a row is run only while its
    corrected key could still put it in the list, until none is left or ``SCALAR_BUDGET`` designs have run."""
    ctx, vs = cf.ctx, cf.vs
    res = vs.result
    k1, k2 = SORT_KEYS[sort]
    strict = res.flags == 0
    maybe = np.flatnonzero(res.flags_slack == 0)
    done = np.zeros(vs.rows, dtype=bool)
    batch_size = max(top, 4)
    while len(cf.evaluated) < SCALAR_BUDGET and maybe.size:
        est = getattr(res, k1)[maybe] + _offsets(ctx, vs, cf.evaluated, k1)[vs.core_index[maybe]]
        ranked = cf.ranked(sort, per_core)
        want = ~done[maybe]
        if len(ranked) >= top:
            want &= est < ranked[top - 1].value(k1)
        full = np.zeros(len(ctx.choices), dtype=bool)
        for c in ranked:
            if sum(1 for o in ranked if o.choice is c.choice) >= per_core:
                full[ctx.choices.index(c.choice)] = True
        want &= ~full[vs.core_index[maybe]]
        cand = maybe[want]
        if not cand.size:
            break
        order = cand[np.lexsort((getattr(res, k2)[cand], est[want], ~strict[cand]))]
        for r in order[:batch_size]:
            if len(cf.evaluated) >= SCALAR_BUDGET:
                break
            cf.run(int(r))
            done[r] = True


def _confirm_front(cf: _Confirmer) -> None:
    """The loss-cost front of the vector stage (cost corrected as above), confirmed by the engine."""
    res = cf.vs.result
    feas = np.flatnonzero(res.flags == 0)
    if not feas.size:
        return
    offset = _offsets(cf.ctx, cf.vs, cf.evaluated, "cost")
    front = feas[pareto_indices(res.cost[feas] + offset[cf.vs.core_index[feas]], res.total_w[feas])]
    if front.size > PARETO_MAX:
        front = front[np.unique(np.linspace(0, front.size - 1, PARETO_MAX).round().astype(int))]
    for r in front:
        cf.run(int(r))


def check_options(sort: str, top: int, per_core: int) -> None:
    if sort not in SORTS:
        raise SpecError(f"unknown sort '{sort}'; one of {', '.join(SORTS)}", path="--sort")
    if top < 1:
        raise SpecError(f"--top must be at least 1, got {top}", path="--top")
    if per_core < 1:
        raise SpecError(f"--per-core must be at least 1, got {per_core}", path="--per-core")


def search(req: Requirement, cat: Catalog, *, top: int = 5, sort: str = "cost", per_core: int = 2,
           part: str | None = None, progress: Callable[[str, int, int], None] | None = None, screen: bool = True,
           prune: bool = True) -> SearchResult:
    """The whole search (see the package docstring): screen, vectorised evaluation, engine confirmation.

    The engine runs on the rows the vector stage ranks best (``_confirm_best``), then on the rows on the
    vector stage's loss-cost front; the list and the front are taken over engine results only."""
    check_options(sort, top, per_core)
    if req.kind in ("common_mode_choke", "flyback"):    # no vector model of these: the engine runs every core
        from .engine_only import search_engine_only

        return search_engine_only(req, cat, top=top, sort=sort, per_core=per_core, part=part or req.part or req.id,
                                  progress=progress)
    t_start = time.perf_counter()
    prep = prepare(req, cat, screen, prune)
    t_prep = time.perf_counter()
    vs = run_vector_stage(prep, progress)
    t_vec = time.perf_counter()
    st = prep.stats
    st.rows, st.prepare_s, st.vector_s = vs.rows, t_prep - t_start, t_vec - t_prep
    st.vector_feasible = int(np.count_nonzero(vs.result.flags == 0))
    evaluated: dict[int, Candidate] = {}
    if vs.rows and prep.context is not None:
        cf = _Confirmer(req, cat, prep.context, vs, part or req.part or req.id, progress)
        _confirm_best(cf, sort, top, per_core)
        _confirm_front(cf)
        evaluated = cf.evaluated
    t_scalar = time.perf_counter()
    feasible = [c for c in evaluated.values() if c.feasible]
    ranked = cap_per_core(sorted(feasible, key=lambda c: c.key(sort)), per_core)[:top]
    pareto: list[Candidate] = []
    if feasible:
        idx = pareto_indices([c.value("cost") for c in feasible], [c.value("total_w") for c in feasible])
        pareto = [feasible[int(i)] for i in idx]
    families = family_failures(req, prep, vs, evaluated)
    st.scalar_evaluated, st.scalar_feasible, st.scalar_s = len(evaluated), len(feasible), t_scalar - t_vec
    st.total_s = time.perf_counter() - t_start
    return SearchResult(req, sort, ranked, pareto, families, st)


# ------------------------------------------------------------------------------------------------ failures

def _rows_by_family(prep: Prepared, vs: VectorStage, flags: IntArray, families: list[str]
                    ) -> tuple[dict[str, IntArray], set[str]]:
    """Each family's rows, and the families with a row the vector stage finds feasible."""
    assert prep.context is not None
    fam_idx = {f: i for i, f in enumerate(families)}
    fam_of_choice = np.array([fam_idx[c.family] for c in prep.context.choices])
    fams = fam_of_choice[vs.core_index]
    order = np.argsort(fams, kind="stable")
    bounds = np.searchsorted(fams[order], np.arange(len(fam_idx) + 1))
    rows: dict[str, IntArray] = {}
    feasible: set[str] = set()
    for k, fam in enumerate(families):
        sel = order[bounds[k]:bounds[k + 1]]
        if sel.size:
            rows[fam] = sel
            if (flags[sel] == 0).any():
                feasible.add(fam)
    return rows, feasible


def _screen_detail(scr: list[Screened]) -> str:
    big = max(scr, key=lambda s: s.area_product_m4)
    return (f"{len(scr)} core choice{'s' if len(scr) != 1 else ''} below the area product needed; "
            f"the largest, {big.choice.label}, has Wa·Ae {big.area_product_m4 * 1e8:.3g} cm⁴ against "
            f"{big.needed_m4 * 1e8:.3g} cm⁴ (McLyman, at Ku {AP_KU:g} and {J_HIGH:g} x the shop's current density)")


def family_failures(req: Requirement, prep: Prepared, vs: VectorStage, evaluated: dict[int, Candidate]
                    ) -> list[FamilyFailure]:
    """For every family (shape / material) with no feasible member: why, with the closest candidate."""
    fam_cores: dict[str, set[str]] = {}
    for ch in prep.choices:
        fam_cores.setdefault(ch.family, set()).add(ch.core.id)
    names = sorted(fam_cores)
    feasible_fams = {c.choice.family for c in evaluated.values() if c.feasible}
    flags = vs.result.flags.copy()
    rows_by_fam: dict[str, IntArray] = {}
    if vs.rows:
        for r, c in evaluated.items():
            if not c.feasible:
                flags[r] |= Fail.ENGINE
        rows_by_fam, vec_feasible = _rows_by_family(prep, vs, flags, names)
        feasible_fams |= vec_feasible
    out = []
    for fam in names:
        if fam in feasible_fams:
            continue
        reasons: dict[str, int] = {}
        details = []
        scr = [s for s in prep.screened if s.choice.family == fam]
        if scr:
            reasons["too small a window"] = len(scr)
            details.append(_screen_detail(scr))
        sel = rows_by_fam.get(fam)
        if sel is not None and sel.size:
            fl = flags[sel]
            bad = _badness(req, vs.result, sel, fl)
            # each core choice is counted under the reasons of its own closest candidate
            ci = vs.core_index[sel]
            order = np.lexsort((bad, ci))
            first = order[np.concatenate([[True], np.diff(ci[order]) != 0])]
            for text, bits in REASON_GROUPS:
                cnt = int(np.count_nonzero(fl[first] & bits))
                if cnt:
                    reasons[text] = reasons.get(text, 0) + cnt
            best = int(sel[int(np.argmin(bad))])
            assert prep.context is not None
            details.append(describe_row(req, prep.context, vs, best, int(flags[best]), evaluated.get(best)))
        out.append(FamilyFailure(fam, len(fam_cores[fam]), 0 if sel is None else int(sel.size), reasons,
                                 "; ".join(details)))
    return out


def _badness(req: Requirement, res: RowResult, sel: IntArray, fl: IntArray) -> FloatArray:
    """How far each row is from feasible: failed criteria first, then by how much (relative)."""
    pop = np.zeros(sel.size)
    for _text, bits in REASON_GROUPS:
        pop += (fl & bits) != 0
    pop += np.where(np.isfinite(res.hot_c[sel]), 0.0, 2.0)   # not fully evaluated: the rest is unknown
    by = np.zeros(sel.size)
    fill = res.fill[sel]

    def on(bits: Fail) -> BoolArray:
        return np.asarray((fl & bits) != 0)

    by += np.where(on(Fail.FIT), np.where(np.isfinite(fill) & (fill > 1.0), fill - 1.0, 10.0), 0.0)
    by += np.where(on(Fail.SAT), np.maximum(res.b_pk_max_t[sel] / np.maximum(res.b_limit_t[sel], 1e-9) - 1.0, 0.0),
                   0.0)
    by += np.where(on(Fail.HOT | Fail.CLASS), np.maximum(res.hot_c[sel] - req.insulation_class_c, 0.0) / 100.0, 0.0)
    if req.max_rise_k:
        by += np.where(on(Fail.RISE), np.maximum(res.rise_k[sel] / req.max_rise_k - 1.0, 0.0), 0.0)
    if req.limits.max_mass_kg:
        by += np.where(on(Fail.MASS), np.maximum(res.mass_kg[sel] / req.limits.max_mass_kg - 1.0, 0.0), 0.0)
    return np.asarray(pop * 1e3 + np.minimum(by, 999.0), dtype=float)


def _fit_words(choice: CoreChoice, fill: float) -> str:
    if math.isfinite(fill) and fill > 1.0:
        return f"the build needs {fill * 100:.{1 if fill < 1.01 else 0}f} % of the window height"
    if choice.bobbin is None:
        return "the hole closes before the turns are laid"
    return "a wire is wider than the bobbin's usable breadth, or the turns exceed what the engine winds"


def describe_row(req: Requirement, ctx: SearchContext, vs: VectorStage, r: int, fl: int,
                 cand: Candidate | None = None) -> str:
    """One line on why row ``r`` fails: its core and wires, then each failed criterion with its numbers."""
    res = vs.result
    choice = ctx.choices[int(vs.core_index[r])]
    opts = [ctx.options[g][int(vs.option_index[g][r])] for g in ctx.groups]
    names = [w.name for w in req.windings] if req.kind == "transformer" else ["L"]
    wires = ", ".join(f"{n} {o.label}" for n, o in zip(names, opts))
    bits = []
    if fl & Fail.FIT:
        bits.append(_fit_words(choice, float(res.fill[r])))
    if fl & Fail.SAT:
        bits.append(f"B_pk {res.b_pk_max_t[r]:.3g} T against {res.b_limit_t[r]:.3g} T")
    if fl & (Fail.HOT | Fail.CLASS | Fail.RISE):
        bits.append(f"hot spot {res.hot_c[r]:.0f} °C, rise {res.rise_k[r]:.0f} K (class "
                    f"{req.insulation_class_c}" + (f", {req.max_rise_k:g} K allowed)" if req.max_rise_k else ")"))
    if fl & Fail.MASS and req.limits.max_mass_kg is not None:
        bits.append(f"{res.mass_kg[r] * 1e3:.0f} g against {req.limits.max_mass_kg * 1e3:g} g")
    if fl & Fail.SIZE:
        bits.append("outside the size limits")
    if fl & Fail.GAP:
        bits.append("the powder rolls off faster than turns add")
    if fl & Fail.PINS:
        bits.append("its bobbin has too few pins")
    if fl & Fail.INDUCTANCE:
        bits.append("inductance short")
    if cand is not None and cand.failed:
        bits.append("design engine: " + cand.failed[0])
    return f"closest: {choice.label} with {wires}: " + "; ".join(bits)
