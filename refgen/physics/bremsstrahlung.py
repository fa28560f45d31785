"""Bremsstrahlung of electrons and positrons: the photon spectrum k dsigma/dk and the radiative stopping power.

The radiative stopping power is the cross section itself integrated over the photon energy,
    S_rad/rho = (N_A / A) integral_0^T k dsigma/dk dk    (MeV cm2/g; T kinetic, E0 = T + m_e c^2),
from two forms joined smoothly in ln T between MATCH_LOW_MEV and MATCH_HIGH_MEV, the two regimes that Seltzer &
Berger (Nucl. Instrum. Meth. B 12 (1985) 95) also join:
  - low energy: the Bethe-Heitler Born cross section without screening at arbitrary energy (Koch & Motz, Rev.
    Mod. Phys. 31 (1959) 920, formula 3BN) times the Elwert Coulomb factor (Elwert, Ann. Phys. 34 (1939) 178),
    times the screening reduction of Tsai's Thomas-Fermi form (screened / unscreened);
  - high energy: Tsai's screened form with the intermediate-screening functions phi1, phi2, psi1, psi2 and the
    Coulomb correction f(Z) of Davies, Bethe & Maximon (Tsai, Rev. Mod. Phys. 46 (1974) 815, Eqs. 3.9, 3.38-3.41):
        k dsigma/dk = alpha r_e^2 { (4/3 - 4/3 y + y^2) [Z^2 (phi1 - 4/3 ln Z - 4 f) + Z (psi1 - 8/3 ln Z)]
                      + (2/3) (1 - y) [Z^2 (phi1 - phi2) + Z (psi1 - psi2)] },  y = k / E0.
Electron-electron bremsstrahlung, the Z term: below EE_SEAM_MEV, Z times the energy-loss cross section on a free
electron at rest from the lowest-order QED amplitude of all eight graphs with exchange (Haug, Z. Naturforsch. 30a
(1975) 1099; computed by refgen.physics.ee_bremsstrahlung and tabulated), times the screening factor of Tsai's
electron term (psi1, psi2 screened over unscreened, integrated over k up to the e-e kinematic limit
k_max = m_e c^2 T / (E0 + m_e c^2 - p0 c)); above it Tsai's screened electron term, which the product approaches
(the free e-e value tends to the unscreened Bethe-Heitler value per unit charge). At low energy the e-e value is far
below the electron-nucleus value per unit charge (two identical particles radiate no dipole). Positrons: the
electron result times the ratio of Kim, Pratt, Seltzer & Berger (Phys. Rev. A 33 (1986) 3002) in a published
seven-term fit (from memory); the positron-electron (Bhabha) bremsstrahlung itself is not computed.
Validity: 1 MeV - 10 GeV and above (complete screening). Accuracy measured in tests/physics/test_stopping.py:
light and medium Z within 3 % from 1 MeV; high Z low below a few MeV (the Born-Elwert form misses the exact
partial-wave result there).
"""
from __future__ import annotations

import functools
import math

import numpy as np

from .. import datafiles
from .kinematics import electron_mass
from .photons import seam_weight
from .radlen import coulomb_correction, radiation_logs, tsai_screening

MATCH_LOW_MEV = 2.0  # below: the low-energy (Born-Elwert) form alone
MATCH_HIGH_MEV = 50.0  # above: Tsai's high-energy form alone
EE_SEAM_MEV = (100.0, 1000.0)  # electron term: the free-electron QED table below, Tsai's screened term above
T_GRID_MEV = np.geomspace(1e-2, 1e5, 141)  # kinetic energies at which each element is integrated, then interpolated
_U_NODES, _U_WEIGHTS = np.polynomial.legendre.leggauss(96)


def three_bn(e0, k):
    """Koch & Motz (1959) formula 3BN divided by Z^2 alpha r_e^2: k dsigma/dk of the unscreened Born cross
    section (dimensionless). e0 initial total energy and k photon energy, both in units of m_e c^2."""
    e = e0 - k
    p0 = np.sqrt(e0 * e0 - 1.0)
    p = np.sqrt(np.maximum(e * e - 1.0, 1e-300))
    eps0 = np.log((e0 + p0) / (e0 - p0))
    eps = np.log((e + p) / (e - p))
    big_l = 2.0 * np.log((e0 * e + p0 * p - 1.0) / k)
    pp0 = p * p * p0 * p0
    bracket = (4.0 / 3.0 - 2.0 * e0 * e * (p * p + p0 * p0) / pp0 + eps0 * e / p0 ** 3 + eps * e0 / p ** 3
               - eps * eps0 / (p0 * p)
               + big_l * (8.0 * e0 * e / (3.0 * p0 * p) + k * k * (e0 * e0 * e * e + pp0) / (p0 ** 3 * p ** 3)
                          + k / (2.0 * p0 * p) * (eps0 * (e0 * e + p0 * p0) / p0 ** 3 - eps * (e0 * e + p * p) / p ** 3
                                                  + 2.0 * k * e0 * e / pp0)))
    return p / p0 * bracket


