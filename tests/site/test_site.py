"""The site as a whole: determinism, change tracking, single file, offline assets, progress output."""
import json
import re

import pytest

from refgen.cli import main
from tests.conftest import DEMO, SMALL


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    root = tmp_path_factory.mktemp("site")
    a, b = root / "a", root / "b"
    assert main(["build", str(DEMO), "--out", str(a), "--quiet", "--single-file"]) == 0
    assert main(["build", str(DEMO), "--out", str(b), "--quiet", "--single-file"]) == 0
    return a, b


def test_rebuild_is_byte_identical(built):
    a, b = built
    files_a = sorted(p.relative_to(a) for p in a.rglob("*") if p.is_file())
    files_b = sorted(p.relative_to(b) for p in b.rglob("*") if p.is_file())
    assert files_a == files_b
    for rel in files_a:
        assert (a / rel).read_bytes() == (b / rel).read_bytes(), rel


def test_no_asset_uses_an_external_url(built):
    a, _ = built
    for page in a.rglob("*.html"):
        text = page.read_text()
        assert not re.search(r'(src|href)="(https?:)?//', text), page.name
    for svg in a.rglob("*.svg"):
        text = svg.read_text()
        assert "<metadata>" not in text, svg.name
        assert not re.search(r'(?:xlink:)?href="(?!#)', text), svg.name


def test_every_internal_link_resolves(built):
    a, _ = built
    for page in a.glob("*.html"):
        if page.name == "handbook.html":
            continue
        for target in re.findall(r'(?:href|src)="([^"#:]+)(?:#[^"]*)?"', page.read_text()):
            assert (a / target).exists(), f"{page.name} -> {target}"


def test_single_file_is_self_contained(built):
    a, _ = built
    html = (a / "handbook.html").read_text()
    assert 'src="fig/' not in html and 'href="static/' not in html
    assert html.count('class="single-page"') >= 10
    assert "data:image/svg+xml;base64," in html


def test_every_figure_has_alt_text_and_a_csv_beside_it(built):
    a, _ = built
    for page in a.glob("*.html"):
        for img in re.findall(r"<img [^>]*>", page.read_text()):
            assert re.search(r'alt="[^"]{10,}"', img), (page.name, img)


def test_changes_page_and_strict_mode(tmp_path, capsys):
    base = tmp_path / "base"
    assert main(["build", str(DEMO), "--out", str(base), "--quiet"]) == 0
    changed = tmp_path / "changed.yaml"
    changed.write_text(DEMO.read_text().replace("{name: pixel-1, material: silicon, thickness: 150 um",
                                                 "{name: pixel-1, material: silicon, thickness: 200 um"))
    out = tmp_path / "new"
    baseline = str(base / "data" / "key-numbers.json")
    assert main(["build", str(changed), "--out", str(out), "--quiet", "--baseline", baseline]) == 0
    page = (out / "changes.html").read_text()
    assert re.search(r'title="layers\[pixel-1\].thickness_cm[^"]*">thickness of pixel-1<', page)
    assert main(["build", str(changed), "--out", str(out), "--quiet", "--baseline", baseline,
                 "--fail-on-change", "0.01"]) == 3
    assert "key numbers moved by more than 1 %" in capsys.readouterr().err
    same = tmp_path / "same"
    assert main(["build", str(DEMO), "--out", str(same), "--quiet", "--baseline", baseline,
                 "--fail-on-change", "0"]) == 0


def test_compare_command(tmp_path, capsys):
    a = tmp_path / "a.json"
    b = tmp_path / "b.json"
    a.write_text(json.dumps({"schema": "refgen-key-numbers/1", "materials": {"si": {"density_g_cm3": 2.329}}}))
    b.write_text(json.dumps({"schema": "refgen-key-numbers/1", "materials": {"si": {"density_g_cm3": 2.33}}}))
    assert main(["compare", str(a), str(b)]) == 3
    assert capsys.readouterr().out.splitlines() == [
        "Spec changes: not known (a key-numbers file without a spec summary, made by an older refgen).",
        "Moved (any move): 1", "  density of si: 2.329 g/cm3 -> 2.330 g/cm3 (+0.04294 %)"]


def test_progress_per_section_and_quiet(tmp_path, capsys, monkeypatch):
    monkeypatch.delenv("CI", raising=False)
    assert main(["build", str(SMALL), "--out", str(tmp_path / "p")]) == 0
    err = capsys.readouterr().err
    for step in ("validating the spec", "computing: materials and energy loss", "computing: photons",
                 "rendering the pages and figures", "writing"):
        assert step in err
    assert main(["build", str(SMALL), "--out", str(tmp_path / "q"), "--quiet"]) == 0
    assert "refgen:" not in capsys.readouterr().err
    monkeypatch.setenv("CI", "true")
    assert main(["build", str(SMALL), "--out", str(tmp_path / "r")]) == 0
    assert "refgen:" not in capsys.readouterr().err


def test_hadron_ranges_say_what_they_leave_out(built):
    # a CSDA range of 60 000 g/cm2 for a 100 GeV/c proton is no distance a proton goes: the pages say so
    site, _ = built
    crystal = (site / "material-crystal.html").read_text()
    assert "leave out nuclear interactions" in crystal and "168.2 g/cm²" in crystal
    assert "leave out nuclear interactions" in (site / "species-proton.html").read_text()
    assert "leave out nuclear interactions" not in (site / "species-muon.html").read_text()


def test_range_figure_names_only_the_species_it_draws(built):
    # in the crystal (E_c about 9 MeV) electrons shower over the whole momentum grid: no curve, so no legend entry
    svg = (built[0] / "fig" / "range-crystal.svg").read_text()
    assert "$e^{-}$" not in svg and "$e^{+}$" not in svg and "$\\mu^{-}$" in svg
    assert "$e^{-}$" in (built[0] / "fig" / "range-beryllium.svg").read_text()  # E_c above 100 MeV: drawn


def test_a_transmission_that_underflows_reads_below_the_floor_not_zero(built):
    # 100 keV photons through 22 cm of lead tungstate: exp(-mu x) is about e^-790, 0.0 in floating point; a
    # transmission is never exactly zero, while a conversion probability below the pair threshold is
    from refgen.render import format_probability
    assert format_probability(0.0) == "0"
    assert format_probability(0.0, exact_zero=False) == "&lt; 10⁻⁶"
    assert format_probability(0.5, exact_zero=False) == "0.500"
    html = (built[0] / "photons.html").read_text()
    row = re.search(r"<tr><td>crystal-calorimeter</td>(.*?)</tr>", html).group(1)
    cells = re.findall(r'<td class="r">(.*?)</td>', row)
    assert cells[:2] == ["0", "0"]          # conversion at 0.1 and 1 MeV: below the threshold, truly zero
    assert cells[5] == "&lt; 10⁻⁶"          # transmission at 0.1 MeV
