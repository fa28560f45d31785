"""Track-parameter resolution of a layer stack: a linear least-squares fit with the full hit covariance.

Geometry. The track leaves the origin along the stack axis z (cm) and is measured in the bending direction y at
the planes z_i with point resolutions sigma_i (cm). A uniform field B (T) perpendicular to the stack axis fills
the regions [a_r, b_r]. In the small-angle limit the trajectory is linear in its parameters
    y(z) = y0 + t0 z + kappa k_B J(z),    J(z) = integral_0^z dz' integral_0^z' B(u) du   (T cm^2),
with y0 the position and t0 the slope at the origin, kappa = q/p in units of e per GeV/c, and
k_B = c * 1e-9 / 100 = 2.998e-3 cm^-1 T^-1 (GeV/c) (the curvature 1/R = 0.2998 B / p per metre). The double
integral is evaluated in closed form for piecewise-constant fields, so the model is exact for any spacing and
any field layout (small angles, no energy loss).

Hit covariance. V = diag(sigma_i^2) + V_ms, where a scatterer k spread uniformly over [s_k, e_k] with the
projected-angle variance theta_k^2 contributes (continuous scattering inside the slab)
    V_ms[i, j] += theta_k^2 / (e_k - s_k) * integral_{s_k}^{min(e_k, z_i, z_j)} (z_i - s)(z_j - s) ds,
and a thin scatterer (e_k = s_k) theta_k^2 (z_i - s_k)(z_j - s_k) for s_k < min(z_i, z_j).
Gluckstern, Nucl. Instrum. Meth. 24 (1963) 381 (measurement and scattering errors of a least-squares fit);
Review of Particle Physics 2024, Sec. 34.3 (multiple scattering: the correlated angle and displacement).

Fit. With the design matrix H (columns 1, z_i and, with a field, q k_B J(z_i)) the parameter covariance of the
generalised least-squares fit is C = (H^T V^-1 H)^-1 (Gauss-Markov: the minimum-variance linear estimator, the
same as a Kalman filter over the same hits). sigma(p)/p = p sigma(kappa) / |q|.

Units: z, sigma in cm; B in T; p in GeV/c; angles in rad.
"""
from __future__ import annotations

import numpy as np
from scipy.constants import c as SPEED_OF_LIGHT

CURVATURE_CONSTANT = SPEED_OF_LIGHT * 1e-9 / 100.0  # cm^-1 per (T / (GeV/c)): 1/R = k_B B / p


def field_double_integral(z, starts, ends, strengths):
    """J(z) = integral_0^z integral_0^z' B(u) du dz' for uniform regions [start_r, end_r] of strength B_r.

    z : array | cm; starts, ends : cm; strengths : T. Returns T cm^2. For one region the integrand of the outer
    integral is B (z' - a) inside it and B (b - a) beyond it, so J = B (z - a)^2 / 2 inside and
    B (b - a) (z - (a + b) / 2) beyond (exact).
    """
    z = np.asarray(z, dtype=float)[..., None]
    a, b, field = (np.asarray(v, dtype=float) for v in (starts, ends, strengths))
    inside = np.clip(z, a, b) - a
    beyond = np.clip(z - b, 0.0, None)
    return np.sum(field * (0.5 * inside ** 2 + (b - a) * beyond), axis=-1)


def scattering_covariance(z, starts, ends, variances):
    """V_ms[i, j] (cm^2): the displacement covariance at the planes z (cm) from scatterers k spread uniformly over
    [starts_k, ends_k] (cm) with projected-angle variances ``variances`` (rad^2) each. Only the material between
    the origin and a plane moves the track there.

    With d_i = z_i - s_k and w = clip(min(e_k, z_i, z_j) - s_k, 0, e_k - s_k) the slab integral is
    d_i d_j w - (d_i + d_j) w^2 / 2 + w^3 / 3, divided by the slab length (continuous scattering); a slab of
    zero length is a thin scatterer. Highland-type widths are added in variance (Review of Particle Physics
    2024, Sec. 34.3).
    """
    z = np.asarray(z, dtype=float)
    s, e, var = (np.asarray(v, dtype=float)[:, None, None] for v in (starts, ends, variances))
    zi, zj = z[None, :, None], z[None, None, :]
    length = e - s
    reach = np.minimum(np.minimum(zi, zj), e)
    w = np.clip(reach - s, 0.0, None)
    di, dj = zi - s, zj - s
    integral = di * dj * w - (di + dj) * w ** 2 / 2 + w ** 3 / 3
    thin = length <= 0
    per_slab = np.where(thin, np.where(np.minimum(zi, zj) > s, di * dj, 0.0),
                        integral / np.where(thin, 1.0, length))
    return np.sum(var * per_slab, axis=0)


