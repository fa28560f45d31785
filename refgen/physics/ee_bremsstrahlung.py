"""Electron-electron bremsstrahlung e- e- -> e- e- gamma from the lowest-order QED amplitude, integrated
numerically over the three-body phase space: the radiative energy-loss cross section per target electron,
    phi_ee(T) = integral k dsigma (photon energy k in the frame where the target electron is at rest),
for an incident electron of kinetic energy T.

The eight graphs (Haug, Z. Naturforsch. 30a (1975) 1099): each of the two electron lines radiates before or after
the exchange of the virtual photon, and the same four with the two final electrons exchanged (relative sign -1).
The process is the crossing of triplet production; the amplitude is the shared four-graph form of
refgen.physics.qed_tree. No screening, no binding and no Coulomb (Elwert-like) correction: the target is a free
electron at rest. Natural units with m_e = 1 inside the module; phi_ee is returned in units of
alpha r_e^2 m_e c^2, a function of t = T / m_e c^2 alone. Checked by the tests against gauge invariance of the
amplitude and, at high energy, against the extreme-relativistic unscreened Bethe-Heitler energy-loss cross section
per unit charge squared, 4 alpha r_e^2 E0 (ln 2 E0 - 1/3), which the e-e value approaches.

This is slow (seconds per energy); refgen uses the table tools/make_ee_bremsstrahlung_table.py writes from it.
"""
from __future__ import annotations

import math

import numpy as np

from .qed_tree import (boost, four_graph_amplitude, gauss_nodes, minkowski, spinors, transverse_polarisations,
                       unit_vectors)

TABLE_NODES = (16, 16, 16, 24)  # quadrature nodes of the table (see energy_loss_cross_section)
TABLE_T = tuple(float(f"{v:.4g}") for v in np.geomspace(0.02, 2000.0, 41))  # T / m_e c^2: 10 keV - 1 GeV


def squared_amplitude(p0, p1, p2, p3, k, polarisations):
    """Sum over all spins and the given photon polarisations of |M|^2 / e^6, M the eight-graph amplitude of
    e-(p0) e-(p1) -> e-(p2) e-(p3) gamma(k); all momenta (N, 4), polarisations (N, npol, 4) (transverse ones for the
    physical sum; k itself tests gauge invariance)."""
    u0, u1, u2, u3 = (spinors(p, False) for p in (p0, p1, p2, p3))
    direct = four_graph_amplitude(polarisations, k, (u2, p2, u0, p0), (u3, p3, u1, p1))  # (N, pol, s2, s0, s3, s1)
    exchange = four_graph_amplitude(polarisations, k, (u3, p3, u0, p0), (u2, p2, u1, p1))  # (N, pol, s3, s0, s2, s1)
    total = direct - np.transpose(exchange, (0, 1, 4, 3, 2, 5))
    return np.sum(np.abs(total) ** 2, axis=(1, 2, 3, 4, 5))


def _grid(*axes):
    """Flattened outer product of quadrature axes [(values, weights), ...]: a list of value arrays and the product
    of the weights, each (N,)."""
    mesh = np.meshgrid(*[v for v, _ in axes], indexing="ij")
    weights = np.meshgrid(*[w for _, w in axes], indexing="ij")
    return [m.ravel() for m in mesh], np.prod([w.ravel() for w in weights], axis=0)


