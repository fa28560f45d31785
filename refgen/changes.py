"""Change tracking: compare this build's key numbers with a baseline key-numbers.json.

What is compared, and how:

* **The spec itself.** Every key-numbers.json carries a ``spec`` section (``spec_summary``): the materials,
  layers, species, radiators and grids as the spec defined them. The two summaries are compared item by item
  (added, removed, changed with old -> new), and that comparison opens the report.
* **Numbers and text separately.** Every leaf is found by its path (lists of named items by name). Two
  numbers are compared by their relative change; anything else (a note, a flag, a label) that differs is a
  changed note: listed, never formatted as a number, never counted against a tolerance.
* **Noise.** A relative change below ``NOISE_RELATIVE`` (1e-9) is floating-point rounding (summation order,
  library builds), a million times below the 4 significant digits any page shows; it is not reported.
* **Floors.** Some quantities are negligible below a floor that fits them. Probabilities, transmissions and
  fractions below ``PROBABILITY_FLOOR`` (1e-6) are negligible: one in a million per particle is below any rate
  a detector design or a shift acts on, and their relative moves there are meaningless (0 -> 6e-313 is
  "+100 %"). A move between two values both below the floor is counted as negligible, not as moved.
  Quantities without a floor are compared at every size.
* **Counting.** A number moved beyond the tolerance when its relative change exceeds it; a number that
  appears or disappears (a layer added, a value that became defined) always counts. Notes never count.

Exit codes (used by ``refgen compare`` and ``refgen build --fail-on-change``): 0 nothing beyond the tolerance,
2 unreadable input, 3 numbers moved beyond the tolerance.
"""
from __future__ import annotations

import dataclasses
import json
import math
import re

from .errors import RefgenError
from .spec.layer_section import LAYER_OPTIONS

NOISE_RELATIVE = 1e-9  # relative changes below this are floating-point rounding
PROBABILITY_FLOOR = 1e-6  # probabilities, transmissions and fractions below this are negligible
_PROBABILITY = re.compile(r"probability|transmission|fraction|survival")
_SKIP = {"schema", "refgen_version", "spec_sha256_16", "spec", "experiment"}
DIGITS = 4  # significant digits, as on the pages


class BaselineError(RefgenError):
    """A baseline file that cannot be read as key numbers."""


def load_baseline(path) -> dict:
    """Read a key-numbers.json file; anything else is a BaselineError naming the file."""
    try:
        with open(path, encoding="utf-8") as f:
            data = json.load(f)
    except OSError as exc:
        raise BaselineError(f"cannot read the key-numbers file {path}: {exc.strerror or exc}") from None
    except (json.JSONDecodeError, UnicodeDecodeError, RecursionError, ValueError) as exc:
        raise BaselineError(f"{path} is not a key-numbers JSON file: {str(exc)[:200]}") from None
    if not isinstance(data, dict) or not str(data.get("schema", "")).startswith("refgen-key-numbers/"):
        raise BaselineError(f"{path} has no refgen key-numbers schema (is it data/key-numbers.json of a handbook?)")
    return data


# --- the spec summary a key-numbers.json carries --------------------------------------------------------------

def _composition(m) -> str:
    return ", ".join(f"{c.symbol} {c.mass_fraction * 100:.4g} %" for c in
                     sorted(m.components, key=lambda c: -c.mass_fraction)) + " by mass"


def _index_text(index) -> str | None:
    if index is None:
        return None
    if index.kind == "constant":
        return f"{index.value:.8g}"
    if index.kind == "sellmeier":
        return f"Sellmeier B={list(index.b)} C={list(index.c)} um^2"
    return f"table of {len(index.values)} points, n = {min(index.values):.6g}-{max(index.values):.6g}"


def _slab_text(s) -> str:
    return f"{s.material} {s.thickness:.6g} cm" + (" (active)" if s.active else "")


def _plain(value):
    """A per-layer option as plain data: numbers and text as they are, a small dataclass as 'name=value, ...'."""
    if isinstance(value, (int, float, str, bool)):
        return value
    if dataclasses.is_dataclass(value):
        return ", ".join(f"{k}={v:.6g}" if isinstance(v, float) else f"{k}={v}"
                         for k, v in dataclasses.asdict(value).items())
    return str(value)


