"""Single-switch forward converter with a reset (demagnetising) winding: duty limit, switch stress, reset current.

While the switch is on (duty D, period T = 1/f) the input voltage V_in lies across the N_p primary turns and
the core's flux rises by the primary volt-seconds, Delta B = V_in D / (f N_p A_e) (Faraday), from wherever the
last reset left it (the remanence B_r of an ungapped core). When the switch opens, the magnetising current
passes to the reset winding of N_r turns, which a diode clamps to V_in: the core sees -V_in N_p / N_r referred
to the primary until the volt-seconds balance, t_reset = D T N_r / N_p. The reset must end before the next
on-time, D + D N_r / N_p <= 1, so

    D_max = N_p / (N_p + N_r)                           (1:1 reset winding: D_max = 0.5)

and the open switch holds V_in plus the reset voltage referred to the primary,

    V_switch = V_in (1 + N_p / N_r)                     (1:1: twice the input).

The reset winding carries only the magnetising current, referred: it starts at I_m,pk N_p / N_r (I_m,pk =
V_in D / (f L_m)) and falls linearly to zero over t_reset (a triangle of duty D N_r / N_p).

SI units: volts, amperes, henries, hertz, tesla, m^2. Floats or numpy arrays.

References
----------
R. W. Erickson, D. Maksimovic, "Fundamentals of Power Electronics", 2nd ed., Kluwer 2001, section 6.3.2
(the forward converter: the reset winding, the duty limit D <= 1 / (1 + n2/n1), the switch voltage
V_g (1 + n1/n2)) and chapter 15 (transformer design: Delta B from the applied volt-seconds), from memory.
"""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike
from ._types import as_array as _f
from ._types import out as _out


def reset_duty_limit(primary_turns: ArrayLike, reset_turns: ArrayLike) -> Arr:
    """The largest duty whose volt-seconds the reset winding returns within the period, D_max = N_p / (N_p + N_r).

    Parameters
    ----------
    primary_turns : N_p
    reset_turns : N_r, the reset (demagnetising) winding's turns

    References
    ----------
    Erickson and Maksimovic, Fundamentals of Power Electronics, 2nd ed., section 6.3.2 (from memory).
    """
    n_p, n_r = _f(primary_turns), _f(reset_turns)
    return _out(n_p / (n_p + n_r))


def switch_voltage_v(v_in_v: ArrayLike, primary_turns: ArrayLike, reset_turns: ArrayLike) -> Arr:
    """The open switch's voltage during the reset, V_in (1 + N_p / N_r) [V] (the leakage spike not included).

    References
    ----------
    Erickson and Maksimovic, Fundamentals of Power Electronics, 2nd ed., section 6.3.2 (from memory).
    """
    return _out(_f(v_in_v) * (1.0 + _f(primary_turns) / _f(reset_turns)))


def reset_time_fraction(duty: ArrayLike, primary_turns: ArrayLike, reset_turns: ArrayLike) -> Arr:
    """The share of the period the reset winding conducts, D N_r / N_p (volt-second balance of the core).

    References
    ----------
    Erickson and Maksimovic, Fundamentals of Power Electronics, 2nd ed., section 6.3.2 (from memory).
    """
    return _out(_f(duty) * _f(reset_turns) / _f(primary_turns))


def reset_winding_current_a(v_in_v: ArrayLike, duty: ArrayLike, freq_hz: ArrayLike, magnetizing_h: ArrayLike,
                            primary_turns: ArrayLike, reset_turns: ArrayLike) -> tuple[Arr, Arr, Arr]:
    """(peak, rms, average) current of the reset winding [A]: the magnetising current referred to it.

    The magnetising current reaches I_m,pk = V_in D / (f L_m) at the end of the on-time (``magnetizing_h``:
    L_m seen from the primary); the reset winding takes it over as I_m,pk N_p / N_r and it falls linearly to
    zero over the reset fraction d_r = D N_r / N_p: rms = I_pk sqrt(d_r / 3), average I_pk d_r / 2 (the
    magnetising energy returned to the input).

    References
    ----------
    Erickson and Maksimovic, Fundamentals of Power Electronics, 2nd ed., section 6.3.2 (from memory); the rms
    of a triangular pulse, I_pk sqrt(d / 3).
    """
    n_p, n_r = _f(primary_turns), _f(reset_turns)
    i_m_pk = _f(v_in_v) * _f(duty) / (_f(freq_hz) * _f(magnetizing_h))
    peak = i_m_pk * n_p / n_r
    d_r = _f(duty) * n_r / n_p
    return _out(peak), _out(peak * np.sqrt(d_r / 3.0)), _out(peak * d_r / 2.0)


def output_winding_rms_a(dc_current_a: ArrayLike, duty: ArrayLike) -> Arr:
    """The rms current of a forward converter's output winding, I_dc sqrt(D) [A].

    The forward diode passes the output choke's current (taken flat: its ripple is small) while the switch is
    on, a pulse of I_dc for the duty D; the freewheeling diode carries it for the rest of the period.

    References
    ----------
    Erickson and Maksimovic, Fundamentals of Power Electronics, 2nd ed., section 6.3.2 (from memory); the rms
    of a rectangular pulse, I sqrt(D).
    """
    return _out(_f(dc_current_a) * np.sqrt(_f(duty)))
