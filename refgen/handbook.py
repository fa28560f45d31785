"""Report section: the handbook's own structure (stack strips, system and species pages, quick reference,
downloads, search index). Plain data computed from the key numbers; templates only format it."""
from __future__ import annotations

from . import datafiles
from .charged import REACH_STATES, SHOWER_ONSET_X0, reach_state
from .model import SYSTEM_KINDS

SYSTEM_TITLES = {
    "tracking": "Tracking", "cherenkov": "Cherenkov counters", "em-calorimeter": "Electromagnetic calorimeter",
    "hadron-calorimeter": "Hadron calorimeter", "muon": "Muon system", "absorber": "Absorbers",
    "support": "Supports and services", "other": "Other layers",
}
# The quick reference shows every species of the spec up to QUICK_MAX_SPECIES (what fits one printed page);
# beyond that it keeps the species of QUICK_PRIORITY first, and always the electron when the stack has a
# Cherenkov radiator or a calorimeter (electron tagging and showers are then part of a shift's questions).
QUICK_MAX_SPECIES = 8
QUICK_PRIORITY = ("electron", "muon", "pion", "kaon", "proton", "positron", "antimuon", "pion-minus")
QUICK_ALL_SENSITIVE = 6  # up to this many sensitive layers, the reach table lists every one of them


def stack_strips(kn: dict) -> dict:
    """Two to-scale strips of the stack, by thickness and by radiation length: per layer its share (percent)."""
    layers = kn["layers"]
    total_cm = sum(l["thickness_cm"] for l in layers) or 1.0
    total_x0 = sum(l["x_over_X0"] for l in layers) or 1.0
    return {
        "by_thickness": [{"name": l["name"], "system": l["system"], "percent": 100.0 * l["thickness_cm"] / total_cm,
                          "value": l["thickness_cm"], "unit": "cm"} for l in layers],
        "by_x0": [{"name": l["name"], "system": l["system"], "percent": 100.0 * l["x_over_X0"] / total_x0,
                   "value": l["x_over_X0"], "unit": "X0"} for l in layers],
        "total_cm": total_cm, "total_x0": total_x0,
    }


def systems(kn: dict, report: dict) -> list[dict]:
    """One entry per system kind present: its layers and links to its section pages."""
    out = []
    for kind in SYSTEM_KINDS:
        names = [l["name"] for l in kn["layers"] if l["system"] == kind]
        if not names:
            continue
        links = []
        if kind in kn.get("calorimeters", {}):
            links.append({"href": f"showers-{kind}.html", "text": "shower containment"})
        for r in kn.get("radiators", {}):
            if r in names:
                links.append({"href": f"cherenkov-{report['layer_slugs'][r]}.html", "text": f"Cherenkov radiator {r}"})
        out.append({"kind": kind, "title": SYSTEM_TITLES[kind], "description": SYSTEM_KINDS[kind], "layers": names,
                    "links": links, "x_over_X0": kn["material_budget"]["per_system"][kind]["x_over_X0"],
                    "x_over_lambda_I": kn["material_budget"]["per_system"][kind]["x_over_lambda_I"]})
    return out


def reach_cell(kn: dict, report: dict, table: str, species: str, layer: str) -> dict:
    """One cell of a reach ('reach') or crossing ('cross') table: the momentum (GeV/c or None), its state
    ('ok', 'limited', 'shower', 'beyond'; see charged.reach_state) and, for a shower, the depth in X0."""
    value = kn[f"{table}_momentum_GeV_c"][species][layer]
    depth = kn["electron_showers"][f"{table}_depth_X0"].get(species, {}).get(layer)
    return {"value": value, "state": reach_state(value, depth, report["validity_edges_GeV_c"][species]),
            "depth_X0": depth}


