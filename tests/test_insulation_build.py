"""Insulation the winder builds: bifilar pairs across a barrier, split two-chamber bobbins, the outer winding
to the core, a toroid's lead exits, overlapped tape widths and bobbins that lack the figures a check needs.

Requirements come from IEC 60664-1:2007 (figures from memory: verify against the standard): Table F.2
clearance (1500 V impulse: 0.5 mm; 2500 V: 1.5 mm; 4000 V: 3.0 mm), Table F.4 creepage, pollution degree 2,
material group IIIa (250 V: 2.5 mm; 400 V: 4.0 mm), reinforced twice basic. Two wires wound side by side have
only their own insulation between them: only a wire whose insulation is rated for the grade carries a
barrier there (IEC 62368-1 5.4.4.6 and Annex J, wound components, from memory).
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest
from test_design_insulation import DEMOS, _barrier, _variant

from specgen.api import design_file, design_text
from specgen.catalog.loader import load_catalog
from specgen.errors import SpecError


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


# ---------------------------------------------------------------------------------------- split bobbins

SPLIT = Path(__file__).parent / "specs" / "split-ei125-230v.yaml"


def _split(cat, *edits: tuple[str, str]):
    text = SPLIT.read_text(encoding="utf-8")
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    return design_text(text, "split-variant.yaml", cat)


def test_each_chamber_builds_from_the_tube_in_its_own_breadth(cat):
    d = _split(cat)
    bob = cat.bobbins["BOB-EI125-32-SPLIT"]
    p = d.winding("P").sections[0]
    s1, s2 = d.winding("S1").sections[0], d.winding("S2").sections[0]
    assert (p.chamber, s1.chamber, s2.chamber) == (1, 2, 2)
    # each chamber 21.3 mm less 0.5 mm margins: 20.3 mm of copper, not the whole 42.6 mm breadth
    assert p.usable_breadth_m == pytest.approx(bob.chambers[0] - 2 * 0.5e-3)
    assert p.usable_breadth_m < bob.breadth_m / 2
    # both chambers start at the tube: the primary and the first secondary share the first layer's height
    assert p.start_build_m == pytest.approx(0.0) and s1.start_build_m == pytest.approx(0.0)
    assert s2.start_build_m > s1.end_build_m
    # the window's build is the taller chamber's, not the sum of both
    assert d.build.height_m < p.end_build_m + s2.end_build_m
    assert not any(c.code == "split-bobbin" for c in d.checks)
    assert d.to_dict()["windings"][0]["sections"][0]["chamber"] == 1


def test_a_split_bobbin_without_chambers_fails_with_what_to_give(cat):
    text = SPLIT.read_text(encoding="utf-8").replace("    chamber: 1\n", "").replace("    chamber: 2\n", "")
    d = design_text(text, "no-chambers.yaml", cat)
    c = next(c for c in d.checks if c.code == "split-bobbin")
    assert c.level == "fail" and "give each winding its chamber" in c.message


@pytest.mark.parametrize("old, new, says", [
    ("    chamber: 2\n", "    chamber: 3\n", "has chambers 1..2"),
    ("    chamber: 2\n", "", "give S1 its chamber"),
    ("  bobbin: BOB-EI125-32-SPLIT", "  bobbin: BOB-EI125-32", "bobbin BOB-EI125-32 has one chamber"),
])
def test_chambers_refused_with_a_located_line(cat, old, new, says):
    with pytest.raises(SpecError) as e:
        _split(cat, (old, new))
    assert says in str(e.value) and "split-variant.yaml:" in str(e.value)


def test_the_divider_is_the_barrier_between_the_chambers(cat):
    d = _split(cat)
    b = _barrier(d, "P", "S1+S2")
    bob = cat.bobbins["BOB-EI125-32-SPLIT"]
    p, s2 = d.winding("P").sections[0], d.winding("S2").sections[0]
    wall_h, wall_t = bob.divider_height_m, bob.divider_thickness_m
    # IEC 60664-1 Annex A: up the wall, across its top, down the other side, plus the margins (from memory);
    # the shortest is from P to S2, built highest in the other chamber
    creep = 0.5e-3 + (wall_h - p.end_build_m) + wall_t + (wall_h - s2.end_build_m) + 0.5e-3
    assert b.creepage_available_mm == pytest.approx(creep * 1e3, rel=1e-6)
    assert b.clearance_available_mm < b.creepage_available_mm      # the air path cuts the wall's corners
    assert b.ok and "divider" in b.path and "the divider wall, 1.5 mm rated 5 kV" in b.solid_provided
    # reinforced at 1000 V: creepage twice 10 mm (Table F.4, PD2, IIIa, from memory) is more than the
    # divider gives, and the wall's 5 kV is below the 2 x (2 x 1000 + 1000) = 6000 V type test
    high = _split(cat, ("      grade: basic\n      working_voltage: 253 V\n    - between: [all",
                        "      grade: reinforced\n      working_voltage: 1000 V\n    - between: [all"))
    h = _barrier(high, "P", "S1+S2")
    assert not h.ok and f"creepage needs {h.creepage_required_mm:.2f} mm" in h.message
    assert h.creepage_required_mm > h.creepage_available_mm
    assert "solid insulation needs" in h.message and "the divider wall" in h.message


def test_a_split_bobbin_without_divider_figures_says_what_is_missing(cat):
    # BH-2210 on the split ETD bobbin: the catalogue gives no divider, wall or pin-row figures for it
    d = _variant(cat, "BH-2210", ("  id: ETD-39-F100\n", "  id: ETD-39-F100\n  bobbin: BOB-ETD39-PIN20-SPLIT\n"),
                 ('    margin: 4 mm\n  - name: S', '    margin: 1 mm\n    chamber: 1\n  - name: S'),
                 ("    direction: cw\n    margin: 4 mm\n\nbuild", "    direction: cw\n    margin: 1 mm\n    chamber: 2\n\nbuild"),
                 ("build_order: [P.1, S, P.2]", "build_order: [P.1, P.2, S]"))
    b = _barrier(d, "P", "S")
    c = next(c for c in d.checks if c.code == "insulation" and c.message.startswith("P to S"))
    assert c.level == "warn" and not b.checked
    assert "has no divider_thickness, divider_height, wall_voltage on file" in c.message
    assert "has no pin_row_spacing, pin_size on file: the pin gap is not checked" in c.message


def test_side_by_side_chambers_give_the_textbook_leakage():
    """Two chambers of 100 turns at +-1 A, copper 9 mm each, 2 mm between the copper (0.5 mm margins and a
    1 mm divider), MLT 0.1 m, a 10 mm window span: L = mu0 N^2 MLT (c + (a + b)/3) / h = 1.005 mH
    (McLyman, leakage of side-by-side windings, from memory)."""
    from specgen.design.build import leakage_h
    from specgen.design.result import Layer
    from specgen.design.state import BuiltSection, BuiltWindow, Former, SectionBuild

    former = Former(kind="round", tube_width_m=0.02, tube_depth_m=0.02, breadth_m=0.01, height_m=0.01,
                    chambers=(0.01, 0.01), divider_m=0.001)
    layer = Layer(index=1, turns=100, build_to_centre_m=0.001, mlt_m=0.1, length_m=10.0, turns_capacity=100)
    sb = SectionBuild(100, (layer,), 0.002, 10.0, 0.00009, 0.002, 0.009)
    built = BuiltWindow((BuiltSection("P", 1, 1, sb, 0.0005, None, 0, None, 1),
                         BuiltSection("S", 1, 2, sb, 0.0005, None, 0, None, 2)), 0.002, True, "")
    mu0 = 4e-7 * math.pi
    expected = mu0 * 100 ** 2 * 0.1 * (0.002 + 0.018 / 3) / 0.01
    assert expected == pytest.approx(1.005e-3, rel=1e-3)
    assert leakage_h(built, former, {"P": 1.0, "S": -1.0}, "P") == pytest.approx(expected, rel=1e-9)


def test_a_split_bobbin_leaks_far_more_than_concentric_windings(cat):
    # the same transformer with its windings side by side: many times the concentric leakage (common practice:
    # split bobbins are chosen for their leakage as much as for their insulation)
    split = _split(cat).leakage_inductance_h
    concentric = design_file(DEMOS["BH-1042"], cat=cat).leakage_inductance_h
    assert split > 5 * concentric


@pytest.mark.parametrize("old, new, says", [
    ("chamber_breadths: [21.3 mm, 21.3 mm]", "chamber_breadths: [21.3 mm, 20 mm]", "add up to 41.3 mm"),
    ("chamber_breadths: [21.3 mm, 21.3 mm]", "chamber_breadths: [42.6 mm]", "2 chambers need 2 breadths"),
    ("divider_height: 14.1 mm", "divider_height: 15 mm", "higher than the flanges"),
    ("    pin_row_spacing: 32 mm\n", "    pin_row_spacing: 32 mm\n    divider_thickness: 1 mm\n", "is for a split bobbin"),
])
def test_the_catalogue_refuses_chamber_figures_that_do_not_add_up(tmp_path, old, new, says):
    import shutil

    from specgen.catalog.loader import check_catalog, shipped_catalog_dir
    d = tmp_path / "cat"
    shutil.copytree(shipped_catalog_dir(), d)
    text = (d / "bobbins.yaml").read_text()
    assert old in text
    (d / "bobbins.yaml").write_text(text.replace(old, new, 1))
    problems = [str(p) for p in check_catalog(d)]
    assert any("bobbins.yaml:" in p and says in p for p in problems), problems


# ------------------------------------------------------------------------ the outer winding to the core

def test_the_outer_winding_to_the_core_over_the_top(cat):
    d = design_file(DEMOS["BH-1042"], cat=cat)
    b = _barrier(d, "all", "core")
    # S2 is outermost: round the 44.5 mm wrap's edge (the 2 mm margin) and across the gap left above the
    # bulged build to the core's outer leg
    gap_mm = (d.build.available_m - d.build.bulged_height_m) * 1e3
    assert b.clearance_available_mm == pytest.approx(2.0 + gap_mm, rel=1e-9)
    assert "outer winding S2 to the core over the top" in b.path
    assert b.creepage_available_mm == pytest.approx(6.0)        # over the flange: 2 mm margin + 4 mm moulded path
    assert "clearance 1.50 mm needed, " + f"{b.clearance_available_mm:.2f} mm given" in b.message


def test_an_outer_winding_that_touches_the_core_fails_creepage_over_the_top(cat):
    # forty wraps of outer tape bulge the build up to the core's outer leg: the creepage is round the wrap's
    # edge alone (the 2 mm margin), short of the 2.53 mm basic 253 V needs (Table F.4, PD2, IIIa, from memory)
    d = _variant(cat, "BH-1042", ("  outer_wrap: {tape: TAPE-PET50-44.5MM, layers: 2}",
                                  "  outer_wrap: {tape: TAPE-PET50-44.5MM, layers: 40}"))
    b = _barrier(d, "all", "core")
    assert "touches the core over the top" in b.path
    assert b.creepage_available_mm == pytest.approx(2.0)
    assert not b.ok and "creepage needs 2.53 mm" in b.message


def test_a_toroids_leads_across_a_barrier_leave_far_enough_apart(cat):
    d = design_file(DEMOS["BH-4120"], cat=cat)
    b = _barrier(d, "P", "S")
    assert b.lead_exit_opposite and "opposite each other" in b.path
    # the leads 2 mm apart round the core, in 2.0 mm sleeving: nothing between them
    close = _variant(cat, "BH-4120", ("  mains_voltage: 120 V", "  mains_voltage: 120 V\n  lead_exit_spacing: 2 mm"))
    c = _barrier(close, "P", "S")
    assert not c.ok and c.creepage_available_mm == pytest.approx(0.0)
    assert "creepage needs 1.52 mm" in c.message and "between the leads where they leave the ring" in c.message
    assert not c.lead_exit_opposite and c.lead_exit_mm == pytest.approx(2.0)


def test_the_work_order_says_where_a_toroids_leads_leave():
    from specgen.catalog.loader import load_catalog as load
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    cat = load(None)
    d = design_file(DEMOS["BH-4120"], cat=cat)
    steps = build_context(d, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1)["steps"]
    wind_s = next(s for s in steps if s["kind"] == "wind" and s["winding"] == "S")
    assert any(line.startswith("LEAD EXIT: bring the leads of S out of the ring on the opposite side from the "
                               "leads of P") for line in wind_s["lines"])


def test_paths_over_a_wall_and_round_a_ring():
    """IEC 60664-1 Annex A (from memory): creepage up, across and down a rib; clearance the shortest air path.
    The ring: a chord where it clears the hole, else tangents and the hole's arc (plane geometry)."""
    from specgen.physics import insulation_paths as p
    # 1 mm margins, copper 2 mm high, a 5 mm wall 1.5 mm thick: 1 + 3 + 1.5 + 3 + 1 = 9.5 mm
    assert p.over_wall_creepage_m(1e-3, 2e-3, 1e-3, 2e-3, 5e-3, 1.5e-3) == pytest.approx(9.5e-3)
    assert p.over_wall_clearance_m(1e-3, 2e-3, 1e-3, 2e-3, 5e-3, 1.5e-3) == pytest.approx(
        2 * math.sqrt(1 + 9) * 1e-3 + 1.5e-3)
    # copper built above the wall: straight across its top
    assert p.over_wall_creepage_m(1e-3, 6e-3, 1e-3, 6e-3, 5e-3, 1.5e-3) == pytest.approx(3.5e-3)
    # no hole: the chord; across a diameter 2 R
    assert p.ring_face_path_m(1.0, 0.0, math.pi) == pytest.approx(2.0)
    # the chord just clears the hole where R cos(theta / 2) = r: both forms agree there
    theta = 2 * math.acos(0.6)
    assert p.ring_face_path_m(1.0, 0.6, theta) == pytest.approx(2 * math.sin(theta / 2))
    assert p.ring_face_path_m(1.0, 0.6 - 1e-9, theta) == pytest.approx(2 * math.sin(theta / 2), rel=1e-6)
    # a hole nearly as large as the ring: the path hugs the rim, the arc R theta
    assert p.ring_face_path_m(1.0, 0.999999, math.pi) == pytest.approx(math.pi, rel=1e-3)
    # tangents and arc: 2 sqrt(1 - 0.81) + 0.9 (pi - 2 acos 0.9) across a diameter round a 0.9 hole
    assert p.ring_face_path_m(1.0, 0.9, math.pi) == pytest.approx(
        2 * math.sqrt(0.19) + 0.9 * (math.pi - 2 * math.acos(0.9)))
    assert p.chord_m(1.0, math.pi / 3) == pytest.approx(1.0)


