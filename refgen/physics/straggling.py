"""Energy-loss fluctuations in thin layers: the Landau-Vavilov most probable energy loss and its width.

Review of Particle Physics 2024, Eq. 34.12 (after Landau 1944 and Vavilov 1957, with the density effect):
    Delta_p = xi [ ln(2 m_e c^2 beta^2 gamma^2 / I) + ln(xi / I) + j - beta^2 - delta(beta gamma) ],
    xi = (K/2) <Z/A> z^2 (x / beta^2)  MeV for x in g/cm2,  j = 0.200,
and the full width at half maximum w = 4 xi (Bichsel). Valid for "thin" layers where xi << W_max
(kappa = xi / W_max < 0.01), i.e. detector layers of silicon and gas; for thick absorbers the distribution
approaches a Gaussian and Delta_p tends to the mean.
"""
from __future__ import annotations

import numpy as np

from .. import datafiles
from .density_effect import density_correction
from .kinematics import beta_of, electron_mass, w_max

LANDAU_J = 0.200


def landau_xi(bg, z: int, medium, areal_density: float):
    """xi = (K/2) <Z/A> z^2 x / beta^2, MeV (x in g/cm2)."""
    beta = beta_of(bg)
    return 0.5 * datafiles.constant("dedx_constant_K") * medium.z_over_a * z ** 2 * areal_density / beta ** 2


def most_probable_loss(bg, z: int, medium, areal_density: float):
    """Landau-Vavilov most probable energy loss Delta_p, MeV, in a layer of areal_density g/cm2."""
    me = electron_mass()
    bg = np.asarray(bg, dtype=float)
    b2 = beta_of(bg) ** 2
    xi = landau_xi(bg, z, medium, areal_density)
    i_mev = medium.i_ev * 1e-6
    return xi * (np.log(2.0 * me * bg ** 2 / i_mev) + np.log(xi / i_mev) + LANDAU_J - b2
                 - density_correction(bg, medium))


def landau_fwhm(bg, z: int, medium, areal_density: float):
    """FWHM of the energy-loss distribution, 4 xi, MeV (Bichsel; RPP 2024 Sec. 34.2.9)."""
    return 4.0 * landau_xi(bg, z, medium, areal_density)


def vavilov_kappa(bg, mass: float, z: int, medium, areal_density: float):
    """kappa = xi / W_max; the Landau form needs kappa below about 0.01."""
    return landau_xi(bg, z, medium, areal_density) / w_max(bg, mass)


def restricted_stopping(bg, mass: float, z: int, medium, t_cut: float):
    """Restricted energy loss (transfers below t_cut, MeV), MeV cm2/g. RPP 2024 Eq. 34.12 (restricted form):
        K z^2 <Z/A> / beta^2 [ 1/2 ln(2 m_e c^2 beta^2 gamma^2 T_up / I^2) - beta^2/2 (1 + T_up/W_max) - delta/2 ],
    T_up = min(t_cut, W_max). Same validity as the Bethe equation."""
    me = electron_mass()
    bg = np.asarray(bg, dtype=float)
    b2 = beta_of(bg) ** 2
    wmax = w_max(bg, mass)
    t_up = np.minimum(t_cut, wmax)
    i_mev = medium.i_ev * 1e-6
    bracket = (0.5 * np.log(2.0 * me * bg ** 2 * t_up / i_mev ** 2) - 0.5 * b2 * (1.0 + t_up / wmax)
               - 0.5 * density_correction(bg, medium))
    return datafiles.constant("dedx_constant_K") * z ** 2 * medium.z_over_a / b2 * bracket
