"""The plausible range of a Design's results, and the one gate that holds every design to it.

A spec whose design leads to a quantity no part made here reaches (a 1 GW clamp loss from a 500 V diode
drop, a 230 kA peak from a 50 kA auxiliary, 100 A/mm² in a one-turn primary, a 1000 °C hot spot) ends
with one located line naming the result (``DesignOutOfRange``, exit 1: the input is well formed, the part
cannot be built as asked), and no figure of it is printed. So does a non-finite result.

Each result field names its unit by its suffix (``_v``, ``_a``, ``_w``, ...). ``RANGE`` is the one table:
per dimension, the largest magnitude a result may have (temperatures: the interval they must lie in).
It starts from the range ``specgen.units`` gives the inputs, widened where a result legitimately goes
further than any input (metres of wire in a winding, a mass, a time) and narrowed where physics bounds
every part (current density, flux density, hot spot; the reasons beside each).
"""

from __future__ import annotations

import math
from collections.abc import Iterator
from typing import TYPE_CHECKING, Any

from .. import units
from ..errors import DesignOutOfRange
from .resolve import spec_error

if TYPE_CHECKING:
    from .result import Design
    from .spec import Spec

#: A Design field's unit suffix -> the ``specgen.units`` dimension of its value.
SUFFIX = {"_v": "voltage", "_a": "current", "_hz": "frequency", "_s": "time", "_m": "length", "_m2": "area",
          "_m3": "volume", "_kg": "mass", "_t": "flux_density", "_a_m": "field", "_a_m2": "current_density",
          "_a_mm2": "current_density", "_w": "power", "_h": "inductance", "_ohm": "resistance",
          "_w_m3": "power_density", "_c": "temperature", "_k": "temperature_difference", "_va": "apparent_power",
          "_kw_m3": "power_density", "_mm": "length", "_m_s": "speed"}
#: Factor to the dimension's SI unit for suffixes in another unit, and how that unit is written.
SCALE = {"_kw_m3": 1e3, "_mm": 1e-3, "_a_mm2": 1e6}
_SHOWN = {"_kw_m3": "kW/m³", "_mm": "mm", "_a_mm2": "A/mm²"}

#: Hottest plausible temperature [degC]: far above IEC 60085's highest class (250 degC) and every power
#: ferrite's Curie point; no insulation survives it and McLyman's fit is far outside its data. The
#: temperature loop also searches for a thermal balance only up to here.
HOTTEST_C = 400.0

#: The one table: dimension -> (lowest, largest) a result may take, in the dimension's SI unit. For every
#: dimension but temperature ``lowest`` is None and the magnitude is held to ``largest``.
RANGE: dict[str, tuple[float | None, float]] = {name: (None, dim.largest) for name, dim in units.DIMENSIONS.items()}
RANGE.update({
    # results that legitimately go beyond an input's range: metres of wire, a mass, a time
    "length": (None, 1e5), "mass": (None, 1e4), "time": (None, 1e9),
    # 100 A/mm²: copper wire fuses within seconds far below this (Onderdonk's fusing relation; from
    # memory); a design carrying it is no continuous rating
    "current_density": (None, 1e8),
    # twice the highest saturation of any soft magnetic material (cobalt iron, about 2.4 T; from memory):
    # a linear B beyond it has no physical meaning
    "flux_density": (None, 5.0),
    "temperature": (units.DIMENSIONS["temperature"].smallest, HOTTEST_C),
})
#: Results that are a peak-to-peak swing (a sine's is twice its peak): held to twice their dimension's range.
PEAK_TO_PEAK = ("delta_b_t", "ripple_a")
_BY_LENGTH = sorted(SUFFIX, key=len, reverse=True)


