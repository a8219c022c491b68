"""Cooling: measured thermal resistance, forced air over a surface, potting.

References: Incropera and DeWitt, Fundamentals of Heat and Mass Transfer (laminar flat plate, local
Nu_x = 0.332 Re_x^1/2 Pr^1/3 averaged with scipy.integrate.quad; air Table A.4; Churchill's mixed convection;
Fourier's law), all from memory; McLyman, Transformer and Inductor Design Handbook (still-air rise, through the
project's own thermal.temperature_rise_k); pint for the units of the Reynolds number; scipy.optimize.brentq for the
heat balance; "h ~ 3.9 sqrt(v/L)" for air is common practice.
"""

import math

import numpy as np
import pint
import pytest
from scipy import integrate, optimize

from specgen.physics import cooling, thermal

U = pint.UnitRegistry()


def test_measured_thermal_resistance_overrides():
    assert cooling.choose_thermal_resistance(18.0) == cooling.ThermalResistanceChoice(18.0, "estimated")
    assert cooling.choose_thermal_resistance(18.0, 22.5) == cooling.ThermalResistanceChoice(22.5, "measured")
    for bad in (0.0, -3.0, math.nan, math.inf):
        with pytest.raises(ValueError, match="measured thermal resistance"):
            cooling.choose_thermal_resistance(18.0, bad)
    assert cooling.temperature_rise_from_r_th_k(2.5, 22.5) == pytest.approx(56.25)
    np.testing.assert_allclose(cooling.temperature_rise_from_r_th_k(np.array([1.0, 2.0]), 10.0), [10.0, 20.0])


def test_air_properties_rows_and_interpolation():
    # Incropera Table A.4 at 300 K: k = 26.3e-3 W/(m K), nu = 15.89e-6 m^2/s, Pr = 0.707 (from memory)
    air = cooling.air_properties(300.0 - 273.15)
    assert (air.conductivity_w_mk, air.kinematic_viscosity_m2_s, air.prandtl) == pytest.approx((26.3e-3, 15.89e-6, 0.707))
    mid = cooling.air_properties(325.0 - 273.15)
    assert mid.conductivity_w_mk == pytest.approx((26.3e-3 + 30.0e-3) / 2)
    with pytest.raises(ValueError, match="film temperature"):
        cooling.air_properties(200.0)


@pytest.mark.parametrize("v, length, film", [(1.0, 0.05, 27.0), (3.0, 0.12, 60.0), (0.3, 0.02, 40.0)])
def test_forced_air_against_local_nusselt_integral(v, length, film):
    air = cooling.air_properties(film)
    k, nu, pr = air.conductivity_w_mk, air.kinematic_viscosity_m2_s, air.prandtl
    # Re with pint: (m/s * m) / (m^2/s) is dimensionless
    re = (v * U.m / U.s * length * U.m / (nu * U.m ** 2 / U.s)).to(U.dimensionless).magnitude
    assert re < 5e5
    # average of the local laminar coefficient h_x = 0.332 (k/x) Re_x^1/2 Pr^1/3 over the plate (scipy quad)
    h_avg = integrate.quad(lambda x: 0.332 * k / x * math.sqrt(v * x / nu) * pr ** (1 / 3), 0, length)[0] / length
    assert cooling.forced_air_h_w_m2k(v, length, film) == pytest.approx(h_avg, rel=1e-8)


def test_forced_air_rule_of_thumb_and_scaling():
    # common practice: h ~ 3.9 sqrt(v/L) W/(m^2 K) for air near room temperature
    assert cooling.forced_air_h_w_m2k(2.0, 0.08) == pytest.approx(3.9 * math.sqrt(2.0 / 0.08), rel=0.01)
    h = cooling.forced_air_h_w_m2k(np.array([0.0, 1.0, 4.0]), 0.05)
    np.testing.assert_allclose(h, [0.0, h[1], 2 * h[1]], rtol=1e-13)   # h ~ v^1/2
    assert cooling.forced_air_h_w_m2k(1.0, 0.2) == pytest.approx(h[1] / 2, rel=1e-13)   # h ~ L^-1/2
    with pytest.raises(ValueError, match="laminar"):
        cooling.forced_air_h_w_m2k(100.0, 1.0)
    with pytest.raises(ValueError, match="air speed"):
        cooling.forced_air_h_w_m2k(-1.0, 0.05)


