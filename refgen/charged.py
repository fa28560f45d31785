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
from .physics.bethe_corrections import BETHE_VALID_MIN_BG, bethe_regime_min_beta_gamma
from .physics.stopping import bethe_stopping, mass_stopping_power, muon_collision_stopping
from .physics.straggling import (LANDAU_REGIME_KAPPA, landau_fwhm, loss_distribution, most_probable_loss,
                                 restricted_stopping, vavilov_kappa)

ELECTRON_T_LOW = 0.01  # MeV: lower end of the Rohrlich-Carlson form's validity (ICRU 37)
RESTRICTED_CUT_MEV = 0.1  # delta-ray cut for the restricted energy loss shown per layer
ROUND_MOMENTA = (0.1e3, 0.3e3, 1e3, 3e3, 10e3, 30e3, 100e3)  # MeV/c, for the per-material table
MUON_MASS = 105.6583755
VAVILOV_GAUSSIAN_KAPPA = 0.1  # above this the straggling is nearly Gaussian (RPP 2024 Sec. 34.2.9; Vavilov 1957)
FC_PER_CARRIER = 1.602176634e-4  # elementary charge in fC (CODATA 2018, exact)
# An electron or positron is said to shower, and gets no reach momentum, once at least this much material lies in
# front of the layer. By Rossi's definition of the critical energy, the collision loss over one radiation length
# is about E_c, so an electron that crosses 1 X0 starts with E >~ E_c and loses as much or more to bremsstrahlung
# photons that carry energy away in a cascade: one continuous-slowing-down momentum no longer describes it
# (Review of Particle Physics 2024, Sec. 34.4.2 and 34.5). Below 1 X0 the CSDA walk with the mean total loss is
# kept, as an estimate of the mean. Common practice for the threshold.
SHOWER_ONSET_X0 = 1.0


def validity_edge_momentum(species, medium=None) -> float:
    """Momentum (MeV/c) below which the curve is of limited validity: for a heavy particle in a given medium
    where the Bethe regime ends for its heaviest element (bethe_regime_min_beta_gamma), else beta gamma = 0.05."""
    if species.is_electron_like:
        return float(momentum_of_kinetic(ELECTRON_T_LOW, species.mass))
    if medium is not None:
        return bethe_regime_min_beta_gamma(medium.Z) * species.mass
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
        return muon_collision_stopping(np.sqrt(e * e - MUON_MASS ** 2), -1, medium)
    return muon_critical_energy(collision, *material.arrays()) / 1e3


def species_curve(species, medium, x0, table, p) -> dict:
    """dE/dx and CSDA range of one species in one material on the momentum grid ``p`` (MeV/c). ``showers``
    marks electron and positron momenta above the critical energy (radiative >= collision loss), where no CSDA
    range is given."""
    s = mass_stopping_power(p, species.mass, species.charge, medium, x0)
    t = kinetic_energy(p, species.mass)
    r = table.range_of(np.clip(t, table.t[0], None))
    valid = p >= validity_edge_momentum(species, medium)
    showers = s["radiative"] >= s["collision"] if species.is_electron_like else np.zeros_like(valid)
    return {"momentum_GeV_c": p / 1e3, "kinetic_energy_MeV": t, "beta_gamma": beta_gamma(p, species.mass),
            "dedx_MeV_cm2_g": s["total"], "collision_MeV_cm2_g": s["collision"],
            "radiative_MeV_cm2_g": s["radiative"], "csda_range_g_cm2": np.where(valid & ~showers, r, np.nan),
            "valid": valid, "showers": showers}


def slab_sequence(layers):
    """All slabs in stack order, with the index of the layer each belongs to."""
    for i, layer in enumerate(layers):
        for _ in range(layer.repeat):
            for slab in layer.slabs:
                yield i, slab


def _walk_back(tables, species, steps, t):
    """Apply CSDA slab crossings backwards, vectorised over tracks: ``steps`` is a list of
    (material, areal density g/cm2, index array) from the outermost slab inwards, and each step replaces
    t[index] (the kinetic energy, MeV, leaving that slab) by the energy needed to enter it:
    R(T_in) = R(T_out) + x rho. nan marks energies beyond the range tables."""
    for material, areal, index in steps:
        t[index] = kinetic_to_cross(tables[(material, species.key)], t[index], areal)
    return t


