"""The correlation band of a network: how far its temperatures move between the published
correlations.

The network is solved twice more, once with every convection branch at the lowest Nu and once
at the highest Nu among the registry's correlations whose published ranges cover that branch
(:func:`stillair.nu_spread` decides which correlations cover it and which gives the lowest and
highest Nu).  The choice is made at the nominal solution, each branch then keeps its chosen
correlation while the network is solved, and the choice is checked again at that solution (a
branch whose lowest or highest correlation changed there is solved once more, at most three
passes).  A branch that no correlation covers keeps its own method in both solutions.

What the band is: the spread of the published correlations carried through the network, a
measure of how much the literature disagrees about this case.  What it is not: a statistical
confidence interval, nor a bound on the error of any correlation, nor the extreme of every
mixture of choices (a node whose temperature depends on the ratio of two convection branches,
such as a surface between an inner film and a cavity, can move outside the band when one branch
is at its lowest and the other at its highest).  The band of a node is the lower and the higher
of its two band temperatures.
"""

from __future__ import annotations

import dataclasses

import numpy as np

from ..correlations import GEOMETRIES, nu_spread
from .model import compile_network
from .solver import Solver
from .tables import Branch

__all__ = ["band_methods", "solve_band", "MAX_BAND_PASSES"]

MAX_BAND_PASSES = 3


def band_methods(net, records, side: int) -> dict[int, str]:
    """Branch position -> the covering correlation with the lowest (side 0) or highest (side -1)
    Nu at the solution given by ``records`` (a sequence of branch records, table order)."""
    chosen: dict[int, str] = {}
    for group in net.groups:
        if not group.needs_properties:
            continue
        inputs, cases = group.spread_inputs(records)
        for case in dict.fromkeys(cases):
            mask = np.array([c == case for c in cases])
            spread = nu_spread(group.geometry, inputs["ra"][mask], inputs["pr"][mask],
                               case=case if GEOMETRIES[group.geometry].cases else None,
                               **{k: v[mask] for k, v in inputs.items() if k not in ("ra", "pr")})
            for position, count, methods in zip(group.index[mask], np.atleast_1d(spread.count),
                                                np.atleast_1d(spread.methods)):
                if count > 0:
                    chosen[int(position)] = methods[side]
    return chosen


class _WarmSolver(Solver):
    """Starts from a known solution (the nominal one) instead of the nominal conductances."""

    def __init__(self, net, start):
        super().__init__(net)
        self._start = start

    def start(self):
        return self._start


def solve_band(branches: tuple[Branch, ...], boundaries, options: dict, nominal):
    """(low solution, high solution) as NetworkResults, ``nominal`` the network's own."""
    solutions = []
    nominal_records = list(nominal.branches.values())
    nominal_net = compile_network(branches, boundaries, **options)
    free_nodes = [nominal_net.nodes[i] for i in nominal_net.free]
    start = np.array([nominal.temperatures[node] for node in free_nodes])
    for side in (0, -1):
        methods = band_methods(nominal_net, nominal_records, side)
        result = None
        for _ in range(MAX_BAND_PASSES):
            chosen = tuple(dataclasses.replace(b, method=methods.get(k, b.method)) for k, b in enumerate(branches))
            net = compile_network(chosen, boundaries, **options)
            solver = _WarmSolver(net, start)
            result = solver.result(*solver.solve(), strict=False)
            again = band_methods(net, list(result.branches.values()), side)
            if again == methods:
                break
            methods = again
        solutions.append(result)
    return tuple(solutions)
