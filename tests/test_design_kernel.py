"""The design kernel: each array-capable step against a published formula, and rows against single values.

What is checked, and against what:
- Faraday's law, V = 4.44 f N B Ae (sine) and V = 4 f N B Ae (square) (McLyman, Transformer and Inductor
  Design Handbook; any electrical machines text), worked by hand;
- the layer AC factor from zero MMF, averaged over m layers, equals Dowell's m-layer factor (Dowell,
  "Effects of eddy currents in transformer windings", Proc. IEE 113(8), 1966), for foil where Delta = t/delta;
- McLyman's temperature rise dT = 450 (P/At [W/cm^2])^0.826, by hand; the cooling factors applied to it;
- Steinmetz P = k f^alpha B^beta by hand; the magnetizing current V/(2 pi f L) (sine) and the triangle peak
  V/(4 f L) of a square-wave drive (V = L di/dt over half a period);
- the section winding on rows equals the engine's layer-by-layer ``build.wind_section`` (hypothesis);
- every array function on N rows equals the same function on each row alone (1e-9);
- the vectorised gap solve equals the scalar solver of ``physics.gap`` (1e-9 relative).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from specgen.catalog.models import CoolingFigures
from specgen.design import kernel as K
from specgen.design.build import wind_section
from specgen.design.kinds import kind_for, kind_names, register, unregister
from specgen.design.state import CoolingModel, Former
from specgen.physics import dowell
from specgen.physics import gap as gapmod
from specgen.physics.layers import layer_fr

REL = 1e-9


def test_faraday_turns_by_hand():
    # 230 V, 50 Hz, 1.2 T, Ae 10 cm^2: N = 230 / (4.443 x 50 x 1.2 x 1e-3) = 862.8 (4.443 = 2 pi / sqrt 2)
    n = K.turns_for_voltage(230.0, 50.0, 1.2, 10e-4, "sine")
    assert n == pytest.approx(230.0 / (2 * math.pi / math.sqrt(2) * 50 * 1.2 * 1e-3), rel=1e-12)
    assert n == pytest.approx(862.8, abs=0.05)
    # square wave at 100 kHz: N = 48 / (4 x 1e5 x 0.2 x 100e-6) = 6.0 exactly -> 6 whole turns, not 7
    n_sq = K.turns_for_voltage(48.0, 100e3, 0.2, 100e-6, "square")
    assert n_sq == pytest.approx(6.0, rel=1e-12)
    assert K.whole_turns(n_sq) == 6.0 and K.whole_turns(6.01) == 7.0 and K.whole_turns(0.2) == 1.0


def test_flux_limit_rules_rowwise():
    b25, b100 = np.array([0.49, 0.49, 1.6, 0.49]), np.array([0.39, 0.39, 1.5, 0.39])
    design = np.array([np.nan, 0.2, 1.5, 0.5])
    got = K.flux_limit_t(b25, b100, 100.0, 0.8, design)
    # shop rule 0.8 x B_sat(100) = 0.312; design 0.2 below it; 1.5 above 1.2; 0.5 above 0.312
    assert got == pytest.approx([0.8 * 0.39, 0.2, 0.8 * 1.5, 0.8 * 0.39], rel=REL)
    assert K.flux_limit_t(0.49, 0.39, 100.0, 0.8, None, spec_limit_t=0.25) == 0.25
    assert K.flux_limit_source(b25, b100, 100.0, 0.8, design).tolist() == [
        K.FLUX_LIMIT_SHOP, K.FLUX_LIMIT_DESIGN, K.FLUX_LIMIT_SHOP, K.FLUX_LIMIT_SHOP]
    assert K.flux_limit_source(0.49, 0.39, 100.0, 0.8, 0.2, spec_limit_t=0.25) == K.FLUX_LIMIT_SPEC
    for i in range(4):
        assert K.flux_limit_t(b25[i], b100[i], 100.0, 0.8, design[i]) == pytest.approx(got[i], rel=REL)
    # unipolar: only B_limit - B_r is usable, held at 5 % of the limit
    assert K.unipolar_swing_t(0.3, 0.1, "unipolar") == pytest.approx(0.2)
    assert K.unipolar_swing_t(0.3, 0.4, "unipolar") == pytest.approx(0.015)
    assert K.unipolar_swing_t(0.3, 0.1, "sine") == 0.3


@pytest.mark.parametrize("m", [1, 2, 3, 5, 8])
@pytest.mark.parametrize("delta", [0.005, 0.3, 1.0, 2.5, 6.0])
def test_layer_factor_from_zero_mmf_is_dowells(m, delta):
    """Foil filling the breadth (porosity 1): Delta = t / skin depth; mean over layers 1..m = Dowell's F_r(m)."""
    skin = 1e-4
    foil = K.WireGeometry(kind=K.WIRE_CODE["foil"], strand_diameter_m=0.0, strand_overall_m=0.0,
                          thickness_m=delta * skin, width_m=0.02, strands_in_hand=1.0, sub_layers=1.0,
                          copper_area_m2=0.02 * delta * skin, pitch_m=0.02, layer_height_m=delta * skin,
                          one_turn_per_layer=True)
    h = K.current_harmonics("sine")
    layers = [K.layer_ac_factor(foil, 1, 0.02, skin, j * 2.0, (j + 1) * 2.0, h) for j in range(m)]
    assert np.mean(layers) == pytest.approx(dowell.dowell_fr(delta, m), rel=1e-6)
    rows = K.layer_ac_factor(foil, np.ones(m), np.full(m, 0.02), skin, np.arange(m) * 2.0,
                             (np.arange(m) + 1) * 2.0, h)
    assert rows == pytest.approx(layers, rel=REL)
    # the closed-form section mean (the search's form) equals the same for equal layers
    sec = K.section_ac_factor(foil, m, 1, 0.02, skin, 0.0, 2.0 * m, h)
    assert sec == pytest.approx(np.mean(layers), rel=1e-9)


