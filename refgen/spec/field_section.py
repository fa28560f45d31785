"""Validator for the top-level `field:` key: uniform magnetic-field regions between named layers of the stack."""
from __future__ import annotations

import difflib

from ..model import FieldRegion, Layer
from .context import Context

FIELD_KEYS = {
    "strength": "Field strength with unit, e.g. 1.5 T (required, greater than zero).",
    "from": "Name of the first layer in the field; the region starts at its front face (required).",
    "to": "Name of the last layer in the field; the region ends at its back face (required).",
}


def _layer_ref(ctx: Context, name, path, layer_names: set) -> bool:
    if not isinstance(name, str) or name not in layer_names:
        close = difflib.get_close_matches(str(name), sorted(layer_names), n=1)
        hint = f"; did you mean '{close[0]}'?" if close else ""
        ctx.error(path, f"unknown layer '{name}'{hint}")
        return False
    return True


def _region(ctx: Context, item, path, layers: tuple[Layer, ...], layer_names: set) -> FieldRegion | None:
    if not ctx.keys(item, path, FIELD_KEYS, ("strength", "from", "to")):
        return None
    strength = ctx.quantity(item["strength"], path + ("strength",), "magnetic_field")
    ok_from = _layer_ref(ctx, item["from"], path + ("from",), layer_names)
    ok_to = _layer_ref(ctx, item["to"], path + ("to",), layer_names)
    if strength is None or not (ok_from and ok_to):
        return None
    order = [layer.name for layer in layers]
    if item["from"] not in order or item["to"] not in order:
        return None  # the layer itself is invalid and already reported
    first, last = order.index(item["from"]), order.index(item["to"])
    if last < first:
        ctx.error(path + ("to",), f"layer '{item['to']}' lies before layer '{item['from']}'; "
                                  "a field region runs outward from 'from' to 'to'")
        return None
    start = sum((layer.thickness for layer in layers[:first]), 0.0)
    end = sum((layer.thickness for layer in layers[:last + 1]), 0.0)
    return FieldRegion(strength, start, end, item["from"], item["to"])


def read_field(ctx: Context, data, layers: tuple[Layer, ...], layer_names: set) -> tuple[FieldRegion, ...]:
    """The optional `field:` key: one region {strength, from, to} or a list of them, ordered outward, with
    no two regions sharing a layer."""
    if "field" not in data:
        return ()
    value = data["field"]
    items = [(("field",), value)] if isinstance(value, dict) else None
    if isinstance(value, list) and value:
        items = [(("field", i), item) for i, item in enumerate(value)]
    if items is None:
        ctx.error(("field",), "expected {strength: ..., from: <layer>, to: <layer>} or a non-empty list of them")
        return ()
    regions = []
    for path, item in items:
        region = _region(ctx, item, path, layers, layer_names)
        if region is not None:
            regions.append((path, region))
    regions.sort(key=lambda pr: pr[1].start_cm)
    for (_, a), (path, b) in zip(regions, regions[1:]):
        if b.start_cm < a.end_cm:
            ctx.error(path, f"field region from '{b.from_layer}' to '{b.to_layer}' overlaps the region from "
                            f"'{a.from_layer}' to '{a.to_layer}'")
            return ()
    return tuple(region for _, region in regions)
