"""Measured against predicted: each tested quantity of a part across its lots, against the Design.

For every test with a prediction the mean, the spread (sample standard deviation), the range and the
yield (share of pieces within the limits) of the values as compared (DCR at 20 degC), each lot's mean,
and the offset of the mean from the prediction. An offset above :data:`OFFSET_FLAG` that is consistent
(at least :data:`CONSISTENT_SHARE` of the pieces on the same side, and every lot's mean on that side)
is flagged with the model input most likely responsible:

- DCR: the mean length of a turn, i.e. the bulge factor of the build; or, where the leads are a large
  share of the winding's wire, the lead length;
- inductance with the core (open-circuit, no-bias, A_L): the A_L (permeability or gap) of the core
  stock as delivered; leakage inductance: the winding build (bulge factor);
- ratio and open-circuit voltage: no model input; the turns wound or the test set-up.

The predictions and limits are those stored with each reading (the Design's at the time of the test).
"""

from __future__ import annotations

import dataclasses
import math
import statistics
from typing import Any

from markupsafe import Markup, escape

from . import plan
from .model import Column, Entry
from .store import StationStore

OFFSET_FLAG = 0.05           # a mean 5 % off the prediction is worth a look (common practice)
CONSISTENT_SHARE = 0.8
LEAD_SHARE_NAMED = 0.15      # leads above this share of a winding's wire: name the lead length


@dataclasses.dataclass(frozen=True, slots=True)
class Quantity:
    key: str
    label: str
    column: Column
    values_si: tuple[float, ...]
    n: int
    mean_si: float | None
    spread_si: float | None
    predicted_si: float | None
    low_si: float | None
    high_si: float | None
    passed: int
    lot_means: tuple[tuple[str, float], ...]
    offset: float | None             # (mean - predicted) / predicted
    consistent: bool
    likely_input: str | None

    def _show(self, v: float | None) -> str:
        return plan.show_value(self.column, v) if v is not None else "—"

    @property
    def predicted_text(self) -> str:
        return self._show(self.predicted_si)

    @property
    def mean_text(self) -> str:
        return self._show(self.mean_si) if self.column.kind != "check" else "—"

    @property
    def spread_text(self) -> str:
        return self._show(self.spread_si) if self.spread_si is not None and self.column.kind != "check" else "—"

    @property
    def range_text(self) -> str:
        if not self.values_si or self.column.kind == "check":
            return "—"
        return f"{self._show(min(self.values_si))} – {self._show(max(self.values_si))}"

    @property
    def limits_text(self) -> str:
        return plan.limits_text(self.column)

    @property
    def offset_text(self) -> str:
        if self.offset is None:
            return "—"
        pct = self.offset * 100
        return "0.0 %" if abs(pct) < 0.05 else f"{pct:+.1f} %"       # never "-0.0 %"

    @property
    def yield_text(self) -> str:
        return f"{self.passed} of {self.n} ({self.passed / self.n:.0%})" if self.n else "—"

    def to_dict(self) -> dict[str, Any]:
        return {"key": self.key, "label": self.label, "unit": self.column.unit, "n": self.n, "mean": self.mean_si,
                "spread": self.spread_si, "min": min(self.values_si) if self.values_si else None,
                "max": max(self.values_si) if self.values_si else None, "predicted": self.predicted_si,
                "low": self.low_si, "high": self.high_si, "passed": self.passed,
                "yield": self.passed / self.n if self.n else None, "offset": self.offset,
                "lot_means": dict(self.lot_means), "consistent_offset": self.consistent,
                "likely_input": self.likely_input}


@dataclasses.dataclass(frozen=True, slots=True)
class Comparison:
    part: str
    lots: tuple[str, ...]
    quantities: tuple[Quantity, ...]
    flags: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        return {"part": self.part, "lots": list(self.lots), "quantities": [q.to_dict() for q in self.quantities],
                "flags": list(self.flags)}


