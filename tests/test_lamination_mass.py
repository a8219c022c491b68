"""Lamination mass and cost from the E and I pieces, not from the effective volume.

References: the scrapless EI lamination (tongue a; window a/2 x 1.5a; outer legs and yokes a/2), whose E and I
together cover 6 a^2 (McLyman, Transformer and Inductor Design Handbook, EI lamination tables; from memory), and
plane geometry for any other proportions (the pieces summed as rectangles here, independently of the code's
outline-less-windows form). The defect this guards: the mass was V_e x density, and V_e of the segment method
(quarter-ellipse corners) leaves out the corners' iron, about 7 % low on every EI part, and so was its cost.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.physics import geometry
from specgen.prices import price_list
from specgen.quote import material_lines

SPECS = Path(__file__).parent / "specs"


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def test_scrapless_pair_is_six_tongues_squared():
    a = 25.4e-3
    assert geometry.ei_lamination_area_m2(a, a / 2, 1.5 * a, a / 2, a / 2) == pytest.approx(6 * a * a, rel=1e-12)


def test_any_proportions_sum_of_rectangles():
    a, w, h, p, y = 20e-3, 11e-3, 33e-3, 9e-3, 12e-3
    width = a + 2 * w + 2 * p
    e_back, tongue, outer_legs, i_bar = width * y, a * h, 2 * p * h, width * y
    assert geometry.ei_lamination_area_m2(a, w, h, p, y) == pytest.approx(e_back + tongue + outer_legs + i_bar,
                                                                           rel=1e-12)


@pytest.mark.parametrize("spec", ["reactor-ei100.yaml", "build-ei50.yaml", "ei75-50hz-2x24v.yaml"])
def test_ei_part_mass_and_cost_from_the_pieces(cat, spec):
    d = design_file(SPECS / spec, cat=cat)
    core = cat.cores[d.core.id]
    mat = cat.materials[core.material]
    a = core.dims["tongue"]
    assert d.core.laminations and core.price_unit == "kg"
    iron_height = d.core.laminations * mat.lamination_thickness_m
    want = 6 * a * a * iron_height * mat.density_kg_m3
    assert d.core.mass_kg == pytest.approx(want, rel=1e-12)
    # V_e x density (the old figure) is several percent low: the corners' iron
    assert 1.05 < d.core.mass_kg / (d.core.ve_m3 * mat.density_kg_m3) < 1.12
    (line,) = [m for m in d.materials if m.kind == "laminations"]
    assert line.mass_kg == pytest.approx(want, rel=1e-12)
    (cost,) = [c for c in material_lines(d, price_list(cat, d)) if c.kind == "laminations"]
    assert float(cost.quantity) == pytest.approx(want, rel=1e-12)
    assert float(cost.amount) == pytest.approx(want * float(core.price), rel=1e-9)
