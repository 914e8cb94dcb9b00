"""The thermal network through time: node heat capacities and boundaries that follow a cycle.

A node with a heat capacity C (J/K) stores what its balance leaves over; a node without one is
quasi-steady (its balance closes at every instant, as in :func:`solve_network`):

    C_i dT_i/dt = Q_i(t) + sum of q_b into i - sum of q_b out of i     (node with a capacity)
    0           = Q_j(t) + sum of q_b into j - sum of q_b out of j     (quasi-steady node)

The quasi-steady nodes make this a differential-algebraic system of index 1.  They are
eliminated exactly, not given a small artificial capacity: at every evaluation their balances are
solved by the steady solver's Newton method (:meth:`.Solver.newton`, scaled residuals, the same
acceptance test) with the capacitive nodes held at the integrator's temperatures, and the
reduced system's Jacobian is the Schur complement ``J_cc - J_ca J_aa^-1 J_ac`` of the network's
analytic Jacobian (:meth:`.Solver.jacobian`: every branch's flow derivatives from the model).
The reduced system is integrated by ``scipy.integrate.solve_ivp`` with a stiff method (BDF by
default, or Radau) and that Jacobian.

A periodic start (``initial="periodic"``) repeats the cycle from its end state until the end
equals the start to ``PERIODIC_TOLERANCE``: a design day that has forgotten where it began.

Boundaries over time: a boundary row's value may name a series instead of giving a number.  A
series is rows ``series | time (s) | value`` (°C for a ``T`` row, W for a ``Q`` row), read by
linear interpolation between its points and held at its first and last values outside them.
The integrator's step never exceeds the shortest interval between the points of the series in
use, so no point of a series is stepped over.

Tolerances (stated, and tested for convergence in tests/test_transient.py): every step's local
error is held within ``atol`` (K) + ``rtol`` × |T| (T in °C).  The defaults, 1e-5 K and 1e-7,
keep a sealed cabinet's day within 2e-4 K of a solution 1,000 times tighter and close its energy
balance to better than 1e-6 of the heat exchanged; a film-cooled block follows its exact
exponential to 1e-6 of the initial difference.
"""

from __future__ import annotations

import bisect
import dataclasses
import math
from collections import OrderedDict
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np

from ..correlations import methods_for
from ..groups import DEFAULT_PRESSURE
from ..validity import ABSOLUTE_ZERO_C, InputError, StillairError, format_value
from .errors import NetworkConvergenceError, NetworkError, Shown
from .model import compile_network
from .reading import blank, error_text, gas_key, name, number
from .solver import Solver
from .tables import BOUNDARY_COLUMNS, Boundary, _is_header, _near, _rows, parse_boundaries, parse_branches

__all__ = ["TransientResult", "solve_transient", "CAPACITY_COLUMNS", "SERIES_COLUMNS",
           "DEFAULT_RTOL", "DEFAULT_ATOL", "TRANSIENT_METHODS"]

FUNCTION = "solve_transient"
CAPACITY_COLUMNS = ("node", "C")
SERIES_COLUMNS = ("series", "time", "value")
DEFAULT_RTOL = 1e-7     # of |T| in °C, per step
DEFAULT_ATOL = 1e-5     # K, per step
TRANSIENT_METHODS = ("BDF", "Radau")   # scipy's stiff integrators that take a Jacobian

_CACHE: "OrderedDict[tuple, TransientResult]" = OrderedDict()
_CACHE_SIZE = 32
PERIODIC_TOLERANCE = 1e-3   # K: a periodic start repeats the times until the end is the start
MAX_CYCLES = 30
# the right-hand side's evaluations a solve may take: a cabinet's day takes about 2,000; a
# pathological network (a huge conductance on a small capacity) would otherwise run for ever
MAX_EVALUATIONS = 100_000
MAX_EVALUATIONS_PER_TIME = 200


