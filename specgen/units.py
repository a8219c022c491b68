"""Reading a quantity written with its unit ("230 V", "0.5 mm", "40 degC") into an SI float.

One strict grammar, and nothing is ever evaluated::

    quantity  := [sign] number [unit]
    number    := digits ["." digits] | "." digits, then an optional exponent "e" [sign] digits
    unit      := factor { ("/" | "*" | "·" | " ") factor }      (left to right, as written)
    factor    := name [ ("^" | "**") small-integer | "²" | "³" ]
    name      := a known unit symbol or name, with an SI prefix where the unit takes one

So "9**9**9 V" or "2,5 A" or "230.5.1 V" is an error naming what was expected, never a number. The
units are a table here (symbol, SI factor, dimension as powers of m, kg, s, A, K); pint, the
general-purpose units library, is the reference the table is tested against (tests/test_units.py) and
is not needed at run time.

Each dimension has a physical range (a generous envelope of what a winding shop meets); a value
outside it, a subnormal or a non-finite value is refused here, at the edge, so the physics never sees
1e-320 V or 1e308 mm. Zero passes (whether zero is allowed is the key's business: see
:meth:`specgen.loading.Reader.quantity`).

Temperatures are the exception to SI: they are kept in degrees Celsius (``*_c``) because that is how
every limit in the trade is written (IEC 60085 classes, ambient, hot spot); temperature differences
come back in kelvin.
"""

from __future__ import annotations

import difflib
import functools
import math
import re
from fractions import Fraction

from .records import record

# powers of (metre, kilogram, second, ampere, kelvin)
_Vec = tuple[int, int, int, int, int]


@record(slots=True)
class Dimension:
    vector: _Vec
    si_unit: str           # what parse() returns the value in
    human: str             # how a person says it: "a voltage"
    example: str           # a well-formed value: "'230 V'"
    smallest: float        # the physical range of a non-zero magnitude, in si_unit
    largest: float
    range_text: str        # the same range as a person reads it


def _d(vector: _Vec, si: str, human: str, example: str, lo: float, hi: float, text: str) -> Dimension:
    return Dimension(vector, si, human, example, lo, hi, text)


