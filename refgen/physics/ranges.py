"""CSDA range R(T) and its inverse, and the momentum needed to reach a depth in a layer stack.

The continuous-slowing-down approximation (ICRU Report 49 (1993), Sec. 2.3):
    R(T) = R(T_low) + integral_{T_low}^{T} dT' / S(T'),  S the mass stopping power (MeV cm2/g).
Low-energy treatment: below T_low (where the Bethe equation stops being valid, beta gamma = 0.05 for heavy
particles; 10 keV for electrons), S is taken as a power law S ~ T^-q with q the local log-slope at T_low,
so R(T_low) = T_low / ((1 + q) S(T_low)). The range is in g/cm2; it is the mean path length, not the
projected depth (detour factor not applied).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.integrate import cumulative_trapezoid


@dataclass(frozen=True)
class RangeTable:
    """Tabulated R(T) for one (material, species): kinetic energies T (MeV) and ranges (g/cm2), both rising."""

    t: np.ndarray
    r: np.ndarray

    def range_of(self, t):
        """R(T), g/cm2, by log-log interpolation (T within the table)."""
        return np.exp(np.interp(np.log(t), np.log(self.t), np.log(self.r)))

    def kinetic_for_range(self, r):
        """T such that R(T) = r, MeV (inverse by log-log interpolation; nan above the table)."""
        r = np.asarray(r, dtype=float)
        out = np.exp(np.interp(np.log(np.maximum(r, self.r[0])), np.log(self.r), np.log(self.t)))
        return np.where(r > self.r[-1], np.nan, out)


def range_table(stopping_of_t, t_low: float, t_high: float, points: int = 600) -> RangeTable:
    """Build R(T) on a log grid from t_low to t_high by integrating 1/S (trapezoid in ln T)."""
    t = np.geomspace(t_low, t_high, points)
    s = stopping_of_t(t)
    q = -np.log(s[1] / s[0]) / np.log(t[1] / t[0])
    q = float(np.clip(q, -0.5, 1.0))
    r0 = t_low / ((1.0 + q) * s[0])
    lnt = np.log(t)
    r = r0 + cumulative_trapezoid(t / s, lnt, initial=0.0)
    return RangeTable(t, r)


def kinetic_to_cross(table: RangeTable, t_exit, areal_density: float):
    """Kinetic energy needed at the entry of a slab of ``areal_density`` (g/cm2) to leave it with ``t_exit``.

    CSDA: R(T_in) = R(T_exit) + x rho; T_exit = 0 means just crossing it. nan (an energy already beyond the
    range tables) stays nan.
    """
    t_exit = np.asarray(t_exit, dtype=float)
    r_exit = np.where(t_exit > table.t[0], table.range_of(np.maximum(t_exit, table.t[0])),
                      np.where(np.isnan(t_exit), np.nan, 0.0))
    return table.kinetic_for_range(r_exit + areal_density)
