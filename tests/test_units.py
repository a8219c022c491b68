"""Unit parsing: one strict grammar, every unit checked against pint (the independent reference library),
nothing evaluated, every value inside its dimension's physical range."""

import math

import pytest

from specgen import units

REG = None


def pint_si(text: str, dimension: str) -> float:
    """The same quantity converted by pint, the reference."""
    global REG
    import pint

    if REG is None:
        REG = pint.UnitRegistry()
        REG.define("VA = volt * ampere")
    text = text.replace("µ", "u").replace("μ", "u").replace("\u03a9", "ohm").replace("\u2126", "ohm")
    text = text.replace("²", "**2").replace("³", "**3").replace("^", "**").replace("·", "*")
    return float(REG.Quantity(text).to(units.DIMENSIONS[dimension].si_unit).magnitude)


_PINT_DIMS = ("[length]", "[mass]", "[time]", "[current]", "[temperature]")


@pytest.mark.parametrize("name", sorted(units.known_unit_names()))
def test_every_unit_name_agrees_with_pint(name):
    """Each unit and prefix the table knows has pint's SI factor and dimension (pint is the reference)."""
    import pint

    global REG
    if REG is None:
        REG = pint.UnitRegistry()
        REG.define("VA = volt * ampere")
    factor, vector = units.unit_named(name)
    text = name.replace("µ", "u").replace("μ", "u").replace("\u03a9", "ohm").replace("\u2126", "ohm")
    base = REG.Quantity(1.0, text).to_base_units()
    assert float(factor) == pytest.approx(float(base.magnitude), rel=1e-12)
    assert vector == tuple(int(base.dimensionality.get(d, 0)) for d in _PINT_DIMS)


@pytest.mark.parametrize("text, dimension", [
    ("230 V", "voltage"), ("0.5 mm", "length"), ("3.5 A/mm^2", "current_density"), ("3.5 A/mm²", "current_density"),
    ("3.5 A/mm**2", "current_density"), ("7.65 g/cm^3", "density"), ("7.65 g/cm³", "density"),
    ("300 kW/m^3", "power_density"), ("1.7e-8 ohm*m", "resistivity"), ("1.7e-8 ohm·m", "resistivity"),
    ("1.7e-8 Ω m", "resistivity"), ("150 kV/mm", "electric_field"), ("1.5 weber/meter**2", "flux_density"),
    ("1.5 Wb/m^2", "flux_density"), ("0.0201 inch", "length"), ("12 millimeters", "length"), ("47 µH", "inductance"),
    ("47 μH", "inductance"), ("2 MΩ", "resistance"), ("2 kiloohm", "resistance"), ("60 VA", "apparent_power"),
    ("1.2 kVA", "apparent_power"), ("2 h", "time"), ("90 min", "time"), ("-5 V", "voltage"), ("+5 V", "voltage"),
    (".5 mm", "length"), ("5. mm", "length"), ("5e-3 m", "length"), ("5E+2 Hz", "frequency"), ("230V", "voltage"),
    ("12 mm^2", "area"), ("8 cm^3", "volume"), ("800 A/m", "field"), ("2 A / mm^2", "current_density"),
    ("0.1 W/cm^3", "power_density"), ("5 weeks", "time"), ("30 days", "time"), ("3 hours", "time"), ("1 d", "time"),
])
def test_accepted_forms_agree_with_pint(text, dimension):
    assert units.parse(text, dimension) == pytest.approx(pint_si(text, dimension), rel=1e-12)


def test_typographic_minus_and_spaces_are_read():
    assert units.parse("\u22125 V", "voltage") == -5.0            # U+2212 MINUS SIGN
    assert units.parse("230\u00a0V", "voltage") == 230.0          # no-break space
    assert units.parse("  230   V  ", "voltage") == 230.0


