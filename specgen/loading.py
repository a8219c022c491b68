"""Safe YAML with a line mark on every key, duplicate keys rejected, and located readers.

PyYAML silently keeps the last of two equal keys, which would let a spec carry two different turn
counts; here a duplicate is an error at the second key's line. Every mapping comes back as an
``LMap`` (a dict that knows the line of each key) and every list as an ``LList``. ``Reader`` walks
them with typed accessors, so each schema error names file, line and key path, and a key nobody
asked for (a typo such as ``voltge``) is reported instead of ignored.
"""

from __future__ import annotations

import math
import os
import re
import stat
from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING, Any, overload

import yaml

from . import units as _units
from .errors import SpecError

#: The most a spec or a search requirement may hold (the demo parts are about 2 kB).
SPEC_MAX_BYTES = 1024 * 1024
#: The most any other file read here may hold (a catalogue file, an orders CSV).
MAX_FILE_BYTES = 16 * 1024 * 1024


class LMap(dict):
    """A mapping that remembers the 1-based line of itself and of each key."""

    line: int = 0
    key_lines: dict


class LList(list):
    """A list that remembers its own line and the line of each item."""

    line: int = 0
    item_lines: list


# libyaml's parser when present (10x faster); our constructors run on either
if TYPE_CHECKING:
    _Base = yaml.SafeLoader
else:
    _Base = getattr(yaml, "CSafeLoader", yaml.SafeLoader)


class _Loader(_Base):
    pass


def _key_path(parts: list) -> str:
    out = ""
    for p in parts:
        out += f"[{p}]" if isinstance(p, int) else (f".{p}" if out else str(p))
    return out


def _construct_mapping(loader: _Loader, node: yaml.MappingNode, deep: bool = False) -> LMap:
    loader.flatten_mapping(node)
    out = LMap()
    out.line = node.start_mark.line + 1
    out.key_lines = {}
    path = loader.__dict__.setdefault("key_path", [])   # where construction is, for duplicate-key messages
    for key_node, value_node in node.value:
        key = loader.construct_object(key_node, deep=True)
        try:
            hash(key)
        except TypeError:
            raise SpecError("a key must be plain text", file=loader.name,
                            line=key_node.start_mark.line + 1, path=_key_path(path) or None) from None
        if key in out:
            raise SpecError(f"duplicate key '{key}' (first on line {out.key_lines[key]})",
                            file=loader.name, line=key_node.start_mark.line + 1, path=_key_path(path + [key]))
        path.append(key)
        try:
            out[key] = _construct_value(loader, value_node, path)
        finally:
            path.pop()
        out.key_lines[key] = key_node.start_mark.line + 1
    return out


def _construct_value(loader: _Loader, node: yaml.Node, path: list) -> Any:
    """A value; one PyYAML cannot build (a date '2026-13-45', an integer of 5,000 digits) is a located error."""
    try:
        return loader.construct_object(node, deep=True)
    except (ValueError, OverflowError) as exc:
        raise SpecError(f"cannot read this value ({str(exc).split(';')[0]}); quote it to keep it as text",
                        file=loader.name, line=node.start_mark.line + 1, path=_key_path(path)) from None


def _construct_sequence(loader: _Loader, node: yaml.SequenceNode, deep: bool = False) -> LList:
    path = loader.__dict__.setdefault("key_path", [])
    items = []
    for i, child in enumerate(node.value):
        path.append(i)
        try:
            items.append(_construct_value(loader, child, path))
        finally:
            path.pop()
    out = LList(items)
    out.line = node.start_mark.line + 1
    out.item_lines = [child.start_mark.line + 1 for child in node.value]
    return out


def _construct_int(loader: _Loader, node: yaml.ScalarNode) -> int:
    """An integer; one of more than 30 digits is refused here (printing it would fail past 4,300 digits)."""
    value = yaml.constructor.SafeConstructor.construct_yaml_int(loader, node)
    if abs(value) >= 10 ** 30:
        raise SpecError("a number of more than 30 digits", file=loader.name, line=node.start_mark.line + 1,
                        path=_key_path(loader.__dict__.get("key_path", [])) or None)
    return value


_Loader.add_constructor("tag:yaml.org,2002:int", _construct_int)
_Loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_MAPPING_TAG, _construct_mapping)
_Loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_SEQUENCE_TAG, _construct_sequence)


