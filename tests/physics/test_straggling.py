"""Energy-loss distributions in thin layers: Landau, Vavilov and Gaussian limits, the binding widening, and the
threshold functions."""
import math

import numpy as np
import pytest
from scipy.integrate import quad

from refgen.charged import MUON_MASS, minimum_ionization
from refgen.materials import library_material
from refgen.physics.medium import medium_of
from refgen.physics.straggling import (binding_variance, fraction_above, fwhm, landau_density, landau_xi,
                                       loss_distribution, most_probable_loss, straggling_regime, threshold_keeping,
                                       vavilov_density)


def landau_by_integral(lam):
    """Landau's phi from its defining integral (Landau 1944), by quadrature."""
    return quad(lambda t: math.exp(-t * math.log(t) - lam * t) * math.sin(math.pi * t) if t > 0 else 0.0,
                0, 60, limit=400)[0] / math.pi


@pytest.mark.parametrize("lam", [-2.0, -0.22278, 0.0, 1.0, 3.0, 10.0])
def test_landau_density_is_landaus_integral(lam):
    # analytic: phi(l) = 1/pi int_0^inf exp(-t ln t - l t) sin(pi t) dt; scipy's landau is a shifted, scaled form
    assert float(landau_density(lam)) == pytest.approx(landau_by_integral(lam), rel=1e-8)


def test_landau_mode_and_fwhm_published():
    # Koelbig & Schorr, Comput. Phys. Commun. 31 (1984) 97; RPP 2024 Sec. 34.2.9: mode lambda = -0.22278,
    # FWHM = 4.018 xi
    lam = np.linspace(-5, 30, 350001)
    p = landau_density(lam)
    assert lam[np.argmax(p)] == pytest.approx(-0.22278, abs=2e-4)
    above = lam[p >= p.max() / 2]
    assert above[-1] - above[0] == pytest.approx(4.018, abs=2e-3)


@pytest.fixture(scope="module")
def silicon():
    md = medium_of(library_material("silicon"))
    return md, minimum_ionization(md)


def test_unwidened_layer_distribution_is_landau(silicon):
    # Landau regime: mode at Delta_p (RPP 2024 Eq. 34.12) and FWHM 4.018 xi (Koelbig & Schorr 1984)
    md, (bg, dedx) = silicon
    x = 0.03 * 2.329
    d = loss_distribution(bg, MUON_MASS, 1, md, x, dedx * x)
    assert d.model == "landau"
    assert d.mode == pytest.approx(float(most_probable_loss(bg, 1, md, x)), rel=1e-6)
    assert fwhm(d) / d.xi == pytest.approx(4.018, rel=1e-3)


def vavilov_on_grid(kappa, beta2, lo, hi, step):
    n = int((hi - lo) / step)
    x = lo + step * np.arange(n)
    return x, vavilov_density(lo, step, n, kappa, beta2)


@pytest.mark.parametrize("kappa, beta2", [(0.02, 0.5), (0.3, 0.9), (3.0, 0.99)])
def test_vavilov_moments(kappa, beta2):
    # analytic: for the collision spectrum (xi/E^2)(1 - beta^2 E/W_max), x = (Delta - <Delta>)/W_max has mean 0 and
    # variance kappa (1 - beta^2/2) (Vavilov 1957)
    sd = math.sqrt(kappa * (1 - beta2 / 2))
    x, p = vavilov_on_grid(kappa, beta2, -10 * sd - kappa * 8, 1.5 + 10 * sd, min(kappa, sd) / 50)
    assert np.trapezoid(p, x) == pytest.approx(1.0, abs=1e-6)
    assert np.trapezoid(x * p, x) == pytest.approx(0.0, abs=1e-6 * sd)
    assert np.trapezoid(x * x * p, x) == pytest.approx(sd * sd, rel=1e-4)


def test_vavilov_tends_to_landau_at_small_kappa():
    # Vavilov 1957: as kappa -> 0 the density of lambda_L = x/kappa - (1 - gamma_E) - beta^2 - ln kappa is Landau's
    kappa, beta2 = 1e-3, 0.9
    x, p = vavilov_on_grid(kappa, beta2, kappa * (-6 + 1 - np.euler_gamma + beta2 + math.log(kappa)), 1.5, kappa / 100)
    lam = x / kappa - (1 - np.euler_gamma) - beta2 - math.log(kappa)
    pl = p * kappa
    assert lam[np.argmax(pl)] == pytest.approx(-0.22278, abs=0.02)
    assert np.max(np.abs(pl - landau_density(lam))) < 0.01 * pl.max()


