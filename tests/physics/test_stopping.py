"""Energy loss against published tables. Tolerances are what the model reaches; see the comments."""
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from refgen import datafiles
from refgen.materials import library_material
from refgen.physics.density_effect import (oscillator_delta_table, oscillator_strengths, sternheimer_delta,
                                           sternheimer_oscillators, sternheimer_peierls_parameters, tabulated_delta)
from refgen.physics.medium import is_conductor
from refgen.physics.kinematics import momentum_of_kinetic
from refgen.physics.medium import medium_of
from refgen.physics.radlen import radiation_length
from refgen.physics.bremsstrahlung import (T_GRID_MEV, element_radiative_stopping, nucleus_form_ratio, radiative_stopping,
                                          three_bn)
from refgen.physics import ee_bremsstrahlung
from refgen.physics.radlen import coulomb_correction, radiation_logs
from refgen.physics.showers import critical_energy_crossing
from refgen.physics.stopping import (bethe_stopping, electron_collision_stopping, electron_radiative_stopping,
                                     mass_stopping_power)
from refgen.charged import make_range_table, minimum_ionization
from refgen.model import Species
from tests.physics.user_materials import MIN_IONIZATION as MIN_IONIZATION_USER, material_from_text, user_material

ROOT = Path(__file__).resolve().parents[2]

PROTON = 938.27208816
ELECTRON = 0.51099895
ALPHA = 3727.3794066
MUON = 105.6583755


def medium(key):
    return medium_of(library_material(key))


# Review of Particle Physics (2024), atomic and nuclear properties tables: minimum dE/dx for muons,
# MeV cm2/g (from memory). Library keys; aim 1%.
GENERAL_RULE_ENTRIES = {
    # published entries computed with the Sternheimer-Peierls general rules (no 1984 parameters exist for them);
    # the oscillator method differs from those rules by more than its own error
    "lead-tungstate": "the published value uses the general rules; the oscillator method gives 1.206 (-1.9%)",
}
MIN_IONIZATION = [
    ("water", 1.992), ("silicon", 1.664), ("lead", 1.122), ("iron", 1.451), ("argon-gas", 1.519),
    ("polystyrene", 1.936), ("air", 1.815), ("copper", 1.403), ("sodium-iodide", 1.305),
    ("caesium-iodide", 1.243), ("lead-tungstate", 1.229), ("aluminium", 1.615), ("beryllium", 1.595),
    ("tungsten", 1.145), ("uranium", 1.081), ("germanium", 1.370), ("bismuth-germanate", 1.251),
    ("polyethylene", 2.079), ("fused-silica", 1.699),
]


def _general_rule_xfail(key):
    return [pytest.mark.xfail(strict=True, reason=GENERAL_RULE_ENTRIES[key])] if key in GENERAL_RULE_ENTRIES else []


@pytest.mark.parametrize("key, expected", [pytest.param(k, v, marks=_general_rule_xfail(k)) for k, v in MIN_IONIZATION])
def test_minimum_ionization_against_rpp_tables(key, expected):
    _, dedx = minimum_ionization(medium(key))
    assert dedx == pytest.approx(expected, rel=0.01)


# The same tables for materials written as users write them (formula or mass mixture, density, I):
# Groom, Mokhov & Striganov (2001) tables (from memory), see tests/physics/user_materials.py. Target 0.5%.
# Reached: within 0.35% (tungsten; the oscillator shell correction lowers heavy elements by 0.2-0.3 % at the
# minimum); median 0.16 %.
@pytest.mark.parametrize("name", [pytest.param(k, marks=_general_rule_xfail(k)) for k in MIN_IONIZATION_USER])
def test_minimum_ionization_of_user_written_materials(name):
    _, dedx = minimum_ionization(medium_of(user_material(name)))
    assert dedx == pytest.approx(MIN_IONIZATION_USER[name], rel=0.005)


