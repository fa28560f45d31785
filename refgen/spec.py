"""Spec loading and validation: YAML text -> a validated ``model.Spec`` in internal units.

Validation collects every problem as (YAML path, line, message) and raises one SpecError holding all of them.
Unknown keys are errors that name the closest valid key. Warnings (a key that is ignored, fractions that were
normalised) are printed; ``strict=True`` makes them fatal.
The schema is declared in SCHEMA below, one documented entry per key, and the README is written from it.
"""
from __future__ import annotations

import difflib
import functools
import hashlib
import math
import re
from dataclasses import dataclass

from . import datafiles, materials as matlib
from .errors import Problem, SpecError, UnknownMaterial
from .model import (SYSTEM_KINDS, Experiment, Grid, Layer, Material, Radiator, RefractiveIndex, Slab, Spec,
                    Species)
from .units import QuantityError, parse_quantity
from .yamlio import dotted, load_with_lines

MAX_POINTS = 5000
DEFAULT_DETECTION_EFFICIENCY = 0.2  # common practice: a photodetector's overall efficiency of order 20%

SCHEMA: dict[str, dict[str, str]] = {
    "": {
        "experiment": "Name, revision and a Markdown summary of the experiment (required).",
        "particles": "Species to tabulate: built-in names, or {name: {mass: ..., charge: ...}} for custom ones (required).",
        "momentum": "Log-spaced momentum grid for the charged-particle curves: {from, to, points}.",
        "photon_energy": "Log-spaced photon-energy grid: {from, to, points}.",
        "shower_energies": "Energies at which electromagnetic showers are tabulated, e.g. [1 GeV, 10 GeV].",
        "materials": "Materials by name: from the library, a formula, or a mixture (required).",
        "layers": "The layer stack, ordered outward from the interaction point (required).",
        "radiators": "Cherenkov radiators: which layer radiates and its photon band.",
    },
    "experiment": {"name": "Experiment name (required).", "revision": "Revision label of this description.",
                   "summary": "A few lines of Markdown shown on the front page."},
    "grid": {"from": "Lower end, with unit (required).", "to": "Upper end, with unit (required).",
             "points": f"Number of log-spaced points, 2-{MAX_POINTS} (default 200)."},
    "material": {
        "library": "Key of a built-in library material (see `refgen materials`).",
        "formula": "Chemical formula, e.g. PbWO4.",
        "mixture": "Parts and their fractions, e.g. {Ar: 70, CO2: 30}; parts are elements, formulas or library keys.",
        "by": "How mixture fractions are meant: mass, volume or atom (default mass).",
        "density": "Density with unit; for a gas computed from temperature and pressure when omitted.",
        "state": "solid, liquid or gas (default: from the library or the parts, else solid).",
        "temperature": "Gas temperature with unit (default 20 degC).",
        "pressure": "Gas pressure with unit (default 1 atm).",
        "mean_excitation_energy": "Mean excitation energy I with unit; Bragg additivity when omitted.",
        "pair_energy": "Mean energy to create one ionisation carrier (W), with unit.",
        "refractive_index": "A number, {sellmeier: {B: [...], C: [...]}} with C in um^2, or {table: {wavelength_nm: [...], n: [...]}}.",
        "index_conditions": "{temperature, pressure} at which a gas's refractive_index was measured; (n-1) is scaled by density to the material's conditions (default: the material's own).",
        "description": "A one-line description shown on the material page.",
        "scintillator": "Scintillator response: {light_yield: photons per MeV (number), birks: kB with unit, e.g. 0.126 mm/MeV}.",
    },
    "layer": {
        "name": "Layer name (required, unique).",
        "system": f"Detector system kind: {', '.join(SYSTEM_KINDS)} (required).",
        "material": "Material name (a single-slab layer).",
        "thickness": "Thickness with unit (a single-slab layer).",
        "active": "true if the layer is sensitive (default: true for tracking, cherenkov and muon layers).",
        "repeat": "Number of cells in a sampling structure.",
        "cell": "The slabs of one cell: [{material, thickness, active}, ...].",
    },
    "slab": {"material": "Material name (required).", "thickness": "Thickness with unit (required).",
             "active": "true for a sensitive slab."},
    "radiator": {
        "layer": "Name of the radiating layer (required).",
        "photon_band": "{from, to}: photon energies the photodetector sees, with units (default 1.8-3.6 eV).",
        "detection_efficiency": "Overall photon detection efficiency, 0-1 (default 0.2, common practice).",
        "angle_resolution": "Per-photon Cherenkov-angle resolution, with unit, for ring imaging.",
        "mode": "threshold or imaging (default threshold).",
    },
    "custom_species": {"mass": "Mass with unit, e.g. 1115.7 MeV (required).", "charge": "Charge in units of e, an integer (required)."},
}


