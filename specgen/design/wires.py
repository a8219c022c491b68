"""Choosing a stocked wire for a current (the spec's ``wire: auto``, ``auto-litz``, ``auto-tiw``)."""

from __future__ import annotations

import math

from ..catalog.models import Catalog, Wire
from ..errors import SpecError
from . import kernel as K
from .state import WireChoice


def _by_area(wires: list[Wire]) -> list[Wire]:
    return sorted(wires, key=lambda w: w.copper_area_m2)


def _class_ok(wires: list[Wire], min_class_c: int) -> list[Wire]:
    """The wires rated for the insulation system's class (IEC 60085), or all of them where none is (the
    wire-class check then says so)."""
    rated = [w for w in wires if w.thermal_class_c >= min_class_c]
    return rated or wires


def choose_wire(cat: Catalog, current_a: float, density_a_m2: float, freq_hz: float, temp_c: float,
                mode: str = "auto", strands: int = 0, min_class_c: int = 0) -> WireChoice:
    """Pick a stocked wire for a current: the wire, strands in hand and the reason in words.

    Area from the shop's current density; the strand diameter limited to STRAND_MAX_SKIN_DEPTHS skin depths
    at the operating frequency. Single wire if it can; else up to MAX_STRANDS_ROUND parallel strands of the
    largest allowed size; else Litz (strands no thicker than LITZ_STRAND_MAX_SKIN_DEPTHS skin depths) in up
    to MAX_BUNDLES_LITZ bundles. mode 'auto-tiw' picks triple-insulated wire, 'auto-litz' forces Litz.
    ``strands`` > 0: the spec fixes the strands in hand; size one strand. ``min_class_c``: the insulation
    system's class; only wires rated for it are chosen where the catalogue has any of the kind asked.
    """
    need = max(current_a, 1e-6) / density_a_m2
    wires = list(cat.wires.values())
    if strands > 0:
        pool = _by_area(_class_ok([w for w in wires if w.kind == ("tiw" if mode == "auto-tiw" else "round")
                                   and (mode == "auto-tiw" or w.grade.endswith("2"))], min_class_c))
        for w in pool:
            if w.copper_area_m2 * strands >= need:
                return WireChoice(w, strands, f"{need * 1e6:.3f} mm² in {strands} strands in hand (spec)")
        if pool:
            return WireChoice(pool[-1], strands, "largest stocked wire")
    delta = float(K.skin_depth_m(freq_hz, temp_c))
    limit = K.STRAND_MAX_SKIN_DEPTHS * delta
    if mode == "auto-tiw":
        pool = _by_area(_class_ok([w for w in wires if w.kind == "tiw"], min_class_c))
    else:
        pool = _by_area(_class_ok([w for w in wires if w.kind == "round" and w.grade.endswith("2")], min_class_c))
        if not pool:
            pool = _by_area(_class_ok([w for w in wires if w.kind == "round"], min_class_c))
    allowed = [w for w in pool if w.strand_diameter_m <= limit]
    if mode != "auto-litz":
        for w in allowed:
            if w.copper_area_m2 >= need:
                return WireChoice(w, 1, f"{need * 1e6:.3f} mm² at {density_a_m2 / 1e6:.1f} A/mm²")
        if allowed:
            biggest = allowed[-1]
            n = math.ceil(need / biggest.copper_area_m2)
            if n <= K.MAX_STRANDS_ROUND:
                for w in allowed:
                    if n * w.copper_area_m2 >= need:
                        return WireChoice(w, n, f"{need * 1e6:.3f} mm² in {n} strands: one wire would be thicker "
                                                f"than 2 skin depths ({limit * 1e3:.2f} mm)")
    litz = _by_area(_class_ok([w for w in wires
                               if w.kind == "litz" and w.strand_diameter_m <= delta * K.LITZ_STRAND_MAX_SKIN_DEPTHS],
                              min_class_c))
    for w in litz:
        if w.copper_area_m2 >= need:
            return WireChoice(w, 1, f"{need * 1e6:.3f} mm² as Litz, strands below half a skin depth "
                                    f"({delta * 1e3:.3f} mm)")
    if litz:
        biggest = litz[-1]
        n = math.ceil(need / biggest.copper_area_m2)
        if n <= K.MAX_BUNDLES_LITZ:
            return WireChoice(biggest, n, f"{need * 1e6:.3f} mm² as {n} Litz bundles in parallel")
    if pool:
        return WireChoice(pool[-1], max(1, math.ceil(need / pool[-1].copper_area_m2)), "largest stocked wire")
    raise SpecError("the catalogue holds no round magnet wire to choose from")
