"""Report section: charged particles (energy loss, range, reach, thin-layer signals, scattering).

Plain data out; the physics is in refgen.physics.
"""
from __future__ import annotations

import numpy as np
from scipy.optimize import minimize_scalar

from .physics.muon import muon_critical_energy
from .physics.kinematics import beta_gamma, electron_mass, kinetic_energy, momentum_of_kinetic
from .physics.ranges import kinetic_to_cross, range_table
from .physics.scattering import highland_theta0, highland_valid
from .physics.stopping import BETHE_VALID_MIN_BG, bethe_stopping, mass_stopping_power
from .physics.straggling import landau_fwhm, most_probable_loss, restricted_stopping, vavilov_kappa

ELECTRON_T_LOW = 0.01  # MeV: lower end of the Rohrlich-Carlson form's validity (ICRU 37)
RESTRICTED_CUT_MEV = 0.1  # delta-ray cut for the restricted energy loss shown per layer
ROUND_MOMENTA = (0.1e3, 0.3e3, 1e3, 3e3, 10e3, 30e3, 100e3)  # MeV/c, for the per-material table
MUON_MASS = 105.6583755
VAVILOV_GAUSSIAN_KAPPA = 0.1  # above this the straggling is nearly Gaussian (RPP 2024 Sec. 34.2.9; Vavilov 1957)
FC_PER_CARRIER = 1.602176634e-4  # elementary charge in fC (CODATA 2018, exact)


def validity_edge_momentum(species) -> float:
    """Momentum (MeV/c) below which the curve is of limited validity."""
    if species.is_electron_like:
        return float(momentum_of_kinetic(ELECTRON_T_LOW, species.mass))
    return BETHE_VALID_MIN_BG * species.mass


def stopping_of_kinetic(species, medium, x0):
    """S(T), MeV cm2/g, as a function of kinetic energy for the range integral."""
    def s(t):
        return mass_stopping_power(momentum_of_kinetic(t, species.mass), species.mass, species.charge, medium,
                                   x0)["total"]
    return s


def make_range_table(species, medium, x0, p_max: float):
    t_low = ELECTRON_T_LOW if species.is_electron_like else float(kinetic_energy(BETHE_VALID_MIN_BG * species.mass,
                                                                                   species.mass))
    t_high = max(float(kinetic_energy(p_max, species.mass)) * 1.5, t_low * 10)
    return range_table(stopping_of_kinetic(species, medium, x0), t_low, t_high)


def minimum_ionization(medium, mass: float = MUON_MASS) -> tuple[float, float]:
    """(beta gamma, dE/dx in MeV cm2/g) at the minimum of the Bethe curve for a singly charged particle."""
    res = minimize_scalar(lambda lbg: float(bethe_stopping(np.exp(lbg) * mass, mass, 1, medium)),
                          bounds=(np.log(1.0), np.log(30.0)), method="bounded", options={"xatol": 1e-6})
    return float(np.exp(res.x)), float(res.fun)


def muon_critical_energy_gev(material, medium) -> float:
    """Muon critical energy of a material, GeV (collision loss of a mu- equal to its radiative loss)."""
    def collision(e):
        return bethe_stopping(np.sqrt(e * e - MUON_MASS ** 2), MUON_MASS, -1, medium)
    return muon_critical_energy(collision, *material.arrays()) / 1e3


def curves(spec, media, x0s, tables) -> dict:
    """Per (material, species): the dE/dx and range curves on the spec's momentum grid."""
    p = spec.momentum.values()
    out = {}
    for name, medium in media.items():
        for sp in spec.species:
            s = mass_stopping_power(p, sp.mass, sp.charge, medium, x0s[name])
            t = kinetic_energy(p, sp.mass)
            table = tables[(name, sp.key)]
            r = table.range_of(np.clip(t, table.t[0], None))
            valid = p >= validity_edge_momentum(sp)
            out[(name, sp.key)] = {"momentum_GeV_c": p / 1e3, "kinetic_energy_MeV": t, "beta_gamma": beta_gamma(p, sp.mass),
                                   "dedx_MeV_cm2_g": s["total"], "collision_MeV_cm2_g": s["collision"],
                                   "radiative_MeV_cm2_g": s["radiative"], "csda_range_g_cm2": np.where(valid, r, np.nan),
                                   "valid": valid}
    return out


def slab_sequence(layers):
    """All slabs in stack order, with the index of the layer each belongs to."""
    for i, layer in enumerate(layers):
        for _ in range(layer.repeat):
            for slab in layer.slabs:
                yield i, slab


def momentum_to_cross(spec, tables, species, slabs) -> float | None:
    """Momentum (GeV/c) the species needs to cross the slabs (in order outward) and just leave the last one:
    walk backwards, R(T_in) = R(T_out) + x rho in each slab (CSDA). None beyond the range tables."""
    t = 0.0
    for slab in reversed(slabs):
        t = float(kinetic_to_cross(tables[(slab.material, species.key)], t,
                                   slab.thickness * spec.materials[slab.material].density))
        if not np.isfinite(t):
            return None
    return float(momentum_of_kinetic(t, species.mass)) / 1e3


