"""The state of a gas: every property at one (T, p) or arrays of them, from the tables of its
components; the temperature and pressure checks; :func:`gas_properties`."""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .._typing import ArrayLike
from ..validity import (ABSOLUTE_ZERO_C, InputError, PLAIN_NUMBERS, require_between, require_finite,
                        require_positive)
from .data import GAS_PRESSURE_RANGE, GASES, STANDARD_PRESSURE, _gas_doc, _range_lines, _source_lines
from .mixtures import _Mixture, _mix, _mixture, _parse_text
from .shipped import _forget_file, _pure_table
from .tables import _PRESSURE_NODE_VALUES, _TABLES_LOCK, _PropertyTable, _temperature_grid

_TABLES: dict[_Mixture, _PropertyTable] = {}
_MIXTURE_TABLE_LIMIT = 32


def _table(mixture: _Mixture) -> _PropertyTable:
    """The table of a pure gas or a mixture, built on first use and kept."""
    table = _TABLES.get(mixture)
    if table is None:
        with _TABLES_LOCK:
            table = _TABLES.get(mixture)
            if table is None:
                if mixture.is_pure:
                    table = _pure_table(GASES[mixture.components[0][0]])
                else:
                    mixtures = [key for key in _TABLES if not key.is_pure]
                    if len(mixtures) >= _MIXTURE_TABLE_LIMIT:
                        del _TABLES[mixtures[0]]  # the oldest mixture goes first
                    table = _mixture_table(mixture)
                _TABLES[mixture] = table
    return table


def _mixture_table(mixture: _Mixture) -> _PropertyTable:
    """A mixture's table, formed from its components' tables by the mixing rules."""
    t_kelvin = _temperature_grid(mixture.t_range)
    t_mesh, p_mesh = t_kelvin[:, None], _PRESSURE_NODE_VALUES[None, :]
    parts = [_table(_parse_text(name)).evaluate(t_mesh, p_mesh)
             for name, _ in mixture.components]
    return _PropertyTable(t_kelvin, _mix(mixture, parts, p_mesh))


@dataclass(frozen=True)
class GasProperties:
    """Every property of a gas at one state (or arrays of states), SI units.

    ``t`` degC, ``pressure`` Pa, ``density`` kg/m3, ``viscosity`` (dynamic) Pa s, ``kinvisc``
    m2/s, ``conductivity`` W/(m K), ``cp`` J/(kg K), ``diffusivity`` (thermal) m2/s,
    ``prandtl`` -, ``expansion`` (isobaric expansion coefficient beta, real gas) 1/K,
    ``molar_mass`` kg/mol; ``gas`` the normalised gas name or mixture.  Fields are floats for
    a scalar state and arrays (the broadcast shape of t and pressure) otherwise.
    """

    gas: str
    t: float | np.ndarray
    pressure: float | np.ndarray
    density: float | np.ndarray
    viscosity: float | np.ndarray
    kinvisc: float | np.ndarray
    conductivity: float | np.ndarray
    cp: float | np.ndarray
    diffusivity: float | np.ndarray
    prandtl: float | np.ndarray
    expansion: float | np.ndarray
    molar_mass: float


def _assemble(mixture: _Mixture, t, pressure, density_per_pressure, viscosity, conductivity,
              cp, expansion) -> GasProperties:
    """Form the derived properties; works alike on floats and on arrays.

    The record is filled through its ``__dict__``, not the generated ``__init__``: a frozen
    dataclass's ``__init__`` sets each of the twelve fields through ``object.__setattr__``,
    which cost more than the look-up itself on the scalar path (every h function's call).
    The fields are exactly the dataclass's (test_gases checks it); the record stays frozen."""
    density = density_per_pressure * pressure
    properties = _new_record(GasProperties)
    properties.__dict__.update(
        gas=mixture.label, t=t, pressure=pressure, density=density, viscosity=viscosity,
        kinvisc=viscosity / density, conductivity=conductivity, cp=cp,
        diffusivity=conductivity / (density * cp), prandtl=viscosity * cp / conductivity,
        expansion=expansion, molar_mass=mixture.molar_mass)
    return properties


_new_record = object.__new__