@dataclass(frozen=True)
class TransientResult:
    """The network through time.  Arrays are read-only and run over ``times``.

    ``temperatures[node]`` (°C) for every node, fixed ones included; ``heat[branch]`` (W,
    positive from ``from`` to ``to``); ``peak[node]`` and ``minimum[node]``: (°C, s) of the
    largest and smallest value at the output times (the earliest, where the value repeats);
    ``stored_energy`` (J): sum of C (T - T_start) over the nodes with a capacity;
    ``capacities`` (node -> J/K) and ``quasi_steady`` (the free nodes without one);
    ``notes``: every correlation used outside its validity range at some output time, with the
    first such time."""

    times: np.ndarray
    temperatures: Mapping[str, np.ndarray]
    heat: Mapping[str, np.ndarray]
    peak: Mapping[str, tuple[float, float]]
    minimum: Mapping[str, tuple[float, float]]
    stored_energy: np.ndarray
    capacities: Mapping[str, float]
    quasi_steady: tuple[str, ...]
    notes: tuple[str, ...]
    method: str
    rtol: float
    atol: float
    steps: int                 # integrator evaluations of the reduced system
    jacobians: int             # Jacobian evaluations asked for by the integrator
    cycles: int                # integrations over the times (more than 1 only for a periodic start)


# ----------------------------------------------------------------------------------------------
# Reading the extra tables


def _as_rows(table, table_name, columns, mapping_row):
    """Rows of a table given as rows, or as a mapping turned into rows by ``mapping_row``."""
    if isinstance(table, Mapping):
        rows = [list(row) for key, value in table.items() for row in mapping_row(key, value)]
        if not rows:
            raise NetworkError(FUNCTION, table_name, Shown("an empty mapping"), "at least one entry")
        return [(k, row) for k, row in enumerate(rows, start=1)]
    return _rows(table, table_name, columns)


def parse_capacities(table, nodes, fixed) -> dict[str, float]:
    """node -> C (J/K) from rows ``node | C`` or a mapping; a node appears once, is a node of the
    network and is not fixed; C >= 0 (0: quasi-steady, the same as leaving the node out)."""
    result: dict[str, float] = {}
    seen: dict[str, int] = {}
    for row_number, row in _as_rows(table, "capacities", CAPACITY_COLUMNS, lambda k, v: [[k, v]]):
        where = f"capacity row {row_number}"
        node = name(row[0], where, "node")
        where = f"capacity row {row_number} ({node})"
        if node not in nodes:
            near = _near(node, nodes)
            raise NetworkError(FUNCTION, f"{where}, column node", node,
                               "a node that some branch connects" + (f" (did you mean {near!r}?)" if near else ""))
        if node in fixed:
            raise NetworkError(FUNCTION, f"{where}, column node", node,
                               "a node whose temperature is solved (a boundary row fixes this one, so a "
                               "capacity there would have no effect)")
        if node in seen:
            raise NetworkError(FUNCTION, f"{where}, column node", node,
                               f"listed once (row {seen[node]} already gives its capacity)")
        seen[node] = row_number
        value = number(row[1], where, "C", "J/K")
        if not value >= 0:
            raise NetworkError(FUNCTION, f"{where}, column C", value, ">= 0 J/K (0 or no row: quasi-steady)")
        if value > 0:
            result[node] = value
    return result


def _series_rows(key, value):
    points = np.asarray(value, dtype=object)
    if points.ndim == 2 and points.shape[1] == 2:
        return [[key, t, v] for t, v in points.tolist()]
    raise NetworkError(FUNCTION, f"series {key!r}", value, "a sequence of (time, value) pairs")


def parse_series(table) -> dict[str, tuple[np.ndarray, np.ndarray]]:
    """name -> (times, values) from rows ``series | time | value`` or a mapping name -> pairs;
    each series' times strictly increasing in the order given."""
    if table is None:
        return {}
    points: dict[str, list] = {}
    last_row: dict[str, int] = {}
    for row_number, row in _as_rows(table, "series", SERIES_COLUMNS, _series_rows):
        where = f"series row {row_number}"
        label = name(row[0], where, "series")
        where = f"series row {row_number} ({label})"
        time = number(row[1], where, "time", "s")
        value = number(row[2], where, "value")
        if label in points and not time > points[label][-1][0]:
            raise NetworkError(FUNCTION, f"{where}, column time", time,
                               f"later than {points[label][-1][0]:g} s (row {last_row[label]}): the times of "
                               "a series increase down the table")
        points.setdefault(label, []).append((time, value))
        last_row[label] = row_number
    return {label: (np.array([p[0] for p in pts]), np.array([p[1] for p in pts]))
            for label, pts in points.items()}


