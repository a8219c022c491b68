"""A transformer's own tests on the station: turns ratios, polarity, inductances, and for a mains part its
open-circuit voltages and no-load current and loss at rated voltage.

Which tests a part gets follows what the station can run (``design/test_setup.py``): a mains part (sine, on
the station's adjustable AC supply) is energised at its rated voltage, so its steel core is checked at the
working flux its design figures apply to (no-load current in place of a small-signal inductance reading, which
a steel core would not match); a high-frequency ferrite part is not energised at its working voltage and
frequency (the station has no such source): its turns ratio at a low level checks what an open-circuit voltage
would, and its magnetizing inductance is read small-signal, where a ferrite's figure applies.
"""

from __future__ import annotations

import math
from dataclasses import replace

from ...present import frequency
from .. import forward as FW
from .. import test_setup as ts
from ..result import Limit, WindingResult
from ..spec import Spec
from ..state import DesignState, KindTests


def _also(spec: Spec) -> str:
    """A test condition's note on a part for several frequencies: it is tested at the lowest."""
    rest = [frequency(x) for x in spec.frequencies_hz if x != spec.frequency_hz]
    return f"tested at the lowest frequency; the part also serves {', '.join(rest)}" if rest else ""


def _other_end(w: WindingResult) -> str:
    """The winding's end that is not its dot: the reference pin of a polarity reading."""
    return w.finish if w.dot_pin == w.start else w.start


def polarity_lines(prim: WindingResult, windings: tuple[WindingResult, ...]) -> list[str]:
    """'Positive step on P, pin 1 against pin 2: S1 pin 7 reads positive against pin 8.' for each other winding."""
    return [f"Positive step on {prim.name}, pin {prim.dot_pin} against pin {_other_end(prim)}: {w.name} pin "
            f"{w.dot_pin} reads positive against pin {_other_end(w)}."
            for w in windings if w is not prim and w.finish and w.role != "reset"]


def reset_tests(state: DesignState, prim: WindingResult) -> tuple[list[Limit], list[str]]:
    """A forward converter's reset winding: its ratio test (``design/forward.py``) at a low level, and its
    polarity line (it connects in anti-phase)."""
    limits, lines = [], []
    for w in state.windings:
        if w.role == "reset" and w.finish:
            limit, line = FW.reset_tests(prim, w, state.cat.shop.tolerances["ratio"])
            limits.append(replace(limit, setting=ts.ratio_setting(state.spec.frequency_hz),
                                  pins=f"{prim.name} {prim.start}-{prim.finish} driven, {w.name} {w.start}-{w.finish} "
                                       f"read"))
            lines.append(line)
    return limits, lines


def ratio_limits(state: DesignState, prim: WindingResult, mains: bool) -> tuple[list[Limit], list[Limit]]:
    """Turns ratio of every other winding (at a low level), and on a mains part the open-circuit voltages."""
    spec, s, tol = state.spec, state.summary, state.cat.shop.tolerances
    ratio: list[Limit] = []
    ocv: list[Limit] = []
    setting = ts.ratio_setting(spec.frequency_hz)

    def turns_ratio(w: WindingResult, driven: WindingResult, r: float, note: str) -> Limit:
        return Limit(name="turns ratio", item=f"{driven.name}:{w.name}", nominal=r, low=r * (1 - tol["ratio"]),
                     high=r * (1 + tol["ratio"]), unit=":1", setting=setting, condition=note,
                     pins=f"{driven.name} {driven.start}-{driven.finish} driven, {w.name} {w.start}-{w.finish} read")

    for w in state.windings:
        if w.role == "primary" and w is not prim:      # halves of a several-primary part: equal turns
            ratio.append(turns_ratio(w, prim, prim.turns / w.turns, f"halves, {prim.turns} : {w.turns} turns"))
        bifilar = next((x.wound_with for x in w.sections if x.wound_with), None)
        if w.role in ("secondary", "auxiliary") and bifilar and spec.winding(w.name).wound_with == bifilar:
            mate = next(x for x in state.windings if x.name == bifilar)
            ratio.append(turns_ratio(w, mate, 1.0, f"wound together, {w.turns} : {w.turns} turns"))
        if w.role not in ("secondary", "auxiliary"):
            continue
        ratio.append(turns_ratio(w, prim, prim.turns / w.turns, f"{prim.turns} : {w.turns} turns"))
        v = s.open_circuit.get(w.name)
        if v and mains:
            ocv.append(Limit(name="open-circuit voltage", item=w.name, nominal=v,
                             low=v * (1 - tol["open_circuit_voltage"]), high=v * (1 + tol["open_circuit_voltage"]),
                             unit="V", setting=ts.supply_setting(spec.frequency_hz, volts=s.voltages[prim.name]),
                             pins=f"{prim.name} {prim.start}-{prim.finish} at rated voltage, {w.name} "
                                  f"{w.start}-{w.finish} read", condition="; ".join(x for x in ("no load", _also(spec))
                                                                                    if x)))
    return ratio, ocv