def reach_rows(kn: dict, report: dict, table: str, layers: list[str] | None = None,
               species: list[str] | None = None) -> list[dict]:
    """Rows of a reach or crossing table: per layer, one cell per species (reach_cell)."""
    species = species if species is not None else list(kn["particles"])
    layers = layers if layers is not None else [l["name"] for l in kn["layers"]]
    system = {l["name"]: l["system"] for l in kn["layers"]}
    return [{"layer": n, "system": system[n], "species": species,
             "cells": [reach_cell(kn, report, table, sp, n) for sp in species]} for n in layers]


def reach_cells(kn: dict, report: dict, table: str) -> dict:
    """{layer: {species: cell}} for a reach or crossing table (reach_cell)."""
    return {row["layer"]: dict(zip(kn["particles"], row["cells"])) for row in reach_rows(kn, report, table)}


def reach_notes() -> dict:
    """The meaning of each non-numeric or marked reach cell, for the notes under every reach table."""
    return {"onset_X0": SHOWER_ONSET_X0, **REACH_STATES}


def strongly_interacting(key: str, custom: bool) -> bool | None:
    """Whether a species meets nuclear interactions: a hadron or nucleus by its PDG id (particle package);
    None for a species the spec defines by mass and charge only, which says nothing of it."""
    if custom:
        return None
    from particle.pdgid import is_hadron, is_nucleus
    pdgid = datafiles.particles()[key]["pdgid"]
    return bool(is_hadron(pdgid) or is_nucleus(pdgid))


def species_pages(kn: dict, report: dict) -> list[dict]:
    """Per species: its numbers across materials, layers and radiators."""
    out = []
    for key, p in kn["particles"].items():
        per_material = []
        for name, rows in report["round_table"].items():
            row = next(r for r in rows if r["species"] == key)
            per_material.append({"material": name, **row})
        out.append({"key": key, "label": p["label"], "mass_MeV": p["mass_MeV"], "charge": p["charge"],
                    "custom": p["custom"], "strong": strongly_interacting(key, p["custom"]), "per_material": per_material,
                    "reach": reach_rows(kn, report, "reach", species=[key]),
                    "cross": reach_rows(kn, report, "cross", species=[key]),
                    "thresholds": {r: v["threshold_momentum_GeV_c"][key] for r, v in kn["radiators"].items()}})
    return out


def quick_species(kn: dict) -> list[str]:
    """The species columns of the quick reference (QUICK_MAX_SPECIES, QUICK_PRIORITY)."""
    keys = list(kn["particles"])
    if len(keys) <= QUICK_MAX_SPECIES:
        return keys
    ranked = [k for k in QUICK_PRIORITY if k in keys] + [k for k in keys if k not in QUICK_PRIORITY]
    chosen = ranked[:QUICK_MAX_SPECIES]
    if "electron" in keys and "electron" not in chosen and (kn["radiators"] or kn["calorimeters"]):
        chosen[-1] = "electron"
    return [k for k in keys if k in chosen]


def quick_landmarks(kn: dict) -> list[str]:
    """The layers of the quick-reference reach table: every sensitive layer when there are at most
    QUICK_ALL_SENSITIVE, else the outermost sensitive layer of each system, in stack order."""
    active = [l for l in kn["layers"] if l["active"]]
    if len(active) <= QUICK_ALL_SENSITIVE:
        return [l["name"] for l in active]
    outermost = {l["system"]: l["name"] for l in active}
    return [l["name"] for l in active if outermost[l["system"]] == l["name"]]


def quick_reference(kn: dict, report: dict) -> dict:
    """The few numbers a shift crew needs, for one printed page."""
    species = quick_species(kn)
    landmarks = quick_landmarks(kn)
    return {
        "species": species,
        "all_species": len(species) == len(kn["particles"]),
        "tracker": tracker_line(kn, species),
        "landmarks": landmarks,
        "all_sensitive": len(landmarks) == sum(1 for l in kn["layers"] if l["active"]),
        "reach": reach_rows(kn, report, "reach", landmarks, species),
        "active_layers": [l for l in kn["layers"] if l["active"]],
    }