def spec_summary(spec) -> dict:
    """The spec as defined (internal units), stored in key-numbers.json so that a baseline carries it.
    Fields that are not given are left out (never null)."""
    materials = {}
    for name, m in spec.materials.items():
        entry = {"composition": _composition(m), "density_g_cm3": m.density, "state": m.state,
                 "mean_excitation_energy_eV": m.mean_excitation_eV, "pair_energy_eV": m.pair_energy_eV,
                 "temperature_K": m.temperature_K, "pressure_Pa": m.pressure_Pa,
                 "refractive_index": _index_text(m.refractive_index)}
        if m.scintillator:
            entry["scintillator_light_yield_per_MeV"] = m.scintillator.get("light_yield_per_MeV")
            entry["scintillator_birks_cm_per_MeV"] = m.scintillator.get("birks_cm_per_MeV")
        materials[name] = {k: v for k, v in entry.items() if v is not None}
    layers = []
    for layer in spec.layers:
        entry = {"name": layer.name, "system": layer.system, "thickness_cm": layer.thickness}
        if layer.is_sampling:
            entry["cell"] = f"{layer.repeat} x [" + ", ".join(_slab_text(s) for s in layer.slabs) + "]"
        else:
            entry["material"] = layer.slabs[0].material
            entry["active"] = layer.slabs[0].active
        for field, _ in LAYER_OPTIONS.values():  # the optional per-layer keys, whatever they are
            value = getattr(layer, field, None)
            if value is not None:
                entry[field] = _plain(value)
        layers.append(entry)
    return {
        "materials": materials,
        "layers": layers,
        "species": {s.key: {"label": s.label, "mass_MeV": s.mass, "charge": s.charge} for s in spec.species},
        "radiators": {r.layer: {"photon_band_eV": f"{r.band_eV[0]:.4g}-{r.band_eV[1]:.4g}",
                                "detection_efficiency": r.detection_efficiency, "mode": r.mode}
                      | ({"angle_resolution_mrad": r.angle_resolution_mrad} if r.angle_resolution_mrad else {})
                      for r in spec.radiators},
        "settings": {"momentum": f"{spec.momentum.start / 1e3:.6g}-{spec.momentum.stop / 1e3:.6g} GeV/c, "
                                 f"{spec.momentum.points} points",
                     "photon_energy": f"{spec.photon_energy.start:.6g}-{spec.photon_energy.stop:.6g} MeV, "
                                      f"{spec.photon_energy.points} points",
                     "shower_energies": ", ".join(f"{e / 1e3:g}" for e in spec.shower_energies) + " GeV",
                     "magnetic_field": "; ".join(f"{r.strength_tesla:g} T from {r.from_layer} to {r.to_layer}"
                                                 for r in getattr(spec, "field", ())) or "none",
                     "start_time": f"{spec.start_time_ps:g} ps" if spec.start_time_ps else "exact (not given)"},
    }


# --- units and readable names ---------------------------------------------------------------------------------

_UNITS = [("_MeV_cm2_g", "MeV cm2/g"), ("_g_cm2", "g/cm2"), ("_g_cm3", "g/cm3"), ("_cm2_g", "cm2/g"),
          ("_per_cm3", "/cm3"), ("_cm_per_MeV", "cm/MeV"), ("_mm_per_MeV", "mm/MeV"), ("_per_MeV", "/MeV"),
          ("_per_cm", "/cm"), ("_GeV_c", "GeV/c"), ("_MeV_cm", "MeV/cm"), ("_sqrt_GeV", "sqrt(GeV)"),
          ("_lambda_I", "lambda_I"), ("_X0", "X0"), ("_GeV", "GeV"), ("_MeV", "MeV"), ("_keV", "keV"),
          ("_eV", "eV"), ("_mrad", "mrad"), ("_cm", "cm"), ("_mm", "mm"), ("_um", "um"), ("_K", "K"),
          ("_Pa", "Pa"), ("_fC", "fC")]