# ------------------------------------------------------------------------------ tapes in two widths

def test_a_barrier_tape_in_two_widths_covers_and_the_work_order_says_how(cat):
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    narrow = ("  winding_tape: {tape: TAPE-PI25-26MM, layers: 3}", "  winding_tape: {tape: TAPE-PI25-20MM, layers: 3}")
    one = _variant(cat, "BH-2210", narrow)
    assert any(c.code == "tape-width" and "widths: 2" in c.message for c in one.failed)
    two = _variant(cat, "BH-2210", (narrow[0], narrow[1].replace("layers: 3}", "layers: 3, widths: 2}")))
    assert not any(c.code == "tape-width" for c in two.failed)
    ps = _barrier(two, "P", "S")
    # two 20 mm widths, each against a flange of the 25.7 mm breadth: they overlap 14.3 mm, so the barrier
    # reaches flange to flange and the path round it is both 4 mm margins again (8 mm)
    assert ps.ok and ps.creepage_available_mm == pytest.approx(8.0)
    after = two.floor.section("P", 1).after
    assert after.widths == 2 and after.overlap_m == pytest.approx(0.0143)
    steps = build_context(two, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1)["steps"]
    p1 = next(s for s in steps if s["kind"] == "wind" and s["winding"] == "P")
    assert any("lay each layer of TAPE-PI25-20MM as two widths of 20 mm" in line and "by 14.3 mm" in line
               for line in p1["lines"])
    after_row = next(r[1] for r in p1["rows"] if r[0] == "After this section")
    assert "two widths a layer" in after_row
    assert "the reinforced barrier, flange to flange over the margin tapes, no gap at either flange" in after_row
    # two 12 mm widths reach only 24 mm of the 25.7 mm breadth
    short = _variant(cat, "BH-2210", (narrow[0], narrow[1].replace("TAPE-PI25-20MM, layers: 3}",
                                                                   "TAPE-PET25-12MM, layers: 3, widths: 2}")))
    assert any(c.code == "tape-width" and "in two widths covers at most 24 mm" in c.message for c in short.failed)


