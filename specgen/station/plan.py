"""What the station tests on every piece and how a reading is judged: all of it read from the Design.

The columns come from the Design's test plan (every tuple of limits it carries, so a test the plan
gains appears here without a change), plus the insulation resistance, the hipot of each barrier and
the polarity check. A DC resistance is read at the winding's temperature and referred to 20 degC by
the one correction in :func:`specgen.physics.wire.resistance_at_temp_ohm` before it is compared.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Mapping, Sequence
from typing import Any

from specgen import present
from specgen.errors import SpecError
from specgen.physics.wire import resistance_at_temp_ohm
from specgen.units import UnitError, parse

from .model import Column, Verdict

#: The SI units of the plan's limits and the dimension a typed unit is checked against.
_DIMENSIONS = {"ohm": "resistance", "H": "inductance", "V": "voltage", "A": "current", "W": "power"}
_SYMBOLS = {"ohm": "Ω", "H": "H", "V": "V", "A": "A", "W": "W"}
_PREFIXES = ((1e-9, "n"), (1e-6, "µ"), (1e-3, "m"), (1.0, ""), (1e3, "k"), (1e6, "M"), (1e9, "G"))
#: A bench reads the winding between these temperatures (degC); anything else is a typing mistake.
BENCH_TEMP_RANGE_C = (-10.0, 150.0)
OK_WORDS = {"ok", "pass", "p", "yes", "y", "1", "good"}
FAIL_WORDS = {"fail", "f", "no", "n", "0", "bad"}


def shown_unit(unit: str, nominal: float | None) -> tuple[str, float]:
    """The unit a station types a value in: an engineering prefix that puts the nominal in 1..1000."""
    if unit not in _SYMBOLS:
        return unit.lstrip(":") if unit != ":1" else "", 1.0
    scale = 1.0
    if nominal is not None and nominal > 0 and math.isfinite(nominal):
        for step, _ in _PREFIXES:
            if nominal / step >= 1.0:
                scale = step
    prefix = dict(_PREFIXES)[scale]
    return prefix + _SYMBOLS[unit], 1.0 / scale


def station_columns(design: Any) -> tuple[Column, ...]:
    """Every test of the Design's plan as a station column, in the order of the printed test record."""
    plan = design.tests
    cols: list[Column] = []
    for field in dataclasses.fields(plan):
        value = getattr(plan, field.name)
        if not isinstance(value, tuple) or not value or not all(hasattr(v, "nominal") for v in value):
            continue
        for lim in value:
            kind = "dcr" if field.name == "dcr" else "value"
            shown, factor = shown_unit(lim.unit, lim.nominal)
            if lim.name.startswith("AL") and lim.unit == "H":
                shown += "/turn²"
            cols.append(Column(key=f"{field.name}/{lim.name}/{lim.item}", label=lim.heading or f"{lim.name} {lim.item}",
                                   kind=kind, unit=lim.unit, nominal=lim.nominal, low=lim.low, high=lim.high,
                                   condition=lim.condition, shown_unit=shown, shown_factor=factor))
    ir_min = plan.insulation_resistance_min_ohm
    shown, factor = shown_unit("ohm", ir_min)
    cols.append(Column(key="ir", label="insulation resistance", kind="value", unit="ohm", nominal=None,
                           low=ir_min, high=None, condition=f"{plan.insulation_resistance_v:.0f} V d.c.",
                           shown_unit=shown, shown_factor=factor))
    for h in plan.hipot:
        cols.append(Column(key=f"hipot/{h.between}", label=f"hipot {h.between}", kind="check", unit="",
                               nominal=None, low=None, high=None,
                               condition=f"{present.test_volts(h.routine_voltage_v)} a.c. for "
                                         f"{present.seconds(h.routine_duration_s)}, trip "
                                         f"{present.milliamps(h.trip_current_a)}",
                               shown_unit="ok/fail", shown_factor=1.0))
    if plan.polarity:
        cols.append(Column(key="polarity", label="polarity", kind="check", unit="", nominal=None, low=None,
                               high=None, condition="; ".join(plan.polarity), shown_unit="ok/fail", shown_factor=1.0))
    return tuple(cols)


def show_value(column: Column, value_si: float | None) -> str:
    """A value in the column's typing unit, 4 significant figures."""
    if value_si is None:
        return "—"
    if column.kind == "check":
        return "ok" if value_si >= 0.5 else "fail"
    return f"{present.sig(value_si * column.shown_factor, 4)} {column.shown_unit}".rstrip()


