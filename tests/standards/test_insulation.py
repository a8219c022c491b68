"""Insulation coordination lookups against the published tables they carry.

Sources named beside each check; figures recalled from memory of the standards (verify against the standard
before production use):
- IEC 60664-1:2007 Table F.1 (rated impulse voltage), Table F.2 (clearance, case A, up to 2000 m), Table F.4
  (creepage, materials other than printed wiring), Table A.2 (altitude correction), 4.2.3 and 5.1.6 (preferred
  impulse series; reinforced clearance), 4.8.1.3 (material groups by CTI);
- IEC 60950-1:2005 2.10.5 / IEC 62368-1 5.4.4 (solid insulation, thin sheets);
- IEC 60950-1:2005 Table 5B / IEC 62368-1 (1500 V / 3000 V hipot up to 250 V on mains);
- common practice: 2 U + 1000 V, routine test 1 s at 120 %.
"""

import math

import pytest

from specgen.standards import insulation as ins
from specgen.standards.insulation import Grade, MaterialGroup

# ------------------------------------------------------------------ rated impulse voltage, Table F.1


@pytest.mark.parametrize("mains_v, category, impulse_v", [
    # IEC 60664-1:2007 Table F.1 (from memory): 150 V row 0.8/1.5/2.5/4.0 kV; 300 V row 1.5/2.5/4.0/6.0 kV;
    # 600 V row 2.5/4.0/6.0/8.0 kV
    (120, "I", 800), (120, "II", 1500), (120, "III", 2500), (120, "IV", 4000),
    (230, 1, 1500), (230, 2, 2500), (230, 3, 4000), (230, 4, 6000),
    (400, "OVC I", 2500), (480, "II", 4000), (600, "III", 6000), (600, "IV", 8000),
    # 50 V row 0.33/0.5/0.8/1.5 kV and 1000 V row 4/6/8/12 kV
    (24, "II", 500), (50, "I", 330), (1000, "IV", 12000),
])
def test_rated_impulse_table_f1(mains_v, category, impulse_v):
    result = ins.rated_impulse_voltage_v(mains_v, category)
    assert result.impulse_v == impulse_v
    assert "Table F.1" in result.source


def test_rated_impulse_row_is_up_to_and_including():
    # IEC 60664-1 Table F.1 rows read "up to and including": 150 V is the 150 V row, 150.1 V the 300 V row
    assert ins.rated_impulse_voltage_v(150, "II").row_mains_v == 150
    assert ins.rated_impulse_voltage_v(150.1, "II").impulse_v == 2500


@pytest.mark.parametrize("mains_v", [0, -230, 1001, 11000, math.nan, math.inf, "230 V"])
def test_rated_impulse_refuses_out_of_range(mains_v):
    with pytest.raises(ValueError, match="mains voltage"):
        ins.rated_impulse_voltage_v(mains_v, "II")


@pytest.mark.parametrize("category", [0, 5, "V", "II+", True, None])
def test_rated_impulse_refuses_unknown_category(category):
    with pytest.raises(ValueError, match="overvoltage category"):
        ins.rated_impulse_voltage_v(230, category)


# ---------------------------------------------------------------------------- clearance, Table F.2


@pytest.mark.parametrize("impulse_v, mm", [
    # IEC 60664-1:2007 Table F.2, case A, pollution degree 2 (from memory)
    (1500, 0.5), (2500, 1.5), (4000, 3.0), (6000, 5.5), (8000, 8.0), (12000, 14.0), (2000, 1.0), (5000, 4.0),
])
def test_clearance_basic_pd2_table_f2(impulse_v, mm):
    result = ins.clearance_required_mm(impulse_v, "basic", 2)
    assert result.clearance_mm == pytest.approx(mm)
    assert "Table F.2" in result.source


@pytest.mark.parametrize("impulse_v, pd, mm", [
    # Table F.2 pollution-degree minimums: PD1 the row value, PD2 at least 0.2 mm, PD3 at least 0.8 mm
    (330, 1, 0.01), (330, 2, 0.2), (330, 3, 0.8), (800, 1, 0.10), (800, 2, 0.2), (1500, 3, 0.8),
    (1200, 1, 0.25), (1200, 2, 0.25), (2500, 3, 1.5),
])
def test_clearance_pollution_minimums(impulse_v, pd, mm):
    assert ins.clearance_required_mm(impulse_v, Grade.BASIC, pd).clearance_mm == pytest.approx(mm)


