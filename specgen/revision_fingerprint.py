"""The content fingerprint of a spec and the catalogue entries its design used.

``fingerprint(spec, catalog_entries)`` is SHA-256 over ``canonical(...)`` of the spec's content and
every catalogue entry the design used, so a change of a catalogue entry changes the fingerprint of
each part built from it. The top-level keys ``history``, ``status`` and ``revision`` are left out:
they describe the release, not what is released. Releasing (which writes exactly those three
keys) therefore does not change what was fingerprinted, and ``verify`` can recompute the
fingerprint from the released file and compare it with the one in its history entry; marking a
spec obsolete does not disturb it either. The revision letter is tied to the fingerprint by the
history entry that records both. The hashed payload is ``{"scheme": FINGERPRINT_SCHEME, "spec":
<content>, "catalog": {id: entry}}``; the scheme string keeps a later change of these rules from
ever matching an old fingerprint by accident. A release may also record ``parts:``, a short
fingerprint per top-level spec key and per catalogue entry (``component_fingerprints``), so that
``check_release`` can say *what* changed, not only that something did.

``canonical`` normalises what a reader would not call a change: mapping order, surrounding and
repeated whitespace in strings (so ``"230  V"`` == ``"230 V"``, and re-wrapping a note does not
count), Unicode composition (NFC), ``120.0`` == ``120``. List order is kept: the order of
windings and layers is the build order. ``"230V"`` and ``"230 V"`` stay different (a unit string
is not parsed here; such an edit after release is reported, which errs on the safe side).

References
----------
FIPS 180-4, Secure Hash Standard (SHA-256), via Python's hashlib.
RFC 8259 (JSON) for the canonical text, via Python's json module.
"""

from __future__ import annotations

import datetime as _dt
import hashlib
import json
import math
import re
import sys
import unicodedata
from collections.abc import Mapping, Sequence
from collections.abc import Set as AbstractSet
from decimal import Decimal
from typing import Any

from .errors import SpecError

#: Top-level spec keys that describe the release rather than the part (see module docstring).
EXCLUDED_KEYS = frozenset({"history", "status", "revision"})
#: Goes into every fingerprint so a future change of the normalisation rules cannot collide.
FINGERPRINT_SCHEME = "specgen-fingerprint-1"

_WS = re.compile(r"\s+")


def _norm_str(text: str) -> str:
    return _WS.sub(" ", unicodedata.normalize("NFC", str(text))).strip()


def _is_ruamel_bool(obj: Any) -> bool:
    mod = sys.modules.get("ruamel.yaml.scalarbool")
    return mod is not None and isinstance(obj, mod.ScalarBoolean)


def _norm_number(x: float) -> Any:
    if math.isnan(x):
        return {"$float": "nan"}
    if math.isinf(x):
        return {"$float": "inf" if x > 0 else "-inf"}
    if x.is_integer() and abs(x) < 2 ** 63:
        return int(x)   # 120.0 and 120 are the same turn count; -0.0 becomes 0
    return float(x)


def _norm_key(key: Any) -> str:
    if isinstance(key, str):
        return _norm_str(key)
    value = normalise(key)
    if isinstance(value, str):
        return value
    return json.dumps(value, sort_keys=True, separators=(",", ":"), ensure_ascii=False)


def normalise(obj: Any, path: str = "", line: int | None = None) -> Any:
    """``obj`` as plain JSON types with the normalisation rules of ``canonical`` applied.

    Accepts any Mapping and Sequence (PyYAML, ruamel.yaml or our own dict/list subclasses),
    str, int, float, bool, None, Decimal, date/datetime and sets.
    """
    if obj is None or isinstance(obj, bool):
        return obj
    if _is_ruamel_bool(obj):
        return bool(obj)
    if isinstance(obj, str):
        return _norm_str(obj)
    if isinstance(obj, int):
        return int(obj)
    if isinstance(obj, float):
        return _norm_number(float(obj))
    if isinstance(obj, Decimal):
        return _norm_number(float(obj))
    if isinstance(obj, (_dt.date, _dt.time)):   # datetime is a date
        return obj.isoformat()
    if isinstance(obj, Mapping):
        out: dict[str, Any] = {}
        for key, value in obj.items():
            k = _norm_key(key)
            where = f"{path}.{k}" if path else k
            at = (getattr(obj, "key_lines", None) or {}).get(key, line)    # the loader's key lines
            if k in out:
                raise SpecError(f"two keys read as {k!r} once spaces are normalised", line=at, path=where)
            out[k] = normalise(value, where, at)
        return out
    if isinstance(obj, AbstractSet):
        items = [normalise(v, path, line) for v in obj]
        return sorted(items, key=lambda v: json.dumps(v, sort_keys=True, ensure_ascii=False))
    if isinstance(obj, Sequence) and not isinstance(obj, (bytes, bytearray)):
        lines = getattr(obj, "item_lines", None) or [line] * len(obj)
        return [normalise(v, f"{path}[{i}]", lines[i] if i < len(lines) else line) for i, v in enumerate(obj)]
    value = getattr(obj, "value", None)   # ruamel TaggedScalar and the like
    if isinstance(value, str):
        return _norm_str(value)
    what = "binary data (a !!binary value)" if isinstance(obj, (bytes, bytearray)) else \
        f"a value of type {type(obj).__name__}"
    raise SpecError(f"cannot fingerprint {what}; write it as text", line=line, path=path or None)


