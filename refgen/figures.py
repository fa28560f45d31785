"""Figures in refgen's house style: matplotlib SVG, deterministic (fixed hash salt, no dates), colour-blind-safe.

Each function takes plain data and returns SVG bytes. Species are told apart by line style as well as colour.
"""
from __future__ import annotations

import functools
import io
import math
import os
import re
from importlib import metadata
from pathlib import Path

import numpy as np

from .cache import content_key, process_pool

# Okabe & Ito (2008) colour-blind-safe palette, in our own order.
PALETTE = ["#0072B2", "#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#000000", "#F0E442"]
DASHES = ["-", "--", "-.", ":", (0, (5, 1, 1, 1)), (0, (3, 1, 1, 1, 1, 1)), (0, (8, 2)), (0, (1, 1))]
STYLE = {
    "svg.hashsalt": "refgen", "svg.fonttype": "none", "font.family": ["DejaVu Sans", "sans-serif"], "font.size": 9,
    "axes.grid": True, "grid.color": "#d9dde2", "grid.linewidth": 0.6, "axes.edgecolor": "#59636e",
    "axes.spines.top": False, "axes.spines.right": False, "legend.frameon": False, "lines.linewidth": 1.6,
    "figure.dpi": 100,
}


def _plt():
    """matplotlib's pyplot with the Agg backend, imported on first use (a rebuild from the cache needs none)."""
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    return plt


def species_tex(label: str) -> str:
    """Matplotlib mathtext for a species label: 'pi+' -> $\\pi^{+}$, 'He-3' -> $^{3}$He."""
    greek = {"pi": r"\pi", "mu": r"\mu", "alpha": r"\alpha"}
    if label == "p-bar":
        return r"$\bar{p}$"
    if label.startswith("He-"):
        return f"$^{{{label[3:]}}}$He"
    if label and label[-1] in "+-":
        return f"${greek.get(label[:-1], label[:-1])}^{{{'+' if label[-1] == '+' else '-'}}}$"
    return f"${greek[label]}$" if label in greek else label


_METADATA = re.compile(rb"\s*<metadata>.*?</metadata>", re.S)


def line_style(i: int) -> dict:
    """Colour and dash for the i-th series."""
    return {"color": PALETTE[i % len(PALETTE)], "linestyle": DASHES[i % len(DASHES)]}


def to_svg(fig) -> bytes:
    """Serialise a figure to SVG bytes without dates or random ids."""
    plt = _plt()
    buf = io.BytesIO()
    fig.savefig(buf, format="svg", metadata={"Date": None, "Creator": None}, bbox_inches="tight")
    plt.close(fig)
    return _METADATA.sub(b"", buf.getvalue())


def species_curves(series: list[dict], xlabel: str, ylabel: str, edge_label: str, marks=()) -> bytes:
    """Log-log curves per species; the part of limited validity is drawn thin and grey-dotted.

    series: [{"label", "x", "y", "valid"}]; marks: [(x, y, text)] points to annotate (e.g. the minimum).
    """
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 4.0))
        for i, s in enumerate(series):
            x, y, ok = np.asarray(s["x"]), np.asarray(s["y"]), np.asarray(s["valid"], dtype=bool)
            st = line_style(i)
            ax.plot(np.where(ok, x, np.nan), np.where(ok, y, np.nan), label=species_tex(s["label"]), **st)
            if (~ok).any():
                edge = np.argmax(ok) if ok.any() else len(ok)
                ax.plot(x[: edge + 1], y[: edge + 1], color=st["color"], linestyle=":", linewidth=0.8, alpha=0.6)
        if any((~np.asarray(s["valid"], dtype=bool)).any() for s in series):
            ax.plot([], [], color="#777777", linestyle=":", linewidth=0.8, label=edge_label)
        for x, y, text in marks:
            ax.plot([x], [y], marker="o", color="#333333", markersize=3.5, linestyle="none")
            ax.annotate(text, (x, y), textcoords="offset points", xytext=(4, -10), fontsize=7.5, color="#333333")
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


