"""Safe YAML loading that remembers the line of every key and list item.

Only PyYAML's safe loader is used. A syntax error becomes a SpecError with its line and column.
"""
from __future__ import annotations

import yaml

from .errors import Problem, SpecError

Path = tuple


def load_with_lines(text: str, source: str = "spec") -> tuple[object, dict[Path, int]]:
    """Parse YAML text into plain Python data and a map from each key path to its 1-based line."""
    loader = yaml.SafeLoader(text)
    lines: dict[Path, int] = {}
    try:
        node = loader.get_single_node()
        data = _construct(loader, node, (), lines) if node is not None else None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        line = mark.line + 1 if mark else None
        col = f", column {mark.column + 1}" if mark else ""
        raise SpecError([Problem("", line, f"YAML syntax error{col}: {exc.problem or exc.context}")], source) from None
    except yaml.YAMLError as exc:
        raise SpecError([Problem("", None, f"YAML error: {exc}")], source) from None
    except SpecError as exc:
        raise SpecError(exc.problems, source) from None
    finally:
        loader.dispose()
    return data, lines


def _construct(loader: yaml.SafeLoader, node, path: Path, lines: dict[Path, int]):
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


