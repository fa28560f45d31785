"""The bad-input catalogue: each case gets one clear message naming the field and its YAML line, exit status 2,
and nothing written. Messages are pinned exactly."""
import os
from pathlib import Path

import pytest

from refgen import build as build_module
from refgen.cli import main
from tests.conftest import DEMO
from tests.test_spec import BASE

RADIATOR = "  rad: {formula: SiO2, density: 0.2 g/cm3, refractive_index: 1.0}"

CATALOGUE = [
    ("yaml syntax", "experiment: {name: x\nparticles: [muon\n",
     ["line 2: YAML syntax error, column 10: did not find expected ',' or '}'"]),
    ("unknown key", BASE.replace("thickness: 300 um", "thicknes: 300 um, thickness: 300 um"),
     ["line 7: layers[0].thicknes: unknown key 'thicknes'; did you mean 'thickness'?"]),
    ("missing field", BASE.replace(", system: tracking}", "}"), ["line 7: layers[0]: missing required key 'system'"]),
    ("missing section", BASE.replace("particles: [muon, proton]\n", ""), ["line 1: particles: missing required section 'particles'"]),
    ("wrong unit", BASE.replace("300 um", "300 g/cm3"),
     ["line 7: layers[0].thickness: '300 g/cm3' is not a length; expected e.g. '150 um, 1.2 cm'"]),
    ("missing unit", BASE.replace("300 um", "300"),
     ["line 7: layers[0].thickness: '300' has no unit; write it with one, e.g. '150 um, 1.2 cm'"]),
    ("zero thickness", BASE.replace("300 um", "0 um"), ["line 7: layers[0].thickness: must be greater than zero (got '0 um')"]),
    ("negative density", BASE.replace("  si: {library: silicon}", "  si: {formula: Si, density: -2 g/cm3}"),
     ["line 4: materials.si.density: must be greater than zero (got '-2 g/cm3')"]),
    ("inverted range", BASE + "momentum: {from: 10 GeV/c, to: 1 GeV/c}\n",
     ["line 8: momentum: 'from' (10 GeV/c) must be below 'to' (1 GeV/c)"]),
    ("empty range", BASE + "momentum: {from: 1 GeV/c, to: 1 GeV/c}\n",
     ["line 8: momentum: 'from' (1 GeV/c) must be below 'to' (1 GeV/c)"]),
    ("too many points", BASE + "photon_energy: {from: 1 keV, to: 1 GeV, points: 1000000}\n",
     ["line 8: photon_energy.points: points must be an integer from 2 to 5000 (got 1000000)"]),
    ("unknown element", BASE.replace("CO2: 30", "Qx2: 30"),
     ["line 5: materials.gas.mixture: cannot read chemical formula 'Qx2': unknown element Qx"]),
    ("unknown material", BASE.replace("material: si,", "material: sillicon,"),
     ["line 7: layers[0].material: unknown material 'sillicon'"]),
    ("unknown library material", BASE.replace("library: silicon", "library: silicone"),
     ["line 4: materials.si.library: 'silicone' is not in the built-in material library; did you mean 'silicon'?"]),
    ("unknown particle", BASE.replace("muon, proton", "muon, protn"),
     ["line 2: particles[1]: unknown particle 'protn'; did you mean 'proton'?"]),
    ("unknown layer", BASE + "radiators:\n  - {layer: dett}\n", ["line 9: radiators[0].layer: unknown layer 'dett'; did you mean 'det'?"]),
    ("fractions off", BASE.replace("{Ar: 70, CO2: 30}", "{Ar: 70, CO2: 20}"),
     ["line 5: materials.gas.mixture: fractions add up to 90; they must add up to 1 or to 100 (within 1%)"]),
    ("index at or below 1", BASE.replace("  si: {library: silicon}", "  si: {library: silicon}\n" + RADIATOR),
     ["line 5: materials.rad.refractive_index: a radiator's refractive index must be above 1 (got 1.0)"]),
    ("duplicate layer", BASE + "  - {name: det, material: si, thickness: 1 mm, system: tracking}\n",
     ["line 8: layers[1].name: duplicate layer name 'det'"]),
    ("duplicate material", BASE.replace("  si: {library: silicon}", "  si: {library: silicon}\n  si: {library: iron}"),
     ["line 5: materials.si: duplicate key 'si'"]),
    ("not a mapping", "- just\n- a list\n", ["the spec is empty or not a mapping of sections"]),
    ("alias bomb", BASE + "a0: &a0 [x, x, x, x, x, x, x, x, x, x]\n" + "".join(
        f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 10) + "]\n" for i in range(1, 30)),
     ["line 12: the spec expands to more than 20000 values (the alias *a3 here); YAML aliases that repeat each other grow without bound"]),
    ("alias loop", BASE + "loop: &l [1, *l]\n", ["line 8: the alias *l refers to the structure that contains it (a loop)"]),
    ("deep nesting", BASE + "deep: " + "[" * 3000 + "]" * 3000 + "\n",
     ["line 8: nested more than 50 levels deep; a spec needs only a few levels"]),
    ("deep block nesting", BASE + "".join(" " * i + f"k{i}:\n" for i in range(60)),
     ["line 58: nested more than 50 levels deep; a spec needs only a few levels"]),
    ("control character", BASE + "x: \"\x07\"\n",
     ["line 8: character U+0007 is not allowed in a YAML file (a control character)"]),
]