def test_a_tape_in_two_widths_is_pulled_twice(cat):
    wrap = ("  outer_wrap: {tape: TAPE-PI50-25MM, layers: 2}", "  outer_wrap: {tape: TAPE-PI50-25MM, layers: 2, widths: 2}")
    one = design_file(DEMOS["BH-2210"], cat=cat)
    two = _variant(cat, "BH-2210", wrap)

    def qty(d):
        return next(m.quantity for m in d.materials if m.id == "TAPE-PI50-25MM")
    assert qty(two) == pytest.approx(2 * qty(one))


def test_a_core_wrap_in_two_widths_is_refused(cat):
    with pytest.raises(SpecError, match="'widths' is for a bobbin's"):
        _variant(cat, "BH-4120", ("{tape: TAPE-PET50-19MM, layers: 2}     #", "{tape: TAPE-PET50-19MM, layers: 2, widths: 2} #"))


def test_the_work_order_shows_the_chamber_layout(cat):
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    d = _split(cat)
    ctx = build_context(d, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1, draft=True)
    bobbin = next(v for k, v in ctx["summary"] if k == "Bobbin")
    assert bobbin == "BOB-EI125-32-SPLIT, split: 2 chambers of 21.3 + 21.3 mm, 1.5 mm divider"
    winds = [s for s in ctx["steps"] if s["kind"] == "wind"]
    assert [s["heading"] for s in winds] == ["Wind P in chamber 1", "Wind S1 in chamber 2", "Wind S2 in chamber 2"]
    chamber = next(r[1] for r in winds[0]["rows"] if r[0] == "Chamber")
    assert chamber.startswith("1 of 2, at the start flange: 21.3 mm between the start flange and the divider")
    # the last section in each chamber takes the outer wrap
    after = [next(r[1] for r in s["rows"] if r[0] == "After this section") for s in winds]
    assert "(outer wrap)" in after[0] and "(before the next section)" in after[1] and "(outer wrap)" in after[2]
    assert ctx["window_svg"].count('class="divider"') == 1


