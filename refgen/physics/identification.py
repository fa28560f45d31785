"""Particle identification: time of flight over straight and field-bent paths, energy-loss sampling in gas
(truncated-mean resolution, most probable loss, separation power), and the momentum ranges where two species
are separated.

Units: momenta MeV/c, masses MeV/c^2, lengths cm, times ps, fields T, pressures atm (for the empirical
resolution formula only). Pure numpy functions; no I/O.
"""
from __future__ import annotations

import math

import numpy as np
from scipy.constants import c as SPEED_OF_LIGHT_M_S
from scipy.optimize import brentq

from .straggling import most_probable_loss, vavilov_kappa

C_CM_PER_PS = SPEED_OF_LIGHT_M_S * 1e-10   # 0.0299792458 cm/ps (SI, exact)
BENDING_GEV_PER_T_M = SPEED_OF_LIGHT_M_S * 1e-9  # p [GeV/c] = 0.299792458 z B [T] R [m]
FWHM_OVER_SIGMA = 2.0 * math.sqrt(2.0 * math.log(2.0))  # 2.3548 for a Gaussian
SEPARATION_SIGMAS = 3.0


# --- time of flight -----------------------------------------------------------------------------------------

def flight_time_ps(p, mass: float, path_cm):
    """Flight time t = L / (beta c) = (L/c) sqrt(1 + M^2/p^2), ps (special relativity; exact).

    p : MeV/c, mass : MeV/c^2, path_cm : cm (scalar or broadcastable to p; inf for a track that never arrives).
    """
    p = np.asarray(p, dtype=float)
    return np.asarray(path_cm, dtype=float) / C_CM_PER_PS * np.sqrt(1.0 + (mass / p) ** 2)


def time_difference_ps(p, mass_a: float, mass_b: float, path_a_cm, path_b_cm=None):
    """t_b - t_a, ps: the later arrival of the heavier species b over its own path (default: the same path).

    For a common straight path L this is the closed form (L/c) (sqrt(1 + m_b^2/p^2) - sqrt(1 + m_a^2/p^2)).
    """
    path_b = path_a_cm if path_b_cm is None else path_b_cm
    return flight_time_ps(p, mass_b, path_b) - flight_time_ps(p, mass_a, path_a_cm)


def combined_time_resolution_ps(sigma_layer_ps: float, sigma_start_ps: float | None) -> float:
    """sigma_t = sqrt(sigma_layer^2 + sigma_start^2), ps; an absent start resolution counts as an exact start."""
    return math.hypot(sigma_layer_ps, sigma_start_ps or 0.0)


def tof_separation_momentum(mass_a: float, mass_b: float, path_cm: float, sigma_ps: float,
                            n_sigma: float = SEPARATION_SIGMAS) -> float:
    """Momentum (MeV/c) below which two species are separated by at least n_sigma over a common straight path.

    Solve sqrt(1 + b u) - sqrt(1 + a u) = k for u = 1/p^2, with a = m_a^2, b = m_b^2, d = b - a > 0 and
    k = n_sigma sigma_t c / L. Writing A, B for the two roots, B - A = k and B + A = d u / k, so
    A^2 = 1 + a u gives (d/k)^2 u^2 - 2 (a + b) u + k^2 - 4 = 0, whose admissible root is
        u = k^2 [ (a + b) + 2 sqrt(a b + d^2/k^2) ] / d^2,     p = 1/sqrt(u).
    At large p this tends to p^2 = d / (2 k), the familiar L (m_b^2 - m_a^2) / (2 p^2 c) approximation.
    The difference falls monotonically with p, so the species are separated at every p below the root.
    """
    a, b = sorted((mass_a ** 2, mass_b ** 2))
    d = b - a
    if d <= 0.0:
        raise ValueError("species of equal mass cannot be told apart by their flight time")
    k = n_sigma * sigma_ps * C_CM_PER_PS / path_cm
    u = k * k * ((a + b) + 2.0 * math.sqrt(a * b + (d / k) ** 2)) / (d * d)
    return 1.0 / math.sqrt(u)


