"""Pair production in the field of a free electron (triplet production), gamma + e- -> e- e- e+, from the
lowest-order QED amplitude, integrated numerically over the three-body phase space.

The eight Feynman graphs of Borsellino (Nuovo Cimento 4 (1947) 112) and Votruba (Phys. Rev. 73 (1948) 1468;
the complete lowest-order calculation also of Haug, Z. Naturforsch. 30a (1975) 1099 and Mork, Phys. Rev. 160
(1967) 1065): the pair produced by the photon in the field of the target electron (two graphs), the photon
absorbed by the target electron, which radiates the pair (two "gamma-e" graphs), and the same four with the two
final electrons exchanged (Fermi statistics, relative sign -1). No screening, no binding, no radiative
corrections: the target is a free electron at rest. Natural units with m_e = 1 inside the module; the result is
returned in units of alpha r_e^2 (cross section per electron), a function of k = E / m_e c^2 alone, from the
threshold k = 4 up. Checked by the tests against the high-energy limit of Borsellino and Ghizzetti,
alpha r_e^2 [(28/9) ln 2k - 218/27], and by gauge invariance of the amplitude.

This is slow (seconds per energy); refgen uses the table tools/make_triplet_table.py writes from it.
"""
from __future__ import annotations

import math

import numpy as np

TABLE_NODES = (24, 32, 24, 12)  # quadrature nodes of the table: within 0.05 % of twice as many (k = 4.5-2000)
TABLE_K = (4.02, 4.05, 4.1, 4.2, 4.35, 4.5, 4.75, 5.0, 5.5, 6.0, 7.0, 8.0, 10.0, 12.5, 16.0, 20.0, 25.0, 32.0, 40.0,
           50.0, 65.0, 80.0, 100.0, 130.0, 160.0, 200.0, 300.0, 500.0, 1000.0, 2000.0, 5000.0, 1e4, 2e4, 5e4, 1e5,
           2e5)  # photon energies of the table, units of m_e c^2 (threshold 4 to 100 GeV)
METRIC = np.array([1.0, -1.0, -1.0, -1.0])
_SIGMA = np.array([[[0, 1], [1, 0]], [[0, -1j], [1j, 0]], [[1, 0], [0, -1]]], dtype=complex)
_I2, _Z2 = np.eye(2, dtype=complex), np.zeros((2, 2), dtype=complex)
GAMMA = np.array([np.block([[_I2, _Z2], [_Z2, -_I2]])]
                 + [np.block([[_Z2, s], [-s, _Z2]]) for s in _SIGMA])  # Dirac representation, gamma^mu


def slash(p):
    """p-slash = gamma^mu p_mu for four-vectors p (..., 4) -> (..., 4, 4)."""
    return np.einsum("...m,mab->...ab", np.asarray(p) * METRIC, GAMMA)


def propagator(p):
    """Electron propagator (p-slash + 1) / (p^2 - 1), m_e = 1."""
    p2 = minkowski(p, p)
    return (slash(p) + np.eye(4)) / (p2 - 1.0)[..., None, None]


def minkowski(a, b):
    return np.sum(np.asarray(a) * np.asarray(b) * METRIC, axis=-1)


def _spinors(p, positron: bool):
    """Dirac spinors u(p, s) (or v(p, s)) for the two spin states, (N, 2, 4), normalised to u-bar u = 2 m."""
    e = p[:, 0]
    sp = np.einsum("ni,iab->nab", p[:, 1:], _SIGMA)  # sigma . p
    root = np.sqrt(e + 1.0)[:, None, None]
    big = np.broadcast_to(_I2, sp.shape) * root
    small = sp / root
    rows = np.concatenate([small, big], axis=1) if positron else np.concatenate([big, small], axis=1)
    return np.transpose(rows, (0, 2, 1))  # (N, s, 4): column s of the 4x2 block is the spinor of spin s


def _bar(u):
    return np.conj(u) @ GAMMA[0]


def _sandwich(left_bar, matrix, right):
    """left-bar matrix right for all spin pairs: (N, s, 4) (N, ..., 4, 4) (N, s', 4) -> (N, ..., s, s')."""
    return np.einsum("nsa,n...ab,ntb->n...st", left_bar, matrix, right)


