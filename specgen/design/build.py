"""Layer-by-layer winding build: turns per layer, layers, the build height and each layer's own MLT.

Bobbin-wound parts: each section fills the usable breadth (breadth minus a margin each side) with turns
of pitch = the wire's overall size times strands in hand laid side by side; layers stack outwards, with
the layer tape between layers and the winding tape after the section. The mean turn length of every
layer comes from its own build height (offset-rectangle perimeter for a rectangular tube, a circle for a
round one), not one MLT for the whole coil.

Toroids: turns are laid on the inner circumference, which shrinks as layers build; each layer holds
floor(pi (ID - 2 h - d) / pitch) turns, and the turn length grows around the section as the build grows.
A tape wrap on a toroid is laid with 50 % overlap, so it adds twice its thickness (common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..physics import geometry
from .result import Layer


@dataclass(frozen=True)
class Former:
    """What the winding is laid on."""
    kind: str                 # 'rect' | 'round' | 'toroid'
    tube_width_m: float = 0.0
    tube_depth_m: float = 0.0
    breadth_m: float = 0.0
    height_m: float = 0.0     # available build
    od_m: float = 0.0         # toroid, over its coating
    id_m: float = 0.0
    core_height_m: float = 0.0

    def mlt_m(self, build_to_centre_m: float) -> float:
        if self.kind == "rect":
            return geometry.mlt_rect_m(self.tube_width_m, self.tube_depth_m, build_to_centre_m)
        if self.kind == "round":
            return geometry.mlt_round_m(self.tube_width_m, build_to_centre_m)
        return geometry.toroid_turn_length_m(self.od_m, self.id_m, self.core_height_m, build_to_centre_m)


@dataclass(frozen=True)
class SectionBuild:
    turns_per_layer: int
    layers: tuple             # of Layer
    end_build_m: float
    copper_length_m: float
    pitch_m: float            # along the layer, per turn (all strands in hand)
    layer_height_m: float
    usable_breadth_m: float


def wind_section(former: Former, turns: int, pitch_m: float, layer_height_m: float, start_build_m: float,
                 margin_m: float, layer_tape_m: float, one_turn_per_layer: bool = False) -> SectionBuild | None:
    """Lay ``turns`` turns from ``start_build_m`` outwards. Returns None if not even one turn fits a layer.

    pitch_m: space one turn takes along the layer (overall diameter x strands in hand side by side).
    layer_height_m: radial height of one layer of this wire.
    layer_tape_m: insulation between successive layers (already multiplied by tape layers).
    one_turn_per_layer: foil, where each turn is a full-width layer.
    """
    if former.kind == "toroid":
        # the wire's centre line runs on this layer's inner face: the hole shrinks layer by layer
        def capacity_at(h: float) -> tuple[int, float]:
            circumference = geometry.toroid_inner_circumference_m(former.id_m, h + layer_height_m / 2.0)
            return int(math.floor(circumference / pitch_m + 1e-9)), circumference
    else:
        usable = former.breadth_m - 2.0 * margin_m
        if one_turn_per_layer:
            fixed = 1 if pitch_m <= usable + 1e-12 else 0
        else:
            fixed = int(math.floor(usable / pitch_m + 1e-9)) if usable > 0 else 0

        def capacity_at(h: float) -> tuple[int, float]:
            return fixed, usable

    layers = []
    h = start_build_m
    left = turns
    length = 0.0
    first = None
    while left > 0:
        capacity, room = capacity_at(h)
        if capacity < 1:
            return None
        if first is None:
            first = (capacity, room)
        n = min(capacity, left)
        centre = h + layer_height_m / 2.0
        mlt = former.mlt_m(centre)
        layers.append(Layer(index=len(layers) + 1, turns=n, build_to_centre_m=centre, mlt_m=mlt, length_m=n * mlt,
                            turns_capacity=capacity))
        length += n * mlt
        left -= n
        h += layer_height_m
        if left > 0:
            h += layer_tape_m     # already x2 on a toroid for the half-lap (the caller's tape_factor)
    return SectionBuild(first[0], tuple(layers), h, length, pitch_m, layer_height_m, first[1])


def tape_factor(former: Former) -> float:
    """Radial build of one wrap of tape relative to its thickness (50 % overlap on a toroid)."""
    return 2.0 if former.kind == "toroid" else 1.0
