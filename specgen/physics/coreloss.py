"""Core loss per unit volume: Steinmetz equation and the improved generalized Steinmetz equation.

k is the Steinmetz coefficient in W/m^3 for f in Hz and B (peak) in T; alpha, beta the exponents.
All results are loss densities in W/m^3 (multiply by Ve for watts).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

from ._types import Arr, ArrayLike, FloatArray

_GRID_POINTS = 200001      # the trapezoid grid of ``_cos_power_period_integral``, built on first use


def _out(x: ArrayLike) -> Arr:
    x = np.asarray(x, dtype=float)
    return float(x) if x.ndim == 0 else x


def steinmetz_w_m3(freq_hz: ArrayLike, b_peak_t: ArrayLike, k: float, alpha: float, beta: float) -> Arr:
    """Steinmetz core loss for sinusoidal flux, P_v = k f^alpha B_pk^beta [W/m^3].

    Parameters
    ----------
    freq_hz : frequency [Hz]
    b_peak_t : peak flux density (amplitude) [T]
    k : coefficient [W/m^3] for f in Hz and B in T
    alpha, beta : frequency and flux-density exponents

    References
    ----------
    C. P. Steinmetz, "On the law of hysteresis", Trans. AIEE 9, 1892 (generalised form k f^a B^b).
    """
    f = np.asarray(freq_hz, dtype=float)
    b = np.abs(np.asarray(b_peak_t, dtype=float))
    return _out(k * f ** alpha * b ** beta)


def igse_ki(k: float, alpha: float, beta: float) -> float:
    """iGSE coefficient ki = k / ((2 pi)^(alpha - 1) * int_0^2pi |cos t|^alpha 2^(beta - alpha) dt).

    The integral of |cos t|^alpha over a period is four times the integral over [0, pi/2], evaluated
    numerically (trapezoid rule on 200 001 points).

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, "Accurate prediction of ferrite core loss
    with nonsinusoidal waveforms using only Steinmetz parameters", IEEE COMPEL 2002.
    """
    integral = _cos_power_period_integral(float(alpha))
    return float(k / ((2.0 * np.pi) ** (alpha - 1.0) * integral * 2.0 ** (beta - alpha)))


@lru_cache(maxsize=256)
def _cos_power_period_integral(alpha: float) -> float:
    """int_0^2pi |cos t|^alpha dt = 4 int_0^pi/2 cos^alpha t dt, trapezoid rule on a fine grid."""
    grid = np.linspace(0.0, np.pi / 2.0, _GRID_POINTS)
    step = grid[1] - grid[0]
    y = np.cos(grid) ** alpha
    return float(4.0 * step * (np.sum(y) - 0.5 * (y[0] + y[-1])))


def _check_period(times_s: ArrayLike, flux_t: ArrayLike) -> tuple[FloatArray, FloatArray]:
    t = np.asarray(times_s, dtype=float)
    b = np.asarray(flux_t, dtype=float)
    if t.ndim != 1 or t.shape != b.shape or t.size < 2:
        raise ValueError("times_s and flux_t must be 1-D, of equal length >= 2")
    if np.any(np.diff(t) <= 0.0):
        raise ValueError("times_s must increase strictly")
    return t, b


def igse_piecewise_linear_w_m3(times_s: ArrayLike, flux_t: ArrayLike, k: float, alpha: float, beta: float) -> Arr:
    """iGSE loss of one period of a piecewise-linear flux waveform [W/m^3].

    P = (1/T) sum_j ki |dB_pp|^(beta - alpha) |delta B_j / delta t_j|^alpha delta t_j

    Parameters
    ----------
    times_s : vertex times over one period, strictly increasing; T = times[-1] - times[0]
    flux_t : flux density at the vertices [T]; the last vertex should repeat the first (closed loop)
    k, alpha, beta : Steinmetz parameters (k in W/m^3 with f in Hz, B in T)

    dB_pp is the peak-to-peak flux of the period. A waveform with minor loops should be split into
    its loops first (the iGSE paper's recursive split); this function treats the period as one loop.

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, IEEE COMPEL 2002 (piecewise-linear form).
    """
    t, b = _check_period(times_s, flux_t)
    ki = igse_ki(k, alpha, beta)
    dt = np.diff(t)
    db = np.diff(b)
    bpp = float(b.max() - b.min())
    period = float(t[-1] - t[0])
    return float(ki * bpp ** (beta - alpha) * np.sum(np.abs(db / dt) ** alpha * dt) / period)


def igse_sampled_w_m3(times_s: ArrayLike, flux_t: ArrayLike, k: float, alpha: float, beta: float) -> Arr:
    """iGSE loss of any sampled flux waveform over one period [W/m^3].

    dB/dt is taken numerically by central differences on the periodic sample sequence (samples at
    times_s[:-1], the last sample closing the period onto the first), and
    P = (1/T) int ki |dB_pp|^(beta - alpha) |dB/dt|^alpha dt by the rectangle rule on the sample cells.

    Parameters
    ----------
    times_s : sample times over one period, strictly increasing, last = first + T
    flux_t : flux density samples [T]; flux_t[-1] should equal flux_t[0]
    k, alpha, beta : Steinmetz parameters

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, IEEE COMPEL 2002 (iGSE integral form).
    """
    t, b = _check_period(times_s, flux_t)
    ki = igse_ki(k, alpha, beta)
    period = float(t[-1] - t[0])
    tp, bp = t[:-1], b[:-1]            # one period without the repeated end point
    # neighbours on the periodic sequence
    t_next = np.append(tp[1:], tp[0] + period)
    t_prev = np.insert(tp[:-1], 0, tp[-1] - period)
    b_next = np.append(bp[1:], bp[0])
    b_prev = np.insert(bp[:-1], 0, bp[-1])
    dbdt = (b_next - b_prev) / (t_next - t_prev)
    cell = (t_next - t_prev) / 2.0     # each sample owns half of each neighbouring interval
    bpp = float(b.max() - b.min())
    return float(ki * bpp ** (beta - alpha) * np.sum(np.abs(dbdt) ** alpha * cell) / period)


def triangular_ripple_loss_w_m3(freq_hz: ArrayLike, delta_b_pp_t: ArrayLike, duty: ArrayLike, k: float, alpha: float,
                                beta: float) -> Arr:
    """iGSE loss for triangular flux: rises by dB_pp for duty*T, falls back for (1 - duty)*T [W/m^3].

    P = ki dB_pp^beta f^alpha (duty^(1 - alpha) + (1 - duty)^(1 - alpha)) - the piecewise-linear iGSE
    integrated in closed form (the inductor-ripple case).

    Parameters
    ----------
    freq_hz : switching frequency [Hz]
    delta_b_pp_t : peak-to-peak flux ripple [T]
    duty : rise-time fraction, 0 < duty < 1
    k, alpha, beta : Steinmetz parameters

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, IEEE COMPEL 2002.
    """
    f = np.asarray(freq_hz, dtype=float)
    dbpp = np.abs(np.asarray(delta_b_pp_t, dtype=float))
    d = np.asarray(duty, dtype=float)
    if np.any((d <= 0.0) | (d >= 1.0)):
        raise ValueError("duty must lie strictly between 0 and 1")
    ki = igse_ki(k, alpha, beta)
    return _out(ki * dbpp ** beta * f ** alpha * (d ** (1.0 - alpha) + (1.0 - d) ** (1.0 - alpha)))


def square_wave_loss_w_m3(freq_hz: ArrayLike, b_peak_t: ArrayLike, k: float, alpha: float, beta: float) -> Arr:
    """iGSE loss under a bipolar square voltage: triangular flux between -B_pk and +B_pk, duty 0.5.

    P = ki (2 B_pk)^beta f^alpha 2^alpha   [W/m^3]

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, IEEE COMPEL 2002.
    """
    return triangular_ripple_loss_w_m3(freq_hz, 2.0 * np.asarray(b_peak_t, dtype=float), 0.5,
                                       k, alpha, beta)


def unipolar_pulse_loss_w_m3(freq_hz: ArrayLike, delta_b_t: ArrayLike, duty: ArrayLike, k: float, alpha: float, beta: float,
                             reset_duty: ArrayLike | None = None) -> Arr:
    """iGSE loss of a unipolar pulse drive: flux ramps up by delta_B during t_on = duty*T, then resets.

    The reset is linear over reset_duty*T and the flux then rests (dB/dt = 0) for the remainder:
    P = ki delta_B^beta f^alpha (duty^(1 - alpha) + reset_duty^(1 - alpha))  [W/m^3].

    Parameters
    ----------
    freq_hz : switching frequency [Hz]
    delta_b_t : flux swing delta_B [T]
    duty : on-time fraction
    k, alpha, beta : Steinmetz parameters
    reset_duty : reset-time fraction; default 1 - duty (reset spread over the whole off time, the
        least-loss case). A forward converter with a 1:1 reset winding has reset_duty = duty.

    References
    ----------
    K. Venkatachalam, C. R. Sullivan, T. Abdallah, H. Tacca, IEEE COMPEL 2002.
    """
    f = np.asarray(freq_hz, dtype=float)
    db = np.abs(np.asarray(delta_b_t, dtype=float))
    d = np.asarray(duty, dtype=float)
    r = 1.0 - d if reset_duty is None else np.asarray(reset_duty, dtype=float)
    if np.any((d <= 0.0) | (r <= 0.0) | (d + r > 1.0 + 1e-12)):
        raise ValueError("need duty > 0, reset_duty > 0 and duty + reset_duty <= 1")
    ki = igse_ki(k, alpha, beta)
    return _out(ki * db ** beta * f ** alpha * (d ** (1.0 - alpha) + r ** (1.0 - alpha)))
