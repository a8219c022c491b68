"""design(spec, catalog) -> Design: the whole calculation of one part, every step a published method.

Order of work (transformer):
 1. resolve the catalogue entries (core, material, bobbin, wires, tapes) and check the pins;
 2. effective core parameters (IEC 60205 from dimensions, or the catalogue's measured override);
 3. flux-density limit: the spec's, else the material's design value, else the shop's fraction of
    B_sat at the hot-spot temperature (B_sat interpolated between its 25 and 100 degC values);
 4. primary turns from Faraday's law at the top of the primary range; above 1 kHz (loss-limited regime)
    the turns are raised while the total loss keeps falling and the winding still fits;
 5. wire for `auto` from the shop's current density, the strand limited to two skin depths;
 6. secondary turns compensated for the resistive drop at full load, iterated with the build;
 7. layer-by-layer build, fit, window utilisation;
 8. DCR from each layer's own MLT; AC factor layer by layer from the MMF on each layer's faces (Dowell);
    copper loss is taken at the hot-spot temperature, a few percent above the mean winding's (conservative);
 9. core loss by Steinmetz (sine) or iGSE (square, unipolar);
10. temperature rise (McLyman, natural convection) iterated with copper resistance to convergence;
11. checks, the test plan (limits, hipot) and the materials per unit.

Inductors share steps 1-2 and 5-11; turns and gap come from the energy the core must hold (gap.py), or
from the DC-bias roll-off for powder cores (permeability.py).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from ..catalog.models import Catalog, Core, Material, Wire
from ..errors import SpecError
from ..physics import coreloss, dowell, geometry, thermal
from ..physics import wire as wiremod
from ..physics.layers import layer_fr, leakage_inductance_h
from .build import Former, SectionBuild, tape_factor, wind_section
from .result import Build, CoreResult, Design, InductorResult, Losses, Section, WindingResult
from .spec import Spec, Winding

MU0 = 4e-7 * math.pi
TOROID_MIN_HOLE_M = 8e-3          # a shuttle needs a hole; the shop's smallest shuttle (common practice)
TOROID_MIN_HOLE_FRACTION = 0.25   # ... or a quarter of the bore, whichever is larger
# Odd harmonics of a square-wave current, weighted 1/n^2. An ideal square wave's sum never settles (the
# proximity factor grows with n); stopping at the 39th stands for edges of about 1 % of the period, a
# power stage's usual rise time (common practice). Summing to the 199th raises BH-2210's primary Fr
# from 2.0 to 3.0 but its total loss only ~7 %: the core loss dominates there.
SQUARE_HARMONICS = tuple(range(1, 40, 2))


# ------------------------------------------------------------------------------------------------ errors

def _spec_error(spec: Spec, message: str, *keys) -> SpecError:
    """A SpecError located at a key path in the spec file (the parsed YAML keeps every line)."""
    node = spec.data
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


def _nearest(word: str, options) -> str:
    import difflib

    near = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"; did you mean '{near[0]}'?" if near else ""


# ------------------------------------------------------------------------------------------------ resolve

@dataclass(frozen=True)
class _Parts:
    core: Core
    material: Material
    bobbin: object
    stack_m: float | None
    former: Former
    ae_m2: float
    le_m: float
    ve_m3: float
    amin_m2: float
    wa_m2: float
    effective_from: str
    window_breadth_m: float      # along the leg (fringing G); toroid: core height
    surface_m2: float


def _resolve_core(spec: Spec, cat: Catalog) -> _Parts:
    core = cat.cores.get(spec.core_id)
    if core is None:
        raise _spec_error(spec, f"unknown core '{spec.core_id}'{_nearest(spec.core_id, cat.cores)} "
                                f"(`specgen catalog list cores` lists the stock)", "core", "id")
    material = cat.materials[core.material]
    stack = spec.stack_m
    if core.shape == "EI":
        if stack is None:
            if len(core.stacks_m) == 1:
                stack = core.stacks_m[0]
            else:
                raise _spec_error(spec, f"core {core.id} needs a stack; stocked: "
                                        f"{', '.join(f'{s * 1e3:g} mm' for s in core.stacks_m)}", "core")
        elif not any(abs(stack - s) < 1e-6 for s in core.stacks_m):
            raise _spec_error(spec, f"stack {stack * 1e3:g} mm is not stocked for {core.id} (stocked: "
                                    f"{', '.join(f'{s * 1e3:g} mm' for s in core.stacks_m)})", "core", "stack")
    elif stack is not None and core.shape != "toroid":
        raise _spec_error(spec, f"a {core.shape} core has no stack height; stack sets with core.count", "core", "stack")

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

    if core.is_toroid:
        if spec.bobbin_id:
            raise _spec_error(spec, f"{core.id} is a toroid; toroids are wound without a bobbin", "core", "bobbin")
        c = core.coating_m
        former = Former(kind="toroid", od_m=dims["od"] + 2 * c, id_m=dims["id"] - 2 * c,
                        core_height_m=dims["height"] + 2 * c)
        hole_min = max(TOROID_MIN_HOLE_M, TOROID_MIN_HOLE_FRACTION * former.id_m)
        former = replace(former, height_m=max(0.0, (former.id_m - hole_min) / 2.0))
        bobbin = None
        breadth = dims["height"]
    else:
        bobbin = _resolve_bobbin(spec, cat, core, stack)
        former = Former(kind=bobbin.shape, tube_width_m=bobbin.tube_width_m, tube_depth_m=bobbin.tube_depth_m,
                        breadth_m=bobbin.breadth_m / bobbin.sections if bobbin.sections > 1 else bobbin.breadth_m,
                        height_m=bobbin.height_m)
        breadth = geometry.window_breadth_m(core.shape, dims)
    return _Parts(core, material, bobbin, stack, former, ae, le, ve, amin, wa, source, breadth, surface)


def _resolve_bobbin(spec: Spec, cat: Catalog, core: Core, stack):
    if spec.bobbin_id:
        b = cat.bobbins.get(spec.bobbin_id)
        if b is None:
            raise _spec_error(spec, f"unknown bobbin '{spec.bobbin_id}'{_nearest(spec.bobbin_id, cat.bobbins)}",
                              "core", "bobbin")
        if b.core != core.id:
            raise _spec_error(spec, f"bobbin {b.id} is made for core {b.core}, not {core.id}", "core", "bobbin")
        return b
    fits = [b for b in cat.bobbins_for(core.id)
            if b.stack_m is None or stack is None or abs(b.stack_m - stack) < 1e-6]
    if not fits:
        raise _spec_error(spec, f"no bobbin in the catalogue fits {core.id}"
                                + (f" at stack {stack * 1e3:g} mm" if stack else ""), "core", "id")
    return sorted(fits, key=lambda b: b.id)[0]


def _check_pins(spec: Spec, parts: _Parts) -> None:
    pins = set(parts.bobbin.pins) if parts.bobbin is not None else None
    for i, w in enumerate(spec.windings):
        if w.start is None:
            raise _spec_error(spec, "needs its start pin", "windings", i, "start")
        if w.finish is None and w.role != "shield":
            raise _spec_error(spec, "needs its finish pin", "windings", i, "finish")
        if pins is None:
            continue   # toroid: pins are lead labels
        for key, pin in (("start", w.start), ("finish", w.finish)):
            if pin is not None and pin not in pins:
                raise _spec_error(spec, f"pin '{pin}' is not on bobbin {parts.bobbin.id} "
                                        f"(pins {_pin_range(parts.bobbin.pins)})", "windings", i, key)
        for _j, pin in enumerate(w.section_pins):
            if pin not in pins:
                raise _spec_error(spec, f"tie pin '{pin}' is not on bobbin {parts.bobbin.id} "
                                        f"(pins {_pin_range(parts.bobbin.pins)})", "windings", i, "section_pins")
    if pins is not None:
        used: dict = {}
        for i, w in enumerate(spec.windings):
            for key, pin in (("start", w.start), ("finish", w.finish)):
                if pin is None:
                    continue
                if pin in used and used[pin][0] != w.name:
                    raise _spec_error(spec, f"pin '{pin}' is already used by winding {used[pin][0]}",
                                      "windings", i, key)
                used[pin] = (w.name, key)


def _pin_range(pins) -> str:
    if all(p.isdigit() for p in pins) and [int(p) for p in pins] == list(range(1, len(pins) + 1)):
        return f"1..{len(pins)}"
    return ", ".join(pins)


def _tape(spec: Spec, cat: Catalog, tape_id: str | None, *keys):
    if tape_id is None:
        return None
    t = cat.tapes.get(tape_id)
    if t is None:
        raise _spec_error(spec, f"unknown tape '{tape_id}'{_nearest(tape_id, cat.tapes)}", *keys)
    return t


# ------------------------------------------------------------------------------------------------ wire choice

def _skin_depth_m(freq_hz: float, temp_c: float, conductor: str = "copper") -> float:
    return wiremod.skin_depth_m(freq_hz, wiremod.resistivity_ohm_m(temp_c, conductor))


def choose_wire(cat: Catalog, current_a: float, density_a_m2: float, freq_hz: float, temp_c: float,
                mode: str = "auto", strands: int = 0) -> tuple[Wire, int, str]:
    """Pick a stocked wire for a current: (wire, strands in hand, reason).

    Area from the shop's current density; the strand diameter limited to two skin depths at the
    operating frequency (common practice: above ~2 delta the AC factor of a layer climbs quickly).
    Single wire if it can; else up to 8 parallel strands of the largest allowed size; else Litz
    (strands no thicker than half the skin depth). mode 'auto-tiw' picks triple-insulated wire,
    'auto-litz' forces Litz. ``strands`` > 0: the spec fixes the strands in hand; size one strand.
    """
    need = max(current_a, 1e-6) / density_a_m2
    if strands > 0:
        pool = sorted((w for w in cat.wires.values() if w.kind == ("tiw" if mode == "auto-tiw" else "round")
                       and (mode == "auto-tiw" or w.grade.endswith("2"))), key=lambda w: w.copper_area_m2)
        for w in pool:
            if w.copper_area_m2 * strands >= need:
                return w, strands, f"{need * 1e6:.3f} mm² in {strands} strands in hand (spec)"
        if pool:
            return pool[-1], strands, "largest stocked wire"
    delta = _skin_depth_m(freq_hz, temp_c)
    limit = 2.0 * delta
    if mode == "auto-tiw":
        pool = sorted((w for w in cat.wires.values() if w.kind == "tiw"), key=lambda w: w.copper_area_m2)
    else:
        pool = sorted((w for w in cat.wires.values() if w.kind == "round" and w.grade.endswith("2")),
                      key=lambda w: w.copper_area_m2)
        if not pool:
            pool = sorted((w for w in cat.wires.values() if w.kind == "round"), key=lambda w: w.copper_area_m2)
    allowed = [w for w in pool if w.strand_diameter_m <= limit]
    if mode != "auto-litz":
        for w in allowed:
            if w.copper_area_m2 >= need:
                return w, 1, f"{need * 1e6:.3f} mm² at {density_a_m2 / 1e6:.1f} A/mm²"
        if allowed:
            biggest = allowed[-1]
            n = math.ceil(need / biggest.copper_area_m2)
            if n <= 8:
                for w in allowed:
                    if n * w.copper_area_m2 >= need:
                        return w, n, (f"{need * 1e6:.3f} mm² in {n} strands: one wire would be thicker than "
                                      f"2 skin depths ({limit * 1e3:.2f} mm)")
    # Litz strands at or below half a skin depth: with strands near one skin depth the proximity
    # effect between the many strand layers of a bundle undoes the benefit (Dowell on the strand layers)
    litz = sorted((w for w in cat.wires.values() if w.kind == "litz" and w.strand_diameter_m <= delta / 2.0),
                  key=lambda w: w.copper_area_m2)
    for w in litz:
        if w.copper_area_m2 >= need:
            return w, 1, f"{need * 1e6:.3f} mm² as Litz, strands below half a skin depth ({delta * 1e3:.3f} mm)"
    if litz:
        biggest = litz[-1]
        n = math.ceil(need / biggest.copper_area_m2)
        if n <= 6:
            return biggest, n, f"{need * 1e6:.3f} mm² as {n} Litz bundles in parallel"
    if pool:
        return pool[-1], max(1, math.ceil(need / pool[-1].copper_area_m2)), "largest stocked wire"
    raise SpecError("the catalogue holds no round magnet wire to choose from")


# ------------------------------------------------------------------------------------------------ the state

@dataclass
class _WState:
    """A winding while the design iterates (mutable scratch; frozen into WindingResult at the end)."""
    spec: Winding
    index: int
    wire: Wire
    strands: int
    turns: int
    current_a: float
    wire_reason: str = ""


def _pitch_and_height(wire: Wire, strands: int) -> tuple[float, float, bool]:
    if wire.kind == "foil":
        return wire.width_m, wire.thickness_m, True
    if wire.kind == "strip":
        return wire.overall_width_m * strands, wire.overall_thickness_m, False
    return wire.overall_diameter_m * strands, wire.overall_diameter_m, False


@dataclass
class _Built:
    sections: list          # (WState, section index, order, SectionBuild, margin, tape_after, tape_layers)
    height_m: float
    ok: bool
    fail_reason: str


def _lay_out(spec: Spec, parts: _Parts, states: dict, cat: Catalog) -> _Built:
    former = parts.former
    layer_tape = spec.layer_tape
    wind_tape = spec.winding_tape
    lt = cat.tapes[layer_tape.tape].thickness_m * layer_tape.layers if layer_tape else 0.0
    wt = cat.tapes[wind_tape.tape].thickness_m * wind_tape.layers if wind_tape else 0.0
    tf = tape_factor(former)
    h = 0.0
    out = []
    last = len(spec.build_order) - 1
    for order, (name, k) in enumerate(spec.build_order):
        st = states[name]
        w = st.spec
        n_sec = w.sections
        turns = st.turns // n_sec + (1 if k <= st.turns % n_sec else 0)
        if turns <= 0:
            return _Built(out, h, False, f"winding {name} section {k} has no turns")
        pitch, lh, foil = _pitch_and_height(st.wire, st.strands)
        margin = w.margin_m if w.margin_m is not None else spec.margin_m
        if former.kind == "toroid":
            margin = 0.0
        # foil needs its own insulation between turns; the layer tape is mandatory there
        sb = wind_section(former, turns, pitch, lh, h, margin, lt * tf if (lt or not foil) else 0.0, foil)
        if sb is None:
            why = (f"winding {name}: the {st.wire.label} ({pitch * 1e3:.2f} mm per turn) does not fit the "
                   + (f"{(former.breadth_m - 2 * margin) * 1e3:.2f} mm usable breadth" if former.kind != "toroid"
                      else "remaining hole"))
            return _Built(out, h, False, why)
        h = sb.end_build_m
        tape_layers = wind_tape.layers if wind_tape else 0
        tape_id = wind_tape.tape if wind_tape else None
        if order == last:
            wrap = spec.outer_wrap or wind_tape
            tape_id = wrap.tape if wrap else None
            tape_layers = wrap.layers if wrap else 0
            h += (cat.tapes[wrap.tape].thickness_m * wrap.layers * tf) if wrap else 0.0
        else:
            h += wt * tf
        out.append((st, k, order + 1, sb, margin, tape_id, tape_layers))
    return _Built(out, h, True, "")


# ------------------------------------------------------------------------------------------------ AC factor

def _section_frs(built: _Built, freq_hz: float, temp_c: float, waveform: str, signs: dict) -> dict:
    """Fr for every section from the MMF profile across the build (Dowell's layer form, per layer).

    MMF starts at zero at the tube; each layer adds turns x current with the winding's sign (primary +,
    loads -); a square-wave current is weighted over its odd harmonics (amplitude 1/n, power 1/n^2).
    """
    if freq_hz <= 0:
        return {}
    delta_cu = _skin_depth_m(freq_hz, temp_c)
    harmonics = np.array(SQUARE_HARMONICS if waveform == "square" else (1,), dtype=float)
    weights = 1.0 / harmonics ** 2
    weights /= weights.sum()
    deltas = delta_cu / np.sqrt(harmonics)
    mmf = 0.0
    out = {}
    for st, k, _order, sb, _margin, _t, _l in built.sections:
        current = st.current_a * signs.get(st.spec.name, 1.0)
        w = st.wire
        sec_loss = 0.0
        sec_dc = 0.0
        for layer in sb.layers:
            f1 = mmf
            f2 = mmf + layer.turns * current
            mmf = f2
            if abs(current) < 1e-12:
                continue
            fr_layer = float(np.dot(weights, _layer_fr_wire(w, st.strands, layer.turns, sb, deltas, f1, f2)))
            sec_loss += fr_layer * layer.length_m
            sec_dc += layer.length_m
        out[(st.spec.name, k)] = sec_loss / sec_dc if sec_dc > 0 else 1.0
    return out


def leakage_h(built: _Built, former: Former, currents: dict, ref: str) -> float:
    """Leakage inductance referred to winding ``ref``, from the MMF across the build (energy method).

    ``currents`` are the windings' load currents with their MMF sign, balanced in ampere-turns
    (primary + sum N_s I_s / N_p, loads -I_s), so the MMF returns to zero outside the last winding.
    """
    segments = []
    mmf = 0.0
    h = 0.0
    breadths = []
    for st, _k, _order, sb, *_ in built.sections:
        current = currents.get(st.spec.name, 0.0)
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


def _layer_fr_wire(w: Wire, strands: int, turns: int, sb: SectionBuild, delta: float, f1: float, f2: float) -> float:
    if w.kind == "foil":
        d = dowell.foil_delta(w.thickness_m, delta, min(1.0, w.width_m / max(sb.usable_breadth_m, w.width_m)))
        return layer_fr(d, f1, f2)
    if w.kind == "strip":
        eta = min(1.0, turns * strands * w.width_m / max(sb.usable_breadth_m, 1e-9))
        return layer_fr(dowell.foil_delta(w.thickness_m, delta, eta), f1, f2)
    if w.kind == "litz":
        # a layer of bundles is about sqrt(strands) layers of strands (common practice approximation)
        k = max(1, int(round(math.sqrt(w.strands))))
        eta = dowell.porosity(w.strand_diameter_m, w.strand_overall_m) * 0.9
        d = np.atleast_1d(dowell.round_wire_delta(w.strand_diameter_m, delta, eta))
        j = np.arange(k, dtype=float)
        a = f1 + (f2 - f1) * j / k
        b = f1 + (f2 - f1) * (j + 1) / k
        return np.mean(layer_fr(d[:, None], a[None, :], b[None, :]), axis=1)
    eta = min(1.0, turns * strands * w.strand_diameter_m / max(sb.usable_breadth_m, 1e-9))
    d = dowell.round_wire_delta(w.strand_diameter_m, delta, eta)
    return layer_fr(d, f1, f2)


# ------------------------------------------------------------------------------------------------ helpers

def b_sat_at_t(material: Material, temp_c: float) -> float:
    """The material's B_sat at a temperature (physics.thermal.b_sat_at_temp_t on its catalogue points)."""
    return thermal.b_sat_at_temp_t(material.b_sat_25c_t, material.b_sat_100c_t, temp_c)