def _photon_directions(axes, xr, phi):
    """Photon directions in the rest frame of X and their solid-angle weights, by multichannel quadrature.

    Each channel c flattens the collinear peak 1/(1 - beta_c cos theta_c) about the direction of one electron,
    axes[c] (N, 4) in that frame (the incident, the target and the recoil electron): v = ln(1 - beta_c cos theta_c)
    runs between ln(1 - beta_c) and ln(1 + beta_c) at the Gauss-Legendre nodes xr (in [-1, 1]) and the azimuth
    at phi. With the normalised densities rho_c = beta_c / (2 pi L_c (1 - beta_c cos theta_c)),
    L_c = ln((1 + beta_c)/(1 - beta_c)), integral f dOmega = sum_c integral f rho_c / (sum_c' rho_c') dOmega
    = sum_c integral f / (sum_c' rho_c') dv dphi / (2 pi L_c): a node carries 1 / (4 pi sum_c' rho_c') times its
    Gauss-Legendre and azimuth weights. Returns the directions (N C, 3) and those factors (N C,), channel after
    channel (the caller tiles its other arrays C times).
    """
    units = [unit_vectors(p[:, 1:]) for p in axes]
    betas = [np.clip(np.linalg.norm(p[:, 1:], axis=1) / p[:, 0], 1e-12, 1.0 - 1e-15) for p in axes]
    spans = [np.log1p(b) - np.log1p(-b) for b in betas]
    directions, weights = [], []
    for z_axis, b, span in zip(units, betas, spans):
        x_axis = unit_vectors(np.cross(z_axis, np.array([0.0, 1.0, 0.0])))
        y_axis = np.cross(z_axis, x_axis)
        v = np.log1p(-b) + span * 0.5 * (xr + 1.0)
        cos_k = -np.expm1(v) / b
        sin_k = np.sqrt(np.maximum(1.0 - cos_k ** 2, 0.0))
        d = (sin_k * np.cos(phi))[:, None] * x_axis + (sin_k * np.sin(phi))[:, None] * y_axis + cos_k[:, None] * z_axis
        density = sum(bc / (2.0 * math.pi * lc * np.maximum(1.0 - bc * np.sum(d * uc, axis=1), 1e-300))
                      for uc, bc, lc in zip(units, betas, spans))
        directions.append(d)
        weights.append(1.0 / (4.0 * math.pi * density))
    return np.concatenate(directions), np.concatenate(weights)


