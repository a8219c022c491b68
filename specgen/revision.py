"""Revision control of specs: revision letters, the release check, release edits (the content fingerprint
lives in ``revision_fingerprint``, git in ``revision_git``; both re-exported here).

Everything here works on raw YAML data (plain mappings and lists as any YAML loader returns
them) and on files; nothing here knows the spec model or the design engine.

Lifecycle and revision letters
------------------------------
A spec is in one of three states: ``draft``, ``released``, ``obsolete``. A spec without a
``status`` key is a draft.

Revision letters follow drawing practice (ASME Y14.35, from memory): A, B, C ... skipping I, O,
Q, S, X and Z (they read as digits or as each other); after Y comes AA, AB ... AY, then BA ...
YY, then AAA. Every position of a multi-letter revision skips the same six letters. That is
bijective numbering in base 20, which ``revision_index`` exposes for ordering (A = 0, Y = 19,
AA = 20, as in ``revision_letters``; -1 means "never released"). At most four letters.

**Drafts carry the letter they will be released as.** A new part starts as ``revision: A``,
``status: draft``; releasing it keeps the letter A and sets ``status: released``. Work on a
released revision A begins with ``start_next_draft_file`` (``revision: B``, ``status: draft``),
so a work order printed from a draft can never be mistaken for the released A: the letter on it
is one nobody has released yet. ``release_revision`` decides the letter a release carries.

Fingerprint
-----------
See ``revision_fingerprint``: SHA-256 over a canonical form of the spec's content and every catalogue
entry its design used; ``history``, ``status`` and ``revision`` are left out, so releasing does not change it.

Editing a spec file
-------------------
Release edits are made on the text, not by re-dumping a parsed tree. A round-trip dumper
(ruamel.yaml, measured with 0.19) rewrites ``[3,4]`` as ``[3, 4]``, ``key:  value`` as
``key: value``, drops ``---``/``...`` markers and imposes one sequence indentation on the whole
file, so it cannot keep an author's file byte-for-byte. Instead the file is parsed for positions
(PyYAML node marks), only the values of the top-level ``revision:`` and ``status:`` lines are
replaced (their comments stay), the new history entry is inserted after the last one in the
indentation the file already uses, and the result is parsed again and compared with what was
intended before anything is written. Every other byte of the file stays as it was, including
line endings (LF or CRLF) and a byte-order mark. A missing ``history:`` is added at the end of
the document (before a ``...`` marker), after one blank line; missing ``revision:``/``status:``
go beside each other, or after the first top-level key.

References
----------
ASME Y14.35, Revision of Engineering Drawings and Associated Documents (letters, from memory).
"""

from __future__ import annotations

import datetime as _dt
import json
import os
import re
from collections.abc import Mapping, Sequence
from typing import Any

from . import revision_letters as _letters
from .errors import SpecError
from .records import record
from .revision_fingerprint import (
    EXCLUDED_KEYS,
    FINGERPRINT_SCHEME,
    canonical,
    changed_components,
    component_fingerprints,
    fingerprint,
    normalise,
    short,
    spec_content,
)
from .revision_git import git_commit_and_tag, read_rev, release_tag, split_ref

# ----------------------------------------------------------------------------------------------
# Revision letters

#: The 20 letters a revision may use: A..Y without I, O, Q, S, X, Z (ASME Y14.35, from memory).
#: The arithmetic lives in ``revision_letters`` (dependency-free, used by the spec loader); this
#: module adds the checks that turn a bad letter into a SpecError.
REVISION_ALPHABET = _letters.ALPHABET

STATUSES = ("draft", "released", "obsolete")


def is_valid_revision(text: Any) -> bool:
    """True for a revision letter in drawing practice: 1 to 4 capitals of ``REVISION_ALPHABET``."""
    return isinstance(text, str) and _letters.is_valid_revision(text)