def design_matrix(z, bend=None):
    """H with the columns 1, z and (with a field) the bending column q k_B J(z) (cm per unit kappa, GeV/c)."""
    z = np.asarray(z, dtype=float)
    cols = [np.ones_like(z), z]
    if bend is not None:
        cols.append(np.asarray(bend, dtype=float))
    return np.stack(cols, axis=-1)


def parameters_measurable(h, rtol: float = 1e-9) -> bool:
    """True when the planes determine every fit parameter (the columns of H are independent)."""
    h = np.asarray(h, dtype=float)
    if h.shape[0] < h.shape[1]:
        return False
    scaled = h / np.maximum(np.abs(h).max(axis=0), 1e-300)
    sv = np.linalg.svd(scaled, compute_uv=False)
    return bool(sv[-1] > rtol * sv[0])


def fit_covariance(h, v):
    """C = (H^T V^-1 H)^-1 of the generalised least-squares fit (Gauss-Markov), batched over V's leading axes.

    h : (N, P); v : (..., N, N) positive definite. Returns (..., P, P) in the units of the parameters.
    """
    h = np.asarray(h, dtype=float)
    v = np.asarray(v, dtype=float)
    vinv_h = np.linalg.solve(v, np.broadcast_to(h, v.shape[:-1] + h.shape[-1:]))
    fisher = np.swapaxes(vinv_h, -1, -2) @ h
    return np.linalg.inv(fisher)


def scattering_limited_covariance(h, v_ms):
    """The fit covariance with scattering errors only (perfect planes): the limit of ``fit_covariance`` as the
    point resolutions go to zero. A plane before all material has zero variance; a diagonal of 1e-12 of the
    largest variance stands in for it (its effect on C is of that relative order)."""
    v_ms = np.asarray(v_ms, dtype=float)
    scale = float(np.max(np.diag(v_ms))) if v_ms.size else 0.0
    if scale <= 0.0:
        return np.zeros((h.shape[1], h.shape[1]))
    return fit_covariance(h, v_ms + 1e-12 * scale * np.eye(v_ms.shape[0]))


def gluckstern_curvature_sigma(sigma: float, length: float, n: int):
    """sigma(1/R) (1/cm) of N >= 3 equally spaced planes over the length L (cm), each with point resolution
    sigma (cm), in a uniform field, no material:
        sigma(1/R) = (sigma / L^2) sqrt(720 (N-1)^3 / ((N-2) N (N+1) (N+2))).
    Gluckstern, Nucl. Instrum. Meth. 24 (1963) 381; the familiar 720/(N+4) is its large-N form.
    """
    n = np.asarray(n, dtype=float)
    return sigma / length ** 2 * np.sqrt(720.0 * (n - 1) ** 3 / ((n - 2) * n * (n + 1) * (n + 2)))


def continuous_scattering_curvature_sigma(theta0_per_sqrt_cm, length: float, weighting: str = "optimal"):
    """Scattering-limited sigma(1/R) (1/cm) over a track length L (cm) in uniform material, many planes:
    sigma(1/R) = theta_s sqrt(C / L), theta_s^2 the projected-angle variance per cm.

    C = 1.43 for an equally weighted fit (Gluckstern 1963; Review of Particle Physics 2024, Sec. 35, the
    0.016 GeV/c = 0.0136 sqrt(1.43) coefficient, from memory); C = 1 for the full-covariance fit, which in the
    continuum limit estimates the constant drift kappa of the angle, a random walk of variance theta_s^2 L.
    """
    coefficient = {"optimal": 1.0, "equal": 1.43}[weighting]
    return np.asarray(theta0_per_sqrt_cm, dtype=float) * np.sqrt(coefficient / length)
