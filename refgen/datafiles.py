"""Loaders for refgen's own data tables (refgen/data/*.csv), each read once on first use and cached.

Every table opens with a comment line naming its source; every row carries a source column. A malformed row
raises DataFileError naming the file and line, never a silent drop. See refgen/data/README.md.
"""
from __future__ import annotations

import csv
import functools
import io
import math
from importlib import resources
from types import MappingProxyType

from .errors import DataFileError


def _read_rows(filename: str) -> list[tuple[int, dict[str, str]]]:
    """Rows of a data CSV as (line number, dict), skipping '#' comment lines."""
    text = resources.files("refgen.data").joinpath(filename).read_text(encoding="utf-8")
    lines = [(i + 1, line) for i, line in enumerate(text.splitlines()) if line.strip() and not line.startswith("#")]
    reader = csv.reader(io.StringIO("\n".join(line for _, line in lines)))
    rows = list(reader)
    header = rows[0]
    out = []
    for (lineno, _), row in zip(lines[1:], rows[1:]):
        if len(row) != len(header):
            raise DataFileError(f"{filename}, line {lineno}: expected {len(header)} columns, found {len(row)}")
        out.append((lineno, dict(zip(header, row))))
    return out


def _number(filename: str, lineno: int, row: dict, column: str, optional: bool = False) -> float | None:
    """One numeric cell; blank is allowed only where ``optional``."""
    text = row[column].strip()
    if not text and optional:
        return None
    try:
        return float(text)
    except ValueError:
        raise DataFileError(f"{filename}, line {lineno}: column {column} is not a number: '{text}'") from None


def _codata(name: str) -> float:
    """One CODATA recommended value from scipy.constants (in the units scipy gives)."""
    import scipy.constants as sc
    return sc.physical_constants[name][0]


@functools.cache
def constants() -> MappingProxyType:
    """Physical constants by name, in internal units (MeV, cm, g), from scipy.constants (the CODATA edition
    scipy ships) and derived from them as the Review of Particle Physics (2024) Table 34.1 defines them."""
    import scipy.constants as sc
    me = _codata("electron mass energy equivalent in MeV")
    re_cm = _codata("classical electron radius") * 100.0
    alpha = sc.fine_structure
    hbar_c_cm = _codata("reduced Planck constant times c in MeV fm") * 1e-13
    return MappingProxyType({
        "electron_mass": me,  # MeV
        "muon_mass": _codata("muon mass energy equivalent in MeV"),  # MeV
        "fine_structure": alpha,
        "classical_electron_radius": re_cm,  # cm
        "avogadro": sc.N_A,  # 1/mol
        "boltzmann": sc.k,  # J/K
        "hbar_c": hbar_c_cm,  # MeV cm
        "elementary_charge_fC": sc.e * 1e15,  # fC
        "dedx_constant_K": 4 * math.pi * sc.N_A * re_cm ** 2 * me,  # MeV cm2/mol: K = 4 pi N_A r_e^2 m_e c^2
        # eV, with rho in g/cm3: hbar omega_p = sqrt(4 pi N_e r_e^3) m_e c^2 / alpha, N_e = rho <Z/A> N_A
        "plasma_energy_coefficient": math.sqrt(4 * math.pi * sc.N_A * re_cm ** 3) * me * 1e6 / alpha,
        "scale_energy_Es": math.sqrt(4 * math.pi / alpha) * me,  # MeV: E_s = sqrt(4 pi / alpha) m_e c^2
        "frank_tamm_per_eV_cm": alpha / (hbar_c_cm * 1e6),  # 1/(eV cm): alpha / (hbar c), for z = 1
    })


def constant(name: str) -> float:
    """One physical constant (see ``constants``)."""
    return constants()[name]


@functools.cache
def elements() -> tuple[dict, ...]:
    """Elements Z = 1-92 (elements.csv), indexed so that elements()[Z - 1] is element Z."""
    out = []
    for n, row in _read_rows("elements.csv"):
        z = int(_number("elements.csv", n, row, "Z"))
        if z != len(out) + 1:
            raise DataFileError(f"elements.csv, line {n}: Z={z} out of order")
        out.append(MappingProxyType({
            "Z": z, "symbol": row["symbol"], "name": row["name"],
            "A": _number("elements.csv", n, row, "atomic_weight"),
            "density": _number("elements.csv", n, row, "density_g_cm3"),
            "state": row["state"], "I_eV": _number("elements.csv", n, row, "mean_excitation_eV"),
            "source": row["source"],
        }))
    return tuple(out)