def squared_amplitude(k, p1, p2, p3, q, polarisations):
    """Sum over all spins and the given photon polarisations of |M|^2 / e^6, M the eight-graph amplitude.

    k, p1: photon and target electron; p2, p3: final electrons; q: positron; all (N, 4). polarisations:
    (N, npol, 4) four-vectors (transverse ones for the physical sum; k itself tests gauge invariance).
    """
    u1, u2, u3 = _spinors(p1, False), _spinors(p2, False), _spinors(p3, False)
    vq = _spinors(q, True)
    eps_slash = slash(polarisations)  # (N, npol, 4, 4)
    g_low = GAMMA * METRIC[:, None, None]  # gamma_mu
    s_k_plus_p1 = propagator(k + p1)

    def amplitude(a, ua, b, ub):
        """Four graphs with electron a in the pair and electron b as the recoil: (N, pol, s_a, s_q, s_b, s_1)."""
        # photon on the pair line, virtual photon (b - p1) to the target line
        sa = propagator(a - k)[:, None]
        sq = propagator(k - q)[:, None]
        pair_bh = np.stack([eps_slash @ sa @ GAMMA[m] + GAMMA[m] @ sq @ eps_slash for m in range(4)], axis=2)
        j_pair_bh = _sandwich(_bar(ua), pair_bh, vq)  # (N, pol, mu, s_a, s_q)
        j_target = _sandwich(_bar(ub), np.broadcast_to(g_low, (len(k), 4, 4, 4)), u1)  # (N, mu_low, s_b, s_1)
        t = minkowski(b - p1, b - p1)
        m_bh = np.einsum("npmac,nmbd->npacbd", j_pair_bh, j_target) / t[:, None, None, None, None, None]
        # photon on the target line, virtual photon (a + q) makes the pair
        s_cross = propagator(p1 - a - q)[:, None]
        target_c = np.stack([g_low[m] @ s_k_plus_p1[:, None] @ eps_slash + eps_slash @ s_cross @ g_low[m]
                             for m in range(4)], axis=2)
        j_target_c = _sandwich(_bar(ub), target_c, u1)  # (N, pol, mu_low, s_b, s_1)
        j_pair = _sandwich(_bar(ua), np.broadcast_to(GAMMA, (len(k), 4, 4, 4)), vq)  # (N, mu, s_a, s_q)
        w = minkowski(a + q, a + q)
        m_ce = np.einsum("nmac,npmbd->npacbd", j_pair, j_target_c) / w[:, None, None, None, None, None]
        return m_bh + m_ce

    direct = amplitude(p2, u2, p3, u3)  # (N, pol, s2, sq, s3, s1)
    exchange = amplitude(p3, u3, p2, u2)  # (N, pol, s3, sq, s2, s1)
    total = direct - np.transpose(exchange, (0, 1, 4, 3, 2, 5))
    return np.sum(np.abs(total) ** 2, axis=(1, 2, 3, 4, 5))


def _boost(p, beta):
    """Four-vectors p (N, 4) seen from a frame moving with velocity beta (N, 3)."""
    b2 = np.sum(beta * beta, axis=1)
    g = 1.0 / np.sqrt(1.0 - b2)
    bp = np.sum(beta * p[:, 1:], axis=1)
    e = g * (p[:, 0] - bp)
    coef = np.where(b2 > 0, (g - 1.0) * bp / np.where(b2 > 0, b2, 1.0), 0.0) - g * p[:, 0]
    return np.column_stack([e, p[:, 1:] + coef[:, None] * beta])


def _unit(v):
    return v / np.linalg.norm(v, axis=1)[:, None]


def _gauss(n, lo, hi):
    x, w = np.polynomial.legendre.leggauss(n)
    return lo + (hi - lo) * 0.5 * (x + 1.0), (hi - lo) * 0.5 * w


