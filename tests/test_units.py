"""Unit parsing against exact unit definitions."""

import functools
import math
import random
import subprocess
import sys

import pytest

from geomgen.design.units import (
    DIMENSIONS,
    FAST_UNITS,
    G0,
    UnitParseError,
    parse_quantity,
    to_output,
)

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


# --- the table of common units against pint, the authority ----------------------------------

_SAMPLES = (0.0, 1.0, 0.1, 0.3, 2.5, 7.7, 12.5, 45.0, 52.0, 650.0, 1450.0, 8000.0, 1e-3, -3.3)


@functools.lru_cache(maxsize=1)
def _pint_registry():
    import pint

    return pint.UnitRegistry()  # pint's default definitions, independent of geomgen's registry


def _pint_si(value: float, unit_text: str, dimension: str) -> float:
    """``value`` in ``unit_text`` converted to the SI unit of ``dimension`` by pint alone."""
    ureg = _pint_registry()
    q = ureg.Quantity(value, ureg.Unit(unit_text))
    if dimension == "weight" and q.dimensionality == ureg.get_dimensionality("[mass]"):
        return q.to("kg").magnitude * G0
    si = {"angle": "radian", "temperature": "kelvin"}.get(
        dimension, DIMENSIONS[dimension].si_unit.replace("^", "**")
    )
    return q.to(si).magnitude


def _dimensions_of(kind: str) -> list[str]:
    return ["weight"] if kind == "force" else [kind, "weight"] if kind == "mass" else [kind]


@pytest.mark.parametrize("unit_text", sorted(FAST_UNITS))
def test_fast_units_agree_with_pint(unit_text):
    kind, factor, offset = FAST_UNITS[unit_text]
    for dimension in _dimensions_of(kind):
        # the factor (and the offset of a temperature) to 1e-12 relative
        zero = _pint_si(0.0, unit_text, dimension)
        one = _pint_si(1.0, unit_text, dimension)
        scale = factor * (G0 if dimension == "weight" and kind == "mass" else 1.0)
        assert one - zero == pytest.approx(scale, rel=1e-12)
        assert zero == pytest.approx(offset or 0.0, abs=1e-12)
        # and every parsed value equal to pint's, bit for bit (outputs must not change)
        for written in {unit_text, unit_text.replace("**", "^")}:
            for value in _SAMPLES:
                got = parse_quantity(f"{value!r} {written}", dimension)
                assert got == _pint_si(value, unit_text, dimension), (written, value)


def test_temperatures_in_degc_equal_pint_bit_for_bit():
    rng = random.Random(3)
    for _ in range(200):
        value = round(rng.uniform(-60.0, 60.0), rng.randint(0, 6))
        assert parse_quantity(f"{value!r} degC", "temperature") == _pint_si(
            value, "degC", "temperature"
        )


# the refusals word for word, as pint's path wrote them before the table of common units
_REFUSALS = [
    (
        "52 kg",
        "speed",
        'must be a speed, e.g. "52 kn" or "27 m/s" (got \'52 kg\', which is [mass])',
    ),
    ("52 knotz", "speed", 'unknown unit \'knotz\'; use e.g. "52 kn" or "27 m/s"'),
    (
        "12 m",
        "area",
        'must be a area, e.g. "12.5 m^2" or "135 ft^2" (got \'12 m\', which is [length])',
    ),
    ("5 m", "angle", "must be an angle, e.g. \"3 deg\" (got '5 m')"),
    ("-2 kg", "angle", "must be an angle, e.g. \"3 deg\" (got '-2 kg')"),
    (
        "650 m/s",
        "weight",
        'must be a weight, e.g. "650 kg", "1450 lb" or "6400 N" (got \'650 m/s\', which is '
        "[length] / [time])",
    ),
    (
        "4 m^2",
        "length",
        'must be a length, e.g. "1.2 m" or "4 ft" (got \'4 m^2\', which is [length] ** 2)',
    ),
    (
        "0.5 deg",
        "length",
        'must be a length, e.g. "1.2 m" or "4 ft" (got \'0.5 deg\', which is dimensionless)',
    ),
    (
        "1.24 kg",
        "density",
        "must be a density, e.g. \"1.24 g/cm^3\" (got '1.24 kg', which is [mass])",
    ),
    ("5 m * 2", "length", 'unknown unit \'m * 2\'; use e.g. "1.2 m" or "4 ft"'),
    ("1e400 m", "length", "must be a finite length (got '1e400 m')"),
    ("1e400 kn", "speed", "must be a finite speed (got '1e400 kn')"),
    ("1e400 degC", "temperature", "must be a finite temperature (got '1e400 degC')"),
    (
        "15 degC",
        "length",
        'must be a length, e.g. "1.2 m" or "4 ft" (got \'15 degC\', which is [temperature])',
    ),
    ("20 mm", "temperature", 'must be a temperature, e.g. "288.15 K" or "15 degC" (got \'20 mm\')'),
    (
        "650 N",
        "mass",
        'must be a mass, e.g. "650 kg" or "1450 lb" (got \'650 N\', which is [mass] * '
        "[length] / [time] ** 2)",
    ),
    (
        "3 deg",
        "speed",
        'must be a speed, e.g. "52 kn" or "27 m/s" (got \'3 deg\', which is dimensionless)',
    ),
    (
        "1 g/cm^3",
        "pressure",
        'must be a pressure, e.g. "101325 Pa" or "29.92 inHg" (got \'1 g/cm^3\', which is '
        "[mass] / [length] ** 3)",
    ),
    ("1 K", "angle", "must be an angle, e.g. \"3 deg\" (got '1 K')"),
    ("2 Kg", "mass", 'unknown unit \'Kg\'; use e.g. "650 kg" or "1450 lb"'),
]


@pytest.mark.parametrize(("text", "dimension", "message"), _REFUSALS)
def test_refusals_word_for_word(text, dimension, message):
    with pytest.raises(UnitParseError) as err:
        parse_quantity(text, dimension)
    assert str(err.value) == message


def test_common_units_do_not_import_pint():
    code = (
        "import sys; from geomgen.design.units import parse_quantity as p; "
        "p('45 kn', 'speed'); p('650 kg', 'weight'); p('2.5 deg', 'angle'); "
        "p('1500 ft', 'length'); p('12.5 m^2', 'area'); p('15 degC', 'temperature'); "
        "assert 'pint' not in sys.modules, 'pint imported'"
    )
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True)
    assert result.returncode == 0, result.stderr
