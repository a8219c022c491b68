"""Gapped-inductor checks: McLyman's relations, solver round trips, pint recomputation."""

import math

import pint
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy import constants

from specgen.physics import gap

U = pint.UnitRegistry()


def test_fringing_factor_above_one_and_tends_to_one():
    # McLyman F = 1 + (lg / sqrt(Ae)) ln(2G/lg): F > 1 for 0 < lg < 2G, F -> 1 as lg -> 0
    ae, g = 1.8e-4, 30e-3
    values = [gap.fringing_factor(lg, ae, g) for lg in (1e-3, 1e-4, 1e-5, 1e-6, 1e-8)]
    assert all(v > 1 for v in values)
    assert values == sorted(values, reverse=True)
    assert values[-1] - 1 < 2e-5   # 1e-8/sqrt(1.8e-4) * ln(6e6) = 1.2e-5
    assert gap.fringing_factor(0.0, ae, g) == 1.0


def test_fringing_factor_formula_with_pint():
    # the McLyman expression recomputed in mixed units with pint (lg in mm, Ae in cm^2, G in mm)
    lg, ae, g = 1.2 * U.mm, 1.8 * U.cm ** 2, 29.6 * U.mm
    ref = 1 + (lg / ae ** 0.5).to("").magnitude * math.log((2 * g / lg).to("").magnitude)
    assert gap.fringing_factor(1.2e-3, 1.8e-4, 29.6e-3) == pytest.approx(ref, rel=1e-12)


def test_gapped_inductance_with_pint():
    # L = mu0 N^2 Ae F / (lg + le/mu_r), independent recomputation with pint and scipy's mu_0
    n, ae, le, mu_r, lg, g = 40, 1.8 * U.cm ** 2, 9.6 * U.cm, 2000, 0.8 * U.mm, 29.6 * U.mm
    mu0 = constants.mu_0 * U.H / U.m
    f = 1 + (lg / ae ** 0.5).to("").magnitude * math.log((2 * g / lg).to("").magnitude)
    ref = (mu0 * n ** 2 * ae * f / (lg + le / mu_r)).to(U.uH).magnitude
    got = gap.inductance_gapped_h(40, 1.8e-4, 0.096, 2000, 0.8e-3, 29.6e-3) * 1e6
    assert got == pytest.approx(ref, rel=1e-9)
    no_fringe = gap.inductance_gapped_h(40, 1.8e-4, 0.096, 2000, 0.8e-3) * 1e6
    assert got / no_fringe == pytest.approx(f, rel=1e-12)


@settings(max_examples=200)
@given(st.floats(5e-6, 5e-3), st.integers(5, 200), st.floats(2e-5, 5e-4), st.floats(0.02, 0.2),
       st.floats(100, 10000), st.floats(5e-3, 40e-3))
def test_gap_round_trip(target_h, turns, ae, le, mu_r, g):
    lg = gap.gap_for_inductance_m(target_h, turns, ae, le, mu_r, g)
    ungapped = 4e-7 * math.pi * turns ** 2 * ae * mu_r / le
    if target_h > ungapped:
        assert lg is None
        return
    assert lg is not None and lg >= 0
    assert gap.inductance_gapped_h(turns, ae, le, mu_r, lg, g) == pytest.approx(target_h, rel=1e-6)


def test_gap_solver_returns_none_and_closed_form():
    # L > mu0 N^2 Ae mu_r / le cannot be reached with any gap
    assert gap.gap_for_inductance_m(1.0, 10, 1e-4, 0.1, 2000, 0.03) is None
    # without fringing: lg = mu0 N^2 Ae / L - le/mu_r (pint recomputation)
    mu0 = constants.mu_0 * U.H / U.m
    ref = (mu0 * 30 ** 2 * 1.2 * U.cm ** 2 / (47 * U.uH) - 7 * U.cm / 2500).to(U.m).magnitude
    assert gap.gap_for_inductance_m(47e-6, 30, 1.2e-4, 0.07, 2500, None) == pytest.approx(ref, rel=1e-8)


def test_gap_solver_picks_smallest_gap():
    lg = gap.gap_for_inductance_m(47e-6, 22, 1.8e-4, 0.096, 2000, 29.6e-3)
    assert gap.inductance_gapped_h(22, 1.8e-4, 0.096, 2000, lg * (1 - 1e-4), 29.6e-3) > 47e-6
    assert gap.inductance_gapped_h(22, 1.8e-4, 0.096, 2000, lg * (1 + 1e-4), 29.6e-3) < 47e-6


def test_flux_density_relations():
    # N Phi = L I (McLyman): N = L I / (B Ae) and back; AL = L/N^2 in nH; W = L I^2 / 2
    n = gap.turns_for_peak_b(47e-6, 9.0, 0.3, 1.8e-4)
    assert gap.b_peak_from_inductance_t(47e-6, 9.0, n, 1.8e-4) == pytest.approx(0.3)
    assert gap.al_nh(100e-6, 10) == pytest.approx(1000.0)
    w = (0.5 * 250 * U.uH * (3 * U.A) ** 2).to(U.J).magnitude
    assert gap.energy_j(250e-6, 3.0) == pytest.approx(w)