def elwert_factor(e0, k, z: int):
    """Elwert (1939) Coulomb factor (beta0/beta) [1 - exp(-2 pi Z alpha/beta0)] / [1 - exp(-2 pi Z alpha/beta)]."""
    alpha = datafiles.constant("fine_structure")
    e = e0 - k
    b0 = np.sqrt(1.0 - 1.0 / (e0 * e0))
    b = np.sqrt(np.maximum(1.0 - 1.0 / (e * e), 1e-30))
    az = 2.0 * math.pi * z * alpha
    return b0 / b * np.expm1(-az / b0) / np.expm1(-az / b)


def tsai_brackets(e0, k, z: int):
    """Tsai's (1974) Eq. 3.9 brackets without the Coulomb correction: (nucleus per Z^2, electrons per Z, the
    unscreened value of either, and the factor 4/3 - 4/3 y + y^2). For Z <= 4 the Thomas-Fermi constants are
    shifted to Tsai's tabulated complete-screening logarithms (Table B.2) in proportion to the degree of screening
    1 / (1 + x^2), x = 0.55846 gamma (nucleus) or 3.621 eps (electrons), the argument of the logarithm in Tsai's
    Eqs. 3.38-3.41: the full shift at complete screening, none where screening does not act (so that the screening
    factor tends to 1 at low energy). This fade between the two limits Tsai gives is refgen's choice."""
    e = e0 - k
    y = k / e0
    gamma = 100.0 * k / (e0 * e * z ** (1.0 / 3.0))
    eps = 100.0 * k / (e0 * e * z ** (2.0 / 3.0))
    phi1, phi2, psi1, psi2 = tsai_screening(gamma, eps)
    lnz = math.log(z)
    dphi = dpsi = 0.0
    if z <= 4:
        l_rad, l_rad_prime = radiation_logs(z)
        dphi = 4.0 * (l_rad - (math.log(184.15) - lnz / 3.0)) / (1.0 + (0.55846 * gamma) ** 2)
        dpsi = 4.0 * (l_rad_prime - (math.log(1194.0) - 2.0 * lnz / 3.0)) / (1.0 + (3.621 * eps) ** 2)
    a1 = 4.0 / 3.0 - 4.0 / 3.0 * y + y * y
    a2 = 2.0 / 3.0 * (1.0 - y)
    nucleus = a1 * (phi1 + dphi - 4.0 / 3.0 * lnz) + a2 * (phi1 - phi2)
    electrons = a1 * (psi1 + dpsi - 8.0 / 3.0 * lnz) + a2 * (psi1 - psi2)
    unscreened = 4.0 * a1 * (np.log(2.0 * e0 * e / k) - 0.5)
    return nucleus, electrons, unscreened, a1


@functools.cache
def _free_electron_interpolator():
    from scipy.interpolate import CubicSpline
    t, phi = (np.asarray(v) for v in datafiles.ee_bremsstrahlung_free_electron())
    return CubicSpline(np.log(t), np.log(phi))


def free_electron_energy_loss(t_mev):
    """Radiative energy-loss cross section of electron-electron bremsstrahlung per free electron at rest,
    integral k dsigma, in units of alpha r_e^2 m_e c^2, at kinetic energies t_mev (MeV, 10 keV - 1 GeV).

    The lowest-order QED result of all eight graphs with exchange (Haug, Z. Naturforsch. 30a (1975) 1099),
    integrated numerically by refgen.physics.ee_bremsstrahlung and tabulated in ee_bremsstrahlung_free_electron.csv;
    interpolated by a cubic spline in (ln T, ln phi), clamped to the table's range (leaving one row out, the spline
    reproduces it within 0.011 %). No screening, binding or Coulomb correction."""
    t, _ = datafiles.ee_bremsstrahlung_free_electron()
    x = np.log(np.clip(np.asarray(t_mev, dtype=float) / electron_mass(), t[0], t[-1]))
    return np.exp(_free_electron_interpolator()(x))


def _photon_energy_integrals(t, z: int):
    """The k-integrals (units alpha r_e^2 m_e c^2, t = T / m_e c^2 an array) of the nucleus term in its two forms,
    low (Koch-Motz 3BN, Elwert factor, screening ratio) and high (Tsai with the Coulomb correction), and of Tsai's
    screened electron term."""
    e0 = (t + 1.0)[:, None]
    k = t[:, None] * 0.5 * (_U_NODES + 1.0)[None, :]
    wk = t[:, None] * 0.5 * _U_WEIGHTS[None, :]
    nucleus, electrons, unscreened, a1 = tsai_brackets(e0, k, z)
    high = z * z * np.sum(wk * np.maximum(nucleus - 4.0 * float(coulomb_correction(z)) * a1, 0.0), axis=1)
    low = z * z * np.sum(wk * three_bn(e0, k) * elwert_factor(e0, k, z) * np.clip(nucleus / unscreened, 0.0, 1.0),
                         axis=1)
    return low, high, z * np.sum(wk * np.maximum(electrons, 0.0), axis=1)


