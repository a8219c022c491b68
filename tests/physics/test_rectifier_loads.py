"""Rectifier load currents: the capacitor-input bridge (Schade's circuit) and the centre-tapped half."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from specgen.physics.rectifier_loads import bridge_capacitor_form, centre_tapped_half_rms_a


def test_no_capacitor_gives_the_rectified_sine_form_factor():
    # With omega C R_L -> 0 the load is resistive: the bridge's AC-side current is a sine of peak
    # 1/(1 + r), its rms over the mean of the rectified sine is pi / (2 sqrt 2) = 1.1107 (any circuits text:
    # rms of a sine over its rectified average), and V_dc / V_pk = (2 / pi) / (1 + r).
    form, vratio = bridge_capacitor_form(1e-3, 0.01)
    assert form == pytest.approx(math.pi / (2 * math.sqrt(2)), rel=2e-3)
    assert vratio == pytest.approx(2 / math.pi / 1.01, rel=2e-3)


def _scipy_form(k: float, r: float) -> tuple[float, float]:
    """The same circuit integrated independently by scipy (LSODA) over 300 half periods to settle."""
    def rhs(theta, v):
        s = abs(math.sin(theta))
        i = max(s - v[0], 0.0) / r
        return [(i - v[0]) / k]

    settle = solve_ivp(rhs, (0.0, 300 * math.pi), [0.5], method="LSODA", rtol=1e-9, atol=1e-12, max_step=0.01)
    v0 = settle.y[0, -1]
    theta = np.linspace(300 * math.pi, 301 * math.pi, 20001)
    sol = solve_ivp(rhs, (theta[0], theta[-1]), [v0], t_eval=theta, method="LSODA", rtol=1e-9, atol=1e-12,
                    max_step=0.002)
    v = sol.y[0]
    i = np.maximum(np.abs(np.sin(theta)) - v, 0.0) / r
    return math.sqrt(np.mean(i * i)) / np.mean(v), float(np.mean(v))


@pytest.mark.parametrize("k,r", [(10.0, 0.03), (30.0, 0.05)])
def test_bridge_form_factor_against_scipy(k, r):
    # Schade, Proc. IRE 31(7) 1943: the circuit (sine source, R_s, ideal bridge, C || R_L); scipy's LSODA
    # solution of the same equations is the independent check.
    form, vratio = bridge_capacitor_form(k, r)
    want_form, want_v = _scipy_form(k, r)
    assert form == pytest.approx(want_form, rel=0.01)
    assert vratio == pytest.approx(want_v, rel=0.005)


def test_bridge_form_factor_in_the_published_range():
    # A capacitor-input supply of a few percent regulation draws a winding rms current of about 1.6 to 2.5
    # times its DC load current (common practice; Schade's curves span it for omega C R_L >= 10)
    for k, r in ((10.0, 0.05), (30.0, 0.02), (100.0, 0.01)):
        form, _ = bridge_capacitor_form(k, r)
        assert 1.6 <= form <= 2.5
    # a larger capacitor narrows the conduction angle: a peakier current
    assert bridge_capacitor_form(100.0, 0.02)[0] > bridge_capacitor_form(10.0, 0.02)[0]


def test_centre_tapped_half_rms():
    # Each half carries the DC current at duty 0.5: rms = I_dc sqrt(0.5) (Mohan, Undeland, Robbins, Power
    # Electronics 3rd ed., ch. 10, from memory)
    assert centre_tapped_half_rms_a(10.0) == pytest.approx(10.0 / math.sqrt(2.0), rel=1e-12)
    assert centre_tapped_half_rms_a(10.0, 2.0) == pytest.approx(20.0 / math.sqrt(2.0), rel=1e-12)
