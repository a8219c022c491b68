"""The requirement file: what the part must do, read into a frozen ``Requirement`` (SI floats, degC).

Every mistake is a located ``SpecError`` (file, line and key path; one line, exit 2).
"""

from __future__ import annotations

from dataclasses import dataclass, field, fields
from pathlib import Path
from typing import Any

from ..design.spec_keys import unused_winding_key_reason
from ..errors import SpecError
from ..loading import RENAMED_KEYS, Reader, load_yaml
from ..present import si

KINDS = ("transformer", "inductor", "common_mode_choke", "flyback")
RATINGS = ("functional", "basic", "reinforced")

TOP_KEYS = ("requirement", "part", "title", "customer", "kind", "operating", "windings", "inductor", "insulation",
            "limits", "notes", "common_mode_choke", "lines", "flyback")
# a flyback's section as in a spec (design.flyback_spec); its texts are copied into each draft
FLYBACK_QUANTITIES = {"input_voltage_min": "voltage", "input_voltage_max": "voltage", "inductance": "inductance",
                      "reflected_voltage": "voltage", "diode_drop": "voltage"}
FLYBACK_OTHER = ("mode", "ripple_ratio", "duty_max", "efficiency", "output_tolerance")
OPERATING_KEYS = ("frequency", "waveform", "duty", "ambient", "cooling", "air_speed", "insulation_class", "max_rise",
                  "flux_limit", "efficiency")
WINDING_KEYS = ("name", "role", "voltage", "voltage_min", "voltage_max", "current", "va", "same_turns_as")
INDUCTOR_KEYS = ("inductance", "current", "ripple", "current_peak", "inductance_min", "duty")
DEFAULT_EFFICIENCY = 0.9     # first guess when the requirement gives none (the engine's own default)


@dataclass(frozen=True, slots=True)
class ReqWinding:
    name: str
    role: str                       # primary | secondary | auxiliary
    voltage_v: float
    voltage_min_v: float | None
    voltage_max_v: float | None
    current_a: float | None
    va: float | None
    same_turns_as: str | None
    text: dict[str, str | None]     # key -> the text as written (copied into the draft spec)

    @property
    def load_current_a(self) -> float:
        if self.current_a is not None:
            return self.current_a
        return (self.va or 0.0) / self.voltage_v


@dataclass(frozen=True, slots=True)
class Limits:
    max_mass_kg: float | None = None
    max_length_m: float | None = None   # largest outline dimension
    max_width_m: float | None = None    # middle
    max_height_m: float | None = None   # smallest (seated height)


@dataclass(frozen=True, slots=True)
class ChokeDuty:
    inductance_h: float
    current_dc_a: float
    ripple_a: float                 # peak to peak
    current_peak_a: float | None
    inductance_min_h: float | None = None   # the least inductance at current_peak (the engine's check)


@dataclass(frozen=True, slots=True)
class Operating:
    """The requirement's operating conditions (its ``operating:`` section; a choke's duty from ``inductor:``)."""
    frequency_hz: float
    waveform: str
    duty: float
    ambient_c: float
    cooling: str
    air_speed_m_s: float | None     # forced air: the speed over the part (None: the shop's default)
    insulation_class_c: int
    max_rise_k: float | None
    flux_limit_t: float | None
    efficiency: float | None