def _check_revision(letter: Any, what: str = "revision") -> str:
    if not is_valid_revision(letter):
        raise SpecError(f"{what} {letter!r} is not a revision letter: capitals A-Y without "
                        "I, O, Q, S, X, Z (A, B ... Y, AA, AB ...)")
    return letter


def revision_index(letter: str | None) -> int:
    """Position in the sequence, for ordering: A = 0 ... Y = 19, AA = 20 ...; None or "" = -1."""
    if letter is None or letter == "":
        return -1
    return _letters.revision_index(_check_revision(letter))


def revision_letter(index: int) -> str:
    """The revision at a position of the sequence (inverse of ``revision_index``; index >= 0)."""
    if isinstance(index, bool) or not isinstance(index, int) or index < 0:
        raise ValueError(f"a revision index is an integer >= 0, got {index!r}")
    letter = _letters.revision_from_index(index)
    if not is_valid_revision(letter):
        last = _letters.revision_from_index(index - 1)
        raise SpecError(f"there is no revision letter after {last}")
    return letter


def next_revision(letter: str | None) -> str:
    """The revision after ``letter``: None/"" -> A, H -> J, Y -> AA, AY -> BA."""
    return revision_letter(revision_index(letter) + 1)


def draft_revision(released_letter: str | None) -> str:
    """The letter a draft carries after ``released_letter`` was released: the next one."""
    return next_revision(released_letter)


def history_revisions(history: Any) -> list[str]:
    """The valid revision letters recorded in a ``history`` list, in file order."""
    out = []
    if isinstance(history, Sequence) and not isinstance(history, (str, bytes)):
        for entry in history:
            if isinstance(entry, Mapping) and is_valid_revision(entry.get("revision")):
                out.append(entry["revision"])
    return out


def release_revision(status: str | None, revision: str | None, history: Any = None) -> str:
    """The letter a release of this spec carries.

    - draft (or no status): its own letter; a draft without a letter gets the one after the last
      released. With a history, a draft's letter must be exactly the next one (letters are used
      in sequence); without one, any letter is accepted (a part may come in with earlier
      revisions made on paper).
    - released: the next letter (the spec was edited without starting a draft first).
    - obsolete: refused.
    """
    status = status or "draft"
    if status not in STATUSES:
        raise SpecError(f"status {status!r} is not one of {', '.join(STATUSES)}", path="status")
    released = history_revisions(history)
    last = max(released, key=revision_index) if released else None
    if status == "obsolete":
        raise SpecError("the spec is obsolete; an obsolete part is not released again",
                        path="status")
    if status == "released":
        if revision in (None, ""):
            return next_revision(last)
        _check_revision(revision)
        return next_revision(max([revision] + released, key=revision_index))
    if revision in (None, ""):
        return next_revision(last)
    _check_revision(revision)
    if last is not None and revision_index(revision) != revision_index(last) + 1:
        raise SpecError(f"this draft is revision {revision}, but the last released revision is "
                        f"{last}, so the next is {next_revision(last)}", path="revision")
    return revision


@record
class ReleaseCheck:
    """The outcome of checking one spec's release against its current content."""

    status: str
    revision: str | None
    current: str                  # fingerprint of the content now
    recorded: str | None          # fingerprint in the history entry of this revision
    problems: tuple[str, ...]     # empty when all is well

    @property
    def ok(self) -> bool:
        return not self.problems


def history_entry(spec_data: Mapping, revision: str | None = None) -> Mapping | None:
    """The last history entry of ``revision`` (default: the spec's own revision), or None."""
    revision = spec_data.get("revision") if revision is None else revision
    history = spec_data.get("history")
    found = None
    if isinstance(history, Sequence) and not isinstance(history, str):
        for entry in history:
            if isinstance(entry, Mapping) and entry.get("revision") == revision:
                found = entry
    return found