MAX_LAYER_LABELS = 40  # beyond this many layers the layer axis names every k-th layer only
MAX_LAYER_MARKERS = 60  # beyond this many layers the per-layer curves are drawn without markers


def layer_label_stride(n: int) -> int:
    """Name every k-th layer on a layer axis so that at most MAX_LAYER_LABELS names are printed."""
    return max(1, -(-n // MAX_LAYER_LABELS))


def _layer_axis(ax, layers: list[str], xlabel: str) -> None:
    """A categorical x axis of layer names in stack order, with a log y axis. Long stacks name every k-th
    layer (and the last), and say so in the axis label."""
    ax.set_yscale("log")
    k = layer_label_stride(len(layers))
    ticks = sorted(set(range(0, len(layers), k)) | {len(layers) - 1}) if layers else []
    ax.set_xticks(ticks)
    ax.set_xticklabels([layers[i] for i in ticks], rotation=60, ha="right", fontsize=7)
    ax.set_xlabel(xlabel if k == 1 else f"{xlabel}; every {k}th of {len(layers)} layers named")


def reach_figure(layers: list[str], series: list[dict]) -> bytes:
    """Momentum each species needs to reach each layer: one step line per species over the stack."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.8, 4.2))
        idx = np.arange(len(layers))
        for i, s in enumerate(series):
            y = np.array([np.nan if v is None or v <= 0 else v for v in s["y"]], dtype=float)
            ax.plot(idx, y, marker="os^vD<>p"[i % 8], markersize=3.5 if len(layers) <= MAX_LAYER_MARKERS else 0, label=species_tex(s["label"]), **line_style(i))
        _layer_axis(ax, layers, "layer reached (front face)")
        ax.set_ylabel("momentum needed at the interaction point (GeV/c)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def budget_figure(layers: list[str], cum_x0: list[float], cum_li: list[float]) -> bytes:
    """Cumulative material budget along the stack: x/X0 and x/lambda_I after each layer (log scale)."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.8, 4.0))
        idx = np.arange(len(layers))
        ax.step(idx, cum_x0, where="mid", label="Σ x/X$_0$", **line_style(0))
        ax.step(idx, cum_li, where="mid", label="Σ x/λ$_I$", **line_style(1))
        _layer_axis(ax, layers, "after layer")
        ax.set_ylabel("cumulative thickness (radiation or interaction lengths)")
        ax.legend(fontsize=8, loc="upper left")
        return to_svg(fig)


def profile_figure(t, series: list[dict], depth_x0: float) -> bytes:
    """Longitudinal shower profiles (1/E dE/dt against depth in X0), with the calorimeter's depth marked."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 3.8))
        for i, s in enumerate(series):
            ax.plot(t, s["y"], label=s["label"], **line_style(i))
        ax.axvline(depth_x0, color="#444444", linewidth=1.0)
        ax.annotate("back of the calorimeter", (depth_x0, ax.get_ylim()[1] * 0.95), xytext=(-4, 0),
                    textcoords="offset points", ha="right", va="top", fontsize=7.5, color="#444444")
        ax.set_xlabel("depth t (radiation lengths X$_0$)")
        ax.set_ylabel("(1/E) dE/dt (per X$_0$)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


BAND_COLOURS = {"photoelectric absorption": "#fbe3c8", "Compton scattering": "#dcebf5", "pair production": "#e2f1df"}
PROCESS_LABELS = {"photoelectric": "photoelectric absorption", "coherent": "coherent (Rayleigh) scattering",
                  "incoherent": "incoherent (Compton) scattering", "pair_nuclear": "pair production, nuclear field",
                  "pair_electron": "pair production, electron field", "total": "total"}


def photon_figure(e, curves: dict, bands: list[dict]) -> bytes:
    """Mass attenuation by process against photon energy, with the dominance bands shaded and named."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.6, 4.2))
        lo, hi = float(e[0]), float(e[-1])
        for b in bands:
            a, z = max(b["from_MeV"], lo), min(b["to_MeV"], hi)
            if z <= a:
                continue
            ax.axvspan(a, z, color=BAND_COLOURS[b["process"]], zorder=0, linewidth=0)
            ax.text(math.sqrt(a * z), 0.98, b["process"].replace(" ", "\n", 1), transform=ax.get_xaxis_transform(),
                    ha="center", va="top", fontsize=7, color="#444444")
        for i, key in enumerate(["total", "photoelectric", "incoherent", "coherent", "pair_nuclear", "pair_electron"]):
            y = np.where(curves[key] > 0, curves[key], np.nan)
            style = {"color": "#000000", "linestyle": "-", "linewidth": 2.2} if key == "total" else line_style(i - 1)
            ax.plot(e, y, label=PROCESS_LABELS[key], **style)
        ax.set_xscale("log")
        ax.set_yscale("log")
        top = float(np.nanmax(curves["total"]))
        ax.set_ylim(max(top * 1e-7, 1e-6), top * 30)
        ax.set_xlim(lo, hi)
        ax.set_xlabel("photon energy (MeV)")
        ax.set_ylabel("mass attenuation coefficient (cm²/g)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def regime_figure(rows: list[dict], placed: list[dict]) -> bytes:
    """The photon-regime map: crossover lines in the (energy, Z) plane with the spec's materials placed."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.6, 4.4))
        z = np.array([r["Z"] for r in rows], dtype=float)
        pc = np.array([np.nan if r["photoelectric_compton_MeV"] is None else r["photoelectric_compton_MeV"] for r in rows])
        cp = np.array([np.nan if r["compton_pair_MeV"] is None else r["compton_pair_MeV"] for r in rows])
        ax.fill_betweenx(z, 1e-3, pc, color=BAND_COLOURS["photoelectric absorption"], linewidth=0)
        ax.fill_betweenx(z, pc, cp, color=BAND_COLOURS["Compton scattering"], linewidth=0)
        ax.fill_betweenx(z, cp, 1e5, color=BAND_COLOURS["pair production"], linewidth=0)
        ax.plot(pc, z, color="#8a4b00", linewidth=1.4, label="photoelectric = Compton")
        ax.plot(cp, z, color="#1f5f8b", linewidth=1.4, linestyle="--", label="Compton = pair production")
        labelled: list[float] = []
        for p in sorted(placed, key=lambda q: q["z"]):
            for x in (p["pc"], p["cp"]):
                if x:
                    ax.plot([x], [p["z"]], marker="o", markersize=3.5, color="#222222", linestyle="none")
            if p["cp"] and all(abs(p["z"] - z0) > 3.0 for z0 in labelled):
                ax.annotate(p["name"], (p["cp"], p["z"]), textcoords="offset points", xytext=(5, 2), fontsize=7)
                labelled.append(p["z"])
        ax.text(3e-3, 60, "photoelectric\nabsorption\ndominates", fontsize=8, color="#444444")
        ax.text(0.5, 8, "Compton scattering\ndominates", fontsize=8, color="#444444", ha="center")
        ax.text(2e3, 60, "pair\nproduction\ndominates", fontsize=8, color="#444444", ha="center")
        ax.set_xscale("log")
        ax.set_xlim(1e-3, 1e5)
        ax.set_ylim(1, 100)
        ax.set_xlabel("photon energy (MeV)")
        ax.set_ylabel("atomic number Z (materials at their mean electron-weighted Z)")
        ax.legend(fontsize=7.5, loc="lower right")
        return to_svg(fig)


def angle_figure(p_gev, series: list[dict], saturated_mrad: float) -> bytes:
    """Cherenkov angle against momentum per species, with the saturated angle marked."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 3.8))
        for i, s in enumerate(series):
            ax.plot(p_gev, s["y"], label=species_tex(s["label"]), **line_style(i))
        ax.axhline(saturated_mrad, color="#777777", linewidth=0.8, linestyle=":")
        ax.annotate(f"β → 1: {saturated_mrad:.1f} mrad", (p_gev[0], saturated_mrad), xytext=(2, 3),
                    textcoords="offset points", fontsize=7.5, color="#555555")
        ax.set_xscale("log")
        ax.set_ylim(0, saturated_mrad * 1.12)
        ax.set_xlabel("momentum (GeV/c)")
        ax.set_ylabel("Cherenkov angle (mrad)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def windows_figure(windows: list[dict], labels: dict, p_range: tuple[float, float]) -> bytes:
    """Threshold-mode identification windows: one horizontal band per species pair on a log momentum axis."""
    plt = _plt()
    with plt.rc_context(STYLE):
        height = max(1.8, 0.28 * len(windows) + 0.9)
        fig, ax = plt.subplots(figsize=(6.4, height))
        keys = list(dict.fromkeys(w["radiates"] for w in windows))
        for row, w in enumerate(windows):
            st = line_style(keys.index(w["radiates"]))
            ax.barh(row, w["to_GeV_c"] - w["from_GeV_c"], left=w["from_GeV_c"], height=0.62, color=st["color"],
                    alpha=0.35, edgecolor=st["color"], linewidth=1.0, hatch="///" if keys.index(w["radiates"]) % 2 else None)
            if w.get("efficient_from_GeV_c"):
                ax.plot([w["efficient_from_GeV_c"]], [row], marker="|", markersize=9, color="#222222")
        ax.set_yticks(range(len(windows)))
        ax.set_yticklabels([f"{', '.join(species_tex(labels[k]) for k in w['radiates_all'])} lit, "
                            f"{', '.join(species_tex(labels[k]) for k in w['silent_all'])} dark" for w in windows], fontsize=7)
        ax.invert_yaxis()
        ax.set_xscale("log")
        ax.set_xlim(*p_range)
        ax.set_xlabel("momentum (GeV/c)   (| : lighter species gives ≥ 3 photoelectrons)")
        ax.grid(axis="y", visible=False)
        return to_svg(fig)



@functools.cache
def _code_version() -> bytes:
    """This module's source and matplotlib's version: a change to either invalidates every cached figure."""
    return Path(__file__).read_bytes() + metadata.version("matplotlib").encode()


def job_key(job: tuple) -> str:
    """Content hash of a figure job (function, arguments, drawing code)."""
    return content_key(_code_version(), job)


def draw(job: tuple) -> bytes:
    """Draw one figure job: (function name, arguments)."""
    name, args = job
    return globals()[name](*args)


class Drawer:
    """Draws figure jobs in a process pool while the caller renders pages; cached SVGs are reused by content
    hash. ``collect()`` returns path -> SVG bytes."""

    def __init__(self, jobs: dict[str, tuple], workers: int = 1, cache_dir=None):
        self.cache = Path(cache_dir) if cache_dir else None
        self.keys = {path: job_key(job) for path, job in jobs.items()}
        self.done: dict[str, bytes] = {}
        todo = {}
        for path, job in jobs.items():
            hit = self.cache / f"{self.keys[path]}.svg" if self.cache else None
            if hit is not None and hit.is_file():
                self.done[path] = hit.read_bytes()
            else:
                todo[path] = job
        self.paths = sorted(todo)
        self.pool = None
        if workers > 1 and len(self.paths) > 1:
            self.pool = process_pool(workers)
            self.futures = [self.pool.submit(draw, todo[p]) for p in self.paths]
        else:
            self.todo = todo

    def collect(self) -> dict[str, bytes]:
        try:
            if self.pool is not None:
                drawn = [f.result() for f in self.futures]
            else:
                drawn = [draw(self.todo[p]) for p in self.paths]
        finally:
            if self.pool is not None:
                self.pool.shutdown(cancel_futures=True)
        for path, svg in zip(self.paths, drawn):
            self.done[path] = svg
            if self.cache is not None:
                self.cache.mkdir(parents=True, exist_ok=True)
                tmp = self.cache / f".{self.keys[path]}.{os.getpid()}.tmp"
                tmp.write_bytes(svg)
                tmp.replace(self.cache / f"{self.keys[path]}.svg")
        return self.done
