"""Air carried through an enclosure: stack-driven flow through two openings, and the airflow a
dissipation needs.

An enclosure with a low opening (the inlet, area A_in) and a high one (the outlet, A_out), their
centres a height H apart, holding air at T_in while the air outside is at T_out, is driven by
the stack pressure

    dp = (rho_out - rho_in) g H

which the flow spends in the two openings, each an orifice of discharge coefficient Cd, the
inlet with an extra loss coefficient K (grille, filter, insect screen, referred to the mean
velocity through A_in):

    dp = m^2 / (2 rho_low A_in^2) (1/Cd^2 + K) + m^2 / (2 rho_high A_out^2 Cd^2)

rho_low, rho_high being the density of the air passing the low and the high opening (outside
air enters, inside air leaves).  Hence the closed form of :func:`stack_mass_flow`.  The inside
air is taken as well mixed: it leaves at T_in, so the air carries m cp (T_in - T_out), cp at
the mean of the two temperatures (the mean of cp over the enthalpy rise, to second order).
Inside air colder than outside reverses the flow (in at the high opening, out at the low one);
the same closed form holds with the roles of the densities swapped.

The forced counterpart: a fan moving a volume flow V of outside air carries rho_out V cp
(T_in - T_out); the airflow that holds a dissipation Q to a rise dT is V = Q / (rho cp dT)
(:func:`airflow_for`).
"""

from __future__ import annotations

import numpy as np

from ._docs import shared_docs
from ._select import where
from ._typing import ArrayLike, FloatOrArray
from .gases import GASES, gas_properties, require_gas_temperature
from .groups import DEFAULT_PRESSURE, STANDARD_GRAVITY
from .validity import InputError, require_between, require_nonnegative, require_positive, unwrap

__all__ = ["DEFAULT_DISCHARGE_COEFFICIENT", "opening_losses", "stack_mass_flow", "parse_fan_curve",
           "fan_operating_flow", "stack_flow", "airflow_for"]

#: Discharge coefficient of a sharp-edged opening: 0.61 is the value BS 5925:1991 (clause 9,
#: from memory) and the ventilation literature take for such openings; it is Kirchhoff's
#: free-streamline contraction of a two-dimensional slot, pi / (pi + 2) = 0.611, to two digits.
DEFAULT_DISCHARGE_COEFFICIENT = 0.61

_STACK_SOURCE = ("orifice equation per opening, losses of the two openings in series against the "
                 "stack pressure (rho_out - rho_in) g H: BS 5925:1991, clause 12, two openings "
                 "driven by temperature difference (from memory); ASHRAE Handbook - Fundamentals, "
                 "chapter Ventilation and Infiltration, stack-driven flow Q = Cd A (2 g dH (Ti - To)/Ti)^(1/2)")


def opening_losses(rho_low, rho_high, inlet_area, outlet_area, discharge=DEFAULT_DISCHARGE_COEFFICIENT,
                   extra_loss=0.0):
    """S of the two openings in series, whose pressure loss is m² S / 2 (kg/s, Pa): the low
    opening passing air of density rho_low (with the extra loss), the high one rho_high."""
    inverse_cd2 = 1.0 / (discharge * discharge)
    return ((inverse_cd2 + extra_loss) / (rho_low * inlet_area * inlet_area)
            + inverse_cd2 / (rho_high * outlet_area * outlet_area))


def stack_mass_flow(rho_inside, rho_outside, inlet_area, outlet_area, height,
                    discharge=DEFAULT_DISCHARGE_COEFFICIENT, extra_loss=0.0):
    """Mass flow (kg/s) through a low and a high opening driven by the density difference:
    positive upward (in at the inlet, the low opening), negative when the inside air is the
    heavier.  Arrays broadcast; no argument checks (callers check).  The closed form of the
    module docstring."""
    upward = rho_outside >= rho_inside
    rho_low = where(upward, rho_outside, rho_inside)     # the air passing the low opening
    rho_high = where(upward, rho_inside, rho_outside)
    losses = opening_losses(rho_low, rho_high, inlet_area, outlet_area, discharge, extra_loss)
    head = STANDARD_GRAVITY * height * (rho_outside - rho_inside)
    return np.sign(head) * np.sqrt(2.0 * np.abs(head) / losses)


