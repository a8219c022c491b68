"""Insulation the winder builds: bifilar pairs across a barrier, split two-chamber bobbins, the outer winding
to the core, a toroid's lead exits, overlapped tape widths and bobbins that lack the figures a check needs.

Requirements come from IEC 60664-1:2007 (figures from memory: verify against the standard): Table F.2
clearance (1500 V impulse: 0.5 mm; 2500 V: 1.5 mm; 4000 V: 3.0 mm), Table F.4 creepage, pollution degree 2,
material group IIIa (250 V: 2.5 mm; 400 V: 4.0 mm), reinforced twice basic. Two wires wound side by side have
only their own insulation between them: only a wire whose insulation is rated for the grade carries a
barrier there (IEC 62368-1 5.4.4.6 and Annex J, wound components, from memory).
"""

from __future__ import annotations

import pytest
from test_design_insulation import _barrier, _variant

from specgen.catalog.loader import load_catalog


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


S1_S2_REINFORCED = ("    - between: [all, core]", "    - between: [S1, S2]\n      grade: reinforced\n"
                                                  "      working_voltage: 250 V\n    - between: [all, core]")


def test_a_bifilar_pair_across_a_barrier_is_refused_with_what_to_do(cat):
    # BH-1240 winds S2 with S1; a reinforced barrier between them cannot be two enamelled wires side by side
    d = _variant(cat, "BH-1240", S1_S2_REINFORCED)
    b = _barrier(d, "S1", "S2")
    assert not b.ok
    assert "S2 is wound with S1 (bifilar) across this reinforced barrier" in b.message
    assert "separate sections with the barrier tape between them" in b.message
    assert "triple-insulated wire rated reinforced" in b.message
    # the same pair in triple-insulated wire rated reinforced: the wire carries the barrier between them
    tiw = _variant(cat, "BH-1240", S1_S2_REINFORCED,
                   ('wire: auto\n    start: "7"', 'wire: TIW-0.50\n    start: "7"'),
                   ('wire: auto\n    start: "9"', 'wire: TIW-0.50\n    start: "9"'))
    t = _barrier(tiw, "S1", "S2")
    assert "bifilar" not in t.message
    assert "S2 wound with S1 in TIW-0.50 (its insulation rated reinforced)" in t.solid_provided
    # a functional barrier between the pair asks nothing of the wire
    f = _variant(cat, "BH-1240", (S1_S2_REINFORCED[0], S1_S2_REINFORCED[1].replace("reinforced", "functional")))
    assert _barrier(f, "S1", "S2").ok