_LEAVES = {
    "x_over_X0": ("thickness in radiation lengths", "X0"),
    "x_over_X0_for_scattering": ("radiation lengths used for scattering", "X0"),
    "x_over_lambda_I": ("thickness in interaction lengths", "lambda_I"),
    "x_over_lambda_I_before": ("interaction lengths in front of {}", "lambda_I"),
    "cumulative_X0": ("radiation lengths up to the end of {}", "X0"),
    "cumulative_lambda_I": ("interaction lengths up to the end of {}", "lambda_I"),
    "theta0_mrad_at_1_GeV_c": ("scattering angle theta0 at 1 GeV/c", "mrad"),
    "start_cm": ("start position", "cm"),
    "mip_mean_MeV": ("mean energy loss of a minimum-ionising particle", "MeV"),
    "mip_most_probable_MeV": ("most probable energy loss of a minimum-ionising particle", "MeV"),
    "mip_most_probable_note": ("note on the most probable energy loss", ""),
    "mip_restricted_MeV": ("restricted energy loss of a minimum-ionising particle", "MeV"),
    "mip_fwhm_MeV": ("width (FWHM) of the energy loss of a minimum-ionising particle", "MeV"),
    "mip_carriers": ("carriers from a minimum-ionising particle", ""),
    "mip_signal_fC": ("signal charge of a minimum-ionising particle", "fC"),
    "landau_kappa": ("Vavilov kappa", ""),
    "survival_probability": ("hadron survival to {}", ""),
    "z_eff": ("effective Z", ""),
    "bethe_valid_min_beta_gamma": ("lowest beta gamma of the Bethe regime", ""),
    "z_over_a": ("<Z/A>", "mol/g"),
    "photon_conversion_probability_at_1_GeV": ("photon conversion probability at 1 GeV", ""),
    "photon_conversion_probability_high_energy": ("photon conversion probability at high energy", ""),
    "stochastic_term_fraction_sqrt_GeV": ("stochastic term", "sqrt(GeV)"),
    "mass_MeV": ("mass", "MeV"),
}
_WORDS = {"min_ionization": "minimum ionisation", "by_particle": "", "effective_cell": "effective cell",
          "hadronic": "hadronic shower", "per_system": "", "rows": "", "stack": "", "photon": "photon"}
_AXES = ("energies_MeV", "momentum_GeV_c", "kinetic_energy_MeV")


def split_unit(name: str) -> tuple[str, str]:
    """'radiation_length_cm' -> ('radiation length', 'cm'); names without a unit suffix keep their words."""
    if name in _LEAVES:
        return _LEAVES[name]
    for suffix, unit in _UNITS:
        if name.endswith(suffix) and len(name) > len(suffix):
            return name[: -len(suffix)].replace("_", " "), unit
    return name.replace("_", " "), ""


def _is_number_key(part: str) -> bool:
    try:
        float(part)
        return True
    except ValueError:
        return False