def leaves(obj: Any, path: str = "") -> Iterator[tuple[str, Any]]:
    """(path, value) of every number and string in a Design's ``to_dict()`` (``windings[0].current_a``)."""
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from leaves(v, f"{path}.{k}" if path else str(k))
    elif isinstance(obj, (list, tuple)):
        for i, v in enumerate(obj):
            yield from leaves(v, f"{path}[{i}]")
    elif isinstance(obj, (int, float, str)) and not isinstance(obj, bool):
        yield path, obj


def suffix_of(path: str) -> str | None:
    """The unit suffix a result's key ends with (the longest that fits), None for a key without one."""
    key = path.rsplit(".", 1)[-1]
    return next((s for s in _BY_LENGTH if key.endswith(s)), None)


def outside_range(data: dict[str, Any]) -> Iterator[tuple[str, float, units.Dimension, float | None, float]]:
    """(path, value, dimension, lowest, largest) of each finite result in ``data`` (a Design's ``to_dict()``)
    outside ``RANGE``; non-finite values are the caller's (they are never valid)."""
    for path, value in leaves(data):
        if isinstance(value, str) or value == 0 or not math.isfinite(value):
            continue
        suffix = suffix_of(path)
        if suffix is None:
            continue
        lowest, largest = RANGE[SUFFIX[suffix]]
        if path.rsplit(".", 1)[-1] in PEAK_TO_PEAK:
            largest *= 2.0
        si = value * SCALE.get(suffix, 1.0)
        if (abs(si) > largest) if lowest is None else not lowest <= si <= largest:
            yield path, value, units.DIMENSIONS[SUFFIX[suffix]], lowest, largest


def refuse_out_of_range(spec: Spec, design: Design) -> None:
    """Raise ``DesignOutOfRange`` located in the spec when a result of ``design`` is non-finite or outside
    ``RANGE``: a winding's results at that winding, temperatures at ``operating``, the rest at ``windings``.
    The windings' own results are looked at first (they are usually the cause of the others)."""
    data = design.to_dict()
    ordered = [(p, v) for p, v in leaves(data) if p.startswith("windings[")]
    ordered += [(p, v) for p, v in leaves(data) if not p.startswith("windings[")]
    where = f"{spec.part} cannot be built on core {spec.core_id} as asked"
    for path, value in ordered:
        if isinstance(value, float) and not math.isfinite(value):
            raise _refusal(spec, path, f"the design gives a non-finite {_field(path)}: {where}, the requirement "
                                       f"is outside what this tool models")
    for path, value, dim, lowest, largest in sorted(outside_range(data), key=lambda r: not r[0].startswith("windings[")):
        suffix = suffix_of(path) or ""
        scale, unit = SCALE.get(suffix, 1.0), _SHOWN.get(suffix) or dim.si_unit.replace("**2", "²").replace("**3", "³")
        limit = (f"outside {lowest:g} to {largest:g} {unit}" if lowest is not None
                 else f"beyond the largest {dim.human.split(' ', 1)[-1]} a part made here reaches ({largest / scale:g} {unit})")
        shown = f"{value:.4g} {unit}"
        raise _refusal(spec, path, f"the design leads to {_field(path)} = {shown}, {limit}: {where}; check the "
                                   f"spec's voltages, currents, frequency and dimensions")


def _field(path: str) -> str:
    """A result as the refusal names it: without the winding index the location already gives."""
    return path.split("].", 1)[1] if path.startswith("windings[") and "]." in path else path


def _refusal(spec: Spec, path: str, message: str) -> DesignOutOfRange:
    if path.startswith("windings["):
        err = spec_error(spec, message, "windings", int(path[len("windings["):path.index("]")]))
    elif suffix_of(path) in ("_c", "_k"):
        err = spec_error(spec, message, "operating")
    else:
        err = spec_error(spec, message, "windings")
    return DesignOutOfRange(err.message, err.file, err.line, err.path)


__all__ = ["HOTTEST_C", "PEAK_TO_PEAK", "RANGE", "SCALE", "SUFFIX", "leaves", "outside_range", "refuse_out_of_range", "suffix_of"]
