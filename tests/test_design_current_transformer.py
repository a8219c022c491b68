"""Current transformers: the 1:100 sense transformer BH-6100 (10 ohm burden) against the magnetising-branch
phasor analysis of the instrument current transformer, worked here independently with numpy complex numbers
(the secondary current fixed, the primary found from it: the reverse of the engine's current divider), and
the textbook small-error approximations; plus the knee burden, the spec's refusals and the documents.

Sources: the current-transformer equivalent circuit and its phasor diagram as worked in the standard
instrument-transformer and electrical-measurement texts; ratio error and phase displacement as IEC 61869-2
defines them (from memory); Faraday's law V = 4.44 f N B A (McLyman).
"""

from __future__ import annotations

import math
import re

import numpy as np
import pytest
from scipy import constants

from specgen.api import demo_specs, design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.errors import SpecError
from specgen.physics import current_transformer as ctp

DEMOS = {p.stem: p for p in demo_specs()}


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def ct(cat):
    return design_file(DEMOS["BH-6100"], cat=cat)


def _variant(old: str, new: str) -> str:
    text = DEMOS["BH-6100"].read_text(encoding="utf-8")
    assert old in text, f"BH-6100.yaml no longer contains {old!r}"
    return text.replace(old, new, 1)


def _reference_errors(i_s: float, r_loop: float, xm: float, rc: float) -> tuple[complex, float, float]:
    """The phasor diagram of the texts: I_s on the real axis, V_s = I_s R_loop in phase with it (resistive
    burden); the exciting current I_e = V_s / R_c (in phase with V_s) - j V_s / X_m (lagging V_s by 90 degrees);
    the primary referred to the secondary is I_p / n = I_s + I_e. Ratio error (|I_s| - |I_p/n|) / |I_p/n| in %,
    phase displacement arg(I_s) - arg(I_p) in degrees (IEC 61869-2 signs, from memory)."""
    v_s = i_s * r_loop
    i_e = v_s / rc - 1j * v_s / xm
    ip_n = i_s + i_e
    return ip_n, (i_s - abs(ip_n)) / abs(ip_n) * 100.0, -math.degrees(np.angle(ip_n))


def test_demo_is_a_1_to_100_ct_with_a_10_ohm_burden(ct):
    c = ct.current_transformer
    assert ct.kind == "current_transformer"
    assert (c.primary_turns, c.secondary_turns, c.burden_ohm) == (1, 100, 10.0)
    assert c.secondary_current_a == pytest.approx(0.2)        # 20 A / 100
    assert not ct.failed


def test_secondary_voltage_and_flux_follow_ohm_and_faraday(ct):
    """V_s = I_s (R_b + R_w); B_pk = V_s / (4.44 f N_s A_e) with 4.44 = 2 pi / sqrt 2 (McLyman)."""
    c = ct.current_transformer
    v_s = c.secondary_current_a * (c.burden_ohm + c.winding_resistance_ohm)
    assert c.secondary_voltage_v == pytest.approx(v_s, rel=1e-12)
    b = v_s * math.sqrt(2.0) / (2.0 * math.pi * ct.frequency_hz * c.secondary_turns * ct.core.ae_m2)
    assert ct.b_peak_t == pytest.approx(b, rel=1e-9)
    assert ct.b_peak_max_t == pytest.approx(b * 30.0 / 20.0, rel=1e-9)
    # the winding resistance the secondary current meets: the hot DCR times its AC factor
    s = ct.winding("S")
    assert c.winding_resistance_ohm == pytest.approx(s.dcr_hot_ohm * s.fr, rel=1e-9)


def test_magnetising_inductance_from_the_core(ct, cat):
    """L_m = mu0 mu_i N^2 A_e / l_e (ungapped ring; scipy's mu0)."""
    c = ct.current_transformer
    mu_i = cat.materials[cat.cores[ct.core.id].material].mu_initial
    lm = constants.mu_0 * mu_i * c.secondary_turns ** 2 * ct.core.ae_m2 / ct.core.le_m
    assert c.magnetizing_inductance_h == pytest.approx(lm, rel=1e-6)


def test_ratio_and_phase_error_reproduce_the_phasor_analysis(ct):
    """The engine drives with the primary current; the reference fixes the secondary current the engine found
    and rebuilds the primary from the phasor diagram: both must describe the same circuit."""
    c = ct.current_transformer
    xm = 2.0 * math.pi * ct.frequency_hz * c.magnetizing_inductance_h
    rc = c.secondary_voltage_v / c.core_loss_current_a
    r_loop = c.burden_ohm + c.winding_resistance_ohm
    # the engine's secondary current magnitude at the rated primary current
    i_s = c.secondary_current_a * (1.0 + c.ratio_error_pct / 100.0)
    ip_n, ratio_pct, phase_deg = _reference_errors(i_s, r_loop, xm, rc)
    assert abs(ip_n) == pytest.approx(c.secondary_current_a, rel=1e-9)     # back to 20 A / 100
    assert c.ratio_error_pct == pytest.approx(ratio_pct, rel=1e-6)
    assert c.phase_error_deg == pytest.approx(phase_deg, rel=1e-6)
    # the secondary leads the primary (positive displacement) and the core takes current (negative ratio error)
    assert c.phase_error_deg > 0 and c.ratio_error_pct < 0
    # plausible for a 1:100 sense ring: about a minute of arc, hundredths of a percent
    assert 0.5 < c.phase_error_deg * 60 < 3.0
    assert -0.05 < c.ratio_error_pct < 0.0