def _momenta_gev(t, species) -> list:
    """Kinetic energies (MeV) to momenta (GeV/c); None where the walk left the range tables."""
    p = momentum_of_kinetic(np.where(np.isfinite(t), t, 0.0), species.mass) / 1e3
    return [float(v) if np.isfinite(e) else None for v, e in zip(p, t)]


def reach_momenta(spec, tables) -> dict:
    """Momentum (GeV/c) each species needs to reach the front of each layer from the interaction point (CSDA).

    One backward pass over the slabs per species, vectorised over the layers: layer k needs every slab in
    front of it, so going outward-in, a slab of layer i acts on the targets k > i."""
    slabs = list(slab_sequence(spec.layers))
    n = len(spec.layers)
    targets = np.arange(n)
    steps = [(s.material, s.thickness * spec.materials[s.material].density, targets[i + 1:]) for i, s in reversed(slabs)]
    return {sp.key: dict(zip((l.name for l in spec.layers), _momenta_gev(_walk_back(tables, sp, steps, np.zeros(n)), sp)))
            for sp in spec.species}


def crossing_momenta(spec, tables) -> dict:
    """Momentum (GeV/c) each species needs to cross each layer on its own (CSDA; None if out of range).

    Vectorised over the layers: step m acts on the m-th slab from the back of every layer that has one,
    grouped by material."""
    own = [[(s.material, s.thickness * spec.materials[s.material].density) for _, s in slab_sequence([l])][::-1]
           for l in spec.layers]
    steps = []
    for m in range(max((len(o) for o in own), default=0)):
        groups: dict[tuple, list[int]] = {}
        for k, o in enumerate(own):
            if m < len(o):
                groups.setdefault(o[m], []).append(k)
        steps += [(mat, areal, np.array(idx)) for (mat, areal), idx in groups.items()]
    n = len(spec.layers)
    return {sp.key: dict(zip((l.name for l in spec.layers), _momenta_gev(_walk_back(tables, sp, steps, np.zeros(n)), sp)))
            for sp in spec.species}


def depth_in_front_X0(spec, x0s) -> dict[str, float]:
    """x/X0 of all material between the interaction point and the front face of each layer."""
    out, total = {}, 0.0
    for layer in spec.layers:
        out[layer.name] = total
        total += spec.layer_depth(layer, x0s)
    return out


def electron_showers(spec, x0s) -> dict:
    """Where an electron or positron showers instead of slowing down (SHOWER_ONSET_X0): per electron-like
    species, the layers whose front lies behind at least SHOWER_ONSET_X0 (reach) and the layers at least that
    thick on their own (cross), each with its depth in X0. Presentation of the CSDA walk, kept apart from it."""
    front = depth_in_front_X0(spec, x0s)
    own = {l.name: spec.layer_depth(l, x0s) for l in spec.layers}
    electrons = [sp.key for sp in spec.species if sp.is_electron_like]
    return {"onset_X0": SHOWER_ONSET_X0,
            "reach_depth_X0": {sp: {n: d for n, d in front.items() if d >= SHOWER_ONSET_X0} for sp in electrons},
            "cross_depth_X0": {sp: {n: d for n, d in own.items() if d >= SHOWER_ONSET_X0} for sp in electrons}}


def without_showers(momenta: dict, depths: dict) -> dict:
    """The reach or crossing momenta with None where the species showers (depths from electron_showers)."""
    return {sp: {n: (None if n in depths.get(sp, {}) else v) for n, v in row.items()} for sp, row in momenta.items()}


REACH_STATES = {"shower": "showers: {depth:.3g} X0 of material in front (electrons shower past {onset:g} X0)",
                "beyond": "beyond the momentum range of the range tables",
                "limited": "below the energy-loss model's validity edge: limited accuracy"}


def reach_state(value, shower_depth, edge_gev: float) -> str:
    """What a reach or crossing momentum (GeV/c or None) means: 'ok', 'limited' (below the species' validity
    edge), 'shower' (an electron showers: shower_depth in X0 is not None) or 'beyond' (out of the tables)."""
    if shower_depth is not None:
        return "shower"
    if value is None:
        return "beyond"
    return "limited" if 0 < value < edge_gev else "ok"


