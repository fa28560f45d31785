"""Regression pins: key numbers of the demo handbook (project_spec/kestrel-forward.yaml).

These are refgen's own outputs, pinned so that any change to them is deliberate: when physics is improved on
purpose, update the value here in the same commit and say why in its message. The physics itself is checked
against outside references in tests/physics/.
"""
import pytest

from refgen.report import make_report

PINS = [
    ("materials.silicon.min_ionization.dedx_MeV_cm2_g", 1.6628918800286498),
    ("materials.crystal.radiation_length_cm", 0.8924137738390441),
    ("materials.crystal.moliere_radius_cm", 2.0244748584049206),
    ("materials.iron.nuclear_interaction_length_g_cm2", 132.1),
    ("materials.iron.muon_critical_energy_GeV", 344.0116265542506),
    ("materials.drift-gas.density_g_cm3", 0.0017113905631388612),
    ("materials.radiator-gas.density_g_cm3", 0.002378358846404623),
    ("materials.crystal.photon.compton_pair_crossover_MeV", 5.364599552912574),
    ("materials.silicon.photon.mass_attenuation_cm2_g.1", 0.06354225203542523),
    ("layers.pixel-1.mip_most_probable_MeV", 0.037281641330929545),
    ("layers.pixel-1.mip_carriers", 10298.795947770592),
    ("layers.drift-chamber.theta0_mrad_at_1_GeV_c", 0.7274246495255943),
    ("layers.crystal-calorimeter.x_over_X0", 24.652241644992724),
    ("layers.hadron-calorimeter.x_over_lambda_I", 6.214532255886268),
    ("layers.hadron-calorimeter.scintillator.mip_photons", 9839.135729714804),
    ("reach_momentum_GeV_c.muon.muon-chamber-2", 2.7201915762903712),
    ("reach_momentum_GeV_c.proton.crystal-calorimeter", 0.3801644202880525),
    ("tracking_volume.photon_conversion_probability_at_1_GeV", 0.020006781017785136),
    ("radiators.threshold-aerogel.threshold_momentum_GeV_c.kaon", 2.1941200000000016),
    ("radiators.gas-radiator.photoelectrons_at_beta_1", 21.996266627968975),
    ("calorimeters.em-calorimeter.shower.10.containment_fraction", 0.9975659614796911),
    ("calorimeters.hadron-calorimeter.sampling_fraction_mip", 0.03415877962067945),
    ("tracking_layout.x_over_X0_to_last_plane", 0.026556407496581846),
    ("tracking_resolution.muon.parts_equal_at_GeV_c", 14.400457976434316),
]


@pytest.fixture(scope="module")
def key_numbers(demo_spec):
    return make_report(demo_spec)["key_numbers"]


def lookup(kn, dotted):
    parts = dotted.split(".")
    node = kn
    i = 0
    while i < len(parts):
        part = parts[i]
        if isinstance(node, list):
            node = next(item for item in node if item["name"] == part)
        elif part in node:
            node = node[part]
        else:  # keys that contain a dot, such as the energy "0.1"
            j = next(j for j in range(i + 2, len(parts) + 1) if ".".join(parts[i:j]) in node)
            node = node[".".join(parts[i:j])]
            i = j - 1
        i += 1
    return node


@pytest.mark.parametrize("key, value", PINS, ids=[p[0] for p in PINS])
def test_demo_key_number_is_pinned(key_numbers, key, value):
    assert lookup(key_numbers, key) == pytest.approx(value, rel=1e-9)
