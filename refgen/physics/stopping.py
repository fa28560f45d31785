"""Mean energy loss (mass stopping power, MeV cm2/g) of charged particles.

Heavy charged particles: the Bethe equation with the full W_max, the density effect, the shell correction
and the Bloch correction. Electrons and positrons: the Rohrlich-Carlson collision stopping power (ICRU
Report 37) plus the radiative stopping power from the bremsstrahlung cross section. Inputs: momentum p in MeV/c (arrays), mass in MeV/c^2, charge
z in units of e.
"""
from __future__ import annotations

import math

import numpy as np
from scipy.special import digamma, zeta

from .. import datafiles
from .density_effect import density_correction
from .bremsstrahlung import radiative_stopping
from .kinematics import beta_of, electron_mass, gamma_of, kinetic_energy, w_max
from .muon import muon_radiative_stopping

BETHE_VALID_MIN_BG = 0.05  # below this the Bethe equation fails (Review of Particle Physics 2024, Fig. 34.1)
SHELL_FORMULA_MIN_ETA = 0.13  # Barkas-Berger formula is fitted for eta = beta gamma >= 0.13


def shell_correction(bg, i_ev: float):
    """Total shell correction C (dimensionless; the Bethe bracket takes -C/Z).

    Barkas & Berger (1964) empirical formula as given in W. R. Leo, Techniques for Nuclear and Particle
    Physics Experiments (1994), Eq. 2.33:
        C = (0.422377 eta^-2 + 0.0304043 eta^-4 - 0.00038106 eta^-6) 1e-6 I^2
          + (3.858019 eta^-2 - 0.1667989 eta^-4 + 0.00157955 eta^-6) 1e-9 I^3,   I in eV, eta = beta gamma.
    Valid for eta >= 0.13; below that eta is held at 0.13 (the region is flagged as of limited validity).
    """
    eta = np.maximum(np.asarray(bg, dtype=float), SHELL_FORMULA_MIN_ETA)
    e2 = 1.0 / (eta * eta)
    e4 = e2 * e2
    e6 = e4 * e2
    return ((0.422377 * e2 + 0.0304043 * e4 - 0.00038106 * e6) * 1e-6 * i_ev ** 2
            + (3.858019 * e2 - 0.1667989 * e4 + 0.00157955 * e6) * 1e-9 * i_ev ** 3)


_ZETA_ODD = tuple(float(zeta(2 * k + 3)) for k in range(10))  # zeta(3), zeta(5), ... for the Bloch series
BLOCH_SERIES_MAX_Y = 0.3


def bloch_correction(beta, z: int):
    """Bloch correction to the stopping number, -y^2 sum_n 1/(n (n^2 + y^2)) = psi(1) - Re psi(1 + i y),
    y = z alpha / beta (psi the digamma function).

    F. Bloch, Ann. Phys. 16 (1933) 285; Review of Particle Physics 2024, Sec. 34.2.5. Matters for large z
    and small beta; it is added to the Bethe bracket. For y < 0.3 the equivalent power series
    -y^2 sum_k (-1)^k zeta(2k+3) y^(2k) is used (10 terms; truncation below 1e-10 relative there).
    """
    alpha = datafiles.constant("fine_structure")
    y = z * alpha / np.asarray(beta, dtype=float)
    y2 = y * y
    series = np.zeros_like(y2)
    for k in reversed(range(len(_ZETA_ODD))):
        series = _ZETA_ODD[k] - y2 * series
    out = -y2 * series
    big = y >= BLOCH_SERIES_MAX_Y
    if np.any(big):
        out = np.where(big, float(digamma(1.0)) - np.real(digamma(1.0 + 1j * np.where(big, y, 1.0))), out)
    return out


def bethe_stopping(p, mass: float, z: int, medium, spin_half: bool = False):
    """Mean mass stopping power of a heavy charged particle, MeV cm2/g.

    Review of Particle Physics 2024, Eq. 34.5, with W_max of Eq. 34.4:
        -<dE/dx> = K z^2 <Z/A> (1/beta^2) [ 1/2 ln(2 m_e c^2 beta^2 gamma^2 W_max / I^2) - beta^2 - delta/2
                   - C/Z + L_Bloch ]
    K = 0.307075 MeV cm2/mol. Validity: accurate to about 1% for 0.1 <~ beta gamma <~ 1000 for muons to
    alpha particles; below beta gamma ~ 0.05 the equation fails (BETHE_VALID_MIN_BG). The Barkas z^3
    correction is not included (it changes dE/dx by under 1% above beta gamma ~ 0.3). With ``spin_half`` the
    bracket takes the spin-1/2 term + (1/8) (W_max / E)^2 of a point-like Dirac particle of total energy E
    (Groom, Mokhov & Striganov, At. Data Nucl. Data Tables 78 (2001) 183, Eq. 2; used for muons).
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
               - shell_correction(bg, medium.i_ev) / medium.z_eff + bloch_correction(beta, z))
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