def test_user_written_material_takes_the_tabulated_parameters():
    # Sternheimer, Berger & Seltzer (1984) entry for copper: used whether or not the spec states I
    for text in ("{formula: Cu, density: 8.96 g/cm3}", "{formula: Cu, density: 8.96 g/cm3, mean_excitation_energy: 322 eV}",
                 "{formula: Cu, density: 9.0 g/cm3}"):
        assert medium_of(material_from_text(text)).de_source.startswith("Sternheimer, Berger & Seltzer"), text
    for text in ("{formula: Cu, density: 8.0 g/cm3}", "{formula: Cu, density: 8.96 g/cm3, mean_excitation_energy: 330 eV}"):
        assert medium_of(material_from_text(text)).de_source.startswith("Sternheimer (1952)"), text


# Sternheimer, Berger & Seltzer (1984): the oscillator method against the tabulated delta of every material that
# carries 1984 parameters, beta gamma 1 to 1e4. Reached: |delta_osc - delta_table| <= 0.13 (water, air and CO2
# worst, about -0.12; the method's known spread with free-atom shell data is 0.01-0.1, physics notes).
# Standard rock is a pseudo-element (Z = 11, A = 22) with no atomic shells and is left out.
@pytest.mark.parametrize("key", [k for k in datafiles.density_effect_parameters() if k != "standard-rock"])
def test_oscillator_delta_against_the_1984_table(key):
    m = library_material(key)
    z, a, w = m.arrays()
    f, e, f_c = oscillator_strengths(z, a, w, is_conductor(m), datafiles.atomic_shells())
    table = oscillator_delta_table(sternheimer_oscillators(f, e, f_c, m.mean_excitation_eV, m.plasma_energy_eV))
    bg = np.geomspace(1.0, 1e4, 81)
    params = {k: m.density_effect[k] for k in ("cbar", "x0", "x1", "a", "k", "delta0")}
    assert np.max(np.abs(tabulated_delta(bg, table) - sternheimer_delta(bg, **params))) <= 0.13


def test_oscillator_delta_reaches_its_asymptote():
    # analytic: at high beta gamma delta -> 2 ln(beta gamma hbar omega_p / I) - 1, i.e. 2 ln10 x - Cbar (Sternheimer 1952)
    m = user_material("silicon")
    md = medium_of(material_from_text("{formula: Si, density: 2.329 g/cm3, mean_excitation_energy: 175 eV}"))
    bg = np.array([1e5, 1e7])
    expected = 2 * np.log(bg * md.plasma_ev / md.i_ev) - 1
    assert tabulated_delta(bg, md.delta_table) == pytest.approx(expected, abs=2e-3)
    assert m.state == "solid"


def test_general_rules_keep_x0_below_x1():
    # a condensed material of very low density (foam-like) must not get x0 >= x1 (delta would jump)
    # (I = 150 eV, hbar omega_p = 0.1 eV: the condensed rule gives x0 = 3.6 above x1 = 3)
    p = sternheimer_peierls_parameters(150.0, 0.1, gas=False)
    assert p["x1"] > p["x0"]
    # the rules themselves are untouched where they give x0 < x1 (Sternheimer & Peierls 1971: x1 = 2 for I < 100 eV)
    assert sternheimer_peierls_parameters(60.0, 20.0, gas=False)["x1"] == 2.0
    bg = np.geomspace(0.1, 1e5, 400)
    assert np.all(np.diff(sternheimer_delta(bg, **p)) >= -1e-12)


def test_atomic_shell_table_regenerates_from_its_script():
    out = subprocess.run([sys.executable, str(ROOT / "tools" / "make_atomic_shells.py")], capture_output=True,
                         text=True, check=True).stdout
    assert out == (ROOT / "refgen" / "data" / "atomic_shells.csv").read_text()


def test_minimum_lies_near_beta_gamma_3_to_4():
    # Review of Particle Physics 2024, Sec. 34.2.3: the minimum lies at beta gamma ~ 3-3.5 (Z > 6) to ~4 (water)
    for key in ("water", "silicon", "lead", "iron"):
        bg, _ = minimum_ionization(medium(key))
        assert 2.8 < bg < 4.2, key


