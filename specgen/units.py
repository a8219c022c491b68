"""The one pint registry and the parse/format helpers at the edges.

Everything dimensional in a spec or the catalogue is written with its unit ("230 V", "0.5 mm",
"40 degC"). It is parsed here once, to SI floats, and never touches pint again inside the physics.
Temperatures are the exception to SI: they are kept in degrees Celsius (``*_c``) because that is
how every limit in the trade is written (IEC 60085 classes, ambient, hot spot).
"""

from __future__ import annotations

import functools
import re

# dimension name -> (pint dimensionality string, SI unit to convert to, how a person says it)
DIMENSIONS: dict[str, tuple[str, str, str]] = {
    "voltage": ("[mass] * [length] ** 2 / [current] / [time] ** 3", "V", "a voltage"),
    "current": ("[current]", "A", "a current"),
    "frequency": ("1 / [time]", "Hz", "a frequency"),
    "time": ("[time]", "s", "a time"),
    "length": ("[length]", "m", "a length"),
    "area": ("[length] ** 2", "m**2", "an area"),
    "volume": ("[length] ** 3", "m**3", "a volume"),
    "mass": ("[mass]", "kg", "a mass"),
    "flux_density": ("[mass] / [current] / [time] ** 2", "T", "a flux density"),
    "field": ("[current] / [length]", "A/m", "a magnetizing force"),
    "current_density": ("[current] / [length] ** 2", "A/m**2", "a current density"),
    "power": ("[mass] * [length] ** 2 / [time] ** 3", "W", "a power"),
    "apparent_power": ("[mass] * [length] ** 2 / [time] ** 3", "W", "a power or VA"),
    "inductance": ("[mass] * [length] ** 2 / [current] ** 2 / [time] ** 2", "H", "an inductance"),
    "resistance": ("[mass] * [length] ** 2 / [current] ** 2 / [time] ** 3", "ohm", "a resistance"),
    "density": ("[mass] / [length] ** 3", "kg/m**3", "a density"),
    "resistivity": ("[mass] * [length] ** 3 / [current] ** 2 / [time] ** 3", "ohm*m", "a resistivity"),
    "power_density": ("[mass] / [length] / [time] ** 3", "W/m**3", "a loss per volume"),
    "electric_field": ("[mass] * [length] / [current] / [time] ** 3", "V/m", "a dielectric strength"),
    "temperature": ("[temperature]", "degC", "a temperature"),
    "temperature_difference": ("[temperature]", "delta_degC", "a temperature rise"),
}


@functools.lru_cache(maxsize=1)
def ureg():
    """The shared registry, built on first use (importing pint costs ~0.2 s)."""
    import pint

    reg = pint.UnitRegistry(autoconvert_offset_to_baseunit=True)
    reg.define("VA = volt * ampere")
    reg.define("percent = 0.01 = %")
    return reg


_NUMBER_ONLY = re.compile(r"^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$")
_DIM_CACHE: dict[str, object] = {}
_PARSE_CACHE: dict[tuple[str, str], float] = {}


def _dimensionality(dimension: str):
    if dimension not in _DIM_CACHE:
        _DIM_CACHE[dimension] = ureg().get_dimensionality(DIMENSIONS[dimension][0])
    return _DIM_CACHE[dimension]


class UnitError(ValueError):
    """Raised by parse(); the loader adds file, line and key path."""


# The units a shop writes every day, parsed without pint (building pint's registry costs ~0.3 s and a
# pint parse ~0.5 ms; a catalogue holds thousands of values). Anything not in this table goes through
# pint, and tests/test_units.py checks every row of this table against pint itself.
_P = {"G": 1e9, "M": 1e6, "k": 1e3, "": 1.0, "m": 1e-3, "u": 1e-6, "µ": 1e-6, "n": 1e-9, "p": 1e-12}


def _fast_table() -> dict:
    t: dict = {}

    def add(names, dimension, factor):
        for n in names:
            t[n] = (dimension, factor)

    for p in ("k", "", "m"):
        add([p + "V"], "voltage", _P[p])
    for p in ("k", "", "m", "u", "µ"):
        add([p + "A"], "current", _P[p])
    for p in ("M", "k", ""):
        add([p + "Hz"], "frequency", _P[p])
    for p in ("", "m", "u", "µ", "n"):
        add([p + "s"], "time", _P[p])
    add(["min"], "time", 60.0)
    add(["h"], "time", 3600.0)
    for p, f in (("k", 1e3), ("", 1.0), ("c", 1e-2), ("m", 1e-3), ("u", 1e-6), ("µ", 1e-6)):
        add([p + "m"], "length", f)
        add([p + "m^2", p + "m**2", p + "m²"], "area", f * f)
        add([p + "m^3", p + "m**3", p + "m³"], "volume", f ** 3)
    add(["in", "inch"], "length", 0.0254)
    add(["kg"], "mass", 1.0)
    add(["g"], "mass", 1e-3)
    add(["mg"], "mass", 1e-6)
    for p in ("", "m"):
        add([p + "T"], "flux_density", _P[p])
    add(["A/m"], "field", 1.0)
    add(["kA/m"], "field", 1e3)
    add(["A/mm^2", "A/mm**2", "A/mm²"], "current_density", 1e6)
    add(["A/cm^2", "A/cm**2", "A/cm²"], "current_density", 1e4)
    add(["A/m^2", "A/m**2"], "current_density", 1.0)
    for p in ("k", "", "m"):
        add([p + "W"], "power", _P[p])
    add(["VA"], "apparent_power", 1.0)
    add(["kVA"], "apparent_power", 1e3)
    for p in ("", "m", "u", "µ", "n"):
        add([p + "H"], "inductance", _P[p])
    for p in ("M", "k", "", "m", "u", "µ"):
        add([p + "ohm", p + "Ω"], "resistance", _P[p])
    add(["g/cm^3", "g/cm**3", "g/cm³"], "density", 1e3)
    add(["kg/m^3", "kg/m**3", "kg/m³"], "density", 1.0)
    add(["W/m^3", "W/m**3"], "power_density", 1.0)
    add(["kW/m^3", "kW/m**3"], "power_density", 1e3)
    add(["mW/cm^3", "mW/cm**3"], "power_density", 1e3)
    add(["V/m"], "electric_field", 1.0)
    add(["kV/mm"], "electric_field", 1e6)
    add(["V/mm"], "electric_field", 1e3)
    add(["V/um", "V/µm"], "electric_field", 1e6)
    add(["ohm*m"], "resistivity", 1.0)
    return t


