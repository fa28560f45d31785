"""Report section: photon interactions (cross sections by process, dominance, crossovers, conversion,
transmission, the per-detector process map, and the crossover table over Z). Plain data out; the physics is in
refgen.physics.photons.

House words for the processes (used on the pages, in the figures and in the CSV columns): photoabsorption (the
photoelectric effect), Compton scattering (incoherent), Rayleigh scattering (coherent) and pair conversion
(nuclear and electron field together; the electron-field share is given beside it)."""
from __future__ import annotations

import math

import numpy as np

from . import datafiles
from .physics.photons import (VALID_MEV, crossover_energies, dominant_process, element_coefficients,
                              mixture_coefficients)

KEY_ENERGIES_MEV = (0.1, 1.0, 10.0)
LAYER_ENERGIES_MEV = (0.1, 1.0, 10.0, 100.0, 1000.0)
FINE_GRID = np.geomspace(1e-3, 1e5, 800)  # MeV, for crossovers and the regime map
REGIME_MAX_Z = 98  # the evaluated photoabsorption data end at Z = 98
PROCESS_NAMES = ("photoelectric absorption", "Compton scattering", "pair production")  # key-numbers values
HOUSE_WORDS = {"photoelectric absorption": "photoabsorption", "Compton scattering": "Compton scattering",
               "pair production": "pair conversion"}
CONVERSION_ENERGY_MEV = 1000.0  # the energy of the tracking-volume conversion probability
PROCESS_WORDS = {"photoabsorption": "photoabsorption", "compton": "Compton scattering", "rayleigh": "Rayleigh scattering",
                 "pair": "pair conversion"}


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


def energy_text(mev: float) -> str:
    """A photon energy to three significant figures in keV, MeV or GeV, whichever reads best."""
    for scale, unit in ((1e3, "GeV"), (1.0, "MeV"), (1e-3, "keV")):
        if mev >= scale or unit == "keV":
            return f"{float(f'{mev / scale:.3g}'):g} {unit}"
    raise AssertionError("unreachable")


def energies_of_interest(spec) -> list[dict]:
    """The spec's photon energies that the pages mark: conversion at 1 GeV and each shower energy (MeV)."""
    marks = {CONVERSION_ENERGY_MEV: ["conversion"]}
    for e in spec.shower_energies:
        marks.setdefault(e, []).append("shower")
    return [{"MeV": e, "label": f"{energy_text(e)} {' and '.join(what)}"} for e, what in sorted(marks.items())]


def stack_order(spec) -> list[str]:
    """Material names in the order the layer stack first meets them; materials no layer uses come last."""
    seen = [s.material for l in spec.layers for s in l.slabs]
    return list(dict.fromkeys(seen + list(spec.materials)))


def layers_of(spec, name: str) -> list[dict]:
    """The layers with a slab of this material and that slab's thickness (cm; per cell in a sampling layer)."""
    return [{"layer": l.name, "thickness_cm": s.thickness, "per_cell": l.is_sampling}
            for l in spec.layers for s in l.slabs if s.material == name]


def thickness_marks(spec, name: str) -> list[dict]:
    """The distinct thicknesses of this material in the stack (cm), each labelled with the layers that have it."""
    groups: dict[float, list[str]] = {}
    for x in layers_of(spec, name):
        groups.setdefault(x["thickness_cm"], []).append(x["layer"] + (" per cell" if x["per_cell"] else ""))
    return [{"cm": t, "label": f"{', '.join(names)}: {t:.3g} cm"} for t, names in groups.items()]


def _clip_bands(bands: list[dict], lo: float, hi: float) -> list[dict]:
    """Dominance bands cut to the energy range [lo, hi] (MeV), in house words."""
    out = []
    for b in bands:
        a, z = max(b["from_MeV"], lo), min(b["to_MeV"], hi)
        if z > a:
            out.append({"process": HOUSE_WORDS[b["process"]], "from_MeV": a, "to_MeV": z})
    return out