def run(tmp_path, text=None, raw=None, capsys=None):
    spec = tmp_path / "spec.yaml"
    if raw is not None:
        spec.write_bytes(raw)
    else:
        spec.write_text(text)
    out = tmp_path / "out"
    rc = main(["build", str(spec), "--out", str(out), "--quiet"])
    err = capsys.readouterr().err.strip().splitlines()
    return rc, out, [line.removeprefix(f"error: {spec}: ") for line in err]


@pytest.mark.parametrize("case, text, expected", CATALOGUE, ids=[c[0] for c in CATALOGUE])
def test_bad_input(tmp_path, capsys, case, text, expected):
    rc, out, err = run(tmp_path, text, capsys=capsys)
    assert rc == 2
    assert not out.exists()
    assert err == expected


def test_not_utf8(tmp_path, capsys):
    rc, out, err = run(tmp_path, raw=BASE.encode() + b"# caf\xe9\n", capsys=capsys)
    assert (rc, out.exists(), err) == (2, False, ["line 8: the file is not UTF-8 text"])


def test_file_over_the_size_bound(tmp_path, capsys):
    rc, out, err = run(tmp_path, raw=BASE.encode() + b"#" * (1 << 20) + b"\n", capsys=capsys)
    assert (rc, out.exists(), err) == (2, False, ["the spec is larger than 1 MiB, the most a spec may be"])


def test_empty_file(tmp_path, capsys):
    rc, out, err = run(tmp_path, raw=b"", capsys=capsys)
    assert (rc, out.exists(), err) == (2, False, ["the spec file is empty"])


def test_all_problems_are_reported_at_once(tmp_path, capsys):
    text = BASE.replace("300 um", "-1 um").replace("muon, proton", "muon, protn").replace("library: silicon", "library: silicone")
    rc, out, err = run(tmp_path, text, capsys=capsys)
    assert rc == 2 and len(err) == 3


def test_gas_without_conditions_builds_with_a_note(tmp_path, capsys):
    text = BASE.replace(", temperature: 20 degC, pressure: 1 atm", "")
    spec = tmp_path / "spec.yaml"
    spec.write_text(text)
    assert main(["build", str(spec), "--out", str(tmp_path / "out"), "--quiet"]) == 0
    assert "note: material 'gas': gas without temperature and pressure; 20 degC and 1 atm assumed" in capsys.readouterr().err


def test_unsafe_names_become_safe_file_names(tmp_path):
    text = (BASE.replace("  si: {library: silicon}", "  ../../evil name: {library: silicon}")
            .replace("material: si,", "material: ../../evil name,").replace("name: det", "name: a/b<script>"))
    spec = tmp_path / "spec.yaml"
    spec.write_text(text)
    out = tmp_path / "site"
    assert main(["build", str(spec), "--out", str(out), "--quiet"]) == 0
    written = [p for p in tmp_path.rglob("*") if p.is_file()]
    assert all(out in p.parents or p == spec for p in written)
    assert (out / "material-evil-name.html").exists()
    assert "<script>" not in (out / "index.html").read_text().split("<script src=")[0]


def test_refuses_a_foreign_non_empty_folder_unless_forced(tmp_path, capsys):
    out = tmp_path / "mine"
    out.mkdir()
    (out / "notes.txt").write_text("keep me")
    assert main(["build", str(DEMO), "--out", str(out), "--quiet"]) == 2
    assert capsys.readouterr().err.strip() == (f"error: output folder {out} is not empty and was not made by refgen; "
                                              "choose another --out or pass --force")
    assert (out / "notes.txt").read_text() == "keep me"
    assert main(["build", str(DEMO), "--out", str(out), "--quiet", "--force"]) == 0
    assert (out / "index.html").exists() and not (out / "notes.txt").exists()


def test_interrupted_build_leaves_the_previous_site(tmp_path, monkeypatch):
    out = tmp_path / "site"
    assert main(["build", str(DEMO), "--out", str(out), "--quiet"]) == 0
    before = (out / "data" / "key-numbers.json").read_bytes()
    calls = {"n": 0}
    real = Path.write_bytes

    def failing(self, data):
        calls["n"] += 1
        if calls["n"] == 5:
            raise KeyboardInterrupt
        return real(self, data)

    monkeypatch.setattr(Path, "write_bytes", failing)
    assert main(["build", str(DEMO), "--out", str(out), "--quiet"]) == 130
    monkeypatch.undo()
    assert (out / "data" / "key-numbers.json").read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]


def test_never_writes_outside_the_output_folder(tmp_path):
    with pytest.raises(build_module.BuildError):
        build_module.write_site({"../escape.html": b"x"}, tmp_path / "site", force=False)
    assert not (tmp_path / "escape.html").exists()
    assert sorted(os.listdir(tmp_path)) == []


def test_long_written_out_stack_is_within_the_bounds():
    """The alias bound counts only what aliases add: 5000 written-out layers (about 25 000 values) pass."""
    from refgen.yamlio import check_bounds
    layers = "".join(f"  - {{name: plane-{i}, material: si, thickness: 300 um, system: tracking}}\n" for i in range(5000))
    check_bounds("layers:\n" + layers)
