"""A gate-drive transformer's load: the charge a switch's gate takes each edge, as current in the winding.

A gate is charged at each turn-on edge and discharged at each turn-off edge through the loop resistance R_g
(the gate resistor, the driver's and the switch's internal gate resistance). The winding carries those
charge pulses, not a load current in phase with its voltage: the average charging current is Q_g f, the
power the gate loop dissipates P = Q_g V_g f (all of it in the resistances, none delivered as work), and the
rms current follows from the pulse's shape.

Taking the gate as a linear capacitance C = Q_g / V_g (a common-practice simplification; the Miller plateau
flattens the real pulse), each edge is i(t) = (V_g / R_g) e^(-t / tau), tau = R_g C, with
integral(i^2 dt) = Q_g V_g / (2 R_g); two edges a period give

    I_rms = sqrt(Q_g V_g f / R_g)                 and I_rms^2 R_g = Q_g V_g f, the gate-drive power.

SI units: coulombs, volts, ohms, hertz, amperes, watts. Floats or numpy arrays.

References
----------
L. Balogh, "Fundamentals of MOSFET and IGBT Gate Driver Circuits", Texas Instruments application report
SLUA618 (2002, rev. 2017): the gate-drive power P = V_DRV Q_G f_DRV and the transformer-coupled gate drive,
from memory; the exponential charging of a capacitance through a resistance (any circuits text).
"""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike
from ._types import as_array as _f
from ._types import out as _out


def average_current_a(gate_charge_c: ArrayLike, freq_hz: ArrayLike) -> Arr:
    """The average charging current Q_g f [A] (Balogh, SLUA618, from memory)."""
    return _out(_f(gate_charge_c) * _f(freq_hz))


def drive_power_w(gate_charge_c: ArrayLike, gate_voltage_v: ArrayLike, freq_hz: ArrayLike) -> Arr:
    """The power the gate loop dissipates, P = Q_g V_g f [W] (Balogh, SLUA618, from memory)."""
    return _out(_f(gate_charge_c) * _f(gate_voltage_v) * _f(freq_hz))


def pulse_rms_a(gate_charge_c: ArrayLike, gate_voltage_v: ArrayLike, freq_hz: ArrayLike,
                loop_resistance_ohm: ArrayLike) -> Arr:
    """The winding's rms current from the charge and discharge pulses, sqrt(Q_g V_g f / R_g) [A].

    Each edge an exponential pulse through R_g into C = Q_g / V_g (see the module docstring): the
    dissipation I_rms^2 R_g equals Balogh's gate-drive power Q_g V_g f.
    """
    return _out(np.sqrt(_f(gate_charge_c) * _f(gate_voltage_v) * _f(freq_hz) / _f(loop_resistance_ohm)))


def pulse_peak_a(gate_voltage_v: ArrayLike, loop_resistance_ohm: ArrayLike) -> Arr:
    """The pulse's peak current V_g / R_g [A] (the edge's first instant, the gate still uncharged)."""
    return _out(_f(gate_voltage_v) / _f(loop_resistance_ohm))

