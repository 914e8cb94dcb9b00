"""Gas properties: air, the glazing fill gases and their mixtures.

Every property of a pure gas comes from one reference source per gas, evaluated once on a fine
(temperature, pressure) grid and interpolated afterwards:

=========  ====================  ================================================================
gas        CoolProp fluid        reference formulations (CoolProp 8 "HEOS" backend)
=========  ====================  ================================================================
air        Air                   EOS Lemmon et al. (2000); mu, k Lemmon and Jacobsen (2004)
argon      Argon                 EOS Tegeler et al. (1999); mu, k Lemmon and Jacobsen (2004)
nitrogen   Nitrogen              EOS Span et al. (2000); mu, k Lemmon and Jacobsen (2004)
co2        CarbonDioxide         EOS Span and Wagner (1996); mu Laesecke and Muzny (2017),
                                 k Huber et al. (2016)
sf6        SulfurHexafluoride    EOS Guder and Wagner (2009); mu Quinones-Cisneros et al. (2012),
                                 k Assael et al. (2012)
krypton    Krypton               EOS Lemmon and Span (2006); mu, k: ISO 15099:2003 Table B.1
xenon      Xenon                 EOS Lemmon and Span (2006); mu, k: ISO 15099:2003 Table B.1
=========  ====================  ================================================================

CoolProp has no viscosity or conductivity model for krypton and xenon, so their transport
properties are the linear fits of ISO 15099:2003 Annex B, Table B.1 (``mu = a + b T``,
``k = a + b T``, T in K).  Their density, cp and expansion coefficient still come from the
CoolProp equation of state, like those of every other gas: all pure-gas densities and heat
capacities then share one kind of source (reference equations of state with their small
real-gas departures), so argon, krypton and xenon fills are ranked on equal terms.  The ISO cp
fits for krypton and xenon are constants equal to the ideal monatomic value 5R/(2M) (0.02 %);
CoolProp agrees with them within the real-gas departure (0.5 % for krypton, 1.3 % for xenon at
1 atm and 10 degC) and tends to them at low pressure.

Mixtures ("argon:0.9, air:0.1", mole fractions) follow ISO 15099:2003 Annex B:

* viscosity by Wilke's rule with the standard's phi coefficients,
* conductivity split into a translational part k' = 15/4 R mu / M (the monatomic value) and an
  internal part k'' = k - k', each mixed by its own Wilke-type rule (psi with the Mason-Saxena
  mass-difference factor for k', phi for k''),
* cp as the mole-fraction average of the molar heat capacities divided by the mixture molar
  mass (i.e. mass-fraction weighting of the specific cp),
* density from additive molar volumes (Amagat).  ISO 15099 uses the ideal-gas law with the mean
  molar mass; for ideal gases the two are identical, and additive volumes keep the same small
  real-gas correction the pure gases carry, so that a mixture of one gas *is* that gas.  The
  expansion coefficient follows from the same volumes (volume-fraction average of beta).

Validity: each gas has a temperature range (:data:`GASES`, ``t_range``) inside its equation of
state and transport models, above its triple point and its saturation temperature at the top of
the pressure band; pressures from 1 kPa to 200 kPa (high altitude up to moderate overpressure:
every gas here is a vapour there above its triple-point temperature).  Outside these an
:class:`~stillair.validity.InputError` names the range.  Krypton and xenon transport is further
limited to -100 (xenon: -80) .. 200 degC: ISO 15099 states no range for its linear fits (as
far as recalled -- from memory), which were made for the temperatures of glazing cavities; a straight line through a property growing
like T^0.8 is extrapolation far outside them.

Tables: the five primary properties of each pure gas (density/p, viscosity, conductivity, cp,
beta) are tabulated from CoolProp's low-level AbstractState on a 1 K temperature grid times
Chebyshev nodes in pressure (2,000 to 6,000 states per gas).  A value then costs a cubic spline in
T and a short Chebyshev series in p (interpolation error below 1e-6 relative, checked in the
tests), and repeated scalar states are served from an LRU cache.  Kinematic viscosity,
diffusivity and Prandtl number are formed from the interpolated primaries, so that nu = mu/rho,
alpha = k/(rho cp) and Pr = mu cp/k hold to rounding.  Mixture tables are formed from the
component tables by the mixing rules.

Shipped tables: the pure-gas tables come with the package, ``engine/data/gas_tables.npz`` (plain
``numpy.load``-able arrays: per gas the temperature grid, the tabulated values and the molar
mass; for the whole file the CoolProp version and git revision that computed it, the grid
parameters and the definition of every gas).  Importing CoolProp takes about 2 s and tabulating a
gas up to 0.3 s; with the file neither happens: CoolProp is imported only when a table really has
to be computed.  ``python -m stillair.data`` (or ``python -m stillair.gases --rebuild-tables``)
writes the file again from the installed CoolProp, byte for byte the same file for the same
CoolProp version.

Policy: the shipped file is the reference data of this stillair release.  It is used whatever
CoolProp version is installed, so that an upgrade of CoolProp never changes a result silently;
results change only when the file is rebuilt on purpose (and the tests compare the file with a
fresh tabulation whenever the installed CoolProp is the version it records).  A gas is computed
from the installed CoolProp instead -- with a ``RuntimeWarning`` naming the reason -- when the
file is missing or unreadable, when its grid or format differs from this module's, when the
gas is not in it or its definition (CoolProp fluid, temperature range, ISO fits) has changed.
The environment variable ``STILLAIR_GAS_TABLES`` names another table file, or, set to ``off``,
disables the shipped tables (every gas computed, no warning).  :func:`gas_table_provenance`
says which source each gas in use came from.
"""

from __future__ import annotations

import bisect
import math
import os
import sys
import textwrap
import threading
import warnings
import zipfile
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Callable

import numpy as np
from numpy.polynomial import chebyshev
from scipy.constants import R as GAS_CONSTANT  # J/(mol K), CODATA

