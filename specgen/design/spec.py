"""The part spec: one YAML file per part, parsed into frozen objects (SI floats, degC).

The format (see DEVELOPERS.md and ``specgen new``)::

    part: BH-1042
    title: Control transformer 230 V to 2 x 12 V, 60 VA
    revision: A
    status: released            # draft | released | obsolete
    customer: Quillfeather Irrigation
    kind: transformer           # transformer | inductor
    core: {id: EI-100, stack: 32 mm, bobbin: BOB-EI100-32}
    operating: {frequency: 50 Hz, waveform: sine, ambient: 40 degC, cooling: natural, insulation_class: 130}
    windings:                   # the electrical windings; list order is the build order unless build_order says
      - {name: P, role: primary, voltage: 230 V, voltage_max: 253 V, wire: auto, start: "1", finish: "2", direction: cw}
      - {name: S1, role: secondary, voltage: 12 V, current: 2.5 A, wire: auto, start: "5", finish: "6", direction: cw}
    insulation: {...}
    history: [...]
"""

from __future__ import annotations

import os
from dataclasses import field
from typing import TYPE_CHECKING, Any, cast

from ..errors import SpecError
from ..loading import RENAMED_KEYS, Reader, first_unsafe_char, load_yaml, parse_yaml
from ..records import record
from .acceptance import AcceptedWarning
from .connections import Connection, Load, parse_connections, parse_load
from .forward import check_reset, parse_reset_ratio
from .limits import AIR_SPEED_MAX_M_S, MAX_TURNS
from .spec_keys import refuse_unused_keys
from .taps import Tap, check_taps, parse_taps
from .vocab import Cooling, Waveform

if TYPE_CHECKING:
    from .cmc_spec import CommonModeChokeReq
    from .flyback_spec import FlybackReq

KINDS = ("transformer", "inductor", "current_transformer", "flyback", "common_mode_choke")
ROLES = ("primary", "secondary", "auxiliary", "shield", "main", "reset", "line")
WAVEFORMS = ("sine", "square", "unipolar")
STATUSES = ("draft", "released", "obsolete")
COOLING = ("natural", "forced", "potted")
RATINGS = ("functional", "basic", "supplementary", "double", "reinforced")
_VOLTAGE_SPAN = 4.0      # voltage_max / nominal and nominal / voltage_min at most this
MAX_WORKING_V = 1000.0
# a barrier side that names no winding: the conductor passed once through a current transformer's core
THROUGH_CONDUCTOR = "conductor"   # the low-voltage range of IEC 60664-1's tables as this tool uses them


@record
class TapeUse:
    tape: str            # catalogue id
    layers: int
    widths: int = 1      # 2: each layer laid as two widths side by side, overlapped in the middle


@record
class Barrier:
    """The insulation required between two windings, or a winding and the core."""
    a: str               # winding name
    b: str               # winding name or 'core'
    rating: str          # the grade: functional | basic | supplementary | double | reinforced
    working_voltage_v: float                  # rms
    line: int | None = None
    peak_voltage_v: float | None = None       # working peak where it differs from sqrt(2) x rms
    index: int = 0                            # place in insulation.barriers, to locate errors

    @property
    def grade(self) -> str:
        return self.rating


@record
class Winding:
    name: str
    role: str
    voltage_v: float | None          # rms (sine), amplitude (square/unipolar); secondary: at full load
    voltage_min_v: float | None
    voltage_max_v: float | None
    current_a: float | None          # rms
    va: float | None
    wire: str                        # catalogue id or 'auto'
    strands: int                     # strands in hand (parallel), 0 = decide
    start: str | None                # pin names (checked present when the design resolves the pins)
    finish: str | None               # None only for a shield
    direction: str                   # cw | ccw, seen from the start flange
    sections: int
    section_pins: tuple[str, ...]    # tie pins between sections
    turns: int | None                # a fixed turn count (overrides the calculation)
    margin_m: float | None           # creepage margin each side (None: the insulation default)
    lead_sleeving: str | None
    same_turns_as: str | None = None   # wind the same turns as this winding (series/parallel pairs)
    voltage_tolerance: tuple[float, float] | None = None   # (minus, plus) fractions; None: the shop's
    line: int | None = None
    path: str = ""
    load: Load | None = None         # what a secondary feeds (None: resistive, the current as given)
    wound_with: str | None = None    # bifilar: wound together with this winding, turn by turn in its layers
    taps: tuple[Tap, ...] = ()       # leads brought out at the turns that give these voltages
    turns_ratio: float | None = None  # a forward converter's reset winding: N_p / N_reset (1: bifilar 1:1)
    section_shares: tuple[float, ...] = ()   # a deliberately uneven split: each section's share of the turns
    chamber: int | None = None       # split bobbin: the chamber it is wound in (1 at the start flange)


