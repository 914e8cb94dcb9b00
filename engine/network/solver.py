"""Closing the energy balances of the free nodes.

1. A linear solve with nominal conductances (each kind's ``nominal``): linear branches exact,
   radiation 4 F sigma Tm^3 at the mean fixed temperature, surfaces and cavities typical still-air
   values.  A network of linear branches only is solved by this step (and one correction).
2. Newton's method on the balances.  Each branch depends on two node temperatures only, so its
   two derivatives assemble the Jacobian directly.  Residual and Jacobian are scaled row by row
   by each node's total conductance (the residual becomes the temperature correction the node
   needs), so a 1e-9 K/W branch beside a 1e6 K/W one neither swamps the step nor the line
   search.  Steps never more than halve an absolute temperature; a backtracking line search on
   the scaled residual keeps every step an improvement.
3. If Newton stalls, scipy.optimize.root ("hybr", then "lm") on the same scaled system.

Acceptance: at every free node the imbalance is at most 1e-9 of the heat passing through that
node (or 1e-12 of the network's largest flow, for nodes that carry almost nothing), or so small
that through the node's weakest branch it would move the node by less than 1e-11 K (a network at
rest, whose flows vanish faster than the temperature differences, converges only slowly to the
first test).  No
unconverged number is ever returned: :class:`NetworkConvergenceError` names the residual and
the worst node.
"""

from __future__ import annotations

import math
import warnings
from typing import NoReturn

import numpy as np
from ..constants import ZERO_CELSIUS as zero_Celsius

from ..validity import ABSOLUTE_ZERO_C, StillairError
from .errors import FUNCTION, NetworkConvergenceError
from .model import Network
from .results import NetworkResult, build_result

__all__ = ["Solver", "RELATIVE_TOLERANCE", "MAX_NEWTON_ITERATIONS"]

RELATIVE_TOLERANCE = 1e-9     # of the heat passing through the node
QUIET_NODE_FRACTION = 1e-3    # a node carrying less than this of the largest flow uses that floor
SETTLED_KELVIN = 1e-11        # K: a node whose imbalance would move it less than this is settled
MAX_NEWTON_ITERATIONS = 60
# From this many free nodes Newton's linear systems are sparse (scipy.sparse, SuperLU): a dense
# LU grows as n^3 and, through a threaded BLAS, costs a loaded machine far more CPU than it
# computes (100 nodes: 40-140 ms of CPU against 9 ms on one thread).  Below it the dense LU
# of a few dozen unknowns is cheaper than building a sparse matrix.
SPARSE_FROM = 32
START_PASSES = 2              # fixed-point passes of the nominal start


def _two_sum(a: np.ndarray, b: np.ndarray):
    """a + b as (value, remainder) without rounding loss (Knuth's TwoSum)."""
    s = a + b
    bb = s - a
    return s, (a - (s - bb)) + (b - bb)


def sparse_matrix(matrix) -> bool:
    return not isinstance(matrix, np.ndarray)


