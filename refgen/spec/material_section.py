"""Validators for the `materials:` section: library keys, formulas and mixtures, with their overrides.

(Named material_section so that it is not confused with refgen/materials.py, the composition helpers it uses.)
"""
from __future__ import annotations

import difflib
import functools
import math
from dataclasses import dataclass

from .. import datafiles, materials as matlib
from ..errors import UnknownMaterial
from ..model import Material, RefractiveIndex
from .context import Context, name_ok

MATERIAL_KEYS = {
    "library": "Key of a built-in library material (see `refgen materials`).",
    "formula": "Chemical formula, e.g. PbWO4.",
    "mixture": "Parts and their fractions, e.g. {Ar: 70, CO2: 30}; parts are elements, formulas or library keys.",
    "by": "How mixture fractions are meant: mass, volume or atom (default mass).",
    "density": "Density with unit; for a gas computed from temperature and pressure when omitted.",
    "state": "solid, liquid or gas (default: from the density when one is given, a gas below 0.01 g/cm3; else from the library or the parts).",
    "temperature": "Gas temperature with unit (default 20 degC).",
    "pressure": "Gas pressure with unit (default 1 atm).",
    "mean_excitation_energy": "Mean excitation energy I with unit; Bragg additivity when omitted.",
    "pair_energy": "Mean energy to create one ionisation carrier (W), with unit.",
    "refractive_index": "A number, {sellmeier: {B: [...], C: [...]}} with C in um^2, or {table: {wavelength_nm: [...], n: [...]}}.",
    "index_conditions": "{temperature, pressure} at which a gas's refractive_index was measured; (n-1) is scaled by density to the material's conditions (default: the material's own).",
    "description": "A one-line description shown on the material page.",
    "scintillator": "Scintillator response: {light_yield: photons per MeV (number), birks: kB with unit, e.g. 0.126 mm/MeV}.",
}


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


# Fractions within 0.1 % of 1 or 100 are rounding (e.g. 33.33 + 33.33 + 33.33, or 99.9999): normalised silently.
# Up to 1 % off they are normalised with a warning; further off they are an error.
FRACTION_ROUNDING = 1e-3


def _fractions(ctx: Context, mixture, path) -> dict[str, float] | None:
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
            if abs(total - scale) > FRACTION_ROUNDING * scale:
                ctx.warn(path, f"fractions add up to {total:g}, not {scale:g}; normalised")
            return {k: v / total for k, v in out.items()}
    ctx.error(path, f"fractions add up to {total:g}; they must add up to 1 or to 100 (within 1%)")
    return None


def _refractive_index(ctx: Context, value, path) -> RefractiveIndex | None:
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


def _scintillator(ctx: Context, value, path) -> dict | None:
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


def _material(ctx: Context, name: str, value, path) -> Material | None:
    if not name_ok(ctx, name, path) or not ctx.keys(value, path, MATERIAL_KEYS):
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
    if density is not None:
        state, base = _state_from_density(ctx, name, value, kind, state, density, base, path)
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
    conditions_text = index_conditions_text = ""
    if is_gas:
        conditions_text = (f"{value['temperature'] if 'temperature' in value else '20 degC (assumed)'}, "
                           f"{value['pressure'] if 'pressure' in value else '1 atm (assumed)'}")
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
        index_conditions_text = f"{cond.get('temperature', '20 degC')}, {cond.get('pressure', '1 atm')}"
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
                    pressure_Pa=pressure, scintillator=scint, index_density_ratio=index_ratio,
                    conditions_text=conditions_text, index_conditions_text=index_conditions_text)


def _state_from_density(ctx: Context, name, value, kind, state, density, base, path):
    """The state a stated density implies (below matlib.GAS_DENSITY_LIMIT a gas), unless ``state:`` or gas
    conditions are given; a contradiction with the composition's usual state is a note. Returns (state, base),
    the base rebuilt in the implied state when that differs from the usual one."""
    if state is not None or {"temperature", "pressure"} & set(value):
        if state is not None and (state == "gas") != (density < matlib.GAS_DENSITY_LIMIT):
            ctx.notes.append(f"material '{name}': state '{state}' is given, but its density {density:.4g} g/cm3 "
                             f"suggests {'a gas' if density < matlib.GAS_DENSITY_LIMIT else 'a condensed material'}; "
                             f"the given state is used")
        return state, base
    implied = matlib.state_from_density(density, base.is_gas)
    if (implied == "gas") == base.is_gas:
        return implied, base
    rebuilt = _material_base(Context(ctx.lines, [], [], []), name, value, kind, implied, path)
    if rebuilt is None:  # the composition cannot be built in that state (e.g. a condensed volume mixture of gases)
        ctx.notes.append(f"material '{name}': its density {density:.4g} g/cm3 suggests "
                         f"{'a gas' if implied == 'gas' else 'a condensed material'}, but it is kept in its usual state; "
                         f"give 'state:' to choose")
        return None, base
    ctx.notes.append(f"material '{name}': treated as {'a gas' if implied == 'gas' else implied} from its density "
                     f"{density:.4g} g/cm3 (its elements alone suggest {'a gas' if base.is_gas else 'a condensed material'}); "
                     f"give 'state:' to override")
    return implied, rebuilt


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


def read_materials(ctx: Context, data) -> dict[str, Material]:
    """The required `materials:` section: each definition validated on its own, every problem collected."""
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