_V = (2, 1, -3, -1, 0)
_W = (2, 1, -3, 0, 0)
#: Every dimension a spec, a requirement or the catalogue writes, with its physical range.
DIMENSIONS: dict[str, Dimension] = {
    "voltage": _d(_V, "V", "a voltage", "'230 V'", 1e-6, 1e6, "1 uV to 1 MV"),
    "current": _d((0, 0, 0, 1, 0), "A", "a current", "'2.5 A'", 1e-9, 1e5, "1 nA to 100 kA"),
    "frequency": _d((0, 0, -1, 0, 0), "Hz", "a frequency", "'50 Hz'", 1e-3, 1e9, "1 mHz to 1 GHz"),
    "time": _d((0, 0, 1, 0, 0), "s", "a time", "'5 us'", 1e-12, 1e8, "1 ps to 1e8 s"),
    "length": _d((1, 0, 0, 0, 0), "m", "a length", "'0.5 mm'", 1e-9, 100.0, "1 nm to 100 m"),
    "altitude": _d((1, 0, 0, 0, 0), "m", "an altitude", "'2000 m'", 1e-3, 1e4, "1 mm to 10 km"),
    "area": _d((2, 0, 0, 0, 0), "m**2", "an area", "'12 mm^2'", 1e-18, 100.0, "1e-12 mm^2 to 100 m^2"),
    "volume": _d((3, 0, 0, 0, 0), "m**3", "a volume", "'8 cm^3'", 1e-27, 100.0, "1e-18 mm^3 to 100 m^3"),
    "mass": _d((0, 1, 0, 0, 0), "kg", "a mass", "'120 g'", 1e-9, 1e5, "1 ug to 100 t"),
    "flux_density": _d((0, 1, -2, -1, 0), "T", "a flux density", "'1.4 T'", 1e-9, 100.0, "1 nT to 100 T"),
    "field": _d((-1, 0, 0, 1, 0), "A/m", "a magnetizing force", "'800 A/m'", 1e-6, 1e9, "1 uA/m to 1e9 A/m"),
    "current_density": _d((-2, 0, 0, 1, 0), "A/m**2", "a current density", "'3.5 A/mm^2'", 1e-3, 1e10,
                          "1e-9 A/mm^2 to 1e4 A/mm^2"),
    "power": _d(_W, "W", "a power", "'60 W'", 1e-9, 1e9, "1 nW to 1 GW"),
    "apparent_power": _d(_W, "W", "a power or VA", "'60 VA'", 1e-9, 1e9, "1 nVA to 1 GVA"),
    "inductance": _d((2, 1, -2, -2, 0), "H", "an inductance", "'47 uH'", 1e-15, 1e6, "1 fH to 1 MH"),
    "capacitance": _d((-2, -1, 4, 2, 0), "F", "a capacitance", "'2200 uF'", 1e-15, 10.0, "1 fF to 10 F"),
    "charge": _d((0, 0, 1, 1, 0), "C", "a charge", "'60 nC'", 1e-15, 1.0, "1 fC to 1 C"),
    "resistance": _d((2, 1, -3, -2, 0), "ohm", "a resistance", "'0.25 ohm'", 1e-12, 1e18, "1 pohm to 1e18 ohm"),
    "density": _d((-3, 1, 0, 0, 0), "kg/m**3", "a density", "'7.65 g/cm^3'", 1e-3, 1e5, "1 g/m^3 to 100 g/cm^3"),
    "resistivity": _d((3, 1, -3, -2, 0), "ohm*m", "a resistivity", "'1.7e-8 ohm*m'", 1e-12, 1e20,
                      "1e-12 ohm*m to 1e20 ohm*m"),
    "power_density": _d((-1, 1, -3, 0, 0), "W/m**3", "a loss per volume", "'300 kW/m^3'", 1e-6, 1e12,
                        "1e-6 W/m^3 to 1e12 W/m^3"),
    "electric_field": _d((1, 1, -3, -1, 0), "V/m", "a dielectric strength", "'150 kV/mm'", 1e-3, 1e11,
                         "1 mV/m to 100 kV/mm"),
    "temperature": _d((0, 0, 0, 0, 1), "degC", "a temperature", "'40 degC'", -273.15, 2000.0,
                      "-273.15 degC to 2000 degC"),
    "thermal_resistance": _d((-2, -1, 3, 0, 1), "K/W", "a thermal resistance", "'12 K/W'", 1e-4, 1e4,
                             "0.1 mK/W to 10 kK/W"),
    "speed": _d((1, 0, -1, 0, 0), "m/s", "an air speed", "'2 m/s'", 1e-3, 100.0, "1 mm/s to 100 m/s"),
    "temperature_difference": _d((0, 0, 0, 0, 1), "K", "a temperature rise", "'60 K'", 0.0, 2000.0,
                                 "0 K to 2000 K"),
}


class UnitError(ValueError):
    """Raised by parse(); the loader adds file, line and key path."""


# ---------------------------------------------------------------------------------------------- units

_PREFIXES = {"G": Fraction(10**9), "M": Fraction(10**6), "k": Fraction(1000), "c": Fraction(1, 100),
             "m": Fraction(1, 1000), "u": Fraction(1, 10**6), "\u00b5": Fraction(1, 10**6),
             "\u03bc": Fraction(1, 10**6), "n": Fraction(1, 10**9), "p": Fraction(1, 10**12), "f": Fraction(1, 10**15)}
_LONG_PREFIXES = {"giga": _PREFIXES["G"], "mega": _PREFIXES["M"], "kilo": _PREFIXES["k"], "centi": _PREFIXES["c"],
                  "milli": _PREFIXES["m"], "micro": _PREFIXES["u"], "nano": _PREFIXES["n"], "pico": _PREFIXES["p"]}