@dataclass
class _Context:
    lines: dict
    problems: list
    warnings: list
    notes: list

    def line(self, path) -> int | None:
        path = tuple(path)
        while path and path not in self.lines:
            path = path[:-1]
        return self.lines.get(path)

    def error(self, path, message: str) -> None:
        self.problems.append(Problem(dotted(path), self.line(path), message))

    def warn(self, path, message: str) -> None:
        self.warnings.append(Problem(dotted(path), self.line(path), message))

    def keys(self, value, path, schema: str, required: tuple[str, ...] = ()) -> bool:
        """Check a mapping's keys against SCHEMA[schema]; warn on unknown keys with the closest valid one."""
        if not isinstance(value, dict):
            self.error(path, f"expected a mapping with keys {', '.join(SCHEMA[schema])}")
            return False
        allowed = SCHEMA[schema]
        for key in value:
            if key not in allowed:
                close = difflib.get_close_matches(key, list(allowed), n=1, cutoff=0.6)
                hint = f"; did you mean '{close[0]}'?" if close else f"; valid keys: {', '.join(allowed)}"
                self.error(tuple(path) + (key,), f"unknown key '{key}'{hint}")
        ok = True
        for key in required:
            if key not in value:
                self.error(path, f"missing required key '{key}'")
                ok = False
        return ok

    def quantity(self, value, path, dimension: str, positive: bool = True) -> float | None:
        try:
            q = parse_quantity(value, dimension)
        except QuantityError as exc:
            self.error(path, str(exc))
            return None
        if positive and not q > 0:
            self.error(path, f"must be greater than zero (got '{value}')")
            return None
        return q


def _name_ok(ctx: _Context, name, path) -> bool:
    if not isinstance(name, str) or not name.strip():
        ctx.error(path, "a name must be a non-empty string")
        return False
    if len(name) > 80:
        ctx.error(path, "a name must be at most 80 characters")
        return False
    return True


def _experiment(ctx: _Context, data) -> Experiment:
    value = data.get("experiment")
    if value is None:
        ctx.error(("experiment",), "missing required section 'experiment'")
        return Experiment("unnamed", "", "")
    if not ctx.keys(value, ("experiment",), "experiment", ("name",)):
        return Experiment("unnamed", "", "")
    out = {}
    for key in ("name", "revision", "summary"):
        v = value.get(key, "")
        if not isinstance(v, (str, int, float)) or isinstance(v, bool):
            ctx.error(("experiment", key), "expected text")
            v = ""
        out[key] = str(v)
    if not out["name"].strip():
        ctx.error(("experiment", "name"), "the experiment needs a name")
    return Experiment(out["name"], out["revision"], out["summary"])


def _species_index() -> dict[str, dict]:
    """Built-in species by key and by every alias."""
    index = {}
    for p in datafiles.particles().values():
        index[p["key"]] = p
        for alias in p["aliases"]:
            index.setdefault(alias, p)
    return index


def _particles(ctx: _Context, data) -> tuple[Species, ...]:
    value = data.get("particles")
    if value is None:
        ctx.error(("particles",), "missing required section 'particles'")
        return ()
    if not isinstance(value, list) or not value:
        ctx.error(("particles",), "expected a non-empty list of species")
        return ()
    index = _species_index()
    out: dict[str, Species] = {}
    for i, item in enumerate(value):
        path = ("particles", i)
        if isinstance(item, str):
            p = index.get(item)
            if p is None:
                close = difflib.get_close_matches(item, list(index), n=1)
                hint = f"; did you mean '{close[0]}'?" if close else ""
                ctx.error(path, f"unknown particle '{item}'{hint}")
                continue
            sp = Species(p["key"], p["label"], p["mass"], p["charge"], p["source"])
        elif isinstance(item, dict) and len(item) == 1:
            (name, props), = item.items()
            ppath = path + (name,)
            if not _name_ok(ctx, name, ppath) or not ctx.keys(props, ppath, "custom_species", ("mass", "charge")):
                continue
            mass = ctx.quantity(props["mass"], ppath + ("mass",), "mass_energy")
            charge = props["charge"]
            if isinstance(charge, bool) or not isinstance(charge, int) or charge == 0 or abs(charge) > 100:
                ctx.error(ppath + ("charge",), "charge must be a non-zero integer (units of e), e.g. 1 or -1")
                continue
            if mass is None:
                continue
            sp = Species(name, name, mass, charge, "spec", custom=True)
        else:
            ctx.error(path, "expected a species name or {name: {mass: ..., charge: ...}}")
            continue
        if sp.key in out:
            ctx.error(path, f"particle '{sp.key}' is listed twice")
            continue
        out[sp.key] = sp
    return tuple(out.values())