# CoolProp is imported only where a table is computed (_coolprop below): importing it takes
# about 2 s, and the shipped tables make it unnecessary.  scipy.interpolate (0.2 s) is imported
# where the first table is built, so that importing the engine stays light.

from ._typing import ArrayLike, FloatOrArray
from .validity import (
    ABSOLUTE_ZERO_C,
    InputError,
    PLAIN_NUMBERS,
    Range,
    require_between,
    require_finite,
    require_positive,
)

__all__ = [
    "GAS_NAMES",
    "GASES",
    "GasData",
    "GasProperties",
    "GasPropertyInfo",
    "LinearFit",
    "GAS_PRESSURE_RANGE",
    "GAS_PROPERTY_TABLE",
    "STANDARD_PRESSURE",
    "gas_properties",
    "gas_table_provenance",
    "parse_gas",
    "require_gas_temperature",
]

STANDARD_PRESSURE = 101325.0  # Pa, 1 standard atmosphere
GAS_PRESSURE_RANGE = Range("pressure", 1.0e3, 2.0e5)  # Pa, the band every gas here is a vapour in
MIXTURE_SUM_TOLERANCE = 1e-6


# --------------------------------------------------------------------------------------------
# The gases
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class LinearFit:
    """A property fitted as ``a + b T`` with T in kelvin (the form of ISO 15099 Table B.1)."""

    a: float
    b: float

    def __call__(self, t_kelvin):
        return self.a + self.b * np.asarray(t_kelvin, dtype=float)


@dataclass(frozen=True)
class GasData:
    """One pure gas: its CoolProp fluid, its validity range and any non-CoolProp transport."""

    name: str
    coolprop_fluid: str
    t_range: Range                      # degC
    source: str
    viscosity_fit: LinearFit | None = None      # Pa s, used where CoolProp has no model
    conductivity_fit: LinearFit | None = None   # W/(m K)


# ISO 15099:2003, Annex B, Table B.1 -- from memory: conductivity a [W/(m K)], b [W/(m K^2)];
# viscosity a [Pa s], b [Pa s/K]; (cp: krypton 248.0907, xenon 158.3397 J/(kg K), b = 0; the
# molar masses 83.80 and 131.30 g/mol -- not used here, see the module docstring).
_ISO15099_KRYPTON_VISCOSITY = LinearFit(2.213e-6, 7.777e-8)
_ISO15099_KRYPTON_CONDUCTIVITY = LinearFit(9.443e-4, 2.826e-5)
_ISO15099_XENON_VISCOSITY = LinearFit(1.069e-6, 7.414e-8)
_ISO15099_XENON_CONDUCTIVITY = LinearFit(4.538e-4, 1.723e-5)

_ISO_TRANSPORT = "viscosity and conductivity: ISO 15099:2003 Annex B Table B.1 linear fits"

# Upper limits of air, argon and nitrogen: Lemmon and Jacobsen (2004) state their transport
# equations for about 70..1100 K (from memory); 800 degC = 1073 K stays inside.
GASES: dict[str, GasData] = {
    gas.name: gas for gas in (
        GasData("air", "Air", Range("t", -150.0, 800.0),
                "CoolProp HEOS Air (Lemmon et al. 2000; Lemmon and Jacobsen 2004)"),
        GasData("argon", "Argon", Range("t", -150.0, 800.0),
                "CoolProp HEOS Argon (Tegeler et al. 1999; Lemmon and Jacobsen 2004)"),
        GasData("krypton", "Krypton", Range("t", -100.0, 200.0),
                "CoolProp HEOS Krypton (Lemmon and Span 2006) for density, cp, beta; "
                + _ISO_TRANSPORT,
                viscosity_fit=_ISO15099_KRYPTON_VISCOSITY,
                conductivity_fit=_ISO15099_KRYPTON_CONDUCTIVITY),
        GasData("xenon", "Xenon", Range("t", -80.0, 200.0),
                "CoolProp HEOS Xenon (Lemmon and Span 2006) for density, cp, beta; "
                + _ISO_TRANSPORT,
                viscosity_fit=_ISO15099_XENON_VISCOSITY,
                conductivity_fit=_ISO15099_XENON_CONDUCTIVITY),
        # SF6: the equation of state starts at the triple point, 223.555 K (-49.6 degC), and
        # ends at 625 K (351.85 degC).
        GasData("sf6", "SulfurHexafluoride", Range("t", -45.0, 350.0),
                "CoolProp HEOS SulfurHexafluoride (Guder and Wagner 2009; Quinones-Cisneros "
                "et al. 2012; Assael et al. 2012)"),
        # CO2: triple point 216.59 K (-56.6 degC).
        GasData("co2", "CarbonDioxide", Range("t", -50.0, 800.0),
                "CoolProp HEOS CarbonDioxide (Span and Wagner 1996; Laesecke and Muzny 2017; "
                "Huber et al. 2016)"),
        GasData("nitrogen", "Nitrogen", Range("t", -150.0, 800.0),
                "CoolProp HEOS Nitrogen (Span et al. 2000; Lemmon and Jacobsen 2004)"),
    )
}
GAS_NAMES: tuple[str, ...] = tuple(GASES)


# --------------------------------------------------------------------------------------------
# Gas names and mixtures
# --------------------------------------------------------------------------------------------

_GAS_ALLOWED = ("one of " + ", ".join(GAS_NAMES)
                + ' or a mixture of them such as "argon:0.9, air:0.1"')
_SYNTAX_ALLOWED = 'a gas name or a mixture written "name:fraction, name:fraction" ' \
                  '(e.g. "argon:0.9, air:0.1")'


