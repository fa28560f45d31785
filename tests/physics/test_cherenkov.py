"""Cherenkov thresholds, angles and yields; Birks' law."""
import math

import numpy as np
import pytest

from refgen.model import RefractiveIndex
from refgen.physics.cherenkov import (cherenkov_angle, frank_tamm_constant, photons_per_cm, refractive_index,
                                      saturated_angle, threshold_momentum)
from refgen.physics.scintillation import birks_light_stopping, birks_light_thin


@pytest.mark.parametrize("mass, n", [(139.57039, 1.03), (493.677, 1.00137), (938.27208816, 1.33)])
def test_threshold_is_analytic(mass, n):
    # p_th = m / sqrt(n^2 - 1) (analytic); beta * n = 1 at threshold
    p = float(threshold_momentum(mass, n))
    assert p == pytest.approx(mass / math.sqrt(n * n - 1), rel=1e-12)
    assert p / math.sqrt(p * p + mass * mass) * n == pytest.approx(1.0, rel=1e-12)
    assert math.isnan(float(cherenkov_angle(p * 0.999, mass, n)))


def test_saturated_angle_of_water():
    # analytic: arccos(1/1.33) = 0.7209 rad
    assert float(saturated_angle(1.33)) == pytest.approx(math.acos(1 / 1.33), rel=1e-12)


def test_frank_tamm_constant():
    # Review of Particle Physics 2024, Sec. 34.7 (from memory): alpha/(hbar c) = 369.81 /(eV cm) for z = 1
    assert frank_tamm_constant() == pytest.approx(369.81, rel=1e-4)


def test_yield_without_dispersion_by_hand():
    # constant n = 1.03, beta = 1, band 1.8-3.6 eV: N/x = alpha/(hbar c) * (1 - 1/1.03^2) * 1.8 eV (hand
    # computation), alpha/(hbar c) = 369.81 /(eV cm) unrounded from CODATA (hbar c in eV cm = hbar c / e * 100)
    import scipy.constants as sc
    alpha_over_hbar_c = sc.fine_structure / (sc.hbar * sc.c / sc.e * 100)
    n = RefractiveIndex("constant", 1.03)
    y = photons_per_cm(1.0, 1, (1.8, 3.6), lambda e: refractive_index(n, e))[0]
    assert y == pytest.approx(alpha_over_hbar_c * (1 - 1 / 1.03 ** 2) * 1.8, rel=1e-9)


def test_sellmeier_fused_silica_by_hand():
    # Malitson (1965) Sellmeier coefficients for fused silica (from memory); at 589.3 nm n = 1.4585 (hand value)
    idx = RefractiveIndex("sellmeier", b=(0.6961663, 0.4079426, 0.8974794),
                          c=(0.0684043 ** 2, 0.1162414 ** 2, 9.896161 ** 2))
    e = 1239.84198 / 589.3
    assert float(refractive_index(idx, np.array([e]))[0]) == pytest.approx(1.4585, abs=2e-4)


def test_dispersive_yield_matches_hand_integration():
    # table n(lambda): 1.50 at 300 nm, 1.46 at 600 nm (linear in wavelength); beta = 1;
    # hand integration by Simpson's rule over E in 2.0664-4.1328 eV with 2001 points
    idx = RefractiveIndex("table", wavelengths_nm=(300.0, 600.0), values=(1.50, 1.46))
    band = (1239.84198 / 600, 1239.84198 / 300)
    e = np.linspace(*band, 2001)
    n = 1.46 + (1.50 - 1.46) * (600 - 1239.84198 / e) / 300
    f = 1 - 1 / n ** 2
    h = e[1] - e[0]
    simpson = h / 3 * (f[0] + f[-1] + 4 * f[1:-1:2].sum() + 2 * f[2:-1:2].sum())
    y = photons_per_cm(1.0, 1, band, lambda x: refractive_index(idx, x))[0]
    assert y == pytest.approx(369.81 * simpson, rel=1e-4)


def test_gas_index_scales_with_density():
    n = RefractiveIndex("constant", 1.0014)
    assert float(refractive_index(n, np.array([2.0]), density_ratio=2.0)[0]) == pytest.approx(1.0028, rel=1e-12)


def test_birks_thin_layer():
    # Birks (1951): L = S dE / (1 + kB dE/dx); S = 10000/MeV, kB = 0.0126 cm/MeV, 2 MeV/cm over 1 cm (hand)
    assert float(birks_light_thin(1e4, 0.0126, 2.0, 2.0)) == pytest.approx(2e4 / 1.0252, rel=1e-12)


def test_birks_stopping_with_constant_dedx_is_linear():
    t = np.linspace(0.01, 10, 500)
    light = birks_light_stopping(1e4, 0.0126, t, np.full_like(t, 5.0))
    assert light[-1] == pytest.approx(1e4 * 10 / (1 + 0.063), rel=1e-9)