def _grid(ctx: _Context, data, key: str, dimension: str, default: tuple[str, str, int]) -> Grid:
    value = data.get(key, {"from": default[0], "to": default[1], "points": default[2]})
    path = (key,)
    fallback = Grid(parse_quantity(default[0], dimension), parse_quantity(default[1], dimension), default[2])
    if not ctx.keys(value, path, "grid", ("from", "to")):
        return fallback
    lo = ctx.quantity(value["from"], path + ("from",), dimension)
    hi = ctx.quantity(value["to"], path + ("to",), dimension)
    points = value.get("points", 200)
    if isinstance(points, bool) or not isinstance(points, int) or not 2 <= points <= MAX_POINTS:
        ctx.error(path + ("points",), f"points must be an integer from 2 to {MAX_POINTS} (got {points!r})")
        points = None
    if lo is None or hi is None or points is None:
        return fallback
    if not lo < hi:
        ctx.error(path, f"'from' ({value['from']}) must be below 'to' ({value['to']})")
        return fallback
    return Grid(lo, hi, points)


def _shower_energies(ctx: _Context, data) -> tuple[float, ...]:
    value = data.get("shower_energies", ["1 GeV", "10 GeV", "100 GeV"])
    if not isinstance(value, list) or not value:
        ctx.error(("shower_energies",), "expected a non-empty list of energies, e.g. [1 GeV, 10 GeV]")
        return ()
    if len(value) > 20:
        ctx.error(("shower_energies",), "at most 20 shower energies")
        return ()
    out = [ctx.quantity(v, ("shower_energies", i), "energy") for i, v in enumerate(value)]
    return tuple(sorted(set(e for e in out if e is not None)))


@functools.cache
def _library_index_by_formula() -> dict[tuple[str, str], str]:
    """(formula, state) -> library key, so that mixture parts like CO2 take the library's I value."""
    out = {}
    for key, entry in datafiles.library_materials().items():
        kind, _, body = entry["composition"].partition(":")
        if kind == "formula":
            out.setdefault((body, entry["state"]), key)
    return out


def _part(name: str, gas: bool):
    """A mixture part: (element mass fractions, molar mass, <Z/A>, I in eV, density or None, is_gas).

    A part is a library key, or a formula; a formula takes the I and density of the library entry with the
    same formula in the wanted phase where one exists (CO2 -> carbon-dioxide), else Bragg additivity.
    Without a phase hint a part is a gas when only a gas entry (or a gaseous element) matches it.
    """
    if name in datafiles.library_materials():
        m = matlib.library_material(name)
        fr = {c.Z: c.mass_fraction for c in m.components}
        return fr, matlib.library_molar_mass(name), m.z_over_a, m.mean_excitation_eV, m.density, m.is_gas
    counts = matlib.parse_formula(name)
    fr = matlib.mass_fractions_of_formula(counts)
    index = _library_index_by_formula()
    condensed_key = index.get((name, "solid")) or index.get((name, "liquid"))
    gas_key = index.get((name, "gas"))
    element = datafiles.elements()[next(iter(counts)) - 1] if len(counts) == 1 else None
    if element is not None:
        is_gas = gas or element["state"] == "gas"
    else:
        is_gas = gas or (condensed_key is None and gas_key is not None)
    key = gas_key if is_gas else condensed_key
    if key:
        m = matlib.library_material(key)
        i_ev, rho = m.mean_excitation_eV, m.density
    elif element is not None:
        i_ev, rho = element["I_eV"], element["density"]
    else:
        i_ev, rho = matlib.bragg_mean_excitation(fr, condensed=not is_gas), None
    return fr, matlib.molar_mass(counts), matlib.z_over_a(fr), i_ev, rho, is_gas


