"""Fuzzing the spec path: random valid and broken specs never raise anything but our own SpecError.

Three strategies: property-based (hypothesis) structured mutations of the demo specs (a leaf replaced by
a random value of another type or unit, a key dropped or added, a list emptied) and raw text corruption
of a spec file (characters inserted, deleted, replaced), 1,000 examples each; and the structure-aware
mutator of tests/fuzz_specs.py (units swapped, values scaled by 10^±300, empty strings, unicode and
control characters, wrong types, keys misspelt), 2,500 cases from a fixed seed in the normal run and
60,000 more under ``pytest -m long``.

The property (tests/fuzz_specs.py): a one-line SpecError located at the file, or a Design whose every
number is finite (no NaN, no infinity, no underflow) and whose check messages print no 'nan'.
"""

import copy
import os

import fuzz_specs
import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from specgen.api import demo_specs, design_text
from specgen.catalog.loader import load_catalog
from specgen.errors import DesignOutOfRange, SpecError

CAT = load_catalog(None)
SPECS = {p.name: p.read_text() for p in demo_specs()}
DATA = {name: yaml.safe_load(text) for name, text in SPECS.items()}

units = st.sampled_from(["V", "A", "Hz", "mm", "T", "degC", "W", "uH", "ohm", "kHz", "m", "%", "", "VA", "K"])
numbers = st.one_of(st.integers(-10**12, 10**12), st.floats(allow_nan=True, allow_infinity=True),
                    st.sampled_from([0, -1, 1e-30, 1e30, 0.5]))
quantities = st.builds(lambda n, u: f"{n} {u}".strip(), numbers, units)
scalars = st.one_of(st.none(), st.booleans(), numbers, quantities, st.text(max_size=20),
                    st.sampled_from(["auto", "auto-litz", "auto-tiw", "cw", "ccw", "1", "99", "primary",
                                     "secondary", "main", "shield", "centre", "spacer", "none", "square",
                                     "unipolar", "EI-125", "T-GO-100X60X45", "AWG20-G2", "LITZ-60X0.10"]))
values = st.recursive(scalars, lambda inner: st.one_of(st.lists(inner, max_size=3),
                                                       st.dictionaries(st.text(max_size=8), inner, max_size=3)),
                      max_leaves=6)


def paths(obj, prefix=()):
    yield prefix
    if isinstance(obj, dict):
        for k, v in obj.items():
            yield from paths(v, prefix + (k,))
    elif isinstance(obj, list):
        for i, v in enumerate(obj):
            yield from paths(v, prefix + (i,))


def mutate(data, path, action, value):
    data = copy.deepcopy(data)
    if not path:
        return value if action == "replace" else data
    parent = data
    for k in path[:-1]:
        parent = parent[k]
    key = path[-1]
    if action == "replace":
        parent[key] = value
    elif action == "delete":
        del parent[key]
    elif action == "add" and isinstance(parent, dict):
        parent[f"extra_{abs(hash(str(value))) % 100}"] = value
    elif action == "empty" and isinstance(parent[key], (list, dict)):
        parent[key] = type(parent[key])()
    return data


def check(text: str, name: str = "fuzz.yaml") -> None:
    hard, _soft = fuzz_specs.check(text, CAT, name)
    assert not hard, hard


@st.composite
def mutated_specs(draw):
    name = draw(st.sampled_from(sorted(DATA)))
    data = DATA[name]
    all_paths = list(paths(data))
    path = draw(st.sampled_from(all_paths))
    action = draw(st.sampled_from(["replace", "replace", "replace", "delete", "add", "empty"]))
    for _ in range(draw(st.integers(0, 2))):     # sometimes more than one mutation
        data = mutate(data, path, action, draw(values))
        all_paths = list(paths(data))
        path = draw(st.sampled_from(all_paths))
    data = mutate(data, path, action, draw(values))
    return yaml.safe_dump(data, allow_unicode=True, sort_keys=False)


@pytest.mark.slow
@settings(max_examples=1000, deadline=None, suppress_health_check=list(HealthCheck))
@given(mutated_specs())
def test_structured_mutations_raise_only_spec_errors(text):
    check(text)


