"""The README's sample CI job, run as written on the demo spec with a changed thick layer (the crystal
calorimeter from 22 cm to 20 cm): exit 3, a readable changes page, no traceback; and `refgen compare` on the
two key-numbers files."""
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
import yaml

from refgen.changes import significant
from tests.conftest import DEMO, ROOT

CLI = [sys.executable, "-m", "refgen.cli"]


def readme_ci_commands() -> list[str]:
    """The refgen commands of the README's sample CI job (the YAML block under 'handbook:')."""
    text = (ROOT / "README.md").read_text()
    block = next(b for b in re.findall(r"```yaml\n(.*?)```", text, re.S) if "handbook:" in b)
    script = yaml.safe_load(block)["handbook"]["script"]
    return [line for line in script if line.startswith("refgen ")]


def run(args: list[str], cwd: Path) -> subprocess.CompletedProcess:
    return subprocess.run(CLI + args, cwd=cwd, capture_output=True, text=True, env=dict(os.environ, CI="1"))


@pytest.fixture(scope="module")
def ci_job(tmp_path_factory):
    """A repository as the README describes it: detector.yaml and published/key-numbers.json of the last release."""
    repo = tmp_path_factory.mktemp("experiment-repo")
    (repo / "detector.yaml").write_text(DEMO.read_text())
    first = run(["build", "detector.yaml", "--out", "published-site", "--quiet"], repo)
    assert first.returncode == 0, first.stderr
    (repo / "published").mkdir()
    (repo / "published" / "key-numbers.json").write_bytes((repo / "published-site/data/key-numbers.json").read_bytes())
    changed = DEMO.read_text().replace("{name: crystal-calorimeter, material: crystal, thickness: 22 cm",
                                       "{name: crystal-calorimeter, material: crystal, thickness: 20 cm")
    assert changed != DEMO.read_text()
    (repo / "detector.yaml").write_text(changed)
    (command,) = readme_ci_commands()
    result = run(command.split()[1:], repo)
    return repo, result


def muon_reach_row(repo):
    """The muon reach of the hadron calorimeter before and after, formatted as both reports show it (4
    significant digits, signed relative change)."""
    old, new = (json.loads((repo / p).read_text())["reach_momentum_GeV_c"]["muon"]["hadron-calorimeter"]
                for p in ("published/key-numbers.json", "site/data/key-numbers.json"))
    assert new < old  # 2 cm less crystal in front
    return significant(old), significant(new), f"-{significant((old - new) / old * 100)} %"


def test_readme_ci_job_exits_3_without_a_traceback(ci_job):
    repo, result = ci_job
    assert result.returncode == 3, result.stderr
    assert "Traceback" not in result.stderr + result.stdout
    assert "refgen:   layer crystal-calorimeter: thickness 22.00 cm -> 20.00 cm" in result.stderr
    assert re.search(r"error: \d+ key numbers moved by more than 1 %", result.stderr)
    assert (repo / "site" / "handbook.html").exists()


def test_changes_page_is_readable(ci_job):
    repo, _ = ci_job
    page = (repo / "site" / "changes.html").read_text()
    text = re.sub(r"<[^>]+>", " ", page)
    text = re.sub(r"\s+", " ", text)
    assert "What changed in the spec" in text
    assert "layer crystal-calorimeter thickness: 22.00 cm → 20.00 cm" in text
    assert "Moved by more than 1 % (" in text
    old, new, change = muon_reach_row(repo)
    assert f"muon reach of hadron-calorimeter {old} GeV/c {new} GeV/c {change}" in text
    assert "Notes and flags that changed" in text and re.search(r"kappa = 1\.\d+", text)
    assert "reach_momentum_GeV_c.muon" not in text  # internal paths only in hover titles
    assert page.index("What changed in the spec") < page.index("Moved by more than") < page.index("Moved within")
    assert "not for radiation-protection" in text


def test_compare_on_the_two_key_number_files(ci_job):
    repo, _ = ci_job
    old, new = "published/key-numbers.json", "site/data/key-numbers.json"
    result = run(["compare", old, new, "--tolerance", "0.01"], repo)
    assert result.returncode == 3 and not result.stderr
    lines = result.stdout.splitlines()
    assert lines[:2] == ["Spec changes:", "  layer crystal-calorimeter: thickness 22.00 cm -> 20.00 cm"]
    reach_old, reach_new, change = muon_reach_row(repo)
    assert f"  muon reach of hadron-calorimeter: {reach_old} GeV/c -> {reach_new} GeV/c ({change})" in lines
    assert not any("6.41" in line and "e-313" in line for line in lines)  # negligible transmission
    # the kappa note changed too, but notes never count: with a tolerance above every move, exit 0
    relaxed = run(["compare", old, new, "--tolerance", "100"], repo)
    assert relaxed.returncode == 0, relaxed.stdout
    assert "Notes and flags that changed (never counted): 1" in relaxed.stdout
    same = run(["compare", new, new], repo)
    assert (same.returncode, same.stdout.count("\n")) == (0, 1)