def _fractions(ctx: _Context, mixture, path) -> dict[str, float] | None:
    if not isinstance(mixture, dict) or not mixture:
        ctx.error(path, "expected a mapping of parts to fractions, e.g. {Ar: 70, CO2: 30}")
        return None
    out = {}
    for part, f in mixture.items():
        if isinstance(f, bool) or not isinstance(f, (int, float)) or not f > 0 or not math.isfinite(f):
            ctx.error(tuple(path) + (part,), f"fraction must be a positive number (got {f!r})")
            return None
        out[part] = float(f)
    total = sum(out.values())
    for scale in (1.0, 100.0):
        if abs(total - scale) <= 0.01 * scale:
            if abs(total - scale) > 1e-9 * scale:
                ctx.warn(path, f"fractions add up to {total:g}, not {scale:g}; normalised")
            return {k: v / total for k, v in out.items()}
    ctx.error(path, f"fractions add up to {total:g}; they must add up to 1 or to 100 (within 1%)")
    return None


def _refractive_index(ctx: _Context, value, path) -> RefractiveIndex | None:
    if isinstance(value, (int, float)) and not isinstance(value, bool):
        if not value > 1.0:
            ctx.error(path, f"a radiator's refractive index must be above 1 (got {value})")
            return None
        return RefractiveIndex("constant", float(value))
    if isinstance(value, dict) and "sellmeier" in value:
        s = value["sellmeier"]
        if not isinstance(s, dict) or not isinstance(s.get("B"), list) or not isinstance(s.get("C"), list) \
                or len(s["B"]) != len(s["C"]) or not s["B"] or not all(isinstance(x, (int, float)) and not isinstance(x, bool)
                                                                       for x in s["B"] + s["C"]):
            ctx.error(path + ("sellmeier",), "expected {B: [numbers], C: [numbers]} of equal length, C in um^2")
            return None
        return RefractiveIndex("sellmeier", b=tuple(map(float, s["B"])), c=tuple(map(float, s["C"])))
    if isinstance(value, dict) and "table" in value:
        t = value["table"]
        wl, n = (t.get("wavelength_nm"), t.get("n")) if isinstance(t, dict) else (None, None)
        if not isinstance(wl, list) or not isinstance(n, list) or len(wl) != len(n) or len(wl) < 2 \
                or not all(isinstance(x, (int, float)) and not isinstance(x, bool) and x > 0 for x in wl + n):
            ctx.error(path + ("table",), "expected {wavelength_nm: [numbers], n: [numbers]} of equal length (2 or more)")
            return None
        if min(n) <= 1.0:
            ctx.error(path + ("table",), "a radiator's refractive index must be above 1 at every wavelength")
            return None
        order = sorted(range(len(wl)), key=lambda i: wl[i])
        return RefractiveIndex("table", wavelengths_nm=tuple(float(wl[i]) for i in order),
                               values=tuple(float(n[i]) for i in order))
    ctx.error(path, "expected a number above 1, {sellmeier: ...} or {table: ...}")
    return None


def _scintillator(ctx: _Context, value, path) -> dict | None:
    if not isinstance(value, dict):
        ctx.error(path, "expected {light_yield: photons per MeV, birks: kB with unit}")
        return None
    unknown = set(value) - {"light_yield", "birks"}
    for key in unknown:
        ctx.error(tuple(path) + (key,), f"unknown key '{key}'; valid keys: light_yield, birks")
    out = {"light_yield_per_MeV": 10000.0, "light_yield_is_default": "light_yield" not in value,
           "birks_cm_per_MeV": 0.0126, "birks_is_default": "birks" not in value}
    if "light_yield" in value:
        ly = value["light_yield"]
        if isinstance(ly, bool) or not isinstance(ly, (int, float)) or not ly > 0:
            ctx.error(tuple(path) + ("light_yield",), "light_yield must be a positive number of photons per MeV")
        else:
            out["light_yield_per_MeV"] = float(ly)
    if "birks" in value:
        kb = ctx.quantity(value["birks"], tuple(path) + ("birks",), "kB")
        if kb is not None:
            out["birks_cm_per_MeV"] = kb
    return out