@dataclass(frozen=True, slots=True)
class Requirement(Operating):
    """What the part must do: its operating conditions (``Operating``'s fields) and the rest of the file."""
    file: str
    id: str
    part: str | None
    title: str
    customer: str
    kind: str
    windings: tuple[ReqWinding, ...]    # transformer; empty for a choke
    rating: str                     # between windings: functional | basic | reinforced
    to_core: str                    # windings to core
    working_voltage_v: float
    limits: Limits = Limits()
    choke: ChokeDuty | None = None
    text: dict[str, str | None] = field(default_factory=dict)   # operating/inductor texts as written
    notes: str = ""
    lines: int = 0                  # a common-mode choke's lines (its section's texts are in ``text``)
    line_current_a: float = 0.0     # a common-mode choke's rms line current
    frequencies_text: tuple[str, ...] = ()   # a choke for several line frequencies, as written

    @property
    def efficiency_guess(self) -> float:
        return self.efficiency if self.efficiency is not None else DEFAULT_EFFICIENCY

    @property
    def primary(self) -> ReqWinding:
        return next(w for w in self.windings if w.role == "primary")

    @property
    def loads(self) -> list[ReqWinding]:
        return [w for w in self.windings if w.role != "primary"]

    @property
    def output_va(self) -> float:
        return sum(w.voltage_v * w.load_current_a for w in self.loads)

    @property
    def core_waveform(self) -> str:
        """The flux waveform of the engine's core loss: a choke's DC + ripple is modelled as sine here."""
        return self.waveform if self.kind == "transformer" else "sine"

    def summary(self) -> str:
        f = f"{self.frequency_hz / 1e3:g} kHz" if self.frequency_hz >= 1e3 else f"{self.frequency_hz:g} Hz"
        if self.kind == "common_mode_choke":
            t = self.text
            return (f"common-mode choke, {self.lines} lines x {t['cmc.line_current']} at "
                    f"{'/'.join(self.frequencies_text) or f}, {t['cmc.common_mode_inductance']} at "
                    f"{t['cmc.inductance_frequency']}")
        if self.choke is not None:
            c = self.choke
            return (f"choke {si(c.inductance_h, 'H', keep_zeros=False)} at {c.current_dc_a:g} A DC, ripple "
                    f"{c.ripple_a:g} A p-p at {f}")
        if self.kind == "flyback":
            outs = ", ".join(f"{w.voltage_v:g} V {w.load_current_a:.3g} A" for w in self.loads)
            return (f"flyback {self.text['fb.input_voltage_min']} to {self.text['fb.input_voltage_max']} at {f} -> "
                    f"{outs}")
        p = self.primary
        outs = ", ".join(f"{w.voltage_v:g} V {w.load_current_a:.3g} A" for w in self.loads)
        return f"transformer {p.voltage_v:g} V {f} {self.waveform} -> {outs} ({self.output_va:.4g} VA)"


def _text(r: Reader, key: str) -> str | None:
    v = r.data.get(key)
    return None if v is None else str(v).strip()


def _validate_part(r: Reader) -> str | None:
    """The part number the draft will carry: the one part-number rule, reported here, at the requirement."""
    from ..part_numbers import part_number_problem

    if not r.has("part"):
        return None
    part = r.raw("part")
    problem = part_number_problem(part)
    if problem is not None:
        raise r.error(problem, "part")
    return str(part).strip()


def _operating(r: Reader, kind: str) -> tuple[Operating, dict[str, str | None], tuple[str, ...]]:
    """The operating conditions, their texts as written (for the draft spec), and a choke's list of line
    frequencies as written (empty for one frequency)."""
    from ..design.spec import WAVEFORMS, cooling_and_air_speed, insulation_class

    op = r.mapping("operating")
    assert op is not None          # required key: Reader.mapping raises when it is missing
    op.done(OPERATING_KEYS)
    freqs: tuple[str, ...] = ()
    if kind == "common_mode_choke" and isinstance(op.raw("frequency"), list):
        from .. import units

        raw = op.raw("frequency")
        try:
            values = [units.parse(x, "frequency") for x in raw]
        except units.UnitError as err:
            raise op.error(str(err), "frequency") from None
        freq, freqs = min(values), tuple(str(x).strip() for x in raw)
    else:
        freq = op.quantity("frequency", "frequency")
    if not 1.0 <= freq <= 50e6:
        raise op.error("frequency must lie between 1 Hz and 50 MHz", "frequency")
    waveform = op.choice("waveform", WAVEFORMS, "sine")
    if kind != "transformer" and op.has("waveform"):
        raise op.error("a choke carries DC with a triangular ripple; give the ripple under 'inductor'",
                       "waveform")
    duty = op.number("duty", 0.5, minimum=0.01, maximum=0.99)
    ambient = op.quantity("ambient", "temperature", 25.0)
    if not -60.0 <= ambient <= 200.0:
        raise op.error(f"ambient {ambient:g} degC is outside -60..200 degC", "ambient")
    cooling, air_speed = cooling_and_air_speed(op)
    cls = insulation_class(op, op.raw("insulation_class", 130))
    max_rise = op.quantity("max_rise", "temperature_difference", None)
    if max_rise is not None and max_rise <= 0:
        raise op.error("max_rise must be above zero", "max_rise")
    flux = op.quantity("flux_limit", "flux_density", None)
    if kind == "flyback" and op.has("efficiency"):
        raise op.error("a flyback's efficiency estimate goes in its 'flyback' section", "efficiency")
    eff = op.number("efficiency", None, minimum=0.3, maximum=0.999)
    text = {k: _text(op, k) for k in ("frequency", "ambient", "flux_limit", "insulation_class")}
    op.done()
    return Operating(freq, waveform, duty, ambient, cooling, air_speed, cls, max_rise, flux, eff), text, freqs