def describe(path: tuple, root: dict) -> tuple[str, str]:
    """A reader's name for a key path and its unit: ('muon reach of muon-chamber-2', 'GeV/c')."""
    species = set(root.get("particles") or {}) | {"electron", "positron", "photon"}
    section, rest = path[0], list(path[1:])
    if section in ("reach_momentum_GeV_c", "cross_momentum_GeV_c") and len(rest) == 2:
        what = "reach of" if section.startswith("reach") else "momentum to cross"
        return f"{rest[0]} {what} {rest[1]}", "GeV/c"
    subject = None
    if section in ("materials", "radiators", "calorimeters", "particles") and rest:
        subject = rest.pop(0)
    elif section in ("layers", "hadron_survival", "tracking_scattering") and rest and rest[0].startswith("["):
        subject = rest.pop(0)[1:-1]
    elif section == "material_budget" and rest:
        if rest[0] == "rows" and len(rest) > 1:
            subject = rest[1][1:-1]
            rest = rest[2:]
        elif rest[0] == "per_system" and len(rest) > 1:
            subject = f"the {rest[1]} system"
            rest = rest[2:]
        elif rest[0] == "stack":
            subject = "the whole stack"
            rest = rest[1:]
    elif section == "tracking_volume":
        subject = "the tracking volume"
    elif section == "stack_length_cm":
        return "length of the whole stack", "cm"
    words: list[str] = [] if subject is not None or section in ("layers", "materials") else \
        [split_unit(section)[0]] if section != "tracking_volume" else []
    prefix, qualifiers, unit, leaf = [], [], "", ""
    for i, part in enumerate(rest):
        last = i == len(rest) - 1
        if part.startswith("[") and part.endswith("]"):
            inner = part[1:-1]
            if inner.isdigit():
                qualifiers.append(f"#{int(inner) + 1}")
            else:
                qualifiers.append(f"({inner})")
        elif part in species:
            prefix.append(part)
        elif _is_number_key(part):
            qualifiers.append(f"for a {part} GeV shower" if "shower" in path else f"at {part} MeV")
        elif last:
            leaf, unit = split_unit(part)
        else:
            w, u = split_unit(part)
            w, unit = _WORDS.get(part, w), u or unit
            if w:
                words.append(w)
    if leaf:
        words.append(leaf)
    if "shower" in path and words and words[0] == "shower":
        words = words[1:]
    label = " ".join(w for w in prefix + words + qualifiers if w)
    if subject is not None:
        label = label.replace("{}", subject) if "{}" in label else (f"{label} of {subject}" if label else subject)
    return label.strip() or ".".join(path), unit


def _tag(item: dict):
    """The name by which a list item is known: its name, its layer, or the pair it compares."""
    for key in ("name", "layer"):
        if isinstance(item.get(key), str):
            return item[key]
    pair = item.get("pair")
    if isinstance(pair, list) and all(isinstance(p, str) for p in pair):
        return "/".join(pair)
    return None


# --- flattening and comparing ---------------------------------------------------------------------------------

def flatten(data, prefix: tuple = ()) -> dict[tuple, object]:
    """Paths to leaves; list items are keyed by their name ([crystal-calorimeter]) or by index ([0])."""
    out: dict[tuple, object] = {}
    if isinstance(data, dict):
        for k, v in data.items():
            out.update(flatten(v, prefix + (str(k),)))
    elif isinstance(data, list):
        seen = set()
        for i, v in enumerate(data):
            tag = _tag(v) if isinstance(v, dict) else None
            if tag is None or tag in seen or tag.isdigit():
                tag = str(i)
            seen.add(tag)
            out.update(flatten(v, prefix + (f"[{tag}]",)))
    else:
        out[prefix] = data
    return out


def dotted(path: tuple) -> str:
    """A path as written in key-numbers.json terms: layers[crystal-calorimeter].thickness_cm."""
    out = ""
    for p in path:
        out += p if p.startswith("[") else (f".{p}" if out else p)
    return out


def _number(v) -> float | None:
    if isinstance(v, bool) or not isinstance(v, (int, float)):
        return None
    return float(v) if math.isfinite(v) else None


def floor_of(path: tuple) -> float:
    """The value below which a quantity is negligible (see the module docstring): 1e-6 for probabilities,
    transmissions and fractions, none (0) for everything else."""
    name = " ".join(p for p in path if not p.startswith("["))
    return PROBABILITY_FLOOR if _PROBABILITY.search(name) else 0.0


def _axis_lists(root) -> dict[tuple, tuple[str, list]]:
    """For every dict holding an axis list (energies_MeV, ...), the axis, by the dict's path."""
    out = {}

    def walk(node, path):
        if isinstance(node, dict):
            for axis in _AXES:
                if isinstance(node.get(axis), list):
                    out[path] = (axis, node[axis])
                    break
            for k, v in node.items():
                walk(v, path + (str(k),))
        elif isinstance(node, list):
            for i, v in enumerate(node):
                if isinstance(v, (dict, list)):
                    tag = _tag(v) if isinstance(v, dict) else None
                    walk(v, path + (f"[{tag if tag is not None else i}]",))
    walk(root, ())
    return out