# ICRU Report 49 (1993), protons in water, electronic stopping power, MeV cm2/g (from memory). Target 1.5 %.
PROTON_WATER = [(3, 117.2), (5, 79.11), (10, 45.67), (20, 26.07), (50, 12.45), (100, 7.289), (200, 4.492),
                (1000, 2.211)]
# ICRU Report 49 (1993), protons in aluminium (from memory).
PROTON_ALUMINIUM = [(10, 33.95), (100, 5.678)]
# ICRU Report 49 (1993), protons in lead (from memory). No lower-energy lead value is remembered well enough to test.
PROTON_LEAD = [(100, 3.614)]
PROTON_ICRU49 = ([("water", t, s) for t, s in PROTON_WATER] + [("aluminium", t, s) for t, s in PROTON_ALUMINIUM]
                 + [("lead", t, s) for t, s in PROTON_LEAD])
# Measured (oscillator shell correction + Barkas term): water within 0.4 % from 3 MeV to 1 GeV, aluminium -0.9 % at
# 10 MeV, lead -1.5 % at 100 MeV (was -2.3 % with the Barkas-Berger formula).


@pytest.mark.parametrize("key, t, expected", PROTON_ICRU49)
def test_proton_stopping_against_icru49(key, t, expected):
    s = float(bethe_stopping(momentum_of_kinetic(t, PROTON), PROTON, 1, medium(key)))
    assert s == pytest.approx(expected, rel=0.015)


# The same, for materials written as users write them (formula + density + I).
@pytest.mark.parametrize("name, t, expected", PROTON_ICRU49)
def test_proton_stopping_of_user_written_materials(name, t, expected):
    s = float(bethe_stopping(momentum_of_kinetic(t, PROTON), PROTON, 1, medium_of(user_material(name))))
    assert s == pytest.approx(expected, rel=0.015)


# ICRU Report 49 (1993), protons in water at 2 MeV: 162.4 MeV cm2/g (from memory). The model gives 158.3 (-2.5 %)
# while it is within 0.7 % at 1, 3 and 5 MeV (260.8, 117.2, 79.11, also from memory). Written as the correction to
# the plain Bethe number, L - L0, the remembered values run -0.11 (1 MeV), -0.01 (2 MeV), -0.09 (3 MeV), -0.07
# (5 MeV): the 2 MeV entry breaks the smooth trend of the others by about 0.1 in L, so it is most likely remembered
# wrongly; it stays as a strict xfail until it can be checked against the printed table.
@pytest.mark.xfail(strict=True, reason="documented gap: 158.3 against 162.4 MeV cm2/g (-2.5 %); the remembered "
                   "reference breaks the trend of its neighbours by 2.5 % (see the comment)")
def test_proton_stopping_in_water_at_2_MeV():
    s = float(bethe_stopping(momentum_of_kinetic(2.0, PROTON), PROTON, 1, medium_of(user_material("water"))))
    assert s == pytest.approx(162.4, rel=0.015)


def test_proton_stopping_in_water_just_below_the_validity_edge():
    # ICRU Report 49 (1993), protons in water at 1 MeV: 260.8 MeV cm2/g (from memory); below beta gamma = 0.05 the
    # curve is flagged, but the oscillator shell correction and the Barkas term still hold it within 1 %
    s = float(bethe_stopping(momentum_of_kinetic(1.0, PROTON), PROTON, 1, medium_of(user_material("water"))))
    assert s == pytest.approx(260.8, rel=0.01)


# ICRU Report 49 (1993), protons in water, CSDA range g/cm2 (from memory). Aim 1.5%.
PROTON_WATER_RANGE = [(10, 0.1230), (100, 7.718), (200, 25.96)]


