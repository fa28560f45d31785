"""Spec parsing: units, fractions, gases, and one clear message per problem with its YAML line."""
import pytest

from refgen.errors import SpecError
from refgen.spec import parse_spec

BASE = """\
experiment: {name: Test rig, revision: r1}
particles: [muon, proton]
materials:
  si: {library: silicon}
  gas: {mixture: {Ar: 70, CO2: 30}, by: volume, temperature: 20 degC, pressure: 1 atm}
layers:
  - {name: det, material: si, thickness: 300 um, system: tracking}
"""


def problems(text, strict=False):
    with pytest.raises(SpecError) as exc:
        parse_spec(text, "t.yaml", strict=strict)
    return [str(p) for p in exc.value.problems]


def test_minimal_spec_parses_with_units_resolved():
    spec = parse_spec(BASE)
    assert spec.layers[0].thickness == pytest.approx(0.03)
    assert [s.key for s in spec.species] == ["muon", "proton"]


def test_gas_mixture_by_volume_uses_ideal_gas_density():
    # Ar/CO2 70/30 by volume at 20 degC, 1 atm: M = 0.7*39.95 + 0.3*44.009 = 41.17 g/mol,
    # rho = P M / (R T) = 101325 * 41.17 / (8.3145 * 293.15) = 1.7115e-3 g/cm3 (hand computation)
    m = parse_spec(BASE).materials["gas"]
    assert m.density == pytest.approx(1.7115e-3, rel=1e-3)
    # mass fraction of argon = 0.7*39.95/41.17
    assert m.mass_fractions["Ar"] == pytest.approx(0.7 * 39.95 / 41.17, rel=1e-3)


def test_gas_at_other_pressure_scales():
    text = BASE.replace("pressure: 1 atm", "pressure: 2 atm")
    assert parse_spec(text).materials["gas"].density == pytest.approx(2 * 1.7115e-3, rel=1e-3)


def test_gas_without_conditions_gets_a_note():
    text = BASE.replace(", temperature: 20 degC, pressure: 1 atm", "")
    spec = parse_spec(text)
    assert spec.materials["gas"].is_gas
    assert "material 'gas': gas without temperature and pressure; 20 degC and 1 atm assumed" in spec.notes


def test_photon_range_without_one_is_derived_from_the_shower_energies():
    # 10 keV to ten times the largest shower energy (2 GeV), with a note saying so
    spec = parse_spec(BASE + "shower_energies: [0.5 GeV, 2 GeV]\n")
    assert (spec.photon_energy.start, spec.photon_energy.stop) == pytest.approx((1e-2, 2e4))
    assert any(n.startswith("photon_energy not given: 10 keV to 20 GeV") for n in spec.notes)
    # the default showers reach 100 GeV: ten times that lies beyond the photon model, so the range stops at its edge
    spec = parse_spec(BASE)
    assert spec.photon_energy.stop == pytest.approx(1e5)
    # a range given in the spec is used as it is, without a note
    spec = parse_spec(BASE + "photon_energy: {from: 30 keV, to: 5 GeV}\n")
    assert (spec.photon_energy.start, spec.photon_energy.stop) == pytest.approx((3e-2, 5e3))
    assert not any(n.startswith("photon_energy") for n in spec.notes)


def test_fractions_in_percent_or_unit_sum_are_accepted():
    a = parse_spec(BASE).materials["gas"]
    b = parse_spec(BASE.replace("{Ar: 70, CO2: 30}", "{Ar: 0.7, CO2: 0.3}")).materials["gas"]
    assert a.mass_fractions == pytest.approx(b.mass_fractions)


def test_fractions_that_do_not_add_up_are_rejected():
    assert problems(BASE.replace("{Ar: 70, CO2: 30}", "{Ar: 70, CO2: 20}")) == [
        "line 5: materials.gas.mixture: fractions add up to 90; they must add up to 1 or to 100 (within 1%)"]


def test_misspelt_key_is_an_error_naming_the_closest_key():
    text = BASE.replace("thickness: 300 um", "thicknes: 300 um, thickness: 300 um")
    assert problems(text) == ["line 7: layers[0].thicknes: unknown key 'thicknes'; did you mean 'thickness'?"]


def test_near_miss_fractions_are_normalised_with_a_warning_fatal_when_strict():
    text = BASE.replace("{Ar: 70, CO2: 30}", "{Ar: 70, CO2: 30.5}")
    assert parse_spec(text).warnings == ("line 5: materials.gas.mixture: fractions add up to 100.5, not 100; normalised",)
    assert problems(text, strict=True) == [
        "line 5: materials.gas.mixture: fractions add up to 100.5, not 100; normalised (a warning, fatal with --strict)"]


def test_wrong_unit_names_the_field_and_line():
    assert problems(BASE.replace("300 um", "300 g/cm3")) == [
        "line 7: layers[0].thickness: '300 g/cm3' is not a length; expected e.g. '150 um, 1.2 cm'"]


def test_unknown_element_names_the_field_and_line():
    out = problems(BASE.replace("CO2: 30", "Qx2: 30"))
    assert len(out) == 1 and out[0].startswith("line 5: materials.gas.mixture: cannot read chemical formula 'Qx2'")


def test_every_problem_is_reported_at_once():
    text = BASE.replace("300 um", "-1 um").replace("muon, proton", "muon, protn").replace("library: silicon", "library: silicone")
    assert problems(text) == [
        "line 2: particles[1]: unknown particle 'protn'; did you mean 'proton'?",
        "line 4: materials.si.library: 'silicone' is not in the built-in material library; did you mean 'silicon'?",
        "line 7: layers[0].thickness: must be greater than zero (got '-1 um')",
    ]


def test_yaml_syntax_error_has_line_and_column():
    out = problems("experiment: {name: x\nparticles: [muon\n")
    assert len(out) == 1 and out[0].startswith("line ") and "YAML syntax error, column" in out[0]


def test_custom_species():
    text = BASE.replace("[muon, proton]", "[muon, {lambda0: {mass: 1115.7 MeV, charge: 1}}]")
    lam = parse_spec(text).species[1]
    assert (lam.key, lam.mass, lam.charge, lam.custom) == ("lambda0", 1115.7, 1, True)
