"""The life of a released spec: the one release gate, release, and verify.

- ``release_gate(spec, design, cat)``: the one rule deciding whether a firm document (a work order
  for production, a firm quote) may be made from a spec. Work orders, quotes and ``verify`` all
  ask it, so they can never disagree about what counts as released.
- ``release_spec``: checks its inputs (``--by``, ``--note``, ``--date``) before anything is read or
  written, refuses a spec whose design fails a check, picks the letter, writes the release with its
  fingerprint (and the per-component ``parts`` so ``verify`` can say what changed), optionally
  commits and tags.
- ``verify_file`` / ``spec_files``: recompute a released spec's fingerprint and compare it with its
  history entry (what ``specgen verify`` runs in a spec repository's CI).

A release is its recorded fingerprint: a spec marked released whose history entry records no
fingerprint (blanked, deleted, or released by hand before specgen) is not a release. The gate
refuses it like a spec edited after release; ``specgen release`` gives it a proper one.
"""

from __future__ import annotations

import datetime as _dt
import os
import re
from collections.abc import Iterable, Mapping
from dataclasses import asdict, dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from . import revision, revision_git
from .design.acceptance import AcceptedWarning, WarningNote
from .errors import DesignFailed, SpecError
from .freetext import MAX_LOT_CHARS, MAX_NOTE_CHARS, check_free_text
from .freetext import MAX_NAME_CHARS as MAX_BY_CHARS

if TYPE_CHECKING:
    from .catalog.models import Catalog
    from .design.result import Design
    from .design.spec import Spec


# ----------------------------------------------------------------------------------------------
# A spec with its design


@dataclass(frozen=True)
class Loaded:
    """One revision of a spec with its design: what ``diff`` compares and ``verify`` checks."""

    name: str                         # the path, or PATH@GITREV
    spec: Spec
    design: Design
    catalog_entries: dict             # what the design read (for fingerprints)
    release: revision.ReleaseCheck
    cat: Catalog | None = None        # the catalogue it was designed with (prices for the cost)

    @property
    def data(self) -> Mapping:
        return self.spec.data


def load_design(spec: Spec, cat: Catalog, name: str | None = None) -> Loaded:
    """Design ``spec`` with ``cat`` and check its release record."""
    from .api import catalog_entries, run_design

    d = run_design(spec, cat)
    entries = catalog_entries(d.catalog_ids, cat)
    return Loaded(name=name or spec.file, spec=spec, design=d, catalog_entries=entries,
                  release=revision.check_release(spec.data, entries), cat=cat)


# ----------------------------------------------------------------------------------------------
# The release gate


@dataclass(frozen=True, slots=True)
class ReleaseVerdict:
    """What the release gate says about one spec and its design."""

    file: str
    part: str
    revision: str
    status: str                       # draft | released | obsolete (or what the file says)
    current: str                      # the fingerprint now
    recorded: str | None              # the fingerprint its history entry recorded, if any
    problems: tuple[str, ...]         # why a spec marked released is not a valid release
    warnings: tuple[WarningNote, ...] = ()   # the design's warnings, each with its acceptance (or None)

    @property
    def unaccepted(self) -> tuple[WarningNote, ...]:
        """The design's warnings nobody accepted at the release of this revision."""
        return tuple(w for w in self.warnings if w.accepted is None)

    @property
    def firm(self) -> bool:
        """Released, and the release record holds: firm documents may be made from it."""
        return self.status == "released" and not self.problems

    @property
    def broken(self) -> bool:
        """Marked released but the record does not hold (edited, catalogue changed, no fingerprint)."""
        return self.status == "released" and bool(self.problems)

    @property
    def reason(self) -> str:
        """One line: why it is not firm ('' when it is)."""
        if self.firm:
            return ""
        if self.status != "released":
            return f"revision {self.revision or '-'} is a {self.status}, not yet released"
        return "; ".join(self.problems)

    def refusal(self, doing: str) -> SpecError:
        """The one-line error a document raises for a broken release (``doing``: 'before quoting')."""
        return SpecError(f"released revision {self.revision} does not match its release record: {self.reason}; "
                         f"release it again with `specgen release` {doing}".rstrip(), file=self.file,
                         path="history")