def check_release(spec_data: Mapping, catalog_entries: Mapping[str, Mapping]) -> ReleaseCheck:
    """Recompute a released spec's fingerprint and compare it with its history entry.

    Drafts and obsolete specs have nothing to check (``ok``). For a released spec the problems
    name what changed when the history entry recorded ``parts``.
    """
    status = spec_data.get("status") or "draft"
    revision = spec_data.get("revision")
    current = fingerprint(spec_data, catalog_entries)
    problems: list[str] = []
    recorded = None
    if status not in STATUSES:
        problems.append(f"status {status!r} is not one of {', '.join(STATUSES)}")
    elif status == "released":
        if not is_valid_revision(revision):
            problems.append(f"released with revision {revision!r}, which is not a revision letter")
        else:
            entry = history_entry(spec_data, revision)
            later = [r for r in history_revisions(spec_data.get("history"))
                     if revision_index(r) > revision_index(revision)]
            if later:
                problems.append(f"revision {revision} is marked released but the history already "
                                f"has revision {later[-1]}")
            if entry is None:
                problems.append(f"revision {revision} is marked released but has no history entry")
            else:
                raw = entry.get("fingerprint")
                recorded = None if raw is None or not str(raw).strip() else str(raw).strip()
                if recorded is None:
                    # a release is its recorded fingerprint: without one nothing ties this
                    # revision letter to a content, so it is refused, never merely warned about
                    problems.append(f"revision {revision} is marked released but its history entry records "
                                    "no fingerprint (a release without one is not a release)")
                elif recorded != current:
                    parts = entry.get("parts")
                    what = (changed_components(parts, component_fingerprints(spec_data,
                                                                              catalog_entries))
                            if isinstance(parts, Mapping) else [])
                    detail = ", ".join(what) if what else "its content or a catalogue entry it uses"
                    problems.append(f"changed since revision {revision} was released "
                                    f"(fingerprint {short(recorded or '-')} recorded, "
                                    f"{short(current)} now): {detail}")
    return ReleaseCheck(status=status, revision=revision, current=current, recorded=recorded,
                        problems=tuple(problems))


# ----------------------------------------------------------------------------------------------
# Text-level editing of a spec file

_BOM = "\ufeff"
_FP_RE = re.compile(r"[0-9a-f]{64}")
# conservative plain scalar: starts with a letter, no ':' '#' quotes or backslash
_PLAIN_RE = re.compile(r"[A-Za-z][A-Za-z0-9 ._,/()+\-'=<>;&*!?%@~]*")
# words some YAML 1.1 reader takes for booleans or null although PyYAML does not
_AMBIGUOUS = {"y", "n", "yes", "no", "on", "off", "true", "false", "null"}


def _yaml_scalar(text: str, *, quote: str | None = None) -> str:
    """YAML text for a string: plain when that is unambiguous, else double-quoted."""
    import yaml

    if quote is None and _PLAIN_RE.fullmatch(text) and text == text.strip() \
            and "  " not in text and text.lower() not in _AMBIGUOUS:
        try:
            if yaml.safe_load(f"k: {text}\n") == {"k": text}:
                return text
        except yaml.YAMLError:
            pass
    if quote == "'":
        return "'" + text.replace("'", "''") + "'"
    out = json.dumps(text, ensure_ascii=False)
    # characters JSON leaves raw that YAML treats as line breaks or does not allow raw
    return "".join(c if not (0x7F <= ord(c) <= 0x9F or c in "\u2028\u2029\ufeff")
                   else f"\\u{ord(c):04x}" for c in out)