def reach_momenta(spec, tables) -> dict:
    """Momentum (GeV/c) each species needs to reach the front of each layer from the interaction point (CSDA)."""
    slabs = list(slab_sequence(spec.layers))
    return {sp.key: {layer.name: momentum_to_cross(spec, tables, sp, [s for i, s in slabs if i < target])
                     for target, layer in enumerate(spec.layers)} for sp in spec.species}


def crossing_momenta(spec, tables) -> dict:
    """Momentum (GeV/c) each species needs to cross each layer on its own (CSDA; None if out of range)."""
    return {sp.key: {layer.name: momentum_to_cross(spec, tables, sp, [s for _, s in slab_sequence([layer])])
                     for layer in spec.layers} for sp in spec.species}


def tracking_scattering_curves(spec, x0s) -> dict:
    """Highland theta0 (mrad) against momentum for each species through all material up to the last tracking layer."""
    last = max((i for i, l in enumerate(spec.layers) if l.system == "tracking"), default=-1)
    total = sum(spec.layer_depth(l, x0s) for l in spec.layers[: last + 1])
    p = spec.momentum.values()
    out = {"momentum_GeV_c": p / 1e3, "x_over_X0": total}
    for sp in spec.species:
        out[f"theta0_mrad_{sp.key}"] = highland_theta0(p, sp.mass, sp.charge, total) * 1e3 if total > 0 else np.full_like(p, np.nan)
    return out


def layer_signals(spec, layer, media, x0s, min_ion) -> dict:
    """Thin-layer numbers for a minimum-ionising muon in one layer (the active slab of a cell)."""
    slab = next((s for s in layer.slabs if s.active), layer.slabs[0])
    m = spec.materials[slab.material]
    medium = media[slab.material]
    bg, dedx_min = min_ion[slab.material]
    x = slab.thickness * m.density
    mean = dedx_min * x
    mpv = float(most_probable_loss(bg, 1, medium, x))
    kappa = float(vavilov_kappa(bg, MUON_MASS, 1, medium, x))
    w_ev = m.pair_energy_eV
    thick = kappa >= VAVILOV_GAUSSIAN_KAPPA
    fwhm = float(landau_fwhm(bg, 1, medium, x))
    if thick:  # the loss is close to Gaussian about the mean: no Landau peak to quote
        mpv = fwhm = None
    carriers = mpv * 1e6 / w_ev if (w_ev and mpv is not None) else None
    x_over_x0 = spec.layer_depth(layer, x0s)
    theta0 = float(highland_theta0(1e3, MUON_MASS, 1, x_over_x0)) * 1e3
    return {
        "signal_slab_material": slab.material,
        "signal_slab_thickness_cm": slab.thickness,
        "mip_beta_gamma": bg,
        "mip_mean_MeV": mean,
        "mip_most_probable_MeV": mpv,
        "mip_fwhm_MeV": fwhm,
        "mip_most_probable_note": (f"not given: thick layer (kappa = {kappa:.3g} >= {VAVILOV_GAUSSIAN_KAPPA:g}); "
                                   "the loss is close to a Gaussian about the mean") if thick else None,
        "mip_restricted_MeV": float(restricted_stopping(bg, MUON_MASS, 1, medium, RESTRICTED_CUT_MEV)) * x,
        "landau_kappa": kappa,
        "landau_valid": kappa < 0.01,
        "mip_carriers": carriers,
        "mip_signal_fC": carriers * FC_PER_CARRIER if carriers else None,
        "pair_energy_eV": w_ev,
        "x_over_X0_for_scattering": x_over_x0,
        "theta0_mrad_at_1_GeV_c": theta0,
        "theta0_valid": bool(highland_valid(x_over_x0)),
    }


def cumulative_scattering(spec, x0s) -> list[dict]:
    """Highland theta0 of a 1 GeV/c muon after all material up to and including each tracking layer."""
    total, out = 0.0, []
    for layer in spec.layers:
        total += spec.layer_depth(layer, x0s)
        if layer.system == "tracking":
            out.append({"layer": layer.name, "x_over_X0": total,
                        "theta0_mrad_at_1_GeV_c": float(highland_theta0(1e3, MUON_MASS, 1, total)) * 1e3})
    return out


def round_momentum_table(spec, media, x0s, tables) -> dict:
    """Per material: dE/dx and CSDA range of each species at round momenta."""
    out = {}
    p = np.array(ROUND_MOMENTA)
    for name, medium in media.items():
        rows = []
        for sp in spec.species:
            s = mass_stopping_power(p, sp.mass, sp.charge, medium, x0s[name])["total"]
            t = kinetic_energy(p, sp.mass)
            table = tables[(name, sp.key)]
            valid = p >= validity_edge_momentum(sp)
            r = table.range_of(np.clip(t, table.t[0], None))
            rows.append({"species": sp.key, "label": sp.label,
                         "dedx": [float(v) if ok else None for v, ok in zip(s, valid)],
                         "range": [float(v) if ok else None for v, ok in zip(r, valid)]})
        out[name] = rows
    return out
