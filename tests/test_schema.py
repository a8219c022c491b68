"""`specgen schema`: the JSON Schema written from the loaders accepts every shipped file and refuses the
structurally wrong files of the bad-input corpus (validated with the general-purpose ``jsonschema``
library, JSON Schema draft 2020-12, as an editor's YAML language server would)."""

import json
from pathlib import Path

import pytest
import yaml

from specgen.catalog.loader import shipped_catalog_dir
from specgen.schema import schema

jsonschema = pytest.importorskip("jsonschema")

ROOT = Path(__file__).parent
DEMO = ROOT.parent / "specgen" / "demo"
CORPUS = ROOT / "bad_inputs"


@pytest.fixture(scope="module")
def validators():
    out = {}
    for kind in ("spec", "catalog", "requirement"):
        s = schema(kind)
        jsonschema.Draft202012Validator.check_schema(s)
        out[kind] = jsonschema.Draft202012Validator(s)
    return out


def _as_json(path: Path):
    """The file as an editor's YAML server sees it: plain YAML, dates as text."""
    return json.loads(json.dumps(yaml.safe_load(path.read_text(encoding="utf-8")), default=str))


def _errors(validator, path: Path) -> list[str]:
    return [f"{'/'.join(map(str, e.absolute_path))}: {e.message}" for e in validator.iter_errors(_as_json(path))]


SPECS = sorted(DEMO.glob("BH-*.yaml")) + sorted((ROOT / "specs").glob("*.yaml"))


@pytest.mark.parametrize("path", SPECS, ids=lambda p: p.name)
def test_every_shipped_and_test_spec_validates(validators, path):
    assert _errors(validators["spec"], path) == []


@pytest.mark.parametrize("path", sorted(DEMO.glob("REQ-*.yaml")), ids=lambda p: p.name)
def test_every_demo_requirement_validates(validators, path):
    assert _errors(validators["requirement"], path) == []


@pytest.mark.parametrize("path", sorted(shipped_catalog_dir().glob("*.yaml")), ids=lambda p: p.name)
def test_every_catalogue_file_validates(validators, path):
    assert _errors(validators["catalog"], path) == []


# The bad inputs whose fault is one of structure (a key unknown or missing, a value of the wrong type, a
# word not among the choices, a count out of its limits, a number written wrongly). The others are faults
# a schema cannot see (a unit of the wrong dimension, an id not in the stock, a rule between keys).
STRUCTURAL = {
    "spec": ["spec-bad-direction", "spec-bad-status", "spec-bare-number-voltage", "spec-billion-turns",
             "spec-missing-windings", "spec-misspelt-required-key", "spec-plain-number-underscore",
             "spec-too-many-strands", "spec-top-level-list", "spec-typo-key", "spec-unknown-kind",
             "spec-unknown-waveform", "spec-wrong-type-title", "spec-zero-turns",
             "spec-inductor-bad-gap-arrangement"],
    "requirement": ["req-bare-number", "req-no-windings", "req-unknown-kind"],
    "catalog": ["catalog-unknown-section/extra.yaml", "catalog-shop-missing-labor-rate/shop.yaml"],
}


@pytest.mark.parametrize("kind, name", [(k, n) for k, names in STRUCTURAL.items() for n in names])
def test_structurally_wrong_bad_inputs_do_not_validate(validators, kind, name):
    path = CORPUS / (name if name.endswith(".yaml") else f"{name}.yaml")
    assert _errors(validators[kind], path), f"{name} validates against the {kind} schema"


def test_the_schema_follows_the_loader():
    """Keys and limits come from the loaders' own reads: the winding's turns carry the loader's bounds, the
    old spelling of a renamed key is not offered, a catalogue bobbin lists its cores, the shop's profit margin
    is required as the loader requires it."""
    spec = schema("spec")
    winding = spec["properties"]["windings"]["items"]
    assert "same_turns_as" in winding["properties"] and "match" not in winding["properties"]
    assert winding["additionalProperties"] is False and "name" in winding["required"]
    assert winding["properties"]["turns"]["anyOf"][0] == {"type": "integer", "minimum": 1, "maximum": 20000}
    cat = schema("catalog")
    bobbin = cat["properties"]["bobbins"]["items"]
    assert bobbin["properties"]["cores"] == {"type": "array"} and "core" not in bobbin["properties"]
    assert "profit_margin" in cat["properties"]["shop"]["required"]


def test_the_tracer_writes_what_a_reader_reads():
    """A made-up loader: a required quantity, an optional choice, a key probed before it is read, a closed
    mapping; the schema says each."""
    from specgen.loading import Reader
    from specgen.schema import _mapping_schema, tracing

    with tracing() as tracer:
        for data in ({"v": "5 V", "mode": "a"}, {"v": "6 V", "extra": 3}):
            r = Reader(data, "made-up.yaml")
            r.quantity("v", "voltage")
            r.choice("mode", ("a", "b"), "a")
            if r.has("extra"):
                r.integer("extra", minimum=1)
            r.done()
    out = _mapping_schema(tracer, "")
    assert out["required"] == ["v"] and out["additionalProperties"] is False
    assert out["properties"]["v"]["$ref"] == "#/$defs/quantity"
    assert out["properties"]["mode"] == {"enum": ["a", "b"]}
    assert out["properties"]["extra"]["anyOf"][0] == {"type": "integer", "minimum": 1}


def test_cli_prints_the_schema_and_refuses_an_unknown_kind(capsys):
    from specgen.cli import main

    with pytest.raises(SystemExit) as ex:
        main(["schema", "catalog"])
    assert ex.value.code == 0
    printed = json.loads(capsys.readouterr().out)
    assert printed["title"] == "specgen catalogue file" and "bobbins" in printed["properties"]
    with pytest.raises(SystemExit) as ex:
        main(["schema", "drawing"])
    err = capsys.readouterr().err.strip().splitlines()
    assert ex.value.code == 2 and len(err) == 1 and "one of spec, catalog, requirement" in err[0]
