"""Conductor checks against ASTM B258, IEC 60028, IEC 60228 and scipy's mu_0."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import constants

from specgen.physics import wire


@pytest.mark.parametrize("gauge, d_mm", [(10, 2.588), (24, 0.5106), (30, 0.2546), (40, 0.0799)])
def test_awg_diameter_astm_b258(gauge, d_mm):
    # ASTM B258 nominal diameters (table values, 4 significant figures)
    assert wire.awg_diameter_m(gauge) * 1e3 == pytest.approx(d_mm, rel=6e-4)


def test_awg_diameter_is_vectorised_and_36_is_5_mil():
    # ASTM B258 definition: AWG 36 = 0.005 in = 0.127 mm, AWG 0000 (n = -3) = 0.46 in
    d = wire.awg_diameter_m(np.array([36, -3]))
    assert d[0] == pytest.approx(0.127e-3, rel=1e-12)
    assert d[1] == pytest.approx(0.46 * 25.4e-3, rel=1e-12)


@pytest.mark.parametrize("gauge, ohm_km", [(10, 3.277), (24, 84.22), (30, 338.6), (40, 3441.0)])
def test_awg_resistance_at_20c(gauge, ohm_km):
    # ASTM B258 diameters with IEC 60028 annealed copper (1/58 ohm mm2/m); the ASTM B258 table
    # resistances agree (from memory)
    area = wire.round_area_m2(wire.awg_diameter_m(gauge))
    assert wire.resistance_per_m_ohm(area, 20.0) * 1e3 == pytest.approx(ohm_km, rel=1e-3)


@pytest.mark.parametrize("area_mm2, max_ohm_km",
                         [(0.5, 36.0), (0.75, 24.5), (1.0, 18.1), (1.5, 12.1), (2.5, 7.41), (4.0, 4.61)])
def test_iec_60228_class1_maximum_respected(area_mm2, max_ohm_km):
    # IEC 60228 class 1 plain copper, maximum resistance at 20 degC (from memory): the nominal area
    # at IEC 60028 resistivity must lie below each maximum (but not absurdly far below)
    r = wire.resistance_per_m_ohm(area_mm2 * 1e-6, 20.0) * 1e3
    assert 0.9 * max_ohm_km < r < max_ohm_km


def test_iec_60028_constants():
    # IEC 60028: 0.017241 ohm mm2/m, 8.89 g/cm3, 0.00393 /K
    assert wire.RHO20_CU_OHM_M * 1e6 == pytest.approx(0.017241, abs=5e-7)
    assert wire.DENSITY_CU_KG_M3 == 8890.0
    assert wire.CONDUCTORS["copper"] == (wire.RHO20_CU_OHM_M, 0.00393, 8890.0)


def test_aluminium_is_61_percent_iacs():
    # IEC 60889 hard-drawn aluminium: 61.0 % IACS (from memory); IACS = 1/58 ohm mm2/m (IEC 60028)
    assert wire.RHO20_CU_OHM_M / wire.RHO20_AL_OHM_M == pytest.approx(0.610, abs=5e-4)


def test_r100_over_r20():
    # IEC 60028 linear law: 1 + 0.00393 * 80 = 1.3144
    assert wire.resistivity_ohm_m(100.0) / wire.resistivity_ohm_m(20.0) == pytest.approx(1.3144, rel=1e-12)
    assert wire.resistance_at_temp_ohm(1.0, 20.0, 100.0) == pytest.approx(1.3144, rel=1e-12)


def test_test_sheet_correction_to_20c():
    # a DCR read at 25 degC refers to 20 degC by dividing by 1 + 0.00393 * 5 (IEC 60028)
    assert wire.resistance_at_temp_ohm(1.01965, 25.0, 20.0) == pytest.approx(1.0, rel=1e-12)


@given(st.floats(1e-3, 1e3), st.floats(-40, 200), st.floats(-40, 200))
def test_temperature_correction_round_trip(r, t0, t1):
    back = wire.resistance_at_temp_ohm(wire.resistance_at_temp_ohm(r, t0, t1), t1, t0)
    assert back == pytest.approx(r, rel=1e-12)


def test_mass_per_metre_with_pint():
    # pint as the independent unit check: 1 mm2 of copper at 8.89 g/cm3 weighs 8.89 g/m
    import pint
    u = pint.UnitRegistry()
    expected = (8.89 * u.g / u.cm ** 3 * 1.0 * u.mm ** 2).to(u.kg / u.m).magnitude
    assert wire.mass_per_m_kg(1e-6) == pytest.approx(expected, rel=1e-12)


def test_unknown_conductor():
    with pytest.raises(ValueError):
        wire.resistivity_ohm_m(20.0, "silver")


@pytest.mark.parametrize("freq, delta_mm, half_digit", [(100e3, 0.209, 0.0005), (50.0, 9.35, 0.005)])
def test_skin_depth_copper_20c(freq, delta_mm, half_digit):
    # computed with scipy.constants.mu_0 (SI-2019 value): delta = sqrt(rho / (pi f mu0))
    rho = 1 / 58e6
    reference = math.sqrt(rho / (math.pi * freq * constants.mu_0))
    got = wire.skin_depth_m(freq, rho)
    assert got == pytest.approx(reference, rel=1e-9)
    assert abs(got * 1e3 - delta_mm) <= half_digit


@pytest.mark.parametrize("freq", [50.0, 1e3, 20e3, 100e3, 1e6])
def test_skin_depth_rule_of_thumb(freq):
    # common practice: delta[mm] ~ 66 / sqrt(f[Hz]) for copper near room temperature, within 5 %
    got_mm = wire.skin_depth_m(freq, wire.resistivity_ohm_m(20.0)) * 1e3
    assert got_mm == pytest.approx(66.0 / math.sqrt(freq), rel=0.05)


def test_skin_depth_dc_and_arrays():
    out = wire.skin_depth_m(np.array([0.0, 1e4]), wire.RHO20_CU_OHM_M)
    assert np.isinf(out[0]) and np.isfinite(out[1])
    assert wire.skin_depth_m(0.0, wire.RHO20_CU_OHM_M) == math.inf


def test_mu0_matches_si_2019_within_1e_9():
    # scipy.constants.mu_0 is the SI-2019 measured value
    assert wire.MU0_H_M == pytest.approx(constants.mu_0, rel=1e-9)


@pytest.mark.parametrize("gauge", [10, 18, 24, 30])
def test_round_diameter_inverts_the_area_of_astm_b258_sizes(gauge):
    # ASTM B258: the nominal area of an AWG size is that of a circle of its nominal diameter
    d = wire.awg_diameter_m(gauge)
    assert wire.round_diameter_m(wire.round_area_m2(d)) == pytest.approx(d, rel=1e-12)


def test_round_diameter_of_one_square_millimetre():
    # 1 mm^2 of solid round conductor is 1.128 mm across (d = sqrt(4 A / pi); numpy's own pi)
    assert wire.round_diameter_m(1e-6) * 1e3 == pytest.approx(1.1284, abs=1e-4)
    assert np.allclose(wire.round_diameter_m(np.array([1e-6, 4e-6])), 2.0 * np.sqrt(np.array([1e-6, 4e-6]) / np.pi))