@record
class InductorReq:
    inductance_h: float | None       # at full DC current
    current_dc_a: float              # DC (choke) or rms (AC reactor)
    ripple_a: float                  # peak-to-peak at the operating frequency
    current_peak_a: float | None     # over-current the part must not saturate at
    inductance_min_h: float | None   # the least inductance at the peak current (a PFC choke's at the line peak)
    duty: float
    voltage_drop_v: float | None     # AC reactor: drop across it at rated current
    gap: str                         # 'auto' | 'none' | a fixed gap given as gap_m
    gap_m: float | None
    gap_arrangement: str             # centre | spacer | none


@record
class CurrentTransformerReq:
    """A current transformer's requirement (kind: current_transformer)."""
    primary_current_a: float         # rated, rms
    primary_current_max_a: float     # top of the range, rms (the knee and saturation are checked here)
    primary_turns: int               # 1: a single conductor passed through the core (not wound here)
    turns_ratio: float               # N_s / N_p
    burden_ohm: float                # resistive burden
    current_shape: str               # sine | dc_offset | unipolar
    ratio_error_pct: float | None    # the accuracy wanted: |ratio error| at most this
    phase_error_deg: float | None    # |phase displacement| at most this


@record
class Spec:
    file: str
    part: str
    title: str
    revision: str
    status: str
    customer: str
    kind: str
    core_id: str
    stack_m: float | None
    core_count: int
    bobbin_id: str | None
    frequency_hz: float
    waveform: Waveform
    duty: float
    ambient_c: float
    cooling: Cooling
    insulation_class_c: int
    flux_limit_t: float | None
    efficiency_guess: float
    windings: tuple[Winding, ...]
    build_order: tuple[tuple[str, int], ...]   # (winding name, section index 1..n)
    layer_tape: TapeUse | None
    winding_tape: TapeUse | None
    outer_wrap: TapeUse | None
    margin_m: float
    margin_tape: str | None
    sleeving: str | None
    varnish: str | None
    barriers: tuple[Barrier, ...]
    inductor: InductorReq | None
    notes: str
    history: tuple[dict[str, Any], ...]
    core_wrap: TapeUse | None = None          # toroid: tape wrapped on the core under the first winding
    insulation_basis: dict[str, Any] = field(default_factory=dict)   # this part's own mains voltage, OVC, PD
    lead_exit_spacing_m: float | None = None  # toroid: round the core's outside between leads across a barrier
    data: Any = field(compare=False, repr=False, default_factory=dict)   # the parsed YAML, for fingerprints
    current_transformer: CurrentTransformerReq | None = None
    flyback: FlybackReq | None = None
    common_mode_choke: CommonModeChokeReq | None = None
    connections: tuple[Connection, ...] = ()   # several primaries: how they are joined outside the part
    frequencies_hz: tuple[float, ...] = ()     # a part for several mains frequencies (frequency_hz the lowest)
    air_speed_m_s: float | None = None         # forced air: the speed over the part (None: the shop's default)

    def winding(self, name: str) -> Winding:
        for w in self.windings:
            if w.name == name:
                return w
        raise KeyError(name)


def _pin(r: Reader, key: str, default: str | None = None) -> str | None:
    value = r.raw(key, default)
    if value is None:
        return None
    if isinstance(value, (dict, list, bool)):
        raise r.error("expected a pin name like '1' or 'A3'", key)
    text = str(value).strip()
    if not text or first_unsafe_char(text) is not None:     # printed on the work order and the terminal
        raise r.error(f"expected a pin name like '1' or 'A3', got {value!r}", key)
    return text


def _tape_use(r: Reader, key: str) -> TapeUse | None:
    if not r.has(key):
        r.raw(key, None)
        return None
    t = _section(r, key)
    out = TapeUse(tape=t.text("tape"), layers=t.integer("layers", 1, minimum=0, maximum=50),
                  widths=t.integer("widths", 1, minimum=1, maximum=2))
    if out.widths > 1 and key == "core_wrap":
        raise t.error("a core wrap is half-lapped round the ring, one width at a time; 'widths' is for a "
                      "bobbin's layer, winding and outer tapes", "widths")
    t.done()
    return out


