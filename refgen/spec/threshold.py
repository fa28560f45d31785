"""Validator for a layer's `threshold:` key: a readout threshold given as an energy deposit or as a charge."""
from __future__ import annotations

import re

from .. import datafiles
from ..model import Layer, Threshold
from ..units import QuantityError, parse_quantity
from .context import Context

_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
EXAMPLES = "'25 keV', '0.8 fC' or '3000 e'"


def read_threshold(ctx: Context, value, path, layer: Layer, materials: dict) -> Threshold | None:
    """A threshold on a sensitive single-slab layer: an energy (MeV internally) or a charge, which becomes an
    energy through the slab material's pair energy W (deposit = charge / e * W)."""
    if layer.is_sampling or not layer.slabs[0].active:
        ctx.error(path, f"layer '{layer.name}' is not a sensitive single-slab layer; a threshold needs one "
                        "(set active: true, or remove the threshold)")
        return None
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        ctx.error(path, f"expected an energy or a charge with a unit, e.g. {EXAMPLES}")
        return None
    if isinstance(value, (int, float)):
        ctx.error(path, f"'{value}' has no unit; write it with one, e.g. {EXAMPLES}")
        return None
    number = _NUMBER.match(value)
    try:
        energy = parse_quantity(value, "energy")
        charge = None
    except QuantityError:
        try:
            energy, charge = None, parse_quantity(value, "charge")
        except QuantityError:
            ctx.error(path, f"'{value}' is not an energy or a charge; expected e.g. {EXAMPLES}")
            return None
    if not (energy or charge or 0) > 0:
        ctx.error(path, f"must be greater than zero (got '{value}')")
        return None
    amount, unit = float(number.group(1)), number.group(2)
    if charge is not None:
        material = materials.get(layer.slabs[0].material)
        if material is None:
            return None
        if not material.pair_energy_eV:
            ctx.error(path, f"a threshold given as a charge needs the pair_energy of material '{material.name}' "
                            "(mean energy per ionisation carrier); give it, or write the threshold as an energy")
            return None
        energy = charge / datafiles.constant("elementary_charge_fC") * material.pair_energy_eV * 1e-6
    return Threshold(amount, unit, energy, amount / energy)
