"""Unit parsing: the fast table must agree with pint (the independent reference library) on every row."""

import pytest

from specgen import units


@pytest.mark.parametrize("unit", sorted(units._FAST))
def test_fast_table_agrees_with_pint(unit):
    """Every unit the fast path knows converts to SI exactly as pint converts it (pint is the reference)."""
    dimension, factor = units._FAST[unit]
    reg = units.ureg()
    text = unit.replace("µ", "u").replace("Ω", "ohm").replace("²", "**2").replace("³", "**3").replace("^", "**")
    q = reg.Quantity(f"2.5 {text}")
    target = units.DIMENSIONS[dimension][1]
    expected = float(q.to(target).magnitude)
    assert units._fast(f"2.5 {unit}", dimension) == pytest.approx(expected, rel=1e-12)


def test_pint_fallback_for_unusual_units():
    # pint handles what the table does not: inches of wire, gauss, kilo-amp-turns per metre in other spellings
    assert units.parse("0.0201 inch", "length") == pytest.approx(0.0201 * 0.0254)
    assert units.parse("1.5 weber/meter**2", "flux_density") == pytest.approx(1.5)
    assert units.parse("3.5 A/mm^2", "current_density") == pytest.approx(3.5e6)


@pytest.mark.parametrize("value, dim, fragment", [
    (12, "voltage", "bare number"),
    ("12", "voltage", "bare number"),
    ("50 Hz", "voltage", "expected a voltage"),
    ("0.5 mm", "current", "expected a current"),
    ("fish", "length", "could not read"),
    (None, "length", "got nothing"),
    ([1, 2], "length", "a list"),
    (True, "length", "'true'"),
])
def test_bad_values_say_what_was_expected(value, dim, fragment):
    with pytest.raises(units.UnitError) as err:
        units.parse(value, dim)
    assert fragment in str(err.value)


def test_temperatures_stay_in_celsius():
    assert units.parse("40 degC", "temperature") == 40.0
    assert units.parse("313.15 K", "temperature") == pytest.approx(40.0)
    assert units.parse("104 degF", "temperature") == pytest.approx(40.0)   # pint path
    assert units.parse("10 K", "temperature_difference") == 10.0