def _winding(r: Reader, kind: str) -> Winding:
    roles = ROLES
    role = r.choice("role", roles, "main" if kind == "inductor" else None)
    sections = r.integer("sections", 1, minimum=1, maximum=16)
    spins = tuple(str(p).strip() for p in r.list_of("section_pins", [])) if r.has("section_pins") else ()
    if sections > 1 and len(spins) != sections - 1:
        raise r.error(f"a winding in {sections} sections needs {sections - 1} tie pin(s) in section_pins "
                      f"(where one section finishes and the next starts)", "section_pins")
    strands = r.integer("strands", 0, minimum=0, maximum=64)
    turns = r.integer("turns", None, minimum=1, maximum=MAX_TURNS)
    w = Winding(
        name=r.text("name", max_len=40), role=role,
        voltage_v=r.quantity("voltage", "voltage", None),
        voltage_min_v=r.quantity("voltage_min", "voltage", None),
        voltage_max_v=r.quantity("voltage_max", "voltage", None),
        current_a=r.quantity("current", "current", None),
        va=r.quantity("va", "apparent_power", None),
        wire=r.text("wire", "auto", max_len=60), strands=strands,
        start=_pin(r, "start"), finish=_pin(r, "finish"),
        direction=r.choice("direction", ("cw", "ccw"), "cw"), sections=sections, section_pins=spins,
        turns=turns, margin_m=r.quantity("margin", "length", None, allow_zero=True),
        lead_sleeving=r.text("lead_sleeving", None), same_turns_as=r.text("same_turns_as", None),
        voltage_tolerance=r.tolerance_pair("voltage_tolerance", None), line=r.line, path=r.path,
        load=parse_load(r, role), wound_with=r.text("wound_with", None, max_len=40), taps=parse_taps(r),
        turns_ratio=parse_reset_ratio(r, role), section_shares=_section_shares(r, sections),
        chamber=r.integer("chamber", None, minimum=1, maximum=4),
    )
    r.done(renamed=RENAMED_KEYS["windings"])
    if w.start == w.finish:
        raise r.error(f"starts and finishes on the same pin '{w.start}'", "finish")
    chain = [w.start, *spins, w.finish]
    check_taps(r, w.voltage_v, role, w.taps, chain)
    for k in range(sections):
        if chain[k] is not None and chain[k] == chain[k + 1]:
            raise r.error(f"section {k + 1} would start and finish on pin '{chain[k]}'",
                          "section_pins" if spins else "finish")
    if len(set(chain)) != len(chain):
        raise r.error(f"a pin appears twice among start, section_pins and finish ({', '.join(map(str, chain))})",
                      "section_pins")
    if w.voltage_min_v and w.voltage_max_v and w.voltage_min_v > w.voltage_max_v:
        raise r.error("voltage_min is above voltage_max", "voltage_min")
    if w.voltage_v and w.voltage_max_v and w.voltage_max_v < w.voltage_v:
        raise r.error("voltage_max is below the nominal voltage", "voltage_max")
    if w.voltage_v and w.voltage_min_v and w.voltage_min_v > w.voltage_v:
        raise r.error("voltage_min is above the nominal voltage", "voltage_min")
    # a range wider than 4:1 either side of nominal (a universal 85..265 V input is about 3:1) is almost
    # always a wrong unit ('215 kV' for '215 V'); the engine would saturate the core by orders of magnitude
    if w.voltage_v and w.voltage_max_v and w.voltage_max_v > _VOLTAGE_SPAN * w.voltage_v:
        raise r.error(f"voltage_max is more than {_VOLTAGE_SPAN:g} times the nominal voltage; is its unit right?",
                      "voltage_max")
    if w.voltage_v and w.voltage_min_v and w.voltage_min_v * _VOLTAGE_SPAN < w.voltage_v:
        raise r.error(f"voltage_min is less than 1/{_VOLTAGE_SPAN:g} of the nominal voltage; is its unit right?",
                      "voltage_min")
    return w


def _section_shares(r: Reader, sections: int) -> tuple[float, ...]:
    """``section_shares: [2, 1]``: the sections' shares of the winding's turns (relative; equal when not given)."""
    if not r.has("section_shares"):
        r.raw("section_shares", None)
        return ()
    raw = r.list_of("section_shares")
    if sections < 2 or len(raw) != sections:
        raise r.error(f"section_shares gives one share per section: this winding has {sections} section(s), "
                      f"the list {len(raw)}", "section_shares")
    out = []
    for i, x in enumerate(raw):
        if isinstance(x, bool) or not isinstance(x, (int, float)) or not 0.0 < float(x) < 1e6:
            raise r.item_error("section_shares", i, f"expected a positive number (a share, like 2 in [2, 1]), "
                                                    f"got {x!r}")
        out.append(float(x))
    return tuple(out)


def _frequencies(op: Reader, kind: str) -> tuple[float, tuple[float, ...]]:
    """The operating frequency, or a transformer's list of them (50 and 60 Hz): (the lowest, all of them)."""
    from .. import units

    raw = op.raw("frequency")
    if isinstance(raw, list):
        if kind not in ("transformer", "common_mode_choke") or len(raw) < 2:
            raise op.error("several frequencies are for a transformer or a common-mode choke (a list of two or "
                           "more, like [50 Hz, 60 Hz]); give one frequency here", "frequency")
        out = []
        for i, item in enumerate(raw):
            try:
                out.append(units.parse(item, "frequency"))
            except units.UnitError as err:
                raise op.item_error("frequency", i, str(err)) from None
        values = tuple(sorted(set(out)))
    else:
        values = (op.quantity("frequency", "frequency"),)
    for f in values:
        if f > 50e6:
            raise op.error("frequency above 50 MHz is outside what this tool models", "frequency")
        if f < 1.0:
            raise op.error("frequency below 1 Hz; for DC chokes give the ripple frequency", "frequency")
    return values[0], (values if len(values) > 1 else ())