def photon_map(spec, materials: dict) -> dict:
    """The detector's photon map: per material in stack order, the energy bands of the dominant process over the
    spec's photon range, the crossover energies, the layers it makes, and the energies of interest."""
    lo, hi = spec.photon_energy.start, spec.photon_energy.stop
    rows = []
    for name in stack_order(spec):
        ph = materials[name]["photon"]
        crossings = [{"MeV": ph[k], "label": energy_text(ph[k]), "inside": bool(lo <= ph[k] <= hi)}
                     for k in ("photoelectric_compton_crossover_MeV", "compton_pair_crossover_MeV") if ph[k]]
        rows.append({"material": name, "layers": [x["layer"] for x in layers_of(spec, name)],
                     "bands": _clip_bands(ph["dominance_bands"], lo, hi), "crossovers": crossings})
    return {"range_MeV": [lo, hi], "range_text": f"{energy_text(lo)} to {energy_text(hi)}", "rows": rows,
            "marks": energies_of_interest(spec), "valid_MeV": list(VALID_MEV)}


def photon_figure_data(spec, name: str, numbers: dict, curves: dict) -> dict:
    """Plain data for one material's photon figure: curves in house words, the material's layers, the
    high-energy mean free path 9/7 X0 (Tsai), the crossovers and the energies of interest."""
    ph = numbers["photon"]
    return {"energy_MeV": spec.photon_energy.values(), "curves": house_curves(curves), "density_g_cm3": numbers["density_g_cm3"],
            "thicknesses": thickness_marks(spec, name), "high_energy_free_path_cm": 9.0 / 7.0 * numbers["radiation_length_cm"],
            "crossovers": [{"MeV": ph[k], "label": energy_text(ph[k])}
                           for k in ("photoelectric_compton_crossover_MeV", "compton_pair_crossover_MeV") if ph[k]],
            "marks": energies_of_interest(spec), "valid_MeV": list(VALID_MEV)}


def photon_table(spec, material) -> list[dict]:
    """Rows for a material page: at the key energies and the energies of interest, the mean free path (cm),
    mu/rho (cm2/g), the share of interactions by process (house words) and the one that dominates."""
    energies = sorted(set(KEY_ENERGIES_MEV) | {m["MeV"] for m in energies_of_interest(spec)})
    h = house_curves(coefficients(material, np.array(energies)))
    rows = []
    for i, e in enumerate(energies):
        total = float(h["total"][i])
        shares = {k: float(h[k][i]) / total for k in ("photoabsorption", "compton", "rayleigh", "pair")}
        rows.append({"energy": energy_text(e), "energy_MeV": e, "mass_attenuation_cm2_g": total,
                     "shares_percent": {k: 100.0 * v for k, v in shares.items()},
                     "mean_free_path_cm": 1.0 / (total * material.density), "shares": shares,
                     "pair_electron_field_share": float(h["pair_electron_field_share"][i]),
                     "dominant": PROCESS_WORDS[max(shares, key=shares.get)]})
    return rows


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
    """Conversion probability through the tracking volume (Spec.tracking_volume)."""
    layers = spec.tracking_volume()
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


def house_curves(curves: dict) -> dict:
    """The four processes in house words (cm2/g), pair conversion as one curve, and its electron-field share."""
    pair = curves["pair_nuclear"] + curves["pair_electron"]
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(pair > 0, curves["pair_electron"] / np.where(pair > 0, pair, 1.0), 0.0)
    return {"total": curves["total"], "photoabsorption": curves["photoelectric"], "compton": curves["incoherent"],
            "rayleigh": curves["coherent"], "pair": pair, "pair_electron_field_share": share}


PHOTON_COLUMNS = ["energy_MeV", "total_cm2_g", "photoabsorption_cm2_g", "compton_cm2_g", "rayleigh_cm2_g", "pair_cm2_g",
                  "pair_electron_field_share"]


def photon_csv(e, curves) -> tuple[list[str], list[list]]:
    """data/photon/<material>.csv: mass attenuation by process (house words) and the electron-field share of pair
    conversion (a fraction, 0 below 4 m_e c^2)."""
    h = house_curves(curves)
    data = [e, h["total"], h["photoabsorption"], h["compton"], h["rayleigh"], h["pair"], h["pair_electron_field_share"]]
    return PHOTON_COLUMNS, [list(map(float, r)) for r in zip(*data)]
