"""Rendering: the report's plain data -> HTML pages and data files in memory (a dict of path -> bytes).

Templates come from ``templates/`` (installed as the package refgen.templates); they format, never compute.
Spec text is autoescaped; the Markdown summary is converted and then sanitised with nh3.
"""
from __future__ import annotations

import json
import math
from importlib import resources
from pathlib import Path

import base64
import csv
import io
import re
from html import unescape

import jinja2
import numpy as np
import markdown
from markupsafe import Markup, escape

from . import datafiles
from .figures import Drawer
from .report import CAUTION, plain
import nh3

ALLOWED_TAGS = {"p", "em", "strong", "code", "pre", "ul", "ol", "li", "a", "blockquote", "h3", "h4", "br", "sub", "sup"}


PROBABILITY_FLOOR = 1e-6  # below this a probability is shown as "< 10⁻⁶" (no page shows an exponent below -6)


def _trim(text: str) -> str:
    """Drop trailing zeros after a decimal point ('1.03000' -> '1.03', '22.0' -> '22')."""
    return text.rstrip("0").rstrip(".") if "." in text else text


def format_number(value, digits: int = 4, trim: bool = False) -> str:
    """A number to ``digits`` significant figures, plain or in scientific notation; '—' for None.

    ``trim`` drops trailing zeros: for numbers echoed from the spec, whose precision is the user's."""
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
        text = f"{value:.{decimals}f}"
        return _trim(text) if trim else text
    mantissa = value / 10 ** mag
    if abs(round(mantissa, digits - 1)) >= 10:  # rounding carried into the next power of ten
        mag, mantissa = mag + 1, mantissa / 10
    text = f"{mantissa:.{digits - 1}f}"
    return f"{_trim(text) if trim else text}\u00d710<sup>{str(mag).replace('-', '−')}</sup>"


LENGTH_UNITS = ((0.1, 1e4, "µm"), (1.0, 10.0, "mm"), (100.0, 1.0, "cm"), (1e5, 0.01, "m"), (math.inf, 1e-5, "km"))


def format_length(cm, digits: int = 3, exact: bool = False) -> str:
    """A length given in cm, with the unit a reader expects: µm below 1 mm, mm below 1 cm, cm below 1 m, then m
    (km beyond 1 km). ``exact`` drops trailing zeros (a thickness echoed from the spec)."""
    if cm is None or (isinstance(cm, float) and not math.isfinite(cm)):
        return "—"
    for below, factor, unit in LENGTH_UNITS:
        if abs(cm) < below:
            return f"{format_number(cm * factor, digits, trim=exact)} {unit}"
    return "—"


def format_momentum(gev, digits: int = 3, exact: bool = False) -> str:
    """A momentum given in GeV/c: in MeV/c below 1 GeV/c, else in GeV/c, with its unit."""
    if gev is None or (isinstance(gev, float) and not math.isfinite(gev)):
        return "—"
    if abs(gev) < 1.0:
        return f"{format_number(gev * 1e3, digits, trim=exact)} MeV/c"
    return f"{format_number(gev, digits, trim=exact)} GeV/c"


def format_probability(p, digits: int = 3, exact_zero: bool = True) -> str:
    """A probability: '< 10⁻⁶' below 1e-6, '1 − x' close to one (so 0.99999 never rounds to a false 1.00).
    exact_zero: a 0 is a true zero (conversion below the pair threshold) and reads '0'; if False, the quantity
    is never zero (a transmission exp(-mu x) that underflowed) and 0 reads '< 10⁻⁶'."""
    if p is None or (isinstance(p, float) and not math.isfinite(p)):
        return "—"
    if p <= 0 or p < PROBABILITY_FLOOR:
        return "0" if p == 0 and exact_zero else "&lt; 10⁻⁶"
    if p >= 1:
        return "1"
    if 1 - p < PROBABILITY_FLOOR:
        return "&gt; 1 − 10⁻⁶"
    if round(p, digits) >= 1:  # would read as a false 1.00
        return f"1 − {format_number(1 - p, 2)}"
    return format_number(p, digits)


