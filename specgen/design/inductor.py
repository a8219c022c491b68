"""Old import path of the inductor's constants, kept for the search until it reads ``kernel``; the kind itself
is ``design.kinds.inductor``."""

from __future__ import annotations

from .limits import GAP_STEP_M, RIPPLE_SKIN_FRACTION

__all__ = ["GAP_STEP_M", "RIPPLE_SKIN_FRACTION"]
