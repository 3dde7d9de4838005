"""International Standard Atmosphere: published values and two independent implementations."""

from __future__ import annotations

import math

import numpy as np
import pytest

from geomgen.errors import InputError
from geomgen.sizing.atmosphere import (
    AtmosphereState,
    geometric_from_geopotential,
    geopotential_from_geometric,
    isa,
    sutherland_viscosity,
)

# Exact (defined) conversion factors.
FOOT = 0.3048  # m, exact by definition (international foot, 1959)
SLUG = 14.59390294  # kg; 1 slug = 1 lbf s^2/ft = 0.45359237 kg * 9.80665 m/s^2 / 0.3048 m, exact
SLUG_PER_CUBIC_FOOT = SLUG / FOOT**3  # kg/m^3

GEOMETRIC_ALTITUDES = [0.0, 1000.0, 3048.0, 5000.0, 8000.0, 11000.0, 11019.1, 15000.0, 20000.0]


# --- published sea-level and tropopause values ---------------------------------------------


def test_sea_level_values():
    s = isa(0.0)
    assert s.temperature == pytest.approx(288.15, abs=1e-12)  # ICAO Doc 7488; US Std Atm 1976
    assert s.pressure == pytest.approx(101325.0, abs=1e-9)  # ICAO Doc 7488; US Std Atm 1976
    assert s.density == pytest.approx(1.225, abs=5e-7)  # ICAO Doc 7488; US Std Atm 1976
    assert s.speed_of_sound == pytest.approx(340.294, abs=1e-3)  # ICAO Doc 7488; US Std Atm 1976


def test_sea_level_density_in_slug_per_cubic_foot():
    # 0.0023769 slug/ft^3: ICAO Doc 7488 / US Std Atm 1976 (not the older 0.002378)
    assert isa(0.0).density / SLUG_PER_CUBIC_FOOT == pytest.approx(0.0023769, abs=5e-8)


def test_tropopause_at_11_km_geopotential():
    s = isa(11000.0, kind="geopotential")
    assert s.temperature == pytest.approx(216.65, abs=1e-9)  # ICAO Doc 7488; US Std Atm 1976
    assert s.pressure == pytest.approx(22632.0, abs=1.0)  # ICAO Doc 7488; US Std Atm 1976


def test_sutherland_viscosity_at_sea_level():
    # 1.7894e-5 Pa s at 288.15 K: ICAO Doc 7488 (Sutherland's law, beta_s 1.458e-6, S 110.4 K)
    assert sutherland_viscosity(288.15) == pytest.approx(1.7894e-5, abs=5e-10)
    assert isa(0.0).dynamic_viscosity == pytest.approx(1.7894e-5, abs=5e-10)
    # kinematic viscosity is mu / rho: 1.4607e-5 m^2/s, ICAO Doc 7488 (from memory)
    assert isa(0.0).kinematic_viscosity == pytest.approx(1.4607e-5, abs=2e-9)


# --- tabulated values (from memory, 5 significant figures) ---------------------------------


@pytest.mark.parametrize(
    ("altitude", "kind", "temperature", "pressure", "density"),
    [
        # ICAO-style table by geopotential altitude, 5000 m (from memory)
        (5000.0, "geopotential", 255.65, 54019.9, 0.73612),
        # US Std Atm 1976 Table I by geometric altitude (from memory)
        (5000.0, "geometric", 255.676, 54048.0, 0.73643),
        (10000.0, "geometric", 223.252, 26500.0, 0.41351),
        (15000.0, "geometric", 216.650, 12111.0, 0.19476),
        (20000.0, "geometric", 216.650, 5529.3, 0.088910),
    ],
)
def test_tabulated_values(altitude, kind, temperature, pressure, density):
    s = isa(altitude, kind=kind)
    assert s.temperature == pytest.approx(temperature, abs=5e-3)
    assert s.pressure == pytest.approx(pressure, rel=1e-4)
    # abs 1e-4 kg/m^3 is looser than the table's rounding but tighter than the 3e-4 kg/m^3
    # that separates geometric and geopotential 5000 m, so the kind is checked too.
    assert s.density == pytest.approx(density, abs=1e-4)


# --- independent implementations -----------------------------------------------------------


@pytest.fixture(scope="module")
def ambiance_reference():
    import ambiance  # a test dependency: missing means a failed test, not a skip

    return ambiance.Atmosphere(np.array(GEOMETRIC_ALTITUDES))  # takes GEOMETRIC altitude


@pytest.fixture(scope="module")
def ussa1976_reference():
    import ussa1976

    # compute() takes GEOMETRIC altitude z (m) as an array and returns an xarray Dataset.
    return ussa1976.compute(z=np.array(GEOMETRIC_ALTITUDES), variables=["t", "p", "rho", "cs"])