def format_key_number(value, digits: int = 4) -> str:
    """Any key number (changes page): as format_number, but a magnitude below 1e-6 reads '< 10⁻⁶' (with its
    sign), so no page shows an exponent below -6."""
    if isinstance(value, str):
        return str(escape(value))
    if isinstance(value, float) and math.isfinite(value) and 0 < abs(value) < PROBABILITY_FLOOR:
        return "&lt; 10⁻⁶" if value > 0 else "&gt; −10⁻⁶"
    return format_number(value, digits)


def format_grid_momentum(gev, grid, digits: int = 3) -> str:
    """A momentum that may sit on an edge of the spec's momentum grid (lo, hi in GeV/c): an edge is a bound of
    the answer, not a result, so it is shown as '≤ lo' or '≥ hi'."""
    if gev is None:
        return "—"
    lo, hi = grid
    if gev <= lo * (1 + 1e-9):
        return f"≤ {format_momentum(lo, digits, exact=True)}"
    if gev >= hi * (1 - 1e-9):
        return f"≥ {format_momentum(hi, digits, exact=True)}"
    return format_momentum(gev, digits)


def format_percent(fraction) -> str:
    """A fraction as a percentage to 4 significant figures; within 1e-4 of 0 or 1 as '< 0.01 %' or '> 99.99 %'
    (a model's fraction is never shown as exactly 100 %)."""
    if fraction is None:
        return "—"
    if fraction > 1.0 - 1e-4:
        return "&gt; 99.99 %"
    if 0.0 < fraction < 1e-4:
        return "&lt; 0.01 %"
    return f"{100.0 * fraction:.4g} %"


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


def environment(cache_dir=None) -> jinja2.Environment:
    """The Jinja2 environment over the installed templates, autoescaping everything. With ``cache_dir`` the
    compiled templates are kept there (Jinja2 keys them by the template source)."""
    root = resources.files("refgen.templates")
    compiled = None
    if cache_dir is not None:
        Path(cache_dir).mkdir(parents=True, exist_ok=True)
        compiled = jinja2.FileSystemBytecodeCache(str(cache_dir))
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(root)), autoescape=True, bytecode_cache=compiled,
                             undefined=jinja2.StrictUndefined, trim_blocks=True, lstrip_blocks=True)
    env.filters["num"] = lambda v, d=4: Markup(format_number(v, d))
    env.filters["exact"] = lambda v, d=6: Markup(format_number(v, d, trim=True))
    env.filters["distance"] = lambda v, d=3, exact=False: Markup(format_length(v, d, exact))
    env.filters["mom"] = lambda v, d=3, exact=False: Markup(format_momentum(v, d, exact))
    env.filters["prob"] = lambda v, d=3, exact_zero=True: Markup(format_probability(v, d, exact_zero))
    env.filters["keynum"] = lambda v, d=4: Markup(format_key_number(v, d))
    env.filters["pgrid"] = lambda v, grid, d=3: Markup(format_grid_momentum(v, grid, d))
    env.filters["species"] = lambda v: Markup(species_html(v))
    env.filters["percent"] = lambda v: Markup(format_percent(v))
    return env


def static_assets() -> dict[str, bytes]:
    """The site's own CSS and JS, copied as they are."""
    root = resources.files("refgen.templates.static")
    return {f"static/{p.name}": p.read_bytes() for p in root.iterdir() if p.name.endswith((".css", ".js"))}


def json_bytes(data) -> bytes:
    """Deterministic JSON: sorted keys, fixed indentation, no NaN (NaN and inf become null)."""
    return (json.dumps(_finite(data), indent=2, sort_keys=True, ensure_ascii=False) + "\n").encode("utf-8")


def _finite(value):
    value = plain(value)
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {str(k): _finite(v) for k, v in value.items()}
    if isinstance(value, list):
        return [_finite(v) for v in value]
    return value


def csv_bytes(header: list[str], rows: list[list], comment: str) -> bytes:
    """A CSV table with two leading '#' comment lines (what it is; the caution); floats at full precision
    (shortest repr that reads back exactly), None and nan as empty."""
    buf = io.StringIO()
    buf.write(f"# {comment}\n# Caution: {CAUTION}\n")
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(header)
    for row in rows:
        w.writerow(["" if v is None or (isinstance(v, float) and not math.isfinite(v)) else
                    (repr(float(v)) if isinstance(v, float) else v) for v in row])
    return buf.getvalue().encode("utf-8")


