"""Reading a spec file: YAML text to plain data plus the line of every node.

PyYAML composes the node graph (with the C parser when it is available);
this module constructs plain Python data from it *itself*, so that it can

* report duplicate keys (PyYAML keeps the last one silently) with both lines,
* reject tags that would construct objects (``!!python/...``) as findings,
* bound the work an input can cause (nodes, aliases, depth, size),
* remember the 1-based line and column of every key and value by its path.

Nothing here raises on bad input: every problem becomes a ``Problem``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import yaml

try:  # the C parser is much faster; both give marks
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on the PyYAML build
    from yaml import SafeLoader as _Loader

Path = tuple  # a path into the document: keys and list indices


@dataclass(frozen=True)
class Limits:
    """Bounds on what one input file may make speccheck do (all configurable)."""

    max_bytes: int = 10 * 1024 * 1024
    max_nodes: int = 200_000  # constructed nodes, aliases expanded
    max_depth: int = 64

    def __post_init__(self) -> None:
        # nodes are built (and validated) recursively: deeper than this would exhaust Python's stack
        object.__setattr__(self, "max_depth", min(self.max_depth, MAX_DEPTH))


MAX_DEPTH = 200  # the deepest nesting any setting of max_depth allows


@dataclass(frozen=True)
class Problem:
    rule: str
    message: str
    line: int | None
    column: int | None


@dataclass
class Document:
    data: object = None
    values: dict[Path, tuple[int, int]] = field(default_factory=dict)  # path -> (line, col) of the value
    keys: dict[Path, tuple[int, int]] = field(default_factory=dict)  # path -> (line, col) of its key
    problems: list[Problem] = field(default_factory=list)
    # values set on the command line (``--set``): their paths are marked at line 0, column k for
    # the k-th of these texts, so that a finding at one can point to the command line
    settings: list[str] = field(default_factory=list)

    def mark_setting(self, path: Path, text: str) -> None:
        self.settings.append(text)
        self.values[tuple(path)] = self.keys[tuple(path)] = (0, len(self.settings))

    def where(self, path: Path, key: bool = False) -> tuple[int | None, int | None]:
        """Line and column of ``path``, or of its nearest ancestor that has one."""
        table = self.keys if key else self.values
        path = tuple(path)
        while path:
            if path in table:
                return table[path]
            if path in self.values:
                return self.values[path]
            path = path[:-1]
        return self.values.get((), (1, 1))


_SAFE_SCALARS = {
    "tag:yaml.org,2002:str",
    "tag:yaml.org,2002:int",
    "tag:yaml.org,2002:float",
    "tag:yaml.org,2002:bool",
    "tag:yaml.org,2002:null",
}
_AS_TEXT = {"tag:yaml.org,2002:timestamp", "tag:yaml.org,2002:binary"}
_NUMBERS = {"tag:yaml.org,2002:int", "tag:yaml.org,2002:float"}
# a number as people write one: decimal digits, a point, an exponent (and YAML's .inf and .nan,
# which the value grammar refuses with its own message)
_DECIMAL = re.compile(r"^[-+]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][-+]?[0-9]+)?$|^[-+]?\.(?:inf|Inf|INF|nan|NaN|NAN)$")
_STR = "tag:yaml.org,2002:str"
_MAP = "tag:yaml.org,2002:map"
_SEQ = "tag:yaml.org,2002:seq"


def _mark(node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


class _Builder:
    def __init__(self, doc: Document, limits: Limits) -> None:
        self.doc = doc
        self.limits = limits
        self.nodes = 0
        self.scalars = yaml.constructor.SafeConstructor()
        self.active: set[int] = set()
        self.stopped = False

    def problem(self, rule: str, message: str, node) -> None:
        self.doc.problems.append(Problem(rule, message, *_mark(node)))

    def build(self, node, path: Path):
        if self.stopped:
            return None
        self.nodes += 1
        if self.nodes > self.limits.max_nodes:
            self.stopped = True
            self.problem("input-limit", f"the document expands to more than {self.limits.max_nodes} "
                         "nodes (aliases included); reading stopped", node)
            return None
        if len(path) > self.limits.max_depth:
            self.stopped = True
            self.problem("input-limit", f"nesting deeper than {self.limits.max_depth} levels; reading stopped", node)
            return None
        if id(node) in self.active:
            self.problem("yaml-syntax", "an alias refers to a node that contains it (a recursive structure)", node)
            return None
        self.doc.values.setdefault(path, _mark(node))
        if isinstance(node, yaml.MappingNode):
            return self._mapping(node, path)
        if isinstance(node, yaml.SequenceNode):
            return self._sequence(node, path)
        return self._scalar(node)

    def _mapping(self, node, path: Path) -> dict:
        if node.tag != _MAP:
            self.problem("unsupported-yaml-tag", f"tag {node.tag!r} is not allowed in a spec "
                         "(speccheck never constructs objects from input)", node)
            return None
        self.active.add(id(node))
        out: dict = {}
        first: dict = {}
        for key_node, value_node in node.value:
            key = self._scalar(key_node) if isinstance(key_node, yaml.ScalarNode) else None
            if not isinstance(key_node, yaml.ScalarNode) and key_node.tag not in (_MAP, _SEQ):
                self.problem("unsupported-yaml-tag", f"tag {key_node.tag!r} is not allowed in a spec "
                             "(speccheck never constructs objects from input)", key_node)
            if not isinstance(key, (str, int, float, bool)) or key is None:
                self.problem("schema-violation", "a mapping key must be a plain word", key_node)
                continue
            key = str(key)
            if key in first:
                line0 = first[key]
                line1, _ = _mark(key_node)
                self.problem("duplicate-key", f"key {key!r} appears twice (lines {line0} and {line1}); "
                             "the second one is ignored (plain YAML would silently keep only the last)", key_node)
                continue
            first[key] = _mark(key_node)[0]
            self.doc.keys[path + (key,)] = _mark(key_node)
            out[key] = self.build(value_node, path + (key,))
        self.active.discard(id(node))
        return out

    def _sequence(self, node, path: Path) -> list:
        if node.tag != _SEQ:
            self.problem("unsupported-yaml-tag", f"tag {node.tag!r} is not allowed in a spec "
                         "(speccheck never constructs objects from input)", node)
            return None
        self.active.add(id(node))
        out = [self.build(item, path + (i,)) for i, item in enumerate(node.value)]
        self.active.discard(id(node))
        return out

    def _scalar(self, node):
        if node.tag == _STR:
            return node.value  # most scalars: what the constructor would return, without the call
        if node.tag in _AS_TEXT:
            return str(node.value)
        if node.tag in _NUMBERS and not node.style and not _DECIMAL.match(node.value):
            # YAML 1.1 reads 1:30 as 90 (base 60), 1_1 as 11, 0b1 as 1, 0o7 and 0x1f as numbers:
            # kept as the text written, so the value grammar says what it expected
            return node.value
        if node.tag not in _SAFE_SCALARS:
            self.problem("unsupported-yaml-tag", f"tag {node.tag!r} is not allowed in a spec "
                         "(speccheck never constructs objects from input)", node)
            return None
        try:
            return self.scalars.construct_object(node)
        except Exception:  # e.g. an integer with more digits than Python converts
            self.problem("invalid-value", f"cannot read the scalar {node.value[:40]!r}", node)
            return None


def _count_nodes(text: str, max_nodes: int):
    """The event of the first node past ``max_nodes`` (aliases not expanded), or None."""
    count = 0
    for event in yaml.parse(text, Loader=_Loader):
        if isinstance(event, (yaml.ScalarEvent, yaml.AliasEvent, yaml.CollectionStartEvent)):
            count += 1
            if count > max_nodes:
                return event
    return None


def load(text: str | bytes, limits: Limits = Limits()) -> Document:
    """Parse spec text into a ``Document``; problems are collected, never raised."""
    doc = Document()
    size = len(text) if isinstance(text, bytes) else len(text.encode("utf-8", "surrogatepass"))
    if size > limits.max_bytes:  # str input is bounded by its UTF-8 size too
        doc.problems.append(Problem("input-limit", f"the file is {size} bytes, more than the limit "
                                    f"of {limits.max_bytes}", 1, 1))
        return doc
    if isinstance(text, bytes):
        try:
            text = text.decode("utf-8-sig")
        except UnicodeDecodeError as exc:
            doc.problems.append(Problem("yaml-syntax", f"the file is not UTF-8 text (byte {exc.start})", 1, 1))
            return doc
    try:
        # Every node takes at least one character, so only a text that long can hold too many
        # (aliases, which can expand a short text, are counted by the builder).
        too_many = _count_nodes(text, limits.max_nodes) if len(text) > limits.max_nodes else None
        if too_many is not None:  # composing would hold every node in memory first
            doc.problems.append(Problem("input-limit", f"the document has more than {limits.max_nodes} "
                                        "nodes; reading stopped", *_mark(too_many)))
            return doc
        root = yaml.compose(text, Loader=_Loader)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line, col = (mark.line + 1, mark.column + 1) if mark else (1, 1)
        what = " ".join(p for p in (exc.context, exc.problem) if p)
        doc.problems.append(Problem("yaml-syntax", f"YAML syntax error: {what}{_hint(text, line)}", line, col))
        return doc
    except yaml.YAMLError as exc:
        doc.problems.append(Problem("yaml-syntax", f"YAML error: {exc}", 1, 1))
        return doc
    except RecursionError:
        doc.problems.append(Problem("input-limit", "the document is nested too deeply to read", 1, 1))
        return doc
    except UnicodeEncodeError as exc:  # str input with a lone surrogate: not encodable text
        line = text.count("\n", 0, exc.start) + 1
        column = exc.start - (text.rfind("\n", 0, exc.start) + 1) + 1
        doc.problems.append(Problem("yaml-syntax", "the text contains a character that is not valid Unicode "
                                    f"(U+{ord(text[exc.start]):04X})", line, column))
        return doc
    if root is None:
        doc.values[()] = (1, 1)
        return doc
    doc.data = _Builder(doc, limits).build(root, ())
    return doc


_UNQUOTED_BOUND = re.compile(r":\s*([<>]=?|[≤≥])\s*[-+.\d]")


def _hint(text: str, line: int) -> str:
    """A hint for the syntax error people make most: a bound written without quotes (``>= 20 W``, which
    YAML reads as the start of a folded block)."""
    lines = text.splitlines()
    for k in (line - 1, line - 2):  # the error may be reported on the line after
        if 0 <= k < len(lines):
            m = _UNQUOTED_BOUND.search(lines[k])
            if m:
                return (f" (line {k + 1}: a value that starts with {m.group(1)!r} must be quoted, as in "
                        f"'{m.group(1)} 20 W')")
    return ""
