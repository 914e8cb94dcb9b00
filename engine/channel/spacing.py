"""The optimum spacing of a channel array or a single channel (Bar-Cohen and Rohsenow)."""

from __future__ import annotations

from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike


from ..groups import DEFAULT_PRESSURE, STANDARD_GRAVITY, film_properties
from .walls import (BAR_COHEN_ROHSENOW, CHANNEL_CASES, CHANNEL_OPTIMA, FLUX_CASES, PLATE_OPTIMUM_FRACTION,
                    _composite)
from ..plausibility import length_slip, temperature_slip, warn_slips
from ..validity import InputError, require_choice, require_length, require_positive, unwrap

# --------------------------------------------------------------------------------------------
# Optimum spacing
# --------------------------------------------------------------------------------------------

def _flux_nu_at_el(el, case):
    """Composite Nu of a flux case for a given El on the top temperature (El* = El Nu)."""
    from scipy.optimize import brentq  # here, not at import: scipy.optimize takes 0.4 s to load
    return brentq(lambda nu: nu - _composite(el * nu, case), 1e-12, 1e6, xtol=1e-14, rtol=1e-14)


@lru_cache(maxsize=None)
def optimum_elenbaas(case: str, optimum: str) -> float:
    """El = Ra_S S/L (on the wall or top-wall temperature difference) at the optimum spacing.

    "array", isothermal cases: (2 C1/C2)^(2/3) (maximum of Nu/El^(1/2), closed form).
    "array", flux cases: El* = (5 C1/(4 C2))^(5/3), then El = El*/Nu (maximum of Nu/El^(1/2)
    with El* = El Nu at a fixed top temperature, closed form).
    "plate": h = 0.99 h_isolated at the same wall temperature (root found with brentq).
    """
    from scipy.optimize import brentq  # here, not at import: scipy.optimize takes 0.4 s to load
    c1, c2 = BAR_COHEN_ROHSENOW[case]
    if optimum == "array":
        if case not in FLUX_CASES:
            return (2.0 * c1 / c2) ** (2.0 / 3.0)
        el_star = (5.0 * c1 / (4.0 * c2)) ** (5.0 / 3.0)
        return float(el_star / _composite(el_star, case))
    if case not in FLUX_CASES:
        return (c1 / c2 / (PLATE_OPTIMUM_FRACTION ** -2 - 1.0)) ** (2.0 / 3.0)
    # Isolated flux plate at a fixed top temperature: Nu = (El Nu)^(1/5)/sqrt(C2) -> El^(1/4) C2^(-5/8)
    log_el = brentq(lambda x: _flux_nu_at_el(np.exp(x), case)
                    - PLATE_OPTIMUM_FRACTION * np.exp(x) ** 0.25 * c2 ** -0.625, 0.0, 30.0, xtol=1e-13)
    return float(np.exp(log_el))


def channel_spacing(ts: ArrayLike, tf: ArrayLike, height: ArrayLike, case: str = "isothermal",
                    optimum: str = "array", gas: str = "air",
                    pressure: ArrayLike = DEFAULT_PRESSURE) -> float | np.ndarray:
    """Optimum spacing of vertical parallel plates (Bar-Cohen and Rohsenow composite).

    Parameters
    ----------
    ts : float or array
        Wall temperature in °C (flux cases: the allowed top-of-channel wall temperature).
    tf : float or array
        Ambient air temperature in °C.
    height : float or array
        Plate height L in m (> 0).
    case : str
        As for :func:`h_channel`.
    optimum : str
        "array" (default): the spacing that rejects the most heat from a fixed width of thin
        plates (maximum of h/S); "plate": the spacing where h reaches 99 % of the isolated-plate
        value (wider gaps gain less than 1 %).
    gas : str, default "air"
        Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).
    pressure : float or array, default 101325
        Absolute pressure in Pa; properties at the film temperature (ts + tf)/2.

    Returns
    -------
    float or array
        Spacing in m: S = (El_opt / P)^(1/4), P = g beta |ts - tf| / (nu alpha L).

    Notes
    -----
    Isothermal, "array": S_opt = 2.714 (Ra_S/(S^3 L))^(-1/4); isothermal-adiabatic 2.154
    (Bar-Cohen and Rohsenow, J. Heat Transfer 106 (1984) 116-123; Incropera et al., 6th ed.,
    Table 9.3).  Flux cases: most heat from a fixed width at a fixed top wall temperature,
    derived from the same composite (see :func:`optimum_elenbaas`).  Thin plates: with plates of
    thickness t the pitch is S + t; for fins see :func:`heatsink`.

    Examples
    --------
    >>> round(channel_spacing(80.0, 30.0, 0.18) * 1000, 2)   # mm
    7.5
    """
    function_name = "channel_spacing"
    case = require_choice(function_name, "case", case, CHANNEL_CASES)
    optimum = require_choice(function_name, "optimum", optimum, CHANNEL_OPTIMA)
    height = require_length(function_name, "height", height)
    props, _, beta = film_properties(ts, tf, gas, pressure, function_name=function_name, names=("ts", "tf"))
    warn_slips(function_name, temperature_slip({"ts": ts, "tf": tf}), length_slip("height", height))
    delta_t = np.abs(np.subtract(ts, tf, dtype=float))
    if np.any(delta_t == 0):
        raise InputError(function_name, "ts", ts, "different from tf (no buoyancy, no optimum)")
    drive = STANDARD_GRAVITY * beta * delta_t / (props.kinvisc * props.diffusivity * height)
    return unwrap((optimum_elenbaas(case, optimum) / drive) ** 0.25)


