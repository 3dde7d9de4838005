"""International Standard Atmosphere (ISA), 0 to 20 km.

Covers the troposphere (temperature falling 6.5 K per km of geopotential altitude up to 11 km)
and the lower isothermal stratosphere (216.65 K from 11 km to 20 km geopotential), as laid down
by ICAO Doc 7488 and the U.S. Standard Atmosphere 1976, which agree over this range.
All quantities are SI. Pure math: no state, no I/O.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from geomgen.errors import InputError

# Constants of the standard (ICAO Doc 7488; U.S. Standard Atmosphere 1976).
SEA_LEVEL_TEMPERATURE = 288.15  # K
SEA_LEVEL_PRESSURE = 101325.0  # Pa
GAS_CONSTANT_AIR = 287.05287  # J/(kg K), specific gas constant of dry air
STANDARD_GRAVITY = 9.80665  # m/s^2
HEAT_CAPACITY_RATIO = 1.4  # -
EARTH_RADIUS = 6356766.0  # m, radius used for geopotential altitude
TROPOSPHERE_LAPSE_RATE = -0.0065  # K/m of geopotential altitude
TROPOPAUSE_ALTITUDE = 11000.0  # m, geopotential
SUTHERLAND_BETA = 1.458e-6  # kg/(m s K^0.5)
SUTHERLAND_TEMPERATURE = 110.4  # K

MIN_ALTITUDE = 0.0  # m
MAX_ALTITUDE = 20000.0  # m

TROPOPAUSE_TEMPERATURE = SEA_LEVEL_TEMPERATURE + TROPOSPHERE_LAPSE_RATE * TROPOPAUSE_ALTITUDE
_PRESSURE_EXPONENT = -STANDARD_GRAVITY / (GAS_CONSTANT_AIR * TROPOSPHERE_LAPSE_RATE)
TROPOPAUSE_PRESSURE = (
    SEA_LEVEL_PRESSURE * (TROPOPAUSE_TEMPERATURE / SEA_LEVEL_TEMPERATURE) ** _PRESSURE_EXPONENT
)

_KINDS = ("geometric", "geopotential")


@dataclass(frozen=True)
class AtmosphereState:
    """Standard-atmosphere properties at one altitude (SI units)."""

    geometric_altitude: float  # m
    geopotential_altitude: float  # m
    temperature: float  # K
    pressure: float  # Pa
    density: float  # kg/m^3
    speed_of_sound: float  # m/s
    dynamic_viscosity: float  # Pa s

    @property
    def kinematic_viscosity(self) -> float:
        """Kinematic viscosity in m^2/s (dynamic viscosity / density)."""
        return self.dynamic_viscosity / self.density


def geopotential_from_geometric(z: float) -> float:
    """Geopotential altitude (m) from geometric altitude z (m): h = r0 z / (r0 + z)."""
    return EARTH_RADIUS * z / (EARTH_RADIUS + z)


def geometric_from_geopotential(h: float) -> float:
    """Geometric altitude (m) from geopotential altitude h (m): z = r0 h / (r0 - h)."""
    return EARTH_RADIUS * h / (EARTH_RADIUS - h)


def sutherland_viscosity(temperature: float) -> float:
    """Dynamic viscosity of air (Pa s) at a temperature in K, by Sutherland's law."""
    return SUTHERLAND_BETA * temperature**1.5 / (temperature + SUTHERLAND_TEMPERATURE)


def isa(altitude: float, kind: str = "geometric") -> AtmosphereState:
    """International Standard Atmosphere at an altitude in metres, 0 to 20 km inclusive.

    ``kind`` says which altitude ``altitude`` is: "geometric" (the default; height above mean
    sea level, converted to geopotential first) or "geopotential". The 0..20 km range applies to
    the altitude in the kind given. Raises InputError when the altitude is out of range, not a
    finite number, or when ``kind`` is unknown.
    """
    if kind not in _KINDS:
        raise InputError(f"must be 'geometric' or 'geopotential' (got {kind!r})", path="kind")
    try:
        value = float(altitude)
    except (TypeError, ValueError) as err:
        raise InputError(
            f"must be between 0 and 20 km (got {altitude!r})", path="altitude"
        ) from err
    if not (math.isfinite(value) and MIN_ALTITUDE <= value <= MAX_ALTITUDE):
        raise InputError(f"must be between 0 and 20 km (got {altitude!r} m)", path="altitude")

    if kind == "geometric":
        z = value
        h = geopotential_from_geometric(z)
    else:
        h = value
        z = geometric_from_geopotential(h)

    if h <= TROPOPAUSE_ALTITUDE:
        temperature = SEA_LEVEL_TEMPERATURE + TROPOSPHERE_LAPSE_RATE * h
        pressure = SEA_LEVEL_PRESSURE * (temperature / SEA_LEVEL_TEMPERATURE) ** _PRESSURE_EXPONENT
    else:
        temperature = TROPOPAUSE_TEMPERATURE
        pressure = TROPOPAUSE_PRESSURE * math.exp(
            -STANDARD_GRAVITY * (h - TROPOPAUSE_ALTITUDE) / (GAS_CONSTANT_AIR * temperature)
        )

    return AtmosphereState(
        geometric_altitude=z,
        geopotential_altitude=h,
        temperature=temperature,
        pressure=pressure,
        density=pressure / (GAS_CONSTANT_AIR * temperature),
        speed_of_sound=math.sqrt(HEAT_CAPACITY_RATIO * GAS_CONSTANT_AIR * temperature),
        dynamic_viscosity=sutherland_viscosity(temperature),
    )
