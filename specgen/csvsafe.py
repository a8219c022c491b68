"""The one CSV writer for every CSV the tool writes, with cells made safe for spreadsheets.

A spreadsheet program runs a cell that starts with ``=``, ``+``, ``-`` or ``@`` (or a tab or carriage
return before one) as a formula, so a lot reference ``=HYPERLINK(...)`` typed into the register would
become a live link in the planner's export. Such a text cell is written with a leading apostrophe,
which the spreadsheet shows as plain text (the advice of the OWASP "CSV Injection" page). Numbers, and
text that is a plain number such as ``-5`` or ``+1.5``, are written as they are.
"""

from __future__ import annotations

import csv
import io
import re
from collections.abc import Iterable, Mapping, Sequence
from decimal import Decimal
from typing import Any

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "\uff1d", "\uff0b", "\uff0d", "\uff20")   # with full-width forms
_PLAIN_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")


def safe_cell(value: Any) -> Any:
    """A cell a spreadsheet shows rather than evaluates; None becomes an empty cell."""
    if value is None:
        return ""
    if isinstance(value, (bool, int, float, Decimal)):
        return value
    text = str(value)
    if text.startswith(_FORMULA_START) and not _PLAIN_NUMBER.fullmatch(text):
        return "'" + text
    return text


def csv_text(header: Sequence[str], rows: Iterable[Sequence[Any] | Mapping[str, Any]]) -> str:
    """CSV text (``\\n`` line ends) of a header and rows; a row is a sequence or a mapping by header name."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow([safe_cell(h) for h in header])
    for row in rows:
        cells = [row.get(h) for h in header] if isinstance(row, Mapping) else list(row)
        writer.writerow([safe_cell(c) for c in cells])
    return buffer.getvalue()
