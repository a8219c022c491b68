"""The physical envelope of a Design's results: a spec whose design leads to a quantity beyond any part
this tool makes (a 1 GW clamp loss from a 500 V diode drop, a 230 kA peak from a 50 kA auxiliary) is
refused with one line naming the file and the result, instead of printing that figure.

Each result field names its unit by its suffix (``_v``, ``_a``, ``_w``, ...); its dimension's physical
range is the one ``specgen.units`` gives the inputs, widened where a result legitimately goes further
than any input (metres of wire in a winding, a mass, a time). Temperatures must lie inside their range.
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from typing import Any

from .. import units
from ..errors import SpecError

#: A Design field's unit suffix -> the ``specgen.units`` dimension of its value.
SUFFIX = {"_v": "voltage", "_a": "current", "_hz": "frequency", "_s": "time", "_m": "length", "_m2": "area",
          "_m3": "volume", "_kg": "mass", "_t": "flux_density", "_a_m": "field", "_a_m2": "current_density",
          "_w": "power", "_h": "inductance", "_ohm": "resistance", "_w_m3": "power_density", "_c": "temperature",
          "_k": "temperature_difference", "_va": "apparent_power", "_kw_m3": "power_density", "_mm": "length"}
#: Factor to the dimension's SI unit for suffixes in another unit.
SCALE = {"_kw_m3": 1e3, "_mm": 1e-3}
#: Results that legitimately go beyond an input's range (wire lengths, masses, times), per dimension.
OUTPUT_LARGEST = {"length": 1e5, "mass": 1e4, "time": 1e9}
_BY_LENGTH = sorted(SUFFIX, key=len, reverse=True)


def _numbers(obj: Any, key: str = "") -> Iterator[tuple[str, float]]:
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _numbers(v, str(k))
    elif isinstance(obj, (list, tuple)):
        for v in obj:
            yield from _numbers(v, key)
    elif isinstance(obj, (int, float)) and not isinstance(obj, bool):
        yield key, float(obj)


def outside_range(data: dict[str, Any]) -> Iterator[tuple[str, float, units.Dimension, float]]:
    """(field, value, dimension, largest) of each finite result in ``data`` (a Design's ``to_dict()``)
    outside its dimension's physical range; non-finite values are the caller's (they are never valid)."""
    for key, value in _numbers(data):
        if value == 0 or not math.isfinite(value):
            continue
        suffix = next((s for s in _BY_LENGTH if key.endswith(s)), None)
        if suffix is None:
            continue
        dim = units.DIMENSIONS[SUFFIX[suffix]]
        si = value * SCALE.get(suffix, 1.0)
        largest = OUTPUT_LARGEST.get(SUFFIX[suffix], dim.largest)
        if dim.si_unit == "degC":
            if not dim.smallest <= si <= largest:
                yield key, value, dim, largest
        elif abs(si) > largest:
            yield key, value, dim, largest


def refuse_out_of_range(design: Any, file: str | None) -> None:
    """Raise a one-line SpecError at ``file`` when a result of ``design`` lies outside its physical range."""
    for key, value, dim, largest in outside_range(design.to_dict()):
        word = dim.human.split(" ", 1)[-1]
        shown = f"{value * SCALE.get(next(s for s in _BY_LENGTH if key.endswith(s)), 1.0):.4g} {dim.si_unit}"
        limit = (f"outside {dim.range_text}" if dim.si_unit == "degC"
                 else f"beyond the largest {word} a part made here reaches ({largest:g} {dim.si_unit})")
        raise SpecError(f"the design leads to {key} = {shown}, {limit}: check the spec's voltages, currents, "
                        "frequency and dimensions", file=file)


__all__ = ["SUFFIX", "SCALE", "OUTPUT_LARGEST", "outside_range", "refuse_out_of_range"]
