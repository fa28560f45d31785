"""Materials written the way users write them (formula or mass mixture, density, I), and the published
reference values the accuracy tests compare with.

Each material is a spec `materials:` entry, parsed by the spec loader exactly as a user's spec is: no
library key, so no tabulated parameter is attached by name. The reference values are from the tables of
Groom, Mokhov & Striganov, At. Data Nucl. Data Tables 78 (2001) 183 (minimum ionisation, muon critical
energy), as carried in the Review of Particle Physics (2024) atomic and nuclear property tables (electron
and positron critical energies by Rossi's definition, Moliere radius). All of them are from memory.
"""
from __future__ import annotations

import functools

from refgen.spec import parse_spec

# name -> spec material entry (as a user writes it)
USER_MATERIALS = {
    "hydrogen-liquid": "{formula: H2, density: 0.0708 g/cm3, mean_excitation_energy: 21.8 eV}",
    "helium-gas": "{formula: He, density: 0.0001663 g/cm3, mean_excitation_energy: 41.8 eV}",
    "beryllium": "{formula: Be, density: 1.848 g/cm3, mean_excitation_energy: 63.7 eV}",
    "graphite": "{formula: C, density: 2.210 g/cm3, mean_excitation_energy: 78.0 eV}",
    "aluminium": "{formula: Al, density: 2.699 g/cm3, mean_excitation_energy: 166 eV}",
    "silicon": "{formula: Si, density: 2.329 g/cm3, mean_excitation_energy: 173 eV}",
    "argon-gas": "{formula: Ar, density: 0.001662 g/cm3, mean_excitation_energy: 188 eV}",
    "argon-liquid": "{formula: Ar, density: 1.396 g/cm3, mean_excitation_energy: 188 eV}",
    "iron": "{formula: Fe, density: 7.874 g/cm3, mean_excitation_energy: 286 eV}",
    "copper": "{formula: Cu, density: 8.96 g/cm3, mean_excitation_energy: 322 eV}",
    "germanium": "{formula: Ge, density: 5.323 g/cm3, mean_excitation_energy: 350 eV}",
    "tungsten": "{formula: W, density: 19.3 g/cm3, mean_excitation_energy: 727 eV}",
    "lead": "{formula: Pb, density: 11.35 g/cm3, mean_excitation_energy: 823 eV}",
    "uranium": "{formula: U, density: 18.95 g/cm3, mean_excitation_energy: 890 eV}",
    "water": "{formula: H2O, density: 1.0 g/cm3, mean_excitation_energy: 75 eV}",
    "polystyrene": "{formula: C8H8, density: 1.06 g/cm3, mean_excitation_energy: 68.7 eV}",
    "polyethylene": "{formula: C2H4, density: 0.94 g/cm3, mean_excitation_energy: 57.4 eV}",
    "air": "{mixture: {C: 0.000124, N: 0.755268, O: 0.231781, Ar: 0.012827}, by: mass, "
           "density: 0.001205 g/cm3, mean_excitation_energy: 85.7 eV}",
    "sodium-iodide": "{formula: NaI, density: 3.667 g/cm3, mean_excitation_energy: 452 eV}",
    "caesium-iodide": "{formula: CsI, density: 4.51 g/cm3, mean_excitation_energy: 553.1 eV}",
    "lead-tungstate": "{formula: PbWO4, density: 8.3 g/cm3, mean_excitation_energy: 600.7 eV}",
    "bismuth-germanate": "{formula: Bi4Ge3O12, density: 7.13 g/cm3, mean_excitation_energy: 534.1 eV}",
    "fused-silica": "{formula: SiO2, density: 2.2 g/cm3, mean_excitation_energy: 139.2 eV}",
}

# <dE/dx>min of a muon, MeV cm2/g (Groom et al. 2001 tables; from memory).
MIN_IONIZATION = {
    "hydrogen-liquid": 4.034, "helium-gas": 1.937, "beryllium": 1.595, "graphite": 1.742, "aluminium": 1.615,
    "silicon": 1.664, "argon-gas": 1.519, "argon-liquid": 1.508, "iron": 1.451, "copper": 1.403,
    "germanium": 1.370, "tungsten": 1.145, "lead": 1.122, "uranium": 1.081, "water": 1.992,
    "polystyrene": 1.936, "polyethylene": 2.079, "air": 1.815, "sodium-iodide": 1.305, "caesium-iodide": 1.243,
    "lead-tungstate": 1.229, "bismuth-germanate": 1.251, "fused-silica": 1.699,
}

# Critical energy (Rossi) of e- and e+ in MeV, and Moliere radius in cm (Review of Particle Physics 2024
# property tables; from memory).
CRITICAL_ENERGY = {
    "aluminium": (42.70, 41.48, 4.419), "silicon": (40.19, 39.05, 4.944), "iron": (21.68, 20.85, 1.719),
    "copper": (19.42, 18.75, 1.568), "tungsten": (7.97, 7.68, 0.9327), "lead": (7.43, 7.16, 1.602),
    "water": (78.33, 76.24, 9.77), "polystyrene": (93.11, 90.33, 9.41), "argon-liquid": (32.84, 31.91, 9.043),
    "air": (87.92, 85.38, None),
}

# Muon critical energy, GeV (Groom et al. 2001; from memory).
MUON_CRITICAL_ENERGY = {
    "iron": 347, "water": 1029, "copper": 315, "silicon": 582, "aluminium": 612, "polystyrene": 1185, "lead": 141,
}


@functools.cache
def material_from_text(entry: str):
    """The model.Material of one spec `materials:` entry, parsed through the spec loader."""
    text = (f"experiment: {{name: reference}}\nparticles: [muon]\nmaterials:\n  m: {entry}\n"
            f"layers:\n  - {{name: l, material: m, thickness: 1 cm, system: other}}\n")
    return parse_spec(text).materials["m"]


def user_material(name: str):
    """The model.Material of USER_MATERIALS[name]."""
    return material_from_text(USER_MATERIALS[name])