def _lead_share(design: Any, winding: str) -> float | None:
    """The share of a winding's wire that is lead, from the Design's own lengths."""
    try:
        w = design.winding(winding)
    except KeyError:
        return None
    wound = sum(layer.length_m for s in w.sections for layer in s.layers)
    return max(0.0, 1.0 - wound / w.length_m) if w.length_m > 0 else None


def likely_input(key: str, label: str, design: Any | None) -> str:
    field, name, item = (key.split("/", 2) + ["", ""])[:3]
    if field == "dcr":
        share = _lead_share(design, item) if design is not None else None
        if share is not None and share > LEAD_SHARE_NAMED:
            return f"lead length (the leads are {share:.0%} of this winding's wire)"
        return "bulge factor (the mean length of a turn grows with the build)"
    if field == "inductance":
        if "leakage" in name:
            return "bulge factor (leakage follows the winding build)"
        return "A_L of the core stock (its permeability or gap as delivered)"
    return "no model input: check the turns wound and the test set-up"


def _column(entries: list[Entry]) -> Column:
    e = entries[-1]
    shown, factor = plan.shown_unit(e.unit or "", e.nominal_si or e.low_si) if e.unit else ("", 1.0)
    kind = "dcr" if e.item.startswith("dcr/") else ("check" if not e.unit else "value")
    if kind == "check":
        shown = "ok/fail"
    return Column(e.item, e.label or e.item, kind, e.unit or "", e.nominal_si, e.low_si, e.high_si, "", shown, factor)


def _quantity(key: str, entries: list[tuple[str, Entry]], design: Any | None) -> Quantity:
    values = [e.judged_si for _, e in entries if e.judged_si is not None]
    col = _column([e for _, e in entries])
    by_lot: dict[str, list[float]] = {}
    for lot, e in entries:
        if e.judged_si is not None:
            by_lot.setdefault(lot, []).append(e.judged_si)
    lot_means = tuple((lot, statistics.fmean(v)) for lot, v in by_lot.items())
    mean = statistics.fmean(values) if values else None
    spread = statistics.stdev(values) if len(values) > 1 else None
    predicted = col.nominal
    offset = None
    consistent = False
    if mean is not None and predicted and col.kind != "check":
        offset = (mean - predicted) / predicted
        side = 1.0 if offset > 0 else -1.0
        same = sum(1 for v in values if (v - predicted) * side > 0) / len(values)
        lots_agree = all((m - predicted) * side > 0 for _, m in lot_means)
        consistent = abs(offset) > OFFSET_FLAG and same >= CONSISTENT_SHARE and lots_agree
    passed = sum(1 for _, e in entries if e.verdict == "pass")
    return Quantity(key, col.label, col, tuple(values), len(entries), mean, spread, predicted, col.low, col.high,
                    passed, lot_means, offset, consistent, likely_input(key, col.label, design) if consistent else None)


def compare_part(store: StationStore, part: str, parts: Any | None = None) -> Comparison:
    """Every quantity measured on ``part``, across its lots (``parts``: a PartsLibrary, for the Design's
    lead lengths when a DCR is flagged)."""
    grouped: dict[str, list[tuple[str, Entry]]] = {}
    lots: list[str] = []
    designs: dict[str, Any] = {}
    for order, e in store.readings_of_part(part):
        if order.number not in lots:
            lots.append(order.number)
        grouped.setdefault(e.item, []).append((order.number, e))
        if parts is not None and order.revision not in designs:
            try:
                designs[order.revision] = parts.design(order.part, order.revision)
            except Exception:  # a revision whose spec is gone: name the input without the lead share
                designs[order.revision] = None
    design = next((d for d in reversed(list(designs.values())) if d is not None), None)
    quantities = tuple(_quantity(k, v, design) for k, v in grouped.items())
    flags = tuple(f"{q.label}: the measured mean sits {q.offset_text} from the prediction in every lot; "
                  f"most likely input: {q.likely_input}" for q in quantities if q.consistent)
    return Comparison(part, tuple(lots), quantities, flags)


