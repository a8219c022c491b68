"""The station's entries in the register, on both back ends: append-only, corrections as new entries,
sign-offs with who and when, readings judged against the Design with DCR referred to 20 degC,
dispositions, material lots and the recall question (which orders and serials used a lot)."""

from __future__ import annotations

import sqlite3

import pytest
from station_helpers import make_lot

from specgen.errors import SpecError
from specgen.register import SCHEMA_VERSION, Register
from specgen.station.lots import floor_steps
from specgen.station.plan import judge, judge_form, parse_reading, station_columns
from specgen.station.store import StationStore


@pytest.fixture
def lot(tmp_path, target):
    return make_lot(tmp_path, register=target, users={"wren": "winder"})


def _dcr(design):
    return next(c for c in station_columns(design) if c.kind == "dcr")


def test_schema_has_the_station_entries():
    assert SCHEMA_VERSION == 4


def test_sign_off_records_who_and_when_and_puts_the_order_in_work(lot):
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        e = store.sign_off(lot.number, 1, "Wind P", "wren")
        assert (e.by, e.item, e.action) == ("wren", "1", "signed") and e.at.endswith("+00:00")
        assert reg.get(lot.number).state == "in-work"
        with pytest.raises(SpecError, match="already signed off by wren"):
            store.sign_off(lot.number, 1, "Wind P", "ada")
        with pytest.raises(SpecError, match="reason"):
            store.withdraw_sign_off(lot.number, 1, "wren", "")
        w = store.withdraw_sign_off(lot.number, 1, "wren", "signed the wrong step")
        assert w.replaces == e.entry_id and w.action == "withdrawn"
        assert store.signoffs(lot.number) == {}
        assert len(store.entries(lot.number, "signoff")) == 2          # the first is kept, replaced


def test_reading_correction_is_a_new_entry_pointing_at_the_old(lot):
    col = _dcr(lot.design)
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        first = store.record_readings(lot.number, "1", [judge(col, col.nominal, 20.0)], "tamsin")[0]
        assert first.verdict == "pass"
        with pytest.raises(SpecError, match="needs a reason"):
            store.record_readings(lot.number, "1", [judge(col, col.nominal * 1.01, 20.0)], "tamsin")
        second = store.record_readings(lot.number, "1", [judge(col, col.nominal * 1.01, 20.0)], "tamsin",
                                       reason="typed the wrong digit")[0]
        assert second.replaces == first.entry_id and second.reason == "typed the wrong digit"
        piece = store.piece(lot.number, "1")
        assert piece.readings[col.key].entry_id == second.entry_id
        assert len(store.entries(lot.number, "reading")) == 2


def test_failing_piece_needs_a_disposition_then_takes_a_retest(lot):
    col = _dcr(lot.design)
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        store.record_readings(lot.number, "2", [judge(col, col.nominal * 1.5, 20.0)], "tamsin")
        assert store.piece(lot.number, "2").status == "needs-disposition"
        with pytest.raises(SpecError, match="reason"):
            store.dispose(lot.number, "2", "retest", " ", "tamsin")
        with pytest.raises(SpecError, match="retest, rework, scrap"):
            store.dispose(lot.number, "2", "ignore", "fine", "tamsin")
        store.dispose(lot.number, "2", "retest", "probe slipped", "tamsin")
        assert store.piece(lot.number, "2").status == "retest"
        again = store.record_readings(lot.number, "2", [judge(col, col.nominal, 20.0)], "tamsin")[0]
        assert again.reason.startswith("retest after disposition")
        assert store.piece(lot.number, "2").status == "pass"


def test_scrapped_piece_takes_no_readings(lot):
    col = _dcr(lot.design)
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        store.record_readings(lot.number, "3", [judge(col, col.nominal * 2, 20.0)], "tamsin")
        store.dispose(lot.number, "3", "scrap", "open winding", "tamsin")
        with pytest.raises(SpecError, match="scrapped"):
            store.record_readings(lot.number, "3", [judge(col, col.nominal, 20.0)], "tamsin", reason="x")


def test_where_used_finds_the_orders_and_serials_of_a_material_lot(lot):
    wire = next(m for m in lot.design.materials if m.kind == "wire")
    col = _dcr(lot.design)
    with Register.open(lot.register) as reg:
        store = StationStore(reg)
        store.record_material(lot.number, wire.id, "wire", "R-2291", "wren")
        store.record_readings(lot.number, "4", [judge(col, col.nominal, 20.0)], "tamsin")
        found = store.where_used("r-2291")
        assert [(o.number, [e.item for e in used], serials) for o, used, serials in found] == \
            [(lot.number, [wire.id], ["4"])]
        assert store.where_used("R-9999") == []


