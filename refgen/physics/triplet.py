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

from .qed_tree import boost, four_graph_amplitude, gauss_nodes, minkowski, spinors, unit_vectors

TABLE_NODES = (24, 32, 24, 12)  # quadrature nodes of the table: within 0.05 % of twice as many (k = 4.5-2000)
TABLE_K = (4.02, 4.05, 4.1, 4.2, 4.35, 4.5, 4.75, 5.0, 5.5, 6.0, 7.0, 8.0, 10.0, 12.5, 16.0, 20.0, 25.0, 32.0, 40.0,
           50.0, 65.0, 80.0, 100.0, 130.0, 160.0, 200.0, 300.0, 500.0, 1000.0, 2000.0, 5000.0, 1e4, 2e4, 5e4, 1e5,
           2e5)  # photon energies of the table, units of m_e c^2 (threshold 4 to 100 GeV)
def squared_amplitude(k, p1, p2, p3, q, polarisations):
    """Sum over all spins and the given photon polarisations of |M|^2 / e^6, M the eight-graph amplitude.

    k, p1: photon and target electron; p2, p3: final electrons; q: positron; all (N, 4). polarisations:
    (N, npol, 4) four-vectors (transverse ones for the physical sum; k itself tests gauge invariance). The four
    graphs with electron a in the pair and electron b as the recoil are refgen.physics.qed_tree's two-line
    amplitude with the pair line (u(a), a; v(q), -q), the target line (u(b), b; u(p1), p1) and the photon
    absorbed (outgoing momentum -k); the exchange graphs swap a and b with a relative sign -1.
    """
    u1, u2, u3 = spinors(p1, False), spinors(p2, False), spinors(p3, False)
    vq = spinors(q, True)
    target = (u1, p1)
    direct = four_graph_amplitude(polarisations, -k, (u2, p2, vq, -q), (u3, p3) + target)  # (N, pol, s2, sq, s3, s1)
    exchange = four_graph_amplitude(polarisations, -k, (u3, p3, vq, -q), (u2, p2) + target)  # (N, pol, s3, sq, s2, s1)
    total = direct - np.transpose(exchange, (0, 1, 4, 3, 2, 5))
    return np.sum(np.abs(total) ** 2, axis=(1, 2, 3, 4, 5))


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
    zm, wz = gauss_nodes(n_m, math.log((m_max - 2.0) * 1e-5), math.log(m_max - 2.0))
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
    kx = boost(kv, beta)
    z_axis = unit_vectors(kx[:, 1:])
    x_axis = unit_vectors(np.cross(z_axis, np.array([0.0, 1.0, 0.0])))
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
    p3 = boost(p3x, -beta)
    q = boost(qx, -beta)
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
