"""Faraday's law checks: form factors, round trips, volt-seconds, and pint for dimensions."""

import math

import numpy as np
import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants, integrate

from specgen.physics import faraday as fa

U = pint.UnitRegistry()


def test_form_factors():
    # McLyman / any machines text: 4.44 for a sine (2 pi / sqrt 2 exactly), 4.0 for a square wave
    assert fa.FORM_FACTORS["sine"] == pytest.approx(4.44, abs=5e-3)
    assert fa.FORM_FACTORS["sine"] == pytest.approx(2 * math.pi / math.sqrt(2), rel=1e-15)
    assert fa.FORM_FACTORS["square"] == 4.0


@given(st.floats(1, 1000), st.floats(10, 1e6), st.floats(0.01, 2.0), st.floats(1e-6, 1e-2),
       st.sampled_from(["sine", "square", "unipolar"]), st.floats(0.05, 0.95))
def test_turns_b_round_trip(v, f, b, ae, waveform, duty):
    n = fa.turns_for_voltage(v, f, b, ae, waveform, duty)
    assert fa.b_peak_t(v, f, n, ae, waveform, duty) == pytest.approx(b, rel=1e-12)


def test_sine_volt_seconds_against_scipy_integral():
    # half-cycle integral of sqrt(2) V sin(2 pi f t), computed with scipy.integrate.quad
    v, f = 230.0, 50.0
    ref, _ = integrate.quad(lambda t: math.sqrt(2) * v * math.sin(2 * math.pi * f * t), 0, 1 / (2 * f))
    assert fa.volt_seconds(v, f, "sine") == pytest.approx(ref, rel=1e-10)
    # and Faraday: N * (2 B_pk) * Ae equals the half-cycle volt-seconds
    n = fa.turns_for_voltage(v, f, 1.2, 6e-4)
    assert n * 2 * 1.2 * 6e-4 == pytest.approx(ref, rel=1e-10)


def test_square_and_unipolar_volt_seconds():
    # square: V * T/2 swings the flux 2 B_pk; unipolar pulse: V * t_on = N delta_B Ae (McLyman)
    assert fa.volt_seconds(24.0, 100e3, "square") == pytest.approx(24.0 * 5e-6)
    assert fa.volt_seconds(48.0, 100e3, "unipolar", 0.4) == pytest.approx(48.0 * 4e-6)
    n = fa.turns_for_voltage(48.0, 100e3, 0.2, 1e-4, "unipolar", 0.4)
    assert n == pytest.approx(48.0 * 4e-6 / (0.2 * 1e-4))


def test_bad_waveform_and_duty():
    with pytest.raises(ValueError):
        fa.turns_for_voltage(1.0, 1.0, 1.0, 1.0, "triangle")
    with pytest.raises(ValueError):
        fa.volt_seconds(1.0, 1.0, "unipolar", 1.5)


def test_pint_dimensions_of_faraday():
    # pint as the independent reference: 4.44 f N B A is a voltage, and the turns it gives agree
    # when the inputs are written in other units
    f, b, area = 0.05 * U.kHz, 1200 * U.mT, 6 * U.cm ** 2
    v = 230 * U.V
    n_pint = (v / (fa.FORM_FACTORS["sine"] * f * b * area)).to(U.dimensionless).magnitude
    assert (fa.FORM_FACTORS["sine"] * f * 1 * b * area).to(U.V).check("[electric_potential]")
    assert fa.turns_for_voltage(230.0, 50.0, 1.2, 6e-4) == pytest.approx(n_pint, rel=1e-12)


def test_h_field_and_inductance_with_pint():
    # H = N I / le in A/m; L = mu0 N^2 Ae / (gap + le/mu_r) in henries (scipy.constants.mu_0 via pint)
    n, i, le = 120, 0.5 * U.A, 9.6 * U.cm
    assert fa.h_field_a_m(120, 0.5, 0.096) == pytest.approx((n * i / le).to(U.A / U.m).magnitude)
    mu0 = constants.mu_0 * U.H / U.m
    ae, gap, mu_r = 1.8 * U.cm ** 2, 0.2 * U.mm, 2000
    l_ref = (mu0 * n ** 2 * ae / (gap + le / mu_r)).to(U.H).magnitude
    assert fa.magnetizing_inductance_h(120, 1.8e-4, 0.096, 2000, 0.2e-3) == pytest.approx(l_ref, rel=1e-9)


def test_magnetizing_current_with_pint():
    # I = V / (2 pi f L), pint checks the result is a current
    v, f, ind = 230 * U.V, 50 * U.Hz, 12 * U.H
    i = (v / (2 * math.pi * f * ind)).to(U.A)
    assert fa.magnetizing_current_a(230.0, 50.0, 12.0) == pytest.approx(i.magnitude, rel=1e-12)


def test_vectorised():
    out = fa.turns_for_voltage(np.array([115.0, 230.0]), 50.0, 1.2, 6e-4)
    assert out.shape == (2,) and out[1] == pytest.approx(2 * out[0])