def field_path_length(p, charge: int, z_cm: float, regions) -> np.ndarray:
    """Arc length (cm) from the origin to the plane at axial position z_cm of a track that leaves the origin
    along the axis, through uniform field regions perpendicular to the axis.

    regions : iterable of (start_cm, end_cm, field_T) with non-overlapping [start, end) intervals.
    In a region of curvature kappa = 0.299792458 z B / p [GeV/c] (1/m; Lorentz force), the track angle theta
    to the axis obeys d(sin theta)/dz = kappa, so over an axial length D:
        sin theta_1 = sin theta_0 + kappa D,   arc length = (theta_1 - theta_0) / kappa;
    between regions the track is straight: D / cos theta. Where |sin theta_1| reaches 1 the track turns
    back and never reaches z_cm: the path is inf. Energy loss (a shrinking radius) is neglected.
    """
    p_gev = np.asarray(p, dtype=float) / 1e3
    s = np.zeros_like(p_gev)
    path = np.zeros_like(p_gev)
    z = 0.0
    for start, end, field in sorted(regions):
        lo, hi = max(start, 0.0), min(end, z_cm)
        if hi <= lo:
            continue
        path = path + (lo - z) / np.sqrt(1.0 - s * s)
        kappa = BENDING_GEV_PER_T_M * charge * field / p_gev / 100.0  # 1/cm
        s1 = s + kappa * (hi - lo)
        with np.errstate(invalid="ignore", divide="ignore"):
            arc = np.where(np.abs(s1 - s) > 1e-12, (np.arcsin(np.clip(s1, -1.0, 1.0)) - np.arcsin(s)) / kappa,
                           (hi - lo) / np.sqrt(1.0 - s * s))
        path = np.where(np.abs(s1) < 1.0, path + arc, np.inf)
        s = np.where(np.abs(s1) < 1.0, s1, 0.0)
        z = hi
    with np.errstate(invalid="ignore"):
        return np.where(np.isfinite(path), path + (z_cm - z) / np.sqrt(1.0 - s * s), np.inf)


# --- energy loss in gas ---------------------------------------------------------------------------------------

ALLISON_COBB = {"coefficient_fwhm": 0.96, "samples_exponent": -0.46, "thickness_pressure_exponent": -0.32}
TRUNCATION_VALID = (0.4, 0.8)  # kept fraction for which the parametrisation's optimum-truncation fit applies


def truncated_mean_resolution(samples, sample_cm, pressure_atm):
    """Relative resolution sigma/mean of the truncated-mean energy loss of a track with N samples of
    thickness x (cm) in gas at pressure P (atm).

    W. W. M. Allison and J. H. Cobb, "Relativistic charged particle identification by energy loss",
    Ann. Rev. Nucl. Part. Sci. 30 (1980) 253, empirical fit to argon-based gases:
        FWHM / mean = 0.96 N^-0.46 (x P)^-0.32      (x in cm, P in atm; coefficients from memory),
    converted to sigma = FWHM / 2.355 (the truncated-mean distribution is close to Gaussian; common practice).
    Valid for argon-like gases, N from about 10 to several hundred, x P from about 0.1 to 100 cm atm, and a
    truncated mean keeping about 40-80 % of the samples (TRUNCATION_VALID); the fit has no dependence on the
    kept fraction within that band. A plain mean (truncation 1) is markedly worse because of the Landau tail.
    """
    n = np.asarray(samples, dtype=float)
    xp = np.asarray(sample_cm, dtype=float) * np.asarray(pressure_atm, dtype=float)
    fwhm = ALLISON_COBB["coefficient_fwhm"] * n ** ALLISON_COBB["samples_exponent"] \
        * xp ** ALLISON_COBB["thickness_pressure_exponent"]
    return fwhm / FWHM_OVER_SIGMA


def truncated_mean_resolution_valid(samples: int, sample_cm: float, pressure_atm: float, truncation: float) -> bool:
    """True inside the range the Allison-Cobb fit was made for (see truncated_mean_resolution)."""
    lo, hi = TRUNCATION_VALID
    return 10 <= samples <= 1000 and 0.1 <= sample_cm * pressure_atm <= 100.0 and lo <= truncation <= hi


def sample_most_probable_loss(p, mass: float, charge: int, medium, areal_density: float):
    """Most probable energy loss (MeV) of a species in one sample of areal_density g/cm2: the Landau-Vavilov
    Delta_p of refgen.physics.straggling, which carries the relativistic rise and its density-effect plateau
    (Review of Particle Physics 2024, Eq. 34.12). The truncated mean of thin gas samples follows Delta_p,
    not the full mean, whose rise is carried by rare close collisions that the truncation removes."""
    bg = np.asarray(p, dtype=float) / mass
    return most_probable_loss(bg, abs(charge), medium, areal_density)


def sample_loss_valid(p, mass: float, charge: int, medium, areal_density: float, min_bg: float):
    """Where the thin-sample Landau-Vavilov form applies: beta gamma >= min_bg (Bethe validity) and
    kappa = xi / W_max < 0.01 (the Landau regime)."""
    bg = np.asarray(p, dtype=float) / mass
    return (bg >= min_bg) & (vavilov_kappa(np.maximum(bg, 1e-6), mass, abs(charge), medium, areal_density) < 0.01)


def energy_loss_separation(loss_a, loss_b, resolution):
    """Separation power |L_a - L_b| / (resolution (L_a + L_b) / 2), in standard deviations, of two species
    whose truncated means L_a, L_b are each measured with the same relative resolution."""
    loss_a, loss_b = np.asarray(loss_a, dtype=float), np.asarray(loss_b, dtype=float)
    return np.abs(loss_a - loss_b) / (resolution * 0.5 * (loss_a + loss_b))


