"""Photon cross sections against the independent compilation of Boone & Chavez (mucoeff package;
Med. Phys. 23 (1996) 1997, 1 keV-50 MeV, by process), against Hubbell & Seltzer (1995), and against
the trade's rules. Tolerances are the ones the model reaches, stated per process and energy band."""
import functools

import numpy as np
import pytest
from mucoeff import Flag, mu

from refgen.attenuation import element_symbol_and_mass, symbols_of
from refgen.materials import library_material
from refgen.physics.photons import (PAIR_SEAM_MEV, crossover_energies, dominant_process, element_coefficients,
                                    mixture_coefficients, pair_electron, pair_nuclear)
from refgen.spec import parse_spec
from refgen.physics.radlen import radiation_length

# Energies away from absorption edges (MeV); the two compilations place edges slightly differently.
LOW = np.array([0.015, 0.02, 0.05, 0.08, 0.1, 0.15, 0.2, 0.3, 0.5, 0.8, 1.0])
HIGH = np.array([5.0, 8.0, 10.0, 15.0, 20.0, 30.0, 50.0])
MIDDLE = np.array([1.5, 2.0, 3.0])
FLAGS = {"photoelectric": Flag.MU_PHOTO, "coherent": Flag.MU_RAYLEIGH, "incoherent": Flag.MU_COMPTON,
         "pair_nuclear": Flag.MU_PAIR, "pair_electron": Flag.MU_TRIPLET, "total": Flag.MU_TOT}


def ours_and_reference(key, e, process):
    m = library_material(key)
    z, a, w = m.arrays()
    ours = mixture_coefficients(e, z, a, w, symbols_of(m))
    if process == "pair":
        ref = sum(wj * (mu(Flag.MU_PAIR, int(zj), e * 1e3) + mu(Flag.MU_TRIPLET, int(zj), e * 1e3)) for zj, wj in zip(z, w))
        return ours["pair_nuclear"] + ours["pair_electron"], ref
    ref = sum(wj * mu(FLAGS[process], int(zj), e * 1e3) for zj, wj in zip(z, w))
    return ours[process], ref


def max_deviation(key, e, process):
    ours, ref = ours_and_reference(key, e, process)
    return float(np.max(np.abs(ours / ref - 1.0)))


# (material, process, energies, tolerance reached). The aims were 3% for the total from 10 keV to 50 MeV and
# 3% for pair production above 5 MeV; where a case misses its aim the comment says by how much and why.
CASES = [
    ("silicon", "total", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),   # reached 0.6%
    ("iron", "total", np.concatenate([LOW, MIDDLE, HIGH]), 0.015),     # reached 1.05%
    ("water", "total", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),     # reached 1.0% (15 keV)
    ("lead", "total", LOW, 0.05),              # reached 4.5%, at 80 keV, from the coherent term (below)
    ("sodium-iodide", "total", LOW, 0.015),    # reached 1.2%
    ("silicon", "incoherent", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),
    ("lead", "incoherent", np.concatenate([LOW, MIDDLE, HIGH]), 0.015),          # reached 1.0%
    ("sodium-iodide", "incoherent", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),
    ("water", "incoherent", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),
    ("iron", "incoherent", np.concatenate([LOW, MIDDLE, HIGH]), 0.01),
    ("silicon", "photoelectric", LOW, 0.04),   # evaluated data to 800 keV: reached 3.1%
    ("iron", "photoelectric", LOW, 0.04),
    ("lead", "photoelectric", LOW, 0.04),
    ("water", "photoelectric", LOW, 0.04),     # reached 3.9%
    ("sodium-iodide", "photoelectric", LOW, 0.04),
    ("silicon", "coherent", LOW[2:], 0.02),    # 50 keV - 1 MeV; the two compilations' form factors differ
    ("water", "coherent", LOW[2:], 0.02),
    ("iron", "coherent", LOW[2:], 0.07),       # reached 6.5% (50 keV)
    ("sodium-iodide", "coherent", LOW[2:], 0.12),  # reached 11.4% (80 keV)
    ("lead", "coherent", LOW[4:], 0.10),       # 100 keV - 1 MeV; at 80 keV the compilations differ by 44%
    ("water", "pair", HIGH, 0.03),             # reached 1.9% (nuclear field and triplet)
    ("silicon", "pair", HIGH, 0.03),           # reached 2.7%
    ("iron", "pair", HIGH, 0.035),             # aim missed: +3.2% at 5 MeV (the F0 gap documented below)
]


