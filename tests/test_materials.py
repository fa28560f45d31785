"""Material model: derived constants against published values, formula fractions against hand computation."""
import math
import subprocess
import sys
from pathlib import Path

import periodictable
import pytest

from refgen import datafiles
from refgen.materials import library_material, mass_fractions_of_formula, parse_formula

ROOT = Path(__file__).resolve().parent.parent


@pytest.mark.parametrize("key, z_over_a, rel, source", [
    ("water", 0.55509, 2e-5, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("silicon", 0.49848, 2e-5, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("lead", 0.39575, 2e-5, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("polystyrene", 0.53768, 2e-5, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("air", 0.49919, 1e-4, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
])
def test_z_over_a(key, z_over_a, rel, source):
    assert library_material(key).z_over_a == pytest.approx(z_over_a, rel=rel), source


@pytest.mark.parametrize("key, plasma_eV, rel, source", [
    ("silicon", 31.05, 1e-3, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("water", 21.47, 1e-3, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("lead", 61.07, 1e-3, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
    ("iron", 55.17, 1e-3, "Review of Particle Physics, atomic and nuclear properties (from memory)"),
])
def test_plasma_energy(key, plasma_eV, rel, source):
    assert library_material(key).plasma_energy_eV == pytest.approx(plasma_eV, rel=rel), source


def test_formula_mass_fractions_by_hand():
    # hand computation with A(Pb)=207.2, A(W)=183.84, A(O)=15.999: M = 455.036 g/mol
    w = mass_fractions_of_formula(parse_formula("PbWO4"))
    assert w[82] == pytest.approx(207.2 / 455.036, rel=1e-5)
    assert w[74] == pytest.approx(183.84 / 455.036, rel=1e-5)
    assert w[8] == pytest.approx(4 * 15.999 / 455.036, rel=1e-5)


def test_water_fractions_by_hand():
    # H2O with A(H)=1.008, A(O)=15.999: w_H = 2.016/18.015
    w = mass_fractions_of_formula(parse_formula("H2O"))
    assert w[1] == pytest.approx(2.016 / 18.015, rel=1e-4)


def test_every_library_material_has_fractions_summing_to_one_and_a_source():
    lib = datafiles.library_materials()
    assert len(lib) >= 35
    for key in lib:
        m = library_material(key)
        assert math.fsum(c.mass_fraction for c in m.components) == pytest.approx(1.0, abs=1e-12), key
        assert m.density > 0 and m.mean_excitation_eV > 0, key
        assert lib[key]["source"], key


def test_elements_atomic_weights_match_periodictable():
    # independent reference library: periodictable's IUPAC standard atomic weights
    for el in datafiles.elements():
        assert el["A"] == pytest.approx(periodictable.elements[el["Z"]].mass, rel=1e-5), el["symbol"]


def test_elements_table_regenerates_from_its_script():
    out = subprocess.run([sys.executable, str(ROOT / "tools" / "make_elements.py")], capture_output=True, text=True,
                         check=True).stdout
    assert out == (ROOT / "refgen" / "data" / "elements.csv").read_text()


def test_standard_rock_convention():
    # common practice: standard rock is Z = 11, A = 22, 2.65 g/cm3 (Lohmann, Kopp & Voss, CERN 85-03)
    m = library_material("standard-rock")
    assert (m.components[0].Z, m.components[0].A, m.density) == (11, 22.0, 2.65)
    assert m.z_over_a == pytest.approx(0.5)