_FAST = _fast_table()
_FAST_RE = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([^\s\d.+-][^\s]*)\s*$")
_TEMPS = {"degC": 0.0, "°C": 0.0, "C": None, "K": -273.15}


def _fast(text: str, dimension: str):
    """Parse 'number unit' from the table above; None if this text needs pint."""
    m = _FAST_RE.match(text)
    if not m:
        return None
    number, unit = float(m.group(1)), m.group(2)
    if dimension == "temperature":
        if unit in ("degC", "°C"):
            return number
        if unit == "K":
            return number - 273.15
        return None
    if dimension == "temperature_difference":
        if unit in ("K", "degC", "°C", "delta_degC"):
            return number
        return None
    row = _FAST.get(unit)
    if row is None:
        return None
    dim, factor = row
    if dim == dimension or (dimension == "apparent_power" and dim == "power"):
        return number * factor
    # known unit, wrong dimension: a clear error without pint
    raise UnitError(f"expected {DIMENSIONS[dimension][2]}, got '{text.strip()}'")


def parse(value, dimension: str) -> float:
    """Parse ``"230 V"`` (a string with its unit) to an SI float of the given dimension.

    A bare number, a wrong dimension or an unparsable string raises UnitError with a message a
    shop engineer understands. Temperatures come back in degC; temperature differences in K.
    """
    human = DIMENSIONS[dimension][2]
    like = f"with its unit (like {_example(dimension)})"
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        raise UnitError(f"expected {human} {like}, got a bare number {value!r}")
    if not isinstance(value, str):
        raise UnitError(f"expected {human} {like}, got {_describe(value)}")
    key = (value, dimension)
    if key in _PARSE_CACHE:
        return _PARSE_CACHE[key]
    text = value.strip()
    fast = _fast(text, dimension)
    if fast is not None:
        if fast != fast or fast in (float("inf"), float("-inf")):
            raise UnitError(f"expected a finite value, got '{value}'")
        _PARSE_CACHE[key] = fast
        return fast
    if _NUMBER_ONLY.match(text):
        raise UnitError(f"expected {human} with its unit (like {_example(dimension)}), got a bare number '{text}'")
    text = text.replace("°C", " degC").replace("µ", "u").replace("Ω", "ohm").replace("²", "**2").replace("³", "**3")
    reg = ureg()
    try:
        q = reg.Quantity(text)
    except Exception:
        raise UnitError(f"expected {human}, could not read '{value}'") from None
    if not hasattr(q, "dimensionality") or q.dimensionless and dimension != "dimensionless":
        raise UnitError(f"expected {human} with its unit (like {_example(dimension)}), got '{value}'")
    if dimension == "temperature_difference":
        if q.dimensionality != _dimensionality("temperature"):
            raise UnitError(f"expected {human}, got '{value}'")
        # "40 K", "40 delta_degC" and "40 degC" (read as a difference) all mean 40 K
        u = str(q.units)
        mag = float(q.magnitude)
        if u in ("kelvin", "delta_degree_Celsius", "degree_Celsius"):
            out = mag
        elif u in ("degree_Fahrenheit", "delta_degree_Fahrenheit"):
            out = mag * 5.0 / 9.0
        else:
            out = float(q.to("kelvin").magnitude)
    else:
        if q.dimensionality != _dimensionality(dimension):
            raise UnitError(f"expected {human}, got '{value}'")
        target = DIMENSIONS[dimension][1]
        out = float(q.to(target).magnitude)
    if out != out or out in (float("inf"), float("-inf")):
        raise UnitError(f"expected a finite {human[2:] if human.startswith('a ') else human}, got '{value}'")
    _PARSE_CACHE[key] = out
    return out


_EXAMPLES = {
    "voltage": "'230 V'", "current": "'2.5 A'", "frequency": "'50 Hz'", "time": "'5 us'",
    "length": "'0.5 mm'", "area": "'12 mm^2'", "volume": "'8 cm^3'", "mass": "'120 g'",
    "flux_density": "'1.4 T'", "field": "'800 A/m'", "current_density": "'3.5 A/mm^2'",
    "power": "'60 W'", "apparent_power": "'60 VA'", "inductance": "'47 uH'",
    "resistance": "'0.25 ohm'", "density": "'7.65 g/cm^3'", "resistivity": "'1.7e-8 ohm*m'",
    "power_density": "'300 kW/m^3'", "electric_field": "'150 kV/mm'", "temperature": "'40 degC'",
    "temperature_difference": "'60 K'",
}


def _describe(value) -> str:
    if value is None:
        return "nothing"
    if isinstance(value, bool):
        return f"'{str(value).lower()}'"
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    return repr(value)


def _example(dimension: str) -> str:
    return _EXAMPLES.get(dimension, "'1 m'")
