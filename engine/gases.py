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
:class:`~engine.validity.InputError` names the range.  Krypton and xenon transport is further
limited to -100 (xenon: -80) .. 200 degC: ISO 15099 states no range for its linear fits (as
far as recalled -- from memory), which were made for the temperatures of glazing cavities; a straight line through a property growing
like T^0.8 is extrapolation far outside them.

Speed: the first use of a gas tabulates its five primary properties (density/p, viscosity,
conductivity, cp, beta) from CoolProp's low-level AbstractState on a 1 K temperature grid times
Chebyshev nodes in pressure (2,000 to 6,000 states, 0.05-0.5 s).  Afterwards a value costs a cubic
spline in T and a short Chebyshev series in p (interpolation error below 1e-6 relative, checked
in the tests), and repeated scalar states are served from an LRU cache.  Kinematic viscosity,
diffusivity and Prandtl number are formed from the interpolated primaries, so that nu = mu/rho,
alpha = k/(rho cp) and Pr = mu cp/k hold to rounding.
"""

from __future__ import annotations

import math
import threading
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable

import numpy as np
from numpy.polynomial import chebyshev
from scipy.constants import R as GAS_CONSTANT  # J/(mol K), CODATA
from scipy.interpolate import CubicSpline, PPoly

import CoolProp
from CoolProp.CoolProp import PT_INPUTS, iphase_gas

from .validity import (
    ABSOLUTE_ZERO_C,
    InputError,
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
    "parse_gas",
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


def parse_gas(gas) -> tuple[tuple[str, float], ...]:
    """Normalise a gas argument to ``((component, mole_fraction), ...)``.

    ``"Argon"`` gives ``(("argon", 1.0),)``; ``" argon : 0.9 , AIR:0.1"`` gives
    ``(("argon", 0.9), ("air", 0.1))``.  Names are case-insensitive and spaces are ignored
    around names, colons and commas.  Fractions are mole fractions, each in [0, 1], summing to 1
    within 1e-6; they are rescaled to sum exactly to 1, and components with fraction 0 are
    dropped (so "argon:1, air:0" is argon).  Each component may appear once.
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
    """Molar mass, kg/mol, of the gas's CoolProp fluid."""
    return CoolProp.AbstractState("HEOS", GASES[name].coolprop_fluid).molar_mass()


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
        self.t_kelvin = t_kelvin
        count = len(t_kelvin)
        flat = values.transpose(1, 0, 2).reshape(_PRESSURE_NODES, -1)
        coefficients = chebyshev.chebfit(_PRESSURE_NODE_X, flat, _PRESSURE_NODES - 1)
        coefficients = coefficients.reshape(_PRESSURE_NODES, count, len(_PRIMARY))
        self.spline = CubicSpline(t_kelvin, coefficients.transpose(1, 0, 2), axis=0)
        self._slices: dict[float, PPoly] = {}

    @classmethod
    def from_coolprop(cls, gas: GasData) -> "_PropertyTable":
        state = CoolProp.AbstractState("HEOS", gas.coolprop_fluid)
        state.specify_phase(iphase_gas)  # the whole table lies in the vapour region
        t_kelvin = _temperature_grid(gas.t_range)
        values = np.array([[_direct(gas, state, t, p) for p in _PRESSURE_NODE_VALUES]
                           for t in t_kelvin])
        return cls(t_kelvin, values)

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

    def at_pressure(self, pressure: float) -> PPoly:
        """The table at one pressure: a piecewise cubic in T (exactly the spline's values)."""
        piece = self._slices.get(pressure)
        if piece is None:
            x = float(_pressure_variable(pressure))
            basis = chebyshev.chebvander(x, _PRESSURE_NODES - 1)[0]
            piece = PPoly(np.tensordot(self.spline.c, basis, axes=([2], [0])), self.spline.x)
            if len(self._slices) >= 64:  # a bounded cache; pressures rarely vary much
                self._slices.clear()
            self._slices[pressure] = piece
        return piece


def _temperature_grid(t_range: Range) -> np.ndarray:
    low_k, high_k = t_range.low - ABSOLUTE_ZERO_C, t_range.high - ABSOLUTE_ZERO_C
    return np.linspace(low_k, high_k, int(math.ceil((high_k - low_k) / _T_STEP)) + 1)