@pytest.mark.parametrize("key, process, e, tol", CASES, ids=[f"{c[0]}-{c[1]}" for c in CASES])
def test_against_boone_chavez(key, process, e, tol):
    assert max_deviation(key, e, process) <= tol


def test_carbon_element_against_boone_chavez():
    from refgen.physics.photons import element_coefficients
    e = np.concatenate([LOW, MIDDLE, HIGH])
    c = element_coefficients(e, 6, "C", 12.011)
    ref = mu(Flag.MU_TOT, 6, e * 1e3)
    assert np.max(np.abs(c["total"] / ref - 1)) <= 0.02  # reached 1.6% (15 keV)
    pair_ref = mu(Flag.MU_PAIR, 6, HIGH * 1e3) + mu(Flag.MU_TRIPLET, 6, HIGH * 1e3)
    c = element_coefficients(HIGH, 6, "C", 12.011)
    assert np.max(np.abs((c["pair_nuclear"] + c["pair_electron"]) / pair_ref - 1)) <= 0.03


# Materials written as users write them: a formula or a mixture by mass, with a density.
USER_SPEC = """
experiment: {name: photon accuracy probe}
particles: [electron]
materials:
  lead: {formula: Pb, density: 11.35 g/cm3}
  tungsten: {formula: W, density: 19.3 g/cm3}
  lead-tungstate: {formula: PbWO4, density: 8.28 g/cm3}
  bismuth-germanate: {formula: Bi4Ge3O12, density: 7.13 g/cm3}
  sodium-iodide: {formula: NaI, density: 3.67 g/cm3}
  caesium-iodide: {formula: CsI, density: 4.51 g/cm3}
  barium-fluoride: {formula: BaF2, density: 4.89 g/cm3}
  lead-glass: {mixture: {PbO: 75, SiO2: 25}, by: mass, density: 4.5 g/cm3}
  water: {formula: H2O, density: 1.0 g/cm3}
  graphite: {formula: C, density: 2.0 g/cm3}
  aluminium: {formula: Al, density: 2.699 g/cm3}
  silicon: {formula: Si, density: 2.329 g/cm3}
  iron: {formula: Fe, density: 7.874 g/cm3}
  copper: {formula: Cu, density: 8.96 g/cm3}
  scintillator: {formula: C9H10, density: 1.032 g/cm3}
  laminate: {mixture: {SiO2: 60, C11H12O3: 40}, by: mass, density: 1.85 g/cm3}
  argon-methane: {mixture: {Ar: 90, CH4: 10}, by: mass, density: 1.6 kg/m3}
layers:
  - {name: probe, material: lead, thickness: 1 cm, system: other}
"""
HEAVY = ["lead", "tungsten", "lead-tungstate", "bismuth-germanate", "sodium-iodide", "caesium-iodide",
         "barium-fluoride", "lead-glass"]
LIGHT = ["water", "graphite", "aluminium", "silicon", "iron", "copper", "scintillator", "laminate", "argon-methane"]
# 1-50 MeV on the compilation's own energy nodes (no interpolation in the reference)
MEV_1_50 = np.array([1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 3.5, 4.0, 5.0, 6.0, 7.0, 8.0, 10.0, 12.5, 16.0, 20.0, 25.0,
                     32.0, 40.0, 50.0])


