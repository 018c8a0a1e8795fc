"""YAML with positions: safe loading and its limits."""

from __future__ import annotations

import time

import pytest

from dossier.inputs.yamlpos import MAX_BYTES, Position, YamlError, load_yaml


def test_positions_of_values_and_keys() -> None:
    doc = load_yaml("a: 1\nb:\n  - x\n  - {c: 2}\n")
    assert doc.data == {"a": 1, "b": ["x", {"c": 2}]}
    assert doc.values[("a",)] == Position(1, 4)
    assert doc.values[("b", 1, "c")] == Position(4, 9)
    assert doc.keys[("b",)] == Position(2, 1)
    assert doc.where(("b", 7, "zz")) == Position(3, 3)  # the value of the nearest existing parent


def test_duplicate_keys_are_recorded() -> None:
    doc = load_yaml("a: 1\na: 2\n")
    assert doc.data == {"a": 1}
    assert doc.duplicates == [(("a",), Position(2, 1))]


def test_byte_order_mark_and_crlf_are_accepted() -> None:
    doc = load_yaml("\ufeffa: 1\r\nb: 2\r\n".encode())
    assert doc.data == {"a": 1, "b": 2}
    assert doc.values[("b",)] == Position(2, 4)


def test_dates_stay_text() -> None:
    assert load_yaml("d: 2026-12-02\n").data == {"d": "2026-12-02"}


@pytest.mark.parametrize(
    ("text", "message"),
    [
        ("a: !!python/object/apply:os.system [ls]", "YAML tag 'tag:yaml.org,2002:python/object/apply:os.system' is not allowed"),
        ("a: !!binary aGVsbG8=", "YAML tag 'tag:yaml.org,2002:binary' is not allowed"),
        ("a: 1\n---\nb: 2\n", "YAML syntax: holds more than one YAML document; one method per file"),
        (b"a: 1\x00", "file is binary (contains NUL bytes), not YAML text"),
        (b"a: \xff\n", "not UTF-8 text (byte 3)"),
        ("a: [1, 2", "YAML syntax: expected ',' or ']'"),
        ("[" * 200 + "]" * 200, "nesting deeper than 64 levels; refused"),
    ],
)
def test_refused_documents(text: str | bytes, message: str) -> None:
    with pytest.raises(YamlError) as info:
        load_yaml(text)
    assert str(info.value).startswith(message)


MAPPING_COLON = (
    "YAML syntax: a ':' where no key can start; likely this line is indented more than the key above it, "
    "or the line above lacks its ':', or a value holding ': ' needs quotes"
)


@pytest.mark.parametrize(
    ("text", "position", "message"),
    [
        ("method:\n\tid: x\n", (2, 1), "YAML syntax: a tab character; YAML indents with spaces, never tabs: replace it with spaces"),
        ("method:\n    id: x\n  title: y\n", (3, 3),
         "YAML indentation: this line is indented to column 3, where no mapping above it has its keys (the enclosing one, "
         "from line 1, has them at column 1); indent each key exactly like the other keys of its mapping"),
        ("s:\n  - id: a\n    c: []\n   - id: b\n", (4, 4),
         "YAML indentation: this line is indented to column 4, but the items of the list from line 2 start at column 3; "
         "start each '-' of one list in the same column"),
        ("s:\n  - id: a\n  c: []\n", (3, 3),
         "YAML indentation: this line is in the column of the '-' of the list from line 2 but is not an item; "
         "a key of an item is indented past its '-', like the item's first key"),
        ("a:\n  b: 1\n  - c\n", (3, 3),
         "YAML indentation: a list item ('-') among the keys of the mapping from line 2 (keys at column 3); "
         "a list goes under a key of its own, indented below it"),
        ("method:\n  id: x\n    title: y\n", (3, 10), MAPPING_COLON),  # indented more than its neighbour
        ("method:\n  id x\n  title: y\n", (3, 8), MAPPING_COLON),  # the line above lacks its ':'
        ("method:\n  title: a: b\n", (2, 11), MAPPING_COLON),  # a value holding ': '
    ],
)
def test_syntax_mistakes_made_by_hand_are_named_in_plain_words(text: str, position: tuple[int, int], message: str) -> None:
    with pytest.raises(YamlError) as info:
        load_yaml(text)
    assert (info.value.position.line, info.value.position.column) == position
    assert str(info.value) == message
    assert "<block" not in message and "token" not in message  # none of the parser's own words


def test_alias_bomb_is_refused_quickly() -> None:
    lines = ["a0: &a0 [x, x, x, x, x, x, x, x, x, x]"]
    for i in range(1, 10):
        prev = f"*a{i - 1}"
        lines.append(f"a{i}: &a{i} [{', '.join([prev] * 10)}]")
    t0 = time.perf_counter()
    with pytest.raises(YamlError, match="expands to more than 100000 values"):
        load_yaml("\n".join(lines))
    assert time.perf_counter() - t0 < 5.0  # refused by the node budget, not by running out of memory


def test_size_limit() -> None:
    with pytest.raises(YamlError, match=f"the limit is {MAX_BYTES} bytes"):
        load_yaml(b"#" * (MAX_BYTES + 1))
