"""Read a route file's YAML into plain Python data, keeping every node's position.

The document is composed with ruamel.yaml (YAML 1.2, safe loader, C parser where
installed) into a
node tree, and the tree is turned into plain ``dict``/``list``/``str``/``int``/
``float``/``bool``/``None`` values by :func:`read_yaml` itself, so that

* every value and every mapping key keeps its line and column (:class:`Positions`),
  addressed by the same path tuples pydantic uses in its error locations
  (``("steps", 2, "charges", 1, "equiv")``);
* a duplicate key is an error naming both lines, never a silent overwrite;
* no tag outside the YAML core schema is accepted, so loading never constructs an
  arbitrary object;
* anchors and aliases work, but the expanded document is capped in size.

Problems are collected, not raised one at a time, so that a file shows all of them.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

from ruamel.yaml import YAML
from ruamel.yaml.error import MarkedYAMLError, YAMLError
from ruamel.yaml.nodes import MappingNode, Node, ScalarNode, SequenceNode

from routeplan.errors import Location, Problem
from routeplan.vocab import Severity

__all__ = ["Path", "Positions", "read_yaml", "format_path", "MAX_NODES"]

#: A key path inside the document: mapping keys (str) and list indexes (int).
Path = tuple

#: Largest number of values a document may expand to (anchors and aliases included).
MAX_NODES = 1_000_000

_CORE = "tag:yaml.org,2002:"
_SCALAR_TAGS = {f"{_CORE}{t}" for t in ("str", "int", "float", "bool", "null", "timestamp")}
_STR, _TIMESTAMP = f"{_CORE}str", f"{_CORE}timestamp"
_IDENT = re.compile(r"^[A-Za-z0-9_][A-Za-z0-9_\-]*$")


def format_path(path: Path) -> str:
    """Render a key path the way messages show it: ``steps[2].charges[1].equiv``.

    List indexes count from 0.  A mapping key that is not a plain identifier is
    quoted: ``materials["4-Br phenol"]``.

    Examples
    --------
    >>> format_path(("steps", 2, "charges", 1, "equiv"))
    'steps[2].charges[1].equiv'
    >>> format_path(("materials", "Pd(OAc)2", "assay"))
    'materials["Pd(OAc)2"].assay'
    """
    out = ""
    for part in path:
        if isinstance(part, int):
            out += f"[{part}]"
        elif _IDENT.match(str(part)):
            out += ("." if out else "") + str(part)
        else:
            out += f'["{part}"]'
    return out


@dataclass
class Positions:
    """Line and column (1-based) of every value and mapping key of a document.

    Attributes
    ----------
    file : str
        File name for messages.
    values : dict
        Path -> (line, column) of the value node at that path.
    keys : dict
        Path -> (line, column) of the mapping key that leads to the path.
    """

    file: str
    values: dict = field(default_factory=dict)
    keys: dict = field(default_factory=dict)

    def known(self, path: Path) -> Path:
        """The longest prefix of ``path`` that exists in the document."""
        path = tuple(path)
        while path and path not in self.values:
            path = path[:-1]
        return path

    def at(self, path: Path, *, key: bool = False, show: Path | None = None) -> Location:
        """Location of ``path`` (its key with ``key=True``), shown as ``show``.

        When ``path`` does not exist, the position of its longest existing prefix is
        used.  The key path shown is ``show`` if given, else ``path``.
        """
        path = tuple(path)
        found = self.known(path)
        table = self.keys if key and found == path and path in self.keys else self.values
        line, column = table.get(found, (None, None))
        shown = format_path(path if show is None else show)
        return Location(self.file, line, column, shown or None)


def _tag(node: Node) -> str:
    return str(node.tag).replace(_CORE, "!!")


def _mark(node: Node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


class _Builder:
    """Turns a composed node tree into plain data, recording positions and problems."""

    def __init__(self, yaml: YAML, file: str) -> None:
        self.constructor = yaml.constructor
        self.pos = Positions(file)
        self.problems: list[Problem] = []
        self.count = 0

    def problem(self, node: Node, path: Path, message: str, hint: str | None = None) -> None:
        line, column = _mark(node)
        loc = Location(self.pos.file, line, column, format_path(path) or None)
        self.problems.append(Problem(Severity.ERROR, message, loc, hint=hint))

    def build(self, node: Node, path: Path, depth: int = 0) -> Any:
        self.count += 1
        if self.count > MAX_NODES:
            raise _TooLarge()
        if depth > 60:
            self.problem(node, path, "the document is nested too deeply (more than 60 levels)")
            return None
        self.pos.values.setdefault(path, _mark(node))
        tag = str(node.tag)
        if isinstance(node, ScalarNode):
            if tag not in _SCALAR_TAGS:
                self.problem(node, path, f"the YAML tag '{_tag(node)}' is not allowed in a route file",
                             "write a plain value without a tag")
                return None
            if tag == _STR or tag == _TIMESTAMP:
                # what ruamel's safe constructor gives for a string, without its per-node
                # bookkeeping (most of a route's scalars); a date is only ever free text here
                return node.value
            try:
                return self.constructor.construct_object(node, deep=True)
            except (YAMLError, ValueError, TypeError):
                self.problem(node, path, f"'{node.value}' cannot be read as {tag.rsplit(':', 1)[-1]}")
                return None
        if isinstance(node, SequenceNode):
            if tag != f"{_CORE}seq":
                self.problem(node, path, f"the YAML tag '{_tag(node)}' is not allowed in a route file",
                             "write a plain list without a tag")
                return None
            return [self.build(item, path + (i,), depth + 1) for i, item in enumerate(node.value)]
        if isinstance(node, MappingNode):
            if tag != f"{_CORE}map":
                self.problem(node, path, f"the YAML tag '{_tag(node)}' is not allowed in a route file",
                             "write a plain mapping without a tag")
                return None
            out: dict[str, Any] = {}
            first_line: dict[str, int] = {}
            pairs = self.decimal_commas(node, path) if node.flow_style else node.value
            for key_node, value_node in pairs:
                if not isinstance(key_node, ScalarNode):
                    self.problem(key_node, path, "a key must be a plain word, not a list or a mapping")
                    continue
                key = str(key_node.value)
                key_tag = str(key_node.tag)
                if key_tag == f"{_CORE}merge" or key == "<<" and key_node.style is None:
                    self.problem(key_node, path, "merge keys ('<<') are not supported in route files",
                                 "write the keys out in full")
                    continue
                if key_tag not in _SCALAR_TAGS and key_tag != f"{_CORE}merge":
                    self.problem(key_node, path, f"the YAML tag '{_tag(key_node)}' is not allowed in a route file",
                                 "write the key without a tag")
                    continue
                if key in first_line:
                    self.problem(key_node, path + (key,), f"duplicate key '{key}'",
                                 f"it is already given on line {first_line[key]}; keep one of them")
                    continue
                key_mark = _mark(key_node)
                first_line[key] = key_mark[0]
                here = path + (key,)
                self.pos.keys.setdefault(here, key_mark)
                if isinstance(value_node, ScalarNode) and value_node.value == "" and not value_node.style:
                    self.pos.values.setdefault(here, key_mark)  # 'key:' with nothing after
                out[key] = self.build(value_node, here, depth + 1)
            return out
        self.problem(node, path, "unexpected YAML node")  # pragma: no cover - no other kinds
        return None


    def decimal_commas(self, node: MappingNode, path: Path) -> list:
        """The pairs of a flow mapping, a number split at a decimal comma joined again.

        In ``{material: Et3N, equiv: 1,2}`` YAML reads ``equiv: 1`` and a key ``2`` with
        no value; in ``{density: 1,07 g/mL}`` ``density: 1`` and a key ``07 g/mL``.  A
        plain value ending in a digit, a comma with nothing around it, and a plain key
        starting with a digit that has no value are a decimal comma: it is reported as
        such (an error, placed at the value), and the pair is read with a decimal point,
        so that no second message about an unknown key or a missing unit follows.
        """
        pairs = list(node.value)
        out = []
        i = 0
        while i < len(pairs):
            key_node, value_node = pairs[i]
            nxt = pairs[i + 1] if i + 1 < len(pairs) else None
            if nxt is not None and _split_number(value_node, *nxt):
                joined = f"{value_node.value}.{nxt[0].value}"
                line, column = _mark(value_node)
                where = Location(self.pos.file, line, column, format_path(path + (str(key_node.value),)))
                self.problems.append(Problem(
                    "error", f"decimal comma in '{value_node.value},{nxt[0].value}': YAML reads the comma of "
                    f"a {{...}} mapping as the end of the value, leaving {value_node.value} and a key "
                    f"'{nxt[0].value}'", where, hint=f"decimal comma, write {joined}"))
                tag = f"{_CORE}float" if re.fullmatch(r"[0-9]+\.[0-9]+", joined) else f"{_CORE}str"
                out.append((key_node, ScalarNode(tag, joined, value_node.start_mark, nxt[1].end_mark)))
                i += 2
                continue
            out.append((key_node, value_node))
            i += 1
        return out


def _split_number(value_node: Node, next_key: Node, next_value: Node) -> bool:
    """Whether ``value_node`` and the following key are one number split at a decimal comma."""
    plain = (isinstance(value_node, ScalarNode) and isinstance(next_key, ScalarNode)
             and isinstance(next_value, ScalarNode) and not value_node.style and not next_key.style)
    # the cheap tests first: almost every pair fails on a next key that has a value
    return (plain and next_value.value == ""
            and re.search(r"(?:^|[^0-9A-Za-z.])[0-9]+$", value_node.value) is not None
            and re.match(r"[0-9]", next_key.value) is not None
            and next_key.start_mark.line == value_node.end_mark.line
            and next_key.start_mark.index == value_node.end_mark.index + 1)


class _TooLarge(Exception):
    pass


def _reader_position(text: str, position: int) -> tuple[int, int]:
    before = text[:position]
    line = before.count("\n") + 1
    column = position - (before.rfind("\n") + 1) + 1
    return line, column


def read_yaml(text: str, file: str) -> tuple[Any, Positions, list[Problem]]:
    """Compose ``text`` as one YAML 1.2 document and turn it into plain data.

    Parameters
    ----------
    text : str
        The document.
    file : str
        File name for messages.

    Returns
    -------
    data : object
        Plain data; ``None`` for an empty document or when the YAML is malformed.
    positions : Positions
        Line and column of every value and key.
    problems : list of Problem
        Syntax errors, duplicate keys, disallowed tags; empty when all is well.
    """
    # ruamel's C parser (ruamel.yaml.clib) composes five times faster than the pure-Python
    # one and keeps the same marks and YAML 1.2 tags; the pure one serves where it is absent
    yaml = YAML(typ="safe", pure=False)
    yaml.version = (1, 2)
    try:
        node = yaml.compose(text)
    except MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line, column = (mark.line + 1, mark.column + 1) if mark else (None, None)
        what = " ".join(p for p in (exc.context, exc.problem) if p) or "malformed YAML"
        return None, Positions(file), [Problem(Severity.ERROR, f"this is not valid YAML: {what}",
                                               Location(file, line, column))]
    except YAMLError as exc:
        position = getattr(exc, "position", None)
        line, column = _reader_position(text, position) if isinstance(position, int) else (None, None)
        char = getattr(exc, "character", None)
        if isinstance(char, int):  # the C parser reports the code point
            char = chr(char)
        what = f"the character {char!r} is not allowed in YAML" if char is not None else str(exc)
        return None, Positions(file), [Problem(Severity.ERROR, f"this is not valid YAML: {what}",
                                               Location(file, line, column))]
    except RecursionError:
        return None, Positions(file), [Problem(Severity.ERROR, "the document is nested too deeply",
                                               Location(file))]
    if node is None:
        return None, Positions(file), []
    builder = _Builder(yaml, file)
    try:
        data = builder.build(node, ())
    except _TooLarge:
        return None, builder.pos, [Problem(
            Severity.ERROR, f"the document expands to more than {MAX_NODES} values (anchors and aliases "
            "included); a route file is far smaller", Location(file))]
    return data, builder.pos, builder.problems
