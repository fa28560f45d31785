"""The validated model of one experiment: materials, particle species and the layer stack.

All quantities are floats in the internal unit system (MeV, cm, g, K, Pa). Thin objects: the physics lives
in refgen.physics as pure functions; properties here only call them.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from . import datafiles

SYSTEM_KINDS = {
    "tracking": "Tracking: silicon and gaseous detectors that measure trajectories.",
    "cherenkov": "Cherenkov counters and imaging radiators for particle identification.",
    "em-calorimeter": "Electromagnetic calorimeter: absorbs electrons and photons.",
    "hadron-calorimeter": "Hadron calorimeter: absorbs hadron showers.",
    "muon": "Muon system: chambers and iron filters behind the calorimeters.",
    "absorber": "Passive absorber or beam dump.",
    "support": "Beam pipe, supports, cables and services.",
    "other": "Anything else.",
}
CALORIMETER_KINDS = ("em-calorimeter", "hadron-calorimeter")
TRACKING_VOLUME_ENDS = ("absorber", "em-calorimeter", "hadron-calorimeter", "muon")
TRACKING_VOLUME_DEFINITION = ("all material from the interaction point through the last tracking layer in front of "
                              "the first absorber, calorimeter or muon layer")


@dataclass(frozen=True)
class Component:
    """One element of a material: Z, its mass fraction, and its atomic weight (g/mol)."""

    Z: int
    symbol: str
    mass_fraction: float
    A: float


@dataclass(frozen=True)
class RefractiveIndex:
    """A radiator's refractive index: a constant, a Sellmeier form, or a table n(wavelength).

    kind: 'constant' (value), 'sellmeier' (coefficients B_i, C_i in um^2, n^2 = 1 + sum B_i l^2/(l^2 - C_i)),
    or 'table' (wavelengths_nm, values). ``reference_density`` is the density at which the index holds (gases).
    """

    kind: str
    value: float = 1.0
    b: tuple[float, ...] = ()
    c: tuple[float, ...] = ()
    wavelengths_nm: tuple[float, ...] = ()
    values: tuple[float, ...] = ()


@dataclass(frozen=True)
class Material:
    """A material: composition as element mass fractions, density and the derived constants.

    density : g/cm3; mean_excitation_eV : eV; pair_energy_eV: mean energy per ionisation carrier, eV (or None).
    ``density_effect``: Sternheimer-Berger-Seltzer parameters when tabulated, else None (the medium then matches
    a table entry by composition, density and I, or uses the oscillator method).
    """

    name: str
    description: str
    components: tuple[Component, ...]
    density: float
    state: str
    mean_excitation_eV: float
    i_source: str
    pair_energy_eV: float | None = None
    refractive_index: RefractiveIndex | None = None
    density_effect: dict | None = None
    source: str = ""
    caveats: tuple[str, ...] = ()
    temperature_K: float | None = None
    pressure_Pa: float | None = None
    scintillator: dict | None = None
    index_density_ratio: float = 1.0
    conditions_text: str = ""  # a gas's temperature and pressure as the spec typed them (shown on the pages)
    index_conditions_text: str = ""  # the conditions of a gas's refractive_index as typed ("" = its own conditions)

    @property
    def is_gas(self) -> bool:
        return self.state == "gas"

    @property
    def z_over_a(self) -> float:
        """<Z/A> = sum_j w_j Z_j / A_j, mol/g."""
        return float(sum(c.mass_fraction * c.Z / c.A for c in self.components))

    @property
    def mass_fractions(self) -> dict[str, float]:
        return {c.symbol: c.mass_fraction for c in self.components}

    @property
    def electron_density_per_cm3(self) -> float:
        """n_e = N_A rho <Z/A>, electrons per cm3."""
        return datafiles.constant("avogadro") * self.density * self.z_over_a

    @property
    def plasma_energy_eV(self) -> float:
        """hbar omega_p = 28.816 sqrt(rho <Z/A>) eV (Review of Particle Physics, Table 34.1)."""
        return datafiles.constant("plasma_energy_coefficient") * math.sqrt(self.density * self.z_over_a)

    def arrays(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(Z, A, w) arrays for the vectorised physics functions."""
        return (np.array([c.Z for c in self.components], dtype=float),
                np.array([c.A for c in self.components], dtype=float),
                np.array([c.mass_fraction for c in self.components], dtype=float))


@dataclass(frozen=True)
class Species:
    """A particle species: mass in MeV/c^2 and charge in units of e (an int)."""

    key: str
    label: str
    mass: float
    charge: int
    source: str = ""
    custom: bool = False

    @property
    def is_electron_like(self) -> bool:
        return abs(self.mass - datafiles.constant("electron_mass")) < 1e-6