def cross_section(k: float, nodes=(24, 32, 24, 12), gauge_check: bool = False) -> float:
    """Total triplet cross section per free electron at photon energy k (units of m_e c^2), in alpha r_e^2.

    sigma = (1/2!) (1 / 4 k.p1) (1/4) sum |M|^2 dPhi_3, with dPhi_3 = dPhi_2(P -> p2 + X) dM_X^2 / 2 pi
    dPhi_2(X -> p3 + q). Variables: ln(M_X - 2), ln|t| (t = (p1 - p2)^2), the rapidity-like
    ln((E* + p* cos)/(E* - p* cos)) of the electron in the pair rest frame about the photon direction, and its
    azimuth, by Gauss-Legendre quadrature (nodes). The identical electrons are treated by splitting the phase
    space with the weight (1/|t_2|) / (1/|t_2| + 1/|t_3|) (so the recoil-like electron is always the sampled
    one), which replaces the factor 1/2!. With gauge_check the photon polarisation is replaced by k and the
    summed |M|^2 relative to the physical one is returned instead (zero up to rounding).
    """
    if k <= 4.0:
        return 0.0
    n_m, n_t, n_r, n_f = nodes
    s = 1.0 + 2.0 * k
    w_cm = math.sqrt(s)
    m_max = w_cm - 1.0
    zm, wz = _gauss(n_m, math.log((m_max - 2.0) * 1e-5), math.log(m_max - 2.0))
    mx = 2.0 + np.exp(zm)
    wm = wz * np.exp(zm) * 2.0 * mx / (2.0 * math.pi)  # dM_X^2 / 2 pi
    # recoil p2 in the centre-of-mass frame: |t| range for each M_X
    e1 = (s + 1.0) / (2.0 * w_cm)
    kc = (s - 1.0) / (2.0 * w_cm)
    e2 = (s + 1.0 - mx ** 2) / (2.0 * w_cm)
    p2c = np.sqrt(np.maximum(e2 ** 2 - 1.0, 0.0))
    t_lo = 2.0 * (e1 * e2 - kc * p2c) - 2.0
    t_hi = 2.0 * (e1 * e2 + kc * p2c) - 2.0
    xt, wt = np.polynomial.legendre.leggauss(n_t)
    lt = np.log(t_lo)[:, None] + np.log(t_hi / t_lo)[:, None] * 0.5 * (xt[None, :] + 1.0)
    abs_t = np.exp(lt)
    w_t = np.log(t_hi / t_lo)[:, None] * 0.5 * wt[None, :] * abs_t / (16.0 * math.pi * k)  # dPhi_2 with dt
    xr, wr = np.polynomial.legendre.leggauss(n_r)
    phis = (np.arange(n_f) + 0.5) * 2.0 * math.pi / n_f
    # grid (M_X, t, r, phi) flattened
    M = np.broadcast_to(mx[:, None, None, None], (n_m, n_t, n_r, n_f)).ravel()
    T = np.broadcast_to(abs_t[:, :, None, None], (n_m, n_t, n_r, n_f)).ravel()
    XR = np.broadcast_to(xr[None, None, :, None], (n_m, n_t, n_r, n_f)).ravel()
    PH = np.broadcast_to(phis[None, None, None, :], (n_m, n_t, n_r, n_f)).ravel()
    W = (np.broadcast_to(wm[:, None, None, None], (n_m, n_t, n_r, n_f))
         * np.broadcast_to(w_t[:, :, None, None], (n_m, n_t, n_r, n_f))
         * np.broadcast_to(wr[None, None, :, None], (n_m, n_t, n_r, n_f))).ravel() * (2.0 * math.pi / n_f)
    n = M.size
    # lab frame: photon along z, target at rest; the recoil p2 in the x-z plane
    kv = np.column_stack([np.full(n, k), np.zeros(n), np.zeros(n), np.full(n, k)])
    p1 = np.column_stack([np.ones(n), np.zeros((n, 3))])
    e2l = 1.0 + T / 2.0
    p2l = np.sqrt(e2l ** 2 - 1.0)
    cos2 = np.clip(((k + 1.0) * e2l - (s + 1.0 - M ** 2) / 2.0) / (k * p2l), -1.0, 1.0)
    sin2 = np.sqrt(1.0 - cos2 ** 2)
    p2 = np.column_stack([e2l, p2l * sin2, np.zeros(n), p2l * cos2])
    X = kv + p1 - p2
    beta = X[:, 1:] / X[:, 0:1]
    kx = _boost(kv, beta)
    z_axis = _unit(kx[:, 1:])
    x_axis = _unit(np.cross(z_axis, np.array([0.0, 1.0, 0.0])))
    y_axis = np.cross(z_axis, x_axis)
    ex = M / 2.0
    px = np.sqrt(ex ** 2 - 1.0)
    big_l = np.log((ex + px) / (ex - px))
    rho = big_l * XR
    cos3 = ex / px * np.tanh(rho / 2.0)
    w_r = big_l * ex / (2.0 * px) / np.cosh(rho / 2.0) ** 2
    sin3 = np.sqrt(np.maximum(1.0 - cos3 ** 2, 0.0))
    d = (sin3 * np.cos(PH))[:, None] * x_axis + (sin3 * np.sin(PH))[:, None] * y_axis + cos3[:, None] * z_axis
    p3x = np.column_stack([ex, px[:, None] * d])
    qx = np.column_stack([ex, -px[:, None] * d])
    p3 = _boost(p3x, -beta)
    q = _boost(qx, -beta)
    dphi_x = px / (16.0 * math.pi ** 2 * M)  # dPhi_2(X) per solid angle
    weight = W * w_r * dphi_x
    t3 = -minkowski(p3 - p1, p3 - p1)
    split = (1.0 / T) / (1.0 / T + 1.0 / t3)
    pols = np.broadcast_to(np.array([[0.0, 1.0, 0.0, 0.0], [0.0, 0.0, 1.0, 0.0]]), (n, 2, 4))
    total = 0.0
    for chunk in np.array_split(np.arange(n), max(1, n // 20000)):
        args = (kv[chunk], p1[chunk], p2[chunk], p3[chunk], q[chunk])
        msq = squared_amplitude(*args, pols[chunk])
        if gauge_check:
            total += np.sum(squared_amplitude(*args, kv[chunk][:, None, :])) / np.sum(msq)
            continue
        total += np.sum(msq * weight[chunk] * split[chunk])
    if gauge_check:
        return total
    flux_and_average = 1.0 / (4.0 * k) / 4.0
    return float(total * flux_and_average * 64.0 * math.pi ** 3)  # e^6 = (4 pi alpha)^3 -> alpha r_e^2


def borsellino_ghizzetti(k):
    """High-energy limit per free electron, alpha r_e^2 [(28/9) ln 2k - 218/27] (Borsellino 1947; Ghizzetti)."""
    return 28.0 / 9.0 * np.log(2.0 * np.asarray(k, dtype=float)) - 218.0 / 27.0
