"""Tree-level QED amplitude shared by the three-body processes refgen integrates from the Feynman graphs: two
fermion lines that exchange one virtual photon, with one real photon attached to either line (four graphs).

The Dirac algebra (matrices, spinors, propagators), the Lorentz boosts and quadrature nodes of the two
integrations live here too. The four-graph amplitude: every external
fermion is given as a spinor with its four-momentum, and the real photon's momentum is counted as *outgoing*, so
that each crossing of the same graphs uses it unchanged:
  - triplet production gamma + e- -> e- e- e+: photon momentum -k, the positron line's incoming fermion is v(q)
    with momentum -q;
  - electron-electron bremsstrahlung e- e- -> e- e- gamma (refgen.physics.ee_bremsstrahlung): photon momentum
    +k, all four fermions u spinors.
Feynman rules of lowest-order QED (the graphs as drawn by Haug, Z. Naturforsch. 30a (1975) 1099); natural units
with m_e = 1. The amplitude is returned divided by e^3, up to a common phase.
"""
from __future__ import annotations

import numpy as np

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
    """Minkowski product a.b of four-vectors (..., 4), metric (+, -, -, -)."""
    return np.sum(np.asarray(a) * np.asarray(b) * METRIC, axis=-1)


def spinors(p, positron: bool):
    """Dirac spinors u(p, s) (or v(p, s)) for the two spin states, (N, 2, 4), normalised to u-bar u = 2 m."""
    e = p[:, 0]
    sp = np.einsum("ni,iab->nab", p[:, 1:], _SIGMA)  # sigma . p
    root = np.sqrt(e + 1.0)[:, None, None]
    big = np.broadcast_to(_I2, sp.shape) * root
    small = sp / root
    rows = np.concatenate([small, big], axis=1) if positron else np.concatenate([big, small], axis=1)
    return np.transpose(rows, (0, 2, 1))  # (N, s, 4): column s of the 4x2 block is the spinor of spin s


def bar(u):
    """Dirac adjoint u-bar = u^dagger gamma^0 of spinors (..., 4)."""
    return np.conj(u) @ GAMMA[0]


def sandwich(left_bar, matrix, right):
    """left-bar matrix right for all spin pairs: (N, s, 4) (N, ..., 4, 4) (N, s', 4) -> (N, ..., s, s')."""
    return np.einsum("nsa,n...ab,ntb->n...st", left_bar, matrix, right)


def boost(p, beta):
    """Four-vectors p (N, 4) seen from a frame moving with velocity beta (N, 3)."""
    b2 = np.sum(beta * beta, axis=1)
    g = 1.0 / np.sqrt(1.0 - b2)
    bp = np.sum(beta * p[:, 1:], axis=1)
    e = g * (p[:, 0] - bp)
    coef = np.where(b2 > 0, (g - 1.0) * bp / np.where(b2 > 0, b2, 1.0), 0.0) - g * p[:, 0]
    return np.column_stack([e, p[:, 1:] + coef[:, None] * beta])


def unit_vectors(v):
    """Rows of v (N, 3) scaled to unit length."""
    return v / np.linalg.norm(v, axis=1)[:, None]


def gauss_nodes(n, lo, hi):
    """n Gauss-Legendre nodes and weights on [lo, hi]."""
    x, w = np.polynomial.legendre.leggauss(n)
    return lo + (hi - lo) * 0.5 * (x + 1.0), (hi - lo) * 0.5 * w



def transverse_polarisations(k):
    """Two real transverse polarisation four-vectors (0, e1), (0, e2) of photons with four-momenta k (N, 4):
    (N, 2, 4), e1 and e2 orthogonal to each other and to the photon direction."""
    n = np.asarray(k)[:, 1:] / np.linalg.norm(np.asarray(k)[:, 1:], axis=1)[:, None]
    helper = np.where(np.abs(n[:, 2:3]) < 0.9, np.array([0.0, 0.0, 1.0]), np.array([1.0, 0.0, 0.0]))
    e1 = np.cross(n, helper)
    e1 /= np.linalg.norm(e1, axis=1)[:, None]
    e2 = np.cross(n, e1)
    zero = np.zeros((len(n), 1))
    return np.stack([np.hstack([zero, e1]), np.hstack([zero, e2])], axis=1)


def four_graph_amplitude(polarisations, k, line_a, line_b):
    """The four graphs of two fermion lines A (in_a -> out_a) and B (in_b -> out_b) exchanging one virtual photon,
    the real photon (outgoing momentum k, polarisations (N, npol, 4)) emitted by either line before or after the
    exchange:
        M/e^3 = [u-bar_a (eps S(a + k) gamma^mu + gamma^mu S(a_in - k) eps) u_a_in] [u-bar_b gamma_mu u_b_in] / (b - b_in)^2
              + [u-bar_a gamma^mu u_a_in] [u-bar_b (eps S(b + k) gamma_mu + gamma_mu S(b_in - k) eps) u_b_in] / (a - a_in)^2,
    S the electron propagator, eps = eps-slash (real polarisations, so eps* = eps). Each line is a tuple
    (out_spinors, out_momentum, in_spinors, in_momentum) with spinors (N, 2, 4) and momenta (N, 4).
    Returns (N, npol, s_out_a, s_in_a, s_out_b, s_in_b), complex."""
    ua, a, ua_in, a_in = line_a
    ub, b, ub_in, b_in = line_b
    n = len(k)
    eps_slash = slash(polarisations)  # (N, npol, 4, 4)
    g_low = GAMMA * METRIC[:, None, None]  # gamma_mu

    def radiating(spinor_bar, out_p, in_spinor, in_p, gammas):
        after, before = propagator(out_p + k)[:, None], propagator(in_p - k)[:, None]
        vertex = np.stack([eps_slash @ after @ gammas[m] + gammas[m] @ before @ eps_slash for m in range(4)], axis=2)
        return sandwich(spinor_bar, vertex, in_spinor)  # (N, npol, mu, s_out, s_in)

    def plain(spinor_bar, in_spinor, gammas):
        return sandwich(spinor_bar, np.broadcast_to(gammas, (n, 4, 4, 4)), in_spinor)  # (N, mu, s_out, s_in)

    ua_bar, ub_bar = bar(ua), bar(ub)
    t_b = minkowski(b - b_in, b - b_in)[:, None, None, None, None, None]
    t_a = minkowski(a - a_in, a - a_in)[:, None, None, None, None, None]
    a_radiates = np.einsum("npmac,nmbd->npacbd", radiating(ua_bar, a, ua_in, a_in, GAMMA), plain(ub_bar, ub_in, g_low))
    b_radiates = np.einsum("nmac,npmbd->npacbd", plain(ua_bar, ua_in, GAMMA), radiating(ub_bar, b, ub_in, b_in, g_low))
    return a_radiates / t_b + b_radiates / t_a
