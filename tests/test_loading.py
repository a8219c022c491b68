"""The located YAML loader: duplicate keys, tabs, encodings, and one-line messages with file and line."""

import pytest

from specgen.errors import SpecError
from specgen.loading import Reader, parse_yaml, read_text


def err(text, name="x.yaml"):
    with pytest.raises(SpecError) as e:
        parse_yaml(text, name)
    return str(e.value)


def test_duplicate_key_is_refused_at_the_second_key():
    # PyYAML alone keeps the last value silently; a spec could carry two turn counts
    msg = err("windings:\n  - name: P\n    turns: 40\n    turns: 42\n")
    assert msg == "x.yaml:4: windings[0].turns: duplicate key 'turns' (first on line 3)"


def test_tab_indentation_is_named():
    assert "tab" in err("a:\n\tb: 1\n")


def test_malformed_yaml_has_a_line():
    assert err("a: [1, 2\nb: 3\n").startswith("x.yaml:")


def test_non_utf8_bytes(tmp_path):
    p = tmp_path / "bad.yaml"
    p.write_bytes(b"part: BH\ntitle: caf\xe9\n")
    with pytest.raises(SpecError) as e:
        read_text(p)
    assert ":2:" in str(e.value) and "UTF-8" in str(e.value)


def test_folder_and_missing_file(tmp_path):
    with pytest.raises(SpecError, match="is a folder"):
        read_text(tmp_path)
    with pytest.raises(SpecError, match="no such"):
        read_text(tmp_path / "nope.yaml")


def test_reader_locates_nested_keys_and_typos():
    data = parse_yaml("operating:\n  frequency: 50 Hz\n  ambinet: 40 degC\n", "s.yaml")
    op = Reader(data, "s.yaml").mapping("operating")
    assert op.quantity("frequency", "frequency") == 50.0
    op.quantity("ambient", "temperature", 25.0)
    with pytest.raises(SpecError) as e:
        op.done()
    assert str(e.value) == "s.yaml:3: operating.ambinet: unknown key 'ambinet'; did you mean 'ambient'?"


def test_reader_list_items_carry_their_own_line():
    data = parse_yaml("w:\n  - {v: 1 V}\n  - {v: 2 Hz}\n", "s.yaml")
    items = Reader(data, "s.yaml").items("w")
    with pytest.raises(SpecError) as e:
        items[1].quantity("v", "voltage")
    assert str(e.value) == "s.yaml:3: w[1].v: expected a voltage, got '2 Hz'"


def test_negative_and_zero_lengths_refused():
    data = parse_yaml("a: -1 mm\nb: 0 mm\n", "s.yaml")
    r = Reader(data, "s.yaml")
    with pytest.raises(SpecError, match="greater than zero"):
        r.quantity("a", "length")
    with pytest.raises(SpecError, match="greater than zero"):
        r.quantity("b", "length")