def release_gate(spec: Spec, design: Design, cat: Catalog) -> ReleaseVerdict:
    """The release gate: recompute the fingerprint of ``spec`` and the catalogue entries ``design``
    read, and compare it with the history entry of the spec's revision (``revision.check_release``).

    Drafts and obsolete specs come back with no problems and ``firm`` False: whether a document
    may be made from them is the caller's rule (a marked draft copy, a budgetary quote).
    """
    from .api import catalog_entries

    check = revision.check_release(spec.data, catalog_entries(design.catalog_ids, cat))
    return ReleaseVerdict(file=str(spec.file), part=design.part, revision=design.revision or "",
                          status=check.status, current=check.current, recorded=check.recorded,
                          problems=tuple(check.problems), warnings=warning_notes(design))


def _entry_field(entry: Any, key: str, default: Any) -> Any:
    return entry.get(key, default) if isinstance(entry, Mapping) else getattr(entry, key, default)


def release_entry(design: Design) -> Any:
    """The history entry of the release of the design's own revision (the last such), or None."""
    found = None
    for entry in design.history or ():
        if str(_entry_field(entry, "revision", "")) == (design.revision or "") and design.revision:
            found = entry
    return found


def warning_notes(design: Design) -> tuple[WarningNote, ...]:
    """The design's warnings, each with the acceptance recorded at the release of its revision.

    The one rule for "accepted": a warning is accepted when the history entry of the design's own
    revision names its check code under ``accepted:``; a warning of a draft, of a revision released
    without accepting it, or of a check that came up after the release, is not. Documents show
    exactly this, so they never claim an acceptance nobody gave.
    """
    entry = release_entry(design)
    accepted: dict[str, AcceptedWarning] = {}
    for a in (_entry_field(entry, "accepted", ()) if entry is not None else ()) or ():
        if isinstance(a, AcceptedWarning):
            accepted.setdefault(a.code, a)
    return tuple(WarningNote(code=c.code, message=c.message, accepted=accepted.get(c.code))
                 for c in design.warnings)


# ----------------------------------------------------------------------------------------------
# Release


def check_release_text(value: Any, option: str, limit: int) -> str:
    """``--by``, ``--note`` or ``--reason``: one line of text, not empty, no control characters, at most
    ``limit`` (``specgen.freetext``, the one check of every free-text option)."""
    what = {"--by": "who releases it", "--note": "a note saying what changed"}.get(option, "a reason")
    return str(check_free_text(value, option, limit, what=what))


def check_release_date(value: Any) -> _dt.date:
    """``--date``: a real date as YYYY-MM-DD (today when None)."""
    if value is None or isinstance(value, _dt.date):
        return value if isinstance(value, _dt.date) else _dt.date.today()
    text = str(value).strip()
    try:
        if not re.fullmatch(r"\d{4}-\d{2}-\d{2}", text):
            raise ValueError
        return _dt.date.fromisoformat(text)
    except ValueError:
        raise SpecError(f"release date {text!r} is not a date like 2025-03-14", path="--date") from None


@dataclass(frozen=True)
class Effectivity:
    """When a new revision takes effect over the one it supersedes (``release --effective``)."""

    word: str                         # next-order | now | lot
    lot: str | None = None            # with ``lot``: the first lot built to the new revision

    @property
    def text(self) -> str:
        """As recorded in the history and printed: ``next-order``, ``now`` or ``lot <reference>``."""
        return f"lot {self.lot}" if self.word == "lot" else self.word

    @property
    def phrase(self) -> str:
        """For a reader: 'from the next work order', 'at once (open work orders included)', 'from lot L7'."""
        return {"next-order": "from the next work order", "now": "at once, open work orders included"
                }.get(self.word, f"from lot {self.lot}")


def check_effectivity(value: Any) -> Effectivity | None:
    """``--effective``: ``next-order``, ``now`` or ``lot <reference>`` (also ``lot=R``, ``lot:R``); None if not given."""
    text = check_free_text(value, "--effective", MAX_LOT_CHARS + 8, required=False)
    if text is None:
        return None
    if text.lower() in ("next-order", "now"):
        return Effectivity(text.lower())
    m = re.fullmatch(r"lot(?:\s*[=:]\s*|\s+)(.*)", text, flags=re.IGNORECASE)
    if m is not None or text.lower() == "lot":
        lot = check_free_text(m.group(1) if m else "", "--effective", MAX_LOT_CHARS,
                              what="the lot reference after 'lot'")
        return Effectivity("lot", lot)
    raise SpecError(f"expected next-order, now or 'lot <reference>', got {text!r}", path="--effective")