@pytest.mark.parametrize("kappa, tol", [(10.0, 0.04), (100.0, 0.012)])
def test_vavilov_tends_to_gaussian_at_large_kappa(kappa, tol):
    # Vavilov 1957 / Seltzer & Berger 1964: for large kappa the distribution is a Gaussian of variance
    # xi W_max (1 - beta^2/2); the remaining difference is the skewness, falling as kappa^-1/2
    beta2 = 0.9
    sd = math.sqrt(kappa * (1 - beta2 / 2))
    x, p = vavilov_on_grid(kappa, beta2, -8 * sd, 8 * sd, sd / 50)
    g = np.exp(-0.5 * (x / sd) ** 2) / (math.sqrt(2 * math.pi) * sd)
    assert np.max(np.abs(p - g)) < tol * g.max()


def test_gaussian_regime_layer(silicon):
    # a thick absorber (kappa >= 10): Gaussian about the mean with sigma^2 = xi W_max (1 - beta^2/2)
    md, _ = silicon
    bg, x = 0.3, 200.0  # a slow muon in 200 g/cm2
    d = loss_distribution(bg, MUON_MASS, 1, md, x, 50.0)
    assert d.model == "gaussian" and d.kappa >= 10
    assert d.mode == pytest.approx(50.0, rel=1e-6)
    assert d.cumulative[-1] == pytest.approx(1.0, abs=1e-6)


def test_regimes_by_kappa():
    # RPP 2024 Sec. 34.2.9: Landau for kappa < 0.01, Vavilov between, Gaussian for kappa >= 10
    assert [straggling_regime(k) for k in (0.001, 0.01, 1.0, 10.0)] == ["landau", "vavilov", "vavilov", "gaussian"]


def test_vavilov_mode_continues_the_landau_mode(silicon):
    # just above kappa = 0.01 Vavilov's mode (about the Bethe mean) is within 0.5 % of the Landau mode of
    # RPP 2024 Eq. 34.12: the two regimes meet
    md, (bg, dedx) = silicon
    x = 0.62 * 2.329
    d = loss_distribution(bg, MUON_MASS, 1, md, x, dedx * x)
    assert d.model == "vavilov"
    assert d.mode == pytest.approx(float(most_probable_loss(bg, 1, md, x)), rel=5e-3)


def test_binding_variance_worked_example():
    # analytic: one shell holding all electrons, I = 100 eV, 2 m c^2 (beta gamma)^2 = 1.021998 * 9 MeV:
    # delta_2 = 8/3 xi I ln(2 m c^2 bg^2 / I)
    xi = 3e-3
    t = 2 * 0.51099895 * 9.0
    expected = 8 / 3 * xi * 1e-4 * math.log(t / 1e-4)
    assert binding_variance(3.0, xi, [100.0], [1.0]) == pytest.approx(expected, rel=1e-9)


def test_widened_distribution_keeps_the_mode_and_is_wider(silicon):
    md, (bg, dedx) = silicon
    x = 0.015 * 2.329
    xi = float(landau_xi(bg, 1, md, x))
    var = (1.5 * xi) ** 2
    d = loss_distribution(bg, MUON_MASS, 1, md, x, dedx * x, var)
    assert d.mode == pytest.approx(float(most_probable_loss(bg, 1, md, x)), rel=1e-3)
    assert fwhm(d) > 4.018 * xi * 1.2
    assert d.cumulative[-1] == pytest.approx(1.0, abs=0.01)  # normalised within 1 %


def test_efficiency_falls_with_threshold_and_inverts(silicon):
    md, (bg, dedx) = silicon
    x = 0.03 * 2.329
    d = loss_distribution(bg, MUON_MASS, 1, md, x, dedx * x, (6e-3) ** 2)
    t = np.linspace(0.0, 0.2, 401)
    eff = fraction_above(d, t)
    assert eff[0] == pytest.approx(1.0) and np.all(np.diff(eff) <= 0)
    t99 = threshold_keeping(d, 0.99)
    assert float(fraction_above(d, t99)) == pytest.approx(0.99, abs=1e-4)
    assert t99 < d.mode


@pytest.mark.parametrize("width_over_xi", [0.5, 1.7, 4.0])
def test_widened_landau_against_an_independent_convolution(silicon, width_over_xi):
    # reference library: pylandau's langau_pdf (Landau by the CERNLIB DENLAN algorithm convolved numerically with a
    # Gaussian), placed with its own mode at Delta_p like refgen's
    pylandau = pytest.importorskip("pylandau")
    md, (bg, dedx) = silicon
    x = 0.015 * 2.329
    xi = float(landau_xi(bg, 1, md, x))
    d = loss_distribution(bg, MUON_MASS, 1, md, x, dedx * x, (width_over_xi * xi) ** 2)
    lam = np.linspace(-5.0, 40.0, 9001)
    ref = pylandau.langau_pdf(lam, 0.0, 1.0, width_over_xi)
    i = int(np.argmax(ref))
    a, b, c = ref[i - 1:i + 2]
    mode = lam[i] + 0.5 * (a - c) / (a - 2 * b + c) * (lam[1] - lam[0])
    energy = d.mode + xi * (lam - mode)
    ours = np.interp(energy, d.energy, d.density) * xi
    assert np.max(np.abs(ours - ref)) < 1e-3 * ref.max()
