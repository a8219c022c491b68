"""The one check for free text a person types on the command line (``--by``, ``--note``, ``--why``,
``--reason``, ``--lot``, ``--customer``...): what every command records in a spec's history or in the
register, and later prints on a terminal, a CSV or a document.

One line of plain text: surrounding spaces dropped, not empty (unless the option may be left out), no
control characters, line breaks or bidirectional controls (a forged row in ``orders list``, a terminal
escape in a name), at most the stated length. A bad value is a one-line SpecError naming the option.
"""

from __future__ import annotations

from typing import Any

from .errors import SpecError, first_control

#: Longest name a command records (``--by``: a name, initials, a role).
MAX_NAME_CHARS = 200
#: Longest one-line note or reason (``--note``, ``--why``, ``--reason``).
MAX_NOTE_CHARS = 2000
#: Longest lot reference (``--lot``, ``--effective lot ...``).
MAX_LOT_CHARS = 40


def check_free_text(value: Any, option: str, limit: int = MAX_NOTE_CHARS, *, required: bool = True,
                    what: str = "a value", allow_empty: bool = True) -> str | None:
    """``value`` as one checked line of text (``option`` names it in errors, e.g. ``--by``).

    ``required``: an empty or missing value is refused ("needs ``what``"); otherwise a missing one
    (None) reads as None, and so does an empty one unless ``allow_empty`` is False (``--by ""`` is a
    mistake, an empty lot column of a CSV is not).
    """
    text = "" if value is None else str(value).strip()
    if not text:
        if required or (value is not None and not allow_empty):
            raise SpecError(f"needs {what}; it is empty", path=option)
        return None
    if len(text) > limit:
        raise SpecError(f"is {len(text):,} characters long; at most {limit:,}", path=option)
    bad = first_control(text) or next((f"U+{ord(c):04X}" for c in text if c in "\u2028\u2029\ufeff"), None)
    if bad is not None:
        raise SpecError(f"holds the control character {bad}; one line of plain text only "
                        "(no line breaks or control characters)", path=option)
    return text


def check_name(value: Any, option: str = "--by", *, required: bool = False) -> str | None:
    """A person's name (``--by``): checked like any free text, at most :data:`MAX_NAME_CHARS`;
    None when it may be left out (the login name is used) and was."""
    return check_free_text(value, option, MAX_NAME_CHARS, required=required, what="who does it", allow_empty=False)


__all__ = ["MAX_NAME_CHARS", "MAX_NOTE_CHARS", "MAX_LOT_CHARS", "check_free_text", "check_name"]
