"""A bobbin's own keys read apart from the loader: the cores it fits, and a split bobbin's chambers (each
chamber's breadth and the divider between them).

Read with the bobbin (``loader._bobbin``): the breadths, start flange first, add up to the bobbin's breadth
(both chambers, the divider excluded); the divider is no higher than the flanges' build height.
"""

from __future__ import annotations

from .. import units as _units
from ..loading import RENAMED_KEYS, Reader
from .models import Bobbin


def chamber_breadths(r: Reader) -> tuple[float, ...]:
    """A split bobbin's chamber breadths, start flange first (each a length with its unit)."""
    from .loader import MAX_DIMENSION_M  # the loader's ceiling on any dimension (imported late: it imports us)

    out = []
    for i, item in enumerate(r.list_of("chamber_breadths", [])):
        try:
            value = _units.parse(item, "length")
        except _units.UnitError as exc:
            raise r.item_error("chamber_breadths", i, str(exc)) from None
        if not 0.0 < value <= MAX_DIMENSION_M:
            raise r.item_error("chamber_breadths", i, f"a chamber breadth must be above zero, got '{item}'")
        out.append(value)
    return tuple(out)


def check_chambers(r: Reader, b: Bobbin) -> None:
    """Chamber figures belong to a split bobbin and add up to its breadth (the divider excluded)."""
    split_keys = [k for k in ("chamber_breadths", "divider_thickness", "divider_height") if r.has(k)]
    if b.sections < 2 and split_keys:
        raise r.error(f"'{split_keys[0]}' is for a split bobbin (sections: 2 or more); this one has one chamber",
                      split_keys[0])
    if b.chamber_breadths_m:
        if len(b.chamber_breadths_m) != b.sections:
            raise r.error(f"{b.sections} chambers need {b.sections} breadths, got {len(b.chamber_breadths_m)}",
                          "chamber_breadths")
        total = sum(b.chamber_breadths_m)
        if abs(total - b.breadth_m) > 0.1e-3:
            raise r.error(f"the chamber breadths add up to {total * 1e3:g} mm, not the breadth "
                          f"{b.breadth_m * 1e3:g} mm (both chambers, the divider excluded)", "chamber_breadths")
    if b.divider_height_m is not None and b.divider_height_m > b.height_m + 1e-9:
        raise r.error(f"the divider ({b.divider_height_m * 1e3:g} mm) is higher than the flanges' build height "
                      f"{b.height_m * 1e3:g} mm", "divider_height")


def core_ids(r: Reader) -> tuple[str, ...]:
    """The ids of the cores a bobbin fits: one body in several grades takes the same bobbin."""
    ids = tuple(str(c).strip() for c in r.list_of("cores", None) or ())
    if not ids or not all(ids):
        if r.has("core"):
            raise r.error(RENAMED_KEYS["bobbins"]["core"], "core")
        raise r.error("list the cores this bobbin fits, e.g. cores: [ETD-39-F100, ETD-39-F300]", "cores")
    if len(set(ids)) != len(ids):
        raise r.error("a core is listed twice", "cores")
    return ids
