"""The spec reference, generated so that it cannot drift: every spec key from ``refgen.spec.SCHEMA``, and the
built-in particle names from refgen/data/particles.csv.

``refgen keys`` prints the key reference; the README carries both between markers, and a test keeps them in
step. After adding or changing a spec key or a particle name, regenerate the README's copy with:

    python -m refgen.reference README.md
"""
from __future__ import annotations

import re
import sys
from pathlib import Path

REGENERATE = "python -m refgen.reference README.md"

# Where each SCHEMA section sits in a spec file (sections not named here are shown by their own name).
_WHERE = {
    "": "Top level",
    "experiment": "`experiment:`",
    "grid": "`momentum:` and `photon_energy:` (log-spaced grids)",
    "material": "`materials:` → `<name>:` (one material)",
    "layer": "`layers:` → `- ...` (one layer, outward from the interaction point)",
    "slab": "`layers:` → `- cell:` → `- ...` (one slab of a sampling cell)",
    "radiator": "`radiators:` → `- ...` (one Cherenkov radiator)",
    "custom_species": "`particles:` → `- <name>: {...}` (a charged species that is not built in)",
    "field": "`field:` → `- ...` (one magnetic-field region)",
}


def _cell(text: str) -> str:
    return str(text).replace("|", "&#124;")


def key_reference() -> str:
    """Every spec key with its one-line meaning, section by section, as Markdown tables."""
    from .spec import SCHEMA
    parts = []
    for section, keys in SCHEMA.items():
        parts.append(f"**{_WHERE.get(section, f'`{section}:`')}**\n")
        parts.append("| key | meaning |\n|---|---|")
        parts += [f"| `{key}` | {_cell(text)} |" for key, text in keys.items()]
        parts.append("")
    return "\n".join(parts).rstrip() + "\n"


def particle_names() -> str:
    """The built-in species and every name each one answers to, as a Markdown table."""
    from . import datafiles
    rows = ["| species | label | also accepted as |", "|---|---|---|"]
    rows += [f"| `{p['key']}` | {_cell(p['label'])} | {', '.join(f'`{a}`' for a in p['aliases'])} |"
             for p in datafiles.particles().values()]
    return "\n".join(rows) + "\n"


BLOCKS = {"spec-keys": key_reference, "particle-names": particle_names}


def _markers(name: str) -> re.Pattern:
    return re.compile(rf"(<!-- {name}: generated[^\n]*-->\n)(.*?)(<!-- {name}: end -->)", re.S)


def readme_block(readme_text: str, name: str) -> str | None:
    """The generated block ``name`` of a README (between its markers), or None when the markers are missing."""
    m = _markers(name).search(readme_text)
    return m.group(2) if m else None


def write_readme(path: Path) -> bool:
    """Replace every generated block of the README with the current text; True when anything changed."""
    text = path.read_text(encoding="utf-8")
    new = text
    for name, make in BLOCKS.items():
        if readme_block(new, name) is None:
            raise SystemExit(f"{path}: the markers of the generated block '{name}' are missing")
        new = _markers(name).sub(lambda m, body=make(): m.group(1) + body + m.group(3), new)
    if new != text:
        path.write_text(new, encoding="utf-8")
    return new != text


if __name__ == "__main__":
    target = Path(sys.argv[1] if len(sys.argv) > 1 else "README.md")
    print(f"{target}: {'reference updated' if write_readme(target) else 'reference already up to date'}")
