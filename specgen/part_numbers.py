"""The part-number rule, in one place: the spec parser, ``specgen new`` and the search all call it.

A part number names the files written for the part (``BH-1042.yaml``, ``BH-1042-revB-quote.pdf``,
work-order folders), so it is kept to characters that are safe in a file name on every system:
letters, digits, '.', '_' and '-', starting with a letter or digit, at most 60 characters.
"""

from __future__ import annotations

import re

from .errors import SpecError

MAX_LENGTH = 60
PART_NUMBER_RE = re.compile(rf"[A-Za-z0-9][A-Za-z0-9._-]{{0,{MAX_LENGTH - 1}}}")


def part_number_problem(text: object) -> str | None:
    """Why ``text`` is not a usable part number (one line), or None when it is."""
    if not isinstance(text, str) or not text.strip():
        return "the part number is empty"
    part = text.strip()
    if len(part) > MAX_LENGTH:
        return f"part number is {len(part)} characters long; at most {MAX_LENGTH}"
    if not PART_NUMBER_RE.fullmatch(part):
        return (f"part number '{part}' may hold letters, digits, '.', '_' and '-' only (it names "
                "the files written for it)")
    return None


def check_part_number(text: object, *, file: str | None = None, line: int | None = None,
                      path: str | None = "part") -> str:
    """``text`` stripped when it is a usable part number; otherwise a located SpecError."""
    problem = part_number_problem(text)
    if problem is not None:
        raise SpecError(problem, file=file, line=line, path=path)
    assert isinstance(text, str)
    return text.strip()