@st.composite
def corrupted_text(draw):
    name = draw(st.sampled_from(sorted(SPECS)))
    text = SPECS[name]
    for _ in range(draw(st.integers(1, 4))):
        i = draw(st.integers(0, len(text)))
        op = draw(st.sampled_from(["insert", "delete", "replace"]))
        chunk = draw(st.text(alphabet=st.sampled_from(list(":-[]{}#&*!|>'\"\t\n %@`,0123456789aZ\u00e9\u2013")),
                             min_size=1, max_size=6))
        if op == "insert":
            text = text[:i] + chunk + text[i:]
        elif op == "delete":
            text = text[:i] + text[i + len(chunk):]
        else:
            text = text[:i] + chunk + text[i + len(chunk):]
    return text


@pytest.mark.slow
@settings(max_examples=1000, deadline=None, suppress_health_check=list(HealthCheck))
@given(corrupted_text())
def test_corrupted_text_raises_only_spec_errors(text):
    check(text)


def _report(cases: list) -> str:
    return "\n".join(f"case {i}: {problems[:3]}\n{text}" for i, text, problems in cases[:3])


@pytest.mark.slow
def test_structure_aware_mutants_fixed_seed():
    """2,500 mutants of the demo specs (seed 20261202): no traceback, no non-finite number, every refusal
    one located line, and every result of a design inside its dimension's physical range (a design beyond
    it is refused by specgen.design.bounds)."""
    hard, soft = fuzz_specs.run(2500, 20261202, CAT)
    assert not hard, _report(hard)
    assert not soft, _report(soft)


@pytest.mark.parametrize("name", ["nan", "NaN", "inf", "Infinity"])
def test_a_winding_named_like_a_non_finite_number_is_refused(name):
    """Long run seed 2, case 9920: a winding named 'nan' printed 'winding nan: ...' in its check messages."""
    text = SPECS["BH-3305.yaml"]
    assert "  - name: L\n" in text
    with pytest.raises(SpecError, match="reads as a number"):
        design_text(text.replace("  - name: L\n", f"  - name: {name!r}\n", 1), "BH-3305.yaml", CAT)


@pytest.mark.parametrize("edit, field", [
    (("  diode_drop: 0.5 V", "  diode_drop: 500 V"), "clamp_power_w"),             # long run seed 4, case 7083
    (("current: 0.05 A", "current: 50000 A"), "peak_current_a"),                   # long run seed 4, case 5465
])
def test_results_beyond_the_physical_range_are_refused_in_one_line(edit, field):
    """Mutants the long run found: each designed (refused by failing checks) with a result beyond any part
    (a 1.4 GW clamp loss, a 234 kA peak), printed as such. Now one line at the file: either the result's
    range (naming the result) or, where the design's own temperature or range gate stops it first (the
    clamp case now ends in thermal runaway), that gate's located reason."""
    text = SPECS["BH-7065.yaml"]
    assert edit[0] in text
    with pytest.raises(SpecError) as info:
        design_text(text.replace(edit[0], edit[1], 1), "BH-7065.yaml", CAT)
    message = str(info.value)
    assert "\n" not in message and message.startswith("BH-7065.yaml")
    assert (message.startswith(f"BH-7065.yaml: the design leads to {field} = ")
            or isinstance(info.value, DesignOutOfRange)), message


@pytest.mark.slow
@pytest.mark.long
@pytest.mark.parametrize("seed", [1, 2, 3, 4, 5, 6])
def test_structure_aware_mutants_long_run(seed):
    """10,000 mutants per seed (``pytest -m long``); SPECGEN_FUZZ_CASES sets another count."""
    hard, soft = fuzz_specs.run(int(os.environ.get("SPECGEN_FUZZ_CASES", "10000")), seed, CAT)
    print(f"seed {seed}: {len(hard)} with hard problems, {len(soft)} with values outside a physical range")
    for _i, _text, problems in soft[:20]:
        print("  soft:", problems[:2])
    assert not hard, _report(hard)
    assert not soft, _report(soft)