def test_litz_layer_is_the_mean_over_its_strand_layers():
    """A Litz bundle layer of n strands counts as round(sqrt n) strand layers, the MMF stepping evenly, each at the
    porosity of the strands the layer holds; Dowell's square strands rescaled to round ones by 3/pi (the second
    area moments of the square and the circle of equal area)."""
    litz = K.WireGeometry(kind=K.WIRE_CODE["litz"], strand_diameter_m=0.1e-3, strand_overall_m=0.115e-3,
                          thickness_m=0.0, width_m=0.0, strands_in_hand=1.0, sub_layers=float(round(math.sqrt(100))),
                          copper_area_m2=100 * math.pi * 0.05e-3 ** 2, pitch_m=1.5e-3, layer_height_m=1.5e-3,
                          one_turn_per_layer=False, bundle_strands=100.0)
    skin = 0.2e-3
    eta = 8 * 100 / 10 * 0.1e-3 / 12e-3        # 8 turns x 10 strands across each strand layer, over the breadth
    d = (math.pi / 4) ** 0.75 * 0.1 / 0.2 * math.sqrt(eta)     # Dowell's Delta of a round strand, by hand
    f1, f2 = 3.0, 7.0
    dowell_mean = np.mean([layer_fr(d, f1 + (f2 - f1) * j / 10, f1 + (f2 - f1) * (j + 1) / 10) for j in range(10)])
    got = K.layer_ac_factor(litz, 8, 12e-3, skin, f1, f2, K.current_harmonics("sine"))
    assert got == pytest.approx(1 + 3 / math.pi * (dowell_mean - 1), rel=1e-9)


def test_layer_factor_with_a_wire_per_row_equals_each_wire_alone():
    from specgen.catalog.loader import load_catalog

    cat = load_catalog(None)
    wires = sorted(cat.wires.values(), key=lambda w: w.id)
    picks = [next(w for w in wires if w.kind == k) for k in ("round", "litz", "foil", "strip", "tiw")
             if any(w.kind == k for w in wires)]
    geos = [K.wire_geometry(w, 2 if w.kind == "round" else 1) for w in picks]
    rows = K.stack_wires(geos)
    n = len(geos)
    turns, usable = np.arange(3.0, 3.0 + n), np.linspace(10e-3, 30e-3, n)
    f1, f2 = np.linspace(0.0, 8.0, n), np.linspace(3.0, 14.0, n)
    for wf in ("sine", "square"):
        h = K.current_harmonics(wf)
        got = K.layer_ac_factor(rows, turns, usable, 0.2e-3, f1, f2, h)
        for i, g in enumerate(geos):
            assert got[i] == pytest.approx(K.layer_ac_factor(g, turns[i], usable[i], 0.2e-3, f1[i], f2[i], h),
                                           rel=1e-9)


