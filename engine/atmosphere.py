"""The standard atmosphere: pressure at an altitude.

Troposphere of the ISO 2533:1975 standard atmosphere, identical below 11 km to the U.S. Standard
Atmosphere 1976 (NOAA/NASA/USAF, 1976, eqs. 33a and 33b): a linear temperature lapse from
T0 = 288.15 K at sea level and hydrostatic equilibrium give

    p = p0 (1 - L H / T0) ^ (g0 M0 / (R* L))  =  101325 (1 - 2.25577e-5 H) ^ 5.25588  Pa

with p0 = 101325 Pa, L = 0.0065 K/m, g0 = 9.80665 m/s2, M0 = 0.0289644 kg/mol and
R* = 8.31432 J/(mol K) (the 1976 value of the gas constant, kept so that the standard's tables
are reproduced).  H is the *geopotential* altitude, the argument of the standard's tables; it
differs from the geometric altitude z by z^2/r (r = 6356766 m), i.e. 0.16 m at 1 km and 19 m at
11 km, about 0.2 % in pressure at the top of the range.

Valid from -2000 m (the lowest altitude of the ISO 2533 tables -- from memory) to the
tropopause at 11000 m, above which the temperature is constant and this formula no longer holds.
"""

from __future__ import annotations

from ._typing import ArrayLike, FloatOrArray
from .validity import Range, require_between, unwrap

__all__ = ["ALTITUDE_RANGE", "altitude_pressure", "SEA_LEVEL_PRESSURE"]

SEA_LEVEL_PRESSURE = 101325.0      # Pa, p0
SEA_LEVEL_TEMPERATURE = 288.15     # K, T0
LAPSE_RATE = 0.0065                # K/m, L (temperature falls with height)
STANDARD_GRAVITY = 9.80665         # m/s2, g0
AIR_MOLAR_MASS = 0.0289644         # kg/mol, M0 of the standard atmosphere
GAS_CONSTANT_1976 = 8.31432        # J/(mol K), R* of the U.S. Standard Atmosphere 1976
ALTITUDE_RANGE = Range("altitude_m", -2000.0, 11000.0)

_EXPONENT = STANDARD_GRAVITY * AIR_MOLAR_MASS / (GAS_CONSTANT_1976 * LAPSE_RATE)  # 5.25588


def altitude_pressure(altitude_m: ArrayLike) -> FloatOrArray:
    """Standard-atmosphere pressure at an altitude, for the pressure argument of the others.

    Parameters
    ----------
    altitude_m : float or array_like
        Geopotential altitude above sea level in m, {low:g} to {high:g}.

    Returns
    -------
    float or numpy.ndarray
        Absolute pressure in Pa; a float for a scalar altitude, an array of its shape
        otherwise.

    Raises
    ------
    InputError
        An altitude outside {low:g} to {high:g} m.

    Notes
    -----
    Troposphere of the standard atmosphere: a linear temperature lapse of {lapse:g} K/m from
    {t0:g} K at sea level and hydrostatic equilibrium give

        p = {p0:g} (1 - {coefficient:.6g} H) ^ {exponent:.6g}  Pa.

    This is the undisturbed standard day: the actual pressure at a site varies with the
    weather by a few per cent.  Validity: {low:g} m (the lowest altitude of the ISO 2533 tables,
    from memory) to the tropopause at {high:g} m, above which the temperature is constant and
    this formula no longer holds.

    References
    ----------
    ISO 2533:1975 Standard Atmosphere; U.S. Standard Atmosphere 1976 (NOAA/NASA/USAF),
    eqs. 33a and 33b.

    Examples
    --------
    >>> import stillair
    >>> round(stillair.altitude_pressure(1000.0))
    89875
    >>> stillair.altitude_pressure([0.0, 2000.0]).round()
    array([101325.,  79495.])
    """
    altitude = require_between("altitude_pressure", "altitude_m", altitude_m,
                               ALTITUDE_RANGE.low, ALTITUDE_RANGE.high, "m")
    ratio = 1.0 - LAPSE_RATE * altitude / SEA_LEVEL_TEMPERATURE
    return unwrap(SEA_LEVEL_PRESSURE * ratio ** _EXPONENT)


# The numbers in the docstring are the module's own constants.
altitude_pressure.__doc__ = (altitude_pressure.__doc__ or "").format(
    low=ALTITUDE_RANGE.low, high=ALTITUDE_RANGE.high, lapse=LAPSE_RATE, t0=SEA_LEVEL_TEMPERATURE,
    p0=SEA_LEVEL_PRESSURE, coefficient=LAPSE_RATE / SEA_LEVEL_TEMPERATURE, exponent=_EXPONENT)
