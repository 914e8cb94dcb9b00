"""Thermal networks: nodes joined by conduction, convection, cavity and radiation branches.

A network is two tables, exactly as a spreadsheet holds them (see the design notes):

* branches, one row per branch:  name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method
* boundaries, one row per condition:  node | T or Q | value

A ``T`` row fixes a node's temperature (°C); a ``Q`` row adds a heat input (W) at a node whose
temperature is solved (several ``Q`` rows at one node add up).  Every node without a fixed
temperature obeys its energy balance

    Q_i + sum over branches into i of q_b - sum over branches out of i of q_b = 0,

with q_b the branch's heat flow, positive from ``from`` to ``to``.  For the convection kinds
``from`` is the solid surface and ``to`` the fluid; for a cavity ``from`` is the surface on the
layer's underside (see :func:`stillair.convection.cavity_convection`).

Branch heat flows
-----------------
=========== ============================================================  =====================
kind        q (W)                                                         p1 .. p5
=========== ============================================================  =====================
conduction  k A (T1 - T2) / L                                             L, k, A
resistance  (T1 - T2) / R                                                 R
film        h A (T1 - T2)                                                 h, A
vplate ...  h(T1, T2) A (T1 - T2), h from the geometry's correlation at    see the design notes
            the branch's own film temperature and temperature difference
cavity      h(T1, T2) A (T1 - T2), h = Nu k / gap                          gap, height, A, tilt, gas
radiation   A F sigma (T1^4 - T2^4), F the grey exchange factor            eps1, eps2, A
=========== ============================================================  =====================

Solution method
---------------
1. A linear solve with nominal coefficients: conduction, resistance and film exact; radiation
   4 F sigma Tm^3 at the mean fixed temperature Tm; surfaces 4 W/(m²·K), cavities 1.5 k/gap.
   A network of linear branches only is solved exactly by this step.
2. Newton's method on the free nodes' energy balances.  Each branch depends on two node
   temperatures only, so its two derivatives (analytic for the linear and radiation branches,
   forward differences for the convection branches, evaluated in the same vectorised call as
   the heat flows) assemble the Jacobian directly.  Steps are limited so that no absolute
   temperature falls by more than half, and a backtracking line search on the residual norm
   keeps every step an improvement.
3. If Newton stalls, scipy.optimize.root ("hybr", then "lm") with the same Jacobian.

Every evaluation re-computes each convection branch's gas properties at its own film
temperature (or at ``property_temperature``) and its correlation at its own temperature
difference; horizontal and tilted plates take hot-up/hot-down/cold-up/cold-down from the sign
of that difference.  At a zero difference a branch keeps its correlation's finite limit.

The answer is accepted only when the largest nodal imbalance is below 1e-9 of the largest
branch heat flow or heat input (and in any case below 1e-9 W when all flows are below 1 W).
Otherwise :class:`NetworkConvergenceError` names the residual and the worst node; no
unconverged number is ever returned.
"""

from __future__ import annotations

import math
from collections import OrderedDict
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping

import numpy as np
from scipy.constants import zero_Celsius

from .correlations import CORRELATIONS, GEOMETRIES, merge_masked, methods_for
from .radiation import SIGMA, exchange_factor
from .validity import ABSOLUTE_ZERO_C, InputError, StillairError, format_value

__all__ = [
    "NetworkError",
    "NetworkConvergenceError",
    "NetworkResult",
    "BranchResult",
    "BRANCH_KINDS",
    "BRANCH_COLUMNS",
    "BOUNDARY_COLUMNS",
    "solve_network",
    "clear_network_cache",
]

FUNCTION = "solve_network"
BRANCH_COLUMNS = ("name", "from", "to", "kind", "p1", "p2", "p3", "p4", "p5", "method")
BOUNDARY_COLUMNS = ("node", "T or Q", "value")
DEFAULT_PRESSURE = 101325.0

RELATIVE_TOLERANCE = 1e-9   # of the largest branch heat flow or heat input
ABSOLUTE_TOLERANCE = 1e-9   # W, the floor for networks whose flows are all below 1 W
MAX_NEWTON_ITERATIONS = 60
NOMINAL_SURFACE_H = 4.0     # W/(m²·K), still air on a surface (common practice), start only
NOMINAL_CAVITY_NU = 1.5     # a cavity's start: Nu = 1.5 ...
NOMINAL_CONDUCTIVITY = 0.026  # W/(m·K) ... with air's conductivity near 20 °C (start only)


# --------------------------------------------------------------------------------------------
# Errors


class NetworkError(InputError):
    """A problem in the network tables, naming the table, row and column.

    Same shape as every input error: ``solve_network: branch row 3 (wall), column p2
    (conductivity) must be > 0 W/(m·K), got 0``.
    """

    def render(self, function_name: str) -> str:
        shown = "blank" if self.value is None else (
            self.value.text if isinstance(self.value, _Shown) else format_value(self.value))
        return f"{function_name}: {self.argument} must be {self.allowed}, got {shown}"


@dataclass(frozen=True)
class _Shown:
    """A 'got' part shown verbatim in a message (a description rather than a value)."""

    text: str


class NetworkConvergenceError(StillairError):
    """The energy balances could not be closed to the tolerance; no result is returned."""

    def __init__(self, message: str, residual: float, worst_node: str | None, iterations: int):
        self.residual = residual
        self.worst_node = worst_node
        self.iterations = iterations
        super().__init__(message)


# --------------------------------------------------------------------------------------------
# The branch kinds and their parameter columns


@dataclass(frozen=True)
class _Param:
    label: str
    unit: str = ""
    check: str = "positive"       # positive | emissivity | plate-tilt | cavity-tilt | facing | gas
    optional: bool = False
    default: object = None


