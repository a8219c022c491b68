"""Insulation coordination of every barrier the spec declares, against what the build provides.

For each barrier (two sides: windings, ``all`` or ``core``) the requirement comes from
``standards.insulation.coordinate_barrier`` (IEC 60664-1 tables: rated impulse voltage from the shop's mains
voltage and overvoltage category, clearance, creepage never less than the clearance, thin-sheet solid
insulation, hipot). What the build provides is measured here, once:

- between windings on a bobbin: the creepage path from one winding's end turn out to the flange, round the
  edge of the barrier tape and back to the other winding's end turn: for each side the smaller of its margin
  and the barrier tape's overhang past its copper, ``min(m, (min(w, B) - b) / 2)`` with tape width w,
  bobbin breadth B and the copper's breadth b (a tape running flange to flange gives the whole margin).
  The same path is taken as the clearance (the tape seals the direct line; the air path follows the margin).
  The pins: the gap between the nearest pins of the two sides (row spacing or pitch, less a pin's width);
- solid insulation between windings: the tape layers wound between them, each layer's breakdown
  (thickness x dielectric strength) against the grade's type-test voltage: one layer passing for basic;
  for supplementary and reinforced two layers each passing, or three of which any two together pass
  (IEC 62368-1 5.4.4.6, from memory). Triple-insulated wire on one side counts as the solid insulation;
- a bifilar pair (``wound_with``) whose two wires are on opposite sides of a barrier: only a wire whose own
  insulation is rated for the grade (triple-insulated wire) carries it; otherwise the barrier fails with what to do;
- leads: every lead of the barrier's windings sleeved with a sleeving whose breakdown reaches the test voltage;
- to the core on a toroid: the core wrap (half-lapped tape, so two thicknesses a layer; creepage along the laps,
  half the tape width a layer) or a coating with a rated electric strength; nothing under the first winding fails;
- to the core on a bobbin: the winding's margin plus the bobbin's moulded path over the flange and the rated
  strength of its wall, both from the catalogue (missing figures fail: the bobbin must be measured).

- between the chambers of a split bobbin: over the divider wall (``physics.insulation_paths``), the wall itself
  the solid insulation (its rated strength; its thickness where the grade asks one);
- the outermost winding of each chamber to the core over the top of the build, and a toroid's lead exits.

Also here: whether the barrier, layer and wrap tapes cover what they must (``tape-width``), and a split
bobbin whose windings name no chamber (``split-bobbin``).

Figures from the standards are recalled from memory (see ``standards.insulation``); the applicable product
safety standard, the customer's drawing, local codes and licensed practice decide.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace

from ..catalog.models import InsulationBasis, Sleeving, Tape
from ..physics import insulation_paths as paths
from ..records import record
from ..standards import insulation as ins
from .resolve import spec_error
from .result import BarrierResult, Check, InsulationResult
from .spec import THROUGH_CONDUCTOR, Barrier, Spec, Winding
from .state import BuiltSection, DesignState

_CATEGORY = ("I", "II", "III", "IV")
TOROID_WRAP_LAP = 0.5        # core wrap and winding tapes on a toroid are half-lapped (common practice)


@record(slots=True)
class _Provided:
    creepage_mm: float | None
    clearance_mm: float | None
    path: str
    solid_ok: bool
    solid: str
    problems: tuple[str, ...] = ()
    unknown: tuple[str, ...] = ()       # what the catalogue lacks to check (a warning: measure it)
    solid_said: bool = False            # a problem already says what the solid insulation lacks
    lead_exit_mm: float | None = None   # toroid: the leads of the two sides leave this far apart


def side_names(spec: Spec, side: str) -> list[str]:
    """The windings one side of a barrier names: 'all', 'core' (none), or names joined by '+'."""
    if side.strip() in ("all", "all windings"):
        return [w.name for w in spec.windings]
    if side.strip() in ("core", THROUGH_CONDUCTOR):
        return []
    return [n.strip() for n in side.split("+")]


def winding_pins(w: Winding) -> list[str]:
    return [p for p in (w.start, *w.section_pins, w.finish) if p]


def hipot_connection(spec: Spec, a: str, b: str) -> str:
    """Which pins to short together and where to apply the test voltage, in words for the test station."""
    groups = []
    for side in (a, b):
        pins = [p for n in side_names(spec, side) for p in winding_pins(spec.winding(n))]
        if pins:
            groups.append("short " + "-".join(pins))
    if THROUGH_CONDUCTOR in (a.strip(), b.strip()):
        groups.append("fill the bore with a test conductor (metal foil or a bar touching the whole outer wrap) "
                      "in place of the primary")
    where = "apply between them and the core" if "core" in (a.strip(), b.strip()) else "apply between"
    others = [p for w in spec.windings if w.name not in {*side_names(spec, a), *side_names(spec, b)}
              for p in winding_pins(w)]
    tail = f"; tie {'-'.join(others)} to the return" if others else ""
    return "; ".join(groups) + f"; {where}{tail}"


def _grade(rating: str) -> ins.Grade:
    # double insulation (basic + supplementary) is dimensioned as reinforced (IEC 60664-1 5.1.6, from memory)
    return ins.Grade.REINFORCED if rating == "double" else ins.Grade(rating)


def _mains_connected(spec: Spec, names: Sequence[str]) -> bool:
    return any(spec.winding(n).role in ("primary", "reset") for n in names)


def _layers_pass(breakdowns: list[float], test_v: float, solid: ins.SolidInsulationRequirement) -> bool:
    each = sum(1 for v in breakdowns if v >= test_v)
    if each >= solid.layers_each_passing:
        return True
    n = solid.layers_any_two_passing
    weakest = sorted(breakdowns)
    return n is not None and len(breakdowns) >= n and weakest[0] + weakest[1] >= test_v


def _tape_layers(state: DesignState, tapes: Sequence[tuple[str, int]], factor: int = 1) -> tuple[list[float], str]:
    cat = state.cat
    out: list[float] = []
    words = []
    for tid, layers in tapes:
        t: Tape = cat.tapes[tid]
        bd = t.thickness_m * t.dielectric_strength_v_m
        out += [bd] * (layers * factor)
        words.append(f"{layers * factor} x {tid} ({bd / 1e3:.1f} kV each)")
    return out, " + ".join(words) if words else "nothing"


def _edge_mm(sec: BuiltSection, tape_width_m: float | None, breadth_m: float) -> float:
    """One side's share of the creepage path: its margin, or the barrier tape's overhang past its copper."""
    if tape_width_m is None:
        return 0.0
    overhang = max(0.0, (min(tape_width_m, breadth_m) - sec.build.usable_breadth_m) / 2.0)
    return min(sec.margin_m, overhang) * 1e3


def _lacking(**figures: float | None) -> str:
    """The catalogue keys among ``figures`` that are not on file, as the check names them."""
    return ", ".join(k for k, v in figures.items() if v is None)


def _pin_gap_mm(state: DesignState, a: list[str], b: list[str]) -> tuple[float | None, str]:
    bob = state.parts.bobbin
    if bob is None:
        return None, ""
    if bob.pin_size_m is None or (bob.pin_rows > 1 and bob.pin_row_spacing_m is None):
        return None, f"bobbin {bob.id} has no {_lacking(pin_row_spacing=bob.pin_row_spacing_m, pin_size=bob.pin_size_m)} on file"
    pa = [p for n in a for p in winding_pins(state.spec.winding(n))]
    pb = [p for n in b for p in winding_pins(state.spec.winding(n))]
    per_row = math.ceil(len(bob.pins) / bob.pin_rows)
    best = math.inf
    for x in pa:
        for y in pb:
            i, j = bob.pins.index(x), bob.pins.index(y)
            if i // per_row == j // per_row:
                gap = abs(i - j) * bob.pin_pitch_m - bob.pin_size_m
            else:
                gap = (bob.pin_row_spacing_m or 0.0) - bob.pin_size_m
            best = min(best, gap)
    return best * 1e3, f"pins {bob.pin_pitch_m * 1e3:g} mm pitch"


def _sleeving_ok(state: DesignState, names: Sequence[str], test_v: float) -> tuple[bool, str]:
    spec, cat = state.spec, state.cat
    weakest: tuple[float, str] | None = None
    for n in names:
        sid = spec.winding(n).lead_sleeving or spec.sleeving
        if not sid:
            return False, f"the leads of {n} are not sleeved"
        bd = cat.sleevings[sid].breakdown_v
        if weakest is None or bd < weakest[0]:
            weakest = (bd, sid)
    if weakest is None:
        return True, ""
    if weakest[0] < test_v:
        return False, f"lead sleeving {weakest[1]} breaks down at {weakest[0] / 1e3:g} kV, below the {test_v:.0f} V test"
    return True, f"leads in {weakest[1]} ({weakest[0] / 1e3:g} kV)"


_GRADE_RANK = {"functional": 0, "basic": 1, "supplementary": 1, "reinforced": 2, "double": 2}


def _bifilar_across(state: DesignState, a: list[str], b: list[str], grade: str) -> tuple[list[str], list[str]]:
    """Bifilar pairs (``wound_with``) whose two wires sit on opposite sides of the barrier: the pairs whose
    wire carries the grade itself (triple-insulated wire rated for it, on either wire), and a sentence for
    each pair that does not. Two wires side by side in one layer have only their own insulation between
    them (no tape, no margin), so only a wire whose insulation is rated for the grade can carry it
    (IEC 62368-1 5.4.4.6 and Annex J wound-component wire, from memory)."""
    carried: list[str] = []
    problems: list[str] = []
    if grade == "functional":
        return carried, problems
    for w in state.spec.windings:
        mate = w.wound_with
        if mate is None or not ((w.name in a and mate in b) or (w.name in b and mate in a)):
            continue
        wires = [state.states[n].wire for n in (w.name, mate)]
        rated = [x for x in wires if x.kind == "tiw" and _GRADE_RANK.get(x.insulation_rating, 0) >= _GRADE_RANK[grade]]
        if rated:
            carried.append(f"{w.name} wound with {mate} in {rated[0].id} (its insulation rated {rated[0].insulation_rating})")
        else:
            problems.append(
                f"{w.name} is wound with {mate} (bifilar) across this {grade} barrier: two wires side by side have "
                f"only their enamel between them, no tape or margin. Wind {w.name} and {mate} as separate sections "
                f"with the barrier tape between them, or wind both in triple-insulated wire rated {grade} "
                f"(wire: a TIW- entry)")
    return carried, problems


def lead_exit_spacing_m(state: DesignState) -> float:
    """How far apart round the toroid's outside the leads of two windings across a barrier leave: the spec's
    ``insulation.lead_exit_spacing``, else on opposite sides of the ring (half the core's outer circumference)."""
    spec, former = state.spec, state.parts.former
    if spec.lead_exit_spacing_m is not None:
        return spec.lead_exit_spacing_m
    return math.pi * former.od_m / 2.0


def _lead_od_m(state: DesignState, name: str) -> float:
    """A lead's outside diameter where it leaves the winding: its sleeving's, else the wire's."""
    sid = state.spec.winding(name).lead_sleeving or state.spec.sleeving
    if sid:
        sl: Sleeving = state.cat.sleevings[sid]
        return sl.bore_m + 2.0 * sl.wall_m
    return state.states[name].wire.overall_diameter_m


def _lead_exit(state: DesignState, a: list[str], b: list[str]) -> tuple[float, float, str]:
    """Creepage and clearance between the leads of the two sides where they leave a toroid.

    The leads leave at the core's outer edge (radius R over its insulation: conservative, the wound ring is
    larger) an arc s apart, so theta = s / R. Creepage: the shorter of the arc round the outside and the path
    across the ring's end face (``physics.insulation_paths.ring_face_path_m``, round the finished bore);
    clearance: the chord through air. Less half of each lead's outside diameter (its sleeving, or the wire).
    """
    former = state.parts.former
    radius = former.od_m / 2.0
    bore = max(0.0, former.id_m / 2.0 - state.built.height_m)
    spacing = min(lead_exit_spacing_m(state), math.pi * radius)
    theta = spacing / radius
    leads = (max(_lead_od_m(state, n) for n in a) + max(_lead_od_m(state, n) for n in b)) / 2.0
    face = paths.ring_face_path_m(radius, bore, theta)
    creep = max(0.0, min(spacing, face) - leads) * 1e3
    clear = max(0.0, paths.chord_m(radius, theta) - leads) * 1e3
    where = ("opposite each other" if state.spec.lead_exit_spacing_m is None
             else f"{spacing * 1e3:.0f} mm apart round the core")
    return creep, clear, (f"{creep:.2f} mm between the leads where they leave the ring ({where}; "
                          f"{clear:.2f} mm through air)")


def _across(lo: BuiltSection, hi: BuiltSection, a: list[str], b: list[str]) -> bool:
    """Two built sections on opposite sides of a barrier, one over the other (not a bifilar pair's two wires
    in the same layers, which ``_bifilar_across`` judges)."""
    if lo.order == hi.order:
        return False
    return (lo.winding in a and hi.winding in b) or (lo.winding in b and hi.winding in a)


def _between_windings(state: DesignState, a: list[str], b: list[str], coord: ins.BarrierCoordination,
                      grade: str = "basic") -> _Provided:
    cat, built = state.cat, state.built
    test_v = coord.hipot.type_test_v
    tiw = [side for side in (a, b) if side and all(state.states[n].wire.kind == "tiw" for n in side)]
    sleeve_ok, sleeve_words = _sleeving_ok(state, a + b, test_v)
    pins_mm, pins_words = _pin_gap_mm(state, a, b)
    if built.sectors is not None:
        return _between_sectors(state, sleeve_ok, sleeve_words)
    carried, problems = _bifilar_across(state, a, b, grade)
    if state.parts.former.kind == "toroid":
        # windings over one another on the ring: the winding tapes between them, half-lapped
        secs = built.sections
        worst: tuple[float, list[float], str] | None = None
        for i, lo in enumerate(secs):
            for j in range(i + 1, len(secs)):
                hi = secs[j]
                if not _across(lo, hi, a, b):
                    continue
                tapes = [(s.tape_after, s.tape_after_layers) for s in secs[i:j] if s.tape_after]
                bds, words = _tape_layers(state, tapes, factor=2)
                lap = sum(cat.tapes[t].width_m * TOROID_WRAP_LAP * n for t, n in tapes) * 1e3
                if worst is None or lap < worst[0]:
                    worst = (lap, bds, words)
        lap_mm, bds, words = worst if worst else (0.0, [], "nothing")
        solid_ok = bool(tiw) or _layers_pass(bds, test_v, coord.solid)
        words = "; ".join([*carried, words]) if carried else words
        exit_creep, exit_clear, exit_path = _lead_exit(state, a, b)
        return _Provided(min(lap_mm, exit_creep), min(lap_mm, exit_clear),
                         f"{lap_mm:.2f} mm along the laps of the half-lapped tape between the windings; {exit_path}",
                         solid_ok, words + (f"; {sleeve_words}" if sleeve_words else ""),
                         tuple(problems + ([] if sleeve_ok else [sleeve_words])),
                         lead_exit_mm=min(lead_exit_spacing_m(state), math.pi * state.parts.former.od_m / 2) * 1e3)
    secs = built.sections
    worst_creep: tuple[float, float, str] | None = None
    worst_solid: tuple[bool, str] | None = None
    unknown: list[str] = []
    for i, lo in enumerate(secs):
        for j in range(i + 1, len(secs)):
            hi = secs[j]
            if not _across(lo, hi, a, b):
                continue
            if lo.chamber != hi.chamber:
                pair = _across_divider(state, lo, hi, coord)
            else:
                pair = _same_chamber(state, lo, hi, [s for s in secs[i:j] if s.chamber == lo.chamber], coord,
                                     bool(tiw))
            if pair.unknown:
                unknown += [u for u in pair.unknown if u not in unknown]
                continue
            assert pair.creepage_mm is not None and pair.clearance_mm is not None
            if worst_creep is None or pair.creepage_mm < worst_creep[0]:
                worst_creep = (pair.creepage_mm, pair.clearance_mm, pair.path)
            if worst_solid is None or not pair.solid_ok:
                worst_solid = (pair.solid_ok, pair.solid)
    creep_mm, clear_mm, path = worst_creep if worst_creep else (None, None, "")
    solid_ok, solid_words = worst_solid if worst_solid else (True, "")
    if tiw:
        solid_words = f"triple-insulated wire on {'+'.join(tiw[0])}" + (f"; tape {solid_words}" if solid_words else "")
    if carried:
        solid_words = "; ".join([*carried, solid_words] if solid_words else carried)
    if pins_mm is not None:
        path = "; ".join(x for x in (path, f"{pins_mm:.2f} mm between the nearest pins ({pins_words})") if x)
        creep_mm = pins_mm if creep_mm is None else min(creep_mm, pins_mm)
        clear_mm = pins_mm if clear_mm is None else min(clear_mm, pins_mm)
    path = path or "no surface path between the windings in the build (not next to each other)"
    if pins_mm is None and pins_words:
        unknown.append(f"{pins_words}: the pin gap is not checked, measure it")
    if not sleeve_ok:
        problems.append(sleeve_words)
    return _Provided(creep_mm, clear_mm, path, solid_ok,
                     solid_words + (f"; {sleeve_words}" if sleeve_ok and sleeve_words else ""), tuple(problems),
                     tuple(unknown))


def _same_chamber(state: DesignState, lo: BuiltSection, hi: BuiltSection, between: Sequence[BuiltSection],
                  coord: ins.BarrierCoordination, tiw: bool) -> _Provided:
    """Two sections one over the other in one chamber (or on a one-chamber bobbin): round the barrier tape's
    edge across both margins, the tapes between them as the solid insulation."""
    cat = state.cat
    breadth = _breadth(state, lo.chamber)
    # the barrier tape as laid: its width, or two widths side by side, one against each flange
    over = cat.tapes[lo.tape_after].width_m * lo.tape_after_widths if lo.tape_after else None
    top = between[-1] if between else None
    under = cat.tapes[top.tape_after].width_m * top.tape_after_widths if top and top.tape_after else None
    e1, e2 = _edge_mm(lo, over, breadth), _edge_mm(hi, under, breadth)
    where = f" in chamber {lo.chamber}" if lo.chamber else ""
    laid = (f"two widths of {cat.tapes[lo.tape_after].width_m * 1e3:g} mm tape" if lo.tape_after_widths > 1 and
            lo.tape_after else f"{(over or 0.0) * 1e3:g} mm tape")
    desc = f"{e1:.2f} + {e2:.2f} mm round the edge of the {laid} over {lo.winding} on the {breadth * 1e3:g} mm breadth{where}"
    creep = e1 + e2
    for s in between:          # a tape laid in two widths: the seam between them runs along their overlap
        if s.tape_after and s.tape_after_widths > 1:
            overlap = max(0.0, 2.0 * cat.tapes[s.tape_after].width_m - breadth) * 1e3
            if overlap < creep:
                creep = overlap
                desc += f"; {overlap:.2f} mm along the overlap of the two widths of {s.tape_after} over {s.winding}"
    bds, words = _tape_layers(state, [(s.tape_after, s.tape_after_layers) for s in between if s.tape_after])
    return _Provided(creep, creep, desc, tiw or _layers_pass(bds, coord.hipot.type_test_v, coord.solid), words)


def _breadth(state: DesignState, chamber: int) -> float:
    """The breadth a section is laid in: its chamber's on a split bobbin, else the bobbin's."""
    former = state.parts.former
    return former.chambers[chamber - 1] if chamber and former.chambers else former.breadth_m


def _across_divider(state: DesignState, lo: BuiltSection, hi: BuiltSection,
                    coord: ins.BarrierCoordination) -> _Provided:
    """Two sections in different chambers of a split bobbin: over the divider wall (IEC 60664-1 Annex A),
    the wall itself as the solid insulation (its rated strength and, where the grade asks one, thickness)."""
    bob = state.parts.bobbin
    assert bob is not None
    wall_t, wall_h = bob.divider_thickness_m, bob.divider_height_m
    if wall_t is None or wall_h is None or bob.wall_voltage_v is None:
        lack = _lacking(divider_thickness=wall_t, divider_height=wall_h, wall_voltage=bob.wall_voltage_v)
        return _Provided(None, None, "", True, "", unknown=(
            f"bobbin {bob.id} has no {lack} on file: the path across the divider between "
            f"{lo.winding} and {hi.winding} is not checked; measure the bobbin and add it to the catalogue",))
    a_top, b_top = lo.build.end_build_m, hi.build.end_build_m
    creep = paths.over_wall_creepage_m(lo.margin_m, a_top, hi.margin_m, b_top, wall_h, wall_t) * 1e3
    clear = paths.over_wall_clearance_m(lo.margin_m, a_top, hi.margin_m, b_top, wall_h, wall_t) * 1e3
    desc = (f"{creep:.2f} mm over the {wall_t * 1e3:g} mm divider ({wall_h * 1e3:g} mm high) from {lo.winding} in "
            f"chamber {lo.chamber} ({a_top * 1e3:.1f} mm built) to {hi.winding} in chamber {hi.chamber} "
            f"({b_top * 1e3:.1f} mm built)")
    need_t = coord.solid.single_layer_min_mm
    ok = bob.wall_voltage_v >= coord.hipot.type_test_v and (need_t is None or wall_t * 1e3 + 1e-9 >= need_t)
    words = (f"the divider wall, {wall_t * 1e3:g} mm rated {bob.wall_voltage_v / 1e3:g} kV"
             + (f" (at least {need_t:g} mm thick asked)" if need_t is not None else ""))
    return _Provided(creep, clear, desc, ok, words)


def _between_sectors(state: DesignState, sleeve_ok: bool, sleeve_words: str) -> _Provided:
    """Windings side by side on sectors of a toroid: the clear gap between the sectors at the innermost copper
    is the creepage and the clearance (``design.sectors``); air, not solid insulation, separates them."""
    gap = state.built.sectors
    assert gap is not None
    mm = gap.gap_m * 1e3
    return _Provided(mm, mm, f"{mm:.2f} mm across the unwound gap between the sectors at the bore",
                     sleeve_ok, "none in the path (side by side on the ring, air between the sectors)"
                     + (f"; {sleeve_words}" if sleeve_words else ""), tuple([] if sleeve_ok else [sleeve_words]))


def _to_through_conductor(state: DesignState, names: list[str], coord: ins.BarrierCoordination) -> _Provided:
    """A current transformer's primary passed through the bore lies against the outermost build: between it and
    the winding are the outer wrap's half-lapped layers (creepage along their laps, as between windings on a
    toroid) and, at the ends, the lead sleeving. The conductor's own insulation is not counted (unknown here)."""
    spec, cat = state.spec, state.cat
    test_v = coord.hipot.type_test_v
    sleeve_ok, sleeve_words = _sleeving_ok(state, names, test_v)
    wrap = spec.outer_wrap
    if wrap is None or wrap.layers == 0:
        return _Provided(0.0, 0.0, "nothing over the winding in the bore", False, "nothing",
                         ("nothing insulates the winding from the conductor through the bore: give an outer wrap "
                          "(insulation.outer_wrap) that passes the grade",))
    tape = cat.tapes[wrap.tape]
    bds, words = _tape_layers(state, [(tape.id, wrap.layers)], factor=2)
    lap = tape.width_m * TOROID_WRAP_LAP * wrap.layers * 1e3
    solid_ok = _layers_pass(bds, test_v, coord.solid) and sleeve_ok
    return _Provided(lap, lap, f"along the laps of the outer wrap ({wrap.layers} half-lapped layers of "
                               f"{tape.width_m * 1e3:g} mm tape) to the conductor through the bore", solid_ok,
                     f"outer wrap: {words}" + (f"; {sleeve_words}" if sleeve_words else ""),
                     tuple([] if sleeve_ok else [sleeve_words]))


def _to_core(state: DesignState, names: list[str], coord: ins.BarrierCoordination) -> _Provided:
    spec, cat, parts = state.spec, state.cat, state.parts
    test_v = coord.hipot.type_test_v
    if parts.former.kind == "toroid":
        core = parts.core
        if spec.core_wrap is not None:
            tape = cat.tapes[spec.core_wrap.tape]
            bds, words = _tape_layers(state, [(tape.id, spec.core_wrap.layers)], factor=2)
            lap = tape.width_m * TOROID_WRAP_LAP * spec.core_wrap.layers * 1e3
            return _Provided(lap, lap, f"along the laps of the core wrap ({spec.core_wrap.layers} half-lapped "
                                       f"layers of {tape.width_m * 1e3:g} mm tape)",
                             _layers_pass(bds, test_v, coord.solid), f"core wrap: {words}")
        if core.coating_voltage_v is not None:
            ok = core.coating_voltage_v >= test_v
            return _Provided(None, None, "the core is enclosed in its coating (no surface path to the bare core)", ok,
                             f"core coating rated {core.coating_voltage_v / 1e3:g} kV")
        return _Provided(None, None, "nothing under the first winding", False, "nothing",
                         (f"nothing insulates the first winding from core {core.id}: add a core wrap "
                          f"(insulation.core_wrap) or use a core with a rated coating",), solid_said=True)
    bob = parts.bobbin
    assert bob is not None
    if bob.core_creepage_m is None or bob.wall_voltage_v is None:
        missing = _lacking(core_creepage=bob.core_creepage_m, wall_voltage=bob.wall_voltage_v)
        return _Provided(None, None, "", True, "the bobbin wall (strength not on file)",
                         unknown=(f"bobbin {bob.id} has no {missing} on file: the path over the flange to the core "
                                  f"and the wall are not checked; measure the bobbin and add them to the catalogue",))
    margin = min((s.margin_m for s in state.built.sections if s.winding in names), default=0.0)
    creep = (margin + bob.core_creepage_m) * 1e3
    path = f"{margin * 1e3:g} mm margin + {bob.core_creepage_m * 1e3:g} mm over the flange of {bob.id}"
    clear = creep
    for top in _over_the_top(state, names):
        path += f"; {top.path}"
        clear = min(clear, top.clearance_mm) if top.clearance_mm is not None else clear
        creep = min(creep, top.creepage_mm) if top.creepage_mm is not None else creep
    return _Provided(creep, clear, path, bob.wall_voltage_v >= test_v, f"bobbin wall rated {bob.wall_voltage_v / 1e3:g} kV")


def _over_the_top(state: DesignState, names: list[str]) -> list[_Provided]:
    """The outermost winding of each chamber (where it is on this side) to the core over the top of the build.

    Above the outer wrap the window's edge is the core (an E or EI core's outer leg, the yoke of the window):
    the gap is the available build less the build as wound, taken bulged by the shop's factor (conservative).
    Clearance: round the outer wrap's edge (its overhang past the copper, at most the margin, as between
    windings) and across the gap. Creepage: none over the top while the gap is open (the surface path is over
    the flange); where the bulged build reaches the core, the wrap's surface touches it, and the creepage is
    the path round the wrap's edge alone."""
    cat, built, former = state.cat, state.built, state.parts.former
    out = []
    for chamber in dict.fromkeys(s.chamber for s in built.sections):
        top = [s for s in built.sections if s.chamber == chamber][-1]
        if top.wound_with is not None and top.tape_after is None:      # a bifilar follower: its leader's wrap
            top = next(s for s in built.sections if s.winding == top.wound_with and s.order == top.order)
        if top.winding not in names and (top.wound_with is None or top.wound_with not in names):
            continue
        tape = cat.tapes[top.tape_after] if top.tape_after else None
        build = top.build.end_build_m + (tape.thickness_m * top.tape_after_layers if tape else 0.0)
        gap = former.height_m - build * cat.shop.bulge_factor
        edge = _edge_mm(top, tape.width_m if tape else None, _breadth(state, chamber))
        clear = edge + max(0.0, gap) * 1e3
        where = f" in chamber {chamber}" if chamber else ""
        wrap = f"round the {tape.width_m * 1e3:g} mm outer wrap's edge" if tape else "with no outer wrap"
        if gap > 0:
            path = (f"outer winding {top.winding}{where} to the core over the top: {edge:.2f} mm {wrap} + "
                    f"{gap * 1e3:.2f} mm gap (build {build * 1e3:.2f} mm x {cat.shop.bulge_factor:g} bulge under "
                    f"{former.height_m * 1e3:.2f} mm)")
            out.append(_Provided(None, clear, path, True, ""))
        else:
            path = (f"outer winding {top.winding}{where} touches the core over the top (build {build * 1e3:.2f} mm "
                    f"x {cat.shop.bulge_factor:g} bulge reaches {former.height_m * 1e3:.2f} mm): {edge:.2f} mm {wrap}")
            out.append(_Provided(edge, edge, path, True, ""))
    return out


def _one(state: DesignState, basis: InsulationBasis, b: Barrier) -> BarrierResult:
    spec = state.spec
    a_names, b_names = side_names(spec, b.a), side_names(spec, b.b)
    peak = b.peak_voltage_v if b.peak_voltage_v is not None else math.sqrt(2.0) * b.working_voltage_v
    mains = _mains_connected(spec, a_names + b_names)
    functional = b.rating == "functional"
    try:
        coord = ins.coordinate_barrier(
            grade=ins.Grade.BASIC if functional else _grade(b.rating), working_v_rms=b.working_voltage_v,
            mains_v=basis.mains_v, overvoltage_category=basis.overvoltage_category,
            pollution_degree=basis.pollution_degree, material_group=basis.material_group,
            altitude_m=basis.altitude_m, working_v_peak=peak, mains_connected=mains, step_v=basis.hipot_step_v)
    except ValueError as err:
        raise spec_error(spec, str(err), "insulation", "barriers", b.index) from None
    to_core = "core" in (b.a.strip(), b.b.strip())
    if THROUGH_CONDUCTOR in (b.a.strip(), b.b.strip()):
        prov = _to_through_conductor(state, a_names or b_names, coord)
    elif to_core:
        prov = _to_core(state, a_names or b_names, coord)
    else:
        prov = _between_windings(state, a_names, b_names, coord, b.rating)
    label = f"{b.a} to {b.b} {b.rating}"
    if functional:
        shop = state.cat.shop.hipot
        type_v = ins.round_up_to_step_v(shop["functional_v"], basis.hipot_step_v)
        routine = ins.round_up_to_step_v(type_v * shop["routine_factor"], basis.hipot_step_v)
        return BarrierResult(
            between=(b.a, b.b), grade=b.rating, working_voltage_v=b.working_voltage_v, peak_voltage_v=peak,
            mains_connected=mains, clearance_required_mm=None, clearance_available_mm=prov.clearance_mm,
            creepage_required_mm=None, creepage_available_mm=prov.creepage_mm, solid_required="none (functional)",
            solid_provided=prov.solid, ok=True, path=prov.path,
            message=f"{label}: no safety distances required; tested at the shop's functional {type_v:.0f} V",
            type_test_v=type_v, routine_test_v=routine, hipot_rule="functional insulation: shop default",
            rows="")
    clear_req, creep_req = coord.clearance.clearance_mm, coord.creepage_mm
    problems = list(prov.problems)
    if prov.creepage_mm is not None and prov.creepage_mm + 1e-9 < creep_req:
        problems.append(f"creepage needs {creep_req:.2f} mm, the build gives {prov.path}")
    if prov.clearance_mm is not None and prov.clearance_mm + 1e-9 < clear_req:
        problems.append(f"clearance needs {clear_req:.2f} mm, the build gives {prov.clearance_mm:.2f} mm")
    if not prov.solid_ok and not prov.solid_said:
        problems.append(f"solid insulation needs {coord.solid.rule} at {coord.hipot.type_test_v:.0f} V; "
                        f"the build has {prov.solid}")
    ok = not problems
    if ok:
        def given(x: float | None) -> str:
            return "no open path (solid insulation encloses it)" if x is None else f"{x:.2f} mm given"
        message = (f"{label} at {b.working_voltage_v:g} V: clearance {clear_req:.2f} mm needed, "
                   f"{given(prov.clearance_mm)}; creepage {creep_req:.2f} mm needed, {given(prov.creepage_mm)}; "
                   f"solid: {prov.solid}" + ("".join(f"; NOT CHECKED: {u}" for u in prov.unknown)))
    else:
        message = f"{label} at {b.working_voltage_v:g} V: " + "; ".join(problems)
    return BarrierResult(
        between=(b.a, b.b), grade=b.rating, working_voltage_v=b.working_voltage_v, peak_voltage_v=peak,
        mains_connected=mains, clearance_required_mm=clear_req, clearance_available_mm=prov.clearance_mm,
        creepage_required_mm=creep_req, creepage_available_mm=prov.creepage_mm, solid_required=coord.solid.rule,
        solid_provided=prov.solid, ok=ok, path=prov.path, message=message, type_test_v=coord.hipot.type_test_v,
        routine_test_v=coord.hipot.routine_v, hipot_rule=coord.hipot.rule, checked=not prov.unknown,
        lead_exit_mm=prov.lead_exit_mm,
        lead_exit_opposite=prov.lead_exit_mm is not None and spec.lead_exit_spacing_m is None,
        rows=f"impulse {coord.impulse.row}; clearance {coord.clearance.row}; creepage {coord.creepage.row}")


def coordinate(state: DesignState) -> tuple[InsulationResult | None, list[Check]]:
    """Every declared barrier coordinated and compared with the build, and the tape and chamber checks."""
    checks = _tape_cover(state) + _split_bobbin(state)
    basis = state.cat.shop.insulation
    if basis is not None and state.spec.insulation_basis:
        basis = replace(basis, **state.spec.insulation_basis)
    if not state.spec.barriers:
        return None, checks
    if basis is None:
        checks.append(Check("warn", "insulation", "the shop file has no insulation defaults (shop.insulation): "
                                                  "the barriers are not coordinated"))
        return None, checks
    barriers = tuple(_one(state, basis, b) for b in state.spec.barriers)
    checks += [Check(("pass" if r.checked else "warn") if r.ok else "fail", "insulation", r.message)
               for r in barriers]
    impulse = ins.rated_impulse_voltage_v(basis.mains_v, basis.overvoltage_category)
    result = InsulationResult(
        standard=basis.standard, overvoltage_category=_CATEGORY[basis.overvoltage_category - 1],
        pollution_degree=basis.pollution_degree, material_group=basis.material_group, altitude_m=basis.altitude_m,
        mains_v=basis.mains_v, impulse_v=impulse.impulse_v, barriers=barriers, note=ins.verify_note())
    return result, checks


def _tape_cover(state: DesignState) -> list[Check]:
    """Layer tape over the copper it separates; winding tapes and the outer wrap flange to flange.
    A tape laid in two widths a layer (``widths: 2``, one against each flange) covers up to twice its width."""
    spec, former = state.spec, state.parts.former
    if former.kind == "toroid":
        return []
    out: list[Check] = []
    barrier_below = barrier_interfaces(spec, state.built.sections)
    last = {s.chamber: s for s in state.built.sections if s.wound_with is None or s.tape_after}
    for s in state.built.sections:
        copper = s.build.usable_breadth_m
        if spec.layer_tape is not None and len(s.build.layers) > 1:
            lt = spec.layer_tape
            if (short := _short(state, lt.tape, lt.widths, copper)):
                out.append(Check("fail", "tape-width", f"layer tape {short} but winding {s.winding} lays "
                                                       f"{copper * 1e3:.1f} mm of copper: it must cover the copper"
                                                       + _remedy(lt.widths)))
        if not s.tape_after:
            continue
        if s is last[s.chamber]:
            short = _short(state, s.tape_after, s.tape_after_widths, copper)
            what = f"outer wrap {short} but winding {s.winding} lays {copper * 1e3:.1f} mm of copper: it must cover it"
        elif (s.winding, s.index) in barrier_below:
            breadth = _breadth(state, s.chamber)
            short = _short(state, s.tape_after, s.tape_after_widths, breadth)
            what = (f"tape {short} over {s.winding} on a {breadth * 1e3:g} mm breadth: as a "
                    f"{barrier_below[(s.winding, s.index)]} barrier it must run flange to flange over the margins")
        else:
            short = _short(state, s.tape_after, s.tape_after_widths, copper)
            what = f"tape {short} over {s.winding} but covers {copper * 1e3:.1f} mm of copper"
        if short:
            out.append(Check("fail", "tape-width", what + _remedy(s.tape_after_widths)))
    return _unique(out)


def _short(state: DesignState, tape_id: str, widths: int, needed_m: float) -> str:
    """'' where the tape as laid covers ``needed_m``; else what it is, in words for the tape-width check."""
    w = state.cat.tapes[tape_id].width_m
    if widths * w + 1e-9 >= needed_m:
        return ""
    return f"{tape_id} in two widths covers at most {2 * w * 1e3:g} mm" if widths > 1 else f"{tape_id} is {w * 1e3:g} mm wide"


def _remedy(widths: int) -> str:
    return "; use a wider tape" + (" or lay it in two widths (widths: 2)" if widths == 1 else "")


def barrier_interfaces(spec: Spec, sections: Sequence[BuiltSection]) -> dict[tuple[str, int], str]:
    """Sections whose tape above is a safety barrier: the next section is on the other side of a declared
    barrier that is more than functional. Maps (winding, section) to the barrier's grade."""
    out: dict[tuple[str, int], str] = {}
    pairs = [(lo, hi) for c in dict.fromkeys(s.chamber for s in sections)
             for lo, hi in zip([s for s in sections if s.chamber == c], [s for s in sections if s.chamber == c][1:])]
    for lo, hi in pairs:
        for b in spec.barriers:
            if b.rating == "functional" or "core" in (b.a.strip(), b.b.strip()):
                continue
            a, c = side_names(spec, b.a), side_names(spec, b.b)
            if (lo.winding in a and hi.winding in c) or (lo.winding in c and hi.winding in a):
                out[(lo.winding, lo.index)] = b.rating
    return out


def _unique(checks: list[Check]) -> list[Check]:
    seen: list[Check] = []
    for c in checks:
        if c not in seen:
            seen.append(c)
    return seen


def _split_bobbin(state: DesignState) -> list[Check]:
    bob = state.parts.bobbin
    if bob is None or bob.sections < 2 or any(w.chamber for w in state.spec.windings):
        return []
    return [Check("fail", "split-bobbin",
                  f"bobbin {bob.id} has {bob.sections} chambers but no winding names one: give each winding its "
                  f"chamber (chamber: 1 at the start flange .. {bob.sections}; the primary in one, the secondaries "
                  f"in the other), or choose the single-chamber bobbin")]
