"""Powder-core DC-bias roll-off checks (the curve-fit form 1/(a + b H^c))."""

import math

import numpy as np
import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants

from specgen.physics import permeability as pm

U = pint.UnitRegistry()
A, B, C = 1.0, 2.5e-7, 1.9   # invented fit coefficients, H in A/m


@given(st.floats(0, 1e5), st.floats(1e-3, 1e5))
def test_bias_fit_monotonic(h, dh):
    assert pm.bias_fit_fraction(h + dh, A, B, C) < pm.bias_fit_fraction(h, A, B, C)


@pytest.mark.parametrize("h", [0.0, 3000.0, 20000.0])
def test_bias_fit_equals_formula(h):
    assert pm.bias_fit_fraction(h, A, B, C) == pytest.approx(1 / (A + B * h ** C), rel=1e-14)


def test_oersted_fit_converts_with_pint():
    # a fit written for H in oersted converts as b_A/m = b_Oe (4 pi/1000)^c; pint does the Oe
    b_oe, c = 0.01, 1.6
    h = 4000.0
    with U.context("Gaussian"):   # pint keeps the oersted in the Gaussian system
        h_oe = (h * U.A / U.m).to(U.oersted).magnitude
    b_am = b_oe * (4 * math.pi / 1000) ** c
    assert pm.bias_fit_fraction(h, 1.0, b_am, c) == pytest.approx(1 / (1 + b_oe * h_oe ** c), rel=1e-9)


def test_unbiased_inductance_with_pint():
    # at zero current L = mu0 mu_i N^2 Ae / le (scipy mu_0, pint units)
    ref = (constants.mu_0 * U.H / U.m * 60 * 50 ** 2 * 0.65 * U.cm ** 2 / (6.35 * U.cm)).to(U.H)
    got = pm.powder_inductance_h(50, 0.65e-4, 0.0635, 60, 0.0, A, B, C)
    assert got == pytest.approx(ref.magnitude, rel=1e-9)


def test_turns_solver_smallest():
    target, i = 250e-6, 3.0
    n = pm.turns_for_biased_inductance(target, i, 0.65e-4, 0.0635, 60, A, B, C)
    assert n is not None
    assert pm.powder_inductance_h(n, 0.65e-4, 0.0635, 60, i, A, B, C) >= target
    all_n = np.arange(1, n)
    assert np.all(pm.powder_inductance_h(all_n, 0.65e-4, 0.0635, 60, i, A, B, C) < target)


def test_turns_solver_none_when_unreachable():
    # with c > 2, L(N) peaks: a target above the peak is never reached
    assert pm.turns_for_biased_inductance(1.0, 10.0, 0.65e-4, 0.0635, 60, 1.0, 1e-6, 2.5) is None
    assert pm.turns_for_biased_inductance(250e-6, 3.0, 0.65e-4, 0.0635, 60, A, B, C, max_turns=5) is None