@dataclass(frozen=True)
class Slab:
    """One homogeneous slab: material name, thickness in cm, and whether it is sensitive."""

    material: str
    thickness: float
    active: bool = False


@dataclass(frozen=True)
class Threshold:
    """A readout threshold on a sensitive layer: as the spec wrote it (``value`` in ``unit``: an energy such as keV,
    or a charge such as fC or e) and as the energy deposit it stands for, ``energy`` in MeV.
    ``units_per_MeV`` converts any deposit (MeV) back to the spec's unit (for a charge, through the material's
    pair energy)."""

    value: float
    unit: str
    energy: float
    units_per_MeV: float


@dataclass(frozen=True)
class Layer:
    """A layer of the stack: a single slab, or a cell of slabs repeated ``repeat`` times (sampling structure)."""

    name: str
    system: str
    slabs: tuple[Slab, ...]
    repeat: int = 1
    scintillator: dict | None = None
    resolution_cm: float | None = None  # point resolution in the bending direction of a measuring layer, cm
    threshold: Threshold | None = None
    timing_ps: float | None = None  # arrival-time resolution of a timing layer, ps
    samples: int | None = None  # energy-loss samples for a truncated mean (gaseous tracking layers)
    truncation: float | None = None  # kept fraction of the samples (set when samples is)

    @property
    def is_sampling(self) -> bool:
        return len(self.slabs) > 1 or self.repeat > 1

    @property
    def cell_thickness(self) -> float:
        return sum(s.thickness for s in self.slabs)

    @property
    def thickness(self) -> float:
        """Total thickness, cm."""
        return self.repeat * self.cell_thickness

    @property
    def material(self) -> str:
        """The material name for a single-slab layer; for a cell, the names joined with '/'."""
        return "/".join(s.material for s in self.slabs)


@dataclass(frozen=True)
class Radiator:
    """A Cherenkov radiator: the layer it is, the photon band (eV), and detector response parameters."""

    layer: str
    band_eV: tuple[float, float]
    detection_efficiency: float
    efficiency_is_default: bool
    angle_resolution_mrad: float | None
    mode: str


@dataclass(frozen=True)
class FieldRegion:
    """A uniform magnetic field perpendicular to the stack axis, from the front of ``from_layer`` (start_cm)
    to the back of ``to_layer`` (end_cm); positions along the stack axis from the interaction point, cm."""

    strength_tesla: float
    start_cm: float
    end_cm: float
    from_layer: str
    to_layer: str


@dataclass(frozen=True)
class Grid:
    """A log-spaced grid: from, to (internal units) and number of points."""

    start: float
    stop: float
    points: int

    def values(self) -> np.ndarray:
        return np.geomspace(self.start, self.stop, self.points)


@dataclass(frozen=True)
class Experiment:
    name: str
    revision: str
    summary: str


@dataclass(frozen=True)
class Spec:
    """A validated spec: everything in internal units, every reference resolved."""

    experiment: Experiment
    species: tuple[Species, ...]
    momentum: Grid
    photon_energy: Grid
    shower_energies: tuple[float, ...]
    materials: dict[str, Material]
    layers: tuple[Layer, ...]
    radiators: tuple[Radiator, ...] = ()
    start_time_ps: float | None = None  # event start-time resolution, ps; None: the start is taken as exact
    notes: tuple[str, ...] = ()
    spec_hash: str = ""
    source_name: str = ""
    warnings: tuple[str, ...] = ()
    field: tuple[FieldRegion, ...] = ()

    def material(self, name: str) -> Material:
        return self.materials[name]

    def layer_starts(self) -> dict[str, float]:
        """Position of each layer's front face along the stack axis, cm (the stack starts at the origin)."""
        out, z = {}, 0.0
        for layer in self.layers:
            out[layer.name] = z
            z += layer.thickness
        return out

    def tracking_volume(self) -> tuple[Layer, ...]:
        """The layers of the tracking volume (TRACKING_VOLUME_DEFINITION): from the first layer through the last
        tracking layer that lies in front of the first absorber, calorimeter or muon layer behind the first
        tracking layer. Empty when the stack has no tracking layer."""
        kinds = [l.system for l in self.layers]
        if "tracking" not in kinds:
            return ()
        first = kinds.index("tracking")
        end = next((i for i in range(first, len(kinds)) if kinds[i] in TRACKING_VOLUME_ENDS), len(kinds))
        last = max(i for i in range(first, end) if kinds[i] == "tracking")
        return self.layers[: last + 1]

    def layer_depth(self, layer: Layer, lengths_g_cm2: dict[str, float]) -> float:
        """Thickness of a layer in units of a per-material length (X0 or lambda_I, g/cm2):
        repeat * sum over slabs of thickness * density / length."""
        return layer.repeat * sum(s.thickness * self.materials[s.material].density / lengths_g_cm2[s.material]
                                  for s in layer.slabs)
