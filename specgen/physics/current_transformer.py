"""Current transformers: secondary voltage, flux, magnetising branch, ratio and phase error, knee burden.

The classical equivalent circuit of an instrument current transformer referred to the secondary: the
primary current divided by the turns ratio is an ideal current source; it divides between the magnetising
branch (the magnetising reactance X_m in parallel with the core-loss resistance R_c) and the secondary loop
(winding resistance R_w plus the burden R_b). The secondary's leakage reactance is left out: on a toroid
with the winding spread evenly around the ring it is small against the burden (common practice).

SI units: amperes, volts, ohms, hertz, tesla, m^2. Floats or numpy arrays.

References
----------
The magnetising-branch phasor analysis of the current transformer, ratio error and phase displacement as
defined in IEC 61869-2 (ratio error (K_n I_s - I_p) / I_p x 100 %; phase displacement positive when the
secondary current leads the primary) and as worked in the standard instrument-transformer and electrical
measurement texts (from memory).
"""

from __future__ import annotations

import numpy as np

from ._types import Arr, ArrayLike

SINE_FORM_FACTOR = 2.0 * np.pi / np.sqrt(2.0)    # the "4.44" of V_rms = 4.44 f N B_pk A_e


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def secondary_voltage_v(i_secondary_a: ArrayLike, r_burden_ohm: ArrayLike, r_winding_ohm: ArrayLike) -> Arr:
    """The voltage the secondary must develop to drive its current through burden and winding [V rms].

    V_s = I_s (R_b + R_w)

    Parameters
    ----------
    i_secondary_a : secondary current [A rms]
    r_burden_ohm : burden resistance [ohm]
    r_winding_ohm : secondary winding resistance at its temperature [ohm]

    References
    ----------
    Ohm's law on the secondary loop of the current-transformer equivalent circuit (any instrument-transformer
    text, from memory).
    """
    return _out(np.asarray(i_secondary_a, float) * (np.asarray(r_burden_ohm, float) + np.asarray(r_winding_ohm, float)))


def peak_flux_t(v_secondary_v: ArrayLike, freq_hz: ArrayLike, secondary_turns: ArrayLike, ae_m2: ArrayLike) -> Arr:
    """Peak flux density the secondary voltage needs [T].

    B_pk = V_s / (4.44 f N_s A_e)   (Faraday's law for a sine)

    References
    ----------
    Faraday's law with the sine form factor 2 pi / sqrt(2) (McLyman, Transformer and Inductor Design Handbook).
    """
    return _out(np.asarray(v_secondary_v, float)
                / (SINE_FORM_FACTOR * np.asarray(freq_hz, float) * np.asarray(secondary_turns, float)
                   * np.asarray(ae_m2, float)))


def knee_burden_ohm(b_limit_t: ArrayLike, freq_hz: ArrayLike, secondary_turns: ArrayLike, ae_m2: ArrayLike,
                    i_secondary_a: ArrayLike, r_winding_ohm: ArrayLike) -> Arr:
    """The largest resistive burden the secondary drives before the core reaches ``b_limit_t`` [ohm].

    R_knee = 4.44 f N_s A_e B_limit / I_s - R_w   (zero when the winding alone reaches the limit)

    Parameters
    ----------
    b_limit_t : flux density taken as saturation [T]
    freq_hz : frequency [Hz]
    secondary_turns : N_s
    ae_m2 : effective area [m^2]
    i_secondary_a : secondary current [A rms] (the top of the range)
    r_winding_ohm : secondary winding resistance [ohm]

    References
    ----------
    ``secondary_voltage_v`` and ``peak_flux_t`` solved for the burden.
    """
    v_knee = SINE_FORM_FACTOR * np.asarray(freq_hz, float) * np.asarray(secondary_turns, float) \
        * np.asarray(ae_m2, float) * np.asarray(b_limit_t, float)
    return _out(np.maximum(v_knee / np.asarray(i_secondary_a, float) - np.asarray(r_winding_ohm, float), 0.0))


def secondary_current_phasor_a(i_primary_a: ArrayLike, turns_ratio: ArrayLike, r_loop_ohm: ArrayLike,
                               x_magnetising_ohm: ArrayLike, r_core_ohm: ArrayLike) -> np.ndarray:
    """The secondary current phasor for a primary current on the real axis [A, complex].

    The primary ampere-turns referred to the secondary, I_p / n (n = N_s / N_p), split between the
    magnetising branch Z_m = (R_c || j X_m) and the secondary loop R_loop = R_w + R_b:

        I_s = (I_p / n) Z_m / (Z_m + R_loop)

    Parameters
    ----------
    i_primary_a : primary current [A rms]
    turns_ratio : n = N_s / N_p
    r_loop_ohm : winding plus burden resistance [ohm]
    x_magnetising_ohm : magnetising reactance 2 pi f L_m, referred to the secondary [ohm]
    r_core_ohm : core-loss resistance V_s^2 / P_core, referred to the secondary [ohm] (inf: no core loss)

    References
    ----------
    The current-transformer equivalent circuit (see the module's references).
    """
    xm = np.asarray(x_magnetising_ohm, float)
    rc = np.asarray(r_core_ohm, float)
    ym = np.where(np.isfinite(rc), 1.0 / np.where(np.isfinite(rc), rc, 1.0), 0.0) + 1.0 / (1j * xm)
    zm = 1.0 / ym
    i_ref = np.asarray(i_primary_a, float) / np.asarray(turns_ratio, float)
    return np.asarray(i_ref * zm / (zm + np.asarray(r_loop_ohm, float)), dtype=complex)


def ratio_error_pct(i_primary_a: ArrayLike, turns_ratio: ArrayLike, r_loop_ohm: ArrayLike,
                    x_magnetising_ohm: ArrayLike, r_core_ohm: ArrayLike) -> Arr:
    """Ratio (current) error [%]: (n |I_s| - I_p) / I_p x 100, negative when the core takes current.

    References
    ----------
    IEC 61869-2, definition of ratio error (from memory), on ``secondary_current_phasor_a``.
    """
    i_s = secondary_current_phasor_a(i_primary_a, turns_ratio, r_loop_ohm, x_magnetising_ohm, r_core_ohm)
    ip = np.asarray(i_primary_a, float)
    return _out((np.asarray(turns_ratio, float) * np.abs(i_s) - ip) / ip * 100.0)


def phase_error_deg(i_primary_a: ArrayLike, turns_ratio: ArrayLike, r_loop_ohm: ArrayLike,
                    x_magnetising_ohm: ArrayLike, r_core_ohm: ArrayLike) -> Arr:
    """Phase displacement [degrees]: positive when the secondary current leads the primary.

    References
    ----------
    IEC 61869-2, definition of phase displacement (from memory), on ``secondary_current_phasor_a``.
    """
    i_s = secondary_current_phasor_a(i_primary_a, turns_ratio, r_loop_ohm, x_magnetising_ohm, r_core_ohm)
    return _out(np.degrees(np.angle(i_s)))
