"""Numpydoc text that several public functions share, written once.

A docstring names a shared block as ``{block_name}`` on a line of its own; :func:`shared_docs`
puts the block in when the module is imported, so ``help()`` shows every function's text in
full while the words exist in one place.  Only the named placeholders are replaced: other braces
in a docstring (``{"up", "down"}``) stay as they are.
"""

from __future__ import annotations

from typing import Callable, TypeVar

F = TypeVar("F", bound=Callable)

GAS_AND_PRESSURE = '''    gas : str, default "air"
        Gas name or mixture such as "argon:0.9, air:0.1" (mole fractions).
    pressure : array_like, default 101325
        Absolute pressure in Pa.'''

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

BUOYANCY_RAISES = '''    Raises
    ------
    InputError
        A length that is not positive, a temperature outside the gas's range, an unknown gas.'''

BLOCKS = {name.lower(): text for name, text in globals().items()
          if name.isupper() and isinstance(text, str)}


def shared_docs(function: F) -> F:
    """Fill the ``{block_name}`` lines of ``function``'s docstring from :data:`BLOCKS`."""
    doc = function.__doc__ or ""
    for name, text in BLOCKS.items():
        doc = doc.replace("    {" + name + "}", text)
    function.__doc__ = doc
    return function