def _section(r: Reader, key: str) -> Reader:
    """A required mapping (``Reader.mapping`` raises a located error when it is missing)."""
    sub = r.mapping(key)
    assert sub is not None
    return sub


def cooling_and_air_speed(op: Reader) -> tuple[Cooling, float | None]:
    """``operating.cooling`` and its ``air_speed`` (forced air only; None: the shop's default), read by the spec and
    the search's requirement."""
    cooling = cast(Cooling, op.choice("cooling", COOLING, "natural"))
    speed = op.quantity("air_speed", "speed", None, minimum=0.05, maximum=AIR_SPEED_MAX_M_S)
    if speed is not None and cooling != "forced":
        raise op.error(f"'air_speed' is used only with cooling: forced (this part is cooled '{cooling}')", "air_speed")
    return cooling, speed


def parse_spec(data: Any, name: str) -> Spec:
    r = Reader(data, name)
    kind = r.choice("kind", KINDS)
    core = _section(r, "core")
    op = _section(r, "operating")
    waveform = cast(Waveform, op.choice("waveform", WAVEFORMS, "sine"))
    ins_class = op.raw("insulation_class", 130)
    cls = insulation_class(op, ins_class)
    freq, freqs = _frequencies(op, kind)
    ambient = op.quantity("ambient", "temperature", 25.0)
    if not -60.0 <= ambient <= 200.0:
        raise op.error(f"ambient {ambient:g} degC is outside -60..200 degC", "ambient")
    duty = op.number("duty", 0.5, minimum=0.01, maximum=0.99)
    cooling, air_speed = cooling_and_air_speed(op)
    flux_limit_t = op.quantity("flux_limit", "flux_density", None)
    efficiency_guess = op.number("efficiency", 0.9, minimum=0.3, maximum=0.999)
    op.done()

    wreaders = r.items("windings", min_items=1)
    windings = tuple(_winding(w, kind) for w in wreaders)
    names = [w.name for w in windings]
    _check_windings(r, kind, windings, wreaders)
    check_reset(r, op, kind, waveform, duty, windings, wreaders)
    connections = parse_connections(r, kind, windings, wreaders)
    order = _build_order(r, windings)
    ins = r.mapping("insulation", None)
    layer_tape = winding_tape = outer_wrap = core_wrap = None
    margin_m = 0.0
    margin_tape = sleeving = varnish = lead_exit = None
    barriers: tuple[Barrier, ...] = ()
    basis: dict[str, Any] = {}
    if ins is not None:
        lead_exit = ins.quantity("lead_exit_spacing", "length", None)
        layer_tape, winding_tape = _tape_use(ins, "layer_tape"), _tape_use(ins, "winding_tape")
        outer_wrap, core_wrap = _tape_use(ins, "outer_wrap"), _tape_use(ins, "core_wrap")
        basis = _insulation_basis(ins)
        margin_m = ins.quantity("margin", "length", 0.0, allow_zero=True)
        margin_tape, sleeving = ins.text("margin_tape", None), ins.text("sleeving", None)
        varnish, barriers = ins.text("varnish", None), _barriers(ins, names)
        ins.done()

    inductor = None
    if kind == "inductor":
        inductor = _inductor(_section(r, "inductor"), core)
    elif r.has("inductor"):
        raise r.error(f"'inductor' is not used by kind {kind}: only an inductor has an 'inductor' section", "inductor")
    ct = _current_transformer_section(r, core, op, kind, windings, wreaders, barriers)
    fb = _flyback_section(r, core, op, kind, windings, wreaders)
    cmc = _common_mode_choke_section(r, core, op, kind, windings, wreaders)

    stack = core.quantity("stack", "length", None)
    from ..part_numbers import part_number_problem

    part = r.text("part").strip()
    if (problem := part_number_problem(part)) is not None:
        raise r.error(problem, "part")
    spec = Spec(
        file=name, part=part, title=r.text("title", "", max_len=200),
        revision=r.text("revision", "", max_len=4).strip().upper(),
        status=r.choice("status", STATUSES, "draft"), customer=r.text("customer", "", max_len=200),
        kind=kind, core_id=core.text("id"), stack_m=stack,
        core_count=core.integer("count", 1, minimum=1, maximum=8), bobbin_id=core.text("bobbin", None),
        windings=windings, build_order=order, inductor=inductor, current_transformer=ct, flyback=fb,
        common_mode_choke=cmc,
        notes=r.text("notes", "", max_len=5000), history=_history(r), data=data,
        frequency_hz=freq, waveform=waveform, duty=duty, ambient_c=ambient, cooling=cooling, air_speed_m_s=air_speed,
        insulation_class_c=cls, flux_limit_t=flux_limit_t, efficiency_guess=efficiency_guess,
        layer_tape=layer_tape, winding_tape=winding_tape, outer_wrap=outer_wrap, margin_m=margin_m,
        margin_tape=margin_tape, sleeving=sleeving, varnish=varnish, barriers=barriers, core_wrap=core_wrap,
        insulation_basis=basis, lead_exit_spacing_m=lead_exit, connections=connections, frequencies_hz=freqs,
    )
    refuse_unused_keys(kind, core, op, windings, wreaders)
    core.done(("gap", "gap_arrangement"))
    r.done()
    from ..revision_letters import is_valid_revision

    if spec.revision and not is_valid_revision(spec.revision):
        raise r.error(f"'{spec.revision}' is not a drawing revision letter (A..Y without I, O, Q, S, X, Z; "
                      f"then AA, AB, ...)", "revision")
    return spec


