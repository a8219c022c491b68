"""The test station's records: what the register keeps for a lot and what a screen shows of it.

Every entry is appended, never changed (the register's ``station_entries`` table refuses UPDATE and
DELETE). A correction is a new entry whose ``replaces`` names the entry it puts right, with a reason;
the current state of a lot is what no later entry replaces.
"""

from __future__ import annotations

import dataclasses
from typing import Any

#: What a failing piece may become (a reason is always required).
DISPOSITIONS = ("retest", "rework", "scrap")
#: Who may do what at the station. The engineer may do everything.
ROLES = ("winder", "tester", "engineer")
PERMISSIONS: dict[str, frozenset[str]] = {
    "signoff": frozenset({"winder", "engineer"}),
    "material": frozenset({"winder", "engineer"}),
    "reading": frozenset({"tester", "engineer"}),
    "disposition": frozenset({"tester", "engineer"}),
}
ENTRY_KINDS = ("signoff", "reading", "disposition", "material")
#: Material lines a picker records lots for (the pull list's kinds that come in lots).
LOT_KINDS = ("core", "laminations", "wire", "tape", "sleeving", "varnish", "bobbin")


@dataclasses.dataclass(frozen=True, slots=True)
class Entry:
    """One row of ``station_entries``, as stored. Fields a kind does not use are None."""

    entry_id: int
    number: str
    kind: str
    serial: str | None
    item: str
    label: str | None
    value_si: float | None
    temp_c: float | None
    judged_si: float | None
    nominal_si: float | None
    low_si: float | None
    high_si: float | None
    unit: str | None
    verdict: str | None
    action: str | None
    lot: str | None
    reason: str | None
    by: str
    at: str
    replaces: int | None
    source: str

    def to_dict(self) -> dict[str, Any]:
        return dataclasses.asdict(self)


COLUMNS = ("entry_id", "number", "kind", "serial", "item", "label", "value_si", "temp_c", "judged_si", "nominal_si",
           "low_si", "high_si", "unit", "verdict", "action", "lot", "reason", "by_whom", "at", "replaces", "source")


@dataclasses.dataclass(frozen=True, slots=True)
class Column:
    """One test a station runs on every piece, with the Design's limits (SI) and how it is typed in.

    ``kind``: ``value`` (a number compared with ``low``/``high``), ``dcr`` (a resistance read at the
    winding temperature and referred to 20 degC before the comparison) or ``check`` (pass or fail,
    typed as ok/fail: polarity, hipot)."""

    key: str                 # stable: "dcr/DCR/P", "hipot/P - S1", ...
    label: str               # "DCR P"
    kind: str                # value | dcr | check
    unit: str                # SI unit of nominal/low/high
    nominal: float | None
    low: float | None
    high: float | None
    condition: str
    shown_unit: str          # the unit the station types in ("mΩ")
    shown_factor: float      # SI value x factor = shown value


@dataclasses.dataclass(frozen=True, slots=True)
class Verdict:
    """One reading judged against its column: the value as read, the value compared (DCR at 20 degC)."""

    column: Column
    value_si: float
    temp_c: float | None
    judged_si: float
    passed: bool

    @property
    def verdict(self) -> str:
        return "pass" if self.passed else "fail"


@dataclasses.dataclass(frozen=True, slots=True)
class PieceState:
    """Where one serial of a lot stands: its current readings, its last disposition, what it needs."""

    serial: str
    readings: dict[str, Entry]          # test key -> current reading
    disposition: Entry | None           # the latest disposition, if any
    status: str                         # untested | partial | pass | fail | needs-disposition | retest | rework | scrap

    @property
    def failed_keys(self) -> list[str]:
        return [k for k, e in self.readings.items() if e.verdict == "fail"]