def parse_times(times) -> np.ndarray:
    """The output times (s): at least two, finite, strictly increasing; trailing blanks skipped
    (a column of the sheet longer than the times it holds)."""
    if times is None or isinstance(times, (str, bytes, int, float)):
        raise InputError(FUNCTION, "times", times, "a list of at least two times in s")
    flat = list(np.asarray(times, dtype=object).ravel())
    while flat and blank(flat[-1]):
        flat.pop()
    checked: list[float] = []
    for k, value in enumerate(flat, start=1):
        if blank(value):
            raise NetworkError(FUNCTION, f"times, entry {k}", None, "a time in s (blanks only after the last time)")
        try:
            time = float(value) if not isinstance(value, (str, bool, np.bool_)) else math.nan
        except (TypeError, ValueError):
            time = math.nan
        if not math.isfinite(time):
            shown = error_text(value) or (repr(value) if isinstance(value, str) else str(value))
            raise NetworkError(FUNCTION, f"times, entry {k}", Shown(shown), "a finite time in s")
        checked.append(time)
    if len(checked) < 2:
        raise NetworkError(FUNCTION, "times", Shown(f"{len(checked)} value(s)"), "at least two times in s")
    values = np.array(checked)
    steps = np.diff(values)
    if np.any(steps <= 0):
        k = int(np.flatnonzero(steps <= 0)[0]) + 2
        raise NetworkError(FUNCTION, f"times, entry {k}", float(values[k - 1]),
                           f"later than the entry before it ({values[k - 2]:g} s): times increase")
    return values


def _timed_boundaries(boundaries, series):
    """The boundary rows with every series name replaced by a number (the parser checks the
    rest), and row number -> series name."""
    if boundaries is None or isinstance(boundaries, (str, bytes)):
        return boundaries, {}
    rows, named = [], {}
    for row_number, row in enumerate(boundaries, start=1):
        row = list(row.tolist() if isinstance(row, np.ndarray) else row) \
            if not isinstance(row, (str, bytes)) and hasattr(row, "__iter__") else row
        if (isinstance(row, list) and len(row) >= 3 and isinstance(row[2], str) and not blank(row[2])
                and not _is_header(row, BOUNDARY_COLUMNS)):
            label = row[2].strip()
            if label in series:
                named[row_number] = label
                row = row[:2] + [float(series[label][1][0])] + row[3:]
            elif not _looks_like_number(label) and error_text(label) is None:   # the parser words those
                near = _near(label, series)
                node = row[0] if isinstance(row[0], str) else str(row[0])
                raise NetworkError(FUNCTION, f"boundary row {row_number} ({node.strip()}), column value", label,
                                   "a number or the name of a series in the series table"
                                   + (f" (did you mean {near!r}?)" if near else
                                      "" if series else " (no series table was given)"))
        rows.append(row)
    return rows, named


def _looks_like_number(text: str) -> bool:
    try:
        float(text)
    except ValueError:
        return False
    return True


# ----------------------------------------------------------------------------------------------
# Boundaries at a time


class _Schedule:
    """Sets the network's fixed temperatures and heat inputs at a time from the series."""

    def __init__(self, net, parsed_boundaries, named, series):
        index = {node: i for i, node in enumerate(net.nodes)}
        fixed_position = {int(i): k for k, i in enumerate(net.fixed)}
        self.net = net
        self.base_t = net.fixed_t.copy()
        self.base_q = net.heat_input.copy()
        self.t_series, self.q_series = [], []     # (position, times, values)
        for bound in parsed_boundaries:
            label = named.get(bound.row)
            if label is None:
                continue
            times, values = series[label]
            i = index[bound.node]
            if bound.kind == "T":
                low = float(values.min())
                if not low > ABSOLUTE_ZERO_C:
                    raise NetworkError(FUNCTION, f"boundary row {bound.row} ({bound.node}), column value",
                                       label, f"a series of temperatures above -273.15 °C (it reaches {low:g})")
                self.t_series.append((fixed_position[i], times, values))
            else:
                self.base_q[i] -= bound.value     # the parser added the series' first value
                self.q_series.append((i, times, values))
        used = self.t_series + self.q_series
        spacings = [np.diff(times) for _, times, _ in used if times.size > 1]
        self.shortest = float(min(s.min() for s in spacings)) if spacings else math.inf
        # every series on the union of their points: linear between neighbours there is each
        # series' own interpolation (held outside), so one look-up serves them all at a time
        grid = np.unique(np.concatenate([times for _, times, _ in used])) if used else np.zeros(1)
        table = np.array([np.interp(grid, times, values) for _, times, values in used]).reshape(len(used), grid.size)
        self.grid = grid.tolist()
        self.rows = table.T.copy()                                     # the series at each grid point
        self.slopes = np.diff(self.rows, axis=0) / np.diff(grid)[:, None] if grid.size > 1 else self.rows[:0]
        self.t_positions = np.array([k for k, _, _ in self.t_series], dtype=int)
        self.q_nodes = np.array([i for i, _, _ in self.q_series], dtype=int)
        self.q_nodes_unique = len(set(self.q_nodes.tolist())) == self.q_nodes.size
        self.n_t = len(self.t_series)

    @property
    def varies(self) -> bool:
        return bool(self.t_series or self.q_series)

    def at(self, time: float) -> np.ndarray:
        """Every series in use at ``time`` (T series first, then Q series)."""
        k = bisect.bisect_right(self.grid, time)
        if k == 0:
            return self.rows[0]
        if k == len(self.grid):
            return self.rows[-1]
        return self.rows[k - 1] + (time - self.grid[k - 1]) * self.slopes[k - 1]

    def apply(self, time: float) -> None:
        net = self.net
        net.fixed_t[:] = self.base_t
        net.heat_input[:] = self.base_q
        if not self.varies:
            return
        values = self.at(time)
        net.fixed_t[self.t_positions] = values[:self.n_t]
        if self.q_nodes_unique:
            net.heat_input[self.q_nodes] += values[self.n_t:]
        else:   # several series add at one node
            np.add.at(net.heat_input, self.q_nodes, values[self.n_t:])


