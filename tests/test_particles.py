"""Built-in particle masses against independent references: scipy.constants (CODATA) and the particle package."""
import pytest
import scipy.constants as sc
from particle import Particle

from refgen import datafiles

MeV = 1e6 * sc.e


@pytest.mark.parametrize("key, codata_kg", [
    ("electron", sc.m_e), ("muon", sc.physical_constants["muon mass"][0]), ("proton", sc.m_p),
    ("deuteron", sc.physical_constants["deuteron mass"][0]), ("triton", sc.physical_constants["triton mass"][0]),
    ("helion", sc.physical_constants["helion mass"][0]), ("alpha", sc.physical_constants["alpha particle mass"][0]),
])
def test_masses_against_codata(key, codata_kg):
    mass = codata_kg * sc.c ** 2 / MeV
    assert datafiles.particles()[key]["mass"] == pytest.approx(mass, rel=2e-9)


@pytest.mark.parametrize("key, pdgid", [("pion", 211), ("kaon", 321), ("muon", 13), ("proton", 2212), ("pion-minus", -211)])
def test_masses_against_particle_package(key, pdgid):
    assert datafiles.particles()[key]["mass"] == pytest.approx(Particle.from_pdgid(pdgid).mass, rel=1e-6)


def test_charges_are_ints():
    for p in datafiles.particles().values():
        assert isinstance(p["charge"], int)
