"""Kinds of part, one module each, behind one small protocol.

A kind supplies only what is its own: how turns (and a gap) are found at a temperature, its figures for the
Design (``ElectricalSummary``), the flux checks that head the check list, and its test limits. Everything
else (resolving the catalogue, the build, losses, the temperature loop, the common checks, hipot, materials)
is ``design.pipeline``'s, written once.

A new kind (a flyback, a common-mode choke, a current transformer) is a module in this package with a class
implementing ``PartKind`` (``kinds.base``) and one ``register(...)`` line below; nothing else changes.
"""

from __future__ import annotations

from ..state import KindTests
from .base import KindRun, PartKind
from .common_mode_choke import CommonModeChokeKind
from .current_transformer import CurrentTransformerKind
from .flyback import FlybackKind
from .inductor import InductorKind
from .transformer import TransformerKind

__all__ = ["KindRun", "KindTests", "PartKind", "kind_for", "kind_names", "register", "unregister"]

_REGISTRY: dict[str, PartKind] = {}


def register(kind: PartKind) -> None:
    """Make a kind available to ``design()`` under ``kind.name`` (the spec's ``kind:``)."""
    _REGISTRY[kind.name] = kind


def unregister(name: str) -> None:
    """Withdraw a kind (tests that register a stand-in)."""
    _REGISTRY.pop(name, None)


def kind_for(name: str) -> PartKind:
    """The registered kind of part for a spec's ``kind:`` (KeyError if none)."""
    return _REGISTRY[name]


def kind_names() -> tuple[str, ...]:
    return tuple(_REGISTRY)


register(TransformerKind())
register(InductorKind())
register(CurrentTransformerKind())
register(FlybackKind())
register(CommonModeChokeKind())
