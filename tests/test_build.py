"""End-to-end builds of the demo specs in strict mode, through the CLI, and the key-numbers contract."""
import json

import pytest

from refgen.cli import main

from .conftest import DEMO, SMALL


@pytest.fixture(scope="module")
def demo_site(tmp_path_factory):
    out = tmp_path_factory.mktemp("demo") / "site"
    assert main(["build", str(DEMO), "--out", str(out), "--strict", "--quiet"]) == 0
    return out


def test_demo_builds_index_and_key_numbers(demo_site):
    assert (demo_site / "index.html").is_file()
    kn = json.loads((demo_site / "data" / "key-numbers.json").read_text())
    assert kn["schema"] == "refgen-key-numbers/1"
    assert kn["experiment"]["name"] == "Kestrel Forward Spectrometer"
    for m in kn["materials"].values():
        assert {"density_g_cm3", "mass_fractions", "z_over_a", "mean_excitation_energy_eV", "plasma_energy_eV"} <= set(m)
    for layer in kn["layers"]:
        assert {"name", "material", "system", "thickness_cm"} <= set(layer)


def test_small_demo_builds(tmp_path):
    assert main(["build", str(SMALL), "--out", str(tmp_path / "s"), "--strict", "--quiet"]) == 0


def test_bad_spec_exits_non_zero_and_writes_nothing(tmp_path, capsys):
    bad = tmp_path / "bad.yaml"
    bad.write_text(DEMO.read_text().replace("thickness: 150 um", "thickness: 150 kg", 1))
    out = tmp_path / "out"
    assert main(["build", str(bad), "--out", str(out), "--quiet"]) == 2
    assert not out.exists()
    err = capsys.readouterr().err.strip().splitlines()
    line = next(i for i, text in enumerate(bad.read_text().splitlines(), 1) if "150 kg" in text)
    assert err == [f"error: {bad}: line {line}: layers[2].thickness: '150 kg' is not a length; expected e.g. '150 um, 1.2 cm'"]


def test_check_command(capsys):
    assert main(["check", str(SMALL)]) == 0
    assert "ok (3 materials, 7 layers, 3 particles)" in capsys.readouterr().out


def test_materials_command_lists_the_library(capsys):
    assert main(["materials"]) == 0
    out = capsys.readouterr().out
    assert "lead-tungstate" in out and "standard-rock" in out
