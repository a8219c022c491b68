"""Ferrite loss against temperature and the thermal operating point.

References: the quadratic temperature fit ct0 - ct1 T + ct2 T^2 (Mulder, "Fit formulae for power loss in ferrites
and their use in transformer design", PCIM 1993, from memory); scipy.optimize (minimize_scalar, brentq) and
numpy.polynomial as independent computations of the minimum and the balance; the stability condition of the heat
balance R_th dP/dT < 1 (common practice; e.g. Snelling, Soft Ferrites, from memory).
"""

import math

import numpy as np
import pytest
from numpy.polynomial import polynomial as npoly
from scipy import optimize

from specgen.physics import core_temperature as ct

# invented fit coefficients (demo only): minimum at 90 degC
CT0, CT1, CT2 = 2.62, 0.0324, 1.8e-4


def test_minimum_temperature_against_scipy():
    t_min = ct.loss_minimum_temp_c(CT1, CT2)
    found = optimize.minimize_scalar(lambda t: npoly.polyval(t, [CT0, -CT1, CT2]), bounds=(-50, 250),
                                     method="bounded", options={"xatol": 1e-10})
    assert t_min == pytest.approx(found.x, abs=1e-6)
    assert t_min == pytest.approx(90.0)


def test_factor_normalised_to_one_at_minimum():
    t_min = ct.loss_minimum_temp_c(CT1, CT2)
    assert ct.loss_temperature_factor(t_min, CT0, CT1, CT2) == pytest.approx(1.0, rel=1e-14)
    temps = np.linspace(-40, 200, 241)
    factor = ct.loss_temperature_factor(temps, CT0, CT1, CT2)
    poly = npoly.polyval(temps, [CT0, -CT1, CT2])
    np.testing.assert_allclose(factor, poly / npoly.polyval(t_min, [CT0, -CT1, CT2]), rtol=1e-13)
    assert np.all(factor >= 1.0 - 1e-15)
    # 40 K either side of the minimum: 1 + ct2 40^2 / F_min (a parabola is symmetric)
    f_min = CT0 - CT1 ** 2 / (4 * CT2)
    assert ct.loss_temperature_factor(130.0, CT0, CT1, CT2) == pytest.approx(1 + CT2 * 1600 / f_min, rel=1e-12)
    assert ct.loss_temperature_factor(50.0, CT0, CT1, CT2) == pytest.approx(1 + CT2 * 1600 / f_min, rel=1e-12)


@pytest.mark.parametrize("coeffs, match", [((1.0, 0.02, 0.0), "ct2"), ((1.0, 0.02, -1e-4), "ct2"),
                                           ((0.5, 0.02, 1e-4), "never reaches zero"),
                                           ((math.nan, 0.02, 1e-4), "finite")])
def test_factor_refuses_bad_fits(coeffs, match):
    with pytest.raises(ValueError, match=match):
        ct.loss_temperature_factor(25.0, *coeffs)


def _quadratic_loss(p0, pm):
    f_min = CT0 - CT1 ** 2 / (4 * CT2)
    return lambda t: p0 + pm * (CT0 - CT1 * t + CT2 * t * t) / f_min


@pytest.mark.parametrize("p0, pm, r, ta", [(1.0, 2.0, 12.0, 40.0), (0.0, 3.0, 8.0, 25.0), (2.5, 0.5, 20.0, -10.0),
                                           (0.4, 4.0, 9.0, 55.0)])
def test_operating_point_matches_closed_form_and_brentq(p0, pm, r, ta):
    loss = _quadratic_loss(p0, pm)
    general = ct.thermal_operating_point(loss, r, ta)
    closed = ct.quadratic_operating_point(p0, pm, r, ta, CT0, CT1, CT2)
    assert general.exists and closed.exists
    assert general.temp_c == pytest.approx(closed.temp_c, abs=1e-8)
    # independent: the first root of T_a + R P(T) - T above ambient by scipy brentq on the bracket to the vertex
    vertex = (r * pm * CT1 / (CT0 - CT1 ** 2 / (4 * CT2)) + 1) / (2 * r * pm * CT2 / (CT0 - CT1 ** 2 / (4 * CT2)))
    root = optimize.brentq(lambda t: ta + r * loss(t) - t, ta, vertex, xtol=1e-13)
    assert closed.temp_c == pytest.approx(root, abs=1e-9)
    # stability: 1 - R dP/dT > 0 at the lower root; the two agree on the margin
    assert general.stable and closed.margin > 0
    assert general.margin == pytest.approx(closed.margin, abs=1e-6)
    assert general.loss_w == pytest.approx(loss(general.temp_c))
    assert general.evaluations < 1000