# ----------------------------------------------------------------------------------------------
# The reduced system


class _Reduced:
    """dT_c/dt of the capacitive nodes, with the quasi-steady nodes balanced at every call."""

    def __init__(self, net, schedule, capacitive, capacity, start):
        self.net, self.schedule = net, schedule
        self.solver = Solver(net)
        free = [int(i) for i in net.free]
        cap_set = set(int(i) for i in capacitive)
        self.cap = np.array(capacitive, dtype=int)
        self.alg = np.array([i for i in free if i not in cap_set], dtype=int)
        position = {node: k for k, node in enumerate(free)}
        self.cap_in_free = np.array([position[i] for i in self.cap], dtype=int)
        self.alg_in_free = np.array([position[i] for i in self.alg], dtype=int)
        self.capacity = np.asarray(capacity, dtype=float)
        self.t_alg = start[self.alg].copy()
        self.calls = self.jacobians = 0
        self.max_calls = MAX_EVALUATIONS
        self._last = None            # (time, y, evaluation) of the last rate
        if self.alg.size:
            # the quasi-steady nodes as the free nodes of a network whose capacitive nodes are fixed
            self.inner = dataclasses.replace(net, free=self.alg, fixed=np.concatenate([net.fixed, self.cap]),
                                             fixed_t=np.zeros(net.fixed.size + self.cap.size))
            self.inner_solver = Solver(self.inner)

    def state(self, time: float, y: np.ndarray):
        """(all node temperatures, evaluation): the quasi-steady nodes balanced."""
        net = self.net
        self.schedule.apply(time)
        if self.alg.size:
            inner, solver = self.inner, self.inner_solver
            inner.fixed_t[:net.fixed.size] = net.fixed_t
            inner.fixed_t[net.fixed.size:] = y
            solver.best, solver.failure = None, ""
            zero = np.zeros(self.alg.size)
            found, x, x_fine = solver.newton(self.t_alg, zero, solver.evaluate(self.t_alg, zero))
            if found is None:
                self._fail(time, solver)
            self.t_alg = x + x_fine
            evaluation = found[0]
            t, t_fine = solver.temperatures(x, x_fine)
            t = t + t_fine
        else:
            t = self._all_capacitive(time, y)
            evaluation = self._checked(time, net.evaluate, t, np.zeros(len(net.nodes)))
        return t, evaluation

    def _all_capacitive(self, time, y):
        """Every node's temperature when every free node has a capacity (boundaries applied)."""
        net = self.net
        t = np.empty(len(net.nodes))
        t[net.fixed] = net.fixed_t
        t[self.cap] = y
        if not np.all(t > ABSOLUTE_ZERO_C) or not np.all(np.isfinite(t)):
            raise NetworkConvergenceError(
                f"{FUNCTION}: at t = {time:g} s a node temperature fell to absolute zero or is not finite; "
                "check the capacities, heat inputs and series", math.inf, None, self.calls)
        return t

    def _checked(self, time, function, *arguments):
        """The model's evaluation, a failure (a temperature outside the gas tables) named with the time."""
        try:
            return function(*arguments)
        except InputError as error:
            raise NetworkConvergenceError(
                f"{FUNCTION}: at t = {time:g} s a branch could not be evaluated ({error.argument} must be "
                f"{error.allowed}, got {format_value(error.value)}): check the capacities, start temperatures, "
                "heat inputs and series", math.inf, None, self.calls) from None
        except StillairError as error:
            raise NetworkConvergenceError(f"{FUNCTION}: at t = {time:g} s: {error}", math.inf, None,
                                          self.calls) from None

    def _fail(self, time, solver):
        try:
            solver.fail()
        except NetworkConvergenceError as error:
            raise NetworkConvergenceError(
                f"{FUNCTION}: at t = {time:g} s the quasi-steady nodes (those without a capacity) could not "
                f"be balanced: {str(error).split(': ', 1)[-1]}", error.residual, error.worst_node,
                error.iterations) from None

    def rate(self, time, y):
        self.calls += 1
        if self.calls > self.max_calls:
            raise NetworkConvergenceError(
                f"{FUNCTION}: the integration needed more than {self.max_calls} evaluations and stopped at t = "
                f"{time:g} s: heat flows too large for the capacities to hold them to the tolerances (check "
                "capacities, conductances and heat inputs many orders of magnitude apart)", math.nan, None, self.calls)
        if self.alg.size:
            _, evaluation = self.state(time, y)
            self._last = (time, y.copy(), evaluation)      # the Jacobian there needs no new solve
            q = evaluation.q
        else:   # the flows alone: no derivatives, no Newton
            self.schedule.apply(time)
            q = self._checked(time, self.net.flows, self._all_capacitive(time, y))
        return self.net.imbalance(q)[self.cap] / self.capacity

    def jacobian(self, time, y):
        self.jacobians += 1
        if self._last is not None and self._last[0] == time and np.array_equal(self._last[1], y):
            evaluation = self._last[2]
        else:
            evaluation = self.state(time, y)[1]
        jac = self.solver.jacobian(evaluation)
        c, a = self.cap_in_free, self.alg_in_free
        reduced = jac[np.ix_(c, c)]
        if a.size:
            reduced = reduced - jac[np.ix_(c, a)] @ np.linalg.solve(jac[np.ix_(a, a)], jac[np.ix_(a, c)])
        return reduced / self.capacity[:, None]