def test_square_wave_harmonics_weight_as_its_power_spectrum():
    h = K.current_harmonics("square")
    assert h.orders[:3].tolist() == [1.0, 3.0, 5.0] and h.orders[-1] == 39.0
    # odd harmonics of a square wave have amplitude 1/n: power 1/n^2, normalised
    w = 1.0 / h.orders ** 2
    assert h.weights == pytest.approx(w / w.sum(), rel=1e-12)
    assert K.current_harmonics("sine").orders.tolist() == [1.0]


NATURAL = CoolingModel("natural")


def test_mclyman_rise_by_hand_and_the_potting_factor():
    # 10 W over 200 cm^2: psi = 0.05 W/cm^2; dT = 450 x 0.05^0.826 = 37.5 K (McLyman)
    by_hand = 450.0 * 0.05 ** 0.826
    assert K.temperature_rise_k(10.0, 200e-4, NATURAL, 40.0) == pytest.approx(by_hand, rel=1e-12)
    potted = K.cooling_model("potted", None, CoolingFigures(potted_rise_factor=0.85, potted_source="a test"))
    assert (potted.potted_factor, potted.potted_source) == (0.85, "a test")
    assert K.temperature_rise_k(10.0, 200e-4, potted, 40.0) == pytest.approx(0.85 * by_hand, rel=1e-12)
    assert K.temperature_rise_k(1e9, 1e-4, NATURAL, 40.0) == K.MAX_HOT_C - 40.0
    st_ = K.thermal_state(10.0, 200e-4, NATURAL, 40.0, 5.0)
    assert (st_.winding_c, st_.hot_c, st_.rise_k) == pytest.approx((40 + by_hand, 45 + by_hand, by_hand))
    # a measured still-air R_th (catalogue) in place of the surface rule, row by row (NaN: none)
    rows = K.temperature_rise_k(np.array([2.0, 2.0]), 200e-4, NATURAL, 40.0, np.array([15.0, np.nan]))
    assert rows == pytest.approx([30.0, 450.0 * (2.0 / 200.0) ** 0.826], rel=1e-12)
    assert K.hot_spot_c(np.array([25.0]), np.array([30.0]), 5.0)[0] == 60.0


def _air(film_c):
    """Dry air at atmospheric pressure: Incropera and DeWitt, Table A.4 at 300 K and 350 K (from memory), linear."""
    w = (film_c + 273.15 - 300.0) / 50.0
    k, nu, pr = ((1 - w) * a + w * b for a, b in ((26.3e-3, 30.0e-3), (15.89e-6, 20.92e-6), (0.707, 0.700)))
    return k, nu, pr


@pytest.mark.parametrize("p, area, v, ambient", [(10.0, 200e-4, 1.0, 40.0), (3.0, 60e-4, 3.0, 25.0),
                                                 (25.0, 500e-4, 0.5, 50.0)])