def _material(ctx: _Context, name: str, value, path) -> Material | None:
    if not _name_ok(ctx, name, path) or not ctx.keys(value, path, "material"):
        return None
    sources = [k for k in ("library", "formula", "mixture") if k in value]
    if len(sources) != 1:
        ctx.error(path, "give exactly one of 'library', 'formula' or 'mixture'")
        return None
    kind = sources[0]
    state = value.get("state")
    if state is not None and state not in ("solid", "liquid", "gas"):
        ctx.error(path + ("state",), f"state must be solid, liquid or gas (got {state!r})")
        return None
    density = ctx.quantity(value["density"], path + ("density",), "density") if "density" in value else None
    if "density" in value and density is None:
        return None
    i_given = None
    if "mean_excitation_energy" in value:
        i_given = ctx.quantity(value["mean_excitation_energy"], path + ("mean_excitation_energy",), "energy")
        if i_given is None:
            return None
        i_given *= 1e6
    pair = None
    if "pair_energy" in value:
        pair = ctx.quantity(value["pair_energy"], path + ("pair_energy",), "energy")
        if pair is None:
            return None
        pair *= 1e6
    index = _refractive_index(ctx, value["refractive_index"], path + ("refractive_index",)) \
        if "refractive_index" in value else None
    if "refractive_index" in value and index is None:
        return None
    scint = _scintillator(ctx, value["scintillator"], path + ("scintillator",)) if "scintillator" in value else None
    try:
        base = _material_base(ctx, name, value, kind, state, path)
    except (matlib.FormulaError, UnknownMaterial) as exc:
        ctx.error(path + (kind,), str(exc))
        return None
    if base is None:
        return None
    comps, molar, i_ev, i_src, rho_default, is_gas = (base.components, base.molar_mass, base.i_ev, base.i_source,
                                                      base.density, base.is_gas)
    description, source, caveats, de, w_default = (base.description, base.source, base.caveats,
                                                   base.density_effect, base.pair_energy_eV)
    temperature = pressure = None
    if is_gas:
        temperature = ctx.quantity(value["temperature"], path + ("temperature",), "temperature") \
            if "temperature" in value else matlib.REFERENCE_TEMPERATURE_K
        pressure = ctx.quantity(value["pressure"], path + ("pressure",), "pressure") \
            if "pressure" in value else matlib.REFERENCE_PRESSURE_PA
        if temperature is None or pressure is None:
            return None
        if density is None and ("temperature" not in value or "pressure" not in value):
            ctx.notes.append(f"material '{name}': gas without temperature and pressure; "
                             f"{'20 degC' if 'temperature' not in value else 'its temperature'} and "
                             f"{'1 atm' if 'pressure' not in value else 'its pressure'} assumed")
    else:
        for key in ("temperature", "pressure"):
            if key in value:
                ctx.warn(path + (key,), f"'{key}' is used only for gases; ignored for a {state or 'condensed'} material")
    index_ratio = 1.0
    if "index_conditions" in value:
        cond = value["index_conditions"]
        cpath = path + ("index_conditions",)
        if index is None or not is_gas:
            ctx.error(cpath, "index_conditions needs a refractive_index and a gas")
            return None
        if not isinstance(cond, dict) or set(cond) - {"temperature", "pressure"} or not cond:
            ctx.error(cpath, "expected {temperature: ..., pressure: ...}")
            return None
        t_ref = ctx.quantity(cond.get("temperature", "20 degC"), cpath + ("temperature",), "temperature")
        p_ref = ctx.quantity(cond.get("pressure", "1 atm"), cpath + ("pressure",), "pressure")
        if t_ref is None or p_ref is None:
            return None
        index_ratio = (pressure / p_ref) * (t_ref / temperature)
    if density is None:
        if is_gas:
            density = matlib.ideal_gas_density(molar, temperature, pressure)
        elif rho_default is not None:
            density = rho_default
        else:
            ctx.error(path, "missing 'density' (needed for a solid or liquid that is not in the library)")
            return None
    if i_given is not None:
        i_ev, i_src, de = i_given, "given in the spec", None
    if de is not None and abs(density - de.get("_density", density)) > 1e-9:
        de = None
    if de is not None:
        de = {k: v for k, v in de.items() if k != "_density"}
    return Material(name=name, description=str(value.get("description", description)), components=comps,
                    density=density, state="gas" if is_gas else (state or "solid"), mean_excitation_eV=i_ev,
                    i_source=i_src, pair_energy_eV=pair if pair is not None else w_default, refractive_index=index,
                    density_effect=de, source=source, caveats=caveats, temperature_K=temperature,
                    pressure_Pa=pressure, scintillator=scint, index_density_ratio=index_ratio)


@dataclass
class _Base:
    """What a material definition's library entry, formula or mixture supplies before the spec's overrides."""

    components: tuple
    molar_mass: float
    i_ev: float
    i_source: str
    density: float | None  # None: from the ideal gas law, or required in the spec
    is_gas: bool
    description: str
    source: str
    caveats: tuple
    density_effect: dict | None  # Sternheimer parameters tagged with the density they were made for
    pair_energy_eV: float | None