class _Doc:
    """A spec's text with the node positions of its top-level keys."""

    def __init__(self, text: str, name: str):
        import yaml

        from .loading import parse_yaml

        self.name = name
        self.bom = text.startswith(_BOM)
        self.body = text[1:] if self.bom else text
        first = self.body.find("\n")
        self.nl = "\r\n" if first > 0 and self.body[first - 1] == "\r" else "\n"
        if re.search(r"\r(?!\n)|[\x85\u2028\u2029]", self.body):
            raise SpecError("has unusual line breaks (CR alone, NEL or U+2028); "
                            "save it with LF or CRLF line endings", file=name)
        self.data = parse_yaml(self.body, name)    # located errors, duplicate keys rejected
        if not isinstance(self.data, Mapping):
            raise SpecError("a spec is a mapping of keys at the top level", file=name)
        root = yaml.compose(self.body, Loader=yaml.SafeLoader)
        if root is None:        # parse_yaml above already refused an empty document
            raise SpecError("a spec is a mapping of keys at the top level", file=name)
        self.root: Any = root
        self.keys: dict[str, tuple[Any, Any]] = {}
        for key_node, value_node in self.root.value:
            if isinstance(key_node, yaml.ScalarNode):
                self.keys[key_node.value] = (key_node, value_node)
        self.edits: list[tuple[int, int, str]] = []

    # -- positions --
    def line_start(self, index: int) -> int:
        return self.body.rfind("\n", 0, index) + 1

    def after_line(self, index: int) -> int:
        """Index of the start of the line after the one holding ``index``."""
        end = self.body.find("\n", index)
        if end < 0:
            self.edits.append((len(self.body), len(self.body), self.nl))
            return len(self.body)
        return end + 1

    def end_of(self, key_node, value_node) -> int:
        """Index just past the last character of a key/value pair's text."""
        import yaml

        node, key = value_node, key_node
        while True:
            if isinstance(node, yaml.ScalarNode):
                if node.value == "" and node.style is None and node.start_mark.index == \
                        node.end_mark.index:               # an empty value ends at its key
                    return key.end_mark.index if key is not None else node.start_mark.index
                return node.end_mark.index
            if node.flow_style or not node.value:
                return node.end_mark.index
            if isinstance(node, yaml.MappingNode):
                key, node = node.value[-1]
            else:
                key, node = None, node.value[-1]

    def insert_point_after(self, key_node, value_node) -> int:
        end = self.end_of(key_node, value_node)
        if end > 0 and self.body[end - 1] == "\n":   # block scalars end at the next line start
            return end
        return self.after_line(end)

    def top_indent(self) -> str:
        return " " * self.root.value[0][0].start_mark.column if self.root.value else ""

    def style(self) -> tuple[int, int, int]:
        """(mapping indent, dash offset under its key, dash-to-key distance) the file uses."""
        from collections import Counter

        import yaml

        maps: Counter[int] = Counter()
        offsets: Counter[int] = Counter()
        dashes: Counter[int] = Counter()
        stack, seen = [self.root], set()
        while stack:
            node = stack.pop()
            if id(node) in seen:          # an alias points back at a node already counted
                continue
            seen.add(id(node))
            if isinstance(node, yaml.MappingNode) and not node.flow_style:
                for k, v in node.value:
                    if isinstance(v, yaml.MappingNode) and not v.flow_style and v.value \
                            and v.start_mark.column > k.start_mark.column:
                        maps[v.start_mark.column - k.start_mark.column] += 1
                    if isinstance(v, yaml.SequenceNode) and not v.flow_style and v.value \
                            and v.start_mark.column >= k.start_mark.column:
                        offsets[v.start_mark.column - k.start_mark.column] += 1
                    stack.append(v)
            elif isinstance(node, yaml.SequenceNode) and not node.flow_style:
                for item in node.value:
                    if isinstance(item, yaml.MappingNode) and not item.flow_style \
                            and item.value and item.start_mark.column >= node.start_mark.column + 2:
                        dashes[item.start_mark.column - node.start_mark.column] += 1
                    stack.append(item)

        def common(counter, default):
            return counter.most_common(1)[0][0] if counter else default

        return common(maps, 2), common(offsets, 2), common(dashes, 2)

    # -- edits --
    def set_scalar(self, key: str, value: str, *, before: str | None = None,
                   after: str | None = None) -> None:
        """Set a top-level scalar; a missing key is put next to ``after``/``before`` keys."""
        import yaml

        if key in self.keys:
            k, v = self.keys[key]
            if not isinstance(v, yaml.ScalarNode) or v.style in ("|", ">") or \
                    v.start_mark.line != v.end_mark.line or v.start_mark.index < k.end_mark.index:
                raise SpecError(f"'{key}:' must be a one-line value such as '{key}: {value}' "
                                "for the release tools to set it", file=self.name,
                                line=k.start_mark.line + 1, path=key)
            if v.start_mark.index == v.end_mark.index:            # `status:` with no value
                self.edits.append((v.start_mark.index, v.start_mark.index,
                                   " " + _yaml_scalar(value)))
                return
            quote = v.style if v.style in ("'", '"') else None
            self.edits.append((v.start_mark.index, v.end_mark.index,
                               _yaml_scalar(value, quote=quote)))
            return
        line = f"{self.top_indent()}{key}: {_yaml_scalar(value)}{self.nl}"
        if after and after in self.keys:
            self.edits.append((self.insert_point_after(*self.keys[after]),) * 2 + (line,))
        elif before and before in self.keys:
            k, _ = self.keys[before]
            at = self.line_start(k.start_mark.index)
            self.edits.append((at, at, line))
        elif self.root.value:        # beside the part's identity at the top
            self.edits.append((self.insert_point_after(*self.root.value[0]),) * 2 + (line,))
        else:
            self.edits.append((len(self.body), len(self.body), line))

    def append_history(self, entry: list[tuple[str, Any]]) -> None:
        """Append one entry (ordered key, value pairs) to the top-level ``history`` list."""
        import yaml

        map_indent, offset, dash_to_key = self.style()
        top = self.top_indent()
        if "history" in self.keys:
            k, v = self.keys["history"]
            if isinstance(v, yaml.SequenceNode) and not v.flow_style and v.value:
                dash_col = v.start_mark.column
                first = v.value[0]
                key_col = (first.start_mark.column
                           if isinstance(first, yaml.MappingNode) and not first.flow_style
                           else dash_col + dash_to_key)
                at = self.insert_point_after(k, v)
                self.edits.append((at, at, self._entry_text(entry, dash_col, key_col, map_indent)))
                return
            empty_scalar = isinstance(v, yaml.ScalarNode) and v.tag.endswith(":null")
            empty_list = isinstance(v, yaml.SequenceNode) and not v.value
            if not (empty_scalar or empty_list):
                raise SpecError("'history:' must be a list ('- revision: ...' entries) for the "
                                "release tools to add to it", file=self.name,
                                line=k.start_mark.line + 1, path="history")
            if v.start_mark.index != v.end_mark.index:            # `history: []` or `~`
                start = v.start_mark.index
                if v.start_mark.line == k.start_mark.line:
                    colon = self.body.rfind(":", k.end_mark.index, start)
                    start = colon + 1 if colon >= 0 else start
                self.edits.append((start, v.end_mark.index, ""))
            dash_col = k.start_mark.column + offset
            at = self.after_line(max(v.end_mark.index - 1, k.end_mark.index))
            self.edits.append((at, at, self._entry_text(entry, dash_col, dash_col + dash_to_key,
                                                         map_indent)))
            return
        dash_col = len(top) + offset
        block = (f"{top}history:{self.nl}"
                 + self._entry_text(entry, dash_col, dash_col + dash_to_key, map_indent))
        marker = None                                  # an explicit end of document: `...`
        for m in re.finditer(r"^\.\.\.(?=[ \t\r\n#]|$)", self.body, flags=re.M):
            marker = m
        at = len(self.body)
        if marker is not None and (not self.root.value
                                   or marker.start() >= self.end_of(*self.root.value[-1])):
            at = marker.start()
        before = self.body[:at]
        lead = ""
        if before and not before.endswith("\n"):
            lead = self.nl
        if before.strip() and not re.search(r"\n[ \t]*\r?\n[ \t]*$", "\n" + before):
            lead += self.nl                                      # a blank line before the block
        self.edits.append((at, at, lead + block))

    def _entry_text(self, entry, dash_col: int, key_col: int, map_indent: int) -> str:
        gap = " " * max(1, key_col - dash_col - 1)
        lines = []
        for i, (key, value) in enumerate(entry):
            lead = (" " * dash_col + "-" + gap) if i == 0 else " " * (dash_col + 1 + len(gap))
            if isinstance(value, Mapping):
                lines.append(f"{lead}{key}:")
                pad = " " * (dash_col + 1 + len(gap) + map_indent)
                lines += [f"{pad}{_yaml_scalar(str(k))}: {_yaml_scalar(str(v), quote=chr(34))}"
                          for k, v in value.items()]
            elif isinstance(value, list) and value and all(isinstance(v, Mapping) for v in value):
                lines.append(f"{lead}{key}:")
                pad = " " * (dash_col + 1 + len(gap) + map_indent)
                for item in value:        # one block mapping per item
                    for j, (k, v) in enumerate(item.items()):
                        mark = "- " if j == 0 else "  "
                        lines.append(f"{pad}{mark}{_yaml_scalar(str(k))}: {_yaml_scalar(str(v))}")
            elif isinstance(value, list):
                lines.append(f"{lead}{key}: [{', '.join(_yaml_scalar(str(v), quote=chr(34)) for v in value)}]")
            else:
                lines.append(f"{lead}{key}: {value}")
        return "".join(line + self.nl for line in lines)

    def result(self) -> str:
        body = self.body
        # from the back, so earlier indexes stay valid; of two inserts at one index the one
        # made first must end up first, so it is applied last
        order = sorted(range(len(self.edits)), key=lambda i: (self.edits[i][0], i), reverse=True)
        for i in order:
            start, end, text = self.edits[i]
            body = body[:start] + text + body[end:]
        return (_BOM if self.bom else "") + body