def test_the_window_drawing_lays_tapes_at_their_true_width(cat):
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    one = design_file(DEMOS["BH-2210"], cat=cat)
    two = _variant(cat, "BH-2210", ("  winding_tape: {tape: TAPE-PI25-26MM, layers: 3}",
                                    "  winding_tape: {tape: TAPE-PI25-20MM, layers: 3, widths: 2}"))

    def tapes(d):
        svg = build_context(d, DocumentSettings.from_shop(cat.shop), number="WO-TEST", qty=1, draft=True)["window_svg"]
        return str(svg).count('class="tape"')
    # P.1 and S each get one more line (their barrier tape in two widths); P.2's outer wrap stays one
    assert tapes(two) == tapes(one) + 2


def test_a_toroid_on_its_coating_and_a_toroids_barrier_tape_are_spelt_out(cat):
    from specgen.documents.settings import DocumentSettings
    from specgen.documents.workorder import build_context
    settings = DocumentSettings.from_shop(cat.shop)
    coated = design_file(DEMOS["BH-5018"], cat=cat)
    steps = build_context(coated, settings, number="WO-TEST", qty=1)["steps"]
    assert steps[0]["heading"] == "Inspect the core's coating before winding"
    assert "rated 1.5 kV" in steps[0]["lines"][0]
    wrapped = design_file(DEMOS["BH-4120"], cat=cat)
    steps = build_context(wrapped, settings, number="WO-TEST", qty=1)["steps"]
    assert not any(s["heading"].startswith("Inspect the core's coating") for s in steps)
    wind_p = next(s for s in steps if s["kind"] == "wind" and s["winding"] == "P")
    after = next(r[1] for r in wind_p["rows"] if r[0] == "After this section")
    assert "the basic barrier, half-lapped all round the ring, no gap at the bore" in after
