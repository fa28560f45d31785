"""Corrections to the Bethe stopping number of a heavy charged particle that matter at low speed.

The stopping number is L = L0 + z L1 + z^2 L2 (Review of Particle Physics 2024, Sec. 34.2.5): L0 the Bethe
term with the shell correction -C/Z, L1 the Barkas (z^3) term, L2 the Bloch term.

Shell correction: every atomic subshell is a harmonic oscillator, the same oscillators that Sternheimer's
density-effect model uses (refgen.physics.density_effect: fractions f_i and energies hbar omega_i with
sum_i f_i ln hbar omega_i = ln I). The first-Born stopping number of one isotropic harmonic oscillator is known
in closed form (U. Fano, Annu. Rev. Nucl. Sci. 13 (1963) 1; P. Sigmund & U. Haagerup, Phys. Rev. A 34 (1986)
892): with kappa = 2 m v^2 / hbar omega and the n-quantum excitation probability e^-y y^n / n! at momentum
transfer y = hbar q^2 / (2 m omega),
    L_HO(kappa) = (1/2) E1(1/kappa) + sum_{n>=2} Q(n - 1, n^2/kappa) / (2 (n - 1)),
(E1 the exponential integral, Q the regularised upper incomplete gamma function). It tends to
ln kappa - 3/kappa at high speed (the leading shell correction 2<T>/(m v^2) of Fano's expansion with the
oscillator's kinetic energy <T> = 3 hbar omega / 4) and vanishes like e^(-1/kappa) for a shell the projectile is
too slow to excite. The shell correction is C/Z = sum_i f_i [ln kappa_i - L_HO(kappa_i)]; it holds at every
speed where the first-Born picture does, so it is not frozen anywhere.

Barkas term: the harmonic-oscillator model of J. C. Ashley, R. H. Ritchie & W. Brandt, Phys. Rev. B 5 (1972)
2393 and Phys. Rev. A 8 (1973) 2402, L1 = F(b / x^1/2) / (Z^1/2 x^3/2) per element, x = v^2 / (Z v0^2) with
v0 = alpha c, b = 1.8 (their best value), F from `barkas_arb.csv`; compounds by electron-weighted Bragg
additivity.
"""
from __future__ import annotations

import functools
import math

import numpy as np
from scipy.special import digamma, exp1, gammaincc, zeta

from .. import datafiles

KAPPA_GRID = np.geomspace(1e-2, 2e3, 601)  # where L_HO is tabulated; below it L_HO < 1e-40, above the asymptote
ARB_B = 1.8  # Ashley, Ritchie & Brandt (1972): the minimum impact parameter in units of the oscillator amplitude
# Lindhard & Scharff, K. Dan. Vidensk. Selsk. Mat. Fys. Medd. 27, no. 15 (1953): the Bethe logarithm with its
# corrections describes stopping for x = v^2 / (Z v0^2) >~ 1; below it the stopping number turns over to the
# low-speed regime L ~ x^1/2 that the Bethe equation does not contain.
BETHE_REGIME_MIN_X = 1.0
BETHE_VALID_MIN_BG = 0.05  # below this the Bethe equation fails for any material (Review of Particle Physics 2024, Fig. 34.1)


def _oscillator_stopping_number_direct(kappa: float) -> float:
    """L_HO(kappa) by direct summation (see the module docstring); terms beyond n = 4 kappa + 60 are below 1e-12."""
    n = np.arange(2, int(4.0 * kappa) + 60)
    return float(0.5 * exp1(1.0 / kappa) + np.sum(gammaincc(n - 1, n * n / kappa) / (2.0 * (n - 1))))


@functools.cache
def _oscillator_table() -> np.ndarray:
    """L_HO(kappa) - ln kappa on KAPPA_GRID (computed once)."""
    return np.array([_oscillator_stopping_number_direct(k) for k in KAPPA_GRID]) - np.log(KAPPA_GRID)