# ----------------------------------------------------------------------------------------------
# The function


def solve_transient(branches: Sequence[Sequence[object]], boundaries: Sequence[Sequence[object]],
                    capacities: Sequence[Sequence[object]] | Mapping[str, float], times: Sequence[float], *,
                    initial: Mapping[str, float] | float | None = None,
                    series: Sequence[Sequence[object]] | Mapping[str, Sequence[tuple[float, float]]] | None = None,
                    gas: str = "air",
                    pressure: float = DEFAULT_PRESSURE, method: str = "BDF", rtol: float = DEFAULT_RTOL,
                    atol: float = DEFAULT_ATOL, use_cache: bool = True) -> TransientResult:
    """Solve a thermal network through time: node heat capacities, boundaries that vary.

    The branch and boundary tables are those of :func:`solve_network`; a boundary row's value
    may name a series of ``series`` instead of a number.  Nodes listed in ``capacities`` store
    heat; every other free node is quasi-steady (see the module docstring).

    Parameters
    ----------
    branches : sequence of rows
        ``name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method``, as for :func:`solve_network`.
    boundaries : sequence of rows
        ``node | T or Q | value``; the value a number (°C or W) or the name of a series.
    capacities : sequence of rows or mapping
        ``node | C`` rows (J/K), or a mapping node -> C.  A node without a row (or with C = 0)
        is quasi-steady; a fixed node cannot have one.
    times : sequence of float
        Output times in s, strictly increasing, at least two; the solution starts at the first.
    initial : mapping, float or "periodic", optional
        Start temperatures (°C) of nodes with a capacity, node -> °C, or one number for all of
        them.  Nodes not named start at the steady solution of the network at the first time's
        boundaries (the default for all).  "periodic": the times are one cycle (a day) that
        repeats; the cycle is integrated again from its end until the end equals the start to
        1e-3 K (at most 30 times; a note says when it did not close).
    series : sequence of rows or mapping, optional
        ``series | time | value`` rows, or a mapping name -> [(time, value), ...]: linear
        between the points, held at the first and last values outside them.
    gas : str, default "air"
        Gas of every convection branch.
    pressure : float, default 101325
        Absolute pressure in Pa.
    method : {"BDF", "Radau"}, default "BDF"
        scipy's stiff integrator.
    rtol : float, default 1e-7
        Local error per step, relative: ``rtol`` x |T in °C| is added to ``atol``.
    atol : float, default 1e-5
        Local error per step, absolute, in K.
    use_cache : bool, default True
        Return the stored result of identical arguments.

    Returns
    -------
    TransientResult
        ``times``; ``temperatures[node]`` and ``heat[branch]`` over the times; ``peak[node]``
        and ``minimum[node]`` as (°C, s) at the output times; ``stored_energy``; the range
        ``notes``.

    Raises
    ------
    NetworkError
        (an :class:`~stillair.validity.InputError`) naming the table, row, column and value of a
        bad input.
    NetworkConvergenceError
        When the quasi-steady balances cannot be closed, or the integration fails.

    Notes
    -----
    Lumped-capacitance nodal networks (e.g. Incropera et al., Fundamentals of Heat and Mass
    Transfer, 6th ed., sec. 5.10, finite-difference energy balances, from memory), integrated
    by ``scipy.integrate.solve_ivp`` (BDF: Shampine and Reichelt, SIAM J. Sci. Comput. 18
    (1997); Radau IIA: Hairer and Wanner, Solving ODEs II, 1996, as cited by scipy's
    documentation) with the network's analytic Jacobian.  Quasi-steady nodes are eliminated by
    Newton's method at every evaluation.  Each convection branch re-evaluates its properties
    and correlation at every evaluation, as in :func:`solve_network`.

    Examples
    --------
    >>> result = solve_transient([["film", "block", "air", "film", 10.0, 0.5]],
    ...                          [["air", "T", 20.0]], {"block": 5000.0}, [0.0, 1000.0],
    ...                          initial={"block": 80.0})
    >>> round(float(result.temperatures["block"][-1]), 3)   # 20 + 60 exp(-1000 * 5 / 5000)
    42.073
    """
    method = _checked_choice(method)
    rtol = _checked_tolerance("rtol", rtol, "")
    atol = _checked_tolerance("atol", atol, " K")
    if not isinstance(gas, str) or not gas.strip():
        raise InputError(FUNCTION, "gas", gas, "a gas name")
    pressure = _checked_pressure(pressure)
    key = _cache_key(branches, boundaries, capacities, times, initial, series, gas_key(gas), pressure,
                     method, rtol, atol) if use_cache else None
    if key is not None and key in _CACHE:
        _CACHE.move_to_end(key)
        return _CACHE[key]
    try:
        result = _solve(branches, boundaries, capacities, times, initial, series, gas, pressure, method,
                        rtol, atol)
    except InputError as error:   # the steady parser's and the gas tables' own wording, our name
        if error.function == FUNCTION:
            raise
        raise type(error)(FUNCTION, error.argument, error.value, error.allowed) from None
    if key is not None:
        _CACHE[key] = result
        if len(_CACHE) > _CACHE_SIZE:
            _CACHE.popitem(last=False)
    return result