_LENGTH = {"height": _Param("height", "m"), "length": _Param("length", "m"),
           "diameter": _Param("diameter", "m")}
_AREA = _Param("area", "m²")
_FACING = _Param("facing", check="facing")

BRANCH_KINDS: Mapping[str, tuple[_Param, ...]] = MappingProxyType({
    "conduction": (_Param("thickness", "m"), _Param("conductivity", "W/(m·K)"), _AREA),
    "resistance": (_Param("R", "K/W"),),
    "film": (_Param("h", "W/(m²·K)"), _AREA),
    "vplate": (_LENGTH["height"], _AREA),
    "hplate": (_LENGTH["length"], _AREA, _FACING),
    "tplate": (_LENGTH["length"], _AREA, _Param("tilt", "° from vertical", "plate-tilt"), _FACING),
    "hcyl": (_LENGTH["diameter"], _AREA),
    "sphere": (_LENGTH["diameter"], _AREA),
    "cavity": (_Param("gap", "m"), _Param("height", "m"), _AREA,
               _Param("tilt", "° from horizontal", "cavity-tilt", optional=True, default=90.0),
               _Param("gas", check="gas", optional=True)),
    "radiation": (_Param("emissivity of from", check="emissivity"),
                  _Param("emissivity of to", check="emissivity", optional=True), _AREA),
})
SURFACE_KINDS = ("vplate", "hplate", "tplate", "hcyl", "sphere")
CONVECTION_KINDS = SURFACE_KINDS + ("cavity",)
LINEAR_KINDS = ("conduction", "resistance", "film")


# --------------------------------------------------------------------------------------------
# Reading the tables


def _blank(value) -> bool:
    if value is None:
        return True
    if isinstance(value, str):
        return value.strip() == ""
    if isinstance(value, float) and math.isnan(value):
        return False  # a NaN is a (bad) number, reported as such
    return False


def _rows(table, table_name: str, width: int, columns: tuple[str, ...]):
    """(row number, padded row) for every non-blank row; a header row is skipped."""
    if table is None:
        raise NetworkError(FUNCTION, table_name, None, "a table of rows")
    if isinstance(table, np.ndarray):
        table = table.tolist()
    try:
        rows = list(table)
    except TypeError:
        raise NetworkError(FUNCTION, table_name, table, "a table of rows (a list of lists)") from None
    result = []
    for number, row in enumerate(rows, start=1):
        if isinstance(row, np.ndarray):
            row = row.tolist()
        if isinstance(row, (str, bytes)) or not hasattr(row, "__iter__"):
            raise NetworkError(FUNCTION, f"{table_name} row {number}", row,
                               f"a row of up to {width} values ({' | '.join(columns)})")
        row = list(row)
        if all(_blank(v) for v in row):
            continue
        extra = [v for v in row[width:] if not _blank(v)]
        if extra:
            raise NetworkError(FUNCTION, f"{table_name} row {number}", _Shown(f"{len(row)} columns"),
                               f"at most {width} columns ({' | '.join(columns)})")
        row = (row + [None] * width)[:width]
        if not result and _is_header(row, columns):
            continue
        result.append((number, row))
    return result


def _is_header(row, columns) -> bool:
    words = [v.strip().lower() for v in row[:2] if isinstance(v, str)]
    return words == [c.lower() for c in columns[:2]]


def _name(value, where: str, column: str) -> str:
    """A node or branch name: text, or a whole number written as such."""
    if _blank(value):
        raise NetworkError(FUNCTION, f"{where}, column {column}", None, "a name")
    if isinstance(value, str):
        return value.strip()
    if isinstance(value, (bool, np.bool_)):
        raise NetworkError(FUNCTION, f"{where}, column {column}", value, "a name")
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)) and math.isfinite(value):
        return str(int(value)) if float(value).is_integer() else repr(float(value))
    raise NetworkError(FUNCTION, f"{where}, column {column}", value, "a name")


def _number(value, where: str, column: str, unit: str = ""):
    """A finite float from a cell, or a NetworkError naming the cell."""
    allowed = "a number" + (f" in {unit}" if unit else "")
    if _blank(value):
        raise NetworkError(FUNCTION, f"{where}, column {column}", None, allowed)
    if isinstance(value, (bool, np.bool_)):
        raise NetworkError(FUNCTION, f"{where}, column {column}", value, allowed + ", not a logical value")
    if isinstance(value, str):
        raise NetworkError(FUNCTION, f"{where}, column {column}", value, allowed + ", not text")
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise NetworkError(FUNCTION, f"{where}, column {column}", value, allowed) from None
    if not math.isfinite(number):
        raise NetworkError(FUNCTION, f"{where}, column {column}", number, "a finite number")
    return number


def _parameter(param: _Param, value, where: str, column: str):
    column = f"{column} ({param.label})"
    if _blank(value):
        if param.optional:
            return param.default
        if param.check in ("facing", "gas"):
            raise NetworkError(FUNCTION, f"{where}, column {column}", None,
                               '"up" or "down"' if param.check == "facing" else "a gas name")
    if param.check == "facing":
        if not isinstance(value, str) or value.strip().lower() not in ("up", "down"):
            raise NetworkError(FUNCTION, f"{where}, column {column}", value, '"up" or "down"')
        return value.strip().lower()
    if param.check == "gas":
        if not isinstance(value, str):
            raise NetworkError(FUNCTION, f"{where}, column {column}", value, "a gas name")
        return _gas_key(value)
    number = _number(value, where, column, param.unit)
    unit = f" {param.unit}" if param.unit else ""
    if param.check == "positive" and not number > 0:
        raise NetworkError(FUNCTION, f"{where}, column {column}", number, f"> 0{unit}")
    if param.check == "emissivity" and not 0 < number <= 1:
        raise NetworkError(FUNCTION, f"{where}, column {column}", number, "in (0, 1]")
    if param.check == "plate-tilt" and not 0 <= number <= 90:
        raise NetworkError(FUNCTION, f"{where}, column {column}", number, "in [0, 90]°")
    if param.check == "cavity-tilt" and not 0 <= number <= 180:
        raise NetworkError(FUNCTION, f"{where}, column {column}", number, "in [0, 180]°")
    return number