@pytest.mark.parametrize("t, expected", PROTON_WATER_RANGE)
def test_proton_csda_range_in_water(t, expected):
    m = library_material("water")
    table = make_range_table(Species("proton", "p", PROTON, 1), medium_of(m), radiation_length(*m.arrays()), 2e3)
    assert float(table.range_of(t)) == pytest.approx(expected, rel=0.015)


# ICRU Report 49 (1993), alpha particles in water, electronic stopping power (from memory): 100 MeV -> 60.1? no:
# at 40 MeV per nucleon-free kinetic energy 200 MeV the alpha stopping power equals 4x the proton value at the
# same speed (z^2 scaling, analytic): checked instead of a remembered table value.
def test_alpha_in_water_scales_as_z_squared_at_equal_speed():
    md = medium("water")
    bg = 0.5
    s_alpha = float(bethe_stopping(bg * ALPHA, ALPHA, 2, md))
    s_proton = float(bethe_stopping(bg * PROTON, PROTON, 1, md))
    # equal speed: only W_max (m_e/M terms) and the Bloch term differ; they change the ratio by < 0.5%
    assert s_alpha / s_proton == pytest.approx(4.0, rel=0.005)


# ICRU Report 37 (1984), electrons in water, collision stopping power MeV cm2/g (from memory). Aim 1%.
@pytest.mark.parametrize("t, expected", [(1.0, 1.849), (10.0, 1.968), (100.0, 2.197)])
def test_electron_collision_stopping_in_water(t, expected):
    s = float(electron_collision_stopping(momentum_of_kinetic(t, 0.51099895), medium("water")))
    assert s == pytest.approx(expected, rel=0.01)


@pytest.mark.parametrize("key", ["lead", "water", "aluminium"])
def test_radiative_loss_reaches_the_complete_screening_integral(key):
    # analytic: Tsai (1974) Eq. 3.83 integrated over the photon energy gives, at complete screening,
    # S_rad X0 / E = 1 + (1/18) sum (w/A)(Z^2 + Z) / sum (w/A)[Z^2 (L_rad - f) + Z L'_rad]
    z, a, w = library_material(key).arrays()
    x0 = radiation_length(z, a, w)
    num = sum(wj / aj * (zj ** 2 * (radiation_logs(int(zj))[0] - float(coulomb_correction(zj)))
                         + zj * radiation_logs(int(zj))[1]) for zj, aj, wj in zip(z, a, w))
    extra = sum(wj / aj * (zj ** 2 + zj) / 18.0 for zj, aj, wj in zip(z, a, w))
    t = 1e5
    s = float(electron_radiative_stopping(momentum_of_kinetic(t, ELECTRON), medium_of(library_material(key))))
    assert s * x0 / (t + ELECTRON) == pytest.approx(1.0 + extra / num, rel=2e-3)


# ICRU Report 37 (1984), electrons: radiative stopping power, MeV cm2/g (from memory; lead at 1 MeV is the value
# the issue's -30 % refers to). Materials written as users write them. Targets: 3 % for Z <= 30 from 1 MeV.
# Reached: water -1.0 % at 1 MeV (was +3.5 % before the QED electron-electron term), -1.1 % at 10 MeV, +1.9 % at
# 100 MeV.
ELECTRON_RADIATIVE = [
    ("water", 1.0, 0.01293), ("water", 10.0, 0.1832), ("water", 100.0, 2.399),
    pytest.param("lead", 1.0, 0.128, marks=pytest.mark.xfail(strict=True, reason=(
        "-18.9 %: Born (Koch-Motz 3BN) with the Elwert factor misses the exact partial-wave (Pratt-Tseng) result "
        "for high Z at 1 MeV; the target for high Z starts at 10 MeV"))),
]


def born_energy_loss_per_unit_charge(t):
    """Electron-nucleus energy-loss cross section per unit charge squared, unscreened Born (Koch & Motz 3BN)
    integrated over the photon energy, alpha r_e^2 m_e c^2; t = T / m_e c^2."""
    x, w = np.polynomial.legendre.leggauss(400)
    k = np.asarray(t, dtype=float)[..., None] * 0.5 * (x + 1.0)
    return np.sum(np.asarray(t, dtype=float)[..., None] * 0.5 * w * three_bn(np.asarray(t)[..., None] + 1.0, k),
                  axis=-1)