def _check_result(doc: _Doc, new_text: str, expected: Mapping[str, Any]) -> None:
    """Parse the edited text and insist that exactly the intended keys changed."""
    from .loading import parse_yaml

    try:
        after = parse_yaml(new_text[1:] if new_text.startswith(_BOM) else new_text, doc.name)
    except SpecError as exc:
        raise SpecError(f"could not update the file safely ({exc.message}); "
                        "edit it by hand", file=doc.name) from None
    before = doc.data
    bad = [k for k in set(before) | set(after)
           if k not in expected and (k not in after or k not in before or after[k] != before[k])]
    bad += [k for k, v in expected.items() if k not in after or after[k] != v]
    if bad:
        raise SpecError(f"could not update the file safely ({', '.join(map(str, sorted(bad)))} "
                        "would not read back as intended); edit it by hand", file=doc.name)


def _as_date(date: Any) -> _dt.date:
    if isinstance(date, _dt.datetime):
        return date.date()
    if isinstance(date, _dt.date):
        return date
    try:
        return _dt.date.fromisoformat(str(date))
    except ValueError:
        raise SpecError(f"release date {date!r} is not a date like 2025-03-14") from None


def release_text(text: str, *, by: str, note: str, fingerprint: str, date: Any,
                 new_revision: str, parts: Mapping[str, str] | None = None,
                 name: str = "spec", allow_unchanged: bool = False,
                 extra: Sequence[tuple[str, Any]] = ()) -> str:
    """The spec text released as ``new_revision`` (see ``release_file``); pure, no I/O."""
    doc = _Doc(text, name)
    _check_revision(new_revision, "new revision")
    if not isinstance(fingerprint, str) or not _FP_RE.fullmatch(fingerprint):
        raise ValueError("fingerprint must be 64 lowercase hex digits (SHA-256)")
    by, note = str(by or "").strip(), str(note or "").strip()
    if not by:
        raise SpecError("a release needs the name of who releases it (--by)")
    if not note:
        raise SpecError("a release needs a note saying what changed (--note)")
    day = _as_date(date)
    status = doc.data.get("status") or "draft"
    if status == "obsolete":
        raise SpecError("the spec is obsolete; an obsolete part is not released again",
                        file=name, path="status")
    history = doc.data.get("history") or []
    if not isinstance(history, list):
        raise SpecError("'history:' must be a list ('- revision: ...' entries) for the release "
                        "tools to add to it", file=name, path="history")
    done = history_revisions(history)
    if done and revision_index(new_revision) <= max(map(revision_index, done)):
        last = max(done, key=revision_index)
        raise SpecError(f"revision {new_revision} cannot be released: the history already has "
                        f"revision {last}", file=name, path="history")
    _check_date_order(history, day, new_revision, name)
    if not allow_unchanged and history and isinstance(history[-1], Mapping) \
            and str(history[-1].get("fingerprint")) == fingerprint:
        raise SpecError(f"nothing changed since revision {history[-1].get('revision')} "
                        f"(same fingerprint {short(fingerprint)}); no new revision is needed",
                        file=name)
    entry: list[tuple[str, Any]] = [
        ("revision", _yaml_scalar(new_revision)),
        ("date", day.isoformat()),
        ("by", _yaml_scalar(by)),
        ("note", _yaml_scalar(note)),
        ("fingerprint", json.dumps(fingerprint)),
    ]
    expected_entry: dict[str, Any] = {"revision": new_revision, "date": day, "by": by,
                                      "note": note, "fingerprint": fingerprint}
    for key, value in extra:          # the acceptances and the supersession (specgen.lifecycle)
        entry.append((key, value if isinstance(value, list) else _yaml_scalar(str(value))))
        expected_entry[key] = value
    if parts:
        entry.append(("parts", dict(parts)))
        expected_entry["parts"] = {str(k): str(v) for k, v in parts.items()}
    doc.set_scalar("revision", new_revision, before="status")
    doc.set_scalar("status", "released", after="revision")
    doc.append_history(entry)
    new = doc.result()
    _check_result(doc, new, {"revision": new_revision, "status": "released",
                             "history": list(history) + [expected_entry]})
    return new


