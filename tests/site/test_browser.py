"""Headless-browser checks of the demo handbook from file:// (Debian's chromium driven by Playwright).

Set REFGEN_REQUIRE_BROWSER=1 (as .ci/run does) to make a missing browser a failure instead of a skip.
"""
import os
import re
import shutil

import pytest

from refgen.cli import main
from tests.conftest import DEMO

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


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    out = tmp_path_factory.mktemp("browser") / "site"
    assert main(["build", str(DEMO), "--out", str(out), "--quiet", "--single-file"]) == 0
    return out


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
