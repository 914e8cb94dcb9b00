"""Insulation turned round: the thickness at which an insulated surface reaches a temperature.

The question of ISO 12241's surface-temperature criteria: how thick must the insulation on a
pipe or a flat face be so that its outer surface stays below a touch limit (a hot surface) or a
margin above the ambient dew point (a cold one)?  With the outer surface temperature t_s given,
the outer coefficients are known (natural convection at t_s, radiation at t_s), so

* flat face (edge losses ignored):  k (t_i - t_s) / x = F(t_s)  gives x explicitly;
* pipe of outside diameter d:  2 k (t_i - t_s) = D ln(D/d) F(t_s, D),  D = d + 2 x,
  one equation in D whose right side rises strictly with D (scipy's brentq),

with F = h_c (t_s - t_air) + h_r (t_s - t_surroundings) the heat flux the outer surface passes
on (W/m²), h_c from the registry's correlation for the geometry at the outer size and h_r the
exact linearised radiation coefficient.  A target that the flux cannot carry in the direction
of t_i -> t_s (beyond the temperature an unlimited thickness would approach) is refused.
"""

from __future__ import annotations

import math

import numpy as np

from ._typing import ArrayLike, FloatOrArray
from .convection import surface_convection
from .plausibility import PLAUSIBLE_LENGTHS, length_slip, temperature_slip, trial_sizes, warn_slips
from .groups import DEFAULT_PRESSURE
from .radiation import h_rad
from .validity import (InputError, format_value, require_between, require_choice, require_finite,
                       require_nonnegative, require_positive, unwrap, warn_out_of_range)

__all__ = ["insulation_thickness", "INSULATION_GEOMETRIES"]

#: The surfaces an insulation thickness is found for: the geometry's size argument in words.
INSULATION_GEOMETRIES = {
    "hcyl": "outside diameter of the bare pipe (horizontal cylinder)",
    "vplate": "height of the vertical face",
    "hplate": "characteristic length of the horizontal face, area/perimeter",
}
FUNCTION = "insulation_thickness"
#: A pipe's insulated diameter is searched up to this multiple of the bare one.
MAX_DIAMETER_RATIO = 1e4


def insulation_thickness(t_inner: ArrayLike, t_air: ArrayLike, t_surface: ArrayLike, conductivity: ArrayLike,
                         emissivity: ArrayLike, geometry: str, size: ArrayLike, facing: str | None = None,
                         t_surroundings: ArrayLike | None = None, gas: str = "air",
                         pressure: ArrayLike = DEFAULT_PRESSURE, wind: ArrayLike = 0.0,
                         wind_length: ArrayLike | None = None) -> FloatOrArray:
    """Insulation thickness at which the outer surface of an insulated pipe or face is at a temperature.

    Parameters
    ----------
    t_inner : array_like
        Temperature in °C under the insulation (the pipe or face metal).
    t_air : array_like
        Still air temperature in °C.
    t_surface : array_like
        The outer surface temperature wanted in °C: between ``t_inner`` and the temperature an
        unlimited thickness would approach (close to ``t_air``).
    conductivity : array_like
        Insulation conductivity in W/(m·K), > 0.
    emissivity : array_like
        Emissivity of the outer surface (jacket), 0 to 1.
    geometry : {"hcyl", "vplate", "hplate"}
        A horizontal pipe, a vertical face or a horizontal face.
    size : array_like
        In m, > 0: the bare pipe's outside diameter (hcyl), the face height (vplate) or the
        face's area/perimeter (hplate).
    facing : {"up", "down"}, optional
        Which way a horizontal face looks (hplate only).
    t_surroundings : array_like, optional
        Temperature in °C of the surroundings the surface radiates to; blank: ``t_air``.
    gas : str, default "air"
        The surrounding gas.
    pressure : array_like, default 101325
        Absolute pressure in Pa.
    wind : array_like, default 0
        Wind speed in m/s (>= 0) over the outer surface, taken horizontal (across a pipe, along a
        face); 0 is still air.  With a wind the outer convection combines natural and forced
        convection, h = (h_N^3 + h_F^3)^(1/3) (:func:`stillair.surface_convection`).
    wind_length : array_like, optional
        A face's length along the wind in m (> 0); blank: the face height (vplate), required for
        hplate with a wind.  A pipe takes its insulated diameter.

    Returns
    -------
    float or numpy.ndarray
        Thickness in m (0 when ``t_surface`` equals ``t_inner``), of the broadcast shape.

    Raises
    ------
    InputError
        A bad argument, or a ``t_surface`` no thickness reaches (named with the reason).

    Notes
    -----
    Steady one-dimensional conduction through the insulation (a cylindrical shell for the
    pipe, ln(D/d)/(2 pi k) per metre; a slab for a face, x/k per m², edge losses ignored), the
    metal at ``t_inner`` (inner film and wall neglected), natural convection from the outer
    surface by the registry's correlation at the outer size (auto method) and grey radiation to
    large surroundings.  Monotone: the outer surface moves from ``t_inner`` towards the air
    temperature as the thickness grows, so the answer is unique.  A correlation outside its
    range gives a :class:`~stillair.CorrelationRangeWarning`.

    References
    ----------
    ISO 12241:2022, Thermal insulation for building equipment and industrial installations --
    Calculation rules (surface temperature and condensation criteria; cylindrical and plane
    layers, from memory); Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed.,
    eq. 3.28 (the cylindrical shell's resistance).

    Examples
    --------
    >>> x = insulation_thickness(150.0, 20.0, 50.0, 0.04, 0.3, "hcyl", 0.1143)
    >>> round(1000 * x, 1)                      # mm of insulation for a 50 °C jacket
    17.2
    """
    geometry = require_choice(FUNCTION, "geometry", geometry, tuple(INSULATION_GEOMETRIES))
    if geometry == "hplate":
        facing = require_choice(FUNCTION, "facing", facing, ("up", "down"))
    elif facing not in (None, ""):
        raise InputError(FUNCTION, "facing", facing, f"blank for {geometry} (only a horizontal face has one)")
    t_inner = require_finite(FUNCTION, "t_inner", t_inner)
    t_air = require_finite(FUNCTION, "t_air", t_air)
    t_surface = require_finite(FUNCTION, "t_surface", t_surface)
    t_surroundings = t_air if t_surroundings is None else require_finite(FUNCTION, "t_surroundings", t_surroundings)
    conductivity = require_positive(FUNCTION, "conductivity", conductivity, "W/(m·K)")
    emissivity = require_between(FUNCTION, "emissivity", emissivity, 0.0, 1.0)
    size = require_positive(FUNCTION, "size", size, "m")
    pressure = require_positive(FUNCTION, "pressure", pressure, "Pa")
    wind = require_nonnegative(FUNCTION, "wind", wind, "m/s")
    if wind_length is not None:
        if geometry == "hcyl":
            raise InputError(FUNCTION, "wind_length", wind_length, "blank for hcyl (the wind crosses the pipe)")
        wind_length = require_positive(FUNCTION, "wind_length", wind_length, "m")
    along = np.nan if wind_length is None else wind_length     # nan: blank (the face's own length)
    # the user's own sizes and temperatures are checked for unit slips here, once; the sizes the
    # search then tries are its own (trial_sizes in _one)
    warn_slips(FUNCTION, temperature_slip({"t_inner": t_inner, "t_air": t_air, "t_surface": t_surface}),
               length_slip("size", size, PLAUSIBLE_SIZE[geometry]))
    arrays = np.broadcast_arrays(t_inner, t_air, t_surface, conductivity, emissivity, size, t_surroundings,
                                 pressure, wind, along)
    thickness = np.empty(arrays[0].shape)
    notes = []
    for index in np.ndindex(thickness.shape):
        ti, ta, ts, k, eps, d, tsur, p, v, lw = (float(a[index]) for a in arrays)
        wind_args = {"wind": v, "wind_length": None if math.isnan(lw) else lw}
        thickness[index], note = _one(ti, ta, ts, k, eps, geometry, d, facing, tsur, gas, p, wind_args)
        notes.append(note)
    warn_out_of_range(FUNCTION, [not n for n in notes], [n for n in notes if n])
    return unwrap(thickness)


