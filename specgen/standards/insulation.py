"""Insulation coordination for low-voltage wound parts: impulse voltage, clearance, creepage, solid insulation, hipot.

Lookups over the tables in ``insulation_tables.yaml`` (IEC 60664-1:2007; IEC 62368-1 and IEC 61558-1 carry
equivalent tables). Every result is a frozen record carrying the figure and the table row it came from, so a
document can print both. The figures were recalled from memory of the standards: verify against the standard
before production use; the applicable product safety standard, the customer's drawing, local codes and licensed
practice decide.

Voltages in volts (rms unless the name says peak), distances in millimetres (the standards' unit), altitude in
metres. A value outside a table's range raises ``ValueError`` with a one-line message naming the quantity and
the table's range, for the caller to locate in the user's file.
"""

from __future__ import annotations

import math
from enum import Enum
from functools import lru_cache
from pathlib import Path
from typing import Any

import yaml

from ..records import record

__all__ = [
    "BarrierCoordination", "ClearanceRequirement", "CreepageRequirement", "Grade", "HipotTestVoltages",
    "MaterialGroup", "MaterialGroupLookup", "RatedImpulse", "SafetySign", "SignalWord", "SolidInsulationRequirement",
    "altitude_correction_factor", "clearance_required_mm", "coordinate_barrier", "creepage_required_mm",
    "electricity_symbol", "hipot_test_voltage_v", "material_group_from_cti", "rated_impulse_voltage_v",
    "round_up_to_step_v", "signal_word", "signal_words", "solid_insulation_requirement", "verify_note",
]

_DATA_FILE = "insulation_tables.yaml"
_YAML_LOADER: Any = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
_CATEGORY_NAMES = ("I", "II", "III", "IV")


class Grade(str, Enum):
    """Grade of insulation (IEC 60664-1 3.17 to 3.20)."""

    BASIC = "basic"
    SUPPLEMENTARY = "supplementary"
    REINFORCED = "reinforced"


class MaterialGroup(str, Enum):
    """Material group of an insulating material by its CTI (IEC 60664-1 4.8.1.3)."""

    I = "I"
    II = "II"
    IIIA = "IIIa"
    IIIB = "IIIb"


# ---------------------------------------------------------------------------------------------- records


@record(slots=True)
class RatedImpulse:
    """Rated impulse voltage of mains-connected equipment, with the table row used."""

    impulse_v: float
    mains_v: float
    category: int
    row_mains_v: float
    source: str
    row: str


@record(slots=True)
class ClearanceRequirement:
    """Minimum clearance (mm) and how it was found: basis voltage, table row, pollution minimum, altitude."""

    clearance_mm: float
    grade: Grade
    impulse_v: float
    basis_impulse_v: float
    row_impulse_v: float
    table_mm: float
    pollution_degree: int
    pollution_minimum_mm: float
    altitude_m: float
    altitude_factor: float
    source: str
    row: str


@record(slots=True)
class CreepageRequirement:
    """Minimum creepage (mm) for a grade, with the basic value and the rows interpolated between."""

    creepage_mm: float
    grade: Grade
    working_v_rms: float
    pollution_degree: int
    material_group: MaterialGroup
    basic_mm: float
    row_low_v: float
    row_high_v: float
    source: str
    row: str


@record(slots=True)
class MaterialGroupLookup:
    """Material group of a CTI value and the group's lower CTI bound."""

    group: MaterialGroup
    cti: float
    cti_min: float
    source: str


@record(slots=True)
class SolidInsulationRequirement:
    """Layers of solid insulation a grade needs, and the rule in words.

    ``layers_each_passing``: thin-sheet layers needed when each layer alone passes the grade's electric
    strength test; ``layers_any_two_passing``: layers needed when every pair together passes it (None where
    the rule has no such option); ``single_layer_min_mm``: thickness a single non-thin-sheet layer needs (None
    where no thickness is required).
    """

    grade: Grade
    layers_each_passing: int
    layers_any_two_passing: int | None
    single_layer_min_mm: float | None
    test_grade: Grade
    rule: str
    winding_wire_rule: str
    source: str


@record(slots=True)
class HipotTestVoltages:
    """Electric strength test voltages (a.c. rms unless named d.c.), rounded up to the test set's steps."""

    grade: Grade
    working_v_rms: float
    type_test_v: float
    type_test_duration_s: float
    routine_v: float
    routine_duration_s: float
    dc_type_test_v: float
    exact_type_test_v: float
    step_v: float
    rule: str
    source: str


