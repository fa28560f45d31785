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

# Derived from Okabe & Ito (2008)'s colour-blind-safe palette, in our own order; its pale orange, sky blue and
# yellow are replaced by darker tones so that every line has a contrast of at least 3:1 on white (WCAG 2.1 1.4.11).
PALETTE = ["#0072B2", "#D55E00", "#009E73", "#AD4F8C", "#9E6B00", "#000000", "#5E3C99", "#8C564B"]
DASHES = ["-", "--", "-.", (0, (6, 1.5, 1.5, 1.5, 1.5, 1.5)), (0, (10, 2)), (0, (3, 1, 1, 1, 1, 1)), (0, (5, 1.2)),
          (0, (1.5, 1.2))]
# The part of a curve outside its model's validity: a wide pale grey band, unlike any species line.
LIMITED = {"color": "#c3c9d0", "linewidth": 4.5, "linestyle": "-", "solid_capstyle": "butt", "zorder": 1}
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


def _tick_label(v: float, _pos=None) -> str:
    """A log-axis tick: plain from 0.001 to 10^5, else m×10^e (10^e when m = 1)."""
    if v <= 0:
        return ""
    if 1e-3 <= v < 1e5:
        return f"{v:g}"
    e = math.floor(math.log10(v) + 1e-9)
    m = v / 10 ** e
    return f"$10^{{{e}}}$" if abs(m - 1) < 1e-6 else f"${m:g}\\times10^{{{e}}}$"


def _log_ticks(axis) -> None:
    """Log axis ticks at 1, 2, 5 x 10^n labelled as plain numbers, so values below 10 read directly."""
    from matplotlib.ticker import FuncFormatter, LogLocator, NullFormatter
    axis.set_major_locator(LogLocator(base=10, subs=(1.0, 2.0, 5.0)))
    axis.set_major_formatter(FuncFormatter(_tick_label))
    axis.set_minor_formatter(NullFormatter())


def _legend(ax, **kw) -> None:
    """The legend outside the axes on the right, so it never covers a curve."""
    ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0, **kw)


def _draw_species(ax, series: list[dict]) -> bool:
    """Each species' curve: valid part in its own style, the rest as the LIMITED band. True if any is limited.
    A species keeps its style (by position) in every figure; one with no valid point is not in the legend."""
    limited = False
    for i, s in enumerate(series):
        x, y, ok = np.asarray(s["x"], dtype=float), np.asarray(s["y"], dtype=float), np.asarray(s["valid"], dtype=bool)
        y = np.where(y > 0, y, np.nan)
        label = species_tex(s["label"]) if (ok & np.isfinite(y)).any() else None
        ax.plot(np.where(ok, x, np.nan), np.where(ok, y, np.nan), label=label, zorder=3, **line_style(i))
        if (~ok).any() and np.isfinite(y[~ok]).any():
            edge = int(np.argmax(ok)) if ok.any() else len(ok) - 1
            ax.plot(x[: edge + 1], y[: edge + 1], **LIMITED)
            limited = True
    return limited


