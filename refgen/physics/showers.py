"""Electromagnetic showers: critical energy, Molière radius, and the longitudinal profile.

Critical energy E_c (Review of Particle Physics 2024, Sec. 34.4.4): two definitions are in use.
  - Rossi: the energy at which the ionisation loss per radiation length equals the electron energy,
    S_col(E) X0 = E (E total energy). This is the Review's tabulated one and the one used for R_M.
  - Crossing: the energy at which collision and radiative losses are equal, S_col(E) = S_rad(E).
Published fits for electrons (RPP Fig. 34.14): 610/(Z + 1.24) MeV for solids and liquids, 710/(Z + 0.92) MeV
for gases.
Molière radius: R_M = X0 E_s / E_c with E_s = 21.2052 MeV (RPP Eq. 34.35).
Longitudinal profile (Longo & Sestili, Nucl. Instrum. Meth. 128 (1975) 283; RPP Eq. 34.36):
    dE/dt = E b (b t)^(a-1) e^(-b t) / Gamma(a),  t in X0,  b ~ 0.5,
    t_max = (a - 1)/b = ln(E/E_c) + C_j with C_e = -0.5 (electrons) and C_gamma = +0.5 (photons).
Valid for E >> E_c; contained fractions follow from the regularised incomplete gamma function.
"""
from __future__ import annotations

import numpy as np
from scipy.optimize import brentq
from scipy.special import gammainc, gammaincinv, gammaln, xlogy

from .. import datafiles
from .kinematics import electron_mass, momentum_of_kinetic
from .stopping import electron_collision_stopping, electron_radiative_stopping

PROFILE_B = 0.5
C_ELECTRON = -0.5
C_PHOTON = 0.5


def _solve_kinetic(f, hi: float = 5e4) -> float:
    """Root in kinetic energy T (MeV) of f(T) on a log bracket from 10 keV up to ``hi``."""
    return float(np.exp(brentq(lambda lt: f(np.exp(lt)), np.log(0.01), np.log(hi), xtol=1e-10)))


def critical_energy_rossi(medium, x0: float, positron: bool = False) -> float:
    """E_c by Rossi's definition, MeV (kinetic energy): the ionisation loss per radiation length equals the
    kinetic energy, S_col(T) X0 = T.

    B. Rossi, High-Energy Particles (1952); this is the definition of the published tables (Groom et al., At.
    Data Nucl. Data Tables 78 (2001) 183; Review of Particle Physics 2024, Sec. 34.4.4). Solving with the total
    energy instead would give values about 0.5 MeV lower (2 % for high Z). Electrons, or positrons with
    ``positron``.
    """
    return _solve_kinetic(lambda t: float(electron_collision_stopping(momentum_of_kinetic(t, electron_mass()),
                                                                      medium, positron)) * x0 - t)


def critical_energy_crossing(medium, x0: float, positron: bool = False) -> float:
    """E_c by the crossing definition, MeV (kinetic energy): collision and radiative stopping powers are
    equal, S_col(T) = S_rad(T) (Review of Particle Physics 2024, Sec. 34.4.4). A different, higher number
    than Rossi's; shown beside it under its own name. ``x0`` is not needed here (the radiative stopping comes
    from the bremsstrahlung cross section); both definitions take the same arguments."""
    def f(t):
        p = momentum_of_kinetic(t, electron_mass())
        return float(electron_collision_stopping(p, medium, positron)) - float(
            electron_radiative_stopping(p, medium, positron))
    return _solve_kinetic(f)


def critical_energy_fit(z_eff: float, gas: bool) -> float:
    """The Review's fit to electron critical energies, MeV: 610/(Z+1.24) (condensed), 710/(Z+0.92) (gas)."""
    return 710.0 / (z_eff + 0.92) if gas else 610.0 / (z_eff + 1.24)


def moliere_radius(x0_g_cm2: float, ec_mev: float) -> float:
    """R_M = X0 E_s / E_c, g/cm2 (divide by the density for cm)."""
    return x0_g_cm2 * datafiles.constant("scale_energy_Es") / ec_mev


def profile_a(energy: float, ec: float, photon: bool) -> float:
    """Longo-Sestili shape parameter a = b t_max + 1."""
    return PROFILE_B * shower_max(energy, ec, photon) + 1.0


def shower_max(energy: float, ec: float, photon: bool) -> float:
    """Depth of shower maximum, X0: ln(E/E_c) + C_j."""
    return float(np.log(energy / ec) + (C_PHOTON if photon else C_ELECTRON))


def contained_fraction(depth_x0, energy: float, ec: float, photon: bool):
    """Fraction of the shower energy deposited within depth_x0 radiation lengths (regularised lower gamma)."""
    return gammainc(profile_a(energy, ec, photon), PROFILE_B * np.asarray(depth_x0, dtype=float))


def containment_depth(fraction: float, energy: float, ec: float, photon: bool) -> float:
    """Depth (X0) that contains ``fraction`` of the shower energy on average."""
    return float(gammaincinv(profile_a(energy, ec, photon), fraction) / PROFILE_B)


def profile(depth_x0, energy: float, ec: float, photon: bool):
    """(1/E) dE/dt at depths t (X0): the Longo-Sestili gamma distribution,
    b (bt)^(a-1) exp(-bt) / Gamma(a)."""
    a, bt = profile_a(energy, ec, photon), PROFILE_B * np.asarray(depth_x0, dtype=float)
    return PROFILE_B * np.exp(xlogy(a - 1.0, bt) - bt - gammaln(a))