@dataclass(frozen=True, eq=False)
class _Mixture:
    """A parsed gas: components with mole fractions (summing exactly to 1), and its limits.

    Equal and hashed by its components alone (the key of the table and state caches).
    """

    components: tuple[tuple[str, float], ...]
    label: str
    t_range: Range
    molar_masses: tuple[float, ...]      # kg/mol, per component
    molar_mass: float                    # kg/mol, mole-fraction mean

    def __post_init__(self):
        object.__setattr__(self, "_hash", hash(self.components))

    def __hash__(self):
        return self._hash

    def __eq__(self, other):
        return isinstance(other, _Mixture) and self.components == other.components

    @property
    def is_pure(self) -> bool:
        return len(self.components) == 1

    @property
    def fractions(self) -> np.ndarray:
        return np.array([fraction for _, fraction in self.components])


def parse_gas(gas: str) -> tuple[tuple[str, float], ...]:
    """Normalise a gas argument to its components and mole fractions.

    Parameters
    ----------
    gas : str
        {gas_doc}

    Returns
    -------
    tuple of (str, float)
        ``((component, mole_fraction), ...)``, names in lower case, fractions summing exactly
        to 1.

    Raises
    ------
    InputError
        An unknown gas, a malformed mixture, a gas named twice, fractions outside [0, 1] or
        not summing to 1 within {tolerance:g}.

    Notes
    -----
    Names are case-insensitive and spaces are ignored around names, colons and commas.
    Fractions are rescaled to sum exactly to 1, and components with fraction 0 are dropped (so
    "argon:1, air:0" is argon).

    Examples
    --------
    >>> import stillair
    >>> stillair.parse_gas(" Argon : 0.9 , AIR:0.1")
    (('argon', 0.9), ('air', 0.1))
    >>> stillair.parse_gas("argon:1, air:0")
    (('argon', 1.0),)
    """
    return _mixture("parse_gas", gas).components


def _mixture(function: str, gas) -> _Mixture:
    if not isinstance(gas, str):
        raise InputError(function, "gas", gas, _GAS_ALLOWED)
    try:
        return _parse_text(gas)
    except InputError as error:  # re-issue under the caller's name
        raise InputError(function, error.argument, error.value, error.allowed) from None


@lru_cache(maxsize=256)
def _parse_text(text: str) -> _Mixture:
    items = [item.strip() for item in text.split(",")]
    if len(items) == 1 and ":" not in items[0]:
        pairs = [(items[0].lower(), 1.0)]
    else:
        pairs = []
        for item in items:
            name, colon, fraction_text = item.partition(":")
            if not colon or not name.strip():
                raise InputError("parse_gas", "gas", text, _SYNTAX_ALLOWED)
            try:
                fraction = float(fraction_text)
            except ValueError:
                raise InputError("parse_gas", "gas", text, _SYNTAX_ALLOWED) from None
            pairs.append((name.strip().lower(), fraction))
    for name, fraction in pairs:
        if name not in GASES:
            value = text if len(pairs) == 1 else name
            raise InputError("parse_gas", "gas", value, _GAS_ALLOWED)
    names = [name for name, _ in pairs]
    if len(set(names)) != len(names):
        raise InputError("parse_gas", "gas", text, "a mixture naming each gas once")
    fractions = np.array([fraction for _, fraction in pairs])
    if not np.all(np.isfinite(fractions)) or np.any(fractions < 0) or np.any(fractions > 1):
        raise InputError("parse_gas", "gas", text, "a mixture with mole fractions in [0, 1]")
    total = float(fractions.sum())
    if abs(total - 1.0) > MIXTURE_SUM_TOLERANCE:
        raise InputError("parse_gas", "gas", text,
                         f"a mixture with mole fractions summing to 1 within "
                         f"{MIXTURE_SUM_TOLERANCE:g} (these sum to {total:.9g})")
    components = tuple((name, fraction / total) for name, fraction in pairs if fraction > 0)
    if len(components) == 1:
        components = ((components[0][0], 1.0),)
        label = components[0][0]
    else:
        label = ", ".join(f"{name}:{fraction:.6g}" for name, fraction in components)
    ranges = [GASES[name].t_range for name, _ in components]
    t_range = Range("t", max(r.low for r in ranges), min(r.high for r in ranges))
    molar_masses = tuple(_molar_mass(name) for name, _ in components)
    molar_mass = float(sum(f * m for (_, f), m in zip(components, molar_masses)))
    return _Mixture(components, label, t_range, molar_masses, molar_mass)


@lru_cache(maxsize=None)
def _molar_mass(name: str) -> float:
    """Molar mass, kg/mol, of the gas's CoolProp fluid (from the shipped tables if there)."""
    shipped = _shipped_gas(name)
    if shipped is not None:
        return shipped.molar_mass
    return _coolprop().AbstractState("HEOS", GASES[name].coolprop_fluid).molar_mass()


# --------------------------------------------------------------------------------------------
# Tabulation of the pure gases
# --------------------------------------------------------------------------------------------

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