def _solve(branches, boundaries, capacities, times, initial, series, gas, pressure, method, rtol, atol):
    from scipy.integrate import solve_ivp   # 0.1 s of import, only when a transient is solved

    series = parse_series(series)
    rows, named = _timed_boundaries(boundaries, series)
    parsed_branches = parse_branches(branches)
    parsed_boundaries = parse_boundaries(rows)
    times = parse_times(times)
    capacity = parse_capacities(capacities, list(dict.fromkeys(n for b in parsed_branches for n in (b.source, b.target))),
                                {b.node for b in parsed_boundaries if b.kind == "T"})
    # a node with a capacity stores heat, so one branch may join it: a 0 W input marks it as
    # meant for the check against mistyped node names (a node on one branch carries no heat)
    bounded = {b.node for b in parsed_boundaries}
    parsed_boundaries += tuple(Boundary(0, node, "Q", 0.0) for node in capacity if node not in bounded)
    net = compile_network(parsed_branches, parsed_boundaries, gas=gas_key(gas), pressure=pressure,
                          property_temperature=None, ideal_expansion=False)
    nodes = net.nodes
    schedule = _Schedule(net, parsed_boundaries, named, series)
    notes = [f"series {label!r} is not used by any boundary row" for label in series
             if label not in named.values()]

    # the start: the steady network at the first time's boundaries, then the given temperatures
    schedule.apply(times[0])
    steady = Solver(net)
    try:
        found = steady.solve()
    except NetworkConvergenceError as error:
        raise NetworkConvergenceError(
            f"{FUNCTION}: the steady start at t = {times[0]:g} s: {str(error).split(': ', 1)[-1]}",
            error.residual, error.worst_node, error.iterations) from None
    start, fine = steady.temperatures(found[1], found[2])
    start = start + fine
    index = {node: i for i, node in enumerate(nodes)}
    capacitive = [index[node] for node in capacity]
    for node, value in _initial(initial, capacity).items():
        start[index[node]] = value

    system = _Reduced(net, schedule, capacitive, list(capacity.values()), start)
    system.max_calls = MAX_EVALUATIONS + MAX_EVALUATIONS_PER_TIME * times.size
    y0 = start[system.cap]
    max_step = schedule.shortest if schedule.varies else np.inf
    states, cycles = np.zeros((times.size, 0)), 0
    while system.cap.size:
        solution = solve_ivp(system.rate, (times[0], times[-1]), y0, method=method, t_eval=times,
                             jac=system.jacobian, rtol=rtol, atol=atol, max_step=max_step)
        if not solution.success:
            raise NetworkConvergenceError(f"{FUNCTION}: the integration stopped: {solution.message}",
                                          math.nan, None, system.calls)
        states, cycles = solution.y.T, cycles + 1
        gap = float(np.max(np.abs(states[-1] - states[0])))
        if not _is_periodic(initial) or gap <= PERIODIC_TOLERANCE:
            break
        if cycles == MAX_CYCLES:
            notes.append(f"the cycle did not repeat itself after {MAX_CYCLES} repetitions: the end differs from "
                         f"the start by {gap:.3g} K (capacities slow to respond over the times given)")
            break
        y0 = states[-1]
    return _collect(system, times, states, capacity, notes, method, rtol, atol, cycles)