def canonical(obj: Any) -> bytes:
    """Canonical UTF-8 JSON of ``obj``: sorted keys, no whitespace, normalised values.

    Two inputs a reader would call the same (different key order, ``"230  V"`` vs ``"230 V"``,
    ``120.0`` vs ``120``) give the same bytes; list order is kept (winding order matters).
    """
    return json.dumps(normalise(obj), sort_keys=True, separators=(",", ":"),
                      ensure_ascii=False, allow_nan=False).encode("utf-8")


def spec_content(spec_data: Mapping) -> dict:
    """The spec without the keys that describe its release (``EXCLUDED_KEYS``)."""
    if not isinstance(spec_data, Mapping):
        raise SpecError("a spec is a mapping of keys")
    return {k: v for k, v in spec_data.items() if k not in EXCLUDED_KEYS}


def fingerprint(spec_data: Mapping, catalog_entries: Mapping[str, Mapping]) -> str:
    """SHA-256 hex of the spec's content and of every catalogue entry the design used.

    ``catalog_entries`` maps each catalogue id the design used to its raw YAML mapping, as
    ``specgen.api.catalog_entries`` builds it: what changes the part and nothing else. Covered: the
    whole spec except ``history``, ``status`` and ``revision`` (module docstring); each catalogue
    entry the design read, without its ``source`` text and prices; the shop figures the design
    reads (current densities, bulge factor, lead length, flux limit, hot-spot margin, hipot and
    insulation-resistance rules, test tolerances). Not covered: the shop's name, currency, rates,
    margin and labor times, the number format, where the register lives, any ``source:`` text.

    References: FIPS 180-4 (SHA-256) through hashlib.
    """
    # each side normalised on its own so an error names the spec's key path and line (or the catalogue
    # entry); normalising again inside canonical() changes nothing
    lines = getattr(spec_data, "key_lines", None) or {}
    content: dict[str, Any] = {}
    for key, value in spec_content(spec_data).items():
        k = _norm_key(key)
        if k in content:
            raise SpecError(f"two keys read as {k!r} once spaces are normalised", line=lines.get(key), path=k)
        content[k] = normalise(value, k, lines.get(key))
    payload = {"scheme": FINGERPRINT_SCHEME, "spec": normalise(content),
               "catalog": normalise(dict(catalog_entries or {}), "catalog")}
    return hashlib.sha256(canonical(payload)).hexdigest()


def short(fp: str) -> str:
    """The first 12 hex digits of a fingerprint, for documents and messages."""
    return str(fp)[:12]


def component_fingerprints(spec_data: Mapping, catalog_entries: Mapping[str, Mapping]
                           ) -> dict[str, str]:
    """Short fingerprints of each part of the input: ``spec/<top-level key>``, ``catalog/<id>``.

    Stored (optionally) with a release as ``parts:``, they let ``check_release`` say *what*
    changed after the release; the full fingerprint stays the integrity check.
    """
    out = {}
    for key, value in spec_content(spec_data).items():
        name = f"spec/{_norm_key(key)}"
        out[name] = short(hashlib.sha256(canonical([name, value])).hexdigest())
    for cid, entry in (catalog_entries or {}).items():
        name = f"catalog/{_norm_key(cid)}"
        out[name] = short(hashlib.sha256(canonical([name, entry])).hexdigest())
    return dict(sorted(out.items()))


def _component_label(name: str) -> str:
    kind, _, what = name.partition("/")
    return f"catalogue entry {what}" if kind == "catalog" else what


def changed_components(recorded: Mapping[str, Any], current: Mapping[str, str]) -> list[str]:
    """What differs between recorded and current ``component_fingerprints``, one phrase each."""
    out = []
    for name in sorted(set(recorded) | set(current)):
        label = _component_label(name)
        if name not in current:
            gone = "removed" if name.startswith("spec/") else "no longer used"
            out.append(f"{label} {gone}")
        elif name not in recorded:
            out.append(f"{label} added" if name.startswith("spec/") else f"{label} now used")
        elif str(recorded[name]) != current[name]:
            out.append(f"{label} changed")
    return out
