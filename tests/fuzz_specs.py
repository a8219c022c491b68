"""A structure-aware mutator of the demo specs, and the property every mutant must satisfy.

Used by tests/test_fuzz.py (a fixed-seed run of a few thousand cases in the normal test run, many more
under ``pytest -m long``) and runnable on its own to hunt: ``python tests/fuzz_specs.py 20000 7``.

The mutator works on the parsed YAML (so the mutants are mostly well-formed specs that reach the design
engine), applying one to three of: a unit swapped for another, a value scaled by 10^k up to 10^±300, an
empty string, a unicode or control-character string, a value of the wrong type, a plain number scaled,
a key deleted or misspelt, two values swapped.

The property: the spec is refused with one located line (a SpecError naming the file), or it designs
with every number finite and every physical quantity (by its unit suffix: ``_v``, ``_a``, ``_m``, ...)
inside its plausible range (``specgen.design.bounds.RANGE``); never a traceback, a hang or NaN.
"""

from __future__ import annotations

import copy
import math
import random
import re
import sys
from pathlib import Path

import yaml

ROOT = Path(__file__).resolve().parent.parent
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from specgen.api import demo_specs, design_text  # noqa: E402
from specgen.design import bounds  # noqa: E402
from specgen.errors import DesignFailed, SpecError  # noqa: E402

DEMO_DATA = {p.name: yaml.safe_load(p.read_text()) for p in demo_specs()}

UNITS = ["V", "kV", "mV", "A", "mA", "uA", "Hz", "kHz", "MHz", "mm", "um", "m", "cm", "T", "mT", "degC", "K",
         "W", "kW", "VA", "uH", "mH", "H", "nH", "ohm", "mohm", "g", "kg", "s", "us", "A/mm^2", "kV/mm", "in"]
ODD_TEXT = ["", " ", "\x1b]0;title\x07", "a\x00b", "\u202eevil", "∞", "€", "−5", "٣", "😀", "e\u0301", "\r",
            "x" * 300, "auto", "none", "core", "all", "0", "-1", "1e309", "nan", "inf", ".5", "5.", "~", "null",
            "true", "2026-13-45", "S1+S2", "P", "'", '"', "\t", "a\nb", "Ω", "µ", "°C"]
EXPONENTS = [-300, -200, -30, -12, -9, -6, -3, -1, 1, 3, 6, 9, 12, 30, 200, 300]
QUANTITY = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(\S.*)?$")

NAN_WORD = re.compile(r"\b(nan|inf|infinity)\b", re.IGNORECASE)


