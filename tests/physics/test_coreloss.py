"""Core-loss checks: the iGSE coefficient, the iGSE's reduction to Steinmetz for a sine, and
consistency between the piecewise-linear and sampled forms (Venkatachalam et al., IEEE COMPEL 2002)."""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import integrate

from specgen.physics import coreloss as cl

K, ALPHA, BETA = 3.0, 1.4, 2.6   # invented Steinmetz parameters (W/m^3, Hz, T)


@pytest.mark.parametrize("alpha, beta", [(1.0, 2.0), (1.4, 2.6), (1.8, 2.9), (0.8, 2.2)])
def test_ki_against_scipy_and_gamma(alpha, beta):
    # integral of |cos t|^alpha over a period: scipy.integrate.quad and the Beta-function closed form
    # 2 sqrt(pi) Gamma((alpha+1)/2) / Gamma(alpha/2 + 1)
    quad = 4 * integrate.quad(lambda t: math.cos(t) ** alpha, 0, math.pi / 2)[0]
    closed = 2 * math.sqrt(math.pi) * math.gamma((alpha + 1) / 2) / math.gamma(alpha / 2 + 1)
    assert quad == pytest.approx(closed, rel=1e-9)
    ki = K / ((2 * math.pi) ** (alpha - 1) * quad * 2 ** (beta - alpha))
    assert cl.igse_ki(K, alpha, beta) == pytest.approx(ki, rel=1e-7)


def _sine(f, b, n=4001):
    t = np.linspace(0, 1 / f, n)
    return t, b * np.sin(2 * np.pi * f * t)


@settings(max_examples=50, deadline=None)
@given(st.floats(1.05, 2.0), st.floats(2.0, 3.0), st.floats(1e3, 1e6), st.floats(0.01, 0.4))
def test_igse_equals_steinmetz_for_sine(alpha, beta, f, b):
    # iGSE reduces to the Steinmetz equation for sinusoidal flux (Venkatachalam et al. 2002)
    t, flux = _sine(f, b)
    ref = cl.steinmetz_w_m3(f, b, K, alpha, beta)
    assert cl.igse_sampled_w_m3(t, flux, K, alpha, beta) == pytest.approx(ref, rel=5e-3)
    assert cl.igse_piecewise_linear_w_m3(t, flux, K, alpha, beta) == pytest.approx(ref, rel=5e-3)


def test_square_wave_pwl_equals_sampled_triangle():
    # the three-vertex triangle through the piecewise-linear form, the same triangle sampled densely
    # (numeric dB/dt), and the closed form of the square-voltage case must agree
    f, b = 100e3, 0.1
    T = 1 / f
    pwl = cl.igse_piecewise_linear_w_m3([0, T / 2, T], [-b, b, -b], K, ALPHA, BETA)
    t = np.linspace(0, T, 20001)
    tri = np.interp(t, [0, T / 2, T], [-b, b, -b])
    sampled = cl.igse_sampled_w_m3(t, tri, K, ALPHA, BETA)
    assert sampled == pytest.approx(pwl, rel=1e-3)
    assert cl.square_wave_loss_w_m3(f, b, K, ALPHA, BETA) == pytest.approx(pwl, rel=1e-12)
    # iGSE closed form for a 50 % triangle: ki (2B)^beta f^alpha 2^alpha
    ki = cl.igse_ki(K, ALPHA, BETA)
    assert pwl == pytest.approx(ki * (2 * b) ** BETA * f ** ALPHA * 2 ** ALPHA, rel=1e-12)


@pytest.mark.parametrize("duty", [0.1, 0.3, 0.5, 0.8])
def test_triangular_ripple_matches_pwl(duty):
    f, dbpp = 200e3, 0.05
    T = 1 / f
    pwl = cl.igse_piecewise_linear_w_m3([0, duty * T, T], [0, dbpp, 0], K, ALPHA, BETA)
    assert cl.triangular_ripple_loss_w_m3(f, dbpp, duty, K, ALPHA, BETA) == pytest.approx(pwl, rel=1e-12)


def test_unipolar_pulse_matches_pwl_and_reset_choice():
    f, db, d = 100e3, 0.2, 0.35
    T = 1 / f
    # 1:1 reset winding: reset in t_on, then flat
    pwl = cl.igse_piecewise_linear_w_m3([0, d * T, 2 * d * T, T], [0, db, 0, 0], K, ALPHA, BETA)
    assert cl.unipolar_pulse_loss_w_m3(f, db, d, K, ALPHA, BETA, reset_duty=d) == pytest.approx(pwl, rel=1e-12)
    # a slower reset lowers the loss when alpha > 1
    assert cl.unipolar_pulse_loss_w_m3(f, db, d, K, ALPHA, BETA) < pwl


@settings(deadline=None)
@given(st.integers(0, 999), st.floats(-0.3, 0.3), st.floats(0.5, 3.0))
def test_igse_invariances(shift, offset, scale):
    # iGSE: independent of where the period starts and of a DC flux offset; P ~ B^beta; time
    # compressed by s gives P ~ s^alpha
    t = np.linspace(0, 1e-5, 1001)
    flux = 0.1 * np.sin(2 * np.pi * 1e5 * t) + 0.03 * np.sin(6 * np.pi * 1e5 * t + 0.4)
    base = cl.igse_sampled_w_m3(t, flux, K, ALPHA, BETA)
    rolled = np.append(np.roll(flux[:-1], shift), np.roll(flux[:-1], shift)[0])
    assert cl.igse_sampled_w_m3(t, rolled, K, ALPHA, BETA) == pytest.approx(base, rel=1e-9)
    assert cl.igse_sampled_w_m3(t, flux + offset, K, ALPHA, BETA) == pytest.approx(base, rel=1e-9)
    assert cl.igse_sampled_w_m3(t, scale * flux, K, ALPHA, BETA) == pytest.approx(base * scale ** BETA, rel=1e-9)
    assert cl.igse_sampled_w_m3(t / scale, flux, K, ALPHA, BETA) == pytest.approx(base * scale ** ALPHA, rel=1e-9)


def test_steinmetz_vectorised():
    p = cl.steinmetz_w_m3(np.array([50e3, 100e3]), 0.1, K, ALPHA, BETA)
    assert p[1] / p[0] == pytest.approx(2 ** ALPHA)


def test_bad_inputs():
    with pytest.raises(ValueError):
        cl.igse_piecewise_linear_w_m3([0, 1, 1], [0, 1, 0], K, ALPHA, BETA)
    with pytest.raises(ValueError):
        cl.triangular_ripple_loss_w_m3(1e5, 0.1, 1.0, K, ALPHA, BETA)