def crossovers(p, loss_a, loss_b) -> list[float]:
    """Momenta (same unit as p) where two loss curves cross, interpolated linearly in log p (a crossing that
    falls on a grid point is that point). Stretches where either curve is nan are skipped."""
    p = np.asarray(p, dtype=float)
    d = np.asarray(loss_a, dtype=float) - np.asarray(loss_b, dtype=float)
    out = []
    last = None  # index of the last finite, non-zero difference
    for i in range(len(d)):
        if not np.isfinite(d[i]):
            last = None
        elif d[i] != 0.0:
            if last is not None and np.sign(d[last]) != np.sign(d[i]):
                if i == last + 1:
                    f = d[last] / (d[last] - d[i])
                    out.append(float(np.exp(np.log(p[last]) + f * (np.log(p[i]) - np.log(p[last])))))
                else:
                    out.append(float(p[last + 1]))
            last = i
    return out


# --- ranges ---------------------------------------------------------------------------------------------------

def separated_ranges(p, n_sigma, threshold: float = SEPARATION_SIGMAS) -> list[list[float]]:
    """Momentum ranges [from, to] where n_sigma >= threshold on a rising grid p; edges interpolated linearly
    in log p between grid points, never beyond the grid. nan counts as not separated."""
    p = np.asarray(p, dtype=float)
    f = np.asarray(n_sigma, dtype=float) - threshold
    ok = np.isfinite(f) & (f >= 0.0)
    out = []
    i, n = 0, len(p)
    while i < n:
        if not ok[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and ok[j + 1]:
            j += 1
        lo = _edge(p, f, i - 1, i) if i > 0 else float(p[0])
        hi = _edge(p, f, j, j + 1) if j + 1 < n else float(p[-1])
        out.append([lo, hi])
        i = j + 1
    return out


def _edge(p, f, i: int, j: int) -> float:
    """Crossing of f through 0 between grid points i and j (log-p interpolation; the inner point if f is nan)."""
    inner = j if f[j] >= 0 else i
    if not (np.isfinite(f[i]) and np.isfinite(f[j])):
        return float(p[inner])
    t = f[i] / (f[i] - f[j])
    return float(np.exp(np.log(p[i]) + t * (np.log(p[j]) - np.log(p[i]))))


def last_crossing(func, lo: float, hi: float, points: int = 400) -> float | None:
    """The largest x in [lo, hi] where func changes from >= 0 to < 0 (scan on a log grid, then Brent's method);
    None if func < 0 everywhere, hi if func >= 0 at hi."""
    x = np.geomspace(lo, hi, points)
    f = np.array([func(v) for v in x])
    ok = f >= 0
    if not ok.any():
        return None
    i = int(np.nonzero(ok)[0][-1])
    if i == points - 1:
        return float(hi)
    return float(brentq(func, x[i], x[i + 1], xtol=1e-9 * x[i], rtol=1e-12))


# --- Cherenkov counters -------------------------------------------------------------------------------------

def gaussian_equivalent_sigmas(probability):
    """The number of standard deviations n with the same one-sided Gaussian tail: P = Q(n) (Q the normal
    survival function), so that P = 0.00135 gives n = 3. Used to put a counting misidentification probability
    on the same scale as a Gaussian separation."""
    from scipy.special import ndtri
    prob = np.clip(np.asarray(probability, dtype=float), 1e-300, 1.0)
    return np.maximum(-ndtri(prob), 0.0)


def threshold_counter_separation(npe_light, npe_heavy):
    """Separation (Gaussian-equivalent sigmas) of a threshold counter that calls a track light when it sees at
    least one photoelectron: the worse of P(light dark) = exp(-N_light) and P(heavy lit) = 1 - exp(-N_heavy)
    (Poisson photoelectron counts), as in gaussian_equivalent_sigmas. N_light = 6.6 with a silent heavy
    species gives 3 sigma."""
    n_l = np.asarray(npe_light, dtype=float)
    n_h = np.asarray(npe_heavy, dtype=float)
    worst = np.maximum(np.exp(-np.minimum(n_l, 700.0)), -np.expm1(-n_h))
    return gaussian_equivalent_sigmas(worst)


def ring_angle_separation(theta_light, theta_heavy, npe_heavy, sigma_per_photon):
    """Separation (sigmas) of two ring angles: (theta_light - theta_heavy) sqrt(N_pe) / sigma_per_photon, with
    the photoelectron count of the heavier species (fewer photons, the larger error); nan where it gives fewer
    than one photoelectron or has no ring. Units of the angles and sigma must agree."""
    d = np.asarray(theta_light, dtype=float) - np.asarray(theta_heavy, dtype=float)
    n = np.asarray(npe_heavy, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(np.isfinite(d) & (n >= 1.0), d * np.sqrt(np.maximum(n, 1.0)) / sigma_per_photon, np.nan)
