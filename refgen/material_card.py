"""Report section: the material card, grouped by what the reader is doing (tracking, calorimetry, hadrons and
muons, identification), with one unit per value. Both unit systems stay in key-numbers.json and the CSVs.

``card_numbers`` adds the card's own key numbers (the most probable loss in 1 mm, the refractive index);
``card_groups`` turns a material's key numbers into display rows. Plain data out; the physics is in
refgen.physics.
"""
from __future__ import annotations

import numpy as np

from .charged import MUON_MASS, VAVILOV_GAUSSIAN_KAPPA
from .physics.cherenkov import HC_EV_NM, refractive_index
from .physics.straggling import most_probable_loss, vavilov_kappa

CARD_THICKNESS_CM = 0.1  # the most probable loss is quoted for 1 mm of material
INDEX_WAVELENGTH_NM = 400.0  # where the card quotes a dispersive refractive index (blue, near photodetector peaks)
METRES_FROM_CM = 1000.0  # lengths of this many cm and more are shown in m


def card_numbers(material, medium, beta_gamma_min: float) -> dict:
    """Key numbers the card adds: the Landau-Vavilov most probable loss of a minimum-ionising muon in 1 mm of the
    material (MeV; None with a note when 1 mm is already thick, kappa >= VAVILOV_GAUSSIAN_KAPPA), and the
    refractive index at INDEX_WAVELENGTH_NM with the Cherenkov threshold beta-gamma when the spec gives one."""
    x = CARD_THICKNESS_CM * material.density
    kappa = float(vavilov_kappa(beta_gamma_min, MUON_MASS, 1, medium, x))
    mpv = float(most_probable_loss(beta_gamma_min, 1, medium, x))
    out = {"mip_most_probable_in_1_mm_MeV": None if kappa >= VAVILOV_GAUSSIAN_KAPPA else mpv,
           "mip_most_probable_in_1_mm_kappa": kappa}
    if material.refractive_index is not None:
        n = float(refractive_index(material.refractive_index, np.array([HC_EV_NM / INDEX_WAVELENGTH_NM]),
                                   material.index_density_ratio)[0])
        out["refractive_index"] = {"n": n, "wavelength_nm": INDEX_WAVELENGTH_NM,
                                   "dispersive": material.refractive_index.kind != "constant",
                                   "cherenkov_threshold_beta_gamma": 1.0 / np.sqrt(n * n - 1.0)}
    return out


def _row(label: str, value, unit: str, note: str = "", digits: int = 4, sub: tuple[str, str] = ("", "")) -> dict:
    """One card row; sub is the symbol as (base, subscript)."""
    return {"label": label, "sub": sub, "value": value, "unit": unit, "note": note, "digits": digits}


def _length(cm: float | None) -> tuple[float | None, str]:
    """A length in cm, or in m when it is METRES_FROM_CM or longer (gases)."""
    if cm is not None and cm >= METRES_FROM_CM:
        return cm / 100.0, "m"
    return cm, "cm"


def _per_length(mev_per_cm: float, gas: bool) -> tuple[float, str]:
    """An energy loss per length: keV/cm in a gas, MeV/cm otherwise."""
    return (mev_per_cm * 1e3, "keV/cm") if gas else (mev_per_cm, "MeV/cm")


def card_groups(m: dict) -> list[dict]:
    """The card of one material (its key numbers) as groups of rows: {title, rows: [{label, sub, value, unit,
    note, digits}]}. A value of None is shown with its note instead of a number."""
    gas = m["state"] == "gas"
    about = [_row("Density", m["density_g_cm3"], "g/cm³")]
    if m.get("conditions_as_given"):  # echoed as the spec typed them (temperature, pressure)
        about.append(_row("Gas conditions", m["conditions_as_given"], ""))
    about += [_row("Mean excitation energy", m["mean_excitation_energy_eV"], "eV", m["mean_excitation_energy_source"], sub=("I", "")),
              _row("Electrons per unit mass", m["z_over_a"], "mol/g", "energy loss scales with it", 5, ("⟨Z/A⟩", "")),
              _row("Electron density", m["electron_density_per_cm3"], "cm⁻³")]
    mi = m["min_ionization"]
    dedx, unit = _per_length(mi["dedx_MeV_cm"], gas)
    mpv = m["mip_most_probable_in_1_mm_MeV"]
    tracking = [
        _row("Minimum ionisation", dedx, unit, f"mean loss of a singly charged particle at its minimum, βγ = {mi['beta_gamma']:.3g}"),
        _row("Most probable loss in 1 mm", None if mpv is None else mpv * 1e3, "keV",
             "Landau-Vavilov peak for a minimum-ionising muon (the mean lies higher)"
             + ("; 1 mm of gas holds only a few collisions, so the real spread is wider than Landau's (Bichsel 1988)" if gas else "")
             if mpv is not None else f"not given: 1 mm is a thick layer here (κ = {m['mip_most_probable_in_1_mm_kappa']:.3g}), "
             "the loss is close to a Gaussian about the mean", 3),
        _row("Plasma energy", m["plasma_energy_eV"], "eV",
             f"sets the density effect, which flattens the relativistic rise; here from {m['density_effect_source']}", sub=("ħω", "p")),
    ]
    x0, x0_unit = _length(m["radiation_length_cm"])
    rm, rm_unit = _length(m["moliere_radius_cm"])
    crossing = (m.get("critical_energy_crossing_MeV") or {}).get("electron")
    calorimetry = [
        _row("Radiation length", x0, x0_unit, "an energetic electron keeps 1/e of its energy over it (Tsai)", sub=("X", "0")),
        _row("Molière radius", rm, rm_unit, "about 90 % of a shower's energy lies within one", sub=("R", "M")),
        _row("Critical energy", m["critical_energy_MeV"]["electron"], "MeV",
             "electrons, Rossi's definition: ionisation loss per X₀ equals the energy"
             + (f"; the two losses cross at {crossing:.3g} MeV" if crossing else ""), sub=("E", "c")),
    ]
    lam, lam_unit = _length(m["nuclear_interaction_length_cm"])
    hadrons = [
        _row("Nuclear interaction length", lam, lam_unit, f"mean free path of an energetic hadron ({m['nuclear_lengths_note']})", sub=("λ", "I")),
        _row("Muon critical energy", m["muon_critical_energy_GeV"], "GeV", "above it a muon loses more by radiation than by ionisation"),
    ]
    groups = [{"title": "The material", "rows": about},
              {"title": "Tracking", "rows": tracking},
              {"title": "Calorimetry", "rows": calorimetry},
              {"title": "Hadrons and muons", "rows": hadrons}]
    ri = m.get("refractive_index")
    if ri:
        groups.append({"title": "Identification", "rows": [
            _row("Refractive index", ri["n"], "", (f"at {ri['wavelength_nm']:g} nm; " if ri["dispersive"] else "")
                 + f"Cherenkov light above βγ = {ri['cherenkov_threshold_beta_gamma']:.4g}", 7 if gas else 4, ("n", ""))]})
    return groups
