"""Thermal radiation between grey, diffuse surfaces, and its linearised coefficient.

Two configurations cover still-air work:

* two large parallel surfaces (a cavity's walls): q = sigma (T1^4 - T2^4) / (1/eps1 + 1/eps2 - 1)
* a small surface in large isothermal surroundings (a wall to the room, a cabinet to ambient):
  q = eps1 sigma (T1^4 - T2^4)

The linearised coefficient h_rad = q / (T1 - T2) is written in its exact factored form
sigma (T1^2 + T2^2)(T1 + T2) / (...), so a network using h_rad * (T1 - T2) reproduces the
fourth-power exchange exactly at any temperature difference; 4 sigma Tm^3 is only its limit for
T1 -> T2.  Source: Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 1.9,
13.24 and 13.27 (radiation coefficient and parallel-plate exchange).
"""

from __future__ import annotations

import numpy as np
from .constants import STEFAN_BOLTZMANN as SIGMA, ZERO_CELSIUS as zero_Celsius

from ._docs import shared_docs
from ._typing import ArrayLike, FloatOrArray
from .validity import require_between, require_finite, unwrap, ABSOLUTE_ZERO_C, InputError

__all__ = ["SIGMA", "h_rad", "radiation_flux", "exchange_factor"]


#: Docstring blocks of this module's functions (:func:`~stillair._docs.shared_docs`).
_BLOCKS = {
    "reference": """    Incropera, DeWitt, Bergman, Lavine, Fundamentals of Heat and Mass Transfer,
    6th ed., eqs. 1.7, 1.9, 13.24 and 13.27.""",
    "exchange_inputs": """    t1 : float or array_like
        Temperature of surface 1 (the radiating surface) in °C, above -273.15.
    t2 : float or array_like
        Temperature of surface 2 (the facing surface), or of the large surroundings, in °C.
    eps1 : float or array_like
        Emissivity of surface 1, 0 < eps <= 1.
    eps2 : float or array_like, optional
        Emissivity of surface 2 for two large parallel surfaces; None (the default) when
        surface 1 sees large surroundings at t2.""",
    "exchange_raises": """    Raises
    ------
    InputError
        A temperature below absolute zero or not finite, an emissivity outside 0 < eps <= 1.""",
}


def exchange_factor(eps1: ArrayLike, eps2: ArrayLike | None = None,
                    function_name: str = "exchange_factor") -> FloatOrArray:
    """Grey-body exchange factor F of two parallel surfaces or of a surface in surroundings.

    Parameters
    ----------
    eps1 : float or array_like
        Emissivity of surface 1, 0 < eps <= 1.
    eps2 : float or array_like, optional
        Emissivity of surface 2 when two large parallel surfaces face each other; None (the
        default) for a small surface seeing large isothermal surroundings.
    function_name : str, default "exchange_factor"
        The name error messages start with (a caller passes its own).

    Returns
    -------
    float or numpy.ndarray
        F (-): 1/(1/eps1 + 1/eps2 - 1) for parallel plates, eps1 for surroundings.

    Raises
    ------
    InputError
        An emissivity outside 0 < eps <= 1.

    Notes
    -----
    The net exchange is q = F sigma (T1^4 - T2^4).  Both forms assume grey, diffuse surfaces;
    the parallel-plate form assumes plates large against their spacing (view factor 1).

    References
    ----------
    {reference}

    Examples
    --------
    >>> import stillair
    >>> round(stillair.exchange_factor(0.9, 0.1), 4)
    0.0989
    >>> stillair.exchange_factor(0.9)
    0.9
    """
    eps1 = require_between(function_name, "eps1", eps1, 0.0, 1.0, low_open=True)
    if eps2 is None:
        return unwrap(eps1)
    eps2 = require_between(function_name, "eps2", eps2, 0.0, 1.0, low_open=True)
    return unwrap(1.0 / (1.0 / eps1 + 1.0 / eps2 - 1.0))


#: The hottest surface temperature a radiation call takes, °C: hotter than any surface in still
#: air (the sun's photosphere is about 5,500 °C); beyond it a value is typed in the wrong unit
#: or is no temperature at all, and T^4 would overflow.
HOTTEST_SURFACE_C = 1e4


def _kelvin(function_name: str, argument: str, t_celsius):
    t = require_finite(function_name, argument, t_celsius)
    if np.any(t < ABSOLUTE_ZERO_C):
        bad = t[t < ABSOLUTE_ZERO_C].flat[0] if t.ndim else t.item()
        raise InputError(function_name, argument, bad, "above -273.15 °C")
    if np.any(t > HOTTEST_SURFACE_C):
        bad = t[t > HOTTEST_SURFACE_C].flat[0] if t.ndim else t.item()
        raise InputError(function_name, argument, bad, f"at most {HOTTEST_SURFACE_C:g} °C")
    return t + zero_Celsius


def h_rad(t1: ArrayLike, t2: ArrayLike, eps1: ArrayLike,
          eps2: ArrayLike | None = None) -> FloatOrArray:
    """Linearised radiation coefficient between two surfaces, or a surface and surroundings.

    Parameters
    ----------
    {exchange_inputs}

    Returns
    -------
    float or numpy.ndarray
        h_rad in W/(m²·K), such that the radiative flux is h_rad (t1 - t2); a float for scalar
        inputs, an array of the broadcast shape otherwise.

    {exchange_raises}

    Notes
    -----
    Exact for any t1 - t2: h = F sigma (T1² + T2²)(T1 + T2), T in kelvin, F the grey exchange
    factor (:func:`exchange_factor`); 4 F sigma Tm³ is only its limit for T1 -> T2.  Grey,
    diffuse surfaces; parallel surfaces large against their spacing.

    References
    ----------
    {reference}

    Examples
    --------
    >>> import stillair
    >>> round(stillair.h_rad(20.0, 10.0, 0.9, 0.9), 3)    # two glass panes
    4.441
    >>> round(stillair.h_rad(40.0, 20.0, 0.9), 3)         # a painted wall to a room
    5.693
    """
    k1 = _kelvin("h_rad", "t1", t1)
    k2 = _kelvin("h_rad", "t2", t2)
    factor = exchange_factor(eps1, eps2, "h_rad")
    return unwrap(factor * SIGMA * (k1 ** 2 + k2 ** 2) * (k1 + k2))


def radiation_flux(t1: ArrayLike, t2: ArrayLike, eps1: ArrayLike,
                   eps2: ArrayLike | None = None) -> FloatOrArray:
    """Net radiative heat flux from surface 1 to surface 2 (or to the surroundings).

    Parameters
    ----------
    {exchange_inputs}

    Returns
    -------
    float or numpy.ndarray
        q in W/m², positive when t1 > t2.

    {exchange_raises}

    Notes
    -----
    q = F sigma (T1^4 - T2^4), T in kelvin, F from :func:`exchange_factor`; equal to
    h_rad (t1 - t2).

    References
    ----------
    {reference}

    Examples
    --------
    >>> import stillair
    >>> round(stillair.radiation_flux(40.0, 20.0, 0.9), 2)
    113.86
    """
    k1 = _kelvin("radiation_flux", "t1", t1)
    k2 = _kelvin("radiation_flux", "t2", t2)
    factor = exchange_factor(eps1, eps2, "radiation_flux")
    return unwrap(factor * SIGMA * (k1 ** 4 - k2 ** 4))


for _function in (exchange_factor, h_rad, radiation_flux):
    shared_docs(_function, _BLOCKS)
del _function