def _winding(wr: Reader, kind: str) -> ReqWinding:
    wr.done(WINDING_KEYS, renamed=RENAMED_KEYS["windings"])
    role = wr.choice("role", ("primary", "secondary", "auxiliary"))
    if kind == "flyback" and role == "primary" and wr.has("voltage"):
        raise wr.error("a flyback's primary voltage is the input range in its 'flyback' section", "voltage")
    volts = 0.0 if kind == "flyback" and role == "primary" else wr.quantity("voltage", "voltage")
    w = ReqWinding(
        name=wr.text("name", max_len=40), role=role, voltage_v=volts,
        voltage_min_v=wr.quantity("voltage_min", "voltage", None),
        voltage_max_v=wr.quantity("voltage_max", "voltage", None),
        current_a=wr.quantity("current", "current", None), va=wr.quantity("va", "apparent_power", None),
        same_turns_as=wr.text("same_turns_as", None),
        text={k: _text(wr, k) for k in ("voltage", "voltage_min", "voltage_max", "current", "va")})
    wr.done()
    if w.name.lower() in ("core", "all") or "+" in w.name:
        raise wr.error("'core', 'all' and names with '+' are reserved for the insulation barriers", "name")
    if role != "primary" and w.current_a is None and w.va is None:
        raise wr.error(f"a {role} winding needs its current (or va)", "current")
    if role == "primary" and (w.current_a is not None or w.va is not None):
        raise wr.error("the primary current follows from the loads; give the secondaries' currents", "current")
    for key in ("voltage_min", "voltage_max"):
        why = unused_winding_key_reason("transformer", role, key)
        if why is not None and wr.has(key):
            raise wr.error(f"'{key}' is not used on a {role} winding: {why}", key)
    if w.voltage_max_v is not None and w.voltage_max_v < w.voltage_v:
        raise wr.error("voltage_max is below the nominal voltage", "voltage_max")
    if w.voltage_min_v is not None and w.voltage_min_v > w.voltage_v:
        raise wr.error("voltage_min is above the nominal voltage", "voltage_min")
    return w


def _windings(r: Reader, kind: str = "transformer") -> tuple[ReqWinding, ...]:
    read: list[tuple[ReqWinding, Reader]] = []
    for wr in r.items("windings", min_items=2):
        w = _winding(wr, kind)
        if any(o.name == w.name for o, _ in read):
            raise wr.error(f"a second winding named '{w.name}'", "name")
        read.append((w, wr))
    prim = [w for w, _ in read if w.role == "primary"]
    if len(prim) != 1:
        raise r.error(f"a {kind} needs exactly one primary winding, found {len(prim)}", "windings")
    for w, wr in read:
        if w.same_turns_as is None:
            continue
        other = next((o for o, _ in read if o.name == w.same_turns_as), None)
        if other is None or other is w or other.role != w.role or other.voltage_v != w.voltage_v:
            raise wr.error(f"'{w.same_turns_as}' names no other winding of the same role and voltage", "same_turns_as")
        if other.same_turns_as is not None:
            raise wr.error(f"'{w.same_turns_as}' itself has the same turns as another winding; name that one instead",
                           "same_turns_as")
    if r.has("inductor"):
        raise r.error("only a choke has an 'inductor' section", "inductor")
    if kind != "flyback" and r.has("flyback"):
        raise r.error(f"'flyback' is not used by kind {kind}", "flyback")
    return tuple(w for w, _ in read)


