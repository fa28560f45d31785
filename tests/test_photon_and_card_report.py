"""The photon report in house words (CSV contract, the detector's photon map, per-material tables) and the
material card grouped by task, on the demo spec and on a spec written by formula and mixture."""
import numpy as np
import pytest

from refgen import attenuation
from refgen.physics.photons import mixture_coefficients
from refgen.report import make_report
from refgen.spec import parse_spec

USER_SPEC = """\
experiment: {name: Test rig, revision: r1}
particles: [muon, electron]
shower_energies: [0.5 GeV, 2 GeV]
materials:
  glass: {formula: SiO2, density: 2.2 g/cm3}
  counting-gas: {mixture: {Ar: 90, CH4: 10}, by: volume, temperature: 20 degC, pressure: 1 atm}
  scint: {formula: C9H10, density: 1.032 g/cm3, mean_excitation_energy: 64.7 eV, refractive_index: 1.58}
  absorber: {formula: Pb, density: 11.35 g/cm3}
layers:
  - {name: window, material: glass, thickness: 1 mm, system: support}
  - {name: chamber, material: counting-gas, thickness: 5 cm, system: tracking}
  - name: sampler
    system: em-calorimeter
    repeat: 10
    cell: [{material: absorber, thickness: 2 mm}, {material: scint, thickness: 4 mm, active: true}]
"""


@pytest.fixture(scope="module")
def user_report():
    return make_report(parse_spec(USER_SPEC))


@pytest.fixture(scope="module")
def demo_report(demo_spec):
    return make_report(demo_spec)


def test_photon_csv_has_the_contract_columns_in_order(user_report):
    header, rows = user_report["csv_tables"]["data/photon/absorber.csv"]
    assert header == ["energy_MeV", "total_cm2_g", "photoabsorption_cm2_g", "compton_cm2_g", "rayleigh_cm2_g",
                      "pair_cm2_g", "pair_electron_field_share"]
    a = np.array(rows)
    # the four processes add up to the total; the share is a fraction, zero below 4 m_e c^2 (2.044 MeV)
    assert a[:, 2:6].sum(axis=1) == pytest.approx(a[:, 1], rel=1e-12)
    assert ((a[:, 6] >= 0) & (a[:, 6] <= 1)).all()
    assert (a[a[:, 0] < 2.04, 6] == 0).all()


def test_pair_share_matches_the_two_fields_of_the_physics(user_report):
    spec = parse_spec(USER_SPEC)
    m = spec.materials["glass"]
    e = np.array([5.0, 50.0, 5e3])
    z, a, w = m.arrays()
    c = mixture_coefficients(e, z, a, w, attenuation.symbols_of(m))
    h = attenuation.house_curves(c)
    assert h["pair"] == pytest.approx(c["pair_nuclear"] + c["pair_electron"], rel=1e-12)
    assert h["pair_electron_field_share"] == pytest.approx(c["pair_electron"] / (c["pair_nuclear"] + c["pair_electron"]))
    # common practice: the electron-field (triplet) share at high energy is roughly 1/(Z+1); for SiO2 (Z ~ 10) ~ 0.1
    assert 0.05 < h["pair_electron_field_share"][-1] < 0.15


def test_photon_map_follows_the_stack_and_marks_the_spec_energies(user_report):
    pm = user_report["photon_map"]
    assert [r["material"] for r in pm["rows"]] == ["glass", "counting-gas", "absorber", "scint"]
    assert pm["range_MeV"] == pytest.approx([1e-2, 2e4])  # derived: 10 keV to ten times 2 GeV
    assert [m["MeV"] for m in pm["marks"]] == pytest.approx([500.0, 1000.0, 2000.0])
    lead = pm["rows"][2]
    assert [b["process"] for b in lead["bands"]] == ["photoabsorption", "Compton scattering", "pair conversion"]
    assert lead["bands"][0]["from_MeV"] == pytest.approx(1e-2) and lead["bands"][-1]["to_MeV"] == pytest.approx(2e4)


