"""Flybacks: the 65 W universal-input flyback BH-7065 (19 V 3.42 A, auxiliary 15 V) against the standard
flyback design relations of the power-supply design handbooks (from memory): the energy per cycle
1/2 L_p I_pk^2, DCM power P_in = 1/2 L_p I_pk^2 f, the reflected voltage V_R = (V_out + V_f) N_p / N_s,
B_pk = L_p I_pk / (N_p A_e), CCM volt-second balance D = V_R / (V_R + V_in); the currents' rms against numpy
integration and their harmonics against Parseval's theorem; McLyman's gapped inductance with fringing.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import constants, integrate

from specgen.api import demo_specs, design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.errors import SpecError
from specgen.physics import flyback as fb

DEMOS = {p.stem: p for p in demo_specs()}


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def fly(cat):
    return design_file(DEMOS["BH-7065"], cat=cat)


def _variant(old: str, new: str) -> str:
    text = DEMOS["BH-7065"].read_text(encoding="utf-8")
    assert old in text, f"BH-7065.yaml no longer contains {old!r}"
    return text.replace(old, new, 1)


def _w(d, name):
    return next(w for w in d.flyback.windings if w.name == name)


def test_the_65_w_flyback_designs(fly):
    f = fly.flyback
    assert fly.kind == "flyback" and not fly.failed
    assert f.output_power_w == pytest.approx((19.0 + 0.5) * 3.42 + (15.0 + 0.5) * 0.05)
    assert f.mode == "dcm" and f.mode_at_high_line == "dcm"
    assert 50e-6 < f.inductance_h < 500e-6 and 0.0 < f.gap_m < 2e-3


def test_dcm_power_is_the_energy_per_cycle_times_f(fly):
    """DCM: P_in = 1/2 L_p I_pk^2 f (the whole stored energy is delivered each cycle)."""
    f = fly.flyback
    i_pk = _w(fly, "P").peak_current_a
    assert 0.5 * f.inductance_h * i_pk ** 2 * fly.frequency_hz == pytest.approx(f.input_power_w, rel=1e-9)
    assert f.input_power_w == pytest.approx(f.output_power_w / 0.87, rel=1e-12)
    assert fly.inductor.energy_j == pytest.approx(0.5 * f.inductance_h * i_pk ** 2, rel=1e-12)


def test_reflected_voltage_and_duty(fly):
    """V_R = (V_out + V_f) N_p / N_s; DCM duty at the lowest input D = L_p I_pk f / V_in (V = L di/dt)."""
    f = fly.flyback
    n_p, n_s = fly.winding("P").turns, fly.winding("S").turns
    assert f.reflected_voltage_v == pytest.approx((19.0 + 0.5) * n_p / n_s, rel=1e-12)
    i_pk = _w(fly, "P").peak_current_a
    assert f.duty_max == pytest.approx(f.inductance_h * i_pk * fly.frequency_hz / 90.0, rel=1e-9)
    assert f.duty_max <= 0.45 * 1.02        # the duty wanted (whole turns may move it a little)
    # the reset must end within the period for DCM: D + D V_in / V_R < 1
    assert f.duty_max * (1.0 + 90.0 / f.reflected_voltage_v) < 1.0


def test_peak_flux_and_swing(fly):
    """B_pk = L_p I_pk / (N_p A_e); in DCM the swing is the whole peak."""
    f = fly.flyback
    n_p = fly.winding("P").turns
    b = f.inductance_h * _w(fly, "P").peak_current_a / (n_p * fly.core.ae_m2)
    assert fly.b_peak_max_t == pytest.approx(b, rel=1e-9)
    assert f.delta_b_t == pytest.approx(b, rel=1e-9)
    assert b < fly.b_sat_hot_t


def test_gap_gives_l_p_by_mclyman(fly, cat):
    """L = mu0 N^2 A_e F / (l_g + l_e / mu_r), F = 1 + (l_g / sqrt(A_e)) ln(2 G / l_g) (McLyman), scipy's mu0."""
    f = fly.flyback
    n_p = fly.winding("P").turns
    ae, le, lg = fly.core.ae_m2, fly.core.le_m, f.gap_m
    mat = cat.materials[cat.cores[fly.core.id].material]
    fr = 1.0 + lg / math.sqrt(ae) * math.log(2.0 * fly.core.window_breadth_m / lg)
    l_ref = constants.mu_0 * n_p ** 2 * ae * fr / (lg + le / mat.mu_initial)
    assert f.inductance_h == pytest.approx(l_ref, rel=1e-5)
    assert f.inductance_h >= fly.inductor.target_h * (1 - 1e-9)      # the gap rounded down: at least L_p


def test_output_voltages_from_whole_turns(fly):
    n_s, n_a = fly.winding("S").turns, fly.winding("AUX").turns
    aux = (19.0 + 0.5) * n_a / n_s - 0.5
    assert _w(fly, "AUX").output_voltage_v == pytest.approx(aux, rel=1e-12)
    assert abs(aux - 15.0) / 15.0 <= 0.05


def test_trapezoid_rms_against_numpy_integration():
    """I_rms = sqrt(D (I_pk^2 - I_pk dI + dI^2 / 3)) against scipy's quadrature of i(t)^2."""
    for i_pk, di, d in ((4.0, 4.0, 0.4), (3.0, 1.2, 0.55), (2.0, 0.5, 0.2)):
        def sq(t, i_pk=i_pk, di=di, d=d):
            return (i_pk - di + di * t / d) ** 2 if t < d else 0.0
        want = math.sqrt(integrate.quad(sq, 0.0, 1.0, points=[d])[0])
        assert fb.trapezoid_rms_a(i_pk, di, d) == pytest.approx(want, rel=1e-9)


