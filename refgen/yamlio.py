"""Safe YAML loading that remembers the line of every key and list item, with bounds no input can exceed.

Only PyYAML's safe loader is used (libyaml's fast parser where installed). A syntax error becomes a SpecError
with its line and column. Before anything is built, one pass over the parse events enforces three bounds, so
that no spec can hang or crash the program (each is one error with its line, found within a fraction of a
second):

* ``MAX_BYTES``: a spec is a few kilobytes; 1 MiB is hundreds of times the largest realistic one.
* ``MAX_DEPTH``: nesting depth. A spec nests about five levels; 50 leaves room and keeps every recursive
  step far from Python's recursion limit.
* ``MAX_VALUES``: the number of values that aliases add when they are expanded. Aliases that repeat each
  other ("a: &a [x, x], b: &b [*a, *a], ...") grow exponentially; 20 000 added values is far more than any
  spec's shared cells or index tables need. Values written out are bounded by ``MAX_BYTES`` alone, so a
  stack of thousands of layers is fine. An alias to the structure that contains it (a loop) is refused as well.
"""
from __future__ import annotations

import yaml

from .errors import Problem, SpecError

Path = tuple

MAX_BYTES = 1 << 20
MAX_DEPTH = 50
MAX_VALUES = 20_000

_Loader = getattr(yaml, "CSafeLoader", yaml.SafeLoader)
_TOO_DEEP = f"nested more than {MAX_DEPTH} levels deep; a spec needs only a few levels"


def load_with_lines(text: str, source: str = "spec") -> tuple[object, dict[Path, int]]:
    """Parse YAML text into plain Python data and a map from each key path to its 1-based line."""
    lines: dict[Path, int] = {}
    try:
        check_bounds(text)
        loader = _Loader(text)
        try:
            node = loader.get_single_node()
            data = _construct(loader, node, (), lines) if node is not None else None
        finally:
            loader.dispose()
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark else None
        col = f", column {mark.column + 1}" if mark else ""
        raise SpecError([Problem("", line, f"YAML syntax error{col}: {exc.problem or exc.context}")], source) from None
    except yaml.reader.ReaderError as exc:
        line = text.count("\n", 0, exc.position) + 1 if isinstance(exc.position, int) else None
        code = ord(exc.character) if isinstance(exc.character, str) else exc.character
        raise SpecError([Problem("", line, f"character U+{code:04X} is not allowed in a YAML file "
                                           "(a control character)")], source) from None
    except yaml.YAMLError as exc:
        raise SpecError([Problem("", None, f"YAML error: {exc}")], source) from None
    except SpecError as exc:
        raise SpecError(exc.problems, source) from None
    return data, lines


def precheck_file(path, source: str) -> None:
    """Apply the bounds to a spec file before anything heavy is imported, so that a hostile spec is refused
    at once. Only bound violations are raised here; every other problem (unreadable file, bad UTF-8, a
    syntax error) is left to the full load, which reports it with the rest."""
    try:
        with open(path, "rb") as f:
            raw = f.read(MAX_BYTES + 1)
        text = raw.decode("utf-8")
    except (OSError, UnicodeDecodeError):
        return
    try:
        check_bounds(text)
    except SpecError as exc:
        raise SpecError(exc.problems, source) from None
    except yaml.YAMLError:
        return


def check_bounds(text: str) -> None:
    """Refuse a spec over MAX_BYTES, nested deeper than MAX_DEPTH, or whose aliases add more than MAX_VALUES
    values when expanded.

    One pass over the parse events (the parser keeps its own stack, so it cannot recurse too deep): each
    collection's expanded size is summed as it closes, and an alias adds the size of what its anchor holds,
    less the one value it is written as.
    """
    size = len(text.encode("utf-8", "surrogatepass"))
    if size > MAX_BYTES:
        raise SpecError([Problem("", None, f"the spec is larger than {MAX_BYTES // 2 ** 20} MiB, the most a spec "
                                           "may be")])
    try:
        _walk_events(text)
    except yaml.MarkedYAMLError as exc:
        if "nesting depth" not in str(exc.problem):  # libyaml's own depth limit can trip before ours
            raise
        mark = exc.problem_mark or exc.context_mark
        raise SpecError([Problem("", mark.line + 1 if mark else None, _TOO_DEEP)]) from None


def _walk_events(text: str) -> None:
    """The event pass of ``check_bounds``."""
    anchors: dict[str, int] = {}
    open_anchors: set[str] = set()
    stack: list[list] = [[0, None]]  # per open collection: [expanded values so far, its anchor]
    added = 0  # values that aliases add beyond the ones written out
    for event in yaml.parse(text, Loader=_Loader):
        line = event.start_mark.line + 1 if event.start_mark else None
        if isinstance(event, yaml.CollectionStartEvent):
            if len(stack) > MAX_DEPTH:
                raise SpecError([Problem("", line, _TOO_DEEP)])
            stack.append([1, event.anchor])
            if event.anchor:
                open_anchors.add(event.anchor)
            continue
        if isinstance(event, yaml.CollectionEndEvent):
            count, anchor = stack.pop()
            if anchor:
                anchors[anchor] = count
                open_anchors.discard(anchor)
        elif isinstance(event, yaml.ScalarEvent):
            count = 1
            if event.anchor:
                anchors[event.anchor] = 1
        elif isinstance(event, yaml.AliasEvent):
            if event.anchor in open_anchors:
                raise SpecError([Problem("", line, f"the alias *{event.anchor} refers to the structure that "
                                                   "contains it (a loop)")])
            count = anchors.get(event.anchor, 1)
            added += count - 1
        else:
            continue
        stack[-1][0] += count
        if added > MAX_VALUES:
            where = f" (the alias *{event.anchor} here)" if isinstance(event, yaml.AliasEvent) else ""
            raise SpecError([Problem("", line, f"the spec expands to more than {MAX_VALUES} values{where}; "
                                               "YAML aliases that repeat each other grow without bound")])


def _construct(loader, node, path: Path, lines: dict[Path, int]):
    """Walk the composed node tree, building dicts/lists and recording lines by path."""
    lines.setdefault(path, node.start_mark.line + 1)
    if isinstance(node, yaml.MappingNode):
        loader.flatten_mapping(node)
        out = {}
        for key_node, value_node in node.value:
            key = loader.construct_object(key_node, deep=True)
            if not isinstance(key, (str, int, float, bool)) or key is None:
                raise SpecError([Problem(dotted(path), key_node.start_mark.line + 1, "a key must be a plain name")])
            key = str(key)
            if key in out:
                raise SpecError([Problem(dotted(path + (key,)), key_node.start_mark.line + 1,
                                         f"duplicate key '{key}'")])
            lines[path + (key,)] = key_node.start_mark.line + 1
            out[key] = _construct(loader, value_node, path + (key,), lines)
        return out
    if isinstance(node, yaml.SequenceNode):
        return [_construct(loader, item, path + (i,), lines) for i, item in enumerate(node.value)]
    return loader.construct_object(node, deep=True)


def dotted(path: Path) -> str:
    """A path as the user reads it: layers[2].thickness."""
    out = ""
    for p in path:
        out += f"[{p}]" if isinstance(p, int) else (f".{p}" if out else str(p))
    return out
