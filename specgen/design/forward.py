"""A forward converter's reset winding: the spec's key, its turns, and what the design reports of it.

A transformer driven by a unipolar pulse (``operating.waveform: unipolar``, ``duty`` the largest duty it
runs at) may carry one winding of ``role: reset``, usually wound with the primary (``wound_with: P``) at
1:1::

    - {name: R, role: reset, turns_ratio: 1, wound_with: P, start: "3", finish: "4"}

``turns_ratio`` is N_p : N_reset (default 1, the way the test sheet reads it). The design gives it
N_reset = N_p / turns_ratio turns (whole), and from ``physics.forward``: the duty limit D_max = N_p / (N_p +
N_r) the spec's duty must stay within, the switch voltage V_in,max (1 + N_p / N_r), and the reset winding's
current (the magnetising current referred, a triangle over the reset time), which sizes its wire. The flux
swing is the primary's volt-seconds from the remanence (the transformer kind's saturation and remanence
checks). In the converter the reset winding is connected in anti-phase: its dot to the supply return, its
other end through the reset diode to the supply.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import replace
from typing import TYPE_CHECKING

from ..loading import Reader
from .result import Check, Limit
from .windings_result import ResetResult

if TYPE_CHECKING:
    from .state import WindingState

DUTY_WARN_MARGIN = 0.05   # a duty within 5 % of D_max leaves no room for the leakage and a load step (common practice)


def parse_reset_ratio(r: Reader, role: str) -> float | None:
    """A reset winding's ``turns_ratio`` (N_p : N_reset, default 1); refused on any other winding."""
    if role != "reset":
        if r.has("turns_ratio"):
            raise r.error(f"'turns_ratio' is for a forward converter's reset winding (role: reset), not a {role} "
                          f"winding: a {role}'s turns follow from its voltage", "turns_ratio")
        r.raw("turns_ratio", None)
        return None
    return r.number("turns_ratio", 1.0, minimum=0.1, maximum=10.0)


def check_reset(r: Reader, op: Reader, kind: str, waveform: str, duty: float, windings: tuple[object, ...],
                wreaders: list[Reader]) -> None:
    """A reset winding: on a transformer with one primary driven by a unipolar pulse; one at most; no voltage
    or current of its own; wound with the primary only at 1:1; the spec's duty within its D_max. A ``forward`` load
    only on a part driven by a unipolar pulse."""
    from .spec import Winding

    ws = [w for w in windings if isinstance(w, Winding)]
    for w, wr in zip(ws, wreaders):
        if w.load is not None and w.load.type == "forward" and waveform != "unipolar":
            raise wr.error(f"load forward is a forward converter's output, driven by a unipolar pulse; this part's "
                           f"waveform is {waveform}", "load")
    resets = [(w, wr) for w, wr in zip(ws, wreaders) if w.role == "reset"]
    if not resets:
        return
    w, wr = resets[0]
    if kind != "transformer":
        raise wr.error(f"role 'reset' is a forward converter transformer's, not kind {kind}'s", "role")
    if len(resets) > 1:
        raise resets[1][1].error("a forward transformer has one reset winding", "role")
    if waveform != "unipolar":
        raise wr.error(f"a reset winding demagnetises a core driven by a unipolar pulse; this part's waveform is "
                       f"{waveform} (give operating.waveform: unipolar and its duty)", "role")
    prims = [p for p in ws if p.role == "primary"]
    if len(prims) != 1:
        raise wr.error("a reset winding serves a transformer with one primary", "role")
    for key in ("voltage", "voltage_min", "voltage_max", "current", "va", "same_turns_as", "taps"):
        if wr.has(key):
            raise wr.error(f"'{key}' is not used on a reset winding: its voltage is the input's times its ratio "
                           f"and its current the magnetising current", key)
    ratio = w.turns_ratio or 1.0
    if w.turns is not None and (wr.has("turns_ratio") or w.wound_with is not None or prims[0].wound_with == w.name):
        why = "its turns follow from turns_ratio" if wr.has("turns_ratio") else "wound with the primary, it has its turns"
        raise wr.error(f"a reset winding's turns are not given here: {why}", "turns")
    if w.wound_with is not None or prims[0].wound_with == w.name:
        mate = w.wound_with or prims[0].name
        if mate != prims[0].name:
            raise wr.error(f"a reset winding is wound with the primary ({prims[0].name}), not {mate}", "wound_with")
        if abs(ratio - 1.0) > 1e-9:
            raise wr.error(f"wound with {mate} turn by turn, the reset winding has its turns: turns_ratio 1, "
                           f"not {ratio:g}", "turns_ratio")
    from ..physics import forward as fw  # here, so a part without a reset winding parses without numpy

    d_max = float(fw.reset_duty_limit(ratio, 1.0))
    if w.turns is None and duty > d_max + 1e-12:      # fixed turns: the design's reset check, at N_p
        raise op.error(f"duty {duty:g} is beyond what a {ratio:g}:1 reset winding resets (D_max = N_p / (N_p + "
                       f"N_r) = {d_max:.3g}): lower the duty or raise the reset winding's turns_ratio", "duty")


