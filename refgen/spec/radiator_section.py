"""Validator for the `radiators:` section: Cherenkov radiators, each naming a single-slab layer of the stack."""
from __future__ import annotations

import difflib

from ..model import Layer, Radiator
from .context import Context

DEFAULT_DETECTION_EFFICIENCY = 0.2  # common practice: a photodetector's overall efficiency of order 20%

RADIATOR_KEYS = {
    "layer": "Name of the radiating layer (required).",
    "photon_band": "{from, to}: photon energies the photodetector sees, with units (default 1.8-3.6 eV).",
    "detection_efficiency": "Overall photon detection efficiency, 0-1 (default 0.2, common practice).",
    "angle_resolution": "Per-photon Cherenkov-angle resolution, with unit, for ring imaging.",
    "mode": "threshold or imaging (default threshold).",
}


def read_radiators(ctx: Context, data, layers: tuple[Layer, ...], materials: dict,
                   layer_names: set) -> tuple[Radiator, ...]:
    """The optional `radiators:` list: which single-slab layer radiates, its photon band and response."""
    value = data.get("radiators", [])
    if not isinstance(value, list):
        ctx.error(("radiators",), "expected a list of radiators")
        return ()
    by_name = {layer.name: layer for layer in layers}
    out, seen = [], set()
    for i, item in enumerate(value):
        path = ("radiators", i)
        if not ctx.keys(item, path, RADIATOR_KEYS, ("layer",)):
            continue
        name = item["layer"]
        if not isinstance(name, str) or name not in layer_names:
            close = difflib.get_close_matches(str(name), sorted(layer_names), n=1)
            hint = f"; did you mean '{close[0]}'?" if close else ""
            ctx.error(path + ("layer",), f"unknown layer '{name}'{hint}")
            continue
        if name in seen:
            ctx.error(path + ("layer",), f"layer '{name}' is listed as a radiator twice")
            continue
        seen.add(name)
        layer = by_name.get(name)
        if layer is None:
            continue
        if layer.is_sampling:
            ctx.error(path + ("layer",), f"layer '{name}' is a sampling structure; a radiator must be a single slab")
            continue
        mat = materials.get(layer.slabs[0].material)
        if mat is not None and mat.refractive_index is None:
            ctx.error(path + ("layer",), f"material '{mat.name}' of layer '{name}' has no refractive_index")
            continue
        band = item.get("photon_band", {"from": "1.8 eV", "to": "3.6 eV"})
        if not isinstance(band, dict) or set(band) != {"from", "to"}:
            ctx.error(path + ("photon_band",), "expected {from: ..., to: ...} photon energies with units")
            continue
        lo = ctx.quantity(band["from"], path + ("photon_band", "from"), "energy")
        hi = ctx.quantity(band["to"], path + ("photon_band", "to"), "energy")
        if lo is None or hi is None:
            continue
        if not lo < hi:
            ctx.error(path + ("photon_band",), "'from' must be below 'to'")
            continue
        eff = item.get("detection_efficiency", DEFAULT_DETECTION_EFFICIENCY)
        if isinstance(eff, bool) or not isinstance(eff, (int, float)) or not 0 < eff <= 1:
            ctx.error(path + ("detection_efficiency",), f"detection_efficiency must be a number in (0, 1] (got {eff!r})")
            continue
        res = None
        if "angle_resolution" in item:
            res = ctx.quantity(item["angle_resolution"], path + ("angle_resolution",), "angle")
            if res is None:
                continue
            res *= 1e3
        mode = item.get("mode", "imaging" if res is not None else "threshold")
        if mode not in ("threshold", "imaging"):
            ctx.error(path + ("mode",), f"mode must be threshold or imaging (got {mode!r})")
            continue
        out.append(Radiator(name, (lo * 1e6, hi * 1e6), float(eff), "detection_efficiency" not in item, res, mode))
    return tuple(out)