def parse_fan_curve(text: str) -> tuple[tuple[float, float], ...]:
    """A fan curve written as points "V1:dp1, V2:dp2, ..." (volume flow m³/s : pressure rise
    Pa), as a spreadsheet cell holds it: from the shut-off point (V = 0, dp > 0) to free
    delivery (dp = 0), flows rising, pressures not rising.  Raises ValueError with the reason."""
    points = []
    for part in str(text).split(","):
        flow, colon, rise = part.partition(":")
        try:
            points.append((float(flow), float(rise)))
        except ValueError:
            raise ValueError(f'the point "{part.strip()}" is not "flow:pressure"') from None
        if not colon or not all(np.isfinite(points[-1])):
            raise ValueError(f'the point "{part.strip()}" is not "flow:pressure"')
    flows, rises = np.array(points).T
    if len(points) < 2:
        raise ValueError("at least two points are needed")
    if flows[0] != 0 or not rises[0] > 0:
        raise ValueError("the first point is the shut-off point, 0 m³/s at a pressure above 0")
    if rises[-1] != 0:
        raise ValueError("the last point is free delivery, at 0 Pa")
    if np.any(np.diff(flows) <= 0) or np.any(np.diff(rises) > 0):
        raise ValueError("flows must rise and pressures must not rise from point to point")
    return tuple(points)


def fan_operating_flow(curve, coefficient):
    """Volume flow (m³/s) where a fan curve (points of :func:`parse_fan_curve`, linear between
    them) meets the system curve dp = coefficient V² (coefficient in Pa s²/m⁶, an array)."""
    flows, rises = (np.array(column) for column in zip(*curve))
    c = np.asarray(coefficient, dtype=float)
    margin = rises - c[..., None] * flows ** 2        # falls along the curve, <= 0 at its end
    j = np.maximum(np.argmax(margin <= 0, axis=-1), 1)   # the segment [j-1, j] holds the point
    slope = (rises[j] - rises[j - 1]) / (flows[j] - flows[j - 1])
    intercept = rises[j - 1] - slope * flows[j - 1]      # > 0: the line at V = 0
    # c V² = intercept + slope V, the positive root written without cancellation
    return 2.0 * intercept / (np.sqrt(slope * slope + 4.0 * c * intercept) - slope)


@shared_docs
def stack_flow(t_inside: ArrayLike, t_outside: ArrayLike, inlet_area: ArrayLike, outlet_area: ArrayLike,
               height: ArrayLike, discharge: ArrayLike = DEFAULT_DISCHARGE_COEFFICIENT,
               extra_loss: ArrayLike = 0.0, gas: str = "air",
               pressure: ArrayLike = DEFAULT_PRESSURE) -> FloatOrArray:
    """Mass flow of air (kg/s) that the stack effect drives through a low and a high opening
    of an enclosure whose well-mixed inside air is at ``t_inside``.

    Parameters
    ----------
    t_inside : array_like
        Temperature of the inside air in °C (taken as well mixed: the air leaves at it).
    t_outside : array_like
        Temperature of the outside air in °C.
    inlet_area : array_like
        Free area of the low opening in m², > 0.
    outlet_area : array_like
        Free area of the high opening in m², > 0.
    height : array_like
        Height between the centres of the two openings in m, > 0.
    discharge : array_like, default 0.61
        Discharge coefficient of each opening, in (0, 1]; 0.61 for a sharp-edged opening.
    extra_loss : array_like, default 0
        Extra loss coefficient (grille, filter, insect screen) in the low opening, >= 0,
        referred to the mean velocity through ``inlet_area``.
    {gas_and_pressure}

    Returns
    -------
    float or numpy.ndarray
        Mass flow in kg/s, positive upward (in at the low opening, out at the high one), negative
        when the inside air is colder than the outside (the flow runs downward), 0 at equal
        temperatures.  The volume flow of the air drawn in is this divided by the outside
        density.

    Raises
    ------
    InputError
        A temperature outside the gas's range, an area or height that is not positive, a
        discharge coefficient outside (0, 1], a negative loss coefficient, an unknown gas.

    Notes
    -----
    The stack pressure (rho_out - rho_in) g H, g = 9.80665 m/s², against the orifice losses of
    the two openings in series:

        m = sign(dp) (2 |dp| / S)^(1/2),
        S = (1/Cd^2 + K) / (rho_low A_in^2) + 1 / (Cd^2 rho_high A_out^2)

    with rho_low and rho_high the densities of the air passing the low and the high opening
    (outside air where it enters, inside air where it leaves), from the gas tables at each
    temperature and the pressure.  Source: orifice equation per opening, losses in series
    (BS 5925:1991, clause 12, from memory; ASHRAE Handbook - Fundamentals, Ventilation and
    Infiltration, stack-driven flow).  For A_in = A_out = A, K = 0 and the Boussinesq limit it
    is the textbook Cd A* (2 g H dT / T)^(1/2) with 1/A*^2 = 1/A_in^2 + 1/A_out^2.  The
    discharge coefficient of a sharp-edged opening is roughly constant only in turbulent flow
    (opening Reynolds numbers of some thousands; from memory); it is not checked here.  No wind.

    References
    ----------
    BS 5925:1991, Code of practice for ventilation principles and designing for natural
    ventilation, clauses 9 and 12 (from memory).  ASHRAE Handbook - Fundamentals, chapter
    Ventilation and Infiltration (stack pressure, flow through openings).

    Examples
    --------
    >>> round(stack_flow(40.0, 20.0, 0.01, 0.01, 0.5) * 1000, 3)    # g/s
    4.048
    """
    function = "stack_flow"
    t_in = require_gas_temperature(function, "t_inside", t_inside, gas)
    t_out = require_gas_temperature(function, "t_outside", t_outside, gas)
    inlet_area = require_positive(function, "inlet_area", inlet_area, "m²")
    outlet_area = require_positive(function, "outlet_area", outlet_area, "m²")
    height = require_positive(function, "height", height, "m")
    discharge = require_between(function, "discharge", discharge, 0.0, 1.0, low_open=True)
    extra_loss = require_nonnegative(function, "extra_loss", extra_loss)
    rho_in = gas_properties(gas, t_in, pressure, function_name=function).density
    rho_out = gas_properties(gas, t_out, pressure, function_name=function).density
    return unwrap(stack_mass_flow(np.asarray(rho_in), np.asarray(rho_out), inlet_area, outlet_area, height,
                                  discharge, extra_loss))


