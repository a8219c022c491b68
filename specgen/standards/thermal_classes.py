"""IEC 60085 thermal classes: the table and the one parser every caller uses.

A thermal class is named by its temperature in degC (130) and, for the classes below 250, by a
letter (B). Specs, catalogue entries and search requirements may write either, or both
("130 (B)"), or with the word "class" ("class B"); all of them come through ``parse_thermal_class``.

References
----------
IEC 60085:2007, Electrical insulation - Thermal evaluation and designation, Table 1 (thermal
classes and their letter designations; from memory). Classes 250 and above carry no letter and
are not used by this shop's parts.
"""

from __future__ import annotations

import re

from ..records import record

SOURCE = ("IEC 60085:2007, Electrical insulation - Thermal evaluation and designation, Table 1 "
          "(from memory)")


@record(slots=True)
class ThermalClass:
    """One IEC 60085 class: its temperature limit in degC and its letter."""

    limit_c: int
    letter: str

    @property
    def label(self) -> str:
        """'130 (B)', the form the documents print."""
        return f"{self.limit_c} ({self.letter})"


#: IEC 60085 Table 1, in rising order of temperature.
CLASSES: tuple[ThermalClass, ...] = (
    ThermalClass(90, "Y"), ThermalClass(105, "A"), ThermalClass(120, "E"), ThermalClass(130, "B"),
    ThermalClass(155, "F"), ThermalClass(180, "H"), ThermalClass(200, "N"), ThermalClass(220, "R"),
)

#: limit [degC] -> letter, for callers that want the plain mapping.
LETTER_BY_LIMIT: dict[int, str] = {c.limit_c: c.letter for c in CLASSES}
_LIMIT_BY_LETTER: dict[str, int] = {c.letter: c.limit_c for c in CLASSES}

_DESIGNATION = re.compile(r"^\s*(?:class\s*)?(?:(\d+(?:\.0+)?)\s*)?(?:\(?\s*([A-Za-z])\s*\)?)?\s*$",
                          re.IGNORECASE)


def listing() -> str:
    """'90 (Y), 105 (A), ...' for error messages."""
    return ", ".join(c.label for c in CLASSES)


def class_letter(limit_c: object) -> str:
    """The letter of a class limit (130 -> "B"); ValueError when it is not a listed class."""
    if isinstance(limit_c, bool):
        raise ValueError(f"not a thermal class temperature: {limit_c!r}")
    try:
        key = float(limit_c)  # type: ignore[arg-type]
    except (TypeError, ValueError):
        raise ValueError(f"not a thermal class temperature: {limit_c!r}") from None
    if key.is_integer() and int(key) in LETTER_BY_LIMIT:
        return LETTER_BY_LIMIT[int(key)]
    raise ValueError(f"{limit_c!r} is not an IEC 60085 thermal class ({listing()})")


def parse_thermal_class(designation: object) -> int:
    """The temperature limit [degC] of a class written 130, 130.0, "130", "B", "130 (B)" or "class B".

    Letters are case-insensitive; when number and letter are both given they must agree.
    Raises ValueError with a one-line reason otherwise (callers add file, line and key).
    """
    if designation is None or isinstance(designation, bool):
        raise ValueError(f"'{designation}' is not an IEC 60085 thermal class ({listing()})")
    if isinstance(designation, (int, float)):
        class_letter(designation)
        return int(designation)
    if not isinstance(designation, str) and hasattr(designation, "__float__"):   # numpy scalars
        return parse_thermal_class(float(designation))  # type: ignore[arg-type,unused-ignore]
    m = _DESIGNATION.match(str(designation))
    if not m or not (m.group(1) or m.group(2)):
        raise ValueError(f"'{designation}' is not an IEC 60085 thermal class ({listing()})")
    number, letter = m.group(1), m.group(2)
    limit = None
    if number:
        class_letter(number)
        limit = int(float(number))
    if letter:
        by_letter = _LIMIT_BY_LETTER.get(letter.upper())
        if by_letter is None:
            raise ValueError(f"'{letter}' is not an IEC 60085 class letter ({listing()})")
        if limit is not None and limit != by_letter:
            raise ValueError(f"thermal class '{designation}': {limit} is class {LETTER_BY_LIMIT[limit]}, "
                             f"not {letter.upper()}")
        limit = by_letter
    assert limit is not None
    return limit


def lowest_class_for(temperature_c: float) -> ThermalClass | None:
    """The lowest class whose limit is at or above ``temperature_c`` (None above class R)."""
    return next((c for c in CLASSES if c.limit_c >= temperature_c), None)


def class_label(limit_c: int | None) -> str:
    """'130 (B)' for a listed class, '125 °C' for any other limit, '-' for none (documents, reports)."""
    if limit_c is None:
        return "-"
    letter = LETTER_BY_LIMIT.get(int(limit_c))
    return f"{limit_c} ({letter})" if letter else f"{limit_c} °C"
