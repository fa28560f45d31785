"""Report section: Cherenkov radiators (thresholds, angles, yields, identification windows, ring separation)
and scintillator light (Birks). Plain data out; the physics is in refgen.physics.cherenkov and .scintillation."""
from __future__ import annotations

import itertools

import numpy as np

from .physics.cherenkov import (cherenkov_angle, photons_per_cm, refractive_index, saturated_angle,
                                threshold_momentum)
from .physics.identification import ring_angle_separation
from .physics.kinematics import kinetic_energy, momentum_of_kinetic
from .physics.scintillation import birks_light_stopping, birks_light_thin
from .physics.bethe_corrections import bethe_regime_min_beta_gamma
from .physics.stopping import bethe_stopping

RING_SIGMAS = 3.0
PROTON_QUENCH_ENERGIES_MEV = (2.0, 5.0, 10.0, 50.0, 100.0)
MIN_PHOTOELECTRONS = 3.0  # common practice: a threshold counter is efficient once it sees a few photoelectrons


def _index_function(material):
    def n_of(e_ev):
        return refractive_index(material.refractive_index, e_ev, material.index_density_ratio)
    return n_of


def radiator_numbers(spec, radiator, p_grid) -> tuple[dict, dict]:
    """(key numbers, curves) of one radiator."""
    layer = next(l for l in spec.layers if l.name == radiator.layer)
    slab = layer.slabs[0]
    material = spec.materials[slab.material]
    n_of = _index_function(material)
    lo, hi = radiator.band_eV
    centre = 0.5 * (lo + hi)
    n_lo, n_hi, n_c = (float(n_of(np.array([x]))[0]) for x in (lo, hi, centre))
    y1 = float(photons_per_cm(1.0, 1, radiator.band_eV, n_of)[0])
    thresholds, thresholds_band, curves = {}, {}, {"momentum_GeV_c": p_grid / 1e3}
    for sp in spec.species:
        thresholds[sp.key] = float(threshold_momentum(sp.mass, n_c)) / 1e3
        thresholds_band[sp.key] = {"at_band_low_eV": float(threshold_momentum(sp.mass, n_lo)) / 1e3,
                                   "at_band_high_eV": float(threshold_momentum(sp.mass, n_hi)) / 1e3}
        curves[f"theta_mrad_{sp.key}"] = cherenkov_angle(p_grid, sp.mass, n_c) * 1e3
        beta = p_grid / np.sqrt(p_grid ** 2 + sp.mass ** 2)
        curves[f"photoelectrons_{sp.key}"] = (photons_per_cm(beta, abs(sp.charge), radiator.band_eV, n_of)
                                             * slab.thickness * radiator.detection_efficiency)
    windows = identification_windows(spec, thresholds, curves, p_grid)
    numbers = {
        "material": material.name, "thickness_cm": slab.thickness, "mode": radiator.mode,
        "photon_band_eV": list(radiator.band_eV),
        "refractive_index": n_c,
        "refractive_index_band": [n_lo, n_hi],
        "gas": material.is_gas, "conditions_as_given": material.conditions_text or None,
        "index_conditions_as_given": material.index_conditions_text or None,
        "index_density_ratio": material.index_density_ratio,
        "dispersive": abs(n_hi - n_lo) > 1e-12,
        "threshold_momentum_GeV_c": thresholds,
        "threshold_momentum_band_GeV_c": thresholds_band,
        "saturated_angle_mrad": float(saturated_angle(n_c)) * 1e3,
        "photons_per_cm_at_beta_1": y1,
        "detection_efficiency": radiator.detection_efficiency,
        "detection_efficiency_is_default": radiator.efficiency_is_default,
        "photoelectrons_at_beta_1": y1 * slab.thickness * radiator.detection_efficiency,
        "windows": windows,
    }
    if radiator.angle_resolution_mrad is not None:
        numbers["angle_resolution_mrad"] = radiator.angle_resolution_mrad
        numbers["ring_separation"] = ring_separation(spec, curves, p_grid, radiator.angle_resolution_mrad)
    return numbers, curves


def mass_groups(spec) -> list[list]:
    """Species grouped by equal mass (e- with e+, pi+ with pi-), lightest first: they share thresholds."""
    groups: list[list] = []
    for sp in sorted(spec.species, key=lambda s: s.mass):
        if groups and abs(groups[-1][0].mass - sp.mass) < 1e-6:
            groups[-1].append(sp)
        else:
            groups.append([sp])
    return groups


