"""Standard atmosphere: altitude_pressure against ISO 2533 / U.S. Standard Atmosphere 1976."""

import numpy as np
import pytest
from fluids.atmosphere import ATMOSPHERE_1976

from stillair.atmosphere import altitude_pressure
from stillair.validity import InputError

# U.S. Standard Atmosphere 1976, Table I (geopotential altitude), = ISO 2533:1975 below 11 km.
# From memory: H [m] -> p [Pa], printed to 6 significant digits.
STANDARD_TABLE = {
    0.0: 101325.0,
    1000.0: 89874.6,
    2000.0: 79495.2,
    3000.0: 70108.5,
    5000.0: 54019.9,
    11000.0: 22632.1,
}

EARTH_RADIUS = 6356766.0  # m, the U.S. Standard Atmosphere 1976 effective radius r0


@pytest.mark.parametrize("altitude, pressure", sorted(STANDARD_TABLE.items()))
def test_against_standard_atmosphere_table(altitude, pressure):
    # Table rounding: half a unit in the 6th digit, 5e-6 relative.
    assert altitude_pressure(altitude) == pytest.approx(pressure, rel=5e-6)


@pytest.mark.parametrize("altitude", [-2000.0, -500.0, 250.0, 1500.0, 4321.0, 8000.0, 11000.0])
def test_against_fluids_atmosphere_1976(altitude):
    # fluids.atmosphere.ATMOSPHERE_1976 takes the geometric altitude z; ours is geopotential H,
    # z = r0 H / (r0 - H).
    geometric = EARTH_RADIUS * altitude / (EARTH_RADIUS - altitude)
    assert altitude_pressure(altitude) == pytest.approx(ATMOSPHERE_1976(geometric).P, rel=1e-9)


def test_arrays_and_monotonic_fall():
    heights = np.linspace(-2000.0, 11000.0, 131)
    pressures = altitude_pressure(heights)
    assert pressures.shape == heights.shape
    assert np.all(np.diff(pressures) < 0)
    assert type(altitude_pressure(0)) is float and altitude_pressure(0) == 101325.0


def test_hydrostatic_near_sea_level():
    # dp/dH = -rho g0 with sea-level rho = 1.2250 kg/m3 (ISO 2533 standard sea-level density).
    slope = (altitude_pressure(1.0) - altitude_pressure(-1.0)) / 2.0
    assert slope == pytest.approx(-1.2250 * 9.80665, rel=1e-4)


@pytest.mark.parametrize("value, message", [
    (12000.0, "altitude_pressure: altitude_m must be in [-2000, 11000] m, got 12000"),
    (-2500.0, "altitude_pressure: altitude_m must be in [-2000, 11000] m, got -2500"),
    ([0.0, 20000.0], "altitude_pressure: altitude_m must be in [-2000, 11000] m, got 20000"),
    ("high", "altitude_pressure: altitude_m must be a number, not text, got 'high'"),
    (float("nan"), "altitude_pressure: altitude_m must be a finite number, got nan"),
    (None, "altitude_pressure: altitude_m must be a number, got None"),
])
def test_errors(value, message):
    with pytest.raises(InputError) as error:
        altitude_pressure(value)
    assert str(error.value) == message