def _is_periodic(initial) -> bool:
    return isinstance(initial, str) and initial.strip().lower() == "periodic"


def _collect(system, times, states, capacity, notes, method, rtol, atol, cycles):
    """Every node's temperature and every branch's flow at the output times, and the notes."""
    net = system.net
    temperatures = np.empty((times.size, len(net.nodes)))
    heat = np.empty((times.size, len(net.branches)))
    details = []
    for k, (time, y) in enumerate(zip(times, states)):
        t, evaluation = system.state(time, y)
        temperatures[k], heat[k] = t, evaluation.q
        details.append(evaluation.details)
    notes = notes + _range_notes(net, times, details)
    cap = system.cap
    stored = (temperatures[:, cap] - temperatures[0, cap]) @ system.capacity if cap.size else np.zeros(times.size)
    frozen = _read_only
    return TransientResult(
        times=frozen(times),
        temperatures=MappingProxyType({node: frozen(temperatures[:, i]) for i, node in enumerate(net.nodes)}),
        heat=MappingProxyType({b.name: frozen(heat[:, k]) for k, b in enumerate(net.branches)}),
        peak=MappingProxyType({node: _extreme(times, temperatures[:, i], np.argmax)
                               for i, node in enumerate(net.nodes)}),
        minimum=MappingProxyType({node: _extreme(times, temperatures[:, i], np.argmin)
                                  for i, node in enumerate(net.nodes)}),
        stored_energy=frozen(stored),
        capacities=MappingProxyType(dict(capacity)),
        quasi_steady=tuple(net.nodes[i] for i in system.alg),
        notes=tuple(notes), method=method, rtol=rtol, atol=atol, steps=system.calls,
        jacobians=system.jacobians, cycles=cycles)


