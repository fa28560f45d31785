"""Every number in key-numbers.json is finite or an explicit null, and nulls appear only where a reason exists."""
import json
import math

from refgen.render import json_bytes
from refgen.report import make_report

# Keys that may be null, each with the reason shown on the pages.
NULLABLE = {
    "mip_carriers": "no mean energy per carrier (W) for this material",
    "mip_signal_fC": "no mean energy per carrier (W) for this material",
    "pair_energy_eV": "no mean energy per carrier (W) for this material",
    "mip_most_probable_MeV": "thick layer: see mip_most_probable_note",
    "mip_fwhm_MeV": "thick layer: see mip_most_probable_note",
    "mip_most_probable_note": "only set when the peak is not given",
    "temperature_K": "not a gas", "pressure_Pa": "not a gas", "conditions_as_given": "not a gas",
    "index_conditions_as_given": "the index was given at the material's own conditions",
    "efficient_from_GeV_c": "the lighter species never reaches 3 photoelectrons below the heavier one's threshold",
    "separated_up_to_GeV_c": "never separated at 3 sigma in the momentum range",
    "most_probable_fC": "no mean energy per carrier (W) for this material",
    "efficiency": "no threshold on this layer (straggling angle table)",
    "separated_from_GeV_c": "never separated at 3 sigma where both species reach the layer",
    "separation_sigma_at_1_GeV_c": "a species does not reach the layer at 1 GeV/c",
    "time_difference_ps_at_1_GeV_c": "a species does not reach the layer at 1 GeV/c",
    "start_time_resolution_ps": "no start_time in the spec: the start is taken as exact",
    "resolution_note": "only set when the resolution is outside the fit's range",
    "sampling_fraction_mip": "no active slab", "stochastic_term_fraction_sqrt_GeV": "no active slab",
    "momentum_note": "only set when the momentum is not measured",
    "energy_loss_flag_below_GeV_c": "no momentum of the grid loses more than 5 %",
    "unreachable_below_GeV_c": "the species reaches the last measuring layer at every momentum",
    "parts_equal_at_GeV_c": "no material or no field",
    **{column: "the species stops before the last measuring layer at this momentum (or no field for sigma(p)/p)"
       for column in ("sigma_p_over_p", "sigma_p_over_p_measurement", "sigma_p_over_p_scattering", "sigma_origin_um",
                      "sigma_angle_mrad", "momentum_loss_fraction")},
}


def walk(node, path=""):
    if isinstance(node, dict):
        for k, v in node.items():
            yield from walk(v, f"{path}.{k}")
    elif isinstance(node, list):
        for i, v in enumerate(node):
            yield from walk(v, f"{path}[{i}]")
    else:
        yield path, node


def test_key_numbers_are_finite_or_null_with_a_reason(demo_spec):
    kn = json.loads(json_bytes(make_report(demo_spec)["key_numbers"]))
    for path, value in walk(kn):
        if isinstance(value, float):
            assert math.isfinite(value), path
        if value is None:
            leaf = path.rsplit(".", 1)[-1].split("[")[0]
            # reach momenta are null where the species cannot reach the layer by continuous slowing down
            assert leaf in NULLABLE or path.startswith((".reach_momentum_GeV_c.", ".cross_momentum_GeV_c.")), path
