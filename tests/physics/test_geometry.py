"""Core geometry checks: IEC 60205 closed forms, limits of the segment method, plain geometry."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import integrate

from specgen.physics import geometry as g

MM = 1e-3


def test_toroid_iec_60205_values():
    # IEC 60205 rectangular-section toroid, r1 = 10 mm, r2 = 20 mm, h = 10 mm:
    # le = 87.10 mm, Ae = 96.09 mm2 (computed from the IEC 60205 formulas)
    ep = g.toroid_effective(40 * MM, 20 * MM, 10 * MM)
    assert ep.le_m / MM == pytest.approx(87.10, abs=0.005)
    assert ep.ae_m2 / MM ** 2 == pytest.approx(96.09, abs=0.005)
    assert ep.ve_m3 == pytest.approx(ep.le_m * ep.ae_m2, rel=1e-12)
    assert ep.amin_m2 == pytest.approx(100 * MM ** 2)


def test_toroid_c1_against_scipy_quadrature():
    # IEC 60205 defines C1 of a toroid by its reluctance: 1/C1 = int_r1^r2 h dr / (2 pi r);
    # scipy.integrate.quad evaluates it independently of the closed-form logarithm
    r1, r2, h = 7 * MM, 19 * MM, 6 * MM
    inv_c1, _ = integrate.quad(lambda r: h / (2 * math.pi * r), r1, r2)
    ep = g.toroid_effective(2 * r2, 2 * r1, h)
    assert ep.c1_per_m == pytest.approx(1 / inv_c1, rel=1e-10)


def test_thin_toroid_tends_to_geometry():
    # IEC 60205: a thin ring has le -> mean circumference, Ae -> the section
    r1, r2, h = 100 * MM, 100.5 * MM, 5 * MM
    ep = g.toroid_effective(2 * r2, 2 * r1, h)
    assert ep.le_m == pytest.approx(math.pi * (r1 + r2), rel=1e-5)
    assert ep.ae_m2 == pytest.approx(h * (r2 - r1), rel=1e-5)


def test_toroid_stacking_factor_scales_area_only():
    a = g.toroid_effective(40 * MM, 25 * MM, 15 * MM)
    b = g.toroid_effective(40 * MM, 25 * MM, 15 * MM, stacking_factor=0.9)
    assert b.le_m == pytest.approx(a.le_m, rel=1e-12)
    assert b.ae_m2 == pytest.approx(0.9 * a.ae_m2, rel=1e-12)


def _parallel(branches):
    """Combine branches that share one MMF: 1/C1 = sum 1/C1_i, C2 = C1^3 sum C2_i / C1_i^3.

    For n identical branches this is IEC 60205's rule of entering them as one segment with the
    summed area (C1/n, C2/n^2), checked below."""
    c1 = 1.0 / sum(1.0 / b.c1_per_m for b in branches)
    c2 = c1 ** 3 * sum(b.c2_per_m3 / b.c1_per_m ** 3 for b in branches)
    return c1 * c1 / c2, c1 / c2


def test_parallel_rule_is_iec_summed_area_for_identical_branches():
    one = g.effective_params_from_segments([30 * MM], [20 * MM ** 2])
    summed = g.effective_params_from_segments([30 * MM], [40 * MM ** 2])
    le, ae = _parallel([one, one])
    assert (le, ae) == pytest.approx((summed.le_m, summed.ae_m2), rel=1e-12)


def test_segment_method_on_thin_rings_matches_closed_form():
    # the toroid cut into 4000 thin rings, each one IEC 60205 segment (l = 2 pi r, A = h dr),
    # combined in parallel, reproduces the IEC 60205 closed form
    r1, r2, h, n = 10 * MM, 20 * MM, 10 * MM, 4000
    edges = np.linspace(r1, r2, n + 1)
    mids = (edges[1:] + edges[:-1]) / 2
    rings = [g.effective_params_from_segments([2 * math.pi * r], [h * (r2 - r1) / n]) for r in mids]
    le, ae = _parallel(rings)
    ep = g.toroid_effective(2 * r2, 2 * r1, h)
    assert le == pytest.approx(ep.le_m, rel=1e-6)
    assert ae == pytest.approx(ep.ae_m2, rel=1e-6)


def test_uniform_section_gives_path_and_area():
    # IEC 60205: for a core of uniform cross-section Ae = A and le = the path length
    ep = g.effective_params_from_segments([10 * MM, 25 * MM, 7 * MM], [50 * MM ** 2] * 3)
    assert ep.le_m == pytest.approx(42 * MM, rel=1e-12)
    assert ep.ae_m2 == pytest.approx(50 * MM ** 2, rel=1e-12)
    assert ep.ve_m3 == pytest.approx(42 * 50 * MM ** 3, rel=1e-12)


@given(st.lists(st.tuples(st.floats(1e-3, 1.0), st.floats(1e-6, 1e-2)), min_size=1, max_size=8))
def test_segment_bounds(segments):
    # IEC 60205 definitions: Ae = C1/C2 lies between the smallest and largest segment area
    # (Cauchy-Schwarz), and Ve = le Ae
    lengths, areas = zip(*segments)
    ep = g.effective_params_from_segments(lengths, areas)
    assert min(areas) * (1 - 1e-9) <= ep.ae_m2 <= max(areas) * (1 + 1e-9)
    assert ep.amin_m2 == min(areas)
    assert ep.ve_m3 == pytest.approx(ep.le_m * ep.ae_m2, rel=1e-9)


# Balanced E-type proportions (outer legs and yokes each about the centre-leg area), invented.
E_BALANCED = [  # A, 2B, C, E, 2D, F   [mm]
    (42, 42, 15, 29.5, 29.6, 12.2),
    (65, 65, 27, 44, 44, 20),
    (55, 55, 21, 37.5, 37, 17),
]


def _rectangle_path(a, b2, e, d2, f):
    """Geometric estimate: the rectangle through the middle of the outer leg, the yokes and the half
    centre leg that feeds each side."""
    p, h = (a - e) / 2, (b2 - d2) / 2
    return 2 * (d2 + h) + 2 * ((e - f) / 2 + p / 2 + f / 4)


@pytest.mark.parametrize("dims", E_BALANCED)
def test_e_core_close_to_geometric_estimate(dims):
    # geometric estimate is the check: le within a few percent of (and, the corners being rounded,
    # below) the rectangular mean path; Ae within 3 % of the centre-leg area
    a, b2, c, e, d2, f = (x * MM for x in dims)
    ep = g.e_core_effective(a, b2, c, e, d2, f)
    rect = _rectangle_path(a, b2, e, d2, f)
    assert 0.93 * rect < ep.le_m < rect
    assert ep.ae_m2 == pytest.approx(f * c, rel=0.04)
    assert ep.amin_m2 <= f * c


def test_round_centre_leg_close_to_geometric_estimate():
    # geometric estimate: round centre leg pi d^2/4, rectangle path as above
    a, b2, c, e, d2, d = (x * MM for x in (44, 44, 15, 33, 32, 15))
    ep = g.e_core_effective(a, b2, c, e, d2, centre_leg_diameter_m=d)
    assert 0.93 * _rectangle_path(a, b2, e, d2, d) < ep.le_m < _rectangle_path(a, b2, e, d2, d)
    assert ep.ae_m2 == pytest.approx(math.pi * d * d / 4, rel=0.03)


def test_e_core_uniform_section_has_exact_area():
    # IEC 60205: when every segment has the same area, Ae is that area exactly
    # (F C = 2 p C = 2 h C with p = h = F/2)
    f, c = 10 * MM, 10 * MM
    a, e = 50 * MM, 40 * MM   # p = 5 mm
    d2, b2 = 30 * MM, 40 * MM  # h = 5 mm
    ep = g.e_core_effective(a, b2, c, e, d2, f)
    assert ep.ae_m2 == pytest.approx(f * c, rel=1e-12)


def test_efd_thinner_centre_leg_reduces_area():
    base = dict(width=30 * MM, height=15 * MM, depth=9 * MM, window_width=22 * MM,
                window_height=11 * MM, centre_leg_width=14.6 * MM)
    flat = g.core_effective("EFD", {**base, "centre_leg_depth": 4.9 * MM})
    full = g.core_effective("E", base)
    assert flat.ae_m2 < full.ae_m2
    # amin is the smallest of centre leg (14.6 x 4.9), outer legs (2 x 4 x 9), yokes (2 x 2 x 9)
    assert flat.amin_m2 == pytest.approx(min(14.6 * 4.9, 72.0, 36.0) * MM ** 2)


def test_ei_scrapless_defaults_and_geometric_path():
    # scrapless EI (common practice): window a/2 x 1.5a, legs and yokes a/2; the rectangular mean
    # path is 6a; with no corners rounded le would be 6a, the segment method must come out below it
    a, stack = 25 * MM, 30 * MM
    ep = g.core_effective("EI", {"tongue": a}, stack_m=stack, stacking_factor=0.95)
    explicit = g.ei_effective(a, stack, 0.95, a / 2, 1.5 * a, a / 2, a / 2)
    assert ep == explicit
    assert 0.9 * 6 * a < ep.le_m < 6 * a
    # uniform section (tongue area = both legs = both yokes): Ae = a * stack * k exactly
    assert ep.ae_m2 == pytest.approx(a * stack * 0.95, rel=1e-12)
    assert g.window_area_m2("EI", {"tongue": a}) == pytest.approx(0.75 * a * a)


def test_ei_needs_stack():
    with pytest.raises(ValueError, match="stack"):
        g.core_effective("EI", {"tongue": 0.02})


def test_pot_core_plates_against_scipy():
    # the end-plate integrals int dr/A and int dr/A^2 (A = 2 pi r t g(r)) recomputed with
    # scipy.integrate.quad, RM-style plate (g falls linearly from 1 to skirt_coverage)
    d1, d2, d3, d4, ht, hw, rf = 30 * MM, 25 * MM, 12 * MM, 3 * MM, 20 * MM, 13 * MM, 0.55
    t, r2, r3 = (ht - hw) / 2, d2 / 2, d3 / 2

    def area(r):
        return 2 * math.pi * r * t * (1 - (1 - rf) * (r - r3) / (r2 - r3))

    p1 = 2 * integrate.quad(lambda r: 1 / area(r), r3, r2)[0]
    p2 = 2 * integrate.quad(lambda r: 1 / area(r) ** 2, r3, r2)[0]
    a_post = math.pi * (d3 ** 2 - d4 ** 2) / 4
    a_ring = rf * math.pi * (d1 ** 2 - d2 ** 2) / 4
    lengths = [hw, hw, math.pi * ((d1 - d2) / 2 + t) / 4, math.pi * ((d3 - d4) / 2 + t) / 4]
    areas = [a_post, a_ring, (a_ring + area(r2)) / 2, (a_post + area(r3)) / 2]
    c1 = sum(l / a for l, a in zip(lengths, areas)) + p1
    c2 = sum(l / a ** 2 for l, a in zip(lengths, areas)) + p2
    ep = g.pot_effective(d1, d2, d3, ht, hw, d4, rf)
    assert ep.c1_per_m == pytest.approx(c1, rel=1e-9)
    assert ep.c2_per_m3 == pytest.approx(c2, rel=1e-9)


def test_pot_core_close_to_geometric_estimate():
    # geometric estimate: mean path = 2 (window height + plate thickness) + 2 radial spans between
    # the middle of the post wall and the middle of the outer wall. The radial plates weight the path
    # unevenly, so the bound is looser than for E cores (measured: le = 0.89 of the rectangle).
    # Ae must lie between the post area and the largest section (Cauchy-Schwarz bound of C1/C2).
    d1, d2, d3, ht, hw = 36 * MM, 30 * MM, 16 * MM, 22 * MM, 14.6 * MM
    ep = g.core_effective("POT", dict(outer_diameter=d1, inner_diameter=d2, post_diameter=d3,
                                      height=ht, window_height=hw))
    t = (ht - hw) / 2
    rect = 2 * (hw + t) + 2 * ((d1 + d2) / 4 - d3 / 4)
    assert 0.85 * rect < ep.le_m < rect
    a_post = math.pi * d3 ** 2 / 4
    a_plate_wall = math.pi * d2 * t
    assert ep.amin_m2 <= a_post < ep.ae_m2 < a_plate_wall


def test_rm_cut_wall_raises_c1():
    dims = dict(outer_diameter=28 * MM, inner_diameter=22 * MM, post_diameter=11 * MM,
                height=20 * MM, window_height=13 * MM)
    pot = g.core_effective("POT", dims)
    rm = g.core_effective("RM", {**dims, "skirt_coverage": 0.5})
    assert rm.c1_per_m > pot.c1_per_m


def test_dispatcher_toroid_stack_and_errors():
    dims = {"od": 40 * MM, "id": 20 * MM, "height": 10 * MM}
    stacked = g.core_effective("toroid", dims, stack_m=20 * MM)
    assert stacked.ae_m2 == pytest.approx(2 * g.core_effective("TOROID", dims).ae_m2, rel=1e-12)
    with pytest.raises(ValueError, match="shape"):
        g.core_effective("UU", dims)
    with pytest.raises(ValueError, match="'id'"):
        g.core_effective("toroid", {"od": 0.04, "height": 0.01})
    with pytest.raises(ValueError):
        g.core_effective("E", {"width": 0.02, "height": 0.02, "depth": 0.005, "window_width": 0.025,
                               "window_height": 0.01, "centre_leg_width": 0.005})


def test_window_geometry():
    e = dict(width=42 * MM, height=42 * MM, depth=15 * MM, window_width=29.5 * MM,
             window_height=29.6 * MM, centre_leg_width=12.2 * MM)
    assert g.window_height_m("E", e) == pytest.approx(8.65 * MM)
    assert g.window_breadth_m("E", e) == pytest.approx(29.6 * MM)
    assert g.window_area_m2("E", e) == pytest.approx(8.65 * 29.6 * MM ** 2)
    etd = {**{k: v for k, v in e.items() if k != "centre_leg_width"}, "centre_leg_diameter": 14 * MM}
    assert g.window_area_m2("ETD", etd) == pytest.approx(7.75 * 29.6 * MM ** 2)
    pot = dict(outer_diameter=36 * MM, inner_diameter=30 * MM, post_diameter=16 * MM,
               height=22 * MM, window_height=14.6 * MM)
    assert g.window_area_m2("POT", pot) == pytest.approx(7 * 14.6 * MM ** 2)
    assert g.window_area_m2("toroid", {"od": 0.04, "id": 0.02, "height": 0.01}) == pytest.approx(
        math.pi * 1e-4)
    assert g.window_height_m("toroid", {"od": 0.04, "id": 0.02, "height": 0.01}) == pytest.approx(0.01)


def test_outer_surface_areas():
    # cylinder 2 pi r^2 + pi d h for pot cores; EI box grows with the stack
    pot = dict(outer_diameter=30 * MM, inner_diameter=25 * MM, post_diameter=12 * MM,
               height=20 * MM, window_height=13 * MM)
    assert g.outer_surface_area_m2("POT", pot) == pytest.approx(
        2 * math.pi * (15 * MM) ** 2 + math.pi * 30 * MM * 20 * MM)
    small = g.outer_surface_area_m2("EI", {"tongue": 0.025}, stack_m=0.025)
    big = g.outer_surface_area_m2("EI", {"tongue": 0.025}, stack_m=0.05)
    assert big > small > 0
    tor = {"od": 0.04, "id": 0.02, "height": 0.015}
    bare = math.pi * 0.04 * 0.015 + 2 * math.pi * 0.02 ** 2
    assert g.outer_surface_area_m2("toroid", tor) > bare


def test_mass_and_lamination_count():
    assert g.core_mass_kg(1e-5, 7650.0) == pytest.approx(0.0765)
    # 25 mm stack of 0.35 mm laminations at 0.95: 67.86 -> 68
    assert g.lamination_count(25 * MM, 0.35 * MM, 0.95) == 68
    assert list(g.lamination_count(np.array([10, 20]) * MM, 0.5 * MM, 1.0)) == [20, 40]


@given(st.floats(1e-3, 0.1), st.floats(1e-3, 0.1), st.floats(0, 0.05))
def test_mlt_offset_perimeter_steiner(w, d, h):
    # Steiner's formula for parallel convex sets: the perimeter of the outward offset by h grows
    # by 2 pi h exactly
    assert g.mlt_rect_m(w, d, h) - g.mlt_rect_m(w, d, 0.0) == pytest.approx(2 * math.pi * h, abs=1e-12)
    assert g.mlt_round_m(w, h) == pytest.approx(math.pi * w + 2 * math.pi * h, rel=1e-12)
    assert g.mlt_rect_m(w, d, 0.0) == pytest.approx(2 * (w + d))


def test_toroid_turn_lengths():
    # bare turn: perimeter of the core section (10 x 15 mm); hole circumference shrinks with build
    assert g.toroid_turn_length_m(40 * MM, 20 * MM, 15 * MM, 0.0) == pytest.approx(50 * MM)
    assert g.toroid_turn_length_m(40 * MM, 20 * MM, 15 * MM, 1 * MM) == pytest.approx(
        50 * MM + 2 * math.pi * MM)
    assert g.toroid_inner_circumference_m(20 * MM, 2 * MM) == pytest.approx(math.pi * 16 * MM)


def test_pq_outer_legs_carry_the_post_cross_section():
    """PQ cores: the shaped outer legs together match the centre post's cross-section (the shape's design
    rule, common practice, from memory), so Ae is at least the post area (the plates add a little) and the
    outer legs are no bottleneck. PQ 35/35 from memory: Ae about 190 mm^2, le about 88 mm (within 15 %)."""
    import math

    dims = {"width": 35.1e-3, "height": 34.6e-3, "depth": 26.0e-3, "window_width": 32.0e-3,
            "window_height": 25.0e-3, "centre_leg_diameter": 14.35e-3}
    ep = g.core_effective("PQ", dims)
    post = math.pi * dims["centre_leg_diameter"] ** 2 / 4
    assert post <= ep.ae_m2 <= 1.25 * post
    assert ep.ae_m2 == pytest.approx(190e-6, rel=0.15)
    assert ep.le_m == pytest.approx(88e-3, rel=0.15)


def test_part_outline_boxes():
    # bounding boxes by elementary geometry, largest side first
    pot = dict(outer_diameter=30 * MM, inner_diameter=25 * MM, post_diameter=12 * MM, height=20 * MM,
               window_height=13 * MM)
    assert [float(x) for x in g.part_outline_m("POT", pot, 0.0, None, 0.0)] == pytest.approx(
        [30 * MM, 30 * MM, 20 * MM])
    # a toroid over a 0.2 mm coating and a 3 mm build on every face
    tor = {"od": 0.04, "id": 0.02, "height": 0.015}
    a, b, c = g.part_outline_m("toroid", tor, 0.2 * MM, None, np.array([3 * MM, 0.0]))
    assert a == pytest.approx([40.4 * MM + 6 * MM, 40.4 * MM]) and b == pytest.approx(a)
    assert c == pytest.approx([15.4 * MM + 6 * MM, 15.4 * MM])
    # an E core's coil stands proud of the depth by its window build on both sides of the centre leg
    e = dict(width=42 * MM, height=42 * MM, depth=15 * MM, window_width=29.5 * MM, window_height=29.6 * MM,
             centre_leg_width=12.2 * MM)
    box = [float(x) for x in g.part_outline_m("E", e, 0.0, None, 0.0)]
    assert box == pytest.approx([42 * MM, 42 * MM, 15 * MM + 2 * 8.65 * MM])