@functools.cache
def user_materials():
    return parse_spec(USER_SPEC, "photon probe").materials


def user_deviation(name, e, process="total"):
    m = user_materials()[name]
    z, a, w = m.arrays()
    ours = mixture_coefficients(e, z, a, w, symbols_of(m))[process]
    ref = sum(wj * mu(FLAGS[process], int(zj), e * 1e3) for zj, wj in zip(z, w))
    return ours / ref - 1.0


def test_lead_pair_above_5_MeV():
    # a strict xfail until the low-energy Coulomb correction (lead was -36 % at 5 MeV); reached 1.4 % (pair and triplet)
    assert max_deviation("lead", HIGH, "pair") <= 0.03


def test_heavy_totals_between_2_and_20_MeV():
    # a strict xfail until the low-energy Coulomb correction (lead -17 %, sodium iodide -7 % at 5 MeV); reached 1.4 %
    e = np.array([2.0, 3.0, 5.0, 10.0, 20.0])
    assert max(max_deviation("lead", e, "total"), max_deviation("sodium-iodide", e, "total")) <= 0.03


@pytest.mark.parametrize("name", HEAVY)
def test_total_of_heavy_user_materials_1_to_50_MeV(name):
    # aim (and reached): 2 % for lead, tungsten, iodine, bismuth, caesium and barium compounds
    assert np.max(np.abs(user_deviation(name, MEV_1_50))) <= 0.02


@pytest.mark.parametrize("name", LIGHT)
def test_total_of_light_user_materials_1_to_50_MeV(name):
    # aim (and reached): 1.5 % for Z <= 30 (and argon)
    assert np.max(np.abs(user_deviation(name, MEV_1_50))) <= 0.015


PAIR_MEV = np.array([3.0, 3.5, 4.0, 5.0, 6.0, 7.0, 8.0, 10.0, 12.5, 16.0, 20.0, 25.0, 32.0, 40.0, 50.0])


def pair_nuclear_deviation(z, e):
    symbol, a = element_symbol_and_mass(z)
    return pair_nuclear(e, z, a) / mu(Flag.MU_PAIR, z, e * 1e3) - 1.0


def test_pair_nuclear_every_element_10_to_50_MeV():
    worst = max(np.max(np.abs(pair_nuclear_deviation(z, PAIR_MEV[PAIR_MEV >= 10]))) for z in range(1, 99))
    assert worst <= 0.03  # reached 2.8 % (Z = 91 at 50 MeV)


PAIR_3MEV_OK = [*range(1, 12), *range(45, 89)]


@pytest.mark.parametrize("z", PAIR_3MEV_OK)
def test_pair_nuclear_3_to_50_MeV(z):
    # includes the pitfall of F0's leading coefficient: -0.1774 instead of -1.774 puts lead +43 % high at 3 MeV
    assert np.max(np.abs(pair_nuclear_deviation(z, PAIR_MEV))) <= 0.03


@pytest.mark.xfail(strict=True, reason=(
    "documented gap: Baro et al.'s low-energy correction F0 is a quadratic in alpha Z fitted to the "
    "Overbo-Mork-Olsen results; against the compilation it leaves nuclear pair production high at 3-6 MeV by up "
    "to +4.2 % for Z = 12-44 (iron +4.1 % at 3.5 MeV) and up to +7.0 % for Z = 89-98 (uranium +4.2 %); "
    "within 3 % for every Z from 10 MeV"))
def test_pair_nuclear_every_element_3_to_50_MeV():
    assert max(np.max(np.abs(pair_nuclear_deviation(z, PAIR_MEV))) for z in range(1, 99)) <= 0.03