def _check_windings(r: Reader, kind: str, windings: tuple[Winding, ...], wreaders: list[Reader]) -> None:
    """Names unique, the roles a kind needs, same-turns pairs that can be paired."""
    names = [w.name for w in windings]
    for i, w in enumerate(windings):
        if w.role == "line" and kind != "common_mode_choke":
            raise wreaders[i].error(f"role 'line' is for a common-mode choke's windings, not used by kind {kind}",
                                    "role")
        if (problem := winding_name_problem(w.name)) is not None:
            raise wreaders[i].error(problem, "name")
        if names.index(w.name) != i:
            raise wreaders[i].error(f"a second winding named '{w.name}'", "name")
        if w.name.lower() == "core":
            raise wreaders[i].error("'core' is reserved for barriers to the core", "name")
    if kind == "transformer":
        prim = [w for w in windings if w.role == "primary"]
        if not prim:
            raise r.error("a transformer needs a primary winding", "windings")
        if len(prim) > 1 and not r.has("connections"):
            raise r.error(f"a transformer with {len(prim)} primaries needs 'connections' (series or parallel, "
                          f"and the mains voltage each serves)", "windings")
        if len(prim) == 1 and r.has("connections"):
            raise r.error("'connections' join several primaries; this transformer has one", "connections")
        for p in prim:
            if p.voltage_v is None and (p.turns is None or len(prim) > 1):
                raise wreaders[windings.index(p)].error("the primary needs its voltage", "voltage")
        for w, wr in zip(windings, wreaders):
            if w.role in ("secondary", "auxiliary"):
                if w.voltage_v is None:
                    raise wr.error(f"a {w.role} winding needs its voltage at full load", "voltage")
                gate = w.load is not None and w.load.type == "gate_drive"    # its current is the gate's charge
                if w.current_a is None and w.va is None and not gate:
                    raise wr.error(f"a {w.role} winding needs its current (or va)", "current")
                if gate and (w.current_a is not None or w.va is not None):
                    key = "current" if w.current_a is not None else "va"
                    raise wr.error(f"'{key}' is not used with a gate_drive load: the winding's current follows "
                                   f"from the gate charge, the voltage and the frequency", key)
            if w.voltage_tolerance is not None and w.role not in ("secondary", "auxiliary"):
                raise wr.error(f"a {w.role} winding has no output voltage to hold: voltage_tolerance is for "
                               f"secondary and auxiliary windings", "voltage_tolerance")
            if w.role is None:
                raise wr.error("a transformer's winding needs its role: primary, secondary, auxiliary or shield",
                               "role")
            if w.role == "main":
                raise wr.error("role 'main' is for inductors; a transformer's windings are primary, "
                               "secondary, auxiliary or shield", "role")
    elif kind == "inductor":
        if len(windings) != 1:
            raise r.error("an inductor here has exactly one winding (split it with sections: N)", "windings")
        if windings[0].voltage_tolerance is not None:
            raise wreaders[0].error("an inductor has no output voltage to hold: voltage_tolerance is for a "
                                    "transformer's secondary and auxiliary windings", "voltage_tolerance")

    _check_bifilar(kind, windings, wreaders)
    for w, wr in zip(windings, wreaders):
        if w.same_turns_as is not None:
            other = next((o for o in windings if o.name == w.same_turns_as), None)
            if other is None or other is w:
                raise wr.error(f"'{w.same_turns_as}' names no other winding", "same_turns_as")
            if other.role != w.role or other.voltage_v != w.voltage_v:
                raise wr.error(f"only a winding of the same role and voltage can have the same turns as {w.same_turns_as}",
                               "same_turns_as")


