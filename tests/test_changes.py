"""Change tracking: spec summary, numbers against notes, floors, readable names, exit codes of `refgen compare`.

The cases are the ones a CI job meets: a density changed, a layer added and one removed, identical files,
noise-level differences. (The thick-layer case on the demo spec is in tests/site/test_ci_job.py.)
"""
import copy
import json

import pytest

from refgen import changes
from refgen.changes import compare, counted, describe, text_report
from refgen.cli import main
from refgen.report import make_report
from refgen.spec import parse_spec
from tests.conftest import SMALL

BASE_TEXT = SMALL.read_text()


def key_numbers(text: str) -> dict:
    """Key numbers as written to key-numbers.json (through JSON, as a baseline is read back)."""
    return json.loads(json.dumps(make_report(parse_spec(text, "test.yaml"))["key_numbers"]))


@pytest.fixture(scope="module")
def base():
    return key_numbers(BASE_TEXT)


@pytest.fixture(scope="module")
def denser(base):
    return key_numbers(BASE_TEXT.replace("lead: {library: lead}", "lead: {library: lead, density: 11.0 g/cm3}"))


@pytest.fixture(scope="module")
def restacked():
    text = BASE_TEXT.replace("  - {name: air-gap, material: air, thickness: 20 cm, system: other}\n", "")
    text += "  - {name: paddle-5, material: paddle, thickness: 1 cm, system: tracking}\n"
    return key_numbers(text)


def write(tmp_path, name, data) -> str:
    path = tmp_path / name
    path.write_text(json.dumps(data))
    return str(path)


def test_key_numbers_carry_the_spec_summary(base):
    spec = base["spec"]
    assert [l["name"] for l in spec["layers"]][:2] == ["paddle-top", "air-gap"]
    assert spec["layers"][3] == {"name": "lead-plate-1", "system": "absorber", "thickness_cm": 5.0,
                                 "material": "lead", "active": False}
    assert spec["materials"]["lead"]["composition"] == "Pb 100 % by mass"
    assert set(spec["species"]) == {"muon", "electron", "proton"}


def test_density_changed(base, denser, tmp_path, capsys):
    c = compare(base, denser, 0.01)
    assert c["spec"]["changed"] == [{"kind": "material", "name": "lead",
                                     "fields": [{"field": "density", "old": "11.35 g/cm3", "new": "11.00 g/cm3"}]}]
    labels = {r["label"]: r for r in c["beyond"]}
    x0 = labels["radiation length of lead"]
    assert x0["unit"] == "cm" and x0["relative_change"] == pytest.approx(11.35 / 11.0 - 1, rel=1e-6)
    assert x0["change"] == "+3.182 %"
    moves = [abs(r["relative_change"]) for r in c["beyond"] if r["relative_change"] is not None]
    assert moves == sorted(moves, reverse=True)
    assert all(abs(r["relative_change"]) <= 0.01 for r in c["within"])
    # --all: lighter lead lets the muon reach the last paddle at lower momenta, so tracking-resolution numbers
    # are newly given there; they list first and would push the radiation length beyond the default 40 lines
    assert main(["compare", write(tmp_path, "a.json", base), write(tmp_path, "b.json", denser),
                 "--tolerance", "0.01", "--all"]) == 3
    out = capsys.readouterr().out.splitlines()
    assert out[:2] == ["Spec changes:", "  material lead: density 11.35 g/cm3 -> 11.00 g/cm3"]
    assert "  radiation length of lead: 0.5612 cm -> 0.5791 cm (+3.182 %)" in out


def test_layer_added_and_one_removed(base, restacked):
    c = compare(base, restacked, 1e6)
    spec = c["spec"]
    assert [(i["kind"], i["name"]) for i in spec["added"]] == [("layer", "paddle-5")]
    assert spec["added"][0]["what"] == "system tracking, thickness 1.000 cm, material paddle, active yes"
    assert [(i["kind"], i["name"]) for i in spec["removed"]] == [("layer", "air-gap")]
    assert [g["item"] for g in c["added"] if g["grouped"]] == ["layer paddle-5"]
    assert [g["item"] for g in c["removed"] if g["grouped"]] == ["layer air-gap"]
    assert c["n_added"] > 10 and c["n_removed"] > 10
    assert counted(c) == c["n_added"] + c["n_removed"] + len(c["beyond"])  # nothing moved by 1e6, yet it counts
    lines = text_report(c)
    assert "  layer paddle-5: added (system tracking, thickness 1.000 cm, material paddle, active yes)" in lines
    assert "  layer air-gap: removed" in lines


def test_identical_files_print_one_line_and_exit_0(base, tmp_path, capsys):
    path = write(tmp_path, "a.json", base)
    assert main(["compare", path, path]) == 0
    assert capsys.readouterr().out == "Nothing moved: the spec is the same and no key number changed beyond rounding.\n"


def _perturb(node, factor):
    if isinstance(node, dict):
        return {k: _perturb(v, factor) for k, v in node.items()}
    if isinstance(node, list):
        return [_perturb(v, factor) for v in node]
    if isinstance(node, float):
        return node * factor
    return node


