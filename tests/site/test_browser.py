"""Headless-browser checks of the demo handbook from file:// (Debian's chromium driven by Playwright).

Set REFGEN_REQUIRE_BROWSER=1 (as .ci/run does) to make a missing browser a failure instead of a skip.
"""
import os
import re
import shutil

import pytest

from refgen.cli import main
from tests.conftest import DEMO, ROOT, SMALL

ABSORBER = ROOT / "tests" / "specs" / "thick-absorber.yaml"
MINIMAL_BASELINE = '{"schema": "refgen-key-numbers/1"}'

CHROMIUM = shutil.which("chromium") or shutil.which("chromium-browser")
REQUIRED = bool(os.environ.get("REFGEN_REQUIRE_BROWSER"))
ARGS = ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
        "--disable-component-update", "--disable-sync"]


@pytest.fixture(scope="module")
def browser():
    if CHROMIUM is None:
        if REQUIRED:
            pytest.fail("chromium is required (REFGEN_REQUIRE_BROWSER is set) but not installed")
        pytest.skip("chromium not installed")
    sync_api = pytest.importorskip("playwright.sync_api") if not REQUIRED else __import__("playwright.sync_api").sync_api
    with sync_api.sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, args=ARGS, headless=True)
        yield b
        b.close()


def build_with_changes(spec, folder, *extra):
    """Build a spec against a minimal baseline, so that the site has a changes page as well."""
    baseline = folder / "baseline.json"
    baseline.write_text(MINIMAL_BASELINE)
    out = folder / "site"
    assert main(["build", str(spec), "--out", str(out), "--quiet", "--baseline", str(baseline), *extra]) == 0
    return out


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    return build_with_changes(DEMO, tmp_path_factory.mktemp("browser"), "--single-file")


@pytest.fixture(scope="module")
def sites(site, tmp_path_factory):
    """The two demo handbooks and the thick-absorber test spec's, each with a changes page."""
    return {"kestrel": site, "tern": build_with_changes(SMALL, tmp_path_factory.mktemp("tern")),
            "absorber": build_with_changes(ABSORBER, tmp_path_factory.mktemp("absorber"))}


def test_every_page_loads_offline_without_errors(browser, site):
    pages = sorted(site.glob("*.html"))
    assert len(pages) > 20
    for page_path in pages:
        page = browser.new_page()
        errors, outside = [], []
        page.on("console", lambda msg: errors.append(msg.text) if msg.type == "error" else None)
        page.on("pageerror", lambda exc: errors.append(str(exc)))
        page.on("request", lambda req: outside.append(req.url) if not req.url.startswith(("file://", "data:")) else None)
        page.goto(page_path.as_uri())
        page.wait_for_load_state("load")
        broken = page.evaluate("Array.from(document.images).filter(i => !(i.complete && i.naturalWidth > 0)).map(i => i.src)")
        assert errors == [], (page_path.name, errors)
        assert outside == [], (page_path.name, outside)
        assert broken == [], (page_path.name, broken)
        page.close()


def test_search_finds_a_material(browser, site):
    page = browser.new_page()
    page.goto((site / "index.html").as_uri())
    page.fill("#search", "crystal")
    first = page.locator("#search-results a").first
    assert "crystal" in first.inner_text()
    page.press("#search", "Enter")
    page.wait_for_load_state("load")
    assert page.url.endswith("material-crystal.html")
    page.close()


@pytest.mark.parametrize("paper", ["A4", "Letter"])
def test_quick_reference_prints_on_one_page(browser, site, paper):
    page = browser.new_page()
    page.goto((site / "quickref.html").as_uri())
    pdf = page.pdf(format=paper, print_background=True)
    pages = len(re.findall(rb"/Type\s*/Page[^s]", pdf))
    assert pages == 1, f"{paper}: {pages} pages"
    page.close()


HOSTILE = """\
experiment:
  name: "<script>window.__pwned = 1</script>Rig"
  revision: "<img src=x onerror=\\"window.__pwned = 2\\">"
  summary: |
    Hello <script>window.__pwned = 3</script> and <img src=x onerror="window.__pwned = 4">
    [click](javascript:window.__pwned=5) <a href="#" onclick="window.__pwned = 6">x</a>
particles: [muon]
materials:
  "<b onmouseover=window.__pwned=7>si</b>": {library: silicon, description: "<script>window.__pwned = 8</script>"}
layers:
  - {name: "<svg onload=window.__pwned=9>", material: "<b onmouseover=window.__pwned=7>si</b>", thickness: 300 um, system: tracking}
"""


