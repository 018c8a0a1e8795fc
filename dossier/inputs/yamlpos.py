"""Safe YAML loading that remembers where every value was written.

The document is composed with PyYAML's safe loader into a node graph (no
object construction, no tags beyond the YAML core schema), then converted to
plain Python values while recording the 1-based line and column of every
key and value under its path. Duplicate keys, alias expansion beyond a node
budget, deep nesting and oversized files are refused with a located message.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass, field
from typing import Any

import yaml

__all__ = ["Position", "LoadedYaml", "YamlError", "load_yaml", "syntax_message", "MAX_BYTES", "MAX_NODES", "MAX_DEPTH"]

MAX_BYTES = 1024 * 1024
"""Largest method file read [bytes] (1 MiB)."""
MAX_NODES = 100_000
"""Largest number of values after alias expansion."""
MAX_DEPTH = 64
"""Deepest nesting of mappings and lists."""

Path_ = tuple[str | int, ...]


@dataclass(frozen=True)
class Position:
    """1-based line and column."""

    line: int
    column: int


class YamlError(Exception):
    """The text is not a YAML document we accept (the message says where and why)."""

    def __init__(self, message: str, position: Position = Position(1, 1)) -> None:
        self.position = position
        super().__init__(message)


@dataclass
class LoadedYaml:
    """Plain data plus the position of each value and of each key.

    ``values[path]`` is where the value at ``path`` starts; ``keys[path]`` is
    where the key of a mapping entry starts (used for unknown-key warnings).
    """

    data: Any
    values: dict[Path_, Position] = field(default_factory=dict)
    keys: dict[Path_, Position] = field(default_factory=dict)
    duplicates: list[tuple[Path_, Position]] = field(default_factory=list)

    def where(self, path: Path_) -> Position:
        """Position of the value at ``path``, or of its nearest parent that exists."""
        p = tuple(path)
        while p:
            if p in self.values:
                return self.values[p]
            p = p[:-1]
        return self.values.get((), Position(1, 1))


def _pos(node: yaml.Node) -> Position:
    return Position(node.start_mark.line + 1, node.start_mark.column + 1)


class _Converter:
    def __init__(self) -> None:
        self.out = LoadedYaml(None)
        self.count = 0

    def convert(self, node: yaml.Node, path: Path_, depth: int) -> Any:
        self.count += 1
        if self.count > MAX_NODES:
            raise YamlError(f"the document expands to more than {MAX_NODES} values (aliases/anchors?); refused", _pos(node))
        if depth > MAX_DEPTH:
            raise YamlError(f"nesting deeper than {MAX_DEPTH} levels; refused", _pos(node))
        self.out.values[path] = _pos(node)
        if node.tag not in _CORE_TAGS:
            raise YamlError(f"YAML tag {node.tag!r} is not allowed; plain values, lists and mappings only", _pos(node))
        if isinstance(node, yaml.MappingNode):
            result: dict[Any, Any] = {}
            for key_node, value_node in node.value:
                if not isinstance(key_node, yaml.ScalarNode):
                    raise YamlError("a mapping key must be a plain word, not a list or mapping", _pos(key_node))
                key = _scalar(key_node)
                if not isinstance(key, str):
                    key = str(key)
                sub = path + (key,)
                if key in result:
                    self.out.duplicates.append((sub, _pos(key_node)))
                    continue
                self.out.keys[sub] = _pos(key_node)
                result[key] = self.convert(value_node, sub, depth + 1)
            return result
        if isinstance(node, yaml.SequenceNode):
            return [self.convert(v, path + (i,), depth + 1) for i, v in enumerate(node.value)]
        return _scalar(node)


_CONSTRUCTOR = yaml.SafeLoader(stream="")
_CORE_TAGS = {f"tag:yaml.org,2002:{t}" for t in ("str", "int", "float", "bool", "null", "map", "seq", "timestamp")}


def _scalar(node: yaml.ScalarNode) -> Any:
    """Resolve a scalar with the safe loader's core-schema rules (int, float, bool, null, str).

    Dates and timestamps stay text (ISO 8601), as a method file means them.
    """
    value = _CONSTRUCTOR.construct_object(node, deep=True)
    if isinstance(value, (datetime.date, datetime.datetime)):
        return value.isoformat()
    return value


def syntax_message(exc: yaml.MarkedYAMLError) -> str:
    """The parser's complaint in plain words, for the mistakes people make by hand.

    Tabs, a key indented unlike its neighbours, a list item among the keys of
    a mapping and a stray ``:`` each get a sentence that says what is likely
    wrong; any other complaint is passed on as the parser words it. The
    position (line and column of ``exc.problem_mark``) is reported beside it.

    Examples
    --------
    >>> try:
    ...     load_yaml("a:\\n\\tb: 1\\n")
    ... except YamlError as e:
    ...     print(e.position, e)
    Position(line=2, column=1) YAML syntax: a tab character; YAML indents with spaces, never tabs: replace it with spaces
    """
    problem = exc.problem or exc.context or "invalid YAML"
    context, where = exc.context or "", exc.context_mark
    found_column = exc.problem_mark.column + 1 if exc.problem_mark else 0
    if "expected a single document" in str(exc):
        return "YAML syntax: holds more than one YAML document; one method per file"
    if problem.startswith("found character '\\t'"):
        return "YAML syntax: a tab character; YAML indents with spaces, never tabs: replace it with spaces"
    if problem.startswith("expected <block end>") and where is not None:
        opened = f"line {where.line + 1}"
        if "block mapping" in context and problem.endswith("'-'"):
            return (f"YAML indentation: a list item ('-') among the keys of the mapping from {opened} (keys at column "
                    f"{where.column + 1}); a list goes under a key of its own, indented below it")
        if "block mapping" in context:
            return (f"YAML indentation: this line is indented to column {found_column}, where no mapping above it has its keys "
                    f"(the enclosing one, from {opened}, has them at column {where.column + 1}); indent each key exactly "
                    "like the other keys of its mapping")
        if "block collection" in context and found_column == where.column + 1:
            return (f"YAML indentation: this line is in the column of the '-' of the list from {opened} but is not an item; "
                    "a key of an item is indented past its '-', like the item's first key")
        if "block collection" in context:
            return (f"YAML indentation: this line is indented to column {found_column}, but the items of the list from {opened} "
                    f"start at column {where.column + 1}; start each '-' of one list in the same column")
    if problem == "mapping values are not allowed here":
        return ("YAML syntax: a ':' where no key can start; likely this line is indented more than the key above it, "
                "or the line above lacks its ':', or a value holding ': ' needs quotes")
    return f"YAML syntax: {problem}"


def load_yaml(text: str | bytes) -> LoadedYaml:
    """Parse one YAML document, keeping positions.

    Parameters
    ----------
    text : str or bytes
        The file's content (UTF-8; a byte-order mark is accepted).

    Returns
    -------
    LoadedYaml

    Raises
    ------
    YamlError
        Syntax error, several documents, binary content, an oversized file,
        alias expansion beyond :data:`MAX_NODES`, nesting beyond :data:`MAX_DEPTH`.

    Examples
    --------
    >>> doc = load_yaml("a: 1\\nb:\\n  - x\\n")
    >>> doc.data, doc.values[("b", 0)]
    ({'a': 1, 'b': ['x']}, Position(line=3, column=5))
    """
    if isinstance(text, bytes):
        if len(text) > MAX_BYTES:
            raise YamlError(f"file is {len(text)} bytes; the limit is {MAX_BYTES} bytes (1 MiB)", Position(1, 1))
        if b"\x00" in text:
            raise YamlError("file is binary (contains NUL bytes), not YAML text", Position(1, 1))
        try:
            text = text.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            line = text[: exc.start].count(b"\n") + 1
            raise YamlError(f"not UTF-8 text (byte {exc.start})", Position(line, 1)) from None
    elif len(text.encode("utf-8")) > MAX_BYTES:
        raise YamlError(f"file is larger than the limit of {MAX_BYTES} bytes (1 MiB)", Position(1, 1))
    text = text.lstrip("\ufeff")
    try:
        loader = yaml.SafeLoader(text)
        try:
            node = loader.get_single_node()
        finally:
            loader.dispose()
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        pos = Position(mark.line + 1, mark.column + 1) if mark else Position(1, 1)
        raise YamlError(syntax_message(exc), pos) from None
    except yaml.YAMLError as exc:
        raise YamlError(f"YAML syntax: {exc}", Position(1, 1)) from None
    except RecursionError:
        raise YamlError(f"nesting deeper than {MAX_DEPTH} levels; refused", Position(1, 1)) from None
    if node is None:
        return LoadedYaml(None, {(): Position(1, 1)})
    conv = _Converter()
    try:
        conv.out.data = conv.convert(node, (), 0)
    except yaml.constructor.ConstructorError as exc:
        mark = exc.problem_mark
        pos = Position(mark.line + 1, mark.column + 1) if mark else Position(1, 1)
        raise YamlError(f"YAML value: {exc.problem}", pos) from None
    except RecursionError:
        raise YamlError(f"nesting deeper than {MAX_DEPTH} levels; refused", Position(1, 1)) from None
    return conv.out