def _check_date_order(history: Sequence[Any], day: _dt.date, new_revision: str, name: str) -> None:
    """A release dated before an earlier release of the same spec is refused: the history reads in order."""
    for entry in history:
        if not isinstance(entry, Mapping) or not is_valid_revision(entry.get("revision")):
            continue
        raw = entry.get("date")
        try:
            when = _as_date(raw) if raw not in (None, "") else None
        except SpecError:
            continue          # an unreadable old date is the spec loader's to report
        if when is not None and day < when:
            raise SpecError(f"release date {day.isoformat()} of revision {new_revision} is before revision "
                            f"{entry.get('revision')} was released on {when.isoformat()}; a release is dated "
                            "on or after the one before it (--date)", file=name, path="history")


def set_status_text(text: str, status: str, name: str = "spec") -> str:
    """The spec text with ``status: <status>``; nothing else changes."""
    if status not in STATUSES:
        raise SpecError(f"status {status!r} is not one of {', '.join(STATUSES)}")
    doc = _Doc(text, name)
    if doc.data.get("status") == status and "status" in doc.keys:
        return text
    doc.set_scalar("status", status, after="revision")
    new = doc.result()
    _check_result(doc, new, {"status": status})
    return new


def start_next_draft_text(text: str, name: str = "spec") -> tuple[str, str]:
    """(new text, letter): a released spec becomes a draft of the next letter.

    Only a released spec starts a next draft: a draft already is one, and an obsolete part is
    not revised (release a new part number, or set it back to released by hand first).
    """
    doc = _Doc(text, name)
    status = doc.data.get("status") or "draft"
    revision = doc.data.get("revision")
    if status == "draft":
        raise SpecError(f"is already a draft (of revision {revision})", file=name, path="status")
    if status != "released":
        raise SpecError(f"is {status}; only a released spec starts a next draft", file=name,
                        path="status")
    if not is_valid_revision(revision):
        raise SpecError(f"revision {revision!r} is not a revision letter", file=name,
                        path="revision")
    letter = draft_revision(max([revision] + history_revisions(doc.data.get("history")),
                                key=revision_index))
    doc.set_scalar("revision", letter, before="status")
    doc.set_scalar("status", "draft", after="revision")
    new = doc.result()
    _check_result(doc, new, {"revision": letter, "status": "draft"})
    return new, letter


