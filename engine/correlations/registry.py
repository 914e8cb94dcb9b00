"""The registry itself: geometries and correlations are registered once, beside their code, and
everything else reads them here."""

from __future__ import annotations

from typing import Callable, Mapping, Sequence

import numpy as np

from ..validity import Range
from .types import Correlation, Geometry

GEOMETRIES: dict[str, Geometry] = {}
CORRELATIONS: dict[tuple[str, str], Correlation] = {}


def define_geometry(geometry: Geometry) -> Geometry:
    if geometry.parameters and geometry.parameters[0].name != geometry.length:
        raise RuntimeError(f"{geometry.name}: the first parameter must be the length {geometry.length!r}")
    for case in geometry.cases or (None,):
        steps = geometry.auto.get(case)
        if not steps:
            raise RuntimeError(f"{geometry.name}: case {case!r} has no auto rule")
    GEOMETRIES[geometry.name] = geometry
    return geometry


def correlation(*, geometry: str, method: str, title: str, source: str, equation: str,
                validity: Sequence[Range] = (), cases: Sequence[str] = (), notes: str = "",
                validity_by_case: Mapping[str, Sequence[Range]] | None = None,
                forms: Mapping[str, Callable[..., np.ndarray]] | None = None):
    """Register a correlation function ``f(**inputs) -> Nu`` under (geometry, method).

    ``validity_by_case`` (optional) gives the ranges of cases whose published range differs
    from ``validity``.
    """

    def register(function):
        key = (geometry, method)
        if key in CORRELATIONS:
            raise RuntimeError(f"correlation {key} registered twice")
        if geometry not in GEOMETRIES:
            raise RuntimeError(f"unknown geometry {geometry!r}; define it first")
        _METHODS_CACHE.clear()
        CORRELATIONS[key] = Correlation(
            geometry=geometry, method=method, function=function, title=title, source=source,
            equation=equation, validity=tuple(validity), cases=tuple(cases), notes=notes,
            validity_by_case={c: tuple(r) for c, r in (validity_by_case or {}).items()},
            forms=dict(forms or {}))
        return function

    return register


_METHODS_CACHE: dict[tuple[str, str | None], list[str]] = {}


def methods_for(geometry: str, case: str | None = None) -> list[str]:
    """Method names registered for a geometry (and case), in registration order.

    Parameters
    ----------
    geometry : str
        A geometry name of the registry (a key of :data:`GEOMETRIES`: "vplate", "cavity" ...).
    case : str, optional
        For plate geometries, "hot-up", "hot-down", "cold-up" or "cold-down": only the methods
        that serve that case.  None (the default) lists every method.

    Returns
    -------
    list of str
        The method names, as accepted by the ``method`` argument of the ``nu_*`` and ``h_*``
        functions (besides "auto").

    Notes
    -----
    Read from the correlation registry (:data:`CORRELATIONS`); each method's source, equation and
    validity are in its :class:`Correlation` and in the ``nu_<geometry>`` docstrings.

    Examples
    --------
    >>> methods_for("hplate", "hot-up")
    ['lloyd-moran', 'vdi', 'mcadams']
    """
    key = (geometry, case)
    if key not in _METHODS_CACHE:
        _METHODS_CACHE[key] = [c.method for (g, _), c in CORRELATIONS.items()
                               if g == geometry and (case is None or not c.cases or case in c.cases)]
    return list(_METHODS_CACHE[key])


def get_correlation(geometry: str, method: str) -> Correlation:
    """The registered correlation of ``geometry`` named ``method``, with its source and ranges.

    Parameters
    ----------
    geometry : str
        A geometry name of the registry (a key of :data:`GEOMETRIES`).
    method : str
        A method name of that geometry (see :func:`methods_for`).

    Returns
    -------
    Correlation
        Its ``title``, ``source``, ``equation``, ``validity`` (published ranges), ``cases``,
        ``notes`` and the vectorised ``function``.

    Raises
    ------
    KeyError
        No such geometry and method in the registry.

    Notes
    -----
    Read from the correlation registry (:data:`CORRELATIONS`), where each correlation is
    registered once, beside its code, with its source and validity.

    Examples
    --------
    >>> corr = get_correlation("hcyl", "churchill-chu")
    >>> corr.title
    'Churchill and Chu, horizontal cylinder'
    >>> [(r.quantity, r.low, r.high) for r in corr.validity]
    [('Ra', 1e-05, 1000000000000.0)]
    """
    try:
        return CORRELATIONS[(geometry, method)]
    except KeyError:
        raise KeyError(f"no correlation {method!r} for {geometry}") from None

