"""Safe YAML with a line mark on every key, duplicate keys rejected, and located readers.

PyYAML silently keeps the last of two equal keys, which would let a spec carry two different turn
counts; here a duplicate is an error at the second key's line. Every mapping comes back as an
``LMap`` (a dict that knows the line of each key) and every list as an ``LList``. ``Reader`` walks
them with typed accessors, so each schema error names file, line and key path, and a key nobody
asked for (a typo such as ``voltge``) is reported instead of ignored.
"""

from __future__ import annotations

import os
from collections.abc import Iterable
from pathlib import Path
from typing import TYPE_CHECKING, Any, overload

import yaml

from . import units as _units
from .errors import SpecError

MAX_FILE_BYTES = 4 * 1024 * 1024


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
            out[key] = loader.construct_object(value_node, deep=True)
        finally:
            path.pop()
        out.key_lines[key] = key_node.start_mark.line + 1
    return out


def _construct_sequence(loader: _Loader, node: yaml.SequenceNode, deep: bool = False) -> LList:
    path = loader.__dict__.setdefault("key_path", [])
    items = []
    for i, child in enumerate(node.value):
        path.append(i)
        try:
            items.append(loader.construct_object(child, deep=True))
        finally:
            path.pop()
    out = LList(items)
    out.line = node.start_mark.line + 1
    out.item_lines = [child.start_mark.line + 1 for child in node.value]
    return out


_Loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_MAPPING_TAG, _construct_mapping)
_Loader.add_constructor(yaml.resolver.BaseResolver.DEFAULT_SEQUENCE_TAG, _construct_sequence)


def read_text(path: str | os.PathLike, what: str = "file") -> str:
    """Read a UTF-8 text file, turning every way it can be wrong into a SpecError."""
    p = Path(path)
    name = str(path)
    if p.is_dir():
        raise SpecError(f"is a folder, expected a {what}", file=name)
    try:
        size = p.stat().st_size
    except FileNotFoundError:
        raise SpecError(f"no such {what}", file=name) from None
    except OSError as exc:
        raise SpecError(f"cannot read: {exc.strerror}", file=name) from None
    if size > MAX_FILE_BYTES:
        raise SpecError(f"is {size / 1e6:.1f} MB; a spec or catalogue file is at most "
                        f"{MAX_FILE_BYTES // (1024 * 1024)} MB", file=name)
    try:
        raw = p.read_bytes()
    except OSError as exc:
        raise SpecError(f"cannot read: {exc.strerror}", file=name) from None
    return decode_text(raw, name)


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
    finally:
        loader.dispose()


def load_yaml(path: str | os.PathLike, what: str = "YAML file") -> Any:
    return parse_yaml(read_text(path, what), str(path))


# ----------------------------------------------------------------------------------------------
# Reader: typed, located access to a loaded mapping


_MISSING = object()


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

    def has(self, key: str) -> bool:
        return key in self.data and self.data[key] is not None

    def raw(self, key: str, default: Any = _MISSING) -> Any:
        self._seen.add(key)
        if key not in self.data or self.data[key] is None:
            if default is _MISSING:
                raise self.error("is required", key)
            return default
        return self.data[key]

    # -- typed accessors --
    def quantity(self, key: str, dimension: str, default: Any = _MISSING, *,
                 positive: bool = True, allow_zero: bool = False,
                 minimum: float | None = None, maximum: float | None = None) -> float:
        value = self.raw(key, default)
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
        value = self.raw(key, default)
        if value is default and default is not _MISSING:
            return value
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            if isinstance(value, str):
                try:
                    value = float(value) if not integer else int(value)
                except ValueError:
                    raise self.error(f"expected a plain number, got '{value}'", key) from None
            else:
                raise self.error(f"expected a plain number, got {_describe(value)}", key)
        if integer and (not float(value).is_integer()):
            raise self.error(f"expected a whole number, got {value}", key)
        if value != value or value in (float("inf"), float("-inf")):
            raise self.error(f"expected a finite number, got {value}", key)
        if minimum is not None and value < minimum:
            raise self.error(f"must be at least {minimum:g}, got {value}", key)
        if maximum is not None and value > maximum:
            raise self.error(f"must be at most {maximum:g}, got {value}", key)
        return int(value) if integer else float(value)

    def integer(self, key: str, default: Any = _MISSING, *, minimum: int | None = None,
                maximum: int | None = None) -> int:
        return self.number(key, default, minimum=minimum, maximum=maximum, integer=True)  # type: ignore[return-value]

    def text(self, key: str, default: Any = _MISSING, *, max_len: int = 2000) -> str:
        value = self.raw(key, default)
        if value is default and default is not _MISSING:
            return value
        if isinstance(value, bool) or isinstance(value, (dict, list)):
            raise self.error(f"expected text, got {_describe(value)}", key)
        text = str(value)
        if len(text) > max_len:
            raise self.error(f"is {len(text):,} characters long; at most {max_len:,} are allowed", key)
        return text

    def choice(self, key: str, choices: Iterable[str], default: Any = _MISSING) -> str:
        choices = list(choices)
        value = self.raw(key, default)
        if value is default and default is not _MISSING:
            return value
        text = str(value).strip().lower() if not isinstance(value, (dict, list)) else None
        if text not in choices:
            raise self.error(f"expected one of {', '.join(choices)}; got {_describe(value)}", key)
        return text

    def boolean(self, key: str, default: Any = _MISSING) -> bool:
        value = self.raw(key, default)
        if isinstance(value, bool):
            return value
        raise self.error(f"expected true or false, got {_describe(value)}", key)

    def decimal(self, key: str, default: Any = _MISSING):
        """Money: read as Decimal from its text, never through a float."""
        from decimal import Decimal, InvalidOperation

        value = self.raw(key, default)
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
        value = self.raw(key, default)
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
            self.raw(key, None)
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
        value = self.raw(key, default)
        if value is default and default is not _MISSING:
            return value
        if not isinstance(value, dict):
            raise self.error(f"expected a mapping of keys, got {_describe(value)}", key)
        return Reader(value, self.file, self._key_path(key), self.line_of(key))

    def items(self, key: str, default: Any = _MISSING, *, min_items: int = 0) -> list:
        """A list of mappings, each returned as a Reader located at its item."""
        value = self.raw(key, default)
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
        value = self.raw(key, default)
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

    def done(self, also_allowed: Iterable[str] = ()) -> None:
        """Report the first key nobody read: almost always a typo."""
        allowed = self._seen | set(also_allowed)
        for key in self.data:
            if key not in allowed:
                near = _nearest(str(key), [str(k) for k in allowed])
                hint = f"; did you mean '{near}'?" if near else ""
                raise self.error(f"unknown key '{key}'{hint}", key)


def _describe(value: Any) -> str:
    return _units._describe(value)


def _nearest(word: str, candidates: list) -> str | None:
    import difflib

    found = difflib.get_close_matches(word, candidates, n=1, cutoff=0.75)
    return found[0] if found else None