# symbol -> (SI factor, dimension); these take an SI prefix ("mm", "kV", "uH", "MΩ")
_PREFIXABLE: dict[str, tuple[Fraction | float, _Vec]] = {
    "m": (1.0, (1, 0, 0, 0, 0)), "g": (Fraction(1, 1000), (0, 1, 0, 0, 0)), "s": (1.0, (0, 0, 1, 0, 0)),
    "A": (1.0, (0, 0, 0, 1, 0)), "V": (1.0, _V), "W": (1.0, _W), "VA": (1.0, _W),
    "Hz": (1.0, (0, 0, -1, 0, 0)), "H": (1.0, (2, 1, -2, -2, 0)), "ohm": (1.0, (2, 1, -3, -2, 0)),
    "\u03a9": (1.0, (2, 1, -3, -2, 0)), "\u2126": (1.0, (2, 1, -3, -2, 0)), "T": (1.0, (0, 1, -2, -1, 0)),
    "Wb": (1.0, (2, 1, -2, -1, 0)), "J": (1.0, (2, 1, -2, 0, 0)), "N": (1.0, (1, 1, -2, 0, 0)),
    "F": (1.0, (-2, -1, 4, 2, 0)), "C": (1.0, (0, 0, 1, 1, 0)),
}
# long names (pint's spelling), which take a long prefix ("millimeter", "kilovolt")
_LONG: dict[str, str] = {
    "meter": "m", "metre": "m", "gram": "g", "second": "s", "ampere": "A", "amp": "A", "volt": "V",
    "watt": "W", "hertz": "Hz", "henry": "H", "tesla": "T", "weber": "Wb", "joule": "J", "newton": "N", "ohm": "ohm",
    "farad": "F", "coulomb": "C",
}
# no prefix: a unit of its own
_PLAIN: dict[str, tuple[Fraction | float, _Vec]] = {
    "min": (60.0, (0, 0, 1, 0, 0)), "minute": (60.0, (0, 0, 1, 0, 0)), "h": (3600.0, (0, 0, 1, 0, 0)),
    "hour": (3600.0, (0, 0, 1, 0, 0)), "d": (86400.0, (0, 0, 1, 0, 0)), "day": (86400.0, (0, 0, 1, 0, 0)),
    "week": (604800.0, (0, 0, 1, 0, 0)),
    "in": (Fraction("0.0254"), (1, 0, 0, 0, 0)), "inch": (Fraction("0.0254"), (1, 0, 0, 0, 0)),
    "K": (1.0, (0, 0, 0, 0, 1)), "kelvin": (1.0, (0, 0, 0, 0, 1)),
}
# temperature scales with an offset: only on their own ("40 degC"), never inside a compound unit.
# name -> (factor to kelvin-sized steps, offset to degC after scaling)
_SCALES: dict[str, tuple[float, float]] = {
    "degC": (1.0, 0.0), "\u00b0C": (1.0, 0.0), "\u2103": (1.0, 0.0), "celsius": (1.0, 0.0),
    "degF": (5.0 / 9.0, -32.0 * 5.0 / 9.0), "\u00b0F": (5.0 / 9.0, -32.0 * 5.0 / 9.0),
    "delta_degC": (1.0, 0.0), "delta_degF": (5.0 / 9.0, 0.0),
}

MAX_POWER = 4
MAX_TEXT = 100


@functools.lru_cache(maxsize=512)
def unit_named(name: str) -> tuple[Fraction | float, _Vec] | None:
    """(SI factor, dimension) of one unit name such as "mm", "kV", "uH" or "millimeter"; None if unknown."""
    if name in _PLAIN:
        return _PLAIN[name]
    if name in _PREFIXABLE:
        return _PREFIXABLE[name]
    if name in _LONG:
        return _PREFIXABLE[_LONG[name]]
    if name.endswith("s") and name[:-1] in _LONG:          # plurals of long names: "volts"
        return _PREFIXABLE[_LONG[name[:-1]]]
    if name.endswith("s") and len(name) > 3 and name[:-1] in _PLAIN:     # "hours", "days", "weeks"
        return _PLAIN[name[:-1]]
    if len(name) > 1 and name[0] in _PREFIXES and name[1:] in _PREFIXABLE:
        factor, vec = _PREFIXABLE[name[1:]]
        return _PREFIXES[name[0]] * factor, vec
    for long_prefix, scale in _LONG_PREFIXES.items():
        if name.startswith(long_prefix):
            rest = unit_named(name[len(long_prefix):])
            base = name[len(long_prefix):].rstrip("s")
            if rest is not None and (base in _LONG or name[len(long_prefix):] in _LONG):
                return scale * Fraction(rest[0]), rest[1]
    return None


