"""Mean energy loss (mass stopping power, MeV cm2/g) of charged particles.

Heavy charged particles: the Bethe equation with the full W_max, the density effect, the shell correction,
the Barkas term and the Bloch correction (refgen.physics.bethe_corrections). Electrons and positrons: the
Rohrlich-Carlson collision stopping power (ICRU Report 37) plus the radiative stopping power from the
bremsstrahlung cross section. Inputs: momentum p in MeV/c (arrays), mass in MeV/c^2, charge z in units of e.
"""
from __future__ import annotations

import math

import numpy as np

from .. import datafiles
from .bethe_corrections import barkas_correction, bloch_correction, shell_correction
from .density_effect import density_correction
from .bremsstrahlung import radiative_stopping
from .kinematics import beta_of, electron_mass, gamma_of, kinetic_energy, w_max
from .muon import muon_radiative_stopping

def bethe_stopping(p, mass: float, z: int, medium, spin_half: bool = False):
    """Mean mass stopping power of a heavy charged particle, MeV cm2/g.

    Review of Particle Physics 2024, Eqs. 34.4-34.5, with the corrections of its Sec. 34.2.5:
        -<dE/dx> = K z^2 <Z/A> (1/beta^2) [ 1/2 ln(2 m_e c^2 beta^2 gamma^2 W_max / I^2) - beta^2 - delta/2
                   - C/Z + z L1 + L_Bloch ]
    K = 0.307075 MeV cm2/mol; C/Z the oscillator shell correction, L1 the Barkas term of Ashley, Ritchie &
    Brandt, L_Bloch Bloch's (refgen.physics.bethe_corrections). Validity: from x = v^2/(Z v0^2) = 1 of the
    heaviest element and beta gamma >= 0.05 up (bethe_regime_min_beta_gamma) to beta gamma ~ 1000. With
    ``spin_half`` the bracket takes the spin-1/2 term + (1/8) (W_max / E)^2 of a point-like Dirac particle of
    total energy E (Groom, Mokhov & Striganov, At. Data Nucl. Data Tables 78 (2001) 183, Eq. 2; used for muons).
    """
    me = electron_mass()
    bg = np.asarray(p, dtype=float) / mass
    bg2 = bg * bg
    gamma = np.sqrt(1.0 + bg2)
    beta = bg / gamma
    b2 = beta * beta
    wmax = w_max(bg, mass, gamma)
    i_mev = medium.i_ev * 1e-6
    log_term = 0.5 * np.log(2.0 * me * bg2 * wmax / i_mev ** 2)
    bracket = (log_term - b2 - 0.5 * density_correction(bg, medium)
               - shell_correction(beta, medium.shell_oscillators) + z * barkas_correction(beta, medium.Z, medium.A, medium.w)
               + bloch_correction(beta, z))
    if spin_half:
        bracket = bracket + 0.125 * (wmax / (gamma * mass)) ** 2
    return datafiles.constant("dedx_constant_K") * z ** 2 * medium.z_over_a / b2 * bracket


def muon_electron_bremsstrahlung(p, medium):
    """Energy loss of a muon by bremsstrahlung on atomic electrons, MeV cm2/g, counted in a(E):
        Delta = (K / 4 pi) <Z/A> alpha [ln(2E/m_mu) - (1/3) ln(2 W_max/m_e)] ln^2(2 W_max/m_e)   (>= 0)
    Groom, Mokhov & Striganov, At. Data Nucl. Data Tables 78 (2001) 183, Eq. 3 (after Kelner, Kokoulin &
    Petrukhin). Valid for E >> m_mu; a few per mille of a(E) at 10 GeV, about 2 % near the muon critical energy.
    """
    mu, me = datafiles.constant("muon_mass"), electron_mass()
    alpha = datafiles.constant("fine_structure")
    bg = np.asarray(p, dtype=float) / mu
    gamma = np.sqrt(1.0 + bg * bg)
    l_w = np.log(2.0 * w_max(bg, mu, gamma) / me)
    term = (np.log(2.0 * gamma) - l_w / 3.0) * l_w ** 2
    return datafiles.constant("dedx_constant_K") / (4.0 * math.pi) * medium.z_over_a * alpha * np.maximum(term, 0.0)


