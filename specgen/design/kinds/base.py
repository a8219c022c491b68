"""The protocol every kind of part implements (see the package docstring)."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Protocol

if TYPE_CHECKING:
    from ...catalog.models import Catalog
    from ..result import Check
    from ..spec import Spec
    from ..state import DesignState, ElectricalSummary, Evaluation, KindTests, Parts, ThermalState


class KindRun(Protocol):
    """One design of one kind in progress: it holds what the kind chose (turns, wires) between passes."""

    def first(self, temp: ThermalState) -> tuple[Evaluation[Any], int]:
        """Choose turns, gap and wires at the first-guess temperature: the evaluation and the passes it took."""
        ...

    def again(self, previous: Evaluation[Any], temp: ThermalState) -> Evaluation[Any]:
        """Evaluate again at a new temperature (one pass of the pipeline's temperature loop)."""
        ...

    def summary(self, ev: Evaluation[Any], temp: ThermalState) -> ElectricalSummary:
        """The kind's figures and own checks for the Design, from the settled evaluation."""
        ...


class PartKind(Protocol):
    name: str

    def start(self, spec: Spec, cat: Catalog, parts: Parts) -> KindRun:
        """Read the spec's requirement for this kind (a located SpecError if it cannot be met)."""
        ...

    def flux_checks(self, state: DesignState) -> list[Check]:
        """Saturation and the kind's other flux checks: they head the check list."""
        ...

    def test_limits(self, state: DesignState) -> KindTests:
        ...