@pytest.mark.parametrize("index", range(len(GEOMETRIC_ALTITUDES)))
def test_matches_ambiance(ambiance_reference, index):
    # ambiance (ICAO 1993). Its stratosphere pressure sits 1.8e-6 above ours (it starts the
    # isothermal layer from a rounded base pressure), so rel 1e-5; troposphere agrees to 1e-15.
    ref = ambiance_reference
    s = isa(GEOMETRIC_ALTITUDES[index])
    assert s.geopotential_altitude == pytest.approx(float(ref.H[index]), rel=1e-12, abs=1e-9)
    assert s.temperature == pytest.approx(float(ref.temperature[index]), rel=1e-12)
    assert s.pressure == pytest.approx(float(ref.pressure[index]), rel=1e-5)
    assert s.density == pytest.approx(float(ref.density[index]), rel=1e-5)
    assert s.speed_of_sound == pytest.approx(float(ref.speed_of_sound[index]), rel=1e-12)
    assert s.dynamic_viscosity == pytest.approx(float(ref.dynamic_viscosity[index]), rel=1e-12)
    assert s.kinematic_viscosity == pytest.approx(float(ref.kinematic_viscosity[index]), rel=1e-5)


@pytest.mark.parametrize("index", range(len(GEOMETRIC_ALTITUDES)))
def test_matches_ussa1976(ussa1976_reference, index):
    # ussa1976 (US Std Atm 1976 via molar mass and R*, so ~5e-7 apart from R = 287.05287).
    # Its viscosity is not compared: its Sutherland constant is 1.458e6, giving mu 1e12 too large.
    ref = ussa1976_reference
    s = isa(GEOMETRIC_ALTITUDES[index])
    assert s.temperature == pytest.approx(float(ref.t.values[index]), rel=1e-9)
    assert s.pressure == pytest.approx(float(ref.p.values[index]), rel=1e-6)
    assert s.density == pytest.approx(float(ref.rho.values[index]), rel=1e-6)
    assert s.speed_of_sound == pytest.approx(float(ref.cs.values[index]), rel=1e-6)


# --- geometric versus geopotential ---------------------------------------------------------


def test_geometric_and_geopotential_differ_at_10000_ft():
    # Design notes: at 10000 ft the two readings differ by ~1.3e-4 in density (kg/m^3).
    # 10000 ft geometric is 3046.54 m geopotential, 1.46 m lower, so it is the denser one.
    geometric = isa(10000 * FOOT, kind="geometric")
    geopotential = isa(10000 * FOOT, kind="geopotential")
    difference = geometric.density - geopotential.density
    assert 1.2e-4 < difference < 1.5e-4  # kg/m^3 (1.36e-4; relative 1.5e-4)
    assert geometric.geopotential_altitude == pytest.approx(3046.54, abs=0.01)
    assert geopotential.geometric_altitude == pytest.approx(3049.46, abs=0.01)


def test_kind_defaults_to_geometric():
    assert isa(8000.0) == isa(8000.0, kind="geometric")
    assert isa(8000.0).geometric_altitude == 8000.0
    assert isa(8000.0, kind="geopotential").geopotential_altitude == 8000.0


@pytest.mark.parametrize("z", [0.0, 1.0, 3048.0, 11019.1, 20000.0, 1.0e5])
def test_altitude_round_trip(z):
    assert geometric_from_geopotential(geopotential_from_geometric(z)) == pytest.approx(
        z, rel=1e-13, abs=1e-9
    )
    assert geopotential_from_geometric(geometric_from_geopotential(z)) == pytest.approx(
        z, rel=1e-13, abs=1e-9
    )


def test_geopotential_formula():
    # h = r0 z / (r0 + z), r0 = 6356766 m: US Std Atm 1976. 11 km geopotential = 11019.07 m.
    assert geometric_from_geopotential(11000.0) == pytest.approx(11019.07, abs=0.01)
    assert geopotential_from_geometric(0.0) == 0.0


def test_layers_join_continuously():
    below = isa(11000.0 - 1e-6, kind="geopotential")
    above = isa(11000.0 + 1e-6, kind="geopotential")
    assert above.pressure == pytest.approx(below.pressure, rel=1e-9)
    assert above.temperature == pytest.approx(below.temperature, abs=1e-8)


# --- bounds and bad input ------------------------------------------------------------------


@pytest.mark.parametrize("kind", ["geometric", "geopotential"])
def test_range_is_inclusive(kind):
    assert isinstance(isa(0.0, kind=kind), AtmosphereState)
    assert isinstance(isa(20000.0, kind=kind), AtmosphereState)


@pytest.mark.parametrize(
    ("altitude", "kind"),
    [
        (-0.001, "geometric"),
        (-1.0, "geopotential"),
        (20000.001, "geometric"),
        (20000.001, "geopotential"),
        (math.nan, "geometric"),
        (math.inf, "geometric"),
        (-math.inf, "geopotential"),
        ("high", "geometric"),
        (None, "geometric"),
    ],
)
def test_out_of_range_raises_input_error(altitude, kind):
    with pytest.raises(InputError, match="altitude") as info:
        isa(altitude, kind=kind)
    assert "between 0 and 20 km" in str(info.value)
    assert info.value.exit_code == 2


def test_unknown_kind_raises_input_error():
    with pytest.raises(InputError, match="kind"):
        isa(1000.0, kind="pressure")


def test_state_is_frozen():
    s = isa(0.0)
    with pytest.raises(AttributeError):
        s.density = 1.0  # type: ignore[misc]
