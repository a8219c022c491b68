"""The design search for the kinds without a vector model: a common-mode choke (lines, line current and voltage,
L_CM at a frequency, sector gap) ranked over the stocked toroids, and a flyback (input range, mode, outputs) over
the gappable ferrite sets, both by the design engine itself.

What is checked against something outside the search: every listed number is the engine's (a written draft spec
designed again gives the same figures), the list is in the order of the sort key, the loss-cost front is
non-dominated (the definition of a Pareto front), and every listed core is an ungapped high-permeability ring
(common practice for a common-mode choke: the permeability sets L_CM per turn squared), every flyback core a
gappable ferrite set (the energy is stored in its gap: common practice).
"""

from __future__ import annotations

import pytest
import yaml

from specgen import search as S
from specgen.api import design_file
from specgen.catalog.loader import load_catalog
from specgen.errors import SpecError

REQ = """
requirement: REQ-CMC
title: Line choke for the stage-lighting driver
customer: Morrow Stage Lighting
kind: common_mode_choke
lines: 2
operating:
  frequency: [50 Hz, 60 Hz]
  ambient: 50 degC
  cooling: natural
  insulation_class: 130 (B)
common_mode_choke:
  line_current: 6 A
  line_voltage: 250 V
  common_mode_inductance: 10 mH
  inductance_frequency: 10 kHz
  ground_capacitance: 9.4 nF
  sector_gap: 5 mm
insulation:
  between_windings: basic
  to_core: basic
"""


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def result(cat):
    return S.search(S.parse_requirement(yaml.safe_load(REQ), "REQ-CMC.yaml"), cat, top=5)


def test_candidates_are_ranked_by_the_engine(result, cat):
    assert result.top, "a 10 mH, 6 A two-line choke fits a stocked high-permeability ring"
    costs = [c.value("cost") for c in result.top]
    assert costs == sorted(costs)
    for c in result.top:
        d = c.engine
        assert d.kind == "common_mode_choke" and not d.failed
        assert c.choice.core.is_toroid
        assert cat.materials[c.choice.core.material].family in ("ferrite", "nanocrystalline", "amorphous")
        assert d.common_mode_choke.inductance_cm_h * 0.9 >= 10e-3 - 1e-12


def test_written_draft_reproduces_the_listed_numbers(result, tmp_path, cat):
    best = result.top[0]
    path = tmp_path / "BH-8999.yaml"
    path.write_text(best.spec_text, encoding="utf-8")
    again = design_file(path, cat=cat)
    assert again.losses.total_w == pytest.approx(best.engine.losses.total_w, rel=1e-12)
    assert [w.turns for w in again.windings] == [w.turns for w in best.engine.windings]
    assert "role: line" in best.spec_text and "direction: cw" in best.spec_text
    assert "[L1, L2]" in best.spec_text          # the line-to-line barrier the sector gap must hold


def test_pareto_front_is_non_dominated(result):
    pts = [(c.value("cost"), c.value("total_w")) for c in result.pareto]
    for i, (ci, li) in enumerate(pts):
        assert not any(cj <= ci and lj <= li and (cj, lj) != (ci, li) for j, (cj, lj) in enumerate(pts) if j != i)


def test_families_without_a_feasible_ring_say_why(result):
    assert result.families
    assert all(f.reasons and f.detail for f in result.families)


def test_too_much_for_any_ring_lists_nothing_and_explains(cat):
    text = REQ.replace("line_current: 6 A", "line_current: 60 A")
    sr = S.search(S.parse_requirement(yaml.safe_load(text), "REQ-CMC.yaml"), cat)
    assert not sr.top and sr.families


@pytest.mark.parametrize("old,new,needle", [
    ("lines: 2", "lines: 4", "lines"),
    ("  sector_gap: 5 mm\n", "", "sector_gap"),
    ("lines: 2\n", "lines: 2\nwindings: []\n", "one winding per line"),
])
def test_requirement_mistakes_are_located(old, new, needle):
    with pytest.raises(SpecError) as err:
        S.parse_requirement(yaml.safe_load(REQ.replace(old, new)), "REQ-CMC.yaml")
    assert needle in str(err.value) and "REQ-CMC.yaml" in str(err.value)


FLYBACK = """
requirement: REQ-FB
title: 65 W universal-input flyback
kind: flyback
operating:
  frequency: 65 kHz
  ambient: 50 degC
  cooling: natural
  insulation_class: 130 (B)
flyback:
  input_voltage_min: 90 V
  input_voltage_max: 375 V
  mode: dcm
  duty_max: 0.45
  efficiency: 0.87
  diode_drop: 0.5 V
windings:
  - {name: P, role: primary}
  - {name: S, role: secondary, voltage: 19 V, current: 3.42 A}
  - {name: A, role: auxiliary, voltage: 15 V, current: 0.05 A}
insulation:
  between_windings: reinforced
  to_core: basic
"""


@pytest.fixture(scope="module")
def flyback(cat):
    return S.search(S.parse_requirement(yaml.safe_load(FLYBACK), "REQ-FB.yaml"), cat, top=4)


def test_flyback_candidates_are_gapped_ferrite_sets_ranked_by_the_engine(flyback, cat, tmp_path):
    assert flyback.top
    costs = [c.value("cost") for c in flyback.top]
    assert costs == sorted(costs)
    for c in flyback.top:
        d = c.engine
        assert d.kind == "flyback" and not d.failed and d.flyback.gap_m > 0
        assert c.choice.core.gappable and cat.materials[c.choice.core.material].family == "ferrite"
    best = flyback.top[0]
    path = tmp_path / "BH-7999.yaml"
    path.write_text(best.spec_text, encoding="utf-8")
    again = design_file(path, cat=cat)
    assert again.losses.total_w == pytest.approx(best.engine.losses.total_w, rel=1e-12)
    assert again.flyback.gap_m == pytest.approx(best.engine.flyback.gap_m, rel=1e-12)
    assert "kind: flyback" in best.spec_text and "reinforced" in best.spec_text


@pytest.mark.parametrize("old,new,needle", [
    ("{name: P, role: primary}", "{name: P, role: primary, voltage: 325 V}", "input range"),
    ("  insulation_class: 130 (B)\nflyback:", "  insulation_class: 130 (B)\n  efficiency: 0.9\nflyback:",
     "efficiency estimate goes in its 'flyback' section"),
    ("  mode: dcm\n", "  mode: sometimes\n", "mode"),
])
def test_flyback_requirement_mistakes_are_located(old, new, needle):
    assert old in FLYBACK
    with pytest.raises(SpecError) as err:
        S.parse_requirement(yaml.safe_load(FLYBACK.replace(old, new)), "REQ-FB.yaml")
    assert needle in str(err.value) and "REQ-FB.yaml" in str(err.value)
