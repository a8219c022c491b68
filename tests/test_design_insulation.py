"""Insulation coordination of the design: each barrier's requirement against what the build gives.

Requirements come from IEC 60664-1:2007 tables (figures from memory: verify against the standard):
Table F.1 rated impulse (230 V line to neutral, category II: 2500 V; up to 150 V: 1500 V), Table F.2 clearance
(2500 V: 1.5 mm; 4000 V: 3.0 mm; 1500 V: 0.5 mm), Table F.4 creepage PD2 group IIIa (250 V: 2.5 mm,
400 V: 4.0 mm, reinforced twice basic); thin-sheet solid insulation per IEC 62368-1 5.4.4.6 (from memory);
hipot 2 U + 1000 V, at least 1500 V basic / 3000 V reinforced on mains (common practice, from memory).
"""

from __future__ import annotations

import pytest

from specgen.api import demo_specs, design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.errors import SpecError

DEMOS = {p.stem: p for p in demo_specs()}


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


def _text(name: str) -> str:
    return DEMOS[name].read_text(encoding="utf-8")


def _variant(cat, name: str, *edits: tuple[str, str]):
    text = _text(name)
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    return design_text(text, f"{name}-variant.yaml", cat)


def _barrier(d, a: str, b: str):
    return next(x for x in d.insulation.barriers if x.between == (a, b))


def test_demo_parts_pass_every_barrier_with_the_table_figures(cat):
    d = design_file(DEMOS["BH-2210"], cat=cat)
    ps = _barrier(d, "P", "S")
    # reinforced at 400 V, 230 V mains, OVC II: impulse 2500 V, one step up 4000 V -> 3.0 mm (Table F.2);
    # creepage 400 V PD2 group IIIa basic 4.0 mm (Table F.4), reinforced x2 = 8.0 mm
    assert ps.clearance_required_mm == pytest.approx(3.0)
    assert ps.creepage_required_mm == pytest.approx(8.0)
    assert ps.creepage_available_mm == pytest.approx(8.0)        # 4 mm margins, the tape flange to flange
    assert ps.ok and ps.type_test_v == 3600.0                   # 2 x (2 x 400 + 1000) V
    assert ps.routine_test_v == 4350.0                          # 120 % of 3600 = 4320, up to 50 V steps
    d1042 = design_file(DEMOS["BH-1042"], cat=cat)
    b = _barrier(d1042, "P", "S1+S2")
    # 253 V basic: clearance 1.5 mm (2500 V row); creepage between the 250 V (2.5 mm) and 320 V rows
    assert b.clearance_required_mm == pytest.approx(1.5)
    assert 2.5 < b.creepage_required_mm < 2.6
    assert b.ok and b.type_test_v == 1550.0                     # 2 x 253 + 1000 = 1506 V, up to a 50 V step
    assert all(x.ok for x in d1042.insulation.barriers)
    out = d1042.to_dict()["insulation"]
    assert set(out["basis"]) == {"standard", "overvoltage_category", "pollution_degree", "material_group", "altitude_m"}
    assert set(out["barriers"][0]) == {"between", "grade", "working_voltage_v", "peak_voltage_v",
                                       "clearance_required_mm", "clearance_available_mm", "creepage_required_mm",
                                       "creepage_available_mm", "solid_required", "solid_provided", "ok"}
    assert [c for c in d1042.checks if c.code == "insulation" and c.level == "pass"].__len__() == 2


def test_hipot_is_rounded_and_says_which_pins_to_short(cat):
    d = design_file(DEMOS["BH-2210"], cat=cat)
    h = next(h for h in d.tests.hipot if h.b == "S")
    assert h.type_voltage_v % 50 == 0 and h.routine_voltage_v % 50 == 0
    assert h.connection.startswith("short 1-2-3; short 11-12; apply between")


def test_a_part_that_must_fail_creepage(cat):
    # 2 mm margins give 4 mm round the tape edge; reinforced at 400 V needs 8 mm (Table F.4 x2)
    d = _variant(cat, "BH-2210", ("    margin: 4 mm\n  - name: S", "    margin: 2 mm\n  - name: S"),
                 ("    direction: cw\n    margin: 4 mm\n\nbuild", "    direction: cw\n    margin: 2 mm\n\nbuild"))
    ps = _barrier(d, "P", "S")
    assert not ps.ok and "creepage needs 8.00 mm" in ps.message
    assert any(c.code == "insulation" and c.level == "fail" for c in d.checks)


def test_a_part_that_must_fail_clearance(cat):
    # category IV on 230 V mains: 6000 V impulse; reinforced one step up 8000 V -> 8.0 mm (Table F.2) > 8 mm given?
    # the margins give 8.0 mm, so take category IV with 3.5 mm margins: 7.0 mm < 8.0 mm
    d = _variant(cat, "BH-2210", ("  margin_tape: TAPE-MARGIN-4MM", "  margin_tape: TAPE-MARGIN-4MM\n"
                                                                  "  overvoltage_category: IV"),
                 ("    margin: 4 mm\n  - name: S", "    margin: 3.5 mm\n  - name: S"),
                 ("    direction: cw\n    margin: 4 mm\n\nbuild", "    direction: cw\n    margin: 3.5 mm\n\nbuild"))
    ps = _barrier(d, "P", "S")
    assert ps.clearance_required_mm == pytest.approx(8.0)
    assert not ps.ok and "clearance needs 8.00 mm" in ps.message