@dataclass(frozen=True)
class Acceptance:
    """What ``release`` was told about the design's warnings: codes accepted by name, or all, and why."""

    codes: tuple[tuple[str, str | None], ...] = ()   # (check code, its own reason or None)
    accept_all: bool = False
    reason: str | None = None                         # ``--reason``: for --accept-all and codes without one


def check_acceptance(accept: Iterable[str] | None, accept_all: bool, reason: Any) -> Acceptance:
    """``--accept CODE`` (repeated; ``CODE=REASON`` gives that warning its own reason), ``--accept-all``,
    ``--reason TEXT``: checked as text; every accepted warning must end up with a reason."""
    why = check_free_text(reason, "--reason", MAX_NOTE_CHARS, required=False)
    codes: list[tuple[str, str | None]] = []
    for raw in accept or ():
        text = check_free_text(raw, "--accept", MAX_NOTE_CHARS + 60, what="a warning's check code")
        code, sep, own = str(text).partition("=")
        code = code.strip()
        if not re.fullmatch(r"[a-z][a-z0-9-]{0,59}", code):
            raise SpecError(f"{code!r} is not a check code (like skin-depth or window-fill)", path="--accept")
        own_reason = check_free_text(own, "--accept", MAX_NOTE_CHARS, what=f"a reason after '{code}='") if sep else None
        if own_reason is None and why is None:
            raise SpecError(f"accepting {code} needs a reason: --accept {code}=REASON or --reason TEXT", path="--accept")
        codes.append((code, own_reason))
    if accept_all and why is None:
        raise SpecError("--accept-all needs a reason (--reason TEXT) saying why the warnings are acceptable",
                        path="--accept-all")
    if why is not None and not codes and not accept_all:
        raise SpecError("--reason goes with --accept CODE or --accept-all", path="--reason")
    return Acceptance(codes=tuple(codes), accept_all=accept_all, reason=why)


class WarningsNotAccepted(SpecError):
    """A release refused because design warnings were not accepted by name; ``warnings`` lists them."""

    def __init__(self, message: str, warnings: tuple[WarningNote, ...], file: str | None = None):
        self.warnings = warnings
        super().__init__(message, file=file, path="--accept")


def accept_warnings(design: Design, acceptance: Acceptance, *, by: str, day: _dt.date,
                    file: str) -> tuple[AcceptedWarning, ...]:
    """The acceptances a release records: one per check code among the design's warnings.

    Refused (SpecError): a code that is not among the warnings (a typo must not accept nothing
    silently); any warning left unaccepted (``WarningsNotAccepted``, listing them)."""
    codes = list(dict.fromkeys(c.code for c in design.warnings))
    given = dict(acceptance.codes)
    unknown = [c for c in given if c not in codes]
    if unknown:
        have = ", ".join(codes) if codes else "none"
        raise SpecError(f"the design has no warning {unknown[0]} to accept (its warnings: {have})",
                        file=file, path="--accept")
    missing = [c for c in codes if c not in given and not acceptance.accept_all]
    if missing:
        notes = tuple(WarningNote(code=c.code, message=c.message, accepted=None)
                      for c in design.warnings if c.code in missing)
        raise WarningsNotAccepted(
            f"{len(notes)} design warning(s) not accepted: {', '.join(missing)}; accept each by name with "
            "--accept CODE --reason TEXT (or --accept CODE=REASON), or all with --accept-all --reason TEXT",
            notes, file=file)
    return tuple(AcceptedWarning(code=c, by=by, date=day.isoformat(),
                                 reason=str(given.get(c) or acceptance.reason)) for c in codes)


@dataclass(frozen=True)
class Supersession:
    """What a release supersedes: the previous released revision, its work orders still open in the
    register at the release, and the effectivity the engineer gave."""

    revision: str                     # the revision superseded
    open_orders: tuple[str, ...]      # its work orders issued or in work, from the register
    effective: Effectivity
    register: str = ""                # the register asked (as shown), '' when there is none


def open_work_orders(spec_path: str | os.PathLike, part: str, revision_letter: str, cat: Catalog,
                     register_path: str | None = None) -> tuple[tuple[str, ...], str]:
    """(numbers, register shown): the work orders of ``part`` ``revision_letter`` still issued or in
    work, from the shop's one register (found as every command finds it). Read-only: a register
    that does not exist yet has no open orders and is not created."""
    from .register import ENV_VAR, Register, locate_register, shop_root

    if not (register_path or os.environ.get(ENV_VAR, "").strip() or cat.shop.register_path) \
            and shop_root(spec_path, cat.root) is None:
        return (), ""       # no register anywhere above this spec: no work order was issued from it
    where = locate_register(spec_path, register_path, shop_setting=cat.shop.register_path, catalog_dir=cat.root)
    if where.kind == "sqlite" and (not Path(where.target).is_file() or Path(where.target).stat().st_size == 0):
        return (), where.shown      # named but never started: nothing was issued from it
    with Register.open(where.target, read_only=True) as reg:
        orders = reg.list(part=part, revision=revision_letter)
    return tuple(o.number for o in orders if o.state in ("issued", "in-work")), where.shown


