"""Scintillator light with Birks' law.

J. B. Birks, Proc. Phys. Soc. A64 (1951) 874; Review of Particle Physics 2024, Sec. 35.3 (calorimetry):
    dL/dx = S (dE/dx) / (1 + kB dE/dx)
with S the light yield (photons/MeV) and kB Birks' constant (cm/MeV when dE/dx is in MeV/cm). For a
thin layer crossed at nearly constant dE/dx the light is S Delta E / (1 + kB dE/dx). For a particle that
stops, L(T) = S integral_0^T dE / (1 + kB (dE/dx)(E)); the quenching factor is L / (S T). Valid for
organic scintillators; kB ~ 0.126 mm/MeV for polystyrene- and polyvinyltoluene-based plastics is common
practice (measured values range from about 0.08 to 0.2 mm/MeV).
"""
from __future__ import annotations

import numpy as np
from scipy.integrate import cumulative_trapezoid


def birks_light_thin(light_yield: float, kb_cm_per_mev: float, delta_e_mev, dedx_mev_cm):
    """Photons produced in a thin layer: S Delta E / (1 + kB dE/dx)."""
    return light_yield * np.asarray(delta_e_mev) / (1.0 + kb_cm_per_mev * np.asarray(dedx_mev_cm))


def birks_light_stopping(light_yield: float, kb_cm_per_mev: float, t_grid, dedx_mev_cm):
    """Light L(T) (photons) of a stopping particle at each kinetic energy of t_grid (MeV, rising from ~0).

    dedx_mev_cm: the linear stopping power at t_grid. L(T) = S integral_{t0}^{T} dE / (1 + kB dE/dx),
    plus the first interval taken at the value of its upper end.
    """
    t = np.asarray(t_grid, dtype=float)
    f = 1.0 / (1.0 + kb_cm_per_mev * np.asarray(dedx_mev_cm, dtype=float))
    return light_yield * (t[0] * f[0] + cumulative_trapezoid(f, t, initial=0.0))
