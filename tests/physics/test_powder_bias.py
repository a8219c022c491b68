"""Powder cores under DC bias: B(H) as the integral of the incremental permeability, its inverse, inductances.

Independent references: scipy.integrate.quad and scipy.special.hyp2f1 (the integral and its closed form,
Abramowitz and Stegun 15.3.1), mpmath.hyp2f1 at 30 digits, scipy.constants.mu_0, the closed forms
int_0^inf dt/(1+t^c) = (pi/c)/sin(pi/c) (Gradshteyn and Ryzhik 3.241.2, from memory), int_0^x dt/(1+t) = ln(1+x)
and int_0^x dt/(1+t^2) = arctan x, and numpy.gradient for the incremental inductance.
"""

import math

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants, integrate, special

from specgen.physics import permeability
from specgen.physics import powder_bias as pb

A, B, C = 1.0, 2.5e-7, 1.9   # invented fit coefficients, H in A/m
MU_I = 60.0


def _quad_g(x, c):
    """int_0^x dt/(1+t^c) by scipy quad, split at powers of ten so the adaptive rule sees every scale."""
    if x == 0:
        return 0.0
    edges = [0.0] + [10.0 ** k for k in range(-6, 13) if 10.0 ** k < x] + [x]
    return sum(integrate.quad(lambda t: 1.0 / (1.0 + t ** c), lo, hi, epsabs=0, epsrel=1e-13, limit=200)[0]
               for lo, hi in zip(edges, edges[1:]))


@pytest.mark.parametrize("c", [0.5, 0.8, 1.0, 1.3, 1.9, 2.5, 4.0, 7.0])
@pytest.mark.parametrize("x", [1e-9, 1e-3, 0.3, 0.7, 0.87, 1.0, 1.2, 1.5, 3.0, 50.0, 1e4, 1e7])
def test_unit_integral_against_scipy_quad_and_mpmath(x, c):
    g = pb.bias_integral_unit(x, c)
    assert g == pytest.approx(_quad_g(x, c), rel=1e-10)
    # the closed form x 2F1(1, 1/c; 1 + 1/c; -x^c) at 30 digits (mpmath)
    mpmath.mp.dps = 30
    exact = float(mpmath.mpf(x) * mpmath.hyp2f1(1, mpmath.mpf(1) / c, 1 + mpmath.mpf(1) / c, -mpmath.mpf(x) ** c))
    assert g == pytest.approx(exact, rel=1e-12)


@pytest.mark.parametrize("c", [0.7, 1.3, 1.9, 3.0])
def test_unit_integral_against_scipy_hyp2f1(c):
    x = np.logspace(-4, 1.5, 40)   # the range where scipy's hyp2f1 itself holds 1e-12
    ref = x * special.hyp2f1(1.0, 1.0 / c, 1.0 + 1.0 / c, -x ** c)
    np.testing.assert_allclose(pb.bias_integral_unit(x, c), ref, rtol=1e-11)


def test_unit_integral_elementary_cases():
    x = np.logspace(-8, 9, 200)
    np.testing.assert_allclose(pb.bias_integral_unit(x, 1.0), np.log1p(x), rtol=1e-13)   # c = 1: ln(1 + x)
    np.testing.assert_allclose(pb.bias_integral_unit(x, 2.0), np.arctan(x), rtol=1e-13)  # c = 2: arctan x
    # c > 1: the integral to infinity is (pi/c)/sin(pi/c) (Gradshteyn and Ryzhik 3.241.2), less the tail
    # int_X^inf t^-c (1 - t^-c + ...) dt = X^(1-c)/(c-1) - X^(1-2c)/(2c-1) + ...
    for c in (1.5, 2.0, 3.0, 6.0):
        x_big = 1e12
        tail = x_big ** (1 - c) / (c - 1) - x_big ** (1 - 2 * c) / (2 * c - 1)
        assert pb.bias_integral_unit(x_big, c) == pytest.approx((math.pi / c) / math.sin(math.pi / c) - tail, rel=1e-13)


def test_unit_integral_is_odd_and_zero_at_zero():
    assert pb.bias_integral_unit(0.0, 1.7) == 0.0
    assert pb.bias_integral_unit(-2.5, 1.7) == pytest.approx(-pb.bias_integral_unit(2.5, 1.7), rel=1e-15)


