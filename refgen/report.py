"""The report: every number, table and curve of one spec's handbook, as plain data (no rendering here).

``make_report(spec)`` returns a dict with the key numbers (written to data/key-numbers.json), the page
contexts and the CSV tables. Templates only format what is here.
"""
from __future__ import annotations

from . import __version__
from .model import SYSTEM_KINDS, Spec
from .spec import safe_name

SCHEMA = "refgen-key-numbers/1"


def _unique_slugs(names) -> dict[str, str]:
    """A file-safe slug per name, with a numeric suffix where two names would collide."""
    out, used = {}, set()
    for name in names:
        base = safe_name(name).lower()
        slug, n = base, 2
        while slug in used:
            slug, n = f"{base}-{n}", n + 1
        used.add(slug)
        out[name] = slug
    return out


def material_numbers(m) -> dict:
    """Key numbers of one material (foundation constants)."""
    return {
        "description": m.description,
        "state": m.state,
        "density_g_cm3": m.density,
        "mass_fractions": m.mass_fractions,
        "z_over_a": m.z_over_a,
        "mean_excitation_energy_eV": m.mean_excitation_eV,
        "mean_excitation_energy_source": m.i_source,
        "plasma_energy_eV": m.plasma_energy_eV,
        "electron_density_per_cm3": m.electron_density_per_cm3,
        "temperature_K": m.temperature_K,
        "pressure_Pa": m.pressure_Pa,
        "caveats": list(m.caveats),
    }


def layer_numbers(spec: Spec, layer, position_cm: float) -> dict:
    """Key numbers of one layer (foundation: geometry and material)."""
    out = {
        "name": layer.name,
        "material": layer.material,
        "system": layer.system,
        "thickness_cm": layer.thickness,
        "start_cm": position_cm,
        "sampling": layer.is_sampling,
        "active": any(s.active for s in layer.slabs),
    }
    if layer.is_sampling:
        out["repeat"] = layer.repeat
        out["cell"] = [{"material": s.material, "thickness_cm": s.thickness, "active": s.active} for s in layer.slabs]
    else:
        out["density_g_cm3"] = spec.materials[layer.slabs[0].material].density
    return out


def make_report(spec: Spec) -> dict:
    """All numbers for one spec as plain data."""
    materials = {name: material_numbers(m) for name, m in spec.materials.items()}
    layers, z = [], 0.0
    for layer in spec.layers:
        layers.append(layer_numbers(spec, layer, z))
        z += layer.thickness
    key_numbers = {
        "schema": SCHEMA,
        "refgen_version": __version__,
        "spec_sha256_16": spec.spec_hash,
        "experiment": {"name": spec.experiment.name, "revision": spec.experiment.revision},
        "particles": {s.key: {"label": s.label, "mass_MeV": s.mass, "charge": s.charge, "custom": s.custom}
                      for s in spec.species},
        "materials": materials,
        "layers": layers,
        "stack_length_cm": z,
    }
    return {
        "key_numbers": key_numbers,
        "material_slugs": _unique_slugs(spec.materials),
        "systems": {kind: [l["name"] for l in layers if l["system"] == kind] for kind in SYSTEM_KINDS
                    if any(l["system"] == kind for l in layers)},
        "system_descriptions": SYSTEM_KINDS,
        "notes": list(spec.notes),
        "warnings": list(spec.warnings),
        "summary_markdown": spec.experiment.summary,
    }