def _check_bifilar(kind: str, windings: tuple[Winding, ...], wreaders: list[Reader]) -> None:
    """A winding wound with another: a transformer's, one section each, one wire, equal turns, one partner."""
    by_name = {w.name: w for w in windings}
    taken: dict[str, str] = {}
    for w, wr in zip(windings, wreaders):
        if w.wound_with is None:
            continue
        lead = by_name.get(w.wound_with)
        if lead is None or lead is w:
            raise wr.error(f"'{w.wound_with}' names no other winding", "wound_with")
        if kind != "transformer":
            raise wr.error(f"'wound_with' is read for a transformer's windings, not by kind {kind}", "wound_with")
        if lead.wound_with is not None or lead.name in taken:
            raise wr.error(f"{lead.name} is already wound with another winding: a bifilar pair is two windings, "
                           f"named once on the second", "wound_with")
        if w.role != lead.role and {w.role, lead.role} != {"primary", "reset"}:
            raise wr.error(f"only a winding of the same role can be wound with {lead.name}", "wound_with")
        if w.sections != 1 or lead.sections != 1:
            raise wr.error("windings wound together are one section each", "wound_with")
        if w.chamber is not None and w.chamber != lead.chamber:
            raise wr.error(f"windings wound together share one chamber: {w.name} is wound in {lead.name}'s "
                           f"layers (leave out 'chamber' here)", "chamber")
        if w.wire != lead.wire and not w.wire.startswith("auto"):
            raise wr.error(f"windings wound together share one wire: {w.name} gives {w.wire}, {lead.name} "
                           f"{lead.wire}", "wire")
        if w.turns is not None and lead.turns is not None and w.turns != lead.turns:
            raise wr.error(f"windings wound together have the same turns ({w.turns} against {lead.turns})", "turns")
        taken[lead.name] = w.name


RESERVED_NAMES = ("all", "core")


def winding_name_problem(name: str) -> str | None:
    """Why a winding name cannot be used, or None: the name must read back unchanged in ``between``,
    ``build_order`` (``P.1``) and tied sides (``S1+S2``)."""
    if not name.strip():
        return "a winding needs a name"
    if any(ord(c) < 32 or ord(c) == 127 for c in name):
        return f"winding name {name!r} carries a control character"
    if any(c.isspace() for c in name):
        return f"winding name {name!r} carries a space; use letters, digits, '-' or '_'"
    for c in ".+,:[]{}#":
        if c in name:
            return f"winding name '{name}' carries '{c}', which the spec uses between names (P.1, S1+S2)"
    if name.lower() in ("nan", "inf", "infinity"):
        return f"winding name '{name}' reads as a number that is not one; name it otherwise"
    if name.lower() in RESERVED_NAMES:
        return f"'{name}' is reserved ('all' windings, the 'core') and cannot name a winding"
    return None


def insulation_class(r: Reader, value: object) -> int:
    """The IEC 60085 class limit [degC] of ``value``, a mistake located at ``insulation_class`` under ``r``."""
    from ..standards.thermal_classes import parse_thermal_class

    try:
        return parse_thermal_class(value)
    except ValueError as err:
        r.raw("insulation_class", None)
        raise r.error(str(err), "insulation_class") from None


def _build_order(r: Reader, windings: tuple[Winding, ...]) -> tuple[tuple[str, int], ...]:
    by_name = {w.name: w for w in windings}
    followers = {w.name for w in windings if w.wound_with}    # laid in their partner's layers, not on their own
    if not r.has("build_order"):
        r.raw("build_order", None)
        return tuple((w.name, k) for w in windings if w.name not in followers for k in range(1, w.sections + 1))
    raw = r.list_of("build_order")
    order = []
    for i, item in enumerate(raw):
        text = str(item).strip()
        name, _, sec = text.partition(".")
        if name not in by_name:
            raise r.item_error("build_order", i, f"'{text}' names no winding (windings: {', '.join(by_name)})")
        w = by_name[name]
        if name in followers:
            raise r.item_error("build_order", i, f"'{text}' is wound with {w.wound_with}: it goes where "
                                                 f"{w.wound_with} goes; leave it out of build_order")
        if sec:
            if not sec.isdigit() or not 1 <= int(sec) <= w.sections:
                raise r.item_error("build_order", i, f"'{text}': winding {name} has sections 1..{w.sections}")
            order.append((name, int(sec)))
        else:
            if w.sections != 1:
                raise r.item_error("build_order", i, f"'{text}': winding {name} is in {w.sections} sections; "
                                                     f"name them {name}.1 .. {name}.{w.sections}")
            order.append((name, 1))
    want = {(w.name, k) for w in windings if w.name not in followers for k in range(1, w.sections + 1)}
    if len(set(order)) != len(order):
        raise r.error("a section appears twice in build_order", "build_order")
    missing = want - set(order)
    if missing:
        miss = ", ".join(f"{n}.{k}" if by_name[n].sections > 1 else n for n, k in sorted(missing))
        raise r.error(f"build_order leaves out {miss}", "build_order")
    return tuple(order)