@pytest.mark.parametrize("a, b, c", [(A, B, C), (1.0, 3e-5, 1.2), (0.95, 1e-9, 2.6), (1.0, 2e-3, 0.8)])
def test_b_from_bias_against_quad_over_field_range(a, b, c):
    # B(H) = mu0 mu_i int_0^H dh/(a + b h^c), H from 0 to 1e6 A/m, scipy.constants.mu_0 and quad
    for h in [0.0, 1.0, 100.0, 2e3, 1.5e4, 8e4, 3e5, 1e6]:
        k = (b / a) ** (1 / c)
        ref = constants.mu_0 * MU_I * _quad_g(k * h, c) / (a * k)
        assert pb.b_from_bias_t(h, MU_I, a, b, c) == pytest.approx(ref, rel=1e-9, abs=1e-300)


def test_b_from_bias_is_not_mu_f_h():
    # the flux density is the integral of the incremental permeability, never mu0 mu_i f(H) H, which
    # peaks and falls for c > 1; B keeps rising and always exceeds that product for H > 0
    h = np.logspace(0, 6, 300)
    b = pb.b_from_bias_t(h, MU_I, A, B, C)
    wrong = constants.mu_0 * MU_I * permeability.bias_fit_fraction(h, A, B, C) * h
    assert np.all(np.diff(b) > 0)
    assert np.all(b > wrong)
    assert np.any(np.diff(wrong) < 0)   # the product does fall: the bug this function removes


@settings(max_examples=200, deadline=None)
@given(st.floats(0, 1e6), st.floats(1e-3, 1e5), st.floats(0.3, 6.0))
def test_b_monotonic_in_h(h, dh, c):
    # never decreasing (deep in the roll-off the step can fall below the float resolution of B)
    assert pb.b_from_bias_t(h + dh, MU_I, 1.0, 1e-6, c) >= pb.b_from_bias_t(h, MU_I, 1.0, 1e-6, c)


def test_b_from_bias_linear_limit_and_bound():
    # b = 0: no roll-off, B = mu0 mu_i H / a (scipy's SI-2019 mu_0 differs from 4e-7 pi by 5.5e-10 relative)
    assert pb.b_from_bias_t(5e3, MU_I, 1.25, 0.0, 2.0) == pytest.approx(constants.mu_0 * MU_I * 5e3 / 1.25, rel=1e-9)
    # small H: B -> mu0 mu_i H / a; odd in H
    assert pb.b_from_bias_t(1e-3, MU_I, A, B, C) == pytest.approx(constants.mu_0 * MU_I * 1e-3, rel=1e-9)
    assert pb.b_from_bias_t(-7e4, MU_I, A, B, C) == pytest.approx(-pb.b_from_bias_t(7e4, MU_I, A, B, C), rel=1e-15)


def test_b_from_bias_accepts_arrays_and_broadcasts():
    h = np.array([[0.0, 1e3], [1e4, 1e5]])
    out = pb.b_from_bias_t(h, MU_I, A, B, np.array([1.5, 2.0]))
    assert out.shape == (2, 2)
    assert out[1, 0] == pytest.approx(pb.b_from_bias_t(1e4, MU_I, A, B, 1.5), rel=1e-15)
    assert isinstance(pb.b_from_bias_t(1e3, MU_I, A, B, C), float)


@pytest.mark.parametrize("c", [0.6, 1.0, 1.9, 3.0])
def test_inverse_round_trip(c):
    b_fit = 1e-3 ** c   # H_half = 1000 A/m
    h = np.concatenate([-np.logspace(-2, 5, 30), [0.0], np.logspace(-2, 5.5, 60)])
    bb = pb.b_from_bias_t(h, MU_I, 1.0, b_fit, c)
    h_back = pb.h_from_b_a_m(bb, MU_I, 1.0, b_fit, c)
    np.testing.assert_allclose(pb.b_from_bias_t(h_back, MU_I, 1.0, b_fit, c), bb, rtol=1e-14, atol=1e-300)
    # H itself to the problem's condition number, (dH/H)/(dB/B) = B / (H dB/dH), times a few ulps
    condition = np.abs(bb) / np.maximum(np.abs(h) * MU_I * constants.mu_0 / (1.0 + b_fit * np.abs(h) ** c), 1e-300)
    assert np.all(np.abs(h_back - h) <= 1e-14 * np.maximum(condition, 1.0) * np.abs(h))


