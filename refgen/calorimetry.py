"""Report section: radiation and nuclear lengths, critical energies, showers and the material budget.

Plain data out; the physics is in refgen.physics (radlen, nuclear, showers).
"""
from __future__ import annotations

import math

import numpy as np

from . import datafiles
from .model import CALORIMETER_KINDS
from .physics.nuclear import interpolated_elements, nuclear_length
from .physics.showers import (containment_depth, contained_fraction, critical_energy_crossing,
                              critical_energy_fit, critical_energy_rossi, moliere_radius, profile, shower_max)

LATERAL_CONTAINMENT = [(1.0, 0.90), (2.0, 0.95), (3.5, 0.99)]  # common practice (RPP Sec. 34.5: ~90% in 1 R_M, ~95% in 2 R_M)
# Fabjan & Gianotti, Rev. Mod. Phys. 75 (2003) 1243, Eq. 29 (from memory): a = 2.7% sqrt(d[mm] / f_samp)
STOCHASTIC_COEFFICIENT = 0.027


def material_lengths(material, medium, x0: float) -> dict:
    """Radiation-length family constants of one material."""
    z, a, w = material.arrays()
    ec_e = critical_energy_rossi(medium, x0)
    ec_p = critical_energy_rossi(medium, x0, positron=True)
    lam_i = nuclear_length(z, a, w, "interaction")
    lam_t = nuclear_length(z, a, w, "collision")
    z_eff = medium.z_eff
    rm = moliere_radius(x0, ec_e)
    return {
        "critical_energy_MeV": {"electron": ec_e, "positron": ec_p},
        "critical_energy_crossing_MeV": {"electron": critical_energy_crossing(medium, x0),
                                         "positron": critical_energy_crossing(medium, x0, positron=True)},
        "critical_energy_fit_MeV": critical_energy_fit(z_eff, material.is_gas),
        "moliere_radius_g_cm2": rm,
        "moliere_radius_cm": rm / material.density,
        "nuclear_interaction_length_g_cm2": lam_i,
        "nuclear_interaction_length_cm": lam_i / material.density,
        "nuclear_collision_length_g_cm2": lam_t,
        "nuclear_collision_length_cm": lam_t / material.density,
        **nuclear_length_provenance(z),
    }


def nuclear_length_provenance(z) -> dict:
    """Which elements' nuclear lengths are interpolated rather than tabulated, and the note shown beside them."""
    symbols = [datafiles.elements()[zj - 1]["symbol"] for zj in interpolated_elements(z)]
    note = ("high-energy hadrons; per-element values of the Review of Particle Physics combined by "
            "1/lambda = sum w_j/lambda_j")
    if symbols:
        note += f"; interpolated in A for {', '.join(symbols)} (not tabulated)"
    return {"nuclear_lengths_interpolated_elements": symbols, "nuclear_lengths_note": note}


def layer_budget(spec, layer, materials: dict) -> dict:
    """x/X0 and x/lambda_I of one layer (all its slabs and repeats)."""
    x0 = {name: m["radiation_length_g_cm2"] for name, m in materials.items()}
    lam = {name: m["nuclear_interaction_length_g_cm2"] for name, m in materials.items()}
    return {"x_over_X0": spec.layer_depth(layer, x0), "x_over_lambda_I": spec.layer_depth(layer, lam)}


def effective_cell(spec, layer, materials: dict) -> dict:
    """A sampling cell as a homogeneous mixture by thickness and density (RPP Sec. 34.4.3 for R_M):
    w_j = t_j rho_j / sum t rho; 1/X0 = sum w_j/X0_j; 1/lambda = sum w_j/lambda_j; 1/R_M = sum (w_j E_cj / X0_j) / E_s;
    E_c = X0 E_s / R_M; the MIP sampling fraction is the active slabs' share of the minimum-ionising loss."""
    masses = [s.thickness * spec.materials[s.material].density for s in layer.slabs]
    total_mass = sum(masses)
    w = [mm / total_mass for mm in masses]
    rho = total_mass / layer.cell_thickness
    x0 = 1.0 / sum(wj / materials[s.material]["radiation_length_g_cm2"] for wj, s in zip(w, layer.slabs))
    lam = 1.0 / sum(wj / materials[s.material]["nuclear_interaction_length_g_cm2"] for wj, s in zip(w, layer.slabs))
    es = datafiles.constant("scale_energy_Es")
    inv_rm = sum(wj * materials[s.material]["critical_energy_MeV"]["electron"] / materials[s.material]["radiation_length_g_cm2"]
                 for wj, s in zip(w, layer.slabs)) / es
    rm = 1.0 / inv_rm
    ec = x0 * es / rm
    loss = [s.thickness * spec.materials[s.material].density * materials[s.material]["min_ionization"]["dedx_MeV_cm2_g"]
            for s in layer.slabs]
    active = sum(l for l, s in zip(loss, layer.slabs) if s.active)
    f_samp = active / sum(loss) if active else None
    d_mm = sum(s.thickness for s in layer.slabs if s.active) * 10.0
    stochastic = STOCHASTIC_COEFFICIENT * math.sqrt(d_mm / f_samp) if f_samp else None
    return {"density_g_cm3": rho, "effective_radiation_length_cm": x0 / rho, "effective_radiation_length_g_cm2": x0,
            "effective_moliere_radius_cm": rm / rho, "effective_critical_energy_MeV": ec,
            "effective_interaction_length_cm": lam / rho, "sampling_fraction_mip": f_samp,
            "active_thickness_mm": d_mm, "stochastic_term_fraction_sqrt_GeV": stochastic}


