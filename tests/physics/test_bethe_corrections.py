"""The low-speed corrections to the Bethe stopping number: oscillator shell correction, Barkas and validity edge."""
import math

import numpy as np
import pytest

from refgen import datafiles
from refgen.physics.bethe_corrections import (_oscillator_stopping_number_direct, barkas_correction,
                                              bethe_regime_min_beta_gamma, oscillator_stopping_number,
                                              shell_correction)
from refgen.physics.kinematics import momentum_of_kinetic
from refgen.physics.medium import medium_of
from refgen.physics.stopping import bethe_stopping
from tests.physics.user_materials import user_material

PROTON = 938.27208816


@pytest.mark.parametrize("kappa", [3e3, 1e4, 3e4])
def test_oscillator_stopping_number_reaches_fanos_asymptote(kappa):
    # analytic: L_HO -> ln kappa - 2 <T> / (m v^2) with the virial <T> = 3 hbar omega / 4 of the oscillator
    # (Fano, Annu. Rev. Nucl. Sci. 13 (1963) 1): ln kappa - 3 / kappa, next order ~ kappa^-2
    assert _oscillator_stopping_number_direct(kappa) == pytest.approx(math.log(kappa) - 3.0 / kappa, abs=3.0 / kappa ** 1.5)


def test_oscillator_stopping_number_vanishes_for_a_slow_projectile():
    # analytic: only the one-quantum term survives, (1/2) E1(1/kappa) ~ (kappa/2) e^(-1/kappa)
    for kappa in (0.05, 0.1):
        assert _oscillator_stopping_number_direct(kappa) == pytest.approx(0.5 * kappa * math.exp(-1.0 / kappa), rel=0.15)


def test_oscillator_table_interpolation_matches_the_direct_sum():
    kappa = np.geomspace(0.03, 1900.0, 37) * 1.013
    direct = np.array([_oscillator_stopping_number_direct(k) for k in kappa])
    assert oscillator_stopping_number(kappa) == pytest.approx(direct, abs=1e-4)


@pytest.mark.parametrize("name", ["water", "aluminium", "lead", "air", "bismuth-germanate", "copper"])
def test_shell_oscillators_reproduce_the_mean_excitation_energy(name):
    # by construction (Sternheimer, Berger & Seltzer 1984, Eq. 4): sum f_i ln hbar omega_i = ln I, sum f_i = 1
    md = medium_of(user_material(name))
    f, hw = md.shell_oscillators
    assert f.sum() == pytest.approx(1.0, abs=1e-12)
    assert math.exp(np.sum(f * np.log(hw))) == pytest.approx(md.i_ev, rel=1e-9)


def test_shell_correction_follows_the_leading_term_at_high_speed():
    # analytic: C/Z -> sum_i f_i 3 hbar omega_i / (2 m c^2 beta^2) when every shell is fast (Fano 1963)
    md = medium_of(user_material("water"))
    f, hw = md.shell_oscillators
    beta = 0.9
    kappa = 2.0e6 * datafiles.constant("electron_mass") * beta ** 2 / hw
    lead = np.sum(f * 3.0 / kappa)
    assert float(shell_correction(beta, md.shell_oscillators)) == pytest.approx(lead, rel=0.02)


def test_shell_correction_is_not_frozen_at_low_speed():
    md = medium_of(user_material("lead"))
    c = shell_correction(np.array([0.07, 0.10, 0.13]), md.shell_oscillators)
    assert np.all(np.abs(np.diff(c)) > 0.02)


def test_barkas_term_raises_the_loss_of_positive_particles():
    # Barkas, Dyer & Heckman, Phys. Rev. Lett. 11 (1963) 26: positive particles lose more than negative ones at the
    # same speed; the term is a correction of about 1-2 % for protons in light materials near 2 MeV (ICRU Report
    # 49 (1993), from memory) and falls roughly as beta^-3
    md = medium_of(user_material("water"))
    p = momentum_of_kinetic(np.array([2.0, 20.0]), PROTON)
    plus, minus = bethe_stopping(p, PROTON, 1, md), bethe_stopping(p, PROTON, -1, md)
    asym = (plus - minus) / (plus + minus)
    assert 0.005 < asym[0] < 0.02
    assert asym[1] < asym[0] / 5


def test_barkas_function_table_is_monotone():
    rows = datafiles.barkas_function()
    f = [r[1] for r in rows]
    assert all(b <= a for a, b in zip(f, f[1:]))


def test_barkas_term_of_a_compound_is_electron_weighted():
    # Bragg additivity with electron fractions: water is 2/10 hydrogen and 8/10 oxygen electrons
    beta = np.array([0.07])
    h, o = barkas_correction(beta, [1], [1.008], [1.0]), barkas_correction(beta, [8], [15.999], [1.0])
    water = barkas_correction(beta, [1, 8], [1.008, 15.999], [2 * 1.008 / 18.015, 15.999 / 18.015])
    assert water == pytest.approx(0.2 * h + 0.8 * o, rel=1e-3)


def test_validity_edge_is_where_the_bethe_regime_ends():
    # Lindhard & Scharff (1953): x = v^2 / (Z v0^2) = 1 for lead is beta = alpha sqrt(82), a 2.06 MeV proton;
    # for light materials the general edge beta gamma = 0.05 (1.17 MeV) is the higher one
    alpha = datafiles.constant("fine_structure")
    beta = alpha * math.sqrt(82)
    assert bethe_regime_min_beta_gamma([82]) == pytest.approx(beta / math.sqrt(1 - beta ** 2), rel=1e-12)
    assert bethe_regime_min_beta_gamma([1, 8]) == 0.05
