"""Identification physics: time of flight (closed form, analytic 3-sigma momentum, arc length in a field),
the truncated-mean resolution, the most probable loss per sample, separation helpers."""
import math

import numpy as np
import pytest
from particle import Particle
from scipy.integrate import solve_ivp
from scipy.optimize import brentq
from scipy.special import ndtr

from refgen.physics.identification import (crossovers, field_path_length, gaussian_equivalent_sigmas,
                                           ring_angle_separation, sample_most_probable_loss, separated_ranges,
                                           threshold_counter_separation, time_difference_ps,
                                           tof_separation_momentum, truncated_mean_resolution,
                                           truncated_mean_resolution_valid)
from refgen.model import Component, Material
from refgen.physics.medium import medium_of

C_M_PER_S = 299792458.0  # SI definition of the metre (exact), typed here independently of the code
MASS = {name: Particle.from_pdgid(pdg).mass for name, pdg in (("pi", 211), ("K", 321), ("p", 2212), ("e", 11), ("mu", 13))}


def closed_form_ps(p, ma, mb, path_cm):
    """The issue's closed form: L/c (sqrt(1 + m_b^2/p^2) - sqrt(1 + m_a^2/p^2)), in ps."""
    l_over_c_ps = path_cm / 100.0 / C_M_PER_S * 1e12
    return l_over_c_ps * (math.sqrt(1 + mb ** 2 / p ** 2) - math.sqrt(1 + ma ** 2 / p ** 2))


@pytest.mark.parametrize("a, b, path_cm", [("pi", "K", 350.0), ("K", "p", 120.0), ("e", "mu", 35.0), ("pi", "p", 1000.0)])
@pytest.mark.parametrize("p", [150.0, 800.0, 3000.0, 25000.0])
def test_time_difference_is_the_closed_form(a, b, path_cm, p):
    # analytic: the closed form of the issue, masses from the particle package (PDG), c exact
    got = float(time_difference_ps(p, MASS[a], MASS[b], path_cm))
    assert got == pytest.approx(closed_form_ps(p, MASS[a], MASS[b], path_cm), rel=1e-3)


@pytest.mark.parametrize("a, b, path_cm, sigma_ps", [("pi", "K", 350.0, 50.0), ("K", "p", 120.0, 100.0),
                                                     ("e", "mu", 35.0, 20.0), ("pi", "p", 1000.0, 5.0),
                                                     ("pi", "K", 30.0, 300.0)])
def test_three_sigma_momentum_solves_the_closed_form(a, b, path_cm, sigma_ps):
    # analytic: the closed form equals 3 sigma at the returned momentum; an independent numerical root agrees
    p3 = tof_separation_momentum(MASS[a], MASS[b], path_cm, sigma_ps)
    assert closed_form_ps(p3, MASS[a], MASS[b], path_cm) == pytest.approx(3 * sigma_ps, rel=1e-3)
    root = brentq(lambda p: closed_form_ps(p, MASS[a], MASS[b], path_cm) - 3 * sigma_ps, 1e-3, 1e7, rtol=1e-13)
    assert p3 == pytest.approx(root, rel=1e-3)
    assert closed_form_ps(p3 * 0.99, MASS[a], MASS[b], path_cm) > 3 * sigma_ps


def test_three_sigma_momentum_large_momentum_limit():
    # analytic limit: p^2 = L (m_b^2 - m_a^2) / (2 c 3 sigma) when the difference is small (p >> m)
    p3 = tof_separation_momentum(MASS["pi"], MASS["K"], 2000.0, 1.0)
    approx = math.sqrt(2000.0 / 100.0 / C_M_PER_S * 1e12 * (MASS["K"] ** 2 - MASS["pi"] ** 2) / (2 * 3.0))
    assert p3 == pytest.approx(approx, rel=1e-3)


def test_equal_masses_cannot_be_separated_by_time():
    with pytest.raises(ValueError):
        tof_separation_momentum(MASS["pi"], MASS["pi"], 100.0, 10.0)


@pytest.mark.parametrize("p_mev, field_t, z_cm", [(1000.0, 1.5, 100.0), (300.0, 0.5, 150.0), (5000.0, 2.0, 300.0)])
def test_arc_length_in_one_region_is_analytic(p_mev, field_t, z_cm):
    # analytic: R = p / (0.299792458 B) m; a track leaving along the axis reaches depth z after the arc R asin(z/R)
    r_cm = p_mev / 1e3 / (C_M_PER_S * 1e-9 * field_t) * 100.0
    got = float(field_path_length(p_mev, 1, z_cm, [(0.0, 1000.0, field_t)]))
    assert got == pytest.approx(r_cm * math.asin(z_cm / r_cm), rel=1e-9)


def test_arc_length_without_field_is_straight_and_a_curling_track_never_arrives():
    assert float(field_path_length(1000.0, 1, 250.0, [])) == pytest.approx(250.0, rel=1e-12)
    assert float(field_path_length(1000.0, 1, 250.0, [(0.0, 250.0, 0.0)])) == pytest.approx(250.0, rel=1e-12)
    # R = 0.1 GeV/c / (0.2998 * 2 T) = 16.7 cm < 50 cm: the track turns back
    assert math.isinf(float(field_path_length(100.0, 1, 50.0, [(0.0, 100.0, 2.0)])))


