"""The property table of one gas or mixture: the primary properties on a (T, p) grid,
interpolated, and the tabulation of a pure gas from CoolProp (method in the package docstring)."""

from __future__ import annotations

import bisect
import math
import threading

import numpy as np
from numpy.polynomial import chebyshev

# CoolProp is imported only where a table is computed (_coolprop below): importing it takes
# about 2 s, and the shipped tables make it unnecessary.  scipy.interpolate (0.1-0.2 s) is
# imported only where a spline is fitted (spline_coefficients): the shipped tables carry theirs.

from ..validity import ABSOLUTE_ZERO_C, Range
from .data import GAS_PRESSURE_RANGE, GasData

# Columns of a table: the primary properties, from which everything else is formed.
_PRIMARY = ("density_per_pressure", "viscosity", "conductivity", "cp", "expansion")
_T_STEP = 1.0            # K, grid spacing in temperature (cubic spline)
_PRESSURE_NODES = 6      # Chebyshev nodes over GAS_PRESSURE_RANGE (a degree-5 series in p)


def _pressure_variable(pressure):
    """Pressure mapped onto [-1, 1], the Chebyshev variable of the tables."""
    low, high = GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high
    return (2.0 * np.asarray(pressure, dtype=float) - (high + low)) / (high - low)


_PRESSURE_NODE_X = chebyshev.chebpts1(_PRESSURE_NODES)
_PRESSURE_NODE_VALUES = (0.5 * (GAS_PRESSURE_RANGE.high + GAS_PRESSURE_RANGE.low)
                         + 0.5 * (GAS_PRESSURE_RANGE.high - GAS_PRESSURE_RANGE.low) * _PRESSURE_NODE_X)


def spline_coefficients(t_kelvin: np.ndarray, values: np.ndarray) -> np.ndarray:
    """The table's interpolant as piecewise-cubic coefficients, fitted with scipy.

    ``values[i, j, :]``: the primaries at ``t_kelvin[i]`` and the j-th pressure node.  In
    pressure each column becomes a Chebyshev series through the nodes; in temperature the
    series' coefficients get a not-a-knot cubic spline (``scipy.interpolate.CubicSpline``).
    Returns its ``c``, shape ``(4, intervals, pressure nodes, primaries)``, highest power
    first: what the shipped file stores (``<gas>.spline``), so that evaluating a shipped table
    needs numpy only.
    """
    from scipy.interpolate import CubicSpline  # 0.1-0.2 s to import: only where a table is fitted

    return CubicSpline(t_kelvin, chebyshev_columns(values), axis=0).c


def chebyshev_columns(values: np.ndarray) -> np.ndarray:
    """The values at the pressure nodes turned into Chebyshev series in pressure: ``[i, k, :]``
    the k-th series coefficient of the primaries at the i-th temperature."""
    flat = values.transpose(1, 0, 2).reshape(_PRESSURE_NODES, -1)
    coefficients = chebyshev.chebfit(_PRESSURE_NODE_X, flat, _PRESSURE_NODES - 1)
    return coefficients.reshape(_PRESSURE_NODES, len(values), len(_PRIMARY)).transpose(1, 0, 2)


def piecewise_cubic(breaks: np.ndarray, coefficients: np.ndarray, t) -> np.ndarray:
    """A piecewise cubic at ``t``: ``coefficients[:, k]`` (highest power first) on
    ``breaks[k] <= t < breaks[k + 1]``, the last piece closed and both end pieces extended, as
    ``scipy.interpolate.PPoly`` evaluates it -- the same sum in the same order
    ((c3 + c2 s) + c1 s^2) + c0 s^3, so the same bits.  Shape ``shape(t) + coefficients.shape[2:]``.
    """
    t = np.asarray(t, dtype=float)
    interval = np.clip(np.searchsorted(breaks, t, side="right") - 1, 0, len(breaks) - 2)
    s = (t - breaks[interval]).reshape(t.shape + (1,) * (coefficients.ndim - 2))
    s2 = s * s
    piece = coefficients[:, interval]
    return ((piece[3] + piece[2] * s) + piece[1] * s2) + piece[0] * (s2 * s)


class _PiecewiseCubic:
    """A piecewise cubic in T (:func:`piecewise_cubic`): the table at one pressure."""

    __slots__ = ("x", "c")

    def __init__(self, breaks: np.ndarray, coefficients: np.ndarray):
        self.x, self.c = breaks, coefficients

    def __call__(self, t) -> np.ndarray:
        return piecewise_cubic(self.x, self.c, t)