def test_material_photon_table_shares_add_to_one(user_report):
    rows = user_report["photon_tables"]["absorber"]
    assert [r["energy"] for r in rows] == ["100 keV", "1 MeV", "10 MeV", "500 MeV", "1 GeV", "2 GeV"]
    for r in rows:
        assert sum(r["shares"].values()) == pytest.approx(1.0)
    # lead at 100 keV: photoabsorption takes most photons (above the K edge at 88 keV; common practice)
    assert rows[0]["dominant"] == "photoabsorption"
    assert rows[-1]["dominant"] == "pair conversion"


def test_card_groups_by_task_with_one_unit_per_value(user_report):
    for name, groups in user_report["material_cards"].items():
        titles = [g["title"] for g in groups]
        assert titles[:4] == ["The material", "Tracking", "Calorimetry", "Hadrons and muons"]
        labels = [r["label"] for g in groups for r in g["rows"]]
        assert "Nuclear collision length" not in labels
        assert all(isinstance(r["unit"], str) and "=" not in r["unit"] for g in groups for r in g["rows"])
        assert ("Identification" in titles) == (name == "scint")
    kn = user_report["key_numbers"]["materials"]
    # both unit systems and the off-page numbers stay in the key numbers
    for m in kn.values():
        assert m["critical_energy_MeV"]["positron"] > 0 and m["nuclear_collision_length_g_cm2"] > 0
        assert m["radiation_length_g_cm2"] == pytest.approx(m["radiation_length_cm"] * m["density_g_cm3"])
    # gas lengths are shown in m, condensed ones in cm; a gas's minimum ionisation in keV/cm
    gas = {r["label"]: r for g in user_report["material_cards"]["counting-gas"] for r in g["rows"]}
    assert gas["Radiation length"]["unit"] == "m" and gas["Minimum ionisation"]["unit"] == "keV/cm"
    lead = {r["label"]: r for g in user_report["material_cards"]["absorber"] for r in g["rows"]}
    assert lead["Radiation length"]["unit"] == "cm"
    # Cherenkov threshold of the scintillator: beta-gamma = 1/sqrt(n^2 - 1) = 1/sqrt(1.4964) = 0.81748 for n = 1.58 (hand computation)
    assert kn["scint"]["refractive_index"]["cherenkov_threshold_beta_gamma"] == pytest.approx(0.81748, rel=1e-4)


def test_most_probable_loss_in_1_mm_of_silicon(demo_report):
    # Review of Particle Physics (2024), Sec. 34.2.9, silicon figure of Delta_p/x against thickness (read from memory):
    # near minimum ionisation Delta_p/x rises from about 0.27 keV/um in 320 um to about 0.28-0.29 keV/um in 640 um and
    # more; 1 mm therefore gives 270-300 keV
    mpv = demo_report["key_numbers"]["materials"]["silicon"]["mip_most_probable_in_1_mm_MeV"]
    assert 0.27 < mpv < 0.30


def test_demo_radiators_have_consistent_indices(demo_spec):
    from refgen.physics.cherenkov import HC_EV_NM, refractive_index
    gas = demo_spec.materials["radiator-gas"]
    # CRC Handbook of Chemistry and Physics, refractive index of gases (from memory): carbon dioxide at 0 degC,
    # 101.325 kPa and 589 nm has (n - 1) = 449e-6
    n_ref = refractive_index(gas.refractive_index, HC_EV_NM / 589.3, 1.0)
    assert n_ref - 1.0 == pytest.approx(449e-6, rel=2e-3)
    # the spec's 20 degC and 1.3 atm: (n - 1) scales with the ideal-gas density, 1.3 x 273.15 / 293.15
    assert gas.index_density_ratio == pytest.approx(1.3 * 273.15 / 293.15, rel=1e-6)
    # silica aerogel: n - 1 = 0.21 rho [g/cm3] (common practice); the demo's n = 1.025 at 0.12 g/cm3
    aerogel = demo_spec.materials["aerogel"]
    assert aerogel.refractive_index.value - 1.0 == pytest.approx(0.21 * aerogel.density, rel=0.02)
