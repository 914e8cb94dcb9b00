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

Layout: :mod:`.data` (the gases and their sources), :mod:`.tables` (one table, the tabulation),
:mod:`.shipped` (the table file and provenance), :mod:`.mixtures` (parsing and ISO 15099 mixing),
:mod:`.state` (all properties at once, the checks), :mod:`.properties` (the gas_* and air_*
functions).  Everything is imported from ``stillair.gases``.
"""

from __future__ import annotations

# Besides the public names (__all__), the package keeps importable the private ones that other
# engine modules, the rebuild command and the tests use (_reset_tables, _mix, _PRIMARY ...).
from .data import (GAS_NAMES, GAS_PRESSURE_RANGE, GASES, MIXTURE_SUM_TOLERANCE, STANDARD_PRESSURE,
                   GasData, LinearFit)
from .mixtures import _mix, _Mixture, _parse_text, _wilke_mix, _wilke_phi, parse_gas
from .properties import (GAS_PROPERTY_TABLE, GasPropertyInfo, air_conductivity, air_cp, air_density,
                         air_diffusivity, air_expansion, air_kinvisc, air_prandtl, air_viscosity,
                         gas_conductivity, gas_cp, gas_density, gas_diffusivity, gas_expansion,
                         gas_kinvisc, gas_prandtl, gas_viscosity)
from .shipped import (TABLE_FILE, TABLE_FILE_VARIABLE, _definition, gas_table_provenance,
                      table_file_arrays, write_table_file)
from .state import (GasProperties, _checked_pressure, _reset_tables, _scalar_state, gas_properties,
                    plain_mixture, plain_state, plain_state_accepted, require_gas_temperature)
from .tables import _PRESSURE_NODE_VALUES, _PRIMARY, _coolprop

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
    "gas_density", "air_density", "gas_viscosity", "air_viscosity", "gas_kinvisc", "air_kinvisc",
    "gas_conductivity", "air_conductivity", "gas_cp", "air_cp", "gas_diffusivity", "air_diffusivity",
    "gas_prandtl", "air_prandtl", "gas_expansion", "air_expansion",
]

# The public functions are documented, and their examples run, as stillair.gases.<name>: their
# home for users, whichever module of the package defines them.
_PUBLIC_FUNCTIONS = (parse_gas, gas_properties, gas_table_provenance, require_gas_temperature,
                     gas_density, air_density, gas_viscosity, air_viscosity, gas_kinvisc, air_kinvisc,
                     gas_conductivity, air_conductivity, gas_cp, air_cp, gas_diffusivity,
                     air_diffusivity, gas_prandtl, air_prandtl, gas_expansion, air_expansion)
for _function in _PUBLIC_FUNCTIONS:
    _function.__module__ = __name__
__test__ = {function.__name__: function for function in _PUBLIC_FUNCTIONS}


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
    path = write_table_file(args.output, table_file_arrays())
    print(f"wrote {path} ({path.stat().st_size / 1e6:.2f} MB, "
          f"CoolProp {_coolprop().__version__})")
    return 0