def read_text(path: str | os.PathLike, what: str = "file", limit: int | None = None) -> str:
    """Read a UTF-8 text file, turning every way it can be wrong into a SpecError.

    Only a regular file is read (a device such as /dev/zero, a FIFO or a socket is refused before it
    is opened, so nothing blocks or grows without bound), and at most ``limit`` bytes of it: by default
    :data:`SPEC_MAX_BYTES` for a spec or a requirement, :data:`MAX_FILE_BYTES` for anything else.
    """
    name = str(path)
    limit = limit if limit is not None else limit_for(what)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise SpecError(f"no such {what}", file=name) from None
    except OSError as exc:
        raise SpecError(f"cannot read: {exc.strerror or exc}", file=name) from None
    _check_regular(st, what, name, limit)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0))
    except OSError as exc:
        raise SpecError(f"cannot read: {exc.strerror or exc}", file=name) from None
    try:
        _check_regular(os.fstat(fd), what, name, limit)     # the same file, not one swapped in meanwhile
        chunks, total = [], 0
        while total <= limit:
            chunk = os.read(fd, min(1 << 20, limit + 1 - total))
            if not chunk:
                break
            chunks.append(chunk)
            total += len(chunk)
    except OSError as exc:
        raise SpecError(f"cannot read: {exc.strerror or exc}", file=name) from None
    finally:
        os.close(fd)
    if total > limit:                                           # it grew while being read
        raise SpecError(too_big(total, what, limit), file=name)
    return decode_text(b"".join(chunks), name)


def limit_for(what: str) -> int:
    """The size limit of a file by what it is: a spec or requirement is small, a catalogue file larger."""
    return SPEC_MAX_BYTES if ("spec" in what or "requirement" in what) else MAX_FILE_BYTES


def too_big(size: int, what: str, limit: int) -> str:
    return f"is {size:,} bytes ({size / 1e6:.2f} MB); a {what} is at most {limit:,} bytes"


def _check_regular(st: os.stat_result, what: str, name: str, limit: int) -> None:
    if stat.S_ISDIR(st.st_mode):
        raise SpecError(f"is a folder, expected a {what}", file=name)
    if not stat.S_ISREG(st.st_mode):
        kind = ("a pipe" if stat.S_ISFIFO(st.st_mode) else "a socket" if stat.S_ISSOCK(st.st_mode)
                else "a device")
        raise SpecError(f"is {kind}, not a regular file; expected a {what}", file=name)
    if st.st_size > limit:
        raise SpecError(too_big(st.st_size, what, limit), file=name)


def decode_text(raw: bytes, name: str) -> str:
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise SpecError(f"is not UTF-8 text (byte 0x{raw[exc.start]:02x}); save it as UTF-8",
                        file=name, line=line) from None
    if text.startswith("\ufeff"):
        text = text[1:]
    return text


def parse_yaml(text: str, name: str) -> Any:
    """Parse YAML text; every YAML error becomes one located line."""
    if "\x00" in text:
        raise SpecError("contains a NUL byte; is this a binary file?", file=name,
                        line=text[: text.index("\x00")].count("\n") + 1)
    loader = _Loader(text)
    loader.name = name
    try:
        return loader.get_single_data()
    except SpecError:
        raise
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark else None
        problem = (exc.problem or "not valid YAML").strip()
        if "\t" in (text.splitlines()[line - 1] if line and line <= len(text.splitlines()) else ""):
            problem = "a tab character; indent YAML with spaces"
        raise SpecError(f"YAML: {problem}", file=name, line=line) from None
    except yaml.YAMLError as exc:
        raise SpecError(f"YAML: {exc}", file=name) from None
    except RecursionError:
        raise SpecError("YAML nested too deeply", file=name) from None
    except (ValueError, OverflowError) as exc:     # a top-level scalar PyYAML cannot build
        raise SpecError(f"YAML: cannot read the value ({str(exc).split(';')[0]})", file=name) from None
    finally:
        loader.dispose()


def load_yaml(path: str | os.PathLike, what: str = "YAML file") -> Any:
    return parse_yaml(read_text(path, what), str(path))


# ----------------------------------------------------------------------------------------------
# Reader: typed, located access to a loaded mapping


_MISSING = object()
_PLAIN_NUMBER = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?")
#: The same, as text (the JSON Schema's pattern for a number written in quotes).
PLAIN_NUMBER_PATTERN = _PLAIN_NUMBER.pattern


