"""Build Material objects from formulas, mixtures and the built-in library.

Chemical formulas are parsed by the periodictable package (a maintained parser that handles fractional
counts such as Lu1.8Y0.2SiO5); atomic weights and I values come from refgen's own elements table.
"""
from __future__ import annotations

import math

import periodictable

from . import datafiles
from .errors import RefgenError, UnknownMaterial
from .model import Component, Material

# ICRU Report 37 (1984), Sec. 2.4 (after Seltzer & Berger 1982): I values for atoms bound in condensed
# compounds; every other element takes 1.13 times its elemental value. From memory.
BOUND_CONDENSED_I_EV = {1: 19.2, 6: 81.0, 7: 82.0, 8: 106.0, 9: 112.0, 17: 180.0}
BOUND_SCALE = 1.13
GAS_CONSTANT = 8.314462618  # J/(mol K), CODATA 2018 (exact: N_A k)
REFERENCE_TEMPERATURE_K = 293.15  # library gas densities are at 20 degC and 1 atm
REFERENCE_PRESSURE_PA = 101325.0
GAS_DENSITY_LIMIT = 0.01  # g/cm3: below this a material is a gas (common practice: gases at 1 atm lie below 0.01)


class FormulaError(RefgenError):
    """A chemical formula that cannot be parsed or names an unknown element."""


def parse_formula(text: str) -> dict[int, float]:
    """Atom counts by Z for a chemical formula such as 'PbWO4' or 'C9H10'."""
    try:
        atoms = periodictable.formula(text).atoms
    except Exception as exc:  # periodictable raises pyparsing and value errors
        raise FormulaError(f"cannot read chemical formula '{text}': {exc}".split("\n")[0]) from None
    counts: dict[int, float] = {}
    for el, n in atoms.items():
        z = getattr(el, "number", 0)
        if not 1 <= z <= 92:
            raise FormulaError(f"'{text}': element {el} is not among Z = 1-92")
        if not float(n) > 0:
            raise FormulaError(f"'{text}': element {el} has a count of {n}; counts must be positive")
        counts[z] = counts.get(z, 0.0) + float(n)
    if not counts:
        raise FormulaError(f"'{text}' names no element")
    return counts


def molar_mass(counts: dict[int, float]) -> float:
    """Molar mass in g/mol of a formula unit."""
    els = datafiles.elements()
    return sum(n * els[z - 1]["A"] for z, n in counts.items())


def mass_fractions_of_formula(counts: dict[int, float]) -> dict[int, float]:
    """Element mass fractions w_j = n_j A_j / M of a formula."""
    els = datafiles.elements()
    m = molar_mass(counts)
    return {z: n * els[z - 1]["A"] / m for z, n in counts.items()}


def z_over_a(fractions: dict[int, float]) -> float:
    """<Z/A> of element mass fractions, mol/g."""
    els = datafiles.elements()
    return sum(w * z / els[z - 1]["A"] for z, w in fractions.items())


def bragg_mean_excitation(fractions: dict[int, float], condensed: bool) -> float:
    """Mean excitation energy of a compound by Bragg additivity, eV.

    ln I = sum_j w_j (Z_j/A_j) ln I_j / sum_j w_j (Z_j/A_j)  (ICRU Report 37, Eq. 2.19). For condensed
    compounds and a single-element formula of several elements the bound-state I values of ICRU 37 are used
    (BOUND_CONDENSED_I_EV, else 1.13 I_element); gases use the elemental values. A single element keeps its own I.
    """
    els = datafiles.elements()
    if len(fractions) == 1:
        (z,) = fractions
        return els[z - 1]["I_eV"]
    num = den = 0.0
    for z, w in fractions.items():
        i_j = els[z - 1]["I_eV"]
        if condensed:
            i_j = BOUND_CONDENSED_I_EV.get(z, BOUND_SCALE * i_j)
        weight = w * z / els[z - 1]["A"]
        num += weight * math.log(i_j)
        den += weight
    return math.exp(num / den)


def combine_mean_excitation(parts: list[tuple[float, float, float]]) -> float:
    """Bragg additivity over parts given as (mass fraction, <Z/A>, I in eV) (ICRU Report 37, Eq. 2.19)."""
    num = sum(w * za * math.log(i) for w, za, i in parts)
    den = sum(w * za for w, za, _ in parts)
    return math.exp(num / den)