def test_a_part_that_must_fail_solid_insulation(cat):
    # reinforced needs two layers each passing 3600 V or three of which two pass: one layer is short
    d = _variant(cat, "BH-2210", ("  winding_tape: {tape: TAPE-PI25-26MM, layers: 3}",
                                  "  winding_tape: {tape: TAPE-PI25-26MM, layers: 1}"))
    ps = _barrier(d, "P", "S")
    assert not ps.ok and "solid insulation needs" in ps.message


def test_a_tape_too_narrow_fails_and_shortens_the_creepage(cat):
    # the old BH-2210: three layers of 20 mm tape on a 25.7 mm bobbin
    d = _variant(cat, "BH-2210", ("  winding_tape: {tape: TAPE-PI25-26MM, layers: 3}",
                                  "  winding_tape: {tape: TAPE-PI25-20MM, layers: 3}"))
    assert any(c.code == "tape-width" and c.level == "fail" and "flange to flange" in c.message for c in d.checks)
    ps = _barrier(d, "P", "S")
    # overhang past the 17.7 mm of copper: (20 - 17.7) / 2 = 1.15 mm each side
    assert ps.creepage_available_mm == pytest.approx(2.3)
    assert not ps.ok
    # the old BH-1042: 30 mm layer tape over 40.1 mm of copper
    d = _variant(cat, "BH-1042", ("layer_tape: {tape: TAPE-PET25-44MM", "layer_tape: {tape: TAPE-PET25-30MM"))
    assert any(c.code == "tape-width" and "layer tape" in c.message for c in d.failed)


def test_a_toroid_without_core_insulation_fails(cat):
    d = _variant(cat, "BH-4120", ("  core_wrap: {tape: TAPE-PET50-19MM, layers: 2}", ""))
    b = _barrier(d, "all", "core")
    assert not b.ok and "nothing insulates the first winding" in b.message
    ok = design_file(DEMOS["BH-4120"], cat=cat)
    assert _barrier(ok, "all", "core").ok
    assert any(m.id == "TAPE-PET50-19MM" for m in ok.materials)


@pytest.mark.parametrize("old, new, says", [
    ('    finish: "2"\n', '    finish: "9"\n', "already used by winding P"),         # two windings on one pin
    ('    start: "7"', '    start: "2"', "already used by winding P"),
    ("  - name: S1\n", "  - name: S 1\n", "carries a space"),
    ("  - name: S1\n", "  - name: all\n", "reserved"),
    ("  - name: S1\n", "  - name: P.1\n", "carries '.'"),
    ("  - name: S1\n", "  - name: S1+S2\n", "carries '+'"),
    ("      working_voltage: 253 V\n", "      working_voltage: 25 kV\n", "outside what these insulation tables"),
])
def test_pins_names_and_voltages_refused_with_a_located_line(cat, old, new, says):
    with pytest.raises(SpecError) as e:
        _variant(cat, "BH-1042", (old, new))
    assert says in str(e.value) and ":" in str(e.value).split(" ")[0]


def test_tie_pin_across_a_barrier_and_a_section_on_one_pin_refused(cat):
    with pytest.raises(SpecError, match="already used by winding P"):
        _variant(cat, "BH-2210", ('    start: "11"', '    start: "2"'))
    with pytest.raises(SpecError, match="start and finish on pin '1'"):
        _variant(cat, "BH-2210", ('    section_pins: ["2"]', '    section_pins: ["1"]'))
    with pytest.raises(SpecError, match="lead 'H1' is already used"):
        _variant(cat, "BH-4120", ("    start: X1", "    start: H1"))


def test_the_toroid_work_order_insulates_the_core_before_the_first_winding(cat):
    """The core wrap is a step of its own before any winding (the barrier to the core counts on it)."""
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    ok = design_file(DEMOS["BH-4120"], cat=cat)
    assert ok.floor.core_wrap is not None and ok.floor.core_wrap.id == "TAPE-PET50-19MM"
    steps = build_context(ok, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1)["steps"]
    first = steps[0]
    assert first["heading"].startswith("Insulate the core") and "TAPE-PET50-19MM" in first["lines"][0]
    assert "2 layers, each half-lapped" in first["lines"][0]
    assert all(s["kind"] != "wind" for s in steps[:1]) and any(s["kind"] == "wind" for s in steps[1:])
    bare = _variant(cat, "BH-4120", ("  core_wrap: {tape: TAPE-PET50-19MM, layers: 2}", ""))
    assert bare.floor.core_wrap is None
    assert not any(s["heading"].startswith("Insulate the core") for s in
                   build_context(bare, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1)["steps"])
