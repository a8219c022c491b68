"""The one formatter (specgen.present) against the SI brochure's rules and independent arithmetic.

Sources: BIPM SI brochure, 9th ed. (2019), section 3 (prefixes: k = 1e3, m = 1e-3, µ = 1e-6, ...)
and 5.4.3 (a space between the number and the unit). Each expected value below is parsed back with
pint (a general-purpose units library) and compared with the input, so the prefix and the digits
are checked by something outside this project.
"""

from __future__ import annotations

import pint
import pytest

from specgen import present

UREG = pint.UnitRegistry()


@pytest.mark.parametrize("value, unit, text", [
    (100000.0, "Hz", "100.0 kHz"), (0.003628, "H", "3.628 mH"), (1.5, "Ω", "1.500 Ω"), (12000.0, "Ω", "12.00 kΩ"),
    (0.07018, "Ω", "70.18 mΩ"), (4.748e-5, "H", "47.48 µH"), (999.96, "V", "1.000 kV"), (2.2e-9, "F", "2.200 nF"),
])
def test_si_prefixes(value, unit, text):
    assert present.si(value, unit) == text
    number, symbol = text.split(" ")
    pint_unit = symbol.replace("Ω", "ohm").replace("µ", "u")
    assert UREG.Quantity(float(number), pint_unit).to(unit.replace("Ω", "ohm")).magnitude == \
        pytest.approx(value, rel=5e-4)


def test_si_trims_on_request_and_handles_edges():
    assert present.si(100000.0, "Hz", keep_zeros=False) == "100 kHz"
    assert present.si(50.0, "Hz", keep_zeros=False) == "50 Hz"
    assert present.si(0.0, "A") == "0 A"
    assert present.si(None, "A") == present.MISSING


def test_one_formatter_for_report_diff_and_work_order():
    """1.5 ohm and 12 kohm read the same on the terminal, in the change summary and on the work order."""
    from specgen.diff import fmt
    from specgen.documents import workorder as wo

    for value in (1.5, 12000.0, 0.0123):
        assert fmt(value, "ohm") == wo.fmt_ohm(value) == present.si(value, "Ω")


def test_table_aligns_columns():
    text = present.table(["name", "turns"], [["P", 843], ["S12", 47]], "lr")
    lines = text.splitlines()
    assert lines[0] == "  name  turns" and lines[1] == "  ----  -----"
    assert lines[2] == "  P       843" and lines[3] == "  S12      47"


@pytest.mark.parametrize("value", [230.0, 25.6, 2.5, 60.0, 0.1234567, 1.0, 0.05, 999.95, 3.14159])
def test_rating_is_four_significant_figures_as_python_writes_them(value):
    """A rating agrees with Python's own general format '.4g' (the language's format specification, outside
    this project) wherever that writes no exponent."""
    assert present.rating(value, "V") == f"{value:.4g} V"


def test_rating_never_writes_an_exponent():
    assert present.rating(12000.0, "A") == "12000 A"           # '.4g' would write 1.2e+04
    assert float(present.rating(12345.6, "A").split()[0]) == pytest.approx(12346)


@pytest.mark.parametrize("b_t, text", [(0.3124, "0.312 T"), (1.554, "1.55 T"), (0.0456, "0.046 T")])
def test_tesla_as_the_checks_write_it(b_t, text):    # pint reads it back, to the last place written
    assert present.tesla(b_t) == text
    assert UREG.Quantity(float(text.split()[0]), "T").to("mT").magnitude == pytest.approx(b_t * 1e3, abs=5.0)