def species_curves(series: list[dict], xlabel: str, ylabel: str, edge_label: str, marks=(), ylim=None) -> bytes:
    """Log-log curves per species; the part of limited validity is drawn as a pale grey band.

    series: [{"label", "x", "y", "valid"}]; marks: [(x, y, text)] points named in the legend (e.g. the minimum);
    ylim: (low, high) or None for the data's range."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 4.0))
        if _draw_species(ax, series):
            ax.plot([], [], label=edge_label, **LIMITED)
        for x, y, text in marks:
            ax.plot([x], [y], marker="o", color="#333333", markersize=4, linestyle="none", label=text, zorder=4)
        ax.set_xscale("log")
        ax.set_yscale("log")
        if ylim:
            ax.set_ylim(*ylim)
        _log_ticks(ax.yaxis)
        ax.set_xlabel(xlabel)
        ax.set_ylabel(ylabel)
        _legend(ax)
        return to_svg(fig)


def dedx_figure(series: list[dict], minimum: tuple[float, float, str], edge_label: str) -> bytes:
    """Collision (ionisation) energy loss per species against momentum, in two panels: log-log over the
    species' valid range, and a linear zoom on the minimum and the relativistic rise. minimum: (p, dE/dx, text)."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, (top, low) = plt.subplots(2, 1, figsize=(6.4, 5.6), sharex=True, gridspec_kw={"height_ratios": [3, 2]})
        y_min = minimum[1]
        peak = max(float(np.nanmax(np.where(np.asarray(s["valid"], bool), s["y"], np.nan))) for s in series
                   if np.asarray(s["valid"], bool).any())
        for ax in (top, low):
            limited = _draw_species(ax, series)
            ax.plot([minimum[0]], [y_min], marker="o", color="#333333", markersize=4, linestyle="none", zorder=4,
                    label=minimum[2] if ax is top else None)
        if limited:
            top.plot([], [], label=edge_label, **LIMITED)
        top.set_xscale("log")
        top.set_yscale("log")
        top.set_ylim(0.7 * y_min, 1.6 * max(peak, 3 * y_min))
        _log_ticks(top.yaxis)
        top.set_ylabel("collision dE/dx (MeV cm²/g)")
        low.set_ylim(0.9 * y_min, 2.0 * y_min)
        low.set_ylabel("linear zoom (MeV cm²/g)")
        low.set_xlabel("momentum (GeV/c)")
        _legend(top)
        return to_svg(fig)


LOSS_PARTS = (("total", "#000000", "-", 1.8), ("collision", "#0072B2", "--", 1.5), ("radiative", "#D55E00", "-.", 1.5))


def total_loss_figure(series: list[dict]) -> bytes:
    """Collision, radiative and total energy loss against momentum, one panel per species with radiative losses
    (the same y axis in all panels). series: [{"label", "x", "collision", "radiative", "total", "valid"}]."""
    plt = _plt()
    n = len(series)
    cols = min(n, 3)
    rows = (n + cols - 1) // cols
    with plt.rc_context(STYLE):
        fig, axes = plt.subplots(rows, cols, figsize=(2.4 * cols + 1.6, 2.6 * rows + 0.4), sharex=True, sharey=True,
                                 squeeze=False)
        floor = min(float(np.nanmin(np.where(np.asarray(s["valid"], bool), s["collision"], np.nan))) for s in series)
        for ax, s in zip(axes.flat, series):
            ok = np.asarray(s["valid"], dtype=bool)
            x = np.where(ok, np.asarray(s["x"], dtype=float), np.nan)
            for key, colour, dash, lw in LOSS_PARTS:
                y = np.asarray(s[key], dtype=float)
                ax.plot(x, np.where(y > 0, y, np.nan), color=colour, linestyle=dash, linewidth=lw, label=key)
            ax.set_title(species_tex(s["label"]), fontsize=9)
            ax.set_xscale("log")
            ax.set_yscale("log")
        for ax in list(axes.flat)[n:]:
            ax.set_visible(False)
        axes[0, 0].set_ylim(bottom=0.5 * floor)
        _log_ticks(axes[0, 0].yaxis)
        for ax in axes[-1]:
            ax.set_xlabel("momentum (GeV/c)")
        for ax in axes[:, 0]:
            ax.set_ylabel("energy loss (MeV cm²/g)")
        _legend(axes[0, cols - 1])
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