@functools.cache
def particles() -> MappingProxyType:
    """Built-in particle species by key: names from particles.csv, masses (MeV) and integer charges from the
    particle package by PDG id, and bare-nucleus masses from scipy.constants (CODATA) where given."""
    from particle import Particle
    from particle.particle import ParticleNotFound
    out = {}
    for n, row in _read_rows("particles.csv"):
        try:
            pdg = Particle.from_pdgid(int(row["pdgid"]))
        except (ValueError, ParticleNotFound):
            raise DataFileError(f"particles.csv, line {n}: no particle with PDG id {row['pdgid']!r}") from None
        mass = _codata(f"{row['codata_mass']} mass energy equivalent in MeV") if row["codata_mass"] else pdg.mass
        if mass is None or pdg.charge is None or pdg.charge != int(pdg.charge):
            raise DataFileError(f"particles.csv, line {n}: the particle package has no mass or integer charge for "
                                f"PDG id {row['pdgid']}")
        out[row["key"]] = MappingProxyType({
            "key": row["key"], "label": row["label"], "mass": float(mass), "charge": int(pdg.charge),
            "pdgid": int(row["pdgid"]), "aliases": tuple(a for a in row["aliases"].split(";") if a),
            "source": row["source"],
        })
    return MappingProxyType(out)


def _normal(name: str) -> str:
    """A particle name as typed, folded for lookup: case, spaces, underscores and Greek letters ignored."""
    name = name.strip().replace("\u2212", "-").replace("\u03c0", "pi").replace("\u03bc", "mu")
    return "".join(name.split()).replace("_", "").lower()


@functools.cache
def _particle_index() -> dict[str, str]:
    index: dict[str, str] = {}
    for p in particles().values():
        for name in (p["key"], p["label"], *p["aliases"]):
            index.setdefault(_normal(name), p["key"])
    return index


def find_particle(name: str):
    """The built-in species a typed name means ('pi-', 'K+', 'mu+', 'anti-proton', 'He-3', ...), or None."""
    key = _particle_index().get(_normal(name)) if isinstance(name, str) else None
    return particles()[key] if key else None


def particle_names() -> list[str]:
    """Every name a built-in species answers to, for suggestions."""
    return sorted({n for p in particles().values() for n in (p["key"], p["label"], *p["aliases"])})


@functools.cache
def library_materials() -> MappingProxyType:
    """The built-in material library by key (materials.csv)."""
    out = {}
    for n, row in _read_rows("materials.csv"):
        out[row["key"]] = MappingProxyType({
            "key": row["key"], "description": row["description"], "composition": row["composition"],
            "density": _number("materials.csv", n, row, "density_g_cm3"), "state": row["state"],
            "I_eV": _number("materials.csv", n, row, "mean_excitation_eV", optional=True),
            "W_eV": _number("materials.csv", n, row, "pair_energy_eV", optional=True),
            "source": row["source"], "caveat": row["caveat"], "line": n,
        })
    return MappingProxyType(out)


@functools.cache
def density_effect_parameters() -> MappingProxyType:
    """Sternheimer-Berger-Seltzer (1984) density-effect parameters by library material key."""
    out = {}
    for n, row in _read_rows("density_effect.csv"):
        out[row["material"]] = MappingProxyType({k: _number("density_effect.csv", n, row, k) for k in
                                                 ("mean_excitation_eV", "cbar", "x0", "x1", "a", "k", "delta0")}
                                                | {"source": row["source"]})
    return MappingProxyType(out)