def test_forced_air_rise_by_the_flat_plate_correlation(p, area, v, ambient):
    """The rise with air at v over the part: laminar flat plate, h_F = 0.664 Re_L^1/2 Pr^1/3 k / L (Incropera and
    DeWitt, average Nusselt number of a laminar flat plate, from memory), L the side of the cube with the part's
    surface, air at the film ambient + 20 K; combined with McLyman's still-air h_N(dT) = P_N / (A dT),
    dT = 450 (P_N / A[cm^2])^0.826, by Churchill's n = 3 (Incropera, mixed convection); the balance by scipy brentq."""
    from scipy import optimize

    length = math.sqrt(area / 6.0)
    k, nu, pr = _air(ambient + 20.0)
    hf = 0.664 * math.sqrt(v * length / nu) * pr ** (1 / 3) * k / length

    def balance(dt):
        hn = 1e4 * (dt / 450.0) ** (1 / 0.826) / dt
        return dt * area * (hn ** 3 + hf ** 3) ** (1 / 3) - p

    want = optimize.brentq(balance, 1e-9, 1e3, xtol=1e-13)
    cooling = K.cooling_model("forced", v, CoolingFigures())
    assert (cooling.air_speed_m_s, cooling.air_speed_from) == (v, "spec")
    assert K.temperature_rise_k(p, area, cooling, ambient) == pytest.approx(want, rel=1e-9)
    assert want < 450.0 * (p / (area * 1e4)) ** 0.826          # air over the part only cools it
    # a measured still-air R_th: h_N = 1 / (R_th A) (R = 1 / (h A), the definition)
    r_th = 9.0
    hn = 1.0 / (r_th * area)
    assert K.temperature_rise_k(p, area, cooling, ambient, r_th) == pytest.approx(
        p / ((hn ** 3 + hf ** 3) ** (1 / 3) * area), rel=1e-12)
    rows = K.temperature_rise_k(np.array([p, p]), area, cooling, ambient, np.array([r_th, np.nan]))
    assert rows == pytest.approx([p / ((hn ** 3 + hf ** 3) ** (1 / 3) * area), want], rel=1e-9)


def test_forced_air_speed_defaults_to_the_shops():
    c = K.cooling_model("forced", None, CoolingFigures(air_speed_m_s=2.5))
    assert (c.air_speed_m_s, c.air_speed_from) == (2.5, "shop default")
    assert K.cooling_model("natural", None, CoolingFigures()) == NATURAL


def test_current_density_by_cooling():
    table = {"natural": 3e6, "forced": 4.5e6}
    assert K.current_density_a_m2(table, "forced") == 4.5e6
    assert K.current_density_a_m2(table, "potted") == 3e6


def test_core_loss_by_hand_and_rows():
    k, a, b = 1.5, 1.3, 2.6
    assert K.core_loss_w_m3("sine", 100e3, 0.1, 0.5, k, a, b) == pytest.approx(k * 1e5 ** a * 0.1 ** b, rel=1e-12)
    assert K.core_loss_w_m3("sine", 100e3, 0.0, 0.5, k, a, b) == 0.0
    bs = np.array([0.0, 0.05, 0.1, 0.2])
    for drive in ("sine", "square", "unipolar", "ripple"):
        rows = K.core_loss_w_m3(drive, 50e3, bs, 0.4, k, a, b)
        for bi, r in zip(bs, rows):
            assert K.core_loss_w_m3(drive, 50e3, float(bi), 0.4, k, a, b) == pytest.approx(r, rel=REL, abs=0.0)
    grouped = K.core_loss_grouped_w_m3("sine", 50e3, bs, 0.5, np.array([0, 1, 0, 1]), np.array([1.0, 2.0]),
                                       np.array([1.2, 1.4]), np.array([2.5, 2.7]))
    assert grouped[3] == pytest.approx(2.0 * 50e3 ** 1.4 * 0.2 ** 2.7, rel=1e-12)
    with pytest.raises(ValueError):
        K.core_loss_w_m3("triangle", 50e3, 0.1, 0.5, k, a, b)


def test_magnetizing_current_by_hand():
    rms, pk = K.magnetizing_current_a(230.0, 50.0, 10.0, "sine")
    assert rms == pytest.approx(230.0 / (2 * math.pi * 50 * 10.0)) and pk == pytest.approx(rms * math.sqrt(2))
    rms, pk = K.magnetizing_current_a(48.0, 100e3, 1e-3, "square")
    assert pk == pytest.approx(48.0 / (4 * 100e3 * 1e-3)) and rms == pytest.approx(pk / math.sqrt(3))
    rows = K.magnetizing_current_a(np.array([24.0, 48.0]), 100e3, np.array([1e-3, 2e-3]), "unipolar", 0.4)
    assert rows[1][1] == pytest.approx(48.0 * 0.4 / 100e3 / 2e-3)


