"""Radiative energy loss of muons at high energy: <dE/dx> = a(E) + b(E) E.

b(E) = b_brems + b_pair + b_nucl, in g^-1 cm2, with b_i(E) = (N_A / A) integral nu dsigma_i/dnu dnu:
  - bremsstrahlung: Kelner, Kokoulin & Petrukhin's form of the Petrukhin & Shestakov (1968) cross section
    with the nuclear form factor D_n = 1.54 A^0.27, as given in Groom, Mokhov & Striganov, At. Data Nucl.
    Data Tables 78 (2001) 183, Sec. 4.1; atomic electrons by Z^2 -> Z(Z + 1) (approximate).
  - e+e- pair production: Kokoulin & Petrukhin (1971) double-differential cross section with the atomic-
    electron term Z^2 -> Z(Z + 1), as given in Groom et al. (2001) Sec. 4.2, and a Coulomb correction on the
    nucleus (pair_cross_section); integrated numerically in nu and rho (Gauss-Legendre).
  - photonuclear: the Bezrukov & Bugaev (1981) cross section with the photon-nucleon cross section
    sigma_gammaN(eps) = 114.3 + 1.647 ln^2(0.0213 eps/GeV) microbarn and nuclear shadowing G(x), as given in
    Groom et al. (2001), Sec. 4.3 (from memory); it rises slowly with energy.
a(E) is the collision loss of refgen.physics.stopping.muon_collision_stopping: the Bethe equation with the
spin-1/2 term and bremsstrahlung on atomic electrons (Groom et al. 2001, Sec. 2). Validity: E >~ 1 GeV
(radiative terms negligible below); accuracy of b a few percent for brems and pairs. The muon critical energy is where a(E) = b(E) E.
"""
from __future__ import annotations

import functools
import math

import numpy as np

from .. import datafiles
from .kinematics import electron_mass
from .radlen import coulomb_correction

SQRT_E = math.sqrt(math.e)
B_SCREEN = 183.0
PHOTONUCLEAR_MIN_EPS = 200.0  # MeV: smallest photon energy of the Bezrukov-Bugaev integral (Groom et al. 2001)
_NU_NODES, _NU_WEIGHTS = np.polynomial.legendre.leggauss(48)
_RHO_NODES, _RHO_WEIGHTS = np.polynomial.legendre.leggauss(16)


def _muon_mass() -> float:
    return datafiles.constant("muon_mass")


def brems_cross_section(e, nu, z: int, a: float):
    """nu dsigma/dnu for muon bremsstrahlung on an atom, cm2 (E total energy in MeV, nu = energy fraction)."""
    me, mu = electron_mass(), _muon_mass()
    alpha = datafiles.constant("fine_structure")
    re = datafiles.constant("classical_electron_radius")
    delta = mu ** 2 * nu / (2.0 * e * (1.0 - nu))
    z13 = z ** (-1.0 / 3.0)
    dn = 1.54 * a ** 0.27
    phi = (np.log(B_SCREEN * mu * z13 / me / (1.0 + delta * SQRT_E * B_SCREEN * z13 / me))
           - np.log(dn / (1.0 + delta * (dn * SQRT_E - 2.0) / mu)))
    phi = np.maximum(phi, 0.0)
    return alpha * (2.0 * re * me / mu) ** 2 * z * (z + 1) * (4.0 / 3.0 * (1.0 - nu) + nu ** 2) * phi