def reach_figure(layers: list[str], series: list[dict], shower_from: int | None = None, onset_x0: float = 1.0) -> bytes:
    """Momentum each species needs to reach each layer: one line per species over the stack. Layers from index
    ``shower_from`` on, where electrons and positrons shower, are shaded and have no electron points."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.8, 4.2))
        idx = np.arange(len(layers))
        if shower_from is not None:
            ax.axvspan(shower_from - 0.5, len(layers) - 0.5, color="#f3e6d6", linewidth=0, zorder=0,
                       label=f"e$^\\pm$ shower here\n(≥ {onset_x0:g} X$_0$ in front)")
        for i, s in enumerate(series):
            y = np.array([np.nan if v is None or v <= 0 else v for v in s["y"]], dtype=float)
            ax.plot(idx, y, marker="os^vD<>p"[i % 8], markersize=3.5 if len(layers) <= MAX_LAYER_MARKERS else 0, label=species_tex(s["label"]), **line_style(i))
        _layer_axis(ax, layers, "layer reached (front face)")
        _log_ticks(ax.yaxis)
        ax.set_ylabel("momentum needed at the interaction point (GeV/c)")
        _legend(ax)
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
        ax.axvline(depth_x0, color="#444444", linewidth=1.0, linestyle=(0, (1, 1.5)), label="back of the calorimeter")
        ax.set_xlabel("depth t (radiation lengths X$_0$)")
        ax.set_ylabel("(1/E) dE/dt (per X$_0$)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


# Photon processes in house words; colours from the Okabe & Ito palette, light enough to print text over.
PROCESS_COLOURS = {"photoabsorption": "#E69F00", "Compton scattering": "#56B4E9", "Rayleigh scattering": "#CC79A7",
                   "pair conversion": "#009E73"}
_INVALID_HATCH = {"facecolor": "none", "edgecolor": "#9aa3ad", "hatch": "xx", "linewidth": 0}


def _outside_validity(ax, lo: float, hi: float, valid: tuple[float, float], label: bool) -> None:
    """Hatch the parts of a log energy axis [lo, hi] that lie outside the photon model's validity."""
    for a, z in ((lo, min(hi, valid[0])), (max(lo, valid[1]), hi)):
        if z > a:
            ax.axvspan(a, z, zorder=0.5, **_INVALID_HATCH, label="outside the model's validity" if label else None)
            label = False


_LABEL_BOX = {"boxstyle": "square,pad=0.15", "facecolor": "white", "alpha": 0.75, "linewidth": 0}


def _energy_marks(ax, marks: list[dict], where: str | None) -> None:
    """Thin dashed vertical lines at the spec's photon energies of interest, labelled above the axes
    (where="above") or inside them near the bottom (where="inside")."""
    for m in marks:
        ax.axvline(m["MeV"], color="#3b4650", linewidth=0.8, linestyle=(0, (4, 2)), zorder=3)
        if where == "above":
            ax.annotate(m["label"], (m["MeV"], 1.0), xycoords=("data", "axes fraction"), xytext=(2, 2),
                        textcoords="offset points", rotation=90, ha="left", va="bottom", fontsize=6.5, color="#3b4650")
        elif where == "inside":
            ax.annotate(m["label"], (m["MeV"], 0.03), xycoords=("data", "axes fraction"), xytext=(-1, 0),
                        textcoords="offset points", rotation=90, ha="right", va="bottom", fontsize=6.5,
                        color="#1d252c", bbox=_LABEL_BOX, zorder=6)


def photon_process_map(data: dict) -> bytes:
    """The detector's photon map: one horizontal energy bar per material in stack order, coloured by the process
    that dominates absorption, the crossover energies ticked and labelled on each bar, and the spec's photon
    energies of interest drawn across all bars."""
    plt = _plt()
    rows = data["rows"]
    lo, hi = data["range_MeV"]
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(7.2, 0.42 * len(rows) + 1.5))
        for y, r in enumerate(rows):
            for b in r["bands"]:
                ax.barh(y, b["to_MeV"] - b["from_MeV"], left=b["from_MeV"], height=0.56,
                        color=PROCESS_COLOURS[b["process"]], alpha=0.75, linewidth=0)
            for c in r["crossovers"]:
                if c["inside"]:
                    ax.plot([c["MeV"], c["MeV"]], [y - 0.34, y + 0.34], color="#1d252c", linewidth=1.3, zorder=4)
                    ax.annotate(c["label"], (c["MeV"], y - 0.3), xytext=(2, 0), textcoords="offset points",
                                fontsize=6.5, color="#1d252c", va="bottom", zorder=5)
                else:  # named at the edge it lies beyond
                    below = c["MeV"] < lo
                    ax.annotate(f"◂ {c['label']}" if below else f"{c['label']} ▸", (lo if below else hi, y - 0.3),
                                xytext=(2 if below else -2, 0), textcoords="offset points", ha="left" if below else "right",
                                fontsize=6.5, color="#1d252c", va="bottom", zorder=5)
        _outside_validity(ax, lo, hi, data["valid_MeV"], False)
        _energy_marks(ax, data["marks"], "above")
        ax.set_yticks(range(len(rows)))
        ax.set_yticklabels([r["material"] for r in rows], fontsize=8)
        ax.set_ylim(len(rows) - 0.5, -0.5)
        ax.set_xscale("log")
        ax.set_xlim(lo, hi)
        ax.grid(axis="y", visible=False)
        ax.set_xlabel("photon energy (MeV)")
        handles = [plt.Rectangle((0, 0), 1, 1, color=PROCESS_COLOURS[k], alpha=0.75)
                   for k in ("photoabsorption", "Compton scattering", "pair conversion")]
        ax.legend(handles, ["photoabsorption\ndominates", "Compton scattering\ndominates", "pair conversion\ndominates"],
                  fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), labelspacing=1.0)
        return to_svg(fig)