_HEADING = re.compile(r"<h([123])>(.*?)</h\1>", re.S)
_TAG = re.compile(r"<[^>]+>")


def anchor_headings(html: str) -> tuple[str, list[tuple[int, str, str]]]:
    """Give every h1-h3 of a page an id, and return (html, [(level, id, plain text)]) for the search index."""
    found, used = [], set()

    def add_id(m):
        text = unescape(" ".join(_TAG.sub("", m.group(2)).split()))
        base = re.sub(r"[^a-z0-9]+", "-", text.lower()).strip("-") or "section"
        anchor, n = base, 2
        while anchor in used:
            anchor, n = f"{base}-{n}", n + 1
        used.add(anchor)
        found.append((int(m.group(1)), anchor, text))
        return f'<h{m.group(1)} id="{anchor}">{m.group(2)}</h{m.group(1)}>'
    return _HEADING.sub(add_id, html), found


def _job(name: str, *args) -> tuple:
    """A figure to draw later: the name of a refgen.figures function and its plain-data arguments."""
    return (name, args)


def material_figures(report: dict, name: str) -> dict[str, tuple]:
    """The collision dE/dx, total-loss (species with radiative losses) and range figures of one material."""
    slug = report["material_slugs"][name]
    labels = report["species_labels"]
    dedx, rng, total = [], [], []
    for (mat, sp), c in report["curves"].items():
        if mat != name:
            continue
        dedx.append({"label": labels[sp], "x": c["momentum_GeV_c"], "y": c["collision_MeV_cm2_g"], "valid": c["valid"]})
        rng.append({"label": labels[sp], "x": c["momentum_GeV_c"], "y": c["csda_range_g_cm2"],
                    "valid": c["valid"] & ~c["showers"]})
        ok = c["valid"]
        if np.any(c["radiative_MeV_cm2_g"][ok] >= 0.01 * c["collision_MeV_cm2_g"][ok]):
            total.append({"label": labels[sp], "x": c["momentum_GeV_c"], "collision": c["collision_MeV_cm2_g"],
                          "radiative": c["radiative_MeV_cm2_g"], "total": c["dedx_MeV_cm2_g"], "valid": ok})
    mi = report["key_numbers"]["materials"][name]["min_ionization"]
    mark = (mi["beta_gamma"] * 0.1056583755, mi["dedx_MeV_cm2_g"],
            f"muon minimum: {mi['dedx_MeV_cm2_g']:.3f} MeV cm²/g\nat βγ = {mi['beta_gamma']:.2f}")
    edge = (f"limited validity\n(Bethe below βγ = {report['key_numbers']['materials'][name]['bethe_valid_min_beta_gamma']:.3g};"
            "\nelectrons below 10 keV)")
    out = {
        f"fig/dedx-{slug}.svg": _job("dedx_figure", dedx, mark, edge),
        f"fig/range-{slug}.svg": _job("species_curves", rng, "momentum (GeV/c)", "CSDA range (g/cm²)", edge),
    }
    if total:
        out[f"fig/dedx-total-{slug}.svg"] = _job("total_loss_figure", total)
    return out


def reach_figure(report: dict) -> tuple:
    kn = report["key_numbers"]
    names = [l["name"] for l in kn["layers"]]
    series = [{"label": report["species_labels"][sp], "y": [row[n] for n in names]} for sp, row in kn["reach_momentum_GeV_c"].items()]
    showers = kn["electron_showers"]
    behind = {n for depths in showers["reach_depth_X0"].values() for n in depths}
    first = next((i for i, n in enumerate(names) if n in behind), None)
    return _job("reach_figure", names, series, first, showers["onset_X0"])


