"""Relativistic kinematics shared by every physics module (momenta MeV/c, masses MeV/c^2, energies MeV)."""
from __future__ import annotations

import numpy as np

from .. import datafiles


def electron_mass() -> float:
    """m_e c^2 in MeV (CODATA 2018)."""
    return datafiles.constant("electron_mass")


def beta_gamma(p, mass):
    """beta*gamma = p / (M c)."""
    return np.asarray(p, dtype=float) / mass


def gamma_of(bg):
    return np.sqrt(1.0 + np.asarray(bg, dtype=float) ** 2)


def beta_of(bg):
    bg = np.asarray(bg, dtype=float)
    return bg / np.sqrt(1.0 + bg ** 2)


def kinetic_energy(p, mass):
    """T = sqrt(p^2 + M^2) - M, MeV, computed without cancellation at small p."""
    p = np.asarray(p, dtype=float)
    return p ** 2 / (np.sqrt(p ** 2 + mass ** 2) + mass)


def momentum_of_kinetic(t, mass):
    """p = sqrt(T^2 + 2 T M), MeV/c."""
    t = np.asarray(t, dtype=float)
    return np.sqrt(t * (t + 2.0 * mass))


def w_max(bg, mass, gamma=None):
    """Maximum energy transfer to a free electron in one collision, MeV.

    W_max = 2 m_e c^2 (beta gamma)^2 / (1 + 2 gamma m_e/M + (m_e/M)^2)
    (Review of Particle Physics 2024, Eq. 34.4), with the full m_e/M terms. ``gamma`` may be passed when the
    caller has it already.
    """
    me = electron_mass()
    bg = np.asarray(bg, dtype=float)
    r = me / mass
    g = gamma_of(bg) if gamma is None else gamma
    return 2.0 * me * bg * bg / (1.0 + 2.0 * g * r + r * r)