def photon_figure(data: dict) -> bytes:
    """One material's photons: above, the mean free path (cm) against energy with the thickness of each layer of
    the material drawn across and the high-energy limit 9/7 X0; below, the share of interactions by process
    (stacked to 1), with pair conversion as one band and its electron-field part as a thin line. Solid vertical
    lines are the crossovers, dashed ones the spec's energies of interest."""
    plt = _plt()
    e = np.asarray(data["energy_MeV"], dtype=float)
    c = data["curves"]
    lo, hi = float(e[0]), float(e[-1])
    valid = data["valid_MeV"]
    inside = (e >= valid[0]) & (e <= valid[1])
    with plt.rc_context(STYLE):
        fig, (top, low) = plt.subplots(2, 1, figsize=(6.8, 5.4), sharex=True, gridspec_kw={"height_ratios": [1.25, 1.0]})
        mfp = 1.0 / (np.asarray(c["total"]) * data["density_g_cm3"])
        top.plot(e, np.where(inside, mfp, np.nan), color="#1d252c", linewidth=2.0, label="mean free path")
        if (~inside).any():
            top.plot(e, np.where(inside, np.nan, mfp), color="#1d252c", linewidth=0.8, linestyle=":")
        top.axhline(data["high_energy_free_path_cm"], color="#1d252c", linewidth=0.8, linestyle=(0, (1, 2)))
        top.annotate("9/7 X$_0$", (hi, data["high_energy_free_path_cm"]), xytext=(-2, 3), textcoords="offset points",
                     ha="right", fontsize=7, color="#1d252c")
        for i, t in enumerate(data["thicknesses"][:4]):
            colour = PALETTE[(i + 3) % len(PALETTE)]
            top.axhline(t["cm"], color=colour, linewidth=1.1, linestyle="--")
            top.annotate(t["label"], (lo, t["cm"]), xytext=(3, 3), textcoords="offset points", fontsize=7, color=colour)
        top.set_yscale("log")
        top.set_ylabel("mean free path (cm)")
        shares = [np.asarray(c[k]) / np.asarray(c["total"]) for k in ("photoabsorption", "compton", "rayleigh", "pair")]
        names = ["photoabsorption", "Compton scattering", "Rayleigh scattering", "pair conversion"]
        low.stackplot(e, *shares, colors=[PROCESS_COLOURS[n] for n in names], labels=names, alpha=0.75, linewidth=0)
        electron = shares[3] * np.asarray(c["pair_electron_field_share"])
        low.plot(e, 1.0 - electron, color="#1d252c", linewidth=0.7, label="above the thin line: pair\nconversion on atomic electrons")
        low.set_ylim(0, 1)
        low.set_ylabel("share of interactions")
        low.set_xlabel("photon energy (MeV)")
        for ax in (top, low):
            _outside_validity(ax, lo, hi, valid, ax is low)
            _energy_marks(ax, data["marks"], "inside" if ax is low else None)
            for x in data["crossovers"]:
                if lo <= x["MeV"] <= hi:
                    ax.axvline(x["MeV"], color="#1d252c", linewidth=1.0, alpha=0.6)
                    if ax is low:
                        ax.annotate(x["label"], (x["MeV"], 0.97), xycoords=("data", "axes fraction"), xytext=(2, 0),
                                    textcoords="offset points", ha="left", va="top", fontsize=6.5, color="#1d252c",
                                    bbox=_LABEL_BOX, zorder=6)
        low.set_xscale("log")
        low.set_xlim(lo, hi)
        low.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def angle_figure(p_gev, series: list[dict], saturated_mrad: float) -> bytes:
    """Cherenkov angle against momentum per species, with the saturated angle marked."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 3.8))
        for i, s in enumerate(series):
            ax.plot(p_gev, s["y"], label=species_tex(s["label"]), **line_style(i))
        ax.axhline(saturated_mrad, color="#444444", linewidth=0.9, linestyle=(0, (1, 1.5)),
                   label=f"β → 1: {saturated_mrad:.1f} mrad")
        ax.set_xscale("log")
        ax.set_ylim(0, saturated_mrad * 1.12)
        ax.set_xlabel("momentum (GeV/c)")
        ax.set_ylabel("Cherenkov angle (mrad)")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def windows_figure(windows: list[dict], labels: dict, p_range: tuple[float, float]) -> bytes:
    """Threshold-mode identification windows between neighbouring species groups: for each group that lights
    up, the window up to the next heavier group's threshold (wider windows against heavier species are unions
    of these and are listed in the page's table). One horizontal band per window on a log momentum axis."""
    plt = _plt()
    nearest = {}
    for w in windows:
        if w["radiates"] not in nearest or w["to_GeV_c"] < nearest[w["radiates"]]["to_GeV_c"]:
            nearest[w["radiates"]] = w
    shown = list(nearest.values())
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, max(1.6, 0.32 * len(shown) + 0.9)))
        for row, w in enumerate(shown):
            colour = PALETTE[row % len(PALETTE)]
            ax.barh(row, w["to_GeV_c"] - w["from_GeV_c"], left=w["from_GeV_c"], height=0.6, color=colour, alpha=0.85,
                    edgecolor=colour, linewidth=1.0)
            if w.get("efficient_from_GeV_c"):
                ax.plot([w["efficient_from_GeV_c"]], [row], marker="|", markersize=11, markeredgewidth=2,
                        color="#ffffff" if w["efficient_from_GeV_c"] > w["from_GeV_c"] * 1.02 else "#000000")
        ax.set_yticks(range(len(shown)))
        ax.set_yticklabels([f"{', '.join(species_tex(labels[k]) for k in w['radiates_all'])} lit, "
                            f"{', '.join(species_tex(labels[k]) for k in w['silent_all'])} dark" for w in shown], fontsize=8)
        ax.invert_yaxis()
        ax.set_xscale("log")
        ax.set_xlim(*p_range)
        ax.set_xlabel("momentum (GeV/c); axis ends = ends of the momentum grid; | : lighter species gives ≥ 3 photoelectrons",
                      fontsize=8)
        ax.grid(axis="y", visible=False)
        return to_svg(fig)