MAX_HOT_C = 1000.0   # the thermal loop stops here: a design this hot fails its checks, no need to iterate further


def too_many_turns(spec: Spec, turns: float, what: str, *keys) -> SpecError:
    from .spec import MAX_TURNS

    return _spec_error(spec, f"{what} needs {turns:,.0f} turns, more than the {MAX_TURNS:,} this tool winds: "
                             f"the requirement does not suit core {spec.core_id}", *keys)


def _flux_limit(spec: Spec, cat: Catalog, material: Material, hot_c: float) -> tuple[float, str]:
    bsat = b_sat_at_t(material, hot_c)
    frac = cat.shop.flux_limit_fraction
    if spec.flux_limit_t is not None:
        return spec.flux_limit_t, "spec"
    if material.b_design_t is not None and material.b_design_t < frac * bsat:
        return material.b_design_t, f"material design value ({material.id})"
    return frac * bsat, f"{frac:.0%} of B_sat {bsat:.2f} T at {hot_c:.0f} °C (shop rule)"


def _core_loss_w_m3(material: Material, waveform: str, freq_hz: float, b_pk_t: float, duty: float) -> float:
    k, a, b = material.steinmetz_k, material.steinmetz_alpha, material.steinmetz_beta
    if b_pk_t <= 0:
        return 0.0
    if waveform == "sine":
        return coreloss.steinmetz_w_m3(freq_hz, b_pk_t, k, a, b)
    if waveform == "square":
        return coreloss.square_wave_loss_w_m3(freq_hz, b_pk_t, k, a, b)
    return coreloss.unipolar_pulse_loss_w_m3(freq_hz, b_pk_t, duty, k, a, b)