@record(slots=True)
class BarrierCoordination:
    """Everything one insulation barrier needs: clearance, creepage, solid insulation and hipot, with sources."""

    grade: Grade
    working_v_rms: float
    working_v_peak: float
    impulse: RatedImpulse
    clearance: ClearanceRequirement
    creepage: CreepageRequirement
    creepage_mm: float
    creepage_set_by_clearance: bool
    solid: SolidInsulationRequirement
    hipot: HipotTestVoltages
    sources: tuple[str, ...]
    note: str


@record(slots=True)
class SignalWord:
    """A safety signal word with its safety colour (ANSI Z535.4 / ISO 3864-2)."""

    word: str
    colour: str
    display_rgb: str
    meaning: str
    source: str


@record(slots=True)
class SafetySign:
    """A registered safety sign (ISO 7010) by code, name and description."""

    code: str
    name: str
    description: str
    source: str


# ------------------------------------------------------------------------------------------ table loading


@lru_cache(maxsize=1)
def _tables() -> dict[str, Any]:
    # beside this module (importlib.resources would cost ~10 ms of imports: tempfile, shutil, zipfile)
    text = Path(__file__).with_name(_DATA_FILE).read_text(encoding="utf-8")
    data = yaml.load(text, Loader=_YAML_LOADER)   # libyaml's parser where present: the same data, ~10x faster
    if not isinstance(data, dict):
        raise RuntimeError(f"{_DATA_FILE}: expected a mapping at the top")
    _check_ascending(data["rated_impulse"]["rows"], "mains_v", "rated_impulse")
    _check_ascending(data["clearance_case_a"]["rows"], "impulse_v", "clearance_case_a")
    _check_ascending(data["altitude_correction"]["rows"], "altitude_m", "altitude_correction")
    _check_ascending(data["creepage_basic"]["rows"], "working_v", "creepage_basic")
    return data


def _check_ascending(rows: list[dict[str, Any]], key: str, table: str) -> None:
    # Lookups assume rows sorted by their key; a mis-edited data file must fail loudly, not look up wrong rows.
    keys = [float(r[key]) for r in rows]
    if any(b <= a for a, b in zip(keys, keys[1:])):
        raise RuntimeError(f"{_DATA_FILE}: {table} rows must ascend by {key}")


def verify_note() -> str:
    """The caution every document carrying these figures repeats (verify against the standard)."""
    return str(_tables()["verify_note"]).strip()


# ------------------------------------------------------------------------------------------- coercion


def _finite(value: float, what: str) -> float:
    try:
        x = float(value)
    except (TypeError, ValueError):
        raise ValueError(f"{what}: expected a number, got {value!r}") from None
    if not math.isfinite(x):
        raise ValueError(f"{what}: expected a finite number, got {value!r}")
    return x


def _grade(grade: Grade | str) -> Grade:
    try:
        return Grade(str(grade.value if isinstance(grade, Grade) else grade).strip().lower())
    except ValueError:
        raise ValueError(f"insulation grade: expected basic, supplementary or reinforced, got {grade!r}") from None


def _category(category: int | str) -> int:
    if isinstance(category, bool):
        raise ValueError(f"overvoltage category: expected I, II, III or IV, got {category!r}")
    if isinstance(category, int) and 1 <= category <= 4:
        return category
    text = str(category).strip().upper().removeprefix("OVC").removeprefix("CAT").strip()
    if text in _CATEGORY_NAMES:
        return _CATEGORY_NAMES.index(text) + 1
    if text in ("1", "2", "3", "4"):
        return int(text)
    raise ValueError(f"overvoltage category: expected I, II, III or IV, got {category!r}")


def _pollution(pollution_degree: int) -> int:
    if isinstance(pollution_degree, bool) or pollution_degree not in (1, 2, 3, 4):
        raise ValueError(f"pollution degree: expected 1, 2 or 3, got {pollution_degree!r}")
    if pollution_degree == 4:
        raise ValueError("pollution degree 4 (persistent conductive pollution) is outside these creepage and "
                         "clearance tables; design the barrier so the pollution cannot reach it")
    return int(pollution_degree)


