"""The network turned round: the heat input at a node that brings a node to a temperature.

"How many watts may go into the cabinet for a 55 °C limit?", "how much cooling does it need?",
"how much heater power keeps its walls above the dew point?" are one question: the heat input Q
at a node ``node`` at which the temperature of a node ``at`` (by default ``node`` itself) equals
a target.  Every node temperature rises with every heat input of a network whose branches carry
more heat the larger their temperature difference (all the kinds here), so T_at(Q) increases
strictly when ``at`` is reached from ``node`` without passing a fixed node, and the root is
unique.

The root is found by scipy's ``brentq`` around the full solver (film properties, correlations
and radiation re-evaluated at every solve, each solve warm-started from the previous
solution), after a bracket from Newton steps on T_at(Q) whose slope dT_at/dQ is read from the
solver's Jacobian at each solution.  The answer is accepted only when the network solved with
it (an ordinary converged solve) puts ``at`` within :data:`TEMPERATURE_TOLERANCE` of the
target; nothing unconverged is ever returned.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from ..groups import DEFAULT_PRESSURE
from ..validity import ABSOLUTE_ZERO_C, InputError, StillairError, format_value
from .band import _WarmSolver
from .errors import NetworkConvergenceError, NetworkError
from .model import compile_network
from .reading import gas_key, name, option_number
from .results import NetworkResult
from .solver import Solver
from .tables import Boundary, _near, parse_boundaries, parse_branches

__all__ = ["HeatForTemperature", "heat_for_temperature", "TEMPERATURE_TOLERANCE", "ACCEPTANCE", "MAX_SOLVES"]

FUNCTION = "heat_for_temperature"
#: K: how close the node must come to the target (the solves themselves close the energy
#: balances to 1e-9 of the heat through each node, far tighter).
TEMPERATURE_TOLERANCE = 1e-8
#: K: the final, ordinary solve at the answer (from the solver's own start, as
#: solve_network does) must put the node this close to the target, or nothing is returned.  The
#: solver closes each balance to 1e-9 of the heat through the node, which leaves a node 1e-9 of
#: the temperature differences around it from the exact solution: 1e-7 K across 100 K, 1e-6 K
#: across the 1000 K the air tables span.
ACCEPTANCE = 1e-6
#: Network solves allowed for one answer (bracket and root together).
MAX_SOLVES = 120


@dataclass(frozen=True)
class HeatForTemperature:
    """The heat input that brings a node to a temperature, with the network solved at it.

    ``heat`` (W) is the total heat input at ``node`` (it replaces that node's Q rows; negative
    is cooling); ``solution`` is the network solved with it, whose ``temperatures[at]`` is the
    target; ``notes`` are that solution's range notes; ``solves`` counts the network solves."""

    heat: float
    node: str
    at: str
    temperature: float
    solution: NetworkResult
    solves: int

    @property
    def notes(self) -> tuple[str, ...]:
        return self.solution.notes

    def boundaries(self) -> list[list]:
        """The boundary rows with the node's Q rows replaced by one row of ``heat``: solving
        them with :func:`~stillair.solve_network` gives ``solution`` again."""
        return _rows_with_heat(self._given_boundaries, self.node, self.heat)

    _given_boundaries: tuple = dataclasses.field(default=(), repr=False, compare=False)