def test_clearance_between_rows_takes_the_row_above():
    # 3.5 kV lies between the 3.0 kV (2.0 mm) and 4.0 kV (3.0 mm) rows: the safe side is 3.0 mm
    result = ins.clearance_required_mm(3500, "basic", 2)
    assert result.row_impulse_v == 4000
    assert result.clearance_mm == pytest.approx(3.0)


@pytest.mark.parametrize("basic_v, reinforced_mm", [
    # IEC 60664-1 5.1.6: reinforced is one step up the preferred series (4.2.3) in Table F.2:
    # 1.5 kV -> 2.5 kV (1.5 mm), 2.5 kV -> 4.0 kV (3.0 mm), 4.0 kV -> 6.0 kV (5.5 mm), 6.0 kV -> 8.0 kV (8.0 mm)
    (1500, 1.5), (2500, 3.0), (4000, 5.5), (6000, 8.0), (8000, 14.0),
    # off the series, 160 %: 3.0 kV -> 4.8 kV, read at the 5.0 kV row (4.0 mm); 12 kV (the series' top) ->
    # 19.2 kV, read at the 20 kV row (25 mm)
    (3000, 4.0), (12000, 25.0),
])
def test_clearance_reinforced_next_step(basic_v, reinforced_mm):
    result = ins.clearance_required_mm(basic_v, "reinforced", 2)
    assert result.clearance_mm == pytest.approx(reinforced_mm)
    series = (330, 500, 800, 1500, 2500, 4000, 6000, 8000, 12000)  # IEC 60664-1 4.2.3
    expected_basis = series[series.index(basic_v) + 1] if basic_v in series[:-1] else 1.6 * basic_v
    assert result.basis_impulse_v == pytest.approx(expected_basis)
    assert ins.clearance_required_mm(basic_v, "supplementary", 2).clearance_mm == \
        ins.clearance_required_mm(basic_v, "basic", 2).clearance_mm


@pytest.mark.parametrize("altitude_m, factor", [
    # IEC 60664-1:2007 Table A.2 (from memory): 2000 m 1.00, 3000 m 1.14, 4000 m 1.29, 5000 m 1.48
    (0, 1.0), (-400, 1.0), (2000, 1.0), (3000, 1.14), (4000, 1.29), (5000, 1.48), (10000, 3.02),
    # linear between rows: 2500 m halfway between 1.00 and 1.14
    (2500, 1.07), (3500, (1.14 + 1.29) / 2),
])
def test_altitude_correction_table_a2(altitude_m, factor):
    assert ins.altitude_correction_factor(altitude_m) == pytest.approx(factor)


def test_clearance_altitude_multiplies_table_value():
    # 230 V category II basic: 2.5 kV -> 1.5 mm at sea level; at 3000 m x 1.14 = 1.71 mm (Table A.2)
    result = ins.clearance_required_mm(2500, "basic", 2, altitude_m=3000)
    assert result.table_mm == pytest.approx(1.5)
    assert result.clearance_mm == pytest.approx(1.5 * 1.14)


@pytest.mark.parametrize("kwargs, match", [
    ({"impulse_v": 150000}, "beyond"), ({"impulse_v": 0}, "positive"), ({"impulse_v": math.nan}, "finite"),
    ({"altitude_m": 25000}, "altitude"), ({"pollution_degree": 4}, "pollution degree 4"),
    ({"pollution_degree": 0}, "pollution degree"), ({"grade": "double"}, "insulation grade"),
    ({"grade": "reinforced", "impulse_v": 70000}, "beyond"),
])
def test_clearance_refusals(kwargs, match):
    args = {"impulse_v": 2500, "grade": "basic", "pollution_degree": 2, "altitude_m": 0.0} | kwargs
    with pytest.raises(ValueError, match=match):
        ins.clearance_required_mm(**args)


# ----------------------------------------------------------------------------- creepage, Table F.4


@pytest.mark.parametrize("working_v, pd, group, mm", [
    # IEC 60664-1:2007 Table F.4, materials other than printed wiring, basic insulation (from memory)
    (250, 2, "I", 1.25), (250, 2, "II", 1.8), (250, 2, "IIIa", 2.5), (250, 2, "IIIb", 2.5),
    (400, 2, "I", 2.0), (400, 2, "II", 2.8), (400, 2, "IIIa", 4.0),
    (250, 1, "IIIb", 0.56), (400, 1, "I", 1.0),
    (250, 3, "I", 3.2), (250, 3, "II", 3.6), (250, 3, "IIIa", 4.0), (400, 3, "IIIb", 6.3),
    (630, 2, "I", 3.2), (1000, 2, "III" "a", 10.0), (10000, 3, "IIIa", 160.0),
    (50, 2, "I", 0.6), (32, 2, "IIIb", 0.53), (10, 3, "II", 1.0),
])
def test_creepage_basic_table_f4(working_v, pd, group, mm):
    result = ins.creepage_required_mm(working_v, "basic", pd, group)
    assert result.creepage_mm == pytest.approx(mm)
    assert "Table F.4" in result.source


