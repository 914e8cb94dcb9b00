"""The network compiled for evaluation: branch groups, and every branch's heat flow at given
node temperatures.

Temperatures are carried as two arrays, a value and a small remainder (``t + t_fine``), so that
the difference across a branch keeps its digits even when it is far below the resolution of
the temperature itself: across a 1e-9 K/W resistance in series with 1e6 K/W the difference is
1e-14 K, less than one unit in the last place of 20 °C.  Every branch's flow is formed from
that exact difference.

The convection groups share one gas-property look-up per gas and evaluation (the film
temperatures of all their branches, with the finite-difference points, in one call).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import SimpleNamespace

import numpy as np
from scipy.constants import zero_Celsius

from ..gases import gas_properties
from ..validity import InputError
from .errors import FUNCTION, NetworkError
from .kinds import BRANCH_KINDS
from .tables import Boundary, Branch, check_topology

__all__ = ["Network", "Evaluation", "compile_network"]


@dataclass
class Evaluation:
    q: np.ndarray                  # W per branch
    d_source: np.ndarray | None    # dq/dT_from
    d_target: np.ndarray | None    # dq/dT_to
    delta_t: np.ndarray            # T_from - T_to, exact
    details: list                  # per group: what its records need (None for most kinds)


@dataclass
class Network:
    branches: tuple[Branch, ...]
    nodes: tuple[str, ...]
    source: np.ndarray
    target: np.ndarray
    free: np.ndarray               # indices of solved nodes
    fixed: np.ndarray              # indices of fixed nodes
    fixed_t: np.ndarray
    heat_input: np.ndarray         # W at every node
    groups: list
    gas: str
    pressure: float
    property_temperature: float | None
    ideal_expansion: bool
    property_evaluations: int = 0
    convection_gases: dict = field(default_factory=dict)   # gas -> its convection groups

    @property
    def has_correlations(self) -> bool:
        return bool(self.convection_gases)

    def evaluate(self, t: np.ndarray, t_fine: np.ndarray, derivatives: bool) -> Evaluation:
        """Heat flows of every branch at node temperatures ``t + t_fine`` (°C)."""
        nb = len(self.branches)
        q = np.empty(nb)
        d1 = np.empty(nb) if derivatives else None
        d2 = np.empty(nb) if derivatives else None
        t1, t2 = t[self.source], t[self.target]
        dt = (t1 - t2) + (t_fine[self.source] - t_fine[self.target])
        details = [None] * len(self.groups)
        for position, group in enumerate(self.groups):
            if group.needs_properties:
                continue
            i = group.index
            q[i], a, b = group.flows(t1[i], t2[i], dt[i], derivatives)
            if derivatives:
                d1[i], d2[i] = a, b
        for gas, members in self.convection_gases.items():
            points = [(position, group, group.points(t1[group.index], t2[group.index], dt[group.index],
                                                     derivatives)) for position, group in members]
            ta = np.concatenate([p[2][0] for p in points])
            tb = np.concatenate([p[2][1] for p in points])
            film = self._film(gas, ta, tb)
            start = 0
            for position, group, (pa, _, pdt, step) in points:
                stop = start + len(pa)
                part = SimpleNamespace(**{k: v[start:stop] for k, v in vars(film).items()})
                i = group.index
                q[i], a, b, details[position] = group.finish(pdt, part, step)
                if derivatives:
                    d1[i], d2[i] = a, b
                start = stop
        return Evaluation(q, d1, d2, dt, details)

    def _film(self, gas, ta, tb) -> SimpleNamespace:
        """Properties at the film temperatures (or at the one property temperature)."""
        self.property_evaluations += len(ta)
        if self.property_temperature is None:
            t_film = 0.5 * (ta + tb)
        else:
            t_film = np.full(len(ta), self.property_temperature)
        props = gas_properties(gas, t_film, self.pressure, function_name=FUNCTION)
        expansion = 1.0 / (t_film + zero_Celsius) if self.ideal_expansion else props.expansion
        return SimpleNamespace(kinvisc=np.asarray(props.kinvisc), prandtl=np.asarray(props.prandtl),
                               conductivity=np.asarray(props.conductivity),
                               expansion=np.asarray(expansion), t_film=t_film)

    def imbalance(self, q: np.ndarray) -> np.ndarray:
        """Energy imbalance (W) at every node: heat input + inflow - outflow."""
        n = len(self.nodes)
        return (self.heat_input + np.bincount(self.target, q, minlength=n)
                - np.bincount(self.source, q, minlength=n))

    def throughput(self, q: np.ndarray) -> np.ndarray:
        """Heat passing through every node (W): half the sum of its branches' |q| plus |Q|."""
        n = len(self.nodes)
        magnitude = np.abs(q)
        return (0.5 * (np.bincount(self.target, magnitude, minlength=n)
                       + np.bincount(self.source, magnitude, minlength=n)) + np.abs(self.heat_input))


def compile_network(branches: tuple[Branch, ...], boundaries: tuple[Boundary, ...], gas: str,
                    pressure: float, property_temperature, ideal_expansion: bool) -> Network:
    topology = check_topology(branches, boundaries)
    grouped: dict[tuple, list[int]] = {}
    for position, b in enumerate(branches):
        grouped.setdefault(BRANCH_KINDS[b.kind].group_key(b, gas), []).append(position)
    groups, convection = [], {}
    for key, members in grouped.items():
        kind = BRANCH_KINDS[key[0]]
        context = {"method": key[2], "gas": key[3]} if kind.has_correlation else {}
        group = kind.group(np.array(members), [branches[m].params for m in members], context)
        if group.needs_properties:
            convection.setdefault(group.gas, []).append((len(groups), group))
        groups.append(group)
    _check_gases(convection, branches, gas, pressure)
    return Network(branches=branches, nodes=topology.nodes, source=topology.source, target=topology.target,
                   free=topology.free, fixed=topology.fixed, fixed_t=topology.fixed_t,
                   heat_input=topology.heat_input, groups=groups, gas=gas, pressure=pressure,
                   property_temperature=property_temperature, ideal_expansion=ideal_expansion,
                   convection_gases=convection)


def _check_gases(convection, branches, gas, pressure):
    """Unknown gases are reported by the cell that names them, before any iteration."""
    if not convection:
        return
    try:
        gas_properties(gas, 10.0, pressure)
    except InputError as error:
        raise InputError(FUNCTION, "gas" if error.argument == "gas" else error.argument,
                         error.value, error.allowed) from None
    for branch_gas, members in convection.items():
        if branch_gas == gas:
            continue
        try:
            gas_properties(branch_gas, 10.0, pressure)
        except InputError as error:
            first = branches[int(members[0][1].index[0])]
            raise NetworkError(FUNCTION, f"{first.where}, column p5 (gas)", branch_gas,
                               error.allowed) from None