def _label(path: tuple, root: dict, axes: dict) -> tuple[str, str]:
    label, unit = describe(path, root)
    if path and path[-1].startswith("[") and path[-1][1:-1].isdigit() and path[:-2] in axes \
            and path[-2] != axes[path[:-2]][0]:
        axis_name, values = axes[path[:-2]]
        i = int(path[-1][1:-1])
        if i < len(values) and isinstance(values[i], (int, float)):
            label = label.replace(f"#{i + 1}", f"at {values[i]:.4g} {split_unit(axis_name)[1]}")
    return label, unit


def compare(old: dict, new: dict, tolerance: float | None = None) -> dict:
    """Everything that differs between two key-number sets, as plain data for the page and the command line.

    ``spec``: the spec items added, removed and changed. ``beyond``: numbers moved by more than ``tolerance``
    (or appearing or disappearing), largest first; ``within``: the other moved numbers, largest first;
    ``notes``: changed text and flags; ``added``/``removed``: numbers of items present on one side only,
    grouped by item; ``negligible``: how many moves lay below their floor.
    """
    a, b = flatten(old), flatten(new)
    axes = {**_axis_lists(old), **_axis_lists(new)}
    tol = tolerance if tolerance is not None else 0.0
    beyond, within, notes, negligible = [], [], [], 0
    only_old, only_new = [], []
    for path in list(dict.fromkeys(list(a) + list(b))):
        if not path or path[0] in _SKIP:
            continue
        in_a, in_b = path in a, path in b
        x, y = (a.get(path), b.get(path))
        nx, ny = _number(x), _number(y)
        if in_a and in_b and x == y:
            continue
        root = new if in_b else old
        label, unit = _label(path, root, axes)
        row = {"key": dotted(path), "label": label, "unit": unit, "old": x, "new": y}
        if not (in_a and in_b):
            if (nx if in_a else ny) is not None:
                (only_old if in_a else only_new).append(dict(row, relative_change=None, change="removed" if in_a else "added"))
            continue
        if nx is None or ny is None:
            if nx is None and ny is None or (x is not None and y is not None):
                notes.append(row)  # text, flags, or a number turned into text: a note, never counted
            else:
                beyond.append(dict(row, relative_change=None, change="newly given" if x is None else "no longer given"))
            continue
        floor = floor_of(path)
        if max(abs(nx), abs(ny)) < floor:
            negligible += 1
            continue
        if nx == 0:
            beyond.append(dict(row, relative_change=None, change="from zero"))
            continue
        rel = (ny - nx) / abs(nx)
        if abs(rel) <= NOISE_RELATIVE:
            continue
        row = dict(row, relative_change=rel, change=f"{'+' if rel > 0 else '-'}{significant(abs(rel) * 100)} %")
        (beyond if abs(rel) > tol else within).append(row)
    order = (lambda r: -(math.inf if r["relative_change"] is None else abs(r["relative_change"])))
    beyond, within = sorted(_merge_same(beyond), key=order), sorted(_merge_same(within), key=order)
    notes = [dict(r, old_text=format_value(r["old"]), new_text=format_value(r["new"])) for r in notes]
    spec = compare_specs(old.get("spec"), new.get("spec"))
    out = {
        "tolerance": tolerance,
        "tolerance_text": None if tolerance is None else f"{tolerance * 100:g} %",
        "spec": spec,
        "beyond": beyond,
        "within": within,
        "notes": notes,
        "added": _group(only_new, spec, "added"),
        "removed": _group(only_old, spec, "removed"),
        "n_added": len(only_new),
        "n_removed": len(only_old),
        "negligible": negligible,
        "floors": {"noise_relative": NOISE_RELATIVE, "probability_floor": PROBABILITY_FLOOR},
        "baseline": {"experiment": old.get("experiment"), "spec_sha256_16": old.get("spec_sha256_16"),
                     "refgen_version": old.get("refgen_version")},
        "current": {"experiment": new.get("experiment"), "spec_sha256_16": new.get("spec_sha256_16"),
                    "refgen_version": new.get("refgen_version")},
    }
    out["nothing"] = nothing_changed(out)
    return out