@pytest.mark.parametrize("seam", PAIR_SEAM_MEV)
@pytest.mark.parametrize("z", [1, 6, 26, 82, 92])
def test_pair_nuclear_is_smooth_across_the_seam(seam, z):
    # value and logarithmic slope continuous where Baro et al. hand over to Tsai
    e = seam * np.array([0.98, 0.99, 1.0, 1.01, 1.02])
    s = pair_nuclear(e, z, 1.0)
    slopes = np.diff(np.log(s)) / np.diff(np.log(e))
    assert np.max(np.abs(np.diff(slopes))) < 0.01
    assert s[3] / s[2] == pytest.approx(1.0, abs=0.005)


def reference_compton_pair(z):
    grid = np.geomspace(1.0, 120.0, 500)
    ref = {"photoelectric": mu(Flag.MU_PHOTO, z, grid * 1e3), "incoherent": mu(Flag.MU_COMPTON, z, grid * 1e3),
           "pair_nuclear": mu(Flag.MU_PAIR, z, grid * 1e3), "pair_electron": mu(Flag.MU_TRIPLET, z, grid * 1e3)}
    return crossover_energies(grid, ref)[1]


@pytest.mark.parametrize("z", [1, 2, 4, 6, 8, 13, 14, 18, 26, 29, 32, 50, 53, 55, 56, 74, 82, 83, 92])
def test_compton_pair_crossover(z):
    # lead's crossover is near 4.7 MeV (it was 6.1 MeV with the Born pair cross section)
    symbol, a = element_symbol_and_mass(z)
    grid = np.geomspace(1.0, 120.0, 500)
    ours = crossover_energies(grid, element_coefficients(grid, z, symbol, a))[1]
    assert ours == pytest.approx(reference_compton_pair(z), rel=0.03)


# Hubbell & Seltzer (1995), NISTIR 5632, total mass attenuation with coherent scattering, cm2/g (from memory).
@pytest.mark.parametrize("key, e, expected, tol", [
    ("water", 0.1, 0.1707, 0.01), ("water", 1.0, 0.07072, 0.01), ("water", 10.0, 0.02219, 0.01),
    ("lead", 0.1, 5.549, 0.01), ("lead", 1.0, 0.07102, 0.03), ("aluminium", 1.0, 0.06146, 0.01),
    ("iron", 1.0, 0.05995, 0.01),
])
def test_against_hubbell_seltzer(key, e, expected, tol):
    m = library_material(key)
    z, a, w = m.arrays()
    total = mixture_coefficients(np.array([e]), z, a, w, symbols_of(m))["total"][0]
    assert total == pytest.approx(expected, rel=tol)


@pytest.mark.parametrize("key", ["lead", "iron", "water", "silicon"])
def test_seven_ninths_rule(key):
    # Review of Particle Physics 2024 Eq. 34.31: sigma_pair -> 7/9 A/(X0 N_A) at high energy, i.e. mu_pair/rho -> 7/(9 X0).
    # The exact Tsai limit is lower by the small (Z^2+Z)/54 term, under 1% of the total.
    m = library_material(key)
    z, a, w = m.arrays()
    c = mixture_coefficients(np.array([1e5]), z, a, w, symbols_of(m))
    assert c["pair_nuclear"][0] + c["pair_electron"][0] == pytest.approx(7.0 / (9.0 * radiation_length(z, a, w)), rel=0.01)


def test_rules_of_thumb():
    # common practice: Compton scattering dominates around 1 MeV; pair production dominates above about 10 MeV
    # in heavy materials
    for key in ("water", "silicon", "iron", "lead", "lead-tungstate"):
        m = library_material(key)
        z, a, w = m.arrays()
        c = mixture_coefficients(np.array([1.0, 20.0]), z, a, w, symbols_of(m))
        dom = dominant_process(c)
        assert dom[0] == 1, key
        if key in ("lead", "lead-tungstate"):
            assert dom[1] == 2, key


