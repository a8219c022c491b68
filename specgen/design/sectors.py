"""Sector winding on a toroid: each winding on its own sector of the ring, side by side, not over one another.

A common-mode choke's lines are wound this way: n equal sectors of angle theta_w with an unwound gap theta_g
between neighbours, n (theta_w + theta_g) = 2 pi. Each sector starts on the core (over its wrap) and builds
inwards like any toroid winding (``build.wind_section``), but a layer holds only the sector's share of the
layer's inner circumference. The gap is asked as a clear distance: the chord 2 r sin(theta_g / 2) at the
innermost copper (the smallest radius, where the sectors' edge turns come closest), found by laying the
sectors and narrowing the gap angle's radius to the build until it settles.

The gap between the sectors is the line-to-line creepage and clearance (``insulation`` reads
``BuiltWindow.sectors``); the outer wrap, where the spec gives one, goes over the whole ring after the last
sector.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

from ..catalog.models import Catalog
from . import kernel as K
from .build import tape_factor, wind_section
from .spec import Spec
from .state import BuiltSection, BuiltWindow, Former, Parts, SectorLayout, WindingState

_PASSES = 6          # gap angle against the build: settles in two or three


def _chord_angle_rad(gap_m: float, radius_m: float) -> float | None:
    """The angle whose chord at ``radius_m`` is ``gap_m`` (None when the radius cannot hold it)."""
    if radius_m <= 0 or gap_m >= 2.0 * radius_m:
        return None
    return 2.0 * math.asin(gap_m / (2.0 * radius_m))


def lay_out_sectors(spec: Spec, parts: Parts, states: Mapping[str, WindingState], cat: Catalog,
                    gap_m: float) -> BuiltWindow:
    """Every winding on its own sector, in the spec's build order, the sectors ``gap_m`` apart at the bore."""
    former = parts.former
    n = len(spec.build_order)
    layer_tape = spec.layer_tape
    tf = tape_factor(former)
    lt = cat.tapes[layer_tape.tape].thickness_m * layer_tape.layers * tf if layer_tape else 0.0
    wrap = spec.outer_wrap
    wrap_m = cat.tapes[wrap.tape].thickness_m * wrap.layers * tf if wrap else 0.0
    radius = former.id_m / 2.0
    built = BuiltWindow((), 0.0, False, "the sector gap leaves no room for the windings")
    for _ in range(_PASSES):
        gap_angle = _chord_angle_rad(gap_m, radius)
        if gap_angle is None or n * gap_angle >= 2.0 * math.pi:
            return BuiltWindow((), 0.0, False, f"a {gap_m * 1e3:g} mm gap between {n} sectors leaves no room in "
                                               f"the {former.id_m * 1e3:.1f} mm bore")
        winding_angle = 2.0 * math.pi / n - gap_angle
        built = _lay(spec, states, former, n, winding_angle, gap_angle, lt, wrap_m, wrap.tape if wrap else None,
                     wrap.layers if wrap else 0)
        if not built.ok:
            return built
        inner = former.id_m / 2.0 - (built.height_m - wrap_m)
        if abs(inner - radius) < 1e-7:
            break
        radius = inner
    assert built.sectors is not None
    chord = 2.0 * (former.id_m / 2.0 - (built.height_m - wrap_m)) * math.sin(built.sectors.gap_angle_rad / 2.0)
    return BuiltWindow(built.sections, built.height_m, built.ok, built.fail_reason,
                       SectorLayout(built.sectors.winding_angle_rad, built.sectors.gap_angle_rad, chord, gap_m))


def _lay(spec: Spec, states: Mapping[str, WindingState], former: Former, n: int, winding_angle: float, gap_angle: float,
         layer_tape_m: float, wrap_m: float, wrap_tape: str | None, wrap_layers: int) -> BuiltWindow:
    out: list[BuiltSection] = []
    top = 0.0
    share = winding_angle / (2.0 * math.pi)
    for order, (name, k) in enumerate(spec.build_order):
        st = states[name]
        pitch, lh, _foil = K.pitch_and_height(st.wire, st.strands)
        sb = wind_section(former, st.turns, pitch, lh, 0.0, 0.0, layer_tape_m, False, share)
        if sb is None:
            return BuiltWindow(tuple(out), top, False, f"winding {name}: the {st.wire.label} ({pitch * 1e3:.2f} mm "
                                                       f"per turn) does not fit its {math.degrees(winding_angle):.0f}° "
                                                       f"sector")
        top = max(top, sb.end_build_m)
        last = order == n - 1
        out.append(BuiltSection(name, k, order + 1, sb, 0.0, wrap_tape if last else None,
                                wrap_layers if last else 0))
    return BuiltWindow(tuple(out), top + wrap_m, True, "", SectorLayout(winding_angle, gap_angle, 0.0, 0.0))
