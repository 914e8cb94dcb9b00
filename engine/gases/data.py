"""The gases: each pure gas's reference source, validity range and non-CoolProp transport fits,
and the docstring text generated from them (every docstring that lists gases reads it here)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .._docs import fill
from ..validity import Range

STANDARD_PRESSURE = 101325.0  # Pa, 1 standard atmosphere
GAS_PRESSURE_RANGE = Range("pressure", 1.0e3, 2.0e5)  # Pa, the band every gas here is a vapour in
MIXTURE_SUM_TOLERANCE = 1e-6

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


def _range_lines(indent: str) -> str:
    """The valid temperatures of every gas, from :data:`GASES`."""
    return "\n".join(f"{indent}{gas.name:<9} {gas.t_range.low:g} to {gas.t_range.high:g} °C"
                     for gas in GASES.values())


def _source_lines(indent: str, names: tuple[str, ...] | None = None) -> str:
    """The reference formulations of the gases ``names`` (every gas of :data:`GASES`, and the
    mixing rules, by default)."""
    lines = [f"{gas.name}: {gas.source}." for gas in GASES.values() if names is None or gas.name in names]
    if names is None:
        lines.append("Mixtures: ISO 15099:2003, Annex B.")
    return "\n".join(fill(line, 92, indent, indent + "    ") for line in lines)


def _gas_doc(indent: str) -> str:
    """How a gas argument is written, for every docstring that takes one."""
    return fill(
        "One of " + ", ".join(GAS_NAMES) + ', or a mixture of them written "argon:0.9, '
        'air:0.1" (mole fractions summing to 1 within '
        f"{MIXTURE_SUM_TOLERANCE:g}); case and spaces are free.", 92, indent, indent).lstrip()