def calorimetry_figures(report: dict) -> dict[str, tuple]:
    """The material-budget figure and one shower-profile figure per calorimeter system."""
    rows = report["key_numbers"]["material_budget"]["rows"]
    out = {"fig/budget.svg": _job("budget_figure", [r["layer"] for r in rows], [r["cumulative_X0"] for r in rows],
                                                   [r["cumulative_lambda_I"] for r in rows])}
    for kind, prof in report["shower_profiles"].items():
        depth = report["key_numbers"]["calorimeters"][kind]["depth_X0"]
        out[f"fig/showers-{kind}.svg"] = _job("profile_figure", prof["t_X0"], prof["series"], depth)
    return out


def photon_figures(report: dict) -> dict[str, tuple]:
    """One figure per material (mean free path and shares by process) and the detector's photon map."""
    out = {f"fig/photon-{slug}.svg": _job("photon_figure", report["photon_figures"][name])
           for name, slug in report["material_slugs"].items()}
    out["fig/photon-map.svg"] = _job("photon_process_map", report["photon_map"])
    return out


def radiator_figures(report: dict) -> dict[str, tuple]:
    """Angle and identification-window figures per radiator."""
    kn = report["key_numbers"]
    labels = report["species_labels"]
    out = {}
    for name, r in kn["radiators"].items():
        slug = report["layer_slugs"][name]
        c = report["radiator_curves"][name]
        p = c["momentum_GeV_c"]
        series = [{"label": labels[sp], "y": c[f"theta_mrad_{sp}"]} for sp in labels]
        out[f"fig/cherenkov-angle-{slug}.svg"] = _job("angle_figure", p, series, r["saturated_angle_mrad"])
        if r["windows"]:
            out[f"fig/cherenkov-windows-{slug}.svg"] = _job("windows_figure", r["windows"], labels, (p[0], p[-1]))
    return out


def signal_figures(report: dict) -> dict[str, tuple]:
    """One energy-loss distribution figure per sensitive single-slab layer."""
    return {f"fig/straggling-{report['layer_slugs'][name]}.svg":
            _job("straggling_figure", f["energy_keV"], f["density_per_keV"], f["mode_keV"], f["threshold"], f["keV_per_fC"],
                 f["model"]) for name, f in report["signal_figures"].items()}


def identification_figures(report: dict) -> dict[str, tuple]:
    """The combined identification picture, and per timing or sampling layer its separation curves (and the most
    probable loss per sample of each species)."""
    ident = report["identification"]
    labels = report["species_labels"]
    p = ident["momentum_GeV_c"]
    out = {"fig/identification.svg": _job("identification_figure", ident["rows"], ident["techniques"], labels,
                                          ident["momentum_range_GeV_c"])}
    for family, prefix in (("time of flight", "tof"), ("energy loss", "dedx")):
        for layer, series in ident["separation_curves"][family].items():
            out[f"fig/identification-{prefix}-{report['layer_slugs'][layer]}.svg"] = _job(
                "separation_figure", p, series, labels, f"{family} separation (standard deviations)")
    for layer, losses in ident["losses_keV"].items():
        series = [{"label": labels[sp], "x": p, "y": y, "valid": np.isfinite(y)} for sp, y in losses.items()]
        out[f"fig/identification-loss-{report['layer_slugs'][layer]}.svg"] = _job(
            "species_curves", series, "momentum at the origin (GeV/c)", "most probable loss per sample (keV)", "")
    return out


def tracking_figures(report: dict) -> dict[str, tuple]:
    """sigma(p)/p per species (with a momentum measurement) and the origin resolutions of every species."""
    kn = report["key_numbers"]
    labels = report["species_labels"]
    out = {}
    series = []
    for sp, r in kn["tracking_resolution"].items():
        if kn["tracking_layout"]["fits_momentum"]:
            out[f"fig/tracking-momentum-{report['species_slugs'][sp]}.svg"] = _job(
                "resolution_figure", r["momentum_GeV_c"], r["sigma_p_over_p"], r["sigma_p_over_p_measurement"],
                r["sigma_p_over_p_scattering"], r["energy_loss_flag_below_GeV_c"], r["parts_equal_at_GeV_c"], labels[sp])
        series.append({"label": labels[sp], "origin_um": r["sigma_origin_um"], "angle_mrad": r["sigma_angle_mrad"]})
    if kn["tracking_layout"]["fits_position"]:
        p = next(iter(kn["tracking_resolution"].values()))["momentum_GeV_c"]
        out["fig/tracking-origin.svg"] = _job("origin_figure", p, series)
    return out