def _material_base(ctx, name, value, kind, state, path) -> _Base | None:
    """The composition and defaults of one material definition (library, formula or mixture)."""
    if kind == "library":
        key = value["library"]
        lib = datafiles.library_materials()
        if not isinstance(key, str) or key not in lib:
            close = difflib.get_close_matches(str(key), list(lib), n=1)
            hint = f"; did you mean '{close[0]}'?" if close else "; see `refgen materials`"
            ctx.error(path + ("library",), f"'{key}' is not in the built-in material library{hint}")
            return None
        m = matlib.library_material(key, name)
        is_gas = (state or m.state) == "gas"
        molar = matlib.library_molar_mass(key)
        de = dict(m.density_effect, _density=m.density) if m.density_effect else None
        rho = m.density
        if is_gas and ("temperature" in value or "pressure" in value) and "density" not in value:
            rho = None  # recomputed from the ideal gas law at the given conditions
        return _Base(m.components, molar, m.mean_excitation_eV, m.i_source, rho, is_gas, m.description, m.source,
                     m.caveats, de, m.pair_energy_eV)
    if kind == "formula":
        formula = value["formula"]
        if not isinstance(formula, str):
            ctx.error(path + ("formula",), "expected a chemical formula as text, e.g. PbWO4")
            return None
        counts = matlib.parse_formula(formula)
        fr = matlib.mass_fractions_of_formula(counts)
        is_gas = state == "gas" or (state is None and ("temperature" in value or "pressure" in value))
        rho = None
        if len(counts) == 1:
            (z,) = counts
            el = datafiles.elements()[z - 1]
            is_gas = is_gas or (state is None and el["state"] == "gas")
            rho = el["density"]
        i_ev = matlib.bragg_mean_excitation(fr, condensed=not is_gas)
        return _Base(matlib.components_from_fractions(fr), matlib.molar_mass(counts), i_ev,
                "Bragg additivity (ICRU 37)", rho, is_gas, f"{formula}", "spec", (), None, None)
    by = value.get("by", "mass")
    if by not in ("mass", "volume", "atom"):
        ctx.error(path + ("by",), f"'by' must be mass, volume or atom (got {by!r})")
        return None
    fractions = _fractions(ctx, value["mixture"], path + ("mixture",))
    if fractions is None:
        return None
    gas_hint = state == "gas" or (state is None and ("temperature" in value or "pressure" in value))
    parts = {part: _part(part, gas_hint) for part in fractions}
    is_gas = gas_hint or (state is None and all(p[5] for p in parts.values()))
    if is_gas and not gas_hint:
        parts = {part: _part(part, True) for part in fractions}
    mass_w = {}
    if by == "mass":
        mass_w = dict(fractions)
    elif by == "atom" or (by == "volume" and is_gas):
        total = sum(f * parts[p][1] for p, f in fractions.items())
        mass_w = {p: f * parts[p][1] / total for p, f in fractions.items()}
    else:
        missing = [p for p in fractions if parts[p][4] is None]
        if missing:
            ctx.error(path + ("mixture",), f"by volume needs each part's density; none known for {', '.join(missing)} "
                                            "(use a library key or give the mixture by mass)")
            return None
        total = sum(f * parts[p][4] for p, f in fractions.items())
        mass_w = {p: f * parts[p][4] / total for p, f in fractions.items()}
    elem: dict[int, float] = {}
    for p, w in mass_w.items():
        for z, wz in parts[p][0].items():
            elem[z] = elem.get(z, 0.0) + w * wz
    i_ev = matlib.combine_mean_excitation([(w, parts[p][2], parts[p][3]) for p, w in mass_w.items()])
    molar = 1.0 / sum(w / parts[p][1] for p, w in mass_w.items())
    rho = None
    if not is_gas and all(parts[p][4] is not None for p in mass_w):
        rho = 1.0 / sum(w / parts[p][4] for p, w in mass_w.items())
    desc = ", ".join(f"{p} {f * 100:.4g}%" for p, f in fractions.items()) + f" by {by}"
    return _Base(matlib.components_from_fractions(elem), molar, i_ev, "Bragg additivity over the parts (ICRU 37)",
            rho, is_gas, desc, "spec", (), None, None)


def _materials(ctx: _Context, data) -> dict[str, Material]:
    value = data.get("materials")
    if value is None:
        ctx.error(("materials",), "missing required section 'materials'")
        return {}
    if not isinstance(value, dict) or not value:
        ctx.error(("materials",), "expected a mapping of material names to definitions")
        return {}
    out = {}
    for name, definition in value.items():
        m = _material(ctx, name, definition, ("materials", name))
        if m is not None:
            out[name] = m
    return out