def state_from_density(density: float, usually_gas: bool) -> str:
    """The state a density implies: 'gas' below GAS_DENSITY_LIMIT; above it 'liquid' for a composition that is
    usually a gas (a liquefied gas such as liquid argon), else 'solid'."""
    if density < GAS_DENSITY_LIMIT:
        return "gas"
    return "liquid" if usually_gas else "solid"


def ideal_gas_density(molar_mass_g: float, temperature_K: float, pressure_Pa: float) -> float:
    """rho = P M / (R T), g/cm3 (ideal gas law; valid for the dilute detector gases at near-ambient conditions)."""
    return pressure_Pa * molar_mass_g / (GAS_CONSTANT * temperature_K) * 1e-6


def components_from_fractions(fractions: dict[int, float]) -> tuple[Component, ...]:
    """Sorted Component tuple from mass fractions by Z, renormalised to sum exactly to 1."""
    els = datafiles.elements()
    total = sum(fractions.values())
    return tuple(Component(z, els[z - 1]["symbol"], w / total, els[z - 1]["A"]) for z, w in sorted(fractions.items()))


def pseudo_element_components(z: int, a: float) -> tuple[Component, ...]:
    """A single pseudo-element with a conventional Z and A (e.g. standard rock, Z = 11, A = 22)."""
    return (Component(z, f"Z{z}", 1.0, a),)


def library_composition(entry) -> tuple[dict[int, float], tuple[Component, ...] | None]:
    """Element mass fractions of a library entry, and explicit Components for pseudo-elements."""
    kind, _, body = entry["composition"].partition(":")
    if kind == "formula":
        return mass_fractions_of_formula(parse_formula(body)), None
    if kind == "mass":
        fractions: dict[int, float] = {}
        for item in body.split(";"):
            part, _, w = item.partition("=")
            for z, wz in mass_fractions_of_formula(parse_formula(part)).items():
                fractions[z] = fractions.get(z, 0.0) + float(w) * wz
        return fractions, None
    if kind == "pseudo":
        vals = dict(item.split("=") for item in body.split(";"))
        z, a = int(vals["Z"]), float(vals["A"])
        return {z: 1.0}, pseudo_element_components(z, a)
    raise UnknownMaterial(f"library entry {entry['key']}: unknown composition kind '{kind}'")


def library_molar_mass(key: str) -> float:
    """Molar mass (g/mol) of a library material's formula unit; for a gas mixture such as air, the mean molar
    mass implied by its tabulated density at 20 degC and 1 atm (ideal gas); else the mean atomic mass."""
    entry = datafiles.library_materials()[key]
    kind, _, body = entry["composition"].partition(":")
    if kind == "formula":
        return molar_mass(parse_formula(body))
    if entry["state"] == "gas":
        return entry["density"] * 1e6 * GAS_CONSTANT * REFERENCE_TEMPERATURE_K / REFERENCE_PRESSURE_PA
    fractions, pseudo = library_composition(entry)
    if pseudo:
        return pseudo[0].A
    return 1.0 / sum(w / datafiles.elements()[z - 1]["A"] for z, w in fractions.items())


def library_material(key: str, name: str | None = None) -> Material:
    """A Material from the built-in library (refgen/data/materials.csv)."""
    lib = datafiles.library_materials()
    if key not in lib:
        raise UnknownMaterial(f"'{key}' is not in the built-in material library")
    entry = lib[key]
    fractions, pseudo = library_composition(entry)
    components = pseudo or components_from_fractions(fractions)
    condensed = entry["state"] != "gas"
    if entry["I_eV"] is not None:
        i_ev, i_src = entry["I_eV"], "library value"
    else:
        i_ev, i_src = bragg_mean_excitation(fractions, condensed), "Bragg additivity (ICRU 37)"
    caveats = (entry["caveat"],) if entry["caveat"] else ()
    return Material(name=name or key, description=entry["description"], components=components,
                    density=entry["density"], state=entry["state"], mean_excitation_eV=i_ev, i_source=i_src,
                    pair_energy_eV=entry["W_eV"], density_effect=density_effect_for(key, i_ev),
                    source=entry["source"], caveats=caveats)


def density_effect_for(key: str, i_ev: float) -> dict | None:
    """The tabulated Sternheimer parameters for a library key, if present and made for the same I."""
    params = datafiles.density_effect_parameters().get(key)
    if params is None or abs(params["mean_excitation_eV"] - i_ev) > 1e-6:
        return None
    return dict(params)
