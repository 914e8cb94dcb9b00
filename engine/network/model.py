"""The network compiled for evaluation: branch groups, and every branch's heat flow at given
node temperatures.

Temperatures are carried as two arrays, a value and a small remainder (``t + t_fine``), so that
the difference across a branch keeps its digits even when it is far below the resolution of
the temperature itself: across a 1e-9 K/W resistance in series with 1e6 K/W the difference is
1e-14 K, less than one unit in the last place of 20 °C.  Every branch's flow is formed from
that exact difference.

The convection groups share one gas-property look-up per gas and evaluation (the film
temperatures of all their branches, with the finite-difference points, in one call).  The
correlations are called without their range notes while the solver iterates; the records ask
for them once, at the solution.
"""

from __future__ import annotations

from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np
from ..constants import ZERO_CELSIUS as zero_Celsius

from ..gases import gas_properties
from ..groups import STANDARD_GRAVITY
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
    details: list                  # per convection batch: what the records need
    tolerance: np.ndarray | None = None   # W per free node, set by the solver


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
    groups: list                   # every group, for the start and the records
    plain_groups: list             # groups without a correlation
    batches: list                  # convection groups, one _ConvectionBatch per gas
    gas: str
    pressure: float
    property_temperature: float | None
    ideal_expansion: bool
    property_evaluations: int = 0

    @property
    def has_correlations(self) -> bool:
        return bool(self.batches)

    def evaluate(self, t: np.ndarray, t_fine: np.ndarray) -> Evaluation:
        """Heat flows of every branch and their derivatives at node temperatures ``t + t_fine`` (°C)."""
        nb = len(self.branches)
        q, d1, d2 = np.empty(nb), np.empty(nb), np.empty(nb)
        t1, t2 = t[self.source], t[self.target]
        dt = (t1 - t2) + (t_fine[self.source] - t_fine[self.target])
        for group in self.plain_groups:
            i = group.index
            q[i], d1[i], d2[i] = group.flows(t1[i], t2[i], dt[i])
        details = []
        for batch in self.batches:
            i = batch.index
            q[i], d1[i], d2[i], detail = batch.flows(self, t1[i], t2[i], dt[i])
            details.append(detail)
        return Evaluation(q, d1, d2, dt, details)

    def flows(self, t: np.ndarray) -> np.ndarray:
        """Heat flows of every branch (W) at node temperatures ``t`` (°C), without derivatives:
        what an integrator's right-hand side needs (the convection branches at their point only)."""
        q = np.empty(len(self.branches))
        t1, t2 = t[self.source], t[self.target]
        dt = t1 - t2
        for group in self.plain_groups:
            i = group.index
            q[i] = group.flows(t1[i], t2[i], dt[i])[0]
        for batch in self.batches:
            i = batch.index
            q[i] = batch.point_flows(self, t1[i], t2[i], dt[i])
        return q

    def film(self, gas, ta, tb) -> tuple:
        """(kinematic viscosity, Pr, conductivity, expansion, film temperature) at the film
        temperatures of the points (or at the one property temperature)."""
        self.property_evaluations += len(ta)
        if self.property_temperature is None:
            t_film = 0.5 * (ta + tb)
        else:
            t_film = np.full(len(ta), self.property_temperature)
        props = gas_properties(gas, t_film, self.pressure, function_name=FUNCTION)
        expansion = 1.0 / (t_film + zero_Celsius) if self.ideal_expansion else props.expansion
        return props.kinvisc, props.prandtl, props.conductivity, expansion, t_film

    def imbalance(self, q: np.ndarray) -> np.ndarray:
        """Energy imbalance (W) at every node: heat input + inflow - outflow."""
        n = len(self.nodes)
        return (self.heat_input + np.bincount(self.target, q, minlength=n)
                - np.bincount(self.source, q, minlength=n))

    def throughput(self, q: np.ndarray) -> np.ndarray:
        """Heat passing through every node (W): what flows in, which at balance is what flows
        out, half of the sum of its branches' |q| and its |Q|."""
        n = len(self.nodes)
        magnitude = np.abs(q)
        return 0.5 * (np.bincount(self.target, magnitude, minlength=n)
                      + np.bincount(self.source, magnitude, minlength=n) + np.abs(self.heat_input))


def compile_network(branches: tuple[Branch, ...], boundaries: tuple[Boundary, ...], gas: str,
                    pressure: float, property_temperature, ideal_expansion: bool) -> Network:
    topology = check_topology(branches, boundaries)
    grouped: dict[tuple, list[int]] = {}
    for position, b in enumerate(branches):
        grouped.setdefault(BRANCH_KINDS[b.kind].group_key(b, gas), []).append(position)
    groups: list = []
    convection: dict = {}
    for key, members in grouped.items():
        kind = BRANCH_KINDS[key[0]]
        context = ({"method": key[2], "gas": key[3]} if kind.has_correlation
                   else {"gas": gas, "pressure": pressure})   # vents and airflows read the gas
        group = kind.group(np.array(members), [branches[m].params for m in members], context)
        if group.needs_properties:
            convection.setdefault(group.gas, []).append(group)
        groups.append(group)
    _check_gases(convection, branches, gas, pressure,
                 reads_gas=any(getattr(g, "reads_gas", False) for g in groups))
    return Network(branches=branches, nodes=topology.nodes, source=topology.source, target=topology.target,
                   free=topology.free, fixed=topology.fixed, fixed_t=topology.fixed_t,
                   heat_input=topology.heat_input, groups=groups,
                   plain_groups=[g for g in groups if not g.needs_properties],
                   batches=[_ConvectionBatch(g, members) for g, members in convection.items()],
                   gas=gas, pressure=pressure, property_temperature=property_temperature,
                   ideal_expansion=ideal_expansion)