def _dcr(st: _WState, length_m: float, temp_c: float) -> float:
    return wiremod.resistance_per_m_ohm(st.wire.copper_area_m2 * st.strands, temp_c, st.wire.conductor) * length_m


def _lengths(built: _Built, lead_m: float) -> dict:
    out: dict = {}
    for st, _k, _order, sb, *_ in built.sections:
        out[st.spec.name] = out.get(st.spec.name, 0.0) + sb.copper_length_m
    for name in out:
        out[name] += 2 * lead_m
    return out


# ------------------------------------------------------------------------------------------------ main

def design(spec: Spec, cat: Catalog) -> Design:
    """The whole calculation for one spec (see the module docstring for the order of work)."""
    parts = _resolve_core(spec, cat)
    _check_pins(spec, parts)
    for key, tid in (("layer_tape", spec.layer_tape), ("winding_tape", spec.winding_tape),
                     ("outer_wrap", spec.outer_wrap)):
        if tid is not None:
            _tape(spec, cat, tid.tape, "insulation", key, "tape")
    _tape(spec, cat, spec.margin_tape, "insulation", "margin_tape")
    if spec.sleeving and spec.sleeving not in cat.sleevings:
        raise _spec_error(spec, f"unknown sleeving '{spec.sleeving}'{_nearest(spec.sleeving, cat.sleevings)}",
                          "insulation", "sleeving")
    if spec.varnish and spec.varnish not in cat.varnishes:
        raise _spec_error(spec, f"unknown varnish '{spec.varnish}'{_nearest(spec.varnish, cat.varnishes)}",
                          "insulation", "varnish")
    for i, w in enumerate(spec.windings):
        if w.lead_sleeving and w.lead_sleeving not in cat.sleevings:
            raise _spec_error(spec, f"unknown sleeving '{w.lead_sleeving}'", "windings", i, "lead_sleeving")
        if not w.wire.startswith("auto") and w.wire not in cat.wires:
            raise _spec_error(spec, f"unknown wire '{w.wire}'{_nearest(w.wire, cat.wires)} "
                                    f"(`specgen catalog list wires`)", "windings", i, "wire")
        if w.wire.startswith("auto") and w.wire not in ("auto", "auto-litz", "auto-tiw"):
            raise _spec_error(spec, "expected a wire id, or auto, auto-litz, auto-tiw", "windings", i, "wire")
    if spec.kind == "transformer":
        from .transformer import design_transformer

        return design_transformer(spec, cat, parts)
    from .inductor import design_inductor

    return design_inductor(spec, cat, parts)


