"""Spec quantities with units -> floats in refgen's internal unit system, via the pint units library.

This is the only place where units are converted: everything downstream takes plain floats in MeV, cm, g,
K and Pa, and times in ps (see the package docstring).
"""
from __future__ import annotations

import functools
import re

import pint

# dimension name -> internal unit
INTERNAL_UNITS = {
    "length": "cm",
    "energy": "MeV",
    "momentum": "MeV/c",
    "mass_energy": ("MeV", "MeV/c**2"),  # a mass may be written as an energy (1115.7 MeV) or in MeV/c2
    "density": "g/cm**3",
    "temperature": "K",
    "pressure": "Pa",
    "kB": "cm/MeV",  # Birks' constant per unit dE/dx: cm/MeV (given as g/cm2/MeV divided by density upstream)
    "areal_density": "g/cm**2",
    "angle": "rad",
    "magnetic_field": "T",
    "charge": "fC",
    "time": "ps",
}
EXAMPLES = {
    "length": "150 um, 1.2 cm", "energy": "1 GeV, 3.6 eV", "momentum": "50 MeV/c, 2 GeV/c",
    "mass_energy": "1115.7 MeV", "density": "8.28 g/cm3", "temperature": "20 degC, 293 K",
    "pressure": "1 atm, 1013 mbar", "kB": "0.0126 cm/MeV", "areal_density": "10 g/cm2", "angle": "2 mrad",
    "magnetic_field": "1.5 T, 500 mT",
    "charge": "0.8 fC, 3000 e",
    "time": "30 ps, 0.1 ns",
}

_NUMBER_UNIT = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")
_POWER = re.compile(r"(?<=[A-Za-z])([23])(?![0-9A-Za-z])")


class QuantityError(ValueError):
    """A quantity string that is not a number with a unit of the expected dimension."""


@functools.cache
def registry() -> pint.UnitRegistry:
    """The one pint registry, created on first use."""
    return pint.UnitRegistry()


def _unit_expression(text: str) -> str:
    """Accept the trade's shorthand 'cm3', 'g/cm2' as 'cm**3', 'g/cm**2'."""
    return _POWER.sub(r"**\1", text)


def _convert(q, targets: tuple[str, ...]) -> float:
    """Magnitude of q in the first target unit whose dimension matches."""
    for target in targets[:-1]:
        if q.check(target):
            return q.to(target).magnitude
    return q.to(targets[-1]).magnitude


def parse_quantity(value, dimension: str) -> float:
    """Convert a spec value such as '150 um' into a float in the internal unit of ``dimension``.

    Raises QuantityError with a message that names the expected unit kind.
    """
    targets = INTERNAL_UNITS[dimension]
    targets = (targets,) if isinstance(targets, str) else targets
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise QuantityError(f"expected a quantity with a unit, e.g. '{EXAMPLES[dimension]}'")
    if isinstance(value, (int, float)):
        raise QuantityError(f"'{value}' has no unit; write it with one, e.g. '{EXAMPLES[dimension]}'")
    m = _NUMBER_UNIT.match(value)
    if not m:
        raise QuantityError(f"'{value}' is not a number followed by a unit, e.g. '{EXAMPLES[dimension]}'")
    number, unit = float(m.group(1)), m.group(2)
    if not unit:
        raise QuantityError(f"'{value}' has no unit; write it with one, e.g. '{EXAMPLES[dimension]}'")
    ureg = registry()
    try:
        q = ureg.Quantity(number, _unit_expression(unit))
        result = _convert(q, targets)
    except pint.errors.DimensionalityError:
        raise QuantityError(f"'{value}' is not a {dimension.replace('_', ' ')}; expected e.g. '{EXAMPLES[dimension]}'") from None
    except (pint.errors.UndefinedUnitError, pint.errors.DefinitionSyntaxError, AttributeError, TypeError, ValueError,
            AssertionError, pint.errors.OffsetUnitCalculusError):
        raise QuantityError(f"unknown unit '{unit}' in '{value}'; expected e.g. '{EXAMPLES[dimension]}'") from None
    result = float(result)
    if result != result or result in (float("inf"), float("-inf")):
        raise QuantityError(f"'{value}' is not a finite number")
    return result
