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
from .errors import DesignFailed, SpecError

if TYPE_CHECKING:
    from .catalog.models import Catalog
    from .design.result import Design
    from .design.spec import Spec

#: Longest ``--by`` a release records (a name, initials, a role).
MAX_BY_CHARS = 200
#: Longest ``--note`` (one line; the spec's history notes are read with this limit too).
MAX_NOTE_CHARS = 2000


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
                          problems=tuple(check.problems))


# ----------------------------------------------------------------------------------------------
# Release


def check_release_text(value: Any, option: str, limit: int) -> str:
    """``--by`` or ``--note``: one line of text, not empty, no control characters, at most ``limit``."""
    text = "" if value is None else str(value).strip()
    if not text:
        what = "who releases it" if option == "--by" else "a note saying what changed"
        raise SpecError(f"a release needs {what}; it is empty", path=option)
    if len(text) > limit:
        raise SpecError(f"is {len(text):,} characters long; at most {limit:,}", path=option)
    if any(ord(c) < 32 or 0x7F <= ord(c) <= 0x9F or c in "\u2028\u2029" for c in text):
        raise SpecError("control characters and line breaks are not allowed", path=option)
    return text


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
class ReleaseResult:
    file: str
    part: str
    revision: str
    fingerprint: str
    date: str
    commit: str | None = None
    tag: str | None = None

    def message(self) -> str:
        out = f"released {self.part} rev {self.revision}, fingerprint {revision.short(self.fingerprint)}"
        if self.commit:
            out += f"; committed {self.commit[:12]} and tagged {self.tag}"
        return out

    def to_dict(self) -> dict:
        return asdict(self)


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


def release_spec(path: str | os.PathLike, *, by: str, note: str, cat: Catalog,
                 date: Any = None, commit: bool = False) -> ReleaseResult:
    """Release a spec file: check the inputs, design it, refuse on a failed check, write, maybe commit.

    - ``by``, ``note`` and ``date`` are checked first (one line each, no control characters, within
      ``MAX_BY_CHARS`` / ``MAX_NOTE_CHARS``): a bad one is refused before the file is read;
    - every design check must pass (``DesignFailed`` otherwise; the file is not touched);
    - the letter comes from ``revision.release_revision`` (a draft keeps its letter, an edited
      released spec gets the next one);
    - the history entry carries the fingerprint and the per-component ``parts``;
    - ``commit``: commit just this file and tag it ``<part>-rev-<letter>`` (never pushes);
      refused before writing when the file is not in a git work tree or the tag exists.
    """
    from .design.spec import load_spec

    by = check_release_text(by, "--by", MAX_BY_CHARS)
    note = check_release_text(note, "--note", MAX_NOTE_CHARS)
    day = check_release_date(date)
    p = Path(path)
    spec = load_spec(p)
    data = spec.data
    # the letter first: an obsolete spec or a letter out of sequence is refused as such
    letter = revision.release_revision(data.get("status"), data.get("revision"), data.get("history"))
    loaded = load_design(spec, cat, str(p))
    d = loaded.design
    if d.failed:
        raise DesignFailed(f"{p}: {spec.part} is not released: {len(d.failed)} design check(s) fail", d.failed)
    tag = revision.release_tag(spec.part, letter)
    if commit:
        _git_precheck(p, tag)
    parts = revision.component_fingerprints(data, loaded.catalog_entries)
    revision.release_file(p, by=by, note=note, fingerprint=d.fingerprint, date=day,
                          new_revision=letter, parts=parts)
    # read it back: what is on disk now must verify (catches a concurrent edit of the file)
    after = load_design(load_spec(p), cat, str(p))
    if not after.release.ok:
        raise SpecError("changed while it was being released; check it and release again: "
                        + "; ".join(after.release.problems), file=str(p))
    sha = None
    if commit:
        sha = revision.git_commit_and_tag(p, f"{spec.part} rev {letter}: {note}", tag)
    return ReleaseResult(file=str(p), part=spec.part, revision=letter, fingerprint=d.fingerprint,
                         date=day.isoformat(), commit=sha, tag=tag if sha else None)


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
    "looks_like_spec", "spec_files", "VerifyResult", "verify_file",
]