#: The largest plausible ``size`` per geometry, m: a pipe's diameter, a face's height or length
#: (plausibility.PLAUSIBLE_LENGTHS).
PLAUSIBLE_SIZE = {"hcyl": PLAUSIBLE_LENGTHS["diameter"], "vplate": PLAUSIBLE_LENGTHS["height"],
                  "hplate": PLAUSIBLE_LENGTHS["length"]}


def _one(ti, ta, ts, k, eps, geometry, size, facing, tsur, gas, pressure, wind_args) -> tuple[float, str]:
    """(thickness, range note) for one case."""
    drive = ti - ts                     # the flow through the insulation is k * drive / ...
    if drive == 0.0:
        return 0.0, ""
    radiation = h_rad(ts, tsur, eps) * (ts - tsur) if eps > 0 else 0.0

    def flux(length):
        """(W/m² the outer surface passes on at t_s, positive in the direction t_i -> t_s; note)."""
        # a trial diameter is ours, not typed: the unit-slip check (a length that looks like mm)
        # speaks of the user's own size only, which was checked where it was taken
        with trial_sizes():
            result = surface_convection(geometry, ts, ta, length, facing=facing, gas=gas, pressure=pressure,
                                        function_name=FUNCTION, **wind_args)
        note = str(result.note)
        passed = float(result.h) * (ts - ta) + radiation
        return math.copysign(1.0, drive) * passed, note

    def unreachable(how: str) -> InputError:
        return InputError(FUNCTION, "t_surface", ts,
                          f"between t_inner ({format_value(ti)} °C) and the temperature an unlimited thickness "
                          f"approaches, near t_air ({format_value(ta)} °C): {how}")

    if geometry != "hcyl":
        passed, note = flux(size)
        if not passed > 0:
            raise unreachable("at this surface temperature the air and surroundings would not take the heat "
                              "the insulation passes on")
        return k * abs(drive) / passed, note

    from scipy import optimize  # here, not at import: scipy.optimize costs 0.4 s of start-up

    def excess(log_ratio):
        """D ln(D/d) F(D) - 2 k |t_i - t_s|: rises strictly with D."""
        diameter = size * math.exp(log_ratio)
        return diameter * log_ratio * flux(diameter)[0] - 2.0 * k * abs(drive)

    high = 1e-3
    while excess(high) <= 0:
        high *= 2.0
        if high > math.log(MAX_DIAMETER_RATIO):
            raise unreachable(f"no insulated diameter up to {MAX_DIAMETER_RATIO:g} x the pipe's reaches it")
    log_ratio = optimize.brentq(excess, 0.0, high, xtol=1e-14, rtol=4 * np.finfo(float).eps, maxiter=200)
    diameter = size * math.exp(log_ratio)
    return 0.5 * (diameter - size), flux(diameter)[1]