def test_script_in_spec_strings_is_inert(browser, tmp_path):
    spec = tmp_path / "hostile.yaml"
    spec.write_text(HOSTILE)
    out = tmp_path / "site"
    assert main(["build", str(spec), "--out", str(out), "--quiet"]) == 0
    for page_path in sorted(out.glob("*.html")):
        page = browser.new_page()
        dialogs = []
        page.on("dialog", lambda d: (dialogs.append(d.message), d.dismiss()))
        page.goto(page_path.as_uri())
        page.wait_for_load_state("load")
        page.mouse.move(10, 10)
        page.hover("body")
        assert page.evaluate("typeof window.__pwned") == "undefined", page_path.name
        assert page.evaluate("document.querySelectorAll('[onerror],[onload],[onclick],[onmouseover]').length") == 0
        assert page.evaluate("Array.from(document.querySelectorAll('a')).filter(a => a.href.startsWith('javascript')).length") == 0
        assert dialogs == []
        page.close()


def page_text(browser, path) -> str:
    page = browser.new_page()
    page.goto(path.as_uri())
    page.wait_for_load_state("load")
    text = page.inner_text("main")
    page.close()
    return text


NUMBER = r"(\d+(?:\.\d+)?)(?:\s*×\s*10\s*([−-]?\d+))?"
LENGTH_IN_CM = re.compile(NUMBER + r"\s*cm(?![²³⁻/\w])")
EXPONENT = re.compile(r"×\s*10\s*([−-]?\d+)")


def as_float(mantissa: str, exponent: str | None) -> float:
    return float(mantissa) * 10 ** int(exponent.replace("−", "-")) if exponent else float(mantissa)


@pytest.mark.parametrize("name", ["kestrel", "tern", "absorber"])
def test_pages_show_readable_units_and_no_tiny_exponents(browser, sites, name):
    for path in sorted(sites[name].glob("*.html")):
        if path.name == "handbook.html":
            continue
        text = page_text(browser, path)
        for m in LENGTH_IN_CM.finditer(text):
            assert as_float(m.group(1), m.group(2)) >= 0.1, f"{path.name}: a length below 1 mm in cm: {m.group(0)!r}"
        for m in EXPONENT.finditer(text):
            assert int(m.group(1).replace("−", "-")) >= -6, f"{path.name}: exponent below -6: {text[max(m.start() - 80, 0):m.end()]!r}"


@pytest.mark.parametrize("name", ["kestrel", "tern", "absorber"])
def test_caution_on_changes_and_downloads_pages(browser, sites, name):
    for page_name in ("changes.html", "downloads.html"):
        page = browser.new_page()
        page.goto((sites[name] / page_name).as_uri())
        assert "not for radiation-protection" in page.inner_text(".caution"), (name, page_name)
        page.close()


@pytest.mark.parametrize("name", ["kestrel", "tern", "absorber"])
def test_quick_reference_reach_table_is_not_empty(browser, sites, name):
    page = browser.new_page()
    page.goto((sites[name] / "quickref.html").as_uri())
    rows = page.locator("#quick-reach tbody tr")
    assert rows.count() > 0
    assert all(rows.nth(i).locator("td").count() > 2 for i in range(rows.count()))
    page.close()


@pytest.mark.parametrize("name, layers", [("absorber", ["plane-3", "plane-4", "tile", "gas-chamber"]),
                                          ("tern", ["paddle-3", "paddle-bottom"]),
                                          ("kestrel", ["hadron-calorimeter", "muon-chamber-2"])])
def test_electron_reach_behind_the_absorber_is_not_a_number(browser, sites, name, layers):
    for page_name in ("charged.html", "quickref.html", "species-electron.html"):
        page = browser.new_page()
        page.goto((sites[name] / page_name).as_uri())
        cells = page.locator('table.reach tr[data-layer] td[data-species="electron"]')
        seen = 0
        for i in range(cells.count()):
            cell = cells.nth(i)
            layer = cell.evaluate("td => td.parentElement.dataset.layer")
            if layer in layers:
                seen += 1
                text = cell.inner_text()
                assert "showers" in text and "X₀" in text and "/c" not in text, (name, page_name, layer, text)
        assert seen > 0, (name, page_name)
        page.close()


def test_search_finds_headings_quantities_and_elements(browser, sites):
    for name, query, expect in [("kestrel", "kaon threshold", "cherenkov-"), ("kestrel", "lead", "material-crystal"),
                                ("tern", "lead", "material-lead"), ("kestrel", "quench", "charged.html")]:
        page = browser.new_page()
        page.goto((sites[name] / "index.html").as_uri())
        page.fill("#search", query)
        hrefs = page.eval_on_selector_all("#search-results a", "as => as.map(a => a.getAttribute('href'))")
        assert any(h.startswith(expect) for h in hrefs), (name, query, hrefs)
        page.close()
