"""The search for the kinds the vector stage does not model (a common-mode choke, a flyback): every candidate
core is run through the design engine itself, so the ranking is the engine's (the kernel's) and nothing here
computes.

Candidates, smallest core volume first, at most ``SCALAR_BUDGET`` of them:
- a common-mode choke: every ungapped toroid in stock of a high-permeability family (ferrite,
  nanocrystalline, amorphous: the choke needs the permeability; powders are for differential-mode chokes);
- a flyback: every gappable ferrite set with its bobbin (the engine finds the gap from L_p).
Each is written as a draft spec with the wires left to the engine (``wire: auto``), then written again with
the wires the engine chose named, so the draft's lead sleeving is sized for them (the same design). The list,
the loss-cost front and the families without a feasible member are taken as in ``rank.search``.
"""

from __future__ import annotations

import time
from collections.abc import Callable

from ..catalog.models import Catalog
from .candidates import CoreChoice, WireOption, core_choices
from .confirm import Candidate, run_candidate
from .rank import SCALAR_BUDGET, FamilyFailure, SearchResult, cap_per_core, pareto_indices
from .requirement import Requirement
from .rows import SearchStats

HIGH_PERMEABILITY_FAMILIES = ("ferrite", "nanocrystalline", "amorphous")


def search_engine_only(req: Requirement, cat: Catalog, *, top: int, sort: str, per_core: int, part: str,
                       progress: Callable[[str, int, int], None] | None = None) -> SearchResult:
    t0 = time.perf_counter()
    every = core_choices(req, cat)
    choices = [c for c in every if _fits_kind(req, c)]
    choices.sort(key=lambda c: (c.parts.ve_m3, c.core.id))
    st = SearchStats(core_choices=len(every), screened_out=len(every) - len(choices), kept=len(choices))
    st.prepare_s = time.perf_counter() - t0
    run: list[Candidate] = []
    todo = choices[:SCALAR_BUDGET]
    for i, ch in enumerate(todo):
        if progress is not None:
            progress("engine", i + 1, len(todo))
        first = run_candidate(req, cat, ch, (), part, row=i)
        if first.design is not None:          # the engine's wires named: the draft's sleeving sized for them
            named = tuple(WireOption(cat.wires[w.wire], w.strands) for w in first.design.windings)
            first = run_candidate(req, cat, ch, named, part, row=i)
        run.append(first)
    feasible = [c for c in run if c.feasible]
    ranked = cap_per_core(sorted(feasible, key=lambda c: c.key(sort)), per_core)[:top]
    pareto: list[Candidate] = []
    if feasible:
        idx = pareto_indices([c.value("cost") for c in feasible], [c.value("total_w") for c in feasible])
        pareto = [feasible[int(i)] for i in idx]
    st.scalar_evaluated, st.scalar_feasible = len(run), len(feasible)
    st.scalar_s = time.perf_counter() - t0 - st.prepare_s
    st.total_s = time.perf_counter() - t0
    return SearchResult(req, sort, ranked, pareto, _families(run), st)


def _fits_kind(req: Requirement, c: CoreChoice) -> bool:
    if req.kind == "common_mode_choke":
        return c.core.is_toroid and c.parts.material.family in HIGH_PERMEABILITY_FAMILIES
    return (c.core.gappable and c.bobbin is not None and c.parts.material.family == "ferrite"
            and len(c.bobbin.pins) >= 2 * len(req.windings))          # a pin for each end of every winding


def _families(run: list[Candidate]) -> list[FamilyFailure]:
    """Each family (shape / material) none of whose cores passed: the engine's first reason, counted."""
    by: dict[str, list[Candidate]] = {}
    for c in run:
        by.setdefault(c.choice.family, []).append(c)
    out = []
    for family, cands in sorted(by.items()):
        if any(c.feasible for c in cands):
            continue
        reasons: dict[str, int] = {}
        for c in cands:
            first = (c.failed or ("refused",))[0]
            word = first.split(":")[0][:60]
            reasons[word] = reasons.get(word, 0) + 1
        out.append(FamilyFailure(family, len({c.choice.core.id for c in cands}), len(cands), reasons,
                                 f"{cands[0].choice.core.id}: {(cands[0].failed or ('refused',))[0]}"))
    return out
