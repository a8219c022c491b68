"""Every CSV the tool writes is safe to open in a spreadsheet: a text cell that would start a formula
(``=``, ``+``, ``-``, ``@``, or a tab or carriage return) is written with a leading apostrophe, as the
OWASP "CSV Injection" page advises; numbers are written as they are. Read back with Python's csv module
(RFC 4180), an independent reader."""

import csv
import io
from decimal import Decimal

import pytest

from specgen.csvsafe import csv_text, safe_cell
from specgen.register import Register, orders_csv


@pytest.mark.parametrize("value, written", [
    ("=HYPERLINK(\"http://x.invalid\",\"lot\")", "'=HYPERLINK(\"http://x.invalid\",\"lot\")"),
    ("+1+cmd|' /C calc'!A0", "'+1+cmd|' /C calc'!A0"),
    ("-2+3", "'-2+3"),
    ("@SUM(A1:A9)", "'@SUM(A1:A9)"),
    ("\t=1", "'\t=1"),
    ("\r=1", "'\r=1"),
    ("＝1+1", "'＝1+1"),              # a full-width equals sign is read as one by some spreadsheets
    ("-5", "-5"),                     # a plain number stays a number
    ("+1.5e3", "+1.5e3"),
    ("L-10", "L-10"),
    ("", ""),
    (None, ""),
    (12, 12),
    (-3.5, -3.5),
    (Decimal("-14.50"), Decimal("-14.50")),
])
def test_safe_cell(value, written):
    assert safe_cell(value) == written


def test_csv_text_rows_and_mappings():
    text = csv_text(["a", "b"], [["=1", 2], {"a": "@x", "b": None}])
    assert list(csv.reader(io.StringIO(text))) == [["a", "b"], ["'=1", "2"], ["'@x", ""]]


def test_register_export_neutralises_formulas(tmp_path):
    with Register.open(tmp_path / "reg.sqlite") as reg:
        reg.allocate("BH-1042", "A", "f" * 16, 10, lot="=HYPERLINK(\"http://x.invalid\")", due=None,
                     issued_by="@SUM(A1)")
        text = orders_csv(reg.list())
        out = tmp_path / "orders.csv"
        reg.export_csv(out)
    rows = list(csv.DictReader(io.StringIO(text)))
    assert rows[0]["lot"] == "'=HYPERLINK(\"http://x.invalid\")" and rows[0]["issued_by"] == "'@SUM(A1)"
    assert rows[0]["qty"] == "10"
    assert out.read_text() == text


def test_every_csv_writer_goes_through_the_safe_writer():
    """csv.writer / csv.DictWriter appear only in specgen/csvsafe.py (a new CSV output must use it)."""
    from pathlib import Path

    root = Path(__file__).resolve().parent.parent / "specgen"
    users = sorted(str(p.relative_to(root)) for p in root.rglob("*.py")
                   if "csv.writer(" in p.read_text() or "csv.DictWriter(" in p.read_text())
    assert users == ["csvsafe.py"]