def tracker_line(kn: dict, species: list[str]) -> dict | None:
    """The tracker's line on the quick reference: its measuring layers, field, and for the first quick-reference
    species sigma(p)/p at 1, 10 and 100 GeV/c and the origin resolution at 1 GeV/c; None when nothing measures."""
    lay = kn["tracking_layout"]
    if not lay["fits_position"]:
        return None
    key = species[0] if species else next(iter(kn["tracking_resolution"]))
    at = kn["tracking_resolution"][key]["at_round_momenta"]
    return {"species": key, "planes": len(lay["planes"]), "first": lay["planes"][0]["layer"],
            "last": lay["planes"][-1]["layer"], "field_T_m": sum(r["field_integral_T_m"] for r in lay["field"]),
            "momentum_GeV_c": at["momentum_GeV_c"], "sigma_p_over_p": at.get("sigma_p_over_p"),
            "sigma_origin_um_at_1_GeV_c": at["sigma_origin_um"][0]}


def downloads(report: dict) -> list[dict]:
    """Every data file of the site, with a one-line description."""
    out = [{"path": "data/key-numbers.json", "what": "all key numbers of this handbook (machine-readable; used for change tracking)"}]
    for path in sorted(report["csv_tables"]):
        if path.startswith("data/dedx/"):
            mat, sp = path[len("data/dedx/"):-4].split("--")
            what = f"energy loss and CSDA range of {sp} in {mat}"
        elif path.startswith("data/photon/"):
            what = f"photon mass attenuation by process in {path[len('data/photon/'):-4]}"
        elif path.startswith("data/straggling/"):
            what = f"energy-loss distribution of a minimum-ionising muon in layer {path[len('data/straggling/'):-4]}"
        elif path.startswith("data/cherenkov/"):
            what = f"Cherenkov angle and photoelectrons per species in {path[len('data/cherenkov/'):-4]}"
        else:
            what = report["csv_descriptions"].get(path, "table")
        out.append({"path": path, "what": what})
    return out


MATERIAL_QUANTITIES = ("density radiation length X0 moliere radius critical energy nuclear interaction length lambda "
                       "minimum ionisation ionization dE/dx stopping power energy loss CSDA range photon attenuation "
                       "mean excitation energy")


def element_names(symbols) -> str:
    """The element names of a material's symbols ('Pb' -> 'lead'), so a search for 'lead' finds PbWO4."""
    import periodictable
    return " ".join(getattr(periodictable, s).name for s in symbols if hasattr(periodictable, s))


