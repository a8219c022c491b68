"""The design package's small vocabularies as types (no numpy: the Design's readers import this)."""

from __future__ import annotations

from typing import Literal

FormerKind = Literal["rect", "round", "toroid"]
WireKind = Literal["round", "litz", "tiw", "foil", "strip"]
Waveform = Literal["sine", "square", "unipolar"]
CheckLevel = Literal["pass", "warn", "fail"]
Cooling = Literal["natural", "forced", "potted"]
GapArrangement = Literal["centre", "spacer", "none"]