class _FreePairs:
    """Matrix entries given per branch end pair (row node, column node), kept where both are free
    nodes, in free-node numbering; and the entries in a free row and a fixed column, which move
    to the right-hand side."""

    def __init__(self, net: Network, rows: np.ndarray, columns: np.ndarray):
        position = np.full(len(net.nodes), -1)
        position[net.free] = np.arange(net.free.size)
        free_row, free_column = position[rows] >= 0, position[columns] >= 0
        self.keep = free_row & free_column
        self.rows, self.columns = position[rows][self.keep], position[columns][self.keep]
        self.to_fixed = free_row & ~free_column
        self.fixed_rows = position[rows][self.to_fixed]
        self.fixed_columns = columns[self.to_fixed]   # node numbers (fixed)
        self.size = net.free.size
        # The compressed-column pattern, found once per network: every kept entry's slot among
        # the distinct (row, column) pairs, ordered by column then row.  Each matrix is then one
        # bincount into the slots (duplicates add up, as in the dense form), with no sorting or
        # format conversion per Newton step.
        pairs, self.slot = np.unique(self.columns.astype(np.int64) * self.size + self.rows, return_inverse=True)
        self.indices = pairs % self.size                                  # the row of each slot
        self.indptr = np.concatenate([[0], np.cumsum(np.bincount(pairs // self.size, minlength=self.size))])

    def matrix(self, values: np.ndarray):
        """The free block with these entry values, a CSC matrix (what SuperLU factors)."""
        from scipy.sparse import csc_matrix

        data = np.bincount(self.slot, values[self.keep], minlength=self.indices.size)
        return csc_matrix((data, self.indices, self.indptr), shape=(self.size, self.size))

    def fixed_part(self, values: np.ndarray, net: Network) -> np.ndarray:
        """(free rows x fixed columns) @ the fixed temperatures."""
        t = np.zeros(len(net.nodes))
        t[net.fixed] = net.fixed_t
        return np.bincount(self.fixed_rows, values[self.to_fixed] * t[self.fixed_columns],
                           minlength=self.size)


class Solver:
    def __init__(self, net: Network, max_iterations: int | None = None):
        self.net = net
        self.max_iterations = MAX_NEWTON_ITERATIONS if max_iterations is None else max_iterations
        self.iterations = 0
        self.best: tuple | None = None  # (ratio to tolerance, x, evaluation, residual): the restart
        self.failure = ""         # text of the last evaluation that could not be done
        n = len(net.nodes)
        s, r = net.source, net.target
        self._jacobian_index = np.concatenate([r * n + s, r * n + r, s * n + s, s * n + r])
        self._laplacian_index = np.concatenate([s * n + s, r * n + r, s * n + r, r * n + s])
        self._free_block = np.ix_(net.free, net.free)
        self._free_fixed_block = np.ix_(net.free, net.fixed)
        self.sparse = net.free.size >= SPARSE_FROM
        if self.sparse:
            self._jacobian_pairs = _FreePairs(net, np.concatenate([r, r, s, s]), np.concatenate([s, r, s, r]))
            self._laplacian_pairs = _FreePairs(net, np.concatenate([s, r, s, r]), np.concatenate([s, r, r, s]))
        # every branch end, grouped by node (each node has at least one): for per-node minima
        ends = np.concatenate([s, r])
        self._incidence = np.argsort(ends, kind="stable")
        self._incidence_start = np.searchsorted(ends[self._incidence], np.arange(n))

    # ---- evaluation --------------------------------------------------------------------

    def temperatures(self, x: np.ndarray, x_fine: np.ndarray | None = None):
        net = self.net
        t = np.empty(len(net.nodes))
        t[net.fixed] = net.fixed_t
        t[net.free] = x
        fine = np.zeros(len(net.nodes))
        if x_fine is not None:
            fine[net.free] = x_fine
        return t, fine

    def evaluate(self, x, x_fine=None):
        """(evaluation, free-node residual) or None where the branches cannot be evaluated
        (a temperature outside the gas-property range, for instance)."""
        t, fine = self.temperatures(x, x_fine)
        bad = (t <= ABSOLUTE_ZERO_C) | ~np.isfinite(t)
        if np.any(bad):
            node = int(np.flatnonzero(bad)[0])
            self.failure = (f"node {self.net.nodes[node]!r} fell to {t[node]:.6g} °C, at or below absolute zero")
            return None
        try:
            # a trial far from the answer may overflow (T^4 of radiation, a correlation's power):
            # the flows are checked below and the failure is worded, so numpy stays quiet
            with np.errstate(over="ignore", invalid="ignore", divide="ignore", under="ignore"):
                evaluation = self.net.evaluate(t, fine)
        except StillairError as error:
            self.failure = self._where(t, error)
            return None
        finite = np.isfinite(evaluation.q)
        if not np.all(finite):
            branch = self.net.branches[int(np.flatnonzero(~finite)[0])]
            self.failure = (f"the heat flow of branch {branch.name!r} ({branch.source!r} to {branch.target!r}) "
                            "is not finite")
            return None
        residual = self.net.imbalance(evaluation.q)[self.net.free]
        ratio = self.worst_ratio(evaluation, residual)
        if self.best is None or ratio < self.best[0]:
            self.best = (ratio, x.copy(), evaluation, residual)
        return evaluation, residual

    def _where(self, t: np.ndarray, error: StillairError) -> str:
        """The error of an evaluation with the branch it arose at: a property look-up refused
        a film temperature, found again among the branches' mean end temperatures."""
        text = str(error)
        value = getattr(error, "value", None)
        if isinstance(value, (int, float, np.floating)) and math.isfinite(float(value)):
            index = {name: i for i, name in enumerate(self.net.nodes)}
            for branch in self.net.branches:
                ends = t[index[branch.source]], t[index[branch.target]]
                for guess in (0.5 * (ends[0] + ends[1]), ends[0], ends[1]):
                    if abs(guess - float(value)) <= 1e-9 * max(1.0, abs(float(value))):
                        return (f"branch {branch.name!r} between {branch.source!r} ({ends[0]:.6g} °C) and "
                                f"{branch.target!r} ({ends[1]:.6g} °C): {text}")
        return text

    def tolerances(self, evaluation) -> np.ndarray:
        """Largest acceptable imbalance (W) at every free node (worked out once per evaluation)."""
        if evaluation.tolerance is not None:
            return evaluation.tolerance
        net = self.net
        through = net.throughput(evaluation.q)[net.free]
        largest = max(np.max(np.abs(evaluation.q), initial=0.0), np.max(np.abs(net.heat_input), initial=0.0))
        floor = QUIET_NODE_FRACTION * largest
        # ... or settled: the imbalance, passed through the node's weakest branch, would move
        # it by less than SETTLED_KELVIN (a network at rest, where flows vanish with dT^(5/4))
        slopes = np.abs(np.concatenate([evaluation.d_source, evaluation.d_target]))[self._incidence]
        weakest = np.minimum.reduceat(slopes, self._incidence_start)
        evaluation.tolerance = np.maximum(RELATIVE_TOLERANCE * np.maximum(through, floor),
                                          SETTLED_KELVIN * weakest[net.free])
        return evaluation.tolerance

    def ratios(self, evaluation, residual) -> np.ndarray:
        """|imbalance| / tolerance at every free node (0 where balanced exactly; <= 1: converged)."""
        magnitude = np.abs(residual)
        return np.divide(magnitude, self.tolerances(evaluation), out=np.zeros_like(magnitude),
                         where=magnitude > 0)

    def worst_ratio(self, evaluation, residual) -> float:
        """The largest of :meth:`ratios` (0 without free nodes)."""
        return float(np.max(self.ratios(evaluation, residual))) if residual.size else 0.0

    def converged(self, evaluation, residual) -> bool:
        return bool(np.all(np.abs(residual) <= self.tolerances(evaluation)))

    @staticmethod
    def _jacobian_values(evaluation) -> np.ndarray:
        return np.concatenate([evaluation.d_source, evaluation.d_target,
                               -evaluation.d_source, -evaluation.d_target])

    def jacobian(self, evaluation) -> np.ndarray:
        """The free block of d(balance)/dT as a dense array (scipy's root finders take it)."""
        n = len(self.net.nodes)
        full = np.bincount(self._jacobian_index, self._jacobian_values(evaluation),
                           minlength=n * n).reshape(n, n)
        return full[self._free_block]

    def newton_matrix(self, evaluation):
        """The Jacobian's free block for Newton's step: dense for small networks, sparse (CSR)
        from SPARSE_FROM free nodes, where a dense n x n matrix and LU grow as n^2 and n^3."""
        if self.sparse:
            return self._jacobian_pairs.matrix(self._jacobian_values(evaluation))
        return self.jacobian(evaluation)

    @staticmethod
    def row_scale(jac) -> np.ndarray:
        """1 / (each node's total conductance): turns W into K."""
        if sparse_matrix(jac) and jac.format == "csc":   # the row sums straight from the stored entries
            total = np.bincount(jac.indices, np.abs(jac.data), minlength=jac.shape[0])
        else:
            total = np.asarray(abs(jac).sum(axis=1)).ravel()
        total[~(total > 0)] = 1.0
        return 1.0 / total

    def solve_scaled(self, matrix, scale: np.ndarray, rhs: np.ndarray) -> np.ndarray:
        """x with (diag(scale) matrix) x = rhs: LAPACK for a dense matrix, SuperLU for a sparse
        one (no BLAS threads either way that matter: SuperLU's supernodes here are tiny); least
        squares where the matrix is singular (a free node joined only by branches whose
        coefficient is zero)."""
        if not sparse_matrix(matrix):
            try:
                return np.linalg.solve(matrix * scale[:, None], rhs)
            except np.linalg.LinAlgError:
                return np.linalg.lstsq(matrix * scale[:, None], rhs, rcond=None)[0]
        from scipy.sparse import csc_matrix
        from scipy.sparse.linalg import MatrixRankWarning, lsqr, spsolve

        matrix = csc_matrix(matrix)   # (the solver's own matrices are CSC already: no copy)
        scaled = csc_matrix((matrix.data * scale[matrix.indices], matrix.indices, matrix.indptr), shape=matrix.shape)
        with warnings.catch_warnings():
            warnings.simplefilter("error", MatrixRankWarning)
            try:
                x = spsolve(scaled, rhs)
            except (MatrixRankWarning, RuntimeError):
                x = None
        if x is None or not np.all(np.isfinite(x)):
            x = lsqr(scaled, rhs, atol=1e-14, btol=1e-14)[0]
        return np.asarray(x, dtype=float)

    # ---- start ---------------------------------------------------------------------------

    def nominal_start(self) -> np.ndarray:
        """Free-node temperatures of the network with nominal conductances: linear branches exact,
        radiation and convection by cheap laws (no property or correlation call) re-evaluated
        at the temperatures of the previous pass, a few passes.  Only the start: Newton then
        works with the real branches, and a start this close saves it an evaluation or two."""
        net = self.net
        t_mean = float(np.mean(net.fixed_t))
        t = np.full(len(net.nodes), t_mean)
        t[net.fixed] = net.fixed_t
        conductance = np.empty(len(net.branches))
        x: np.ndarray | None = None
        for _ in range(START_PASSES):
            t1, t2 = t[net.source], t[net.target]
            for group in net.groups:
                i = group.index
                conductance[i] = group.nominal(t1[i], t2[i])
            previous, x = x, self.linear_solve(conductance)
            if not np.all(np.isfinite(x)) or np.any(x <= ABSOLUTE_ZERO_C):
                return previous if previous is not None else np.full(net.free.size, t_mean)
            t[net.free] = x
            if previous is not None and np.max(np.abs(x - previous)) < 1e-3 * (1.0 + np.ptp(net.fixed_t)):
                break
        return x if x is not None else np.full(net.free.size, t_mean)  # START_PASSES >= 1

    def linear_solve(self, conductance: np.ndarray) -> np.ndarray:
        net = self.net
        n = len(net.nodes)
        values = np.concatenate([conductance, conductance, -conductance, -conductance])
        if self.sparse:
            matrix = self._laplacian_pairs.matrix(values)
            rhs = net.heat_input[net.free] - self._laplacian_pairs.fixed_part(values, net)
        else:
            laplacian = np.bincount(self._laplacian_index, values, minlength=n * n).reshape(n, n)
            rhs = net.heat_input[net.free] - laplacian[self._free_fixed_block] @ net.fixed_t
            matrix = laplacian[self._free_block]
        scale = self.row_scale(matrix)
        return self.solve_scaled(matrix, scale, rhs * scale)

    # ---- Newton --------------------------------------------------------------------------

    def newton(self, x, x_fine, state):
        if state is None:
            return None, x, x_fine
        evaluation, residual = state
        for _ in range(self.max_iterations):
            if self.converged(evaluation, residual):
                return (evaluation, residual), x, x_fine
            jac = self.newton_matrix(evaluation)
            scale = self.row_scale(jac)
            scaled = residual * scale
            dx = self.solve_scaled(jac, scale, -scaled)
            if not np.all(np.isfinite(dx)):
                break
            absolute = x + zero_Celsius
            falling = dx < 0
            lam = 1.0
            if falling.any():
                # never more than halve an absolute temperature in one step
                lam = min(1.0, float(np.min(0.5 * absolute[falling] / -dx[falling])))
            norm = float(np.linalg.norm(scaled))
            self.iterations += 1
            accepted = False
            while lam > 1e-6:
                trial_x, trial_fine = _two_sum(x, x_fine + lam * dx)
                trial = self.evaluate(trial_x, trial_fine)
                if trial is not None and (np.linalg.norm(trial[1] * scale) < (1.0 - 1e-4 * lam) * norm
                                          or self.converged(*trial)):
                    x, x_fine = trial_x, trial_fine
                    evaluation, residual = trial
                    accepted = True
                    break
                lam *= 0.5
            if not accepted:
                break
        if self.converged(evaluation, residual):
            return (evaluation, residual), x, x_fine
        return None, x, x_fine

    def scipy_root(self, x, method):
        from scipy import optimize  # only when Newton stalls: importing it takes 0.2 s

        state = self.evaluate(x)
        if state is None:
            return None
        scale = self.row_scale(self.jacobian(state[0]))

        def fun(y):
            state = self.evaluate(y)
            if state is None:
                return np.full(len(y), 1e30), np.eye(len(y))
            evaluation, residual = state
            return residual * scale, self.jacobian(evaluation) * scale[:, None]

        try:
            # tight tolerances: the acceptance test is ours (the energy residual), not scipy's
            options = {"xtol": 1e-14} if method == "hybr" else {"xtol": 1e-14, "ftol": 1e-14}
            solution = optimize.root(fun, x, jac=True, method=method, options=options)
        except (ValueError, np.linalg.LinAlgError):
            return None
        self.iterations += int(getattr(solution, "nfev", 0))
        zero = np.zeros_like(solution.x)
        state, y, fine = self.newton(solution.x, zero, self.evaluate(solution.x, zero))  # polish
        if state is not None:
            return state, y, fine
        return None

    def solve(self) -> tuple[tuple, np.ndarray, np.ndarray, str]:
        """(evaluation, residual), x, x_fine, how."""
        net = self.net
        if net.free.size == 0:
            state = self.evaluate(np.zeros(0), np.zeros(0))
            if state is None:
                self.fail()
            return state, np.zeros(0), np.zeros(0), "direct"
        x0 = self.start()
        zero = np.zeros_like(x0)
        start = self.evaluate(x0, zero)
        if start is None:
            # nominal temperatures outside the property range: start from the fixed mean
            x0 = np.full(net.free.size, float(np.mean(net.fixed_t)))
            start = self.evaluate(x0, zero)
        state, x, fine = self.newton(x0, zero, start)
        if state is not None:
            return state, x, fine, "newton"
        for method in ("hybr", "lm"):
            restart = self.best[1] if self.best is not None else x0
            found = self.scipy_root(restart, method)
            if found is not None:
                return found[0], found[1], found[2], method
        self.fail()

    def start(self) -> np.ndarray:
        return self.nominal_start()

    def result(self, state, x, x_fine, how, strict=True) -> NetworkResult:
        """The NetworkResult of :meth:`solve`'s answer (``strict``: see :func:`.results.branch_records`)."""
        evaluation, residual = state
        t, t_fine = self.temperatures(x, x_fine)
        return build_result(self.net, t + t_fine, evaluation, residual, self.tolerances(evaluation),
                            self.iterations, how, strict)

    def fail(self) -> NoReturn:
        net = self.net
        if self.best is None:
            raise NetworkConvergenceError(
                f"{FUNCTION}: the branches could not be evaluated at any trial temperature: {self.failure}. "
                "Check the heat inputs and the coefficients around that branch.",
                math.inf, None, self.iterations)
        _, _, evaluation, residual = self.best
        tolerance = self.tolerances(evaluation)
        with np.errstate(divide="ignore", invalid="ignore"):
            worst_index = int(np.argmax(self.ratios(evaluation, residual)))
        worst = net.nodes[int(net.free[worst_index])]
        norm = float(abs(residual[worst_index]))
        if self.failure:
            hint = (f" The balance needs temperatures where the branches cannot be evaluated "
                    f"({self.failure}): check the heat inputs, areas and coefficients around that node.")
        elif net.has_correlations:
            hint = (" A correlation that changes steeply with the temperature difference can prevent "
                    "convergence; choosing a method explicitly for the branches at that node may help.")
        else:
            hint = (" The network has no correlation branches: check the heat inputs and any "
                    "conductances many orders of magnitude apart around that node.")
        raise NetworkConvergenceError(
            f"{FUNCTION}: no converged solution after {self.iterations} iterations: energy residual "
            f"{norm:.3g} W at node {worst!r} (tolerance {float(tolerance[worst_index]):.3g} W).{hint}",
            norm, worst, self.iterations)
