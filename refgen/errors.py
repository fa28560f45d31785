"""The project's own exception tree. The CLI prints these as one line per problem, never a traceback."""
from __future__ import annotations

from dataclasses import dataclass


class RefgenError(Exception):
    """Base of every error refgen raises on purpose."""


@dataclass(frozen=True)
class Problem:
    """One problem in a spec: where it is (YAML path and line) and what is wrong."""

    path: str
    line: int | None
    message: str

    def __str__(self) -> str:
        where = f"line {self.line}: " if self.line else ""
        return f"{where}{self.path}: {self.message}" if self.path else f"{where}{self.message}"


class SpecError(RefgenError):
    """A spec that cannot be used. Carries every problem found, not only the first."""

    def __init__(self, problems: list[Problem], source: str = "spec"):
        self.problems = list(problems)
        self.source = source
        super().__init__("\n".join(f"{source}: {p}" for p in self.problems))


class UnknownMaterial(RefgenError):
    """A material name that is neither in the spec nor in the built-in library."""


class DataFileError(RefgenError):
    """A malformed row in one of refgen's own data files."""


class BuildError(RefgenError):
    """A build that could not be completed (output folder, rendering)."""