def known_unit_names() -> list[str]:
    """Every unit name with every prefix it takes (for the tests against pint and for suggestions)."""
    names = list(_PLAIN) + list(_PREFIXABLE) + list(_LONG)
    names += [p + s for s in _PREFIXABLE for p in _PREFIXES]
    names += [p + s for s in _LONG for p in _LONG_PREFIXES]
    return names


# ---------------------------------------------------------------------------------------------- grammar

_SIGNS = "+-\u2212"      # ASCII plus and minus, and the typographic minus sign
# ASCII digits only: "٣ V" is not read as 3 V
_NUMBER_RE = re.compile(r"([+\-\u2212]?)((?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+\-]?[0-9]+)?)")
_DECIMAL_COMMA_RE = re.compile(r"[+\-\u2212]?[0-9]+,[0-9]")
_NAME = r"[A-Za-z_\u00b0\u00b5\u03bc\u03a9\u2126\u2103]+"
_FACTOR_RE = re.compile(rf"({_NAME})(?:(?:\^|\*\*)([+\-]?[0-9]+)|([²³]))?")
_OP_RE = re.compile(r"\s*([/*\u00b7\u22c5])\s*|\s+")


@functools.lru_cache(maxsize=1024)
def _unit_expression(expr: str, whole: str, human: str) -> tuple[float, _Vec, str | None]:
    """(SI factor, dimension, temperature scale name or None) of a unit expression such as "kW/m^3"."""
    if expr in _SCALES:
        return 1.0, (0, 0, 0, 0, 1), expr
    # exact arithmetic on the factors, so "7.65 g/cm^3" is 7650 kg/m^3 and not 7649.999999999999
    factor, vec, pos, divide = Fraction(1), [0, 0, 0, 0, 0], 0, False
    while True:
        m = _FACTOR_RE.match(expr, pos)
        if not m:
            raise UnitError(f"expected {human}, could not read the unit in '{whole}'")
        name, power_text, superscript = m.group(1), m.group(2), m.group(3)
        if name in _SCALES:
            raise UnitError(f"'{name}' stands on its own (like '40 {name}'), not inside a unit; got '{whole}'")
        unit = unit_named(name)
        if unit is None:
            raise UnitError(f"expected {human}, got the unknown unit '{name}' in '{whole}'{_suggest(name)}")
        power = int(power_text) if power_text else ({"²": 2, "³": 3}[superscript] if superscript else 1)
        if power == 0 or abs(power) > MAX_POWER:
            raise UnitError(f"a unit power is a small whole number (1 to {MAX_POWER}); got '{whole}'")
        power = -power if divide else power
        factor *= Fraction(unit[0]) ** power
        vec = [v + power * u for v, u in zip(vec, unit[1])]
        pos = m.end()
        if pos == len(expr):
            return float(factor), (vec[0], vec[1], vec[2], vec[3], vec[4]), None
        op = _OP_RE.match(expr, pos)
        if not op or op.end() == len(expr):
            raise UnitError(f"expected {human}, could not read the unit in '{whole}'")
        divide = op.group(1) == "/"
        pos = op.end()


def _suggest(name: str) -> str:
    lower = {n.lower(): n for n in known_unit_names() + list(_SCALES)}
    if name.lower() in lower:
        return f"; did you mean '{lower[name.lower()]}'?"
    if name == "C":
        return "; write degC for degrees Celsius"
    near = difflib.get_close_matches(name, list(lower.values()), n=1, cutoff=0.8)
    return f"; did you mean '{near[0]}'?" if near else ""


