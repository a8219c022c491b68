"""Winding currents drawn by rectifier and converter loads: rms against DC, by the circuit that draws them.

A secondary that feeds a rectifier does not carry a sinusoid of its DC load current. The copper loss, the
wire and the VA rating follow the winding's rms current, which these functions give as a multiple of the DC
load current (the form factor I_rms / I_dc):

- a bridge rectifier into a reservoir capacitor (``bridge_capacitor_form``): the circuit Schade analysed
  (sine source of series resistance R_s, ideal diodes, capacitor C across the load R_L), solved for its
  periodic steady state; the form factor rises from pi / (2 sqrt 2) = 1.11 (no capacitor) to 2 and more as
  omega C R_L grows and R_s / R_L falls;
- a centre-tapped full-wave rectifier with a flat (choke-input or converter) current
  (``centre_tapped_half_rms``): each half carries the DC current for half of each period, rms I_dc sqrt(0.5);
  with a reservoir capacitor each half carries the bridge's pulses of one polarity, rms I_rms,bridge / sqrt 2;
- a bridge converter's secondary into a full-bridge rectifier and choke: a square wave of +-I_dc, rms I_dc.

References
----------
O. H. Schade, "Analysis of rectifier operation", Proc. IRE 31(7), 341-361, 1943 (the capacitor-input
circuit and its rms/average current curves against n omega C R_L and R_s / (n R_L)).
N. Mohan, T. M. Undeland, W. P. Robbins, "Power Electronics: Converters, Applications and Design", 3rd ed.,
Wiley 2003, ch. 5 (rectifiers with a DC-side capacitor) and ch. 10 (the centre-tapped secondary of
push-pull, half- and full-bridge converters: each half conducts alternately), from memory.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Sequence

import numpy as np

STEPS_PER_HALF_CYCLE = 720    # backward-Euler steps over one half period (0.25 degree)
_BISECTIONS = 60


def _half_cycle(v0: float, omega_c_rl: float, rs_over_rl: float, record: bool) -> tuple[float, float, float]:
    """One half period of the normalised circuit from capacitor voltage ``v0`` (units of V_pk).

    Source |sin theta|, current i = (|sin theta| - v) / r while the bridge conducts (else 0); the capacitor:
    k dv/dtheta = i - v with k = omega C R_L, i in units of V_pk / R_L. Backward Euler (stable for stiff
    r -> 0). Returns (v at the end, mean of v, mean of i^2) over the half period."""
    n = STEPS_PER_HALF_CYCLE
    h = math.pi / n
    k, r = omega_c_rl, rs_over_rl
    v, sum_v, sum_i2 = v0, 0.0, 0.0
    for j in range(1, n + 1):
        s = math.sin(j * h)
        # conducting: v' = (v + h/k * s/r) / (1 + h/k (1 + 1/r)); kept only if the diode current is forward
        vc = (v + h / k * s / r) / (1.0 + h / k * (1.0 + 1.0 / r))
        if s - vc > 0.0:
            v = vc
            i = (s - v) / r
        else:
            v = v / (1.0 + h / k)
            i = 0.0
        if record:
            sum_v += v
            sum_i2 += i * i
    return v, sum_v / n, sum_i2 / n


@functools.lru_cache(maxsize=64)       # the form and the harmonics of one pass ask for the same circuit
def _steady_start(omega_c_rl: float, rs_over_rl: float) -> float:
    """The capacitor voltage at the start of a half period that returns after it (bisection: the half-period
    map is monotonic with slope below one)."""
    if not (omega_c_rl > 0.0 and rs_over_rl > 0.0):
        raise ValueError("omega C R_L and R_s / R_L must be positive")
    lo, hi = 0.0, 1.0
    for _ in range(_BISECTIONS):
        mid = 0.5 * (lo + hi)
        end = _half_cycle(mid, omega_c_rl, rs_over_rl, False)[0]
        if end > mid:
            lo = mid
        else:
            hi = mid
        if hi - lo < 1e-12:
            break
    return 0.5 * (lo + hi)


def bridge_capacitor_form(omega_c_rl: float, rs_over_rl: float) -> tuple[float, float]:
    """Form factor I_rms / I_dc of the AC-side current of a full-wave bridge into a capacitor, and V_dc / V_pk.

    Parameters
    ----------
    omega_c_rl : float
        omega C R_L, the reservoir capacitor against the load at the mains angular frequency [-].
    rs_over_rl : float
        The series (source) resistance over the load resistance [-]: winding resistances referred to the
        secondary, over V_dc / I_dc.

    Returns
    -------
    (form_factor, vdc_over_vpk)

    The periodic steady state of Schade's circuit: the capacitor voltage at the start of a half period
    that returns after it, found by bisection (the half-period map is monotonic with slope below one);
    I_dc = mean(v) / R_L and I_rms from the mean of i^2, the bridge's AC-side current being +-i.

    References
    ----------
    O. H. Schade, Proc. IRE 31(7), 341-361, 1943.
    """
    _, mean_v, mean_i2 = _half_cycle(_steady_start(omega_c_rl, rs_over_rl), omega_c_rl, rs_over_rl, True)
    return math.sqrt(mean_i2) / mean_v, mean_v


def bridge_capacitor_current(omega_c_rl: float, rs_over_rl: float) -> list[float]:
    """The bridge's AC-side current over one half period in its steady state, STEPS_PER_HALF_CYCLE samples at
    theta = j pi / n (j = 1..n), in units of V_pk / R_L (the next half period is the same with its sign
    reversed). Schade's circuit, as ``bridge_capacitor_form``."""
    k, r = omega_c_rl, rs_over_rl
    n = STEPS_PER_HALF_CYCLE
    h = math.pi / n
    v = _steady_start(k, r)
    out = []
    for j in range(1, n + 1):
        s = math.sin(j * h)
        vc = (v + h / k * s / r) / (1.0 + h / k * (1.0 + 1.0 / r))
        if s - vc > 0.0:
            v, i = vc, (s - vc) / r
        else:
            v, i = v / (1.0 + h / k), 0.0
        out.append(i)
    return out