def no_load_limits(state: DesignState, prim: WindingResult) -> list[Limit]:
    """No-load current and loss of a mains part at rated voltage, every other winding open: the magnetizing
    current in quadrature with the core-loss current, I0 = sqrt(Im^2 + (P_core / V)^2) (the equivalent circuit
    of the transformer, any textbook), and the core loss; an upper limit each."""
    spec, s = state.spec, state.summary
    v = s.voltages[prim.name]
    im = s.magnetizing_current_a
    if not im or not v:
        return []
    core_w = state.losses.core_w
    i0 = math.hypot(im, core_w / v)
    setting = ts.supply_setting(spec.frequency_hz, volts=v)
    pins = f"{prim.name} {prim.start}-{prim.finish} at rated voltage, every other winding open"
    note = "; ".join(x for x in ("a shorted turn or a badly stacked core reads high", _also(spec)) if x)
    return [Limit(name="no-load current", item=prim.name, nominal=i0, low=None, high=i0 * ts.NO_LOAD_HIGH,
                  unit="A", pins=pins, setting=setting, condition=note),
            Limit(name="no-load loss", item=prim.name, nominal=core_w, low=None, high=core_w * ts.NO_LOAD_HIGH,
                  unit="W", pins=pins, setting=setting, condition=note)]


def inductance_limits(state: DesignState, prim: WindingResult) -> list[Limit]:
    """Open-circuit inductance read small-signal where the core's design figure is its small-signal one (a
    ferrite: not a steel, whose figure is at the working flux), and leakage with every other winding shorted."""
    spec, s, mat = state.spec, state.summary, state.parts.material
    pins = f"pins {prim.start}-{prim.finish}"
    out: list[Limit] = []
    lm = s.magnetizing_inductance_h
    if lm and mat.mu_amplitude is None:
        out.append(Limit(name="open-circuit inductance", item=prim.name, nominal=lm, low=lm * ts.MAGNETIZING_L_LOW,
                         high=None, unit="H", pins=pins, condition="every other winding open",
                         setting=ts.lcr_setting(prim.turns, state.parts.ae_m2, spec.frequency_hz)))
    leakage = s.leakage_inductance_h
    if leakage:
        lo, hi = ts.LEAKAGE_BAND
        out.append(Limit(name="leakage inductance", item=prim.name, nominal=leakage, low=leakage * lo,
                         high=leakage * hi, unit="H", pins=pins, condition="every other winding shorted",
                         setting=ts.leakage_setting(spec.frequency_hz)))
    return out


def transformer_tests(state: DesignState) -> KindTests:
    """Turns ratios, polarity and inductances; a mains part also its open-circuit voltages and no-load test."""
    prim = next((w for w in state.windings if w.role == "primary"), None)
    if prim is None:
        return KindTests()
    mains = ts.on_ac_supply(state.spec.frequency_hz, state.spec.waveform)
    ratio, ocv = ratio_limits(state, prim, mains)
    reset_ratio, reset_lines = reset_tests(state, prim)
    return KindTests(ratio=tuple(ratio + reset_ratio), open_circuit=tuple(ocv),
                     inductance=tuple(inductance_limits(state, prim)),
                     polarity=tuple(polarity_lines(prim, state.windings) + reset_lines),
                     no_load=tuple(no_load_limits(state, prim)) if mains else ())