@functools.lru_cache(maxsize=8192)     # a catalogue repeats the same few hundred texts
def _parse_text(text: str, dimension: str) -> float:
    dim = DIMENSIONS[dimension]
    human = dim.human
    whole = text.strip()
    if len(whole) > MAX_TEXT:
        raise UnitError(f"expected {human} like {dim.example}, got {len(whole):,} characters of text")
    if _DECIMAL_COMMA_RE.match(whole):
        raise UnitError(f"a comma in a number is not read (decimal or thousands?); write a decimal point, "
                        f"like {dim.example}, got '{whole}'")
    m = _NUMBER_RE.match(whole)
    if not m:
        raise UnitError(f"expected {human} like {dim.example}, could not read '{whole}' (a number, then its unit)")
    rest = whole[m.end():]
    if rest and not rest[0].isspace() and not re.match(_NAME, rest[0]):
        raise UnitError(f"expected {human} like {dim.example}, could not read the number in '{whole}'")
    unit_text = rest.strip()
    if not unit_text:
        raise UnitError(f"expected {human} with its unit (like {dim.example}), got a bare number '{whole}'")
    number = float(m.group(2))
    if m.group(1) in ("-", "\u2212"):
        number = -number
    if not math.isfinite(number):
        raise UnitError(f"expected a finite {human[human.index(' ') + 1:]}, got '{whole}'")
    factor, vec, scale = _unit_expression(unit_text, whole, human)
    if vec != dim.vector:
        hint = "; write degC for degrees Celsius (C is the coulomb)" if (
            unit_text == "C" and dimension.startswith("temperature")) else ""
        raise UnitError(f"expected {human}, got '{whole}'{hint}")
    if dimension == "temperature":
        if scale is None and unit_text not in ("K", "kelvin"):
            raise UnitError(f"expected {human} in degC, degF or K, got '{whole}'")
        step, offset = _SCALES.get(scale or "", (1.0, -273.15))
        value = number * step + offset
        if value < -273.15 - 1e-9:
            raise UnitError(f"'{whole}' is below absolute zero")
    elif dimension == "temperature_difference":
        value = number * _SCALES.get(scale or "", (1.0, 0.0))[0]
    else:
        value = number * factor
    return _in_range(value, dim, whole)


def _in_range(value: float, dim: Dimension, whole: str) -> float:
    what = dim.human[dim.human.index(" ") + 1:]
    if not math.isfinite(value):
        raise UnitError(f"expected a finite {what}, got '{whole}'")
    if value != 0.0 and abs(value) < 1e-30:      # below any meaning (and on its way to underflow)
        raise UnitError(f"'{whole}' is too small to mean anything; write 0 if zero is meant")
    if dim.vector == (0, 0, 0, 0, 1) and dim.si_unit == "degC":
        if value > dim.largest:
            raise UnitError(f"'{whole}' is outside the range of {dim.human} here ({dim.range_text})")
        return value
    if value != 0.0 and not dim.smallest <= abs(value) <= dim.largest:
        raise UnitError(f"'{whole}' is outside the range of {dim.human} here ({dim.range_text})")
    return value + 0.0      # -0.0 becomes 0.0


def parse(value: object, dimension: str) -> float:
    """Parse ``"230 V"`` (a string with its unit) to an SI float of the given dimension.

    A bare number, a wrong dimension, anything outside the grammar above, a value outside the
    dimension's physical range, or a non-finite one raises UnitError with a message a shop engineer
    understands. Temperatures come back in degC; temperature differences in K.
    """
    dim = DIMENSIONS[dimension]
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        raise UnitError(f"expected {dim.human} with its unit (like {dim.example}), got a bare number {value!r}")
    if not isinstance(value, str):
        raise UnitError(f"expected {dim.human} with its unit (like {dim.example}), got {_describe(value)}")
    return _parse_text(value, dimension)


def _describe(value: object) -> str:
    if value is None:
        return "nothing"
    if isinstance(value, bool):
        return f"'{str(value).lower()}'"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    return repr(value)
