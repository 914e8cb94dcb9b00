"""Thermal networks: nodes joined by conduction, convection, cavity, radiation and airflow branches.

A network is two tables, exactly as a spreadsheet holds them:

* branches, one row per branch:  name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method
* boundaries, one row per condition:  node | T or Q | value

A ``T`` row fixes a node's temperature (°C); a ``Q`` row adds a heat input (W) at a node whose
temperature is solved (several ``Q`` rows at one node add up).  Every node without a fixed
temperature obeys its energy balance

    Q_i + sum over branches into i of q_b - sum over branches out of i of q_b = 0,

with q_b the branch's heat flow, positive from ``from`` to ``to``.  For the convection kinds
``from`` is the solid surface and ``to`` the fluid; for a cavity ``from`` is the surface on the
layer's underside (see :func:`stillair.convection.cavity_convection`).  The kinds, their columns
and heat flows are data (:data:`BRANCH_KINDS`, :func:`kind_reference`); the convection kinds
are the correlation registry's geometries.

The package, by concern:

* :mod:`.reading`, :mod:`.tables`: the cells and the tables, with every check;
* :mod:`.kinds`: the branch kinds (columns, heat flow, derivatives);
* :mod:`.model`: the compiled network and its evaluation;
* :mod:`.solver`: Newton with scaled residuals, scipy fallbacks, the acceptance test;
* :mod:`.results`: what the user reads; :mod:`.band`: the correlation band;
* :mod:`.transient`: the network through time (node capacities, boundaries from series).

Every evaluation re-computes each convection branch's gas properties at its own film
temperature (or at ``property_temperature``) and its correlation at its own temperature
difference; horizontal and tilted plates take hot-up/hot-down/cold-up/cold-down from the sign
of that difference.  At a zero difference a branch keeps its correlation's finite limit.
"""

from __future__ import annotations

import contextlib
import dataclasses
import gc
from collections import OrderedDict
from collections.abc import Sequence, Sized
from types import MappingProxyType
from typing import Any

from ..groups import DEFAULT_PRESSURE
from ..validity import ABSOLUTE_ZERO_C, InputError
from .band import solve_band
from .errors import FUNCTION, NetworkConvergenceError, NetworkError
from .kinds import BRANCH_KINDS, kind_reference
from .model import compile_network
from .reading import gas_key, option_number
from .results import BranchResult, NetworkResult
from .solver import Solver
from .tables import BOUNDARY_COLUMNS, BRANCH_COLUMNS, parse_boundaries, parse_branches
from .inverse import HeatForTemperature, heat_for_temperature
from .transient import CAPACITY_COLUMNS, SERIES_COLUMNS, TransientResult, solve_transient

__all__ = [
    "NetworkError",
    "NetworkConvergenceError",
    "NetworkResult",
    "BranchResult",
    "BRANCH_KINDS",
    "BRANCH_COLUMNS",
    "BOUNDARY_COLUMNS",
    "kind_reference",
    "solve_network",
    "clear_network_cache",
    "heat_for_temperature",
    "HeatForTemperature",
    # the network through time (transient.py)
    "solve_transient", "TransientResult", "CAPACITY_COLUMNS", "SERIES_COLUMNS",
]

_CACHE: "OrderedDict[tuple, NetworkResult]" = OrderedDict()
_RAW_CACHE: "OrderedDict[tuple, NetworkResult]" = OrderedDict()
_CACHE_SIZE = 256


def clear_network_cache() -> None:
    """Forget every cached network solution.

    :func:`solve_network` keeps the last 256 solutions and returns the stored result for
    identical tables and options; clearing is only needed to measure solve times or to free
    memory (a cached result is immutable and never stale).

    Returns
    -------
    None

    Notes
    -----
    A least-recently-used cache of :class:`NetworkResult` keyed on the parsed tables and the
    options (common practice for repeated spreadsheet recalculation).

    Examples
    --------
    >>> clear_network_cache()
    """
    _CACHE.clear()
    _RAW_CACHE.clear()


