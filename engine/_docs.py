"""Numpydoc text that several public functions share, written once.

A docstring names a shared block as ``{block_name}`` on a line of its own; :func:`shared_docs`
puts the block in when the module is imported, so ``help()`` shows every function's text in
full while the words exist in one place.  A module may add blocks of its own (the heat-sink
parameters in channel.py).  Only the named placeholders are replaced: other braces in a
docstring (``{"up", "down"}``) stay as they are.
"""

from __future__ import annotations

import re
import textwrap
from typing import Callable, Mapping, TypeVar

F = TypeVar("F", bound=Callable)


def fill(text: str, width: int, initial_indent: str = "", subsequent_indent: str = "") -> str:
    """``textwrap.fill(text, width, initial_indent=..., subsequent_indent=...)``, character for
    character, without textwrap's regular expressions where they cannot change the result.

    The engine's docstrings are written when it is imported, some 550 paragraphs, and textwrap
    (a regular expression splitting every paragraph into chunks, then the chunks laid out) was
    about a fifth of ``import stillair``.  For text of single-space-separated words textwrap's
    chunks are the words themselves, except that it may break a word at a hyphen, and breaks a
    word longer than a line: so the words are laid out greedily here (textwrap's own rule: the
    next word goes on the line while the line stays within ``width``), and the text goes to
    textwrap itself whenever it holds other whitespace, or a word longer than a line, or a line
    must end before a word with a hyphen in it.  tests/test_docs.py compares the two over the
    engine's docstrings and over generated text."""
    words = text.split(" ")
    first_room, later_room = width - len(initial_indent), width - len(subsequent_indent)
    # Any whitespace but single spaces between words (textwrap expands, replaces or drops it).
    if text.split() != words or first_room <= 0 or later_room <= 0:
        return textwrap.fill(text, width, initial_indent=initial_indent, subsequent_indent=subsequent_indent)
    lines: list[str] = []
    line, used, room, indent = [words[0]], len(words[0]), first_room, initial_indent
    if used > room:
        return textwrap.fill(text, width, initial_indent=initial_indent, subsequent_indent=subsequent_indent)
    for word in words[1:]:
        if used + 1 + len(word) <= room:
            line.append(word)
            used += 1 + len(word)
            continue
        if "-" in word or len(word) > min(room, later_room):   # textwrap would split this word
            return textwrap.fill(text, width, initial_indent=initial_indent, subsequent_indent=subsequent_indent)
        lines.append(indent + " ".join(line))
        line, used, room, indent = [word], len(word), later_room, subsequent_indent
    lines.append(indent + " ".join(line))
    return "\n".join(lines)

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
