import pytest

from refgen.units import QuantityError, parse_quantity


@pytest.mark.parametrize("text, dimension, expected", [
    ("150 um", "length", 0.015),
    ("1.2 cm", "length", 1.2),
    ("25 mm", "length", 2.5),
    ("8.28 g/cm3", "density", 8.28),
    ("20 degC", "temperature", 293.15),
    ("1 atm", "pressure", 101325.0),
    ("1013.25 mbar", "pressure", 101325.0),
    ("50 MeV/c", "momentum", 50.0),
    ("500 GeV/c", "momentum", 5e5),
    ("1 keV", "energy", 1e-3),
    ("1115.7 MeV", "mass_energy", 1115.7),
    ("0.126 mm/MeV", "kB", 0.0126),
])
def test_parses_into_internal_units(text, dimension, expected):
    assert parse_quantity(text, dimension) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("value, dimension, message", [
    ("3 g/cm3", "length", "'3 g/cm3' is not a length; expected e.g. '150 um, 1.2 cm'"),
    (150, "length", "'150' has no unit; write it with one, e.g. '150 um, 1.2 cm'"),
    ("150", "length", "'150' has no unit; write it with one, e.g. '150 um, 1.2 cm'"),
    ("150 furlongz", "length", "unknown unit 'furlongz' in '150 furlongz'; expected e.g. '150 um, 1.2 cm'"),
    ("thick", "length", "'thick' is not a number followed by a unit, e.g. '150 um, 1.2 cm'"),
])
def test_rejects_bad_quantities_with_a_clear_message(value, dimension, message):
    with pytest.raises(QuantityError) as exc:
        parse_quantity(value, dimension)
    assert str(exc.value) == message