def _insulation_basis(ins: Reader) -> dict[str, Any]:
    """This part's departures from the shop's insulation defaults: the mains it is used on, its overvoltage
    category and pollution degree (the customer's drawing or the product standard says)."""
    out: dict[str, Any] = {}
    if ins.has("mains_voltage"):
        out["mains_v"] = ins.quantity("mains_voltage", "voltage")
        if not 0.0 < out["mains_v"] <= 600.0:
            raise ins.error("mains voltage line to neutral must be above 0 and at most 600 V", "mains_voltage")
    if ins.has("overvoltage_category"):
        cat = str(ins.raw("overvoltage_category")).strip().upper()
        if cat not in ("I", "II", "III", "IV"):
            raise ins.error(f"expected I, II, III or IV, got '{cat}'", "overvoltage_category")
        out["overvoltage_category"] = ("I", "II", "III", "IV").index(cat) + 1
    if ins.has("pollution_degree"):
        out["pollution_degree"] = ins.integer("pollution_degree", minimum=1, maximum=3)
    return out


def _barriers(ins: Reader, names: list[str]) -> tuple[Barrier, ...]:
    out: list[Barrier] = []
    for b in ins.items("barriers", []):
        between = b.list_of("between")
        if len(between) != 2:
            raise b.error("'between' names two windings, or a winding and 'core'", "between")
        a, c = (str(x).strip() for x in between)
        for x in (a, c):
            for part in x.split("+"):     # "S1+S2": windings tied together for the test
                if part.strip() not in ("core", "all", THROUGH_CONDUCTOR) and part.strip() not in names:
                    raise b.error(f"'{part.strip()}' names no winding (windings: {', '.join(names)}, "
                                  f"'all', 'core', or '{THROUGH_CONDUCTOR}' for a current transformer's "
                                  f"primary passed through the core)", "between")
        if a == c:
            raise b.error("a barrier is between two different things", "between")
        if b.has("grade") == b.has("rating"):
            raise b.error("give the barrier's grade (functional, basic, supplementary, reinforced, double)", "grade")
        key = "grade" if b.has("grade") else "rating"
        grade = b.choice(key, RATINGS)
        wv = b.quantity("working_voltage", "voltage")
        if not 0.0 < wv <= MAX_WORKING_V:
            raise b.error(f"working voltage {wv:g} V is outside what these insulation tables cover "
                          f"(above 0 up to {MAX_WORKING_V:g} V rms)", "working_voltage")
        peak = b.quantity("peak_voltage", "voltage", None)
        if peak is not None and not wv * (1 - 1e-9) <= peak <= MAX_WORKING_V * 2.0:
            raise b.error(f"peak voltage {peak:g} V must be at least the working voltage {wv:g} V rms and at most "
                          f"{MAX_WORKING_V * 2:g} V", "peak_voltage")
        out.append(Barrier(a=a, b=c, rating=grade, working_voltage_v=wv, line=b.line, peak_voltage_v=peak,
                           index=len(out)))
        b.done()
    return tuple(out)


def _inductor(r: Reader, core: Reader) -> InductorReq:
    gap_raw = core.raw("gap", "auto")
    gap_m = None
    if isinstance(gap_raw, str) and gap_raw.strip().lower() in ("auto", "none"):
        gap = gap_raw.strip().lower()
    else:
        gap = "fixed"
        gap_m = core.quantity("gap", "length", allow_zero=True)
    arrangement = core.choice("gap_arrangement", ("centre", "spacer", "none"), "centre" if gap != "none" else "none")
    req = InductorReq(
        inductance_h=r.quantity("inductance", "inductance", None),
        current_dc_a=r.quantity("current", "current"),
        ripple_a=r.quantity("ripple", "current", 0.0, allow_zero=True),
        current_peak_a=r.quantity("current_peak", "current", None),
        inductance_min_h=r.quantity("inductance_min", "inductance", None),
        duty=r.number("duty", 0.5, minimum=0.01, maximum=0.99),
        voltage_drop_v=r.quantity("voltage_drop", "voltage", None),
        gap=gap, gap_m=gap_m, gap_arrangement=arrangement,
    )
    r.done()
    if (req.inductance_h is None) == (req.voltage_drop_v is None):
        raise r.error("give either the inductance (choke) or the voltage_drop at rated current (AC reactor)")
    for key in ("ripple", "duty"):
        if req.voltage_drop_v is not None and r.has(key):
            raise r.error(f"'{key}' is not used by kind inductor as an AC reactor (voltage_drop): its current is a "
                          f"sine at the operating frequency", key)
    if req.current_peak_a is not None and req.current_peak_a < req.current_dc_a:
        raise r.error("current_peak is below the rated current", "current_peak")
    return req