def _direct(gas: GasData, state, t_kelvin: float, pressure: float) -> list[float]:
    """The primary properties straight from CoolProp (and the ISO fits), no interpolation."""
    state.update(PT_INPUTS, pressure, t_kelvin)
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
                    table = _PropertyTable.from_coolprop(GASES[mixture.components[0][0]])
                else:
                    mixtures = [key for key in _TABLES if not key.is_pure]
                    if len(mixtures) >= _MIXTURE_TABLE_LIMIT:
                        del _TABLES[mixtures[0]]  # the oldest mixture goes first
                    table = _PropertyTable.from_mixture(mixture)
                _TABLES[mixture] = table
    return table


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


def _checked_state(function: str, mixture: "_Mixture", t, pressure):
    """Check t (degC) and pressure (Pa) against the gas's ranges; broadcast them."""
    t = require_finite(function, "t", t)
    below_zero = ~(t > ABSOLUTE_ZERO_C)
    if np.any(below_zero):
        bad = t[below_zero].flat[0] if t.ndim else t.item()
        raise InputError(function, "t", bad, f"above absolute zero ({ABSOLUTE_ZERO_C:g} °C)")
    require_between(function, "t", t, mixture.t_range.low, mixture.t_range.high,
                    f"°C for {mixture.label}")
    pressure = require_positive(function, "pressure", pressure, "Pa")
    require_between(function, "pressure", pressure, GAS_PRESSURE_RANGE.low, GAS_PRESSURE_RANGE.high, "Pa")
    return np.broadcast_arrays(t, pressure)


_PLAIN_NUMBERS = (float, int, np.float64)


@lru_cache(maxsize=4096)
def _scalar_state(mixture: _Mixture, t: float, pressure: float) -> GasProperties:
    primaries = _table(mixture).at_pressure(pressure)(t - ABSOLUTE_ZERO_C).tolist()
    return _assemble(mixture, t, pressure, *primaries)


def _state(function: str, gas, t, pressure) -> GasProperties:
    """All properties; the one path every public property function goes through."""
    mixture = _mixture(function, gas)
    # Fast path for plain scalars inside every range (NaN fails the comparisons): plain
    # comparisons instead of array checks, and a cache of recent states.  Anything else takes
    # the full checks, which also write the error messages.
    if (type(t) in _PLAIN_NUMBERS and type(pressure) in _PLAIN_NUMBERS
            and mixture.t_range.low <= t <= mixture.t_range.high
            and GAS_PRESSURE_RANGE.low <= pressure <= GAS_PRESSURE_RANGE.high):
        return _scalar_state(mixture, float(t), float(pressure))
    t_array, p_array = _checked_state(function, mixture, t, pressure)
    if t_array.ndim == 0:
        return _scalar_state(mixture, float(t_array), float(p_array))
    primaries = _table(mixture).evaluate(t_array - ABSOLUTE_ZERO_C, p_array)
    return _assemble(mixture, np.array(t_array), np.array(p_array),
                     *np.moveaxis(primaries, -1, 0))


