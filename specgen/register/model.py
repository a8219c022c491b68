"""The register's records, states and the small parsing rules every back end shares.

Nothing here touches a database: typed, frozen records returned by :class:`~specgen.register.Register`,
the state machine of work orders and quotes, and the checks on what a caller passes in.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import functools
import os
from typing import Any

from specgen.errors import SpecError
from specgen.records import record

DEFAULT_NUMBER_FORMAT = "WO-{year}-{seq:05d}"
DEFAULT_QUOTE_FORMAT = "Q-{year}-{seq:05d}"

#: Work-order states, in the order a lot goes through them.
STATES = ("issued", "in-work", "complete", "void")
#: The ordinary moves (from -> allowed to). Anything else is a correction: it needs a reason and
#: is recorded as one (see :meth:`Register.set_state`).
TRANSITIONS: dict[str, frozenset[str]] = {
    "issued": frozenset({"in-work", "void"}),
    "in-work": frozenset({"complete", "void"}),
    "complete": frozenset(),
    "void": frozenset(),
}
#: Quote states: sent to the customer, then won, lost or withdrawn.
QUOTE_STATES = ("issued", "accepted", "declined", "void")
QUOTE_TRANSITIONS: dict[str, frozenset[str]] = {
    "issued": frozenset({"accepted", "declined", "void"}),
    "accepted": frozenset(),
    "declined": frozenset(),
    "void": frozenset(),
}
#: Names people type for a state, beyond the state names themselves (older registers said ``floor``).
STATE_ALIASES = {"in work": "in-work", "in_work": "in-work", "inwork": "in-work", "floor": "in-work",
                 "completed": "complete", "done": "complete", "voided": "void"}

#: An issued number with no files whose issuing process is known to be gone is voided at once by the
#: next issue; one whose process cannot be checked (another machine) only after this many seconds.
#: A render takes seconds, and a large batch takes its numbers first and renders for minutes, so the
#: bound for a process that cannot be checked is long.
STALE_UNCHECKABLE_S = 12 * 3600.0


@record(slots=True)
class Order:
    """One work order as the register holds it. ``files`` keeps the order they were attached in."""

    number: str
    part: str
    revision: str
    fingerprint: str
    qty: int
    lot: str | None
    due: str | None           # ISO date, YYYY-MM-DD
    issued_at: str            # ISO 8601, UTC, seconds
    issued_by: str
    state: str
    void_reason: str | None
    files: tuple[str, ...] = ()
    quote: str | None = None  # the quote this order fulfils, if cited

    def to_dict(self) -> dict[str, Any]:
        data = dataclasses.asdict(self)
        data["files"] = list(self.files)
        return data


@record(slots=True)
class QuoteEntry:
    """One issued quote as the register holds it."""

    number: str
    part: str
    revision: str
    fingerprint: str
    customer: str | None
    valid_until: str | None   # ISO date
    issued_at: str
    issued_by: str
    state: str
    void_reason: str | None
    files: tuple[str, ...] = ()

    def to_dict(self) -> dict[str, Any]:
        data = dataclasses.asdict(self)
        data["files"] = list(self.files)
        return data


@record(slots=True)
class Event:
    """One state change (the first is always ``None -> issued``). ``kind`` is ``change`` for an
    ordinary move and ``correction`` for one outside the ordinary moves (always with ``why``)."""

    number: str
    at: str
    from_state: str | None
    to_state: str
    why: str | None
    by: str | None = None
    kind: str = "change"

    def to_dict(self) -> dict[str, Any]:
        return {"at": self.at, "from": self.from_state, "to": self.to_state, "why": self.why,
                "by": self.by, "kind": self.kind}


@record(slots=True)
class StaleNumber:
    """An ``issued`` number with no files: what a killed or crashed issue leaves behind."""

    record: str               # "order" or "quote"
    number: str
    part: str
    issued_at: str
    issued_by: str
    age_s: float
    process: str              # "gone", "running" or "unknown" (issued on another machine)
    voidable: bool            # gone, or older than STALE_UNCHECKABLE_S

    def to_dict(self) -> dict[str, Any]:
        return dataclasses.asdict(self)


CSV_COLUMNS = ("number", "part", "revision", "fingerprint", "qty", "lot", "due", "issued_at",
               "issued_by", "state", "void_reason", "files", "quote")


# --- who and where ----------------------------------------------------------------------------

def login_name() -> str:
    import getpass  # here, not at the top: `specgen --help` loads this module

    try:
        return getpass.getuser()
    except Exception:  # no login name in some containers
        return "unknown"


def _read_first_line(path: str) -> str:
    try:
        with open(path, encoding="ascii", errors="replace") as handle:
            return handle.readline().strip()
    except OSError:
        return ""


@functools.lru_cache(maxsize=1)
def this_host() -> str:
    """Where a process id means something: the host name, this boot and this PID namespace.

    Two containers (or two boots) can share a host name and reuse process ids; a PID is only
    checked for liveness when all three match.
    """
    boot = _read_first_line("/proc/sys/kernel/random/boot_id")[:8] or "-"
    try:
        namespace = os.readlink("/proc/self/ns/pid")
    except OSError:
        namespace = "-"
    import socket  # here, not at the top: `specgen --help` loads this module

    return f"{socket.gethostname()}/{boot}/{namespace}"


def process_state(host: str | None, pid: int | None) -> str:
    """``gone``, ``running`` or ``unknown`` for the process that took a number."""
    if not host or pid is None or host != this_host():
        return "unknown"
    try:
        os.kill(int(pid), 0)
    except ProcessLookupError:
        return "gone"
    except PermissionError:  # alive, owned by someone else
        return "running"
    except (OSError, OverflowError, ValueError):
        return "unknown"
    return "running"


# --- checks on input --------------------------------------------------------------------------

def now_utc() -> _dt.datetime:
    return _dt.datetime.now(_dt.timezone.utc)


def iso(moment: _dt.datetime) -> str:
    if moment.tzinfo is None:
        raise ValueError("issue time must be timezone-aware")
    return moment.astimezone(_dt.timezone.utc).isoformat(timespec="seconds")


def one_line(text: object, limit: int = 300) -> str:
    line = " ".join(str(text).split())
    return line if len(line) <= limit else line[:limit - 1] + "…"


def check_format(fmt: str) -> None:
    """A number format must be a str.format template with ``{seq}`` (and optionally ``{year}``)."""
    try:
        first = fmt.format(year=2000, seq=1)
        second = fmt.format(year=2000, seq=2)
    except KeyError as err:
        raise SpecError(f"number format {fmt!r}: unknown field {{{err.args[0]}}}; "
                        "use {year} and {seq}") from None
    except (ValueError, IndexError) as err:
        raise SpecError(f"number format {fmt!r}: {err}") from None
    if first == second:
        raise SpecError(f"number format {fmt!r} has no {{seq}} field, so every number would be the same")


def parse_date(value: object, what: str) -> str | None:
    if value is None or value == "":
        return None
    if isinstance(value, _dt.datetime):
        return value.date().isoformat()
    if isinstance(value, _dt.date):
        return value.isoformat()
    try:
        return _dt.date.fromisoformat(str(value)).isoformat()
    except ValueError:
        raise SpecError(f"{what}: expected a date like 2026-06-30, got {value!r}") from None


def parse_since(since: object) -> str | None:
    """``since`` as a comparable ISO string: a date (start of that day, UTC) or a full timestamp."""
    if since is None or since == "":
        return None
    if isinstance(since, _dt.datetime):
        return iso(since if since.tzinfo else since.replace(tzinfo=_dt.timezone.utc))
    if isinstance(since, _dt.date):
        return since.isoformat()
    text = str(since)
    try:
        return _dt.date.fromisoformat(text).isoformat()
    except ValueError:
        pass
    try:
        moment = _dt.datetime.fromisoformat(text)
    except ValueError:
        raise SpecError(f"since: expected a date like 2026-05-01, got {since!r}") from None
    return iso(moment if moment.tzinfo else moment.replace(tzinfo=_dt.timezone.utc))


def check_state(state: str, states: tuple[str, ...] = STATES) -> str:
    """The state name as stored; accepts the aliases people type (``in work``, ``floor``)."""
    name = " ".join(str(state).strip().lower().split())
    name = STATE_ALIASES.get(name, name)
    if name not in states:
        raise SpecError(f"unknown state {state!r}; expected one of {', '.join(states)}")
    return name


def check_text(name: str, value: object) -> str:
    if not isinstance(value, str) or not value.strip():
        raise SpecError(f"{name} must be a non-empty text, got {value!r}")
    return value