def _range_notes(net, times, details) -> list[str]:
    """One note per convection branch used outside its correlation's range at some output time:
    the first such time, its note, and how many output times.  Each group's correlation is
    called once over all the times (what the steady records do at one solution)."""
    notes = []
    for b, batch in enumerate(net.batches):
        for k, group in enumerate(batch.groups):
            part = batch.slices[k]
            n = (part.stop - part.start) // 3          # the point is the first third of the block
            at = slice(part.start, part.start + n)
            ra, pr, dt = (np.concatenate([getattr(d[b], field)[at] for d in details]) for field in ("ra", "pr", "dt"))
            columns = {name: np.tile(column, times.size) for name, column in group.columns.items()}
            inputs = dict(ra=ra, pr=pr, **group.kind.correlation_inputs(
                dict(columns, length=np.tile(group.length, times.size)), dt))
            result, case, flagged = group._nusselt(inputs, dt, notes=True)
            for j, position in enumerate(group.index):
                branch = net.branches[int(position)]
                if flagged is not None and flagged[j::n].any():
                    first = j + n * int(np.flatnonzero(flagged[j::n])[0])
                    raise NetworkError(FUNCTION, f"{branch.where}, column method", branch.method,
                                       f"a method for case {case[first]} (the case at t = {times[first // n]:g} s); "
                                       "allowed: " + ", ".join(methods_for(branch.kind, str(case[first]))) + " or blank")
                noted = np.flatnonzero([bool(text) for text in result.note[j::n]])
                if noted.size:
                    notes.append(f"branch {branch.name}: {result.note[j + n * int(noted[0])]} (at t = "
                                 f"{times[noted[0]]:g} s; out of range at {noted.size} of {times.size} output times)")
    return notes


def _extreme(times, values, pick):
    k = int(pick(values))
    return float(values[k]), float(times[k])


def _read_only(array):
    array = np.array(array, dtype=float)
    array.flags.writeable = False
    return array


def _initial(initial, capacity) -> dict[str, float]:
    if initial is None or _is_periodic(initial):
        return {}
    if not isinstance(initial, Mapping):
        value = _checked_temperature("initial", initial)
        return {node: value for node in capacity}
    result = {}
    for node, value in initial.items():
        node_name = str(node).strip()
        if node_name not in capacity:
            raise InputError(FUNCTION, "initial", node_name,
                             "a node with a capacity (a quasi-steady node's temperature follows from the "
                             "others, a fixed one's from its boundary); nodes with a capacity: "
                             + ", ".join(capacity) if capacity else "none")
        result[node_name] = _checked_temperature(f"initial[{node_name!r}]", value)
    return result


def _checked_temperature(argument, value) -> float:
    if isinstance(value, (bool, np.bool_, str)) or value is None:
        raise InputError(FUNCTION, argument, value, 'a temperature in °C' + (
            ' or "periodic"' if argument == "initial" else ""))
    try:
        number_ = float(value)
    except (TypeError, ValueError):
        raise InputError(FUNCTION, argument, value, 'a temperature in °C' + (
            ' or "periodic"' if argument == "initial" else "")) from None
    if not math.isfinite(number_) or not number_ > ABSOLUTE_ZERO_C:
        raise InputError(FUNCTION, argument, number_, "a finite temperature above -273.15 °C")
    return number_


def _checked_choice(method) -> str:
    for choice in TRANSIENT_METHODS:
        if isinstance(method, str) and method.strip().lower() == choice.lower():
            return choice
    raise InputError(FUNCTION, "method", method, "one of " + ", ".join(TRANSIENT_METHODS))


def _checked_tolerance(argument, value, unit) -> float:
    if isinstance(value, (bool, np.bool_, str)) or value is None:
        raise InputError(FUNCTION, argument, value, f"a number > 0{unit}")
    number_ = float(value)
    low = 1e-13 if argument == "rtol" else 0.0    # scipy's floor for rtol is 100 eps
    if not math.isfinite(number_) or not low < number_ <= 1e-2:
        raise InputError(FUNCTION, argument, number_, f"> {low:g}{unit} and at most 0.01{unit}")
    return number_


def _checked_pressure(value) -> float:
    if isinstance(value, (bool, np.bool_, str)) or value is None:
        raise InputError(FUNCTION, "pressure", value, "a number in Pa")
    number_ = float(value)
    if not math.isfinite(number_) or not number_ > 0:
        raise InputError(FUNCTION, "pressure", number_, "> 0 Pa")
    return number_


def _cache_key(*arguments):
    """The arguments with each cell's type, or None when they do not hash."""
    def freeze(value):
        if isinstance(value, Mapping):
            return ("map",) + tuple((freeze(k), freeze(v)) for k, v in value.items())
        if isinstance(value, np.ndarray):
            return ("array", value.dtype.str, value.shape, value.tobytes())
        if isinstance(value, (list, tuple)):
            return ("seq",) + tuple(freeze(v) for v in value)
        hash(value)
        return (type(value), value)
    try:
        return tuple(freeze(a) for a in arguments)
    except TypeError:
        return None
