"""Quantities with units at the edge of the program.

Every dimensional value in a design file is a string such as ``"52 kn"`` or ``"12.5 m^2"``.
This module parses those strings into SI floats (m, m^2, m/s, N, rad, kg, K, Pa) and formats
SI floats back into the user's unit system for human-readable output. Nothing inside geomgen
carries pint objects: the rest of the code sees plain floats in SI.

pint is the authority on units. The units a design file commonly uses are answered from a
small table (``FAST_UNITS``) that holds, for each, the float factor pint itself gives: a file
written in those units never pays pint's import and registry start-up (about 0.8 s), and
gets the same floats, bit for bit. Anything else, and every refusal, goes through pint.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import lru_cache

#: Standard acceleration of gravity, exact by definition (CGPM 1901), m/s^2.
G0 = 9.80665

_NUMBER_UNIT = re.compile(
    r"^\s*(?P<num>[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*"
    r"(?P<unit>[A-Za-z°µ][A-Za-z0-9°µ^*/ ._()]*?)\s*$"
)

_ANGLE_UNITS = frozenset({"degree", "radian", "arcminute", "arcsecond", "turn", "gradian"})


@dataclass(frozen=True)
class Dimension:
    """One physical kind of quantity a design key may hold."""

    name: str  # used in messages and in the JSON schema, e.g. "length"
    si_unit: str  # the unit geomgen works in internally
    pint_dims: tuple[str, ...]  # accepted pint dimensionalities, as strings
    example: str  # shown in messages: what a valid value looks like


DIMENSIONS: dict[str, Dimension] = {
    d.name: d
    for d in (
        Dimension("length", "m", ("[length]",), '"1.2 m" or "4 ft"'),
        Dimension("area", "m^2", ("[length] ** 2",), '"12.5 m^2" or "135 ft^2"'),
        Dimension("speed", "m/s", ("[length] / [time]",), '"52 kn" or "27 m/s"'),
        Dimension("angle", "rad", ("angle",), '"3 deg"'),
        # A weight may be written as a mass ("650 kg", "1450 lb") or as a force ("6400 N",
        # "1450 lbf"); a mass is turned into its weight with standard gravity.
        Dimension(
            "weight",
            "N",
            ("[length] * [mass] / [time] ** 2", "[mass]"),
            '"650 kg", "1450 lb" or "6400 N"',
        ),
        Dimension("mass", "kg", ("[mass]",), '"650 kg" or "1450 lb"'),
        Dimension("density", "kg/m^3", ("[mass] / [length] ** 3",), '"1.24 g/cm^3"'),
        Dimension("temperature", "K", ("[temperature]",), '"288.15 K" or "15 degC"'),
        Dimension(
            "pressure", "Pa", ("[mass] / [length] / [time] ** 2",), '"101325 Pa" or "29.92 inHg"'
        ),
    )
}


@lru_cache(maxsize=1)
def registry():
    """The one pint registry geomgen uses (built on first use; pint is imported lazily)."""
    import pint

    try:
        return pint.UnitRegistry(cache_folder=":auto:")
    except OSError:  # no writable cache folder: slower start, same result
        return pint.UnitRegistry()


#: The units a design file commonly uses, as written after "^" -> "**": (kind, factor, offset),
#: value in SI = value x factor (+ offset, temperatures only). The kind says which dimensions
#: may take the unit (``_FAST_KINDS``); a unit of another kind goes through pint, which then
#: writes the refusal. Each factor is the float pint's default registry gives for the
#: conversion to the SI unit (its chain of definitions, from the exact ones: 1 ft = 0.3048 m,
#: 1 lb = 0.45359237 kg, 1 lbf = 1 lb x g0, 1 kn = 1852 m / 3600 s, 1 mile = 1609.344 m,
#: 1 deg = pi/180 rad, 0 degC = 273.15 K); where pint's float chain rounds an exact value by
#: one unit in the last place the table keeps pint's float, so that both paths give the same
#: results. tests/test_units.py checks every entry against pint.
FAST_UNITS: dict[str, tuple[str, float, float | None]] = {
    # length -> m
    "m": ("length", 1.0, None),
    "mm": ("length", 0.001, None),
    "cm": ("length", 0.01, None),
    "km": ("length", 1000.0, None),
    "in": ("length", 0.0254, None),
    "ft": ("length", 0.30479999999999996, None),  # 0.3048 exactly; pint's float
    # area -> m^2
    "m**2": ("area", 1.0, None),
    "mm**2": ("area", 1e-06, None),
    "cm**2": ("area", 0.0001, None),
    "in**2": ("area", 0.00064516, None),
    "ft**2": ("area", 0.09290303999999999, None),  # 0.09290304 exactly; pint's float
    # speed -> m/s
    "m/s": ("speed", 1.0, None),
    "km/h": ("speed", 0.2777777777777778, None),
    "kn": ("speed", 0.5144444444444445, None),
    "knot": ("speed", 0.5144444444444445, None),
    "mph": ("speed", 0.44704, None),
    "ft/s": ("speed", 0.30479999999999996, None),  # 0.3048 exactly; pint's float
    # angle -> rad
    "deg": ("angle", 0.017453292519943295, None),
    "degree": ("angle", 0.017453292519943295, None),
    "rad": ("angle", 1.0, None),
    "radian": ("angle", 1.0, None),
    # mass -> kg
    "kg": ("mass", 1.0, None),
    "g": ("mass", 0.001, None),
    "lb": ("mass", 0.4535923700000001, None),  # 0.45359237 exactly; pint's float
    # force -> N
    "N": ("force", 1.0, None),
    "kN": ("force", 1000.0, None),
    "lbf": ("force", 4.4482216152605005, None),  # 0.45359237 x 9.80665 exactly; pint's float
    # density -> kg/m^3
    "kg/m**3": ("density", 1.0, None),
    "g/cm**3": ("density", 999.9999999999999, None),  # 1000 exactly; pint's float
    # temperature -> K
    "K": ("temperature", 1.0, None),
    "degC": ("temperature", 1.0, 273.15),
    # pressure -> Pa
    "Pa": ("pressure", 1.0, None),
    "hPa": ("pressure", 100.0, None),
    "kPa": ("pressure", 1000.0, None),
}

#: the kinds of FAST_UNITS each dimension takes (a weight may be a mass: times g0)
_FAST_KINDS: dict[str, frozenset[str]] = {
    name: frozenset({"force", "mass"} if name == "weight" else {name}) for name in DIMENSIONS
}


class UnitParseError(ValueError):
    """A value could not be read as a quantity of the wanted dimension (message is one line)."""


def parse_quantity(text: object, dimension: str) -> float:
    """Parse ``"<number> <unit>"`` into a float in the SI unit of ``dimension``.

    Only a plain number followed by a unit expression is accepted: no arithmetic, no bare
    numbers (raise UnitParseError with a message saying what is allowed).
    """
    dim = DIMENSIONS[dimension]
    if isinstance(text, bool) or not isinstance(text, str):
        raise UnitParseError(
            f"must be a string with a unit of {dim.name}, e.g. {dim.example} (got {text!r})"
        )
    if len(text) > 64:
        raise UnitParseError(f"must be a short {dim.name} with a unit (got {len(text)} characters)")
    match = _NUMBER_UNIT.match(text)
    if match is None:
        raise UnitParseError(
            f"must be a number with a unit of {dim.name}, e.g. {dim.example} (got {text!r})"
        )
    value = float(match["num"])
    unit_text = match["unit"].replace("^", "**")
    fast = FAST_UNITS.get(unit_text)
    if fast is not None and fast[0] in _FAST_KINDS[dimension]:
        kind, factor, offset = fast
        if offset is not None:
            result = value * factor + offset
        elif kind == "mass" and dimension == "weight":
            result = value * factor * G0
        else:
            result = value * factor
    else:
        result = _with_pint(value, unit_text, text, dimension, match["unit"])
    result = float(result)
    if not math.isfinite(result):
        raise UnitParseError(f"must be a finite {dim.name} (got {text!r})")
    return result


def _with_pint(value: float, unit_text: str, text: str, dimension: str, written: str) -> float:
    """``value`` in ``unit_text`` (pint syntax) converted by pint into the SI unit of
    ``dimension``; UnitParseError for a unit pint does not know or of another dimension."""
    dim = DIMENSIONS[dimension]
    ureg = registry()
    try:
        unit = ureg.Unit(unit_text)
    except Exception as err:  # pint raises several unrelated types for unknown units
        raise UnitParseError(f"unknown unit {written!r}; use e.g. {dim.example}") from err
    if dimension == "angle":
        if str(unit) not in _ANGLE_UNITS:
            raise UnitParseError(f"must be an angle, e.g. {dim.example} (got {text!r})")
        return ureg.Quantity(value, unit).to("radian").magnitude
    if dimension == "temperature":
        if str(unit.dimensionality) != "[temperature]":
            raise UnitParseError(f"must be a temperature, e.g. {dim.example} (got {text!r})")
        return ureg.Quantity(value, unit).to("kelvin").magnitude
    found = str(unit.dimensionality)
    if not any(unit.dimensionality == ureg.get_dimensionality(d) for d in dim.pint_dims):
        raise UnitParseError(
            f"must be a {dim.name}, e.g. {dim.example} (got {text!r}, which is {found})"
        )
    quantity = ureg.Quantity(value, unit)
    if dimension == "weight" and found == "[mass]":
        return quantity.to("kg").magnitude * G0
    return quantity.to(dim.si_unit.replace("^", "**")).magnitude


# --- output -------------------------------------------------------------------------------

#: Output unit per (unit system, kind of quantity). Exact factors from SI (the definitions of the
#: international foot and pound: 1 ft = 0.3048 m, 1 lb = 0.45359237 kg; 1 kn = 1852/3600 m/s).
_FT = 0.3048
_LBF = 0.45359237 * G0
OUTPUT_UNITS: dict[str, dict[str, tuple[str, float]]] = {
    "si": {
        "length": ("m", 1.0),
        "area": ("m^2", 1.0),
        "speed": ("m/s", 1.0),
        "angle": ("deg", 180.0 / math.pi),
        "weight": ("N", 1.0),
        "mass": ("kg", 1.0),
        "density": ("kg/m^3", 1.0),
        "pressure": ("Pa", 1.0),
        "temperature": ("K", 1.0),
        "volume": ("m^3", 1.0),
        "wing_loading": ("N/m^2", 1.0),
    },
    "imperial": {
        "length": ("ft", 1.0 / _FT),
        "area": ("ft^2", 1.0 / _FT**2),
        "speed": ("kn", 3600.0 / 1852.0),
        "angle": ("deg", 180.0 / math.pi),
        "weight": ("lbf", 1.0 / _LBF),
        "mass": ("lb", 1.0 / 0.45359237),
        "density": ("slug/ft^3", _FT**3 / (0.45359237 * G0 / _FT)),
        "pressure": ("lbf/ft^2", _FT**2 / _LBF),
        "temperature": ("K", 1.0),
        "volume": ("ft^3", 1.0 / _FT**3),
        "wing_loading": ("lbf/ft^2", _FT**2 / _LBF),
    },
}

#: SI unit symbol of each kind of quantity, as written into report.json (values unscaled:
#: angles stay in radians there; the human-readable "si" system shows them in degrees).
SI_UNITS: dict[str, str] = {
    kind: ("rad" if kind == "angle" else unit) for kind, (unit, _) in OUTPUT_UNITS["si"].items()
}


def to_output(value_si: float, kind: str, system: str) -> tuple[float, str]:
    """Convert an SI value of ``kind`` into the output unit of ``system`` ('si' or 'imperial')."""
    unit, factor = OUTPUT_UNITS[system][kind]
    return value_si * factor, unit