def test_inverse_refuses_flux_beyond_the_curve():
    # c > 1: B is bounded by mu0 mu_i (pi/c)/(a k sin(pi/c)); no H reaches it
    k = (B / A) ** (1 / C)
    limit = constants.mu_0 * MU_I * (math.pi / C) / (A * k * math.sin(math.pi / C))
    assert pb.h_from_b_a_m(0.99 * limit, MU_I, A, B, C) > 0
    with pytest.raises(ValueError, match="limit"):
        pb.h_from_b_a_m(1.01 * limit, MU_I, A, B, C)
    with pytest.raises(ValueError, match="finite"):
        pb.h_from_b_a_m(math.nan, MU_I, A, B, C)


@pytest.mark.parametrize("bad", [dict(mu_i=0.0), dict(a=0.0), dict(b=-1e-9), dict(c=0.0), dict(c=math.nan)])
def test_fit_validation(bad):
    args = dict(h_a_m=1e3, mu_i=MU_I, a=A, b=B, c=C) | bad
    with pytest.raises(ValueError, match="roll-off"):
        pb.b_from_bias_t(**args)


def test_half_field_form_is_the_same_curve():
    # f = 1/(1 + (H/H_half)^s) is a = 1, b = H_half^-s, c = s; f(H_half) = 1/2
    b_fit = pb.fit_b_from_half_field(4000.0, 2.2)
    assert permeability.bias_fit_fraction(4000.0, 1.0, b_fit, 2.2) == pytest.approx(0.5, rel=1e-14)
    with pytest.raises(ValueError):
        pb.fit_b_from_half_field(0.0, 2.0)


def test_inductances_from_incremental_permeability():
    n, ae, le = 40, 0.65e-4, 6.35e-2
    i = np.linspace(0.0, 60.0, 2001)
    lam = pb.flux_linkage_wb(n, ae, le, MU_I, i, A, B, C)
    l_inc = pb.incremental_inductance_h(n, ae, le, MU_I, i, A, B, C)
    # d lambda / dI by numpy.gradient (second-order differences) matches the incremental inductance
    np.testing.assert_allclose(np.gradient(lam, i)[1:-1], l_inc[1:-1], rtol=2e-5)
    # the incremental inductance is the existing roll-off inductance L = mu0 mu_i f(NI/le) N^2 Ae/le
    np.testing.assert_allclose(l_inc, permeability.powder_inductance_h(n, ae, le, MU_I, i, A, B, C), rtol=1e-14)
    l_sec = pb.secant_inductance_h(n, ae, le, MU_I, i, A, B, C)
    # at zero current both are mu0 mu_i N^2 Ae / le (scipy mu_0); under bias secant >= incremental (B concave)
    l0 = constants.mu_0 * MU_I * n * n * ae / le
    assert l_sec[0] == pytest.approx(l0, rel=1e-9) and l_inc[0] == pytest.approx(l0, rel=1e-9)
    assert np.all(l_sec[1:] > l_inc[1:])
    np.testing.assert_allclose(l_sec[1:] * i[1:], lam[1:], rtol=1e-14)


@pytest.mark.parametrize("half, steep", [(3500.0, 1.95), (40000.0, 2.0), (2400.0, 1.85), (8000.0, 3.5)])
def test_ceiling_is_the_integral_to_infinity(half, steep):
    # B_inf = mu0 mu_i int_0^inf dh / (1 + (h / H_half)^n) (scipy.integrate.quad to infinity); none for n <= 1
    b = pb.fit_b_from_half_field(half, steep)
    ref = constants.mu_0 * 75.0 * integrate.quad(lambda h: 1.0 / (1.0 + (h / half) ** steep), 0.0, math.inf,
                                                 epsrel=1e-12)[0]
    assert pb.b_ceiling_t(75.0, 1.0, b, steep) == pytest.approx(ref, rel=1e-8)
    assert pb.b_from_bias_t(10 * half, 75.0, 1.0, b, steep) < pb.b_ceiling_t(75.0, 1.0, b, steep)
    assert math.isinf(pb.b_ceiling_t(75.0, 1.0, b, 0.9))