def test_arc_length_through_two_regions_matches_a_numerical_track():
    # independent check: integrate dz/ds = cos(theta), dtheta/ds = kappa(z) with scipy's ODE solver
    regions = [(20.0, 60.0, 1.2), (90.0, 130.0, -0.7)]
    p_mev, z_end = 400.0, 180.0

    def kappa(z):
        return sum(C_M_PER_S * 1e-9 * b / (p_mev / 1e3) / 100.0 for lo, hi, b in regions if lo <= z < hi)

    def rhs(s, y):
        return [math.cos(y[1]), kappa(y[0])]

    def arrive(s, y):
        return y[0] - z_end
    arrive.terminal = True
    sol = solve_ivp(rhs, (0.0, 1e4), [0.0, 0.0], events=arrive, rtol=1e-11, atol=1e-11, max_step=0.05)
    assert float(field_path_length(p_mev, 1, z_end, regions)) == pytest.approx(sol.t_events[0][0], rel=1e-6)


def test_truncated_mean_resolution_published_form():
    # Allison & Cobb, Ann. Rev. Nucl. Part. Sci. 30 (1980) 253: FWHM/mean = 0.96 N^-0.46 (x P)^-0.32, x in cm,
    # P in atm (coefficients from memory); the examples below are that form evaluated by hand, sigma = FWHM/2.3548
    for n, x, pressure, fwhm in [(1, 1.0, 1.0, 0.96), (100, 1.0, 1.0, 0.115417), (120, 0.5, 1.0, 0.132488),
                                 (160, 0.4, 8.5, 0.062850)]:
        assert float(truncated_mean_resolution(n, x, pressure)) == pytest.approx(fwhm / 2.3548, rel=2e-4)


@pytest.mark.parametrize("n, xp", [(30, 4.0), (100, 1.0), (160, 3.4), (300, 0.5)])
def test_truncated_mean_resolution_against_a_second_published_fit(n, xp):
    # Walenta et al., Nucl. Instrum. Methods 161 (1979) 45: sigma/mean = 0.41 N^-0.43 (x P)^-0.32 (from memory).
    # The two fits agree to within 17 % over typical chambers (measured here: Allison-Cobb 10-17 % lower).
    walenta = 0.41 * n ** -0.43 * xp ** -0.32
    assert float(truncated_mean_resolution(n, xp, 1.0)) == pytest.approx(walenta, rel=0.17)


def test_truncated_mean_resolution_scaling_and_validity():
    # the fit's exponents: quadrupling the samples improves it by 4^0.46; doubling x P by 2^0.32
    base = float(truncated_mean_resolution(100, 1.0, 1.0))
    assert float(truncated_mean_resolution(400, 1.0, 1.0)) == pytest.approx(base * 4 ** -0.46, rel=1e-12)
    assert float(truncated_mean_resolution(100, 1.0, 2.0)) == pytest.approx(base * 2 ** -0.32, rel=1e-12)
    assert truncated_mean_resolution_valid(120, 0.5, 1.0, 0.7)
    assert not truncated_mean_resolution_valid(120, 0.5, 1.0, 1.0)  # plain mean: Landau tail
    assert not truncated_mean_resolution_valid(3, 0.5, 1.0, 0.7)


def argon():
    return medium_of(Material("argon", "argon gas", (Component(18, "Ar", 1.0, 39.948),), 1.662e-3, "gas", 188.0,
                              "RPP 2024 Table (from memory)"))


def test_most_probable_loss_has_a_relativistic_rise_and_a_plateau():
    # Review of Particle Physics 2024 Sec. 34.2.9: Delta_p/x rises past the minimum and saturates (density effect)
    ar = argon()
    bg = np.array([3.5, 100.0, 1e4, 1e5])
    loss = sample_most_probable_loss(bg * 139.57, 139.57, 1, ar, 1.0 * 1.662e-3)
    assert loss[1] > 1.2 * loss[0]
    assert loss[3] == pytest.approx(loss[2], rel=2e-3)


def test_separated_ranges_and_crossovers_on_an_analytic_curve():
    # analytic: n(p) = 6 |ln(p)| is below 3 for exp(-1/2) < p < exp(1/2)
    p = np.geomspace(0.01, 100.0, 2001)
    ranges = separated_ranges(p, 6 * np.abs(np.log(p)))
    assert ranges[0][0] == 0.01 and ranges[1][1] == 100.0
    assert ranges[0][1] == pytest.approx(math.exp(-0.5), rel=1e-3)
    assert ranges[1][0] == pytest.approx(math.exp(0.5), rel=1e-3)
    assert crossovers(p, np.log(p), np.zeros_like(p)) == [pytest.approx(1.0, rel=1e-6)]
    assert separated_ranges(p, np.full_like(p, np.nan)) == []


def test_threshold_counter_separation_is_gaussian_equivalent():
    # normal tail: Q(3) = 0.00134990; a lighter species giving N = -ln Q(3) photoelectrons is 3 sigma away
    n3 = -math.log(ndtr(-3.0))
    assert float(threshold_counter_separation(n3, 0.0)) == pytest.approx(3.0, rel=1e-9)
    assert float(gaussian_equivalent_sigmas(ndtr(-5.0))) == pytest.approx(5.0, rel=1e-9)
    # the heavier species lighting the counter spoils it: 1 - exp(-0.5) = 0.3935 -> 0.2703 sigma (normal table)
    assert float(threshold_counter_separation(50.0, 0.5)) == pytest.approx(0.2703, abs=1e-3)


def test_ring_angle_separation():
    # analytic: 3 mrad apart, 1.5 mrad per photon, 9 photoelectrons -> 3 * 3 / 1.5 = 6 sigma; no ring -> nan
    assert float(ring_angle_separation(40.0, 37.0, 9.0, 1.5)) == pytest.approx(6.0)
    assert math.isnan(float(ring_angle_separation(40.0, np.nan, 0.0, 1.5)))