@pytest.mark.parametrize("text, fragment", [
    # arithmetic is never evaluated (pint's parser would: 9**9**9 hangs, 2**2**2**2**2 overflows)
    ("9**9**9 V", "could not read"),
    ("2**2**2**2**2 V", "could not read"),
    ("2*3 V", "could not read"),
    ("(2+3) V", "could not read"),
    ("1/2 V", "could not read"),
    # decimal commas and thousands separators: refused, never read as 25 or 2305
    ("2,5 V", "comma"),
    ("230,5 V", "comma"),
    ("1,000 V", "comma"),
    # junk around the number
    ("€ V", "could not read"),
    ("∞ V", "could not read"),
    ("inf V", "could not read"),
    ("nan V", "could not read"),
    ("2.5 V 4", "could not read the unit"),
    ("230.5.1 V", "could not read the number"),
    ("--230 V", "could not read"),
    ("+-230 V", "could not read"),
    ("0x10 V", "unknown unit"),
    ("5 V^9", "small whole number"),
    ("5 V^0", "small whole number"),
    ("5 V^2^2", "could not read the unit"),
    ("5 V/", "could not read the unit"),
    ("5 /V", "could not read the unit"),
    ("12 kv", "did you mean 'kV'"),
    ("12 pi V", "unknown unit 'pi'"),
    ("12 percent V", "unknown unit 'percent'"),
    ("12 V V", "expected a voltage"),
    ("12 A", "expected a voltage"),
    ("12", "bare number"),
    ("x" * 500, "characters"),
])
def test_refused_forms_are_unit_errors(text, fragment):
    with pytest.raises(units.UnitError) as err:
        units.parse(text, "voltage")
    assert fragment in str(err.value)


@pytest.mark.parametrize("text, dimension", [
    ("1e-320 V", "voltage"),        # subnormal
    ("1e-320 A", "current"),
    ("1e308 A", "current"),
    ("1e308 mm", "length"),
    ("1e300 A", "current"),
    ("1e999 V", "voltage"),         # overflows to infinity
    ("-1e999 V", "voltage"),
    ("1e200 kV", "voltage"),
    ("1e-30 mm", "length"),
    ("3000 degC", "temperature"),
    ("-300 degC", "temperature"),   # below absolute zero
    ("-1 K", "temperature"),
    ("1e308 K", "temperature_difference"),
])
def test_values_outside_the_physical_range_are_refused(text, dimension):
    with pytest.raises(units.UnitError, match="outside the range|finite|absolute zero|too small to mean"):
        units.parse(text, dimension)


def test_every_range_holds_finite_normal_numbers():
    """The envelope itself can never let a subnormal or an overflow through (IEEE 754 binary64 limits)."""
    tiny = 2.2250738585072014e-308          # the smallest normal double
    for dim in units.DIMENSIONS.values():
        if dim.smallest > 0:
            assert dim.smallest > tiny * 1e100
        assert math.isfinite(dim.largest) and dim.largest < 1e30


def test_zero_is_read_the_key_decides_whether_it_is_allowed():
    assert units.parse("0 mm", "length") == 0.0
    assert math.copysign(1.0, units.parse("-0 mm", "length")) == 1.0


@pytest.mark.parametrize("value, dim, fragment", [
    (12, "voltage", "bare number"),
    (12.5, "voltage", "bare number"),
    ("12", "voltage", "bare number"),
    ("50 Hz", "voltage", "expected a voltage"),
    ("0.5 mm", "current", "expected a current"),
    ("fish", "length", "could not read"),
    (None, "length", "got nothing"),
    ([1, 2], "length", "a list"),
    ({"a": 1}, "length", "a mapping"),
    (True, "length", "'true'"),
])
def test_bad_values_say_what_was_expected(value, dim, fragment):
    with pytest.raises(units.UnitError) as err:
        units.parse(value, dim)
    assert fragment in str(err.value)


def test_temperatures_stay_in_celsius():
    assert units.parse("40 degC", "temperature") == 40.0
    assert units.parse("40 °C", "temperature") == 40.0
    assert units.parse("313.15 K", "temperature") == pytest.approx(40.0)
    assert units.parse("104 degF", "temperature") == pytest.approx(pint_si_temp("104 degF"))
    assert units.parse("10 K", "temperature_difference") == 10.0
    assert units.parse("10 degC", "temperature_difference") == 10.0
    assert units.parse("18 delta_degF", "temperature_difference") == pytest.approx(10.0)


def pint_si_temp(text: str) -> float:
    import pint

    reg = pint.UnitRegistry()
    return float(reg.Quantity(float(text.split()[0]), text.split()[1]).to("degC").magnitude)


@pytest.mark.parametrize("text, fragment", [
    ("40 C", "write degC"),
    ("40 degC/m", "stands on its own"),
    ("40 V", "expected a temperature"),
])
def test_temperature_mistakes(text, fragment):
    with pytest.raises(units.UnitError, match=fragment):
        units.parse(text, "temperature")


def test_a_temperature_too_small_to_mean_anything_is_refused():
    """degC has no smallest magnitude of its own; 4e-299 degC is an underflow in waiting, not a reading."""
    with pytest.raises(units.UnitError, match="too small"):
        units.parse("4e-299 degC", "temperature")
    assert units.parse("0.001 degC", "temperature") == 0.001