def test_vector_gap_solve_equals_the_scalar_solver():
    rng = np.random.default_rng(7)
    n = 40
    ae, le = rng.uniform(20e-6, 400e-6, n), rng.uniform(20e-3, 150e-3, n)
    mu, window = rng.uniform(1500, 3000, n), rng.uniform(5e-3, 30e-3, n)
    turns = rng.integers(5, 120, n).astype(float)
    target = gapmod.inductance_gapped_h(turns, ae, le, mu, 0.0) * rng.uniform(0.02, 1.2, n)
    rows = K.gap_for_inductance_m(target, turns, ae, le, mu, window)
    for i in range(n):
        one = gapmod.gap_for_inductance_m(target[i], turns[i], ae[i], le[i], mu[i], window[i])
        if one is None:
            assert math.isnan(rows[i]) and math.isnan(K.gap_for_inductance_m(target[i], turns[i], ae[i], le[i],
                                                                             mu[i], window[i]))
        else:
            assert rows[i] == pytest.approx(one, rel=1e-9)
            # and the gap does give the inductance (fringing included)
            assert gapmod.inductance_gapped_h(turns[i], ae[i], le[i], mu[i], rows[i], window[i]) == \
                pytest.approx(target[i], rel=1e-9)
    assert np.isnan(rows).any() and not np.isnan(rows).all()


def test_gapped_turns_and_gap_rows_equal_single_rows():
    rng = np.random.default_rng(11)
    n = 30
    ae, le = rng.uniform(30e-6, 300e-6, n), rng.uniform(30e-3, 120e-3, n)
    mu, window = np.full(n, 2000.0), rng.uniform(8e-3, 25e-3, n)
    target, ipk, lim = rng.uniform(50e-6, 2e-3, n), rng.uniform(1.0, 10.0, n), np.full(n, 0.3)
    turns, gaps = K.gapped_turns_and_gap(target, ipk, lim, ae, le, mu, window)
    for i in range(n):
        t1, g1 = K.gapped_turns_and_gap(target[i], ipk[i], lim[i], ae[i], le[i], mu[i], window[i])
        assert t1 == turns[i] and g1 == pytest.approx(gaps[i], abs=1e-12)
        # the energy method: the built part stays at or below the limit at the peak current
        l_built = gapmod.inductance_gapped_h(t1, ae[i], le[i], mu[i], g1, window[i] if g1 > 0 else None)
        assert gapmod.b_peak_from_inductance_t(l_built, ipk[i], t1, ae[i]) <= lim[i] * (1 + 1e-12)
        assert g1 / K.GAP_STEP_M == pytest.approx(round(g1 / K.GAP_STEP_M), abs=1e-6)


def _former(kind: str, rng: np.random.Generator) -> Former:
    if kind == "toroid":
        od = rng.uniform(15e-3, 80e-3)
        id_ = od * rng.uniform(0.4, 0.7)
        return Former(kind="toroid", od_m=od, id_m=id_, core_height_m=rng.uniform(5e-3, 40e-3), height_m=id_ / 2 * 0.8)
    return Former(kind="rect" if kind == "rect" else "round", tube_width_m=rng.uniform(5e-3, 30e-3),
                  tube_depth_m=rng.uniform(5e-3, 60e-3), breadth_m=rng.uniform(8e-3, 60e-3),
                  height_m=rng.uniform(3e-3, 20e-3))


@settings(max_examples=150, deadline=None)
@given(seed=st.integers(0, 2 ** 31 - 1), kind=st.sampled_from(["rect", "round", "toroid"]), foil=st.booleans())
def test_section_rows_equal_the_engines_layer_by_layer_build(seed, kind, foil):
    rng = np.random.default_rng(seed)
    fm = _former(kind, rng)
    foil = foil and kind != "toroid"
    pitch = rng.uniform(0.1e-3, 3e-3) if not foil else fm.breadth_m * rng.uniform(0.3, 1.05)
    lh = rng.uniform(0.05e-3, 2e-3)
    turns = int(rng.integers(1, 3000 if not foil else 40))
    start = rng.uniform(0, 3e-3)
    margin = rng.uniform(0, 4e-3) if kind != "toroid" else 0.0
    tape = rng.uniform(0, 0.2e-3)
    ref = wind_section(fm, turns, pitch, lh, start, margin, tape, foil)
    arr = lambda x: np.array([x], dtype=float)
    rows = K.FormerArrays(np.array([K.FORMER_CODE[kind]], dtype=np.int8), arr(fm.tube_width_m), arr(fm.tube_depth_m),
                          arr(fm.breadth_m), arr(fm.od_m), arr(fm.id_m), arr(fm.core_height_m))
    got = K.wind_section(rows, arr(turns), pitch, lh, start, margin, tape, foil)
    assert bool(got.ok[0]) == (ref is not None)
    if ref is None:
        return
    assert got.turns_per_layer[0] == ref.turns_per_layer and got.layers[0] == len(ref.layers)
    assert got.last_layer_turns[0] == ref.layers[-1].turns
    assert got.copper_length_m[0] == pytest.approx(ref.copper_length_m, rel=1e-9)
    assert got.end_build_m[0] == pytest.approx(ref.end_build_m, rel=1e-9)
    assert got.usable_breadth_m[0] == pytest.approx(ref.usable_breadth_m, rel=1e-9)