def supersession(spec_path: Path, spec: Spec, letter: str, effective: Effectivity | None, cat: Catalog,
                 register_path: str | None) -> Supersession | None:
    """The revision this release supersedes and its open work orders; refuses (SpecError) when work
    orders are open and the engineer has not said when the new revision takes effect."""
    done = [r for r in revision.history_revisions(spec.data.get("history"))
            if revision.revision_index(r) < revision.revision_index(letter)]
    if not done:
        if effective is not None:
            raise SpecError(f"revision {letter} supersedes no earlier release; --effective says when a new "
                            "revision takes over from the last one", file=str(spec_path), path="--effective")
        return None
    previous = max(done, key=revision.revision_index)
    numbers, shown = open_work_orders(spec_path, spec.part, previous, cat, register_path)
    if numbers and effective is None:
        listed = ", ".join(numbers[:8]) + (f" and {len(numbers) - 8} more" if len(numbers) > 8 else "")
        raise SpecError(f"revision {previous} has {len(numbers)} open work order(s) ({listed}); say when revision "
                        f"{letter} takes effect: --effective next-order | now | lot <lot>", file=str(spec_path),
                        path="--effective")
    return Supersession(revision=previous, open_orders=numbers, effective=effective or Effectivity("next-order"),
                        register=shown)


@dataclass(frozen=True)
class ReleaseResult:
    file: str
    part: str
    revision: str
    fingerprint: str
    date: str
    commit: str | None = None
    tag: str | None = None
    accepted: tuple[AcceptedWarning, ...] = ()
    supersedes: Supersession | None = None

    def message(self) -> str:
        out = f"released {self.part} rev {self.revision}, fingerprint {revision.short(self.fingerprint)}"
        if self.commit:
            out += f"; committed {self.commit[:12]} and tagged {self.tag}"
        for a in self.accepted:
            out += f"\n  warning {a.code} accepted by {a.by} on {a.date}: {a.reason}"
        s = self.supersedes
        if s is not None:
            out += f"\n  supersedes rev {s.revision}, effective {s.effective.phrase}"
            if s.open_orders:
                out += f"; open work orders of rev {s.revision}: {', '.join(s.open_orders)}"
            elif s.register:
                out += f"; no open work orders of rev {s.revision} in the register {s.register}"
            else:
                out += f"; no register found, so no open work orders of rev {s.revision} were looked for"
        return out

    def to_dict(self) -> dict:
        out = asdict(self)
        out["accepted"] = [{"code": a.code, "by": a.by, "date": a.date, "reason": a.reason} for a in self.accepted]
        s = self.supersedes
        out["supersedes"] = None if s is None else {"revision": s.revision, "open_orders": list(s.open_orders),
                                                    "effective": s.effective.text, "register": s.register or None}
        return out


def _git_precheck(path: Path, tag: str) -> None:
    """Refuse ``--commit`` before the file is touched: not in a work tree, or the tag exists."""
    what = str(path)
    # the same checks git_commit_and_tag makes, run before the release edit so that a refused
    # commit never leaves a released but uncommitted file behind
    top, _ = revision_git.repo_path(path, what)
    if revision_git.run_git(["rev-parse", "--verify", "--quiet", f"refs/tags/{tag}"], top, what).returncode == 0:
        raise SpecError(f"git tag '{tag}' already exists; a released revision is tagged once", file=what)
    if revision_git.run_git(["var", "GIT_COMMITTER_IDENT"], top, what).returncode != 0:
        raise SpecError("git does not know who you are: set user.name and user.email", file=what)