class _PropertyTable:
    """The primary properties of one gas or mixture on a (T, p) grid, interpolated.

    In temperature a not-a-knot cubic spline on a 1 K grid; in pressure a Chebyshev series
    through ``_PRESSURE_NODES`` Chebyshev points of the pressure band.  Density is tabulated as
    rho/p, which is nearly constant in p, so that its relative error stays small down to 1 kPa.
    For one pressure the series is summed once into a plain piecewise cubic in T
    (:meth:`at_pressure`, cached), which is what scalar calls and arrays at one pressure use.

    Largest interpolation error found (tests): 6e-7 relative, in SF6 conductivity at 200 kPa
    next to 478 K, where CoolProp's critical-enhancement term ends with a slope discontinuity
    the spline rounds off; elsewhere below 5e-8.
    """

    def __init__(self, t_kelvin: np.ndarray, values: np.ndarray):
        """``values[i, j, :]``: primaries at ``t_kelvin[i]`` and the j-th pressure node."""
        from scipy.interpolate import CubicSpline  # see the imports at the top

        self.t_kelvin = t_kelvin
        count = len(t_kelvin)
        flat = values.transpose(1, 0, 2).reshape(_PRESSURE_NODES, -1)
        coefficients = chebyshev.chebfit(_PRESSURE_NODE_X, flat, _PRESSURE_NODES - 1)
        coefficients = coefficients.reshape(_PRESSURE_NODES, count, len(_PRIMARY))
        self.spline = CubicSpline(t_kelvin, coefficients.transpose(1, 0, 2), axis=0)
        self._slices: dict = {}  # pressure -> scipy.interpolate.PPoly
        self._breaks = self.spline.x.tolist()  # for bisect in :meth:`at_point`
        self._point_coefficients: dict = {}    # pressure -> nested lists, for :meth:`at_point`

    @classmethod
    def from_values(cls, gas: GasData) -> "_PropertyTable":
        """The table of a pure gas: shipped values if the file has them, else from CoolProp."""
        shipped = _shipped_gas(gas.name)
        if shipped is not None:
            return cls(shipped.t_kelvin, shipped.values)
        return cls(_temperature_grid(gas.t_range), _tabulate(gas))

    @classmethod
    def from_mixture(cls, mixture: "_Mixture") -> "_PropertyTable":
        t_kelvin = _temperature_grid(mixture.t_range)
        t_mesh, p_mesh = t_kelvin[:, None], _PRESSURE_NODE_VALUES[None, :]
        parts = [_table(_parse_text(name)).evaluate(t_mesh, p_mesh)
                 for name, _ in mixture.components]
        return cls(t_kelvin, _mix(mixture, parts, p_mesh))

    def evaluate(self, t_kelvin, pressure) -> np.ndarray:
        """Primaries, shape ``broadcast(t, p).shape + (5,)``; inputs already checked."""
        pressure = np.asarray(pressure, dtype=float)
        if pressure.ndim == 0 or np.all(pressure == pressure.flat[0]):
            values = self.at_pressure(float(pressure.flat[0]))(t_kelvin)
            shape = np.broadcast_shapes(np.shape(t_kelvin), pressure.shape)
            return np.broadcast_to(values, shape + (len(_PRIMARY),))
        basis = chebyshev.chebvander(_pressure_variable(pressure), _PRESSURE_NODES - 1)
        coefficients = self.spline(t_kelvin)
        return np.einsum("...k,...kq->...q", basis, coefficients)

    def at_pressure(self, pressure: float):
        """The table at one pressure: a piecewise cubic in T (a ``scipy.interpolate.PPoly``,
        exactly the spline's values)."""
        piece = self._slices.get(pressure)
        if piece is None:
            from scipy.interpolate import PPoly  # loaded with the spline already

            x = float(_pressure_variable(pressure))
            basis = chebyshev.chebvander(x, _PRESSURE_NODES - 1)[0]
            piece = PPoly(np.tensordot(self.spline.c, basis, axes=([2], [0])), self.spline.x)
            if len(self._slices) >= 64:  # a bounded cache; pressures rarely vary much
                self._slices.clear()
            self._slices[pressure] = piece
        return piece

    def _coefficient_lists(self, pressure: float) -> list:
        """:meth:`at_pressure`'s coefficients as nested lists, ``[interval][power][primary]``
        (highest power first), made once per pressure: indexing a list costs far less than
        slicing the array for one point."""
        lists = self._point_coefficients.get(pressure)
        if lists is None:
            lists = self.at_pressure(pressure).c.transpose(1, 0, 2).tolist()
            if len(self._point_coefficients) >= 64:
                self._point_coefficients.clear()
            self._point_coefficients[pressure] = lists
        return lists

    def at_point(self, t_kelvin: float, pressure: float) -> list[float]:
        """The primaries at one in-range point, as floats: :meth:`at_pressure`'s cubic summed in
        plain Python in the same order as ``PPoly`` does (the same values), without the
        call overhead of scipy's array machinery, which costs more than the cubic for one
        point."""
        breaks = self._breaks
        # PPoly's interval: the last breakpoint <= t, the right end belonging to the last piece
        interval = min(max(bisect.bisect_right(breaks, t_kelvin) - 1, 0), len(breaks) - 2)
        s = t_kelvin - breaks[interval]
        cubic, square, linear, constant = self._coefficient_lists(pressure)[interval]
        s2 = s * s
        s3 = s2 * s
        return [((c0 + c1 * s) + c2 * s2) + c3 * s3
                for c3, c2, c1, c0 in zip(cubic, square, linear, constant)]


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


_TABLES: dict["_Mixture", _PropertyTable] = {}
_MIXTURE_TABLE_LIMIT = 32
_TABLES_LOCK = threading.RLock()


def _table(mixture: "_Mixture") -> _PropertyTable:
    """The table of a pure gas or a mixture, built on first use and kept."""
    table = _TABLES.get(mixture)
    if table is None:
        with _TABLES_LOCK:
            table = _TABLES.get(mixture)
            if table is None:
                if mixture.is_pure:
                    table = _PropertyTable.from_values(GASES[mixture.components[0][0]])
                else:
                    mixtures = [key for key in _TABLES if not key.is_pure]
                    if len(mixtures) >= _MIXTURE_TABLE_LIMIT:
                        del _TABLES[mixtures[0]]  # the oldest mixture goes first
                    table = _PropertyTable.from_mixture(mixture)
                _TABLES[mixture] = table
    return table


# --------------------------------------------------------------------------------------------
# The shipped tables (engine/data/gas_tables.npz): policy in the module docstring
# --------------------------------------------------------------------------------------------

TABLE_FILE = Path(__file__).with_name("data") / "gas_tables.npz"
TABLE_FILE_VARIABLE = "STILLAIR_GAS_TABLES"  # another file, or "off"
_TABLE_FORMAT = 1
_REBUILD_HINT = "rebuild it with `python -m stillair.data`"


def _grid_parameters() -> np.ndarray:
    """What every table's grid depends on; a file made on another grid is not used."""
    return np.array([_T_STEP, _PRESSURE_NODES, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high])