@functools.cache
def atomic_shells() -> tuple:
    """Subshells of the elements Z = 1-92 (atomic_shells.csv), indexed so that atomic_shells()[Z - 1] is
    {"electrons": tuple, "binding_eV": tuple, "conductor": bool, "conduction_electrons": int} of element Z."""
    out: list[dict] = [{"electrons": [], "binding_eV": [], "conductor": False, "conduction_electrons": 0}
                       for _ in range(92)]
    for n, row in _read_rows("atomic_shells.csv"):
        z = int(_number("atomic_shells.csv", n, row, "Z"))
        if not 1 <= z <= 92:
            raise DataFileError(f"atomic_shells.csv, line {n}: Z={z} out of range")
        entry = out[z - 1]
        entry["electrons"].append(_number("atomic_shells.csv", n, row, "electrons"))
        entry["binding_eV"].append(_number("atomic_shells.csv", n, row, "binding_eV"))
        entry["conductor"] = row["conductor"] == "1"
        entry["conduction_electrons"] = int(_number("atomic_shells.csv", n, row, "conduction_electrons"))
    return tuple(MappingProxyType({k: tuple(v) if isinstance(v, list) else v for k, v in e.items()}) for e in out)


@functools.cache
def barkas_function() -> tuple:
    """(y, F(y)) rows of the Ashley-Ritchie-Brandt Barkas function (barkas_arb.csv), increasing in y."""
    rows = tuple((_number("barkas_arb.csv", n, row, "y"), _number("barkas_arb.csv", n, row, "F"))
                 for n, row in _read_rows("barkas_arb.csv"))
    if any(b[0] <= a[0] or b[1] <= 0 for a, b in zip(rows, rows[1:])):
        raise DataFileError("barkas_arb.csv: y must increase and F be positive")
    return rows


@functools.cache
def methods() -> tuple:
    """The methods table shown on the methods-and-validity page (methods.csv)."""
    return tuple(MappingProxyType(row) for _, row in _read_rows("methods.csv"))


@functools.cache
def photon_regimes() -> tuple:
    """The photon-regime map by Z (photon_regimes.csv, generated from refgen's own photon model)."""
    out = []
    for n, row in _read_rows("photon_regimes.csv"):
        out.append(MappingProxyType({"Z": int(_number("photon_regimes.csv", n, row, "Z")), "symbol": row["symbol"],
                                     "photoelectric_compton_MeV": _number("photon_regimes.csv", n, row, "photoelectric_compton_MeV"),
                                     "compton_pair_MeV": _number("photon_regimes.csv", n, row, "compton_pair_MeV")}))
    return tuple(out)


@functools.cache
def ee_bremsstrahlung_free_electron() -> tuple[tuple[float, ...], tuple[float, ...]]:
    """(T in m_e c^2, phi in alpha r_e^2 m_e c^2): radiative energy-loss cross section of electron-electron
    bremsstrahlung per free electron (ee_bremsstrahlung_free_electron.csv, generated by
    tools/make_ee_bremsstrahlung_table.py from refgen.physics.ee_bremsstrahlung)."""
    name = "ee_bremsstrahlung_free_electron.csv"
    rows = _read_rows(name)
    return (tuple(_number(name, n, r, "t_mc2") for n, r in rows),
            tuple(_number(name, n, r, "phi_alpha_re2_mc2") for n, r in rows))


@functools.cache
def triplet_free_electron() -> tuple[tuple[float, ...], tuple[float, ...]]:
    """(k in m_e c^2, sigma in alpha r_e^2): triplet production per free electron (triplet_free_electron.csv,
    generated by tools/make_triplet_table.py from refgen.physics.triplet)."""
    rows = _read_rows("triplet_free_electron.csv")
    return (tuple(_number("triplet_free_electron.csv", n, r, "k_mc2") for n, r in rows),
            tuple(_number("triplet_free_electron.csv", n, r, "sigma_alpha_re2") for n, r in rows))


@functools.cache
def nuclear_lengths() -> MappingProxyType:
    """Tabulated per-element nuclear collision and interaction lengths (g/cm2) by Z (nuclear_lengths.csv)."""
    out = {}
    for n, row in _read_rows("nuclear_lengths.csv"):
        z = int(_number("nuclear_lengths.csv", n, row, "Z"))
        out[z] = MappingProxyType({"Z": z, "symbol": row["symbol"], "A": _number("nuclear_lengths.csv", n, row, "A"),
                                   **{k: _number("nuclear_lengths.csv", n, row, k)
                                      for k in ("collision_length_g_cm2", "interaction_length_g_cm2")},
                                   "source": row["source"]})
    return MappingProxyType(out)