class _ConvectionBatch:
    """The convection groups of one gas, evaluated together: every branch at its point and at
    the two forward-difference points (each end raised by a small step) in one property look-up,
    one Ra formula and one correlation call per group.

    Points are laid out group by group, each group's block holding its branches at the point,
    then with the from end raised, then with the to end raised."""

    def __init__(self, gas: str, groups: list):
        self.gas = gas
        self.groups = groups
        self.index = np.concatenate([g.index for g in groups])
        n = len(self.index)
        order, slices, offset, start = [], [], 0, 0
        for g in groups:
            size = len(g.index)
            local = np.arange(start, start + size)
            order.extend([local, local + n, local + 2 * n])
            slices.append(slice(offset, offset + 3 * size))
            g.tiled(3)
            offset += 3 * size
            start += size
        self.order = np.concatenate(order)          # layout position -> position in [a; a+s; a]
        self.slices = slices
        where = np.empty(3 * n, dtype=int)
        where[self.order] = np.arange(3 * n)
        self.at_point, self.from_raised, self.to_raised = where[:n], where[n:2 * n], where[2 * n:]
        self.length = np.concatenate([g.length_tiled for g in groups])
        self.length_cubed = self.length ** 3   # constant: not recomputed at every evaluation
        self.area = np.concatenate([g.area_tiled for g in groups])
        # the branches alone (no difference points), group after group: point_flows
        self.parts = [slice(s, s + len(g.index)) for s, g in zip(np.cumsum([0] + [len(g.index) for g in groups]), groups)]
        self.point_length = np.concatenate([g.length for g in groups])
        self.point_length_cubed = self.point_length ** 3
        self.point_area = np.concatenate([g.area for g in groups])

    def point_flows(self, net: Network, t1, t2, dt):
        """The flows at the point alone (no derivatives), the branches in ``index`` order."""
        kinvisc, prandtl, conductivity, expansion, _ = net.film(self.gas, t1, t2)
        ra = STANDARD_GRAVITY * expansion * np.abs(dt) * self.point_length_cubed * prandtl / kinvisc ** 2
        nu = np.empty(len(dt))
        for group, part in zip(self.groups, self.parts):
            nu[part] = group.nusselt(ra[part], prandtl[part], dt[part], tiled=False)[0].nu
        return nu * conductivity / self.point_length * self.point_area * dt

    def flows(self, net: Network, t1, t2, dt):
        # a step large enough that a branch at zero difference shows its small-difference
        # conductance, small enough (1e-6 relative) for Newton to converge in a step or two
        step = 1e-4 + 1e-6 * np.abs(dt)
        order = self.order
        ta = np.concatenate([t1, t1 + step, t1])[order]
        tb = np.concatenate([t2, t2, t2 + step])[order]
        dtt = np.concatenate([dt, dt + step, dt - step])[order]
        kinvisc, prandtl, conductivity, expansion, t_film = net.film(self.gas, ta, tb)
        ra = STANDARD_GRAVITY * expansion * np.abs(dtt) * self.length_cubed * prandtl / kinvisc ** 2
        nu = np.empty(len(dtt))
        results = []
        for group, part in zip(self.groups, self.slices):
            result = group.nusselt(ra[part], prandtl[part], dtt[part])
            nu[part] = result[0].nu
            results.append(result)
        h = nu * conductivity / self.length
        for group, part in zip(self.groups, self.slices):
            if group.wind is not None:   # mixed convection: the wind's forced part combined in
                h[part] = group.with_wind(h[part], kinvisc[part], prandtl[part], conductivity[part])[0]
        heat = h * self.area * dtt
        q = heat[self.at_point]
        detail = _BatchDetail(self, results, h, ra, prandtl, t_film, dtt, kinvisc, conductivity)
        return q, (heat[self.from_raised] - q) / step, (heat[self.to_raised] - q) / step, detail


@dataclass
class _BatchDetail:
    """A batch's correlation results at one evaluation, read only for the records."""

    batch: _ConvectionBatch
    results: list                  # per group: (NusseltResult, Nu and method only, case, flagged) at the tiled points
    h: np.ndarray
    ra: np.ndarray
    pr: np.ndarray
    t_film: np.ndarray
    dt: np.ndarray
    kinvisc: np.ndarray
    conductivity: np.ndarray

    def for_group(self, k: int) -> SimpleNamespace:
        """Group k's values at the point (the first third of its block), with the notes: the
        iterations go without them (formatting them cost a fifth of an evaluation), so the
        correlation is called again here, at the branches only, to word them."""
        part = self.batch.slices[k]
        n = (part.stop - part.start) // 3
        at = slice(part.start, part.start + n)
        iterated, case, flagged = self.results[k]
        group = self.batch.groups[k]
        result = group.nusselt(self.ra[at], self.pr[at], self.dt[at], tiled=False, notes=True)[0]
        _, forced, re = group.with_wind(self.h[at], self.kinvisc[at], self.pr[at], self.conductivity[at],
                                        tiled=False, notes=True)
        return SimpleNamespace(h=self.h[at], nu=iterated.nu[:n], ra=self.ra[at], pr=self.pr[at],
                               forced=forced, re=re, conductivity=self.conductivity[at],
                               t_film=self.t_film[at], method=result.method[:n],
                               case=None if case is None else case[:n], note=result.note[:n],
                               in_range=result.in_range[:n], flagged=None if flagged is None else flagged[:n])


def _check_gases(convection, branches, gas, pressure, reads_gas=False):
    """Unknown gases are reported by the cell that names them, before any iteration."""
    if not convection and not reads_gas:
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
            first = branches[int(members[0].index[0])]
            raise NetworkError(FUNCTION, f"{first.where}, column p5 (gas)", branch_gas,
                               error.allowed) from None
