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


# --- files that are not regular files, size limits ------------------------------------------------------

def test_only_regular_files_are_read(tmp_path):
    import os

    fifo = tmp_path / "spec.yaml"
    os.mkfifo(fifo)
    with pytest.raises(SpecError, match="is a pipe, not a regular file"):
        read_text(fifo, "spec file")               # returns at once: a FIFO is never opened for reading
    with pytest.raises(SpecError, match="is a device, not a regular file"):
        read_text("/dev/zero", "spec file")
    with pytest.raises(SpecError, match="is a device, not a regular file"):
        read_text("/dev/null", "catalogue file")


def test_size_limits_depend_on_what_is_read(tmp_path):
    from specgen.loading import MAX_FILE_BYTES, SPEC_MAX_BYTES

    big = tmp_path / "big.yaml"
    big.write_text("# " + "x" * (SPEC_MAX_BYTES + 10) + "\n")
    with pytest.raises(SpecError, match="a spec file is at most 1,048,576 bytes"):
        read_text(big, "spec file")
    with pytest.raises(SpecError, match="a requirement file is at most"):
        read_text(big, "requirement file")
    assert read_text(big, "catalogue file").startswith("# x")      # a catalogue file may be larger
    assert MAX_FILE_BYTES > SPEC_MAX_BYTES
    assert read_text(big, "spec file", limit=SPEC_MAX_BYTES * 2).startswith("# x")


# --- values PyYAML cannot build ------------------------------------------------------------------------

@pytest.mark.parametrize("text, message", [
    ("history:\n  - date: 2026-13-45\n", "x.yaml:2: history[0].date: cannot read this value (month must be in 1..12)"),
    ("a:\n  b: 2026-02-30\n", "x.yaml:2: a.b: cannot read this value (day is out of range for month)"),
    ("turns: " + "9" * 40 + "\n", "x.yaml:1: turns: a number of more than 30 digits"),
    ("turns: " + "9" * 5000 + "\n", "x.yaml:1: turns: cannot read this value (Exceeds the limit (4300 digits)"),
    ("w:\n  - 0x" + "f" * 5000 + "\n", "x.yaml:2: w[0]: a number of more than 30 digits"),
])
def test_values_yaml_cannot_build_are_located(text, message):
    assert err(text).startswith(message)


# --- the Reader: empty ids, control characters, misspelt required keys, strict numbers -----------------

def _reader(text):
    return Reader(parse_yaml(text, "s.yaml"), "s.yaml")


@pytest.mark.parametrize("text, call, message", [
    ('sleeving: ""\n', lambda r: r.text("sleeving", None), "s.yaml:1: sleeving: is empty; give a value or leave the key out"),
    ("id: '  '\n", lambda r: r.text("id"), "s.yaml:1: id: is empty"),
    ('wire: ""\n', lambda r: r.text("wire", "auto"), "s.yaml:1: wire: is empty"),
    ('title: "a\\e]0;x\\ab"\n', lambda r: r.text("title", ""), "s.yaml:1: title: holds the control character U+001B"),
    ('part: "BH\\0"\n', lambda r: r.text("part"), "s.yaml:1: part: holds the control character U+0000"),
    ('title: "a\\rb"\n', lambda r: r.text("title", ""), "s.yaml:1: title: holds the control character U+000D"),
    ('title: "a\\nb"\n', lambda r: r.text("title", "", max_len=200), "s.yaml:1: title: holds the control character U+000A"),
    ('title: "a\\x9bb"\n', lambda r: r.text("title", ""), "s.yaml:1: title: holds the control character U+009B"),
    ('title: "a\\u2066b"\n', lambda r: r.text("title", ""), "s.yaml:1: title: holds the control character U+2066"),
    ('duty: "1_0"\n', lambda r: r.number("duty"), "s.yaml:1: duty: expected a plain number, got '1_0'"),
    ("duty: nan\n", lambda r: r.number("duty"), "s.yaml:1: duty: expected a plain number, got 'nan'"),
    ("duty: .nan\n", lambda r: r.number("duty"), "s.yaml:1: duty: expected a finite number, got nan"),
    ("duty: 1.0e400\n", lambda r: r.number("duty"), "s.yaml:1: duty: expected a finite number, got inf"),
    ('duty: "٣"\n', lambda r: r.number("duty"), "s.yaml:1: duty: expected a plain number"),
    ("n: 1000000000000000000000000000\n", lambda r: r.integer("n"), "s.yaml:1: n: must be at most"),
])
def test_reader_refusals(text, call, message):
    r = _reader(text)
    with pytest.raises(SpecError) as e:
        if "must be at most" in message:
            r.integer("n", maximum=100)
        else:
            call(r)
    assert str(e.value).startswith(message), str(e.value)


def test_empty_text_is_fine_where_empty_is_the_default():
    assert _reader('title: ""\n').text("title", "") == ""
    assert _reader("notes: |\n  line one\n  line two\n").text("notes", "", max_len=5000) == "line one\nline two\n"


def test_a_misspelt_required_key_is_named():
    r = _reader("operating:\n  freqency: 50 Hz\n  ambient: 40 degC\n").mapping("operating")
    with pytest.raises(SpecError) as e:
        r.quantity("frequency", "frequency")
    assert str(e.value) == "s.yaml:2: operating.frequency: is required; did you mean it by 'freqency' (line 2)?"
    with pytest.raises(SpecError) as e:
        r.quantity("cooling_fan", "frequency")
    assert str(e.value) == "s.yaml:1: operating.cooling_fan: is required"