def test_small_error_approximations_of_the_texts(ct):
    """For a resistive burden and small errors the texts approximate: ratio error ~ -I_c / I_s x 100 %,
    phase displacement ~ I_m / I_s radians (from memory)."""
    c = ct.current_transformer
    assert c.phase_error_deg == pytest.approx(math.degrees(c.magnetizing_current_a / c.secondary_current_a), rel=1e-3)
    assert c.ratio_error_pct == pytest.approx(-c.core_loss_current_a / c.secondary_current_a * 100.0, rel=0.02)


def test_hand_worked_phasor_example():
    """A worked example by hand: I_p = 500 A, 1:100 (I_p/n = 5 A), R_loop = 0.4 ohm, X_m = 100 ohm, no core loss.
    Z_m = j100; I_s = 5 x j100 / (0.4 + j100): |I_s| = 5 / sqrt(1 + 0.004^2) = 4.99996 A,
    phase = atan(0.4 / 100) = 0.22918 degrees = 13.75 minutes."""
    ratio = ctp.ratio_error_pct(500.0, 100.0, 0.4, 100.0, math.inf)
    phase = ctp.phase_error_deg(500.0, 100.0, 0.4, 100.0, math.inf)
    assert ratio == pytest.approx((1.0 / math.sqrt(1.0 + 0.004 ** 2) - 1.0) * 100.0, rel=1e-9)
    assert phase == pytest.approx(math.degrees(math.atan(0.004)), rel=1e-9)
    assert phase * 60 == pytest.approx(13.75, abs=0.01)


def test_knee_burden_is_where_the_core_reaches_b_sat(ct):
    """At the knee burden the top-of-range secondary voltage reaches B_sat at the hot spot (Faraday)."""
    c = ct.current_transformer
    i_s_max = c.primary_current_max_a / c.turns_ratio
    v = i_s_max * (c.knee_burden_ohm + c.winding_resistance_ohm)
    b = v / (2.0 * math.pi / math.sqrt(2.0) * ct.frequency_hz * c.secondary_turns * ct.core.ae_m2)
    assert b == pytest.approx(ct.b_sat_hot_t, rel=1e-9)


def test_a_burden_past_the_knee_fails_saturation(ct, cat):
    """Each design's own knee: a larger burden heats a ferrite ring (core loss rises as B^beta) and B_sat
    falls with temperature, so the knee is read from the design that carries the burden."""
    knee = ct.current_transformer.knee_burden_ohm
    for burden, fails in ((knee * 0.5, False), (knee * 1.1, True)):
        d = design_text(_variant("burden: 10 ohm", f"burden: {burden:.6g} ohm"), "BH-6100.yaml", cat=cat)
        level = next(ch for ch in d.checks if ch.code == "saturation").level
        assert (level == "fail") == fails
        assert (d.current_transformer.knee_burden_ohm < d.current_transformer.burden_ohm) == fails


def test_accuracy_wanted_is_checked(cat):
    d = design_text(_variant("accuracy: {ratio_error: 1.0, phase_error: 1.0}",
                             "accuracy: {ratio_error: 1.0, phase_error: 0.005}"), "BH-6100.yaml", cat=cat)
    assert [c.code for c in d.failed] == ["ct-phase-error"]


def test_unipolar_current_warns(cat):
    d = design_text(_variant("current_shape: sine", "current_shape: unipolar"), "BH-6100.yaml", cat=cat)
    assert any(c.code == "ct-dc" for c in d.warnings)


def test_burden_in_va_is_the_same_burden(cat, ct):
    """10 ohm at 0.2 A is 0.4 VA."""
    d = design_text(_variant("burden: 10 ohm", "burden_va: 0.4 VA"), "BH-6100.yaml", cat=cat)
    assert d.current_transformer.burden_ohm == pytest.approx(10.0)