def test_section_rows_mixed_formers_equal_one_row_at_a_time():
    rng = np.random.default_rng(3)
    formers = [_former(k, rng) for k in ("rect", "round", "toroid", "rect", "toroid", "round")]
    rows = K.FormerArrays(np.array([K.FORMER_CODE[f.kind] for f in formers], dtype=np.int8),
                          *(np.array([getattr(f, a) for f in formers]) for a in
                            ("tube_width_m", "tube_depth_m", "breadth_m", "od_m", "id_m", "core_height_m")))
    turns = np.array([40.0, 300.0, 25.0, 1.0, 80.0, 12.0])
    pitch, lh = np.full(6, 0.6e-3), np.full(6, 0.6e-3)
    all_rows = K.wind_section(rows, turns, pitch, lh, 0.5e-3, 0.0, 0.05e-3, False)
    for i in range(6):
        one = K.wind_section(rows.take(np.array([i])), turns[i:i + 1], pitch[i], lh[i], 0.5e-3, 0.0, 0.05e-3, False)
        assert one.copper_length_m[0] == pytest.approx(all_rows.copper_length_m[i], rel=REL)
        assert one.layers[0] == all_rows.layers[i] and bool(one.ok[0]) == bool(all_rows.ok[i])


def test_dcr_and_skin_depth():
    # 1 m of 1 mm^2 copper at 20 degC: 1/58 ohm (IEC 60028); at 100 Hz... skin depth of copper at 20 degC,
    # 50 Hz: sqrt(rho / (pi f mu0)) = 9.33 mm (any fields text)
    assert K.dc_resistance_ohm(1e-6, 1.0, 20.0) == pytest.approx(1 / 58.0, rel=1e-12)
    # a conductor per row: aluminium 0.028264 ohm mm^2/m at 20 degC (IEC 60889, from memory)
    rows = K.dc_resistance_ohm(np.array([1e-6, 1e-6]), np.array([1.0, 2.0]), 20.0, ["copper", "aluminium"])
    assert rows == pytest.approx([1 / 58.0, 2 * 0.028264], rel=1e-12)
    assert K.skin_depth_m(50.0, 20.0) == pytest.approx(9.33e-3, rel=2e-3)
    assert K.skin_depth_m(0.0, 20.0) == math.inf
    assert K.copper_loss_w(0.5, 2.0, 3.0, 4.0) == pytest.approx(16 * 0.5 + 9 * 0.5 * 2.0)


def test_kinds_are_registered_by_name_and_a_new_kind_fits_in():
    assert set(kind_names()) >= {"transformer", "inductor"}
    assert kind_for("transformer").name == "transformer"

    class CurrentTransformer:
        name = "test-current-transformer"

        def start(self, spec, cat, parts):  # pragma: no cover - registration only
            raise NotImplementedError

        def flux_checks(self, state):  # pragma: no cover
            return []

        def test_limits(self, state):  # pragma: no cover
            raise NotImplementedError

    register(CurrentTransformer())
    try:
        assert kind_for("test-current-transformer").name == "test-current-transformer"
    finally:
        unregister("test-current-transformer")
    with pytest.raises(KeyError):
        kind_for("test-current-transformer")
