"""The command line a newcomer meets: `refgen particles`, `refgen materials`, `refgen keys`, the README's
generated reference and its examples, quiet pipes, and the mixture warning's rounding threshold."""
import re
import subprocess
import sys

import pytest
import yaml

from refgen import datafiles, reference
from refgen.cli import main
from refgen.spec import SCHEMA, parse_spec
from tests.conftest import ROOT
from tests.test_spec import BASE

README = ROOT / "README.md"


def test_particles_lists_every_builtin_species_with_names_mass_and_charge(capsys):
    assert main(["particles"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out[0].split() == ["key", "label", "mass", "MeV", "charge", "also", "accepted", "as"]
    rows = {line.split()[0]: line for line in out[1:] if line and not line.startswith("Masses")}
    for p in datafiles.particles().values():
        row = rows[p["key"]]
        assert f"{p['charge']:+d}" in row.split() and f"{p['mass']:.10g}" in row.split()
        assert all(a in row for a in p["aliases"])


def test_materials_prints_a_header_and_each_composition(capsys):
    assert main(["materials"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out[0].split()[:6] == ["key", "density", "g/cm3", "state", "I", "eV"] and "composition" in out[0]
    water = next(line for line in out if line.startswith("water "))
    assert " H2O " in water and "liquid" in water
    air = next(line for line in out if line.startswith("air "))
    assert "N 75.53 %, O 23.18 %" in air and "by mass" in air
    assert len([line for line in out[1:] if line.strip() and not line.endswith("additivity.")]) \
        == len(datafiles.library_materials())


def test_keys_prints_every_schema_key(capsys):
    assert main(["keys"]) == 0
    out = capsys.readouterr().out
    for section, keys in SCHEMA.items():
        for key in keys:
            assert f"| `{key}` |" in out, (section, key)


@pytest.mark.parametrize("block", list(reference.BLOCKS))
def test_readme_reference_is_in_sync(block):
    text = README.read_text()
    assert reference.readme_block(text, block) == reference.BLOCKS[block](), (
        f"the README's generated '{block}' block is out of date with refgen.spec.SCHEMA / particles.csv; "
        f"regenerate it with: {reference.REGENERATE}")


def test_readme_examples_are_valid_specs():
    text = README.read_text()
    custom = re.search(r"#   any other charged species:\s+- (\{.*\})", text).group(1)
    spec = parse_spec(BASE.replace("particles: [muon, proton]", f"particles: [muon, {custom}]"))
    (sigma,) = [s for s in spec.species if s.custom]
    assert (sigma.key, sigma.charge, sigma.mass) == ("sigma-minus", -1, pytest.approx(1197.449))
    typed = re.search(r"#   built-in names as physicists type them: (.*?) \.\.\.", text).group(1)
    names = [n.strip() for n in typed.split(",")]
    assert all(datafiles.find_particle(n) for n in names), names


def test_readme_ci_job_installs_without_a_package_index():
    block = next(b for b in re.findall(r"```yaml\n(.*?)```", README.read_text(), re.S) if "handbook:" in b)
    install = yaml.safe_load(block)["handbook"]["script"][0]
    assert "pip install" in install and ("git+" in install or ".whl" in install)


@pytest.mark.parametrize("command", ["materials", "particles", "keys"])
def test_output_into_a_closed_pipe_ends_quietly(command):
    proc = subprocess.Popen([sys.executable, "-m", "refgen.cli", command], stdout=subprocess.PIPE,
                            stderr=subprocess.PIPE)
    proc.stdout.close()  # as `| head` does once it has what it wants
    err = proc.stderr.read()
    assert proc.wait() == 0 and err == b""


@pytest.mark.parametrize("fractions, warned", [
    ("{Ar: 70, CO2: 29.9999}", False), ("{Ar: 0.7, CO2: 0.2999999}", False), ("{Ar: 33.33, CO2: 66.6}", False),
    ("{Ar: 70, CO2: 29.5}", True), ("{Ar: 70, CO2: 30.6}", True),
])
def test_mixture_warning_is_silent_for_rounding(fractions, warned):
    spec = parse_spec(BASE.replace("{Ar: 70, CO2: 30}", fractions))
    assert bool(spec.warnings) == warned, spec.warnings


def test_every_package_goes_into_the_wheel():
    # the README tells experiments to install from a built wheel: a package missing from pyproject's list
    # works in an editable install and breaks in the wheel
    import tomllib
    listed = set(tomllib.loads((ROOT / "pyproject.toml").read_text())["tool"]["setuptools"]["packages"])
    found = {".".join(p.parent.relative_to(ROOT).parts) for p in (ROOT / "refgen").rglob("__init__.py")}
    assert found <= listed, sorted(found - listed)
