"""Report section: thin-sensor signals. For every sensitive single-slab layer, the energy-loss distribution of a
minimum-ionising muon (Landau, Vavilov or Gaussian by kappa, widened for atomic binding), the fraction of
particles above the layer's readout threshold, the highest threshold keeping 99 % of them, and how the most
probable signal and the efficiency change with the incidence angle.

Plain data out; the physics is in refgen.physics.straggling. The atomic subshells (refgen/data/atomic_shells.csv) are
gathered here and passed to the physics as arrays.
"""
from __future__ import annotations

import numpy as np

from . import datafiles
from .charged import FC_PER_CARRIER, MUON_MASS
from .physics.density_effect import oscillator_strengths
from .physics.straggling import (binding_variance, fraction_above, fwhm, landau_xi, loss_distribution,
                                 threshold_keeping)

ANGLES_DEG = (0, 10, 20, 30, 40, 50, 60)
KEEP_FRACTION = 0.99
CSV_POINTS = 401
# refgen's own flag: when the binding Gaussian is wider than the Landau half-width (sigma > 2 xi) the shape is mostly
# that Gaussian, which Shulek's correction does not support; its low-side tail (low thresholds) is then rough.
BINDING_DOMINANT_XI = 2.0


def shell_table(material) -> tuple[np.ndarray, np.ndarray]:
    """All subshells of a material: binding energies (eV) and the fraction of its electrons in each, from the
    shared subshell table (refgen/data/atomic_shells.csv) through the density effect's own helper; every electron
    counted as bound (no conduction band)."""
    f, e, _ = oscillator_strengths(*material.arrays(), False, datafiles.atomic_shells())
    return e, f


def signal_layers(spec) -> list:
    """The sensitive single-slab layers, where one slab of one material makes the signal."""
    return [layer for layer in spec.layers if not layer.is_sampling and layer.slabs[0].active]


def layer_distribution(spec, layer, medium, min_ion, shells, path_factor: float = 1.0):
    """The loss distribution of a minimum-ionising muon crossing the layer's slab on a path ``path_factor`` times
    its thickness (1/cos of the incidence angle). The mode is the layer's most probable loss (same helper)."""
    slab = layer.slabs[0]
    m = spec.materials[slab.material]
    bg, dedx_min = min_ion
    x = slab.thickness * m.density * path_factor
    xi = float(landau_xi(bg, 1, medium, x))
    var = binding_variance(bg, xi, *shells)
    return loss_distribution(bg, MUON_MASS, 1, medium, x, dedx_min * x, var)


def _charge_fc(energy_mev, w_ev):
    """Charge (fC) freed by a deposit (MeV) with W eV per pair."""
    return np.asarray(energy_mev) * 1e6 / w_ev * FC_PER_CARRIER


def display_grid(dist, threshold_mev: float | None) -> tuple[np.ndarray, np.ndarray]:
    """The density (1/keV) on the grid shown and tabulated (keV): from 0 to well past the peak and the threshold."""
    top = max(dist.mode + 8.0 * fwhm(dist), 1.3 * (threshold_mev or 0.0))
    e = np.linspace(0.0, top, CSV_POINTS)
    return e * 1e3, np.interp(e, dist.energy, dist.density, left=0.0, right=0.0) * 1e-3


def csv_rows(e_kev, p_kev, w_ev) -> tuple[list[str], list[list]]:
    """data/straggling/<layer>.csv: energy_keV, probability_per_keV and, where the pair energy is known, charge_fC."""
    cols = ["energy_keV", "probability_per_keV"] + (["charge_fC"] if w_ev else [])
    return cols, [[float(a), float(b)] + ([float(_charge_fc(a * 1e-3, w_ev))] if w_ev else []) for a, b in zip(e_kev, p_kev)]


def layer_signal(spec, layer, media, min_ion) -> tuple[dict, tuple, dict]:
    """Key numbers, CSV table and figure data of one sensitive single-slab layer."""
    name = layer.slabs[0].material
    m = spec.materials[name]
    shells = shell_table(m)
    dist = layer_distribution(spec, layer, media[name], min_ion[name], shells)
    w = m.pair_energy_eV
    thr = layer.threshold
    width = fwhm(dist)
    numbers = {
        "model": dist.model,
        "kappa": dist.kappa,
        "xi_keV": dist.xi * 1e3,
        "binding_sigma_keV": dist.binding_sigma * 1e3,
        "most_probable_keV": dist.mode * 1e3,
        "fwhm_keV": width * 1e3,
        "normalisation": float(dist.cumulative[-1]),
        "binding_dominates": dist.binding_sigma > BINDING_DOMINANT_XI * dist.xi,
        "angles": [],
    }
    out = {"straggling": numbers}
    if thr is not None:
        t99 = threshold_keeping(dist, KEEP_FRACTION)
        out["threshold"] = {"value": thr.value, "unit": thr.unit, "keV": thr.energy * 1e3}
        out["mip_efficiency_above_threshold"] = float(fraction_above(dist, thr.energy))
        out["threshold_for_99_percent"] = {"value": t99 * thr.units_per_MeV, "unit": thr.unit, "keV": t99 * 1e3}
        out["most_probable_over_threshold"] = dist.mode / thr.energy
    for angle in ANGLES_DEG:
        path = 1.0 / np.cos(np.radians(angle))
        d = dist if angle == 0 else layer_distribution(spec, layer, media[name], min_ion[name], shells, path)
        numbers["angles"].append({
            "angle_deg": angle, "path_factor": float(path), "model": d.model,
            "most_probable_keV": d.mode * 1e3,
            "most_probable_fC": float(_charge_fc(d.mode, w)) if w else None,
            "efficiency": float(fraction_above(d, thr.energy)) if thr is not None else None,
        })
    e_kev, p_kev = display_grid(dist, thr.energy if thr else None)
    figure = {"energy_keV": e_kev, "density_per_keV": p_kev, "mode_keV": dist.mode * 1e3, "model": dist.model,
              "threshold": {"keV": thr.energy * 1e3, "label": f"{thr.value:g} {thr.unit}",
                            "efficiency": out["mip_efficiency_above_threshold"],
                            "keep99_keV": out["threshold_for_99_percent"]["keV"]} if thr else None,
              "keV_per_fC": (w * 1e-3 / FC_PER_CARRIER) if w else None}
    return out, csv_rows(e_kev, p_kev, w), figure