def _definition(gas: GasData) -> str:
    """What one gas's table depends on besides CoolProp; a changed definition makes it stale."""
    return (f"{gas.coolprop_fluid} t={gas.t_range.low!r}..{gas.t_range.high!r} degC "
            f"viscosity_fit={gas.viscosity_fit!r} conductivity_fit={gas.conductivity_fit!r}")


@dataclass(frozen=True)
class _ShippedGas:
    t_kelvin: np.ndarray
    values: np.ndarray       # (temperatures, pressure nodes, primaries)
    molar_mass: float        # kg/mol


@dataclass
class _ShippedFile:
    path: Path
    coolprop_version: str
    coolprop_gitrevision: str
    gases: dict              # name -> _ShippedGas, the fresh entries
    stale: dict              # name -> why the file's entry is not used


_SHIPPED_UNREAD = object()
_shipped_file = _SHIPPED_UNREAD          # a _ShippedFile, or None for "no usable file"
_shipped_reason = ""                     # why there is no usable file
_SOURCES: dict[str, str] = {}            # pure gas -> where its table came from


def _table_path() -> Path | None:
    value = os.environ.get(TABLE_FILE_VARIABLE)
    if value is None:
        return TABLE_FILE
    if value.strip().lower() in ("", "off", "none", "0"):
        return None
    return Path(value)


def _read_table_file(path: Path) -> _ShippedFile:
    """The file's fresh entries; raises ValueError if the whole file does not fit this code."""
    with np.load(path, allow_pickle=False) as data:
        arrays = {key: data[key] for key in data.files}
    if int(arrays["format"]) != _TABLE_FORMAT:
        raise ValueError(f"format {int(arrays['format'])}, expected {_TABLE_FORMAT}")
    if not np.array_equal(arrays["grid"], _grid_parameters()):
        raise ValueError(f"grid (T step K, pressure nodes, p low Pa, p high Pa) "
                         f"{arrays['grid'].tolist()}, expected {_grid_parameters().tolist()}")
    if tuple(arrays["primaries"].tolist()) != _PRIMARY:
        raise ValueError(f"columns {arrays['primaries'].tolist()}, expected {list(_PRIMARY)}")
    shipped = _ShippedFile(path, str(arrays["coolprop_version"]),
                           str(arrays["coolprop_gitrevision"]), {}, {})
    names = set(arrays["gases"].tolist())
    for gas in GASES.values():
        if gas.name not in names:
            shipped.stale[gas.name] = "not in the file"
        elif str(arrays[f"{gas.name}.definition"]) != _definition(gas):
            shipped.stale[gas.name] = (f"made for '{arrays[f'{gas.name}.definition']}', "
                                       f"now '{_definition(gas)}'")
        elif not np.array_equal(arrays[f"{gas.name}.t_kelvin"], _temperature_grid(gas.t_range)):
            shipped.stale[gas.name] = "its temperature grid differs"
        else:
            shipped.gases[gas.name] = _ShippedGas(arrays[f"{gas.name}.t_kelvin"],
                                                  arrays[f"{gas.name}.values"],
                                                  float(arrays[f"{gas.name}.molar_mass"]))
    return shipped


def _shipped() -> _ShippedFile | None:
    """The table file, read once (None when absent, disabled or not fitting this code)."""
    global _shipped_file, _shipped_reason
    if _shipped_file is _SHIPPED_UNREAD:
        with _TABLES_LOCK:
            if _shipped_file is _SHIPPED_UNREAD:
                path = _table_path()
                if path is None:
                    _shipped_file, _shipped_reason = None, f"{TABLE_FILE_VARIABLE} is off"
                else:
                    try:
                        _shipped_file = _read_table_file(path)
                    except (OSError, ValueError, KeyError, TypeError, zipfile.BadZipFile) as error:
                        _shipped_file = None
                        _shipped_reason = f"gas table file {path} not used: {error}"
                        warnings.warn(f"stillair.gases: {_shipped_reason}; gases are computed "
                                      f"from the installed CoolProp ({_REBUILD_HINT})",
                                      RuntimeWarning, stacklevel=2)
    return _shipped_file


def _shipped_gas(name: str) -> _ShippedGas | None:
    """The shipped table of one pure gas, or None (warned, unless the file is off)."""
    shipped = _shipped()
    entry = shipped.gases.get(name) if shipped is not None else None
    if name in _SOURCES:
        return entry
    if entry is not None:
        _SOURCES[name] = (f"shipped table {shipped.path.name} "
                          f"(CoolProp {shipped.coolprop_version})")
        return entry
    reason = _shipped_reason if shipped is None else \
        f"{name} in gas table file {shipped.path}: {shipped.stale[name]}"
    _SOURCES[name] = f"computed with the installed CoolProp ({reason})"
    if shipped is not None:
        warnings.warn(f"stillair.gases: {reason}; computed from the installed CoolProp "
                      f"({_REBUILD_HINT})", RuntimeWarning, stacklevel=2)
    return None


def gas_table_provenance() -> dict:
    """Where the pure-gas property tables come from, for traceability.

    Returns
    -------
    dict
        ``"file"``: path of the table file in use, or None; ``"coolprop_version"``: the
        CoolProp version that computed the file ("" without one); ``"installed_coolprop"``:
        the installed CoolProp's version if it has been imported (else None: it was not
        needed); ``"gases"``: ``{gas: source}`` for each pure gas used so far (mixtures come
        from their components' tables).

    Notes
    -----
    The shipped file is the reference data of a release: results do not change with the
    installed CoolProp version.  ``STILLAIR_GAS_TABLES`` names another file, or ``off``.

    Examples
    --------
    >>> import stillair
    >>> _ = stillair.air_density(20.0)
    >>> sorted(stillair.gas_table_provenance())
    ['coolprop_version', 'file', 'gases', 'installed_coolprop']
    """
    shipped = _shipped()
    coolprop = _coolprop() if "CoolProp" in sys.modules else None
    return {
        "file": str(shipped.path) if shipped is not None else None,
        "coolprop_version": shipped.coolprop_version if shipped is not None else "",
        "installed_coolprop": coolprop.__version__ if coolprop is not None else None,
        "gases": dict(_SOURCES),
    }


