"""Flyback (coupled-inductor) converter relations: operating point, currents by interval, harmonics, clamp.

The primary stores energy while the switch is on (duty D) and the secondaries deliver it while it is off. In
discontinuous mode (DCM) the current falls to zero before the next cycle; in continuous mode (CCM) it does
not, and the duty is set by volt-second balance. SI units: volts, amperes, henries, hertz, seconds, watts.

References
----------
Standard flyback design procedures of the power-supply design handbooks (from memory): the energy per cycle
E = 1/2 L_p I_pk^2; in DCM P_in = 1/2 L_p I_pk^2 f; the reflected voltage V_R = (V_out + V_f) N_p / N_s;
CCM volt-second balance D = V_R / (V_R + V_in); B_pk = L_p I_pk / (N_p A_e).
"""

from __future__ import annotations

import math

import numpy as np
import numpy.typing as npt

from ..records import record


@record(slots=True)
class OperatingPoint:
    """A flyback at one input voltage and load."""
    mode: str              # "dcm" | "ccm" (the boundary counts as dcm: the current just reaches zero)
    duty: float            # switch on-time / period
    reset_duty: float      # secondary conduction time / period (CCM: 1 - duty)
    i_peak_a: float        # primary peak current
    i_ripple_a: float      # primary current swing during the on-time (DCM: = i_peak_a)


def boundary_inductance_h(v_in_v: float, v_reflected_v: float, p_in_w: float, freq_hz: float) -> float:
    """The primary inductance at the boundary between DCM and CCM at one input voltage [H].

    L_b = (V_in D_b)^2 / (2 P_in f), D_b = V_R / (V_R + V_in): the DCM energy relation P_in = 1/2 L I_pk^2 f
    with I_pk = V_in D / (L f) at the duty where the reset just ends the period.
    """
    d_b = v_reflected_v / (v_reflected_v + v_in_v)
    return (v_in_v * d_b) ** 2 / (2.0 * p_in_w * freq_hz)


def operating_point(inductance_h: float, v_in_v: float, v_reflected_v: float, p_in_w: float,
                    freq_hz: float) -> OperatingPoint:
    """Duty, peak current and swing of the primary at one input voltage and input power.

    DCM (L below the boundary): D = sqrt(2 P_in L f) / V_in, I_pk = V_in D / (L f), reset D2 = D V_in / V_R.
    CCM: D = V_R / (V_R + V_in); the on-time average current P_in / (V_in D); swing V_in D / (L f);
    I_pk = average + swing / 2.
    """
    if inductance_h < boundary_inductance_h(v_in_v, v_reflected_v, p_in_w, freq_hz) * (1.0 + 1e-12):
        d = math.sqrt(2.0 * p_in_w * inductance_h * freq_hz) / v_in_v
        i_pk = v_in_v * d / (inductance_h * freq_hz)
        return OperatingPoint("dcm", d, d * v_in_v / v_reflected_v, i_pk, i_pk)
    d = v_reflected_v / (v_reflected_v + v_in_v)
    swing = v_in_v * d / (inductance_h * freq_hz)
    i_pk = p_in_w / (v_in_v * d) + swing / 2.0
    return OperatingPoint("ccm", d, 1.0 - d, i_pk, swing)


def trapezoid_rms_a(i_peak_a: float, i_swing_a: float, duty: float) -> float:
    """RMS of a current ramping from I_pk - dI up to I_pk over ``duty`` of the period, zero otherwise [A].

    I_rms = sqrt(D (I_pk^2 - I_pk dI + dI^2 / 3))   (a triangle when dI = I_pk: I_pk sqrt(D / 3)).
    """
    return math.sqrt(max(duty * (i_peak_a ** 2 - i_peak_a * i_swing_a + i_swing_a ** 2 / 3.0), 0.0))


def trapezoid_harmonics(i_peak_a: float, i_swing_a: float, duty: float, rising: bool,
                        count: int = 39) -> tuple[float, npt.NDArray[np.float64]]:
    """The DC part and the rms of harmonics 1..count of a ramp current pulse (numpy FFT of one period).

    ``rising``: the primary's current ramps up during its interval, a secondary's ramps down.
    Returns (I_dc, rms of each harmonic), so sum(I_n^2) + I_dc^2 approaches I_rms^2 as count grows.
    """
    samples = 4096
    t = (np.arange(samples) + 0.5) / samples
    on = t < duty
    frac = np.where(on, t / duty, 0.0)
    low = i_peak_a - i_swing_a
    ramp = low + i_swing_a * frac if rising else i_peak_a - i_swing_a * frac
    current = np.where(on, ramp, 0.0)
    spectrum = np.fft.rfft(current) / samples
    dc = float(spectrum[0].real)
    harmonics = np.sqrt(2.0) * np.abs(spectrum[1:count + 1])
    return dc, harmonics


def clamp_energy_j(leakage_h: float, i_peak_a: float) -> float:
    """Energy the leakage inductance hands the clamp each cycle [J]: E = 1/2 L_lk I_pk^2.

    An RCD clamp at V_c dissipates this times f times V_c / (V_c - V_R) (power-supply design handbooks,
    from memory).
    """
    return 0.5 * leakage_h * i_peak_a ** 2
