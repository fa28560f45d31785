"""The validation driver: the top-level keys, their order of validation, and reading a spec file.

To add a top-level key:
1. document it in TOP_LEVEL_KEYS;
2. add its field (with a default) to ``model.Spec``;
3. write its validator in a section module of this package (``read_<key>(ctx, data, ...)``, one error per
   problem through ``ctx``), call it in ``validate`` below and pass its result to ``Spec`` by keyword.
"""
from __future__ import annotations

import hashlib
import re

from ..errors import Problem, SpecError
from ..model import Spec
from ..yamlio import MAX_BYTES, load_with_lines
from .context import Context
from .experiment import derived_photon_range, read_experiment, read_grid, read_particles, read_shower_energies
from .field_section import read_field
from .layer_section import read_layers
from .material_section import read_materials
from .identification_section import read_start_time
from .radiator_section import read_radiators

TOP_LEVEL_KEYS = {
    "experiment": "Name, revision and a Markdown summary of the experiment (required).",
    "particles": "Species to tabulate: built-in names, or {name: {mass: ..., charge: ...}} for custom ones (required).",
    "momentum": "Log-spaced momentum grid for the charged-particle curves: {from, to, points}.",
    "photon_energy": "Log-spaced photon-energy grid: {from, to, points} (default: 10 keV to ten times the largest "
                     "shower energy, at most 100 GeV).",
    "shower_energies": "Energies at which electromagnetic showers are tabulated, e.g. [1 GeV, 10 GeV].",
    "materials": "Materials by name: from the library, a formula, or a mixture (required).",
    "layers": "The layer stack, ordered outward from the interaction point (required).",
    "radiators": "Cherenkov radiators: which layer radiates and its photon band.",
    "field": "Magnetic field perpendicular to the stack axis: {strength, from: <layer>, to: <layer>} or a list of such regions.",
    "start_time": "Resolution of the event start time for time of flight, e.g. 20 ps (default: an exact start).",
}


def _layer_names(data) -> set[str]:
    """Every layer name written in the spec, valid layer or not (so that references to a bad layer are not
    reported a second time as unknown)."""
    if not isinstance(data.get("layers"), list):
        return set()
    return {item["name"] for item in data["layers"] if isinstance(item, dict) and isinstance(item.get("name"), str)}


def validate(data, lines: dict, source: str = "spec", strict: bool = False, text: str = "") -> Spec:
    """Validate parsed spec data; return the Spec or raise one SpecError listing every problem."""
    ctx = Context(lines, [], [], [])
    if not isinstance(data, dict):
        raise SpecError([Problem("", None, "the spec is empty or not a mapping of sections")], source)
    ctx.keys(data, (), TOP_LEVEL_KEYS)
    experiment = read_experiment(ctx, data)
    species = read_particles(ctx, data)
    momentum = read_grid(ctx, data, "momentum", "momentum", ("50 MeV/c", "500 GeV/c", 200))
    showers = read_shower_energies(ctx, data)
    photon = read_grid(ctx, data, "photon_energy", "energy", derived_photon_range(ctx, data, showers))
    mats = read_materials(ctx, data)
    material_names = set(data.get("materials", {}) or {}) if isinstance(data.get("materials"), dict) else set()
    layers = read_layers(ctx, data, mats, material_names)
    layer_names = _layer_names(data)
    radiators = read_radiators(ctx, data, layers, mats, layer_names)
    field = read_field(ctx, data, layers, layer_names)
    start_time = read_start_time(ctx, data, layers)
    problems = list(ctx.problems)
    if strict:
        problems += [Problem(w.path, w.line, w.message + " (a warning, fatal with --strict)") for w in ctx.warnings]
    if problems:
        problems.sort(key=lambda p: (p.line or 0, p.path))
        raise SpecError(problems, source)
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest()[:16]
    return Spec(experiment=experiment, species=species, momentum=momentum, photon_energy=photon,
                shower_energies=showers, materials=mats, layers=layers, radiators=radiators,
                start_time_ps=start_time,
                notes=tuple(ctx.notes), spec_hash=digest, source_name=source,
                warnings=tuple(str(w) for w in ctx.warnings), field=field)


def read_text(path) -> str:
    """Read a spec file as UTF-8, turning an unreadable or non-UTF-8 file into a SpecError."""
    try:
        with open(path, "rb") as f:
            raw = f.read(MAX_BYTES + 1)  # never more than the bound, whatever the file is
    except OSError as exc:
        raise SpecError([Problem("", None, f"cannot read the spec: {exc.strerror}")], str(path)) from None
    if len(raw) > MAX_BYTES:
        raise SpecError([Problem("", None, f"the spec is larger than {MAX_BYTES // 2 ** 20} MiB, the most a spec "
                                           "may be")], str(path))
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise SpecError([Problem("", line, "the file is not UTF-8 text")], str(path)) from None
    if not text.strip():
        raise SpecError([Problem("", None, "the spec file is empty")], str(path))
    return text.lstrip("\ufeff")


def load_spec(path, strict: bool = False) -> Spec:
    """Read, parse and validate a spec file."""
    text = read_text(path)
    return parse_spec(text, str(path), strict)


def parse_spec(text: str, source: str = "spec", strict: bool = False) -> Spec:
    """Parse and validate spec text."""
    data, lines = load_with_lines(text, source)
    return validate(data, lines, source, strict, text)


_SAFE = re.compile(r"[^A-Za-z0-9._-]+")


def safe_name(name: str) -> str:
    """A file-name-safe slug for a material, layer or species name (never a path)."""
    slug = _SAFE.sub("-", name).strip("-.")
    return slug or "item"
