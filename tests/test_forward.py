"""Forward converter transformers: the reset winding, its duty limit, the flux swing, its current; the
forward output load.

Sources named beside each check: R. W. Erickson, D. Maksimovic, "Fundamentals of Power Electronics", 2nd
ed., Kluwer 2001, section 6.3.2 (the single-switch forward converter with a reset winding: D <= 1 / (1 +
n2/n1), switch voltage V_g (1 + n1/n2); from memory) and Faraday's law; the independent checks integrate the
winding voltages and sample the currents with numpy.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from specgen.api import design_file
from specgen.design.spec import load_spec_text
from specgen.errors import SpecError
from specgen.physics import forward as fw

ROOT = Path(__file__).resolve().parent.parent
CATALOG = ROOT / "catalog"
DEMO = ROOT / "specgen" / "demo" / "BH-2270.yaml"


@pytest.fixture(scope="module")
def demo():
    return design_file(DEMO, CATALOG)


def _w(d, name):
    return next(w for w in d.windings if w.name == name)


def _variant(old: str, new: str) -> str:
    text = DEMO.read_text(encoding="utf-8")
    assert old in text, f"BH-2270.yaml no longer contains {old!r}"
    return text.replace(old, new, 1)


def _flux_at_period_end(duty: float, n_p: int, n_r: int, steps: int = 20000) -> float:
    """Core flux (in units of V T / N_p) after one period by integrating the primary-referred voltage: +V
    while on, -V N_p / N_r while the reset diode conducts (while any flux is left), 0 after. numpy."""
    t = np.linspace(0.0, 1.0, steps + 1)
    dt = t[1] - t[0]
    phi = 0.0
    for x in t[:-1]:
        if x < duty:
            phi += dt
        elif phi > 0.0:
            phi -= dt * n_p / n_r
    return phi


@pytest.mark.parametrize("n_p, n_r", [(20, 20), (30, 20), (20, 30), (12, 18)])
def test_duty_limit_by_volt_second_balance(n_p, n_r):
    # Erickson & Maksimovic 6.3.2: D_max = 1 / (1 + n2/n1); checked against the numerical volt-second
    # balance: the largest duty whose flux is back to zero at the end of the period (bisection over numpy)
    lo, hi = 0.05, 0.95
    for _ in range(30):
        mid = 0.5 * (lo + hi)
        if _flux_at_period_end(mid, n_p, n_r, 4000) <= 1e-3:
            lo = mid
        else:
            hi = mid
    assert fw.reset_duty_limit(n_p, n_r) == pytest.approx(lo, abs=2e-3)
    assert fw.reset_duty_limit(n_p, n_r) == pytest.approx(1.0 / (1.0 + n_r / n_p), rel=1e-12)


def test_one_to_one_reset_is_half_duty_and_twice_the_input():
    # Erickson & Maksimovic 6.3.2, the usual 1:1 reset winding: D <= 0.5 and the switch sees 2 V_g
    assert fw.reset_duty_limit(24, 24) == pytest.approx(0.5)
    assert fw.switch_voltage_v(48.0, 24, 24) == pytest.approx(96.0)
    assert fw.switch_voltage_v(48.0, 30, 20) == pytest.approx(48.0 * 2.5)


def test_reset_current_by_sampling():
    # the magnetising current V D / (f L_m) referred to the reset winding, falling to zero over D N_r / N_p:
    # rms and mean of the sampled triangle (numpy), against the closed form
    v, d, f, lm, n_p, n_r = 48.0, 0.4, 150e3, 300e-6, 30, 20
    pk, rms, avg = fw.reset_winding_current_a(v, d, f, lm, n_p, n_r)
    assert pk == pytest.approx(v * d / f / lm * n_p / n_r)
    t = (np.arange(400000) + 0.5) / 400000 / f
    t_on, t_r = d / f, d / f * n_r / n_p
    i = np.where((t >= t_on) & (t < t_on + t_r), pk * (1.0 - (t - t_on) / t_r), 0.0)
    assert rms == pytest.approx(math.sqrt(np.mean(i * i)), rel=1e-4)
    assert avg == pytest.approx(float(np.mean(i)), rel=1e-4)


def test_forward_output_winding_rms_by_sampling():
    # the output choke's DC current for the on-time: rms I sqrt(D) (Erickson & Maksimovic 6.3.2), sampled
    i = np.where((np.arange(100000) + 0.5) / 100000 < 0.4, 5.0, 0.0)
    assert fw.output_winding_rms_a(5.0, 0.4) == pytest.approx(math.sqrt(np.mean(i * i)), rel=1e-6)


def test_demo_reset_winding(demo):
    p, r, s = _w(demo, "P"), _w(demo, "R"), _w(demo, "S")
    assert not demo.failed
    rs = demo.reset
    assert r.turns == p.turns == rs.turns                      # 1:1, wound with P
    assert rs.duty_max == pytest.approx(p.turns / (p.turns + r.turns))
    # Faraday over the on-time at the top of the input (numpy integral of the flat pulse): Delta B from B_r
    t = np.linspace(0.0, demo.duty / demo.frequency_hz, 1001)
    volt_s = float(np.trapezoid(np.full_like(t, p.voltage_max_v), t))
    dB = volt_s / (p.turns * demo.core.ae_m2)
    assert rs.delta_b_t == pytest.approx(dB, rel=1e-9)
    assert demo.b_peak_max_t == pytest.approx(dB, rel=1e-9)
    assert rs.b_end_t == pytest.approx(rs.b_r_t + dB)
    assert rs.b_end_t < rs.b_sat_hot_t
    assert rs.switch_voltage_v == pytest.approx(2.0 * p.voltage_max_v)
    # the reset winding carries the magnetising current only: its rms at the nominal input from L_m
    pk_m = p.voltage_v * demo.duty / demo.frequency_hz / demo.magnetizing_inductance_h
    assert r.current_a == pytest.approx(pk_m * math.sqrt(demo.duty / 3.0), rel=1e-9)
    assert r.current_a < 0.2 * p.current_a
    # the forward output: rms I_dc sqrt(D); the primary carries it referred (plus the magnetising ramp)
    assert s.current_a == pytest.approx(5.0 * math.sqrt(0.4), rel=1e-12)
    ref = s.current_a * s.turns / p.turns
    assert p.current_a == pytest.approx(math.hypot(ref / demo.efficiency, demo.magnetizing_current_a), rel=0.02)


def test_demo_reset_tests(demo):
    ratio = {x.item: x for x in demo.tests.ratio}
    assert ratio["P:R"].nominal == pytest.approx(1.0)
    assert any(x.item == "R" for x in demo.tests.dcr)
    line = next(x for x in demo.tests.polarity if "reset winding R" in x)
    assert "anti-phase" in line and "supply return" in line


def test_demo_reset_json(demo):
    out = demo.to_dict()["reset"]
    assert out["winding"] == "R" and out["duty_max"] == pytest.approx(0.5)
    assert set(out) >= {"turns", "delta_b_t", "b_end_t", "current_rms_a", "switch_voltage_v"}


def test_a_reset_winding_of_fewer_turns_allows_more_duty():
    # N_p : N_r = 1.5 (not wound together): D_max = 0.6, the switch sees V (1 + 1.5); the duty 0.55 that a
    # 1:1 winding refuses is allowed
    text = _variant("    turns_ratio: 1          # N_p : N_reset\n    wound_with: P\n",
                    "    turns_ratio: 1.5\n").replace("duty: 0.4 ", "duty: 0.55 ")
    d = design_file_text(text)
    p, r = _w(d, "P"), _w(d, "R")
    assert r.turns == round(p.turns / 1.5)
    assert d.reset.duty_max == pytest.approx(p.turns / (p.turns + r.turns))
    assert d.reset.switch_voltage_v == pytest.approx(p.voltage_max_v * (1 + p.turns / r.turns))
    assert not any(c.code == "reset" and c.level == "fail" for c in d.checks)


def test_fixed_reset_turns_are_checked_by_the_design():
    # a reset winding of fixed turns, not wound with P: its D_max is N_p / (N_p + N_r) at the primary the
    # design finds, so a duty past it is the design's failed reset check, not a parse error
    text = _variant("    turns_ratio: 1          # N_p : N_reset\n    wound_with: P\n", "    turns: 40\n").replace(
        "duty: 0.4 ", "duty: 0.3 ")
    d = design_file_text(text)
    p, r = _w(d, "P"), _w(d, "R")
    assert r.turns == 40 and d.reset.duty_max == pytest.approx(p.turns / (p.turns + 40))
    assert d.reset.duty_max < 0.3
    fail = next(c for c in d.checks if c.code == "reset")
    assert fail.level == "fail" and "not reset before the next pulse" in fail.message


def design_file_text(text: str):
    import tempfile

    with tempfile.TemporaryDirectory() as tmp_dir:
        path = Path(tmp_dir) / "BH-2270.yaml"
        path.write_text(text, encoding="utf-8")
        return design_file(path, CATALOG)


@pytest.mark.parametrize("old, new, words, path", [
    ("waveform: unipolar", "waveform: square", "unipolar pulse", "windings[1].role"),
    ("duty: 0.4 ", "duty: 0.55 ", "beyond what a 1:1 reset winding", "operating.duty"),
    ("    turns_ratio: 1          # N_p : N_reset\n", "    turns_ratio: 2\n", "turns_ratio 1", "windings[1].turns_ratio"),
    ("    load: forward\n", "    load: forward\n    turns_ratio: 1\n", "reset winding", "windings[2].turns_ratio"),
    ("    turns_ratio: 1          # N_p : N_reset\n", "    turns_ratio: 1\n    current: 1 A\n", "not used on a reset",
     "windings[1].current"),
    ("    turns_ratio: 1          # N_p : N_reset\n", "    turns_ratio: 1\n    turns: 12\n", "turns_ratio",
     "windings[1].turns"),
    ("    turns_ratio: 1          # N_p : N_reset\n", "    turns: 12\n", "wound with the primary",
     "windings[1].turns"),
])
def test_bad_reset_is_located(old, new, words, path):
    with pytest.raises(SpecError, match=words) as err:
        load_spec_text(_variant(old, new).replace("load: forward", "load: converter"), "x.yaml")
    assert err.value.path == path and err.value.line


def test_forward_load_needs_a_unipolar_drive():
    text = _variant("waveform: unipolar", "waveform: square").replace(
        "  - name: R\n    role: reset\n    turns_ratio: 1          # N_p : N_reset\n    wound_with: P\n"
        "    wire: auto\n    start: \"3\"\n    finish: \"4\"\n    direction: cw\n", "")
    with pytest.raises(SpecError, match="load forward") as err:
        load_spec_text(text, "x.yaml")
    assert err.value.path == "windings[1].load"