def energy_loss_cross_section(t: float, nodes=TABLE_NODES, gauge_check: bool = False) -> float:
    """phi_ee = integral k dsigma per free target electron at rest, incident kinetic energy t (units of m_e c^2),
    in alpha r_e^2 m_e c^2. Valid from about 10 keV (below, the Coulomb interaction of the two slow electrons,
    left out here, matters) to the highest energies (no screening: the caller applies it).

    sigma = (1 / 4 p0) (1/4) sum |M|^2 dPhi_3 / 2!, dPhi_3 = dPhi_2(P -> p3 + X) dM_X^2 / 2 pi dPhi_2(X -> p2 + k):
    p3 is the recoil, X the scattered electron with the photon. Variables: ln(M_X - 1), ln|t| (t = (p1 - p3)^2),
    and the photon direction in the rest frame of X by three channels that take out the collinear peaks about the
    incident, target and recoil electrons (_photon_directions); Gauss-Legendre quadrature with `nodes` =
    (M_X, t, angle, azimuth) points, the azimuth by the midpoint rule. The kinematics are built in the
    centre-of-mass frame, where small momentum transfers keep their precision. With TABLE_NODES the result is
    within 0.2 % of runs with twice the nodes in any one variable (checked at T = 2, 20 and 2000 m_e c^2). The identical final electrons are treated by splitting the phase space with the weight
    (1/|t_3|) / (1/|t_3| + 1/|t_2|), which replaces 1/2!. With gauge_check the photon polarisation is replaced by
    k and the summed |M|^2 relative to the physical one is returned instead (zero up to rounding).
    """
    n_m, n_t, n_r, n_f = nodes
    e0 = t + 1.0
    pz0 = math.sqrt(t * (t + 2.0))
    s = 2.0 + 2.0 * e0
    w_cm = math.sqrt(s)
    m_span = w_cm - 2.0  # M_X - 1 runs from 0 to sqrt(s) - 2
    zm, wz = gauss_nodes(n_m, math.log(m_span * 1e-6), math.log(m_span))
    mx = 1.0 + np.exp(zm)
    wm = wz * np.exp(zm) * 2.0 * mx / (2.0 * math.pi)  # dM_X^2 / 2 pi
    # recoil in the centre-of-mass frame: the |t| range for each M_X
    p_cm = math.sqrt(s / 4.0 - 1.0)
    e_rec = (s + 1.0 - mx ** 2) / (2.0 * w_cm)
    p_rec = np.sqrt(np.maximum(e_rec ** 2 - 1.0, 0.0))
    t_hi = 2.0 * (0.5 * w_cm * e_rec + p_cm * p_rec) - 2.0
    t_lo = ((mx ** 2 - 1.0) / w_cm) ** 2 / t_hi  # |t|_lo |t|_hi = 4 (E_1 - E_rec)^2, without the cancellation
    xt, wt = np.polynomial.legendre.leggauss(n_t)
    xr, wr = np.polynomial.legendre.leggauss(n_r)
    (i_m, XT, XR, PH), W = _grid((np.arange(n_m), wm), (xt, wt), (xr, wr),
                                 ((np.arange(n_f) + 0.5) * 2.0 * math.pi / n_f, np.full(n_f, 2.0 * math.pi / n_f)))
    i_m = i_m.astype(int)
    M = mx[i_m]
    span_t = np.log(t_hi / t_lo)[i_m]
    above_lo = np.expm1(span_t * 0.5 * (XT + 1.0))  # (|t| - |t|_lo) / |t|_lo
    T = t_lo[i_m] * (1.0 + above_lo)
    W = W * span_t * 0.5 * T / (16.0 * math.pi * pz0)  # dPhi_2(P -> p3 + X) in dt
    n = M.size
    # centre-of-mass frame (its components are at most sqrt(s)/2, so the small momentum transfers keep their
    # precision): incident electron along +z, target along -z, the recoil p3 in the x-z plane at angle theta to
    # the target's direction, 1 - cos theta = 2 (|t| - |t|_lo) / (|t|_hi - |t|_lo)
    p0 = np.tile([0.5 * w_cm, 0.0, 0.0, p_cm], (n, 1))
    p1 = np.tile([0.5 * w_cm, 0.0, 0.0, -p_cm], (n, 1))
    one_minus_cos = np.clip(2.0 * t_lo[i_m] * above_lo / (t_hi - t_lo)[i_m], 0.0, 2.0)
    sin3 = np.sqrt(one_minus_cos * (2.0 - one_minus_cos))
    pr = p_rec[i_m]
    p3 = np.column_stack([e_rec[i_m], pr * sin3, np.zeros(n), -pr * (1.0 - one_minus_cos)])
    X = p0 + p1 - p3
    beta = X[:, 1:] / X[:, 0:1]
    d, channel_weight = _photon_directions([boost(p, beta) for p in (p0, p1, p3)], XR, PH)
    channels = len(channel_weight) // n
    M, T, W, beta, X, p0, p1, p3 = (np.tile(a, channels) if a.ndim == 1 else np.tile(a, (channels, 1))
                                    for a in (M, T, W, beta, X, p0, p1, p3))
    n = M.size
    W = W * channel_weight
    omega = (M * M - 1.0) / (2.0 * M)
    kx = omega[:, None] * np.column_stack([np.ones(n), d])
    k = boost(kx, -beta)  # centre-of-mass frame
    p2 = X - k
    W = W * omega / (16.0 * math.pi ** 2 * M)  # dPhi_2(X -> p2 + k) per solid angle
    t2 = -minkowski(p2 - p1, p2 - p1)
    split = (1.0 / T) / (1.0 / T + 1.0 / t2)
    total = 0.0
    for chunk in np.array_split(np.arange(n), max(1, n // 20000)):
        args = (p0[chunk], p1[chunk], p2[chunk], p3[chunk], k[chunk])
        msq = squared_amplitude(*args, transverse_polarisations(k[chunk]))
        k_lab = minkowski(k[chunk], p1[chunk])  # photon energy where the target is at rest
        if gauge_check:
            total += np.sum(squared_amplitude(*args, k[chunk][:, None, :])) / np.sum(msq)
            continue
        total += np.sum(msq * W[chunk] * split[chunk] * k_lab)
    if gauge_check:
        return total
    flux_and_average = 1.0 / (4.0 * pz0) / 4.0
    return float(total * flux_and_average * 64.0 * math.pi ** 3)  # e^6 = (4 pi alpha)^3 -> alpha r_e^2


def extreme_relativistic_limit(t):
    """Unscreened Bethe-Heitler energy-loss cross section per unit charge squared at E0 >> m_e c^2,
    4 E0 (ln 2 E0 - 1/3) in alpha r_e^2 m_e c^2 (Bethe & Heitler 1934; Heitler, The Quantum Theory of Radiation,
    3rd ed. (1954) Sec. 25), E0 = t + 1 the total energy in m_e c^2. The e-e value tends to it (Haug 1975)."""
    e0 = np.asarray(t, dtype=float) + 1.0
    return 4.0 * e0 * (np.log(2.0 * e0) - 1.0 / 3.0)