def _material(group: MaterialGroup | str) -> MaterialGroup:
    text = str(group.value if isinstance(group, MaterialGroup) else group).strip()
    for g in MaterialGroup:
        if text.lower() == g.value.lower():
            return g
    raise ValueError(f"material group: expected I, II, IIIa or IIIb, got {group!r}")


def round_up_to_step_v(voltage_v: float, step_v: float) -> float:
    """Round a test voltage UP to the next multiple of a test set's step (1506 V, 50 V steps -> 1550 V).

    A relative tolerance of 1e-9 keeps a value already on a step (1500.0000000002) where it is.
    """
    v = _finite(voltage_v, "test voltage")
    step = _finite(step_v, "test voltage step")
    if step <= 0.0:
        raise ValueError(f"test voltage step: expected a positive voltage, got {step_v!r}")
    n = math.ceil(v / step - 1e-9)
    return float(n * step)


# ---------------------------------------------------------------------------------------------- lookups


def rated_impulse_voltage_v(mains_v: float, category: int | str) -> RatedImpulse:
    """Rated impulse voltage for equipment energised from the mains, by line-to-neutral voltage and category.

    The row is the first whose nominal voltage is at or above ``mains_v`` (the table's "up to and including").

    Parameters
    ----------
    mains_v : nominal line-to-neutral voltage of the supply system [V rms] (e.g. 230)
    category : overvoltage category I to IV (1..4, "I".."IV", "OVC II")

    Returns
    -------
    RatedImpulse with ``impulse_v`` [V peak] and the row it came from.

    References
    ----------
    IEC 60664-1:2007, Insulation coordination for equipment within low-voltage systems, Table F.1 (from memory).
    """
    v = _finite(mains_v, "mains voltage")
    cat = _category(category)
    table = _tables()["rated_impulse"]
    rows = table["rows"]
    top = float(rows[-1]["mains_v"])
    if v <= 0.0 or v > top:
        raise ValueError(f"mains voltage {v:g} V line to neutral is outside {table['source']} "
                         f"(above 0 V up to {top:g} V)")
    row = next(r for r in rows if v <= float(r["mains_v"]))
    impulse = float(row["impulse_v"][cat - 1])
    return RatedImpulse(impulse_v=impulse, mains_v=v, category=cat, row_mains_v=float(row["mains_v"]),
                        source=str(table["source"]),
                        row=f"mains up to {float(row['mains_v']):g} V, category {_CATEGORY_NAMES[cat - 1]}: "
                            f"{impulse:g} V")


def altitude_correction_factor(altitude_m: float) -> float:
    """Multiplier for clearances above 2000 m (1.0 at and below 2000 m), linear between the table's rows.

    Parameters
    ----------
    altitude_m : altitude above sea level [m]

    References
    ----------
    IEC 60664-1:2007 Table A.2, altitude correction factors (from memory).
    """
    h = _finite(altitude_m, "altitude")
    table = _tables()["altitude_correction"]
    rows = table["rows"]
    xs = [float(r["altitude_m"]) for r in rows]
    ys = [float(r["factor"]) for r in rows]
    if h > xs[-1]:
        raise ValueError(f"altitude {h:g} m is beyond {table['source']} (up to {xs[-1]:g} m)")
    if h <= xs[0]:
        return ys[0]
    return _interp(h, xs, ys)


def _interp(x: float, xs: list[float], ys: list[float]) -> float:
    for x0, x1, y0, y1 in zip(xs, xs[1:], ys, ys[1:]):
        if x0 <= x <= x1:
            return y0 + (y1 - y0) * (x - x0) / (x1 - x0)
    raise ValueError(f"{x:g} outside {xs[0]:g} to {xs[-1]:g}")  # callers check the range first


def _reinforced_basis_v(basis_v: float) -> float:
    series = _tables()["impulse_series"]
    values = [float(v) for v in series["values_v"]]
    if basis_v in values and basis_v < values[-1]:
        return values[values.index(basis_v) + 1]
    return basis_v * float(series["off_series_reinforced_factor"])


