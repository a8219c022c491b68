"""JSON Schema of the spec, the catalogue files and the requirement files (``specgen schema KIND``).

The schema is written from the loaders themselves, not from a second description of the files: each
loader reads the shipped files (the demo parts and requirements, the starter specs of ``specgen new``
and the shipped catalogue) while a tracer listens to every ``loading.Reader``. Each key a loader asks
for reports its type (a quantity and its dimension, a number and its limits, a choice and its words,
text, a mapping, a list), whether it has a default (a key without one is required wherever that
mapping is read the same way in every file), and which mappings refuse keys nobody read. A key the
loader reads changes the schema with it.

What a JSON Schema cannot say stays with the loader (``specgen design`` / ``catalog check`` report it):
a unit of the right dimension but the wrong kind ('230 A' for a voltage), a physical range, ids that must
exist in the catalogue, cross-key rules. A key the loaders read only on a path no shipped file takes is
left open (any value) rather than refused.
"""

from __future__ import annotations

import re
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from . import loading
from .units import DIMENSIONS

KINDS = ("spec", "catalog", "requirement")

DRAFT = "https://json-schema.org/draft/2020-12/schema"

#: A value with its unit: a number, then at least one letter or unit sign ('230 V', '3.5 A/mm^2', '22 %').
#: The letters e and E alone do not count ('1e3' is a bare number, refused by the loader).
QUANTITY_PATTERN = r"^\s*[-+]?(?:[0-9]|\.[0-9]).*[A-DF-Za-df-z%°µΩ]"


@dataclass
class _Key:
    kinds: set[str] = field(default_factory=set)
    info: dict[str, Any] = field(default_factory=dict)


@dataclass
class _Mapping:
    keys: dict[str, _Key] = field(default_factory=dict)
    required: set[str] | None = None      # keys read without a default in every instance seen
    closed: bool = False                  # the loader refuses keys it did not read (Reader.done)
    probed: set[str] = field(default_factory=set)   # keys whose presence the loader checks first


def _pattern(path: str) -> str:
    """'windings[1].sections' -> 'windings[].sections': one schema for every item of a list."""
    return re.sub(r"\[\d+\]", "[]", path)


class Tracer:
    """What the Readers of one loader run reported, by mapping path."""

    def __init__(self) -> None:
        self.mappings: dict[str, _Mapping] = {}
        self._open: dict[int, tuple[Any, str, set[str]]] = {}

    def open(self, reader: Any) -> None:
        self._open[id(reader)] = (reader, _pattern(reader.path), set())
        self.mappings.setdefault(_pattern(reader.path), _Mapping())

    def note(self, reader: Any, key: str, kind: str, required: bool, info: dict[str, Any]) -> None:
        entry = self._open.get(id(reader))
        if entry is None:
            self.open(reader)
            entry = self._open[id(reader)]
        key_info = self.mappings[entry[1]].keys.setdefault(str(key), _Key())
        if kind != "any" or reader.has(key, probe=False):   # an untyped read of an absent key tells nothing
            key_info.kinds.add(kind)
        key_info.info.update({k: v for k, v in info.items() if v is not None})
        if required:
            entry[2].add(str(key))

    def probe(self, reader: Any, key: str) -> None:
        """The loader asked whether the key is there before reading it: the key is optional."""
        if id(reader) not in self._open:
            self.open(reader)
        m = self.mappings[_pattern(reader.path)]
        m.keys.setdefault(str(key), _Key())
        m.probed.add(str(key))

    def close(self, reader: Any, also_allowed: Any = ()) -> None:
        entry = self._open.get(id(reader))
        if entry is None:
            self.open(reader)
            entry = self._open[id(reader)]
        mapping = self.mappings[entry[1]]
        mapping.closed = True
        for key in also_allowed:                  # read elsewhere (another Reader of the same mapping)
            mapping.keys.setdefault(str(key), _Key())

    def finish(self) -> None:
        """Required keys: those every instance of a mapping read without a default."""
        for _reader, path, required in self._open.values():
            m = self.mappings[path]
            m.required = set(required) if m.required is None else m.required & required
        for m in self.mappings.values():
            m.required = (m.required or set()) - m.probed
        self._open.clear()


@contextmanager
def tracing() -> Iterator[Tracer]:
    """Every Reader created inside reports to the tracer returned (one loader run at a time)."""
    tracer = Tracer()
    before, loading.TRACER = loading.TRACER, tracer
    try:
        yield tracer
    finally:
        loading.TRACER = before
        tracer.finish()


# --------------------------------------------------------------------------------------------- the runs

def _demo_files(prefix: str) -> list[Path]:
    from .api import demo_specs

    folder = demo_specs()[0].parent
    return sorted(p for p in folder.glob(f"{prefix}*.yaml"))