def test_creepage_linear_interpolation_between_rows():
    # Table F.4 permits linear interpolation: 300 V lies 100/70 between the 250 V (1.25) and 320 V (1.6) rows,
    # group I, PD2: 1.25 + (1.6 - 1.25) * 50 / 70 = 1.5 mm
    result = ins.creepage_required_mm(300, "basic", 2, "I")
    assert result.creepage_mm == pytest.approx(1.25 + 0.35 * 50 / 70)
    assert (result.row_low_v, result.row_high_v) == (250, 320)
    # group IIIa, PD2, 230 V between 200 V (2.0) and 250 V (2.5): 2.3 mm
    assert ins.creepage_required_mm(230, "basic", 2, "IIIa").creepage_mm == pytest.approx(2.3)


def test_creepage_below_first_row_takes_first_row():
    # Table F.4 starts at 10 V; lower working voltages take the 10 V row (the safe side)
    assert ins.creepage_required_mm(5, "basic", 2, "I").creepage_mm == pytest.approx(0.4)
    assert ins.creepage_required_mm(0, "basic", 1, "I").creepage_mm == pytest.approx(0.08)


@pytest.mark.parametrize("working_v, pd, group", [(250, 2, "IIIb"), (300, 3, "I"), (47, 2, "II"), (400, 1, "I")])
def test_creepage_reinforced_is_twice_basic(working_v, pd, group):
    # IEC 60664-1 5.2.5: creepage of reinforced insulation is twice that of basic; supplementary equals basic
    basic = ins.creepage_required_mm(working_v, "basic", pd, group).creepage_mm
    assert ins.creepage_required_mm(working_v, "reinforced", pd, group).creepage_mm == pytest.approx(2 * basic)
    assert ins.creepage_required_mm(working_v, "supplementary", pd, group).creepage_mm == pytest.approx(basic)


def test_creepage_is_monotonic_in_voltage_and_group():
    volts = [1 + 9999 * k / 400 for k in range(401)]
    for pd in (1, 2, 3):
        previous_group = [0.0] * len(volts)
        for group in ("I", "II", "IIIa"):
            values = [ins.creepage_required_mm(v, "basic", pd, group).creepage_mm for v in volts]
            assert all(b >= a for a, b in zip(values, values[1:]))
            assert all(v >= p for v, p in zip(values, previous_group))
            previous_group = values


@pytest.mark.parametrize("args, match", [
    ((10001, "basic", 2, "I"), "outside"), ((-1, "basic", 2, "I"), "outside"), ((1e9, "basic", 2, "I"), "outside"),
    ((math.inf, "basic", 2, "I"), "finite"), ((250, "basic", 2, "IV"), "material group"),
    ((800, "basic", 3, "IIIb"), "IIIb"), ((250, "basic", 4, "I"), "pollution degree 4"),
])
def test_creepage_refusals(args, match):
    with pytest.raises(ValueError, match=match):
        ins.creepage_required_mm(*args)


@pytest.mark.parametrize("cti, group", [
    # IEC 60664-1 4.8.1.3: I >= 600; II 400 to < 600; IIIa 175 to < 400; IIIb 100 to < 175
    (600, MaterialGroup.I), (900, MaterialGroup.I), (599, MaterialGroup.II), (400, MaterialGroup.II),
    (399.9, MaterialGroup.IIIA), (175, MaterialGroup.IIIA), (174, MaterialGroup.IIIB), (100, MaterialGroup.IIIB),
])
def test_material_group_from_cti(cti, group):
    assert ins.material_group_from_cti(cti).group is group


def test_material_group_refuses_low_cti():
    with pytest.raises(ValueError, match="CTI 99"):
        ins.material_group_from_cti(99)


# --------------------------------------------------------------------------------- solid insulation


