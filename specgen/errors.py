"""The one error type for a user's mistake.

It carries the file, the line and the key path so the CLI can print exactly one line,
``PART.yaml:14: windings[1].voltage: expected a voltage, got '50 Hz'``, and exit 2.
"""

from __future__ import annotations


class SpecError(Exception):
    """A mistake in something the user gave us (a spec, a catalogue, a command line)."""

    def __init__(self, message: str, file: str | None = None, line: int | None = None,
                 path: str | None = None):
        self.message = message
        self.file = file
        self.line = line
        self.path = path
        super().__init__(str(self))

    def __str__(self) -> str:
        where = []
        if self.file:
            where.append(str(self.file) + (f":{self.line}" if self.line else ""))
        if self.path:
            where.append(self.path)
        return ": ".join(where + [self.message])


class DesignFailed(Exception):
    """A design check failed where a document needs a passing design (exit 1, not a user error)."""

    def __init__(self, message: str, failed: list | None = None):
        self.failed = failed or []
        super().__init__(message)
