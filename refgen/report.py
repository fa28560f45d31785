"""The report: every number, table and curve of one spec's handbook, as plain data (no rendering here).

``make_report(spec)`` returns a dict with the key numbers (written to data/key-numbers.json), the page
contexts and the CSV tables. Templates only format what is here.
"""
from __future__ import annotations

from pathlib import Path

import numpy as np

from . import __version__, attenuation, calorimetry, charged, identification, material_card, radiators, signals, tracking as tracking_section
from .cache import cached_map
from .changes import spec_summary
from .model import SYSTEM_KINDS, TRACKING_VOLUME_DEFINITION, Spec
from .physics.bethe_corrections import bethe_regime_min_beta_gamma
from .physics.medium import medium_of
from .physics.radlen import radiation_length
from .spec import safe_name

SCHEMA = "refgen-key-numbers/1"
CAUTION = ("Ranges, attenuation and other shielding-like numbers from refgen are for detector design and operation; "
           "they are not for radiation-protection, shielding or dosimetry decisions, which follow local codes and "
           "licensed practice.")


def plain(value):
    """Numpy scalars to Python numbers and tuples to lists, recursively (key numbers are plain JSON data)."""
    if isinstance(value, np.generic):
        return value.item()
    if isinstance(value, dict):
        return {k: plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [plain(v) for v in value]
    return value


def _unique_slugs(names) -> dict[str, str]:
    """A file-safe slug per name, with a numeric suffix where two names would collide."""
    out, used = {}, set()
    for name in names:
        base = safe_name(name).lower()
        slug, n = base, 2
        while slug in used:
            slug, n = f"{base}-{n}", n + 1
        used.add(slug)
        out[name] = slug
    return out


def material_numbers(m) -> dict:
    """Key numbers of one material (foundation constants)."""
    return {
        "description": m.description,
        "state": m.state,
        "density_g_cm3": m.density,
        "mass_fractions": m.mass_fractions,
        "z_over_a": m.z_over_a,
        "mean_excitation_energy_eV": m.mean_excitation_eV,
        "mean_excitation_energy_source": m.i_source,
        "plasma_energy_eV": m.plasma_energy_eV,
        "electron_density_per_cm3": m.electron_density_per_cm3,
        "temperature_K": m.temperature_K,
        "pressure_Pa": m.pressure_Pa,
        "conditions_as_given": m.conditions_text or None,
        "caveats": list(m.caveats),
    }


def layer_numbers(spec: Spec, layer, position_cm: float) -> dict:
    """Key numbers of one layer (foundation: geometry and material)."""
    out = {
        "name": layer.name,
        "material": layer.material,
        "system": layer.system,
        "thickness_cm": layer.thickness,
        "start_cm": position_cm,
        "sampling": layer.is_sampling,
        "active": any(s.active for s in layer.slabs),
    }
    if layer.is_sampling:
        out["repeat"] = layer.repeat
        out["cell"] = [{"material": s.material, "thickness_cm": s.thickness, "active": s.active} for s in layer.slabs]
    else:
        out["density_g_cm3"] = spec.materials[layer.slabs[0].material].density
    return out


DEDX_FLAGS = {"limited": "below the model's validity edge: limited accuracy",
              "non_positive": "below the model's validity edge: the model gives no meaningful value",
              "showers": "above the critical energy the particle showers: no CSDA range"}


def dedx_csv_rows(curve: dict) -> tuple[list[str], list[list]]:
    """Header and rows of one data/dedx/<material>--<particle>.csv table. dedx_MeV_cm2_g is the total
    (collision + radiative) loss; a value that is not meaningful is left empty and the flag column says why."""
    cols = ["momentum_GeV_c", "kinetic_energy_MeV", "beta_gamma", "dedx_MeV_cm2_g", "csda_range_g_cm2",
            "collision_MeV_cm2_g", "radiative_MeV_cm2_g", "valid"]
    rows = []
    for i, row in enumerate(zip(*(curve[c].tolist() for c in cols))):
        row, flags = list(row), []
        if not row[7]:
            bad = row[5] <= 0 or row[3] <= 0
            flags.append(DEDX_FLAGS["non_positive" if bad else "limited"])
            if bad:
                row[3] = row[5] = row[6] = None
        if curve["showers"][i]:
            flags.append(DEDX_FLAGS["showers"])
        rows.append(row + ["; ".join(flags)])
    return cols + ["flag"], rows


def material_physics(m, photon_energies) -> dict:
    """Everything about one material on its own: the medium (density-effect and shell data), X0, minimum
    ionisation, the material's key numbers and its photon curves. A pure function of its inputs, so it is
    computed in the process pool and cached by content (refgen.cache)."""
    medium = medium_of(m)
    x0 = radiation_length(*m.arrays())
    numbers = material_numbers(m)
    numbers["density_effect_source"] = medium.de_source
    numbers["z_eff"] = medium.z_eff
    numbers["bethe_valid_min_beta_gamma"] = bethe_regime_min_beta_gamma(medium.Z)
    numbers["radiation_length_g_cm2"] = x0
    numbers["radiation_length_cm"] = x0 / m.density
    bg, dedx = min_ion = charged.minimum_ionization(medium)
    numbers["min_ionization"] = {"dedx_MeV_cm2_g": dedx, "beta_gamma": bg, "dedx_MeV_cm": dedx * m.density,
                                 "species": "muon"}
    numbers["muon_critical_energy_GeV"] = charged.muon_critical_energy_gev(m, medium)
    numbers.update(calorimetry.material_lengths(m, medium, x0))
    numbers.update(material_card.card_numbers(m, medium, bg))
    numbers["photon"], photon_curves = attenuation.material_photons(m, photon_energies)
    return {"medium": medium, "x0": x0, "min_ion": min_ion, "numbers": numbers, "photon_curves": photon_curves,
            "layer_coeffs": attenuation.layer_energy_coefficients(m)}


def species_physics(sp, medium, x0: float, p, p_max: float) -> dict:
    """One species in one material: its CSDA range table, its curves on the momentum grid ``p`` and its row of
    the round-momentum table. Pure and cached like ``material_physics``."""
    table = charged.make_range_table(sp, medium, x0, p_max)
    return {"table": table, "curve": charged.species_curve(sp, medium, x0, table, p),
            "round_row": charged.round_momentum_row(sp, medium, x0, table)}


def make_report(spec: Spec, progress=None, cache_dir=None, workers: int = 1) -> dict:
    """All numbers for one spec as plain data. ``progress`` is told the name of each section as it starts.
    The per-material and per-(material, species) physics is computed in a pool of ``workers`` processes and
    kept in ``cache_dir`` by content, so a spec change recomputes only the materials and species it touches."""
    say = progress or (lambda msg: None)
    say("computing: materials and energy loss")
    physics_dir = Path(cache_dir) / "physics" if cache_dir is not None else None
    per_material = cached_map(material_physics, {name: (m, spec.photon_energy.values())
                                                 for name, m in spec.materials.items()}, physics_dir, workers)
    media = {name: r["medium"] for name, r in per_material.items()}
    x0s = {name: r["x0"] for name, r in per_material.items()}
    min_ion = {name: r["min_ion"] for name, r in per_material.items()}
    p = spec.momentum.values()
    per_pair = cached_map(species_physics, {(name, sp.key): (sp, media[name], x0s[name], p, spec.momentum.stop)
                                            for name in spec.materials for sp in spec.species}, physics_dir, workers)
    tables = {key: r["table"] for key, r in per_pair.items()}
    curves = {key: r["curve"] for key, r in per_pair.items()}
    materials = {name: r["numbers"] for name, r in per_material.items()}
    photon_curves = {name: r["photon_curves"] for name, r in per_material.items()}
    round_table = {name: [per_pair[(name, sp.key)]["round_row"] for sp in spec.species] for name in spec.materials}
    say("computing: photons")
    layer_coeffs = {name: r["layer_coeffs"] for name, r in per_material.items()}
    layers, z = [], 0.0
    sensitive = signals.signal_layers(spec)
    signal_tables, signal_figures = {}, {}
    for layer in spec.layers:
        entry = layer_numbers(spec, layer, z)
        entry.update(charged.layer_signals(spec, layer, media, x0s, min_ion))
        entry.update(calorimetry.layer_budget(spec, layer, materials))
        entry["photon_conversion_probability_high_energy"] = calorimetry.conversion_probability_high_energy(entry["x_over_X0"])
        entry["photon"] = attenuation.layer_photons(spec, layer, layer_coeffs)
        entry["photon_conversion_probability_at_1_GeV"] = entry["photon"]["conversion_probability"][-1]
        if layer.is_sampling:
            entry["effective_cell"] = calorimetry.effective_cell(spec, layer, materials)
        if layer in sensitive:
            numbers, signal_tables[layer.name], signal_figures[layer.name] = signals.layer_signal(spec, layer, media, min_ion)
            entry.update(numbers)
        scint = radiators.scintillator_numbers(spec, layer, entry, media.__getitem__)
        if scint is not None:
            entry["scintillator"] = scint
        layers.append(entry)
        z += layer.thickness
    say("computing: reach, budget, showers and radiators")
    showers = charged.electron_showers(spec, x0s)
    reach = charged.without_showers(charged.reach_momenta(spec, tables), showers["reach_depth_X0"])
    cross = charged.without_showers(charged.crossing_momenta(spec, tables), showers["cross_depth_X0"])
    radiator_numbers, radiator_curves = {}, {}
    for r in spec.radiators:
        radiator_numbers[r.layer], radiator_curves[r.layer] = radiators.radiator_numbers(spec, r, spec.momentum.values())
    say("computing: particle identification")
    ident_numbers, ident_page, ident_csv = identification.identification(spec, media, reach)
    budget = calorimetry.budget_totals(layers)
    survival = calorimetry.survival(layers)
    systems = calorimetry.systems_showers(spec, layers, materials)
    tracking = attenuation.tracking_volume_photons(spec, layer_coeffs)
    tracking_x0 = sum(l["x_over_X0"] for l in layers if l["name"] in tracking["layers"])
    tracking_definition = TRACKING_VOLUME_DEFINITION
    say("computing: tracking resolution")
    tracking_layout, tracking_resolution = tracking_section.tracking_report(spec, x0s, tables)
    key_numbers = {
        "schema": SCHEMA,
        "caution": CAUTION,
        "refgen_version": __version__,
        "spec_sha256_16": spec.spec_hash,
        "experiment": {"name": spec.experiment.name, "revision": spec.experiment.revision},
        "spec": spec_summary(spec),
        "particles": {s.key: {"label": s.label, "mass_MeV": s.mass, "charge": s.charge, "custom": s.custom}
                      for s in spec.species},
        "materials": materials,
        "layers": layers,
        "stack_length_cm": z,
        "reach_momentum_GeV_c": reach,
        "cross_momentum_GeV_c": cross,
        "electron_showers": showers,
        "tracking_scattering": charged.cumulative_scattering(spec, x0s),
        "material_budget": budget,
        "radiators": radiator_numbers,
        "identification": ident_numbers,
        "hadron_survival": survival,
        "calorimeters": systems,
        "tracking_volume": {"x_over_X0": tracking_x0, "layers": tracking["layers"], "definition": tracking_definition,
                            "photon_conversion_probability_high_energy": calorimetry.conversion_probability_high_energy(tracking_x0),
                            "photon": tracking,
                            "photon_conversion_probability_at_1_GeV": tracking["conversion_probability"][-1]},
        "tracking_layout": tracking_layout,
        "tracking_resolution": tracking_resolution,
    }
    slugs = _unique_slugs(spec.materials)
    species_slugs = _unique_slugs([s.key for s in spec.species])
    csv_tables = {f"data/dedx/{slugs[m]}--{species_slugs[sp]}.csv": dedx_csv_rows(c) for (m, sp), c in curves.items()}
    csv_tables.update({f"data/photon/{slugs[m]}.csv": attenuation.photon_csv(spec.photon_energy.values(), c)
                       for m, c in photon_curves.items()})
    layer_slugs = _unique_slugs([l.name for l in spec.layers])
    for name, c in radiator_curves.items():
        cols = list(c)
        csv_tables[f"data/cherenkov/{layer_slugs[name]}.csv"] = (cols, [list(map(float, r)) for r in zip(*(c[k] for k in cols))])
    csv_tables.update({f"data/straggling/{layer_slugs[name]}.csv": t for name, t in signal_tables.items()})
    csv_tables.update({f"data/tracking/{species_slugs[sp]}.csv": tracking_section.csv_table(r)
                       for sp, r in tracking_resolution.items()})
    names = [l["name"] for l in layers]
    scattering = charged.tracking_scattering_curves(spec, x0s, tables)
    theta_cols = [c for c in scattering if c.startswith("theta0_mrad_")]
    csv_tables["data/tracking-scattering.csv"] = (
        ["momentum_GeV_c"] + [c for t in theta_cols for c in (t, f"{t[len('theta0_mrad_'):]}_flag")],
        [[float(p)] + [c for t in theta_cols for c in ((float(scattering[t][i]), "") if np.isfinite(scattering[t][i])
                                                        else (None, "stops or showers before crossing the tracking volume"))]
         for i, p in enumerate(scattering["momentum_GeV_c"])])
    edges = {sp.key: charged.validity_edge_momentum(sp) / 1e3 for sp in spec.species}
    for kind, values in (("reach", reach), ("cross", cross)):
        depths = showers[f"{kind}_depth_X0"]
        csv_tables[f"data/{kind}.csv"] = (
            ["layer"] + [c for sp in values for c in (f"{sp}_GeV_c", f"{sp}_flag")],
            [[n] + [c for sp in values for c in (values[sp][n], charged.reach_flag(values[sp][n], depths.get(sp, {}).get(n), edges[sp]))]
             for n in names])
    csv_tables["data/budget.csv"] = (["layer", "system", "x_over_X0", "cumulative_X0", "x_over_lambda_I",
                                      "cumulative_lambda_I", "hadron_survival"],
                                     [[r["layer"], r["system"], r["x_over_X0"], r["cumulative_X0"], r["x_over_lambda_I"],
                                       r["cumulative_lambda_I"], sv["survival_probability"]]
                                      for r, sv in zip(budget["rows"], survival)])
    shower_profiles = {kind: calorimetry.profiles(entry, spec.shower_energies) for kind, entry in systems.items()}
    for kind, prof in shower_profiles.items():
        csv_tables[f"data/showers-{kind}.csv"] = (["depth_X0"] + [s["label"].replace(" ", "_") for s in prof["series"]],
                                                  [list(map(float, r)) for r in zip(prof["t_X0"], *(s["y"] for s in prof["series"]))])
    csv_tables.update(ident_csv)
    regime = attenuation.regime_map()
    csv_tables["data/photon-regimes.csv"] = (["Z", "symbol", "photoelectric_compton_MeV", "compton_pair_MeV"],
                                             [[r["Z"], r["symbol"], r["photoelectric_compton_MeV"], r["compton_pair_MeV"]]
                                              for r in regime["rows"]])
    return {
        "key_numbers": plain(key_numbers),
        "material_slugs": slugs,
        "species_slugs": species_slugs,
        "systems": {kind: [l["name"] for l in layers if l["system"] == kind] for kind in SYSTEM_KINDS
                    if any(l["system"] == kind for l in layers)},
        "system_descriptions": SYSTEM_KINDS,
        "notes": list(spec.notes),
        "warnings": list(spec.warnings),
        "summary_markdown": spec.experiment.summary,
        "curves": curves,
        "csv_tables": csv_tables,
        "round_momenta_GeV_c": [p / 1e3 for p in charged.ROUND_MOMENTA],
        "round_table": round_table,
        "validity_edges_GeV_c": edges,
        "momentum_grid_GeV_c": [spec.momentum.start / 1e3, spec.momentum.stop / 1e3],
        "species_labels": {sp.key: sp.label for sp in spec.species},
        "photon_energies_MeV": spec.photon_energy.values(),
        "layer_slugs": layer_slugs,
        "radiator_curves": radiator_curves,
        "photon_map": attenuation.photon_map(spec, materials),
        "photon_figures": {name: attenuation.photon_figure_data(spec, name, materials[name], c)
                           for name, c in photon_curves.items()},
        "photon_tables": {name: attenuation.photon_table(spec, m) for name, m in spec.materials.items()},
        "photon_process_words": attenuation.PROCESS_WORDS,
        "material_cards": {name: material_card.card_groups(materials[name]) for name in materials},
        "signal_figures": signal_figures,
        "shower_profiles": shower_profiles,
        "tracking_scattering_curves": scattering,
        "identification": ident_page,
        "shower_energy_keys": [f"{e / 1e3:g}" for e in spec.shower_energies],
        "csv_descriptions": {"data/reach.csv": "momentum each species needs to reach each layer",
                             "data/cross.csv": "momentum each species needs to cross each layer on its own",
                             "data/tracking-scattering.csv": "Highland theta0 against momentum through the tracking volume, per species",
                             "data/budget.csv": "material budget and hadron survival per layer",
                             "data/photon-regimes.csv": "photon crossover energies element by element, Z = 1-98 (photoabsorption = Compton, Compton = pair conversion)",
                             **identification.CSV_DESCRIPTIONS,
                             **{f"data/showers-{k}.csv": f"longitudinal shower profiles in the {k}" for k in systems},
                             **{f"data/tracking/{species_slugs[sp]}.csv": f"tracking resolution of {sp} against momentum: "
                                "sigma(p)/p and its parts, position and angle at the origin" for sp in tracking_resolution}},
    }
