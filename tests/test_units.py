"""Unit parsing against exact unit definitions."""

import math

import pytest

from geomgen.design.units import G0, UnitParseError, parse_quantity, to_output

# Exact definitions: international foot 1 ft = 0.3048 m and pound 1 lb = 0.45359237 kg
# (International Yard and Pound Agreement, 1959); knot 1 kn = 1852 m / 3600 s (international
# nautical mile); standard gravity g0 = 9.80665 m/s^2 (3rd CGPM, 1901).
FT = 0.3048
LB = 0.45359237
KN = 1852.0 / 3600.0


@pytest.mark.parametrize(
    ("text", "dimension", "expected"),
    [
        ("1 ft", "length", FT),
        ("8000 ft", "length", 8000 * FT),
        ("2500 mm", "length", 2.5),
        ("135 ft^2", "area", 135 * FT**2),
        ("135 ft**2", "area", 135 * FT**2),
        ("12.5 m^2", "area", 12.5),
        ("52 kn", "speed", 52 * KN),
        ("52 knot", "speed", 52 * KN),
        ("100 km/h", "speed", 100 / 3.6),
        ("1450 lb", "weight", 1450 * LB * G0),  # a mass becomes its weight under g0
        ("1450 lbf", "weight", 1450 * LB * G0),  # pound-force = lb x g0 by definition
        ("600 kg", "weight", 600 * G0),
        ("6000 N", "weight", 6000.0),
        ("180 deg", "angle", math.pi),
        ("0.5 rad", "angle", 0.5),
        ("15 degC", "temperature", 288.15),  # 0 degC = 273.15 K exactly
        ("1.24 g/cm^3", "density", 1240.0),
    ],
)
def test_parse_against_exact_definitions(text, dimension, expected):
    assert parse_quantity(text, dimension) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "dimension", "words"),
    [
        ("52 kg", "speed", "must be a speed"),
        (52, "speed", "with a unit"),
        ("52", "speed", "with a unit"),
        ("3 %", "angle", "angle"),
        ("3", "angle", "angle"),
        ("5 m * 2", "length", "unknown unit"),
        ("3 furlongz", "length", "unknown unit"),
        ("1e400 m", "length", "finite"),
        (True, "length", "with a unit"),
        ("x" * 100, "length", "short"),
    ],
)
def test_refused_values(text, dimension, words):
    with pytest.raises(UnitParseError, match=words):
        parse_quantity(text, dimension)


def test_output_conversions_are_exact_inverses():
    # 1 m = 1/0.3048 ft; 1 m^2 = 1/0.3048^2 ft^2; 1 m/s = 3600/1852 kn (exact definitions)
    assert to_output(FT, "length", "imperial")[1] == "ft"
    assert to_output(FT, "length", "imperial")[0] == pytest.approx(1.0, rel=1e-15)
    assert to_output(FT**2, "area", "imperial")[0] == pytest.approx(1.0, rel=1e-15)
    assert to_output(KN, "speed", "imperial")[0] == pytest.approx(1.0, rel=1e-15)
    assert to_output(LB * G0, "weight", "imperial")[0] == pytest.approx(1.0, rel=1e-15)
    # sea-level ISA density 1.225 kg/m^3 = 0.0023769 slug/ft^3 (U.S. Standard Atmosphere 1976)
    assert to_output(1.225, "density", "imperial")[0] == pytest.approx(0.0023769, abs=5e-8)
