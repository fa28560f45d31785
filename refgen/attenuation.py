"""Report section: photon interactions (cross sections by process, dominance, crossovers, conversion,
transmission, and the regime map over Z). Plain data out; the physics is in refgen.physics.photons."""
from __future__ import annotations

import math

import numpy as np

from . import datafiles
from .physics.photons import PROCESSES, crossover_energies, dominant_process, element_coefficients, mixture_coefficients

KEY_ENERGIES_MEV = (0.1, 1.0, 10.0)
LAYER_ENERGIES_MEV = (0.1, 1.0, 10.0, 100.0, 1000.0)
FINE_GRID = np.geomspace(1e-3, 1e5, 800)  # MeV, for crossovers and the regime map
REGIME_MAX_Z = 98  # the evaluated photoabsorption data end at Z = 98
PROCESS_NAMES = ("photoelectric absorption", "Compton scattering", "pair production")


def symbols_of(material) -> list[str]:
    """Element symbols for the photon data (a pseudo-element such as standard rock uses its Z's element)."""
    return [datafiles.elements()[c.Z - 1]["symbol"] for c in material.components]


def coefficients(material, e) -> dict:
    z, a, w = material.arrays()
    return mixture_coefficients(e, z, a, w, symbols_of(material))


def dominance_bands(e, coeffs) -> list[dict]:
    """Contiguous energy bands (MeV) in which one process dominates absorption."""
    dom = dominant_process(coeffs)
    bands, start = [], 0
    for i in range(1, len(e) + 1):
        if i == len(e) or dom[i] != dom[start]:
            lo = e[start] if start == 0 else math.sqrt(e[start - 1] * e[start])
            hi = e[-1] if i == len(e) else math.sqrt(e[i - 1] * e[i])
            bands.append({"process": PROCESS_NAMES[dom[start]], "from_MeV": float(lo), "to_MeV": float(hi)})
            start = i
    return bands


def material_photons(material, e) -> tuple[dict, dict]:
    """(key numbers, curves) of one material."""
    curves = coefficients(material, e)
    fine = coefficients(material, FINE_GRID)
    pe_c, c_pair = crossover_energies(FINE_GRID, fine)
    at = coefficients(material, np.array(KEY_ENERGIES_MEV))
    numbers = {
        "photoelectric_compton_crossover_MeV": pe_c,
        "compton_pair_crossover_MeV": c_pair,
        "mass_attenuation_cm2_g": {f"{k:g}": float(v) for k, v in zip(KEY_ENERGIES_MEV, at["total"])},
        "attenuation_per_cm": {f"{k:g}": float(v) * material.density for k, v in zip(KEY_ENERGIES_MEV, at["total"])},
        "mean_free_path_cm": {f"{k:g}": 1.0 / (float(v) * material.density) for k, v in zip(KEY_ENERGIES_MEV, at["total"])},
        "dominance_bands": dominance_bands(FINE_GRID, fine),
    }
    return numbers, curves


def layer_energy_coefficients(material) -> dict:
    """A material's coefficients at LAYER_ENERGIES_MEV, computed once for the layer tables."""
    return coefficients(material, np.array(LAYER_ENERGIES_MEV))


def _optical_depths(spec, layers, coeffs) -> tuple[np.ndarray, np.ndarray]:
    """Sum over slabs of (mu/rho) rho x, total and pair, at LAYER_ENERGIES_MEV."""
    mu_total = np.zeros(len(LAYER_ENERGIES_MEV))
    mu_pair = np.zeros(len(LAYER_ENERGIES_MEV))
    for layer in layers:
        for s in layer.slabs:
            c = coeffs[s.material]
            x = layer.repeat * s.thickness * spec.materials[s.material].density
            mu_total += x * c["total"]
            mu_pair += x * (c["pair_nuclear"] + c["pair_electron"])
    return mu_total, mu_pair


def layer_photons(spec, layer, coeffs) -> dict:
    """Transmission (no interaction of any kind) and conversion probability through one layer."""
    return probabilities(np.array(LAYER_ENERGIES_MEV), *_optical_depths(spec, [layer], coeffs))


def probabilities(e, mu_total, mu_pair) -> dict:
    """Transmission exp(-mu x) and conversion probability (mu_pair/mu) (1 - exp(-mu x)) at energies e."""
    transmission = np.exp(-mu_total)
    conversion = np.where(mu_total > 0, mu_pair / mu_total * (1.0 - transmission), 0.0)
    return {"energies_MeV": [float(x) for x in e], "transmission": [float(x) for x in transmission],
            "conversion_probability": [float(x) for x in conversion]}


def tracking_volume_photons(spec, coeffs) -> dict:
    """Conversion probability through everything up to and including the last tracking layer."""
    last = max((i for i, l in enumerate(spec.layers) if l.system == "tracking"), default=-1)
    layers = spec.layers[: last + 1]
    out = probabilities(np.array(LAYER_ENERGIES_MEV), *_optical_depths(spec, layers, coeffs))
    out["layers"] = [l.name for l in layers]
    return out


def regime_map() -> dict:
    """For Z = 1-98, the photoelectric = Compton and Compton = pair energies (MeV), from the same model,
    as tabulated by tools/make_photon_regimes.py (refgen/data/photon_regimes.csv)."""
    return {"rows": [dict(r) for r in datafiles.photon_regimes()]}


def compute_regime_rows() -> list[dict]:
    """The regime map computed afresh from refgen.physics.photons (used by the tool that writes the table)."""
    rows = []
    for z in range(1, REGIME_MAX_Z + 1):
        el, a = element_symbol_and_mass(z)
        c = element_coefficients(FINE_GRID, z, el, a)
        pe_c, c_pair = crossover_energies(FINE_GRID, c)
        rows.append({"Z": z, "symbol": el, "photoelectric_compton_MeV": pe_c, "compton_pair_MeV": c_pair})
    return rows


def element_symbol_and_mass(z: int) -> tuple[str, float]:
    """Chemical symbol and atomic weight of element Z (refgen's table to 92, xraydb's beyond)."""
    if z <= 92:
        el = datafiles.elements()[z - 1]
        return el["symbol"], el["A"]
    import xraydb
    symbol = xraydb.atomic_symbol(z)
    return symbol, float(xraydb.atomic_mass(symbol))


def photon_csv(e, curves) -> tuple[list[str], list[list]]:
    cols = ["energy_MeV", "photoelectric_cm2_g", "coherent_cm2_g", "incoherent_cm2_g", "pair_nuclear_cm2_g",
            "pair_electron_cm2_g", "total_cm2_g"]
    data = [e] + [curves[p] for p in PROCESSES] + [curves["total"]]
    return cols, [list(map(float, r)) for r in zip(*data)]
