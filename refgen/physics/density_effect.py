"""The density-effect correction delta(beta gamma) to the Bethe equation.

Sternheimer's parameterisation (Sternheimer, Berger & Seltzer, At. Data Nucl. Data Tables 30 (1984) 261;
Review of Particle Physics 2024, Eq. 34.7):
    delta = 2 ln10 x - Cbar                       for x >= x1
          = 2 ln10 x - Cbar + a (x1 - x)^k         for x0 <= x < x1
          = delta0 10^(2 (x - x0))                 for x < x0 (conductors; 0 for insulators)
with x = log10(beta gamma). Where the 1984 table has no entry for a material, the general rules of
Sternheimer & Peierls, Phys. Rev. B 3 (1971) 3681, give Cbar, x0, x1, a and k = 3 from I and the plasma
energy, separately for condensed media and gases. Valid at all beta gamma (the correction vanishes at low
beta gamma); the general rules are accurate to a few percent in delta.
"""
from __future__ import annotations

import math

import numpy as np

LN10 = math.log(10.0)


def sternheimer_delta(bg, cbar: float, x0: float, x1: float, a: float, k: float, delta0: float = 0.0):
    """delta(beta gamma) from Sternheimer's parameters (dimensionless)."""
    shape = np.shape(bg)
    x = np.log10(np.asarray(bg, dtype=float).reshape(-1))
    out = 2.0 * LN10 * x - cbar
    mid = (x >= x0) & (x < x1)
    out[mid] += a * (x1 - x[mid]) ** k
    low = x < x0
    out[low] = delta0 * 10.0 ** (2.0 * (x[low] - x0)) if delta0 else 0.0
    return out.reshape(shape)


def sternheimer_peierls_parameters(i_ev: float, plasma_ev: float, gas: bool) -> dict:
    """Cbar, x0, x1, a, k, delta0 by the Sternheimer-Peierls (1971) general rules.

    Cbar = 2 ln(I / hbar omega_p) + 1; x0 and x1 from Cbar (and I for condensed media); k = 3 and a chosen
    so that the two branches meet at x0.
    """
    cbar = 2.0 * math.log(i_ev / plasma_ev) + 1.0
    if gas:
        table = [(10.0, 1.6, 4.0), (10.5, 1.7, 4.0), (11.0, 1.8, 4.0), (11.5, 1.9, 4.0), (12.25, 2.0, 4.0),
                 (13.804, 2.0, 5.0)]
        for limit, x0, x1 in table:
            if cbar < limit:
                break
        else:
            x0, x1 = 0.326 * cbar - 2.5, 5.0
    elif i_ev < 100.0:
        x1 = 2.0
        x0 = 0.2 if cbar < 3.681 else 0.326 * cbar - 1.0
    else:
        x1 = 3.0
        x0 = 0.2 if cbar < 5.215 else 0.326 * cbar - 1.5
    k = 3.0
    a = (cbar - 2.0 * LN10 * x0) / (x1 - x0) ** k
    return {"cbar": cbar, "x0": x0, "x1": x1, "a": a, "k": k, "delta0": 0.0}