def _slab(ctx: _Context, value, path, materials: dict, material_names: set, default_active: bool) -> Slab | None:
    if not ctx.keys(value, path, "slab", ("material", "thickness")):
        return None
    mat = value["material"]
    if not isinstance(mat, str) or mat not in material_names:
        close = difflib.get_close_matches(str(mat), sorted(material_names), n=1)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        ctx.error(path + ("material",), f"unknown material '{mat}'{hint}")
        return None
    t = ctx.quantity(value["thickness"], path + ("thickness",), "length")
    active = value.get("active", default_active)
    if not isinstance(active, bool):
        ctx.error(path + ("active",), "active must be true or false")
        return None
    return Slab(mat, t, active) if t is not None else None


def _layers(ctx: _Context, data, materials: dict, material_names: set) -> tuple[Layer, ...]:
    value = data.get("layers")
    if value is None:
        ctx.error(("layers",), "missing required section 'layers'")
        return ()
    if not isinstance(value, list) or not value:
        ctx.error(("layers",), "expected a non-empty list of layers")
        return ()
    out, seen = [], set()
    for i, item in enumerate(value):
        path = ("layers", i)
        if not ctx.keys(item, path, "layer", ("name", "system")):
            continue
        name = item["name"]
        if not _name_ok(ctx, name, path + ("name",)):
            continue
        if name in seen:
            ctx.error(path + ("name",), f"duplicate layer name '{name}'")
            continue
        seen.add(name)
        system = item["system"]
        if not isinstance(system, str) or system not in SYSTEM_KINDS:
            close = difflib.get_close_matches(str(system), list(SYSTEM_KINDS), n=1)
            hint = f"; did you mean '{close[0]}'?" if close else f"; one of {', '.join(SYSTEM_KINDS)}"
            ctx.error(path + ("system",), f"unknown system kind '{system}'{hint}")
            continue
        default_active = system in ("tracking", "cherenkov", "muon")
        if "cell" in item:
            if "material" in item or "thickness" in item:
                ctx.error(path, "give either 'cell' (with 'repeat') or 'material' and 'thickness', not both")
                continue
            repeat = item.get("repeat", 1)
            if isinstance(repeat, bool) or not isinstance(repeat, int) or not 1 <= repeat <= 10000:
                ctx.error(path + ("repeat",), f"repeat must be an integer from 1 to 10000 (got {repeat!r})")
                continue
            cell = item["cell"]
            if not isinstance(cell, list) or not cell:
                ctx.error(path + ("cell",), "expected a non-empty list of slabs")
                continue
            slabs = [_slab(ctx, s, path + ("cell", j), materials, material_names, False) for j, s in enumerate(cell)]
            if any(s is None for s in slabs):
                continue
            out.append(Layer(name, system, tuple(slabs), repeat))
        else:
            if "repeat" in item:
                ctx.error(path + ("repeat",), "'repeat' needs a 'cell'")
                continue
            slab = _slab(ctx, {k: item[k] for k in ("material", "thickness", "active") if k in item}, path,
                         materials, material_names, default_active)
            if slab is not None:
                out.append(Layer(name, system, (slab,)))
    return tuple(out)


