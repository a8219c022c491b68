"""Layer-by-layer winding build, the AC factor of every section and the leakage inductance of the window.

Bobbin-wound parts: each section fills the usable breadth (breadth minus a margin each side) with turns
of pitch = the wire's overall size times strands in hand laid side by side; layers stack outwards, with
the layer tape between layers and the winding tape after the section. The mean turn length of every
layer comes from its own build height (offset-rectangle perimeter for a rectangular tube, a circle for a
round one), not one MLT for the whole coil.

Toroids: turns are laid on the inner circumference, which shrinks as layers build; each layer holds
floor(pi (ID - 2 h - d) / pitch) turns, and the turn length grows around the section as the build grows.
A tape wrap on a toroid is laid with 50 % overlap, so it adds twice its thickness (common practice).

The layer formulas (centre, capacity, MLT) are the kernel's; this module lays them one layer at a time to
keep a record of every layer for the work order.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import replace

import numpy as np

from ..catalog.models import Catalog
from ..physics.layers import leakage_inductance_h
from . import kernel as K
from .result import Layer
from .spec import Spec
from .state import BuiltSection, BuiltWindow, Former, Parts, SectionBuild, WindingState

__all__ = ["Former", "SectionBuild", "copper_lengths_m", "lay_out", "leakage_h", "section_frs", "tape_factor",
           "wind_section"]


def wind_section(former: Former, turns: int, pitch_m: float, layer_height_m: float, start_build_m: float,
                 margin_m: float, layer_tape_m: float, one_turn_per_layer: bool = False,
                 share: float = 1.0) -> SectionBuild | None:
    """Lay ``turns`` turns from ``start_build_m`` outwards. Returns None if a layer would hold no turn.

    pitch_m: space one turn takes along the layer (overall diameter x strands in hand side by side).
    layer_height_m: radial height of one layer of this wire.
    layer_tape_m: insulation between successive layers (already multiplied by tape layers and tape factor).
    one_turn_per_layer: foil, where each turn is a full-width layer.
    share: the part of each layer's room the section may take (a toroid's sector: its angle over 2 pi).
    """
    usable = former.breadth_m - 2.0 * margin_m
    layers: list[Layer] = []
    left = turns
    length = 0.0
    first: tuple[int, float] | None = None
    while left > 0:
        j = len(layers)
        centre = float(K.layer_centre_m(start_build_m, float(j), layer_height_m, layer_tape_m))
        cap_f, room = K.layer_capacity(former.kind, pitch_m, usable, former.id_m, centre, one_turn_per_layer)
        if share < 1.0:                  # a sector of the ring: its share of the layer's circumference
            room = float(room) * share
            cap_f = float(int(room / pitch_m + 1e-9))
        capacity = int(cap_f)
        if capacity < 1:
            return None
        if first is None:
            first = (capacity, float(room))
        n = min(capacity, left)
        mlt = former.mlt_m(centre)
        layers.append(Layer(index=j + 1, turns=n, build_to_centre_m=centre, mlt_m=mlt, length_m=n * mlt,
                            turns_capacity=capacity))
        length += n * mlt
        left -= n
    if first is None:
        return None
    count = len(layers)
    end = start_build_m + count * layer_height_m + (count - 1) * layer_tape_m
    return SectionBuild(first[0], tuple(layers), end, length, pitch_m, layer_height_m, first[1])


def tape_factor(former: Former) -> float:
    """Radial build of one wrap of tape relative to its thickness (50 % overlap on a toroid)."""
    return 2.0 if former.kind == "toroid" else 1.0


def lay_out(spec: Spec, parts: Parts, states: Mapping[str, WindingState], cat: Catalog) -> BuiltWindow:
    """Every section in build order: its layers, the tapes after it, and the height the window reaches."""
    former = parts.former
    layer_tape = spec.layer_tape
    wind_tape = spec.winding_tape
    lt = cat.tapes[layer_tape.tape].thickness_m * layer_tape.layers if layer_tape else 0.0
    wt = cat.tapes[wind_tape.tape].thickness_m * wind_tape.layers if wind_tape else 0.0
    tf = tape_factor(former)
    out: list[BuiltSection] = []
    followers = {w.wound_with: w.name for w in spec.windings if w.wound_with}   # leader -> the one wound with it
    chamber_of = {name: chamber_of_winding(spec, name) if former.chambers else 0 for name, _ in spec.build_order}
    # each chamber builds up from the tube on its own; the last section in a chamber takes the outer wrap
    heights = {c: 0.0 for c in chamber_of.values()}
    last_in = {chamber_of[name]: order for order, (name, _) in enumerate(spec.build_order)}
    whole = former
    for order, (name, k) in enumerate(spec.build_order):
        st = states[name]
        w = st.spec
        chamber = chamber_of[name]
        former = replace(whole, breadth_m=whole.chambers[chamber - 1]) if chamber else whole
        h = heights[chamber]
        n_sec = w.sections
        turns = K.section_turns(st.turns, w.section_shares or (1.0,) * n_sec)[k - 1]
        if turns <= 0:
            return BuiltWindow(tuple(out), h, False, f"winding {name} section {k} has no turns")
        partner = followers.get(name)
        # wound together: both wires side by side in every layer, so a turn takes the pitch of both
        pitch, lh, foil = K.pitch_and_height(st.wire, st.strands + (states[partner].strands if partner else 0))
        margin = w.margin_m if w.margin_m is not None else spec.margin_m
        if former.kind == "toroid":
            margin = 0.0
        # foil needs its own insulation between turns; the layer tape is mandatory there
        sb = wind_section(former, turns, pitch, lh, h, margin, lt * tf if (lt or not foil) else 0.0, foil)
        if sb is None:
            why = (f"winding {name}: the {st.wire.label} ({pitch * 1e3:.2f} mm per turn) does not fit the "
                   + (f"{(former.breadth_m - 2 * margin) * 1e3:.2f} mm usable breadth" if former.kind != "toroid"
                      else "remaining hole"))
            return BuiltWindow(tuple(out), h, False, why)
        h = sb.end_build_m
        tape_layers = wind_tape.layers if wind_tape else 0
        tape_id = wind_tape.tape if wind_tape else None
        widths = wind_tape.widths if wind_tape else 1
        if order == last_in[chamber]:
            wrap = spec.outer_wrap or wind_tape
            tape_id = wrap.tape if wrap else None
            tape_layers = wrap.layers if wrap else 0
            widths = wrap.widths if wrap else 1
            h += (cat.tapes[wrap.tape].thickness_m * wrap.layers * tf) if wrap else 0.0
        else:
            h += wt * tf
        heights[chamber] = h
        out.append(BuiltSection(name, k, order + 1, sb, margin, tape_id, tape_layers, partner, chamber, widths))
        if partner is not None:        # the same layers, turn for turn (equal turns are held by the kind)
            out.append(BuiltSection(partner, k, order + 1, sb, margin, None, 0, name, chamber))
    return BuiltWindow(tuple(out), max(heights.values(), default=0.0), True, "")


def chamber_of_winding(spec: Spec, name: str) -> int:
    """The chamber a winding is wound in (a bifilar follower: its partner's); 1 where none is given."""
    w = spec.winding(name)
    if w.chamber is None and w.wound_with is not None:
        w = spec.winding(w.wound_with)
    return w.chamber or 1


def copper_lengths_m(built: BuiltWindow, lead_m: float) -> dict[str, float]:
    """Each winding's copper length: its sections' layers plus a lead at each end."""
    out: dict[str, float] = {}
    for s in built.sections:
        out[s.winding] = out.get(s.winding, 0.0) + s.build.copper_length_m
    for name in out:
        out[name] += 2 * lead_m
    return out


def section_frs(built: BuiltWindow, states: Mapping[str, WindingState], freq_hz: float, temp_c: float,
                waveform: str, signs: Mapping[str, float],
                harmonics_by: Mapping[str, K.Harmonics] | None = None) -> dict[tuple[str, int], float]:
    """Fr for every section from the MMF profile across the build (Dowell's layer form, per layer).

    MMF starts at zero at the tube; each layer adds turns x current with the winding's sign (primary +,
    loads -); a square-wave current is weighted over its odd harmonics (``kernel.current_harmonics``), a
    winding in ``harmonics_by`` over its own (a rectifier's pulses: Dowell per harmonic, sum I_n^2 R_ac(n)).
    On a split bobbin each chamber's MMF starts at zero at the tube: a chamber holding one side of the
    transformer builds its full ampere-turns across its layers (conservative: the field beside chambers
    runs partly along the leg, which this layer form does not credit).
    """
    if freq_hz <= 0:
        return {}
    delta_cu = float(K.skin_depth_m(freq_hz, temp_c))
    drive = K.current_harmonics(waveform)
    mmfs: dict[int, float] = {}
    out: dict[tuple[str, int], float] = {}
    for s in built.sections:
        mmf = mmfs.get(s.chamber, 0.0)
        st = states[s.winding]
        sb = s.build
        if s.wound_with is not None and (s.wound_with, s.index) in out:
            out[(s.winding, s.index)] = out[(s.wound_with, s.index)]   # bifilar: the same layers, the same field
            continue
        current = st.current_a * signs.get(s.winding, 1.0)
        hands = st.strands
        if s.wound_with is not None:       # both wires' currents step the MMF across each shared layer
            mate = states[s.wound_with]
            current += mate.current_a * signs.get(s.wound_with, 1.0)
            hands += mate.strands
        geo = K.wire_geometry(st.wire, hands)
        turns = [layer.turns for layer in sb.layers]
        faces = [mmf]
        for t in turns:
            faces.append(faces[-1] + t * current)
        mmfs[s.chamber] = faces[-1]
        if abs(current) < 1e-12:
            out[(s.winding, s.index)] = 1.0
            continue
        # every layer of the section in one call (rows = layers), summed in build order
        harmonics = harmonics_by.get(s.winding, drive) if harmonics_by else drive
        frs = K.layer_ac_factor(geo, np.array(turns, dtype=float), sb.usable_breadth_m, delta_cu,
                                np.array(faces[:-1]), np.array(faces[1:]), harmonics)
        sec_loss = 0.0
        sec_dc = 0.0
        for fr_layer, layer in zip(np.atleast_1d(frs).tolist(), sb.layers):
            sec_loss += fr_layer * layer.length_m
            sec_dc += layer.length_m
        out[(s.winding, s.index)] = sec_loss / sec_dc if sec_dc > 0 else 1.0
    return out


def leakage_h(built: BuiltWindow, former: Former, currents: Mapping[str, float], ref: str) -> float:
    """Leakage inductance referred to winding ``ref``, from the MMF across the build (energy method).

    ``currents`` are the windings' load currents with their MMF sign, balanced in ampere-turns
    (primary + sum N_s I_s / N_p, loads -I_s), so the MMF returns to zero outside the last winding.
    Windings in the chambers of a split bobbin sit side by side: ``leakage_chambers_h``.
    """
    if len({s.chamber for s in built.sections}) > 1:
        return leakage_chambers_h(built, former, currents, ref)
    segments: list[tuple[float, float, float, float]] = []
    mmf = 0.0
    h = 0.0
    breadths: list[float] = []
    laid: set[tuple[str, int]] = set()
    for s in built.sections:
        sb = s.build
        if s.wound_with is not None and (s.wound_with, s.index) in laid:
            continue                       # bifilar: its layers were counted with its partner's
        laid.add((s.winding, s.index))
        current = currents.get(s.winding, 0.0) + (currents.get(s.wound_with, 0.0) if s.wound_with else 0.0)
        breadths.append(sb.usable_breadth_m)
        for layer in sb.layers:
            start = layer.build_to_centre_m - sb.layer_height_m / 2.0
            if start > h:        # insulation or tape before this layer: MMF constant across it
                segments.append((start - h, mmf, mmf, former.mlt_m((start + h) / 2.0)))
            f2 = mmf + layer.turns * current
            segments.append((sb.layer_height_m, mmf, f2, layer.mlt_m))
            mmf = f2
            h = start + sb.layer_height_m
    breadth = sum(breadths) / len(breadths) if breadths else 0.0
    return leakage_inductance_h(segments, breadth, currents.get(ref, 0.0))


def winding_fr(built: BuiltWindow, frs: Mapping[tuple[str, int], float], winding: str) -> float:
    """A winding's Fr: its sections' factors weighted by their copper length (1 with no copper)."""
    secs = built.of(winding)
    clen = sum(s.build.copper_length_m for s in secs)
    if clen <= 0:
        return 1.0
    return sum(frs.get((winding, s.index), 1.0) * s.build.copper_length_m for s in secs) / clen



def leakage_chambers_h(built: BuiltWindow, former: Former, currents: Mapping[str, float], ref: str) -> float:
    """Leakage inductance of windings side by side in the chambers of a split bobbin (energy method).

    The same energy method as concentric windings with the roles of the two directions exchanged: the
    leakage field crosses the window from the centre leg to the outer leg (its span the bobbin's build
    height h), and the ampere-turns vary along the leg: across a chamber's copper (its breadth less the
    margins) they rise linearly by the chamber's ampere-turns; across the margins either side of the divider
    and the divider itself they stay constant. For two chambers of copper breadth a and b, a gap c between
    the copper and N I ampere-turns this is L = mu0 N^2 MLT (c + (a + b)/3) / h, the side-by-side form of
    the textbook result (McLyman, Transformer and Inductor Design Handbook, leakage inductance of
    side-by-side windings; Snelling, Soft Ferrites, the energy method; both from memory). The radial
    leakage between windings stacked in one chamber is left out (small beside the chamber-to-chamber field
    when each chamber holds one side of the transformer).
    """
    chambers = sorted({s.chamber for s in built.sections})
    segments: list[tuple[float, float, float, float]] = []
    mmf = 0.0
    gap = 0.0
    for c in chambers:
        secs = [s for s in built.sections if s.chamber == c]
        amp_turns = 0.0
        turns = 0
        length = 0.0
        for s in secs:
            current = currents.get(s.winding, 0.0)
            for layer in s.build.layers:
                amp_turns += layer.turns * current
                turns += layer.turns
                length += layer.length_m
        breadth = former.chambers[c - 1] if former.chambers else former.breadth_m
        copper = max(s.build.usable_breadth_m for s in secs)
        margin = max(0.0, (breadth - copper) / 2.0)
        mlt = length / turns if turns else former.mlt_m(0.0)
        if segments:
            segments.append((gap + margin, mmf, mmf, mlt))
        segments.append((copper, mmf, mmf + amp_turns, mlt))
        mmf += amp_turns
        gap = margin + former.divider_m
    return leakage_inductance_h(segments, former.height_m, currents.get(ref, 0.0))