def airflow_for(heat: ArrayLike, rise: ArrayLike, t_air: ArrayLike = 20.0,
                pressure: ArrayLike = DEFAULT_PRESSURE) -> FloatOrArray:
    """Volume flow of air (m³/s) that carries ``heat`` away with a temperature rise ``rise``.

    Parameters
    ----------
    heat : array_like
        Heat to carry away in W, >= 0 (the dissipation less what the walls lose).
    rise : array_like
        Allowed rise of the air's temperature from intake to exhaust in K, > 0.
    t_air : array_like, default 20
        Temperature in °C of the air drawn in; the volume flow is measured at it.
    pressure : array_like, default 101325
        Absolute pressure in Pa.

    Returns
    -------
    float or numpy.ndarray
        Volume flow in m³/s of air at ``t_air``.

    Raises
    ------
    InputError
        A negative heat, a rise that is not positive, a temperature (``t_air`` or
        ``t_air + rise``) outside air's range.

    Notes
    -----
    V = Q / (rho cp dT), common practice (the steady-flow energy balance of the air stream),
    rho of air at ``t_air`` (where the flow is measured: the intake), cp of air at the mean
    temperature t_air + dT/2.  A network's ``airflow`` branch of this volume flow, with no other
    path for the heat, holds the inside air exactly ``rise`` above the intake.  A fan's rated
    flow falls with the pressure drop of the filters and grilles it works against: compare
    with the fan maker's curve at the system's pressure drop.

    References
    ----------
    Steady-flow energy equation for an air stream, Q = m cp (T_out - T_in) (common practice,
    e.g. Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eq. 1.11e, from memory).

    Examples
    --------
    >>> round(airflow_for(200.0, 10.0, 25.0) * 3600, 1)    # m³/h
    60.4
    """
    function = "airflow_for"
    heat = require_nonnegative(function, "heat", heat, "W")
    rise = require_positive(function, "rise", rise, "K")
    t_air = require_gas_temperature(function, "t_air", t_air)
    high = GASES["air"].t_range.high
    beyond = t_air + rise > high   # the exhaust must lie in air's range too
    if np.any(beyond):
        bad = np.broadcast_to(rise, beyond.shape)[beyond].flat[0] if beyond.ndim else float(rise)
        raise InputError(function, "rise", bad, f"such that t_air + rise <= {high:g} °C (air's range)")
    density = gas_properties("air", t_air, pressure, function_name=function).density
    cp = gas_properties("air", t_air + 0.5 * rise, pressure, function_name=function).cp
    return unwrap(heat / (density * cp * rise))