def _choke(r: Reader, duty: float, text: dict[str, str | None]) -> tuple[ChokeDuty, float]:
    ir = r.mapping("inductor")
    assert ir is not None
    ir.done(INDUCTOR_KEYS)
    choke = ChokeDuty(inductance_h=ir.quantity("inductance", "inductance"),
                      current_dc_a=ir.quantity("current", "current"),
                      ripple_a=ir.quantity("ripple", "current", 0.0, allow_zero=True),
                      current_peak_a=ir.quantity("current_peak", "current", None),
                      inductance_min_h=ir.quantity("inductance_min", "inductance", None))
    duty = ir.number("duty", duty, minimum=0.01, maximum=0.99)
    if choke.current_peak_a is not None and choke.current_peak_a < choke.current_dc_a:
        raise ir.error("current_peak is below the DC current", "current_peak")
    text.update({f"inductor.{k}": _text(ir, k) for k in ("inductance", "current", "ripple", "current_peak",
                                                            "inductance_min")})
    ir.done()
    if r.has("windings"):
        raise r.error("a choke has one winding; the search sizes it (remove 'windings')", "windings")
    return choke, duty


_CMC_QUANTITIES = {"line_current": "current", "line_voltage": "voltage", "line_to_ground_voltage": "voltage",
                   "common_mode_inductance": "inductance", "inductance_frequency": "frequency",
                   "differential_inductance": "inductance", "differential_current_peak": "current",
                   "ground_capacitance": "capacitance", "leakage_current": "current", "sector_gap": "length"}
_CMC_REQUIRED = ("line_current", "line_voltage", "common_mode_inductance", "inductance_frequency", "sector_gap")


def _flyback(r: Reader, text: dict[str, str | None]) -> float:
    """The flyback's section, its texts kept for the draft spec (the spec parser checks the rest): V_in max."""
    sec = r.mapping("flyback")
    assert sec is not None
    sec.done(tuple(FLYBACK_QUANTITIES) + FLYBACK_OTHER)
    v_max = sec.quantity("input_voltage_max", "voltage")
    sec.quantity("input_voltage_min", "voltage")
    for k, dim in FLYBACK_QUANTITIES.items():
        if sec.has(k):
            sec.quantity(k, dim, allow_zero=k == "diode_drop")
    sec.choice("mode", ("dcm", "boundary", "ccm"), None)
    for k in FLYBACK_OTHER[1:]:
        sec.number(k, None)
    text.update({f"fb.{k}": _text(sec, k) for k in (*FLYBACK_QUANTITIES, *FLYBACK_OTHER) if sec.has(k)})
    sec.done()
    return v_max


def _common_mode_choke(r: Reader, text: dict[str, str | None]) -> tuple[int, float, float]:
    """The common-mode choke's section, its texts kept for the draft spec (the spec parser checks the rest):
    (lines, line voltage, line current)."""
    lines = r.integer("lines", 2, minimum=2, maximum=3)
    sec = r.mapping("common_mode_choke")
    assert sec is not None
    sec.done(tuple(_CMC_QUANTITIES))
    values = {}
    for k, dim in _CMC_QUANTITIES.items():
        if k in _CMC_REQUIRED or sec.has(k):
            values[k] = sec.quantity(k, dim)
    text.update({f"cmc.{k}": _text(sec, k) for k in values})
    sec.done()
    if r.has("windings") or r.has("inductor"):
        key = "windings" if r.has("windings") else "inductor"
        raise r.error(f"a common-mode choke has one winding per line; the search sizes them (remove '{key}')", key)
    return lines, values["line_voltage"], values["line_current"]