def _checked_temperature(function: str, argument: str, mixture: _Mixture, t) -> np.ndarray:
    if type(t) in PLAIN_NUMBERS and mixture.t_range.low <= t <= mixture.t_range.high:   # above absolute zero too
        return np.asarray(t, dtype=float)
    t = require_finite(function, argument, t)
    below_zero = ~(t > ABSOLUTE_ZERO_C)
    if np.any(below_zero):
        bad = t[below_zero].flat[0] if t.ndim else t.item()
        raise InputError(function, argument, bad, f"above absolute zero ({ABSOLUTE_ZERO_C:g} °C)")
    return require_between(function, argument, t, mixture.t_range.low, mixture.t_range.high,
                           f"°C for {mixture.label}")


def require_gas_temperature(function: str, argument: str, t: ArrayLike, gas: str = "air") -> np.ndarray:
    """Check a temperature argument as the user typed it.

    Parameters
    ----------
    function : str
        Name the message starts with (the caller's public name, e.g. ``"h_vplate"``).
    argument : str
        The argument's name as the user typed it (``"ts"``, ``"t1"``...).
    t : array_like
        Temperature in °C.
    gas : str, default "air"
        Gas or mixture whose tabulated range applies.

    Returns
    -------
    ndarray
        ``t`` as a float array.

    Raises
    ------
    InputError
        "must be a finite number, got nan", "must be above absolute zero (-273.15 °C)" or
        "must be in [low, high] °C for <gas>", naming ``argument`` and the value typed.

    Notes
    -----
    Absolute zero is -273.15 °C (``scipy.constants.zero_Celsius``); each gas's range is its
    table's (:data:`GASES`, ``t_range``), a mixture's the intersection of its components'.

    Examples
    --------
    >>> from stillair.gases import require_gas_temperature
    >>> require_gas_temperature("h_vplate", "ts", 60.0).item()
    60.0
    """
    return _checked_temperature(function, argument, _mixture(function, gas), t)


def plain_state_accepted(gas: str, temperatures: tuple, pressure: float) -> bool:
    """True when ``gas`` is valid and every temperature (°C) and the pressure (Pa) are plain
    numbers inside its ranges: a caller's scalar path may then skip the array checks.  Never
    raises (the full checks word the message)."""
    return plain_mixture(gas, temperatures, pressure) is not None


def plain_mixture(gas: str, temperatures: tuple, pressure: float) -> _Mixture | None:
    """The parsed gas where :func:`plain_state_accepted` holds, else None: a state of it at a
    temperature between those checked is then :func:`plain_state` with no check repeated."""
    try:
        mixture = _mixture("", gas)
    except InputError:
        return None
    return mixture if _plain_inside(mixture, temperatures, pressure) else None


def plain_state(mixture: _Mixture, t: float, pressure: float) -> GasProperties:
    """The state at ``t`` (°C) and ``pressure`` (Pa) of a gas :func:`plain_mixture` accepted, at
    a temperature and pressure inside the ranges it checked (the film temperature between two
    that it checked): :func:`gas_properties` without its checks."""
    return _scalar_state(mixture, float(t), float(pressure))


def _plain_inside(mixture: _Mixture, temperatures, pressure) -> bool:
    """Every temperature and the pressure plain numbers inside the ranges (NaN fails the
    comparisons)."""
    if not (type(pressure) in PLAIN_NUMBERS and GAS_PRESSURE_RANGE.low <= pressure <= GAS_PRESSURE_RANGE.high):
        return False
    low, high = mixture.t_range.low, mixture.t_range.high
    for t in temperatures:      # a loop, not all(...): this runs on every scalar call
        if not (type(t) in PLAIN_NUMBERS and low <= t <= high):
            return False
    return True


def _checked_state(function: str, mixture: _Mixture, t, pressure):
    """Check t (degC) and pressure (Pa) against the gas's ranges; broadcast them."""
    t = _checked_temperature(function, "t", mixture, t)
    return np.broadcast_arrays(t, _checked_pressure(function, pressure))


def _checked_pressure(function: str, pressure) -> np.ndarray:
    """The pressure argument (Pa) checked: positive, inside the gas tables' pressure band."""
    require_positive(function, "pressure", pressure, "Pa")   # its own message below the band
    return require_between(function, "pressure", pressure, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high, "Pa")


@lru_cache(maxsize=4096)
def _scalar_state(mixture: _Mixture, t: float, pressure: float) -> GasProperties:
    primaries = _table(mixture).at_point(t - ABSOLUTE_ZERO_C, pressure)
    return _assemble(mixture, t, pressure, *primaries)