def nucleus_form_ratio(t_mev, z: int):
    """Low-energy over high-energy form of the nucleus term's energy-loss integral at kinetic energies t_mev:
    how far the two forms that the seam MATCH_LOW_MEV - MATCH_HIGH_MEV joins disagree (methods.csv states it as
    the uncertainty of high-Z values inside the seam)."""
    low, high, _ = _photon_energy_integrals(np.atleast_1d(np.asarray(t_mev, dtype=float)) / electron_mass(), z)
    return low / high


def element_radiative_stopping(t_mev, z: int, a: float):
    """Radiative stopping power of electrons in element Z, MeV cm2/g, at kinetic energies t_mev (array):
    N_A/A times the photon-energy integral of k dsigma/dk (Gauss-Legendre, 96 nodes in k/T).

    Nucleus (Z^2) term: Koch-Motz 3BN with the Elwert factor and the screening ratio below MATCH_LOW_MEV, Tsai with
    the Coulomb correction above MATCH_HIGH_MEV. Electron (Z) term: Z times the free-electron QED energy-loss cross
    section (free_electron_energy_loss) times the screening factor of Tsai's electron term (screened / unscreened,
    integrated over k up to the e-e kinematic limit), joined across EE_SEAM_MEV to Tsai's screened electron term."""
    me = electron_mass()
    alpha = datafiles.constant("fine_structure")
    re = datafiles.constant("classical_electron_radius")
    t = np.atleast_1d(np.asarray(t_mev, dtype=float)) / me
    e0 = (t + 1.0)[:, None]
    u = 0.5 * (_U_NODES + 1.0)
    nucleus_low, nucleus_high, electrons_high = _photon_energy_integrals(t, z)
    # screening factor of the electron term: Tsai's screened over unscreened, up to the e-e kinematic limit k_max
    p0 = np.sqrt(e0 * e0 - 1.0)
    k_ee = (e0 - 1.0) / (e0 + 1.0 - p0) * u[None, :]
    _, electrons_ee, unscreened_ee, _ = tsai_brackets(e0, k_ee, z)
    screening = np.clip(np.sum(_U_WEIGHTS * np.maximum(electrons_ee, 0.0), axis=1)
                        / np.sum(_U_WEIGHTS * unscreened_ee, axis=1), 0.0, 1.0)
    electrons_low = z * free_electron_energy_loss(t * me) * screening
    s_nucleus = seam_weight(t * me, (MATCH_LOW_MEV, MATCH_HIGH_MEV))
    s_electrons = seam_weight(t * me, EE_SEAM_MEV)
    integral = ((1.0 - s_nucleus) * nucleus_low + s_nucleus * nucleus_high
                + (1.0 - s_electrons) * electrons_low + s_electrons * electrons_high)
    return datafiles.constant("avogadro") / a * alpha * re ** 2 * me * integral


@functools.lru_cache(maxsize=256)
def element_radiative_table(z: int, a: float) -> np.ndarray:
    """element_radiative_stopping on T_GRID_MEV, computed once per element."""
    return element_radiative_stopping(T_GRID_MEV, z, a)


def positron_ratio(t_mev, z: int):
    """Ratio of positron to electron radiative stopping (Kim, Pratt, Seltzer & Berger, Phys. Rev. A 33 (1986)
    3002, in a published seven-term fit; from memory): 1 - exp(-sum_n c_n x^n), x = ln(1 + 1e6 T/(Z^2 m_e c^2)).
    About 0.5 for lead at 1 MeV, tending to 1 at high energy."""
    x = np.log1p(1e6 * np.asarray(t_mev, dtype=float) / (z * z * electron_mass()))
    c = (1.2359e-1, -6.1274e-2, 3.1516e-2, -7.7446e-3, 1.0595e-3, -7.0568e-5, 1.8080e-6)
    poly = sum(cn * x ** (n + 1) for n, cn in enumerate(c))
    return -np.expm1(-poly)


def radiative_stopping(t_mev, Z, A, w, positron: bool = False):
    """Radiative stopping power of electrons (or positrons) in a compound or mixture, MeV cm2/g, at kinetic
    energies t_mev: the mass-fraction sum of the element values, interpolated in ln T from T_GRID_MEV
    (10 keV - 100 GeV; above it S_rad grows in proportion to E0, complete screening)."""
    me = electron_mass()
    t = np.asarray(t_mev, dtype=float)
    lt = np.log(np.clip(t, T_GRID_MEV[0], T_GRID_MEV[-1]))
    lg = np.log(T_GRID_MEV)
    out = np.zeros(np.shape(t))
    for zj, aj, wj in zip(Z, A, w):
        s = np.exp(np.interp(lt, lg, np.log(element_radiative_table(int(zj), float(aj)))))
        if positron:
            s = s * positron_ratio(t, int(zj))
        out = out + wj * s
    return out * np.where(t > T_GRID_MEV[-1], (t + me) / (T_GRID_MEV[-1] + me), 1.0)
