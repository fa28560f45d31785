"""Built-in species and physical constants against references outside refgen's own lookup.

refgen reads masses from the particle package (by PDG id) and bare-nucleus masses and constants from
scipy.constants; these checks compare them with something else: CODATA where refgen reads the particle
package, the particle package's atomic masses where refgen reads CODATA, and published values from the Review
of Particle Physics otherwise (marked where typed from memory).
"""
import pytest
import scipy.constants as sc
from particle import Particle

from refgen import datafiles
from refgen.spec import parse_spec
from tests.test_spec import BASE

MeV = 1e6 * sc.e


@pytest.mark.parametrize("key, codata_kg", [
    ("electron", sc.m_e), ("muon", sc.physical_constants["muon mass"][0]), ("proton", sc.m_p),
])
def test_masses_read_from_the_particle_package_agree_with_codata(key, codata_kg):
    # CODATA (scipy.constants, in kg) converted with e and c, not the MeV value refgen could have read directly
    assert datafiles.particles()[key]["mass"] == pytest.approx(codata_kg * sc.c ** 2 / MeV, rel=2e-9)


@pytest.mark.parametrize("key, pdgid, z", [("deuteron", 1000010020, 1), ("triton", 1000010030, 1),
                                           ("helion", 1000020030, 2), ("alpha", 1000020040, 2)])
def test_nucleus_masses_agree_with_atomic_masses_minus_electrons(key, pdgid, z):
    # the particle package lists the atom (nucleus + Z electrons - binding of Z electrons, below 100 eV)
    atom = Particle.from_pdgid(pdgid).mass
    nucleus = atom - z * datafiles.particles()["electron"]["mass"]
    assert datafiles.particles()[key]["mass"] == pytest.approx(nucleus, abs=1e-4)
    assert datafiles.particles()[key]["mass"] > nucleus  # binding energy: the bare nucleus is heavier


@pytest.mark.parametrize("key, mass", [
    # Review of Particle Physics (2024) summary tables (from memory): m(pi+-) = 139.57039(18) MeV,
    # m(K+-) = 493.677(16) MeV
    ("pion", 139.57039), ("pion-minus", 139.57039), ("kaon", 493.677), ("kaon-minus", 493.677),
])
def test_meson_masses_against_the_review(key, mass):
    assert datafiles.particles()[key]["mass"] == pytest.approx(mass, rel=2e-6)


def test_charges_are_ints_and_antiparticles_mirror_particles():
    p = datafiles.particles()
    assert all(isinstance(s["charge"], int) for s in p.values())
    assert [p[k]["charge"] for k in ("electron", "muon", "pion", "kaon", "proton", "deuteron", "helion", "alpha")] \
        == [-1, -1, 1, 1, 1, 1, 2, 2]
    for a, b in (("electron", "positron"), ("muon", "antimuon"), ("pion", "pion-minus"), ("kaon", "kaon-minus"),
                 ("proton", "antiproton")):
        assert p[a]["mass"] == p[b]["mass"] and p[a]["charge"] == -p[b]["charge"]


@pytest.mark.parametrize("typed, key", [
    ("pi-", "pion-minus"), ("pi+", "pion"), ("K+", "kaon"), ("k-", "kaon-minus"), ("mu+", "antimuon"),
    ("mu-", "muon"), ("anti-proton", "antiproton"), ("Anti Proton", "antiproton"), ("pbar", "antiproton"),
    ("He-3", "helion"), ("helium-3", "helion"), ("He-4", "alpha"), ("e+", "positron"), ("\u03c0\u2212", "pion-minus"),
    ("\u03bc+", "antimuon"), ("d", "deuteron"), ("proton", "proton"),
])
def test_names_physicists_type(typed, key):
    assert datafiles.find_particle(typed)["key"] == key


def test_typed_names_work_in_a_spec():
    spec = parse_spec(BASE.replace("particles: [muon, proton]", "particles: [pi-, K+, mu+, anti-proton, He-3]"))
    assert [s.key for s in spec.species] == ["pion-minus", "kaon", "antimuon", "antiproton", "helion"]
    assert [s.charge for s in spec.species] == [-1, 1, 1, -1, 2]


@pytest.mark.parametrize("name, published, rel", [
    # Review of Particle Physics (2024) Table 34.1, which rounds each to the digits shown
    ("dedx_constant_K", 0.307075, 2e-6),  # K = 4 pi N_A r_e^2 m_e c^2, MeV mol^-1 cm^2
    ("plasma_energy_coefficient", 28.816, 2e-5),  # hbar omega_p = 28.816 sqrt(rho <Z/A>) eV
    ("scale_energy_Es", 21.2052, 5e-6),  # E_s = sqrt(4 pi / alpha) m_e c^2, MeV
    ("frank_tamm_per_eV_cm", 369.81, 2e-5),  # alpha / (hbar c), eV^-1 cm^-1
    ("electron_mass", 0.51099895, 1e-8),
    ("classical_electron_radius", 2.8179403e-13, 1e-7),  # cm
])
def test_derived_constants_against_the_review(name, published, rel):
    assert datafiles.constant(name) == pytest.approx(published, rel=rel)


def test_no_shipped_table_types_masses_or_constants_from_memory():
    from importlib import resources
    data = resources.files("refgen.data")
    assert not data.joinpath("constants.csv").is_file()
    header = data.joinpath("particles.csv").read_text().splitlines()[1]
    assert header == "key,label,pdgid,codata_mass,aliases,source"  # no mass or charge column


@pytest.mark.parametrize("key, strong", [("electron", False), ("positron", False), ("muon", False),
                                         ("antimuon", False), ("pion", True), ("kaon-minus", True),
                                         ("proton", True), ("antiproton", True), ("deuteron", True), ("alpha", True)])
def test_which_built_in_species_meet_nuclear_interactions(key, strong):
    # PDG Monte Carlo numbering scheme, through the particle package: leptons do not, hadrons and nuclei do
    from refgen.handbook import strongly_interacting
    assert strongly_interacting(key, custom=False) is strong


def test_a_species_defined_by_mass_and_charge_is_not_classified():
    from refgen.handbook import strongly_interacting
    assert strongly_interacting("sigma-minus", custom=True) is None
