"""Dimensionless groups of natural convection.

    Gr = g beta |T1 - T2| L^3 / nu^2          Ra = Gr Pr = g beta |T1 - T2| L^3 / (nu alpha)

Properties are taken at the mean (film) temperature (T1 + T2)/2 unless a property temperature
is given (to reproduce a constant-property hand calculation).  beta comes from the real gas
(CoolProp's isobaric expansion coefficient) by default; ``ideal_expansion=True`` uses the
ideal-gas 1/T that most textbooks and the glazing standards use.  The absolute temperature
difference is used: the direction of heat flow is carried by the geometry's case, not by a
negative Rayleigh number.
"""

from __future__ import annotations

import numpy as np
from .constants import STANDARD_GRAVITY, ZERO_CELSIUS as zero_Celsius

from ._docs import shared_docs
from ._typing import ArrayLike, FloatOrArray
from .gases import GasProperties, gas_properties, require_gas_temperature
from .plausibility import length_slip, temperature_slip, warn_slips
from .validity import require_length, require_positive, unwrap

__all__ = ["STANDARD_GRAVITY", "grashof", "rayleigh", "film_properties", "buoyancy_groups"]

DEFAULT_PRESSURE = 101325.0


@shared_docs
def film_properties(t1: ArrayLike, t2: ArrayLike, gas: str = "air", pressure: ArrayLike = DEFAULT_PRESSURE, *,
                    property_temperature: ArrayLike | None = None, ideal_expansion: bool = False,
                    function_name: str = "film_properties", names: tuple[str, str] = ("t1", "t2"),
                    ) -> tuple[GasProperties, np.ndarray, np.ndarray]:
    """Gas properties at the film temperature (or at ``property_temperature``), and that
    temperature.  With ``ideal_expansion`` the expansion coefficient is replaced by 1/T.

    Each temperature is checked as typed (finite, above absolute zero, inside the gas's range),
    under its own name: ``names`` are the caller's names of t1 and t2 ("ts", "tf" for a surface).

    Parameters
    ----------
    t1 : array_like
        First temperature (the surface) in °C.
    t2 : array_like
        Second temperature (the fluid or the other face) in °C.
    {gas_and_pressure}
    property_temperature : array_like, optional
        Temperature in °C at which to take the properties instead of (t1 + t2)/2.
    ideal_expansion : bool, default False
        Replace the real gas's expansion coefficient by the ideal-gas 1/T (T in K).
    function_name : str, default "film_properties"
        The name error messages are given under.
    names : tuple of str, default ("t1", "t2")
        The caller's names of t1 and t2 in error messages.

    Returns
    -------
    properties : GasProperties
        The gas's properties at the property temperature (SI units, see :class:`GasProperties`).
    t_film : numpy.ndarray
        The temperature in °C the properties were taken at.
    expansion : numpy.ndarray
        The expansion coefficient beta in 1/K used for the buoyancy groups.

    Raises
    ------
    InputError
        A temperature not finite, below absolute zero or outside the gas's range; an unknown gas.

    Notes
    -----
    Film temperature Tf = (T1 + T2)/2, common practice for natural convection (e.g. Incropera et
    al., Fundamentals of Heat and Mass Transfer, 6th ed., sec. 9.6); properties from
    :func:`gas_properties` (CoolProp), beta real-gas or 1/T.  Valid inside the gas's range.

    Examples
    --------
    >>> props, t_film, beta = film_properties(40.0, 20.0)
    >>> float(t_film), round(float(props.prandtl), 3)
    (30.0, 0.707)
    """
    t1 = require_gas_temperature(function_name, names[0], t1, gas)
    t2 = require_gas_temperature(function_name, names[1], t2, gas)
    if property_temperature is None:
        t_film = 0.5 * (t1 + t2)
    else:
        t_film = np.broadcast_to(
            require_gas_temperature(function_name, "property_temperature", property_temperature, gas),
            np.broadcast(t1, t2).shape)
    props = gas_properties(gas, t_film, pressure, function_name=function_name)
    expansion = 1.0 / (np.asarray(t_film, dtype=float) + zero_Celsius) if ideal_expansion else props.expansion
    return props, np.asarray(t_film, dtype=float), np.asarray(expansion, dtype=float)


def buoyancy_groups(props, expansion, delta_t, length):
    """(Gr, Ra) from properties, |delta T| and the characteristic length (all arrays)."""
    grashof_number = STANDARD_GRAVITY * expansion * np.abs(delta_t) * length ** 3 / props.kinvisc ** 2
    return grashof_number, grashof_number * props.prandtl


def _groups(function_name, t1, t2, length, gas, pressure, ideal_expansion):
    length = require_length(function_name, "length", length)
    warn_slips(function_name, temperature_slip({"t1": t1, "t2": t2}), length_slip("length", length),
               stacklevel=4)
    props, _, beta = film_properties(t1, t2, gas, pressure, ideal_expansion=ideal_expansion,
                                     function_name=function_name)
    return buoyancy_groups(props, beta, np.subtract(t1, t2, dtype=float), length)


@shared_docs
def grashof(t1: ArrayLike, t2: ArrayLike, length: ArrayLike, gas: str = "air",
            pressure: ArrayLike = DEFAULT_PRESSURE, ideal_expansion: bool = False) -> FloatOrArray:
    """Grashof number between temperatures t1 and t2 (°C) over ``length`` (m).

    Parameters
    ----------
    {buoyancy_inputs}

    Returns
    -------
    float or numpy.ndarray
        The Grashof number (-), >= 0: a float for scalar inputs, an array of the broadcast shape
        otherwise.

    {buoyancy_raises}

    Notes
    -----
    Gr = g beta |T1 - T2| L^3 / nu^2, g = 9.80665 m/s², properties at the film temperature (T1 + T2)/2 (see
    :func:`film_properties`); the definitions of Incropera et al., Fundamentals of Heat and
    Mass Transfer, 6th ed., chapter 9.  Valid wherever the gas properties are.

    Examples
    --------
    >>> round(grashof(40.0, 20.0, 0.5))
    314929635
    """
    return unwrap(_groups("grashof", t1, t2, length, gas, pressure, ideal_expansion)[0])


@shared_docs
def rayleigh(t1: ArrayLike, t2: ArrayLike, length: ArrayLike, gas: str = "air",
             pressure: ArrayLike = DEFAULT_PRESSURE, ideal_expansion: bool = False) -> FloatOrArray:
    """Rayleigh number between temperatures t1 and t2 (°C) over ``length`` (m).

    Parameters
    ----------
    {buoyancy_inputs}

    Returns
    -------
    float or numpy.ndarray
        The Rayleigh number (-), >= 0: a float for scalar inputs, an array of the broadcast shape
        otherwise.

    {buoyancy_raises}

    Notes
    -----
    Ra = Gr Pr = g beta |T1 - T2| L^3 / (nu alpha), g = 9.80665 m/s², properties at the film temperature (T1 + T2)/2 (see
    :func:`film_properties`); the definitions of Incropera et al., Fundamentals of Heat and
    Mass Transfer, 6th ed., chapter 9.  Valid wherever the gas properties are.

    Examples
    --------
    >>> round(rayleigh(40.0, 20.0, 0.5))
    222550956
    """
    return unwrap(_groups("rayleigh", t1, t2, length, gas, pressure, ideal_expansion)[1])
