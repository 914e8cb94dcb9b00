"""Docstrings generated from the registry: the Notes of every ``nu_*`` and ``h_*`` function list
the registered methods with title, equation, validity and source, and the auto rule."""

from __future__ import annotations

from functools import lru_cache
from typing import Any, Callable, Sequence, TypeVar

from .._docs import fill
from .registry import CORRELATIONS, GEOMETRIES

F = TypeVar("F", bound=Callable[..., Any])

#: What each geometry input is, for the Parameters section (name -> (type, description)).
INPUT_DOCS = {
    "ra": ("array_like", "Rayleigh number on the geometry's own length (-), >= 0."),
    "pr": ("array_like", "Prandtl number of the fluid (-), > 0."),
    "aspect": ("array_like", "Height/gap H/L of the layer (-), > 0."),
    "slenderness": ("array_like", "Height/diameter of the cylinder (-), > 0."),
    "tilt": ("array_like", "Tilt in degrees."),
}


def _indent(text: str, spaces: int = 4) -> str:
    return fill(" ".join(text.split()), 96, " " * spaces, " " * spaces)


# Read once per geometry: its nu_ and h_ functions (and cavity_method) share the section, and
# writing it is most of what documenting costs at import.
@lru_cache(maxsize=None)
def methods_section(geometry: str) -> str:
    """The Notes section of a geometry's public functions: every registered method with its
    title, equation, validity and source, and the auto rule, read from the registry."""
    geo = GEOMETRIES[geometry]
    lines = ["Notes", "-----", f"Methods for the {geo.title or geo.name} (from the correlation registry):", ""]
    for method in geo.methods:
        corr = CORRELATIONS[(geometry, method)]
        cases = corr.cases if corr.cases else (None,)
        validity = "; ".join(dict.fromkeys(f"{c}: {corr.describe_validity(c)}" if c else corr.describe_validity()
                                           for c in cases)) if corr.validity_by_case else corr.describe_validity()
        lines += [f"``{method}``", _indent(f"{corr.title}.", 4), _indent(f"Equation: {corr.equation}", 4),
                  _indent(f"Valid: {validity}.", 4), _indent(f"Source: {corr.source}", 4), ""]
    lines += ['``"auto"``', _indent(geo.description, 4)]
    return "\n".join(lines)


def document(function: F, geometry: str, summary: str, parameters: Sequence[tuple[str, str, str]],
             returns: tuple[str, str], example: str) -> F:
    """Give ``function`` a numpydoc docstring: ``summary``, its ``parameters`` (name, type,
    description with unit), ``returns`` (type, description), the geometry's methods and auto
    rule from the registry, and an ``example`` (doctest lines)."""
    lines = [summary, "", "Parameters", "----------"]
    for name, kind, text in parameters:
        lines += [f"{name} : {kind}", _indent(text, 4)]
    lines += ["", "Returns", "-------", returns[0], _indent(returns[1], 4), "",
              "Warns", "-----", "CorrelationRangeWarning",
              _indent("When an input lies outside the published range of the method used (the value is "
                      "still returned).", 4), "",
              methods_section(geometry), "", "Examples", "--------", example]
    function.__doc__ = "\n".join(lines) + "\n"
    return function


def nusselt_parameters(geometry: str, tilt_doc: str = "", case: bool = False):
    """The Parameters entries of a ``nu_<geometry>`` function, from the geometry's inputs."""
    geo = GEOMETRIES[geometry]
    entries = []
    for name in geo.inputs:
        kind, text = INPUT_DOCS[name]
        entries.append((name, kind, tilt_doc if name == "tilt" and tilt_doc else text))
    if case:
        entries.append(("case", "str", 'One of ' + ", ".join(f'"{c}"' for c in geo.cases)
                        + " (the face looks up or down and is hotter or colder than the fluid)."))
    entries.append(("method", 'str, default "auto"', f'One of {geo.method_help()}, or "auto" (see Notes).'))
    return entries