def _nice_range(lo: float, hi: float) -> tuple[float, float]:
    if hi <= lo:
        pad = abs(lo) * 0.05 or 1.0
        return lo - pad, hi + pad
    pad = (hi - lo) * 0.08
    return lo - pad, hi + pad


# long: one drawing, bars then the marks and their labels, in drawing order
def histogram_svg(q: Quantity, width: int = 380, height: int = 210) -> Markup:
    """A histogram of the values as compared, with the limits (red), the prediction (blue) and the
    mean (black, dashed) marked; plain SVG, every text escaped."""
    f = q.column.shown_factor
    values = [v * f for v in q.values_si]
    if not values or q.column.kind == "check":
        return Markup(f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="40" role="img">'
                      f'<text x="8" y="24" font-size="12">{escape(q.label)}: {escape(q.yield_text)} pass</text></svg>')
    marks: list[tuple[str, float | None]] = [("low", q.low_si), ("high", q.high_si), ("predicted", q.predicted_si)]
    span = values + [v * f for _, v in marks if v is not None]
    lo, hi = _nice_range(min(span), max(span))
    bins = max(5, min(20, int(math.sqrt(len(values))) + 3))
    counts = [0] * bins
    for v in values:
        counts[min(bins - 1, max(0, int((v - lo) / (hi - lo) * bins)))] += 1
    left, right, top, bottom = 36, width - 10, 26, height - 30
    x = lambda v: left + (v - lo) / (hi - lo) * (right - left)
    peak = max(counts) or 1
    bar_w = (right - left) / bins
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" viewBox="0 0 {width} {height}" '
             f'role="img" aria-label="{escape(q.label)}" font-family="DejaVu Sans, sans-serif" font-size="11">',
             f'<line x1="{left}" y1="{bottom}" x2="{right}" y2="{bottom}" stroke="#333"/>',
             f'<text x="{left - 4}" y="{top + 4}" text-anchor="end">{peak}</text>',
             f'<text x="{left - 4}" y="{bottom}" text-anchor="end">0</text>']
    for i, c in enumerate(counts):
        if c:
            h = (bottom - top) * c / peak
            parts.append(f'<rect x="{left + i * bar_w + 1:.1f}" y="{bottom - h:.1f}" width="{bar_w - 2:.1f}" '
                         f'height="{h:.1f}" fill="#9aa7b3"/>')
    styles = {"low": ("#b00", "4 3"), "high": ("#b00", "4 3"), "predicted": ("#0b4f8a", ""), "mean": ("#111", "2 2")}
    if q.mean_si is not None:
        marks.append(("mean", q.mean_si))
    for i, (name, mark) in enumerate(marks):
        if mark is None:
            continue
        colour, dash = styles[name]
        xv = x(mark * f)
        dash_attr = f' stroke-dasharray="{dash}"' if dash else ""
        parts.append(f'<line x1="{xv:.1f}" y1="{top - 6}" x2="{xv:.1f}" y2="{bottom}" stroke="{colour}" '
                     f'stroke-width="2"{dash_attr}/>')
        anchor = "end" if xv > (left + right) / 2 else "start"
        nudge = -3 if anchor == "end" else 3
        parts.append(f'<text x="{xv + nudge:.1f}" y="{top - 10 + 11 * (i % 2)}" fill="{colour}" '
                     f'text-anchor="{anchor}">{escape(name)}</text>')
    parts.append(f'<text x="{left}" y="{height - 8}">{escape(plan.show_value(q.column, lo / f))}</text>')
    parts.append(f'<text x="{right}" y="{height - 8}" text-anchor="end">{escape(plan.show_value(q.column, hi / f))}</text>')
    parts.append("</svg>")
    return Markup("".join(parts))