def _reset_tables() -> None:
    """Forget every table, state and the table file (tests switch the file in process)."""
    global _shipped_file, _shipped_reason
    with _TABLES_LOCK:
        _TABLES.clear()
        _SOURCES.clear()
        _shipped_file, _shipped_reason = _SHIPPED_UNREAD, ""
        _scalar_state.cache_clear()
        _parse_text.cache_clear()
        _molar_mass.cache_clear()


def table_file_arrays() -> dict[str, np.ndarray]:
    """The arrays of the table file, freshly computed from the installed CoolProp."""
    coolprop = _coolprop()
    arrays = {
        "format": np.array(_TABLE_FORMAT),
        "coolprop_version": np.array(coolprop.__version__),
        "coolprop_gitrevision": np.array(coolprop.__gitrevision__),
        "grid": _grid_parameters(),
        "primaries": np.array(_PRIMARY),
        "gases": np.array(GAS_NAMES),
    }
    for gas in GASES.values():
        arrays[f"{gas.name}.definition"] = np.array(_definition(gas))
        arrays[f"{gas.name}.t_kelvin"] = _temperature_grid(gas.t_range)
        arrays[f"{gas.name}.values"] = _tabulate(gas)
        arrays[f"{gas.name}.molar_mass"] = np.array(
            coolprop.AbstractState("HEOS", gas.coolprop_fluid).molar_mass())
    return arrays


def write_table_file(path: Path | str = TABLE_FILE, arrays: dict | None = None) -> Path:
    """Write the table file (``arrays``, by default :func:`table_file_arrays`) to ``path``.

    A ``numpy.load``-able .npz; written with fixed zip dates, so that the same CoolProp gives
    the same bytes (a rebuild shows in version control only when a number changed).
    """
    path = Path(path)
    arrays = table_file_arrays() if arrays is None else arrays
    path.parent.mkdir(parents=True, exist_ok=True)
    partial = path.with_name(path.name + ".partial")
    with zipfile.ZipFile(partial, "w", compression=zipfile.ZIP_DEFLATED) as archive:
        for key, array in arrays.items():
            member = zipfile.ZipInfo(f"{key}.npy", date_time=(1980, 1, 1, 0, 0, 0))
            member.compress_type = zipfile.ZIP_DEFLATED
            with archive.open(member, "w", force_zip64=True) as stream:
                np.lib.format.write_array(stream, np.asarray(array),
                                          allow_pickle=False)
    os.replace(partial, path)
    return path


# --------------------------------------------------------------------------------------------
# Mixing rules (ISO 15099:2003 Annex B)
# --------------------------------------------------------------------------------------------

def _wilke_phi(ratio, molar_i, molar_j, mass_exponent):
    """[1 + ratio^(1/2) (M_i/M_j)^e]^2 / (2 sqrt2 (1 + M_i/M_j)^(1/2)), ISO 15099 Annex B.

    From memory: the viscosity phi uses ratio = mu_i/mu_j with e = -1/4 (i.e. (M_j/M_i)^(1/4));
    the conductivity psi and phi use ratio = k'_i/k'_j with e = +1/4.  phi_ii = 1.
    """
    mass_ratio = molar_i / molar_j
    return ((1.0 + np.sqrt(ratio) * mass_ratio ** mass_exponent) ** 2
            / (2.0 * math.sqrt(2.0) * np.sqrt(1.0 + mass_ratio)))


def _wilke_mix(fractions, values, phi):
    """sum_i x_i v_i / sum_j x_j phi_ij -- the ISO form sum_i v_i / (1 + sum_j!=i phi_ij x_j/x_i)
    multiplied through by x_i."""
    total = 0.0
    for i, x_i in enumerate(fractions):
        denominator = sum(x_j * phi[i][j] for j, x_j in enumerate(fractions))
        total = total + x_i * values[i] / denominator
    return total


def _mix(mixture: "_Mixture", primaries: list[np.ndarray], pressure) -> np.ndarray:
    """Mixture primaries from the components' primaries (each ``(..., 5)``)."""
    x = mixture.fractions
    molar = mixture.molar_masses
    n = len(x)
    density = [p[..., 0] * pressure for p in primaries]
    viscosity = [p[..., 1] for p in primaries]
    conductivity = [p[..., 2] for p in primaries]
    cp = [p[..., 3] for p in primaries]
    expansion = [p[..., 4] for p in primaries]

    # Additive molar volumes v_i = M_i/rho_i; beta_mix = sum x_i v_i beta_i / v_mix.
    volumes = [molar[i] / density[i] for i in range(n)]
    volume = sum(x[i] * volumes[i] for i in range(n))
    mix_density = mixture.molar_mass / volume
    mix_expansion = sum(x[i] * volumes[i] * expansion[i] for i in range(n)) / volume

    # ISO 15099: cp_mix = sum x_i (cp_i M_i) / M_mix.
    mix_cp = sum(x[i] * cp[i] * molar[i] for i in range(n)) / mixture.molar_mass

    phi_mu = [[_wilke_phi(viscosity[i] / viscosity[j], molar[i], molar[j], -0.25)
               for j in range(n)] for i in range(n)]
    mix_viscosity = _wilke_mix(x, viscosity, phi_mu)

    # Translational (monatomic) conductivity k' = 15/4 R mu / M, internal part k'' = k - k'.
    translational = [3.75 * GAS_CONSTANT * viscosity[i] / molar[i] for i in range(n)]
    internal = [conductivity[i] - translational[i] for i in range(n)]
    phi_k = [[_wilke_phi(translational[i] / translational[j], molar[i], molar[j], 0.25)
              for j in range(n)] for i in range(n)]
    # Mason-Saxena factor for the translational part (from memory: 2.41 and 0.142).
    psi_k = [[phi_k[i][j] * (1.0 + 2.41 * (molar[i] - molar[j]) * (molar[i] - 0.142 * molar[j])
                             / (molar[i] + molar[j]) ** 2)
              for j in range(n)] for i in range(n)]
    mix_conductivity = _wilke_mix(x, translational, psi_k) + _wilke_mix(x, internal, phi_k)

    return np.stack([mix_density / pressure, mix_viscosity, mix_conductivity, mix_cp,
                     mix_expansion], axis=-1)