def _trace_specs() -> Tracer:
    from .design.spec import parse_spec
    from .starter import KINDS as STARTER_KINDS
    from .starter import starter_text

    with tracing() as tracer:
        for path in _demo_files("BH-"):
            parse_spec(loading.load_yaml(path, "spec"), str(path))
        for kind in STARTER_KINDS:
            parse_spec(loading.parse_yaml(starter_text("BH-0000", kind), "starter"), "starter")
    return tracer


def _trace_requirements() -> Tracer:
    from .search.requirement import parse_requirement

    with tracing() as tracer:
        for path in _demo_files("REQ-"):
            parse_requirement(loading.load_yaml(path, "requirement"), str(path))
    return tracer


def _trace_catalog() -> Tracer:
    from .catalog.loader import check_catalog, shipped_catalog_dir

    with tracing() as tracer:
        check_catalog(shipped_catalog_dir())
    return tracer


# ------------------------------------------------------------------------------------------- the schema

def _key_schema(tracer: Tracer, path: str, key: str, k: _Key) -> dict[str, Any]:
    child = f"{path}.{key}" if path else key
    if "any" in k.kinds or not k.kinds:
        return {}                                 # the loader reads it raw: several forms are valid
    forms = [_form(tracer, child, kind, k.info) for kind in sorted(k.kinds)]
    return forms[0] if len(forms) == 1 else {"anyOf": forms}


def _form(tracer: Tracer, child: str, kind: str, info: dict[str, Any]) -> dict[str, Any]:
    if kind == "quantity":
        dim = DIMENSIONS[info["dimension"]]
        return {"$ref": "#/$defs/quantity", "description": f"{dim.human} with its unit, like {dim.example}"}
    if kind in ("number", "integer"):
        num: dict[str, Any] = {"type": kind}
        if info.get("minimum") is not None:
            num["minimum"] = info["minimum"]
        if info.get("maximum") is not None:
            num["maximum"] = info["maximum"]
        return {"anyOf": [num, {"$ref": "#/$defs/number_as_text"}]}
    if kind == "text":
        return {"type": ["string", "number"], "maxLength": info.get("max_len", 2000)}
    if kind == "choice":
        return {"enum": list(info["choices"])}
    if kind == "boolean":
        return {"type": "boolean"}
    if kind == "amount":
        return {"type": ["string", "number"], "description": "an amount of money, like '14.50'"}
    if kind == "percent":
        return {"type": ["string", "number"], "description": "a percentage, like '3 %' (or 0.03)"}
    if kind == "mapping":
        return _mapping_schema(tracer, child)
    if kind == "mappings":
        arr: dict[str, Any] = {"type": "array", "items": _mapping_schema(tracer, child + "[]")}
        if info.get("min_items"):
            arr["minItems"] = info["min_items"]
        return arr
    if kind == "list":
        return {"type": "array"}
    raise ValueError(f"no schema form for a key read as '{kind}'")


def _mapping_schema(tracer: Tracer, path: str) -> dict[str, Any]:
    m = tracer.mappings.get(path)
    if m is None:                                 # a mapping no shipped file fills in
        return {"type": "object"}
    out: dict[str, Any] = {"type": "object",
                           "properties": {k: _key_schema(tracer, path, k, v) for k, v in sorted(m.keys.items())}}
    if m.required:
        out["required"] = sorted(m.required)
    if m.closed:
        out["additionalProperties"] = False
    return out


def schema(kind: str) -> dict[str, Any]:
    """The JSON Schema of one kind of file: 'spec', 'catalog' (any catalogue file) or 'requirement'."""
    if kind == "spec":
        body = _mapping_schema(_trace_specs(), "")
        title = "specgen part spec"
    elif kind == "requirement":
        body = _mapping_schema(_trace_requirements(), "")
        title = "specgen requirement (input of `specgen search`)"
    elif kind == "catalog":
        from .catalog.loader import TOP_KEYS

        body = _mapping_schema(_trace_catalog(), "")
        body["properties"] = {k: body["properties"].get(k, {}) for k in TOP_KEYS}
        body["additionalProperties"] = False     # the loader refuses a section it does not know
        body.pop("required", None)               # each file holds some of the sections
        title = "specgen catalogue file"
    else:
        raise ValueError(f"kind must be one of {', '.join(KINDS)}, got '{kind}'")
    defs = {"quantity": {"type": "string", "pattern": QUANTITY_PATTERN},
            "number_as_text": {"type": "string", "pattern": f"^\\s*{loading.PLAIN_NUMBER_PATTERN}\\s*$"}}
    return {"$schema": DRAFT, "title": title, **body, "$defs": defs}