def reset_turns(w: object, primary_turns: int) -> int:
    """N_reset = N_p / turns_ratio, whole (at least 1); a fixed ``turns`` as given."""
    from .spec import Winding

    assert isinstance(w, Winding)
    if w.turns:
        return w.turns
    return max(1, round(primary_turns / (w.turns_ratio or 1.0)))


def reset_current_a(v_in_v: float, duty: float, freq_hz: float, lm_h: float, primary_turns: int,
                    turns: int) -> tuple[float, float]:
    """(peak, rms) of the reset winding's current (``physics.forward.reset_winding_current_a``)."""
    from ..physics import forward as fw

    pk, rms, _ = fw.reset_winding_current_a(v_in_v, duty, freq_hz, lm_h, primary_turns, turns)
    return float(pk), float(rms)


def reset_result(name: str, wire: str, v_in_max_v: float, duty: float, freq_hz: float, lm_h: float,
                 primary_turns: int, turns: int, delta_b_t: float, b_r_t: float, b_sat_hot_t: float) -> ResetResult:
    """The reset winding's figures at the top of the input range (the largest volt-seconds and current)."""
    from ..physics import forward as fw

    pk, rms, avg = fw.reset_winding_current_a(v_in_max_v, duty, freq_hz, lm_h, primary_turns, turns)
    return ResetResult(
        winding=name, turns=turns, turns_ratio=primary_turns / turns,
        duty=duty, duty_max=float(fw.reset_duty_limit(primary_turns, turns)),
        reset_fraction=float(fw.reset_time_fraction(duty, primary_turns, turns)),
        delta_b_t=delta_b_t, b_r_t=b_r_t, b_end_t=b_r_t + delta_b_t, b_sat_hot_t=b_sat_hot_t,
        current_peak_a=float(pk), current_rms_a=float(rms), current_avg_a=float(avg),
        switch_voltage_v=float(fw.switch_voltage_v(v_in_max_v, primary_turns, turns)), input_max_v=v_in_max_v,
        wire=wire)


def reset_checks(r: ResetResult) -> list[Check]:
    """The duty against D_max (fail beyond it, warn within DUTY_WARN_MARGIN) and the switch voltage stated."""
    said = (f"reset winding {r.winding}: {r.turns} turns ({r.turns_ratio:.3g}:1), D_max {r.duty_max:.3f} against "
            f"duty {r.duty:g}; the switch holds {r.switch_voltage_v:.4g} V at {r.input_max_v:.4g} V in (V_in (1 + "
            f"N_p / N_r), plus the leakage spike); B_r {r.b_r_t:.3f} T + ΔB {r.delta_b_t:.3f} T = {r.b_end_t:.3f} T "
            f"against B_sat {r.b_sat_hot_t:.3f} T hot")
    if r.duty > r.duty_max * (1 + 1e-9):
        return [Check("fail", "reset", f"{said}: the core is not reset before the next pulse; lower the duty or "
                                       f"give the reset winding fewer turns")]
    if r.duty > r.duty_max * (1.0 - DUTY_WARN_MARGIN):
        return [Check("warn", "reset", f"{said}: within {DUTY_WARN_MARGIN:.0%} of D_max, no room for a load step")]
    return [Check("pass", "reset", said)]


def reset_tests(prim: object, reset: object, ratio_tol: float) -> tuple[Limit, str]:
    """The ratio test primary : reset and the polarity line (the reset winding connects in anti-phase)."""
    from .result import WindingResult

    assert isinstance(prim, WindingResult) and isinstance(reset, WindingResult)
    r = prim.turns / reset.turns
    limit = Limit(name="turns ratio", item=f"{prim.name}:{reset.name}", nominal=r, low=r * (1 - ratio_tol),
                  high=r * (1 + ratio_tol), unit=":1", condition=f"{prim.turns} : {reset.turns} turns, reset winding")
    other = reset.finish if reset.dot_pin == reset.start else reset.start
    pol = (f"Apply a positive step to {prim.name} pin {prim.dot_pin} (dot) with respect to pin "
           f"{prim.finish if prim.dot_pin == prim.start else prim.start}: reset winding {reset.name} pin "
           f"{reset.dot_pin} (dot) reads positive against pin {other}. In the converter it is connected in anti-phase: its dot "
           f"(pin {reset.dot_pin}) to the supply return, pin {other} through the reset diode to the supply.")
    return limit, pol


def interval_frs(states: Mapping[str, WindingState], reset: str,
                 frs: Callable[[Mapping[str, WindingState]], dict[tuple[str, int], float]]
                 ) -> dict[tuple[str, int], float]:
    """Fr of every section with the reset winding conducting alone: while the switch is on it carries nothing
    (every other winding's Fr from that interval), while it resets the core nothing else does (its own Fr)."""
    on = {n: (replace(st, current_a=0.0) if n == reset else st) for n, st in states.items()}
    off = {n: (st if n == reset else replace(st, current_a=0.0)) for n, st in states.items()}
    out = frs(on)
    mine = frs(off)
    out.update({k: v for k, v in mine.items() if k[0] == reset})
    return out