def clearance_required_mm(impulse_v: float, grade: Grade | str, pollution_degree: int,
                          altitude_m: float = 0.0) -> ClearanceRequirement:
    """Minimum clearance to withstand transient overvoltages, inhomogeneous field (case A).

    Basic and supplementary insulation read Table F.2 at the required impulse withstand voltage; reinforced
    reads it one step higher in the preferred series of impulse voltages (330, 500, 800, 1500, 2500, 4000, 6000,
    8000, 12000 V), or at 160 % of the voltage when it is not a value of that series. Between rows the row above
    is taken (no interpolation, the safe side). The pollution degree sets a minimum (PD2 0.2 mm, PD3 0.8 mm);
    above 2000 m the result is multiplied by the altitude correction factor.

    Parameters
    ----------
    impulse_v : required impulse withstand voltage [V peak] (the rated impulse voltage, or a working peak
        voltage where that is higher)
    grade : basic, supplementary or reinforced
    pollution_degree : 1, 2 or 3
    altitude_m : altitude of use [m]; 2000 m and below need no correction

    Returns
    -------
    ClearanceRequirement with ``clearance_mm`` [mm] and the row and factors applied.

    References
    ----------
    IEC 60664-1:2007 Table F.2 (case A, up to 2000 m), 4.2.3 (preferred series), 5.1.6 (reinforced insulation),
    Table A.2 (altitude correction); all from memory.
    """
    v = _finite(impulse_v, "impulse voltage")
    g = _grade(grade)
    pd = _pollution(pollution_degree)
    factor = altitude_correction_factor(altitude_m)
    table = _tables()["clearance_case_a"]
    rows = table["rows"]
    if v <= 0.0:
        raise ValueError(f"impulse voltage: expected a positive voltage, got {v:g} V")
    basis = _reinforced_basis_v(v) if g is Grade.REINFORCED else v
    top = float(rows[-1]["impulse_v"])
    if basis > top:
        raise ValueError(f"impulse withstand voltage {basis:g} V ({g.value}) is beyond {table['source']} "
                         f"(up to {top:g} V)")
    row = next(r for r in rows if basis <= float(r["impulse_v"]) * (1.0 + 1e-12))
    table_mm = float(row["clearance_mm"])
    minimum = float(table["pollution_minimum_mm"][pd])
    clearance = max(table_mm, minimum) * factor
    return ClearanceRequirement(
        clearance_mm=clearance, grade=g, impulse_v=v, basis_impulse_v=basis, row_impulse_v=float(row["impulse_v"]),
        table_mm=table_mm, pollution_degree=pd, pollution_minimum_mm=minimum, altitude_m=float(altitude_m),
        altitude_factor=factor, source=str(table["source"]),
        row=f"{float(row['impulse_v']):g} V: {table_mm:g} mm, pollution degree {pd} minimum {minimum:g} mm"
            + (f", altitude factor {factor:.3g}" if factor != 1.0 else ""))


def _creepage_column(pd: int, group: MaterialGroup) -> int:
    if pd == 1:
        return 0
    offset = {MaterialGroup.I: 0, MaterialGroup.II: 1, MaterialGroup.IIIA: 2, MaterialGroup.IIIB: 2}[group]
    return (1 if pd == 2 else 4) + offset


