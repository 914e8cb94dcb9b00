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
from scipy.constants import g as STANDARD_GRAVITY, zero_Celsius

from .gases import gas_properties, require_gas_temperature
from .validity import require_positive, unwrap

__all__ = ["STANDARD_GRAVITY", "grashof", "rayleigh", "film_properties", "buoyancy_groups"]

DEFAULT_PRESSURE = 101325.0


def film_properties(t1, t2, gas="air", pressure=DEFAULT_PRESSURE, *, property_temperature=None,
                    ideal_expansion=False, function_name="film_properties", names=("t1", "t2")):
    """Gas properties at the film temperature (or at ``property_temperature``), and that
    temperature.  With ``ideal_expansion`` the expansion coefficient is replaced by 1/T.

    Each temperature is checked as typed (finite, above absolute zero, inside the gas's range),
    under its own name: ``names`` are the caller's names of t1 and t2 ("ts", "tf" for a surface).
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
    length = require_positive(function_name, "length", length, "m")
    props, _, beta = film_properties(t1, t2, gas, pressure, ideal_expansion=ideal_expansion,
                                     function_name=function_name)
    return buoyancy_groups(props, beta, np.subtract(t1, t2, dtype=float), length)


def grashof(t1, t2, length, gas="air", pressure=DEFAULT_PRESSURE, ideal_expansion=False):
    """Grashof number between temperatures t1 and t2 (°C) over ``length`` (m)."""
    return unwrap(_groups("grashof", t1, t2, length, gas, pressure, ideal_expansion)[0])


def rayleigh(t1, t2, length, gas="air", pressure=DEFAULT_PRESSURE, ideal_expansion=False):
    """Rayleigh number between temperatures t1 and t2 (°C) over ``length`` (m)."""
    return unwrap(_groups("rayleigh", t1, t2, length, gas, pressure, ideal_expansion)[1])