def test_solid_thin_sheet_rules():
    # IEC 60950-1 2.10.5.4 / IEC 62368-1 5.4.4.6 (from memory): reinforced in thin sheet: two layers each passing
    # the reinforced test, or three of which every pair passes; basic: one layer that passes
    reinforced = ins.solid_insulation_requirement("reinforced", 340)
    assert (reinforced.layers_each_passing, reinforced.layers_any_two_passing) == (2, 3)
    assert reinforced.test_grade is Grade.REINFORCED
    basic = ins.solid_insulation_requirement("basic", 340)
    assert (basic.layers_each_passing, basic.layers_any_two_passing, basic.single_layer_min_mm) == (1, None, None)
    supplementary = ins.solid_insulation_requirement("supplementary", 340)
    assert (supplementary.layers_each_passing, supplementary.layers_any_two_passing) == (2, 3)
    assert "triple-insulated" in reinforced.winding_wire_rule


def test_solid_single_layer_thickness_above_71_v_peak():
    # IEC 60950-1 2.10.5.2 (from memory): 0.4 mm through a single layer of supplementary or reinforced insulation
    # when the working voltage exceeds 71 V peak; none at or below
    assert ins.solid_insulation_requirement("reinforced", 72).single_layer_min_mm == pytest.approx(0.4)
    assert ins.solid_insulation_requirement("reinforced", 71).single_layer_min_mm is None
    assert ins.solid_insulation_requirement("basic", 5000).single_layer_min_mm is None


# ---------------------------------------------------------------------------------------------- hipot


def test_hipot_mains_up_to_250_v():
    # IEC 60950-1 Table 5B / IEC 62368-1 (from memory): 1500 V basic or supplementary, 3000 V reinforced, 60 s,
    # for working voltages up to 250 V on mains; routine 1 s at 120 % (common practice)
    for u in (0, 120, 230, 250):
        basic = ins.hipot_test_voltage_v("basic", u)
        reinforced = ins.hipot_test_voltage_v("reinforced", u)
        assert (basic.type_test_v, reinforced.type_test_v) == (1500, 3000)
        assert (basic.routine_v, reinforced.routine_v) == (1800, 3600)
        assert basic.type_test_duration_s == 60 and basic.routine_duration_s == 1
        assert ins.hipot_test_voltage_v("supplementary", u).type_test_v == 1500


def test_hipot_rounds_up_to_test_set_steps():
    # 2 U + 1000 V (common practice) at 253 V is 1506 V: never printed as 1506 V, rounded UP to the step
    h = ins.hipot_test_voltage_v("basic", 253)
    assert h.exact_type_test_v == pytest.approx(1506)
    assert h.type_test_v == 1550
    assert ins.hipot_test_voltage_v("basic", 253, step_v=100).type_test_v == 1600
    assert h.routine_v == 1900  # 1.2 x 1550 = 1860 -> 1900
    assert h.dc_type_test_v == 2200  # sqrt(2) x 1550 = 2192 -> 2200
    # reinforced at 400 V: 2 x (2 x 400 + 1000) = 3600 V exactly, already on a step
    assert ins.hipot_test_voltage_v("reinforced", 400).type_test_v == 3600
    for u in (0.3, 17, 253, 333.3, 999, 4321):
        for grade in Grade:
            t = ins.hipot_test_voltage_v(grade, u)
            for value in (t.type_test_v, t.routine_v, t.dc_type_test_v):
                assert value % 50 == 0
            assert 0 <= t.type_test_v - t.exact_type_test_v < 50


def test_hipot_not_mains_connected_follows_2u_plus_1000():
    # common practice: 2 U + 1000 V with no 1500 V floor off the mains; 24 V -> 1048 V -> 1050 V
    assert ins.hipot_test_voltage_v("basic", 24, mains_connected=False).type_test_v == 1050
    assert ins.hipot_test_voltage_v("reinforced", 24, mains_connected=False).type_test_v == 2100


def test_round_up_to_step_keeps_exact_steps():
    assert ins.round_up_to_step_v(1500.0000000001, 50) == 1500
    assert ins.round_up_to_step_v(1500.1, 50) == 1550
    with pytest.raises(ValueError, match="step"):
        ins.round_up_to_step_v(1500, 0)


@pytest.mark.parametrize("u", [-5, 10001, 1e12, math.nan])
def test_hipot_refuses_out_of_range(u):
    with pytest.raises(ValueError, match="working voltage"):
        ins.hipot_test_voltage_v("basic", u)


# -------------------------------------------------------------------------------- the whole barrier


