"""Litz windings: Sullivan's low-frequency strand-level proximity factor.

References: C. R. Sullivan, IEEE Trans. Power Electronics 14(2), 1999 (the F_r formula, written out again here
with pint units and scipy.constants.mu_0); Dowell, Proc. IEE 113(8), 1966 (its low-frequency limit, through the
project's Dowell functions); the exact round-conductor proximity solution in Kelvin/Bessel functions (Ferreira,
IEEE Trans. Power Electronics 9(1), 1994, from memory) normalised to its own low-frequency limit; and
scipy.integrate.dblquad for the round-to-square area moments behind Dowell's equivalent foil.
"""

import math

import numpy as np
import pint
import pytest
from scipy import constants, integrate, special

from specgen.physics import dowell, litz

U = pint.UnitRegistry()
RHO_CU_100C = 1.0 / 58e6 * (1 + 0.00393 * 80)   # IEC 60028 copper at 100 degC [ohm m]


def test_paper_formula_with_pint_units():
    # F_r = 1 + (pi w)^2 mu0^2 N^2 n^2 d^6 k / (768 rho^2 b^2): pint checks it is dimensionless
    f, n_turns, n_strands, d, b, k = 100e3 * U.Hz, 24, 105, 0.08 * U.mm, 18 * U.mm, 1.0
    w = 2 * math.pi * f / U.rad * U.rad
    mu0 = constants.mu_0 * U.H / U.m
    rho = RHO_CU_100C * U.ohm * U.m
    prox = ((math.pi * w) ** 2 * mu0 ** 2 * n_turns ** 2 * n_strands ** 2 * d ** 6 * k / (768 * rho ** 2 * b ** 2))
    ref = 1 + prox.to(U.dimensionless).magnitude
    got = litz.litz_fr_sullivan(100e3, 24, 105, 0.08e-3, 18e-3, RHO_CU_100C)
    assert got == pytest.approx(ref, rel=1e-9)   # 4e-7 pi vs SI-2019 mu_0: 5.5e-10
    assert got > 1.0


def test_skin_depth_form():
    # with delta = sqrt(2 rho / (w mu0)): F_r - 1 = pi^2 (N n)^2 d^6 / (192 delta^4 b^2)
    f, n_turns, n_strands, d, b = 250e3, 9, 400, 0.05e-3, 12e-3
    delta = math.sqrt(2 * RHO_CU_100C / (2 * math.pi * f * constants.mu_0))
    ref = 1 + math.pi ** 2 * (n_turns * n_strands) ** 2 * d ** 6 / (192 * delta ** 4 * b ** 2)
    assert litz.litz_fr_sullivan(f, n_turns, n_strands, d, b, RHO_CU_100C) == pytest.approx(ref, rel=1e-9)


def test_round_to_square_area_moment_is_pi_over_3():
    # Dowell replaces a round wire by the square of equal area; the low-frequency eddy loss in a transverse field
    # goes as the second area moment int y^2 dA: square s^4/12 over round pi d^4/64 = pi/3 (scipy dblquad)
    d = 1.0
    s = d * math.sqrt(math.pi) / 2
    round_moment = integrate.dblquad(lambda y, x: y * y, -d / 2, d / 2,
                                     lambda x: -math.sqrt(d * d / 4 - x * x), lambda x: math.sqrt(d * d / 4 - x * x))[0]
    square_moment = integrate.dblquad(lambda y, x: y * y, -s / 2, s / 2, -s / 2, s / 2)[0]
    assert square_moment / round_moment == pytest.approx(math.pi / 3, rel=1e-9)


@pytest.mark.parametrize("strand_layers", [1, 2, 5, 40, 300])
def test_against_dowell_low_frequency_limit(strand_layers):
    # Dowell at strand level: m strand layers of n_l strands across the breadth, porosity eta = d n_l / b.
    # Its low-frequency expansion F = 1 + (5 m^2 - 1) D^4 / 45 (Dowell 1966) holds the continuous mean-square field
    # m^2 D^4 / 9 less D^4 / 45 (the discrete layers); with the pi/3 of the equivalent square, Sullivan's term is
    # F_r - 1 = (3/pi) (F_Dowell - 1 + D^4/45) exactly. For a single strand layer that is (3/pi)(5/4)(F_Dowell - 1).
    d, b, f = 0.071e-3, 20e-3, 6e3
    per_layer = 200
    n_turns, n_strands = 4, strand_layers * per_layer / 4
    delta = math.sqrt(2 * RHO_CU_100C / (2 * math.pi * f * constants.mu_0))
    eta = d * per_layer / b
    big_d = dowell.round_wire_delta(d, delta, eta)
    f_dowell = dowell.dowell_fr_low_freq(big_d, strand_layers)
    sullivan = litz.litz_fr_sullivan(f, n_turns, n_strands, d, b, RHO_CU_100C)
    assert sullivan - 1 == pytest.approx(3 / math.pi * (f_dowell - 1 + big_d ** 4 / 45), rel=1e-9)
    if strand_layers == 1:
        assert sullivan - 1 == pytest.approx(3 / math.pi * 5 / 4 * (f_dowell - 1), rel=1e-9)
    # and Dowell's full (hyperbolic) factor agrees with its own expansion at these small D
    assert big_d < 0.1
    assert dowell.dowell_fr(big_d, strand_layers) - 1 == pytest.approx(f_dowell - 1, rel=2e-3)