def creepage_required_mm(working_v_rms: float, grade: Grade | str, pollution_degree: int,
                         material_group: MaterialGroup | str) -> CreepageRequirement:
    """Minimum creepage distance to avoid failure by tracking, for materials other than printed wiring.

    Basic insulation reads Table F.4 by working voltage with linear interpolation between rows (permitted by
    the standard); working voltages below the first row (10 V) take the first row. Supplementary equals basic;
    reinforced is twice basic. The creepage must also be no less than the clearance: ``coordinate_barrier``
    applies that; this function gives the tracking requirement alone.

    Parameters
    ----------
    working_v_rms : working voltage across the insulation [V rms], 0 to 10000 V
    grade : basic, supplementary or reinforced
    pollution_degree : 1, 2 or 3 (pollution degree 1 has one column for all material groups)
    material_group : I, II, IIIa or IIIb (see ``material_group_from_cti``); IIIb is refused at pollution degree
        3 above 630 V, where the table's note advises against it

    Returns
    -------
    CreepageRequirement with ``creepage_mm`` [mm], the basic value and the rows used.

    References
    ----------
    IEC 60664-1:2007 Table F.4 (numbered F.5 in later editions) and 5.2.5 (reinforced: twice basic); from memory.
    """
    v = _finite(working_v_rms, "working voltage")
    g = _grade(grade)
    pd = _pollution(pollution_degree)
    group = _material(material_group)
    table = _tables()["creepage_basic"]
    rows = table["rows"]
    volts = [float(r["working_v"]) for r in rows]
    if v < 0.0 or v > volts[-1]:
        raise ValueError(f"working voltage {v:g} V rms is outside {table['source']} (0 to {volts[-1]:g} V rms)")
    if pd == 3 and group is MaterialGroup.IIIB and v > float(table["pd3_group_iiib_max_v"]):
        raise ValueError(f"material group IIIb is not recommended at pollution degree 3 above "
                         f"{float(table['pd3_group_iiib_max_v']):g} V ({table['source']}); use a higher-CTI material")
    col = _creepage_column(pd, group)
    mm = [float(r["mm"][col]) for r in rows]
    if v <= volts[0]:
        basic, lo, hi = mm[0], volts[0], volts[0]
    else:
        i = next(k for k in range(1, len(volts)) if v <= volts[k])
        lo, hi = (volts[i], volts[i]) if v == volts[i] else (volts[i - 1], volts[i])
        basic = mm[i] if v == volts[i] else _interp(v, [lo, hi], [mm[i - 1], mm[i]])
    factor = float(table["reinforced_factor"]) if g is Grade.REINFORCED else 1.0
    column = str(table["columns"][col])
    span = f"the {lo:g} V row" if lo == hi else f"between the {lo:g} V and {hi:g} V rows"
    return CreepageRequirement(
        creepage_mm=basic * factor, grade=g, working_v_rms=v, pollution_degree=pd, material_group=group,
        basic_mm=basic, row_low_v=lo, row_high_v=hi, source=str(table["source"]),
        row=f"column {column}, {span}: basic {basic:.4g} mm" + (f", x{factor:g} reinforced" if factor != 1 else ""))


def material_group_from_cti(cti: float) -> MaterialGroupLookup:
    """Material group from the comparative tracking index: I >= 600, II 400-600, IIIa 175-400, IIIb 100-175.

    Parameters
    ----------
    cti : comparative tracking index [V] (IEC 60112); below 100 no group applies and ValueError is raised

    References
    ----------
    IEC 60664-1:2007 4.8.1.3 (material groups); IEC 60112 (the CTI test); from memory.
    """
    x = _finite(cti, "CTI")
    table = _tables()["material_groups"]
    for row in table["rows"]:
        if x >= float(row["cti_min"]):
            return MaterialGroupLookup(group=_material(str(row["group"])), cti=x, cti_min=float(row["cti_min"]),
                                       source=str(table["source"]))
    lowest = min(float(r["cti_min"]) for r in table["rows"])
    raise ValueError(f"CTI {x:g} is below {lowest:g}, the lowest material group in {table['source']}")


def solid_insulation_requirement(grade: Grade | str, working_v_peak: float) -> SolidInsulationRequirement:
    """Layers and thickness of solid insulation needed for a grade.

    Thin sheets (layers under 0.4 mm): basic insulation is one layer that passes the basic electric strength
    test; supplementary and reinforced are at least two layers each passing that grade's test, or three layers
    of which every pair together passes it. A single layer that is not thin sheet needs 0.4 mm through the
    insulation for supplementary or reinforced insulation when the working voltage exceeds 71 V peak.
    Triple-insulated winding wire to the standard's annex counts as reinforced insulation for the wire itself.

    Parameters
    ----------
    grade : basic, supplementary or reinforced
    working_v_peak : peak working voltage across the insulation [V]

    References
    ----------
    IEC 60950-1:2005 2.10.5.2 (thickness) and 2.10.5.4 (thin sheet); IEC 62368-1:2014 5.4.4.2 and 5.4.4.6;
    winding wire: IEC 60950-1 Annex U, IEC 62368-1 Annex J; all from memory.
    """
    g = _grade(grade)
    vp = _finite(working_v_peak, "working peak voltage")
    if vp < 0.0:
        raise ValueError(f"working peak voltage: expected >= 0 V, got {vp:g} V")
    table = _tables()["solid_insulation"]
    rule_row = next(r for r in table["rules"] if r["grade"] == g.value)
    each = int(rule_row["each_passing"])
    any_two = None if rule_row["any_two_passing"] is None else int(rule_row["any_two_passing"])
    needs_thickness = g is not Grade.BASIC and vp > float(table["single_layer_rule_above_v_peak"])
    min_mm = float(table["single_layer_min_mm"]) if needs_thickness else None
    if any_two is None:
        rule = f"one layer that passes the {g.value} electric strength test"
    else:
        rule = (f"thin sheet: {each} layers each passing the {g.value} electric strength test, or {any_two} layers "
                f"of which every pair together passes it")
    rule += (f"; a single solid layer at least {min_mm:g} mm thick" if min_mm is not None
             else "; no minimum thickness for a single layer")
    return SolidInsulationRequirement(
        grade=g, layers_each_passing=each, layers_any_two_passing=any_two, single_layer_min_mm=min_mm, test_grade=g,
        rule=rule,
        winding_wire_rule="triple-insulated winding wire to the standard's annex counts as reinforced insulation "
                          "for the wire itself; its terminations still need clearance and creepage",
        source=str(table["source"]))


