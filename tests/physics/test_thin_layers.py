"""Thin-layer signals and multiple scattering: worked examples and analytic cases."""
import math

import numpy as np
import pytest

from refgen.materials import library_material
from refgen.physics.medium import medium_of
from refgen.physics.scattering import highland_theta0, highland_valid
from refgen.physics.straggling import landau_fwhm, landau_xi, most_probable_loss

MUON = 105.6583755


def test_landau_mpv_silicon_worked_example():
    # Worked example by hand from Review of Particle Physics 2024 Eq. 34.12 for 300 um silicon at beta gamma = 3.6:
    # xi = 0.153537 * 0.49849 * 0.069870 / 0.92836 = 5.7605 keV; bracket = ln(2 m_e c^2 (bg)^2 / I) + ln(xi/I)
    # + 0.2 - beta^2 - delta = 11.2456 + 3.5055 + 0.2 - 0.92836 - delta(3.6) with delta = 0.4222 (SBS parameters)
    md = medium_of(library_material("silicon"))
    x = 0.03 * 2.329
    assert float(landau_xi(3.6, 1, md, x)) == pytest.approx(5.7605e-3, rel=2e-3)
    assert float(most_probable_loss(3.6, 1, md, x)) == pytest.approx(5.7605e-3 * (11.2456 + 3.5055 + 0.2 - 0.92836 - 0.4222),
                                                                     rel=3e-3)


def test_landau_mpv_silicon_signal_common_practice():
    # common practice: a MIP gives about 80 electron-hole pairs per um in silicon at the most probable value
    # (22 000 pairs, about 3.6 fC, in 300 um)
    md = medium_of(library_material("silicon"))
    mpv = float(most_probable_loss(3.6, 1, md, 0.03 * 2.329))
    assert mpv * 1e6 / 3.62 == pytest.approx(22000, rel=0.05)


def test_fwhm_is_four_xi():
    md = medium_of(library_material("argon-gas"))
    assert float(landau_fwhm(3.0, 1, md, 0.01)) == pytest.approx(4 * float(landau_xi(3.0, 1, md, 0.01)))


def test_highland_analytic_case():
    # x/X0 = 0.01, beta = 1 limit (p >> m): theta0 = 13.6/p * 0.1 * (1 + 0.038 ln 0.01) (analytic, RPP Eq. 34.16)
    p = 1e6  # MeV/c
    expected = 13.6 / p * 0.1 * (1 + 0.038 * math.log(0.01))
    assert float(highland_theta0(p, MUON, 1, 0.01)) == pytest.approx(expected, rel=1e-6)


def test_highland_scales_inversely_with_momentum_and_with_charge():
    t1 = float(highland_theta0(1e5, MUON, 1, 0.05))
    assert float(highland_theta0(2e5, MUON, 1, 0.05)) == pytest.approx(t1 / 2, rel=1e-6)


def test_highland_validity_window():
    assert list(highland_valid(np.array([1e-4, 1e-2, 10, 1e3]))) == [False, True, True, False]
