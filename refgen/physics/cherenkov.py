"""Cherenkov radiation: refractive index with dispersion, thresholds, angles and the Frank-Tamm yield.

Review of Particle Physics 2024, Sec. 34.7:
    cos theta_c = 1 / (n beta);  threshold beta_t = 1/n, i.e. p_t = M / sqrt(n^2 - 1);
    d2N / (dx dE) = (alpha z^2 / (hbar c)) (1 - 1/(beta^2 n^2(E))) = 369.81 z^2 (1 - 1/(beta^2 n^2)) / (eV cm)
(Frank & Tamm 1937). The yield is integrated over the photon band where beta n(E) > 1. Refractive index:
a constant, a Sellmeier form n^2 = 1 + sum_i B_i l^2 / (l^2 - C_i) (l in um, C_i in um^2), or a table
n(l) interpolated linearly in wavelength. For gases, (n - 1) scales with density (Gladstone-Dale), i.e. with
P/T at fixed composition. Photon energy and wavelength: l[nm] = 1239.84198 / E[eV].
"""
from __future__ import annotations

import numpy as np

from .. import datafiles

HC_EV_NM = 1239.84198  # h c in eV nm (CODATA 2018)


def wavelength_nm(e_ev):
    return HC_EV_NM / np.asarray(e_ev, dtype=float)


def refractive_index(index, e_ev, density_ratio: float = 1.0):
    """n at photon energies e_ev (eV) for a model.RefractiveIndex; (n - 1) scaled by density_ratio."""
    e = np.asarray(e_ev, dtype=float)
    if index.kind == "constant":
        n = np.full_like(e, index.value)
    elif index.kind == "sellmeier":
        l2 = (wavelength_nm(e) * 1e-3) ** 2
        n = np.sqrt(1.0 + sum(b * l2 / (l2 - c) for b, c in zip(index.b, index.c)))
    else:
        n = np.interp(wavelength_nm(e), index.wavelengths_nm, index.values)
    return 1.0 + (n - 1.0) * density_ratio


def threshold_momentum(mass: float, n):
    """p_t = M / sqrt(n^2 - 1), MeV/c."""
    n = np.asarray(n, dtype=float)
    return mass / np.sqrt(n ** 2 - 1.0)


def cherenkov_angle(p, mass: float, n):
    """theta_c (rad) = arccos(1/(n beta)); nan below threshold."""
    p = np.asarray(p, dtype=float)
    beta = p / np.sqrt(p ** 2 + mass ** 2)
    c = 1.0 / (np.asarray(n, dtype=float) * beta)
    return np.where(c <= 1.0, np.arccos(np.minimum(c, 1.0)), np.nan)


def saturated_angle(n):
    """theta_c for beta -> 1, rad."""
    return np.arccos(1.0 / np.asarray(n, dtype=float))


def photons_per_cm(beta, z: int, band_ev: tuple[float, float], index_of_e, points: int = 400):
    """Frank-Tamm photon yield per cm (photons/cm) over the band, with dispersion n(E) from index_of_e.

    integral over E of 369.81 z^2 max(0, 1 - 1/(beta^2 n(E)^2)) dE, E in eV (trapezoid on a uniform grid).
    """
    e = np.linspace(band_ev[0], band_ev[1], points)
    n = index_of_e(e)
    beta = np.atleast_1d(np.asarray(beta, dtype=float))[:, None]
    integrand = np.clip(1.0 - 1.0 / (beta ** 2 * n[None, :] ** 2), 0.0, None)
    return datafiles.constant("frank_tamm_per_eV_cm") * z ** 2 * np.trapezoid(integrand, e, axis=1)


def frank_tamm_constant() -> float:
    """alpha / (hbar c) in 1/(eV cm), from CODATA constants (checks the tabulated 369.81)."""
    return datafiles.constant("fine_structure") / (datafiles.constant("hbar_c") * 1e6)
