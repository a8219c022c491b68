"""Faraday's law for transformer windings, magnetizing force, inductance and current.

SI units: volts, hertz, tesla, m^2, amperes, henries. Floats or numpy arrays.
"""

from __future__ import annotations

import numpy as np

from specgen.physics.wire import MU0_H_M

from ._types import Arr, ArrayLike

# Form factor K_f of V_rms = K_f f N B_pk A_e.  Sine: 2 pi / sqrt(2) = 4.4429 (the textbook "4.44",
# McLyman and any electrical machines text); bipolar square wave: 4.0.
FORM_FACTORS = {"sine": 2.0 * np.pi / np.sqrt(2.0), "square": 4.0}

WAVEFORMS = ("sine", "square", "unipolar")


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def _check(waveform: str, duty: ArrayLike) -> None:
    if waveform not in WAVEFORMS:
        raise ValueError(f"unknown waveform {waveform!r}; expected one of {', '.join(WAVEFORMS)}")
    if waveform == "unipolar" and not np.all((np.asarray(duty) > 0.0) & (np.asarray(duty) <= 1.0)):
        raise ValueError("duty must lie in (0, 1]")


def volt_seconds(v: ArrayLike, freq_hz: ArrayLike, waveform: str = "sine", duty: ArrayLike = 0.5) -> Arr:
    """Volt-seconds that swing the flux from one extreme to the other [V s].

    Parameters
    ----------
    v : voltage [V]: rms for "sine", amplitude (= rms) for "square", pulse amplitude for "unipolar"
    freq_hz : switching or line frequency [Hz]
    waveform : "sine", "square" (bipolar, 50 % duty) or "unipolar" (pulse of t_on = duty / f)
    duty : on-time fraction for "unipolar"

    Returns
    -------
    sine: the half-cycle integral sqrt(2) V / (pi f); square: V / (2 f); unipolar: V duty / f.
    In every case volt_seconds = N * delta_B * Ae, with delta_B = 2 B_pk for the bipolar waveforms.

    References
    ----------
    Faraday's law v = N dPhi/dt; McLyman, Transformer and Inductor Design Handbook.
    """
    _check(waveform, duty)
    v = np.asarray(v, dtype=float)
    f = np.asarray(freq_hz, dtype=float)
    if waveform == "sine":
        return _out(np.sqrt(2.0) * v / (np.pi * f))
    if waveform == "square":
        return _out(v / (2.0 * f))
    return _out(v * np.asarray(duty, dtype=float) / f)


def turns_for_voltage(v_rms: ArrayLike, freq_hz: ArrayLike, b_peak_t: ArrayLike, ae_m2: ArrayLike, waveform: str = "sine",
                      duty: ArrayLike = 0.5) -> Arr:
    """Turns needed so a winding supports a voltage at a flux density (not rounded).

    Parameters
    ----------
    v_rms : winding voltage [V] (rms for sine; amplitude for square; pulse amplitude for unipolar)
    freq_hz : frequency [Hz]
    b_peak_t : peak flux density B_pk [T]; for "unipolar" the allowed swing delta_B [T]
    ae_m2 : effective core area [m^2]
    waveform : "sine", "square" or "unipolar"
    duty : on-time fraction for "unipolar"

    Returns
    -------
    sine/square: N = V / (K_f f B_pk Ae), K_f = 4.443 or 4.0; unipolar: N = V t_on / (delta_B Ae),
    t_on = duty / f.

    References
    ----------
    Faraday's law; McLyman, Transformer and Inductor Design Handbook (V = K_f f N B A).
    """
    _check(waveform, duty)
    b = np.asarray(b_peak_t, dtype=float)
    ae = np.asarray(ae_m2, dtype=float)
    if waveform == "unipolar":
        return _out(np.asarray(volt_seconds(v_rms, freq_hz, waveform, duty)) / (b * ae))
    return _out(np.asarray(v_rms, dtype=float)
                / (FORM_FACTORS[waveform] * np.asarray(freq_hz, dtype=float) * b * ae))


def b_peak_t(v_rms: ArrayLike, freq_hz: ArrayLike, turns: ArrayLike, ae_m2: ArrayLike, waveform: str = "sine",
             duty: ArrayLike = 0.5) -> Arr:
    """Peak flux density from the applied voltage (inverse of ``turns_for_voltage``) [T].

    sine/square: B_pk = V / (K_f f N Ae); unipolar: the swing delta_B = V t_on / (N Ae).

    Parameters
    ----------
    v_rms : voltage [V] (see ``turns_for_voltage``)
    freq_hz : frequency [Hz]
    turns : number of turns N
    ae_m2 : effective core area [m^2]
    waveform, duty : as in ``turns_for_voltage``

    References
    ----------
    Faraday's law; McLyman, Transformer and Inductor Design Handbook.
    """
    _check(waveform, duty)
    n = np.asarray(turns, dtype=float)
    ae = np.asarray(ae_m2, dtype=float)
    if waveform == "unipolar":
        return _out(np.asarray(volt_seconds(v_rms, freq_hz, waveform, duty)) / (n * ae))
    return _out(np.asarray(v_rms, dtype=float)
                / (FORM_FACTORS[waveform] * np.asarray(freq_hz, dtype=float) * n * ae))


def h_field_a_m(turns: ArrayLike, current_a: ArrayLike, le_m: ArrayLike) -> Arr:
    """Magnetizing force H = N I / le [A/m] (ampere-turns per metre of magnetic path).

    References
    ----------
    Ampere's circuital law; IEC 60205 (le as the effective path length).
    """
    return _out(np.asarray(turns, dtype=float) * np.asarray(current_a, dtype=float)
                / np.asarray(le_m, dtype=float))


def magnetizing_inductance_h(turns: ArrayLike, ae_m2: ArrayLike, le_m: ArrayLike, mu_r: ArrayLike, gap_m: ArrayLike = 0.0) -> Arr:
    """Inductance of a winding on a core, L = mu0 N^2 Ae / (gap + le / mu_r) [H].

    Parameters
    ----------
    turns : N
    ae_m2 : effective area [m^2]
    le_m : effective path length [m]
    mu_r : relative (amplitude) permeability of the core material
    gap_m : total series air gap [m] (0 for an ungapped core); no fringing (see ``gap``)

    References
    ----------
    Magnetic circuit reluctance R = (gap + le/mu_r) / (mu0 Ae); L = N^2 / R.
    """
    n = np.asarray(turns, dtype=float)
    return _out(MU0_H_M * n * n * np.asarray(ae_m2, dtype=float)
                / (np.asarray(gap_m, dtype=float)
                   + np.asarray(le_m, dtype=float) / np.asarray(mu_r, dtype=float)))


def magnetizing_current_a(v_rms: ArrayLike, freq_hz: ArrayLike, inductance_h: ArrayLike) -> Arr:
    """RMS magnetizing current of a sine-driven winding, I = V / (2 pi f L) [A].

    References
    ----------
    Inductive reactance X_L = 2 pi f L (linear core; real laminations draw a peaky current).
    """
    return _out(np.asarray(v_rms, dtype=float)
                / (2.0 * np.pi * np.asarray(freq_hz, dtype=float) * np.asarray(inductance_h, dtype=float)))
