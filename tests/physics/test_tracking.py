"""Tracking resolution: the least-squares fit against published closed forms and analytic cases.

Spec-level checks use materials written the way users write them (formula and density, a gas by formula at
given conditions), through the whole pipeline: spec -> report -> key numbers.
"""
import numpy as np
import pytest
from scipy.integrate import quad

from refgen.physics import tracking as trk
from refgen.physics.scattering import highland_theta0
from refgen.report import make_report
from refgen.spec import parse_spec

CURVATURE_PER_M = 0.299792458  # 1/R (1/m) = 0.299792458 B (T) / p (GeV/c): c x 1e-9, exact (SI definition of c)
MUON = 105.6583755  # MeV, CODATA 2018


def gluckstern_exact(sigma_cm, length_cm, n):
    """Gluckstern, Nucl. Instrum. Meth. 24 (1963) 381: sigma(1/R) for N equally spaced points over L, exact in N:
    (sigma/L^2) sqrt(720 (N-1)^3 / ((N-2) N (N+1) (N+2))). Written here independently of the module (from memory;
    its large-N limit is the familiar 720/(N+4))."""
    return sigma_cm / length_cm ** 2 * np.sqrt(720.0 * (n - 1) ** 3 / ((n - 2) * n * (n + 1) * (n + 2)))


def stack_spec(n_planes, resolution="50 um", gap="10 cm", plane="100 um", field="1 T", extra=""):
    """N silicon planes (formula and density) separated by helium gaps (formula, gas at given conditions),
    with a uniform field from the first to the last plane."""
    layers = []
    for i in range(n_planes):
        if i:
            layers.append(f"  - {{name: gap-{i}, material: he, thickness: {gap}, system: tracking, active: false}}")
        layers.append(f"  - {{name: plane-{i}, material: si, thickness: {plane}, system: tracking, resolution: {resolution}}}")
    field_key = f"field: {{strength: {field}, from: plane-0, to: plane-{n_planes - 1}}}\n" if field else ""
    return ("experiment: {name: Tracking check}\nparticles: [muon]\n"
            "momentum: {from: 1 GeV/c, to: 1000 GeV/c, points: 4}\n"
            "materials:\n  si: {formula: Si, density: 2.329 g/cm3}\n"
            "  he: {formula: He, state: gas, temperature: 20 degC, pressure: 1 atm}\n"
            "layers:\n" + "\n".join(layers) + "\n" + field_key + extra)


def resolution_of(text, species="muon"):
    kn = make_report(parse_spec(text))["key_numbers"]
    return kn["tracking_layout"], kn["tracking_resolution"][species]


# --- Gluckstern: N equally spaced planes in a uniform field, negligible material ---------------------------

@pytest.mark.parametrize("n", [3, 4, 6, 10, 25])
def test_gluckstern_exact_finite_n_through_the_whole_pipeline(n):
    lay, r = resolution_of(stack_spec(n))
    z = [pl["z_cm"] for pl in lay["planes"]]
    expected_inv_r = gluckstern_exact(50e-4, z[-1] - z[0], n)  # 1/cm
    for p, measured in zip(r["momentum_GeV_c"], r["sigma_p_over_p_measurement"]):
        expected = p * expected_inv_r * 100 / (CURVATURE_PER_M * 1.0)
        assert measured == pytest.approx(expected, rel=5e-3)


def test_the_large_n_form_is_several_percent_off_at_n6():
    # why the exact form is needed: 720/(N+4) is the large-N approximation
    exact = gluckstern_exact(1.0, 1.0, 6)
    assert np.sqrt(720 / 10) / exact == pytest.approx(1.0375, abs=0.002)


def test_gluckstern_in_the_module_matches_the_independent_form():
    for n in (3, 6, 40):
        assert trk.gluckstern_curvature_sigma(1e-3, 50.0, n) == pytest.approx(gluckstern_exact(1e-3, 50.0, n), rel=1e-12)


