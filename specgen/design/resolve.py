"""Resolve a spec against the catalogue: core, material, bobbin, pins, tapes, sleevings, varnish, wires.

Every user mistake found here is a located one-line ``SpecError`` (file, line, key path).
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable
from dataclasses import replace

from ..catalog.models import Bobbin, Catalog, Core, Tape
from ..errors import SpecError
from ..physics import geometry
from .limits import MAX_TURNS, TOROID_MIN_HOLE_FRACTION, TOROID_MIN_HOLE_M
from .result import CoreResult, WindingResult
from .spec import Spec
from .state import Former, Parts


def spec_error(spec: Spec, message: str, *keys: str | int) -> SpecError:
    """A SpecError located at a key path in the spec file (the parsed YAML keeps every line)."""
    node: object = spec.data
    line = getattr(node, "line", None)
    path = ""
    for k in keys:
        if isinstance(k, int):
            lines = getattr(node, "item_lines", None)
            if isinstance(node, list) and k < len(node):
                if lines:
                    line = lines[k]
                node = node[k]
            path += f"[{k}]"
        else:
            kl = getattr(node, "key_lines", None) or {}
            line = kl.get(k, getattr(node, "line", line))
            node = node.get(k) if isinstance(node, dict) else None
            path += ("." if path else "") + str(k)
    return SpecError(message, file=spec.file, line=line, path=path or None)


def too_many_turns(spec: Spec, turns: float, what: str, *keys: str | int) -> SpecError:
    return spec_error(spec, f"{what} needs {turns:,.0f} turns, more than the {MAX_TURNS:,} this tool winds: "
                            f"the requirement does not suit core {spec.core_id}", *keys)


def nearest(word: str, options: Iterable[str]) -> str:
    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"; did you mean '{near[0]}'?" if near else ""


def _stack(spec: Spec, core: Core) -> float | None:
    stack = spec.stack_m
    if core.shape == "EI":
        if stack is None:
            if len(core.stacks_m) == 1:
                stack = core.stacks_m[0]
            else:
                raise spec_error(spec, f"core {core.id} needs a stack; stocked: "
                                       f"{', '.join(f'{s * 1e3:g} mm' for s in core.stacks_m)}", "core")
        elif not any(abs(stack - s) < 1e-6 for s in core.stacks_m):
            raise spec_error(spec, f"stack {stack * 1e3:g} mm is not stocked for {core.id} (stocked: "
                                   f"{', '.join(f'{s * 1e3:g} mm' for s in core.stacks_m)})", "core", "stack")
    elif stack is not None and core.shape != "toroid":
        raise spec_error(spec, f"a {core.shape} core has no stack height; stack sets with core.count", "core", "stack")
    return stack


def resolve_core(spec: Spec, cat: Catalog) -> Parts:
    """The core, its material and bobbin (or the toroid's former), and the core's effective parameters."""
    core = cat.cores.get(spec.core_id)
    if core is None:
        raise spec_error(spec, f"unknown core '{spec.core_id}'{nearest(spec.core_id, cat.cores)} "
                               f"(`specgen catalog list cores` lists the stock)", "core", "id")
    material = cat.materials[core.material]
    stack = _stack(spec, core)
    dims = dict(core.dims)
    count = spec.core_count
    sf = core.stacking_factor if core.stacking_factor != 1.0 else material.stacking_factor
    if core.shape == "toroid":
        height = (stack if stack else dims["height"]) * count
        dims["height"] = height
        ep = geometry.core_effective("toroid", dims, stacking_factor=sf)
    else:
        ep = geometry.core_effective(core.shape, dims, stack_m=stack, stacking_factor=sf)
    ae, le, ve, amin = ep.ae_m2, ep.le_m, ep.ve_m3, ep.amin_m2
    source = "IEC 60205 from dimensions"
    if core.override:
        ae = core.override.get("ae", ae)
        le = core.override.get("le", le)
        ve = core.override.get("ve", ae * le)
        amin = min(amin, ae)
        source = "measured (catalogue override)"
    if core.shape != "toroid" and count > 1:
        ae, ve, amin = ae * count, ve * count, amin * count
    wa = geometry.window_area_m2(core.shape, dims)
    surface = geometry.outer_surface_area_m2(core.shape, dims, stack)
    if core.shape != "toroid" and count > 1:
        surface *= (1.0 + 0.6 * (count - 1))   # stacked sets: the added depth adds about 60 % per set

    bobbin: Bobbin | None
    if core.is_toroid:
        if spec.bobbin_id:
            raise spec_error(spec, f"{core.id} is a toroid; toroids are wound without a bobbin", "core", "bobbin")
    elif getattr(spec, "core_wrap", None) is not None:     # the search's stand-in spec has no insulation
        raise spec_error(spec, f"{core.id} is wound on a bobbin; a core wrap is for a toroid", "insulation", "core_wrap")
    if core.is_toroid:
        c = core.coating_m + _core_wrap_m(spec, cat)
        former = Former(kind="toroid", od_m=dims["od"] + 2 * c, id_m=dims["id"] - 2 * c,
                        core_height_m=dims["height"] + 2 * c)
        hole_min = max(TOROID_MIN_HOLE_M, TOROID_MIN_HOLE_FRACTION * former.id_m)
        former = replace(former, height_m=max(0.0, (former.id_m - hole_min) / 2.0))
        bobbin = None
        breadth = dims["height"]
    else:
        bobbin = resolve_bobbin(spec, cat, core, stack)
        chambers = bobbin.chambers if bobbin.sections > 1 else ()
        former = Former(kind="rect" if bobbin.shape == "rect" else "round", tube_width_m=bobbin.tube_width_m,
                        tube_depth_m=bobbin.tube_depth_m, breadth_m=chambers[0] if chambers else bobbin.breadth_m,
                        height_m=bobbin.height_m, chambers=chambers,
                        divider_m=(bobbin.divider_thickness_m or 0.0) if chambers else 0.0)
        breadth = geometry.window_breadth_m(core.shape, dims)
    return Parts(core, material, bobbin, stack, former, ae, le, ve, amin, wa, source, breadth, surface)


def _core_wrap_m(spec: Spec, cat: Catalog) -> float:
    """Radial build of the toroid's core wrap on each face: half-lapped, so two thicknesses a layer."""
    wrap = getattr(spec, "core_wrap", None)     # the search's stand-in spec may not carry one
    if wrap is None:
        return 0.0
    tape = _tape(spec, cat, wrap.tape, "insulation", "core_wrap", "tape")
    assert tape is not None
    return 2.0 * float(tape.thickness_m) * int(wrap.layers)


def resolve_bobbin(spec: Spec, cat: Catalog, core: Core, stack: float | None) -> Bobbin:
    if spec.bobbin_id:
        b: Bobbin | None = cat.bobbins.get(spec.bobbin_id)
        if b is None:
            raise spec_error(spec, f"unknown bobbin '{spec.bobbin_id}'{nearest(spec.bobbin_id, cat.bobbins)}",
                             "core", "bobbin")
        if core.id not in b.cores:
            raise spec_error(spec, f"bobbin {b.id} is made for core {', '.join(b.cores)}, not {core.id}", "core", "bobbin")
        return b
    fits = [b for b in cat.bobbins_for(core.id)
            if b.stack_m is None or stack is None or abs(b.stack_m - stack) < 1e-6]
    if not fits:
        raise spec_error(spec, f"no bobbin in the catalogue fits {core.id}"
                               + (f" at stack {stack * 1e3:g} mm" if stack else ""), "core", "id")
    # a bobbin rated for the insulation system's class (IEC 60085) first; where none is, the highest rated
    # (the material-class check then says so)
    split = any(getattr(w, "chamber", None) for w in spec.windings)    # chambers given: a split bobbin
    first: Bobbin = sorted(fits, key=lambda b: ((b.sections > 1) != split, b.thermal_class_c < spec.insulation_class_c,
                                                -b.thermal_class_c if b.thermal_class_c < spec.insulation_class_c else 0,
                                                b.id))[0]
    return first


def _pin_range(pins: tuple[str, ...]) -> str:
    if all(p.isdigit() for p in pins) and [int(p) for p in pins] == list(range(1, len(pins) + 1)):
        return f"1..{len(pins)}"
    return ", ".join(pins)


def check_pins(spec: Spec, parts: Parts) -> None:
    """Every winding has its pins, every pin is on the bobbin, no pin serves two windings."""
    bobbin = parts.bobbin
    for i, w in enumerate(spec.windings):
        if w.start is None:
            raise spec_error(spec, "needs its start pin", "windings", i, "start")
        if w.finish is None and w.role != "shield":
            raise spec_error(spec, "needs its finish pin", "windings", i, "finish")
        if bobbin is None:
            continue   # toroid: pins are lead labels
        pins = set(bobbin.pins)
        for key, pin in (("start", w.start), ("finish", w.finish)):
            if pin is not None and pin not in pins:
                raise spec_error(spec, f"pin '{pin}' is not on bobbin {bobbin.id} "
                                       f"(pins {_pin_range(bobbin.pins)})", "windings", i, key)
        for pin in w.section_pins:
            if pin not in pins:
                raise spec_error(spec, f"tie pin '{pin}' is not on bobbin {bobbin.id} "
                                       f"(pins {_pin_range(bobbin.pins)})", "windings", i, "section_pins")
        for t in w.taps:
            if t.pin not in pins:
                raise spec_error(spec, f"tap pin '{t.pin}' is not on bobbin {bobbin.id} "
                                       f"(pins {_pin_range(bobbin.pins)})", "windings", i, "taps", t.index, "pin")
    used: dict[str, str] = {}
    for i, w in enumerate(spec.windings):
        keyed = ([("start", w.start), ("finish", w.finish)] + [("section_pins", p) for p in w.section_pins]
                 + [("taps", t.pin) for t in w.taps])
        for key, pin in keyed:
            if pin is None:
                continue
            if pin in used and used[pin] != w.name:
                what = "lead" if bobbin is None else "pin"
                raise spec_error(spec, f"{what} '{pin}' is already used by winding {used[pin]}: two windings "
                                       f"on one {what} would join them (across any barrier between them)",
                                 "windings", i, key)
            used[pin] = w.name
    check_chambers(spec, parts)


def check_chambers(spec: Spec, parts: Parts) -> None:
    """A winding's chamber is on a split bobbin, within its chambers; on a split bobbin every winding has one
    (a bifilar follower is wound in its partner's). None given at all is the ``split-bobbin`` check's to say."""
    bobbin = parts.bobbin
    given = [(i, w) for i, w in enumerate(spec.windings) if getattr(w, "chamber", None) is not None]
    if not given:
        return
    i, first = given[0]
    if bobbin is None or bobbin.sections < 2:
        what = "a toroid is wound without a bobbin" if bobbin is None else f"bobbin {bobbin.id} has one chamber"
        raise spec_error(spec, f"'chamber' is for a split bobbin; {what}", "windings", i, "chamber")
    for i, w in enumerate(spec.windings):
        if w.chamber is not None and w.chamber > bobbin.sections:
            raise spec_error(spec, f"bobbin {bobbin.id} has chambers 1..{bobbin.sections}", "windings", i, "chamber")
        if w.chamber is None and w.wound_with is None:
            raise spec_error(spec, f"bobbin {bobbin.id} is split into {bobbin.sections} chambers: give {w.name} its "
                                   f"chamber (1 at the start flange .. {bobbin.sections})", "windings", i)


def _tape(spec: Spec, cat: Catalog, tape_id: str | None, *keys: str | int) -> Tape | None:
    if tape_id is None:
        return None
    t: Tape | None = cat.tapes.get(tape_id)
    if t is None:
        raise spec_error(spec, f"unknown tape '{tape_id}'{nearest(tape_id, cat.tapes)}", *keys)
    return t


def check_references(spec: Spec, cat: Catalog) -> None:
    """Every tape, sleeving, varnish and wire the spec names is in the catalogue."""
    for key, tid in (("layer_tape", spec.layer_tape), ("winding_tape", spec.winding_tape),
                     ("outer_wrap", spec.outer_wrap)):
        if tid is not None:
            _tape(spec, cat, tid.tape, "insulation", key, "tape")
    _tape(spec, cat, spec.margin_tape, "insulation", "margin_tape")
    if spec.sleeving and spec.sleeving not in cat.sleevings:
        raise spec_error(spec, f"unknown sleeving '{spec.sleeving}'{nearest(spec.sleeving, cat.sleevings)}",
                         "insulation", "sleeving")
    if spec.varnish and spec.varnish not in cat.varnishes:
        raise spec_error(spec, f"unknown varnish '{spec.varnish}'{nearest(spec.varnish, cat.varnishes)}",
                         "insulation", "varnish")
    for i, w in enumerate(spec.windings):
        if w.lead_sleeving and w.lead_sleeving not in cat.sleevings:
            raise spec_error(spec, f"unknown sleeving '{w.lead_sleeving}'", "windings", i, "lead_sleeving")
        if not w.wire.startswith("auto") and w.wire not in cat.wires:
            raise spec_error(spec, f"unknown wire '{w.wire}'{nearest(w.wire, cat.wires)} "
                                   f"(`specgen catalog list wires`)", "windings", i, "wire")
        if w.wire.startswith("auto") and w.wire not in ("auto", "auto-litz", "auto-tiw"):
            raise spec_error(spec, "expected a wire id, or auto, auto-litz, auto-tiw", "windings", i, "wire")


def core_result(spec: Spec, cat: Catalog, parts: Parts, b_sat_hot_t: float) -> CoreResult:
    """The core as the Design reports it (B_sat at the hot spot given by the caller)."""
    core, m = parts.core, parts.material
    lams = None
    stacking = core.stacking_factor if core.stacking_factor != 1.0 else m.stacking_factor
    if core.shape == "EI" and m.lamination_thickness_m > 0 and parts.stack_m:
        lams = int(geometry.lamination_count(parts.stack_m, m.lamination_thickness_m, stacking))
    if core.mass_kg:
        mass = core.mass_kg * spec.core_count
    elif core.shape == "EI" and parts.stack_m:
        # the E and I pieces themselves, corners and all (V_e of the segment method leaves the corners out)
        d = geometry.ei_dims(core.dims)
        iron_m = lams * m.lamination_thickness_m if lams else parts.stack_m * stacking
        mass = (geometry.ei_lamination_area_m2(d["tongue"], d["window_width"], d["window_height"], d["leg"],
                                               d["yoke"]) * iron_m * m.density_kg_m3 * spec.core_count)
    else:
        mass = parts.ve_m3 * m.density_kg_m3
    return CoreResult(
        id=core.id, shape=core.shape, material=m.id, material_name=m.name, ae_m2=parts.ae_m2, le_m=parts.le_m,
        ve_m3=parts.ve_m3, wa_m2=parts.wa_m2, amin_m2=parts.amin_m2, mass_kg=mass, stack_m=parts.stack_m,
        count=spec.core_count, laminations=lams, bobbin=parts.bobbin.id if parts.bobbin else None,
        b_sat_hot_t=b_sat_hot_t, b_r_t=m.b_r_t, h_c_a_m=m.h_c_a_m, mu_initial=m.mu_initial,
        effective_parameters_from=parts.effective_parameters_from, window_breadth_m=parts.window_breadth_m,
        window_height_m=parts.former.height_m, surface_area_m2=parts.surface_m2,
    )


def catalog_ids(spec: Spec, parts: Parts, windings: Iterable[WindingResult]) -> tuple[str, ...]:
    """Every catalogue entry the design read, in a stable order, each once."""
    ws = list(windings)
    ids = [parts.core.id, parts.material.id]
    if parts.bobbin is not None:
        ids.append(parts.bobbin.id)
    ids += [w.wire for w in ws]
    for t in (spec.layer_tape, spec.winding_tape, spec.outer_wrap):
        if t is not None:
            ids.append(t.tape)
    if spec.core_wrap is not None:
        ids.append(spec.core_wrap.tape)
    ids += [x for x in (spec.margin_tape, spec.sleeving, spec.varnish) if x]
    ids += [w.lead_sleeving for w in ws if w.lead_sleeving]
    seen: list[str] = []
    for i in ids:
        if i not in seen:
            seen.append(i)
    return tuple(seen)