# long: the release sequence in order (checks, design, warnings, supersession, write, read back, commit), each
# step one call; splitting it would scatter the order that makes "nothing written before every check" hold
def release_spec(path: str | os.PathLike, *, by: str, note: str, cat: Catalog,
                 date: Any = None, commit: bool = False, accept: Iterable[str] | None = None,
                 accept_all: bool = False, reason: str | None = None, effective: Any = None,
                 register_path: str | None = None) -> ReleaseResult:
    """Release a spec file: check the inputs, design it, refuse on a failed check or an unaccepted
    warning, write, maybe commit.

    - ``by``, ``note``, ``date``, ``accept``/``accept_all``/``reason`` and ``effective`` are checked
      first (one line each, no control characters, within the stated lengths): a bad one is refused
      before the file is read;
    - every design check must pass (``DesignFailed`` otherwise; the file is not touched);
    - every design warning must be accepted by its check code (``accept``: ``CODE`` or
      ``CODE=REASON``; ``accept_all`` with ``reason``): ``WarningsNotAccepted`` lists those left;
    - a revision superseding an earlier release lists that revision's open work orders from the
      register (``register_path``, else found as every command finds it); with any open, the
      effectivity must be given (``effective``: next-order, now or lot <reference>);
    - the letter comes from ``revision.release_revision`` (a draft keeps its letter, an edited
      released spec gets the next one); a date before the last release's is refused;
    - the history entry carries the fingerprint, the per-component ``parts``, the acceptances
      (code, by, date, reason) and the supersession (revision, effectivity, open work orders);
    - ``commit``: commit just this file and tag it ``<part>-rev-<letter>`` (never pushes);
      refused before writing when the file is not in a git work tree or the tag exists.
    """
    from .design.spec import load_spec

    by = check_release_text(by, "--by", MAX_BY_CHARS)
    note = check_release_text(note, "--note", MAX_NOTE_CHARS)
    day = check_release_date(date)
    acceptance = check_acceptance(accept, accept_all, reason)
    effect = check_effectivity(effective)
    p = Path(path)
    spec = load_spec(p)
    data = spec.data
    # the letter first: an obsolete spec or a letter out of sequence is refused as such
    try:
        letter = revision.release_revision(data.get("status"), data.get("revision"), data.get("history"))
    except SpecError as err:
        raise SpecError(err.message, file=str(p), line=err.line, path=err.path) from None
    tag = revision.release_tag(spec.part, letter)
    if commit:
        _git_precheck(p, tag)
    loaded = load_design(spec, cat, str(p))
    d = loaded.design
    if d.failed:
        raise DesignFailed(f"{p}: {spec.part} is not released: {len(d.failed)} design check(s) fail", d.failed)
    accepted = accept_warnings(d, acceptance, by=by, day=day, file=str(p))
    superseded = supersession(p, spec, letter, effect, cat, register_path)
    parts = revision.component_fingerprints(data, loaded.catalog_entries)
    extra: list[tuple[str, Any]] = []
    if accepted:
        extra.append(("accepted", [{"code": a.code, "by": a.by, "date": a.date, "reason": a.reason}
                                   for a in accepted]))
    if superseded is not None:
        extra += [("supersedes", superseded.revision), ("effective", superseded.effective.text)]
        if superseded.register:       # looked for in a register (none found: nothing to record)
            extra.append(("open_orders", list(superseded.open_orders)))
    revision.release_file(p, by=by, note=note, fingerprint=d.fingerprint, date=day,
                          new_revision=letter, parts=parts, extra=extra)
    # read it back: what is on disk now must verify (catches a concurrent edit of the file)
    after = load_design(load_spec(p), cat, str(p))
    if not after.release.ok:
        raise SpecError("changed while it was being released; check it and release again: "
                        + "; ".join(after.release.problems), file=str(p))
    sha = None
    if commit:
        sha = revision.git_commit_and_tag(p, f"{spec.part} rev {letter}: {note}", tag)
    return ReleaseResult(file=str(p), part=spec.part, revision=letter, fingerprint=d.fingerprint,
                         date=day.isoformat(), commit=sha, tag=tag if sha else None, accepted=accepted,
                         supersedes=superseded)


# ----------------------------------------------------------------------------------------------
# Verify

_SPEC_MARKS = tuple(re.compile(rf"^{key}[ \t]*:", re.M) for key in ("part", "kind", "core"))
_NOT_SPEC_MARKS = (re.compile(r"^requirement[ \t]*:", re.M),)


def looks_like_spec(path: Path) -> bool:
    """A YAML file with the top-level keys every spec has (``part:``, ``kind:``, ``core:``) and
    not a search requirement (``requirement:``); read as text, not parsed, so a broken spec is
    still found and reported."""
    if not Path(path).is_file():        # a FIFO or a device named *.yaml would block or never end
        return False
    try:
        with open(path, "rb") as fh:
            head = fh.read(1024 * 1024).decode("utf-8", "replace")
    except OSError:
        return False
    return all(m.search(head) for m in _SPEC_MARKS) and not any(m.search(head) for m in _NOT_SPEC_MARKS)