def _state(function: str, gas, t, pressure) -> GasProperties:
    """All properties; the one path every public property function goes through."""
    mixture = _mixture(function, gas)
    # Fast path for plain scalars inside every range (NaN fails the comparisons): plain
    # comparisons instead of array checks, and a cache of recent states.  Anything else takes
    # the full checks, which also write the error messages.
    if _plain_inside(mixture, (t,), pressure):
        return _scalar_state(mixture, float(t), float(pressure))
    if (type(t) is np.ndarray and t.dtype == np.float64 and t.ndim and t.size and type(pressure) in PLAIN_NUMBERS
            and GAS_PRESSURE_RANGE.low <= pressure <= GAS_PRESSURE_RANGE.high
            and mixture.t_range.low <= t.min() and t.max() <= mixture.t_range.high):
        # a float array inside the range at one plain pressure (NaN fails the comparisons): two
        # reductions instead of the element checks, which cost more than the look-up itself
        primaries = _table(mixture).at_pressure(float(pressure))(t - ABSOLUTE_ZERO_C)
        return _assemble(mixture, t.copy(), np.full(t.shape, float(pressure)), *np.moveaxis(primaries, -1, 0))
    t_array, p_array = _checked_state(function, mixture, t, pressure)
    if t_array.ndim == 0:
        return _scalar_state(mixture, float(t_array), float(p_array))
    primaries = _table(mixture).evaluate(t_array - ABSOLUTE_ZERO_C, p_array)
    return _assemble(mixture, np.array(t_array), np.array(p_array),
                     *np.moveaxis(primaries, -1, 0))


def gas_properties(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE, *,
                   function_name: str = "gas_properties") -> GasProperties:
    """All properties of a gas at one temperature and pressure (or arrays of them) at once.

    Parameters
    ----------
    gas : str
        {gas_doc}
    t : float or array_like
        Temperature in °C; valid temperatures per gas (a mixture: where all its components
        are valid):

{ranges}
    pressure : float or array_like, default {pressure:g}
        Absolute pressure in Pa, {p_low:g} to {p_high:g}.
    function_name : str, default "gas_properties"
        The name error messages start with (a caller such as ``h_cavity`` passes its own).

    Returns
    -------
    GasProperties
        Frozen record of density (kg/m³), viscosity (Pa·s), kinvisc (m²/s), conductivity
        (W/(m·K)), cp (J/(kg·K)), diffusivity (m²/s), prandtl (-), expansion (1/K) and
        molar_mass (kg/mol); floats for scalar inputs, arrays of the broadcast shape of t and
        pressure otherwise.

    Raises
    ------
    InputError
        An unknown gas or malformed mixture, or t or pressure outside the ranges above.

    Notes
    -----
    The fast path for code needing several properties per state (convection, the network
    solver): one table look-up.  Method: tables of density/p, viscosity, conductivity, cp and
    beta per pure gas on a 1 K grid in temperature and Chebyshev nodes in pressure,
    interpolated (error below 1e-6 relative); derived properties formed from them; mixtures by
    the mixing rules of ISO 15099:2003 Annex B.

    References
    ----------
{sources}

    Examples
    --------
    >>> import stillair
    >>> fill = stillair.gas_properties("argon:0.9, air:0.1", 10.0)
    >>> print(fill.gas, f"{{fill.conductivity:.4g}} W/(m·K)", f"Pr = {{fill.prandtl:.3f}}")
    argon:0.9, air:0.1 0.01774 W/(m·K) Pr = 0.670
    """
    return _state(function_name, gas, t, pressure)


def _reset_tables() -> None:
    """Forget every table, state and the table file (tests switch the file in process)."""
    with _TABLES_LOCK:
        _TABLES.clear()
        _forget_file()
        _scalar_state.cache_clear()
        _parse_text.cache_clear()


# The docstring of gas_properties carries the gas names, ranges and sources of GASES, filled in
# here rather than retyped.
gas_properties.__doc__ = (gas_properties.__doc__ or "").format(
    gas_doc=_gas_doc("        "), ranges=_range_lines("            "), pressure=STANDARD_PRESSURE,
    p_low=GAS_PRESSURE_RANGE.low, p_high=GAS_PRESSURE_RANGE.high, sources=_source_lines("    "))
