"""What each secondary's load makes it carry: rms current, form factor, real power, VA, conduction pattern.

The shop's rules over ``physics.rectifier_loads``:

- no ``load`` (or ``resistive``): the current given is the winding's rms current (form factor 1);
- ``forward``: a forward converter's output winding, the choke's DC current for the on-time: rms I_dc sqrt(D),
  power V_pulse D I_dc;
- ``gate_drive``: a switch's gate (``physics.gate_drive``): charge pulses of rms sqrt(Q_g V_g f / R_g), not real
  power: the primary carries them referred through the ratio (not divided by an efficiency);
- ``converter``: a bridge converter's secondary into a full-bridge rectifier and output choke, a square wave
  of +-I_dc: rms I_dc, the square wave's harmonics for the AC factor;
- ``bridge_capacitor``: Schade's capacitor-input circuit; R_L = V_dc / I_dc, R_s the winding resistances
  referred to the secondary (the previous pass's; FIRST_RS_RATIO before the first build);
- ``centre_tapped``: each half carries the DC load current in alternate half periods (duty 0.5, or the
  bridge's pulses of one polarity with ``capacitance``). The halves conduct alternately, so the AC factor
  of each half is found in the interval it conducts (``interval_currents``) and its DC part
  (I_dc / 2 for a flat current) sees the DC resistance only.

The primary carries the loads referred through their ratios: a resistive or bridge load's rms current, and a
centre-tapped pair once, as one square wave of its DC current.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

import numpy as np

from ..physics import forward as fw
from ..physics import gate_drive as gd
from ..physics import rectifier_loads as rl
from .kernel_copper import Harmonics
from .limits import RECTIFIER_HARMONICS
from .spec import Winding
from .windings_result import LoadResult

FIRST_RS_RATIO = 0.05        # R_s / R_L before the windings are built: a few percent regulation (common practice)
SCHADE = "Schade, Proc. IRE 31(7) 1943: capacitor-input rectifier, solved for its steady state"
CENTRE_TAP = "centre-tapped full wave: each half conducts alternately at duty 0.5 (Mohan, Undeland, Robbins, ch. 10)"
RESISTIVE = "resistive: the current as given"
CONVERTER = "bridge converter output into a choke: a square wave of the DC current"
GATE = ("gate drive: the gate's charge and discharge pulses through the loop resistance, rms sqrt(Q_g V_g f / R_g), "
        "average Q_g f, power Q_g V_g f (Balogh, TI SLUA618); the primary carries them referred, not as power")
FORWARD = ("forward converter output: the choke's DC current for the on-time, rms I_dc sqrt(D) (Erickson and "
           "Maksimovic, Fundamentals of Power Electronics, 6.3.2)")


def load_type(w: Winding) -> str:
    return w.load.type if w.load is not None else "resistive"


def has_loads(windings: Sequence[Winding]) -> bool:
    """Whether any winding declares a load (the part then reports its loads)."""
    return any(w.load is not None for w in windings)


def solve(loads: Sequence[Winding], freq_hz: float, rs_ratio: Mapping[str, float],
          duty: float = 0.5) -> dict[str, LoadResult]:
    """Each load winding's currents at this pass (``rs_ratio``: R_s / R_L by winding, from the last build)."""
    out: dict[str, LoadResult] = {}
    for w in loads:
        v = w.voltage_v or 0.0
        i = w.current_a if w.current_a is not None else (w.va or 0.0) / (v or 1.0)
        kind = load_type(w)
        cap = w.load.capacitance_f if w.load is not None else None
        form, source, vratio, power = 1.0, RESISTIVE, None, v * i
        harmonics: tuple[tuple[int, float], ...] = ()
        if kind == "converter":
            source = CONVERTER
        elif kind == "gate_drive" and w.load is not None:
            q, r_g = w.load.gate_charge_c or 0.0, w.load.gate_resistance_ohm or 1.0
            v_g = w.load.gate_voltage_v or v
            i = float(gd.average_current_a(q, freq_hz))
            form = float(gd.pulse_rms_a(q, v_g, freq_hz, r_g)) / i if i > 0 else 1.0
            power, source = float(gd.drive_power_w(q, v_g, freq_hz)), GATE
        elif kind == "forward":       # the pulse voltage for the on-time: V D I_dc reaches the choke
            form, source, power = float(fw.output_winding_rms_a(1.0, duty)), FORWARD, v * duty * i
        elif kind == "bridge_capacitor" or (kind == "centre_tapped" and cap is not None):
            r = max(rs_ratio.get(w.name, FIRST_RS_RATIO), 1e-4)
            # R_L = V_dc / I_dc with V_dc = m sqrt(2) V; m from the last pass's ratio (0.9 to start)
            m = 0.9
            for _ in range(3):
                r_load = m * math.sqrt(2.0) * v / i if i > 0 else 1e9
                form, m = rl.bridge_capacitor_form(2.0 * math.pi * freq_hz * (cap or 0.0) * r_load, r)
            vratio, power, source = m, m * math.sqrt(2.0) * v * i, SCHADE
            if kind == "bridge_capacitor":     # the pulse's harmonics, for the winding's AC factor
                weights = rl.bridge_capacitor_harmonics(2.0 * math.pi * freq_hz * (cap or 0.0) * r_load, r,
                                                        RECTIFIER_HARMONICS)
                harmonics = tuple((n, w_n) for n, w_n in zip(RECTIFIER_HARMONICS, weights) if w_n > 0.0)
            if kind == "centre_tapped":
                source = f"{CENTRE_TAP}; pulses by {SCHADE}"
        if kind == "centre_tapped":
            rms = rl.centre_tapped_half_rms_a(i, form if cap is not None else None)
            power = power / 2.0 if cap is not None else v * i / 2.0      # each half delivers half the power
            if cap is None:
                source = CENTRE_TAP
        else:
            rms = i * form
        out[w.name] = LoadResult(w.name, kind, i, rms, rms / i if i > 0 else 1.0, source, v * rms, power,
                                 w.load.other_half if w.load is not None else None, vratio, harmonics)
    return out