def _merge_same(rows: list[dict]) -> list[dict]:
    """One row per number: the same value under several keys (a layer's x/X0 in the layer and in the budget
    table) is listed once, with its other names in ``also``."""
    out: dict[tuple, dict] = {}
    for r in rows:
        key = (repr(r["old"]), repr(r["new"]), r["unit"])
        out.setdefault(key, []).append(r)
    merged = []
    for same in out.values():  # the shortest name leads: "thickness of pixel-1", not "signal slab thickness of ..."
        same.sort(key=lambda r: len(r["label"]))
        also = list(dict.fromkeys(r["label"] for r in same[1:] if r["label"] != same[0]["label"]))
        merged.append(dict(same[0], also=also, also_keys=[r["key"] for r in same[1:]]))
    return merged


def _group(rows: list[dict], spec: dict | None, kind: str) -> list[dict]:
    """Numbers present on one side only, grouped under the spec item they belong to where there is one."""
    items = [(i["kind"], i["name"]) for i in (spec or {}).get(kind, [])]
    groups: dict[str, dict] = {}
    for r in rows:
        path_parts = set(re.split(r"[.\[\]]+", r["key"]))
        owner = next((f"{k} {n}" for k, n in items if n in path_parts), None)
        g = groups.setdefault(owner or r["label"], {"item": owner, "rows": []})
        g["rows"].append(r)
    return [{"item": k, "count": len(g["rows"]), "rows": g["rows"], "grouped": g["item"] is not None}
            for k, g in groups.items()]


def counted(changes: dict) -> int:
    """How many changes count against the tolerance: moved beyond it, added or removed numbers."""
    return len(changes["beyond"]) + changes["n_added"] + changes["n_removed"]


def nothing_changed(changes: dict) -> bool:
    spec = changes["spec"]
    return not (counted(changes) or changes["within"] or changes["notes"]
                or (spec and (spec["added"] or spec["removed"] or spec["changed"])))


# --- the spec comparison --------------------------------------------------------------------------------------

_KINDS = (("materials", "material"), ("layers", "layer"), ("species", "species"), ("radiators", "radiator"),
          ("settings", "setting"))


def _items(section) -> dict:
    if isinstance(section, list):
        return {str(e.get("name")): e for e in section if isinstance(e, dict)}
    return dict(section) if isinstance(section, dict) else {}


def format_value(value, unit: str = "") -> str:
    """A value as the pages show it: numbers to 4 significant digits with their unit, text as it is."""
    if value is None:
        return "not given"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return f"{value}{' ' + unit if unit else ''}"
    if isinstance(value, float):
        if not math.isfinite(value):
            return "not given"
        if unit == "cm" and 0 < abs(value) < 0.1:
            return f"{significant(value * 1e4)} um"
        return f"{significant(value)}{' ' + unit if unit else ''}"
    return str(value)


def significant(value: float, digits: int = DIGITS) -> str:
    """Plain-text twin of the pages' number format: fixed notation from 1e-3 to 1e5, else 1.234e-07."""
    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    if -3 <= mag < 5:
        return f"{value:.{max(digits - 1 - mag, 0)}f}"
    return f"{value:.{digits - 1}e}"


def _same(x, y) -> bool:
    nx, ny = _number(x), _number(y)
    if nx is not None and ny is not None:
        return nx == ny or abs(ny - nx) <= NOISE_RELATIVE * max(abs(nx), abs(ny))
    return x == y


def compare_specs(old: dict | None, new: dict | None) -> dict | None:
    """Spec items added, removed and changed (field: old -> new). None when either side carries no summary."""
    if not isinstance(old, dict) or not isinstance(new, dict):
        return None
    added, removed, changed = [], [], []
    for section, kind in _KINDS:
        a, b = _items(old.get(section)), _items(new.get(section))
        for name in b:
            if name not in a:
                added.append({"kind": kind, "name": name, "what": _item_text(b[name])})
        for name in a:
            if name not in b:
                removed.append({"kind": kind, "name": name, "what": _item_text(a[name])})
        for name in a:
            if name in b and isinstance(a[name], dict) and isinstance(b[name], dict):
                fields = []
                for field in dict.fromkeys(list(a[name]) + list(b[name])):
                    if field == "name" or _same(a[name].get(field), b[name].get(field)):
                        continue
                    label, unit = split_unit(field)
                    fields.append({"field": label, "old": format_value(a[name].get(field), unit),
                                   "new": format_value(b[name].get(field), unit)})
                if fields:
                    changed.append({"kind": kind, "name": name, "fields": fields})
            elif name in b and not _same(a[name], b[name]):
                label, unit = split_unit(name)
                changed.append({"kind": kind, "name": label, "fields": [
                    {"field": "", "old": format_value(a[name], unit), "new": format_value(b[name], unit)}]})
    order_old = [n for n in _items(old.get("layers")) if n in _items(new.get("layers"))]
    order_new = [n for n in _items(new.get("layers")) if n in _items(old.get("layers"))]
    reordered = order_old != order_new
    return {"added": added, "removed": removed, "changed": changed, "layers_reordered": reordered}


