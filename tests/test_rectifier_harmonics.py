"""A capacitor-input bridge's current harmonics in the winding's AC resistance.

Sources: O. H. Schade, "Analysis of rectifier operation", Proc. IRE 31(7), 341-361, 1943 (the circuit and
its steady-state waveform); Parseval's theorem and numpy's FFT as the independent check of the harmonic
shares; Dowell's AC factor per harmonic at skin depth delta / sqrt(n), the loss sum I_n^2 R_ac(n) (P. L.
Dowell, Proc. IEE 113(8), 1966).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.design.pipeline import design
from specgen.design.spec import load_spec_text
from specgen.physics import rectifier_loads as rl

ROOT = Path(__file__).resolve().parent.parent
CATALOG = ROOT / "catalog"
ORDERS = list(range(1, 40, 2))


@pytest.mark.parametrize("k, r", [(30.0, 0.03), (100.0, 0.01), (5.0, 0.1)])
def test_harmonic_shares_against_numpy_fft(k, r):
    # the full period: the half period's samples, then the same with the sign reversed; rfft bin n is
    # harmonic n; its mean-square share 2 |X_n|^2 / N^2
    half = np.asarray(rl.bridge_capacitor_current(k, r))
    full = np.concatenate([half, -half])
    x = np.fft.rfft(full)
    ms = 2.0 * np.abs(x[ORDERS]) ** 2 / len(full) ** 2
    assert float(ms.sum()) / float(np.mean(full * full)) > 0.999     # Parseval: the odd orders to 39 hold it
    assert rl.bridge_capacitor_harmonics(k, r, ORDERS) == pytest.approx((ms / ms.sum()).tolist(), abs=2e-3)
    even = np.abs(x[2:40:2]) ** 2
    assert float(even.sum()) < 1e-12 * float(np.abs(x[1]) ** 2)        # half-wave symmetry: no even orders


def test_a_small_capacitor_draws_a_sine():
    # omega C R_L -> 0: the bridge's AC-side current follows the source, a sine (Schade's limit)
    w = rl.bridge_capacitor_harmonics(0.01, 0.05, ORDERS)
    assert w[0] > 0.999


BRIDGE = """\
part: BH-9902
title: Bridge rectifier transformer, heavy secondary
revision: A
status: draft
kind: transformer
core: {id: EI-125, stack: 32 mm}
operating: {frequency: 60 Hz, waveform: sine, ambient: 40 degC, cooling: natural, insulation_class: 130 (B)}
windings:
  - {name: P, role: primary, voltage: 120 V, wire: auto, start: "1", finish: "2"}
  - name: S
    role: secondary
    voltage: 12 V
    current: 12 A
    load: {type: bridge_capacitor, capacitance: 22000 uF}
    wire: CU-2.50-G2
    start: "7"
    finish: "8"
insulation:
  layer_tape: {tape: TAPE-PET25-44MM, layers: 1}
  winding_tape: {tape: TAPE-PET50-44.5MM, layers: 2}
"""


def test_bridge_secondary_fr_sums_dowell_over_the_harmonics():
    # the secondary's loss I_rms^2 R_dc sum(w_n Fr_n): Fr weighted by each harmonic's share, Dowell's layer
    # form at skin depth delta / sqrt(n) for each; recomputed here layer by layer from the kernel's one-order
    # factors and the load's shares, against the design's section factor
    cat = load_catalog(CATALOG)
    d = design(load_spec_text(BRIDGE, "bridge.yaml"), cat)
    s = next(w for w in d.windings if w.name == "S")
    p = next(w for w in d.windings if w.name == "P")
    ld = next(x for x in d.loads if x.winding == "S")
    assert len(ld.harmonics) > 3 and ld.harmonics[0][1] < 0.9
    assert sum(w for _, w in ld.harmonics) == pytest.approx(1.0)
    sec = s.sections[0]
    wire = cat.wires["CU-2.50-G2"]
    geo = K.wire_geometry(wire, s.strands)
    delta = float(K.skin_depth_m(60.0, d.hot_spot_c))
    # the MMF before S: the primary's ampere-turns if it is wound first
    before = p.turns * p.current_a if p.sections[0].order < sec.order else 0.0
    faces = [before]
    for layer in sec.layers:
        faces.append(faces[-1] - layer.turns * s.current_a)
    total = 0.0
    fund = 0.0
    for j, layer in enumerate(sec.layers):
        per = [float(K.layer_ac_factor(geo, float(layer.turns), sec.usable_breadth_m, delta, faces[j], faces[j + 1],
                                       K.Harmonics(np.array([float(n)]), np.array([1.0]))))
               for n, _ in ld.harmonics]
        total += sum(w * f for (_, w), f in zip(ld.harmonics, per)) * layer.length_m
        fund += per[0] * layer.length_m
    length = sum(layer.length_m for layer in sec.layers)
    assert sec.fr == pytest.approx(total / length, rel=1e-6)
    # the harmonics multiply the eddy part (Fr - 1) several times over the fundamental's for this heavy wire
    assert sec.fr - 1.0 > 3.0 * (fund / length - 1.0)
