"""Report section: the handbook's own structure (stack strips, system and species pages, quick reference,
downloads, search index). Plain data computed from the key numbers; templates only format it."""
from __future__ import annotations

from .model import SYSTEM_KINDS

SYSTEM_TITLES = {
    "tracking": "Tracking", "cherenkov": "Cherenkov counters", "em-calorimeter": "Electromagnetic calorimeter",
    "hadron-calorimeter": "Hadron calorimeter", "muon": "Muon system", "absorber": "Absorbers",
    "support": "Supports and services", "other": "Other layers",
}
QUICK_SPECIES = ("muon", "antimuon", "pion", "pion-minus", "kaon", "proton", "electron")


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


def species_pages(kn: dict, report: dict) -> list[dict]:
    """Per species: its numbers across materials, layers and radiators."""
    out = []
    for key, p in kn["particles"].items():
        per_material = []
        for name, rows in report["round_table"].items():
            row = next(r for r in rows if r["species"] == key)
            per_material.append({"material": name, "dedx": row["dedx"], "range": row["range"]})
        out.append({"key": key, "label": p["label"], "mass_MeV": p["mass_MeV"], "charge": p["charge"],
                    "custom": p["custom"], "per_material": per_material,
                    "reach": kn["reach_momentum_GeV_c"][key],
                    "thresholds": {r: v["threshold_momentum_GeV_c"][key] for r, v in kn["radiators"].items()}})
    return out


def quick_reference(kn: dict) -> dict:
    """The few numbers a shift crew needs, for one printed page."""
    species = [s for s in QUICK_SPECIES if s in kn["particles"]][:5]
    landmarks = []
    seen = set()
    for l in kn["layers"]:
        if l["system"] in ("em-calorimeter", "hadron-calorimeter", "muon") and l["system"] not in seen:
            seen.add(l["system"])
            landmarks.append(l["name"])
    muon_layers = [l["name"] for l in kn["layers"] if l["system"] == "muon"]
    if muon_layers and muon_layers[-1] not in landmarks:
        landmarks.append(muon_layers[-1])
    return {
        "species": species,
        "landmarks": landmarks,
        "active_layers": [l for l in kn["layers"] if l["active"]],
    }


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


def search_index(kn: dict, report: dict) -> list[dict]:
    """Entries for the offline search box: pages, materials, layers, species, radiators and quantities."""
    entries = [
        {"t": "Layer stack", "u": "index.html", "k": "stack layers overview front page"},
        {"t": "Quick reference", "u": "quickref.html", "k": "shift crew summary print"},
        {"t": "Charged particles", "u": "charged.html", "k": "reach momentum signals landau most probable carriers scattering theta0 scintillator birks"},
        {"t": "Thin-sensor signals", "u": "signals.html", "k": "threshold efficiency landau vavilov straggling distribution fC charge angle"},
        {"t": "Material budget", "u": "budget.html", "k": "radiation length interaction length survival conversion x/X0"},
        {"t": "Photons", "u": "photons.html", "k": "photoabsorption photoelectric compton rayleigh pair conversion transmission attenuation crossover map"},
        {"t": "Methods and validity", "u": "methods.html", "k": "formula reference validity accuracy caution"},
        {"t": "Downloads", "u": "downloads.html", "k": "csv json data files"},
    ]
    for name, m in kn["materials"].items():
        entries.append({"t": f"Material: {name}", "u": f"material-{report['material_slugs'][name]}.html",
                        "k": f"{m['description']} {' '.join(m['mass_fractions'])} density dE/dx range X0 radiation length"})
    for l in kn["layers"]:
        entries.append({"t": f"Layer: {l['name']}", "u": f"system-{l['system']}.html",
                        "k": f"{l['material']} {l['system']}"})
    for key, p in kn["particles"].items():
        entries.append({"t": f"Particle: {key} ({p['label']})", "u": f"species-{report['species_slugs'][key]}.html", "k": p["label"]})
    for s in systems(kn, report):
        entries.append({"t": f"System: {s['title']}", "u": f"system-{s['kind']}.html", "k": s["kind"]})
    for r in kn["radiators"]:
        entries.append({"t": f"Cherenkov: {r}", "u": f"cherenkov-{report['layer_slugs'][r]}.html", "k": "threshold ring angle photoelectrons"})
    for kind in kn["calorimeters"]:
        entries.append({"t": f"Showers: {kind}", "u": f"showers-{kind}.html", "k": "moliere containment shower maximum"})
    return entries


MAX_TABLE_LAYERS = 150  # per-layer tables of longer stacks list a thinned selection; the CSVs keep every layer


def table_layers(kn: dict) -> dict:
    """The layers that per-layer tables list. A stack of up to MAX_TABLE_LAYERS layers is listed whole. A longer
    one lists every k-th layer (about MAX_TABLE_LAYERS rows), the first and last layer of each system and the
    last layer of the stack, with a note saying so: thousands of rows are neither readable nor cheap, and
    every layer stays in the CSV files. ``rows`` pairs each listed layer's index with its key numbers."""
    layers = kn["layers"]
    n = len(layers)
    if n <= MAX_TABLE_LAYERS:
        return {"rows": [{"i": i, "l": l} for i, l in enumerate(layers)], "note": None}
    k = -(-n // MAX_TABLE_LAYERS)
    keep = set(range(0, n, k)) | {n - 1}
    for kind in {l["system"] for l in layers}:
        where = [i for i, l in enumerate(layers) if l["system"] == kind]
        keep |= {where[0], where[-1]}
    shown = sorted(keep)
    return {"rows": [{"i": i, "l": layers[i]} for i in shown],
            "note": (f"{len(shown)} of the stack's {n} layers are listed: every {k}th, and the first and last layer "
                     "of each system. Every layer is in the CSV files on the downloads page.")}