def _leaves(obj, prefix=()):
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _leaves(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _leaves(v, prefix + (i,))
    else:
        yield prefix, obj


def _nodes(obj, prefix=()):
    yield prefix
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from _nodes(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from _nodes(v, prefix + (i,))


def _get(data, path):
    for k in path:
        data = data[k]
    return data


def _set(data, path, value):
    _get(data, path[:-1])[path[-1]] = value


def _mutate_leaf(rng: random.Random, value):
    """A new value for one leaf, chosen by what the leaf is."""
    m = QUANTITY.match(value) if isinstance(value, str) else None
    choice = rng.random()
    if m and choice < 0.35:
        return f"{m.group(1)} {rng.choice(UNITS)}"                              # unit swapped
    if m and choice < 0.75:
        scaled = float(m.group(1)) * 10.0 ** rng.choice(EXPONENTS)
        return f"{scaled:g} {m.group(2) or ''}".strip()                          # scaled by 10^k
    if isinstance(value, (int, float)) and not isinstance(value, bool) and choice < 0.6:
        return value * 10.0 ** rng.choice(EXPONENTS) if rng.random() < 0.7 else -value
    pick = rng.random()
    if pick < 0.4:
        return rng.choice(ODD_TEXT)                                               # empty, unicode, control
    if pick < 0.8:                                                                # wrong type
        return rng.choice([None, True, False, 0, -1, 1e308, 5e-324, 10**25, [], {}, [1, 2], {"a": 1}, 3.5])
    return f"{rng.choice([0, 1, 2.5, 1e-9, 1e9])} {rng.choice(UNITS)}"


def mutate(rng: random.Random, data):
    """One to three mutations of a deep copy of ``data``."""
    data = copy.deepcopy(data)
    for _ in range(rng.choice([1, 1, 2, 3])):
        action = rng.random()
        if action < 0.75:
            leaves = [p for p, _ in _leaves(data) if p]
            if not leaves:
                break
            path = rng.choice(leaves)
            _set(data, path, _mutate_leaf(rng, _get(data, path)))
        elif action < 0.85:                                   # a key deleted or misspelt
            nodes = [p for p in _nodes(data) if p and isinstance(p[-1], str)]
            path = rng.choice(nodes)
            parent = _get(data, path[:-1])
            value = parent.pop(path[-1])
            if rng.random() < 0.5:
                key = path[-1]
                i = rng.randrange(len(key))
                parent[key[:i] + key[i + 1:] or "x"] = value
        elif action < 0.95:                                   # two values swapped
            leaves = [p for p, _ in _leaves(data) if p]
            a, b = rng.choice(leaves), rng.choice(leaves)
            va, vb = _get(data, a), _get(data, b)
            _set(data, a, vb)
            _set(data, b, va)
        else:                                                 # a list emptied or a mapping replaced
            nodes = [p for p in _nodes(data) if p and isinstance(_get(data, p), (list, dict))]
            if nodes:
                path = rng.choice(nodes)
                _set(data, path, rng.choice([[], {}, "x", None]))
    return data


def case_text(rng: random.Random) -> str:
    name = rng.choice(sorted(DEMO_DATA))
    return yaml.safe_dump(mutate(rng, DEMO_DATA[name]), allow_unicode=True, sort_keys=False)


TINY = 1e-200      # a magnitude below this is an underflow on its way, not a physical value


def problems_of_design(design) -> tuple[list[str], list[str]]:
    """(hard, soft) problems of the Design's JSON: hard is a non-finite or underflowing number or 'nan' in
    a message; soft is a finite number outside its plausible range (``bounds.outside_range``: the
    pipeline's gate refuses such a design, so a soft problem means the gate let one through)."""
    hard, soft = [], []
    data = design.to_dict()
    for path, value in bounds.leaves(data):
        if isinstance(value, str):
            if path.endswith("message") and NAN_WORD.search(value):
                hard.append(f"check message prints a non-finite number: '{value[:100]}'")
        elif not math.isfinite(value):
            hard.append(f"{path} = {value}")
        elif value != 0 and abs(value) < TINY:
            hard.append(f"{path} = {value:g} underflows")
    for path, value, dim, lowest, largest in bounds.outside_range(data):
        soft.append(f"{path} = {value:g}, outside its plausible range ({lowest} to {largest:g} {dim.si_unit})")
    return hard, soft


def check(text: str, cat, name: str = "fuzz.yaml") -> tuple[list[str], list[str]]:
    """The property for one mutant: (hard problems, soft problems); both empty: fine."""
    try:
        design = design_text(text, name, cat)
    except SpecError as err:
        msg = str(err)
        bad = []
        if not msg.startswith(name):
            bad.append(f"SpecError not located at the file: {msg[:200]}")
        if "\n" in msg:
            bad.append("SpecError spans lines")
        return bad, []
    except DesignFailed:
        return [], []
    except Exception as exc:
        return [f"{type(exc).__name__}: {str(exc)[:200]}"], []
    return problems_of_design(design)


def run(n: int, seed: int, cat) -> tuple[list, list]:
    """Run ``n`` cases from ``seed``: ([(case, text, hard problems)], [(case, text, soft problems)])."""
    rng = random.Random(seed)
    hard_cases, soft_cases = [], []
    for i in range(n):
        text = case_text(rng)
        hard, soft = check(text, cat)
        if hard:
            hard_cases.append((i, text, hard))
        if soft:
            soft_cases.append((i, text, soft))
    return hard_cases, soft_cases


if __name__ == "__main__":
    from collections import Counter

    from specgen.catalog.loader import load_catalog

    n, seed = (int(sys.argv[1]) if len(sys.argv) > 1 else 2000), (int(sys.argv[2]) if len(sys.argv) > 2 else 1)
    hard_cases, soft_cases = run(n, seed, load_catalog(None))
    for label, found in (("hard", hard_cases), ("soft", soft_cases)):
        kinds = Counter(re.sub(r"[-+]?\d[\d.e+-]*", "#", p)[:110] for _, _, ps in found for p in ps)
        print(f"{n} cases, {len(found)} with {label} problems")
        for kind, count in kinds.most_common(40):
            print(f"{count:6}  {kind}")