def oscillator_stopping_number(kappa):
    """First-Born stopping number L_HO(kappa) of an isotropic harmonic oscillator, kappa = 2 m v^2 / hbar omega
    (Fano 1963; Sigmund & Haagerup 1986). Interpolated in ln kappa from an exact table; 0 below kappa = 0.01
    (under 1e-40 there) and ln kappa - 3/kappa above kappa = 2000 (within 1e-6). Valid for any kappa > 0."""
    k = np.asarray(kappa, dtype=float)
    lk = np.log(k)
    table = np.interp(lk, np.log(KAPPA_GRID), _oscillator_table())
    out = np.where(k > KAPPA_GRID[-1], lk - 3.0 / k, lk + table)
    return np.where(k < KAPPA_GRID[0], 0.0, out)


def shell_correction(beta, oscillators) -> np.ndarray:
    """Shell correction C/Z (dimensionless; the Bethe bracket takes -C/Z) at speeds beta, from the material's
    subshell oscillators ``(f_i, hbar omega_i in eV)``: C/Z = sum_i f_i [ln kappa_i - L_HO(kappa_i)],
    kappa_i = 2 m_e c^2 beta^2 / hbar omega_i (see the module docstring). Positive at high speed (falls as
    1/beta^2); it can turn negative at low speed, where the inner shells that the Bethe logarithm counts with a
    negative weight no longer take part."""
    f, hw = (np.asarray(a, dtype=float) for a in oscillators)
    b2 = np.asarray(beta, dtype=float)[..., None] ** 2
    kappa = 2.0e6 * datafiles.constant("electron_mass") * b2 / hw
    return np.sum(f * (np.log(kappa) - oscillator_stopping_number(kappa)), axis=-1)


@functools.cache
def _arb_function() -> tuple[np.ndarray, np.ndarray]:
    """(ln y, ln F) of the Ashley-Ritchie-Brandt function from barkas_arb.csv."""
    rows = datafiles.barkas_function()
    return np.log([r[0] for r in rows]), np.log([r[1] for r in rows])


def barkas_correction(beta, Z, A, w) -> np.ndarray:
    """Barkas term L1 (dimensionless; the bracket takes + z L1, so it raises the loss of positive particles and
    lowers that of negative ones) for a material of elements Z, A with mass fractions w.

    Ashley, Ritchie & Brandt, Phys. Rev. B 5 (1972) 2393: L1 = F(b/x^1/2) / (Z^1/2 x^3/2), x = (beta/alpha)^2 / Z,
    b = 1.8; F interpolated log-log in its table (held at the table's end values outside y = 0.02-10, where
    the term is below 1e-4 of L for y < 0.02). Elements are combined with their electron fractions. Valid for
    x >~ 1 (BETHE_REGIME_MIN_X); it falls as beta^-3 and is under 1 % of L above a few MeV per nucleon.
    """
    alpha = datafiles.constant("fine_structure")
    z = np.asarray(Z, dtype=float)
    electrons = np.asarray(w, dtype=float) * z / np.asarray(A, dtype=float)
    electrons = electrons / electrons.sum()
    x = (np.asarray(beta, dtype=float)[..., None] / alpha) ** 2 / z
    ly, lf = _arb_function()
    f = np.exp(np.interp(np.log(ARB_B / np.sqrt(x)), ly, lf))
    return np.sum(electrons * f / (np.sqrt(z) * x ** 1.5), axis=-1)


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


def bethe_regime_min_beta_gamma(Z) -> float:
    """beta gamma below which the Bethe equation with these corrections no longer describes the stopping of a
    material with elements Z: x = v^2 / (Z v0^2) = 1 for its heaviest element (Lindhard & Scharff 1953), and
    not below beta gamma = 0.05 (Review of Particle Physics 2024, Fig. 34.1)."""
    beta = datafiles.constant("fine_structure") * math.sqrt(BETHE_REGIME_MIN_X * max(Z))
    return max(BETHE_VALID_MIN_BG, beta / math.sqrt(1.0 - beta * beta))