def limits_text(column: Column) -> str:
    if column.kind == "check":
        return "ok"
    low, high = column.low, column.high
    if low is not None and high is not None:
        return f"{show_value(column, low)} to {show_value(column, high)}"
    if low is not None:
        return f"at least {show_value(column, low)}"
    if high is not None:
        return f"at most {show_value(column, high)}"
    return "record"


def limits_bare(column: Column) -> str:
    """The limits as bare numbers in the column's unit ("95.2–116", "≥ 2.71"), for a table whose
    heading names the unit."""
    if column.kind == "check":
        return "ok"
    bare = lambda v: present.sig_trimmed(v * column.shown_factor, 4)      # limits are rounded (design/test_setup)
    if column.low is not None and column.high is not None:
        return f"{bare(column.low)}–{bare(column.high)}"
    if column.low is not None:
        return f"≥ {bare(column.low)}"
    if column.high is not None:
        return f"≤ {bare(column.high)}"
    return ""


def parse_reading(column: Column, text: str) -> float:
    """A typed reading to SI: a bare number is in the column's unit; a number with a unit is checked
    against the column's dimension ("12.5 mohm" in a DCR column). ok/fail for a check column."""
    raw = " ".join(str(text).split())
    if column.kind == "check":
        word = raw.lower()
        if word in OK_WORDS:
            return 1.0
        if word in FAIL_WORDS:
            return 0.0
        raise SpecError(f"{column.label}: type ok or fail, got {raw!r}")
    try:
        value = float(raw.replace(",", ".")) / column.shown_factor
    except ValueError:
        dimension = _DIMENSIONS.get(column.unit)
        if dimension is None:
            raise SpecError(f"{column.label}: expected a number, got {raw!r}") from None
        try:
            value = parse(raw, dimension)
        except UnitError as err:
            raise SpecError(f"{column.label}: {err}") from None
    if not math.isfinite(value) or value <= 0.0:
        raise SpecError(f"{column.label}: expected a reading above zero, got {raw!r}")
    return value


def parse_temperature(text: str) -> float:
    raw = " ".join(str(text).split())
    try:
        temp = float(raw.replace(",", "."))
    except ValueError:
        try:
            temp = parse(raw, "temperature")
        except UnitError as err:
            raise SpecError(f"winding temperature: {err}") from None
    low, high = BENCH_TEMP_RANGE_C
    if not math.isfinite(temp) or not low <= temp <= high:
        raise SpecError(f"winding temperature: {raw!r} °C is outside what a test bench reads ({low:g} to {high:g} °C)")
    return temp


def to_20c_factor(temp_c: float) -> float:
    """The factor that refers a copper winding's resistance read at ``temp_c`` to 20 degC:
    R20 = Rt x factor = Rt / (1 + alpha20 (t - 20)), alpha20 = 0.00393 /K (IEC 60028; the one correction
    of :func:`specgen.physics.wire.resistance_at_temp_ohm`)."""
    return float(resistance_at_temp_ohm(1.0, temp_c, 20.0))


def judge(column: Column, value_si: float, temp_c: float | None) -> Verdict:
    """Compare one reading with the Design's limits; a DCR is first referred to 20 degC (IEC 60028)."""
    if column.kind == "check":
        return Verdict(column, value_si, None, value_si, value_si >= 0.5)
    judged = value_si
    if column.kind == "dcr":
        if temp_c is None:
            raise SpecError(f"{column.label}: the winding temperature is needed to refer the DCR to 20 °C")
        judged = value_si * to_20c_factor(temp_c)
    passed = (column.low is None or judged >= column.low) and (column.high is None or judged <= column.high)
    return Verdict(column, value_si, temp_c if column.kind == "dcr" else None, judged, passed)


def judge_form(columns: Sequence[Column], typed: Mapping[str, str], temp_text: str | None
               ) -> tuple[list[Verdict], dict[str, str]]:
    """Judge what a tester typed for one serial: the verdicts of the filled-in columns and, per
    column key (``temp`` for the temperature), the one-line error of what could not be read."""
    errors: dict[str, str] = {}
    temp: float | None = None
    if temp_text is not None and temp_text.strip():
        try:
            temp = parse_temperature(temp_text)
        except SpecError as err:
            errors["temp"] = str(err)
    verdicts = []
    for col in columns:
        text = typed.get(col.key, "")
        if not text or not text.strip():
            continue
        try:
            value = parse_reading(col, text)
            if col.kind == "dcr" and temp is None and "temp" not in errors:
                errors["temp"] = "winding temperature: needed to refer the DCR to 20 °C"
                continue
            if col.kind == "dcr" and temp is None:
                continue
            verdicts.append(judge(col, value, temp))
        except SpecError as err:
            errors[col.key] = str(err)
    return verdicts, errors
