"""A lot at the station: its work order, the Design it was issued from, its tests and its floor steps.

The Design comes from the part's spec in the shop's parts folder, run once and kept; a work order is
served only by the spec whose fingerprint is the one the order was issued with, so the station's
limits and steps are those of the paper the floor holds.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

from specgen.errors import SpecError
from specgen.register import Order

from .model import Column
from .plan import station_columns


@dataclasses.dataclass(frozen=True, slots=True)
class Step:
    """One floor step as the winder's screen shows it (the work order's own wording)."""

    n: int
    heading: str
    lines: tuple[str, ...]
    rows: tuple[tuple[str, str], ...]
    cautions: tuple[str, ...] = ()


@dataclasses.dataclass(frozen=True, slots=True)
class Lot:
    order: Order
    design: Any
    columns: tuple[Column, ...]
    steps: tuple[Step, ...]

    @property
    def serials(self) -> list[str]:
        return [str(i) for i in range(1, self.order.qty + 1)]

    @property
    def keys(self) -> tuple[str, ...]:
        return tuple(c.key for c in self.columns)

    def column(self, key: str) -> Column:
        for c in self.columns:
            if c.key == key:
                return c
        raise SpecError(f"{self.order.part} has no test {key!r}")


def floor_steps(design: Any, cat: Any, order: Order) -> tuple[Step, ...]:
    """The work order's steps in floor order (wind, terminate, assemble, varnish, mark)."""
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context

    ctx = build_context(design, DocumentSettings.from_shop(cat.shop), number=order.number, qty=order.qty, due=order.due,
                        lot=order.lot)
    out = []
    for s in ctx["steps"]:
        lines = list(s["lines"])
        if s.get("dot"):
            lines.append(s["dot"])
        heading = s["heading"] + (f": {s['turns']} turns" if s.get("turns") else "")
        out.append(Step(s["n"], heading, tuple(lines), tuple((r[0], r[1]) for r in s["rows"])))
    v = ctx["varnish"]
    if v:
        out.append(Step(v["n"], f"Varnish: {v['name']}", tuple(v["lines"]), (), tuple(v["caution"])))
    for s in ctx["after_varnish"]:
        out.append(Step(s["n"], s["heading"], tuple(s["lines"]), ()))
    return tuple(sorted(out, key=lambda s: s.n))


class PartsLibrary:
    """The specs of a parts folder, designed once each, found by part and revision."""

    def __init__(self, parts_dirs: list[Path], cat: Any):
        self.cat = cat
        self.dirs = [Path(p) for p in parts_dirs]
        self._designs: dict[tuple[str, str], Any] | None = None
        self.skipped: list[str] = []
        self._lots: dict[tuple[str, str], Lot] = {}

    def _load(self) -> dict[tuple[str, str], Any]:
        if self._designs is None:
            from specgen.api import run_design
            from specgen.design.spec import load_spec

            found: dict[tuple[str, str], Any] = {}
            for folder in self.dirs:
                for path in sorted(folder.glob("*.yaml")):
                    try:
                        spec = load_spec(path)
                        found[(spec.part, spec.revision)] = run_design(spec, self.cat)
                    except SpecError as err:
                        self.skipped.append(f"{path.name}: {err}")
            self._designs = found
        return self._designs

    def parts(self) -> list[tuple[str, str]]:
        return sorted(self._load())

    def design(self, part: str, revision: str) -> Any:
        found = self._load().get((part, revision))
        if found is None:
            where = ", ".join(str(d) for d in self.dirs) or "no parts folder"
            raise SpecError(f"no spec of {part} revision {revision} in {where}")
        return found

    def lot(self, order: Order) -> Lot:
        """The lot of a work order (kept: a lot's steps and columns never change once issued)."""
        key = (order.number, order.state)
        if key not in self._lots:
            design = self.design(order.part, order.revision)
            if design.fingerprint != order.fingerprint:
                raise SpecError(f"{order.number} was issued from {order.part} rev {order.revision} with fingerprint "
                                f"{order.fingerprint[:12]}; the spec found now gives {design.fingerprint[:12]}: "
                                "the spec or the catalogue changed since, so its limits cannot be used")
            self._lots[key] = Lot(order, design, station_columns(design), floor_steps(design, self.cat, order))
        return self._lots[key]