def _kev(value: float) -> str:
    """An energy in keV for a label: 3 significant figures, without an exponent."""
    return f"{value:.3g}" if abs(value) < 1000 else f"{value:.0f}"


def straggling_figure(energy_kev, density, mode_kev: float, threshold: dict | None, kev_per_fc: float | None,
                      model: str) -> bytes:
    """Energy-loss distribution of a minimum-ionising particle in one layer, with the most probable loss, the
    readout threshold (the part above it shaded) and the highest threshold keeping 99 % marked; a charge axis on
    top where the pair energy is known. threshold: {"keV", "label", "efficiency", "keep99_keV"} or None."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 3.6))
        e, p = np.asarray(energy_kev), np.asarray(density)
        ax.plot(e, p, label=f"{model.capitalize()} distribution, widened for atomic binding", **line_style(0))
        top = float(p.max())
        ax.axvline(mode_kev, color="#555555", linewidth=0.8, linestyle=":")
        ax.annotate(f"most probable {_kev(mode_kev)} keV", (mode_kev, top * 1.02), xytext=(3, 0), textcoords="offset points",
                    fontsize=7.5, color="#444444", va="bottom")
        if threshold:
            t = threshold["keV"]
            above = e >= t
            ax.fill_between(e[above], 0, p[above], color=PALETTE[0], alpha=0.15, linewidth=0,
                            label="above threshold: " + ("> 99.99 %" if threshold["efficiency"] > 0.9999
                                                         else f"{100 * threshold['efficiency']:.4g} %"))
            ax.axvline(t, color=PALETTE[1], linewidth=1.4)
            ax.annotate(f"threshold {threshold['label']}", (t, top * 0.55), xytext=(4, 0), textcoords="offset points",
                        fontsize=7.5, color=PALETTE[1])
            ax.axvline(threshold["keep99_keV"], color=PALETTE[2], linewidth=1.0, linestyle="--",
                        label=f"highest threshold keeping 99 %: {_kev(threshold['keep99_keV'])} keV")
        ax.set_xlim(0, float(e[-1]))
        ax.set_ylim(0, top * 1.15)
        ax.set_xlabel("energy deposited (keV)")
        ax.set_ylabel("probability per keV")
        if kev_per_fc:
            sec = ax.secondary_xaxis("top", functions=(lambda x: x / kev_per_fc, lambda q: q * kev_per_fc))
            sec.set_xlabel("charge freed (fC)")
        ax.legend(fontsize=7.5, loc="upper right")
        return to_svg(fig)


def pair_tex(light: list[str], heavy: list[str], labels: dict) -> str:
    """'e-, e+ / mu-' in mathtext for a pair of species groups."""
    return " / ".join(", ".join(species_tex(labels[k]) for k in group) for group in (light, heavy))


GAP_FILL = {"facecolor": "#eeeeee", "edgecolor": "#9a9a9a", "hatch": "xxx", "linewidth": 0.0}


def identification_figure(rows: list[dict], techniques: list[dict], labels: dict, p_range) -> bytes:
    """The identification picture: one band per species pair on a log momentum axis. Inside each band, one thin
    lane per technique holds the ranges it separates at >= 3 sigma; momenta no technique covers are cross-hatched
    across the whole band; energy-loss crossovers are marked with a diamond on the band's centre line."""
    plt = _plt()
    from matplotlib.patches import Patch, Rectangle
    n_lanes = max(len(techniques), 1)
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(7.2, 0.9 + len(rows) * (0.16 + 0.09 * n_lanes)))
        lane_h = 0.8 / n_lanes
        for r, row in enumerate(rows):
            for g in row["gaps"]:
                ax.add_patch(Rectangle((g["from"], r - 0.45), g["to"] - g["from"], 0.9, zorder=1, **GAP_FILL))
            for i, lane in enumerate(row["lanes"]):
                y = r - 0.4 + i * lane_h
                for lo, hi in lane["ranges"]:
                    ax.add_patch(Rectangle((lo, y + 0.1 * lane_h), hi - lo, 0.8 * lane_h, color=PALETTE[i % len(PALETTE)],
                                           zorder=2, linewidth=0))
            for c in row["crossovers"]:
                ax.plot([c], [r], marker="D", markersize=3.2, color="#222222", zorder=3, linestyle="none")
            if r:
                ax.axhline(r - 0.5, color="#c8ccd1", linewidth=0.5, zorder=0)
        ax.set_xscale("log")
        ax.set_xlim(*p_range)
        ax.set_ylim(len(rows) - 0.5, -0.5)
        ax.set_yticks(range(len(rows)))
        ax.set_yticklabels([pair_tex(row["light"], row["heavy"], labels) for row in rows], fontsize=7.5)
        ax.grid(axis="y", visible=False)
        ax.set_xlabel("momentum at the origin (GeV/c)")
        handles = [Patch(color=PALETTE[i % len(PALETTE)], label=t["label"]) for i, t in enumerate(techniques)]
        handles.append(Patch(label="no technique reaches 3σ", **GAP_FILL))
        if any(row["crossovers"] for row in rows):
            handles.append(plt.Line2D([], [], marker="D", markersize=3.2, color="#222222", linestyle="none",
                                      label="energy-loss crossover"))
        ax.legend(handles=handles, fontsize=7, loc="lower left", bbox_to_anchor=(0.0, 1.01), ncol=2)
        return to_svg(fig)