def test_field_before_the_origin_of_the_fit_does_not_matter():
    # the curvature error does not depend on where the uniform field starts, as long as it covers the planes
    z = np.linspace(20.0, 80.0, 7)
    h_a = trk.design_matrix(z, trk.field_double_integral(z, [0.0], [100.0], [1.0]))
    h_b = trk.design_matrix(z, trk.field_double_integral(z, [15.0], [90.0], [1.0]))
    v = np.diag(np.full(7, 1e-6))
    assert trk.fit_covariance(h_a, v)[2, 2] == pytest.approx(trk.fit_covariance(h_b, v)[2, 2], rel=1e-9)


def test_field_double_integral_against_numerical_quadrature():
    starts, ends, b = [10.0, 50.0], [30.0, 65.0], [1.5, 0.7]

    def field(u):
        return sum(bb for s, e, bb in zip(starts, ends, b) if s <= u < e)

    for z in (5.0, 20.0, 42.0, 60.0, 100.0):
        inner = lambda zp: quad(field, 0, zp, points=starts + ends, limit=200)[0]  # noqa: E731
        expected = quad(inner, 0, z, points=starts + ends, limit=200)[0]
        assert float(trk.field_double_integral(z, starts, ends, b)) == pytest.approx(expected, rel=1e-6, abs=1e-9)


# --- multiple scattering ---------------------------------------------------------------------------------

def uniform_material_fit(n_planes=200, n_slices=2000, length=100.0):
    """Planes at the centres of N equal cells over [0, L], continuous scattering of unit variance per cm."""
    z = (np.arange(n_planes) + 0.5) / n_planes * length
    edges = np.linspace(0.0, length, n_slices + 1)
    v = trk.scattering_covariance(z, edges[:-1], edges[1:], np.full(n_slices, length / n_slices))
    h = trk.design_matrix(z, trk.field_double_integral(z, [0.0], [length], [1.0]))
    return z, h, v


def test_scattering_limited_optimal_fit_against_the_continuum_formula():
    # continuum limit of the full-covariance fit: the angle is a random walk of variance theta_s^2 L with drift
    # kappa, whose best estimate has variance theta_s^2 / L (C = 1); analytic
    _, h, v = uniform_material_fit()
    sigma_inv_r = np.sqrt(trk.scattering_limited_covariance(h, v)[2, 2])  # per unit kappa k_B B = 1/R
    expected = float(trk.continuous_scattering_curvature_sigma(1.0, 100.0, "optimal"))
    assert sigma_inv_r == pytest.approx(expected, rel=5e-3)


def test_equally_weighted_fit_reproduces_glucksterns_coefficient():
    # Gluckstern (1963); Review of Particle Physics 2024 Sec. 35 (tracking): an unweighted fit to many planes in
    # uniform material has sigma(1/R) = theta_s sqrt(1.43 / L) -- the 0.016 GeV/c = 0.0136 sqrt(1.43) of the
    # Review's formula (from memory); the continuum value of the coefficient is 10/7
    _, h, v = uniform_material_fit()
    a = np.linalg.solve(h.T @ h, h.T)
    sigma_inv_r = np.sqrt((a @ v @ a.T)[2, 2])
    expected = float(trk.continuous_scattering_curvature_sigma(1.0, 100.0, "equal"))
    assert sigma_inv_r == pytest.approx(expected, rel=5e-3)


