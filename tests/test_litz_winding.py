"""Litz windings in the kernel and the engine against Sullivan's strand-level low-frequency result.

Reference: C. R. Sullivan, "Optimal choice for number of strands in a litz-wire transformer winding", IEEE Trans.
Power Electronics 14(2), 283-291, 1999: F_r = 1 + pi^2 (N n)^2 d^6 k / (192 delta^4 b^2) for N turns of n strands
across a window breadth b, k = 1 from zero to peak MMF; for one layer between the enclosed ampere-turns F1 and F2
the same mean-square-field argument gives k = (F1^2 + F1 F2 + F2^2) / (F2 - F1)^2. It holds for strands below
about 0.6 skin depths, as here. The formula is written out again below (not taken from specgen) and checked
against ``physics.litz.litz_fr_sullivan`` too. Skin depth: IEC 60028 copper, sqrt(2 rho / (omega mu0)) with
scipy.constants.mu_0.

The defect these guard: the Litz porosity was the strand porosity of a full layer whatever the turns in it, so a
layer the bundles covered only in part was taken as full of strands (its factor up to 5 to 9 times Sullivan's
excess on a choke's partial last layer).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import constants

from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.design import kernel as K
from specgen.physics import litz

RHO_CU_20C = 1.0 / 58e6                     # IEC 60028 annealed copper [ohm m]


def _rho(temp_c: float) -> float:
    return RHO_CU_20C * (1 + 0.00393 * (temp_c - 20))


def _skin(freq_hz: float, temp_c: float) -> float:
    return math.sqrt(2 * _rho(temp_c) / (2 * math.pi * freq_hz * constants.mu_0))


def _sullivan_layer(strands_in_layer: float, d: float, delta: float, b: float, f1: float, f2: float) -> float:
    k = (f1 * f1 + f1 * f2 + f2 * f2) / (f2 - f1) ** 2
    return 1 + math.pi ** 2 * strands_in_layer ** 2 * d ** 6 * k / (192 * delta ** 4 * b ** 2)


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.mark.parametrize("wire_id, bundles", [("LITZ-40X0.10", 1), ("LITZ-150X0.10", 2), ("LITZ-270X0.071", 1),
                                               ("LITZ-420X0.05", 3)])
@pytest.mark.parametrize("turns_in_layer", [1, 3, 7])
def test_one_layer_against_sullivan(cat, wire_id, bundles, turns_in_layer):
    """Any layer, full or partly covered, at any place in the MMF: Sullivan's excess within 2 %."""
    wire = cat.wires[wire_id]
    g = K.wire_geometry(wire, bundles)
    usable = 24e-3
    delta = _skin(50e3, 100.0)
    assert wire.strand_diameter_m / delta < litz.SULLIVAN_MAX_STRAND_RATIO
    for f1 in (0.0, 2.0 * turns_in_layer, 11.0 * turns_in_layer):
        f2 = f1 + turns_in_layer
        got = K.layer_ac_factor(g, turns_in_layer, usable, delta, f1, f2, K.current_harmonics("sine"))
        ref = _sullivan_layer(turns_in_layer * bundles * wire.strands, wire.strand_diameter_m, delta, usable, f1, f2)
        assert got - 1 == pytest.approx(ref - 1, rel=0.02), (f1, f2)


def test_whole_portion_equals_the_papers_formula(cat):
    """Five full layers of 6 turns from zero MMF: the mean of the kernel's layers against litz_fr_sullivan for
    N = 30 turns of 2 x 150 strands. The kernel (Dowell at strand level, rescaled to round strands) differs from
    Sullivan only by Dowell's discrete-layer term, a share 1 / (5 m^2) of the excess for m strand layers."""
    wire = cat.wires["LITZ-150X0.10"]
    g = K.wire_geometry(wire, 2)
    usable, temp = 20e-3, 80.0
    faces = np.arange(6) * 6.0
    m = 5 * round(math.sqrt(150))
    for f, exact in ((5e3, 1e-6), (100e3, 1e-3)):     # 100 kHz: Delta 0.3, the next term of Dowell's series shows
        delta = _skin(f, temp)
        frs = K.layer_ac_factor(g, np.full(5, 6.0), usable, delta, faces[:-1], faces[1:], K.current_harmonics("sine"))
        mean = float(np.mean(frs))
        paper = litz.litz_fr_sullivan(f, 30, 300, wire.strand_diameter_m, usable, _rho(temp))
        assert mean - 1 == pytest.approx((paper - 1) * (1 - 1 / (5 * m * m)), rel=exact)
        assert mean - 1 == pytest.approx(paper - 1, rel=0.01)


def test_search_screening_form_agrees(cat):
    """The search's closed-form section factor (equal full layers) gives the same as the kernel's layers."""
    wire = cat.wires["LITZ-105X0.10"]
    g = K.wire_geometry(wire, 1)
    delta = _skin(100e3, 100.0)
    faces = np.arange(5) * 9.0
    frs = K.layer_ac_factor(g, np.full(4, 9.0), 18e-3, delta, faces[:-1], faces[1:], K.current_harmonics("sine"))
    sec = K.section_ac_factor(g, 4, 9, 18e-3, delta, 0.0, 36.0, K.current_harmonics("sine"))
    assert sec == pytest.approx(float(np.mean(frs)), rel=1e-9)


CHOKE = """\
part: BH-T951
title: Litz choke (test fixture)
revision: A
status: draft
customer: Brindle Hollow Coil Works (test fixture)
kind: inductor
core:
  id: ETD-39-F100
  gap: auto
  gap_arrangement: centre
operating:
  frequency: {f} kHz
  ambient: 40 degC
  cooling: natural
  insulation_class: 155 (F)
inductor:
  inductance: 60 uH
  current: 4 A
  ripple: 4 A
  duty: 0.5
windings:
  - name: L
    role: main
    wire: auto-litz
    start: "1"
    finish: "10"
    direction: cw
    margin: 1 mm
"""


@pytest.mark.parametrize("freq_khz", [50, 100, 200])
def test_engine_choke_against_sullivan(tmp_path, cat, freq_khz):
    """A Litz choke whose last layer is partly filled: the engine's section factor (layers weighted by their copper
    length) against Sullivan layer by layer on the engine's own build, within 1 % of the excess (it was 5 to 9
    times it)."""
    path = tmp_path / "choke.yaml"
    path.write_text(CHOKE.format(f=freq_khz), encoding="utf-8")
    d = design_file(path, cat=cat)
    w = d.windings[0]
    wire = cat.wires[w.wire]
    assert wire.kind == "litz"
    delta = _skin(freq_khz * 1e3, d.hot_spot_c)
    assert wire.strand_diameter_m / delta < litz.SULLIVAN_MAX_STRAND_RATIO
    (sec,) = w.sections
    assert len(sec.layers) >= 2 and sec.layers[-1].turns < sec.layers[0].turns     # a partly covered layer
    mmf, num, den = 0.0, 0.0, 0.0
    for layer in sec.layers:
        ref = _sullivan_layer(layer.turns * w.strands * wire.strands, wire.strand_diameter_m, delta,
                              sec.usable_breadth_m, mmf, mmf + layer.turns)
        mmf += layer.turns
        num += ref * layer.length_m
        den += layer.length_m
    ref_fr = num / den
    assert sec.fr - 1 == pytest.approx(ref_fr - 1, rel=0.01)
    assert w.fr == pytest.approx(sec.fr, rel=1e-12)