def separation_figure(p_gev, series: list[dict], labels: dict, ylabel: str) -> bytes:
    """Separation in standard deviations against momentum for a few species pairs, with the 3-sigma line."""
    plt = _plt()
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 3.8))
        top = 3.0
        for i, s in enumerate(series):
            y = np.asarray(s["n_sigma"], dtype=float)
            y = np.where(y > 0, y, np.nan)
            if np.isfinite(y).any():
                top = max(top, float(np.nanmax(y)))
            ax.plot(p_gev, y, label=pair_tex(s["light"], s["heavy"], labels), **line_style(i))
        ax.axhline(3.0, color="#444444", linewidth=0.9)
        ax.annotate("3σ", (p_gev[-1], 3.0), xytext=(-2, 3), textcoords="offset points", ha="right", fontsize=7.5)
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_ylim(0.1, top * 2)
        ax.set_xlabel("momentum at the origin (GeV/c)")
        ax.set_ylabel(ylabel)
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def _flag_band(ax, flag_below, label: str) -> None:
    """Shade the momenta below ``flag_below`` (GeV/c), where a number is not valid as drawn."""
    if flag_below is not None:
        ax.axvspan(ax.get_xlim()[0], flag_below, color="#e6e6e6", zorder=0, label=label)


def resolution_figure(p_gev, total, measurement, scattering, flag_below, equal_at, label: str) -> bytes:
    """sigma(p)/p against momentum for one species: the full fit and its point-resolution and scattering parts,
    the momentum where the parts are equal, and the flagged momenta shaded."""
    plt = _plt()
    as_array = lambda v: np.array([np.nan if x is None else x for x in v], dtype=float)  # noqa: E731
    with plt.rc_context(STYLE):
        fig, ax = plt.subplots(figsize=(6.4, 4.0))
        ax.plot(p_gev, as_array(total) * 100, label="full fit", **line_style(0))
        ax.plot(p_gev, as_array(measurement) * 100, label="point resolution only", **line_style(1))
        ax.plot(p_gev, as_array(scattering) * 100, label="multiple scattering only", **line_style(2))
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlim(p_gev[0], p_gev[-1])
        _flag_band(ax, flag_below, "loses > 5 % of p before the last plane, or stops")
        if equal_at is not None and p_gev[0] <= equal_at <= p_gev[-1]:
            ax.axvline(equal_at, color="#555555", linewidth=0.8, linestyle=":")
            ax.annotate(f"parts equal at {equal_at:.3g} GeV/c", (equal_at, 0.02), xycoords=("data", "axes fraction"),
                        xytext=(3, 0), textcoords="offset points", fontsize=7.5, color="#333333")
        ax.set_xlabel("momentum (GeV/c)")
        ax.set_ylabel(f"σ(p)/p (%), {species_tex(label)}")
        ax.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
        return to_svg(fig)


def origin_figure(p_gev, series: list[dict]) -> bytes:
    """Position (um) and angle (mrad) resolution at the origin against momentum, per species, two panels."""
    plt = _plt()
    as_array = lambda v: np.array([np.nan if x is None else x for x in v], dtype=float)  # noqa: E731
    with plt.rc_context(STYLE):
        fig, (top, bottom) = plt.subplots(2, 1, figsize=(6.4, 5.6), sharex=True)
        for i, s in enumerate(series):
            top.plot(p_gev, as_array(s["origin_um"]), label=species_tex(s["label"]), **line_style(i))
            bottom.plot(p_gev, as_array(s["angle_mrad"]), **line_style(i))
        for ax in (top, bottom):
            ax.set_xscale("log")
            ax.set_yscale("log")
        top.set_ylabel("σ of the position at the origin (µm)")
        bottom.set_ylabel("σ of the angle (mrad)")
        bottom.set_xlabel("momentum (GeV/c)")
        top.legend(fontsize=7.5, loc="upper left", bbox_to_anchor=(1.01, 1.0))
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