def _gas_key(gas: str) -> str:
    """Gas text normalised for the cache key (case and spaces do not change the gas)."""
    return ", ".join(part.strip() for part in gas.strip().lower().split(","))


@dataclass(frozen=True)
class _Branch:
    row: int
    name: str
    source: str
    target: str
    kind: str
    params: tuple
    method: str

    @property
    def where(self) -> str:
        return f"branch row {self.row} ({self.name})"


def _parse_branches(table) -> tuple[_Branch, ...]:
    branches: list[_Branch] = []
    seen: dict[str, int] = {}
    for number, row in _rows(table, "branches", len(BRANCH_COLUMNS), BRANCH_COLUMNS):
        where = f"branch row {number}"
        name = _name(row[0], where, "name")
        where = f"branch row {number} ({name})"
        if name in seen:
            raise NetworkError(FUNCTION, f"{where}, column name", name,
                               f"unique (row {seen[name]} has the same name)")
        seen[name] = number
        source = _name(row[1], where, "from")
        target = _name(row[2], where, "to")
        if source == target:
            raise NetworkError(FUNCTION, f"{where}, column to", target,
                               "a node other than its from node")
        kind_cell = row[3]
        kind = kind_cell.strip().lower() if isinstance(kind_cell, str) else kind_cell
        if kind not in BRANCH_KINDS:
            raise NetworkError(FUNCTION, f"{where}, column kind", kind_cell,
                               "one of " + ", ".join(BRANCH_KINDS))
        spec = BRANCH_KINDS[kind]
        params = []
        for position in range(5):
            column = f"p{position + 1}"
            value = row[4 + position]
            if position >= len(spec):
                if not _blank(value):
                    raise NetworkError(FUNCTION, f"{where}, column {column}", value,
                                       f"blank for kind {kind} (it uses p1..p{len(spec)})")
                continue
            params.append(_parameter(spec[position], value, where, column))
        method = _method(kind, row[9], where)
        branches.append(_Branch(number, name, source, target, kind, tuple(params), method))
    if not branches:
        raise NetworkError(FUNCTION, "branches", _Shown("no rows"), "at least one branch row")
    return tuple(branches)


def _method(kind: str, value, where: str) -> str:
    if kind not in CONVECTION_KINDS:
        if not _blank(value):
            raise NetworkError(FUNCTION, f"{where}, column method", value,
                               f"blank for kind {kind} (it has no correlation)")
        return ""
    if _blank(value):
        return "auto"
    allowed = ["auto"] + methods_for(kind)   # convection kinds are named as the registry's geometries
    if not isinstance(value, str) or value.strip().lower() not in allowed:
        raise NetworkError(FUNCTION, f"{where}, column method", value,
                           "blank or one of " + ", ".join(f'"{m}"' for m in allowed))
    return value.strip().lower()


@dataclass(frozen=True)
class _Boundary:
    row: int
    node: str
    kind: str     # "T" or "Q"
    value: float


def _parse_boundaries(table) -> tuple[_Boundary, ...]:
    result = []
    for number, row in _rows(table, "boundaries", len(BOUNDARY_COLUMNS), BOUNDARY_COLUMNS):
        where = f"boundary row {number}"
        node = _name(row[0], where, "node")
        where = f"boundary row {number} ({node})"
        kind_cell = row[1]
        kind = kind_cell.strip().upper() if isinstance(kind_cell, str) else None
        if kind not in ("T", "Q"):
            raise NetworkError(FUNCTION, f"{where}, column T or Q", kind_cell,
                               '"T" (fixed temperature, °C) or "Q" (heat input, W)')
        unit = "°C" if kind == "T" else "W"
        value = _number(row[2], where, "value", unit)
        if kind == "T" and not value > ABSOLUTE_ZERO_C:
            raise NetworkError(FUNCTION, f"{where}, column value", value, "above -273.15 °C")
        result.append(_Boundary(number, node, kind, value))
    return tuple(result)


# --------------------------------------------------------------------------------------------
# The network compiled for evaluation


@dataclass
class _Group:
    """Convection branches sharing one vectorised correlation call."""

    kind: str
    facing: str | None
    method: str
    gas: str
    index: np.ndarray          # positions in the branch list
    length: np.ndarray         # m: height, length, diameter or gap
    area: np.ndarray
    tilt: np.ndarray | None    # plate tilt from vertical or cavity tilt from horizontal
    height: np.ndarray | None  # cavity height


@dataclass
class _Network:
    branches: tuple[_Branch, ...]
    nodes: tuple[str, ...]
    source: np.ndarray
    target: np.ndarray
    free: np.ndarray               # indices of solved nodes
    fixed: np.ndarray              # indices of fixed nodes
    fixed_t: np.ndarray
    heat_input: np.ndarray         # W at every node
    linear_index: np.ndarray
    linear_g: np.ndarray           # W/K
    radiation_index: np.ndarray
    radiation_af: np.ndarray       # m², area times exchange factor
    radiation_factor: np.ndarray
    groups: list[_Group]
    gas: str
    pressure: float
    property_temperature: float | None
    ideal_expansion: bool
    property_evaluations: int = 0