# ------------------------------------------------------------------------------------------------ shared tail

@dataclass
class _Thermal:
    winding_c: float
    hot_c: float
    rise_k: float


def thermal_state(total_loss_w: float, parts: _Parts, spec: Spec, cat: Catalog) -> _Thermal:
    rise = thermal.temperature_rise_k(total_loss_w, parts.surface_m2)
    if spec.cooling == "forced":
        rise *= 0.6    # forced air roughly halves the rise of natural convection (common practice, from memory)
    elif spec.cooling == "potted":
        rise *= 0.85
    rise = min(rise, MAX_HOT_C - spec.ambient_c)
    winding = spec.ambient_c + rise
    return _Thermal(winding, winding + cat.shop.hotspot_margin_k, rise)


def finish(spec: Spec, cat: Catalog, parts: _Parts, states: dict, built: _Built, frs: dict, temp: _Thermal,
           *, b_peak: float, b_peak_max: float, b_limit: tuple, h_peak: float, lm: float | None,
           imag: float | None, core_w: float, core_w_m3: float, voltages: dict, open_circuit: dict,
           efficiency, regulation, p_out, inductor: InductorResult | None, extra_checks: list,
           iterations: int, ripple_rms: dict | None = None, leakage: float | None = None) -> Design:
    """Freeze the iterated state into the Design: windings, build, losses, checks, tests, materials."""
    lead = cat.shop.lead_length_m
    lengths = _lengths(built, lead)
    ref = next((w for w in spec.windings if w.role == "primary"), spec.windings[0])
    windings = []
    copper_total = 0.0
    ku_num = 0.0
    for st in states.values():
        secs = [s for s in built.sections if s[0] is st]
        length = lengths.get(st.spec.name, 0.0)
        dcr20 = _dcr(st, length, 20.0)
        dcr_hot = _dcr(st, length, temp.hot_c)
        sections = []
        fr_len = 0.0
        for (_st, k, order, sb, margin, tape_id, tape_layers) in secs:
            fr = frs.get((st.spec.name, k), 1.0)
            fr_len += fr * sb.copper_length_m
            sp, fp = _section_pins(st.spec, k)
            sections.append(Section(winding=st.spec.name, index=k, order=order,
                                    turns=sum(l.turns for l in sb.layers), turns_per_layer=sb.turns_per_layer,
                                    layers=sb.layers, margin_m=margin, usable_breadth_m=sb.usable_breadth_m,
                                    start_build_m=sb.layers[0].build_to_centre_m - sb.layer_height_m / 2,
                                    end_build_m=sb.end_build_m, tape_after=tape_id, tape_after_layers=tape_layers,
                                    start_pin=sp, finish_pin=fp, fr=fr,
                                    layer_tape=spec.layer_tape.tape if spec.layer_tape and len(sb.layers) > 1 else None,
                                    layer_tape_layers=spec.layer_tape.layers if spec.layer_tape and len(sb.layers) > 1
                                    else 0,
                                    margin_tape=spec.margin_tape if margin > 0 else None))
        copper_len = sum(s[3].copper_length_m for s in secs)
        fr_w = fr_len / copper_len if copper_len > 0 else 1.0
        if ripple_rms is not None:
            idc, iac = ripple_rms[st.spec.name]
            p_cu = idc ** 2 * dcr_hot + iac ** 2 * dcr_hot * fr_w
        else:
            p_cu = st.current_a ** 2 * dcr_hot * fr_w
        copper_total += p_cu
        area = st.wire.copper_area_m2 * st.strands
        ku_num += st.turns * area
        windings.append(WindingResult(
            name=st.spec.name, role=st.spec.role, turns=st.turns, voltage_v=voltages.get(st.spec.name),
            voltage_max_v=st.spec.voltage_max_v, open_circuit_v=open_circuit.get(st.spec.name),
            current_a=st.current_a, wire=st.wire.id, wire_label=st.wire.label, wire_kind=st.wire.kind,
            strands=st.strands, copper_area_m2=area, overall_diameter_m=_pitch_and_height(st.wire, 1)[1],
            layers=sum(len(s.layers) for s in sections), turns_per_layer=sections[0].turns_per_layer if sections else 0,
            length_m=length, mass_kg=wiremod.mass_per_m_kg(area, st.wire.conductor) * length,
            dcr_20c_ohm=dcr20, dcr_hot_ohm=dcr_hot, current_density_a_m2=st.current_a / area if area else 0.0,
            fr=fr_w, copper_loss_w=p_cu, start=st.spec.start, finish=st.spec.finish or "",
            direction=st.spec.direction, sections=tuple(sections),
            margin_m=sections[0].margin_m if sections else 0.0, lead_sleeving=st.spec.lead_sleeving or spec.sleeving,
            thermal_class_c=st.wire.thermal_class_c,
            # dot convention: terminals of the same instantaneous polarity. Wound the same way as the
            # reference winding, the start carries the dot; wound the other way, the finish does.
            dot_pin=st.spec.start if st.spec.direction == ref.direction or not st.spec.finish else st.spec.finish,
        ))
    windings.sort(key=lambda w: [s.name for s in spec.windings].index(w.name))
    bulge = cat.shop.bulge_factor
    former = parts.former
    bulged = built.height_m * bulge
    available = former.height_m
    fits = built.ok and bulged <= available + 1e-12
    hole = None
    if former.kind == "toroid":
        hole = former.id_m - 2.0 * bulged
    build = Build(height_m=built.height_m, bulged_height_m=bulged, available_m=available,
                  ku=ku_num / parts.wa_m2 if parts.wa_m2 else 0.0, fits=fits,
                  fill_fraction=bulged / available if available > 0 else float("inf"), hole_m=hole)
    losses = Losses(copper_w=copper_total, core_w=core_w, total_w=copper_total + core_w,
                    core_loss_density_w_m3=core_w_m3)
    core = _core_result(spec, cat, parts, temp.hot_c)
    from .checks import run_checks
    from .tests_plan import materials_per_unit, test_plan

    partial = dict(spec=spec, cat=cat, parts=parts, windings=windings, build=build, built=built, temp=temp,
                   b_peak=b_peak, b_peak_max=b_peak_max, b_limit=b_limit, losses=losses, imag=imag,
                   states=states, inductor=inductor)
    checks = run_checks(**partial) + list(extra_checks)
    order = {"fail": 0, "warn": 1, "pass": 2}
    checks.sort(key=lambda c: order[c.level])
    tests = test_plan(spec, cat, windings, lm, inductor, voltages, open_circuit, leakage)
    materials = materials_per_unit(spec, cat, parts, built, windings, core)
    ids = _catalog_ids(spec, parts, windings, cat)
    return Design(
        part=spec.part, title=spec.title, revision=spec.revision, status=spec.status, customer=spec.customer,
        kind=spec.kind, frequency_hz=spec.frequency_hz, waveform=spec.waveform, duty=spec.duty,
        ambient_c=spec.ambient_c, cooling=spec.cooling, insulation_class_c=spec.insulation_class_c,
        b_peak_t=b_peak, b_peak_max_t=b_peak_max, b_limit_t=b_limit[0], b_limit_basis=b_limit[1],
        b_sat_hot_t=b_sat_at_t(parts.material, temp.hot_c), h_peak_a_m=h_peak,
        magnetizing_inductance_h=lm, magnetizing_current_a=imag, leakage_inductance_h=leakage,
        core=core, windings=tuple(windings),
        build=build, losses=losses, winding_temp_c=temp.winding_c, hot_spot_c=temp.hot_c,
        temperature_rise_k=temp.rise_k, efficiency=efficiency, regulation_pct=regulation,
        output_power_w=p_out, checks=tuple(checks), tests=tests, materials=tuple(materials),
        inductor=inductor, catalog_ids=ids, iterations=iterations, notes=spec.notes, history=spec.history,
    )