def _exact_over_low_freq(ratio):
    """Exact proximity loss of a round wire in a uniform transverse field over its low-frequency limit.

    Ferreira's G(xi) with xi = d / (sqrt 2 delta), in Kelvin functions (order 2 via scipy.special.jv at
    x e^{3 pi i / 4}), divided by its xi^4 behaviour and normalised at a tiny xi, so no prefactor is taken on trust.
    """
    def shape(xi):
        v2 = special.jv(2, xi * np.exp(3j * np.pi / 4))
        num = v2.real * special.berp(xi) + v2.imag * special.beip(xi)
        return -xi * num / (special.ber(xi) ** 2 + special.bei(xi) ** 2) / xi ** 4
    xi = ratio / math.sqrt(2)
    return shape(xi) / shape(1e-3)


def test_validity_bound_from_exact_solution():
    # at d/delta = 0.6 the low-frequency strand loss is within 0.1 % of the exact solution; at 1.6 it is ~4.5 % high
    assert 1 - _exact_over_low_freq(litz.SULLIVAN_MAX_STRAND_RATIO) < 1e-3
    assert 1 - _exact_over_low_freq(1.0) == pytest.approx(0.007, abs=0.001)
    assert 1 - _exact_over_low_freq(1.6) == pytest.approx(0.045, abs=0.003)
    assert litz.litz_sullivan_valid(0.06e-3, 0.1e-3) is True
    assert litz.litz_sullivan_valid(0.07e-3, 0.1e-3) is False
    np.testing.assert_array_equal(litz.litz_sullivan_valid(np.array([0.05e-3, 0.2e-3]), 0.2e-3), [True, False])


def test_scaling_and_arrays():
    base = litz.litz_fr_sullivan(50e3, 20, 100, 0.1e-3, 15e-3, RHO_CU_100C) - 1
    # F_r - 1 goes as f^2, n^2, N^2, d^6, 1/b^2, k, 1/rho^2 (the formula's exponents)
    assert litz.litz_fr_sullivan(100e3, 20, 100, 0.1e-3, 15e-3, RHO_CU_100C) - 1 == pytest.approx(4 * base)
    assert litz.litz_fr_sullivan(50e3, 20, 200, 0.1e-3, 15e-3, RHO_CU_100C) - 1 == pytest.approx(4 * base)
    assert litz.litz_fr_sullivan(50e3, 20, 100, 0.2e-3, 15e-3, RHO_CU_100C) - 1 == pytest.approx(64 * base)
    assert litz.litz_fr_sullivan(50e3, 20, 100, 0.1e-3, 30e-3, RHO_CU_100C) - 1 == pytest.approx(base / 4)
    # two interleaved portions: k = 1/4
    assert litz.litz_fr_sullivan(50e3, 20, 100, 0.1e-3, 15e-3, RHO_CU_100C, 0.25) - 1 == pytest.approx(base / 4)
    out = litz.litz_fr_sullivan(np.array([0.0, 50e3, 100e3]), 20, np.array([[100], [200]]), 0.1e-3, 15e-3,
                                RHO_CU_100C)
    assert out.shape == (2, 3)
    np.testing.assert_allclose(out[0] - 1, [0.0, base, 4 * base], rtol=1e-12)
    assert isinstance(litz.litz_fr_sullivan(50e3, 20, 100, 0.1e-3, 15e-3, RHO_CU_100C), float)


@pytest.mark.parametrize("bad", [dict(strand_diameter_m=0.0), dict(window_breadth_m=-1e-3), dict(strands=0.5),
                                 dict(freq_hz=math.nan), dict(resistivity_ohm_m=0.0), dict(field_factor=-1.0)])
def test_rejects_bad_inputs(bad):
    args = dict(freq_hz=50e3, turns=20, strands=100, strand_diameter_m=0.1e-3, window_breadth_m=15e-3,
                resistivity_ohm_m=RHO_CU_100C) | bad
    with pytest.raises(ValueError, match="litz factor"):
        litz.litz_fr_sullivan(**args)
