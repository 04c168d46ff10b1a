"""Parsing user text at the edges (pint is the reference for the conversions)."""

import pytest

from predictor import UnitError
from predictor.errors import InputRangeError
from predictor.units import from_si, parse_loading, parse_quantity, to_si


@pytest.mark.parametrize("text,dimension,expected", [
    ("120 cP", "viscosity", 0.12),                 # 1 cP = 1 mPa s (SI definition)
    ("0.45 Pa*s", "viscosity", 0.45),
    ("1 mPa·s", "viscosity", 1e-3),
    ("2.5 um", "length", 2.5e-6),
    ("2.5 µm", "length", 2.5e-6),
    ("300 nm", "length", 3e-7),
    ("3.9 g/cm3", "density", 3900.0),
    ("25 degC", "temperature", 298.15),           # ITS: 0 degC = 273.15 K
    ("77 degF", "temperature", 298.15),
    ("72 mN/m", "interfacial_tension", 0.072),
    ("1e3 1/s", "shear_rate", 1000.0),
    ("100 s^-1", "shear_rate", 100.0),
])
def test_parse_quantity(text, dimension, expected):
    assert parse_quantity(text, dimension, "field") == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("text,dimension", [("2 mPas", "viscosity"), ("2 m", "viscosity"),
                                            ("abc", "length"), ("3 furlongs/fortnight", "length")])
def test_bad_quantities_name_the_field(text, dimension):
    with pytest.raises(UnitError, match="my field"):
        parse_quantity(text, dimension, "my field")


@pytest.mark.parametrize("text,expected", [
    ("35 wt%", (0.35, "mass")), ("12 vol%", (0.12, "volume")), ("35 % w/w", (0.35, "mass")),
    ("20 v/v%", (0.2, "volume")), ("0.3", (0.3, "volume")), (0.25, (0.25, "volume")),
])
def test_parse_loading(text, expected):
    value, basis = parse_loading(text)
    assert (pytest.approx(value), basis) == (expected[0], expected[1])


@pytest.mark.parametrize("text", ["110 wt%", "-5 vol%", "1.5"])
def test_loading_out_of_range(text):
    with pytest.raises(InputRangeError, match="loading"):
        parse_loading(text)


def test_round_trip_units():
    assert from_si(to_si(120.0, "cP", "viscosity"), "mPa*s", "viscosity") == pytest.approx(120.0)
