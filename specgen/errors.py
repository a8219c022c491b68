"""The one error type for a user's mistake.

It carries the file, the line and the key path so the CLI can print exactly one line,
``PART.yaml:14: windings[1].voltage: expected a voltage, got '50 Hz'``, and exit 2.
"""

from __future__ import annotations

import re


class SpecError(Exception):
    """A mistake in something the user gave us (a spec, a catalogue, a command line)."""

    exit_code = 2       # bad input

    def __init__(self, message: str, file: str | None = None, line: int | None = None,
                 path: str | None = None):
        self.message = message
        self.file = file
        self.line = line
        self.path = path
        super().__init__(str(self))

    MAX_MESSAGE = 400   # messages quote the user's value; a 5 MB string must not become a 5 MB line

    def __str__(self) -> str:
        where = []
        if self.file:
            where.append(str(self.file) + (f":{self.line}" if self.line else ""))
        if self.path:
            where.append(self.path)
        return one_line(": ".join(where + [self.message]), self.MAX_MESSAGE + 200)


def one_line(text: str, limit: int) -> str:
    """A message as exactly one line: control characters shown escaped, long text clipped."""
    text = escape_controls(text)
    return text if len(text) <= limit else text[: limit - 1] + "…"


# C0 and C1 controls, DEL, and the bidirectional overrides and isolates: a terminal acts on them
_CONTROLS = re.compile("[\x00-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]")
_NAMED = {"\n": "\\n", "\r": "\\r", "\t": "\\t"}


def first_control(text: str) -> str | None:
    """The first character of ``text`` a terminal would act on (as ``U+001B``), line breaks and tabs
    included, or None: what a one-line free-text value may not hold (``specgen.freetext``)."""
    m = _CONTROLS.search(text)
    return f"U+{ord(m.group()):04X}" if m else None


def escape_controls(text: str, keep_newlines: bool = False) -> str:
    """``text`` with every character a terminal would act on (ESC, BEL, NUL, CR, bidi overrides) shown
    as an escape (``\\x1b``) instead; ``keep_newlines`` leaves line feeds and tabs as they are."""
    def show(m: re.Match) -> str:
        ch = m.group()
        if keep_newlines and ch in "\n\t":
            return ch
        return _NAMED.get(ch) or (f"\\x{ord(ch):02x}" if ord(ch) < 0x100 else f"\\u{ord(ch):04x}")

    return _CONTROLS.sub(show, text)


class DesignOutOfRange(SpecError):
    """A requirement that cannot be built on the chosen core: a result of the design is non-finite or
    outside its plausible range (``design.bounds.RANGE``), so no figure of it is printed. Located like a
    SpecError, one line, but exit 1: the input is well formed, the part is impossible."""

    exit_code = 1


class DesignFailed(Exception):
    """A design check failed where a document needs a passing design (exit 1, not a user error)."""

    def __init__(self, message: str, failed: list | None = None):
        self.failed = failed or []
        super().__init__(message)