def pair_cross_section(e, nu, rho, z: int):
    """nu d2sigma/(dnu drho) for direct e+e- pair production by a muon, cm2 (Kokoulin & Petrukhin 1971).

    Coulomb correction on the nucleus: the Davies-Bethe-Maximon f(Z) of refgen.physics.radlen is subtracted
    from the electron-pair logarithm L_e of the Z^2 term, as in photon pair production; the Coulomb
    correction to all orders in Z alpha lowers muon pair production on heavy nuclei (Ivanov, Kuraev, Schiller
    & Serbo, Phys. Lett. B 442 (1998) 453). The atomic electrons' Z term keeps the Born form.
    """
    me, mu = electron_mass(), _muon_mass()
    alpha = datafiles.constant("fine_structure")
    re = datafiles.constant("classical_electron_radius")
    z13 = z ** (1.0 / 3.0)
    r2 = rho ** 2
    beta = nu ** 2 / (2.0 * (1.0 - nu))
    xi = (mu * nu / (2.0 * me)) ** 2 * (1.0 - r2) / (1.0 - nu)
    y_e = (5.0 - r2 + 4.0 * beta * (1.0 + r2)) / (2.0 * (1.0 + 3.0 * beta) * np.log(3.0 + 1.0 / xi) - r2
                                                   - 2.0 * beta * (2.0 - r2))
    y_mu = (4.0 + r2 + 3.0 * beta * (1.0 + r2)) / ((1.0 + r2) * (1.5 + 2.0 * beta) * np.log(3.0 + xi) + 1.0 - 1.5 * r2)
    common = 2.0 * me * SQRT_E * B_SCREEN / z13 / (e * nu * (1.0 - r2))
    l_e = (np.log(B_SCREEN / z13 * np.sqrt((1.0 + xi) * (1.0 + y_e)) / (1.0 + common * (1.0 + xi) * (1.0 + y_e)))
           - 0.5 * np.log(1.0 + (1.5 * me / mu * z13) ** 2 * (1.0 + xi) * (1.0 + y_e)))
    l_mu = (np.log(mu / me * B_SCREEN / z13 * np.sqrt((1.0 + 1.0 / xi) * (1.0 + y_mu))
                   / (1.0 + common * (1.0 + xi) * (1.0 + y_mu)))
            - np.log(1.5 * z13 * np.sqrt((1.0 + 1.0 / xi) * (1.0 + y_mu))))
    shape_e = (((2.0 + r2) * (1.0 + beta) + xi * (3.0 + r2)) * np.log(1.0 + 1.0 / xi)
               + (1.0 - r2 - beta) / (1.0 + xi) - (3.0 + r2))
    phi_mu = (((1.0 + r2) * (1.0 + 1.5 * beta) - (1.0 + 2.0 * beta) * (1.0 - r2) / xi) * np.log(1.0 + xi)
              + xi * (1.0 - r2 - beta) / (1.0 + xi) + (1.0 + 2.0 * beta) * (1.0 - r2)) * l_mu
    muon_term = (me / mu) ** 2 * np.maximum(phi_mu, 0.0)
    nucleus = np.maximum(shape_e * (l_e - float(coulomb_correction(z))), 0.0) + muon_term
    electrons = np.maximum(shape_e * l_e, 0.0) + muon_term
    return 2.0 / (3.0 * math.pi) * (z * z * nucleus + z * electrons) * (alpha * re) ** 2 * (1.0 - nu)


def photonuclear_cross_section(e, nu, a: float):
    """nu dsigma/dnu for photonuclear interaction of a muon of total energy e (MeV), cm2 (Bezrukov & Bugaev,
    Sov. J. Nucl. Phys. 33 (1981) 635, as in Groom et al. 2001, Eq. 4.x; from memory):
        dsigma/dnu = (alpha/2pi) A sigma_gN(nu E) nu { 0.75 G(x) [kappa ln(1 + m1^2/t) - kappa m1^2/(m1^2 + t)
                     - 2 m_mu^2/t] + 0.25 [kappa ln(1 + m2^2/t) - 2 m_mu^2/t]
                     + (m_mu^2 / 2t) [0.75 G(x) m1^2/(m1^2 + t) + 0.25 (m2^2/t) ln(1 + t/m2^2)] }
    t = m_mu^2 nu^2/(1 - nu), kappa = 1 - 2/nu + 2/nu^2, m1^2 = 0.54 GeV^2, m2^2 = 1.8 GeV^2,
    G(x) = (3/x^3) (x^2/2 - 1 + e^-x (1 + x)), x = 0.00282 A^(1/3) sigma_gN / microbarn."""
    alpha = datafiles.constant("fine_structure")
    mu2 = (_muon_mass() * 1e-3) ** 2  # GeV^2
    eps_gev = nu * e * 1e-3
    sigma_ub = 114.3 + 1.647 * np.log(0.0213 * eps_gev) ** 2
    x = 0.00282 * a ** (1.0 / 3.0) * sigma_ub
    g = 3.0 / x ** 3 * (0.5 * x ** 2 - 1.0 + np.exp(-x) * (1.0 + x))
    m1, m2 = 0.54, 1.80
    t = mu2 * nu ** 2 / (1.0 - nu)
    kappa = 1.0 - 2.0 / nu + 2.0 / nu ** 2
    bracket = (0.75 * g * (kappa * np.log1p(m1 / t) - kappa * m1 / (m1 + t) - 2.0 * mu2 / t)
               + 0.25 * (kappa * np.log1p(m2 / t) - 2.0 * mu2 / t)
               + mu2 / (2.0 * t) * (0.75 * g * m1 / (m1 + t) + 0.25 * m2 / t * np.log1p(t / m2)))
    return alpha / (2.0 * math.pi) * a * sigma_ub * 1e-30 * nu * nu * bracket


def _log_gauss(lo, hi):
    """Gauss-Legendre nodes and weights in ln(nu) between lo and hi (arrays of shape (n,)): shape (n, 48)."""
    llo, lhi = np.log(lo)[:, None], np.log(hi)[:, None]
    x = 0.5 * (lhi - llo) * _NU_NODES[None, :] + 0.5 * (lhi + llo)
    return np.exp(x), 0.5 * (lhi - llo) * _NU_WEIGHTS[None, :]


B_GRID_MEV = np.geomspace(1e3, 1e8, 101)  # muon total energies at which b(E) is integrated, then interpolated


