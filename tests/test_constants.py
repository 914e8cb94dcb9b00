"""The engine's physical constants (stillair.constants) against scipy.constants (CODATA 2018),
and a start-up that leaves scipy's heavy modules unloaded until they are used."""

from __future__ import annotations

import subprocess
import sys

import scipy.constants

from stillair import constants


def test_each_constant_equals_scipy_bit_for_bit():
    assert constants.ZERO_CELSIUS == scipy.constants.zero_Celsius
    assert constants.STANDARD_GRAVITY == scipy.constants.g
    assert constants.STEFAN_BOLTZMANN == scipy.constants.Stefan_Boltzmann
    assert constants.MOLAR_GAS_CONSTANT == scipy.constants.R


def test_the_published_roundings():
    # CODATA 2018 prints sigma = 5.670 374 419 e-8 and R = 8.314 462 618 (both exact, truncated)
    assert abs(constants.STEFAN_BOLTZMANN - 5.670374419e-8) < 1e-17
    assert abs(constants.MOLAR_GAS_CONSTANT - 8.314462618) < 1e-9


def test_importing_the_engine_loads_no_scipy_module():
    # scipy.optimize (brentq) and scipy.integrate are imported where used; the constants are ours
    probe = "import sys, stillair; print(sorted(m for m in sys.modules if m.startswith('scipy')))"
    run = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=120,
                         check=True)
    assert run.stdout.strip() == "[]", run.stdout
