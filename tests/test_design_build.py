"""Layer-by-layer build, checked by hand.

tests/specs/build-ei50.yaml: EI-50 laminations on bobbin BOB-EI50-12.7, P = 60 turns of AWG24-G2,
S = 30 turns of AWG22-G2, 1 mm margins, one layer of 0.055 mm tape between layers, two layers of
0.080 mm tape between windings and two as the outer wrap. The hand calculation (common practice of
the winding bench; MLT of an offset rectangle, McLyman):

    usable breadth  = 16.1 - 2 x 1            = 14.1 mm
    P: 14.1 / 0.5749 = 24.5  -> 24 turns/layer, 60 turns -> 3 layers (24, 24, 12)
    S: 14.1 / 0.7168 = 19.7  -> 19 turns/layer, 30 turns -> 2 layers (19, 11)
    build = 3 x 0.5749 + 2 x 0.055 + 2 x 0.080 + 2 x 0.7168 + 1 x 0.055 + 2 x 0.080 = 3.6433 mm
    MLT of a layer = 2 (w + d) + 2 pi h, w = d = 14.8 mm, h = build to the layer's centre line
"""

from __future__ import annotations

import math
from pathlib import Path

import pytest

from specgen.api import demo_specs, design_file, design_text
from specgen.catalog.loader import load_catalog

SPEC = Path(__file__).parent / "specs" / "build-ei50.yaml"
MM = 1e-3


@pytest.fixture(scope="module")
def cat():
    return load_catalog(None)


@pytest.fixture(scope="module")
def built(cat):
    return design_file(SPEC, cat=cat)


def _text(old: str, new: str) -> str:
    text = SPEC.read_text(encoding="utf-8")
    assert old in text
    return text.replace(old, new, 1)


def test_the_catalogue_still_holds_the_hand_calculations_inputs(cat):
    # the hand calculation in the module docstring assumed these catalogue figures
    bob = cat.bobbins["BOB-EI50-12.7"]
    assert (bob.breadth_m, bob.height_m, bob.tube_width_m, bob.tube_depth_m) == pytest.approx(
        (16.1 * MM, 4.8 * MM, 14.8 * MM, 14.8 * MM))
    assert cat.wires["AWG24-G2"].overall_diameter_m == pytest.approx(0.5749 * MM)
    assert cat.wires["AWG22-G2"].overall_diameter_m == pytest.approx(0.7168 * MM)
    assert cat.tapes["TAPE-PET25-12MM"].thickness_m == pytest.approx(0.055 * MM)
    assert cat.tapes["TAPE-PET50-25MM"].thickness_m == pytest.approx(0.080 * MM)


def test_hand_checked_layer_build(built, cat):
    bob = cat.bobbins["BOB-EI50-12.7"]
    d_p, d_s = 0.5749 * MM, 0.7168 * MM
    t_layer, t_wind, t_outer = 0.055 * MM, 2 * 0.080 * MM, 2 * 0.080 * MM
    usable = bob.breadth_m - 2 * 1.0 * MM
    tpl_p = math.floor(usable / d_p)
    tpl_s = math.floor(usable / d_s)
    assert (tpl_p, tpl_s) == (24, 19)

    p, s = built.winding("P"), built.winding("S")
    assert (p.turns_per_layer, p.layers) == (24, 3)
    assert (s.turns_per_layer, s.layers) == (19, 2)
    assert [layer.turns for layer in p.sections[0].layers] == [24, 24, 12]
    assert [layer.turns for layer in s.sections[0].layers] == [19, 11]

    # centre line of each layer, from the tube outwards
    p_centres = [k * (d_p + t_layer) + d_p / 2 for k in range(3)]
    p_end = 3 * d_p + 2 * t_layer
    s_start = p_end + t_wind
    s_centres = [s_start + k * (d_s + t_layer) + d_s / 2 for k in range(2)]
    height = s_start + 2 * d_s + t_layer + t_outer
    assert height == pytest.approx(3.6433 * MM, abs=1e-9)
    assert built.build.height_m == pytest.approx(height, rel=1e-9)

    def mlt(h):
        return 2 * (bob.tube_width_m + bob.tube_depth_m) + 2 * math.pi * h

    for layer, h in zip(p.sections[0].layers, p_centres):
        assert layer.build_to_centre_m == pytest.approx(h, rel=1e-9)
        assert layer.mlt_m == pytest.approx(mlt(h), rel=1e-9)
    for layer, h in zip(s.sections[0].layers, s_centres):
        assert layer.build_to_centre_m == pytest.approx(h, rel=1e-9)
        assert layer.mlt_m == pytest.approx(mlt(h), rel=1e-9)
    # the first layer's MLT by hand: 2 (14.8 + 14.8) + 2 pi 0.28745 = 61.006 mm
    assert p.sections[0].layers[0].mlt_m == pytest.approx(61.006 * MM, abs=1e-6)

    # wire length: sum of turns x layer MLT, plus two 100 mm leads (shop allowance)
    lead = cat.shop.lead_length_m
    assert p.length_m == pytest.approx(sum(n * mlt(h) for n, h in zip((24, 24, 12), p_centres)) + 2 * lead, rel=1e-9)
    assert s.length_m == pytest.approx(sum(n * mlt(h) for n, h in zip((19, 11), s_centres)) + 2 * lead, rel=1e-9)

    # fit: build x bulge against the bobbin's build height
    bulge = cat.shop.bulge_factor
    assert built.build.bulged_height_m == pytest.approx(height * bulge, rel=1e-9)
    assert built.build.available_m == pytest.approx(bob.height_m)
    assert built.build.fits is True
    assert [c.level for c in built.checks if c.code == "fit"] == ["pass"]