def _compile(branches, boundaries, gas, pressure, property_temperature, ideal_expansion) -> _Network:
    nodes = list(dict.fromkeys(n for b in branches for n in (b.source, b.target)))
    index = {n: i for i, n in enumerate(nodes)}

    fixed_rows: dict[str, _Boundary] = {}
    heat_input = np.zeros(len(nodes))
    for bound in boundaries:
        if bound.node not in index:
            raise NetworkError(FUNCTION, f"boundary row {bound.row}, column node", bound.node,
                               "a node that some branch connects")
        if bound.kind == "T":
            if bound.node in fixed_rows:
                raise NetworkError(FUNCTION, f"boundary row {bound.row} ({bound.node}), column node",
                                   bound.node, f"fixed only once (row {fixed_rows[bound.node].row} "
                                               "already fixes its temperature)")
            fixed_rows[bound.node] = bound
    for bound in boundaries:
        if bound.kind == "Q":
            if bound.node in fixed_rows:
                raise NetworkError(FUNCTION, f"boundary row {bound.row} ({bound.node}), column T or Q",
                                   "Q", f'"T" only: the node\'s temperature is fixed by row '
                                        f'{fixed_rows[bound.node].row}, so a heat input there would '
                                        "have no effect")
            heat_input[index[bound.node]] += bound.value

    source = np.array([index[b.source] for b in branches])
    target = np.array([index[b.target] for b in branches])
    _check_grounded(nodes, branches, source, target, fixed_rows)

    fixed = np.array([index[n] for n in fixed_rows], dtype=int)
    free = np.array([i for i, n in enumerate(nodes) if n not in fixed_rows], dtype=int)

    linear_index, linear_g = [], []
    radiation_index, radiation_af, radiation_factor = [], [], []
    grouped: dict[tuple, list[int]] = {}
    for position, b in enumerate(branches):
        p = b.params
        if b.kind == "conduction":
            linear_index.append(position)
            linear_g.append(p[1] * p[2] / p[0])
        elif b.kind == "resistance":
            linear_index.append(position)
            linear_g.append(1.0 / p[0])
        elif b.kind == "film":
            linear_index.append(position)
            linear_g.append(p[0] * p[1])
        elif b.kind == "radiation":
            factor = float(exchange_factor(p[0], p[1], FUNCTION))
            radiation_index.append(position)
            radiation_factor.append(factor)
            radiation_af.append(p[2] * factor)
        else:
            facing = p[2] if b.kind == "hplate" else p[3] if b.kind == "tplate" else None
            branch_gas = (p[4] or gas) if b.kind == "cavity" else gas
            grouped.setdefault((b.kind, facing, b.method, branch_gas), []).append(position)

    groups = []
    for (kind, facing, method, branch_gas), members in grouped.items():
        params = [branches[m].params for m in members]
        column = lambda k: np.array([q[k] for q in params], dtype=float)
        if kind == "cavity":
            group = _Group(kind, None, method, branch_gas, np.array(members), column(0), column(2),
                           column(3), column(1))
        else:
            group = _Group(kind, facing, method, branch_gas, np.array(members), column(0), column(1),
                           column(2) if kind == "tplate" else None, None)
        groups.append(group)

    if groups:
        _check_gases(groups, branches, gas, pressure)

    return _Network(
        branches=branches, nodes=tuple(nodes), source=source, target=target, free=free, fixed=fixed,
        fixed_t=np.array([fixed_rows[nodes[i]].value for i in fixed], dtype=float),
        heat_input=heat_input,
        linear_index=np.array(linear_index, dtype=int), linear_g=np.array(linear_g, dtype=float),
        radiation_index=np.array(radiation_index, dtype=int),
        radiation_af=np.array(radiation_af, dtype=float),
        radiation_factor=np.array(radiation_factor, dtype=float),
        groups=groups, gas=gas, pressure=pressure, property_temperature=property_temperature,
        ideal_expansion=ideal_expansion)