def hadronic_estimate(energy_gev: float, depth_lambda: float) -> dict:
    """Rough hadron-shower depths, in lambda_I (Review of Particle Physics, calorimetry chapter, from memory;
    approximate, for iron-like calorimeters): t_max = 0.2 ln(E/GeV) + 0.7 and L95 = t_max + 2.5 lambda_att with
    lambda_att = (E/GeV)^0.13 lambda_I."""
    e = max(energy_gev, 1.0)
    t_max = 0.2 * math.log(e) + 0.7
    l95 = t_max + 2.5 * e ** 0.13
    return {"t_max_lambda_I": t_max, "depth_95_lambda_I": l95, "contained_95": depth_lambda >= l95}


def systems_showers(spec, layers_kn: list[dict], materials: dict) -> dict:
    """Per calorimeter system: depth, effective constants and the shower numbers at each shower energy."""
    out = {}
    for kind in CALORIMETER_KINDS:
        layers = [l for l in spec.layers if l.system == kind]
        if not layers:
            continue
        entries = {l["name"]: l for l in layers_kn}
        depth_x0 = sum(entries[l.name]["x_over_X0"] for l in layers)
        depth_li = sum(entries[l.name]["x_over_lambda_I"] for l in layers)
        first = layers[0]
        if first.is_sampling:
            eff = effective_cell(spec, first, materials)
            ec, rm_cm = eff["effective_critical_energy_MeV"], eff["effective_moliere_radius_cm"]
        else:
            m = materials[first.slabs[0].material]
            eff = None
            ec, rm_cm = m["critical_energy_MeV"]["electron"], m["moliere_radius_cm"]
        shower = {}
        for e in spec.shower_energies:
            key = f"{e / 1e3:g}"
            row = {}
            for particle, photon in (("electron", False), ("photon", True)):
                valid = e > 10 * ec
                row[particle] = {
                    "t_max_X0": max(shower_max(e, ec, photon), 0.0),
                    "containment_fraction": float(contained_fraction(depth_x0, e, ec, photon)),
                    "depth_95_X0": containment_depth(0.95, e, ec, photon),
                    "valid": valid,
                }
            shower[key] = {"t_max_X0": row["electron"]["t_max_X0"],
                           "containment_fraction": row["electron"]["containment_fraction"],
                           "depth_95_X0": row["electron"]["depth_95_X0"], "by_particle": row,
                           "hadronic": hadronic_estimate(e / 1e3, depth_li)}
        entry = {"layers": [l.name for l in layers], "depth_X0": depth_x0, "depth_lambda_I": depth_li,
                 "critical_energy_MeV": ec, "moliere_radius_cm": rm_cm,
                 "lateral_containment": [{"radius_moliere": r, "radius_cm": r * rm_cm, "fraction": f}
                                         for r, f in LATERAL_CONTAINMENT],
                 "shower": shower}
        if eff is not None:
            entry.update({k: eff[k] for k in ("sampling_fraction_mip", "effective_radiation_length_cm",
                                               "effective_moliere_radius_cm", "effective_critical_energy_MeV",
                                               "effective_interaction_length_cm", "stochastic_term_fraction_sqrt_GeV",
                                               "active_thickness_mm")})
        out[kind] = entry
    return out


def profiles(system: dict, energies) -> dict:
    """Longitudinal profile curves (1/E dE/dt against t in X0) per shower energy, electrons and photons."""
    t = np.linspace(0.0, max(system["depth_X0"] * 1.3, 25.0), 300)
    ec = system["critical_energy_MeV"]
    return {"t_X0": t, "series": [{"label": f"{e / 1e3:g} GeV {kind}", "y": profile(t, e, ec, kind == "photon")}
                                   for e in energies for kind in ("electron", "photon")]}


def survival(layers_kn: list[dict]) -> list[dict]:
    """Probability that a hadron reaches each layer without a nuclear interaction: exp(-sum x/lambda_I)."""
    total, out = 0.0, []
    for l in layers_kn:
        out.append({"layer": l["name"], "x_over_lambda_I_before": total, "survival_probability": math.exp(-total)})
        total += l["x_over_lambda_I"]
    return out


def budget_totals(layers_kn: list[dict]) -> dict:
    """Cumulative x/X0 and x/lambda_I per layer, and totals per system and for the stack."""
    cum_x0 = cum_li = 0.0
    per_system: dict[str, dict] = {}
    rows = []
    for l in layers_kn:
        cum_x0 += l["x_over_X0"]
        cum_li += l["x_over_lambda_I"]
        rows.append({"layer": l["name"], "system": l["system"], "x_over_X0": l["x_over_X0"],
                     "x_over_lambda_I": l["x_over_lambda_I"], "cumulative_X0": cum_x0, "cumulative_lambda_I": cum_li})
        s = per_system.setdefault(l["system"], {"x_over_X0": 0.0, "x_over_lambda_I": 0.0})
        s["x_over_X0"] += l["x_over_X0"]
        s["x_over_lambda_I"] += l["x_over_lambda_I"]
    return {"rows": rows, "per_system": per_system, "stack": {"x_over_X0": cum_x0, "x_over_lambda_I": cum_li}}


def conversion_probability_high_energy(x_over_x0: float) -> float:
    """High-energy photon conversion probability in x/X0: 1 - exp(-7/9 x/X0) (RPP 2024 Eq. 34.31)."""
    return 1.0 - math.exp(-7.0 / 9.0 * x_over_x0)
