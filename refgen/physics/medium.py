"""The per-material numbers the energy-loss functions need, gathered once from a Material."""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .density_effect import sternheimer_peierls_parameters


@dataclass(frozen=True)
class Medium:
    """Stopping-power parameters of one material.

    z_over_a : mol/g; i_ev : eV; z_eff : electron-weighted mean atomic number (for the shell correction);
    density : g/cm3; de : Sternheimer parameters (cbar, x0, x1, a, k, delta0); de_source : where they came from.
    Z, A, w : element arrays for the radiation-length and radiative functions.
    """

    name: str
    z_over_a: float
    i_ev: float
    z_eff: float
    density: float
    plasma_ev: float
    gas: bool
    de: dict
    de_source: str
    Z: tuple
    A: tuple
    w: tuple


def medium_of(material) -> Medium:
    """Build the Medium of a model.Material (tabulated density-effect parameters where the material has them)."""
    z, a, w = material.arrays()
    electrons = w * z / a
    z_eff = float(np.sum(electrons * z) / np.sum(electrons))
    if material.density_effect is not None:
        de = {k: material.density_effect[k] for k in ("cbar", "x0", "x1", "a", "k", "delta0")}
        source = "Sternheimer, Berger & Seltzer (1984) table"
    else:
        de = sternheimer_peierls_parameters(material.mean_excitation_eV, material.plasma_energy_eV, material.is_gas)
        source = "Sternheimer & Peierls (1971) general rules"
    return Medium(material.name, material.z_over_a, material.mean_excitation_eV, z_eff, material.density,
                  material.plasma_energy_eV, material.is_gas, de, source, tuple(z), tuple(a), tuple(w))
