"""What the search shows: the text report, the stable JSON of ``specgen search --json``, a progress bar."""

from __future__ import annotations

import sys
import time
from collections.abc import Callable, Sequence
from typing import Any, TextIO

from .confirm import Candidate
from .rank import SearchResult
from .rows import ROWS_PER_CORE_MAX

PROGRESS_AFTER_S = 1.0


class Progress:
    """A one-line progress bar on a stream, drawn only once the work has taken ``after_s``."""

    def __init__(self, enabled: bool, stream: TextIO | None = None, after_s: float = PROGRESS_AFTER_S,
                 clock: Callable[[], float] = time.monotonic, width: int = 30):
        self.enabled, self.stream, self.after_s = enabled, stream or sys.stderr, after_s
        self.clock, self.width = clock, width
        self.t0 = clock()
        self.drawn = False

    def __call__(self, stage: str, done: int, total: int) -> None:
        if not self.enabled or self.clock() - self.t0 < self.after_s:
            return
        frac = 0.0 if total <= 0 else min(1.0, done / total)
        filled = int(round(frac * self.width))
        self.stream.write(f"\r[{'#' * filled}{'.' * (self.width - filled)}] {frac:4.0%} {stage:<24}")
        self.stream.flush()
        self.drawn = True

    def close(self) -> None:
        if self.drawn:
            self.stream.write("\r" + " " * (self.width + 32) + "\r")
            self.stream.flush()
            self.drawn = False


def result_json(sr: SearchResult, currency: str = "") -> dict[str, Any]:
    """The stable JSON of ``specgen search --json``: every number from the design engine's Designs."""
    req = sr.requirement
    return {
        "requirement": req.id, "file": req.file, "kind": req.kind, "summary": req.summary(), "sort": sr.sort,
        "currency": currency or None,
        "stats": sr.stats.to_dict(),
        "results": [dict(rank=i + 1, **c.summary()) for i, c in enumerate(sr.top)],
        "pareto": [c.summary() for c in sr.pareto],
        "families_without_feasible": [{"family": f.family, "cores": f.cores, "candidates": f.candidates,
                                       "reasons": f.reasons, "detail": f.detail} for f in sr.families],
    }


def _wires_text(c: Candidate) -> str:
    d = c.engine
    parts = [f"{w.name} {w.turns} t {w.wire}" + (f" x{w.strands}" if w.strands > 1 else "") for w in d.windings]
    if d.inductor is not None and d.inductor.gap_m:
        parts.append(f"gap {d.inductor.gap_m * 1e3:.2f} mm")
    return "; ".join(parts)


def _table(headers: Sequence[object], rows: Sequence[Sequence[object]]) -> list[str]:
    cells = [[str(x) for x in headers]] + [[str(x) for x in r] for r in rows]
    widths = [max(len(r[i]) for r in cells) for i in range(len(headers))]
    out = []
    for n, r in enumerate(cells):
        out.append("  " + "  ".join(x.ljust(w) if i in (1, 2, 3) else x.rjust(w)
                                    for i, (x, w) in enumerate(zip(r, widths))).rstrip())
        if n == 0:
            out.append("  " + "  ".join("-" * w for w in widths))
    return out


def _header(sr: SearchResult) -> list[str]:
    req, st = sr.requirement, sr.stats
    lines = [f"{req.id}: {req.title or req.summary()}", f"  {req.summary()}, ambient {req.ambient_c:g} °C, class "
             f"{req.insulation_class_c}" + (f", rise at most {req.max_rise_k:g} K" if req.max_rise_k else "")]
    if req.kind in ("common_mode_choke", "flyback"):     # no vector stage: the engine ran every candidate core
        what = ("ungapped high-permeability toroids" if req.kind == "common_mode_choke"
                else "gappable ferrite sets with a bobbin")
        lines.append(f"  {st.kept} of {st.core_choices} core choices are {what}; "
                     f"{st.scalar_evaluated} run through the design engine (wire chosen by it), "
                     f"{st.scalar_feasible} pass every check")
        return lines
    if not st.rows:
        lines.append(f"  none of the {st.core_choices} core/stack/bobbin choices passes the area-product screen")
        return lines
    combos = st.full_product or st.rows
    pruned = (f", {st.rows:,} after dropping wire options another option of the same winding beats in "
              f"height, loss, cost and class" if st.rows < combos else "")
    lines.append(f"  {st.kept} of {st.core_choices} core/stack/bobbin choices past the area-product screen; "
                 f"{' x '.join(str(n) for n in st.wire_options)} wire options: {combos:,} combinations{pruned}")
    if st.thinned_cores:
        lines.append(f"  ({st.thinned_cores} core choice(s) with more than {ROWS_PER_CORE_MAX:,} combinations "
                     f"kept only each winding's height-loss and height-cost fronts)")
    lines.append(f"  {st.rows:,} candidates evaluated in {st.vector_s * 1e3:.0f} ms "
                 f"({st.rows / max(st.vector_s, 1e-9):,.0f}/s); {st.vector_feasible:,} feasible by the "
                 f"vector model; {st.scalar_evaluated} run through the design engine")
    return lines


def _best(sr: SearchResult, currency: str) -> list[str]:
    lines = [f"Best {len(sr.top)} by {sr.sort} (every number from the design engine)"]
    rows = []
    for i, c in enumerate(sr.top, 1):
        d = c.engine
        rows.append([i, c.choice.core.id, f"{c.choice.stack_m * 1e3:g}" if c.choice.stack_m else "-",
                     c.choice.bobbin.id if c.choice.bobbin else "-", f"{c.cost:.2f}", f"{d.losses.total_w:.2f}",
                     f"{d.hot_spot_c:.0f}", f"{d.temperature_rise_k:.0f}", f"{c.mass_kg * 1e3:.0f}",
                     f"{c.size_m3 * 1e6:.0f}", f"{d.build.fill_fraction:.0%}", len(d.warnings)])
    hdr = ["#", "core", "stack mm", "bobbin", f"cost {currency}".strip(), "loss W", "hot °C", "rise K", "mass g",
           "size cm³", "fill", "warn"]
    table = _table(hdr, rows)
    lines += table[:2]
    for i, c in enumerate(sr.top):
        lines.append(table[2 + i])
        lines.append(f"        {_wires_text(c)}")
    lines += ["", "Pareto front, loss against material cost"]
    for c in sr.pareto:
        lines.append(f"  {c.cost:>8.2f}  {c.engine.losses.total_w:7.2f} W  {c.choice.label:<20} {_wires_text(c)}")
    return lines


def result_text(sr: SearchResult, currency: str = "") -> str:
    lines = _header(sr) + [""]
    if sr.top:
        lines += _best(sr, currency) + [""]
    else:
        lines += ["No candidate in the catalogue meets the requirement.", ""]
    if sr.families:
        lines.append("Families with no feasible member")
        for f in sr.families:
            why = ", ".join(f"{k} ({v:,})" for k, v in sorted(f.reasons.items(), key=lambda kv: -kv[1]))
            cores = f"{f.cores} core{'s' if f.cores != 1 else ''}"
            lines.append(f"  {f.family} ({cores}; core choices by reason of their closest candidate): {why}")
            if f.detail:
                lines.append(f"      {f.detail}")
    return "\n".join(lines).rstrip()