def test_spec_scattering_part_against_the_continuous_formula():
    # 60 contiguous silicon layers, each measuring at its mid-plane: uniform material over L = 12 cm.
    # Continuous formula with Highland's width for the whole track (C = 1 for the full fit), to the accuracy
    # the continuum limit has for 60 planes (~1/N)
    layers = "\n".join(f"  - {{name: s{i}, material: si, thickness: 2 mm, system: tracking, resolution: 10 um}}"
                       for i in range(60))
    text = ("experiment: {name: Uniform}\nparticles: [muon]\nmomentum: {from: 10 GeV/c, to: 1000 GeV/c, points: 3}\n"
            "materials:\n  si: {formula: Si, density: 2.329 g/cm3}\nlayers:\n" + layers +
            "\nfield: {strength: 2 T, from: s0, to: s59}\n")
    lay, r = resolution_of(text)
    x0_cm = 21.82 / 2.329  # silicon X0 = 21.82 g/cm2, Review of Particle Physics 2024 atomic and nuclear properties (from memory)
    length = 12.0 - 0.1  # last hit at 11.9 cm
    for p_gev, scat in zip(r["momentum_GeV_c"], r["sigma_p_over_p_scattering"]):
        theta = float(highland_theta0(p_gev * 1e3, MUON, 1, length / x0_cm))  # rad over the whole track
        theta_s = theta / np.sqrt(length)
        expected = p_gev * float(trk.continuous_scattering_curvature_sigma(theta_s, length)) * 100 / (CURVATURE_PER_M * 2.0)
        assert scat == pytest.approx(expected, rel=0.03)


# --- straight line to the origin without a field ---------------------------------------------------------

def test_straight_line_extrapolation_analytic():
    # weighted straight-line fit: var(y0) = S_zz / D, var(t) = S / D with S = sum w, S_z = sum w z,
    # S_zz = sum w z^2, D = S S_zz - S_z^2 (analytic)
    z = np.array([3.0, 7.5, 12.0, 30.0])
    sig = np.array([10e-4, 10e-4, 25e-4, 40e-4])
    w = 1 / sig ** 2
    s, sz, szz = w.sum(), (w * z).sum(), (w * z * z).sum()
    d = s * szz - sz ** 2
    c = trk.fit_covariance(trk.design_matrix(z), np.diag(sig ** 2))
    assert np.sqrt(c[0, 0]) == pytest.approx(np.sqrt(szz / d), rel=5e-3)
    assert np.sqrt(c[1, 1]) == pytest.approx(np.sqrt(s / d), rel=5e-3)


def test_scatterer_before_the_planes_adds_its_lever_arm():
    # a slab [a, b] before every plane deflects the track by a line in z, so the fit's extrapolation picks up
    # var(y0) += theta0^2 (a^2 + a b + b^2) / 3 and var(t) += theta0^2 exactly (analytic)
    z = np.array([5.0, 10.0, 20.0])
    sig = np.full(3, 20e-4)
    a, b, theta2 = 1.0, 3.0, (1.3e-3) ** 2
    v = np.diag(sig ** 2) + trk.scattering_covariance(z, [a], [b], [theta2])
    c = trk.fit_covariance(trk.design_matrix(z), v)
    c0 = trk.fit_covariance(trk.design_matrix(z), np.diag(sig ** 2))
    assert c[0, 0] == pytest.approx(c0[0, 0] + theta2 * (a * a + a * b + b * b) / 3, rel=5e-3)
    assert c[1, 1] == pytest.approx(c0[1, 1] + theta2, rel=5e-3)


def test_spec_two_planes_without_field():
    # two planes, negligible material at 1000 GeV/c: sigma(y0) = sigma sqrt(z1^2 + z2^2) / (z2 - z1) (analytic)
    lay, r = resolution_of(stack_spec(2, resolution="30 um", gap="20 cm", plane="1 um", field=None))
    z1, z2 = (pl["z_cm"] for pl in lay["planes"])
    assert lay["fits_momentum"] is False and r["sigma_p_over_p"] == [None] * 4
    expected_um = 30 * np.hypot(z1, z2) / (z2 - z1)
    assert r["sigma_origin_um"][-1] == pytest.approx(expected_um, rel=5e-3)
    assert r["sigma_angle_mrad"][-1] == pytest.approx(30e-4 * np.sqrt(2) / (z2 - z1) * 1e3, rel=5e-3)


# --- invariances -------------------------------------------------------------------------------------------