def spec_files(paths: Iterable[str | os.PathLike]) -> list[Path]:
    """The spec files named by ``paths``: files as given, folders searched recursively.

    In a folder, ``*.yaml``/``*.yml`` files that look like specs (``looks_like_spec``) are taken;
    hidden folders (``.git``, ``.venv``) are skipped. A missing path, or a folder holding no
    spec, is a SpecError.
    """
    out: list[Path] = []
    for raw in paths:
        p = Path(raw)
        if p.is_file():
            out.append(p)
        elif p.is_dir():
            found = []
            for dirpath, dirnames, filenames in os.walk(p):
                dirnames[:] = sorted(d for d in dirnames if not d.startswith("."))
                for fn in sorted(filenames):
                    if fn.endswith((".yaml", ".yml")) and looks_like_spec(Path(dirpath, fn)):
                        found.append(Path(dirpath, fn))
            if not found:
                raise SpecError("holds no spec files (YAML with part: and kind:)", file=str(p))
            out.extend(found)
        else:
            raise SpecError("no such file or folder", file=str(p))
    seen: set[str] = set()
    unique = []
    for p in out:
        key = os.path.realpath(p)
        if key not in seen:
            seen.add(key)
            unique.append(p)
    return unique


@dataclass(frozen=True)
class VerifyResult:
    file: str
    part: str | None
    revision: str | None
    status: str | None
    outcome: str                      # ok | mismatch | fails-check | draft | obsolete | error
    problems: tuple = ()
    current: str | None = None        # fingerprint now
    recorded: str | None = None       # fingerprint in the history entry

    @property
    def failed(self) -> bool:
        return self.outcome in ("mismatch", "fails-check")

    def line(self) -> str:
        who = f"{self.part or '?'} rev {self.revision or '-'}"
        if self.outcome == "ok":
            what = f"ok (fingerprint {revision.short(self.current or '')})"
        elif self.outcome == "mismatch":
            what = "MISMATCH: " + "; ".join(self.problems)
        elif self.outcome == "fails-check":
            what = "FAILS CHECK: " + "; ".join(self.problems)
        elif self.outcome in ("draft", "obsolete"):
            what = f"{self.outcome} (not checked)"
        else:
            return f"ERROR: {'; '.join(self.problems)}"
        return f"{self.file}: {who}: {what}"

    def to_dict(self) -> dict:
        return asdict(self) | {"problems": list(self.problems)}


def verify_file(path: str | os.PathLike, cat: Catalog) -> VerifyResult:
    """Check one spec file's release record through the release gate; never raises SpecError.

    A released spec whose fingerprint matches but whose design now fails a check (the engine
    changed under it: program code is not in the fingerprint) is ``fails-check``.
    """
    from .design.spec import load_spec

    name = str(path)
    try:
        spec = load_spec(path)
        loaded = load_design(spec, cat, name)
    except SpecError as err:
        return VerifyResult(file=name, part=None, revision=None, status=None, outcome="error",
                            problems=(str(err) if err.file else f"{name}: {err}",))
    verdict = release_gate(spec, loaded.design, cat)
    base: dict[str, Any] = dict(file=name, part=spec.part, revision=spec.data.get("revision"),
                                status=verdict.status, current=verdict.current, recorded=verdict.recorded)
    if verdict.status in ("draft", "obsolete"):
        return VerifyResult(outcome=verdict.status, **base)
    if not verdict.firm:
        return VerifyResult(outcome="mismatch", problems=verdict.problems, **base)
    if loaded.design.failed:
        return VerifyResult(outcome="fails-check", problems=tuple(
            f"{c.code}: {c.message}" for c in loaded.design.failed), **base)
    return VerifyResult(outcome="ok", **base)


__all__ = [
    "Loaded", "load_design", "ReleaseVerdict", "release_gate",
    "MAX_BY_CHARS", "MAX_NOTE_CHARS", "check_release_text", "check_release_date", "ReleaseResult", "release_spec",
    "warning_notes", "release_entry", "Effectivity", "check_effectivity", "Acceptance", "check_acceptance",
    "WarningsNotAccepted", "accept_warnings", "Supersession", "open_work_orders", "supersession",
    "looks_like_spec", "spec_files", "VerifyResult", "verify_file",
]
