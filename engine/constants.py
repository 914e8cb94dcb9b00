"""Physical constants, each with its source, as plain floats.

Literal values rather than ``scipy.constants``: importing that module costs about 0.2 s, more than
the rest of the engine's start-up.  Each value is the SI definition or follows exactly from the
defining constants of the SI (SI Brochure, 9th edition, BIPM 2019, section 2.2; the values
CODATA 2018 lists as exact), formed here in the same floating-point operations, so they equal
``scipy.constants`` bit for bit (tests/test_constants.py compares them).
"""

from __future__ import annotations

import math

__all__ = ["ZERO_CELSIUS", "STANDARD_GRAVITY", "STEFAN_BOLTZMANN", "MOLAR_GAS_CONSTANT"]

# The defining constants of the SI (SI Brochure, 9th ed., 2019, Table 1): exact.
_PLANCK = 6.62607015e-34          # h, J s
_BOLTZMANN = 1.380649e-23         # k, J/K
_AVOGADRO = 6.02214076e23         # N_A, 1/mol
_SPEED_OF_LIGHT = 299792458.0     # c, m/s

#: 0 °C in kelvin: the Celsius scale's definition, t/°C = T/K - 273.15 (SI Brochure, 2.3.1).
ZERO_CELSIUS = 273.15
#: Standard acceleration of gravity g_n, m/s² (3rd CGPM, 1901; SI Brochure, 9th ed., note to
#: Table 8): exact by definition.
STANDARD_GRAVITY = 9.80665
#: Stefan–Boltzmann constant σ = 2 π⁵ k⁴ / (15 h³ c²), W/(m²·K⁴): exact in the SI since 2019
#: (5.670 374 419… × 10⁻⁸, CODATA 2018).
STEFAN_BOLTZMANN = 2.0 * math.pi ** 5 * _BOLTZMANN ** 4 / (15.0 * _PLANCK ** 3 * _SPEED_OF_LIGHT ** 2)
#: Molar gas constant R = N_A k, J/(mol·K): exact in the SI since 2019 (8.314 462 618…, CODATA 2018).
MOLAR_GAS_CONSTANT = _AVOGADRO * _BOLTZMANN