def test_entries_cannot_be_changed_or_deleted(lot):
    with Register.open(lot.register) as reg:
        StationStore(reg).sign_off(lot.number, 1, "Wind P", "wren")
        for sql in ("UPDATE station_entries SET by_whom = 'someone else'", "DELETE FROM station_entries"):
            with pytest.raises((SpecError, sqlite3.DatabaseError), match="append-only"):
                reg.write_work(lambda db, s=sql: db.execute(s))
        assert StationStore(reg).signoffs(lot.number)["1"].by == "wren"


def test_void_order_takes_nothing(lot):
    with Register.open(lot.register) as reg:
        reg.void(lot.number, "customer cancelled")
        with pytest.raises(SpecError, match="void"):
            StationStore(reg).sign_off(lot.number, 1, "Wind P", "wren")


def test_a_version_3_register_is_brought_up(tmp_path):
    """A register written before the station gains the table (and keeps its orders)."""
    import specgen.register.schema as schema

    path = tmp_path / "old.sqlite"
    con = sqlite3.connect(path)
    for version in (1, 2, 3):
        for statement in schema.steps(version, "sqlite"):
            con.execute(statement)
    con.execute("PRAGMA user_version = 3")
    con.commit()
    con.close()
    with Register.open(path) as reg:
        assert reg.read_work(lambda db: db.execute("SELECT COUNT(*) FROM station_entries").fetchone()[0]) == 0
    assert sqlite3.connect(path).execute("PRAGMA user_version").fetchone()[0] == 4


# --- judging: the DCR correction and the typed units --------------------------------------------------

def test_dcr_is_referred_to_20c_with_copper_alpha(tmp_path):
    """IEC 60028: R20 = Rt / (1 + 0.00393 (t - 20)). A winding reading 10.000 ohm at 30 degC is
    10 / 1.0393 = 9.6219 ohm at 20 degC (worked by hand from the standard's coefficient)."""
    lot = make_lot(tmp_path, users={})
    col = _dcr(lot.design)
    v = judge(col, 10.0, 30.0)
    assert v.judged_si == pytest.approx(9.6219, abs=5e-5)
    assert v.judged_si == pytest.approx(10.0 / (1 + 0.00393 * 10.0), rel=1e-12)
    # a reading at the limit's 20 degC value, taken 5 K warmer, passes exactly as at 20 degC
    hot = col.high * (1 + 0.00393 * 5.0) * 0.999
    assert judge(col, hot, 25.0).passed and not judge(col, hot, 20.0).passed


def test_typed_values_take_the_column_unit_or_their_own(tmp_path):
    lot = make_lot(tmp_path, users={})
    cols = station_columns(lot.design)
    dcr_s = next(c for c in cols if c.label == "DCR S")
    assert dcr_s.shown_unit == "mΩ"
    assert parse_reading(dcr_s, "150") == pytest.approx(0.150)
    assert parse_reading(dcr_s, "0.15 ohm") == pytest.approx(0.150)
    for bad in ("abc", "-3", "nan", "inf", "12 V"):
        with pytest.raises(SpecError, match="DCR S"):
            parse_reading(dcr_s, bad)
    verdicts, errors = judge_form(cols, {dcr_s.key: "150"}, None)
    assert not verdicts and "temp" in errors
    verdicts, errors = judge_form(cols, {dcr_s.key: "150"}, "400")
    assert "outside" in errors["temp"]


def test_every_test_of_the_plan_is_a_column(tmp_path):
    """Nothing of the Design's test plan is left off the station (a limit tuple the plan gains appears)."""
    lot = make_lot(tmp_path, users={})
    plan = lot.design.tests
    expected = sum(len(getattr(plan, f)) for f in ("dcr", "ratio", "open_circuit", "inductance"))
    cols = station_columns(lot.design)
    assert sum(1 for c in cols if c.kind in ("dcr", "value") and c.key != "ir") == expected
    assert sum(1 for c in cols if c.key.startswith("hipot/")) == len(plan.hipot)


def test_floor_steps_are_the_work_orders(tmp_path):
    lot = make_lot(tmp_path, users={})
    from specgen.catalog.loader import load_catalog

    with Register.open(lot.register) as reg:
        steps = floor_steps(lot.design, load_catalog(None), reg.get(lot.number))
    assert [s.n for s in steps] == list(range(1, len(steps) + 1))
    assert any(s.heading.startswith("Wind ") for s in steps) and steps[-1].heading == "Mark and label"