def render_site(report: dict, build_info: dict, single: bool = False, workers: int = 1,
                cache_dir=None) -> dict[str, bytes]:
    """Every file of the site, in memory: pages, key-numbers.json and static assets. The figures are drawn in
    a process pool while the pages are rendered."""
    from . import handbook
    jobs = {"fig/reach.svg": reach_figure(report)}
    sc = report["tracking_scattering_curves"]
    jobs["fig/tracking-scattering.svg"] = _job(
        "species_curves", [{"label": report["species_labels"][sp], "x": sc["momentum_GeV_c"], "y": sc[f"theta0_mrad_{sp}"],
                            "valid": np.ones_like(sc["momentum_GeV_c"], dtype=bool)} for sp in report["species_labels"]],
        "momentum (GeV/c)", "θ₀ through the tracking volume (mrad)", "")
    for name in report["material_slugs"]:
        jobs.update(material_figures(report, name))
    jobs.update(calorimetry_figures(report))
    jobs.update(photon_figures(report))
    jobs.update(radiator_figures(report))
    jobs.update(signal_figures(report))
    jobs.update(identification_figures(report))
    jobs.update(tracking_figures(report))
    drawer = Drawer(jobs, workers=workers, cache_dir=cache_dir)
    env = environment(Path(cache_dir).parent / "templates" if cache_dir is not None else None)
    full_kn = report["key_numbers"]
    kn, layers_note = handbook.page_view(full_kn)
    systems = handbook.systems(kn, report)
    report = dict(report, has_changes=report.get("changes") is not None)
    common = {"kn": kn, "layers_note": layers_note, "report": report, "build": build_info, "slugs": report["material_slugs"],
              "summary_html": markdown_safe(report["summary_markdown"]), "systems": systems,
              "titles": handbook.SYSTEM_TITLES, "grid": report["momentum_grid_GeV_c"], "notes": handbook.reach_notes(),
              "reach_cells": handbook.reach_cells(kn, report, "reach")}
    files: dict[str, bytes] = {}
    pages = [("index.html", "index.html", {"title": kn["experiment"]["name"], "page": "index",
                                           "strips": handbook.stack_strips(full_kn)}),
             ("quickref.html", "quickref.html", {"title": "Quick reference", "page": "quickref",
                                                 "q": handbook.quick_reference(kn, report)}),
             ("methods.html", "methods.html", {"title": "Methods and validity", "page": "methods",
                                               "methods": [dict(m) for m in datafiles.methods()]}),
             ("downloads.html", "downloads.html", {"title": "Downloads", "page": "downloads",
                                                   "files": handbook.downloads(report)}),
             ("charged.html", "charged.html", {"title": "Charged particles in the stack", "page": "charged",
                                               "handbook_reach": handbook.reach_rows(kn, report, "reach"),
                                               "handbook_cross": handbook.reach_rows(kn, report, "cross")}),
             ("budget.html", "budget.html", {"title": "Material budget", "page": "budget"}),
             ("signals.html", "signals.html", {"title": "Thin-sensor signals", "page": "signals",
                                               "layers": [l for l in kn["layers"] if "straggling" in l]}),
             ("tracking.html", "tracking.html", {"title": "Tracking resolution", "page": "tracking"}),
             ("photons.html", "photons.html", {"title": "Photons", "page": "photons"}),
             ("identification.html", "identification.html", {"title": "Particle identification", "page": "identification",
                                                             "ident": report["identification"]})]
    if report["has_changes"]:
        pages.append(("changes.html", "changes.html", {"title": "Changes since the baseline", "page": "changes",
                                                       "c": report["changes"]}))
    for system in systems:
        pages.append((f"system-{system['kind']}.html", "system.html", {"title": system["title"], "page": "system",
                                                                       "s": system}))
    for sp in handbook.species_pages(kn, report):
        pages.append((f"species-{report['species_slugs'][sp['key']]}.html", "species.html",
                      {"title": f"Particle: {sp['key']}", "page": "species", "sp": sp}))
    for name, r in kn["radiators"].items():
        pages.append((f"cherenkov-{report['layer_slugs'][name]}.html", "cherenkov.html",
                      {"title": f"Cherenkov radiator: {name}", "page": "cherenkov", "name": name, "r": r,
                       "slug": report["layer_slugs"][name]}))
    for kind, cal in kn["calorimeters"].items():
        pages.append((f"showers-{kind}.html", "showers.html", {"title": f"Showers: {handbook.SYSTEM_TITLES[kind]}", "page": "showers",
                                                               "kind": kind, "cal": cal}))
    for name, slug in report["material_slugs"].items():
        pages.append((f"material-{slug}.html", "material.html",
                      {"title": f"Material: {name}", "page": "material", "name": name, "m": kn["materials"][name],
                       "rows": report["round_table"][name]}))
    index = handbook.search_index(full_kn, report)
    for out, template, ctx in pages:
        html, headings = anchor_headings(env.get_template(template).render(**common, **ctx))
        files[out] = html.encode("utf-8")
        index.extend({"t": f"{text} — {ctx['title']}" if level > 1 else text, "u": f"{out}#{anchor}" if level > 1 else out,
                      "k": ctx["title"], "h": 1} for level, anchor, text in headings)
    files["data/key-numbers.json"] = json_bytes(full_kn)
    files["static/search-index.js"] = ("window.REFGEN_INDEX = " + json.dumps(index, sort_keys=True, ensure_ascii=False)
                                       + ";\n").encode("utf-8")
    for path, (header, rows) in report["csv_tables"].items():
        files[path] = csv_bytes(header, rows, f"{path.split('/')[-1]}: refgen {build_info['version']}, "
                                f"spec {build_info['spec_hash']}; units in the column names; valid=False rows lie "
                                "below the model's validity edge")
    files.update(drawer.collect())
    files.update(static_assets())
    if single:
        files["handbook.html"] = single_file(files, [p[0] for p in pages], f"{kn['experiment']['name']} handbook "
                                             f"({kn['experiment']['revision']})")
    return files