def _current_transformer_section(r: Reader, core: Reader, op: Reader, kind: str, windings: tuple[Winding, ...],
                                 wreaders: list[Reader], barriers: tuple[Barrier, ...] = ()
                                 ) -> CurrentTransformerReq | None:
    """The ``current_transformer`` section (only that kind has one; it has no gap)."""
    if kind != "current_transformer":
        where = next((b for b in barriers if THROUGH_CONDUCTOR in (b.a, b.b)), None)
        if where is not None:
            raise SpecError(f"'{THROUGH_CONDUCTOR}' (a primary passed through the core) is not used by kind {kind}",
                            file=r.file, line=where.line, path=f"insulation.barriers[{where.index}].between")
        if r.has("current_transformer"):
            raise r.error(f"a {kind} has no 'current_transformer' section", "current_transformer")
        return None
    if core.has("gap") or core.has("gap_arrangement"):
        key = "gap" if core.has("gap") else "gap_arrangement"
        raise core.error(f"'{key}' is not used by kind current_transformer: a current transformer's core is not "
                         f"gapped here", key)
    from .ct_spec import UNUSED_OPERATING_KEYS, parse_current_transformer, refuse_unused

    refuse_unused(op, UNUSED_OPERATING_KEYS)
    return parse_current_transformer(_section(r, "current_transformer"), windings, wreaders, barriers)


def _flyback_section(r: Reader, core: Reader, op: Reader, kind: str, windings: tuple[Winding, ...],
                     wreaders: list[Reader]) -> FlybackReq | None:
    """The ``flyback`` section (only that kind has one; its gap is found from L_p, not given)."""
    if kind != "flyback":
        if r.has("flyback"):
            raise r.error(f"'flyback' is not used by kind {kind}", "flyback")
        return None
    if core.has("gap"):
        raise core.error("'gap' is not used by kind flyback: the gap is found from the primary inductance", "gap")
    from .flyback_spec import UNUSED_OPERATING_KEYS, parse_flyback, refuse_unused

    refuse_unused(op, UNUSED_OPERATING_KEYS)
    return parse_flyback(_section(r, "flyback"), core, windings, wreaders)


def _common_mode_choke_section(r: Reader, core: Reader, op: Reader, kind: str, windings: tuple[Winding, ...],
                               wreaders: list[Reader]) -> CommonModeChokeReq | None:
    """The ``common_mode_choke`` section (only that kind has one; a toroid has no gap, ever)."""
    if kind != "common_mode_choke":
        if r.has("common_mode_choke"):
            raise r.error(f"'common_mode_choke' is not used by kind {kind}", "common_mode_choke")
        return None
    for key in ("gap", "gap_arrangement", "stack", "count", "bobbin"):
        if core.has(key):
            raise core.error(f"'{key}' is not used by kind common_mode_choke: it is wound on one ungapped "
                             f"toroid", key)
    from .cmc_spec import UNUSED_OPERATING_KEYS, parse_common_mode_choke, refuse_unused

    refuse_unused(op, UNUSED_OPERATING_KEYS)
    return parse_common_mode_choke(_section(r, "common_mode_choke"), windings, wreaders)


def _history(r: Reader) -> tuple[dict[str, Any], ...]:
    out = []
    for h in r.items("history", []):
        out.append({
            "revision": h.text("revision", ""), "date": _history_date(h), "by": h.text("by", ""),
            "note": h.text("note", ""), "fingerprint": h.text("fingerprint", ""),
            "accepted": tuple(_accepted(a) for a in h.items("accepted", [])),
            "supersedes": h.text("supersedes", ""), "effective": h.text("effective", "", max_len=200),
            # None: the release looked in no register (or predates the record)
            "open_orders": tuple(str(n) for n in h.list_of("open_orders")) if h.has("open_orders") else None,
        })
        h.done(("parts",))     # per-key fingerprints written by `specgen release`
    return tuple(out)


def _accepted(a: Reader) -> AcceptedWarning:
    """One ``accepted:`` item of a history entry (written by ``specgen release --accept``)."""
    out = AcceptedWarning(code=a.text("code"), by=a.text("by", max_len=200), date=_history_date(a),
                          reason=a.text("reason", max_len=2000))
    a.done()
    return out


def _history_date(h: Reader) -> str:
    value = h.raw("date", "")
    if isinstance(value, (dict, list, bool)) or first_unsafe_char(str(value)) is not None:
        raise h.error("expected a date like 2026-10-14", "date")
    return str(value)


def load_spec(path: str | os.PathLike[str]) -> Spec:
    """Read and parse one spec file; every mistake is a located SpecError."""
    name = str(path)
    data = load_yaml(path, "spec file")
    if data is None:
        raise SpecError("is empty; a spec needs at least part, kind, core, operating and windings", file=name)
    return parse_spec(data, name)


def load_spec_text(text: str, name: str) -> Spec:
    data = parse_yaml(text, name)
    if data is None:
        raise SpecError("is empty", file=name)
    return parse_spec(data, name)