def _insulation(r: Reader, kind: str, windings: tuple[ReqWinding, ...],
                default_wv: float | None = None) -> tuple[str, str, float]:
    """(rating between windings, rating to the core, working voltage); ``default_wv`` where none is given."""
    ins = r.mapping("insulation", None)
    rating, to_core, wv = "functional", None, None
    if ins is not None:
        ins.done(("between_windings", "to_core", "working_voltage") if kind != "inductor"
                 else ("to_core", "working_voltage"))
        if kind != "inductor":
            rating = ins.choice("between_windings", RATINGS, "basic")
        to_core = ins.choice("to_core", ("functional", "basic"), None)
        wv = ins.quantity("working_voltage", "voltage", None)
        ins.done()
    elif kind != "inductor":
        rating = "basic"
    if to_core is None:
        to_core = "functional" if kind == "inductor" or rating == "functional" else "basic"
    if wv is None and default_wv is not None:
        wv = default_wv
    if wv is None:
        if kind == "transformer":
            p = next(w for w in windings if w.role == "primary")
            wv = p.voltage_max_v or p.voltage_v
        else:
            wv = 50.0
    return rating, to_core, wv


def _limits(r: Reader) -> Limits:
    lim = r.mapping("limits", None)
    if lim is None:
        return Limits()
    lim.done(("max_mass", "max_length", "max_width", "max_height"))
    out = Limits(max_mass_kg=lim.quantity("max_mass", "mass", None),
                 max_length_m=lim.quantity("max_length", "length", None),
                 max_width_m=lim.quantity("max_width", "length", None),
                 max_height_m=lim.quantity("max_height", "length", None))
    lim.done()
    return out


def parse_requirement(data: Any, name: str) -> Requirement:
    """The requirement file's mapping -> Requirement; every mistake a located SpecError."""
    r = Reader(data, name)
    r.done(TOP_KEYS)             # a typo is named as such before a key it hides is reported missing
    kind = r.choice("kind", KINDS)
    op, text, freqs = _operating(r, kind)
    duty = op.duty
    windings: tuple[ReqWinding, ...] = ()
    choke = None
    lines, line_v, line_i = 0, None, 0.0
    if kind in ("transformer", "flyback"):
        windings = _windings(r, kind)
        if kind == "flyback":
            line_v = _flyback(r, text)
    elif kind == "common_mode_choke":
        lines, line_v, line_i = _common_mode_choke(r, text)
    else:
        choke, duty = _choke(r, duty, text)
    if kind != "common_mode_choke" and r.has("lines"):
        raise r.error(f"'lines' is for a common-mode choke, not used by kind {kind}", "lines")
    rating, to_core, wv = _insulation(r, kind, windings, line_v)
    limits = _limits(r)
    req = Requirement(
        file=name, id=r.text("requirement", Path(name).stem, max_len=60), part=_validate_part(r),
        title=r.text("title", "", max_len=200), customer=r.text("customer", "", max_len=200), kind=kind,
        **{f.name: getattr(op, f.name) for f in fields(Operating)} | {"duty": duty},
        windings=windings, rating=rating, to_core=to_core, working_voltage_v=wv,
        limits=limits, choke=choke, text=text, notes=r.text("notes", "", max_len=5000), lines=lines,
        frequencies_text=freqs, line_current_a=line_i)
    r.done()
    return req


def load_requirement(path: str | Path) -> Requirement:
    """Read a requirement file (YAML); every mistake is a located SpecError (one line, exit 2)."""
    data = load_yaml(path, "requirement file")
    if data is None:
        raise SpecError("is empty; a requirement needs at least kind, operating and windings (or inductor)",
                        file=str(path))
    return parse_requirement(data, str(path))
