"""Multiple Coulomb scattering: Highland's formula for the width of the projected angle distribution.

V. L. Highland, Nucl. Instrum. Meth. 129 (1975) 497, as revised by Lynch & Dahl, Nucl. Instrum. Meth.
B58 (1991) 6; Review of Particle Physics 2024, Eq. 34.16:
    theta0 = (13.6 MeV / (beta c p)) |z| sqrt(x/X0) [1 + 0.038 ln(x z^2 / (X0 beta^2))]
Accurate to 11% or better for 1e-3 < x/X0 < 100 (all singly charged particles and all Z). For several
layers, apply it to the total x/X0 (not in quadrature per layer), as the Review advises.
"""
from __future__ import annotations

import numpy as np

from .kinematics import beta_of

HIGHLAND_MIN_X_X0 = 1e-3
HIGHLAND_MAX_X_X0 = 100.0


def highland_theta0(p, mass: float, z: int, x_over_x0):
    """theta0 (plane), radians, for momentum p (MeV/c) through x/X0 radiation lengths."""
    p = np.asarray(p, dtype=float)
    beta = beta_of(p / mass)
    t = np.asarray(x_over_x0, dtype=float)
    return 13.6 / (beta * p) * abs(z) * np.sqrt(t) * (1.0 + 0.038 * np.log(t * z ** 2 / beta ** 2))


def highland_valid(x_over_x0) -> np.ndarray:
    """True where Highland's formula holds to 11% (1e-3 < x/X0 < 100)."""
    t = np.asarray(x_over_x0, dtype=float)
    return (t > HIGHLAND_MIN_X_X0) & (t < HIGHLAND_MAX_X_X0)