def search_index(kn: dict, report: dict) -> list[dict]:
    """Entries for the offline search box: pages, materials (with their elements' names), layers, species,
    radiators with each species' threshold, scintillators and quantities. Page headings are added by render."""
    entries = [
        {"t": "Layer stack", "u": "index.html", "k": "stack layers overview front page thickness density"},
        {"t": "Quick reference", "u": "quickref.html", "k": "shift crew summary print reach carriers photons thresholds"},
        {"t": "Charged particles", "u": "charged.html", "k": "reach momentum cross signals landau most probable mean carriers "
                                                           "fC scattering theta0 highland scintillator light birks quench quenching electrons shower"},
        {"t": "Thin-sensor signals", "u": "signals.html", "k": "threshold efficiency landau vavilov straggling distribution fC charge angle"},
        {"t": "Tracking resolution", "u": "tracking.html", "k": "momentum resolution sigma(p)/p position angle origin impact field"},
        {"t": "Material budget", "u": "budget.html", "k": "radiation length interaction length survival conversion x/X0 tracking volume"},
        {"t": "Photons", "u": "photons.html", "k": "photoabsorption photoelectric compton rayleigh pair conversion probability transmission attenuation crossover map regime tracking volume"},
        {"t": "Particle identification", "u": "identification.html", "k": "time of flight timing energy loss dE/dx truncated mean Cherenkov separation crossover gap"},
        {"t": "Methods and validity", "u": "methods.html", "k": "formula reference validity accuracy caution limited"},
        {"t": "Downloads", "u": "downloads.html", "k": "csv json data files key numbers"},
    ]
    for name, m in kn["materials"].items():
        scint = " scintillator light yield birks quench quenching" if any(
            l.get("scintillator", {}).get("material") == name for l in kn["layers"]) else ""
        entries.append({"t": f"Material: {name}", "u": f"material-{report['material_slugs'][name]}.html",
                        "k": f"{m['description']} {' '.join(m['mass_fractions'])} {element_names(m['mass_fractions'])} "
                             f"{m['state']} {MATERIAL_QUANTITIES}{scint}"})
    for l in kn["layers"]:
        extra = " scintillator light birks quench quenching" if "scintillator" in l else ""
        entries.append({"t": f"Layer: {l['name']}", "u": f"system-{l['system']}.html",
                        "k": f"{l['material']} {l['system']} {SYSTEM_TITLES[l['system']]}{extra}"})
    for key, p in kn["particles"].items():
        entries.append({"t": f"Particle: {key} ({p['label']})", "u": f"species-{report['species_slugs'][key]}.html",
                        "k": f"{p['label']} reach range dE/dx energy loss mass"})
    for s in systems(kn, report):
        entries.append({"t": f"System: {s['title']}", "u": f"system-{s['kind']}.html", "k": s["kind"]})
    for r, v in kn["radiators"].items():
        page = f"cherenkov-{report['layer_slugs'][r]}.html"
        entries.append({"t": f"Cherenkov: {r}", "u": page,
                        "k": f"{v['material']} threshold ring angle photoelectrons refractive index"})
        for sp in v["threshold_momentum_GeV_c"]:
            entries.append({"t": f"{sp} Cherenkov threshold in {r}", "u": page,
                            "k": f"{kn['particles'][sp]['label']} threshold momentum"})
    for kind in kn["calorimeters"]:
        entries.append({"t": f"Showers: {SYSTEM_TITLES[kind]}", "u": f"showers-{kind}.html",
                        "k": f"{kind} moliere containment shower maximum electron positron photon"})
    return entries


MAX_TABLE_LAYERS = 150  # per-layer tables of longer stacks list a thinned selection; the CSVs keep every layer


def page_view(kn: dict) -> tuple[dict, str | None]:
    """(the key numbers as the pages list them, a note or None). A stack of up to MAX_TABLE_LAYERS layers is
    listed whole. A longer one is listed thinned, since thousands of rows are neither readable nor cheap:
    every k-th layer (about MAX_TABLE_LAYERS rows), the first and last layer of each system, the outermost
    sensitive layer of each system and the last layer of the stack. The lists aligned with the layers are
    thinned alike; totals, the to-scale strips, the figures, the CSVs and key-numbers.json keep every layer."""
    layers = kn["layers"]
    n = len(layers)
    if n <= MAX_TABLE_LAYERS:
        return kn, None
    k = -(-n // MAX_TABLE_LAYERS)
    keep = set(range(0, n, k)) | {n - 1}
    for kind in {l["system"] for l in layers}:
        where = [i for i, l in enumerate(layers) if l["system"] == kind]
        active = [i for i in where if layers[i]["active"]]
        keep |= {where[0], where[-1]} | ({active[-1]} if active else set())
    shown = sorted(keep)
    names = {layers[i]["name"] for i in shown}
    view = dict(kn, layers=[layers[i] for i in shown],
                hadron_survival=[kn["hadron_survival"][i] for i in shown],
                material_budget=dict(kn["material_budget"], rows=[kn["material_budget"]["rows"][i] for i in shown]),
                tracking_scattering=[r for r in kn["tracking_scattering"] if r["layer"] in names])
    return view, (f"This stack has {n} layers; the tables list {len(shown)} of them: every {k}th, and the first, the "
                  "last and the outermost sensitive layer of each system. Every layer is in the figures and in the "
                  "CSV files on the downloads page.")

