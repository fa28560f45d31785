"""Spec loading and validation: YAML text -> a validated ``model.Spec`` in internal units.

Validation collects every problem as (YAML path, line, message) and raises one SpecError holding all of them.
Unknown keys are errors that name the closest valid key. Warnings (a key that is ignored, fractions that were
normalised) are printed; ``strict=True`` makes them fatal.

One module per section, each declaring its documented keys next to its validator:

- ``driver.py``: the top-level keys (TOP_LEVEL_KEYS), ``validate`` calling each section in order, file reading;
- ``context.py``: the problem collector shared by every section;
- ``experiment.py``: experiment, particles, the momentum and photon-energy grids, shower energies;
- ``material_section.py``: the materials section (library keys, formulas, mixtures);
- ``layer_section.py``: the layer stack, its slabs and the optional per-layer keys (LAYER_OPTIONS);
- ``radiator_section.py``: Cherenkov radiators;
- ``field_section.py``: magnetic-field regions between layers.

SCHEMA below gathers every section's keys; the README's spec section follows it.
"""
from __future__ import annotations

from .driver import TOP_LEVEL_KEYS, load_spec, parse_spec, read_text, safe_name, validate
from .experiment import CUSTOM_SPECIES_KEYS, EXPERIMENT_KEYS, GRID_KEYS, MAX_POINTS
from .field_section import FIELD_KEYS
from .layer_section import LAYER_KEYS, SLAB_KEYS
from .material_section import MATERIAL_KEYS
from .radiator_section import DEFAULT_DETECTION_EFFICIENCY, RADIATOR_KEYS

SCHEMA: dict[str, dict[str, str]] = {
    "": TOP_LEVEL_KEYS,
    "experiment": EXPERIMENT_KEYS,
    "grid": GRID_KEYS,
    "material": MATERIAL_KEYS,
    "layer": LAYER_KEYS,
    "slab": SLAB_KEYS,
    "radiator": RADIATOR_KEYS,
    "custom_species": CUSTOM_SPECIES_KEYS,
    "field": FIELD_KEYS,
}

__all__ = ["SCHEMA", "MAX_POINTS", "DEFAULT_DETECTION_EFFICIENCY", "validate", "load_spec", "parse_spec",
           "read_text", "safe_name"]