def element_b_at(e, z: int, a: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(b_brems, b_pair, b_nucl), g^-1 cm2, for one element at muon total energies e (MeV, array): the integrals
    N_A/A int nu dsigma/dnu dnu by Gauss-Legendre in ln nu (48 nodes) and, for pairs, in ln(1 - rho) over the
    symmetric rho range (16 nodes); converged to about 1e-5 relative (checked against 400 x 400 nodes)."""
    me, mu = electron_mass(), _muon_mass()
    na = datafiles.constant("avogadro")
    e = np.asarray(e, dtype=float)
    nu_max = 1.0 - 0.75 * SQRT_E * mu / e * z ** (1.0 / 3.0)
    ok = nu_max > max(1e-6, 0.0)
    b_brems = np.zeros_like(e)
    b_pair = np.zeros_like(e)
    b_nucl = np.zeros_like(e)
    okn = e > 2.0 * PHOTONUCLEAR_MIN_EPS
    if okn.any():
        nu, w = _log_gauss(PHOTONUCLEAR_MIN_EPS / e[okn], 1.0 - mu / e[okn])
        b_nucl[okn] = na / a * np.sum(w * nu * photonuclear_cross_section(e[okn][:, None], nu, a), axis=1)
    if not ok.any():
        return b_brems, b_pair, b_nucl
    ee = e[ok][:, None]
    nu, w = _log_gauss(np.full(ok.sum(), 1e-6), nu_max[ok])
    b_brems[ok] = na / a * np.sum(w * nu * brems_cross_section(ee, nu, z, a), axis=1)
    nu_min = 4.0 * me / e
    okp = nu_max > nu_min
    if okp.any():
        ee = e[okp][:, None]
        nu, w = _log_gauss(nu_min[okp], nu_max[okp])
        rho_max = (1.0 - 6.0 * mu ** 2 / (ee ** 2 * (1.0 - nu))) * np.sqrt(np.clip(1.0 - 4.0 * me / (ee * nu), 0.0, None))
        rho_max = np.clip(rho_max, 0.0, 1.0 - 1e-12)
        # rho from 0 to rho_max through u = ln(1 - rho), which resolves the steep edge at rho_max
        u0 = np.log1p(-rho_max)[..., None]
        u = 0.5 * u0 * (1.0 - _RHO_NODES)
        rho = -np.expm1(u)
        wr = -0.5 * u0 * _RHO_WEIGHTS * np.exp(u)
        inner = 2.0 * np.sum(wr * pair_cross_section(ee[..., None], nu[..., None], rho, z), axis=2)
        b_pair[okp] = na / a * np.sum(w * nu * inner, axis=1)
    return b_brems, b_pair, b_nucl


@functools.lru_cache(maxsize=256)
def element_b_table(z: int, a: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """b_brems, b_pair and b_nucl of one element on B_GRID_MEV, computed once per element."""
    return element_b_at(B_GRID_MEV, z, a)


def radiative_b(e, Z, A, w) -> dict:
    """b(E) components of a compound (mass-fraction sums), g^-1 cm2, at total energies e (MeV), interpolated
    in ln E from B_GRID_MEV (1 GeV - 100 TeV; b is smooth there, and the interpolation error is below 1e-4)."""
    e = np.atleast_1d(np.asarray(e, dtype=float))
    le = np.log(np.clip(e, B_GRID_MEV[0], B_GRID_MEV[-1]))
    lg = np.log(B_GRID_MEV)
    out = {"brems": np.zeros_like(e), "pair": np.zeros_like(e), "nucl": np.zeros_like(e)}
    for zj, aj, wj in zip(Z, A, w):
        bb, bp, bn = element_b_table(int(zj), float(aj))
        out["brems"] += wj * np.interp(le, lg, bb)
        out["pair"] += wj * np.interp(le, lg, bp)
        out["nucl"] += wj * np.interp(le, lg, bn)
    out["total"] = out["brems"] + out["pair"] + out["nucl"]
    return out


def muon_critical_energy(collision_of_e, Z, A, w) -> float:
    """E_muc (MeV, total energy) where the collision loss a(E) equals the radiative loss b(E) E.

    ``collision_of_e`` returns a(E) in MeV cm2/g at total energies E (MeV). Solved in ln E between 10 GeV
    and 100 TeV (Review of Particle Physics 2024, Sec. 34.6, defines E_muc this way).
    """
    from scipy.optimize import brentq

    def f(le):
        e = math.exp(le)
        return float(collision_of_e(e)) - float(radiative_b(e, Z, A, w)["total"][0]) * e

    return math.exp(brentq(f, math.log(1e4), math.log(1e8), xtol=1e-6))


RADIATIVE_MIN_E = 1e3  # MeV: below 1 GeV the radiative terms are below 0.1% of a(E) and are set to zero


def muon_radiative_stopping(p, Z, A, w):
    """b(E) E, MeV cm2/g, at muon momenta p (MeV/c); zero below RADIATIVE_MIN_E."""
    mu = _muon_mass()
    e = np.sqrt(np.asarray(p, dtype=float) ** 2 + mu ** 2)
    return np.where(e >= RADIATIVE_MIN_E, radiative_b(e, Z, A, w)["total"].reshape(e.shape) * e, 0.0)