# ----------------------------------------------------------------------------------------------
# Files

def _read_spec(path: str | os.PathLike) -> str:
    from .loading import read_text

    text = read_text(path, "spec")               # every read error as a SpecError
    with open(path, "rb") as fh:                 # read_text drops a BOM; keep it on write-back
        if fh.read(3) == _BOM.encode("utf-8"):
            text = _BOM + text
    return text


def _write_text(path: str | os.PathLike, text: str) -> None:
    from .atomic import write_atomic

    write_atomic(path, text.encode("utf-8"))


def release_file(path: str | os.PathLike, *, by: str, note: str, fingerprint: str, date: Any,
                 new_revision: str, parts: Mapping[str, str] | None = None,
                 allow_unchanged: bool = False, extra: Sequence[tuple[str, Any]] = ()) -> None:
    """Release a spec file as ``new_revision``, editing it in place and atomically.

    Sets ``revision: <new_revision>`` and ``status: released`` (keeping each line's comment and
    quote style; a missing key is added beside the other), and appends to ``history:`` (created
    at the end of the file if missing) the entry ``revision, date, by, note, fingerprint`` and,
    when given, ``parts`` (``component_fingerprints``). Every other byte stays as it was.

    Refuses (SpecError): an obsolete spec, a letter not after every letter in the history, an
    empty ``by``/``note``, and, unless ``allow_unchanged``, a fingerprint equal to the last
    history entry's (nothing changed). The caller decides the letter (``release_revision``) and
    computes the fingerprint from this same file.
    """
    text = _read_spec(path)
    new = release_text(text, by=by, note=note, fingerprint=fingerprint, date=date,
                       new_revision=new_revision, parts=parts, name=str(path),
                       allow_unchanged=allow_unchanged, extra=extra)
    _write_text(path, new)


def set_status_file(path: str | os.PathLike, status: str) -> None:
    """Set ``status:`` of a spec file (e.g. obsolete) in place; the file is not rewritten
    when the status already is that."""
    text = _read_spec(path)
    new = set_status_text(text, status, name=str(path))
    if new != text:
        _write_text(path, new)


def start_next_draft_file(path: str | os.PathLike) -> str:
    """Turn a released spec into a draft of the next letter; returns that letter."""
    new, letter = start_next_draft_text(_read_spec(path), name=str(path))
    _write_text(path, new)
    return letter


# ----------------------------------------------------------------------------------------------


__all__ = [
    "REVISION_ALPHABET", "STATUSES", "EXCLUDED_KEYS", "FINGERPRINT_SCHEME",
    "is_valid_revision", "revision_index", "revision_letter", "next_revision", "draft_revision",
    "history_revisions", "release_revision",
    "normalise", "canonical", "spec_content", "fingerprint", "short",
    "component_fingerprints", "changed_components", "ReleaseCheck", "history_entry",
    "check_release",
    "release_text", "set_status_text", "start_next_draft_text",
    "release_file", "set_status_file", "start_next_draft_file",
    "split_ref", "read_rev", "release_tag", "git_commit_and_tag",
]