def _radiators(ctx: _Context, data, layers: tuple[Layer, ...], materials: dict, layer_names: set) -> tuple[Radiator, ...]:
    value = data.get("radiators", [])
    if not isinstance(value, list):
        ctx.error(("radiators",), "expected a list of radiators")
        return ()
    by_name = {layer.name: layer for layer in layers}
    out, seen = [], set()
    for i, item in enumerate(value):
        path = ("radiators", i)
        if not ctx.keys(item, path, "radiator", ("layer",)):
            continue
        name = item["layer"]
        if not isinstance(name, str) or name not in layer_names:
            close = difflib.get_close_matches(str(name), sorted(layer_names), n=1)
            hint = f"; did you mean '{close[0]}'?" if close else ""
            ctx.error(path + ("layer",), f"unknown layer '{name}'{hint}")
            continue
        if name in seen:
            ctx.error(path + ("layer",), f"layer '{name}' is listed as a radiator twice")
            continue
        seen.add(name)
        layer = by_name.get(name)
        if layer is None:
            continue
        if layer.is_sampling:
            ctx.error(path + ("layer",), f"layer '{name}' is a sampling structure; a radiator must be a single slab")
            continue
        mat = materials.get(layer.slabs[0].material)
        if mat is not None and mat.refractive_index is None:
            ctx.error(path + ("layer",), f"material '{mat.name}' of layer '{name}' has no refractive_index")
            continue
        band = item.get("photon_band", {"from": "1.8 eV", "to": "3.6 eV"})
        if not isinstance(band, dict) or set(band) != {"from", "to"}:
            ctx.error(path + ("photon_band",), "expected {from: ..., to: ...} photon energies with units")
            continue
        lo = ctx.quantity(band["from"], path + ("photon_band", "from"), "energy")
        hi = ctx.quantity(band["to"], path + ("photon_band", "to"), "energy")
        if lo is None or hi is None:
            continue
        if not lo < hi:
            ctx.error(path + ("photon_band",), "'from' must be below 'to'")
            continue
        eff = item.get("detection_efficiency", DEFAULT_DETECTION_EFFICIENCY)
        if isinstance(eff, bool) or not isinstance(eff, (int, float)) or not 0 < eff <= 1:
            ctx.error(path + ("detection_efficiency",), f"detection_efficiency must be a number in (0, 1] (got {eff!r})")
            continue
        res = None
        if "angle_resolution" in item:
            res = ctx.quantity(item["angle_resolution"], path + ("angle_resolution",), "angle")
            if res is None:
                continue
            res *= 1e3
        mode = item.get("mode", "imaging" if res is not None else "threshold")
        if mode not in ("threshold", "imaging"):
            ctx.error(path + ("mode",), f"mode must be threshold or imaging (got {mode!r})")
            continue
        out.append(Radiator(name, (lo * 1e6, hi * 1e6), float(eff), "detection_efficiency" not in item, res, mode))
    return tuple(out)


def validate(data, lines: dict, source: str = "spec", strict: bool = False, text: str = "") -> Spec:
    """Validate parsed spec data; return the Spec or raise one SpecError listing every problem."""
    ctx = _Context(lines, [], [], [])
    if not isinstance(data, dict):
        raise SpecError([Problem("", None, "the spec is empty or not a mapping of sections")], source)
    ctx.keys(data, (), "")
    experiment = _experiment(ctx, data)
    species = _particles(ctx, data)
    momentum = _grid(ctx, data, "momentum", "momentum", ("50 MeV/c", "500 GeV/c", 200))
    photon = _grid(ctx, data, "photon_energy", "energy", ("1 keV", "100 GeV", 200))
    showers = _shower_energies(ctx, data)
    mats = _materials(ctx, data)
    material_names = set(data.get("materials", {}) or {}) if isinstance(data.get("materials"), dict) else set()
    layers = _layers(ctx, data, mats, material_names)
    layer_names = {item["name"] for item in data.get("layers", [])
                   if isinstance(item, dict) and isinstance(item.get("name"), str)} \
        if isinstance(data.get("layers"), list) else set()
    radiators = _radiators(ctx, data, layers, mats, layer_names)
    problems = list(ctx.problems)
    if strict:
        problems += [Problem(w.path, w.line, w.message + " (a warning, fatal with --strict)") for w in ctx.warnings]
    if problems:
        problems.sort(key=lambda p: (p.line or 0, p.path))
        raise SpecError(problems, source)
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest()[:16]
    return Spec(experiment, species, momentum, photon, showers, mats, layers, radiators, tuple(ctx.notes),
                digest, source, tuple(str(w) for w in ctx.warnings))


def read_text(path) -> str:
    """Read a spec file as UTF-8, turning an unreadable or non-UTF-8 file into a SpecError."""
    try:
        raw = open(path, "rb").read()
    except OSError as exc:
        raise SpecError([Problem("", None, f"cannot read the spec: {exc.strerror}")], str(path)) from None
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = raw[: exc.start].count(b"\n") + 1
        raise SpecError([Problem("", line, "the file is not UTF-8 text")], str(path)) from None
    if not text.strip():
        raise SpecError([Problem("", None, "the spec file is empty")], str(path))
    return text.lstrip("\ufeff")


def load_spec(path, strict: bool = False) -> Spec:
    """Read, parse and validate a spec file."""
    text = read_text(path)
    return parse_spec(text, str(path), strict)


def parse_spec(text: str, source: str = "spec", strict: bool = False) -> Spec:
    """Parse and validate spec text."""
    data, lines = load_with_lines(text, source)
    return validate(data, lines, source, strict, text)


_SAFE = re.compile(r"[^A-Za-z0-9._-]+")


def safe_name(name: str) -> str:
    """A file-name-safe slug for a material, layer or species name (never a path)."""
    slug = _SAFE.sub("-", name).strip("-.")
    return slug or "item"