#: Keys the spec, requirement and catalogue files used to spell otherwise, by where they stand: old key -> the
#: one-line error that names the new key (``Reader.done(renamed=...)``).
RENAMED_KEYS: dict[str, dict[str, str]] = {
    "materials": {"rolloff": "rolloff was renamed dc_bias: {half_field, steepness} "
                             "(half_field = b^(-1/c) in A/m, steepness = c, for a fit with a = 1)"},
    "cores.dims": {"ring_fraction": "ring_fraction was renamed skirt_coverage (the share of the ring the skirts cover)"},
    "bobbins": {"core": "core was renamed cores: a list of the cores the bobbin fits, e.g. cores: [ETD-39-F100]"},
    "varnishes": {"usage": "usage was renamed winding_volume_share"},
    "shop": {"margin": "margin (the profit on the selling price) was renamed profit_margin"},
    "windings": {"match": "match was renamed same_turns_as (the winding whose turns this one repeats)"},
}


#: While ``specgen.schema`` traces the loaders to write the JSON Schema: the recorder every Reader reports
#: the keys it reads to (their type, limits and whether they have a default). None otherwise.
TRACER: Any = None


class Reader:
    """Typed access to one mapping of a loaded YAML document, with locations in every error.

    >>> r = Reader(data, file="BH-1042.yaml")
    >>> r.quantity("frequency", "frequency")       # 50.0 (Hz)
    >>> for w in r.items("windings"): w.text("name")
    Call ``done()`` once the mapping is read: keys that were never asked for are reported.
    """

    def __init__(self, data: Any, file: str | None, path: str = "", line: int | None = None):
        self.data = data
        self.file = file
        self.path = path
        self.line = line if line is not None else getattr(data, "line", None)
        self._seen: set = set()
        if not isinstance(data, dict):
            raise self.error(f"expected a mapping of keys, got {_describe(data)}")
        if TRACER is not None:
            TRACER.open(self)

    def _note(self, key: str, kind: str, default: Any, **info: Any) -> None:
        """Tell the schema tracer (when one runs) what this key is: what the JSON Schema is written from."""
        if TRACER is not None:
            TRACER.note(self, key, kind, default is _MISSING, info)

    # -- locations --
    def _key_path(self, key: str) -> str:
        return f"{self.path}.{key}" if self.path else str(key)

    def line_of(self, key: str | None = None) -> int | None:
        if key is not None:
            lines = getattr(self.data, "key_lines", None) or {}
            if key in lines:
                return lines[key]
        return self.line

    def error(self, message: str, key: str | None = None) -> SpecError:
        path = self._key_path(key) if key is not None else (self.path or None)
        return SpecError(message, file=self.file, line=self.line_of(key), path=path)

    def _required(self, key: str) -> SpecError:
        """'is required', naming a present key that looks like a misspelling of it."""
        if key in self.data:
            return self.error("is required (it is empty here)", key)
        near = _nearest(str(key), [str(k) for k in self.data if isinstance(k, str)])
        if near is None:
            return self.error("is required", key)
        line = (getattr(self.data, "key_lines", None) or {}).get(near, self.line)
        return SpecError(f"is required; did you mean it by '{near}' (line {line})?", file=self.file, line=line,
                         path=self._key_path(key))

    def has(self, key: str, probe: bool = True) -> bool:
        if probe and TRACER is not None:
            TRACER.probe(self, key)
        return key in self.data and self.data[key] is not None

    def raw(self, key: str, default: Any = _MISSING) -> Any:
        """The value as written (no type check): the key's schema is left open."""
        self._note(key, "any", default)
        return self._value(key, default)

    def checked_raw(self, key: str, kind: str, default: Any = _MISSING) -> Any:
        """The value as written, for a loader that checks it itself; ``kind`` names its form for the schema
        (one of the accessors' kinds: 'percent', 'amount', 'text', ...)."""
        self._note(key, kind, default)
        return self._value(key, default)

    def _value(self, key: str, default: Any = _MISSING) -> Any:
        self._seen.add(key)
        if key not in self.data or self.data[key] is None:
            if default is _MISSING:
                raise self._required(key)
            return default
        return self.data[key]

    # -- typed accessors --
    def quantity(self, key: str, dimension: str, default: Any = _MISSING, *,
                 positive: bool = True, allow_zero: bool = False,
                 minimum: float | None = None, maximum: float | None = None) -> float:
        self._note(key, "quantity", default, dimension=dimension)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        try:
            out = _units.parse(value, dimension)
        except _units.UnitError as exc:
            raise self.error(str(exc), key) from None
        if dimension not in ("temperature",):
            if positive and (out < 0 or (out == 0 and not allow_zero)):
                raise self.error(f"must be greater than zero, got '{value}'", key)
        if minimum is not None and out < minimum:
            raise self.error(f"'{value}' is below the smallest allowed value", key)
        if maximum is not None and out > maximum:
            raise self.error(f"'{value}' is above the largest allowed value", key)
        return out

    def number(self, key: str, default: Any = _MISSING, *, minimum: float | None = None,
               maximum: float | None = None, integer: bool = False) -> float:
        self._note(key, "integer" if integer else "number", default, minimum=minimum, maximum=maximum)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            if isinstance(value, str):
                # the same strict number as in a quantity: ASCII digits, no '1_000', no '٣', no 'nan'
                if not _PLAIN_NUMBER.fullmatch(value.strip()):
                    raise self.error(f"expected a plain number, got '{value}'", key)
                value = float(value)
            else:
                raise self.error(f"expected a plain number, got {_describe(value)}", key)
        if isinstance(value, float) and not math.isfinite(value):
            raise self.error(f"expected a finite number, got {value}", key)
        if integer and isinstance(value, float) and not value.is_integer():
            raise self.error(f"expected a whole number, got {value}", key)
        if abs(value) > 1e300:      # YAML reads 400 digits as an int; float() of it would overflow
            raise self.error("is far too large a number", key)
        if minimum is not None and value < minimum:
            raise self.error(f"must be at least {minimum:g}, got {value}", key)
        if maximum is not None and value > maximum:
            raise self.error(f"must be at most {maximum:g}, got {value}", key)
        return int(value) if integer else float(value)

    def integer(self, key: str, default: Any = _MISSING, *, minimum: int | None = None,
                maximum: int | None = None) -> int:
        return self.number(key, default, minimum=minimum, maximum=maximum, integer=True)  # type: ignore[return-value]

    def text(self, key: str, default: Any = _MISSING, *, max_len: int = 2000) -> str:
        self._note(key, "text", default, max_len=max_len)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        if isinstance(value, bool) or isinstance(value, (dict, list)):
            raise self.error(f"expected text, got {_describe(value)}", key)
        text = str(value)
        if len(text) > max_len:
            raise self.error(f"is {len(text):,} characters long; at most {max_len:,} are allowed", key)
        if not text.strip() and default != "":
            # an empty id or name is never meant: 'sleeving: ""' would otherwise name no catalogue item
            raise self.error("is empty; give a value or leave the key out" if default is None else "is empty", key)
        bad = first_unsafe_char(text, multiline=max_len > 200)
        if bad is not None:
            raise self.error(f"holds the control character {bad}; plain text only", key)
        return text

    def choice(self, key: str, choices: Iterable[str], default: Any = _MISSING) -> str:
        choices = list(choices)
        self._note(key, "choice", default, choices=tuple(choices))
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        text = str(value).strip().lower() if not isinstance(value, (dict, list)) else None
        if text not in choices:
            raise self.error(f"expected one of {', '.join(choices)}; got {_describe(value)}", key)
        return text

    def boolean(self, key: str, default: Any = _MISSING) -> bool:
        self._note(key, "boolean", default)
        value = self._value(key, default)
        if isinstance(value, bool):
            return value
        raise self.error(f"expected true or false, got {_describe(value)}", key)

    def decimal(self, key: str, default: Any = _MISSING):
        """Money: read as Decimal from its text, never through a float."""
        from decimal import Decimal, InvalidOperation

        self._note(key, "amount", default)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value if value is None else Decimal(str(value))
        if isinstance(value, bool) or isinstance(value, (dict, list)):
            raise self.error(f"expected an amount, got {_describe(value)}", key)
        try:
            out = Decimal(str(value).strip())
        except InvalidOperation:
            raise self.error(f"expected an amount like '14.50', got '{value}'", key) from None
        if not out.is_finite() or out < 0:
            raise self.error(f"expected an amount of zero or more, got '{value}'", key)
        return out

    def percent(self, key: str, default: Any = _MISSING, *, maximum: float = 1.0) -> float:
        """A fraction written '3 %' (or a plain number 0.03), zero or more, at most ``maximum``."""
        self._note(key, "percent", default)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return float(value)
        text = str(value).strip()
        try:
            out = float(text[:-1]) / 100.0 if text.endswith("%") else float(text)
        except ValueError:
            raise self.error(f"expected a percentage like '3 %', got '{value}'", key) from None
        if not (0.0 <= out <= maximum):
            raise self.error(f"expected a percentage from 0 % to {maximum * 100:g} %, got '{value}'", key)
        return out

    def tolerance_pair(self, key: str, default: tuple[float, float] | None) -> tuple[float, float] | None:
        """A tolerance band ``{minus: 0 %, plus: 3 %}`` as fractions (minus, plus), each 0..50 %."""
        if not self.has(key):
            self._note(key, "mapping", None)
            self._value(key, None)
            return default
        sub = self.mapping(key)
        pair = (sub.percent("minus", maximum=0.5), sub.percent("plus", maximum=0.5))
        sub.done()
        return pair

    # typing only: without a default the answer is a Reader (a missing key raises); with a
    # default (None in practice) the default may come back
    @overload
    def mapping(self, key: str) -> Reader: ...

    @overload
    def mapping(self, key: str, default: None) -> Reader | None: ...

    def mapping(self, key: str, default: Any = _MISSING) -> Reader | None:
        self._note(key, "mapping", default)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        if not isinstance(value, dict):
            raise self.error(f"expected a mapping of keys, got {_describe(value)}", key)
        return Reader(value, self.file, self._key_path(key), self.line_of(key))

    def items(self, key: str, default: Any = _MISSING, *, min_items: int = 0) -> list:
        """A list of mappings, each returned as a Reader located at its item."""
        self._note(key, "mappings", default, min_items=min_items)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        if not isinstance(value, list):
            raise self.error(f"expected a list, got {_describe(value)}", key)
        if len(value) < min_items:
            raise self.error(f"needs at least {min_items} item{'s' if min_items != 1 else ''}", key)
        lines = getattr(value, "item_lines", None) or [self.line_of(key)] * len(value)
        return [Reader(item, self.file, f"{self._key_path(key)}[{i}]", lines[i])
                for i, item in enumerate(value)]

    def list_of(self, key: str, default: Any = _MISSING) -> list:
        """A list of scalars (raw values, with their lines via item_line())."""
        self._note(key, "list", default)
        value = self._value(key, default)
        if value is default and default is not _MISSING:
            return value
        if not isinstance(value, list):
            raise self.error(f"expected a list, got {_describe(value)}", key)
        return list(value)

    def item_error(self, key: str, index: int, message: str) -> SpecError:
        value = self.data.get(key)
        lines = getattr(value, "item_lines", None)
        line = lines[index] if lines and index < len(lines) else self.line_of(key)
        return SpecError(message, file=self.file, line=line, path=f"{self._key_path(key)}[{index}]")

    def done(self, also_allowed: Iterable[str] = (), renamed: Mapping[str, str] | None = None) -> None:
        """Report the first key nobody read: almost always a typo, or a key spelt as it used to be
        (``renamed``: old key -> the one-line message naming the new one)."""
        allowed = self._seen | set(also_allowed)
        if TRACER is not None:
            TRACER.close(self, also_allowed)
        for key in self.data:
            if renamed and key in renamed and key not in allowed:
                raise self.error(renamed[key], key)
            if key not in allowed:
                near = _nearest(str(key), [str(k) for k in allowed])
                hint = f"; did you mean '{near}'?" if near else ""
                raise self.error(f"unknown key '{key}'{hint}", key)


def _describe(value: Any) -> str:
    return _units._describe(value)


# C0 and C1 control characters, DEL, and the bidirectional overrides and isolates (they reorder what a
# terminal or a PDF shows); line feed and tab are in the second set only
_UNSAFE_ONE_LINE = re.compile("[\x00-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]")
_UNSAFE_MULTILINE = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]")


def first_unsafe_char(text: str, multiline: bool = False) -> str | None:
    """The first character of ``text`` a terminal would act on rather than show (as ``U+001B``), or None.

    C0 and C1 control characters (ESC, BEL, NUL, CR, ...), DEL and the bidirectional controls are
    unsafe; a line feed and a tab are allowed only where the text may span lines (notes).
    """
    m = (_UNSAFE_MULTILINE if multiline else _UNSAFE_ONE_LINE).search(text)
    return f"U+{ord(m.group()):04X}" if m else None


def _nearest(word: str, candidates: list) -> str | None:
    import difflib

    found = difflib.get_close_matches(word, candidates, n=1, cutoff=0.75)
    return found[0] if found else None