def test_barrier_230_v_reinforced_transformer():
    # 230 V mains, category II, pollution degree 2, group IIIb (CTI 150), reinforced, 250 V working:
    # impulse 2.5 kV (Table F.1) -> reinforced 4.0 kV -> 3.0 mm clearance (Table F.2);
    # creepage 2 x 2.5 = 5.0 mm (Table F.4); hipot 3000 V (IEC 60950-1 Table 5B, from memory)
    b = ins.coordinate_barrier(grade="reinforced", working_v_rms=250, mains_v=230, overvoltage_category="II",
                               pollution_degree=2, cti=150)
    assert b.impulse.impulse_v == 2500
    assert b.clearance.clearance_mm == pytest.approx(3.0)
    assert b.creepage_mm == pytest.approx(5.0)
    assert not b.creepage_set_by_clearance
    assert b.hipot.type_test_v == 3000
    assert b.solid.layers_each_passing == 2
    assert b.working_v_peak == pytest.approx(250 * math.sqrt(2))
    assert any("Table F.1" in s for s in b.sources) and any("Table F.4" in s for s in b.sources)
    assert "verify against the standard" in b.note


def test_barrier_creepage_never_below_clearance():
    # IEC 60664-1 5.2: creepage is never less than the clearance. Low working voltage, high impulse:
    # 48 V across the barrier of 400 V category III equipment, group I, PD1: tracking needs ~0.17 mm,
    # the 6.0 kV impulse needs 5.5 mm of clearance, so the creepage is 5.5 mm
    b = ins.coordinate_barrier(grade="basic", working_v_rms=48, mains_v=400, overvoltage_category=3,
                               pollution_degree=1, material_group="I")
    assert b.creepage.creepage_mm < 0.2
    assert b.clearance.clearance_mm == pytest.approx(5.5)
    assert b.creepage_mm == pytest.approx(5.5)
    assert b.creepage_set_by_clearance
    for kw in ({"pollution_degree": 3, "material_group": "IIIa"}, {"altitude_m": 4000}, {"grade": "reinforced"}):
        args = {"grade": "basic", "working_v_rms": 48, "mains_v": 400, "overvoltage_category": 3,
                "pollution_degree": 1, "material_group": "I"} | kw
        b = ins.coordinate_barrier(**args)
        assert b.creepage_mm >= b.clearance.clearance_mm


def test_barrier_high_working_peak_sets_clearance():
    # IEC 62368-1 5.4.2 (from memory): the clearance withstands the higher of the transient and the working peak.
    # 3 kV rms secondary on 230 V category II equipment: 4243 V peak > 2.5 kV, read at the 5.0 kV row (4.0 mm)
    b = ins.coordinate_barrier(grade="basic", working_v_rms=3000, mains_v=230, overvoltage_category="II",
                               pollution_degree=2, material_group="II")
    assert b.clearance.basis_impulse_v == pytest.approx(3000 * math.sqrt(2))
    assert b.clearance.clearance_mm == pytest.approx(4.0)


@pytest.mark.parametrize("kw, match", [
    ({"working_v_rms": 25000}, "working voltage 25000 V rms"), ({"working_v_rms": -1}, "working voltage"),
    ({"mains_v": 2000}, "mains voltage"), ({"cti": 50, "material_group": None}, "CTI"),
    ({"cti": 300}, "exactly one"), ({"working_v_peak": 100}, "below the rms"),
])
def test_barrier_refusals(kw, match):
    args = {"grade": "basic", "working_v_rms": 250, "mains_v": 230, "overvoltage_category": 2,
            "pollution_degree": 2, "material_group": "I"} | kw
    with pytest.raises(ValueError, match=match):
        ins.coordinate_barrier(**args)


# --------------------------------------------------------------------------------------- signal words


def test_signal_words_ansi_z535_4():
    # ANSI Z535.4 / ISO 3864-2: DANGER red, WARNING orange, CAUTION yellow, most severe first
    words = ins.signal_words()
    assert [(w.word, w.colour) for w in words] == [
        ("DANGER", "safety red"), ("WARNING", "safety orange"), ("CAUTION", "safety yellow")]
    assert "will result in death" in ins.signal_word("danger").meaning
    assert "minor or moderate" in ins.signal_word("CAUTION").meaning
    with pytest.raises(ValueError, match="signal word"):
        ins.signal_word("NOTE")
    # ISO 7010 W012: the electricity warning triangle
    assert ins.electricity_symbol().code == "ISO 7010 W012"


def test_records_are_frozen():
    r = ins.rated_impulse_voltage_v(230, 2)
    with pytest.raises(AttributeError):
        r.impulse_v = 1.0  # type: ignore[misc]
