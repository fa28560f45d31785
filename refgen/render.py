"""Rendering: the report's plain data -> HTML pages and data files in memory (a dict of path -> bytes).

Templates come from ``templates/`` (installed as the package refgen.templates); they format, never compute.
Spec text is autoescaped; the Markdown summary is converted and then sanitised with nh3.
"""
from __future__ import annotations

import json
import math
from importlib import resources

import jinja2
import markdown
from markupsafe import Markup, escape
import nh3

ALLOWED_TAGS = {"p", "em", "strong", "code", "pre", "ul", "ol", "li", "a", "blockquote", "h3", "h4", "br", "sub", "sup"}


def format_number(value, digits: int = 4) -> str:
    """A number to ``digits`` significant figures, plain or in scientific notation; '—' for None."""
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, int):
        return f"{value:,}".replace(",", "\u2009")
    if not math.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    mag = math.floor(math.log10(abs(value)))
    if -3 <= mag < 5:
        decimals = max(digits - 1 - mag, 0)
        return f"{value:.{decimals}f}"
    mantissa = f"{value / 10 ** mag:.{digits - 1}f}"
    return f"{mantissa}\u00d710<sup>{mag}</sup>"


def species_html(label: str) -> str:
    """HTML for a species label: 'pi+' -> π<sup>+</sup>, 'mu-' -> μ<sup>−</sup>, 'He-3' -> <sup>3</sup>He."""
    greek = {"pi": "π", "mu": "μ", "alpha": "α", "e": "e", "K": "K", "p": "p", "d": "d", "t": "t"}
    if label == "p-bar":
        return "p̄"
    if label.startswith("He-"):
        return f"<sup>{label[3:]}</sup>He"
    if label and label[-1] in "+-":
        base, sign = label[:-1], label[-1]
        return f"{greek.get(base, escape(base))}<sup>{'+' if sign == '+' else '−'}</sup>"
    return str(greek.get(label, escape(label)))


def markdown_safe(text: str) -> str:
    """Markdown -> HTML, then sanitised by nh3 to a small set of tags (no scripts, no event handlers)."""
    html = markdown.markdown(text or "", extensions=[])
    return nh3.clean(html, tags=ALLOWED_TAGS, attributes={"a": {"href"}}, url_schemes={"http", "https", "mailto"},
                     link_rel="noopener noreferrer")


def environment() -> jinja2.Environment:
    """The Jinja2 environment over the installed templates, autoescaping everything."""
    root = resources.files("refgen.templates")
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(root)), autoescape=True,
                             undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True)
    env.filters["num"] = lambda v, d=4: Markup(format_number(v, d))
    env.filters["species"] = lambda v: Markup(species_html(v))
    return env


def static_assets() -> dict[str, bytes]:
    """The site's own CSS and JS, copied as they are."""
    root = resources.files("refgen.templates.static")
    return {f"static/{p.name}": p.read_bytes() for p in root.iterdir() if p.name.endswith((".css", ".js"))}


def json_bytes(data) -> bytes:
    """Deterministic JSON: sorted keys, fixed indentation, no NaN (NaN and inf become null)."""
    return (json.dumps(_finite(data), indent=2, sort_keys=True, ensure_ascii=False) + "\n").encode("utf-8")


def _finite(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {str(k): _finite(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_finite(v) for v in value]
    return value


def render_site(report: dict, build_info: dict) -> dict[str, bytes]:
    """Every file of the site, in memory: pages, key-numbers.json and static assets."""
    env = environment()
    kn = report["key_numbers"]
    common = {"kn": kn, "report": report, "build": build_info, "slugs": report["material_slugs"],
              "summary_html": markdown_safe(report["summary_markdown"])}
    files: dict[str, bytes] = {}
    pages = [("index.html", "index.html", {"title": kn["experiment"]["name"], "page": "index"})]
    for name, slug in report["material_slugs"].items():
        pages.append((f"material-{slug}.html", "material.html",
                      {"title": f"Material: {name}", "page": "material", "name": name, "m": kn["materials"][name]}))
    for out, template, ctx in pages:
        files[out] = env.get_template(template).render(**common, **ctx).encode("utf-8")
    files["data/key-numbers.json"] = json_bytes(kn)
    files.update(static_assets())
    return files
