"""Branch kinds that carry air: outside air (at the ``to`` node) drawn through an inside air
node (``from``, taken as well mixed) and leaving at its temperature, q = m cp (T_from - T_to)
with cp at the mean of the two.  The mass flow is the kind's: the stack balance of two openings
(``vent``) or a fixed volume of outside air or a fan curve's operating point (``airflow``); the
physics is :mod:`stillair.ventilation`'s.  Flows and derivatives come from one property look-up
at the point and at the two forward-difference points, the step rule of the convection branches.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ..constants import ZERO_CELSIUS as zero_Celsius
from ..gases import gas_properties
from ..ventilation import DEFAULT_DISCHARGE_COEFFICIENT, fan_operating_flow, opening_losses, stack_mass_flow
from .errors import FUNCTION, NetworkError
from .kinds import BranchKind, Param, _Group
from .reading import blank

__all__ = ["AdvectionKind", "AirflowKind", "VENT", "AIRFLOW", "NOMINAL_RISE"]


@dataclass(frozen=True)
class AdvectionKind(BranchKind):
    """q = m cp (T_from - T_to) with the mass flow m (kg/s) of ``mass_flow(columns, rho_from,
    rho_to)``, signed (negative: a stack flow running downward); ``reversed_note`` is the
    note a branch whose flow runs downward carries."""

    # required (a default only because the fields of BranchKind have them)
    mass_flow: Callable[..., np.ndarray] = field(default=None, compare=False)  # type: ignore[assignment]
    method: str = ""
    reversed_note: str = ""

    def group(self, index, params, context):
        return _AdvectionGroup(self, index, params, context)


NOMINAL_RISE = 10.0              # K: the start's inside-to-outside difference where none is known
_NOMINAL_AIR = (1.2, 1005.0)     # air near 20 °C, kg/m³ and J/(kg·K) (start only)


class _AdvectionGroup(_Group):
    kind: AdvectionKind
    reads_gas = True   # the network's gas and pressure are checked before any iteration

    def __init__(self, kind, index, params, context):
        super().__init__(kind, index, params)
        self.gas, self.pressure = context["gas"], context["pressure"]
        self.columns = [self.column(k) for k in range(len(kind.params))]
        self.tiled_columns = [np.tile(c, 3) for c in self.columns]

    def column(self, k: int) -> np.ndarray:
        values = [p[k] for p in self.params]
        if any(isinstance(v, tuple) for v in values):   # fan curves: one object per branch
            column = np.empty(len(values), dtype=object)
            column[:] = values
            return column
        return np.array([np.nan if v is None else v for v in values], dtype=float)

    def nominal(self, t1, t2):
        """m cp with air near 20 °C, the inside lighter by the ideal-gas ratio (start only)."""
        rho, cp = _NOMINAL_AIR
        rise = np.maximum(np.abs(t1 - t2), NOMINAL_RISE)
        rho_inside = rho * (1.0 - rise / (0.5 * (t1 + t2) + rise + zero_Celsius))
        return np.abs(self.kind.mass_flow(self.columns, rho_inside, np.full(len(t1), rho))) * cp

    def state(self, t1, t2, columns):
        """(signed mass flow kg/s, cp at the mean temperature, density of the outside air)."""
        n = len(t1)
        props = gas_properties(self.gas, np.concatenate([t1, t2, 0.5 * (t1 + t2)]), self.pressure,
                               function_name=FUNCTION)
        density, cp = np.asarray(props.density), np.asarray(props.cp)
        rho_from, rho_to = density[:n], density[n:2 * n]
        return self.kind.mass_flow(columns, rho_from, rho_to), cp[2 * n:], rho_to

    def flows(self, t1, t2, dt):
        n = len(t1)
        step = 1e-4 + 1e-6 * np.abs(dt)
        ta, tb = np.concatenate([t1, t1 + step, t1]), np.concatenate([t2, t2, t2 + step])
        mass, cp, _ = self.state(ta, tb, self.tiled_columns)
        heat = np.abs(mass) * cp * np.concatenate([dt, dt + step, dt - step])
        q = heat[:n]
        return q, (heat[n:2 * n] - q) / step, (heat[2 * n:] - q) / step

    def records(self, t1, t2, dt, q, detail):
        mass, cp, rho_to = self.state(t1, t2, self.columns)
        for k in range(len(self.index)):
            conductance = abs(float(mass[k])) * float(cp[k])
            resistance = float(dt[k] / q[k]) if q[k] != 0 else (1.0 / conductance if conductance > 0 else math.inf)
            yield int(self.index[k]), dict(
                h=math.nan, R=resistance, area=math.nan, method=self.kind.method,
                mass_flow=abs(float(mass[k])), volume_flow=abs(float(mass[k])) / float(rho_to[k]),
                note=self.kind.reversed_note if mass[k] < 0 else "")


def _stack(columns, rho_from, rho_to):
    inlet, outlet, height, discharge, extra_loss = columns
    return stack_mass_flow(rho_from, rho_to, inlet, outlet, height, discharge, extra_loss)


_ADVECTION_ENDS = "from: the inside air; to: the outside air (drawn in at its temperature)"
VENT: AdvectionKind = AdvectionKind(
    "vent", (Param("inlet area", "m²", "the low opening's free area"),
             Param("outlet area", "m²", "the high opening's free area"),
             Param("height", "m", "between the openings' centres"),
             Param("discharge coefficient", check="fraction", optional=True,
                   default=DEFAULT_DISCHARGE_COEFFICIENT,
                   blank_means=f"{DEFAULT_DISCHARGE_COEFFICIENT:g}, a sharp-edged opening"),
             Param("extra loss coefficient", check="non-negative", optional=True, default=0.0,
                   meaning="grilles, filters, screens in the inlet, on the velocity through the inlet area",
                   blank_means="0")),
    flow="m cp (T1 - T2), the inside air well mixed, cp at (T1 + T2)/2; m from the stack balance "
         "(rho2 - rho1) g H = the orifice losses of both openings (stillair.stack_flow)",
    ends=_ADVECTION_ENDS, mass_flow=_stack, method="stack flow through two openings",
    reversed_note="the inside air is colder than the outside: the stack flow runs downward "
                  "(in at the high opening, out at the low one)")
def _forced(columns, rho_from, rho_to):
    flow = columns[0]
    if flow.dtype != object:
        return rho_to * flow
    # a fan curve: outside air drawn in through the low opening, inside air out at the high one
    inlet, outlet, discharge, extra_loss = columns[1:]
    coefficient = 0.5 * rho_to * rho_to * opening_losses(rho_to, rho_from, inlet, outlet, discharge, extra_loss)
    volume = np.empty(len(flow))
    for curve in dict.fromkeys(flow):
        mask = np.fromiter((f == curve for f in flow), dtype=bool, count=len(flow))
        volume[mask] = fan_operating_flow(curve, coefficient[mask])
    return rho_to * volume


@dataclass(frozen=True)
class AirflowKind(AdvectionKind):
    """A fixed volume flow in p1, or a fan curve in p1 with the openings it blows through in
    p2..p5 (required with a curve, blank with a number)."""

    def read_params(self, row_values, where: str) -> tuple:
        flow = self.params[0].read(row_values[0], where, "p1")
        if isinstance(flow, tuple):
            for position in (1, 2):
                if blank(row_values[position]):
                    raise NetworkError(FUNCTION, f"{where}, column p{position + 1} ({self.params[position].label})",
                                       None, "an area in m² (the openings the fan curve works against)")
            return super().read_params(row_values, where)
        for position in range(1, 5):
            if not blank(row_values[position]):
                raise NetworkError(FUNCTION, f"{where}, column p{position + 1}", row_values[position],
                                   f"blank for kind {self.name} with a fixed volume flow (p2..p5 are the "
                                   "openings a fan curve works against)")
        return (flow, None, None, None, None)

    def group_key(self, branch, gas: str) -> tuple:
        return (self.name, isinstance(branch.params[0], tuple))


AIRFLOW: AirflowKind = AirflowKind(
    "airflow", (Param("volume flow", "m³/s", "of outside air at the to node's temperature; or a fan curve "
                      '"V:dp, ..." in m³/s:Pa from shut-off (0:dp) to free delivery (V:0)', check="flow-or-curve"),
                Param("inlet area", "m²", "fan curve only: the low opening's free area", optional=True),
                Param("outlet area", "m²", "fan curve only: the high opening's free area", optional=True),
                Param("discharge coefficient", check="fraction", optional=True,
                      default=DEFAULT_DISCHARGE_COEFFICIENT, blank_means=f"{DEFAULT_DISCHARGE_COEFFICIENT:g}"),
                Param("extra loss coefficient", check="non-negative", optional=True, default=0.0,
                      meaning="fan curve only, on the velocity through the inlet area", blank_means="0")),
    flow="rho2 V cp (T1 - T2), cp at (T1 + T2)/2; with a fan curve V where the fan's pressure rise meets "
         "the orifice losses of the two openings (the stack's help neglected)", ends=_ADVECTION_ENDS,
    mass_flow=_forced, method="forced airflow")
