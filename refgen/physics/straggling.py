"""Energy-loss fluctuations in thin layers: the Landau-Vavilov most probable energy loss and its width.

Review of Particle Physics 2024, Eq. 34.12 (after Landau 1944 and Vavilov 1957, with the density effect):
    Delta_p = xi [ ln(2 m_e c^2 beta^2 gamma^2 / I) + ln(xi / I) + j - beta^2 - delta(beta gamma) ],
    xi = (K/2) <Z/A> z^2 (x / beta^2)  MeV for x in g/cm2,  j = 0.200,
and the full width at half maximum w = 4 xi (Bichsel). Valid for "thin" layers where xi << W_max
(kappa = xi / W_max < 0.01), i.e. detector layers of silicon and gas; for thick absorbers the distribution
approaches a Gaussian and Delta_p tends to the mean.

The whole distribution of the loss in a layer (``loss_distribution``) is chosen by Vavilov's kappa = xi/W_max:
Landau's for kappa < 0.01, Vavilov's for 0.01 <= kappa < 10 and a Gaussian above (Vavilov 1957; Review of
Particle Physics 2024 Sec. 34.2.9), each widened by the atomic-binding Gaussian of Shulek et al. (1967).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.ndimage import gaussian_filter1d
from scipy.special import sici
from scipy.stats import landau

from .. import datafiles
from .density_effect import density_correction
from .kinematics import beta_of, electron_mass, gamma_of, w_max

LANDAU_J = 0.200
LANDAU_REGIME_KAPPA = 0.01  # below: Landau's distribution (RPP 2024 Sec. 34.2.9)
GAUSSIAN_REGIME_KAPPA = 10.0  # at and above: a Gaussian (Vavilov 1957; Seltzer & Berger 1964)
# scipy's landau is the stable law in Nolan's S1 form; Landau's phi(lambda) is it with this location and scale
# (checked against the defining integral phi(l) = 1/pi int_0^inf exp(-t ln t - l t) sin(pi t) dt in the tests).
SCIPY_LANDAU_LOC = float(np.log(np.pi / 2.0))
SCIPY_LANDAU_SCALE = float(np.pi / 2.0)
LANDAU_GRID_SPAN = 500.0  # lambda from about -5 to +500: the Landau tail beyond holds about 0.2 % of the particles


def landau_xi(bg, z: int, medium, areal_density: float):
    """xi = (K/2) <Z/A> z^2 x / beta^2, MeV (x in g/cm2)."""
    beta = beta_of(bg)
    return 0.5 * datafiles.constant("dedx_constant_K") * medium.z_over_a * z ** 2 * areal_density / beta ** 2


def most_probable_loss(bg, z: int, medium, areal_density: float):
    """Landau-Vavilov most probable energy loss Delta_p, MeV, in a layer of areal_density g/cm2."""
    me = electron_mass()
    bg = np.asarray(bg, dtype=float)
    b2 = beta_of(bg) ** 2
    xi = landau_xi(bg, z, medium, areal_density)
    i_mev = medium.i_ev * 1e-6
    return xi * (np.log(2.0 * me * bg ** 2 / i_mev) + np.log(xi / i_mev) + LANDAU_J - b2
                 - density_correction(bg, medium))


def landau_fwhm(bg, z: int, medium, areal_density: float):
    """FWHM of the energy-loss distribution, 4 xi, MeV (Bichsel; RPP 2024 Sec. 34.2.9)."""
    return 4.0 * landau_xi(bg, z, medium, areal_density)


def vavilov_kappa(bg, mass: float, z: int, medium, areal_density: float):
    """kappa = xi / W_max; the Landau form needs kappa below about 0.01."""
    return landau_xi(bg, z, medium, areal_density) / w_max(bg, mass)


def restricted_stopping(bg, mass: float, z: int, medium, t_cut: float):
    """Restricted energy loss (transfers below t_cut, MeV), MeV cm2/g. RPP 2024 Eq. 34.12 (restricted form):
        K z^2 <Z/A> / beta^2 [ 1/2 ln(2 m_e c^2 beta^2 gamma^2 T_up / I^2) - beta^2/2 (1 + T_up/W_max) - delta/2 ],
    T_up = min(t_cut, W_max). Same validity as the Bethe equation."""
    me = electron_mass()
    bg = np.asarray(bg, dtype=float)
    b2 = beta_of(bg) ** 2
    wmax = w_max(bg, mass)
    t_up = np.minimum(t_cut, wmax)
    i_mev = medium.i_ev * 1e-6
    bracket = (0.5 * np.log(2.0 * me * bg ** 2 * t_up / i_mev ** 2) - 0.5 * b2 * (1.0 + t_up / wmax)
               - 0.5 * density_correction(bg, medium))
    return datafiles.constant("dedx_constant_K") * z ** 2 * medium.z_over_a / b2 * bracket


def straggling_regime(kappa: float) -> str:
    """'landau' (kappa < 0.01), 'vavilov' (0.01 <= kappa < 10) or 'gaussian' (kappa >= 10), after Vavilov (1957)
    and the Review of Particle Physics 2024 Sec. 34.2.9."""
    if kappa < LANDAU_REGIME_KAPPA:
        return "landau"
    return "vavilov" if kappa < GAUSSIAN_REGIME_KAPPA else "gaussian"


def landau_density(lam):
    """Landau's universal density phi(lambda) = 1/pi int_0^inf exp(-t ln t - lambda t) sin(pi t) dt
    (Landau, J. Phys. USSR 8 (1944) 201), evaluated with scipy.stats.landau. Mode at lambda = -0.22278,
    FWHM 4.018 (Koelbig & Schorr, Comput. Phys. Commun. 31 (1984) 97)."""
    return landau.pdf(np.asarray(lam, dtype=float), loc=SCIPY_LANDAU_LOC, scale=SCIPY_LANDAU_SCALE)


def vavilov_log_characteristic(y, kappa: float, beta2: float):
    """ln of the characteristic function E[exp(i y x)] of x = (Delta - <Delta>)/W_max in Vavilov's theory.

    The collision spectrum is w(E) dE = (xi/E^2)(1 - beta^2 E/W_max) dE for 0 < E <= W_max (spin 0), so
    ln phi = kappa int_0^1 (1/u^2 - beta^2/u)(e^{iyu} - 1 - iyu) du, which in closed form is
    kappa [ 1 + iy - e^{iy} - iy Cin(y) - y Si(y) + beta^2 (Cin(y) - i(Si(y) - y)) ],  Cin = gamma_E + ln y - Ci.
    Its real part is Vavilov's kappa(1 + beta^2 gamma_E) + kappa f1(y) (Vavilov, Sov. Phys. JETP 5 (1957) 749;
    Schorr, Comput. Phys. Commun. 7 (1974) 215). Valid for any kappa; no atomic binding.
    """
    y = np.asarray(y, dtype=float)
    safe = np.where(y > 0, y, 1.0)
    si, ci = sici(safe)
    cin = np.euler_gamma + np.log(safe) - ci
    g = (1.0 + 1j * safe - np.exp(1j * safe) - 1j * safe * cin - safe * si
         + beta2 * (cin - 1j * (si - safe)))
    return np.where(y > 0, kappa * g, 0.0)


def vavilov_density(x0: float, dx: float, n: int, kappa: float, beta2: float, extra_variance: float = 0.0):
    """Vavilov's density of x = (Delta - <Delta>)/W_max on the grid x0 + j dx (j < n), by Fourier inversion
    p(x) = (1/pi) Re int_0^inf phi(y) e^{-ixy} dy with the FFT. ``extra_variance`` (in units of W_max^2) convolves
    a Gaussian (multiplies phi by exp(-v y^2/2)). Needs dx well below kappa (the FFT reaches y = 2 pi/dx and phi
    falls as exp(-pi kappa y/2))."""
    size = 1 << int(np.ceil(np.log2(4 * n)))
    dy = 2.0 * np.pi / (size * dx)
    y = np.arange(size) * dy
    a = np.exp(vavilov_log_characteristic(y, kappa, beta2) - 0.5 * extra_variance * y * y - 1j * y * x0) * dy
    a[0] *= 0.5
    return np.fft.fft(a)[:n].real / np.pi


def binding_variance(bg, xi, shell_energies_eV, shell_fractions):
    """Variance (MeV^2) of the Gaussian that widens the Landau-Vavilov distribution for atomic binding,
    after Shulek et al., Sov. J. Nucl. Phys. 4 (1967) 400, as discussed by Bichsel, Rev. Mod. Phys. 60 (1988) 663:
        delta_2 = (8/3) xi sum_i f_i I_i ln(2 m_e c^2 beta^2 gamma^2 / I_i),
    f_i the fraction of the material's electrons in shell i and I_i its binding energy. (The formula is quoted
    from memory, with the relativistic 2 m c^2 beta^2 gamma^2 in the logarithm.) It matters for thin layers, where
    sqrt(delta_2) is comparable with xi: a few hundred um of silicon or a few cm of gas."""
    e = np.asarray(shell_energies_eV, dtype=float) * 1e-6
    f = np.asarray(shell_fractions, dtype=float)
    t = 2.0 * electron_mass() * float(bg) ** 2
    ok = e < t
    return (8.0 / 3.0) * xi * float(np.sum(np.where(ok, f * e * np.log(np.where(ok, t / e, 1.0)), 0.0)))


@dataclass(frozen=True)
class LossDistribution:
    """The energy-loss distribution in one layer: energies (MeV, uniform grid), density (1/MeV), cumulative
    fraction from below, the model used, kappa, xi (MeV), the binding width (MeV) and the mode (MeV)."""

    energy: np.ndarray
    density: np.ndarray
    cumulative: np.ndarray
    model: str
    kappa: float
    xi: float
    binding_sigma: float
    mode: float


def _grid_mode(x, p) -> float:
    """The maximum of a sampled density, refined by a parabola through the three highest points."""
    i = int(np.clip(np.argmax(p), 1, len(p) - 2))
    a, b, c = p[i - 1], p[i], p[i + 1]
    den = a - 2.0 * b + c
    shift = 0.5 * (a - c) / den if den != 0 else 0.0
    return float(x[i] + shift * (x[1] - x[0]))


def _cumulative(x, p):
    """Cumulative trapezoid integral from the first grid point."""
    out = np.empty_like(p)
    out[0] = 0.0
    out[1:] = np.cumsum(0.5 * (p[1:] + p[:-1]) * np.diff(x))
    return out


def _landau_shape(s: float):
    """Landau's phi on a lambda grid, widened by a Gaussian of sigma s (in units of xi); the grid and the modes
    of the plain and the widened shape."""
    h = min(1.0, max(s, 0.1)) / 20.0
    lam = np.arange(-5.0 - 6.0 * s, LANDAU_GRID_SPAN, h)
    p = landau_density(lam)
    mode0 = _grid_mode(lam, p)
    if s > 0.02:
        p = gaussian_filter1d(p, s / h, mode="constant", truncate=6.0)
    return lam, p, mode0, _grid_mode(lam, p)


def loss_distribution(bg, mass: float, z: int, medium, areal_density: float, mean_loss: float,
                      binding_var: float = 0.0) -> LossDistribution:
    """The distribution of the energy lost in a layer of areal_density g/cm2 (MeV, 1/MeV), chosen by kappa.

    - kappa < 0.01: Landau's phi((Delta - Delta_p)/xi + lambda_p), placed so that its mode is the most probable
      loss Delta_p of RPP 2024 Eq. 34.12 (``most_probable_loss``);
    - 0.01 <= kappa < 10: Vavilov's density about the mean loss ``mean_loss`` (MeV);
    - kappa >= 10: a Gaussian about the mean with sigma^2 = xi W_max (1 - beta^2/2), the variance of Vavilov's
      collision spectrum (Seltzer & Berger 1964; RPP 2024 Sec. 34.2.9).
    Each is convolved with a Gaussian of variance ``binding_var`` (MeV^2, ``binding_variance``) and shifted so
    that the widened mode stays where the unwidened theory puts it (Delta_p of Eq. 34.12 agrees with Bichsel's
    calculation including binding; the Gaussian models the width only).
    """
    bg = float(bg)
    b2 = float(beta_of(bg)) ** 2
    xi = float(landau_xi(bg, z, medium, areal_density))
    wmax = float(w_max(bg, mass, gamma_of(bg)))
    kappa = xi / wmax
    model = straggling_regime(kappa)
    sigma_b = float(np.sqrt(max(binding_var, 0.0)))
    if model == "landau":
        lam, p, _, mode1 = _landau_shape(sigma_b / xi)
        mpv = float(most_probable_loss(bg, z, medium, areal_density))
        energy, density = mpv + xi * (lam - mode1), p / xi
    elif model == "vavilov":
        sd = np.sqrt(kappa * (1.0 - 0.5 * b2) + binding_var / wmax ** 2)
        x0 = min(kappa * (-6.0 + 1.0 - np.euler_gamma + b2 + np.log(kappa)), -8.0 * sd)
        dx = min(kappa, sd) / 50.0
        n = int(np.ceil((1.5 + 8.0 * sd - x0) / dx))
        x = x0 + dx * np.arange(n)
        p0 = vavilov_density(x0, dx, n, kappa, b2)
        p1 = vavilov_density(x0, dx, n, kappa, b2, binding_var / wmax ** 2)
        shift = _grid_mode(x, p0) - _grid_mode(x, p1)
        energy, density = mean_loss + wmax * (x + shift), np.clip(p1, 0.0, None) / wmax
    else:
        sd = np.sqrt(xi * wmax * (1.0 - 0.5 * b2) + binding_var)
        energy = mean_loss + sd * np.linspace(-8.0, 8.0, 1601)
        density = np.exp(-0.5 * ((energy - mean_loss) / sd) ** 2) / (np.sqrt(2.0 * np.pi) * sd)
    return LossDistribution(energy, density, _cumulative(energy, density), model, kappa, xi, sigma_b,
                            _grid_mode(energy, density))


def fraction_above(dist: LossDistribution, threshold):
    """Fraction of particles that lose more than ``threshold`` (MeV): 1 - the cumulative from below (the part
    beyond the grid's upper end counts as above). Falls monotonically with the threshold."""
    return 1.0 - np.interp(threshold, dist.energy, dist.cumulative, left=0.0)


def threshold_keeping(dist: LossDistribution, fraction: float) -> float:
    """The highest threshold (MeV) that keeps ``fraction`` of the particles above it: the (1 - fraction) quantile."""
    c = np.maximum.accumulate(dist.cumulative)
    return float(np.interp(1.0 - fraction, c, dist.energy))


def fwhm(dist: LossDistribution) -> float:
    """Full width at half maximum of a sampled density, MeV (linear interpolation at both edges)."""
    e, p = dist.energy, dist.density
    half = p.max() / 2.0
    i = int(np.argmax(p))
    lo = np.nonzero(p[:i] < half)[0][-1]
    hi = i + np.nonzero(p[i:] < half)[0][0]
    left = np.interp(half, [p[lo], p[lo + 1]], [e[lo], e[lo + 1]])
    right = np.interp(half, [p[hi], p[hi - 1]], [e[hi], e[hi - 1]])
    return float(right - left)
