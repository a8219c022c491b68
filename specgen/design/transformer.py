"""Old import path of the transformer's names, kept for the search until it reads ``kernel``; the kind itself
is ``design.kinds.transformer``."""

from __future__ import annotations

from typing import Any

from . import kernel as K
from .limits import WIRE_CHOICE_TEMP_C

__all__ = ["WIRE_CHOICE_TEMP_C"]


def _magnetizing(spec: Any, v: float, lm: Any) -> tuple[Any, Any]:
    return K.magnetizing_current_a(v, spec.frequency_hz, lm, spec.waveform, spec.duty)
