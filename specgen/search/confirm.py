"""The scalar stage: a candidate's draft spec run through the design engine, and the numbers shown for it."""

from __future__ import annotations

import math
from dataclasses import dataclass
from decimal import Decimal
from typing import TYPE_CHECKING, Any

from ..catalog.models import Catalog
from ..errors import SpecError
from .candidates import CoreChoice, WireOption, outline_m
from .draft import draft_spec_text
from .requirement import Requirement

if TYPE_CHECKING:
    from ..design.result import Design


@dataclass(frozen=True, slots=True)
class VectorNumbers:
    """The vector stage's numbers for a row (kept beside the engine's for comparison)."""
    total_w: float
    copper_w: float
    core_w: float
    hot_c: float
    rise_k: float
    fill: float
    mass_kg: float
    cost: float
    primary_turns: float


@dataclass(frozen=True, slots=True)
class Candidate:
    """A candidate the design engine ran: its choices, the Design, and the numbers shown."""
    row: int
    choice: CoreChoice
    options: tuple[WireOption, ...]      # per winding
    spec_text: str
    design: Design | None                # None if the engine refused it (SpecError)
    failed: tuple[str, ...]              # reasons (check messages, limits)
    cost: Decimal | None
    size_m3: float
    outline_m: tuple[float, ...]
    mass_kg: float
    vector: VectorNumbers | None

    @property
    def feasible(self) -> bool:
        return self.design is not None and not self.failed

    @property
    def engine(self) -> Design:
        """The Design (only for a candidate the engine ran)."""
        if self.design is None:
            raise ValueError("the design engine refused this candidate")
        return self.design

    def value(self, what: str) -> float:
        """One ranking number from the engine's Design: cost, total_w, size_m3 or rise_k."""
        d = self.engine
        if what == "cost":
            return float(self.cost or 0)
        if what == "total_w":
            return d.losses.total_w
        if what == "size_m3":
            return self.size_m3
        return d.temperature_rise_k

    def key(self, sort: str) -> tuple[float, float]:
        first, second = SORT_KEYS[sort]
        return (self.value(first), self.value(second))

    def summary(self) -> dict[str, Any]:
        d = self.engine
        out: dict[str, Any] = {
            "core": self.choice.core.id, "family": self.choice.family,
            "stack_mm": self.choice.stack_m * 1e3 if self.choice.stack_m else None,
            "bobbin": self.choice.bobbin.id if self.choice.bobbin else None,
            "windings": [{"name": w.name, "turns": w.turns, "wire": w.wire, "strands": w.strands,
                          "layers": w.layers, "copper_loss_w": w.copper_loss_w} for w in d.windings],
            "loss_w": d.losses.total_w, "copper_w": d.losses.copper_w, "core_w": d.losses.core_w,
            "hot_spot_c": d.hot_spot_c, "rise_k": d.temperature_rise_k, "b_peak_max_t": d.b_peak_max_t,
            "fill": d.build.fill_fraction, "mass_kg": self.mass_kg, "cost": str(self.cost),
            "outline_mm": [round(x * 1e3, 2) for x in self.outline_m], "size_cm3": self.size_m3 * 1e6,
            "efficiency": d.efficiency, "warnings": [c.message for c in d.warnings]}
        if d.inductor is not None:
            out["inductance_uh"] = d.inductor.inductance_at_full_bias_h * 1e6
            out["gap_mm"] = d.inductor.gap_m * 1e3 if d.inductor.gap_m else None
        return out


# sort -> (first key, tie-break), on the engine's numbers and on the vector stage's alike
SORT_KEYS = {"cost": ("cost", "total_w"), "loss": ("total_w", "cost"), "size": ("size_m3", "cost"),
             "rise": ("rise_k", "cost")}
SORTS = tuple(SORT_KEYS)


def material_cost(design: Design, cat: Catalog) -> Decimal:
    """Material cost per unit (Decimal): the quote's material lines when the quote module is there,
    else wire mass x price x (1 + scrap) + core + bobbin from catalogue prices."""
    try:
        from .. import quote
        from ..prices import price_list

        return quote.material_total(quote.material_lines(design, price_list(cat, design)))
    except (ImportError, AttributeError):
        pass
    total = Decimal(0)
    scrap = Decimal(1) + cat.shop.scrap_wire
    for m in design.materials:
        if m.kind == "wire":
            total += Decimal(repr(m.mass_kg)) * cat.wires[m.id].price_per_kg * scrap
        elif m.kind in ("core", "laminations"):
            c = cat.cores[m.id]
            total += Decimal(repr(m.mass_kg)) * c.price if c.price_unit == "kg" else Decimal(design.core.count) * c.price
        elif m.kind == "bobbin":
            total += cat.bobbins[m.id].price * Decimal(int(m.quantity))
    return total


def _limit_failures(req: Requirement, d: Design, outline: tuple[float, float, float], mass: float) -> list[str]:
    out = []
    lim = req.limits
    if req.max_rise_k is not None and d.temperature_rise_k > req.max_rise_k:
        out.append(f"rise {d.temperature_rise_k:.0f} K exceeds the {req.max_rise_k:g} K allowed")
    if lim.max_mass_kg is not None and mass > lim.max_mass_kg:
        out.append(f"mass {mass * 1e3:.0f} g exceeds the {lim.max_mass_kg * 1e3:g} g allowed")
    for top, dim, what in ((lim.max_length_m, outline[0], "length"), (lim.max_width_m, outline[1], "width"),
                           (lim.max_height_m, outline[2], "height")):
        if top is not None and dim > top + 1e-12:
            out.append(f"outline {what} {dim * 1e3:.1f} mm exceeds the {top * 1e3:g} mm allowed")
    return out


def run_candidate(req: Requirement, cat: Catalog, choice: CoreChoice, options: list[WireOption] | tuple[WireOption, ...],
                  part: str, row: int = -1, vector: VectorNumbers | None = None, note: str = "") -> Candidate:
    """Write the draft spec for one candidate and run the design engine on it (the scalar stage)."""
    from ..api import run_design
    from ..design.spec import load_spec_text

    opts = tuple(options)
    text = draft_spec_text(req, cat, choice, list(opts), part, note)
    try:
        d = run_design(load_spec_text(text, f"{part}.yaml"), cat)
    except SpecError as err:
        return Candidate(row, choice, opts, text, None, (err.message,), None, math.inf, (), math.inf, vector)
    mass = d.core.mass_kg + sum(w.mass_kg for w in d.windings)
    a, b, c = outline_m(choice.core, choice.stack_m, d.build.bulged_height_m)
    outline = (float(a), float(b), float(c))
    failed = tuple([c.message for c in d.failed] + _limit_failures(req, d, outline, mass))
    return Candidate(row, choice, opts, text, d, failed, material_cost(d, cat), outline[0] * outline[1] * outline[2],
                     outline, mass, vector)