_MAIN = re.compile(r"<main>(.*?)</main>", re.S)
_HREF = re.compile(r'href="([A-Za-z0-9._-]+)\.html(#[A-Za-z0-9_-]+)?"')
_DATA_LINK = re.compile(r'<a href="(data/[^"]+)">(.*?)</a>', re.S)
_IMG = re.compile(r'src="(fig/[^"]+\.svg)"')


def single_file(files: dict[str, bytes], page_order: list[str], title: str) -> bytes:
    """One self-contained HTML: every page's main content in order, figures inlined as data URIs, the
    stylesheet inlined, internal links turned into in-document anchors and data-file links into plain names."""
    css = files["static/style.css"].decode("utf-8")
    parts = []
    for page in page_order:
        html = files[page].decode("utf-8")
        body = _MAIN.search(html).group(1)
        body = _DATA_LINK.sub(lambda m: f'<span class="datafile" title="in the site folder: {m.group(1)}">{m.group(2)}</span>', body)
        body = _HREF.sub(lambda m: f'href="#page-{m.group(1)}"', body)
        body = _IMG.sub(lambda m: 'src="data:image/svg+xml;base64,' + base64.b64encode(files[m.group(1)]).decode("ascii") + '"', body)
        parts.append(f'<section class="single-page" id="page-{page[:-5]}">{body}</section>')
    nav = "".join(f'<a href="#page-{p[:-5]}">{p[:-5]}</a> ' for p in page_order)
    doc = (f'<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8"><title>{escape(title)}</title>'
           f'<style>{css}\n.single-page {{ border-top: 2px solid #24313d; margin-top: 2rem; }}</style></head>'
           f'<body class="single"><header class="masthead"><div class="bar"><span class="home">{escape(title)}</span></div>'
           f'<nav class="secondary">{nav}</nav></header><main>{"".join(parts)}</main></body></html>\n')
    return doc.encode("utf-8")