def reach_flag(value, shower_depth, edge_gev: float) -> str:
    """The flag-column text for a reach or crossing momentum ('' when it is a plain result)."""
    state = reach_state(value, shower_depth, edge_gev)
    if state == "ok":
        return ""
    return REACH_STATES[state].format(depth=shower_depth or 0.0, onset=SHOWER_ONSET_X0)


def tracking_scattering_curves(spec, x0s, tables) -> dict:
    """Highland theta0 (mrad) against momentum for each species through the tracking volume (Spec.tracking_volume).
    NaN where the species cannot cross the tracking volume (it stops, or, for electrons, showers in it)."""
    volume = spec.tracking_volume()
    total = sum(spec.layer_depth(l, x0s) for l in volume)
    one = np.zeros(1, dtype=int)
    steps = [(s.material, s.thickness * spec.materials[s.material].density, one)
             for _, s in reversed(list(slab_sequence(volume)))]
    p = spec.momentum.values()
    out = {"momentum_GeV_c": p / 1e3, "x_over_X0": total}
    for sp in spec.species:
        need = _momenta_gev(_walk_back(tables, sp, steps, np.zeros(1)), sp)[0]
        if need is None or total <= 0 or (sp.is_electron_like and total >= SHOWER_ONSET_X0):
            theta = np.full_like(p, np.nan)
        else:
            theta = np.where(p / 1e3 >= need, highland_theta0(p, sp.mass, sp.charge, total) * 1e3, np.nan)
        out[f"theta0_mrad_{sp.key}"] = theta
    return out


def layer_signals(spec, layer, media, x0s, min_ion) -> dict:
    """Thin-layer numbers for a minimum-ionising muon in one layer (the active slab of a cell)."""
    slab = next((s for s in layer.slabs if s.active), layer.slabs[0])
    m = spec.materials[slab.material]
    medium = media[slab.material]
    bg, dedx_min = min_ion[slab.material]
    x = slab.thickness * m.density
    mean = dedx_min * x
    kappa = float(vavilov_kappa(bg, MUON_MASS, 1, medium, x))
    if kappa < LANDAU_REGIME_KAPPA:
        mpv = float(most_probable_loss(bg, 1, medium, x))
    else:  # Vavilov regime: the mode of Vavilov's distribution (the Landau form drifts to -1 % by kappa = 0.1)
        mpv = loss_distribution(bg, MUON_MASS, 1, medium, x, mean).mode
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
    """Highland theta0 of a 1 GeV/c muon after all material up to and including each tracking layer of the
    tracking volume (Spec.tracking_volume)."""
    total, out = 0.0, []
    for layer in spec.tracking_volume():
        total += spec.layer_depth(layer, x0s)
        if layer.system == "tracking":
            out.append({"layer": layer.name, "x_over_X0": total,
                        "theta0_mrad_at_1_GeV_c": float(highland_theta0(1e3, MUON_MASS, 1, total)) * 1e3})
    return out


def round_momentum_row(species, medium, x0, table) -> dict:
    """Collision (ionisation) dE/dx, total dE/dx (collision + radiative; given only for a species whose
    radiative loss reaches 1 % of the collision loss at a round momentum) and CSDA range of one species in one
    material at the round momenta. None below validity; no CSDA range for electrons and positrons above the
    critical energy, where they shower ("showers")."""
    p = np.array(ROUND_MOMENTA)
    s = mass_stopping_power(p, species.mass, species.charge, medium, x0)
    t = kinetic_energy(p, species.mass)
    valid = p >= validity_edge_momentum(species, medium)
    r = table.range_of(np.clip(t, table.t[0], None))
    ranged = valid & ((s["radiative"] < s["collision"]) if species.is_electron_like else True)
    radiative = bool(np.any(s["radiative"][valid] >= 0.01 * s["collision"][valid]))
    return {"species": species.key, "label": species.label,
            "collision": [float(v) if ok else None for v, ok in zip(s["collision"], valid)],
            "total": [float(v) if ok else None for v, ok in zip(s["total"], valid)] if radiative else None,
            "range": [float(v) if ok else None for v, ok in zip(r, ranged)],
            "showers": [bool(ok and not rk) for ok, rk in zip(valid, ranged)]}