def bridge_capacitor_harmonics(omega_c_rl: float, rs_over_rl: float, orders: Sequence[int]) -> list[float]:
    """Each odd harmonic's share of the AC-side current's mean square (the orders given; they sum to 1 over
    them; the loss of a winding of AC factor Fr_n at harmonic n is then I_rms^2 R_dc sum(w_n Fr_n)).

    The current is half-wave symmetric (i(theta + pi) = -i(theta)), so only odd harmonics appear, with
    a_n, b_n = (2 / pi) integral_0^pi i(theta) (cos, sin)(n theta) d theta and a share (a_n^2 + b_n^2) / 2
    of the mean square (Parseval). Even orders get 0.

    References
    ----------
    O. H. Schade, Proc. IRE 31(7), 341-361, 1943 (the waveform); Fourier series of a half-wave symmetric
    function (any circuits text).
    """
    i = np.asarray(bridge_capacitor_current(omega_c_rl, rs_over_rl))
    h = math.pi / len(i)
    n = np.asarray(orders, dtype=float)[:, None]
    theta = (np.arange(len(i)) + 1.0) * h
    a = 2.0 / math.pi * h * (np.cos(n * theta) @ i)
    b = 2.0 / math.pi * h * (np.sin(n * theta) @ i)
    power = np.where(n[:, 0] % 2 == 1, (a * a + b * b) / 2.0, 0.0)
    total = float(power.sum())
    return [float(p) / total for p in power] if total > 0 else [1.0 if k == 1 else 0.0 for k in orders]


def centre_tapped_half_rms_a(dc_current_a: float, bridge_form: float | None = None) -> float:
    """The rms current of one half of a centre-tapped full-wave secondary [A].

    Each half conducts in alternate half periods: with a flat current (choke input, or a converter's output
    choke) I_dc for a duty of 0.5, rms I_dc sqrt(0.5); with a reservoir capacitor the pulses of one polarity
    of a bridge's AC-side current of form factor ``bridge_form``, rms bridge_form I_dc / sqrt(2).

    References
    ----------
    N. Mohan, T. M. Undeland, W. P. Robbins, "Power Electronics", 3rd ed., Wiley 2003, ch. 10 (from memory).
    """
    form = 1.0 if bridge_form is None else bridge_form
    return dc_current_a * form * math.sqrt(0.5)
