"""The density-effect correction delta(beta gamma) to the Bethe equation.

For every material, Sternheimer's oscillator method (R. M. Sternheimer, Phys. Rev. 88 (1952) 851; Sternheimer,
Berger & Seltzer, At. Data Nucl. Data Tables 30 (1984) 261, Sec. 2): each atomic subshell i is an oscillator with
the fraction f_i of all electrons and the binding energy E_i; conductors have a free-electron fraction f_c. The
binding energies are scaled by the factor rho_s that reproduces the mean excitation energy I:
    ln I = sum_i f_i ln sqrt((rho_s E_i)^2 + (2/3) f_i (hbar omega_p)^2) + f_c ln(hbar omega_p sqrt(f_c)),
then with nu_i = rho_s E_i / hbar omega_p and l_i^2 = nu_i^2 + (2/3) f_i (l_c^2 = f_c), L(beta gamma) solves
    sum_i f_i / (nu_i^2 + L^2) + f_c / L^2 = 1 / (beta gamma)^2
and  delta = sum_i f_i ln(1 + L^2 / l_i^2) + f_c ln(1 + L^2 / f_c) - L^2 / (1 + (beta gamma)^2).
(For an insulator there is no root below beta gamma_0 = (sum_i f_i / nu_i^2)^-1/2, and delta = 0 there.)
The relation is tabulated once per material on a grid in L and interpolated in ln(beta gamma); above the grid
delta follows its asymptote 2 ln(beta gamma) + const. With free-atom subshell data it reproduces the 1984
tables to a few hundredths in delta (tests/physics/test_stopping.py measures it for every tabulated material).

Where the material matches an entry of the 1984 table, the tabulated fit is used instead, in
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
GENERAL_RULES_MIN_SPAN = 2.0  # x1 - x0 where the condensed rules would give x0 >= x1 (the gas table's smallest span)


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
    # a condensed material of low density (an aerogel, a foam) can give x0 >= x1 from the condensed rules,
    # where delta would jump; the gas rules' separation x1 - x0 >= 2 is kept instead
    if x0 >= x1:
        x1 = x0 + GENERAL_RULES_MIN_SPAN
    k = 3.0
    a = (cbar - 2.0 * LN10 * x0) / (x1 - x0) ** k
    return {"cbar": cbar, "x0": x0, "x1": x1, "a": a, "k": k, "delta0": 0.0}


def oscillator_strengths(Z, A, w, conductor: bool, shells) -> tuple[np.ndarray, np.ndarray, float]:
    """(f_i, E_i in eV, f_c) of a material from its elements (Z, A, mass fractions w) and subshell data.

    ``shells[Z - 1]`` gives the electrons and binding energies of the subshells of element Z in the order of
    the ground-state configuration, and its conduction electrons. Each element's subshells are weighted by
    w_j / A_j (electrons per gram), so that sum_i f_i + f_c = 1. For a conductor (a single metallic element in
    condensed form) the conduction electrons are removed from its outermost subshells and counted in f_c.
    """
    f, e = [], []
    f_c = 0.0
    weights = np.asarray(w, dtype=float) / np.asarray(A, dtype=float)
    for zj, wj in zip(Z, weights):
        shell = shells[int(zj) - 1]
        occ = list(shell["electrons"])
        if conductor:
            free = float(shell["conduction_electrons"])
            f_c += wj * free
            for i in reversed(range(len(occ))):
                take = min(occ[i], free)
                occ[i] -= take
                free -= take
        f.extend(wj * n for n in occ)
        e.extend(shell["binding_eV"])
    f, e = np.asarray(f), np.asarray(e)
    total = f.sum() + f_c
    keep = f > 0
    return f[keep] / total, e[keep], f_c / total


def oscillator_adjustment(f, e_ev, f_c: float, i_ev: float, plasma_ev: float) -> float:
    """Sternheimer's adjustment factor rho_s that makes the oscillators reproduce ln I (Sternheimer et al. 1984,
    Eq. 4); the right-hand side rises monotonically with rho_s. Raises ValueError if I is below what the
    plasma term alone gives."""
    from scipy.optimize import brentq

    base = f_c * math.log(plasma_ev * math.sqrt(f_c)) if f_c > 0 else 0.0
    osc = 2.0 / 3.0 * f * plasma_ev ** 2

    def g(ln_rho):
        return float(np.sum(f * 0.5 * np.log((math.exp(ln_rho) * e_ev) ** 2 + osc))) + base - math.log(i_ev)

    return math.exp(brentq(g, -30.0, 30.0, xtol=1e-12))


DELTA_GRID_L = np.geomspace(1e-4, 1e6, 1200)  # the grid in L on which the oscillator delta is tabulated


def sternheimer_oscillators(f, e_ev, f_c: float, i_ev: float, plasma_ev: float) -> tuple:
    """(f_i, nu_i, l_i) of every oscillator of a material, energies in units of hbar omega_p (Sternheimer, Berger
    & Seltzer 1984, Eqs. 4-7): nu_i = rho_s E_i / hbar omega_p and l_i = sqrt(nu_i^2 + (2/3) f_i) for the bound
    subshells; conduction electrons are one more oscillator with nu = 0 and l = sqrt(f_c). So
    sum_i f_i ln(l_i hbar omega_p) = ln I. Raises ValueError where oscillator_adjustment does."""
    rho = oscillator_adjustment(f, e_ev, f_c, i_ev, plasma_ev)
    f = np.asarray(f, dtype=float)
    nu = rho * np.asarray(e_ev, dtype=float) / plasma_ev
    l = np.sqrt(nu * nu + 2.0 / 3.0 * f)
    if f_c > 0:
        return np.append(f, f_c), np.append(nu, 0.0), np.append(l, math.sqrt(f_c))
    return f, nu, l


def oscillator_delta_table(oscillators) -> tuple[np.ndarray, np.ndarray]:
    """(ln beta gamma, delta) of Sternheimer's oscillator model on the grid DELTA_GRID_L from the oscillators
    (f_i, nu_i, l_i) of sternheimer_oscillators (see the module docstring for the equations). Rows where beta
    gamma is not yet defined (insulators below L = 0) are absent."""
    f, nu, l = oscillators
    big_l2 = DELTA_GRID_L[:, None] ** 2
    bg2 = 1.0 / np.sum(f / (nu * nu + big_l2), axis=1)
    delta = np.sum(f * np.log1p(big_l2 / (l * l)), axis=1) - big_l2[:, 0] / (1.0 + bg2)
    return 0.5 * np.log(bg2), np.maximum(delta, 0.0)


def tabulated_delta(bg, table: tuple[np.ndarray, np.ndarray]):
    """delta(beta gamma) from an (ln beta gamma, delta) table: linear in ln(beta gamma) within it, zero below,
    and the asymptote delta -> 2 ln(beta gamma) + const above it."""
    x = np.log(np.asarray(bg, dtype=float))
    lbg, d = table
    out = np.interp(x, lbg, d, left=0.0)
    return np.where(x > lbg[-1], d[-1] + 2.0 * (x - lbg[-1]), out)


def density_correction(bg, medium):
    """delta(beta gamma) of a Medium: its oscillator table, or the tabulated 1984 parameters."""
    if medium.delta_table is not None:
        return tabulated_delta(bg, medium.delta_table)
    return sternheimer_delta(bg, **medium.de)