def test_electron_electron_amplitude_is_gauge_invariant():
    # Ward identity: the eight-graph amplitude with the photon polarisation replaced by its momentum vanishes;
    # summed over a coarse phase-space grid at T = 5 m_e c^2, relative to the physical |M|^2 (rounding only)
    assert ee_bremsstrahlung.energy_loss_cross_section(5.0, nodes=(4, 6, 4, 4), gauge_check=True) < 1e-15


def test_committed_electron_electron_table_is_what_the_integration_gives():
    t, phi = datafiles.ee_bremsstrahlung_free_electron()
    assert t == ee_bremsstrahlung.TABLE_T
    row = 12
    computed = ee_bremsstrahlung.energy_loss_cross_section(t[row], ee_bremsstrahlung.TABLE_NODES)
    assert computed == pytest.approx(phi[row], rel=1e-5)


def test_electron_electron_loss_tends_to_the_unscreened_electron_nucleus_value():
    # Bethe & Heitler (1934), unscreened, E0 >> m_e c^2: per unit charge squared 4 E0 (ln 2 E0 - 1/3) alpha r_e^2
    # m_e c^2; the e-e and e-n energy-loss cross sections become equal there (Haug 1975). Reached at 1 GeV.
    t, phi = (np.asarray(v) for v in datafiles.ee_bremsstrahlung_free_electron())
    ratio = phi / ee_bremsstrahlung.extreme_relativistic_limit(t)
    assert ratio[-1] == pytest.approx(1.0, abs=0.01)
    assert np.all(np.diff(ratio) > 0)  # approached from below
    assert born_energy_loss_per_unit_charge(t[-1]) == pytest.approx(
        ee_bremsstrahlung.extreme_relativistic_limit(t[-1]), rel=0.002)  # the Born e-n integral there too


def test_electron_electron_loss_falls_far_below_the_electron_nucleus_value_at_low_energy():
    # two identical particles have no dipole moment in their centre-of-mass frame: at low energy e-e
    # bremsstrahlung is quadrupole radiation, far below the electron-nucleus value per unit charge
    # (Born 3BN, unscreened), and the ratio falls steadily towards low energy
    t, phi = (np.asarray(v) for v in datafiles.ee_bremsstrahlung_free_electron())
    ratio = phi / born_energy_loss_per_unit_charge(t)
    assert ratio[0] < 0.05  # 10 keV
    assert ratio[np.searchsorted(t, 2.0)] < 0.7  # about 1 MeV
    assert np.all(np.diff(ratio) > 0)


@pytest.mark.parametrize("z, t, stated", [(82, 10.0, 1.13), (82, 50.0, 1.11), (29, 10.0, 1.01), (8, 10.0, 0.99)])
def test_disagreement_of_the_two_joined_forms_is_what_the_methods_page_states(z, t, stated):
    # the uncertainty the methods page gives for high-Z values inside the 2-50 MeV seam: the low-energy form (Born,
    # no Coulomb correction beyond the Elwert factor) lies above Tsai's form with the Davies-Bethe-Maximon
    # correction by about 4 f(Z) over the Bethe-Heitler logarithm, 11-13 % for lead and about 1 % for copper
    assert float(nucleus_form_ratio(t, z)[0]) == pytest.approx(stated, abs=0.005)


@pytest.mark.parametrize("name, t, expected", ELECTRON_RADIATIVE)
def test_electron_radiative_stopping_against_icru37(name, t, expected):
    s = float(electron_radiative_stopping(momentum_of_kinetic(t, ELECTRON), medium_of(user_material(name))))
    assert s == pytest.approx(expected, rel=0.03)


