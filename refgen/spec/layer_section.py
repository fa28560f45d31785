"""Validator for the `layers:` section: the stack, its slabs, and the optional per-layer keys.

To add a per-layer key:
1. document it in LAYER_KEYS;
2. add its field (with a default) to ``model.Layer``;
3. write a checker ``(ctx, value, path, layer, materials) -> field value or None`` and register it in
   LAYER_OPTIONS. The checker sees the layer built so far (slabs, system, and the options registered before it),
   reports problems with ``ctx.error(path, ...)`` and returns None after an error.
"""
from __future__ import annotations

import dataclasses
import difflib
from typing import Callable

from ..model import SYSTEM_KINDS, Layer, Material, Slab
from .context import Context, name_ok
from .threshold import read_threshold
from .identification_section import check_samples, check_timing, check_truncation

LAYER_KEYS = {
    "name": "Layer name (required, unique).",
    "system": f"Detector system kind: {', '.join(SYSTEM_KINDS)} (required).",
    "material": "Material name (a single-slab layer).",
    "thickness": "Thickness with unit (a single-slab layer).",
    "active": "true if the layer is sensitive (default: true for tracking, cherenkov and muon layers).",
    "repeat": "Number of cells in a sampling structure.",
    "cell": "The slabs of one cell: [{material, thickness, active}, ...].",
    "resolution": "Point resolution in the bending direction, with unit, e.g. 12 um: the layer measures the track (single-slab, active layers only).",
    "threshold": "Readout threshold of a sensitive single-slab layer: an energy (25 keV) or a charge (0.8 fC, 3000 e; needs the material's pair_energy).",
    "timing": "Arrival-time resolution of a layer that measures time, e.g. 30 ps (time of flight).",
    "samples": "Number of energy-loss samples (cells or pad rows) of a gaseous tracking layer, for a truncated mean.",
    "truncation": "Kept fraction of the samples for the truncated mean, in (0, 1] (default 0.7; needs samples).",
}
SLAB_KEYS = {"material": "Material name (required).", "thickness": "Thickness with unit (required).",
             "active": "true for a sensitive slab."}

def _resolution(ctx: Context, value, path, layer: Layer, materials: dict) -> float | None:
    """A measuring layer's point resolution (cm): a single active slab; sampling structures do not measure."""
    if layer.is_sampling:
        ctx.error(path, f"layer '{layer.name}' is a sampling structure; only a single-slab layer can measure")
        return None
    if not layer.slabs[0].active:
        ctx.error(path, f"layer '{layer.name}' is not active; a measuring layer must be active")
        return None
    return ctx.quantity(value, path, "length")


OptionChecker = Callable[[Context, object, tuple, Layer, dict[str, Material]], object]

# spec key -> (model.Layer field, checker); applied in this order after the layer's geometry is valid.
LAYER_OPTIONS: dict[str, tuple[str, OptionChecker]] = {
    "resolution": ("resolution_cm", _resolution),
    "threshold": ("threshold", read_threshold),
    "timing": ("timing_ps", check_timing),
    "samples": ("samples", check_samples),
    "truncation": ("truncation", check_truncation),
}


def _slab(ctx: Context, value, path, materials: dict, material_names: set, default_active: bool) -> Slab | None:
    if not ctx.keys(value, path, SLAB_KEYS, ("material", "thickness")):
        return None
    mat = value["material"]
    if not isinstance(mat, str) or mat not in material_names:
        close = difflib.get_close_matches(str(mat), sorted(material_names), n=1)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        ctx.error(path + ("material",), f"unknown material '{mat}'{hint}")
        return None
    t = ctx.quantity(value["thickness"], path + ("thickness",), "length")
    active = value.get("active", default_active)
    if not isinstance(active, bool):
        ctx.error(path + ("active",), "active must be true or false")
        return None
    return Slab(mat, t, active) if t is not None else None


def _geometry(ctx: Context, item: dict, path, name: str, system: str, materials: dict,
              material_names: set) -> Layer | None:
    """The layer's slabs: one slab (material, thickness) or a repeated cell of slabs."""
    default_active = system in ("tracking", "cherenkov", "muon")
    if "cell" in item:
        if "material" in item or "thickness" in item:
            ctx.error(path, "give either 'cell' (with 'repeat') or 'material' and 'thickness', not both")
            return None
        repeat = item.get("repeat", 1)
        if isinstance(repeat, bool) or not isinstance(repeat, int) or not 1 <= repeat <= 10000:
            ctx.error(path + ("repeat",), f"repeat must be an integer from 1 to 10000 (got {repeat!r})")
            return None
        cell = item["cell"]
        if not isinstance(cell, list) or not cell:
            ctx.error(path + ("cell",), "expected a non-empty list of slabs")
            return None
        slabs = [_slab(ctx, s, path + ("cell", j), materials, material_names, False) for j, s in enumerate(cell)]
        if any(s is None for s in slabs):
            return None
        return Layer(name, system, tuple(slabs), repeat)
    if "repeat" in item:
        ctx.error(path + ("repeat",), "'repeat' needs a 'cell'")
        return None
    slab = _slab(ctx, {k: item[k] for k in ("material", "thickness", "active") if k in item}, path,
                 materials, material_names, default_active)
    return Layer(name, system, (slab,)) if slab is not None else None


def _options(ctx: Context, item: dict, path, layer: Layer, materials: dict) -> Layer | None:
    """The layer with its optional keys (LAYER_OPTIONS) applied, or None when one of them is invalid."""
    for key, (field, check) in LAYER_OPTIONS.items():
        if key in item:
            value = check(ctx, item[key], path + (key,), layer, materials)
            if value is None:
                return None
            layer = dataclasses.replace(layer, **{field: value})
    return layer


def read_layers(ctx: Context, data, materials: dict, material_names: set) -> tuple[Layer, ...]:
    """The required `layers:` list, ordered outward from the interaction point; names are unique."""
    value = data.get("layers")
    if value is None:
        ctx.error(("layers",), "missing required section 'layers'")
        return ()
    if not isinstance(value, list) or not value:
        ctx.error(("layers",), "expected a non-empty list of layers")
        return ()
    out, seen = [], set()
    for i, item in enumerate(value):
        path = ("layers", i)
        if not ctx.keys(item, path, LAYER_KEYS, ("name", "system")):
            continue
        name = item["name"]
        if not name_ok(ctx, name, path + ("name",)):
            continue
        if name in seen:
            ctx.error(path + ("name",), f"duplicate layer name '{name}'")
            continue
        seen.add(name)
        system = item["system"]
        if not isinstance(system, str) or system not in SYSTEM_KINDS:
            close = difflib.get_close_matches(str(system), list(SYSTEM_KINDS), n=1)
            hint = f"; did you mean '{close[0]}'?" if close else f"; one of {', '.join(SYSTEM_KINDS)}"
            ctx.error(path + ("system",), f"unknown system kind '{system}'{hint}")
            continue
        layer = _geometry(ctx, item, path, name, system, materials, material_names)
        if layer is not None:
            layer = _options(ctx, item, path, layer, materials)
        if layer is not None:
            out.append(layer)
    return tuple(out)