def test_window_utilisation(built, cat):
    """K_u = sum(N A_cu) / W_a (McLyman); W_a of a scrapless EI = (tongue/2) x (1.5 tongue)."""
    tongue = cat.cores["EI-50"].dims["tongue"]
    wa = tongue / 2 * 1.5 * tongue
    assert built.core.wa_m2 == pytest.approx(wa, rel=1e-9)
    a24 = math.pi / 4 * cat.wires["AWG24-G2"].strand_diameter_m ** 2
    a22 = math.pi / 4 * cat.wires["AWG22-G2"].strand_diameter_m ** 2
    assert built.build.ku == pytest.approx((60 * a24 + 30 * a22) / wa, rel=1e-9)


def test_a_build_that_does_not_fit_fails_and_names_the_excess(cat):
    """P raised to 400 turns: 17 layers of AWG24 (16 x 24 + 16) no longer fit the 4.8 mm build height.
    The excess by hand: (17 d_p + 16 t_l + t_w + 2 d_s + t_l + t_o) x bulge - 4.8 mm."""
    d = design_text(_text("turns: 60", "turns: 400"), "build-overfull.yaml", cat)
    d_p, d_s = 0.5749, 0.7168
    height = 17 * d_p + 16 * 0.055 + 0.16 + 2 * d_s + 0.055 + 0.16
    p = d.winding("P")
    assert p.layers == 17
    assert d.build.height_m * 1e3 == pytest.approx(height, rel=1e-9)
    excess = height * cat.shop.bulge_factor - 4.8
    assert excess > 0
    assert d.build.fits is False
    [fit] = [c for c in d.checks if c.code == "fit"]
    assert fit.level == "fail"
    assert f"by {excess:.2f} mm" in fit.message
    assert "4.80 mm" in fit.message


def test_a_wire_wider_than_the_usable_breadth_fails_to_fit(cat):
    """Margins of 7.9 mm each side leave 0.30 mm of a 16.1 mm breadth: not one 0.5749 mm turn fits."""
    d = design_text(_text("  margin: 1 mm", "  margin: 7.9 mm"), "build-margins.yaml", cat)
    [fit] = [c for c in d.checks if c.code == "fit"]
    assert fit.level == "fail"
    assert "0.30 mm usable breadth" in fit.message
    assert d.failed


def test_toroid_turns_per_layer_on_the_shrinking_inner_circumference(cat):
    """BH-5018 wound with 120 turns of AWG17-G2 (1.246 mm overall) on the coated powder toroid:
    each layer holds floor(pi (ID - 2 h) / d) turns, h = build to the layer's centre line (circle
    circumference; no layer tape on this part), and each turn is the core section offset by h
    (offset rectangle, 2 (w + H) + 2 pi h)."""
    spec = next(p for p in demo_specs() if p.stem == "BH-5018")
    text = spec.read_text(encoding="utf-8")
    assert "    wire: auto\n" in text
    text = text.replace("    wire: auto\n", "    wire: AWG17-G2\n    turns: 120\n", 1)
    d = design_text(text, "BH-5018-120t.yaml", cat)
    core = cat.cores["T-IP75-40X24X14"]
    c = core.coating_m
    od, idia, ht = core.dims["od"] + 2 * c, core.dims["id"] - 2 * c, core.dims["height"] + 2 * c
    wire_d = cat.wires["AWG17-G2"].overall_diameter_m
    layers = d.windings[0].sections[0].layers
    left, h, expected = 120, 0.0, []
    while left > 0:
        centre = h + wire_d / 2
        cap = math.floor(math.pi * (idia - 2 * centre) / wire_d)
        expected.append((min(cap, left), cap, centre))
        left -= min(cap, left)
        h += wire_d
    assert [x[1] for x in expected] == sorted((x[1] for x in expected), reverse=True)     # shrinking
    assert [(la.turns, la.turns_capacity) for la in layers] == [(n, cap) for n, cap, _ in expected]
    for la, (_, _, centre) in zip(layers, expected):
        assert la.mlt_m == pytest.approx(2 * ((od - idia) / 2 + ht) + 2 * math.pi * centre, rel=1e-9)
    # the hole left for the shuttle: ID - 2 x bulged build
    assert d.build.hole_m == pytest.approx(idia - 2 * d.build.bulged_height_m, rel=1e-9)