def test_cross_sections_positive_and_continuous_at_the_seams():
    m = library_material("lead")
    z, a, w = m.arrays()
    for seam in (0.5, 0.8, 2.0, 6.0, 50.0, 500.0):
        e = np.array([seam * 0.999, seam * 1.001])
        c = mixture_coefficients(e, z, a, w, symbols_of(m))
        for k in ("photoelectric", "coherent", "incoherent", "pair_nuclear", "total"):
            if c[k][0] > 0:
                assert c[k][1] / c[k][0] == pytest.approx(1.0, abs=0.01), (seam, k)


PHOTO_GAP = ("documented gap: above the end of the evaluated tables (0.8 MeV) the photoelectric cross section is "
             "continued with the shape of Sauter's Born-approximation K-shell cross section, which falls too slowly for "
             "heavy elements: lead +13 % at 3 MeV, +37 % at 10 MeV, +51 % at 50 MeV (iron +19 %, carbon +6 % at "
             "50 MeV). The Coulomb-corrected high-energy limit as recalled (Hall/Pratt factor exp(-pi aZ + 2 (aZ)^2 "
             "(1 - ln aZ)) times a total-to-K ratio 1 + 0.01481 ln^2 Z - 0.000788 ln^3 Z, from memory) does not verify: "
             "for lead it is 0.55 of Sauter's 1/E limit where the compilation sits at 0.27 and still falls, and joined at "
             "0.8 MeV it gives lead +97 % at 50 MeV; no verified published limit is implemented. The effect on the total "
             "is at most +0.8 % (lead, 3-5 MeV), inside the total's targets")


@pytest.mark.xfail(strict=True, reason=PHOTO_GAP)
@pytest.mark.parametrize("name", ["lead", "tungsten", "sodium-iodide", "iron"])
def test_photoelectric_above_the_evaluated_tables(name):
    assert np.max(np.abs(user_deviation(name, MEV_1_50, "photoelectric"))) <= 0.05


def test_photoelectric_just_above_the_evaluated_tables():
    # 1-1.5 MeV, where the continuation starts: reached 6.0 % (bismuth germanate)
    for name in HEAVY + LIGHT:
        assert np.max(np.abs(user_deviation(name, MEV_1_50[:3], "photoelectric"))) <= 0.06, name


# the compilation's own energy nodes from 2.8 MeV (no interpolation in the reference)
TRIPLET_NODES_MEV = np.array([2.8, 3.2, 3.5, 4.0, 4.5, 5.0, 5.5, 6.3, 7.0, 8.0, 9.0, 10.0, 12.5, 16.0, 20.0, 25.0,
                              32.0, 40.0, 50.0])


def test_triplet_from_threshold_in_user_materials():
    # was a strict xfail (+10 to +16 % from 3 to 50 MeV: Tsai's high-energy form times a threshold factor). On the
    # compilation's own nodes from 2.8 MeV: between nodes its reader interpolates linearly in energy, which at
    # 3.0 MeV puts the reference 5 % above its own curve (nodes 2.8 and 3.2 MeV bracket it)
    for name in ("lead", "water", "graphite", "sodium-iodide"):
        assert np.max(np.abs(user_deviation(name, TRIPLET_NODES_MEV, "pair_electron"))) <= 0.025, name  # reached 2.2 %


def triplet_deviation(z, e):
    symbol, a = element_symbol_and_mass(z)
    return pair_electron(e, z, a) / mu(Flag.MU_TRIPLET, z, e * 1e3) - 1.0


@pytest.mark.parametrize("first, tol", [(2.8, 0.025), (3.2, 0.015)])
def test_triplet_every_element_on_the_compilation_nodes(first, tol):
    # free-electron QED cross section times Tsai's screening factor; reached 2.4 % at 2.8 MeV (Z = 95) and 1.3 %
    # from 3.2 to 50 MeV for every Z = 1-98 (median 0.6 %)
    e = TRIPLET_NODES_MEV[TRIPLET_NODES_MEV >= first]
    assert max(np.max(np.abs(triplet_deviation(z, e))) for z in range(1, 99)) <= tol