def test_noise_level_differences_do_not_count(base, tmp_path, capsys):
    noisy = _perturb(base, 1 + 3e-12)  # floating-point rounding, e.g. 218.66 -> 218.66000000000003
    old = copy.deepcopy(base)
    old["layers"][3]["photon"]["transmission"][0] = 0.0
    noisy["layers"][3]["photon"]["transmission"][0] = 6.41e-313  # both below the probability floor
    old["hadron_survival"][-1]["survival_probability"] = 1.26e-08
    noisy["hadron_survival"][-1]["survival_probability"] = 6.60e-08
    c = compare(old, noisy, 0.0)
    assert counted(c) == 0 and not c["within"] and c["negligible"] >= 2
    assert main(["compare", write(tmp_path, "a.json", old), write(tmp_path, "b.json", noisy)]) == 0
    assert capsys.readouterr().out.count("\n") == 1


def test_a_changed_note_is_listed_never_counted_nor_formatted_as_a_number(base):
    new = copy.deepcopy(base)
    new["layers"][3]["mip_most_probable_note"] = "not given: thick layer (kappa = 1.33 >= 0.1)"
    new["layers"][3]["theta0_valid"] = not base["layers"][3]["theta0_valid"]
    c = compare(base, new, 0.0)
    assert counted(c) == 0
    assert [r["label"] for r in c["notes"]] == ["note on the most probable energy loss of lead-plate-1",
                                               "theta0 valid of lead-plate-1"]
    assert c["notes"][0]["new_text"].startswith("not given: thick layer")


def test_a_value_that_becomes_defined_counts(base):
    new = copy.deepcopy(base)
    new["layers"][0]["mip_carriers"] = 12345.0
    c = compare(base, new, 100.0)
    assert [(r["label"], r["change"]) for r in c["beyond"]] == [("carriers from a minimum-ionising particle of "
                                                                  "paddle-top", "newly given")]


@pytest.mark.parametrize("path, label, unit", [
    (("reach_momentum_GeV_c", "muon", "muon-chamber-2"), "muon reach of muon-chamber-2", "GeV/c"),
    (("cross_momentum_GeV_c", "pion", "crystal-calorimeter"), "pion momentum to cross crystal-calorimeter", "GeV/c"),
    (("layers", "[crystal-calorimeter]", "thickness_cm"), "thickness of crystal-calorimeter", "cm"),
    (("materials", "crystal", "radiation_length_cm"), "radiation length of crystal", "cm"),
    (("materials", "crystal", "critical_energy_MeV", "electron"), "electron critical energy of crystal", "MeV"),
    (("hadron_survival", "[muon-filter]", "survival_probability"), "hadron survival to muon-filter", ""),
    (("calorimeters", "em-calorimeter", "shower", "10", "by_particle", "photon", "containment_fraction"),
     "photon containment fraction for a 10 GeV shower of em-calorimeter", ""),
    (("material_budget", "stack", "x_over_X0"), "thickness in radiation lengths of the whole stack", "X0"),
])
def test_readable_names(path, label, unit):
    assert describe(path, {"particles": {"muon": {}, "pion": {}}}) == (label, unit)


def test_photon_list_entries_are_named_by_their_energy(base):
    new = copy.deepcopy(base)
    new["layers"][3]["photon"]["transmission"][2] *= 2
    (row,) = compare(base, new, 0.0)["beyond"]
    energy = base["layers"][3]["photon"]["energies_MeV"][2]
    assert row["label"] == f"photon transmission at {energy:.4g} MeV of lead-plate-1"
    assert row["change"] == "+100.0 %"


def test_baseline_without_a_spec_summary_still_compares(base, denser):
    old = {k: v for k, v in base.items() if k != "spec"}
    c = compare(old, denser, 0.01)
    assert c["spec"] is None and c["beyond"]
    assert text_report(c)[0].startswith("Spec changes: not known")


@pytest.mark.parametrize("content, message", [
    (None, "cannot read the key-numbers file"),
    ("{not json", "is not a key-numbers JSON file"),
    ('{"a": 1}', "has no refgen key-numbers schema"),
    ("[" * 100000 + "]" * 100000, "is not a key-numbers JSON file"),
    (b"\xff\xfe", "is not a key-numbers JSON file"),
])
def test_bad_files_exit_2_with_one_line(tmp_path, capsys, base, content, message):
    good = write(tmp_path, "good.json", base)
    bad = tmp_path / "bad.json"
    if isinstance(content, bytes):
        bad.write_bytes(content)
    elif content is not None:
        bad.write_text(content)
    assert main(["compare", str(bad), good]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and message in err and "Traceback" not in err


@pytest.mark.parametrize("tol", ["-0.1", "nan", "inf", "abc"])
def test_bad_tolerance_exits_2(tmp_path, base, tol, capsys):
    path = write(tmp_path, "a.json", base)
    with pytest.raises(SystemExit) as exc:
        main(["compare", path, path, "--tolerance", tol])
    assert exc.value.code == 2
    assert "--tolerance" in capsys.readouterr().err


def test_floor_choice_is_documented():
    assert changes.floor_of(("layers", "[x]", "photon", "transmission", "[0]")) == changes.PROBABILITY_FLOOR == 1e-6
    assert changes.floor_of(("reach_momentum_GeV_c", "muon", "x")) == 0.0
    assert "PROBABILITY_FLOOR" in changes.__doc__ or "1e-6" in changes.__doc__