class _PropertyTable:
    """The primary properties of one gas or mixture on a (T, p) grid, interpolated.

    In temperature a not-a-knot cubic spline on a 1 K grid; in pressure a Chebyshev series
    through ``_PRESSURE_NODES`` Chebyshev points of the pressure band (:func:`spline_coefficients`).
    Density is tabulated as rho/p, which is nearly constant in p, so that its relative error
    stays small down to 1 kPa.  For one pressure the series is summed once into a plain
    piecewise cubic in T (:meth:`at_pressure`, cached), which is what scalar calls and arrays
    at one pressure use.  Evaluation is numpy only; scipy fits the spline where no stored
    coefficients are given (a mixture, a gas computed from CoolProp).

    Largest interpolation error found (tests): 6e-7 relative, in SF6 conductivity at 200 kPa
    next to 478 K, where CoolProp's critical-enhancement term ends with a slope discontinuity
    the spline rounds off; elsewhere below 5e-8.
    """

    def __init__(self, t_kelvin: np.ndarray, values: np.ndarray, coefficients: np.ndarray | None = None):
        """``values[i, j, :]``: primaries at ``t_kelvin[i]`` and the j-th pressure node;
        ``coefficients``: their :func:`spline_coefficients` if stored (else fitted here)."""
        self.t_kelvin = t_kelvin
        self.coefficients = spline_coefficients(t_kelvin, values) if coefficients is None else coefficients
        self._slices: dict = {}  # pressure -> _PiecewiseCubic
        self._breaks = t_kelvin.tolist()  # for bisect in :meth:`at_point`
        self._last_interval = len(self._breaks) - 2
        self._point_coefficients: dict = {}    # pressure -> nested lists, for :meth:`at_point`

    def evaluate(self, t_kelvin, pressure) -> np.ndarray:
        """Primaries, shape ``broadcast(t, p).shape + (5,)``; inputs already checked."""
        pressure = np.asarray(pressure, dtype=float)
        if pressure.ndim == 0 or np.all(pressure == pressure.flat[0]):
            values = self.at_pressure(float(pressure.flat[0]))(t_kelvin)
            shape = np.broadcast_shapes(np.shape(t_kelvin), pressure.shape)
            return np.broadcast_to(values, shape + (len(_PRIMARY),))
        basis = chebyshev.chebvander(_pressure_variable(pressure), _PRESSURE_NODES - 1)
        coefficients = piecewise_cubic(self.t_kelvin, self.coefficients, t_kelvin)
        return np.einsum("...k,...kq->...q", basis, coefficients)

    def at_pressure(self, pressure: float) -> _PiecewiseCubic:
        """The table at one pressure: a piecewise cubic in T (exactly the spline's values)."""
        piece = self._slices.get(pressure)
        if piece is None:
            x = float(_pressure_variable(pressure))
            basis = chebyshev.chebvander(x, _PRESSURE_NODES - 1)[0]
            piece = _PiecewiseCubic(self.t_kelvin, np.tensordot(self.coefficients, basis, axes=([2], [0])))
            if len(self._slices) >= 64:  # a bounded cache; pressures rarely vary much
                self._slices.clear()
            self._slices[pressure] = piece
        return piece

    def _coefficient_lists(self, pressure: float) -> list:
        """:meth:`at_pressure`'s coefficients as nested lists, ``[interval][primary][power]``
        (highest power first), made once per pressure: indexing a list costs far less than
        slicing the array for one point."""
        lists = self._point_coefficients.get(pressure)
        if lists is None:
            lists = self.at_pressure(pressure).c.transpose(1, 2, 0).tolist()
            if len(self._point_coefficients) >= 64:
                self._point_coefficients.clear()
            self._point_coefficients[pressure] = lists
        return lists

    def at_point(self, t_kelvin: float, pressure: float) -> list[float]:
        """The primaries at one in-range point, as floats: :meth:`at_pressure`'s cubic summed in
        plain Python in the same order as :func:`piecewise_cubic` (the same values), without
        the call overhead of numpy's array machinery, which costs more than the cubic for one
        point."""
        # PPoly's interval: the last breakpoint <= t, the right end belonging to the last piece
        breaks = self._breaks
        interval = bisect.bisect_right(breaks, t_kelvin) - 1
        if interval < 0:        # comparisons, not min(max(...)): two calls fewer on every state
            interval = 0
        elif interval > self._last_interval:
            interval = self._last_interval
        s = t_kelvin - breaks[interval]
        s2 = s * s
        s3 = s2 * s
        lists = self._point_coefficients.get(pressure) or self._coefficient_lists(pressure)
        return [((c0 + c1 * s) + c2 * s2) + c3 * s3 for c3, c2, c1, c0 in lists[interval]]


def _temperature_grid(t_range: Range) -> np.ndarray:
    low_k, high_k = t_range.low - ABSOLUTE_ZERO_C, t_range.high - ABSOLUTE_ZERO_C
    return np.linspace(low_k, high_k, int(math.ceil((high_k - low_k) / _T_STEP)) + 1)


def _coolprop():
    """The CoolProp module, imported on first need (about 2 s, hence not at the top)."""
    import CoolProp
    return CoolProp


def _tabulate(gas: GasData) -> np.ndarray:
    """``values[i, j, :]``: the primaries of a pure gas at the i-th grid temperature and the j-th
    pressure node, straight from CoolProp (and the ISO fits)."""
    coolprop = _coolprop()
    state = coolprop.AbstractState("HEOS", gas.coolprop_fluid)
    state.specify_phase(coolprop.iphase_gas)  # the whole table lies in the vapour region
    return np.array([[_direct(gas, state, t, p) for p in _PRESSURE_NODE_VALUES]
                     for t in _temperature_grid(gas.t_range)])


def _direct(gas: GasData, state, t_kelvin: float, pressure: float) -> list[float]:
    """The primary properties straight from CoolProp (and the ISO fits), no interpolation."""
    state.update(_coolprop().PT_INPUTS, pressure, t_kelvin)
    viscosity = float(gas.viscosity_fit(t_kelvin)) if gas.viscosity_fit else state.viscosity()
    conductivity = (float(gas.conductivity_fit(t_kelvin)) if gas.conductivity_fit
                    else state.conductivity())
    return [state.rhomass() / pressure, viscosity, conductivity, state.cpmass(),
            state.isobaric_expansion_coefficient()]


# Guards the table caches (state._table) and the reading of the shipped file (shipped._shipped).
_TABLES_LOCK = threading.RLock()
