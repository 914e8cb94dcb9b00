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
from scipy.constants import Stefan_Boltzmann as SIGMA, zero_Celsius

from .validity import require_between, require_finite, unwrap, ABSOLUTE_ZERO_C, InputError

__all__ = ["SIGMA", "h_rad", "radiation_flux", "exchange_factor"]


def exchange_factor(eps1, eps2=None, function_name: str = "exchange_factor"):
    """Grey-body exchange factor: 1/(1/eps1 + 1/eps2 - 1) for parallel plates, eps1 alone
    for a surface seeing large surroundings (eps2 None)."""
    eps1 = require_between(function_name, "eps1", eps1, 0.0, 1.0, low_open=True)
    if eps2 is None:
        return eps1
    eps2 = require_between(function_name, "eps2", eps2, 0.0, 1.0, low_open=True)
    return 1.0 / (1.0 / eps1 + 1.0 / eps2 - 1.0)


def _kelvin(function_name: str, argument: str, t_celsius):
    t = require_finite(function_name, argument, t_celsius)
    if np.any(t < ABSOLUTE_ZERO_C):
        bad = t[t < ABSOLUTE_ZERO_C].flat[0] if t.ndim else t.item()
        raise InputError(function_name, argument, bad, "above -273.15 °C")
    return t + zero_Celsius


def h_rad(t1, t2, eps1, eps2=None):
    """Linearised radiation coefficient in W/(m²·K) between surfaces at t1 and t2 (°C).

    With ``eps2`` given: two large parallel grey surfaces.  With ``eps2`` omitted: a surface of
    emissivity ``eps1`` seeing large surroundings at ``t2``.  Exact for any t1 - t2:
    h = F sigma (T1² + T2²)(T1 + T2) with F the grey exchange factor.
    """
    k1 = _kelvin("h_rad", "t1", t1)
    k2 = _kelvin("h_rad", "t2", t2)
    factor = exchange_factor(eps1, eps2, "h_rad")
    return unwrap(factor * SIGMA * (k1 ** 2 + k2 ** 2) * (k1 + k2))


def radiation_flux(t1, t2, eps1, eps2=None):
    """Net radiative flux from surface 1 to 2 in W/m² (positive when t1 > t2)."""
    k1 = _kelvin("radiation_flux", "t1", t1)
    k2 = _kelvin("radiation_flux", "t2", t2)
    factor = exchange_factor(eps1, eps2, "radiation_flux")
    return unwrap(factor * SIGMA * (k1 ** 4 - k2 ** 4))