# --------------------------------------------------------------------------------------------
# The state: all properties at once
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True, slots=True)
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


def _assemble(mixture: "_Mixture", t, pressure, density_per_pressure, viscosity, conductivity,
              cp, expansion) -> GasProperties:
    """Form the derived properties; works alike on floats and on arrays."""
    density = density_per_pressure * pressure
    return GasProperties(
        gas=mixture.label, t=t, pressure=pressure, density=density, viscosity=viscosity,
        kinvisc=viscosity / density, conductivity=conductivity, cp=cp,
        diffusivity=conductivity / (density * cp), prandtl=viscosity * cp / conductivity,
        expansion=expansion, molar_mass=mixture.molar_mass)


def _checked_temperature(function: str, argument: str, mixture: "_Mixture", t) -> np.ndarray:
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
    try:
        mixture = _mixture("", gas)
    except InputError:
        return False
    return _plain_inside(mixture, temperatures, pressure)


def _plain_inside(mixture: "_Mixture", temperatures, pressure) -> bool:
    """Every temperature and the pressure plain numbers inside the ranges (NaN fails the
    comparisons)."""
    low, high = mixture.t_range.low, mixture.t_range.high
    return (type(pressure) in PLAIN_NUMBERS
            and GAS_PRESSURE_RANGE.low <= pressure <= GAS_PRESSURE_RANGE.high
            and all(type(t) in PLAIN_NUMBERS and low <= t <= high for t in temperatures))


def _checked_state(function: str, mixture: "_Mixture", t, pressure):
    """Check t (degC) and pressure (Pa) against the gas's ranges; broadcast them."""
    t = _checked_temperature(function, "t", mixture, t)
    pressure = require_positive(function, "pressure", pressure, "Pa")
    require_between(function, "pressure", pressure, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high, "Pa")
    return np.broadcast_arrays(t, pressure)


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


# --------------------------------------------------------------------------------------------
# The property functions gas_* and air_*, generated from one table
# --------------------------------------------------------------------------------------------

@dataclass(frozen=True)
class GasPropertyInfo:
    """One public property: its attribute in :class:`GasProperties`, unit and wording."""

    name: str
    quantity: str
    unit: str
    definition: str
    examples: tuple[str, str] = ("", "")  # shown value: air at 20 °C, argon at 10 °C (4 digits)


GAS_PROPERTY_TABLE: tuple[GasPropertyInfo, ...] = (
    GasPropertyInfo("density", "density rho", "kg/m3",
                 "From the equation of state of each gas (real gas); mixtures by additive "
                 "molar volumes, which is ISO 15099's ideal-gas rule for ideal gases.",
                    ("1.205", "1.721")),
    GasPropertyInfo("viscosity", "dynamic viscosity mu", "Pa s",
                 "CoolProp transport models; krypton and xenon ISO 15099 Table B.1 fits; "
                 "mixtures by Wilke's rule as in ISO 15099 Annex B.", ("1.821e-05", "2.167e-05")),
    GasPropertyInfo("kinvisc", "kinematic viscosity nu = mu/rho", "m2/s",
                 "Formed from the viscosity and density given by gas_viscosity and gas_density.",
                    ("1.511e-05", "1.259e-05")),
    GasPropertyInfo("conductivity", "thermal conductivity k", "W/(m K)",
                 "CoolProp transport models; krypton and xenon ISO 15099 Table B.1 fits; "
                 "mixtures by the ISO 15099 Annex B rule (translational and internal parts).",
                    ("0.02587", "0.01699")),
    GasPropertyInfo("cp", "isobaric specific heat capacity cp", "J/(kg K)",
                 "From the equation of state of each gas (real gas); mixtures by "
                 "mass-fraction weighting (ISO 15099 Annex B).", ("1006", "521.7")),
    GasPropertyInfo("diffusivity", "thermal diffusivity alpha = k/(rho cp)", "m2/s",
                 "Formed from the conductivity, density and cp of the other functions.",
                    ("2.135e-05", "1.893e-05")),
    GasPropertyInfo("prandtl", "Prandtl number Pr = mu cp/k", "-",
                 "Formed from the viscosity, cp and conductivity of the other functions.",
                    ("0.708", "0.6652")),
    GasPropertyInfo("expansion", "isobaric expansion coefficient beta = -(1/rho) (d rho/dT)_p",
                 "1/K",
                 "Real-gas value from the equation of state (mixtures: volume-fraction average); "
                 "ideal=True gives the ideal-gas value 1/T with T in kelvin.",
                    ("0.003421", "0.003544")),
)


def _range_lines(indent: str) -> str:
    """The valid temperatures of every gas, from :data:`GASES`."""
    return "\n".join(f"{indent}{gas.name:<9} {gas.t_range.low:g} to {gas.t_range.high:g} °C"
                     for gas in GASES.values())


def _source_lines(indent: str, names=None) -> str:
    """The reference formulations of the gases ``names`` (every gas of :data:`GASES`, and the
    mixing rules, by default)."""
    lines = [f"{gas.name}: {gas.source}." for gas in GASES.values() if names is None or gas.name in names]
    if names is None:
        lines.append("Mixtures: ISO 15099:2003, Annex B.")
    return "\n".join(textwrap.fill(line, 92, initial_indent=indent,
                                   subsequent_indent=indent + "    ") for line in lines)


