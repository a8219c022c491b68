"""What a release records beside its fingerprint: the design warnings accepted by name, and when the
new revision takes effect over the one it supersedes.

Read from the spec's ``history:`` entries (``specgen.design.spec``), written by ``specgen release``
(``specgen.lifecycle``), shown on the work order and the change summary. Plain records, no rules: the
rule deciding which warnings stand accepted is ``specgen.lifecycle.warning_notes``.
"""

from __future__ import annotations

from ..records import record

#: The effectivity words ``release --effective`` takes (a lot is ``lot <reference>``).
EFFECTIVITY_WORDS = ("next-order", "now", "lot")


@record(slots=True)
class AcceptedWarning:
    """One design warning accepted at a release: its check code, who accepted it, on which day, why."""
    code: str
    by: str
    date: str            # YYYY-MM-DD
    reason: str


@record(slots=True)
class WarningNote:
    """A design warning as a document shows it: the check's message and, if it was accepted at the
    release of the revision shown, the acceptance (None: not accepted)."""
    code: str
    message: str
    accepted: AcceptedWarning | None

    @property
    def accepted_line(self) -> str:
        """'accepted by NAME on DATE: REASON', or '' when nobody accepted it."""
        a = self.accepted
        return f"accepted by {a.by} on {a.date}: {a.reason}" if a is not None else ""
