"""The validation context shared by every section: problems, warnings and notes with their YAML lines."""
from __future__ import annotations

import difflib
from dataclasses import dataclass

from ..errors import Problem
from ..units import QuantityError, parse_quantity
from ..yamlio import dotted


@dataclass
class Context:
    """Collects every problem, warning and note of one validation, each with its YAML path and line."""

    lines: dict
    problems: list
    warnings: list
    notes: list

    def line(self, path) -> int | None:
        path = tuple(path)
        while path and path not in self.lines:
            path = path[:-1]
        return self.lines.get(path)

    def error(self, path, message: str) -> None:
        self.problems.append(Problem(dotted(path), self.line(path), message))

    def warn(self, path, message: str) -> None:
        self.warnings.append(Problem(dotted(path), self.line(path), message))

    def keys(self, value, path, allowed: dict[str, str], required: tuple[str, ...] = ()) -> bool:
        """Check a mapping's keys against a section's documented keys; an unknown key is an error that names the
        closest valid one."""
        if not isinstance(value, dict):
            self.error(path, f"expected a mapping with keys {', '.join(allowed)}")
            return False
        for key in value:
            if key not in allowed:
                close = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
                hint = f"; did you mean '{close[0]}'?" if close else f"; valid keys: {', '.join(allowed)}"
                self.error(tuple(path) + (key,), f"unknown key '{key}'{hint}")
        ok = True
        for key in required:
            if key not in value:
                self.error(path, f"missing required key '{key}'")
                ok = False
        return ok

    def quantity(self, value, path, dimension: str, positive: bool = True) -> float | None:
        try:
            q = parse_quantity(value, dimension)
        except QuantityError as exc:
            self.error(path, str(exc))
            return None
        if positive and not q > 0:
            self.error(path, f"must be greater than zero (got '{value}')")
            return None
        return q


def name_ok(ctx: Context, name, path) -> bool:
    """A material, layer or species name: a non-empty string of at most 80 characters."""
    if not isinstance(name, str) or not name.strip():
        ctx.error(path, "a name must be a non-empty string")
        return False
    if len(name) > 80:
        ctx.error(path, "a name must be at most 80 characters")
        return False
    return True
