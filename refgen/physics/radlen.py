"""Radiation length X0 (g/cm2) after Tsai.

Y.-S. Tsai, Rev. Mod. Phys. 46 (1974) 815, as in the Review of Particle Physics 2024, Eqs. 34.26-34.27:
    1/X0 = 4 alpha r_e^2 (N_A / A) { Z^2 [L_rad - f(Z)] + Z L'_rad }
    f(Z) = a^2 [ (1 + a^2)^-1 + 0.20206 - 0.0369 a^2 + 0.0083 a^4 - 0.002 a^6 ],  a = alpha Z
    L_rad = ln(184.15 Z^-1/3), L'_rad = ln(1194 Z^-2/3) for Z > 4; Tsai's Table B.2 values for Z = 1-4.
Compounds and mixtures: 1/X0 = sum_j w_j / X0_j. Accurate to better than 2.5% for all elements
(Tsai; high-energy limit of the bremsstrahlung and pair cross sections).
"""
from __future__ import annotations

import math

import numpy as np

from .. import datafiles

# Tsai (1974), Table B.2: L_rad and L'_rad for the lightest elements.
LIGHT_ELEMENT_L = {1: (5.31, 6.144), 2: (4.79, 5.621), 3: (4.74, 5.805), 4: (4.71, 5.924)}


def coulomb_correction(z):
    """f(Z), Davies-Bethe-Maximon Coulomb correction as parameterised in RPP 2024 Eq. 34.27."""
    a2 = (datafiles.constant("fine_structure") * np.asarray(z, dtype=float)) ** 2
    return a2 * (1.0 / (1.0 + a2) + 0.20206 - 0.0369 * a2 + 0.0083 * a2 ** 2 - 0.002 * a2 ** 3)


def tsai_screening(gamma, eps):
    """Tsai's Thomas-Fermi screening functions phi1, phi2 (nucleus) and psi1, psi2 (atomic electrons) of the
    bremsstrahlung and pair-production cross sections (Tsai 1974, Eqs. 3.38-3.41); gamma and eps are the
    screening variables 100 m_e k / (E E' Z^1/3) and 100 m_e k / (E E' Z^2/3) (for pairs, E and E' the pair
    energies). At gamma, eps -> 0 (complete screening) phi1 = 20.863, psi1 = 28.340."""
    phi1 = 20.863 - 2.0 * np.log(1.0 + (0.55846 * gamma) ** 2) - 4.0 * (1.0 - 0.6 * np.exp(-0.9 * gamma)
                                                                       - 0.4 * np.exp(-1.5 * gamma))
    phi2 = phi1 - 2.0 / 3.0 / (1.0 + 6.5 * gamma + 6.0 * gamma ** 2)
    psi1 = 28.340 - 2.0 * np.log(1.0 + (3.621 * eps) ** 2) - 4.0 * (1.0 - 0.7 * np.exp(-8.0 * eps)
                                                                   - 0.3 * np.exp(-29.2 * eps))
    psi2 = psi1 - 2.0 / 3.0 / (1.0 + 40.0 * eps + 400.0 * eps ** 2)
    return phi1, phi2, psi1, psi2


def radiation_logs(z: int) -> tuple[float, float]:
    """(L_rad, L'_rad) for an element (Tsai 1974)."""
    if z in LIGHT_ELEMENT_L:
        return LIGHT_ELEMENT_L[z]
    return math.log(184.15 * z ** (-1.0 / 3.0)), math.log(1194.0 * z ** (-2.0 / 3.0))


def element_radiation_length(z: int, a: float) -> float:
    """X0 of one element, g/cm2 (Tsai 1974)."""
    alpha = datafiles.constant("fine_structure")
    re = datafiles.constant("classical_electron_radius")
    na = datafiles.constant("avogadro")
    l_rad, l_rad_prime = radiation_logs(z)
    inv = 4.0 * alpha * re ** 2 * na / a * (z ** 2 * (l_rad - float(coulomb_correction(z))) + z * l_rad_prime)
    return 1.0 / inv


def radiation_length(Z, A, w) -> float:
    """X0 of a compound or mixture, g/cm2: 1/X0 = sum_j w_j / X0_j."""
    return 1.0 / sum(wj / element_radiation_length(int(zj), float(aj)) for zj, aj, wj in zip(Z, A, w))
