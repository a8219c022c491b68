"""The printed test record of a lot: one row per piece for the whole lot, a column for every test.

The columns are the station's (``specgen.station.plan.station_columns``): the web app and the paper
record list the same tests in the same order with the same limits. Around them the record adds the piece's
serial, the winding temperature at which the DC resistances were read, the verdict and the tester's
initials. The record is printed on landscape pages (``@page record`` in the template): the columns are
laid out in as few groups as fit across a page at a width a pen can write in, and the lot's serials are
shared evenly among as few pages per group as hold them, so no page of the record is left nearly empty.

The DCR correction to 20 degC is printed as a worked formula with a table of its factor, from the
station's one rule (``station.plan.to_20c_factor``, copper's alpha20 = 0.00393 /K of IEC 60028 / IEC 60228).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .. import present
from ..station.model import Column
from ..station.plan import limits_bare, station_columns, to_20c_factor

#: The record page's margins in mm: top (the running header sits in it), bottom (the footer); the side
#: margins are the work order's.
RECORD_TOP_MM = 39.0
RECORD_BOTTOM_MM = 15.0
#: Room on each record page above the first row: the page's title line and the column heads (name, unit,
#: limits on three lines at 9 pt), in mm.
RECORD_HEAD_MM = 38.0
#: A row a pen writes in (common practice for ruled test forms: 7 to 8 mm); a page with fewer rows stretches
#: them up to ``ROW_MAX_MM`` to fill its body.
ROW_MM = 8.0
ROW_MAX_MM = 10.0
#: Column widths in mm, wide enough to write a reading such as "123.4 mΩ" by hand (common practice).
VALUE_MM = 21.0
CHECK_MM = 15.0
SERIAL_MM = 12.0
TEMP_MM = 16.0
VERDICT_MM = 16.0
INITIALS_MM = 17.0
#: The temperatures of the printed correction table (degC): a test bench's range.
FACTOR_TEMPS_C = (16, 18, 20, 22, 24, 26, 28, 30, 32)


@dataclass(frozen=True, slots=True)
class RecordColumn:
    key: str           # the station column's key; "sn", "temp", "verdict", "initials" for the record's own
    label: str
    unit: str          # the unit a reading is written in ("mΩ", ":1", "ok / fail", "°C")
    limits: str        # "19.4–23.5", "≥ 100", "ok", "" for the record's own
    width_mm: float


@dataclass(frozen=True, slots=True)
class RecordPage:
    columns: tuple[RecordColumn, ...]
    serials: tuple[str, ...]
    group: int         # 1-based column group
    groups: int
    page: int          # 1-based page of the record
    pages: int


@dataclass(frozen=True, slots=True)
class TestRecord:
    pages: tuple[RecordPage, ...]
    rows_per_page: int
    row_mm: float                               # the rows stretched to fill the page's body (at most 10 mm)
    factors: tuple[tuple[str, str], ...]        # ("24 °C", "0.9845"): R20 = Rt x factor
    worked: str                                 # the correction worked through on the first winding
    alpha: str


def _test_column(c: Column) -> RecordColumn:
    label = c.label + (" at 20 °C" if c.kind == "dcr" else "")
    unit = "ok / fail" if c.kind == "check" else (c.shown_unit or ":1")
    width = CHECK_MM if c.kind == "check" else VALUE_MM
    return RecordColumn(key=c.key, label=label, unit=unit, limits="" if c.kind == "check" else limits_bare(c),
                        width_mm=width)


def _groups(tests: list[RecordColumn], first: list[RecordColumn], last: list[RecordColumn],
            width_mm: float) -> list[list[RecordColumn]]:
    """The tests shared among as few column groups as fit the page width, about evenly (in width); each group
    starts with the serial, the first group takes ``first`` after it, the last ``last`` at its end."""
    sn = RecordColumn("sn", "S/N", "", "", SERIAL_MM)
    for n in range(1, len(tests) + 1):
        per = math.ceil(len(tests) / n)
        chunks = [tests[i:i + per] for i in range(0, len(tests), per)]
        if len(chunks) < n:
            continue
        groups = [[sn] + (first if i == 0 else []) + chunk + (last if i == len(chunks) - 1 else [])
                  for i, chunk in enumerate(chunks)]
        if all(sum(c.width_mm for c in g) <= width_mm for g in groups):
            return groups
    return [[sn] + first + [t] + last for t in tests]        # one test a page: wider than any page holds


def _body_mm(height_mm: float) -> float:
    """The height a landscape page of this height leaves for the rows under the heads."""
    return height_mm - RECORD_TOP_MM - RECORD_BOTTOM_MM - RECORD_HEAD_MM


def rows_per_page(height_mm: float) -> int:
    """How many rows of ``ROW_MM`` fit a landscape page of this height under the heads."""
    return max(1, int(_body_mm(height_mm) // ROW_MM))


def build_record(design, qty: int, settings, side_margin_mm: float) -> TestRecord:
    """The lot's record: every serial 1..qty on every column group, shared evenly among its pages. The pages
    are the shop's paper turned to landscape (``settings``: DocumentSettings)."""
    width_mm, height_mm = settings.paper_height_m * 1e3, settings.paper_width_m * 1e3
    columns = station_columns(design)
    tests = [_test_column(c) for c in columns]
    dcr = any(c.kind == "dcr" for c in columns)
    first = [RecordColumn("temp", "winding temp.", "°C", "for the DCR", TEMP_MM)] if dcr else []
    last = [RecordColumn("verdict", "pass / fail", "", "", VERDICT_MM),
            RecordColumn("initials", "initials", "", "", INITIALS_MM)]
    groups = _groups(tests, first, last, width_mm - 2 * side_margin_mm)
    rows = rows_per_page(height_mm)
    chunks = math.ceil(qty / rows)
    serials = [str(i) for i in range(1, qty + 1)]
    # evenly: 50 pieces at up to 15 a page -> 12, 13, 12, 13 (the pages differ by one row at most)
    bounds = [qty * k // chunks for k in range(chunks + 1)]
    pages = [(g, tuple(cols), tuple(serials[bounds[k]:bounds[k + 1]]))
             for g, cols in enumerate(groups, start=1) for k in range(chunks)]
    total = len(pages)
    record_pages = tuple(RecordPage(columns=cols, serials=sns, group=g, groups=len(groups), page=i, pages=total)
                         for i, (g, cols, sns) in enumerate(pages, start=1))
    alpha = f"{design.tests.alpha_per_k:g}"
    factors = tuple((f"{t} °C", f"{to_20c_factor(float(t)):.4f}") for t in FACTOR_TEMPS_C)
    most = max(len(p.serials) for p in record_pages)
    row_mm = math.floor(10 * min(ROW_MAX_MM, max(ROW_MM, _body_mm(height_mm) / most))) / 10
    return TestRecord(pages=record_pages, rows_per_page=rows, row_mm=row_mm, factors=factors, worked=_worked(design, alpha),
                      alpha=alpha)


def _worked(design, alpha: str) -> str:
    """The correction worked through on the first winding's nominal, as read on a 24 degC bench."""
    if not design.tests.dcr:
        return ""
    lim = design.tests.dcr[0]
    t = 24.0
    r20 = lim.nominal
    rt = r20 / to_20c_factor(t)
    shown = present.si_set([rt, r20], "Ω")
    return (f"Example, {lim.item}: read {shown[0]} at a winding temperature of {t:g} °C; "
            f"R20 = {shown[0]} / (1 + {alpha} × ({t:g} − 20)) = {shown[1]}, compared with the limits at 20 °C.")