def hipot_test_voltage_v(grade: Grade | str, working_v_rms: float, *, mains_connected: bool = True,
                         step_v: float | None = None) -> HipotTestVoltages:
    """Electric strength (hipot) test voltages for a grade: 60 s type test, 1 s routine test, d.c. alternative.

    Basic or supplementary: U_test = 2 U + 1000 V; for mains-connected circuits not less than 1500 V (the value
    for working voltages up to 250 V). Reinforced: twice the basic value, not less than 3000 V on mains. Routine
    production test: 1 s at 120 % of the type-test value. d.c.: sqrt(2) times the a.c. value. Each value is
    rounded UP to the test set's step.

    Parameters
    ----------
    grade : basic, supplementary or reinforced
    working_v_rms : working voltage across the insulation [V rms], 0 to 10000 V
    mains_connected : whether the barrier is between a mains circuit and another circuit
    step_v : the test set's voltage step [V] (default 50 V)

    Returns
    -------
    HipotTestVoltages [V rms a.c. and V d.c.], with the unrounded type-test value and the rule applied.

    References
    ----------
    IEC 60950-1:2005 Table 5B and IEC 62368-1 (1500 V / 3000 V up to 250 V on mains, from memory);
    2 U + 1000 V, reinforced at twice basic, and the 1 s routine test at 120 %: common practice (from memory).
    """
    g = _grade(grade)
    u = _finite(working_v_rms, "working voltage")
    table = _tables()["hipot"]
    top = float(table["max_working_v"])
    if u < 0.0 or u > top:
        raise ValueError(f"working voltage {u:g} V rms is outside the hipot rule's range (0 to {top:g} V rms)")
    step = float(table["default_step_v"]) if step_v is None else _finite(step_v, "test voltage step")
    floor = table["mains_floor"]
    basic = float(table["basic_per_working_v"]) * u + float(table["basic_offset_v"])
    rule = f"{float(table['basic_per_working_v']):g} U + {float(table['basic_offset_v']):g} V"
    if mains_connected:
        basic = max(basic, float(floor["basic_v"]))
        rule += f", at least {float(floor['basic_v']):g} V on mains"
    exact = basic
    if g is Grade.REINFORCED:
        exact = float(table["reinforced_factor"]) * basic
        if mains_connected:
            exact = max(exact, float(floor["reinforced_v"]))
        rule = f"reinforced: {float(table['reinforced_factor']):g} x ({rule})"
    type_v = round_up_to_step_v(exact, step)
    routine = round_up_to_step_v(float(table["routine_factor"]) * type_v, step)
    dc = round_up_to_step_v(math.sqrt(2.0) * type_v, step)
    rule += (f"; routine {float(table['routine_factor']) * 100:g} % for {float(table['routine_duration_s']):g} s; "
             f"rounded up to {step:g} V steps")
    return HipotTestVoltages(
        grade=g, working_v_rms=u, type_test_v=type_v, type_test_duration_s=float(table["type_test_duration_s"]),
        routine_v=routine, routine_duration_s=float(table["routine_duration_s"]), dc_type_test_v=dc,
        exact_type_test_v=exact, step_v=step, rule=rule, source=str(table["source"]))