def solve_network(branches: Sequence[Sequence[object]], boundaries: Sequence[Sequence[object]],
                  gas: str = "air", pressure: float = DEFAULT_PRESSURE, *,
                  property_temperature: float | None = None, ideal_expansion: bool = False,
                  use_cache: bool = True, band: bool = False) -> NetworkResult:
    """Solve a thermal network given as the two sheet tables (see the module docstring).

    ``branches``: rows ``name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method``;
    ``boundaries``: rows ``node | T or Q | value``.  Rows are lists of values; blank cells are
    None or "" and short rows are padded; blank rows and a leading header row are skipped.
    ``gas`` and ``pressure`` (Pa) apply to every convection branch (a cavity may name its own
    gas in p5).  ``property_temperature`` (°C) evaluates every gas property at that one
    temperature instead of each branch's film temperature; ``ideal_expansion`` uses
    beta = 1/T.  Radiation stays the exact fourth-power exchange in every case.

    ``band=True`` also solves the network with every convection branch at the lowest and at the
    highest Nu of the correlations that cover it (see :mod:`stillair.network.band`):
    ``result.band[node]`` is then (low, high) in °C, the spread of the published correlations,
    not a confidence interval.

    Parameters
    ----------
    branches : sequence of rows
        One row per branch: ``name | from | to | kind | p1 | p2 | p3 | p4 | p5 | method``; the
        kinds and what their columns p1..p5 hold (with units) are :data:`BRANCH_KINDS`, listed
        by :func:`kind_reference`.
    boundaries : sequence of rows
        One row per condition: ``node | T or Q | value``, a fixed temperature in °C or a heat
        input in W.
    gas : str, default "air"
        Gas of every convection branch, a name or mixture such as "argon:0.9, air:0.1".
    pressure : float, default 101325
        Absolute pressure in Pa of every convection branch.
    property_temperature : float, optional
        One temperature in °C for every gas property instead of each branch's film temperature.
    ideal_expansion : bool, default False
        Use beta = 1/T (ideal gas) instead of the real gas's expansion coefficient.
    use_cache : bool, default True
        Return the stored result of identical tables and options (see
        :func:`clear_network_cache`).
    band : bool, default False
        Also solve with every convection branch at the lowest and highest Nu of its covering
        correlations (``result.band``).

    Returns
    -------
    NetworkResult
        Immutable: ``temperatures`` (node -> °C), ``heat`` (branch -> W, positive from
        ``from`` to ``to``), per-branch records, the residual (W), the solver used, the range
        notes and, with ``band``, the band; identical calls return the cached result.

    Raises
    ------
    NetworkError
        (an :class:`~stillair.validity.InputError`) naming the table, row and column of a bad
        input.
    NetworkConvergenceError
        When the balances cannot be closed.

    Notes
    -----
    The energy balance of each free node (module docstring) is solved by Newton's method on
    scaled residuals, with scipy's ``hybr`` and ``lm`` root finders as fallbacks.  The nodal
    energy-balance method is common practice (e.g. Incropera et al., Fundamentals of Heat and
    Mass Transfer, 6th ed., sec. 4.4, from memory).  Convection branches take Nu from the
    correlation registry (:func:`stillair.nusselt`) at each branch's film temperature, each
    method with its own source and validity; out-of-range use is listed in ``notes``.  The
    ``vent`` and ``airflow`` branches carry outside air through an inside air node,
    q = m cp (T_from - T_to), the vent's mass flow from the stack balance of two openings
    (:func:`stillair.stack_flow`), always with the densities at the two node temperatures
    (``property_temperature`` does not apply to them); their records hold ``mass_flow`` and
    ``volume_flow``.

    Examples
    --------
    >>> result = solve_network([["wall", "in", "out", "resistance", 0.5]],
    ...                        [["in", "Q", 10.0], ["out", "T", 0.0]])
    >>> result.temperatures["in"], result.heat["wall"]
    (5.0, 10.0)
    """
    with _collector_paused(branches):
        return _solve_network(branches, boundaries, gas, pressure, property_temperature, ideal_expansion,
                              use_cache, band)


#: From this many branch rows, the cyclic garbage collector waits until the solve is done.
LARGE_NETWORK = 2000


@contextlib.contextmanager
def _collector_paused(branches):
    """Python's cyclic collector paused while a large network is solved (and resumed however the
    solve ends).  Reading, compiling and reporting 10^4 branches makes a few hundred thousand
    objects that live to the end of the solve, and their count sets off full collections, each
    walking every object of the process: a 10,000-node network spent 0.2 s (a quarter of its
    time) there, which made the cost grow faster than the size.  The solve makes no reference
    cycles, so nothing waits for the collector; reference counting frees everything as usual."""
    pause = isinstance(branches, Sized) and len(branches) >= LARGE_NETWORK and gc.isenabled()
    if pause:
        gc.disable()
    try:
        yield
    finally:
        if pause:
            gc.enable()


def _solve_network(branches, boundaries, gas, pressure, property_temperature, ideal_expansion, use_cache,
                   band) -> NetworkResult:
    band = bool(band)
    raw_key = _raw_key(branches, boundaries, gas, pressure, property_temperature, ideal_expansion, band) \
        if use_cache else None
    if raw_key is not None and raw_key in _RAW_CACHE:
        return _RAW_CACHE[raw_key]
    parsed_branches = parse_branches(branches)
    parsed_boundaries = parse_boundaries(boundaries)
    if not isinstance(gas, str) or not gas.strip():
        raise InputError(FUNCTION, "gas", gas, "a gas name")
    pressure = _checked_option("pressure", pressure, "Pa", positive=True)
    if property_temperature is not None:
        property_temperature = _checked_option("property_temperature", property_temperature, "°C")
        if property_temperature <= ABSOLUTE_ZERO_C:
            raise InputError(FUNCTION, "property_temperature", property_temperature, "above -273.15 °C")
    options: dict[str, Any] = dict(gas=gas_key(gas), pressure=pressure, property_temperature=property_temperature,
                   ideal_expansion=bool(ideal_expansion))
    key = (parsed_branches, parsed_boundaries, *options.values())
    result = _solved(key + (band,), use_cache)
    if result is None:
        result = _solved(key + (False,), use_cache) if band else None   # the nominal solution
        if result is None:
            net = compile_network(parsed_branches, parsed_boundaries, **options)
            solver = Solver(net)
            result = solver.result(*solver.solve())
            if use_cache:
                _remember(_CACHE, key + (False,), result)
        if band:
            low, high = solve_band(parsed_branches, parsed_boundaries, options, result)
            result = dataclasses.replace(
                result, band_solutions=(low, high),
                band=MappingProxyType({node: (min(low.temperatures[node], high.temperatures[node]),
                                              max(low.temperatures[node], high.temperatures[node]))
                                       for node in result.temperatures}))
            if use_cache:
                _remember(_CACHE, key + (True,), result)
    if use_cache:
        _remember(_RAW_CACHE, raw_key, result)
    return result


def _solved(key, use_cache):
    if use_cache and key in _CACHE:
        _CACHE.move_to_end(key)
        return _CACHE[key]
    return None


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
    return option_number(FUNCTION, name, value, unit, positive)