def test_doubling_every_point_resolution_doubles_the_measurement_part():
    _, r1 = resolution_of(stack_spec(5, resolution="20 um"))
    _, r2 = resolution_of(stack_spec(5, resolution="40 um"))
    assert np.array(r2["sigma_p_over_p_measurement"]) == pytest.approx(2 * np.array(r1["sigma_p_over_p_measurement"]), rel=1e-9)
    assert r2["sigma_p_over_p_scattering"] == pytest.approx(r1["sigma_p_over_p_scattering"], rel=1e-9)


def test_scattering_part_does_not_depend_on_momentum_once_beta_is_one():
    _, r = resolution_of(stack_spec(5))
    scat = np.array(r["sigma_p_over_p_scattering"])  # 1, 10, 100, 1000 GeV/c
    assert scat[1:] == pytest.approx(scat[-1], rel=1e-4)
    assert scat[0] > scat[-1]  # 1/beta below


def test_measurement_part_grows_in_proportion_to_momentum():
    _, r = resolution_of(stack_spec(4))
    ratio = np.array(r["sigma_p_over_p_measurement"]) / np.array(r["momentum_GeV_c"])
    assert ratio == pytest.approx(ratio[0], rel=1e-12)


def test_full_fit_lies_between_the_larger_part_and_their_quadrature_sum_with_margin():
    _, r = resolution_of(stack_spec(6))
    for t, m, s in zip(r["sigma_p_over_p"], r["sigma_p_over_p_measurement"], r["sigma_p_over_p_scattering"]):
        assert max(m, s) * (1 - 1e-9) <= t <= np.hypot(m, s) * 1.2


def test_parts_are_equal_at_the_reported_momentum():
    _, r = resolution_of(stack_spec(6, extra="momentum: {from: 1 GeV/c, to: 1000 GeV/c, points: 300}\n")
                         .replace("momentum: {from: 1 GeV/c, to: 1000 GeV/c, points: 4}\n", ""))
    p = np.array(r["momentum_GeV_c"])
    diff = np.log(np.array(r["sigma_p_over_p_measurement"]) / np.array(r["sigma_p_over_p_scattering"]))
    crossing = np.exp(np.interp(0.0, diff, np.log(p)))
    assert r["parts_equal_at_GeV_c"] == pytest.approx(crossing, rel=1e-3)


def test_doubling_the_field_halves_sigma_p_over_p():
    _, r1 = resolution_of(stack_spec(5, field="1 T"))
    _, r2 = resolution_of(stack_spec(5, field="2 T"))
    assert np.array(r2["sigma_p_over_p"]) == pytest.approx(np.array(r1["sigma_p_over_p"]) / 2, rel=1e-9)


# --- flags ------------------------------------------------------------------------------------------------

def test_flags_a_species_that_stops_before_the_last_plane():
    text = stack_spec(3, gap="1 cm", field=None) + "  - {name: block, material: fe, thickness: 20 cm, system: absorber}\n" \
        "  - {name: last, material: si, thickness: 300 um, system: tracking, resolution: 50 um}\n"
    text = text.replace("  he: {", "  fe: {formula: Fe, density: 7.874 g/cm3}\n  he: {")
    text = text.replace("momentum: {from: 1 GeV/c, to: 1000 GeV/c, points: 4}", "momentum: {from: 100 MeV/c, to: 10 GeV/c, points: 50}")
    lay, r = resolution_of(text)
    assert r["unreachable_below_GeV_c"] is not None and 0.2 < r["unreachable_below_GeV_c"] < 0.5  # ~0.3 GeV/c in 20 cm iron
    stopped = [i for i, v in enumerate(r["momentum_loss_fraction"]) if v is None]
    assert all(r["sigma_origin_um"][i] is None for i in stopped)
    assert r["energy_loss_flag_below_GeV_c"] > r["unreachable_below_GeV_c"]
    loss = [v for v in r["momentum_loss_fraction"] if v is not None]
    assert all(b <= a for a, b in zip(loss, loss[1:]))  # falls with momentum