def gas_properties(gas, t, pressure=STANDARD_PRESSURE, *,
                   function_name: str = "gas_properties") -> GasProperties:
    """All properties of ``gas`` at temperature ``t`` (degC) and ``pressure`` (Pa) at once.

    The fast path for code needing several properties per state (convection, the network
    solver): one table look-up gives density, viscosity, kinematic viscosity, conductivity, cp,
    thermal diffusivity, Prandtl number, expansion coefficient and molar mass, as a frozen
    :class:`GasProperties`.  Arrays broadcast; scalars give floats.  Sources, mixing rules and
    ranges: see the module docstring and :data:`GASES`.  ``function_name`` is the name error
    messages start with (a caller such as ``h_cavity`` passes its own).
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


GAS_PROPERTY_TABLE: tuple[GasPropertyInfo, ...] = (
    GasPropertyInfo("density", "density rho", "kg/m3",
                 "From the equation of state of each gas (real gas); mixtures by additive "
                 "molar volumes, which is ISO 15099's ideal-gas rule for ideal gases."),
    GasPropertyInfo("viscosity", "dynamic viscosity mu", "Pa s",
                 "CoolProp transport models; krypton and xenon ISO 15099 Table B.1 fits; "
                 "mixtures by Wilke's rule as in ISO 15099 Annex B."),
    GasPropertyInfo("kinvisc", "kinematic viscosity nu = mu/rho", "m2/s",
                 "Formed from the viscosity and density given by gas_viscosity and gas_density."),
    GasPropertyInfo("conductivity", "thermal conductivity k", "W/(m K)",
                 "CoolProp transport models; krypton and xenon ISO 15099 Table B.1 fits; "
                 "mixtures by the ISO 15099 Annex B rule (translational and internal parts)."),
    GasPropertyInfo("cp", "isobaric specific heat capacity cp", "J/(kg K)",
                 "From the equation of state of each gas (real gas); mixtures by "
                 "mass-fraction weighting (ISO 15099 Annex B)."),
    GasPropertyInfo("diffusivity", "thermal diffusivity alpha = k/(rho cp)", "m2/s",
                 "Formed from the conductivity, density and cp of the other functions."),
    GasPropertyInfo("prandtl", "Prandtl number Pr = mu cp/k", "-",
                 "Formed from the viscosity, cp and conductivity of the other functions."),
    GasPropertyInfo("expansion", "isobaric expansion coefficient beta = -(1/rho) (d rho/dT)_p",
                 "1/K",
                 "Real-gas value from the equation of state (mixtures: volume-fraction average); "
                 "ideal=True gives the ideal-gas value 1/T with T in kelvin."),
)


def _range_lines() -> str:
    lines = [f"    {gas.name:<9} {gas.t_range.low:g} .. {gas.t_range.high:g} °C"
             for gas in GASES.values()]
    return "\n".join(lines)


def _docstring(info: GasPropertyInfo, for_air: bool) -> str:
    subject = "air" if for_air else "a gas or gas mixture"
    gas_line = "" if for_air else (
        "    gas: one of " + ", ".join(GAS_NAMES) + ", or a mixture of them written\n"
        '        "argon:0.9, air:0.1" (mole fractions summing to 1); case and spaces are free.\n')
    ideal_line = ("    ideal: False (default) for the real-gas beta, True for 1/T.\n"
                  if info.name == "expansion" else "")
    return (
        f"The {info.quantity} of {subject}, {info.unit}.\n\n"
        f"Arguments:\n{gas_line}"
        "    t: temperature, °C (number or array).\n"
        f"    pressure: absolute pressure, Pa (default {STANDARD_PRESSURE:g}), "
        f"{GAS_PRESSURE_RANGE.low:g} .. {GAS_PRESSURE_RANGE.high:g}.\n"
        f"{ideal_line}\n"
        "t and pressure broadcast; scalar inputs give a float.\n\n"
        f"Source: {info.definition}  Details in the engine.gases module docstring.\n\n"
        f"Valid temperatures (outside: InputError):\n{_range_lines()}\n"
    )


def _property_of(function_name: str, info: GasPropertyInfo, gas, t, pressure, ideal=False):
    state = _state(function_name, gas, t, pressure)
    if ideal:
        return 1.0 / (state.t - ABSOLUTE_ZERO_C)
    return getattr(state, info.name)


def _make_gas_function(info: GasPropertyInfo) -> Callable:
    name = f"gas_{info.name}"
    if info.name == "expansion":
        def function(gas, t, pressure=STANDARD_PRESSURE, ideal=False):
            return _property_of(name, info, gas, t, pressure, ideal=bool(ideal))
    else:
        def function(gas, t, pressure=STANDARD_PRESSURE):
            return _property_of(name, info, gas, t, pressure)
    return _named(function, name, _docstring(info, for_air=False))


def _make_air_function(info: GasPropertyInfo) -> Callable:
    name = f"air_{info.name}"
    if info.name == "expansion":
        def function(t, pressure=STANDARD_PRESSURE, ideal=False):
            return _property_of(name, info, "air", t, pressure, ideal=bool(ideal))
    else:
        def function(t, pressure=STANDARD_PRESSURE):
            return _property_of(name, info, "air", t, pressure)
    return _named(function, name, _docstring(info, for_air=True))


def _named(function: Callable, name: str, doc: str) -> Callable:
    function.__name__ = function.__qualname__ = name
    function.__doc__ = doc
    function.__module__ = __name__
    return function


for _info in GAS_PROPERTY_TABLE:
    for _factory in (_make_gas_function, _make_air_function):
        _function = _factory(_info)
        globals()[_function.__name__] = _function
        __all__.append(_function.__name__)
del _info, _factory, _function
