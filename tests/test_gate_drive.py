"""A gate-drive transformer's load: charge pulses, not power.

Sources named beside each check: L. Balogh, "Fundamentals of MOSFET and IGBT Gate Driver Circuits", Texas
Instruments application report SLUA618 (the gate-drive power P = V_DRV Q_G f_DRV; from memory); the
exponential charging of a capacitance through a resistance, integrated here with numpy as the independent
check; the ampere-turn balance of an ideal transformer for the primary current.
"""

from __future__ import annotations

import math
import tempfile
from pathlib import Path

import numpy as np
import pytest

from specgen import units
from specgen.api import design_file
from specgen.design.spec import load_spec_text
from specgen.errors import SpecError
from specgen.physics import gate_drive as gd

CATALOG = Path(__file__).resolve().parent.parent / "catalog"

GDT = """\
part: BH-9901
title: Gate-drive transformer 12 V 1:1:1, 200 kHz
revision: A
status: draft
kind: transformer
core:
  id: T-F100-25X15X10
operating:
  frequency: 200 kHz
  waveform: square
  ambient: 40 degC
windings:
  - {name: P, role: primary, voltage: 12 V, wire: auto, start: "1", finish: "2"}
  - name: S1
    role: secondary
    voltage: 12 V
    load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}
    wire: auto
    start: "3"
    finish: "4"
  - name: S2
    role: secondary
    voltage: 12 V
    load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}
    wire: auto
    start: "5"
    finish: "6"
"""


def _design(text: str):
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "gdt.yaml"
        path.write_text(text, encoding="utf-8")
        return design_file(path, CATALOG)


def _simulated_gate(q_c: float, v: float, f: float, r: float, steps: int = 200000) -> np.ndarray:
    """The loop current over one period: the gate (C = Q / V) charged from +V at t = 0 and discharged to 0 at
    T/2 through R, integrated by exact exponential steps (numpy)."""
    c = q_c / v
    t = np.arange(steps) / steps / f
    drive = np.where(t < 0.5 / f, v, 0.0)
    dt = 1.0 / f / steps
    vc, out = 0.0, np.empty(steps)
    decay = math.exp(-dt / (r * c))
    for k in range(steps):
        out[k] = (drive[k] - vc) / r
        vc = drive[k] + (vc - drive[k]) * decay
    return out


def test_pulse_rms_and_power_against_a_simulated_gate():
    # Balogh SLUA618: the gate loop dissipates Q_g V_g f; the rms of the simulated charge and discharge
    # pulses gives exactly that in R, and each edge moves the charge Q_g
    q, v, f, r = 60e-9, 12.0, 200e3, 5.0
    i = _simulated_gate(q, v, f, r)
    rms = math.sqrt(float(np.mean(i * i)))
    assert gd.pulse_rms_a(q, v, f, r) == pytest.approx(rms, rel=2e-3)
    assert gd.drive_power_w(q, v, f) == pytest.approx(rms * rms * r, rel=4e-3)
    half = len(i) // 2
    assert float(np.sum(i[:half])) / len(i) / f == pytest.approx(q, rel=2e-3)     # charge per edge
    assert gd.average_current_a(q, f) == pytest.approx(float(np.mean(np.clip(i, 0.0, None))), rel=2e-3)
    assert gd.pulse_peak_a(v, r) == pytest.approx(float(i.max()), rel=1e-6)


def test_charge_unit():
    assert units.parse("60 nC", "charge") == pytest.approx(60e-9)
    assert units.parse("0.06 uC", "charge") == pytest.approx(60e-9)


def test_gate_drive_windings_and_primary():
    d = _design(GDT)
    assert not d.failed
    w = {x.name: x for x in d.windings}
    loads = {ld.winding: ld for ld in d.loads}
    i_rms = math.sqrt(60e-9 * 12.0 * 200e3 / 5.0)
    for s in ("S1", "S2"):
        assert w[s].current_a == pytest.approx(i_rms, rel=1e-12)
        assert loads[s].dc_current_a == pytest.approx(60e-9 * 200e3)          # Q_g f
        assert loads[s].power_w == pytest.approx(60e-9 * 12.0 * 200e3)        # Q_g V_g f
    # ampere-turn balance: the pulses referred by the voltage ratio, with the magnetising current in
    # quadrature, and no efficiency (the pulses are not power: dividing by the 80 % the part shows made the
    # primary's current and wire grow with the losses)
    referred = sum(12.0 * w[s].current_a for s in ("S1", "S2")) / 12.0
    assert w["P"].current_a == pytest.approx(math.hypot(referred, d.magnetizing_current_a), rel=1e-9)
    assert d.efficiency is not None and d.efficiency < 0.9
    assert w["P"].current_a < 1.02 * referred


@pytest.mark.parametrize("old, new, words, path", [
    ("load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}",
     "load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}\n    current: 0.2 A",
     "not used with a gate_drive", "windings[1].current"),
    ("load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}", "load: {type: gate_drive, gate_resistance: 5 ohm}",
     "gate_charge", "windings[1].load.gate_charge"),
    ("load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}",
     "load: {type: gate_drive, gate_charge: 60 nF, gate_resistance: 5 ohm}", "charge", "windings[1].load.gate_charge"),
    ("load: {type: gate_drive, gate_charge: 60 nC, gate_resistance: 5 ohm}", "load: gate_drive",
     "gate_charge and gate_resistance", "windings[1].load"),
])
def test_bad_gate_drive_is_located(old, new, words, path):
    assert old in GDT
    with pytest.raises(SpecError, match=words) as err:
        load_spec_text(GDT.replace(old, new, 1), "x.yaml")
    assert err.value.path == path and err.value.line
