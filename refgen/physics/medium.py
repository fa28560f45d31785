"""The per-material numbers the energy-loss functions need, gathered once from a Material.

Density effect: the Sternheimer, Berger & Seltzer (1984) parameters when the material is a tabulated one
(same elements and mass fractions, density within 1 %, same I), whether it came by library key or was written
out as a formula or mixture; otherwise Sternheimer's oscillator method from the subshell data of its elements
(refgen.physics.density_effect).
"""
from __future__ import annotations

import functools
from dataclasses import dataclass, field

import numpy as np

from .. import datafiles
from .density_effect import (oscillator_delta_table, oscillator_strengths, sternheimer_oscillators,
                             sternheimer_peierls_parameters)

TABLE_DENSITY_TOLERANCE = 0.01  # relative: a material matches a 1984 table entry within 1 % in density
TABLE_FRACTION_TOLERANCE = 1e-3  # absolute, per element mass fraction
TABLE_I_TOLERANCE = 1e-6  # relative: "the same I"
PARAMETER_KEYS = ("cbar", "x0", "x1", "a", "k", "delta0")
SOURCE_TABLE = "Sternheimer, Berger & Seltzer (1984) table"
SOURCE_OSCILLATOR = "Sternheimer (1952) oscillator method"
SOURCE_GENERAL = "Sternheimer & Peierls (1971) general rules"


@dataclass(frozen=True)
class Medium:
    """Stopping-power parameters of one material.

    z_over_a : mol/g; i_ev : eV; z_eff : electron-weighted mean atomic number (for the shell correction);
    density : g/cm3; de : Sternheimer parameters (cbar, x0, x1, a, k, delta0) when tabulated (else None);
    delta_table : (ln beta gamma, delta) of the oscillator method (else None); de_source : which of the two.
    Z, A, w : element arrays for the radiation-length, radiative and Barkas functions.
    shell_oscillators : (f_i, hbar omega_i in eV) of Sternheimer's subshell oscillators, for the shell correction.
    """

    name: str
    z_over_a: float
    i_ev: float
    z_eff: float
    density: float
    plasma_ev: float
    gas: bool
    de: dict | None
    de_source: str
    Z: tuple
    A: tuple
    w: tuple
    delta_table: tuple | None = field(default=None, compare=False, repr=False)
    shell_oscillators: tuple | None = field(default=None, compare=False, repr=False)


@functools.cache
def _table_compositions() -> tuple:
    """(key, element mass fractions, density) of every library material that has 1984 parameters."""
    from ..materials import library_composition

    lib = datafiles.library_materials()
    out = []
    for key in datafiles.density_effect_parameters():
        if key in lib:
            fractions, _ = library_composition(lib[key])
            out.append((key, fractions, lib[key]["density"]))
    return tuple(out)


def matching_table_entry(fractions: dict[int, float], density: float, i_ev: float) -> dict | None:
    """The 1984 parameters of the tabulated material with the same composition (every mass fraction within
    1e-3), a density within 1 % and the same I; None if there is none."""
    params = datafiles.density_effect_parameters()
    for key, ref, rho in _table_compositions():
        entry = params[key]
        if (set(ref) == set(fractions) and all(abs(ref[z] - fractions[z]) <= TABLE_FRACTION_TOLERANCE for z in ref)
                and abs(density / rho - 1.0) <= TABLE_DENSITY_TOLERANCE
                and abs(entry["mean_excitation_eV"] / i_ev - 1.0) <= TABLE_I_TOLERANCE):
            return dict(entry)
    return None


def is_conductor(material) -> bool:
    """A single metallic (or semiconducting) element in condensed form has conduction electrons (a
    pseudo-element such as standard rock has none)."""
    comps = material.components
    if len(comps) != 1 or material.is_gas:
        return False
    z = int(comps[0].Z)
    return comps[0].symbol == datafiles.elements()[z - 1]["symbol"] and datafiles.atomic_shells()[z - 1]["conductor"]


def medium_of(material) -> Medium:
    """Build the Medium of a model.Material."""
    z, a, w = material.arrays()
    electrons = w * z / a
    z_eff = float(np.sum(electrons * z) / np.sum(electrons))
    i_ev, plasma = material.mean_excitation_eV, material.plasma_energy_eV
    params = material.density_effect
    if params is None:
        fractions = {int(c.Z): c.mass_fraction for c in material.components}
        params = matching_table_entry(fractions, material.density, i_ev)
    de, table = None, None
    f, e, f_c = oscillator_strengths(z, a, w, is_conductor(material), datafiles.atomic_shells())
    try:
        osc = sternheimer_oscillators(f, e, f_c, i_ev, plasma)
        shell = (osc[0], plasma * osc[2])  # the shell correction's oscillators: f_i and hbar omega_i in eV
    except ValueError:  # an I too low for the oscillators to reach: general rules, and one oscillator at I
        osc, shell = None, (np.ones(1), np.array([i_ev]))
    if params is not None:
        de, source = {k: params[k] for k in PARAMETER_KEYS}, SOURCE_TABLE
    elif osc is not None:
        table, source = oscillator_delta_table(osc), SOURCE_OSCILLATOR
    else:
        de, source = sternheimer_peierls_parameters(i_ev, plasma, material.is_gas), SOURCE_GENERAL
    return Medium(material.name, material.z_over_a, i_ev, z_eff, material.density, plasma, material.is_gas, de,
                  source, tuple(z), tuple(a), tuple(w), table, shell)