# ICRU Report 37 (1984), electrons in water: collision stopping power (MeV cm2/g) and CSDA range (g/cm2), from
# memory. Targets: 1 % and 1.5 %. Reached: collision within 0.5 %, CSDA range within 0.2 %.
@pytest.mark.parametrize("t, collision, csda", [(1.0, 1.849, 0.4367), (10.0, 1.968, 4.975), (100.0, 2.197, 32.50)])
def test_electron_collision_stopping_and_csda_range_of_user_written_water(t, collision, csda):
    m = user_material("water")
    md = medium_of(m)
    assert float(electron_collision_stopping(momentum_of_kinetic(t, ELECTRON), md)) == pytest.approx(collision, rel=0.01)
    table = make_range_table(Species("electron", "e-", ELECTRON, -1), md, radiation_length(*m.arrays()), 2e3)
    assert float(table.range_of(t)) == pytest.approx(csda, rel=0.015)


def test_crossing_critical_energy_of_copper():
    # Review of Particle Physics 2024, figure on the two definitions of the critical energy (from memory): the
    # collision and radiative losses of electrons in copper cross at 24.8 MeV. Reached: -1.3 %.
    m = user_material("copper")
    assert critical_energy_crossing(medium_of(m), radiation_length(*m.arrays())) == pytest.approx(24.8, rel=0.02)


def test_positron_radiative_loss_is_lower_at_low_energy():
    # Kim, Pratt, Seltzer & Berger (1986): the positron/electron ratio rises from about 0.5 (lead, 1 MeV) to 1
    md = medium_of(library_material("lead"))
    p = momentum_of_kinetic(np.array([1.0, 1e4]), ELECTRON)
    ratio = electron_radiative_stopping(p, md, positron=True) / electron_radiative_stopping(p, md)
    assert 0.4 < ratio[0] < 0.6
    assert ratio[1] == pytest.approx(1.0, abs=1e-3)


def test_radiative_stopping_is_smooth_across_the_seams():
    # the low- and high-energy forms are joined between 2 and 50 MeV (nucleus) and 100 MeV and 1 GeV (electrons),
    # and the free-electron table is a spline: no step or kink from 1 MeV to 10 GeV
    t = np.geomspace(1.0, 1e4, 800)
    for z, a in ((1, 1.008), (8, 15.999), (82, 207.2)):
        s = element_radiative_stopping(t, z, a)
        slope = np.diff(np.log(s)) / np.diff(np.log(t))
        assert np.all(np.abs(np.diff(slope)) < 0.01), z


def test_radiative_stopping_table_interpolation():
    # the per-element table on T_GRID_MEV is interpolated in ln T: checked against the direct integral off the grid
    t = np.sqrt(T_GRID_MEV[40:120:7] * T_GRID_MEV[41:121:7])
    z, a, w = library_material("lead").arrays()
    direct = element_radiative_stopping(t, 82, float(a[0]))
    assert radiative_stopping(t, z, a, w) == pytest.approx(direct, rel=1e-3)


def test_stopping_power_is_positive_and_continuous():
    # within the Bethe equation's validity: beta gamma >= 0.05
    p = np.geomspace(0.05 * PROTON, 1e6, 400)
    for key in ("water", "lead", "argon-gas"):
        s = bethe_stopping(p, PROTON, 1, medium(key))
        assert np.all(s > 0)
        assert np.all(np.abs(np.diff(np.log(s))) < 0.1), key


def test_bloch_correction_closed_form_matches_its_series():
    # analytic identity: -y^2 sum_n 1/(n (n^2 + y^2)) = psi(1) - Re psi(1 + i y) (Bloch 1933)
    from refgen.physics.stopping import bloch_correction
    beta = np.array([0.05, 0.1, 0.5, 0.99])
    y2 = (2 * 7.2973525693e-3 / beta) ** 2
    n = np.arange(1, 200001, dtype=float)
    series = -y2 * np.array([np.sum(1.0 / (n * (n * n + v))) for v in y2])
    assert np.allclose(bloch_correction(beta, 2), series, rtol=1e-6)
