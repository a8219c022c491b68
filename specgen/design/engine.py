"""``design(spec, catalog) -> Design``: the library's entry to the calculation (``pipeline`` holds it).

The names below the line are the engine's former helpers under their old names, kept only so the search
keeps running while it moves to ``kernel``; new code calls ``kernel``, ``resolve``, ``flux`` and ``build``.
"""

from __future__ import annotations

from typing import Any

from ..catalog.models import Catalog, Material, Wire
from . import kernel as K
from .flux import b_sat_hot_t, flux_limit
from .limits import MAX_HOT_C, SQUARE_HARMONICS
from .pipeline import design
from .resolve import core_result, resolve_core
from .result import CoreResult
from .spec import Spec
from .state import Parts, ThermalState
from .wires import choose_wire

__all__ = ["MAX_HOT_C", "SQUARE_HARMONICS", "b_sat_at_t", "choose_wire", "design", "thermal_state"]

# ------------------------------------------------------------------------------------------------ old names


def b_sat_at_t(material: Material, temp_c: float) -> float:
    return b_sat_hot_t(material, temp_c)


def thermal_state(total_loss_w: float, parts: Any, spec: Any, cat: Catalog) -> ThermalState:
    """Old signature: ``parts`` needs only ``surface_m2``; ``spec`` only ``cooling`` and ``ambient_c``."""
    return K.thermal_state(total_loss_w, parts.surface_m2, spec.cooling, spec.ambient_c, cat.shop.hotspot_margin_k)


def _flux_limit(spec: Spec, cat: Catalog, material: Material, hot_c: float) -> tuple[float, str]:
    fl = flux_limit(spec, cat, material, hot_c)
    return fl.value_t, fl.basis


def _resolve_core(spec: Spec, cat: Catalog) -> Parts:
    return resolve_core(spec, cat)


def _core_result(spec: Spec, cat: Catalog, parts: Parts, hot_c: float) -> CoreResult:
    return core_result(spec, cat, parts, b_sat_hot_t(parts.material, hot_c))


def _skin_depth_m(freq_hz: float, temp_c: float, conductor: str = "copper") -> float:
    return float(K.skin_depth_m(freq_hz, temp_c, conductor))


def _pitch_and_height(wire: Wire, strands: int) -> tuple[float, float, bool]:
    return K.pitch_and_height(wire, strands)


_Thermal = ThermalState
