"""The property functions gas_* and air_*: each written out with its signature, its docstring
generated from :data:`GAS_PROPERTY_TABLE` and :data:`~stillair.gases.GASES` (the facts stay in the
tables), its body one call of the shared implementation."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, TypeVar

from .._docs import fill
from ..plausibility import temperature_slip, warn_slips
from .._typing import ArrayLike, FloatOrArray
from ..validity import ABSOLUTE_ZERO_C
from .data import GAS_PRESSURE_RANGE, GASES, STANDARD_PRESSURE, _gas_doc, _range_lines, _source_lines
from .state import _state

F = TypeVar("F", bound=Callable[..., FloatOrArray])


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
    method = fill(
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


_INFO = {info.name: info for info in GAS_PROPERTY_TABLE}
_WRITTEN: set[str] = set()


def _property_function(function: F) -> F:
    """Give ``air_<property>`` or ``gas_<property>`` its docstring from the property's entry of
    :data:`GAS_PROPERTY_TABLE` (an entry without both functions fails at import, below)."""
    subject, _, name = function.__name__.partition("_")
    function.__doc__ = _docstring(_INFO[name], for_air=subject == "air")
    _WRITTEN.add(function.__name__)
    return function


def _property_of(function_name: str, name: str, gas: str, t: ArrayLike, pressure: ArrayLike,
                 ideal: bool = False) -> FloatOrArray:
    """The shared implementation: one state, one attribute (or the ideal-gas beta 1/T)."""
    state = _state(function_name, gas, t, pressure)
    warn_slips(function_name, temperature_slip({"t": t}), stacklevel=4)  # at the user's line
    if ideal:
        return 1.0 / (state.t - ABSOLUTE_ZERO_C)
    return getattr(state, name)


@_property_function
def gas_density(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_density", "density", gas, t, pressure)


@_property_function
def gas_viscosity(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_viscosity", "viscosity", gas, t, pressure)


@_property_function
def gas_kinvisc(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_kinvisc", "kinvisc", gas, t, pressure)


@_property_function
def gas_conductivity(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_conductivity", "conductivity", gas, t, pressure)


@_property_function
def gas_cp(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_cp", "cp", gas, t, pressure)


@_property_function
def gas_diffusivity(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_diffusivity", "diffusivity", gas, t, pressure)


@_property_function
def gas_prandtl(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("gas_prandtl", "prandtl", gas, t, pressure)


@_property_function
def gas_expansion(gas: str, t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE,
                  ideal: bool = False) -> FloatOrArray:
    return _property_of("gas_expansion", "expansion", gas, t, pressure, ideal=bool(ideal))


@_property_function
def air_density(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_density", "density", "air", t, pressure)


@_property_function
def air_viscosity(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_viscosity", "viscosity", "air", t, pressure)


@_property_function
def air_kinvisc(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_kinvisc", "kinvisc", "air", t, pressure)


@_property_function
def air_conductivity(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_conductivity", "conductivity", "air", t, pressure)


@_property_function
def air_cp(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_cp", "cp", "air", t, pressure)


@_property_function
def air_diffusivity(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_diffusivity", "diffusivity", "air", t, pressure)


@_property_function
def air_prandtl(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE) -> FloatOrArray:
    return _property_of("air_prandtl", "prandtl", "air", t, pressure)


@_property_function
def air_expansion(t: ArrayLike, pressure: ArrayLike = STANDARD_PRESSURE, ideal: bool = False) -> FloatOrArray:
    return _property_of("air_expansion", "expansion", "air", t, pressure, ideal=bool(ideal))


PROPERTY_FUNCTIONS: tuple[str, ...] = tuple(f"{subject}_{info.name}" for info in GAS_PROPERTY_TABLE
                                            for subject in ("gas", "air"))
# Every property of the table has both functions written above, and no function lacks its entry.
if set(PROPERTY_FUNCTIONS) != _WRITTEN:
    raise RuntimeError("stillair.gases: GAS_PROPERTY_TABLE and the written property functions "
                       f"differ: {sorted(set(PROPERTY_FUNCTIONS) ^ _WRITTEN)}")