def heat_for_temperature(branches: Sequence[Sequence[object]], boundaries: Sequence[Sequence[object]],
                         node: str, temperature: float, gas: str = "air", pressure: float = DEFAULT_PRESSURE,
                         *, at: str | None = None, property_temperature: float | None = None,
                         ideal_expansion: bool = False) -> HeatForTemperature:
    """The heat input at a node at which a node of the network reaches a temperature.

    The network (the same two tables as :func:`~stillair.solve_network`) is solved again for
    every trial heat input, with film properties, correlations and radiation re-evaluated, and
    the heat is found by a bracketing root-finder.  Answers "the allowed dissipation for a
    temperature limit" and, with its sign, the cooling (negative) or heating power a node needs.

    Parameters
    ----------
    branches : sequence of rows
        The branch table, as for :func:`~stillair.solve_network`.
    boundaries : sequence of rows
        The boundary table.  The Q rows at ``node`` (if any) are replaced by the answer; the
        node must not have a fixed temperature.
    node : str
        The node whose heat input is sought (W, a free node of the network).
    temperature : float
        The target temperature in °C of ``at``.
    gas : str, default "air"
        Gas of every convection branch, as for :func:`~stillair.solve_network`.
    pressure : float, default 101325
        Absolute pressure in Pa.
    at : str, optional
        The node that must reach ``temperature``; by default ``node`` itself (a heater in the
        air of a cabinet that must keep a wall above the dew point: ``node="air_in"``,
        ``at="side_in"``).  It must be a free node whose temperature depends on the heat at
        ``node`` (joined to it by branches without passing a fixed node).
    property_temperature : float, optional
        As for :func:`~stillair.solve_network`.
    ideal_expansion : bool, default False
        As for :func:`~stillair.solve_network`.

    Returns
    -------
    HeatForTemperature
        ``heat`` in W (the total heat input at ``node``; negative: heat must be removed),
        ``solution`` (the :class:`~stillair.NetworkResult` at that heat, its range notes in
        ``notes``) and ``solves`` (network solves used).

    Raises
    ------
    InputError
        A node that is not in the network ("did you mean"), a node with a fixed temperature, a
        target node that the heat cannot move, a target not above absolute zero;
        :class:`~stillair.NetworkError` for the tables as :func:`~stillair.solve_network`.
    NetworkConvergenceError
        When no heat input brings the node to the target within the temperatures the network
        can be solved at (the message gives the range reached), or the search does not close.

    Notes
    -----
    T_at(Q) increases strictly with Q (every branch carries more heat the larger its
    temperature difference), so the root is unique.  Newton steps on T_at(Q), with the slope
    dT_at/dQ = (J^-1)[at, node] from the solver's Jacobian J at each solution, give a bracket;
    ``scipy.optimize.brentq`` (Brent 1973) closes it to a heat whose solution is within 1e-8 K
    of the target; the answer stands only if a final ordinary solve (from the solver's own
    start) puts the node within 1e-6 K of it (the solver's own resolution: each balance closed
    to 1e-9 of the heat through the node).

    References
    ----------
    Brent, R.P., Algorithms for Minimization without Derivatives, Prentice-Hall (1973), ch. 4
    (the method of ``scipy.optimize.brentq``).

    Examples
    --------
    >>> branches = [["wall", "box", "room", "resistance", 0.5]]
    >>> answer = heat_for_temperature(branches, [["room", "T", 20.0]], "box", 45.0)
    >>> round(answer.heat, 9)                     # (45 - 20) K / 0.5 K/W
    50.0
    """
    parsed_branches = parse_branches(branches)
    given = parse_boundaries(boundaries)
    if not isinstance(gas, str) or not gas.strip():
        raise InputError(FUNCTION, "gas", gas, "a gas name")
    pressure = option_number(FUNCTION, "pressure", pressure, "Pa", positive=True)
    if property_temperature is not None:
        property_temperature = option_number(FUNCTION, "property_temperature", property_temperature, "°C")
    target = option_number(FUNCTION, "temperature", temperature, "°C")
    if not target > ABSOLUTE_ZERO_C:
        raise InputError(FUNCTION, "temperature", target, "above -273.15 °C")
    nodes = list(dict.fromkeys(n for b in parsed_branches for n in (b.source, b.target)))
    fixed = {b.node: b for b in given if b.kind == "T"}
    node = _free_node("node", node, nodes, fixed)
    at = node if at is None or (isinstance(at, str) and not at.strip()) else _free_node("at", at, nodes, fixed)
    _require_reach(parsed_branches, node, at, fixed)

    # the node's own Q rows are replaced by one row whose value the search sets
    others = tuple(b for b in given if not (b.kind == "Q" and b.node == node))
    start_heat = float(sum(b.value for b in given if b.kind == "Q" and b.node == node))
    net = compile_network(parsed_branches, others + (Boundary(0, node, "Q", 0.0),), gas=gas_key(gas),
                          pressure=pressure, property_temperature=property_temperature,
                          ideal_expansion=bool(ideal_expansion))
    search = _Search(net, node, at, target)
    heat = search.find(start_heat)
    solution = search.final(heat)
    return HeatForTemperature(heat=heat, node=node, at=at, temperature=target, solution=solution,
                              solves=search.solves, _given_boundaries=tuple(
                                  (b.node, b.kind, b.value) for b in given))