def identification_windows(spec, thresholds: dict, curves: dict, p_grid) -> list[dict]:
    """For each pair of species of different mass: the momentum range where the lighter radiates and the
    heavier does not (between their thresholds at the band centre), clipped to the spec's momentum range,
    with the momentum above which the lighter gives at least MIN_PHOTOELECTRONS. Species of equal mass are
    listed together."""
    out = []
    p_lo, p_hi = float(p_grid[0]) / 1e3, float(p_grid[-1]) / 1e3
    for light, heavy in itertools.combinations(mass_groups(spec), 2):
        a, b = thresholds[light[0].key], thresholds[heavy[0].key]
        lo, hi = max(a, p_lo), min(b, p_hi)
        if lo >= hi:
            continue
        npe = curves[f"photoelectrons_{light[0].key}"]
        ok = (npe >= MIN_PHOTOELECTRONS) & (p_grid / 1e3 < b)
        efficient = float(p_grid[np.argmax(ok)]) / 1e3 if ok.any() else None
        out.append({"radiates": light[0].key, "silent": heavy[0].key, "radiates_all": [s.key for s in light],
                    "silent_all": [s.key for s in heavy], "from_GeV_c": lo, "to_GeV_c": hi,
                    "efficient_from_GeV_c": efficient})
    return out


def ring_separation(spec, curves: dict, p_grid, sigma_mrad: float) -> list[dict]:
    """Up to which momentum each pair of species is separated by RING_SIGMAS times the ring-angle resolution
    sigma/sqrt(N_pe) (N_pe of the heavier species at that momentum)."""
    out = []
    for light_group, heavy_group in itertools.combinations(mass_groups(spec), 2):
        light, heavy = light_group[0], heavy_group[0]
        sep = ring_angle_separation(curves[f"theta_mrad_{light.key}"], curves[f"theta_mrad_{heavy.key}"],
                                    curves[f"photoelectrons_{heavy.key}"], sigma_mrad)
        good = sep >= RING_SIGMAS
        upto = float(p_grid[np.nonzero(good)[0][-1]]) / 1e3 if good.any() else None
        out.append({"pair": [light.key, heavy.key], "pair_all": [[s.key for s in light_group], [s.key for s in heavy_group]],
                    "separated_up_to_GeV_c": upto})
    return out


def scintillator_numbers(spec, layer, layer_kn: dict, medium_of_material) -> dict | None:
    """Birks light per MIP for the active slab of a layer made of a scintillator, and proton quenching."""
    slab = next((s for s in layer.slabs if s.active), layer.slabs[0])
    m = spec.materials[slab.material]
    if m.scintillator is None:
        return None
    sc = m.scintillator
    dedx_cm = layer_kn["mip_mean_MeV"] / slab.thickness
    light = float(birks_light_thin(sc["light_yield_per_MeV"], sc["birks_cm_per_MeV"], layer_kn["mip_mean_MeV"], dedx_cm))
    medium = medium_of_material(slab.material)
    proton = 938.27208816
    t = np.geomspace(1e-3, max(PROTON_QUENCH_ENERGIES_MEV), 2000)
    s_lin = np.maximum(bethe_stopping(momentum_of_kinetic(t, proton), proton, 1, medium), 0.0) * m.density
    # below the Bethe regime (T < 1.2 MeV, higher with heavy elements) hold dE/dx at its value there: of limited validity
    edge = float(kinetic_energy(bethe_regime_min_beta_gamma(medium.Z) * proton, proton))
    s_lin = np.where(t < edge, np.interp(edge, t, s_lin), s_lin)
    lt = birks_light_stopping(sc["light_yield_per_MeV"], sc["birks_cm_per_MeV"], t, s_lin)
    quench = [{"kinetic_energy_MeV": e, "light_photons": float(np.interp(e, t, lt)),
               "quenching_factor": float(np.interp(e, t, lt)) / (sc["light_yield_per_MeV"] * e),
               "valid": e >= 2 * edge} for e in PROTON_QUENCH_ENERGIES_MEV]
    return {"material": m.name, "light_yield_per_MeV": sc["light_yield_per_MeV"],
            "light_yield_is_default": sc["light_yield_is_default"], "birks_mm_per_MeV": sc["birks_cm_per_MeV"] * 10,
            "birks_is_default": sc["birks_is_default"], "mip_photons": light,
            "mip_quenching_factor": light / (sc["light_yield_per_MeV"] * layer_kn["mip_mean_MeV"]),
            "proton_quenching": quench}