def _item_text(entry) -> str:
    if not isinstance(entry, dict):
        return format_value(entry)
    parts = []
    for field, value in entry.items():
        if field == "name" or value is None:
            continue
        label, unit = split_unit(field)
        parts.append(f"{label} {format_value(value, unit)}")
    return ", ".join(parts)


# --- plain-text report for the command line -------------------------------------------------------------------

def text_report(changes: dict, limit: int | None = None) -> list[str]:
    """The comparison as lines of text: spec changes, numbers beyond the tolerance, the rest, notes."""
    if changes["nothing"]:
        return ["Nothing moved: the spec is the same and no key number changed beyond rounding."]
    out = []
    spec = changes["spec"]
    if spec is None:
        out.append("Spec changes: not known (a key-numbers file without a spec summary, made by an older refgen).")
    else:
        lines = [f"  {i['kind']} {i['name']}: added ({i['what']})" for i in spec["added"]]
        lines += [f"  {i['kind']} {i['name']}: removed" for i in spec["removed"]]
        for c in spec["changed"]:
            lines.append(f"  {c['kind']} {c['name']}: " + "; ".join(f"{f['field']} {f['old']} -> {f['new']}".strip()
                                                                     for f in c["fields"]))
        if spec["layers_reordered"]:
            lines.append("  the order of the layers changed")
        out.append("Spec changes:" if lines else "Spec changes: none.")
        out += lines
    tol_text = f"by more than {changes['tolerance_text']}" if changes["tolerance"] else "(any move)"
    rows = changes["beyond"]
    out.append(f"Moved {tol_text}: {len(rows)}" + ("" if rows else "."))
    out += _row_lines(rows, limit)
    if changes["within"]:
        out.append(f"Moved within the tolerance: {len(changes['within'])}")
        out += _row_lines(changes["within"], limit)
    for kind in ("added", "removed"):
        for g in changes[kind]:
            if g["grouped"]:
                out.append(f"{kind.capitalize()} with {g['item']}: {g['count']} key numbers")
            else:
                out += [f"{kind.capitalize()}: {r['label']} = {format_value(r['new'] if kind == 'added' else r['old'], r['unit'])}"
                        for r in g["rows"]]
    if changes["notes"]:
        out.append(f"Notes and flags that changed (never counted): {len(changes['notes'])}")
        for r in changes["notes"][:limit] if limit else changes["notes"]:
            out.append(f"  {r['label']}: {_short(r['old'])} -> {_short(r['new'])}")
        if limit and len(changes["notes"]) > limit:
            out.append(f"  ... and {len(changes['notes']) - limit} more")
    if changes["negligible"]:
        out.append(f"Ignored: {changes['negligible']} moves between values below {PROBABILITY_FLOOR:g} "
                   "(negligible probabilities, transmissions and fractions).")
    return out


def _short(value, width: int = 60) -> str:
    text = format_value(value)
    return text if len(text) <= width else text[: width - 3] + "..."


def _row_lines(rows: list[dict], limit: int | None) -> list[str]:
    shown = rows[:limit] if limit else rows
    out = [f"  {r['label']}: {format_value(r['old'], r['unit'])} -> {format_value(r['new'], r['unit'])} "
           f"({r['change']})" + (f" [also: {'; '.join(r['also'])}]" if r["also"] else "") for r in shown]
    if limit and len(rows) > limit:
        out.append(f"  ... and {len(rows) - limit} more (see changes.html)")
    return out
