"""The identification spec keys (timing, samples, truncation, start_time): accepted values reach the model, and
each bad value is one pinned message naming the field and its YAML line, exit status 2, nothing written."""
import pytest

from refgen.spec import parse_spec
from tests.test_bad_input import run
from tests.test_spec import BASE, problems

GAS_LAYER = "  - {name: chamber, material: gas, thickness: 50 cm, system: tracking, samples: 100}\n"


def test_keys_reach_the_model():
    spec = parse_spec(BASE.replace("system: tracking}", "system: tracking, timing: 0.05 ns}")
                      + "  - {name: chamber, material: gas, thickness: 50 cm, system: tracking, samples: 100, truncation: 0.6}\n"
                      + "start_time: 20 ps\n")
    det, chamber = spec.layers
    assert det.timing_ps == pytest.approx(50.0)
    assert (chamber.samples, chamber.truncation, chamber.timing_ps) == (100, 0.6, None)
    assert spec.start_time_ps == pytest.approx(20.0)


def test_defaults():
    spec = parse_spec(BASE + GAS_LAYER)
    assert spec.start_time_ps is None and spec.layers[1].truncation is None and spec.layers[0].samples is None


BAD = [
    ("zero timing", BASE.replace("system: tracking}", "system: tracking, timing: 0 ps}"),
     ["line 7: layers[0].timing: must be greater than zero (got '0 ps')"]),
    ("timing not a time", BASE.replace("system: tracking}", "system: tracking, timing: 30 mm}"),
     ["line 7: layers[0].timing: '30 mm' is not a time; expected e.g. '30 ps, 0.1 ns'"]),
    ("negative start time", BASE.replace("system: tracking}", "system: tracking, timing: 30 ps}") + "start_time: -5 ps\n",
     ["line 8: start_time: must be greater than zero (got '-5 ps')"]),
    ("samples on silicon", BASE.replace("system: tracking}", "system: tracking, samples: 10}"),
     ["line 7: layers[0].samples: samples needs a gaseous tracking layer (a single gas slab with system: tracking); "
      "layer 'det' is tracking, made of si, not a gas"]),
    ("samples on a gas muon chamber", BASE + GAS_LAYER.replace("system: tracking", "system: muon"),
     ["line 8: layers[1].samples: samples needs a gaseous tracking layer (a single gas slab with system: tracking); "
      "layer 'chamber' is muon, made of gas"]),
    ("samples not a whole number", BASE + GAS_LAYER.replace("samples: 100", "samples: 12.5"),
     ["line 8: layers[1].samples: samples must be a whole number from 1 to 10000 (got 12.5)"]),
    ("truncation above 1", BASE + GAS_LAYER.replace("samples: 100", "samples: 100, truncation: 1.2"),
     ["line 8: layers[1].truncation: truncation is the kept fraction of the samples, a number in (0, 1] (got 1.2)"]),
    ("truncation zero", BASE + GAS_LAYER.replace("samples: 100", "samples: 100, truncation: 0"),
     ["line 8: layers[1].truncation: truncation is the kept fraction of the samples, a number in (0, 1] (got 0)"]),
    ("truncation without samples", BASE + GAS_LAYER.replace("samples: 100", "truncation: 0.7"),
     ["line 8: layers[1].truncation: truncation needs 'samples' on the same layer"]),
]


@pytest.mark.parametrize("case, text, expected", BAD, ids=[c[0] for c in BAD])
def test_bad_identification_keys(tmp_path, capsys, case, text, expected):
    rc, out, err = run(tmp_path, text, capsys=capsys)
    assert rc == 2
    assert not out.exists()
    assert err == expected


def test_start_time_without_a_timing_layer_warns():
    # a warning, fatal in strict mode
    found = problems(BASE + "start_time: 20 ps\n", strict=True)
    assert [str(p) for p in found] == ["line 8: start_time: start_time is given but no layer has 'timing'; it is not "
                                       "used (a warning, fatal with --strict)"]