class _Search:
    """T_at(Q) by warm-started solves of one compiled network whose heat input at the node is Q."""

    def __init__(self, net, node: str, at: str, target: float):
        self.net = net
        self.node_index = net.nodes.index(node)
        self.at_index = net.nodes.index(at)
        self.free_position = {int(i): k for k, i in enumerate(net.free)}
        self.node, self.at, self.target = node, at, target
        self.base_input = net.heat_input.copy()
        self.start = None            # free-node temperatures of the last solution: the warm start
        self.solves = 0
        self.reached: list[tuple[float, float]] = []   # (Q, T_at) of every solve that converged
        self.failure = ""            # why the last failed solve failed

    def solve(self, heat: float):
        """(T_at - target, dT_at/dQ, solver, state) at heat input ``heat``."""
        self.solves += 1
        self.net.heat_input = self.base_input.copy()
        self.net.heat_input[self.node_index] += heat
        solver = Solver(self.net) if self.start is None else _WarmSolver(self.net, self.start)
        state, x, x_fine, how = solver.solve()
        self.start = x + x_fine
        t_at = float(x[self.free_position[self.at_index]] + x_fine[self.free_position[self.at_index]])
        self.reached.append((heat, t_at))
        return t_at - self.target, self._slope(solver, state[0]), (solver, state, x, x_fine, how)

    def _slope(self, solver, evaluation) -> float:
        """dT_at/dQ_node at the solution: the balances r(x, Q) = 0 give J dx/dQ = -e_node, solved
        as the solver solves its Newton steps (rows scaled; sparse for large networks)."""
        matrix = solver.newton_matrix(evaluation)
        scale = solver.row_scale(matrix)
        unit = np.zeros(len(self.net.free))
        unit[self.free_position[self.node_index]] = 1.0
        response = solver.solve_scaled(matrix, scale, -unit * scale)
        return float(response[self.free_position[self.at_index]])

    def _safe(self, heat):
        """:meth:`solve`, or None where the network cannot be solved at ``heat``."""
        if self.solves >= MAX_SOLVES:
            raise self._unreachable(f"no answer after {self.solves} network solves")
        try:
            return self.solve(heat)
        except StillairError as error:  # no convergence, a temperature outside a gas's range
            self.failure = str(error)
            return None

    def _unreachable(self, why: str) -> NetworkConvergenceError:
        return NetworkConvergenceError(
            f"{FUNCTION}: no heat input at node {self.node!r} brings node {self.at!r} to "
            f"{format_value(self.target)} °C: {self._range()}; {why}", math.inf, self.at, self.solves)

    def find(self, heat: float) -> float:
        """The root, from ``heat``: Newton steps (lengthened a quarter, so that a curve bending
        away is overshot) until the error changes sign, then Brent's method in the bracket.  A
        step into heat inputs where the network cannot be solved is halved back towards the last
        solved one; when the two meet, the target lies beyond what the network can reach."""
        first = self._safe(heat)
        if first is None:
            raise NetworkConvergenceError(
                f"{FUNCTION}: the network could not be solved at the starting heat input {format_value(heat)} W "
                f"at node {self.node!r}: {self.failure}", math.inf, self.node, self.solves)
        error, slope, _ = first
        current, low, high, failed = heat, None, None, None
        while True:
            if abs(error) <= TEMPERATURE_TOLERANCE:
                return current
            if error < 0:
                low = current
            else:
                high = current
            if low is not None and high is not None:
                return self._bracketed(low, high)
            if not (slope > 0 and math.isfinite(slope)):
                raise InputError(FUNCTION, "at", self.at, f"a node whose temperature the heat input at "
                                 f"{self.node!r} changes (dT/dQ = {format_value(slope)} K/W there)")
            proposal = current - 1.25 * error / slope
            if failed is not None and (proposal - failed) * (failed - current) >= 0:
                if abs(failed - current) <= 1e-9 * (1.0 + abs(current)):
                    raise self._unreachable(f"beyond that the network cannot be solved ({self.failure})")
                proposal = 0.5 * (current + failed)
            trial = self._safe(proposal)
            if trial is None:
                failed = proposal
                continue
            current = proposal
            error, slope, _ = trial

    def _bracketed(self, low: float, high: float) -> float:
        from scipy import optimize  # here, not at import: scipy.optimize costs 0.4 s of start-up

        known: dict[float, float] = {}     # the two ends: read here, then again by brentq

        def error(heat):
            if heat in known:
                return known[heat]
            found = self._safe(heat)
            if found is None:
                raise self._unreachable(f"the network could not be solved at {format_value(heat)} W inside the "
                                        f"bracket ({self.failure})")
            return found[0]

        span = abs(high - low)
        ends = sorted((low, high))
        errors = [error(end) for end in ends]
        known.update(zip(ends, errors))
        if errors[0] * errors[1] > 0:
            # Within the solver's own tolerance of the target the error's sign is noise (a target
            # 6e-8 K from the no-heat temperature, found by the property sweep): the bracket's
            # better end is the answer, which final() still has to confirm within ACCEPTANCE.
            return float(ends[int(abs(errors[1]) < abs(errors[0]))])
        root = optimize.brentq(error, *ends, xtol=max(1e-12 * span, 1e-300), rtol=4 * np.finfo(float).eps,
                               maxiter=100)
        return float(root)

    def final(self, heat: float) -> NetworkResult:
        """The ordinary solve at the answer (from the nominal start, as solve_network does); the
        answer stands only if it puts the node on the target."""
        self.start = None
        _, _, (solver, state, x, x_fine, how) = self.solve(heat)
        result = solver.result(state, x, x_fine, how)
        reached = result.temperatures[self.at]
        if not abs(reached - self.target) <= ACCEPTANCE:
            raise NetworkConvergenceError(
                f"{FUNCTION}: the heat input {format_value(heat)} W puts node {self.at!r} at "
                f"{reached!r} °C, not {format_value(self.target)} °C: the search did not close",
                abs(reached - self.target), self.at, self.solves)
        return result

    def _range(self) -> str:
        heats = [q for q, _ in self.reached]
        temps = [t for _, t in self.reached]
        if not heats:
            return "no trial heat input could be solved"
        return (f"heat inputs from {format_value(min(heats))} to {format_value(max(heats))} W gave "
                f"{format_value(min(temps))} to {format_value(max(temps))} °C at {self.at!r}")