def reflected_w(loads: Mapping[str, LoadResult], voltages: Mapping[str, float]) -> float:
    """The volt-amperes the primary carries for the loads (before efficiency): V x I_rms of a resistive or
    bridge load, V x I_dc once for a centre-tapped pair (its halves reflect as one square wave); a gate drive's
    pulses are not power (``pulse_va``)."""
    total = 0.0
    for ld in loads.values():
        if ld.load == "gate_drive":
            continue
        v = voltages.get(ld.winding, 0.0)
        total += v * ld.dc_current_a / 2.0 * (ld.form_factor * math.sqrt(2.0)) if ld.load == "centre_tapped" \
            else v * ld.rms_current_a
    return total


def pulse_va(loads: Mapping[str, LoadResult], voltages: Mapping[str, float]) -> float:
    """V x I_rms of the gate-drive loads: their charge pulses, referred to the primary by the voltage ratio
    (ampere-turn balance, no efficiency), and added to its current in quadrature (``kernel.primary_current_a``)."""
    return sum(voltages.get(ld.winding, 0.0) * ld.rms_current_a for ld in loads.values() if ld.load == "gate_drive")


def dc_ac_parts(ld: LoadResult | None, rms_a: float) -> tuple[float, float]:
    """(DC, AC rms) parts of a winding's current for the copper loss: a centre-tapped half's current is
    DC I_dc/2 plus an AC rest; every other winding's is all AC."""
    if ld is None or ld.load != "centre_tapped":
        return 0.0, rms_a
    dc = ld.dc_current_a / 2.0
    return dc, math.sqrt(max(rms_a * rms_a - dc * dc, 0.0))


def winding_harmonics(loads: Mapping[str, LoadResult], referred_a: Mapping[str, float], primaries: Sequence[str],
                      default: Harmonics) -> dict[str, Harmonics] | None:
    """Each winding's harmonic shares for its AC factor where a load has its own (a capacitor-input bridge):
    that load's winding its own; a primary the mix of the loads it carries, each load's shares weighted by
    its referred current squared (``referred_a``), a load without its own at the drive's ``default``; None
    when no load has harmonics of its own (every winding at the drive's). The MMF profile stays the rms
    currents': exact where one load sets the primary's waveform, the mix otherwise (common practice)."""
    if not any(ld.harmonics for ld in loads.values()):
        return None
    out: dict[str, Harmonics] = {}
    mix: dict[float, float] = {}
    total = 0.0
    for name, ld in loads.items():
        own = dict(ld.harmonics) if ld.harmonics else dict(zip(default.orders.tolist(), default.weights.tolist()))
        if ld.harmonics:
            out[name] = _harmonics(own)
        i2 = referred_a.get(name, 0.0) ** 2
        total += i2
        for n, w in own.items():
            mix[n] = mix.get(n, 0.0) + i2 * w
    if total > 0.0:
        for p in primaries:
            out[p] = _harmonics(mix)
    return out


def _harmonics(shares: Mapping[float, float]) -> Harmonics:
    orders = sorted(shares)
    w = np.array([shares[n] for n in orders], dtype=float)
    return Harmonics(np.array(orders, dtype=float), w / w.sum())


def interval_currents(loads: Mapping[str, LoadResult], conducting: str) -> dict[str, float]:
    """The load currents in the interval where ``conducting`` (a centre-tapped half) carries the DC current:
    its other half carries none; every other load its rms current."""
    out: dict[str, float] = {}
    for name, ld in loads.items():
        if ld.load == "centre_tapped":
            out[name] = ld.dc_current_a if name == conducting else 0.0
        else:
            out[name] = ld.rms_current_a
    return out