def test_runaway_when_loss_outgrows_cooling():
    # a poorly cooled part: the loss rises faster than 1/R_th can carry away -> no balance
    loss = _quadratic_loss(3.0, 6.0)
    general = ct.thermal_operating_point(loss, 40.0, 40.0)
    closed = ct.quadratic_operating_point(3.0, 6.0, 40.0, 40.0, CT0, CT1, CT2)
    assert not general.exists and not general.stable and general.temp_c is None
    assert not closed.exists and closed.temp_c == math.inf
    # and the condition is the discriminant of the balance: brentq finds no sign change up to 1000 degC
    temps = np.linspace(40, 1000, 2000)
    assert np.all(40.0 + 40.0 * np.vectorize(loss)(temps) - temps > 0)


def test_runaway_boundary_is_where_the_margin_vanishes():
    # raise R_th until the balance disappears; just before, the margin tends to zero (tangency)
    rs = np.linspace(5.0, 60.0, 20001)
    closed = ct.quadratic_operating_point(1.0, 2.0, rs, 40.0, CT0, CT1, CT2)
    last = int(np.flatnonzero(closed.exists)[-1])
    assert not closed.exists[last + 1]
    assert 0 <= closed.margin[last] < 0.02
    assert np.all(np.diff(closed.temp_c[: last + 1]) > 0)   # hotter as the cooling worsens


def test_general_search_handles_a_loss_minimum_and_copper_coefficient():
    # copper loss rising with resistance (IEC 60028 alpha20 = 0.00393 /K) plus a core loss with a minimum
    def loss(t):
        return 1.2 * (1 + 0.00393 * (t - 20)) + _quadratic_loss(0.0, 1.5)(t)
    point = ct.thermal_operating_point(loss, 14.0, 35.0)
    assert point.exists and point.stable
    assert point.temp_c == pytest.approx(optimize.brentq(lambda t: 35 + 14 * loss(t) - t, 35, 150), abs=1e-8)


def test_zero_loss_stays_at_ambient_and_bad_inputs():
    assert ct.thermal_operating_point(lambda t: 0.0, 10.0, 30.0).temp_c == pytest.approx(30.0)
    with pytest.raises(ValueError, match="finite loss"):
        ct.thermal_operating_point(lambda t: math.nan, 10.0, 30.0)
    with pytest.raises(ValueError, match="thermal resistance"):
        ct.thermal_operating_point(lambda t: 1.0, 0.0, 30.0)
    with pytest.raises(ValueError, match="R_th"):
        ct.quadratic_operating_point(1.0, 1.0, -1.0, 30.0, CT0, CT1, CT2)


def test_closed_form_branch_with_minimum_below_zero():
    # a fit whose minimum lies below 0 degC (ct1 < 0) with strong heating makes q ct1 + 1 <= 0: the closed form's
    # other root expression; it must still agree with the general search (a numerical check of the algebra)
    c0, c1, c2 = 1.2, -0.004, 1e-4
    f_min = c0 - c1 ** 2 / (4 * c2)
    closed = ct.quadratic_operating_point(0.0, 1.0, 300.0, -600.0, c0, c1, c2)
    assert 300.0 * 1.0 * c1 / f_min + 1 <= 0
    general = ct.thermal_operating_point(lambda t: (c0 - c1 * t + c2 * t * t) / f_min, 300.0, -600.0,
                                         search_limit_c=100.0)
    assert closed.exists and general.exists
    assert closed.temp_c == pytest.approx(general.temp_c, abs=1e-8)