def test_mixed_convection_churchill_n3():
    assert cooling.mixed_convection_h_w_m2k(6.0, 8.0) == pytest.approx((6 ** 3 + 8 ** 3) ** (1 / 3))
    assert cooling.mixed_convection_h_w_m2k(6.0, 0.0) == pytest.approx(6.0)
    assert cooling.mixed_convection_h_w_m2k(6.0, 8.0, exponent=1.0) == pytest.approx(14.0)


def test_natural_equivalent_matches_mclyman_rise():
    # McLyman: dT = 450 psi^0.826 (the project's thermal.temperature_rise_k); h = P / (A dT) must reproduce it
    for p, area in ((3.0, 0.01), (12.0, 0.03), (0.5, 0.004)):
        rise = thermal.temperature_rise_k(p, area)
        assert cooling.natural_h_equivalent_w_m2k(rise) * area * rise == pytest.approx(p, rel=1e-12)


def test_forced_air_rise_balances_and_reduces_to_still_air():
    p, area, length = 6.0, 0.015, 0.06
    assert cooling.forced_air_rise_k(p, area, 0.0, length) == pytest.approx(thermal.temperature_rise_k(p, area),
                                                                             rel=1e-12)
    speeds = np.array([0.0, 0.5, 1.0, 2.0, 4.0])
    rises = cooling.forced_air_rise_k(p, area, speeds, length)
    assert np.all(np.diff(rises) < 0)
    hf = cooling.forced_air_h_w_m2k(2.0, length)

    def balance(dt):
        return dt * area * cooling.mixed_convection_h_w_m2k(cooling.natural_h_equivalent_w_m2k(dt), hf) - p
    assert rises[3] == pytest.approx(optimize.brentq(balance, 1e-6, 500.0, xtol=1e-12), rel=1e-10)
    assert cooling.forced_air_rise_k(0.0, area, 2.0, length) == 0.0


def test_potted_internal_resistance():
    # Fourier's law: the void share of the resistance scales with k_air / k_compound
    assert cooling.potted_internal_r_th_k_w(4.0, 0.0, 0.8) == pytest.approx(4.0)
    assert cooling.potted_internal_r_th_k_w(4.0, 0.5, 0.8) == pytest.approx(4.0 * (0.5 + 0.5 * 26.3e-3 / 0.8))
    assert cooling.potted_internal_r_th_k_w(4.0, 1.0, 26.3e-3) == pytest.approx(4.0)
    with pytest.raises(ValueError, match="void share"):
        cooling.potted_internal_r_th_k_w(4.0, 1.5, 0.8)


def test_forced_air_over_a_measured_still_air_resistance():
    # R = 1 / (h A) (definition): the measured still-air R_th is h_N = 1 / (R_th A), combined with the flat plate's
    # h_F by Churchill's n = 3; dT = P / (h A). No air: P R_th. By hand at 2 m/s over 60 mm (Incropera, from memory)
    p, r_th, area, length = 4.0, 12.0, 0.012, 0.06
    assert cooling.forced_air_rise_from_r_th_k(p, r_th, area, 0.0, length) == pytest.approx(p * r_th, rel=1e-12)
    hn = 1.0 / (r_th * area)
    air = cooling.air_properties(27.0)
    hf = 0.664 * math.sqrt(2.0 * length / air.kinematic_viscosity_m2_s) * air.prandtl ** (1 / 3) \
        * air.conductivity_w_mk / length
    want = p / ((hn ** 3 + hf ** 3) ** (1 / 3) * area)
    assert cooling.forced_air_rise_from_r_th_k(p, r_th, area, 2.0, length) == pytest.approx(want, rel=1e-12)
    assert want < p * r_th
    with pytest.raises(ValueError, match="thermal resistance"):
        cooling.forced_air_rise_from_r_th_k(p, 0.0, area, 2.0, length)


def test_flow_length_is_the_side_of_the_cube_of_the_same_surface():
    # a cube of side s has 6 s^2 of surface (geometry)
    assert cooling.flow_length_from_surface_m(6 * 0.04 ** 2) == pytest.approx(0.04, rel=1e-12)
    np.testing.assert_allclose(cooling.flow_length_from_surface_m(np.array([0.0, 0.06])), [0.0, 0.1])
    with pytest.raises(ValueError, match="surface"):
        cooling.flow_length_from_surface_m(-1.0)