def coordinate_barrier(*, grade: Grade | str, working_v_rms: float, mains_v: float, overvoltage_category: int | str,
                       pollution_degree: int, material_group: MaterialGroup | str | None = None,
                       cti: float | None = None, altitude_m: float = 0.0, working_v_peak: float | None = None,
                       mains_connected: bool = True, step_v: float | None = None) -> BarrierCoordination:
    """Coordinate one insulation barrier: clearance, creepage, solid insulation and hipot in one record.

    The clearance is dimensioned for the higher of the rated impulse voltage (from the mains voltage and
    overvoltage category) and the working peak voltage; the creepage is the tracking requirement but never
    less than that clearance.

    Parameters
    ----------
    grade : basic, supplementary or reinforced
    working_v_rms : working voltage across the barrier [V rms]
    mains_v : nominal line-to-neutral mains voltage the equipment is energised from [V rms]
    overvoltage_category : I to IV
    pollution_degree : 1, 2 or 3
    material_group : I, II, IIIa or IIIb; or give ``cti`` instead
    cti : comparative tracking index of the insulating material [V]
    altitude_m : altitude of use [m]
    working_v_peak : peak working voltage [V]; defaults to sqrt(2) x rms (a sine)
    mains_connected : whether the barrier is from a mains circuit (sets the hipot floor)
    step_v : the hipot test set's step [V]

    References
    ----------
    IEC 60664-1:2007 Tables F.1, F.2, F.4, A.2; IEC 62368-1 5.4.2 (clearance for the higher of transient and
    peak working voltage); IEC 60950-1:2005 2.10.5 and Table 5B; all from memory; see the functions called.
    """
    if (material_group is None) == (cti is None):
        raise ValueError("give exactly one of material group and CTI")
    group = material_group_from_cti(cti).group if cti is not None else _material(material_group or "")
    u = _finite(working_v_rms, "working voltage")
    if u < 0.0:
        raise ValueError(f"working voltage {u:g} V rms: expected a voltage of 0 V or more")
    peak = math.sqrt(2.0) * u if working_v_peak is None else _finite(working_v_peak, "working peak voltage")
    if peak < u * (1.0 - 1e-12):
        raise ValueError(f"working peak voltage {peak:g} V is below the rms value {u:g} V")
    impulse = rated_impulse_voltage_v(mains_v, overvoltage_category)
    creep = creepage_required_mm(u, grade, pollution_degree, group)
    clear = clearance_required_mm(max(impulse.impulse_v, peak), grade, pollution_degree, altitude_m)
    solid = solid_insulation_requirement(grade, peak)
    hipot = hipot_test_voltage_v(grade, u, mains_connected=mains_connected, step_v=step_v)
    creepage_mm = max(creep.creepage_mm, clear.clearance_mm)
    sources = tuple(dict.fromkeys((impulse.source, clear.source, creep.source, solid.source, hipot.source)))
    return BarrierCoordination(
        grade=_grade(grade), working_v_rms=u, working_v_peak=peak, impulse=impulse, clearance=clear, creepage=creep,
        creepage_mm=creepage_mm, creepage_set_by_clearance=clear.clearance_mm > creep.creepage_mm, solid=solid,
        hipot=hipot, sources=sources, note=verify_note())


# ------------------------------------------------------------------------------------------ signal words


def signal_words() -> tuple[SignalWord, ...]:
    """DANGER (red), WARNING (orange), CAUTION (yellow), most severe first.

    References
    ----------
    ANSI Z535.4, Product safety signs and labels; ISO 3864-2 (signal words and safety colours); from memory.
    """
    table = _tables()["signal_words"]
    return tuple(SignalWord(word=str(r["word"]), colour=str(r["colour"]), display_rgb=str(r["display_rgb"]),
                            meaning=str(r["meaning"]), source=str(table["source"])) for r in table["rows"])


def signal_word(word: str) -> SignalWord:
    """One signal word's record by name (case-insensitive); ValueError for an unknown word."""
    for entry in signal_words():
        if entry.word == str(word).strip().upper():
            return entry
    raise ValueError(f"signal word: expected DANGER, WARNING or CAUTION, got {word!r}")


def electricity_symbol() -> SafetySign:
    """The electricity warning sign's code, name and description (ISO 7010 W012).

    References
    ----------
    ISO 7010, Graphical symbols - Safety colours and safety signs - Registered safety signs, W012 (from memory).
    """
    table = _tables()["signal_words"]
    sym = table["electricity_symbol"]
    return SafetySign(code=str(sym["code"]), name=str(sym["name"]), description=str(sym["description"]),
                      source=str(table["source"]))
