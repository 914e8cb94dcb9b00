"""Numpydoc text that several public functions share, written once.

A docstring names a shared block as ``{block_name}`` on a line of its own; :func:`shared_docs`
puts the block in when the module is imported, so ``help()`` shows every function's text in
full while the words exist in one place.  A module may add blocks of its own (the heat-sink
parameters in channel.py).  Only the named placeholders are replaced: other braces in a
docstring (``{"up", "down"}``) stay as they are.
"""

from __future__ import annotations

import re
from typing import Callable, Mapping, TypeVar

F = TypeVar("F", bound=Callable)

GAS_AND_PRESSURE = '''    gas : str, default "air"
        Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).
    pressure : array_like, default 101325
        Absolute pressure in Pa.'''

METHOD = '''    method : str, default "auto"
        A method registered for the geometry, or "auto" (the geometry's auto rule).'''

PROPERTY_OPTIONS = '''    property_temperature : array_like, optional
        Temperature in °C at which to take the gas properties instead of the film (mean)
        temperature, to reproduce a constant-property hand calculation.
    ideal_expansion : bool, default False
        Use the ideal-gas expansion coefficient 1/T (T in K at the film temperature) instead of
        the real gas's.
    function_name : str, optional
        The name error messages and range notes are given under (the caller's cell function).'''

CONVECTION_RESULT = '''    Returns
    -------
    ConvectionResult
        h in W/(m²·K) with Nu, Ra, Gr, Pr, the film temperature (°C), the conductivity
        (W/(m·K)), the length (m), the method, the case, whether in range and the range note,
        element by element as arrays of the broadcast shape (``.scalar()`` for floats).

    Raises
    ------
    InputError
        A value that is not finite, a length that is not positive, an unknown geometry, gas,
        facing or method, or a temperature outside the gas's range.'''

BUOYANCY_INPUTS = '''    t1 : array_like
        First temperature (the surface) in °C.
    t2 : array_like
        Second temperature (the fluid or the other face) in °C.
    length : array_like
        Characteristic length in m, > 0 (the geometry's: height, area/perimeter, diameter, gap).
''' + GAS_AND_PRESSURE + '''
    ideal_expansion : bool, default False
        Use the ideal-gas expansion coefficient 1/T (T in K) instead of the real gas's.'''

BUOYANCY_RAISES = '''    Raises
    ------
    InputError
        A length that is not positive, a temperature outside the gas's range, an unknown gas.'''

BLOCKS = {"gas_and_pressure": GAS_AND_PRESSURE, "method": METHOD, "property_options": PROPERTY_OPTIONS,
          "convection_result": CONVECTION_RESULT, "buoyancy_inputs": BUOYANCY_INPUTS,
          "buoyancy_raises": BUOYANCY_RAISES}


def shared_docs(function: F, blocks: Mapping[str, str] | None = None) -> F:
    """Fill the ``{block_name}`` lines of ``function``'s docstring from :data:`BLOCKS` and
    ``blocks`` (a module's own)."""
    doc = function.__doc__ or ""
    for name, text in {**BLOCKS, **(blocks or {})}.items():
        doc = re.sub(r"(?m)^[ \t]*\{" + re.escape(name) + r"\}$", lambda _: text, doc)
    function.__doc__ = doc
    return function