def _free_node(argument: str, value, nodes: list[str], fixed: dict) -> str:
    try:   # a whole number names a node as in the tables ("1" for 1.0)
        node = value.strip() if isinstance(value, str) else name(value, FUNCTION, argument)
    except NetworkError:
        node = ""
    if not node:
        raise InputError(FUNCTION, argument, value, "a node name")
    if node not in nodes:
        near = _near(node, nodes)
        raise InputError(FUNCTION, argument, node, "a node of the network" + (
            f" (did you mean {near!r}?)" if near else " (" + ", ".join(repr(n) for n in nodes[:8]) +
            (", ..." if len(nodes) > 8 else "") + ")"))
    if node in fixed:
        raise InputError(FUNCTION, argument, node,
                         f"a node whose temperature is solved (boundary row {fixed[node].row} fixes it at "
                         f"{format_value(fixed[node].value)} °C)")
    return node


def _require_reach(branches, node: str, at: str, fixed: dict) -> None:
    """``at`` must be joined to ``node`` through free nodes, or the heat cannot move it."""
    if at == node:
        return
    neighbours: dict[str, set] = {}
    for b in branches:
        neighbours.setdefault(b.source, set()).add(b.target)
        neighbours.setdefault(b.target, set()).add(b.source)
    seen, frontier = {node}, [node]
    while frontier:
        current = frontier.pop()
        for other in neighbours.get(current, ()):
            if other not in seen and other not in fixed:
                seen.add(other)
                frontier.append(other)
    if at not in seen:
        raise InputError(FUNCTION, "at", at, f"a node the heat input at {node!r} reaches through free nodes "
                         "(fixed temperatures lie between them, so the heat cannot change it)")


def _rows_with_heat(given: tuple, node: str, heat: float) -> list[list]:
    rows = [[n, kind, value] for n, kind, value in given if not (kind == "Q" and n == node)]
    rows.append([node, "Q", heat])
    return rows
