"""Validators for the identification keys: the layer keys `timing`, `samples` and `truncation`, and the
top-level `start_time`. Layer checkers follow layer_section's convention
``(ctx, value, path, layer, materials) -> field value or None``."""
from __future__ import annotations

from .context import Context

MAX_SAMPLES = 10000


def check_timing(ctx: Context, value, path, layer, materials) -> float | None:
    """`timing: 30 ps`: the arrival-time resolution of the layer, a positive time."""
    return ctx.quantity(value, path, "time")


def check_samples(ctx: Context, value, path, layer, materials) -> int | None:
    """`samples: 120`: energy-loss samples of a gaseous tracking layer (a single slab of a gas)."""
    if isinstance(value, bool) or not isinstance(value, int) or not 1 <= value <= MAX_SAMPLES:
        ctx.error(path, f"samples must be a whole number from 1 to {MAX_SAMPLES} (got {value!r})")
        return None
    if any(s.material not in materials for s in layer.slabs):
        return None  # the material itself is invalid and already reported
    gas = len(layer.slabs) == 1 and layer.repeat == 1 and materials[layer.slabs[0].material].is_gas
    if not gas or layer.system != "tracking":
        ctx.error(path, f"samples needs a gaseous tracking layer (a single gas slab with system: tracking); "
                        f"layer '{layer.name}' is {layer.system}, made of {layer.material}"
                        f"{'' if gas else ', not a gas'}")
        return None
    return value


def check_truncation(ctx: Context, value, path, layer, materials) -> float | None:
    """`truncation: 0.7`: the kept fraction of the samples for the truncated mean, in (0, 1]; needs `samples`."""
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not 0.0 < value <= 1.0:
        ctx.error(path, f"truncation is the kept fraction of the samples, a number in (0, 1] (got {value!r})")
        return None
    if layer.samples is None:
        ctx.error(path, "truncation needs 'samples' on the same layer")
        return None
    return float(value)


def read_start_time(ctx: Context, data, layers) -> float | None:
    """The optional top-level `start_time: 20 ps`: the resolution of the event start time. Absent: exact."""
    if "start_time" not in data:
        return None
    value = ctx.quantity(data["start_time"], ("start_time",), "time")
    if value is not None and not any(l.timing_ps is not None for l in layers):
        ctx.warn(("start_time",), "start_time is given but no layer has 'timing'; it is not used")
    return value