def muon_collision_stopping(p, z: int, medium):
    """a(E) of a muon, MeV cm2/g: the Bethe equation with the spin-1/2 term, plus bremsstrahlung on atomic
    electrons (Groom, Mokhov & Striganov 2001, Sec. 2)."""
    mu = datafiles.constant("muon_mass")
    return bethe_stopping(p, mu, z, medium, spin_half=True) + muon_electron_bremsstrahlung(p, medium)


def electron_collision_stopping(p, medium, positron: bool = False):
    """Collision stopping power of electrons or positrons, MeV cm2/g.

    Rohrlich & Carlson, Phys. Rev. 93 (1954) 38, in the form of ICRU Report 37 (1984), Eqs. 2.3-2.5:
        S_col/rho = (K/2) <Z/A> (1/beta^2) [ ln(tau^2 (tau + 2) / (2 (I/m_e c^2)^2)) + F(tau) - delta ]
        F-(tau) = 1 - beta^2 + [tau^2/8 - (2 tau + 1) ln 2] / (tau + 1)^2
        F+(tau) = 2 ln 2 - (beta^2/12) [23 + 14/(tau+2) + 10/(tau+2)^2 + 4/(tau+2)^3]
    tau = T / m_e c^2. Valid above about 10 keV (ICRU 37: shell corrections neglected).
    """
    me = electron_mass()
    p = np.asarray(p, dtype=float)
    bg = p / me
    beta = beta_of(bg)
    b2 = beta ** 2
    tau = gamma_of(bg) - 1.0
    i_rel = medium.i_ev * 1e-6 / me
    if positron:
        y = tau + 2.0
        f = 2.0 * math.log(2.0) - b2 / 12.0 * (23.0 + 14.0 / y + 10.0 / y ** 2 + 4.0 / y ** 3)
    else:
        f = 1.0 - b2 + (tau ** 2 / 8.0 - (2.0 * tau + 1.0) * math.log(2.0)) / (tau + 1.0) ** 2
    bracket = np.log(tau ** 2 * (tau + 2.0) / (2.0 * i_rel ** 2)) + f - density_correction(bg, medium)
    return 0.5 * datafiles.constant("dedx_constant_K") * medium.z_over_a / b2 * bracket


def electron_radiative_stopping(p, medium, positron: bool = False):
    """Radiative (bremsstrahlung) stopping power of electrons or positrons, MeV cm2/g, at momenta p (MeV/c):
    the bremsstrahlung cross section integrated over the photon energy, for nuclei and atomic electrons
    (refgen.physics.bremsstrahlung: Koch & Motz 3BN with the Elwert factor at low energy, Tsai's screened form
    with the Coulomb correction at high energy, joined between 2 and 50 MeV; positrons by the ratio of Kim et
    al. 1986). Accuracy measured in tests/physics/test_stopping.py."""
    t = kinetic_energy(p, electron_mass())
    return radiative_stopping(t, medium.Z, medium.A, medium.w, positron)


def mass_stopping_power(p, mass: float, z: int, medium, x0_g_cm2: float | None = None) -> dict:
    """Collision, radiative and total mass stopping power (MeV cm2/g) of any species at momenta p.

    Electrons and positrons (|z| = 1, electron mass): Rohrlich-Carlson plus bremsstrahlung. Muons: a(E) of
    muon_collision_stopping plus b(E) E (refgen.physics.muon). Other species: the Bethe equation; their radiative losses
    are smaller than the muon's by (m_mu/M)^2 and are not included (radiative column zero). ``x0_g_cm2`` is
    no longer used (the radiative stopping comes from the cross section, not from X0) and is accepted so that
    existing callers keep working.
    """
    p = np.asarray(p, dtype=float)
    if abs(mass - electron_mass()) < 1e-6:
        col = electron_collision_stopping(p, medium, positron=z > 0)
        rad = electron_radiative_stopping(p, medium, positron=z > 0)
    elif abs(mass - datafiles.constant("muon_mass")) < 1e-6:
        col = muon_collision_stopping(p, z, medium)
        rad = muon_radiative_stopping(p, medium.Z, medium.A, medium.w)
    else:
        col = bethe_stopping(p, mass, z, medium)
        rad = np.zeros_like(col)
    return {"collision": col, "radiative": rad, "total": col + rad}