def _section_pins(w: Winding, k: int) -> tuple[str, str]:
    pins = [w.start] + list(w.section_pins) + [w.finish or ""]
    return pins[k - 1], pins[k]


def _core_result(spec: Spec, cat: Catalog, parts: _Parts, hot_c: float) -> CoreResult:
    core, m = parts.core, parts.material
    mass = core.mass_kg * spec.core_count if core.mass_kg else parts.ve_m3 * m.density_kg_m3
    lams = None
    if core.shape == "EI" and m.lamination_thickness_m > 0 and parts.stack_m:
        lams = geometry.lamination_count(parts.stack_m, m.lamination_thickness_m,
                                         core.stacking_factor if core.stacking_factor != 1.0 else m.stacking_factor)
        lams = int(lams)
    return CoreResult(
        id=core.id, shape=core.shape, material=m.id, material_name=m.name, ae_m2=parts.ae_m2, le_m=parts.le_m,
        ve_m3=parts.ve_m3, wa_m2=parts.wa_m2, amin_m2=parts.amin_m2, mass_kg=mass, stack_m=parts.stack_m,
        count=spec.core_count, laminations=lams, bobbin=parts.bobbin.id if parts.bobbin else None,
        b_sat_hot_t=b_sat_at_t(m, hot_c), b_r_t=m.b_r_t, h_c_a_m=m.h_c_a_m, mu_initial=m.mu_initial,
        effective_from=parts.effective_from, window_breadth_m=parts.window_breadth_m,
        window_height_m=parts.former.height_m, surface_area_m2=parts.surface_m2,
    )


def _catalog_ids(spec: Spec, parts: _Parts, windings, cat: Catalog) -> tuple:
    ids = [parts.core.id, parts.material.id]
    if parts.bobbin is not None:
        ids.append(parts.bobbin.id)
    ids += [w.wire for w in windings]
    for t in (spec.layer_tape, spec.winding_tape, spec.outer_wrap):
        if t is not None:
            ids.append(t.tape)
    ids += [x for x in (spec.margin_tape, spec.sleeving, spec.varnish) if x]
    ids += [w.lead_sleeving for w in windings if w.lead_sleeving]
    seen = []
    for i in ids:
        if i not in seen:
            seen.append(i)
    return tuple(seen)
