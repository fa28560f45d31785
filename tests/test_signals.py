"""Thin-sensor signals in the demo report, and the `threshold:` layer key."""
import math

import pytest

from refgen.report import make_report
from refgen.materials import library_material
from refgen.signals import shell_table
from refgen.spec import parse_spec
from tests.test_bad_input import run
from tests.test_spec import BASE


@pytest.fixture(scope="module")
def report(demo_spec):
    return make_report(demo_spec)


def signal_layers(report):
    return [l for l in report["key_numbers"]["layers"] if "straggling" in l]


def test_every_sensitive_single_slab_layer_has_a_distribution(report, demo_spec):
    expected = [l.name for l in demo_spec.layers if not l.is_sampling and l.slabs[0].active]
    assert [l["name"] for l in signal_layers(report)] == expected
    for l in signal_layers(report):
        cols, rows = report["csv_tables"][f"data/straggling/{report['layer_slugs'][l['name']]}.csv"]
        assert cols == ["energy_keV", "probability_per_keV"] + (["charge_fC"] if l["pair_energy_eV"] else [])
        assert len(rows) > 100


def test_mode_is_the_most_probable_loss_key_number(report):
    # the consistency rule: same physics, shared helper, within 1 %
    for l in signal_layers(report):
        assert l["straggling"]["most_probable_keV"] == pytest.approx(l["mip_most_probable_MeV"] * 1e3, rel=0.01)


def test_distributions_are_normalised(report):
    for l in signal_layers(report):
        assert l["straggling"]["normalisation"] == pytest.approx(1.0, abs=0.01)


def test_threshold_numbers_in_the_spec_unit(report):
    by_name = {l["name"]: l for l in signal_layers(report)}
    strip = by_name["strip-1"]
    assert strip["threshold"]["unit"] == "fC" and strip["threshold_for_99_percent"]["unit"] == "fC"
    # 1 fC = 1/1.602176634e-4 pairs of 3.62 eV in silicon (CODATA 2018 e; W from the library)
    assert strip["threshold"]["keV"] == pytest.approx(1.0 / 1.602176634e-4 * 3.62e-3, rel=1e-9)
    t99 = strip["threshold_for_99_percent"]
    assert t99["value"] == pytest.approx(t99["keV"] / 3.62e-3 * 1.602176634e-4, rel=1e-9)
    for l in by_name.values():
        if "threshold" in l:
            assert 0.0 <= l["mip_efficiency_above_threshold"] <= 1.0
            assert l["threshold_for_99_percent"]["keV"] < l["straggling"]["most_probable_keV"]


def test_angle_dependence(report):
    for l in signal_layers(report):
        rows = l["straggling"]["angles"]
        assert [r["angle_deg"] for r in rows] == [0, 10, 20, 30, 40, 50, 60]
        assert rows[-1]["path_factor"] == pytest.approx(2.0)
        mpv = [r["most_probable_keV"] for r in rows]
        assert all(b > a for a, b in zip(mpv, mpv[1:]))
        # the most probable loss grows faster than the path (xi ln xi), as Eq. 34.12 says
        assert mpv[-1] > 2.0 * mpv[0]
        if "threshold" in l:
            eff = [r["efficiency"] for r in rows]
            assert all(b >= a - 1e-12 for a, b in zip(eff, eff[1:]))


def test_silicon_shells():
    # all 14 electrons, the K shell (2 of 14) at the Si K edge, 1.839 keV (Elam et al. 2002)
    energies, fractions = shell_table(library_material("silicon"))
    assert fractions.sum() == pytest.approx(1.0)
    assert energies[0] == pytest.approx(1839.0, rel=1e-3)
    assert fractions[0] == pytest.approx(2 / 14)


def test_threshold_as_charge_energy_or_electrons():
    for text, kev in (("0.8 fC", 0.8 / 1.602176634e-4 * 3.62e-3), ("3000 e", 3000 * 3.62e-3), ("25 keV", 25.0)):
        spec = parse_spec(BASE.replace("system: tracking}", f"system: tracking, threshold: {text}}}"))
        thr = spec.layers[0].threshold
        assert thr.energy * 1e3 == pytest.approx(kev, rel=1e-9)
        assert thr.value * 1.0 == pytest.approx(float(text.split()[0]))
        assert thr.unit == text.split()[1]
        assert math.isclose(thr.energy * thr.units_per_MeV, thr.value)


GAS_LAYER = "  - {name: chamber, material: gas, thickness: 1 cm, system: tracking, threshold: 0.1 fC}\n"
BAD = [
    ("charge without pair energy", BASE + GAS_LAYER,
     ["line 8: layers[1].threshold: a threshold given as a charge needs the pair_energy of material 'gas' (mean "
      "energy per ionisation carrier); give it, or write the threshold as an energy"]),
    ("not an energy or a charge", BASE.replace("system: tracking}", "system: tracking, threshold: 3 mm}"),
     ["line 7: layers[0].threshold: '3 mm' is not an energy or a charge; expected e.g. '25 keV', '0.8 fC' or '3000 e'"]),
    ("no unit", BASE.replace("system: tracking}", "system: tracking, threshold: 3000}"),
     ["line 7: layers[0].threshold: '3000' has no unit; write it with one, e.g. '25 keV', '0.8 fC' or '3000 e'"]),
    ("zero", BASE.replace("system: tracking}", "system: tracking, threshold: 0 fC}"),
     ["line 7: layers[0].threshold: must be greater than zero (got '0 fC')"]),
    ("not sensitive", BASE.replace("system: tracking}", "system: tracking, active: false, threshold: 1 fC}"),
     ["line 7: layers[0].threshold: layer 'det' is not a sensitive single-slab layer; a threshold needs one "
      "(set active: true, or remove the threshold)"]),
]


@pytest.mark.parametrize("case, text, expected", BAD, ids=[c[0] for c in BAD])
def test_bad_threshold(tmp_path, capsys, case, text, expected):
    rc, out, err = run(tmp_path, text, capsys=capsys)
    assert (rc, out.exists(), err) == (2, False, expected)