@pytest.mark.parametrize("old,new,needle", [
    ("  burden: 10 ohm\n", "  burden: 10 ohm\n  ripple: 1 A\n", "'ripple' is not used by kind current_transformer"),
    ("    wire: auto\n", "    wire: auto\n    voltage: 5 V\n", "'voltage' is not used by kind current_transformer"),
    ("  id: T-FHMU-25X15X10\n", "  id: T-FHMU-25X15X10\n  gap: 0.1 mm\n", "'gap' is not used by kind current_transformer"),
    ("  frequency: 50 kHz\n", "  frequency: 50 kHz\n  waveform: square\n",
     "'waveform' is not used by kind current_transformer"),
    ('turns_ratio: "1:100"', 'turns_ratio: "3:100"', "whole number of turns"),
    ("  burden: 10 ohm\n", "", "give either burden"),
])
def test_spec_mistakes_are_located(cat, old, new, needle):
    with pytest.raises(SpecError) as err:
        design_text(_variant(old, new), "BH-6100.yaml", cat=cat)
    assert needle in str(err.value)
    assert "BH-6100.yaml:" in str(err.value)


def test_open_secondary_caution_on_the_test_plan_and_the_work_order(ct, cat):
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import render_work_order_html

    assert any("open-circuit the secondary" in c for c in ct.tests.cautions)
    html = render_work_order_html(ct, DocumentSettings.from_shop(cat.shop), number="WO-TEST-1", qty=10, draft=True)
    assert html.count("open-circuit the secondary") >= 2      # the winding steps and the test sheet
    assert "licensed practice" in html
    # an open secondary under primary current can reach a hazardous voltage that could kill: the signal word
    # WARNING with its safety colour, orange (ANSI Z535.4 / ISO 3864-2, from memory: DANGER red for what will
    # kill, WARNING orange for what could, CAUTION yellow for minor injury)
    boxes = re.findall(r'<div class="caution ([^"]*)">\s*<div class="caution-title">([A-Z]+): open secondary', html)
    assert len(boxes) == 2 and all("sign-warning" in cls and word == "WARNING" for cls, word in boxes), boxes


def test_json_carries_the_ct_figures(ct):
    out = ct.to_dict()
    assert out["kind"] == "current_transformer" and out["ratio"] == "1:100"
    for key in ("burden_ohm", "ratio_error_pct", "phase_error_deg", "b_peak_t", "knee_burden_ohm"):
        assert math.isfinite(out[key])
    # read at a low level with the ratio tester (the station has no 20 A, 50 kHz source): Ns / Np
    ratio = out["tests"]["ratio"][0]
    assert ratio["unit"] == ":1" and ratio["nominal"] == 100.0 and ratio["setting"]["instrument"] == "turns-ratio tester"


def test_pass_through_primary_barrier_is_coordinated(ct):
    """The bus conductor through the bore against the secondary: the outer wrap's half-lapped layers (creepage
    along the laps: 12 mm x 0.5 x 1 layer, common practice) against IEC 60664-1's basic creepage at 400 V
    (4.0 mm, pollution degree 2, material group IIIa; from memory)."""
    b = next(x for x in ct.insulation.barriers if x.between == ("conductor", "S"))
    assert b.ok and b.creepage_available_mm == pytest.approx(6.0)
    assert b.creepage_required_mm == pytest.approx(4.0)
    hip = next(h for h in ct.tests.hipot if h.between == "conductor - S")
    assert "test conductor" in hip.connection and "S1-S2" in hip.connection


def test_pass_through_primary_needs_its_barrier_and_a_wrap(cat):
    text = DEMOS["BH-6100"].read_text(encoding="utf-8")
    start = text.index("    - between: [conductor, S]")
    end = text.index("working_voltage: 400 V\n", start) + len("working_voltage: 400 V\n")
    d = design_text(text[:start] + text[end:], "BH-6100.yaml", cat=cat)
    assert any(c.code == "ct-primary-barrier" and c.level == "warn" for c in d.checks)
    assert not any(c.code == "ct-primary-barrier" for c in design_file(DEMOS["BH-6100"], cat=cat).checks)
    bare = design_text(_variant("  outer_wrap: {tape: TAPE-PET25-12MM, layers: 1}\n", ""), "BH-6100.yaml", cat=cat)
    b = next(x for x in bare.insulation.barriers if x.between == ("conductor", "S"))
    assert not b.ok and "nothing insulates the winding from the conductor" in b.message


def test_conductor_barrier_only_for_a_pass_through_primary(cat):
    wound = _variant("  primary_turns: 1 ", "  primary_turns: 2 ").replace(
        "windings:\n", "windings:\n  - {name: P, role: primary, wire: auto, start: P1, finish: P2, direction: cw}\n", 1)
    with pytest.raises(SpecError) as err:
        design_text(wound, "BH-6100.yaml", cat=cat)
    assert "names 'conductor'" in str(err.value) and "BH-6100.yaml:" in str(err.value)
    choke = next(p for p in demo_specs() if p.stem == "BH-8210").read_text(encoding="utf-8")
    choke = choke.replace("    - between: [L, N]", "    - between: [conductor, L]", 1)
    with pytest.raises(SpecError) as err:
        design_text(choke, "BH-8210.yaml", cat=cat)
    assert "'conductor' (a primary passed through the core) is not used by kind common_mode_choke" in str(err.value)
    assert "BH-8210.yaml:" in str(err.value) and "barriers[0]" in str(err.value)