def _check_grounded(nodes, branches, source, target, fixed_rows):
    """Every connected group of nodes needs a fixed temperature, or its balance is singular."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    n = len(nodes)
    graph = coo_matrix((np.ones(len(source)), (source, target)), shape=(n, n))
    count, labels = connected_components(graph, directed=False)
    grounded = {labels[i] for i, name in enumerate(nodes) if name in fixed_rows}
    for label in range(count):
        if label in grounded:
            continue
        members = [nodes[i] for i in range(n) if labels[i] == label]
        rows = [str(b.row) for b in branches if b.source in members or b.target in members]
        listed = ", ".join(repr(m) for m in members)
        raise NetworkError(
            FUNCTION, f"the nodes {listed} (branch rows {', '.join(rows)})",
            _Shown("a group with no fixed temperature (its energy balance is singular)"),
            "connected through branches to a node with a fixed temperature (a boundary row of type T)")


def _check_gases(groups, branches, gas, pressure):
    """Unknown gases are reported by the cell that names them, before any iteration."""
    from .gases import gas_properties

    try:
        gas_properties(gas, 10.0, pressure)
    except InputError as error:
        raise InputError(FUNCTION, "gas" if error.argument == "gas" else error.argument,
                         error.value, error.allowed) from None
    for group in groups:
        if group.gas == gas:
            continue
        try:
            gas_properties(group.gas, 10.0, pressure)
        except InputError as error:
            first = branches[int(group.index[0])]
            raise NetworkError(FUNCTION, f"{first.where}, column p5 (gas)", group.gas,
                               error.allowed) from None


# --------------------------------------------------------------------------------------------
# Evaluation of the branch heat flows and their derivatives


@dataclass
class _Evaluation:
    q: np.ndarray                  # W per branch
    d_source: np.ndarray | None    # dq/dT_from
    d_target: np.ndarray | None    # dq/dT_to
    convection: list               # (group, ConvectionResult at the evaluated point, fallback mask)


def _finite_step(delta_t: np.ndarray) -> np.ndarray:
    # Large enough that a branch at zero difference shows its small-difference conductance,
    # small enough (1e-6 relative) for Newton to converge in a step or two from close by.
    return 1e-4 + 1e-6 * np.abs(delta_t)


def _convect(net: _Network, group: _Group, t1, t2, tile: int):
    """ConvectionResult for the group at surface/underside temperatures t1 and t2."""
    from .convection import ConvectionResult, cavity_convection, plate_case, surface_convection

    length = np.tile(group.length, tile)
    net.property_evaluations += len(t1)
    options = dict(gas=group.gas, pressure=net.pressure, property_temperature=net.property_temperature,
                   ideal_expansion=net.ideal_expansion, function_name=FUNCTION)
    if group.kind == "cavity":
        return cavity_convection(t1, t2, length, np.tile(group.height, tile), tilt=np.tile(group.tilt, tile),
                                 method=group.method, **options), None
    extra = {}
    if group.facing is not None:
        extra["facing"] = group.facing
    if group.tilt is not None:
        extra["tilt"] = np.tile(group.tilt, tile)
    geometry = group.kind
    if group.method == "auto" or not GEOMETRIES[geometry].cases:
        return surface_convection(geometry, t1, t2, length, method=group.method, **extra, **options), None
    # A method chosen for a plate may serve only some cases (hot-up...); while the solution
    # moves, the other cases use "auto" and the branch is flagged.  A flag left at the
    # converged solution is an error (see _check_methods).
    served_cases = CORRELATIONS[(geometry, group.method)].cases
    served = np.isin(plate_case(group.facing, np.subtract(t1, t2)), served_cases) if served_cases \
        else np.ones(len(t1), dtype=bool)
    if served.all():
        return surface_convection(geometry, t1, t2, length, method=group.method, **extra, **options), None
    parts = []
    for mask, method in ((served, group.method), (~served, "auto")):
        if mask.any():
            sub_extra = {k: (v[mask] if isinstance(v, np.ndarray) else v) for k, v in extra.items()}
            parts.append((mask, surface_convection(geometry, t1[mask], t2[mask], length[mask], method=method,
                                                   **sub_extra, **options)))
    return merge_masked(ConvectionResult, parts, (len(t1),)), ~served


def _evaluate(net: _Network, t: np.ndarray, derivatives: bool) -> _Evaluation:
    """Heat flows of every branch at node temperatures ``t`` (°C), optionally with derivatives."""
    nb = len(net.branches)
    q = np.zeros(nb)
    d1 = np.zeros(nb) if derivatives else None
    d2 = np.zeros(nb) if derivatives else None
    t1, t2 = t[net.source], t[net.target]

    li = net.linear_index
    if li.size:
        q[li] = net.linear_g * (t1[li] - t2[li])
        if derivatives:
            d1[li], d2[li] = net.linear_g, -net.linear_g

    ri = net.radiation_index
    if ri.size:
        k1, k2 = t1[ri] + zero_Celsius, t2[ri] + zero_Celsius
        q[ri] = net.radiation_af * SIGMA * (k1 ** 4 - k2 ** 4)
        if derivatives:
            d1[ri] = 4.0 * net.radiation_af * SIGMA * k1 ** 3
            d2[ri] = -4.0 * net.radiation_af * SIGMA * k2 ** 3

    convection = []
    for group in net.groups:
        a, b = t1[group.index], t2[group.index]
        n = len(a)
        if derivatives:
            step = _finite_step(a - b)
            ta, tb = np.concatenate([a, a + step, a]), np.concatenate([b, b, b + step])
            result, flagged = _convect(net, group, ta, tb, 3)
            heat = np.asarray(result.h) * np.tile(group.area, 3) * (ta - tb)
            q[group.index] = heat[:n]
            d1[group.index] = (heat[n:2 * n] - heat[:n]) / step
            d2[group.index] = (heat[2 * n:] - heat[:n]) / step
            convection.append((group, _first(result, n), None if flagged is None else flagged[:n]))
        else:
            result, flagged = _convect(net, group, a, b, 1)
            q[group.index] = np.asarray(result.h) * group.area * (a - b)
            convection.append((group, result, flagged))
    return _Evaluation(q, d1, d2, convection)


def _first(result, n):
    from .convection import ConvectionResult

    return ConvectionResult(**{name: np.asarray(getattr(result, name))[:n]
                               for name in ConvectionResult.__dataclass_fields__})


def _imbalance(net: _Network, q: np.ndarray) -> np.ndarray:
    """Energy imbalance (W) at every node: heat input + inflow - outflow."""
    n = len(net.nodes)
    return (net.heat_input + np.bincount(net.target, q, minlength=n)
            - np.bincount(net.source, q, minlength=n))


def _tolerance(net: _Network, q: np.ndarray) -> float:
    scale = max(np.max(np.abs(q), initial=0.0), np.max(np.abs(net.heat_input), initial=0.0), 1.0)
    return RELATIVE_TOLERANCE * scale


# --------------------------------------------------------------------------------------------
# The solver


class _Solver:
    def __init__(self, net: _Network):
        self.net = net
        self.iterations = 0
        self.best = None          # (norm, t, evaluation)
        self.failure = ""         # text of the last evaluation that could not be done

    def temperatures(self, x: np.ndarray) -> np.ndarray:
        t = np.empty(len(self.net.nodes))
        t[self.net.fixed] = self.net.fixed_t
        t[self.net.free] = x
        return t

    def evaluate(self, x, derivatives=True):
        """(evaluation, free-node residual) or None where the branches cannot be evaluated
        (a temperature outside the gas-property range, for instance)."""
        t = self.temperatures(x)
        if np.any(t <= ABSOLUTE_ZERO_C) or not np.all(np.isfinite(t)):
            self.failure = "a node temperature fell to absolute zero"
            return None
        try:
            evaluation = _evaluate(self.net, t, derivatives)
        except StillairError as error:
            self.failure = str(error)
            return None
        residual = _imbalance(self.net, evaluation.q)[self.net.free]
        norm = float(np.max(np.abs(residual), initial=0.0))
        if self.best is None or norm < self.best[0]:
            self.best = (norm, x.copy(), evaluation)
        return evaluation, residual

    def converged(self, evaluation, residual) -> bool:
        return float(np.max(np.abs(residual), initial=0.0)) <= _tolerance(self.net, evaluation.q)

    def jacobian(self, evaluation) -> np.ndarray:
        net = self.net
        n = len(net.nodes)
        full = np.zeros((n, n))
        s, r = net.source, net.target
        np.add.at(full, (r, s), evaluation.d_source)
        np.add.at(full, (r, r), evaluation.d_target)
        np.add.at(full, (s, s), -evaluation.d_source)
        np.add.at(full, (s, r), -evaluation.d_target)
        return full[np.ix_(net.free, net.free)]

    def nominal_start(self) -> np.ndarray:
        """Free-node temperatures of the network with nominal, temperature-independent conductances.

        Linear branches exact; radiation 4 F sigma Tm^3 at the mean fixed temperature; surfaces a
        typical still-air coefficient and cavities 1.5 k/gap (common practice values).  These
        only place the start: the correlations take over at the first Newton evaluation, and
        costing no correlation call here keeps small networks fast."""
        net = self.net
        t_mean = float(np.mean(net.fixed_t))
        conductance = np.zeros(len(net.branches))
        conductance[net.linear_index] = net.linear_g
        conductance[net.radiation_index] = 4.0 * net.radiation_af * SIGMA * (t_mean + zero_Celsius) ** 3
        for group in net.groups:
            h = NOMINAL_CAVITY_NU * NOMINAL_CONDUCTIVITY / group.length if group.kind == "cavity" \
                else NOMINAL_SURFACE_H
            conductance[group.index] = h * group.area
        return self.linear_solve(conductance)

    def linear_solve(self, conductance: np.ndarray) -> np.ndarray:
        net = self.net
        n = len(net.nodes)
        s, r = net.source, net.target
        laplacian = np.zeros((n, n))
        np.add.at(laplacian, (s, s), conductance)
        np.add.at(laplacian, (r, r), conductance)
        np.add.at(laplacian, (s, r), -conductance)
        np.add.at(laplacian, (r, s), -conductance)
        free, fixed = net.free, net.fixed
        rhs = net.heat_input[free] - laplacian[np.ix_(free, fixed)] @ net.fixed_t
        matrix = laplacian[np.ix_(free, free)]
        try:
            return np.linalg.solve(matrix, rhs)
        except np.linalg.LinAlgError:
            # A free node joined only by branches whose nominal coefficient is zero.
            return np.linalg.lstsq(matrix, rhs, rcond=None)[0]

    def step(self, evaluation, residual) -> np.ndarray:
        jac = self.jacobian(evaluation)
        try:
            dx = np.linalg.solve(jac, -residual)
        except np.linalg.LinAlgError:
            dx = np.linalg.lstsq(jac, -residual, rcond=None)[0]
        return dx

    def newton(self, x, state):
        if state is None:
            return None, x
        evaluation, residual = state
        for _ in range(MAX_NEWTON_ITERATIONS):
            if self.converged(evaluation, residual):
                return (evaluation, residual), x
            dx = self.step(evaluation, residual)
            if not np.all(np.isfinite(dx)):
                break
            absolute = x + zero_Celsius
            falling = dx < 0
            lam = 1.0
            if falling.any():
                # never more than halve an absolute temperature in one step
                lam = min(1.0, float(np.min(0.5 * absolute[falling] / -dx[falling])))
            norm = float(np.linalg.norm(residual))
            self.iterations += 1
            accepted = False
            while lam > 1e-6:
                trial = self.evaluate(x + lam * dx)
                if trial is not None and (np.linalg.norm(trial[1]) < (1.0 - 1e-4 * lam) * norm
                                          or self.converged(*trial)):
                    x = x + lam * dx
                    evaluation, residual = trial
                    accepted = True
                    break
                lam *= 0.5
            if not accepted:
                break
        if self.converged(evaluation, residual):
            return (evaluation, residual), x
        return None, x

    def scipy_root(self, x, method):
        from scipy import optimize  # only when Newton stalls: importing it takes 0.2 s

        def fun(y):
            state = self.evaluate(y)
            if state is None:
                return np.full(len(y), 1e30), np.eye(len(y))
            evaluation, residual = state
            return residual, self.jacobian(evaluation)

        try:
            # tight tolerances: the acceptance test is ours (the energy residual), not scipy's
            options = {"xtol": 1e-14} if method == "hybr" else {"xtol": 1e-14, "ftol": 1e-14}
            solution = optimize.root(fun, x, jac=True, method=method, options=options)
        except (ValueError, np.linalg.LinAlgError):
            return None
        self.iterations += int(getattr(solution, "nfev", 0))
        state = self.evaluate(solution.x)
        if state is not None and self.converged(*state):
            return state, solution.x
        return None

    def solve(self):
        net = self.net
        if net.free.size == 0:
            state = self.evaluate(np.zeros(0))
            if state is None:
                self.fail()
            return state, np.zeros(0), "direct"
        x0 = self.nominal_start()
        start = self.evaluate(x0)
        if start is None:
            # nominal temperatures outside the property range: start from the fixed mean
            x0 = np.full(net.free.size, float(np.mean(net.fixed_t)))
            start = self.evaluate(x0)
        state, x = self.newton(x0, start)
        if state is not None:
            return state, x, "newton"
        for method in ("hybr", "lm"):
            restart = self.best[1] if self.best is not None else x0
            found = self.scipy_root(restart, method)
            if found is not None:
                return found[0], found[1], method
        self.fail()

    def fail(self):
        net = self.net
        if self.best is None:
            raise NetworkConvergenceError(
                f"{FUNCTION}: the branches could not be evaluated at any trial temperature ({self.failure})",
                math.inf, None, self.iterations)
        norm, x, evaluation = self.best
        residual = _imbalance(net, evaluation.q)[net.free]
        worst = net.nodes[int(net.free[int(np.argmax(np.abs(residual)))])]
        tolerance = _tolerance(net, evaluation.q)
        if self.failure:
            hint = (f" The balance needs temperatures where the branches cannot be evaluated "
                    f"({self.failure}): check the heat inputs, areas and coefficients around that node.")
        else:
            hint = (" A correlation that jumps at the edge of its range (method \"auto\") can prevent "
                    "convergence; choosing a method explicitly for the branches at that node may help.")
        raise NetworkConvergenceError(
            f"{FUNCTION}: no converged solution after {self.iterations} iterations: energy residual "
            f"{norm:.3g} W at node {worst!r} (tolerance {tolerance:.3g} W).{hint}",
            norm, worst, self.iterations)


# --------------------------------------------------------------------------------------------
# Results


@dataclass(frozen=True)
class BranchResult:
    """One branch at the solution.  h is per unit area (nan for a resistance branch);
    R = (T_from - T_to) / q in K/W (its zero-difference limit 1/(h A) when the temperatures are
    equal); Ra, Nu, Pr and t_film are nan for branches without a correlation."""

    name: str
    kind: str
    source: str
    target: str
    heat: float
    delta_t: float
    h: float
    R: float
    area: float
    Ra: float
    Nu: float
    Pr: float
    t_film: float
    method: str
    case: str
    note: str
    in_range: bool

    def __getitem__(self, key):
        return getattr(self, key)


@dataclass(frozen=True)
class NetworkResult:
    """The converged network.  Immutable: repeated solves of the same tables share it."""

    temperatures: Mapping[str, float]     # node -> °C
    heat: Mapping[str, float]             # branch -> W, positive from -> to
    branches: Mapping[str, BranchResult]  # branch -> record
    heat_inputs: Mapping[str, float]      # free node -> W (zero where none is given)
    iterations: int
    residual: float                       # W, largest nodal imbalance
    tolerance: float                      # W, what the residual had to be below
    property_evaluations: int             # film-temperature property look-ups, all iterations
    notes: tuple[str, ...]                # every out-of-range use, "branch <name>: <note>"
    solver: str                           # "newton", "hybr", "lm" or "direct"
    fixed: tuple[str, ...] = field(default=())  # nodes with a fixed temperature

    def balance(self) -> dict[str, float]:
        """Energy imbalance (W) at every solved node, recomputed from the reported values."""
        totals = {node: self.heat_inputs.get(node, 0.0) for node in self.temperatures if node not in self.fixed}
        for record in self.branches.values():
            if record.target in totals:
                totals[record.target] += record.heat
            if record.source in totals:
                totals[record.source] -= record.heat
        return totals


def _records(net: _Network, t: np.ndarray, evaluation: _Evaluation):
    q = evaluation.q
    t1, t2 = t[net.source], t[net.target]
    nan = math.nan
    records: dict[int, dict] = {}
    for position, b in enumerate(net.branches):
        delta = float(t1[position] - t2[position])
        records[position] = dict(name=b.name, kind=b.kind, source=b.source, target=b.target,
                                 heat=float(q[position]), delta_t=delta, Ra=nan, Nu=nan, Pr=nan,
                                 t_film=nan, case="", note="", in_range=True)
    for position, g in zip(net.linear_index, net.linear_g):
        b = net.branches[position]
        p = b.params
        if b.kind == "conduction":
            h, area = p[1] / p[0], p[2]
        elif b.kind == "film":
            h, area = p[0], p[1]
        else:  # a resistance has no area of its own
            h, area = nan, nan
        records[position].update(h=h, R=float(1.0 / g), area=area, method=b.kind)
    for position, factor in zip(net.radiation_index, net.radiation_factor):
        k1, k2 = t1[position] + zero_Celsius, t2[position] + zero_Celsius
        h = factor * SIGMA * (k1 ** 2 + k2 ** 2) * (k1 + k2)   # exact linearised, see radiation.py
        area = net.branches[position].params[2]
        method = "grey parallel surfaces" if net.branches[position].params[1] is not None else \
            "grey surface to large surroundings"
        records[position].update(h=float(h), R=float(1.0 / (h * area)), area=area, method=method)
    notes = []
    for group, result, flagged in evaluation.convection:
        for k, position in enumerate(group.index):
            h = float(result.h[k])
            area = float(group.area[k])
            conductance = h * area
            records[position].update(
                h=h, R=(1.0 / conductance) if conductance > 0 else math.inf, area=area,
                Ra=float(result.ra[k]), Nu=float(result.nu[k]), Pr=float(result.pr[k]),
                t_film=float(result.t_film[k]), method=str(result.method[k]), case=str(result.case[k]),
                note=str(result.note[k] or ""), in_range=bool(result.in_range[k]))
            if flagged is not None and flagged[k]:
                b = net.branches[position]
                raise NetworkError(
                    FUNCTION, f"{b.where}, column method", b.method,
                    f"a method for case {result.case[k]} at the solution (the surface is "
                    f"{'hotter' if records[position]['delta_t'] >= 0 else 'colder'} than the fluid); "
                    "allowed: " + ", ".join(methods_for(b.kind, str(result.case[k]))) + " or blank")
            if records[position]["note"]:
                notes.append(f"branch {net.branches[position].name}: {records[position]['note']}")
    ordered = {net.branches[p].name: BranchResult(**records[p]) for p in range(len(net.branches))}
    return ordered, tuple(notes)


# --------------------------------------------------------------------------------------------
# The public function and its cache

_CACHE: "OrderedDict[tuple, NetworkResult]" = OrderedDict()
_CACHE_SIZE = 256


_RAW_CACHE: "OrderedDict[tuple, NetworkResult]" = OrderedDict()


def clear_network_cache() -> None:
    """Forget every cached network solution."""
    _CACHE.clear()
    _RAW_CACHE.clear()


def solve_network(branches, boundaries, gas="air", pressure=DEFAULT_PRESSURE, *,
                  property_temperature=None, ideal_expansion=False, use_cache=True) -> NetworkResult:
    """Solve a thermal network given as the two sheet tables (see the module docstring).

    ``branches``: rows ``name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method``;
    ``boundaries``: rows ``node | T or Q | value``.  Rows are lists of values; blank cells are
    None or "" and short rows are padded; blank rows and a leading header row are skipped.
    ``gas`` and ``pressure`` (Pa) apply to every convection branch (a cavity may name its own
    gas in p5).  ``property_temperature`` (°C) evaluates every gas property at that one
    temperature instead of each branch's film temperature; ``ideal_expansion`` uses
    beta = 1/T.  Radiation stays the exact fourth-power exchange in every case.

    Returns an immutable :class:`NetworkResult`; identical calls return the cached result.
    Raises :class:`NetworkError` (an :class:`~stillair.validity.InputError`) naming the table,
    row and column of a bad input, and :class:`NetworkConvergenceError` when the balances
    cannot be closed.
    """
    raw_key = _raw_key(branches, boundaries, gas, pressure, property_temperature, ideal_expansion)
    if use_cache and raw_key is not None and raw_key in _RAW_CACHE:
        return _RAW_CACHE[raw_key]
    parsed_branches = _parse_branches(branches)
    parsed_boundaries = _parse_boundaries(boundaries)
    if not isinstance(gas, str) or not gas.strip():
        raise InputError(FUNCTION, "gas", gas, "a gas name")
    pressure = _checked_option("pressure", pressure, "Pa", positive=True)
    if property_temperature is not None:
        property_temperature = _checked_option("property_temperature", property_temperature, "°C")
        if property_temperature <= ABSOLUTE_ZERO_C:
            raise InputError(FUNCTION, "property_temperature", property_temperature, "above -273.15 °C")
    key = (parsed_branches, parsed_boundaries, _gas_key(gas), pressure, property_temperature,
           bool(ideal_expansion))
    if use_cache and key in _CACHE:
        _CACHE.move_to_end(key)
        _remember(_RAW_CACHE, raw_key, _CACHE[key])
        return _CACHE[key]

    net = _compile(parsed_branches, parsed_boundaries, _gas_key(gas), pressure, property_temperature,
                   bool(ideal_expansion))
    solver = _Solver(net)
    (evaluation, residual), x, how = solver.solve()
    t = solver.temperatures(x)
    records, notes = _records(net, t, evaluation)
    result = NetworkResult(
        temperatures=MappingProxyType({node: float(t[i]) for i, node in enumerate(net.nodes)}),
        heat=MappingProxyType({name: record.heat for name, record in records.items()}),
        branches=MappingProxyType(records),
        heat_inputs=MappingProxyType({net.nodes[i]: float(net.heat_input[i]) for i in net.free}),
        iterations=solver.iterations,
        residual=float(np.max(np.abs(residual), initial=0.0)),
        tolerance=_tolerance(net, evaluation.q),
        property_evaluations=net.property_evaluations,
        notes=notes, solver=how, fixed=tuple(net.nodes[i] for i in net.fixed))
    if use_cache:
        _remember(_CACHE, key, result)
        _remember(_RAW_CACHE, raw_key, result)
    return result


def _remember(cache, key, result):
    if key is None:
        return
    cache[key] = result
    cache.move_to_end(key)
    if len(cache) > _CACHE_SIZE:
        cache.popitem(last=False)


def _raw_key(branches, boundaries, *options):
    """The tables exactly as given, with each cell's type (True is not 1), or None when they
    are not plain rows of hashable cells.  Lets a recalculating sheet skip even the parsing."""
    try:
        frozen = tuple(tuple(tuple((type(v), v) for v in row) for row in table)
                       for table in (branches, boundaries))
        key = (frozen,) + tuple((type(v), v) for v in options)
        hash(key)
    except TypeError:
        return None
    return key


def _checked_option(name, value, unit, positive=False) -> float:
    if value is None or isinstance(value, (bool, np.bool_, str)):
        raise InputError(FUNCTION, name, value, f"a number in {unit}")
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise InputError(FUNCTION, name, value, f"a number in {unit}") from None
    if not math.isfinite(number) or (positive and not number > 0):
        raise InputError(FUNCTION, name, number, f"> 0 {unit}" if positive else "a finite number")
    return number