def _gas_doc(indent: str) -> str:
    """How a gas argument is written, for every docstring that takes one."""
    return textwrap.fill(
        "One of " + ", ".join(GAS_NAMES) + ', or a mixture of them written "argon:0.9, '
        'air:0.1" (mole fractions summing to 1 within '
        f"{MIXTURE_SUM_TOLERANCE:g}); case and spaces are free.", 92,
        initial_indent=indent, subsequent_indent=indent).lstrip()


def _docstring(info: GasPropertyInfo, for_air: bool) -> str:
    """numpydoc text of one air_* or gas_* function, generated from :data:`GASES` and the
    property's :class:`GasPropertyInfo`."""
    subject = "dry air" if for_air else "a gas or gas mixture"
    name = f"{'air' if for_air else 'gas'}_{info.name}"
    gas_lines = "" if for_air else f"gas : str\n    {_gas_doc('    ')}\n"
    ideal_lines = ("ideal : bool, default False\n"
                   "    False for the real-gas beta, True for the ideal-gas value 1/T (T in K).\n"
                   if info.name == "expansion" else "")
    if for_air:
        t_doc = f"Temperature in °C, {GASES['air'].t_range.low:g} to {GASES['air'].t_range.high:g}."
        sources = _source_lines("", ("air",))
        call, shown = f"stillair.{name}(20.0)", info.examples[0]
    else:
        t_doc = ("Temperature in °C; valid temperatures per gas (a mixture: where all its\n"
                 "    components are valid):\n\n" + _range_lines("        "))
        sources = _source_lines("")
        call, shown = f"stillair.{name}('argon', 10.0)", info.examples[1]
    method = textwrap.fill(
        f"Method: {info.definition} Interpolated in tables computed from the reference "
        "formulations (error below 1e-6 relative); see the stillair.gases module docstring.", 92)
    quantity = info.quantity.split(" = ")[0]
    return (
        f"The {info.quantity} of {subject}, in {info.unit}.\n\n"
        "Parameters\n----------\n"
        f"{gas_lines}"
        f"t : float or array_like\n    {t_doc}\n"
        f"pressure : float or array_like, default {STANDARD_PRESSURE:g}\n"
        f"    Absolute pressure in Pa, {GAS_PRESSURE_RANGE.low:g} to {GAS_PRESSURE_RANGE.high:g}.\n"
        f"{ideal_lines}\n"
        "Returns\n-------\n"
        "float or numpy.ndarray\n"
        f"    The {quantity} in {info.unit}; a float for scalar inputs, an array of the\n"
        "    broadcast shape of t and pressure otherwise.\n\n"
        "Raises\n------\n"
        "InputError\n"
        f"    {'A' if for_air else 'An unknown gas or malformed mixture, or a'} t or pressure "
        "outside the ranges above.\n\n"
        f"Notes\n-----\n{method}\n\n"
        f"References\n----------\n{sources}\n\n"
        "Examples\n--------\n"
        ">>> import stillair\n"
        f'>>> print(f"{{{call}:.4g}}")\n'
        f"{shown}\n"
    )


def _property_of(function_name: str, info: GasPropertyInfo, gas, t, pressure, ideal=False):
    state = _state(function_name, gas, t, pressure)
    if ideal:
        return 1.0 / (state.t - ABSOLUTE_ZERO_C)
    return getattr(state, info.name)


def _make_gas_function(info: GasPropertyInfo) -> Callable:
    name = f"gas_{info.name}"
    if info.name == "expansion":
        def function(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE,
                     ideal: bool = False) -> FloatOrArray:
            return _property_of(name, info, gas, t, pressure, ideal=bool(ideal))
    else:
        def function(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
            return _property_of(name, info, gas, t, pressure)
    return _named(function, name, _docstring(info, for_air=False))


def _make_air_function(info: GasPropertyInfo) -> Callable:
    name = f"air_{info.name}"
    if info.name == "expansion":
        def function(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE,
                     ideal: bool = False) -> FloatOrArray:
            return _property_of(name, info, "air", t, pressure, ideal=bool(ideal))
    else:
        def function(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
            return _property_of(name, info, "air", t, pressure)
    return _named(function, name, _docstring(info, for_air=True))


def _named(function: Callable, name: str, doc: str) -> Callable:
    function.__name__ = function.__qualname__ = name
    function.__doc__ = doc
    function.__module__ = __name__
    return function


# The docstrings of parse_gas and gas_properties carry the gas names, ranges and sources of
# GASES, filled in here rather than retyped.
parse_gas.__doc__ = parse_gas.__doc__.format(gas_doc=_gas_doc("        "),
                                             tolerance=MIXTURE_SUM_TOLERANCE)
gas_properties.__doc__ = gas_properties.__doc__.format(
    gas_doc=_gas_doc("        "), ranges=_range_lines("            "), pressure=STANDARD_PRESSURE,
    p_low=GAS_PRESSURE_RANGE.low, p_high=GAS_PRESSURE_RANGE.high, sources=_source_lines("    "))

for _info in GAS_PROPERTY_TABLE:
    for _factory in (_make_gas_function, _make_air_function):
        _function = _factory(_info)
        globals()[_function.__name__] = _function
        __all__.append(_function.__name__)
del _info, _factory, _function


def main(argv: list[str] | None = None) -> int:
    """``python -m stillair.gases --rebuild-tables [--output PATH]``."""
    import argparse

    parser = argparse.ArgumentParser(prog="python -m stillair.gases",
                                     description="Write the shipped gas property tables.")
    parser.add_argument("--rebuild-tables", action="store_true", required=True,
                        help="tabulate every pure gas with the installed CoolProp")
    parser.add_argument("--output", default=str(TABLE_FILE),
                        help=f"where to write (default {TABLE_FILE})")
    args = parser.parse_args(argv)
    path = write_table_file(args.output)
    print(f"wrote {path} ({path.stat().st_size / 1e6:.2f} MB, "
          f"CoolProp {_coolprop().__version__})")
    return 0


if __name__ == "__main__":
    # `python -m` runs a second copy of this file; use the engine's own module.
    sys.exit(sys.modules["stillair.gases"].main())