def test_harmonics_satisfy_parseval():
    """DC^2 + sum of harmonic rms^2 tends to the rms^2 (Parseval); the DC is the pulse's mean."""
    dc, h = fb.trapezoid_harmonics(4.0, 4.0, 0.4, True, count=1000)
    rms = fb.trapezoid_rms_a(4.0, 4.0, 0.4)
    assert dc == pytest.approx(0.5 * 4.0 * 0.4, rel=1e-3)     # sampled on 4096 points a period
    assert dc ** 2 + float(np.sum(h ** 2)) == pytest.approx(rms ** 2, rel=2e-3)


def test_ccm_volt_second_balance_and_ripple_ratio(cat):
    """CCM: D = V_R / (V_R + V_in); the swing over the peak is the ripple ratio asked for (the gap rounded down
    to the shop's 0.01 mm raises L_p a little, so the ratio comes out a little lower)."""
    d = design_text(_variant("mode: dcm", "mode: ccm\n  ripple_ratio: 0.5"), "BH-7065.yaml", cat=cat)
    f = d.flyback
    assert f.mode == "ccm"
    assert f.duty_max == pytest.approx(f.reflected_voltage_v / (f.reflected_voltage_v + 90.0), rel=1e-12)
    ratio = d.inductor.ripple_a / d.inductor.current_peak_a
    assert 0.45 < ratio <= 0.5 + 1e-9
    op = fb.operating_point(f.inductance_h, 90.0, f.reflected_voltage_v, f.input_power_w, d.frequency_hz)
    # the input power is the on-time average current times V_in times D
    assert 90.0 * op.duty * (op.i_peak_a - op.i_ripple_a / 2.0) == pytest.approx(f.input_power_w, rel=1e-9)


def test_boundary_inductance():
    """At the boundary the DCM and CCM operating points meet: the same duty and a swing equal to the peak."""
    lb = fb.boundary_inductance_h(100.0, 80.0, 60.0, 100e3)
    dcm = fb.operating_point(lb * (1 - 1e-9), 100.0, 80.0, 60.0, 100e3)
    ccm = fb.operating_point(lb * (1 + 1e-9), 100.0, 80.0, 60.0, 100e3)
    assert dcm.mode == "dcm" and ccm.mode == "ccm"
    assert dcm.duty == pytest.approx(80.0 / 180.0, rel=1e-6) and ccm.duty == pytest.approx(80.0 / 180.0)
    assert ccm.i_ripple_a == pytest.approx(ccm.i_peak_a, rel=1e-6)
    assert dcm.duty + dcm.reset_duty == pytest.approx(1.0, rel=1e-6)


def test_leakage_and_clamp_energy(fly):
    f = fly.flyback
    assert 0.002 * f.inductance_h < f.leakage_inductance_h < 0.05 * f.inductance_h    # 0.2-5 % (common practice)
    assert f.clamp_energy_j == pytest.approx(0.5 * f.leakage_inductance_h * _w(fly, "P").peak_current_a ** 2)
    assert f.clamp_power_w == pytest.approx(f.clamp_energy_j * fly.frequency_hz)


def test_test_sheet_lp_leakage_ratios_and_out_of_phase_polarity(fly):
    names = [l.name for l in fly.tests.inductance]
    assert names[0] == "primary inductance L_p" and "leakage inductance" in names
    assert "shorted" in fly.tests.inductance[-1].condition
    assert {l.item for l in fly.tests.ratio} == {"P:S", "P:AUX"}
    ratio = next(l for l in fly.tests.ratio if l.item == "P:S")
    assert ratio.nominal == pytest.approx(fly.winding("P").turns / fly.winding("S").turns)
    assert all("out of phase" in p for p in fly.tests.polarity)


@pytest.mark.parametrize("old,new,needle", [
    ("  mode: dcm\n", "  mode: dcm\n  ripple: 1 A\n", "'ripple' is not used by kind flyback"),
    ("  frequency: 65 kHz\n", "  frequency: 65 kHz\n  waveform: square\n", "'waveform' is not used by kind flyback"),
    ("  gap_arrangement: centre\n", "  gap: 0.5 mm\n", "'gap' is not used by kind flyback"),
    ("    current: 3.42 A\n", "", "needs its output voltage and its DC load current"),
    ("  mode: dcm\n", "", "give either mode"),
    ("  mode: dcm\n", "  mode: dcm\n  ripple_ratio: 0.5\n", "'ripple_ratio' is not used by kind flyback in mode dcm"),
])
def test_spec_mistakes_are_located(cat, old, new, needle):
    with pytest.raises(SpecError) as err:
        design_text(_variant(old, new), "BH-7065.yaml", cat=cat)
    assert needle in str(err.value)
    assert "BH-7065.yaml:" in str(err.value)


def test_json_carries_the_flyback_figures(fly):
    out = fly.to_dict()
    assert out["kind"] == "flyback" and out["mode"] == "dcm"
    for key in ("inductance_h", "gap_mm", "duty_max", "reflected_voltage_v", "b_peak_t", "delta_b_t",
                "leakage_inductance_h"):
        assert math.isfinite(out[key]), key
    for w in out["windings"]:
        assert w["peak_current_a"] > 0 and w["rms_current_a"] > 0
